"""Terminal summary and audit trail (rich).

User text (the structure name and file, load-case and combination names, ids, warnings that
quote them) never reaches rich as markup: it goes in as :class:`rich.text.Text` made by
:func:`user_text` or :func:`heading` (or ``Text.assemble`` of :func:`literal` pieces), after
:func:`leastwork.plaintext.literal` (control characters escaped, one line). Text is neither
markup nor emoji codes, so "[red]", "[/]", "[link=...]", ":smile:" or an escape sequence in
a name print as written, whatever console is given.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from rich.console import Console
from rich.panel import Panel
from rich.table import Table
from rich.text import Text

from ..plaintext import literal
from .audit import ASSUMPTIONS, CAUTION, energy_terms
from .conventions import AXIAL_SIGN, MOMENT_SIGN_SHORT, SECTION_FORCES
from .quantities import quantities
from .reported import ROUND_OFF, case_numbers, redundants_shown
from .sheet import Formula, Grid, Para, Sheet, fmt
from .term_tables import print_cells, print_grid

__all__ = ["print_summary", "print_brief", "print_check", "print_steps", "print_sheet", "CAUTION",
           "ASSUMPTIONS", "energy_terms", "is_large", "print_short_summary", "governing_values", "Governing",
           "SUMMARY_MAX_MEMBERS", "SUMMARY_MAX_REDUNDANTS", "NAMES_SHOWN", "user_text",
           "heading"]

#: A structure with more members than this, or more redundants than
#: ``SUMMARY_MAX_REDUNDANTS``, gets the short summary (counts and governing values, not a
#: table row per member, reaction and redundant); ``--json`` and ``--steps`` give everything.
SUMMARY_MAX_MEMBERS = 40
SUMMARY_MAX_REDUNDANTS = 30
#: How many names a long list (redundants, warnings, dropped restraints) shows before
#: "and N more".
NAMES_SHOWN = 10


def user_text(text: object, style: str = "", limit: int | None = None) -> Text:
    """``text`` (from the case file or the command line) as a rich Text shown literally:
    no markup, no emoji codes, control characters escaped (:func:`leastwork.plaintext.literal`)."""
    return Text(literal(text, limit), style=style)


def heading(name: object, source: object, tail: str = "") -> Text:
    """The first line of every report: the structure name in bold, the case file in
    brackets, then ``tail`` (plain text)."""
    return Text.assemble((literal(name), "bold"), f"  ({literal(source)})", tail)


def rule(console: Console, title: str) -> None:
    """A section rule with ``title`` on it when it fits the width; otherwise a plain rule
    and the title below it in bold, wrapped between words (never cut with an ellipsis)."""
    if len(literal(title)) + 6 <= console.width:
        console.rule(user_text(title))
    else:
        console.rule()
        console.print(user_text(title, "bold"))


def _g(x: float, sig: int | None = None) -> str:
    """Summary numbers as the sheets write them (:func:`leastwork.output.sheet.fmt`)."""
    return fmt(x, sig)


def is_large(sol) -> bool:
    """True when ``sol`` gets the short summary (see ``SUMMARY_MAX_MEMBERS``)."""
    return (len(sol.structure.members) > SUMMARY_MAX_MEMBERS
            or len(sol.redundant_columns) > SUMMARY_MAX_REDUNDANTS)


def _name_list(names: list[str], limit: int = SUMMARY_MAX_REDUNDANTS) -> str:
    """All names, comma-separated, up to ``limit``; above it the first ``NAMES_SHOWN`` and
    how many more."""
    if len(names) <= limit:
        return ", ".join(names)
    return ", ".join(names[:NAMES_SHOWN]) + f" ... and {len(names) - NAMES_SHOWN} more"


def print_check(console: Console, st, topo, red_cols, *, basis: str = "released") -> None:
    """``leastwork check``: indeterminacy, stability and the redundants a solve would take.

    ``basis`` "local": ``red_cols`` are the columns whose cuts the local self-stress states
    close (:mod:`leastwork.sparse_solve`). Long lists show their first names and a count.
    """
    console.print(heading(st.name, st.source))
    many = len(red_cols) > SUMMARY_MAX_REDUNDANTS or len(st.members) > SUMMARY_MAX_MEMBERS
    _indeterminacy(console, topo, limit=NAMES_SHOWN if many else None)
    if not topo.stable:
        return
    names = [topo.columns[j].name for j in red_cols]
    if basis == "local":
        plural = "s" if len(names) != 1 else ""
        console.print(Text.assemble(
            f"Suggested redundants: {len(names)} local self-stress state{plural}, each "
            "closing the cut of one member force or reaction: ",
            (literal(_name_list(names) or "none"), "bold")))
        console.print("The released structure left by these cuts is statically determinate and "
                      "stable.")
        return
    text = _name_list(names) or "none (statically determinate)"
    if len(names) > SUMMARY_MAX_REDUNDANTS:
        text = f"{len(names)}: {text}"
    console.print(Text.assemble("Suggested redundants: ", (literal(text), "bold")))
    console.print("The released structure left by this choice is statically determinate and "
                  "stable.")


def _indeterminacy(console: Console, topo, limit: int | None = None) -> None:
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
    dropped = list(topo.dropped)
    if limit is not None and len(dropped) > limit:
        console.print(user_text(f"Note: {len(dropped)} restraints are ignored ("
                                f"{_name_list(dropped, limit)}): every member end at those "
                                "nodes is hinged, so they can carry no moment."))
        dropped = []
    for name in dropped:
        console.print(user_text(f"Note: restraint {name} is ignored: every member end at "
                                "that node is hinged, so it can carry no moment."))


def print_summary(console: Console, sol, case_names=None) -> None:
    """The results on the terminal: every redundant, reaction and member end (a short
    summary of governing values instead for a large structure, see :func:`is_large`)."""
    if is_large(sol):
        print_short_summary(console, sol, case_names)
        return
    _print_setup(console, sol)
    for name in case_names or list(sol.cases):
        _print_load_case(console, sol, name)
    from .audit import envelope_grids

    for grid in envelope_grids(sol):
        print_grid(console, grid)
    console.print(Panel(CAUTION, title="Caution", style="yellow"))


def _print_setup(console: Console, sol) -> None:
    """What the analysis rests on: the structure, the assumptions and energy terms, the
    indeterminacy, the redundants with the conditioning of their flexibility matrix, and
    every warning."""
    st, topo = sol.structure, sol.topology
    console.print(heading(st.name, st.source))
    console.print(f"Assumptions: {ASSUMPTIONS}")
    console.print(user_text(energy_terms(st)))
    _indeterminacy(console, topo)
    how = "chosen by the user" if sol.chosen_by_user else "chosen automatically"
    console.print(Text.assemble(f"Redundants ({how}): ",
                                (literal(", ".join(sol.redundant_names) or "none"), "bold")))
    if sol.redundant_names:
        console.print(f"Flexibility matrix: condition number {_g(sol.condition, 3)} "
                      "(after scaling its diagonal to one).")
    for w in sol.warnings:
        console.print(user_text(f"Warning: {w}", "yellow"))


def _print_load_case(console: Console, sol, name: str) -> None:
    """Every table of one load case (redundants, reactions, member end forces, beam
    extremes, displacements asked for) and its checks."""
    res = sol.cases[name]
    numbers = case_numbers(sol, name)  # as the JSON gives them (round-off shown as zero)
    Ff, fu = quantities(sol.units).factor("force"), sol.units.force
    rule(console, f"Load case: {name}")
    _equilibrium_alarm(console, res, Ff, fu)
    _print_state(console, sol, name)
    for table in (_redundants_table(sol, res), _reactions_table(sol, numbers),
                  _member_end_table(sol, numbers), _beam_extremes_table(sol, res, numbers),
                  _stress_table(sol, numbers), _displacements_table(sol, res, numbers)):
        if table is not None:
            print_fitted(console, table)
    _print_checks(console, res, Ff, fu)


def _cell_width(cell) -> int:
    return len(cell.plain) if isinstance(cell, Text) else len(str(cell))


def print_fitted(console: Console, table: Table) -> None:
    """Print ``table`` whole when it fits the console; otherwise with its headers and text
    wrapped, turned or stacked (:mod:`leastwork.output.term_tables`), so that no number
    is ever cut short and the table stays one table."""
    cols = table.columns
    headers = [c.header.plain if isinstance(c.header, Text) else str(c.header) for c in cols]
    rows = [[c._cells[r] for c in cols] for r in range(table.row_count)]
    title = table.title.plain if isinstance(table.title, Text) else str(table.title or "")
    caption = table.caption.plain if isinstance(table.caption, Text) else str(
        table.caption or "")
    print_cells(console, title, headers, rows, keys=1,
                right=[c.justify == "right" for c in cols], caption=caption)


def _redundants_table(sol, res) -> Table | None:
    """The redundants of one load case in the output units (None when there are none)."""
    if not len(res.redundants):
        return None
    q = quantities(sol.units)
    t = Table(title="Redundants", header_style="bold")
    t.add_column("redundant")
    t.add_column("value", justify="right")
    t.add_column("unit")
    values = redundants_shown(sol, res.name)  # round-off as 0
    for j in sol.redundant_columns:
        col = sol.topology.columns[j]
        t.add_row(user_text(col.name), _g(values[col.name]), user_text(q.column_unit(col)))
    return t


def _reactions_table(sol, numbers) -> Table:
    """The support reactions, component by component."""
    q = quantities(sol.units)
    fu, mu = q.force_unit, q.moment_unit
    t = Table(title="Reactions (force the support applies to the structure)",
              header_style="bold")
    t.add_column("support")
    t.add_column(user_text(f"x [{fu}]"), justify="right")
    t.add_column(user_text(f"y [{fu}]"), justify="right")
    t.add_column(user_text(f"rz [{mu}]"), justify="right")
    t.add_column(user_text(f"normal n [{fu}]"), justify="right")
    for node, comps in numbers.reactions.items():
        t.add_row(user_text(node), *[_g(comps[d]) if d in comps else "—"
                                     for d in ("x", "y", "rz", "n")])
    return t


def _member_end_table(sol, numbers) -> Table:
    """The section forces n, v, m at both ends of every member; a truss (bars only) gets
    its bar forces n with T (tension) or C (compression), v and m being zero."""
    from .audit.results import tension_word

    q = quantities(sol.units)
    fu, mu = q.force_unit, q.moment_unit
    if not any(sol.structure.members[mid].is_beam for mid in numbers.members):
        t = Table(title=f"Bar forces ({AXIAL_SIGN}; T tension, C compression; pin-ended "
                  "bars carry no shear or moment)", header_style="bold")
        t.add_column("bar")
        t.add_column(user_text(f"n [{fu}]"), justify="right")
        t.add_column("T/C")
        for mid, mj in numbers.members.items():
            t.add_row(user_text(mid), _g(mj["start"]["n"]), tension_word(mj["start"]["n"]))
        return t
    t = Table(title=f"Member end forces (section forces: {SECTION_FORCES})",
              header_style="bold")
    t.add_column("member")
    for h in (f"n start [{fu}]", f"v start [{fu}]", f"m start [{mu}]", f"n end [{fu}]",
              f"v end [{fu}]", f"m end [{mu}]"):
        t.add_column(user_text(h), justify="right")
    for mid, mj in numbers.members.items():
        t.add_row(user_text(mid), *[_g(mj[e][c]) for e in ("start", "end") for c in "nvm"])
    return t


def _beam_extremes_table(sol, res, numbers) -> Table | None:
    """Largest and smallest bending moment and the deflection a limit is compared with
    along each beam, with where they occur, and the limit and ratio when the case gives
    deflection limits (None when there are no beams)."""
    beams = [mid for mid in res.members if sol.structure.members[mid].is_beam]
    if not beams:
        return None
    q = quantities(sol.units)
    mu, lu, du = q.moment_unit, q.length_unit, q.displacement_unit
    limits = any(n is not None for n in sol.structure.deflection_limits)
    t = Table(title="Bending moment extremes and deflections along beams (deflection: from "
              "the chord between the beam's displaced ends; a cantilever's from the tangent "
              "at its root)", header_style="bold")
    t.add_column("beam")
    t.add_column(user_text(f"m max [{mu}]"), justify="right")
    t.add_column(user_text(f"at [{lu}]"), justify="right")
    t.add_column(user_text(f"m min [{mu}]"), justify="right")
    t.add_column(user_text(f"at [{lu}]"), justify="right")
    t.add_column(user_text(f"deflection [{du}]"), justify="right")
    t.add_column(user_text(f"at [{lu}]"), justify="right")
    if limits:
        t.add_column(user_text(f"limit L/N [{du}]"), justify="right")
        t.add_column("ratio", justify="right")
    for mid in beams:  # as the JSON gives them (deflection found once)
        mj = numbers.members[mid]
        d = mj["deflection"]
        row = [user_text(mid), _g(mj["m_max"]["value"]), _g(mj["m_max"]["at"]),
               _g(mj["m_min"]["value"]), _g(mj["m_min"]["at"]), _g(d["value"]),
               _g(d["at"])]
        if limits:
            over = d["ratio"] is not None and d["ratio"] > 1.0
            row += ["—" if d["limit"] is None else _g(d["limit"]),
                    "—" if d["ratio"] is None else Text(
                        _g(d["ratio"], 3) + (" OVER" if over else ""),
                        style="bold red" if over else "")]
        t.add_row(*row)
    return t


def _stress_table(sol, numbers) -> Table | None:
    """Extreme-fibre stresses of the members with an area (and a section modulus, beams)."""
    rows = [(mid, mj["stress"]) for mid, mj in numbers.members.items() if "stress" in mj]
    if not rows:
        return None
    q = quantities(sol.units)
    su, lu = q.unit("stress"), q.length_unit
    t = Table(title="Extreme-fibre stresses (N/A ± M/S, tension +; largest and smallest "
              "along the member)", header_style="bold")
    t.add_column("member")
    for head in (f"max [{su}]", f"at [{lu}]", f"min [{su}]", f"at [{lu}]"):
        t.add_column(user_text(head), justify="right")
    for mid, s in rows:
        t.add_row(user_text(mid), _g(s["max"]["value"]), _g(s["max"]["at"]),
                  _g(s["min"]["value"]), _g(s["min"]["at"]))
    return t


def _displacements_table(sol, res, numbers) -> Table | None:
    """The displacements asked for (None when none were)."""
    if not res.displacements:
        return None
    lu = quantities(sol.units).displacement_unit
    t = Table(title="Displacements (global; rotations counter-clockwise +)",
              header_style="bold")
    t.add_column("where")
    t.add_column("value", justify="right")
    t.add_column("unit")
    for k, v in numbers.displacements.items():
        t.add_row(user_text(k), _g(v), user_text("rad" if k.endswith(".rz") else lu))
    return t


def _print_checks(console: Console, res, Ff: float, fu: str) -> None:
    """The equilibrium check and the cross-check of one load case, one line each."""
    status = "[green]OK[/green]" if res.equilibrium_ok else "[bold red]FAILED[/bold red]"
    console.print(f"Equilibrium check: largest residual {_g(res.equilibrium_residual / Ff, 2)}"
                  f" {fu} — {status}")
    _print_cross_check(console, res)


@dataclass(frozen=True)
class Governing:
    """The largest absolute value of one quantity in one load case (SI: N, N*m, m, rad).

    ``quantity``: "n", "v", "m" (section forces along members), "reaction x|y|rz",
    "displacement x|y|rz" (joints); ``where``: member, support or joint ("" when there is
    nothing to name); ``at``: distance from the member's start node, None when the value is
    the same all along the member or the quantity is not a member's."""

    quantity: str
    value: float
    where: str
    at: float | None


