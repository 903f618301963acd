"""Contributions per member and term: of the flexibility coefficients (delta_ij = sum over
the energy terms of B_t' F_t B_t), of the load terms (delta_i0 = B' (F s0 + e - c) term by
term and effect by effect) and of a unit-load displacement (virtual work term by term).
Each is summed from the same terms the solver summed (``Solution.flexibility_terms`` and
``Solution.deformation_terms``), so the contributions add up to the totals shown."""

from __future__ import annotations

import numpy as np

from .context import Context

__all__ = ["term_products", "load_sources", "displacement_contributions"]


def term_products(ctx: Context, pairs, term: str | None = None) -> list[tuple[str, str, list]]:
    """(owner, term, [delta_ij contribution in output units for each pair]) of every energy
    term (only those of kind ``term`` when given), in the order the solver summed them."""
    out = []
    for t in ctx.terms:
        if term is not None and t.term != term:
            continue
        Bt = ctx.B[list(t.columns)]
        vals = [ctx.delta_case(float(Bt[:, i] @ t.block @ Bt[:, j]), i, j) for i, j in pairs]
        out.append((t.owner, t.term, vals))
    return out


def load_sources(ctx: Context, case: str) -> dict[tuple[str, str], np.ndarray]:
    """(owner, effect) -> vector over the redundants (SI) of every load-term contribution
    of load case ``case``: the loads through each energy term, each initial deformation,
    each settlement of a reaction that is no redundant (found once per case)."""
    if case in ctx.sources:
        return ctx.sources[case]
    res = ctx.sol.cases[case]
    B, s0 = ctx.B, ctx.s0[res.name]
    out: dict[tuple[str, str], np.ndarray] = {}

    def add(owner, what, vec):
        out.setdefault((owner, what), np.zeros(ctx.nred))
        out[(owner, what)] += vec

    for t in ctx.terms:
        cols = list(t.columns)
        add(t.owner, "loads, " + t.term, B[cols].T @ (t.block @ s0[cols]))
    for d in ctx.deformations(res.name):
        what = "loads, " + d.effect[12:-1] if d.effect.startswith("span loads") else d.effect
        add(d.owner, what, B[d.column] * d.value)
    c = res.loading.settlement
    for j in np.flatnonzero(c):
        if j not in ctx.red:
            add(ctx.cols[j].name, "settlement", -B[j] * c[j])
    ctx.sources[case] = out
    return out


def _end_term(kind: str) -> str:
    """Which end moment a beam's span-load or gradient term works through: the start term
    (weight 1 - x/L) or the end term (weight x/L); nothing for an axial term."""
    return {"start_m": ", start term", "end_m": ", end term"}.get(kind, "")


def displacement_contributions(ctx: Context, case: str, s_u: np.ndarray,
                               dim: tuple[int, int]) -> list[tuple[str, str, float]]:
    """(source, term, contribution in output units) of the unit-load displacement whose
    unit load gives the released structure's forces ``s_u`` (round-off as zero): the
    virtual work on each energy term, each initial deformation and each settlement; zero
    contributions are left out."""
    res = ctx.sol.cases[case]
    unit = ctx.u.factor("rotation" if dim == (0, 0) else "displacement")
    s_final = ctx.denoise(res.s[:, None])[:, 0]
    rows = []
    for t in ctx.terms:
        cols = list(t.columns)
        v = float(s_u[cols] @ t.block @ s_final[cols]) / unit
        if v != 0.0:
            rows.append((t.owner, t.term, v))
    for d in ctx.deformations(case):
        v = s_u[d.column] * d.value / unit
        if v != 0.0:
            rows.append((d.owner, d.effect + _end_term(ctx.cols[d.column].kind), v))
    c = res.loading.settlement
    for j in np.flatnonzero(c):
        v = -s_u[j] * c[j] / unit
        if v != 0.0:
            rows.append((ctx.cols[j].name, "settlement", v))
    return rows
