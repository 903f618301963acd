"""Complementary energy of the members and springs, term by term.

For basic forces s (see :mod:`leastwork.topology`) the complementary energy is
``U = 1/2 s.F.s + s.e + (terms without s)``, with

* F, the block-diagonal flexibility of the unassembled members and springs: each member's
  blocks as its kind gives them (:meth:`leastwork.elements.MemberKind.flexibility`; for a
  bar or beam ``L/EA``, ``L/(3EI)`` and ``L/(6EI)``, ``1/(L GAs)`` [[1, -1], [-1, 1]] for
  shear when asked); a spring ``1/k``;
* e, the *initial deformations* conjugate to each basic force, from the member's kind
  (:meth:`leastwork.elements.MemberKind.initial_deformations`): the span-load fields of its
  determinate analogue integrated against its unit fields, free thermal strain and
  curvature, and misfit.

Castigliano's second theorem (Menabrea's least-work theorem) on these terms gives the
compatibility equations; see :mod:`leastwork.solve`.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from .elements import kind_of
from .elements.base import integrate
from .fields import ParticularFields, gauss_integral
from .model import Structure
from .topology import Topology

__all__ = [
    "FlexibilityTerm",
    "DeformationTerm",
    "flexibility_terms",
    "flexibility_blocks",
    "initial_deformation_terms",
    "initial_deformations",
]


@dataclass(frozen=True)
class FlexibilityTerm:
    """One energy term of F: ``block`` (SI) couples the basic forces of ``columns``.

    ``owner`` is a member id or a restraint name; ``term`` is "axial", "bending", "shear" or
    "spring".
    """

    owner: str
    term: str
    columns: tuple[int, ...]
    block: np.ndarray


def member_columns(topo: Topology) -> dict[str, list[int]]:
    """Column indices of each member's basic forces, in its kind's order (the order
    topology assembled them in)."""
    out: dict[str, list[int]] = {}
    for j, c in enumerate(topo.columns):
        if c.kind != "reaction":
            out.setdefault(c.owner, []).append(j)
    return out


def flexibility_terms(st: Structure, topo: Topology) -> list[FlexibilityTerm]:
    """The energy terms of every member (as its kind gives them) and spring, in member
    order then springs."""
    out: list[FlexibilityTerm] = []
    columns = member_columns(topo)
    for m in st.members.values():
        cols = columns[m.id]
        for t in kind_of(m).flexibility(m, m, st.length(m.id), st.shear, 1.0):
            out.append(FlexibilityTerm(m.id, t.term, tuple([cols[i] for i in t.forces]),
                                       np.array(t.block)))
    for j, c in enumerate(topo.columns):
        if c.kind == "reaction":
            r = topo.restraints[c.restraint_index]
            if r.is_spring:
                out.append(FlexibilityTerm(c.name, "spring", (j,),
                                           np.array([[1.0 / r.stiffness]])))
    return out


def flexibility_blocks(st: Structure, topo: Topology) -> np.ndarray:
    """Flexibility F of all columns (ncol x ncol), SI units; rigid reactions have zero."""
    n = len(topo.columns)
    F = np.zeros((n, n))
    for t in flexibility_terms(st, topo):
        F[np.ix_(t.columns, t.columns)] += t.block
    return F


@dataclass(frozen=True)
class DeformationTerm:
    """One initial deformation conjugate to basic force ``column`` (m or rad, SI).

    ``effect`` is one of "span loads (axial)", "span loads (bending)", "span loads
    (shear)", "temperature (uniform)", "temperature (gradient)", "misfit".
    """

    owner: str
    effect: str
    column: int
    value: float


def initial_deformation_terms(
    st: Structure,
    topo: Topology,
    particulars: dict[str, ParticularFields],
    imposed: dict[str, tuple[float, float, float]],
) -> list[DeformationTerm]:
    """The initial deformations of one load case, member by member and effect by effect."""
    out: list[DeformationTerm] = []
    columns = member_columns(topo)
    for m in st.members.values():
        pf, strains = particulars.get(m.id), imposed.get(m.id)
        if pf is None and strains is None:
            continue
        cols = columns[m.id]
        L = st.length(m.id)
        integral = None if pf is None else _span_integral(pf, L)
        for effect, i, value in kind_of(m).initial_deformations(
                m, m, L, st.shear, integral, strains, 1.0):
            if value != 0.0:
                out.append(DeformationTerm(m.id, effect, cols[i], float(value)))
    return out


def _span_integral(pf: ParticularFields, L: float):
    """``integral(f, weight)``: int_0^L weight(x) f0(x) dx of the span-load field ``f``
    ("n", "v", "m"), ``weight`` a polynomial in x/L (evaluated as written, so that 1 - x/L
    and x/L round as they always did) or a function of x; Gauss–Legendre on each piece,
    exact for the polynomial fields of span loads."""
    br = pf.m.breaks

    def integral(f: str, weight) -> float:
        field = getattr(pf, f)
        if callable(weight):
            return sum(integrate(lambda x: weight(x) * float(field(x)), float(a), float(b))
                       for a, b in zip(br[:-1], br[1:], strict=True) if b > a)
        if len(weight) == 1 and weight[0] == 1.0:
            return gauss_integral(br, field)

        def w(x):
            acc = weight[-1]
            for c in reversed(weight[:-1]):
                acc = c + acc * x / L
            return acc

        return gauss_integral(br, lambda x: w(x) * field(x))

    return integral


def initial_deformations(
    st: Structure,
    topo: Topology,
    particulars: dict[str, ParticularFields],
    imposed: dict[str, tuple[float, float, float]],
) -> np.ndarray:
    """Initial deformations e (ncol,) of one load case: m or rad per basic force."""
    e = np.zeros(len(topo.columns))
    for t in initial_deformation_terms(st, topo, particulars, imposed):
        e[t.column] += t.value
    return e
