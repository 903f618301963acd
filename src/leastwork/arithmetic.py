"""The number type the force method runs on: SI floats (:class:`FloatNumbers`), or the
exact field of :mod:`leastwork.symbolic` (its :class:`Numbers` is
``leastwork.symbolic.pipeline.ExactNumbers``).

Topology (equilibrium entries), statics (a load case's loading), energy (F and e), the
compatibility step of :mod:`leastwork.superposition`, member fields, reactions and
unit-load displacements are written once, with ``+ - * /`` on the numbers they are given,
and ask a :class:`Numbers` for everything that depends on the number type: its constants,
the geometry and sections in that type, containers, and the two integrals that are done
by quadrature in floats and exactly over the field.
"""

from __future__ import annotations

from typing import Any, Protocol

import numpy as np

from .arrays import union
from .elements import kind_of
from .elements.base import integrate
from .fields import ParticularFields, gauss_integral
from .loadkinds import load_kind
from .model import Structure

__all__ = ["Numbers", "FloatNumbers"]


class Numbers(Protocol):
    """What the generic core asks of a number type (lengths in m and forces in N for
    floats; the case units for exact numbers)."""

    one: Any
    zero: Any

    def length(self, mid: str) -> Any:
        """Length of member ``mid``."""

    def direction(self, mid: str) -> tuple[Any, Any]:
        """Cosine and sine of member ``mid``'s axis."""

    def section(self, mid: str) -> Any:
        """Section values of member ``mid`` (``EA``, ``EI``, ``GAs``, ``alpha``,
        ``depth`` attributes; None where absent)."""

    def restraint_vector(self, r) -> tuple[Any, Any, Any]:
        """Unit direction (x, y, rz) along which restraint ``r`` acts on its node."""

    def spring_flexibility(self, r) -> Any:
        """1/k of a spring restraint."""

    def vector(self, n: int) -> Any:
        """A zero vector of length n (supports ``+``, ``-``, indexing and ``@``)."""

    def matrix(self, n: int) -> Any:
        """A zero n x n matrix for F (``add_block`` adds to it; supports ``@``)."""

    def add_block(self, F, columns: tuple[int, ...], block) -> None:
        """F[columns, columns] += block."""

    def block(self, rows: list) -> Any:
        """An energy block (nested lists) as this type keeps it."""

    def scalar(self, v) -> Any:
        """A computed value as reported (a float, or the exact element itself)."""

    def load_values(self, index: int, ld) -> dict:
        """The values of ``Structure.loads[index]`` (its kind's keys)."""

    def end_of(self, at, L) -> str | None:
        """"start", "end" or None for a position along a member of length L."""

    def particular(self, m, points: list, dists: list) -> ParticularFields:
        """Span-load fields of member ``m`` (:meth:`leastwork.elements.MemberKind.
        particular`)."""

    def span_integral(self, pf: ParticularFields, L):
        """``integral(f, weight)`` of :meth:`leastwork.elements.MemberKind.
        initial_deformations` for the span-load fields ``pf``."""

    def span_work(self, value, unit: ParticularFields, real, section: dict,
                  free: dict) -> Any:
        """``value`` plus the virtual work of a unit load's span fields ``unit`` on the
        strains of the real fields ``real`` (over ``section``, plus the ``free`` strains),
        along a member."""

    def pair(self, a: str, b: str) -> tuple[Any, Any, Any]:
        """dx, dy from node a to node b, and their distance."""

    def member_position(self, target) -> Any:
        """The position along its member of a ``MEMBER@DISTANCE`` displacement target."""


def _varying_work(brk, unit: ParticularFields, real, section: dict, free: dict) -> float:
    """The in-span virtual work of :meth:`FloatNumbers.span_work` when a stiffness or a free
    strain varies along the member (a tapered beam): adaptive Gauss–Kronrod on each piece
    (:func:`leastwork.elements.integrate`, error bound ``QUAD_RTOL``)."""

    def at(v, x):
        return v(x) if callable(v) else v

    total = 0.0
    for f in ("n", "m", "v"):
        K, extra = section.get(f), free.get(f, []) if f != "v" else []
        if K is None and not any(callable(e) or e for e in extra):
            continue
        u, r = getattr(unit, f), getattr(real, f)

        def integrand(x, u=u, r=r, K=K, extra=extra):
            acc = float(r(x)) / at(K, x) if K is not None else 0.0
            for e in extra:
                acc += at(e, x)
            return float(u(x)) * acc

        total += sum(integrate(integrand, float(a), float(b))
                     for a, b in zip(brk[:-1], brk[1:], strict=True) if b > a)
    return total


