"""Symbolic mode: the whole force method in exact arithmetic, parameters kept as symbols.

Semantics
---------
* Every name in the case's ``[parameters]`` table stays a sympy symbol. A symbol stands
  for the parameter's value expressed in the **case units of its dimension**: with
  ``units = { force = "kN", length = "m" }``, ``L = "7.5 m"`` makes ``L`` a length in m,
  ``w = "9 kN/m"`` a line load in kN/m, ``EI = "24000 kN*m^2"`` a stiffness in kN*m^2,
  ``alpha = "1.2e-5 1/K"`` a coefficient in 1/K, an angle ``"30 deg"`` a value in rad,
  and a parameter given as a bare number (``n = 4``) a pure number, read in the case units
  of each field it is used in (as the numeric reader does). A parameter defined by other
  parameters (``rise = "bay/12"``) is a symbol of its own too, unless
  ``expand_derived=True`` replaces it by its definition. Parameter names must be usable
  as sympy symbols (no Python keywords).
* Results are in the case units (forces in the case force unit, moments in force*length,
  displacements in the case length unit, rotations in rad; the flexibility and load
  terms as in the numeric JSON), as expressions in the parameter names.
* Constants written with units (``"200 GPa"``, ``"4.41e7 mm^4"``) become exact rationals in
  the case units, through exact conversion factors (a unit's pint factor read as the
  short decimal it is defined by, or as a rational multiple of pi for degrees); decimal
  numbers such as ``1.2e-5`` become exact rationals (3/250000).
* Geometry may use parameters (node ``["L", 0]``, ``["a", "h"]``); member lengths are
  exact square roots (``sqrt(b**2 + h**2)``), all arithmetic exact.
* The topology (unknowns, rank, degree of indeterminacy, stability, choice of
  redundants) is decided numerically on the ordinary Structure, with the parameters at
  their values, by :mod:`leastwork.topology`. The values of the symbols also decide the
  order of positions along a member (load positions, ends of partial loads), which
  pivots the exact elimination uses, and which root of dm/dx (and on which piece) is a
  moment extreme: each closed form holds for parameter values that keep those orders, as
  the values given do.
* The pipeline is the numeric one in exact arithmetic: equilibrium matrix of the
  released structure solved exactly; span-load fields as exact polynomials per piece
  (point loads, couples, partial linearly varying distributed loads per member length in
  global components); unit-redundant fields; flexibility coefficients delta_ij and load
  terms delta_i0 as exact integrals (bending m_i m_j/EI, axial n_i n_j/EA unless axially
  rigid, shear v_i v_j/GA_s when ``[analysis] shear = true``, springs r_i r_j/k);
  temperature (uniform and gradient), misfit and settlement terms as
  :mod:`leastwork.solve` has them (delta = B'FB, delta0 = B'(F s0 + e - c) + c_R,
  Delta = c_R); delta X = Delta - delta0; superposition; reactions (the same keys as the
  numeric result); member end forces n, v, m; moment extremes m_max/m_min with their
  positions (at member ends, at point loads and piece ends, or at a root of dm/dx); and
  the displacements of ``[analysis] displacements`` (``NODE.x|y|rz``,
  ``MEMBER@DISTANCE.x|y``, ``NODE1-NODE2``) by the unit-load method.
* A redundant with no flexibility (straining only axially rigid parts) is taken as zero
  with a warning, as in the numeric solve; any other singular flexibility matrix, a
  bending moment of degree above three, or a parameter whose units are not made of force,
  length and temperature is refused with a CaseError rather than answered wrongly.
* Every result is simplified: each is one exactly cancelled rational function of the
  parameters, with numerator and denominator factored over the rationals (a numerator of
  more than 30 terms only has its common factors taken out); square roots keep their
  square factors outside. Where dm/dx has a root inside a member, the position is exact
  (a square root for a cubic moment) and so is the moment there; when the parts of that
  moment are large it is given as the sum m0 - m1**2/(4*m2) of its exact parts rather
  than one large fraction. No general-purpose ``sympy.simplify`` is run (its time has no
  bound).
* Irrational numbers are carried through the solve as auxiliary symbols and put back at
  the end: a square root that does not simplify (the length of a sloping member), the
  sine and cosine of a roller angle, pi of an angle in degrees. Each one adds a variable
  to the algebra; a frame with many sloping members at decimal coordinates may therefore
  reach the time limit even without parameters.
* Load combinations are load cases of the factored loads (every nodal, point and
  distributed load, temperature, misfit and settlement of each named case times its
  factor; positions are not scaled), with each factor an exact rational or a parameter
  symbol; ``SymbolicSolution.combinations`` (and ``"combinations"`` in the JSON) gives
  the factors.
* Without named redundants the closed forms use those the numeric solve ends with
  (:func:`leastwork.solve.solve`: the automatic choice, or the member forces it swaps to
  for conditioning), so that they match the numeric sheet.
* The whole solve runs under a time limit (``time_limit``, default 60 s; it must be
  positive: ``math.inf``, or more than 1e7 s, means none). In the main
  thread it is a SIGALRM interval timer; in another thread the solve runs in a forked
  child process that is killed at the limit (see :mod:`.limit`). Past the limit a
  CaseError says that the closed form is beyond reach and suggests solving numerically
  or fixing more parameters as numbers.
* ``SymbolicSolution.to_dict()`` gives the JSON result of the contract with every number
  replaced by a string that ``sympy.sympify`` parses (``"3*L*w/8"``); parse it with the
  parameter symbols as ``locals`` (``SymbolicSolution.parse`` does), because names such as
  ``E``, ``I``, ``N``, ``S`` mean something else to a bare ``sympify``. The JSON also
  lists the parameters with their values and units. The extension ``deflection_max`` of
  the numeric JSON is not given in symbolic mode.
"""

