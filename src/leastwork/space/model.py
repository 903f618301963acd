"""The data of a space structure: nodes with three coordinates, members with two bending
planes and torsion, supports in six directions, loads in global components (SI units).

Axes (docs/space.md): global x, y, z right-handed, z up. Member local x from the start
node to the end node; local y horizontal (perpendicular to local x and global z), local
z = x × y pointing upward; for a vertical member local y is global y. ``roll`` turns the
section (local y and z) about local x, counter-clockwise seen from the end node.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field, replace

import numpy as np

from ..model.structure import DEFAULT_CASE
from ..model.units import UnitSystem

__all__ = ["DIRECTIONS", "TRANSLATIONS", "ROTATIONS", "SpaceNode", "SpaceMember",
           "SpaceRestraint", "SpaceSupport", "SpaceNodalLoad", "SpacePointLoad",
           "SpaceDistributedLoad", "SpaceMisfit", "SpaceTemperature", "SpaceSettlement",
           "SpaceLoad", "SpaceStructure", "local_axes", "is_space"]

#: The six nodal directions, in the order of a node's equations.
DIRECTIONS = ("x", "y", "z", "rx", "ry", "rz")
TRANSLATIONS = DIRECTIONS[:3]
ROTATIONS = DIRECTIONS[3:]
#: The end actions a beam end may release (``releases``): torsion and the two moments.
END_ACTIONS = ("t", "my", "mz")


@dataclass(frozen=True)
class SpaceNode:
    """A joint at ``x``, ``y``, ``z`` (m)."""

    id: str
    x: float
    y: float
    z: float

    @property
    def xyz(self) -> np.ndarray:
        return np.array([self.x, self.y, self.z])


@dataclass(frozen=True)
class SpaceMember:
    """A space beam (axial force, torsion, bending about local y and z) or a bar (axial
    force only, pin-ended).

    Stiffnesses in SI: ``EA`` (N; None: axially rigid), ``EIy``/``EIz`` (N*m^2, bending
    about local y / local z), ``GJ`` (N*m^2, torsion), ``GAy``/``GAz`` (N, shear along
    local y / z, used only when shear is asked). ``releases``: (end, action) pairs with
    end "start"/"end" and action "t", "my" or "mz" released there. ``roll`` in rad.
    """

    id: str
    kind: str  #: "beam" or "bar"
    start: str
    end: str
    EA: float | None = None
    EIy: float | None = None
    EIz: float | None = None
    GJ: float | None = None
    GAy: float | None = None
    GAz: float | None = None
    alpha: float | None = None
    roll: float = 0.0
    releases: frozenset[tuple[str, str]] = frozenset()

    @property
    def is_beam(self) -> bool:
        return self.kind == "beam"

    def released(self, end: str, action: str) -> bool:
        return (end, action) in self.releases


@dataclass(frozen=True)
class SpaceRestraint:
    """One reaction component: ``direction`` in :data:`DIRECTIONS`; ``stiffness`` None for
    a rigid restraint, else a spring (N/m, or N*m/rad for a rotation)."""

    node: str
    direction: str
    stiffness: float | None = None

    @property
    def name(self) -> str:
        return f"{self.node}.{self.direction}"

    @property
    def is_spring(self) -> bool:
        return self.stiffness is not None


@dataclass(frozen=True)
class SpaceSupport:
    node: str
    restraints: tuple[SpaceRestraint, ...]


@dataclass(frozen=True)
class SpaceNodalLoad:
    """Force (N) and moment (N*m) on a node: (fx, fy, fz, mx, my, mz), global."""

    node: str
    values: tuple[float, float, float, float, float, float]
    case: str = DEFAULT_CASE

    def scaled(self, f: float, case: str) -> SpaceNodalLoad:
        return replace(self, values=tuple(f * v for v in self.values), case=case)


@dataclass(frozen=True)
class SpacePointLoad:
    """Concentrated force (fx, fy, fz) in N, global, at ``at`` m from the start node."""

    member: str
    at: float
    force: tuple[float, float, float]
    case: str = DEFAULT_CASE

    def scaled(self, f: float, case: str) -> SpacePointLoad:
        return replace(self, force=tuple(f * v for v in self.force), case=case)


@dataclass(frozen=True)
class SpaceDistributedLoad:
    """Load per unit member length (N/m), global (wx, wy, wz), linear from ``w0`` at
    ``start`` to ``w1`` at ``end`` (m from the start node)."""

    member: str
    w0: tuple[float, float, float]
    w1: tuple[float, float, float]
    start: float
    end: float
    case: str = DEFAULT_CASE

    def scaled(self, f: float, case: str) -> SpaceDistributedLoad:
        return replace(self, w0=tuple(f * v for v in self.w0),
                       w1=tuple(f * v for v in self.w1), case=case)


@dataclass(frozen=True)
class SpaceMisfit:
    """Fabricated length minus the distance between the member's nodes (m)."""

    member: str
    elongation: float
    case: str = DEFAULT_CASE

    def scaled(self, f: float, case: str) -> SpaceMisfit:
        return replace(self, elongation=f * self.elongation, case=case)


