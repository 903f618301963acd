"""The influence line drawn in the diagrams' own style: a sketch of the structure above
the line (the members the load moves along drawn heavy, the quantity marked where it
acts), the ordinates below as an area (hatched where negative) with the largest and least
values labelled, axis words in plain language ("position along BC [m]", "B.y [kN]").

When every member the load moves along is horizontal the sketch and the line share one
horizontal scale, so each ordinate sits under its point of the structure; otherwise the
line runs along the members one after the other."""

from __future__ import annotations

import re

import numpy as np

from ...model import Structure
from .geometry import MemberAxis, member_axes, polyline, structure_size, xy
from .numbers import number
from .panel import Panel
from .structure import draw_members, draw_supports, keep_labels_off_members
from .style import (
    AREA,
    AREA_EDGE,
    DIMENSION,
    FONT,
    HATCH,
    HEADING,
    INK,
    PRINT_WIDTH,
    REDUNDANT,
    TITLE,
    drawn_text,
)

_SECTION = re.compile(r"^(.+)@([^@]+)\.(m|v|n)$")
_WHAT = {"m": "bending moment", "v": "shear force", "n": "axial force"}


def axis_words(name: str, st: Structure, length_unit: str) -> str:
    """The quantity for the value axis, short: "B.y", "m at 3.00 m in BC", "n in AC".

    >>> axis_words("BC@3.m", None, "m"), axis_words("B.y", None, "m")
    ('m at 3.00 m in BC', 'B.y')
    """
    sec = _SECTION.match(name)
    if sec:
        mid, dist, comp = sec.groups()
        try:
            dist = number(float(dist))
        except ValueError:
            pass
        return f"{comp} at {dist} {length_unit} in {mid}"
    if st is not None and name in st.members:
        return f"n in {name}"
    return name


def quantity_words(name: str, st: Structure, length_unit: str) -> str:
    """The quantity of an influence line in words for an axis: "B.y" stays as it is (a
    reaction's name), "BC@3.m" reads "bending moment in BC at 3.00 m", "AB.start.m"
    "end moment of AB at A", a member id "axial force in AC".

    >>> quantity_words("BC@3.m", None, "m")
    'bending moment in BC at 3.00 m'
    """
    sec = _SECTION.match(name)
    if sec:
        mid, dist, comp = sec.groups()
        try:
            where = number(float(dist))
        except ValueError:
            where = dist
        return f"{_WHAT[comp]} in {mid} at {where} {length_unit}"
    end = re.match(r"^(.+)\.(start|end)\.m$", name)
    if end and st is not None and end.group(1) in st.members:
        m = st.members[end.group(1)]
        return f"end moment of {m.id if hasattr(m, 'id') else end.group(1)} at " \
               f"{m.start if end.group(2) == 'start' else m.end}"
    if st is not None and (name in st.members or name.endswith(".n")
                           and name[:-2] in st.members):
        return f"axial force in {name.removesuffix('.n')}"
    return name


def _positions(st: Structure, points: list[dict], lf: float):
    """(x of each ordinate in the length unit, aligned with the structure?, member
    boundaries as (x, member)) ."""
    along = list(dict.fromkeys(p["member"] for p in points))
    aligned = all(abs(st.direction(m)[1]) < 1e-9 for m in along)
    if aligned:
        xs = [(xy(st, st.members[p["member"]].start)[0] / lf
               + p["at"] * st.direction(p["member"])[0]) for p in points]
        bounds = [(min(xy(st, st.members[m].start)[0], xy(st, st.members[m].end)[0]) / lf, m)
                  for m in along]
        return np.array(xs), True, bounds
    offset, xs, bounds, last = 0.0, [], [], None
    for p in points:
        if p["member"] != last:
            if last is not None:
                offset += st.length(last) / lf
            bounds.append((offset, p["member"]))
            last = p["member"]
        xs.append(offset + p["at"])
    return np.array(xs), False, bounds


