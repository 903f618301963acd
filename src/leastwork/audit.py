"""The audit trail of a solve as a :class:`~leastwork.sheet.Sheet`: every step of the force
method in the order an engineer does it by hand, with the numbers of the solve.

Results that also appear in the JSON result (redundants, flexibility, load terms,
reactions, end forces, displacements) are taken from :meth:`Solution.to_dict`, so the two
agree exactly. Contributions (member by member, term by term) are recomputed here from the
same energy terms the solver summed (:func:`leastwork.energy.flexibility_terms` and
:func:`leastwork.energy.initial_deformation_terms`); their sums equal the totals shown.
"""

from __future__ import annotations

import math

import numpy as np

from .elements import column_of, has_bending, kind_of
from .energy import flexibility_terms, initial_deformation_terms
from .errors import CaseError
from .fields import gauss_integral
from .loadkinds import load_kind
from .model import Structure
from .sheet import Formula, Grid, Para, Sheet, Step, fmt
from .solution import member_result
from .solve import CONDITION_WARN

__all__ = ["audit_sheet", "envelope_grids", "ASSUMPTIONS", "CAUTION", "energy_terms"]

ASSUMPTIONS = (
    "Linear elastic material, small displacements, plane (2D) structure; prismatic members; "
    "energy terms: bending and axial (beams without a cross-section area are axially rigid), "
    "axial for bars, springs; shear only when asked."
)
CAUTION = (
    "These results come from an idealised model. They must be checked by a qualified "
    "engineer against the governing local codes before they are used for any real structure."
)

_SUP = str.maketrans("0123456789-", "⁰¹²³⁴⁵⁶⁷⁸⁹⁻")


def energy_terms(st: Structure) -> str:
    """Plain list of the energy terms a solve of ``st`` includes."""
    terms = []
    members = st.members.values()
    if any(m.is_beam for m in members):
        terms.append("bending (beams)")
    if any(m.EA is not None for m in members):
        kinds = sorted({"bars" if not m.is_beam else "beams with an area"
                        for m in members if m.EA is not None})
        terms.append("axial (" + ", ".join(kinds) + ")")
    if st.shear:
        terms.append("shear (beams)")
    if any(r.is_spring for s in st.supports.values() for r in s.restraints):
        terms.append("support springs")
    text = "Energy terms included: " + ", ".join(terms) + "."
    rigid = [m.id for m in members if m.is_beam and m.EA is None]
    if rigid:
        text += f" Axially rigid (no area given): {', '.join(rigid)}."
    if not st.shear and any(m.is_beam for m in members):
        text += " Shear energy not included."
    return text


class _Units:
    """Units results are shown in: SI factors and labels for force^a * length^b."""

    def __init__(self, units):
        self.F = units.factor("force")
        self.L = units.factor("length")
        self.fu, self.lu = units.force, units.length

    def conv(self, value, f: int, l: int):
        """SI value of dimension force^f length^l in the case units."""
        return value / (self.F ** f * self.L ** l)

    def label(self, f: int, l: int) -> str:
        num = [u if e == 1 else f"{u}^{e}" for u, e in ((self.fu, f), (self.lu, l)) if e > 0]
        den = [u if e == -1 else f"{u}^{-e}" for u, e in ((self.fu, f), (self.lu, l)) if e < 0]
        top = "*".join(num) or "1"
        if not den:
            return top if num else "-"
        bottom = den[0] if len(den) == 1 else "(" + "*".join(den) + ")"
        return f"{top}/{bottom}"


def _col_dim(col) -> tuple[int, int]:
    """(force, length) exponents of a column's force."""
    return (1, 1) if col.is_moment else (1, 0)


def _disp_dim(col) -> tuple[int, int]:
    """(force, length) exponents of the displacement conjugate to a column."""
    return (0, 0) if col.is_moment else (0, 1)


def _poly_text(coef, var: str = "x", scale: float = 1.0) -> str:
    """Ascending coefficients as 'a + b·x + c·x²'; terms below 1e-12 * scale are left out."""
    coef = np.asarray(coef, dtype=float)
    ref = max(scale, float(np.max(np.abs(coef))) if coef.size else 0.0, 1e-300)
    parts = []
    for p, c in enumerate(coef):
        if abs(c) <= 1e-12 * ref:
            continue
        mag = fmt(abs(c))
        term = mag if p == 0 else (f"{mag}·{var}" if p == 1 else f"{mag}·{var}{str(p).translate(_SUP)}")
        if p > 0 and mag == "1":
            term = var if p == 1 else f"{var}{str(p).translate(_SUP)}"
        parts.append(("-" if c < 0 else "+", term))
    if not parts:
        return "0"
    text = ("-" if parts[0][0] == "-" else "") + parts[0][1]
    for sign, term in parts[1:]:
        text += f" {sign} {term}"
    return text


def _scaled_poly(coef, length_factor: float, value_factor: float) -> np.ndarray:
    """Coefficients of f(x_case) from those of f_SI(x_SI): c_p * Lf^p / value_factor."""
    coef = np.asarray(coef, dtype=float)
    return coef * length_factor ** np.arange(coef.size) / value_factor


