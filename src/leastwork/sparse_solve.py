"""The force method on a local self-stress basis, sparse throughout (large structures).

Same equations as :mod:`leastwork.solve`, with the unit redundant states replaced by the
local self-stress states of :mod:`leastwork.selfstress` (columns of N, each closing the
cut of one column): s = s0 + N X, where X are the state amplitudes,

    delta = N' F N,   delta X = -N' (F s0 + e - c)

(Menabrea's least-work theorem with the settlement work); the redundant force at each
closing column is s there. s0 comes from one sparse LU of the released structure (the
columns left after removing every closing column); nodal displacements from the transposed
factorisation, u = -A0^-T (F s + e - c) on the released columns (unit-load method).

No matrix of a size that grows with the structure is ever dense.
"""

from __future__ import annotations

import dataclasses

import numpy as np
import scipy.sparse as sp
from scipy.sparse.linalg import splu

from .basis import Basis, CompatibilitySolver
from .compatibility import flexibility_matrix, jacobi_scaling
from .energy import flexibility_terms
from .errors import CaseError, MechanismError
from .model import Structure
from .selfstress import SelfStressBasis, local_self_stress
from .solution import Solution
from .stability import layout_warnings, soft_spring_warnings
from .superposition import cross_check, solve_cases
from .thresholds import CONDITION_WARN, DENSE_CHECK_MAX_DOFS, LOCAL_STATE_ACCURACY
from .topology import Topology, _keep_order, check_stable, sparse_topology

__all__ = ["solve_local", "SparseReleased", "SparseFlexibilitySolver", "sparse_flexibility",
           "find_basis", "condition_estimate", "raise_unstable", "local_topology",
           "SweepSingular"]


class SweepSingular(MechanismError):
    """The released structure of the local sweep is singular although the structure is
    stable by the dense rank and its stability index: solve on the released basis instead
    (``note`` says so, for the warnings)."""

    def __init__(self, message: str, motions=None, note: str = ""):
        super().__init__(message, motions)
        self.note = note


def sparse_flexibility(st: Structure, topo: Topology) -> sp.csr_matrix:
    """Flexibility F of all columns (ncol x ncol, SI), block diagonal, sparse."""
    rows, cols, vals = [], [], []
    for t in flexibility_terms(st, topo):
        c = np.asarray(t.columns)
        rows.append(np.repeat(c, len(c)))
        cols.append(np.tile(c, len(c)))
        vals.append(t.block.ravel())
    n = len(topo.columns)
    if not rows:
        return sp.csr_matrix((n, n))
    return sp.csr_matrix((np.concatenate(vals), (np.concatenate(rows), np.concatenate(cols))),
                         shape=(n, n))


def find_basis(st: Structure, topo: Topology, *, reactions_first: bool = True,
               **variant) -> SelfStressBasis:
    """The local self-stress basis of the structure (see :mod:`leastwork.selfstress`).

    ``reactions_first=False`` and ``variant`` (keywords of ``local_self_stress``) give the
    variants compared in docs/performance.md; the defaults are the tool's."""
    node_ids = {n: i for i, n in enumerate(st.nodes)}
    neighbours: list[list[int]] = [[] for _ in node_ids]
    for m in st.members.values():
        a, b = node_ids[m.start], node_ids[m.end]
        neighbours[a].append(b)
        neighbours[b].append(a)
    column_nodes = []
    for c in topo.columns:
        if c.kind == "reaction":
            column_nodes.append((node_ids[c.owner],))
        else:
            m = st.members[c.owner]
            column_nodes.append((node_ids[m.start], node_ids[m.end]))
    # reactions kept first at each joint, so that member forces close the states: the
    # released structure then rests on every support (short load paths, well conditioned;
    # keeping member forces first turns a continuous beam into one long cantilever)
    order = _keep_order(st, topo)
    if reactions_first:
        order = [j for j in order if topo.columns[j].kind == "reaction"] + [
            j for j in order if topo.columns[j].kind != "reaction"]
    priority = np.empty(len(topo.columns), dtype=int)
    priority[order] = np.arange(len(topo.columns))
    is_member = np.array([c.kind != "reaction" for c in topo.columns])
    lengths = [st.length(m) for m in st.members]
    lref = float(np.mean(lengths)) if lengths else 1.0
    starts = [node_ids[s.node] for s in st.supports.values()]
    return local_self_stress(topo.A_sparse, topo.dofs, column_nodes, neighbours,
                             priority, is_member, lref, starts, **variant)


