"""``leastwork fitup`` and ``leastwork influence``: the studies.

``add_parsers(sub)`` adds both subcommands to the subparsers of
:func:`leastwork.cli.build_parser` (whose parser class turns a bad option into exit
status 2 with one line); :func:`run_fitup` and :func:`run_influence` solve the case once and
print rich tables (units in the headers) or the JSON of docs/studies.md.
"""

from __future__ import annotations

import json
import sys

from ..errors import CaseError
from ..plaintext import literal
from .common import add_units_option, console_for, display_units

__all__ = ["add_parsers", "run_fitup", "run_influence"]

_FITUP = """\
Fit-up tolerance study: the forces locked into the structure by members made within a
length tolerance (no loads): the exact worst case with the pattern of length errors that
gives it, and Monte Carlo statistics. With --adjust/--zero: the length change of one
member that makes the axial force of another zero under a load case.
"""

_INFLUENCE = """\
Influence line: the value of a quantity as a downward load of one force unit moves along
the listed members, for all positions at once by the force method.
"""


def add_parsers(sub) -> None:
    """Add the ``fitup`` and ``influence`` subcommands to ``sub``, the subparsers action of
    :func:`leastwork.cli.build_parser` (made with ``parser_class=Parser``, so that a
    bad option exits with status 2 and one line)."""
    import argparse

    kw = {"formatter_class": argparse.RawDescriptionHelpFormatter}
    f = _add(sub, "fitup", "fit-up tolerance study (and length adjustment)", _FITUP, kw)
    f.add_argument("case", help="case file (TOML)")
    f.add_argument("--tolerance", metavar="SPEC",
                   help="length tolerances, e.g. DA=2mm,*=1mm (* = every other bar or beam "
                        "with an axial stiffness; bare numbers in the case length unit)")
    f.add_argument("--samples", type=int, default=10000, metavar="N",
                   help="Monte Carlo samples (default 10000)")
    f.add_argument("--seed", type=int, metavar="S",
                   help="seed of the random numbers (default: a fresh one, reported)")
    f.add_argument("--distribution", choices=("uniform", "normal"), default="uniform",
                   help="length errors uniform over +-t (default) or normal with sigma = t/3")
    f.add_argument("--case", dest="load_case", metavar="NAME",
                   help="load case of --adjust (default: the only or the first one)")
    f.add_argument("--adjust", metavar="MEMBER",
                   help="member whose length is changed (shim) ...")
    f.add_argument("--zero", metavar="MEMBER",
                   help="... so that the axial force of this member is zero")
    add_units_option(f)
    f.add_argument("--json", action="store_true", help="print only the JSON result")
    f.add_argument("-o", "--output", metavar="FILE",
                   help="also draw the locked-in forces (and the adjustment) to a PNG or "
                        "SVG file")
    f.add_argument("--force", action="store_true", help="replace FILE if it exists")
    f.add_argument("--no-color", action="store_true", help="plain text, no colours")
    i = _add(sub, "influence", "influence line of a reaction or internal force",
             _INFLUENCE, kw)
    i.add_argument("case", help="case file (TOML)")
    i.add_argument("--quantity", required=True, metavar="Q",
                   help="B.y (reaction x, y, rz, n), a member id (axial force), "
                        "AB.start.m, or a section force AB@2.5.m (m, v or n; distance in "
                        "the case length unit)")
    i.add_argument("--along", required=True, metavar="MEMBERS",
                   help="comma-separated members the load moves along, e.g. AB,BC")
    i.add_argument("--points", type=int, default=10, metavar="N",
                   help="equal intervals per member (default 10: the ends and 9 interior "
                        "points)")
    add_units_option(i)
    i.add_argument("--json", action="store_true", help="print only the JSON result")
    i.add_argument("-o", "--output", metavar="FILE",
                   help="also draw the influence line to a PNG or SVG file")
    i.add_argument("--force", action="store_true", help="replace FILE if it exists")
    i.add_argument("--no-color", action="store_true", help="plain text, no colours")


def _add(sub, name: str, help_text: str, description: str, kw: dict):
    from .parser import CAUTION_LINE

    return sub.add_parser(name, help=help_text, description=description + "\n" + CAUTION_LINE,
                          **kw)


