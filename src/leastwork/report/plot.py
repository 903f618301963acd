"""Diagrams of a solved structure, drawn to scale: the structure with its supports, loads,
imposed effects and redundants; the axial force n, shear force v and bending moment m drawn
along each member, square to it; the deflected shape, magnified.

Signs follow docs/conventions.md: n tension positive and v = dm/dx, both drawn on the
member's local +y side when positive; m drawn on the *tension side* (a positive m stretches
the local -y face, so it is drawn towards local -y). Every value is shown in the case units.

matplotlib is imported only inside functions; figures are made without pyplot (no global
state) and rendered by the Agg (PNG) or SVG canvas.
"""

from __future__ import annotations

import io
import math
import pathlib
import re
from collections.abc import Iterable, Sequence
from dataclasses import dataclass, field

import numpy as np
from numpy.polynomial import polynomial as P

from ..errors import CaseError
from ..model import (
    DistributedLoad,
    Misfit,
    NodalLoad,
    PointLoad,
    Settlement,
    Structure,
    TemperatureLoad,
)
from ..sheet import fmt

__all__ = ["DIAGRAMS", "IMAGE_FORMATS", "DEFLECTION_SHARE", "plot_case", "figure_svg",
           "parse_diagrams", "diagram_lines", "deflection_scale", "nice_factor",
           "structure_size"]

#: Diagram names in their usual order.
DIAGRAMS = ("structure", "n", "v", "m", "deflected")
#: Image formats by file suffix.
IMAGE_FORMATS = {".png": "png", ".svg": "svg"}
#: Largest displacement of the deflected shape, drawn as this share of the structure size.
DEFLECTION_SHARE = 0.10

# A sober palette of our own that stays legible in grey print.
_INK = "#1f1f1f"
_FAINT = "#a6a6a6"
_GROUND = "#d4d4d4"
_LOAD = "#1c4a73"
_IMPOSED = "#7b4a12"
_REDUNDANT = "#9b1c1c"
_POS_FILL = "#c3d6e8"
_NEG_FILL = "#efcdbd"
_POS_LINE = "#3b6e99"
_NEG_LINE = "#b0522c"
_SHAPE = "#1c4a73"
_FONT = 7.0  # labels, points
_DPI = 150

_QUANTITY = {
    "n": ("axial force n", "force",
          "tension +; + drawn on the member's local +y side; shading: blue +, red\u00a0-; "
          "bars: blue in tension, red in compression"),
    "v": ("shear force v", "force",
          "v = dm/dx; + drawn on the member's local +y side; shading: blue +, red\u00a0-"),
    "m": ("bending moment m", "moment",
          "drawn on the tension side; + when the local -y face is in tension; "
          "shading: blue +, red\u00a0-"),
}


# ---------------------------------------------------------------------------- helpers


def parse_diagrams(diagrams: str | Iterable[str]) -> tuple[str, ...]:
    """Diagram names from a comma-separated string or a sequence, checked against
    :data:`DIAGRAMS`, duplicates dropped, order kept.

    >>> parse_diagrams("m, structure,m")
    ('m', 'structure')
    """
    items = diagrams.split(",") if isinstance(diagrams, str) else list(diagrams)
    out: list[str] = []
    for item in items:
        name = str(item).strip().lower()
        if not name:
            continue
        if name not in DIAGRAMS:
            raise CaseError(f'unknown diagram "{item}"; expected some of '
                            f"{', '.join(DIAGRAMS)}", where="diagrams")
        if name not in out:
            out.append(name)
    if not out:
        raise CaseError(f"no diagram asked for; expected some of {', '.join(DIAGRAMS)}",
                        where="diagrams")
    return tuple(out)


def _case_names(sol, case: str | None) -> list[str]:
    if case is None:
        return list(sol.cases)
    if case not in sol.cases:
        raise CaseError(f'unknown load case "{case}"; the cases are '
                        f"{', '.join(sol.cases)}", where="case")
    return [case]


def nice_factor(x: float) -> float:
    """The largest of 1, 2, 5 times a power of ten not above ``x`` (> 0).

    >>> nice_factor(437.0), nice_factor(0.3), nice_factor(1.0)
    (200.0, 0.2, 1.0)
    """
    if not x > 0 or not math.isfinite(x):
        return 1.0
    p = 10.0 ** math.floor(math.log10(x) + 1e-12)
    for m in (5.0, 2.0, 1.0):
        if m * p <= x * (1 + 1e-12):
            return float(f"{m * p:.12g}")
    return float(f"{p:.12g}")


def _text(s: str) -> str:
    """Plain text for matplotlib: a dollar sign must not start mathtext."""
    return str(s).replace("$", r"\$")


def structure_size(st: Structure) -> float:
    """Size of the structure (m): the larger side of the box around its nodes."""
    xs = [n.x for n in st.nodes.values()]
    ys = [n.y for n in st.nodes.values()]
    size = max(max(xs) - min(xs), max(ys) - min(ys))
    return size if size > 0 else max((st.length(m) for m in st.members), default=1.0)


def _units(st: Structure) -> dict[str, tuple[float, str]]:
    u = st.units
    return {"force": (u.factor("force"), u.force), "length": (u.factor("length"), u.length),
            "moment": (u.factor("moment"), f"{u.force}·{u.length}")}


def _xy(st: Structure, node: str) -> np.ndarray:
    n = st.nodes[node]
    return np.array([n.x, n.y])


