"""One-way members and supports: ties that go slack, struts and bearings that lift off.

A bar with ``acts = "tension"`` cannot push, one with ``acts = "compression"`` cannot pull,
and a support with ``acts = "compression"`` can only push along its one restrained
translation. The least-work solution first takes every one of them as acting. When one acts
the wrong way, the one furthest wrong is taken out (a slack member carries nothing, a lifted
support reacts nothing) and the load case is solved again; one taken out earlier comes back
when its gap would close (the ends of a slack tie move apart beyond its free length, a lifted
bearing is pushed into). This repeats until every one acts as it may. Each load case — and
each combination, which solves as a load case — finds its own state; results of different
states are never superposed.

The result of a case in a changed state is written on the structure as given (its columns,
its redundants): the basic forces of the re-solve with zeros for what was taken out; the
deformation of a slack bar is the change of its chord, and a lifted support's "settlement"
is the node's movement along it, so that the unit-load method on the released structure of
the structure as given gives the re-solve's displacements — checked for every such case.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass, replace

import numpy as np

from .errors import CaseError, MechanismError
from .model import Misfit, Settlement, Structure, TemperatureLoad
from .thresholds import ONE_WAY_FORCE, ONE_WAY_GAP, ONE_WAY_TRIALS_MIN, ONE_WAY_TRIALS_PER_ITEM

__all__ = ["CaseState", "settle", "one_way_items", "state_text", "state_structure"]


@dataclass(frozen=True)
class CaseState:
    """The state a load case settled in: bars taken out (``slack``), supports taken out
    (``lifted``, by node), the number of solves it took, and the redundants of the re-solve
    its numbers come from (empty when nothing was taken out)."""

    slack: tuple[str, ...] = ()
    lifted: tuple[str, ...] = ()
    trials: int = 1
    redundants: tuple[str, ...] = ()

    @property
    def changed(self) -> bool:
        return bool(self.slack or self.lifted)


def one_way_items(st: Structure) -> tuple[list[str], list[str]]:
    """The one-way bars and the one-way supports (by node) of ``st``."""
    return ([m.id for m in st.members.values() if m.acts != "both"],
            [s.node for s in st.supports.values() if s.acts != "both"])


def settle(st: Structure, sol, solve_given: Callable[[Structure], object]):
    """``sol`` (the solve of ``st`` with every one-way item acting) with each load case in
    the state where every one-way bar and support acts as it may. ``solve_given`` solves a
    structure without one-way items (the re-solves)."""
    bars, bearings = one_way_items(st)
    if not bars and not bearings:
        return sol
    notes: list[str] = []
    for case in st.case_names:
        state, sub = _admissible(st, sol, case, bars, bearings, solve_given)
        sol.states[case] = state
        if state.changed:
            sol.cases[case] = _on_given(st, sol, case, sub, state, notes)
            notes.extend(f"load case {case} (in its one-way state): {w}"
                         for w in sub.warnings)
    sol.warnings = tuple(sol.warnings) + tuple(notes)
    return sol


def state_text(st: Structure, state: CaseState) -> str:
    """One sentence on the state of a load case, for every output: which one-way members
    and supports act, which were taken out, and how the case was solved."""
    bars, bearings = one_way_items(st)
    if not state.changed:
        return ("One-way members and supports: every one acts as it may ("
                + ", ".join([*bars, *(f"support {n}" for n in bearings)]) + ").")
    out = [f"{mid} slack ({st.members[mid].acts} only)" for mid in state.slack]
    out += [f"support {n} lifted (it can only push)" for n in state.lifted]
    acting = [b for b in bars if b not in state.slack]
    acting += [f"support {n}" for n in bearings if n not in state.lifted]
    again = (f"solved again without {'it' if len(out) == 1 else 'them'} (redundants of "
             f"that solve: {', '.join(state.redundants) or 'none, it is determinate'}; "
             f"{state.trials} solves)")
    return (f"One-way members and supports: {', '.join(out)}; {again}"
            + (f"; acting: {', '.join(acting)}" if acting else "") + ". Each load case and "
            "combination has its own state; results are not superposed across states.")


# ---------------------------------------------------------------------- the search
def _admissible(st: Structure, sol, case: str, bars: list[str], bearings: list[str],
                solve_given) -> tuple[CaseState, object]:
    """The state of ``case`` and the solution it was found in (``sol`` when nothing is
    taken out)."""
    out_b: frozenset[str] = frozenset()
    out_s: frozenset[str] = frozenset()
    sub, seen = sol, {(out_b, out_s)}
    trials = max(ONE_WAY_TRIALS_MIN, ONE_WAY_TRIALS_PER_ITEM * (len(bars) + len(bearings)))
    for trial in range(1, trials + 1):
        res = sub.cases[case]
        wrong = _wrong_way(st, sub, res, [b for b in bars if b not in out_b],
                           [n for n in bearings if n not in out_s])
        close_b, close_s = _closing(st, sub, res, case, out_b, out_s)
        if not wrong and not close_b and not close_s:
            reds = tuple(sub.redundant_names) if (out_b or out_s) else ()
            return CaseState(tuple(sorted(out_b)), tuple(sorted(out_s)), trial, reds), sub
        out_b, out_s = out_b - close_b, out_s - close_s
        if wrong:
            _, what, ident = max(wrong)
            out_b, out_s = (out_b | {ident}, out_s) if what == "bar" else (out_b, out_s | {ident})
        if (out_b, out_s) in seen:
            raise CaseError(f"load case {case}: the one-way members and supports find no "
                            f"state in which each acts as it may (the search returns to "
                            f"{_listed(out_b, out_s)} taken out); check their directions "
                            "and the loads", source=st.source)
        seen.add((out_b, out_s))
        sub = _resolve(st, case, out_b, out_s, solve_given) if (out_b or out_s) else sol
    raise CaseError(f"load case {case}: no state in which every one-way member and support "
                    f"acts as it may within {trials} solves", source=st.source)


def _listed(out_b, out_s) -> str:
    return ", ".join([*sorted(out_b), *(f"support {n}" for n in sorted(out_s))]) or "nothing"


def state_structure(st: Structure, case: str, slack=(), lifted=()) -> Structure:
    """Load case ``case`` of ``st`` alone, with bars ``slack`` and the supports at nodes
    ``lifted`` taken out and every one-way item made two-way: the structure a case in that
    state is solved on (also for an independent check of its result)."""
    members = {k: replace(m, acts="both") for k, m in st.members.items() if k not in slack}
    supports = {k: replace(s, acts="both") for k, s in st.supports.items() if k not in lifted}
    loads = [ld for ld in st.loads if ld.case == case
             and not (isinstance(ld, (Misfit, TemperatureLoad)) and ld.member in slack)
             and not (isinstance(ld, Settlement) and ld.node in lifted)]
    return replace(st, members=members, supports=supports, loads=tuple(loads),
                   case_order=(case,), combinations=(), redundants=None, displacements=())


def _resolve(st: Structure, case: str, out_b, out_s, solve_given):
    """Solve load case ``case`` of ``st`` with bars ``out_b`` and supports ``out_s`` taken
    out (:func:`state_structure`)."""
    try:
        return solve_given(state_structure(st, case, out_b, out_s))
    except MechanismError as exc:
        raise MechanismError(
            f"{st.source}: load case {case}: no admissible state: with "
            f"{_listed(out_b, out_s)} taken out (acting the wrong way) the structure is a "
            "mechanism; it cannot carry this load with its one-way members and supports.",
            exc.motions) from None


def _force_tolerance(res) -> float:
    return ONE_WAY_FORCE * res.equilibrium_scale


def _wrong_way(st: Structure, sub, res, bars: list[str], bearings: list[str]) -> list:
    """(how far wrong, "bar" or "support", id) of every acting one-way item that acts the
    wrong way beyond round-off."""
    tol = _force_tolerance(res)
    out = []
    for mid in bars:
        n = res.members[mid].start[0]
        wrong = -n if st.members[mid].acts == "tension" else n
        if wrong > tol:
            out.append((wrong, "bar", mid))
    ci = sub.topology.column_index
    for node in bearings:
        r = st.supports[node].restraints[0]
        value = float(res.s[ci[r.name]])
        if -value > tol:
            out.append((-value, "support", node))
    return out


def _translation(sub, res, node: str) -> np.ndarray:
    di = sub.topology.dof_index
    u = res.nodal_displacements
    return np.array([u[di[f"{node}.x"]], u[di[f"{node}.y"]]])


def _gap_tolerance(st: Structure, sub, res) -> float:
    """Round-off of a displacement: relative to the largest nodal translation, at least
    that of the structure's size."""
    xs = [(n.x, n.y) for n in st.nodes.values()]
    extent = float(np.ptp(np.array(xs), axis=0).max()) if len(xs) > 1 else 1.0
    u = np.abs(res.nodal_displacements)
    return ONE_WAY_GAP * max(float(u.max(initial=0.0)), 1e-6 * extent)


