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

import numpy as np

from .fields import ParticularFields, gauss_integral
from .model import Misfit, Structure, TemperatureLoad
from .topology import Topology

__all__ = ["flexibility_blocks", "initial_deformations", "thermal_strains"]


def flexibility_blocks(st: Structure, topo: Topology) -> np.ndarray:
    """Flexibility F of all columns (ncol x ncol), SI units; rigid reactions have zero."""
    n = len(topo.columns)
    F = np.zeros((n, n))
    ci = topo.column_index
    for m in st.members.values():
        L = st.length(m.id)
        axial = ci[m.id] if m.kind == "bar" else ci[f"{m.id}.n"]
        if m.EA is not None:
            F[axial, axial] = L / m.EA
        if not m.is_beam:
            continue
        ends = [ci.get(f"{m.id}.start.m"), ci.get(f"{m.id}.end.m")]
        block = np.array([[L / (3 * m.EI), L / (6 * m.EI)], [L / (6 * m.EI), L / (3 * m.EI)]])
        if st.shear and m.GAs:
            block = block + np.array([[1.0, -1.0], [-1.0, 1.0]]) / (L * m.GAs)
        for a, ia in enumerate(ends):
            for b, ib in enumerate(ends):
                if ia is not None and ib is not None:
                    F[ia, ib] += block[a, b]
    for j, c in enumerate(topo.columns):
        if c.kind == "reaction":
            r = topo.restraints[c.restraint_index]
            if r.is_spring:
                F[j, j] = 1.0 / r.stiffness
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


def initial_deformations(
    st: Structure,
    topo: Topology,
    particulars: dict[str, ParticularFields],
    imposed: dict[str, tuple[float, float, float]],
) -> np.ndarray:
    """Initial deformations e (ncol,) of one load case: m or rad per basic force."""
    e = np.zeros(len(topo.columns))
    ci = topo.column_index
    for m in st.members.values():
        L = st.length(m.id)
        axial = ci[m.id] if m.kind == "bar" else ci[f"{m.id}.n"]
        i_s, i_e = ci.get(f"{m.id}.start.m"), ci.get(f"{m.id}.end.m")
        pf = particulars.get(m.id)
        if pf is not None:
            br = pf.m.breaks
            if m.EA is not None:
                e[axial] += gauss_integral(br, pf.n) / m.EA
            if i_s is not None:
                e[i_s] += gauss_integral(br, lambda x, L=L, pf=pf: (1 - x / L) * pf.m(x)) / m.EI
            if i_e is not None:
                e[i_e] += gauss_integral(br, lambda x, L=L, pf=pf: (x / L) * pf.m(x)) / m.EI
            if st.shear and m.GAs:
                vint = gauss_integral(br, pf.v) / (L * m.GAs)
                if i_s is not None:
                    e[i_s] -= vint
                if i_e is not None:
                    e[i_e] += vint
        if m.id in imposed:
            eps, kappa, misfit = imposed[m.id]
            e[axial] += eps * L + misfit
            if i_s is not None:
                e[i_s] += kappa * L / 2
            if i_e is not None:
                e[i_e] += kappa * L / 2
    return e
