"""Curved members (circular and parabolic arcs) against closed forms and invariants."""

from __future__ import annotations

import math
import subprocess
import sys

import numpy as np
import pytest

from leastwork import loads_case, solve
from leastwork.elements.arc import Arc, arc_of
from leastwork.errors import CaseError
from leastwork.model import Curve

P, R, EI = 10.0, 1.0, 1000.0  # kN, m, kN*m^2 (case units)


def _ring(extra: str = "", redundants: str = "") -> str:
    """A thin ring of radius R in four quarter arcs, node order counter-clockwise (the
    arcs bulge to their local -y side: negative rise), pinched by P at top and bottom."""
    f = R * (1 - 1 / math.sqrt(2))
    arcs = "\n".join(
        f'{a}{b} = {{ nodes = ["{a}", "{b}"], EI = "{EI} kN*m^2", '
        f'curve = {{ shape = "circle", rise = "{-f!r} m" }} }}'
        for a, b in (("A", "D"), ("D", "B"), ("B", "C"), ("C", "A")))
    return f"""
[structure]
name = "ring"
units = {{ force = "kN", length = "m" }}
[nodes]
A = [0, 0]
D = [{R}, {R}]
B = [0, {2 * R}]
C = [{-R}, {R}]
[beams]
{arcs}
[supports]
A = "pinned"
B = {{ restrain = ["x"] }}
[[loads]]
node = "B"
fy = "-{P} kN"
[analysis]
displacements = ["A-B", "C-D"]
{redundants}
{extra}
"""


def test_ring_pinched_by_two_diametral_loads():
    # Roark, Formulas for Stress and Strain, Table 9.2 (thin rings, two equal opposite
    # diametral loads), re-derived by least work: M at the loads PR/pi, at 90 degrees
    # -PR(1/2 - 1/pi); the loaded diameter shortens (pi/4 - 2/pi) PR^3/EI = 0.14878,
    # the other lengthens (2/pi - 1/2) PR^3/EI = 0.13662 (times PR^3/EI).
    sol = solve(loads_case(_ring()))
    res = sol.to_dict()["cases"]["default"]
    ms = res["members"]
    # counter-clockwise node order: local +y points inwards, so m > 0 puts the outer face
    # in tension; at the loads the inner face is in tension (m = -PR/pi), at 90 degrees
    # the outer face
    assert ms["DB"]["end"]["m"] == pytest.approx(-P * R / math.pi, rel=1e-9)
    assert ms["AD"]["start"]["m"] == pytest.approx(-P * R / math.pi, rel=1e-9)
    assert ms["AD"]["end"]["m"] == pytest.approx(P * R * (0.5 - 1 / math.pi), rel=1e-9)
    k = P * R ** 3 / EI
    assert res["displacements"]["A-B"] == pytest.approx(-(math.pi / 4 - 2 / math.pi) * k,
                                                        rel=1e-9)
    assert res["displacements"]["C-D"] == pytest.approx((2 / math.pi - 0.5) * k, rel=1e-9)
    assert res["checks"]["equilibrium_ok"] and res["checks"]["stiffness_ok"]
    # the closed loop: internal degree 3
    assert sol.to_dict()["indeterminacy"]["internal"] == 3


def test_ring_independent_of_the_redundants_chosen():
    # invariant: the answer does not depend on the redundants chosen
    a = solve(loads_case(_ring())).to_dict()["cases"]["default"]["members"]
    b = solve(loads_case(_ring(redundants='redundants = ["AD.n", "DB.end.m", "CA.start.m"]'))
              ).to_dict()["cases"]["default"]["members"]
    for mid in a:
        for end in ("start", "end"):
            for q in "nvm":
                assert a[mid][end][q] == pytest.approx(b[mid][end][q], abs=1e-9)


_NODE_LOAD = f'[[loads]]\nnode = "B"\nfy = "-{P} kN"'


def _arch(shape: str, rise: float, load: str, extra: str = "", tie: str = "",
          right: str = '"pinned"') -> str:
    return f"""
[structure]
name = "arch"
units = {{ force = "kN", length = "m" }}
[parameters]
S = "{rise}"
[nodes]
A = [0, 0]
B = [20, 0]
[beams]
ARCH = {{ nodes = ["A", "B"], EI = "80000 kN*m^2", {extra}curve = {{ shape = "{shape}", rise = "{rise} m" }} }}
{tie}
[supports]
A = "pinned"
B = {right}
{load}
"""


