"""Space structures (docs/space.md): outside values with their sources, invariants, the
stiffness cross-check, the JSON result of contract section 5.5 and the command line."""

from __future__ import annotations

import json
import math

import numpy as np
import pytest

import leastwork
from leastwork.cli import main
from leastwork.space import solve_space

HEAD = '[structure]\nname = "t"\nunits = { force = "kN", length = "m" }\n'
STIFF = 'EA = "2e6 kN", EIy = "{EIy} kN*m^2", EIz = "{EIz} kN*m^2", GJ = "{GJ} kN*m^2"'


def beam(a: str, b: str, EIy=2000.0, EIz=3000.0, GJ=1500.0, extra: str = "") -> str:
    return (f'{{ nodes = ["{a}", "{b}"], ' + STIFF.format(EIy=EIy, EIz=EIz, GJ=GJ)
            + (", " + extra if extra else "") + " }")


def case(nodes: dict, beams: dict | None = None, bars: dict | None = None,
         supports: dict | None = None, loads: list[str] = (), analysis: str = "") -> str:
    text = HEAD + "[nodes]\n" + "".join(f"{k} = {list(v)}\n" for k, v in nodes.items())
    if beams:
        text += "[beams]\n" + "".join(f"{k} = {v}\n" for k, v in beams.items())
    if bars:
        text += "[bars]\n" + "".join(f"{k} = {v}\n" for k, v in bars.items())
    text += "[supports]\n" + "".join(f"{k} = {v}\n" for k, v in (supports or {}).items())
    text += "".join(f"[[loads]]\n{ld}\n" for ld in loads)
    if analysis:
        text += "[analysis]\n" + analysis + "\n"
    return text


def solve(text: str, redundants=None):
    return solve_space(leastwork.loads_case(text), redundants)


def kn(x: float) -> float:
    return x / 1000.0


# ---------------------------------------------------------------- bent cantilever
A_LEN, B_LEN, P = 2.0, 1.5, 10.0
EI, GJ = 2000.0, 1500.0
BENT_NODES = {"A": (0, 0, 0), "B": (A_LEN, 0, 0), "C": (A_LEN, B_LEN, 0)}


def test_bent_cantilever_tip_deflection():
    # Castigliano's classical example (bent cantilever, load at the tip, perpendicular to
    # its plane): delta = P [a^3/3EI + b^3/3EI + a b^2/GJ]
    sol = solve(case(BENT_NODES, {"AB": beam("A", "B"), "BC": beam("B", "C")},
                     supports={"A": '"fixed"'}, loads=[f'node = "C"\nfz = "-{P} kN"'],
                     analysis='displacements = ["C.z"]'))
    expected = P * (A_LEN ** 3 / (3 * EI) + B_LEN ** 3 / (3 * EI) + A_LEN * B_LEN ** 2 / GJ)
    assert sol.cases["default"].displacements["C.z"] == pytest.approx(-expected, rel=1e-12)
    # the arm AB twists by P b (statics of the free arm)
    ab = sol.cases["default"].members["AB"].end_actions()[0]
    assert abs(ab["t"]) == pytest.approx(P * B_LEN * 1e3, rel=1e-12)
    assert sol.stiffness_check.ok


def test_bent_cantilever_torsion_is_its_own_term():
    # invariant: with the tip propped, delta_11 is the sum of the terms a^3/3EI, b^3/3EI
    # (bending about y) and a b^2/GJ (torsion), each in its own term
    sol = solve(case(BENT_NODES, {"AB": beam("A", "B"), "BC": beam("B", "C")},
                     supports={"A": '"fixed"', "C": '{ restrain = ["z"] }'},
                     loads=[f'node = "B"\nfz = "-{P} kN"']), ["C.z"])
    parts = sol.delta_parts
    assert parts["torsion"][0, 0] == pytest.approx(A_LEN * B_LEN ** 2 / (GJ * 1e3), rel=1e-12)
    assert parts["bending about y"][0, 0] == pytest.approx(
        (A_LEN ** 3 + B_LEN ** 3) / (3 * EI * 1e3), rel=1e-12)


def test_propped_bent_cantilever():
    # derived by least work: load P at the corner B, prop at the tip C:
    # R = P (a^3/3EI) / (a^3/3EI + b^3/3EI + a b^2/GJ)
    sol = solve(case(BENT_NODES, {"AB": beam("A", "B"), "BC": beam("B", "C")},
                     supports={"A": '"fixed"', "C": '{ restrain = ["z"] }'},
                     loads=[f'node = "B"\nfz = "-{P} kN"']))
    d_cc = A_LEN ** 3 / (3 * EI) + B_LEN ** 3 / (3 * EI) + A_LEN * B_LEN ** 2 / GJ
    expected = P * (A_LEN ** 3 / (3 * EI)) / d_cc
    assert sol.topology.degree == 1
    assert kn(sol.cases["default"].reactions["C"]["z"]) == pytest.approx(expected, rel=1e-12)
    assert sol.stiffness_check.ok