def _pair_labels(n: int) -> list[tuple[int, int]]:
    return [(i, j) for i in range(n) for j in range(i, n)]


#: Largest number of local self-stress states written out in the audit trail.
AUDIT_MAX_LOCAL_STATES = 60


def audit_sheet(sol, case_names=None, *, meta: dict[str, str] | None = None) -> Sheet:
    """Build the audit trail of ``sol`` (a :class:`~leastwork.solution.Solution`) for the
    load cases ``case_names`` (default: all)."""
    ctx = _Context(sol, case_names)
    steps = (ctx.step_structure(), ctx.step_redundants(), ctx.step_released(),
             ctx.step_coefficients(), ctx.step_equations(), ctx.step_solution(),
             ctx.step_displacements(), ctx.step_check())
    st = sol.structure
    return Sheet(title=st.name, source=st.source, assumptions=(ASSUMPTIONS, energy_terms(st)),
                 steps=steps, cautions=(CAUTION,), meta=dict(meta or {}))


class _Context:
    """What every step needs: the solution, its JSON, units, energy terms."""

    def __init__(self, sol, case_names):
        self.sol = sol
        self.st = sol.structure
        self.topo = sol.topology
        self.u = _Units(sol.units)
        self.json = sol.to_dict()
        self.cases = list(case_names or sol.cases)
        self.red = list(sol.redundant_columns)
        self.cols = self.topo.columns
        self.rcols = [self.cols[j] for j in self.red]
        self.nred = len(self.red)
        self.terms = flexibility_terms(self.st, self.topo)
        # round-off of the released structure's solves shown as zero (display only)
        lref = max((self.st.length(m) for m in self.st.members), default=1.0)
        self.col_scale = np.array([lref if c.is_moment else 1.0 for c in self.cols])
        self.local = sol.basis == "local"
        if self.local and len(self.red) > AUDIT_MAX_LOCAL_STATES:
            raise CaseError(
                f"the audit trail (--steps, report) of {len(self.red)} local self-stress "
                "states would run to tens of thousands of lines; it is written out for up to "
                f"{AUDIT_MAX_LOCAL_STATES} states. Use --json for every number, the summary "
                "for the governing values, or plot for the diagrams",
                source=sol.structure.source)
        self.B = self._denoise(sol.B.toarray() if self.local else sol.B)
        from .report.jsonout import flexibility_rows

        self.flex = flexibility_rows(sol)  # dense, case units (the JSON is sparse if local)
        self.s0 = {k: self._denoise(r.s0[:, None])[:, 0] for k, r in sol.cases.items()}
        self.xdim = [_col_dim(c) for c in self.rcols]
        self._deformation_cache: dict[str, list] = {}
        self._source_cache: dict[str, dict] = {}
        self.ddim = [_disp_dim(c) for c in self.rcols]

    # ------------------------------------------------------------------ helpers
    def _denoise(self, states: np.ndarray) -> np.ndarray:
        """Columns of basic forces with entries below 1e-12 of the column's largest (moments
        measured per unit length of the longest member) set to zero."""
        scaled = np.abs(states) / self.col_scale[:, None]
        tol = 1e-12 * scaled.max(axis=0, initial=0.0)
        return np.where(scaled <= tol[None, :], 0.0, states)

    def x_label(self, i: int) -> str:
        return f"X{i + 1}"

    def unit_of_x(self, i: int) -> str:
        return self.u.label(*self.xdim[i])

    def delta_dim(self, i: int, j: int) -> tuple[int, int]:
        return (self.ddim[i][0] - self.xdim[j][0], self.ddim[i][1] - self.xdim[j][1])

    def unit_state(self, k: int, i: int) -> float:
        """Force in column k per unit X_i, in case units."""
        f, l = _col_dim(self.cols[k])
        return self.u.conv(self.B[k, i], f - self.xdim[i][0], l - self.xdim[i][1])

    def delta_label(self, i: int, j: int) -> str:
        """Unit of delta_ij: displacement (or rotation) at i per unit X_j."""
        if self.ddim[i] != (0, 0):
            return self.u.label(*self.delta_dim(i, j))
        per = self.u.label(*self.xdim[j])
        return f"rad/({per})" if "*" in per else f"rad/{per}"

    def load_label(self, i: int) -> str:
        return "rad" if self.ddim[i] == (0, 0) else self.u.lu

    def delta_case(self, value_si: float, i: int, j: int) -> float:
        return self.u.conv(value_si, *self.delta_dim(i, j))

    def load_term_case(self, value_si: float, i: int) -> float:
        return self.u.conv(value_si, *self.ddim[i])

    # ------------------------------------------------------------------ step 1
    def step_structure(self) -> Step:
        st, topo, u = self.st, self.topo, self.u
        nbeam = sum(m.is_beam for m in st.members.values())
        blocks: list = [Para(
            f"{len(st.nodes)} nodes, {len(st.members)} members ({nbeam} beams, "
            f"{len(st.members) - nbeam} bars), {len(topo.restraints)} reaction components; "
            f"{len(topo.dofs)} equilibrium equations, {len(topo.columns)} unknown forces "
            "(bar forces; beam axial forces and end moments; reactions).")]
        rows = []
        for m in st.members.values():
            a, b = st.nodes[m.start], st.nodes[m.end]
            hinges = ", ".join(k for k, h in (("start", m.hinge_start), ("end", m.hinge_end))
                               if h) or "-"
            rows.append((m.id, m.kind, f"{a.id} -> {b.id}", u.conv(st.length(m.id), 0, 1),
                         u.conv(m.EA, 1, 0) if m.EA is not None else "rigid",
                         u.conv(m.EI, 1, 2) if m.EI is not None else "-",
                         hinges if m.is_beam else "pins"))
        blocks.append(Grid("Members", ("member", "kind", "from -> to", f"L [{u.lu}]",
                                       f"EA [{u.fu}]", f"EI [{u.label(1, 2)}]", "hinges"),
                           tuple(rows)))
        rows = []
        for sup in st.supports.values():
            for r in sup.restraints:
                if r.is_spring:
                    kdim = (1, 0) if r.direction == "rz" else (1, -1)
                    what = f"spring k = {fmt(u.conv(r.stiffness, *kdim))} {u.label(*kdim)}"
                else:
                    what = "rigid"
                if r.direction == "n":
                    what += (f", normal to a surface at "
                             f"{fmt(math.degrees(sup.surface_angle or 0.0))} deg")
                rows.append((r.name, what))
        blocks.append(Grid("Supports (reaction components)", ("restraint", "kind"),
                           tuple(rows)))
        combos = dict(st.combinations)
        blocks.append(Grid("Loads", ("case", "load", "on", "values"),
                           tuple(_load_row(st, u, ld) for ld in st.loads
                                 if ld.case in self.cases and ld.case not in combos)))
        if combos:
            blocks.append(Grid("Load combinations (solved as load cases of factored loads)",
                               ("combination", "factors"),
                               tuple((name, " + ".join(f"{fmt(f)} × {c}" for c, f in parts))
                                     for name, parts in combos.items())))
        blocks.append(Para(
            f"Degree of indeterminacy by rank: {len(topo.columns)} unknown forces - rank "
            f"{topo.rank} of the equilibrium matrix = {topo.degree} "
            f"({topo.external} external, {topo.internal} internal)."))
        blocks.append(Formula(f"Counting formula: {topo.counting['formula']}"))
        if topo.counting["value"] != topo.degree:
            blocks.append(Para("The counting formula and the rank disagree: the rank result "
                               "governs (some members are arranged so that they cannot all "
                               "act).", "warning"))
        blocks.append(Para(f"Member graph: {topo.parts} connected part(s), {topo.loops} closed "
                           "loop(s) of members."))
        for name in topo.dropped:
            blocks.append(Para(f"Restraint {name} is ignored: every member end at that node "
                               "is hinged, so it can carry no moment.", "note"))
        return Step(1, "The structure and its degree of indeterminacy", tuple(blocks))

    # ------------------------------------------------------------------ step 2
    def step_redundants(self) -> Step:
        sol = self.sol
        if sol.chosen_by_user:
            why = "The redundants were chosen by the user; the choice was checked: the " \
                  "structure left is statically determinate and stable."
        else:
            why = ("The redundants were chosen automatically: member forces are kept first, "
                   "then reactions in the order written, each only if it is clearly "
                   "independent of those already kept (pivoted elimination on the "
                   "column-scaled equilibrium matrix); the forces left over are the "
                   "redundants.")
        if self.local:
            return self._local_states_step()
        blocks: list = [Para(why)]
        rows = []
        for i, c in enumerate(self.rcols):
            what = {"reaction": f"support restraint {c.name} removed",
                    "axial": f"member {c.owner} cut (its axial force released)",
                    "start_m": f"hinge put at the start of {c.owner}",
                    "end_m": f"hinge put at the end of {c.owner}"}[c.kind]
            rows.append((self.x_label(i), c.name, self.unit_of_x(i), what))
        if rows:
            blocks.append(Grid("Redundants and the released structure",
                               ("X", "redundant", "unit", "released by"), tuple(rows)))
        else:
            blocks.append(Para("No redundants: the structure is statically determinate."))
        n = len(self.topo.dofs)
        blocks.append(Para(
            f"Released structure: its equilibrium matrix is square ({n} equations, {n} "
            "forces) and non-singular, so it is statically determinate and stable; it is "
            "solved once for the loads and once for a unit value of each redundant."))
        return Step(2, "Redundants and the released structure", tuple(blocks))

    def _local_states_step(self) -> Step:
        """Step 2 for a local self-stress basis: which cut each state closes."""
        sol = self.sol
        blocks: list = [Para(
            "Local self-stress states (sparse path): the joints are swept outwards from a "
            "support; each force that the joints already reached can carry by themselves "
            "closes a self-stress found on the few members around it (the state holds that "
            "force at 1). Each state contains its own closing force and only forces met "
            "before it, so the states are independent; the closing forces are the "
            "redundants, and the structure left without them is the released structure.")]
        if sol.long_range_states:
            blocks.append(Para(f"{sol.long_range_states} state(s) reach across the structure "
                               "(found by one sparse factorisation at the end)."))
        rows = []
        for i, c in enumerate(self.rcols):
            what = {"reaction": f"support restraint {c.name}",
                    "axial": f"axial force of {c.owner}",
                    "start_m": f"moment at the start of {c.owner}",
                    "end_m": f"moment at the end of {c.owner}"}[c.kind]
            touched = sorted({self.cols[k].owner for k in np.flatnonzero(self.B[:, i])
                              if self.cols[k].kind != "reaction"})
            rows.append((self.x_label(i), c.name, self.unit_of_x(i), f"closes the cut of {what}",
                         ", ".join(touched)))
        if rows:
            blocks.append(Grid("States, the redundant each closes, and the members it touches",
                               ("X", "redundant", "unit", "state", "members"), tuple(rows)))
        n = len(self.topo.dofs)
        blocks.append(Para(
            f"Released structure: every force except the {len(rows)} redundants; its "
            f"equilibrium matrix is square ({n} equations, {n} forces) and non-singular "
            "(sparse LU), so it is statically determinate and stable; it is solved once for "
            "the loads. X are the amplitudes of the states; each redundant force is the sum "
            "of the states' values at its column."))
        return Step(2, "Redundants, local self-stress states and the released structure",
                    tuple(blocks))

    # ------------------------------------------------------------------ step 3
    def step_released(self) -> Step:
        st, u, topo = self.st, self.u, self.topo
        ci = topo.column_index
        blocks: list = []
        nr = self.nred
        pairs = _pair_labels(nr)
        axial = [m for m in st.members.values() if m.EA is not None]
        if nr and axial:
            heads = ["member", f"L [{u.lu}]", f"EA [{u.fu}]"]
            heads += [f"n{i + 1} [{u.label(1 - self.xdim[i][0], -self.xdim[i][1])}]"
                      for i in range(nr)]
            heads += [f"n{i + 1}·n{j + 1}·L/EA [{self.delta_label(i, j)}]"
                      for i, j in pairs]
            rows, tot = [], np.zeros(len(pairs))
            axial_terms = {t.owner: t for t in self.terms if t.term == "axial"}
            for m in axial:
                k = ci[column_of(m, "axial")]
                L = st.length(m.id)
                n = [self.unit_state(k, i) for i in range(nr)]
                flex = float(axial_terms[m.id].block[0, 0])  # the kind's L/EA
                prods = [self.delta_case(self.B[k, i] * self.B[k, j] * flex, i, j)
                         for i, j in pairs]
                tot += prods
                rows.append((m.id, u.conv(L, 0, 1), u.conv(m.EA, 1, 0), *n, *prods))
            per = "per unit state amplitude" if self.local else "per unit redundant"
            blocks.append(Grid(f"Axial forces of the released structure {per} "
                               "(bars, and beams with an area)", tuple(heads), tuple(rows),
                               total=("total", "", "", *[""] * nr, *tot)))
        beams = [m for m in st.members.values() if has_bending(m)]
        if nr and beams:
            rows = []
            for m in beams:
                L = st.length(m.id)
                polys = []
                for i in range(nr):
                    moment = self._unit_fields(m, i)["m"]
                    coef = _scaled_poly([*moment, 0.0][:2], u.L, u.F ** (
                        1 - self.xdim[i][0]) * u.L ** (1 - self.xdim[i][1]))
                    polys.append(_poly_text(coef))
                rows.append((m.id, u.conv(L, 0, 1), u.conv(m.EI, 1, 2), *polys))
            heads = ["beam", f"L [{u.lu}]", f"EI [{u.label(1, 2)}]"]
            heads += [f"m{i + 1}(x) [{u.label(1 - self.xdim[i][0], 1 - self.xdim[i][1])}]"
                      for i in range(nr)]
            blocks.append(Grid(f"Bending moments of the released structure per unit "
                               f"redundant (x from the start node, in {u.lu})", tuple(heads),
                               tuple(rows)))
            blocks.append(self._pair_table("bending", "∫ m{i}·m{j} dx / EI", pairs))
            if st.shear:
                blocks.append(self._pair_table("shear", "∫ v{i}·v{j} dx / GAs", pairs))
        springs = [t for t in self.terms if t.term == "spring"]
        if nr and springs:
            blocks.append(self._pair_table("spring", "r{i}·r{j} / k", pairs))
        for case in self.cases:
            blocks.extend(self._released_under_loads(case))
        return Step(3, "Released structure under the loads; the unit self-stress states"
                    if self.local else "Released structure under the loads and unit redundants",
                    tuple(blocks))

    def _unit_fields(self, m, i: int) -> dict:
        """Section-force fields (coefficients in x) of member ``m`` in unit state ``i``, as
        its kind gives them."""
        kind, ci = kind_of(m), self.topo.column_index
        values = [self.B[ci[bf.name], i] for bf in kind.basic_forces(m)]
        return kind.force_fields(m, self.st.length(m.id), values, 0.0)

    def _pair_table(self, term: str, pattern: str, pairs) -> Grid:
        B = self.B
        rows, tot = [], np.zeros(len(pairs))
        for t in self.terms:
            if t.term != term:
                continue
            Bt = B[list(t.columns)]
            vals = [self.delta_case(float(Bt[:, i] @ t.block @ Bt[:, j]), i, j)
                    for i, j in pairs]
            tot += vals
            rows.append((t.owner, *vals))
        heads = ["member" if term != "spring" else "restraint"]
        heads += [pattern.format(i=i + 1, j=j + 1) + f" [{self.delta_label(i, j)}]"
                  for i, j in pairs]
        what = {"bending": "Bending", "shear": "Shear", "spring": "Support spring"}[term]
        return Grid(f"{what} products of the unit states", tuple(heads), tuple(rows),
                    total=("total", *tot))

    def _released_under_loads(self, case: str) -> list:
        st, u, sol, topo = self.st, self.u, self.sol, self.topo
        res = sol.cases[case]
        ci = topo.column_index
        nr = self.nred
        out: list = []
        axial = [m for m in st.members.values() if m.EA is not None]
        if axial:
            heads = ["member", f"N0 [{u.fu}]"]
            heads += [f"∫ N0·n{i + 1} dx/EA [{self.load_label(i)}]" for i in range(nr)]
            rows, tot = [], np.zeros(nr)
            for m in axial:
                k = ci[column_of(m, "axial")]
                vec = self._load_sources(res).get((m.id, "loads, axial"), np.zeros(nr))
                vals = [self.load_term_case(float(vec[i]), i) for i in range(nr)]
                tot += vals
                rows.append((m.id, u.conv(self.s0[res.name][k], 1, 0), *vals))
            out.append(Grid(f"Load case {case}: axial forces of the released structure under "
                            "the loads", tuple(heads), tuple(rows),
                            total=("total", "", *tot) if nr else None))
        beams = [m for m in st.members.values() if has_bending(m)]
        if beams:
            heads = ["beam", f"from [{u.lu}]", f"to [{u.lu}]", f"M0(x) [{u.label(1, 1)}]"]
            heads += [f"∫ M0·m{i + 1} dx/EI [{self.load_label(i)}]" for i in range(nr)]
            rows, tot = [], np.zeros(nr)
            for m in beams:
                mr0 = member_result(st, topo, m.id, self.s0[case], res.loading.particulars.get(m.id))
                unit = [self._unit_fields(m, i)["m"] for i in range(nr)]
                EI = kind_of(m).section(m, m, st.shear)["m"]
                for a, b, coef in mr0.m.pieces():
                    vals = []
                    for i, mi in enumerate(unit):
                        f = gauss_integral(np.array([a, b]), lambda x, c=coef, mi=mi: (
                            np.polynomial.polynomial.polyval(x, c)
                            * np.polynomial.polynomial.polyval(x, mi)))
                        vals.append(self.load_term_case(f / EI, i))
                    tot += vals
                    rows.append((m.id, u.conv(a, 0, 1), u.conv(b, 0, 1),
                                 _poly_text(_scaled_poly(coef, u.L, u.F * u.L)), *vals))
            out.append(Grid(f"Load case {case}: bending moments of the released structure "
                            f"under the loads (x from the start node, in {u.lu})", tuple(heads),
                            tuple(rows), total=("total", "", "", "", *tot) if nr else None))
        return out

    def _deformations(self, res):
        """Initial deformation terms of load case ``res`` (computed once per case)."""
        if res.name not in self._deformation_cache:
            self._deformation_cache[res.name] = initial_deformation_terms(
                self.st, self.topo, res.loading.particulars, res.loading.imposed)
        return self._deformation_cache[res.name]

    # ------------------------------------------------------------------ step 4
    def step_coefficients(self) -> Step:
        nr = self.nred
        if not nr:
            return Step(4, "Flexibility coefficients and load terms",
                        (Para("No redundants: nothing to compute."),))
        B = self.B
        pairs = _pair_labels(nr)
        blocks: list = [Formula(
            "δij = Σ ∫ mi·mj/EI dx + Σ ∫ ni·nj/EA dx"
            + (" + Σ ∫ vi·vj/GAs dx" if self.st.shear else "") + " + Σ ri·rj/k",
            r"\delta_{ij} = \sum \int \frac{m_i m_j}{EI}\,dx + \sum \int \frac{n_i n_j}{EA}\,dx"
            + (r" + \sum \int \frac{v_i v_j}{GA_s}\,dx" if self.st.shear else "")
            + r" + \sum \frac{r_i r_j}{k}")]
        rows = []
        for t in self.terms:
            Bt = B[list(t.columns)]
            vals = [self.delta_case(float(Bt[:, i] @ t.block @ Bt[:, j]), i, j)
                    for i, j in pairs]
            if any(v != 0.0 for v in vals):
                rows.append((t.owner, t.term, *vals))
        flex = self.flex
        heads = ["member", "term"] + [f"δ{i + 1}{j + 1} [{self.delta_label(i, j)}]"
                                      for i, j in pairs]
        blocks.append(Grid("Flexibility coefficients, contribution of each member and term",
                           tuple(heads), tuple(rows), keys=2,
                           total=("δ", "total", *[flex[i][j] for i, j in pairs])))
        blocks.append(Formula(
            "δi0 = Σ ∫ mi·M0/EI dx + Σ ∫ ni·N0/EA dx (+ shear, springs) + Σ ∫ ni·α·ΔT dx "
            "+ Σ ∫ mi·α·ΔTgrad/h dx + Σ ni·e(misfit) - Σ ri·c(settlement)",
            r"\delta_{i0} = \sum\int \frac{m_i M_0}{EI}dx + \sum\int\frac{n_i N_0}{EA}dx"
            r" + \sum\int n_i\alpha\Delta T\,dx + \sum\int m_i\frac{\alpha\Delta T_g}{h}dx"
            r" + \sum n_i e - \sum r_i c"))
        for case in self.cases:
            res = self.sol.cases[case]
            rows = []
            for (owner, what), vec in self._load_sources(res).items():
                vals = [self.load_term_case(float(vec[i]), i) for i in range(nr)]
                if any(v != 0.0 for v in vals):
                    rows.append((owner, what, *vals))
            lt = self.json["cases"][case]["load_terms"]
            heads = ["source", "effect"] + [f"δ{i + 1}0 [{self.load_label(i)}]"
                                            for i in range(nr)]
            blocks.append(Grid(f"Load case {case}: load terms, contribution of each member, "
                               "term and imposed effect", tuple(heads), tuple(rows), keys=2,
                               total=("δ0", "total", *lt)))
        return Step(4, "Flexibility coefficients δij and load terms δi0, term by term",
                    tuple(blocks))

    def _load_sources(self, res) -> dict[tuple[str, str], np.ndarray]:
        """(owner, effect) -> vector over redundants (SI) of every load-term contribution
        of load case ``res`` (computed once per case)."""
        if res.name in self._source_cache:
            return self._source_cache[res.name]
        B, s0 = self.B, self.s0[res.name]
        out: dict[tuple[str, str], np.ndarray] = {}

        def add(owner, what, vec):
            out.setdefault((owner, what), np.zeros(self.nred))
            out[(owner, what)] += vec

        for t in self.terms:
            cols = list(t.columns)
            add(t.owner, "loads, " + t.term, B[cols].T @ (t.block @ s0[cols]))
        for d in self._deformations(res):
            what = "loads, " + d.effect[12:-1] if d.effect.startswith("span loads") else d.effect
            add(d.owner, what, B[d.column] * d.value)
        c = res.loading.settlement
        for j in np.flatnonzero(c):
            if j not in self.red:
                add(self.cols[j].name, "settlement", -B[j] * c[j])
        self._source_cache[res.name] = out
        return out

    # ------------------------------------------------------------------ step 5
    def step_equations(self) -> Step:
        nr = self.nred
        blocks: list = [Para(
            "Menabrea's least-work theorem (Castigliano's second theorem): the derivative of "
            "the complementary energy with respect to each redundant equals the imposed "
            "displacement at that redundant (zero unless a support settles there).")]
        if not nr:
            return Step(5, "Compatibility equations", (*blocks, Para("No redundants.")))
        blocks.append(Para(
            f"The flexibility matrix is symmetric (Maxwell-Betti); its condition number after "
            f"scaling the diagonal to one is {fmt(self.sol.condition, 3)} (above "
            f"{CONDITION_WARN:.0e} the tool warns and looks for better redundants)."))
        sym = [" + ".join(f"δ{i + 1}{j + 1}·X{j + 1}" for j in range(nr)) + f" + δ{i + 1}0"
               for i in range(nr)]
        for i in range(nr):
            blocks.append(Formula(f"∂U/∂X{i + 1} = {sym[i]} = Δ{i + 1}",
                                  rf"\frac{{\partial U}}{{\partial X_{i + 1}}} = "
                                  + " + ".join(rf"\delta_{{{i + 1}{j + 1}}} X_{j + 1}"
                                               for j in range(nr))
                                  + rf" + \delta_{{{i + 1}0}} = \Delta_{i + 1}"))
        for case in self.cases:
            cj = self.json["cases"][case]
            blocks.append(Para(f"Load case {case}:"))
            for i in range(nr):
                lhs = " + ".join(f"({fmt(self.flex[i][j])})·X{j + 1}"
                                 for j in range(nr))
                blocks.append(Formula(f"{lhs} + ({fmt(cj['load_terms'][i])}) = "
                                      f"{fmt(cj['imposed'][i])}"))
        return Step(5, "Compatibility equations ∂U/∂Xi = Δi", tuple(blocks))

    # ------------------------------------------------------------------ step 6
    def step_solution(self) -> Step:
        u, sol = self.u, self.sol
        blocks: list = []
        for case in self.cases:
            cj = self.json["cases"][case]
            res = sol.cases[case]
            X = res.redundants if res.amplitudes is None else res.amplitudes
            if self.nred and self.local:
                blocks.append(Grid(
                    f"Load case {case}: amplitudes of the states and the redundants they "
                    "close", ("X", "closes", "amplitude", "redundant force", "unit"),
                    tuple((self.x_label(i), c.name, self.u.conv(X[i], *self.xdim[i]),
                           cj["redundants"][c.name], self.unit_of_x(i))
                          for i, c in enumerate(self.rcols))))
            elif self.nred:
                blocks.append(Grid(f"Load case {case}: the redundants",
                                   ("X", "redundant", "value", "unit"),
                                   tuple((self.x_label(i), c.name, cj["redundants"][c.name],
                                          self.unit_of_x(i)) for i, c in enumerate(self.rcols))))
            heads = ["force", "unit", "released, loads"]
            heads += [f"X{i + 1}·(state {i + 1})" for i in range(self.nred)] + ["final"]
            rows = []
            for k, c in enumerate(self.cols):
                f, l = _col_dim(c)
                parts = [u.conv(X[i] * self.B[k, i], f, l)
                         for i in range(self.nred)]
                rows.append((c.name, u.label(f, l), u.conv(self.s0[res.name][k], f, l), *parts,
                             u.conv(res.s[k], f, l)))
            blocks.append(Formula("final force = released structure under the loads + "
                                  "Σ Xi · (unit state i)"))
            blocks.append(Grid(f"Load case {case}: superposition of the basic forces",
                               tuple(heads), tuple(rows), keys=2))
            rows = []
            for node, comps in cj["reactions"].items():
                rows.append((node, *[comps.get(d, "-") for d in ("x", "y", "rz", "n")]))
            blocks.append(Grid(f"Load case {case}: reactions (forces the supports apply to "
                               "the structure)", ("support", f"x [{u.fu}]", f"y [{u.fu}]",
                                                  f"rz [{u.label(1, 1)}]",
                                                  f"normal n [{u.fu}]"), tuple(rows)))
            rows = []
            for mid, mj in cj["members"].items():
                rows.append((mid, *[mj[e][q] for e in ("start", "end") for q in "nvm"]))
            ml = u.label(1, 1)
            blocks.append(Grid(f"Load case {case}: member end forces (n tension +, m with "
                               "the local -y face in tension +, v = dm/dx)",
                               ("member", f"n start [{u.fu}]", f"v start [{u.fu}]",
                                f"m start [{ml}]", f"n end [{u.fu}]", f"v end [{u.fu}]",
                                f"m end [{ml}]"), tuple(rows)))
            rows = [(mid, mj["m_max"]["value"], mj["m_max"]["at"], mj["m_min"]["value"],
                     mj["m_min"]["at"]) for mid, mj in cj["members"].items()
                    if self.st.members[mid].is_beam]
            if rows:
                blocks.append(Grid(f"Load case {case}: bending moment extremes along beams",
                                   ("beam", f"m max [{ml}]", f"at [{u.lu}]", f"m min [{ml}]",
                                    f"at [{u.lu}]"), tuple(rows)))
        blocks.extend(envelope_grids(sol, self.json))
        return Step(6, "Solution, superposition and reactions", tuple(blocks))

    # ------------------------------------------------------------------ step 7
    def step_displacements(self) -> Step:
        u, sol, st, topo = self.u, self.sol, self.st, self.topo
        blocks: list = [Para(
            "Unit-load method: a unit load (or couple) at the point and in the direction "
            "wanted, on the released structure (any released structure will do), does "
            "virtual work on the real deformations: Δ = Σ ∫ m_u·M/EI dx + Σ ∫ n_u·N/EA dx "
            "+ imposed deformations - Σ r_u·c.")]
        any_target = False
        for case in self.cases:
            cj = self.json["cases"][case]
            res = sol.cases[case]
            for target, value in cj["displacements"].items():
                any_target = True
                s_u, dim = _virtual_state(st, topo, res, target)
                s_final = self._denoise(res.s[:, None])[:, 0]
                if s_u is not None:
                    s_u = self._denoise(s_u[:, None])[:, 0]
                lab = "rad" if dim == (0, 0) else u.lu
                if s_u is None:
                    blocks.append(Para(f"Load case {case}: {target} = {fmt(value)} {lab} "
                                       "(a point inside a member: the unit load's own span "
                                       "field is included; see the total)."))
                    continue
                rows = []
                for t in self.terms:
                    cols = list(t.columns)
                    v = u.conv(float(s_u[cols] @ t.block @ s_final[cols]), *dim)
                    if v != 0.0:
                        rows.append((t.owner, t.term, v))
                for d in self._deformations(res):
                    v = u.conv(s_u[d.column] * d.value, *dim)
                    if v != 0.0:
                        rows.append((d.owner, d.effect, v))
                c = res.loading.settlement
                for j in np.flatnonzero(c):
                    v = u.conv(-s_u[j] * c[j], *dim)
                    if v != 0.0:
                        rows.append((self.cols[j].name, "settlement", v))
                blocks.append(Grid(f"Load case {case}: displacement {target}",
                                   ("source", "term", f"contribution [{lab}]"), tuple(rows),
                                   keys=2, total=(target, "total", value)))
            defl = [(mid, mj["deflection_max"]["value"], mj["deflection_max"]["at"])
                    for mid, mj in cj["members"].items() if "deflection_max" in mj]
            if defl:
                blocks.append(Grid(f"Load case {case}: largest deflection along each beam "
                                   "(perpendicular to the beam)",
                                   ("beam", f"deflection [{u.lu}]", f"at [{u.lu}]"),
                                   tuple(defl)))
        if not any_target:
            blocks.append(Para("No displacements were asked for ([analysis] displacements "
                               "or --at)."))
        return Step(7, "Displacements by the unit-load method", tuple(blocks))

    # ------------------------------------------------------------------ step 8
    def step_check(self) -> Step:
        blocks: list = [Para(
            "Equilibrium of every node and of the whole structure, recomputed from the final "
            "member end forces, the reactions and the loads as given (not from the "
            "equilibrium matrix).")]
        for case in self.cases:
            ch = self.json["cases"][case]["checks"]
            if ch["equilibrium_ok"]:
                blocks.append(Para(f"Load case {case}: largest residual "
                                   f"{fmt(ch['equilibrium_residual'])} {self.u.fu} "
                                   f"(tolerance {fmt(ch['equilibrium_tolerance'])}): OK."))
            else:
                blocks.append(Para(f"Load case {case}: EQUILIBRIUM CHECK FAILED — largest "
                                   f"residual {fmt(ch['equilibrium_residual'])} {self.u.fu} "
                                   f"exceeds {fmt(ch['equilibrium_tolerance'])}. These numbers "
                                   "must not be used.", "alarm"))
        for case in self.cases:
            c = self.sol.cases[case].stiffness
            if c is None:
                blocks.append(Para(f"Load case {case}: no cross-check by the direct stiffness "
                                   "method (skipped).", "note"))
            elif c.ok:
                blocks.append(Para(f"Load case {case}: the independent direct stiffness method "
                                   f"agrees: largest difference of reactions and end forces "
                                   f"{fmt(c.difference, 2)} of the largest force."))
            else:
                blocks.append(Para(f"Load case {case}: CROSS-CHECK FAILED — the direct "
                                   "stiffness method " + (f"gives no answer ({c.failure})"
                                   if c.difference is None else f"differs by "
                                   f"{fmt(c.difference, 2)} of the largest force at {c.where}")
                                   + ". These numbers must not be used before the cause is "
                                   "found.", "alarm"))
        for w in self.sol.warnings:
            blocks.append(Para(w, "warning"))
        return Step(8, "Equilibrium check, cross-check and caution", tuple(blocks))


