"""Imposed effects -- settlement, temperature, misfit -- and the extensions that go with them:
elastic (spring) supports, inclined rollers and shear energy.

Every expected value is a published closed form (source beside the check), a fact of the
trade ("common practice"), hand statics, or a short derivation by least work written out
in the comment ("derived").  Exact closed forms are checked to a relative 1e-9.

Sign conventions used in the expectations (interface contract):
  * reactions are what the support applies to the structure (x right, y up, rz CCW);
  * section moment m is sagging-positive for a member drawn left to right, so at the left
    end of a horizontal member m(0) = -(support rz) and at the right end m(l) = +(support rz);
  * temperature gradient = (local -y face) - (local +y face): for a beam drawn left to right,
    positive means the bottom is hotter; the free curvature is then sagging (concave up).
"""

from __future__ import annotations

import math

import pytest
from _cases import case_text, check, ea, ei, solve, solve_default  # noqa: E402

# One steel section used throughout (values in kN and m):
E = 2.0e8  # 200 GPa in kN/m^2
G = 7.7e7  # 77 GPa
ALPHA = 1.2e-5  # 1/K
AREA = 5.0e-3  # m^2
INERTIA = 1.0e-4  # m^4
DEPTH = 0.4  # m
SHEAR_AREA = 3.0e-3  # m^2
EI = E * INERTIA  # 20 000 kN*m^2
EA = E * AREA  # 1.0e6 kN
GAS = G * SHEAR_AREA  # 231 000 kN

PROPS = """
[materials.steel]
E = "200 GPa"
G = "77 GPa"
alpha = "1.2e-5 1/K"

[sections.plate_girder]
A = "5000 mm^2"
I = "1e8 mm^4"
depth = "400 mm"
shear_area = "3000 mm^2"

[defaults]
material = "steel"
section = "plate_girder"
"""


def text(**spec) -> str:
    """A case whose members take the steel section above unless they say otherwise."""
    spec.setdefault("name", "imposed-effects check")
    return case_text(**spec) + PROPS


def beam_AB(length: float, supports: dict, loads: list, analysis: dict | None = None) -> str:
    """One horizontal beam AB from (0, 0) to (length, 0)."""
    return text(
        nodes={"A": (0.0, 0.0), "B": (length, 0.0)},
        beams={"AB": {"nodes": ["A", "B"]}},
        supports=supports,
        loads=loads,
        analysis=analysis,
    )


# =====================================================================================
# Item 9 -- support displacement.
# Roark, Formulas for Stress and Strain, Table 8.1; slope-deflection equations (any
# structural analysis text): propped cantilever whose prop settles by D: R = 3EI D/l^3,
# fixed-end M = 3EI D/l^2; fixed-fixed beam with one end displaced by D: M = 6EI D/l^2 at
# both ends, V = 12EI D/l^3.
# =====================================================================================

L = 6.0


@pytest.mark.parametrize("delta", [-0.010, 0.004])
def test_propped_cantilever_prop_settles(delta):
    c = solve_default(beam_AB(L, {"A": "fixed", "B": "roller"},
                              [{"settlement": "B", "dy": delta}],
                              {"displacements": ["B.y", "AB@3.0.y"]}))
    R = 3 * EI * delta / L**3  # Roark Table 8.1 (magnitude); sign from the physics below
    M = 3 * EI * delta / L**2
    sv, sm = abs(R), abs(M)
    # The beam is dragged along with the prop; its stiffness resists, so the prop pulls it
    # the way it moved: a settling prop (delta < 0) pulls the beam down.
    check(c["reactions"]["B"]["y"], R, sv, "prop reaction")
    assert c["reactions"]["B"]["y"] * delta > 0, "the prop must act in the sense it moved"
    check(c["reactions"]["A"]["y"], -R, sv, "fixed-end shear")
    check(c["reactions"]["A"]["rz"], -M, sm, "fixed-end moment (CCW for a settling prop)")
    if delta < 0:
        assert c["reactions"]["A"]["rz"] > 0, "a settling prop: the wall holds the beam up (CCW)"
    # The beam bends like a cantilever with a tip load R: hogging at the wall when the prop
    # settles (M < 0), and no moment over the prop.
    check(c["members"]["AB"]["start"]["m"], M, sm, "m at the wall")
    check(c["members"]["AB"]["end"]["m"], 0.0, sm, "m over the prop")
    # The prop point moves by the settlement (imposed); mid-span follows the cantilever
    # tip-load shape w(x) = D x^2 (3l - x)/(2 l^3) -> 5D/16 at l/2 (cantilever with an end
    # load, Roark Table 8.1, shape scaled to the tip displacement; from memory).
    check(c["displacements"]["B.y"], delta, abs(delta), "prop displacement = settlement")
    check(c["displacements"]["AB@3.0.y"], 5 * delta / 16, abs(delta), "mid-span deflection")


