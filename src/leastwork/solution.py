"""Results of a solve: per load case, the redundants, forces, reactions, displacements and
checks; ``Solution.to_dict()`` gives the JSON result of the interface contract in the case
units."""

from __future__ import annotations

from dataclasses import dataclass, field
from functools import cached_property

import numpy as np

from .elements import column_of, kind_of
from .fields import Piecewise
from .loadkinds import load_kind
from .model import Structure, reaction_components
from .thresholds import (
    EQUILIBRIUM_ROUND_OFF,
    EXTREME_TIE,
    EXTREME_TIE_FLOOR,
    FORCE_FLOOR,
    LOCAL_STATE_ACCURACY,
)

__all__ = ["MemberResult", "CaseResult", "Solution", "EquilibriumCheck", "member_result",
           "basic_force_fields", "end_action"]

#: Machine epsilon of double precision (the unit round-off is half of it).
EPS = float(np.finfo(float).eps)


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
    L = st.length(mid)
    kind = kind_of(st.members[mid])
    if hasattr(kind, "result_fields"):  # fields that are not polynomials (a curved member)
        ci = topo.column_index
        values = [s[ci[bf.name]] for bf in kind.basic_forces(st.members[mid])]
        n, v, mm = kind.result_fields(st.members[mid], L, values, pf)
        start = (float(n(0.0)), float(v(0.0)), float(mm(0.0)))
        end = (float(n(L, "left")), float(v(L, "left")), float(mm(L, "left")))
        m_max, m_min = mm.extremes()
        return MemberResult(mid, L, n, v, mm, start, end, m_max, m_min)
    fields = basic_force_fields(topo, st.members[mid], L, s, 0.0)
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


def basic_force_fields(topo, m, L, s, zero) -> dict:
    """Section-force fields (coefficients in x, from the start) of member ``m`` of length
    ``L`` for the basic forces ``s`` (ncol, any number type; ``zero`` its zero), as its
    kind gives them."""
    kind = kind_of(m)
    ci = topo.column_index
    return kind.force_fields(m, L, [s[ci[bf.name]] for bf in kind.basic_forces(m)], zero)


