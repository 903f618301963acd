"""Terminal summary and audit trail (rich)."""

from __future__ import annotations

from rich.console import Console
from rich.markup import escape
from rich.panel import Panel
from rich.table import Table

from ..audit import ASSUMPTIONS, CAUTION, energy_terms
from ..sheet import Formula, Grid, Para, Sheet, fmt, split_grid
from .jsonout import quantity_factors

__all__ = ["print_summary", "print_brief", "print_check", "print_steps", "print_sheet", "CAUTION", "ASSUMPTIONS",
           "energy_terms"]

def _g(x: float, sig: int = 5) -> str:
    """Summary numbers: ``sig`` significant figures (:func:`leastwork.sheet.fmt`)."""
    return fmt(x, sig)


def print_check(console: Console, st, topo, red_cols) -> None:
    console.print(f"[bold]{st.name}[/bold]  ({st.source})")
    _indeterminacy(console, topo)
    if topo.stable:
        names = ", ".join(topo.columns[j].name for j in red_cols) or "none (statically determinate)"
        console.print(f"Suggested redundants: [bold]{names}[/bold]")
        console.print("The released structure left by this choice is statically determinate and "
                      "stable.")


def _indeterminacy(console: Console, topo) -> None:
    t = Table(title="Indeterminacy", show_header=True, header_style="bold")
    t.add_column("degree (rank)", justify="right")
    t.add_column("external", justify="right")
    t.add_column("internal", justify="right")
    t.add_column("stable")
    t.add_row(str(topo.degree), str(topo.external), str(topo.internal),
              "yes" if topo.stable else "[red]NO — mechanism[/red]")
    console.print(t)
    console.print(f"Counting formula: {topo.counting['formula']}")
    console.print(f"Member graph: {topo.parts} connected part(s), {topo.loops} closed loop(s) "
                  "of members.")
    if topo.counting["value"] != topo.degree and topo.stable:
        console.print("[yellow]The counting formula and the rank disagree: the rank result "
                      "governs (some members are arranged so that they cannot all act).[/yellow]")
    for name in topo.dropped:
        console.print(f"Note: restraint {name} is ignored: every member end at that node is "
                      "hinged, so it can carry no moment.")


def print_summary(console: Console, sol, case_names=None) -> None:
    st, topo = sol.structure, sol.topology
    Ff, _, Mf = quantity_factors(sol.units)
    fu, mu, lu = sol.units.force, f"{sol.units.force}*{sol.units.length}", sol.units.length
    console.print(f"[bold]{st.name}[/bold]  ({st.source})")
    console.print(f"Assumptions: {ASSUMPTIONS}")
    console.print(energy_terms(st))
    _indeterminacy(console, topo)
    how = "chosen by the user" if sol.chosen_by_user else "chosen automatically"
    console.print(f"Redundants ({how}): [bold]{', '.join(sol.redundant_names) or 'none'}[/bold]")
    if sol.redundant_names:
        console.print(f"Flexibility matrix: condition number {_g(sol.condition, 3)} "
                      "(after scaling its diagonal to one).")
    for w in sol.warnings:
        console.print(f"[yellow]Warning: {w}[/yellow]")
    sol_json = sol.to_dict()  # reactions as the JSON gives them (round-off shown as zero)
    for name in case_names or list(sol.cases):
        res = sol.cases[name]
        console.rule(f"Load case: {name}")
        if not res.equilibrium_ok:
            console.print(Panel(
                f"EQUILIBRIUM CHECK FAILED: residual {_g(res.equilibrium_residual / Ff)} {fu}. "
                "The numbers below do not satisfy equilibrium and must not be used.",
                style="bold red"))
        if len(res.redundants):
            t = Table(title="Redundants", header_style="bold")
            t.add_column("redundant")
            t.add_column("value", justify="right")
            t.add_column("unit")
            for j, x in zip(sol.redundant_columns, res.redundants, strict=True):
                col = topo.columns[j]
                mom = col.is_moment
                t.add_row(col.name, _g(x / (Mf if mom else Ff)), mu if mom else fu)
            console.print(t)
        t = Table(title="Reactions (force the support applies to the structure)",
                  header_style="bold")
        t.add_column("support")
        t.add_column(escape(f"x [{fu}]"), justify="right")
        t.add_column(escape(f"y [{fu}]"), justify="right")
        t.add_column(escape(f"rz [{mu}]"), justify="right")
        t.add_column(escape(f"normal n [{fu}]"), justify="right")
        for node, comps in sol_json["cases"][name]["reactions"].items():
            t.add_row(node, *[_g(comps[d]) if d in comps else "—"
                              for d in ("x", "y", "rz", "n")])
        console.print(t)
        t = Table(title="Member end forces (section forces: n tension +, m sagging +, v = dm/dx)",
                  header_style="bold")
        t.add_column("member")
        for h in (f"n start [{fu}]", f"v start [{fu}]", f"m start [{mu}]", f"n end [{fu}]",
                  f"v end [{fu}]", f"m end [{mu}]"):
            t.add_column(escape(h), justify="right")
        for mid, mj in sol_json["cases"][name]["members"].items():
            t.add_row(mid, *[_g(mj[e][q]) for e in ("start", "end") for q in "nvm"])
        console.print(t)
        beams = [mid for mid in res.members if st.members[mid].is_beam]
        if beams:
            t = Table(title="Bending moment extremes and largest deflection along beams",
                      header_style="bold")
            t.add_column("beam")
            t.add_column(escape(f"m max [{mu}]"), justify="right")
            t.add_column(escape(f"at [{lu}]"), justify="right")
            t.add_column(escape(f"m min [{mu}]"), justify="right")
            t.add_column(escape(f"at [{lu}]"), justify="right")
            t.add_column(escape(f"deflection [{lu}]"), justify="right")
            t.add_column(escape(f"at [{lu}]"), justify="right")
            for mid in beams:  # as the JSON gives them (deflection found once)
                mj = sol_json["cases"][name]["members"][mid]
                t.add_row(mid, _g(mj["m_max"]["value"]), _g(mj["m_max"]["at"]),
                          _g(mj["m_min"]["value"]), _g(mj["m_min"]["at"]),
                          _g(mj["deflection_max"]["value"], 4),
                          _g(mj["deflection_max"]["at"], 4))
            console.print(t)
        if res.displacements:
            t = Table(title="Displacements (global; rotations counter-clockwise +)",
                      header_style="bold")
            t.add_column("where")
            t.add_column("value", justify="right")
            t.add_column("unit")
            for k, v in sol_json["cases"][name]["displacements"].items():
                t.add_row(k, _g(v), "rad" if k.endswith(".rz") else lu)
            console.print(t)
        status = "[green]OK[/green]" if res.equilibrium_ok else "[bold red]FAILED[/bold red]"
        console.print(f"Equilibrium check: largest residual {_g(res.equilibrium_residual / Ff, 2)}"
                      f" {fu} — {status}")
        _print_cross_check(console, res)
    from ..audit import envelope_grids

    for grid in envelope_grids(sol, sol_json):
        for part in split_grid(grid, console.width):
            console.print(_rich_table(part))
    console.print(Panel(CAUTION, title="Caution", style="yellow"))


