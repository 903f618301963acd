"""An independent model of curved members for the cross-check: each arc replaced by a
chain of straight prismatic beams between points on the arc (equal arc lengths; 48 per
half turn of the axis, at least 16), solved by the direct stiffness method with that chain
and with one of twice as many segments, and extrapolated (Richardson, the error falling as
the square of the segment length).

Loads on the arc are carried over by arc length: a point load at arc length a goes to the
segment holding a, at the same fraction of that segment; a load per unit arc length goes
on each segment scaled by its arc length over its chord length (the same total); per
horizontal (vertical) projection it takes each segment's own projection; a misfit is
shared equally by the segments; temperature applies to each.
"""

from __future__ import annotations

import math
from dataclasses import replace

import numpy as np

from ..elements.arc import arc_of
from ..model import DistributedLoad, Misfit, Node, PointLoad, Structure, TemperatureLoad

__all__ = ["chain_structure", "CHAIN_SEGMENTS", "MIN_SEGMENTS", "segment_name", "segments_of"]

#: Segments of the coarser chain per half turn of a curved member's axis (48 on a
#: semicircle); the finer chain has twice as many. Never fewer than
#: :data:`MIN_SEGMENTS`.
CHAIN_SEGMENTS = 48
MIN_SEGMENTS = 16


def segments_of(m, level: int) -> int:
    """Segments of curved member ``m`` in the chain of refinement ``level`` (1, 2, ...):
    ``level`` times :data:`CHAIN_SEGMENTS` per half turn of the tangent, at least
    :data:`MIN_SEGMENTS` times ``level``."""
    arc = arc_of(m.curve)
    if arc.shape == "circle":
        a = abs(arc.rise)
        turn = 2.0 * math.atan2(0.5 * arc.chord, (0.25 * arc.chord ** 2 + a * a) / (2 * a) - a)
    else:
        turn = 2.0 * math.atan(4.0 * abs(arc.rise) / arc.chord)
    return level * max(MIN_SEGMENTS, math.ceil(CHAIN_SEGMENTS * turn / math.pi))


def segment_name(mid: str, k: int) -> str:
    return f"{mid}~{k}"


def chain_structure(st: Structure, level: int) -> Structure:
    """``st`` with every curved member replaced by a chain of straight beams
    (:func:`segments_of` at refinement ``level``)."""
    nodes = dict(st.nodes)
    members = {}
    info = {}
    for mid, m in st.members.items():
        if m.curve is None:
            members[mid] = m
            continue
        arc = arc_of(m.curve)
        segments = segments_of(m, level)
        a = st.nodes[m.start]
        ex = st.direction(mid)
        s = np.linspace(0.0, arc.length, segments + 1)
        x, y = arc.point(s, (a.x, a.y), ex)
        ids = [m.start] + [f"{mid}~n{k}" for k in range(1, segments)] + [m.end]
        for k in range(1, segments):
            nodes[ids[k]] = Node(ids[k], float(x[k]), float(y[k]))
        for k in range(segments):
            members[segment_name(mid, k)] = replace(
                m, id=segment_name(mid, k), start=ids[k], end=ids[k + 1], curve=None,
                hinge_start=m.hinge_start and k == 0,
                hinge_end=m.hinge_end and k == segments - 1,
                end_springs=(m.end_springs[0] if k == 0 else None,
                             m.end_springs[1] if k == segments - 1 else None))
        info[mid] = (s, x, y)
    loads = []
    for ld in st.loads:
        mid = getattr(ld, "member", None)
        if mid not in info:
            loads.append(ld)
            continue
        s, x, y = info[mid]
        loads += _carried(ld, mid, s, x, y)
    return replace(st, nodes=nodes, members=members, loads=tuple(loads), displacements=())


def _carried(ld, mid: str, s, x, y) -> list:
    n = len(s) - 1
    chords = np.hypot(np.diff(x), np.diff(y))
    if isinstance(ld, TemperatureLoad):
        return [replace(ld, member=segment_name(mid, k)) for k in range(n)]
    if isinstance(ld, Misfit):
        return [replace(ld, member=segment_name(mid, k), elongation=ld.elongation / n)
                for k in range(n)]
    if isinstance(ld, PointLoad):
        k = min(int(np.searchsorted(s, ld.at, side="right")) - 1, n - 1)
        frac = (ld.at - s[k]) / (s[k + 1] - s[k])
        return [replace(ld, member=segment_name(mid, k), at=float(frac * chords[k]))]
    assert isinstance(ld, DistributedLoad)
    a, b = ld.start, (s[-1] if math.isnan(ld.end) else ld.end)
    out = []
    for k in range(n):
        lo, hi = max(a, s[k]), min(b, s[k + 1])
        if hi <= lo:
            continue
        ds = s[k + 1] - s[k]
        c, sn = (x[k + 1] - x[k]) / chords[k], (y[k + 1] - y[k]) / chords[k]

        def at(pos, pair):
            return pair[0] + (pair[1] - pair[0]) * (pos - a) / (b - a)

        q1 = (at(lo, ld.wx), at(hi, ld.wx))
        q2 = (at(lo, ld.wy), at(hi, ld.wy))
        if ld.frame == "projection":  # wx per vertical, wy per horizontal projection
            wx = tuple(v * abs(sn) for v in q1)
            wy = tuple(v * abs(c) for v in q2)
        else:
            ratio = ds / chords[k]
            if ld.frame == "local":
                wx = tuple(ratio * (t * c - nn * sn) for t, nn in zip(q1, q2, strict=True))
                wy = tuple(ratio * (t * sn + nn * c) for t, nn in zip(q1, q2, strict=True))
            else:
                wx, wy = tuple(ratio * v for v in q1), tuple(ratio * v for v in q2)
        f0, f1 = (lo - s[k]) / ds * chords[k], (hi - s[k]) / ds * chords[k]
        out.append(DistributedLoad(segment_name(mid, k), wx=wx, wy=wy, start=float(f0),
                                   end=float(f1), case=ld.case, written=ld.written))
    return out
