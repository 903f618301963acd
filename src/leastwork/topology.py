"""Degrees of freedom, the equilibrium matrix, indeterminacy, stability and redundants.

The unknowns ("columns") are the *basic forces* of the members and the reaction
components: a bar carries its axial force ``ID``; a beam carries its axial force ``ID.n``
and the section moments at its ends ``ID.start.m``/``ID.end.m`` (absent where the end is
hinged); each restraint carries ``NODE.dir``. The rows are the nodal equilibrium equations
in x, y and, where at least one beam end is rigidly connected, rz. With ``A`` the
equilibrium matrix and ``p`` the nodal loads (including those passed on by span loads):
``A @ s + p = 0``.

Degree of indeterminacy = columns - rank(A); the structure is stable when A has full row
rank. The rank is taken on the scaled matrix with the size-aware tolerance of
:func:`rank_tolerance`, so that "stable" here and the global part of the stability index
of :mod:`leastwork.stability` are one decision. The redundants are columns whose removal
leaves a square non-singular A0.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import TYPE_CHECKING, Any

import numpy as np

from .arithmetic import FloatNumbers, Numbers
from .elements import has_bending, kind_of
from .errors import CaseError, MechanismError
from .model import Structure, rotational_nodes
from .scaling import scaled_dense as _scaled
from .thresholds import GOOD_PIVOT as _GOOD_PIVOT
from .thresholds import MECHANISM_INDEX, MECHANISM_MOTION
from .thresholds import RANK_ROUND_OFF as _ROUND_OFF

if TYPE_CHECKING:
    import networkx as nx

__all__ = ["Column", "Topology", "build_topology", "sparse_topology", "assemble_equilibrium", "equilibrium_columns", "choose_redundants", "structure_graph",
           "member_graph_counts", "rank_tolerance", "check_stable"]


@dataclass(frozen=True)
class Column:
    """One unknown force: a member basic force or a reaction component."""

    name: str
    kind: str  #: "axial", "start_m", "end_m" or "reaction"
    owner: str  #: member id, or node id for a reaction
    restraint_index: int = -1  #: index into Topology.restraints for reactions

    @property
    def is_moment(self) -> bool:
        """A moment (beam end moment or rotational reaction) rather than a force."""
        return self.kind in ("start_m", "end_m") or (self.kind == "reaction"
                                                    and self.name.endswith(".rz"))


@dataclass(frozen=True)
class Topology:
    """Everything about the structure's statics that does not depend on the loads."""

    dofs: tuple[str, ...]  #: "NODE.x", "NODE.y", "NODE.rz"
    dof_index: dict[str, int]
    columns: tuple[Column, ...]
    column_index: dict[str, int]
    restraints: tuple  #: Restraint objects, in column order of reactions
    A: np.ndarray | None  #: equilibrium matrix (ndof x ncol), SI units; None when sparse only
    rank: int
    degree: int
    internal: int
    external: int
    stable: bool
    counting: dict  #: classical counting: unknowns, equations, formula text
    dropped: tuple[str, ...]  #: rz restraints dropped at nodes with no rotational stiffness
    mechanism: tuple[str, ...]  #: free motions when unstable
    loops: int = 0  #: independent closed loops of the member graph (cycle rank)
    parts: int = 1  #: connected parts of the member graph
    #: the same equilibrium matrix, scipy.sparse CSC (local path; None on the dense path,
    #: whose small solves do not load scipy)
    A_sparse: object = None
    #: smallest singular value of the scaled equilibrium matrix (dense path; NaN unknown)
    sigma_min: float = float("nan")

    @property
    def member_columns(self) -> list[int]:
        return [i for i, c in enumerate(self.columns) if c.kind != "reaction"]


def structure_graph(st: Structure) -> nx.MultiGraph:
    """The structure as a graph: nodes are joints (plus one ground node), edges members and
    supports."""
    import networkx as nx

    g = nx.MultiGraph()
    g.add_nodes_from(st.nodes)
    g.add_node("<ground>")
    for m in st.members.values():
        g.add_edge(m.start, m.end, key=m.id, kind=m.kind)
    for s in st.supports.values():
        g.add_edge(s.node, "<ground>", key=f"support {s.node}", kind="support")
    return g


def member_graph_counts(st: Structure) -> tuple[int, int]:
    """Connected parts and independent closed loops (cycle rank: members - joints + parts)
    of the member graph (joints and members, supports left out), by union-find; the same
    counts as :func:`structure_graph` gives, without building the graph."""
    parent = {n: n for n in st.nodes}

    def root(n):
        while parent[n] != n:
            parent[n] = parent[parent[n]]
            n = parent[n]
        return n

    parts = len(parent)
    for m in st.members.values():
        a, b = root(m.start), root(m.end)
        if a != b:
            parent[a] = b
            parts -= 1
    return parts, len(st.members) - len(parent) + parts


