"""``leastwork new`` and ``leastwork demo``: starter cases to begin from, and a short tour.

``new KIND`` prints a commented starter case (:mod:`leastwork.io.starters`); ``new --list``
lists the kinds. ``demo`` solves the ``tied-beam`` starter (a canopy cantilever held up by a
tie rod with a turnbuckle) and shows, in a few screens, the summary of one load case with its
equilibrium check and direct-stiffness cross-check, a glimpse of the audit trail
(flexibility, load terms and the compatibility equation), the forces locked in by tightening
the turnbuckle (a misfit) and their superposition with the loads, and the commands to try
next. Everything is computed on the spot; nothing is written to disk.
"""

from __future__ import annotations

import dataclasses
import sys
from typing import TYPE_CHECKING

from ..errors import CaseError

if TYPE_CHECKING:
    from rich.console import Console
    from rich.table import Table

__all__ = ["DEMO_KIND", "NEXT_COMMANDS", "add_parsers", "run_demo", "run_demo_command",
           "run_new"]


def add_parsers(sub) -> None:
    """Add the ``new`` and ``demo`` subcommands to ``sub``."""
    n = sub.add_parser("new", help="print a commented starter case to standard output",
                       description="Print a commented starter case; redirect it to a file "
                                   "and edit it: leastwork new portal-frame > shed.toml")
    n.add_argument("kind", nargs="?", help="kind of structure (see --list)")
    n.add_argument("--list", action="store_true", help="list the kinds, one per line")
    d = sub.add_parser("demo", help="solve a bundled example and show what the tool can do",
                       description="Solve a bundled example (an invented tied beam) and show "
                                   "the summary, a step of the audit trail and what else the "
                                   "tool can do.")
    d.add_argument("--no-color", action="store_true", help="plain text, no colours")


def run_new(args) -> int:
    """``leastwork new KIND`` (the starter's text) or ``new --list`` (the kinds)."""
    from ..io.starters import starter_kinds, starter_text

    if args.list:
        print("\n".join(starter_kinds()))
        return 0
    if not args.kind:
        raise CaseError("name a kind of structure, or --list to see them: "
                        + ", ".join(starter_kinds()), source="command line", where="new")
    sys.stdout.write(starter_text(args.kind))
    return 0


def run_demo_command(args) -> int:
    """``leastwork demo`` on the terminal (plain with ``--no-color``)."""
    from .common import console_for

    return run_demo(console_for(args))


#: The starter the demo solves.
DEMO_KIND = "tied-beam"

#: The commands suggested at the end of the demo, with what each does.
NEXT_COMMANDS: tuple[tuple[str, str], ...] = (
    ("leastwork new --list", "the kinds of starter case"),
    (f"leastwork new {DEMO_KIND} > canopy.toml", "this demo's case, commented, to edit"),
    ("leastwork check canopy.toml", "degree of indeterminacy, stability, redundants"),
    ("leastwork solve canopy.toml", "the summary of every load case"),
    ("leastwork solve canopy.toml --steps", "the whole audit trail, in eight steps"),
    ("leastwork solve canopy.toml --case turnbuckle", "one load case only"),
    ("leastwork solve canopy.toml --redundants A.rz", "another redundant, the same answer"),
    ("leastwork solve canopy.toml --json", "the JSON result, for other programs"),
    ("leastwork solve canopy.toml --format md -o calc.md", "a calculation sheet (Markdown)"),
)

#: Steps of the audit trail shown as a glimpse (numbers of :func:`leastwork.output.audit.audit_sheet`).
_GLIMPSE_STEPS = (4, 5)


def _structure_note(text: str) -> str:
    """The "Structure" paragraph of a starter's opening comment, as plain text."""
    out: list[str] = []
    for line in text.splitlines():
        if not line.startswith("#"):
            break
        body = line[1:].strip()
        head, sep, rest = body.partition(":")
        heading = bool(sep) and head.strip() != "" and " " not in head.strip()
        if heading and head.strip() == "Structure":
            out.append(rest.strip())
        elif out and (heading or not body):
            break
        elif out:
            out.append(body)
    return " ".join(out)


def _rod_force(numbers) -> float:
    """The tie rod's force (the redundant CB) of one load case, in the case units."""
    return float(numbers.redundants["CB"])