def test_two_hinged_semicircle_crown_load():
    # Timoshenko, Strength of Materials (two-hinged semicircular arch, crown load,
    # rib shortening neglected): H = P/pi; crown moment PR/2 - HR.
    text = _arch("circle", 10, '[[loads]]\nmember = "ARCH"\nat = "5*pi m"\nfy = "-100 kN"')
    res = solve(loads_case(text)).to_dict()["cases"]["default"]
    assert res["reactions"]["A"]["x"] == pytest.approx(100 / math.pi, rel=1e-10)
    top = res["members"]["ARCH"]["m_max"]
    assert top["at"] == pytest.approx(5 * math.pi, rel=1e-9)
    assert top["value"] == pytest.approx(100 * 10 / 2 - 100 / math.pi * 10, rel=1e-9)
    assert res["checks"]["stiffness_ok"]


def test_parabolic_arch_uniform_load_per_horizontal_length():
    # any arch text: a two-hinged parabolic arch under a load uniform per horizontal
    # length has H = wL^2/(8f) and no bending (rib shortening neglected)
    w, L, f = 12.0, 20.0, 5.0
    text = _arch("parabola", f, '[[loads]]\nmember = "ARCH"\nwy = "-12 kN/m"\n'
                 'per = "projection"')
    res = solve(loads_case(text)).to_dict()["cases"]["default"]
    assert res["reactions"]["A"]["x"] == pytest.approx(w * L ** 2 / (8 * f), rel=1e-10)
    assert res["reactions"]["A"]["y"] == pytest.approx(w * L / 2, rel=1e-12)
    arch = res["members"]["ARCH"]
    assert max(abs(arch["m_max"]["value"]), abs(arch["m_min"]["value"])) < 1e-8 * w * L ** 2
    assert res["checks"]["equilibrium_ok"] and res["checks"]["stiffness_ok"]


def test_tied_semicircular_arch_thrust_reduced_by_the_tie():
    # derived by least work: crown load P on a semicircular arch (axially rigid) on a pin
    # and a roller, tied by a bar of EA_t across its springings:
    # H = (P R^3 / 2EI) / (pi R^3 / 2EI + 2R / EA_t) = P / (pi + 4 EI / (EA_t R^2))
    EA_t, Rr, EIa = 2.0e5, 10.0, 8.0e4
    text = _arch("circle", 10, '[[loads]]\nmember = "ARCH"\nat = "5*pi m"\nfy = "-100 kN"',
                 tie='[bars]\nTIE = { nodes = ["A", "B"], EA = "200000 kN" }',
                 right='{ restrain = ["y"] }')
    res = solve(loads_case(text)).to_dict()["cases"]["default"]
    H = 100 / (math.pi + 4 * EIa / (EA_t * Rr ** 2))
    assert res["members"]["TIE"]["start"]["n"] == pytest.approx(H, rel=1e-10)
    assert res["checks"]["stiffness_ok"]


@pytest.mark.parametrize("shape", ["circle", "parabola"])
def test_straight_limit_tends_to_the_beam(shape):
    # invariant: as the rise tends to zero a curved member tends to the straight beam
    # (fixed-fixed, central load: end moments PL/8, Hicks ch. 2)
    load = '[[loads]]\nmember = "ARCH"\nat = "10 m"\nfy = "-100 kN"'
    extra = 'EA = "4e6 kN", '
    curved = _arch(shape, 1e-4, load, extra, right='"fixed"').replace(
        'A = "pinned"', 'A = "fixed"')
    res = solve(loads_case(curved)).to_dict()["cases"]["default"]["members"]["ARCH"]
    assert res["start"]["m"] == pytest.approx(-100 * 20 / 8, rel=1e-3)
    assert res["end"]["m"] == pytest.approx(-100 * 20 / 8, rel=1e-3)


