"""Influence lines: a unit downward load moving along members, for every position at once.

A quantity Q (a reaction, a member's basic force, or a section force at a point) is a linear
function of the basic forces s (``Q = q . s``) plus, for a section force, the span-load field
of a load that stands on the section's own member. For a unit load at position x the force
method gives, as in :mod:`leastwork.solve` (no settlement, no temperature):

    s0(x): the released structure's forces,   e(x): the in-span initial deformations,
    X(x) = -delta^-1 B' (F s0(x) + e(x)),    s(x) = s0(x) + B X(x).

All positions are solved together: one multi-right-hand-side back-substitution on the
factorised released structure for s0, and one multi-right-hand-side solve with the
factorised flexibility matrix for X. No full solve is repeated per position.

Equivalently (Mueller-Breslau, from Maxwell-Betti and the symmetry of delta),
``Q(x) = q0(x) - lam . (F s0(x) + e(x))`` with ``lam = B delta^-1 B' q``: the influence line
is the released structure's own line corrected by the deformations it would do work on.
The form with X is used because it keeps the flexibility solver's treatment of redundants
without flexibility (taken as zero) exactly as a full solve does.

Signs follow docs/conventions.md: reactions are the forces the supports apply to the
structure; n tension positive; m positive with the local -y face in tension; v = dm/dx.
"""

from __future__ import annotations

import difflib
import re
from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np

from ..elements import carries_span_loads, column_of, kind_of, poly_eval
from ..energy import initial_deformation_terms
from ..errors import CaseError
from ..fields import ParticularFields
from ..model import Structure
from ..output.quantities import quantities

__all__ = [
    "QuantitySpec",
    "LoadPoint",
    "InfluenceLine",
    "reaction_rows",
    "parse_quantity",
    "parse_members",
    "load_points",
    "point_loading",
    "influence_line",
    "influence_to_dict",
    "MAX_INTERVALS",
]

#: Largest number of intervals per member accepted for ``--points``.
MAX_INTERVALS = 10000

_SOURCE = "command line"
#: Ordinates below this fraction of the largest one are round-off and reported as zero.
_ROUND_OFF = 1e-12
_SECTION = re.compile(r"^([A-Za-z0-9_]+)@([^.]+(?:\.[0-9]+)?(?:[eE][-+]?[0-9]+)?)\.(m|v|n)$")


@dataclass(frozen=True)
class QuantitySpec:
    """A reported quantity as a linear function of the basic forces.

    ``row`` (ncol,) weights the basic forces s (SI); ``dimension`` is "force" or "moment".
    For a section force, ``member``/``at`` (m from the start node)/``component`` ("m", "v",
    "n") say where, and the span-load field of a load on that member is added.
    """

    name: str
    dimension: str
    row: np.ndarray
    member: str | None = None
    at: float = 0.0
    component: str = ""


@dataclass(frozen=True)
class LoadPoint:
    """A position of the moving load: ``at`` m from the start node of ``member``.

    ``side`` is "start" or "end" for the two entries at a section's own position (the load
    just on that side of the section), else "".
    """

    member: str
    at: float
    side: str = ""


@dataclass(frozen=True)
class InfluenceLine:
    """Ordinates of ``quantity`` (SI: N or N*m) for a downward load of ``load`` N standing at
    each of ``points`` in turn."""

    quantity: QuantitySpec
    points: tuple[LoadPoint, ...]
    values: np.ndarray
    load: float


def reaction_rows(st: Structure, topo) -> dict[str, tuple[np.ndarray, str]]:
    """Each reported reaction component ``NODE.x|y|rz|n`` as (row over the basic forces,
    dimension), in the way the solution reports them: an inclined roller gives x, y (its
    global components) and n."""
    out: dict[str, tuple[np.ndarray, str]] = {}
    ncol = len(topo.columns)
    for sup in st.supports.values():
        comps: dict[str, np.ndarray] = {}
        for r in sup.restraints:
            j = topo.column_index.get(r.name)
            if j is None:  # an rz restraint dropped at a node without rotation
                continue
            if r.direction == "n":
                for d, w in (("x", r.vector[0]), ("y", r.vector[1]), ("n", 1.0)):
                    comps.setdefault(d, np.zeros(ncol))[j] += w
            else:
                comps.setdefault(r.direction, np.zeros(ncol))[j] += 1.0
        for d, row in comps.items():
            out[f"{sup.node}.{d}"] = (row, "moment" if d == "rz" else "force")
    return out