def test_propped_cantilever_settlement_compatibility_equation():
    """Contract section 4: flexibility . X + load_terms = imposed displacement at the
    redundant.  With the prop reaction as redundant: (l^3/3EI) R + 0 = D."""
    delta = -0.010
    res = solve(beam_AB(L, {"A": "fixed", "B": "roller"}, [{"settlement": "B", "dy": delta}]),
                redundants=["B.y"])
    c = res["cases"]["default"]
    check(c["flexibility"][0][0], L**3 / (3 * EI), L**3 / EI, "cantilever tip flexibility")  # cantilever end load, Roark Table 8.1 (from memory)
    lhs = c["flexibility"][0][0] * c["redundants"]["B.y"] + c["load_terms"][0]
    check(lhs, delta, abs(delta), "compatibility at the settling prop")


def test_propped_cantilever_wall_rotates():
    """Slope-deflection (any structural analysis text; from memory): a fixed end turned by
    theta with the far end pinned: M_near = 3EI theta/l, far reaction 3EI theta/l^2.
    Turning the wall CCW lifts the free beam at the prop, so the prop holds it down."""
    theta = 0.002
    c = solve_default(beam_AB(L, {"A": "fixed", "B": "roller"},
                              [{"settlement": "A", "drz": theta}],
                              {"displacements": ["A.rz", "B.y"]}))
    check(c["reactions"]["A"]["rz"], 3 * EI * theta / L, EI * theta / L, "wall moment")
    check(c["reactions"]["B"]["y"], -3 * EI * theta / L**2, EI * theta / L**2, "prop reaction")
    check(c["displacements"]["A.rz"], theta, theta, "wall rotation = imposed")
    check(c["displacements"]["B.y"], 0.0, theta * L, "prop does not move")


@pytest.mark.parametrize("delta", [-0.010, 0.006])
def test_fixed_fixed_end_settles(delta):
    c = solve_default(beam_AB(L, {"A": "fixed", "B": "fixed"}, [{"settlement": "B", "dy": delta}],
                              {"displacements": ["B.y", "AB@3.0.y", "AB@1.5.y"]}))
    M = 6 * EI * abs(delta) / L**2  # Roark Table 8.1; slope-deflection
    V = 12 * EI * abs(delta) / L**3
    sgn = math.copysign(1.0, delta)
    # B moved by delta: the beam resists, so B pushes it back the way it went (B.y has the
    # sign of delta) and A pushes the other way.
    check(c["reactions"]["B"]["y"], sgn * V, V, "moving end shear")
    check(c["reactions"]["A"]["y"], -sgn * V, V, "other end shear")
    # Antisymmetric double curvature: hogging at A and sagging at B for a settling B.
    check(c["members"]["AB"]["start"]["m"], sgn * M, M, "m at A")
    check(c["members"]["AB"]["end"]["m"], -sgn * M, M, "m at B")
    check(c["reactions"]["A"]["rz"], -sgn * M, M, "moment reaction A")
    check(c["reactions"]["B"]["rz"], -sgn * M, M, "moment reaction B")
    check(c["reactions"]["A"]["x"], 0.0, V, "no axial force")
    # Shape D (3 xi^2 - 2 xi^3) (slope-deflection, derived): D/2 at mid-span, 5D/32 at l/4.
    check(c["displacements"]["B.y"], delta, abs(delta), "end displacement = settlement")
    check(c["displacements"]["AB@3.0.y"], delta / 2, abs(delta), "mid-span (antisymmetry)")
    check(c["displacements"]["AB@1.5.y"], delta * (3 / 16 - 2 / 64), abs(delta), "quarter span")


def test_fixed_fixed_end_rotates():
    """Slope-deflection (from memory): M_near = 4EI theta/l, M_far = 2EI theta/l,
    shear 6EI theta/l^2; turning A CCW lifts the beam toward B, so B holds it down."""
    theta = 0.003
    c = solve_default(beam_AB(L, {"A": "fixed", "B": "fixed"}, [{"settlement": "A", "drz": theta}]))
    s = EI * theta / L
    check(c["reactions"]["A"]["rz"], 4 * s, s, "near-end moment")
    check(c["reactions"]["B"]["rz"], 2 * s, s, "carry-over moment")
    check(c["reactions"]["B"]["y"], -6 * s / L, s / L, "far-end shear")
    check(c["reactions"]["A"]["y"], 6 * s / L, s / L, "near-end shear")


# =====================================================================================
# Item 10 -- temperature.
# Restrained bar: N = -EA alpha dT (common practice).  Fixed-fixed beam with faces
# differing by dT over depth h: M = EI alpha dT/h, no other reactions; propped cantilever:
# R = 3EI alpha dT/(2hl), M = 3EI alpha dT/(2h), the prop pulls down when the bottom is
# hotter (Roark Table 8.1; Gere, Mechanics of Materials).
# =====================================================================================


