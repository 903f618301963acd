"""Handbook closed forms for statically indeterminate beams, a portal and a three-bar system.

Every expected value below is a published closed form (source beside each check) or follows
from one by statics (said so where it does).  Numbers that are exact in closed form are
checked to a relative 1e-9; positions of smooth moment extremes to 1e-6 of the span (a
flat maximum can only be located to about the square root of round-off).

Sign conventions used in the expectations (from the interface contract):
  * reactions are what the support applies to the structure, global x right, y up,
    rz counter-clockwise;
  * section moment m is sagging-positive for a member drawn left to right (local -y face
    in tension), v = dm/dx, n tension positive;
  * so at the left end of a horizontal member m(0) = -(support moment rz) and at the right
    end m(l) = +(support moment rz)  (statics of the end piece).
"""

from __future__ import annotations

import math

import pytest
from _cases import case_text, check, ea, ei, solve, solve_default, straight_beam  # noqa: E402

L = 6.0  # span, m
W = 12.0  # uniform load, kN/m (acting downward)
P = 40.0  # point load, kN (acting downward)
EI = 25000.0  # kN*m^2
EA = 5.0e6  # kN, for beams whose axial terms enter (fixed-fixed)

REL = 1e-9  # exact closed forms
POS = 1e-6  # positions of smooth extremes, as a fraction of the span


def check_member(c, member, expected, scale, span):
    """expected: {"start": {"m": ..}, "end": {..}, "m_max": (value, at|None), "m_min": ...}"""
    res = c["members"][member]
    for end in ("start", "end"):
        for key, val in expected.get(end, {}).items():
            check(res[end][key], val, scale[key], f"{member}.{end}.{key}")
    for ext in ("m_max", "m_min"):
        if ext in expected:
            val, at, tol = expected[ext]
            check(res[ext]["value"], val, scale["m"], f"{member}.{ext}.value")
            if at is not None:
                assert res[ext]["at"] == pytest.approx(at, abs=tol * span), f"{member}.{ext}.at"


def check_reactions(c, expected, scale):
    for node, comps in expected.items():
        for comp, val in comps.items():
            s = scale["m"] if comp == "rz" else scale["v"]
            check(c["reactions"][node][comp], val, s, f"reaction {node}.{comp}")


# =====================================================================================
# Item 1 -- propped cantilever, full uniform load.
# Hicks, Civil Engineering Formulas, ch. 2; AISC Steel Construction Manual, beam diagrams
# and formulas: simple-end R = 3wl/8, fixed-end R = 5wl/8, fixed-end M = wl^2/8,
# max positive M = 9wl^2/128 at 3l/8 from the simple end.
# The same physical problem is drawn five ways; global reactions follow the geometry,
# section forces follow the member's own axes.
# =====================================================================================

R_FIX = 5 * W * L / 8
R_SIMPLE = 3 * W * L / 8
M_FIX = W * L**2 / 8
M_SPAN = 9 * W * L**2 / 128
SCALE_W = {"n": W * L, "v": W * L, "m": W * L**2}


