"""Geometry of a curved member's axis, and the numerical tools its fields need.

Chord frame: u along the chord from the start node (0 to the chord length c), w along the
chord turned 90 degrees counter-clockwise (local +y of the chord). The axis is given by its
arc length s from the start node (0 to S); ``phi`` is the angle of the tangent from the
chord, counter-clockwise positive.

* circle of rise f (signed), radius R = (c^2/4 + f^2) / (2|f|), half-angle
  alpha = atan2(c/2, R - |f|), S = 2 R alpha; with theta = s/R - alpha:
  u = c/2 + R sin(theta), w = sign(f) (R cos(theta) - (R - |f|)), phi = -sign(f) theta.
* parabola w = 4 f u (c - u) / c^2; with k = 4f/c and tau = 1 - 2u/c, the arc length from
  the start is s(u) = c/2 (G(1) - G(tau)), G(tau) = (tau sqrt(1 + k^2 tau^2)
  + asinh(k tau)/k) / 2, so S = c G(1); u(s) by Newton's method (ds/du >= 1);
  tan(phi) = dw/du.

:func:`gauss_kronrod` integrates vector-valued functions of s adaptively and returns the
error bound with the value; :func:`interpolated` turns a smooth field into the quintic
pieces of :class:`leastwork.fields.Piecewise` (Chebyshev points per piece).
"""

from __future__ import annotations

import math
from collections.abc import Callable
from dataclasses import dataclass
from functools import lru_cache

import numpy as np

__all__ = ["Arc", "arc_of", "gauss_kronrod", "interpolated", "PIECES", "QUAD_RTOL"]

#: Quintic pieces per member for diagrams, extremes and displacements along it: the
#: interpolation error is below 1e-13 of the field's size for arcs up to a full circle.
PIECES = 64

#: Relative error bound asked of the adaptive quadrature of a curved member's energy.
QUAD_RTOL = 1e-12


@dataclass(frozen=True)
class Arc:
    """The axis of one curved member in its chord frame (SI)."""

    shape: str
    rise: float
    chord: float
    length: float  #: arc length S, m

    def frame(self, s) -> tuple[np.ndarray, np.ndarray, np.ndarray, np.ndarray]:
        """(u, w, cos phi, sin phi) at arc lengths ``s`` (array, m)."""
        s = np.asarray(s, dtype=float)
        c, f = self.chord, self.rise
        if self.shape == "circle":
            R, alpha = _circle(c, f)
            th = s / R - alpha
            sg = 1.0 if f > 0 else -1.0
            u = 0.5 * c + R * np.sin(th)
            w = sg * (R * np.cos(th) - (R - abs(f)))
            return u, w, np.cos(th), -sg * np.sin(th)
        u = self._u_of_s(s)
        k = 4.0 * f / c
        slope = k * (1.0 - 2.0 * u / c)
        w = k * u * (c - u) / c
        h = np.sqrt(1.0 + slope * slope)
        return u, w, 1.0 / h, slope / h

    def _u_of_s(self, s: np.ndarray) -> np.ndarray:
        c, k = self.chord, 4.0 * self.rise / self.chord
        g1 = _g(1.0, k)
        u = s * c / self.length
        for _ in range(60):
            tau = 1.0 - 2.0 * u / c
            du = (0.5 * c * (g1 - _g(tau, k)) - s) / np.sqrt(1.0 + (k * tau) ** 2)
            u = np.clip(u - du, 0.0, c)
            if float(np.max(np.abs(du), initial=0.0)) <= 1e-15 * c:
                break
        return u

    def point(self, s, start: tuple[float, float], ex: tuple[float, float]):
        """Global (x, y) of the axis at arc lengths ``s``: ``start`` the start node,
        ``ex`` the chord's unit vector."""
        u, w, _, _ = self.frame(s)
        return start[0] + u * ex[0] - w * ex[1], start[1] + u * ex[1] + w * ex[0]

    def tangent(self, s, ex: tuple[float, float]):
        """Global unit tangent (tx, ty) at arc lengths ``s``."""
        _, _, cp, sp = self.frame(s)
        return cp * ex[0] - sp * ex[1], cp * ex[1] + sp * ex[0]


def _circle(c: float, f: float) -> tuple[float, float]:
    a = abs(f)
    R = (0.25 * c * c + a * a) / (2.0 * a)
    return R, math.atan2(0.5 * c, R - a)


def _g(tau, k: float):
    kt = k * tau
    return 0.5 * (tau * np.sqrt(1.0 + kt * kt) + np.arcsinh(kt) / k)


@lru_cache(maxsize=4096)
def _arc(shape: str, rise: float, chord: float) -> Arc:
    if shape == "circle":
        R, alpha = _circle(chord, rise)
        S = 2.0 * R * alpha
    else:
        S = chord * float(_g(1.0, 4.0 * rise / chord))
    return Arc(shape, rise, chord, S)


def arc_of(curve) -> Arc:
    """The :class:`Arc` of a :class:`leastwork.model.Curve`."""
    return _arc(curve.shape, float(curve.rise), float(curve.chord))


