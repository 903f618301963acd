"""The look of the diagrams: a sober palette of our own that stays legible in grey print,
label sizes, and the one way user text reaches a drawing (:func:`drawn_text`)."""

from __future__ import annotations

import re

from ...plaintext import literal

INK = "#1f1f1f"
FAINT = "#a6a6a6"
GROUND = "#d4d4d4"
LOAD = "#1c4a73"
IMPOSED = "#7b4a12"
REDUNDANT = "#9b1c1c"
POS_FILL = "#c3d6e8"
NEG_FILL = "#efcdbd"
POS_LINE = "#3b6e99"
NEG_LINE = "#b0522c"
SHAPE = "#1c4a73"
FONT = 7.0  #: labels, points
DPI = 150

#: Code points that XML 1.0 does not allow and :func:`literal` leaves as they are.
_NOT_XML = re.compile("[\ufffe\uffff\ud800-\udfff]")


def drawn_text(s: object) -> str:
    """Text as matplotlib is given it: one printable line with control characters escaped
    (:func:`leastwork.plaintext.literal`; an SVG with them is not valid XML), the code
    points XML forbids escaped too, and a dollar sign kept from starting mathtext."""
    text = _NOT_XML.sub(lambda m: f"\\u{ord(m.group()):04x}", literal(s))
    return text.replace("$", r"\$")