def _largest_abs(field) -> tuple[float, float | None]:
    """(value of largest magnitude, where) along one member's field; ``where`` is None when
    the field is constant. Ties keep the largest positive value (first position)."""
    (hi, at_hi), (lo, at_lo) = field.extremes()
    if hi - lo <= 1e-12 * max(abs(hi), abs(lo)):
        return hi, None
    return (lo, at_lo) if abs(lo) > abs(hi) else (hi, at_hi)


def _pick(rows) -> tuple[float, str, float | None] | None:
    """Of (value, where, at) rows, the one of largest magnitude; a later row must exceed the
    earlier best by more than round-off (1e-9 relative) so that symmetric twins name the
    first."""
    best = None
    for row in rows:
        if best is None or abs(row[0]) > abs(best[0]) * (1 + 1e-9):
            best = row
    return best


def governing_values(sol, res) -> list[Governing]:
    """Largest |n|, |v|, |m| over all members (v and m only when there are beams), largest
    reaction component per direction and largest joint displacement per direction, for
    load case ``res`` of ``sol`` (SI)."""
    st, topo = sol.structure, sol.topology
    out: list[Governing] = []
    beams = any(m.is_beam for m in st.members.values())
    for q in ("n", "v", "m") if beams else ("n",):
        rows = ((*_largest_abs(getattr(mr, q)), mid) for mid, mr in res.members.items()
                if q == "n" or st.members[mid].is_beam)
        best = _pick((v, mid, at) for v, at, mid in rows)
        if best is not None:
            out.append(Governing(q, best[0], best[1], best[2]))
    for d in ("x", "y", "rz"):
        best = _pick((comps[d], node, None) for node, comps in res.reactions.items()
                     if d in comps)
        if best is not None:
            out.append(Governing(f"reaction {d}", best[0], best[1], None))
    u = np.asarray(res.nodal_displacements, dtype=float)
    for d in ("x", "y", "rz"):
        idx = [i for i, name in enumerate(topo.dofs) if name.endswith(f".{d}")]
        if idx:
            i = idx[int(np.argmax(np.abs(u[idx])))]
            out.append(Governing(f"displacement {d}", float(u[i]),
                                 topo.dofs[i].rsplit(".", 1)[0], None))
    return out


