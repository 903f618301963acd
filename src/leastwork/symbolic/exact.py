"""Exact reading of a case: every quantity as a sympy expression in the case units.

Each quantity is read from the text as written in the case file (see
:class:`leastwork.io.record.CaseRecord`), with the same expression grammar and unit names as
the numeric reader (pint's tokenizer), but evaluated in exact arithmetic: a decimal number
such as ``1.2e-5`` becomes the rational 3/250000, a unit becomes its exact conversion factor
to SI (``mm`` is 1/1000 m, ``deg`` is pi/180 rad), and a ``[parameters]`` name becomes a
sympy symbol that stands for the parameter's value in the case units of its dimension.

Every exact value is checked against the numeric reader's SI value, so that both readings
always agree at the parameter values.
"""

from __future__ import annotations

import keyword
import math
import operator
from dataclasses import dataclass, field
from functools import lru_cache
from typing import Any

import sympy
from sympy import Rational

from ..errors import CaseError
from ..loadkinds import load_kind
from ..model import Structure
from ..model.units import DIMENSIONS, UnitSystem, ureg

__all__ = ["ExactModel", "read_exact", "exact_number", "exact_factor", "case_factor"]

#: SI base units pint reduces force, length and temperature to
_BASE = ("kilogram", "meter", "second", "kelvin")
#: pint names of the dimensions a parameter may have
_PINT_DIMS = {"[mass]", "[length]", "[time]", "[temperature]"}
_AGREE_RTOL = 1e-9
#: names the results are written with: a parameter of that name could not be read back
_RESERVED = frozenset({"sqrt", "sin", "cos", "tan", "pi", "exp", "log"})


@lru_cache(maxsize=1)
def _unit_symbols() -> dict[str, sympy.Symbol]:
    """Private positive symbols for the SI base units."""
    return {name: sympy.Symbol(f"_unit_{name}", positive=True) for name in _BASE}


def exact_number(x: int | float) -> sympy.Expr:
    """An int or a float from the TOML file as an exact rational (1.2e-05 -> 3/250000)."""
    if isinstance(x, bool):
        raise TypeError("a boolean is not a number")
    if isinstance(x, int):
        return sympy.Integer(x)
    return Rational(repr(float(x)))


def exact_factor(f: float) -> sympy.Expr:
    """A unit conversion factor from pint (a float) as an exact number.

    A short decimal (1000.0, 0.001, 0.3048, 4.4482216152605) is taken as written; a
    rational multiple of pi (a degree is pi/180) as that multiple; anything else is the
    15-digit decimal of the float.
    """
    if f == 0.0:
        return sympy.Integer(0)
    short = Rational(f"{f:.12g}")
    if abs(float(short) - f) <= 1e-15 * abs(f):
        return short
    from fractions import Fraction

    r = Fraction(f / math.pi).limit_denominator(10**6)
    if abs(float(r) * math.pi - f) <= 1e-14 * abs(f):
        return Rational(r.numerator, r.denominator) * sympy.pi
    return Rational(f"{f:.15g}")


@lru_cache(maxsize=512)
def _unit_expr(name: str) -> sympy.Expr:
    """One unit name (``kN``, ``mm``, ``deg``) as its exact SI factor times base-unit
    symbols; the radian is 1 (an angle is a pure number)."""
    reg = ureg()
    q = reg.Quantity(1, reg.get_name(name)).to_base_units()
    out = exact_factor(float(q.magnitude))
    syms = _unit_symbols()
    for unit, power in q._units.items():
        p = Rational(repr(float(power)))
        if unit == "radian":
            continue
        sym = syms.get(unit) or sympy.Symbol(f"_unit_{unit}", positive=True)
        out = out * sym**p
    return out


def _dimension_of(exponents: tuple[int, int, int]) -> sympy.Expr:
    """Base-unit symbols of force^f * length^l * temperature^t (SI, factor 1)."""
    f, l, t = exponents
    s = _unit_symbols()
    force = s["kilogram"] * s["meter"] / s["second"] ** 2
    return force**f * s["meter"] ** l * s["kelvin"] ** t


def case_factor(units: UnitSystem, exponents: tuple[int, int, int]) -> sympy.Expr:
    """Exact SI value of one case unit of force^f * length^l * temperature^t."""
    f, l, _ = exponents
    ones = {s: sympy.S.One for s in _unit_symbols().values()}
    force = _unit_expr(units.force).xreplace(ones)
    length = _unit_expr(units.length).xreplace(ones)
    return force**f * length**l


def _exponents(dimension: str) -> tuple[int, int, int]:
    f, l, t, _ = DIMENSIONS[dimension]
    return (f, l, t)