@pytest.mark.parametrize("dT", [30.0, -25.0])
@pytest.mark.parametrize("end", [(4.0, 0.0), (3.0, 4.0), (-2.4, -1.8)], ids=["flat", "sloping", "down-left"])
def test_restrained_bar_uniform_temperature(dT, end):
    length = math.hypot(*end)
    c = solve_default(text(nodes={"A": (0.0, 0.0), "B": end}, bars={"AB": {"nodes": ["A", "B"]}},
                           supports={"A": "pinned", "B": "pinned"},
                           loads=[{"member": "AB", "temperature": {"uniform": dT}}],
                           analysis={"displacements": ["A-B"]}))
    N = -EA * ALPHA * dT  # common practice: the supports take away the whole free strain
    check(c["members"]["AB"]["start"]["n"], N, abs(N), "axial force")
    # Statics of the bar: a bar in force N pulls its end A towards B with N u (u the unit
    # vector A->B), so the support at A applies -N u and the one at B +N u.  A heated bar
    # (N < 0) pushes both supports outward and they push back along the bar.
    ux, uy = end[0] / length, end[1] / length
    check(c["reactions"]["A"]["x"], -N * ux, abs(N), "A.x along the bar")
    check(c["reactions"]["A"]["y"], -N * uy, abs(N), "A.y along the bar")
    check(c["reactions"]["B"]["x"], N * ux, abs(N), "B.x along the bar")
    check(c["reactions"]["B"]["y"], N * uy, abs(N), "B.y along the bar")
    if dT > 0:
        assert c["members"]["AB"]["start"]["n"] < 0, "a heated restrained bar is in compression"
    check(c["displacements"]["A-B"], 0.0, ALPHA * abs(dT) * length, "supports do not move")


@pytest.mark.parametrize("grad", [20.0, -15.0])
def test_fixed_fixed_beam_temperature(grad):
    uniform = 30.0
    c = solve_default(beam_AB(L, {"A": "fixed", "B": "fixed"},
                              [{"member": "AB", "temperature": {"uniform": uniform, "gradient": grad}}],
                              {"displacements": ["AB@2.0.y", "AB@3.0.y", "AB@3.0.x"]}))
    N = -EA * ALPHA * uniform  # common practice
    M = EI * ALPHA * grad / DEPTH  # Roark Table 8.1; Gere
    s = abs(M)
    mem = c["members"]["AB"]
    check(mem["start"]["n"], N, abs(N), "axial force")
    check(mem["end"]["n"], N, abs(N), "axial force at B")
    # The free curvature alpha*grad/h (sagging for a hotter bottom) is cancelled by a
    # constant moment of the opposite sense: hogging (top in tension) for a hotter bottom.
    check(mem["start"]["m"], -M, s, "m at A")
    check(mem["end"]["m"], -M, s, "m at B")
    check(mem["m_max"]["value"], -M, s, "m constant along the beam (max)")
    check(mem["m_min"]["value"], -M, s, "m constant along the beam (min)")
    check(mem["start"]["v"], 0.0, s / L, "no shear")
    # "no reactions apart from the moment" (and the axial thrust of the uniform part)
    check(c["reactions"]["A"]["y"], 0.0, s / L, "no vertical reaction at A")
    check(c["reactions"]["B"]["y"], 0.0, s / L, "no vertical reaction at B")
    check(c["reactions"]["A"]["rz"], M, s, "end moment A")
    check(c["reactions"]["B"]["rz"], -M, s, "end moment B")
    check(c["reactions"]["A"]["x"], -N, abs(N), "thrust at A")
    # Total curvature m/EI + alpha grad/h = 0 and no axial strain: the beam stays put.
    free = ALPHA * abs(grad) / DEPTH * L**2
    for key in ("AB@2.0.y", "AB@3.0.y", "AB@3.0.x"):
        check(c["displacements"][key], 0.0, free, f"{key} of a fully restrained beam")


@pytest.mark.parametrize("grad", [20.0, -12.0])
def test_propped_cantilever_temperature_gradient(grad):
    c = solve_default(beam_AB(L, {"A": "fixed", "B": "roller"},
                              [{"member": "AB", "temperature": {"gradient": grad}}],
                              {"displacements": ["B.y", "B.rz"]}))
    R = 3 * EI * ALPHA * grad / (2 * DEPTH * L)  # Roark Table 8.1; Gere
    M = 3 * EI * ALPHA * grad / (2 * DEPTH)
    # Bottom hotter (grad > 0): the free cantilever would curl up at B; the prop pulls down.
    check(c["reactions"]["B"]["y"], -R, abs(R), "prop reaction")
    if grad > 0:
        assert c["reactions"]["B"]["y"] < 0, "bottom hotter: the prop must pull the beam down"
    check(c["reactions"]["A"]["y"], R, abs(R), "wall shear")
    check(c["members"]["AB"]["start"]["m"], -M, abs(M), "m at the wall")
    check(c["reactions"]["A"]["rz"], M, abs(M), "wall moment")
    check(c["displacements"]["B.y"], 0.0, ALPHA * abs(grad) / DEPTH * L**2, "prop holds")
    # Slope at the prop: curvature k = alpha grad/h + m/EI with m = -R (l - x):
    # theta_B = k l - R l^2/(2EI) = k l - 3 k l/4 = k l/4 (derived).
    k = ALPHA * grad / DEPTH
    check(c["displacements"]["B.rz"], k * L / 4, abs(k) * L, "slope at the prop")


