"""Quantities and unit systems.

Every input is converted once, at the boundary, to SI base units (N, m, rad, K); every
output is converted back to the case units only when it is reported. A bare number (or an
expression that comes out dimensionless) is read in the case units of the field it stands in.
"""

from __future__ import annotations

import cmath
import io
import math
import re
import sys
import tokenize
from dataclasses import dataclass
from functools import lru_cache

from ..plaintext import ECHO_LIMIT, literal

__all__ = ["UnitSystem", "DIMENSIONS", "OUTPUT_QUANTITIES", "TRADE_UNITS", "STANDARD_GRAVITY",
           "ureg", "parse_quantity", "QuantityError", "QUANTITY_LIMIT", "UNIT_POWER_LIMIT",
           "check_output_unit"]

#: Longest quantity string read (characters, after stripping the ends). The longest
#: expression a case needs is a few dozen characters; the unit parser's cost grows with the
#: square of the length (12 s for 20,000 digits in a row).
QUANTITY_LIMIT = 200
#: Largest power (in size) a quantity with a unit may be raised to; m**4 (a second moment
#: of area) is the highest any field needs.
UNIT_POWER_LIMIT = 10


#: Optional packages pint imports at its own import when they are installed, for features
#: this tool never uses (Dask arrays of quantities, quantities with uncertainties): together
#: about 0.1 s of start-up, as long as pint itself. Hidden from pint while it is imported,
#: unless already loaded (a sweep's Dask worker), so pint then works without them.
_PINT_EXTRAS = ("dask", "uncertainties")


def _import_pint():
    """pint, imported without looking for :data:`_PINT_EXTRAS`."""
    if "pint" in sys.modules:
        return sys.modules["pint"]
    hidden = [name for name in _PINT_EXTRAS if name not in sys.modules]
    for name in hidden:
        sys.modules[name] = None  # type: ignore[assignment]  # "not installed" to pint
    try:
        import pint
    finally:
        for name in hidden:
            if sys.modules.get(name, 0) is None:
                del sys.modules[name]
    return pint


@lru_cache(maxsize=1)
def _registry():
    pint = _import_pint()

    # pint's own disk cache of the parsed definitions (the user cache folder) makes the
    # registry about ten times cheaper to build after the first run; without a usable cache
    # folder (read-only, a half-written file of a concurrent first run) it is built afresh.
    try:
        reg = pint.UnitRegistry(autoconvert_offset_to_baseunit=False, cache_folder=":auto:")
    except Exception:
        reg = pint.UnitRegistry(autoconvert_offset_to_baseunit=False)
    _define_trade_units(reg)
    return reg


#: Units of US practice that pint lacks (or, for ``k``, gives another meaning: pint's ``k``
#: is Boltzmann's constant, which no structural case needs). Each is defined in the
#: registry, so every quantity string, ``[structure] units`` and ``--units`` accept them.
TRADE_UNITS: tuple[tuple[str, str], ...] = (
    ("k", "kip"),                      # 1 k = 1 kip = 1000 lbf
    ("klf", "kip / foot"),             # kips per linear foot
    ("plf", "force_pound / foot"),     # pounds per linear foot
    ("psf", "force_pound / foot ** 2"),
    ("ksf", "kip / foot ** 2"),
)


def _define_trade_units(reg) -> None:
    """Add :data:`TRADE_UNITS` to ``reg`` (pint's ``kip``, ``ksi``, ``psi``, ``lbf``, ``ft``
    and ``in`` are already there). Redefining ``k`` is intended: pint's notice of it is
    silenced."""
    import logging

    log = logging.getLogger("pint.util")
    level = log.level
    log.setLevel(logging.ERROR)
    try:
        for name, definition in TRADE_UNITS:
            reg.define(f"{name} = {definition}")
    finally:
        log.setLevel(level)


def ureg():
    """The shared pint unit registry."""
    return _registry()


#: Standard acceleration of gravity, m/s^2 (turns a mass density into a unit weight).
STANDARD_GRAVITY = 9.80665

