"""Reanalysis: the same layout with other sections, materials, springs or loads.

The states (unit redundant states or local self-stress states) and the released structure
depend only on the equilibrium matrix, that is on the geometry, the members' connectivity
and end releases and the supports' directions. Sections, materials, spring stiffnesses,
shear energy and the loads enter only through the flexibility F, the initial deformations
and the load vectors. So a second analysis reuses the first one's states and its factorised
released structure: its cost is forming delta = B' F B, one factorisation of it, and the
load cases.
"""

from __future__ import annotations

from ..compatibility import flexibility_matrix
from ..errors import CaseError
from ..model import Structure
from ..solution import Solution
from ..solve import _check_targets
from ..stability import layout_warnings, soft_spring_warnings
from ..superposition import cross_check, solve_cases

__all__ = ["reanalyse", "layout_differences"]


def layout_differences(a: Structure, b: Structure) -> list[str]:
    """What differs between the layouts of ``a`` and ``b`` (empty: the states of one serve
    the other): joints and their positions, members (kind, joints, end releases), support
    restraints (directions; a spring may become rigid or change stiffness)."""
    out: list[str] = []
    if list(a.nodes) != list(b.nodes):
        out.append("the joints differ")
    else:
        for nid, na in a.nodes.items():
            nb = b.nodes[nid]
            if (na.x, na.y) != (nb.x, nb.y):
                out.append(f"joint {nid} moved")
    if list(a.members) != list(b.members):
        out.append("the members differ")
    else:
        for mid, ma in a.members.items():
            mb = b.members[mid]
            same = (ma.kind, ma.start, ma.end, ma.hinge_start, ma.hinge_end) == (
                mb.kind, mb.start, mb.end, mb.hinge_start, mb.hinge_end)
            if not same:
                out.append(f"member {mid} is connected differently")
    ra = [(r.name, r.vector) for s in a.supports.values() for r in s.restraints]
    rb = [(r.name, r.vector) for s in b.supports.values() for r in s.restraints]
    if ra != rb:
        out.append("the supports differ")
    return out


def reanalyse(previous: Solution, structure: Structure, *, verify: bool | None = None) -> Solution:
    """Solve ``structure`` on the states and released structure of ``previous``.

    ``structure`` must have the layout of ``previous.structure`` (see
    :func:`layout_differences`); its sections, materials, springs, shear option, loads and
    load cases are free. Raises CaseError naming what differs otherwise.
    """
    diff = layout_differences(previous.structure, structure)
    if diff:
        raise CaseError("cannot reuse the states of the previous analysis: "
                        + "; ".join(diff), source=structure.source)
    import dataclasses

    st = structure
    # the same reaction columns, with the new structure's restraints (spring stiffnesses)
    new = {r.name: r for sup in st.supports.values() for r in sup.restraints}
    topo = dataclasses.replace(previous.topology, restraints=tuple(
        new[r.name] for r in previous.topology.restraints))
    _check_targets(st, topo)
    red = list(previous.redundant_columns)
    B = previous.B
    names = [topo.columns[j].name for j in red]
    released = previous.released
    F = released.flexibility(st, topo)
    delta = flexibility_matrix(B, F)
    solver = released.compatibility_solver(delta, names, st.source)
    results = solve_cases(st, topo, red, B, F, released, solver)
    layout = layout_warnings(st, topo, released.stability_basis(B))
    notes = [*layout, *soft_spring_warnings(st, topo, B),
             *cross_check(st, results, solver.cond, verify)]
    sol = Solution(st, topo, red, previous.chosen_by_user, B, F, delta, results,
                   warnings=tuple(solver.warnings + notes), released=previous.released,
                   condition=solver.cond, flexibility_solver=solver, basis=previous.basis,
                   long_range_states=previous.long_range_states)
    if any(m.acts != "both" for m in st.members.values()) or any(
            s.acts != "both" for s in st.supports.values()):
        from ..one_way import settle
        from ..solve import _solve_as_given

        sol = settle(st, sol, lambda s: _solve_as_given(s, None, verify=verify,
                                                        basis=previous.basis))
    return sol