def test_gradient_on_a_member_drawn_right_to_left():
    """The gradient is measured across the member's own axes: for a member drawn from B to
    A (right to left) local -y is the top face, so a positive gradient heats the top.  The
    free cantilever then curls down at the prop and the prop pushes up: item 10 with the
    sign reversed, R = +3EI alpha dT/(2hl) (Roark Table 8.1; Gere)."""
    grad = 20.0
    c = solve_default(text(nodes={"A": (0.0, 0.0), "B": (L, 0.0)}, beams={"BA": {"nodes": ["B", "A"]}},
                           supports={"A": "fixed", "B": "roller"},
                           loads=[{"member": "BA", "temperature": {"gradient": grad}}],
                           analysis={"displacements": ["B.rz"]}))
    R = 3 * EI * ALPHA * grad / (2 * DEPTH * L)
    check(c["reactions"]["B"]["y"], R, R, "prop pushes up")
    check(c["reactions"]["A"]["rz"], -R * L, R * L, "wall moment (clockwise)")
    k = ALPHA * grad / DEPTH  # top hotter: hogging free curvature, slope at B is -k l/4 (derived as above)
    check(c["displacements"]["B.rz"], -k * L / 4, k * L, "slope at the prop")


def test_uniform_heating_acts_as_a_misfit():
    """A free elongation alpha dT l and a misfit of the same length are the same initial
    strain (common practice): a portal whose beam is heated gives exactly the result of a
    portal whose beam is made that much too long."""
    dT = 25.0
    spec = dict(nodes={"A": (0.0, 0.0), "B": (0.0, 4.0), "C": (L, 4.0), "D": (L, 0.0)},
                beams={m: {"nodes": [m[0], m[1]]} for m in ("AB", "BC", "CD")},
                supports={"A": "pinned", "D": "pinned"},
                analysis={"displacements": ["BC@3.0.y", "B.x", "C.rz", "A-D", "B-C"]})
    heat = solve_default(text(loads=[{"member": "BC", "temperature": {"uniform": dT}}], **spec))
    mis = solve_default(text(loads=[{"member": "BC", "misfit": ALPHA * dT * L}], **spec))
    for node in ("A", "D"):
        for comp in ("x", "y"):
            check(heat["reactions"][node][comp], mis["reactions"][node][comp], 1.0, f"{node}.{comp}")
    for key, val in mis["displacements"].items():
        check(heat["displacements"][key], val, ALPHA * dT * L, key)
    assert heat["reactions"]["A"]["x"] > 0, "a heated beam pushes the columns apart"


def test_settlement_beside_a_rotational_spring():
    """Pinned support with a rotational spring kr that settles by D, roller at the far end.
    Derived: with A settling (D < 0) the beam turns rigidly by t0 = -D/l (CCW); the spring
    moment M = -kr t_A with t_A = t0 + M l/(3EI) (simple-beam end rotation, Hicks ch. 2), so
    M = -kr t0/(1 + kr l/(3EI))."""
    kr, D = 5000.0, -0.010
    c = solve_default(beam_AB(L, {"A": {"restrain": ["x", "y"], "springs": {"rz": kr}}, "B": "roller"},
                              [{"settlement": "A", "dy": D}], {"displacements": ["A.y", "A.rz"]}))
    t0 = -D / L
    M = -kr * t0 / (1 + kr * L / (3 * EI))
    check(c["reactions"]["A"]["rz"], M, abs(M), "spring moment")
    check(c["reactions"]["B"]["y"], -M / L, abs(M) / L, "roller reaction (moments about A)")
    check(c["displacements"]["A.y"], D, abs(D), "settled support moves by D")
    check(c["displacements"]["A.rz"], -M / kr, t0, "spring rotation")


@pytest.mark.parametrize("grad", [20.0, -8.0])
def test_simply_supported_beam_gradient_no_forces(grad):
    """Statically determinate: a gradient bends the beam freely.  Constant curvature
    k = alpha dT/h: mid-span deflection k l^2/8, end slopes k l/2 (Gere, Mechanics of
    Materials, thermal bending; from memory) -- a hotter bottom bows the middle down."""
    c = solve_default(beam_AB(L, {"A": "pinned", "B": "roller"},
                              [{"member": "AB", "temperature": {"gradient": grad, "uniform": 10.0}}],
                              {"displacements": ["AB@3.0.y", "A.rz", "B.rz", "B.x"]}))
    k = ALPHA * grad / DEPTH
    for node in ("A", "B"):
        for comp, val in c["reactions"][node].items():
            check(val, 0.0, 1.0, f"reaction {node}.{comp}")
    check(c["members"]["AB"]["m_max"]["value"], 0.0, 1.0, "no moment")
    check(c["displacements"]["AB@3.0.y"], -k * L**2 / 8, abs(k) * L**2, "mid-span deflection")
    check(c["displacements"]["A.rz"], -k * L / 2, abs(k) * L, "slope at A")
    check(c["displacements"]["B.rz"], k * L / 2, abs(k) * L, "slope at B")
    check(c["displacements"]["B.x"], ALPHA * 10.0 * L, ALPHA * 10.0 * L, "free expansion at the roller")  # common practice