def _err(message: str, where: str) -> CaseError:
    return CaseError(message, source=_SOURCE, where=where)


def _hint(name: str, choices) -> str:
    close = difflib.get_close_matches(name, list(choices), n=1, cutoff=0.5)
    return f' (did you mean "{close[0]}"?)' if close else ""


def parse_quantity(st: Structure, topo, text: str, where: str = "--quantity") -> QuantitySpec:
    """Read a quantity: a reaction ``NODE.x|y|rz|n``; a member's basic force (a bar or beam
    id for its axial force, ``ID.n``, ``ID.start.m``, ``ID.end.m``); or a section force
    ``MEMBER@DISTANCE.m|v|n`` (DISTANCE a number in the case length unit).

    A beam's id alone is its basic axial force ``ID.n`` (the axial force at its end node;
    the same all along unless a load on the beam has a component along its axis).
    """
    text = text.strip()
    ncol = len(topo.columns)
    ci = topo.column_index
    reactions = reaction_rows(st, topo)
    if text in reactions:
        row, dim = reactions[text]
        return QuantitySpec(text, dim, row)
    col = None
    if text in st.members:
        col = ci[column_of(st.members[text], "axial")]
    elif text in ci and topo.columns[ci[text]].kind != "reaction":
        col = ci[text]
    if col is not None:
        row = np.zeros(ncol)
        row[col] = 1.0
        dim = "moment" if topo.columns[col].kind in ("start_m", "end_m") else "force"
        return QuantitySpec(text, dim, row)
    sec = _SECTION.match(text)
    if sec:
        return _section(st, topo, text, *sec.groups(), where=where)
    node_dir = re.match(r"^([A-Za-z0-9_]+)\.(x|y|rz|n)$", text)
    if node_dir and node_dir.group(1) in st.nodes:
        node = node_dir.group(1)
        have = sorted(k.split(".")[1] for k in reactions if k.split(".")[0] == node)
        detail = (f"its support gives {', '.join(have)}" if have
                  else "it has no support")
        raise _err(f'"{text}": node {node} has no reaction {node_dir.group(2)} ({detail})',
                   where)
    name = text.split(".")[0]
    if "." in text and name in st.members:
        m = st.members[name]
        forces = ", ".join(bf.name for bf in kind_of(m).basic_forces(m))
        raise _err(f'"{text}": no such force of member {name} (a hinged end has no moment; '
                   f"this {m.kind} has {forces})", where)
    known = [*reactions, *st.members, *[c.name for c in topo.columns]]
    raise _err(f'"{text}" is not a quantity of this structure{_hint(text, known)}; '
               "expected a reaction NODE.x|y|rz|n, a member id (its axial force), "
               "MEMBER.start.m, MEMBER.end.m or a section force MEMBER@DISTANCE.m|v|n", where)


def _section(st: Structure, topo, text: str, mid: str, dist: str, comp: str,
             where: str) -> QuantitySpec:
    if mid not in st.members:
        raise _err(f'"{text}": unknown member "{mid}"{_hint(mid, st.members)}', where)
    mem = st.members[mid]
    try:
        at = float(dist) * st.units.factor("length")
    except ValueError:
        raise _err(f'"{text}": distance "{dist}" is not a number (in {st.units.length})',
                   where) from None
    L = st.length(mid)
    if not (np.isfinite(at) and 0.0 <= at <= L * (1 + 1e-12)):
        uq = quantities(st.units)
        raise _err(f'"{text}": distance is off the member (length '
                   f"{uq.to_output(L, 'length'):g} {uq.length_unit})", where)
    at = min(at, L)
    kind = kind_of(mem)
    if mem.curve is not None:  # fields along the arc: (basic force, n/v/m) at the point
        from ..elements.curved import unit_values

        vals = unit_values(mem, np.array([at]))[:, "nvm".index(comp), 0]
        ci = topo.column_index
        row = np.zeros(len(topo.columns))
        for bf, value in zip(kind.basic_forces(mem), vals, strict=True):
            row[ci[bf.name]] = value
        return QuantitySpec(text, "force" if comp in ("v", "n") else "moment", row, mid, at,
                            comp)
    units = kind.unit_fields(mem, L, 1.0, 0.0)
    if not any(comp in u for u in units):
        raise _err(f'"{text}": {mid} is a {mem.kind} and carries axial force only; ask for '
                   f"{mid}@{dist}.n or {mid}", where)
    # the section force at x for a unit value of each basic force (solution.member_result)
    ci = topo.column_index
    row = np.zeros(len(topo.columns))
    for bf, u in zip(kind.basic_forces(mem), units, strict=True):
        if comp in u:
            row[ci[bf.name]] = poly_eval(u[comp], at / L)
    return QuantitySpec(text, "force" if comp in ("v", "n") else "moment", row, mid, at, comp)


