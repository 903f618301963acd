"""The structure drawn to scale: members (hinges as open circles), supports and springs,
node and member names, a scale bar, the redundants X marked where they act, and the
structure panel that puts these together with the loads."""

from __future__ import annotations

import math

import numpy as np

from ...model import Structure, TemperatureLoad
from ..quantities import quantities
from ..reported import redundants_shown
from .arrows import node_arrow
from .geometry import (
    MemberAxis,
    away_from_members,
    case_units,
    clear_spot,
    crossings,
    ground_side,
    member_axes,
    nice_factor,
    perp,
    polyline,
    structure_size,
    support_side,
    xy,
)
from .loads import draw_loads
from .numbers import number
from .panel import Panel
from .style import DIMENSION, FAINT, FONT, GROUND, INK, NAMED_MEMBERS_MAX, REDUNDANT


def draw_members(pn: Panel, st: Structure, faint: bool = False) -> None:
    """Beams thick, bars thin; open circles at hinges and at the pins of bars. ``faint``:
    thin grey lines only (under a diagram)."""
    for m in st.members.values():
        a, b = xy(st, m.start), xy(st, m.end)
        pts = polyline(st, m.id)  # its two ends, or points along the arc
        if faint:
            pn.line(pts, color=FAINT, lw=0.8, z=1)
            continue
        pn.line(pts, color=INK, lw=2.0 if m.is_beam else 1.1, z=3)
        if m.taper is not None:
            _taper_outline(pn, m, a, b)
    if faint:
        return
    r = 0.22 * pn.h
    for m in st.members.values():
        a, b = xy(st, m.start), xy(st, m.end)
        if m.is_beam:  # hinges on the axis, along its tangent at the end
            ds = np.array(st.tangent(m.id, 0.0))
            de = np.array(st.tangent(m.id, st.length(m.id)))
            if m.hinge_start:
                pn.circle(a + ds * 1.6 * r, r)
            if m.hinge_end:
                pn.circle(b - de * 1.6 * r, r)
        else:
            pn.circle(a, 0.75 * r, z=4)
            pn.circle(b, 0.75 * r, z=4)


def taper_depths(m) -> tuple[float, float]:
    """(start, end) depth of a tapered beam relative to its deeper end: the sections'
    depths where both are given, else (I_end/I_start)^(1/3) (a solid section's depth)."""
    t = m.taper
    if m.depth is not None and t.depth is not None:
        d0, d1 = m.depth, t.depth
    else:
        d0, d1 = 1.0, (t.EI / m.EI) ** (1.0 / 3.0)
    big = max(d0, d1)
    return d0 / big, d1 / big


def _taper_outline(pn: Panel, m, a, b) -> None:
    """The outline of a tapered beam: a band about its axis whose width follows the depth
    (the deeper end drawn 1.4 symbol heights deep), so a haunch reads as one."""
    d0, d1 = taper_depths(m)
    n = perp((b - a) / np.hypot(*(b - a)))
    h0, h1 = 0.7 * pn.h * d0, 0.7 * pn.h * d1
    outline = [a + n * h0, b + n * h1, b - n * h1, a - n * h0]
    pn.poly(outline, face=GROUND, edge=INK, lw=0.7, z=2)


def _ground(pn: Panel, p, a, width: float, depth: float) -> None:
    """A ground band behind point ``p`` on the side ``a`` (unit), ``width`` wide."""
    t = perp(a)
    q = [p + t * width / 2, p - t * width / 2, p - t * width / 2 + a * depth,
         p + t * width / 2 + a * depth]
    pn.poly(q, face=GROUND, z=1)
    pn.line([q[0], q[1]], color=INK, lw=1.0, z=2)


def _zigzag(p, a, length: float, amp: float, turns: int = 5) -> np.ndarray:
    """A spring from ``p`` along ``a`` (unit), ``length`` long."""
    t = perp(a)
    s = np.linspace(0.2, 0.8, 2 * turns + 1)
    pts = [p, p + a * 0.2 * length]
    for k, sk in enumerate(s[1:-1]):
        pts.append(p + a * sk * length + t * amp * (1 if k % 2 == 0 else -1))
    pts += [p + a * 0.8 * length, p + a * length]
    return np.array(pts)


