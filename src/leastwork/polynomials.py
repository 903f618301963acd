"""Polynomials in the position x along a member, generic over the number type.

A polynomial is a sequence of ascending-power coefficients (``c0 + c1 x + c2 x**2 ...``);
the coefficients may be floats or exact field elements (:mod:`leastwork.symbolic.algebra`):
only ``+ - * /`` and truth (is it nonzero?) are used, so the section-force fields, the
member kinds' formulas and the exact pipeline share one code. Results are trimmed of
vanishing leading coefficients (at least one coefficient is kept); trimming never changes
a value.
"""

from __future__ import annotations

from collections.abc import Sequence
from typing import Any

__all__ = ["Poly", "poly_trim", "poly_add", "poly_scale", "poly_mul", "poly_eval",
           "poly_antiderivative", "poly_derivative", "poly_divmod", "poly_integral",
           "poly_line"]

#: ascending coefficients
Poly = Sequence[Any]


def poly_trim(a: Poly) -> tuple:
    """``a`` without vanishing leading coefficients."""
    n = len(a)
    while n > 1 and not a[n - 1]:
        n -= 1
    return tuple(a[:n])


def poly_add(a: Poly, b: Poly) -> tuple:
    """a + b."""
    if len(a) < len(b):
        a, b = b, a
    return poly_trim(tuple(x + y for x, y in zip(a, b)) + tuple(a[len(b):]))


def poly_scale(a: Poly, k) -> tuple:
    """k a."""
    return poly_trim(tuple(x * k for x in a))


def poly_mul(a: Poly, b: Poly) -> tuple:
    """a b (products of vanishing coefficients skipped)."""
    zero = a[0] - a[0]
    out = [zero] * (len(a) + len(b) - 1)
    for i, x in enumerate(a):
        if not x:
            continue
        for j, y in enumerate(b):
            if y:
                out[i + j] = out[i + j] + x * y
    return poly_trim(out)


def poly_eval(a: Poly, x):
    """a(x) by Horner's rule (``c + acc * x``, as ``numpy.polynomial.polynomial.polyval``
    sums)."""
    acc = a[-1]
    for c in reversed(a[:-1]):
        acc = c + acc * x
    return acc


def poly_antiderivative(a: Poly, lower) -> tuple:
    """The antiderivative of ``a`` that vanishes at ``lower`` (as ``polyint`` with
    ``lbnd``)."""
    zero = a[0] - a[0]
    anti = (zero, *(c / (i + 1) for i, c in enumerate(a)))
    return poly_add(anti, (-poly_eval(anti, lower),))


def poly_derivative(a: Poly) -> tuple:
    """da/dx."""
    if len(a) == 1:
        return (a[0] - a[0],)
    return poly_trim(tuple(c * i for i, c in enumerate(a) if i > 0))


def poly_divmod(a: Poly, b: Poly) -> tuple[tuple, tuple]:
    """Quotient and remainder of a / b (b's leading coefficient nonzero)."""
    work = list(poly_trim(a))
    b = poly_trim(b)
    zero = work[0] - work[0]
    if len(work) < len(b):
        return (zero,), tuple(work)
    q = [zero] * (len(work) - len(b) + 1)
    for k in range(len(work) - len(b), -1, -1):
        f = work[k + len(b) - 1] / b[-1]
        q[k] = f
        for j, c in enumerate(b):
            work[k + j] = work[k + j] - f * c
    rem = poly_trim(work[: len(b) - 1]) if len(b) > 1 else (zero,)
    return poly_trim(q), rem


def poly_integral(a: Poly, lo, hi):
    """The integral of ``a`` from ``lo`` to ``hi`` (difference of the antiderivative)."""
    prim = (a[0] * 0, *(c / (i + 1) for i, c in enumerate(a)))
    return poly_eval(prim, hi) - poly_eval(prim, lo)


def poly_line(a, b, f0, f1) -> tuple:
    """The line through (a, f0) and (b, f1)."""
    slope = (f1 - f0) / (b - a)
    return poly_trim((f0 - slope * a, slope))