# ---------------------------------------------------------------- crossing beams
def _crossing(L1=6.0, L2=4.0, EI1=5000.0, EI2=2000.0, at1=None, at2=None):
    at1 = L1 / 2 if at1 is None else at1
    at2 = L2 / 2 if at2 is None else at2
    nodes = {"W": (0, at2, 0), "E": (L1, at2, 0), "S": (at1, 0, 0), "N": (at1, L2, 0),
             "M": (at1, at2, 0)}
    beams = {"WM": beam("W", "M", EIy=EI1), "ME": beam("M", "E", EIy=EI1),
             "SM": beam("S", "M", EIy=EI2), "MN": beam("M", "N", EIy=EI2)}
    # fork supports: the three translations and the twist of the beam held
    sup = {"W": '{ restrain = ["x", "y", "z", "rx"] }', "E": '{ restrain = ["x", "y", "z", "rx"] }',
           "S": '{ restrain = ["x", "y", "z", "ry"] }', "N": '{ restrain = ["x", "y", "z", "ry"] }'}
    return case(nodes, beams, supports=sup, loads=['node = "M"\nfz = "-60 kN"'],
                analysis='displacements = ["M.z"]')


def test_crossing_beams_share_the_load_by_compatibility():
    # common practice: two simply supported beams crossing at mid-span share a load there
    # in proportion to the other beam's L^3/EI (equal mid-span deflections)
    L1, L2, EI1, EI2, Pm = 6.0, 4.0, 5000.0, 2000.0, 60.0
    sol = solve(_crossing(L1, L2, EI1, EI2))
    r = sol.cases["default"].reactions
    share1 = Pm * (L2 ** 3 / EI2) / (L1 ** 3 / EI1 + L2 ** 3 / EI2)
    assert kn(r["W"]["z"] + r["E"]["z"]) == pytest.approx(share1, rel=1e-9)
    assert kn(r["S"]["z"] + r["N"]["z"]) == pytest.approx(Pm - share1, rel=1e-9)
    # mid-span deflection of beam 1 under its share: P1 L^3 / 48 EI (handbook)
    assert -sol.cases["default"].displacements["M.z"] == pytest.approx(
        share1 * L1 ** 3 / (48 * EI1), rel=1e-9)
    assert sol.stiffness_check.ok


def test_crossing_off_centre_twists_and_agrees_with_stiffness():
    # invariant: off mid-span the bending rotation of one beam is the twist of the other;
    # the independent stiffness solution agrees, and torsion takes part of the energy
    sol = solve(_crossing(at1=2.0, at2=1.2))
    assert sol.stiffness_check.ok
    assert max(abs(res.end_actions()[0]["t"]) for res in
               sol.cases["default"].members.values()) > 1.0  # N*m: a real twist


# ---------------------------------------------------------------- space trusses
def _mast(legs: int, h=6.0, r=2.0, extra_load: str = ""):
    nodes = {"T": (0, 0, h)}
    bars = {}
    sup = {}
    for i in range(legs):
        ang = 2 * math.pi * i / legs
        nodes[f"F{i}"] = (round(r * math.cos(ang), 12), round(r * math.sin(ang), 12), 0)
        bars[f"L{i}"] = f'{{ nodes = ["F{i}", "T"], EA = "1e5 kN" }}'
        sup[f"F{i}"] = '"pinned"'
    return case(nodes, bars=bars, supports=sup,
                loads=['node = "T"\nfz = "-90 kN"' + extra_load])


@pytest.mark.parametrize("legs", [3, 4])
def test_symmetric_mast_by_statics(legs):
    # statics (symmetry): each leg carries P / (n cos theta), cos theta = h / leg length
    h, r = 6.0, 2.0
    sol = solve(_mast(legs, h, r))
    assert sol.topology.degree == legs - 3
    cos = h / math.hypot(h, r)
    for i in range(legs):
        n = sol.cases["default"].members[f"L{i}"].end_actions()[0]["n"]
        assert kn(n) == pytest.approx(-90.0 / (legs * cos), rel=1e-9)


def test_four_legged_mast_sideways_load_agrees_with_stiffness():
    # invariant: one redundant, unsymmetric load; least work and stiffness agree and the
    # counting formula m + r - 3j gives the degree
    sol = solve(_mast(4, extra_load='\nfx = "12 kN"\nfy = "-7 kN"'))
    assert sol.topology.counting["value"] == 1 == sol.topology.degree
    assert sol.stiffness_check.ok


def test_three_bar_system_built_in_space():
    # Timoshenko, Strength of Materials I (from memory; references #11): middle bar
    # P / (1 + 2 cos^3 a), outer P cos^2 a / (1 + 2 cos^3 a); built in the x-z plane,
    # the joint held out of plane
    L, alpha = 3.0, math.radians(30)
    dx = L * math.tan(alpha)
    nodes = {"D": (0, 0, 0), "A": (-dx, 0, L), "B": (0, 0, L), "C": (dx, 0, L)}
    bars = {k: f'{{ nodes = ["D", "{k[1]}"], EA = "5e4 kN" }}' for k in ("DA", "DB", "DC")}
    sup = {"A": '"pinned"', "B": '"pinned"', "C": '"pinned"', "D": '{ restrain = ["y"] }'}
    sol = solve(case(nodes, bars=bars, supports=sup, loads=['node = "D"\nfz = "-30 kN"']))
    c3 = math.cos(alpha) ** 3
    n = {k: kn(sol.cases["default"].members[k].end_actions()[0]["n"]) for k in bars}
    assert n["DB"] == pytest.approx(30 / (1 + 2 * c3), rel=1e-9)
    assert n["DA"] == pytest.approx(30 * math.cos(alpha) ** 2 / (1 + 2 * c3), rel=1e-9)


