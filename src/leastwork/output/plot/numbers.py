"""Numbers as the diagrams print them: engineering rounding (three significant figures,
trailing zeros kept: 45.0), a true minus sign, powers of ten written 1.71×10³ - never
e-notation - and the resolution below which a value of a diagram is round-off or too small
to matter at the printed precision (drawn as zero and not labelled)."""

from __future__ import annotations

import math

#: Significant figures of every value printed on a diagram.
SIGNIFICANT = 3
#: Plain notation for magnitudes from 10**LOW up to (not including) 10**HIGH.
LOW, HIGH = -3, 5
MINUS = "\u2212"
_SUPER = str.maketrans("-0123456789", "\u207b\u2070\u00b9\u00b2\u00b3\u2074\u2075\u2076"
                       "\u2077\u2078\u2079")


def number(x: float, sig: int = SIGNIFICANT) -> str:
    """``x`` rounded to ``sig`` significant figures, trailing zeros kept; magnitudes outside
    10⁻³ … 10⁵ as a power of ten; zero as "0".

    >>> number(45.0), number(-0.0123456), number(171234.0), number(2.5e-9), number(0.0)
    ('45.0', '−0.0123', '1.71×10⁵', '2.50×10⁻⁹', '0')
    >>> number(1712.3), number(99.96), number(-62.25)
    ('1710', '100', '−62.2')
    """
    x = float(x)
    if x == 0.0:
        return "0"
    if not math.isfinite(x):
        return "∞" if x > 0 else (MINUS + "∞" if x < 0 else "undefined")
    sign = MINUS if x < 0 else ""
    a = abs(x)
    e = math.floor(math.log10(a))
    r = round(a, sig - 1 - e)  # rounding may carry into the next decade (99.96 -> 100)
    if r > 0:
        e = math.floor(math.log10(r))
    if LOW <= e < HIGH:
        decimals = max(sig - 1 - e, 0)
        return sign + f"{r:.{decimals}f}"
    mant = r / 10.0 ** e
    return f"{sign}{mant:.{sig - 1}f}×10{str(e).translate(_SUPER)}"


def magnitude(x: float, sig: int = SIGNIFICANT) -> str:
    """``number(abs(x))``: a value whose sense the drawing shows (a moment on the tension
    side, an axial force marked T or C)."""
    return number(abs(float(x)), sig)


def resolution(largest: float, sig: int = SIGNIFICANT) -> float:
    """Half a unit of the last printed figure of ``largest`` (> 0): values of the same
    diagram below this print as zero at ``sig`` figures, are drawn as zero and get no label.

    >>> resolution(2.02)
    0.005
    """
    if not largest > 0 or not math.isfinite(largest):
        return 0.0
    return 0.5 * 10.0 ** (math.floor(math.log10(largest)) - (sig - 1))


def tension_mark(x: float) -> str:
    """The axial force with T (tension) or C (compression) after it, no sign: "33.3 T".

    >>> tension_mark(-26.64), tension_mark(4.0), tension_mark(0.0)
    ('26.6 C', '4.00 T', '0')
    """
    if x == 0:
        return "0"
    return f"{magnitude(x)} {'T' if x > 0 else 'C'}"
