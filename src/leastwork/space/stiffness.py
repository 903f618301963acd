"""An independent direct-stiffness solution of a space structure, to cross-check the
force method: its own 12 × 12 beam element (cubic Hermite bending in two planes, linear
axial and twist), consistent nodal loads for span loads, released end actions condensed
out, rigid supports eliminated, springs added. Shares only the model with the force method.

Element dofs (local): u1, v1, w1, θx1, θy1, θz1, u2, ... with dv/dx = θz, dw/dx = −θy.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from .model import (
    DIRECTIONS,
    SpaceDistributedLoad,
    SpaceMisfit,
    SpaceNodalLoad,
    SpacePointLoad,
    SpaceSettlement,
    SpaceTemperature,
)

__all__ = ["element_stiffness", "StiffnessResult", "solve_stiffness", "cross_check",
           "SpaceCheck", "CHECK_RTOL"]

#: Relative agreement asked of the two methods (on reactions, end actions, displacements).
CHECK_RTOL = 1e-6
#: Stand-in stiffness ratio for an axially (or torsionally) rigid member.
RIGID_FACTOR = 1e8

_RELEASE_DOF = {("start", "t"): 3, ("start", "my"): 4, ("start", "mz"): 5,
                ("end", "t"): 9, ("end", "my"): 10, ("end", "mz"): 11}


def element_stiffness(L: float, EA: float, EIy: float, EIz: float, GJ: float) -> np.ndarray:
    """The 12 × 12 local stiffness of a prismatic space beam (shear deformation neglected)."""
    k = np.zeros((12, 12))
    a, t = EA / L, GJ / L
    for i, j, v in ((0, 0, a), (6, 6, a), (0, 6, -a), (3, 3, t), (9, 9, t), (3, 9, -t)):
        k[i, j] = k[j, i] = v
    # bending in x-y: v, θz (dofs 1, 5, 7, 11)
    c = EIz / L ** 3
    kb = c * np.array([[12, 6 * L, -12, 6 * L], [6 * L, 4 * L * L, -6 * L, 2 * L * L],
                       [-12, -6 * L, 12, -6 * L], [6 * L, 2 * L * L, -6 * L, 4 * L * L]])
    k[np.ix_([1, 5, 7, 11], [1, 5, 7, 11])] = kb
    # bending in x-z: w, θy (dofs 2, 4, 8, 10), dw/dx = -θy
    c = EIy / L ** 3
    kb = c * np.array([[12, -6 * L, -12, -6 * L], [-6 * L, 4 * L * L, 6 * L, 2 * L * L],
                       [-12, 6 * L, 12, 6 * L], [-6 * L, 2 * L * L, 6 * L, 4 * L * L]])
    k[np.ix_([2, 4, 8, 10], [2, 4, 8, 10])] = kb
    return k


def _shapes(xi: float, L: float) -> np.ndarray:
    """Work-equivalent weights of a local force (qx, qy, qz) at xi on the 12 dofs: rows
    qx, qy, qz."""
    h1, h2 = 1 - 3 * xi ** 2 + 2 * xi ** 3, L * (xi - 2 * xi ** 2 + xi ** 3)
    h3, h4 = 3 * xi ** 2 - 2 * xi ** 3, L * (-xi ** 2 + xi ** 3)
    N = np.zeros((3, 12))
    N[0, 0], N[0, 6] = 1 - xi, xi
    N[1, [1, 5, 7, 11]] = h1, h2, h3, h4
    N[2, [2, 4, 8, 10]] = h1, -h2, h3, -h4
    return N


def _element_loads(L: float, R: np.ndarray, loads) -> np.ndarray:
    """Consistent local nodal loads of the span loads on one element."""
    f = np.zeros(12)
    gx, gw = np.polynomial.legendre.leggauss(5)
    for ld in loads:
        if isinstance(ld, SpacePointLoad):
            f += _shapes(ld.at / L, L).T @ (R @ np.asarray(ld.force))
        elif isinstance(ld, SpaceDistributedLoad):
            half = 0.5 * (ld.end - ld.start)
            for x0, w in zip(gx, gw, strict=True):
                x = ld.start + half * (x0 + 1)
                t = (x - ld.start) / (2 * half)
                q = R @ ((1 - t) * np.asarray(ld.w0) + t * np.asarray(ld.w1))
                f += w * half * (_shapes(x / L, L).T @ q)
    return f


@dataclass
class StiffnessResult:
    displacements: dict[str, float]  #: "NODE.dir" -> value (m, rad)
    reactions: dict[str, dict[str, float]]
    end_actions: dict[str, tuple[dict[str, float], dict[str, float]]]


def _member_data(st, m):
    L = st.length(m.id)
    R = st.axes(m.id)
    if m.is_beam:
        scale = max(m.EIy, m.EIz) / L ** 2
        EA = m.EA if m.EA is not None else RIGID_FACTOR * scale
        GJ = m.GJ if m.GJ is not None else 0.0
        k = element_stiffness(L, EA, m.EIy, m.EIz, GJ)
        released = sorted(_RELEASE_DOF[r] for r in m.releases)
        if any(a == "t" for _, a in m.releases):
            released = sorted(set(released) | {9})  # twist carried by neither end
    else:
        k = np.zeros((12, 12))
        a = m.EA / L
        k[0, 0] = k[6, 6] = a
        k[0, 6] = k[6, 0] = -a
        released = [3, 4, 5, 9, 10, 11]
    T = np.zeros((12, 12))
    for b in range(4):
        T[3 * b:3 * b + 3, 3 * b:3 * b + 3] = R
    return L, R, k, T, released


def _condense(k: np.ndarray, f: np.ndarray, released: list[int]):
    """Static condensation of released dofs: (k*, f*, recovery) on the kept dofs."""
    kept = [i for i in range(12) if i not in released]
    if not released:
        return k, f, None
    krr = k[np.ix_(released, released)]
    krk = k[np.ix_(released, kept)]
    inv = np.linalg.pinv(krr)
    kc = np.zeros((12, 12))
    fc = np.zeros(12)
    kc[np.ix_(kept, kept)] = k[np.ix_(kept, kept)] - krk.T @ inv @ krk
    fc[kept] = f[kept] - krk.T @ inv @ f[released]
    return kc, fc, (kept, inv, krk)


def solve_stiffness(st, case: str) -> StiffnessResult:
    """Displacements, reactions and end actions of load case ``case``."""
    nodes = list(st.nodes)
    index = {f"{n}.{d}": 6 * i + j for i, n in enumerate(nodes) for j, d in enumerate(DIRECTIONS)}
    n = 6 * len(nodes)
    K = np.zeros((n, n))
    P = np.zeros(n)
    loads = [ld for ld in st.loads if ld.case == case]
    elems = {}
    for m in st.members.values():
        L, R, k, T, released = _member_data(st, m)
        f = _element_loads(L, R, [ld for ld in loads if getattr(ld, "member", None) == m.id
                                  and isinstance(ld, SpacePointLoad | SpaceDistributedLoad)])
        for ld in loads:
            if isinstance(ld, SpaceMisfit | SpaceTemperature) and ld.member == m.id:
                strain = (ld.elongation if isinstance(ld, SpaceMisfit)
                          else m.alpha * ld.uniform * L)
                k_ax = k[0, 0] if k[0, 0] else 0.0
                f[0] -= k_ax * strain
                f[6] += k_ax * strain
        kc, fc, rec = _condense(k, f, released)
        dofs = [index[f"{m.start}.{d}"] for d in DIRECTIONS] + [index[f"{m.end}.{d}"]
                                                                for d in DIRECTIONS]
        K[np.ix_(dofs, dofs)] += T.T @ kc @ T
        P[dofs] += T.T @ fc
        elems[m.id] = (k, f, T, dofs, rec)
    for ld in loads:
        if isinstance(ld, SpaceNodalLoad):
            for d, v in zip(DIRECTIONS, ld.values, strict=True):
                P[index[f"{ld.node}.{d}"]] += v
    fixed: dict[int, float] = {}
    for sup in st.supports.values():
        for r in sup.restraints:
            i = index[r.name]
            if r.is_spring:
                K[i, i] += r.stiffness
            else:
                fixed[i] = 0.0
    for ld in loads:
        if isinstance(ld, SpaceSettlement):
            for d, v in ld.values:
                fixed[index[f"{ld.node}.{d}"]] += v
    free = [i for i in range(n) if i not in fixed and np.any(K[i] != 0)]
    u = np.zeros(n)
    for i, v in fixed.items():
        u[i] = v
    fixed_idx = list(fixed)
    if free:
        rhs = P[free] - K[np.ix_(free, fixed_idx)] @ u[fixed_idx]
        u[free] = np.linalg.solve(K[np.ix_(free, free)], rhs)
    resid = K @ u - P
    reactions: dict[str, dict[str, float]] = {}
    for sup in st.supports.values():
        for r in sup.restraints:
            i = index[r.name]
            reactions.setdefault(sup.node, {})[r.direction] = (
                -r.stiffness * u[i] if r.is_spring else float(resid[i]))
    ends = {}
    for mid, (k, f, T, dofs, rec) in elems.items():
        ul = T @ u[dofs]
        if rec is not None:
            kept, inv, krk = rec
            rel = [i for i in range(12) if i not in kept]
            ul[rel] = inv @ (f[rel] - krk @ ul[kept])
        fl = k @ ul - f  # forces of the nodes on the element, local
        start = {"n": -fl[0], "vy": fl[1], "vz": fl[2], "t": -fl[3], "my": fl[4], "mz": -fl[5]}
        end = {"n": fl[6], "vy": -fl[7], "vz": -fl[8], "t": fl[9], "my": -fl[10], "mz": fl[11]}
        ends[mid] = (start, end)
    disp = {name: float(u[i]) for name, i in index.items()}
    return StiffnessResult(disp, reactions, ends)


@dataclass
class SpaceCheck:
    ok: bool
    worst: float  #: largest relative difference
    where: str
    message: str


def cross_check(sol) -> SpaceCheck:
    """The force-method results of every case against :func:`solve_stiffness`: reactions,
    member end actions and the displacements asked for, relative to the largest force,
    moment over the mean length, and displacement of the case."""
    st = sol.structure
    Lm = float(np.mean([st.length(m) for m in st.members]))
    worst, where = 0.0, ""
    for name, case in sol.cases.items():
        ref = solve_stiffness(st, name)
        pairs = []  # (label, force-method, stiffness, scale kind)
        for nid, comps in case.reactions.items():
            for d, v in comps.items():
                pairs.append((f"reaction {nid}.{d}", v, ref.reactions[nid][d], d))
        for mid, res in case.members.items():
            fm = res.end_actions()
            for end, a, b in (("start", fm[0], ref.end_actions[mid][0]),
                              ("end", fm[1], ref.end_actions[mid][1])):
                for f in a:
                    if not st.members[mid].is_beam and f != "n":
                        continue
                    pairs.append((f"{mid}.{end}.{f}", a[f], b[f], "r" + f if f in
                                  ("t", "my", "mz") else f))
        forces = [abs(v) if not k.startswith("r") else abs(v) / Lm for _, v, _, k in pairs]
        size = max(forces + [1e-300])
        for label, a, b, kind in pairs:
            scale = size * (Lm if kind.startswith("r") else 1.0)
            rel = abs(a - b) / scale
            if rel > worst:
                worst, where = rel, f"{name}: {label}"
        dsize = max([abs(v) for v in case.displacements.values()] + [1e-300])
        for target, v in case.displacements.items():
            rel = abs(v - ref.displacements[target]) / dsize
            if rel > worst:
                worst, where = rel, f"{name}: displacement {target}"
    ok = worst <= CHECK_RTOL
    msg = (f"the direct-stiffness cross-check agrees (largest relative difference "
           f"{worst:.1e})" if ok else
           f"the direct-stiffness cross-check DISAGREES: relative difference {worst:.1e} at "
           f"{where}; do not use these results before finding why")
    return SpaceCheck(ok, worst, where, msg)