def _propped_uniform(layout):
    """(case text, member id, expected reactions, expected member forces)."""
    beam = {"EI": ei(EI)}
    sag = {  # the member's own forces when its local axes match the left-to-right drawing
        "start": {"n": 0.0, "v": R_FIX, "m": -M_FIX},
        "end": {"n": 0.0, "v": -R_SIMPLE, "m": 0.0},
        "m_max": (M_SPAN, 5 * L / 8, POS),
        "m_min": (-M_FIX, 0.0, 1e-9),
    }
    if layout == "left_to_right":
        nodes = {"A": (0, 0), "B": (L, 0)}
        beams = {"AB": {"nodes": ["A", "B"], **beam}}
        supports = {"A": "fixed", "B": "roller"}
        loads = [{"member": "AB", "wy": -W}]
        reactions = {"A": {"x": 0.0, "y": R_FIX, "rz": M_FIX}, "B": {"y": R_SIMPLE}}
        return nodes, beams, supports, loads, "AB", reactions, sag
    if layout == "drawn_right_to_left":
        # Same beam, member defined from B to A: local x points left, local y down, so the
        # local -y face is the top face and m is hogging-positive; v = dm/dx(local).
        nodes = {"A": (0, 0), "B": (L, 0)}
        beams = {"BA": {"nodes": ["B", "A"], **beam}}
        supports = {"A": "fixed", "B": "roller"}
        loads = [{"member": "BA", "wy": -W}]
        reactions = {"A": {"x": 0.0, "y": R_FIX, "rz": M_FIX}, "B": {"y": R_SIMPLE}}
        member = {
            "start": {"n": 0.0, "v": -R_SIMPLE, "m": 0.0},
            "end": {"n": 0.0, "v": R_FIX, "m": M_FIX},
            "m_max": (M_FIX, L, 1e-9),
            "m_min": (-M_SPAN, 3 * L / 8, POS),
        }
        return nodes, beams, supports, loads, "BA", reactions, member
    if layout == "mirrored":
        # Fixed end on the right: the wall moment turns clockwise (rz < 0).
        nodes = {"S": (0, 0), "F": (L, 0)}
        beams = {"SF": {"nodes": ["S", "F"], **beam}}
        supports = {"S": "roller", "F": "fixed"}
        loads = [{"member": "SF", "wy": -W}]
        reactions = {"F": {"x": 0.0, "y": R_FIX, "rz": -M_FIX}, "S": {"y": R_SIMPLE}}
        member = {
            "start": {"n": 0.0, "v": R_SIMPLE, "m": 0.0},
            "end": {"n": 0.0, "v": -R_FIX, "m": -M_FIX},
            "m_max": (M_SPAN, 3 * L / 8, POS),
            "m_min": (-M_FIX, L, 1e-9),
        }
        return nodes, beams, supports, loads, "SF", reactions, member
    if layout == "vertical":
        # The left-to-right case turned 90 degrees counter-clockwise: a column fixed at its
        # base, held sideways at its top, lateral load +x.  Local axes turn with it, so the
        # section forces are unchanged; reaction vectors turn by 90 degrees, moments do not.
        nodes = {"A": (0, 0), "B": (0, L)}
        beams = {"AB": {"nodes": ["A", "B"], **beam}}
        supports = {"A": "fixed", "B": {"restrain": ["x"]}}
        loads = [{"member": "AB", "wx": W}]
        reactions = {"A": {"x": -R_FIX, "y": 0.0, "rz": M_FIX}, "B": {"x": -R_SIMPLE}}
        return nodes, beams, supports, loads, "AB", reactions, sag
    if layout == "inclined_30":
        # Member at 30 degrees, axially rigid (EI only), load w per unit length at right
        # angles to it; the prop at B is a roller in global y.  The member cannot change
        # length, so B is held in every direction and the bending problem is the handbook
        # one: the transverse component of the prop force is 3wl/8, i.e. R_B = 3wl/(8 cos t);
        # its axial component R_B sin t points along +local x at the end node, away from
        # the wall, so the member is in tension (statics).
        t = math.radians(30.0)
        nodes = {"A": (0, 0), "B": (L * math.cos(t), L * math.sin(t))}
        beams = {"AB": {"nodes": ["A", "B"], **beam}}
        supports = {"A": "fixed", "B": "roller"}
        loads = [{"member": "AB", "wx": W * math.sin(t), "wy": -W * math.cos(t)}]
        rb = R_SIMPLE / math.cos(t)
        reactions = {
            "A": {"x": -W * L * math.sin(t), "y": W * L * math.cos(t) - rb, "rz": M_FIX},
            "B": {"y": rb},
        }
        member = {k: (dict(v) if isinstance(v, dict) else v) for k, v in sag.items()}
        member["start"]["n"] = rb * math.sin(t)
        member["end"]["n"] = rb * math.sin(t)
        return nodes, beams, supports, loads, "AB", reactions, member
    raise ValueError(layout)


LAYOUTS = ["left_to_right", "drawn_right_to_left", "mirrored", "vertical", "inclined_30"]


@pytest.mark.parametrize("layout", LAYOUTS)
def test_propped_cantilever_uniform_load(layout):
    nodes, beams, supports, loads, mid, reactions, member = _propped_uniform(layout)
    text = case_text(
        f"propped cantilever ({layout})", nodes, beams=beams, supports=supports, loads=loads
    )
    res = solve(text)
    assert res["indeterminacy"]["degree"] == 1  # fixed end 3 + roller 1 - 3 equations
    c = res["cases"]["default"]
    check_reactions(c, reactions, SCALE_W)
    check_member(c, mid, member, SCALE_W, L)


