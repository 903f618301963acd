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
    #: with curved members: the estimated discretisation error of the chain model
    #: (:mod:`.chain`), relative like ``difference``; it widens the tolerance
    discretisation: float = 0.0

    @property
    def ok(self) -> bool:
        return self.difference is not None and self.difference <= self.tolerance


def stiffness_check(st, res, condition: float = 1.0) -> StiffnessCheck:
    """Compare load case ``res`` (a :class:`~leastwork.solution.CaseResult`) of structure
    ``st`` with the direct stiffness method; ``condition`` is that of the flexibility
    matrix. The accepted difference widens with it (``CONDITION_RTOL``) and with the
    stiffness matrix's (``STIFFNESS_CONDITION_RTOL``): each method's round-off."""
    tolerance = max(STIFFNESS_RTOL, CONDITION_RTOL * condition)
    estimate = None
    try:
        if any(m.curve is not None for m in st.members.values()):
            other, estimate = _chain_solution(st, res.name)
        else:
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
    if estimate is None:
        return StiffnessCheck(worst, where, tolerance=tolerance)
    # the extrapolated chain model's estimated error, relative like the difference; ten
    # times it widens the tolerance
    rel = max([0.0] + [abs(v) / (scale * (lref if moment else 1.0)) for v, moment in estimate])
    return StiffnessCheck(worst, where, tolerance=max(tolerance, 10.0 * rel),
                          discretisation=rel)


def _chain_solution(st, case: str):
    """The stiffness answer of the chain models of the curved members (:mod:`.chain`),
    extrapolated from three refinements (each twice the segments of the one before): a result with the reactions and member end forces
    (a curved member's from its end segments, along the arc's end tangents) and the
    estimated error of each (value, is a moment)."""
    from .chain import chain_structure, segment_name, segments_of
    from .stiffness import StiffnessResult

    levels = (1, 2, 4)
    chains = [chain_structure(st, level) for level in levels]
    runs = [solve_stiffness(ch, case) for ch in chains]

    def extrapolate(*values):
        """Richardson on successive pairs (twice the segments: a quarter of the error);
        the value from the two finest chains, its error estimated by the change from the
        pair before."""
        r = [b + (b - a) / 3.0 for a, b in zip(values[:-1], values[1:], strict=False)]
        return r[-1], abs(r[-1] - r[-2])

    errors = []
    reactions = {}
    for node, comps in runs[-1].reactions.items():
        out = {}
        for k in comps:
            out[k], e = extrapolate(*(r.reactions.get(node, {}).get(k, 0.0) for r in runs))
            errors.append((e, k == "rz"))
        reactions[node] = out
    ends = {}
    for mid, m in st.members.items():
        if m.curve is None:
            pairs = [r.end_forces[mid] for r in runs]
        else:
            L = st.length(mid)
            pairs = []
            for r, ch, level in zip(runs, chains, levels, strict=True):
                a, b = segment_name(mid, 0), segment_name(mid, segments_of(m, level) - 1)
                pairs.append((_turned(r.end_forces[a][0], ch.direction(a), st.tangent(mid, 0.0)),
                              _turned(r.end_forces[b][1], ch.direction(b), st.tangent(mid, L))))
        ext = []
        for end in (0, 1):
            triple = []
            for q in range(3):
                v, e = extrapolate(*(p[end][q] for p in pairs))
                triple.append(v)
                errors.append((e, q == 2))
            ext.append(tuple(triple))
        ends[mid] = (ext[0], ext[1])
    return StiffnessResult(case, {}, reactions, ends), errors


def _turned(nvm, seg, tangent):
    """Section forces (n, v, m) at a chain segment's end (axis ``seg``) re-expressed
    along the arc's ``tangent`` there: the same force, other components."""
    n, v, m = nvm
    fx, fy = n * seg[0] + v * seg[1], n * seg[1] - v * seg[0]  # n ex - v ey
    return (fx * tangent[0] + fy * tangent[1], fx * tangent[1] - fy * tangent[0], m)


def should_verify(st) -> bool:
    """Small enough for the cross-check to be instant."""
    return stiffness_dofs(st) <= VERIFY_MAX_DOFS
