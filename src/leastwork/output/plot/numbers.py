"""Numbers as the diagrams print them: the sheets' engineering rounding (three significant
figures unless ``--figures``, trailing zeros kept: 45.0), a true minus sign, powers of ten
written 1.71×10⁵ - never e-notation - and the resolution below which a value of a diagram
is round-off or too small to matter at the printed precision (drawn as zero and not
labelled)."""

from __future__ import annotations

import math

from ..sheet import figures, fmt

MINUS = "\u2212"


def number(x: float, sig: int | None = None) -> str:
    """``x`` as the sheets write it (:func:`leastwork.output.sheet.fmt`: ``sig`` significant
    figures, default 3 or ``--figures``, trailing zeros kept; magnitudes outside
    10⁻³ … 10⁵ as a power of ten; zero as "0") with a true minus sign.

    >>> number(45.0), number(-0.0123456), number(171234.0), number(2.5e-9), number(0.0)
    ('45.0', '−0.0123', '1.71×10⁵', '2.50×10⁻⁹', '0')
    >>> number(1712.3), number(99.96), number(-62.25)
    ('1710', '100', '−62.2')
    """
    x = float(x)
    if not math.isfinite(x):
        return "∞" if x > 0 else (MINUS + "∞" if x < 0 else "undefined")
    return fmt(x, sig).replace("-", MINUS)


def magnitude(x: float, sig: int | None = None) -> str:
    """``number(abs(x))``: a value whose sense the drawing shows (a moment on the tension
    side, an axial force marked T or C)."""
    return number(abs(float(x)), sig)


def resolution(largest: float, sig: int | None = None) -> float:
    """Half a unit of the last printed figure of ``largest`` (> 0): values of the same
    diagram below this print as zero at ``sig`` figures, are drawn as zero and get no label.

    >>> resolution(2.02)
    0.005
    """
    if not largest > 0 or not math.isfinite(largest):
        return 0.0
    sig = figures() if sig is None else sig
    return 0.5 * 10.0 ** (math.floor(math.log10(largest)) - (sig - 1))


def tension_mark(x: float) -> str:
    """The axial force with T (tension) or C (compression) after it, no sign: "33.3 T".

    >>> tension_mark(-26.64), tension_mark(4.0), tension_mark(0.0)
    ('26.6 C', '4.00 T', '0')
    """
    if x == 0:
        return "0"
    return f"{magnitude(x)} {'T' if x > 0 else 'C'}"
