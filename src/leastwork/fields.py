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

from .thresholds import EXTREME_TIE, EXTREME_TIE_FLOOR

__all__ = ["Piecewise", "ParticularFields", "particular_fields", "gauss_integral"]

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
        return np.float64(_horner(self.coef[k].tolist(), x))

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
            vals += [_horner(full, x) for x in cand]
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
    """Particular fields of one member.

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
    c, s = ex
    L = float(length)
    pts = [(float(a), fx * c + fy * s, -fx * s + fy * c, mz) for a, fx, fy, mz in point_loads]
    dls = []
    for a, b, (wx0, wx1), (wy0, wy1) in dist_loads:
        qx0, qx1 = wx0 * c + wy0 * s, wx1 * c + wy1 * s
        qy0, qy1 = -wx0 * s + wy0 * c, -wx1 * s + wy1 * c
        dls.append((float(a), float(b), (qx0, qx1), (qy0, qy1)))
    breaks = sorted({0.0, L, *[p[0] for p in pts], *[d[0] for d in dls], *[d[1] for d in dls]})
    breaks = np.array(_merge_close(breaks, 1e-12 * max(L, 1.0)))
    breaks[0], breaks[-1] = 0.0, L
    nk = len(breaks) - 1
    cn = np.zeros((nk, _DEG + 1))
    cv = np.zeros((nk, _DEG + 1))
    cm = np.zeros((nk, _DEG + 1))
    n_left = v_left = m_left = 0.0
    tol = 1e-12 * max(L, 1.0)
    for k in range(nk):
        x0, x1 = breaks[k], breaks[k + 1]
        # jumps at x0 from concentrated loads
        for a, px, py, mz in pts:
            if abs(a - x0) <= tol:
                n_left -= px
                v_left += py
                m_left -= mz
        qx = [0.0, 0.0]
        qy = [0.0, 0.0]
        for a, b, (qx0, qx1), (qy0, qy1) in dls:
            if a - tol <= x0 and x1 <= b + tol:
                lx, ly = _line(a, b, qx0, qx1), _line(a, b, qy0, qy1)
                qx = [qx[0] + lx[0], qx[1] + lx[1]]
                qy = [qy[0] + ly[0], qy[1] + ly[1]]
        # v(x) = v_left + int_{x0}^{x} qy ; m(x) = m_left + int_{x0}^{x} v ; n = n_left - int qx
        v_poly = _plus(v_left, _integral(qy, x0))
        m_poly = _plus(m_left, _integral(v_poly, x0))
        n_poly = _plus(n_left, [-c for c in _integral(qx, x0)])
        cv[k, :len(v_poly)], cm[k, :len(m_poly)], cn[k, :len(n_poly)] = v_poly, m_poly, n_poly
        n_left = _horner(n_poly, x1)
        v_left = _horner(v_poly, x1)
        m_left = _horner(m_poly, x1)
    # simple-support conditions: m(L) = 0 (end reaction transverse), n(L) = 0 (roller)
    r_start = -m_left / L
    cm[:, 1] += r_start
    cv[:, 0] += r_start
    cn[:, 0] -= n_left
    n_pw, v_pw, m_pw = Piecewise(breaks, cn), Piecewise(breaks, cv), Piecewise(breaks, cm)
    n0, v0 = float(n_pw(0.0)), float(v_pw(0.0))
    nL, vL = float(n_pw(L, side="left")), float(v_pw(L, side="left"))
    ey = (-s, c)
    # forces the member passes to its nodes: start n(0) ex - v(0) ey ; end -n(L) ex + v(L) ey
    start = (n0 * c - v0 * ey[0], n0 * s - v0 * ey[1])
    end = (-nL * c + vL * ey[0], -nL * s + vL * ey[1])
    return ParticularFields(n_pw, v_pw, m_pw, start, end)


def _line(a: float, b: float, f0: float, f1: float) -> tuple[float, float]:
    """Ascending coefficients of the line through (a, f0) and (b, f1)."""
    slope = (f1 - f0) / (b - a)
    return (f0 - slope * a, slope)


def _horner(coef: list[float], x: float) -> float:
    """Value of the ascending coefficients ``coef`` at x (the Horner sums of P.polyval)."""
    acc = coef[-1] + x * 0.0
    for c in reversed(coef[:-1]):
        acc = c + acc * x
    return acc


def _integral(coef: list[float], lower: float) -> list[float]:
    """Ascending coefficients of the integral of ``coef`` from ``lower`` to x (as
    P.polyint with ``lbnd``), in plain floats: these pieces have a handful of terms."""
    out = [0.0] + [c / (i + 1) for i, c in enumerate(coef)]
    out[0] = 0.0 - _horner(out, lower)
    return out


def _plus(constant: float, coef: list[float]) -> list[float]:
    """``constant`` added to the polynomial ``coef``."""
    return [constant + coef[0], *coef[1:]]


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
