"""The exact number type for the generic core (:mod:`leastwork.arithmetic`): what the
field K of :mod:`.algebra` needs that floats do not.

* :class:`ExactNumbers` — geometry, sections and loads as elements of K; span-load fields
  on pieces ordered by the values of their ends; exact integrals;
* :class:`ExactReleased` — the released basis over K (:class:`leastwork.statics.
  ReleasedStructure` with A0 inverted exactly by sympy's ``DomainMatrix`` instead of a
  float LU; displacements by a unit load at each nodal direction asked for);
* :class:`ExactSolver` — the compatibility equations by fraction-free elimination
  (X_i = N_i / det), the unknowns returned as :class:`.algebra.Lin` values so that
  superposition never divides by the determinant (:class:`.algebra.Closure` does, once
  per result).

All values are in the case units.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass
from typing import Any

import numpy as np
import sympy
from sympy.polys.matrices import DomainMatrix
from sympy.polys.matrices.exceptions import DMError

from ..errors import CaseError
from ..fields import ParticularFields, span_fields
from ..polynomials import poly_add, poly_integral, poly_mul, poly_scale
from ..statics import ReleasedStructure
from .algebra import (
    Algebra,
    Closure,
    Lin,
    Piecewise,
    SparseMatrix,
    cramer,
    factors,
    merged,
    objects,
)

__all__ = ["ExactMember", "ExactNumbers", "ExactReleased", "ExactSolver"]


@dataclass
class ExactMember:
    """Exact length, direction cosines and stiffnesses of a member (None where absent)."""

    L: Any
    c: Any
    s: Any
    EA: Any
    EI: Any
    GAs: Any
    alpha: Any
    depth: Any


class ExactNumbers:
    """The :class:`leastwork.arithmetic.Numbers` of the field K."""

    def __init__(self, alg: Algebra, members: dict[str, ExactMember], trig: dict,
                 springs: dict, pair_len: dict, loads: list, tick: Callable[[], None],
                 source: str):
        self.alg, self.one, self.zero = alg, alg.one, alg.zero
        self.mem, self.trig, self.springs = members, trig, springs
        self.pair_len, self.loads, self.tick, self.source = pair_len, loads, tick, source

    def length(self, mid: str):
        return self.mem[mid].L

    def direction(self, mid: str):
        return self.mem[mid].c, self.mem[mid].s

    def section(self, mid: str) -> ExactMember:
        return self.mem[mid]

    def restraint_vector(self, r) -> tuple:
        if r.direction == "n":
            sn, cs = self.trig[r.node]
            return -sn, cs, self.zero
        return tuple(self.one if d == r.direction else self.zero for d in ("x", "y", "rz"))

    def spring_flexibility(self, r):
        return self.one / self.springs[r.name]

    def vector(self, n: int) -> np.ndarray:
        return objects(n, self.zero)

    def matrix(self, n: int) -> SparseMatrix:
        return SparseMatrix(n, self.zero)

    @staticmethod
    def add_block(F: SparseMatrix, columns, block) -> None:
        for a, row in zip(columns, block, strict=True):
            for b, v in zip(columns, row, strict=True):
                if v:
                    F.add(a, b, v)

    @staticmethod
    def block(rows: list) -> list:
        return rows

    @staticmethod
    def scalar(v):
        return v

    def load_values(self, index: int, ld) -> dict:
        return self.loads[index]

    def end_of(self, at, L) -> str | None:
        return "start" if at == self.zero else "end" if at == L else None

    def particular(self, m, points: list, dists: list) -> ParticularFields:
        """:func:`leastwork.fields.span_fields` of one member, its pieces ordered by the
        values of their ends. points: (at, fx, fy, mz) global; dists: (a, b, (wx0, wx1),
        (wy0, wy1)) global."""
        self.tick()
        g, zero = self.mem[m.id], self.zero
        breaks = self.alg.order([zero, g.L, *[p[0] for p in points], *[d[0] for d in dists],
                                 *[d[1] for d in dists]], first=zero, last=g.L)

        def locate(x) -> int:
            return next(k for k, b in enumerate(breaks) if b == x)

        n, v, mm, start, end = span_fields(g.L, (g.c, g.s), points, dists, breaks, locate)
        return ParticularFields(*(Piecewise(breaks, f) for f in (n, v, mm)), start, end)

    @staticmethod
    def span_integral(pf: ParticularFields, L):
        """``integral(f, weight)``: int_0^L weight(x/L) f0(x) dx, exactly."""

        def integral(f: str, weight) -> Any:
            in_x, power = [], L / L
            for c in weight:
                in_x.append(c / power)
                power = power * L
            pw = getattr(pf, f).map(lambda q, w=tuple(in_x): poly_mul(q, w))
            total = pw.breaks[0] - pw.breaks[0]
            for k, poly in enumerate(pw.pieces):
                total += poly_integral(poly, pw.breaks[k], pw.breaks[k + 1])
            return total

        return integral

    def span_work(self, value, unit: ParticularFields, real, section: dict, free: dict):
        """Exact integrals on the pieces of both fields' common refinement."""
        z = self.zero
        for f in ("n", "m", "v"):
            K, extra = section.get(f), free.get(f, [])
            if K is None and not any(extra):
                continue
            for x0, x1, pu, pr in merged(self.alg, getattr(unit, f), getattr(real, f)):
                inner = poly_scale(pr, self.one / K) if K is not None else (z,)
                for e in extra:
                    inner = poly_add(inner, (e,))
                value += poly_integral(poly_mul(pu, inner), x0, x1)
        return value

    def pair(self, a: str, b: str) -> tuple:
        g = self.pair_len[f"{a}-{b}"]
        return g[0], g[1], g[2]

    def member_position(self, target):
        """The distance as written (a plain decimal in the case unit), at most L."""
        try:
            at = self.alg.el(sympy.Rational(target.distance))
        except (TypeError, ValueError):
            raise CaseError(f'"{target.a}@{target.distance}.{target.direction}": distance '
                            f'"{target.distance}" is not a plain decimal number',
                            source=self.source) from None
        L = self.mem[target.a].L
        return L if self.alg.num(at) >= self.alg.num(L) else at


