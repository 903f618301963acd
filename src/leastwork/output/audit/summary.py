"""The summarised sheet of a structure with more local self-stress states than the audit
trail writes out (:data:`~leastwork.output.audit.context.AUDIT_MAX_LOCAL_STATES`): what
was solved and how, the governing values of each load case, and the checks. It says that
it is a summary and where every number is."""

from __future__ import annotations

from ..quantities import quantities
from ..reported import CaseNumbers, case_numbers
from ..sheet import Grid, Para, Step
from .checks import step_check
from .context import AUDIT_MAX_LOCAL_STATES

__all__ = ["summary_steps"]


class _Checks:
    """What :func:`~leastwork.output.audit.checks.step_check` asks of the context."""

    def __init__(self, sol, cases: list[str]):
        self.sol, self.cases, self.u = sol, cases, quantities(sol.units)
        self._numbers: dict[str, CaseNumbers] = {}

    def numbers(self, case: str) -> CaseNumbers:
        if case not in self._numbers:
            self._numbers[case] = case_numbers(self.sol, case)
        return self._numbers[case]


def summary_steps(sol, case_names=None) -> tuple[Step, ...]:
    """Three steps: the structure and the method (with the notice that this is a
    summary), the governing values per load case, the equilibrium check and cross-check."""
    st = sol.structure
    cases = list(case_names or sol.cases)
    nred = len(sol.redundant_columns)
    topo = sol.topology
    first = Step(1, "Structure and method (summarised)", (
        Para(f"SUMMARY ONLY: this structure has {nred} local self-stress states; the "
             "step-by-step trail (the states, their flexibility coefficients and the "
             f"compatibility equations) is written out for up to {AUDIT_MAX_LOCAL_STATES} "
             "states and would run to tens of thousands of lines here. Every member's and "
             "support's result is in the JSON result (solve --json); the diagrams are drawn "
             "by plot.", "warning"),
        Para(f"{len(st.members)} members, {len(st.nodes)} nodes, {len(st.supports)} "
             f"supports; {len(topo.columns)} basic forces and reactions, degree of "
             f"indeterminacy {topo.degree}."),
        Para("Least work on local self-stress states: each state closes the cut of one "
             "member force or reaction within a few members around it; their amplitudes X "
             "solve δ X = -δ0 (δ sparse), and the final forces are s = s0 + B X. Condition "
             f"number of the scaled δ: {sol.condition:.3g}."),
    ))
    u = quantities(sol.units)
    blocks: list = [Para("The largest values of each load case (in the case units).")]
    for case in cases:
        blocks.append(_governing(sol, case, u))
    second = Step(2, "Governing values", tuple(blocks))
    chk = step_check(_Checks(sol, cases))
    return first, second, Step(3, chk.title, chk.blocks)


def _governing(sol, case: str, u) -> Grid:
    """Largest tension and compression, largest end moment (beams), largest reaction
    component of load case ``case``."""
    res = sol.cases[case]
    ff, fu = u.factor("force"), u.force_unit
    mf, mu = u.factor("moment"), u.moment_unit
    rows: list[tuple] = []
    ends = {mid: (m.start[0], m.end[0]) for mid, m in res.members.items()}
    if ends:
        tmax = max(ends, key=lambda k: max(ends[k]))
        cmin = min(ends, key=lambda k: min(ends[k]))
        rows.append(("largest tension n", tmax, max(max(ends[tmax]), 0.0) / ff, fu))
        rows.append(("largest compression n", cmin, min(min(ends[cmin]), 0.0) / ff, fu))
    moments = {mid: max(abs(m.m_max[0]), abs(m.m_min[0])) for mid, m in res.members.items()}
    if moments and max(moments.values()) > 0.0:
        mid = max(moments, key=moments.get)
        rows.append(("largest |m|", mid, moments[mid] / mf, mu))
    reactions = [(f"{node}.{d}", v) for node, comps in res.reactions.items()
                 for d, v in comps.items() if d in ("x", "y")]
    if reactions:
        name, v = max(reactions, key=lambda r: abs(r[1]))
        rows.append(("largest reaction", name, v / ff, fu))
    return Grid(f"Load case {case}", ("quantity", "where", "value", "unit"), tuple(rows),
                keys=2)