def test_cantilever_gradient_tip():
    """Constant free curvature k on a cantilever: tip deflection k l^2/2, tip slope k l
    (geometry of a circular arc, small slopes; common practice)."""
    grad = 25.0
    c = solve_default(beam_AB(L, {"A": "fixed"}, [{"member": "AB", "temperature": {"gradient": grad}}],
                              {"displacements": ["B.y", "B.rz"]}))
    k = ALPHA * grad / DEPTH
    check(c["displacements"]["B.y"], k * L**2 / 2, k * L**2, "tip deflection")
    check(c["displacements"]["B.rz"], k * L, k * L, "tip slope")


# =====================================================================================
# Items 11 and 12 -- the symmetric three-bar system.
# Middle bar (length H) vertical, outer bars at angle alpha to it, all of stiffness EA.
# Load P at the joint: middle N = P/(1 + 2cos^3 a), outer P cos^2 a/(1 + 2cos^3 a)
# (Timoshenko, Strength of Materials Part I; from memory).  Middle bar short by e, no
# load: middle tension 2EA e cos^3 a/(H(1 + 2cos^3 a)), outer compression that/(2cos a)
# (Gere & Timoshenko; from memory).
# =====================================================================================

ANG = math.radians(40.0)
H = 3.0
EA_BAR = 1.0e5
P3 = 50.0
E_MIS = 0.004


def three_bar(loads, analysis=None):
    t = H * math.tan(ANG)
    return case_text(
        name="three hangers from a transfer girder",
        nodes={"A": (-t, H), "B": (0.0, H), "C": (t, H), "D": (0.0, 0.0)},
        bars={k: {"nodes": [k[0], "D"], "EA": ea(EA_BAR)} for k in ("AD", "BD", "CD")},
        supports={"A": "pinned", "B": "pinned", "C": "pinned"},
        loads=loads,
        analysis=analysis,
    )


def three_bar_cases():
    return solve(three_bar(
        [
            {"member": "BD", "misfit": -E_MIS, "case": "misfit"},
            {"node": "D", "fy": -P3, "case": "load"},
            {"member": "BD", "misfit": -E_MIS, "case": "both"},
            {"node": "D", "fy": -P3, "case": "both"},
            {"member": "BD", "misfit": -2.5 * E_MIS, "case": "misfit x2.5"},
        ],
        {"displacements": ["D.x", "D.y", "B-D", "A-D"]},
    ))["cases"]


def test_three_bar_misfit_closed_form():
    c = three_bar_cases()["misfit"]
    cs = math.cos(ANG)
    Nm = 2 * EA_BAR * E_MIS * cs**3 / (H * (1 + 2 * cs**3))  # item 12
    No = -Nm / (2 * cs)
    check(c["members"]["BD"]["start"]["n"], Nm, Nm, "middle bar (short) is pulled into tension")
    check(c["members"]["AD"]["start"]["n"], No, Nm, "outer bar compression")
    check(c["members"]["CD"]["start"]["n"], No, Nm, "outer bar compression (other side)")
    assert c["members"]["BD"]["start"]["n"] > 0 > c["members"]["AD"]["start"]["n"]
    # Joint D rises by v = e/(1 + 2cos^3 a) (derived: middle N = EA(e - v)/H, outer
    # N = -EA v cos^2 a/H, vertical equilibrium at D).
    v = E_MIS / (1 + 2 * cs**3)
    check(c["displacements"]["D.y"], v, E_MIS, "joint rises")
    check(c["displacements"]["D.x"], 0.0, E_MIS, "symmetry")
    # Change of distance B-D = fabricated length change + elastic stretch:
    # -e + N H/EA (Hooke, common practice).
    check(c["displacements"]["B-D"], -E_MIS + Nm * H / EA_BAR, E_MIS, "middle bar length change")
    check(c["displacements"]["A-D"], No * H / cs / EA_BAR, E_MIS, "outer bar length change")


def test_three_bar_load_closed_form():
    c = three_bar_cases()["load"]
    cs = math.cos(ANG)
    Nm = P3 / (1 + 2 * cs**3)  # item 11
    No = P3 * cs**2 / (1 + 2 * cs**3)
    check(c["members"]["BD"]["start"]["n"], Nm, P3, "middle hanger")
    check(c["members"]["AD"]["start"]["n"], No, P3, "outer hanger")
    # D drops by the middle hanger's stretch N H/EA (Hooke, common practice).
    check(c["displacements"]["D.y"], -Nm * H / EA_BAR, P3 * H / EA_BAR, "joint drop")


def test_three_bar_misfit_superposes_and_scales():
    cs_ = three_bar_cases()
    mis, load, both, mis25 = cs_["misfit"], cs_["load"], cs_["both"], cs_["misfit x2.5"]
    scale_n = P3
    for m in ("AD", "BD", "CD"):
        n_m, n_l, n_b, n_25 = (c["members"][m]["start"]["n"] for c in (mis, load, both, mis25))
        check(n_b, n_m + n_l, scale_n, f"{m}: load + misfit superpose")
        check(n_25, 2.5 * n_m, scale_n, f"{m}: misfit effect is linear in e")
    for node in ("A", "B", "C"):
        for comp in ("x", "y"):
            r = [c["reactions"][node][comp] for c in (mis, load, both, mis25)]
            check(r[2], r[0] + r[1], scale_n, f"reaction {node}.{comp} superposes")
            check(r[3], 2.5 * r[0], scale_n, f"reaction {node}.{comp} scales")
    for key in ("D.x", "D.y", "B-D", "A-D"):
        d = [c["displacements"][key] for c in (mis, load, both, mis25)]
        check(d[2], d[0] + d[1], E_MIS, f"{key} superposes")
        check(d[3], 2.5 * d[0], E_MIS, f"{key} scales")