#: Field dimensions as exponents of (force, length, temperature, angle).
DIMENSIONS: dict[str, tuple[int, int, int, int]] = {
    "length": (0, 1, 0, 0),
    "force": (1, 0, 0, 0),
    "moment": (1, 1, 0, 0),
    "force/length": (1, -1, 0, 0),
    "stress": (1, -2, 0, 0),
    "area": (0, 2, 0, 0),
    "second moment of area": (0, 4, 0, 0),
    "axial stiffness": (1, 0, 0, 0),
    "flexural stiffness": (1, 2, 0, 0),
    "rotational stiffness": (1, 1, 0, -1),
    "temperature difference": (0, 0, 1, 0),
    "thermal expansion coefficient": (0, 0, -1, 0),
    "angle": (0, 0, 0, 1),
    "number": (0, 0, 0, 0),
    "unit weight": (1, -3, 0, 0),
    "section modulus": (0, 3, 0, 0),
}

_PINT_DIM = {
    "force": "[mass] * [length] / [time] ** 2",
    "length": "[length]",
    "temperature": "[temperature]",
    "displacement": "[length]",
    "moment": "[mass] * [length] ** 2 / [time] ** 2",
    "distributed": "[mass] / [time] ** 2",
    "stress": "[mass] / [length] / [time] ** 2",
}

#: The quantities whose output unit ``[structure] units`` or ``--units`` may name besides
#: force and length, with their (force, length) exponents.
OUTPUT_QUANTITIES: dict[str, tuple[int, int]] = {
    "displacement": (0, 1),
    "moment": (1, 1),
    "distributed": (1, -1),
    "stress": (1, -2),
}

#: Examples of each unit kind, for messages.
_UNIT_EXAMPLES = {
    "force": "kN, N, kip, lbf",
    "length": "m, mm, ft, in",
    "displacement": "mm, m, in",
    "moment": "kN*m, kN*mm, kip*ft, kip*in",
    "distributed": "kN/m, N/mm, klf, plf",
    "stress": "MPa, N/mm^2, ksi, psf",
}


@dataclass(frozen=True)
class UnitSystem:
    """The case's units: bare numbers are read in them and results reported in them.

    Attributes
    ----------
    force, length : str
        pint unit names, e.g. ``"kN"`` and ``"m"``.
    """

    force: str = "kN"
    length: str = "m"
    #: output units named for other quantities, as (quantity, unit) pairs in the order of
    #: :data:`OUTPUT_QUANTITIES`; bare numbers are still read in force and length units
    named: tuple[tuple[str, str], ...] = ()

    @property
    def moment(self) -> str:
        """The moment unit of the output: named, or force*length."""
        return self.output_unit("moment") or f"{self.force}*{self.length}"

    def output_unit(self, quantity: str) -> str | None:
        """The unit named for ``quantity`` ("displacement", "moment"...), or None."""
        return dict(self.named).get(quantity)

    def with_units(self, **units: str) -> UnitSystem:
        """This system with the given units replaced: ``force``, ``length`` and the keys of
        :data:`OUTPUT_QUANTITIES` (each already checked, see :func:`check_output_unit`)."""
        force = units.pop("force", self.force)
        length = units.pop("length", self.length)
        merged = {**dict(self.named), **units}
        return UnitSystem(force, length, tuple((q, merged[q]) for q in OUTPUT_QUANTITIES
                                               if q in merged))

    def factor(self, dimension: str) -> float:
        """SI value of one case unit of ``dimension`` (e.g. kN*m -> 1000.0)."""
        f_exp, l_exp, t_exp, a_exp = DIMENSIONS[dimension]
        return _force_si(self.force) ** f_exp * _length_si(self.length) ** l_exp

    def si_unit(self, dimension: str):
        """The pint unit of ``dimension`` in SI base units."""
        f_exp, l_exp, t_exp, a_exp = DIMENSIONS[dimension]
        reg = ureg()
        unit = reg.newton ** f_exp * reg.meter ** l_exp * reg.kelvin ** t_exp * reg.radian ** a_exp
        return unit

    def to_si(self, quantity, dimension: str) -> float:
        """Convert a pint quantity (or a plain number, taken in case units) to SI.

        Raises ``ValueError`` with a plain description if the dimension is wrong.
        """
        if isinstance(quantity, (int, float)):
            return float(quantity) * self.factor(dimension)
        q = quantity
        if _is_dimensionless(q):
            value = float(q.to("dimensionless").magnitude) if not _has_angle(q) else None
            if value is not None:
                if dimension == "angle":
                    return value  # a bare angle is in radians
                return value * self.factor(dimension)
        target = self.si_unit(dimension)
        try:
            return float(q.to(target).magnitude)
        except Exception as exc:  # pint.DimensionalityError and friends
            raise ValueError(
                f"expected {with_article(dimension)} (e.g. {example_for(dimension)}), got "
                f"{literal(format_quantity(q), ECHO_LIMIT)}"
            ) from exc


