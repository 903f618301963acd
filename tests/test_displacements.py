"""Displacements: handbook deflections read through the displacement targets, and the
invariants any correct unit-load computation must satisfy.

Targets (docs/case-format.md section 16): "NODE.x|y|rz", "MEMBER@DIST.x|y" (DIST in case
length units from the member's start node), "NODE1-NODE2" (change of distance, + apart).

Outside values: handbook closed forms (source beside each check).  Invariants:
  * Maxwell-Betti reciprocity: the displacement at i from a unit load at j equals the
    displacement at j from a unit load at i (force/force, force/moment, moment/moment);
  * at a support given a settlement the displacement equals the settlement;
  * reduction theorem: a displacement does not depend on which redundants were released;
  * the unit-load value at a point of a member agrees with the deflected shape integrated
    kinematically from the curvature (leastwork.displacements.member_shape);
  * a change of distance equals the projection of the two nodes' displacements on the line
    joining them; for a bar it is N l/EA plus the free elongation (Hooke);
  * linearity: displacements scale with the loads and superpose.
"""

from __future__ import annotations

import functools
import math

import numpy as np
import pytest
from _cases import (
    braced_bay_geometry,
    case_text,
    check,
    solve,
    solve_default,
    straight_beam,
)  # noqa: E402

import leastwork  # noqa: E402
from leastwork.displacements import member_shape  # noqa: E402

L = 6.0
W = 12.0  # kN/m
P = 40.0  # kN
EI = 25000.0  # kN*m^2
EA = 2.0e6  # kN


def at(member: str, dist: float, direction: str = "y") -> str:
    """A member-point target; repr keeps every digit of the distance."""
    return f"{member}@{float(dist)!r}.{direction}"


# =====================================================================================
# Handbook deflections
# =====================================================================================


def test_propped_cantilever_uniform_load_deflections():
    """Item 1 -- Hicks, Civil Engineering Formulas ch. 2; AISC Steel Construction Manual,
    beam diagrams and formulas: mid-span deflection wl^4/(192EI); slope at the simple end
    wl^3/(48EI); maximum (39 + 55 sqrt 33)/65536 wl^4/EI at (1 + sqrt 33) l/16 from the
    simple end.  Fixed at A (x = 0), prop at B (x = l): the beam sags, so the slope at B is
    rising toward B, i.e. counter-clockwise (+)."""
    a_max = (1 + math.sqrt(33)) / 16 * L  # from the simple end B
    targets = ["AB@3.y", "AB@3.0.x", "B.rz", "A.rz", at("AB", L - a_max)]
    c = solve_default(straight_beam({"A": 0.0, "B": L}, {"A": "fixed", "B": "roller"},
                                    [{"member": "AB", "wy": -W}], EI=EI, EA=EA,
                                    analysis={"displacements": targets}))
    d = c["displacements"]
    s = W * L**4 / EI
    check(d["AB@3.y"], -W * L**4 / (192 * EI), s, "mid-span deflection")
    check(d["B.rz"], W * L**3 / (48 * EI), s / L, "slope at the prop")
    check(d["A.rz"], 0.0, s / L, "no rotation at the wall")
    check(d["AB@3.0.x"], 0.0, s, "no axial displacement")
    check(d[targets[-1]], -(39 + 55 * math.sqrt(33)) / 65536 * s, s, "maximum deflection")


def test_propped_cantilever_mirrored_slope_sign():
    """The same beam drawn with the wall on the right (fixed B, prop A): the slope at the
    prop is now clockwise, -wl^3/(48EI) (item 1, Hicks ch. 2; sign from the geometry)."""
    c = solve_default(straight_beam({"A": 0.0, "B": L}, {"A": "roller", "B": "fixed"},
                                    [{"member": "AB", "wy": -W}], EI=EI,
                                    analysis={"displacements": ["A.rz", "AB@3.y"]}))
    check(c["displacements"]["A.rz"], -W * L**3 / (48 * EI), W * L**3 / EI, "slope at the prop")
    check(c["displacements"]["AB@3.y"], -W * L**4 / (192 * EI), W * L**4 / EI, "mid-span")


