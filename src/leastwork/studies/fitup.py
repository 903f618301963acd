"""Fit-up tolerance study: forces locked in by members made within a length tolerance.

A misfit e_k of member k (fabricated length minus the distance between its nodes) is an
initial deformation on its axial basic force (:mod:`leastwork.energy`). With no loads the
released structure carries nothing (s0 = 0), so by the force method (:mod:`leastwork.solve`)

    X = -delta^-1 B' E e,     s = B X = G e,     G = -B delta^-1 B' E,

where column k of E selects the axial force of toleranced member k. G (N per m of misfit)
is found for all toleranced members at once: one multi-right-hand-side solve with the
factorised flexibility matrix. Every reported quantity (axial forces, beam end moments,
reactions) is a row of ``Q G``.

The response is linear and the tolerance box |e_k| <= t_k symmetric, so the exact extremes
are at a corner: max = sum |G_qk| t_k with e_k = sign(G_qk) t_k, and min = -max with the
opposite pattern. Monte Carlo samples of e (uniform over +-t, or normal with sigma = t/3)
give the spread; for a linear response its standard deviation is exactly
sqrt(sum (G_qk sigma_k)^2) with sigma_k = t_k/sqrt(3) (uniform) or t_k/3 (normal).
"""

from __future__ import annotations

import math
import re
from collections.abc import Mapping
from dataclasses import dataclass

import numpy as np

from ..elements import column_of
from ..errors import CaseError
from ..model import Structure
from ..model.units import QuantityError, UnitSystem, parse_quantity
from ..output.quantities import quantities
from ..plaintext import ECHO_LIMIT, literal
from .influence import reaction_rows

__all__ = [
    "Reported",
    "WorstCase",
    "MonteCarlo",
    "FitupStudy",
    "Adjustment",
    "DISTRIBUTIONS",
    "MAX_SAMPLES",
    "parse_tolerances",
    "axial_column",
    "reported_quantities",
    "unit_texts",
    "misfit_influence",
    "worst_case",
    "exact_std",
    "monte_carlo",
    "fitup_study",
    "adjustment",
    "study_to_dict",
    "adjustment_to_dict",
    "new_seed",
]

DISTRIBUTIONS = ("uniform", "normal")
#: Largest number of Monte Carlo samples, and of stored responses (samples x quantities).
MAX_SAMPLES = 1_000_000
_MAX_STORED = 50_000_000
#: Entries of G below this fraction of the largest force of their column (moments over the
#: longest member) are round-off and taken as zero.
_ROUND_OFF = 1e-12
#: The inverse question takes a sensitivity G[target, adjust] as "no effect" while it is
#: within this many times what round-off of the flexibility products could make of a true
#: zero (:func:`sensitivity_round_off`; docs/studies.md). Sensitivities that are round-off
#: measure below 0.05 of that on the bundled cases, true ones above 10^5.
NO_EFFECT_ROUND_OFF = 64.0
#: An adjustment longer than this fraction of the adjusted member's length leaves the
#: small-displacement range of the analysis: it is reported with a warning.
SMALL_CHANGE_FRACTION = 0.01
_SOURCE, _WHERE = "command line", "--tolerance"
_NUMBER_FIRST = re.compile(r"^[-+]?(?:\d|\.\d)")