# ---------------------------------------------------------------- plane in space
def test_portal_in_vertical_plane_gives_the_plane_results():
    # invariant: a plane frame built in the x-z plane (out-of-plane restrained at the
    # bases) gives the plane solver's reactions and moments (my is the plane m)
    plane = leastwork.loads_case(
        HEAD + '[nodes]\nA = [0, 0]\nB = [0, 4]\nC = [5, 4]\nD = [5, 0]\n[beams]\n'
        'AB = { nodes = ["A", "B"], EI = "2000 kN*m^2", EA = "2e6 kN" }\n'
        'BC = { nodes = ["B", "C"], EI = "3000 kN*m^2", EA = "2e6 kN" }\n'
        'CD = { nodes = ["C", "D"], EI = "2000 kN*m^2", EA = "2e6 kN" }\n'
        '[supports]\nA = "fixed"\nD = "pinned"\n[[loads]]\nmember = "BC"\nwy = "-8 kN/m"\n'
        '[[loads]]\nnode = "B"\nfx = "5 kN"\n')
    p = leastwork.solve(plane)
    space = solve(case({"A": (0, 0, 0), "B": (0, 0, 4), "C": (5, 0, 4), "D": (5, 0, 0)},
                       {"AB": beam("A", "B"), "BC": beam("B", "C", EIy=3000.0),
                        "CD": beam("C", "D")},
                       supports={"A": '"fixed"', "D": '{ restrain = ["x", "y", "z", "rx", "rz"] }'},
                       loads=['member = "BC"\nwz = "-8 kN/m"', 'node = "B"\nfx = "5 kN"']))
    sc = space.cases["default"]
    pc = p.cases["default"]
    assert sc.reactions["A"]["z"] == pytest.approx(pc.reactions["A"]["y"], rel=1e-9)
    assert sc.reactions["A"]["x"] == pytest.approx(pc.reactions["A"]["x"], rel=1e-9)
    # the plane rz (counter-clockwise, x to y) is -ry in space (x to z is about -y)
    assert sc.reactions["A"]["ry"] == pytest.approx(-pc.reactions["A"]["rz"], rel=1e-9)
    plane_members = p.to_dict()["cases"]["default"]["members"]
    for mid in ("AB", "BC", "CD"):
        s3 = sc.members[mid].end_actions()
        for k, end in enumerate(("start", "end")):
            s2 = plane_members[mid][end]
            assert kn(s3[k]["my"]) == pytest.approx(s2["m"], abs=1e-9)
            assert kn(s3[k]["n"]) == pytest.approx(s2["n"], abs=1e-9)
            assert kn(s3[k]["vz"]) == pytest.approx(s2["v"], abs=1e-9)


# ---------------------------------------------------------------- invariants
GRID = case({"A": (0, 0, 0), "B": (4, 0, 0), "C": (4, 3, 0), "D": (0, 3, 0), "E": (2, 1.5, 0)},
            {"AE": beam("A", "E"), "BE": beam("B", "E"), "CE": beam("C", "E"),
             "DE": beam("D", "E"), "AB": beam("A", "B")},
            supports={"A": '"fixed"', "B": '"pinned"', "C": '"pinned"', "D": '"fixed"'},
            loads=['node = "E"\nfz = "-40 kN"\nmx = "3 kN*m"',
                   'member = "AB"\nwz = [-4, -9]\nwy = "2 kN/m"\nfrom = "0.5 m"',
                   'member = "CE"\nat = "1 m"\nfz = "-7 kN"\nfx = "3 kN"'],
            analysis='displacements = ["E.z", "E.rx"]')


def test_flexibility_symmetric_positive_definite():
    # invariant (Maxwell-Betti; positive complementary energy)
    sol = solve(GRID)
    d = sol.delta
    assert np.allclose(d, d.T, rtol=0, atol=1e-14 * np.abs(d).max())
    assert np.linalg.eigvalsh(d).min() > 0


def _member_redundants(topo) -> list[str]:
    """Redundants chosen with the reactions kept in the released structure first, so that
    member forces (moments, twists) become redundants."""
    order = [j for j, c in enumerate(topo.columns) if c.role == "reaction"] + [
        j for j, c in enumerate(topo.columns) if c.role != "reaction"]
    kept: list[int] = []
    for j in order:
        if np.linalg.matrix_rank(topo.scaled[:, kept + [j]], tol=1e-6) == len(kept) + 1:
            kept.append(j)
    return [c.name for j, c in enumerate(topo.columns) if j not in kept]


def test_independent_of_the_redundant_choice():
    # invariant: another choice of redundants (member moments and twists instead of
    # reactions) gives the same reactions and displacements
    a = solve(GRID)
    names = _member_redundants(a.topology)
    assert set(names) != set(a.redundant_names)
    b = solve(GRID, names)
    for nid, comps in a.cases["default"].reactions.items():
        for d, v in comps.items():
            assert b.cases["default"].reactions[nid][d] == pytest.approx(v, rel=1e-8, abs=1e-6)
    for t, v in a.cases["default"].displacements.items():
        assert b.cases["default"].displacements[t] == pytest.approx(v, rel=1e-9)
    assert a.stiffness_check.ok and b.stiffness_check.ok


def test_twist_redundant_takes_the_name_given():
    # the twist is one value along a member: MEMBER.end.t names the same force
    a = solve(GRID)
    names = [n.replace("AB.start.t", "AB.end.t") for n in _member_redundants(a.topology)]
    assert "AB.end.t" in names
    b = solve(GRID, names)
    assert "AB.end.t" in b.redundant_names
    assert b.cases["default"].reactions["A"]["z"] == pytest.approx(
        a.cases["default"].reactions["A"]["z"], rel=1e-9)