# ---------------------------------------------------------------- quadrature
_XK = np.array([-0.991455371120812639206854697526329, -0.949107912342758524526189684047851,
                -0.864864423359769072789712788640926, -0.741531185599394439863864773280788,
                -0.586087235467691130294144845693013, -0.405845151377397166906606412076961,
                -0.207784955007898467600689403773245, 0.0])
_XK = np.concatenate([_XK, -_XK[-2::-1]])
_WK = np.array([0.022935322010529224963732008058970, 0.063092092629978553290700663189204,
                0.104790010322250183839876322541518, 0.140653259715525918745189590510238,
                0.169004726639267902826583426598550, 0.190350578064785409913256402421014,
                0.204432940075298892414161999234649, 0.209482141084727828012999174891714])
_WK = np.concatenate([_WK, _WK[-2::-1]])
_WG = np.zeros(15)
_WG[1::2] = [0.129484966168869693270611432679082, 0.279705391489276667901467771423780,
             0.381830050505118944950369775488975, 0.417959183673469387755102040816327,
             0.381830050505118944950369775488975, 0.279705391489276667901467771423780,
             0.129484966168869693270611432679082]


def gauss_kronrod(func: Callable[[np.ndarray], np.ndarray], breaks,
                  rtol: float = QUAD_RTOL) -> tuple[np.ndarray, float]:
    """Integral over [breaks[0], breaks[-1]] of ``func(s)`` (an array (k, len(s)) of k
    integrands) by adaptive Gauss–Kronrod 7/15 on the intervals between ``breaks``
    (halved until the summed Gauss–Kronrod differences are below ``rtol`` times the
    largest integral, or 1e-300). Returns (integrals (k,), error bound as a fraction of
    the largest integral)."""
    work = []
    for a, b in zip(breaks[:-1], breaks[1:], strict=True):
        if b > a:
            work.append(_gk(func, float(a), float(b)))
    if not work:
        return np.zeros(0), 0.0
    for _ in range(4000):
        total = sum(w[2] for w in work)
        err = sum(w[3] for w in work)
        scale = max(float(np.max(np.abs(total))), 1e-300)
        if float(np.max(err)) <= rtol * scale:
            break
        i = max(range(len(work)), key=lambda j: float(np.max(work[j][3])))
        a, b, _, _ = work.pop(i)
        mid = 0.5 * (a + b)
        work += [_gk(func, a, mid), _gk(func, mid, b)]
    total = sum(w[2] for w in work)
    scale = max(float(np.max(np.abs(total))), 1e-300)
    return total, float(np.max(sum(w[3] for w in work))) / scale


def _gk(func, a: float, b: float):
    h, mid = 0.5 * (b - a), 0.5 * (a + b)
    vals = np.atleast_2d(func(mid + h * _XK))
    k = vals @ _WK * h
    g = vals @ _WG * h
    return a, b, k, np.abs(k - g)


# ---------------------------------------------------------------- interpolation
_DEG = 5
_T = np.cos(np.pi * (np.arange(_DEG + 1) + 0.5) / (_DEG + 1))  # Chebyshev points


def piece_breaks(length: float, marks=()) -> np.ndarray:
    """Breaks along a member of arc length ``length``: the positions ``marks`` (loads'
    ends and points) and about :data:`PIECES` equal pieces between them."""
    tol = 1e-12 * max(length, 1.0)
    keys = sorted({0.0, float(length), *(float(x) for x in marks if tol < x < length - tol)})
    out = [0.0]
    for a, b in zip(keys[:-1], keys[1:], strict=True):
        n = max(1, math.ceil(PIECES * (b - a) / length))
        out += list(a + (b - a) * np.arange(1, n + 1) / n)
    out[-1] = float(length)
    return np.array(out)


_TO_LOCAL = np.linalg.inv(np.vander(_T, _DEG + 1, increasing=True))  # values -> coef in t
_BINOM = np.array([[math.comb(j, k) for j in range(_DEG + 1)] for k in range(_DEG + 1)],
                  dtype=float)


def interpolated(func: Callable[[np.ndarray, int], np.ndarray], breaks: np.ndarray,
                 k: int) -> np.ndarray:
    """Coefficients (per field, per piece, 6) in the absolute position of the quintic
    interpolants of ``func(s, piece)`` (an array (k, len(s))) on each piece between
    ``breaks``: fitted at Chebyshev points in the piece's own coordinate t = (x - mid)/h,
    then expanded about 0 (well conditioned for arcs: the field's scale is the radius)."""
    npiece = len(breaks) - 1
    out = np.zeros((k, npiece, _DEG + 1))
    powers = np.arange(_DEG + 1)
    for j in range(npiece):
        a, b = float(breaks[j]), float(breaks[j + 1])
        h, mid = 0.5 * (b - a), 0.5 * (a + b)
        vals = np.atleast_2d(func(mid + h * _T, j))
        local = vals @ _TO_LOCAL.T  # (k, 6) coefficients in t
        # x^kk coefficient: sum_j local_j C(j, kk) (-mid)^(j - kk) / h^j
        shift = np.where(powers[None, :] >= powers[:, None],
                         (-mid) ** np.clip(powers[None, :] - powers[:, None], 0, None), 0.0)
        expand = _BINOM * shift / h ** powers[None, :]  # (kk, j)
        out[:, j, :] = local @ expand.T
    return out
