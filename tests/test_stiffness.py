"""The independent direct stiffness solver (leastwork.verify).

* Every bundled case file and every load case: the force method and the stiffness method
  agree on reactions and member end forces to 1e-8 of the largest force of the case, and on
  node displacements to 1e-8 of the largest displacement (agreement of two methods).
* The stiffness solver alone against handbook closed forms and facts of the trade.
* Axially rigid members are exact constraints; mechanisms and over-constrained rigid parts
  are reported; the solver stays sparse and fast at 10^4 degrees of freedom.
* Long, slender structures: a stable girder of 1000 cross-braced panels (scaled condition
  number about 1e11) solves, its reactions match the statics of the whole girder to the
  accuracy its condition number allows and every joint is in equilibrium to 1e-9 of the
  largest bar force; the second sign of a mechanism (a condition number singular to working
  precision) finds mechanisms small and large on its own; every structural mechanism of the
  bad-input corpus is one here too; a mechanism of thousands of joints names at most 16 of
  them in its message and keeps them all in ``.motions``; ``factor_nonzeros`` counts the
  nonzeros of the LU factors (4n - 2 for a tridiagonal system).
"""

from __future__ import annotations

import functools
import math
import time
from pathlib import Path

import numpy as np
import pytest
from _cases import case_text, ea, ei, straight_beam  # noqa: E402

import leastwork  # noqa: E402
import leastwork.verify.stiffness as stiffness  # noqa: E402
from leastwork.errors import CaseError, MechanismError  # noqa: E402
from leastwork.model import (  # noqa: E402
    DistributedLoad,
    Member,
    Node,
    Restraint,
    Settlement,
    Structure,
    Support,
)
from leastwork.verify import StiffnessResult, solve_stiffness, stiffness_dofs  # noqa: E402

CASES_DIR = Path(__file__).resolve().parent.parent / "cases"
#: the direct stiffness solver's own elements are straight: cases with curved members are
#: cross-checked through chains of straight beams (tests/test_cross_check.py)
CASE_FILES = sorted(p for p in CASES_DIR.glob("*.toml") if "curve = {" not in p.read_text())
REL = 1e-8
KN = 1.0e3  # N per kN: the stiffness solver works in SI units


def _all_cases():
    out = []
    for path in CASE_FILES:
        st = leastwork.load_case(path)
        out += [pytest.param(path, name, id=f"{path.stem}-{name}") for name in st.case_names]
    return out


def _scales(st: Structure, cr) -> tuple[float, float, float]:
    """(force, moment, displacement) scales of a force-method case result."""
    lmax = max(st.length(m) for m in st.members)
    forces = [abs(v) for rs in cr.reactions.values() for k, v in rs.items() if k != "rz"]
    forces += [abs(v) for m in cr.members.values() for v in (*m.start[:2], *m.end[:2])]
    dofs = cr.released.topo.dofs
    u = cr.nodal_displacements
    trans = max(abs(v) for d, v in zip(dofs, u) if not d.endswith(".rz"))
    rot = max([abs(v) for d, v in zip(dofs, u) if d.endswith(".rz")], default=0.0)
    # floor: a millionth of the natural displacement (force * L^3 / EI or force * L / EA),
    # for a case in which hardly any node moves (round-off is ~1e-16 of it)
    flex = [lmax**3 / m.EI for m in st.members.values() if m.EI]
    flex += [lmax / m.EA for m in st.members.values() if m.EA]
    return max(forces), max(forces) * lmax, max(trans, rot * lmax, 1e-6 * max(forces) * max(flex))


def _assert_agree(st: Structure, sol, name: str, res: StiffnessResult, rel: float = REL):
    cr = sol.cases[name]
    fs, ms, us = _scales(st, cr)
    lmax = max(st.length(m) for m in st.members)
    # a support lifted or a bar slack in this case is absent from the stiffness model of
    # the structure that carries it: zero there
    for node, rs in cr.reactions.items():
        ref = res.reactions.get(node, dict.fromkeys(rs, 0.0))
        assert set(ref) == set(rs), node
        for k, v in rs.items():
            scale = ms if k == "rz" else fs
            assert abs(ref[k] - v) <= rel * scale, f"reaction {node}.{k}"
    for mid, mr in cr.members.items():
        for i, want in enumerate((mr.start, mr.end)):
            got = res.end_forces.get(mid, ((0.0,) * 3, (0.0,) * 3))[i]
            for label, g, w, s in zip("nvm", got, want, (fs, fs, ms)):
                assert abs(g - w) <= rel * s, f"{mid} {('start', 'end')[i]} {label}: {g} vs {w}"
    di = sol.topology.dof_index
    for node, (ux, uy, rz) in res.displacements.items():
        for d, v in (("x", ux), ("y", uy), ("rz", rz)):
            key = f"{node}.{d}"
            assert (v is None) == (key not in di), key
            if v is not None:
                scale = us / lmax if d == "rz" else us
                assert abs(v - cr.nodal_displacements[di[key]]) <= rel * scale, key
    for target, value in cr.displacements.items():
        node, _, d = target.partition(".")
        if node in res.displacements and d in ("x", "y", "rz"):
            v = res.displacements[node][("x", "y", "rz").index(d)]
            scale = us / lmax if d == "rz" else us
            assert abs(v - value) <= rel * scale, target