@pytest.mark.parametrize("seed", range(6))
def test_random_space_frames_agree_with_stiffness(seed):
    # invariant: random frames (beams, releases, bars, springs, member loads, settlements)
    # by least work and by the independent 12x12 stiffness element agree
    rng = np.random.default_rng(seed)
    n = 5
    pts = {f"N{i}": tuple(float(v) for v in np.round(rng.uniform(-3, 3, 3), 3))
           for i in range(n)}
    beams: dict[str, str] = {}
    ids = list(pts)
    pairs = set()
    for i in range(1, n):  # a tree of rigid beams, then closing members with releases
        j = int(rng.integers(0, i))
        pairs.add((ids[j], ids[i]))
        beams[f"M{i}"] = beam(ids[j], ids[i], *(float(v) for v in
                                                np.round(rng.uniform(1000, 5000, 3), 1)))
    free = [(a, b) for a in ids for b in ids if a < b and (a, b) not in pairs
            and (b, a) not in pairs]
    picks = rng.choice(len(free), size=3, replace=False)
    a, b = free[picks[0]]
    beams["K1"] = beam(a, b, extra='releases = { end = ["my", "t"] }')
    a, b = free[picks[1]]
    beams["K2"] = beam(a, b, extra='hinges = ["start"]')
    a, b = free[picks[2]]
    bars = {"X1": f'{{ nodes = ["{a}", "{b}"], EA = "8e4 kN" }}'}
    sup = {ids[0]: '"fixed"', ids[2]: '{ restrain = ["x", "y", "z"], springs = { rx = '
           '"4000 kN*m/rad" } }'}
    loads = [f'node = "{ids[-1]}"\nfx = "{rng.uniform(-9, 9):.3f} kN"\nfz = '
             f'"{rng.uniform(-20, -5):.3f} kN"\nmy = "2 kN*m"',
             'member = "M1"\nwz = [-3, -6]\nwx = "1 kN/m"',
             f'settlement = "{ids[2]}"\ndz = "-2 mm"']
    sol = solve(case(pts, beams, bars, sup, loads,
                     'displacements = ["' + ids[-1] + '.z", "' + ids[-1] + '.x"]'))
    assert sol.stiffness_check.ok, sol.stiffness_check.message
    assert sol.equilibrium_ok


# ---------------------------------------------------------------- other effects
def test_shaft_fixed_at_both_ends_under_a_torque():
    # common practice (torsion of a shaft held at both ends): T_A = T b / L, T_B = T a / L
    a, b, T = 1.0, 3.0, 8.0
    sol = solve(case({"A": (0, 0, 0), "K": (a, 0, 0), "B": (a + b, 0, 0)},
                     {"AK": beam("A", "K"), "KB": beam("K", "B")},
                     supports={"A": '"fixed"', "B": '"fixed"'},
                     loads=[f'node = "K"\nmx = "{T} kN*m"']))
    r = sol.cases["default"].reactions
    assert kn(r["A"]["rx"]) == pytest.approx(-T * b / (a + b), rel=1e-12)
    assert kn(r["B"]["rx"]) == pytest.approx(-T * a / (a + b), rel=1e-12)


def test_prop_settlement_in_space():
    # slope-deflection equations (references #9): a propped cantilever whose prop settles
    # by D: R = 3 EI D / l^3
    L, D = 5.0, 0.01
    sol = solve(case({"A": (0, 0, 0), "B": (L, 0, 0)}, {"AB": beam("A", "B")},
                     supports={"A": '"fixed"', "B": '{ restrain = ["z"] }'},
                     loads=[f'settlement = "B"\ndz = "-{D} m"']))
    assert kn(sol.cases["default"].reactions["B"]["z"]) == pytest.approx(-3 * EI * D / L ** 3,
                                                                          rel=1e-12)
    assert sol.stiffness_check.ok


def test_restrained_bar_heated():
    # references #10 (Roark Table 8.1): a bar held at both ends: N = -EA alpha dT
    text = (HEAD + '[materials.s]\nE = "200 GPa"\nalpha = "1.2e-5 1/K"\n[nodes]\nA = [0, 0, 0]\n'
            'B = [1, 1, 1]\n[bars]\nAB = { nodes = ["A", "B"], EA = "1e5 kN", material = "s" }\n'
            '[supports]\nA = "pinned"\nB = "pinned"\n[[loads]]\nmember = "AB"\n'
            'temperature = { uniform = "30 K" }\n')
    sol = solve(text)
    n = sol.cases["default"].members["AB"].end_actions()[0]["n"]
    assert kn(n) == pytest.approx(-1e5 * 1.2e-5 * 30, rel=1e-12)


def test_local_axes_convention():
    # contract 5.5: y horizontal, z = x cross y upward; y = global y for a vertical member
    from leastwork.space.model import local_axes

    ax = local_axes(np.zeros(3), np.array([3.0, 4.0, 0.0]))
    assert np.allclose(ax[1], [-0.8, 0.6, 0]) and np.allclose(ax[2], [0, 0, 1])
    ax = local_axes(np.zeros(3), np.array([0, 0, 2.0]))
    assert np.allclose(ax[1], [0, 1, 0]) and np.allclose(ax[2], [-1, 0, 0])
    ax = local_axes(np.zeros(3), np.array([1.0, 0, 0]), math.pi / 2)
    assert np.allclose(ax[1], [0, 0, 1]) and np.allclose(ax[2], [0, -1, 0])


