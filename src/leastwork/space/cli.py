"""The command line for space structures: ``solve`` and ``check`` of a case whose nodes
have three coordinates (the plane commands hand such a case here), and one plain refusal
for what a space case does not support yet."""

from __future__ import annotations

import dataclasses
import io
import json
import sys

from ..errors import CaseError
from .model import DIRECTIONS

__all__ = ["run_solve", "run_check", "refuse"]


def refuse(what: str) -> CaseError:
    """The plain refusal of a feature a space case does not have yet (exit status 2)."""
    return CaseError(f"{what} is not supported for space structures yet (3D nodes); "
                     "use leastwork solve or check", source="command line")


def _units(args, st):
    from ..cli.common import display_units

    units = display_units(getattr(args, "units", None), st.units)
    return st if units is None else dataclasses.replace(st, units=units)


def run_solve(args, st) -> int:
    """``leastwork solve`` of a space case: summary, ``--steps``, ``--json``, ``--format
    md|latex``, ``-o``; ``--symbolic`` and ``--basis local`` are refused."""
    from ..cli.common import FILE_WIDTH, chosen_cases, console_for, emit, output_format, split
    from ..output.sheet import fmt
    from ..output.terminal import print_sheet
    from .report import space_dict, space_sheet
    from .solve import solve_space

    if args.basis == "local":
        raise refuse("--basis local")
    extra = split(args.at) or []
    for t in extra:
        node, _, d = t.partition(".")
        if node not in st.nodes or d not in DIRECTIONS:
            raise CaseError(f'"{t}" is not a displacement of this space structure; expected '
                            "NODE.x|y|z|rx|ry|rz with a node of the case", source="command line",
                            where="--at")
    st = dataclasses.replace(st, displacements=tuple(dict.fromkeys([*st.displacements,
                                                                    *extra])))
    names = split(args.redundants)
    if args.redundants is not None and not names:
        raise CaseError("expected a comma-separated list of redundants", source="command line",
                        where="--redundants")
    sol = solve_space(_units(args, st), names, where="--redundants" if names else None,
                      verify=not args.no_verify)
    cases = chosen_cases(sol, args.load_case)
    fmt_name = output_format(args)
    if args.symbolic:
        return _symbolic(args, st, sol, cases, fmt_name)
    if fmt_name == "json":
        emit(json.dumps(space_dict(sol, cases), indent=2) + "\n", args, st)
    elif fmt_name in ("md", "latex"):
        from ..cli.common import sheet_meta
        from ..output.documents import sheet_latex, sheet_markdown

        sheet = space_sheet(sol, cases, meta=sheet_meta())
        emit((sheet_markdown if fmt_name == "md" else sheet_latex)(sheet), args, st)
    elif args.quiet and not args.output:
        from rich.text import Text

        console = console_for(args)
        console.print(Text(f"{st.name}: degree {sol.topology.degree}; redundants "
                           + (", ".join(sol.redundant_names) or "none")))
        from ..output.quantities import quantities

        q = quantities(sol.structure.units)
        unit = {sol.topology.columns[i].name: q.moment_unit if sol.topology.columns[i].is_moment
                else q.force_unit for i in sol.redundants}
        for name in sol.cases:
            if cases is None or name in cases:
                vals = ", ".join(f"{n} = {fmt(v)} {unit[n]}" for n, v in space_dict(
                    sol, [name])["cases"][name]["redundants"].items())
                console.print(Text(f"  {name}: {vals or 'no redundants'}"))
        console.print(Text("equilibrium " + ("satisfied" if sol.equilibrium_ok else
                                             "FAILED: do not use these results")
                           + "; " + (sol.stiffness_check.message if sol.stiffness_check
                                     else "stiffness cross-check not run")))
    else:
        sheet = space_sheet(sol, cases, full=bool(args.steps))
        if args.output:
            from rich.console import Console

            buf = Console(record=True, file=io.StringIO(), width=FILE_WIDTH, color_system=None)
            print_sheet(buf, sheet)
            emit(buf.export_text(), args, st)
        else:
            print_sheet(console_for(args), sheet)
    if fmt_name != "text" or args.output:
        if not sol.equilibrium_ok:
            print("leastwork: WARNING: the equilibrium check FAILED; do not use these results",
                  file=sys.stderr)
        if not sol.cross_check_ok:
            print("leastwork: WARNING: the direct-stiffness cross-check DISAGREES; see the "
                  "checks", file=sys.stderr)
    return 0


