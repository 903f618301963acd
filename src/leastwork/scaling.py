"""The scaling of the equilibrium matrix for every rank and stability decision.

Rows of moments are divided by a characteristic length (the mean member length), so that a
moment counts like a force at that lever arm; every column (a basic force or a reaction) is
scaled to unit norm, so that a force counts about its own size. The rank decisions of
:mod:`leastwork.topology` take the dense matrix (:func:`scaled_dense`), the stability index
of :mod:`leastwork.stability` the sparse one (:func:`scaled_equilibrium`): the same scaling,
so that they make one decision.
"""

from __future__ import annotations

from typing import TYPE_CHECKING

import numpy as np

from .model import Structure

if TYPE_CHECKING:
    import scipy.sparse as sp

__all__ = ["scaled_dense", "scaled_equilibrium"]


def scaled_dense(A: np.ndarray, dofs, st: Structure) -> np.ndarray:
    """Rows of moments divided by a characteristic length; columns to unit norm."""
    lengths = [st.length(m) for m in st.members]
    lref = float(np.mean(lengths)) if lengths else 1.0
    row_scale = np.array([1.0 / lref if d.endswith(".rz") else 1.0 for d in dofs])
    S = A * row_scale[:, None]
    norms = np.linalg.norm(S, axis=0)
    norms[norms == 0] = 1.0
    return S / norms


def scaled_equilibrium(topo, lref: float) -> tuple[sp.csr_matrix | np.ndarray, np.ndarray]:
    """The scaled equilibrium matrix S = diag(rs) A diag(cs): moment rows divided by
    ``lref`` (the mean member length), columns to unit norm (the scaling of every rank
    decision); and the column scales cs. Sparse (CSR) from the local path's topology, a
    dense array from the dense path's (which has no sparse matrix)."""
    if topo.A_sparse is None:
        rs = np.array([1.0 / lref if d.endswith(".rz") else 1.0 for d in topo.dofs])
        S = rs[:, None] * topo.A
        norms = np.sqrt((S * S).sum(axis=0))
        norms[norms == 0] = 1.0
        return S * (1.0 / norms), 1.0 / norms
    import scipy.sparse as sp

    A = sp.csr_matrix(topo.A_sparse)
    rs = np.array([1.0 / lref if d.endswith(".rz") else 1.0 for d in topo.dofs])
    S = sp.diags(rs) @ A
    norms = np.sqrt(np.asarray(S.multiply(S).sum(axis=0)).ravel())
    norms[norms == 0] = 1.0
    return (S @ sp.diags(1.0 / norms)).tocsr(), 1.0 / norms
