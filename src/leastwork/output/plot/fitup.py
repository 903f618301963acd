"""The fit-up study drawn: the structure with, on each member, the largest axial force its
length errors can lock in (±, exact worst case), the members made within a tolerance marked
with their tolerance; with an adjustment, a second panel with the length change of the
adjusted member and the axial forces before and after."""

from __future__ import annotations

import textwrap

import numpy as np

from ...model import Structure
from .geometry import case_units, clear_spot, crossings, member_axes, structure_size
from .numbers import number, tension_mark
from .panel import Panel
from .structure import _node_names, draw_members, draw_supports, keep_labels_off_members
from .style import (
    HEADING,
    IMPOSED,
    INK,
    PRINT_WIDTH,
    REDUNDANT,
    TITLE,
    drawn_text,
)


def _member_value(pn: Panel, st: Structure, mid: str, text: str, color: str = INK) -> None:
    o, ex, ey = member_axes(st, mid)
    L = st.length(mid)
    cross = crossings(st)[mid]
    spots = sorted((0.5, 0.35, 0.65, 0.22, 0.78),
                   key=lambda f: -min([abs(f - c) for c in cross] + [0.2]))
    side = ey if ey[1] >= -1e-9 else -ey
    for at in spots:
        for sd in (side, -side):
            if pn.label(o + ex * at * L, text, direction=sd, gap=0.3 * pn.h, box=True,
                        color=color):
                return
    pn.label(o + ex * 0.5 * L, text, direction=side, must=True, box=True, color=color)


def _tolerance_mark(pn: Panel, st: Structure, mid: str, text: str) -> None:
    """Two plum strokes across the member, off crossings, with its tolerance."""
    o, ex, ey = member_axes(st, mid)
    at = clear_spot(crossings(st)[mid], pn.marks.get(mid, []), prefer=(0.25, 0.75, 0.3, 0.7))
    pn.marks.setdefault(mid, []).append(at)
    c = o + ex * at * st.length(mid)
    for s in (-0.18, 0.18):
        pn.line([c + ex * s * pn.h - ey * 0.5 * pn.h, c + ex * s * pn.h + ey * 0.5 * pn.h],
                color=IMPOSED, lw=1.4, z=6)
    pn.occupy([c - ey * 0.5 * pn.h - ex * 0.3 * pn.h, c + ey * 0.5 * pn.h + ex * 0.3 * pn.h])
    side = ey if ey[1] >= -1e-9 else -ey
    for sd in (-side, side):
        if pn.label(c + sd * 0.5 * pn.h, text, direction=sd, color=IMPOSED):
            return
    pn.label(c - side * 0.5 * pn.h, text, direction=-side, color=IMPOSED, must=True)


def _study_panel(pn: Panel, sol, study) -> str:
    st = sol.structure
    uf = case_units(st)
    ff, fu = uf["force"]
    lf, lu = uf["displacement"]
    draw_members(pn, st)
    draw_supports(pn, st)
    keep_labels_off_members(pn, st)
    _node_names(pn, st)
    tol = set(study.tolerances.values())
    same = len(tol) == 1 and set(study.tolerances) == set(st.members)
    if not same:
        for mid, t in study.tolerances.items():
            _tolerance_mark(pn, st, mid, f"±{number(t / lf)} {lu}")
    rep = study.quantities
    for q, name in enumerate(rep.names):
        if rep.groups[q] != "members":
            continue
        worst = float(study.worst.max[q]) / ff
        if worst > 0:
            _member_value(pn, st, name, f"±{number(worst)}")
    made = (f"every member made within ±{number(tol.pop() / lf)} {lu}" if same
            else "tolerances in plum")
    return (f"Largest axial force [{fu}] the length errors can lock into each member (exact "
            f"worst case, no loads); {made}")


