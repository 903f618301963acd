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
from ..sheet import fmt
from .geometry import MemberAxis, blocked, case_units, member_axes, perp, support_side, xy
from .panel import Panel
from .style import IMPOSED, LOAD


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
    """The concentrated forces and couples, one arrow and one turning arrow per point: a
    force pushes on its point, or pulls on a node where a member or support is in the
    way, or runs beside it when both sides are taken."""
    pn, st = sk.pn, sk.st
    ff, fu = sk.uf["force"]
    mf, mu = sk.uf["moment"]
    la = sk.la
    for key, (p, fx, fy, mz) in sk.points.items():
        f = np.array([fx, fy])
        mag = float(np.hypot(*f))
        if mag > 0:
            d = f / mag
            text = f"{fmt(mag / ff, 3)} {fu}"
            node = key[1] if key[0] == "node" else None
            if node is None or not blocked(st, node, -d):
                tail, tip = p - d * la, p - d * 0.1 * pn.h  # pushing on the point
            elif not blocked(st, node, d):
                tail, tip = p + d * 0.1 * pn.h, p + d * la  # pulling on it
            else:
                side = perp(d) * 0.45 * pn.h
                tail, tip = p - d * la + side, p - d * 0.1 * pn.h + side
            pn.arrow(tail, tip, color=LOAD, lw=1.2)
            pn.occupy([tail, tip])
            far = tail if np.hypot(*(tail - p)) > np.hypot(*(tip - p)) else tip
            pn.label(far, text, direction=far - p, color=LOAD, must=True)
        if mz:
            q = pn.arc_arrow(p, 0.9 * pn.h, mz > 0, color=LOAD)
            pn.label(q, f"{fmt(abs(mz) / mf, 3)} {mu}", color=LOAD, must=True)


# ---------------------------------------------------------------------------- span loads


def _range_text(name: str, pair, f: float, unit: str) -> str:
    a0, a1 = (fmt(v / f, 3) for v in pair)
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
        q1 = ld.wx[0] + (ld.wx[1] - ld.wx[0]) * frac
        q2 = ld.wy[0] + (ld.wy[1] - ld.wy[0]) * frac
        vec = q1[:, None] * t_vec + q2[:, None] * nrm
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
    pn.label(tails[mid], ", ".join(parts), direction=out, color=LOAD, must=True)
    pn.occupy(np.vstack([tails, on_axis + shift]))


# ---------------------------------------------------------------------------- imposed effects


def _temperature(sk: LoadSketch, ld: TemperatureLoad) -> None:
    """Dash-dotted lines along the warmer face, or both faces for a uniform change."""
    pn, st = sk.pn, sk.st
    o, ex, ey = member_axes(st, ld.member)
    L = st.length(ld.member)
    sides = [ey, -ey] if ld.gradient == 0 else ([-ey] if ld.gradient > 0 else [ey])
    for sd in sides:  # the warmer face, or both faces for a uniform change
        off = sd * 0.35 * pn.h
        pn.line([o + off + ex * 0.08 * L, o + off + ex * 0.92 * L], color=IMPOSED,
                lw=1.0, ls=(0, (4, 1.5, 1, 1.5)), z=4)
    text = f"temperature: uniform {fmt(ld.uniform, 3)} K"
    if ld.gradient:
        text += f", gradient {fmt(ld.gradient, 3)} K (warmer face marked)"
    pn.label(o + ex * 0.5 * L + ey * 0.4 * pn.h, text, direction=ey, color=IMPOSED,
             must=True)


def _misfit(sk: LoadSketch, ld: Misfit) -> None:
    """Two strokes across the member with the length error."""
    pn, st = sk.pn, sk.st
    lf, lu = sk.uf["displacement"]
    o, ex, ey = member_axes(st, ld.member)
    c = o + ex * 0.3 * st.length(ld.member)  # clear of a cut at mid-length
    for s in (-0.18, 0.18):
        pn.line([c + ex * s * pn.h - ey * 0.5 * pn.h, c + ex * s * pn.h + ey * 0.5 * pn.h],
                color=IMPOSED, lw=1.4, z=6)
    how = "too short" if ld.elongation < 0 else "too long"
    pn.label(c - ey * 0.5 * pn.h, f"misfit {fmt(ld.elongation / lf, 3)} {lu} ({how})",
             direction=-ey, color=IMPOSED, must=True)


def _settlement(sk: LoadSketch, ld: Settlement) -> None:
    """An arrow (or a turning arrow) beside the support for each imposed component."""
    pn, st = sk.pn, sk.st
    lf, lu = sk.uf["displacement"]
    p = xy(st, ld.node)
    side = -perp(support_side(st, st.supports[ld.node]))
    base = p + side * 2.2 * pn.h
    for d, v in ld.values:
        if not v:
            continue
        if d == "rz":
            q = pn.arc_arrow(base, 0.7 * pn.h, v > 0, color=IMPOSED)
            pn.label(q, f"settlement drz = {fmt(v, 3)} rad", color=IMPOSED, must=True)
            continue
        if d == "n":
            vec = np.array(next(r.vector[:2] for r in st.supports[ld.node].restraints
                                if r.direction == "n"))
        else:
            vec = np.array([1.0, 0.0]) if d == "x" else np.array([0.0, 1.0])
        vec = vec * (1 if v > 0 else -1)
        pn.line([base - vec * 1.6 * pn.h, base], color=IMPOSED, lw=0.9, ls="--")
        pn.arrow(base, base + vec * 1.2 * pn.h, color=IMPOSED)
        pn.label(base + vec * 1.2 * pn.h, f"settlement d{d} = {fmt(v / lf, 3)} {lu}",
                 direction=side, color=IMPOSED)


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


def draw_loads(pn: Panel, st: Structure, case: str) -> None:
    """Every load of load case ``case``, pass by pass (:data:`PASSES`)."""
    sk = LoadSketch(pn, st, case_units(st), 2.6 * pn.h)
    loads = [ld for ld in st.loads if ld.case == case]
    for name, after in PASSES:
        for ld in loads:
            stage, draw = LOAD_DRAWERS[type(ld)]
            if stage == name:
                draw(sk, ld)
        if after is not None:
            after(sk)