def equilibrium_columns(st: Structure, nums: Numbers):
    """Rows (nodal directions), columns (basic forces and reactions), restraints, dropped
    rz restraints, and the entries of each column of the equilibrium matrix ``A``
    (``A s + p = 0``) as (row name, value) pairs, zeros included, in the number type of
    ``nums`` (:mod:`leastwork.arithmetic`)."""
    rot = rotational_nodes(st.members.values())
    dofs: list[str] = []
    for nid in st.nodes:
        dofs += [f"{nid}.x", f"{nid}.y"]
        if nid in rot:
            dofs.append(f"{nid}.rz")
    dof_index = {d: i for i, d in enumerate(dofs)}
    columns: list[Column] = []
    entries: list[list[tuple[str, Any]]] = []
    for m in st.members.values():
        kind = kind_of(m)
        forces = kind.basic_forces(m)
        for bf, col in zip(forces, kind.equilibrium(m, nums.length(m.id),
                                                    *nums.direction(m.id), nums.one),
                           strict=True):
            columns.append(Column(bf.name, bf.role, m.id))
            entries.append(col)
    restraints = []
    dropped = []
    for sup in st.supports.values():
        for r in sup.restraints:
            if r.direction == "rz" and sup.node not in rot:
                dropped.append(r.name)
                continue
            columns.append(Column(r.name, "reaction", sup.node, len(restraints)))
            restraints.append(r)
            vx, vy, vr = nums.restraint_vector(r)
            e = [(f"{sup.node}.x", vx), (f"{sup.node}.y", vy)]
            if vr:
                e.append((f"{sup.node}.rz", vr))
            entries.append(e)
    return dofs, dof_index, columns, restraints, dropped, entries


def assemble_equilibrium(st: Structure, dense: bool = False):
    """Rows (nodal directions), columns (basic forces and reactions), restraints, dropped
    rz restraints and the equilibrium matrix ``A`` (SI) with ``A s + p = 0``: sparse (CSC),
    or a dense array when ``dense`` (repeated entries summed either way)."""
    dofs, dof_index, columns, restraints, dropped, entries = equilibrium_columns(
        st, FloatNumbers(st))
    rows, cols, vals = [], [], []
    for j, col_entries in enumerate(entries):
        for dof, val in col_entries:
            if val:
                rows.append(dof_index[dof])
                cols.append(j)
                vals.append(val)
    if dense:
        A = np.zeros((len(dofs), len(columns)))
        np.add.at(A, (np.asarray(rows, dtype=int), np.asarray(cols, dtype=int)),
                  np.asarray(vals, dtype=float))
        return dofs, dof_index, columns, restraints, dropped, A
    import scipy.sparse as sp

    A = sp.csc_matrix((vals, (rows, cols)), shape=(len(dofs), len(columns)))
    A.sum_duplicates()
    return dofs, dof_index, columns, restraints, dropped, A


def _counting(st: Structure, dofs, columns, restraints) -> dict:
    """The classical counting formula (unknowns - equations)."""
    n_bars = sum(1 for m in st.members.values() if m.kind == "bar")
    n_beams = len(st.members) - n_bars
    releases = sum(m.hinge_start + m.hinge_end for m in st.members.values() if m.is_beam)
    r = len(restraints)
    j = len(st.nodes)
    if n_beams == 0:
        formula = f"m + r - 2j = {n_bars} + {r} - 2*{j} = {n_bars + r - 2 * j}"
    else:
        formula = (f"unknowns - equations = ({len(columns) - r} member forces + {r} reactions)"
                   f" - {len(dofs)} equations = {len(columns) - len(dofs)}")
        if n_bars == 0 and releases == 0:
            formula += f"  (3m + r - 3j = 3*{n_beams} + {r} - 3*{j} = {3 * n_beams + r - 3 * j})"
    return {"unknowns": len(columns), "equations": len(dofs),
            "value": len(columns) - len(dofs), "formula": formula}


