"""``leastwork plot`` and ``leastwork report``: solve a case, then write a drawing (PNG or
SVG) or a calculation report (HTML, or Markdown with SVG images beside it)."""

from __future__ import annotations

import sys

from ..errors import CaseError
from .common import add_units_option, chosen_cases, display_units, sheet_meta, split
from .parser import basis_option, command_description, command_parser
from .progress import busy, progress

__all__ = ["add_parsers", "run"]


def add_parsers(sub) -> None:
    """Add the ``plot`` and ``report`` subcommands to ``sub``."""
    pl = _file_command(sub, "plot", "draw the structure, force diagrams and deflected shape",
                       "Draw the structure with its supports, loads and redundants, the n, v "
                       "and m diagrams and the deflected shape, to a PNG or SVG file (by the "
                       "suffix).", "PNG or SVG file to write")
    pl.add_argument("--diagrams", metavar="LIST", default="structure,n,v,m,deflected",
                    help="comma-separated: structure, n, v, m, deflected (default: all)")
    pl.add_argument("--each-case", action="store_true",
                    help="one image per load case, named FILE's stem, '-', the case name "
                         "(bay.png -> bay-wind.png, bay-snow.png)")
    _file_command(sub, "report", "write a calculation report (HTML or Markdown)",
                  "Write a calculation report: inputs, assumptions, the audit steps, results, "
                  "diagrams, the cross-check and the caution. HTML (one self-contained file) "
                  "or Markdown (with SVG images beside it), by the suffix.",
                  ".html or .md file to write")


def _file_command(sub, name: str, summary: str, description: str, output_help: str):
    """A subcommand that solves a case and writes files (``plot``, ``report``)."""
    p = command_parser(sub, name, summary, command_description(description))
    p.add_argument("case", help="case file (TOML)")
    p.add_argument("-o", "--output", metavar="FILE", required=True, help=output_help)
    p.add_argument("--case", dest="load_case", metavar="NAME",
                   help="only this load case (default: every case)")
    p.add_argument("--redundants", metavar="LIST", help="redundants to use (as for solve)")
    add_units_option(p)
    basis_option(p)
    p.add_argument("--force", action="store_true", help="replace existing files")
    return p


def run(args) -> int:
    """``plot`` and ``report``: solve, then write the figure or the report files."""
    import pathlib

    from ..io.reader import load_case
    from ..io.writing import write_files
    from ..plaintext import literal
    from ..solve import solve

    st = load_case(args.case)
    if getattr(st, "is_space", False):
        from ..space.cli import run_plot

        return run_plot(args, st)
    units = display_units(args.units, st.units)
    if units is not None:  # the drawings and the report speak the units of the structure
        import dataclasses

        st = dataclasses.replace(st, units=units)
    names = split(args.redundants)
    with progress("solving") as say:
        sol = solve(st, names, where="--redundants" if names is not None else None,
                    basis=args.basis, progress=say)
    cases = chosen_cases(sol, args.load_case)
    out = pathlib.Path(args.output)
    if args.command == "plot":
        files = _figure(sol, out, args)
    else:
        files = _report(sol, out, cases)
    write_files(files, force=args.force, case=st.source)
    for path in files:
        print(f"leastwork: wrote {literal(path)}", file=sys.stderr)
    if not sol.equilibrium_ok or not sol.cross_check_ok:
        print("leastwork: WARNING: a check FAILED (equilibrium or cross-check); see the "
              "report", file=sys.stderr)
    return 0


def _figure(sol, out, args) -> dict:
    """``plot``: the drawing's bytes under the name ``out`` (.png or .svg)."""
    import os
    import pathlib
    import tempfile

    from ..output.plot import parse_diagrams, plot_case

    suffix = out.suffix.lower()
    if suffix not in (".png", ".svg"):
        raise CaseError(f'cannot draw to "{out}": name it .png or .svg',
                        source="command line", where="--output")
    diagrams = parse_diagrams(args.diagrams)
    if getattr(args, "each_case", False):
        if args.load_case is not None:
            raise CaseError("--each-case draws every load case; leave out --case NAME",
                            source="command line", where="--each-case")
        from ..output.plot import case_images

        with busy("drawing"):
            return case_images(sol, out, diagrams)
    fd, tmp = tempfile.mkstemp(suffix=suffix)
    os.close(fd)
    try:
        with busy("drawing"):
            plot_case(sol, tmp, case=args.load_case, diagrams=diagrams)
        return {out: pathlib.Path(tmp).read_bytes()}
    finally:
        os.unlink(tmp)


def _report(sol, out, cases) -> dict:
    """``report``: the report's files, HTML (one file) or Markdown (with its images), by
    the suffix of ``out``."""
    suffix = out.suffix.lower()
    if suffix in (".html", ".htm"):
        from ..output.html import report_html

        with busy("writing the report"):
            return {out: report_html(sol, cases, meta=sheet_meta())}
    if suffix in (".md", ".markdown"):
        from ..output.html import report_markdown_files

        with busy("writing the report"):
            return report_markdown_files(sol, out, cases, meta=sheet_meta())
    raise CaseError(f'cannot tell the report format of "{out}": name it .html or .md',
                    source="command line", where="--output")
