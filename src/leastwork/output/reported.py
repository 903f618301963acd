"""The numbers of a solve as every output reports them (the JSON result, the calculation
sheet, the summaries): in the output units (:mod:`leastwork.output.quantities`), with
round-off shown as zero, read from the :class:`~leastwork.solution.Solution`.

Section forces and reactions within ``ROUND_OFF`` of the case's force scale (times the
longest member for moments) are round-off and reported as zero; so are displacements
within ``ROUND_OFF`` of the case's largest nodal movement, and flexibility coefficients
within ``ROUND_OFF`` of sqrt(delta_ii delta_jj).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from ..displacements import deflection_extreme, relative_deflection
from ..stresses import stress_extremes
from .quantities import quantities

__all__ = ["ROUND_OFF", "CaseNumbers", "case_numbers", "redundants_shown", "flexibility_rows", "envelope_numbers",
           "reactions", "number"]

#: Fraction of a case's scale below which a reported number is round-off (shown as zero).
ROUND_OFF = 1e-12


def number(x: float) -> float | None:
    """A plain float; a value that is not finite (never expected) becomes None (null in
    the JSON result, rather than the invalid token NaN)."""
    x = float(x)
    return x if math.isfinite(x) else None


@dataclass(frozen=True)
class CaseNumbers:
    """The reported numbers of one load case, in the output units (the JSON result's
    ``cases`` entry without the flexibility, see the contract, section 4)."""

    redundants: dict[str, float | None]
    amplitudes: list[float | None] | None  #: local basis: amplitudes of the states
    load_terms: list[float | None]
    imposed: list[float | None]
    reactions: dict[str, dict[str, float | None]]
    members: dict[str, dict]  #: end forces, moment extremes, largest deflection (beams)
    displacements: dict[str, float | None]
    checks: dict[str, float | bool | None]


class _RoundOff:
    """Section forces and moments of one load case in the output units, round-off as zero."""

    def __init__(self, sol, res):
        q = quantities(sol.units)
        lmax = max((sol.structure.length(m) for m in sol.structure.members), default=1.0)
        self.Ff, self.Mf = q.factor("force"), q.factor("moment")
        self.f_tol = ROUND_OFF * res.equilibrium_scale
        self.m_tol = self.f_tol * lmax

    def force(self, x: float) -> float | None:
        return number(0.0 if abs(x) <= self.f_tol else x / self.Ff)

    def moment(self, x: float) -> float | None:
        return number(0.0 if abs(x) <= self.m_tol else x / self.Mf)


def reactions(sol, res) -> dict[str, dict[str, float | None]]:
    """Per supported node, its reaction components (x, y, rz, n) in the output units."""
    r = _RoundOff(sol, res)
    return {node: {d: r.moment(v) if d == "rz" else r.force(v) for d, v in comps.items()}
            for node, comps in res.reactions.items()}


def _members(sol, res) -> dict[str, dict]:
    """Per member: n, v, m at both ends, moment extremes and (beams) the largest
    deflection, in the output units."""
    st, topo = sol.structure, sol.topology
    r = _RoundOff(sol, res)
    q = quantities(sol.units)
    Lf, Df = q.factor("length"), q.factor("displacement")
    out = {}
    for mid, mr in res.members.items():
        out[mid] = {
            "start": {"n": r.force(mr.start[0]), "v": r.force(mr.start[1]),
                      "m": r.moment(mr.start[2])},
            "end": {"n": r.force(mr.end[0]), "v": r.force(mr.end[1]), "m": r.moment(mr.end[2])},
            "m_max": {"value": r.moment(mr.m_max[0]), "at": number(mr.m_max[1] / Lf)},
            "m_min": {"value": r.moment(mr.m_min[0]), "at": number(mr.m_min[1] / Lf)},
        }
        member = st.members[mid]
        if member.is_beam:
            w, at = deflection_extreme(st, topo, res, mid)
            out[mid]["deflection_max"] = {"value": number(w / Df), "at": number(at / Lf)}
            out[mid]["deflection"] = _limit_check(st, topo, res, mid, q)
        stress = stress_extremes(member, mr)
        if stress is not None:
            Sf = q.factor("stress")
            (hi, at_hi), (lo, at_lo) = stress
            out[mid]["stress"] = {"max": {"value": number(hi / Sf), "at": number(at_hi / Lf)},
                                  "min": {"value": number(lo / Sf), "at": number(at_lo / Lf)}}
    return out


def _limit_check(st, topo, res, mid: str, q) -> dict:
    """Contract 5.3: the deflection a limit L/N is compared with (relative to the chord, or
    to the tangent at the root of a cantilever), the limit and the ratio (None without
    ``[analysis] deflection_limits`` for this kind of member)."""
    value, at, kind = relative_deflection(st, topo, res, mid)
    N = st.deflection_limits[0 if kind == "span" else 1]
    Df, Lf = q.factor("displacement"), q.factor("length")
    limit = None if N is None else st.length(mid) / N
    return {"value": number(value / Df), "at": number(at / Lf),
            "limit": None if limit is None else number(limit / Df),
            "ratio": None if limit is None else number(value / limit), "measured": kind}


def _displacements(sol, res) -> dict[str, float | None]:
    """The displacements asked for: translations in the output displacement unit, rotations
    in rad; those within round-off of the case's largest nodal movement (rotation) as zero."""
    Lf = quantities(sol.units).factor("displacement")
    moved = np.abs(res.nodal_displacements)
    rot = np.array([d.endswith(".rz") for d in sol.topology.dofs], dtype=bool)
    # a translation's scale is the largest translation or rotation x the longest member
    # (a beam that only turns about its supports moves nothing but by round-off)
    st = sol.structure
    lmax = max((st.length(m) for m in st.members), default=1.0)
    u_tol = ROUND_OFF * max(float(np.max(moved[~rot], initial=0.0)),
                            lmax * float(np.max(moved[rot], initial=0.0)))
    r_tol = ROUND_OFF * float(np.max(moved[rot], initial=0.0))
    out = {}
    for t, v in res.displacements.items():
        is_rot = t.endswith(".rz")
        out[t] = number(0.0 if abs(v) <= (r_tol if is_rot else u_tol)
                        else (v if is_rot else v / Lf))
    return out