def sparse_topology(st: Structure) -> Topology:
    """The topology with only the sparse equilibrium matrix: rank, degree and stability are
    left for the self-stress search (:mod:`leastwork.selfstress`) to decide and fill in
    (the counting value stands in until then)."""
    dofs, dof_index, columns, restraints, dropped, A_sparse = assemble_equilibrium(st)
    parts, loops = member_graph_counts(st)
    counting = _counting(st, dofs, columns, restraints)
    return Topology(
        loops=loops, parts=parts, A_sparse=A_sparse,
        dofs=tuple(dofs), dof_index=dof_index, columns=tuple(columns),
        column_index={c.name: i for i, c in enumerate(columns)},
        restraints=tuple(restraints), A=None, rank=len(dofs),
        degree=counting["value"], internal=0, external=counting["value"], stable=True,
        counting=counting, dropped=tuple(dropped), mechanism=(),
    )


def build_topology(st: Structure) -> Topology:
    """Assemble the equilibrium matrix and decide indeterminacy and stability (dense
    singular values: for structures of up to a few thousand basic forces)."""
    dofs, dof_index, columns, restraints, dropped, A = assemble_equilibrium(st, dense=True)
    column_index = {c.name: i for i, c in enumerate(columns)}
    scaled = _scaled(A, dofs, st)
    tol = rank_tolerance(st)
    sv = _singular_values(scaled)
    rank = int(np.sum(sv > tol))
    member_cols = [i for i, c in enumerate(columns) if c.kind != "reaction"]
    internal = len(member_cols) - _rank(scaled[:, member_cols], tol)
    degree = len(columns) - rank
    stable = rank == len(dofs)
    mechanism = () if stable else _motion(scaled, dofs, tol)
    sigma_min = float(sv[-1]) if len(sv) == len(dofs) and len(dofs) else 0.0
    counting = _counting(st, dofs, columns, restraints)
    parts, loops = member_graph_counts(st)
    return Topology(
        loops=loops, parts=parts,
        dofs=tuple(dofs), dof_index=dof_index, columns=tuple(columns),
        column_index=column_index, restraints=tuple(restraints), A=A, rank=rank,
        degree=degree, internal=internal, external=degree - internal, stable=stable,
        counting=counting, dropped=tuple(dropped), mechanism=mechanism, sigma_min=sigma_min,
    )


def rank_tolerance(st: Structure) -> float:
    """Singular values of the scaled equilibrium matrix (moment rows over the mean member
    length, columns of unit norm) at or below ``MECHANISM_INDEX / size_factor`` count as
    zero (never below the round-off floor 1e-13): the structure is stable exactly when its
    global stability index, sigma_min times the size factor, is above MECHANISM_INDEX."""
    from .stability import size_factor

    return max(MECHANISM_INDEX / size_factor(st), _ROUND_OFF)


def _singular_values(M: np.ndarray) -> np.ndarray:
    """Singular values of M, largest first (none for an empty matrix)."""
    if M.size == 0:
        return np.zeros(0)
    return np.linalg.svd(M, compute_uv=False)


def _rank(M: np.ndarray, tol: float) -> int:
    """Singular values of M above ``tol`` (M scaled: columns of unit norm)."""
    return int(np.sum(_singular_values(M) > tol))


def _motion(M: np.ndarray, dofs, tol: float) -> tuple[str, ...]:
    """Nodal directions taking part in the first mechanism (a left null vector of M)."""
    u, sv, _ = np.linalg.svd(M, full_matrices=True)
    ranks = int(np.sum(sv > tol))
    null = u[:, ranks:]
    if null.shape[1] == 0:
        return ()
    moving = np.max(np.abs(null), axis=1)
    top = moving.max()
    return tuple(d for d, v in zip(dofs, moving, strict=True) if v > MECHANISM_MOTION * top)


def _describe(motion: tuple[str, ...]) -> str:
    return ", ".join(motion) if motion else "(not identified)"


def check_stable(st: Structure, topo: Topology) -> None:
    """Raise MechanismError if the structure itself can move. A matrix nearly but not
    exactly singular (smallest singular value above round-off) is explained by the
    stability index (:func:`leastwork.stability.assess_stability`): where and why."""
    if not topo.stable:
        if topo.sigma_min > _ROUND_OFF:
            from .stability import assess_stability

            assess_stability(st, topo)
        free = len(topo.dofs) - topo.rank
        raise MechanismError(
            f"{st.source}: the structure is unstable (a mechanism): {free} independent "
            "motion(s) need no deformation of any member. Add a support, a member or remove a "
            "hinge where it moves.",
            list(topo.mechanism),
        )


