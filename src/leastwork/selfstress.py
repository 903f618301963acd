"""A local self-stress basis of the equilibrium matrix, for large structures.

A self-stress is a set of basic forces and reactions ``s`` with ``A s = 0``; the unit
redundant states of the force method are a basis of them. Cutting members from one released
structure gives states that may travel across the whole structure (a dense, badly
conditioned flexibility matrix on large braced grids). Here each state is found on a small
neighbourhood instead, so that it touches only a few members.

Method (a sweep in the spirit of the turn-back and sparse null-basis methods: Topcu 1979;
Berry, Heath et al., Numer. Math. 47, 1985; Gilbert & Heath 1987):

1. The joints are numbered by a breadth-first sweep of the member graph from a supported
   joint; each column (basic force or reaction) takes the number of its latest joint, and
   columns are processed in that order, member forces before reactions at a joint (so that
   reactions become the redundants, as on the small path).
2. A column that reaches a nodal direction no earlier column reaches is independent of all
   earlier columns: kept (a pivot of at least ``_GOOD_PIVOT`` of the column's norm is asked
   for, so that the released structure stays well conditioned).
3. Any other column is tested on the joints within 1, 2, ... ``_MAX_RADIUS`` members of its
   own: if a least-squares combination of the earlier columns there reproduces it (residual
   below ``_LOCAL_TOL`` on the scaled matrix, round-off level), that combination with the column at 1 is a
   local self-stress, and the column is the one whose cut the state closes; else it is kept.
   A state whose coefficients exceed ``_STATE_BOUND`` (a nearly straight chain carrying the
   force) is replaced by one found on a larger set of joints if there is one.
   A column barely independent (residual below ``_GOOD_PIVOT``) is decided after the other
   columns of its joint, which often makes it dependent instead: keeping it would leave a
   nearly singular released structure (a nearly straight three-hinged arch).
4. A state contains its own closing column and only columns processed earlier, so the
   states are triangular in the processing order: independent by construction.
5. Long-range self-stresses (a truss pinned at both far ends, a ring of many members) are
   missed by step 3; they show as more kept columns than equations. They are found at the
   end with one sparse factorisation of the kept columns bordered by a few rows (one per
   missing state), and their closing columns picked by partial pivoting (the largest
   entries: the forces the long-range self-stresses rely on most).

The kept columns less those closing columns form the released structure: square, and
stable exactly when its sparse LU has no negligible pivot.

Scaling (Pellegrino & Calladine 1986 on rank decisions): rows of moments are divided by the
mean member length and every column is scaled to unit norm before any rank decision.
"""

from __future__ import annotations

from collections import deque
from dataclasses import dataclass

import numpy as np
import scipy.sparse as sp
from scipy.linalg.lapack import dgelsy

from .thresholds import GOOD_PIVOT as _GOOD_PIVOT
from .thresholds import LOCAL_LEAST_SQUARES_RCOND, MOVING_FRACTION
from .thresholds import LOCAL_STATE_BOUND as _STATE_BOUND
from .thresholds import LOCAL_STATE_RESIDUAL as _LOCAL_TOL
from .thresholds import RELEASED_PIVOT_SINGULAR as _RANK_TOL
from .thresholds import STATE_ENTRY_DROP as _DROP

__all__ = ["SelfStressBasis", "local_self_stress", "equilibrium_scaling", "members_per_state"]

_MAX_RADIUS = 3


@dataclass(frozen=True)
class SelfStressBasis:
    """Self-stress states (columns of ``states``, physical units: the closing column at 1)
    and the released structure they close."""

    states: sp.csc_matrix  #: (ncol, nstates)
    closing: np.ndarray  #: column closed by each state (its pivot), int
    released: np.ndarray  #: columns of the released structure (square), sorted
    internal: int  #: states made of member forces only
    long_range: int  #: states found by the global step (5)
    stable: bool  #: the released structure is non-singular (so the structure is stable)
    motion: tuple[int, ...] = ()  #: row indices moving freely, when unstable
    #: sparse LU (scipy SuperLU) of the scaled released structure diag(r) A0 diag(c), with
    #: r = ``row_scale`` and c = ``column_scale`` (per released column); None if unstable
    factor: object = None
    row_scale: np.ndarray | None = None
    column_scale: np.ndarray | None = None