def draw_supports(pn: Panel, st: Structure, faint: bool = False) -> None:
    """Every support: its rigid restraints as one symbol, then its springs."""
    h = pn.h * (0.7 if faint else 1.0)
    col = FAINT if faint else INK
    for sup in st.supports.values():
        n_pts = len(pn.pts)
        _rigid_support(pn, st, sup, h, col)
        _springs(pn, st, sup, h, col, faint)
        if len(pn.pts) > n_pts:  # labels keep off the support symbol
            pn.occupy(np.vstack(pn.pts[n_pts:]))


def _rigid_support(pn: Panel, st: Structure, sup, h: float, col: str) -> None:
    """Fixed (ground at the node), pinned (a triangle), roller (a triangle on wheels),
    guided (a block on wheels) or a rotational restraint only (a square)."""
    p = xy(st, sup.node)
    rigid = [r for r in sup.restraints if not r.is_spring]
    trans = [r for r in rigid if r.direction != "rz"]
    rot = any(r.direction == "rz" for r in rigid)
    a = support_side(st, sup)
    if len(trans) >= 2:
        if rot:  # fixed: the ground right at the node
            _ground(pn, p, a, 2.4 * h, 0.55 * h)
        else:  # pinned: a triangle on the ground
            t = perp(a)
            pn.poly([p, p + a * h + t * 0.62 * h, p + a * h - t * 0.62 * h],
                    face="white", edge=col, lw=0.9, z=3)
            _ground(pn, p + a * h, a, 2.0 * h, 0.4 * h)
    elif len(trans) == 1:  # roller (perhaps on an inclined surface) or guided
        t = perp(a)
        if rot:  # guided: a block that slides
            pn.poly([p + t * 0.5 * h, p - t * 0.5 * h, p - t * 0.5 * h + a * 0.8 * h,
                     p + t * 0.5 * h + a * 0.8 * h], face="white", edge=col, z=3)
            top = 0.8 * h
        else:
            pn.poly([p, p + a * h + t * 0.62 * h, p + a * h - t * 0.62 * h],
                    face="white", edge=col, lw=0.9, z=3)
            top = h
        rr = 0.13 * h
        for s in (-0.32, 0.32):
            pn.circle(p + a * (top + rr) + t * s * h, rr, edge=col, lw=0.7, z=3)
        _ground(pn, p + a * (top + 2 * rr), a, 2.0 * h, 0.4 * h)
    elif rot:  # a rotational restraint only
        pn.poly([p + [-0.4 * h, -0.4 * h], p + [0.4 * h, -0.4 * h],
                 p + [0.4 * h, 0.4 * h], p + [-0.4 * h, 0.4 * h]], face="none",
                edge=col, z=3)


def _springs(pn: Panel, st: Structure, sup, h: float, col: str, faint: bool) -> None:
    """The springs of a support (a spiral for a rotational one, else a zigzag to the
    ground) with their stiffness in the case units (not when ``faint``)."""
    uf = case_units(st)
    p = xy(st, sup.node)
    away = away_from_members(st, sup.node)
    for r in sup.restraints:
        if not r.is_spring:
            continue
        if r.direction == "rz":
            t = np.linspace(0, 3.5 * math.pi, 60)
            rad = 0.25 * h + 0.75 * h * t / t[-1]
            pn.line(p + np.c_[rad * np.cos(t), rad * np.sin(t)], color=col, lw=0.8, z=3)
            k = r.stiffness / uf["moment"][0]
            where, unit = p + [h, h], f"{uf['moment'][1]}/rad"
        else:
            a = ground_side(np.array(r.vector[:2], dtype=float), away)
            zz = _zigzag(p, a, 2.4 * h, 0.3 * h)
            pn.line(zz, color=col, lw=0.8, z=3)
            _ground(pn, p + a * 2.4 * h, a, 1.6 * h, 0.35 * h)
            k = r.stiffness / (uf["force"][0] / uf["length"][0])
            where, unit = p + a * 1.2 * h + perp(a) * 0.45 * h, \
                f"{uf['force'][1]}/{uf['length'][1]}"
        if not faint:
            pn.label(where, f"k = {number(k)} {unit}", direction=(1, 0), must=True)


# ---------------------------------------------------------------------------- redundants


