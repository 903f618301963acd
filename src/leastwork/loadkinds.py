"""Load kinds: one record per kind of load, one handler per stage, one registry.

Every stage that needs to know what a load *does* asks its kind (:func:`load_kind`)
instead of testing its class:

* ``values`` / ``exact`` — its values as one mapping (floats from the dataclass, or exact
  expressions for :mod:`leastwork.symbolic`), the same keys either way;
* ``apply`` — statics and energy: it puts its effects on a :class:`LoadSink` (forces on
  nodes, loads in a member's span, free strains of a member, settlements), with plain
  arithmetic on the values, so that one handler serves floats and exact numbers;
* ``resultant`` — its total force and moment about a given centre, the sizes of those terms
  and its force scale, for the overall equilibrium check of a solution;
* ``describe`` — its row in the calculation sheet.

The reader (:mod:`leastwork.caseio`) makes the dataclasses from the case file, and the
diagrams (:mod:`leastwork.output.plot`) draw them; the direct-stiffness cross-check
(:mod:`leastwork.verify`) keeps its own handling on purpose (it shares only the model).
A new load kind is a dataclass in :mod:`leastwork.model` (with its ``scaled``), its reading
in :mod:`leastwork.caseio`, and one :class:`LoadKind` here.
"""

from __future__ import annotations

import math
from collections.abc import Callable
from dataclasses import dataclass
from typing import Any, Protocol

from .model import (
    DistributedLoad,
    Misfit,
    NodalLoad,
    PointLoad,
    Settlement,
    Structure,
    TemperatureLoad,
)

__all__ = ["LoadSink", "CaseEffects", "LoadKind", "LOAD_KINDS", "register_load", "load_kind"]


class LoadSink(Protocol):
    """Where a load puts its effects, in the number type of the pipeline (SI floats, or
    exact elements in the case units). ``zero`` is that type's zero."""

    zero: Any

    def section(self, member: str) -> Any:
        """The member's section values (``alpha``, ``depth``...) in the sink's numbers."""

    def node_force(self, node: str, fx, fy, mz) -> None:
        """A force (global components) and a counter-clockwise couple on a node."""

    def member_point(self, member: str, at, fx, fy, mz) -> None:
        """A concentrated force and couple on a member at ``at`` from its start (the sink
        passes one at an end to the node)."""

    def member_distributed(self, member: str, start, end, wx, wy) -> None:
        """Load per length (global components, (start value, end value) pairs) from
        ``start`` to ``end`` (None: the member's end)."""

    def member_strain(self, member: str, eps, kappa, misfit) -> None:
        """Free axial strain, free curvature (sagging positive) and misfit (m) of a
        member."""

    def settlement(self, node: str, direction: str, value) -> None:
        """Imposed displacement of a support along ``direction``."""


class CaseEffects:
    """The :class:`LoadSink` of both pipelines: the effects of one load case in the number
    type of ``zero`` (SI floats, or exact elements in the case units).

    ``vector(n)`` makes a zero vector (numpy or a list); ``section(member)`` gives the
    member's section values, ``length(member)`` its length and ``end_of(at, L)`` "start",
    "end" or None for a position along it (a load at an end goes to the node). Collects
    ``p`` (nodal loads, ndof), ``c`` (settlements along the reaction columns, ncol),
    ``nodal`` (the :class:`NodalLoad` s on nodes), ``point`` and ``dist`` (span loads
    per member, global components) and ``strains`` (alpha dT, alpha dTgrad/h, misfit per
    member).
    """

    def __init__(self, st: Structure, topo, case: str, zero, vector: Callable[[int], Any],
                 section: Callable[[str], Any], length: Callable[[str], Any],
                 end_of: Callable[[Any, Any], str | None]):
        self.st, self.topo, self.case, self.zero = st, topo, case, zero
        self.section, self.length, self.end_of = section, length, end_of
        self.p = vector(len(topo.dofs))
        self.c = vector(len(topo.columns))
        self.nodal: list[NodalLoad] = []
        self.point: dict[str, list] = {}
        self.dist: dict[str, list] = {}
        self.strains: dict[str, list] = {}

    def add_nodal(self, node: str, fx, fy, mz) -> None:
        """Adds to ``p`` (a moment only where the node takes one)."""
        di, p = self.topo.dof_index, self.p
        p[di[f"{node}.x"]] += fx
        p[di[f"{node}.y"]] += fy
        if mz:
            key = f"{node}.rz"
            if key not in di:
                from .errors import MechanismError

                raise MechanismError(
                    f"{self.st.source}: a moment is applied at node {node}, where every "
                    "member end is hinged: nothing resists it (a mechanism).", [key])
            p[di[key]] += mz

    def node_force(self, node: str, fx, fy, mz) -> None:
        self.add_nodal(node, fx, fy, mz)
        self.nodal.append(NodalLoad(node, fx, fy, mz, self.case))

    def member_point(self, member: str, at, fx, fy, mz) -> None:
        end = self.end_of(at, self.length(member))
        if end is not None:
            m = self.st.members[member]
            self.node_force(m.start if end == "start" else m.end, fx, fy, mz)
        else:
            self.point.setdefault(member, []).append((at, fx, fy, mz))

    def member_distributed(self, member: str, start, end, wx, wy,
                           frame: str = "global") -> None:
        end = self.length(member) if end is None else end
        entry = (start, end, tuple(wx), tuple(wy))
        # a curved member's load per projection or in local axes keeps its frame
        self.dist.setdefault(member, []).append(entry if frame == "global"
                                                else (*entry, frame))

    def member_strain(self, member: str, eps, kappa, misfit) -> None:
        acc = self.strains.setdefault(member, [self.zero] * 3)
        for i, v in enumerate((eps, kappa, misfit)):
            if v:
                acc[i] += v

    def settlement(self, node: str, direction: str, value) -> None:
        name = f"{node}.{direction}"
        if name in self.topo.column_index:
            self.c[self.topo.column_index[name]] += value


