"""Modelling errors in the layout: members that overlap, joints lying on a member.

Two members sharing a segment of one line, or a joint lying on a member that is not
joined to it, are accepted by the equilibrium equations (the member simply passes the
joint by) but are nearly always a slip: a member drawn over joints it should have been
split at, a member entered twice. Each is reported as a warning, never an error.

Every overlap of two straight members shows as one of three things (the ends of the
shared segment are member ends): a member end lying on the other member between its
ends, two members joining the same two joints, or two joints at the same place (refused
by the reader). So the work is finding joints on members: the joints are put in a grid of
square cells (side: the median member length), each member is sampled at half a cell and
only the joints of the cells around each sample are measured: about linear in the number
of members (a second or two for 10^5), never all pairs. Crossing members (braces
of an X) are not reported: they cross at a point, they do not overlap.

Tolerance: a joint is on a member when it is within ``ON_MEMBER`` times the member's
length of the segment, and not one of its ends.
"""

from __future__ import annotations

import numpy as np

from .arrays import first_and_inverse, median
from .plaintext import literal

__all__ = ["ON_MEMBER", "overlap_warnings", "joints_on_members", "duplicate_members"]

#: A joint within this fraction of a member's length of the member (and not one of its
#: ends) lies on it.
ON_MEMBER = 1e-6
#: Most warnings of each kind listed one by one; the rest are counted.
LISTED = 10
#: Candidate (member, joint) pairs measured at a time (memory: ~100 bytes each).
_CHUNK = 2_000_000


def overlap_warnings(st) -> list[str]:
    """Warnings for members that overlap (share a segment) and joints lying on a member
    they are not joined to (module docstring)."""
    if not st.members:
        return []
    layout = _layout(st)
    out: list[str] = []
    pairs = duplicate_members(st, layout)
    for a, b in pairs[:LISTED]:
        m = st.members[a]
        out.append(f"members {_q(a)} and {_q(b)} both join {_q(m.start)} and {_q(m.end)}: "
                   "they overlap along their whole length; a modelling error? (delete one, "
                   "or give one member the combined stiffness)")
    if len(pairs) > LISTED:
        out.append(f"... and {len(pairs) - LISTED} more pairs of members joining the same two "
                   "joints")
    found = joints_on_members(st, layout=layout)
    if not found:
        return out
    overlaps, lying = _classify(st, found)
    for m, n, share in overlaps[:LISTED]:
        out.append(f"members {_q(m)} and {_q(n)} overlap: they lie on one line and share "
                   f"{share:.3g} % of the length of {_q(m)}; a modelling error? (split "
                   f"{_q(m)} at the joints on it, or delete the member drawn twice)")
    if len(overlaps) > LISTED:
        out.append(f"... and {len(overlaps) - LISTED} more pairs of overlapping members")
    for node, m in lying[:LISTED]:
        out.append(f"joint {_q(node)} lies on member {_q(m)} but is not joined to it (the "
                   "member passes the joint by); a modelling error? (split the member at "
                   "the joint if they should be joined)")
    if len(lying) > LISTED:
        out.append(f"... and {len(lying) - LISTED} more joints lying on members they are not "
                   "joined to")
    return out


def _q(text: str) -> str:
    return f'"{literal(text, 40)}"'


def _layout(st):
    """Joint ids, coordinates (n, 2), member ids, start and end joint indices."""
    ids = list(st.nodes)
    index = {n: i for i, n in enumerate(ids)}
    xy = np.array([(n.x, n.y) for n in st.nodes.values()], dtype=float).reshape(-1, 2)
    mids = list(st.members)
    ends = np.array([(index[m.start], index[m.end]) for m in st.members.values()],
                    dtype=np.int64).reshape(-1, 2)
    return ids, xy, mids, ends[:, 0], ends[:, 1]


def duplicate_members(st, layout=None) -> list[tuple[str, str]]:
    """Pairs of members joining the same two joints (either way round): each later member
    with the first that joins the same two."""
    ids, _, mids, a, b = layout or _layout(st)
    if len(mids) < 2:
        return []
    code = np.minimum(a, b) * len(ids) + np.maximum(a, b)
    first, inverse = first_and_inverse(code)
    dup = np.flatnonzero(first[inverse.ravel()] != np.arange(len(mids)))
    return [(mids[int(first[inverse.ravel()[i]])], mids[int(i)]) for i in dup]