def _checks(sol, res) -> dict[str, float | bool | None]:
    """The equilibrium check (residual and tolerance in the output force unit), the
    condition number and the direct-stiffness cross-check (relative)."""
    Ff = quantities(sol.units).factor("force")
    checks = {
        "equilibrium_residual": number(res.equilibrium_residual / Ff),
        "equilibrium_ok": bool(res.equilibrium_ok),
        "equilibrium_tolerance": number(res.equilibrium_tolerance / Ff),
        "flexibility_condition": number(sol.condition),
    }
    if res.stiffness is not None:
        checks["stiffness_difference"] = (None if res.stiffness.difference is None
                                          else number(res.stiffness.difference))
        checks["stiffness_ok"] = bool(res.stiffness.ok)
        checks["stiffness_tolerance"] = number(res.stiffness.tolerance)
    return checks


def case_numbers(sol, name: str) -> CaseNumbers:
    """The reported numbers of load case ``name`` of ``sol``."""
    res = sol.cases[name]
    q = quantities(sol.units)
    red_cols = [sol.topology.columns[j] for j in sol.redundant_columns]
    x_unit = [q.column_factor(c) for c in red_cols]
    d_unit = [q.conjugate_factor(c) for c in red_cols]
    return CaseNumbers(
        redundants={c.name: number(x / xu)
                    for c, x, xu in zip(red_cols, res.redundants, x_unit, strict=True)},
        amplitudes=None if res.amplitudes is None else [
            number(x / xu) for x, xu in zip(res.amplitudes, x_unit, strict=True)],
        load_terms=[number(v / du) for v, du in zip(res.load_terms, d_unit, strict=True)],
        imposed=[number(v / du) for v, du in zip(res.imposed, d_unit, strict=True)],
        reactions=reactions(sol, res),
        members=_members(sol, res),
        displacements=_displacements(sol, res),
        checks=_checks(sol, res))


def redundants_shown(sol, name: str) -> dict[str, float | None]:
    """The redundants of load case ``name`` as the sheets and the terminal show them: the
    reported values (:func:`case_numbers`, the JSON's) with round-off as zero — a force
    within ``ROUND_OFF`` of the case's force scale, a moment within that times the longest
    member (a redundant of 3.7×10⁻¹⁶ kip in a symmetric case is 0)."""
    res = sol.cases[name]
    r = _RoundOff(sol, res)
    out = {}
    for j, x in zip(sol.redundant_columns, res.redundants, strict=True):
        col = sol.topology.columns[j]
        tol = r.m_tol if col.is_moment else r.f_tol
        out[col.name] = 0.0 if abs(float(x)) <= tol else case_numbers_value(sol, col, x)
    return out


def case_numbers_value(sol, col, x: float) -> float | None:
    """A redundant (SI) in the output units, as :func:`case_numbers` gives it."""
    return number(x / quantities(sol.units).column_factor(col))


def flexibility_rows(sol) -> list[list[float | None]]:
    """The flexibility matrix as rows of numbers in the output units (dense; round-off far
    below sqrt(delta_ii delta_jj) shown as zero)."""
    q = quantities(sol.units)
    red_cols = [sol.topology.columns[j] for j in sol.redundant_columns]
    x_unit = [q.column_factor(c) for c in red_cols]
    d_unit = [q.conjugate_factor(c) for c in red_cols]
    delta = sol.flexibility
    if hasattr(delta, "toarray"):
        delta = delta.toarray()
    diag = np.sqrt(np.abs(np.diag(delta)))
    # |delta_ij| <= sqrt(delta_ii delta_jj) (positive definite); far below that is round-off
    n = len(x_unit)
    return [[number(0.0 if abs(delta[i, j]) <= ROUND_OFF * diag[i] * diag[j]
                    else delta[i, j] * x_unit[j] / d_unit[i]) for j in range(n)]
            for i in range(n)]


def envelope_numbers(sol, env: dict | None = None) -> dict | None:
    """An envelope (default: over all the load combinations, ``sol.combination_envelope``;
    or one of ``sol.group_envelopes``) in the output units: per member and quantity (n, v,
    m) the max and min with where and the governing combination, per support and direction
    the max and min; None without combinations."""
    env = sol.combination_envelope if env is None else env
    if env is None:
        return None
    Lf = quantities(sol.units).factor("length")
    rounding: dict[str, _RoundOff] = {}

    def out(v: float, c: str, moment: bool) -> float | None:
        """In the output units, round-off of the governing combination as zero."""
        r = rounding.get(c) or rounding.setdefault(c, _RoundOff(sol, sol.cases[c]))
        return r.moment(v) if moment else r.force(v)

    members = {
        mid: {k: {side: {"value": out(v, c, k == "m"), "at": number(at / Lf),
                         "combination": c}
                  for side, (v, at, c) in e.items()} for k, e in qs.items()}
        for mid, qs in env["members"].items()}
    reactions_ = {
        node: {d: {side: {"value": out(v, c, d == "rz"), "combination": c}
                   for side, (v, c) in e.items()} for d, e in ds.items()}
        for node, ds in env["reactions"].items()}
    return {"combinations": list(env["combinations"]), "members": members,
            "reactions": reactions_}