from __future__ import annotations

import dataclasses
import pathlib
from dataclasses import dataclass, field
from typing import Any

from ..errors import CaseError

__all__ = ["solve_symbolic", "SymbolicSolution", "SymbolicCase", "SCHEMA"]

SCHEMA = "leastwork.result/1"


@dataclass
class SymbolicCase:
    """One load case in closed form (sympy expressions, case units).

    ``members`` maps a member id to ``{"start": {"n", "v", "m"}, "end": {...},
    "m_max": {"value", "at"}, "m_min": {"value", "at"}}``; ``reactions`` a support node to
    ``{"x", "y", "rz"}`` (the restrained and spring directions; ``"n"`` for an inclined
    roller); ``flexibility`` is a sympy Matrix in the order of the redundants.
    """

    name: str
    redundants: dict[str, Any]
    flexibility: Any
    load_terms: list
    imposed: list
    reactions: dict[str, dict[str, Any]]
    members: dict[str, dict[str, Any]]
    displacements: dict[str, Any]
    equilibrium_residual: Any = 0  #: largest exact nodal residual (0 when all is well)


@dataclass
class SymbolicSolution:
    """The closed-form solution of a case (see the module docstring for the semantics).

    Attributes
    ----------
    parameters : dict
        name -> sympy Symbol.
    values : dict
        Symbol -> value in case units (float); ``exact_values`` has the exact numbers.
    units : dict
        ``{"force", "length", "moment", "rotation"}`` as in the numeric JSON.
    parameter_units : dict
        name -> unit of the symbol in case units (``"kN/m"``; ``""`` for a pure number,
        ``"rad"`` for an angle).
    combinations : dict
        Combination name -> {load case: exact factor} (``1.35`` is ``27/20``).
    """

    name: str
    source: str
    units: dict[str, str]
    parameters: dict[str, Any]
    values: dict[Any, float]
    exact_values: dict[Any, Any]
    parameter_units: dict[str, str]
    redundant_names: list[str]
    degree: int
    external: int
    internal: int
    stable: bool
    chosen_by_user: bool
    cases: dict[str, SymbolicCase]
    warnings: list[str] = field(default_factory=list)
    #: ``[combinations]``: name -> {load case: exact factor}; each combination is also a
    #: load case of ``cases`` (its loads the factored loads of its cases)
    combinations: dict[str, dict[str, Any]] = field(default_factory=dict)

    # -------------------------------------------------------------- evaluation
    def parse(self, text: str):
        """A result string of :meth:`to_dict` back to an expression in this solution's
        symbols."""
        import sympy

        return sympy.sympify(text, locals=dict(self.parameters))

    def numeric(self, expr) -> float:
        """Value of an expression (or a result string) at the parameter values."""
        import sympy

        e = self.parse(expr) if isinstance(expr, str) else sympy.sympify(expr)
        by_name = {s.name: v for s, v in self.exact_values.items()}
        subs = {s: by_name[s.name] for s in e.free_symbols if s.name in by_name}
        v = sympy.N(e.xreplace(subs), 30)
        if v.free_symbols:
            raise ValueError(f"{expr} has symbols that are not parameters: {v.free_symbols}")
        return float(v)

    # -------------------------------------------------------------- JSON
    def to_dict(self) -> dict:
        """The contract's JSON result, every number a string that sympy parses."""

        def s(x) -> str:
            return str(x)

        cases = {}
        for name, c in self.cases.items():
            k = len(self.redundant_names)
            cases[name] = {
                "redundants": {n: s(v) for n, v in c.redundants.items()},
                "flexibility": [[s(c.flexibility[i, j]) for j in range(k)] for i in range(k)],
                "load_terms": [s(v) for v in c.load_terms],
                "imposed": [s(v) for v in c.imposed],
                "reactions": {n: {d: s(v) for d, v in comps.items()}
                              for n, comps in c.reactions.items()},
                "members": {mid: {
                    "start": {q: s(v) for q, v in r["start"].items()},
                    "end": {q: s(v) for q, v in r["end"].items()},
                    "m_max": {q: s(v) for q, v in r["m_max"].items()},
                    "m_min": {q: s(v) for q, v in r["m_min"].items()},
                } for mid, r in c.members.items()},
                "displacements": {t: s(v) for t, v in c.displacements.items()},
                "checks": {"equilibrium_residual": s(c.equilibrium_residual),
                           "equilibrium_ok": c.equilibrium_residual == 0,
                           "equilibrium_tolerance": "0"},
            }
        return {
            "schema": SCHEMA,
            "mode": "symbolic",
            "name": self.name,
            "units": dict(self.units),
            "parameters": {n: {"value": self.values[sym], "exact": str(self.exact_values[sym]),
                               "unit": self.parameter_units[n]}
                           for n, sym in self.parameters.items()},
            "indeterminacy": {"degree": self.degree, "external": self.external,
                              "internal": self.internal, "stable": self.stable},
            "redundants": list(self.redundant_names),
            "combinations": {name: {case: s(f) for case, f in factors.items()}
                             for name, factors in self.combinations.items()},
            "cases": cases,
            "warnings": list(self.warnings),
        }