def test_propped_cantilever_units_n_mm():
    """Item 1 again in N and mm: the target distance is read in the case length unit
    ("AB@3000.y" is 3 m along), and the deflection comes out in mm."""
    text = """
[structure]
name = "roof purlin propped at one end, in N and mm"
units = { force = "N", length = "mm" }
[nodes]
A = [0, 0]
B = [6000, 0]
[beams]
AB = { nodes = ["A", "B"], EI = "25000 kN*m^2" }
[supports]
A = "fixed"
B = "roller"
[[loads]]
member = "AB"
wy = "-12 kN/m"
[analysis]
displacements = ["AB@3000.y", "B.rz"]
"""
    d = solve_default(text)["displacements"]
    check(d["AB@3000.y"], -W * L**4 / (192 * EI) * 1000.0, W * L**4 / EI * 1000, "mid-span in mm")
    check(d["B.rz"], W * L**3 / (48 * EI), W * L**3 / EI, "slope in rad")


def test_propped_cantilever_central_load_deflections():
    """Item 2 -- AISC Manual beam formulas (secondary source): deflection at the
    load 7Pl^3/(768EI); maximum Pl^3/(48 sqrt5 EI) at l/sqrt5 from the simple end."""
    a = L / math.sqrt(5)
    targets = ["AB@3.y", at("AB", L - a)]
    c = solve_default(straight_beam({"A": 0.0, "B": L}, {"A": "fixed", "B": "roller"},
                                    [{"member": "AB", "at": L / 2, "fy": -P}], EI=EI,
                                    analysis={"displacements": targets}))
    s = P * L**3 / EI
    check(c["displacements"]["AB@3.y"], -7 * s / 768, s, "deflection under the load")
    check(c["displacements"][targets[1]], -s / (48 * math.sqrt(5)), s, "maximum deflection")


def test_fixed_fixed_deflections():
    """Items 4 and 5 -- Hicks ch. 2: uniform load wl^4/(384EI), central load Pl^3/(192EI)."""
    res = solve(straight_beam({"A": 0.0, "B": L}, {"A": "fixed", "B": "fixed"},
                              [{"member": "AB", "wy": -W, "case": "uniform"},
                               {"member": "AB", "at": L / 2, "fy": -P, "case": "point"}],
                              EI=EI, EA=EA, analysis={"displacements": ["AB@3.y"]}))
    check(res["cases"]["uniform"]["displacements"]["AB@3.y"], -W * L**4 / (384 * EI),
          W * L**4 / EI, "uniform load")
    check(res["cases"]["point"]["displacements"]["AB@3.y"], -P * L**3 / (192 * EI),
          P * L**3 / EI, "central load")


def test_simple_beam_deflections():
    """Hicks ch. 2 (simple beam): uniform load 5wl^4/(384EI) at mid-span, end slopes
    wl^3/(24EI)."""
    c = solve_default(straight_beam({"A": 0.0, "B": L}, {"A": "pinned", "B": "roller"},
                                    [{"member": "AB", "wy": -W}], EI=EI,
                                    analysis={"displacements": ["AB@3.y", "A.rz", "B.rz"]}))
    s = W * L**4 / EI
    check(c["displacements"]["AB@3.y"], -5 * s / 384, s, "mid-span")
    check(c["displacements"]["A.rz"], -W * L**3 / (24 * EI), s / L, "slope at A (clockwise)")
    check(c["displacements"]["B.rz"], W * L**3 / (24 * EI), s / L, "slope at B")


def test_three_span_beam_max_end_span_deflection():
    """Item 8 -- Hicks, Table 2.1: three equal spans, uniform load: maximum end-span
    deflection 0.0068842 wl^4/EI at 0.44604 l from the end support (printed to 5 figures,
    so checked to 2e-5)."""
    x = 0.44604 * L
    targets = [at("AB", x), at("CD", L - x)]
    c = solve_default(straight_beam({"A": 0.0, "B": L, "C": 2 * L, "D": 3 * L},
                                    {"A": "pinned", "B": "roller", "C": "roller", "D": "roller"},
                                    [{"member": m, "wy": -W} for m in ("AB", "BC", "CD")], EI=EI,
                                    analysis={"displacements": targets}))
    s = W * L**4 / EI
    for t in targets:
        check(c["displacements"][t], -0.0068842 * s, s, t, rel=2e-5)


def test_axial_displacement_along_a_member():
    """A beam-column fixed at A pulled by P at B: u(x) = P x/EA (Hooke's law, common
    practice); no transverse displacement."""
    c = solve_default(straight_beam({"A": 0.0, "B": L}, {"A": "fixed"}, [{"node": "B", "fx": P}],
                                    EI=EI, EA=EA,
                                    analysis={"displacements": ["AB@2.5.x", "AB@2.5.y", "B.x", "A-B"]}))
    check(c["displacements"]["AB@2.5.x"], P * 2.5 / EA, P * L / EA, "u at 2.5 m")
    check(c["displacements"]["AB@2.5.y"], 0.0, P * L / EA, "no deflection")
    check(c["displacements"]["B.x"], P * L / EA, P * L / EA, "tip")
    check(c["displacements"]["A-B"], P * L / EA, P * L / EA, "elongation")


