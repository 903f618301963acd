"""What a space solve reports: the numbers in the output units (round-off shown as zero),
the JSON result (contract section 5.5) and the calculation sheet (the audit trail, rendered
by the shared terminal, Markdown and LaTeX renderers of :mod:`leastwork.output`)."""

from __future__ import annotations

import numpy as np

from ..output.audit.assumptions import CAUTION
from ..output.quantities import quantities
from ..output.reported import ROUND_OFF, number
from ..output.sheet import Formula, Grid, Para, Sheet, Step, fmt
from .members import FIELDS
from .model import ROTATIONS
from .solve import EQUILIBRIUM_TOL, SpaceSolution

__all__ = ["space_dict", "space_sheet", "ASSUMPTIONS", "MOMENT_FIELDS", "grid_summary"]

ASSUMPTIONS = (
    "Linear elastic material, small displacements, space (3D) structure; straight prismatic "
    "members; energy terms: axial, bending about local y and z, torsion T²/2GJ (beams), axial "
    "(bars), support springs; shear only when asked. Torsion is uniform (St Venant): warping "
    "of open sections is not included. Results must be checked by a qualified engineer "
    "against the governing codes."
)
#: Fields that are moments (the rest are forces).
MOMENT_FIELDS = ("t", "my", "mz")
_FIELD_TEXT = {"n": "N", "vy": "Vy", "vz": "Vz", "t": "T", "my": "My", "mz": "Mz"}
#: Short column heads of the energy terms on a sheet (the JSON keeps the full names).
_TERM_HEAD = {"axial": "axial", "torsion": "torsion", "bending about y": "bend y",
              "bending about z": "bend z", "shear along y": "shear y",
              "shear along z": "shear z", "springs": "springs", "misfit": "misfit",
              "temperature": "temp.", "settlements": "settle."}


def _head(term: str) -> str:
    if term.startswith("span loads ("):
        return "span " + _TERM_HEAD.get(term[len("span loads ("):-1], term)
    return _TERM_HEAD.get(term, term)


class _Units:
    """Output factors and the round-off scale of one case."""

    def __init__(self, sol: SpaceSolution, case):
        q = quantities(sol.structure.units)
        self.q = q
        self.F, self.M, self.D = q.factor("force"), q.factor("moment"), q.factor("displacement")
        st = sol.structure
        self.Lmax = max(st.length(m) for m in st.members)
        loads = [abs(v) for v in case.p] + [abs(v) for c in case.reactions.values()
                                            for v in c.values()]
        self.ftol = ROUND_OFF * max(loads + [1.0])
        self.dtol = ROUND_OFF * max([abs(v) for v in case.displacements.values()] + [1e-300])

    def force(self, v: float) -> float | None:
        return number(0.0 if abs(v) <= self.ftol else v / self.F)

    def moment(self, v: float) -> float | None:
        return number(0.0 if abs(v) <= self.ftol * self.Lmax else v / self.M)

    def field(self, f: str, v: float) -> float | None:
        return self.moment(v) if f in MOMENT_FIELDS else self.force(v)

    def direction(self, d: str, v: float) -> float | None:
        return self.moment(v) if d in ROTATIONS else self.force(v)

    def displacement(self, target: str, v: float) -> float | None:
        if abs(v) <= self.dtol:
            return 0.0
        return number(v if target.rsplit(".", 1)[1] in ROTATIONS else v / self.D)

    def column(self, col, v: float) -> float | None:
        return self.moment(v) if col.is_moment else self.force(v)


def _coef_factor(sol, i: int, j: int) -> float:
    """SI value of one output unit of delta_ij (conjugate displacement of i per force j)."""
    q = quantities(sol.structure.units)
    ci, cj = (sol.topology.columns[k] for k in (sol.redundants[i], sol.redundants[j]))
    top = q.factor("rotation" if ci.is_moment else "displacement")
    return top / q.factor("moment" if cj.is_moment else "force")


def _load_term_factor(sol, i: int) -> float:
    q = quantities(sol.structure.units)
    ci = sol.topology.columns[sol.redundants[i]]
    return q.factor("rotation" if ci.is_moment else "displacement")


