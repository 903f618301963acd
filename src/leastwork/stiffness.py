"""An independent direct stiffness method solver, used to cross-check the force method.

It reads only the model (:mod:`leastwork.model`) and works in SI units (N, m, rad, K). The
unknowns are node displacements: ``x``, ``y`` at every node and ``rz`` where a beam end is
rigidly connected (:func:`leastwork.model.rotational_nodes`).

Elements (local dofs u1, w1, phi1, u2, w2, phi2; u along local x, w along local y, phi
counter-clockwise):

* beams: exact elements of a straight prismatic member with bending energy m^2/(2 EI),
  axial energy n^2/(2 EA) and, when ``Structure.shear`` is on and GAs is given, shear energy
  v^2/(2 GAs) with unit shear factor (Timoshenko kinematics: m = EI phi', v = dm/dx =
  GAs (phi - w')). The homogeneous solution (cubic w, quadratic phi) is solved for each unit
  end displacement; a moment hinge is removed by static condensation of that end rotation;
* bars: axial stiffness only.

Span loads and imposed strains enter as fixed-end forces from the reciprocal theorem
(Maxwell-Betti): the force that a clamped member under a load needs at end dof i is minus
the work of the load on the displacement field of a unit displacement of dof i, and minus
the integral of m_i times the free curvature (or n_i times the free strain); loads are
integrated by Gauss-Legendre rules that are exact for these polynomials.

Rigid supports, inclined rollers and axially rigid beams (``EA is None``) are exact linear
constraints ``C u = g``; they are eliminated by Gaussian elimination (master-slave), never
by a penalty, and their forces follow from the residual ``C' lambda = K u + f0 - p``.

Sign conventions (docs/conventions.md): reactions are what the support applies to the
structure; end forces are section forces (n tension positive, m positive with the local
-y face in tension, v = dm/dx) at x = 0 and x = L.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
import scipy.sparse as sp
from scipy.sparse.linalg import LinearOperator, onenormest, splu

from .errors import CaseError, MechanismError
from .model import (
    DistributedLoad,
    Member,
    Misfit,
    NodalLoad,
    PointLoad,
    Settlement,
    Structure,
    TemperatureLoad,
    reaction_components,
    rotational_nodes,
)

__all__ = ["StiffnessResult", "solve_stiffness", "stiffness_dofs"]

#: Smallest accepted pivot of the Jacobi-scaled reduced stiffness (below: a mechanism).
_PIVOT_TOL = 1e-9
#: Largest accepted 1-norm condition number of the Jacobi-scaled reduced stiffness (above:
#: a mechanism that round-off hid from the pivots); the reasoning is at _condition_limit_hit.
_CONDITION_LIMIT = 0.1 / float(np.finfo(float).eps)  # about 4.5e14
#: Relative size below which an eliminated constraint row counts as dependent.
_DEPENDENT_TOL = 1e-10
_GAUSS_X, _GAUSS_W = np.polynomial.legendre.leggauss(4)  # exact to degree 7


@dataclass(frozen=True)
class StiffnessResult:
    """Displacements, reactions and member end section forces of one load case (SI).

    ``displacements``: node -> (ux, uy, rz), rz None where the node has no rotation of its
    own. ``reactions``: node -> {"x", "y", "rz", "n"} as the force method reports them.
    ``end_forces``: member -> ((n, v, m) at x = 0, (n, v, m) at x = L).
    """

    case: str
    displacements: dict[str, tuple[float, float, float | None]]
    reactions: dict[str, dict[str, float]]
    end_forces: dict[str, tuple[tuple[float, float, float], tuple[float, float, float]]]
    #: nonzeros of the sparse LU factors of the reduced stiffness (L with its unit
    #: diagonal, as stored, plus U); 0 when nothing is left to solve
    factor_nonzeros: int = 0
    #: estimated 1-norm condition number of the Jacobi-scaled reduced stiffness matrix:
    #: member forces from displacement differences lose about this times eps
    condition: float = 1.0


# ---------------------------------------------------------------- degrees of freedom


def _dof_index(st: Structure) -> dict[str, int]:
    """Global numbering "NODE.x", "NODE.y", "NODE.rz" (rz only at rotational nodes)."""
    rot = rotational_nodes(st.members.values())
    index: dict[str, int] = {}
    for nid in st.nodes:
        index[f"{nid}.x"] = len(index)
        index[f"{nid}.y"] = len(index)
        if nid in rot:
            index[f"{nid}.rz"] = len(index)
    return index


# ---------------------------------------------------------------- elements


@dataclass(frozen=True)
class _Element:
    """One member in its local axes, with the coefficients of its unit displacement fields."""

    member: Member
    L: float
    c: float
    s: float
    EA: float | None
    EI: float | None
    GAs: float | None  #: None: no shear deformation
    coef: np.ndarray | None  #: (4, 4) w(xi) coefficients for unit (w1, phi1, w2, phi2)
    b: float  #: 6 EI / (GAs L^2), 0 without shear

    @property
    def hinged(self) -> list[int]:
        """Local indices of end rotations not connected to the node (condensed out)."""
        if self.EI is None:
            return []
        return [i for i, h in ((2, self.member.hinge_start), (5, self.member.hinge_end)) if h]

    def transform(self) -> np.ndarray:
        """(6, 6) T with local = T @ global end displacements."""
        c, s = self.c, self.s
        R = np.array([[c, s, 0.0], [-s, c, 0.0], [0.0, 0.0, 1.0]])
        T = np.zeros((6, 6))
        T[:3, :3] = R
        T[3:, 3:] = R
        return T


def _element(st: Structure, mid: str) -> _Element:
    """The element of member ``mid``: unit end-displacement fields solved from the
    homogeneous beam equations (with shear deformation when asked)."""
    m = st.members[mid]
    L = st.length(mid)
    c, s = st.direction(mid)
    if not m.is_beam:
        return _Element(m, L, c, s, m.EA, None, None, None, 0.0)
    GAs = m.GAs if (st.shear and m.GAs) else None
    b = 6.0 * m.EI / (GAs * L * L) if GAs is not None else 0.0
    # w(xi) = a0 + a1 xi + a2 xi^2 + a3 xi^3, xi = x/L;  L phi = a1 + 2 a2 xi + 3 a3 xi^2 + b a3
    M = np.array([[1.0, 0.0, 0.0, 0.0],
                  [0.0, 1.0, 0.0, b],
                  [1.0, 1.0, 1.0, 1.0],
                  [0.0, 1.0, 2.0, 3.0 + b]])
    coef = np.linalg.solve(M, np.diag([1.0, L, 1.0, L]))
    return _Element(m, L, c, s, m.EA, m.EI, GAs, coef, b)


def _fields(el: _Element, x: np.ndarray) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Axial displacement u, transverse displacement w and rotation phi (each (6, len(x)))
    of the six unit end-displacement states at positions x (m)."""
    x = np.atleast_1d(np.asarray(x, dtype=float))
    xi = x / el.L
    u = np.zeros((6, xi.size))
    w = np.zeros((6, xi.size))
    phi = np.zeros((6, xi.size))
    u[0] = 1.0 - xi
    u[3] = xi
    if el.coef is not None:
        a0, a1, a2, a3 = el.coef
        for j, i in enumerate((1, 2, 4, 5)):
            w[i] = a0[j] + a1[j] * xi + a2[j] * xi**2 + a3[j] * xi**3
            phi[i] = (a1[j] + 2 * a2[j] * xi + 3 * a3[j] * xi**2 + el.b * a3[j]) / el.L
    return u, w, phi


