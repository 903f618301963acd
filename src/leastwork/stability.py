"""Near-mechanisms: how close the geometry of a stable structure comes to a mechanism.

One criterion, the same on every path (``leastwork check``, the released basis and the
local basis all call :func:`assess_stability` on the same sparse equilibrium matrix), and
independent of the units, of the overall size and of the number of members
(docs/method.md §11):

* the equilibrium matrix is scaled as for every rank decision: rows of moments divided by
  the mean member length, every column (a basic force or a reaction) to unit norm;
* **member test**: for each member, the rows of its two joints and every column acting on
  them (the member, the other members at those joints, their supports), all joints beyond
  held fixed. The smallest singular value of that block is the member's *stability
  index*: some load on those two joints needs forces of at least 1/index times itself (in
  the scaled units, where a force counts about its own size). Small for two bars almost in
  line between two pins, a roller whose surface nearly points along the only bar at its
  joint, a roller that barely stops a beam turning about a pin;
* **support test**: for each connected part of the structure, its supports as if the part
  were rigid: the reaction directions (each of unit size) applied to the three rigid
  motions (two translations of unit size, a turn about the supports' centroid moving the
  farthest support by one). Its smallest singular value is small when the supports are
  nearly concurrent or parallel;
* the **stability index** of the structure is the smallest of these. At or below
  :data:`MECHANISM_INDEX` the structure is a mechanism to working precision (exit status
  3, naming what moves); below :data:`NEAR_MECHANISM_INDEX` it is solved with a loud
  warning.

Each block holds one member's joints or one part's supports, so a long truss has the same
index in its thousandth panel as in its first: unlike the smallest singular value of the
whole matrix (which falls like 1/panels^2 on a long truss with no near-mechanism at all),
the index measures geometry, not size. A near-mechanism neither test sees (several rigid
members turning together about internal hinges) is left to the rank decision of each path
and to the direct-stiffness cross-check.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import TYPE_CHECKING

import numpy as np

from .arrays import median
from .elements import kind_of
from .errors import MechanismError
from .scaling import scaled_dense, scaled_equilibrium
from .thresholds import INDEX_RECHECK as _RECHECK
from .thresholds import MECHANISM_INDEX, NEAR_MECHANISM_INDEX, SLIDING_TURN, SOFT_SPRING_RATIO
from .thresholds import MOVING_FRACTION as _MOVING
from .thresholds import ZERO_STATE_ENTRY as _ZERO_STATE

if TYPE_CHECKING:
    import scipy.sparse as sp

__all__ = ["MECHANISM_INDEX", "NEAR_MECHANISM_INDEX", "WeakSpot", "weakest_spot",
           "assess_stability", "layout_warnings", "size_factor", "smallest_singular_value",
           "soft_spring_warnings"]

#: Stiffness of the dummy rows that pad every member block to six rows (the scaled blocks
#: have singular values of a few units at most, so a dummy is never the smallest).
_DUMMY = 1e3
#: Member blocks per batch of the eigenvalue computation (memory: 288 bytes each).
_BATCH = 50_000


@dataclass(frozen=True)
class WeakSpot:
    """The place where the structure comes nearest to a mechanism."""

    index: float  #: stability index of the block (module docstring)
    kind: str  #: "whole", "member" or "supports"
    where: str  #: the member id, or the first supported joint of the part
    motion: tuple[str, ...]  #: nodal directions that move most in the weak motion
    detail: str = ""  #: the rigid motion in words (support test)

    def describe(self) -> str:
        """Where and what, in words (user ids through ``literal``)."""
        from .plaintext import literal

        moving = ", ".join(literal(m, 40) for m in self.motion[:8]) or "not identified"
        if len(self.motion) > 8:
            moving += f" and {len(self.motion) - 8} more"
        if self.kind == "whole":
            return (f"the whole structure can nearly move without straining anything (moving: "
                    f"{moving}): hinges, members or supports almost in line, a flat arch or "
                    "chain")
        if self.kind == "member":
            return (f"at member {literal(self.where, 40)} the joints can nearly move without "
                    f"straining anything (moving: {moving}): members or supports there are "
                    "almost in line")
        return (f"the supports of the part holding joint {literal(self.where, 40)} are almost "
                f"concurrent or parallel: the part can nearly move as a rigid body "
                f"({self.detail}; moving: {moving})")


def _layout(st) -> tuple[list[str], np.ndarray, np.ndarray, np.ndarray]:
    """Joint ids, their coordinates (n, 2), and each member's start and end joint index."""
    ids = list(st.nodes)
    index = {n: i for i, n in enumerate(ids)}
    xy = np.array([(nd.x, nd.y) for nd in st.nodes.values()], dtype=float).reshape(-1, 2)
    members = list(st.members.values())
    a = np.fromiter((index[m.start] for m in members), dtype=int, count=len(members))
    b = np.fromiter((index[m.end] for m in members), dtype=int, count=len(members))
    return ids, xy, a, b


