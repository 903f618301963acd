"""Writing the figure: PNG by the Agg canvas, SVG by the SVG canvas (text kept as text, no
date, ids stable for a given set of load cases)."""

from __future__ import annotations

import io
import pathlib
import re
import sys
import warnings
from collections.abc import Iterable

from ...errors import CaseError
from .data import DIAGRAMS, case_names, parse_diagrams
from .figure import figure
from .style import DPI

#: Image formats by file suffix.
IMAGE_FORMATS = {".png": "png", ".svg": "svg"}


def _save(fig, target, fmt_name: str, salt: str) -> None:
    """Save the figure; a character of the names that the figure font lacks is noted once
    on standard error (one line) instead of one library warning per glyph."""
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always")
        _render(fig, target, fmt_name, salt)
    missing = [w for w in caught if "missing from font" in str(w.message)]
    for w in caught:
        if w not in missing:
            warnings.warn_explicit(w.message, w.category, w.filename, w.lineno)
    if missing and not _GLYPH_NOTE_SHOWN:
        _note_missing_glyphs()


_GLYPH_NOTE_SHOWN = False


def _note_missing_glyphs() -> None:
    global _GLYPH_NOTE_SHOWN
    _GLYPH_NOTE_SHOWN = True
    print("leastwork: note: some characters of the names have no glyph in the figure font; "
          "they are drawn as empty boxes", file=sys.stderr)


def _render(fig, target, fmt_name: str, salt: str) -> None:
    import matplotlib

    with matplotlib.rc_context({"svg.fonttype": "none", "svg.hashsalt": salt,
                                "font.family": "DejaVu Sans"}):
        if fmt_name == "png":
            from matplotlib.backends.backend_agg import FigureCanvasAgg

            FigureCanvasAgg(fig)
            fig.savefig(target, format="png", dpi=DPI, facecolor="white",
                        metadata={"Software": None}, bbox_inches="tight", pad_inches=0.1)
        else:
            from matplotlib.backends.backend_svg import FigureCanvasSVG

            FigureCanvasSVG(fig)
            fig.savefig(target, format="svg", facecolor="white",
                        metadata={"Date": None, "Creator": None}, bbox_inches="tight",
                        pad_inches=0.1)


def _salt(cases: list[str]) -> str:
    """The seed of the SVG ids: the same for the same load cases."""
    return "leastwork-" + re.sub(r"\W+", "-", "-".join(cases))


def figure_svg(sol, case: str | None = None, diagrams: str | Iterable[str] = DIAGRAMS) -> str:
    """The diagrams of load case ``case`` (every case when None) as SVG text, for a file or
    for inline HTML (text kept as text, no date, ids stable for a given case)."""
    cases = case_names(sol, case)
    fig = figure(sol, cases, parse_diagrams(diagrams))
    buf = io.StringIO()
    _save(fig, buf, "svg", _salt(cases))
    return buf.getvalue()


def plot_case(sol, path, *, case: str | None = None,
              diagrams: str | Iterable[str] = DIAGRAMS) -> None:
    """Write the diagrams of a solution to ``path``, PNG or SVG by its suffix (anything else
    is a :class:`CaseError`). ``case``: one load case, or every case (one band of panels
    each) when None. ``diagrams``: some of :data:`DIAGRAMS`, as a sequence or a
    comma-separated string."""
    path = pathlib.Path(path)
    fmt_name = IMAGE_FORMATS.get(path.suffix.lower())
    if fmt_name is None:
        raise CaseError(f'cannot tell the image format of "{path}" from its suffix; name it '
                        ".png or .svg", where="output")
    cases = case_names(sol, case)
    fig = figure(sol, cases, parse_diagrams(diagrams))
    _save(fig, str(path), fmt_name, _salt(cases))


def case_file_names(path, cases: list[str]) -> dict[str, pathlib.Path]:
    """One file name per load case beside ``path``: ``STEM-CASE.SUFFIX``, the case name
    reduced to letters, digits, '.', '_' and '-' (a number added if two come out alike).

    >>> [p.name for p in case_file_names("out/bay.png", ["wind", "snow + wind"]).values()]
    ['bay-wind.png', 'bay-snow-wind.png']
    """
    path = pathlib.Path(path)
    out: dict[str, pathlib.Path] = {}
    seen: set[str] = set()
    for case in cases:
        slug = re.sub(r"[^A-Za-z0-9._-]+", "-", case).strip("-.") or "case"
        name, k = slug, 2
        while name.lower() in seen:
            name, k = f"{slug}-{k}", k + 1
        seen.add(name.lower())
        out[case] = path.with_name(f"{path.stem}-{name}{path.suffix}")
    return out


def case_images(sol, path, diagrams: str | Iterable[str] = DIAGRAMS) -> dict:
    """One image per load case (PNG or SVG by the suffix of ``path``): {file name: bytes},
    named by :func:`case_file_names`."""
    path = pathlib.Path(path)
    fmt_name = IMAGE_FORMATS.get(path.suffix.lower())
    if fmt_name is None:
        raise CaseError(f'cannot tell the image format of "{path}" from its suffix; name it '
                        ".png or .svg", where="output")
    shown = parse_diagrams(diagrams)
    files = {}
    for case, target in case_file_names(path, list(sol.cases)).items():
        files[target] = figure_bytes(figure(sol, [case], shown), fmt_name, case)
    return files


def figure_bytes(fig, fmt_name: str, salt: str) -> bytes:
    """A finished figure as PNG or SVG bytes (``fmt_name`` "png" or "svg")."""
    buf = io.BytesIO() if fmt_name == "png" else io.StringIO()
    _save(fig, buf, fmt_name, _salt([salt]))
    data = buf.getvalue()
    return data if isinstance(data, bytes) else data.encode("utf-8")
