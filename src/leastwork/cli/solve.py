"""``leastwork solve CASE``: the summary, the audit trail (``--steps``), the brief
(``--quiet``), the JSON result (``--json``), a calculation sheet (``--format md|latex``),
closed forms (``--symbolic``), to the terminal or to a file (``-o``).
"""

from __future__ import annotations

import argparse
import io
import json
import sys

from ..errors import CaseError
from .common import (
    FILE_WIDTH,
    add_units_option,
    chosen_cases,
    console_for,
    display_units,
    document,
    emit,
    output_format,
    split,
)
from .parser import basis_option, command_description, command_parser
from .progress import busy, progress

__all__ = ["JSON_INDENT_MAX_MEMBERS", "TIME_LIMIT_MAX", "add_parsers", "run"]

#: Above this many members the JSON result is written without indentation.
JSON_INDENT_MAX_MEMBERS = 2000

#: Largest --time-limit (seconds): a closed form that needs more is beyond reach in practice.
TIME_LIMIT_MAX = 3600.0


def add_parsers(sub) -> None:
    """Add the ``solve`` subcommand to ``sub``."""
    s = command_parser(sub, "solve", "solve a case file", command_description(
        "Solve a case file by the least-work (force) method: the redundants, reactions, "
        "member end forces, moment extremes, deflections and the checks (equilibrium and an "
        "independent direct-stiffness cross-check); --steps prints the whole audit trail, "
        "--json the result for programs, --format md|latex a calculation sheet."))
    s.add_argument("case", help="case file (TOML)")
    s.add_argument("--json", action="store_true", help="print only the JSON result")
    s.add_argument("--steps", action="store_true", help="print the whole audit trail")
    s.add_argument("--case", dest="load_case", metavar="NAME",
                   help="report only this load case")
    s.add_argument("--redundants", metavar="LIST",
                   help="comma-separated redundants, e.g. C.y,BC (overrides the case)")
    s.add_argument("--at", metavar="LIST",
                   help="comma-separated displacements to add, e.g. B.y,C.rz,AB@2.5.y,A-C")
    basis_option(s)
    _presentation_options(s)
    s.add_argument("--no-verify", action="store_true",
                   help="skip the cross-check by the independent direct-stiffness solver")
    s.add_argument("--symbolic", action="store_true",
                   help="keep every [parameters] name a symbol and give closed forms (sympy)")
    s.add_argument("--time-limit", type=time_limit, default=60.0, metavar="SECONDS",
                   help="give up a --symbolic solve after this long (default 60, at most "
                        f"{TIME_LIMIT_MAX:g})")
    s.add_argument("--format", dest="doc_format", choices=("text", "md", "latex"),
                   help="calculation sheet format: text (terminal), md (Markdown) or latex; "
                        "md and latex always hold the whole audit trail")
    s.add_argument("-o", "--output", metavar="FILE",
                   help="write the result to FILE instead of the terminal (the format follows "
                        "--format, --json or the suffix: .md, .tex, .json, .txt)")
    s.add_argument("--force", action="store_true",
                   help="replace FILE if it exists (never the case file itself)")


def _presentation_options(p: argparse.ArgumentParser) -> None:
    add_units_option(p)
    p.add_argument("--no-color", action="store_true", help="plain text, no colours")
    p.add_argument("-q", "--quiet", action="store_true",
                   help="only the redundants, the checks and any warning")


def time_limit(text: str) -> float:
    """``--time-limit``: a positive, finite number of seconds up to TIME_LIMIT_MAX."""
    from ..plaintext import ECHO_LIMIT, literal

    try:
        value = float(text)
    except ValueError:
        value = float("nan")
    if not 0 < value <= TIME_LIMIT_MAX:  # also NaN and inf
        raise argparse.ArgumentTypeError(
            f"expected a number of seconds above 0 and at most {TIME_LIMIT_MAX:g}, got "
            f'"{literal(text, ECHO_LIMIT)}"')
    return value


def run(args) -> int:
    """``leastwork solve``: read, check the options in order, solve, show or write."""
    from ..io.reader import load_case
    from ..solve import solve

    read = _read_with_record(args.case) if args.symbolic else None  # the case read once
    st = load_case(args.case) if read is None else read[0]
    if getattr(st, "is_space", False):
        from ..space.cli import run_solve

        return run_solve(args, st)
    st = _with_displacements(st, split(args.at) or [])
    names = split(args.redundants)
    if args.redundants is not None and not names:
        raise CaseError("expected a comma-separated list of redundants", source="command line",
                        where="--redundants")
    units = display_units(args.units, st.units)
    with progress("solving") as say:
        sol = solve(st, names, where="--redundants" if names is not None else None,
                    verify=False if args.no_verify else None, basis=args.basis,
                    progress=say)
    if units is not None:
        sol.display_units = units
    cases = chosen_cases(sol, args.load_case)
    fmt_name = output_format(args)
    if args.symbolic:
        return _symbolic(args, st, sol, names, cases, fmt_name, read)
    _show(args, st, sol, cases, fmt_name)
    if fmt_name != "text" or args.output:
        _warn_failed_checks(sol)
    return 0


def _read_with_record(path: str):
    """The structure and what the reader saw (the exact reading of ``--symbolic`` needs
    the quantities as written)."""
    from pathlib import Path

    from ..io.files import read_case_text
    from ..io.record import read_case_record

    return read_case_record(read_case_text(path), str(Path(path)))