def _axes_of(st: Structure, mid: str) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Start point, local x and local y unit vectors of a member."""
    c, s = st.direction(mid)
    return _xy(st, st.members[mid].start), np.array([c, s]), np.array([-s, c])


def _away(st: Structure, node: str) -> np.ndarray:
    """Unit vector pointing from a node away from the members that meet there."""
    p = _xy(st, node)
    acc = np.zeros(2)
    for m in st.members.values():
        if node in (m.start, m.end):
            other = _xy(st, m.end if node == m.start else m.start)
            d = other - p
            acc += d / max(np.hypot(*d), 1e-300)
    if np.hypot(*acc) < 1e-6:
        return np.array([0.0, -1.0])
    return -acc / np.hypot(*acc)


def _snap(v: np.ndarray) -> np.ndarray:
    """The axis direction nearest to ``v`` (downwards first on a tie)."""
    cands = [np.array(c, dtype=float) for c in ((0, -1), (0, 1), (-1, 0), (1, 0))]
    return max(cands, key=lambda c: float(c @ v) + (1e-9 if c[1] < 0 else 0.0))


def _perp(v: np.ndarray) -> np.ndarray:
    return np.array([-v[1], v[0]])


def _pw_samples(pw, per_piece: int = 24) -> tuple[np.ndarray, np.ndarray]:
    """Positions and values of a Piecewise field, both sides of every break."""
    xs, vs = [], []
    for a, b, coef in pw.pieces():
        if b <= a:
            continue
        deg = int(np.max(np.flatnonzero(coef), initial=0))
        x = np.linspace(a, b, 2 if deg <= 1 else per_piece)
        xs.append(x)
        vs.append(P.polyval(x, coef))
    return np.concatenate(xs), np.concatenate(vs)


# ---------------------------------------------------------------------------- diagrams as data


def _field_zero(sol, res, quantity: str) -> float:
    """Values below this (case units) are round-off and shown as zero."""
    uf = _units(sol.structure)
    lref = max(sol.structure.length(m) for m in sol.structure.members)
    scale = res.equilibrium_scale / uf["force"][0]
    return 1e-9 * scale * (lref / uf["length"][0] if quantity == "m" else 1.0)


def diagram_lines(sol, case: str, quantity: str) -> dict[str, dict[str, np.ndarray]]:
    """The n, v or m diagram of load case ``case``, per member: ``x`` (distances from the
    start node, case length unit), ``value`` (case units; round-off shown as zero) and
    ``points`` (k, 2): the diagram's outline in global coordinates (case length unit),
    i.e. the member axis point plus ``side * value * scale``, where ``side`` is the local
    +y unit vector for n and v and local -y (the tension side) for m, and ``scale`` puts
    the largest value of the diagram :func:`_diagram_amplitude` away from its member.
    (In the figure a bar's axial force is drawn as the coloured bar with its value.)"""
    if quantity not in _QUANTITY:
        raise CaseError(f'unknown section force "{quantity}"; expected n, v or m',
                        where="diagrams")
    st = sol.structure
    res = sol.cases[_case_names(sol, case)[0]]
    uf = _units(st)
    vf = uf[_QUANTITY[quantity][1]][0]
    lf = uf["length"][0]
    zero = _field_zero(sol, res, quantity)
    raw = {}
    for mid, mr in res.members.items():
        x, v = _pw_samples(getattr(mr, quantity))
        v = v / vf
        v[np.abs(v) <= zero] = 0.0
        raw[mid] = (x, v)
    vmax = max((float(np.max(np.abs(v))) for _, v in raw.values()), default=0.0)
    scale = _diagram_amplitude(st) / vmax if vmax > 0 else 0.0
    out = {}
    for mid, (x, v) in raw.items():
        o, ex, ey = _axes_of(st, mid)
        side = -ey if quantity == "m" else ey
        base = o[None, :] + x[:, None] * ex[None, :]
        pts = base + side[None, :] * (v * scale)[:, None]
        out[mid] = {"x": x / lf, "value": v, "points": pts / lf}
    return out


def _diagram_amplitude(st: Structure) -> float:
    """Largest offset of an n, v or m diagram from its member (m)."""
    size = structure_size(st)
    lmin = min(st.length(m) for m in st.members)
    return min(0.12 * size, 0.5 * lmin)


def deflection_scale(sol, case: str, samples: int = 81) -> tuple[float, float, str]:
    """(magnification, largest displacement in case length units, where it is) of the
    deflected shape of ``case``: the magnification is a 1-2-5 number chosen so that the
    largest displacement is drawn at most :data:`DEFLECTION_SHARE` (and at least half of
    it) of the structure size."""
    factor, umax, where, _ = _deflection(sol, sol.cases[_case_names(sol, case)[0]], samples)
    return factor, umax / _units(sol.structure)["length"][0], where


def _deflection(sol, res, samples: int):
    """(magnification, largest displacement (m), where, shapes of the members)."""
    shapes = _shapes(sol, res, samples)
    umax, where = 0.0, ""
    for mid, (x, ux, uy) in shapes.items():
        mag = np.hypot(ux, uy)
        k = int(np.argmax(mag))
        if mag[k] > umax:
            umax, where = float(mag[k]), _place(sol.structure, mid, float(x[k]))
    size = structure_size(sol.structure)
    if umax <= 1e-12 * size:
        return 1.0, 0.0, "", shapes
    return nice_factor(DEFLECTION_SHARE * size / umax), umax, where, shapes


def _place(st: Structure, mid: str, x: float) -> str:
    """A point of a member in words: its node at an end, else the distance along it."""
    L = st.length(mid)
    if x <= 1e-9 * L:
        return f"node {st.members[mid].start}"
    if x >= L * (1 - 1e-9):
        return f"node {st.members[mid].end}"
    return f"{mid} at {fmt(x / st.units.factor('length'), 3)} {st.units.length}"


def _shapes(sol, res, samples: int) -> dict[str, tuple[np.ndarray, np.ndarray, np.ndarray]]:
    """Positions along each member and the global displacements there (m)."""
    from ..displacements import member_shape

    out = {}
    for mid in sol.structure.members:
        x, ux, uy, _ = member_shape(sol.structure, sol.topology, res, mid, samples=samples)
        out[mid] = (x, ux, uy)
    return out


# ---------------------------------------------------------------------------- a drawing panel


@dataclass
class _Panel:
    """One axes with the bookkeeping of what is drawn: extent and placed labels."""

    ax: object
    size: float  #: structure size, m
    per_inch: float  #: data units (m) per inch of the drawing, roughly
    pts: list = field(default_factory=list)
    boxes: list = field(default_factory=list)  #: (x0, y0, x1, y1, text)
    lines: dict = field(default_factory=dict)  #: (color, lw, ls, z) -> polylines
    polys: dict = field(default_factory=dict)  #: (face, edge, lw, z) -> polygons

    @property
    def h(self) -> float:
        """Size of symbols (m)."""
        return 0.045 * self.size

    def include(self, *points) -> None:
        for p in points:
            self.pts.append(np.asarray(p, dtype=float).reshape(-1, 2))

    def line(self, pts, color=_INK, lw=1.0, ls="-", z=2) -> None:
        """A polyline; lines and polygons are gathered by style and drawn as a few
        collections when the panel is finished (far quicker than one artist each)."""
        pts = np.asarray(pts, dtype=float)
        self.lines.setdefault((color, lw, ls, z), []).append(pts)
        self.include(pts)

    def poly(self, pts, face, edge="none", lw=0.6, z=1) -> None:
        pts = np.asarray(pts, dtype=float)
        self.polys.setdefault((face, edge, lw, z), []).append(pts)
        self.include(pts)

    def circle(self, c, r, face="white", edge=_INK, lw=0.9, z=4) -> None:
        t = np.linspace(0.0, 2 * math.pi, 29)[:-1]
        self.poly(np.asarray(c, dtype=float) + r * np.c_[np.cos(t), np.sin(t)], face=face,
                  edge=edge, lw=lw, z=z)

    def arrow(self, tail, tip, color=_LOAD, lw=0.9, head=None, z=5) -> None:
        """A straight arrow with a filled head of our own drawing."""
        tail, tip = np.asarray(tail, float), np.asarray(tip, float)
        d = tip - tail
        n = np.hypot(*d)
        if n <= 0:
            return
        d /= n
        hl = min(head or 0.45 * self.h, 0.6 * n)
        base = tip - d * hl
        self.line([tail, base], color=color, lw=lw, z=z)
        w = _perp(d) * hl * 0.38
        self.poly([tip, base + w, base - w], face=color, z=z)

    def arc_arrow(self, c, r, ccw: bool, color=_LOAD, lw=0.9, z=5) -> np.ndarray:
        """A 270 degree arc around ``c`` with a head in the turning sense; returns the
        point where a label may go."""
        t = np.linspace(math.radians(-45), math.radians(225), 40)
        if not ccw:
            t = t[::-1]
        pts = np.asarray(c) + r * np.c_[np.cos(t), np.sin(t)]
        self.line(pts[:-3], color=color, lw=lw, z=z)
        self.arrow(pts[-4], pts[-1], color=color, lw=lw, head=0.5 * self.h, z=z)
        return np.asarray(c) + r * 1.25 * np.array([0.0, 1.0])

    def occupy(self, pts) -> None:
        """Keep labels off the box around ``pts`` (a drawn load, say)."""
        pts = np.asarray(pts, dtype=float).reshape(-1, 2)
        lo, hi = pts.min(axis=0), pts.max(axis=0)
        self.boxes.append((lo[0], lo[1], hi[0], hi[1], ""))

    def label(self, p, text: str, direction=(0.0, 1.0), color=_INK, size=_FONT,
              gap: float | None = None, weight="normal", box: bool = False,
              force: bool = False, must: bool = False) -> bool:
        """Put ``text`` next to point ``p`` on the side ``direction``; skip it when it would
        overlap a label already placed (a duplicate nearby is simply dropped) unless
        ``force``; try a few offsets first, more of them when it ``must`` be shown (then
        the first place is taken when none is free). Returns whether it was placed."""
        d = np.asarray(direction, dtype=float)
        d = d / np.hypot(*d) if np.hypot(*d) > 0 else np.array([0.0, 1.0])
        gap = 0.35 * self.h if gap is None else gap
        w = (0.58 * len(text) + 0.4) * size / 72 * self.per_inch
        hgt = 1.25 * size / 72 * self.per_inch
        ha = "left" if d[0] > 0.38 else ("right" if d[0] < -0.38 else "center")
        va = "bottom" if d[1] > 0.38 else ("top" if d[1] < -0.38 else "center")
        p = np.asarray(p, dtype=float)
        t = _perp(d)
        tries = [gap, gap + 1.1 * hgt, gap + 2.2 * hgt] + ([gap + k * 1.1 * hgt
                                                            for k in range(3, 8)] if must else [])
        cands = [p + d * g for g in tries] + [p + d * gap + t * s * w * 0.6 for s in (1, -1)]
        if must:  # then a widening ring of places around the point
            cands += [p + d * gap + t * s * w * f for f in (1.2, 1.8) for s in (1, -1)]
            for r in (2.0, 3.5, 5.0, 7.0):
                for ang in np.linspace(0.0, 2 * math.pi, 12, endpoint=False):
                    cands.append(p + r * hgt * np.array([math.cos(ang), math.sin(ang)])
                                 + d * gap)
        for n_try, q in enumerate(cands + ([cands[0]] if must else [])):
            force_now = force or (must and n_try == len(cands))
            x0 = q[0] - (0 if ha == "left" else (w if ha == "right" else w / 2))
            y0 = q[1] - (0 if va == "bottom" else (hgt if va == "top" else hgt / 2))
            rect = (x0, y0, x0 + w, y0 + hgt)
            clash = [b for b in self.boxes if not (rect[2] <= b[0] or b[2] <= rect[0]
                                                   or rect[3] <= b[1] or b[3] <= rect[1])]
            if clash and not force_now:
                if any(b[4] == text for b in clash) and not must:
                    return False
                continue
            kw = {}
            if box:
                kw["bbox"] = dict(boxstyle="round,pad=0.18", facecolor="white",
                                  edgecolor=color, lw=0.5)
            self.ax.text(q[0], q[1], _text(text), ha=ha, va=va, fontsize=size, color=color,
                         weight=weight, zorder=8, **kw)
            self.boxes.append((*rect, text))
            self.include([rect[0], rect[1]], [rect[2], rect[3]])
            return True
        return False

    def extent(self) -> np.ndarray:
        """(2, 2): lower-left and upper-right corners of everything drawn."""
        pts = np.vstack(self.pts) if self.pts else np.zeros((1, 2))
        return np.array([pts.min(axis=0), pts.max(axis=0)])

    def finish(self, box: np.ndarray, pad: float) -> None:
        """Same limits for every panel of a figure, so that all are at one scale."""
        from matplotlib.collections import LineCollection, PolyCollection
        from matplotlib.ticker import NullLocator

        for axis in (self.ax.xaxis, self.ax.yaxis):  # no ticks: none are shown, and
            axis.set_major_locator(NullLocator())  # making them is slow
            axis.set_minor_locator(NullLocator())

        for (face, edge, lw, z), polys in self.polys.items():
            self.ax.add_collection(PolyCollection(polys, facecolors=face, edgecolors=edge,
                                                  linewidths=lw, zorder=z, joinstyle="round"),
                                   autolim=False)
        for (color, lw, ls, z), lines in self.lines.items():
            self.ax.add_collection(LineCollection(lines, colors=color, linewidths=lw,
                                                  linestyles=ls, zorder=z, capstyle="round",
                                                  joinstyle="round"), autolim=False)
        lo, hi = box[0] - pad, box[1] + pad
        self.ax.set_xlim(lo[0], hi[0])
        self.ax.set_ylim(lo[1], hi[1])
        self.ax.set_aspect("equal", adjustable="box")
        self.ax.set_axis_off()


# ---------------------------------------------------------------------------- structure panel


def _draw_members(pn: _Panel, st: Structure, faint: bool = False) -> None:
    for m in st.members.values():
        a, b = _xy(st, m.start), _xy(st, m.end)
        if faint:
            pn.line([a, b], color=_FAINT, lw=0.8, z=1)
            continue
        pn.line([a, b], color=_INK, lw=2.0 if m.is_beam else 1.1, z=3)
    if faint:
        return
    r = 0.22 * pn.h
    for m in st.members.values():
        a, b = _xy(st, m.start), _xy(st, m.end)
        d = (b - a) / np.hypot(*(b - a))
        if m.is_beam:
            if m.hinge_start:
                pn.circle(a + d * 1.6 * r, r)
            if m.hinge_end:
                pn.circle(b - d * 1.6 * r, r)
        else:
            pn.circle(a, 0.75 * r, z=4)
            pn.circle(b, 0.75 * r, z=4)


def _ground(pn: _Panel, p, a, width: float, depth: float) -> None:
    """A ground band behind point ``p`` on the side ``a`` (unit), ``width`` wide."""
    t = _perp(a)
    q = [p + t * width / 2, p - t * width / 2, p - t * width / 2 + a * depth,
         p + t * width / 2 + a * depth]
    pn.poly(q, face=_GROUND, z=1)
    pn.line([q[0], q[1]], color=_INK, lw=1.0, z=2)


def _zigzag(p, a, length: float, amp: float, turns: int = 5) -> np.ndarray:
    t = _perp(a)
    s = np.linspace(0.2, 0.8, 2 * turns + 1)
    pts = [p, p + a * 0.2 * length]
    for k, sk in enumerate(s[1:-1]):
        pts.append(p + a * sk * length + t * amp * (1 if k % 2 == 0 else -1))
    pts += [p + a * 0.8 * length, p + a * length]
    return np.array(pts)


def _ground_side(nvec: np.ndarray, away: np.ndarray) -> np.ndarray:
    """Which way (+ or - ``nvec``) the ground of a one-way restraint lies: away from the
    members when that is clear, else below, else to the left."""
    d = float(nvec @ away)
    if abs(d) > 0.3:
        return nvec if d > 0 else -nvec
    if abs(nvec[1]) > 1e-9:
        return nvec if nvec[1] < 0 else -nvec
    return nvec if nvec[0] < 0 else -nvec


def _support_side(st: Structure, sup) -> np.ndarray:
    """Unit vector from a support's node towards its ground."""
    away = _away(st, sup.node)
    rigid = [r for r in sup.restraints if not r.is_spring and r.direction != "rz"]
    if len(rigid) == 1:
        return _ground_side(np.array(rigid[0].vector[:2], dtype=float), away)
    pinned = len(rigid) >= 2 and not any(r.direction == "rz" and not r.is_spring
                                         for r in sup.restraints)
    down = np.array([0.0, -1.0])
    if pinned and not any(_member_towards(st, sup.node, down)):
        return down  # a pin sits on the ground below when it can
    return _snap(away)


def _member_towards(st: Structure, node: str, d: np.ndarray):
    p = _xy(st, node)
    for m in st.members.values():
        if node in (m.start, m.end):
            u = _xy(st, m.end if node == m.start else m.start) - p
            yield float(u @ d) > 0.95 * np.hypot(*u)


def _draw_supports(pn: _Panel, st: Structure, faint: bool = False) -> None:
    h = pn.h * (0.7 if faint else 1.0)
    uf = _units(st)
    col = _FAINT if faint else _INK
    for sup in st.supports.values():
        p = _xy(st, sup.node)
        away = _away(st, sup.node)
        rigid = [r for r in sup.restraints if not r.is_spring]
        trans = [r for r in rigid if r.direction != "rz"]
        rot = any(r.direction == "rz" for r in rigid)
        a = _support_side(st, sup)
        if len(trans) >= 2:
            if rot:  # fixed: the ground right at the node
                _ground(pn, p, a, 2.4 * h, 0.55 * h)
            else:  # pinned: a triangle on the ground
                t = _perp(a)
                pn.poly([p, p + a * h + t * 0.62 * h, p + a * h - t * 0.62 * h],
                        face="white", edge=col, lw=0.9, z=3)
                _ground(pn, p + a * h, a, 2.0 * h, 0.4 * h)
        elif len(trans) == 1:  # roller (perhaps on an inclined surface) or guided
            t = _perp(a)
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
                a = _ground_side(np.array(r.vector[:2], dtype=float), away)
                zz = _zigzag(p, a, 2.4 * h, 0.3 * h)
                pn.line(zz, color=col, lw=0.8, z=3)
                _ground(pn, p + a * 2.4 * h, a, 1.6 * h, 0.35 * h)
                k = r.stiffness / (uf["force"][0] / uf["length"][0])
                where, unit = p + a * 1.2 * h + _perp(a) * 0.45 * h, \
                    f"{uf['force'][1]}/{uf['length'][1]}"
            if not faint:
                pn.label(where, f"k = {fmt(k)} {unit}", direction=(1, 0), size=_FONT - 0.5)


def _blocked(st: Structure, node: str, d: np.ndarray) -> bool:
    """Whether a member or the support symbol at ``node`` lies in direction ``d``."""
    if any(_member_towards(st, node, d)):
        return True
    return node in st.supports and float(_support_side(st, st.supports[node]) @ d) > 0.7


def _range_text(name: str, pair, f: float, unit: str) -> str:
    a0, a1 = (fmt(v / f, 3) for v in pair)
    return f"{name} = {a0}" + ("" if pair[0] == pair[1] else f" to {a1}") + f" {unit}"


def _draw_loads(pn: _Panel, st: Structure, case: str) -> None:
    uf = _units(st)
    ff, fu = uf["force"]
    mf, mu = uf["moment"]
    lf, lu = uf["length"]
    la = 2.6 * pn.h
    loads = [ld for ld in st.loads if ld.case == case]
    # concentrated forces and couples, added up per point
    points: dict[tuple, list] = {}
    for ld in loads:
        if isinstance(ld, NodalLoad):
            key, p = ("node", ld.node), _xy(st, ld.node)
        elif isinstance(ld, PointLoad):
            o, ex, _ = _axes_of(st, ld.member)
            key, p = ("member", ld.member, round(ld.at, 9)), o + ex * ld.at
        else:
            continue
        acc = points.setdefault(key, [p, 0.0, 0.0, 0.0])
        acc[1] += ld.fx
        acc[2] += ld.fy
        acc[3] += ld.mz
    for key, (p, fx, fy, mz) in points.items():
        f = np.array([fx, fy])
        mag = float(np.hypot(*f))
        if mag > 0:
            d = f / mag
            text = f"{fmt(mag / ff, 3)} {fu}"
            node = key[1] if key[0] == "node" else None
            if node is None or not _blocked(st, node, -d):
                tail, tip = p - d * la, p - d * 0.1 * pn.h  # pushing on the point
            elif not _blocked(st, node, d):
                tail, tip = p + d * 0.1 * pn.h, p + d * la  # pulling on it
            else:
                side = _perp(d) * 0.45 * pn.h
                tail, tip = p - d * la + side, p - d * 0.1 * pn.h + side
            pn.arrow(tail, tip, color=_LOAD, lw=1.2)
            pn.occupy([tail, tip])
            far = tail if np.hypot(*(tail - p)) > np.hypot(*(tip - p)) else tip
            pn.label(far, text, direction=far - p, color=_LOAD, must=True)
        if mz:
            q = pn.arc_arrow(p, 0.9 * pn.h, mz > 0, color=_LOAD)
            pn.label(q, f"{fmt(abs(mz) / mf, 3)} {mu}", color=_LOAD, must=True)
    # distributed loads, stacked outwards when several act on one member
    stack: dict[str, int] = {}
    for ld in loads:
        if not isinstance(ld, DistributedLoad):
            continue
        o, ex, ey = _axes_of(st, ld.member)
        L = st.length(ld.member)
        a, b = ld.start, (L if math.isnan(ld.end) else ld.end)
        k = stack.get(ld.member, 0)
        stack[ld.member] = k + 1
        wmax = max(np.hypot(ld.wx[i], ld.wy[i]) for i in (0, 1))
        if wmax <= 0:
            continue
        n = max(3, int(round((b - a) / (0.055 * pn.size))) + 1)
        s = np.linspace(a, b, n)
        frac = (s - a) / (b - a)
        wx = ld.wx[0] + (ld.wx[1] - ld.wx[0]) * frac
        wy = ld.wy[0] + (ld.wy[1] - ld.wy[0]) * frac
        mean = np.array([np.mean(wx), np.mean(wy)])
        out = -mean / np.hypot(*mean) if np.hypot(*mean) > 0 else ey
        shift = out * k * 1.25 * la
        length = 0.75 * la
        tails = []
        for si, wxi, wyi in zip(s, wx, wy, strict=True):
            tip = o + ex * si + shift
            w = np.array([wxi, wyi]) / wmax
            tail = tip - w * length if np.hypot(*w) > 0 else tip
            tails.append(tail)
            if np.hypot(*w) > 0.05:
                pn.arrow(tail, tip, color=_LOAD, lw=0.6, head=0.35 * pn.h)
        pn.line(tails, color=_LOAD, lw=0.8, z=5)
        parts = [_range_text(nm, pr, ff / lf, f"{fu}/{lu}")
                 for nm, pr in (("wx", ld.wx), ("wy", ld.wy)) if any(pr)]
        mid = len(tails) // 2
        pn.label(tails[mid], ", ".join(parts), direction=out, color=_LOAD, must=True)
        pn.occupy(np.vstack([tails, o + ex * s[:, None] + shift]))
    # imposed effects: temperature, misfit, settlement
    for ld in loads:
        if isinstance(ld, TemperatureLoad):
            o, ex, ey = _axes_of(st, ld.member)
            L = st.length(ld.member)
            sides = [ey, -ey] if ld.gradient == 0 else ([-ey] if ld.gradient > 0 else [ey])
            for sd in sides:  # the warmer face, or both faces for a uniform change
                off = sd * 0.35 * pn.h
                pn.line([o + off + ex * 0.08 * L, o + off + ex * 0.92 * L], color=_IMPOSED,
                        lw=1.0, ls=(0, (4, 1.5, 1, 1.5)), z=4)
            text = f"temperature: uniform {fmt(ld.uniform, 3)} K"
            if ld.gradient:
                text += f", gradient {fmt(ld.gradient, 3)} K (warmer face marked)"
            pn.label(o + ex * 0.5 * L + ey * 0.4 * pn.h, text, direction=ey, color=_IMPOSED,
                     must=True)
        elif isinstance(ld, Misfit):
            o, ex, ey = _axes_of(st, ld.member)
            c = o + ex * 0.3 * st.length(ld.member)  # clear of a cut at mid-length
            for s in (-0.18, 0.18):
                pn.line([c + ex * s * pn.h - ey * 0.5 * pn.h, c + ex * s * pn.h + ey * 0.5 * pn.h],
                        color=_IMPOSED, lw=1.4, z=6)
            how = "too short" if ld.elongation < 0 else "too long"
            pn.label(c - ey * 0.5 * pn.h, f"misfit {fmt(ld.elongation / lf, 3)} {lu} ({how})",
                     direction=-ey, color=_IMPOSED, must=True)
        elif isinstance(ld, Settlement):
            p = _xy(st, ld.node)
            side = -_perp(_support_side(st, st.supports[ld.node]))
            base = p + side * 2.2 * pn.h
            for d, v in ld.values:
                if not v:
                    continue
                if d == "rz":
                    q = pn.arc_arrow(base, 0.7 * pn.h, v > 0, color=_IMPOSED)
                    pn.label(q, f"settlement drz = {fmt(v, 3)} rad", color=_IMPOSED, must=True)
                    continue
                if d == "n":
                    vec = np.array(next(r.vector[:2] for r in st.supports[ld.node].restraints
                                        if r.direction == "n"))
                else:
                    vec = np.array([1.0, 0.0]) if d == "x" else np.array([0.0, 1.0])
                vec = vec * (1 if v > 0 else -1)
                pn.line([base - vec * 1.6 * pn.h, base], color=_IMPOSED, lw=0.9, ls="--")
                pn.arrow(base, base + vec * 1.2 * pn.h, color=_IMPOSED)
                pn.label(base + vec * 1.2 * pn.h, f"settlement d{d} = {fmt(v / lf, 3)} {lu}",
                         direction=side, color=_IMPOSED)


def _draw_redundants(pn: _Panel, sol, res) -> None:
    st, topo = sol.structure, sol.topology
    uf = _units(st)
    for i, j in enumerate(sol.redundant_columns):
        col = topo.columns[j]
        moment = col.kind in ("start_m", "end_m") or (col.kind == "reaction"
                                                       and col.name.endswith(".rz"))
        f, unit = uf["moment" if moment else "force"]
        text = f"X{i + 1} = {col.name} = {fmt(res.redundants[i] / f, 3)} {unit}"
        h = pn.h
        if col.kind == "reaction":
            p = _xy(st, col.owner)
            away = _support_side(st, st.supports[col.owner])
            direction = col.name.rsplit(".", 1)[1]
            if direction == "rz":
                q = pn.arc_arrow(p, 1.6 * h, True, color=_REDUNDANT, lw=1.1)
                pn.label(q, text, color=_REDUNDANT, box=True, must=True)
                continue
            if direction == "n":
                r = next(r for r in st.supports[col.owner].restraints if r.direction == "n")
                d = np.array(r.vector[:2], dtype=float)
            else:
                d = np.array([1.0, 0.0]) if direction == "x" else np.array([0.0, 1.0])
            t = _perp(d)
            if float(t @ -away) > 0 or (abs(float(t @ away)) < 1e-9 and t[0] + t[1] < 0):
                t = -t
            c = p + t * 1.9 * h + away * (0.6 * h if abs(float(d @ away)) < 0.5 else 0.0)
            tail = c - d * 2.0 * h
            pn.arrow(tail, c, color=_REDUNDANT, lw=1.4, head=0.55 * h)
            pn.label(tail, text, direction=-d if abs(d[1]) > 0.5 else t,
                     color=_REDUNDANT, box=True, must=True)
        elif col.kind == "axial":
            o, ex, ey = _axes_of(st, col.owner)
            c = o + ex * 0.5 * st.length(col.owner)
            for s in (-0.2, 0.2):
                pn.line([c + ex * s * h - ey * 0.55 * h, c + ex * s * h + ey * 0.55 * h],
                        color=_REDUNDANT, lw=1.5, z=7)
            pn.label(c + ey * 0.55 * h, text + " (cut)", direction=ey if ey[1] >= -1e-9
                     else -ey, color=_REDUNDANT, box=True, must=True)
        else:
            o, ex, ey = _axes_of(st, col.owner)
            L = st.length(col.owner)
            at = min(0.12 * L, 1.5 * h)
            c = o + ex * (at if col.kind == "start_m" else L - at)
            pn.circle(c, 0.3 * h, edge=_REDUNDANT, lw=1.2, z=7)
            pn.label(c + ey * 0.3 * h, text + " (hinge put in)", direction=ey,
                     color=_REDUNDANT, box=True, must=True)


def _node_names(pn: _Panel, st: Structure) -> None:
    for nid in st.nodes:
        d = _away(st, nid)
        if nid in st.supports:  # beside the support symbol, on its left or lower side
            a = _support_side(st, st.supports[nid])
            t = _perp(a)
            t = -t if t[0] > 1e-9 or (abs(t[0]) <= 1e-9 and t[1] > 0) else t
            pn.label(_xy(st, nid) + a * 0.5 * pn.h, nid, direction=t, gap=0.9 * pn.h,
                     size=_FONT + 0.5, weight="bold")
            continue
        d = d + _perp(d) * 0.6
        pn.label(_xy(st, nid), nid, direction=d, gap=0.55 * pn.h, size=_FONT + 0.5,
                 weight="bold")


def _member_names(pn: _Panel, st: Structure) -> None:
    for mid in st.members:
        o, ex, ey = _axes_of(st, mid)
        side = -ey if ey[1] > 1e-9 else ey
        pn.label(o + ex * 0.5 * st.length(mid), mid, direction=side, color="#555555",
                 size=_FONT - 0.5, gap=0.3 * pn.h)


def _scale_bar(pn: _Panel, st: Structure) -> None:
    lf, lu = _units(st)["length"]
    xs = [n.x for n in st.nodes.values()]
    ys = [n.y for n in st.nodes.values()]
    bar = nice_factor(0.2 * structure_size(st) / lf) * lf
    p0 = np.array([min(xs), min(ys) - 3.2 * pn.h])
    pn.line([p0, p0 + [bar, 0]], color=_INK, lw=1.2)
    for q in (p0, p0 + [bar, 0]):
        pn.line([q - [0, 0.2 * pn.h], q + [0, 0.2 * pn.h]], color=_INK, lw=0.8)
    pn.label(p0 + [bar / 2, -0.2 * pn.h], f"{fmt(bar / lf)} {lu}", direction=(0, -1),
             gap=0.1 * pn.h, force=True)


def _structure_panel(pn: _Panel, sol, case: str) -> tuple[str, str]:
    st = sol.structure
    res = sol.cases[case]
    _draw_members(pn, st)
    _draw_supports(pn, st)
    _node_names(pn, st)
    _draw_redundants(pn, sol, res)
    _draw_loads(pn, st, case)
    _member_names(pn, st)
    _scale_bar(pn, st)
    note = ("to scale; loads in blue, imposed effects brown, redundants X red; "
            "open circles are hinges and pins")
    if any(isinstance(ld, TemperatureLoad) and ld.case == case for ld in st.loads):
        note += "; gradient = temperature of local -y face minus +y face"
    return f"{case}: structure, loads and redundants", note


# ---------------------------------------------------------------------------- force diagrams


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


def _bar_force(pn: _Panel, st: Structure, mid: str, value: float) -> None:
    """A bar's constant axial force: the bar drawn in the colour of its sign (blue tension,
    red compression) with the value at mid-length."""
    o, ex, ey = _axes_of(st, mid)
    L = st.length(mid)
    color = _POS_LINE if value > 0 else (_NEG_LINE if value < 0 else _FAINT)
    pn.line([o + ex * 0.04 * L, o + ex * 0.96 * L], color=color, lw=3.2, z=3)
    side = ey if ey[1] >= -1e-9 else -ey
    kw = dict(direction=side, gap=0.3 * pn.h, box=True, color=color if value else _INK)
    for at in (0.5, 0.32, 0.68):  # crossing bars: slide the value along the bar
        if pn.label(o + ex * at * L, fmt(value, 3), **kw):
            return
    pn.label(o + ex * 0.5 * L, fmt(value, 3), must=True, **kw)


def _force_panel(pn: _Panel, sol, case: str, quantity: str) -> tuple[str, str]:
    st = sol.structure
    res = sol.cases[case]
    what, dim, conv = _QUANTITY[quantity]
    uf = _units(st)
    lf = uf["length"][0]
    unit = uf[dim][1]
    lines = diagram_lines(sol, case, quantity)
    _draw_members(pn, st, faint=True)
    _draw_supports(pn, st, faint=True)
    vmax = max(float(np.max(np.abs(d["value"]))) for d in lines.values())
    title = f"{case}: {what} [{unit}]"
    if vmax == 0.0:
        xs = [n.x for n in st.nodes.values()]
        ys = [n.y for n in st.nodes.values()]
        pn.label([(min(xs) + max(xs)) / 2, (min(ys) + max(ys)) / 2],
                 f"{what} is zero in every member", direction=(0, 1), size=_FONT + 1,
                 gap=2.0 * pn.h, force=True)
        return title, conv
    scale = _diagram_amplitude(st) / vmax
    cands = []  # (priority, anchor, direction, value)
    gmax = max(lines, key=lambda m: float(np.max(lines[m]["value"])))
    gmin = min(lines, key=lambda m: float(np.min(lines[m]["value"])))
    for mid, d in lines.items():
        o, ex, ey = _axes_of(st, mid)
        side = -ey if quantity == "m" else ey
        x, v = d["x"] * lf, d["value"]
        if quantity == "n" and not st.members[mid].is_beam:
            _bar_force(pn, st, mid, float(v[0]))
            continue
        for rx, rv in _sign_runs(x, v):
            if not np.any(rv):
                continue
            base = o[None, :] + rx[:, None] * ex[None, :]
            tip = base + side[None, :] * (rv * scale)[:, None]
            sign = 1 if np.sum(rv) > 0 else -1
            pn.poly(np.vstack([base[:1], tip, base[-1:]]),
                    face=_POS_FILL if sign > 0 else _NEG_FILL, z=2)
            pn.line(tip, color=_INK, lw=0.8, z=3)
        for end in (0, -1):  # closing lines at the member ends
            b = o + ex * x[end]
            pn.line([b, b + side * v[end] * scale], color=_INK, lw=0.8, z=3)

        def point(at, value, _o=o, _ex=ex, _side=side):
            return _o + _ex * at + _side * value * scale, _side * (1 if value >= 0 else -1)

        def add(prio, at, value, _point=point):
            if value != 0.0:
                p, dr = _point(at, value)
                cands.append((prio, p, dr, value))

        if mid == gmax:
            k = int(np.argmax(v))
            add(0, x[k], v[k])
        if mid == gmin:
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
                    add(2, at, 0.0 if abs(vv) <= _field_zero(sol, res, "m") else vv)
        brk = getattr(res.members[mid], quantity).breaks[1:-1]
        for b in brk:
            kk = np.flatnonzero(np.isclose(x, b, rtol=0, atol=1e-9 * L))
            for k in kk:
                add(3, x[k], v[k])
        if quantity != "m":
            k = int(np.argmax(np.abs(v)))
            add(2, x[k], v[k])
    cands.sort(key=lambda c: c[0])
    for _, p, dr, value in cands:
        pn.label(p, fmt(value, 3), direction=dr, gap=0.25 * pn.h)
    return title, conv


# ---------------------------------------------------------------------------- deflected shape


def _deflected_panel(pn: _Panel, sol, case: str) -> tuple[str, str]:
    st = sol.structure
    res = sol.cases[case]
    lf, lu = _units(st)["length"]
    factor, umax, where, shapes = _deflection(sol, res, 81)
    umax /= lf
    _draw_members(pn, st, faint=True)
    _draw_supports(pn, st, faint=True)
    title = f"{case}: deflected shape"
    if umax == 0.0:
        return title, "no displacement in this load case"
    best = (0.0, None)
    for mid, (x, ux, uy) in shapes.items():
        o, ex, _ = _axes_of(st, mid)
        base = o[None, :] + x[:, None] * ex[None, :]
        moved = base + factor * np.c_[ux, uy]
        pn.line(moved, color=_SHAPE, lw=1.6, z=4)
        mag = np.hypot(ux, uy)
        k = int(np.argmax(mag))
        if mag[k] > best[0]:
            best = (float(mag[k]), moved[k], np.array([ux[k], uy[k]]))
    _, p, u = best
    pn.circle(p, 0.18 * pn.h, face=_SHAPE, edge=_SHAPE, z=6)
    pn.label(p, f"{fmt(umax, 3)} {lu}", direction=u, color=_SHAPE, force=True)
    return (f"{title}, displacements drawn × {fmt(factor)}",
            f"largest displacement {fmt(umax, 3)} {lu} ({where}); undeformed shape in grey")


# ---------------------------------------------------------------------------- the figure


def _columns(st: Structure, nd: int) -> tuple[int, float, float]:
    """(columns of panels, panel width in inches, metres of the drawing per inch) from the
    proportions of the structure."""
    xs = [n.x for n in st.nodes.values()]
    ys = [n.y for n in st.nodes.values()]
    pad = 0.3 * structure_size(st)
    dw, dh = max(xs) - min(xs) + 2 * pad, max(ys) - min(ys) + 2 * pad
    ncols, w = (1, 8.0) if dw / dh >= 2.0 or nd == 1 else (2, 4.0)
    w = min(w, 6.0 * dw / dh)  # tall structures: no panel taller than 6 in
    return ncols, w, dw / w


def _draw_panels(sol, cases, shown, ncols: int, w: float, per_inch: float):
    """A figure with every panel drawn (limits and size not yet set)."""
    import textwrap

    from matplotlib.figure import Figure

    rows_per = math.ceil(len(shown) / ncols)
    nrows = rows_per * len(cases)
    fig = Figure(figsize=(ncols * w, nrows * w), dpi=_DPI)
    gs = fig.add_gridspec(nrows, ncols)
    size = structure_size(sol.structure)
    panels, titles, rows = [], [], []
    wrap = int(w * 72 / (7.0 * 0.56))
    for ci, case in enumerate(cases):
        for k, name in enumerate(shown):
            rows.append(ci * rows_per + k // ncols)
            ax = fig.add_subplot(gs[rows[-1], k % ncols])
            pn = _Panel(ax, size, per_inch)
            if name == "structure":
                title, note = _structure_panel(pn, sol, case)
            elif name == "deflected":
                title, note = _deflected_panel(pn, sol, case)
            else:
                title, note = _force_panel(pn, sol, case, name)
            panels.append(pn)
            text = "\n".join([_text(title), *textwrap.wrap(_text(note), wrap)])
            titles.append(text.count("\n") + 1)
            ax.set_title(text, fontsize=7.0, loc="left", linespacing=1.25)
    return fig, gs, panels, titles, rows


def _figure(sol, cases: Sequence[str], diagrams: Sequence[str]):
    """The figure: one band of panels per load case, every panel at the same scale."""
    import textwrap

    st = sol.structure
    shown = tuple(diagrams)
    if not any(m.is_beam for m in st.members.values()) and len(diagrams) > 1:
        shown = tuple(d for d in diagrams if d not in ("v", "m"))
    ncols, w, per_inch = _columns(st, len(shown))
    rows_per = math.ceil(len(shown) / ncols)
    nrows = rows_per * len(cases)
    size = structure_size(st)
    pad = 0.03 * size
    for _ in range(2):  # labels are sized from the scale, and the scale from the labels
        fig, gs, panels, titles, rows = _draw_panels(sol, cases, shown, ncols, w, per_inch)
        boxes = np.array([pn.extent() for pn in panels])
        x0, x1 = boxes[:, 0, 0].min() - pad, boxes[:, 1, 0].max() + pad
        if (x1 - x0) / w <= 1.1 * per_inch:
            break
        per_inch = (x1 - x0) / w
    # one horizontal scale for all panels; each row of panels as tall as it needs
    y_rows = np.zeros((nrows, 2))
    y_rows[:, 0], y_rows[:, 1] = np.inf, -np.inf
    for r, bx in zip(rows, boxes, strict=True):
        y_rows[r] = min(y_rows[r, 0], bx[0, 1] - pad), max(y_rows[r, 1], bx[1, 1] + pad)
    for r, pn in zip(rows, panels, strict=True):
        pn.finish(np.array([[x0, y_rows[r, 0]], [x1, y_rows[r, 1]]]), 0.0)
    heights = w * (y_rows[:, 1] - y_rows[:, 0]) / (x1 - x0)
    title_h = max(titles) * 7.0 * 1.25 / 72 + 0.12
    uf = _units(st)
    sub = (f"lengths in {uf['length'][1]}, forces in {uf['force'][1]}, moments in "
           f"{uf['moment'][1]}; sign conventions as in the panel notes")
    if shown != tuple(diagrams):
        sub += "; v and m are zero (every member is a pin-ended bar)"
    head = 0.78
    margin = 0.15
    fig_w = ncols * w + (ncols - 1) * 0.25 + 2 * margin
    fig_h = float(np.sum(heights)) + nrows * title_h + head + margin
    fig.set_size_inches(fig_w, fig_h)
    gs.set_height_ratios(list(heights))
    gs.update(left=margin / fig_w, right=1 - margin / fig_w, bottom=margin / fig_h,
              top=1 - (head + title_h) / fig_h, hspace=title_h / float(np.mean(heights)),
              wspace=0.25 / w)
    for pn in panels:  # the axes follow the new grid
        pn.ax.set_position(pn.ax.get_subplotspec().get_position(fig))
    sub = "\n".join(textwrap.wrap(_text(sub), int(fig_w * 72 / (9.0 * 0.6))))
    fig.suptitle(_text(st.name) + "\n" + sub, fontsize=9, x=margin / fig_w, ha="left",
                 y=1 - 0.1 / fig_h, va="top", linespacing=1.4)
    return fig


def _save(fig, target, fmt_name: str, salt: str) -> None:
    import matplotlib

    with matplotlib.rc_context({"svg.fonttype": "none", "svg.hashsalt": salt,
                                "font.family": "DejaVu Sans"}):
        if fmt_name == "png":
            from matplotlib.backends.backend_agg import FigureCanvasAgg

            FigureCanvasAgg(fig)
            fig.savefig(target, format="png", dpi=_DPI, facecolor="white",
                        metadata={"Software": None}, bbox_inches="tight", pad_inches=0.1)
        else:
            from matplotlib.backends.backend_svg import FigureCanvasSVG

            FigureCanvasSVG(fig)
            fig.savefig(target, format="svg", facecolor="white",
                        metadata={"Date": None, "Creator": None}, bbox_inches="tight",
                        pad_inches=0.1)


def figure_svg(sol, case: str | None = None, diagrams: str | Iterable[str] = DIAGRAMS) -> str:
    """The diagrams of load case ``case`` (every case when None) as SVG text, for a file or
    for inline HTML (text kept as text, no date, ids stable for a given case)."""
    cases = _case_names(sol, case)
    fig = _figure(sol, cases, parse_diagrams(diagrams))
    buf = io.StringIO()
    _save(fig, buf, "svg", "leastwork-" + re.sub(r"\W+", "-", "-".join(cases)))
    return buf.getvalue()


def plot_case(sol, path, *, case: str | None = None,
              diagrams: str | Iterable[str] = DIAGRAMS) -> None:
    """Write the diagrams of a solution to ``path``, PNG or SVG by its suffix (anything else
    is a :class:`CaseError`). ``case``: one load case, or every case (one band of panels
    each) when None. ``diagrams``: some of :data:`DIAGRAMS`, as a sequence or a
    comma-separated string."""
    path = pathlib.Path(path)
    fmt_name = IMAGE_FORMATS.get(path.suffix.lower())
    if fmt_name is None:
        raise CaseError(f'cannot tell the image format of "{path}" from its suffix; name it '
                        ".png or .svg", where="output")
    cases = _case_names(sol, case)
    fig = _figure(sol, cases, parse_diagrams(diagrams))
    _save(fig, str(path), fmt_name, "leastwork-" + re.sub(r"\W+", "-", "-".join(cases)))
