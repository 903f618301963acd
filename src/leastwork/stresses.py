"""Extreme-fibre stresses along a member: sigma = N/A + M/S on the local -y face and
N/A - M/S on the local +y face (tension positive; a sagging moment, m > 0, puts the -y face
in tension), with A the section area and S its elastic section modulus (given, or I/(depth/2)).

Bars: N/A, constant. Tapered beams: A(x) and S(x) vary (A linearly; S as the depth ratio
squared for taper = "depth", else I(x)/(d(x)/2) or linear between the two sections' S), and
the extremes are found on a fine grid refined by a bounded scalar search on each piece.
A member without an area (stiffnesses given directly), or a beam
without a section modulus, has no stress result.
"""

from __future__ import annotations

from .fields import Piecewise
from .model import Member

__all__ = ["stress_extremes"]


def stress_extremes(member: Member, mr) -> tuple[tuple[float, float], tuple[float, float]] | None:
    """((largest stress, at), (smallest stress, at)) along ``member`` (Pa, m from its start)
    for its member result ``mr``; max and min algebraic; None without A (and S for a beam).
    Exact: each face's stress is a polynomial on each piece, maximised at the piece ends and
    the roots of its derivative (:meth:`Piecewise.extremes`)."""
    A = member.area
    if A is None:
        return None
    if not member.is_beam:
        sigma = float(mr.start[0]) / A
        return (sigma, 0.0), (sigma, 0.0)
    S = member.section_modulus
    if S is None:
        return None
    n, m = mr.n, mr.m
    if member.taper is not None:
        return _tapered_extremes(member, mr)
    bottom = Piecewise(m.breaks, n.coef / A + m.coef / S).extremes()
    top = Piecewise(m.breaks, n.coef / A - m.coef / S).extremes()
    largest = max((bottom[0], top[0]), key=lambda e: (e[0], -e[1]))
    smallest = min((bottom[1], top[1]), key=lambda e: (e[0], e[1]))
    return largest, smallest


#: grid points per piece before the bounded search (tapered beams)
_GRID = 200


def _tapered_sections(member: Member, L: float):
    """(A(x), S(x)) of a tapered beam, or None where the end section lacks them."""
    t = member.taper
    A0, A1 = member.area, t.area
    S0, S1 = member.section_modulus, t.section_modulus
    if A1 is None or S1 is None:
        return None
    if t.law == "depth":
        d0, d1 = member.depth, t.depth

        def S(x):
            return S0 * ((d0 + (d1 - d0) * x / L) / d0) ** 2
    else:
        def S(x):
            return S0 + (S1 - S0) * x / L

    def A(x):
        return A0 + (A1 - A0) * x / L

    return A, S


def _tapered_extremes(member: Member, mr):
    import numpy as np
    from scipy.optimize import minimize_scalar

    L = float(mr.length)
    secs = _tapered_sections(member, L)
    if secs is None:
        return None
    A, S = secs
    n, m = mr.n, mr.m

    def faces(x: float, side: str = "right") -> tuple[float, float]:
        nn, mm = float(n(x, side)), float(m(x, side))
        return nn / A(x) + mm / S(x), nn / A(x) - mm / S(x)

    best = [(-np.inf, 0.0), (np.inf, 0.0)]
    for a, b, _ in m.pieces():
        a, b = float(a), float(b)
        xs = np.linspace(a, b, _GRID + 1)
        for sign, slot in ((1.0, 0), (-1.0, 1)):
            for face in (0, 1):
                def f(x, face=face, sign=sign, a=a, b=b):
                    side = "left" if x >= b else "right"
                    return -sign * faces(min(max(x, a), b), side)[face]
                vals = [f(x) for x in xs]
                k = int(np.argmin(vals))
                x_best, v_best = float(xs[k]), vals[k]
                lo, hi = float(xs[max(k - 1, 0)]), float(xs[min(k + 1, _GRID)])
                if hi > lo:
                    r = minimize_scalar(f, bounds=(lo, hi), method="bounded",
                                        options={"xatol": 1e-9 * max(L, 1.0)})
                    if r.fun < v_best:
                        x_best, v_best = float(r.x), float(r.fun)
                value = -sign * v_best
                if (value > best[0][0]) if slot == 0 else (value < best[1][0]):
                    best[slot] = (value, x_best)
    return (best[0][0], best[0][1]), (best[1][0], best[1][1])