# ---------------------------------------------------------------- bundled cases


@pytest.mark.parametrize("path,name", _all_cases())
def test_bundled_case_agrees_with_force_method(path, name):
    st = leastwork.load_case(path)
    sol = leastwork.solve(st)
    state = sol.states.get(name)
    if state is not None and state.changed:  # one-way items out: the stiffness model of
        from leastwork.one_way import state_structure  # the structure that carries the case

        _assert_agree(st, sol, name, solve_stiffness(
            state_structure(st, name, state.slack, state.lifted), name))
        return
    _assert_agree(st, sol, name, solve_stiffness(st, name))


#: Free dofs of the bundled cases, counted by hand: x, y at every node, rz where a beam end
#: is rigidly joined, less one per rigid restraint (springs add none).
BUNDLED_DOFS = {
    "braced-bay-fitup": 4 * 2 - 4,  # bars only, two pinned bases
    "canopy-prop": 3 + 3 + 2 - 3 - 2,  # A fixed, B beam end, C bar foot pinned
    "floor-beam-3span": 4 * 3 - 2 - 3,  # pinned + three rollers
    "footbridge-truss": 10 * 2 - 4,  # two pinned abutments
    "portal-frame": 5 * 3 - 6,  # two fixed bases
    "ramp-on-pile": 3 * 3 - 2 - 1,  # pinned, spring, inclined roller
    "settlement-and-heat": 3 * 3 - 2 - 2,  # pinned + two rollers
    "tied-beam": 3 + 3 + 3 + 2 + 3 - 6,  # D: bar end only; three pinned supports
}


@pytest.mark.parametrize("stem", BUNDLED_DOFS)
def test_bundled_case_dof_counts(stem):
    assert stiffness_dofs(leastwork.load_case(CASES_DIR / f"{stem}.toml")) == BUNDLED_DOFS[stem]


# ---------------------------------------------------------------- closed forms


def _solve_text(text: str, case: str = "default") -> tuple[Structure, StiffnessResult]:
    st = leastwork.loads_case(text, source="<test>")
    return st, solve_stiffness(st, case)


def test_propped_cantilever_uniform_load():
    """AISC Steel Construction Manual, Beam Diagrams and Formulas, case 12 (beam fixed at
    one end, supported at the other, uniformly distributed load); Roark's Formulas for
    Stress and Strain, Table 8.1: prop reaction 3wL/8, fixed-end moment wL^2/8."""
    w, L = 12.0, 7.0
    _, r = _solve_text(straight_beam({"A": 0.0, "B": L}, {"A": "fixed", "B": "roller"},
                                     [{"member": "AB", "wy": -w}], EI=30000.0))
    wN = w * KN
    assert r.reactions["B"]["y"] == pytest.approx(3 * wN * L / 8, rel=1e-12)
    assert r.reactions["A"]["y"] == pytest.approx(5 * wN * L / 8, rel=1e-12)
    assert r.reactions["A"]["rz"] == pytest.approx(wN * L**2 / 8, rel=1e-12)  # CCW on the beam
    assert r.end_forces["AB"][0][2] == pytest.approx(-wN * L**2 / 8, rel=1e-12)  # hogging
    assert abs(r.end_forces["AB"][1][2]) <= 1e-12 * wN * L**2


def test_fixed_fixed_beam_central_point_load():
    """AISC Steel Construction Manual, Beam Diagrams and Formulas, beam fixed at both ends,
    concentrated load at center (from memory); Roark Table 8.1: end moments PL/8 (hogging),
    end shears P/2."""
    P, L = 40.0, 6.0
    _, r = _solve_text(straight_beam({"A": 0.0, "B": L}, {"A": "fixed", "B": "fixed"},
                                     [{"member": "AB", "at": L / 2, "fy": -P}], EI=25000.0,
                                     EA=2.0e6))
    PN = P * KN
    (n0, v0, m0), (nL, vL, mL) = r.end_forces["AB"]
    assert m0 == pytest.approx(-PN * L / 8, rel=1e-12)
    assert mL == pytest.approx(-PN * L / 8, rel=1e-12)
    assert v0 == pytest.approx(PN / 2, rel=1e-12)
    assert vL == pytest.approx(-PN / 2, rel=1e-12)
    assert r.reactions["A"]["y"] == pytest.approx(PN / 2, rel=1e-12)