def member_numbers(sol: SpaceSolution, case, u: _Units) -> dict:
    out = {}
    for mid, res in case.members.items():
        start, end = res.end_actions()
        entry: dict = {"kind": sol.structure.members[mid].kind,
                       "start": {f: u.field(f, start[f]) for f in FIELDS},
                       "end": {f: u.field(f, end[f]) for f in FIELDS}}
        ext = {}
        for f in ("my", "mz", "t", "vy", "vz", "n"):
            (hi, xhi), (lo, xlo) = res.fields[f].extremes()
            ext[f] = {"max": {"value": u.field(f, hi), "at": xhi / u.q.factor("length")},
                      "min": {"value": u.field(f, lo), "at": xlo / u.q.factor("length")}}
        entry["extremes"] = ext
        for f in ("my", "mz", "t"):  # the plane result's m_max / m_min, per moment
            entry[f"{f}_max"], entry[f"{f}_min"] = ext[f]["max"], ext[f]["min"]
        out[mid] = entry
    return out


def _energy_split(sol: SpaceSolution) -> dict[str, list[list[float | None]]]:
    """delta by energy term, in the flexibility's units."""
    n = len(sol.redundants)
    out = {}
    for term, part in sol.delta_parts.items():
        out[term] = [[number(part[i, j] / _coef_factor(sol, i, j)) for j in range(n)]
                     for i in range(n)]
    return out


def space_dict(sol: SpaceSolution, cases=None) -> dict:
    """The JSON result (contract sections 4 and 5.5)."""
    st, topo = sol.structure, sol.topology
    q = quantities(st.units)
    n = len(sol.redundants)
    names = sol.redundant_names
    flex = [[number(sol.delta[i, j] / _coef_factor(sol, i, j)) for j in range(n)]
            for i in range(n)]
    out_cases = {}
    for name, case in sol.cases.items():
        if cases is not None and name not in cases:
            continue
        u = _Units(sol, case)
        out_cases[name] = {
            "redundants": {nm: u.column(topo.columns[i], x)
                           for nm, i, x in zip(names, sol.redundants, case.X, strict=True)},
            "flexibility": flex,
            "load_terms": [number(case.load_terms[i] / _load_term_factor(sol, i))
                           for i in range(n)],
            "reactions": {nid: {d: u.direction(d, v) for d, v in comps.items()}
                          for nid, comps in case.reactions.items()},
            "members": member_numbers(sol, case, u),
            "displacements": {t: u.displacement(t, v) for t, v in case.displacements.items()},
            "checks": {"equilibrium_residual": number(case.equilibrium_residual),
                       "equilibrium_ok": bool(case.equilibrium_residual <= EQUILIBRIUM_TOL),
                       **_cross(sol)},
        }
    return {
        "schema": "leastwork.result/1",
        "name": st.name,
        "space": True,
        "units": q.table(),
        "indeterminacy": {"degree": topo.degree, "external": topo.external,
                          "internal": topo.internal, "stable": topo.stable,
                          "rank": topo.rank, "equations": len(topo.dofs),
                          "unknowns": len(topo.columns),
                          "counting": topo.counting["formula"]},
        "redundants": names,
        "flexibility_by_term": _energy_split(sol),
        "cases": out_cases,
        **_combinations(sol),
        "warnings": list(sol.warnings),
    }


