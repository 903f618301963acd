"""The JSON result of the interface contract (section 4), in the case units."""

from __future__ import annotations

import math

import numpy as np

from ..displacements import deflection_extreme
from ..solution import EQUILIBRIUM_RTOL

__all__ = ["solution_to_dict", "SCHEMA", "quantity_factors", "flexibility_rows"]

SCHEMA = "leastwork.result/1"

#: Section forces and reactions smaller than this fraction of the case's largest force
#: (times the longest member for moments) are round-off and reported as zero.
_ROUND_OFF = 1e-12


def quantity_factors(u):
    """SI value of one unit of force, length, moment of the unit system ``u``."""
    return u.factor("force"), u.factor("length"), u.factor("moment")


def _num(x: float) -> float | None:
    """A plain float for JSON; a value that is not finite (never expected) becomes null
    rather than the invalid JSON token NaN."""
    x = float(x)
    return x if math.isfinite(x) else None


def _x_d_units(sol) -> tuple[list[float], list[float]]:
    """SI value of one case unit of each redundant (force or moment) and of its conjugate
    displacement (length or rad)."""
    Ff, Lf, Mf = quantity_factors(sol.units)
    red_cols = [sol.topology.columns[j] for j in sol.redundant_columns]
    return ([Mf if c.is_moment else Ff for c in red_cols],
            [1.0 if c.is_moment else Lf for c in red_cols])


def flexibility_rows(sol) -> list[list[float | None]]:
    """The flexibility matrix as rows of numbers in the case units (dense; round-off far
    below sqrt(delta_ii delta_jj) shown as zero)."""
    x_unit, d_unit = _x_d_units(sol)
    delta = sol.flexibility
    if hasattr(delta, "toarray"):
        delta = delta.toarray()
    diag = np.sqrt(np.abs(np.diag(delta)))
    # |delta_ij| <= sqrt(delta_ii delta_jj) (positive definite); far below that is round-off
    n = len(x_unit)
    return [[_num(0.0 if abs(delta[i, j]) <= _ROUND_OFF * diag[i] * diag[j]
                  else delta[i, j] * x_unit[j] / d_unit[i]) for j in range(n)]
            for i in range(n)]


def _sparse_flexibility(sol, x_unit, d_unit) -> dict:
    """Local basis: the flexibility matrix of the state amplitudes as its nonzero entries
    (row, column, value in the case units), upper triangle and diagonal (it is symmetric)."""
    delta = sol.flexibility.tocoo()
    diag = np.sqrt(np.abs(sol.flexibility.diagonal()))
    keep = (delta.row <= delta.col) & (np.abs(delta.data) > _ROUND_OFF * diag[delta.row]
                                       * diag[delta.col])
    r, c, v = delta.row[keep], delta.col[keep], delta.data[keep]
    order = np.lexsort((c, r))
    r, c, v = r[order], c[order], v[order]
    xu, du = np.asarray(x_unit), np.asarray(d_unit)
    return {"format": "sparse upper triangle", "size": int(delta.shape[0]),
            "rows": [int(i) for i in r], "columns": [int(j) for j in c],
            "values": [_num(x) for x in v * xu[c] / du[r]]}


