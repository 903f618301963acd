"""Terminal summary and audit trail (rich)."""

from __future__ import annotations

from rich.console import Console
from rich.panel import Panel
from rich.table import Table

from ..displacements import deflection_extreme
from .jsonout import _is_moment_column, quantity_factors

__all__ = ["print_summary", "print_check", "print_steps", "CAUTION", "ASSUMPTIONS"]

ASSUMPTIONS = (
    "Linear elastic material, small displacements, plane (2D) structure; prismatic members; "
    "energy terms: bending and axial (beams without a cross-section area are axially rigid), "
    "axial for bars, springs; shear only when asked."
)
CAUTION = (
    "These results come from an idealised model. They must be checked by a qualified "
    "engineer against the governing local codes before they are used for any real structure."
)


def _g(x: float, sig: int = 5) -> str:
    if x == 0 or abs(x) < 1e-300:
        return "0"
    if abs(x) < 10 ** (-sig - 6):
        return f"{x:.{sig - 1}e}"
    s = f"{x:.{sig}g}"
    if "e" in s:
        mant, exp = s.split("e")
        return f"{mant}e{int(exp)}"
    return s


def _clean(values, scale):
    return [0.0 if abs(v) < 1e-12 * scale else v for v in values]


def energy_terms(st) -> str:
    """Plain list of the energy terms this solve includes."""
    terms = []
    if any(m.is_beam for m in st.members.values()):
        terms.append("bending (beams)")
    if any(m.EA is not None for m in st.members.values()):
        terms.append("axial (" + ", ".join(sorted({("bars" if not m.is_beam else "beams with an area")
                                                  for m in st.members.values()
                                                  if m.EA is not None})) + ")")
    if st.shear:
        terms.append("shear (beams)")
    if any(r.is_spring for s in st.supports.values() for r in s.restraints):
        terms.append("support springs")
    rigid = [m.id for m in st.members.values() if m.is_beam and m.EA is None]
    text = "Energy terms included: " + ", ".join(terms) + "."
    if rigid:
        text += f" Axially rigid (no area given): {', '.join(rigid)}."
    if not st.shear and any(m.is_beam for m in st.members.values()):
        text += " Shear energy not included."
    return text


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
    Ff, Lf, Mf = quantity_factors(st)
    fu, mu, lu = st.units.force, f"{st.units.force}*{st.units.length}", st.units.length
    console.print(f"[bold]{st.name}[/bold]  ({st.source})")
    console.print(f"Assumptions: {ASSUMPTIONS}")
    console.print(energy_terms(st))
    _indeterminacy(console, topo)
    how = "chosen by the user" if sol.chosen_by_user else "chosen automatically"
    console.print(f"Redundants ({how}): [bold]{', '.join(sol.redundant_names) or 'none'}[/bold]")
    for w in sol.warnings:
        console.print(f"[yellow]Warning: {w}[/yellow]")
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
                mom = _is_moment_column(col)
                t.add_row(col.name, _g(x / (Mf if mom else Ff)), mu if mom else fu)
            console.print(t)
        t = Table(title="Reactions (force the support applies to the structure)",
                  header_style="bold")
        t.add_column("support")
        t.add_column(f"x [{fu}]", justify="right")
        t.add_column(f"y [{fu}]", justify="right")
        t.add_column(f"rz [{mu}]", justify="right")
        t.add_column(f"normal n [{fu}]", justify="right")
        for node, comps in res.reactions.items():
            t.add_row(node, *[_g(comps[d] / (Mf if d == "rz" else Ff)) if d in comps else "—"
                              for d in ("x", "y", "rz", "n")])
        console.print(t)
        t = Table(title="Member end forces (section forces: n tension +, m sagging +, v = dm/dx)",
                  header_style="bold")
        t.add_column("member")
        for h in (f"n start [{fu}]", f"v start [{fu}]", f"m start [{mu}]", f"n end [{fu}]",
                  f"v end [{fu}]", f"m end [{mu}]"):
            t.add_column(h, justify="right")
        scale = max(1e-300, max(abs(v) for mr in res.members.values() for v in (*mr.start,
                                                                               *mr.end)))
        for mid, mr in res.members.items():
            vals = _clean([*mr.start, *mr.end], scale)
            facs = [Ff, Ff, Mf, Ff, Ff, Mf]
            t.add_row(mid, *[_g(v / f) for v, f in zip(vals, facs, strict=True)])
        console.print(t)
        beams = [mid for mid in res.members if st.members[mid].is_beam]
        if beams:
            t = Table(title="Bending moment extremes and largest deflection along beams",
                      header_style="bold")
            t.add_column("beam")
            t.add_column(f"m max [{mu}]", justify="right")
            t.add_column(f"at [{lu}]", justify="right")
            t.add_column(f"m min [{mu}]", justify="right")
            t.add_column(f"at [{lu}]", justify="right")
            t.add_column(f"deflection [{lu}]", justify="right")
            t.add_column(f"at [{lu}]", justify="right")
            for mid in beams:
                mr = res.members[mid]
                w, at = deflection_extreme(st, topo, res, mid)
                t.add_row(mid, _g(mr.m_max[0] / Mf), _g(mr.m_max[1] / Lf),
                          _g(mr.m_min[0] / Mf), _g(mr.m_min[1] / Lf), _g(w / Lf, 4),
                          _g(at / Lf, 4))
            console.print(t)
        if res.displacements:
            t = Table(title="Displacements (global; rotations counter-clockwise +)",
                      header_style="bold")
            t.add_column("where")
            t.add_column("value", justify="right")
            t.add_column("unit")
            for k, v in res.displacements.items():
                rot = k.endswith(".rz")
                t.add_row(k, _g(v if rot else v / Lf), "rad" if rot else lu)
            console.print(t)
        status = "[green]OK[/green]" if res.equilibrium_ok else "[bold red]FAILED[/bold red]"
        console.print(f"Equilibrium check: largest residual {_g(res.equilibrium_residual / Ff, 2)}"
                      f" {fu} — {status}")
    console.print(Panel(CAUTION, title="Caution", style="yellow"))