def chord_change(st: Structure, sub, res, mid: str) -> float:
    """Lengthening of the chord of member ``mid`` (m) from the nodal displacements of
    ``res`` (a solution ``sub`` of a structure with the same nodes)."""
    m = st.members[mid]
    du = _translation(sub, res, m.end) - _translation(sub, res, m.start)
    return float(du @ np.array(st.direction(mid)))


def free_elongation(st: Structure, case: str, mid: str) -> float:
    """Misfit plus thermal elongation of member ``mid`` in ``case`` (m): its unstressed
    length less the distance between its nodes."""
    m = st.members[mid]
    total = 0.0
    for ld in st.loads:
        if ld.case != case or getattr(ld, "member", None) != mid:
            continue
        if isinstance(ld, Misfit):
            total += ld.elongation
        elif isinstance(ld, TemperatureLoad) and m.alpha is not None:
            total += m.alpha * ld.uniform * st.length(mid)
    return total


def _settlement(st: Structure, case: str, name: str) -> float:
    node, direction = name.split(".")
    return sum(v for ld in st.loads if isinstance(ld, Settlement) and ld.case == case
               and ld.node == node for d, v in ld.values if d == direction)


def _closing(st: Structure, sub, res, case: str, out_b, out_s):
    """The bars and supports taken out whose gap would close (beyond round-off)."""
    tol = _gap_tolerance(st, sub, res)
    bars = set()
    for mid in out_b:
        opening = chord_change(st, sub, res, mid) - free_elongation(st, case, mid)
        if (opening if st.members[mid].acts == "tension" else -opening) > tol:
            bars.add(mid)
    bearings = set()
    for node in out_s:
        r = st.supports[node].restraints[0]
        along = float(_translation(sub, res, node) @ np.array(r.vector[:2]))
        if along - _settlement(st, case, r.name) < -tol:
            bearings.add(node)
    return frozenset(bars), frozenset(bearings)