def _with_displacements(st, extra: list[str]):
    """The structure with the ``--at`` displacements added, each checked first."""
    if not extra:
        return st
    import dataclasses

    from ..displacements import parse_target
    from ..topology import sparse_topology

    st = dataclasses.replace(st, displacements=tuple(dict.fromkeys([*st.displacements,
                                                                    *extra])))
    topo = sparse_topology(st)  # node directions only: no rank decisions needed
    for t in extra:
        parse_target(st, topo, t, "--at")
    return st


def _show(args, st, sol, cases, fmt_name: str) -> None:
    """The result in its format: JSON, a sheet, text to a file, or the terminal (the
    terminal output and its console loaded only for text)."""
    if fmt_name == "json":
        d = sol.to_dict()
        if cases:
            d["cases"] = {k: v for k, v in d["cases"].items() if k in cases}
        # indented for reading; a large result compactly (Python's fast encoder works
        # only without indentation, and nobody reads 10^4 members by eye)
        indent = 2 if len(st.members) <= JSON_INDENT_MAX_MEMBERS else None
        emit(json.dumps(d, indent=indent) + "\n", args, st)
        return
    if fmt_name in ("md", "latex"):
        emit(document(sol, cases, fmt_name), args, st)
        return
    from ..output.terminal import print_brief, print_steps, print_summary

    if args.output:
        from rich.console import Console

        buf = Console(record=True, file=io.StringIO(), width=FILE_WIDTH, color_system=None,
                      highlight=False)
        (print_steps if args.steps else print_summary)(buf, sol, cases)
        emit(buf.export_text(), args, st)
        return
    console = console_for(args)
    if args.quiet:
        print_brief(console, sol, cases)
    elif args.steps:
        print_steps(console, sol, cases)
    else:
        print_summary(console, sol, cases)


def _warn_failed_checks(sol) -> None:
    """A loud line on standard error for a failed check when the result went elsewhere
    than the terminal summary (which shows it in place)."""
    if not sol.equilibrium_ok:
        print("leastwork: WARNING: the equilibrium check FAILED; do not use these results",
              file=sys.stderr)
    if not sol.cross_check_ok:
        print("leastwork: WARNING: the direct-stiffness cross-check DISAGREES or failed; "
              "see the warnings", file=sys.stderr)


def _symbolic(args, st, sol, names, cases, fmt_name: str, read) -> int:
    """``solve --symbolic``: closed forms (terminal, JSON strings, or a sheet section),
    with the redundants of the numeric solve ``sol`` (the same as its sheet's)."""
    from ..symbolic import solve_symbolic

    with busy(f"closed forms (at most {args.time_limit:g} s)"):
        sym = solve_symbolic(args.case, read=read, redundants=names,
                             extra_displacements=split(args.at) or [],
                             time_limit=args.time_limit,
                             numeric_redundants=sol.redundant_names
                             if sol.basis == "released" else None)
    if fmt_name == "json":
        d = sym.to_dict()
        if cases:
            d["cases"] = {k: v for k, v in d["cases"].items() if k in cases}
        emit(json.dumps(d, indent=2) + "\n", args, st)
        return 0
    combos = _combination_lines(sym, cases)
    if fmt_name in ("md", "latex"):
        section = ("Closed forms", _sheet_lines(sym, cases, combos, fmt_name))
        emit(document(sol, cases, fmt_name, extra=[section]), args, st)
        return 0
    _print_closed_forms(args, st, sol, sym, cases, combos)
    return 0


def _sheet_lines(sym, cases, combos: list[str], fmt_name: str) -> list[str]:
    """The closed forms and the combination lines as a Markdown or LaTeX sheet section."""
    from ..output.closed_forms import closed_forms_latex, closed_forms_markdown
    from ..output.documents import md_text, tex_escape

    lines = (closed_forms_markdown if fmt_name == "md" else closed_forms_latex)(sym, cases)
    if combos:
        lines += ["", *(md_text(t) + "  " if fmt_name == "md" else tex_escape(t) + r"\\"
                        for t in combos)]
    return lines


def _print_closed_forms(args, st, sol, sym, cases, combos: list[str]) -> None:
    """The closed forms (after the audit trail with ``--steps``) on the terminal, or as
    plain text to ``--output``."""
    from rich.console import Console
    from rich.text import Text

    from ..output.closed_forms import print_closed_forms

    plain = args.no_color or bool(args.output)
    console = (Console(record=True, file=io.StringIO(), width=FILE_WIDTH, color_system=None,
                       highlight=False)
               if args.output else Console(color_system=None, highlight=False) if plain
               else Console(highlight=False))
    if args.steps:
        from ..output.terminal import print_steps

        print_steps(console, sol, cases)
    print_closed_forms(console, sym, cases)
    for line in combos:
        console.print(Text(line))
    if args.output:
        emit(console.export_text(), args, st)


def _combination_lines(sym, cases) -> list[str]:
    """One plain line per load combination shown: its exact factors (``ULS = 27/20 × dead
    + 3/2 × live``), user names made literal."""
    import sympy

    from ..plaintext import literal

    shown = [n for n in sym.combinations if cases is None or n in cases]
    if not shown:
        return []
    out = ["Load combinations (each solved as a load case of its factored loads; exact "
           "factors):"]
    for name in shown:
        text = ""
        for case, f in sym.combinations[name].items():
            negative = f.could_extract_minus_sign()
            size = -f if negative else f
            body = f"({size})" if isinstance(size, sympy.Add) else str(size)
            sign = ("− " if negative else "") if not text else (" − " if negative else " + ")
            text += f"{sign}{body} × {literal(case, 40)}"
        out.append(f"{literal(name, 40)} = {text}")
    return out