def test_propped_cantilever_uniform_deflections():
    # Hicks ch. 2 / AISC beam formulas: mid-span deflection wl^4/(192 EI); maximum
    # (39 + 55 sqrt 33)/65536 wl^4/EI at (1 + sqrt 33) l/16 from the simple end.
    # The beam is split at those two points by free nodes (the beam stays continuous).
    xd = L - (1 + math.sqrt(33)) * L / 16  # measured from the fixed end A
    text = straight_beam(
        {"A": 0.0, "C": L / 2, "D": xd, "B": L},
        {"A": "fixed", "B": "roller"},
        [{"member": m, "wy": -W} for m in ("AC", "CD", "DB")],
        EI=EI,
        analysis={"displacements": ["C.y", "D.y"]},
    )
    c = solve_default(text)
    d0 = W * L**4 / EI
    check(c["displacements"]["C.y"], -d0 / 192, d0, "mid-span deflection")
    check(c["displacements"]["D.y"], -(39 + 55 * math.sqrt(33)) / 65536 * d0, d0, "max deflection")
    # the handbook's rounded form wl^4/(185 EI) agrees to its printed precision
    assert c["displacements"]["D.y"] == pytest.approx(-d0 / 185, rel=2e-3)
    check(c["reactions"]["B"]["y"], R_SIMPLE, W * L, "prop reaction (split beam)")


# =====================================================================================
# Item 2 -- propped cantilever, central point load (AISC Manual beam formulas, secondary
# source): 5P/16 at the prop, 11P/16 at the wall, fixed-end M = 3Pl/16,
# M under the load 5Pl/32, deflection at the load 7Pl^3/(768 EI), maximum deflection
# Pl^3/(48 sqrt5 EI) at l/sqrt5 = 0.4472 l from the simple end.
# =====================================================================================

SCALE_P = {"n": P, "v": P, "m": P * L}


def test_propped_cantilever_central_point_load():
    text = straight_beam(
        {"A": 0.0, "B": L},
        {"A": "fixed", "B": "roller"},
        [{"member": "AB", "at": L / 2, "fy": -P}],
        EI=EI,
    )
    c = solve_default(text)
    check_reactions(
        c,
        {"A": {"x": 0.0, "y": 11 * P / 16, "rz": 3 * P * L / 16}, "B": {"y": 5 * P / 16}},
        SCALE_P,
    )
    check_member(
        c,
        "AB",
        {
            "start": {"v": 11 * P / 16, "m": -3 * P * L / 16},
            "end": {"v": -5 * P / 16, "m": 0.0},
            "m_max": (5 * P * L / 32, L / 2, 1e-9),  # a kink under the load: exact position
            "m_min": (-3 * P * L / 16, 0.0, 1e-9),
        },
        SCALE_P,
        L,
    )


def test_propped_cantilever_central_point_load_deflections():
    xd = L - L / math.sqrt(5)  # point of maximum deflection, from the fixed end
    text = straight_beam(
        {"A": 0.0, "C": L / 2, "D": xd, "B": L},
        {"A": "fixed", "B": "roller"},
        [{"node": "C", "fy": -P}],
        EI=EI,
        analysis={"displacements": ["C.y", "D.y"]},
    )
    c = solve_default(text)
    d0 = P * L**3 / EI
    check(c["displacements"]["C.y"], -7 * d0 / 768, d0, "deflection under the load")
    check(c["displacements"]["D.y"], -d0 / (48 * math.sqrt(5)), d0, "maximum deflection")
    check(c["members"]["AC"]["end"]["m"], 5 * P * L / 32, P * L, "moment under the load")


# =====================================================================================
# Item 3 -- propped cantilever, point load at a from the fixed end, b = l - a (Hicks ch. 2):
# simple-end R = P a^2 (3l - a)/(2 l^3), fixed-end M = P a b (l + b)/(2 l^2).
# By statics: fixed-end R = P - R_simple, moment under the load R_simple * b.
# =====================================================================================