def _lengths(xy: np.ndarray, a: np.ndarray, b: np.ndarray) -> np.ndarray:
    return np.hypot(xy[b, 0] - xy[a, 0], xy[b, 1] - xy[a, 1])


def _size_factor(xy: np.ndarray, lref: float) -> float:
    span = float(np.hypot(*(xy.max(axis=0) - xy.min(axis=0)))) if len(xy) else 0.0
    return max(span / lref, 1.0) ** 2


def size_factor(st) -> float:
    """(D / l)^2, D the diagonal of the box around the joints and l the mean member length
    (at least 1): a structure of that size can need forces of that order times a load from
    bending alone (the smallest singular value of a long slender truss's scaled equilibrium
    matrix falls like 1 / panels^2; times this factor it stays near 2.5)."""
    _, xy, a, b = _layout(st)
    if not len(a):
        return 1.0
    return _size_factor(xy, float(np.mean(_lengths(xy, a, b))))


def _joint_rows(ids: list[str], topo) -> np.ndarray:
    """(joints, 3): the row of x, y and rz of each joint; -1 where it has none."""
    di = topo.dof_index
    return np.array([[di.get(f"{n}.{d}", -1) for d in ("x", "y", "rz")] for n in ids],
                    dtype=int).reshape(-1, 3)


def _member_spot(st, topo, S: sp.csr_matrix, ids, a, b) -> WeakSpot | None:
    """The weakest member block (module docstring), or None without members."""
    if not len(a):
        return None
    rows = _joint_rows(ids, topo)
    R = np.hstack([rows[a], rows[b]])  # (members, 6)
    ndof = S.shape[0]
    # a missing row becomes a dummy of its own, uncoupled and far stiffer than any real one,
    # so that every block has the same size and the dummies never give the smallest value
    dummy = ndof + np.arange(6)
    R = np.where(R < 0, dummy[None, :], R)
    if isinstance(S, np.ndarray):  # the dense path (a small structure): no scipy
        K = np.zeros((ndof + 6, ndof + 6))
        K[:ndof, :ndof] = S @ S.T
        K[ndof:, ndof:] = _DUMMY * np.identity(6)
    else:
        import scipy.sparse as sp

        K = sp.block_diag([S @ S.T, _DUMMY * sp.identity(6)], format="csr")
    index = np.zeros(len(a))
    for lo in range(0, len(a), _BATCH):
        Rb = R[lo:lo + _BATCH]
        ii = np.repeat(Rb, 6, axis=1).ravel()
        jj = np.tile(Rb, (1, 6)).ravel()
        G = np.asarray(K[ii, jj]).reshape(len(Rb), 6, 6)
        index[lo:lo + len(Rb)] = np.sqrt(np.clip(np.linalg.eigvalsh(G)[:, 0], 0.0, None))
    mids = list(st.members)
    best: WeakSpot | None = None
    for i in np.flatnonzero(index < _RECHECK):
        value, motion = _block_index(S, [int(r) for r in R[i] if r < ndof], topo.dofs)
        if best is None or value < best.index:
            best = WeakSpot(value, "member", mids[i], motion)
    if best is None:
        i = int(np.argmin(index))
        best = WeakSpot(float(index[i]), "member", mids[i], ())
    return best


def _block_index(S: sp.csr_matrix, rows: list[int], dofs) -> tuple[float, tuple[str, ...]]:
    """Smallest singular value of the rows ``rows`` of ``S`` (every column acting on them),
    and the directions moving most in the weakest motion."""
    block = S[rows, :]
    if isinstance(block, np.ndarray):
        M = block[:, np.flatnonzero((block != 0.0).any(axis=0))]
    else:
        M = block[:, np.unique(block.indices)].toarray()
    if M.shape[1] < M.shape[0]:
        M = np.hstack([M, np.zeros((M.shape[0], M.shape[0] - M.shape[1]))])
    u, sv, _ = np.linalg.svd(M, full_matrices=False)
    mode = np.abs(u[:, -1])
    motion = tuple(dofs[r] for r, v in zip(rows, mode, strict=True) if v >= _MOVING * mode.max())
    return float(sv[-1]), motion