def _has_angle(q) -> bool:
    return any(name in ("radian", "degree", "arcminute", "arcsecond", "turn") for name in q._units)


def _is_dimensionless(q) -> bool:
    return bool(q.dimensionless)


@lru_cache(maxsize=32)
def _force_si(unit: str) -> float:
    return float(ureg().Quantity(1.0, unit).to("newton").magnitude)


@lru_cache(maxsize=32)
def _length_si(unit: str) -> float:
    return float(ureg().Quantity(1.0, unit).to("meter").magnitude)


def check_unit(unit: str, kind: str) -> None:
    """Raise ValueError unless ``unit`` is a unit of ``kind`` ('force', 'length' or a key of
    :data:`OUTPUT_QUANTITIES`)."""
    reg = ureg()
    shown = f"'{literal(unit, ECHO_LIMIT)}'"
    first = _UNIT_EXAMPLES[kind].split(",")[0]
    try:
        parse_quantity(unit)  # the same steps as the unit parser below, checked
        q = reg.Quantity(1.0, unit)
    except QuantityError as exc:
        raise ValueError(f"unknown unit {shown} ({exc}); expected a {kind} unit such as "
                         f"{first}") from None
    except Exception:
        raise ValueError(f"unknown unit {shown}; expected a {kind} unit such as "
                         f"{first}") from None
    if not q.check(_PINT_DIM[kind]):
        raise ValueError(f"{shown} is not a {kind} unit (e.g. {_UNIT_EXAMPLES[kind]})")


def check_output_unit(unit: str, quantity: str) -> None:
    """Raise ValueError unless ``unit`` is a unit of the output quantity ``quantity``."""
    check_unit(unit, quantity)


@lru_cache(maxsize=64)
def unit_si(unit: str, quantity: str) -> float:
    """SI value (N, m, N*m, N/m, Pa) of one ``unit`` of an output ``quantity``."""
    f, l = OUTPUT_QUANTITIES.get(quantity) or {"force": (1, 0), "length": (0, 1)}[quantity]
    reg = ureg()
    return float(reg.Quantity(1.0, unit).to(reg.newton ** f * reg.meter ** l).magnitude)


_EXAMPLES = {
    "length": '"3.5 m"',
    "force": '"20 kN"',
    "moment": '"15 kN*m"',
    "force/length": '"9 kN/m"',
    "stress": '"200 GPa"',
    "area": '"6500 mm^2"',
    "second moment of area": '"1.2e8 mm^4"',
    "axial stiffness": '"1.3e6 kN"',
    "flexural stiffness": '"24000 kN*m^2"',
    "rotational stiffness": '"5000 kN*m/rad"',
    "temperature difference": '"25 K"',
    "thermal expansion coefficient": '"1.2e-5 1/K"',
    "angle": '"30 deg"',
    "number": "3",
    "unit weight": '"77 kN/m^3"',
    "section modulus": '"557e3 mm^3"',
}


