"""Semi-rigid joints: a rotational spring between a beam end and its node (energy
M^2/(2k), the flexibility of that end moment plus 1/k).

Sources beside each check: closed forms derived by least work (the end-moment redundants
with the joint's 1/k added to their flexibility), handbook limits (from memory), and the
independent direct-stiffness model, which ties the member-end rotation to the node's by a
spring element and condenses it (an implementation of its own).
"""

from __future__ import annotations

import subprocess
import sys

import pytest
from _cases import check

import leastwork

EI, L, W = 20000.0, 6.0, 10.0


def _beam(supports: str, springs: str, extra: str = "") -> str:
    return f"""
[structure]
name = "semi-rigid beam"
units = {{ force = "kN", length = "m" }}
[nodes]
A = [0, 0]
B = [{L}, 0]
[beams]
AB = {{ nodes = ["A", "B"], EI = "{EI} kN*m^2"{springs} }}
[supports]
{supports}
[[loads]]
member = "AB"
wy = "-{W} kN/m"
{extra}
"""


@pytest.mark.parametrize("k", [800.0, 8000.0, 8e4, 8e6])
def test_fixed_ended_beam_with_semi_rigid_joints(k):
    # both ends on springs k, uniform load: by least work (symmetry, X = end moment)
    # (L/3EI + L/6EI + 1/k) X = wL^3/(24EI)  ->  M = (wL^2/12) / (1 + 2EI/(kL)); mid-span
    # deflection 5wL^4/(384EI) - M L^2/(8EI) (derived by least work); k -> infinity gives
    # the handbook fixed-ended beam
    springs = f', end_springs = {{ start = "{k} kN*m/rad", end = "{k} kN*m/rad" }}'
    text = _beam('A = "fixed"\nB = "fixed"', springs,
                 '[analysis]\ndisplacements = ["AB@3.y"]')
    res = leastwork.solve(leastwork.loads_case(text, source="<test>")).to_dict()
    c = res["cases"]["default"]
    M = W * L**2 / 12 / (1 + 2 * EI / (k * L))
    check(c["members"]["AB"]["start"]["m"], -M, W * L**2, "start moment")
    check(c["members"]["AB"]["end"]["m"], -M, W * L**2, "end moment")
    w_mid = 5 * W * L**4 / (384 * EI) - M * L**2 / (8 * EI)
    check(c["displacements"]["AB@3.y"], -w_mid, W * L**4 / EI, "mid-span deflection")
    assert c["checks"]["stiffness_ok"] and c["checks"]["equilibrium_ok"]
    if k == 8e6:  # nearly rigid: the handbook wL^2/12 (from memory)
        assert abs(M - W * L**2 / 12) < 1e-3 * W * L**2 / 12


def test_propped_cantilever_with_a_semi_rigid_root():
    # fixed end on a spring k, prop at the other end: (L/3EI + 1/k) M = wL^3/(24EI), so
    # M = (wL^2/8) / (1 + 3EI/(kL)) (derived by least work; k -> infinity: handbook wL^2/8)
    k = 5000.0
    text = _beam('A = "fixed"\nB = "roller"', f', end_springs = {{ start = "{k} kN*m/rad" }}')
    c = leastwork.solve(leastwork.loads_case(text, source="<test>")).to_dict()["cases"][
        "default"]
    M = W * L**2 / 8 / (1 + 3 * EI / (k * L))
    check(c["members"]["AB"]["start"]["m"], -M, W * L**2, "root moment")
    check(c["reactions"]["A"]["rz"], M, W * L**2, "wall moment")
    assert c["checks"]["stiffness_ok"]


def test_the_joint_rotates_against_its_node():
    # the rotation of the member end less that of the node is M/k: the node is fixed
    # (rotation 0), so the joint's flexibility shows in the energy term of the audit trail
    k = 8000.0
    text = _beam('A = "fixed"\nB = "fixed"', f', end_springs = {{ start = "{k} kN*m/rad" }}')
    sol = leastwork.solve(leastwork.loads_case(text, source="<test>"))
    terms = [t for t in sol.flexibility_terms if t.term == "joint spring"]
    assert len(terms) == 1 and terms[0].block[0, 0] == pytest.approx(1 / (k * 1e3), rel=1e-15)


@pytest.mark.parametrize(("springs", "words"), [
    (', hinges = ["start"], end_springs = { start = "5000 kN*m/rad" }', "cannot also"),
    (', end_springs = { middle = "5000 kN*m/rad" }', "middle"),
    (', end_springs = { start = "-5 kN*m/rad" }', "positive"),
    (", end_springs = 5000", "expected {"),
])
def test_bad_joint_springs_are_refused(tmp_path, springs, words):
    path = tmp_path / "bad.toml"
    path.write_text(_beam('A = "fixed"\nB = "fixed"', springs))
    out = subprocess.run([sys.executable, "-m", "leastwork", "solve", str(path)],
                         capture_output=True, text=True)
    assert out.returncode == 2 and words in out.stderr, out.stderr
    assert len(out.stderr.strip().splitlines()) == 1


def test_symbolic_mode_refuses_joint_springs():
    from leastwork.symbolic import solve_symbolic

    text = _beam('A = "fixed"\nB = "fixed"', ', end_springs = { start = "5000 kN*m/rad" }')
    with pytest.raises(leastwork.CaseError, match="semi-rigid joints"):
        solve_symbolic("<test>", text=text)