# ------------------------------------------------------------------------------ input
def _tolerance_value(st: Structure, item: str, text: str) -> float:
    """One tolerance (m) from ``text``: a length with units, or a bare number in the case
    length unit. Read by :func:`leastwork.model.units.parse_quantity` (bounded in length and in
    the cost of its arithmetic)."""
    def bad(msg: str) -> CaseError:
        return CaseError(f'"{literal(item, ECHO_LIMIT)}": {msg}', source=_SOURCE, where=_WHERE)

    shown = literal(text, ECHO_LIMIT)
    try:
        value = float(text) * st.units.factor("length")
    except ValueError:
        if not _NUMBER_FIRST.match(text):
            raise bad(f'"{shown}" is not a length (expected a number with or without a unit, '
                      'e.g. 2mm or 0.002)') from None
        try:
            q = parse_quantity(text)
            value = st.units.to_si(q, "length")
        except QuantityError as exc:
            raise bad(f'cannot read "{shown}" as a length: {exc}') from None
        except (ValueError, ArithmeticError) as exc:  # a wrong dimension; an overflow
            raise bad(str(exc) if isinstance(exc, ValueError) else
                      f'"{shown}" is beyond the floating-point range') from None
    if not math.isfinite(value):
        raise bad(f"the tolerance must be a finite length, got {shown}")
    if value < 0.0:
        raise bad(f"a tolerance is a +- band and cannot be negative, got {shown}")
    return value


def parse_tolerances(text: str, st: Structure) -> dict[str, float]:
    """Read a tolerance spec such as ``"DA=2mm,*=1mm"``: ``MEMBER=LENGTH`` items separated by
    commas; ``*`` stands for every other bar or beam with an axial stiffness. Bare numbers are
    in the case length unit. Returns {member: tolerance in m}, in the structure's member
    order (members with a zero tolerance are kept).

    Raises CaseError (source "command line", where "--tolerance") naming the item for an
    unknown member, a negative or non-finite value, a malformed or repeated item, or a
    tolerance of half the member length or more.
    """
    explicit: dict[str, float] = {}
    said: dict[str, str] = {}  # member (or *) -> its item, for messages
    star: float | None = None
    items = [t.strip() for t in text.split(",")]
    if not any(items):
        raise CaseError("expected MEMBER=LENGTH items such as DA=2mm,*=1mm",
                        source=_SOURCE, where=_WHERE)
    for item in items:
        if not item:
            continue
        name, sep, value = (s.strip() for s in item.partition("="))
        if not sep or not name or not value:
            raise CaseError(f'"{literal(item, ECHO_LIMIT)}": expected MEMBER=LENGTH (e.g. '
                            "DA=2mm or *=1mm)",
                            source=_SOURCE, where=_WHERE)
        if name == "*":
            if star is not None:
                raise CaseError(f'"{literal(item, ECHO_LIMIT)}": * is given twice',
                                source=_SOURCE, where=_WHERE)
            star = _tolerance_value(st, item, value)
            said["*"] = item
            continue
        if name not in st.members:
            import difflib

            close = (difflib.get_close_matches(name, list(st.members), n=1, cutoff=0.5)
                     if len(name) <= ECHO_LIMIT and len(st.members) <= 5000 else [])
            hint = f' (did you mean "{literal(close[0], ECHO_LIMIT)}"?)' if close else ""
            raise CaseError(f'"{literal(item, ECHO_LIMIT)}": unknown member '
                            f'"{literal(name, ECHO_LIMIT)}"{hint}', source=_SOURCE, where=_WHERE)
        if name in explicit:
            raise CaseError(f'"{literal(item, ECHO_LIMIT)}": member '
                            f"{literal(name, ECHO_LIMIT)} is given twice", source=_SOURCE,
                            where=_WHERE)
        explicit[name] = _tolerance_value(st, item, value)
        said[name] = item
    out: dict[str, float] = {}
    for mid, m in st.members.items():
        if mid in explicit:
            t = explicit[mid]
        elif star is not None and m.EA is not None:
            t = star
        else:
            continue
        L = st.length(mid)
        if t >= 0.5 * L:
            raise CaseError(f'"{literal(said.get(mid, said.get("*")), ECHO_LIMIT)}": the '
                            f"tolerance of {literal(mid, ECHO_LIMIT)} is half "
                            "its length or more, outside the small-displacement assumption",
                            source=_SOURCE, where=_WHERE)
        out[mid] = t
    if not out:
        raise CaseError("* matches no member (no bar or beam with an axial stiffness)",
                        source=_SOURCE, where=_WHERE)
    return out


