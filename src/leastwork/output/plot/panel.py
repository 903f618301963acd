"""A drawing panel: one matplotlib axes with the bookkeeping of what is drawn on it (its
extent, the labels placed so far) and the few shapes every diagram is made of: polylines,
polygons, circles, arrows, turning arrows and labels that keep off each other."""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np

from .geometry import perp
from .style import FONT, INK, LOAD, drawn_text
from .textsize import text_extent


def _align(u) -> tuple[str, str]:
    """Horizontal and vertical alignment of a label that sits on side ``u`` of its point."""
    ha = "left" if u[0] > 0.38 else ("right" if u[0] < -0.38 else "center")
    va = "bottom" if u[1] > 0.38 else ("top" if u[1] < -0.38 else "center")
    return ha, va


def segments_cross_box(seg: np.ndarray, rect) -> np.ndarray:
    """For segments (k, 4) [x0, y0, x1, y1]: whether each crosses the rectangle
    (x0, y0, x1, y1) - Liang-Barsky clipping, all segments at once."""
    x0, y0, x1, y1 = rect
    px, py = seg[:, 0], seg[:, 1]
    dx, dy = seg[:, 2] - px, seg[:, 3] - py
    lo = np.zeros(len(seg))
    hi = np.ones(len(seg))
    ok = np.ones(len(seg), dtype=bool)
    for p_, q_ in ((-dx, px - x0), (dx, x1 - px), (-dy, py - y0), (dy, y1 - py)):
        par = np.abs(p_) < 1e-300
        ok &= ~(par & (q_ < 0))
        with np.errstate(divide="ignore", invalid="ignore"):
            r = np.where(par, 0.0, q_ / np.where(par, 1.0, p_))
        lo = np.where(~par & (p_ < 0), np.maximum(lo, r), lo)
        hi = np.where(~par & (p_ > 0), np.minimum(hi, r), hi)
    return ok & (lo <= hi)


