"""Loads given as an engineer writes them: per unit projected length (snow on a rafter),
in member-local components (wind normal to a roof), and every member's own weight.

Each check names its source: handbook closed forms (from memory), statics, or common
practice. The member is made axially rigid (no EA) where a closed form for bending alone is
compared, so that the sloping span's axial shortening does not enter.
"""

from __future__ import annotations

import math
import subprocess
import sys

import pytest
from _cases import check

import leastwork

STEEL = """
[materials.steel]
E = "210 GPa"
density = "{density}"

[sections.ipe300]
A = "53.8 cm^2"
I = "8356 cm^4"

[sections.bending_only]     # no area: an axially rigid member
I = "8356 cm^4"
"""


def _case(nodes: dict, members: str, supports: str, loads: str, *, density="7850 kg/m^3",
          units='{ force = "kN", length = "m" }') -> str:
    node_lines = "\n".join(f"{k} = [{x!r}, {y!r}]" for k, (x, y) in nodes.items())
    return (f'[structure]\nname = "load forms"\nunits = {units}\n'
            + STEEL.format(density=density)
            + '\n[defaults]\nmaterial = "steel"\nsection = "ipe300"\n'
            + f"\n[nodes]\n{node_lines}\n\n{members}\n\n[supports]\n{supports}\n\n{loads}\n")


def _solve(text: str) -> dict:
    st = leastwork.loads_case(text, source="<test>")
    return leastwork.solve(st).to_dict()


RIGID_RAFTER = '[beams]\nAB = { nodes = ["A", "B"], section = "bending_only" }'
PROPPED = 'A = "fixed"\nB = { restrain = ["y"] }'


@pytest.mark.parametrize("rise", [0.0, 1.5, 4.0])
def test_load_per_projected_length_on_a_propped_rafter(rise):
    # A load per unit horizontal length w on a sloping propped span of horizontal
    # projection Lh: its transverse part per member length is w cos^2(theta) on the length
    # Lh/cos(theta), so the fixed-end moment is that of the level span, w Lh^2/8 (handbook
    # propped cantilever wL^2/8, from memory; the projection rule is common practice), and
    # the vertical reactions carry w Lh (statics).
    w, Lh = 1.2, 6.0
    text = _case({"A": (0.0, 0.0), "B": (Lh, rise)}, RIGID_RAFTER, PROPPED,
                 '[[loads]]\nmember = "AB"\nwy = "-1.2 kN/m"\nper = "projection"')
    c = _solve(text)["cases"]["default"]
    check(abs(c["members"]["AB"]["start"]["m"]), w * Lh**2 / 8, w * Lh**2, "M at the fixed end")
    check(c["reactions"]["A"]["y"] + c["reactions"]["B"]["y"], w * Lh, w * Lh, "sum of Ry")
    check(c["reactions"]["A"]["x"], 0.0, w * Lh, "Rx")


def test_horizontal_load_per_projected_length_on_a_sloping_member():
    # wx per unit vertical length: the horizontal reactions carry wx * rise (statics)
    text = _case({"A": (0.0, 0.0), "B": (2.0, 5.0)}, RIGID_RAFTER, PROPPED,
                 '[[loads]]\nmember = "AB"\nwx = "0.8 kN/m"\nper = "projection"')
    c = _solve(text)["cases"]["default"]
    check(c["reactions"]["A"]["x"], -0.8 * 5.0, 4.0, "Rx")


def test_member_normal_load_on_a_sloping_propped_span():
    # wn normal to the member over its true length L: the fixed-end moment is q L^2/8
    # (handbook propped cantilever, from memory); the reactions balance q L along the
    # member's local -y... +y direction (statics).
    q, dx, dy = 2.0, 6.0, 3.0
    L = math.hypot(dx, dy)
    text = _case({"A": (0.0, 0.0), "B": (dx, dy)}, RIGID_RAFTER,
                 'A = "fixed"\nB = { restrain = ["x", "y"] }',
                 '[[loads]]\nmember = "AB"\nwn = "-2 kN/m"')
    c = _solve(text)["cases"]["default"]
    check(abs(c["members"]["AB"]["start"]["m"]), q * L**2 / 8, q * L**2, "M at the fixed end")
    rx = c["reactions"]["A"]["x"] + c["reactions"]["B"]["x"]
    ry = c["reactions"]["A"]["y"] + c["reactions"]["B"]["y"]
    # the load is -q along local +y = (-s, c): total (q L s, -q L c); reactions oppose it
    check(rx, -q * L * dy / L, q * L, "sum of Rx")
    check(ry, q * L * dx / L, q * L, "sum of Ry")