@dataclass
class ExactModel:
    """The exact values of a case, in case units, beside its numeric :class:`Structure`.

    Attributes
    ----------
    parameters : dict
        name -> sympy Symbol (positive when its value is positive).
    values : dict
        Symbol -> exact value in case units (a sympy number).
    dimensions : dict
        name -> (force, length, temperature) exponents of the parameter; (0, 0, 0) for a
        pure number (read in the case units of the field it is used in) or an angle (rad).
    nodes : dict
        node id -> (x, y).
    members : dict
        member id -> {"EA", "EI", "GAs", "alpha", "depth"}: expressions or None.
    springs : dict
        restraint name ("B.y") -> stiffness.
    angles : dict
        support node -> surface angle of an inclined roller (rad).
    loads : list of dict
        Parallel to ``Structure.loads``: the exact fields of each load, the factored loads
        of the combinations included.
    combinations : dict
        Combination name -> {load case: exact factor}.
    """

    parameters: dict[str, sympy.Symbol]
    values: dict[sympy.Symbol, sympy.Expr]
    dimensions: dict[str, tuple[int, int, int]]
    nodes: dict[str, tuple[sympy.Expr, sympy.Expr]] = field(default_factory=dict)
    members: dict[str, dict[str, sympy.Expr | None]] = field(default_factory=dict)
    springs: dict[str, sympy.Expr] = field(default_factory=dict)
    angles: dict[str, sympy.Expr] = field(default_factory=dict)
    loads: list[dict[str, Any]] = field(default_factory=list)
    #: combination name -> {load case: exact factor}
    combinations: dict[str, dict[str, sympy.Expr]] = field(default_factory=dict)


