"""The member elements of the direct-stiffness solver: unit end-displacement fields, local
stiffness matrices, static condensation of hinged ends, and the map to global dofs.

Local dofs u1, w1, phi1, u2, w2, phi2 (u along local x, w along local y, phi
counter-clockwise).

* beams: exact elements of a straight prismatic member with bending energy m^2/(2 EI),
  axial energy n^2/(2 EA) and, when ``Structure.shear`` is on and GAs is given, shear energy
  v^2/(2 GAs) with unit shear factor (Timoshenko kinematics: m = EI phi', v = dm/dx =
  GAs (phi - w')). The homogeneous solution (cubic w, quadratic phi) is solved for each unit
  end displacement; a moment hinge is removed by static condensation of that end rotation,
  and a semi-rigid joint (an end spring) by condensing the member-end rotation tied to the
  node's rotation by the spring;
* bars: axial stiffness only.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ..model import Member, Structure

__all__ = ["Element", "element", "unit_fields", "local_stiffness", "condense", "element_map",
           "joint_springs", "member_end_rotations"]


@dataclass(frozen=True)
class Element:
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
    def springs(self) -> list[tuple[int, float]]:
        """(local index of the member-end rotation, rotational stiffness N*m/rad) of each
        semi-rigid joint: the member end turns apart from its node's rotation."""
        if self.EI is None:
            return []
        return [(i, k) for i, k in zip((2, 5), self.member.end_springs, strict=True)
                if k is not None]

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


def element(st: Structure, mid: str) -> Element:
    """The element of member ``mid``: unit end-displacement fields solved from the
    homogeneous beam equations (with shear deformation when asked)."""
    m = st.members[mid]
    L = st.length(mid)
    c, s = st.direction(mid)
    if not m.is_beam:
        return Element(m, L, c, s, m.EA, None, None, None, 0.0)
    GAs = m.GAs if (st.shear and m.GAs) else None
    b = 6.0 * m.EI / (GAs * L * L) if GAs is not None else 0.0
    # w(xi) = a0 + a1 xi + a2 xi^2 + a3 xi^3, xi = x/L;  L phi = a1 + 2 a2 xi + 3 a3 xi^2 + b a3
    M = np.array([[1.0, 0.0, 0.0, 0.0],
                  [0.0, 1.0, 0.0, b],
                  [1.0, 1.0, 1.0, 1.0],
                  [0.0, 1.0, 2.0, 3.0 + b]])
    coef = np.linalg.solve(M, np.diag([1.0, L, 1.0, L]))
    return Element(m, L, c, s, m.EA, m.EI, GAs, coef, b)


def unit_fields(el: Element, x: np.ndarray) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
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


def _bending_moment(el: Element, x: float) -> np.ndarray:
    """m(x) = EI phi' of the six unit states (N*m per unit displacement)."""
    out = np.zeros(6)
    if el.coef is not None:
        a2, a3 = el.coef[2], el.coef[3]
        xi = x / el.L
        out[[1, 2, 4, 5]] = el.EI * (2 * a2 + 6 * a3 * xi) / el.L**2
    return out


def local_stiffness(el: Element) -> np.ndarray:
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


def condense(k: np.ndarray, f0: np.ndarray, hinged: list[int]):
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


def joint_springs(k: np.ndarray, f0: np.ndarray, springs: list[tuple[int, float]]):
    """The element seen from its nodes through semi-rigid joints: each sprung member-end
    rotation becomes an inner dof tied to the node's rotation by a spring of stiffness k_j
    (energy k_j (phi_member - phi_node)^2 / 2) and is condensed out; the node's rotation
    takes its local slot. Returns (k, f0) on the six local dofs with node rotations."""
    if not springs:
        return k, f0
    n = 6 + len(springs)
    K = np.zeros((n, n))
    K[:6, :6] = k
    f = np.zeros(n)
    f[:6] = f0
    for j, (i, kj) in enumerate(springs):
        a = 6 + j
        K[i, i] += kj
        K[a, a] += kj
        K[i, a] -= kj
        K[a, i] -= kj
    h = [i for i, _ in springs]
    c = [x for x in range(n) if x not in h]
    coupling = K[np.ix_(c, h)] @ np.linalg.inv(K[np.ix_(h, h)])
    kc = K[np.ix_(c, c)] - coupling @ K[np.ix_(h, c)]
    fc = f[c] - coupling @ f[h]
    slot = [x if x < 6 else springs[x - 6][0] for x in c]
    out_k = np.zeros((6, 6))
    out_f = np.zeros(6)
    out_k[np.ix_(slot, slot)] = kc
    out_f[slot] = fc
    return 0.5 * (out_k + out_k.T), out_f


def member_end_rotations(k: np.ndarray, f0: np.ndarray, springs: list[tuple[int, float]],
                         d: np.ndarray) -> np.ndarray:
    """Local end displacements of the member itself from those of its nodes ``d`` (node
    rotations in the sprung slots): each sprung member-end rotation from the balance of
    moments at it (member end moment = spring moment)."""
    if not springs:
        return d
    h = [i for i, _ in springs]
    c = [i for i in range(6) if i not in h]
    A = k[np.ix_(h, h)] + np.diag([kj for _, kj in springs])
    rhs = -(k[np.ix_(h, c)] @ d[c] + f0[h]) + np.array([kj * d[i] for i, kj in springs])
    out = d.copy()
    out[h] = np.linalg.solve(A, rhs)
    return out


def element_map(el: Element, index: dict[str, int]) -> np.ndarray:
    """Global dof numbers of the six local dofs; -1 where the rotation is not connected."""
    m = el.member
    out = []
    for node, hinged in ((m.start, m.hinge_start), (m.end, m.hinge_end)):
        out += [index[f"{node}.x"], index[f"{node}.y"]]
        connected = el.coef is not None and not hinged
        out.append(index[f"{node}.rz"] if connected else -1)
    return np.array(out)