def test_member_point_load_normal_to_a_sloping_fixed_fixed_beam():
    # a force P normal to the member at mid-length of a beam fixed at both ends: end
    # moments P L/8 (handbook, from memory)
    P, dx, dy = 10.0, 4.0, 3.0
    L = 5.0
    text = _case({"A": (0.0, 0.0), "B": (dx, dy)}, RIGID_RAFTER,
                 'A = "fixed"\nB = "fixed"',
                 f'[[loads]]\nmember = "AB"\nat = "{L / 2} m"\nfn = "-10 kN"')
    r = _solve(text)["cases"]["default"]["members"]["AB"]
    check(abs(r["start"]["m"]), P * L / 8, P * L, "M at the start")
    check(abs(r["end"]["m"]), P * L / 8, P * L, "M at the end")


def test_local_components_on_a_level_beam_are_the_global_ones():
    # invariant: on a member drawn left to right, local +y is global +y and wt is wx
    base = {"A": (0.0, 0.0), "B": (5.0, 0.0)}
    beam = '[beams]\nAB = { nodes = ["A", "B"] }'
    sup = 'A = "fixed"\nB = "pinned"'
    local = _solve(_case(base, beam, sup, '[[loads]]\nmember = "AB"\nwt = "1 kN/m"\n'
                         'wn = ["-3 kN/m", "-5 kN/m"]'))
    glob = _solve(_case(base, beam, sup, '[[loads]]\nmember = "AB"\nwx = "1 kN/m"\n'
                        'wy = ["-3 kN/m", "-5 kN/m"]'))
    assert local["cases"] == glob["cases"]


def test_self_weight_of_a_rolled_section():
    # IPE 300: A = 53.8 cm^2, 42.2 kg/m in the section tables (from memory); at 7850 kg/m^3
    # and standard gravity its weight is 0.4142 kN/m. A propped cantilever under it: fixed-end
    # moment w L^2/8 (handbook), reactions w L (statics).
    L = 7.0
    w = 53.8e-4 * 7850 * 9.80665 / 1000  # kN/m
    assert w == pytest.approx(42.2 * 9.80665 / 1000, rel=2e-3)
    text = _case({"A": (0.0, 0.0), "B": (L, 0.0)}, '[beams]\nAB = { nodes = ["A", "B"] }',
                 'A = "fixed"\nB = "roller"', '[[loads]]\nself_weight = true\ncase = "dead"')
    c = _solve(text)["cases"]["dead"]
    check(abs(c["members"]["AB"]["start"]["m"]), w * L**2 / 8, w * L**2, "M at the fixed end")
    check(c["reactions"]["A"]["y"] + c["reactions"]["B"]["y"], w * L, w * L, "sum of Ry")


def test_unit_weight_and_density_agree_and_combine():
    # "77 kN/m^3" is a unit weight as written; 1.35 x dead scales every result (statics)
    L = 4.0
    text = _case({"A": (0.0, 0.0), "B": (L, 0.0)}, '[beams]\nAB = { nodes = ["A", "B"] }',
                 'A = "fixed"\nB = "roller"',
                 '[[loads]]\nself_weight = true\ncase = "dead"\n\n'
                 '[combinations]\nuls = { dead = 1.35 }', density="77 kN/m^3")
    c = _solve(text)["cases"]
    w = 77.0 * 53.8e-4
    check(c["dead"]["reactions"]["A"]["y"] + c["dead"]["reactions"]["B"]["y"], w * L, w * L,
          "sum of Ry")
    check(c["uls"]["reactions"]["A"]["y"], 1.35 * c["dead"]["reactions"]["A"]["y"], w * L,
          "combination")


