"""The curved member: a circular or parabolic arc between two nodes, in bending with
axial force (and shear when asked), prismatic.

Basic forces, as a beam on its chord: ``ID.n`` the force along the chord (tension
positive: the pull the member's ends exert on its nodes along the chord), and the section
moments at the ends ``ID.start.m``, ``ID.end.m`` (absent at a hinged end). Nodal
equilibrium is therefore that of a straight beam on the chord (length c, direction of the
chord).

Fields along the arc (s the arc length; u, w the point in the chord frame; phi the
tangent's angle from the chord — :mod:`.arc`), by statics of the part from the start node
to the section, with Q = (Me - Ms)/c the end force across the chord:

    m(s) = Ms (1 - u/c) + Me u/c + N w
    n(s) = N cos(phi) - Q sin(phi)
    v(s) = N sin(phi) + Q cos(phi)          (v = dm/ds)

so that a thrust (N < 0) of an arch rising on +y gives m = m0 - H w. Local axes follow
the tangent; n tension positive, m positive with the local -y face in tension.

Energy: F_ij = int_0^S (n_i n_j / EA + m_i m_j / EI [+ v_i v_j / GAs]) ds along the true
axis, by adaptive Gauss–Kronrod quadrature with a relative error bound of
:data:`.arc.QUAD_RTOL` (far below the printed digits). Span loads act on the arc pinned at
the start node and on a roller across the chord at the end node (the basic forces zero).
"""

from __future__ import annotations

from collections.abc import Sequence
from typing import Any

import numpy as np

from ..fields import ParticularFields, Piecewise
from .arc import Arc, arc_of, gauss_kronrod, interpolated, piece_breaks
from .base import EnergyTerm, register
from .beam import Beam

__all__ = ["Curved", "CURVED", "unit_values", "particular_values"]

_GL_X, _GL_W = np.polynomial.legendre.leggauss(12)


def unit_values(m, s) -> np.ndarray:
    """(basic force, field n/v/m, position) values of the unit fields at arc lengths s."""
    arc = arc_of(m.curve)
    c = arc.chord
    u, w, cp, sp = arc.frame(s)
    out = [np.array([cp, sp, w])]
    if not m.hinge_start:
        out.append(np.array([sp / c, -cp / c, 1.0 - u / c]))
    if not m.hinge_end:
        out.append(np.array([-sp / c, cp / c, u / c]))
    return np.array(out)