def condition_estimate(S: sp.spmatrix, solve, iterations: int = 25) -> float:
    """2-norm condition number of the symmetric positive definite ``S``, estimated as the
    largest eigenvalue (power iteration) over the smallest (inverse iteration with the
    factorised ``solve``), from a fixed start so that the same structure always reports the
    same number. Both iterations approach their eigenvalue from inside, so the estimate is a
    lower bound, usually within a few per cent after these iterations."""
    n = S.shape[0]
    start = np.random.default_rng(0).standard_normal(n) + 1.0
    v = start / np.linalg.norm(start)
    top = 0.0
    for _ in range(iterations):
        w = S @ v
        top = float(v @ w)
        v = w / np.linalg.norm(w)
    v = start / np.linalg.norm(start)
    inv = 0.0
    for _ in range(iterations):
        w = solve(v)
        inv = float(v @ w)
        v = w / np.linalg.norm(w)
    return max(top * inv, 1.0)


class SparseReleased(Basis):
    """The local basis (:class:`leastwork.basis.Basis`): the released structure (square,
    statically determinate) with the sparse LU the sweep made of it when it checked its
    stability, row- and column-scaled as for the rank decisions, and the local self-stress
    states, each closing one column (their amplitudes are the unknowns)."""

    kind = "local"

    def __init__(self, topo: Topology, basis: SelfStressBasis):
        self.topo = topo
        self.keep = np.asarray(basis.released)
        self.redundants = [int(j) for j in basis.closing]
        self.ncol = len(topo.columns)
        # the factor the stability test of the sweep made: scaled A0 = diag(rs) A0 diag(cs)
        self._lu, self.rs, self.cs = basis.factor, basis.row_scale, basis.column_scale
        self.nonzeros = int(self._lu.L.nnz + self._lu.U.nnz)
        self._states = basis.states.tocsc()

    @property
    def redundant_names(self) -> list[str]:
        """Names of the columns the states close."""
        return [self.topo.columns[j].name for j in self.redundants]

    @property
    def amplitudes(self) -> bool:
        """The unknowns are the amplitudes of the local states."""
        return True

    @property
    def state_accuracy(self) -> float:
        """Local states are self-stresses to ``LOCAL_STATE_ACCURACY``."""
        return LOCAL_STATE_ACCURACY

    def states(self) -> sp.csc_matrix:
        """N (ncol, nstates), sparse: the local self-stress states, closing column at 1."""
        return self._states

    def flexibility(self, st: Structure, topo: Topology) -> sp.csr_matrix:
        """F, sparse (:func:`sparse_flexibility`)."""
        return sparse_flexibility(st, topo)

    def compatibility_solver(self, delta, names: list[str], source: str):
        """:class:`SparseFlexibilitySolver` of ``delta``."""
        return SparseFlexibilitySolver(delta, names, source)

    def stability_basis(self, states):
        """The released columns, their sparse LU and ``states``: what the stability index
        needs for the whole-structure test on the local path."""
        import types

        return types.SimpleNamespace(released=self.keep, factor=self._lu, states=states)

    def forces(self, rhs: np.ndarray) -> np.ndarray:
        """Basic forces and reactions (ncol, k) in equilibrium with nodal loads ``rhs``
        (ndof,) or (ndof, k); closing columns carry zero."""
        rhs = np.asarray(rhs, dtype=float)
        one = rhs.ndim == 1
        rhs2 = rhs[:, None] if one else rhs
        y = self._lu.solve(-(self.rs[:, None] * rhs2))
        s = np.zeros((self.ncol, rhs2.shape[1]))
        s[self.keep] = self.cs[:, None] * y
        return s

    def displacements(self, compatible: np.ndarray) -> np.ndarray:
        """Nodal displacements (ndof,) for member deformations less settlements
        ``compatible`` (ncol,): u = -A0^-T compatible[keep] (unit-load method)."""
        y = self._lu.solve(self.cs * compatible[self.keep], trans="T")
        return -self.rs * y


class SparseFlexibilitySolver(CompatibilitySolver):
    """Solve delta X = rhs with the sparse flexibility matrix, Jacobi-scaled and factorised
    once (sparse LU, symmetric ordering); a state with no flexibility is explained and taken
    as zero."""

    def __init__(self, delta: sp.csr_matrix, names: list[str], source: str):
        self.warnings: list[str] = []
        self.source = source
        n = delta.shape[0]
        self.n = n
        self.cond = 1.0
        self.nonzeros = 0
        if n == 0:
            return
        zero, self.D, notes = jacobi_scaling(delta.diagonal(), names,
                                             "the self-stress state closing")
        self.warnings.extend(notes)
        self.zero = zero
        Dm = sp.diags(self.D)
        S = (Dm @ delta @ Dm).tocsc()
        if zero.any():
            Z = sp.diags(zero.astype(float))
            keep = sp.diags((~zero).astype(float))
            S = (keep @ S @ keep + Z).tocsc()
        try:
            self._lu = splu(S, permc_spec="MMD_AT_PLUS_A", diag_pivot_thresh=0.0,
                            options={"SymmetricMode": True})
        except RuntimeError as exc:
            raise CaseError(
                "the flexibility matrix of the local self-stress states is singular (some "
                "combination of states strains no flexible part); solve with "
                "--basis released for the minimum-norm treatment", source=source) from exc
        self.nonzeros = int(self._lu.L.nnz + self._lu.U.nnz)
        self.cond = condition_estimate(S, self._lu.solve)

    def solve(self, rhs: np.ndarray) -> np.ndarray:
        """X for one right-hand side (n,) or several (n, k)."""
        rhs = np.asarray(rhs, dtype=float)
        if self.n == 0:
            return np.zeros(rhs.shape)
        D = self.D if rhs.ndim == 1 else self.D[:, None]
        b = D * rhs
        if self.zero.any():
            b[self.zero] = 0.0
        return D * self._lu.solve(b)