@dataclass(frozen=True)
class LoadKind:
    """The handlers of one kind of load (see the module docstring)."""

    words: str  #: what the sheet calls it ("nodal load")
    cls: type
    values: Callable[[Any], dict]
    exact: Callable[[Any, str, Callable, Any], dict]
    apply: Callable[[dict, Any, LoadSink], None]
    resultant: Callable[[Structure, Any, tuple[float, float]], tuple | None]
    describe: Callable[[Structure, Any, Any], tuple[str, str]]


LOAD_KINDS: dict[type, LoadKind] = {}


def register_load(kind: LoadKind) -> LoadKind:
    LOAD_KINDS[kind.cls] = kind
    return kind


def load_kind(load) -> LoadKind:
    """The kind of ``load``."""
    return LOAD_KINDS[type(load)]


def _forces_text(u, fx, fy, mz) -> str:
    from .output.sheet import fmt

    fu, mu = u.force_unit, u.moment_unit
    parts = [f"{k} = {fmt(u.to_output(v, q))} {lab}" for k, v, q, lab in
             (("fx", fx, "force", fu), ("fy", fy, "force", fu), ("mz", mz, "moment", mu)) if v]
    return ", ".join(parts) or "0"


def _point_on(st: Structure, mid: str, at: float) -> tuple[float, float]:
    return st.point(mid, at)


# ---------------------------------------------------------------- nodal load
def _nodal_resultant(st: Structure, ld: NodalLoad, centre) -> tuple:
    """A nodal load's terms; their sizes are counted among the joints' (zero here)."""
    nd = st.nodes[ld.node]
    dx, dy = nd.x - centre[0], nd.y - centre[1]
    return (ld.fx, ld.fy, ld.mz + dx * ld.fy - dy * ld.fx), (0.0, 0.0, 0.0), 0.0


register_load(LoadKind(
    "nodal load", NodalLoad,
    values=lambda ld: {"fx": ld.fx, "fy": ld.fy, "mz": ld.mz},
    exact=lambda ld, w, get, fields: {
        "fx": get(f"{w}.fx", ld.fx, "force"), "fy": get(f"{w}.fy", ld.fy, "force"),
        "mz": get(f"{w}.mz", ld.mz, "moment")},
    apply=lambda v, ld, sink: sink.node_force(ld.node, v["fx"], v["fy"], v["mz"]),
    resultant=lambda st, ld, centre: _nodal_resultant(st, ld, centre),
    describe=lambda st, u, ld: (ld.node, _forces_text(u, ld.fx, ld.fy, ld.mz)),
))


# ---------------------------------------------------------------- point load on a member
def _point_resultant(st: Structure, ld: PointLoad, centre) -> tuple:
    o = st.nodes[st.members[ld.member].start]
    if st.members[ld.member].curve is None:  # from the start node: no cancellation far out
        c, s = st.direction(ld.member)
        dx, dy = (o.x - centre[0]) + ld.at * c, (o.y - centre[1]) + ld.at * s
    else:
        from .elements.arc import arc_of

        ox, oy = arc_of(st.members[ld.member].curve).point(ld.at, (0.0, 0.0),
                                                          st.direction(ld.member))
        dx, dy = (o.x - centre[0]) + float(ox), (o.y - centre[1]) + float(oy)
    return ((ld.fx, ld.fy, ld.mz + dx * ld.fy - dy * ld.fx),
            (abs(ld.fx), abs(ld.fy), abs(ld.mz) + abs(dx * ld.fy) + abs(dy * ld.fx)), 0.0)


