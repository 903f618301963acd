"""Statics of the released structure: nodal loads, span-load fields, and solves.

The released (primary) structure keeps every column except the redundants; its square
equilibrium matrix A0 is factorised once (LU) and every right-hand side — the loads of each
load case, a unit value of each redundant, a unit load for a displacement — is a
back-substitution.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from .arithmetic import FloatNumbers, Numbers
from .basis import Basis
from .errors import MechanismError
from .fields import ParticularFields
from .loadkinds import CaseEffects, load_kind
from .model import Structure
from .thresholds import NUMPY_LU_MAX
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


def case_loading(st: Structure, topo: Topology, case: str,
                 nums: Numbers | None = None) -> CaseLoading:
    """Assemble the nodal load vector, span-load fields, imposed deformations and
    settlements of load case ``case`` in the number type of ``nums`` (default SI floats):
    each load puts its effects on a :class:`leastwork.loadkinds.CaseEffects` through its
    kind."""
    nums = nums or FloatNumbers(st)
    zero = nums.zero
    loads = tuple((i, ld) for i, ld in enumerate(st.loads) if ld.case == case)
    sink = CaseEffects(st, topo, case, zero, nums.vector, nums.section, nums.length,
                       nums.end_of)
    for i, ld in loads:
        load_kind(ld).apply(nums.load_values(i, ld), ld, sink)
    particulars: dict[str, ParticularFields] = {}
    for mid in dict.fromkeys([*sink.point, *sink.dist]):
        m = st.members[mid]
        pf = nums.particular(m, sink.point.get(mid, []), sink.dist.get(mid, []))
        particulars[mid] = pf
        sink.add_nodal(m.start, *pf.start_force, zero)
        sink.add_nodal(m.end, *pf.end_force, zero)
    imposed = {k: (v[0], v[1], v[2]) for k, v in sink.strains.items()}
    return CaseLoading(case, sink.p, particulars, imposed, sink.c, tuple(sink.nodal),
                       tuple(ld for _, ld in loads))


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
    one = 1.0  #: the unit redundant, in the number type of the basis

    @property
    def A(self) -> np.ndarray:
        """The equilibrium matrix (ndof, ncol)."""
        return self.topo.A

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
        self._A0 = A0
        self._lu = None
        if A0.shape[0] > NUMPY_LU_MAX:  # factorised once; small ones need no scipy at all
            from scipy.linalg import lu_factor

            self._lu = lu_factor(A0)
        self.ncol = ncol

    def forces(self, rhs: np.ndarray) -> np.ndarray:
        """Basic forces and reactions (ncol, k) of the released structure in equilibrium with
        nodal loads ``rhs`` (ndof, k): solves ``A0 s = -rhs``; redundant columns are zero."""
        rhs = np.atleast_2d(rhs.T).T
        s = np.zeros((self.ncol, rhs.shape[1]))
        s[self.keep] = self._solve(-rhs)
        return s

    def displacements(self, compatible: np.ndarray) -> np.ndarray:
        """Nodal displacements (ndof,) for member deformations less settlements
        ``compatible`` (ncol,), by the unit-load method: u = -A0^-T compatible[keep] (a unit
        load at each nodal direction on the released structure, all at once)."""
        return -self._solve(compatible[self.keep], transposed=True)

    def _solve(self, b: np.ndarray, transposed: bool = False) -> np.ndarray:
        """A0 x = b (A0' x = b when ``transposed``): numpy's LU with partial pivoting (LAPACK
        gesv) up to :data:`NUMPY_LU_MAX` equations, scipy's stored factors above."""
        if self._lu is None:
            return np.linalg.solve(self._A0.T if transposed else self._A0, b)
        from scipy.linalg import lu_solve

        return lu_solve(self._lu, b, trans=1 if transposed else 0)

    def unit_redundant_states(self) -> np.ndarray:
        """B (ncol, nred): column i is the state for X_i = 1 with no loads."""
        B = self.forces(self.A[:, self.redundants])
        for i, j in enumerate(self.redundants):
            B[j, i] = self.one
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
