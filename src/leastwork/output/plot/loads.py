"""The loads of one load case drawn on the structure, one drawer per load kind.

:data:`LOAD_DRAWERS` maps each load class of :mod:`leastwork.model` to its pass and its
drawer; a new load kind adds one drawer there. The passes run in the order of
:data:`PASSES`, each over the loads in the order of the case: concentrated forces and
couples first (added up per point, then drawn once per point), span loads next (stacked
outwards when several act on one member), imposed effects last (temperature, misfit,
settlement), so that each label finds room around those placed before it.
"""

from __future__ import annotations

import math
from collections.abc import Callable
from dataclasses import dataclass, field

import numpy as np

from ...model import (
    DistributedLoad,
    Misfit,
    NodalLoad,
    PointLoad,
    Settlement,
    Structure,
    TemperatureLoad,
)
from .arrows import node_arrow
from .geometry import MemberAxis, case_units, clear_spot, crossings, member_axes, xy
from .numbers import number
from .panel import Panel
from .style import IMPOSED, LOAD, NAMED_MEMBERS_MAX


@dataclass
class LoadSketch:
    """What the drawers of one load case share."""

    pn: Panel
    st: Structure
    uf: dict[str, tuple[float, str]]  #: case units (see geometry.case_units)
    la: float  #: length of a load arrow (m)
    #: concentrated loads added up per point: key -> [point, fx, fy, mz] (SI)
    points: dict[tuple, list] = field(default_factory=dict)
    #: span loads drawn so far per member (each next one further out)
    stack: dict[str, int] = field(default_factory=dict)
    #: span loads and temperatures alike on several curved members (the arcs of one arch):
    #: key -> [arcs carrying it, the arc whose label is drawn (the one nearest the middle
    #: of the structure, so that the label goes up rather than out to the side)]
    arcs: dict[tuple, list] = field(default_factory=dict)

    def arc_label(self, ld, text: str) -> str | None:
        """The label of a load on a curved member: shared by the arcs carrying the same
        load (drawn once, saying on how many arcs); None on the other arcs."""
        n, chosen = self.arcs[_arc_key(self.st, ld)]
        if n == 1:
            return text
        return f"{text} on {n} arcs" if ld is chosen else None

    def add_point_load(self, key: tuple, p: np.ndarray, ld) -> None:
        acc = self.points.setdefault(key, [p, 0.0, 0.0, 0.0])
        acc[1] += ld.fx
        acc[2] += ld.fy
        acc[3] += ld.mz


# ---------------------------------------------------------------------------- concentrated


def _nodal(sk: LoadSketch, ld: NodalLoad) -> None:
    sk.add_point_load(("node", ld.node), xy(sk.st, ld.node), ld)


def _point(sk: LoadSketch, ld: PointLoad) -> None:
    sk.add_point_load(("member", ld.member, round(ld.at, 9)),
                      np.array(sk.st.point(ld.member, ld.at)), ld)


def _draw_point_loads(sk: LoadSketch) -> None:
    """The concentrated forces and couples, one arrow and one turning arrow per point: at
    a node the arrow has one end on the node (pushing on it, or pulling where members,
    the support or earlier arrows are in the way); on a member it pushes on its point."""
    pn, st = sk.pn, sk.st
    ff, fu = sk.uf["force"]
    mf, mu = sk.uf["moment"]
    la = sk.la
    crowded = len(st.members) > NAMED_MEMBERS_MAX
    shown: set[str] = set()  # on a crowded drawing, each value is written once
    for key, (p, fx, fy, mz) in sk.points.items():
        f = np.array([fx, fy])
        mag = float(np.hypot(*f))
        if mag > 0:
            d = f / mag
            text = f"{number(mag / ff)} {fu}"
            node = key[1] if key[0] == "node" else None
            if node is not None:
                far, shaft = node_arrow(pn, st, node, d, la, color=LOAD, what="load",
                                        support_ok=False, lw=1.2)
            else:
                tail, tip = p - d * la, p
                pn.arrow(tail, tip, color=LOAD, lw=1.2, what="load")
                pn.keep_off([tail, tip])
                far, shaft = tail, -d
            if not (crowded and text in shown):
                pn.label(far, text, direction=shaft, color=LOAD, must=True, gap=0.2 * pn.h)
            shown.add(text)
        if mz:
            q = pn.arc_arrow(p, 0.9 * pn.h, mz > 0, color=LOAD)
            text = f"{number(abs(mz) / mf)} {mu}"
            if not (crowded and text in shown):
                pn.label(q, text, color=LOAD, must=True)
            shown.add(text)
    if crowded and len(shown) < len(sk.points):
        pn.key.append(f"over {NAMED_MEMBERS_MAX} members: equal concentrated loads have "
                      "their value written at one of them only")