# ------------------------------------------------------------------------ quantities
@dataclass(frozen=True)
class Reported:
    """The quantities of the study as rows over the basic forces.

    ``groups`` is "members" (axial force, key the member id), "moments" (beam end moments,
    ``ID.start.m``/``ID.end.m``) or "reactions" (``NODE.x|y|rz|n``); ``dims`` "force" or
    "moment"; ``rows`` (nq, ncol), scipy sparse CSR.
    """

    names: tuple[str, ...]
    groups: tuple[str, ...]
    dims: tuple[str, ...]
    rows: object


def axial_column(st: Structure, topo, mid: str) -> int:
    """Column of the axial basic force of member ``mid``."""
    return topo.column_index[column_of(st.members[mid], "axial")]


def reported_quantities(st: Structure, topo) -> Reported:
    """Every member's axial force, every beam end moment (hinged ends have none) and every
    reaction component. ``rows`` is a sparse matrix (scipy CSR): one or a few entries per
    quantity, so that it stays proportional to the structure (a dense one is quantities
    times columns: 0.8 GB at 10^4 members)."""
    from scipy import sparse

    ncol = len(topo.columns)
    names, groups, dims, cols, vals, ptr = [], [], [], [], [], [0]

    def add(name: str, group: str, dim: str, entries) -> None:
        names.append(name)
        groups.append(group)
        dims.append(dim)
        for j, w in entries:
            cols.append(j)
            vals.append(w)
        ptr.append(len(cols))

    for mid in st.members:
        add(mid, "members", "force", [(axial_column(st, topo, mid), 1.0)])
    for j, c in enumerate(topo.columns):
        if c.kind in ("start_m", "end_m"):
            add(c.name, "moments", "moment", [(j, 1.0)])
    for name, (row, dim) in reaction_rows(st, topo).items():
        nz = np.flatnonzero(row)
        add(name, "reactions", dim, zip(nz.tolist(), row[nz].tolist(), strict=True))
    rows = sparse.csr_matrix((np.array(vals, dtype=float), np.array(cols, dtype=np.intp),
                              np.array(ptr, dtype=np.intp)), shape=(len(names), ncol))
    return Reported(tuple(names), tuple(groups), tuple(dims), rows)


def misfit_influence(sol, members) -> np.ndarray:
    """G (ncol, k): basic forces and reactions (N, N*m) per metre of misfit of each of
    ``members``, from one multi-right-hand-side solve with the factorised flexibility."""
    return sol.B @ _misfit_redundants(sol, members)


def _misfit_redundants(sol, members) -> np.ndarray:
    """X (nred, k): the redundants (or local state amplitudes) per metre of misfit of each
    of ``members``, X = -delta^-1 B' E."""
    st, topo = sol.structure, sol.topology
    E = np.zeros((len(topo.columns), len(members)))
    for k, mid in enumerate(members):
        E[axial_column(st, topo, mid), k] = 1.0
    from .influence import _flexibility_solver

    X = _flexibility_solver(sol).solve(-(sol.B.T @ E))
    return np.asarray(X).reshape(-1, len(members))


