"""The force-method pipeline in exact arithmetic (see :mod:`leastwork.solve` for the same
steps in floating point).

The numeric topology decides the columns (basic forces and reactions), the degree and the
redundants; everything else is redone here over the field K of :mod:`.algebra`:

* the equilibrium matrix A (same entries as :func:`leastwork.topology.build_topology`),
  the released structure's solve A0 s = -p by exact sparse elimination;
* span-load fields per member (:func:`leastwork.fields.particular_fields`), as exact
  polynomials on pieces ordered by the values of their ends;
* the flexibility F of members and springs and the initial deformations e
  (:mod:`leastwork.energy`), with exact integrals;
* delta = B'FB, delta0 = B'(F s0 + e - c) + c_R, Delta = c_R, delta X = Delta - delta0,
  s = s0 + B X (:mod:`leastwork.solve`);
* reactions, member end forces and moment extremes (:mod:`leastwork.solution`),
  displacements by the unit-load method (:mod:`leastwork.displacements`).

The flexibility equations are solved by Cramer's rule with fraction-free determinants
(X_i = N_i / det), and everything after them is kept linear in the redundants
(:class:`.algebra.Lin`) and closed into one fraction per result at the end: sums of
fractions over the large determinant would otherwise cost a polynomial gcd each.

All values are in the case units.
"""

from __future__ import annotations

import re
from collections.abc import Callable
from dataclasses import dataclass, field
from typing import Any

import mpmath
import sympy

from ..elements import kind_of
from ..errors import CaseError
from ..fields import span_fields
from ..loadkinds import CaseEffects, load_kind
from ..model import Structure
from ..polynomials import (
    poly_add,
    poly_integral,
    poly_mul,
)
from .algebra import (
    Algebra,
    Atomizer,
    Closure,
    Lin,
    Piecewise,
    SparseLU,
    cramer,
    dot,
    factors,
)
from .displacements import displacement
from .exact import ExactModel
from .extremes import member_result

__all__ = ["ExactCase", "ExactSolution", "run_pipeline"]


@dataclass
class ExactCase:
    """One load case: values are elements of K, :class:`Lin` (closed by ``closure``) or
    :class:`RootValue`."""

    name: str
    redundants: list
    load_terms: list
    imposed: list
    reactions: dict[str, dict[str, Any]]
    members: dict[str, dict[str, Any]]
    displacements: dict[str, Any]
    equilibrium_residual: list  #: exact nodal residuals (all zero when all is well)
    closure: Any = None  #: closes the :class:`Lin` values of this case


@dataclass
class ExactSolution:
    """The exact results: ``flexibility`` (elements of K) and the load cases."""

    alg: Algebra
    flexibility: list[list]
    cases: dict[str, ExactCase]
    warnings: list[str] = field(default_factory=list)


@dataclass
class _Fields:
    """Span-load fields of a member on its simply supported analogue."""

    n: Piecewise
    v: Piecewise
    m: Piecewise
    start_force: tuple
    end_force: tuple


@dataclass
class _Member:
    """Exact length, direction cosines and stiffnesses of a member (None where absent)."""

    L: Any
    c: Any
    s: Any
    EA: Any
    EI: Any
    GAs: Any
    alpha: Any
    depth: Any


def run_pipeline(st: Structure, topo, red: list[int], model: ExactModel,
                 tick: Callable[[], None]) -> ExactSolution:
    """Solve the case exactly. ``tick`` is called often; it raises when time is up."""
    return _Pipeline(st, topo, red, model, tick).run()


