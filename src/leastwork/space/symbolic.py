"""Closed forms for space structures under nodal loads (``leastwork solve --symbolic`` of a
space case): the redundants, reactions and displacements as sympy expressions of the
``[parameters]``, in the case units.

The numeric solve fixes the topology and the redundants; this module repeats the force
method exactly on them: equilibrium matrix from exact coordinates, released structure by
exact elimination, flexibility blocks in closed form (L/EA, L/GJ, L/3EI, L/6EI), δ X = −δ0,
superposition, and displacements by unit loads. The exact reading of the quantities is the
plane path's (:mod:`leastwork.symbolic.exact`); what is specific to space is here.
"""

from __future__ import annotations

from dataclasses import dataclass

import sympy

from ..errors import CaseError
from .model import DIRECTIONS, ROTATIONS, SpaceNodalLoad
from .solve import SpaceSolution

__all__ = ["SpaceClosedForms", "space_closed_forms", "closed_form_lines", "closed_form_dict"]

#: Largest number of equilibrium equations the exact elimination takes on.
MAX_EXACT_DOFS = 72


@dataclass
class SpaceClosedForms:
    """Per load case: redundants, reactions and displacements as expressions in the case
    units (forces in the force unit, moments in force × length, lengths, rotations in rad).
    ``parameters``: name -> symbol; ``values``: symbol -> its value in the case units."""

    parameters: dict[str, sympy.Symbol]
    values: dict[sympy.Symbol, sympy.Expr]
    cases: dict[str, dict[str, dict[str, sympy.Expr]]]


def _exact_inputs(sol: SpaceSolution, text: str):
    from ..io.record import read_case_record
    from ..symbolic.exact import _Evaluator

    st0 = sol.structure
    if st0.combinations:
        raise CaseError("--symbolic of a space structure does not take [combinations] yet: "
                        "solve numerically", source=st0.source)
    st, record = read_case_record(text, st0.source)
    ev = _Evaluator(st, record, False)
    data = record.data
    defaults = data.get("defaults", {}) or {}

    def get(where: str) -> sympy.Expr:
        return ev.field(where)

    nodes = {nid: sympy.Matrix([get(f"[nodes] {nid}[{i}] ({a})") for i, a in enumerate("xyz")])
             for nid in st.nodes}
    props = {}
    for mid, m in st.members.items():
        if m.roll:
            raise CaseError(f"--symbolic does not take a rolled section yet ([beams] {mid}.roll):"
                            " solve numerically", source=st.source)
        kind = "beams" if m.is_beam else "bars"
        where = f"[{kind}] {mid}"
        spec = data[kind][mid]
        mat = spec.get("material", defaults.get("material"))
        sec = spec.get("section", defaults.get("section"))

        def prop(key, mkey, skey, value, where=where, mat=mat, sec=sec):
            if value is None:
                return None
            if f"{where}.{key}" in record.fields:
                return get(f"{where}.{key}")
            return get(f"[materials.{mat}] {mkey}") * get(f"[sections.{sec}] {skey}")

        props[mid] = {"EA": prop("EA", "E", "A", m.EA), "EIy": prop("EIy", "E", "Iy", m.EIy),
                      "EIz": prop("EIz", "E", "Iz", m.EIz), "GJ": prop("GJ", "G", "J", m.GJ)}
    springs = {}
    for nid, sup in st.supports.items():
        for r in sup.restraints:
            if r.is_spring:
                springs[r.name] = get(f"[supports] {nid}.springs.{r.direction}")
    loads = []
    for i, ld in enumerate(st.loads, start=1):
        if not isinstance(ld, SpaceNodalLoad):
            raise CaseError("--symbolic of a space structure takes nodal loads only (load "
                            f"#{i} is a {type(ld).__name__[5:].lower()} load): solve "
                            "numerically", source=st.source)
        w = f"[[loads]] #{i}"
        comps = [get(f"{w}.{k}") if f"{w}.{k}" in record.fields else sympy.Integer(0)
                 for k in ("fx", "fy", "fz", "mx", "my", "mz")]
        loads.append((ld, comps))
    return ev, nodes, props, springs, loads


def _axes(a: sympy.Matrix, b: sympy.Matrix):
    d = b - a
    L = sympy.sqrt(sympy.simplify(d.dot(d)))
    ex = d / L
    h = sympy.Matrix([-ex[1], ex[0], 0])  # z_global x ex
    hn = sympy.sqrt(sympy.simplify(h.dot(h)))
    if hn == 0:
        ey = sympy.Matrix([0, 1, 0])
    else:
        ey = h / hn
    ez = ex.cross(ey)
    return sympy.simplify(L), [sympy.simplify(v) for v in (ex, ey, ez)]