# ---------------------------------------------------------------------------- span loads


def _range_text(name: str, pair, f: float, unit: str) -> str:
    a0, a1 = (number(v / f) for v in pair)
    return f"{name} = {a0}" + ("" if pair[0] == pair[1] else f" to {a1}") + f" {unit}"


def _distributed(sk: LoadSketch, ld: DistributedLoad) -> None:
    """A row of arrows on the loaded length with a line along their tails, on the side the
    load comes from, further out for each earlier span load on the member."""
    pn, st, la = sk.pn, sk.st, sk.la
    wf, wu = sk.uf["distributed"]
    o, ex, ey = member_axes(st, ld.member)
    L = st.length(ld.member)
    a, b = ld.start, (L if math.isnan(ld.end) else ld.end)
    k = sk.stack.get(ld.member, 0)
    sk.stack[ld.member] = k + 1
    wmax = max(np.hypot(ld.wx[i], ld.wy[i]) for i in (0, 1))
    if wmax <= 0:
        return
    n = max(3, int(round((b - a) / (0.055 * pn.size))) + 1)
    s = np.linspace(a, b, n)
    frac = (s - a) / (b - a)
    wx = ld.wx[0] + (ld.wx[1] - ld.wx[0]) * frac
    wy = ld.wy[0] + (ld.wy[1] - ld.wy[0]) * frac
    axis = MemberAxis(st, ld.member)
    on_axis = axis.at(s)
    if ld.frame == "local":  # along the tangent and local +y of the arc
        nrm = axis.normal(s)
        t_vec = np.column_stack([nrm[:, 1], -nrm[:, 0]])
        vec = wx[:, None] * t_vec + wy[:, None] * nrm
        wx, wy = vec[:, 0], vec[:, 1]
    mean = np.array([np.mean(wx), np.mean(wy)])
    out = -mean / np.hypot(*mean) if np.hypot(*mean) > 0 else ey
    shift = out * k * 1.25 * la
    length = 0.75 * la
    tails = []
    for pt, wxi, wyi in zip(on_axis, wx, wy, strict=True):
        tip = pt + shift
        w = np.array([wxi, wyi]) / wmax
        tail = tip - w * length if np.hypot(*w) > 0 else tip
        tails.append(tail)
        if np.hypot(*w) > 0.05:
            pn.arrow(tail, tip, color=LOAD, lw=0.6, head=0.35 * pn.h)
    pn.line(tails, color=LOAD, lw=0.8, z=5)
    names = ("wt", "wn") if ld.frame == "local" else ("wx", "wy")
    parts = [_range_text(nm, pr, wf, wu)
             for nm, pr in ((names[0], ld.wx), (names[1], ld.wy)) if any(pr)]
    if ld.frame == "projection":
        parts[-1] += " per projection"
    mid = len(tails) // 2
    text = ", ".join(parts)
    if axis.curve is not None:  # the arcs of one arch carrying the same load: one label
        text = sk.arc_label(ld, text)
    if text is not None:
        pn.label(tails[mid], text, direction=out, color=LOAD, must=True)
    pn.occupy(np.vstack([tails, on_axis + shift]))


# ---------------------------------------------------------------------------- imposed effects


def _temperature(sk: LoadSketch, ld: TemperatureLoad) -> None:
    """Dash-dotted lines along the warmer face, or both faces for a uniform change."""
    pn, st = sk.pn, sk.st
    axis = MemberAxis(st, ld.member)
    L = st.length(ld.member)
    s = np.linspace(0.08 * L, 0.92 * L, 2 if axis.curve is None else 49)
    sides = [1.0, -1.0] if ld.gradient == 0 else ([-1.0] if ld.gradient > 0 else [1.0])
    for sd in sides:  # the warmer face, or both faces for a uniform change (along the arc)
        pn.line(axis.at(s) + sd * 0.35 * pn.h * axis.normal(s), color=IMPOSED,
                lw=1.0, ls=(0, (4, 1.5, 1, 1.5)), z=4)
    c, ey = axis.at(0.5 * L)[0], axis.normal(0.5 * L)[0]
    text = f"temperature: uniform {number(ld.uniform)} K"
    if ld.gradient:
        text += f", gradient {number(ld.gradient)} K (warmer face marked)"
    if axis.curve is not None:  # the arcs of one arch warmed alike: one label
        text = sk.arc_label(ld, text)
    if text is not None:
        pn.label(c + ey * 0.4 * pn.h, text, direction=ey, color=IMPOSED, must=True)