def test_restrained_heated_bar():
    """A bar held between two walls and warmed by dT carries N = -EA alpha dT (common
    practice); its nodes do not move."""
    EA, alpha, dT = 4.0e5, 1.2e-5, 30.0
    text = case_text("heated tie", {"A": (0.0, 0.0), "B": (3.0, 4.0)},
                     bars={"AB": {"nodes": ["A", "B"], "EA": ea(EA), "material": "hot"}},
                     supports={"A": "pinned", "B": "pinned"},
                     loads=[{"member": "AB", "temperature": {"uniform": dT}}])
    text += '\n[materials.hot]\nE = "200 GPa"\nalpha = "1.2e-5 1/K"\n'
    _, r = _solve_text(text)
    N = -EA * KN * alpha * dT
    assert r.end_forces["AB"][0][0] == pytest.approx(N, rel=1e-12)
    assert r.end_forces["AB"][1][0] == pytest.approx(N, rel=1e-12)
    # the heated bar pushes the wall at A away from B: reaction on the bar at A is along +AB
    assert r.reactions["A"]["x"] == pytest.approx(-N * 0.6, rel=1e-12)
    assert r.reactions["A"]["y"] == pytest.approx(-N * 0.8, rel=1e-12)
    assert max(abs(v) for v in r.displacements["B"][:2]) <= 1e-15


def test_cantilever_with_shear_deformation():
    """Tip deflection of a cantilever under an end load with shear energy of unit shear
    factor: P L^3 / (3 EI) + P L / (G As) (from memory; bending term Roark Table 8.1)."""
    P, L, EI, GAs = 10.0, 2.5, 8000.0, 2.0e4
    text = case_text("stub bracket", {"A": (0.0, 0.0), "B": (L, 0.0)},
                     beams={"AB": {"nodes": ["A", "B"], "EI": ei(EI), "section": "web"}},
                     supports={"A": "fixed"}, loads=[{"node": "B", "fy": -P}],
                     analysis={"shear": True})
    text += ('\n[materials.steel]\nE = "200 GPa"\nG = "80 GPa"\n'
             f'[sections.web]\nshear_area = "{GAs / 8.0e7!r} m^2"\n'
             '[defaults]\nmaterial = "steel"\n')
    _, r = _solve_text(text)
    expected = -(P * L**3 / (3 * EI) + P * L / GAs)  # kN and m: metres
    assert r.displacements["B"][1] == pytest.approx(expected, rel=1e-12)
    assert r.displacements["B"][2] == pytest.approx(-P * L**2 / (2 * EI), rel=1e-12)


def test_fixed_fixed_beam_end_settlement():
    """Fixed-fixed beam with one end displaced by D: M = 6 EI D / L^2 at both ends,
    V = 12 EI D / L^3 (Roark Table 8.1; slope-deflection equations, from memory)."""
    L, EI, D = 5.0, 20000.0, -0.008
    _, r = _solve_text(straight_beam({"A": 0.0, "B": L}, {"A": "fixed", "B": "fixed"},
                                     [{"settlement": "B", "dy": D}], EI=EI, EA=1.0e6))
    EIN = EI * KN
    assert abs(r.end_forces["AB"][0][2]) == pytest.approx(6 * EIN * abs(D) / L**2, rel=1e-12)
    assert abs(r.end_forces["AB"][1][2]) == pytest.approx(6 * EIN * abs(D) / L**2, rel=1e-12)
    assert r.reactions["B"]["y"] == pytest.approx(12 * EIN * D / L**3, rel=1e-12)
    assert r.displacements["B"][1] == pytest.approx(D, rel=1e-14)


def test_fixed_fixed_beam_temperature_gradient():
    """A beam held against curving carries m = -EI alpha gradient / depth along its whole
    length and no shear (common practice); bottom hotter: hogging."""
    L, EI, alpha, grad, h = 6.0, 30000.0, 1.2e-5, 20.0, 0.4
    text = case_text("warm slab edge", {"A": (0.0, 0.0), "B": (L, 0.0)},
                     beams={"AB": {"nodes": ["A", "B"], "EI": ei(EI), "EA": ea(1.0e6)}},
                     supports={"A": "fixed", "B": "fixed"},
                     loads=[{"member": "AB", "temperature": {"gradient": grad}}])
    text += ('\n[materials.steel]\nE = "200 GPa"\nalpha = "1.2e-5 1/K"\n'
             '[sections.s]\ndepth = "400 mm"\n[defaults]\nmaterial = "steel"\nsection = "s"\n')
    _, r = _solve_text(text)
    m = -EI * KN * alpha * grad / h
    for end in r.end_forces["AB"]:
        assert end[2] == pytest.approx(m, rel=1e-12)
        assert abs(end[1]) <= 1e-12 * abs(m)