@pytest.mark.parametrize("a_frac", [0.25, 0.4, 0.7])
def test_propped_cantilever_point_load_anywhere(a_frac):
    a = a_frac * L
    b = L - a
    rs = P * a**2 * (3 * L - a) / (2 * L**3)
    mf = P * a * b * (L + b) / (2 * L**2)
    text = straight_beam(
        {"A": 0.0, "B": L},
        {"A": "fixed", "B": "roller"},
        [{"member": "AB", "at": a, "fy": -P}],
        EI=EI,
    )
    c = solve_default(text)
    check_reactions(c, {"A": {"y": P - rs, "rz": mf}, "B": {"y": rs}}, SCALE_P)
    m_load = rs * b
    exp = {
        "start": {"m": -mf, "v": P - rs},
        "end": {"m": 0.0, "v": -rs},
        "m_max": (m_load, a, 1e-9),
    }
    if mf > 0:
        exp["m_min"] = (-mf, 0.0, 1e-9)
    check_member(c, "AB", exp, SCALE_P, L)


# =====================================================================================
# Item 4 -- fixed-fixed beam, uniform load (Hicks ch. 2): end M = wl^2/12, mid-span
# wl^2/24, deflection wl^4/(384 EI), contraflexure 0.2113 l from each end (rounded; the
# exact point (3 - sqrt3)/6 l follows from the end moment by statics).
# EA is given so the axial direction is elastic too: degree 3, no horizontal reactions.
# =====================================================================================


def test_fixed_fixed_uniform_load():
    text = straight_beam(
        {"A": 0.0, "B": L}, {"A": "fixed", "B": "fixed"}, [{"member": "AB", "wy": -W}], EI=EI, EA=EA
    )
    res = solve(text)
    assert res["indeterminacy"]["degree"] == 3
    c = res["cases"]["default"]
    m_end = W * L**2 / 12
    check_reactions(
        c,
        {
            "A": {"x": 0.0, "y": W * L / 2, "rz": m_end},
            "B": {"x": 0.0, "y": W * L / 2, "rz": -m_end},
        },
        SCALE_W,
    )
    check_member(
        c,
        "AB",
        {
            "start": {"n": 0.0, "v": W * L / 2, "m": -m_end},
            "end": {"n": 0.0, "v": -W * L / 2, "m": -m_end},
            "m_max": (W * L**2 / 24, L / 2, POS),
        },
        SCALE_W,
        L,
    )
    assert c["members"]["AB"]["m_min"]["value"] == pytest.approx(-m_end, rel=REL)
    assert c["members"]["AB"]["m_min"]["at"] in (
        pytest.approx(0.0, abs=1e-9),
        pytest.approx(L, abs=1e-9 * L),
    )


def test_fixed_fixed_uniform_deflection_and_contraflexure():
    xk = (3 - math.sqrt(3)) / 6 * L
    assert xk / L == pytest.approx(0.2113, abs=5e-5)  # the handbook's rounded figure
    text = straight_beam(
        {"A": 0.0, "K": xk, "C": L / 2, "B": L},
        {"A": "fixed", "B": "fixed"},
        [{"member": m, "wy": -W} for m in ("AK", "KC", "CB")],
        EI=EI,
        EA=EA,
        analysis={"displacements": ["C.y"]},
    )
    c = solve_default(text)
    check(c["displacements"]["C.y"], -W * L**4 / (384 * EI), W * L**4 / EI, "mid-span deflection")
    check(c["members"]["AK"]["end"]["m"], 0.0, W * L**2, "moment at the contraflexure point")
    check(c["members"]["KC"]["end"]["m"], W * L**2 / 24, W * L**2, "mid-span moment (split beam)")


# =====================================================================================
# Item 5 -- fixed-fixed beam, point load at a (b = l - a) (Hicks ch. 2):
# M_left = P a b^2/l^2, M_right = P a^2 b/l^2, R_left = P b^2 (3a + b)/l^3;
# central load: Pl/8 at the ends and the centre, deflection Pl^3/(192 EI).
# Moment under the load 2 P a^2 b^2 / l^3 follows by statics.
# Checked both drawn left to right and drawn right to left (member from B to A, whose
# m is hogging-positive and whose `at` runs from B).
# =====================================================================================