def members_per_state(B, columns, rel: float = 0.0) -> np.ndarray:
    """How many members each state (column of ``B``, dense or sparse) touches: those with a
    basic force above ``rel`` times the state's largest entry (0: every stored entry).
    ``columns`` are the topology's columns (owner and kind of each basic force)."""
    Bc = sp.csc_matrix(B)
    ids: dict[str, int] = {}
    owner = np.array([ids.setdefault(c.owner, len(ids)) if c.kind != "reaction" else -1
                      for c in columns])
    counts = np.zeros(Bc.shape[1], dtype=int)
    for i in range(Bc.shape[1]):
        rows = Bc.indices[Bc.indptr[i]:Bc.indptr[i + 1]]
        vals = np.abs(Bc.data[Bc.indptr[i]:Bc.indptr[i + 1]])
        if rel and vals.size:
            rows = rows[vals > rel * vals.max()]
        touched = owner[rows]
        counts[i] = len(set(touched[touched >= 0].tolist()))
    return counts


def equilibrium_scaling(A: sp.csc_matrix, dofs, lref: float) -> tuple[np.ndarray, np.ndarray]:
    """Row and column scale factors (r, c) such that ``diag(r) A diag(c)`` has moment rows
    divided by ``lref`` and columns of unit norm."""
    r = np.array([1.0 / lref if d.endswith(".rz") else 1.0 for d in dofs])
    S = sp.diags(r) @ A
    norms = np.sqrt(np.asarray(S.multiply(S).sum(axis=0)).ravel())
    norms[norms == 0] = 1.0
    return r, 1.0 / norms


def local_self_stress(A: sp.csc_matrix, dofs, column_nodes: list[tuple[int, ...]],
                      node_neighbours: list[list[int]],
                      priority: np.ndarray, is_member: np.ndarray, lref: float,
                      start_nodes: list[int], *, tied_joints: bool = True,
                      kept_first: bool = False) -> SelfStressBasis:
    """Find a local self-stress basis of ``A`` (ndof x ncol, SI), by the steps of the
    module's docstring.

    Parameters
    ----------
    column_nodes : joints (indices) each column acts on.
    node_neighbours : joints joined to each joint by a member.
    priority : order of preference to keep a column at the same joint (lower is kept first).
    is_member : True for member basic forces, False for reactions.
    start_nodes : joints to start the sweep from, in order (supported joints first).
    tied_joints : step 3 tries the joints tied to two of the column's first (on by default;
        off only to compare bases, benchmarks/bases.py).
    kept_first : in each set of joints, try the kept columns alone before all earlier
        columns (a state of kept columns is unique). Off by default: on braced grids, frames,
        beams and trussed beams it changed neither the states' size nor the conditioning
        and cost up to 60 % more time (docs/performance.md).
    """
    ndof, ncol = A.shape
    rs, cs = equilibrium_scaling(A, dofs, lref)
    S = (sp.diags(rs) @ A @ sp.diags(cs)).tocsc()
    S.sort_indices()
    order = _sweep_order(node_neighbours, start_nodes)  # 1.
    col_time, col_order = _column_order(order, column_nodes, priority)
    sweep = _Sweep(S, column_nodes, node_neighbours, order, tied_joints=tied_joints,
                   kept_first=kept_first)
    sweep.run(col_time, col_order)  # 2.-4.
    long_range = sweep.close_long_range(S, col_order)  # 5.
    released = np.flatnonzero(sweep.kept)
    factor = _released_factor(S[:, released]) if len(released) == ndof else None
    motion = () if factor is not None else _free_motion(S[:, released])
    states, internal = _assemble_states(sweep.raw_cols, sweep.raw_y, sweep.raw_state,
                                        sweep.closing, cs, is_member, ncol)
    return SelfStressBasis(states, np.array(sweep.closing, dtype=int), released, internal,
                           long_range, factor is not None, motion, factor, rs, cs[released])


# ---------------------------------------------------------------------------- 1. order


