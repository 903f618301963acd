"""Do the one-way members and supports keep acting within the fit-up tolerances?

The fit-up study (:mod:`.fitup`) gives the exact range [min, max] of the force locked into
each member and support by length errors within their tolerances, while everything acts
(the response is linear there). Added to a load case's own force in that member, it answers
the erector's first question for each one-way item and each load case: a tie whose force
stays above zero over the whole range stays in tension whatever the length errors; one
whose range reaches zero may go slack for some pattern of errors (and then the linear study
no longer describes it). A case in which the item is already slack or lifted under its loads
is reported as such.
"""

from __future__ import annotations

from dataclasses import dataclass

from ..model import Structure
from ..output.quantities import quantities
from ..output.reported import number

__all__ = ["OneWayVerdict", "one_way_verdicts", "verdicts_to_dict"]


@dataclass(frozen=True)
class OneWayVerdict:
    """One one-way item (a bar id, or a support as ``NODE.x|y|n``) in one load case (SI):
    its force under the case's loads and the range with the locked-in forces added."""

    item: str
    case: str
    acts: str  #: "tension", "compression" (bars) or "push" (a bearing)
    force: float
    low: float | None  #: None when the item is out under the case's loads
    high: float | None
    verdict: str


def _items(st: Structure) -> list[tuple[str, str, str | None]]:
    """(study quantity name, acts, support node or None) of every one-way item."""
    out: list[tuple[str, str, str | None]] = [
        (m.id, m.acts, None) for m in st.members.values() if m.acts != "both"]
    out += [(s.restraints[0].name, "push", s.node) for s in st.supports.values()
            if s.acts != "both"]
    return out


def one_way_verdicts(sol, study) -> list[OneWayVerdict]:
    """Every one-way item of ``sol.structure`` in every load case of ``sol``, with the
    range of ``study`` (a :class:`.fitup.FitupStudy` of the same solve) added."""
    st = sol.structure
    index = {name: q for q, name in enumerate(study.quantities.names)}
    out = []
    for item, acts, node in _items(st):
        q = index.get(item)
        if q is None:
            continue
        lo, hi = float(study.worst.min[q]), float(study.worst.max[q])
        for case, res in sol.cases.items():
            state = sol.states.get(case)
            if node is None:
                force = float(res.members[item].start[0])
                out_now = state is not None and item in state.slack
            else:
                force = float(res.s[sol.topology.column_index[item]])
                out_now = state is not None and node in state.lifted
            low: float | None = force + lo
            high: float | None = force + hi
            if out_now:  # another structure: the study's range does not apply
                verdict = "lifted under the loads" if node else "slack under the loads"
                low = high = None
            elif acts == "compression":
                verdict = "stays in compression" if high < 0 else "may go slack"
            elif acts == "tension":
                verdict = "stays in tension" if low > 0 else "may go slack"
            else:
                verdict = "stays bearing" if low > 0 else "may lift off"
            out.append(OneWayVerdict(item, case, acts, force, low, high, verdict))
    return out


def verdicts_to_dict(verdicts: list[OneWayVerdict], units) -> dict:
    """``{item: {case: {"force", "min", "max", "verdict"}}}`` in the force unit."""
    f = quantities(units).factor("force")
    out: dict = {}
    for v in verdicts:
        out.setdefault(v.item, {})[v.case] = {
            "force": number(v.force / f),
            "min": None if v.low is None else number(v.low / f),
            "max": None if v.high is None else number(v.high / f), "verdict": v.verdict}
    return out
