"""Exact arithmetic for the symbolic force method.

Every quantity of the pipeline is an element of one rational-function field
K = QQ(parameters, auxiliaries): the parameter symbols, plus one *auxiliary* symbol for
each irrational part of the input (a member length sqrt(h**2 + b**2), the sine of a roller
angle, pi). Arithmetic in K is exact and always fully cancelled, and far faster than
general sympy expressions; the auxiliaries are put back (and the results simplified) only
at the end. A result that is an identity of rational functions with independent
auxiliaries stays true when they take their values.

Every element can also be evaluated at the parameter values (60 significant digits) to
make the decisions that depend on them: the order of positions along a member, which
root of dm/dx is a moment extreme.
"""

from __future__ import annotations

from collections.abc import Callable, Iterable, Sequence
from dataclasses import dataclass
from typing import Any

import mpmath
import numpy as np
import sympy
from sympy import QQ
from sympy.polys.fields import field as frac_field

from ..polynomials import Poly

__all__ = [
    "Atomizer",
    "Algebra",
    "Piecewise",
    "cramer",
    "factors",
    "Lin",
    "Closure",
    "SparseMatrix",
    "objects",
]

_DPS = 60


class Atomizer:
    """Replace the irrational parts of expressions (non-integer powers, functions such as
    sin, and constants such as pi) by auxiliary symbols, remembering what they stand for."""

    def __init__(self, values: dict[sympy.Symbol, sympy.Expr]):
        self._values = values  # exact parameter values
        self._aux: dict[sympy.Expr, sympy.Symbol] = {}
        #: (auxiliary symbol, what it stands for), in order of creation
        self.definitions: list[tuple[sympy.Symbol, sympy.Expr]] = []
        self.numeric: dict[sympy.Symbol, mpmath.mpf] = {}

    def __call__(self, expr) -> sympy.Expr:
        expr = sympy.sympify(expr)
        parts: set[sympy.Expr] = set()
        parts |= {f for f in expr.atoms(sympy.Function)}
        parts |= {p for p in expr.atoms(sympy.Pow) if not p.exp.is_Integer}
        parts |= set(expr.atoms(sympy.NumberSymbol))
        if not parts:
            return expr
        return expr.xreplace({p: self._symbol(p) for p in parts})

    def _symbol(self, part: sympy.Expr) -> sympy.Symbol:
        if part in self._aux:
            return self._aux[part]
        value = self.value_of(part)
        if value > 0:
            sym = sympy.Dummy(f"aux{len(self.definitions)}", positive=True)
        elif value < 0:
            sym = sympy.Dummy(f"aux{len(self.definitions)}", negative=True)
        else:
            sym = sympy.Dummy(f"aux{len(self.definitions)}", real=True)
        self._aux[part] = sym
        self.definitions.append((sym, part))
        self.numeric[sym] = value
        return sym

    def value_of(self, expr: sympy.Expr) -> mpmath.mpf:
        """Numeric value (60 digits) of an expression in parameters and auxiliaries."""
        e = sympy.sympify(expr).xreplace(self._values)
        e = e.xreplace({s: sympy.Float(v, _DPS) for s, v in self.numeric.items()})
        v = sympy.N(e, _DPS)
        if not v.is_real:
            raise ValueError(f"{expr} is not real at the parameter values")
        with mpmath.workdps(_DPS):
            return mpmath.mpf(str(v))

    def restore(self, expr: sympy.Expr) -> sympy.Expr:
        """Put back what the auxiliaries stand for (newest first: a definition may use an
        older auxiliary)."""
        for sym, part in reversed(self.definitions):
            if expr.has(sym):
                expr = expr.xreplace({sym: part})
        return expr


