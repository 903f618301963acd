"""Step 3: the released structure under the loads and under a unit value of each
redundant (or each local self-stress state): axial forces, bending moments along the
beams, and their products per member and term."""

from __future__ import annotations

import numpy as np

from ...elements import column_of, has_bending, integrate, kind_of
from ...fields import gauss_integral
from ...solution import member_result
from ..sheet import Grid, Step
from .context import Context, pair_labels
from .contributions import load_sources, term_products
from .polynomials import poly_text, scaled_poly

__all__ = ["step_released"]


def step_released(ctx: Context) -> Step:
    st, nr = ctx.st, ctx.nred
    blocks: list = []
    pairs = pair_labels(nr)
    if nr and any(m.EA is not None and m.curve is None for m in st.members.values()):
        blocks.append(_unit_axial(ctx, pairs))
    if nr and any(has_bending(m) for m in st.members.values()):
        if any(m.curve is None and has_bending(m) for m in st.members.values()):
            blocks.append(_unit_moments(ctx))
        if any(m.curve is not None for m in st.members.values()):
            from .curved import curved_integrals, curved_unit_moments

            blocks += [curved_unit_moments(ctx), curved_integrals(ctx, pairs)]
        blocks.append(_pair_table(ctx, "bending", "∫ m{i}·m{j} dx / EI", pairs))
        if st.shear:
            blocks.append(_pair_table(ctx, "shear", "∫ v{i}·v{j} dx / GAs", pairs))
    if nr and any(t.term == "joint spring" for t in ctx.terms):
        blocks.append(_pair_table(ctx, "joint spring", "M{i}·M{j} / k", pairs))
    if nr and any(t.term == "spring" for t in ctx.terms):
        blocks.append(_pair_table(ctx, "spring", "r{i}·r{j} / k", pairs))
    for case in ctx.cases:
        blocks.extend(_released_under_loads(ctx, case))
    return Step(3, "Released structure under the loads; the unit self-stress states"
                if ctx.local else "Released structure under the loads and unit redundants",
                tuple(blocks))


def _axial_column(ctx: Context, m) -> int:
    return ctx.topo.column_index[column_of(m, "axial")]


def _unit_fields(ctx: Context, m, i: int) -> dict:
    """Section-force fields (coefficients in x) of member ``m`` in unit state ``i``, as its
    kind gives them."""
    kind, ci = kind_of(m), ctx.topo.column_index
    values = [ctx.B[ci[bf.name], i] for bf in kind.basic_forces(m)]
    return kind.force_fields(m, ctx.st.length(m.id), values, 0.0)


def _unit_axial(ctx: Context, pairs) -> Grid:
    st, u, nr = ctx.st, ctx.u, ctx.nred
    heads = ["member", f"L [{u.length_unit}]", f"EA [{u.force_unit}]"]
    heads += [f"n{i + 1} [{u.ratio('force', ctx.xq[i])[1]}]" for i in range(nr)]
    heads += [f"n{i + 1}·n{j + 1}·L/EA [{ctx.delta_label(i, j)}]" for i, j in pairs]
    rows, tot = [], np.zeros(len(pairs))
    axial_terms = {t.owner: t for t in ctx.terms if t.term == "axial"}
    # a curved member's axial energy couples all its basic forces: shown in step 4
    for m in (m for m in st.members.values() if m.EA is not None and m.curve is None):
        k = _axial_column(ctx, m)
        L = st.length(m.id)
        n = [ctx.unit_state(k, i) for i in range(nr)]
        flex = float(axial_terms[m.id].block[0, 0])  # the kind's L/EA
        prods = [ctx.delta_case(ctx.B[k, i] * ctx.B[k, j] * flex, i, j) for i, j in pairs]
        tot += prods
        rows.append((m.id, u.convert(L, 0, 1), u.convert(m.EA, 1, 0), *n, *prods))
    per = "per unit state amplitude" if ctx.local else "per unit redundant"
    return Grid(f"Axial forces of the released structure {per} (bars, and beams with an "
                "area)", tuple(heads), tuple(rows), total=("total", "", "", *[""] * nr, *tot))


def _unit_moments(ctx: Context) -> Grid:
    st, u, nr = ctx.st, ctx.u, ctx.nred
    rows = []
    for m in (m for m in st.members.values() if has_bending(m) and m.curve is None):
        L = st.length(m.id)
        polys = []
        for i in range(nr):
            moment = _unit_fields(ctx, m, i)["m"]
            coef = scaled_poly([*moment, 0.0][:2], u.L, u.ratio("moment", ctx.xq[i])[0])
            polys.append(poly_text(coef))
        rows.append((m.id, u.convert(L, 0, 1), u.convert(m.EI, 1, 2), *polys))
    heads = ["beam", f"L [{u.length_unit}]", f"EI [{u.label(1, 2)}]"]
    heads += [f"m{i + 1}(x) [{u.ratio('moment', ctx.xq[i])[1]}]" for i in range(nr)]
    return Grid(f"Bending moments of the released structure per unit redundant (x from the "
                f"start node, in {u.length_unit})", tuple(heads), tuple(rows))