def end_action(sign, n, v, m, c, s) -> tuple:
    """Force (global x, y) and moment that a member end with section forces n, v, m
    applies to its joint: ``sign`` +1 at the start (n ex - v ey, with ex = (c, s),
    ey = (-s, c); +m), -1 at the end. Numbers or arrays of any number type."""
    return sign * (n * c + v * s), sign * (n * s - v * c), sign * m


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
    tol = max(EXTREME_TIE * max(abs(ms), abs(m_end)), EXTREME_TIE_FLOOR)
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
    #: residual of the governing equation of the equilibrium check (N; a moment divided by
    #: a length, see :class:`EquilibriumCheck`)
    equilibrium_residual: float
    equilibrium_scale: float  #: force scale of the case (N): its largest force, at least 1 N
    loading: object = None
    deformations: np.ndarray | None = None  #: F s + e, per column (ncol,)
    released: object = None  #: the ReleasedStructure, for unit-load displacements
    displacements: dict[str, float] = field(default_factory=dict)
    stiffness: object = None  #: checks.StiffnessCheck, or None when not cross-checked
    #: amplitudes of the local self-stress states (the unknowns of the compatibility
    #: equations) when the basis is local; None when they are the redundants themselves
    amplitudes: np.ndarray | None = None
    equilibrium_tolerance: float = 0.0  #: accepted residual of the governing equation (N)
    equilibrium_where: str = ""  #: the governing equation, e.g. "node C, y"

    @property
    def equilibrium_ok(self) -> bool:
        """The governing equation, and so every equation, is within its tolerance (False
        for a residual that is not a number)."""
        return bool(self.equilibrium_residual <= self.equilibrium_tolerance)

    def member_fields(self, mid: str) -> MemberResult:
        """The final section-force fields (n, v, m) of member ``mid``."""
        return self.members[mid]

    @staticmethod
    def term_sizes(s0: np.ndarray, size_B, X: np.ndarray, local: bool) -> np.ndarray:
        """(2, ncol): the size of the terms each basic force of s = s0 + B X is summed from
        (``size_B`` = |B|, dense or sparse). Row 0, terms that carry round-off: |s0|, and
        |B| |X| for unit-redundant states (back-substitutions, exact to round-off). Row 1,
        local self-stress states, self-stresses only to ``LOCAL_STATE_ACCURACY`` of their
        largest term (selfstress.py): at every member a state reaches, the size of that
        largest term, max|B_i| |X_i|."""
        if not local:
            return np.vstack([np.abs(s0) + size_B @ np.abs(X), np.zeros_like(s0)])
        if hasattr(size_B, "tocsc"):  # sparse
            top = size_B.max(axis=0).toarray().ravel()
            reach = size_B.tocsc(copy=True)
            reach.data = np.ones_like(reach.data)
        else:
            top = np.max(size_B, axis=0, initial=0.0)
            reach = (size_B != 0).astype(float)
        return np.vstack([np.abs(s0), reach @ (top * np.abs(X))])

    @classmethod
    def build(cls, st: Structure, topo, loading, X, load_terms, Delta, s, s0, nodal_disp,
              deformations, released, formed: np.ndarray | None = None):
        """The result of a load case from its basic forces ``s`` = ``s0`` + B X; ``formed``
        (2, ncol): the size of the terms each basic force was summed from
        (:meth:`term_sizes`; default |s0| + |s - s0|, all carrying round-off), for the
        allowance of the equilibrium check."""
        members = {mid: member_result(st, topo, mid, s, loading.particulars.get(mid))
                   for mid in st.members}

        def value_of(r) -> float:
            j = topo.column_index.get(r.name)
            return float(s[j]) if j is not None else 0.0

        reactions = {sup.node: reaction_components(sup, value_of)
                     for sup in st.supports.values()}
        if formed is None:
            formed = np.vstack([np.abs(s0) + np.abs(s - s0), np.zeros_like(s)])
        check = _equilibrium(st, topo, loading, members, reactions, formed)
        res = cls(loading.name, X, load_terms, Delta, s, s0, nodal_disp, members, reactions,
                  check.residual, check.scale, loading, deformations=deformations,
                  released=released, equilibrium_tolerance=check.tolerance,
                  equilibrium_where=check.where)
        from .displacements import evaluate_target

        for t in st.displacements:
            res.displacements[t] = evaluate_target(st, topo, res, t)
        return res


@dataclass(frozen=True)
class EquilibriumCheck:
    """The equilibrium check of one load case (SI), recomputed from the final end forces,
    the reactions and the loads as given (not from the equilibrium matrix).

    Every equation is judged against its own tolerance, ``EQUILIBRIUM_ROUND_OFF * EPS``
    times the sum of the absolute values of its terms: x and y of every joint and the
    moment of every rigid joint; x, y and the moment about the centroid of the joints for
    the whole structure (each load and reaction with its own lever arm from the centroid,
    and each joint's terms with the joint's, since the whole structure is the sum of its
    joints). The governing equation is the one with the largest ratio of residual to
    tolerance. A moment is given as a force: divided by the longest member at a joint, by
    the largest distance of a joint from the centroid for the whole structure.
    """

    residual: float  #: |sum| of the governing equation (N)
    tolerance: float  #: its accepted residual (N)
    where: str  #: the governing equation, e.g. "node C, y" or "whole structure, x"
    scale: float  #: largest force of the case (N), at least FORCE_FLOOR

    @property
    def ok(self) -> bool:
        """Every equation within its tolerance (False when a residual is not a number)."""
        return bool(self.residual <= self.tolerance)


@dataclass
class _Sums:
    """Running sums of one direction's equation at every joint: the signed sum, the sizes
    of its terms that carry round-off, and the sizes of its terms made of local self-stress
    states (which carry the states' own accuracy)."""

    value: np.ndarray
    size: np.ndarray
    states: np.ndarray

    @classmethod
    def zeros(cls, n: int) -> _Sums:
        return cls(np.zeros(n), np.zeros(n), np.zeros(n))

    def add(self, at, value, size, states=0.0) -> None:
        np.add.at(self.value, at, value)
        np.add.at(self.size, at, size)
        np.add.at(self.states, at, states)