def test_roll_swaps_the_bending_stiffnesses():
    # invariant: a section turned by 90 degrees about its axis bends about the other axis
    def tip(roll: str, EIy: float, EIz: float) -> float:
        sol = solve(case({"A": (0, 0, 0), "B": (3, 0, 0)},
                         {"AB": beam("A", "B", EIy=EIy, EIz=EIz, extra=roll)},
                         supports={"A": '"fixed"'}, loads=['node = "B"\nfz = "-5 kN"'],
                         analysis='displacements = ["B.z"]'))
        return sol.cases["default"].displacements["B.z"]

    assert tip('roll = "90 deg"', 2000.0, 7000.0) == pytest.approx(tip("", 7000.0, 2000.0),
                                                                   rel=1e-12)


# ---------------------------------------------------------------- JSON, command line
def _write(tmp_path, text: str):
    p = tmp_path / "c.toml"
    p.write_text(text)
    return str(p)


def test_json_result_has_the_space_keys(tmp_path, capsys):
    assert main(["solve", _write(tmp_path, GRID), "--json"]) == 0
    d = json.loads(capsys.readouterr().out)
    case0 = d["cases"]["default"]
    assert set(case0["members"]["AE"]["start"]) == {"n", "vy", "vz", "t", "my", "mz"}
    assert set(case0["reactions"]["A"]) == {"x", "y", "z", "rx", "ry", "rz"}
    assert set(case0["reactions"]["B"]) == {"x", "y", "z"}
    assert d["indeterminacy"]["degree"] == len(d["redundants"])
    assert len(case0["flexibility"]) == len(d["redundants"])
    assert set(case0["displacements"]) == {"E.z", "E.rx"}
    assert case0["checks"]["stiffness_cross_check"]["agrees"] is True
    ae = case0["members"]["AE"]
    assert {"my_max", "my_min", "mz_max", "mz_min", "t_max", "t_min"} <= set(ae)
    assert ae["my_min"]["value"] <= min(ae["start"]["my"], ae["end"]["my"]) + 1e-12
    # flexibility = sum of the terms
    total = np.array(case0["flexibility"])
    parts = sum(np.array(v) for v in d["flexibility_by_term"].values())
    assert np.allclose(total, parts, rtol=1e-9, atol=1e-15)


@pytest.mark.parametrize("width", [60, 80])
def test_steps_fit_the_terminal(tmp_path, capsys, monkeypatch, width):
    monkeypatch.setenv("COLUMNS", str(width))
    assert main(["solve", _write(tmp_path, GRID), "--steps", "--no-color"]) == 0
    out = capsys.readouterr().out
    assert "torsion" in out and "Step 7" in out
    assert max(len(line) for line in out.splitlines()) <= width


def test_markdown_sheet(tmp_path, capsys):
    assert main(["solve", _write(tmp_path, GRID), "--format", "md"]) == 0
    out = capsys.readouterr().out
    assert "bending about y" in out and "qualified engineer" in out


@pytest.mark.parametrize("argv,needle", [
    (["solve", "{f}", "--basis", "local"], "not supported for space"),
    (["solve", "{f}", "--symbolic"], "nodal loads only"),
    (["fitup", "{f}", "--tolerance", "*=1mm"], "not supported for space"),
    (["sweep", "{f}", "--vary", "L=1..2:2", "--quantity", "A.z"], "not supported for space"),
])
def test_unsupported_commands_refuse_in_one_line(tmp_path, capsys, argv, needle):
    f = _write(tmp_path, GRID.replace("[nodes]", '[parameters]\nL = "4 m"\n[nodes]'))
    code = main([a.format(f=f, d=tmp_path) for a in argv])
    err = capsys.readouterr().err
    assert code == 2 and needle in err and "Traceback" not in err


TWO = HEAD + '[nodes]\nA = [0, 0, 0]\nB = [1, 0, 0]\n'


