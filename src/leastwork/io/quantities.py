"""The quantities of one case in SI units: numbers in the case units, strings with units,
expressions of the ``[parameters]``, within the bounds a hostile file cannot pass.

A plain "NUMBER UNIT" string takes a short way to the same value as the full expression
parser (:func:`leastwork.model.units.parse_quantity`); every string is read once per dimension.
"""

from __future__ import annotations

import math
import re
from typing import Any

from ..errors import CaseError
from ..model.units import (
    QUANTITY_LIMIT,
    QuantityError,
    UnitSystem,
    _has_angle,
    example_for,
    parse_quantity,
    ureg,
)
from ..plaintext import ECHO_LIMIT, literal
from .messages import as_float, hint, kind_of, shown

__all__ = ["QuantityReader", "EXPRESSION_LIMIT", "PARAMETER_CHAIN_LIMIT", "SI_LIMIT"]

#: Most quantity strings of one case read by the full expression parser (about 0.3 ms
#: each): distinct strings other than a plain "NUMBER UNIT" ("2.5 m", "24000 kN*m^2"), which
#: are read at a small part of that cost, and other than repeats, which are read once.
EXPRESSION_LIMIT = 10_000
#: Longest chain of parameters defined through each other (a = "2*b", b = "c + 1 m", ...).
PARAMETER_CHAIN_LIMIT = 50
#: no real quantity is this large in SI units (or, for a stiffness, this small); beyond it
#: the arithmetic of the force method would overflow
SI_LIMIT = 1e30
#: A plain "NUMBER UNIT" quantity string, read without the general parser (see
#: QuantityReader._simple)
_UNIT = r"[^\W\d]\w*(?:\s*(?:\*\*|\^)\s*[1-9])?"
_SIMPLE = re.compile(r"\s*([-+]?(?:(?:0|[1-9]\d*)(?:\.\d*)?|\.\d+)(?:[eE][-+]?\d+)?)\s*"
                     rf"({_UNIT}(?:\s*[*/]\s*{_UNIT})*)\s*")
_NAME = re.compile(r"[^\W\d]\w*")
_UNKNOWN = object()


