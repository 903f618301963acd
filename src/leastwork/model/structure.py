"""The data of a structure: nodes, members, supports and loads.

All values are in SI base units (N, m, rad, K); the case's own units are kept in
:class:`Structure.units` for reporting only. Frozen dataclasses, checked once when read.

Sign conventions (see docs/conventions.md): global x right, y up, rz counter-clockwise;
member local x from the start node to the end node, local y is local x turned 90 degrees
counter-clockwise.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field, replace
from typing import Literal

from .units import UnitSystem

__all__ = [
    "Node",
    "Member",
    "Curve",
    "Taper",
    "Restraint",
    "Support",
    "reaction_components",
    "NodalLoad",
    "PointLoad",
    "DistributedLoad",
    "TemperatureLoad",
    "Misfit",
    "Settlement",
    "Load",
    "Structure",
    "DEFAULT_CASE",
    "rotational_nodes",
    "scaled_load",
]

#: Name of the load case of loads that do not name one.
DEFAULT_CASE = "default"


@dataclass(frozen=True)
class Node:
    """A joint. ``x``, ``y`` in m."""

    id: str
    x: float
    y: float


@dataclass(frozen=True)
class Curve:
    """The axis of a curved member between its nodes (elements/arc.py has its geometry).

    ``shape`` "circle" or "parabola"; ``rise`` (m) the largest distance of the axis from
    the chord, on the local +y side when positive; ``chord`` (m) the distance between the
    nodes (set when read)."""

    shape: str
    rise: float
    chord: float


@dataclass(frozen=True)
class Taper:
    """The end section of a tapered beam (the member's own values are its start section).

    ``law`` "linear": EA, EI, GAs, the area and the own weight vary linearly from start to
    end; "depth": a solid rectangle whose depth varies linearly, A and GAs as the depth
    ratio r = d(x)/d_start, I as r^3 (the end values then follow from the start's).
    """

    law: Literal["linear", "depth"]
    EA: float | None  #: N, at the end
    EI: float  #: N*m^2, at the end
    GAs: float | None = None  #: N, at the end
    depth: float | None = None  #: m, at the end
    weight: float | None = None  #: N/m, at the end
    area: float | None = None  #: m^2, at the end
    section_modulus: float | None = None  #: m^3, at the end
    length: float = 0.0  #: m, the member's length when read (x/L along the taper)


@dataclass(frozen=True)
class Member:
    """A beam (bending + axial) or a bar (pin-ended, axial force only).

    Attributes
    ----------
    EA : float or None
        Axial stiffness, N. ``None`` for an axially rigid beam (no axial energy).
    EI : float or None
        Flexural stiffness, N*m^2 (beams only).
    GAs : float or None
        Shear stiffness G*shear_area, N (beams; used only when shear energy is asked).
    alpha : float or None
        Coefficient of thermal expansion, 1/K.
    depth : float or None
        Section depth, m (for a temperature gradient).
    hinge_start, hinge_end : bool
        Moment released at that end (beams).
    weight : float or None
        Own weight per unit length, N/m (unit weight of the material times the section
        area; ``None`` where either is not given).
    end_springs : (float or None, float or None)
        Rotational stiffness (N*m/rad) of a semi-rigid joint between the beam's start / end
        and its node; None: rigidly joined (or hinged, see ``hinge_start``).
    acts : str
        "both" (default), or for a one-way bar "tension" (a tie, rod or cable: it goes
        slack rather than push) or "compression" (a strut that lifts off rather than pull).
    """

    id: str
    kind: Literal["beam", "bar", "tapered"]
    start: str
    end: str
    EA: float | None = None
    EI: float | None = None
    GAs: float | None = None
    alpha: float | None = None
    depth: float | None = None
    hinge_start: bool = False
    hinge_end: bool = False
    weight: float | None = None
    acts: str = "both"
    end_springs: tuple[float | None, float | None] = (None, None)
    area: float | None = None  #: cross-section area A (m^2), for stresses
    section_modulus: float | None = None  #: elastic section modulus S (m^3), for stresses
    curve: Curve | None = None  #: a curved axis (a beam whose kind is then "curved")
    taper: Taper | None = None  #: end section of a tapered beam (kind "tapered")
    #: names of the material and section it was given (None where EA / EI came directly),
    #: echoed on the calculation sheet with E (Pa) and I (m^4)
    material: str | None = None
    section: str | None = None
    E: float | None = None
    I: float | None = None  # noqa: E741 (the trade's name for the second moment of area)

    @property
    def is_beam(self) -> bool:
        """A member in bending (a beam, prismatic or tapered)."""
        return self.kind in ("beam", "tapered")


def rotational_nodes(members) -> set[str]:
    """Nodes with a rotation of their own: at least one beam end rigidly connected there.

    ``members`` is an iterable of :class:`Member`. At any other node (only bars or hinged
    beam ends) no moment can be resisted and no rotation is defined.
    """
    from ..elements import kind_of

    nodes: set[str] = set()
    for m in members:
        nodes.update(kind_of(m).rotation_nodes(m))
    return nodes


@dataclass(frozen=True)
class Restraint:
    """One reaction component of a support.

    ``vector`` is the unit direction (x, y, rz) along which the support acts on the node;
    ``stiffness`` is ``None`` for a rigid restraint, else the spring stiffness (N/m, or
    N*m/rad for rz).
    """

    node: str
    direction: str  #: "x", "y", "rz" or "n" (normal of an inclined roller)
    vector: tuple[float, float, float]
    stiffness: float | None = None

    @property
    def name(self) -> str:
        return f"{self.node}.{self.direction}"

    @property
    def is_spring(self) -> bool:
        return self.stiffness is not None


@dataclass(frozen=True)
class Support:
    """The restraints at one node. ``surface_angle`` (rad) for an inclined roller."""

    node: str
    restraints: tuple[Restraint, ...]
    surface_angle: float | None = None
    #: "both" (default) or "compression": a bearing that can only push the structure along
    #: its one restrained translation (its reaction along the restraint's vector is >= 0)
    #: and lifts off instead of pulling
    acts: str = "both"


def reaction_components(support: Support, value_of, vector_of=None,
                        zero=0.0) -> dict[str, float]:
    """The reaction a support applies, in the result's components: ``value_of(restraint)``
    (N, N*m) summed into x, y, rz; an inclined roller's normal force adds its x and y
    parts (``vector_of(restraint)``, default its ``vector``) and is also given as "n" (its
    value along the surface normal). Any number type: ``zero`` is its zero."""
    out: dict[str, float] = {}
    for r in support.restraints:
        val = value_of(r)
        if r.direction == "n":
            vector = r.vector if vector_of is None else vector_of(r)
            out["x"] = out.get("x", zero) + val * vector[0]
            out["y"] = out.get("y", zero) + val * vector[1]
            out["n"] = val
        else:
            out[r.direction] = out.get(r.direction, zero) + val
    return out


@dataclass(frozen=True)
class NodalLoad:
    """Force (N) and moment (N*m) on a node, global components."""

    node: str
    fx: float = 0.0
    fy: float = 0.0
    mz: float = 0.0
    case: str = DEFAULT_CASE
    written: str = ""  #: how the file gave it when not as these values ("self-weight of AB")

    def scaled(self, f: float, case: str) -> NodalLoad:
        return replace(self, fx=f * self.fx, fy=f * self.fy, mz=f * self.mz, case=case)


@dataclass(frozen=True)
class PointLoad:
    """Concentrated force/moment on a member at ``at`` m from its start, global components."""

    member: str
    at: float
    fx: float = 0.0
    fy: float = 0.0
    mz: float = 0.0
    case: str = DEFAULT_CASE
    written: str = ""  #: how the file gave it when not in global components

    def scaled(self, f: float, case: str) -> PointLoad:
        return replace(self, fx=f * self.fx, fy=f * self.fy, mz=f * self.mz, case=case)


@dataclass(frozen=True)
class DistributedLoad:
    """Distributed load per unit member length (N/m), global components, linear from
    ``start`` to ``end`` (m from the member's start node): values ``wx``/``wy`` are
    (value at start, value at end)."""

    member: str
    wx: tuple[float, float] = (0.0, 0.0)
    wy: tuple[float, float] = (0.0, 0.0)
    start: float = 0.0
    end: float = math.nan  #: nan means the member's end
    case: str = DEFAULT_CASE
    #: how the file gave it when not per member length in global components ("per
    #: horizontal projection: wy = -1.2 kN/m", "self-weight")
    written: str = ""
    #: on a curved member only: "global" (wx, wy per unit arc length), "projection" (wy per
    #: unit horizontal, wx per unit vertical length) or "local" (wx along the tangent, wy
    #: along local +y, per unit arc length); on a straight member always "global"
    frame: str = "global"

    def scaled(self, f: float, case: str) -> DistributedLoad:
        return replace(self, wx=(f * self.wx[0], f * self.wx[1]),
                       wy=(f * self.wy[0], f * self.wy[1]), case=case)


@dataclass(frozen=True)
class TemperatureLoad:
    """Change of mean temperature ``uniform`` (K) and ``gradient`` (K): temperature of the
    local -y face minus that of the local +y face."""

    member: str
    uniform: float = 0.0
    gradient: float = 0.0
    case: str = DEFAULT_CASE

    def scaled(self, f: float, case: str) -> TemperatureLoad:
        return replace(self, uniform=f * self.uniform, gradient=f * self.gradient, case=case)


@dataclass(frozen=True)
class Misfit:
    """Fabricated length minus the distance between the member's nodes (m)."""

    member: str
    elongation: float
    case: str = DEFAULT_CASE

    def scaled(self, f: float, case: str) -> Misfit:
        return replace(self, elongation=f * self.elongation, case=case)


@dataclass(frozen=True)
class Settlement:
    """Imposed displacement of a support: ``dx``, ``dy`` (m), ``drz`` (rad); ``None`` where
    not imposed. ``dn`` for the normal of an inclined roller."""

    node: str
    values: tuple[tuple[str, float], ...]  #: (direction, value) pairs
    case: str = DEFAULT_CASE

    def scaled(self, f: float, case: str) -> Settlement:
        return replace(self, values=tuple((d, f * v) for d, v in self.values), case=case)


Load = NodalLoad | PointLoad | DistributedLoad | TemperatureLoad | Misfit | Settlement


def scaled_load(load: Load, factor: float, case: str) -> Load:
    """``load`` times ``factor``, put in load case ``case`` (for load combinations; every
    effect is linear, so a factored load gives factored results). Each load kind scales
    its own values (its ``scaled`` method)."""
    return load.scaled(factor, case)


@dataclass(frozen=True)
class Structure:
    """A whole case: geometry, members, supports, loads and analysis options (SI units)."""

    name: str
    nodes: dict[str, Node]
    members: dict[str, Member]
    supports: dict[str, Support]
    loads: tuple[Load, ...] = ()
    units: UnitSystem = field(default_factory=UnitSystem)
    redundants: tuple[str, ...] | None = None  #: the user's choice, or None for automatic
    displacements: tuple[str, ...] = ()  #: displacement targets, e.g. "B.y"
    shear: bool = False  #: include shear energy of beams
    #: ``[analysis] deflection_limits``: (span N, cantilever N) for limits L/N, None where
    #: not given
    deflection_limits: tuple[float | None, float | None] = (None, None)
    source: str = "<structure>"  #: file the case came from, for messages
    case_order: tuple[str, ...] = ()  #: load case names in order of first appearance
    #: load combinations: (name, ((case, factor), ...)); their factored loads are among
    #: ``loads`` under the combination's name, so a combination solves like a load case
    combinations: tuple[tuple[str, tuple[tuple[str, float], ...]], ...] = ()
    #: ``[patterns]``: (load case, the load cases of its other arrangements)
    patterns: tuple[tuple[str, tuple[str, ...]], ...] = ()
    #: ``[envelopes]``: (group, the combinations it covers, pattern variants included)
    envelope_groups: tuple[tuple[str, tuple[str, ...]], ...] = ()
    #: ``[project]``: the calculation sheet's title block, (key, text) pairs in the
    #: order of :data:`PROJECT_KEYS` (title, job, client, by, checked, revision)
    project: tuple[tuple[str, str], ...] = ()

    def length(self, member_id: str) -> float:
        """Length along the member's axis (the arc length of a curved member), m."""
        m = self.members[member_id]
        if m.curve is not None:
            from ..elements.arc import arc_of

            return arc_of(m.curve).length
        a, b = self.nodes[m.start], self.nodes[m.end]
        return math.hypot(b.x - a.x, b.y - a.y)

    def direction(self, member_id: str) -> tuple[float, float]:
        """Unit vector of local x (cos, sin)."""
        m = self.members[member_id]
        a, b = self.nodes[m.start], self.nodes[m.end]
        L = math.hypot(b.x - a.x, b.y - a.y)
        return (b.x - a.x) / L, (b.y - a.y) / L

    def tangent(self, member_id: str, at: float) -> tuple[float, float]:
        """Unit vector of local x at ``at`` m along the member's axis (its direction for a
        straight member)."""
        m = self.members[member_id]
        if m.curve is None:
            return self.direction(member_id)
        from ..elements.arc import arc_of

        tx, ty = arc_of(m.curve).tangent(at, self.direction(member_id))
        return float(tx), float(ty)

    def point(self, member_id: str, at: float) -> tuple[float, float]:
        """Global (x, y) of the point ``at`` m along the member's axis."""
        m = self.members[member_id]
        a = self.nodes[m.start]
        c, s = self.direction(member_id)
        if m.curve is None:
            return a.x + at * c, a.y + at * s
        from ..elements.arc import arc_of

        x, y = arc_of(m.curve).point(at, (a.x, a.y), (c, s))
        return float(x), float(y)

    @property
    def case_names(self) -> tuple[str, ...]:
        if self.case_order:
            return self.case_order
        names: list[str] = []
        for load in self.loads:
            if load.case not in names:
                names.append(load.case)
        return tuple(names) or (DEFAULT_CASE,)