def _bending_moment(el: _Element, x: float) -> np.ndarray:
    """m(x) = EI phi' of the six unit states (N*m per unit displacement)."""
    out = np.zeros(6)
    if el.coef is not None:
        a2, a3 = el.coef[2], el.coef[3]
        xi = x / el.L
        out[[1, 2, 4, 5]] = el.EI * (2 * a2 + 6 * a3 * xi) / el.L**2
    return out


def _local_stiffness(el: _Element) -> np.ndarray:
    """(6, 6) stiffness: forces the nodes apply to the member ends per unit end displacement,
    local components. Column i: (-n(0), v(0), -m(0), n(L), -v(L), m(L)) of state i."""
    k = np.zeros((6, 6))
    if el.EA is not None:
        ka = el.EA / el.L
        k[np.ix_([0, 3], [0, 3])] = [[ka, -ka], [-ka, ka]]
    if el.coef is not None:
        v = 6.0 * el.EI * el.coef[3] / el.L**3  # shear of each bending state, constant
        m0 = _bending_moment(el, 0.0)[[1, 2, 4, 5]]
        mL = _bending_moment(el, el.L)[[1, 2, 4, 5]]
        block = np.vstack([v, -m0, -v, mL])
        k[np.ix_([1, 2, 4, 5], [1, 2, 4, 5])] = block
    return 0.5 * (k + k.T)