def print_brief(console: Console, sol, case_names=None) -> None:
    """One line per redundant and load case, the checks, and every warning (``--quiet``)."""
    Ff, _, Mf = quantity_factors(sol.units)
    u = sol.units
    for w in sol.warnings:
        console.print(f"[yellow]Warning: {escape(w)}[/yellow]")
    for name in case_names or list(sol.cases):
        res = sol.cases[name]
        for j, x in zip(sol.redundant_columns, res.redundants, strict=True):
            col = sol.topology.columns[j]
            mom = col.is_moment
            console.print(f"{name}  {col.name} = {_g(x / (Mf if mom else Ff))} "
                          f"{u.moment if mom else u.force}", highlight=False)
        eq = "OK" if res.equilibrium_ok else "[bold red]FAILED[/bold red]"
        c = res.stiffness
        cc = ("not run" if c is None else "agrees" if c.ok else "[bold red]FAILED[/bold red]")
        console.print(f"{name}  equilibrium {eq}, cross-check {cc}")


def _print_cross_check(console: Console, res) -> None:
    c = res.stiffness
    if c is None:
        console.print("Cross-check by the direct stiffness method: not run.")
    elif c.ok:
        console.print(f"Cross-check by the direct stiffness method: largest difference "
                      f"{_g(c.difference, 2)} of the largest force — [green]agrees[/green]")
    else:
        text = (f"CROSS-CHECK FAILED: the direct stiffness method gives no answer ({c.failure})"
                if c.difference is None else
                f"CROSS-CHECK FAILED: the direct stiffness method differs by "
                f"{_g(c.difference, 2)} of the largest force (at {c.where}). Do not use these "
                "numbers before the cause is found.")
        console.print(Panel(escape(text), style="bold red"))


def print_steps(console: Console, sol, case_names=None) -> None:
    """The audit trail: every step of the force method, numbered (see :mod:`leastwork.audit`)."""
    from ..audit import audit_sheet

    print_sheet(console, audit_sheet(sol, case_names))


_TONE = {"plain": "", "note": "dim", "warning": "yellow", "alarm": "bold red"}


def print_sheet(console: Console, sheet: Sheet) -> None:
    """A calculation sheet on the terminal; wide tables are split to the console width."""
    console.print(f"[bold]{escape(sheet.title)}[/bold]  ({escape(sheet.source)})")
    for text in sheet.assumptions:
        console.print(escape(text))
    for step in sheet.steps:
        console.rule(f"Step {step.number} — {escape(step.title)}")
        for block in step.blocks:
            if isinstance(block, Para):
                if block.tone == "alarm":
                    console.print(Panel(escape(block.text), style="bold red"))
                else:
                    text = ("Warning: " if block.tone == "warning" else "") + block.text
                    console.print(escape(text), style=_TONE[block.tone] or None)
            elif isinstance(block, Formula):
                console.print("  " + escape(block.text), highlight=False)
            else:
                for part in split_grid(block, console.width):
                    console.print(_rich_table(part))
    for text in sheet.cautions:
        console.print(Panel(escape(text), title="Caution", style="yellow"))


def _rich_table(grid: Grid) -> Table:
    t = Table(title=escape(grid.title), header_style="bold", show_footer=False)
    for k, h in enumerate(grid.headers):
        text = all(isinstance(r[k], str) for r in grid.rows)
        t.add_column(escape(h), justify="left" if k < grid.keys or text else "right")
    for row in grid.rows:
        t.add_row(*[escape(fmt(c)) for c in row])
    if grid.total:
        t.add_row(*[escape(fmt(c)) for c in grid.total], style="bold", end_section=False)
    return t
