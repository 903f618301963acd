"""Polynomials along a member as text, in the output units."""

from __future__ import annotations

import numpy as np

from ..sheet import coefficient

__all__ = ["poly_text", "scaled_poly"]

_SUP = str.maketrans("0123456789-", "⁰¹²³⁴⁵⁶⁷⁸⁹⁻")


def poly_text(coef, var: str = "x", scale: float = 1.0) -> str:
    """Ascending coefficients as 'a + b·x + c·x²'; terms below 1e-12 * scale are left out."""
    coef = np.asarray(coef, dtype=float)
    ref = max(scale, float(np.max(np.abs(coef))) if coef.size else 0.0, 1e-300)
    parts = []
    for p, c in enumerate(coef):
        if abs(c) <= 1e-12 * ref:
            continue
        mag = coefficient(abs(c))
        term = mag if p == 0 else (f"{mag}·{var}" if p == 1 else f"{mag}·{var}{str(p).translate(_SUP)}")
        if p > 0 and mag == "1":
            term = var if p == 1 else f"{var}{str(p).translate(_SUP)}"
        parts.append(("-" if c < 0 else "+", term))
    if not parts:
        return "0"
    text = ("-" if parts[0][0] == "-" else "") + parts[0][1]
    for sign, term in parts[1:]:
        text += f" {sign} {term}"
    return text


def scaled_poly(coef, length_factor: float, value_factor: float) -> np.ndarray:
    """Coefficients of f(x_case) from those of f_SI(x_SI): c_p * Lf^p / value_factor."""
    coef = np.asarray(coef, dtype=float)
    return coef * length_factor ** np.arange(coef.size) / value_factor