def run_check(args, st) -> int:
    """``leastwork check`` of a space case: equations, rank, degree, counting formula,
    stability (mechanisms named) and the redundants a solve would take."""
    from rich.text import Text

    from ..cli.common import console_for
    from .topology import check_stable, choose_redundants, space_topology

    console = console_for(args)
    topo = space_topology(st, st.redundants)
    console.print(Text(f"{st.name}  ({st.source})"))
    console.print(Text(f"Space structure: {len(st.nodes)} joints, {len(st.members)} members; "
                       f"{len(topo.dofs)} equilibrium equations, {len(topo.columns)} unknowns, "
                       f"rank {topo.rank}."))
    console.print(Text(f"Degree of indeterminacy: {topo.degree} (external {topo.external}, "
                       f"internal {topo.internal})."))
    console.print(Text("Counting formula: " + topo.counting["formula"]))
    if not topo.stable:
        console.print(Text("Unstable: the structure is a mechanism; moving: "
                           + (", ".join(topo.mechanism) or "(not identified)")))
        check_stable(st, topo)
    red = choose_redundants(st, topo, st.redundants)
    names = [topo.columns[i].name for i in red]
    console.print(Text("Stable. Redundants: " + (", ".join(names) or "none (determinate)")))
    return 0


def run_plot(args, st) -> int:
    """``leastwork plot`` of a space case: the axonometric view with supports and loads, the
    deflected shape, the N, T, My, Mz diagrams in the members' planes and, for a grid, the
    plan view with the twist marked (``--diagrams`` picks among them); ``report`` is
    refused."""
    import os
    import pathlib
    import tempfile

    from ..cli.common import chosen_cases, split
    from ..io.writing import write_files
    from ..plaintext import literal
    from .plot import SPACE_DIAGRAMS, plot_space
    from .solve import solve_space

    if args.basis == "local":
        raise refuse("--basis local")
    if args.command != "plot":
        return _report(args, st)
    out = pathlib.Path(args.output)
    if out.suffix.lower() not in (".png", ".svg"):
        raise CaseError(f'cannot draw to "{literal(str(out))}": name it .png or .svg',
                        source="command line", where="--output")
    diagrams = None
    if args.diagrams != "structure,n,v,m,deflected":  # the plane default: the space default
        wanted = []
        for d in split(args.diagrams) or []:
            names = ("my", "mz") if d == "m" else (d,)
            for name in names:
                if name not in SPACE_DIAGRAMS:
                    raise CaseError(f'unknown diagram "{literal(d, 40)}" for a space structure;'
                                    " expected some of: " + ", ".join(SPACE_DIAGRAMS) + " (m: "
                                    "my and mz)", source="command line", where="--diagrams")
                wanted.append(name)
        diagrams = tuple(dict.fromkeys(wanted))
    names = split(args.redundants)
    sol = solve_space(_units(args, st), names, where="--redundants" if names else None)
    cases = chosen_cases(sol, args.load_case)
    fd, tmp = tempfile.mkstemp(suffix=out.suffix.lower())
    os.close(fd)
    try:
        plot_space(sol, tmp, case=cases[0] if cases else None, diagrams=diagrams)
        data = pathlib.Path(tmp).read_bytes()
    finally:
        os.unlink(tmp)
    write_files({out: data}, force=args.force, case=st.source)
    print(f"leastwork: wrote {literal(str(out))}", file=sys.stderr)
    if not sol.equilibrium_ok or not sol.cross_check_ok:
        print("leastwork: WARNING: a check FAILED (equilibrium or cross-check); see "
              "leastwork solve", file=sys.stderr)
    return 0


