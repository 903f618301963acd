"""Equilibrium matrix of a space structure, its rank, degree, counting formula, stability
and the choice of redundants.

Rows: nodal equilibrium in x, y, z at every node and in rx, ry, rz at every node where a
member end passes a moment (a rigid or partly released beam end); columns: the members'
basic forces (:mod:`.members`) and the reaction components. ``A s + p = 0``. The rank is
taken on the scaled matrix (moment rows over the mean member length, columns of unit
norm), as in the plane path (:mod:`leastwork.scaling`).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ..errors import CaseError, MechanismError
from ..thresholds import (
    DENSE_CHECK_MAX_DOFS,
    GOOD_PIVOT,
    MECHANISM_INDEX,
    MECHANISM_MOTION,
    RANK_ROUND_OFF,
)
from .members import basic_forces, node_actions
from .model import DIRECTIONS, ROTATIONS, SpaceStructure

__all__ = ["SpaceColumn", "SpaceTopology", "space_topology", "choose_redundants", "ALIASES"]


@dataclass(frozen=True)
class SpaceColumn:
    """One unknown force: a basic force (``role`` of :func:`.members.basic_forces`) or a
    reaction (role "reaction", ``restraint`` its index in ``SpaceTopology.restraints``)."""

    name: str
    role: str
    owner: str
    restraint: int = -1

    @property
    def is_moment(self) -> bool:
        if self.role == "reaction":
            return self.name.rsplit(".", 1)[1] in ROTATIONS
        return self.role not in ("n", "bar")


@dataclass(frozen=True)
class SpaceTopology:
    dofs: tuple[str, ...]
    dof_index: dict[str, int]
    columns: tuple[SpaceColumn, ...]
    column_index: dict[str, int]
    restraints: tuple
    A: np.ndarray
    scaled: np.ndarray
    rank: int
    degree: int
    internal: int
    external: int
    stable: bool
    counting: dict
    dropped: tuple[str, ...]
    mechanism: tuple[str, ...]


#: Other names of a twist column (``ID.start.t``): the twist is one value along a member.
ALIASES = (".end.t", ".t")


def _rename(columns: list[SpaceColumn], names) -> list[SpaceColumn]:
    """A twist column takes the name the user gave it (``ID.end.t`` or ``ID.t``)."""
    if not names:
        return columns
    wanted = {}
    for n in names:
        for a in ALIASES:
            if n.endswith(a):
                wanted[n[: -len(a)] + ".start.t"] = n
    return [SpaceColumn(wanted.get(c.name, c.name), c.role, c.owner, c.restraint)
            for c in columns]


def space_topology(st: SpaceStructure, names=None) -> SpaceTopology:
    """The equilibrium matrix and everything decided from it (``names``: the user's
    redundants, for the twist columns' names)."""
    members = list(st.members.values())
    cols: list[SpaceColumn] = []
    entries: list[list[tuple[str, float]]] = []
    rot: set[str] = set()
    for m in members:
        axes, L = st.axes(m.id), st.length(m.id)
        for name, role in basic_forces(m):
            s, e = node_actions(role, axes, L)
            ent = []
            for node, vec in ((m.start, s), (m.end, e)):
                for d, v in zip(DIRECTIONS, vec, strict=True):
                    ent.append((f"{node}.{d}", float(v)))
                    if d in ROTATIONS and abs(v) > 0:
                        rot.add(node)
            cols.append(SpaceColumn(name, role, m.id))
            entries.append(ent)
    # a rotation about an axis no member end resists (every end there released about it,
    # e.g. the vertical axis of a joint of hinged grid beams) is not an equation: left out,
    # as the plane path leaves out the rotation of a pin joint
    held: set[str] = set()
    for ent in entries:
        held.update(d for d, v in ent if abs(v) > 0)
    dofs = [f"{n}.{d}" for n in st.nodes for d in DIRECTIONS
            if d not in ROTATIONS or (n in rot and f"{n}.{d}" in held)]
    if len(dofs) > DENSE_CHECK_MAX_DOFS:
        raise CaseError(f"{len(dofs)} equilibrium equations: space structures above "
                        f"{DENSE_CHECK_MAX_DOFS} are not supported yet (the sparse path is for "
                        "plane structures only)", source=st.source)
    dof_index = {d: i for i, d in enumerate(dofs)}
    restraints, dropped = [], []
    for sup in st.supports.values():
        for r in sup.restraints:
            if r.name not in dof_index:
                dropped.append(r.name)
                continue
            cols.append(SpaceColumn(r.name, "reaction", sup.node, len(restraints)))
            restraints.append(r)
            entries.append([(r.name, 1.0)])
    cols = _rename(cols, names)
    A = np.zeros((len(dofs), len(cols)))
    for j, ent in enumerate(entries):
        for d, v in ent:
            if d in dof_index:
                A[dof_index[d], j] += v
    scaled = _scale(st, A, dofs)
    sv = np.linalg.svd(scaled, compute_uv=False) if scaled.size else np.zeros(0)
    tol = _tol()
    rank = int(np.sum(sv > tol))
    member_cols = [j for j, c in enumerate(cols) if c.role != "reaction"]
    msv = (np.linalg.svd(scaled[:, member_cols], compute_uv=False) if member_cols
           else np.zeros(0))
    internal = len(member_cols) - int(np.sum(msv > tol))
    degree = len(cols) - rank
    stable = rank == len(dofs)
    return SpaceTopology(
        dofs=tuple(dofs), dof_index=dof_index, columns=tuple(cols),
        column_index={c.name: i for i, c in enumerate(cols)}, restraints=tuple(restraints),
        A=A, scaled=scaled, rank=rank, degree=degree, internal=internal,
        external=degree - internal, stable=stable,
        counting=_counting(st, dofs, cols, restraints), dropped=tuple(dropped),
        mechanism=() if stable else _motion(scaled, dofs),
    )


def _tol() -> float:
    """Singular values of the scaled matrix at or below this count as zero."""
    return max(MECHANISM_INDEX, RANK_ROUND_OFF)


def _scale(st: SpaceStructure, A: np.ndarray, dofs) -> np.ndarray:
    """Moment rows over the mean member length, then columns of unit norm."""
    Lm = float(np.mean([st.length(m) for m in st.members])) if st.members else 1.0
    S = A.copy()
    for i, d in enumerate(dofs):
        if d.rsplit(".", 1)[1] in ROTATIONS:
            S[i] /= Lm
    norms = np.linalg.norm(S, axis=0)
    return S / np.where(norms > 0, norms, 1.0)


def _motion(S: np.ndarray, dofs) -> tuple[str, ...]:
    """Nodal directions that move in the first mechanism (a left null vector)."""
    u, sv, _ = np.linalg.svd(S, full_matrices=True)
    null = u[:, int(np.sum(sv > _tol())):]
    if null.shape[1] == 0:
        return ()
    moving = np.max(np.abs(null), axis=1)
    return tuple(d for d, v in zip(dofs, moving, strict=True)
                 if v > MECHANISM_MOTION * moving.max())


def _counting(st: SpaceStructure, dofs, cols, restraints) -> dict:
    """The classical counting formula, shown beside the rank (never used alone)."""
    bars = sum(1 for m in st.members.values() if not m.is_beam)
    beams = len(st.members) - bars
    r, j = len(restraints), len(st.nodes)
    releases = sum(len(m.releases) for m in st.members.values())
    if beams == 0:
        formula = f"m + r - 3j = {bars} + {r} - 3*{j} = {bars + r - 3 * j}"
    else:
        formula = (f"unknowns - equations = ({len(cols) - r} member forces + {r} reactions) "
                   f"- {len(dofs)} equations = {len(cols) - len(dofs)}")
        if bars == 0 and releases == 0:
            formula += (f"  (6m + r - 6j = 6*{beams} + {r} - 6*{j} = "
                        f"{6 * beams + r - 6 * j})")
    return {"unknowns": len(cols), "equations": len(dofs),
            "value": len(cols) - len(dofs), "formula": formula}


def check_stable(st: SpaceStructure, topo: SpaceTopology) -> None:
    if not topo.stable:
        free = len(topo.dofs) - topo.rank
        raise MechanismError(
            f"{st.source}: the space structure is unstable (a mechanism): {free} independent "
            "motion(s) need no deformation of any member. Add a support or a member, or "
            "remove a release where it moves.", list(topo.mechanism))


def choose_redundants(st: SpaceStructure, topo: SpaceTopology, names=None,
                      where: str = "[analysis] redundants") -> list[int]:
    """Column indices of the redundants: the user's (checked: known names, as many as the
    degree, a stable released structure) or the automatic choice, keeping member forces in
    the released structure first so that reactions become redundants (greedy pivoting on
    the scaled matrix, as the plane path does)."""
    check_stable(st, topo)
    S = topo.scaled
    ncol = len(topo.columns)
    if names is not None:
        idx = []
        for n in names:
            if n not in topo.column_index:
                raise CaseError(f'"{n}" is not a force of this space structure; expected a '
                                "reaction NODE.x|y|z|rx|ry|rz, a bar id, MEMBER.n, "
                                "MEMBER.start.t|my|mz or MEMBER.end.t|my|mz (known: "
                                + ", ".join(list(topo.column_index)[:12]) + " ...)",
                                source=st.source, where=where)
            i = topo.column_index[n]
            if i in idx:
                raise CaseError(f'"{n}" is named twice', source=st.source, where=where)
            idx.append(i)
        if len(idx) != topo.degree:
            raise CaseError(f"the structure is statically indeterminate to degree "
                            f"{topo.degree} but {len(idx)} redundant(s) were named; name "
                            f"exactly {topo.degree}", source=st.source, where=where)
        keep = [j for j in range(ncol) if j not in idx]
        S0 = S[:, keep]
        if S0.size and int(np.sum(np.linalg.svd(S0, compute_uv=False) > _tol())) < len(topo.dofs):
            raise MechanismError(f"{st.source}: releasing {', '.join(names)} leaves a "
                                 "mechanism (the released structure can move); choose other "
                                 "redundants.", list(_motion(S0, topo.dofs)))
        return idx
    order = _keep_order(st, topo)
    kept: list[int] = []
    Q = np.zeros((S.shape[0], 0))
    for j in order:
        r = _residual(Q, S[:, j])
        if np.linalg.norm(r) > GOOD_PIVOT:
            kept.append(j)
            Q = np.column_stack([Q, r / np.linalg.norm(r)])
    while len(kept) < len(topo.dofs):
        cand = [j for j in order if j not in kept]
        res = [np.linalg.norm(_residual(Q, S[:, j])) for j in cand]
        best = int(np.argmax(res))
        r = _residual(Q, S[:, cand[best]])
        kept.append(cand[best])
        Q = np.column_stack([Q, r / np.linalg.norm(r)])
    return [j for j in range(ncol) if j not in kept]


def _residual(Q: np.ndarray, a: np.ndarray) -> np.ndarray:
    r = a - Q @ (Q.T @ a)
    return r - Q @ (Q.T @ r)


def _keep_order(st: SpaceStructure, topo: SpaceTopology) -> list[int]:
    """Columns in order of preference to keep: beam axial forces (axially rigid first),
    twists and moments, bar forces, rigid reactions, springs."""
    axial, moments, bars, rigid, springs = [], [], [], [], []
    for j, c in enumerate(topo.columns):
        if c.role == "reaction":
            (springs if topo.restraints[c.restraint].is_spring else rigid).append(j)
        elif c.role == "n":
            axial.append(j)
        elif c.role == "bar":
            bars.append(j)
        else:
            moments.append(j)
    axial.sort(key=lambda j: st.members[topo.columns[j].owner].EA is not None)
    return axial + moments + bars + rigid + springs