def influence_figure(st: Structure, d: dict):
    """The figure of an influence line ``d`` (the JSON of ``leastwork influence``,
    docs/studies.md) of structure ``st``."""
    from matplotlib.figure import Figure
    from matplotlib.ticker import FuncFormatter, MaxNLocator

    u = d["units"]
    lf = st.units.factor("length")
    points = d["points"]
    x, aligned, bounds = _positions(st, points, lf)
    y = np.array([p["value"] for p in points], dtype=float)
    if aligned:
        order = np.argsort(x, kind="stable")
        x, y = x[order], y[order]
    along = list(dict.fromkeys(p["member"] for p in points))
    width = PRINT_WIDTH
    left, right = 0.95, 0.2
    plot_w = width - left - right
    # the sketch, at the line's horizontal scale when aligned
    xs_nodes = np.array([[n.x, n.y] for n in st.nodes.values()]) / lf
    if aligned:
        x0, x1 = min(x.min(), xs_nodes[:, 0].min()), max(x.max(), xs_nodes[:, 0].max())
    else:
        x0, x1 = xs_nodes[:, 0].min(), xs_nodes[:, 0].max()
    pad = 0.08 * max(x1 - x0, 1e-9)
    x0, x1 = x0 - pad, x1 + pad
    per_inch = (x1 - x0) * lf / plot_w
    fig = Figure(figsize=(width, 4.0), dpi=150)
    sk = fig.add_axes((0, 0, 1, 1))
    pn = Panel(sk, structure_size(st), per_inch)
    draw_members(pn, st)
    draw_supports(pn, st)
    keep_labels_off_members(pn, st)
    for m in along:  # the path of the load, heavy
        pn.line(polyline(st, m), color=INK, lw=3.4, z=3)
    _mark_quantity(pn, st, d["quantity"])
    for nid in st.nodes:
        pn.label(xy(st, nid), nid, direction=(-0.5, 1), size=FONT + 0.5, weight="bold",
                 gap=0.4 * pn.h, must=True)
    lo, hi = pn.extent()
    if aligned:
        lo[0], hi[0] = x0 * lf, x1 * lf
    else:
        mid = 0.5 * (lo[0] + hi[0])
        lo[0], hi[0] = mid - 0.5 * plot_w * per_inch, mid + 0.5 * plot_w * per_inch
    lo[1] -= 0.3 * pn.h
    hi[1] += 0.3 * pn.h
    pn.finish(np.array([lo, hi]), 0.0)
    sketch_h = float(np.clip((hi[1] - lo[1]) / per_inch, 0.6, 2.6))
    line_h = 2.4
    head, gap, foot = 1.05, 0.35, 0.6
    height = head + sketch_h + gap + line_h + foot
    fig.set_size_inches(width, height)
    sk.set_position((left / width, (foot + line_h + gap) / height, plot_w / width,
                     sketch_h / height))
    ax = fig.add_axes((left / width, foot / height, plot_w / width, line_h / height))
    pos = y >= 0
    ax.fill_between(x, y, 0.0, where=pos, interpolate=True, facecolor=AREA, lw=0)
    ax.fill_between(x, y, 0.0, where=~pos, interpolate=True, facecolor=AREA,
                    edgecolor=AREA_EDGE, hatch=HATCH, lw=0)
    ax.plot(x, y, color=INK, lw=1.2)
    ax.axhline(0.0, color=INK, lw=0.7)
    if aligned:
        ax.set_xlim(x0, x1)
    for bx, name in bounds:  # where each member of the path begins
        ax.axvline(bx, color=DIMENSION, lw=0.5, ls=(0, (2, 2)))
        if not aligned:
            ax.annotate(drawn_text(name), (bx, 1.0), xycoords=("data", "axes fraction"),
                        xytext=(3, -3), textcoords="offset points", fontsize=FONT,
                        color=DIMENSION, ha="left", va="top")
    fmt = FuncFormatter(lambda v, _: number(v) if abs(v) > 1e-12 * (abs(y).max() + 1e-300)
                        else "0")
    ax.yaxis.set_major_formatter(fmt)
    ax.xaxis.set_major_formatter(FuncFormatter(lambda v, _: number(v, 3) if v else "0"))
    ax.yaxis.set_major_locator(MaxNLocator(5))
    for side in ("top", "right"):
        ax.spines[side].set_visible(False)
    ax.tick_params(labelsize=FONT)
    ax.grid(axis="y", color="#e2e2e2", lw=0.5)
    _label_extremes(ax, x, y)
    ax.set_xlabel(drawn_text(f"position of the load along {', '.join(along)} "
                             f"[{u['length']}]"), fontsize=FONT)
    unit = u["value"].replace("*", "·")
    short = axis_words(d["quantity"], st, u["length"])
    ax.set_ylabel(drawn_text(f"{short} [{unit}]"), fontsize=FONT)
    words = quantity_words(d["quantity"], st, u["length"])
    fig.text(0.15 / width, 1 - 0.1 / height, drawn_text(f"Influence line of {words}"),
             fontsize=HEADING, weight="bold", ha="left", va="top")
    load = u["load"].replace("*", "·")
    note = (f"{d.get('name', st.name)}. Ordinate: the value of {short} ({d['quantity']}) "
            f"with a load of {load} at that position; hatched where negative.")
    sec = _SECTION.match(d["quantity"])
    if sec and sec.group(3) == "m":
        note += " m is + when the member's local -y face is in tension."
    elif sec and sec.group(3) == "n" or d["quantity"] in st.members:
        note += " n is + in tension."
    elif sec:
        note += " v = dm/dx."
    else:
        note += " A reaction is the force the support applies, + along the global axis."
    import textwrap

    lines = textwrap.wrap(drawn_text(note), int((width - 0.3) * 72 / (TITLE * 0.56)))
    fig.text(0.15 / width, 1 - (0.1 + HEADING * 1.5 / 72) / height, "\n".join(lines),
             fontsize=TITLE, ha="left", va="top", linespacing=1.35)
    return fig