@pytest.mark.parametrize("text,needle", [
    (HEAD + '[nodes]\nA = [0, 0, 0]\nB = [1, 0]\n[bars]\nAB = { nodes = ["A", "B"], EA = 1 }\n'
     '[supports]\nA = "pinned"\n', "[nodes] B"),
    (HEAD + '[nodes]\nA = [0, 0, 0]\nB = [1, 0, 0]\n[beams]\nAB = { nodes = ["A", "B"], '
     'EIy = 1, EIz = 1 }\n[supports]\nA = "fixed"\n', "torsional stiffness"),
    (HEAD + '[nodes]\nA = [0, 0, 0]\nB = [1, 0, 0]\n[bars]\nAB = { nodes = ["A", "B"], '
     'EA = 1 }\n[supports]\nA = "roller"\n', "unknown support type"),
    (HEAD + '[nodes]\nA = [0, 0, 0]\nB = [1, 0, 0]\n[bars]\nAB = { nodes = ["A", "B"], '
     'EA = 1 }\n[supports]\nA = "pinned"\nB = "pinned"\n[[loads]]\nnode = "B"\nfw = 1\n',
     'unknown key "fw"'),
    (TWO + '[beams]\nAB = { nodes = ["A", "B"], EIy = 1, EIz = 1, GJ = 1, releases = '
     '{ start = ["m"] } }\n[supports]\nA = "fixed"\n', "releases.start"),
    (TWO + '[beams]\nAB = { nodes = ["A", "B"], EIy = 1, EIz = 1, GJ = 1, roll = "x" }\n'
     '[supports]\nA = "fixed"\n', ".roll"),
    (TWO + '[bars]\nAB = { nodes = ["A", "B"], EA = 1 }\n[supports]\nA = { restrain = '
     '["x"], springs = { w = 5 } }\n', "unknown direction"),
    (TWO + '[bars]\nAB = { nodes = ["A", "B"], EA = 1 }\n[supports]\nA = "pinned"\n'
     'B = "pinned"\n[[loads]]\nsettlement = "A"\ndrx = 0.01\n', "not rigidly restrained"),
    (TWO + '[bars]\nAB = { nodes = ["A", "B"], EA = 1 }\n[supports]\nA = "pinned"\n'
     'B = "pinned"\n[[loads]]\nmember = "AB"\nwz = 1\n', "is a bar"),
    (TWO + '[bars]\nAB = { nodes = ["A", "B"], EA = 1 }\n[supports]\nA = "pinned"\n'
     'B = "pinned"\n[[loads]]\nself_weight = true\n', "self_weight"),
    (TWO + '[bars]\nAB = { nodes = ["A", "B"], EA = 1 }\n[supports]\nA = "pinned"\n'
     'B = "pinned"\n[[loads]]\nmember = "AB"\ntemperature = { gradient = "5 K" }\n',
     "gradient"),
    (TWO + '[sections.s]\nI = "1e6 mm^4"\n[bars]\nAB = { nodes = ["A", "B"], EA = 1 }\n'
     '[supports]\nA = "pinned"\n', "Iy and Iz"),
    (TWO + '[beams]\nAB = { nodes = ["A", "B"], EIy = 1, GJ = 1 }\n[supports]\n'
     'A = "fixed"\n', "both flexural"),
    (TWO + '[bars]\nAB = { nodes = ["A", "B"], EA = 1 }\n[supports]\nA = "pinned"\n'
     '[patterns]\nlive = ["AB"]\n', "[patterns]"),
])
def test_bad_space_input_is_one_located_line(tmp_path, capsys, text, needle):
    assert main(["check", _write(tmp_path, text)]) == 2
    err = capsys.readouterr().err
    assert needle in err and len(err.strip().splitlines()) == 1


def test_mechanism_names_what_moves(tmp_path, capsys):
    # a tripod with one leg missing swings about the line through its two feet
    text = _mast(3).replace('L2 = { nodes = ["F2", "T"], EA = "1e5 kN" }\n', "")
    text = text.replace('F2 = "pinned"\n', "").replace("F2 = [", "#F2 = [")
    assert main(["check", _write(tmp_path, text)]) == 3
    assert "T." in capsys.readouterr().err


def test_plot_draws_a_grid_with_its_plan(tmp_path, capsys):
    # the drawing is written (PNG), with the plan view for a grid; report is refused
    f = _write(tmp_path, _crossing(at1=2.0, at2=1.2))
    assert main(["plot", f, "-o", str(tmp_path / "g.png")]) == 0
    assert (tmp_path / "g.png").read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"
    assert main(["plot", f, "-o", str(tmp_path / "p.svg"), "--diagrams", "plan,m"]) == 0
    assert b"<svg" in (tmp_path / "p.svg").read_bytes()[:400]
    assert main(["plot", f, "-o", str(tmp_path / "q.png"), "--diagrams", "v"]) == 2
    assert main(["report", f, "-o", str(tmp_path / "r.html")]) == 0
    page = (tmp_path / "r.html").read_text(encoding="utf-8")
    assert "<svg" in page and "torsion" in page and str(tmp_path) not in page
    assert main(["report", f, "-o", str(tmp_path / "r.md")]) == 0
    assert (tmp_path / "r-1.svg").is_file()


