"""Where things sit and at what scale: the size of the structure, 1-2-5 factors, the case
units, member axes, and the sides on which supports and labels go (all lengths in m)."""

from __future__ import annotations

import math

import numpy as np

from ...model import Structure
from ..quantities import quantities


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


def structure_size(st: Structure) -> float:
    """Size of the structure (m): the larger side of the box around its nodes."""
    xs = [n.x for n in st.nodes.values()]
    ys = [n.y for n in st.nodes.values()]
    size = max(max(xs) - min(xs), max(ys) - min(ys))
    return size if size > 0 else max((st.length(m) for m in st.members), default=1.0)


def case_units(st: Structure) -> dict[str, tuple[float, str]]:
    """(SI value of one output unit, its name) of force, length, moment, displacement and
    distributed load (the factors of :mod:`leastwork.output.quantities`; products written
    with a middle dot)."""
    q = quantities(st.units)
    return {k: (q.factor(k), q.unit(k).replace("*", "·"))
            for k in ("force", "length", "moment", "displacement", "distributed")}


def xy(st: Structure, node: str) -> np.ndarray:
    """Position of a node (m)."""
    n = st.nodes[node]
    return np.array([n.x, n.y])


def member_axes(st: Structure, mid: str) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Start point, local x and local y unit vectors of a member."""
    c, s = st.direction(mid)
    return xy(st, st.members[mid].start), np.array([c, s]), np.array([-s, c])


class MemberAxis:
    """Points and local +y normals along a member's axis (an arc for a curved member) at
    distances ``x`` (m, along the axis) from its start."""

    def __init__(self, st: Structure, mid: str):
        self.st, self.mid = st, mid
        self.o, self.ex, self.ey = member_axes(st, mid)
        self.curve = st.members[mid].curve

    def at(self, x) -> np.ndarray:
        x = np.atleast_1d(np.asarray(x, dtype=float))
        if self.curve is None:
            return self.o[None, :] + x[:, None] * self.ex[None, :]
        from ...elements.arc import arc_of

        px, py = arc_of(self.curve).point(x, tuple(self.o), tuple(self.ex))
        return np.column_stack([px, py])

    def normal(self, x) -> np.ndarray:
        x = np.atleast_1d(np.asarray(x, dtype=float))
        if self.curve is None:
            return np.repeat(self.ey[None, :], len(x), axis=0)
        from ...elements.arc import arc_of

        tx, ty = arc_of(self.curve).tangent(x, tuple(self.ex))
        return np.column_stack([-ty, tx])


def polyline(st: Structure, mid: str, n: int = 97) -> np.ndarray:
    """Points along a member's axis for drawing it (its two ends when straight)."""
    m = st.members[mid]
    if m.curve is None:
        return np.array([xy(st, m.start), xy(st, m.end)])
    return MemberAxis(st, mid).at(np.linspace(0.0, st.length(mid), n))


def away_from_members(st: Structure, node: str) -> np.ndarray:
    """Unit vector pointing from a node away from the members that meet there."""
    p = xy(st, node)
    acc = np.zeros(2)
    for m in st.members.values():
        if node in (m.start, m.end):
            other = xy(st, m.end if node == m.start else m.start)
            d = other - p
            acc += d / max(np.hypot(*d), 1e-300)
    if np.hypot(*acc) < 1e-6:
        return np.array([0.0, -1.0])
    return -acc / np.hypot(*acc)


def snap(v: np.ndarray) -> np.ndarray:
    """The axis direction nearest to ``v`` (downwards first on a tie)."""
    cands = [np.array(c, dtype=float) for c in ((0, -1), (0, 1), (-1, 0), (1, 0))]
    return max(cands, key=lambda c: float(c @ v) + (1e-9 if c[1] < 0 else 0.0))


def perp(v: np.ndarray) -> np.ndarray:
    """``v`` turned a quarter counter-clockwise."""
    return np.array([-v[1], v[0]])


def ground_side(nvec: np.ndarray, away_dir: np.ndarray) -> np.ndarray:
    """Which way (+ or - ``nvec``) the ground of a one-way restraint lies: away from the
    members when that is clear, else below, else to the left."""
    d = float(nvec @ away_dir)
    if abs(d) > 0.3:
        return nvec if d > 0 else -nvec
    if abs(nvec[1]) > 1e-9:
        return nvec if nvec[1] < 0 else -nvec
    return nvec if nvec[0] < 0 else -nvec


def support_side(st: Structure, sup) -> np.ndarray:
    """Unit vector from a support's node towards its ground."""
    away_dir = away_from_members(st, sup.node)
    rigid = [r for r in sup.restraints if not r.is_spring and r.direction != "rz"]
    if len(rigid) == 1:
        return ground_side(np.array(rigid[0].vector[:2], dtype=float), away_dir)
    pinned = len(rigid) >= 2 and not any(r.direction == "rz" and not r.is_spring
                                         for r in sup.restraints)
    down = np.array([0.0, -1.0])
    if pinned and not any(member_towards(st, sup.node, down)):
        return down  # a pin sits on the ground below when it can
    return snap(away_dir)


