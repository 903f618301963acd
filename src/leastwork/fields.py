"""Section-force fields along a member as exact piecewise polynomials.

A member's span loads act on it as on a simply supported member: pinned at the start node
(taking the axial component), on a roller along the member axis at the end node. The
resulting *particular* fields n0(x), v0(x), m0(x) vanish at the ends for m; the end forces
they need are passed to the nodes as equivalent nodal loads.

Signs (docs/conventions.md): n tension positive; m positive when the local -y face is in
tension; v = dm/dx. With q_y the load per length in local +y: dv/dx = q_y; a concentrated
local force P_y makes v jump by +P_y; a counter-clockwise couple M makes m jump by -M; an
axial load per length q_x gives dn/dx = -q_x.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from numpy.polynomial import polynomial as P

from .polynomials import poly_add, poly_antiderivative, poly_eval, poly_line, poly_scale
from .thresholds import EXTREME_TIE, EXTREME_TIE_FLOOR

__all__ = ["Piecewise", "ParticularFields", "particular_fields", "span_fields", "gauss_integral"]

_DEG = 5  # storage degree: cubic moments from linearly varying loads, with room to spare


@dataclass(frozen=True)
class Piecewise:
    """A piecewise polynomial on ``breaks`` (k+1 increasing positions, m).

    ``coef[k]`` holds ascending-power coefficients in the absolute position x on
    piece k, i.e. f(x) = sum_j coef[k, j] * x**j for breaks[k] <= x <= breaks[k+1].
    """

    breaks: np.ndarray
    coef: np.ndarray

    def __call__(self, x, side: str = "right") -> np.ndarray:
        """Values at ``x``; at a break, ``side`` picks the piece to the right or left."""
        if isinstance(x, float | int):
            return self._at(float(x), side)
        x = np.asarray(x, dtype=float)
        k = np.searchsorted(self.breaks, x, side="right" if side == "right" else "left") - 1
        k = np.clip(k, 0, len(self.breaks) - 2)
        return P.polyval(x, self.coef[k].T, tensor=False)

    def _at(self, x: float, side: str) -> np.float64:
        """One value, in plain floats: the same Horner sums as ``P.polyval`` (so the same
        result to the last bit), without array overhead."""
        breaks = self.breaks
        k = int(np.searchsorted(breaks, x, side="right" if side == "right" else "left")) - 1
        k = min(max(k, 0), len(breaks) - 2)
        return np.float64(poly_eval(self.coef[k].tolist(), x))

    def pieces(self):
        for k in range(len(self.breaks) - 1):
            yield self.breaks[k], self.breaks[k + 1], self.coef[k]

    def extremes(self) -> tuple[tuple[float, float], tuple[float, float]]:
        """((largest value, at), (smallest value, at)) over the whole span: piece ends and
        the real roots of the derivative inside pieces; among ties the first position."""
        span = max(float(self.breaks[-1] - self.breaks[0]), 1.0)
        xs, vals = [], []
        for a, b, coef in self.pieces():
            a, b = float(a), float(b)
            cand = [a, b]
            row = coef.tolist()
            while len(row) > 1 and row[-1] == 0.0:
                row.pop()
            if len(row) == 3:  # a parabola: the root of its derivative, as P.polyroots gives
                r = -(row[1] * 1) / (row[2] * 2)
                if a < r < b:
                    cand.append(r)
            elif len(row) > 3:
                for r in P.polyroots(P.polyder(np.array(row))):
                    if abs(r.imag) < 1e-9 * span and a < r.real < b:
                        cand.append(float(r.real))
            full = coef.tolist()
            xs += cand
            vals += [poly_eval(full, x) for x in cand]
        v, x = np.array(vals), np.array(xs)
        # ties within round-off (and values below EXTREME_TIE_FLOOR, SI: a flat zero field)
        # keep the first position, so that round-off never decides where an extreme is
        tol = max(EXTREME_TIE * float(np.max(np.abs(v))), EXTREME_TIE_FLOOR)
        top = np.flatnonzero(v >= v.max() - tol)
        bottom = np.flatnonzero(v <= v.min() + tol)
        i, j = top[np.argmin(x[top])], bottom[np.argmin(x[bottom])]
        return (float(v[i]), float(x[i])), (float(v[j]), float(x[j]))

    @staticmethod
    def zero(length: float) -> Piecewise:
        return Piecewise(np.array([0.0, length]), np.zeros((1, _DEG + 1)))


@dataclass(frozen=True)
class ParticularFields:
    """The fields of a member's span loads on its simply supported analogue.

    ``start_force``/``end_force`` are the forces (global x, y) the member passes to its start
    and end nodes; the moment it passes is zero.
    """

    n: Piecewise
    v: Piecewise
    m: Piecewise
    start_force: tuple[float, float]
    end_force: tuple[float, float]


def particular_fields(length: float, ex: tuple[float, float], point_loads, dist_loads):
    """Particular fields of one member (SI floats).

    Parameters
    ----------
    length : float
        Member length, m.
    ex : (float, float)
        Unit vector of local x in global axes.
    point_loads : iterable of (at, fx, fy, mz)
        Global force components (N) and counter-clockwise couple (N*m) at ``at`` (m),
        with 0 < at < length.
    dist_loads : iterable of (start, end, (wx0, wx1), (wy0, wy1))
        Global intensities per unit member length (N/m), linear from ``start`` to ``end``.

    Returns
    -------
    ParticularFields
    """
    L = float(length)
    point_loads = [(float(a), *rest) for a, *rest in point_loads]
    dist_loads = [(float(a), float(b), *rest) for a, b, *rest in dist_loads]
    tol = 1e-12 * max(L, 1.0)
    breaks = sorted({0.0, L, *[p[0] for p in point_loads], *[d[0] for d in dist_loads],
                     *[d[1] for d in dist_loads]})
    breaks = _merge_close(breaks, tol)
    breaks[0], breaks[-1] = 0.0, L

    def locate(x: float) -> int:
        return min(range(len(breaks)), key=lambda k: abs(breaks[k] - x))

    n, v, m, start, end = span_fields(L, ex, point_loads, dist_loads, breaks, locate)
    brk = np.array(breaks)
    return ParticularFields(*(Piecewise(brk, _coefficients(f)) for f in (n, v, m)), start, end)


def span_fields(L, ex, point_loads, dist_loads, breaks: list, locate):
    """The fields of :func:`particular_fields` in any number type (floats, or the exact
    elements of :mod:`leastwork.symbolic.algebra`).

    ``breaks``: the distinct positions of the loads and the ends, in order (0 first, L
    last); ``locate(x)``: the index of the break at position x. Returns (n, v, m, start,
    end): the polynomials of each field per piece and the forces passed to the nodes.
    """
    c, s = ex
    zero = L - L
    pts = [(locate(a), fx * c + fy * s, -fx * s + fy * c, mz) for a, fx, fy, mz in point_loads]
    dls = [(locate(a), locate(b), a, b, (wx0 * c + wy0 * s, wx1 * c + wy1 * s),
            (-wx0 * s + wy0 * c, -wx1 * s + wy1 * c))
           for a, b, (wx0, wx1), (wy0, wy1) in dist_loads]
    cn, cv, cm = [], [], []
    n_left = v_left = m_left = zero
    for k in range(len(breaks) - 1):
        x0, x1 = breaks[k], breaks[k + 1]
        for at, px, py, mz in pts:  # jumps at x0 from concentrated loads
            if at == k:
                n_left -= px
                v_left += py
                m_left -= mz
        qx = qy = (zero,)
        for ia, ib, a, b, wx, wy in dls:
            if ia <= k and ib >= k + 1:
                qx, qy = poly_add(qx, poly_line(a, b, *wx)), poly_add(qy, poly_line(a, b, *wy))
        # v(x) = v_left + int_{x0}^{x} qy ; m(x) = m_left + int_{x0}^{x} v ; n = n_left - int qx
        v_poly = poly_add((v_left,), poly_antiderivative(qy, x0))
        m_poly = poly_add((m_left,), poly_antiderivative(v_poly, x0))
        n_poly = poly_add((n_left,), poly_scale(poly_antiderivative(qx, x0), -1))
        cv.append(v_poly)
        cm.append(m_poly)
        cn.append(n_poly)
        n_left, v_left, m_left = poly_eval(n_poly, x1), poly_eval(v_poly, x1), poly_eval(m_poly, x1)
    # simple-support conditions: m(L) = 0 (end reaction transverse), n(L) = 0 (roller)
    r_start = -m_left / L
    cm = [poly_add(p, (zero, r_start)) for p in cm]
    cv = [poly_add(p, (r_start,)) for p in cv]
    cn = [poly_add(p, (-n_left,)) for p in cn]
    n0, v0 = poly_eval(cn[0], zero), poly_eval(cv[0], zero)
    nL, vL = poly_eval(cn[-1], L), poly_eval(cv[-1], L)
    ey = (-s, c)
    # forces the member passes to its nodes: start n(0) ex - v(0) ey ; end -n(L) ex + v(L) ey
    start = (n0 * c - v0 * ey[0], n0 * s - v0 * ey[1])
    end = (-nL * c + vL * ey[0], -nL * s + vL * ey[1])
    return cn, cv, cm, start, end


def _coefficients(pieces: list) -> np.ndarray:
    """Polynomials per piece as the (pieces, _DEG + 1) array of :class:`Piecewise`."""
    out = np.zeros((len(pieces), _DEG + 1))
    for k, p in enumerate(pieces):
        out[k, :len(p)] = [float(c) for c in p]
    return out


def _merge_close(values, tol):
    out: list[float] = []
    for v in values:
        if not out or v - out[-1] > tol:
            out.append(v)
    return out


_GL_X, _GL_W = np.polynomial.legendre.leggauss(6)  # exact to degree 11


def gauss_integral(breaks: np.ndarray, func) -> float:
    """Integral of ``func(x)`` over [breaks[0], breaks[-1]], exact for piecewise
    polynomials of degree <= 11 whose breaks are among ``breaks``."""
    total = 0.0
    for a, b in zip(breaks[:-1], breaks[1:], strict=True):
        if b <= a:
            continue
        x = 0.5 * (b - a) * _GL_X + 0.5 * (a + b)
        total += 0.5 * (b - a) * float(np.dot(_GL_W, func(x)))
    return total
