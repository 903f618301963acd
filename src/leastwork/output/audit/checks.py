"""Step 8: the equilibrium check, the cross-check by the direct stiffness method, and the
warnings of the solve."""

from __future__ import annotations

from ..sheet import Para, Step, fmt
from .context import Context

__all__ = ["step_check"]


def step_check(ctx: Context) -> Step:
    blocks: list = [Para(
        "Equilibrium of every node and of the whole structure, recomputed from the final "
        "member end forces, the reactions and the loads as given (not from the "
        "equilibrium matrix).")]
    blocks.extend(_equilibrium(ctx, case) for case in ctx.cases)
    blocks.extend(_cross_check(ctx, case) for case in ctx.cases)
    blocks.extend(Para(w, "warning") for w in ctx.sol.warnings)
    return Step(8, "Equilibrium check, cross-check and caution", tuple(blocks))


def _equilibrium(ctx: Context, case: str) -> Para:
    ch = ctx.numbers(case).checks
    fu = ctx.u.force_unit
    if ch["equilibrium_ok"]:
        return Para(f"Load case {case}: largest residual {fmt(ch['equilibrium_residual'])} {fu} "
                    f"(tolerance {fmt(ch['equilibrium_tolerance'])}): OK.")
    return Para(f"Load case {case}: EQUILIBRIUM CHECK FAILED — largest residual "
                f"{fmt(ch['equilibrium_residual'])} {fu} exceeds "
                f"{fmt(ch['equilibrium_tolerance'])}. These numbers must not be used.", "alarm")


def _cross_check(ctx: Context, case: str) -> Para:
    c = ctx.sol.cases[case].stiffness
    if c is None:
        return Para(f"Load case {case}: no cross-check by the direct stiffness method "
                    "(skipped).", "note")
    if c.ok:
        return Para(f"Load case {case}: the independent direct stiffness method agrees: "
                    f"largest difference of reactions and end forces {fmt(c.difference, 2)} "
                    "of the largest force.")
    found = (f"gives no answer ({c.failure})" if c.difference is None
             else f"differs by {fmt(c.difference, 2)} of the largest force at {c.where}")
    return Para(f"Load case {case}: CROSS-CHECK FAILED — the direct stiffness method {found}. "
                "These numbers must not be used before the cause is found.", "alarm")
