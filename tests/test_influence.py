"""Influence lines (leastwork.studies.influence and ``leastwork influence``).

Outside checks: a handbook closed form (two equal spans, load at the centre of one span);
agreement with full solves, one load case per position; Maxwell-Betti reciprocity in the
Mueller-Breslau form (a reaction's line is the deflected shape under a unit settlement of
that support; a bar force's line is minus the deflected shape under a unit lengthening of
that bar), computed by the independent unit-load displacement path.
"""

from __future__ import annotations

import dataclasses
import json
from pathlib import Path

import numpy as np
import pytest

import leastwork
from leastwork.cli import main
from leastwork.errors import CaseError
from leastwork.model import Misfit, PointLoad, Settlement
from leastwork.studies.influence import influence_line, influence_to_dict, parse_quantity

CASES = Path(__file__).resolve().parents[1] / "cases"
BRIDGE = CASES / "footbridge-truss.toml"
PORTAL = CASES / "portal-frame.toml"
TIED = CASES / "tied-beam.toml"
RAMP = CASES / "ramp-on-pile.toml"  # a spring support and an inclined roller

TWO_SPAN = """
[structure]
name = "Two-span crane runway girder"
units = { force = "kN", length = "m" }
[nodes]
A = [0, 0]
B = [6, 0]
C = [12, 0]
[beams]
AB = { nodes = ["A", "B"], EA = "2.0e6 kN", EI = "9.0e4 kN*m^2" }
BC = { nodes = ["B", "C"], EA = "2.0e6 kN", EI = "9.0e4 kN*m^2" }
[supports]
A = "pinned"
B = "roller"
C = "roller"
"""


def with_loads(st, loads, displacements=()):
    names = tuple(dict.fromkeys(ld.case for ld in loads))
    return dataclasses.replace(st, loads=tuple(loads), case_order=names,
                               displacements=tuple(displacements))


def point_value(st, res, name: str, pt, side: str) -> float:
    """The quantity ``name`` read from a full solve's CaseResult (SI)."""
    if "@" in name:
        mid, rest = name.split("@")
        comp = rest[-1]
        at = float(rest[:-2]) * st.units.factor("length")
        field = getattr(res.members[mid], comp)
        return float(field(at, side))
    node, d = name.split(".", 1) if "." in name else (name, "")
    if node in st.nodes:
        return float(res.reactions[node][d])
    mid = node
    col = res.members[mid]
    if d in ("", "n"):
        return float(col.end[0])
    return float((col.start if d == "start.m" else col.end)[2])


def test_two_equal_spans_load_at_centre_of_one_span():
    """Unit load at the centre of span AB: R_B = 11/16, R_A = 13/32, R_C = -3/32 (AISC Steel
    Construction Manual, beam diagrams: continuous beam, two equal spans, concentrated load
    at centre of one span)."""
    st = leastwork.loads_case(TWO_SPAN)
    sol = leastwork.solve(st)
    for quantity, expected in (("B.y", 11 / 16), ("A.y", 13 / 32), ("C.y", -3 / 32)):
        line = influence_line(sol, quantity, "AB,BC")  # 10 intervals: tenths of the span
        at = [(p.member, round(p.at, 9)) for p in line.points]
        value = line.values[at.index(("AB", 3.0))] / 1e3  # kN per 1 kN
        assert value == pytest.approx(expected, rel=1e-12)
    line = influence_line(sol, "B.y", ["AB", "BC"])
    assert len(line.points) == 22  # ends + 9 interior points on each member
    assert line.values[10] / 1e3 == pytest.approx(1.0)  # load on the support itself


@pytest.mark.parametrize("path, quantity, along", [
    (PORTAL, "E.rz", ["AB", "BC", "CD"]),
    (PORTAL, "BC@2.5.m", ["BC", "CD"]),
    (PORTAL, "BC@2.5.v", ["BC"]),
    (PORTAL, "CD@1.n", ["BC", "CD", "ED"]),
    (PORTAL, "AB.end.m", ["BC"]),
    (PORTAL, "CD", ["BC", "CD"]),
    (TIED, "DB", ["AB", "BC"]),
    (TIED, "BC@1.5.v", ["AB", "BC"]),
    (TIED, "E.y", ["AB", "BC", "EC"]),
    (RAMP, "C.x", ["AB", "BC"]),
    (RAMP, "C.n", ["AB", "BC"]),
    (RAMP, "B.y", ["AB", "BC"]),
])
def test_ordinates_equal_full_solves(path, quantity, along):
    """Every ordinate equals the same quantity from a full solve with a PointLoad at that
    position (all positions solved as load cases of one structure)."""
    st = leastwork.load_case(path)
    sol = leastwork.solve(st, verify=False)
    line = influence_line(sol, quantity, along, intervals=6)
    P = st.units.factor("force")
    loads = [PointLoad(p.member, p.at, fy=-P, case=f"p{i}") for i, p in enumerate(line.points)]
    full = leastwork.solve(with_loads(st, loads), verify=False)
    expected = np.array([
        point_value(st, full.cases[f"p{i}"], quantity, p, "left" if p.side == "end" else "right")
        for i, p in enumerate(line.points)])
    scale = np.max(np.abs(expected))
    assert scale > 0
    np.testing.assert_allclose(line.values, expected, rtol=0, atol=1e-9 * scale)
    if any(p.side for p in line.points):
        # when the load (0, -P) crosses the section from the start side to the end side,
        # v changes by -P_y = P cos and n by P_x = -P sin (docs/conventions.md: v jumps by
        # +P_y, n by -P_x, read along the member)
        i = [k for k, p in enumerate(line.points) if p.side == "start"][0]
        c, s = st.direction(line.points[i].member)
        jump = P * c if quantity.endswith(".v") else -P * s
        assert line.values[i + 1] - line.values[i] == pytest.approx(jump, rel=1e-9)


