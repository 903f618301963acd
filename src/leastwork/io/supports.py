"""``[supports]``: each support's rigid restraints (by type, by direction, or along an
inclined rolling surface) and its springs."""

from __future__ import annotations

import math
from typing import Any

from ..model import Node, Restraint, Support
from .core import CaseReader
from .messages import echo, hint, kind_of, shown

__all__ = ["read_supports"]

_SUPPORT_TYPES = {"fixed": ("x", "y", "rz"), "pinned": ("x", "y"), "roller": ("y",)}
_DIRECTIONS = ("x", "y", "rz")


def read_supports(reader: CaseReader, nodes: dict[str, Node]) -> dict[str, Support]:
    """The supports by node id; a structure needs at least one."""
    supports: dict[str, Support] = {}
    for nid, spec in reader.table("supports").items():
        where = f"[supports] {nid}"
        if nid not in nodes:
            raise reader.err(where, f'unknown node "{echo(nid)}"{hint(nid, nodes)}')
        if isinstance(spec, str):
            spec = {"type": spec}
        if not isinstance(spec, dict):
            raise reader.err(where, 'expected "fixed", "pinned", "roller" or a table such as '
                             '{ restrain = ["x", "y"] }, got ' + kind_of(spec))
        reader.keys_known(where, spec, ("type", "restrain", "springs", "surface_angle",
                                          "acts"))
        supports[nid] = _support(reader, nid, spec, where)
    if not supports:
        raise reader.err("[supports]", "no supports: a structure needs at least one")
    return supports


def _support(reader: CaseReader, nid: str, spec: dict[str, Any], where: str) -> Support:
    """The support at node ``nid`` from its table (keys already checked)."""
    rigid = _rigid_directions(reader, spec, where)
    angle = None
    restraints: list[Restraint] = []
    if "surface_angle" in spec:
        if spec.get("type") != "roller":
            raise reader.err(where + ".surface_angle", 'only a roller (type = "roller") '
                             "takes a rolling-surface angle")
        angle = reader.quantity(spec["surface_angle"], "angle", where + ".surface_angle")
        restraints.append(Restraint(nid, "n", (-math.sin(angle), math.cos(angle), 0.0)))
        rigid = []
    for d in rigid:
        restraints.append(Restraint(nid, d, _unit_vector(d)))
    springs = spec.get("springs", {})
    if not isinstance(springs, dict):
        raise reader.err(where + ".springs", 'expected { y = "8000 kN/m" }, got ' + kind_of(springs))
    for d, k in springs.items():
        if d not in _DIRECTIONS:
            raise reader.err(where + ".springs", f'unknown direction "{echo(d)}"; expected x, y or rz')
        if d in rigid:
            raise reader.err(where + ".springs", f'direction "{d}" is both rigid and a spring')
        dim = "rotational stiffness" if d == "rz" else "force/length"
        stiff = reader.positive(k, dim, f"{where}.springs.{d}")
        restraints.append(Restraint(nid, d, _unit_vector(d), stiff))
    if not restraints:
        raise reader.err(where, "restrains nothing; give a type, restrain or springs")
    return Support(nid, tuple(restraints), angle, _support_acts(reader, spec, where,
                                                                 restraints))


def _support_acts(reader: CaseReader, spec: dict[str, Any], where: str,
                  restraints: list[Restraint]) -> str:
    """"compression" for a bearing that can only push (one restrained translation), else
    "both"."""
    acts = spec.get("acts", "both")
    if acts not in ("both", "compression"):
        raise reader.err(where + ".acts", 'expected "compression" (a bearing that can only '
                         'push and lifts off instead of pulling) or "both" (the default), got '
                         + shown(acts))
    if acts == "compression" and (len(restraints) != 1 or restraints[0].direction == "rz"):
        raise reader.err(where + ".acts", 'acts = "compression" needs exactly one restrained '
                         "translation (x, y, or the normal of an inclined roller), found "
                         + ", ".join(r.direction for r in restraints))
    return acts


def _rigid_directions(reader: CaseReader, spec: dict[str, Any], where: str) -> list[str]:
    """The rigidly restrained directions named by ``type`` or ``restrain`` (not both)."""
    rigid: list[str] = []
    if "type" in spec:
        kind = spec["type"]
        if not isinstance(kind, str) or kind not in _SUPPORT_TYPES:
            raise reader.err(where, f'unknown support type "{echo(kind)}"'
                             f'{hint(str(kind), _SUPPORT_TYPES)}; expected fixed, pinned or roller')
        rigid = list(_SUPPORT_TYPES[kind])
    if "restrain" in spec:
        if "type" in spec:
            raise reader.err(where, "give either type or restrain, not both")
        dirs = spec["restrain"]
        if not isinstance(dirs, list) or not all(d in _DIRECTIONS for d in dirs):
            raise reader.err(where + ".restrain", 'expected a list of "x", "y", "rz", '
                             f"got {shown(dirs)}")
        if len(set(dirs)) != len(dirs):
            raise reader.err(where + ".restrain", f"a direction is named twice: {shown(dirs)}")
        rigid = list(dirs)
    return rigid


def _unit_vector(d: str) -> tuple[float, float, float]:
    """The direction ``d`` ("x", "y" or "rz") as (x, y, rz) components."""
    return {"x": (1.0, 0.0, 0.0), "y": (0.0, 1.0, 0.0), "rz": (0.0, 0.0, 1.0)}[d]