class FloatNumbers:
    """SI floats: the geometry and sections of the :class:`Structure` itself."""

    one = 1.0
    zero = 0.0
    vector = staticmethod(np.zeros)

    def __init__(self, st: Structure):
        self.st = st
        # the structure's own accessors, bound once (no extra call per member)
        self.length = st.length
        self.direction = st.direction
        self.section = st.members.__getitem__

    @staticmethod
    def restraint_vector(r) -> tuple[float, float, float]:
        return r.vector

    @staticmethod
    def spring_flexibility(r) -> float:
        return 1.0 / r.stiffness

    @staticmethod
    def matrix(n: int) -> np.ndarray:
        return np.zeros((n, n))

    @staticmethod
    def add_block(F: np.ndarray, columns, block) -> None:
        F[np.ix_(columns, columns)] += block

    block = staticmethod(np.array)
    scalar = staticmethod(float)

    @staticmethod
    def load_values(index: int, ld) -> dict:
        return load_kind(ld).values(ld)

    @staticmethod
    def end_of(at: float, length: float) -> str | None:
        """A position within round-off of a member's end is at it."""
        tol = 1e-12 * max(length, 1.0)
        return "start" if at <= tol else "end" if at >= length - tol else None

    def particular(self, m, points: list, dists: list) -> ParticularFields:
        st = self.st
        return kind_of(m).particular(m, st.length(m.id), st.direction(m.id), points, dists)

    @staticmethod
    def span_integral(pf: ParticularFields, L: float):
        """``integral(f, weight)``: int_0^L weight(x) f0(x) dx of the span-load field
        ``f`` ("n", "v", "m"), ``weight`` a polynomial in x/L (evaluated as written, so
        that 1 - x/L and x/L round as they always did) or a function of x; Gauss–Legendre
        on each piece, exact for the polynomial fields of span loads."""
        br = pf.m.breaks

        def integral(f: str, weight) -> float:
            field = getattr(pf, f)
            if callable(weight):
                return sum(integrate(lambda x: weight(x) * float(field(x)), float(a),
                                     float(b))
                           for a, b in zip(br[:-1], br[1:], strict=True) if b > a)
            if len(weight) == 1 and weight[0] == 1.0:
                return gauss_integral(br, field)

            def w(x):
                acc = weight[-1]
                for c in reversed(weight[:-1]):
                    acc = c + acc * x / L
                return acc

            return gauss_integral(br, lambda x: w(x) * field(x))

        integral.fields = pf  # type: ignore[attr-defined]  # for kinds that integrate themselves
        return integral

    @staticmethod
    def span_work(value: float, unit: ParticularFields, real, section: dict,
                  free: dict) -> float:
        """Gauss–Legendre on the union of both fields' breaks (exact for their
        polynomials), added to ``value`` field by field."""
        brk = union(unit.m.breaks, real.m.breaks)
        if any(callable(v) for v in section.values()) or any(
                callable(e) for e in free.get("m", []) + free.get("n", [])):
            return value + _varying_work(brk, unit, real, section, free)
        for f in ("n", "m", "v"):
            K, extra = section.get(f), free.get(f, [])
            if K is None and not any(extra):
                continue
            u, r = getattr(unit, f), getattr(real, f)
            if f == "v":
                value += gauss_integral(brk, lambda x, u=u, r=r, K=K: u(x) * r(x) / K)
                continue

            def strain(x, r=r, K=K, extra=extra):
                acc = r(x) / K if K is not None else 0.0
                for e in extra:
                    acc = acc + e
                return acc

            value += gauss_integral(brk, lambda x, u=u, strain=strain: u(x) * strain(x))
        return value

    def pair(self, a: str, b: str) -> tuple[float, float, float]:
        na, nb = self.st.nodes[a], self.st.nodes[b]
        dx, dy = nb.x - na.x, nb.y - na.y
        return dx, dy, float(np.hypot(dx, dy))

    @staticmethod
    def member_position(target) -> float:
        return target.at
