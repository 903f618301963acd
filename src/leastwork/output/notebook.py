"""How a solution shows itself in Python: a short ``repr`` (a few lines, under 2,000
characters whatever the size) and an HTML summary with its diagram for notebooks."""

from __future__ import annotations

from html import escape

from ..plaintext import literal
from .reported import case_numbers

__all__ = ["short_repr", "html_repr"]

#: Names listed in the short repr before "... and N more".
_SHOWN = 6
#: Largest structure whose diagram is drawn inline (members).
_DIAGRAM_MEMBERS = 400


def _names(names: list[str]) -> str:
    shown = ", ".join(literal(n, 40) for n in names[:_SHOWN])
    more = len(names) - _SHOWN
    return shown + (f" ... and {more} more" if more > 0 else "") if names else "none"


def _checks(sol) -> str:
    eq = "OK" if sol.equilibrium_ok else "FAILED"
    cc = "agrees" if sol.cross_check_ok else "DISAGREES"
    return f"equilibrium {eq}, cross-check {cc}"


def short_repr(sol) -> str:
    """A few lines: the structure, the degree, the redundants, the cases, the checks."""
    st, topo = sol.structure, sol.topology
    lines = [
        f"<Solution {literal(st.name, 80)!r}: {len(st.members)} members, "
        f"degree {topo.degree} (external {topo.external}, internal {topo.internal})",
        f"  redundants: {_names(sol.redundant_names)}",
        f"  load cases: {_names(list(sol.cases))}",
        f"  checks: {_checks(sol)}; warnings: {len(sol.warnings)}; units: "
        f"{sol.units.force}, {sol.units.length}>",
    ]
    return "\n".join(lines)[:1990]


def _table(head: list[str], rows: list[list]) -> str:
    cells = "".join(f"<th>{escape(h)}</th>" for h in head)
    body = "".join("<tr>" + "".join(
        f"<td style='text-align:{'left' if i == 0 else 'right'}'>"
        f"{escape('-' if v is None else (f'{v:.5g}' if isinstance(v, float) else str(v)))}"
        "</td>" for i, v in enumerate(r)) + "</tr>" for r in rows)
    return f"<table><thead><tr>{cells}</tr></thead><tbody>{body}</tbody></table>"


def html_repr(sol) -> str:
    """An HTML summary: the checks, and for the first load case its redundants and
    reactions, and its diagram (inline SVG) for a structure of moderate size."""
    st = sol.structure
    case = next(iter(sol.cases))
    n = case_numbers(sol, case)
    u = sol.units
    parts = [f"<div><b>{escape(st.name)}</b>: degree {sol.topology.degree}, "
             f"{escape(_checks(sol))}; load case <b>{escape(case)}</b> of "
             f"{len(sol.cases)} (units {escape(u.force)}, {escape(u.length)})</div>"]
    if n.redundants:
        parts.append(_table(["redundant", "value"], [[k, v] for k, v in n.redundants.items()]))
    dirs = ["x", "y", "rz", "n"]
    used = [d for d in dirs if any(d in c for c in n.reactions.values())]
    parts.append(_table(["support", *used], [[node, *(c.get(d) for d in used)]
                                             for node, c in n.reactions.items()]))
    for w in sol.warnings[:_SHOWN]:
        parts.append(f"<div style='color:#a0522d'>Warning: {escape(w)}</div>")
    if len(st.members) <= _DIAGRAM_MEMBERS:
        from .html import _inline_svg
        from .plot import figure_svg

        svg = _inline_svg(figure_svg(sol, case), f"{st.name}: {case}", "lw-")
        parts.append(f"<div style='max-width:900px'>{svg}</div>")
    parts.append("<div><i>Results must be checked by a qualified engineer against the "
                 "governing codes.</i></div>")
    return "\n".join(parts)