class _Evaluator:
    """Exact evaluation of quantity strings, with the parameters bound as symbols."""

    def __init__(self, st: Structure, record, expand_derived: bool):
        self.st = st
        self.units = st.units
        self.record = record
        self.source = st.source
        raw = record.data.get("parameters", {}) or {}
        self.raw_params: dict[str, Any] = dict(raw)
        self.numeric_params: dict[str, Any] = dict(record.parameters)
        self.symbols: dict[str, sympy.Symbol] = {}
        self.values: dict[sympy.Symbol, sympy.Expr] = {}
        self.dimensions: dict[str, tuple[int, int, int]] = {}
        self._exact_si: dict[str, sympy.Expr] = {}  # name -> exact value with base units
        self._binding: dict[str, sympy.Expr] = {}  # name -> what the name stands for
        for name in self.raw_params:
            self._parameter(name)
        for name in self.raw_params:
            self._binding[name] = self._bind(name, expand_derived, [])

    # ------------------------------------------------------------ parameters
    def err(self, where: str, message: str) -> CaseError:
        return CaseError(message, source=self.source, where=where)

    def _parameter(self, name: str) -> None:
        where = f"[parameters] {name}"
        if keyword.iskeyword(name) or not name.isidentifier() or name in _RESERVED:
            raise self.err(where, f'the name "{name}" cannot be a symbol in symbolic mode '
                           "(it is a Python keyword, starts with a digit, or names a "
                           "function the results use); rename it")
        q = self.numeric_params[name]
        exps = self._parameter_exponents(q, where)
        self.dimensions[name] = exps
        exact = self._exact_value(name, [])
        value = self._in_case_units(exact, q, exps)
        num = float(value)
        assumptions = {"positive": True} if num > 0 else ({"negative": True} if num < 0
                                                          else {"real": True})
        sym = sympy.Symbol(name, **assumptions)
        self.symbols[name] = sym
        self.values[sym] = value

    def _parameter_exponents(self, q, where: str) -> tuple[int, int, int]:
        dims = dict(q.dimensionality)
        if any(k not in _PINT_DIMS for k in dims):
            raise self.err(where, f"its units ({q.units:~}) are not made of force, length and "
                           "temperature; symbolic mode cannot keep it as a symbol")
        mass = dims.get("[mass]", 0)
        length = dims.get("[length]", 0)
        time = dims.get("[time]", 0)
        temp = dims.get("[temperature]", 0)
        if time != -2 * mass or any(float(v) != int(v) for v in (mass, length, temp)):
            raise self.err(where, f"its units ({q.units:~}) are not made of force, length and "
                           "temperature; symbolic mode cannot keep it as a symbol")
        return (int(mass), int(length - mass), int(temp))

    def _exact_value(self, name: str, busy: list[str]) -> sympy.Expr:
        """The parameter's exact value with base units, all other parameters expanded."""
        if name in self._exact_si:
            return self._exact_si[name]
        raw = self.raw_params[name]
        if isinstance(raw, str):
            deps = {n: self._exact_value(n, [*busy, name]) for n in self._names_in(raw)}
            value = self.evaluate(raw, deps, f"[parameters] {name}")
        else:
            value = exact_number(raw)
        self._exact_si[name] = value
        return value

    def _names_in(self, text: str) -> list[str]:
        import re

        return [n for n in dict.fromkeys(re.findall(r"[A-Za-z_][A-Za-z0-9_]*", text))
                if n in self.raw_params]

    def _in_case_units(self, exact: sympy.Expr, q, exps: tuple[int, int, int]) -> sympy.Expr:
        ones = {s: sympy.S.One for s in _unit_symbols().values()}
        mag = exact.xreplace(ones)
        if exps == (0, 0, 0):
            return mag  # a pure number, or an angle in rad
        return mag / case_factor(self.units, exps)

    def _bind(self, name: str, expand: bool, busy: list[str]) -> sympy.Expr:
        """What ``name`` stands for inside an expression: its symbol times its case unit,
        or (``expand``) the expression it is defined by."""
        raw = self.raw_params[name]
        sym = self.symbols[name]
        exps = self.dimensions[name]
        deps = self._names_in(raw) if isinstance(raw, str) else []
        if expand and deps:
            bound = {n: self._bind(n, expand, [*busy, name]) for n in deps}
            value = self.evaluate(raw, bound, f"[parameters] {name}")
            if exps == (0, 0, 0) and not self._dimensionless_angle(name):
                return value.xreplace({s: sympy.S.One for s in _unit_symbols().values()})
            return value
        if exps == (0, 0, 0):
            return sym
        return sym * case_factor(self.units, exps) * _dimension_of(exps)

    def _dimensionless_angle(self, name: str) -> bool:
        from ..model.units import _has_angle

        return bool(_has_angle(self.numeric_params[name]))

    # ------------------------------------------------------------ expressions
    def evaluate(self, text: str, bindings: dict[str, sympy.Expr], where: str) -> sympy.Expr:
        """The exact value of ``text`` with base-unit symbols (pint's grammar)."""
        from pint import pint_eval
        from pint.util import string_preprocessor

        reg = ureg()
        s = text.strip()
        for p in reg.preprocessors:
            s = p(s)
        s = string_preprocessor(s)

        def define(token):
            kind, tok = token[0], token[1]
            if kind == pint_eval.tokenlib.NUMBER:
                return Rational(tok)
            if tok == "dimensionless":
                return sympy.Integer(1)
            if tok in bindings:
                return bindings[tok]
            if tok.lower() in ("inf", "infinity", "nan"):
                raise self.err(where, f'"{text}" is not finite')
            return _unit_expr(tok)

        ops = {"**": operator.pow, "*": operator.mul, "": operator.mul,
               "/": operator.truediv, "+": operator.add, "-": operator.sub}
        try:
            tree = pint_eval.build_eval_tree(pint_eval.tokenizer(s))
            return sympy.sympify(tree.evaluate(define, bin_op=ops))
        except CaseError:
            raise
        except Exception as exc:  # an operator beyond + - * / ** (%, //, +/-)
            raise self.err(where, f'cannot read "{text}" exactly ({exc.__class__.__name__}: '
                           f"{exc}); symbolic mode takes + - * / ** and units") from None

    def field(self, where: str) -> sympy.Expr:
        """The exact value, in case units, of the quantity read at ``where``."""
        if where not in self.record.fields:
            raise RuntimeError(f"the reader recorded no quantity at {where!r}")
        raw, dimension = self.record.fields[where]
        if not isinstance(raw, str):
            return exact_number(raw)
        from ..model.units import _has_angle

        value = self.evaluate(raw, self._binding, where)
        q = self._numeric(raw)
        mag = value.xreplace({s: sympy.S.One for s in _unit_symbols().values()})
        if bool(q.dimensionless) and (not _has_angle(q) or dimension == "angle"):
            return mag  # a pure number in case units, or an angle in rad
        return mag / case_factor(self.units, _exponents(dimension))

    def _numeric(self, text: str):
        """The numeric reader's own pint quantity for ``text`` (its units decide how a
        value without units is read)."""
        reg = ureg()
        values = {n: self.numeric_params[n] for n in self._names_in(text)}
        q = reg.parse_expression(text.strip(), **values)
        if not hasattr(q, "magnitude"):
            q = reg.Quantity(float(q), "")
        return q