def _parts(ids: list[str], a: np.ndarray, b: np.ndarray, sparse: bool = True) -> np.ndarray:
    """The part (connected component of the member graph) of each joint, as a label: by
    scipy's graph search (``sparse``), else by union-find in plain Python (the dense path's
    small structures, without scipy)."""
    if not sparse:
        parent = list(range(len(ids)))

        def root(i: int) -> int:
            while parent[i] != i:
                parent[i] = parent[parent[i]]
                i = parent[i]
            return i

        for i, j in zip(a.tolist(), b.tolist(), strict=True):
            ri, rj = root(i), root(j)
            if ri != rj:
                parent[ri] = rj
        return np.array([root(i) for i in range(len(ids))], dtype=int)
    import scipy.sparse as sp
    from scipy.sparse.csgraph import connected_components

    n = len(ids)
    g = sp.coo_matrix((np.ones(len(a)), (a, b)), shape=(n, n))
    return connected_components(g, directed=False)[1]


def _support_spot(st, topo, ids, xy, a, b, lref: float) -> WeakSpot | None:
    """The part whose supports come nearest to concurrent or parallel (module docstring)."""
    if not topo.restraints:
        return None
    index = {n: i for i, n in enumerate(ids)}
    label = _parts(ids, a, b, sparse=topo.A_sparse is not None)
    node = np.array([index[r.node] for r in topo.restraints], dtype=int)
    vec = np.array([r.vector for r in topo.restraints], dtype=float)
    best = None
    for part in sorted(set(label[node].tolist())):  # np.unique would load numpy.ma
        pick = np.flatnonzero(label[node] == part)
        if len(pick) < 3:
            continue  # fewer than three restraints: a mechanism, found by the rank
        p = xy[node[pick]]
        c = p.mean(axis=0)
        spread = max(float(np.max(np.linalg.norm(p - c, axis=1))), lref)
        vx, vy, vr = vec[pick].T
        d = p - c
        # each restraint's unit column of S against the rigid motions (two unit
        # translations; the turn 1/spread about c, its rotation rows scaled as S's: times
        # lref): the reaction's work in each
        M = np.column_stack([vx, vy, (d[:, 0] * vy - d[:, 1] * vx + vr) / spread])
        M /= np.sqrt(vx * vx + vy * vy + (vr / lref) ** 2)[:, None]
        _, sv, vt = np.linalg.svd(M, full_matrices=False)
        if best is None or sv[-1] < best[0]:
            best = (float(sv[-1]), pick, vt[-1], p, c, spread)
    if best is None:
        return None
    value, pick, mode, p, c, spread = best
    nodes = [topo.restraints[int(k)].node for k in pick]
    moving = _rigid_moving(mode, p, c, spread, nodes) if value < NEAR_MECHANISM_INDEX else ()
    return WeakSpot(value, "supports", nodes[0], moving, _rigid_motion(mode, c, spread, ids, xy))


def _rigid_moving(mode: np.ndarray, p: np.ndarray, c: np.ndarray, spread: float,
                  nodes: list[str]) -> tuple[str, ...]:
    """Directions of the supported joints ``nodes`` (at ``p``) that move most in the rigid
    motion ``mode`` (x, y translation, turn times spread, about ``c``)."""
    tx, ty, turn = mode
    theta = turn / spread
    u = np.column_stack([tx - theta * (p[:, 1] - c[1]), ty + theta * (p[:, 0] - c[0])])
    top = float(np.abs(u).max())
    out: dict[str, None] = {}
    for n, (ux, uy) in zip(nodes, u, strict=True):
        for d, v in (("x", ux), ("y", uy)):
            if abs(v) >= _MOVING * top:
                out[f"{n}.{d}"] = None
    return tuple(out)