def test_fixed_fixed_beam_misfit():
    """A beam made too long by e and forced between two walls: N = -EA e/l, no bending
    (Hooke's law; common practice)."""
    e = 0.002
    c = solve_default(beam_AB(L, {"A": "fixed", "B": "fixed"}, [{"member": "AB", "misfit": e}]))
    N = -EA * e / L
    check(c["members"]["AB"]["start"]["n"], N, abs(N), "axial force")
    check(c["reactions"]["A"]["x"], -N, abs(N), "wall pushes back at A")
    check(c["members"]["AB"]["start"]["m"], 0.0, abs(N) * L, "no moment")
    check(c["reactions"]["B"]["y"], 0.0, abs(N), "no shear")


def test_pinned_portal_beam_misfit():
    """Pinned-base portal (height h, span s, one EI, axially rigid) whose beam is made too
    long by e.  Released with D on rollers, the tops spread by e freely; the horizontal
    reaction H closes the gap: H (2h^3/(3EI) + h^2 s/EI) = e (derived by least work; the
    same flexibility underlies item 13).  The long beam pushes the frame open, so the
    bases push inward: A.x = +H, D.x = -H."""
    h, s, EIp, e = 4.0, 6.0, 30000.0, 0.003
    c = solve_default(case_text(
        name="portal with a long beam",
        nodes={"A": (0.0, 0.0), "B": (0.0, h), "C": (s, h), "D": (s, 0.0)},
        beams={"AB": {"nodes": ["A", "B"], "EI": ei(EIp)},
               "BC": {"nodes": ["B", "C"], "EI": ei(EIp)},
               "CD": {"nodes": ["C", "D"], "EI": ei(EIp)}},
        supports={"A": "pinned", "D": "pinned"},
        loads=[{"member": "BC", "misfit": e}],
    ))
    Hx = e / (2 * h**3 / (3 * EIp) + h**2 * s / EIp)
    check(c["reactions"]["A"]["x"], Hx, Hx, "base A pushes inward")
    check(c["reactions"]["D"]["x"], -Hx, Hx, "base D pushes inward")
    check(c["reactions"]["A"]["y"], 0.0, Hx, "no vertical reaction")
    # The beam is compressed by H and bent by the constant moment H h (hogging at the knees:
    # the columns bend inward at the top)  -- statics of the column AB.
    check(c["members"]["BC"]["start"]["n"], -Hx, Hx, "beam thrust")
    check(c["members"]["BC"]["start"]["m"], -Hx * h, Hx * h, "knee moment")


# =====================================================================================
# Elastic supports (springs).
# =====================================================================================


@pytest.mark.parametrize("k", [500.0, 2000.0, 1.0e5])
@pytest.mark.parametrize("alone", [True, False], ids=["spring-only", "spring+restrain-x"])
def test_propped_cantilever_on_elastic_prop(k, alone):
    """Derived by least work: U = int M^2/2EI + R^2/(2k) with M = R(l-x) - w(l-x)^2/2;
    dU/dR = 0 gives R = (3wl/8)/(1 + 3EI/(k l^3)); the prop shortens by R/k, so B moves
    -R/k (down).  Limit k -> infinity: 3wl/8 (item 1, Hicks ch. 2)."""
    w = 10.0
    sup_b = {"springs": {"y": k}} if alone else {"restrain": ["x"], "springs": {"y": f"{k} kN/m"}}
    c = solve_default(beam_AB(L, {"A": "fixed", "B": sup_b}, [{"member": "AB", "wy": -w}],
                              {"displacements": ["B.y"]}))
    R = (3 * w * L / 8) / (1 + 3 * EI / (k * L**3))
    check(c["reactions"]["B"]["y"], R, w * L, "spring force")
    check(c["reactions"]["A"]["y"], w * L - R, w * L, "wall shear")
    check(c["reactions"]["A"]["rz"], w * L**2 / 2 - R * L, w * L**2, "wall moment (statics)")
    check(c["displacements"]["B.y"], -R / k, R / k, "prop displacement")
    # contract: the spring entry is minus the stiffness times the node's displacement
    check(c["reactions"]["B"]["y"], -k * c["displacements"]["B.y"], R, "spring law")


def test_stiff_spring_tends_to_rigid_prop():
    w = 10.0
    c = solve_default(beam_AB(L, {"A": "fixed", "B": {"springs": {"y": 1.0e12}}},
                              [{"member": "AB", "wy": -w}]))
    assert c["reactions"]["B"]["y"] == pytest.approx(3 * w * L / 8, rel=1e-6)  # item 1 (Hicks ch. 2)


