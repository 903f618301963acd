"""Invariants of the force method that any correct solution must satisfy.

* Maxwell-Betti reciprocity and positive strain energy: the flexibility matrix of the
  compatibility equations is symmetric and positive definite.
* The compatibility equations hold: flexibility . X + load_terms = 0 when nothing is imposed.
* Uniqueness of the elastic solution (Kirchhoff): final reactions and member forces do
  not depend on which redundants were released.
* Statics: reactions balance the loads (checked here from the loads themselves, and the
  solver's own residual is at round-off).
* Degree of indeterminacy of known structures (common practice: frames 3m + r - 3j - c,
  trusses m + r - 2j, a closed ring carries 3 internal redundants).
* The command line prints the same result as the Python API.
"""

from __future__ import annotations

import json
import shutil
import subprocess
import sys

import numpy as np
import pytest
from _cases import (  # noqa: E402
    braced_bay_geometry,
    case_text,
    ea,
    ei,
    flatten_numbers,
    load_resultant,
    reaction_resultant,
    solve,
)

import leastwork  # noqa: E402

# ------------------------------------------------------------------ structures


def two_span_beam():
    return dict(
        name="two-span floor beam",
        nodes={"A": (0.0, 0.0), "B": (5.0, 0.0), "C": (12.0, 0.0)},
        beams={
            "AB": {"nodes": ["A", "B"], "EI": ei(30000.0)},
            "BC": {"nodes": ["B", "C"], "EI": ei(45000.0)},
        },
        supports={"A": "pinned", "B": "roller", "C": "roller"},
        loads=[
            {"member": "AB", "wy": -10.0},
            {"member": "BC", "at": 3.0, "fy": -50.0},
            {"member": "BC", "wy": -6.0, "from": 1.0, "to": 5.0},
        ],
    )


def two_span_beam_fixed_end():
    spec = two_span_beam()
    spec["name"] = "two-span beam built in at A"
    spec["supports"]["A"] = "fixed"
    spec["loads"].append({"node": "B", "mz": 12.0})
    return spec


def triangle_truss():
    return dict(
        name="roof truss on two pinned bearings",
        nodes={"A": (0.0, 0.0), "B": (4.0, 3.0), "C": (8.0, 0.0)},
        bars={
            "AB": {"nodes": ["A", "B"], "EA": ea(3.0e5)},
            "BC": {"nodes": ["B", "C"], "EA": ea(2.0e5)},
            "AC": {"nodes": ["A", "C"], "EA": ea(1.2e5)},
        },
        supports={"A": "pinned", "C": "pinned"},
        loads=[{"node": "B", "fx": 15.0, "fy": -60.0}],
    )


def braced_panel():
    return dict(
        name="double-braced bay on two pinned bases",
        **braced_bay_geometry(),
        loads=[{"node": "C", "fx": 20.0, "fy": -30.0}, {"node": "D", "fy": -40.0}],
    )


def fixed_portal():
    col, beam = {"EI": ei(20000.0), "EA": ea(1.5e6)}, {"EI": ei(35000.0), "EA": ea(1.5e6)}
    return dict(
        name="fixed-base portal",
        nodes={"A": (0.0, 0.0), "B": (0.0, 4.0), "C": (6.0, 4.0), "D": (6.0, 0.0)},
        beams={
            "AB": {"nodes": ["A", "B"], **col},
            "BC": {"nodes": ["B", "C"], **beam},
            "CD": {"nodes": ["C", "D"], **col},  # drawn downward
        },
        supports={"A": "fixed", "D": "fixed"},
        loads=[
            {"member": "BC", "wy": -15.0},
            {"member": "AB", "wx": 4.0},
            {"node": "C", "fx": 10.0},
        ],
    )


def two_hinged_portal():
    spec = fixed_portal()
    spec["name"] = "two-hinged portal"
    spec["supports"] = {"A": "pinned", "D": "pinned"}
    return spec


def closed_ring():
    return dict(
        name="closed rectangular frame on a pin and a roller",
        nodes={"A": (0.0, 0.0), "B": (6.0, 0.0), "C": (6.0, 4.0), "D": (0.0, 4.0)},
        beams={
            "AB": {"nodes": ["A", "B"], "EI": ei(30000.0), "EA": ea(1.0e6)},
            "BC": {"nodes": ["B", "C"], "EI": ei(20000.0), "EA": ea(1.0e6)},
            "CD": {"nodes": ["C", "D"], "EI": ei(30000.0), "EA": ea(1.0e6)},
            "DA": {"nodes": ["D", "A"], "EI": ei(20000.0), "EA": ea(1.0e6)},
        },
        supports={"A": "pinned", "B": "roller"},
        loads=[
            {"member": "CD", "wy": -10.0},
            {"node": "D", "fx": 8.0},
            {"member": "BC", "at": 1.5, "fx": -5.0},
        ],
    )


