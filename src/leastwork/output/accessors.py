"""Results by name, in the case's output units: a reaction, a member's section force at a
position, a displacement (any ``--at`` name). The numbers are those of every other output
(:mod:`.reported`); section forces and displacements not in the result are evaluated from
the solution's fields and the unit-load method."""

from __future__ import annotations

from ..errors import CaseError
from ..plaintext import ECHO_LIMIT, literal
from .quantities import quantities
from .reported import case_numbers

__all__ = ["case_of", "reaction", "section_force", "displacement"]


def case_of(sol, case: str | None) -> str:
    """``case``, or the only load case; a CaseError when it is unknown or not unique."""
    names = list(sol.cases)
    if case is None:
        if len(names) == 1:
            return names[0]
        raise CaseError(f"name the load case: this solution has {len(names)} ("
                        + literal(", ".join(names), 4 * ECHO_LIMIT) + ")",
                        source=sol.structure.source)
    if case not in sol.cases:
        raise CaseError(f'no load case "{literal(case, ECHO_LIMIT)}"; the cases are: '
                        + literal(", ".join(names), 4 * ECHO_LIMIT), source=sol.structure.source)
    return case


def reaction(sol, node: str, direction: str, case: str | None = None) -> float:
    """The reaction component ``direction`` ("x", "y", "rz", "n") at support ``node``:
    force or moment the support applies, in the output units."""
    r = case_numbers(sol, case_of(sol, case)).reactions
    if node not in r or direction not in r[node]:
        have = ", ".join(f"{n}.{d}" for n, c in r.items() for d in c)
        raise CaseError(f'no reaction "{literal(node, ECHO_LIMIT)}.{literal(direction, 8)}"; '
                        f"the reactions are: {literal(have, 4 * ECHO_LIMIT)}",
                        source=sol.structure.source)
    return r[node][direction]


def section_force(sol, member: str, quantity: str, at: float,
                  case: str | None = None) -> float:
    """Section force ``quantity`` ("n", "v", "m") of ``member`` at ``at`` (in the case's
    length unit, from the start node; at a concentrated load the value just after it), in
    the output force or moment unit; signs as docs/conventions.md."""
    name = case_of(sol, case)
    res = sol.cases[name]
    if member not in res.members:
        raise CaseError(f'no member "{literal(member, ECHO_LIMIT)}"', source=sol.structure.source)
    if quantity not in ("n", "v", "m"):
        raise CaseError(f'expected "n", "v" or "m", got "{literal(quantity, 8)}"',
                        source=sol.structure.source)
    q = quantities(sol.units)
    x = at * sol.structure.units.factor("length")
    mr = res.members[member]
    if not -1e-9 * mr.length <= x <= mr.length * (1 + 1e-9):
        raise CaseError(f"position {at:g} is off member {literal(member, ECHO_LIMIT)} (0 to "
                        f"{mr.length / sol.structure.units.factor('length'):g})",
                        source=sol.structure.source)
    side = "left" if x >= mr.length else "right"
    value = float(getattr(mr, quantity)(min(max(x, 0.0), mr.length), side))
    return value / q.factor("moment" if quantity == "m" else "force")


def displacement(sol, target: str, case: str | None = None) -> float:
    """The displacement named ``target`` (``B.y``, ``A.rz``, ``AB@2.5.y``, ``A-C``: the
    ``--at`` names) in the output displacement unit (rotations in rad)."""
    name = case_of(sol, case)
    n = case_numbers(sol, name)
    if target in n.displacements:
        return n.displacements[target]
    from ..displacements import evaluate_target

    value = float(evaluate_target(sol.structure, sol.topology, sol.cases[name], target,
                                  where="displacement"))
    if target.endswith(".rz"):
        return value
    return value / quantities(sol.units).factor("displacement")
