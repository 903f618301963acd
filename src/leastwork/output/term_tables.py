"""Tables on a terminal of any width, never cutting a number.

A table is printed whole when it fits the console; if it does not, its headers may wrap
at their spaces and its text columns at their words; if it still does not fit, it is
turned (one column per row, for a few rows) or stacked (one line per value, the row's key
columns first), so that each table stays one table and no number is shortened. The
title is printed left-aligned above the table, its parenthesis on its own line, so that
it wraps only between words.
"""

from __future__ import annotations

import re

from rich.console import Console
from rich.table import Table
from rich.text import Text

from ..plaintext import literal
from .sheet import Grid, fmt, shown

__all__ = ["print_grid", "print_cells", "TEXT_WRAP", "TURN_MAX_ROWS"]

#: Widest a text column is counted when deciding whether a table fits (longer text wraps
#: at its words).
TEXT_WRAP = 28
#: Most rows a table may have to be turned (rows become columns) rather than stacked.
TURN_MAX_ROWS = 6
#: What a cell holding a number looks like (numbers never wrap).
_NUMBER = re.compile(r"^[-+]?(\d[\d.]*)(×10[⁻⁰¹²³⁴⁵⁶⁷⁸⁹]+)?$")


def _text(cell) -> Text:
    """A cell as rich Text (a plain string is never read as markup: "[kN]" stays)."""
    return cell if isinstance(cell, Text) else Text(str(cell))


def _plain(cell) -> str:
    return cell.plain if isinstance(cell, Text) else str(cell)


def _is_number(text: str) -> bool:
    return bool(_NUMBER.match(text.strip()))


def print_title(console: Console, title: str, caption: str = "") -> None:
    """A table's title, bold, left-aligned; a trailing parenthesis on its own line."""
    if not title:
        return
    main, sep, note = title.partition(" (")
    console.print(Text(literal(main), style="bold"), soft_wrap=False)
    if sep:
        console.print(Text("(" + literal(note), style="dim"))
    if caption:
        console.print(Text(literal(caption), style="dim"))


def print_cells(console: Console, title: str, headers: list[str], rows: list[list],
                *, keys: int = 1, right: list[bool] | None = None,
                total: list | None = None, caption: str = "", header_style: str = "bold"
                ) -> str:
    """Print a table of text cells (str or rich Text) to ``console``; returns the layout
    used: "whole", "wrapped", "turned" or "stacked"."""
    ncol = len(headers)
    right = right or [False] * ncol
    body = [*rows, *([total] if total else [])]
    cells = [[_plain(r[c]) for r in body] for c in range(ncol)]
    textual = [c >= keys and not all(_is_number(x) or x in ("", "-", "—") for x in cells[c])
               for c in range(ncol)]
    natural = [max([len(headers[c])] + [len(x) for x in cells[c]]) for c in range(ncol)]
    tight = [max([len(w) for w in headers[c].split()] + [
        min(len(x), TEXT_WRAP) if textual[c] else len(x) for x in cells[c]] + [1])
        for c in range(ncol)]
    print_title(console, title, caption)
    width = console.width
    if sum(natural) + 3 * ncol + 1 <= width:
        console.print(_table(headers, body, right, None, header_style, bool(total)))
        return "whole"
    if sum(tight) + 3 * ncol + 1 <= width:
        console.print(_table(headers, body, right, tight, header_style, bool(total)))
        return "wrapped"
    nrow = len(body)
    if nrow <= TURN_MAX_ROWS and keys >= 1:
        head_w = max(len(h) for h in headers[keys:]) if ncol > keys else 1
        col_w = [max(len(" ".join(_plain(r[k]) for k in range(keys))),
                     *[len(_plain(r[c])) for c in range(keys, ncol)]) for r in body]
        if head_w + sum(col_w) + 3 * (nrow + 1) + 1 <= width:
            turned_head = ["", *[" ".join(_plain(r[k]) for k in range(keys)) for r in body]]
            turned = [[headers[c], *[r[c] for r in body]] for c in range(keys, ncol)]
            console.print(_table(turned_head, turned, [False] + [True] * nrow, None,
                                 header_style, False))
            return "turned"
    t = Table(header_style=header_style, show_lines=False)
    for k in range(keys):
        t.add_column(_text(headers[k]), overflow="fold")
    t.add_column("quantity", overflow="fold")
    t.add_column("value", justify="right", overflow="fold")
    for n, r in enumerate(body):
        for i, c in enumerate(range(keys, ncol)):
            t.add_row(*[_text(r[k] if i == 0 else "") for k in range(keys)],
                      _text(headers[c]), _text(r[c]),
                      end_section=i == ncol - keys - 1 and n < len(body) - 1)
    console.print(t)
    return "stacked"


def _table(headers, body, right, widths, header_style: str, total: bool) -> Table:
    t = Table(header_style=header_style)
    for c, h in enumerate(headers):
        t.add_column(_text(h), justify="right" if right[c] else "left", overflow="fold",
                     width=None if widths is None else widths[c])
    for n, r in enumerate(body):
        last = total and n == len(body) - 1
        t.add_row(*[_text(x) for x in r], end_section=total and n == len(body) - 2, style=None if not last else "")
    return t


def print_grid(console: Console, grid: Grid) -> str:
    """A sheet's table on the terminal (round-off shown as 0, numbers formatted by
    :func:`leastwork.output.sheet.fmt`); returns the layout used."""
    g = shown(grid)
    numeric = [k >= g.keys and not all(isinstance(r[k], str) for r in g.rows)
               for k in range(len(g.headers))]
    rows = [[literal(fmt(c)) for c in r] for r in g.rows]
    total = [literal(fmt(c)) for c in g.total] if g.total else None
    return print_cells(console, g.title, [literal(h) for h in g.headers], rows, keys=g.keys,
                       right=numeric, total=total)