def _misfit(sk: LoadSketch, ld: Misfit) -> None:
    """Two strokes across the member with the length error."""
    pn, st = sk.pn, sk.st
    lf, lu = sk.uf["displacement"]
    axis = MemberAxis(st, ld.member)
    at = clear_spot(crossings(st)[ld.member], pn.marks.get(ld.member, []),
                    prefer=(0.7, 0.3, 0.75, 0.25, 0.6, 0.4))  # off crossings and cuts
    pn.marks.setdefault(ld.member, []).append(at)
    c = axis.at(at * st.length(ld.member))[0]
    ey = axis.normal(at * st.length(ld.member))[0]
    ex = np.array([ey[1], -ey[0]])
    for s in (-0.18, 0.18):
        pn.line([c + ex * s * pn.h - ey * 0.5 * pn.h, c + ex * s * pn.h + ey * 0.5 * pn.h],
                color=IMPOSED, lw=1.4, z=6)
    how = "too short" if ld.elongation < 0 else "too long"
    pn.label(c - ey * 0.5 * pn.h, f"misfit {number(ld.elongation / lf)} {lu} ({how})",
             direction=-ey, color=IMPOSED, must=True)


def _settlement(sk: LoadSketch, ld: Settlement) -> None:
    """For each imposed component a dashed arrow in the sense of the movement with one end
    on the support's node (a turning arrow around it for a rotation)."""
    pn, st = sk.pn, sk.st
    lf, lu = sk.uf["displacement"]
    p = xy(st, ld.node)
    for d, v in ld.values:
        if not v:
            continue
        if d == "rz":
            q = pn.arc_arrow(p, 1.1 * pn.h, v > 0, color=IMPOSED)
            pn.arrows.append((p, p, "settlement"))
            pn.label(q, f"settlement rz = {number(v)} rad", color=IMPOSED, must=True)
            continue
        if d == "n":
            vec = np.array(next(r.vector[:2] for r in st.supports[ld.node].restraints
                                if r.direction == "n"), dtype=float)
        else:
            vec = np.array([1.0, 0.0]) if d == "x" else np.array([0.0, 1.0])
        vec = vec * (1 if v > 0 else -1)
        far, shaft = node_arrow(pn, st, ld.node, vec, 2.2 * pn.h, color=IMPOSED,
                                what="settlement", support_ok=True, lw=1.1, ls="--")
        pn.label(far, f"settlement {d} = {number(v / lf)} {lu}", direction=shaft,
                 color=IMPOSED, must=True, gap=0.2 * pn.h)


# ---------------------------------------------------------------------------- the registry

#: The drawing passes in order, with what is drawn when a pass is over.
PASSES: tuple[tuple[str, Callable[[LoadSketch], None] | None], ...] = (
    ("concentrated", _draw_point_loads),
    ("span", None),
    ("imposed", None),
)

#: Load class -> (pass, drawer of one load).
LOAD_DRAWERS: dict[type, tuple[str, Callable]] = {
    NodalLoad: ("concentrated", _nodal),
    PointLoad: ("concentrated", _point),
    DistributedLoad: ("span", _distributed),
    TemperatureLoad: ("imposed", _temperature),
    Misfit: ("imposed", _misfit),
    Settlement: ("imposed", _settlement),
}


def _arc_key(st: Structure, ld) -> tuple:
    """What makes two span loads or temperatures on different arcs alike (the loaded part
    as fractions of each arc's length)."""
    if isinstance(ld, TemperatureLoad):
        return ("temperature", ld.uniform, ld.gradient)
    L = st.length(ld.member)
    end = 1.0 if math.isnan(ld.end) else round(ld.end / L, 9)
    return ("span", ld.wx, ld.wy, ld.frame, round(ld.start / L, 9), end)


def draw_loads(pn: Panel, st: Structure, case: str) -> None:
    """Every load of load case ``case``, pass by pass (:data:`PASSES`)."""
    sk = LoadSketch(pn, st, case_units(st), 2.6 * pn.h)
    loads = [ld for ld in st.loads if ld.case == case]
    xs = [n.x for n in st.nodes.values()]
    middle = 0.5 * (min(xs) + max(xs))
    for ld in loads:
        if (isinstance(ld, (DistributedLoad, TemperatureLoad))
                and st.members[ld.member].curve is not None):
            entry = sk.arcs.setdefault(_arc_key(st, ld), [0, ld])
            entry[0] += 1
            off = abs(st.point(ld.member, 0.5 * st.length(ld.member))[0] - middle)
            if off < abs(st.point(entry[1].member, 0.5 * st.length(entry[1].member))[0]
                         - middle) - 1e-9:
                entry[1] = ld
    for name, after in PASSES:
        for ld in loads:
            stage, draw = LOAD_DRAWERS[type(ld)]
            if stage == name:
                draw(sk, ld)
        if after is not None:
            after(sk)
