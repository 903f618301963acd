"""A drawing panel: one matplotlib axes with the bookkeeping of what is drawn on it (its
extent, the labels placed so far) and the few shapes every diagram is made of: polylines,
polygons, circles, arrows, turning arrows and labels that keep off each other."""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np

from .geometry import perp
from .style import FONT, INK, LOAD, drawn_text


@dataclass
class Panel:
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

    def line(self, pts, color=INK, lw=1.0, ls="-", z=2) -> None:
        """A polyline; lines and polygons are gathered by style and drawn as a few
        collections when the panel is finished (far quicker than one artist each)."""
        pts = np.asarray(pts, dtype=float)
        self.lines.setdefault((color, lw, ls, z), []).append(pts)
        self.include(pts)

    def poly(self, pts, face, edge="none", lw=0.6, z=1) -> None:
        pts = np.asarray(pts, dtype=float)
        self.polys.setdefault((face, edge, lw, z), []).append(pts)
        self.include(pts)

    def circle(self, c, r, face="white", edge=INK, lw=0.9, z=4) -> None:
        t = np.linspace(0.0, 2 * math.pi, 29)[:-1]
        self.poly(np.asarray(c, dtype=float) + r * np.c_[np.cos(t), np.sin(t)], face=face,
                  edge=edge, lw=lw, z=z)

    def arrow(self, tail, tip, color=LOAD, lw=0.9, head=None, z=5) -> None:
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
        w = perp(d) * hl * 0.38
        self.poly([tip, base + w, base - w], face=color, z=z)

    def arc_arrow(self, c, r, ccw: bool, color=LOAD, lw=0.9, z=5) -> np.ndarray:
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

    def label(self, p, text: str, direction=(0.0, 1.0), color=INK, size=FONT,
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
        t = perp(d)
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
            self.ax.text(q[0], q[1], drawn_text(text), ha=ha, va=va, fontsize=size, color=color,
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