def _rigid_motion(mode: np.ndarray, c: np.ndarray, spread: float, ids: list[str],
                  xy: np.ndarray) -> str:
    """A rigid motion (x, y translation, turn times spread, about ``c``) in words, the
    centre of a turn named by the nearest joint (no lengths: no units to convert)."""
    from .plaintext import literal

    tx, ty, turn = mode
    if abs(turn) < SLIDING_TURN * max(abs(tx), abs(ty)):
        ang = float(np.degrees(np.arctan2(ty, tx)) % 180.0)
        return f"sliding at {ang:.3g} deg to the x axis"
    theta = turn / spread
    # u(x) = (tx, ty) + theta ez x (x - c) vanishes at the centre x = c + (-ty, tx) / theta
    centre = np.array([c[0] - ty / theta, c[1] + tx / theta])
    near = int(np.argmin(np.hypot(*(xy - centre).T)))
    return f"turning about a point near joint {literal(ids[near], 40)}"


def _global_spot_dense(st, topo, factor: float) -> WeakSpot:
    """The whole structure, from the smallest singular value the dense rank decision found
    (:func:`leastwork.topology.build_topology`), times the size factor."""
    value = topo.sigma_min * factor
    motion: tuple[str, ...] = ()
    if value < NEAR_MECHANISM_INDEX and topo.A is not None:
        u = np.linalg.svd(scaled_dense(topo.A, topo.dofs, st), full_matrices=False)[0][:, -1]
        motion = _moving(u, topo.dofs)
    return WeakSpot(value, "whole", "", motion)


def _moving(u: np.ndarray, dofs) -> tuple[str, ...]:
    size = np.abs(u)
    top = float(size.max()) if size.size else 0.0
    return tuple(dofs[i] for i in np.flatnonzero(size >= _MOVING * top)) if top else ()


def smallest_singular_value(S: sp.csr_matrix, cs: np.ndarray, basis, iterations: int = 60,
                            rtol: float = 1e-10) -> tuple[float, np.ndarray]:
    """The smallest singular value of the scaled equilibrium matrix ``S`` (wide, full row
    rank; column scales ``cs``) and its left singular vector, without a dense matrix.

    Inverse iteration on S S': each step takes the least-norm solution z of S z = x (a
    particular solution by the sparse LU of the released structure of ``basis``, a
    :class:`~leastwork.selfstress.SelfStressBasis`, less its projection on the scaled
    self-stress states Y = diag(1/cs) N, for which S Y = 0), then S' x_new = z on the
    released columns. The value returned is ||S' x|| of the last unit iterate (a Rayleigh
    quotient: never below the true value, equal to it to about ``rtol`` once converged; a
    near-mechanism's value lies far below the next and is found in a few steps). From a
    fixed start: the same structure always gives the same number."""
    import scipy.sparse as sp
    from scipy.sparse.linalg import splu

    ndof, ncol = S.shape
    released = np.asarray(basis.released)
    lu0 = basis.factor
    Y = (sp.diags(1.0 / cs) @ basis.states).tocsc()
    lu_y = None
    if Y.shape[1]:
        lu_y = splu((Y.T @ Y).tocsc(), permc_spec="MMD_AT_PLUS_A", diag_pivot_thresh=0.0,
                    options={"SymmetricMode": True})

    def inverse(x: np.ndarray) -> np.ndarray:
        z = np.zeros(ncol)
        z[released] = lu0.solve(x)
        if lu_y is not None:
            z -= Y @ lu_y.solve(Y.T @ z)
        return lu0.solve(z[released], trans="T")

    x = np.random.default_rng(7).standard_normal(ndof) + 1.0
    x /= np.linalg.norm(x)
    value = float(np.linalg.norm(S.T @ x))
    for _ in range(iterations):
        y = inverse(x)
        size = float(np.linalg.norm(y))
        if not np.isfinite(size) or size == 0.0:
            break
        x = y / size
        new = float(np.linalg.norm(S.T @ x))
        done = abs(new - value) <= rtol * new
        value = new
        if done:
            break
    return value, x


def _global_spot_sparse(S: sp.csr_matrix, cs: np.ndarray, basis, dofs,
                        factor: float) -> WeakSpot:
    """The whole structure on the local path: :func:`smallest_singular_value` times the
    size factor."""
    sigma, u = smallest_singular_value(S, cs, basis)
    value = sigma * factor
    return WeakSpot(value, "whole", "", _moving(u, dofs) if value < NEAR_MECHANISM_INDEX
                    else ())