def with_article(noun: str) -> str:
    """``noun`` with its indefinite article.

    >>> with_article("angle"), with_article("force")
    ('an angle', 'a force')
    """
    return ("an " if noun[:1].lower() in "aeiou" else "a ") + noun


def example_for(dimension: str) -> str:
    return _EXAMPLES.get(dimension, "a number")


def format_quantity(q) -> str:
    try:
        return f"{q.magnitude:g} {q.units:~}" if str(q.units) != "dimensionless" else f"{q.magnitude:g}"
    except Exception:
        return str(q)


def finite(x: float) -> bool:
    return math.isfinite(x)


# ----------------------------------------------------------------- reading quantities
class QuantityError(ValueError):
    """A quantity string that cannot be read. The message says what is wrong without
    repeating the string (the caller names it); ``kind`` is ``"unknown"`` when a name is
    neither a parameter nor a unit (``name`` holds it), ``"offset"`` for an offset
    temperature unit (degC, degF), else ``None``."""

    def __init__(self, message: str, kind: str | None = None, name: str | None = None):
        super().__init__(message)
        self.kind = kind
        self.name = name


#: A decimal number as written in a quantity (digits may be grouped by "_", as in 2_500).
_DIGITS = r"\d(?:_?\d)*"
_NUMBER = rf"(?:{_DIGITS}(?:\.(?:{_DIGITS})?)?|\.{_DIGITS})(?:[eE][-+]?\d+)?"
_NUMBER_TOKEN = re.compile(rf"{_NUMBER}\Z")
#: A number, a name or a closing parenthesis, then only white space, then a number: pint
#: would multiply them ("2 500 mm" is 2 × 500 mm).
_SIDE_BY_SIDE = re.compile(rf"((?<![\w.])(?:{_NUMBER}|[^\W\d]\w*)|\))(\s+)({_NUMBER})")
#: "1/K" after a number ("1.2e-5 1/K") is the usual way to write a reciprocal unit
_RECIPROCAL = re.compile(r"\s*/\s*[^\W\d]")
#: Operators a quantity may use (after ^ is read as **); pint would silently skip others.
_OPERATORS = frozenset({"+", "-", "*", "/", "**", "(", ")"})
_LAYOUT = frozenset({tokenize.NEWLINE, tokenize.NL, tokenize.INDENT, tokenize.DEDENT,
                     tokenize.ENDMARKER, tokenize.ENCODING})
_ALLOWED = "numbers, units, parameter names, + - * / ** ^ and parentheses"


def parse_quantity(text: str, **values):
    """Read ``text`` as a pint quantity: a number, units, names of ``values`` (pint
    quantities, the case parameters), + - * / ** (or ^) and parentheses.

    No input can make this slow or fatal. Before anything is computed: at most
    :data:`QUANTITY_LIMIT` characters; no number directly after a number, a unit or ")"
    ("2 500 mm" would be 2 × 500 mm); no other operators or characters. Then pint's own
    steps (its preprocessing, tokens, evaluation tree, values of the tokens and operators)
    run one operation at a time, each checked first: a power whose result would be beyond
    the floating-point range (about 1.8e308; "10**10**10" would otherwise build an integer
    of ten billion digits), a quantity with a unit raised to a power above
    :data:`UNIT_POWER_LIMIT` in size, or an exponent with a unit is refused.

    Raises
    ------
    QuantityError
        With a plain statement of what is not allowed.
    """
    expression = text.strip()
    if len(expression) > QUANTITY_LIMIT:
        raise QuantityError(f"a quantity is at most {QUANTITY_LIMIT} characters long; this "
                            f"one has {len(expression)}")
    _refuse_side_by_side(expression)
    reg = ureg()
    for step in reg.preprocessors:
        expression = step(expression)
    from pint.pint_eval import build_eval_tree
    from pint.util import string_preprocessor

    tokens = _tokens(string_preprocessor(expression))
    try:
        tree = build_eval_tree(tokens)
    except RecursionError:
        raise QuantityError("the expression is nested too deeply") from None
    except Exception as exc:  # DefinitionSyntaxError, AssertionError of the tree builder
        raise _incomplete(exc) from None
    try:
        q = tree.evaluate(lambda tok: reg._eval_token(tok, **values), _CHECKED_BINARY,
                          _CHECKED_UNARY)
    except QuantityError:
        raise
    except RecursionError:
        raise QuantityError("the expression is nested too deeply") from None
    except ZeroDivisionError:
        raise QuantityError("division by zero") from None
    except Exception as exc:  # pint raises several kinds
        raise _pint_refusal(exc) from None
    if not isinstance(q, reg.Quantity):
        q = reg.Quantity(q)
    return q