def solve_symbolic(
    structure_source: str | pathlib.Path,
    *,
    text: str | None = None,
    redundants: list[str] | None = None,
    extra_displacements: list[str] | tuple[str, ...] = (),
    time_limit: float = 60.0,
    expand_derived: bool = False,
    numeric_redundants: list[str] | None = None,
) -> SymbolicSolution:
    """Solve a case in closed form.

    Parameters
    ----------
    structure_source : str or Path
        The case file; with ``text``, only the name used in messages.
    text : str, optional
        The case as TOML text instead of reading the file.
    redundants : list of str, optional
        Redundants to use (as ``--redundants``); default the case's own, else those the
        numeric solve (:func:`leastwork.solve.solve`) ends with: its automatic choice,
        swapped for member forces when that is much better conditioned.
    extra_displacements : list of str
        Displacement targets to add (as ``--at``).
    time_limit : float
        Seconds, positive (``math.inf``, or more than :data:`.limit.NO_TIMER_ABOVE`: no
        limit); past it a CaseError is raised.
    expand_derived : bool
        Replace parameters defined by other parameters with their definitions.
    numeric_redundants : list of str, optional
        The redundants a numeric solve of this case ended with
        (``Solution.redundant_names``), used when neither ``redundants`` nor the case
        names any, instead of solving numerically again to find them.

    Raises
    ------
    CaseError
        The case is wrong, not supported in symbolic mode, or beyond the time limit.
    MechanismError
        The structure or the released structure is unstable.
    ValueError
        ``time_limit`` is not a positive number of seconds.
    """
    from .limit import run_bounded

    limit = float(time_limit)
    if not limit > 0:  # also NaN
        raise ValueError(f"time_limit must be a positive number of seconds (math.inf for "
                         f"no limit), not {time_limit!r}")
    source = str(structure_source)
    message = (f"the closed form of this case is beyond reach within {time_limit:g} s; "
               "solve it numerically or fix more parameters as numbers")

    def work(tick):
        body = text
        if body is None:
            p = pathlib.Path(structure_source)
            try:
                body = p.read_text(encoding="utf-8")
            except FileNotFoundError:
                raise CaseError("no such file", source=source) from None
            except IsADirectoryError:
                raise CaseError("is a folder, expected a case file (.toml)",
                                source=source) from None
            except (OSError, UnicodeDecodeError) as exc:
                raise CaseError(f"cannot be read ({exc})", source=source) from None
        return _solve(body, source, redundants, tuple(extra_displacements), expand_derived,
                      tick, numeric_redundants)

    return run_bounded(work, limit, message, source)


