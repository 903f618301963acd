"""The n, v and m panels: each diagram drawn square to its member with its largest values,
end values, span extremes and values at breaks labelled, off the lines; a bar's axial force
as the bar drawn by its sense with the value and T or C beside it.

How the values read: m on the tension side, without sign (the side tells the sense, the
wording from :mod:`leastwork.output.conventions`); n as a magnitude with T (tension) or C
(compression), the area hatched where it is compression; v with its sign, hatched where
negative. Values below half a unit of the last printed figure of the panel's largest value
(:func:`numbers.resolution`) are drawn as zero and not labelled."""

from __future__ import annotations

import numpy as np

from ...model import Structure
from .data import QUANTITY, diagram_amplitude, diagram_lines
from .geometry import MemberAxis, case_units, crossings, member_axes
from .numbers import magnitude, number, resolution, tension_mark
from .panel import Panel
from .structure import draw_members, draw_supports, keep_labels_off_members
from .style import (
    AREA,
    AREA_EDGE,
    COMPRESSION,
    FAINT,
    FONT,
    HATCH,
    INK,
    NAMED_MEMBERS_MAX,
    TENSION,
)


def value_text(quantity: str, value: float) -> str:
    """A diagram value as labelled: m unsigned, n with T or C, v signed."""
    if quantity == "m":
        return magnitude(value)
    if quantity == "n":
        return tension_mark(value)
    return number(value)


def _sign_runs(x: np.ndarray, v: np.ndarray):
    """Split a sampled curve where it changes sign: (x, v) runs of one sign each, with the
    zero crossings put in."""
    runs, cx, cv = [], [x[0]], [v[0]]
    for k in range(1, len(x)):
        if cv[-1] * v[k] < 0:
            xz = x[k - 1] + (x[k] - x[k - 1]) * v[k - 1] / (v[k - 1] - v[k])
            cx.append(xz)
            cv.append(0.0)
            runs.append((np.array(cx), np.array(cv)))
            cx, cv = [xz], [0.0]
        cx.append(x[k])
        cv.append(v[k])
    runs.append((np.array(cx), np.array(cv)))
    return runs


def _bar_line(pn: Panel, st: Structure, mid: str, value: float) -> None:
    """A bar by its constant axial force: thick, solid dark grey in tension, burnt orange
    with cross ticks in compression, thin grey when zero."""
    o, ex, ey = member_axes(st, mid)
    L = st.length(mid)
    a, b = o + ex * 0.04 * L, o + ex * 0.96 * L
    if value == 0:
        pn.line([a, b], color=FAINT, lw=1.2, z=3)
    elif value > 0:
        pn.line([a, b], color=TENSION, lw=3.0, z=3)
    else:
        pn.line([a, b], color=COMPRESSION, lw=3.0, z=3)
        for s_ in np.linspace(0.12, 0.88, max(3, int(L / pn.h / 1.5))):
            c = o + ex * s_ * L
            pn.line([c - ey * 0.22 * pn.h, c + ey * 0.22 * pn.h], color=COMPRESSION,
                    lw=1.0, z=3)
    pn.keep_off([a, b])


def _bar_value(pn: Panel, st: Structure, mid: str, value: float) -> None:
    """A bar's value with T or C beside it, slid along the bar off crossings and other
    labels."""
    o, ex, ey = member_axes(st, mid)
    L = st.length(mid)
    side = ey if ey[1] >= -1e-9 else -ey
    kw = dict(gap=0.3 * pn.h, box=True, color=INK if value >= 0 else COMPRESSION)
    text = tension_mark(value)
    cross = crossings(st)[mid]
    spots = sorted((0.5, 0.35, 0.65, 0.22, 0.78),
                   key=lambda f: -min([abs(f - c) for c in cross] + [0.2]))
    for at in spots:  # crossing bars: slide the value along, off the crossing
        for sd in (side, -side):
            if pn.label(o + ex * at * L, text, direction=sd, **kw):
                return
    pn.label(o + ex * 0.5 * L, text, direction=side, must=True, **kw)


def _member_diagram(pn: Panel, axis: MemberAxis, towards: float, x: np.ndarray,
                    v: np.ndarray, scale: float, hatch_negative: bool) -> None:
    """One member's diagram, drawn off its axis (an arc for a curved member) along
    ``towards`` times local +y: an area per run of one sign (hatched where negative when
    ``hatch_negative``), its outline kept clear of labels, and the closing lines at the
    member's ends."""
    for rx, rv in _sign_runs(x, v):
        if not np.any(rv):
            continue
        base = axis.at(rx)
        tip = base + towards * axis.normal(rx) * (rv * scale)[:, None]
        negative = hatch_negative and np.sum(rv) < 0
        pn.poly(np.vstack([tip, base[::-1]]), face=AREA,
                edge=AREA_EDGE if negative else "none", lw=0.0, z=2,
                hatch=HATCH if negative else None)
        pn.line(tip, color=INK, lw=0.8, z=3)
        pn.keep_off(tip)
    for end in (0, -1):  # closing lines at the member ends
        b = axis.at(x[end])[0]
        t = b + towards * axis.normal(x[end])[0] * v[end] * scale
        pn.line([b, t], color=INK, lw=0.8, z=3)
        pn.keep_off([b, t])


