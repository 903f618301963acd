"""Every load case on a basis: the released structure under the loads, the compatibility
equations, superposition s = s0 + B X, displacements; and the cross-check of the results.

Shared by both bases (:mod:`leastwork.basis`), by the pipeline (:mod:`leastwork.solve`),
the local path (:mod:`leastwork.sparse_solve`) and reanalysis: what differs between the
bases is asked of the basis object.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

from .arithmetic import Numbers
from .basis import Basis, CompatibilitySolver
from .energy import initial_deformations
from .model import Structure
from .solution import CaseResult
from .statics import CaseLoading, case_loading

__all__ = ["solve_cases", "case_state", "CaseState", "cross_check"]


def solve_cases(st: Structure, topo, red: list[int], B, F, released: Basis,
                solver: CompatibilitySolver) -> dict[str, CaseResult]:
    """Every load case of ``st`` on the states ``B`` of the basis ``released`` (unit
    redundant states, or local self-stress states whose amplitudes are the unknowns:
    ``released.amplitudes``), with flexibility ``F`` and the flexibility solver. Dense or
    sparse ``B`` and ``F`` alike."""
    local = released.amplitudes
    results = {}
    size_B = abs(B)  # |B| |X|: the size of the terms of B X, for the equilibrium check
    for case in st.case_names:
        cs = case_state(st, topo, red, B, F, released, solver, case)
        X = cs.X
        res = CaseResult.build(st, topo, cs.loading, cs.s[red] if local else X,
                               cs.load_terms, cs.Delta, cs.s, cs.s0, cs.nodal_displacements,
                               cs.d, released,
                               formed=CaseResult.term_sizes(cs.s0, size_B, X, local))
        if local:
            res.amplitudes = X
        results[case] = res
    return results


@dataclass(frozen=True)
class CaseState:
    """One load case through the compatibility equations, in the number type of the
    basis: the loading, the released structure's forces ``s0`` under it, the initial
    deformations ``e``, the imposed displacements ``Delta`` at the unknowns, the load
    terms ``delta0``, the unknowns ``X``, the final forces ``s`` = s0 + B X, the
    deformations ``d`` = F s + e (m or rad, SI for floats) and the nodal displacements
    (``released.displacements(d - c)``, c the settlements)."""

    loading: CaseLoading
    s0: Any
    e: Any
    Delta: Any
    load_terms: Any
    X: Any
    s: Any
    d: Any
    nodal_displacements: Any


def case_state(st: Structure, topo, red: list[int], B, F, released: Basis,
               solver: CompatibilitySolver, case: str,
               nums: Numbers | None = None) -> CaseState:
    """Load case ``case`` on the states ``B``: delta0 = B'(F s0 + e - c) + Delta,
    delta X = Delta - delta0, s = s0 + B X. Floats, or any number type whose basis,
    vectors and F support ``@`` (``nums``, :mod:`leastwork.arithmetic`)."""
    loading = case_loading(st, topo, case, nums)
    s0 = released.forces(loading.p)[:, 0]
    e = initial_deformations(st, topo, loading.particulars, loading.imposed, nums)
    c = loading.settlement
    Delta = c[red]
    load_terms = B.T @ (F @ s0 + e - c) + Delta
    X = solver.solve(Delta - load_terms)
    s = s0 + B @ X
    d = F @ s + e
    return CaseState(loading, s0, e, Delta, load_terms, X, s, d,
                     released.displacements(d - c))


def cross_check(st: Structure, results: dict, condition: float, verify: bool | None,
                progress=None) -> list[str]:
    """Cross-check every load case with the direct stiffness method when ``verify`` (None:
    when small enough); the warnings of any disagreement."""
    if verify is None:
        from .verify.cross_check import should_verify

        verify = should_verify(st)
    notes: list[str] = []
    if verify:
        from .verify.cross_check import stiffness_check

        if progress is not None:
            progress("cross-check")
        for res in results.values():
            res.stiffness = stiffness_check(st, res, condition)
            if not res.stiffness.ok:
                notes.append(_disagreement(res))
    return notes


def _disagreement(res) -> str:
    c = res.stiffness
    if c.difference is None:
        return (f"load case {res.name}: the direct-stiffness cross-check gave no answer "
                f"({c.failure}); the force-method result is unconfirmed")
    return (f"LOAD CASE {res.name}: THE FORCE METHOD AND THE DIRECT-STIFFNESS CROSS-CHECK "
            f"DISAGREE (largest difference {c.difference:.2e} of the largest force, at "
            f"{c.where}); do not use these results before the cause is found")
