"""The audit trail of a solve as a :class:`~leastwork.output.sheet.Sheet`: every step of
the force method in the order an engineer does it by hand, with the numbers of the solve.

One module per step (``structure``, ``redundants``, ``released``, ``coefficients``,
``equations``, ``results`` with ``envelope``, ``displacements``, ``checks``); what they
share is in ``context`` (the solution seen by the steps, the units of each coefficient)
and ``contributions`` (member by member and term by term).

The numbers that also appear in the JSON result (redundants, flexibility, load terms,
reactions, end forces, displacements, the envelope) come from
:mod:`leastwork.output.reported`, as the JSON result's do, so the two agree exactly.
Contributions are summed from the energy terms the solution keeps
(``Solution.flexibility_terms``, ``Solution.deformation_terms``); their sums equal the
totals shown.
"""

from __future__ import annotations

from pathlib import PurePath

from ..sheet import Sheet
from .assumptions import ASSUMPTIONS, CAUTION, energy_terms
from .checks import step_check
from .coefficients import step_coefficients
from .context import AUDIT_MAX_LOCAL_STATES, Context
from .displacements import step_displacements
from .envelope import envelope_grids
from .equations import step_equations
from .redundants import step_redundants
from .released import step_released
from .results import step_solution
from .structure import step_structure

__all__ = ["audit_sheet", "file_name", "envelope_grids", "ASSUMPTIONS", "CAUTION", "energy_terms",
           "AUDIT_MAX_LOCAL_STATES"]

#: The eight steps, in order.
STEPS = (step_structure, step_redundants, step_released, step_coefficients, step_equations,
         step_solution, step_displacements, step_check)


def audit_sheet(sol, case_names=None, *, meta: dict[str, str] | None = None) -> Sheet:
    """Build the audit trail of ``sol`` (a :class:`~leastwork.solution.Solution`) for the
    load cases ``case_names`` (default: all)."""
    st = sol.structure
    if sol.basis == "local" and len(sol.redundant_columns) > AUDIT_MAX_LOCAL_STATES:
        from .summary import summary_steps  # too many states to write out: says so

        steps = summary_steps(sol, case_names)
    else:
        ctx = Context(sol, case_names)
        steps = tuple(step(ctx) for step in STEPS)
    return Sheet(title=st.name, source=file_name(st.source),
                 assumptions=(ASSUMPTIONS, energy_terms(st)),
                 steps=steps, cautions=(CAUTION,),
                 meta=dict(meta or {}), project=dict(st.project))


def file_name(source: str) -> str:
    """The case file's name without its folders (a sheet is filed away from the disk it was
    made on); a name in angle brackets (text given in code) is kept as it is.

    >>> file_name("/home/a/jobs/canopy.toml"), file_name("<string>")
    ('canopy.toml', '<string>')
    """
    if source.startswith("<"):
        return source
    return PurePath(source).name or source