def print_steps(console: Console, sol, case_names=None) -> None:
    """The audit trail: every step of the force method, numbered."""
    st, topo = sol.structure, sol.topology
    Ff, Lf, Mf = quantity_factors(st)
    fu, lu = st.units.force, st.units.length
    mu = f"{fu}*{lu}"
    red = sol.redundant_columns
    cols = topo.columns
    console.print(f"[bold]{st.name}[/bold]  ({st.source})")
    console.print(f"Assumptions: {ASSUMPTIONS}")
    console.rule("Step 1 — the structure")
    console.print(f"{len(st.nodes)} nodes, {len(st.members)} members "
                  f"({sum(m.is_beam for m in st.members.values())} beams, "
                  f"{sum(not m.is_beam for m in st.members.values())} bars), "
                  f"{len(topo.restraints)} reaction components; {len(topo.dofs)} equilibrium "
                  f"equations, {len(cols)} unknown forces.")
    _indeterminacy(console, topo)
    console.rule("Step 2 — redundants and the released structure")
    how = "chosen by the user" if sol.chosen_by_user else (
        "chosen automatically: member forces are kept, then reactions in the order written, "
        "each only if clearly independent of those kept (pivoted elimination)")
    console.print(f"Redundants ({how}): {', '.join(sol.redundant_names) or 'none'}")
    for j in red:
        c = cols[j]
        what = {"reaction": f"support restraint {c.name} removed",
                "axial": f"member {c.owner} cut (axial force released)",
                "start_m": f"hinge put at the start of {c.owner}",
                "end_m": f"hinge put at the end of {c.owner}"}[c.kind]
        console.print(f"  X{red.index(j) + 1} = {c.name}: {what}")
    console.print("Released structure: statically determinate and stable (its equilibrium "
                  "matrix is square and non-singular).")
    console.rule("Step 3 — unit-redundant force tables (released structure)")
    names = [cols[j].name for j in red]
    t = Table(header_style="bold")
    t.add_column("force")
    t.add_column("unit")
    for i, _ in enumerate(red):
        t.add_column(f"X{i + 1}=1", justify="right")
    for k, c in enumerate(cols):
        mom = _is_moment_column(c)
        fac_row = Mf if mom else Ff
        vals = []
        for i, j in enumerate(red):
            fac_x = Mf if _is_moment_column(cols[j]) else Ff
            vals.append(_g(sol.B[k, i] * fac_x / fac_row))
        t.add_row(c.name, (mu if mom else fu) + "/unit", *vals)
    console.print(t)
    console.rule("Step 4 — flexibility coefficients δij = Σ ∫ mi mj/EI + ni nj/EA"
                 + (" + κ vi vj/GAs" if st.shear else "") + " (+ springs ri rj/k)")
    x_unit = [Mf if _is_moment_column(cols[j]) else Ff for j in red]
    d_unit = [1.0 if _is_moment_column(cols[j]) else Lf for j in red]
    for i in range(len(red)):
        for j in range(len(red)):
            console.print(f"  δ{i + 1}{j + 1} = {_g(sol.flexibility[i, j] * x_unit[j] / d_unit[i])}")
    for name in case_names or list(sol.cases):
        res = sol.cases[name]
        console.rule(f"Step 5 — compatibility equations ∂U/∂Xi = Δi, load case {name}")
        for i in range(len(red)):
            terms = " + ".join(f"{_g(sol.flexibility[i, j] * x_unit[j] / d_unit[i])}·X{j + 1}"
                               for j in range(len(red)))
            console.print(f"  {terms} + ({_g(res.load_terms[i] / d_unit[i])}) = "
                          f"{_g(res.imposed[i] / d_unit[i])}")
        console.rule(f"Step 6 — solution and superposition, load case {name}")
        for i, n in enumerate(names):
            unit = mu if _is_moment_column(cols[red[i]]) else fu
            console.print(f"  X{i + 1} = {n} = {_g(res.redundants[i] / x_unit[i])} {unit}")
        t = Table(header_style="bold", title="final = released under loads + Σ Xi · (unit state i)")
        t.add_column("force")
        t.add_column("under loads", justify="right")
        t.add_column("final", justify="right")
        for k, c in enumerate(cols):
            fac = Mf if _is_moment_column(c) else Ff
            t.add_row(c.name, _g(res.s0[k] / fac), _g(res.s[k] / fac))
        console.print(t)
        console.rule(f"Step 7 — equilibrium check, load case {name}")
        status = "OK" if res.equilibrium_ok else "FAILED — DO NOT USE THESE NUMBERS"
        console.print(f"  largest residual {_g(res.equilibrium_residual / Ff, 2)} {fu}: {status}")
    print_summary(console, sol, case_names)
