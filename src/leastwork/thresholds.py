"""Every numeric decision threshold of the force method, in one place.

A threshold here decides something: a path, a rank, a mechanism, a warning, a value taken
as zero. Constants of a formula (machine epsilon, the padding of a block, a floor that only
avoids a division by zero, an iteration count) stay beside their formula. Ratios are
dimensionless unless a unit is given; "scaled" means the equilibrium matrix scaled as for
every rank decision (:mod:`leastwork.scaling`: moment rows over the mean member length,
columns of unit norm).

Imported by the modules that decide (``solve``, ``compatibility``, ``sparse_solve``,
``selfstress``, ``stability``, ``topology``, ``solution``, ``fields``); this module imports
nothing of the package.
"""

from __future__ import annotations

__all__ = [
    "LOCAL_BASIS_MIN_COLUMNS", "NUMPY_LU_MAX", "DENSE_CHECK_MAX_DOFS", "CONDITION_WARN",
    "BETTER_CONDITION_FACTOR", "NO_FLEXIBILITY", "SINGULAR_FLEXIBILITY",
    "INCOMPATIBLE_RESIDUAL", "RANK_ROUND_OFF", "GOOD_PIVOT", "MECHANISM_MOTION",
    "MECHANISM_INDEX", "NEAR_MECHANISM_INDEX", "INDEX_RECHECK", "MOVING_FRACTION",
    "SLIDING_TURN", "SOFT_SPRING_RATIO", "ZERO_STATE_ENTRY", "RELEASED_PIVOT_SINGULAR",
    "LOCAL_STATE_RESIDUAL", "LOCAL_STATE_BOUND", "STATE_ENTRY_DROP",
    "LOCAL_LEAST_SQUARES_RCOND", "LOCAL_STATE_ACCURACY", "EQUILIBRIUM_ROUND_OFF",
    "FORCE_FLOOR", "EXTREME_TIE", "EXTREME_TIE_FLOOR", "ONE_WAY_FORCE", "ONE_WAY_GAP",
    "ONE_WAY_TRIALS_PER_ITEM", "ONE_WAY_TRIALS_MIN",
]

# ---------------------------------------------------------------- which basis

#: Basic forces and reactions (count) above which ``solve(basis="auto")`` takes the local
#: self-stress basis (sparse path, :mod:`leastwork.sparse_solve`) when no redundants are
#: named.
LOCAL_BASIS_MIN_COLUMNS = 1500

#: Equations of a released structure up to which numpy's dense LU solves it afresh at each
#: solve (a few per load case, each well under a millisecond), so that a small solve does
#: not import scipy (0.1-0.2 s of start-up); larger ones are factorised once by scipy.
NUMPY_LU_MAX = 100
#: Nodal directions (count) up to which a structure whose local sweep found no non-singular
#: released structure is decided by the dense rank (and, if stable, solved on the released
#: basis instead): one verdict for the two paths.
DENSE_CHECK_MAX_DOFS = 3000

# ---------------------------------------------------------------- compatibility equations

#: Jacobi-scaled condition number of the flexibility matrix above which the choice of
#: redundants is questioned and a warning given (about half of double precision's 16 digits
#: would be lost).
CONDITION_WARN = 1e8
#: An alternative set of redundants replaces an ill-conditioned automatic choice when its
#: condition number is smaller by more than this factor.
BETTER_CONDITION_FACTOR = 10
#: An unknown of the compatibility equations whose flexibility (diagonal of delta) is at or
#: below this fraction of the largest has no flexibility: taken as zero, with a warning.
NO_FLEXIBILITY = 1e-12
#: Eigenvalues of the Jacobi-scaled dense flexibility matrix at or below this fraction of the
#: largest are zero: the matrix is singular there and the minimum-norm solution is used.
SINGULAR_FLEXIBILITY = 1e-11
#: The compatibility equations have no solution when the part of a (scaled) right-hand side
#: on a zero eigenvalue exceeds this fraction of its largest entry.
INCOMPATIBLE_RESIDUAL = 1e-9

# ---------------------------------------------------------------- rank and mechanisms

