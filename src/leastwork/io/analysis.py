"""``[analysis]``: the redundants the user chooses, the displacements asked for, and whether
shear energy counts (then every beam needs a shear stiffness)."""

from __future__ import annotations

from ..model import Member
from .core import CaseReader
from .messages import shown

__all__ = ["read_analysis", "check_shear"]


def read_analysis(reader: CaseReader) -> tuple[tuple[str, ...] | None, tuple[str, ...], bool]:
    """(redundants or None for the automatic choice, displacements, shear) as written."""
    spec = reader.table("analysis")
    reader.keys_known("[analysis]", spec, ("redundants", "displacements", "shear"))
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
    return redundants, tuple(disp), shear


def check_shear(reader: CaseReader, members: dict[str, Member]) -> None:
    """With shear energy asked, refuse a beam without a shear stiffness GAs."""
    for m in members.values():
        if m.is_beam and m.GAs is None:
            raise reader.err(f"[beams] {m.id}", "shear energy is asked ([analysis] "
                             "shear = true) but this beam has no shear stiffness: give "
                             "G in its material and shear_area in its section")