class QuantityReader:
    """The quantities of one case file: its units, its parameters and the values read."""

    def __init__(self, source: str):
        self.source = source
        self.units = UnitSystem()
        self._param_raw: dict[str, Any] = {}
        self._param_val: dict[str, Any] = {}
        self._param_busy: list[str] = []
        #: where -> (value as written, dimension) of every quantity read, when asked for
        self.record: dict[str, tuple[Any, str]] | None = None
        #: SI value of each quantity string already read, per dimension: a large generated
        #: case repeats the same few strings thousands of times, and the unit parser costs
        #: far more than the lookup (the parameters are fixed for the file, so the same text
        #: always means the same value)
        self._si_cache: dict[tuple[str, str], float] = {}
        #: SI factor of one unit per dimension, or None, for :meth:`_simple`
        self._unit_factor: dict[tuple[str, str], float | None] = {}
        #: quantity strings read by the full parser so far (see EXPRESSION_LIMIT)
        self._readings = 0

    def err(self, where: str, message: str) -> CaseError:
        """The located error; ``where`` may hold ids from the file, so it is shown literally
        and cut."""
        return CaseError(message, source=self.source, where=literal(where, 2 * ECHO_LIMIT))

    @property
    def parameters(self) -> dict[str, Any]:
        """Each parameter read so far with its value (a pint quantity)."""
        return dict(self._param_val)

    def define_parameters(self, params: dict[str, Any]) -> None:
        """Take the ``[parameters]`` table (names already checked) and read every value."""
        self._param_raw = dict(params)
        for pname in params:
            self.parameter(pname, f"[parameters] {pname}")

    def quantity(self, value: Any, dimension: str, where: str) -> float:
        """A number in case units, or a string with units / an expression of parameters."""
        if isinstance(value, bool) or not isinstance(value, (int, float, str)):
            raise self.err(
                where, f"expected a {dimension} (a number or a string such as "
                f"{example_for(dimension)}), got {kind_of(value)}"
            )
        cached = self._si_cache.get((value, dimension)) if isinstance(value, str) else None
        if cached is not None:
            if self.record is not None:
                self.record[where] = (value, dimension)
            return cached
        si = self._simple(value, dimension) if isinstance(value, str) else None
        if si is None:
            q = self._parse_expression(value, where) if isinstance(value, str) else as_float(value)
            try:
                si = self.units.to_si(q, dimension)
            except (ValueError, ArithmeticError) as exc:
                raise self.err(where, str(exc) if isinstance(exc, ValueError) else
                               f"{shown(value)}: the conversion to SI units overflows") from None
        if not math.isfinite(si):
            raise self.err(where, f"expected a finite {dimension}, got {shown(value)}")
        if abs(si) > SI_LIMIT:
            raise self.err(where, f"{shown(value)} is beyond any sensible {dimension} (more "
                           f"than {SI_LIMIT:g} in SI units); check the value and its units")
        if self.record is not None:
            self.record[where] = (value, dimension)
        if isinstance(value, str):
            self._si_cache[(value, dimension)] = si
        return si

    def expression(self, text: str, where: str):
        """The pint quantity of ``text`` (units kept, no dimension asked)."""
        return self._parse_expression(text, where)

    def positive(self, value: Any, dimension: str, where: str) -> float:
        """:meth:`quantity`, refused unless above zero and above 1/SI_LIMIT in SI units."""
        v = self.quantity(value, dimension, where)
        if v <= 0.0:
            raise self.err(where, f"expected a positive {dimension}, got {shown(value)}")
        if v < 1.0 / SI_LIMIT:
            raise self.err(where, f"{shown(value)} is too small for any real {dimension} (less "
                           f"than {1.0 / SI_LIMIT:g} in SI units); check the value and its units")
        return v

    def _simple(self, text: str, dimension: str) -> float | None:
        """The SI value of ``text`` if it is a plain "NUMBER UNIT" (such as "2.5 m"), else
        None. The exact steps of the full reading (pint's number, times the SI factor of
        the unit, one multiplication), at a small part of its cost: a large case repeats a
        few units in many distinct values."""
        m = _SIMPLE.fullmatch(text) if len(text) <= QUANTITY_LIMIT else None
        if m is None:
            return None
        key = (m.group(2), dimension)
        factor = self._unit_factor.get(key, _UNKNOWN)
        if factor is _UNKNOWN:  # first time: a parameter among the names reads in full
            parameter = any(n in self._param_raw for n in _NAME.findall(key[0]))
            factor = None if parameter else self._factor_of(key[0], dimension)
            self._unit_factor[key] = factor
        if factor is None:
            return None
        number = m.group(1)
        try:
            value: float = int(number)  # pint reads an integer as int, anything else as float
        except ValueError:
            value = float(number)
        try:
            return value * factor
        except OverflowError:
            return None

    def _factor_of(self, unit: str, dimension: str) -> float | None:
        """SI value of one ``unit`` in a field of ``dimension`` by the full reading, or None
        if that is not one multiplication (a dimensionless unit, a wrong dimension, a name
        that is no unit: the full reading then gives the value or the message)."""
        if any(n.lower() in ("inf", "infinity", "nan", "dimensionless")
               for n in _NAME.findall(unit)):
            return None
        try:
            q = self._read(f"1 {unit}", "")
            if bool(q.dimensionless) and not _has_angle(q):
                return None
            factor = self.units.to_si(q, dimension)
        except (ValueError, ArithmeticError):
            return None
        return factor if math.isfinite(factor) else None

    def _parse_expression(self, text: str, where: str):
        """The pint quantity of the string ``text``: one finite number with its units."""
        text_stripped = text.strip()
        written = literal(text, ECHO_LIMIT)
        if not text_stripped:
            raise self.err(where, "expected a quantity, got an empty string")
        if re.search(r"[\[\]{},;]", text_stripped):
            # the unit parser would silently drop these and read "[-9, -3]" as -3
            raise self.err(where, f'cannot read the quantity "{written}": brackets, braces, '
                           "commas and semicolons are not allowed in a quantity (a [start, end] "
                           "pair is a TOML list of two quantities)")
        try:
            q = self._read(text_stripped, where)
        except QuantityError as exc:
            if exc.kind == "unknown":
                close = hint(exc.name, self._param_raw)
                raise self.err(where, f'"{written}": "{literal(exc.name, ECHO_LIMIT)}" is neither '
                               f"a parameter nor a unit{close}") from None
            if exc.kind == "offset":
                raise self.err(where, f'"{written}": give temperature changes in K '
                               '(e.g. "25 K"), not degC/degF') from None
            raise self.err(where, f'cannot read the quantity "{written}": {exc}') from None
        try:
            mag = float(q.magnitude)
        except (TypeError, ValueError, OverflowError) as exc:
            what = ("beyond the floating-point range" if isinstance(exc, OverflowError)
                    else "not a single number")
            raise self.err(where, f'"{written}" is {what}') from None
        if not math.isfinite(mag):
            raise self.err(where, f'expected a finite value, got "{written}"')
        return q

    def _read(self, text: str, where: str):
        """:func:`~leastwork.model.units.parse_quantity` of ``text`` (stripped) with the parameters
        it names, within the case's budget of :data:`EXPRESSION_LIMIT` readings."""
        self._readings += 1
        if self._readings > EXPRESSION_LIMIT:
            raise QuantityError(f"the case has more than {EXPRESSION_LIMIT} distinct quantity "
                                'expressions; write values as a number with units ("2.5 m", '
                                '"24000 kN*m^2") or a plain number')
        values = {}
        if len(text) <= QUANTITY_LIMIT:  # a longer one is refused unread
            names = set(re.findall(r"[A-Za-z_][A-Za-z0-9_]*", text))
            values = {n: self.parameter(n, where) for n in names if n in self._param_raw}
        return parse_quantity(text, **values)

    def parameter(self, name: str, where: str):
        """The value of the parameter ``name`` (a pint quantity), read once; a circular
        definition or a chain longer than :data:`PARAMETER_CHAIN_LIMIT` is refused."""
        if name in self._param_val:
            return self._param_val[name]
        if name in self._param_busy:
            chain = " -> ".join([*self._param_busy[self._param_busy.index(name):], name])
            raise self.err(f"[parameters] {name}", f"circular definition: {literal(chain, ECHO_LIMIT)}")
        if len(self._param_busy) >= PARAMETER_CHAIN_LIMIT:
            raise self.err(f"[parameters] {name}", "parameters defined through more than "
                           f"{PARAMETER_CHAIN_LIMIT} others in a chain ("
                           f"{literal(' -> '.join(self._param_busy[:3]), ECHO_LIMIT)} ...)")
        raw = self._param_raw[name]
        self._param_busy.append(name)
        try:
            if isinstance(raw, bool) or not isinstance(raw, (int, float, str)):
                raise self.err(f"[parameters] {name}",
                               f"expected a number or a quantity string, got {kind_of(raw)}")
            if isinstance(raw, str):
                value = self._parse_expression(raw, f"[parameters] {name}")
            else:
                if not math.isfinite(as_float(raw)):
                    raise self.err(f"[parameters] {name}",
                                   f"expected a finite value, got {shown(raw)}")
                value = ureg().Quantity(float(raw), "")
        finally:
            self._param_busy.pop()
        self._param_val[name] = value
        return value