def _gauss(a: float, b: float) -> tuple[np.ndarray, np.ndarray]:
    """Gauss-Legendre points and weights on [a, b]."""
    return 0.5 * (b - a) * _GAUSS_X + 0.5 * (a + b), 0.5 * (b - a) * _GAUSS_W


@dataclass(frozen=True)
class _MemberLoading:
    """Fixed-end forces (local, uncondensed) and the free elongation of one member."""

    f0: np.ndarray  #: (6,) forces the nodes apply to a clamped member, local components
    elongation: float  #: free elongation (thermal + misfit), m — a constraint if rigid


def _member_loading(st: Structure, el: _Element, loads) -> _MemberLoading:
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
            u, w, phi = _fields(el, np.array([ld.at]))
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
            u, w, _ = _fields(el, x)
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
        _, _, phi = _fields(el, np.array([0.0, L]))
        f0 -= el.EI * kappa * (phi[:, 1] - phi[:, 0])
    elongation = eps * L + misfit
    if el.EA is not None and elongation:
        # int n_i eps0 dx with n_i = EA u_i' : EA eps0 L (u_i(L) - u_i(0)) / L
        f0[0] += el.EA * elongation / L
        f0[3] -= el.EA * elongation / L
    return _MemberLoading(f0, elongation)


def _condense(k: np.ndarray, f0: np.ndarray, hinged: list[int]):
    """Static condensation of hinged end rotations: (k_c, f0_c) on all six local dofs with
    zero rows and columns at the hinged ones."""
    if not hinged:
        return k, f0
    h = hinged
    c = [i for i in range(6) if i not in h]
    khh_inv = np.linalg.inv(k[np.ix_(h, h)])
    kc = np.zeros_like(k)
    fc = np.zeros_like(f0)
    kc[np.ix_(c, c)] = k[np.ix_(c, c)] - k[np.ix_(c, h)] @ khh_inv @ k[np.ix_(h, c)]
    fc[c] = f0[c] - k[np.ix_(c, h)] @ khh_inv @ f0[h]
    return 0.5 * (kc + kc.T), fc


def _element_map(el: _Element, index: dict[str, int]) -> np.ndarray:
    """Global dof numbers of the six local dofs; -1 where the rotation is not connected."""
    m = el.member
    out = []
    for node, hinged in ((m.start, m.hinge_start), (m.end, m.hinge_end)):
        out += [index[f"{node}.x"], index[f"{node}.y"]]
        connected = el.coef is not None and not hinged
        out.append(index[f"{node}.rz"] if connected else -1)
    return np.array(out)


# ---------------------------------------------------------------- constraints


@dataclass(frozen=True)
class _Constraint:
    """sum(coef * u[dof]) = rhs. ``kind`` "support" (lambda = reaction along the restraint)
    or "member" (lambda = -axial force)."""

    name: str
    kind: str
    coeffs: dict[int, float]
    rhs: float


@dataclass(frozen=True)
class _Elimination:
    """u = T @ x + t for the masters x; pivots[k] = slave dof of independent constraint k."""

    T: sp.csr_matrix
    t: np.ndarray
    masters: np.ndarray
    independent: list[_Constraint]
    pivots: list[int]
    dependent: list[tuple[_Constraint, float]]  #: (constraint, residual rhs)


