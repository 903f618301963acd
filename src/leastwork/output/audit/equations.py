"""Step 5: the compatibility equations dU/dX_i = Delta_i (Menabrea), symbolic and with the
numbers of each load case."""

from __future__ import annotations

from ...thresholds import CONDITION_WARN
from ..mathml import tex_number
from ..sheet import Formula, Para, Step, fmt
from .context import Context

__all__ = ["step_equations"]


def step_equations(ctx: Context) -> Step:
    nr = ctx.nred
    blocks: list = [Para(
        "Menabrea's least-work theorem (Castigliano's second theorem): the derivative of "
        "the complementary energy with respect to each redundant equals the imposed "
        "displacement at that redundant (zero unless a support settles there).")]
    if not nr:
        return Step(5, "Compatibility equations", (*blocks, Para("No redundants.")))
    blocks.append(Para(
        f"The flexibility matrix is symmetric (Maxwell-Betti); its condition number after "
        f"scaling the diagonal to one is {fmt(ctx.sol.condition, 3)} (above "
        f"{fmt(CONDITION_WARN)} the tool warns and looks for better redundants)."))
    for i in range(nr):
        sym = " + ".join(f"δ{i + 1}{j + 1}·X{j + 1}" for j in range(nr)) + f" + δ{i + 1}0"
        blocks.append(Formula(f"∂U/∂X{i + 1} = {sym} = Δ{i + 1}",
                              rf"\frac{{\partial U}}{{\partial X_{i + 1}}} = "
                              + " + ".join(rf"\delta_{{{i + 1}{j + 1}}} X_{j + 1}"
                                           for j in range(nr))
                              + rf" + \delta_{{{i + 1}0}} = \Delta_{i + 1}"))
    for case in ctx.cases:
        n = ctx.numbers(case)
        state = ctx.sol.states.get(case)
        if state is not None and state.changed:
            blocks.append(Para(
                f"Load case {case}: one-way members or supports were taken out "
                f"({', '.join([*state.slack, *state.lifted])}), so the equations of the "
                "structure as given do not hold for this case; its results come from a "
                "solve without them (step 6).", "note"))
            continue
        blocks.append(Para(f"Load case {case}:"))
        for i in range(nr):
            lhs = " + ".join(f"({fmt(ctx.flex[i][j])})·X{j + 1}" for j in range(nr))
            tex = " + ".join(rf"({tex_number(fmt(ctx.flex[i][j]))})\,X_{{{j + 1}}}"
                             for j in range(nr))
            blocks.append(Formula(
                f"{lhs} + ({fmt(n.load_terms[i])}) = {fmt(n.imposed[i])}",
                rf"{tex} + ({tex_number(fmt(n.load_terms[i]))}) = "
                + tex_number(fmt(n.imposed[i]))))
    return Step(5, "Compatibility equations ∂U/∂Xi = Δi", tuple(blocks))