def _kinds(topo, cols) -> str:
    """Redundants counted by kind: reaction components, bar forces, beam axial forces, beam
    end moments."""
    counts = {"reaction component": 0, "bar force": 0, "beam axial force": 0,
              "beam end moment": 0}
    for j in cols:
        c = topo.columns[j]
        key = ("reaction component" if c.kind == "reaction" else "beam end moment"
               if c.kind in ("start_m", "end_m") else "beam axial force"
               if c.name.endswith(".n") else "bar force")
        counts[key] += 1
    return ", ".join(f"{n} {k}{'s' if n != 1 else ''}" for k, n in counts.items() if n)


#: Labels of the governing quantities in the short summary.
_LABELS = {"n": "axial force n", "v": "shear force v", "m": "bending moment m"}


def _governing_table(sol, res) -> Table:
    """The governing values of one load case in the display units, with the displacements
    asked for when there are at most ``NAMES_SHOWN`` of them. Values within round-off of
    zero (1e-12 of the case's largest force, as in the JSON result) show as 0 with nothing
    named."""
    q = quantities(sol.units)
    Ff, Lf, Mf = q.factor("force"), q.factor("length"), q.factor("moment")
    Df, du = q.factor("displacement"), q.displacement_unit
    fu, mu, lu = q.force_unit, q.moment_unit, q.length_unit
    lmax = max((sol.structure.length(m) for m in sol.structure.members), default=1.0)
    f_tol = ROUND_OFF * res.equilibrium_scale
    t = Table(title="Governing values (largest magnitude)", header_style="bold",
              caption=f"{AXIAL_SIGN}, {MOMENT_SIGN_SHORT}; at: from the member's start node")
    for h, right in (("quantity", False), ("value", True), ("unit", False), ("where", False),
                     (f"at [{lu}]", True)):
        t.add_column(user_text(h), justify="right" if right else "left")
    for g in governing_values(sol, res):
        kind, _, d = g.quantity.partition(" ")
        if kind == "displacement":
            f, un, tol = (1.0, "rad", 0.0) if d == "rz" else (Df, du, 0.0)
            label, where = f"joint displacement {d}", f"joint {g.where}"
        elif kind == "reaction":
            f, un, tol = (Mf, mu, f_tol * lmax) if d == "rz" else (Ff, fu, f_tol)
            label, where = f"reaction {d}", f"support {g.where}"
        else:
            f, un, tol = (Mf, mu, f_tol * lmax) if kind == "m" else (Ff, fu, f_tol)
            label, where = _LABELS[kind], f"member {g.where}"
        if abs(g.value) <= tol:
            t.add_row(label, "0", user_text(un), "—", "")
            continue
        at = "" if kind in ("displacement", "reaction") else (
            "all along" if g.at is None else _g(g.at / Lf))
        t.add_row(label, _g(g.value / f), user_text(un), user_text(where), at)
    if len(res.displacements) <= NAMES_SHOWN:
        for k, v in res.displacements.items():
            rot = k.endswith(".rz")
            t.add_row("displacement asked for", _g(v if rot else v / Df),
                      user_text("rad" if rot else du), user_text(k), "")
    return t


