"""Tapered beams in the direct-stiffness solver: the exact element of a straight member whose
section varies, by inverting its cantilever flexibility.

Independent of the force method on purpose: the section is evaluated here from the member's
own start and end values (``Member.taper``), and the integrals are composite Gauss–Legendre
rules of fixed order (:data:`PANELS` panels of :data:`POINTS` points between the breaks of
the loads), not the force method's adaptive rule.

Clamp the start and load the end with (N, V, M) in local axes: the section forces at x are
n = N, v = V, m = M + V (L - x) (m sagging positive). The end displacements (u, w, phi)
relative to the start are C (N, V, M) with C_ij = int (n_i n_j/EA + v_i v_j/GAs + m_i m_j/EI)
dx; the end stiffness is C^-1 and, with the rigid-body map R of the start's displacements
to the end's (u, w + L phi, phi), the element stiffness is [-R, I]^T C^-1 [-R, I].
Span loads and free strains give end displacements d0 of the clamped-start member; the
clamped-clamped end forces are -C^-1 d0 at the end and the start's by equilibrium.
"""

from __future__ import annotations

import math

import numpy as np

from ..errors import CaseError
from ..model import DistributedLoad, Misfit, PointLoad, Structure, TemperatureLoad

__all__ = ["tapered_stiffness", "tapered_loading", "PANELS", "POINTS"]

#: composite Gauss–Legendre rule: panels along the member and points per panel
PANELS, POINTS = 16, 12
_GX, _GW = np.polynomial.legendre.leggauss(POINTS)


def _rule(a: float, b: float, breaks=()) -> tuple[np.ndarray, np.ndarray]:
    """Points and weights on [a, b], :data:`PANELS` panels between consecutive ``breaks``
    (where the load's section forces have kinks or jumps)."""
    cuts = sorted({a, b, *(x for x in breaks if a < x < b)})
    edges = np.unique(np.concatenate([np.linspace(lo, hi, PANELS + 1)
                                      for lo, hi in zip(cuts[:-1], cuts[1:], strict=True)]))
    h = 0.5 * np.diff(edges)
    mid = 0.5 * (edges[:-1] + edges[1:])
    x = (mid[:, None] + h[:, None] * _GX[None, :]).ravel()
    w = (h[:, None] * _GW[None, :]).ravel()
    return x, w


def _stiffness_along(m, L: float, x: np.ndarray, shear: bool):
    """(EA, GAs, EI) arrays at x (None where absent)."""
    t = m.taper
    xi = x / L
    if t.law == "depth":
        r = (m.depth + (t.depth - m.depth) * xi) / m.depth
        EA = None if m.EA is None else m.EA * r
        GAs = m.GAs * r if (shear and m.GAs) else None
        return EA, GAs, m.EI * r**3

    def lin(a, b):
        return a + (b - a) * xi

    EA = None if m.EA is None else lin(m.EA, t.EA)
    GAs = lin(m.GAs, t.GAs if t.GAs is not None else m.GAs) if (shear and m.GAs) else None
    return EA, GAs, lin(m.EI, t.EI)


def _cantilever(st: Structure, mid: str, L: float, breaks=()):
    x, w = _rule(0.0, L, breaks)
    EA, GAs, EI = _stiffness_along(st.members[mid], L, x, st.shear)
    return x, w, EA, GAs, EI


def _unit_sections(x: np.ndarray, L: float) -> np.ndarray:
    """(3 end forces, 3 section forces n, v, m, len(x))."""
    out = np.zeros((3, 3, x.size))
    out[0, 0] = 1.0
    out[1, 1] = 1.0
    out[1, 2] = L - x
    out[2, 2] = 1.0
    return out


def _flexibility(x, w, EA, GAs, EI, L) -> np.ndarray:
    b = _unit_sections(x, L)
    C = np.zeros((3, 3))
    for i in range(3):
        for j in range(3):
            acc = np.sum(w * b[i, 2] * b[j, 2] / EI)
            if EA is not None:
                acc += np.sum(w * b[i, 0] * b[j, 0] / EA)
            if GAs is not None:
                acc += np.sum(w * b[i, 1] * b[j, 1] / GAs)
            C[i, j] = acc
    return C


def _spread(L: float) -> np.ndarray:
    """(3, 6): relative end displacements from the six local end displacements."""
    return np.array([[-1.0, 0.0, 0.0, 1.0, 0.0, 0.0],
                     [0.0, -1.0, -L, 0.0, 1.0, 0.0],
                     [0.0, 0.0, -1.0, 0.0, 0.0, 1.0]])


def tapered_stiffness(st: Structure, mid: str, L: float) -> np.ndarray:
    """(6, 6) local stiffness of tapered member ``mid`` (forces on the member ends per unit
    end displacement, dofs u1, w1, phi1, u2, w2, phi2). An axially rigid member has no axial
    rows (its axial force is a constraint of the solver)."""
    x, w, EA, GAs, EI = _cantilever(st, mid, L)
    C = _flexibility(x, w, EA, GAs, EI, L)
    if EA is None:
        keep = [1, 2]
        Kr = np.zeros((3, 3))
        Kr[np.ix_(keep, keep)] = np.linalg.inv(C[np.ix_(keep, keep)])
    else:
        Kr = np.linalg.inv(C)
    S = _spread(L)
    k = S.T @ Kr @ S
    return 0.5 * (k + k.T)


