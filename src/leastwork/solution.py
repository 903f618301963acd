"""Results of a solve: per load case, the redundants, forces, reactions, displacements and
checks; ``Solution.to_dict()`` gives the JSON result of the interface contract in the case
units."""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from .elements import kind_of
from .fields import Piecewise
from .loadkinds import load_kind
from .model import Structure, reaction_components

__all__ = ["MemberResult", "CaseResult", "Solution", "EQUILIBRIUM_RTOL", "member_result"]

#: Relative tolerance of the equilibrium check (residual / force scale).
EQUILIBRIUM_RTOL = 1e-8
#: Smallest force scale of a case (N): a case whose forces are all zero (a determinate
#: structure that is only heated, say) is checked against this instead of against zero, so
#: that round-off (of the order of 1e-10 N where EA is large) is not taken for an error.
FORCE_FLOOR = 1.0


@dataclass(frozen=True)
class MemberResult:
    """Final section forces of one member (SI): n, v, m at both ends, moment extremes,
    and the fields along it."""

    id: str
    length: float
    n: Piecewise
    v: Piecewise
    m: Piecewise
    start: tuple[float, float, float]  #: (n, v, m) at x = 0
    end: tuple[float, float, float]  #: (n, v, m) at x = L
    m_max: tuple[float, float]  #: (value, at)
    m_min: tuple[float, float]


def member_result(st: Structure, topo, mid: str, s: np.ndarray, pf) -> MemberResult:
    """Section-force fields of member ``mid`` for basic forces ``s`` (SI) plus the span-load
    fields ``pf`` (or None): the final member result, or the released structure's."""
    m = st.members[mid]
    L = st.length(mid)
    ci = topo.column_index
    kind = kind_of(m)
    fields = kind.force_fields(m, L, [s[ci[bf.name]] for bf in kind.basic_forces(m)], 0.0)
    if pf is None:
        return _unloaded_member_result(mid, L, fields)
    cn, cv, cm = pf.n.coef.copy(), pf.v.coef.copy(), pf.m.coef.copy()
    for coef, f in ((cn, "n"), (cm, "m"), (cv, "v")):
        for k, value in enumerate(fields.get(f, ())):
            coef[:, k] += value
    breaks = pf.m.breaks
    n, v, mm = Piecewise(breaks, cn), Piecewise(breaks, cv), Piecewise(breaks, cm)
    start = (float(n(0.0)), float(v(0.0)), float(mm(0.0)))
    end = (float(n(L, "left")), float(v(L, "left")), float(mm(L, "left")))
    m_max, m_min = mm.extremes()
    return MemberResult(mid, L, n, v, mm, start, end, m_max, m_min)


def _unloaded_member_result(mid: str, L: float, fields: dict) -> MemberResult:
    """:func:`member_result` of a member without span loads (constant n and v, linear m),
    without evaluating piecewise polynomials: the same numbers, faster (large structures)."""
    N = float(fields["n"][0])
    m = [*fields.get("m", ()), 0.0, 0.0]
    ms, slope = float(m[0]), float(m[1])
    shear = float(fields.get("v", [0.0])[0])
    coef = np.zeros((3, 1, 6))
    coef[0, 0, 0] = N
    coef[1, 0, 0] = shear
    coef[2, 0, 0] = ms
    coef[2, 0, 1] = slope
    breaks = np.array([0.0, L])
    n, v, mm = (Piecewise(breaks, coef[i]) for i in range(3))
    m_end = ms + slope * L  # as the polynomial evaluates it
    start, end = (N, shear, ms), (N, shear, m_end)
    tol = max(1e-12 * max(abs(ms), abs(m_end)), 1e-9)
    top, bottom = max(ms, m_end), min(ms, m_end)
    m_max = (ms, 0.0) if ms >= top - tol else (m_end, L)
    m_min = (ms, 0.0) if ms <= bottom + tol else (m_end, L)
    return MemberResult(mid, L, n, v, mm, start, end, m_max, m_min)


@dataclass
class CaseResult:
    """The answer for one load case, SI units."""

    name: str
    redundants: np.ndarray
    load_terms: np.ndarray
    imposed: np.ndarray  #: Delta: imposed displacement at each redundant
    s: np.ndarray  #: final basic forces and reactions (ncol,)
    s0: np.ndarray  #: released structure under the loads (ncol,)
    nodal_displacements: np.ndarray  #: (ndof,)
    members: dict[str, MemberResult]
    reactions: dict[str, dict[str, float]]
    equilibrium_residual: float  #: largest residual force (N) or moment (N*m)
    equilibrium_scale: float  #: force scale of the case (N), for the relative check
    loading: object = None
    deformations: np.ndarray | None = None  #: F s + e, per column (ncol,)
    released: object = None  #: the ReleasedStructure, for unit-load displacements
    displacements: dict[str, float] = field(default_factory=dict)
    stiffness: object = None  #: checks.StiffnessCheck, or None when not cross-checked
    #: amplitudes of the local self-stress states (the unknowns of the compatibility
    #: equations) when the basis is local; None when they are the redundants themselves
    amplitudes: np.ndarray | None = None

    @property
    def equilibrium_ok(self) -> bool:
        return self.equilibrium_residual <= EQUILIBRIUM_RTOL * max(self.equilibrium_scale, 1e-300)

    @classmethod
    def build(cls, st: Structure, topo, loading, X, load_terms, Delta, s, s0, nodal_disp,
              deformations, released):
        members = {mid: member_result(st, topo, mid, s, loading.particulars.get(mid))
                   for mid in st.members}
        def value_of(r) -> float:
            j = topo.column_index.get(r.name)
            return float(s[j]) if j is not None else 0.0

        reactions = {sup.node: reaction_components(sup, value_of)
                     for sup in st.supports.values()}
        resid, scale = _equilibrium(st, topo, loading, members, reactions)
        scale = max(scale, FORCE_FLOOR)
        res = cls(loading.name, X, load_terms, Delta, s, s0, nodal_disp, members, reactions,
                  resid, scale, loading, deformations=deformations, released=released)
        from .displacements import evaluate_target

        for t in st.displacements:
            res.displacements[t] = evaluate_target(st, topo, res, t)
        return res