def weakest_spot(st, topo, basis=None) -> WeakSpot | None:
    """The smallest stability index of the three tests (module docstring), where and how
    it moves; None for a structure with neither members nor supports. The whole-structure
    test takes the smallest singular value the dense rank decision found when ``topo`` has
    it, else ``basis`` (the local self-stress basis) for the sparse estimate; without
    either it is left out."""
    ids, xy, a, b = _layout(st)
    lref = float(np.mean(_lengths(xy, a, b))) if len(a) else 1.0
    S, cs = scaled_equilibrium(topo, lref)
    factor = _size_factor(xy, lref) if len(a) else 1.0
    spots = [_member_spot(st, topo, S, ids, a, b), _support_spot(st, topo, ids, xy, a, b, lref)]
    if np.isfinite(topo.sigma_min):
        spots.append(_global_spot_dense(st, topo, factor))
    elif basis is not None and basis.factor is not None and S.shape[0]:
        spots.append(_global_spot_sparse(S, cs, basis, topo.dofs, factor))
    spots = [s for s in spots if s is not None]
    return min(spots, key=lambda s: s.index) if spots else None


def assess_stability(st, topo, basis=None) -> list[str]:
    """Warnings about a near-mechanism of a structure its rank found stable (see
    :func:`weakest_spot` for ``basis``); raises MechanismError when the stability index is
    at or below :data:`MECHANISM_INDEX`."""
    spot = weakest_spot(st, topo, basis)
    if spot is None or spot.index >= NEAR_MECHANISM_INDEX:
        return []
    amplification = 1.0 / max(spot.index, 1e-300)
    if spot.index <= MECHANISM_INDEX:
        raise MechanismError(
            f"{st.source}: the structure is a mechanism to working precision: "
            f"{spot.describe()} (stability index {spot.index:.1e}, at or below "
            f"{MECHANISM_INDEX:.0e}: some load would need forces of the order of "
            f"{amplification:.0e} times itself). Move the joints off the line, add a member "
            "or a support.", list(spot.motion))
    return [f"NEAR-MECHANISM: {spot.describe()} (stability index {spot.index:.1e}; warned "
            f"below {NEAR_MECHANISM_INDEX:.0e}). Some load there needs forces of the order of "
            f"{amplification:.0e} times itself, from geometry alone, and the answer changes "
            "with the smallest change of geometry: check the model before using these "
            "results (a near-mechanism)"]


def layout_warnings(st, topo, basis=None) -> list[str]:
    """Warnings that depend only on the layout, the same on every path: a near-mechanism
    (:func:`assess_stability`, which raises MechanismError for a mechanism to working
    precision; ``basis``: the local self-stress basis on the local path) and members that
    overlap or pass through a joint (:func:`leastwork.geometry_checks.overlap_warnings`)."""
    from .geometry_checks import overlap_warnings

    return [*assess_stability(st, topo, basis), *overlap_warnings(st)]


def soft_spring_warnings(st, topo, states, ratio: float = SOFT_SPRING_RATIO) -> list[str]:
    """Springs without which the structure is a mechanism (no self-stress state, of the
    released or the local basis alike, passes through them: their row of ``states`` is
    zero) and whose stiffness is below ``ratio`` times the members' (median EA/L, EI/L^3):
    the structure stands only on that spring."""
    soft = [(j, c) for j, c in enumerate(topo.columns) if c.kind == "reaction"
            and topo.restraints[c.restraint_index].is_spring]
    if not soft:
        return []
    member_k = []
    for m in st.members.values():
        L = st.length(m.id)
        section = kind_of(m).section(m, m, False)
        if section.get("n") is not None and not callable(section["n"]):
            member_k.append(section["n"] / L)
        if section.get("m") and not callable(section["m"]):
            member_k.append(section["m"] / L ** 3)
    if not member_k:
        return []
    k_ref = median(member_k)
    lmax = max(st.length(m) for m in st.members)
    rows = None
    if not isinstance(states, np.ndarray):  # a scipy.sparse matrix (the local basis)
        import scipy.sparse as sp

        rows = sp.csr_matrix(states)
    out = []
    for j, c in soft:
        r = topo.restraints[c.restraint_index]
        kdim = r.stiffness if r.direction != "rz" else r.stiffness / lmax ** 2
        if kdim >= ratio * k_ref:
            continue
        row = rows[j].toarray().ravel() if rows is not None else np.asarray(states)[j]
        if np.all(np.abs(row) <= _ZERO_STATE):
            out.append(f"the structure stands only on spring {c.name}, whose stiffness is "
                       f"{kdim / k_ref:.1e} of the members' (median EA/L, EI/L^3): a "
                       "near-mechanism; large displacements and a poorly determined answer "
                       "are to be expected")
    return out
