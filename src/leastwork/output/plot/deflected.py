"""The deflected shape panel: every member's displaced axis, magnified by a 1-2-5 factor,
over the undeformed structure in grey, with the largest displacement marked."""

from __future__ import annotations

import numpy as np

from .data import deflection
from .geometry import MemberAxis, case_units
from .numbers import number
from .panel import Panel
from .structure import draw_members, draw_supports
from .style import SHAPE


def deflected_panel(pn: Panel, sol, case: str) -> tuple[str, str]:
    """The deflected shape of load case ``case``: (title, note)."""
    st = sol.structure
    res = sol.cases[case]
    lf, lu = case_units(st)["displacement"]
    factor, umax, where, shapes = deflection(sol, res, 81)
    umax /= lf
    draw_members(pn, st, faint=True)
    draw_supports(pn, st, faint=True)
    title = f"{case}: deflected shape"
    if umax == 0.0:
        return title, "no displacement in this load case"
    best = (0.0, None)
    for mid, (x, ux, uy) in shapes.items():
        base = MemberAxis(st, mid).at(x)
        moved = base + factor * np.c_[ux, uy]
        pn.line(moved, color=SHAPE, lw=1.6, z=4)
        pn.keep_off(moved)
        mag = np.hypot(ux, uy)
        k = int(np.argmax(mag))
        if mag[k] > best[0]:
            best = (float(mag[k]), moved[k], np.array([ux[k], uy[k]]))
    _, p, u = best
    pn.circle(p, 0.18 * pn.h, face=SHAPE, edge=SHAPE, z=6)
    pn.label(p, f"{number(umax)} {lu}", direction=u, color=SHAPE, must=True)
    return (f"{title}, displacements drawn × {number(factor, 1)}",
            f"largest displacement {number(umax)} {lu} ({where}); undeformed shape in grey")