def _pair_table(ctx: Context, term: str, pattern: str, pairs) -> Grid:
    rows, tot = [], np.zeros(len(pairs))
    for owner, _, vals in term_products(ctx, pairs, term):
        tot += vals
        rows.append((owner, *vals))
    heads = ["member" if term != "spring" else "restraint"]
    heads += [pattern.format(i=i + 1, j=j + 1) + f" [{ctx.delta_label(i, j)}]"
              for i, j in pairs]
    what = {"bending": "Bending", "shear": "Shear", "spring": "Support spring",
            "joint spring": "Semi-rigid joint (end moment at the joint)"}[term]
    return Grid(f"{what} products of the unit states", tuple(heads), tuple(rows),
                total=("total", *tot))


def _released_under_loads(ctx: Context, case: str) -> list:
    out: list = []
    if any(m.EA is not None and m.curve is None for m in ctx.st.members.values()):
        out.append(_axial_under_loads(ctx, case))
    if any(has_bending(m) for m in ctx.st.members.values()):
        out.append(_moments_under_loads(ctx, case))
    return out


def _axial_under_loads(ctx: Context, case: str) -> Grid:
    u, nr = ctx.u, ctx.nred
    heads = ["member", f"N0 [{u.force_unit}]"]
    heads += [f"∫ N0·n{i + 1} dx/EA [{ctx.load_label(i)}]" for i in range(nr)]
    rows, tot = [], np.zeros(nr)
    sources = load_sources(ctx, case)
    for m in (m for m in ctx.st.members.values() if m.EA is not None and m.curve is None):
        k = _axial_column(ctx, m)
        vec = sources.get((m.id, "loads, axial"), np.zeros(nr))
        vals = [ctx.load_term_case(float(vec[i]), i) for i in range(nr)]
        tot += vals
        rows.append((m.id, u.convert(ctx.s0[case][k], 1, 0), *vals))
    return Grid(f"Load case {case}: axial forces of the released structure under the loads",
                tuple(heads), tuple(rows), total=("total", "", *tot) if nr else None)


def _moments_under_loads(ctx: Context, case: str) -> Grid:
    """M0(x) piece by piece along each beam, with the integrals of M0·mi/EI over the piece."""
    st, topo, u, nr = ctx.st, ctx.topo, ctx.u, ctx.nred
    res = ctx.sol.cases[case]
    heads = ["beam", f"from [{u.length_unit}]", f"to [{u.length_unit}]",
             f"M0(x) [{u.moment_unit}]"]
    heads += [f"∫ M0·m{i + 1} dx/EI [{ctx.load_label(i)}]" for i in range(nr)]
    rows, tot = [], np.zeros(nr)
    if any(m.curve is not None for m in st.members.values()):
        from .curved import curved_under_loads

        for row in curved_under_loads(ctx, case, lambda mid: member_result(
                st, topo, mid, ctx.s0[case], res.loading.particulars.get(mid))):
            tot += row[4:]
            rows.append(row)
    for m in (m for m in st.members.values() if has_bending(m) and m.curve is None):
        mr0 = member_result(st, topo, m.id, ctx.s0[case], res.loading.particulars.get(m.id))
        unit = [_unit_fields(ctx, m, i)["m"] for i in range(nr)]
        along = getattr(kind_of(m), "section_at_length", None)  # a tapered beam
        EI = (along(m, st.length(m.id), st.shear) if along
              else kind_of(m).section(m, m, st.shear))["m"]
        for a, b, coef in mr0.m.pieces():
            vals = []
            for i, mi in enumerate(unit):
                if callable(EI):  # a tapered beam: adaptive, as the solver integrated it
                    f = integrate(lambda x, c=coef, mi=mi, EI=EI: float(
                        np.polynomial.polynomial.polyval(x, c)
                        * np.polynomial.polynomial.polyval(x, mi)) / EI(x), float(a), float(b))
                else:
                    f = gauss_integral(np.array([a, b]), lambda x, c=coef, mi=mi: (
                        np.polynomial.polynomial.polyval(x, c)
                        * np.polynomial.polynomial.polyval(x, mi))) / EI
                vals.append(ctx.load_term_case(f, i))
            tot += vals
            rows.append((m.id, u.convert(a, 0, 1), u.convert(b, 0, 1),
                         poly_text(scaled_poly(coef, u.L, u.factor("moment"))), *vals))
    return Grid(f"Load case {case}: bending moments of the released structure under the "
                f"loads (x from the start node, in {u.length_unit})", tuple(heads),
                tuple(rows), total=("total", "", "", "", *tot) if nr else None)