def _point_describe(st: Structure, u, ld: PointLoad) -> tuple[str, str]:
    from .output.sheet import fmt

    return (f"{ld.member} at {fmt(u.convert(ld.at, 0, 1))} {u.length_unit}",
            _forces_text(u, ld.fx, ld.fy, ld.mz))


register_load(LoadKind(
    "point load", PointLoad,
    values=lambda ld: {"at": ld.at, "fx": ld.fx, "fy": ld.fy, "mz": ld.mz},
    exact=lambda ld, w, get, fields: {
        "at": get(f"{w}.at", None, "length"), "fx": get(f"{w}.fx", ld.fx, "force"),
        "fy": get(f"{w}.fy", ld.fy, "force"), "mz": get(f"{w}.mz", ld.mz, "moment")},
    apply=lambda v, ld, sink: sink.member_point(ld.member, v["at"], v["fx"], v["fy"],
                                                v["mz"]),
    resultant=_point_resultant,
    describe=_point_describe,
))


# ---------------------------------------------------------------- distributed load
def _distributed_exact(ld: DistributedLoad, w: str, get, fields) -> dict:
    out: dict[str, Any] = {"start": get(f"{w}.from", None, "length"),
                           "end": get(f"{w}.to", None, "length")
                           if f"{w}.to" in fields else None}
    for key, pair in (("wx", ld.wx), ("wy", ld.wy)):
        if f"{w}.{key}" in fields:
            v = get(f"{w}.{key}", pair[0], "force/length")
            out[key] = (v, v)
        else:
            out[key] = (get(f"{w}.{key}[0]", pair[0], "force/length"),
                        get(f"{w}.{key}[1]", pair[1], "force/length"))
    return out


def _distributed_resultant(st: Structure, ld: DistributedLoad, centre) -> tuple:
    """Total force and moment about ``centre`` of the linearly varying load (Gauss–Legendre,
    exact), bounds of the sizes of its terms, and its force scale."""
    import numpy as np

    from .fields import gauss_integral

    L = st.length(ld.member)
    a, b = ld.start, (L if np.isnan(ld.end) else ld.end)
    if st.members[ld.member].curve is not None:
        return _curved_resultant(st, ld, centre, a, b)
    c, s = st.direction(ld.member)
    o = st.nodes[st.members[ld.member].start]
    ox, oy = o.x - centre[0], o.y - centre[1]

    def w(xi, pair):
        return pair[0] + (pair[1] - pair[0]) * (xi - a) / (b - a)

    brk = np.array([a, b])
    fx = gauss_integral(brk, lambda xi: w(xi, ld.wx))
    fy = gauss_integral(brk, lambda xi: w(xi, ld.wy))
    mz = gauss_integral(brk, lambda xi: (ox + xi * c) * w(xi, ld.wy)
                        - (oy + xi * s) * w(xi, ld.wx))
    # sizes: the integral of |w| is at most the mean of the end values' sizes times the
    # loaded length; the lever arm at most the farther end's
    span = b - a
    wx = 0.5 * (abs(ld.wx[0]) + abs(ld.wx[1])) * span
    wy = 0.5 * (abs(ld.wy[0]) + abs(ld.wy[1])) * span
    far = max(np.hypot(ox + a * c, oy + a * s), np.hypot(ox + b * c, oy + b * s))
    return (fx, fy, mz), (wx, wy, far * (wx + wy)), max(abs(fx), abs(fy))


def _curved_resultant(st: Structure, ld: DistributedLoad, centre, a: float,
                      b: float) -> tuple:
    """:func:`_distributed_resultant` on a curved member: its total force and moment from
    the load's density along the arc (:mod:`leastwork.elements.curved`)."""
    import numpy as np

    from .elements.curved import particular_values

    m = st.members[ld.member]
    c, s = st.direction(ld.member)
    tot = particular_values(m, (c, s), [], [(a, b, ld.wx, ld.wy, ld.frame)]).total
    fx, fy = tot[0] * c - tot[1] * s, tot[0] * s + tot[1] * c
    o = st.nodes[m.start]
    ox, oy = o.x - centre[0], o.y - centre[1]
    mz = tot[2] + ox * fy - oy * fx
    span = st.length(ld.member)
    size = max(abs(v) for v in (*ld.wx, *ld.wy)) * span
    far = max(np.hypot(*np.subtract(st.point(ld.member, x), centre)) for x in (a, 0.5 * (a + b), b))
    far = max(far, np.hypot(ox, oy) + span)
    return (fx, fy, mz), (size, size, far * 2 * size), max(abs(fx), abs(fy), size)