def print_short_summary(console: Console, sol, case_names=None) -> None:
    """The summary of a large structure: counts, the basis, the governing values of every
    load case (largest |n|, |v|, |m| with member and position, reactions, joint
    displacements), the checks and the warnings; no row per member, reaction or redundant."""
    st, topo = sol.structure, sol.topology
    Ff = quantities(sol.units).factor("force")
    fu = sol.units.force
    console.print(heading(st.name, st.source))
    console.print(f"Assumptions: {ASSUMPTIONS}")
    console.print(user_text(energy_terms(st)))
    n_bars = sum(1 for m in st.members.values() if m.kind == "bar")
    n_beams = len(st.members) - n_bars
    n_react = sum(len(s.restraints) for s in st.supports.values())
    console.print(f"Structure: {len(st.members)} members ({n_bars} bars, {n_beams} beams), "
                  f"{len(st.nodes)} joints, {len(st.supports)} supports ({n_react} restrained "
                  f"directions), {len(sol.cases)} load case(s).", highlight=False)
    _indeterminacy(console, topo, limit=NAMES_SHOWN)
    names = sol.redundant_names
    how = "chosen by the user" if sol.chosen_by_user else "chosen automatically"
    if sol.basis == "local":
        console.print("Basis: local self-stress states (sparse): each state closes the cut of "
                      "one member force or reaction and touches only the members near it"
                      + (f"; {sol.long_range_states} found by the global step"
                         if sol.long_range_states else "") + ".")
        label = "Redundants (the cuts the states close)"
    else:
        console.print("Basis: unit redundant states of one released structure.")
        label = f"Redundants ({how})"
    console.print(Text.assemble(
        f"{label}: {len(names)}"
        + (f" — {_kinds(topo, sol.redundant_columns)}: " if names else ""),
        (literal(_name_list(names, NAMES_SHOWN)) if names else "", "bold")))
    if names:
        est = "estimate " if sol.basis == "local" else ""
        console.print(f"Flexibility matrix: condition number {est}{_g(sol.condition, 3)} "
                      "(after scaling its diagonal to one).")
    for w in sol.warnings[:NAMES_SHOWN]:
        console.print(user_text(f"Warning: {w}", "yellow"))
    if len(sol.warnings) > NAMES_SHOWN:
        console.print(f"[yellow]... and {len(sol.warnings) - NAMES_SHOWN} more warnings "
                      "(all of them in --json).[/yellow]")
    for name in case_names or list(sol.cases):
        res = sol.cases[name]
        rule(console, f"Load case: {name}")
        _equilibrium_alarm(console, res, Ff, fu)
        _print_state(console, sol, name)
        console.print(_governing_table(sol, res))
        if len(res.displacements) > NAMES_SHOWN:
            console.print(f"{len(res.displacements)} displacements asked for: in --json.")
        _print_checks(console, res, Ff, fu)
    if st.combinations:
        console.print(f"The envelope over the {len(st.combinations)} combination(s) is in "
                      "--json; each combination is summarised above as a load case.")
    from .audit import AUDIT_MAX_LOCAL_STATES

    steps = ("--steps the whole audit trail" if sol.basis != "local"
             or len(sol.redundant_columns) <= AUDIT_MAX_LOCAL_STATES
             else f"plot the diagrams (the audit trail, --steps, is written for up to "
                  f"{AUDIT_MAX_LOCAL_STATES} local states)")
    console.print(f"[bold]Short summary[/bold] (more than {SUMMARY_MAX_MEMBERS} members or "
                  f"{SUMMARY_MAX_REDUNDANTS} redundants): --json gives every member, reaction "
                  f"and redundant; {steps}.")
    console.print(Panel(CAUTION, title="Caution", style="yellow"))


