"""Step 1: the structure (members, supports, loads, combinations) and its degree of
indeterminacy."""

from __future__ import annotations

import math

from ...loadkinds import load_kind
from ...model import Structure
from ..quantities import Quantities
from ..sheet import Grid, Para, Step, coefficient, fmt
from .context import Context

__all__ = ["step_structure", "load_row", "support_kind"]


def step_structure(ctx: Context) -> Step:
    st, topo = ctx.st, ctx.topo
    nbeam = sum(m.is_beam for m in st.members.values())
    blocks: list = [Para(
        f"{len(st.nodes)} nodes, {len(st.members)} members ({nbeam} beams, "
        f"{len(st.members) - nbeam} bars), {len(topo.restraints)} reaction components; "
        f"{len(topo.dofs)} equilibrium equations, {len(topo.columns)} unknown forces "
        "(bar forces; beam axial forces and end moments; reactions).")]
    blocks.extend(_members(ctx))
    blocks.append(_supports(ctx))
    blocks.extend(_loads(ctx))
    blocks.extend(_indeterminacy(ctx))
    return Step(1, "The structure and its degree of indeterminacy", tuple(blocks))


def _members(ctx: Context) -> list[Grid]:
    st, u = ctx.st, ctx.u
    rows = []
    for m in st.members.values():
        a, b = st.nodes[m.start], st.nodes[m.end]
        hinges = ", ".join(k for k, h in (("start", m.hinge_start), ("end", m.hinge_end))
                           if h) or "-"
        EA = u.convert(m.EA, 1, 0) if m.EA is not None else "rigid"
        EI = u.convert(m.EI, 1, 2) if m.EI is not None else "-"
        if m.taper is not None:  # start -> end of a tapered beam
            EA = (f"{fmt(EA)} -> {fmt(u.convert(m.taper.EA, 1, 0))}"
                  if m.taper.EA is not None else "rigid")
            EI = f"{fmt(EI)} -> {fmt(u.convert(m.taper.EI, 1, 2))}"
        rows.append((m.id, m.kind, f"{a.id} -> {b.id}", u.convert(st.length(m.id), 0, 1),
                     EA, EI, hinges if m.is_beam else "pins"))
    out = [Grid("Members", ("member", "kind", "from -> to", f"L [{u.length_unit}]",
                            f"EA [{u.force_unit}]", f"EI [{u.label(1, 2)}]", "hinges"),
                tuple(rows))]
    named = [m for m in st.members.values() if m.material or m.section]
    if named:
        dash = "- (EA, EI given)"
        out.append(Grid(
            "Materials and sections of the members (EA = E·A, EI = E·I)",
            ("member", "material", f"E [{u.unit('stress')}]", "section", f"A [{u.label(0, 2)}]",
             f"I [{u.label(0, 4)}]"),
            tuple((m.id, m.material or dash, u.to_output(m.E, "stress") if m.E else "-",
                   m.section or dash, u.convert(m.area, 0, 2) if m.area else "-",
                   u.convert(m.I, 0, 4) if m.I and m.is_beam else "-") for m in named)))
    return out


def support_kind(sup) -> str:
    """The kind of a support in the trade's words, from what it restrains: fixed, pinned,
    roller (and the way it is free to move), inclined roller, springs, bearing in
    compression only."""
    dirs = {r.direction for r in sup.restraints}
    kinds = {frozenset(("x", "y", "rz")): "fixed", frozenset(("x", "y")): "pinned",
             frozenset(("y",)): "roller, free to move along x",
             frozenset(("x",)): "roller, free to move along y",
             frozenset(("n",)): "inclined roller, free to move along its surface",
             frozenset(("rz",)): "rotation restrained only"}
    text = kinds.get(frozenset(dirs), "restrains " + ", ".join(sorted(dirs)))
    springs = [r for r in sup.restraints if r.is_spring]
    if springs and len(springs) == len(sup.restraints):
        text = "elastic: " + text
    elif springs:
        text += " (" + ", ".join(r.direction for r in springs) + " by a spring)"
    if sup.acts == "compression":
        text += "; bears in compression only"
    return text


def _supports(ctx: Context) -> Grid:
    u = ctx.u
    rows = []
    for sup in ctx.st.supports.values():
        kind = support_kind(sup)
        for r in sup.restraints:
            if r.is_spring:
                kdim = (1, 0) if r.direction == "rz" else (1, -1)
                what = f"spring k = {fmt(u.convert(r.stiffness, *kdim))} {u.label(*kdim)}"
            else:
                what = "rigid"
            if r.direction == "n":
                what += (f", normal to a surface at "
                         f"{fmt(math.degrees(sup.surface_angle or 0.0))} deg")
            rows.append((r.name, kind, what))
    return Grid("Supports (reaction components)", ("restraint", "support", "restraint kind"),
                tuple(rows))


def _loads(ctx: Context) -> list[Grid]:
    st = ctx.st
    combos = dict(st.combinations)
    out = [Grid("Loads", ("case", "load", "on", "values"),
                tuple(load_row(st, ctx.u, ld) for ld in st.loads
                      if ld.case in ctx.cases and ld.case not in combos))]
    if combos:
        out.append(Grid("Load combinations (solved as load cases of factored loads)",
                        ("combination", "factors"),
                        tuple((name, " + ".join(f"{coefficient(f)} × {c}" for c, f in parts))
                              for name, parts in combos.items())))
    return out


def _indeterminacy(ctx: Context) -> list:
    topo = ctx.topo
    out: list = [Para(
        f"Degree of indeterminacy by rank: {len(topo.columns)} unknown forces - rank "
        f"{topo.rank} of the equilibrium matrix = {topo.degree} "
        f"({topo.external} external, {topo.internal} internal)."),
        Para(f"Counting formula: {topo.counting['formula']}")]
    if topo.counting["value"] != topo.degree:
        out.append(Para("The counting formula and the rank disagree: the rank result "
                        "governs (some members are arranged so that they cannot all "
                        "act).", "warning"))
    out.append(Para(f"Member graph: {topo.parts} connected part(s), {topo.loops} closed "
                    "loop(s) of members."))
    for name in topo.dropped:
        out.append(Para(f"Restraint {name} is ignored: every member end at that node "
                        "is hinged, so it can carry no moment.", "note"))
    return out


def load_row(st: Structure, u: Quantities, ld) -> tuple[str, str, str, str]:
    """(case, kind, on, values) of one load, in the output units, as its kind describes it."""
    kind = load_kind(ld)
    on, values = kind.describe(st, u, ld)
    written = getattr(ld, "written", "")
    return (ld.case, kind.words, on, f"{values} ({written})" if written else values)