def solution_to_dict(sol) -> dict:
    st = sol.structure
    topo = sol.topology
    u = sol.units
    Ff, Lf, Mf = quantity_factors(u)
    red_cols = [topo.columns[j] for j in sol.redundant_columns]
    # unit of each redundant (force or moment) and of its conjugate displacement
    x_unit = [Mf if c.is_moment else Ff for c in red_cols]
    d_unit = [1.0 if c.is_moment else Lf for c in red_cols]
    flex = (flexibility_rows(sol) if sol.basis != "local"
            else _sparse_flexibility(sol, x_unit, d_unit))
    lmax = max((st.length(m) for m in st.members), default=1.0)
    cases = {}
    for name, res in sol.cases.items():
        # round-off below 1e-12 of the case's largest force (moment) is shown as zero
        f_tol = _ROUND_OFF * res.equilibrium_scale
        m_tol = f_tol * lmax

        def force(x, f_tol=f_tol):
            return _num(0.0 if abs(x) <= f_tol else x / Ff)

        def moment(x, m_tol=m_tol):
            return _num(0.0 if abs(x) <= m_tol else x / Mf)

        members = {}
        for mid, mr in res.members.items():
            members[mid] = {
                "start": {"n": force(mr.start[0]), "v": force(mr.start[1]),
                          "m": moment(mr.start[2])},
                "end": {"n": force(mr.end[0]), "v": force(mr.end[1]), "m": moment(mr.end[2])},
                "m_max": {"value": moment(mr.m_max[0]), "at": _num(mr.m_max[1] / Lf)},
                "m_min": {"value": moment(mr.m_min[0]), "at": _num(mr.m_min[1] / Lf)},
            }
            if st.members[mid].is_beam:
                w, at = deflection_extreme(st, topo, res, mid)
                members[mid]["deflection_max"] = {"value": _num(w / Lf), "at": _num(at / Lf)}
        reactions = {}
        for node, comps in res.reactions.items():
            reactions[node] = {d: moment(v) if d == "rz" else force(v) for d, v in comps.items()}
        # displacements far below the case's largest nodal movement are round-off
        moved = np.abs(res.nodal_displacements)
        rot = np.array([d.endswith(".rz") for d in topo.dofs], dtype=bool)
        u_tol = _ROUND_OFF * float(np.max(moved[~rot], initial=0.0))
        r_tol = _ROUND_OFF * float(np.max(moved[rot], initial=0.0))
        disp = {}
        for t, v in res.displacements.items():
            is_rot = t.endswith(".rz")
            disp[t] = _num(0.0 if abs(v) <= (r_tol if is_rot else u_tol)
                           else (v if is_rot else v / Lf))
        checks = {
            "equilibrium_residual": _num(res.equilibrium_residual / Ff),
            "equilibrium_ok": bool(res.equilibrium_ok),
            "equilibrium_tolerance": _num(EQUILIBRIUM_RTOL * res.equilibrium_scale / Ff),
            "flexibility_condition": _num(sol.condition),
        }
        if res.stiffness is not None:
            checks["stiffness_difference"] = (None if res.stiffness.difference is None
                                              else _num(res.stiffness.difference))
            checks["stiffness_ok"] = bool(res.stiffness.ok)
            checks["stiffness_tolerance"] = _num(res.stiffness.tolerance)
        cases[name] = {
            "redundants": {c.name: _num(x / xu) for c, x, xu in zip(red_cols, res.redundants,
                                                                    x_unit, strict=True)},
            "flexibility": flex,
            **({} if res.amplitudes is None else {"amplitudes": [
                _num(x / xu) for x, xu in zip(res.amplitudes, x_unit, strict=True)]}),
            "load_terms": [_num(v / du) for v, du in zip(res.load_terms, d_unit, strict=True)],
            "imposed": [_num(v / du) for v, du in zip(res.imposed, d_unit, strict=True)],
            "reactions": reactions,
            "members": members,
            "displacements": disp,
            "checks": checks,
        }
    out = {
        "schema": SCHEMA,
        "name": st.name,
        "units": {"force": u.force, "length": u.length, "moment": f"{u.force}*{u.length}",
                  "rotation": "rad"},
        "indeterminacy": {"degree": topo.degree, "external": topo.external,
                          "internal": topo.internal, "stable": topo.stable},
        "redundants": [c.name for c in red_cols],
        **({} if sol.basis != "local" else {"basis": {
            "kind": "local", "states": len(red_cols),
            "long_range_states": int(sol.long_range_states),
            "members_per_state": _members_per_state(sol)}}),
        "cases": cases,
        "warnings": list(sol.warnings),
    }
    combos = [name for name, _ in st.combinations]
    if combos:
        out["envelope"] = _envelope_dict(sol, combos, Ff, Lf, Mf)
    return out


def _members_per_state(sol) -> dict:
    """Smallest, mean and largest number of members a local state touches."""
    from ..selfstress import members_per_state

    counts = members_per_state(sol.B, sol.topology.columns)
    if not counts.size:
        return {"min": 0, "mean": 0.0, "max": 0}
    return {"min": int(counts.min()), "mean": _num(float(np.mean(counts))),
            "max": int(counts.max())}


def _envelope_dict(sol, combos, Ff, Lf, Mf) -> dict:
    from ..envelope import envelope

    env = envelope(sol, combos)
    fac = {"n": Ff, "v": Ff, "m": Mf}
    members = {
        mid: {q: {k: {"value": _num(v / fac[q]), "at": _num(at / Lf), "combination": c}
                  for k, (v, at, c) in e.items()} for q, e in qs.items()}
        for mid, qs in env["members"].items()}
    reactions = {
        node: {d: {k: {"value": _num(v / (Mf if d == "rz" else Ff)), "combination": c}
                   for k, (v, c) in e.items()} for d, e in ds.items()}
        for node, ds in env["reactions"].items()}
    return {"combinations": combos, "members": members, "reactions": reactions}