def _incomplete(exc: Exception) -> QuantityError:
    op = re.findall(r"missing (?:unary|binary) operator '([^']*)'", str(exc))
    if op:
        return QuantityError(f'"{literal(op[0], ECHO_LIMIT)}" needs a value on each side')
    return QuantityError("incomplete expression: an operator or a pair of parentheses "
                         "without a value")


def _pint_refusal(exc: Exception) -> QuantityError:
    """A plain QuantityError for an exception of pint's parser."""
    message = str(exc)
    unknown = re.findall(r"'([^']+)' is not defined", message)
    if unknown:
        return QuantityError(f'"{literal(unknown[0], ECHO_LIMIT)}" is not a unit',
                             kind="unknown", name=unknown[0])
    if "offset" in message.lower():
        return QuantityError("an offset temperature unit (degC, degF) cannot take part in "
                             "arithmetic; give temperature changes in K", kind="offset")
    if re.search(r"missing (?:unary|binary) operator", message):
        return _incomplete(exc)
    if exc.__class__.__name__ == "DimensionalityError":
        return QuantityError("adds or compares quantities of different kinds "
                             f"({literal(message, ECHO_LIMIT)})")
    detail = f" ({literal(message, ECHO_LIMIT)})" if message.strip() else ""
    return QuantityError(f"not a quantity: expected {_ALLOWED}{detail}")


def _refuse_side_by_side(text: str) -> None:
    """Refuse a number written after a number, a name or ")" with only white space between
    (pint would multiply them); "1.2e-5 1/K" (a reciprocal unit) stays allowed."""
    for m in _SIDE_BY_SIDE.finditer(text):
        before, gap, number = m.groups()
        if number == "1" and _RECIPROCAL.match(text, m.end()):
            continue
        shown = literal(f"{before}{gap}{number}", ECHO_LIMIT)
        if _NUMBER_TOKEN.match(before):
            if before.isdigit() and len(number) == 3 and number.isdigit():  # "2 500"
                joined = literal(re.sub(r"(\d)\s+(?=\d{3}(?![\d.]))", r"\1", text), ECHO_LIMIT)
                advice = f'digits are not grouped with spaces: write "{joined}"'
            else:
                advice = "write one number, without spaces inside it"
            raise QuantityError(f'a number followed by a number ("{shown}") would be their '
                                f"product; {advice} (or * to multiply)")
        raise QuantityError(f'a number after "{literal(before, ECHO_LIMIT)}" with only a '
                            "space between; write * to multiply, or put the number first")