# =====================================================================================
# Structures for the invariants
# =====================================================================================


def gable_frame(loads, *, supports=None, analysis=None, shear=False):
    """A gable frame: fixed base A, pinned base E, sloping rafters to the ridge C; steel
    columns and rafters from material and section tables (so that temperature and, when
    asked, shear energy can enter)."""
    spec = dict(
        name="gable frame of a machine shed",
        nodes={"A": (0.0, 0.0), "B": (0.0, 4.0), "C": (3.0, 5.0), "D": (6.0, 4.0), "E": (6.0, 0.0)},
        beams={"AB": {"nodes": ["A", "B"], "section": "col"},
               "BC": {"nodes": ["B", "C"], "section": "raf"},
               "CD": {"nodes": ["C", "D"], "section": "raf"},
               "DE": {"nodes": ["D", "E"], "section": "col"}},
        supports=supports or {"A": "fixed", "E": "pinned"},
        loads=loads,
        analysis={**(analysis or {}), "shear": shear},
    )
    return case_text(**spec) + FRAME_PROPS


FRAME_PROPS = """
[materials.steel]
E = "200 GPa"
G = "77 GPa"
alpha = "1.2e-5 1/K"
[sections.col]
A = "5000 mm^2"
I = "1e8 mm^4"
depth = "300 mm"
shear_area = "1500 mm^2"
[sections.raf]
A = "6000 mm^2"
I = "1.5e8 mm^4"
depth = "400 mm"
shear_area = "2000 mm^2"
[defaults]
material = "steel"
"""


def two_span(loads, *, supports=None, analysis=None):
    """A two-span beam built in at A, on supports at B and C (spans 5 m and 7 m)."""
    return straight_beam({"A": 0.0, "B": 5.0, "C": 12.0},
                         supports or {"A": "fixed", "B": "roller", "C": "roller"},
                         loads, EI=30000.0, EA=1.5e6, name="two-span crane runway girder",
                         analysis=analysis)


# =====================================================================================
# Maxwell-Betti reciprocity
# =====================================================================================

# (target name, unit load that does work on that displacement)
BETTI_FRAME = [
    ("BC@2.0.y", {"member": "BC", "at": 2.0, "fy": 1.0}),
    ("C.rz", {"node": "C", "mz": 1.0}),
    ("AB@1.5.x", {"member": "AB", "at": 1.5, "fx": 1.0}),
    ("D.x", {"node": "D", "fx": 1.0}),
    ("B.rz", {"node": "B", "mz": 1.0}),
]


def reciprocity_matrix(make, pairs, **kw):
    loads = [{**ld, "case": f"unit {name}"} for name, ld in pairs]
    res = solve(make(loads, analysis={"displacements": [n for n, _ in pairs]}, **kw))
    return np.array([[res["cases"][f"unit {j}"]["displacements"][i] for j, _ in pairs]
                     for i, _ in pairs])


@pytest.mark.parametrize("shear", [False, True], ids=["bending+axial", "with-shear"])
def test_maxwell_betti_gable_frame(shear):
    """Maxwell-Betti reciprocal theorem: d_ij = d_ji for unit actions (forces and couples;
    a couple's work-conjugate is the rotation)."""
    f = reciprocity_matrix(gable_frame, BETTI_FRAME, shear=shear)
    scale = np.max(np.abs(f))
    for i in range(len(BETTI_FRAME)):
        assert f[i, i] > 0, f"a unit action does positive work: d[{BETTI_FRAME[i][0]}] = {f[i, i]}"
        for j in range(i):
            assert abs(f[i, j] - f[j, i]) <= 1e-9 * scale, (
                f"reciprocity {BETTI_FRAME[i][0]} / {BETTI_FRAME[j][0]}: {f[i, j]!r} vs {f[j, i]!r}")


def beam_on_spring_and_inclined_roller(loads, analysis=None):
    """Two spans: pinned A, a pile-head spring at B (y) with a rotational spring, and an
    inclined roller at C."""
    return two_span(loads, analysis=analysis, supports={
        "A": "pinned",
        "B": {"springs": {"y": 8000.0, "rz": 15000.0}},
        "C": {"type": "roller", "surface_angle": "25 deg"},
    })


