"""One-way members and supports: tension-only bracing, bearings that lift off, pretensioned
ties; each load case and combination in its own state.

Each check names its source: statics, handbook closed forms (from memory), or an invariant
(equilibrium, the independent stiffness cross-check of the state's structure, gaps that
open the right way, linearity where no state changes).
"""

from __future__ import annotations

import subprocess
import sys

import pytest
from _cases import check

import leastwork

BAY = """
[structure]
name = "braced bay"
units = {{ force = "kN", length = "m" }}

[nodes]
A = [0, 0]
B = [4, 0]
C = [4, 3]
D = [0, 3]

[bars]
AD = {{ nodes = ["A", "D"], EA = "400000 kN" }}
BC = {{ nodes = ["B", "C"], EA = "400000 kN" }}
CD = {{ nodes = ["C", "D"], EA = "400000 kN" }}
AC = {{ nodes = ["A", "C"], EA = "60000 kN", acts = "tension" }}
BD = {{ nodes = ["B", "D"], EA = "60000 kN", acts = "tension" }}

[supports]
A = "pinned"
B = "pinned"

{loads}
"""


def _solve(text: str):
    return leastwork.solve(leastwork.loads_case(text, source="<test>"))


def test_tension_only_bracing_one_diagonal_carries_the_shear():
    # statics: with the compression diagonal slack the bay is determinate and the tension
    # diagonal carries H / cos(theta) = 10 / (4/5) = 12.5 kN; the other carries nothing
    sol = _solve(BAY.format(loads='[[loads]]\nnode = "D"\nfx = "10 kN"'))
    d = sol.to_dict()["cases"]["default"]
    check(d["members"]["AC"]["start"]["n"], 12.5, 12.5, "AC")
    assert d["members"]["BD"]["start"]["n"] == 0.0
    assert d["members"]["BD"]["state"] == "slack" and d["members"]["AC"]["state"] == "acting"
    check(d["reactions"]["A"]["x"], -10.0, 10.0, "A.x")
    assert d["checks"]["equilibrium_ok"] and d["checks"]["stiffness_ok"]
    # invariant: the slack diagonal's ends move closer (it would be pushed), never apart
    from leastwork.one_way import chord_change, free_elongation

    st = sol.structure
    res = sol.cases["default"]
    assert chord_change(st, sol, res, "BD") - free_elongation(st, "default", "BD") < 0


def test_bearing_lifts_off_instead_of_pulling():
    # two equal spans, w on the first only: a two-way far bearing would pull down with
    # wL/16 (handbook two-span coefficients, from memory). A bearing that can only push
    # lifts off: the first span is simply supported (wL/2 at each end, statics), the
    # second swings up rigidly by the end slope wL^3/(24EI) (handbook), so the far end
    # rises wL^4/(24EI).
    w, L, EI = 10.0, 6.0, 20000.0
    base = f"""
[structure]
name = "two spans"
units = {{ force = "kN", length = "m" }}
[nodes]
A = [0, 0]
B = [{L}, 0]
C = [{2 * L}, 0]
[beams]
AB = {{ nodes = ["A", "B"], EI = "{EI} kN*m^2" }}
BC = {{ nodes = ["B", "C"], EI = "{EI} kN*m^2" }}
[supports]
A = "pinned"
B = "roller"
C = {{ restrain = ["y"]ACTS }}
[[loads]]
member = "AB"
wy = "-{w} kN/m"
[analysis]
displacements = ["C.y"]
"""
    two_way = _solve(base.replace("ACTS", "")).to_dict()["cases"]["default"]
    check(two_way["reactions"]["C"]["y"], -w * L / 16, w * L, "pulling far reaction")
    one_way = _solve(base.replace("ACTS", ', acts = "compression"')).to_dict()
    c = one_way["cases"]["default"]
    assert c["support_states"] == {"C": "lifted"}
    assert c["reactions"]["C"]["y"] == 0.0
    check(c["reactions"]["A"]["y"], w * L / 2, w * L, "A.y")
    check(c["reactions"]["B"]["y"], w * L / 2, w * L, "B.y")
    check(c["displacements"]["C.y"], w * L**4 / (24 * EI), w * L**4 / EI, "rise of C")
    assert not one_way["warnings"]


