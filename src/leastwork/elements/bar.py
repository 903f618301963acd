"""The bar: a pin-ended member carrying its axial force only.

Basic force: the axial force ``ID`` (tension positive). Its unit field is n = 1 along the
member; the flexibility is ``L/EA`` and the initial deformation conjugate to it is
``int n0 dx / EA + alpha dT L + e`` (span loads, uniform temperature, misfit).
"""

from __future__ import annotations

from collections.abc import Sequence
from typing import Any

from .base import BasicForce, EnergyTerm, KindBase, Poly, register

__all__ = ["Bar", "axial_entries"]


def axial_entries(m, c, s) -> list[tuple[str, Any]]:
    """Equilibrium entries of a unit axial force (tension): it pulls the start node towards
    the end (+ex) and the end node towards the start (-ex)."""
    return [(f"{m.start}.x", c), (f"{m.start}.y", s), (f"{m.end}.x", -c), (f"{m.end}.y", -s)]


class Bar(KindBase):
    """Pin-ended member: axial force only (section EA)."""

    name = "bar"

    def basic_forces(self, m) -> tuple[BasicForce, ...]:
        return (BasicForce(m.id, "axial"),)

    def equilibrium(self, m, L, c, s, one) -> list[list[tuple[str, Any]]]:
        return [axial_entries(m, c, s)]

    def unit_fields(self, m, L, one, zero) -> list[dict[str, Poly]]:
        return [{"n": [one]}]

    def force_fields(self, m, L, values: Sequence, zero) -> dict[str, Poly]:
        return {"n": [values[0]]}

    def section(self, m, sec, shear: bool) -> dict[str, Any]:
        return {"n": sec.EA}

    def flexibility(self, m, sec, L, shear: bool, one) -> list[EnergyTerm]:
        if sec.EA is None:
            return []
        return [EnergyTerm("axial", (0,), [[L / sec.EA]])]

    def initial_deformations(self, m, sec, L, shear: bool, integral, imposed, one):
        out = []
        if integral is not None and sec.EA is not None:
            out.append(("span loads (axial)", 0, integral("n", [one]) / sec.EA))
        if imposed is not None:
            eps, _, misfit = imposed
            out.append(("temperature (uniform)", 0, eps * L))
            out.append(("misfit", 0, misfit))
        return out

    def free_strains(self, m, sec, L, imposed) -> dict[str, list]:
        eps, _, misfit = imposed
        return {"n": [eps, misfit / L]}


BAR = register(Bar())