def parse_members(st: Structure, text: str | Sequence[str], where: str = "--along") -> list[str]:
    """Member ids from a comma-separated list (or a sequence); unknown ids are refused."""
    items = text.split(",") if isinstance(text, str) else list(text)
    items = [t.strip() for t in items if t.strip()]
    if not items:
        raise _err("expected a comma-separated list of member ids, e.g. AB,BC", where)
    out: list[str] = []
    for mid in items:
        if mid not in st.members:
            raise _err(f'unknown member "{mid}"{_hint(mid, st.members)}', where)
        if mid in out:
            raise _err(f'member "{mid}" is listed twice', where)
        out.append(mid)
    return out


def load_points(st: Structure, along: Sequence[str], intervals: int = 10,
                quantity: QuantitySpec | None = None) -> tuple[LoadPoint, ...]:
    """Load positions: each member of ``along`` divided into ``intervals`` equal intervals
    (its two ends and ``intervals - 1`` interior points). When ``quantity`` is a section force
    on one of these members, its position is added; for v and n twice, the load just on the
    start side of the section and then just on the end side, so that the jump shows."""
    if not 1 <= intervals <= MAX_INTERVALS:
        raise _err(f"expected a number of intervals from 1 to {MAX_INTERVALS}, got {intervals}",
                   "--points")
    out: list[LoadPoint] = []
    for mid in along:
        L = st.length(mid)
        xs = [L * i / intervals for i in range(intervals + 1)]
        xs[-1] = L
        sec = quantity.at if quantity is not None and quantity.member == mid else None
        tol = 1e-9 * L
        inserted = False
        for x in xs:
            if sec is not None and not inserted and x >= sec - tol:
                out.extend(_section_points(mid, sec, quantity.component, L))
                inserted = True
                if abs(x - sec) <= tol:
                    continue
            out.append(LoadPoint(mid, x))
    return tuple(out)


def _section_points(mid: str, at: float, comp: str, L: float) -> list[LoadPoint]:
    inside = 1e-9 * L < at < L * (1 - 1e-9)
    if comp == "m" or not inside:
        return [LoadPoint(mid, at)]
    return [LoadPoint(mid, at, "start"), LoadPoint(mid, at, "end")]


def point_loading(st: Structure, topo, points: Sequence[LoadPoint], load: float):
    """Nodal loads P (ndof, k), initial deformations E (ncol, k) and the particular fields
    (or None) of a downward load of ``load`` N at each point.

    On a beam an interior load acts through the member's span-load field (as in
    :func:`leastwork.statics.case_loading`); on a bar, which takes no load along it, it
    reaches the two end nodes by the lever rule (as through a deck stringer simply supported
    between them).
    """
    ndof, ncol = len(topo.dofs), len(topo.columns)
    P = np.zeros((ndof, len(points)))
    E = np.zeros((ncol, len(points)))
    fields: list[ParticularFields | None] = []
    di = topo.dof_index
    for i, pt in enumerate(points):
        mem = st.members[pt.member]
        L = st.length(pt.member)
        tol = 1e-12 * max(L, 1.0)
        pf = None
        if pt.at <= tol or pt.at >= L - tol:
            P[di[f"{mem.start if pt.at <= tol else mem.end}.y"], i] -= load
        elif not carries_span_loads(mem):
            P[di[f"{mem.start}.y"], i] -= load * (1.0 - pt.at / L)
            P[di[f"{mem.end}.y"], i] -= load * pt.at / L
        else:
            pf = kind_of(mem).particular(mem, L, st.direction(pt.member),
                                         [(pt.at, 0.0, -load, 0.0)], [])
            for node, f in ((mem.start, pf.start_force), (mem.end, pf.end_force)):
                P[di[f"{node}.x"], i] += f[0]
                P[di[f"{node}.y"], i] += f[1]
            for t in initial_deformation_terms(st, topo, {pt.member: pf}, {}):
                E[t.column, i] += t.value
        fields.append(pf)
    return P, E, fields