@dataclass(frozen=True)
class SpaceTemperature:
    """Change of the member's mean temperature (K)."""

    member: str
    uniform: float
    case: str = DEFAULT_CASE

    def scaled(self, f: float, case: str) -> SpaceTemperature:
        return replace(self, uniform=f * self.uniform, case=case)


@dataclass(frozen=True)
class SpaceSettlement:
    """Imposed displacement of restrained directions: (direction, value m or rad) pairs."""

    node: str
    values: tuple[tuple[str, float], ...]
    case: str = DEFAULT_CASE

    def scaled(self, f: float, case: str) -> SpaceSettlement:
        return replace(self, values=tuple((d, f * v) for d, v in self.values), case=case)


SpaceLoad = (SpaceNodalLoad | SpacePointLoad | SpaceDistributedLoad | SpaceMisfit
             | SpaceTemperature | SpaceSettlement)


@dataclass(frozen=True)
class SpaceStructure:
    """A whole space case (SI units)."""

    name: str
    nodes: dict[str, SpaceNode]
    members: dict[str, SpaceMember]
    supports: dict[str, SpaceSupport]
    loads: tuple = ()
    units: UnitSystem = field(default_factory=UnitSystem)
    redundants: tuple[str, ...] | None = None
    displacements: tuple[str, ...] = ()
    shear: bool = False
    source: str = "<structure>"
    case_order: tuple[str, ...] = ()
    #: load combinations: (name, ((case, factor), ...)); their factored loads are among
    #: ``loads`` under the combination's name (as in a plane case)
    combinations: tuple[tuple[str, tuple[tuple[str, float], ...]], ...] = ()

    def length(self, mid: str) -> float:
        m = self.members[mid]
        return float(np.linalg.norm(self.nodes[m.end].xyz - self.nodes[m.start].xyz))

    def axes(self, mid: str) -> np.ndarray:
        """Rows: local x, y, z of member ``mid`` as global unit vectors."""
        m = self.members[mid]
        return local_axes(self.nodes[m.start].xyz, self.nodes[m.end].xyz, m.roll)

    @property
    def case_names(self) -> tuple[str, ...]:
        if self.case_order:
            return self.case_order
        names: list[str] = []
        for load in self.loads:
            if load.case not in names:
                names.append(load.case)
        return tuple(names) or (DEFAULT_CASE,)

    @property
    def is_space(self) -> bool:
        return True


#: A member whose axis is within this angle's sine of the vertical counts as vertical.
VERTICAL_SINE = 1e-9


def local_axes(a: np.ndarray, b: np.ndarray, roll: float = 0.0) -> np.ndarray:
    """Local x, y, z (rows) of a member from ``a`` to ``b``: y horizontal (global z × x),
    z = x × y upward; global y for a vertical member; then turned by ``roll`` about x."""
    ex = (b - a) / np.linalg.norm(b - a)
    h = np.cross([0.0, 0.0, 1.0], ex)
    norm = float(np.linalg.norm(h))
    ey = np.array([0.0, 1.0, 0.0]) if norm < VERTICAL_SINE else h / norm
    ez = np.cross(ex, ey)
    if roll:
        c, s = math.cos(roll), math.sin(roll)
        ey, ez = c * ey + s * ez, -s * ey + c * ez
    return np.array([ex, ey, ez])


def is_space(st) -> bool:
    """Whether ``st`` is a space structure (as read from a case with 3D nodes)."""
    return bool(getattr(st, "is_space", False))
