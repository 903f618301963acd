"""The force-method pipeline in exact arithmetic: the generic core of
:mod:`leastwork.topology`, :mod:`leastwork.statics`, :mod:`leastwork.energy`,
:mod:`leastwork.superposition`, :mod:`leastwork.solution` and
:mod:`leastwork.displacements` run on the field K of :mod:`.algebra`
(:class:`.backend.ExactNumbers`, the exact basis and solver of :mod:`.backend`).

The numeric topology decides the columns (basic forces and reactions), the degree and the
redundants. What is done here only: the geometry and the case's values as elements of K
(the irrational parts of the input made auxiliaries first), and the results of each load
case with its exact extremes (:mod:`.extremes`) and exact nodal residuals.

The flexibility equations are solved fraction-free (X_i = N_i / det), and everything after
them is kept linear in the redundants (:class:`.algebra.Lin`) and closed into one fraction
per result at the end: sums of fractions over the large determinant would otherwise cost a
polynomial gcd each.

All values are in the case units.
"""

from __future__ import annotations

import re
from collections.abc import Callable
from dataclasses import dataclass, field
from typing import Any

import sympy

from ..displacements import evaluate_target
from ..errors import CaseError
from ..fields import ParticularFields
from ..model import Structure, reaction_components
from ..polynomials import poly_add
from ..solution import basic_force_fields, end_action
from ..superposition import CaseState, case_state
from ..topology import equilibrium_columns
from .algebra import Algebra, Atomizer, Closure, Piecewise
from .backend import ExactMember, ExactNumbers, ExactReleased
from .exact import ExactModel
from .extremes import member_result

__all__ = ["ExactCase", "ExactSolution", "run_pipeline"]


@dataclass
class ExactCase:
    """One load case: values are elements of K, :class:`.algebra.Lin` (closed by
    ``closure``) or :class:`.extremes.RootValue`; what the generic unit-load displacements
    read beside them (``fields``, ``nodal_displacements``, ``deformations``, ``loading``,
    ``released``)."""

    name: str
    redundants: Any
    load_terms: Any
    imposed: Any
    reactions: dict[str, dict[str, Any]]
    members: dict[str, dict[str, Any]]
    displacements: dict[str, Any]
    equilibrium_residual: list  #: exact nodal residuals (all zero when all is well)
    closure: Any = None  #: closes the :class:`.algebra.Lin` values of this case
    fields: dict[str, ParticularFields] = field(default_factory=dict)
    nodal_displacements: Any = None
    deformations: Any = None
    loading: Any = None
    released: Any = None

    def member_fields(self, mid: str) -> ParticularFields:
        """The final section-force fields (n, v, m) of member ``mid``."""
        return self.fields[mid]