def _eliminate(n: int, constraints: list[_Constraint]) -> _Elimination:
    """Master-slave elimination of the constraints (Gaussian elimination with the largest
    remaining coefficient as pivot); exact, no penalty."""
    slaves: dict[int, tuple[dict[int, float], float]] = {}
    users: dict[int, set[int]] = {}
    independent: list[_Constraint] = []
    pivots: list[int] = []
    dependent: list[tuple[_Constraint, float]] = []
    for con in sorted(constraints, key=lambda k: (len(k.coeffs) > 1, k.kind == "member")):
        row: dict[int, float] = {}
        g = con.rhs
        mag = max((abs(a) for a in con.coeffs.values()), default=0.0)
        for dof, a in con.coeffs.items():
            if dof in slaves:
                expr, const = slaves[dof]
                g -= a * const
                for mdof, b in expr.items():
                    row[mdof] = row.get(mdof, 0.0) + a * b
                    mag = max(mag, abs(a * b))
            else:
                row[dof] = row.get(dof, 0.0) + a
        piv = max(row, key=lambda d: abs(row[d]), default=None)
        if piv is None or abs(row[piv]) <= _DEPENDENT_TOL * max(mag, 1e-300):
            dependent.append((con, g))
            continue
        ap = row.pop(piv)
        expr = {d: -b / ap for d, b in row.items() if b != 0.0}
        const = g / ap
        for sdof in users.pop(piv, set()):
            e, c0 = slaves[sdof]
            coef = e.pop(piv)
            for d, b in expr.items():
                e[d] = e.get(d, 0.0) + coef * b
                users.setdefault(d, set()).add(sdof)
            slaves[sdof] = (e, c0 + coef * const)
        slaves[piv] = (expr, const)
        for d in expr:
            users.setdefault(d, set()).add(piv)
        independent.append(con)
        pivots.append(piv)
    masters = np.array([i for i in range(n) if i not in slaves], dtype=int)
    col = {int(d): j for j, d in enumerate(masters)}
    rows, cols, vals = list(masters), list(range(len(masters))), [1.0] * len(masters)
    t = np.zeros(n)
    for sdof, (expr, const) in slaves.items():
        t[sdof] = const
        for d, b in expr.items():
            if b != 0.0:
                rows.append(sdof)
                cols.append(col[d])
                vals.append(b)
    T = sp.csr_matrix((vals, (rows, cols)), shape=(n, len(masters)))
    return _Elimination(T, t, masters, independent, pivots, dependent)


def _restraint_row(r, index: dict[str, int]) -> dict[int, float]:
    """Coefficients of a restraint's direction on the node's dofs (rz dropped where the node
    has no rotation of its own)."""
    row = {}
    for comp, key in zip(r.vector, ("x", "y", "rz")):
        dof = index.get(f"{r.node}.{key}")
        if comp and dof is not None:
            row[dof] = float(comp)
    return row


def _constraints(st: Structure, index, settle: dict[tuple[str, str], float],
                 elongations: dict[str, float]) -> list[_Constraint]:
    """Rigid restraints (rhs: settlement) and axially rigid members (rhs: free elongation)."""
    out = []
    for sup in st.supports.values():
        for r in sup.restraints:
            if r.is_spring:
                continue
            row = _restraint_row(r, index)
            if row:
                out.append(_Constraint(r.name, "support", row,
                                       settle.get((sup.node, r.direction), 0.0)))
    for m in st.members.values():
        if m.EA is None:
            c, s = st.direction(m.id)
            row = {index[f"{m.start}.x"]: -c, index[f"{m.start}.y"]: -s,
                   index[f"{m.end}.x"]: c, index[f"{m.end}.y"]: s}
            row = {d: v for d, v in row.items() if v != 0.0}
            out.append(_Constraint(f"{m.id}.n", "member", row, elongations.get(m.id, 0.0)))
    return out


# ---------------------------------------------------------------- solving


def stiffness_dofs(structure: Structure) -> int:
    """Number of free degrees of freedom (after the rigid constraints are eliminated)."""
    index = _dof_index(structure)
    cons = _constraints(structure, index, {}, {})
    return len(index) - (len(cons) - len(_eliminate(len(index), cons).dependent))


def _motion_names(index: dict[str, int], vec: np.ndarray, lref: float) -> list[str]:
    """Dofs that take part in a motion vector (rotations weighted by a member length)."""
    names = list(index)
    size = np.array([abs(v) * (lref if n.endswith(".rz") else 1.0) for n, v in zip(names, vec)])
    top = size.max() if size.size else 0.0
    if top == 0.0:
        return []
    return [n for n, v in zip(names, size) if v > 1e-6 * top]


