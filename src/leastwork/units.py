"""Quantities and unit systems.

Every input is converted once, at the boundary, to SI base units (N, m, rad, K); every
output is converted back to the case units only when it is reported. A bare number (or an
expression that comes out dimensionless) is read in the case units of the field it stands in.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from functools import lru_cache

__all__ = ["UnitSystem", "DIMENSIONS", "ureg"]


@lru_cache(maxsize=1)
def _registry():
    import pint

    # pint's own disk cache of the parsed definitions (the user cache folder) makes the
    # registry about ten times cheaper to build after the first run; without a usable cache
    # folder (read-only, a half-written file of a concurrent first run) it is built afresh.
    try:
        return pint.UnitRegistry(autoconvert_offset_to_baseunit=False, cache_folder=":auto:")
    except Exception:
        return pint.UnitRegistry(autoconvert_offset_to_baseunit=False)


def ureg():
    """The shared pint unit registry."""
    return _registry()


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
}

_PINT_DIM = {
    "force": "[mass] * [length] / [time] ** 2",
    "length": "[length]",
    "temperature": "[temperature]",
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

    @property
    def moment(self) -> str:
        return f"{self.force}*{self.length}"

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
                f"expected {with_article(dimension)} (e.g. {example_for(dimension)}), got {format_quantity(q)}"
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
    """Raise ValueError unless ``unit`` is a unit of ``kind`` ('force' or 'length')."""
    reg = ureg()
    try:
        q = reg.Quantity(1.0, unit)
    except Exception as exc:
        raise ValueError(f"unknown unit {unit!r}; expected a {kind} unit such as "
                         f"{'kN' if kind == 'force' else 'm'}") from exc
    if not q.check(_PINT_DIM[kind]):
        raise ValueError(f"{unit!r} is not a {kind} unit (e.g. {'kN, N, lbf' if kind == 'force' else 'm, mm, ft'})")


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