def choose_redundants(st: Structure, topo: Topology, names=None, where: str = "[analysis] "
                      "redundants", *, prefer: str = "reactions") -> list[int]:
    """Column indices of the redundants.

    Automatic choice: a greedy column selection keeps member forces first (bars and beam
    moments, then beam axial forces), then reactions in the order written, taking each column
    that is clearly independent of those kept (pivot above ``_GOOD_PIVOT``), then the most
    independent remaining ones (column-pivoted Gram-Schmidt). The columns left out are the
    redundants, so that reactions are preferred as redundants and the released structure is
    statically determinate, stable and well conditioned.

    A user's choice is checked: names must exist, their number must equal the degree, and the
    released structure must be stable (else MechanismError naming the free motion).

    ``prefer="members"`` keeps reactions first instead, so that member forces (beam end
    moments, bar forces) become the redundants: the alternative tried when the flexibility
    matrix of the first choice is ill-conditioned.
    """
    check_stable(st, topo)
    S = _scaled(topo.A, topo.dofs, st)
    ncol = len(topo.columns)
    if names is not None:
        idx = []
        for name in names:
            if name not in topo.column_index:
                raise CaseError(f'"{name}" is not a force of this structure'
                                f"{_name_hint(name, topo)}; expected a reaction NODE.x/y/rz, "
                                "a bar id, MEMBER.n, MEMBER.start.m or MEMBER.end.m",
                                source=st.source, where=where)
            i = topo.column_index[name]
            if i in idx:
                raise CaseError(f'"{name}" is named twice', source=st.source, where=where)
            idx.append(i)
        if len(idx) != topo.degree:
            raise CaseError(f"the structure is statically indeterminate to degree {topo.degree}"
                            f" but {len(idx)} redundant(s) were named; name exactly "
                            f"{topo.degree}", source=st.source, where=where)
        keep = [j for j in range(ncol) if j not in idx]
        S0 = S[:, keep]
        tol = rank_tolerance(st)
        if _rank(S0, tol) < len(topo.dofs):
            motion = _motion(S0, topo.dofs, tol)
            raise MechanismError(
                f"{st.source}: releasing {', '.join(names)} leaves a mechanism (the released "
                "structure can move); choose other redundants.", list(motion))
        return idx
    order = _keep_order(st, topo)
    if prefer == "members":
        members = [j for j in order if topo.columns[j].kind != "reaction"]
        order = [j for j in order if j not in members] + members
    kept: list[int] = []
    Q = np.zeros((S.shape[0], 0))
    for j in order:  # clearly independent columns, in order of preference
        r = _residual(Q, S[:, j])
        if np.linalg.norm(r) > _GOOD_PIVOT:
            kept.append(j)
            Q = np.column_stack([Q, r / np.linalg.norm(r)])
    # then the most independent of the rest until A0 is square: the rank decision made the
    # structure stable, so a full set exists (a near-mechanism leaves small residuals)
    while len(kept) < len(topo.dofs):
        cand = [j for j in order if j not in kept]
        res = [np.linalg.norm(_residual(Q, S[:, j])) for j in cand]
        best = int(np.argmax(res)) if res else -1
        if best < 0 or res[best] <= _ROUND_OFF:
            raise MechanismError(
                f"{st.source}: no statically determinate released structure could be found "
                "(the equilibrium equations are dependent to round-off): a mechanism.",
                list(topo.mechanism))
        r = _residual(Q, S[:, cand[best]])
        kept.append(cand[best])
        Q = np.column_stack([Q, r / np.linalg.norm(r)])
    return [j for j in range(ncol) if j not in kept]


def _residual(Q: np.ndarray, a: np.ndarray) -> np.ndarray:
    r = a - Q @ (Q.T @ a)
    return r - Q @ (Q.T @ r)  # re-orthogonalise


def _keep_order(st: Structure, topo: Topology) -> list[int]:
    """Columns in order of preference to keep in the released structure."""
    moments, axial_beam, bars, rigid, springs = [], [], [], [], []
    for j, c in enumerate(topo.columns):
        if c.kind == "reaction":
            (springs if topo.restraints[c.restraint_index].is_spring else rigid).append(j)
        elif c.kind == "axial":
            (axial_beam if has_bending(st.members[c.owner]) else bars).append(j)
        else:
            moments.append(j)
    # axially rigid beams first among axial forces: their axial force has no flexibility
    axial_beam.sort(key=lambda j: st.members[topo.columns[j].owner].EA is not None)
    return axial_beam + moments + bars + rigid + springs


def _name_hint(name: str, topo: Topology) -> str:
    import difflib

    close = difflib.get_close_matches(name, list(topo.column_index), n=1, cutoff=0.5)
    return f' (did you mean "{close[0]}"?)' if close else ""