# ---------------------------------------------------------------------- the result
def _on_given(st: Structure, sol, case: str, sub, state: CaseState, notes: list[str]):
    """The re-solve's result of ``case`` written on the structure as given (see the module
    docstring), with the unit-load displacements checked against the re-solve's."""
    from .solution import CaseResult

    topo, full, res = sol.topology, sol.cases[case], sub.cases[case]
    ncol = len(topo.columns)
    s, d = np.zeros(ncol), np.zeros(ncol)
    ci = sub.topology.column_index
    for j, col in enumerate(topo.columns):
        k = ci.get(col.name)
        if k is not None:
            s[j], d[j] = res.s[k], res.deformations[k]
    c = full.loading.settlement
    for mid in state.slack:
        for j, col in enumerate(topo.columns):
            if col.owner == mid and col.kind != "reaction":
                d[j] = chord_change(st, sub, res, mid)
    for node in state.lifted:
        r = st.supports[node].restraints[0]
        j = topo.column_index[r.name]
        d[j] = c[j] - float(_translation(sub, res, node) @ np.array(r.vector[:2]))
    u = sol.released.displacements(d - c)
    out = CaseResult.build(st, topo, full.loading, s[sol.redundant_columns],
                           full.load_terms, full.imposed, s, full.s0, u, d, sol.released)
    out.stiffness = res.stiffness
    _check_displacements(sub, res, topo, u, case, notes)
    return out


def _check_displacements(sub, res, topo, u: np.ndarray, case: str, notes: list[str]) -> None:
    di = sub.topology.dof_index
    ref = np.array([res.nodal_displacements[di[d]] if d in di else np.nan for d in topo.dofs])
    known = ~np.isnan(ref)
    scale = max(float(np.abs(ref[known]).max(initial=0.0)), 1e-300)
    worst = float(np.abs(u[known] - ref[known]).max(initial=0.0))
    if worst > 1e-6 * scale:
        notes.append(f"LOAD CASE {case}: THE DISPLACEMENTS OF ITS ONE-WAY STATE DISAGREE "
                     f"BETWEEN THE RE-SOLVE AND THE STRUCTURE AS GIVEN ({worst / scale:.1e} "
                     "of the largest); do not use its displacements before the cause is found")
