"""Closed forms of a symbolic solve (``--symbolic``) on the terminal and in sheets: each
result as an expression of the parameters with its value at the parameter values.

User text (the structure name, load-case names, ids) is shown literally: rich Text on the
terminal (:func:`leastwork.output.terminal.user_text`), escaped in Markdown
(:func:`leastwork.output.documents.md_text`) and LaTeX (``tex_escape``)."""

from __future__ import annotations

from .sheet import fmt

__all__ = ["closed_forms_json", "closed_form_rows", "print_closed_forms",
           "closed_forms_markdown", "closed_forms_latex"]


def closed_forms_json(sym) -> dict:
    """The contract's JSON result of a symbolic solve (docs/json-result.md), every closed
    form a string that sympy parses; ``sym`` a
    :class:`leastwork.symbolic.SymbolicSolution`."""
    from .json_result import SCHEMA

    def strings(d: dict) -> dict:
        return {k: str(v) for k, v in d.items()}

    k = len(sym.redundant_names)
    cases = {name: {
        "redundants": strings(c.redundants),
        "flexibility": [[str(c.flexibility[i, j]) for j in range(k)] for i in range(k)],
        "load_terms": [str(v) for v in c.load_terms],
        "imposed": [str(v) for v in c.imposed],
        "reactions": {n: strings(comps) for n, comps in c.reactions.items()},
        "members": {mid: {part: strings(r[part]) for part in ("start", "end", "m_max", "m_min")}
                    for mid, r in c.members.items()},
        "displacements": strings(c.displacements),
        "checks": {"equilibrium_residual": str(c.equilibrium_residual),
                   "equilibrium_ok": c.equilibrium_residual == 0,
                   "equilibrium_tolerance": "0"},
    } for name, c in sym.cases.items()}
    return {
        "schema": SCHEMA,
        "mode": "symbolic",
        "name": sym.name,
        "units": dict(sym.units),
        "parameters": {n: {"value": sym.values[s], "exact": str(sym.exact_values[s]),
                           "unit": sym.parameter_units[n]} for n, s in sym.parameters.items()},
        "indeterminacy": {"degree": sym.degree, "external": sym.external,
                          "internal": sym.internal, "stable": sym.stable},
        "redundants": list(sym.redundant_names),
        "combinations": {name: strings(factors) for name, factors in sym.combinations.items()},
        "cases": cases,
        "warnings": list(sym.warnings),
    }


def closed_form_rows(sym, case_names=None) -> list[tuple[str, str, object, float, str]]:
    """(case, quantity, expression, value, unit) of every result of ``sym`` (a
    :class:`leastwork.symbolic.SymbolicSolution`), in the order of the JSON result."""
    u = sym.units
    force, moment, length = u["force"], u["moment"], u["length"]
    rows = []
    for name in case_names or list(sym.cases):
        c = sym.cases[name]
        for k, v in c.redundants.items():
            is_moment = k.endswith(".m") or k.endswith(".rz")
            rows.append((name, f"redundant {k}", v, moment if is_moment else force))
        for node, comps in c.reactions.items():
            for d, v in comps.items():
                rows.append((name, f"reaction {node}.{d}", v, moment if d == "rz" else force))
        for mid, r in c.members.items():
            for end in ("start", "end"):
                for q in "nvm":
                    rows.append((name, f"{mid} {end} {q}", r[end][q],
                                 moment if q == "m" else force))
            for k in ("m_max", "m_min"):
                rows.append((name, f"{mid} {k}", r[k]["value"], moment))
                rows.append((name, f"{mid} {k} at", r[k]["at"], length))
        for t, v in c.displacements.items():
            rows.append((name, f"displacement {t}", v, "rad" if t.endswith(".rz") else length))
    return [(case, q, e, sym.numeric(e), unit) for case, q, e, unit in rows]


def _parameters_line(sym) -> str:
    return ", ".join(f"{n} = {fmt(sym.values[s])} {sym.parameter_units[n]}".rstrip()
                     for n, s in sym.parameters.items())


def print_closed_forms(console, sym, case_names=None) -> None:
    """Tables of closed forms on the terminal."""
    from rich.table import Table

    from .terminal import heading, user_text

    console.print(heading(sym.name, sym.source, " — closed forms"))
    console.print(user_text("Parameters (symbols, in the case units): "
                            + _parameters_line(sym)))
    console.print(user_text(f"Redundants: {', '.join(sym.redundant_names) or 'none'}; degree "
                            f"{sym.degree}"))
    for w in sym.warnings:
        console.print(user_text(f"Warning: {w}", "yellow"))
    current, table = None, None
    for case, q, expr, value, unit in closed_form_rows(sym, case_names):
        if case != current:
            if table is not None:
                console.print(table)
            current = case
            table = Table(title=user_text(f"Load case {case}"), header_style="bold")
            table.add_column("quantity", overflow="fold")
            table.add_column("closed form", overflow="fold")
            table.add_column("value", justify="right", overflow="fold", min_width=11)
            table.add_column("unit", overflow="fold")
        table.add_row(user_text(q), user_text(expr), fmt(value), user_text(unit))
    if table is not None:
        console.print(table)


def closed_forms_markdown(sym, case_names=None) -> list[str]:
    """Markdown lines: parameters, then one table of closed forms per load case."""
    from .documents import md_block, md_code, md_text

    out = [md_block(f"Parameters (symbols, in the case units): {_parameters_line(sym)}"), ""]
    current = None
    for case, q, expr, value, unit in closed_form_rows(sym, case_names):
        if case != current:
            current = case
            out += ["", f"**{md_text(f'Load case {case}')}**", "",
                    "| quantity | closed form | value | unit |", "|:---|:---|---:|:---|"]
        out.append(f"| {md_text(q)} | {md_code(expr)} | {fmt(value)} | {md_text(unit)} |")
    return out


def closed_forms_latex(sym, case_names=None) -> list[str]:
    """LaTeX lines: one typeset equation per result with its value."""
    import sympy

    from .documents import tex_escape

    out = [tex_escape("Parameters (symbols, in the case units): " + _parameters_line(sym)), ""]
    current = None
    for case, q, expr, value, unit in closed_form_rows(sym, case_names):
        if case != current:
            current = case
            out.append(rf"\subsection*{{Load case {tex_escape(case)}}}")
        out.append(rf"\noindent {tex_escape(q)}: $\displaystyle {sympy.latex(expr)}$ "
                   rf"$= {fmt(value)}$ {tex_escape(unit)}\\[2pt]")
    return out