class Algebra:
    """The field K of the pipeline, with exact conversion and numeric evaluation.

    Parameters
    ----------
    parameters : sequence of Symbol
    values : dict
        Exact value of each parameter.
    atomizer : Atomizer
        Its auxiliaries become further generators of K.
    """

    def __init__(self, parameters: Sequence[sympy.Symbol], values: dict, atomizer: Atomizer):
        self.atomizer = atomizer
        aux = [s for s, _ in atomizer.definitions]
        self.gens = [*parameters, *aux]
        self.K = frac_field(self.gens, QQ)[0]
        self.zero = self.K.zero
        self.one = self.K.one
        with mpmath.workdps(_DPS):
            nums = []
            for g in parameters:
                nums.append(mpmath.mpf(str(sympy.N(values[g], _DPS))))
            nums += [atomizer.numeric[s] for s in aux]
        self._vals = nums

    def el(self, expr) -> object:
        """An expression (rational in the generators) as an element of K."""
        expr = self.atomizer(sympy.sympify(expr))
        return self.K.from_expr(expr) if expr != 0 else self.K.zero

    def num(self, el) -> mpmath.mpf:
        """Value at the parameter values (60 digits)."""
        with mpmath.workdps(_DPS):
            return self._poly(el.numer) / self._poly(el.denom)

    def _poly(self, p) -> mpmath.mpf:
        total = mpmath.mpf(0)
        vals = self._vals
        for monom, coeff in p.terms():
            t = mpmath.mpf(int(coeff.numerator)) / int(coeff.denominator)
            for v, e in zip(vals, monom):
                if e:
                    t *= v**e
            total += t
        return total

    def order(self, positions: Iterable, first=None, last=None) -> list:
        """Distinct positions (elements of K) sorted by their values; ``first`` and
        ``last`` (when given) sort before/after any position of equal value."""
        distinct: list = []
        for p in positions:
            if not any(p == q for q in distinct):
                distinct.append(p)

        lo = self.num(first) if first is not None else None
        hi = self.num(last) if last is not None else None

        def key(item):
            i, p = item
            rank = -1 if (first is not None and p == first) else (
                1 if (last is not None and p == last) else 0)
            v = self.num(p)
            v = max(v, lo) if lo is not None else v  # within round-off of an end: at it
            v = min(v, hi) if hi is not None else v
            return (v, rank, i)

        return [p for _, p in sorted(enumerate(distinct), key=key)]


# --------------------------------------------------------------------- polynomials
@dataclass
class Piecewise:
    """A piecewise polynomial in the position x (absolute, from the member's start):
    ``breaks`` are k+1 increasing positions (elements of K), ``pieces`` the k polynomials."""

    breaks: list
    pieces: list

    def map(self, fn: Callable[[Poly], Poly]) -> Piecewise:
        return Piecewise(list(self.breaks), [fn(p) for p in self.pieces])


def merged(alg: Algebra, f: Piecewise, g: Piecewise):
    """Pieces of the common refinement of two piecewise polynomials on the same member:
    yields (x0, x1, piece of f, piece of g)."""
    last = f.breaks[-1]
    brk = alg.order([*f.breaks, *g.breaks], first=f.breaks[0], last=last)
    i = j = 0
    for x0, x1 in zip(brk[:-1], brk[1:]):
        while i < len(f.pieces) - 1 and _at_or_after(alg, x0, f.breaks[i + 1], brk):
            i += 1
        while j < len(g.pieces) - 1 and _at_or_after(alg, x0, g.breaks[j + 1], brk):
            j += 1
        yield x0, x1, f.pieces[i], g.pieces[j]


def _at_or_after(alg: Algebra, x, b, order: list) -> bool:
    """Is position x at or after break b in the merged order?"""
    ix = next(k for k, p in enumerate(order) if p == x)
    ib = next(k for k, p in enumerate(order) if p == b)
    return ix >= ib


