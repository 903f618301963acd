"""Step 2: the redundants and the released structure (or, on the local basis, the local
self-stress states and the redundant each closes)."""

from __future__ import annotations

import numpy as np

from ..sheet import Grid, Para, Step
from .context import Context

__all__ = ["step_redundants"]

_RELEASED_BY = {"reaction": "support restraint {} removed",
                "axial": "member {} cut (its axial force released)",
                "start_m": "hinge put at the start of {}",
                "end_m": "hinge put at the end of {}"}
_CLOSES = {"reaction": "support restraint {}", "axial": "axial force of {}",
           "start_m": "moment at the start of {}", "end_m": "moment at the end of {}"}


def step_redundants(ctx: Context) -> Step:
    if ctx.local:
        return _local_states(ctx)
    if ctx.sol.chosen_by_user:
        why = ("The redundants were chosen by the user; the choice was checked: the "
               "structure left is statically determinate and stable.")
    else:
        why = ("The redundants were chosen automatically: member forces are kept first, "
               "then reactions in the order written, each only if it is clearly "
               "independent of those already kept (pivoted elimination on the "
               "column-scaled equilibrium matrix); the forces left over are the "
               "redundants.")
    blocks: list = [Para(why)]
    rows = []
    for i, c in enumerate(ctx.rcols):
        what = _RELEASED_BY[c.kind].format(c.name if c.kind == "reaction" else c.owner)
        rows.append((ctx.x_label(i), c.name, ctx.unit_of_x(i), what))
    if rows:
        blocks.append(Grid("Redundants and the released structure",
                           ("X", "redundant", "unit", "released by"), tuple(rows)))
    else:
        blocks.append(Para("No redundants: the structure is statically determinate."))
    n = len(ctx.topo.dofs)
    blocks.append(Para(
        f"Released structure: its equilibrium matrix is square ({n} equations, {n} "
        "forces) and non-singular, so it is statically determinate and stable; it is "
        "solved once for the loads and once for a unit value of each redundant."))
    return Step(2, "Redundants and the released structure", tuple(blocks))


def _local_states(ctx: Context) -> Step:
    """Step 2 for a local self-stress basis: which cut each state closes."""
    sol = ctx.sol
    blocks: list = [Para(
        "Local self-stress states (sparse path): the joints are swept outwards from a "
        "support; each force that the joints already reached can carry by themselves "
        "closes a self-stress found on the few members around it (the state holds that "
        "force at 1). Each state contains its own closing force and only forces met "
        "before it, so the states are independent; the closing forces are the "
        "redundants, and the structure left without them is the released structure.")]
    if sol.long_range_states:
        blocks.append(Para(f"{sol.long_range_states} state(s) reach across the structure "
                           "(found by one sparse factorisation at the end)."))
    rows = []
    for i, c in enumerate(ctx.rcols):
        what = _CLOSES[c.kind].format(c.name if c.kind == "reaction" else c.owner)
        touched = sorted({ctx.cols[k].owner for k in np.flatnonzero(ctx.B[:, i])
                          if ctx.cols[k].kind != "reaction"})
        rows.append((ctx.x_label(i), c.name, ctx.unit_of_x(i), f"closes the cut of {what}",
                     ", ".join(touched)))
    if rows:
        blocks.append(Grid("States, the redundant each closes, and the members it touches",
                           ("X", "redundant", "unit", "state", "members"), tuple(rows)))
    n = len(ctx.topo.dofs)
    blocks.append(Para(
        f"Released structure: every force except the {len(rows)} redundants; its "
        f"equilibrium matrix is square ({n} equations, {n} forces) and non-singular "
        "(sparse LU), so it is statically determinate and stable; it is solved once for "
        "the loads. X are the amplitudes of the states; each redundant force is the sum "
        "of the states' values at its column."))
    return Step(2, "Redundants, local self-stress states and the released structure",
                tuple(blocks))