def tapered_loading(st: Structure, mid: str, L: float, c: float, s: float,
                    loads) -> tuple[np.ndarray, float]:
    """(f0 (6,), free elongation m): forces the nodes apply to the clamped member (local)
    under span loads, temperature and misfit."""
    m = st.members[mid]
    breaks = []
    for ld in loads:
        if isinstance(ld, PointLoad):
            breaks.append(ld.at)
        elif isinstance(ld, DistributedLoad):
            breaks += [ld.start, L if math.isnan(ld.end) else ld.end]
    x, w, EA, GAs, EI = _cantilever(st, mid, L, breaks)
    C = _flexibility(x, w, EA, GAs, EI, L)
    b = _unit_sections(x, L)
    # section forces of the loads at x of the clamped-start cantilever; resultants
    n0, v0, m0 = np.zeros(x.size), np.zeros(x.size), np.zeros(x.size)
    Q = np.zeros(3)  # Qx, Qy, moment about the start
    eps = misfit = grad = 0.0
    for ld in loads:
        if isinstance(ld, PointLoad):
            px, py = ld.fx * c + ld.fy * s, -ld.fx * s + ld.fy * c
            beyond = x < ld.at  # no rule point sits on a break
            n0 += px * beyond
            v0 += py * beyond
            m0 += (py * (ld.at - x) + ld.mz) * beyond
            Q += (px, py, py * ld.at + ld.mz)
        elif isinstance(ld, DistributedLoad):
            a = ld.start
            e = L if math.isnan(ld.end) else ld.end
            if e <= a:
                continue
            Q += _distributed(ld, a, e, c, s, x, n0, v0, m0)
        elif isinstance(ld, TemperatureLoad):
            alpha = m.alpha or 0.0
            eps += alpha * ld.uniform
            if ld.gradient:
                if m.depth is None:
                    raise CaseError(f'member "{mid}" has a temperature gradient but no '
                                    "section depth", source=st.source)
                grad += alpha * ld.gradient
        elif isinstance(ld, Misfit):
            misfit += ld.elongation
    depth = (m.depth + ((m.taper.depth if m.taper.depth is not None else m.depth) - m.depth)
             * x / L) if m.depth is not None else np.ones_like(x)
    kappa = grad / depth
    d0 = np.zeros(3)
    for i in range(3):
        d0[i] = np.sum(w * b[i, 2] * (m0 / EI + kappa))
        if EA is not None:
            d0[i] += np.sum(w * b[i, 0] * n0 / EA)
        if GAs is not None:
            d0[i] += np.sum(w * b[i, 1] * v0 / GAs)
    elongation = eps * L + misfit
    d0[0] += elongation
    if EA is None:
        d0[0] = 0.0
        Kr = np.zeros((3, 3))
        Kr[1:, 1:] = np.linalg.inv(C[1:, 1:])
    else:
        Kr = np.linalg.inv(C)
    fe = -Kr @ d0  # forces on the member at its end
    fs = np.array([-(fe[0] + Q[0]), -(fe[1] + Q[1]), -(fe[2] + L * fe[1] + Q[2])])
    return np.concatenate([fs, fe]), elongation


def _distributed(ld: DistributedLoad, a: float, e: float, c: float, s: float,
                 x: np.ndarray, n0: np.ndarray, v0: np.ndarray, m0: np.ndarray) -> np.ndarray:
    """Add to the section forces n0, v0, m0 at ``x`` of the clamped-start cantilever those of
    a linearly varying load on [a, e] (each by its own 4-point Gauss rule over the loaded
    part beyond the section); returns its resultant (Qx, Qy, moment about the start)."""
    gl, gw = np.polynomial.legendre.leggauss(4)

    def q(t):
        f = (t - a) / (e - a)
        gx = ld.wx[0] + (ld.wx[1] - ld.wx[0]) * f
        gy = ld.wy[0] + (ld.wy[1] - ld.wy[0]) * f
        return gx * c + gy * s, -gx * s + gy * c

    for k, xk in enumerate(x):
        lo = max(xk, a)
        if lo >= e:
            continue
        t = 0.5 * (e - lo) * gl + 0.5 * (e + lo)
        wt = 0.5 * (e - lo) * gw
        qx, qy = q(t)
        n0[k] += np.sum(wt * qx)
        v0[k] += np.sum(wt * qy)
        m0[k] += np.sum(wt * qy * (t - xk))
    t = 0.5 * (e - a) * gl + 0.5 * (e + a)
    wt = 0.5 * (e - a) * gw
    qx, qy = q(t)
    return np.array([np.sum(wt * qx), np.sum(wt * qy), np.sum(wt * qy * t)])