def _refuse_what_has_no_closed_form(st: Structure) -> None:
    """A CaseError for what the exact path does not take: live-load patterns, one-way
    members and supports, semi-rigid joints, loads written in member axes or per projection,
    self-weight and tapered beams."""
    if st.patterns:
        raise CaseError("symbolic mode does not take [patterns] yet: solve numerically",
                        source=st.source)
    one_way = [m.id for m in st.members.values() if m.acts != "both"]
    one_way += [f"support {s.node}" for s in st.supports.values() if s.acts != "both"]
    if one_way:
        raise CaseError(f"symbolic mode does not take one-way members and supports "
                        f"({', '.join(one_way[:4])}{' ...' if len(one_way) > 4 else ''}): "
                        "which of them act depends on the numbers; solve numerically",
                        source=st.source)
    sprung = [m.id for m in st.members.values() if any(k is not None for k in m.end_springs)]
    if sprung:
        raise CaseError(f"symbolic mode does not take semi-rigid joints yet (end_springs on "
                        f"{', '.join(sprung[:4])}{' ...' if len(sprung) > 4 else ''}): solve "
                        "numerically", source=st.source)
    for ld in st.loads:
        if getattr(ld, "written", ""):
            raise CaseError(f"symbolic mode does not take this load yet ({ld.written}): "
                            "member-local components, loads per unit projected length and "
                            "self-weight are solved numerically only", source=st.source)
    for mid, m in st.members.items():
        if m.taper is not None:
            raise CaseError("--symbolic has no closed forms for tapered beams (their energy "
                            "is integrated numerically); solve without --symbolic",
                            source=st.source, where=f"[beams] {mid}.taper")


def read_exact(st: Structure, record, *, expand_derived: bool = False) -> ExactModel:
    """The exact model of a case read with :func:`leastwork.io.record.read_case_record`.

    Raises CaseError where a value cannot be represented exactly, and RuntimeError if an
    exact value disagrees with the numeric reader (a bug).
    """
    _refuse_what_has_no_closed_form(st)
    ev = _Evaluator(st, record, expand_derived)
    model = ExactModel(dict(ev.symbols), dict(ev.values), dict(ev.dimensions))
    values = ev.values
    units = st.units
    fields = record.fields

    def get(where: str, si: float | None, dimension: str) -> sympy.Expr:
        expr = ev.field(where)
        if si is not None:
            _agree(expr, si, dimension, where, values, units)
        return expr

    for nid, node in st.nodes.items():
        model.nodes[nid] = (get(f"[nodes] {nid}[0] (x)", node.x, "length"),
                            get(f"[nodes] {nid}[1] (y)", node.y, "length"))
    data = record.data
    defaults = data.get("defaults", {}) or {}
    for mid, m in st.members.items():
        spec = (data.get(m.kind + "s") or {})[mid]
        where = f"[{m.kind}s] {mid}"
        mat = spec.get("material", defaults.get("material"))
        sec = spec.get("section", defaults.get("section"))
        mw, sw = f"[materials.{mat}]", f"[sections.{sec}]"

        def prop(key: str, si, dimension: str, alternatives, where=where) -> sympy.Expr | None:
            if si is None:
                return None
            if f"{where}.{key}" in fields:
                return get(f"{where}.{key}", si, dimension)
            a, b = alternatives
            if a in fields and (b is None or b in fields):
                expr = ev.field(a) * (ev.field(b) if b else 1)
                _agree(expr, si, dimension, f"{where} ({key})", values, units)
                return expr
            raise RuntimeError(f"{where}: cannot find the source of {key}")

        model.members[mid] = {
            "EA": prop("EA", m.EA, "axial stiffness", (f"{mw} E", f"{sw} A")),
            "EI": prop("EI", m.EI, "flexural stiffness", (f"{mw} E", f"{sw} I")),
            "GAs": prop("GAs", m.GAs, "axial stiffness", (f"{mw} G", f"{sw} shear_area")),
            "alpha": prop("alpha", m.alpha, "thermal expansion coefficient",
                          (f"{mw} alpha", None)),
            "depth": prop("depth", m.depth, "length", (f"{sw} depth", None)),
        }
    for nid, sup in st.supports.items():
        if sup.surface_angle is not None:
            model.angles[nid] = get(f"[supports] {nid}.surface_angle", sup.surface_angle,
                                    "angle")
        for r in sup.restraints:
            if r.is_spring:
                dim = "rotational stiffness" if r.direction == "rz" else "force/length"
                model.springs[r.name] = get(f"[supports] {nid}.springs.{r.direction}",
                                            r.stiffness, dim)
    entries = data.get("loads") or []
    base = st.loads[:len(entries)]
    for i, ld in enumerate(base, start=1):
        w = f"[[loads]] #{i}"
        model.loads.append(_exact_load(ld, w, get, fields))
    combined = _combination_loads(st, base, list(model.loads), ev, values, units)
    model.combinations = {name: factors for name, factors, _ in combined}
    for _, _, loads in combined:
        model.loads.extend(loads)
    if len(model.loads) != len(st.loads):
        raise RuntimeError(f"{len(st.loads)} loads read, {len(model.loads)} made exact")
    return model