# (structure, list of redundant choices; None = the solver's own choice)
CHOICES = {
    "two_span_beam": (
        two_span_beam,
        [None, ["B.y"], ["C.y"], ["A.y"], ["AB.end.m"], ["BC.start.m"]],
    ),
    "two_span_beam_fixed_end": (
        two_span_beam_fixed_end,
        [None, ["B.y", "C.y"], ["A.rz", "C.y"], ["A.rz", "B.y"], ["AB.start.m", "AB.end.m"]],
    ),
    "triangle_truss": (triangle_truss, [None, ["C.x"], ["A.x"], ["AC"]]),
    "braced_panel": (
        braced_panel,
        [None, ["AC", "B.x"], ["BD", "A.x"], ["AB", "CD"], ["AB", "B.x"]],
    ),
    "fixed_portal": (
        fixed_portal,
        [
            None,
            ["D.x", "D.y", "D.rz"],
            ["A.x", "A.y", "A.rz"],
            ["A.rz", "D.rz", "D.x"],
            ["BC.start.m", "BC.end.m", "D.x"],
        ],
    ),
    "two_hinged_portal": (two_hinged_portal, [None, ["D.x"], ["A.x"], ["BC.start.m"]]),
    "closed_ring": (
        closed_ring,
        [None, ["AB.start.m", "AB.end.m", "BC.end.m"], ["CD.start.m", "CD.end.m", "DA.end.m"]],
    ),
}

ALL_SOLUTIONS = [(k, i) for k, (_, choices) in CHOICES.items() for i in range(len(choices))]


def _id(p):
    key, i = p
    choice = CHOICES[key][1][i]
    return f"{key}-{'auto' if choice is None else '+'.join(choice)}"


def _solve(key, i):
    make, choices = CHOICES[key]
    spec = make()
    return spec, solve(case_text(**spec), redundants=choices[i])


def _scales(spec):
    fx, fy, _ = load_resultant(spec)
    total = sum(abs(ld.get(k, 0.0)) for ld in spec["loads"] for k in ("fx", "fy"))
    xs = [x for x, _ in spec["nodes"].values()]
    ys = [y for _, y in spec["nodes"].values()]
    size = max(max(xs) - min(xs), max(ys) - min(ys))
    for ld in spec["loads"]:
        total += (
            size * (abs(ld.get("wx", 0.0)) + abs(ld.get("wy", 0.0))) + abs(ld.get("mz", 0.0)) / size
        )
    return total, total * size


# ------------------------------------------------------------------ flexibility


@pytest.mark.parametrize("p", ALL_SOLUTIONS, ids=_id)
def test_flexibility_symmetric_positive_definite(p):
    _, res = _solve(*p)
    c = res["cases"]["default"]
    f = np.array(c["flexibility"], dtype=float)
    n = len(res["redundants"])
    assert f.shape == (n, n)
    # Maxwell-Betti: f_ij = f_ji
    assert np.allclose(f, f.T, rtol=1e-10, atol=1e-12 * np.abs(f).max())
    # strain energy of any combination of unit redundants is positive
    assert np.linalg.eigvalsh((f + f.T) / 2).min() > 0


@pytest.mark.parametrize("p", ALL_SOLUTIONS, ids=_id)
def test_compatibility_equations_hold(p):
    _, res = _solve(*p)
    c = res["cases"]["default"]
    f = np.array(c["flexibility"], dtype=float)
    d0 = np.array(c["load_terms"], dtype=float)
    x = np.array([c["redundants"][r] for r in res["redundants"]], dtype=float)
    lhs = f @ x + d0
    scale = np.abs(f @ x).max() + np.abs(d0).max()
    assert np.abs(lhs).max() <= 1e-9 * scale


@pytest.mark.parametrize(
    "p", [p for p in ALL_SOLUTIONS if CHOICES[p[0]][1][p[1]] is not None], ids=_id
)
def test_chosen_redundants_are_used(p):
    key, i = p
    _, res = _solve(key, i)
    chosen = CHOICES[key][1][i]
    assert sorted(res["redundants"]) == sorted(chosen)
    assert sorted(res["cases"]["default"]["redundants"]) == sorted(chosen)


# ------------------------------------------------------------------ uniqueness


