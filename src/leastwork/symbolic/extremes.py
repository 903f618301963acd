"""Member end forces and moment extremes in exact arithmetic.

The candidates for an extreme (piece ends, roots of dm/dx inside a piece) are compared by
their values at the parameters (60 digits); only the two chosen are worked out exactly. A
root of a quadratic dm/dx lies outside the field K: it is kept as a :class:`RootValue`
(and a large moment at a root of a linear dm/dx as a :class:`QuadraticValue`) for
:mod:`.presentation` to write out.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass
from typing import Any

import mpmath

from ..errors import CaseError
from ..polynomials import poly_derivative, poly_divmod, poly_eval, poly_trim
from ..thresholds import EXTREME_TIE
from .algebra import Algebra, Closure, Piecewise

__all__ = ["RootValue", "QuadraticValue", "member_result"]

#: a moment at a root of dm/dx is made one fraction when its parts have at most this many
#: terms (beyond, the exact fraction costs much more than it helps reading)
_COMBINE_TERMS = 12


@dataclass(frozen=True)
class RootValue:
    """A value outside K: ``base + slope * (-b1 + sign*sqrt(disc)) / (2*b2)`` where the
    quadratic b2 x^2 + b1 x + b0 = dm/dx; ``base``, ``slope``, ``b1``, ``b2``, ``disc`` are
    elements of K. ``slope`` = 1 and ``base`` = 0 give the root itself."""

    base: Any
    slope: Any
    b1: Any
    b2: Any
    disc: Any
    sign: int


@dataclass(frozen=True)
class QuadraticValue:
    """A value outside K kept as ``a + k * b**2`` (a, b, k elements of K)."""

    a: Any
    b: Any
    k: Any


def member_result(alg: Algebra, closure: Closure, L, n: Piecewise, v: Piecewise,
                  m: Piecewise, source: str) -> dict[str, Any]:
    """End forces and moment extremes (as solution.member_result): the candidates are
    compared by their values at the parameters; only the two chosen ones are worked
    out exactly."""
    z = alg.zero
    start = {"n": poly_eval(n.pieces[0], z), "v": poly_eval(v.pieces[0], z),
             "m": poly_eval(m.pieces[0], z)}
    end = {"n": poly_eval(n.pieces[-1], L), "v": poly_eval(v.pieces[-1], L),
           "m": poly_eval(m.pieces[-1], L)}
    cands: list[tuple[Callable[[], tuple], mpmath.mpf, mpmath.mpf]] = []
    br = m.breaks
    for k, poly in enumerate(m.pieces):
        a, b = br[k], br[k + 1]
        an, bn = alg.num(a), alg.num(b)
        for x, xn in ((a, an), (b, bn)):
            val = poly_eval(poly, x)
            cands.append((lambda x=x, val=val: (x, val), xn, closure.num(val)))
        cands.extend(_stationary(alg, closure, poly, an, bn, source))
    vals = [cv[2] for cv in cands]
    scale = max(max(abs(v) for v in vals), mpmath.mpf("1e-300"))
    top, bot = max(vals), min(vals)
    imax = min((i for i, v in enumerate(vals) if v >= top - EXTREME_TIE * scale),
               key=lambda i: cands[i][1])
    imin = min((i for i, v in enumerate(vals) if v <= bot + EXTREME_TIE * scale),
               key=lambda i: cands[i][1])
    xmax, vmax = cands[imax][0]()
    xmin, vmin = cands[imin][0]()
    return {"start": start, "end": end,
            "m_max": {"value": vmax, "at": xmax}, "m_min": {"value": vmin, "at": xmin}}


def _stationary(alg: Algebra, closure: Closure, poly, an, bn, source: str) -> list:
    """Candidates at the roots of dm/dx strictly inside (a, b): (exact thunk, x#,
    value#). The coefficients of x**2 and x**3 of a moment come from the span loads
    alone (elements of K), so the degree of dm/dx is exact."""
    dm = poly_trim(poly_derivative(poly))
    if len(dm) < 2:
        return []
    if len(dm) > 3:
        raise CaseError("a bending moment of degree above 3 along a member; symbolic "
                        "mode takes point loads and linearly varying distributed loads "
                        "only", source=source)
    out = []
    with mpmath.workdps(60):
        pn = [closure.num(c) for c in poly]
        dn = [closure.num(c) for c in dm]

        def value_at(x):
            return sum(c * x**i for i, c in enumerate(pn))

        if len(dm) == 2:
            xn = -dn[0] / dn[1]
            if an < xn < bn:
                out.append((lambda: _linear_root(alg, closure, poly, dm), xn, value_at(xn)))
            return out
        disc = dn[1] ** 2 - 4 * dn[2] * dn[0]
        tiny = mpmath.mpf(10) ** -40 * (dn[1] ** 2 + abs(4 * dn[2] * dn[0]))
        if abs(disc) <= tiny:
            exact = _close_poly(closure, dm)
            if not (exact[1] * exact[1] - 4 * exact[2] * exact[0]):
                xn = -dn[1] / (2 * dn[2])
                if an < xn < bn:
                    out.append((lambda: _double_root(closure, poly, dm), xn, value_at(xn)))
                return out
        if disc < 0:
            return out
        for sign in (-1, 1):
            xn = (-dn[1] + sign * mpmath.sqrt(disc)) / (2 * dn[2])
            if an < xn < bn:
                out.append((lambda sign=sign: _quadratic_root(alg, closure, poly, dm, sign), xn,
                            value_at(xn)))
    return out


def _close_poly(closure: Closure, poly) -> tuple:
    return tuple(closure.close(c) for c in poly)


def _linear_root(alg: Algebra, closure: Closure, poly, dm) -> tuple:
    """Root of d0 + d1 x (d1 in K) of a quadratic moment m0 + m1 x + m2 x**2, and the
    moment there, m0 - m1**2 / (4 m2) (quadratic in the redundants): one fraction when
    m0 and m1 are small, else kept as that sum (:class:`QuadraticValue`)."""
    x = closure.close(dm[0] / (-dm[1]))
    m0, m1, m2 = (tuple(poly) + (alg.zero,) * 3)[:3]
    k = -alg.one / (4 * m2)
    a, b = closure.close(m0), closure.close(m1)
    if max(len(a.numer), len(a.denom), len(b.numer), len(b.denom)) <= _COMBINE_TERMS:
        return x, a + k * b * b
    return x, QuadraticValue(a, b, k)


def _double_root(closure: Closure, poly, dm) -> tuple:
    d = _close_poly(closure, dm)
    x = -d[1] / (2 * d[2])
    return x, closure.close(poly_eval(poly, x))


def _quadratic_root(alg: Algebra, closure: Closure, poly, dm, sign: int) -> tuple:
    """A root of the quadratic dm/dx = b0 + b1 x + b2 x**2 (b1, b2 in K) of a cubic
    moment, and the moment there from the remainder of m / (dm/dx); both stay linear
    in the redundants."""
    b0, b1, b2 = _close_poly(closure, dm)
    disc = b1 * b1 - 4 * b2 * b0
    _, rem = poly_divmod(poly, dm)
    rem = _close_poly(closure, tuple(rem) + (alg.zero,) * (2 - len(rem)))
    return (RootValue(alg.zero, alg.one, b1, b2, disc, sign),
            RootValue(rem[0], rem[1], b1, b2, disc, sign))