def _combination_loads(st: Structure, base, exact_base: list, ev, values, units) -> list:
    """``(name, {case: factor}, exact loads)`` of each ``[combinations]`` entry, in the
    order the reader appended the factored loads to ``Structure.loads`` (for each case of
    the combination, its loads in file order), each factor exact (``1.35`` is 27/20; a
    parameter stays a symbol) and each factored load checked against the reader's."""
    out = []
    k = len(base)
    for name, parts in st.combinations:
        factors: dict[str, sympy.Expr] = {}
        loads: list[dict[str, Any]] = []
        for case, factor in parts:
            where = f"[combinations] {name}.{case}"
            f = ev.field(where)
            _agree(f, factor, "number", where, values, units)
            factors[case] = f
            for ld, exact in zip(base, exact_base):
                if ld.case != case:
                    continue
                scaled = _scaled_load(ld, exact, f)
                _check_scaled(st.loads[k], scaled, f"{where} (load of case {case})",
                              values, units)
                loads.append(scaled)
                k += 1
        out.append((name, factors, loads))
    return out


#: Fields of a load kind's values that are positions: they do not scale with a factor.
_POSITIONS = ("at", "start", "end")

#: Dimension of each scaled field of a load kind's values (a settlement's by direction).
_DIMENSION = {"fx": "force", "fy": "force", "mz": "moment", "wx": "force/length",
              "wy": "force/length", "uniform": "temperature difference",
              "gradient": "temperature difference", "elongation": "length"}


def _scale(v, f):
    """``v`` times ``f``: a number, a [start, end] pair, or (direction, value) pairs."""
    if isinstance(v, tuple) and len(v) == 2 and isinstance(v[0], str):
        return (v[0], f * v[1])
    if isinstance(v, (list, tuple)):
        return type(v)(_scale(x, f) for x in v)
    return f * v


def _scaled_load(ld, exact: dict[str, Any], f: sympy.Expr) -> dict[str, Any]:
    """The exact fields of ``ld`` times ``f`` (as the load's own ``scaled``: intensities,
    temperatures, misfits and settlements scale; positions do not)."""
    return {k: (v if k in _POSITIONS or v is None else _scale(v, f)) for k, v in exact.items()}


def _pairs(key: str, exact, value) -> list[tuple[Any, float, str]]:
    """(exact, SI value, dimension) of every number of one scaled field."""
    if isinstance(value, (list, tuple)):
        if value and isinstance(value[0], tuple):  # settlement: (direction, value) pairs
            return [(e, v, "angle" if d == "rz" else "length")
                    for (d, e), (_, v) in zip(exact, value)]
        return [(e, v, _DIMENSION[key]) for e, v in zip(exact, value)]
    return [(exact, value, _DIMENSION[key])]


def _check_scaled(ld, exact: dict[str, Any], where: str, values, units) -> None:
    """Check the exact factored load against the reader's factored load (SI)."""
    for key, value in load_kind(ld).values(ld).items():
        if key in _POSITIONS or value is None:
            continue
        for expr, si, dimension in _pairs(key, exact[key], value):
            _agree(sympy.sympify(expr), si, dimension, where, values, units)


def _exact_load(ld, w: str, get, fields) -> dict[str, Any]:
    """The exact values of one load (case units), as its kind reads them."""
    return load_kind(ld).exact(ld, w, get, fields)


def _agree(expr: sympy.Expr, si: float, dimension: str, where: str, values, units) -> None:
    """Check an exact value (case units) against the numeric reader's SI value."""
    exact = sympy.N(expr.xreplace(values), 30)
    if exact.free_symbols:
        raise RuntimeError(f"{where}: exact value {expr} has unknown symbols")
    value = float(exact) * units.factor(dimension)
    if abs(value - si) > _AGREE_RTOL * max(abs(si), 1e-300) and abs(value - si) > 1e-300:
        raise RuntimeError(f"{where}: exact value {expr} = {value!r} (SI) disagrees with the "
                           f"numeric reading {si!r}")