def _symbolic(args, st, sol, cases, fmt_name: str) -> int:
    """``solve --symbolic`` of a space case under nodal loads: closed forms of the
    redundants, reactions and displacements (terminal lines, or ``--json``)."""
    import pathlib

    from ..cli.common import emit
    from ..io.files import read_case_text
    from ..symbolic.time_limit import run_bounded
    from .symbolic import closed_form_dict, closed_form_lines, space_closed_forms

    if fmt_name in ("md", "latex"):
        raise refuse("--symbolic with --format md/latex")
    text = read_case_text(pathlib.Path(args.case))
    cf = run_bounded(lambda tick: space_closed_forms(sol, text), args.time_limit,
                     f"the closed forms took longer than --time-limit {args.time_limit:g} s; "
                     "solve numerically or raise the limit", st.source)
    if fmt_name == "json":
        emit(json.dumps(closed_form_dict(cf, cases), indent=2) + "\n", args, st)
    else:
        emit("\n".join(closed_form_lines(cf, st.units, cases)) + "\n", args, st)
    return 0


def run_influence(args, st) -> int:
    """``leastwork influence`` of a space case: a downward unit load moving along the
    ``--along`` members; a table, ``--json``, and with ``-o`` a drawing of the line."""
    from rich.table import Table

    from ..cli.common import console_for, split
    from ..output.sheet import fmt
    from ..output.terminal import print_fitted
    from .influence import influence_dict, influence_line
    from .solve import solve_space

    if args.points < 1 or args.points > 1000:
        raise CaseError("expected 1 to 1000 intervals per member", source="command line",
                        where="--points")
    st = _units(args, st)
    sol = solve_space(st, verify=False)
    rows = influence_line(sol, args.quantity, split(args.along) or [], args.points)
    d = influence_dict(sol, args.quantity, rows)
    if args.output:
        _influence_plot(st, d, args)
    if args.json:
        print(json.dumps(d, indent=2))
        return 0
    console = console_for(args)
    t = Table(title=f"Influence line of {args.quantity} ({d['unit']}; load {d['load']})")
    for h in ("member", f"at ({st.units.length})", "value"):
        t.add_column(h, justify="right" if h != "member" else "left")
    for p in d["points"]:
        t.add_row(p["member"], fmt(p["at"]), fmt(p["value"]))
    print_fitted(console, t)
    console.print(f"largest {fmt(d['max']['value'])} at {d['max']['member']}@"
                  f"{fmt(d['max']['at'])}; smallest {fmt(d['min']['value'])} at "
                  f"{d['min']['member']}@{fmt(d['min']['at'])}", markup=False)
    return 0


def _influence_plot(st, d: dict, args) -> None:
    import os
    import pathlib
    import tempfile

    import matplotlib

    matplotlib.use("Agg")
    import matplotlib.pyplot as plt

    from ..io.writing import write_files
    from ..plaintext import literal

    out = pathlib.Path(args.output)
    if out.suffix.lower() not in (".png", ".svg"):
        raise CaseError(f'cannot draw to "{literal(str(out))}": name it .png or .svg',
                        source="command line", where="--output")
    xs, run, last = [], 0.0, None
    for p in d["points"]:
        if last is not None and p["member"] != last[0]:
            run += last[1]
        xs.append(run + p["at"])
        last = (p["member"], p["at"])
    fig, ax = plt.subplots(figsize=(7, 3))
    ax.plot(xs, [p["value"] for p in d["points"]], color="#1f4e9b")
    ax.axhline(0, color="#888888", lw=0.8)
    ax.set_xlabel(f"distance along {args.along} ({st.units.length})")
    ax.set_ylabel(d["unit"])
    ax.set_title(f"{st.name}: influence line of {d['quantity']}", fontsize=9)
    fig.tight_layout()
    fd, tmp = tempfile.mkstemp(suffix=out.suffix.lower())
    os.close(fd)
    try:
        fig.savefig(tmp, dpi=130)
        plt.close(fig)
        data = pathlib.Path(tmp).read_bytes()
    finally:
        os.unlink(tmp)
    write_files({out: data}, force=args.force, case=st.source)
    print(f"leastwork: wrote {literal(str(out))}", file=sys.stderr)