def _label_extremes(ax, x: np.ndarray, y: np.ndarray) -> None:
    """The largest and least ordinates, labelled off the line."""
    if not y.size:
        return
    ks = {int(np.argmax(y)), int(np.argmin(y))}
    for k in sorted(ks):
        if y[k] == 0:
            continue
        ax.annotate(number(y[k]), (x[k], y[k]), xytext=(0, 5 if y[k] > 0 else -5),
                    textcoords="offset points", ha="center",
                    va="bottom" if y[k] > 0 else "top", fontsize=FONT, color=INK)
    top, bot = max(y.max(), 0.0), min(y.min(), 0.0)
    span = top - bot or 1.0
    ax.set_ylim(bot - 0.18 * span, top + 0.18 * span)


def _mark_quantity(pn: Panel, st: Structure, name: str) -> None:
    """Where the quantity acts: an arrow on the node for a reaction, a stroke across the
    member at a section, the member in the redundant colour for its axial force."""
    h = pn.h
    sec = _SECTION.match(name)
    if sec and sec.group(1) in st.members:
        mid = sec.group(1)
        try:
            at = float(sec.group(2)) * st.units.factor("length")
        except ValueError:
            return
        axis = MemberAxis(st, mid)  # the section on the arc of a curved member
        c, ey = axis.at(at)[0], axis.normal(at)[0]
        pn.line([c - ey * 0.9 * h, c + ey * 0.9 * h], color=REDUNDANT, lw=2.0, z=7)
        pn.label(c + ey * 0.9 * h, f"section: {sec.group(3)}", direction=ey if ey[1] >= 0
                 else -ey, color=REDUNDANT, box=True, must=True)
        return
    react = re.match(r"^(.+)\.(x|y|n)$", name)
    if react and react.group(1) in st.supports:
        from .arrows import node_arrow

        node, comp = react.groups()
        if comp == "n":
            r = next(r for r in st.supports[node].restraints if r.direction == "n")
            dvec = np.array(r.vector[:2], dtype=float)
        else:
            dvec = np.array([1.0, 0.0]) if comp == "x" else np.array([0.0, 1.0])
        far, shaft = node_arrow(pn, st, node, dvec, 2.6 * h, color=REDUNDANT, what=name,
                                support_ok=True, lw=1.6, head=0.6 * h)
        pn.label(far, name, direction=shaft, color=REDUNDANT, box=True, must=True, gap=0.2 * h)
        return
    mid = name.split(".")[0]
    if mid in st.members:
        pn.line(polyline(st, mid), color=REDUNDANT, lw=2.2, z=4)
        _, _, ey = member_axes(st, mid)
        pn.label(MemberAxis(st, mid).at(0.5 * st.length(mid))[0], name, direction=ey if ey[1] >= 0 else -ey,
                 color=REDUNDANT, box=True, must=True)