@pytest.mark.parametrize("drawn", ["left_to_right", "right_to_left"])
def test_fixed_fixed_point_load_anywhere(drawn):
    a, b = 0.3 * L, 0.7 * L
    ml = P * a * b**2 / L**2
    mr = P * a**2 * b / L**2
    rl = P * b**2 * (3 * a + b) / L**3
    mload = 2 * P * a**2 * b**2 / L**3
    nodes = {"A": (0, 0), "B": (L, 0)}
    if drawn == "left_to_right":
        mid, ends, at = "AB", ["A", "B"], a
    else:
        mid, ends, at = "BA", ["B", "A"], b
    text = case_text(
        f"fixed-fixed beam, point load ({drawn})",
        nodes,
        beams={mid: {"nodes": ends, "EI": ei(EI), "EA": ea(EA)}},
        supports={"A": "fixed", "B": "fixed"},
        loads=[{"member": mid, "at": at, "fy": -P}],
    )
    c = solve_default(text)
    check_reactions(
        c,
        {"A": {"x": 0.0, "y": rl, "rz": ml}, "B": {"x": 0.0, "y": P - rl, "rz": -mr}},
        SCALE_P,
    )
    if drawn == "left_to_right":
        exp = {
            "start": {"m": -ml, "v": rl},
            "end": {"m": -mr, "v": rl - P},
            "m_max": (mload, a, 1e-9),
            "m_min": (-ml, 0.0, 1e-9),
        }
    else:
        exp = {
            "start": {"m": mr, "v": rl - P},
            "end": {"m": ml, "v": rl},
            "m_max": (ml, L, 1e-9),
            "m_min": (-mload, b, 1e-9),
        }
    check_member(c, mid, exp, SCALE_P, L)


def test_fixed_fixed_central_point_load():
    text = straight_beam(
        {"A": 0.0, "C": L / 2, "B": L},
        {"A": "fixed", "B": "fixed"},
        [{"node": "C", "fy": -P}],
        EI=EI,
        EA=EA,
        analysis={"displacements": ["C.y"]},
    )
    c = solve_default(text)
    pl8 = P * L / 8
    check_reactions(c, {"A": {"y": P / 2, "rz": pl8}, "B": {"y": P / 2, "rz": -pl8}}, SCALE_P)
    check(c["members"]["AC"]["start"]["m"], -pl8, P * L, "end moment")
    check(c["members"]["AC"]["end"]["m"], pl8, P * L, "centre moment")
    check(c["members"]["CB"]["end"]["m"], -pl8, P * L, "end moment")
    check(c["displacements"]["C.y"], -P * L**3 / (192 * EI), P * L**3 / EI, "centre deflection")


# =====================================================================================
# Item 6 -- two equal spans, uniform load (Hicks, Table 2.1): reactions 3wl/8, 10wl/8,
# 3wl/8; support moment -wl^2/8.  Span maximum 9wl^2/128 at 3l/8 from the end support
# (statics of the end span, as for item 1).
# =====================================================================================


def test_two_equal_spans_uniform_load():
    text = straight_beam(
        {"A": 0.0, "B": L, "C": 2 * L},
        {"A": "pinned", "B": "roller", "C": "roller"},
        [{"member": "AB", "wy": -W}, {"member": "BC", "wy": -W}],
        EI=EI,
    )
    res = solve(text)
    assert res["indeterminacy"]["degree"] == 1
    c = res["cases"]["default"]
    check_reactions(
        c,
        {
            "A": {"x": 0.0, "y": 3 * W * L / 8},
            "B": {"y": 10 * W * L / 8},
            "C": {"y": 3 * W * L / 8},
        },
        SCALE_W,
    )
    ms = -W * L**2 / 8
    check_member(
        c,
        "AB",
        {
            "start": {"m": 0.0, "v": 3 * W * L / 8},
            "end": {"m": ms, "v": -5 * W * L / 8},
            "m_max": (M_SPAN, 3 * L / 8, POS),
            "m_min": (ms, L, 1e-9),
        },
        SCALE_W,
        L,
    )
    check_member(
        c,
        "BC",
        {
            "start": {"m": ms, "v": 5 * W * L / 8},
            "end": {"m": 0.0, "v": -3 * W * L / 8},
            "m_max": (M_SPAN, 5 * L / 8, POS),
            "m_min": (ms, 0.0, 1e-9),
        },
        SCALE_W,
        L,
    )


# =====================================================================================
# Item 7 -- two equal spans, P at the centre of one span (AISC Manual, secondary):
# reactions 13P/32, 11P/16, -3P/32 (the far end reaction pulls DOWN); support moment
# -3Pl/32; moment under the load 13Pl/64.
# =====================================================================================


