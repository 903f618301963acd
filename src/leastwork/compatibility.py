"""The compatibility equations delta X = Delta - delta_0, on either basis.

delta = B' F B is the flexibility matrix of the states B (Maxwell-Betti: symmetric);
:func:`jacobi_scaling` finds the unknowns with no flexibility and the scale factors both
solvers use; :class:`FlexibilitySolver` solves the dense equations of the released basis
(the sparse solver of the local basis is :class:`leastwork.sparse_solve.SparseFlexibilitySolver`;
both are :class:`leastwork.basis.CompatibilitySolver`). The thresholds are those of
:mod:`leastwork.thresholds`.
"""

from __future__ import annotations

import numpy as np

from .basis import CompatibilitySolver
from .errors import CaseError
from .thresholds import INCOMPATIBLE_RESIDUAL, NO_FLEXIBILITY, SINGULAR_FLEXIBILITY

__all__ = ["flexibility_matrix", "jacobi_scaling", "FlexibilitySolver"]


def flexibility_matrix(B, F):
    """delta = B' F B (Maxwell-Betti: symmetric; the round-off of the product is averaged
    out), dense or scipy.sparse CSR as ``B`` and ``F`` are."""
    delta = B.T @ F @ B
    if hasattr(delta, "tocsr"):
        delta = delta.tocsr()
        return ((delta + delta.T) * 0.5).tocsr()
    return 0.5 * (delta + delta.T)


def jacobi_scaling(diag: np.ndarray, names: list[str],
                   what: str) -> tuple[np.ndarray, np.ndarray, list[str]]:
    """For the diagonal of a flexibility matrix: which unknowns have no flexibility (at or
    below ``NO_FLEXIBILITY`` of the largest), the scale factors D = 1/sqrt(diag) (1 for
    those), and a warning for each (``what`` names the unknowns: "redundant", "the
    self-stress state closing"): such an unknown is not determined by compatibility and is
    taken as zero."""
    diag = np.asarray(diag, dtype=float).copy()
    scale_ref = max(float(np.max(np.abs(diag))), 1e-300)
    zero = diag <= NO_FLEXIBILITY * scale_ref
    notes = [f"{what} {names[i]} has no flexibility (it strains only axially rigid members "
             "or rigid parts); its value is not determined by compatibility and is taken as "
             "zero" for i in np.flatnonzero(zero)]
    return zero, 1.0 / np.sqrt(np.where(zero, 1.0, diag)), notes


class FlexibilitySolver(CompatibilitySolver):
    """Solve delta X = rhs, Jacobi-scaled; a redundant (or a combination) with no
    flexibility is explained and taken as zero (minimum-norm solution)."""

    def __init__(self, delta: np.ndarray, names: list[str], source: str):
        self.warnings: list[str] = []
        self.source = source
        n = delta.shape[0]
        self.n = n
        self.cond = 1.0
        if n == 0:
            return
        zero, self.D, notes = jacobi_scaling(np.diag(delta), names, "redundant")
        self.warnings.extend(notes)
        S = delta * self.D[:, None] * self.D[None, :]
        w, V = np.linalg.eigh(S)
        keep = w > SINGULAR_FLEXIBILITY * max(float(w.max()), 1e-300)
        if (~keep).sum() > zero.sum():
            self.warnings.append(
                "the flexibility matrix is singular: some combination of redundants strains "
                "no flexible part; the minimum-norm solution is used")
        self.w, self.V, self.keep = w, V, keep
        self.cond = float(w[keep].max() / w[keep].min()) if keep.any() else float("inf")

    def solve(self, rhs: np.ndarray) -> np.ndarray:
        """X for one right-hand side (nred,) or several (nred, k)."""
        rhs = np.asarray(rhs, dtype=float)
        if self.n == 0:
            return np.zeros(rhs.shape)
        D = self.D if rhs.ndim == 1 else self.D[:, None]
        b = D * rhs
        coef = self.V.T @ b
        y = np.zeros_like(coef)
        y[self.keep] = coef[self.keep] / (self.w[self.keep] if rhs.ndim == 1
                                          else self.w[self.keep][:, None])
        resid = coef[~self.keep]
        size = np.max(np.abs(b), axis=0, initial=0.0)  # per right-hand side
        if resid.size and np.any(np.max(np.abs(resid), axis=0)
                                 > INCOMPATIBLE_RESIDUAL * np.maximum(size, 1e-300)):
            raise CaseError(
                "the compatibility equations have no solution: an imposed deformation "
                "(temperature, misfit or settlement) acts on a part with no flexibility "
                "(an axially rigid member or a rigid support chain)", source=self.source)
        return D * (self.V @ y)