# --------------------------------------------------------------------- linear algebra
def cramer(alg: Algebra, M: list[list], rhs: list):
    """Solve M x = rhs for a small dense matrix over K fraction-free, with no polynomial
    gcd at all (sympy's ``DomainMatrix.solve_den`` over K's polynomial ring).

    M is brought to polynomials by its common denominator D, rhs by D * Dr. Returns
    (numerators, det, Dr), polynomials with x_i = numerators[i] / (det * Dr); det depends
    on M alone. Raises ZeroDivisionError if M is singular."""
    from functools import reduce

    from sympy.polys.matrices import DomainMatrix
    from sympy.polys.matrices.exceptions import DMNonInvertibleMatrixError

    n = len(M)
    ring = alg.K.ring
    if n == 0:
        return [], ring.one, ring.one
    D = reduce(lambda a, b: a.lcm(b), [e.denom for row in M for e in row if e], ring.one)
    Dr = reduce(lambda a, b: a.lcm(b), [e.denom for e in rhs if e], ring.one)
    P = [[e.numer * D.exquo(e.denom) if e else ring.zero for e in row] for row in M]
    q = [[e.numer * (D * Dr).exquo(e.denom) if e else ring.zero] for e in rhs]
    domain = ring.to_domain()
    try:
        nums, det = DomainMatrix(P, (n, n), domain).solve_den(DomainMatrix(q, (n, 1), domain))
    except DMNonInvertibleMatrixError:
        raise ZeroDivisionError("singular matrix") from None
    return [nums[i, 0].element for i in range(n)], det, Dr


class Lin:
    """A value after the compatibility solve, kept linear in the redundants:
    c[0] + sum c[i] X_i with c[i] in K, so that superposition never adds fractions whose
    denominator is the (large) determinant of the flexibility matrix. :class:`Closure`
    turns it into one element of K at the end."""

    __slots__ = ("c",)

    def __init__(self, c):
        self.c = tuple(c)

    def __bool__(self) -> bool:
        return any(bool(x) for x in self.c)

    def _coeffs(self, other):
        if isinstance(other, Lin):
            return other.c
        return (other,) + tuple(x - x for x in self.c[1:])

    def __add__(self, other):
        if not isinstance(other, Lin) and not other:
            return self
        return Lin(a + b for a, b in zip(self.c, self._coeffs(other)))

    __radd__ = __add__

    def __sub__(self, other):
        if not isinstance(other, Lin) and not other:
            return self
        return Lin(a - b for a, b in zip(self.c, self._coeffs(other)))

    def __rsub__(self, other):
        return Lin(b - a for a, b in zip(self.c, self._coeffs(other)))

    def __neg__(self):
        return Lin(-a for a in self.c)

    def __mul__(self, other):
        if isinstance(other, Lin):
            raise TypeError("a product of two values linear in the redundants")
        if isinstance(other, int) and other == 1:
            return self
        # a unit coefficient (a unit redundant) takes ``other`` as it is: no cancelling
        return Lin(other if a == 1 else a * other for a in self.c)

    __rmul__ = __mul__

    def __truediv__(self, other):
        if isinstance(other, Lin):
            raise TypeError("a quotient of two values linear in the redundants")
        return Lin(a / other for a in self.c)


def factors(p) -> list:
    """Irreducible factors of a polynomial of K's ring, repeated by multiplicity."""
    if p.is_ground:
        return []
    return [f for f, m in p.factor_list()[1] for _ in range(m)]


class Closure:
    """Closes :class:`Lin` values into elements of K once the redundants are known as
    X_i = nums[i] / det. The one fraction of each value is cancelled by trial division by
    the irreducible factors of its denominator (``det_factors``: det is factored once),
    which is far cheaper than a polynomial gcd with large coefficients."""

    def __init__(self, alg: Algebra, nums: list, det, det_factors: list):
        self.alg = alg
        self.nums = list(nums)
        self.det = det
        #: irreducible factors of det, repeated by multiplicity
        self.det_factors = list(det_factors)
        self._closed: dict[tuple, Any] = {}
        with mpmath.workdps(_DPS):
            d = alg._poly(det)
            self._x = [alg._poly(p) / d for p in self.nums]
        self._q_factors: dict[Any, list] = {}

    def num(self, v) -> mpmath.mpf:
        if not isinstance(v, Lin):
            return self.alg.num(v)
        with mpmath.workdps(_DPS):
            out = self.alg.num(v.c[0]) if v.c[0] else mpmath.mpf(0)
            for c, x in zip(v.c[1:], self._x):
                if c:
                    out += self.alg.num(c) * x
            return out

    def close(self, v):
        """The value as an element of K (fully cancelled)."""
        if not isinstance(v, Lin):
            return v
        c = v.c
        if not any(c[1:]):
            return c[0]
        if c not in self._closed:
            self._closed[c] = self._close(c)
        return self._closed[c]

    def _close(self, c: tuple):
        """c[0] + sum c[i] X_i as one fraction N / (Q det) over the common denominator Q of
        the coefficients, cancelled by trial division by the factors of Q and det."""
        K = self.alg.K
        Q = K.ring.one
        for x in c:
            if x and x.denom != Q:
                Q = Q.lcm(x.denom)
        N = K.ring.zero
        for i, x in enumerate(c):
            if x:
                N += x.numer * Q.exquo(x.denom) * (self.nums[i - 1] if i else self.det)
        if not N:
            return K.zero
        den = Q * self.det
        for f in [*self.det_factors, *self._factors(Q)]:
            if not _may_divide(f, N):
                continue
            try:
                N2 = N.exquo(f)
            except Exception:  # ExactQuotientFailed: f does not divide N
                continue
            N, den = N2, den.exquo(f)
        return _canonical(K, N, den)

    def _factors(self, Q) -> list:
        if Q.is_ground:
            return []
        key = tuple(sorted(Q.terms()))
        if key not in self._q_factors:
            self._q_factors[key] = factors(Q)
        return self._q_factors[key]


