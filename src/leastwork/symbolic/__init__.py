"""Symbolic mode: the whole force method in exact arithmetic, parameters kept as symbols.

The names of ``[parameters]`` stay sympy symbols (each in the case units of its
dimension); the topology and the redundants are those of the numeric solve; the pipeline
(:mod:`.pipeline`) runs over the exact field of :mod:`.algebra`; every result is one
cancelled rational function of the parameters, factored (:mod:`.presentation`); the whole
solve runs under a time limit (:mod:`.time_limit`); the JSON is written with the outputs
(:func:`leastwork.output.closed_forms.closed_forms_json`). The full semantics — units of
the symbols, exact constants, what decides orders and extremes, what is refused,
combinations, the JSON — are in docs/symbolic.md ("Semantics").
"""

from __future__ import annotations

import dataclasses
import pathlib
from dataclasses import dataclass, field
from typing import Any

__all__ = ["solve_symbolic", "SymbolicSolution", "SymbolicCase"]


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

    def to_dict(self) -> dict:
        """The contract's JSON result, every closed form a string that sympy parses
        (:func:`leastwork.output.closed_forms.closed_forms_json`)."""
        from ..output.closed_forms import closed_forms_json

        return closed_forms_json(self)


def solve_symbolic(
    structure_source: str | pathlib.Path,
    *,
    text: str | None = None,
    read: tuple | None = None,
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
    read : tuple, optional
        The case already read: ``(Structure, CaseRecord)`` of
        :func:`leastwork.io.record.read_case_record` (neither file nor text is read).
    redundants : list of str, optional
        Redundants to use (as ``--redundants``); default the case's own, else those the
        numeric solve (:func:`leastwork.solve.solve`) ends with: its automatic choice,
        swapped for member forces when that is much better conditioned.
    extra_displacements : list of str
        Displacement targets to add (as ``--at``).
    time_limit : float
        Seconds, positive (``math.inf``, or more than :data:`.time_limit.NO_TIMER_ABOVE`: no
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
    from .time_limit import run_bounded

    limit = float(time_limit)
    if not limit > 0:  # also NaN
        raise ValueError(f"time_limit must be a positive number of seconds (math.inf for "
                         f"no limit), not {time_limit!r}")
    source = str(structure_source)
    message = (f"the closed form of this case is beyond reach within {time_limit:g} s; "
               "solve it numerically or fix more parameters as numbers")

    def work(tick):
        from ..io.files import read_case_text
        from ..io.record import read_case_record

        case = read or read_case_record(read_case_text(structure_source) if text is None
                                        else text, source)
        return _solve(*case, source, redundants, tuple(extra_displacements), expand_derived,
                      tick, numeric_redundants)

    return run_bounded(work, limit, message, source)


def _solve(st, record, source: str, redundants, extra: tuple[str, ...], expand_derived: bool,
           tick, numeric_redundants=None) -> SymbolicSolution:
    from ..displacements import parse_target
    from ..topology import build_topology, choose_redundants
    from .exact import read_exact
    from .pipeline import run_pipeline
    from .presentation import Presenter, unit_text

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
    fin = Presenter(ex.alg, tick)
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
        # closed forms stay in the case's force and length units, whatever output units
        # the case names for displacements or moments (docs/json-result.md)
        units={"force": st.units.force, "length": st.units.length,
               "moment": f"{st.units.force}*{st.units.length}", "rotation": "rad",
               "displacement": st.units.length},
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