def _mechanism(st: Structure, index, elim: _Elimination, A: sp.csc_matrix,
               D: np.ndarray, lref: float, detail: str) -> MechanismError:
    """A MechanismError naming the free motion, found by shifted inverse iteration."""
    n = A.shape[0]
    motion: list[str] = []
    try:
        lu = splu((A + 1e-8 * sp.identity(n, format="csc")).tocsc())
        x = np.random.default_rng(0).standard_normal(n)
        for _ in range(3):
            x = lu.solve(x)
            x /= np.linalg.norm(x)
        motion = _motion_names(index, elim.T @ (D * x), lref)
    except RuntimeError:  # the shifted matrix should not be singular; name nothing then
        motion = []
    return MechanismError(
        f"{st.source}: the structure is unstable (a mechanism): its stiffness matrix is "
        f"singular ({detail}). Add a support, a member or remove a hinge where it moves.",
        motion)


def _spring_data(st: Structure, index, settle):
    """Springs as (restraint, row over dofs, ground displacement); a spring on a rotation
    the node does not have is left out (its entry is reported as 0.0)."""
    out = []
    for sup in st.supports.values():
        for r in sup.restraints:
            if r.is_spring:
                row = _restraint_row(r, index)
                if row:
                    out.append((r, row, settle.get((sup.node, r.direction), 0.0)))
    return out


@dataclass
class _CaseLoads:
    """The loads of one case sorted for the stiffness method (SI)."""

    p: np.ndarray  #: nodal loads, incl. member loads at the very ends of a member
    by_member: dict[str, list]  #: span loads, temperature and misfit per member
    settle: dict[tuple[str, str], float]  #: (node, direction) -> imposed displacement


def _case_loads(st: Structure, index: dict[str, int], case: str) -> _CaseLoads:
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
    return _CaseLoads(p, by_member, settle)


@dataclass
class _Assembly:
    """Global stiffness K (springs included), fixed-end forces f0, load vector p."""

    K: sp.csr_matrix
    f0: np.ndarray
    p: np.ndarray
    elements: dict[str, tuple]  #: member -> (element, k local, f0 local, T, dof map)
    elongations: dict[str, float]  #: free elongation of axially rigid members
    springs: list


def _assemble(st: Structure, index: dict[str, int], loads: _CaseLoads) -> _Assembly:
    n = len(index)
    rows: list[np.ndarray] = []
    cols: list[np.ndarray] = []
    vals: list[np.ndarray] = []
    f0g = np.zeros(n)
    p = loads.p.copy()
    elements: dict[str, tuple] = {}
    elongations: dict[str, float] = {}
    for mid in st.members:
        el = _element(st, mid)
        ml = _member_loading(st, el, loads.by_member[mid])
        k = _local_stiffness(el)
        kc, fc = _condense(k, ml.f0, el.hinged)
        T = el.transform()
        g = _element_map(el, index)
        live = g >= 0
        gl = g[live]
        rows.append(np.repeat(gl, gl.size))
        cols.append(np.tile(gl, gl.size))
        vals.append((T.T @ kc @ T)[np.ix_(live, live)].ravel())
        np.add.at(f0g, gl, (T.T @ fc)[live])
        elements[mid] = (el, k, ml.f0, T, g)
        if el.EA is None:
            elongations[mid] = ml.elongation
    springs = _spring_data(st, index, loads.settle)
    for r, row, ground in springs:
        d = np.array(list(row))
        v = np.array(list(row.values()))
        rows.append(np.repeat(d, d.size))
        cols.append(np.tile(d, d.size))
        vals.append(r.stiffness * np.outer(v, v).ravel())
        p[d] += r.stiffness * ground * v
    if vals:
        K = sp.csr_matrix((np.concatenate(vals), (np.concatenate(rows), np.concatenate(cols))),
                          shape=(n, n))
    else:
        K = sp.csr_matrix((n, n))
    return _Assembly(K, f0g, p, elements, elongations, springs)


def _scaled_condition(A: sp.csc_matrix, lu, b: np.ndarray, y: np.ndarray) -> float:
    """Estimate of the 1-norm condition number ||A||_1 ||A^-1||_1 of the factored matrix.

    ||A^-1||_1 is estimated from the factors by scipy's ``onenormest`` with one column (the
    Hager estimate: a few solves, deterministic, a lower bound), raised to
    ||y||_1 / ||b||_1 of the solve at hand (also a lower bound of ||A^-1||_1)."""
    n = A.shape[0]
    inverse = LinearOperator((n, n), matvec=lu.solve,
                             rmatvec=lambda v: lu.solve(v, trans="T"), dtype=float)
    inv_norm = float(onenormest(inverse, t=1))
    b_norm = float(np.abs(b).sum())
    if b_norm > 0.0:
        inv_norm = max(inv_norm, float(np.abs(y).sum()) / b_norm)
    return float(abs(A).sum(axis=0).max()) * inv_norm