class _Loading:
    """Span loads of one curved member in its chord frame, and their fields."""

    def __init__(self, m, arc: Arc, ex, point_loads, dist_loads):
        self.arc, self.ex = arc, ex
        c, s = ex
        self.points = [(float(a), fx * c + fy * s, -fx * s + fy * c, mz)
                       for a, fx, fy, mz in point_loads]
        self.dists = [(float(d[0]), float(d[1]), d[2], d[3], d[4] if len(d) > 4 else "global")
                      for d in dist_loads]
        marks = [p[0] for p in self.points] + [x for d in self.dists for x in d[:2]]
        self.breaks = piece_breaks(arc.length, marks)
        # cumulative integrals of (qu, qw, u qw - w qu) at the breaks
        cum = np.zeros((3, len(self.breaks)))
        for j in range(len(self.breaks) - 1):
            cum[:, j + 1] = cum[:, j] + self._gl(self.breaks[j], self.breaks[j + 1])
        self.cum = cum
        Ft = cum[:2, -1] + sum((np.array(p[1:3]) for p in self.points), np.zeros(2))
        Mt = cum[2, -1]
        for at, pu, pw, mz in self.points:
            u, w, _, _ = arc.frame(np.array([at]))
            Mt += float(u[0]) * pw - float(w[0]) * pu + mz
        self.total = (float(Ft[0]), float(Ft[1]), float(Mt))  # chord frame, about start
        rho = -Mt / arc.chord
        self.r_start = -Ft - np.array([0.0, rho])
        self.r_end = np.array([0.0, rho])

    def density(self, x: np.ndarray) -> np.ndarray:
        """(qu, qw) per unit arc length at positions x (chord frame)."""
        arc, (c, s) = self.arc, self.ex
        q = np.zeros((2, len(x)))
        _, _, cp, sp = arc.frame(x)
        for a, b, wx, wy, frame in self.dists:
            inside = (x >= a) & (x <= b)
            t = (x - a) / (b - a)
            q1 = wx[0] + (wx[1] - wx[0]) * t
            q2 = wy[0] + (wy[1] - wy[0]) * t
            if frame == "local":  # q1 along the tangent, q2 along local +y
                qu, qw = q1 * cp - q2 * sp, q1 * sp + q2 * cp
            else:
                if frame == "projection":  # per unit horizontal / vertical length
                    tx, ty = cp * c - sp * s, cp * s + sp * c
                    q1, q2 = q1 * np.abs(ty), q2 * np.abs(tx)
                qu, qw = q1 * c + q2 * s, -q1 * s + q2 * c
            q[0] += np.where(inside, qu, 0.0)
            q[1] += np.where(inside, qw, 0.0)
        return q

    def _gl(self, a: float, b: float) -> np.ndarray:
        if b <= a or not self.dists:
            return np.zeros(3)
        x = 0.5 * (b - a) * _GL_X + 0.5 * (a + b)
        q = self.density(x)
        u, w, _, _ = self.arc.frame(x)
        vals = np.array([q[0], q[1], u * q[1] - w * q[0]])
        return 0.5 * (b - a) * (vals @ _GL_W)

    def _gl_to(self, a: float, x: np.ndarray) -> np.ndarray:
        """:meth:`_gl` from ``a`` to each of the positions ``x`` (3, len(x))."""
        if not self.dists:
            return np.zeros((3, len(x)))
        half = 0.5 * (x - a)
        pts = (half[:, None] * _GL_X[None, :] + (0.5 * (x + a))[:, None]).ravel()
        q = self.density(pts)
        u, w, _, _ = self.arc.frame(pts)
        vals = np.array([q[0], q[1], u * q[1] - w * q[0]]).reshape(3, len(x), len(_GL_X))
        return half[None, :] * (vals @ _GL_W)

    def fields(self, x: np.ndarray, j: int) -> np.ndarray:
        """(n, v, m) at positions x inside piece j (loads at its start included)."""
        br = self.breaks
        a = br[j]
        lo = float(br[j])
        Q = self.cum[:, j][:, None] + self._gl_to(lo, x)
        u, w, cp, sp = self.arc.frame(x)
        Fu = self.r_start[0] + Q[0]
        Fw = self.r_start[1] + Q[1]
        M = u * self.r_start[1] - w * self.r_start[0] + u * Q[1] - w * Q[0] - Q[2]
        for at, pu, pw, mz in self.points:
            if at <= a + 1e-12 * max(self.arc.length, 1.0):
                ua, wa, _, _ = self.arc.frame(np.array([at]))
                Fu, Fw = Fu + pu, Fw + pw
                M = M + (u - ua[0]) * pw - (w - wa[0]) * pu - mz
        n = -(Fu * cp + Fw * sp)
        v = -Fu * sp + Fw * cp
        return np.array([n, v, M])


def particular_values(m, ex, point_loads, dist_loads) -> _Loading:
    """The span loads of curved member ``m`` (global components; distributed loads may
    carry a fifth item, their frame) as a :class:`_Loading`."""
    return _Loading(m, arc_of(m.curve), ex, point_loads, dist_loads)