def _draw_redundants(pn: Panel, sol, res) -> None:
    """Each redundant X where it acts, with its value: an arrow on the support's node for
    a reaction, a cut across a member (off crossings) for an axial force, a hinge put in
    for an end moment. The values are the sheets' and the terminal's
    (:func:`~leastwork.output.reported.redundants_shown`): round-off shown as 0."""
    st, topo = sol.structure, sol.topology
    q = quantities(sol.units)
    shown = redundants_shown(sol, res.name)  # in the output units, round-off as 0
    cuts = pn.marks
    cross = crossings(st)
    for i, j in enumerate(sol.redundant_columns):
        col = topo.columns[j]
        value = shown[col.name]
        unit = q.column_unit(col).replace("*", "·")
        text = f"X{i + 1} = {col.name} = {'?' if value is None else number(value)} {unit}"
        if col.kind == "reaction":
            _redundant_reaction(pn, st, col, f"X{i + 1}", text)
        elif col.kind == "axial":
            _redundant_cut(pn, st, col.owner, f"X{i + 1}", cross[col.owner], cuts)
            pn.key.append(f"{text} (axial force; the member is cut)")
        else:
            _redundant_hinge(pn, st, col, f"X{i + 1}")
            pn.key.append(f"{text} (end moment; a hinge put in)")


def _redundant_reaction(pn: Panel, st: Structure, col, name: str, text: str) -> None:
    """An arrow in the positive sense of the reaction component with one end on the node
    (a turning arrow around it for a couple)."""
    h = pn.h
    p = xy(st, col.owner)
    direction = col.name.rsplit(".", 1)[1]
    if direction == "rz":
        q = pn.arc_arrow(p, 1.6 * h, True, color=REDUNDANT, lw=1.3)
        pn.arrows.append((p, p, name))
        pn.label(q, text, color=REDUNDANT, box=True, must=True)
        return
    if direction == "n":
        r = next(r for r in st.supports[col.owner].restraints if r.direction == "n")
        d = np.array(r.vector[:2], dtype=float)
    else:
        d = np.array([1.0, 0.0]) if direction == "x" else np.array([0.0, 1.0])
    far, shaft = node_arrow(pn, st, col.owner, d, 3.0 * h, color=REDUNDANT, what=name,
                            support_ok=True, lw=1.6, head=0.6 * h)
    pn.label(far, text, direction=shaft, color=REDUNDANT, box=True, must=True,
             gap=0.2 * h)


def _redundant_cut(pn: Panel, st: Structure, mid: str, text: str, cross: list[float],
                   cuts: dict[str, list[float]]) -> None:
    """Two strokes across the member, off every crossing, tagged with the redundant's
    name (its value is in the key under the panel)."""
    h = pn.h
    axis = MemberAxis(st, mid)
    at = clear_spot(cross, cuts.get(mid, []), prefer=(0.5, 0.3, 0.7, 0.25, 0.75, 0.35, 0.65))
    cuts.setdefault(mid, []).append(at)
    c = axis.at(at * st.length(mid))[0]
    ey = axis.normal(at * st.length(mid))[0]
    ex = np.array([ey[1], -ey[0]])
    for s in (-0.2, 0.2):
        pn.line([c + ex * s * h - ey * 0.6 * h, c + ex * s * h + ey * 0.6 * h],
                color=REDUNDANT, lw=1.6, z=7)
    pn.occupy([c - ey * 0.6 * h - ex * 0.3 * h, c + ey * 0.6 * h + ex * 0.3 * h])
    side = ey if ey[1] >= -1e-9 else -ey
    pn.label(c + side * 0.6 * h, text, direction=side, color=REDUNDANT, box=True,
             must=True, weight="bold")


def _redundant_hinge(pn: Panel, st: Structure, col, text: str) -> None:
    h = pn.h
    axis = MemberAxis(st, col.owner)
    L = st.length(col.owner)
    at = min(0.12 * L, 1.5 * h)
    s = at if col.kind == "start_m" else L - at
    c, ey = axis.at(s)[0], axis.normal(s)[0]
    pn.circle(c, 0.3 * h, edge=REDUNDANT, lw=1.2, z=7)
    pn.label(c + ey * 0.3 * h, text, direction=ey, color=REDUNDANT, box=True, must=True,
             weight="bold")