@dataclass
class ExactSolution:
    """The exact results: ``flexibility`` (k x k, elements of K) and the load cases."""

    alg: Algebra
    flexibility: Any
    cases: dict[str, ExactCase]
    warnings: list[str] = field(default_factory=list)


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
        self.tick = tick
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
                pair_lengths[t] = (a, b, self._length_expr(xy[b][0] - xy[a][0],
                                                           xy[b][1] - xy[a][1]))
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
            _map(ld, lambda x: atom(x) if isinstance(x, sympy.Basic) else x)
        # ---- stage 2: the field
        alg = Algebra(list(model.parameters.values()), model.values, atom)
        self.alg = alg
        at = {n: (alg.el(x), alg.el(y)) for n, (x, y) in xy.items()}
        mem: dict[str, ExactMember] = {}
        for mid, m in st.members.items():
            L = alg.el(lengths[mid])
            mem[mid] = ExactMember(
                L=L, c=(at[m.end][0] - at[m.start][0]) / L,
                s=(at[m.end][1] - at[m.start][1]) / L,
                **{k: (alg.el(v) if v is not None else None)
                   for k, v in model.members[mid].items()})
        pairs = {t: (at[b][0] - at[a][0], at[b][1] - at[a][1], alg.el(e))
                 for t, (a, b, e) in pair_lengths.items()}
        self.nums = ExactNumbers(alg, mem, {n: (alg.el(s), alg.el(c))
                                            for n, (s, c) in trig.items()},
                                 {k: alg.el(v) for k, v in model.springs.items()}, pairs,
                                 [_map(ld, alg.el) for ld in model.loads], tick, st.source)

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

    # ------------------------------------------------------------------ solve
    def run(self) -> ExactSolution:
        """The generic core on the exact basis: states, F, delta, every load case."""
        st, topo, nums = self.st, self.topo, self.nums
        di = topo.dof_index
        cols = [[(di[dof], v) for dof, v in col if v]
                for col in equilibrium_columns(st, nums)[5]]
        try:
            released = ExactReleased(topo, self.red, cols, nums, self.tick)
        except ZeroDivisionError:
            raise CaseError("the released structure is singular in exact arithmetic; choose "
                            "other redundants", source=st.source) from None
        B = released.states()
        F = released.flexibility(st, topo)
        delta = B.T @ (F @ B)
        solver = released.compatibility_solver(delta, released.redundant_names, st.source)
        cases = {}
        for case in st.case_names:
            self.tick()
            cs = case_state(st, topo, self.red, B, F, released, solver, case, nums)
            self.tick()
            cases[case] = self._results(case, cs, released, solver.closure)
        return ExactSolution(self.alg, delta, cases, solver.warnings)

    # ------------------------------------------------------------------ results
    def _results(self, case: str, cs: CaseState, released, closure: Closure) -> ExactCase:
        st, topo, nums, zero = self.st, self.topo, self.nums, self.alg.zero
        ci = topo.column_index

        def value_of(r):
            return cs.s[ci[r.name]] if r.name in ci else zero

        reactions = {sup.node: reaction_components(sup, value_of, nums.restraint_vector, zero)
                     for sup in st.supports.values()}
        fields, members = {}, {}
        for mid in st.members:
            self.tick()
            fields[mid] = fl = self._member_fields(mid, cs.s, cs.loading.particulars.get(mid))
            members[mid] = member_result(self.alg, closure, nums.length(mid), fl.n, fl.v, fl.m,
                                         st.source)
        out = ExactCase(case, cs.X, cs.load_terms, cs.Delta, reactions, members, {},
                        self._nodal_residual(members, cs.loading.nodal_loads, reactions,
                                             closure),
                        closure, fields, cs.nodal_displacements, cs.d, cs.loading, released)
        for t in st.displacements:
            self.tick()
            out.displacements[t] = evaluate_target(st, topo, out, t, nums=nums)
        return out

    def _member_fields(self, mid: str, s, pf: ParticularFields | None) -> ParticularFields:
        """The final fields: the basic forces' fields plus the span loads' (``pf``)."""
        z, L = self.alg.zero, self.nums.length(mid)
        fields = basic_force_fields(self.topo, self.st.members[mid], L, s, z)
        if pf is None:
            breaks, pieces = [z, L], ([(z,)], [(z,)], [(z,)])
        else:
            breaks, pieces = pf.m.breaks, (pf.n.pieces, pf.v.pieces, pf.m.pieces)
        return ParticularFields(*(Piecewise(breaks, [poly_add(p, tuple(fields.get(f, (z,))))
                                                     for p in ps])
                                  for f, ps in zip("nvm", pieces)), (), ())

    def _nodal_residual(self, members, nodal, reactions, closure: Closure) -> list:
        """Exact residuals of nodal equilibrium from the final end forces, the nodal loads
        and the reactions (the sums of :func:`leastwork.solution.end_action`)."""
        z = self.alg.zero
        sums = {n: [z, z, z] for n in self.st.nodes}
        for mid, r in members.items():
            m = self.st.members[mid]
            c, s = self.nums.direction(mid)
            for node, sign, end in ((m.start, 1, r["start"]), (m.end, -1, r["end"])):
                act = end_action(sign, end["n"], end["v"], end["m"], c, s)
                sums[node] = [a + b for a, b in zip(sums[node], act)]
        for ld in nodal:
            sums[ld.node] = [a + b for a, b in zip(sums[ld.node], (ld.fx, ld.fy, ld.mz))]
        for node, comps in reactions.items():
            sums[node] = [sums[node][i] + comps.get(d, z) for i, d in enumerate(("x", "y",
                                                                                  "rz"))]
        out = []
        for node, (x, y, r) in sums.items():
            out += [x, y] + ([r] if f"{node}.rz" in self.topo.dof_index else [])
        return [closure.close(v) for v in out]


def _map(v, fn):
    """``fn`` of every number of a load's values (names and None kept)."""
    if v is None or isinstance(v, str):
        return v
    if isinstance(v, dict):
        return {k: _map(x, fn) for k, x in v.items()}
    if isinstance(v, (list, tuple)):
        return type(v)(_map(x, fn) for x in v)
    return fn(v)