def print_brief(console: Console, sol, case_names=None) -> None:
    """One line per redundant and load case (for a large structure the largest few), the
    checks, and every warning (``--quiet``)."""
    q = quantities(sol.units)
    for w in sol.warnings:
        console.print(user_text(f"Warning: {w}", "yellow"))
    large = is_large(sol)
    for name in case_names or list(sol.cases):
        res = sol.cases[name]
        shown = list(zip(sol.redundant_columns, res.redundants, strict=True))
        if large:  # the largest few; every value is in --json
            shown = sorted(shown, key=lambda jx: -abs(jx[1]))[:NAMES_SHOWN]
            console.print(user_text(f"{name}  {len(res.redundants)} redundants; the "
                                    f"{len(shown)} largest:"))
        values = redundants_shown(sol, name)  # round-off as 0
        for j, _x in shown:
            col = sol.topology.columns[j]
            console.print(user_text(f"{name}  {col.name} = {_g(values[col.name])} "
                                    f"{q.column_unit(col)}"))
        failed = ("FAILED", "bold red")
        eq = "OK" if res.equilibrium_ok else failed
        c = res.stiffness
        cc = "not run" if c is None else "agrees" if c.ok else failed
        console.print(Text.assemble(f"{literal(name)}  equilibrium ", eq, ", cross-check ", cc))
        state = sol.states.get(name)
        if state is not None and state.changed:
            console.print(user_text(f"{name}  slack: {', '.join(state.slack) or '-'}; "
                                    f"lifted: {', '.join(state.lifted) or '-'}"))


