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

Every function takes an optional number type (:mod:`leastwork.arithmetic`; default SI
floats), so that the exact pipeline of :mod:`leastwork.symbolic` sums the same terms.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from .arithmetic import FloatNumbers, Numbers
from .elements import kind_of
from .fields import ParticularFields
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
    """One energy term of F: ``block`` (SI floats: an array; exact: nested lists) couples
    the basic forces of ``columns``.

    ``owner`` is a member id or a restraint name; ``term`` is "axial", "bending", "shear" or
    "spring".
    """

    owner: str
    term: str
    columns: tuple[int, ...]
    block: np.ndarray | list


def member_columns(topo: Topology) -> dict[str, list[int]]:
    """Column indices of each member's basic forces, in its kind's order (the order
    topology assembled them in)."""
    out: dict[str, list[int]] = {}
    for j, c in enumerate(topo.columns):
        if c.kind != "reaction":
            out.setdefault(c.owner, []).append(j)
    return out


def flexibility_terms(st: Structure, topo: Topology,
                      nums: Numbers | None = None) -> list[FlexibilityTerm]:
    """The energy terms of every member (as its kind gives them) and spring, in member
    order then springs, in the number type of ``nums`` (default SI floats)."""
    nums = nums or FloatNumbers(st)
    out: list[FlexibilityTerm] = []
    columns = member_columns(topo)
    for m in st.members.values():
        cols = columns[m.id]
        for t in kind_of(m).flexibility(m, nums.section(m.id), nums.length(m.id), st.shear,
                                        nums.one):
            out.append(FlexibilityTerm(m.id, t.term, tuple([cols[i] for i in t.forces]),
                                       nums.block(t.block)))
    for j, c in enumerate(topo.columns):
        if c.kind == "reaction":
            r = topo.restraints[c.restraint_index]
            if r.is_spring:
                out.append(FlexibilityTerm(c.name, "spring", (j,),
                                           nums.block([[nums.spring_flexibility(r)]])))
    return out


def flexibility_blocks(st: Structure, topo: Topology, nums: Numbers | None = None):
    """Flexibility F of all columns (ncol x ncol; SI floats: a dense array); rigid
    reactions have zero."""
    nums = nums or FloatNumbers(st)
    F = nums.matrix(len(topo.columns))
    for t in flexibility_terms(st, topo, nums):
        nums.add_block(F, t.columns, t.block)
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
    value: float  #: or an exact element


def initial_deformation_terms(
    st: Structure,
    topo: Topology,
    particulars: dict[str, ParticularFields],
    imposed: dict[str, tuple[float, float, float]],
    nums: Numbers | None = None,
) -> list[DeformationTerm]:
    """The initial deformations of one load case, member by member and effect by effect,
    in the number type of ``nums`` (default SI floats)."""
    nums = nums or FloatNumbers(st)
    out: list[DeformationTerm] = []
    columns = member_columns(topo)
    for m in st.members.values():
        pf, strains = particulars.get(m.id), imposed.get(m.id)
        if pf is None and strains is None:
            continue
        cols = columns[m.id]
        L = nums.length(m.id)
        integral = None if pf is None else nums.span_integral(pf, L)
        for effect, i, value in kind_of(m).initial_deformations(
                m, nums.section(m.id), L, st.shear, integral, strains, nums.one):
            if value:
                out.append(DeformationTerm(m.id, effect, cols[i], nums.scalar(value)))
    return out


def initial_deformations(
    st: Structure,
    topo: Topology,
    particulars: dict[str, ParticularFields],
    imposed: dict[str, tuple[float, float, float]],
    nums: Numbers | None = None,
):
    """Initial deformations e (ncol,) of one load case: m or rad per basic force."""
    nums = nums or FloatNumbers(st)
    e = nums.vector(len(topo.columns))
    for t in initial_deformation_terms(st, topo, particulars, imposed, nums):
        e[t.column] += t.value
    return e
