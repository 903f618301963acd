"""The look of the diagrams, our own: a palette chosen to stay apart for the common forms
of colour blindness and in grey print (ink, a deep blue for loads, a burnt orange for the
redundants, a plum for imposed effects; diagram areas in pale sand, with a hatch added where
a value is negative), the sizes of text at print size, and the one way user text reaches a
drawing (:func:`drawn_text`). Sign and kind are never told by colour alone: axial forces
carry T or C, imposed effects are dashed, redundants are named X1, X2, ..."""

from __future__ import annotations

import re

from ...plaintext import literal

INK = "#1f1f1f"
FAINT = "#a6a6a6"
GROUND = "#d4d4d4"
LOAD = "#0b4f8a"  #: loads (deep blue)
IMPOSED = "#7a3b69"  #: temperature, misfit, settlement (plum; drawn dashed)
REDUNDANT = "#b35300"  #: redundants X (burnt orange)
AREA = "#ecdcae"  #: a diagram's area (pale sand)
AREA_EDGE = "#6b5a2a"  #: its outline
HATCH = "////"  #: added over the area where a value of n or v is negative
TENSION = "#4d4d4d"  #: a bar in tension: dark grey, solid, "T"
COMPRESSION = "#b35300"  #: a bar in compression: burnt orange, "C"
SHAPE = "#0b4f8a"  #: the deflected shape
DIMENSION = "#555555"  #: dimension lines and member names

#: Sizes at print size (points). The figure is drawn at :data:`PRINT_WIDTH` inches wide,
#: the text width of an A4 page, so these are the sizes on paper.
FONT = 9.0  #: labels
TITLE = 9.0  #: panel titles
HEADING = 10.5  #: the figure's heading
PRINT_WIDTH = 6.7  #: inches (170 mm)
DPI = 150
#: Above this many members a drawing leaves out the names of nodes and members and every
#: bar's value but the extremes (unreadable at print size, and slow to place); it says so.
NAMED_MEMBERS_MAX = 400

#: Code points that XML 1.0 does not allow and :func:`literal` leaves as they are.
_NOT_XML = re.compile("[\ufffe\uffff\ud800-\udfff]")


def drawn_text(s: object) -> str:
    """Text as matplotlib is given it: one printable line with control characters escaped
    (:func:`leastwork.plaintext.literal`; an SVG with them is not valid XML), the code
    points XML forbids escaped too, and a dollar sign kept from starting mathtext."""
    text = _NOT_XML.sub(lambda m: f"\\u{ord(m.group()):04x}", literal(s))
    return text.replace("$", r"\$")