@dataclass
class Panel:
    """One axes with the bookkeeping of what is drawn: extent and placed labels."""

    ax: object
    size: float  #: structure size, m
    per_inch: float  #: data units (m) per inch of the drawing, roughly
    pts: list = field(default_factory=list)
    boxes: list = field(default_factory=list)  #: (x0, y0, x1, y1, text)
    lines: dict = field(default_factory=dict)  #: (color, lw, ls, z) -> polylines
    polys: dict = field(default_factory=dict)  #: (face, edge, lw, z, hatch) -> polygons
    segments: list = field(default_factory=list)  #: (k, 4) segments labels keep off
    arrows: list = field(default_factory=list)  #: (tail, tip, what) of every arrow drawn
    at_node: dict = field(default_factory=dict)  #: node -> shaft directions drawn there
    marks: dict = field(default_factory=dict)  #: member -> fractions of its length marked
    _seg_cache: object = None
    _box_arr: object = None  #: :attr:`boxes` as a (k, 4) array, grown as boxes are added
    _box_n: int = 0
    deferred: list | None = None  #: labels queued until every line is drawn
    key: list = field(default_factory=list)  #: lines of text under the drawing

    @property
    def h(self) -> float:
        """Size of symbols (m)."""
        return 0.045 * self.size

    def include(self, *points) -> None:
        for p in points:
            self.pts.append(np.asarray(p, dtype=float).reshape(-1, 2))

    def line(self, pts, color=INK, lw=1.0, ls="-", z=2) -> None:
        """A polyline; lines and polygons are gathered by style and drawn as a few
        collections when the panel is finished (far quicker than one artist each)."""
        pts = np.asarray(pts, dtype=float)
        self.lines.setdefault((color, lw, ls, z), []).append(pts)
        self.include(pts)

    def poly(self, pts, face, edge="none", lw=0.6, z=1, hatch=None) -> None:
        pts = np.asarray(pts, dtype=float)
        self.polys.setdefault((face, edge, lw, z, hatch), []).append(pts)
        self.include(pts)

    def circle(self, c, r, face="white", edge=INK, lw=0.9, z=4) -> None:
        t = np.linspace(0.0, 2 * math.pi, 29)[:-1]
        self.poly(np.asarray(c, dtype=float) + r * np.c_[np.cos(t), np.sin(t)], face=face,
                  edge=edge, lw=lw, z=z)

    def arrow(self, tail, tip, color=LOAD, lw=0.9, head=None, z=5, what: str = "",
              ls="-") -> None:
        """A straight arrow with a filled head of our own drawing (``what``: recorded with
        its ends in :attr:`arrows`)."""
        tail, tip = np.asarray(tail, float), np.asarray(tip, float)
        self.arrows.append((tail, tip, what))
        d = tip - tail
        n = np.hypot(*d)
        if n <= 0:
            return
        d /= n
        hl = min(head or 0.45 * self.h, 0.6 * n)
        base = tip - d * hl
        self.line([tail, base], color=color, lw=lw, z=z, ls=ls)
        w = perp(d) * hl * 0.38
        self.poly([tip, base + w, base - w], face=color, z=z)
        self.keep_off([tip, base + w, base - w, tip])  # labels keep off the head too

    def arc_arrow(self, c, r, ccw: bool, color=LOAD, lw=0.9, z=5) -> np.ndarray:
        """A 270 degree arc around ``c`` with a head in the turning sense; returns the
        point where a label may go."""
        t = np.linspace(math.radians(-45), math.radians(225), 40)
        if not ccw:
            t = t[::-1]
        pts = np.asarray(c) + r * np.c_[np.cos(t), np.sin(t)]
        self.line(pts[:-3], color=color, lw=lw, z=z)
        self.keep_off(pts[:-3])
        self.arrow(pts[-4], pts[-1], color=color, lw=lw, head=0.5 * self.h, z=z)
        return np.asarray(c) + r * 1.25 * np.array([0.0, 1.0])

    def occupy(self, pts) -> None:
        """Keep labels off the box around ``pts`` (a drawn load, say)."""
        pts = np.asarray(pts, dtype=float).reshape(-1, 2)
        lo, hi = pts.min(axis=0), pts.max(axis=0)
        self.boxes.append((lo[0], lo[1], hi[0], hi[1], ""))

    def keep_off(self, pts) -> None:
        """Keep labels off the polyline ``pts`` (a member, a diagram's outline): no label
        box may be crossed by one of its segments."""
        pts = np.asarray(pts, dtype=float).reshape(-1, 2)
        if len(pts) >= 2:
            self.segments.append(np.hstack([pts[:-1], pts[1:]]))
            self._seg_cache = None

    def _crossed(self, rect) -> bool:
        """Whether a segment kept off crosses the rectangle (x0, y0, x1, y1)."""
        if not self.segments:
            return False
        if self._seg_cache is None:
            self._seg_cache = np.vstack(self.segments)
        return bool(np.any(segments_cross_box(self._seg_cache, rect)))

    def text_box(self, text: str, size: float, weight: str = "normal",
                 box: bool = False) -> tuple[float, float]:
        """(width, height) of a label in data units (m), as the renderer lays it out."""
        w_in, h_in = text_extent(drawn_text(text), size, weight)
        pad = 2 * 0.25 * size / 72 if box else 0.04
        return (w_in + pad) * self.per_inch, (h_in + pad) * self.per_inch

    def label(self, p, text: str, direction=(0.0, 1.0), color=INK, size=FONT,
              gap: float | None = None, weight="normal", box: bool = False,
              force: bool = False, must: bool = False, leader: bool = True,
              once: bool = False) -> bool:
        """Put ``text`` next to point ``p`` on the side ``direction``, off every label and
        box placed so far and off the lines kept off (:meth:`keep_off`); a few places are
        tried, more of them when it ``must`` be shown (then a label moved away from its
        point is tied to it by a thin leader line, and as a last resort the label may
        cross a line, never another label). Without a free place the label is dropped
        (returns False), unless ``force``. ``once``: the same text already placed close by
        (two members' equal values at one joint) is not repeated (returns True).

        While :attr:`deferred` is a list, the label is only queued there (returns True)
        and placed by :meth:`place_deferred`, once every line and arrow is drawn."""
        args = dict(direction=direction, color=color, size=size, gap=gap, weight=weight,
                    box=box, force=force, must=must, leader=leader, once=once)
        if self.deferred is not None:
            self.deferred.append((p, text, args))
            return True
        return self._place(p, text, **args)

    def defer(self) -> None:
        """Queue labels from now on (:meth:`label`) until :meth:`place_deferred`."""
        self.deferred = []

    def place_deferred(self) -> None:
        """Place the queued labels, in the order they came."""
        queue, self.deferred = self.deferred or [], None
        for p, text, args in queue:
            self._place(p, text, **args)

    def _place(self, p, text, direction, color, size, gap, weight, box, force, must,
               leader, once) -> bool:
        d = np.asarray(direction, dtype=float)
        d = d / np.hypot(*d) if np.hypot(*d) > 0 else np.array([0.0, 1.0])
        gap = 0.35 * self.h if gap is None else gap
        w, hgt = self.text_box(text, size, weight, box)
        pad = 0.25 * size / 72 * self.per_inch if box else 0.0  # the frame's padding
        p = np.asarray(p, dtype=float)
        if once and any(b[4] == text and abs(0.5 * (b[0] + b[2]) - p[0]) < 1.5 * w
                        and abs(0.5 * (b[1] + b[3]) - p[1]) < 4 * hgt for b in self.boxes):
            return True
        t = perp(d)
        cands = [(p + d * g, d) for g in (gap, gap + 0.6 * hgt, gap + 1.2 * hgt)]
        cands += [(p + d * gap + t * s * w * f, d) for f in (0.35, 0.7) for s in (1, -1)]

        def ring(radii):
            for r in radii:
                for ang in np.linspace(0.0, 2 * math.pi, 16, endpoint=False):
                    u = np.array([math.cos(ang), math.sin(ang)])
                    cands.append((p + u * (gap + r * hgt), u))

        if must:  # close around the point first, then further out along d, then rings
            ring((0.0, 0.8))
            cands += [(p + d * (gap + k * 1.1 * hgt), d) for k in range(2, 6)]
            ring((2.0, 3.0, 4.5, 6.5, 9.0, 12.0))
        chosen = None
        for lines_too in (True, False) if must else (True,):
            for q, u in cands:
                ha, va = _align(u)
                rect = self._rect(q, w, hgt, ha, va, pad)
                if self._hits_label(rect) or (lines_too and self._crossed(rect)):
                    continue
                chosen = (q, rect, ha, va)
                break
            if chosen is not None:
                break
        if chosen is None:
            if not force:
                return False
            ha, va = _align(d)
            chosen = (cands[0][0], self._rect(cands[0][0], w, hgt, ha, va, pad), ha, va)
        q, rect, ha, va = chosen
        kw = {}
        if box:
            kw["bbox"] = dict(boxstyle="round,pad=0.25", facecolor="white",
                              edgecolor=color, lw=0.5)
        self.ax.text(q[0], q[1], drawn_text(text), ha=ha, va=va, fontsize=size, color=color,
                     weight=weight, zorder=8, **kw)
        far = np.hypot(*(q - p)) > gap + 1.3 * hgt
        if far and leader:  # tie a label moved away back to its point
            near = np.clip(p, rect[:2], rect[2:4])
            self.line([p, near], color=color, lw=0.5, z=7)
            self.keep_off([p, near])
        self.boxes.append((*rect, text))
        self.include([rect[0], rect[1]], [rect[2], rect[3]])
        return True

    def _rect(self, q, w: float, hgt: float, ha: str, va: str, pad: float = 0.0) -> tuple:
        """The rectangle a label anchored at ``q`` covers; ``pad``: the frame of a boxed
        label reaches that far (m) beyond its text on every side."""
        x0 = q[0] - (pad if ha == "left" else (w - pad if ha == "right" else w / 2))
        y0 = q[1] - (pad if va == "bottom" else (hgt - pad if va == "top" else hgt / 2))
        return (x0, y0, x0 + w, y0 + hgt)

    def _hits_label(self, rect) -> bool:
        """Whether ``rect`` overlaps a label or box placed so far (all at once, by arrays:
        a large structure has thousands)."""
        n = len(self.boxes)
        if n == 0:
            return False
        if self._box_arr is None or self._box_n > n:
            self._box_arr, self._box_n = np.empty((max(64, 2 * n), 4)), 0
        if n > self._box_n:  # the boxes added since, into the array (grown by doubling)
            if n > len(self._box_arr):
                self._box_arr = np.vstack([self._box_arr[:self._box_n],
                                           np.empty((2 * n - self._box_n, 4))])
            self._box_arr[self._box_n:n] = [b[:4] for b in self.boxes[self._box_n:n]]
            self._box_n = n
        b = self._box_arr[:n]
        return bool(np.any((rect[2] > b[:, 0]) & (b[:, 2] > rect[0]) & (rect[3] > b[:, 1])
                           & (b[:, 3] > rect[1])))

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

        for (face, edge, lw, z, hatch), polys in self.polys.items():
            coll = PolyCollection(polys, facecolors=face, edgecolors=edge, linewidths=lw,
                                  zorder=z, joinstyle="round")
            if hatch:
                coll.set_hatch(hatch)
                coll.set_edgecolor(edge)
            self.ax.add_collection(coll, autolim=False)
        for (color, lw, ls, z), lines in self.lines.items():
            self.ax.add_collection(LineCollection(lines, colors=color, linewidths=lw,
                                                  linestyles=ls, zorder=z, capstyle="round",
                                                  joinstyle="round"), autolim=False)
        lo, hi = box[0] - pad, box[1] + pad
        self.ax.set_xlim(lo[0], hi[0])
        self.ax.set_ylim(lo[1], hi[1])
        self.ax.set_aspect("equal", adjustable="box")
        self.ax.set_axis_off()
