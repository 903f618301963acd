"""The model: the data of a structure (:mod:`.structure`: nodes, members, supports, loads,
all in SI) and the units they are read and reported in (:mod:`.units`: the case's unit
system, the quantity parser, conversion to SI at the boundary).

``from leastwork.model import Structure, NodalLoad, ...`` gives the data classes; the unit
machinery is imported from :mod:`leastwork.model.units`.
"""

from .structure import (
    DEFAULT_CASE,
    Curve,
    DistributedLoad,
    Load,
    Member,
    Misfit,
    NodalLoad,
    Node,
    PointLoad,
    Restraint,
    Settlement,
    Structure,
    Support,
    Taper,
    TemperatureLoad,
    reaction_components,
    rotational_nodes,
    scaled_load,
)

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
