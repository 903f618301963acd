"""A calculation sheet as plain data: numbered steps made of paragraphs, formulas and
tables, independent of how it is shown (terminal, Markdown, LaTeX).

Numbers in tables stay floats (in the case units) until a renderer formats them with
:func:`fmt`, so that every output shows them the same way.
"""

from __future__ import annotations

import math
from collections.abc import Iterator
from contextlib import contextmanager
from contextvars import ContextVar
from dataclasses import dataclass, field

__all__ = ["Para", "Formula", "Grid", "Step", "Sheet", "fmt", "split_grid", "SIGNIFICANT", "shown",
           "zero_round_off", "COLUMN_ROUND_OFF", "figures", "shown_figures", "FIGURES_RANGE", "coefficient"]

#: Significant figures of every number shown on a sheet, the terminal and the diagrams
#: (engineering rounding) unless the command line asks for more (``--figures``).
SIGNIFICANT = 3
#: The figures the command line accepts (``--figures``).
FIGURES_RANGE = (3, 10)
_FIGURES: ContextVar[int] = ContextVar("figures", default=SIGNIFICANT)


def figures() -> int:
    """The significant figures numbers are shown with now (3 unless :func:`shown_figures`)."""
    return _FIGURES.get()


@contextmanager
def shown_figures(n: int | None) -> Iterator[None]:
    """Numbers shown with ``n`` significant figures inside the block (None: unchanged)."""
    token = _FIGURES.set(int(n)) if n is not None else None
    try:
        yield
    finally:
        if token is not None:
            _FIGURES.reset(token)
#: Magnitudes from ``FIXED_LOW`` up to (not including) ``FIXED_HIGH`` are written in fixed
#: notation; others as a mantissa times a power of ten (``3.071×10⁻⁶``), never ``e-06``.
FIXED_LOW, FIXED_HIGH = 1e-3, 1e5
#: Relative size below which a number in a table column is round-off (shown as 0), measured
#: against the largest magnitude in that column.
COLUMN_ROUND_OFF = 1e-9

_SUPERSCRIPT = str.maketrans("-0123456789", "⁻⁰¹²³⁴⁵⁶⁷⁸⁹")


def fmt(x: float | str, sig: int | None = None) -> str:
    """A number rounded to ``sig`` significant figures (default :func:`figures`, 3) the way
    an engineer writes it: trailing zeros kept (``45.0``, ``0.900``, ``108``), fixed
    notation from 0.001 to below 100 000, otherwise ``m×10ⁿ`` with Unicode superscripts
    (never e-notation); zero as ``0``, a whole number given as an int as it is (``15``),
    minus as ASCII '-'; strings pass through.

    >>> fmt(0.1 + 0.2), fmt(-1234567.0), fmt(2.5e-9), fmt(0.0), fmt(45.0004), fmt("x")
    ('0.300', '-1.23×10⁶', '2.50×10⁻⁹', '0', '45.0', 'x')
    >>> fmt(99999.0), fmt(171234.0)
    ('1.00×10⁵', '1.71×10⁵')
    >>> fmt(-0.9), fmt(107.6), fmt(99.96), fmt(12), fmt(45.0004, 5)
    ('-0.900', '108', '100', '12', '45.000')
    """
    if isinstance(x, str):
        return x
    if isinstance(x, int) and not isinstance(x, bool) and abs(x) < FIXED_HIGH:
        return str(x)
    x = float(x)
    if x == 0.0:
        return "0"
    if not math.isfinite(x):
        return str(x)
    sig = max(1, int(figures() if sig is None else sig))
    rounded = float(f"{x:.{sig - 1}e}")
    exp = math.floor(math.log10(abs(rounded)))
    if FIXED_LOW <= abs(rounded) < FIXED_HIGH:
        return f"{rounded:.{max(sig - 1 - exp, 0)}f}"
    return f"{rounded / 10.0 ** exp:.{sig - 1}f}×10{str(exp).translate(_SUPERSCRIPT)}"


def coefficient(x: float) -> str:
    """A factor or polynomial coefficient as :func:`fmt` writes it, but an exact value
    without padding zeros — a load factor of 1.5 or the ``3 - x`` of a unit-load moment
    reads as given; a rounded value keeps them.

    >>> coefficient(1.5), coefficient(3.0), coefficient(0.1 + 0.2), coefficient(0.98639)
    ('1.5', '3', '0.3', '0.986')
    """
    text = fmt(x)
    if "." not in text or "×" in text:
        return text
    if abs(float(text) - float(x)) <= 1e-12 * abs(float(x)):
        text = text.rstrip("0").rstrip(".")
    return text