def _equilibrium(st: Structure, topo, loading, members, reactions) -> tuple[float, float]:
    """Largest residual of nodal and overall equilibrium, recomputed from the final end
    forces, reactions and the loads as given (not from the equilibrium matrix)."""
    node_sum = {nid: np.zeros(3) for nid in st.nodes}
    scale = 0.0
    for mr in members.values():
        mem = st.members[mr.id]
        c, s = st.direction(mr.id)
        ex, ey = np.array([c, s]), np.array([-s, c])
        n0, v0, m0 = mr.start
        nL, vL, mL = mr.end
        f_start = n0 * ex - v0 * ey
        f_end = -nL * ex + vL * ey
        node_sum[mem.start] += [f_start[0], f_start[1], m0]
        node_sum[mem.end] += [f_end[0], f_end[1], -mL]
        scale = max(scale, abs(n0), abs(v0), abs(nL), abs(vL))
    for ld in loading.nodal_loads:
        node_sum[ld.node] += [ld.fx, ld.fy, ld.mz]
        scale = max(scale, abs(ld.fx), abs(ld.fy))
    for nid, rs in reactions.items():
        node_sum[nid] += [rs.get("x", 0.0), rs.get("y", 0.0), rs.get("rz", 0.0)]
        scale = max(scale, abs(rs.get("x", 0.0)), abs(rs.get("y", 0.0)))
    lengths = [st.length(m) for m in st.members]
    lref = max(lengths)
    worst = 0.0
    for nid, v in node_sum.items():
        has_rz = f"{nid}.rz" in topo.dof_index
        worst = max(worst, abs(v[0]), abs(v[1]), abs(v[2]) / lref if has_rz else 0.0)
    # overall equilibrium of the whole structure from the loads as given
    total = np.zeros(3)
    for ld in loading.loads:
        r = load_kind(ld).resultant(st, ld)
        if r is not None:
            total += r[:3]
            scale = max(scale, r[3])
    for nid, rs in reactions.items():
        nd = st.nodes[nid]
        rx, ry = rs.get("x", 0.0), rs.get("y", 0.0)
        total += [rx, ry, rs.get("rz", 0.0) + nd.x * ry - nd.y * rx]
    worst = max(worst, abs(total[0]), abs(total[1]), abs(total[2]) / lref)
    return worst, scale


@dataclass
class Solution:
    """Everything a solve found. ``to_dict()`` is the contract's JSON result."""

    structure: Structure
    topology: object
    redundant_columns: list[int]
    chosen_by_user: bool
    B: np.ndarray  #: unit-redundant states (ncol, nred)
    F: np.ndarray  #: member and spring flexibility (ncol, ncol)
    flexibility: np.ndarray  #: delta (nred, nred), SI
    cases: dict[str, CaseResult]
    warnings: tuple[str, ...] = ()
    released: object = None
    condition: float = 1.0  #: condition number of the Jacobi-scaled flexibility matrix
    display_units: object = None  #: UnitSystem to report in, if not the case's own
    flexibility_solver: object = None  #: solve.FlexibilitySolver: delta X = rhs, factorised
    #: "released": unit redundant states of one released structure (B, F, flexibility are
    #: dense); "local": local self-stress states, each closing one redundant (sparse)
    basis: str = "released"
    long_range_states: int = 0  #: local basis: states found by the global step

    @property
    def units(self):
        """The units results are reported in: ``display_units`` or the case's units."""
        return self.display_units or self.structure.units

    @property
    def redundant_names(self) -> list[str]:
        return [self.topology.columns[j].name for j in self.redundant_columns]

    @property
    def equilibrium_ok(self) -> bool:
        return all(c.equilibrium_ok for c in self.cases.values())

    @property
    def cross_check_ok(self) -> bool:
        """No load case disagrees with (or failed in) the direct-stiffness cross-check."""
        return all(c.stiffness is None or c.stiffness.ok for c in self.cases.values())

    def to_dict(self) -> dict:
        """The JSON result (contract section 4), every number in the case units."""
        from .report.jsonout import solution_to_dict

        return solution_to_dict(self)