def envelope(sol: SpaceSolution) -> dict:
    """Largest and smallest reactions and member extremes (My, Mz, T, N) over the load
    combinations, each with the combination that gives it (output units)."""
    names = [n for n, _ in sol.structure.combinations]
    if not names:
        return {}
    rows: dict = {"reactions": {}, "members": {}}

    def keep(table: dict, key: tuple, value, combo: str) -> None:
        node = table
        for k in key[:-1]:
            node = node.setdefault(k, {})
        entry = node.setdefault(key[-1], {"max": {"value": value, "combination": combo},
                                          "min": {"value": value, "combination": combo}})
        if value is not None and value > entry["max"]["value"]:
            entry["max"] = {"value": value, "combination": combo}
        if value is not None and value < entry["min"]["value"]:
            entry["min"] = {"value": value, "combination": combo}

    for name in names:
        case = sol.cases[name]
        u = _Units(sol, case)
        for nid, comps in case.reactions.items():
            for d, v in comps.items():
                keep(rows["reactions"], (nid, d), u.direction(d, v), name)
        for mid, res in case.members.items():
            for f in ("my", "mz", "t", "n"):
                (hi, _), (lo, _) = res.fields[f].extremes()
                keep(rows["members"], (mid, f), u.field(f, hi), name)
                keep(rows["members"], (mid, f), u.field(f, lo), name)
    return rows


def _combinations(sol: SpaceSolution) -> dict:
    combos = sol.structure.combinations
    if not combos:
        return {}
    return {"combinations": {n: dict(parts) for n, parts in combos}, "envelope": envelope(sol)}


def _cross(sol) -> dict:
    chk = sol.stiffness_check
    if chk is None:
        return {}
    return {"stiffness_cross_check": {"agrees": bool(chk.ok),
                                      "largest_relative_difference": number(chk.worst)}}


# ---------------------------------------------------------------- the sheet
def _structure_step(sol) -> Step:
    st, topo = sol.structure, sol.topology
    q = quantities(st.units)
    rows = []
    for m in st.members.values():
        ax = st.axes(m.id)
        y = "(" + ", ".join(fmt(float(v)) for v in np.where(abs(ax[1]) < 1e-12, 0.0, ax[1])) + ")"
        rel = ", ".join(f"{e}.{a}" for e, a in sorted(m.releases)) or "-"
        rows.append((m.id, m.kind, f"{m.start}-{m.end}", st.length(m.id) / q.factor("length"),
                     y, rel))
    blocks = [
        Grid("Members (local y as global components; releases)",
             ("member", "kind", "nodes", f"L ({q.length_unit})", "local y", "releases"),
             tuple(rows)),
        Para(f"Equilibrium matrix A: {len(topo.dofs)} equations (x, y, z at every joint; "
             "rx, ry, rz where a member end passes a moment) by "
             f"{len(topo.columns)} unknowns (basic forces and reactions); rank {topo.rank}."),
        Formula(f"degree = unknowns − rank = {len(topo.columns)} − {topo.rank} = "
                f"{topo.degree}  (external {topo.external}, internal {topo.internal})"),
        Para("Counting formula (shown beside the rank, never used alone): "
             + topo.counting["formula"]),
    ]
    if topo.dropped:
        blocks.append(Para("Rotational restraints at joints where no member passes a moment "
                           "(left out): " + ", ".join(topo.dropped), "note"))
    return Step(1, "Structure, equilibrium and degree of indeterminacy", tuple(blocks))


def _redundant_step(sol) -> Step:
    names = sol.redundant_names
    text = ("Redundants: " + ", ".join(names)) if names else (
        "The structure is statically determinate: no redundants.")
    blocks: list = [Para(text), Para(
        "Released structure: the structure with these forces set to zero, statically "
        "determinate and stable (its equilibrium matrix A0 is square and non-singular). "
        "Span loads act on each beam as on a member pinned at its start and on a roller "
        "along its axis at its end (twist held at the start).")]
    return Step(2, "Redundants and released structure", tuple(blocks))


def _state_step(sol) -> Step:
    """Basic forces of the released structure for a unit value of each redundant."""
    topo = sol.topology
    names = sol.redundant_names
    q = quantities(sol.structure.units)

    def factor(col) -> float:
        return q.factor("moment" if col.is_moment else "force")

    rows = []
    for j, c in enumerate(topo.columns):
        vals = [v * factor(topo.columns[k]) / factor(c) for v, k in zip(sol.B[j], sol.redundants,
                                                                        strict=True)]
        if not np.any(np.abs(sol.B[j]) > 1e-12):
            continue
        rows.append((c.name, *[0.0 if abs(b) < 1e-12 else float(v)
                               for v, b in zip(vals, sol.B[j], strict=True)]))
    blocks: list = []
    if names:
        blocks.append(Para(f"Each column: the forces (in {q.force_unit} or {q.moment_unit}) "
                           f"for X = 1 {q.force_unit} (or 1 {q.moment_unit}); forces not "
                           "listed are zero."))
        blocks.append(Grid("Unit-redundant states", ("force", *[f"X={n}" for n in names]),
                           tuple(rows)))
    else:
        blocks.append(Para("No redundants: the loads alone fix every force."))
    return Step(3, "Unit-redundant states", tuple(blocks))


