"""The n, v and m panels: each diagram drawn square to its member, shaded by sign, with
its largest values, end values, span extremes and values at breaks labelled; a bar's
axial force as the bar coloured by its sign with the value beside it."""

from __future__ import annotations

import numpy as np

from ...model import Structure
from ..sheet import fmt
from .data import QUANTITY, diagram_amplitude, diagram_lines, field_zero
from .geometry import MemberAxis, case_units, member_axes
from .panel import Panel
from .structure import draw_members, draw_supports
from .style import FAINT, FONT, INK, NEG_FILL, NEG_LINE, POS_FILL, POS_LINE


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


def _bar_force(pn: Panel, st: Structure, mid: str, value: float) -> None:
    """A bar's constant axial force: the bar drawn in the colour of its sign (blue tension,
    red compression) with the value at mid-length."""
    o, ex, ey = member_axes(st, mid)
    L = st.length(mid)
    color = POS_LINE if value > 0 else (NEG_LINE if value < 0 else FAINT)
    pn.line([o + ex * 0.04 * L, o + ex * 0.96 * L], color=color, lw=3.2, z=3)
    side = ey if ey[1] >= -1e-9 else -ey
    kw = dict(direction=side, gap=0.3 * pn.h, box=True, color=color if value else INK)
    for at in (0.5, 0.32, 0.68):  # crossing bars: slide the value along the bar
        if pn.label(o + ex * at * L, fmt(value, 3), **kw):
            return
    pn.label(o + ex * 0.5 * L, fmt(value, 3), must=True, **kw)


def _member_diagram(pn: Panel, axis: MemberAxis, towards: float, x: np.ndarray,
                    v: np.ndarray, scale: float) -> None:
    """One member's diagram, drawn off its axis along ``towards`` times local +y: a shaded
    area per run of one sign, its outline, and the closing lines at the member's ends."""
    for rx, rv in _sign_runs(x, v):
        if not np.any(rv):
            continue
        base = axis.at(rx)
        tip = base + towards * axis.normal(rx) * (rv * scale)[:, None]
        sign = 1 if np.sum(rv) > 0 else -1
        pn.poly(np.vstack([tip, base[::-1]]),
                face=POS_FILL if sign > 0 else NEG_FILL, z=2)
        pn.line(tip, color=INK, lw=0.8, z=3)
    for end in (0, -1):  # closing lines at the member ends
        b = axis.at(x[end])[0]
        pn.line([b, b + towards * axis.normal(x[end])[0] * v[end] * scale], color=INK,
                lw=0.8, z=3)


def _value_places(sol, res, mid: str, quantity: str, x: np.ndarray, v: np.ndarray,
                  scale: float, extremes: tuple[bool, bool]) -> list[tuple]:
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

    if extremes[0]:
        k = int(np.argmax(v))
        add(0, x[k], v[k])
    if extremes[1]:
        k = int(np.argmin(v))
        add(0, x[k], v[k])
    L = x[-1]
    add(1, x[0] + 0.02 * L, v[0])
    add(1, x[-1] - 0.02 * L, v[-1])
    if quantity == "m":
        mr = res.members[mid]
        for value, at in (mr.m_max, mr.m_min):
            if 1e-6 * L < at < L * (1 - 1e-6):
                vv = value / uf["moment"][0]
                add(2, at, 0.0 if abs(vv) <= field_zero(sol, res, "m") else vv)
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
    for mid, d in lines.items():
        x, v = d["x"] * lf, d["value"]
        if quantity == "n" and not st.members[mid].is_beam:
            _bar_force(pn, st, mid, float(v[0]))
            continue
        _member_diagram(pn, MemberAxis(st, mid), -1.0 if quantity == "m" else 1.0, x, v,
                        scale)
        cands += _value_places(sol, res, mid, quantity, x, v, scale,
                               (mid == gmax, mid == gmin))
    cands.sort(key=lambda c: c[0])
    for _, p, dr, value in cands:
        pn.label(p, fmt(value, 3), direction=dr, gap=0.25 * pn.h)
    return title, conv
