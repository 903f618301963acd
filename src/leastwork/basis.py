"""The two bases of the force method, as protocols.

A *basis* is a released structure, factorised once, together with the self-stress states
the compatibility equations are written in: s = s0 + B X with s0 the released structure's
forces under the loads and the columns of B the states. Two implementations solve the same
equations:

* the **released** basis, :class:`leastwork.statics.ReleasedStructure`: dense LU of A0; the
  states are the unit redundant states (column i: X_i = 1, no loads) and X are the
  redundants themselves;
* the **local** basis, :class:`leastwork.sparse_solve.SparseReleased`: sparse LU of A0 from
  the self-stress sweep (:mod:`leastwork.selfstress`); the states are local self-stress
  states, each closing one column, and X are their amplitudes (the redundant force is s at
  the closing column).

Code shared by both paths (:func:`leastwork.superposition.solve_cases`, reanalysis,
displacements, influence lines, fit-up) asks the basis object, never which basis it is.
Each basis also gives the solver of its flexibility matrix, a :class:`CompatibilitySolver`.
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Any, Protocol, runtime_checkable

import numpy as np

if TYPE_CHECKING:
    from .model import Structure
    from .topology import Topology

__all__ = ["Basis", "CompatibilitySolver"]


@runtime_checkable
class CompatibilitySolver(Protocol):
    """delta X = rhs with the flexibility matrix delta, factorised once (Jacobi-scaled); an
    unknown with no flexibility is explained in ``warnings`` and taken as zero."""

    n: int  #: unknowns (redundants or state amplitudes)
    cond: float  #: condition number of the scaled delta (an estimate on the local basis)
    warnings: list[str]  #: what the factorisation found (unknowns without flexibility...)
    source: str  #: the case file, for error messages

    def solve(self, rhs: np.ndarray) -> np.ndarray:
        """X for one right-hand side (n,) or several (n, k); a CaseError when the equations
        have no solution."""
        ...


@runtime_checkable
class Basis(Protocol):
    """A released structure with the states of the compatibility equations (module
    docstring). Arrays are SI; "columns" are the basic forces and reactions of ``topo``."""

    topo: Topology
    redundants: list[int]  #: the columns the states close (the redundants), in state order
    kind: str  #: "released" or "local": ``Solution.basis``, for outputs that differ

    @property
    def redundant_names(self) -> list[str]:
        """Names of the columns the states close."""
        ...

    @property
    def amplitudes(self) -> bool:
        """True when X are amplitudes of local self-stress states (the redundant forces are
        s at the closing columns, and each state is a self-stress only to
        ``thresholds.LOCAL_STATE_ACCURACY``); False when X are the redundants themselves and
        the states are exact to round-off."""
        ...

    @property
    def state_accuracy(self) -> float:
        """Relative accuracy of the entries of the states: machine epsilon for states by
        back-substitution, ``thresholds.LOCAL_STATE_ACCURACY`` for local states."""
        ...

    def forces(self, rhs: np.ndarray) -> np.ndarray:
        """Basic forces and reactions (ncol, k) of the released structure in equilibrium
        with nodal loads ``rhs`` (ndof,) or (ndof, k); the closed columns carry zero."""
        ...

    def displacements(self, compatible: np.ndarray) -> np.ndarray:
        """Nodal displacements (ndof,) for member deformations less settlements
        ``compatible`` (ncol,), by the unit-load method on the released structure."""
        ...

    def states(self) -> Any:
        """The states B (ncol, nred): dense array or scipy.sparse CSC."""
        ...

    def flexibility(self, st: Structure, topo: Topology) -> Any:
        """Member and spring flexibility F (ncol, ncol) of ``st``, dense or sparse as the
        states are."""
        ...

    def compatibility_solver(self, delta: Any, names: list[str],
                             source: str) -> CompatibilitySolver:
        """The solver of delta X = rhs for this basis (``names``: of the unknowns)."""
        ...

    def stability_basis(self, states: Any) -> Any:
        """What :func:`leastwork.stability.assess_stability` needs of this basis for the
        whole-structure test (the local basis: released columns, their sparse LU and the
        ``states``), or None when the topology carries the dense singular values."""
        ...