def _final_forces(res):
    """Everything in a result that must not depend on the choice of redundants."""
    c = res["cases"]["default"]
    out = {"reactions": c["reactions"], "members": {}}
    for mid, m in c["members"].items():
        out["members"][mid] = {
            "start": m["start"],
            "end": m["end"],
            "m_max": m["m_max"]["value"],
            "m_min": m["m_min"]["value"],
        }
    return flatten_numbers(out)


@pytest.mark.parametrize("key", list(CHOICES))
def test_result_independent_of_redundant_choice(key):
    make, choices = CHOICES[key]
    spec = make()
    force_scale, moment_scale = _scales(spec)
    results = [solve(case_text(**spec), redundants=ch) for ch in choices]
    reference = _final_forces(results[0])
    for ch, res in zip(choices[1:], results[1:]):
        got = _final_forces(res)
        assert set(got) == set(reference), f"{ch}: different entries"
        for path, val in reference.items():
            scale = moment_scale if path.endswith(("/m", "/rz", "m_max", "m_min")) else force_scale
            assert got[path] == pytest.approx(val, abs=1e-9 * scale), f"{ch}: {path}"


# ------------------------------------------------------------------ statics


@pytest.mark.parametrize("p", ALL_SOLUTIONS, ids=_id)
def test_reactions_balance_the_loads(p):
    spec, res = _solve(*p)
    c = res["cases"]["default"]
    force_scale, moment_scale = _scales(spec)
    lx, ly, lm = load_resultant(spec)
    rx, ry, rm = reaction_resultant(spec, c["reactions"])
    assert abs(lx + rx) <= 1e-9 * force_scale
    assert abs(ly + ry) <= 1e-9 * force_scale
    assert abs(lm + rm) <= 1e-9 * moment_scale
    assert 0.0 <= c["checks"]["equilibrium_residual"] <= 1e-9 * force_scale


@pytest.mark.parametrize("p", ALL_SOLUTIONS, ids=_id)
def test_joint_equilibrium_of_member_end_forces(p):
    """At every node the member end forces, the reactions and the nodal loads balance.

    From the section-force convention (m sagging-positive, v = dm/dx, n tension): on a cut
    face whose outward normal is +local x the internal force is n ex - v ey and the moment
    +m (counter-clockwise).  Hence a member acts on its start node with n ex - v ey and
    moment +m(start), and on its end node with -n ex + v ey and moment -m(end).
    """
    spec, res = _solve(*p)
    c = res["cases"]["default"]
    force_scale, moment_scale = _scales(spec)
    members = {**(spec.get("beams") or {}), **(spec.get("bars") or {})}
    bal = {n: np.zeros(3) for n in spec["nodes"]}
    for mid, m in members.items():
        a, b = m["nodes"]
        (xa, ya), (xb, yb) = spec["nodes"][a], spec["nodes"][b]
        length = np.hypot(xb - xa, yb - ya)
        ex = np.array([xb - xa, yb - ya]) / length  # local x
        ey = np.array([-ex[1], ex[0]])  # local y: local x turned 90 degrees ccw
        s, e = c["members"][mid]["start"], c["members"][mid]["end"]
        bal[a][:2] += s["n"] * ex - s["v"] * ey
        bal[a][2] += s["m"]
        bal[b][:2] += -e["n"] * ex + e["v"] * ey
        bal[b][2] += -e["m"]
    for node, comps in c["reactions"].items():
        bal[node] += [comps.get("x", 0.0), comps.get("y", 0.0), comps.get("rz", 0.0)]
    for ld in spec["loads"]:
        if "node" in ld:
            bal[ld["node"]] += [ld.get("fx", 0.0), ld.get("fy", 0.0), ld.get("mz", 0.0)]
    for node, v in bal.items():
        assert abs(v[0]) <= 1e-9 * force_scale, f"{node}: sum Fx = {v[0]}"
        assert abs(v[1]) <= 1e-9 * force_scale, f"{node}: sum Fy = {v[1]}"
        assert abs(v[2]) <= 1e-9 * moment_scale, f"{node}: sum M = {v[2]}"


# ------------------------------------------------------------------ degree of indeterminacy


def _beam(a, b, hinges=None, axial=True):
    spec = {"nodes": [a, b], "EI": ei(20000.0)}
    if axial:
        spec["EA"] = ea(1.0e6)
    if hinges:
        spec["hinges"] = hinges
    return spec


def _bar(a, b):
    return {"nodes": [a, b], "EA": ea(1.0e5)}