def test_two_equal_spans_point_load_in_one_span():
    text = straight_beam(
        {"A": 0.0, "B": L, "C": 2 * L},
        {"A": "pinned", "B": "roller", "C": "roller"},
        [{"member": "AB", "at": L / 2, "fy": -P}],
        EI=EI,
    )
    c = solve_default(text)
    check_reactions(
        c,
        {"A": {"x": 0.0, "y": 13 * P / 32}, "B": {"y": 11 * P / 16}, "C": {"y": -3 * P / 32}},
        SCALE_P,
    )
    ms = -3 * P * L / 32
    check_member(
        c,
        "AB",
        {
            "start": {"m": 0.0},
            "end": {"m": ms},
            "m_max": (13 * P * L / 64, L / 2, 1e-9),
            "m_min": (ms, L, 1e-9),
        },
        SCALE_P,
        L,
    )
    check_member(
        c,
        "BC",
        {
            "start": {"m": ms, "v": 3 * P / 32},
            "end": {"m": 0.0, "v": 3 * P / 32},
            "m_min": (ms, 0.0, 1e-9),
        },
        SCALE_P,
        L,
    )


# =====================================================================================
# Item 8 -- three equal spans, uniform load (Hicks, Table 2.1): reactions 0.4wl, 1.1wl,
# 1.1wl, 0.4wl; interior support moments -0.1wl^2; maximum end-span deflection
# 0.0068842 wl^4/EI at 0.44604 l (printed to 5 figures; checked to that precision).
# Span moments 0.08 wl^2 at 0.4 l and 0.025 wl^2 at the centre span follow by statics.
# =====================================================================================


def test_three_equal_spans_uniform_load():
    text = straight_beam(
        {"A": 0.0, "B": L, "C": 2 * L, "D": 3 * L},
        {"A": "pinned", "B": "roller", "C": "roller", "D": "roller"},
        [{"member": m, "wy": -W} for m in ("AB", "BC", "CD")],
        EI=EI,
    )
    res = solve(text)
    assert res["indeterminacy"]["degree"] == 2
    c = res["cases"]["default"]
    wl = W * L
    check_reactions(
        c,
        {
            "A": {"x": 0.0, "y": 0.4 * wl},
            "B": {"y": 1.1 * wl},
            "C": {"y": 1.1 * wl},
            "D": {"y": 0.4 * wl},
        },
        SCALE_W,
    )
    ms = -0.1 * W * L**2
    check_member(
        c,
        "AB",
        {"start": {"m": 0.0}, "end": {"m": ms}, "m_max": (0.08 * W * L**2, 0.4 * L, POS)},
        SCALE_W,
        L,
    )
    check_member(
        c,
        "BC",
        {"start": {"m": ms}, "end": {"m": ms}, "m_max": (0.025 * W * L**2, 0.5 * L, POS)},
        SCALE_W,
        L,
    )
    check_member(
        c,
        "CD",
        {"start": {"m": ms}, "end": {"m": 0.0}, "m_max": (0.08 * W * L**2, 0.6 * L, POS)},
        SCALE_W,
        L,
    )


def test_three_equal_spans_end_span_deflection():
    xk = 0.446036601101483 * L  # where the end-span deflection is greatest (0.44604 l)
    text = straight_beam(
        {"A": 0.0, "K": xk, "B": L, "C": 2 * L, "D": 3 * L},
        {"A": "pinned", "B": "roller", "C": "roller", "D": "roller"},
        [{"member": m, "wy": -W} for m in ("AK", "KB", "BC", "CD")],
        EI=EI,
        analysis={"displacements": ["K.y"]},
    )
    c = solve_default(text)
    d0 = W * L**4 / EI
    assert c["displacements"]["K.y"] == pytest.approx(-0.0068842 * d0, abs=1e-7 * d0)


# =====================================================================================
# Item 13 -- pinned-base portal, uniform load w on the beam (frame handbooks; any
# force-method text): H = wL^2 / (4h(2k + 3)), k = (I_beam/I_column)(h/L), axial strain
# neglected -> all members axially rigid (EI only).
# By statics: vertical reactions wL/2, corner moments H*h (outside face in tension),
# beam mid-span moment wL^2/8 - H h, beam axial force -H, column axial force -wL/2.
# =====================================================================================