def _print_state(console: Console, sol, name: str) -> None:
    """The one-way state of a load case, when the structure has one-way items."""
    if name in sol.states:
        from ..one_way import state_text

        console.print(user_text(state_text(sol.structure, sol.states[name])))


def _equilibrium_alarm(console: Console, res, Ff: float, fu: str) -> None:
    """A loud red panel when the case failed its equilibrium check."""
    if not res.equilibrium_ok:
        console.print(Panel(
            f"EQUILIBRIUM CHECK FAILED: residual {_g(res.equilibrium_residual / Ff)} {fu}. "
            "The numbers below do not satisfy equilibrium and must not be used.",
            style="bold red"))


def _print_cross_check(console: Console, res) -> None:
    c = res.stiffness
    if c is None:
        console.print("Cross-check by the direct stiffness method: not run.")
    elif c.ok:
        console.print(f"Cross-check by the direct stiffness method: largest difference "
                      f"{_g(c.difference, 2)} of the largest force — [green]agrees[/green]"
                      + (f" (curved members as chains of straight beams, extrapolated; "
                         f"estimated discretisation error {_g(c.discretisation, 2)})"
                         if c.discretisation else ""))
    else:
        text = (f"CROSS-CHECK FAILED: the direct stiffness method gives no answer ({c.failure})"
                if c.difference is None else
                f"CROSS-CHECK FAILED: the direct stiffness method differs by "
                f"{_g(c.difference, 2)} of the largest force (at {c.where}). Do not use these "
                "numbers before the cause is found.")
        console.print(Panel(user_text(text), style="bold red"))