def test_arc_geometry():
    # common practice: arc length of a circular segment 2 R alpha; of a parabola
    # (c/2) sqrt(1 + k^2) + asinh(k)/(2k) c/... checked by summing short chords
    for shape, f in (("circle", 3.0), ("circle", -7.0), ("parabola", 4.0), ("parabola", -2.0)):
        arc = arc_of(Curve(shape, f, 12.0))
        s = np.linspace(0.0, arc.length, 20001)
        u, w, cp, sp = arc.frame(s)
        assert float(np.sum(np.hypot(np.diff(u), np.diff(w)))) == pytest.approx(arc.length,
                                                                                rel=1e-8)
        assert u[0] == pytest.approx(0.0, abs=1e-12) and u[-1] == pytest.approx(12.0)
        assert float(np.max(np.abs(w))) == pytest.approx(abs(f), rel=1e-6)
        assert np.sign(w[len(w) // 2]) == np.sign(f)
        # tangent is the derivative of the position
        du, dw = np.gradient(u, s), np.gradient(w, s)
        assert np.allclose(du[1:-1], cp[1:-1], atol=1e-6)
        assert np.allclose(dw[1:-1], sp[1:-1], atol=1e-6)
    assert isinstance(arc, Arc)


def test_flexibility_symmetric_positive_definite():
    # invariant: the flexibility matrix is symmetric positive definite
    sol = solve(loads_case(_ring()))
    F = np.array(sol.to_dict()["cases"]["default"]["flexibility"])
    assert np.allclose(F, F.T, rtol=1e-12)
    assert np.all(np.linalg.eigvalsh(0.5 * (F + F.T)) > 0)


@pytest.mark.parametrize("curve, expected", [
    ('{ shape = "ellipse", rise = "1 m" }', 'curve.shape'),
    ('{ shape = "circle" }', 'curve.rise'),
    ('{ shape = "circle", rise = 0 }', 'curve.rise'),
    ('"circle"', 'curve'),
    ('{ shape = "circle", rise = "1 m", bulge = 2 }', 'bulge'),
])
def test_bad_curve_is_a_located_error(curve, expected):
    text = _arch("circle", 10, "").replace('curve = { shape = "circle", rise = "10 m" }',
                                           f"curve = {curve}")
    with pytest.raises(CaseError) as exc:
        loads_case(text)
    assert expected in str(exc.value) and "ARCH" in str(exc.value)


def test_bad_curve_from_the_command_line(tmp_path):
    path = tmp_path / "bad.toml"
    path.write_text(_arch("oval", 3, ""))
    out = subprocess.run([sys.executable, "-m", "leastwork", "solve", str(path)],
                         capture_output=True, text=True)
    assert out.returncode == 2
    assert "Traceback" not in out.stderr and "curve.shape" in out.stderr


_SPACE = """
[nodes]
A = [0, 0, 0]
B = [4, 0, 0]
C = [4, 3, 0]
[beams]
AB = { nodes = ["A", "B"], EIy = "5000 kN*m^2", EIz = "5000 kN*m^2", GJ = "3000 kN*m^2", curve = { shape = "circle", rise = "1 m" } }
BC = { nodes = ["B", "C"], EIy = "5000 kN*m^2", EIz = "5000 kN*m^2", GJ = "3000 kN*m^2" }
[supports]
A = "fixed"
[[loads]]
node = "C"
fz = "-10 kN"
"""


def test_curved_member_in_a_space_case_is_one_located_line(tmp_path):
    # contract: curved members are plane only; a space case naming one is refused in one
    # line naming the file, table and key, exit 2
    path = tmp_path / "space.toml"
    path.write_text(_SPACE)
    out = subprocess.run([sys.executable, "-m", "leastwork", "solve", str(path)],
                         capture_output=True, text=True)
    assert out.returncode == 2, out.stderr
    assert "Traceback" not in out.stderr and len(out.stderr.strip().splitlines()) == 1
    assert "[beams] AB.curve" in out.stderr and "plane structures only" in out.stderr


def test_ring_under_uniform_external_pressure_is_in_pure_compression():
    # common practice (thin ring, uniform external pressure p): hoop force n = -pR, no
    # bending. Counter-clockwise arcs: local +y points inwards, so the pressure is wn = +p.
    p = 3.0
    loads = "\n".join(f'[[loads]]\nmember = "{m}"\nwn = "{p} kN/m"'
                      for m in ("AD", "DB", "BC", "CA"))
    text = _ring(loads).replace(_NODE_LOAD, "")
    res = solve(loads_case(text)).to_dict()["cases"]["default"]
    for mr in res["members"].values():
        for end in ("start", "end"):
            assert mr[end]["n"] == pytest.approx(-p * R, rel=1e-9)
            assert abs(mr[end]["m"]) < 1e-9 * p * R * R
        assert abs(mr["m_max"]["value"]) < 1e-9 * p * R * R
    assert res["checks"]["equilibrium_ok"] and res["checks"]["stiffness_ok"]


def test_free_ring_warmed_uniformly_grows_without_forces():
    # common practice: a statically indeterminate ring free to expand takes no force
    # from a uniform temperature change; its diameter grows by alpha dT 2R
    alpha, dT = 1.2e-5, 40.0
    arcs = ""
    for m in ("AD", "DB", "BC", "CA"):
        arcs += f'[[loads]]\nmember = "{m}"\ntemperature = {{ uniform = "{dT} K" }}\n'
    text = _ring(arcs).replace(_NODE_LOAD, "").replace(
        f'EI = "{EI} kN*m^2"', f'EI = "{EI} kN*m^2", EA = "2e5 kN", material = "s"')
    text = text.replace("[nodes]", f'[materials.s]\nE = "200 GPa"\nalpha = "{alpha} 1/K"\n'
                        "[nodes]")
    res = solve(loads_case(text)).to_dict()["cases"]["default"]
    assert res["displacements"]["A-B"] == pytest.approx(alpha * dT * 2 * R, rel=1e-9)
    assert res["displacements"]["C-D"] == pytest.approx(alpha * dT * 2 * R, rel=1e-9)
    for mr in res["members"].values():
        assert abs(mr["start"]["n"]) < 1e-9 and abs(mr["start"]["m"]) < 1e-9


def test_tied_arch_with_its_tie_cut_short():
    # derived by least work: a tie cut short by e and pulled into place across the
    # springings of a semicircular arch (axially rigid) takes T = e / (pi R^3/2EI + 2R/EA_t)
    e, EA_t, Rr, EIa = 0.004, 2.0e5, 10.0, 8.0e4
    text = _arch("circle", 10, '[[loads]]\nmember = "TIE"\nmisfit = "-4 mm"',
                 tie='[bars]\nTIE = { nodes = ["A", "B"], EA = "200000 kN" }',
                 right='{ restrain = ["y"] }')
    res = solve(loads_case(text)).to_dict()["cases"]["default"]
    T = e / (math.pi * Rr ** 3 / (2 * EIa) + 2 * Rr / EA_t)
    assert res["members"]["TIE"]["start"]["n"] == pytest.approx(T, rel=1e-10)
    # the arch's chord force is -T: m = -T w, largest at the crown (rise R)
    assert res["members"]["ARCH"]["m_min"]["value"] == pytest.approx(-T * Rr, rel=1e-9)


def test_displacement_along_the_arc_agrees_with_the_deflected_shape():
    # invariant: the unit-load displacement of a point on the arc equals the strains
    # integrated along the arc (the deflected shape), two independent routes
    from leastwork.displacements import member_shape

    text = _arch("parabola", 5, '[[loads]]\nmember = "ARCH"\nat = "7 m"\nfy = "-60 kN"',
                 extra='EA = "3e6 kN", ') + '[analysis]\ndisplacements = ["ARCH@9.ARCH.y", "ARCH@9.x"]\n'
    text = text.replace('"ARCH@9.ARCH.y", ', "").replace('"ARCH@9.x"', '"ARCH@9.x", "ARCH@9.y"')
    sol = solve(loads_case(text))
    d = sol.to_dict()["cases"]["default"]["displacements"]
    st = sol.structure
    res = sol.cases["default"]
    xs, ux, uy, _ = member_shape(st, sol.topology, res, "ARCH", samples=4001)
    size = math.hypot(d["ARCH@9.x"], d["ARCH@9.y"])
    assert float(np.interp(9.0, xs, ux)) == pytest.approx(d["ARCH@9.x"], abs=1e-5 * size)
    assert float(np.interp(9.0, xs, uy)) == pytest.approx(d["ARCH@9.y"], abs=1e-5 * size)


def test_chain_model_converges_as_the_segments_shorten():
    # the cross-check's independent model: the difference of successive chains falls
    # about four-fold per halving (error proportional to the segment length squared)
    from leastwork.verify import solve_stiffness
    from leastwork.verify.chain import chain_structure

    st = loads_case(_arch("circle", 10, '[[loads]]\nmember = "ARCH"\nat = "5*pi m"\n'
                          'fy = "-100 kN"'))
    h = [solve_stiffness(chain_structure(st, level), "default").reactions["A"]["x"]
         for level in (1, 2, 4)]  # 48, 96, 192 segments on the semicircle
    ratio = (h[1] - h[0]) / (h[2] - h[1])
    assert 3.5 < ratio < 4.5
    exact = 100e3 / math.pi  # N (Timoshenko, from memory: H = P/pi)
    richardson = h[2] + (h[2] - h[1]) / 3
    assert abs(richardson - exact) < 0.05 * abs(h[2] - exact)


def test_far_from_the_origin_no_false_alarm():
    # invariant: moving the whole structure 1e12 m away changes nothing (no false
    # mechanism, no failed check); H = P/pi as at the origin (Timoshenko, from memory)
    text = _arch("circle", 10, '[[loads]]\nmember = "ARCH"\nat = "5*pi m"\nfy = "-100 kN"')
    text = text.replace("A = [0, 0]", 'A = ["1e12", "1e12"]').replace(
        "B = [20, 0]", 'B = ["1e12 + 20", "1e12"]')
    sol = solve(loads_case(text))
    res = sol.to_dict()["cases"]["default"]
    assert res["reactions"]["A"]["x"] == pytest.approx(100 / math.pi, rel=1e-9)
    assert res["checks"]["equilibrium_ok"] and res["checks"]["stiffness_ok"]
    assert not sol.warnings


def test_symbolic_mode_refuses_curved_members_with_the_reason():
    # the integrals along an arc are numerical: --symbolic says so, exit 2 (contract)
    from leastwork.symbolic import solve_symbolic

    with pytest.raises(CaseError, match="curved members .* integrated numerically"):
        solve_symbolic("ring.toml", text=_ring())