def test_many_equal_spans_interior_moment_and_size():
    """Continuous beam on many equal spans under uniform load: far from the ends the support
    moment tends to -wL^2/12 (from memory: the interior span of an unending continuous beam
    acts as a fixed-fixed span, AISC Beam Diagrams, beam fixed at both ends, uniform load).
    Built directly from the model with 10^4 free dofs, to check the solver stays sparse."""
    nspan, L, w, EI = 5000, 4.0, 10.0e3, 2.0e7
    nodes = {f"N{i}": Node(f"N{i}", i * L, 0.0) for i in range(nspan + 1)}
    members = {f"M{i}": Member(f"M{i}", "beam", f"N{i}", f"N{i + 1}", EA=2.0e9, EI=EI)
               for i in range(nspan)}
    supports = {"N0": Support("N0", (Restraint("N0", "x", (1.0, 0.0, 0.0)),
                                     Restraint("N0", "y", (0.0, 1.0, 0.0))))}
    for i in range(1, nspan + 1):
        n = f"N{i}"
        supports[n] = Support(n, (Restraint(n, "y", (0.0, 1.0, 0.0)),))
    loads = tuple(DistributedLoad(f"M{i}", wy=(-w, -w)) for i in range(nspan))
    st = Structure("long purlin", nodes, members, supports, loads)
    assert stiffness_dofs(st) == 2 * nspan + 1  # x at every node but N0, rz everywhere
    t0 = time.perf_counter()
    r = solve_stiffness(st, "default")
    elapsed = time.perf_counter() - t0
    mid = f"M{nspan // 2}"
    assert r.end_forces[mid][0][2] == pytest.approx(-w * L**2 / 12, rel=1e-9)
    assert r.reactions[f"N{nspan // 2}"]["y"] == pytest.approx(w * L, rel=1e-9)
    assert elapsed < 30.0, f"{elapsed:.1f} s for {2 * nspan + 1} dofs"


# ---------------------------------------------------------------- features vs force method


def _rigid_portal(**extra) -> str:
    beam = {"EI": ei(30000.0)}
    return case_text(
        "axially rigid hall frame",
        {"A": (0.0, 0.0), "B": (0.0, 4.5), "C": (4.0, 5.5), "D": (8.0, 4.5), "E": (8.0, 0.0)},
        beams={"AB": {"nodes": ["A", "B"], **beam}, "BC": {"nodes": ["B", "C"], **beam},
               "DC": {"nodes": ["D", "C"], **beam, "hinges": extra.get("hinges", [])},
               "ED": {"nodes": ["E", "D"], **beam}},
        supports={"A": "fixed", "E": extra.get("E", "pinned")},
        loads=[{"member": "BC", "wy": -8.0}, {"member": "AB", "wx": 2.5, "to": 3.0},
               {"node": "D", "fx": 6.0}, {"member": "DC", "at": 1.0, "fx": 3.0, "mz": 4.0}]
        + extra.get("loads", []),
        analysis={"displacements": ["B.x", "C.y"]},
    )


@pytest.mark.parametrize("hinges", [[], ["end"]], ids=["rigid-joints", "hinged-apex"])
def test_axially_rigid_members_are_exact_constraints(hinges):
    st = leastwork.loads_case(_rigid_portal(hinges=hinges), source="<test>")
    sol = leastwork.solve(st)
    res = solve_stiffness(st, "default")
    _assert_agree(st, sol, "default", res, rel=1e-10)
    # the columns do not shorten: their tops stay at their bases' level, to round-off
    ub = res.displacements["B"]
    assert abs(ub[1]) <= 1e-13 * abs(ub[0])
    # a rigid member's end displacements have equal components along its axis
    c, s = st.direction("BC")
    uc = res.displacements["C"]
    assert abs((uc[0] - ub[0]) * c + (uc[1] - ub[1]) * s) <= 1e-13 * abs(ub[0])


_STEEL = """
[materials.steel]
E = "200 GPa"
G = "77 GPa"
alpha = "1.2e-5 1/K"

[sections.s]
depth = "400 mm"
shear_area = "3000 mm^2"

[defaults]
material = "steel"
section = "s"
"""

