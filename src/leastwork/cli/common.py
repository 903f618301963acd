"""Helpers shared by the commands: the console, comma lists, ``--case`` and ``--units``,
the output format (``--json``, ``--format``, the suffix of ``-o``) and writing the result
to the terminal or to ``--output`` (see :mod:`leastwork.io.writing`).
"""

from __future__ import annotations

import argparse
import sys

from ..errors import CaseError
from ..output.sheet import FIGURES_RANGE, SIGNIFICANT

__all__ = ["FILE_WIDTH", "SUFFIX_FORMAT", "add_units_option", "chosen_cases", "console_for",
           "display_units", "document", "emit", "figures_count", "output_format", "sheet_meta", "split", "version"]

#: Width of text written to a file (the terminal uses its own width).
FILE_WIDTH = 100

#: Output format of ``-o FILE`` by its suffix (lower case).
SUFFIX_FORMAT = {".md": "md", ".markdown": "md", ".tex": "latex", ".json": "json",
                 ".txt": "text"}


def version() -> str:
    """``leastwork X.Y.Z``, as ``--version`` prints it and the sheets record it."""
    from .. import __version__

    return f"leastwork {__version__}"


def console_for(args):
    """The terminal console: plain (no colours, no highlighting) with ``--no-color``."""
    from rich.console import Console

    if getattr(args, "no_color", False):
        return Console(color_system=None, highlight=False)
    return Console(highlight=False)


def split(text: str | None) -> list[str] | None:
    """The items of a comma-separated option, blanks dropped; None if not given."""
    if text is None:
        return None
    items = [t.strip() for t in text.split(",") if t.strip()]
    return items


#: The --units help text, shared by every command that prints numbers.
UNITS_HELP = ("report results in these units instead of the case's: QUANTITY=UNIT pairs "
              "(force, length, displacement, moment, distributed, stress), e.g. "
              "displacement=mm,moment=kN*m, or FORCE,LENGTH such as kN,mm (inputs, including "
              "distances in --at, stay in the case units)")


def add_units_option(p) -> None:
    """``--units`` and ``--figures`` on a command that prints numbers."""
    p.add_argument("--units", metavar="QUANTITY=UNIT,...", help=UNITS_HELP)
    lo, hi = FIGURES_RANGE
    p.add_argument("--figures", metavar="N", type=figures_count,
                   help=f"significant figures of the numbers on the terminal, the sheets and "
                        f"the diagrams ({lo} to {hi}; default {SIGNIFICANT}, trailing zeros "
                        f"kept); the JSON result always holds full precision")


def figures_count(text: str) -> int:
    """The value of ``--figures``: a whole number in :data:`FIGURES_RANGE`."""
    lo, hi = FIGURES_RANGE
    try:
        n = int(text)
    except ValueError:
        n = None
    if n is None or not lo <= n <= hi:
        raise argparse.ArgumentTypeError(
            f'expected a whole number of significant figures from {lo} to {hi}, got "{text}"')
    return n


def display_units(text: str | None, base=None):
    """The UnitSystem of ``--units``, or None when not given.

    ``FORCE,LENGTH`` (two bare units) replaces the whole system: every quantity follows
    from them, as before. ``QUANTITY=UNIT`` pairs replace the named quantities of ``base``
    (the case's units) and keep the rest; the two forms may be mixed, the bare pair first.
    """
    if text is None:
        return None
    from ..model.units import OUTPUT_QUANTITIES, UnitSystem, check_unit

    def bad(message: str) -> CaseError:
        return CaseError(message, source="command line", where="--units")

    items = [t.strip() for t in text.split(",")]
    bare = [t for t in items if "=" not in t]
    pairs = [t for t in items if "=" in t]
    kinds = ("force", "length", *OUTPUT_QUANTITIES)
    if not all(items) or (bare and (len(bare) != 2 or items[:2] != bare)):
        raise bad(f'expected QUANTITY=UNIT pairs such as "displacement=mm,moment=kN*m" or '
                  f'FORCE,LENGTH such as "kN,mm", got "{text}"')
    units = UnitSystem(bare[0], bare[1]) if bare else (base or UnitSystem())
    chosen: dict[str, str] = {}
    if bare:
        chosen.update(force=bare[0], length=bare[1])
    for pair in pairs:
        kind, _, unit = (t.strip() for t in pair.partition("="))
        if kind not in kinds:
            raise bad(f'unknown quantity "{kind}" in "{pair}"; expected one of: '
                      + ", ".join(kinds))
        if not unit:
            raise bad(f'no unit after "{kind}=" in "{text}"')
        if kind in chosen:
            raise bad(f'{kind} is given twice in "{text}"')
        chosen[kind] = unit
    for kind, unit in chosen.items():
        try:
            check_unit(unit, kind)
        except ValueError as exc:
            raise bad(f"{kind}: {exc}") from None
    return units.with_units(**{k: u for k, u in chosen.items()})


def chosen_cases(sol, name: str | None) -> list[str] | None:
    """The load cases ``--case`` asks for (None: all), checked against the solution."""
    if name is None:
        return None
    if name not in sol.cases:
        raise CaseError(f'no load case "{name}"; the case has: ' + ", ".join(sol.cases),
                        source="command line", where="--case")
    return [name]


def output_format(args) -> str:
    """json, md, latex or text, from --json, --format or the suffix of -o."""
    import pathlib

    if args.json:
        if args.doc_format not in (None, "text"):
            raise CaseError("--json and --format md/latex exclude each other",
                            source="command line", where="--format")
        return "json"
    if args.doc_format:
        return args.doc_format
    if args.output:
        suffix = pathlib.Path(args.output).suffix.lower()
        if suffix not in SUFFIX_FORMAT:
            raise CaseError(f'cannot tell the format of "{args.output}" from its suffix; give '
                            "--format text|md|latex or --json, or name it .md, .tex, .json or "
                            ".txt", source="command line", where="--output")
        return SUFFIX_FORMAT[suffix]
    return "text"


def sheet_meta() -> dict[str, str]:
    """The program and today's date, for the head of a sheet or report."""
    import datetime

    return {"Prepared with": version(), "Date": datetime.date.today().isoformat()}


def document(sol, cases, fmt_name: str, extra=None) -> str:
    """The calculation sheet of ``sol`` in Markdown (``md``) or LaTeX (``latex``);
    ``extra``: further (title, lines) sections."""
    from ..output.audit import audit_sheet
    from ..output.documents import sheet_latex, sheet_markdown

    sheet = audit_sheet(sol, cases, meta=sheet_meta())
    return (sheet_markdown if fmt_name == "md" else sheet_latex)(sheet, extra)


def emit(text: str, args, st) -> None:
    """Print ``text``, or write it to ``--output`` (see :mod:`leastwork.io.writing`)."""
    import pathlib

    from ..io.writing import write_files

    if not args.output:
        sys.stdout.write(text)
        return
    from ..plaintext import literal

    write_files({pathlib.Path(args.output): text}, force=args.force, case=st.source)
    print(f"leastwork: wrote {literal(args.output)}", file=sys.stderr)