def _solve(text: str, source: str, redundants, extra: tuple[str, ...], expand_derived: bool,
           tick, numeric_redundants=None) -> SymbolicSolution:
    from ..displacements import parse_target
    from ..io.record import read_case_record
    from ..topology import build_topology, choose_redundants
    from .exact import read_exact
    from .finish import Finisher, unit_text
    from .pipeline import run_pipeline

    st, record = read_case_record(text, source)
    own = st.displacements
    if extra:
        st = dataclasses.replace(st, displacements=tuple(dict.fromkeys([*own, *extra])))
    topo = build_topology(st)
    for t in st.displacements:
        parse_target(st, topo, t, "[analysis] displacements" if t in own else "--at")
    names = list(redundants) if redundants is not None else st.redundants
    where = "--redundants" if redundants is not None else "[analysis] redundants"
    red = choose_redundants(st, topo, names, where=where)
    notes = []
    if names is None:
        red, notes = _as_numeric_solve(st, topo, red, numeric_redundants)
    tick()
    model = read_exact(st, record, expand_derived=expand_derived)
    tick()
    ex = run_pipeline(st, topo, red, model, tick)
    fin = Finisher(ex.alg, tick)
    red_names = [topo.columns[j].name for j in red]
    import sympy

    flex = sympy.Matrix(len(red), len(red), lambda i, j: fin(ex.flexibility[i][j]))
    cases = {}
    for name, c in ex.cases.items():

        def f(v, c=c):
            return fin(v, c.closure)

        cases[name] = SymbolicCase(
            name=name,
            redundants={n: f(v) for n, v in zip(red_names, c.redundants)},
            flexibility=flex,
            load_terms=[f(v) for v in c.load_terms],
            imposed=[f(v) for v in c.imposed],
            reactions={n: {d: f(v) for d, v in comps.items()}
                       for n, comps in c.reactions.items()},
            members={mid: {part: {q: f(v) for q, v in r[part].items()}
                           for part in ("start", "end", "m_max", "m_min")}
                     for mid, r in c.members.items()},
            displacements={t: f(v) for t, v in c.displacements.items()},
            equilibrium_residual=_largest(f, c.equilibrium_residual, ex.alg),
        )
    params = dict(model.parameters)
    return SymbolicSolution(
        name=st.name, source=source,
        units={"force": st.units.force, "length": st.units.length,
               "moment": f"{st.units.force}*{st.units.length}", "rotation": "rad"},
        parameters=params,
        values={sym: float(model.values[sym]) for sym in params.values()},
        exact_values={sym: model.values[sym] for sym in params.values()},
        parameter_units={n: unit_text(st.units, model.dimensions[n],
                                      _is_angle(record.parameters[n]))
                         for n in params},
        redundant_names=red_names, degree=topo.degree, external=topo.external,
        internal=topo.internal, stable=topo.stable, chosen_by_user=names is not None,
        cases=cases, warnings=notes + list(ex.warnings),
        combinations={name: {case: sympy.sympify(f) for case, f in factors.items()}
                      for name, factors in model.combinations.items()},
    )


def _as_numeric_solve(st, topo, first: list[int], numeric: list[str] | None):
    """The redundants the numeric solve ends with when none are named (its automatic
    choice ``first``, or the better-conditioned member forces it swaps to), so that the
    closed forms and the numeric sheet share them; and a note if they are not ``first``.
    ``numeric``: the numeric solve's names when it has been run already."""
    from ..solve import solve
    from ..topology import choose_redundants

    if numeric is not None:
        red = choose_redundants(st, topo, list(numeric), where="the numeric solve's redundants")
    else:
        red = solve(st, None, verify=False, basis="released").redundant_columns
    if sorted(red) == sorted(first):
        return list(red), []
    names = ", ".join(topo.columns[j].name for j in red)
    return list(red), [f"redundants {names} are used, as in the numeric solve (the automatic "
                       f"choice {', '.join(topo.columns[j].name for j in first)} gives an "
                       "ill-conditioned flexibility matrix in floating point)"]


def _is_angle(q) -> bool:
    from ..model.units import _has_angle

    return bool(q.dimensionless and _has_angle(q))


def _largest(fin, residuals: list, alg):
    """The exact nodal residual with the largest value (0 when all vanish)."""
    nonzero = [r for r in residuals if r]
    if not nonzero:
        return 0
    return fin(max(nonzero, key=lambda r: abs(alg.num(r))))