def _end_sizes(st: Structure, topo, members,
               formed: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """(nmember, 6) twice: the size of the terms of each end force (n, v, m at the start, at
    the end) that carry round-off, and of those made of local states. The first: the
    polynomial sum that evaluates it (sum of |coefficient| x^j: the constant term at the
    start, x = L at the end) plus ``formed[0]`` of its basic forces; the second ``formed[1]``
    of its basic forces (v = (m_end - m_start)/L takes both moments')."""
    ci = topo.column_index
    nm = len(members)
    cols = np.full((nm, 3), -1, dtype=int)  # axial, start moment, end moment columns
    length = np.empty(nm)
    first = np.empty((nm, 3))
    last: list[np.ndarray] = []
    for k, (mid, mr) in enumerate(members.items()):
        m = st.members[mid]
        cols[k] = tuple(ci.get(column_of(m, role), -1) for role in ("axial", "start_m", "end_m"))
        length[k] = mr.length
        first[k] = mr.n.coef[0, 0], mr.v.coef[0, 0], mr.m.coef[0, 0]
        last.extend((mr.n.coef[-1], mr.v.coef[-1], mr.m.coef[-1]))
    width = max(len(c) for c in last)
    coef = np.zeros((3 * nm, width))  # ascending powers of x, padded with zeros
    for i, c in enumerate(last):
        coef[i, :len(c)] = c
    powers = np.repeat(length, 3)[:, None] ** np.arange(width)
    at_end = np.sum(np.abs(coef) * powers, axis=1).reshape(nm, 3)
    polynomial = np.hstack([np.abs(first), at_end])
    out = []
    for row in formed:
        f = np.append(row, 0.0)[cols]  # column -1: none, size 0
        sv = (f[:, 1] + f[:, 2]) / length
        out.append(np.column_stack([f[:, 0], sv, f[:, 1], f[:, 0], sv, f[:, 2]]))
    return polynomial + out[0], out[1]


def _reactions(st: Structure, topo, reactions, formed: np.ndarray):
    """Supported nodes, their reactions (n, 3: x, y, rz) and the sizes of the reactions'
    terms that carry round-off and that are made of local states (``formed``, 2 x ncol, of
    the reaction columns; an inclined roller's normal force by the size of its x, y parts)."""
    nodes = list(reactions)
    value = np.array([[reactions[n].get(d, 0.0) for d in ("x", "y", "rz")] for n in nodes])
    sizes = np.zeros((2, len(nodes), 3))
    for k, nid in enumerate(nodes):
        for r in st.supports[nid].restraints:
            j = topo.column_index.get(r.name)
            if j is None:
                continue
            if r.direction == "n":
                sizes[:, k, :2] += formed[:, j, None] * np.abs(r.vector[:2])
            else:
                sizes[:, k, ("x", "y", "rz").index(r.direction)] += formed[:, j]
    sizes[0] += np.abs(value)
    return nodes, value.reshape(-1, 3), sizes.reshape(2, -1, 3)


def _equilibrium(st: Structure, topo, loading, members, reactions,
                 formed: np.ndarray) -> EquilibriumCheck:
    """The equilibrium check of a load case (see :class:`EquilibriumCheck`). ``formed``
    (2, ncol): the size of the terms each basic force and reaction was summed from, those
    carrying round-off and those of local self-stress states (see
    :meth:`CaseResult.term_sizes`)."""
    ids = list(st.nodes)
    index = {nid: k for k, nid in enumerate(ids)}
    nn = len(ids)
    fx, fy, mz = _Sums.zeros(nn), _Sums.zeros(nn), _Sums.zeros(nn)
    scale, lref = 0.0, 1.0
    # member end forces on the joints: start n ex - v ey, end -n ex + v ey (ex = (c, s),
    # ey = (-s, c)); end moments +m at the start, -m at the end
    if members:
        mids = list(members)
        cs = np.array([(*st.tangent(m, 0.0), *st.tangent(m, members[m].length))
                       if st.members[m].curve is not None else 2 * st.direction(m)
                       for m in mids])
        c, s = cs[:, 0], cs[:, 1]
        ac, as_ = np.abs(c), np.abs(s)
        start = np.array([index[st.members[m].start] for m in mids])
        end = np.array([index[st.members[m].end] for m in mids])
        ends = np.array([(*members[m].start, *members[m].end) for m in mids])
        n0, v0, m0, nL, vL, mL = ends.T
        size, states = _end_sizes(st, topo, members, formed)
        for at, sign, (n, v, m), (zn, zv, zm), (wn, wv, wm), (c, s) in (
                (start, 1.0, (n0, v0, m0), size[:, :3].T, states[:, :3].T, cs.T[:2]),
                (end, -1.0, (nL, vL, mL), size[:, 3:].T, states[:, 3:].T, cs.T[2:])):
            ac, as_ = np.abs(c), np.abs(s)
            ax, ay, am = end_action(sign, n, v, m, c, s)
            fx.add(at, ax, zn * ac + zv * as_, wn * ac + wv * as_)
            fy.add(at, ay, zn * as_ + zv * ac, wn * as_ + wv * ac)
            mz.add(at, am, zm, wm)
        scale = float(np.max(np.abs(ends[:, [0, 1, 3, 4]]), initial=0.0))
        lref = float(max(mr.length for mr in members.values()))
    if loading.nodal_loads:
        at = np.array([index[ld.node] for ld in loading.nodal_loads])
        f = np.array([(ld.fx, ld.fy, ld.mz) for ld in loading.nodal_loads])
        for sums, i in ((fx, 0), (fy, 1), (mz, 2)):
            sums.add(at, f[:, i], np.abs(f[:, i]))
        scale = max(scale, float(np.max(np.abs(f[:, :2]))))
    if reactions:
        nodes, r, (size_r, states_r) = _reactions(st, topo, reactions, formed)
        at = np.array([index[nid] for nid in nodes])
        for sums, i in ((fx, 0), (fy, 1), (mz, 2)):
            sums.add(at, r[:, i], size_r[:, i], states_r[:, i])
        scale = max(scale, float(np.max(np.abs(r[:, :2]))))
    rigid = np.array([f"{nid}.rz" in topo.dof_index for nid in ids], dtype=bool)
    return _worst_equation(st, loading, reactions, ids, rigid, (fx, fy, mz), scale, lref)


def _worst_equation(st: Structure, loading, reactions, ids: list[str], rigid: np.ndarray,
                    sums: tuple, scale: float, lref: float) -> EquilibriumCheck:
    """Each joint's and the whole structure's residual against its round-off allowance;
    the :class:`EquilibriumCheck` of the equation with the largest ratio. ``sums``: the
    (fx, fy, mz) :class:`_Sums` of the joints; ``rigid``: joints that take a moment."""
    fx, fy, mz = sums
    nn = len(ids)
    # the solve is backward stable in norm, not joint by joint: each joint may keep the
    # round-off of the largest joint's terms (moments: times the longest member) besides
    # that of its own
    largest = max(float(np.max(fx.size, initial=0.0)), float(np.max(fy.size, initial=0.0)),
                  float(np.max(mz.size[rigid], initial=0.0)) / lref)
    fx.size += largest
    fy.size += largest
    mz.size[rigid] += largest * lref
    # every joint's allowance: round-off of its terms, and the states' accuracy
    allow = [EQUILIBRIUM_ROUND_OFF * EPS * q.size + LOCAL_STATE_ACCURACY * q.states
             for q in (fx, fy, mz)]
    # the whole structure: forces and moments about the centroid of the joints (lever arms
    # from the centroid, so that coordinates far from the origin add no round-off); it is
    # the sum of its joints, so it takes their allowances (moments with each joint's lever
    # arm), and the round-off of the span loads' own terms
    xy = np.array([(st.nodes[nid].x, st.nodes[nid].y) for nid in ids])
    centre = xy.mean(axis=0)
    arm = xy - centre
    radius = float(np.max(np.hypot(arm[:, 0], arm[:, 1]), initial=0.0)) or lref
    total, span_size, scale = _whole_structure(st, loading, reactions, centre, scale)
    whole = EQUILIBRIUM_ROUND_OFF * EPS * span_size + [
        float(np.sum(allow[0])), float(np.sum(allow[1])),
        float(np.sum(allow[2] + np.abs(arm[:, 0]) * allow[1] + np.abs(arm[:, 1]) * allow[0]))]
    # every equation: |sum|, its allowance, the length that makes it a force, its name
    nr = int(rigid.sum())
    residual = np.abs(np.concatenate([fx.value, fy.value, mz.value[rigid], total]))
    tolerance = np.concatenate([allow[0], allow[1], allow[2][rigid], whole])
    lengths = np.concatenate([np.ones(2 * nn), np.full(nr, lref),
                              [1.0, 1.0, radius]])
    with np.errstate(divide="ignore", invalid="ignore"):
        ratio = np.where(residual == 0.0, 0.0, residual / tolerance)
    k = int(np.argmax(np.nan_to_num(ratio, nan=np.inf)))
    if k < 2 * nn:
        where = f"node {ids[k % nn]}, {'xy'[k // nn]}"
    elif k < 2 * nn + nr:
        where = f"node {np.array(ids, dtype=object)[rigid][k - 2 * nn]}, moment"
    else:
        where = ("whole structure, x", "whole structure, y",
                 "whole structure, moment about the centroid")[k - 2 * nn - nr]
    return EquilibriumCheck(float(residual[k] / lengths[k]), float(tolerance[k] / lengths[k]),
                            where, max(scale, FORCE_FLOOR))


def _whole_structure(st: Structure, loading, reactions, centre: np.ndarray,
                     scale: float) -> tuple[np.ndarray, np.ndarray, float]:
    """Sums of x, y and of the moment about ``centre`` of the loads as given and the
    reactions, with the sums of the absolute values of the span loads' terms (the nodal
    loads' and reactions' are among the joints'), and the force scale raised by the span
    loads."""
    total = np.zeros(3)
    size = np.zeros(3)
    cx, cy = centre
    for ld in loading.loads:
        r = load_kind(ld).resultant(st, ld, centre)
        if r is not None:
            total += r[0]
            size += r[1]
            scale = max(scale, r[2])
    for nid, rs in reactions.items():
        nd = st.nodes[nid]
        rx, ry = rs.get("x", 0.0), rs.get("y", 0.0)
        total += [rx, ry, rs.get("rz", 0.0) + (nd.x - cx) * ry - (nd.y - cy) * rx]
    return total, size, scale


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
    #: load case -> :class:`leastwork.one_way.CaseState` when the structure has one-way
    #: members or supports (empty otherwise)
    states: dict = field(default_factory=dict)

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

    @cached_property
    def flexibility_terms(self) -> tuple:
        """The energy terms summed into ``F``, member by member and term by term
        (:func:`leastwork.energy.flexibility_terms`, SI), found once on first use."""
        from .energy import flexibility_terms

        return tuple(flexibility_terms(self.structure, self.topology))

    @cached_property
    def deformation_terms(self) -> dict[str, tuple]:
        """Per load case, the initial deformations summed into ``e``, member by member and
        effect by effect (:func:`leastwork.energy.initial_deformation_terms`, SI), found
        once on first use from the loading the solve used."""
        from .energy import initial_deformation_terms

        return {name: tuple(initial_deformation_terms(self.structure, self.topology,
                                                      res.loading.particulars,
                                                      res.loading.imposed))
                for name, res in self.cases.items()}

    @cached_property
    def combination_envelope(self) -> dict | None:
        """Extremes over the load combinations (:func:`leastwork.studies.envelope.envelope`, SI),
        found once on first use; None without combinations."""
        from .studies.envelope import combination_envelope

        return combination_envelope(self)

    @cached_property
    def group_envelopes(self) -> dict[str, dict]:
        """The envelope of each ``[envelopes]`` group (SI), found once on first use."""
        from .studies.envelope import group_envelopes

        return group_envelopes(self)

    def to_dict(self) -> dict:
        """The JSON result (contract section 4), every number in the case units."""
        from .output.json_result import solution_to_dict

        return solution_to_dict(self)

    # ------------------------------------------------------------------ from Python
    # Each method below hands the solution to the output layer (imported when called).

    def __repr__(self) -> str:
        from .output.notebook import short_repr

        return short_repr(self)

    def _repr_html_(self) -> str:
        from .output.notebook import html_repr

        return html_repr(self)

    def to_frames(self, case: str | None = None) -> dict:
        """pandas DataFrames of a load case in the output units.

        Parameters
        ----------
        case : str, optional
            The load case; default the only one, or every case with the case name as the
            first level of each index.

        Returns
        -------
        dict
            ``"reactions"`` (index: node; columns: directions), ``"members"`` (index:
            member; columns ``start.n`` ... ``end.m``, ``m_max``, ``m_max.at`` ...),
            ``"displacements"``, ``"redundants"``. Needs pandas
            (``pip install leastwork[frames]``).

        Examples
        --------
        >>> import leastwork
        >>> sol = leastwork.solve(leastwork.structure(
        ...     nodes={"A": [0, 0], "B": [5, 0]},
        ...     beams={"AB": {"nodes": ["A", "B"], "EI": "9000 kN*m^2"}},
        ...     supports={"A": "fixed", "B": "roller"},
        ...     loads=[{"member": "AB", "wy": "-8 kN/m"}]))
        >>> frames = sol.to_frames()
        >>> round(float(frames["reactions"].loc["B", "y"]), 9)  # 3wL/8
        15.0
        >>> round(float(frames["members"].loc["AB", "start.m"]), 9)  # -wL^2/8
        -25.0
        """
        from .output.frames import solution_frames

        return solution_frames(self, case)

    def reaction(self, node: str, direction: str, case: str | None = None) -> float:
        """Reaction ``direction`` ("x", "y", "rz", "n") at ``node``, output units.

        Examples
        --------
        >>> import leastwork
        >>> sol = leastwork.solve(leastwork.structure(
        ...     nodes={"A": [0, 0], "B": [5, 0]},
        ...     beams={"AB": {"nodes": ["A", "B"], "EI": "9000 kN*m^2"}},
        ...     supports={"A": "fixed", "B": "roller"},
        ...     loads=[{"member": "AB", "wy": "-8 kN/m"}]))
        >>> round(sol.reaction("A", "rz"), 9)  # wL^2/8, counter-clockwise
        25.0
        >>> round(sol.section_force("AB", "m", 3.125), 6)  # largest sagging, 9wL^2/128
        14.0625
        >>> round(sol.displacement("B.rz") * 9000 / (8 * 5**3), 6)  # wL^3/48EI
        0.020833
        """
        from .output.accessors import reaction

        return reaction(self, node, direction, case)

    def section_force(self, member: str, quantity: str, at: float,
                      case: str | None = None) -> float:
        """Section force ``quantity`` ("n", "v", "m") of ``member`` at ``at`` (case length
        unit from its start node), output units."""
        from .output.accessors import section_force

        return section_force(self, member, quantity, at, case)

    def displacement(self, target: str, case: str | None = None) -> float:
        """Displacement ``target`` (``B.y``, ``AB@2.5.y``, ``A-C``...), output units."""
        from .output.accessors import displacement

        return displacement(self, target, case)

    def plot(self, case: str | None = None, diagrams=("structure", "n", "v", "m",
                                                        "deflected")):
        """The diagrams of a load case (default: the only or first one) as a matplotlib
        Figure."""
        from .output.plot import parse_diagrams
        from .output.plot.figure import figure

        name = case if case is not None else next(iter(self.cases))
        return figure(self, [name], parse_diagrams(diagrams))

    def report(self, path, case: str | None = None, *, force: bool = False) -> None:
        """Write the calculation sheet to ``path``: HTML (``.html``) or Markdown (``.md``,
        with its images beside it). An existing file is replaced only with ``force``."""
        from .output.sheet_files import write_report

        write_report(self, path, None if case is None else [case], force=force)

    def steps(self, case: str | None = None) -> str:
        """The whole audit trail as Markdown text."""
        from .output.sheet_files import steps_markdown

        return steps_markdown(self, None if case is None else [case])