def envelope_grids(sol, data: dict | None = None) -> list[Grid]:
    """Tables of the envelope over the load combinations of ``sol`` (none without them);
    ``data`` is ``sol.to_dict()`` when the caller has it already."""
    combos = [name for name, _ in sol.structure.combinations]
    if not combos:
        return []
    env = (data or sol.to_dict())["envelope"]
    u = _Units(sol.units)
    ml = u.label(1, 1)
    rows = []
    for mid, qs in env["members"].items():
        for q, unit in (("m", ml), ("v", u.fu), ("n", u.fu)):
            e = qs[q]
            rows.append((mid, f"{q} [{unit}]", e["max"]["value"], e["max"]["at"],
                         e["max"]["combination"], e["min"]["value"], e["min"]["at"],
                         e["min"]["combination"]))
    members = Grid(f"Envelope over the combinations ({', '.join(combos)}): section forces",
                   ("member", "force", "max", f"at [{u.lu}]", "governing", "min",
                    f"at [{u.lu}]", "governing"), tuple(rows), keys=2)
    rows = []
    for node, ds in env["reactions"].items():
        for d, e in ds.items():
            unit = ml if d == "rz" else u.fu
            rows.append((node, f"{d} [{unit}]", e["max"]["value"], e["max"]["combination"],
                         e["min"]["value"], e["min"]["combination"]))
    reactions = Grid("Envelope over the combinations: reactions",
                     ("support", "component", "max", "governing", "min", "governing"),
                     tuple(rows), keys=2)
    return [members, reactions]


