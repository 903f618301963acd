"""Statics of the released structure: nodal loads, span-load fields, and solves.

The released (primary) structure keeps every column except the redundants; its square
equilibrium matrix A0 is factorised once (LU) and every right-hand side — the loads of each
load case, a unit value of each redundant, a unit load for a displacement — is a
back-substitution.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from scipy.linalg import lu_factor, lu_solve

from .basis import Basis
from .errors import MechanismError
from .fields import ParticularFields, particular_fields
from .model import DistributedLoad, NodalLoad, PointLoad, Settlement, Structure
from .topology import Topology

__all__ = ["CaseLoading", "ReleasedStructure", "case_loading"]


@dataclass(frozen=True)
class CaseLoading:
    """One load case made ready for the force method (SI units)."""

    name: str
    p: np.ndarray  #: nodal loads incl. those passed on by span loads (ndof,)
    particulars: dict[str, ParticularFields]  #: span-load fields per loaded member
    imposed: dict[str, tuple[float, float, float]]  #: (alpha dT, alpha dTgrad/h, misfit)
    settlement: np.ndarray  #: imposed displacement along each rigid reaction column (ncol,)
    nodal_loads: tuple  #: the NodalLoad objects (and end-point member loads) of the case
    loads: tuple  #: every load of the case as given


def case_loading(st: Structure, topo: Topology, case: str) -> CaseLoading:
    """Assemble the nodal load vector, span-load fields, imposed deformations and
    settlements of load case ``case``."""
    from .energy import thermal_strains

    loads = tuple(ld for ld in st.loads if ld.case == case)
    p = np.zeros(len(topo.dofs))
    di = topo.dof_index
    point: dict[str, list] = {}
    dist: dict[str, list] = {}
    nodal = []

    def add_nodal(node: str, fx: float, fy: float, mz: float) -> None:
        p[di[f"{node}.x"]] += fx
        p[di[f"{node}.y"]] += fy
        if mz:
            key = f"{node}.rz"
            if key not in di:
                raise MechanismError(
                    f"{st.source}: a moment is applied at node {node}, where every member end "
                    "is hinged: nothing resists it (a mechanism).", [key])
            p[di[key]] += mz

    for ld in loads:
        if isinstance(ld, NodalLoad):
            add_nodal(ld.node, ld.fx, ld.fy, ld.mz)
            nodal.append(ld)
        elif isinstance(ld, PointLoad):
            m = st.members[ld.member]
            L = st.length(m.id)
            tol = 1e-12 * max(L, 1.0)
            if ld.at <= tol or ld.at >= L - tol:
                node = m.start if ld.at <= tol else m.end
                add_nodal(node, ld.fx, ld.fy, ld.mz)
                nodal.append(NodalLoad(node, ld.fx, ld.fy, ld.mz, ld.case))
            else:
                point.setdefault(m.id, []).append((ld.at, ld.fx, ld.fy, ld.mz))
        elif isinstance(ld, DistributedLoad):
            L = st.length(ld.member)
            end = L if np.isnan(ld.end) else ld.end
            dist.setdefault(ld.member, []).append((ld.start, end, ld.wx, ld.wy))
    particulars: dict[str, ParticularFields] = {}
    for mid in dict.fromkeys([*point, *dist]):
        m = st.members[mid]
        pf = particular_fields(st.length(mid), st.direction(mid), point.get(mid, []),
                               dist.get(mid, []))
        particulars[mid] = pf
        add_nodal(m.start, *pf.start_force, 0.0)
        add_nodal(m.end, *pf.end_force, 0.0)
    settlement = np.zeros(len(topo.columns))
    for ld in loads:
        if isinstance(ld, Settlement):
            for direction, value in ld.values:
                name = f"{ld.node}.{direction}"
                if name in topo.column_index:
                    settlement[topo.column_index[name]] += value
    return CaseLoading(case, p, particulars, thermal_strains(st, loads), settlement,
                       tuple(nodal), loads)


class ReleasedStructure(Basis):
    """The statically determinate released structure, factorised once: the released basis
    (:class:`leastwork.basis.Basis`), whose states are the unit redundant states.

    Parameters
    ----------
    topo : Topology
    redundants : list of int
        Column indices of the redundants.
    """

    kind = "released"

    def __init__(self, topo: Topology, redundants: list[int]):
        self.topo = topo
        self.redundants = list(redundants)
        ncol = len(topo.columns)
        self.keep = [j for j in range(ncol) if j not in self.redundants]
        A0 = topo.A[:, self.keep]
        if A0.shape[0] != A0.shape[1]:  # never factorise a non-square "released structure"
            raise MechanismError(
                f"the released structure has {A0.shape[1]} forces for {A0.shape[0]} "
                "equilibrium equations: it is not statically determinate (a mechanism, or "
                "a wrong number of redundants)", list(topo.mechanism))
        self._lu = lu_factor(A0)
        self.ncol = ncol

    def forces(self, rhs: np.ndarray) -> np.ndarray:
        """Basic forces and reactions (ncol, k) of the released structure in equilibrium with
        nodal loads ``rhs`` (ndof, k): solves ``A0 s = -rhs``; redundant columns are zero."""
        rhs = np.atleast_2d(rhs.T).T
        s = np.zeros((self.ncol, rhs.shape[1]))
        s[self.keep] = lu_solve(self._lu, -rhs)
        return s

    def displacements(self, compatible: np.ndarray) -> np.ndarray:
        """Nodal displacements (ndof,) for member deformations less settlements
        ``compatible`` (ncol,), by the unit-load method: u = -A0^-T compatible[keep] (a unit
        load at each nodal direction on the released structure, all at once)."""
        return -lu_solve(self._lu, compatible[self.keep], trans=1)

    def unit_redundant_states(self) -> np.ndarray:
        """B (ncol, nred): column i is the state for X_i = 1 with no loads."""
        A = self.topo.A
        B = self.forces(A[:, self.redundants])
        for i, j in enumerate(self.redundants):
            B[j, i] = 1.0
        return B

    states = unit_redundant_states

    @property
    def redundant_names(self) -> list[str]:
        """Names of the redundants."""
        return [self.topo.columns[j].name for j in self.redundants]

    @property
    def amplitudes(self) -> bool:
        """The unknowns are the redundants themselves."""
        return False

    @property
    def state_accuracy(self) -> float:
        """States by back-substitution: exact to round-off (machine epsilon)."""
        return float(np.finfo(float).eps)

    def flexibility(self, st: Structure, topo: Topology) -> np.ndarray:
        """F, dense (:func:`leastwork.energy.flexibility_blocks`)."""
        from .energy import flexibility_blocks

        return flexibility_blocks(st, topo)

    def compatibility_solver(self, delta, names: list[str], source: str):
        """:class:`leastwork.compatibility.FlexibilitySolver` of ``delta``."""
        from .compatibility import FlexibilitySolver

        return FlexibilitySolver(delta, names, source)

    def stability_basis(self, states) -> None:
        """None: the dense topology carries the singular values the stability index needs."""
        return None