def run_fitup(args) -> int:
    """``leastwork fitup``; returns the exit status (errors are raised as CaseError /
    MechanismError for :func:`leastwork.cli.main` to report)."""
    from ..io.reader import load_case

    st = load_case(args.case)
    if getattr(st, "is_space", False):
        from ..space.cli import refuse

        raise refuse("leastwork fitup")
    return _fitup(args, st, console_for(args))


def run_influence(args) -> int:
    """``leastwork influence``; returns the exit status (errors raised as for
    :func:`run_fitup`)."""
    from ..io.reader import load_case

    st = load_case(args.case)
    if getattr(st, "is_space", False):
        from ..space.cli import run_influence

        return run_influence(args, st)
    return _influence(args, st, console_for(args))


# ---------------------------------------------------------------------------- fitup
def _fitup(args, st, console) -> int:
    from ..solve import solve
    from ..studies.fitup import (
        adjustment,
        adjustment_to_dict,
        fitup_study,
        parse_tolerances,
        unit_texts,
    )
    from ..studies.fitup import study_to_dict as to_dict

    if args.tolerance is None and args.adjust is None and args.zero is None:
        raise CaseError("give --tolerance SPEC (e.g. DA=2mm,*=1mm) and/or --adjust MEMBER "
                        "--zero MEMBER", source="command line", where="--tolerance")
    if (args.adjust is None) != (args.zero is None):
        raise CaseError("--adjust MEMBER and --zero MEMBER go together", source="command line",
                        where="--adjust" if args.zero is None else "--zero")
    if args.load_case is not None and args.adjust is None:
        raise CaseError("--case picks the load case of --adjust; the tolerance study itself "
                        "uses no loads", source="command line", where="--case")
    tol = parse_tolerances(args.tolerance, st) if args.tolerance is not None else None
    units = display_units(args.units, st.units) or st.units
    sol = solve(st)
    sol.display_units = units
    study = (fitup_study(sol, tol, args.samples, args.distribution, args.seed)
             if tol is not None else None)
    adj = (adjustment(sol, args.adjust, args.zero, args.load_case)
           if args.adjust is not None else None)
    verdicts = None
    if study is not None and sol.states:
        from ..studies.one_way_check import one_way_verdicts

        verdicts = one_way_verdicts(sol, study)
    if args.output:
        _draw_fitup(sol, study, adj, args)
    adj_warnings = list(adj.warnings) if adj is not None else []
    for w in adj_warnings:  # an adjustment outside the small-displacement range
        print(f"leastwork: WARNING: {w}", file=sys.stderr)
    if args.json:
        out: dict = {"name": st.name}
        if study is not None:
            out.update(to_dict(study, units))
        if adj is not None:
            out["adjust"] = adjustment_to_dict(adj, units)
        if verdicts is not None:
            from ..studies.one_way_check import verdicts_to_dict

            out["one_way"] = verdicts_to_dict(verdicts, units)
        out["units"] = unit_texts(units)
        out["warnings"] = list(sol.warnings) + adj_warnings
        sys.stdout.write(json.dumps(out, indent=2) + "\n")
        return 0
    _header(console, sol)
    if study is not None:
        _print_study(console, study, units)
    if verdicts is not None:
        _print_verdicts(console, verdicts, units)
    if adj is not None:
        _print_adjustment(console, adj, units)
    return 0


def _draw_fitup(sol, study, adj, args) -> None:
    """The fit-up study (and adjustment) drawn to PNG or SVG."""
    import pathlib

    from ..io.writing import write_files

    out = pathlib.Path(args.output)
    if out.suffix.lower() not in (".png", ".svg"):
        raise CaseError(f'cannot draw to "{out}": name it .png or .svg',
                        source="command line", where="--output")
    import copy
    import dataclasses

    from ..output.plot.files import figure_bytes
    from ..output.plot.fitup import fitup_figure

    drawn = sol
    if sol.display_units is not None and sol.display_units != sol.structure.units:
        drawn = copy.copy(sol)  # drawn in the units asked for
        drawn.structure = dataclasses.replace(sol.structure, units=sol.display_units)
    data = figure_bytes(fitup_figure(drawn, study, adj), out.suffix.lower()[1:], "fitup")
    write_files({out: data}, force=args.force, case=sol.structure.source)
    print(f"leastwork: wrote {literal(out)}", file=sys.stderr)