def test_a_bearing_that_pushes_stays():
    # the same beam loaded on both spans: every reaction pushes (3wL/8, 10wL/8, 3wL/8,
    # handbook), so nothing changes and the result is the linear one
    text = """
[structure]
name = "two spans"
units = { force = "kN", length = "m" }
[nodes]
A = [0, 0]
B = [5, 0]
C = [10, 0]
[beams]
AB = { nodes = ["A", "B"], EI = "20000 kN*m^2" }
BC = { nodes = ["B", "C"], EI = "20000 kN*m^2" }
[supports]
A = "pinned"
B = "roller"
C = { restrain = ["y"], acts = "compression" }
[[loads]]
member = "AB"
wy = -4
[[loads]]
member = "BC"
wy = -4
"""
    d = _solve(text).to_dict()["cases"]["default"]
    assert d["support_states"] == {"C": "bearing"} and d["one_way"]["solves"] == 1
    check(d["reactions"]["C"]["y"], 3 * 4 * 5 / 8, 20, "C.y")


def test_pretensioned_cross_bracing_keeps_both_ties_until_one_unloads():
    # both diagonals cut 2 mm short (pretension). A small sway load leaves both in
    # tension: the result is the linear one (invariant: equal to the same bay with
    # two-way diagonals). A large one slackens BD: then AC carries H / cos(theta) exactly
    # (statics of the determinate bay), whatever the pretension.
    fit = ('[[loads]]\nmember = "AC"\nmisfit = "-2 mm"\n\n'
           '[[loads]]\nmember = "BD"\nmisfit = "-2 mm"\n\n')
    small = fit + '[[loads]]\nnode = "D"\nfx = "5 kN"'
    one = _solve(BAY.format(loads=small)).to_dict()["cases"]["default"]
    two = _solve(BAY.format(loads=small).replace(', acts = "tension"', ""))
    two = two.to_dict()["cases"]["default"]
    assert one["members"]["BD"]["state"] == "acting" and one["members"]["BD"]["start"]["n"] > 0
    for mid in ("AC", "BD", "CD"):
        check(one["members"][mid]["start"]["n"], two["members"][mid]["start"]["n"], 10, mid)
    large = fit + '[[loads]]\nnode = "D"\nfx = "200 kN"'
    big = _solve(BAY.format(loads=large)).to_dict()["cases"]["default"]
    assert big["members"]["BD"]["state"] == "slack"
    check(big["members"]["AC"]["start"]["n"], 200 / 0.8, 250, "AC")


def test_each_combination_finds_its_own_state():
    # pretension alone keeps both ties; sway alone slackens BD; their combination is solved
    # in its own state and is not the sum of the two cases' results (no superposition
    # across states)
    loads = ('[[loads]]\nmember = "AC"\nmisfit = "-2 mm"\ncase = "fitup"\n\n'
             '[[loads]]\nmember = "BD"\nmisfit = "-2 mm"\ncase = "fitup"\n\n'
             '[[loads]]\nnode = "D"\nfx = "30 kN"\ncase = "sway"\n\n'
             "[combinations]\nboth = { fitup = 1.0, sway = 1.0 }")
    sol = _solve(BAY.format(loads=loads))
    cases = sol.to_dict()["cases"]
    assert not sol.states["fitup"].changed and sol.states["sway"].slack == ("BD",)
    summed = cases["fitup"]["members"]["AC"]["start"]["n"] + cases["sway"]["members"]["AC"][
        "start"]["n"]
    got = cases["both"]["members"]["AC"]["start"]["n"]
    assert abs(got - summed) > 1.0
    assert cases["both"]["checks"]["equilibrium_ok"] and cases["both"]["checks"]["stiffness_ok"]


def test_no_admissible_state_is_said_plainly(tmp_path):
    # two ties holding a node against a downward load from below: both would be in
    # compression; with them slack nothing holds the node (exit 3, one line)
    text = """
[structure]
name = "ties pushed"
units = { force = "kN", length = "m" }
[nodes]
A = [0, 0]
B = [4, 0]
C = [2, 1.5]
[bars]
AC = { nodes = ["A", "C"], EA = "50000 kN", acts = "tension" }
BC = { nodes = ["B", "C"], EA = "50000 kN", acts = "tension" }
[supports]
A = "pinned"
B = "pinned"
[[loads]]
node = "C"
fy = "-10 kN"
"""
    path = tmp_path / "pushed.toml"
    path.write_text(text)
    out = subprocess.run([sys.executable, "-m", "leastwork", "solve", str(path)],
                         capture_output=True, text=True)
    assert out.returncode == 3, out.stderr
    assert "no admissible state" in out.stderr and "Traceback" not in out.stderr
    assert len(out.stderr.strip().splitlines()) == 1