class ExactReleased(ReleasedStructure):
    """The released structure over K: A0 inverted exactly (sympy's ``DomainMatrix``);
    raises ZeroDivisionError when A0 is singular."""

    def __init__(self, topo, redundants: list[int], columns: list, nums: ExactNumbers,
                 tick: Callable[[], None]):
        self.topo, self.redundants, self.nums, self.tick = topo, list(redundants), nums, tick
        self.one, zero = nums.one, nums.zero
        self.ncol, ndof = len(topo.columns), len(topo.dofs)
        self.keep = [j for j in range(self.ncol) if j not in self.redundants]
        self._A = objects((ndof, self.ncol), zero)
        for j, col in enumerate(columns):
            for i, v in col:
                self._A[i, j] = self._A[i, j] + v
        rows: dict[int, dict[int, Any]] = {}
        for k, j in enumerate(self.keep):
            for i, _ in columns[j]:
                if self._A[i, j]:
                    rows.setdefault(i, {})[k] = self._A[i, j]
        try:  # A0 is sparse and small beside the rest of the exact solve: inverted once
            inverse = DomainMatrix(rows, (ndof, len(self.keep)), nums.alg.K.to_domain()).inv()
        except DMError:
            raise ZeroDivisionError("singular matrix") from None
        self._inverse = inverse.to_sdm()
        self._unit: dict[int, np.ndarray] = {}

    @property
    def A(self) -> np.ndarray:
        return self._A

    def forces(self, rhs: np.ndarray) -> np.ndarray:
        """Basic forces and reactions (ncol, k) in equilibrium with nodal loads ``rhs``
        (ndof, k, or ndof): A0 s = -rhs; redundant columns zero."""
        rhs = rhs.reshape(len(rhs), -1)
        s = objects((self.ncol, rhs.shape[1]), self.nums.zero)
        for k in range(rhs.shape[1]):
            self.tick()
            for i, row in self._inverse.items():
                s[self.keep[i], k] = -sum((v * rhs[j, k] for j, v in row.items()
                                           if rhs[j, k]), self.nums.zero)
        return s

    def unit_state(self, dof: int) -> np.ndarray:
        """The released structure's forces (ncol,) under a unit load at ``dof``."""
        if dof not in self._unit:
            p = self.nums.vector(len(self.topo.dofs))
            p[dof] = self.one
            self._unit[dof] = self.forces(p)[:, 0]
        return self._unit[dof]

    def displacements(self, compatible: np.ndarray) -> _UnitLoadDisplacements:
        """Nodal displacements for deformations less settlements ``compatible``, each
        worked out when asked (a unit load at that nodal direction)."""
        return _UnitLoadDisplacements(self, compatible)

    def flexibility(self, st, topo) -> SparseMatrix:
        from ..energy import flexibility_blocks

        return flexibility_blocks(st, topo, self.nums)

    def compatibility_solver(self, delta, names: list[str], source: str) -> ExactSolver:
        return ExactSolver(self.nums.alg, delta, names, source)


