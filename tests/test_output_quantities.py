"""The one unit-conversion helper of the outputs (leastwork.output.quantities): the SI value
of one output unit of each reported quantity, the conversion of a basic force or redundant
by its column kind, and the unit texts; and that every output reports a value through it
alike (JSON result, calculation sheet, summary).

Outside values, exact by definition (common practice): 1 kN·m = 1000 N·m; 1 in = 0.0254 m
(international inch); 1 lbf = 4.4482216152605 N, so 1 kip = 1000 lbf = 4448.2216152605 N.
"""

from __future__ import annotations

import pytest

import leastwork
from leastwork.model.units import DIMENSIONS, UnitSystem
from leastwork.output.audit import audit_sheet
from leastwork.output.quantities import QUANTITIES, Quantities, quantities
from leastwork.output.reported import case_numbers
from leastwork.output.sheet import Grid
from leastwork.topology import Column

KIP = 4448.2216152605  # N, common practice (1000 lbf, exact by definition)
INCH = 0.0254  # m, common practice (exact by definition)

KN_M = UnitSystem("kN", "m")
KIP_IN = UnitSystem("kip", "in")
N_MM = UnitSystem("N", "mm")


def test_factors_of_kilonewton_metre():
    q = quantities(KN_M)
    assert q.factor("force") == 1000.0
    assert q.factor("moment") == 1000.0  # 1 kN·m = 1000 N·m (common practice)
    assert q.factor("length") == q.factor("displacement") == 1.0
    assert q.factor("rotation") == 1.0  # rotations are reported in rad
    assert q.factor("distributed") == 1000.0  # 1 kN/m = 1000 N/m
    assert q.factor("stress") == 1000.0  # 1 kN/m² = 1 kPa


def test_factors_of_kip_inch():
    q = quantities(KIP_IN)
    assert q.factor("force") == pytest.approx(KIP, rel=1e-15)
    assert q.factor("length") == pytest.approx(INCH, rel=1e-15)
    assert q.factor("moment") == pytest.approx(KIP * INCH, rel=1e-15)  # 112.98... N·m
    assert q.factor("distributed") == pytest.approx(KIP / INCH, rel=1e-15)
    # 1 ksi = 6.894757 MPa (from memory)
    assert q.factor("stress") == pytest.approx(6.894757e6, rel=1e-7)


def test_factors_are_those_the_unit_system_reads_inputs_with():
    """Bit for bit, so that every output turns a value into the same float."""
    names = {"force": "force", "length": "length", "moment": "moment",
             "distributed": "force/length", "stress": "stress"}
    for units in (KN_M, KIP_IN, N_MM, UnitSystem("lbf", "ft")):
        q = quantities(units)
        for mine, theirs in names.items():
            assert QUANTITIES[mine] == DIMENSIONS[theirs][:2]
            assert q.factor(mine) == units.factor(theirs), (units, mine)


def test_columns_convert_by_their_kind():
    q = quantities(N_MM)
    moment = Column("AB.start.m", "start_m", "AB")
    axial = Column("AB.n", "axial", "AB")
    rot = Column("A.rz", "reaction", "A", restraint_index=0)
    assert moment.is_moment and rot.is_moment and not axial.is_moment
    assert q.column(2.5, moment) == pytest.approx(2500.0, rel=1e-15)  # 2.5 N·m = 2500 N·mm
    assert q.column(2.5, axial) == 2.5
    assert q.column_unit(moment) == q.column_unit(rot) == "N*mm"
    assert q.column_unit(axial) == "N"
    # the conjugate displacement: a rotation in rad, a length in mm
    assert q.conjugate_factor(moment) == 1.0
    assert q.conjugate_factor(axial) == pytest.approx(1e-3, rel=1e-15)


def test_unit_texts():
    q = quantities(KN_M)
    assert [q.unit(k) for k in ("force", "length", "moment", "rotation", "distributed",
                                "stress")] == ["kN", "m", "kN*m", "rad", "kN/m", "kN/m^2"]
    assert q.label(1, 2) == "kN*m^2"
    assert q.label(-1, 1) == "m/kN"
    assert q.label(-1, -1) == "1/(kN*m)"
    assert q.label(0, 0) == "-"


def test_one_helper_per_unit_system():
    assert quantities(KIP_IN) is quantities(UnitSystem("kip", "in"))
    assert isinstance(quantities(KIP_IN), Quantities)


PROPPED = """
[structure]
name = "propped cantilever"
units = { force = "kN", length = "m" }
[nodes]
A = [0, 0]
B = [6, 0]
[beams]
AB = { nodes = ["A", "B"], EI = "20000 kN*m^2" }
[supports]
A = "fixed"
B = "roller"
[[loads]]
member = "AB"
wy = "-10 kN/m"
"""


def test_reported_numbers_in_other_units():
    """Propped cantilever under a uniform load w over L (handbook closed form, from
    memory): reaction at the prop 3wL/8, fixed-end moment wL²/8. Reported in kip and inch,
    the JSON result, the summary numbers and the sheet all show the SI value divided by
    the factor of its quantity."""
    w, L = 10e3, 6.0  # N/m, m
    sol = leastwork.solve(leastwork.loads_case(PROPPED, "propped.toml"))
    sol.display_units = KIP_IN
    numbers = case_numbers(sol, "default")
    assert numbers.reactions["B"]["y"] == pytest.approx(3 * w * L / 8 / KIP, rel=1e-9)
    assert abs(numbers.reactions["A"]["rz"]) == pytest.approx(w * L**2 / 8 / (KIP * INCH),
                                                              rel=1e-9)
    js = sol.to_dict()["cases"]["default"]
    assert js["reactions"] == numbers.reactions
    assert js["members"] == numbers.members
    sheet = audit_sheet(sol)
    grid = next(b for s in sheet.steps if s.number == 6 for b in s.blocks
                if isinstance(b, Grid) and "reactions" in b.title)
    assert "y [kip]" in grid.headers and "rz [kip*in]" in grid.headers
    row = next(r for r in grid.rows if r[0] == "B")
    assert row[grid.headers.index("y [kip]")] == numbers.reactions["B"]["y"]