def test_bad_acts_is_refused(tmp_path):
    text = BAY.format(loads='[[loads]]\nnode = "D"\nfx = 1').replace(
        'acts = "tension" }', 'acts = "sideways" }', 1)
    path = tmp_path / "bad.toml"
    path.write_text(text)
    out = subprocess.run([sys.executable, "-m", "leastwork", "solve", str(path)],
                         capture_output=True, text=True)
    assert out.returncode == 2 and 'expected "tension"' in out.stderr
    assert len(out.stderr.strip().splitlines()) == 1


def test_acts_is_for_bars():
    # a beam cannot go slack: "acts" is not a beam key
    text = """
[structure]
name = "beam"
units = { force = "kN", length = "m" }
[nodes]
A = [0, 0]
B = [4, 0]
[beams]
AB = { nodes = ["A", "B"], EI = "1000 kN*m^2", acts = "tension" }
[supports]
A = "fixed"
"""
    with pytest.raises(leastwork.CaseError, match="acts"):
        leastwork.loads_case(text, source="<test>")


def test_one_way_support_needs_one_translation():
    text = BAY.format(loads='[[loads]]\nnode = "D"\nfx = 1').replace(
        'A = "pinned"', 'A = { restrain = ["x", "y"], acts = "compression" }')
    with pytest.raises(leastwork.CaseError, match="exactly one restrained translation"):
        leastwork.loads_case(text, source="<test>")


def test_the_summary_and_the_sheet_say_what_went_slack():
    sol = _solve(BAY.format(loads='[[loads]]\nnode = "D"\nfx = "10 kN"'))
    from leastwork.one_way import state_text

    text = state_text(sol.structure, sol.states["default"])
    assert "BD slack (tension only)" in text and "acting: AC" in text
    assert "not superposed" in text


def test_fitup_says_whether_each_tie_stays_in_tension():
    # invariants of the linear study: the locked-in range is symmetric about the case's own
    # force (a symmetric tolerance box), and the verdict follows the sign of its ends; a
    # case in which the tie is slack under its loads has no range (another structure)
    from leastwork.studies.fitup import fitup_study
    from leastwork.studies.one_way_check import one_way_verdicts

    loads = ('[[loads]]\nmember = "AC"\nmisfit = "-2 mm"\ncase = "fitup"\n\n'
             '[[loads]]\nmember = "BD"\nmisfit = "-2 mm"\ncase = "fitup"\n\n'
             '[[loads]]\nnode = "D"\nfx = "30 kN"\ncase = "sway"')
    sol = _solve(BAY.format(loads=loads))
    study = fitup_study(sol, {"AC": 0.001, "BD": 0.001}, samples=100, seed=1)
    verdicts = {(v.item, v.case): v for v in one_way_verdicts(sol, study)}
    assert set(verdicts) == {(m, c) for m in ("AC", "BD") for c in ("fitup", "sway")}
    for v in verdicts.values():
        if v.verdict == "slack under the loads":
            assert v.low is None and v.force == 0.0
            continue
        check(v.low + v.high, 2 * v.force, abs(v.force) + 1.0, "symmetric range")
        assert (v.verdict == "stays in tension") == (v.low > 0)
    assert verdicts[("BD", "sway")].verdict == "slack under the loads"
    assert verdicts[("AC", "fitup")].force > 0


def test_reanalysis_settles_one_way_members_too():
    # invariant: reanalysing with stiffer rods gives what a fresh solve gives, one-way
    # states included
    text = BAY.format(loads='[[loads]]\nnode = "D"\nfx = "10 kN"')
    first = _solve(text)
    stiffer = leastwork.loads_case(text.replace('EA = "60000 kN"', 'EA = "90000 kN"'),
                                   source="<test>")
    again = leastwork.reanalyse(first, stiffer).to_dict()["cases"]["default"]
    fresh = leastwork.solve(stiffer).to_dict()["cases"]["default"]
    assert again["members"]["BD"]["state"] == "slack"
    for mid in ("AC", "BD", "CD", "AD", "BC"):
        check(again["members"][mid]["start"]["n"], fresh["members"][mid]["start"]["n"], 10,
              mid)
