"""The force-method pipeline: topology -> released structure -> energy -> compatibility.

For redundants X (one per column released), the basic forces are s = s0 + B X, where s0
holds the released structure's forces under the loads and column i of B its forces for
X_i = 1. Menabrea's least-work theorem (Castigliano's second theorem with the settlement
work) gives, for every i,

    dU/dX_i = sum_j delta_ij X_j + delta_i0 = Delta_i

with the flexibility delta = B' F B, the load terms delta_0 = B' (F s0 + e - c) + c_R
and Delta = c_R: c holds the support settlements along the rigid reaction columns and c_R
those at the redundants themselves (zero when the redundant is no settling reaction).
"""

from __future__ import annotations

import numpy as np

from .compatibility import FlexibilitySolver, flexibility_matrix
from .elements import kind_of
from .energy import flexibility_blocks
from .errors import CaseError
from .model import Structure
from .solution import Solution
from .stability import layout_warnings, soft_spring_warnings
from .statics import ReleasedStructure
from .superposition import cross_check, solve_cases
from .thresholds import BETTER_CONDITION_FACTOR, CONDITION_WARN, LOCAL_BASIS_MIN_COLUMNS
from .topology import build_topology, check_stable, choose_redundants

__all__ = ["solve", "resolve_basis", "column_count", "BASES"]

BASES = ("auto", "released", "local")


def solve(structure: Structure, redundants=None, *, where: str | None = None,
          verify: bool | None = None, basis: str = "auto", progress=None) -> Solution:
    """Solve a structure by the least-work (force) method.

    Parameters
    ----------
    structure : Structure
        The case (see :func:`leastwork.load_case`).
    redundants : list of str, optional
        Names of the redundants (``"C.y"``, a bar id, ``"AB.end.m"``...). Default: the
        structure's own ``[analysis] redundants`` or an automatic choice.
    where : str, optional
        Where the redundants were given, for error messages.
    verify : bool, optional
        Cross-check every load case with the independent direct-stiffness solver
        (:mod:`leastwork.verify.cross_check`). Default: when the structure is small enough for it to be
        instant.
    basis : {"auto", "released", "local"}
        "released": the unit redundant states of one released structure (dense; the full
        audit trail). "local": local self-stress states, sparse throughout, for large
        structures (:mod:`leastwork.sparse_solve`); redundants cannot be named. "auto": local
        above ``LOCAL_BASIS_MIN_COLUMNS`` basic forces when no redundants are named.
    progress : callable, optional
        Called with the name of each phase as it starts (for progress displays).

    Returns
    -------
    Solution
        Redundants, forces, reactions, displacements and checks for every load case.

    One-way bars and supports (``acts``) are settled per load case afterwards
    (:mod:`leastwork.one_way`).

    Raises
    ------
    CaseError
        Invalid redundant names or count.
    MechanismError
        The structure, or the released structure, is unstable; or a load case has no state
        in which its one-way members and supports act as they may.

    A space structure (a case with 3D nodes) is solved by
    :func:`leastwork.space.solve_space` and gives a :class:`leastwork.space.SpaceSolution`.
    """
    if getattr(structure, "is_space", False):
        from .space.solve import solve_space

        return solve_space(structure, redundants, where=where,  # type: ignore[return-value]
                           verify=verify is not False)
    sol = _solve_as_given(structure, redundants, where=where, verify=verify, basis=basis,
                          progress=progress)
    if any(m.acts != "both" for m in structure.members.values()) or any(
            s.acts != "both" for s in structure.supports.values()):
        from .one_way import settle

        _phase(progress, "one-way states")
        sol = settle(structure, sol, lambda st: _solve_as_given(st, None, verify=verify,
                                                                basis=basis))
    return sol


def _solve_as_given(structure: Structure, redundants=None, *, where: str | None = None,
                    verify: bool | None = None, basis: str = "auto",
                    progress=None) -> Solution:
    """:func:`solve` with every one-way member and support taken as acting."""
    st = structure
    names = redundants if redundants is not None else st.redundants
    basis = resolve_basis(st, names, basis, where or "[analysis] redundants")
    fallback: list[str] = []
    if basis == "local":
        from .sparse_solve import SweepSingular, solve_local

        try:
            return solve_local(st, verify=verify, progress=progress)
        except SweepSingular as exc:
            fallback.append(exc.note)
    _phase(progress, "equilibrium matrix")
    topo = build_topology(st)
    if where is None:
        where = "--redundants" if redundants is not None else "[analysis] redundants"
    chosen_by_user = names is not None
    check_stable(st, topo)
    notes: list[str] = [*fallback, *layout_warnings(st, topo)]
    _phase(progress, "redundants")
    red = choose_redundants(st, topo, names, where=where)
    _phase(progress, "flexibility")
    F = flexibility_blocks(st, topo)
    parts = _flexibility(st, topo, red, F)
    if parts[-1].cond > CONDITION_WARN:
        red, parts, note = _conditioning(st, topo, F, red, parts, chosen_by_user)
        notes.append(note)
    released, B, delta, solver = parts
    notes.extend(soft_spring_warnings(st, topo, B))
    _phase(progress, "load cases")
    results = solve_cases(st, topo, red, B, F, released, solver)
    _check_targets(st, topo)
    notes.extend(cross_check(st, results, solver.cond, verify, progress))
    return Solution(st, topo, red, chosen_by_user, B, F, delta, results,
                    warnings=tuple(solver.warnings + notes), released=released,
                    condition=solver.cond, flexibility_solver=solver)