CORNERS = {
    # a beam hinged at both ends carrying span loads, a couple and heat, with shear energy
    "pinned-link-beam": case_text(
        "mezzanine link", {"A": (0, 0), "B": (0, 4), "C": (6, 4), "D": (6, 0)},
        beams={"AB": {"nodes": ["A", "B"], "EI": ei(2e4), "EA": ea(1e6)},
               "BC": {"nodes": ["B", "C"], "EI": ei(3e4), "EA": ea(1e6),
                      "hinges": ["start", "end"]},
               "DC": {"nodes": ["D", "C"], "EI": ei(2e4), "EA": ea(1e6)}},
        supports={"A": "fixed", "D": "fixed"},
        loads=[{"member": "BC", "wy": -10.0}, {"member": "BC", "at": 2.0, "fy": -5.0, "mz": 7.0},
               {"member": "BC", "temperature": {"uniform": 20.0, "gradient": 10.0}},
               {"node": "B", "fx": 4.0}],
        analysis={"shear": True}),
    # a rotational spring where the only beam end is hinged: the spring acts on nothing
    "spring-at-hinged-end": case_text(
        "gantry rail", {"A": (0, 0), "B": (4, 0), "C": (8, 0)},
        beams={"AB": {"nodes": ["A", "B"], "EI": ei(2e4), "EA": ea(1e6), "hinges": ["start"]},
               "BC": {"nodes": ["B", "C"], "EI": ei(2e4), "EA": ea(1e6)}},
        supports={"A": {"restrain": ["x", "y"], "springs": {"rz": "5000 kN*m/rad"}},
                  "C": "fixed"},
        loads=[{"member": "AB", "wy": -8.0}, {"member": "BC", "at": 1.0, "mz": 3.0}]),
    # beams, bars, an axially rigid beam, a misfit and a turning, sliding base
    "braced-frame-mixed": case_text(
        "plant-room bay", {"A": (0, 0), "B": (0, 3), "C": (5, 3), "D": (5, 0)},
        beams={"AB": {"nodes": ["A", "B"], "EI": ei(1e4), "EA": ea(5e5),
                      "hinges": ["start", "end"]},
               "BC": {"nodes": ["B", "C"], "EI": ei(2e4)},
               "DC": {"nodes": ["D", "C"], "EI": ei(1e4), "EA": ea(5e5), "hinges": ["end"]}},
        bars={"AC": {"nodes": ["A", "C"], "EA": ea(1e5)}, "DB": {"nodes": ["D", "B"], "EA": ea(1e5)}},
        supports={"A": "pinned", "D": "fixed"},
        loads=[{"member": "AB", "wx": 3.0},
               {"member": "BC", "wy": [-4.0, -9.0], "from": 1.0, "to": 4.0},
               {"member": "AC", "misfit": -0.002},
               {"settlement": "D", "drz": 0.001, "dx": 0.003}]),
    # a hinged beam end on an inclined roller that settles, a post under a gradient, shear on
    "hinge-on-inclined-roller": case_text(
        "loading ramp", {"A": (0, 0), "B": (5, 0), "C": (5, -3)},
        beams={"AB": {"nodes": ["A", "B"], "EI": ei(1e4), "hinges": ["end"]},
               "CB": {"nodes": ["C", "B"], "EI": ei(1e4), "EA": ea(5e5)}},
        supports={"A": "fixed", "B": {"type": "roller", "surface_angle": "20 deg"},
                  "C": "fixed"},
        loads=[{"member": "AB", "wy": -8.0}, {"settlement": "B", "dn": -0.003},
               {"member": "CB", "temperature": {"gradient": -15.0}}],
        analysis={"shear": True}),
}


@pytest.mark.parametrize("key", CORNERS)
def test_feature_combinations_agree_with_force_method(key):
    st = leastwork.loads_case(CORNERS[key] + _STEEL, source=f"<{key}>")
    sol = leastwork.solve(st)
    assert not sol.warnings
    _assert_agree(st, sol, "default", solve_stiffness(st, "default"), rel=1e-10)


def test_settlement_of_a_spring_base():
    """A settlement given on a spring direction moves the spring's ground end (the force
    method's reading: the spring force is -k (u - settlement)); built from the model, since
    case files refuse it."""
    text = straight_beam({"A": 0.0, "B": 5.0, "C": 9.0},
                         {"A": "pinned", "B": {"springs": {"y": "6000 kN/m"}}, "C": "roller"},
                         [{"member": "AB", "wy": -6.0}], EI=15000.0)
    st = leastwork.loads_case(text, source="<test>")
    st = Structure(st.name, st.nodes, st.members, st.supports,
                   st.loads + (Settlement("B", (("y", -0.004),)),), source=st.source)
    sol = leastwork.solve(st)
    res = solve_stiffness(st, "default")
    _assert_agree(st, sol, "default", res)
    k = 6000.0 * KN
    assert res.reactions["B"]["y"] == pytest.approx(-k * (res.displacements["B"][1] + 0.004),
                                                    rel=1e-12)


def test_rotation_restraint_at_a_pin_joint_is_reported_as_zero():
    """A fixed support where only bars meet cannot take a moment: its rz entry is 0.0, as the
    force method reports it, and the node has no rotation of its own."""
    text = case_text("bracket", {"A": (0.0, 0.0), "B": (3.0, 0.0), "C": (0.0, 2.0)},
                     bars={"AB": {"nodes": ["A", "B"], "EA": ea(2.0e5)},
                           "CB": {"nodes": ["C", "B"], "EA": ea(1.0e5)}},
                     supports={"A": "fixed", "C": "pinned"},
                     loads=[{"node": "B", "fy": -20.0}])
    st = leastwork.loads_case(text, source="<test>")
    res = solve_stiffness(st, "default")
    assert res.reactions["A"]["rz"] == 0.0
    assert res.displacements["B"][2] is None
    _assert_agree(st, leastwork.solve(st), "default", res)


