"""The solve of the direct-stiffness solver: the reduced system after the constraints are
eliminated, its two signs of a mechanism (pivot, condition number), and the results
(displacements, reactions, member end section forces).

Sign conventions (docs/conventions.md): reactions are what the support applies to the
structure; end forces are section forces (n tension positive, m positive with the local
-y face in tension, v = dm/dx) at x = 0 and x = L.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import TYPE_CHECKING

import numpy as np

from ..errors import CaseError, MechanismError
from ..model import Structure, reaction_components
from .assembly import assemble, dof_index
from .constraints import Elimination, constraint_forces, eliminate, rigid_constraints
from .dense import DENSE_MAX_DOFS, diagonal_elimination, one_norm_condition
from .elements import member_end_rotations
from .loads import case_loads

if TYPE_CHECKING:
    import scipy.sparse as sp

__all__ = ["StiffnessResult", "solve_stiffness", "stiffness_dofs"]

#: Smallest accepted pivot of the Jacobi-scaled reduced stiffness (below: a mechanism).
_PIVOT_TOL = 1e-9
#: Largest accepted 1-norm condition number of the Jacobi-scaled reduced stiffness (above:
#: a mechanism that round-off hid from the pivots); the reasoning is at _condition_limit_hit.
_CONDITION_LIMIT = 0.1 / float(np.finfo(float).eps)  # about 4.5e14


@dataclass(frozen=True)
class StiffnessResult:
    """Displacements, reactions and member end section forces of one load case (SI).

    ``displacements``: node -> (ux, uy, rz), rz None where the node has no rotation of its
    own. ``reactions``: node -> {"x", "y", "rz", "n"} as the force method reports them.
    ``end_forces``: member -> ((n, v, m) at x = 0, (n, v, m) at x = L).
    """

    case: str
    displacements: dict[str, tuple[float, float, float | None]]
    reactions: dict[str, dict[str, float]]
    end_forces: dict[str, tuple[tuple[float, float, float], tuple[float, float, float]]]
    #: nonzeros of the sparse LU factors of the reduced stiffness (L with its unit
    #: diagonal, as stored, plus U); 0 when nothing is left to solve
    factor_nonzeros: int = 0
    #: estimated 1-norm condition number of the Jacobi-scaled reduced stiffness matrix:
    #: member forces from displacement differences lose about this times eps
    condition: float = 1.0


def stiffness_dofs(structure: Structure) -> int:
    """Number of free degrees of freedom (after the rigid constraints are eliminated)."""
    index = dof_index(structure)
    cons = rigid_constraints(structure, index, {}, {})
    elim = eliminate(len(index), cons, dense=len(index) <= DENSE_MAX_DOFS)
    return len(index) - (len(cons) - len(elim.dependent))


def _motion_names(index: dict[str, int], vec: np.ndarray, lref: float) -> list[str]:
    """Dofs that take part in a motion vector (rotations weighted by a member length)."""
    names = list(index)
    size = np.array([abs(v) * (lref if n.endswith(".rz") else 1.0) for n, v in zip(names, vec)])
    top = size.max() if size.size else 0.0
    if top == 0.0:
        return []
    return [n for n, v in zip(names, size) if v > 1e-6 * top]


def _mechanism(st: Structure, index, elim: Elimination, A: sp.csc_matrix,
               D: np.ndarray, lref: float, detail: str) -> MechanismError:
    """A MechanismError naming the free motion, found by shifted inverse iteration."""
    n = A.shape[0]
    motion: list[str] = []
    try:
        if isinstance(A, np.ndarray):
            shifted = A + 1e-8 * np.identity(n)

            def solve(v):
                return np.linalg.solve(shifted, v)
        else:
            import scipy.sparse as sp
            from scipy.sparse.linalg import splu

            solve = splu((A + 1e-8 * sp.identity(n, format="csc")).tocsc()).solve
        x = np.random.default_rng(0).standard_normal(n)
        for _ in range(3):
            x = solve(x)
            x /= np.linalg.norm(x)
        motion = _motion_names(index, elim.T @ (D * x), lref)
    except (RuntimeError, np.linalg.LinAlgError):  # should not be singular; name nothing
        motion = []
    return MechanismError(
        f"{st.source}: the structure is unstable (a mechanism): its stiffness matrix is "
        f"singular ({detail}). Add a support, a member or remove a hinge where it moves.",
        motion)


def _scaled_condition(A: sp.csc_matrix, lu, b: np.ndarray, y: np.ndarray) -> float:
    """Estimate of the 1-norm condition number ||A||_1 ||A^-1||_1 of the factored matrix.

    ||A^-1||_1 is estimated from the factors by scipy's ``onenormest`` with one column (the
    Hager estimate: a few solves, deterministic, a lower bound), raised to
    ||y||_1 / ||b||_1 of the solve at hand (also a lower bound of ||A^-1||_1)."""
    from scipy.sparse.linalg import LinearOperator, onenormest

    n = A.shape[0]
    inverse = LinearOperator((n, n), matvec=lu.solve,
                             rmatvec=lambda v: lu.solve(v, trans="T"), dtype=float)
    inv_norm = float(onenormest(inverse, t=1))
    b_norm = float(np.abs(b).sum())
    if b_norm > 0.0:
        inv_norm = max(inv_norm, float(np.abs(y).sum()) / b_norm)
    return float(abs(A).sum(axis=0).max()) * inv_norm


def _condition_limit_hit(cond: float) -> bool:
    """Second sign of a mechanism: the scaled stiffness is singular to working precision.

    Why a limit tied to the machine precision eps rather than a fixed amplification:

    * a mechanism is a zero eigenvalue of the (positive semi-definite) scaled stiffness A.
      Elimination is backward stable (what is factored is A + E with ||E|| of order
      eps ||A||; from memory: Higham, Accuracy and Stability of Numerical Algorithms,
      ch. 9 and 10), so the zero survives as an eigenvalue of order eps ||A||, of either
      sign, and the condition number of the factored matrix is of order 1/eps whatever the
      size. Its pivot need not be tiny: with one panel of a 3000-panel truss left unbraced
      the smallest pivot was -2e-7 (round-off grows with size, and its sign is luck); the
      estimate below was 1.7e16 (4 / eps) or more on every mechanism tried, from 3 to
      40000 dofs;
    * a stable but slender structure is legitimately ill-conditioned: the condition number
      of a chain of n panels or spans that bends as a whole grows like n^4 (the ratio of
      its stiffest to its softest mode); braced_truss(1000) of benchmarks/generators.py
      has 1.3e11, braced_truss(3000) 1.0e13, braced_truss(5000) 8e13. The fixed ratio of
      response to load used before (1e9) called that truss a mechanism from about 450
      panels, and a load-dependent ratio cannot tell a mechanism from a slender truss
      anyway (both gave 2e12 at 3000 panels);
    * above 0.1 / eps the error bound cond * eps of the displacements exceeds 10 %: double
      precision no longer tells such a structure from a singular one, so calling it a
      mechanism states what this solver can resolve. The margin is about 40 both to the
      mechanisms and to braced_truss(3000).

    The estimate is a lower bound (Hager), so a mechanism can only be missed if the
    estimate is off by more than that margin; the pivot test before it stays the first sign.
    """
    return not math.isfinite(cond) or cond > _CONDITION_LIMIT


def _solve_reduced(st: Structure, index, elim: Elimination, K, rhs: np.ndarray,
                   lref: float) -> tuple[np.ndarray, int, float]:
    """Solve (T' K T) x = rhs: Jacobi-scaled sparse LU with diagonal pivots, which are then
    all positive for a stable structure; a tiny or negative pivot, or a condition number
    no double-precision solve resolves, is a mechanism. Returns x, the nonzeros of the
    factors and the estimated condition number of the scaled stiffness."""
    if isinstance(K, np.ndarray):
        return _solve_reduced_dense(st, index, elim, K, rhs, lref)
    import scipy.sparse as sp
    from scipy.sparse.linalg import splu

    Kr = (elim.T.T @ K @ elim.T).tocsc()
    nm = Kr.shape[0]
    if nm == 0:
        return np.zeros(0), 0, 1.0
    diag = Kr.diagonal()
    ok = diag > 0.0
    D = 1.0 / np.sqrt(np.where(ok, diag, 1.0))
    A = (sp.diags(D) @ Kr @ sp.diags(D)).tocsc()
    if not ok.all():
        raise _mechanism(st, index, elim, A, D, lref, "a free direction has no stiffness")
    try:
        lu = splu(A, permc_spec="MMD_AT_PLUS_A", diag_pivot_thresh=0.0,
                  options={"SymmetricMode": True})
    except RuntimeError:
        raise _mechanism(st, index, elim, A, D, lref, "exactly singular") from None
    smallest = float(lu.U.diagonal().min())
    if smallest <= _PIVOT_TOL:
        raise _mechanism(st, index, elim, A, D, lref, f"smallest scaled pivot {smallest:.3g}")
    b = D * rhs
    y = lu.solve(b)
    y += lu.solve(b - A @ y)  # one step of iterative refinement
    # a pivot can hide a zero eigenvalue (round-off of the elimination): the second sign
    cond = _scaled_condition(A, lu, b, y)
    if _condition_limit_hit(cond):
        raise _mechanism(st, index, elim, A, D, lref,
                         f"estimated condition number {cond:.2g} of the scaled stiffness, "
                         "singular to working precision")
    return D * y, int(lu.L.nnz + lu.U.nnz), cond


def _solve_reduced_dense(st: Structure, index, elim: Elimination, K: np.ndarray,
                         rhs: np.ndarray, lref: float) -> tuple[np.ndarray, int, float]:
    """:func:`_solve_reduced` with dense arrays (a small structure, :mod:`.dense`): the same
    scaling and the same two signs of a mechanism, the pivots in the natural order."""
    Kr = elim.T.T @ K @ elim.T
    nm = Kr.shape[0]
    if nm == 0:
        return np.zeros(0), 0, 1.0
    diag = Kr.diagonal()
    ok = diag > 0.0
    D = 1.0 / np.sqrt(np.where(ok, diag, 1.0))
    A = D[:, None] * Kr * D[None, :]
    if not ok.all():
        raise _mechanism(st, index, elim, A, D, lref, "a free direction has no stiffness")
    try:
        pivots, nonzeros = diagonal_elimination(A)
    except ZeroDivisionError:
        raise _mechanism(st, index, elim, A, D, lref, "exactly singular") from None
    smallest = float(pivots.min())
    if smallest <= _PIVOT_TOL:
        raise _mechanism(st, index, elim, A, D, lref, f"smallest scaled pivot {smallest:.3g}")
    b = D * rhs
    y = np.linalg.solve(A, b)
    y += np.linalg.solve(A, b - A @ y)  # one step of iterative refinement
    cond = one_norm_condition(A)
    if _condition_limit_hit(cond):
        raise _mechanism(st, index, elim, A, D, lref,
                         f"condition number {cond:.2g} of the scaled stiffness, singular "
                         "to working precision")
    return D * y, nonzeros, cond


def _reactions(st: Structure, U: np.ndarray, force_of: dict[str, float],
               springs) -> dict[str, dict[str, float]]:
    """Reactions in the force method's layout: per support, "x"/"y"/"rz", and "n" with its
    "x", "y" components for an inclined roller."""
    spring_force = {r.name: -r.stiffness * (sum(a * U[d] for d, a in row.items()) - ground)
                    for r, row, ground in springs}

    def value_of(r) -> float:
        return spring_force.get(r.name, 0.0) if r.is_spring else force_of.get(r.name, 0.0)

    return {sup.node: reaction_components(sup, value_of) for sup in st.supports.values()}


def _end_forces(U: np.ndarray, elements: dict[str, tuple], force_of: dict[str, float]):
    """Section forces (n, v, m) at both ends of every member from its end displacements."""
    out = {}
    for mid, (el, k, f0, T, g) in elements.items():
        d = member_end_rotations(k, f0, el.springs,
                                 T @ np.array([U[i] if i >= 0 else 0.0 for i in g]))
        h = el.hinged
        if h:
            c = [i for i in range(6) if i not in h]
            d[h] = -np.linalg.solve(k[np.ix_(h, h)], k[np.ix_(h, c)] @ d[c] + f0[h])
        f = k @ d + f0  # forces the nodes apply to the member ends, local
        if el.EA is None:
            N = -force_of.get(f"{mid}.n", 0.0)
            f[0] -= N
            f[3] += N
        out[mid] = ((float(-f[0]), float(f[1]), float(-f[2])),
                    (float(f[3]), float(-f[4]), float(f[5])))
    return out


def solve_stiffness(structure: Structure, case: str) -> StiffnessResult:
    """Solve load case ``case`` of ``structure`` by the direct stiffness method.

    Raises
    ------
    MechanismError
        The structure can move without deforming (singular stiffness), or a couple acts on
        a node with no rotation of its own.
    CaseError
        An imposed deformation (settlement, temperature, misfit) that rigid parts cannot
        follow; or a bar carries a span load.

    Where axially rigid beams and rigid supports over-constrain each other (a rigid beam
    between two pins, say), the force they could exchange is not determined by stiffness;
    the constraint found dependent (supports are eliminated first, then members) carries
    none, as the force method takes a redundant without flexibility as zero.
    """
    st = structure
    index = dof_index(st)
    lref = max((st.length(m) for m in st.members), default=1.0)
    loads = case_loads(st, index, case)
    dense = len(index) <= DENSE_MAX_DOFS  # small: numpy's dense solves, scipy not loaded
    asm = assemble(st, index, loads, dense=dense)
    elim = eliminate(len(index), rigid_constraints(st, index, loads.settle, asm.elongations),
                     dense=dense)
    for con, resid in elim.dependent:
        if abs(resid) > 1e-12 * max(lref, 1.0):
            names = ", ".join(c.name for c, _ in elim.dependent)
            raise CaseError(f"an imposed deformation ({resid:.6g} along {con.name}) acts on "
                            f"rigid parts that cannot follow it ({names}): axially rigid "
                            "members and rigid supports over-constrain each other",
                            source=st.source)
    rhs = elim.T.T @ (asm.p - asm.f0 - asm.K @ elim.t)
    x, factor_nonzeros, condition = _solve_reduced(st, index, elim, asm.K, rhs, lref)
    U = elim.T @ x + elim.t
    force_of = constraint_forces(elim, asm.K @ U + asm.f0 - asm.p)
    displacements = {}
    for nid in st.nodes:
        rz = index.get(f"{nid}.rz")
        displacements[nid] = (float(U[index[f"{nid}.x"]]), float(U[index[f"{nid}.y"]]),
                              float(U[rz]) if rz is not None else None)
    return StiffnessResult(case, displacements, _reactions(st, U, force_of, asm.springs),
                           _end_forces(U, asm.elements, force_of), factor_nonzeros, condition)
