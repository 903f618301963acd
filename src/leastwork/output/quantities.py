"""Output units: the SI value of one output unit of each reported quantity, the conversion
of a basic force or redundant by its column kind, and the unit texts.

Inside, every number is SI (N, m, rad). An output divides a value by the factor of its
quantity in the :class:`~leastwork.model.units.UnitSystem` it reports in (the case's, or
``--units``). A quantity the units do not name (displacement, moment, distributed, stress)
has the factor ``F**f * L**l``, with F and L the SI values of one force and one length
unit, computed as :meth:`UnitSystem.factor` does, so that every output turns a value into
the same float; a named one has the SI value of its own unit. A ratio of two quantities (a
flexibility coefficient: displacement per force) is :meth:`Quantities.ratio`; a combination
no unit names (EI, a spring stiffness) stays in force and length units
(:meth:`Quantities.convert`, :meth:`Quantities.label`).
"""

from __future__ import annotations

from functools import lru_cache

from ..model.units import UnitSystem, unit_si

__all__ = ["QUANTITIES", "Quantities", "quantities"]

#: (force, length) exponents of every quantity a result reports.
QUANTITIES: dict[str, tuple[int, int]] = {
    "force": (1, 0),
    "length": (0, 1),
    "displacement": (0, 1),
    "moment": (1, 1),
    "rotation": (0, 0),
    "distributed": (1, -1),
    "stress": (1, -2),
}


class Quantities:
    """Factors and unit texts of one unit system (see :func:`quantities`)."""

    def __init__(self, units: UnitSystem):
        self.units = units
        self.F = units.factor("force")  #: SI value of one force unit (N)
        self.L = units.factor("length")  #: SI value of one length unit (m)

    # ------------------------------------------------------------------ factors
    def power(self, f: int, l: int) -> float:
        """SI value of one output unit of force^f · length^l."""
        return self.F ** f * self.L ** l

    def named(self, quantity: str) -> str | None:
        """The unit the case or ``--units`` named for ``quantity``, or None."""
        return self.units.output_unit(quantity)

    def factor(self, quantity: str) -> float:
        """SI value of one output unit of ``quantity`` (a key of ``QUANTITIES``; 1.0 for a
        rotation, reported in rad)."""
        unit = self.named(quantity)
        if unit is not None:
            return unit_si(unit, quantity)
        return self.power(*QUANTITIES[quantity])

    def ratio(self, top: str, bottom: str) -> tuple[float, str]:
        """SI value and text of one output unit of ``top`` per ``bottom`` (quantities, e.g.
        a flexibility coefficient "displacement" per "force": m/kN, or mm/kN when the
        displacement unit is named)."""
        if self.named(top) is None and self.named(bottom) is None and "rotation" not in (
                top, bottom):
            (f1, l1), (f2, l2) = QUANTITIES[top], QUANTITIES[bottom]
            return self.power(f1 - f2, l1 - l2), self.label(f1 - f2, l1 - l2)
        factor, num, per = self.factor(top) / self.factor(bottom), self.unit(top), self.unit(bottom)
        if num == per:
            return factor, "-"
        if num.startswith(f"{per}*"):  # kip*ft per kip: ft
            return factor, num[len(per) + 1:]
        per = f"({per})" if any(c in per for c in "*/") else per
        return factor, f"{num}/{per}"

    def convert(self, value, f: int, l: int):
        """An SI value (or array) of force^f · length^l in the output units."""
        return value / self.power(f, l)

    def to_output(self, value, quantity: str):
        """An SI value (or array) of ``quantity`` in the output units."""
        return value / self.factor(quantity)

    # ------------------------------------------------------------------ columns
    @staticmethod
    def column_quantity(col) -> str:
        """"moment" for a beam end moment or rotational reaction, else "force"."""
        return "moment" if col.is_moment else "force"

    @staticmethod
    def conjugate_quantity(col) -> str:
        """The displacement a column's force works on: "rotation" or "displacement"."""
        return "rotation" if col.is_moment else "displacement"

    @staticmethod
    def column_dims(col) -> tuple[int, int]:
        """(force, length) exponents of a column's force."""
        return QUANTITIES[Quantities.column_quantity(col)]

    @staticmethod
    def conjugate_dims(col) -> tuple[int, int]:
        """(force, length) exponents of the displacement conjugate to a column."""
        return QUANTITIES[Quantities.conjugate_quantity(col)]

    def column_factor(self, col) -> float:
        """SI value of one output unit of a basic force or redundant (force or moment)."""
        return self.factor(self.column_quantity(col))

    def conjugate_factor(self, col) -> float:
        """SI value of one output unit of its conjugate displacement (length or rad)."""
        return self.factor(self.conjugate_quantity(col))

    def column(self, value, col):
        """A basic force or redundant (SI) in the output units."""
        return value / self.column_factor(col)

    def column_unit(self, col) -> str:
        return self.unit(self.column_quantity(col))

    # ------------------------------------------------------------------ texts
    @property
    def force_unit(self) -> str:
        return self.units.force

    @property
    def length_unit(self) -> str:
        return self.units.length

    @property
    def moment_unit(self) -> str:
        return self.unit("moment")

    @property
    def displacement_unit(self) -> str:
        return self.unit("displacement")

    @property
    def distributed_unit(self) -> str:
        return self.unit("distributed")

    @property
    def stress_unit(self) -> str:
        return self.unit("stress")

    def unit(self, quantity: str) -> str:
        """Unit text of ``quantity``: "kN", "m", "kN*m", "rad", "kN/m", "kN/m^2"..., or the
        unit named for it, as written."""
        if quantity == "rotation":
            return "rad"
        return self.named(quantity) or self.label(*QUANTITIES[quantity])

    def table(self) -> dict[str, str]:
        """Every output unit by quantity (the JSON result's ``units``)."""
        return {"force": self.force_unit, "length": self.length_unit,
                "moment": self.moment_unit, "rotation": "rad",
                "displacement": self.displacement_unit, "distributed": self.distributed_unit,
                "stress": self.stress_unit}

    def label(self, f: int, l: int) -> str:
        """Unit text of force^f · length^l: "kN*m^2", "m/kN", "1/(kN*m)", "-" for none."""
        pairs = ((self.units.force, f), (self.units.length, l))
        num = [u if e == 1 else f"{u}^{e}" for u, e in pairs if e > 0]
        den = [u if e == -1 else f"{u}^{-e}" for u, e in pairs if e < 0]
        top = "*".join(num) or "1"
        if not den:
            return top if num else "-"
        bottom = den[0] if len(den) == 1 else "(" + "*".join(den) + ")"
        return f"{top}/{bottom}"


@lru_cache(maxsize=32)
def quantities(units: UnitSystem) -> Quantities:
    """The :class:`Quantities` of ``units`` (kept: the factors are looked up once)."""
    return Quantities(units)