def _adjust_panel(pn: Panel, sol, adj) -> str:
    st = sol.structure
    uf = case_units(st)
    ff, fu = uf["force"]
    lf, lu = uf["displacement"]
    draw_members(pn, st)
    draw_supports(pn, st)
    keep_labels_off_members(pn, st)
    _node_names(pn, st)
    how = "longer" if adj.change > 0 else "shorter"
    _tolerance_mark(pn, st, adj.member, f"make {number(abs(adj.change) / lf)} {lu} {how}")
    top = max([abs(v) for v in (*adj.before.values(), *adj.after.values())] + [0.0])
    for mid in adj.before:
        after = adj.after[mid] if abs(adj.after[mid]) > 1e-12 * top else 0.0
        text = f"{tension_mark(adj.before[mid] / ff)} → {tension_mark(after / ff)}"
        _member_value(pn, st, mid, text, color=REDUNDANT if mid == adj.target else INK)
    return (f"Load case {adj.case}: axial forces [{fu}] before → after changing the length "
            f"of {adj.member} so that {adj.target} carries none")


def fitup_figure(sol, study=None, adj=None):
    """The figure of a fit-up study and/or an adjustment (``leastwork fitup -o``)."""
    from matplotlib.figure import Figure

    st = sol.structure
    jobs = [j for j in ((_study_panel, study), (_adjust_panel, adj)) if j[1] is not None]
    xs = np.array([[n.x, n.y] for n in st.nodes.values()])
    pad = 0.3 * structure_size(st)
    dw = xs[:, 0].max() - xs[:, 0].min() + 2 * pad
    dh = xs[:, 1].max() - xs[:, 1].min() + 2 * pad
    margin = 0.15
    w = min(PRINT_WIDTH - 2 * margin, 4.5 * dw / dh)
    per_inch = dw / w
    for _ in range(4):
        fig = Figure(figsize=(PRINT_WIDTH, 4.0), dpi=150)
        panels, titles = [], []
        for draw, what in jobs:
            ax = fig.add_axes((0, 0, 1, 1))
            pn = Panel(ax, structure_size(st), per_inch)
            titles.append(draw(pn, sol, what))
            panels.append(pn)
        boxes = np.array([pn.extent() for pn in panels])
        x0, x1 = boxes[:, 0, 0].min(), boxes[:, 1, 0].max()
        if (x1 - x0) / w <= per_inch * (1 + 1e-9):
            break
        per_inch = 1.05 * (x1 - x0) / w
    mid = 0.5 * (x0 + x1)
    x0, x1 = mid - 0.5 * w * per_inch, mid + 0.5 * w * per_inch
    wrap = int((PRINT_WIDTH - 2 * margin) * 72 / (TITLE * 0.56))
    titles = ["\n".join(textwrap.wrap(drawn_text(t), wrap)) for t in titles]
    heights = [(pn.extent()[1, 1] - pn.extent()[0, 1] + 0.1 * pad) / per_inch for pn in panels]
    title_h = [(t.count("\n") + 1) * TITLE * 1.3 / 72 + 0.1 for t in titles]
    head = HEADING * 1.6 / 72 + 0.15
    total = head + sum(heights) + sum(title_h) + margin * (len(panels) + 1)
    fig.set_size_inches(PRINT_WIDTH, total)
    y = total - head
    for pn, hgt, th, title in zip(panels, heights, title_h, titles, strict=True):
        y -= th
        fig.text(margin / PRINT_WIDTH, y / total + th / total - 0.02 / total, title,
                 fontsize=TITLE, ha="left", va="top", linespacing=1.3)
        y -= hgt
        lo, hi = pn.extent()
        cy = 0.5 * (lo[1] + hi[1])
        pn.finish(np.array([[x0, cy - 0.5 * hgt * per_inch], [x1, cy + 0.5 * hgt * per_inch]]),
                  0.0)
        pn.ax.set_position(((PRINT_WIDTH - w) / 2 / PRINT_WIDTH, y / total, w / PRINT_WIDTH,
                            hgt / total))
        y -= margin
    fig.text(margin / PRINT_WIDTH, 1 - 0.1 / total, drawn_text(f"{st.name}: fit-up"),
             fontsize=HEADING, weight="bold", ha="left", va="top")
    return fig
