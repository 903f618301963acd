"""The size of a label as the renderer will draw it: the extent of the text laid out by
matplotlib's Agg renderer (the same font and layout the PNG and SVG use), in inches."""

from __future__ import annotations

from functools import lru_cache


@lru_cache(maxsize=1)
def _scratch():
    """A small figure and its renderer, kept for measuring."""
    from matplotlib.backends.backend_agg import FigureCanvasAgg
    from matplotlib.figure import Figure

    fig = Figure(figsize=(1, 1), dpi=72)
    canvas = FigureCanvasAgg(fig)
    return fig, canvas.get_renderer()


@lru_cache(maxsize=8192)
def text_extent(text: str, size: float, weight: str = "normal") -> tuple[float, float]:
    """(width, height) in inches of ``text`` (already passed through ``drawn_text``) at
    ``size`` points: the box matplotlib reports for the drawn text."""
    fig, renderer = _scratch()
    t = fig.text(0, 0, text, fontsize=size, weight=weight)
    try:
        bb = t.get_window_extent(renderer)
    finally:
        t.remove()
    return bb.width / 72.0, bb.height / 72.0
