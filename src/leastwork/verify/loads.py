"""The loads of one case for the direct-stiffness solver: nodal loads, settlements, and the
fixed-end forces of span loads and imposed strains on each member.

Span loads and imposed strains enter as fixed-end forces from the reciprocal theorem
(Maxwell-Betti): the force that a clamped member under a load needs at end dof i is minus
the work of the load on the displacement field of a unit displacement of dof i, and minus
the integral of m_i times the free curvature (or n_i times the free strain); loads are
integrated by Gauss-Legendre rules that are exact for these polynomials. A point load at
the very end of a member is a nodal load.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from ..errors import CaseError, MechanismError
from ..model import (
    DistributedLoad,
    Misfit,
    NodalLoad,
    PointLoad,
    Settlement,
    Structure,
    TemperatureLoad,
)
from .elements import Element, unit_fields

__all__ = ["MemberLoading", "member_loading", "CaseLoads", "case_loads"]

_GAUSS_X, _GAUSS_W = np.polynomial.legendre.leggauss(4)  # exact to degree 7


def _gauss(a: float, b: float) -> tuple[np.ndarray, np.ndarray]:
    """Gauss-Legendre points and weights on [a, b]."""
    return 0.5 * (b - a) * _GAUSS_X + 0.5 * (a + b), 0.5 * (b - a) * _GAUSS_W


@dataclass(frozen=True)
class MemberLoading:
    """Fixed-end forces (local, uncondensed) and the free elongation of one member."""

    f0: np.ndarray  #: (6,) forces the nodes apply to a clamped member, local components
    elongation: float  #: free elongation (thermal + misfit), m — a constraint if rigid


def member_loading(st: Structure, el: Element, loads) -> MemberLoading:
    """Fixed-end forces by the reciprocal theorem: f0_i = -(work of the loads on the field
    of unit end displacement i) - int (m_i kappa0 + n_i eps0) dx."""
    f0 = np.zeros(6)
    c, s, L = el.c, el.s, el.L
    eps = 0.0  # free axial strain
    misfit = 0.0
    kappa = 0.0  # free curvature, sense of a positive (sagging) m
    tol = 1e-12 * max(L, 1.0)
    for ld in loads:
        if isinstance(ld, PointLoad):
            if ld.at <= tol or ld.at >= L - tol:
                continue  # handled as a nodal load
            if el.coef is None:
                raise CaseError(f'member "{el.member.id}" is a bar and takes no span loads',
                                source=st.source)
            px, py = ld.fx * c + ld.fy * s, -ld.fx * s + ld.fy * c
            u, w, phi = unit_fields(el, np.array([ld.at]))
            f0 -= px * u[:, 0] + py * w[:, 0] + ld.mz * phi[:, 0]
        elif isinstance(ld, DistributedLoad):
            if el.coef is None:
                raise CaseError(f'member "{el.member.id}" is a bar and takes no span loads',
                                source=st.source)
            a = ld.start
            b = L if math.isnan(ld.end) else ld.end
            if b <= a:
                continue
            x, wts = _gauss(a, b)
            t = (x - a) / (b - a)
            gx = ld.wx[0] + (ld.wx[1] - ld.wx[0]) * t
            gy = ld.wy[0] + (ld.wy[1] - ld.wy[0]) * t
            qx, qy = gx * c + gy * s, -gx * s + gy * c
            u, w, _ = unit_fields(el, x)
            f0 -= u @ (wts * qx) + w @ (wts * qy)
        elif isinstance(ld, TemperatureLoad):
            alpha = el.member.alpha or 0.0
            eps += alpha * ld.uniform
            if ld.gradient and el.coef is not None:
                if el.member.depth is None:
                    raise CaseError(f'member "{el.member.id}" has a temperature gradient but '
                                    "no section depth", source=st.source)
                kappa += alpha * ld.gradient / el.member.depth
        elif isinstance(ld, Misfit):
            misfit += ld.elongation
    if kappa:
        # int m_i kappa dx with m_i = EI phi_i' : EI kappa (phi_i(L) - phi_i(0))
        _, _, phi = unit_fields(el, np.array([0.0, L]))
        f0 -= el.EI * kappa * (phi[:, 1] - phi[:, 0])
    elongation = eps * L + misfit
    if el.EA is not None and elongation:
        # int n_i eps0 dx with n_i = EA u_i' : EA eps0 L (u_i(L) - u_i(0)) / L
        f0[0] += el.EA * elongation / L
        f0[3] -= el.EA * elongation / L
    return MemberLoading(f0, elongation)


@dataclass
class CaseLoads:
    """The loads of one case sorted for the stiffness method (SI)."""

    p: np.ndarray  #: nodal loads, incl. member loads at the very ends of a member
    by_member: dict[str, list]  #: span loads, temperature and misfit per member
    settle: dict[tuple[str, str], float]  #: (node, direction) -> imposed displacement


def case_loads(st: Structure, index: dict[str, int], case: str) -> CaseLoads:
    """The loads of load case ``case`` sorted: nodal loads (a point load at the very end of a
    member included), member loads, settlements."""
    p = np.zeros(len(index))

    def nodal(node: str, fx: float, fy: float, mz: float) -> None:
        p[index[f"{node}.x"]] += fx
        p[index[f"{node}.y"]] += fy
        if mz:
            key = f"{node}.rz"
            if key not in index:
                raise MechanismError(f"{st.source}: a couple acts at node {node}, where no "
                                     "member end is rigidly connected: nothing resists it.",
                                     [key])
            p[index[key]] += mz

    by_member: dict[str, list] = {mid: [] for mid in st.members}
    settle: dict[tuple[str, str], float] = {}
    for ld in st.loads:
        if ld.case != case:
            continue
        if isinstance(ld, NodalLoad):
            nodal(ld.node, ld.fx, ld.fy, ld.mz)
        elif isinstance(ld, Settlement):
            for direction, value in ld.values:
                settle[(ld.node, direction)] = settle.get((ld.node, direction), 0.0) + value
        else:
            if isinstance(ld, PointLoad):
                m = st.members[ld.member]
                L = st.length(m.id)
                tol = 1e-12 * max(L, 1.0)
                if ld.at <= tol or ld.at >= L - tol:
                    nodal(m.start if ld.at <= tol else m.end, ld.fx, ld.fy, ld.mz)
                    continue
            by_member[ld.member].append(ld)
    return CaseLoads(p, by_member, settle)
