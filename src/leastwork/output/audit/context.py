"""What every step of the audit trail needs: the solution, the load cases shown, the
redundants' states with round-off shown as zero, and the units of each coefficient."""

from __future__ import annotations

import numpy as np

from ...errors import CaseError
from ..quantities import quantities
from ..reported import CaseNumbers, case_numbers, flexibility_rows

__all__ = ["Context", "AUDIT_MAX_LOCAL_STATES", "pair_labels"]

#: Largest number of local self-stress states written out in the audit trail.
AUDIT_MAX_LOCAL_STATES = 60


def pair_labels(n: int) -> list[tuple[int, int]]:
    """(i, j) with i <= j: the distinct coefficients of a symmetric n x n matrix."""
    return [(i, j) for i in range(n) for j in range(i, n)]


class Context:
    """The solution ``sol`` seen by the steps: load cases ``case_names`` (default: all),
    output units ``u``, redundant columns and their (force, length) exponents, the states
    ``B`` and the released structure's forces ``s0`` with round-off set to zero."""

    def __init__(self, sol, case_names):
        self.sol = sol
        self.st = sol.structure
        self.topo = sol.topology
        self.u = quantities(sol.units)
        self.cases = list(case_names or sol.cases)
        self.red = list(sol.redundant_columns)
        self.cols = self.topo.columns
        self.rcols = [self.cols[j] for j in self.red]
        self.nred = len(self.red)
        self.terms = sol.flexibility_terms
        self.local = sol.basis == "local"
        if self.local and len(self.red) > AUDIT_MAX_LOCAL_STATES:
            raise CaseError(
                f"the audit trail (--steps, report) of {len(self.red)} local self-stress "
                "states would run to tens of thousands of lines; it is written out for up to "
                f"{AUDIT_MAX_LOCAL_STATES} states. Use --json for every number, the summary "
                "for the governing values, or plot for the diagrams",
                source=sol.structure.source)
        # round-off of the released structure's solves shown as zero (display only)
        lref = max((self.st.length(m) for m in self.st.members), default=1.0)
        self.col_scale = np.array([lref if c.is_moment else 1.0 for c in self.cols])
        self.B = self.denoise(sol.B.toarray() if self.local else sol.B)
        self.flex = flexibility_rows(sol)  # dense, output units (the JSON is sparse if local)
        self.s0 = {k: self.denoise(r.s0[:, None])[:, 0] for k, r in sol.cases.items()}
        self.xdim = [self.u.column_dims(c) for c in self.rcols]
        self.ddim = [self.u.conjugate_dims(c) for c in self.rcols]
        #: quantity of each redundant ("force", "moment") and of its conjugate displacement
        self.xq = [self.u.column_quantity(c) for c in self.rcols]
        self.dq = [self.u.conjugate_quantity(c) for c in self.rcols]
        self.sources: dict[str, dict] = {}  #: load-term contributions per case (contributions.py)
        self._numbers: dict[str, CaseNumbers] = {}

    def numbers(self, case: str) -> CaseNumbers:
        """The reported numbers of load case ``case`` (as in the JSON result), found once."""
        if case not in self._numbers:
            self._numbers[case] = case_numbers(self.sol, case)
        return self._numbers[case]

    def deformations(self, case: str) -> tuple:
        """The initial deformation terms of load case ``case`` (SI)."""
        return self.sol.deformation_terms[case]

    def denoise(self, states: np.ndarray) -> np.ndarray:
        """Columns of basic forces with entries below 1e-12 of the column's largest (moments
        measured per unit length of the longest member) set to zero."""
        scaled = np.abs(states) / self.col_scale[:, None]
        tol = 1e-12 * scaled.max(axis=0, initial=0.0)
        return np.where(scaled <= tol[None, :], 0.0, states)

    # ------------------------------------------------------------------ labels and units
    @staticmethod
    def x_label(i: int) -> str:
        return f"X{i + 1}"

    def unit_of_x(self, i: int) -> str:
        return self.u.unit(self.xq[i])

    def delta_dim(self, i: int, j: int) -> tuple[int, int]:
        """(force, length) exponents of delta_ij: displacement at i per unit X_j."""
        return (self.ddim[i][0] - self.xdim[j][0], self.ddim[i][1] - self.xdim[j][1])

    def unit_state(self, k: int, i: int) -> float:
        """Force in column k per unit X_i, in output units."""
        factor, _ = self.u.ratio(self.u.column_quantity(self.cols[k]), self.xq[i])
        return self.B[k, i] / factor

    def delta_label(self, i: int, j: int) -> str:
        """Unit of delta_ij: displacement (or rotation) at i per unit X_j."""
        return self.u.ratio(self.dq[i], self.xq[j])[1]

    def load_label(self, i: int) -> str:
        """Unit of the load term delta_i0 (the displacement at redundant i)."""
        return self.u.unit(self.dq[i])

    def delta_case(self, value_si: float, i: int, j: int) -> float:
        return value_si / self.u.ratio(self.dq[i], self.xq[j])[0]

    def load_term_case(self, value_si: float, i: int) -> float:
        return self.u.to_output(value_si, self.dq[i])