def _sweep_order(node_neighbours: list[list[int]], start_nodes: list[int]) -> np.ndarray:
    """Step 1: the number of each joint in a breadth-first sweep of the member graph from
    ``start_nodes`` in turn (then from any joint not yet reached)."""
    nnode = len(node_neighbours)
    order = np.full(nnode, -1)
    k = 0
    for s0 in [*start_nodes, *range(nnode)]:
        if order[s0] >= 0:
            continue
        order[s0] = k
        k += 1
        queue = deque([s0])
        while queue:
            n = queue.popleft()
            for m in node_neighbours[n]:
                if order[m] < 0:
                    order[m] = k
                    k += 1
                    queue.append(m)
    return order


def _column_order(order: np.ndarray, column_nodes: list[tuple[int, ...]],
                  priority: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Step 1: (the number of each column's latest joint, the columns in processing order:
    by that number, then by ``priority``)."""
    col_time = np.array([max((order[n] for n in nodes), default=0) for nodes in column_nodes])
    return col_time, np.lexsort((priority, col_time))


# ---------------------------------------------------------------------------- 2.-5. the sweep


class _Sweep:
    """Steps 2-5 over the scaled equilibrium matrix ``S``: which columns are kept, and the
    states as found, in scaled terms: (column, value, state) triples, state by state
    (``raw_cols``, ``raw_y``, ``raw_state``), with the column each state closes
    (``closing``); normalised and pruned all at once at the end (:func:`_assemble_states`).
    """

    def __init__(self, S: sp.csc_matrix, column_nodes: list[tuple[int, ...]],
                 node_neighbours: list[list[int]], order: np.ndarray, *, tied_joints: bool,
                 kept_first: bool) -> None:
        ndof, ncol = S.shape
        self.indptr, self.indices, self.data = S.indptr, S.indices, S.data
        self.column_nodes = column_nodes
        self.node_neighbours = node_neighbours
        self.order = order
        self.tied_joints = tied_joints
        self.kept_first = kept_first
        self.touched = np.zeros(ndof, dtype=bool)  #: rows reached by a processed column
        self.kept = np.zeros(ncol, dtype=bool)
        #: processed columns per joint
        self.node_cols: list[list[int]] = [[] for _ in range(len(node_neighbours))]
        self.raw_cols: list[int] = []
        self.raw_y: list[float] = []
        self.raw_state: list[int] = []
        self.closing: list[int] = []
        self.first_node = [nodes[0] for nodes in column_nodes]
        self.last_node = [nodes[-1] for nodes in column_nodes]

    def entries(self, j: int) -> tuple[np.ndarray, np.ndarray]:
        """Rows and values of column j of S."""
        indptr = self.indptr
        return self.indices[indptr[j]:indptr[j + 1]], self.data[indptr[j]:indptr[j + 1]]

    def finish(self, j: int) -> None:
        """Column j is processed: its rows are reached, its joints know it."""
        rows, _ = self.entries(j)
        self.touched[rows] = True
        for n in self.column_nodes[j]:
            self.node_cols[n].append(j)

    def run(self, col_time: np.ndarray, col_order: np.ndarray) -> None:
        """Steps 2-4: the columns in processing order, one joint's columns at a time."""
        ncol = len(col_order)
        pos = 0
        while pos < ncol:
            end = pos
            t = col_time[col_order[pos]]
            while end < ncol and col_time[col_order[end]] == t:
                end += 1
            group = [int(j) for j in col_order[pos:end]]
            pos = end
            rest = self.keep_new_directions(group)
            self.close_locally(rest, t)

    def keep_new_directions(self, group: list[int]) -> list[int]:
        """Step 2: keep the columns of ``group`` independent through directions no earlier
        column reaches (each with a pivot of at least ``_GOOD_PIVOT``); return the rest."""
        new_rows = sorted({int(r) for j in group for r in self.entries(j)[0]
                           if not self.touched[r]})
        if not new_rows:
            return group
        rest = []
        where = {r: i for i, r in enumerate(new_rows)}
        Q = np.zeros((len(new_rows), 0))
        for j in group:
            rr, vv = self.entries(j)
            v = np.zeros(len(new_rows))
            for r, val in zip(rr, vv, strict=True):
                if r in where:
                    v[where[int(r)]] = val
            res = v - Q @ (Q.T @ v)
            nr = np.linalg.norm(res)
            if nr > _GOOD_PIVOT:
                Q = np.column_stack([Q, res / nr])
                self.kept[j] = True
                self.finish(j)
            else:
                rest.append(j)
        return rest

    def close_locally(self, rest: list[int], t: int) -> None:
        """Step 3: a local state for each column of ``rest`` (joints swept up to ``t``), or
        the column is kept. A force barely independent of the earlier ones (residual below
        ``_GOOD_PIVOT``) would make the released structure nearly singular (a flat arch):
        it is decided after the others of its joint, which may make it dependent."""
        near = []
        for j in rest:
            found, resid = self.local_state(j, t)
            if found is not None:
                self.add_state(j, *found)
            elif resid < _GOOD_PIVOT:
                near.append(j)
                continue
            else:
                self.kept[j] = True
            self.finish(j)
        for j in near:
            found, _ = self.local_state(j, t)
            if found is None:
                self.kept[j] = True
            else:
                self.add_state(j, *found)
            self.finish(j)

    def local_state(self, j: int, now: int):
        """Earlier columns within growing neighbourhoods of column j (joints swept up to
        ``now``) that reproduce it: ((columns, coefficients), 0) or (None, the smallest
        residual seen, column j having unit norm)."""
        rows_j, vals_j = self.entries(j)
        node_cols, first_node, last_node = self.node_cols, self.first_node, self.last_node
        tried: set[int] = set()
        least = 1.0
        steep = None  # a state found only with large coefficients, kept as a last resort
        for ball in self.balls(j, now):
            cols = np.array(sorted({c for n in ball for c in node_cols[n]
                                    if first_node[c] in ball and last_node[c] in ball}),
                            dtype=int)
            if not cols.size or cols.size in tried:
                continue
            tried.add(cols.size)  # the same columns again (a ball that did not grow)
            # least-norm over every earlier column in the set (kept and closing: some states
            # need an earlier closing force, the third support of a beam); optionally the
            # kept columns alone first, whose state is unique
            alone = cols[self.kept[cols]]
            tries = (alone, cols) if self.kept_first and alone.size < cols.size else (cols,)
            for use in tries:
                found, resid = self.reproduce(use, rows_j, vals_j)
                if found is not None:
                    size = float(np.max(np.abs(found[1]), initial=0.0))
                    if size <= _STATE_BOUND:
                        return found, 0.0
                    # a nearly singular set of joints (a nearly straight chain between two
                    # pins) carries the force only with huge others: look further out
                    if steep is None or size < steep[0]:
                        steep = (size, found)
                    continue
                least = min(least, resid)
        if steep is not None:
            return steep[1], 0.0
        return None, least

    def balls(self, j: int, now: int):
        """Growing sets of joints around column j (joints swept up to ``now``): first the
        joints tied to at least two of the ball's joints, twice (a braced panel, a triangle
        fan), then every neighbour, ``_MAX_RADIUS`` times (a rigid ring, two spans)."""
        node_neighbours, order = self.node_neighbours, self.order
        ball = set(self.column_nodes[j])
        for _ in range(2 if self.tied_joints else 0):
            near: dict[int, int] = {}
            for n in ball:
                for m in set(node_neighbours[n]):
                    if m not in ball and order[m] <= now:
                        near[m] = near.get(m, 0) + 1
            tied = {m for m, k in near.items() if k >= 2}
            if not tied:
                break
            ball = ball | tied
            yield ball
        ball = set(self.column_nodes[j])
        for _ in range(_MAX_RADIUS):
            grown = {m for n in ball for m in node_neighbours[n]
                     if m not in ball and order[m] <= now}
            if not grown:
                return
            ball = ball | grown
            yield ball

    def reproduce(self, cols: np.ndarray, rows_j: np.ndarray, vals_j: np.ndarray):
        """Least-squares combination x of columns ``cols`` with S[:, cols] x = -S[:, j];
        ((cols, x), residual) when it reproduces column j to the rank tolerance, else
        (None, residual)."""
        if not cols.size:
            return None, 1.0
        indptr, indices, data = self.indptr, self.indices, self.data
        starts, lens = indptr[cols], indptr[cols + 1] - indptr[cols]
        offsets = np.repeat(starts - np.cumsum(lens) + lens, lens) + np.arange(lens.sum())
        rr, vv = indices[offsets], data[offsets]
        row_set = np.union1d(rr, rows_j)
        M = np.zeros((len(row_set), len(cols)))
        M[np.searchsorted(row_set, rr), np.repeat(np.arange(len(cols)), lens)] = vv
        b = np.zeros(len(row_set))
        b[np.searchsorted(row_set, rows_j)] = vals_j
        x = _least_norm(M, -b)
        resid = float(np.linalg.norm(M @ x + b))
        return ((cols, x) if resid <= _LOCAL_TOL else None), resid

    def add_state(self, j: int, cols: np.ndarray, x: np.ndarray) -> None:
        """Record the scaled null vector with y_j = 1 on ``cols`` plus j."""
        self.raw_cols.extend(cols.tolist())
        self.raw_cols.append(j)
        self.raw_y.extend(x.tolist())
        self.raw_y.append(1.0)
        self.raw_state.extend([len(self.closing)] * (len(cols) + 1))
        self.closing.append(j)

    def close_long_range(self, S: sp.csc_matrix, col_order: np.ndarray) -> int:
        """Step 5: the self-stresses left among the kept columns (more kept columns than
        rows), each closing one of them (no longer kept); returns how many were found."""
        K = np.flatnonzero(self.kept)
        ndof = S.shape[0]
        g = len(K) - ndof
        if g <= 0:
            return 0
        X = _kept_null_space(S[:, K], g)
        if X is None or not np.all(np.isfinite(X)):
            return 0
        # pivots: latest processed columns first
        rank_in_sweep = np.empty(S.shape[1], dtype=int)
        rank_in_sweep[col_order] = np.arange(S.shape[1])
        W, pivots = _unit_on_pivots(X, np.argsort(-rank_in_sweep[K], kind="stable"))
        for i, pk in enumerate(pivots):
            self.raw_cols.extend(K.tolist())
            self.raw_y.extend(W[:, i].tolist())
            self.raw_state.extend([len(self.closing)] * len(K))
            self.closing.append(int(K[pk]))
        self.kept[K[pivots]] = False
        return g


def _kept_null_space(SK: sp.csc_matrix, g: int) -> np.ndarray | None:
    """Step 5: a basis (columns) of the null space of the kept columns ``SK`` (ndof x k,
    ``g`` = k - ndof states missing), from one sparse LU of ``SK`` bordered by ``g`` random
    rows (fixed seed); None when that factorisation fails."""
    from scipy.sparse.linalg import splu

    ndof, k = SK.shape
    rng = np.random.default_rng(20261202)
    R = sp.csc_matrix(rng.standard_normal((g, k)))
    border = sp.vstack([SK, R]).tocsc()
    try:
        lu = splu(border)
        rhs = np.zeros((ndof + g, g))
        rhs[ndof:] = np.eye(g)
        return lu.solve(rhs)  # (k, g): a basis of the null space of SK
    except RuntimeError:
        return None


def _unit_on_pivots(X: np.ndarray, candidates: np.ndarray) -> tuple[np.ndarray, list[int]]:
    """Step 5: the null basis ``X`` (k, g) recombined to be the identity on g pivot rows,
    picked by partial pivoting: the largest entry of each column in turn (ties to the
    earliest in ``candidates``): (W, pivots).

    The pivots close the long-range states, and the kept columns less them form the
    released structure. The largest entries of the self-stresses are the forces they rely
    on most (on a girder over many supports, the chords over the supports), so cutting
    those leaves a released structure of short determinate pieces and states two spans
    long: on a cross-braced girder with a support every 50 panels, the flexibility's
    condition number was 9.5e7 at 400 panels and 3.3e13 at 800 with the latest columns of
    the sweep as pivots (a released structure cantilevering to the far end), 2.7 and 2.9
    this way (docs/performance.md)."""
    g = X.shape[1]
    W = X.copy()
    pivots: list[int] = []
    cand = np.asarray(candidates, dtype=int)
    for i in range(g):
        col = W[:, i]
        size = np.abs(col[cand])
        size[np.isin(cand, pivots)] = -1.0
        pick = int(cand[int(np.argmax(size))])
        pivots.append(pick)
        W[:, i] = col / col[pick]
        for q in range(i + 1, g):
            W[:, q] -= W[:, i] * W[pick, q]
    # make it the identity on the pivots (back substitution)
    P = W[pivots, :]
    return W @ np.linalg.inv(P), pivots


def _assemble_states(raw_cols, raw_y, raw_state, closing, cs, is_member,
                     ncol: int) -> tuple[sp.csc_matrix, int]:
    """The states as a sparse matrix (ncol, n) in physical units, each closing column at 1
    (s = cs * y / cs[closing]), entries below ``_DROP`` of the state's largest dropped; and
    how many states are made of member forces only (internal)."""
    n = len(closing)
    if not n:
        return sp.csc_matrix((ncol, 0)), 0
    rc = np.asarray(raw_cols, dtype=int)
    state = np.asarray(raw_state, dtype=int)
    s = cs[rc] * np.asarray(raw_y) / cs[np.asarray(closing, dtype=int)[state]]
    size = np.abs(s)
    starts = np.flatnonzero(np.r_[True, state[1:] != state[:-1]])  # states are contiguous
    keep = size > _DROP * np.maximum.reduceat(size, starts)[state]
    rows, cols = rc[keep], state[keep]
    reactions = np.bincount(cols, weights=(~is_member[rows]).astype(float), minlength=n)
    return (sp.csc_matrix((s[keep], (rows, cols)), shape=(ncol, n)),
            int(np.count_nonzero(reactions == 0)))


def _free_motion(SK: sp.csc_matrix, iterations: int = 8) -> tuple[int, ...]:
    """Rows (nodal directions) that move most in the freest motion u of the forces ``SK``
    (scaled): the eigenvector of SK SK' of least eigenvalue, by inverse iteration on
    SK SK' + 1e-8 I from a fixed start (one sparse factorisation; a mechanism's eigenvalue
    is zero, every other at least about the rank tolerance squared above it)."""
    from scipy.sparse.linalg import splu

    n = SK.shape[0]
    M = (SK @ SK.T + 1e-8 * sp.identity(n)).tocsc()
    try:
        lu = splu(M, permc_spec="MMD_AT_PLUS_A", diag_pivot_thresh=0.0,
                  options={"SymmetricMode": True})
    except RuntimeError:
        return ()
    v = np.random.default_rng(1).standard_normal(n)
    for _ in range(iterations):
        v = lu.solve(v)
        v /= np.linalg.norm(v)
    size = np.abs(v)
    return tuple(int(r) for r in np.flatnonzero(size > MOVING_FRACTION * size.max()))


def _least_norm(M: np.ndarray, b: np.ndarray) -> np.ndarray:
    """Least-squares solution of least norm of M x = b (LAPACK dgelsy: complete orthogonal
    factorisation with column pivoting, rank by ``rcond`` = ``LOCAL_LEAST_SQUARES_RCOND``),
    called directly: at the sizes of a local state (tens of rows) the wrappers cost more
    than the algebra."""
    m, n = M.shape
    rhs = np.zeros((max(m, n), 1))
    rhs[:m, 0] = b
    _, x, _, _, info = dgelsy(M, rhs, np.zeros(n, dtype=np.int32), LOCAL_LEAST_SQUARES_RCOND,
                              64 * (m + n) + 1)
    if info != 0:  # never seen; fall back to the SVD solver
        return np.linalg.lstsq(M, b, rcond=LOCAL_LEAST_SQUARES_RCOND)[0]
    return x[:n, 0]


def _released_factor(S0: sp.csc_matrix):
    """Sparse LU of the scaled (square) released structure, or None when it is singular: a
    pivot below the rank tolerance of the largest means a mechanism."""
    from scipy.sparse.linalg import splu

    try:
        lu = splu(S0.tocsc())
    except RuntimeError:
        return None
    d = np.abs(lu.U.diagonal())
    if d.size and np.any(d <= _RANK_TOL * max(1.0, float(d.max()))):
        return None
    return lu