def _virtual_state(st, topo, res, target: str):
    """Basic forces of the released structure under the unit load of ``target`` and the
    (force, length) exponents of the displacement; None for points inside members."""
    from .displacements import parse_target

    t = parse_target(st, topo, target, "displacements")
    di = topo.dof_index
    p = np.zeros(len(topo.dofs))
    if t.kind == "node":
        p[di[f"{t.a}.{t.direction}"]] = 1.0
        dim = (0, 0) if t.direction == "rz" else (0, 1)
    elif t.kind == "pair":
        na, nb = st.nodes[t.a], st.nodes[t.b]
        L = math.hypot(nb.x - na.x, nb.y - na.y)
        ex, ey = (nb.x - na.x) / L, (nb.y - na.y) / L
        p[di[f"{t.b}.x"]], p[di[f"{t.b}.y"]] = ex, ey
        p[di[f"{t.a}.x"]], p[di[f"{t.a}.y"]] = -ex, -ey
        dim = (0, 1)
    else:
        return None, (0, 1)
    return res.released.forces(p)[:, 0], dim


def _load_row(st: Structure, u: _Units, ld) -> tuple[str, str, str, str]:
    """(case, kind, on, values) of one load, in case units, as its kind describes it."""
    kind = load_kind(ld)
    return (ld.case, kind.words, *kind.describe(st, u, ld))
