"""The texts around the steps: the assumptions, the energy terms a solve includes, and the
caution every output ends with."""

from __future__ import annotations

from ...elements.base import QUAD_RTOL
from ...model import Structure
from ..sheet import fmt

__all__ = ["ASSUMPTIONS", "CAUTION", "energy_terms"]

ASSUMPTIONS = (
    "Linear elastic material, small displacements, plane (2D) structure; straight members, "
    "prismatic unless given as tapered; "
    "energy terms: bending and axial (beams without a cross-section area are axially rigid), "
    "axial for bars, springs; shear only when asked."
)
CAUTION = (
    "These results come from an idealised model. They must be checked by a qualified "
    "engineer against the governing local codes before they are used for any real structure."
)


def energy_terms(st: Structure) -> str:
    """Plain list of the energy terms a solve of ``st`` includes."""
    terms = []
    members = st.members.values()
    if any(m.is_beam for m in members):
        terms.append("bending (beams)")
    if any(m.EA is not None for m in members):
        kinds = sorted({"bars" if not m.is_beam else "beams with an area"
                        for m in members if m.EA is not None})
        terms.append("axial (" + ", ".join(kinds) + ")")
    if st.shear:
        terms.append("shear (beams)")
    if any(r.is_spring for s in st.supports.values() for r in s.restraints):
        terms.append("support springs")
    if any(k is not None for m in members for k in m.end_springs):
        terms.append("semi-rigid joints (M²/2k)")
    text = "Energy terms included: " + ", ".join(terms) + "."
    if any(m.acts != "both" for m in members) or any(
            s.acts != "both" for s in st.supports.values()):
        text += (" One-way members and supports (acts): each load case and combination is "
                 "solved again until every one acts as it may; results are not superposed "
                 "across states.")
    tapered = [m.id for m in members if m.taper is not None]
    if tapered:
        text += (f" Tapered beams (section varying along the axis; energy integrated "
                 f"numerically, relative error bound {fmt(QUAD_RTOL, 1)}): {', '.join(tapered)}.")
    rigid = [m.id for m in members if m.is_beam and m.EA is None]
    if rigid:
        text += f" Axially rigid (no area given): {', '.join(rigid)}."
    if not st.shear and any(m.is_beam for m in members):
        text += " Shear energy not included."
    curved = [m.id for m in members if m.curve is not None]
    if curved:
        text += (f" Curved members ({', '.join(curved)}): thin (the curved-beam correction "
                 "for deep sections is not made), energy integrated along the arc by "
                 "adaptive quadrature; the stiffness cross-check models them as chains of "
                 "straight beams.")
    return text
