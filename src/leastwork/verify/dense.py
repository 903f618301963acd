"""Dense stand-ins for the sparse factorisations of the direct-stiffness solver, used on
small structures (up to :data:`DENSE_MAX_DOFS` degrees of freedom) so that a small solve
and its cross-check do not import scipy (0.1-0.2 s of start-up).

The same two signs of a mechanism as the sparse path: the pivots of an elimination with
diagonal pivots (no row exchanges) of the Jacobi-scaled reduced stiffness, all positive
for a stable structure (each is a Schur complement's diagonal, never below the smallest
eigenvalue); and the 1-norm condition number, here exact from the inverse (the sparse
path's Hager estimate is a lower bound of it). The solves themselves are numpy's LU with
partial pivoting (LAPACK gesv).
"""

from __future__ import annotations

import numpy as np

__all__ = ["DENSE_MAX_DOFS", "diagonal_elimination", "one_norm_condition"]

#: Structures with at most this many degrees of freedom are solved with dense arrays.
DENSE_MAX_DOFS = 200


def diagonal_elimination(A: np.ndarray) -> tuple[np.ndarray, int]:
    """The pivots (U's diagonal) of A = L U without row exchanges, in the natural order,
    and the nonzeros of the factors (L with its unit diagonal, as a sparse LU stores it,
    plus U).

    Raises ZeroDivisionError at an exactly zero pivot (the elimination cannot go on).
    """
    n = A.shape[0]
    W = np.array(A, dtype=float)
    for k in range(n):
        p = W[k, k]
        if p == 0.0:
            raise ZeroDivisionError("zero pivot")
        W[k + 1:, k] /= p
        W[k + 1:, k + 1:] -= np.outer(W[k + 1:, k], W[k, k + 1:])
    nonzeros = np.count_nonzero(np.tril(W, -1)) + n + np.count_nonzero(np.triu(W))
    return np.diag(W).copy(), int(nonzeros)


def one_norm_condition(A: np.ndarray) -> float:
    """||A||_1 ||A^-1||_1 of a nonsingular square matrix (exact, up to round-off)."""
    if not A.shape[0]:
        return 1.0
    inverse = np.linalg.inv(A)
    return float(np.abs(A).sum(axis=0).max()) * float(np.abs(inverse).sum(axis=0).max())
