"""Complementary energy of the members and springs, term by term.

For basic forces s (see :mod:`leastwork.topology`) the complementary energy is
``U = 1/2 s.F.s + s.e + (terms without s)``, with

* F, the block-diagonal flexibility of the unassembled members and springs:
  bar or beam axial force ``L/EA``; beam end moments ``L/(3EI)`` on the diagonal and
  ``L/(6EI)`` off it (from integrating the linear moment diagram against itself), plus
  ``1/(L GAs)`` times [[1, -1], [-1, 1]] for shear energy when asked; a spring ``1/k``;
* e, the *initial deformations* conjugate to each basic force: the span-load fields of the
  simply supported member (``int n0/EA``, ``int (1-x/L) m0/EI``, ``int (x/L) m0/EI``),
  free thermal strain ``alpha dT L`` and curvature ``alpha dTgrad/h`` (giving ``kappa L/2`` at
  each end moment), and misfit ``e`` on the axial force.

Castigliano's second theorem (Menabrea's least-work theorem) on these terms gives the
compatibility equations; see :mod:`leastwork.solve`.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from .fields import ParticularFields, gauss_integral
from .model import Misfit, Structure, TemperatureLoad
from .topology import Topology

__all__ = [
    "FlexibilityTerm",
    "DeformationTerm",
    "flexibility_terms",
    "flexibility_blocks",
    "initial_deformation_terms",
    "initial_deformations",
    "thermal_strains",
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


def flexibility_terms(st: Structure, topo: Topology) -> list[FlexibilityTerm]:
    """The energy terms of every member and spring, in member order then springs."""
    out: list[FlexibilityTerm] = []
    ci = topo.column_index
    for m in st.members.values():
        L = st.length(m.id)
        axial = ci[m.id] if m.kind == "bar" else ci[f"{m.id}.n"]
        if m.EA is not None:
            out.append(FlexibilityTerm(m.id, "axial", (axial,), np.array([[L / m.EA]])))
        if not m.is_beam:
            continue
        ends = [(k, ci.get(f"{m.id}.{k}.m")) for k in ("start", "end")]
        keep = [i for i, (_, j) in enumerate(ends) if j is not None]
        if not keep:
            continue
        cols = tuple(ends[i][1] for i in keep)
        bend = np.array([[L / (3 * m.EI), L / (6 * m.EI)], [L / (6 * m.EI), L / (3 * m.EI)]])
        out.append(FlexibilityTerm(m.id, "bending", cols, bend[np.ix_(keep, keep)]))
        if st.shear and m.GAs:
            shear = np.array([[1.0, -1.0], [-1.0, 1.0]]) / (L * m.GAs)
            out.append(FlexibilityTerm(m.id, "shear", cols, shear[np.ix_(keep, keep)]))
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


def thermal_strains(st: Structure, loads) -> dict[str, tuple[float, float, float]]:
    """Per member: (free axial strain alpha*dT, free curvature alpha*dTgrad/h, misfit e).

    The curvature is positive in the sense of a sagging moment (local -y face longer).
    """
    out: dict[str, list[float]] = {}
    for load in loads:
        if isinstance(load, TemperatureLoad):
            m = st.members[load.member]
            acc = out.setdefault(m.id, [0.0, 0.0, 0.0])
            acc[0] += (m.alpha or 0.0) * load.uniform
            if load.gradient:
                acc[1] += (m.alpha or 0.0) * load.gradient / m.depth
        elif isinstance(load, Misfit):
            acc = out.setdefault(load.member, [0.0, 0.0, 0.0])
            acc[2] += load.elongation
    return {k: (v[0], v[1], v[2]) for k, v in out.items()}


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
    ci = topo.column_index

    def add(owner: str, effect: str, col: int | None, value: float) -> None:
        if col is not None and value != 0.0:
            out.append(DeformationTerm(owner, effect, col, float(value)))

    for m in st.members.values():
        L = st.length(m.id)
        axial = ci[m.id] if m.kind == "bar" else ci[f"{m.id}.n"]
        i_s, i_e = ci.get(f"{m.id}.start.m"), ci.get(f"{m.id}.end.m")
        pf = particulars.get(m.id)
        if pf is not None:
            br = pf.m.breaks
            if m.EA is not None:
                add(m.id, "span loads (axial)", axial, gauss_integral(br, pf.n) / m.EA)
            if m.is_beam:
                add(m.id, "span loads (bending)", i_s, gauss_integral(
                    br, lambda x, L=L, pf=pf: (1 - x / L) * pf.m(x)) / m.EI)
                add(m.id, "span loads (bending)", i_e, gauss_integral(
                    br, lambda x, L=L, pf=pf: (x / L) * pf.m(x)) / m.EI)
            if st.shear and m.GAs:
                vint = gauss_integral(br, pf.v) / (L * m.GAs)
                add(m.id, "span loads (shear)", i_s, -vint)
                add(m.id, "span loads (shear)", i_e, vint)
        if m.id in imposed:
            eps, kappa, misfit = imposed[m.id]
            add(m.id, "temperature (uniform)", axial, eps * L)
            add(m.id, "misfit", axial, misfit)
            add(m.id, "temperature (gradient)", i_s, kappa * L / 2)
            add(m.id, "temperature (gradient)", i_e, kappa * L / 2)
    return out


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
