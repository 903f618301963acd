"""The second opinion: the force method's answer compared with the independent
direct-stiffness solver (:mod:`leastwork.stiffness`)."""

from __future__ import annotations

from dataclasses import dataclass

from ..errors import CaseError, MechanismError
from . import solve_stiffness, stiffness_dofs

__all__ = ["StiffnessCheck", "stiffness_check", "should_verify", "STIFFNESS_RTOL",
           "CONDITION_RTOL", "STIFFNESS_CONDITION_RTOL", "VERIFY_MAX_DOFS"]

#: Largest accepted difference between the two methods, relative to the case's largest
#: force (moments divided by the longest member), for a well-conditioned structure.
STIFFNESS_RTOL = 1e-7
#: Round-off of the force method grows with the condition number of its flexibility matrix
#: (seen: about 5e-13 x condition on long cross-braced trusses); the accepted difference
#: is at least this times the condition number.
CONDITION_RTOL = 1e-11
#: The stiffness method's own round-off grows with the condition number of its stiffness
#: matrix (member forces are differences of displacements; on a long slender truss that
#: condition grows like panels^4, 1e11 at 1000 panels, errors seen about 0.07 x eps x
#: condition): the accepted difference is also at least this times that condition number.
STIFFNESS_CONDITION_RTOL = 1e-15
#: Structures with more free degrees of freedom than this are not cross-checked by default
#: (the check would no longer be instant).
VERIFY_MAX_DOFS = 3000


@dataclass(frozen=True)
class StiffnessCheck:
    """Largest difference of reactions and member end forces between the two methods,
    relative to the largest force of the case; ``where`` names it; ``failure`` says why the
    stiffness solver gave no answer (then ``difference`` is None)."""

    difference: float | None
    where: str = ""
    failure: str = ""
    tolerance: float = STIFFNESS_RTOL

    @property
    def ok(self) -> bool:
        return self.difference is not None and self.difference <= self.tolerance


def stiffness_check(st, res, condition: float = 1.0) -> StiffnessCheck:
    """Compare load case ``res`` (a :class:`~leastwork.solution.CaseResult`) of structure
    ``st`` with the direct stiffness method; ``condition`` is that of the flexibility
    matrix. The accepted difference widens with it (``CONDITION_RTOL``) and with the
    stiffness matrix's (``STIFFNESS_CONDITION_RTOL``): each method's round-off."""
    tolerance = max(STIFFNESS_RTOL, CONDITION_RTOL * condition)
    try:
        other = solve_stiffness(st, res.name)
    except (CaseError, MechanismError) as exc:
        return StiffnessCheck(None, failure=str(exc), tolerance=tolerance)
    tolerance = max(tolerance, STIFFNESS_CONDITION_RTOL * other.condition)
    lref = max((st.length(m) for m in st.members), default=1.0)
    scale = max([res.equilibrium_scale]
                + [abs(v) for c in other.reactions.values() for k, v in c.items() if k != "rz"]
                + [abs(v) for ends in other.end_forces.values() for e in ends for v in e[:2]])
    worst, where = 0.0, ""

    def compare(a: float, b: float, name: str, moment: bool) -> None:
        nonlocal worst, where
        d = abs(a - b) / (scale * (lref if moment else 1.0))
        if d > worst:
            worst, where = d, name

    for node, comps in res.reactions.items():
        theirs = other.reactions.get(node, {})
        for k, v in comps.items():
            compare(v, theirs.get(k, 0.0), f"reaction {node}.{k}", k == "rz")
    for mid, mr in res.members.items():
        ts, te = other.end_forces[mid]
        for end, ours, their in (("start", mr.start, ts), ("end", mr.end, te)):
            for q, a, b in zip("nvm", ours, their, strict=True):
                compare(a, b, f"{mid} {end} {q}", q == "m")
    return StiffnessCheck(worst, where, tolerance=tolerance)


def should_verify(st) -> bool:
    """Small enough for the cross-check to be instant."""
    return stiffness_dofs(st) <= VERIFY_MAX_DOFS