def test_only_the_loads_of_the_case_are_solved():
    text = straight_beam({"A": 0.0, "B": 6.0}, {"A": "fixed", "B": "roller"},
                         [{"member": "AB", "wy": -10.0, "case": "snow"},
                          {"node": "B", "mz": 5.0, "case": "wind"}], EI=20000.0)
    st = leastwork.loads_case(text, source="<test>")
    snow, wind = solve_stiffness(st, "snow"), solve_stiffness(st, "wind")
    # propped cantilever, uniform load: prop reaction 3wL/8 (AISC Manual, beam diagrams)
    assert snow.reactions["B"]["y"] == pytest.approx(3 * 10.0e3 * 6.0 / 8, rel=1e-12)
    # a couple M at the prop of a propped cantilever: prop reaction 3M/(2L) (from memory)
    assert abs(wind.reactions["B"]["y"]) == pytest.approx(3 * 5.0e3 / (2 * 6.0), rel=1e-12)
    empty = solve_stiffness(st, "no such case")
    assert all(v == 0.0 for rs in empty.reactions.values() for v in rs.values())


# ---------------------------------------------------------------- errors


def test_beam_on_two_rollers_is_a_mechanism():
    st = leastwork.loads_case(straight_beam({"A": 0.0, "B": 6.0, "C": 10.0},
                                            {"A": "roller", "C": "roller"},
                                            [{"member": "AB", "wy": -5.0}], EI=1.0e4),
                              source="<test>")
    with pytest.raises(MechanismError) as err:
        solve_stiffness(st, "default")
    assert {"A.x", "B.x", "C.x"} <= set(err.value.motions)


def test_hinge_too_many_is_a_mechanism():
    st = leastwork.loads_case(straight_beam({"A": 0.0, "B": 4.0, "C": 8.0},
                                            {"A": "pinned", "C": "roller"},
                                            [{"member": "AB", "wy": -5.0}], EI=1.0e4,
                                            hinges={"AB": ["end"]}), source="<test>")
    with pytest.raises(MechanismError) as err:
        solve_stiffness(st, "default")
    assert "B.y" in err.value.motions


def test_couple_on_a_pin_joint_is_a_mechanism():
    text = case_text("pin joint", {"A": (0.0, 0.0), "B": (3.0, 0.0), "C": (0.0, 2.0)},
                     bars={"AB": {"nodes": ["A", "B"], "EA": ea(2.0e5)},
                           "CB": {"nodes": ["C", "B"], "EA": ea(1.0e5)}},
                     supports={"A": "pinned", "C": "pinned"},
                     loads=[{"node": "B", "mz": 3.0}])
    st = leastwork.loads_case(text, source="<test>")
    with pytest.raises(MechanismError):
        solve_stiffness(st, "default")


def test_over_constrained_rigid_parts():
    """Two fixed ends on an axially rigid beam: the thrust between them is not determined
    by stiffness and is taken as zero, as the force method takes a redundant without
    flexibility; under transverse loads both methods agree. A misfit there cannot be taken
    up at all."""
    spec = dict(xs={"A": 0.0, "B": 6.0}, supports={"A": "fixed", "B": "fixed"}, EI=1.0e4)
    st = leastwork.loads_case(straight_beam(loads=[{"member": "AB", "wy": -5.0},
                                                   {"member": "AB", "at": 2.0, "fy": -8.0}],
                                            **spec), source="<test>")
    sol = leastwork.solve(st)
    assert sol.warnings  # the force method says the thrust has no flexibility
    res = solve_stiffness(st, "default")
    _assert_agree(st, sol, "default", res)
    assert res.end_forces["AB"][0][0] == 0.0
    st = leastwork.loads_case(straight_beam(loads=[{"member": "AB", "misfit": 0.002}], **spec),
                              source="<test>")
    with pytest.raises(CaseError, match="imposed deformation"):
        solve_stiffness(st, "default")


def test_dof_count():
    """Two spans, pinned-roller-roller: 9 node dofs less the 4 restrained ones."""
    st = leastwork.loads_case(straight_beam({"A": 0.0, "B": 5.0, "C": 9.0},
                                            {"A": "pinned", "B": "roller", "C": "roller"},
                                            [{"member": "AB", "wy": -1.0}], EI=1.0e4,
                                            EA=1.0e6), source="<test>")
    assert stiffness_dofs(st) == 5
    assert math.isclose(sum(solve_stiffness(st, "default").reactions[n]["y"] for n in "ABC"),
                        5.0e3, rel_tol=1e-12)


# ---------------------------------------------------------------- long, slender structures

BAD = Path(__file__).resolve().parent / "bad_cases"