def _header(console, sol) -> None:
    from ..output.terminal import heading, user_text

    st = sol.structure
    console.print(heading(st.name, st.source))
    console.print("Linear elastic, small displacements. Results must be checked by a "
                  "qualified engineer against the governing local codes before use.")
    for w in sol.warnings:
        console.print(user_text(f"Warning: {w}", "yellow"))


def _g(x: float) -> str:
    from ..output.sheet import fmt

    return fmt(x)


def _length(x_si: float, units) -> str:
    """A length error (SI) in the report displacement unit, signed."""
    from ..output.quantities import quantities
    from ..output.sheet import fmt

    x = quantities(units).to_output(x_si, "displacement")
    return ("+" if x > 0 else "") + fmt(x)


def _print_study(console, study, units) -> None:
    from rich.table import Table

    from ..output.quantities import quantities
    from ..output.terminal import user_text

    uq = quantities(units)
    rep = study.quantities
    tol = ", ".join(f"{m} ±{_g(uq.to_output(t, 'displacement'))}"
                    for m, t in study.tolerances.items())
    dist = ("uniform over ±t" if study.distribution == "uniform"
            else "normal, sigma = t/3")
    console.print(user_text(f"Fit-up study: forces locked in by length errors alone (no "
                            f"loads). Tolerances [{uq.displacement_unit}]: {tol}"))
    console.print(f"Monte Carlo: {study.samples} samples, {dist}, seed {study.seed}.")
    titles = {("members", "force"): "Axial forces", ("moments", "moment"): "Beam end moments",
              ("reactions", "force"): "Reactions", ("reactions", "moment"): "Reaction couples"}
    for (group, dim), title in titles.items():
        idx = [q for q in range(len(rep.names)) if rep.groups[q] == group and rep.dims[q] == dim]
        if not idx:
            continue
        u, f = uq.unit(dim), uq.factor(dim)
        t = Table(title=user_text(f"{title} [{u}]: exact worst case and Monte Carlo"),
                  header_style="bold")
        t.add_column("quantity", no_wrap=True)
        for head in ("worst ±", "mean", "std", "std exact", "p05", "p95"):
            t.add_column(user_text(f"{head} [{u}]"), justify="right", overflow="fold")
        for q in idx:
            t.add_row(user_text(rep.names[q]), *(_g(v[q] / f) for v in (
                study.worst.max, study.stats.mean, study.stats.std, study.std_exact,
                study.stats.p05, study.stats.p95)))
        console.print(t)
    axial = [q for q in range(len(rep.names)) if rep.groups[q] == "members"]
    if axial:
        q = max(axial, key=lambda k: study.worst.max[k])
        if study.worst.max[q] > 0:
            pat = ", ".join(f"{m} {_length(e, units)}" for m, e in zip(
                study.tolerances, study.worst.pattern_max[q], strict=True) if e != 0)
            console.print(user_text(
                f"Largest worst-case axial force: {rep.names[q]}, "
                f"{_g(uq.to_output(study.worst.max[q], 'force'))} {uq.force_unit}, with the "
                f"length errors [{uq.displacement_unit}] {pat} (the opposite signs give the "
                "minimum)."))


def _print_verdicts(console, verdicts, units) -> None:
    """Whether each one-way member and support keeps acting in each load case with the
    locked-in forces of the tolerances added."""
    from rich.table import Table

    from ..output.quantities import quantities
    from ..output.terminal import user_text

    uq = quantities(units)
    u = uq.force_unit
    t = Table(title=user_text(f"One-way members and supports: load case force plus the "
                              f"locked-in range [{u}]"), header_style="bold")
    for head in ("item", "load case", "force", "min", "max", "verdict"):
        t.add_column(user_text(head), justify="right" if head in ("force", "min", "max")
                     else "left", overflow="fold")
    for v in verdicts:
        t.add_row(user_text(v.item), user_text(v.case),
                  *("—" if x is None else _g(uq.to_output(x, "force"))
                    for x in (v.force, v.low, v.high)),
                  user_text(v.verdict))
    console.print(t)