def _coefficient_step(sol) -> Step:
    names = sol.redundant_names
    n = len(names)
    if not n:
        return Step(4, "Flexibility coefficients", (Para("None (no redundants)."),))
    q = quantities(sol.structure.units)
    blocks: list = [Formula("δij = Σ members ∫ (ni nj/EA + ti tj/GJ + myi myj/EIy + mzi mzj/EIz"
                            " [+ shear]) dx + Σ springs Ri Rj/k")]
    terms = list(sol.delta_parts)
    rows = []
    for i in range(n):
        for j in range(i, n):
            f = _coef_factor(sol, i, j)
            rows.append((f"δ[{names[i]}, {names[j]}]",
                         *[float(sol.delta_parts[t][i, j] / f) for t in terms],
                         float(sol.delta[i, j] / f)))
    blocks.append(Para(f"Units: {q.displacement_unit} or rad per {q.force_unit} or per "
                       f"{q.moment_unit}. Each energy term in its own column."))
    blocks.append(Grid("Flexibility by energy term", ("coefficient", *map(_head, terms),
                                                      "total"), tuple(rows)))
    return Step(4, "Flexibility coefficients (term by term)", tuple(blocks))


def _equation_step(sol, case_names) -> Step:
    names = sol.redundant_names
    n = len(names)
    blocks: list = []
    for name, case in sol.cases.items():
        if case_names is not None and name not in case_names:
            continue
        u = _Units(sol, case)
        if n:
            terms = list(case.load_term_parts)
            rows = tuple((names[i], *[float(case.load_term_parts[t][i] / _load_term_factor(sol, i))
                                      for t in terms],
                          float(case.load_terms[i] / _load_term_factor(sol, i)))
                         for i in range(n))
            blocks.append(Grid(f"Load terms δi0 ({name})", ("redundant", *map(_head, terms),
                                                             "δi0"), rows))
            for i in range(n):
                lhs = " + ".join(f"({fmt(sol.delta[i, j] / _coef_factor(sol, i, j))})·X[{names[j]}]"
                                 for j in range(n))
                f = _load_term_factor(sol, i)
                d0, rhs = case.load_terms[i] / f, case.imposed[i] / f
                blocks.append(Formula(f"{lhs} + ({fmt(d0)}) = {fmt(rhs)}"))
            blocks.append(Grid(f"Redundants ({name})", ("redundant", "value", "unit"),
                               tuple((nm, u.column(sol.topology.columns[k], x) or 0.0,
                                      u.q.unit("moment" if sol.topology.columns[k].is_moment
                                               else "force"))
                                     for nm, k, x in zip(names, sol.redundants, case.X,
                                                         strict=True))))
        else:
            blocks.append(Para(f"Load case {name}: no compatibility equations."))
    if sol.warnings:
        blocks += [Para(w, "warning") for w in sol.warnings]
    return Step(5, "Compatibility equations and their solution", tuple(blocks))


def _result_step(sol, case_names) -> Step:
    q = quantities(sol.structure.units)
    blocks: list = [Para("Superposition: every force = its value in the released structure "
                         "under the loads + Σ Xi · its value for a unit redundant i.")]
    for name, case in sol.cases.items():
        if case_names is not None and name not in case_names:
            continue
        blocks += _case_grids(sol, name, case, q)
    return Step(6, "Results", tuple(blocks))