def test_reaction_line_is_the_shape_under_a_unit_settlement():
    """Mueller-Breslau from Maxwell-Betti: R(x) = v(x) / delta, v the upward displacement at
    x when the support is moved by delta in the reaction's direction (other supports fixed),
    computed by the unit-load displacement path of a full solve."""
    for text, node, along in ((TWO_SPAN, "B", ["AB", "BC"]), (None, "E", ["BC", "CD"])):
        st = leastwork.loads_case(text) if text else leastwork.load_case(PORTAL)
        sol = leastwork.solve(st, verify=False)
        line = influence_line(sol, f"{node}.y", along, intervals=5)
        delta = 0.01  # m
        Lf = st.units.factor("length")
        targets = [f"{p.member}@{p.at / Lf!r}.y" for p in line.points]
        moved = leastwork.solve(with_loads(st, [Settlement(node, (("y", delta),), "s")],
                                           targets), verify=False)
        shape = np.array([moved.cases["s"].displacements[t] for t in targets])
        P = st.units.factor("force")
        np.testing.assert_allclose(line.values / P, shape / delta, rtol=0,
                                   atol=1e-9 * np.max(np.abs(shape / delta)))


def test_bar_force_line_is_minus_the_shape_under_a_unit_lengthening():
    """Maxwell-Betti with a misfit: N_k(x) = -v(x) / e, v the upward displacement at x when
    bar k alone is made e too long. The load moves along the bottom chord (bars: the lever
    rule between the nodes, as the deck stringers would pass it on)."""
    st = leastwork.load_case(BRIDGE)
    sol = leastwork.solve(st, verify=False)
    along = ["L0L1", "L1L2", "L2L3", "L3L4"]
    for bar in ("U1L2", "L2L3", "U2U3"):
        line = influence_line(sol, bar, along, intervals=3)
        e = 0.002  # m
        targets = [f"{p.member}@{p.at!r}.y" for p in line.points]
        moved = leastwork.solve(with_loads(st, [Misfit(bar, e, "e")], targets), verify=False)
        shape = np.array([moved.cases["e"].displacements[t] for t in targets])
        P = st.units.factor("force")
        np.testing.assert_allclose(line.values / P, -shape / e, rtol=0,
                                   atol=1e-9 * np.max(np.abs(shape / e)))


def test_quantity_names():
    st = leastwork.load_case(TIED)
    topo = leastwork.solve(st, verify=False).topology
    assert parse_quantity(st, topo, "DB").dimension == "force"
    assert parse_quantity(st, topo, "AB").row.tolist() == parse_quantity(st, topo,
                                                                        "AB.n").row.tolist()
    assert parse_quantity(st, topo, "AB@2.m").dimension == "moment"
    for bad, phrase in (("B.q", "not a quantity"), ("C.y", "no reaction y"),
                        ("A.rz", "no reaction rz"), ("EC.end.m", "no such force"),
                        ("AB@9.m", "off the member"), ("DB@1.m", "axial force only"),
                        ("ZZ@1.m", "unknown member")):
        with pytest.raises(CaseError, match=phrase) as exc:
            parse_quantity(st, topo, bad)
        assert exc.value.where == "--quantity"


def test_cli_json(capsys):
    case = CASES / "canopy-prop.toml"
    st = leastwork.load_case(case)
    mid = next(iter(st.members))
    assert main(["influence", str(case), "--quantity", f"{mid}@1.m", "--along", mid,
                 "--points", "4", "--json"]) == 0
    out = json.loads(capsys.readouterr().out)
    assert out["quantity"] == f"{mid}@1.m"
    assert out["units"]["value"] == "kN*m" and out["units"]["length"] == "m"
    assert {"member", "at", "value"} <= set(out["points"][0])
    sol = leastwork.solve(st, verify=False)
    line = influence_line(sol, f"{mid}@1.m", mid, intervals=4)
    assert out == {**influence_to_dict(line, sol.units, st.name), "warnings": []}
    assert main(["influence", str(case), "--quantity", f"{mid}@1.m", "--along", mid,
                 "--no-color"]) == 0
    assert "Influence line" in capsys.readouterr().out


@pytest.mark.parametrize("args, phrase", [
    (["--quantity", "Q.y", "--along", "AB"], '"Q.y" is not a quantity'),
    (["--quantity", "B.y", "--along", "AB,XY"], '--along: unknown member "XY"'),
    (["--quantity", "B.y", "--along", "AB", "--points", "0"], "--points"),
    (["--quantity", "B.y"], "required"),
    (["--quantity", "B.y", "--along", "AB", "--frobnicate"], "unrecognized"),
])
def test_cli_bad_input_exits_2_with_one_line(args, phrase, capsys, tmp_path):
    case = tmp_path / "runway.toml"
    case.write_text(TWO_SPAN, encoding="utf-8")
    assert main(["influence", str(case), *args]) == 2
    err = capsys.readouterr().err
    assert "Traceback" not in err
    lines = [ln for ln in err.splitlines() if ln.strip()]
    assert len(lines) == 1 and lines[0].startswith("leastwork: error: "), err
    assert phrase in lines[0]
