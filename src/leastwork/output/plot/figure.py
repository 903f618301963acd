"""The figure: one band of panels per load case, every panel at one horizontal scale and
each row as tall as it needs, titled with the structure's name and the units."""

from __future__ import annotations

import math
from collections.abc import Sequence

import numpy as np

from ...model import Structure
from .data import legend
from .deflected import deflected_panel
from .forces import force_panel
from .geometry import case_units, structure_size
from .panel import Panel
from .structure import structure_panel
from .style import DPI, HEADING, PRINT_WIDTH, TITLE, drawn_text

#: Space between two columns of panels (inches).
GUTTER = 0.25
#: Margin around the figure (inches).
MARGIN = 0.15


def _columns(st: Structure, nd: int) -> tuple[int, float, float]:
    """(columns of panels, panel width in inches, metres of the drawing per inch) from the
    proportions of the structure; the figure is :data:`PRINT_WIDTH` wide."""
    xs = [n.x for n in st.nodes.values()]
    ys = [n.y for n in st.nodes.values()]
    pad = 0.3 * structure_size(st)
    dw, dh = max(xs) - min(xs) + 2 * pad, max(ys) - min(ys) + 2 * pad
    full = PRINT_WIDTH - 2 * MARGIN
    ncols = 1 if dw / dh >= 1.0 or nd == 1 else 2
    w = full if ncols == 1 else (full - GUTTER) / 2
    w = min(w, 5.0 * dw / dh)  # tall structures: no panel taller than 5 in
    return ncols, w, dw / w


def _draw_panel(pn: Panel, sol, case: str, name: str) -> tuple[str, str]:
    """Draw diagram ``name`` of ``case`` on a panel: (title, note)."""
    if name == "structure":
        return structure_panel(pn, sol, case)
    if name == "deflected":
        return deflected_panel(pn, sol, case)
    return force_panel(pn, sol, case, name)


def _draw_panels(sol, cases, shown, ncols: int, w: float, per_inch: float):
    """A figure with every panel drawn (limits and size not yet set)."""
    import textwrap

    from matplotlib.figure import Figure

    rows_per = math.ceil(len(shown) / ncols)
    nrows = rows_per * len(cases)
    fig = Figure(figsize=(ncols * w, nrows * w), dpi=DPI)
    gs = fig.add_gridspec(nrows, ncols)
    size = structure_size(sol.structure)
    panels, titles, rows = [], [], []
    wrap = int(w * 72 / (TITLE * 0.55))
    for ci, case in enumerate(cases):
        for k, name in enumerate(shown):
            rows.append(ci * rows_per + k // ncols)
            ax = fig.add_subplot(gs[rows[-1], k % ncols])
            pn = Panel(ax, size, per_inch)
            title, note = _draw_panel(pn, sol, case, name)
            panels.append(pn)
            text = "\n".join(textwrap.wrap(drawn_text(f"{title} \u2014 {note}" if note
                                                  else title), wrap))
            titles.append(text.count("\n") + 1)
            ax.set_title(text, fontsize=TITLE, loc="left", linespacing=1.25)
    return fig, gs, panels, titles, rows


def _row_limits(boxes: np.ndarray, rows, nrows: int, pad: float) -> np.ndarray:
    """(nrows, 2): lowest and highest y drawn in each row of panels (``boxes``: the extent
    of each panel, in row ``rows[i]``), padded."""
    y_rows = np.zeros((nrows, 2))
    y_rows[:, 0], y_rows[:, 1] = np.inf, -np.inf
    for r, bx in zip(rows, boxes, strict=True):
        y_rows[r] = min(y_rows[r, 0], bx[0, 1] - pad), max(y_rows[r, 1], bx[1, 1] + pad)
    return y_rows


def figure(sol, cases: Sequence[str], diagrams: Sequence[str]):
    """The figure: one band of panels per load case, every panel at the same scale."""
    st = sol.structure
    shown = tuple(diagrams)
    if not any(m.is_beam for m in st.members.values()) and len(diagrams) > 1:
        shown = tuple(d for d in diagrams if d not in ("v", "m"))
    ncols, w, per_inch = _columns(st, len(shown))
    rows_per = math.ceil(len(shown) / ncols)
    nrows = rows_per * len(cases)
    size = structure_size(st)
    pad = 0.03 * size
    for _ in range(4):  # labels are sized from the scale, and the scale from the labels
        fig, gs, panels, titles, rows = _draw_panels(sol, cases, shown, ncols, w, per_inch)
        boxes = np.array([pn.extent() for pn in panels])
        x0, x1 = boxes[:, 0, 0].min() - pad, boxes[:, 1, 0].max() + pad
        if (x1 - x0) / w <= per_inch * (1 + 1e-9):
            break
        per_inch = 1.05 * (x1 - x0) / w
    # the drawing exactly at the scale the labels were sized for: text boxes are true
    middle = 0.5 * (x0 + x1)
    x0, x1 = middle - 0.5 * w * per_inch, middle + 0.5 * w * per_inch
    # one horizontal scale for all panels; each row of panels as tall as it needs
    y_rows = _row_limits(boxes, rows, nrows, pad)
    for r, pn in zip(rows, panels, strict=True):
        pn.finish(np.array([[x0, y_rows[r, 0]], [x1, y_rows[r, 1]]]), 0.0)
    heights = w * (y_rows[:, 1] - y_rows[:, 0]) / (x1 - x0)
    _arrange(fig, gs, panels, st, ncols, w, heights, max(titles),
             thinned=shown != tuple(diagrams))
    return fig


def _arrange(fig, gs, panels, st: Structure, ncols: int, w: float, heights: np.ndarray,
             title_lines: int, thinned: bool) -> None:
    """Size the figure to its rows of panels and put the heading on it: the structure's
    name, the units (and a note when v and m were left out: ``thinned``)."""
    import textwrap

    nrows = len(heights)
    title_h = title_lines * TITLE * 1.25 / 72 + 0.12
    uf = case_units(st)
    moved = ("" if uf["displacement"][1] == uf["length"][1]
             else f", displacements in {uf['displacement'][1]}")
    sub = (f"Lengths and dimensions in {uf['length'][1]}{moved}, forces in {uf['force'][1]}, "
           f"moments in {uf['moment'][1]}. {legend()}")
    if thinned:
        sub += " v and m are zero (every member is a pin-ended bar)."
    margin = MARGIN
    fig_w = ncols * w + (ncols - 1) * GUTTER + 2 * margin
    sub = "\n".join(textwrap.wrap(drawn_text(sub), int((fig_w - 2 * margin) * 72
                                                        / (TITLE * 0.56))))
    head = (HEADING + TITLE * (sub.count("\n") + 1)) * 1.4 / 72 + 0.25
    fig_h = float(np.sum(heights)) + nrows * title_h + head + margin
    fig.set_size_inches(fig_w, fig_h)
    gs.set_height_ratios(list(heights))
    gs.update(left=margin / fig_w, right=1 - margin / fig_w, bottom=margin / fig_h,
              top=1 - (head + title_h) / fig_h, hspace=title_h / float(np.mean(heights)),
              wspace=GUTTER / w)
    for pn in panels:  # the axes follow the new grid
        pn.ax.set_position(pn.ax.get_subplotspec().get_position(fig))
    fig.text(margin / fig_w, 1 - 0.1 / fig_h, drawn_text(st.name), fontsize=HEADING,
             ha="left", va="top", weight="bold")
    fig.text(margin / fig_w, 1 - (0.1 + HEADING * 1.5 / 72) / fig_h, sub, fontsize=TITLE,
             ha="left", va="top", linespacing=1.4)