DEGREES = {
    # name: (spec, degree, external, internal)   -- external = r - 3 where that is clear
    "propped_cantilever": (
        dict(
            name="propped cantilever",
            nodes={"A": (0, 0), "B": (5, 0)},
            beams={"AB": _beam("A", "B", axial=False)},
            supports={"A": "fixed", "B": "roller"},
            loads=[{"member": "AB", "wy": -5.0}],
        ),
        1,
        1,
        0,
    ),
    "fixed_fixed_beam_with_axial_terms": (
        dict(
            name="built-in beam",
            nodes={"A": (0, 0), "B": (5, 0)},
            beams={"AB": _beam("A", "B")},
            supports={"A": "fixed", "B": "fixed"},
            loads=[{"member": "AB", "wy": -5.0}],
        ),
        3,
        3,
        0,
    ),
    "two_hinged_portal": (two_hinged_portal(), 1, 1, 0),
    "fixed_portal": (fixed_portal(), 3, 3, 0),
    "closed_ring": (closed_ring(), 3, 0, 3),
    "braced_panel_pin_pin": (braced_panel(), 2, 1, 1),
    "braced_panel_pin_roller": (
        dict(braced_panel(), supports={"A": "pinned", "B": "roller"}),
        1,
        0,
        1,
    ),
}

# m + r - 2j for a two-panel truss with both panels double-braced, on a pin and a roller:
# m = 7 chords/posts + 4 diagonals = 11, r = 3, j = 6 -> 2 (all internal).
_TWO_PANEL = dict(
    name="two-panel double-braced truss",
    nodes={"A": (0, 0), "B": (3, 0), "C": (6, 0), "D": (6, 2.5), "E": (3, 2.5), "F": (0, 2.5)},
    bars={k: _bar(*k) for k in ["AB", "BC", "CD", "DE", "EF", "FA", "BE", "AE", "BF", "BD", "CE"]},
    supports={"A": "pinned", "C": "roller"},
    loads=[{"node": "E", "fy": -30.0}],
)
DEGREES["two_panel_truss"] = (_TWO_PANEL, 11 + 3 - 2 * 6, 0, 2)


@pytest.mark.parametrize("key", list(DEGREES))
def test_degree_of_indeterminacy(key):
    spec, degree, external, internal = DEGREES[key]
    res = solve(case_text(**spec))
    ind = res["indeterminacy"]
    assert ind["stable"] is True
    assert ind["degree"] == degree
    assert ind["external"] == external
    assert ind["internal"] == internal
    assert len(res["redundants"]) == degree


@pytest.mark.parametrize(
    "hinge_spec, degree",
    [
        # fixed A, rollers B and C: 3m + r - 3j = 6 + 5 - 9 = 2; a hinge at B (one moment
        # release, c = 1) makes it 1; a second hinge in span AB (Gerber beam) makes it 0.
        (None, 2),
        ({"AB": ["end"]}, 1),
    ],
)
def test_degree_with_internal_hinge(hinge_spec, degree):
    beams = {"AB": _beam("A", "B", axial=False), "BC": _beam("B", "C", axial=False)}
    for mid, h in (hinge_spec or {}).items():
        beams[mid]["hinges"] = h
    spec = dict(
        name="two-span beam with a hinge",
        nodes={"A": (0, 0), "B": (5, 0), "C": (10, 0)},
        beams=beams,
        supports={"A": "fixed", "B": "roller", "C": "roller"},
        loads=[{"member": "BC", "wy": -5.0}],
    )
    res = solve(case_text(**spec))
    assert res["indeterminacy"]["degree"] == degree


def test_gerber_beam_is_determinate():
    # fixed A, hinge at G (end of AG), roller B: 3m + r - 3j - c = 6 + 4 - 9 - 1 = 0
    spec = dict(
        name="cantilever with a suspended span",
        nodes={"A": (0, 0), "G": (3, 0), "B": (8, 0)},
        beams={
            "AG": _beam("A", "G", hinges=["end"], axial=False),
            "GB": _beam("G", "B", axial=False),
        },
        supports={"A": "fixed", "B": "roller"},
        loads=[{"member": "GB", "wy": -10.0}],
    )
    res = solve(case_text(**spec))
    assert res["indeterminacy"]["degree"] == 0
    c = res["cases"]["default"]
    # statics: the suspended span GB (5 m, 10 kN/m) hangs 25 kN on each end
    assert c["reactions"]["B"]["y"] == pytest.approx(25.0, rel=1e-12)
    assert c["reactions"]["A"]["y"] == pytest.approx(25.0, rel=1e-12)
    assert c["reactions"]["A"]["rz"] == pytest.approx(75.0, rel=1e-12)


