"""Stresses N/A ± M/S and the deflections a limit L/N is compared with (contract 5.3).

Sources beside each check: handbook closed forms (from memory), statics, common practice,
invariants.
"""

from __future__ import annotations

import math
import subprocess
import sys

import pytest
from _cases import check

import leastwork

SECTIONS = """
[materials.steel]
E = "210 GPa"

[sections.ipe300]      # A and I of an IPE 300 (section tables, from memory)
A = "53.8 cm^2"
I = "8356 cm^4"
depth = "300 mm"

[sections.ipe300_s]    # the same with its elastic modulus given: S = I/(h/2)
A = "53.8 cm^2"
I = "8356 cm^4"
S = "8356/15 cm^3"

[sections.m20]         # M20 rod, gross area pi d^2/4
A = "314.159 mm^2"

[defaults]
material = "steel"
"""

EI = 210e6 * 8356e-8  # kN*m^2


def _case(body: str, limits: str = "") -> str:
    return ('[structure]\nname = "checks"\nunits = { force = "kN", length = "m", '
            'stress = "MPa", displacement = "mm" }\n' + SECTIONS + body
            + (f"\n[analysis]\ndeflection_limits = {limits}\n" if limits else ""))


def _solve(text: str) -> dict:
    return leastwork.solve(leastwork.loads_case(text, source="<test>")).to_dict()


TIED = """
[nodes]
A = [0, 0]
B = [6, 0]
C = [0, 3]
[beams]
AB = {{ nodes = ["A", "B"], section = "{sec}" }}
[bars]
CB = {{ nodes = ["C", "B"], section = "m20" }}
[supports]
A = "pinned"
C = "pinned"
[[loads]]
member = "AB"
wy = "-10 kN/m"
"""


@pytest.mark.parametrize("sec", ["ipe300", "ipe300_s"])
def test_beam_and_tie_stresses(sec):
    # statics: the tie carries the 30 kN end reaction, T = 30 sqrt(45)/3, and pushes the
    # beam with its horizontal part, N = -60 kN; mid-span moment wL^2/8 = 45 kN*m
    # (handbook); the beam's faces N/A +- M/S, the tie T/A
    c = _solve(_case(TIED.format(sec=sec)))["cases"]["default"]["members"]
    A, S = 53.8e-4, 8356e-8 / 0.15
    N, M = -60.0, 45.0
    check(c["AB"]["stress"]["max"]["value"], (N / A + M / S) / 1e3, 100, "bottom fibre")
    check(c["AB"]["stress"]["min"]["value"], (N / A - M / S) / 1e3, 100, "top fibre")
    check(c["AB"]["stress"]["max"]["at"], 3.0, 6.0, "at mid-span")
    T = 30 * math.sqrt(45) / 3
    check(c["CB"]["stress"]["max"]["value"], T / 314.159e-6 / 1e3, 100, "tie")


def test_rod_stress_in_a_familiar_size():
    # 8.8 kN in an M20 rod is about 28 MPa on its gross area (common practice)
    text = _case("""
[nodes]
A = [0, 0]
B = [0, -2]
[bars]
AB = { nodes = ["A", "B"], section = "m20" }
[supports]
A = "pinned"
B = { restrain = ["x"] }
[[loads]]
node = "B"
fy = "-8.8 kN"
""")
    s = _solve(text)["cases"]["default"]["members"]["AB"]["stress"]
    assert s["max"]["value"] == pytest.approx(28.0, abs=0.05)