def sensitivity_round_off(sol, target: str, member: str, X: np.ndarray) -> float:
    """What round-off could make (N/m) of a true zero G[target, member] = -b_t' delta^-1 b_m,
    with b the rows of the states B at the two axial forces and ``X`` (nred, 2) the
    redundants per metre of misfit of ``member`` and of ``target`` (:func:`_misfit_redundants`).

    First-order bound: each entry of B is known to tau of its column's largest entry nu
    (tau: the unit round-off of a back-substitution, or the accuracy of a local
    self-stress state), and the solve with delta to EPS times its condition number:
    tau (|X_t|·nu + |X_m|·nu) + EPS cond |b_t|·|X_m|.
    """
    from ..solution import EPS

    st, topo = sol.structure, sol.topology
    B = sol.B
    if hasattr(B, "tocsr"):  # sparse local states
        B = B.tocsr()
        nu = np.asarray(abs(B).max(axis=0).todense()).ravel()
        b_t = np.asarray(B[axial_column(st, topo, target)].todense()).ravel()
    else:
        nu = np.max(np.abs(B), axis=0, initial=0.0)
        b_t = np.asarray(B[axial_column(st, topo, target)]).ravel()
    tau = sol.released.state_accuracy
    x_m, x_t = np.abs(X[:, 0]), np.abs(X[:, 1])
    cond = max(float(sol.condition), 1.0) if math.isfinite(sol.condition) else 1.0 / EPS
    return float(tau * (x_t @ nu + x_m @ nu) + EPS * cond * (np.abs(b_t) @ x_m))


def _clean(Gq: np.ndarray, dims, lmax: float) -> np.ndarray:
    """Round-off entries (below 1e-12 of their column's largest force) set to zero."""
    if Gq.size == 0:
        return Gq
    lever = np.array([lmax if d == "moment" else 1.0 for d in dims])[:, None]
    scaled = np.abs(Gq) / lever
    top = scaled.max(axis=0, keepdims=True)
    return np.where(scaled <= _ROUND_OFF * top, 0.0, Gq)


# ----------------------------------------------------------------------- statistics
@dataclass(frozen=True)
class WorstCase:
    """Exact extremes over the tolerance box (SI) and the misfits (m) that give them:
    ``pattern_max[q, k]`` is member k's length error for the max of quantity q (0 where
    member k does not affect q)."""

    max: np.ndarray
    min: np.ndarray
    pattern_max: np.ndarray
    pattern_min: np.ndarray


def worst_case(Gq: np.ndarray, t: np.ndarray) -> WorstCase:
    """Extremes of ``Gq @ e`` over |e_k| <= t_k: ``sum |G_qk| t_k`` at e = sign(G_q) t."""
    pattern = np.sign(Gq) * t[None, :]
    upper = np.abs(Gq) @ t
    return WorstCase(upper, -upper, pattern, -pattern)


def exact_std(Gq: np.ndarray, t: np.ndarray, distribution: str) -> np.ndarray:
    """Standard deviation of the linear response: sqrt(sum (G_qk sigma_k)^2) with
    sigma = t/sqrt(3) (uniform over +-t) or t/3 (normal)."""
    sigma = t / (math.sqrt(3.0) if distribution == "uniform" else 3.0)
    return np.sqrt(np.sum((Gq * sigma[None, :]) ** 2, axis=1))


@dataclass(frozen=True)
class MonteCarlo:
    """Sample statistics per quantity (SI): mean, std (n-1), 5th and 95th percentiles."""

    mean: np.ndarray
    std: np.ndarray
    p05: np.ndarray
    p95: np.ndarray