def zero_round_off(values: list[float | str], rel: float = COLUMN_ROUND_OFF) -> list:
    """The numbers of one table column with those below ``rel`` times the column's largest
    magnitude set to 0.0 (round-off of sums and differences, shown as 0); text untouched."""
    nums = [abs(float(v)) for v in values if not isinstance(v, str) and math.isfinite(float(v))]
    top = max(nums, default=0.0)
    return [v if isinstance(v, str) or not math.isfinite(float(v)) or abs(float(v)) > rel * top
            else 0.0 for v in values]


@dataclass(frozen=True)
class Para:
    """A paragraph. ``tone``: "plain", "note", "warning" or "alarm" (a failed check)."""

    text: str
    tone: str = "plain"


@dataclass(frozen=True)
class Formula:
    """One displayed equation or identity, as plain text (Unicode), with an optional
    LaTeX form for typeset sheets."""

    text: str
    latex: str | None = None


@dataclass(frozen=True)
class Grid:
    """A table. The first ``keys`` columns identify a row and are repeated when a renderer
    splits a wide table into narrower ones. ``total`` is an optional last row (sums)."""

    title: str
    headers: tuple[str, ...]
    rows: tuple[tuple[float | str, ...], ...]
    keys: int = 1
    total: tuple[float | str, ...] | None = None


Block = Para | Formula | Grid


@dataclass(frozen=True)
class Step:
    """One numbered step of the calculation."""

    number: int
    title: str
    blocks: tuple[Block, ...]


@dataclass(frozen=True)
class Sheet:
    """The whole calculation: heading, assumptions, steps and cautions."""

    title: str
    source: str
    assumptions: tuple[str, ...]
    steps: tuple[Step, ...]
    cautions: tuple[str, ...]
    meta: dict[str, str] = field(default_factory=dict)  #: tool version, date...
    #: ``[project]`` of the case: title, job, client, by, checked, revision (those given)
    project: dict[str, str] = field(default_factory=dict)

    def title_block(self) -> list[tuple[str, str]]:
        """The title block as (label, text) rows, in the order a sheet shows them: project,
        job, client, structure, case file (its name), by, checked, revision, then ``meta``
        (tool version, date). Fields not given in ``[project]`` show as "-" for by, checked
        and revision (a sheet is filed with those boxes), and are left out otherwise."""
        p = self.project
        rows = [(label, p[key]) for key, label in (("title", "Project"), ("job", "Job"),
                                                   ("client", "Client")) if key in p]
        rows += [("Structure", self.title), ("Case file", self.source)]
        rows += [(label, p.get(key, "-")) for key, label in (
            ("by", "By"), ("checked", "Checked"), ("revision", "Revision"))]
        return rows + list(self.meta.items())


def split_grid(grid: Grid, max_width: int, pad: int = 3, cap: int = 40) -> list[Grid]:
    """Split a wide table into tables no wider than ``max_width`` characters, repeating its
    key columns; ``pad`` is the border and padding per column, ``cap`` the widest a text
    column is counted (longer text wraps)."""
    cells = [grid.headers, *grid.rows, *([grid.total] if grid.total else [])]
    width = [min(cap, max(len(fmt(r[c])) for r in cells if c < len(r))) + pad
             for c in range(len(grid.headers))]
    keys = list(range(min(grid.keys, len(grid.headers))))
    base = sum(width[c] for c in keys) + 1
    groups: list[list[int]] = []
    for c in range(len(keys), len(grid.headers)):
        if groups and base + sum(width[k] for k in groups[-1]) + width[c] <= max_width:
            groups[-1].append(c)
        else:
            groups.append([c])
    if len(groups) <= 1:
        return [grid]
    out = []
    for n, g in enumerate(groups, 1):
        idx = keys + g
        out.append(Grid(f"{grid.title} (part {n} of {len(groups)})",
                        tuple(grid.headers[c] for c in idx),
                        tuple(tuple(r[c] for c in idx) for r in grid.rows), keys=len(keys),
                        total=tuple(grid.total[c] for c in idx) if grid.total else None))
    return out


def shown(grid: Grid) -> Grid:
    """``grid`` as every renderer shows it: in each column (its total included), numbers
    below :data:`COLUMN_ROUND_OFF` of the column's largest magnitude are round-off and
    become 0 (never printed as 6.35×10⁻²², nor in bold in a total row)."""
    rows = [*grid.rows, *([grid.total] if grid.total else [])]
    if not rows:
        return grid
    cols = [zero_round_off([r[c] if c < len(r) else "" for r in rows])
            for c in range(len(grid.headers))]
    out = [tuple(cols[c][k] for c in range(len(r))) for k, r in enumerate(rows)]
    n = len(grid.rows)
    return Grid(grid.title, grid.headers, tuple(out[:n]), keys=grid.keys,
                total=out[n] if grid.total else None)