def test_mechanism_is_reported():
    # a beam on two rollers cannot hold itself horizontally (common practice)
    text = case_text(
        "beam on two rollers",
        {"A": (0, 0), "B": (5, 0)},
        beams={"AB": _beam("A", "B")},
        supports={"A": "roller", "B": "roller"},
        loads=[{"member": "AB", "wy": -5.0}],
    )
    with pytest.raises(leastwork.MechanismError):
        leastwork.solve(leastwork.loads_case(text, source="<test>"))


# ------------------------------------------------------------------ command line


def _cli(*args):
    exe = shutil.which("leastwork")
    cmd = (
        [exe]
        if exe
        else [sys.executable, "-c", "import sys; from leastwork.cli import main; sys.exit(main())"]
    )
    return subprocess.run(cmd + list(args), capture_output=True, text=True, timeout=120)


def _assert_same(a, b, path=""):
    if isinstance(b, dict):
        assert isinstance(a, dict) and set(a) == set(b), f"{path}: keys {sorted(a)} vs {sorted(b)}"
        for k in b:
            _assert_same(a[k], b[k], f"{path}/{k}")
    elif isinstance(b, (list, tuple)):
        assert isinstance(a, list) and len(a) == len(b), path
        for i, (x, y) in enumerate(zip(a, b)):
            _assert_same(x, y, f"{path}[{i}]")
    elif isinstance(b, float) or isinstance(a, float):
        assert a == pytest.approx(b, rel=1e-12, abs=1e-300), path
    else:
        assert a == b, path


@pytest.fixture
def portal_file(tmp_path):
    path = tmp_path / "portal.toml"
    path.write_text(case_text(**fixed_portal()))
    return path


def test_cli_json_equals_api(portal_file):
    run = _cli("solve", str(portal_file), "--json")
    assert run.returncode == 0, run.stderr
    printed = json.loads(run.stdout)
    api = leastwork.solve(leastwork.load_case(str(portal_file))).to_dict()
    _assert_same(printed, json.loads(json.dumps(api)))


def test_cli_redundants_option(portal_file):
    run = _cli("solve", str(portal_file), "--json", "--redundants", "A.x,A.y,A.rz")
    assert run.returncode == 0, run.stderr
    printed = json.loads(run.stdout)
    assert printed["redundants"] == ["A.x", "A.y", "A.rz"]
    api = solve(case_text(**fixed_portal()), redundants=["A.x", "A.y", "A.rz"])
    _assert_same(printed, json.loads(json.dumps(api)))


def test_json_result_shape(portal_file):
    res = json.loads(_cli("solve", str(portal_file), "--json").stdout)
    assert res["schema"] == "leastwork.result/1"
    assert {"schema", "name", "units", "indeterminacy", "redundants", "cases"} <= set(res)
    assert res["units"] == {"force": "kN", "length": "m", "moment": "kN*m", "rotation": "rad",
                            "displacement": "m", "distributed": "kN/m", "stress": "kN/m^2"}
    assert {"degree", "external", "internal", "stable"} <= set(res["indeterminacy"])
    case = res["cases"]["default"]
    assert {
        "redundants",
        "flexibility",
        "load_terms",
        "reactions",
        "members",
        "displacements",
        "checks",
    } <= set(case)
    assert set(case["reactions"]) == {"A", "D"}
    assert set(case["reactions"]["A"]) == {"x", "y", "rz"}
    assert set(case["members"]) == {"AB", "BC", "CD"}
    for m in case["members"].values():
        for end in ("start", "end"):
            assert {"n", "v", "m"} <= set(m[end])
        for ext in ("m_max", "m_min"):
            assert {"value", "at"} <= set(m[ext])
    assert "equilibrium_residual" in case["checks"]
    assert len(case["flexibility"]) == len(case["load_terms"]) == len(res["redundants"])


def test_cli_check_and_exit_codes(tmp_path, portal_file):
    run = _cli("check", str(portal_file))
    assert run.returncode == 0, run.stderr
    bad = tmp_path / "bad.toml"
    bad.write_text(case_text(**dict(fixed_portal(), supports={"A": "glued", "D": "fixed"})))
    run = _cli("solve", str(bad), "--json")
    assert run.returncode == 2
    assert "Traceback" not in run.stderr
    mech = tmp_path / "mechanism.toml"
    mech.write_text(case_text(**dict(fixed_portal(), supports={"A": "roller", "D": "roller"})))
    run = _cli("solve", str(mech), "--json")
    assert run.returncode == 3
    assert "Traceback" not in run.stderr