BETTI_BEAM = [
    ("AB@2.0.y", {"member": "AB", "at": 2.0, "fy": 1.0}),
    ("B.rz", {"node": "B", "mz": 1.0}),
    ("BC@4.5.y", {"member": "BC", "at": 4.5, "fy": 1.0}),
    ("BC@3.0.x", {"member": "BC", "at": 3.0, "fx": 1.0}),
    ("B.y", {"node": "B", "fy": 1.0}),
]


def test_maxwell_betti_beam_on_springs_and_inclined_roller():
    """Maxwell-Betti with elastic supports and an inclined roller (the support work is
    reciprocal too)."""
    f = reciprocity_matrix(beam_on_spring_and_inclined_roller, BETTI_BEAM)
    scale = np.max(np.abs(f))
    assert np.all(np.diag(f) > 0)
    assert np.allclose(f, f.T, rtol=0, atol=1e-9 * scale), f"not symmetric:\n{f}"


# =====================================================================================
# Settlements: the support moves by exactly the imposed amount
# =====================================================================================


def test_displacement_at_settling_supports_equals_settlement():
    loads = [
        {"member": "AB", "wy": -10.0},
        {"member": "BC", "at": 3.0, "fy": -50.0},
        {"settlement": "A", "drz": 0.0015},
        {"settlement": "B", "dy": -0.012},
        {"settlement": "C", "dy": -0.004},
    ]
    c = solve_default(two_span(loads, analysis={"displacements": ["A.rz", "B.y", "C.y", "A.y"]}))
    check(c["displacements"]["A.rz"], 0.0015, 0.0015, "A.rz")
    check(c["displacements"]["B.y"], -0.012, 0.012, "B.y")
    check(c["displacements"]["C.y"], -0.004, 0.012, "C.y")
    check(c["displacements"]["A.y"], 0.0, 0.012, "A.y (restrained, not moved)")


def test_frame_support_sliding_equals_settlement():
    loads = [{"member": "BC", "wy": -8.0}, {"settlement": "E", "dx": 0.006, "dy": -0.003},
             {"settlement": "A", "drz": -0.001}]
    c = solve_default(gable_frame(loads, analysis={"displacements": ["E.x", "E.y", "A.rz", "A.x"]}))
    check(c["displacements"]["E.x"], 0.006, 0.006, "E.x")
    check(c["displacements"]["E.y"], -0.003, 0.006, "E.y")
    check(c["displacements"]["A.rz"], -0.001, 0.006, "A.rz")
    check(c["displacements"]["A.x"], 0.0, 0.006, "A.x")


# =====================================================================================
# Reduction theorem: displacements do not depend on the choice of redundants
# =====================================================================================

MIXED_BEAM_LOADS = [
    {"member": "AB", "wy": -10.0},
    {"member": "BC", "at": 3.0, "fy": -50.0},
    {"member": "BC", "wy": -6.0, "from": 1.0, "to": 5.0},
    {"node": "B", "mz": 12.0},
    {"settlement": "B", "dy": -0.008},
    {"settlement": "A", "drz": 0.001},
]
BEAM_TARGETS = ["AB@2.5.y", "BC@3.0.y", "BC@6.0.y", "B.rz", "C.rz", "C.x", "A-C"]

MIXED_FRAME_LOADS = [
    {"member": "BC", "wy": -8.0},
    {"member": "CD", "wy": -3.0, "from": 0.5, "to": 2.5},
    {"member": "AB", "at": 2.5, "fx": 6.0},
    {"node": "D", "fx": 4.0, "mz": -5.0},
    {"settlement": "E", "dx": 0.004},
    {"member": "CD", "misfit": -0.002},
    {"member": "BC", "temperature": {"uniform": 20.0, "gradient": -15.0}},
]
FRAME_TARGETS = ["C.y", "C.x", "B.rz", "BC@1.5.y", "CD@2.0.x", "DE@3.0.x", "B-D", "A-C"]


@functools.cache
def _cached_displacements(text, redundants):
    return solve(text, redundants=None if redundants is None else list(redundants))[
        "cases"]["default"]["displacements"]


def _displacements(text, redundants):
    """Displacements of case "default"; the automatic-choice reference is solved once."""
    return dict(_cached_displacements(text, None if redundants is None else tuple(redundants)))


@pytest.mark.parametrize("choice", [["B.y", "C.y"], ["A.rz", "C.y"], ["A.rz", "B.y"],
                                    ["AB.start.m", "AB.end.m"], ["AB.end.m", "B.y"]],
                         ids="+".join)