def _case_grids(sol, name, case, q) -> list:
    u = _Units(sol, case)
    out: list = []
    rrows = []
    for nid, comps in case.reactions.items():
        for d, v in comps.items():
            rrows.append((f"{nid}.{d}", u.direction(d, v) or 0.0,
                          q.moment_unit if d in ROTATIONS else q.force_unit))
    out.append(Grid(f"Reactions ({name})",
                    ("reaction", "value", "unit"), tuple(rrows)))
    erows = []
    for mid, res in case.members.items():
        s, e = res.end_actions()
        for end, vals in (("start", s), ("end", e)):
            erows.append((mid, end, *[u.field(f, vals[f]) or 0.0 for f in FIELDS]))
    out.append(Para(f"Reactions: applied by the supports. End actions: N, Vy, Vz in "
                    f"{q.force_unit}; T, My, Mz in {q.moment_unit} (signs: docs/space.md)."))
    out.append(Grid(f"End actions ({name})", ("member", "end", *[_FIELD_TEXT[f] for f in FIELDS]),
                    tuple(erows), keys=2))
    out.append(grid_summary(sol, case, u))
    if case.displacements:
        out.append(Grid(f"Displacements ({name}, unit-load method)",
                        ("at", "value", "unit"),
                        tuple((t, u.displacement(t, v) or 0.0,
                               "rad" if t.rsplit(".", 1)[1] in ROTATIONS else q.displacement_unit)
                              for t, v in case.displacements.items())))
    return out


def grid_summary(sol, case, u) -> Grid:
    """Per member: the largest (in size, signed) bending moment about each axis, twist,
    shears and axial force: the grid summary (bending, twist and shear per member)."""
    rows = []
    for mid, res in case.members.items():
        vals = []
        for f in ("my", "mz", "t", "vz", "vy", "n"):
            (hi, _), (lo, _) = res.fields[f].extremes()
            big = hi if abs(hi) >= abs(lo) else lo
            vals.append(u.field(f, big) or 0.0)
        rows.append((mid, *vals))
    return Grid(f"Largest per member ({case.name})",
                ("member", "My", "Mz", "T", "Vz", "Vy", "N"), tuple(rows))


def _check_step(sol, case_names) -> Step:
    blocks: list = []
    for name, case in sol.cases.items():
        if case_names is not None and name not in case_names:
            continue
        ok = case.equilibrium_residual <= EQUILIBRIUM_TOL
        blocks.append(Para(f"Load case {name}: overall equilibrium of loads and reactions "
                           f"(forces and moments about the joints' centroid): relative "
                           f"residual {case.equilibrium_residual:.1e} — "
                           + ("satisfied." if ok else "FAILED: do not use these results."),
                           "plain" if ok else "alarm"))
    chk = sol.stiffness_check
    if chk is not None:
        blocks.append(Para(chk.message[0].upper() + chk.message[1:] + ".",
                           "plain" if chk.ok else "alarm"))
    else:
        blocks.append(Para("The direct-stiffness cross-check was not run.", "note"))
    return Step(7, "Checks", tuple(blocks))


def space_sheet(sol: SpaceSolution, case_names=None, meta=None, full: bool = True) -> Sheet:
    """The calculation sheet; ``full=False`` gives the summary (structure, redundants,
    results, checks)."""
    st = sol.structure
    steps = [_structure_step(sol), _redundant_step(sol)]
    if full:
        steps += [_state_step(sol), _coefficient_step(sol), _equation_step(sol, case_names)]
    steps += [_result_step(sol, case_names), _check_step(sol, case_names)]
    if not full:
        steps = [Step(i + 1, s.title, s.blocks) for i, s in enumerate(steps)]
    terms = sorted({t for blocks in sol.member_terms.values() for t in blocks}
                   | ({"springs"} if "springs" in sol.delta_parts else set()))
    import pathlib

    return Sheet(title=st.name, source=pathlib.Path(st.source).name,
                 assumptions=(ASSUMPTIONS, "Energy terms in this structure: "
                              + (", ".join(terms) or "none") + "."),
                 steps=tuple(steps), cautions=(CAUTION,), meta=dict(meta or {}))


