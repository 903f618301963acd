"""The tapered beam: a straight beam whose section varies along its axis (a haunch).

Basic forces, equilibrium, unit fields and particular fields are the beam's
(:class:`~.beam.Beam`); only the section differs. With xi = x/L and the start values EA0,
EI0, GAs0 (the member's own) and end values EA1, EI1, GAs1 (``Member.taper``):

* ``law = "linear"``: K(x) = K0 + (K1 - K0) xi for each of EA, EI, GAs;
* ``law = "depth"``: a solid rectangle of depth d(x) = d0 + (d1 - d0) xi, r = d(x)/d0:
  EA = EA0 r, GAs = GAs0 r, EI = EI0 r^3.

The flexibility F_ij = int u_i u_j / K dx and the initial deformations have no closed form
the program uses, so they come from the adaptive Gauss–Kronrod integration of
:func:`~.base.generic_flexibility` (error bound :data:`~.base.QUAD_RTOL`, relative). A
temperature gradient gives the free curvature alpha dTgrad / d(x), varying with the depth.
"""

from __future__ import annotations

from collections.abc import Callable
from typing import Any

from .base import (
    EnergyTerm,
    Poly,
    generic_flexibility,
    generic_initial,
    integrate,
    poly_eval,
    register,
)
from .beam import Beam

__all__ = ["TaperedBeam", "profile", "depth_ratio"]

Profile = Callable[[float], float]


def depth_ratio(m, L: float) -> Profile | None:
    """d(x)/d_start along member ``m`` of length L (m), or None without both depths."""
    t = m.taper
    if t is None or m.depth is None or t.depth is None:
        return None
    d0, d1 = float(m.depth), float(t.depth)
    return lambda x: (d0 + (d1 - d0) * x / L) / d0


def profile(m, L: float, field: str) -> Profile | float | None:
    """Stiffness of ``field`` ("n": EA, "m": EI, "v": GAs) along member ``m`` as a function
    of x (m from the start), or the constant / None where it does not vary / is absent."""
    t = m.taper
    start = {"n": m.EA, "m": m.EI, "v": m.GAs}[field]
    if start is None:
        return None
    if t.law == "depth":
        if t.depth == m.depth:
            return start
        r = depth_ratio(m, L)
        power = 3 if field == "m" else 1
        return lambda x: start * r(x) ** power
    end = {"n": t.EA, "m": t.EI, "v": t.GAs}[field]
    if end is None or end == start:
        return start
    return lambda x: start + (end - start) * x / L


class TaperedBeam(Beam):
    """Beam with a section varying along its axis (``Member.taper``); floats only."""

    name = "tapered"

    def section(self, m, sec, shear: bool) -> dict[str, Any]:
        """The stiffnesses along the member for the length it had when read; the energy
        and displacements use :meth:`section_at_length` with the length at hand (a study
        that moves nodes changes it)."""
        return self.section_at_length(m, m.taper.length, shear)

    def section_at_length(self, m, L: float, shear: bool) -> dict[str, Any]:
        """EA, EI (and GAs) along the member as functions of x (m) for length L."""
        out = {"n": profile(m, L, "n"), "m": profile(m, L, "m")}
        if shear and m.GAs:
            out["v"] = profile(m, L, "v")
        return out

    def _prismatic(self, m, L, shear: bool) -> bool:
        """Whether the section is in fact constant (equal end sections): then the beam's
        closed forms apply, the very numbers of a prismatic beam."""
        return not any(callable(k) for k in _AtLength(self, L).section(m, m, shear).values())

    def flexibility(self, m, sec, L, shear: bool, one) -> list[EnergyTerm]:
        if self._prismatic(m, L, shear):
            return Beam.flexibility(self, m, sec, L, shear, one)
        out = generic_flexibility(_AtLength(self, L), m, sec, L, shear, one)
        cols = {k: 1 + i for i, k in enumerate(self._ends(m))}
        for k, col in cols.items():  # semi-rigid joint: M^2/(2 k)
            if m.end_springs[k] is not None:
                out.append(EnergyTerm("joint spring", (col,), [[one / m.end_springs[k]]]))
        return out

    def initial_deformations(self, m, sec, L, shear: bool, integral, imposed, one):
        if self._prismatic(m, L, shear) and _even_depth(m):
            return Beam.initial_deformations(self, m, sec, L, shear, integral, imposed, one)
        eps, kappa, misfit = imposed if imposed is not None else (0.0, 0.0, 0.0)
        flat = None if imposed is None else (eps, 0.0, misfit)
        out = generic_initial(_AtLength(self, L), m, sec, L, shear, integral, flat, one)
        if kappa:
            curv = self.curvature(m, L, kappa)
            for i, u in enumerate(self.unit_fields(m, L, one, one - one)):
                if u.get("m") and any(c != 0 for c in u["m"]):
                    value = integrate(lambda x, p=u["m"]: poly_eval(p, x / L) * curv(x),
                                      0.0, float(L))
                    out.append(("temperature (gradient)", i, value))
        return out

    @staticmethod
    def curvature(m, L: float, kappa: float) -> Profile:
        """Free curvature of a temperature gradient along the member: ``kappa`` is
        alpha dTgrad / d_start; it varies as d_start / d(x) (constant without end depth)."""
        r = depth_ratio(m, L)
        if r is None or _even_depth(m):
            return lambda x: kappa
        return lambda x: kappa / r(x)

    def free_strains(self, m, sec, L, imposed) -> dict[str, list]:
        eps, kappa, misfit = imposed
        varies = kappa and not _even_depth(m)
        return {"n": [eps, misfit / L], "m": [self.curvature(m, L, kappa) if varies else kappa]}


def _even_depth(m) -> bool:
    """Whether the depth is constant along the member (or not known at both ends): the free
    curvature of a temperature gradient is then uniform."""
    return m.depth is None or m.taper.depth is None or m.taper.depth == m.depth


class _AtLength:
    """A tapered kind whose section is built for the length L at hand."""

    def __init__(self, kind: TaperedBeam, L: float):
        self.kind, self.L = kind, float(L)

    def unit_fields(self, m, L, one, zero) -> list[dict[str, Poly]]:
        return self.kind.unit_fields(m, L, one, zero)

    def section(self, m, sec, shear: bool) -> dict[str, Any]:
        return self.kind.section_at_length(m, self.L, shear)


TAPERED = register(TaperedBeam())