def _may_divide(f, N) -> bool:
    """False when the polynomial f surely does not divide N (a cheap test before an
    exact division): a monomial is checked exactly; otherwise N and f are reduced to
    polynomials in one variable by fixed integer values of the others, and a nonzero
    remainder there rules division out."""
    monoms = f.monoms()
    if len(monoms) == 1:
        return all(all(a >= b for a, b in zip(mono, monoms[0])) for mono in N.monoms())
    ring = f.ring
    degs = [max(m[i] for m in monoms) for i in range(ring.ngens)]
    v = max(range(ring.ngens), key=lambda i: degs[i])
    others = [(ring.gens[i], 3 + 2 * i) for i in range(ring.ngens) if i != v]
    if not others:
        return True
    fu = f.evaluate(others)
    if fu.degree() != degs[v]:  # the leading coefficient vanished there: no conclusion
        return True
    return not N.evaluate(others).rem(fu)


def _canonical(K, N, den):
    """The element N/den of K with N, den coprime, in sympy's canonical form (integer
    coefficients without common content, denominator with a positive leading
    coefficient), as ``PolyElement.cancel`` leaves it."""
    from sympy import ZZ

    cq, p = N.clear_denoms()
    cp, q = den.clear_denoms()
    cont = ZZ.gcd(ZZ(int(p.content())), ZZ(int(q.content())))
    if cont != 1:
        p = p.quo_ground(cont)
        q = q.quo_ground(cont)
    _, a, b = ZZ.cofactors(ZZ(int(cp)), ZZ(int(cq)))
    p = p.mul_ground(a)
    q = q.mul_ground(b)
    if q.LC < 0:
        p, q = -p, -q
    return K.raw_new(p, q)


def objects(shape, fill) -> np.ndarray:
    """An object array of ``shape`` holding ``fill`` (an element of K) everywhere: the
    vectors and matrices of the generic core in exact numbers."""
    out = np.empty(shape, dtype=object)
    out.fill(fill)
    return out


class SparseMatrix:
    """A square matrix over K kept by its nonzero entries (the flexibility F), with
    ``F @ v`` for a vector or a matrix (object arrays) that skips zero products."""

    def __init__(self, n: int, zero):
        self.n, self.zero = n, zero
        self.entries: dict[tuple[int, int], Any] = {}

    def add(self, a: int, b: int, v) -> None:
        """F[a, b] += v."""
        self.entries[(a, b)] = self.entries.get((a, b), self.zero) + v

    def __matmul__(self, v: np.ndarray) -> np.ndarray:
        if v.ndim == 2:
            out = objects(v.shape, self.zero)
            for k in range(v.shape[1]):
                out[:, k] = self @ v[:, k]
            return out
        out = objects(self.n, self.zero)
        for (a, b), f in self.entries.items():
            if v[b]:
                out[a] = out[a] + f * v[b]
        return out