def _condition_limit_hit(cond: float) -> bool:
    """Second sign of a mechanism: the scaled stiffness is singular to working precision.

    Why a limit tied to the machine precision eps rather than a fixed amplification:

    * a mechanism is a zero eigenvalue of the (positive semi-definite) scaled stiffness A.
      Elimination is backward stable (what is factored is A + E with ||E|| of order
      eps ||A||; from memory: Higham, Accuracy and Stability of Numerical Algorithms,
      ch. 9 and 10), so the zero survives as an eigenvalue of order eps ||A||, of either
      sign, and the condition number of the factored matrix is of order 1/eps whatever the
      size. Its pivot need not be tiny: with one panel of a 3000-panel truss left unbraced
      the smallest pivot was -2e-7 (round-off grows with size, and its sign is luck); the
      estimate below was 1.7e16 (4 / eps) or more on every mechanism tried, from 3 to
      40000 dofs;
    * a stable but slender structure is legitimately ill-conditioned: the condition number
      of a chain of n panels or spans that bends as a whole grows like n^4 (the ratio of
      its stiffest to its softest mode); braced_truss(1000) of benchmarks/generators.py
      has 1.3e11, braced_truss(3000) 1.0e13, braced_truss(5000) 8e13. The fixed ratio of
      response to load used before (1e9) called that truss a mechanism from about 450
      panels, and a load-dependent ratio cannot tell a mechanism from a slender truss
      anyway (both gave 2e12 at 3000 panels);
    * above 0.1 / eps the error bound cond * eps of the displacements exceeds 10 %: double
      precision no longer tells such a structure from a singular one, so calling it a
      mechanism states what this solver can resolve. The margin is about 40 both to the
      mechanisms and to braced_truss(3000).

    The estimate is a lower bound (Hager), so a mechanism can only be missed if the
    estimate is off by more than that margin; the pivot test before it stays the first sign.
    """
    return not math.isfinite(cond) or cond > _CONDITION_LIMIT


def _solve_reduced(st: Structure, index, elim: _Elimination, K, rhs: np.ndarray,
                   lref: float) -> tuple[np.ndarray, int, float]:
    """Solve (T' K T) x = rhs: Jacobi-scaled sparse LU with diagonal pivots, which are then
    all positive for a stable structure; a tiny or negative pivot, or a condition number
    no double-precision solve resolves, is a mechanism. Returns x, the nonzeros of the
    factors and the estimated condition number of the scaled stiffness."""
    Kr = (elim.T.T @ K @ elim.T).tocsc()
    nm = Kr.shape[0]
    if nm == 0:
        return np.zeros(0), 0, 1.0
    diag = Kr.diagonal()
    ok = diag > 0.0
    D = 1.0 / np.sqrt(np.where(ok, diag, 1.0))
    A = (sp.diags(D) @ Kr @ sp.diags(D)).tocsc()
    if not ok.all():
        raise _mechanism(st, index, elim, A, D, lref, "a free direction has no stiffness")
    try:
        lu = splu(A, permc_spec="MMD_AT_PLUS_A", diag_pivot_thresh=0.0,
                  options={"SymmetricMode": True})
    except RuntimeError:
        raise _mechanism(st, index, elim, A, D, lref, "exactly singular") from None
    smallest = float(lu.U.diagonal().min())
    if smallest <= _PIVOT_TOL:
        raise _mechanism(st, index, elim, A, D, lref, f"smallest scaled pivot {smallest:.3g}")
    b = D * rhs
    y = lu.solve(b)
    y += lu.solve(b - A @ y)  # one step of iterative refinement
    # a pivot can hide a zero eigenvalue (round-off of the elimination): the second sign
    cond = _scaled_condition(A, lu, b, y)
    if _condition_limit_hit(cond):
        raise _mechanism(st, index, elim, A, D, lref,
                         f"estimated condition number {cond:.2g} of the scaled stiffness, "
                         "singular to working precision")
    return D * y, int(lu.L.nnz + lu.U.nnz), cond


