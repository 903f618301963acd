"""Exact linear constraints of the direct-stiffness solver: rigid supports (settlement as
right-hand side), inclined rollers and axially rigid beams (``EA is None``, free elongation
as right-hand side).

The constraints ``C u = g`` are eliminated by Gaussian elimination (master-slave), never by
a penalty, and their forces follow from the residual ``C' lambda = K u + f0 - p``.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import TYPE_CHECKING

import numpy as np

from ..model import Structure
from .assembly import restraint_row

if TYPE_CHECKING:
    import scipy.sparse as sp

__all__ = ["Constraint", "Elimination", "eliminate", "rigid_constraints", "constraint_forces"]

#: Relative size below which an eliminated constraint row counts as dependent.
_DEPENDENT_TOL = 1e-10


@dataclass(frozen=True)
class Constraint:
    """sum(coef * u[dof]) = rhs. ``kind`` "support" (lambda = reaction along the restraint)
    or "member" (lambda = -axial force)."""

    name: str
    kind: str
    coeffs: dict[int, float]
    rhs: float


@dataclass(frozen=True)
class Elimination:
    """u = T @ x + t for the masters x; pivots[k] = slave dof of independent constraint k."""

    T: sp.csr_matrix | np.ndarray  #: dense for a small structure
    t: np.ndarray
    masters: np.ndarray
    independent: list[Constraint]
    pivots: list[int]
    dependent: list[tuple[Constraint, float]]  #: (constraint, residual rhs)


def eliminate(n: int, constraints: list[Constraint], dense: bool = False) -> Elimination:
    """Master-slave elimination of the constraints (Gaussian elimination with the largest
    remaining coefficient as pivot); exact, no penalty. ``dense``: T as a numpy array."""
    slaves: dict[int, tuple[dict[int, float], float]] = {}
    users: dict[int, set[int]] = {}
    independent: list[Constraint] = []
    pivots: list[int] = []
    dependent: list[tuple[Constraint, float]] = []
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
    if dense:
        T = np.zeros((n, len(masters)))
        np.add.at(T, (np.asarray(rows, dtype=int), np.asarray(cols, dtype=int)),
                  np.asarray(vals, dtype=float))
    else:
        import scipy.sparse as sp

        T = sp.csr_matrix((vals, (rows, cols)), shape=(n, len(masters)))
    return Elimination(T, t, masters, independent, pivots, dependent)


def rigid_constraints(st: Structure, index, settle: dict[tuple[str, str], float],
                 elongations: dict[str, float]) -> list[Constraint]:
    """Rigid restraints (rhs: settlement) and axially rigid members (rhs: free elongation)."""
    out = []
    for sup in st.supports.values():
        for r in sup.restraints:
            if r.is_spring:
                continue
            row = restraint_row(r, index)
            if row:
                out.append(Constraint(r.name, "support", row,
                                       settle.get((sup.node, r.direction), 0.0)))
    for m in st.members.values():
        if m.EA is None:
            c, s = st.direction(m.id)
            row = {index[f"{m.start}.x"]: -c, index[f"{m.start}.y"]: -s,
                   index[f"{m.end}.x"]: c, index[f"{m.end}.y"]: s}
            row = {d: v for d, v in row.items() if v != 0.0}
            out.append(Constraint(f"{m.id}.n", "member", row, elongations.get(m.id, 0.0)))
    return out


def constraint_forces(elim: Elimination, resid: np.ndarray) -> dict[str, float]:
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
    b = resid[np.array(elim.pivots)]
    if isinstance(elim.T, np.ndarray):  # a small structure: dense, no scipy
        CsT = np.zeros((len(pos), len(pos)))
        np.add.at(CsT, (np.asarray(r_, dtype=int), np.asarray(c_, dtype=int)),
                  np.asarray(v_, dtype=float))
        lam = np.linalg.solve(CsT, b)
    else:
        import scipy.sparse as sp
        from scipy.sparse.linalg import splu

        CsT = sp.csc_matrix((v_, (r_, c_)), shape=(len(pos), len(pos)))
        lam = splu(CsT).solve(b)
    return {con.name: float(val) for con, val in zip(elim.independent, lam)}