# ---------------------------------------------------------------------------- names, dimensions


def keep_labels_off_members(pn: Panel, st: Structure) -> None:
    """Every member's line is kept clear of labels."""
    for m in st.members.values():
        pn.keep_off(polyline(st, m.id))


def _node_names(pn: Panel, st: Structure) -> None:
    for nid in st.nodes:
        d = away_from_members(st, nid)
        if nid in st.supports:  # beside the support symbol, on its left or lower side
            a = support_side(st, st.supports[nid])
            t = perp(a)
            t = -t if t[0] > 1e-9 or (abs(t[0]) <= 1e-9 and t[1] > 0) else t
            pn.label(xy(st, nid) + a * 0.5 * pn.h, nid, direction=t, gap=1.0 * pn.h,
                     size=FONT + 0.5, weight="bold", must=True)
            continue
        d = d + perp(d) * 0.6
        pn.label(xy(st, nid), nid, direction=d, gap=0.5 * pn.h, size=FONT + 0.5,
                 weight="bold", must=True)


def _member_names(pn: Panel, st: Structure) -> None:
    """Each member's name beside it, slid along it off crossings and other labels."""
    cross = crossings(st)
    for mid in st.members:
        _, _, ey = member_axes(st, mid)
        L = st.length(mid)
        side = -ey if ey[1] > 1e-9 else ey
        axis = MemberAxis(st, mid)
        order = sorted((0.5, 0.35, 0.65, 0.25, 0.75),
                       key=lambda f: -min([abs(f - c) for c in cross[mid]] + [1.0]))
        for f in order:
            if pn.label(axis.at(f * L)[0], mid, direction=side, color=DIMENSION,
                        gap=0.3 * pn.h):
                break
        else:
            for f in order:
                if pn.label(axis.at(f * L)[0], mid, direction=-side, color=DIMENSION,
                            gap=0.3 * pn.h):
                    break


def _levels(values, tol: float) -> list[float]:
    """Distinct values (sorted), those within ``tol`` taken as one."""
    out: list[float] = []
    for v in sorted(values):
        if not out or v - out[-1] > tol:
            out.append(v)
    return out


def _dimension_chain(pn: Panel, st: Structure, axis: int) -> bool:
    """A chain of dimensions between the distinct x (``axis`` 0, below the structure) or
    y (``axis`` 1, left of it) of the nodes, with the whole length beyond it when there
    are several; a chain whose texts do not fit gives only the whole length. Returns
    whether anything was drawn."""
    lf, _ = case_units(st)["length"]
    xs = np.array([[n.x, n.y] for n in st.nodes.values()])
    size = structure_size(st)
    lv = _levels(xs[:, axis], 1e-6 * size)
    if len(lv) < 2:
        return False
    h = pn.h
    drawn = pn.extent()[0][1 - axis] if pn.pts else xs[:, 1 - axis].min()
    th = pn.text_box("0", FONT)[1]  # the texts of a horizontal chain sit above its line
    base = min(drawn, xs[:, 1 - axis].min()) - (0.5 * h + th if axis == 0 else 1.0 * h)
    texts = [number((b - a) / lf) for a, b in zip(lv[:-1], lv[1:], strict=True)]
    widths = [pn.text_box(t, FONT)[0 if axis == 0 else 1] for t in texts]
    fits = all(wd < 0.9 * (b - a) for wd, a, b in zip(widths, lv[:-1], lv[1:], strict=True))
    rows = []
    if fits:
        rows.append((base, lv))
    if len(lv) > 2 or not fits:
        step = (max(1.9 * h, th + 0.6 * h) if axis == 0
                else max(widths_across(pn, texts)) + 0.8 * h)
        rows.append((base - (step if fits else 0.0), [lv[0], lv[-1]]))

    def pt(along, across):
        return np.array([along, across]) if axis == 0 else np.array([across, along])

    for s_ in lv:  # short extension lines towards the structure, through the rows it ends
        ends = [r[0] for r in rows if s_ in r[1]]
        if not ends:  # a level only the chain that did not fit would have shown
            continue
        last = min(ends)
        pn.line([pt(s_, rows[0][0] + 1.1 * h), pt(s_, last - 0.35 * h)], color=FAINT,
                lw=0.5, z=1)
    for across, stops in rows:
        pn.line([pt(stops[0], across), pt(stops[-1], across)], color=DIMENSION, lw=0.6)
        pn.keep_off([pt(stops[0], across), pt(stops[-1], across)])
        for s in stops:
            pn.line([pt(s, across - 0.35 * h), pt(s, across + 0.35 * h)], color=DIMENSION,
                    lw=0.6)
            tick = 0.25 * h
            pn.line([pt(s, across) - np.array([tick, tick]), pt(s, across)
                     + np.array([tick, tick])], color=DIMENSION, lw=1.1)
        for a, b in zip(stops[:-1], stops[1:], strict=True):
            text = number((b - a) / lf)
            d = (0, 1) if axis == 0 else (-1, 0)
            pn.label(pt(0.5 * (a + b), across), text, direction=d, gap=0.12 * h,
                     color=DIMENSION, force=True, leader=False)
    return True