def _effects_table(sol, numbers: dict) -> Table:
    """Tie force, wall moment and tip deflection per load case (case units), from the
    reported numbers of each case (:func:`leastwork.output.reported.case_numbers`)."""
    from rich.table import Table

    from ..output.quantities import quantities
    from ..output.sheet import fmt
    from ..output.terminal import user_text

    q = quantities(sol.units)
    t = Table(title="What each load case does", header_style="bold")
    t.add_column("load case")
    # headers as Text: "[kN]" would otherwise be read as rich markup and vanish
    t.add_column(user_text(f"tie rod force, tension + [{q.force_unit}]"), justify="right")
    t.add_column(user_text(f"m at the wall A, sagging + [{q.moment_unit}]"), justify="right")
    t.add_column(user_text(f"tip B.y, up + [{q.displacement_unit}]"), justify="right")
    for c, n in numbers.items():
        t.add_row(user_text(c), fmt(_rod_force(n)),
                  fmt(float(n.members['AB']['start']['m'])),
                  fmt(float(n.displacements['B.y']), 3))
    return t


def run_demo(console: Console) -> int:
    """Show what leastwork does on the ``tied-beam`` starter; returns exit status 0."""
    from rich.markup import escape
    from rich.panel import Panel
    from rich.table import Table
    from rich.text import Text

    from ..io.reader import loads_case
    from ..io.starters import STARTERS, starter_text
    from ..output.audit import audit_sheet
    from ..output.reported import case_numbers
    from ..output.terminal import print_sheet, print_summary, rule, user_text
    from ..solve import solve

    text = starter_text(DEMO_KIND)
    st = loads_case(text, source=f"starter {DEMO_KIND}")
    sol = solve(st)
    cases = list(sol.cases)
    numbers = {c: case_numbers(sol, c) for c in cases}  # in the case units
    first = cases[0]

    rule(console, "leastwork demo — 1/4: the structure and its summary")
    console.print(Panel(
        escape(f"{STARTERS[DEMO_KIND][0][0].upper()}{STARTERS[DEMO_KIND][0][1:]}: ")
        + escape(_structure_note(text)) + "\n\n"
        "leastwork finds the degree of indeterminacy from the rank of the equilibrium "
        "matrix, releases the redundants, writes the least-work equations ∂U/∂Xi = Δi "
        "from the bending, axial and spring energy, solves them, checks equilibrium and "
        "solves the case again by the direct stiffness method as a cross-check.",
        title=f"Starter \"{DEMO_KIND}\""))
    print_summary(console, sol, [first])

    rule(console, "2/4: a glimpse of the audit trail (--steps shows all eight steps)")
    sheet = audit_sheet(sol, cases[:2])
    glimpse = dataclasses.replace(
        sheet, assumptions=(), cautions=(),
        steps=tuple(s for s in sheet.steps if s.number in _GLIMPSE_STEPS))
    print_sheet(console, glimpse)

    rule(console, "3/4: a misfit locks in forces")
    console.print(
        "Tightening the turnbuckle shortens the rod by 3 mm (a misfit of -3 mm). The "
        "structure is indeterminate, so the rod cannot simply take up its new length: "
        "beam and rod are forced together and carry forces with no load at all.")
    console.print(_effects_table(sol, numbers))
    if {"canopy", "turnbuckle", "both"} <= set(cases):
        a, b, ab = (_rod_force(numbers[c]) for c in ("canopy", "turnbuckle", "both"))
        console.print(user_text(
            f"Linear elastic, so effects add up: {a:.5g} + {b:.5g} = {a + b:.5g} "
            f"{sol.units.force}, the rod force of case \"both\" ({ab:.5g})."))
    for c in cases:
        res = sol.cases[c]
        eq = "OK" if res.equilibrium_ok else "FAILED"
        cross = ("not run" if res.stiffness is None else
                 "agrees" if res.stiffness.ok else "DISAGREES")
        console.print(user_text(f"Load case {c}: equilibrium check {eq}; direct-stiffness "
                                f"cross-check {cross}."))

    rule(console, "4/4: what to try next")
    widest = max(len(cmd) for cmd, _ in NEXT_COMMANDS)
    if console.width >= widest + 32:
        t = Table(show_header=False, box=None, pad_edge=False)
        t.add_column("command", style="bold", no_wrap=True)
        t.add_column("does")
        for cmd, what in NEXT_COMMANDS:
            t.add_row(escape(cmd), escape(what))
        console.print(t)
    else:  # narrow: each command on its line, what it does indented below
        for cmd, what in NEXT_COMMANDS:
            console.print(Text(cmd, style="bold"), overflow="fold")
            console.print(Text("    " + what))
    console.print("Other starters: " + ", ".join(STARTERS) + ". The tutorial is docs/guide.md,"
                  " the method docs/method.md.")
    console.print(Panel("Results come from an idealised model and must be checked by a "
                        "qualified engineer against the governing codes before use.",
                        title="Caution", style="yellow"))
    return 0
