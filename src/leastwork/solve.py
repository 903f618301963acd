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

from .elements import kind_of
from .energy import flexibility_blocks, initial_deformations
from .errors import CaseError
from .model import Structure
from .solution import CaseResult, Solution
from .stability import soft_spring_warnings
from .statics import ReleasedStructure, case_loading
from .topology import build_topology, check_stable, choose_redundants

__all__ = ["solve", "resolve_basis", "column_count", "solve_cases", "flexibility_matrix", "cross_check", "FlexibilitySolver", "CONDITION_WARN", "LOCAL_BASIS_MIN_COLUMNS", "BASES",
           "layout_warnings"]


#: Above this many basic forces and reactions the automatic choice is the local
#: self-stress basis (sparse path, :mod:`leastwork.sparse_solve`).
LOCAL_BASIS_MIN_COLUMNS = 1500

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
        (:mod:`leastwork.checks`). Default: when the structure is small enough for it to be
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

    Raises
    ------
    CaseError
        Invalid redundant names or count.
    MechanismError
        The structure, or the released structure, is unstable.
    """
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
    if progress is not None:
        progress("equilibrium matrix")
    topo = build_topology(st)
    if where is None:
        where = "--redundants" if redundants is not None else "[analysis] redundants"
    chosen_by_user = names is not None
    check_stable(st, topo)
    notes: list[str] = [*fallback, *layout_warnings(st, topo)]
    if progress is not None:
        progress("redundants")
    red = choose_redundants(st, topo, names, where=where)
    if progress is not None:
        progress("flexibility")
    F = flexibility_blocks(st, topo)
    released, B, delta, solver = _flexibility(st, topo, red, F)
    if solver.cond > CONDITION_WARN:
        alt = _better_choice(st, topo, F, red, solver.cond)
        if alt is not None and not chosen_by_user:
            notes.append(f"the first choice of redundants ({_names(topo, red)}) gave a "
                         f"flexibility matrix with condition number {solver.cond:.2g}; "
                         f"{_names(topo, alt[0])} was used instead (condition number "
                         f"{alt[-1].cond:.2g})")
            red, (released, B, delta, solver) = alt[0], alt[1:]
        elif alt is not None:
            notes.append(f"the flexibility matrix is ill-conditioned (condition number "
                         f"{solver.cond:.2g}): digits of the redundants may be lost; the "
                         f"redundants {_names(topo, alt[0])} would give "
                         f"{alt[-1].cond:.2g}")
        else:
            notes.append(f"the flexibility matrix is ill-conditioned (condition number "
                         f"{solver.cond:.2g}): digits of the redundants may be lost, whatever "
                         "the redundants; check the model for near-mechanisms or members of "
                         "wildly different stiffness")
    notes.extend(soft_spring_warnings(st, topo, B))
    if progress is not None:
        progress("load cases")
    results = solve_cases(st, topo, red, B, F, released, solver)
    _check_targets(st, topo)
    notes.extend(cross_check(st, results, solver.cond, verify, progress))
    return Solution(st, topo, red, chosen_by_user, B, F, delta, results,
                    warnings=tuple(solver.warnings + notes), released=released,
                    condition=solver.cond, flexibility_solver=solver)


def layout_warnings(st: Structure, topo, basis=None) -> list[str]:
    """Warnings that depend only on the layout, the same on every path: a near-mechanism
    (:func:`leastwork.stability.assess_stability`, which raises MechanismError for a
    mechanism to working precision; ``basis``: the local self-stress basis on the local
    path) and members that overlap or pass through a joint
    (:func:`leastwork.geometry_checks.overlap_warnings`)."""
    from .geometry_checks import overlap_warnings
    from .stability import assess_stability

    return [*assess_stability(st, topo, basis), *overlap_warnings(st)]


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


def solve_cases(st: Structure, topo, red: list[int], B, F, released, solver,
                local: bool = False) -> dict[str, CaseResult]:
    """Every load case of ``st`` on the states ``B`` (unit redundant states, or local
    self-stress states when ``local``), with flexibility ``F``, the factorised released
    structure and flexibility solver. Dense or sparse ``B`` and ``F`` alike."""
    results = {}
    size_B = abs(B)  # |B| |X|: the size of the terms of B X, for the equilibrium check
    for case in st.case_names:
        loading = case_loading(st, topo, case)
        s0 = released.forces(loading.p)[:, 0]
        e = initial_deformations(st, topo, loading.particulars, loading.imposed)
        c = loading.settlement
        Delta = c[red]
        load_terms = B.T @ (F @ s0 + e - c) + Delta
        X = solver.solve(Delta - load_terms)
        s = s0 + B @ X
        d = F @ s + e
        nodal_disp = released.displacements(d - c)
        res = CaseResult.build(st, topo, loading, s[red] if local else X, load_terms, Delta,
                               s, s0, nodal_disp, d, released,
                               formed=CaseResult.term_sizes(s0, size_B, X, local))
        if local:
            res.amplitudes = X
        results[case] = res
    return results


def cross_check(st: Structure, results: dict, condition: float, verify: bool | None,
                progress=None) -> list[str]:
    """Cross-check every load case with the direct stiffness method when ``verify`` (None:
    when small enough); the warnings of any disagreement."""
    if verify is None:
        from .checks import should_verify

        verify = should_verify(st)
    notes: list[str] = []
    if verify:
        from .checks import stiffness_check

        if progress is not None:
            progress("cross-check")
        for res in results.values():
            res.stiffness = stiffness_check(st, res, condition)
            if not res.stiffness.ok:
                notes.append(_disagreement(res))
    return notes


#: Jacobi-scaled condition number of the flexibility matrix above which the choice of
#: redundants is questioned (about half of double precision's 16 digits would be lost).
CONDITION_WARN = 1e8


def _flexibility(st: Structure, topo, red: list[int], F: np.ndarray):
    """Released structure, unit states B, flexibility delta and its solver for ``red``."""
    released = ReleasedStructure(topo, red)
    B = released.unit_redundant_states()
    delta = flexibility_matrix(B, F)
    solver = FlexibilitySolver(delta, [topo.columns[j].name for j in red], st.source)
    return released, B, delta, solver


def flexibility_matrix(B, F):
    """delta = B' F B (Maxwell-Betti: symmetric; the round-off of the product is averaged
    out), dense or scipy.sparse CSR as ``B`` and ``F`` are."""
    delta = B.T @ F @ B
    if hasattr(delta, "tocsr"):
        delta = delta.tocsr()
        return ((delta + delta.T) * 0.5).tocsr()
    return 0.5 * (delta + delta.T)


def _better_choice(st: Structure, topo, F: np.ndarray, red: list[int], cond: float):
    """An alternative set of redundants (member forces rather than reactions) if its
    flexibility matrix is at least ten times better conditioned, else None."""
    alt = choose_redundants(st, topo, None, prefer="members")
    if sorted(alt) == sorted(red):
        return None
    parts = _flexibility(st, topo, alt, F)
    if parts[-1].cond * 10 < cond:
        return (alt, *parts)
    return None


def _disagreement(res) -> str:
    c = res.stiffness
    if c.difference is None:
        return (f"load case {res.name}: the direct-stiffness cross-check gave no answer "
                f"({c.failure}); the force-method result is unconfirmed")
    return (f"LOAD CASE {res.name}: THE FORCE METHOD AND THE DIRECT-STIFFNESS CROSS-CHECK "
            f"DISAGREE (largest difference {c.difference:.2e} of the largest force, at "
            f"{c.where}); do not use these results before the cause is found")


def _names(topo, red: list[int]) -> str:
    return ", ".join(topo.columns[j].name for j in red)


def jacobi_scaling(diag: np.ndarray, names: list[str],
                   what: str) -> tuple[np.ndarray, np.ndarray, list[str]]:
    """For the diagonal of a flexibility matrix: which unknowns have no flexibility (at or
    below 1e-12 of the largest), the scale factors D = 1/sqrt(diag) (1 for those), and a
    warning for each (``what`` names the unknowns: "redundant", "the self-stress state
    closing"): such an unknown is not determined by compatibility and is taken as zero."""
    diag = np.asarray(diag, dtype=float).copy()
    scale_ref = max(float(np.max(np.abs(diag))), 1e-300)
    zero = diag <= 1e-12 * scale_ref
    notes = [f"{what} {names[i]} has no flexibility (it strains only axially rigid members "
             "or rigid parts); its value is not determined by compatibility and is taken as "
             "zero" for i in np.flatnonzero(zero)]
    return zero, 1.0 / np.sqrt(np.where(zero, 1.0, diag)), notes


class FlexibilitySolver:
    """Solve delta X = rhs, Jacobi-scaled; a redundant (or a combination) with no
    flexibility is explained and taken as zero (minimum-norm solution)."""

    def __init__(self, delta: np.ndarray, names: list[str], source: str):
        self.warnings: list[str] = []
        self.source = source
        n = delta.shape[0]
        self.n = n
        self.cond = 1.0
        if n == 0:
            return
        zero, self.D, notes = jacobi_scaling(np.diag(delta), names, "redundant")
        self.warnings.extend(notes)
        S = delta * self.D[:, None] * self.D[None, :]
        w, V = np.linalg.eigh(S)
        keep = w > 1e-11 * max(float(w.max()), 1e-300)
        if (~keep).sum() > zero.sum():
            self.warnings.append(
                "the flexibility matrix is singular: some combination of redundants strains "
                "no flexible part; the minimum-norm solution is used")
        self.w, self.V, self.keep = w, V, keep
        self.cond = float(w[keep].max() / w[keep].min()) if keep.any() else float("inf")

    def solve(self, rhs: np.ndarray) -> np.ndarray:
        """X for one right-hand side (nred,) or several (nred, k)."""
        rhs = np.asarray(rhs, dtype=float)
        if self.n == 0:
            return np.zeros(rhs.shape)
        D = self.D if rhs.ndim == 1 else self.D[:, None]
        b = D * rhs
        coef = self.V.T @ b
        y = np.zeros_like(coef)
        y[self.keep] = coef[self.keep] / (self.w[self.keep] if rhs.ndim == 1
                                          else self.w[self.keep][:, None])
        resid = coef[~self.keep]
        size = np.max(np.abs(b), axis=0, initial=0.0)  # per right-hand side
        if resid.size and np.any(np.max(np.abs(resid), axis=0) > 1e-9 * np.maximum(size, 1e-300)):
            raise CaseError(
                "the compatibility equations have no solution: an imposed deformation "
                "(temperature, misfit or settlement) acts on a part with no flexibility "
                "(an axially rigid member or a rigid support chain)", source=self.source)
        return D * (self.V @ y)


def _check_targets(st: Structure, topo) -> None:
    from .displacements import parse_target

    for t in st.displacements:
        parse_target(st, topo, t, "[analysis] displacements")
