"""From elements of K to simplified sympy expressions in the parameter names."""

from __future__ import annotations

from collections.abc import Callable
from typing import Any

import sympy
from sympy.core.mul import _keep_coeff

from ..model.units import UnitSystem
from .algebra import Algebra, Lin
from .extremes import QuadraticValue, RootValue

__all__ = ["Presenter", "unit_text"]

#: numerators with up to this many terms are factored completely
_FACTOR_TERMS = 30


class Presenter:
    """Turn pipeline values into final expressions: factor the rational function
    (numerator and denominator over the rationals) and put back what the auxiliaries stand
    for (square roots with their square factors taken out, sines, pi). Results are
    cached. No general-purpose sympy.simplify: its time is unbounded and factoring already
    gives the canonical form."""

    def __init__(self, alg: Algebra, tick: Callable[[], None]):
        self.alg = alg
        self.tick = tick
        self._cache: dict[Any, sympy.Expr] = {}
        self._polys: dict[Any, sympy.Expr] = {}

    def __call__(self, value, closure=None) -> sympy.Expr:
        if isinstance(value, Lin):
            value = closure.close(value)
        if isinstance(value, RootValue):
            return self._root(value)
        if isinstance(value, QuadraticValue):
            return self(value.a) + self(value.k) * self(value.b) ** 2
        if not value:
            return sympy.S.Zero
        if value in self._cache:
            return self._cache[value]
        self.tick()
        out = self.alg.atomizer.restore(self._factor(value))
        self._cache[value] = out
        return out

    def _factor(self, el) -> sympy.Expr:
        """numerator/denominator, each factored over the rationals (a numerator of more
        than _FACTOR_TERMS terms only has its content and monomial factor taken out), the
        auxiliaries put back, and the rational coefficient kept in front (not multiplied
        into a sum)."""
        if not el:
            return sympy.S.Zero
        cn, num = self._poly(el.numer, len(el.numer) <= _FACTOR_TERMS)
        cd, den = self._poly(el.denom, True)
        return _keep_coeff(cn / cd, num / den)

    def _poly(self, p, full: bool) -> tuple[sympy.Expr, sympy.Expr]:
        """(rational coefficient, product of factors) of a polynomial of K's ring."""
        key = (tuple(sorted(p.terms())), full)
        if key in self._polys:
            return self._polys[key]
        self.tick()
        to_sympy = p.ring.domain.to_sympy
        if p.is_ground:
            out = (p.as_expr(), sympy.S.One)
        elif full:
            coeff, facs = p.factor_list()
            out = (to_sympy(coeff), sympy.Mul(*[f.as_expr() ** m for f, m in facs]))
        else:
            monoms = list(p.monoms())
            monom = tuple(min(e) for e in zip(*monoms))
            rest = p.ring.from_dict({tuple(a - b for a, b in zip(m, monom)): c
                                     for m, c in p.terms()})
            coeff, prim = rest.primitive()
            body = prim.as_expr() * sympy.Mul(*[g**e for g, e in zip(p.ring.symbols, monom)])
            out = (to_sympy(coeff), body)
        out = (out[0], self.alg.atomizer.restore(out[1]))
        self._polys[key] = out
        return out

    def _root(self, r: RootValue) -> sympy.Expr:
        self.tick()
        f = self._factor
        root = (-f(r.b1) + r.sign * sympy.sqrt(f(r.disc))) / (2 * f(r.b2))
        e = f(r.base) + f(r.slope) * root
        return self.alg.atomizer.restore(e)


def unit_text(units: UnitSystem, exponents: tuple[int, int, int], angle: bool) -> str:
    """The case unit of a parameter: ``kN/m``, ``kN*m**2``, ``1/K``; ``rad`` for an angle,
    ``""`` for a pure number."""
    if exponents == (0, 0, 0):
        return "rad" if angle else ""
    f, l, t = exponents
    num, den = [], []
    for name, p in ((units.force, f), (units.length, l), ("K", t)):
        if p:
            term = name if abs(p) == 1 else f"{name}**{abs(p)}"
            (num if p > 0 else den).append(term)
    top = "*".join(num) or "1"
    if not den:
        return top
    bottom = den[0] if len(den) == 1 else "(" + "*".join(den) + ")"
    return f"{top}/{bottom}"