def test_propped_cantilever_deflection_against_its_limit():
    # handbook (from memory): largest deflection about wL^4/(185 EI) at 0.4215 L from the
    # fixed end (exactly (15 - sqrt 33)/16 L); the ends do not move, so the chord is the
    # axis. Limit L/360 in mm; ratio = value/limit.
    L, w = 7.0, 12.0
    text = _case(f"""
[nodes]
A = [0, 0]
B = [{L}, 0]
[beams]
AB = {{ nodes = ["A", "B"], section = "ipe300" }}
[supports]
A = "fixed"
B = "roller"
[[loads]]
member = "AB"
wy = "-{w} kN/m"
""", "{ span = 360, cantilever = 180 }")
    d = _solve(text)["cases"]["default"]["members"]["AB"]["deflection"]
    check(d["value"], w * L**4 / (185 * EI) * 1e3, 100, "largest deflection", rel=2e-3)
    check(d["at"], (15 - math.sqrt(33)) / 16 * L, L, "where", rel=1e-6)
    check(d["limit"], L / 360 * 1e3, 100, "limit")
    check(d["ratio"], d["value"] / d["limit"], 1.0, "ratio")
    assert d["measured"] == "span"


def test_overhang_is_measured_from_the_tangent_at_its_root():
    # an overhang of length a with P at its tip, beyond a simply supported back span: from
    # the tangent at the support its tip moves P a^3/(3EI) (handbook cantilever, from
    # memory), whatever the back span's rotation (which the absolute movement includes)
    a, P = 2.0, 15.0
    text = _case(f"""
[nodes]
A = [0, 0]
B = [6, 0]
C = [{6 + a}, 0]
[beams]
AB = {{ nodes = ["A", "B"], section = "ipe300" }}
BC = {{ nodes = ["B", "C"], section = "ipe300" }}
[supports]
A = "pinned"
B = "roller"
[[loads]]
node = "C"
fy = "-{P} kN"
""", "{ span = 360, cantilever = 180 }")
    m = _solve(text)["cases"]["default"]["members"]
    d = m["BC"]["deflection"]
    assert d["measured"] == "cantilever"
    check(d["value"], P * a**3 / (3 * EI) * 1e3, 100, "tip from the tangent")
    check(d["limit"], a / 180 * 1e3, 100, "cantilever limit")
    assert abs(m["BC"]["deflection_max"]["value"]) > 1.5 * d["value"]  # rotation at B


def test_a_settling_support_moves_the_chord_not_the_deflection():
    # invariant: a simply supported beam whose support settles, with no load, stays
    # straight: nothing to compare with a limit, while its absolute movement is 10 mm
    text = _case("""
[nodes]
A = [0, 0]
B = [5, 0]
[beams]
AB = { nodes = ["A", "B"], section = "ipe300" }
[supports]
A = "pinned"
B = "roller"
[[loads]]
settlement = "B"
dy = "-10 mm"
""")
    m = _solve(text)["cases"]["default"]["members"]["AB"]
    assert m["deflection"]["value"] == pytest.approx(0.0, abs=1e-9)
    assert m["deflection"]["limit"] is None and m["deflection"]["ratio"] is None
    assert abs(m["deflection_max"]["value"]) == pytest.approx(10.0)


@pytest.mark.parametrize(("limits", "words"), [
    ("{ span = 0 }", "from 1 to 1e6"),
    ("{ middle = 300 }", "middle"),
    ("360", "expected {"),
])
def test_bad_deflection_limits(tmp_path, limits, words):
    path = tmp_path / "bad.toml"
    path.write_text(_case(TIED.format(sec="ipe300"), limits))
    out = subprocess.run([sys.executable, "-m", "leastwork", "solve", str(path)],
                         capture_output=True, text=True)
    assert out.returncode == 2 and words in out.stderr, out.stderr


def test_a_support_that_does_not_move_reports_zero():
    # round-off is shown as 0: a propped cantilever's prop does not move (it is a support)
    # even when every translation of the structure is round-off and only rotations are real
    text = _case("""
[nodes]
A = [0, 0]
B = [6, 0]
[beams]
AB = { nodes = ["A", "B"], section = "ipe300" }
[supports]
A = "fixed"
B = "roller"
[[loads]]
member = "AB"
wy = -4
[analysis]
displacements = ["B.y", "B.rz"]
""")
    d = _solve(text)["cases"]["default"]["displacements"]
    assert d["B.y"] == 0.0
    check(d["B.rz"], 4 * 6**3 / (48 * EI), 1e-3, "end slope wL^3/48EI (handbook)")