def test_beam_displacements_independent_of_redundants(choice):
    text = two_span(MIXED_BEAM_LOADS, analysis={"displacements": BEAM_TARGETS})
    ref = _displacements(text, None)
    got = _displacements(text, choice)
    scale = max(abs(v) for v in ref.values())
    for k in BEAM_TARGETS:
        check(got[k], ref[k], scale, f"{k} with redundants {choice}")


@pytest.mark.parametrize("shear", [False, True], ids=["no-shear", "shear"])
@pytest.mark.parametrize("choice", [["E.x", "E.y"], ["A.rz", "E.x"], ["BC.end.m", "E.x"],
                                    ["A.x", "A.y"], ["CD.start.m", "BC.start.m"]],
                         ids="+".join)
def test_frame_displacements_independent_of_redundants(choice, shear):
    text = gable_frame(MIXED_FRAME_LOADS, analysis={"displacements": FRAME_TARGETS}, shear=shear)
    ref = _displacements(text, None)
    got = _displacements(text, choice)
    scale = max(abs(v) for v in ref.values())
    for k in FRAME_TARGETS:
        check(got[k], ref[k], scale, f"{k} with redundants {choice}")


def braced_bay(loads, analysis=None):
    return case_text(
        name="double-braced bay with a short diagonal",
        **braced_bay_geometry(),
        loads=loads,
        analysis=analysis,
    )


BAY_LOADS = [{"node": "C", "fx": 20.0, "fy": -30.0}, {"node": "D", "fy": -40.0},
             {"member": "AC", "misfit": -0.003}]
BAY_TARGETS = ["C.x", "C.y", "D.x", "A-C", "B-D", "C-D"]


@pytest.mark.parametrize("choice", [["AC", "B.x"], ["BD", "A.x"], ["AB", "CD"], ["AB", "B.x"]],
                         ids="+".join)
def test_truss_displacements_independent_of_redundants(choice):
    text = braced_bay(BAY_LOADS, {"displacements": BAY_TARGETS})
    ref = _displacements(text, None)
    got = _displacements(text, choice)
    scale = max(abs(v) for v in ref.values())
    for k in BAY_TARGETS:
        check(got[k], ref[k], scale, f"{k} with redundants {choice}")


# =====================================================================================
# Unit-load method vs the kinematically integrated deflected shape
# =====================================================================================


def _shape_cases():
    return {
        "frame": lambda analysis: gable_frame(MIXED_FRAME_LOADS, analysis=analysis),
        "frame-shear": lambda analysis: gable_frame(MIXED_FRAME_LOADS, analysis=analysis, shear=True),
        "beam": lambda analysis: two_span(MIXED_BEAM_LOADS, analysis=analysis),
        "beam-springs": lambda analysis: beam_on_spring_and_inclined_roller(
            [{"member": "AB", "wy": -10.0}, {"member": "BC", "at": 2.0, "fy": -30.0, "mz": 8.0},
             {"member": "BC", "wy": [-2.0, -9.0], "from": 1.0, "to": 6.5}], analysis),
    }


@pytest.mark.parametrize("key", list(_shape_cases()))
def test_member_point_matches_integrated_shape(key):
    make = _shape_cases()[key]
    st = leastwork.loads_case(make(None), source="<test>")
    sol = leastwork.solve(st)
    shapes = {mid: member_shape(st, sol.topology, sol.cases["default"], mid)
              for mid in st.members}
    targets, expected = [], {}
    for mid, (xs, ux, uy, _) in shapes.items():
        # every 4th sample point, inner ones only (the ends are nodes), plus the shape's breaks
        for k in range(1, len(xs) - 1, 4):
            for d, u in (("y", uy), ("x", ux)):
                t = at(mid, xs[k], d)
                targets.append(t)
                expected[t] = u[k]
    res = solve(make({"displacements": targets}))["cases"]["default"]["displacements"]
    scale = max(max(np.max(np.abs(s[1])), np.max(np.abs(s[2]))) for s in shapes.values())
    bad = [(t, res[t], expected[t]) for t in targets if abs(res[t] - expected[t]) > 1e-9 * scale]
    assert not bad, f"{len(bad)} of {len(targets)} points disagree (unit load, shape): {bad[:5]}"