class Curved(Beam):
    """A prismatic circular or parabolic arc (``Member.curve``); a :class:`Beam` on its
    chord for nodal equilibrium, with fields along the arc."""

    name = "curved"
    takes_span_loads = True

    def equilibrium(self, m, L, c, s, one) -> list[list[tuple[str, Any]]]:
        return super().equilibrium(m, m.curve.chord, c, s, one)

    def unit_fields(self, m, L, one, zero):
        raise NotImplementedError("the fields of a curved member are not polynomials; "
                                  "use unit_values")

    def force_fields(self, m, L, values: Sequence, zero):
        raise NotImplementedError("the fields of a curved member are not polynomials; "
                                  "use result_fields")

    def result_fields(self, m, L, values: Sequence, pf) -> tuple[Piecewise, ...]:
        """(n, v, m) along the arc for the basic forces ``values`` plus the span-load
        fields ``pf`` (or None), as quintic pieces."""
        breaks = pf.m.breaks if pf is not None else piece_breaks(L)
        vals = np.asarray([float(v) for v in values])

        def f(x, j):
            return np.tensordot(vals, unit_values(m, x), axes=1)

        coef = interpolated(f, breaks, 3)
        if pf is not None:
            coef = coef + np.array([pf.n.coef, pf.v.coef, pf.m.coef])
        return tuple(Piecewise(breaks, coef[i]) for i in range(3))

    def particular(self, m, L, direction, point_loads, dist_loads) -> ParticularFields:
        ld = particular_values(m, direction, point_loads, dist_loads)
        coef = interpolated(ld.fields, ld.breaks, 3)
        c, s = direction

        def glob(r):
            return (-(r[0] * c - r[1] * s), -(r[0] * s + r[1] * c))

        return ParticularFields(*(Piecewise(ld.breaks, coef[i]) for i in range(3)),
                                glob(ld.r_start), glob(ld.r_end))

    def _stiffness(self, m, sec, shear: bool) -> list[tuple[int, float]]:
        out = []
        if sec.EA is not None:
            out.append((0, float(sec.EA)))
        if shear and sec.GAs:
            out.append((1, float(sec.GAs)))
        out.append((2, float(sec.EI)))
        return out

    def flexibility(self, m, sec, L, shear: bool, one) -> list[EnergyTerm]:
        nb = len(self.basic_forces(m))
        pairs = [(i, j) for i in range(nb) for j in range(i, nb)]
        names = {0: "axial", 1: "shear", 2: "bending"}
        out = []
        for f, K in self._stiffness(m, sec, shear):
            def integrand(x, f=f, K=K):
                u = unit_values(m, x)[:, f, :]
                return np.array([u[i] * u[j] for i, j in pairs]) / K

            vals, _ = gauss_kronrod(integrand, piece_breaks(L, ()))
            block = np.zeros((nb, nb))
            for (i, j), v in zip(pairs, vals, strict=True):
                block[i, j] = block[j, i] = v
            out.append(EnergyTerm(names[f], tuple(range(nb)), block.tolist()))
        for col, k in zip(range(1, nb), self._ends(m), strict=True):
            if m.end_springs[k] is not None:
                out.append(EnergyTerm("joint spring", (col,), [[1.0 / sec.end_springs[k]]]))
        return out

    def initial_deformations(self, m, sec, L, shear: bool, integral, imposed, one):
        out = []
        nb = len(self.basic_forces(m))
        names = {0: ("n", "axial"), 1: ("v", "shear"), 2: ("m", "bending")}
        if integral is not None:
            pf = integral.fields
            stiff = self._stiffness(m, sec, shear)

            def loaded(x):
                u = unit_values(m, x)
                return np.concatenate([u[:, f, :] * getattr(pf, names[f][0])(x) / K
                                       for f, K in stiff])

            vals, _ = gauss_kronrod(loaded, pf.m.breaks)
            for k, (f, _) in enumerate(stiff):
                for i in range(nb):
                    out.append((f"span loads ({names[f][1]})", i, float(vals[k * nb + i])))
        if imposed is not None:
            eps, kappa, misfit = imposed
            strain = eps + misfit / L

            def integrand(x):
                u = unit_values(m, x)
                return np.concatenate([u[:, 0, :] * strain, u[:, 2, :] * kappa])

            vals, _ = gauss_kronrod(integrand, piece_breaks(L, ()))
            for i in range(nb):
                out.append(("temperature and misfit", i, float(vals[i])))
                if kappa:
                    out.append(("temperature (gradient)", i, float(vals[nb + i])))
        return out


CURVED = register(Curved())
