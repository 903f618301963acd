"""Step 4: the flexibility coefficients delta_ij and the load terms delta_i0, member by
member and term by term, with the totals the solver used."""

from __future__ import annotations

from ..sheet import Formula, Grid, Para, Step
from .context import Context, pair_labels
from .contributions import load_sources, term_products
from .tapered import tapered_blocks

__all__ = ["step_coefficients"]

_DELTA_I0 = Formula(
    "δi0 = Σ ∫ mi·M0/EI dx + Σ ∫ ni·N0/EA dx (+ shear, springs) + Σ ∫ ni·α·ΔT dx "
    "+ Σ ∫ mi·α·ΔTgrad/h dx + Σ ni·e(misfit) - Σ ri·c(settlement)",
    r"\delta_{i0} = \sum\int \frac{m_i M_0}{EI}dx + \sum\int\frac{n_i N_0}{EA}dx"
    r" + \sum\int n_i\alpha\Delta T\,dx + \sum\int m_i\frac{\alpha\Delta T_g}{h}dx"
    r" + \sum n_i e - \sum r_i c")


def step_coefficients(ctx: Context) -> Step:
    nr = ctx.nred
    if not nr:
        return Step(4, "Flexibility coefficients and load terms",
                    (Para("No redundants: nothing to compute."),))
    pairs = pair_labels(nr)
    blocks: list = [_delta_ij(ctx.st.shear)]
    rows = [(owner, term, *vals) for owner, term, vals in term_products(ctx, pairs)
            if any(v != 0.0 for v in vals)]
    heads = ["member", "term"] + [f"δ{i + 1}{j + 1} [{ctx.delta_label(i, j)}]"
                                  for i, j in pairs]
    blocks.append(Grid("Flexibility coefficients, contribution of each member and term",
                       tuple(heads), tuple(rows), keys=2,
                       total=("δ", "total", *[ctx.flex[i][j] for i, j in pairs])))
    blocks += tapered_blocks(ctx)
    blocks.append(_DELTA_I0)
    for case in ctx.cases:
        blocks.append(_load_terms(ctx, case))
    return Step(4, "Flexibility coefficients δij and load terms δi0, term by term",
                tuple(blocks))


def _delta_ij(shear: bool) -> Formula:
    return Formula(
        "δij = Σ ∫ mi·mj/EI dx + Σ ∫ ni·nj/EA dx"
        + (" + Σ ∫ vi·vj/GAs dx" if shear else "") + " + Σ ri·rj/k",
        r"\delta_{ij} = \sum \int \frac{m_i m_j}{EI}\,dx + \sum \int \frac{n_i n_j}{EA}\,dx"
        + (r" + \sum \int \frac{v_i v_j}{GA_s}\,dx" if shear else "")
        + r" + \sum \frac{r_i r_j}{k}")


def _load_terms(ctx: Context, case: str) -> Grid:
    nr = ctx.nred
    rows = []
    for (owner, what), vec in load_sources(ctx, case).items():
        vals = [ctx.load_term_case(float(vec[i]), i) for i in range(nr)]
        if any(v != 0.0 for v in vals):
            rows.append((owner, what, *vals))
    heads = ["source", "effect"] + [f"δ{i + 1}0 [{ctx.load_label(i)}]" for i in range(nr)]
    return Grid(f"Load case {case}: load terms, contribution of each member, term and "
                "imposed effect", tuple(heads), tuple(rows), keys=2,
                total=("δ0", "total", *ctx.numbers(case).load_terms))
