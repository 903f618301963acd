"""The force method on a space structure: released structure, energy terms, compatibility,
superposition, results and displacements (docs/space.md).

The stages are those of the plane path (docs/method.md), on the space model: the same
compatibility solver (:class:`leastwork.compatibility.FlexibilitySolver`), the same
flexibility product (:func:`leastwork.compatibility.flexibility_matrix`) and the same
span-load fields (:func:`leastwork.fields.particular_fields`). δ X + δ0 = Δ with
δ = Bᵀ F B, δ0 = Bᵀ(F s0 + e − c) + c_R (c: settlements at reaction columns, c_R those at
the redundants); s = s0 + B X; a displacement is s_uᵀ(F s + e − c) with s_u the released
structure's forces under a unit load there (unit-load method).
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from ..compatibility import FlexibilitySolver, flexibility_matrix
from ..errors import CaseError, MechanismError
from ..fields import Piecewise
from .members import FIELDS, SpanFields, basic_forces, flexibility_terms, span_fields, span_terms
from .model import (
    DIRECTIONS,
    SpaceDistributedLoad,
    SpaceMisfit,
    SpaceNodalLoad,
    SpacePointLoad,
    SpaceSettlement,
    SpaceStructure,
    SpaceTemperature,
)
from .topology import SpaceTopology, choose_redundants, space_topology

__all__ = ["SpaceCase", "SpaceSolution", "solve_space", "MemberResult", "solve_loads"]

#: Relative size of the overall equilibrium residual above which the check fails.
EQUILIBRIUM_TOL = 1e-8


@dataclass
class MemberResult:
    """Section-force fields of one member (piecewise in x, SI) and its length."""

    length: float
    fields: dict[str, Piecewise]

    def at(self, f: str, x: float, side: str = "right") -> float:
        return float(self.fields[f](x, side))

    def end_actions(self) -> tuple[dict[str, float], dict[str, float]]:
        L = self.length
        return ({f: self.at(f, 0.0, "right") for f in FIELDS},
                {f: self.at(f, L, "left") for f in FIELDS})


@dataclass
class SpaceCase:
    name: str
    X: np.ndarray
    load_terms: np.ndarray
    imposed: np.ndarray
    s0: np.ndarray
    s: np.ndarray
    p: np.ndarray
    members: dict[str, MemberResult]
    reactions: dict[str, dict[str, float]]
    displacements: dict[str, float]
    equilibrium_residual: float
    load_term_parts: dict[str, np.ndarray] = field(default_factory=dict)
    #: F s + e - c: the deformation conjugate to each column (unit-load method)
    strain: np.ndarray | None = None


@dataclass
class SpaceSolution:
    structure: SpaceStructure
    topology: SpaceTopology
    redundants: list[int]
    B: np.ndarray
    keep: list[int]
    delta: np.ndarray
    delta_parts: dict[str, np.ndarray]
    member_terms: dict[str, dict[str, np.ndarray]]  #: member -> term -> block
    cases: dict[str, SpaceCase]
    warnings: list[str]
    condition: float
    stiffness_check: object = None
    #: the factorised released structure, F by term and the compatibility solver, kept
    #: for further load cases (influence lines)
    work: dict = field(default_factory=dict)

    def to_dict(self, cases=None) -> dict:
        """The JSON result (contract sections 4 and 5.5) as a dictionary."""
        from .report import space_dict

        return space_dict(self, cases)

    def __repr__(self) -> str:
        st = self.structure
        ok = "agrees" if self.cross_check_ok else "DISAGREES"
        return (f"<SpaceSolution {st.name!r}: {len(st.nodes)} joints, {len(st.members)} "
                f"members, degree {self.topology.degree}, redundants "
                f"{', '.join(self.redundant_names[:8]) or 'none'}"
                f"{' ...' if len(self.redundants) > 8 else ''}; load cases "
                f"{', '.join(list(self.cases)[:6])}; stiffness cross-check {ok}>")

    @property
    def redundant_names(self) -> list[str]:
        return [self.topology.columns[i].name for i in self.redundants]

    @property
    def equilibrium_ok(self) -> bool:
        return all(c.equilibrium_residual <= EQUILIBRIUM_TOL for c in self.cases.values())

    @property
    def cross_check_ok(self) -> bool:
        return self.stiffness_check is None or self.stiffness_check.ok



def _sla():
    """scipy's linear algebra, imported on first use (a plane case reads this package's
    reader only and must not pay for it)."""
    import scipy.linalg

    return scipy.linalg

def _member_columns(topo: SpaceTopology, mid: str) -> list[int]:
    return [i for i, c in enumerate(topo.columns) if c.owner == mid and c.role != "reaction"]


def solve_space(st: SpaceStructure, redundants=None, where: str | None = None,
                verify: bool = True) -> SpaceSolution:
    """Solve every load case of ``st`` by least work; ``redundants`` overrides the case's
    choice; ``verify`` runs the independent stiffness cross-check."""
    names = redundants if redundants is not None else st.redundants
    where = where or "[analysis] redundants"
    topo = space_topology(st, names)
    red = choose_redundants(st, topo, names, where)
    ncol = len(topo.columns)
    keep = [j for j in range(ncol) if j not in red]
    A0 = topo.A[:, keep]
    lu = _sla().lu_factor(A0) if A0.size else None
    B = np.zeros((ncol, len(red)))
    for k, r in enumerate(red):
        B[r, k] = 1.0
        if lu is not None:
            B[keep, k] = -_sla().lu_solve(lu, topo.A[:, r])
    # flexibility, term by term
    parts: dict[str, np.ndarray] = {}
    member_terms: dict[str, dict[str, np.ndarray]] = {}
    for m in st.members.values():
        cols = _member_columns(topo, m.id)
        terms = flexibility_terms(m, st.length(m.id), st.shear)
        member_terms[m.id] = terms
        for term, block in terms.items():
            F = parts.setdefault(term, np.zeros((ncol, ncol)))
            F[np.ix_(cols, cols)] += block
    for j, c in enumerate(topo.columns):
        if c.role == "reaction" and topo.restraints[c.restraint].is_spring:
            parts.setdefault("springs", np.zeros((ncol, ncol)))[j, j] = (
                1.0 / topo.restraints[c.restraint].stiffness)
    F = sum(parts.values()) if parts else np.zeros((ncol, ncol))
    delta = flexibility_matrix(B, F)
    delta_parts = {t: B.T @ Ft @ B for t, Ft in parts.items()}
    solver = FlexibilitySolver(delta, [topo.columns[i].name for i in red], st.source)
    cases = {name: _case(st, topo, name, lu, keep, red, B, F, parts, solver)
             for name in st.case_names}
    sol = SpaceSolution(st, topo, red, B, keep, delta, delta_parts, member_terms, cases,
                        list(solver.warnings), solver.cond,
                        work={"lu": lu, "F": F, "parts": parts, "solver": solver})
    if verify:
        from .stiffness import cross_check

        sol.stiffness_check = cross_check(sol)
    return sol


def _loads_of(st: SpaceStructure, case: str):
    return [ld for ld in st.loads if ld.case == case]


def _case(st, topo, name, lu, keep, red, B, F, parts, solver) -> SpaceCase:
    ncol, ndof = len(topo.columns), len(topo.dofs)
    loads = _loads_of(st, name)
    p = np.zeros(ndof)
    for ld in loads:
        if isinstance(ld, SpaceNodalLoad):
            for d, v in zip(DIRECTIONS, ld.values, strict=True):
                if v == 0.0:
                    continue
                key = f"{ld.node}.{d}"
                if key not in topo.dof_index:
                    raise MechanismError(f"{st.source}: a moment {d[1]} acts at node {ld.node}, "
                                         "where no member end resists rotation (a mechanism)",
                                         [key])
                p[topo.dof_index[key]] += v
    spans = _spans(st, loads)
    for mid, sf in spans.items():
        m = st.members[mid]
        for node, f in ((m.start, sf.start_force), (m.end, sf.end_force)):
            for d, v in zip("xyz", f, strict=True):
                p[topo.dof_index[f"{node}.{d}"]] += v
    # initial deformations e (per term) and settlements c
    e_parts: dict[str, np.ndarray] = {}
    for mid, sf in spans.items():
        cols = _member_columns(topo, mid)
        for term, vec in span_terms(st.members[mid], st.length(mid), st.shear, sf).items():
            e_parts.setdefault(term, np.zeros(ncol))[cols] += vec
    for ld in loads:
        if isinstance(ld, SpaceMisfit | SpaceTemperature):
            m = st.members[ld.member]
            # an axially rigid beam takes the imposed strain too (it has no flexibility:
            # the compatibility solver says so if the strain cannot be accommodated)
            j = topo.column_index[m.id if not m.is_beam else f"{m.id}.n"]
            value = (ld.elongation if isinstance(ld, SpaceMisfit)
                     else m.alpha * ld.uniform * st.length(m.id))
            key = "misfit" if isinstance(ld, SpaceMisfit) else "temperature"
            e_parts.setdefault(key, np.zeros(ncol))[j] += value
    c = np.zeros(ncol)
    for ld in loads:
        if isinstance(ld, SpaceSettlement):
            for d, v in ld.values:
                key = f"{ld.node}.{d}"
                if key not in topo.column_index:
                    raise CaseError(f'support "{ld.node}" direction {d} is not a reaction of '
                                    "this structure (no member end resists that rotation)",
                                    source=st.source, where="[[loads]] settlement")
                c[topo.column_index[key]] += v
    e = sum(e_parts.values()) if e_parts else np.zeros(ncol)
    s0 = np.zeros(ncol)
    if lu is not None:
        s0[keep] = -_sla().lu_solve(lu, p)
    imposed = c[red]
    load_terms = B.T @ (F @ s0 + e - c) + imposed
    term_parts = {t: B.T @ (Ft @ s0) for t, Ft in parts.items()}
    term_parts.update({t: B.T @ v for t, v in e_parts.items()})
    if c.any():
        term_parts["settlements"] = -(B.T @ c) + imposed
    X = solver.solve(imposed - load_terms) if len(red) else np.zeros(0)
    s = s0 + B @ X
    members = {mid: _member_result(st, topo, mid, s, spans.get(mid)) for mid in st.members}
    reactions: dict[str, dict[str, float]] = {}
    for j, col in enumerate(topo.columns):
        if col.role == "reaction":
            r = topo.restraints[col.restraint]
            reactions.setdefault(r.node, {})[r.direction] = float(s[j])
    strain = F @ s + e - c
    disp = {}
    for target in st.displacements:
        disp[target] = _displacement(st, topo, lu, keep, target, strain)
    return SpaceCase(name, X, load_terms, imposed, s0, s, p, members, reactions, disp,
                     _overall_residual(st, loads, reactions), term_parts, strain)


def _spans(st: SpaceStructure, loads) -> dict[str, SpanFields]:
    points: dict[str, list] = {}
    dists: dict[str, list] = {}
    for ld in loads:
        if isinstance(ld, SpacePointLoad):
            points.setdefault(ld.member, []).append((ld.at, ld.force))
        elif isinstance(ld, SpaceDistributedLoad):
            dists.setdefault(ld.member, []).append((ld.start, ld.end, ld.w0, ld.w1))
    return {mid: span_fields(st.length(mid), st.axes(mid), points.get(mid, []),
                             dists.get(mid, []))
            for mid in {*points, *dists}}


def _member_result(st, topo, mid, s, span: SpanFields | None) -> MemberResult:
    """Fields of member ``mid``: its particular fields plus its basic forces' unit fields."""
    from .members import unit_fields

    L = st.length(mid)
    m = st.members[mid]
    lin = {f: np.zeros(2) for f in FIELDS}  # c0 + c1 x
    for name, role in basic_forces(m):
        v = s[topo.column_index[_col_name(topo, name)]]
        for f, poly in unit_fields(role, L).items():
            coef = np.zeros(2)
            coef[: len(poly)] = poly
            coef[1] /= L
            lin[f] += v * coef
    fields = {}
    for f in FIELDS:
        base = span.fields[f] if span is not None else Piecewise.zero(L)
        coef = base.coef.copy()
        coef[:, :2] += lin[f]
        fields[f] = Piecewise(base.breaks, coef)
    return MemberResult(L, fields)