#: Panels of the long girder: the fixed response-to-load ratio (1e9) used before as the
#: second sign of a mechanism refused this girder from about 450 panels.
PANELS = 1000
PANEL, DEPTH = 3.0, 2.5  # m
GRAVITY, SIDE = 12.0, 3.0  # kN on every inner bottom joint; kN along +x at U0


@functools.cache
def _girder_text(panels: int, unbraced: int | None = None) -> str:
    """A crane-runway girder: bottom joints L0..Ln, top joints U0..Un, chords, posts and
    both diagonals in every panel (none in panel ``unbraced``), pinned at L0, roller at Ln.
    Bare numbers in kN and m, so that reading stays cheap."""
    nodes = [f"L{i} = [{PANEL * i:g}, 0]" for i in range(panels + 1)]
    nodes += [f"U{i} = [{PANEL * i:g}, {DEPTH:g}]" for i in range(panels + 1)]
    bars = [f'V{i} = {{ nodes = ["L{i}", "U{i}"], EA = 6e5 }}' for i in range(panels + 1)]
    for i in range(panels):
        bars += [f'B{i} = {{ nodes = ["L{i}", "L{i + 1}"], EA = 1.6e6 }}',
                 f'T{i} = {{ nodes = ["U{i}", "U{i + 1}"], EA = 1.6e6 }}']
        if i != unbraced:
            bars += [f'D{i} = {{ nodes = ["L{i}", "U{i + 1}"], EA = 6e5 }}',
                     f'E{i} = {{ nodes = ["U{i}", "L{i + 1}"], EA = 6e5 }}']
    loads = [f'[[loads]]\nnode = "L{i}"\nfy = {-GRAVITY:g}\n' for i in range(1, panels)]
    loads.append(f'[[loads]]\nnode = "U0"\nfx = {SIDE:g}\n')
    return ('[structure]\nname = "crane-runway girder"\n'
            'units = { force = "kN", length = "m" }\n'
            "[nodes]\n" + "\n".join(nodes) + "\n[bars]\n" + "\n".join(bars)
            + f'\n[supports]\nL0 = "pinned"\nL{panels} = "roller"\n' + "\n".join(loads))


def _girder(panels: int = PANELS, unbraced: int | None = None):
    return leastwork.loads_case(_girder_text(panels, unbraced), source="<girder>")


def _joint_residuals(st, res) -> dict[str, np.ndarray]:
    """Sum of bar end forces, reactions and loads on every joint (N, global x and y)."""
    out = {nid: np.zeros(2) for nid in st.nodes}
    for mid, ((n_start, _, _), (n_end, _, _)) in res.end_forces.items():
        m = st.members[mid]
        c, s = st.direction(mid)
        out[m.start] += n_start * np.array([c, s])  # a bar in tension pulls its start node on
        out[m.end] -= n_end * np.array([c, s])
    for nid, rs in res.reactions.items():
        out[nid] += [rs.get("x", 0.0), rs.get("y", 0.0)]
    for ld in st.loads:
        out[ld.node] += [ld.fx, ld.fy]
    return out


# ---------------------------------------------------------------- a long, slender girder


def test_long_girder_solves_and_is_in_equilibrium():
    st = _girder()
    dofs = stiffness_dofs(st)
    assert dofs == 2 * 2 * (PANELS + 1) - 3  # two coordinates a joint less 3 restraints
    res = solve_stiffness(st, "default")
    assert res.factor_nonzeros >= 2 * dofs  # L and U each hold the diagonal at least
    n, span = PANELS, PANEL * PANELS
    # pin and roller: reactions from the equilibrium of the whole girder (common practice);
    # moments about L0 (counter-clockwise positive): the side load at U0 gives -DEPTH * SIDE
    moment = sum(GRAVITY * PANEL * i for i in range(1, n)) + DEPTH * SIDE
    right = moment / span * KN
    left = GRAVITY * (n - 1) * KN - right
    # the forward error bound is cond * eps, about 3e-5 here (scaled condition number
    # 1.3e11; see verify.stiffness._condition_limit_hit); measured about 7e-6
    assert res.reactions[f"L{n}"]["y"] == pytest.approx(right, rel=1e-4)
    assert res.reactions["L0"]["y"] == pytest.approx(left, rel=1e-4)
    assert abs(res.reactions["L0"]["x"] + SIDE * KN) <= 1e-4 * right
    # every joint in equilibrium to round-off of the largest bar force: the residual of
    # K u = p after the solve does not grow with the condition number (backward stability)
    biggest = max(abs(f[0][0]) for f in res.end_forces.values())
    worst = max(float(np.abs(r).max()) for r in _joint_residuals(st, res).values())
    assert worst <= 1e-9 * biggest
    # the girder sags under gravity: the midspan joint moves down
    assert res.displacements[f"L{n // 2}"][1] < 0.0