def _sqrt_expr(e: sympy.Expr) -> sympy.Expr:
    """sqrt of a positive rational expression with square factors taken out."""
    num, den = sympy.fraction(sympy.factor(e))

    def root(p):
        coeff, facs = sympy.factor_list(p)
        out = sympy.sqrt(coeff)
        rest = sympy.S.One
        for f, k in facs:
            out *= f ** (k // 2)
            if k % 2:
                rest *= f
        return out * sympy.sqrt(rest)

    return root(num) / root(den)


class _Pipeline:
    """One exact solve: geometry and loads over K on construction, then :meth:`run`."""

    def __init__(self, st: Structure, topo, red: list[int], model: ExactModel, tick):
        self.st = st
        self.topo = topo
        self.red = list(red)
        self.model = model
        self.tick = tick
        self.warnings: list[str] = []
        atom = Atomizer(model.values)
        self.atom = atom
        # ---- stage 1: irrational parts become auxiliaries (before K is made)
        xy = {n: (atom(x), atom(y)) for n, (x, y) in model.nodes.items()}
        lengths = {}
        for mid, m in st.members.items():
            lengths[mid] = self._length_expr(xy[m.end][0] - xy[m.start][0],
                                             xy[m.end][1] - xy[m.start][1])
        pair_lengths = {}
        for t in st.displacements:
            mt = re.match(r"^([A-Za-z0-9_]+)-([A-Za-z0-9_]+)$", t)
            if mt and t not in pair_lengths:
                a, b = mt.groups()
                pair_lengths[t] = self._length_expr(xy[b][0] - xy[a][0], xy[b][1] - xy[a][1])
        trig = {}
        for nid, ang in model.angles.items():
            trig[nid] = (atom(sympy.sin(ang)), atom(sympy.cos(ang)))
        for props in model.members.values():
            for v in props.values():
                if v is not None:
                    atom(v)
        for v in model.springs.values():
            atom(v)
        for ld in model.loads:
            for v in ld.values():
                for x in _flatten(v):
                    if isinstance(x, sympy.Basic):
                        atom(x)
        # ---- stage 2: the field
        alg = Algebra(list(model.parameters.values()), model.values, atom)
        self.alg = alg
        self.zero = alg.zero
        self.xy = {n: (alg.el(x), alg.el(y)) for n, (x, y) in xy.items()}
        self.mem: dict[str, _Member] = {}
        for mid, m in st.members.items():
            L = alg.el(lengths[mid])
            p = model.members[mid]
            self.mem[mid] = _Member(
                L=L,
                c=(self.xy[m.end][0] - self.xy[m.start][0]) / L,
                s=(self.xy[m.end][1] - self.xy[m.start][1]) / L,
                **{k: (alg.el(v) if v is not None else None) for k, v in p.items()},
            )
        self.pair_len = {t: alg.el(e) for t, e in pair_lengths.items()}
        self.trig = {n: (alg.el(s), alg.el(c)) for n, (s, c) in trig.items()}
        self.springs = {k: alg.el(v) for k, v in model.springs.items()}

    # ------------------------------------------------------------------ geometry
    def _length_expr(self, dx: sympy.Expr, dy: sympy.Expr) -> sympy.Expr:
        atom = self.atom
        if dy == 0 or dx == 0:
            d = dx if dy == 0 else dy
            if d == 0:
                raise CaseError("zero-length member or pair of coincident nodes in exact "
                                "arithmetic", source=self.st.source)
            return d if atom.value_of(d) > 0 else -d
        L = atom(_sqrt_expr(sympy.expand(dx**2 + dy**2)))
        return L if atom.value_of(L) > 0 else -L

    # ------------------------------------------------------------------ statics
    def _columns(self) -> list[list[tuple[int, Any]]]:
        """Entries of the equilibrium matrix A, column by column (as build_topology)."""
        st, topo, alg = self.st, self.topo, self.alg
        di = topo.dof_index
        member_entries = {}
        for m in st.members.values():
            g, kind = self.mem[m.id], kind_of(m)
            member_entries.update(zip((bf.name for bf in kind.basic_forces(m)),
                                      kind.equilibrium(m, g.L, g.c, g.s, alg.one), strict=True))
        out = []
        for col in topo.columns:
            e: list[tuple[str, Any]] = []
            if col.kind == "reaction":
                r = topo.restraints[col.restraint_index]
                if r.direction == "n":
                    sn, cs = self.trig[r.node]
                    vec = (-sn, cs, alg.zero)
                else:
                    vec = tuple(alg.one if d == r.direction else alg.zero
                                for d in ("x", "y", "rz"))
                e = [(f"{r.node}.x", vec[0]), (f"{r.node}.y", vec[1])]
                if vec[2]:
                    e.append((f"{r.node}.rz", vec[2]))
            else:
                e = member_entries[col.name]
            acc: dict[int, Any] = {}
            for dof, v in e:
                if v:
                    i = di[dof]
                    acc[i] = acc.get(i, alg.zero) + v
            out.append([(i, v) for i, v in acc.items() if v])
        return out

    def _factorise(self) -> None:
        topo = self.topo
        ncol = len(topo.columns)
        self.ncol = ncol
        self.ndof = len(topo.dofs)
        self.A = self._columns()
        self.keep = [j for j in range(ncol) if j not in self.red]
        rows: list[dict[int, Any]] = [dict() for _ in range(self.ndof)]
        for k, j in enumerate(self.keep):
            for i, v in self.A[j]:
                rows[i][k] = v
        lengths = [self.alg.fnum(g.L) for g in self.mem.values()]
        lref = sum(lengths) / len(lengths)
        scale = [1.0 / lref if d.endswith(".rz") else 1.0 for d in topo.dofs]
        try:
            self.lu = SparseLU(self.alg, rows, self.tick, scale)
        except ZeroDivisionError:
            raise CaseError("the released structure is singular in exact arithmetic; choose "
                            "other redundants", source=self.st.source) from None

    def forces(self, rhs: list) -> list:
        """Released-structure forces (ncol) in equilibrium with nodal loads ``rhs``."""
        x = self.lu.solve([-r if r else r for r in rhs])
        s = [self.zero] * self.ncol
        for k, j in enumerate(self.keep):
            s[j] = x[k]
        return s

    # ------------------------------------------------------------------ energy
    def _flexibility(self) -> dict[tuple[int, int], Any]:
        st, topo, alg = self.st, self.topo, self.alg
        ci = topo.column_index
        F: dict[tuple[int, int], Any] = {}

        def add(a, b, v):
            if a is not None and b is not None and v:
                F[(a, b)] = F.get((a, b), alg.zero) + v

        for m in st.members.values():
            g = self.mem[m.id]
            cols = [ci[bf.name] for bf in kind_of(m).basic_forces(m)]
            for term in kind_of(m).flexibility(m, g, g.L, st.shear, alg.one):
                for a, row in zip(term.forces, term.block, strict=True):
                    for b, v in zip(term.forces, row, strict=True):
                        add(cols[a], cols[b], v)
        for j, c in enumerate(topo.columns):
            if c.kind == "reaction":
                r = topo.restraints[c.restraint_index]
                if r.is_spring:
                    add(j, j, alg.one / self.springs[r.name])
        return F

    def _fmul(self, F, v: list) -> list:
        out = [self.zero] * self.ncol
        for (a, b), f in F.items():
            if v[b]:
                out[a] = out[a] + f * v[b]
        return out

    # ------------------------------------------------------------------ loads
    def _fields(self, mid: str, points: list, dists: list) -> _Fields:
        """Exact :func:`leastwork.fields.span_fields` of one member, its pieces ordered by
        the values of their ends. points: (at, fx, fy, mz) global; dists: (a, b, (wx0,
        wx1), (wy0, wy1)) global."""
        g, zero = self.mem[mid], self.zero
        breaks = self.alg.order([zero, g.L, *[p[0] for p in points], *[d[0] for d in dists],
                                 *[d[1] for d in dists]], first=zero, last=g.L)

        def locate(x) -> int:
            return next(k for k, b in enumerate(breaks) if b == x)

        n, v, m, start, end = span_fields(g.L, (g.c, g.s), points, dists, breaks, locate)
        return _Fields(*(Piecewise(breaks, f) for f in (n, v, m)), start, end)

    def _loading(self, case: str) -> dict[str, Any]:
        st, zero = self.st, self.zero

        def end_of(at, L) -> str | None:
            return "start" if at == zero else "end" if at == L else None

        sink = CaseEffects(st, self.topo, case, zero, lambda n: [zero] * n,
                           lambda mid: self.mem[mid], lambda mid: self.mem[mid].L, end_of)
        for ld, x in zip(st.loads, self.model.loads):
            if ld.case == case:
                load_kind(ld).apply(_exact_values(self.alg, x), ld, sink)
        parts: dict[str, _Fields] = {}
        for mid in dict.fromkeys([*sink.point, *sink.dist]):
            self.tick()
            m = st.members[mid]
            pf = self._fields(mid, sink.point.get(mid, []), sink.dist.get(mid, []))
            parts[mid] = pf
            sink.add_nodal(m.start, *pf.start_force, zero)
            sink.add_nodal(m.end, *pf.end_force, zero)
        return {"p": sink.p, "particulars": parts, "imposed": sink.strains,
                "settlement": sink.c, "nodal": sink.nodal}

    def _initial(self, parts: dict[str, _Fields], imposed: dict[str, list]) -> list:
        """Initial deformations e (as energy.initial_deformation_terms)."""
        st, ci = self.st, self.topo.column_index
        e = [self.zero] * self.ncol
        for m in st.members.values():
            g = self.mem[m.id]
            cols = [ci[bf.name] for bf in kind_of(m).basic_forces(m)]
            pf = parts.get(m.id)
            integral = None if pf is None else self._span_integral(pf, g.L)
            for _, i, value in kind_of(m).initial_deformations(
                    m, g, g.L, st.shear, integral, imposed.get(m.id), self.alg.one):
                if value:
                    e[cols[i]] += value
        return e

    @staticmethod
    def _span_integral(pf: _Fields, L):
        """``integral(f, weight)`` of :meth:`leastwork.elements.MemberKind.
        initial_deformations`: int_0^L weight(x/L) f0(x) dx, exactly."""

        def integral(f: str, weight) -> Any:
            in_x, power = [], L / L
            for c in weight:
                in_x.append(c / power)
                power = power * L
            return _integral(getattr(pf, f).map(lambda q, w=tuple(in_x): poly_mul(q, w)))

        return integral

    # ------------------------------------------------------------------ solve
    def run(self) -> ExactSolution:
        st, topo, alg = self.st, self.topo, self.alg
        self._factorise()
        red = self.red
        k = len(red)
        B = []
        for j in red:
            self.tick()
            rhs = [self.zero] * self.ndof
            for i, v in self.A[j]:
                rhs[i] = v
            col = self.forces(rhs)
            col[j] = alg.one
            B.append(col)
        self.B = B
        F = self._flexibility()
        self.F = F
        FB = [self._fmul(F, b) for b in B]
        delta = [[dot(B[i], FB[j]) for j in range(k)] for i in range(k)]
        names = [topo.columns[j].name for j in red]
        zero_rows = [i for i in range(k) if not any(delta[i][j] for j in range(k))]
        for i in zero_rows:
            self.warnings.append(
                f"redundant {names[i]} has no flexibility (it strains only axially rigid "
                "members or rigid parts); its value is not determined by compatibility and "
                "is taken as zero")
        rest = [i for i in range(k) if i not in zero_rows]
        self._unit_states: dict[int, list] = {}
        self._det_factors: dict[Any, list] = {}
        cases = {}
        for case in st.case_names:
            self.tick()
            ld = self._loading(case)
            s0 = self.forces(ld["p"])
            e = self._initial(ld["particulars"], ld["imposed"])
            c = ld["settlement"]
            Delta = [c[j] for j in red]
            Fs0 = self._fmul(F, s0)
            g = [a + b - d for a, b, d in zip(Fs0, e, c)]
            load_terms = [dot(B[i], g) + Delta[i] for i in range(k)]
            rhs = [Delta[i] - load_terms[i] for i in range(k)]
            for i in zero_rows:
                if rhs[i]:
                    raise CaseError(
                        "the compatibility equations have no solution: an imposed "
                        "deformation (temperature, misfit or settlement) acts on a part "
                        "with no flexibility (an axially rigid member or a rigid support "
                        "chain)", source=st.source)
            try:
                nums, det, Dr = cramer(alg, [[delta[i][j] for j in rest] for i in rest],
                                       [rhs[i] for i in rest])
            except ZeroDivisionError:
                raise CaseError(
                    "the flexibility matrix is singular (some combination of redundants "
                    "strains no flexible part); symbolic mode does not take the "
                    "minimum-norm solution: solve this case numerically",
                    source=st.source) from None
            self.tick()
            full = [alg.K.ring.zero] * k
            for i, x in zip(rest, nums):
                full[i] = x
            if det not in self._det_factors:
                self._det_factors[det] = factors(det)
            self.closure = Closure(alg, full, det * Dr, self._det_factors[det] + factors(Dr))
            self.tick()
            X = [Lin([self.zero] + [alg.one if i == j else self.zero for j in range(k)])
                 for i in range(k)]
            s = [Lin([s0[j]] + [B[i][j] for i in range(k)]) for j in range(self.ncol)]
            d = [a + b for a, b in zip(self._fmul(F, s), e)]
            cases[case] = self._results(case, ld, X, load_terms, Delta, s, d)
            cases[case].closure = self.closure
        return ExactSolution(alg, delta, cases, self.warnings)

    def num(self, v) -> mpmath.mpf:
        """Value at the parameters of an element of K or a :class:`Lin`."""
        return self.closure.num(v)

    # ------------------------------------------------------------------ results
    def _results(self, case, ld, X, load_terms, Delta, s, d) -> ExactCase:
        st, topo = self.st, self.topo
        reactions: dict[str, dict[str, Any]] = {}
        for sup in st.supports.values():
            out: dict[str, Any] = {}
            for r in sup.restraints:
                j = topo.column_index.get(r.name)
                val = s[j] if j is not None else self.zero
                if r.direction == "n":
                    sn, cs = self.trig[r.node]
                    out["x"] = out.get("x", self.zero) + val * (-sn)
                    out["y"] = out.get("y", self.zero) + val * cs
                    out["n"] = val
                else:
                    out[r.direction] = out.get(r.direction, self.zero) + val
            reactions[sup.node] = out
        finals = {}
        members = {}
        for mid in st.members:
            self.tick()
            fl = self._member_fields(mid, s, ld["particulars"].get(mid))
            finals[mid] = fl
            members[mid] = self._member_result(mid, fl)
        residual = self._nodal_residual(members, ld["nodal"], reactions)
        ctx = {"d": d, "c": ld["settlement"], "finals": finals, "imposed": ld["imposed"]}
        disp = {}
        for t in st.displacements:
            self.tick()
            disp[t] = displacement(self, t, ctx)
        return ExactCase(case, X, load_terms, Delta, reactions, members, disp, residual)

    def _member_fields(self, mid: str, s: list, pf: _Fields | None) -> _Fields:
        st, ci = self.st, self.topo.column_index
        m = st.members[mid]
        g = self.mem[mid]
        z = self.zero
        kind = kind_of(m)
        fields = kind.force_fields(m, g.L, [s[ci[bf.name]] for bf in kind.basic_forces(m)],
                                   z)
        if pf is None:
            breaks = [z, g.L]
            cn, cv, cm = [(z,)], [(z,)], [(z,)]
        else:
            breaks = pf.m.breaks
            cn, cv, cm = pf.n.pieces, pf.v.pieces, pf.m.pieces
        cn = [poly_add(p, tuple(fields.get("n", (z,)))) for p in cn]
        cm = [poly_add(p, tuple(fields.get("m", (z,)))) for p in cm]
        cv = [poly_add(p, tuple(fields.get("v", (z,)))) for p in cv]
        return _Fields(Piecewise(breaks, cn), Piecewise(breaks, cv), Piecewise(breaks, cm),
                       (), ())

    def _member_result(self, mid: str, fl: _Fields) -> dict[str, Any]:
        """End forces and moment extremes (:func:`.extremes.member_result`)."""
        return member_result(self.alg, self.closure, self.mem[mid].L, fl.n, fl.v, fl.m,
                             self.st.source)

    def _nodal_residual(self, members, nodal, reactions) -> list:
        """Exact residuals of nodal equilibrium from the final end forces, the nodal loads
        and the reactions (as solution._equilibrium does in floating point)."""
        st, topo = self.st, self.topo
        z = self.zero
        sums = {n: [z, z, z] for n in st.nodes}
        for mid, r in members.items():
            m = st.members[mid]
            g = self.mem[mid]
            ex, ey = (g.c, g.s), (-g.s, g.c)
            n0, v0, m0 = r["start"]["n"], r["start"]["v"], r["start"]["m"]
            nL, vL, mL = r["end"]["n"], r["end"]["v"], r["end"]["m"]
            a, b = sums[m.start], sums[m.end]
            a[0] += n0 * ex[0] - v0 * ey[0]
            a[1] += n0 * ex[1] - v0 * ey[1]
            a[2] += m0
            b[0] += -nL * ex[0] + vL * ey[0]
            b[1] += -nL * ex[1] + vL * ey[1]
            b[2] += -mL
        for ld in nodal:
            t = sums[ld.node]
            t[0] += ld.fx
            t[1] += ld.fy
            t[2] += ld.mz
        for node, comps in reactions.items():
            t = sums[node]
            t[0] += comps.get("x", z)
            t[1] += comps.get("y", z)
            t[2] += comps.get("rz", z)
        out = []
        for node, (x, y, r) in sums.items():
            out += [x, y]
            if f"{node}.rz" in topo.dof_index:
                out.append(r)
        return [self.closure.close(v) for v in out]

def _exact_values(alg: Algebra, v):
    """A load's exact values (sympy) as elements of K; names and None kept."""
    if v is None or isinstance(v, str):
        return v
    if isinstance(v, dict):
        return {k: _exact_values(alg, x) for k, x in v.items()}
    if isinstance(v, (list, tuple)):
        return type(v)(_exact_values(alg, x) for x in v)
    return alg.el(v)


def _integral(pw: Piecewise):
    total = pw.breaks[0] - pw.breaks[0]
    for k, poly in enumerate(pw.pieces):
        total += poly_integral(poly, pw.breaks[k], pw.breaks[k + 1])
    return total


def _flatten(v):
    if isinstance(v, (list, tuple)):
        for x in v:
            yield from _flatten(x)
    else:
        yield v