def test_self_weight_of_truss_bars_goes_to_their_joints():
    # a bar's weight W = rho g A L, half on each end joint (common practice for pin-jointed
    # trusses); the supports carry the total (statics)
    nodes = {"A": (0.0, 0.0), "B": (4.0, 0.0), "C": (2.0, 1.5)}
    bars = ('[bars]\nAB = { nodes = ["A", "B"] }\nAC = { nodes = ["A", "C"] }\n'
            'BC = { nodes = ["B", "C"] }')
    c = _solve(_case(nodes, bars, 'A = "pinned"\nB = "pinned"',
                     "[[loads]]\nself_weight = true"))["cases"]["default"]
    unit = 53.8e-4 * 7850 * 9.80665 / 1000
    total = unit * (4.0 + 2 * 2.5)
    check(c["reactions"]["A"]["y"], total / 2, total, "Ry at A (symmetry)")
    check(c["reactions"]["A"]["y"] + c["reactions"]["B"]["y"], total, total, "sum of Ry")


@pytest.mark.parametrize(("change", "words"), [
    ({"density": "7850"}, "expected a density with its units"),
    ({"density": "7850 m"}, "mass density"),
    ({"loads": '[[loads]]\nmember = "AB"\nwx = 1\nwt = 1'}, "not both in one load"),
    ({"loads": '[[loads]]\nmember = "AB"\nwn = -1\nper = "projection"'},
     "goes with global components"),
    ({"loads": '[[loads]]\nmember = "AB"\nwy = -1\nper = "horizontal"'},
     'expected "length"'),
    ({"loads": "[[loads]]\nself_weight = false"}, "expected true"),
    ({"loads": '[[loads]]\nmember = "AB"\nat = 1\nfx = 1\nfn = 1'}, "not both in one load"),
])
def test_bad_load_forms_are_refused_in_one_line(tmp_path, change, words):
    loads = change.get("loads", "[[loads]]\nself_weight = true")
    text = _case({"A": (0.0, 0.0), "B": (3.0, 0.0)}, '[beams]\nAB = { nodes = ["A", "B"] }',
                 'A = "fixed"\nB = "roller"', loads,
                 density=change.get("density", "7850 kg/m^3"))
    path = tmp_path / "bad.toml"
    path.write_text(text)
    out = subprocess.run([sys.executable, "-m", "leastwork", "solve", str(path)],
                         capture_output=True, text=True)
    assert out.returncode == 2, out.stderr
    assert words in out.stderr and "Traceback" not in out.stderr
    assert len(out.stderr.strip().splitlines()) == 1


def test_self_weight_needs_an_area(tmp_path):
    text = _case({"A": (0.0, 0.0), "B": (3.0, 0.0)},
                 '[beams]\nAB = { nodes = ["A", "B"], EI = "1000 kN*m^2" }',
                 'A = "fixed"\nB = "roller"', "[[loads]]\nself_weight = true")
    text = text.replace('section = "ipe300"\n', "")
    with pytest.raises(leastwork.CaseError, match="area A in its section"):
        leastwork.loads_case(text, source="<test>")


def test_the_sheet_says_how_a_load_was_given():
    # the load table of the audit trail shows the global values used and the form written
    text = _case({"A": (0.0, 0.0), "B": (6.0, 3.0)}, '[beams]\nAB = { nodes = ["A", "B"] }',
                 PROPPED, '[[loads]]\nmember = "AB"\nwy = "-1.2 kN/m"\nper = "projection"\n'
                 'case = "snow"\n\n[[loads]]\nself_weight = true\ncase = "dead"')
    from leastwork.output.audit.structure import load_row
    from leastwork.output.quantities import Quantities

    st = leastwork.loads_case(text, source="<test>")
    u = Quantities(st.units)
    rows = [load_row(st, u, ld) for ld in st.loads]
    assert "given as wy = -1.2 kN/m per unit projected length" in rows[0][3]
    # the sloping member's length is sqrt(45) m: 1.2 x 6/sqrt(45) kN/m per member length
    assert "-1.07 kN/m" in rows[0][3]  # three significant figures
    assert "self-weight of AB" in rows[1][3]


def test_symbolic_mode_refuses_these_loads_plainly():
    text = _case({"A": (0.0, 0.0), "B": (6.0, 3.0)}, '[beams]\nAB = { nodes = ["A", "B"] }',
                 PROPPED, "[[loads]]\nself_weight = true")
    from leastwork.symbolic import solve_symbolic

    with pytest.raises(leastwork.CaseError, match="solved numerically only"):
        solve_symbolic("<test>", text=text)
