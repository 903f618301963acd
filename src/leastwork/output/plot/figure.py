"""The figure: one band of panels per load case, every panel at one horizontal scale and
each row as tall as it needs, titled with the structure's name and the units."""

from __future__ import annotations

import math
from collections.abc import Sequence

import numpy as np

from ...model import Structure
from .deflected import deflected_panel
from .forces import force_panel
from .geometry import case_units, structure_size
from .panel import Panel
from .structure import structure_panel
from .style import DPI, drawn_text


def _columns(st: Structure, nd: int) -> tuple[int, float, float]:
    """(columns of panels, panel width in inches, metres of the drawing per inch) from the
    proportions of the structure."""
    xs = [n.x for n in st.nodes.values()]
    ys = [n.y for n in st.nodes.values()]
    pad = 0.3 * structure_size(st)
    dw, dh = max(xs) - min(xs) + 2 * pad, max(ys) - min(ys) + 2 * pad
    ncols, w = (1, 8.0) if dw / dh >= 2.0 or nd == 1 else (2, 4.0)
    w = min(w, 6.0 * dw / dh)  # tall structures: no panel taller than 6 in
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
    wrap = int(w * 72 / (7.0 * 0.56))
    for ci, case in enumerate(cases):
        for k, name in enumerate(shown):
            rows.append(ci * rows_per + k // ncols)
            ax = fig.add_subplot(gs[rows[-1], k % ncols])
            pn = Panel(ax, size, per_inch)
            title, note = _draw_panel(pn, sol, case, name)
            panels.append(pn)
            text = "\n".join([drawn_text(title), *textwrap.wrap(drawn_text(note), wrap)])
            titles.append(text.count("\n") + 1)
            ax.set_title(text, fontsize=7.0, loc="left", linespacing=1.25)
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
    for _ in range(2):  # labels are sized from the scale, and the scale from the labels
        fig, gs, panels, titles, rows = _draw_panels(sol, cases, shown, ncols, w, per_inch)
        boxes = np.array([pn.extent() for pn in panels])
        x0, x1 = boxes[:, 0, 0].min() - pad, boxes[:, 1, 0].max() + pad
        if (x1 - x0) / w <= 1.1 * per_inch:
            break
        per_inch = (x1 - x0) / w
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
    title_h = title_lines * 7.0 * 1.25 / 72 + 0.12
    uf = case_units(st)
    moved = ("" if uf["displacement"][1] == uf["length"][1]
             else f", displacements in {uf['displacement'][1]}")
    sub = (f"lengths in {uf['length'][1]}{moved}, forces in {uf['force'][1]}, moments in "
           f"{uf['moment'][1]}; sign conventions as in the panel notes")
    if thinned:
        sub += "; v and m are zero (every member is a pin-ended bar)"
    head = 0.78
    margin = 0.15
    fig_w = ncols * w + (ncols - 1) * 0.25 + 2 * margin
    fig_h = float(np.sum(heights)) + nrows * title_h + head + margin
    fig.set_size_inches(fig_w, fig_h)
    gs.set_height_ratios(list(heights))
    gs.update(left=margin / fig_w, right=1 - margin / fig_w, bottom=margin / fig_h,
              top=1 - (head + title_h) / fig_h, hspace=title_h / float(np.mean(heights)),
              wspace=0.25 / w)
    for pn in panels:  # the axes follow the new grid
        pn.ax.set_position(pn.ax.get_subplotspec().get_position(fig))
    sub = "\n".join(textwrap.wrap(drawn_text(sub), int(fig_w * 72 / (9.0 * 0.6))))
    fig.suptitle(drawn_text(st.name) + "\n" + sub, fontsize=9, x=margin / fig_w, ha="left",
                 y=1 - 0.1 / fig_h, va="top", linespacing=1.4)