class _UnitLoadDisplacements:
    """u[dof] = (unit state at dof) . compatible, by the unit-load method."""

    def __init__(self, released: ExactReleased, compatible: np.ndarray):
        self.released, self.compatible = released, compatible

    def __getitem__(self, dof: int):
        return self.released.unit_state(dof) @ self.compatible


class ExactSolver:
    """delta X = rhs over K by fraction-free elimination (:func:`.algebra.cramer`);
    ``solve`` returns the unknowns as unit :class:`.algebra.Lin` values and leaves their
    values in ``closure``. An unknown without flexibility is explained and taken as
    zero; a singular remainder is refused (no minimum-norm solution in exact numbers)."""

    def __init__(self, alg: Algebra, delta: np.ndarray, names: list[str], source: str):
        self.alg, self.delta, self.source = alg, delta, source
        self.n = k = len(names)
        self.cond = float("nan")
        self.zero_rows = [i for i in range(k) if not any(delta[i, j] for j in range(k))]
        self.rest = [i for i in range(k) if i not in self.zero_rows]
        self.warnings = [
            f"redundant {names[i]} has no flexibility (it strains only axially rigid "
            "members or rigid parts); its value is not determined by compatibility and is "
            "taken as zero" for i in self.zero_rows]
        self._det_factors: dict[Any, list] = {}
        self.closure: Closure | None = None

    def solve(self, rhs: np.ndarray) -> np.ndarray:
        alg, k, rest = self.alg, self.n, self.rest
        if any(rhs[i] for i in self.zero_rows):
            raise CaseError(
                "the compatibility equations have no solution: an imposed deformation "
                "(temperature, misfit or settlement) acts on a part with no flexibility (an "
                "axially rigid member or a rigid support chain)", source=self.source)
        try:
            nums, det, Dr = cramer(alg, [[self.delta[i, j] for j in rest] for i in rest],
                                   [rhs[i] for i in rest])
        except ZeroDivisionError:
            raise CaseError(
                "the flexibility matrix is singular (some combination of redundants strains "
                "no flexible part); symbolic mode does not take the minimum-norm solution: "
                "solve this case numerically", source=self.source) from None
        full = [alg.K.ring.zero] * k
        for i, x in zip(rest, nums):
            full[i] = x
        if det not in self._det_factors:
            self._det_factors[det] = factors(det)
        self.closure = Closure(alg, full, det * Dr, self._det_factors[det] + factors(Dr))
        X = objects(k, alg.zero)
        for i in range(k):
            X[i] = Lin([alg.zero] + [alg.one if i == j else alg.zero for j in range(k)])
        return X