def test_condition_sign_alone_finds_mechanisms(monkeypatch):
    """With the pivot sign switched off, the condition estimate still refuses mechanisms,
    and the long stable girder still solves."""
    monkeypatch.setattr(stiffness, "_PIVOT_TOL", -math.inf)
    for panels in (4, PANELS):
        st = _girder(panels, unbraced=panels // 2)  # a panel without diagonals can shear
        with pytest.raises(MechanismError, match="condition number") as err:
            solve_stiffness(st, "default")
        assert f"U{panels // 2 + 1}.x" in err.value.motions
    st = leastwork.loads_case(case_text(
        "gate on two rollers", {"A": (0.0, 0.0), "B": (4.0, 0.0), "C": (2.0, 1.5)},
        bars={"AB": {"nodes": ["A", "B"], "EA": ea(2.0e5)},
              "AC": {"nodes": ["A", "C"], "EA": ea(1.0e5)},
              "CB": {"nodes": ["C", "B"], "EA": ea(1.0e5)}},
        supports={"A": "roller", "B": "roller"}, loads=[{"node": "C", "fy": -6.0}]),
        source="<test>")
    with pytest.raises(MechanismError):
        solve_stiffness(st, "default")
    # a short stable girder still solves: vertical reactions carry the gravity loads
    res = solve_stiffness(_girder(4), "default")
    total = sum(res.reactions[n]["y"] for n in ("L0", "L4"))
    assert total == pytest.approx(3 * GRAVITY * KN, rel=1e-12)


MECHANISMS = sorted(BAD.glob("mech-*.toml"))


@pytest.mark.parametrize("path", MECHANISMS, ids=[p.stem for p in MECHANISMS])
def test_bad_input_mechanisms_are_mechanisms(path):
    """Each case's header states why it moves (facts of the trade, see the files)."""
    st = leastwork.load_case(path)
    for case in st.case_names:
        with pytest.raises(MechanismError):
            solve_stiffness(st, case)


# ---------------------------------------------------------------- the message


def test_mechanism_message_names_at_most_sixteen():
    st = _girder(300, unbraced=150)
    with pytest.raises(MechanismError) as err:
        solve_stiffness(st, "default")
    motions = err.value.motions
    assert len(motions) > 100 and len(set(motions)) == len(motions)
    text = str(err.value)
    named = text.split("Free motion: ")[1].split(" \u2026")[0].split(", ")
    assert named == motions[:16]
    assert text.endswith(f" \u2026 and {len(motions) - 16} more.")
    assert text.startswith(err.value.message)


@pytest.mark.parametrize("count", [0, 1, 16, 17])
def test_mechanism_message_around_the_limit(count):
    motions = [f"N{i}.y" for i in range(count)]
    text = str(MechanismError("It moves.", motions))
    if count == 0:
        assert text == "It moves."
    elif count <= 16:
        assert text == f"It moves. Free motion: {', '.join(motions)}."
    else:
        assert text == f"It moves. Free motion: {', '.join(motions[:16])} \u2026 and 1 more."


# ---------------------------------------------------------------- factor size


@pytest.mark.parametrize("bars", [1, 2, 5, 10])
def test_factor_nonzeros_of_a_tridiagonal_system(bars):
    """Bars in one line on a pin and rollers: only the x of each free joint is free and the
    stiffness is tridiagonal. Eliminating a path graph in minimum-degree order makes no
    fill (common practice), so L and U each hold n diagonal and n - 1 off-diagonal
    entries: 4n - 2."""
    nodes = {f"N{i}": (2.0 * i, 0.0) for i in range(bars + 1)}
    members = {f"B{i}": {"nodes": [f"N{i}", f"N{i + 1}"], "EA": ea(1.0e5)} for i in range(bars)}
    supports = {"N0": "pinned", **{f"N{i}": "roller" for i in range(1, bars + 1)}}
    st = leastwork.loads_case(case_text("conveyor tie", nodes, bars=members, supports=supports,
                                        loads=[{"node": f"N{bars}", "fx": 4.0}]),
                              source="<test>")
    res = solve_stiffness(st, "default")
    assert stiffness_dofs(st) == bars
    assert res.factor_nonzeros == 4 * bars - 2
    # a bar in tension carries the end load to the pin (statics)
    assert res.reactions["N0"]["x"] == pytest.approx(-4.0 * KN, rel=1e-12)


def test_factor_nonzeros_is_zero_without_free_dofs():
    st = leastwork.loads_case(case_text(
        "stay", {"A": (0.0, 0.0), "B": (3.0, 4.0)},
        bars={"AB": {"nodes": ["A", "B"], "EA": ea(1.0e5)}},
        supports={"A": "pinned", "B": "pinned"}, loads=[{"node": "B", "fy": -2.0}]),
        source="<test>")
    res = solve_stiffness(st, "default")
    assert stiffness_dofs(st) == 0 and res.factor_nonzeros == 0
    assert res.reactions["B"]["y"] == pytest.approx(2.0 * KN, rel=1e-12)
