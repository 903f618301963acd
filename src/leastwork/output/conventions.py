"""The sign conventions, worded once for every output (terminal, sheets, plots), so that a
checker reads the same words wherever a number appears.

Section forces of a member, in its local axes (x from the start node to the end node, y a
quarter turn counter-clockwise from x): ``n`` positive in tension; ``m`` positive when it
puts the local -y face in tension (sagging for a member drawn left to right); ``v = dm/dx``.
Diagrams draw m on the tension side, so a drawing reads the same whichever way a member
was drawn.
"""

from __future__ import annotations

__all__ = ["AXIAL_SIGN", "MOMENT_SIGN_SHORT", "MOMENT_SIGN", "SHEAR_SIGN", "SECTION_FORCES",
           "MOMENT_DIAGRAM", "REACTION_SIGN", "moment_convention"]

#: Axial force.
AXIAL_SIGN = "n tension +"
#: Bending moment, short (table titles, narrow terminals).
MOMENT_SIGN_SHORT = "m + when the local -y face is in tension (sagging)"
#: Bending moment, in full.
MOMENT_SIGN = ("m positive when it puts the member's local -y face in tension (sagging on a "
               "member drawn left to right; local x from its start node to its end node)")
#: Shear force.
SHEAR_SIGN = "v = dm/dx"
#: The three section forces, as a table title's parenthesis.
SECTION_FORCES = f"{AXIAL_SIGN}, {MOMENT_SIGN_SHORT}, {SHEAR_SIGN}"
#: How a moment diagram is drawn.
MOMENT_DIAGRAM = "bending moment drawn on the tension side of each member, values without sign"
#: Reactions.
REACTION_SIGN = ("forces the supports apply to the structure: x right +, y up +, moments "
                 "counter-clockwise +")


def moment_convention() -> str:
    """The sentence stating how bending moments are drawn and signed (plain text), as the
    diagrams' captions print it: the drawing rule, then the sign the tables use."""
    return f"{MOMENT_DIAGRAM}; in tables {MOMENT_SIGN_SHORT}"
