"""Command line: ``leastwork solve CASE`` and ``leastwork check CASE``.

Exit status: 0 solved; 2 the case or the command line is wrong; 3 the structure or the
released structure is a mechanism; 1 only for a bug.
"""

from __future__ import annotations

import argparse
import io
import json
import sys

from .errors import CaseError, MechanismError

__all__ = ["main", "PhaseDisplay"]

_DESCRIPTION = """\
Solve statically indeterminate 2D beams, trusses, frames and beam-and-tie structures by the
least-work (force) method, showing every step.

Assumptions: linear elastic material, small displacements, plane structure; the energy of
bending and axial force (shear only when asked) and of springs. Results must be checked by
a qualified engineer against the governing local codes before use.
"""


class _Parser(argparse.ArgumentParser):
    def error(self, message: str):  # exit 2 with one plain line, no usage dump
        raise CaseError(message, source="command line")


def _parser() -> argparse.ArgumentParser:
    p = _Parser(prog="leastwork", description=_DESCRIPTION,
                formatter_class=argparse.RawDescriptionHelpFormatter)
    p.add_argument("--version", action="version", version=_version())
    sub = p.add_subparsers(dest="command", parser_class=_Parser)
    s = sub.add_parser("solve", help="solve a case file", description=_DESCRIPTION,
                       formatter_class=argparse.RawDescriptionHelpFormatter)
    s.add_argument("case", help="case file (TOML)")
    s.add_argument("--json", action="store_true", help="print only the JSON result")
    s.add_argument("--steps", action="store_true", help="print the whole audit trail")
    s.add_argument("--case", dest="load_case", metavar="NAME",
                   help="report only this load case")
    s.add_argument("--redundants", metavar="LIST",
                   help="comma-separated redundants, e.g. C.y,BC (overrides the case)")
    s.add_argument("--at", metavar="LIST",
                   help="comma-separated displacements to add, e.g. B.y,C.rz,AB@2.5.y,A-C")
    _basis_option(s)
    _presentation_options(s)
    s.add_argument("--no-verify", action="store_true",
                   help="skip the cross-check by the independent direct-stiffness solver")
    s.add_argument("--symbolic", action="store_true",
                   help="keep every [parameters] name a symbol and give closed forms (sympy)")
    s.add_argument("--time-limit", type=_time_limit, default=60.0, metavar="SECONDS",
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
    c = sub.add_parser("check", help="indeterminacy, stability and suggested redundants",
                       description=_DESCRIPTION,
                       formatter_class=argparse.RawDescriptionHelpFormatter)
    c.add_argument("case", help="case file (TOML)")
    _basis_option(c)
    c.add_argument("--no-color", action="store_true", help="plain text, no colours")
    n = sub.add_parser("new", help="print a commented starter case to standard output",
                       description="Print a commented starter case; redirect it to a file "
                                   "and edit it: leastwork new portal-frame > shed.toml")
    n.add_argument("kind", nargs="?", help="kind of structure (see --list)")
    n.add_argument("--list", action="store_true", help="list the kinds, one per line")
    sub.add_parser("demo", help="solve a bundled example and show what the tool can do")
    pl = _file_command(sub, "plot", "draw the structure, force diagrams and deflected shape",
                       "Draw the structure with its supports, loads and redundants, the n, v "
                       "and m diagrams and the deflected shape, to a PNG or SVG file (by the "
                       "suffix).", "PNG or SVG file to write")
    pl.add_argument("--diagrams", metavar="LIST", default="structure,n,v,m,deflected",
                    help="comma-separated: structure, n, v, m, deflected (default: all)")
    _file_command(sub, "report", "write a calculation report (HTML or Markdown)",
                  "Write a calculation report: inputs, assumptions, the audit steps, results, "
                  "diagrams, the cross-check and the caution. HTML (one self-contained file) "
                  "or Markdown (with SVG images beside it), by the suffix.",
                  ".html or .md file to write")
    from . import studies_cli

    studies_cli.add_parsers(sub)
    return p


def _file_command(sub, name: str, summary: str, description: str, output_help: str):
    """A subcommand that solves a case and writes files (``plot``, ``report``)."""
    import textwrap

    p = sub.add_parser(name, help=summary,
                       description=textwrap.fill(description, 92) + "\n\n" + _DESCRIPTION,
                       formatter_class=argparse.RawDescriptionHelpFormatter)
    p.add_argument("case", help="case file (TOML)")
    p.add_argument("-o", "--output", metavar="FILE", required=True, help=output_help)
    p.add_argument("--case", dest="load_case", metavar="NAME",
                   help="only this load case (default: every case)")
    p.add_argument("--redundants", metavar="LIST", help="redundants to use (as for solve)")
    _basis_option(p)
    p.add_argument("--force", action="store_true", help="replace existing files")
    return p


def _basis_option(p: argparse.ArgumentParser) -> None:
    p.add_argument("--basis", choices=("auto", "released", "local"), default="auto",
                   help="released: unit redundant states of one released structure (dense); "
                        "local: local self-stress states, each closing the cut of one member "
                        "force or reaction (sparse, for large structures; redundants cannot "
                        "be named); auto (default): local above 1500 basic forces and "
                        "reactions when no redundants are named")


def _presentation_options(p: argparse.ArgumentParser) -> None:
    p.add_argument("--units", metavar="FORCE,LENGTH",
                   help="report results in these units instead of the case's, e.g. kN,mm "
                        "(inputs, including distances in --at, stay in the case units)")
    p.add_argument("--no-color", action="store_true", help="plain text, no colours")
    p.add_argument("-q", "--quiet", action="store_true",
                   help="only the redundants, the checks and any warning")


def _display_units(text: str | None):
    """The UnitSystem of ``--units FORCE,LENGTH``, or None."""
    if text is None:
        return None
    from .units import UnitSystem, check_unit

    parts = [t.strip() for t in text.split(",")]
    if len(parts) != 2 or not all(parts):
        raise CaseError(f'expected FORCE,LENGTH such as "kN,mm", got "{text}"',
                        source="command line", where="--units")
    try:
        check_unit(parts[0], "force")
        check_unit(parts[1], "length")
    except ValueError as exc:
        raise CaseError(str(exc), source="command line", where="--units") from None
    return UnitSystem(parts[0], parts[1])


def _version() -> str:
    from . import __version__

    return f"leastwork {__version__}"


def _split(text: str | None) -> list[str] | None:
    if text is None:
        return None
    items = [t.strip() for t in text.split(",") if t.strip()]
    return items


def main(argv: list[str] | None = None) -> int:
    """Entry point; returns the exit status."""
    from .plaintext import literal

    try:
        return _run(argv)
    except CaseError as exc:  # str() is one line already; literal() again costs nothing
        print(f"leastwork: error: {literal(exc)}", file=sys.stderr)
        return 2
    except MechanismError as exc:
        print(f"leastwork: unstable: {literal(exc)}", file=sys.stderr)
        return 3
    except KeyboardInterrupt:
        return 130
    except SystemExit as exc:  # --help and --version print and stop
        return exc.code if isinstance(exc.code, int) else 0


def _run(argv) -> int:
    import dataclasses

    from rich.console import Console

    from .caseio import load_case
    from .report.terminal import print_brief, print_steps, print_summary
    from .solve import solve

    args = _parser().parse_args(argv)
    if args.command is None:
        _parser().print_help()
        return 2
    if args.command == "new":
        return _new(args)
    if args.command == "demo":
        from .demo import run_demo

        return run_demo(Console())
    st = load_case(args.case)
    plain = getattr(args, "no_color", False)
    console = Console(color_system=None, highlight=False) if plain else Console()
    if args.command in ("plot", "report"):
        return _drawing(args, st)
    if args.command in ("fitup", "influence"):
        from . import studies_cli

        return studies_cli.run(args, console)
    if args.command == "check":
        return _check(args, st, console)
    extra = _split(args.at) or []
    if extra:
        st = dataclasses.replace(st, displacements=tuple(dict.fromkeys([*st.displacements,
                                                                         *extra])))
        from .displacements import parse_target
        from .topology import sparse_topology

        topo = sparse_topology(st)  # node directions only: no rank decisions needed
        for t in extra:
            parse_target(st, topo, t, "--at")
    names = _split(args.redundants)
    if args.redundants is not None and not names:
        raise CaseError("expected a comma-separated list of redundants", source="command line",
                        where="--redundants")
    units = _display_units(args.units)
    with _progress("solving") as say:
        sol = solve(st, names, where="--redundants" if names is not None else None,
                    verify=False if args.no_verify else None, basis=args.basis,
                    progress=say)
    if units is not None:
        sol.display_units = units
    cases = _chosen_cases(sol, args.load_case)
    fmt_name = _output_format(args)
    if args.symbolic:
        return _symbolic(args, st, sol, names, cases, fmt_name)
    if fmt_name == "json":
        d = sol.to_dict()
        if cases:
            d["cases"] = {k: v for k, v in d["cases"].items() if k in cases}
        # indented for reading; a large result compactly (Python's fast encoder works
        # only without indentation, and nobody reads 10^4 members by eye)
        indent = 2 if len(st.members) <= JSON_INDENT_MAX_MEMBERS else None
        _emit(json.dumps(d, indent=indent) + "\n", args, st)
    elif fmt_name in ("md", "latex"):
        _emit(_document(sol, cases, fmt_name), args, st)
    elif args.output:
        buf = Console(record=True, file=io.StringIO(), width=_FILE_WIDTH, color_system=None)
        (print_steps if args.steps else print_summary)(buf, sol, cases)
        _emit(buf.export_text(), args, st)
    elif args.quiet:
        print_brief(console, sol, cases)
    elif args.steps:
        print_steps(console, sol, cases)
    else:
        print_summary(console, sol, cases)
    if fmt_name != "text" or args.output:
        if not sol.equilibrium_ok:
            print("leastwork: WARNING: the equilibrium check FAILED; do not use these results",
                  file=sys.stderr)
        if not sol.cross_check_ok:
            print("leastwork: WARNING: the direct-stiffness cross-check DISAGREES or failed; "
                  "see the warnings", file=sys.stderr)
    return 0


#: Above this many members the JSON result is written without indentation.
JSON_INDENT_MAX_MEMBERS = 2000

#: Width of text written to a file (the terminal uses its own width).
_FILE_WIDTH = 100

_SUFFIX_FORMAT = {".md": "md", ".markdown": "md", ".tex": "latex", ".json": "json",
                  ".txt": "text"}


def _chosen_cases(sol, name: str | None) -> list[str] | None:
    """The load cases ``--case`` asks for (None: all), checked against the solution."""
    if name is None:
        return None
    if name not in sol.cases:
        raise CaseError(f'no load case "{name}"; the case has: ' + ", ".join(sol.cases),
                        source="command line", where="--case")
    return [name]


class PhaseDisplay:
    """The current phase of a long run and the time since it began, on one line of
    standard error that rich redraws a few times a second and removes at the end.

    Call the instance with a phase name as each phase starts (``solve(progress=...)``). The
    line appears only once the run has lasted ``delay`` seconds, so quick runs print
    nothing.
    """

    def __init__(self, what: str, console=None, delay: float = 1.0):
        import threading
        import time

        from rich.console import Console
        from rich.spinner import Spinner

        self.what = what
        self.phase = "starting"
        self.console = console or Console(stderr=True)
        self.delay = delay
        self._clock = time.monotonic
        self._t0 = self._clock()
        self._spinner = Spinner("dots")
        self._lock = threading.Lock()
        self._live = None
        self._closed = False
        self._timer = threading.Timer(delay, self._show)
        self._timer.daemon = True

    def __call__(self, phase: str) -> None:
        self.phase = phase

    def __rich__(self):
        elapsed = self._clock() - self._t0
        self._spinner.update(text=f"{self.what}: {self.phase} ({elapsed:.0f} s)")
        return self._spinner

    def _show(self) -> None:
        from rich.live import Live

        with self._lock:
            if self._closed:
                return
            self._live = Live(self, console=self.console, transient=True,
                              refresh_per_second=8, redirect_stdout=False,
                              redirect_stderr=False)
            self._live.start()

    def __enter__(self) -> PhaseDisplay:
        self._t0 = self._clock()
        self._timer.start()
        return self

    def __exit__(self, *exc) -> None:
        with self._lock:
            self._closed = True
            self._timer.cancel()
            if self._live is not None:
                self._live.stop()


def _progress(what: str):
    """A :class:`PhaseDisplay` on a terminal; elsewhere a context that yields a callable
    that does nothing."""
    import contextlib

    if not sys.stderr.isatty():
        return contextlib.nullcontext(_no_progress)
    return PhaseDisplay(what)


def _no_progress(phase: str) -> None:
    """Progress callback when nothing is shown."""


def _busy(message: str):
    """A spinner on standard error while something slow runs, only on a terminal."""
    import contextlib

    if not sys.stderr.isatty():
        return contextlib.nullcontext()
    from rich.console import Console

    return Console(stderr=True).status(f"{message}...", spinner="dots")


def _check(args, st, console) -> int:
    """``leastwork check``: indeterminacy, stability and the redundants a solve would take.

    Above ``LOCAL_BASIS_MIN_COLUMNS`` basic forces and reactions (when the case names no
    redundants), or with ``--basis local``, the answer comes from the sparse self-stress
    sweep (:func:`leastwork.sparse_solve.find_basis`): no dense singular values.
    """
    import dataclasses

    from .report.terminal import print_check, user_text
    from .solve import layout_warnings, resolve_basis
    from .topology import build_topology, check_stable, choose_redundants

    notes: list[str] = []
    basis = None
    with _progress("checking") as say:
        local = resolve_basis(st, st.redundants, args.basis,
                              "[analysis] redundants") == "local"
        if local:
            from .sparse_solve import SweepSingular, local_topology

            try:
                topo, basis = local_topology(st, say)
                red = [int(j) for j in basis.closing]
            except SweepSingular as exc:  # stable by the dense rank: that path answers
                notes.append(exc.note)
                local = False
        if not local:
            say("equilibrium matrix")
            topo = build_topology(st)
            if topo.stable:
                say("redundants")
                red = choose_redundants(st, topo, st.redundants)
        if topo.stable:
            try:  # the same stability index and layout checks as a solve, on either path
                notes += layout_warnings(st, topo, basis)
            except MechanismError:
                print_check(console, st, dataclasses.replace(topo, stable=False), [])
                raise
    if not topo.stable:
        print_check(console, st, topo, [])
        check_stable(st, topo)
    print_check(console, st, topo, red, basis="local" if local else "released")
    for w in notes:
        console.print(user_text(f"Warning: {w}", "yellow"))
    return 0


def _drawing(args, st) -> int:
    """``plot`` and ``report``: solve, then write the figure or the report files."""
    import os
    import pathlib
    import tempfile

    from .solve import solve
    from .writing import write_files

    names = _split(args.redundants)
    with _progress("solving") as say:
        sol = solve(st, names, where="--redundants" if names is not None else None,
                    basis=args.basis, progress=say)
    cases = _chosen_cases(sol, args.load_case)
    out = pathlib.Path(args.output)
    suffix = out.suffix.lower()
    if args.command == "plot":
        from .report.plot import parse_diagrams, plot_case

        if suffix not in (".png", ".svg"):
            raise CaseError(f'cannot draw to "{out}": name it .png or .svg',
                            source="command line", where="--output")
        diagrams = parse_diagrams(args.diagrams)
        fd, tmp = tempfile.mkstemp(suffix=suffix)
        os.close(fd)
        try:
            with _busy("drawing"):
                plot_case(sol, tmp, case=args.load_case, diagrams=diagrams)
            files = {out: pathlib.Path(tmp).read_bytes()}
        finally:
            os.unlink(tmp)
    elif suffix in (".html", ".htm"):
        from .report.html import report_html

        with _busy("writing the report"):
            files = {out: report_html(sol, cases, meta=_sheet_meta())}
    elif suffix in (".md", ".markdown"):
        from .report.html import report_markdown_files

        with _busy("writing the report"):
            files = report_markdown_files(sol, out, cases, meta=_sheet_meta())
    else:
        raise CaseError(f'cannot tell the report format of "{out}": name it .html or .md',
                        source="command line", where="--output")
    write_files(files, force=args.force, case=st.source)
    from .plaintext import literal

    for path in files:
        print(f"leastwork: wrote {literal(path)}", file=sys.stderr)
    if not sol.equilibrium_ok or not sol.cross_check_ok:
        print("leastwork: WARNING: a check FAILED (equilibrium or cross-check); see the "
              "report", file=sys.stderr)
    return 0


def _new(args) -> int:
    from .starters import starter_kinds, starter_text

    if args.list:
        print("\n".join(starter_kinds()))
        return 0
    if not args.kind:
        raise CaseError("name a kind of structure, or --list to see them: "
                        + ", ".join(starter_kinds()), source="command line", where="new")
    sys.stdout.write(starter_text(args.kind))
    return 0


def _output_format(args) -> str:
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
        if suffix not in _SUFFIX_FORMAT:
            raise CaseError(f'cannot tell the format of "{args.output}" from its suffix; give '
                            "--format text|md|latex or --json, or name it .md, .tex, .json or "
                            ".txt", source="command line", where="--output")
        return _SUFFIX_FORMAT[suffix]
    return "text"


def _sheet_meta() -> dict[str, str]:
    import datetime

    return {"Prepared with": _version(), "Date": datetime.date.today().isoformat()}


def _document(sol, cases, fmt_name: str, extra=None) -> str:
    from .output.audit import audit_sheet
    from .report.documents import sheet_latex, sheet_markdown

    sheet = audit_sheet(sol, cases, meta=_sheet_meta())
    return (sheet_markdown if fmt_name == "md" else sheet_latex)(sheet, extra)


def _emit(text: str, args, st) -> None:
    """Print ``text``, or write it to ``--output`` (see :mod:`leastwork.writing`)."""
    import pathlib

    from .writing import write_files

    if not args.output:
        sys.stdout.write(text)
        return
    from .plaintext import literal

    write_files({pathlib.Path(args.output): text}, force=args.force, case=st.source)
    print(f"leastwork: wrote {literal(args.output)}", file=sys.stderr)


#: Largest --time-limit (seconds): a closed form that needs more is beyond reach in practice.
TIME_LIMIT_MAX = 3600.0


def _time_limit(text: str) -> float:
    """``--time-limit``: a positive, finite number of seconds up to TIME_LIMIT_MAX."""
    from .plaintext import ECHO_LIMIT, literal

    try:
        value = float(text)
    except ValueError:
        value = float("nan")
    if not 0 < value <= TIME_LIMIT_MAX:  # also NaN and inf
        raise argparse.ArgumentTypeError(
            f"expected a number of seconds above 0 and at most {TIME_LIMIT_MAX:g}, got "
            f'"{literal(text, ECHO_LIMIT)}"')
    return value


def _symbolic(args, st, sol, names, cases, fmt_name) -> int:
    """``solve --symbolic``: closed forms (terminal, JSON strings, or a sheet section),
    with the redundants of the numeric solve ``sol`` (the same as its sheet's)."""
    from rich.console import Console

    from .report.closed_forms import (
        closed_forms_latex,
        closed_forms_markdown,
        print_closed_forms,
    )
    from .symbolic import solve_symbolic

    with _busy(f"closed forms (at most {args.time_limit:g} s)"):
        sym = solve_symbolic(args.case, redundants=names,
                             extra_displacements=_split(args.at) or [],
                             time_limit=args.time_limit,
                             numeric_redundants=sol.redundant_names
                             if sol.basis == "released" else None)
    if fmt_name == "json":
        d = sym.to_dict()
        if cases:
            d["cases"] = {k: v for k, v in d["cases"].items() if k in cases}
        _emit(json.dumps(d, indent=2) + "\n", args, st)
        return 0
    combos = _combination_lines(sym, cases)
    if fmt_name in ("md", "latex"):
        from .report.documents import md_text, tex_escape

        lines = (closed_forms_markdown if fmt_name == "md" else closed_forms_latex)(sym, cases)
        if combos:
            lines += ["", *(md_text(t) + "  " if fmt_name == "md" else tex_escape(t) + r"\\"
                            for t in combos)]
        _emit(_document(sol, cases, fmt_name, extra=[("Closed forms", lines)]), args, st)
        return 0
    plain = args.no_color or bool(args.output)
    console = (Console(record=True, file=io.StringIO(), width=_FILE_WIDTH, color_system=None)
               if args.output else Console(color_system=None) if plain else Console())
    if args.steps:
        from .report.terminal import print_steps

        print_steps(console, sol, cases)
    print_closed_forms(console, sym, cases)
    if combos:
        from rich.text import Text

        for line in combos:
            console.print(Text(line))
    if args.output:
        _emit(console.export_text(), args, st)
    return 0


def _combination_lines(sym, cases) -> list[str]:
    """One plain line per load combination shown: its exact factors (``ULS = 27/20 × dead
    + 3/2 × live``), user names made literal."""
    import sympy

    from .plaintext import literal

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


if __name__ == "__main__":  # pragma: no cover
    sys.exit(main())