def member_towards(st: Structure, node: str, d: np.ndarray):
    """For each member at ``node``: whether it runs (nearly) in direction ``d``."""
    p = xy(st, node)
    for m in st.members.values():
        if node in (m.start, m.end):
            u = xy(st, m.end if node == m.start else m.start) - p
            yield float(u @ d) > 0.95 * np.hypot(*u)


def blocked(st: Structure, node: str, d: np.ndarray) -> bool:
    """Whether a member or the support symbol at ``node`` lies in direction ``d``."""
    if any(member_towards(st, node, d)):
        return True
    return node in st.supports and float(support_side(st, st.supports[node]) @ d) > 0.7


def crossings(st: Structure) -> dict[str, list[float]]:
    """Per member, the fractions of its length (0..1) where another member crosses it away
    from a shared node (two braces of one panel, say). Found once per structure (the last
    one is kept: every member's label asks for it)."""
    if _CROSSINGS[0] is not st:
        _CROSSINGS[:] = [st, _find_crossings(st)]
    return _CROSSINGS[1]


_CROSSINGS: list = [None, None]


def _find_crossings(st: Structure) -> dict[str, list[float]]:
    """:func:`crossings` by arrays: members sorted by their least x, each block of them
    tested only against the members whose x-range can reach it (a long structure meets few
    of its members)."""
    ids = list(st.members)
    out: dict[str, list[float]] = {m: [] for m in ids}
    if len(ids) < 2:
        return out
    names = {n: k for k, n in enumerate(st.nodes)}
    ends = np.array([[names[st.members[m].start], names[st.members[m].end]] for m in ids])
    xyn = np.array([[n.x, n.y] for n in st.nodes.values()], dtype=float)
    P, Q = xyn[ends[:, 0]], xyn[ends[:, 1]]
    lo, hi = np.minimum(P[:, 0], Q[:, 0]), np.maximum(P[:, 0], Q[:, 0])
    order = np.argsort(lo, kind="stable")
    los = lo[order]
    R = Q - P
    norm = np.hypot(R[:, 0], R[:, 1])
    block = 256
    for a0 in range(0, len(ids), block):
        ia = order[a0:a0 + block]
        stop = int(np.searchsorted(los, hi[ia].max(), side="right"))
        ib = order[a0:stop]  # the same block and the members after it that may reach it
        r, s = R[ia][:, None, :], R[ib][None, :, :]
        den = r[..., 0] * s[..., 1] - r[..., 1] * s[..., 0]
        qp = P[ib][None, :, :] - P[ia][:, None, :]
        ok = np.abs(den) >= 1e-12 * norm[ia][:, None] * norm[ib][None, :]
        shared = ((ends[ia][:, None, :, None] == ends[ib][None, :, None, :]).any(axis=(2, 3)))
        later = np.arange(a0, a0 + len(ia))[:, None] < np.arange(a0, stop)[None, :]
        with np.errstate(divide="ignore", invalid="ignore"):
            t = (qp[..., 0] * s[..., 1] - qp[..., 1] * s[..., 0]) / den
            u = (qp[..., 0] * r[..., 1] - qp[..., 1] * r[..., 0]) / den
        hit = ok & ~shared & later & (t > 1e-6) & (t < 1 - 1e-6) & (u > 1e-6) & (u < 1 - 1e-6)
        for i, j in zip(*np.nonzero(hit), strict=True):
            out[ids[ia[i]]].append(float(t[i, j]))
            out[ids[ib[j]]].append(float(u[i, j]))
    return out


def clear_spot(fractions: list[float], taken: list[float] = (),
               prefer: tuple[float, ...] = (0.5, 0.3, 0.7, 0.2, 0.8, 0.4, 0.6)) -> float:
    """A fraction of a member's length for a mark or label: the first of ``prefer`` that
    lies farthest enough (0.12) from every crossing and every spot ``taken``, else the one
    farthest from them."""
    avoid = [*fractions, *taken]
    if not avoid:
        return prefer[0]
    for f in prefer:
        if min(abs(f - a) for a in avoid) >= 0.12:
            return f
    return max(prefer, key=lambda f: min(abs(f - a) for a in avoid))


def node_members_side(st: Structure, node: str, d: np.ndarray) -> bool:
    """Whether a member leaves ``node`` within 25 degrees of direction ``d``."""
    p = xy(st, node)
    for m in st.members.values():
        if node in (m.start, m.end):
            u = xy(st, m.end if node == m.start else m.start) - p
            if float(u @ d) > 0.9 * np.hypot(*u):
                return True
    return False


def arrow_side(st: Structure, node: str, d: np.ndarray, used: list, support_ok: bool) -> int:
    """Which way an arrow of direction ``d`` sits at ``node`` with one end on it: -1 (the
    arrow comes in, its tip on the node) or +1 (it leaves, its tail on the node). The
    shaft keeps off the members, off arrows already drawn there (``used``: unit vectors
    from the node along their shafts) and, unless ``support_ok``, off the support."""
    def penalty(side: int) -> float:
        v = side * d
        pen = 10.0 if node_members_side(st, node, v) else 0.0
        pen += 5.0 * sum(1 for u in used if float(u @ v) > 0.9)
        if node in st.supports and not support_ok:
            pen += 1.0 if float(support_side(st, st.supports[node]) @ v) > 0.7 else 0.0
        return pen

    return -1 if penalty(-1) <= penalty(1) else 1