@pytest.mark.parametrize("kr", [2000.0, 20000.0])
def test_simple_beam_with_rotational_spring(kr):
    """Pinned end with a rotational spring kr, roller at the far end, uniform load.
    Derived (compatibility of end rotation, simple-beam rotations wl^3/24EI and Ml/3EI,
    Hicks ch. 2): M = (wl^2/8)/(1 + 3EI/(kr l)); the joint turns by -M/kr (clockwise)."""
    w = 10.0
    c = solve_default(beam_AB(L, {"A": {"restrain": ["x", "y"], "springs": {"rz": kr}}, "B": "roller"},
                              [{"member": "AB", "wy": -w}], {"displacements": ["A.rz"]}))
    M = (w * L**2 / 8) / (1 + 3 * EI / (kr * L))
    check(c["reactions"]["A"]["rz"], M, w * L**2, "spring moment")
    check(c["members"]["AB"]["start"]["m"], -M, w * L**2, "hogging at the spring")
    check(c["reactions"]["B"]["y"], w * L / 2 - M / L, w * L, "roller reaction (statics)")
    check(c["displacements"]["A.rz"], -M / kr, M / kr, "spring rotation")


# =====================================================================================
# Inclined rollers: the reaction is normal to the rolling surface, n = (-sin a, cos a),
# so x/y = -tan a (hand statics).
# =====================================================================================


@pytest.mark.parametrize("deg", [30.0, -20.0, 60.0])
def test_simple_beam_on_inclined_roller(deg):
    """Statically determinate; hand statics: moments about A give B.y = P/2 (the x
    component of B's reaction has no lever arm about A), then B.x = -B.y tan a,
    n = B.y/cos a, and A takes the rest."""
    P = 40.0
    a = math.radians(deg)
    c = solve_default(beam_AB(L, {"A": "pinned", "B": {"type": "roller", "surface_angle": f"{deg} deg"}},
                              [{"member": "AB", "at": L / 2, "fy": -P}]))
    rb = c["reactions"]["B"]
    check(rb["y"], P / 2, P, "B.y")
    check(rb["x"], -P / 2 * math.tan(a), P, "B.x")
    check(rb["n"], P / 2 / math.cos(a), P, "B.n")
    check(rb["x"] / rb["y"], -math.tan(a), 1.0, "reaction normal to the surface")
    check(c["reactions"]["A"]["x"], P / 2 * math.tan(a), P, "A.x")
    check(c["reactions"]["A"]["y"], P / 2, P, "A.y")
    check(c["members"]["AB"]["start"]["n"], -P / 2 * math.tan(a), P, "axial force from A.x")


@pytest.mark.parametrize("deg", [30.0, -45.0])
@pytest.mark.parametrize("axial", ["rigid", "elastic"])
def test_propped_cantilever_on_inclined_roller(deg, axial):
    """Fixed at A, inclined roller at B, uniform load.  Redundant R along the outward
    normal n = (-s, c).  The cantilever tip moves -wl^4/8EI (vertical) under the load and
    (-R s l/EA, R c l^3/3EI) under R (cantilever end load and uniform load, Roark Table 8.1, from memory; Hooke), so
    compatibility along n: R (s^2 l/EA + c^2 l^3/3EI) = c w l^4/8EI (derived).
    An axially rigid beam (1/EA = 0) gives B.y = 3wl/8 (item 1, Hicks ch. 2) at any angle."""
    w = 10.0
    a = math.radians(deg)
    s, co = math.sin(a), math.cos(a)
    spec = dict(nodes={"A": (0.0, 0.0), "B": (L, 0.0)},
                supports={"A": "fixed", "B": {"type": "roller", "surface_angle": f"{deg} deg"}},
                loads=[{"member": "AB", "wy": -w}],
                analysis={"displacements": ["B.x", "B.y"]})
    if axial == "rigid":  # EI only, no section with A and no EA: axially rigid
        t = case_text(name="rigid stringer", beams={"AB": {"nodes": ["A", "B"], "EI": ei(EI)}}, **spec)
    else:
        t = text(beams={"AB": {"nodes": ["A", "B"]}}, **spec)
    c = solve_default(t)
    flex_axial = 0.0 if axial == "rigid" else s * s * L / EA
    R = co * w * L**4 / (8 * EI) / (flex_axial + co * co * L**3 / (3 * EI))
    rb = c["reactions"]["B"]
    check(rb["n"], R, w * L, "normal reaction")
    check(rb["x"], -R * s, w * L, "B.x")
    check(rb["y"], R * co, w * L, "B.y")
    check(rb["x"] / rb["y"], -math.tan(a), 1.0, "reaction normal to the surface")
    if axial == "rigid":
        check(rb["y"], 3 * w * L / 8, w * L, "item 1 with an axially rigid beam")
        check(c["displacements"]["B.x"], 0.0, 1e-3, "rigid beam: B cannot slide")
    # B moves only along the surface: its displacement has no normal component.
    dn = -s * c["displacements"]["B.x"] + co * c["displacements"]["B.y"]
    check(dn, 0.0, abs(c["displacements"]["B.x"]) + 1e-6, "no motion along the normal")