#: Round-off floor of the rank tolerance: a singular value of the scaled equilibrium matrix
#: at or below this is zero whatever the structure's size; also the residual below which no
#: further independent column exists in the choice of redundants.
RANK_ROUND_OFF = 1e-13
#: A column of the scaled equilibrium matrix is clearly independent of those kept when its
#: residual (its own norm being 1) exceeds this: the choice of redundants and the local
#: sweep keep such columns first.
GOOD_PIVOT = 1e-3
#: A nodal direction takes part in a mechanism (dense rank decision) when it moves more than
#: this fraction of the largest motion.
MECHANISM_MOTION = 1e-6
#: At or below this stability index the structure is taken as a mechanism: some load needs
#: forces of at least 1/index = 1e8 times itself, and the stiffness of the weak motion is
#: of the order of index^2 = 1e-16 of the members' (the round-off of double precision), so
#: no linear analysis can resolve it.
MECHANISM_INDEX = 1e-8
#: Below this stability index a stable structure is solved with a near-mechanism warning:
#: some load at the weak place needs forces of over a thousand times itself, from geometry
#: alone. Ordinary structures lie far above it (bundled cases 0.19 and up; generated
#: trusses, grids and frames of 10^5 members 0.3 and up; docs/verification.md).
NEAR_MECHANISM_INDEX = 1e-3
#: Member blocks whose index from the Gram matrix (S S' of the block) is below this are
#: recomputed from the block itself by singular values: the Gram matrix squares the index
#: and loses its digits below about 1e-7.
INDEX_RECHECK = 3e-3
#: A nodal direction takes part in a weak or free motion (stability index, local sweep) when
#: it moves at least this fraction of the largest.
MOVING_FRACTION = 0.3
#: A rigid motion of a supported part whose turn (times the supports' spread) is below this
#: fraction of its translation is described as sliding, not turning.
SLIDING_TURN = 1e-3
#: A spring no self-stress state passes through warns when its stiffness is below this
#: fraction of the members' (median EA/L, EI/L^3): the structure stands only on it.
SOFT_SPRING_RATIO = 1e-6
#: A spring is in no self-stress state when its entry in every state (each with its closing
#: force at 1) is at most this.
ZERO_STATE_ENTRY = 1e-9

# ---------------------------------------------------------------- local self-stress states

#: A pivot of the sparse LU of the scaled released structure at or below this fraction of
#: the largest (at least 1) means the released structure of the sweep is singular.
RELEASED_PIVOT_SINGULAR = 1e-9
#: A column is reproduced by a local set of columns (a state) when the residual, the column
#: having unit norm, is at or below this (round-off level: an exact self-stress leaves about
#: 1e-15). A nearly straight chain between two pins is nearly dependent locally (residuals
#: of 1e-9 were seen) while its exact self-stress runs further: such a column is not closed
#: locally (the long-range step finds its state exactly).
LOCAL_STATE_RESIDUAL = 1e-11
#: A local state whose coefficients (on unit-norm columns, the closing one at 1) exceed
#: this comes from a nearly singular set of joints; larger sets are tried for a better one.
LOCAL_STATE_BOUND = 1e2
#: Entries of a state below this fraction of its largest are round-off of the local
#: least-squares and dropped.
STATE_ENTRY_DROP = 1e-14
#: Singular values below this fraction of the largest count as zero in the least-norm
#: solution of a local state (LAPACK ``rcond``).
LOCAL_LEAST_SQUARES_RCOND = 1e-10
#: Accuracy of a local self-stress state (the sweep accepts a state when the residual of its
#: unit-norm columns is at most ``LOCAL_STATE_RESIDUAL``; states found by the global step
#: measure about 2e-12): on the local basis the terms of the states count this much, not
#: machine epsilon.
LOCAL_STATE_ACCURACY = 1e-11

# ---------------------------------------------------------------- checks of the results

#: The equilibrium check accepts the sum of each equation (x, y or moment of a joint, or of
#: the whole structure) while it is at most ``EQUILIBRIUM_ROUND_OFF * EPS`` times the sum of
#: the absolute values of the terms that form it: the round-off of such a sum, and of the
#: solve that made its terms, grows with that total, not with any one term or with the
#: distance from the origin (docs/verification.md, "Equilibrium check tolerance").
EQUILIBRIUM_ROUND_OFF = 1024.0
#: Smallest force scale of a case (N), ``CaseResult.equilibrium_scale``: other outputs treat
#: forces far below the scale as round-off, and a case whose forces are all zero (a
#: determinate structure that is only heated, say) is measured against 1 N.
FORCE_FLOOR = 1.0
#: Two values of a field within this fraction of the largest (or within
#: ``EXTREME_TIE_FLOOR``) tie for an extreme: the first along the member is reported.
EXTREME_TIE = 1e-12
#: Absolute floor of ``EXTREME_TIE`` (SI: N or N*m): a flat zero field.
EXTREME_TIE_FLOOR = 1e-9

# ---------------------------------------------------------------- one-way members and supports

#: A one-way bar or support acts the wrong way when its force is past this fraction of the
#: case's force scale (``CaseResult.equilibrium_scale``) on the wrong side: far above the
#: round-off of a solve, far below any force an engineer would read (one_way.py).
ONE_WAY_FORCE = 1e-9
#: A gap of a bar or support taken out closes when it is past this fraction of the largest
#: nodal translation (at least 1e-6 of the structure's size) on the closing side.
ONE_WAY_GAP = 1e-9
#: Solves allowed per one-way item (and at least ``ONE_WAY_TRIALS_MIN``) before the search
#: for the state of a load case gives up with a message.
ONE_WAY_TRIALS_PER_ITEM = 4
#: Fewest solves allowed for the search of a state.
ONE_WAY_TRIALS_MIN = 12