def _constraint_forces(elim: _Elimination, resid: np.ndarray) -> dict[str, float]:
    """lambda of the independent constraints from C' lambda = resid on their slave dofs
    (dependent constraints carry nothing)."""
    if not elim.independent:
        return {}
    pos = {d: k for k, d in enumerate(elim.pivots)}
    r_, c_, v_ = [], [], []
    for i, con in enumerate(elim.independent):
        for dof, a in con.coeffs.items():
            if dof in pos:
                r_.append(pos[dof])
                c_.append(i)
                v_.append(a)
    CsT = sp.csc_matrix((v_, (r_, c_)), shape=(len(pos), len(pos)))
    lam = splu(CsT).solve(resid[np.array(elim.pivots)])
    return {con.name: float(val) for con, val in zip(elim.independent, lam)}


def _reactions(st: Structure, U: np.ndarray, force_of: dict[str, float],
               springs) -> dict[str, dict[str, float]]:
    """Reactions in the force method's layout: per support, "x"/"y"/"rz", and "n" with its
    "x", "y" components for an inclined roller."""
    spring_force = {r.name: -r.stiffness * (sum(a * U[d] for d, a in row.items()) - ground)
                    for r, row, ground in springs}
    def value_of(r) -> float:
        return spring_force.get(r.name, 0.0) if r.is_spring else force_of.get(r.name, 0.0)

    return {sup.node: reaction_components(sup, value_of) for sup in st.supports.values()}


def _end_forces(U: np.ndarray, elements: dict[str, tuple], force_of: dict[str, float]):
    """Section forces (n, v, m) at both ends of every member from its end displacements."""
    out = {}
    for mid, (el, k, f0, T, g) in elements.items():
        d = T @ np.array([U[i] if i >= 0 else 0.0 for i in g])
        h = el.hinged
        if h:
            c = [i for i in range(6) if i not in h]
            d[h] = -np.linalg.solve(k[np.ix_(h, h)], k[np.ix_(h, c)] @ d[c] + f0[h])
        f = k @ d + f0  # forces the nodes apply to the member ends, local
        if el.EA is None:
            N = -force_of.get(f"{mid}.n", 0.0)
            f[0] -= N
            f[3] += N
        out[mid] = ((float(-f[0]), float(f[1]), float(-f[2])),
                    (float(f[3]), float(-f[4]), float(f[5])))
    return out


def solve_stiffness(structure: Structure, case: str) -> StiffnessResult:
    """Solve load case ``case`` of ``structure`` by the direct stiffness method.

    Raises
    ------
    MechanismError
        The structure can move without deforming (singular stiffness), or a couple acts on
        a node with no rotation of its own.
    CaseError
        An imposed deformation (settlement, temperature, misfit) that rigid parts cannot
        follow; or a bar carries a span load.

    Where axially rigid beams and rigid supports over-constrain each other (a rigid beam
    between two pins, say), the force they could exchange is not determined by stiffness;
    the constraint found dependent (supports are eliminated first, then members) carries
    none, as the force method takes a redundant without flexibility as zero.
    """
    st = structure
    index = _dof_index(st)
    lref = max((st.length(m) for m in st.members), default=1.0)
    loads = _case_loads(st, index, case)
    asm = _assemble(st, index, loads)
    elim = _eliminate(len(index), _constraints(st, index, loads.settle, asm.elongations))
    for con, resid in elim.dependent:
        if abs(resid) > 1e-12 * max(lref, 1.0):
            names = ", ".join(c.name for c, _ in elim.dependent)
            raise CaseError(f"an imposed deformation ({resid:.6g} along {con.name}) acts on "
                            f"rigid parts that cannot follow it ({names}): axially rigid "
                            "members and rigid supports over-constrain each other",
                            source=st.source)
    rhs = elim.T.T @ (asm.p - asm.f0 - asm.K @ elim.t)
    x, factor_nonzeros, condition = _solve_reduced(st, index, elim, asm.K, rhs, lref)
    U = elim.T @ x + elim.t
    force_of = _constraint_forces(elim, asm.K @ U + asm.f0 - asm.p)
    displacements = {}
    for nid in st.nodes:
        rz = index.get(f"{nid}.rz")
        displacements[nid] = (float(U[index[f"{nid}.x"]]), float(U[index[f"{nid}.y"]]),
                              float(U[rz]) if rz is not None else None)
    return StiffnessResult(case, displacements, _reactions(st, U, force_of, asm.springs),
                           _end_forces(U, asm.elements, force_of), factor_nonzeros, condition)