#: The report page fits an A4 page in print: the drawings scale to the page width and the
#: 100-column text of the sheet fits it at 8 pt.
_PAGE_CSS = ("body { max-width: 200mm; margin: 10mm auto; } svg { max-width: 100%; "
             "height: auto; } pre { font-size: 8pt; } @page { size: A4; margin: 14mm 12mm; }")


def _report(args, st) -> int:
    """``leastwork report`` of a space case: the calculation sheet (the whole audit trail)
    with the drawing of each load case — Markdown with SVG files beside it, or one HTML file
    with the sheet as text and the drawings inline."""
    import html
    import os
    import pathlib
    import tempfile

    from rich.console import Console

    from ..cli.common import FILE_WIDTH, chosen_cases, sheet_meta, split
    from ..io.writing import write_files
    from ..output.documents import md_text, sheet_markdown
    from ..output.terminal import print_sheet
    from ..plaintext import literal
    from .plot import plot_space
    from .report import space_sheet
    from .solve import solve_space

    out = pathlib.Path(args.output)
    suffix = out.suffix.lower()
    if suffix not in (".md", ".markdown", ".html", ".htm"):
        raise CaseError(f'cannot tell the report format of "{literal(str(out))}": name it '
                        ".html or .md", source="command line", where="--output")
    names = split(args.redundants)
    sol = solve_space(_units(args, st), names, where="--redundants" if names else None)
    cases = chosen_cases(sol, args.load_case) or list(sol.cases)
    images = {}
    for c in cases:
        fd, tmp = tempfile.mkstemp(suffix=".svg")
        os.close(fd)
        try:
            plot_space(sol, tmp, case=c)
            images[c] = pathlib.Path(tmp).read_text(encoding="utf-8")
        finally:
            os.unlink(tmp)
    sheet = space_sheet(sol, cases, meta=sheet_meta())
    files: dict = {}
    if suffix in (".md", ".markdown"):
        lines = []
        for k, c in enumerate(cases, 1):
            name = f"{out.stem}-{k}.svg"
            files[out.with_name(name)] = images[c]
            lines += [f"![Drawings of load case {md_text(c)}]({name})", ""]
        files = {out: sheet_markdown(sheet, extra=[("Drawings", lines)]), **files}
    else:
        buf = Console(record=True, file=io.StringIO(), width=FILE_WIDTH, color_system=None)
        print_sheet(buf, sheet)
        body = "".join(f"<h2>Load case {html.escape(c)}</h2>\n{images[c]}\n" for c in cases)
        files[out] = ("<!DOCTYPE html>\n<html><head><meta charset=\"utf-8\"><title>"
                      f"{html.escape(st.name)}</title><style>{_PAGE_CSS}</style></head><body>\n"
                      f"<h1>{html.escape(st.name)}"
                      "</h1>\n<pre>" + html.escape(buf.export_text()) + "</pre>\n" + body
                      + "</body></html>\n")
    write_files(files, force=args.force, case=st.source)
    for path in files:
        print(f"leastwork: wrote {literal(str(path))}", file=sys.stderr)
    if not sol.equilibrium_ok or not sol.cross_check_ok:
        print("leastwork: WARNING: a check FAILED (equilibrium or cross-check); see the "
              "report", file=sys.stderr)
    return 0