def test_deflected_shape_meets_the_unit_load_displacements():
    # invariant: the drawn shape passes through the joint displacements found by the
    # unit-load method, and its mid-span sag of a fixed-ended arm follows the curvature
    from leastwork.space.plot import member_shape, nodal_displacements

    sol = solve(_crossing())
    disp = nodal_displacements(sol, "default")
    assert disp["M"][2] == pytest.approx(sol.cases["default"].displacements["M.z"], rel=1e-12)
    shape = member_shape(sol, "default", "WM", disp)
    assert shape[-1][2] == pytest.approx(disp["M"][2], rel=1e-9)
    # beam 1 (W-M-E) is simply supported under its share P1 at mid-span: at its quarter
    # point the deflection is 11 P1 L^3 / (768 EI) (handbook, from memory)
    share1 = 60.0 * (4.0 ** 3 / 2000.0) / (6.0 ** 3 / 5000.0 + 4.0 ** 3 / 2000.0)
    quarter = shape[len(shape) // 2][2]
    assert -quarter == pytest.approx(11 * share1 * 6.0 ** 3 / (768 * 5000.0), rel=1e-3)


SYM_HEAD = HEAD + '[parameters]\nP = "10 kN"\nEI = "2000 kN*m^2"\nGJ = "1500 kN*m^2"\n'


def test_symbolic_propped_bent_cantilever(tmp_path, capsys):
    # derived by least work: R = P (a^3/3EI) / (a^3/3EI + b^3/3EI + a b^2/GJ), exactly
    import sympy

    text = (SYM_HEAD.replace("[parameters]\n", '[parameters]\na = "2 m"\nb = "1.5 m"\n')
            + '[nodes]\nA = [0, 0, 0]\nB = ["a", 0, 0]\nC = ["a", "b", 0]\n[beams]\n'
            'AB = { nodes = ["A", "B"], EIy = "EI", EIz = "EI", GJ = "GJ" }\n'
            'BC = { nodes = ["B", "C"], EIy = "EI", EIz = "EI", GJ = "GJ" }\n'
            '[supports]\nA = "fixed"\nC = { restrain = ["z"] }\n[[loads]]\nnode = "B"\n'
            'fz = "-P"\n')
    assert main(["solve", _write(tmp_path, text), "--symbolic", "--json"]) == 0
    d = json.loads(capsys.readouterr().out)
    a, b, P, EIs, GJs = sympy.symbols("a b P EI GJ", positive=True)
    got = sympy.sympify(d["cases"]["default"]["redundants"]["C.z"],
                        locals={"a": a, "b": b, "P": P, "EI": EIs, "GJ": GJs})
    expected = P * (a ** 3 / (3 * EIs)) / (a ** 3 / (3 * EIs) + b ** 3 / (3 * EIs)
                                           + a * b ** 2 / GJs)
    assert sympy.simplify(got - expected) == 0


def test_symbolic_crossing_beams(tmp_path, capsys):
    # common practice: beam 1 takes P (L2^3/EI2) / (L1^3/EI1 + L2^3/EI2), exactly
    import sympy

    text = (HEAD + '[parameters]\nL1 = "6 m"\nL2 = "4 m"\nEI1 = "5000 kN*m^2"\n'
            'EI2 = "2000 kN*m^2"\nP = "60 kN"\n[nodes]\nW = [0, "L2/2", 0]\n'
            'E = ["L1", "L2/2", 0]\nS = ["L1/2", 0, 0]\nN = ["L1/2", "L2", 0]\n'
            'M = ["L1/2", "L2/2", 0]\n[beams]\n'
            + "".join(f'{k} = {{ nodes = ["{k[0]}", "{k[1]}"], EIy = "{e}", EIz = "{e}", '
                      'GJ = "1000 kN*m^2" }\n'
                      for k, e in (("WM", "EI1"), ("ME", "EI1"), ("SM", "EI2"), ("MN", "EI2")))
            + '[supports]\nW = { restrain = ["x", "y", "z", "rx"] }\n'
            'E = { restrain = ["y", "z", "rx"] }\nS = { restrain = ["x", "y", "z", "ry"] }\n'
            'N = { restrain = ["x", "z", "ry"] }\n[[loads]]\nnode = "M"\nfz = "-P"\n')
    assert main(["solve", _write(tmp_path, text), "--symbolic", "--json",
                 "--time-limit", "600"]) == 0
    d = json.loads(capsys.readouterr().out)
    L1, L2, E1, E2, P = sympy.symbols("L1 L2 EI1 EI2 P", positive=True)
    names = {"L1": L1, "L2": L2, "EI1": E1, "EI2": E2, "P": P}
    r = {k: sympy.sympify(v, locals=names) for k, v in d["cases"]["default"]["reactions"].items()}
    share1 = P * (L2 ** 3 / E2) / (L1 ** 3 / E1 + L2 ** 3 / E2)
    assert sympy.simplify(r["W.z"] + r["E.z"] - share1) == 0


def test_combination_is_the_factored_sum_of_its_cases(tmp_path, capsys):
    # invariant (linearity): a combination's reactions are the factored sum of its load
    # cases'; the envelope names the governing combination
    text = GRID.replace('[[loads]]\nmember = "AB"', '[[loads]]\ncase = "live"\nmember = "AB"')
    text += '[combinations]\nULS = { default = 1.35, live = 1.5 }\nSLS = { default = 1, live = 1 }\n'
    assert main(["solve", _write(tmp_path, text), "--json"]) == 0
    d = json.loads(capsys.readouterr().out)
    c = d["cases"]
    for node, comps in c["ULS"]["reactions"].items():
        for k, v in comps.items():
            assert v == pytest.approx(1.35 * c["default"]["reactions"][node][k]
                                      + 1.5 * c["live"]["reactions"][node][k], rel=1e-9, abs=1e-9)
    top = d["envelope"]["reactions"]["A"]["z"]["max"]
    assert top["value"] == pytest.approx(max(c["ULS"]["reactions"]["A"]["z"],
                                             c["SLS"]["reactions"]["A"]["z"]), rel=1e-12)


def test_influence_line_of_a_prop_in_space(tmp_path, capsys):
    # Hicks ch. 2 (references #3): a propped cantilever with P at a from the wall has
    # R_prop = P a^2 (3L - a) / (2 L^3); the load moves along the beam (x = a)
    L = 5.0
    text = case({"A": (0, 0, 0), "B": (L, 0, 0)}, {"AB": beam("A", "B")},
                supports={"A": '"fixed"', "B": '{ restrain = ["z"] }'},
                loads=['node = "B"\nfz = "-1 kN"'])
    assert main(["influence", _write(tmp_path, text), "--quantity", "B.z", "--along", "AB",
                 "--points", "5", "--json"]) == 0
    d = json.loads(capsys.readouterr().out)
    for p in d["points"]:
        a = p["at"]
        assert p["value"] == pytest.approx(a * a * (3 * L - a) / (2 * L ** 3), abs=1e-12)
    assert d["max"]["at"] == pytest.approx(L)


def test_influence_station_equals_a_direct_solve(tmp_path, capsys):
    # invariant: each station of the line is the solve of that one load (grid twist)
    text = _crossing(at1=2.0, at2=1.2)
    assert main(["influence", _write(tmp_path, text), "--quantity", "WM.start.t",
                 "--along", "SM,MN", "--points", "3", "--json"]) == 0
    d = json.loads(capsys.readouterr().out)
    p = d["points"][2]  # SM at 2/3 of its length
    direct = solve(text.replace('fz = "-60 kN"', "fz = 0").replace(
        "[analysis]", f'[[loads]]\nmember = "SM"\nat = {p["at"]}\nfz = "-1 kN"\n[analysis]'))
    t = direct.cases["default"].members["WM"].end_actions()[0]["t"]
    assert p["value"] == pytest.approx(kn(t), rel=1e-9)
    assert abs(p["value"]) > 1e-6


def test_shear_energy_when_asked():
    # Timoshenko beam theory (common practice): a cantilever's tip deflection under P is
    # P L^3 / 3EI + P L / (G A_s) when shear deformation counts
    L, P_ = 2.0, 30.0
    text = (HEAD + '[materials.s]\nE = "210 GPa"\nG = "81 GPa"\n[sections.b]\nA = "8000 mm^2"\n'
            'Iy = "5e7 mm^4"\nIz = "2e7 mm^4"\nJ = "1e6 mm^4"\nshear_area = "3000 mm^2"\n'
            '[defaults]\nmaterial = "s"\nsection = "b"\n[nodes]\nA = [0, 0, 0]\nB = [2, 0, 0]\n'
            '[beams]\nAB = { nodes = ["A", "B"] }\n[supports]\nA = "fixed"\n[[loads]]\n'
            f'node = "B"\nfz = "-{P_} kN"\n[analysis]\nshear = true\ndisplacements = ["B.z"]\n')
    sol = solve(text)
    EI_, GA = 210e9 * 5e-5, 81e9 * 3e-3
    expected = P_ * 1e3 * (L ** 3 / (3 * EI_) + L / GA)
    assert -sol.cases["default"].displacements["B.z"] == pytest.approx(expected, rel=1e-12)


def test_spring_prop_under_the_tip():
    # derived by least work: a cantilever on a spring k under its loaded tip carries
    # R = P (L^3/3EI) / (L^3/3EI + 1/k)
    L, k, P_ = 4.0, 500.0, 20.0
    sol = solve(case({"A": (0, 0, 0), "B": (L, 0, 0)}, {"AB": beam("A", "B")},
                     supports={"A": '"fixed"', "B": f'{{ springs = {{ z = "{k} kN/m" }} }}'},
                     loads=[f'node = "B"\nfz = "-{P_} kN"']))
    d = L ** 3 / (3 * EI)
    assert kn(sol.cases["default"].reactions["B"]["z"]) == pytest.approx(P_ * d / (d + 1 / k),
                                                                          rel=1e-12)
    assert sol.stiffness_check.ok
    assert "SpaceSolution" in repr(sol) and sol.to_dict()["space"] is True


def test_large_space_structure_is_refused_in_one_line(tmp_path, capsys):
    # the dense path's size bound: above it a plain refusal, not a long computation
    n = 1100
    text = (HEAD + "[nodes]\n" + "".join(f"N{i} = [{i}, 0, {i % 2}]\n" for i in range(n))
            + "[bars]\n" + "".join(f'B{i} = {{ nodes = ["N{i}", "N{i + 1}"], EA = 1 }}\n'
                                   for i in range(n - 1))
            + '[supports]\nN0 = "pinned"\n')
    assert main(["check", _write(tmp_path, text)]) == 2
    assert "not supported yet" in capsys.readouterr().err
    assert main(["solve", _write(tmp_path, GRID), "--at", "Q.z"]) == 2
    assert "--at" in capsys.readouterr().err


def test_hinged_grid_joint_has_no_false_mechanism():
    # two cantilevers pinned together at their tips (both moments released, the twist
    # kept): no end resists a turn of the joint about the vertical, which is left out
    # rather than called a mechanism; the load at the joint is shared so that both tips
    # deflect alike, P1 L1^3/3EI1 = P2 L2^3/3EI2 (common practice, as for crossing beams)
    L1, L2, E1, E2, Pm = 2.0, 3.0, 2000.0, 5000.0, 20.0
    sol = solve(case({"A": (0, 0, 0), "M": (L1, 0, 0), "B": (L1, L2, 0)},
                     {"AM": beam("A", "M", EIy=E1, extra='hinges = ["end"]'),
                      "BM": beam("B", "M", EIy=E2, extra='hinges = ["end"]')},
                     supports={"A": '"fixed"', "B": '"fixed"'},
                     loads=[f'node = "M"\nfz = "-{Pm} kN"']))
    assert sol.topology.stable and sol.stiffness_check.ok
    assert "M.rz" not in sol.topology.dof_index and "M.rx" in sol.topology.dof_index
    p1 = Pm * (L2 ** 3 / E2) / (L1 ** 3 / E1 + L2 ** 3 / E2)
    assert kn(sol.cases["default"].reactions["A"]["z"]) == pytest.approx(p1, rel=1e-9)


def test_a_failed_cross_check_is_said_loudly(tmp_path, capsys, monkeypatch):
    # a disagreement (forced here by a zero tolerance) is shown on the sheet and warned on
    # standard error when the result goes to JSON; never a silent number
    import leastwork.space.stiffness as stiffness

    monkeypatch.setattr(stiffness, "CHECK_RTOL", -1.0)
    f = _write(tmp_path, GRID)
    assert main(["solve", f, "--json"]) == 0
    out = capsys.readouterr()
    assert json.loads(out.out)["cases"]["default"]["checks"]["stiffness_cross_check"][
        "agrees"] is False
    assert "DISAGREES" in out.err
    assert main(["solve", f, "--no-color"]) == 0
    assert "DISAGREES" in capsys.readouterr().out