def test_pinned_base_portal_beam_load():
    h, span = 4.0, 8.0
    ei_col, ei_beam = 20000.0, 40000.0
    k = (ei_beam / ei_col) * (h / span)
    H = W * span**2 / (4 * h * (2 * k + 3))
    text = case_text(
        "pinned-base portal",
        {"A": (0, 0), "B": (0, h), "C": (span, h), "D": (span, 0)},
        beams={
            "AB": {"nodes": ["A", "B"], "EI": ei(ei_col)},  # left column, drawn upward
            "BC": {"nodes": ["B", "C"], "EI": ei(ei_beam)},
            "DC": {"nodes": ["D", "C"], "EI": ei(ei_col)},  # right column, drawn upward
        },
        supports={"A": "pinned", "D": "pinned"},
        loads=[{"member": "BC", "wy": -W}],
    )
    res = solve(text)
    assert res["indeterminacy"]["degree"] == 1
    c = res["cases"]["default"]
    sc = {"n": W * span, "v": W * span, "m": W * span**2}
    # the legs splay outward, so the bases are pushed inward
    check_reactions(c, {"A": {"x": H, "y": W * span / 2}, "D": {"x": -H, "y": W * span / 2}}, sc)
    check_member(
        c,
        "BC",
        {
            "start": {"n": -H, "v": W * span / 2, "m": -H * h},
            "end": {"n": -H, "v": -W * span / 2, "m": -H * h},
            "m_max": (W * span**2 / 8 - H * h, span / 2, POS),
        },
        sc,
        span,
    )
    # left column drawn upward: local -y face is the inside face, which is in compression
    # at the corner -> m(top) = -H h; v = dm/dx = -H.
    check_member(
        c,
        "AB",
        {
            "start": {"n": -W * span / 2, "v": -H, "m": 0.0},
            "end": {"n": -W * span / 2, "v": -H, "m": -H * h},
        },
        sc,
        h,
    )
    # right column drawn upward: local -y face is the outside face, in tension -> +H h.
    check_member(
        c,
        "DC",
        {
            "start": {"n": -W * span / 2, "v": H, "m": 0.0},
            "end": {"n": -W * span / 2, "v": H, "m": H * h},
        },
        sc,
        h,
    )


# =====================================================================================
# Item 11 -- symmetric three-bar system (Timoshenko, Strength of Materials Part I, from
# memory): middle bar of length L, outer bars at angle alpha to it, all of the same EA,
# load P along the middle bar: middle N = P/(1 + 2cos^3 a), outer N = P cos^2 a/(1 + 2cos^3 a).
# Hanger node displacement N_mid L / EA (Hooke's law on the middle bar).
# =====================================================================================


@pytest.mark.parametrize("alpha_deg", [30.0, 45.0])
def test_symmetric_three_bar_system(alpha_deg):
    al = math.radians(alpha_deg)
    hgt, load, bar_ea = 3.0, 100.0, 2.0e5
    half = hgt * math.tan(al)
    text = case_text(
        "three hangers",
        {"A": (-half, hgt), "B": (0, hgt), "C": (half, hgt), "D": (0, 0)},
        bars={
            "AD": {"nodes": ["A", "D"], "EA": ea(bar_ea)},
            "BD": {"nodes": ["B", "D"], "EA": ea(bar_ea)},
            "CD": {"nodes": ["C", "D"], "EA": ea(bar_ea)},
        },
        supports={"A": "pinned", "B": "pinned", "C": "pinned"},
        loads=[{"node": "D", "fy": -load}],
        analysis={"displacements": ["D.y"]},
    )
    res = solve(text)
    assert res["indeterminacy"]["degree"] == 1  # m + r - 2j = 3 + 6 - 8
    c = res["cases"]["default"]
    cos = math.cos(al)
    n_mid = load / (1 + 2 * cos**3)
    n_out = load * cos**2 / (1 + 2 * cos**3)
    for bar, n in (("BD", n_mid), ("AD", n_out), ("CD", n_out)):
        for end in ("start", "end"):
            check(c["members"][bar][end]["n"], n, load, f"{bar}.{end}.n")
    # reactions: each support holds its bar's pull, i.e. acts from D towards the support
    sin = math.sin(al)
    check_reactions(
        c,
        {
            "B": {"x": 0.0, "y": n_mid},
            "A": {"x": -n_out * sin, "y": n_out * cos},
            "C": {"x": n_out * sin, "y": n_out * cos},
        },
        {"v": load, "m": load},
    )
    check(c["displacements"]["D.y"], -n_mid * hgt / bar_ea, load * hgt / bar_ea, "hanger node drop")
