"""The beam: a straight prismatic member in bending, with axial force and, when asked,
shear deformation.

Basic forces: the axial force ``ID.n`` and the section moments at the ends
``ID.start.m``, ``ID.end.m`` (absent at a hinged end). With xi = x/L, the unit fields are
n = 1; m = 1 - xi, v = -1/L for the start moment; m = xi, v = 1/L for the end moment.
Integrating them against each other gives the closed-form flexibility ``L/EA``,
``L/(3EI)`` on the diagonal and ``L/(6EI)`` off it, and ``1/(L GAs)`` times
[[1, -1], [-1, 1]] for shear; a semi-rigid joint of rotational stiffness k at an end adds
``1/k`` to that end moment's flexibility (energy M^2/(2k)); a temperature gradient's free
curvature kappa gives ``kappa L/2`` at each end moment.
"""

from __future__ import annotations

from collections.abc import Sequence
from typing import Any

from .bar import axial_entries
from .base import BasicForce, EnergyTerm, KindBase, Poly, register

__all__ = ["Beam"]


class Beam(KindBase):
    """Bending member with axial force (EA may be None: axially rigid) and shear (GAs)."""

    name = "beam"
    takes_span_loads = True

    def basic_forces(self, m) -> tuple[BasicForce, ...]:
        out = [BasicForce(f"{m.id}.n", "axial")]
        if not m.hinge_start:
            out.append(BasicForce(f"{m.id}.start.m", "start_m"))
        if not m.hinge_end:
            out.append(BasicForce(f"{m.id}.end.m", "end_m"))
        return tuple(out)

    def rotation_nodes(self, m) -> tuple[str, ...]:
        return tuple(n for n, hinged in ((m.start, m.hinge_start), (m.end, m.hinge_end))
                     if not hinged)

    def equilibrium(self, m, L, c, s, one) -> list[list[tuple[str, Any]]]:
        # member on node: start -(me - ms)/L * ey, moment +ms ; end +(me - ms)/L * ey, -me
        ey = (-s, c)
        out = [axial_entries(m, c, s)]
        if not m.hinge_start:
            out.append([(f"{m.start}.x", ey[0] / L), (f"{m.start}.y", ey[1] / L),
                        (f"{m.start}.rz", one),
                        (f"{m.end}.x", -ey[0] / L), (f"{m.end}.y", -ey[1] / L)])
        if not m.hinge_end:
            out.append([(f"{m.start}.x", -ey[0] / L), (f"{m.start}.y", -ey[1] / L),
                        (f"{m.end}.x", ey[0] / L), (f"{m.end}.y", ey[1] / L),
                        (f"{m.end}.rz", -one)])
        return out

    def _ends(self, m) -> list[int]:
        """Which of (start, end) carry a moment."""
        return [k for k, hinged in enumerate((m.hinge_start, m.hinge_end)) if not hinged]

    def unit_fields(self, m, L, one, zero) -> list[dict[str, Poly]]:
        out = [{"n": [one]}]
        per_end = ({"m": [one, -one], "v": [-one / L]}, {"m": [zero, one], "v": [one / L]})
        out += [per_end[k] for k in self._ends(m)]
        return out

    def force_fields(self, m, L, values: Sequence, zero) -> dict[str, Poly]:
        N = values[0]
        ends = [zero, zero]
        for k, v in zip(self._ends(m), values[1:], strict=True):
            ends[k] = v
        ms, me = ends
        slope = (me - ms) / L
        return {"n": [N], "v": [slope], "m": [ms, slope]}

    def section(self, m, sec, shear: bool) -> dict[str, Any]:
        out = {"n": sec.EA, "m": sec.EI}
        if shear and sec.GAs:
            out["v"] = sec.GAs
        return out

    def flexibility(self, m, sec, L, shear: bool, one) -> list[EnergyTerm]:
        out = []
        if sec.EA is not None:
            out.append(EnergyTerm("axial", (0,), [[L / sec.EA]]))
        keep = self._ends(m)
        if not keep:
            return out
        cols = tuple(range(1, 1 + len(keep)))
        d, o = L / (3 * sec.EI), L / (6 * sec.EI)
        bend = [[d, o], [o, d]]
        out.append(EnergyTerm("bending", cols, [[bend[a][b] for b in keep] for a in keep]))
        if shear and sec.GAs:
            sh = one / (L * sec.GAs)
            block = [[sh, -sh], [-sh, sh]]
            out.append(EnergyTerm("shear", cols, [[block[a][b] for b in keep] for a in keep]))
        for col, k in zip(cols, keep, strict=True):  # semi-rigid joint: M^2/(2 k)
            if m.end_springs[k] is not None:  # its stiffness in the pipeline's numbers
                out.append(EnergyTerm("joint spring", (col,), [[one / sec.end_springs[k]]]))
        return out

    def initial_deformations(self, m, sec, L, shear: bool, integral, imposed, one):
        zero = one - one
        keep = self._ends(m)
        index = {k: 1 + i for i, k in enumerate(keep)}
        out = []
        if integral is not None:
            if sec.EA is not None:
                out.append(("span loads (axial)", 0, integral("n", [one]) / sec.EA))
            weights = ([one, -one], [zero, one])  # 1 - x/L, x/L
            for k in keep:
                out.append(("span loads (bending)", index[k], integral("m", weights[k]) / sec.EI))
            if shear and sec.GAs:
                vint = integral("v", [one]) / (L * sec.GAs)
                for k in keep:
                    out.append(("span loads (shear)", index[k], -vint if k == 0 else vint))
        if imposed is not None:
            eps, kappa, misfit = imposed
            out.append(("temperature (uniform)", 0, eps * L))
            out.append(("misfit", 0, misfit))
            for k in keep:
                out.append(("temperature (gradient)", index[k], kappa * L / 2))
        return out

    def free_strains(self, m, sec, L, imposed) -> dict[str, list]:
        eps, kappa, misfit = imposed
        return {"n": [eps, misfit / L], "m": [kappa]}


BEAM = register(Beam())