def print_steps(console: Console, sol, case_names=None) -> None:
    """The audit trail: every step of the force method, numbered (see :mod:`leastwork.output.audit`)."""
    from .audit import audit_sheet
    from .html import default_meta

    print_sheet(console, audit_sheet(sol, case_names, meta=default_meta()))


_TONE = {"plain": "", "note": "dim", "warning": "yellow", "alarm": "bold red"}


def print_sheet(console: Console, sheet: Sheet) -> None:
    """A calculation sheet on the terminal: its title block, then the steps; a table wider
    than the console is wrapped, turned or stacked (:mod:`leastwork.output.term_tables`)."""
    console.print(heading(sheet.project.get("title") or sheet.title, sheet.source))
    print_cells(console, "", ["title block", ""], [[user_text(k), user_text(v)]
                                        for k, v in sheet.title_block()], keys=1)
    for text in sheet.assumptions:
        console.print(user_text(text))
    for step in sheet.steps:
        rule(console, f"Step {step.number} — {step.title}")
        for block in step.blocks:
            if isinstance(block, Para):
                if block.tone == "alarm":
                    console.print(Panel(user_text(block.text), style="bold red"))
                else:
                    text = ("Warning: " if block.tone == "warning" else "") + block.text
                    console.print(user_text(text, _TONE[block.tone]))
            elif isinstance(block, Formula):
                console.print(user_text("  " + block.text))
            else:
                print_grid(console, block)
    for text in sheet.cautions:
        console.print(Panel(user_text(text), title="Caution", style="yellow"))


def _rich_table(grid: Grid) -> Table:
    t = Table(title=user_text(grid.title), header_style="bold", show_footer=False)
    for k, h in enumerate(grid.headers):
        text = all(isinstance(r[k], str) for r in grid.rows)
        t.add_column(user_text(h), justify="left" if k < grid.keys or text else "right")
    for row in grid.rows:
        t.add_row(*[user_text(fmt(c)) for c in row])
    if grid.total:
        t.add_row(*[user_text(fmt(c)) for c in grid.total], style="bold", end_section=False)
    return t