def monte_carlo(Gq: np.ndarray, t: np.ndarray, samples: int, distribution: str,
                seed: int) -> MonteCarlo:
    """Sample misfits (uniform over +-t, or normal with sigma = t/3, not truncated) with a
    numpy Generator seeded by ``seed``, in blocks, and the statistics of ``Gq @ e``.

    The same seed gives the same samples whatever the block size. Rows of ``Gq`` that are
    zero give exact zeros; the others are evaluated through a rank-revealing factorisation
    ``Gq diag(sigma) = A V`` (its rank is at most the number of redundants) when that is
    cheaper; sigma = t (uniform, z on (-1, 1)) or t/3 (normal, z standard normal).
    """
    if distribution not in DISTRIBUTIONS:
        raise CaseError(f'unknown distribution "{distribution}"; expected uniform or normal',
                        source=_SOURCE, where="--distribution")
    nq, nt = Gq.shape
    rng = np.random.default_rng(seed)
    live = np.flatnonzero(np.any(Gq != 0.0, axis=1))
    # e = t * z with z uniform on (-1, 1), or standard normal / 3 (the 1/3 folded in here)
    sigma = t if distribution == "uniform" else t / 3.0
    A, V = _factors(Gq[live] * sigma[None, :])
    R = np.empty((live.size, samples))
    block = max(1, 2 ** 21 // max(nt, 1))
    for a in range(0, samples, block):
        m = min(block, samples - a)
        if distribution == "uniform":
            Z = rng.uniform(-1.0, 1.0, size=(m, nt))
        else:
            Z = rng.standard_normal(size=(m, nt))
        R[:, a:a + m] = A @ (V @ Z.T) if V is not None else A @ Z.T
    out = np.zeros((4, nq))
    if live.size:
        out[0, live] = R.mean(axis=1)
        out[1, live] = R.std(axis=1, ddof=1)
        out[2:, live] = np.percentile(R, [5.0, 95.0], axis=1, overwrite_input=True)
    return MonteCarlo(*out)


def _factors(M: np.ndarray) -> tuple[np.ndarray, np.ndarray | None]:
    """(A, V) with M = A V and the fewest products per sample, or (M, None)."""
    n, k = M.shape
    if n == 0 or k == 0:
        return M, None
    U, sv, Vt = np.linalg.svd(M, full_matrices=False)
    r = int(np.sum(sv > 1e-13 * sv[0])) if sv[0] > 0 else 0
    if r * (n + k) >= n * k:
        return M, None
    return U[:, :r] * sv[:r], Vt[:r]


@dataclass(frozen=True)
class FitupStudy:
    """A fit-up study in SI: tolerances (m), the influence matrix ``G`` (nq, nt) of the
    reported quantities per metre of misfit, the exact extremes, the Monte Carlo
    statistics and the exact standard deviation."""

    tolerances: dict[str, float]
    quantities: Reported
    G: np.ndarray
    worst: WorstCase
    stats: MonteCarlo
    std_exact: np.ndarray
    samples: int
    distribution: str
    seed: int


def new_seed() -> int:
    """A fresh random seed (0 <= seed < 2**32), to be reported so a run can be repeated."""
    return int(np.random.SeedSequence().generate_state(1)[0])


def fitup_study(sol, tolerances: Mapping[str, float], samples: int = 10000,
                distribution: str = "uniform", seed: int | None = None) -> FitupStudy:
    """The forces locked in by length errors within ``tolerances`` (m per member) alone,
    without the case loads (add a load case's result by superposition).

    Raises CaseError for a number of samples outside 2..MAX_SAMPLES (or too many to store).
    """
    st, topo = sol.structure, sol.topology
    if not 2 <= samples <= MAX_SAMPLES:
        raise CaseError(f"expected from 2 to {MAX_SAMPLES} samples, got {samples}",
                        source=_SOURCE, where="--samples")
    seed = new_seed() if seed is None else int(seed)
    if seed < 0:
        raise CaseError(f"the seed must be zero or positive, got {seed}", source=_SOURCE,
                        where="--seed")
    rep = reported_quantities(st, topo)
    if samples * len(rep.names) > _MAX_STORED:
        raise CaseError(f"{samples} samples of {len(rep.names)} quantities are too many to "
                        f"keep; use at most {_MAX_STORED // len(rep.names)} samples",
                        source=_SOURCE, where="--samples")
    members = list(tolerances)
    t = np.array([tolerances[m] for m in members], dtype=float)
    lmax = max((st.length(m) for m in st.members), default=1.0)
    Gq = _clean(np.asarray(rep.rows @ misfit_influence(sol, members)), rep.dims, lmax)
    return FitupStudy(dict(tolerances), rep, Gq, worst_case(Gq, t),
                      monte_carlo(Gq, t, samples, distribution, seed),
                      exact_std(Gq, t, distribution), samples, distribution, seed)


# ----------------------------------------------------------------- inverse question
@dataclass(frozen=True)
class Adjustment:
    """The length change (m; positive = make longer, i.e. a misfit of that value) of member
    ``member`` that makes the axial force of ``target`` zero in load case ``case``.

    ``force_before`` (N) is the target's force before; ``rate`` (N/m) its change per metre
    of length change; ``before``/``after`` every member's axial force (N).
    """

    member: str
    target: str
    case: str
    change: float
    force_before: float
    rate: float
    before: dict[str, float]
    after: dict[str, float]
    #: plain-text warnings (an adjustment outside the small-displacement range)
    warnings: tuple[str, ...] = ()


def adjustment(sol, member: str, target: str, case: str | None = None) -> Adjustment:
    """Solve ``delta_e = -N_target / G[target, member]`` under the loads of ``case`` (default:
    the only load case, or the first).

    Raises CaseError when a member is unknown, the load case does not exist, or the length
    of ``member`` locks in no force at all or does not affect the force in ``target``: the
    sensitivity (G[member, member], G[target, member]) within ``NO_EFFECT_ROUND_OFF`` times
    what round-off could make of a zero (:func:`sensitivity_round_off`). An adjustment
    longer than ``SMALL_CHANGE_FRACTION`` of the member's length carries a warning.
    """
    st, topo = sol.structure, sol.topology
    for mid, where in ((member, "--adjust"), (target, "--zero")):
        if mid not in st.members:
            import difflib

            close = (difflib.get_close_matches(mid, list(st.members), n=1, cutoff=0.5)
                     if len(mid) <= ECHO_LIMIT and len(st.members) <= 5000 else [])
            hint = f' (did you mean "{literal(close[0], ECHO_LIMIT)}"?)' if close else ""
            raise CaseError(f'unknown member "{literal(mid, ECHO_LIMIT)}"{hint}',
                            source=_SOURCE, where=where)
    if case is None:
        case = next(iter(sol.cases))
    if case not in sol.cases:
        raise CaseError(f'no load case "{literal(case, ECHO_LIMIT)}"; the case has: '
                        + literal(", ".join(sol.cases), 4 * ECHO_LIMIT),
                        source=_SOURCE, where="--case")
    X = _misfit_redundants(sol, [member, target])
    col = np.asarray(sol.B @ X[:, 0]).ravel()
    axial = {mid: axial_column(st, topo, mid) for mid in st.members}
    m_name, t_name = literal(member, ECHO_LIMIT), literal(target, ECHO_LIMIT)
    own = float(col[axial[member]])
    if abs(own) <= NO_EFFECT_ROUND_OFF * sensitivity_round_off(sol, member, member, X[:, [0, 0]]):
        raise CaseError(f"a length change of {m_name} locks in no force at all (the structure "
                        f"follows it freely), so it cannot change the force in {t_name}",
                        source=_SOURCE, where="--adjust")
    rate = float(col[axial[target]])
    if abs(rate) <= NO_EFFECT_ROUND_OFF * sensitivity_round_off(sol, target, member, X):
        raise CaseError(f"a length change of {m_name} does not change the force in {t_name} "
                        "(the sensitivity is zero to round-off: the two share no redundant "
                        "load path); adjust another member", source=_SOURCE, where="--adjust")
    s = sol.cases[case].s
    force = float(s[axial[target]])
    change = -force / rate
    before = {mid: float(s[j]) for mid, j in axial.items()}
    after = {mid: float(s[j] + col[j] * change) for mid, j in axial.items()}
    return Adjustment(member, target, case, change, force, rate, before, after,
                      _change_warnings(sol, member, target, change))


def _change_warnings(sol, member: str, target: str, change: float) -> tuple[str, ...]:
    """A warning when the length change exceeds ``SMALL_CHANGE_FRACTION`` of the member's
    length: beyond the small-displacement range the linear answer does not hold."""
    L = sol.structure.length(member)
    if not abs(change) > SMALL_CHANGE_FRACTION * L:
        return ()
    q = quantities(sol.units)
    du, lu = q.displacement_unit, q.length_unit
    how = "longer" if change > 0 else "shorter"
    m_name = literal(member, ECHO_LIMIT)
    return (f"making {m_name} {q.to_output(abs(change), 'displacement'):.4g} {du} {how} "
            f"({100 * abs(change) / L:.3g}% of its length, {q.to_output(L, 'length'):.4g} "
            f"{lu}) is outside "
            "the small-displacement range this analysis assumes (length changes up to "
            f"{100 * SMALL_CHANGE_FRACTION:g}% of the member's length): the force in "
            f"{literal(target, ECHO_LIMIT)} responds too little to {m_name}; the forces after "
            "the change are not reliable",)


# ------------------------------------------------------------------------------ JSON
def _num(x: float) -> float:
    x = float(x)
    return 0.0 if x == 0.0 else x


def study_to_dict(study: FitupStudy, units: UnitSystem) -> dict:
    """The JSON of ``leastwork fitup`` (see docs/studies.md), in the report units: forces in
    the force unit, moments in the moment unit, tolerances and patterns (length errors) in
    the displacement unit."""
    uq = quantities(units)
    Lf = uq.factor("displacement")
    members = list(study.tolerances)
    rep = study.quantities
    out: dict = {
        "tolerances": {m: _num(v / Lf) for m, v in study.tolerances.items()},
        "samples": study.samples,
        "distribution": study.distribution,
        "seed": study.seed,
        "members": {},
        "moments": {},
        "reactions": {},
    }
    w, mc = study.worst, study.stats
    for q, (name, group, dim) in enumerate(zip(rep.names, rep.groups, rep.dims, strict=True)):
        f = uq.factor(dim)
        out[group][name] = {
            "worst": {
                "max": _num(w.max[q] / f),
                "min": _num(w.min[q] / f),
                "pattern_max": {m: _num(e / Lf) for m, e in zip(members, w.pattern_max[q],
                                                                   strict=True)},
                "pattern_min": {m: _num(e / Lf) for m, e in zip(members, w.pattern_min[q],
                                                                   strict=True)},
            },
            "mean": _num(mc.mean[q] / f),
            "std": _num(mc.std[q] / f),
            "std_exact": _num(study.std_exact[q] / f),
            "p05": _num(mc.p05[q] / f),
            "p95": _num(mc.p95[q] / f),
        }
    out["units"] = unit_texts(units)
    return out


def adjustment_to_dict(adj: Adjustment, units: UnitSystem) -> dict:
    """The ``"adjust"`` entry of the JSON, in the report units (the length change in the
    displacement unit, the force per displacement unit of length change)."""
    uq = quantities(units)
    Ff, Lf = uq.factor("force"), uq.factor("displacement")
    top = max([abs(v) for v in (*adj.before.values(), *adj.after.values())] + [0.0])

    def force(v: float) -> float:
        return 0.0 if abs(v) <= _ROUND_OFF * top else _num(v / Ff)

    return {
        "case": adj.case,
        "member": adj.member,
        "zero": adj.target,
        "length_change": _num(adj.change / Lf),
        "force_before": _num(adj.force_before / Ff),
        "force_per_length": _num(adj.rate * Lf / Ff),
        "before": {m: force(v) for m, v in adj.before.items()},
        "after": {m: force(v) for m, v in adj.after.items()},
        "warnings": list(adj.warnings),
    }


def unit_texts(units: UnitSystem) -> dict:
    """The unit texts of the JSON (:mod:`leastwork.output.quantities`)."""
    uq = quantities(units)
    return {"force": uq.force_unit, "length": uq.length_unit, "moment": uq.moment_unit,
            "displacement": uq.displacement_unit}