def _col_name(topo, name: str) -> str:
    if name in topo.column_index:
        return name
    stem = name[: -len(".start.t")]
    for alias in (".end.t", ".t"):
        if stem + alias in topo.column_index:
            return stem + alias
    raise KeyError(name)


def _displacement(st, topo, lu, keep, target: str, strain: np.ndarray) -> float:
    """Displacement at ``NODE.DIR`` by a unit load there on the released structure."""
    if target not in topo.dof_index:
        node = target.split(".")[0]
        if node in st.nodes and target.endswith((".rx", ".ry", ".rz")):
            raise CaseError(f'"{target}": node "{node}" has no rotation of its own (only bars '
                            "or released beam ends meet there)", source=st.source,
                            where="[analysis] displacements")
        raise CaseError(f'"{target}" is not a displacement of this structure; expected '
                        "NODE.x|y|z|rx|ry|rz", source=st.source, where="[analysis] displacements")
    unit = np.zeros(len(topo.dofs))
    unit[topo.dof_index[target]] = 1.0
    su = np.zeros(len(topo.columns))
    if lu is not None:
        su[keep] = -_sla().lu_solve(lu, unit)
    return float(su @ strain)


def _overall_residual(st: SpaceStructure, loads, reactions) -> float:
    """Resultant force and moment (about the nodes' centroid) of the loads and reactions,
    over the largest term: the check of overall equilibrium, independent of the matrix."""
    centre = np.mean([n.xyz for n in st.nodes.values()], axis=0)
    force, moment, size = np.zeros(3), np.zeros(3), 0.0
    Lm = float(np.mean([st.length(m) for m in st.members]))

    def add(f, mo, at):
        nonlocal force, moment, size
        arm = np.asarray(at) - centre
        total = np.cross(arm, f) + mo
        force = force + f
        moment = moment + total
        size = max(size, float(np.max(np.abs(f))), float(np.max(np.abs(total))) / Lm)

    for nid, comps in reactions.items():
        vec = np.array([comps.get(d, 0.0) for d in DIRECTIONS])
        add(vec[:3], vec[3:], st.nodes[nid].xyz)
    g = np.polynomial.legendre.leggauss(3)
    for ld in loads:
        if isinstance(ld, SpaceNodalLoad):
            add(np.array(ld.values[:3]), np.array(ld.values[3:]), st.nodes[ld.node].xyz)
        elif isinstance(ld, SpacePointLoad | SpaceDistributedLoad):
            m = st.members[ld.member]
            a, ex = st.nodes[m.start].xyz, st.axes(m.id)[0]
            if isinstance(ld, SpacePointLoad):
                add(np.array(ld.force), np.zeros(3), a + ld.at * ex)
                continue
            half = 0.5 * (ld.end - ld.start)
            for xi, w in zip(*g, strict=True):
                x = ld.start + half * (xi + 1)
                t = (x - ld.start) / (2 * half)
                q = (1 - t) * np.array(ld.w0) + t * np.array(ld.w1)
                add(w * half * q, np.zeros(3), a + x * ex)
    res = max(float(np.max(np.abs(force))), float(np.max(np.abs(moment))) / Lm)
    return res / max(size, 1e-300) if size > 0 else res


def solve_loads(sol: SpaceSolution, loads: tuple, name: str = "extra") -> SpaceCase:
    """One more load case (``loads``, each in case ``name``) on the factorised structure of
    ``sol``: no new topology, released structure or flexibility."""
    import dataclasses

    st = dataclasses.replace(sol.structure, loads=loads, case_order=(name,), displacements=())
    w = sol.work
    return _case(st, sol.topology, name, w["lu"], sol.keep, sol.redundants, sol.B, w["F"],
                 w["parts"], w["solver"])
