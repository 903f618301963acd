"""Arrows drawn at a node: one end of the arrow on the node itself (a redundant reaction,
a settlement, a nodal load), never beside it, on the side where the shaft keeps off the
members and off the arrows already drawn at that node."""

from __future__ import annotations

import numpy as np

from ...model import Structure
from .geometry import arrow_side, xy
from .panel import Panel


def node_arrow(pn: Panel, st: Structure, node: str, d, length: float, *, color: str,
               what: str, support_ok: bool, lw: float = 1.2, ls="-",
               head: float | None = None) -> tuple[np.ndarray, np.ndarray]:
    """Draw an arrow of direction ``d`` (unit) with its tip or its tail on ``node``;
    returns (the arrow's far end, the unit vector from the node along the shaft) for the
    label. The arrow is recorded in ``pn.arrows`` as ``what``."""
    d = np.asarray(d, dtype=float)
    d = d / np.hypot(*d)
    p = xy(st, node)
    used = pn.at_node.setdefault(node, [])
    side = arrow_side(st, node, d, used, support_ok)
    if side < 0:  # comes in: tip on the node
        tail, tip = p - d * length, p
    else:  # leaves: tail on the node
        tail, tip = p, p + d * length
    pn.arrow(tail, tip, color=color, lw=lw, head=head, what=what, ls=ls)
    shaft = side * d
    used.append(shaft)
    pn.keep_off([tail, tip])
    return p + shaft * length, shaft