def raise_unstable(st: Structure, topo: Topology, basis: SelfStressBasis):
    """MechanismError naming what moves when the sweep found no non-singular released
    structure. Fewer independent forces than equations is a mechanism outright (named by
    the freest motion the sweep found, or by the dense singular values when it found
    none). A square but singular released structure is decided, up to
    ``DENSE_CHECK_MAX_DOFS`` nodal directions, by the dense rank and the stability index
    (the verdict of the released path): a mechanism raises their MechanismError, a stable
    structure raises :class:`SweepSingular` (solve it on the released basis)."""
    short = len(topo.dofs) - len(basis.released)
    if len(topo.dofs) <= DENSE_CHECK_MAX_DOFS and (short <= 0 or not basis.motion):
        from .stability import assess_stability
        from .topology import build_topology

        dense = build_topology(st)
        check_stable(st, dense)
        if short <= 0:
            assess_stability(st, dense)
            raise SweepSingular(
                f"{st.source}: the released structure found by the self-stress sweep is "
                "singular although the structure is stable", [],
                note="the local self-stress sweep left a nearly singular released structure "
                     "(the structure is close to a mechanism); the released basis was used "
                     "instead")
    moving = [topo.dofs[r] for r in basis.motion]
    count = f"{short} more equation(s) than independent forces" if short > 0 else \
        "the released structure found by the self-stress sweep is singular"
    raise MechanismError(
        f"{st.source}: the structure is unstable (a mechanism): {count}, so some motion needs "
        "no deformation of any member. Add a support, a member or remove a hinge where it "
        "moves.", moving)


def local_topology(st: Structure, say=None, **basis_options
                   ) -> tuple[Topology, SelfStressBasis]:
    """The sparse topology with its degree, internal/external split and stability decided
    by the local self-stress basis, and that basis; a mechanism raises MechanismError
    naming what moves. ``say`` is called with each phase's name."""
    say = say or (lambda phase: None)
    say("equilibrium matrix")
    topo = sparse_topology(st)
    say("self-stress states")
    basis = find_basis(st, topo, **basis_options)
    if not basis.stable:
        raise_unstable(st, topo, basis)
    n = len(basis.closing)
    topo = dataclasses.replace(topo, rank=len(topo.dofs), degree=n, internal=basis.internal,
                               external=n - basis.internal, stable=True)
    return topo, basis


def solve_local(st: Structure, *, verify: bool | None = None, progress=None,
                basis_options: dict | None = None) -> Solution:
    """Solve by the force method on a local self-stress basis (see module docstring).
    ``basis_options``: keywords of :func:`find_basis`, to compare variants only."""
    say = progress or (lambda phase: None)
    topo, basis = local_topology(st, say, **(basis_options or {}))
    layout = layout_warnings(st, topo, basis)  # a mechanism to working precision raises
    say("released structure")
    released = SparseReleased(topo, basis)
    say("flexibility")
    F = sparse_flexibility(st, topo)
    N = released.states()
    delta = flexibility_matrix(N, F)
    names = [topo.columns[j].name for j in basis.closing]
    solver = SparseFlexibilitySolver(delta, names, st.source)
    notes: list[str] = [*layout, *soft_spring_warnings(st, topo, N)]
    if solver.cond > CONDITION_WARN:
        notes.append(f"the flexibility matrix is ill-conditioned (condition number estimate "
                     f"{solver.cond:.2g}): digits of the redundants may be lost; check the "
                     "model for near-mechanisms or members of wildly different stiffness")
    say("load cases")
    red = [int(j) for j in basis.closing]
    results = solve_cases(st, topo, red, N, F, released, solver)
    notes.extend(cross_check(st, results, solver.cond, verify, progress))
    return Solution(st, topo, red, False, N, F, delta, results,
                    warnings=tuple(solver.warnings + notes), released=released,
                    condition=solver.cond, flexibility_solver=solver, basis="local",
                    long_range_states=basis.long_range)