def _phase(progress, name: str) -> None:
    """Tell the progress display (if any) that phase ``name`` starts."""
    if progress is not None:
        progress(name)


def _conditioning(st: Structure, topo, F: np.ndarray, red: list[int], parts,
                  chosen_by_user: bool):
    """For an ill-conditioned flexibility matrix: the redundants to use, their
    :func:`_flexibility` parts, and the warning that says so. An automatic choice gives way
    to a better-conditioned one (see :func:`_better_choice`); a user's choice is kept, with
    the better one named."""
    cond = parts[-1].cond
    alt = _better_choice(st, topo, F, red, cond)
    if alt is not None and not chosen_by_user:
        note = (f"the first choice of redundants ({_names(topo, red)}) gave a "
                f"flexibility matrix with condition number {cond:.2g}; "
                f"{_names(topo, alt[0])} was used instead (condition number "
                f"{alt[-1].cond:.2g})")
        return alt[0], alt[1:], note
    if alt is not None:
        note = (f"the flexibility matrix is ill-conditioned (condition number "
                f"{cond:.2g}): digits of the redundants may be lost; the "
                f"redundants {_names(topo, alt[0])} would give "
                f"{alt[-1].cond:.2g}")
    else:
        note = (f"the flexibility matrix is ill-conditioned (condition number "
                f"{cond:.2g}): digits of the redundants may be lost, whatever "
                "the redundants; check the model for near-mechanisms or members of "
                "wildly different stiffness")
    return red, parts, note


def resolve_basis(st: Structure, names, basis: str, where: str) -> str:
    """"released" or "local" for ``basis`` ("auto": local above ``LOCAL_BASIS_MIN_COLUMNS``
    basic forces when no redundants are named). Redundants named with the local basis are
    a CaseError located at ``where``."""
    if basis not in BASES:
        raise ValueError(f"basis must be one of {BASES}, not {basis!r}")
    if basis == "auto":
        return "local" if names is None and column_count(st) > LOCAL_BASIS_MIN_COLUMNS \
            else "released"
    if basis == "local" and names is not None:
        raise CaseError("redundants cannot be named with the local self-stress basis; "
                        "name them with the released basis, or leave them out",
                        source=st.source, where=where)
    return basis


def column_count(st: Structure) -> int:
    """Basic forces and reactions of the structure, counted without building anything."""
    n = sum(len(kind_of(m).basic_forces(m)) for m in st.members.values())
    return n + sum(len(s.restraints) for s in st.supports.values())


def _flexibility(st: Structure, topo, red: list[int], F: np.ndarray):
    """Released structure, unit states B, flexibility delta and its solver for ``red``."""
    released = ReleasedStructure(topo, red)
    B = released.unit_redundant_states()
    delta = flexibility_matrix(B, F)
    solver = FlexibilitySolver(delta, [topo.columns[j].name for j in red], st.source)
    return released, B, delta, solver


def _better_choice(st: Structure, topo, F: np.ndarray, red: list[int], cond: float):
    """An alternative set of redundants (member forces rather than reactions) if its
    flexibility matrix is better conditioned by more than ``BETTER_CONDITION_FACTOR``,
    else None."""
    alt = choose_redundants(st, topo, None, prefer="members")
    if sorted(alt) == sorted(red):
        return None
    parts = _flexibility(st, topo, alt, F)
    if parts[-1].cond * BETTER_CONDITION_FACTOR < cond:
        return (alt, *parts)
    return None


def _names(topo, red: list[int]) -> str:
    return ", ".join(topo.columns[j].name for j in red)


def _check_targets(st: Structure, topo) -> None:
    from .displacements import parse_target

    for t in st.displacements:
        parse_target(st, topo, t, "[analysis] displacements")