def joints_on_members(st, tol: float = ON_MEMBER, layout=None) -> list[tuple[str, str]]:
    """(joint, member) for every joint within ``tol`` times the member's length of the
    member and not one of its ends, in member order (module docstring)."""
    ids, xy, mids, a, b = layout or _layout(st)
    if not mids or len(ids) < 3:
        return []
    d = xy[b] - xy[a]
    length = np.hypot(d[:, 0], d[:, 1])
    # cells of the median member length, not below a twentieth of the mean (few samples
    # per member even when most members are tiny)
    h = max(median(length), float(np.mean(length)) / 20.0)
    origin = xy.min(axis=0)
    cell = np.floor((xy - origin) / h).astype(np.int64)
    ncy = int(cell[:, 1].max()) + 3
    node_key = (cell[:, 0] + 1) * ncy + (cell[:, 1] + 1)
    order = np.argsort(node_key, kind="stable")
    sorted_keys = node_key[order]
    # samples along every member, at most half a cell apart (ends included)
    counts = np.ceil(length / (0.5 * h)).astype(np.int64) + 1
    member_of = np.repeat(np.arange(len(mids)), counts)
    starts = np.cumsum(counts) - counts
    step = np.arange(counts.sum()) - np.repeat(starts, counts)
    t = step / np.repeat(counts - 1, counts)
    pts = xy[a][member_of] + t[:, None] * d[member_of]
    sc = np.floor((pts - origin) / h).astype(np.int64)
    found: set[tuple[int, int]] = set()
    for dx in (-1, 0, 1):
        for dy in (-1, 0, 1):
            key = (sc[:, 0] + 1 + dx) * ncy + (sc[:, 1] + 1 + dy)
            lo = np.searchsorted(sorted_keys, key, side="left")
            hi = np.searchsorted(sorted_keys, key, side="right")
            n = hi - lo
            if not n.any():
                continue
            mem = np.repeat(member_of, n)
            pos = np.repeat(lo - np.cumsum(n) + n, n) + np.arange(n.sum())
            node = order[pos]
            for lo_c in range(0, len(mem), _CHUNK):
                found.update(_measure(xy, a, b, d, length, mem[lo_c:lo_c + _CHUNK],
                                      node[lo_c:lo_c + _CHUNK], tol))
    return [(ids[n], mids[m]) for m, n in sorted(found)]


def _measure(xy, a, b, d, length, mem, node, tol: float) -> set[tuple[int, int]]:
    """The (member, joint) pairs among the candidates with the joint on the member."""
    keep = (node != a[mem]) & (node != b[mem])
    mem, node = mem[keep], node[keep]
    if not len(mem):
        return set()
    L = length[mem]
    rel = xy[node] - xy[a[mem]]
    along = (rel[:, 0] * d[mem, 0] + rel[:, 1] * d[mem, 1]) / L
    across = np.abs(rel[:, 0] * d[mem, 1] - rel[:, 1] * d[mem, 0]) / L
    limit = tol * L
    on = (across <= limit) & (along >= -limit) & (along <= L + limit)
    return set(zip(mem[on].tolist(), node[on].tolist(), strict=True))


def _classify(st, found: list[tuple[str, str]]):
    """Split (joint, member) findings into overlapping member pairs (another member at the
    joint runs along the first member's line over part of it; with the per cent of the
    first member shared) and joints merely lying on a member."""
    at: dict[str, list[str]] = {}
    for m in st.members.values():
        at.setdefault(m.start, []).append(m.id)
        at.setdefault(m.end, []).append(m.id)
    overlaps: list[tuple[str, str, float]] = []
    lying: list[tuple[str, str]] = []
    seen: set[frozenset] = set()
    for node, mid in found:
        shared = []
        for other in at.get(node, []):
            if other == mid or frozenset((mid, other)) in seen:
                continue
            share = _shared_share(st, mid, other)
            if share > 0:
                shared.append((other, share))
        if shared:
            for other, share in shared:
                seen.add(frozenset((mid, other)))
                overlaps.append((mid, other, share))
        else:
            lying.append((node, mid))
    return overlaps, lying


def _shared_share(st, mid: str, other: str) -> float:
    """Per cent of member ``mid`` shared by member ``other`` when ``other`` lies along the
    line of ``mid`` (both its ends within the tolerance of that line), else 0."""
    m, o = st.members[mid], st.members[other]
    p0 = np.array([st.nodes[m.start].x, st.nodes[m.start].y])
    p1 = np.array([st.nodes[m.end].x, st.nodes[m.end].y])
    q = [np.array([st.nodes[n].x, st.nodes[n].y]) for n in (o.start, o.end)]
    d = p1 - p0
    L = float(np.hypot(*d))
    e = d / L
    across = [abs(float((qq - p0) @ np.array([-e[1], e[0]]))) for qq in q]
    if max(across) > ON_MEMBER * L:
        return 0.0
    s = sorted(float((qq - p0) @ e) for qq in q)
    length = min(s[1], L) - max(s[0], 0.0)
    return 100.0 * length / L if length > ON_MEMBER * L else 0.0