def _key(pn: Panel) -> None:
    """The values of the redundants tagged on members, one line each under the drawing."""
    if not pn.key:
        return
    lo, hi = pn.extent()
    y = lo[1] - 0.4 * pn.h
    for line in pn.key:
        w, hgt = pn.text_box(line, FONT)
        pn.label([lo[0] + 0.5 * w, y], line, direction=(0, -1), color=REDUNDANT, gap=0.0,
                 force=True, leader=False)
        y -= hgt * 1.1


def widths_across(pn: Panel, texts) -> list[float]:
    """Widths (m) of dimension texts."""
    return [pn.text_box(t, FONT)[0] for t in texts]


def _dimensions(pn: Panel, st: Structure) -> None:
    """Dimension lines (case length unit) below and left of the structure; a scale bar
    when the nodes have no extent to dimension."""
    drawn = _dimension_chain(pn, st, 0)
    drawn = _dimension_chain(pn, st, 1) or drawn
    if not drawn:
        _scale_bar(pn, st)


def _scale_bar(pn: Panel, st: Structure) -> None:
    lf, lu = case_units(st)["length"]
    xs = [n.x for n in st.nodes.values()]
    ys = [n.y for n in st.nodes.values()]
    bar = nice_factor(0.2 * structure_size(st) / lf) * lf
    p0 = np.array([min(xs), min(ys) - 3.2 * pn.h])
    pn.line([p0, p0 + [bar, 0]], color=INK, lw=1.2)
    for q in (p0, p0 + [bar, 0]):
        pn.line([q - [0, 0.2 * pn.h], q + [0, 0.2 * pn.h]], color=INK, lw=0.8)
    pn.label(p0 + [bar / 2, -0.2 * pn.h], f"{number(bar / lf, 1)} {lu}", direction=(0, -1),
             gap=0.1 * pn.h, force=True)


def structure_panel(pn: Panel, sol, case: str) -> tuple[str, str]:
    """The structure panel of load case ``case``: (title, note on what is shown)."""
    st = sol.structure
    res = sol.cases[case]
    draw_members(pn, st)
    draw_supports(pn, st)
    keep_labels_off_members(pn, st)
    pn.defer()  # every arrow and mark first, then the node names, then the other labels
    crowded = len(st.members) > NAMED_MEMBERS_MAX
    if not crowded:
        _draw_redundants(pn, sol, res)
    elif sol.redundant_columns:
        pn.key.append(f"{len(sol.redundant_columns)} redundants not drawn (over "
                      f"{NAMED_MEMBERS_MAX} members); solve --json lists every one")
    draw_loads(pn, st, case)
    queued, pn.deferred = pn.deferred, None
    if not crowded:
        _node_names(pn, st)
    pn.deferred = queued
    pn.place_deferred()
    if crowded:
        pn.key.append(f"{len(st.members)} members: names of nodes and members left out "
                      f"(over {NAMED_MEMBERS_MAX}); solve --json names every one")
    else:
        _member_names(pn, st)
    _dimensions(pn, st)  # beyond everything drawn, so they cross nothing
    _key(pn)
    note = "to scale"
    if any(isinstance(ld, TemperatureLoad) and ld.case == case for ld in st.loads):
        note += "; gradient = temperature of local -y face minus +y face"
    return f"{case}: structure, loads and redundants", note