def _value_places(sol, res, mid: str, quantity: str, x: np.ndarray, v: np.ndarray,
                  scale: float, extremes: tuple[bool, bool], tiny: float) -> list[tuple]:
    """Values of one member worth a label, as (priority, point, direction, value): 0 the
    diagram's largest and least (``extremes``: whether this member has them), 1 the end
    values, 2 the span extremes of m or the largest |n|, |v|, 3 the values at breaks."""
    st = sol.structure
    uf = case_units(st)
    axis = MemberAxis(st, mid)
    sign = -1.0 if quantity == "m" else 1.0
    cands = []

    def add(prio, at, value):
        if value != 0.0:
            side = sign * axis.normal(at)[0]
            p = axis.at(at)[0] + side * value * scale
            cands.append((prio, p, side * (1 if value >= 0 else -1), value))

    L = x[-1]
    exact = []  # the exact span extremes of m (the samples may miss the peak)
    if quantity == "m":
        mr = res.members[mid]
        for value, at in (mr.m_max, mr.m_min):
            if 1e-6 * L < at < L * (1 - 1e-6):
                vv = value / uf["moment"][0]
                exact.append([at, 0.0 if abs(vv) <= tiny else vv, 2])
    for wanted, k in ((extremes[0], int(np.argmax(v))), (extremes[1], int(np.argmin(v)))):
        if not wanted:
            continue
        near = [e for e in exact if abs(e[0] - x[k]) < 0.05 * L]
        if near:
            near[0][2] = 0  # the exact one, at the top priority
        else:
            add(0, x[k], v[k])
    add(1, x[0] + 0.02 * L, v[0])
    add(1, x[-1] - 0.02 * L, v[-1])
    for at, vv, prio in exact:
        add(prio, at, vv)
    brk = getattr(res.members[mid], quantity).breaks[1:-1]
    if st.members[mid].curve is not None:  # pieces of the arc: only the loads' positions
        brk = [ld.at for ld in st.loads if getattr(ld, "member", None) == mid
               and hasattr(ld, "at") and ld.case == res.name]
    for b in brk:
        kk = np.flatnonzero(np.isclose(x, b, rtol=0, atol=1e-9 * L))
        for k in kk:
            add(3, x[k], v[k])
    if quantity != "m":
        k = int(np.argmax(np.abs(v)))
        add(2, x[k], v[k])
    return cands


def force_panel(pn: Panel, sol, case: str, quantity: str) -> tuple[str, str]:
    """The n, v or m panel of load case ``case``: (title, sign convention)."""
    st = sol.structure
    res = sol.cases[case]
    what, dim, conv = QUANTITY[quantity]
    uf = case_units(st)
    lf = uf["length"][0]
    unit = uf[dim][1]
    lines = diagram_lines(sol, case, quantity)
    draw_members(pn, st, faint=True)
    draw_supports(pn, st, faint=True)
    keep_labels_off_members(pn, st)
    vmax = max(float(np.max(np.abs(d["value"]))) for d in lines.values())
    tiny = resolution(vmax)  # below this a value prints as zero: drawn as zero, no label
    for d in lines.values():
        d["value"] = np.where(np.abs(d["value"]) < tiny, 0.0, d["value"])
    vmax = max(float(np.max(np.abs(d["value"]))) for d in lines.values())
    title = f"{case}: {what} [{unit}]"
    state = sol.states.get(case)
    if state is not None and state.changed:
        title += "; " + ", ".join([*(f"{m} slack" for m in state.slack),
                                   *(f"support {n} lifted" for n in state.lifted)])
    if vmax == 0.0:
        xs = [n.x for n in st.nodes.values()]
        ys = [n.y for n in st.nodes.values()]
        pn.label([(min(xs) + max(xs)) / 2, (min(ys) + max(ys)) / 2],
                 f"{what} is zero in every member", direction=(0, 1), size=FONT + 1,
                 gap=2.0 * pn.h, force=True)
        return title, conv
    scale = diagram_amplitude(st) / vmax
    cands = []  # (priority, anchor, direction, value)
    gmax = max(lines, key=lambda m: float(np.max(lines[m]["value"])))
    gmin = min(lines, key=lambda m: float(np.min(lines[m]["value"])))
    bars = [mid for mid in lines if quantity == "n" and not st.members[mid].is_beam]
    for mid in bars:
        _bar_line(pn, st, mid, float(lines[mid]["value"][0]))
    if len(bars) > NAMED_MEMBERS_MAX:  # the two extremes only, and the title says so
        title += (f"; {len(bars)} bars: values of the largest tension and compression only "
                  "(solve --json gives every one)")
        value = {mid: float(lines[mid]["value"][0]) for mid in bars}
        bars_named = list(dict.fromkeys((max(value, key=value.get), min(value, key=value.get))))
    else:
        bars_named = bars
    for mid in bars_named:  # their values once every bar is drawn
        _bar_value(pn, st, mid, float(lines[mid]["value"][0]))
    for mid, d in lines.items():
        x, v = d["x"] * lf, d["value"]
        if mid in bars:
            continue
        _member_diagram(pn, MemberAxis(st, mid), -1.0 if quantity == "m" else 1.0, x, v,
                        scale, hatch_negative=quantity != "m")
        cands += _value_places(sol, res, mid, quantity, x, v, scale,
                               (mid == gmax, mid == gmin), tiny)
    cands.sort(key=lambda c: c[0])
    for prio, p, dr, value in cands:
        pn.label(p, value_text(quantity, value), direction=dr, gap=0.25 * pn.h,
                 must=prio == 0, once=True)
    return title, conv