def _flexibility_solver(sol):
    if sol.flexibility_solver is not None:
        return sol.flexibility_solver
    names = [sol.topology.columns[j].name for j in sol.redundant_columns]
    return sol.released.compatibility_solver(sol.flexibility, names, sol.structure.source)


def influence_line(sol, quantity: str | QuantitySpec, along: str | Sequence[str],
                   intervals: int = 10, units=None) -> InfluenceLine:
    """Influence line of ``quantity`` for a downward load of one force unit of ``units``
    (default: the solution's report units) moving along the members ``along``.

    Parameters
    ----------
    sol : Solution
        A solve of the structure (its own loads play no part).
    quantity : str or QuantitySpec
        See :func:`parse_quantity`.
    along : str or sequence of str
        Member ids (a comma-separated string or a list).
    intervals : int
        Equal intervals per member; the positions are the ends and the interior points.

    Returns
    -------
    InfluenceLine
        Ordinates in SI (N or N*m) for the load of ``InfluenceLine.load`` N.
    """
    st, topo = sol.structure, sol.topology
    units = units or sol.units
    q = quantity if isinstance(quantity, QuantitySpec) else parse_quantity(st, topo, quantity)
    members = parse_members(st, along)
    points = load_points(st, members, intervals, q)
    load = quantities(units).factor("force")
    P, E, fields = point_loading(st, topo, points, load)
    S0 = sol.released.forces(P)
    X = _flexibility_solver(sol).solve(-sol.B.T @ (sol.F @ S0 + E))
    S = S0 + sol.B @ X
    values = q.row @ S
    if q.member is not None:
        for i, (pt, pf) in enumerate(zip(points, fields, strict=True)):
            if pf is not None and pt.member == q.member:
                side = "left" if pt.side == "end" else "right"
                values[i] += float(getattr(pf, q.component)(q.at, side))
    return InfluenceLine(q, points, values, load)


def influence_to_dict(line: InfluenceLine, units, name: str = "") -> dict:
    """The JSON of ``leastwork influence``: ordinates in the report units (force or
    force*length per unit load), distances in the length unit."""
    uq = quantities(units)
    Lf = uq.factor("length")
    vf = uq.factor(line.quantity.dimension)
    value_unit = uq.unit(line.quantity.dimension)
    values = np.asarray(line.values, dtype=float) / vf
    top = float(np.max(np.abs(values))) if values.size else 0.0
    # a line that is zero everywhere still has round-off: the scale of a unit load's
    # effect is one force unit (times a member's length for a moment)
    reach = max((pt.at for pt in line.points), default=0.0) / Lf
    top = max(top, 1.0 if line.quantity.dimension == "force" else reach)
    values = np.where(np.abs(values) <= _ROUND_OFF * top, 0.0, values)
    points = []
    for pt, v in zip(line.points, values, strict=True):
        entry = {"member": pt.member, "at": _num(pt.at / Lf), "value": _num(v)}
        if pt.side:
            entry["side"] = pt.side
        points.append(entry)
    out = {
        "quantity": line.quantity.name,
        "units": {"force": uq.force_unit, "length": uq.length_unit, "moment": uq.moment_unit,
                  "value": value_unit, "load": f"1 {uq.force_unit} downward (-y)"},
        "points": points,
    }
    if name:
        out = {"name": name, **out}
    return out


def _num(x: float) -> float:
    x = float(x)
    return 0.0 if x == 0.0 else x