def test_member_point_between_samples_interpolates():
    """A point between two shape samples: the unit-load value lies within linear
    interpolation error of the shape (curvature bound: |w''| h^2/8)."""
    st = leastwork.loads_case(two_span(MIXED_BEAM_LOADS), source="<test>")
    sol = leastwork.solve(st)
    xs, _, uy, _ = member_shape(st, sol.topology, sol.cases["default"], "BC", samples=401)
    x = 4.321
    c = solve_default(two_span(MIXED_BEAM_LOADS, analysis={"displacements": [at("BC", x)]}))
    assert c["displacements"][at("BC", x)] == pytest.approx(np.interp(x, xs, uy), rel=1e-5)


# =====================================================================================
# Change of distance
# =====================================================================================


@pytest.mark.parametrize("pair", ["A-C", "B-D", "C-D", "D-B", "A-E", "C-E"])
def test_change_of_distance_is_projection(pair):
    a, b = pair.split("-")
    nodes = {"A": (0.0, 0.0), "B": (0.0, 4.0), "C": (3.0, 5.0), "D": (6.0, 4.0), "E": (6.0, 0.0)}
    targets = [pair, f"{a}.x", f"{a}.y", f"{b}.x", f"{b}.y"]
    d = solve_default(gable_frame(MIXED_FRAME_LOADS, analysis={"displacements": targets}))["displacements"]
    (xa, ya), (xb, yb) = nodes[a], nodes[b]
    ln = math.hypot(xb - xa, yb - ya)
    proj = ((d[f"{b}.x"] - d[f"{a}.x"]) * (xb - xa) + (d[f"{b}.y"] - d[f"{a}.y"]) * (yb - ya)) / ln
    check(d[pair], proj, max(abs(v) for v in d.values()), f"{pair} projection")


def test_bar_change_of_length_is_hooke_plus_misfit():
    """For each bar: change of distance between its nodes = N l/EA + misfit (Hooke's law;
    common practice) -- compatibility of the solved truss."""
    res = solve_default(braced_bay(BAY_LOADS, {"displacements": ["A-B", "B-C", "C-D", "D-A", "A-C", "B-D"]}))
    eas = {"AB": 2.0e5, "BC": 2.5e5, "CD": 2.0e5, "DA": 2.5e5, "AC": 1.0e5, "BD": 1.5e5}
    lengths = {"AB": 4.0, "BC": 3.0, "CD": 4.0, "DA": 3.0, "AC": 5.0, "BD": 5.0}
    for m in eas:
        n = res["members"][m]["start"]["n"]
        expected = n * lengths[m] / eas[m] + (-0.003 if m == "AC" else 0.0)
        check(res["displacements"][f"{m[0]}-{m[1]}"], expected, 0.003, f"bar {m}")


# =====================================================================================
# Linearity
# =====================================================================================


def _scaled(loads, f):
    out = []
    for ld in loads:
        ld = dict(ld)
        for k in ("fx", "fy", "mz", "wx", "wy", "dx", "dy", "drz", "misfit"):
            if k in ld:
                ld[k] = [f * v for v in ld[k]] if isinstance(ld[k], list) else f * ld[k]
        if "temperature" in ld:
            ld["temperature"] = {k: f * v for k, v in ld["temperature"].items()}
        out.append(ld)
    return out


def test_displacements_scale_and_superpose():
    """Linear elasticity, small displacements: every displacement is linear in the loads
    (forces, settlements, misfits and temperatures together)."""
    half = len(MIXED_FRAME_LOADS) // 2
    first, second = MIXED_FRAME_LOADS[:half], MIXED_FRAME_LOADS[half:]
    loads = ([{**ld, "case": "first"} for ld in first] + [{**ld, "case": "second"} for ld in second]
             + [{**ld, "case": "all"} for ld in MIXED_FRAME_LOADS]
             + [{**ld, "case": "all x2.5"} for ld in _scaled(MIXED_FRAME_LOADS, 2.5)]
             + [{**ld, "case": "all x-1"} for ld in _scaled(MIXED_FRAME_LOADS, -1.0)])
    cs = solve(gable_frame(loads, analysis={"displacements": FRAME_TARGETS}))["cases"]
    scale = max(abs(v) for v in cs["all"]["displacements"].values())
    for k in FRAME_TARGETS:
        d = {name: cs[name]["displacements"][k] for name in cs}
        check(d["first"] + d["second"], d["all"], scale, f"{k} superposes")
        check(d["all x2.5"], 2.5 * d["all"], scale, f"{k} scales by 2.5")
        check(d["all x-1"], -d["all"], scale, f"{k} changes sign with the loads")
