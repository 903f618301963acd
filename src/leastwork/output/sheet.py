"""A calculation sheet as plain data: numbered steps made of paragraphs, formulas and
tables, independent of how it is shown (terminal, Markdown, LaTeX).

Numbers in tables stay floats (in the case units) until a renderer formats them with
:func:`fmt`, so that every output shows them the same way.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

__all__ = ["Para", "Formula", "Grid", "Step", "Sheet", "fmt", "split_grid", "SIGNIFICANT"]

#: Significant figures of every number shown on a sheet.
SIGNIFICANT = 6


def fmt(x: float | str, sig: int = SIGNIFICANT) -> str:
    """A number with ``sig`` significant figures, no trailing zeros, a true minus sign kept
    as ASCII '-', and exponents written ``1.5e-07``; strings pass through.

    >>> fmt(0.1 + 0.2), fmt(-1234567.0), fmt(2.5e-9), fmt(0.0), fmt("x")
    ('0.3', '-1.23457e+06', '2.5e-09', '0', 'x')
    """
    if isinstance(x, str):
        return x
    x = float(x)
    if x == 0.0:
        return "0"
    if not math.isfinite(x):
        return str(x)
    return f"{x:.{sig}g}"


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