def _tokens(expression: str) -> list:
    """The tokens of ``expression`` as pint's tokenizer gives them (Python's), refusing
    anything but numbers in decimal notation, names and the operators of
    :data:`_OPERATORS` (pint would skip an unknown operator: "2 @ 3" would be 6)."""
    try:
        tokens = list(tokenize.tokenize(io.BytesIO(expression.encode("utf-8")).readline))
    except (tokenize.TokenError, SyntaxError):
        if expression.count("(") != expression.count(")"):
            raise QuantityError("unbalanced parentheses") from None
        raise QuantityError(f"not a quantity: expected {_ALLOWED}") from None
    previous = None
    for tok in tokens:
        if tok.type in _LAYOUT:
            continue
        if tok.type == tokenize.NUMBER:
            if not _NUMBER_TOKEN.match(tok.string):
                raise QuantityError(f'"{literal(tok.string, ECHO_LIMIT)}" is not a number in '
                                    "decimal notation (such as 2500, 0.25 or 1.2e-5)")
            if previous is not None and previous.type == tokenize.NUMBER:
                raise QuantityError(f'"{literal(previous.string, ECHO_LIMIT)}" and '
                                    f'"{literal(tok.string, ECHO_LIMIT)}" are two numbers side '
                                    "by side; write one number (no leading zero), or * to "
                                    "multiply")
        elif tok.type == tokenize.OP:
            if tok.string not in _OPERATORS:
                raise QuantityError(f'"{literal(tok.string, ECHO_LIMIT)}" is not allowed in a '
                                    f"quantity; only {_ALLOWED}")
        elif tok.type != tokenize.NAME:
            raise QuantityError(f'"{literal(tok.string, ECHO_LIMIT)}" is not allowed in a '
                                f"quantity; only {_ALLOWED}")
        previous = tok
    return [t for t in tokens if t.type != tokenize.ENCODING]


_RANGE = f"a value beyond the floating-point range (about {sys.float_info.max:.1e})"
#: An integer of more bits than this is beyond the floating-point range (2**1024).
_RANGE_BITS = 1024


def _magnitude(x):
    return x.magnitude if hasattr(x, "magnitude") else x


def _has_unit(x) -> bool:
    return hasattr(x, "unitless") and not x.unitless


def _in_range(result):
    """``result``, refused if its magnitude is an integer beyond the floating-point range
    (which no later step could turn into a float)."""
    m = _magnitude(result)
    if isinstance(m, int) and m.bit_length() > _RANGE_BITS:
        raise QuantityError(_RANGE)
    return result


def _size(x) -> float:
    """The size |x| of a number (int of any size, float or complex) as a float (inf if
    beyond the range)."""
    try:
        return float(abs(x))
    except OverflowError:
        return math.inf


def _checked_power(base, exponent):
    """pint's power, after checking that it is cheap and its result in range: with a
    number of at most 1024 bits and a small exponent, Python's exact integer power is."""
    from pint.pint_eval import _BINARY_OPERATOR_MAP

    if _has_unit(exponent):
        raise QuantityError("an exponent must be a plain number, not a quantity with a unit")
    e, b = _magnitude(exponent), _magnitude(base)
    if not (_finite(e) and _finite(b)):
        raise QuantityError("a power of an infinite or undefined value")
    if _has_unit(base) and _size(e) > UNIT_POWER_LIMIT:
        raise QuantityError(f"a quantity with a unit raised to the power {literal(e, 20)}; at "
                            f"most {UNIT_POWER_LIMIT} in size is allowed (m**4 is the most any "
                            "field needs)")
    if b != 0 and _size(b) != 1.0:
        # log10 of the size of the result; the real part of the exponent decides it
        real = e.real if isinstance(e, complex) else e
        grows = math.copysign(_size(real), real) * math.log10(abs(b))
        if grows > 308.3:
            raise QuantityError(_RANGE)
    try:
        return _in_range(_BINARY_OPERATOR_MAP["**"](base, exponent))
    except OverflowError:
        raise QuantityError(_RANGE) from None


def _finite(x) -> bool:
    if isinstance(x, int):
        return True
    return cmath.isfinite(x) if isinstance(x, complex) else math.isfinite(x)


def _checked(op: str):
    """pint's operator ``op``, its result checked to be in range."""
    def run(a, b):
        from pint.pint_eval import _BINARY_OPERATOR_MAP

        try:
            return _in_range(_BINARY_OPERATOR_MAP[op](a, b))
        except OverflowError:
            raise QuantityError(_RANGE) from None
    return run


_CHECKED_BINARY = {"**": _checked_power, "*": _checked("*"), "": _checked(""),
                   "/": _checked("/"), "+": _checked("+"), "-": _checked("-")}
_CHECKED_UNARY = {"+": lambda x: x, "-": lambda x: x * -1}