def _print_adjustment(console, adj, units) -> None:
    from rich.table import Table

    from ..output.quantities import quantities
    from ..output.terminal import user_text

    uq = quantities(units)
    Ff, Lf = uq.factor("force"), uq.factor("displacement")
    fu, lu = uq.force_unit, uq.displacement_unit
    how = "longer" if adj.change > 0 else "shorter"
    from rich.text import Text

    console.print(Text.assemble(
        literal(f"Load case {adj.case}: the axial force in {adj.target} is "
                f"{_g(adj.force_before / Ff)} {fu} and changes by "
                f"{_g(adj.rate * Lf / Ff)} {fu} per {lu} of length change "
                f"of {adj.member}. Make {adj.member} "),
        (literal(f"{_g(abs(adj.change) / Lf)} {lu} {how}"), "bold"),
        literal(f" (misfit {_length(adj.change, units)} {lu}) to make it zero.")))
    for w in adj.warnings:
        console.print(Text(f"WARNING: {w}", style="bold red"))
    t = Table(title=user_text(f"Axial forces [{fu}], load case {adj.case}"),
              header_style="bold")
    for head in ("member", f"before [{fu}]", f"after [{fu}]"):
        t.add_column(user_text(head), justify="left" if head == "member" else "right")
    top = max([abs(v) for v in (*adj.before.values(), *adj.after.values())] + [0.0])
    for m in adj.before:
        after = adj.after[m] if abs(adj.after[m]) > 1e-12 * top else 0.0
        t.add_row(user_text(m), _g(adj.before[m] / Ff), _g(after / Ff))
    console.print(t)


# ------------------------------------------------------------------------ influence
def _draw_influence(d: dict, args, st) -> None:
    """The influence line with a sketch of the structure above it, to PNG or SVG."""
    import pathlib

    from ..io.writing import write_files

    out = pathlib.Path(args.output)
    if out.suffix.lower() not in (".png", ".svg"):
        raise CaseError(f'cannot draw to "{out}": name it .png or .svg',
                        source="command line", where="--output")
    from ..output.plot.files import figure_bytes
    from ..output.plot.influence import influence_figure

    data = figure_bytes(influence_figure(st, d), out.suffix.lower()[1:],
                        f"influence-{d['quantity']}")
    write_files({out: data}, force=args.force, case=st.source)
    print(f"leastwork: wrote {literal(out)}", file=sys.stderr)


def _influence(args, st, console) -> int:
    import numpy as np

    from ..solve import solve
    from ..studies.influence import influence_line, influence_to_dict, parse_members, parse_quantity
    from ..topology import sparse_topology

    topo = sparse_topology(st)  # names and columns only: no rank decisions needed
    q = parse_quantity(st, topo, args.quantity)  # refuse bad input before solving
    parse_members(st, args.along)
    units = display_units(args.units, st.units) or st.units
    sol = solve(st)
    sol.display_units = units
    if sol.states:
        sol.warnings = (*sol.warnings, "the influence line takes every one-way member and "
                        "support as acting (a linear response); where one may go slack or "
                        "lift off, solve the governing load positions as load cases")
    line = influence_line(sol, q, args.along, args.points, units)
    d = influence_to_dict(line, units, st.name)
    if args.output:
        _draw_influence(d, args, st)
    if args.json:
        d["warnings"] = list(sol.warnings)
        sys.stdout.write(json.dumps(d, indent=2) + "\n")
        return 0
    from rich.table import Table

    _header(console, sol)
    u = d["units"]
    along = ", ".join(dict.fromkeys(p["member"] for p in d["points"]))
    from rich.text import Text

    from ..output.terminal import user_text

    console.print(Text.assemble(
        "Influence line of ", (literal(d["quantity"]), "bold"),
        literal(f" for a load of {u['load']} moving along {along} ({args.points} intervals "
                "per member).")))
    t = Table(header_style="bold")
    t.add_column("member")
    t.add_column(user_text(f"at [{u['length']}]"), justify="right")
    t.add_column(user_text(f"value [{u['value']}]"), justify="right")
    sides = any("side" in p for p in d["points"])
    if sides:
        t.add_column("load")
    for p in d["points"]:
        row = [user_text(p["member"]), _g(p["at"]), _g(p["value"])]
        if sides:
            row.append({"start": "just before the section", "end": "just after the section"}
                       .get(p.get("side", ""), ""))
        t.add_row(*row)
    console.print(t)
    vals = np.array([p["value"] for p in d["points"]])
    for label, k in (("largest", int(np.argmax(vals))), ("smallest", int(np.argmin(vals)))):
        p = d["points"][k]
        console.print(user_text(f"{label.capitalize()} ordinate: {_g(p['value'])} "
                                f"{u['value']} with the load on {p['member']} at "
                                f"{_g(p['at'])} {u['length']}."))
    return 0