def space_closed_forms(sol: SpaceSolution, text: str) -> SpaceClosedForms:
    """The closed forms of ``sol``'s structure (its case file's ``text``), with the
    numeric solve's redundants."""
    from .members import basic_forces

    topo = sol.topology
    if len(topo.dofs) > MAX_EXACT_DOFS:
        raise CaseError(f"--symbolic of a space structure takes at most {MAX_EXACT_DOFS} "
                        f"equilibrium equations ({len(topo.dofs)} here): solve numerically",
                        source=sol.structure.source)
    ev, nodes, props, springs, loads = _exact_inputs(sol, text)
    st = sol.structure
    ndof, ncol = len(topo.dofs), len(topo.columns)
    A = sympy.zeros(ndof, ncol)
    F = sympy.zeros(ncol, ncol)
    for mid, m in st.members.items():
        L, (ex, ey, ez) = _axes(nodes[m.start], nodes[m.end])
        z3 = sympy.zeros(3, 1)
        acts = {"bar": ((ex, z3), (-ex, z3)), "n": ((ex, z3), (-ex, z3)),
                "t": ((z3, ex), (z3, -ex)),
                "my_s": ((ez / L, -ey), (-ez / L, z3)), "my_e": ((-ez / L, z3), (ez / L, ey)),
                "mz_s": ((ey / L, ez), (-ey / L, z3)), "mz_e": ((-ey / L, z3), (ey / L, -ez))}
        cols = {}
        for _name, role in basic_forces(m):
            j = next(i for i, c in enumerate(topo.columns) if c.owner == mid and c.role == role)
            cols[role] = j
            for node, (f, mo) in zip((m.start, m.end), acts[role], strict=True):
                vec = list(f) + list(mo)
                for d, v in zip(DIRECTIONS, vec, strict=True):
                    key = f"{node}.{d}"
                    if key in topo.dof_index:
                        A[topo.dof_index[key], j] += v
        p = props[mid]
        for role, K in (("bar", p["EA"]), ("n", p["EA"]), ("t", p["GJ"])):
            if role in cols and K is not None:
                F[cols[role], cols[role]] += L / K
        for axis, K in (("my", p["EIy"]), ("mz", p["EIz"])):
            s_, e_ = cols.get(f"{axis}_s"), cols.get(f"{axis}_e")
            for i in (s_, e_):
                if i is not None:
                    F[i, i] += L / (3 * K)
            if s_ is not None and e_ is not None:
                F[s_, e_] += L / (6 * K)
                F[e_, s_] += L / (6 * K)
    for j, c in enumerate(topo.columns):
        if c.role == "reaction":
            A[topo.dof_index[c.name], j] = 1
            if c.name in springs:
                F[j, j] = 1 / springs[c.name]
    red, keep = sol.redundants, sol.keep
    A0 = A.extract(list(range(ndof)), keep)
    B = sympy.zeros(ncol, len(red))
    rhs = sympy.zeros(ndof, len(red))
    for k, r in enumerate(red):
        B[r, k] = 1
        rhs[:, k] = -A[:, r]
    solve0 = A0.LUsolve
    if red:
        Bk = solve0(rhs)
        for k in range(len(red)):
            for ii, j in enumerate(keep):
                B[j, k] = Bk[ii, k]
    delta = (B.T * F * B).applyfunc(sympy.cancel)
    out: dict[str, dict[str, dict[str, sympy.Expr]]] = {}
    for case in sol.cases:
        p = sympy.zeros(ndof, 1)
        for ld, comps in loads:
            if ld.case != case:
                continue
            for d, v in zip(DIRECTIONS, comps, strict=True):
                if v != 0:
                    p[topo.dof_index[f"{ld.node}.{d}"], 0] += v
        s0 = sympy.zeros(ncol, 1)
        y = solve0(-p)
        for ii, j in enumerate(keep):
            s0[j, 0] = y[ii, 0]
        X = (delta.LUsolve(-(B.T * F * s0))).applyfunc(sympy.simplify) if red else \
            sympy.zeros(0, 1)
        s = s0 + B * X
        names = [topo.columns[i].name for i in red]
        res = {"redundants": {n: sympy.simplify(X[k, 0]) for k, n in enumerate(names)},
               "reactions": {}, "displacements": {}}
        for j, c in enumerate(topo.columns):
            if c.role == "reaction":
                res["reactions"][c.name] = sympy.simplify(s[j, 0])
        strain = F * s
        for target in st.displacements:
            unit = sympy.zeros(ndof, 1)
            unit[topo.dof_index[target], 0] = 1
            su = sympy.zeros(ncol, 1)
            yy = solve0(-unit)
            for ii, j in enumerate(keep):
                su[j, 0] = yy[ii, 0]
            res["displacements"][target] = sympy.simplify((su.T * strain)[0, 0])
        out[case] = res
    return SpaceClosedForms(dict(ev.symbols), dict(ev.values), out)


def closed_form_lines(cf: SpaceClosedForms, units, cases=None) -> list[str]:
    """Plain text lines of the closed forms, with the units of each quantity."""
    lines = ["Closed forms (exact; parameters as symbols, in the case units): "
             + (", ".join(f"{n} = {cf.values[s]}" for n, s in cf.parameters.items())
                or "no [parameters]: exact numbers")]
    for case, res in cf.cases.items():
        if cases is not None and case not in cases:
            continue
        lines.append(f"Load case {case}:")
        for title, group in (("redundant", res["redundants"]), ("reaction", res["reactions"]),
                             ("displacement", res["displacements"])):
            for name, expr in group.items():
                d = name.rsplit(".", 1)[-1]
                if title == "displacement":
                    unit = "rad" if d in ROTATIONS else units.length
                else:
                    unit = (f"{units.force}*{units.length}" if d in ROTATIONS
                            or name.endswith((".t", ".my", ".mz")) else units.force)
                lines.append(f"  {title} {name} = {sympy.sstr(expr)}  [{unit}]")
    return lines


def closed_form_dict(cf: SpaceClosedForms, cases=None) -> dict:
    """The closed forms for ``--json``: each expression as text (sympy's plain form)."""
    return {"parameters": {n: str(cf.values[s]) for n, s in cf.parameters.items()},
            "cases": {case: {group: {k: sympy.sstr(v) for k, v in items.items()}
                             for group, items in res.items()}
                      for case, res in cf.cases.items() if cases is None or case in cases}}