def test_inclined_roller_settles_along_its_normal():
    """Imposed dn on an inclined roller prop: R (s^2 l/EA + c^2 l^3/3EI) = dn (derived as
    above); the support point moves by dn along the normal."""
    deg, dn = 30.0, -0.005
    a = math.radians(deg)
    s, co = math.sin(a), math.cos(a)
    c = solve_default(beam_AB(L, {"A": "fixed", "B": {"type": "roller", "surface_angle": f"{deg} deg"}},
                              [{"settlement": "B", "dn": dn}], {"displacements": ["B.x", "B.y"]}))
    R = dn / (s * s * L / EA + co * co * L**3 / (3 * EI))
    check(c["reactions"]["B"]["n"], R, abs(R), "normal reaction")
    moved = -s * c["displacements"]["B.x"] + co * c["displacements"]["B.y"]
    check(moved, dn, abs(dn), "displacement along the normal = imposed")


# =====================================================================================
# Shear energy ([analysis] shear = true): Timoshenko beam.
# =====================================================================================

LS = 2.0  # a short, deep member so that shear matters


def test_cantilever_tip_deflection_with_shear():
    """Tip load P: PL^3/(3EI) + PL/(G As) (Timoshenko & Gere, Mechanics of Materials,
    shear deflections; from memory); at x from the wall: P x^2 (3L - x)/(6EI) + P x/(G As)."""
    P = 10.0
    c = solve_default(beam_AB(LS, {"A": "fixed"}, [{"node": "B", "fy": -P}],
                              {"shear": True, "displacements": ["B.y", "AB@0.5.y"]}))
    tip = -(P * LS**3 / (3 * EI) + P * LS / GAS)
    check(c["displacements"]["B.y"], tip, abs(tip), "tip deflection")
    x = 0.5
    check(c["displacements"]["AB@0.5.y"], -(P * x**2 * (3 * LS - x) / (6 * EI) + P * x / GAS),
          abs(tip), "deflection at 0.5 m")


def test_simple_beam_central_load_with_shear():
    """PL^3/(48EI) + PL/(4 G As) (Timoshenko, Strength of Materials Part I, shear deflection
    of a simply supported beam; from memory)."""
    P = 30.0
    c = solve_default(beam_AB(LS, {"A": "pinned", "B": "roller"},
                              [{"member": "AB", "at": LS / 2, "fy": -P}],
                              {"shear": True, "displacements": ["AB@1.0.y"]}))
    d = -(P * LS**3 / (48 * EI) + P * LS / (4 * GAS))
    check(c["displacements"]["AB@1.0.y"], d, abs(d), "mid-span deflection")


def test_propped_cantilever_uniform_load_with_shear():
    """Derived by least work with shear energy (Castigliano): the cantilever tip moves
    wl^4/8EI + wl^2/(2 G As) under the load and R (l^3/3EI + l/(G As)) under the prop force,
    so R = (wl^4/8EI + wl^2/2GAs)/(l^3/3EI + l/GAs) -- larger than 3wl/8 (item 1)."""
    w = 40.0
    c = solve_default(beam_AB(LS, {"A": "fixed", "B": "roller"}, [{"member": "AB", "wy": -w}],
                              {"shear": True}))
    R = (w * LS**4 / (8 * EI) + w * LS**2 / (2 * GAS)) / (LS**3 / (3 * EI) + LS / GAS)
    check(c["reactions"]["B"]["y"], R, w * LS, "prop reaction")
    check(c["reactions"]["A"]["rz"], w * LS**2 / 2 - R * LS, w * LS**2, "wall moment (statics)")
    assert c["reactions"]["B"]["y"] > 3 * w * LS / 8, "shear flexibility sheds load to the prop"
    # Without shear energy the same case gives item 1.
    c0 = solve_default(beam_AB(LS, {"A": "fixed", "B": "roller"}, [{"member": "AB", "wy": -w}]))
    check(c0["reactions"]["B"]["y"], 3 * w * LS / 8, w * LS, "item 1 without shear")


def test_fixed_fixed_uniform_load_with_shear():
    """By symmetry the end moments need no shear (the redundant end-moment pair makes no
    shear), so M = wl^2/12 (item 4, Hicks ch. 2) still; the mid-span deflection gains the
    shear part int_0^{l/2} V/(G As) dx = wl^2/(8 G As) (derived): wl^4/384EI + wl^2/8GAs."""
    w = 40.0
    c = solve_default(beam_AB(LS, {"A": "fixed", "B": "fixed"}, [{"member": "AB", "wy": -w}],
                              {"shear": True, "displacements": ["AB@1.0.y"]}))
    check(c["reactions"]["A"]["rz"], w * LS**2 / 12, w * LS**2, "end moment")
    check(c["members"]["AB"]["end"]["m"], -w * LS**2 / 12, w * LS**2, "end moment at B")
    d = -(w * LS**4 / (384 * EI) + w * LS**2 / (8 * GAS))
    check(c["displacements"]["AB@1.0.y"], d, abs(d), "mid-span deflection")