def _distributed_describe(st: Structure, u, ld: DistributedLoad) -> tuple[str, str]:
    from .output.sheet import fmt

    L = st.length(ld.member)
    b = L if math.isnan(ld.end) else ld.end
    parts = []
    for k, pair in (("wx", ld.wx), ("wy", ld.wy)):
        if any(pair):
            a0, a1 = (fmt(u.to_output(v, "distributed")) for v in pair)
            parts.append(f"{k} = {a0}" + ("" if pair[0] == pair[1] else f" to {a1}")
                         + f" {u.distributed_unit}")
    return (f"{ld.member} from {fmt(u.convert(ld.start, 0, 1))} to {fmt(u.convert(b, 0, 1))} "
            f"{u.length_unit}", ", ".join(parts) or "0")


register_load(LoadKind(
    "distributed load", DistributedLoad,
    values=lambda ld: {"start": ld.start, "end": None if math.isnan(ld.end) else ld.end,
                       "wx": ld.wx, "wy": ld.wy},
    exact=_distributed_exact,
    apply=lambda v, ld, sink: sink.member_distributed(
        ld.member, v["start"], v["end"], v["wx"], v["wy"],
        **({"frame": ld.frame} if ld.frame != "global" else {})),
    resultant=_distributed_resultant,
    describe=_distributed_describe,
))


# ---------------------------------------------------------------- temperature
def _temperature_apply(v: dict, ld: TemperatureLoad, sink: LoadSink) -> None:
    """Free strain alpha dT and free curvature alpha dTgrad / depth (sagging: the local
    -y face warmer and longer)."""
    sec = sink.section(ld.member)
    alpha = sec.alpha if sec.alpha is not None else sink.zero
    grad = v["gradient"]
    kappa = alpha * grad / sec.depth if grad else sink.zero
    sink.member_strain(ld.member, alpha * v["uniform"], kappa, sink.zero)


register_load(LoadKind(
    "temperature", TemperatureLoad,
    values=lambda ld: {"uniform": ld.uniform, "gradient": ld.gradient},
    exact=lambda ld, w, get, fields: {
        "uniform": get(f"{w}.temperature.uniform", ld.uniform, "temperature difference"),
        "gradient": get(f"{w}.temperature.gradient", ld.gradient, "temperature difference")},
    apply=_temperature_apply,
    resultant=lambda st, ld, centre: None,
    describe=lambda st, u, ld: (ld.member, f"uniform {_fmt(ld.uniform)} K, gradient "
                                           f"{_fmt(ld.gradient)} K"),
))


def _fmt(v) -> str:
    from .output.sheet import fmt

    return fmt(v)


# ---------------------------------------------------------------- misfit
register_load(LoadKind(
    "misfit", Misfit,
    values=lambda ld: {"elongation": ld.elongation},
    exact=lambda ld, w, get, fields: {"elongation": get(f"{w}.misfit", ld.elongation,
                                                        "length")},
    apply=lambda v, ld, sink: sink.member_strain(ld.member, sink.zero, sink.zero,
                                                 v["elongation"]),
    resultant=lambda st, ld, centre: None,
    describe=lambda st, u, ld: (ld.member, f"{_fmt(u.to_output(ld.elongation, 'displacement'))} "
                                           f"{u.displacement_unit}"),
))


# ---------------------------------------------------------------- settlement
def _settlement_apply(v: dict, ld: Settlement, sink: LoadSink) -> None:
    for direction, value in v["values"]:
        sink.settlement(ld.node, direction, value)


register_load(LoadKind(
    "settlement", Settlement,
    values=lambda ld: {"values": list(ld.values)},
    exact=lambda ld, w, get, fields: {
        "values": [(d, get(f"{w}.d{d}", v, "angle" if d == "rz" else "length"))
                   for d, v in ld.values]},
    apply=_settlement_apply,
    resultant=lambda st, ld, centre: None,
    describe=lambda st, u, ld: (ld.node, ", ".join(
        f"d{d} = " + (f"{_fmt(v)} rad" if d == "rz" else
                      f"{_fmt(u.to_output(v, 'displacement'))} {u.displacement_unit}")
        for d, v in ld.values)),
))
