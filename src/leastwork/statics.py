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
from .elements import kind_of
from .errors import MechanismError
from .fields import ParticularFields
from .loadkinds import load_kind
from .model import NodalLoad, Structure
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
    settlements of load case ``case``: each load puts its effects on a :class:`_Sink`
    through its kind (:mod:`leastwork.loadkinds`)."""
    loads = tuple(ld for ld in st.loads if ld.case == case)
    sink = _Sink(st, topo, case)
    for ld in loads:
        kind = load_kind(ld)
        kind.apply(kind.values(ld), ld, sink)
    particulars: dict[str, ParticularFields] = {}
    for mid in dict.fromkeys([*sink.point, *sink.dist]):
        m = st.members[mid]
        pf = kind_of(m).particular(m, st.length(mid), st.direction(mid),
                                   sink.point.get(mid, []), sink.dist.get(mid, []))
        particulars[mid] = pf
        sink.add_nodal(m.start, *pf.start_force, 0.0)
        sink.add_nodal(m.end, *pf.end_force, 0.0)
    imposed = {k: (v[0], v[1], v[2]) for k, v in sink.strains.items()}
    return CaseLoading(case, sink.p, particulars, imposed, sink.c, tuple(sink.nodal), loads)


class _Sink:
    """The effects of one load case's loads in SI floats (a :class:`leastwork.loadkinds.
    LoadSink`)."""

    zero = 0.0

    def __init__(self, st: Structure, topo: Topology, case: str):
        self.st, self.topo, self.case = st, topo, case
        self.p = np.zeros(len(topo.dofs))
        self.c = np.zeros(len(topo.columns))
        self.point: dict[str, list] = {}
        self.dist: dict[str, list] = {}
        self.nodal: list = []
        self.strains: dict[str, list[float]] = {}

    def section(self, member: str):
        return self.st.members[member]

    def add_nodal(self, node: str, fx: float, fy: float, mz: float) -> None:
        di, p = self.topo.dof_index, self.p
        p[di[f"{node}.x"]] += fx
        p[di[f"{node}.y"]] += fy
        if mz:
            key = f"{node}.rz"
            if key not in di:
                raise MechanismError(
                    f"{self.st.source}: a moment is applied at node {node}, where every "
                    "member end is hinged: nothing resists it (a mechanism).", [key])
            p[di[key]] += mz

    def node_force(self, node: str, fx, fy, mz) -> None:
        self.add_nodal(node, fx, fy, mz)
        self.nodal.append(NodalLoad(node, fx, fy, mz, self.case))

    def member_point(self, member: str, at, fx, fy, mz) -> None:
        m = self.st.members[member]
        L = self.st.length(member)
        tol = 1e-12 * max(L, 1.0)
        if at <= tol or at >= L - tol:
            self.node_force(m.start if at <= tol else m.end, fx, fy, mz)
        else:
            self.point.setdefault(member, []).append((at, fx, fy, mz))

    def member_distributed(self, member: str, start, end, wx, wy) -> None:
        end = self.st.length(member) if end is None else end
        self.dist.setdefault(member, []).append((start, end, wx, wy))

    def member_strain(self, member: str, eps, kappa, misfit) -> None:
        acc = self.strains.setdefault(member, [0.0, 0.0, 0.0])
        for i, v in enumerate((eps, kappa, misfit)):
            if v:
                acc[i] += v

    def settlement(self, node: str, direction: str, value) -> None:
        name = f"{node}.{direction}"
        if name in self.topo.column_index:
            self.c[self.topo.column_index[name]] += value


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
