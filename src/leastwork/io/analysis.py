"""``[analysis]``: the redundants the user chooses, the displacements asked for, and whether
shear energy counts (then every beam needs a shear stiffness)."""

from __future__ import annotations

from ..model import Member
from .core import CaseReader
from .messages import shown

__all__ = ["read_analysis", "check_shear"]


def read_analysis(reader: CaseReader) -> tuple:
    """(redundants or None for the automatic choice, displacements, shear, deflection
    limits (span N, cantilever N), None where not given) as written."""
    spec = reader.table("analysis")
    reader.keys_known("[analysis]", spec, ("redundants", "displacements", "shear",
                                           "deflection_limits"))
    redundants = spec.get("redundants")
    if redundants is not None:
        if not isinstance(redundants, list) or not all(isinstance(r, str) for r in redundants):
            raise reader.err("[analysis] redundants", f'expected a list of names such as '
                             f'["C.y", "BC"], got {shown(redundants)}')
        redundants = tuple(redundants)
    disp = spec.get("displacements", [])
    if not isinstance(disp, list) or not all(isinstance(r, str) for r in disp):
        raise reader.err("[analysis] displacements", 'expected a list such as ["B.y", '
                         f'"A.rz"], got {shown(disp)}')
    shear = spec.get("shear", False)
    if not isinstance(shear, bool):
        raise reader.err("[analysis] shear", f"expected true or false, got {shown(shear)}")
    return redundants, tuple(disp), shear, _deflection_limits(reader, spec)


def _deflection_limits(reader: CaseReader, spec: dict) -> tuple[float | None, float | None]:
    """``deflection_limits = { span = 360, cantilever = 180 }``: the N of L/N."""
    limits = spec.get("deflection_limits")
    if limits is None:
        return (None, None)
    where = "[analysis] deflection_limits"
    if not isinstance(limits, dict) or not limits:
        raise reader.err(where, "expected { span = 360, cantilever = 180 } (either or both), "
                         f"got {shown(limits)}")
    reader.keys_known(where, limits, ("span", "cantilever"))
    out: list[float | None] = []
    for key in ("span", "cantilever"):
        v = limits.get(key)
        if v is not None and (isinstance(v, bool) or not isinstance(v, (int, float))
                              or not 1 <= v <= 1e6):
            raise reader.err(f"{where}.{key}", "expected a number N of the limit L/N, from 1 "
                             f"to 1e6 (e.g. 360), got {shown(v)}")
        out.append(None if v is None else float(v))
    return (out[0], out[1])


def check_shear(reader: CaseReader, members: dict[str, Member]) -> None:
    """With shear energy asked, refuse a beam without a shear stiffness GAs."""
    for m in members.values():
        if m.is_beam and m.GAs is None:
            raise reader.err(f"[beams] {m.id}", "shear energy is asked ([analysis] "
                             "shear = true) but this beam has no shear stiffness: give "
                             "G in its material and shear_area in its section")
