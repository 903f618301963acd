"""Tapered beams (section = [start, end], taper = "linear" | "depth"): against independent
numerical integrations of the least-work integrals (scipy.integrate.quad), the prismatic
limit, the cross-check with the stiffness method, convergence of a chain of short prismatic
beams, invariants of the flexibility matrix, and the command line."""

from __future__ import annotations

import json
from pathlib import Path

import numpy as np
import pytest
from scipy.integrate import quad
from scipy.optimize import minimize_scalar

import leastwork as lw
from leastwork.cli import main
from leastwork.displacements import deflection_extreme
from leastwork.elements import integrate

ROOT = Path(__file__).resolve().parents[1]
E, L, Q = 200e9, 6.0, 10e3
D0, D1 = 0.6, 0.3
I0 = 0.2 * D0**3 / 12  # a 200 mm wide solid rectangle
A0 = 0.2 * D0


def _propped(section_pair: str, taper: str, loads: str = 'wy = "-10 kN/m"',
             end_I: float | None = None, extra: str = "") -> str:
    """A propped cantilever, fixed at A, roller at B (6 m), the beam AB from 600 to 300 mm
    deep (a 200 mm wide rectangle unless ``end_I`` is given)."""
    I1 = end_I if end_I is not None else 0.2 * D1**3 / 12
    return f"""
[structure]
name = "propped"
units = {{ force = "kN", length = "m" }}
[nodes]
A = [0, 0]
B = [{L}, 0]
[materials.steel]
E = "200 GPa"
alpha = "1.2e-5 1/K"
[sections.deep]
A = "{A0} m^2"
I = "{I0} m^4"
depth = "{D0} m"
[sections.shallow]
A = "{0.2 * D1} m^2"
I = "{I1} m^4"
depth = "{D1} m"
[beams]
AB = {{ nodes = ["A", "B"], material = "steel", section = {section_pair}{taper} }}
[supports]
A = "fixed"
B = "roller"
[[loads]]
member = "AB"
{loads}
{extra}
"""


def _depth_I(x: float) -> float:
    return I0 * ((D0 + (D1 - D0) * x / L) / D0) ** 3


def _prop_force(EI, w: float = Q) -> float:
    """Least work on the prop force R of a propped cantilever under a uniform load w:
    m(x) = R (L - x) - w (L - x)^2 / 2 (sagging), dU/dR = 0 gives
    R = int w (L - x)^3 / 2 / EI dx / int (L - x)^2 / EI dx (derived by least work),
    each integral by scipy.integrate.quad."""
    top = quad(lambda x: w * (L - x) ** 3 / 2 / EI(x), 0, L, epsabs=0, epsrel=1e-13)[0]
    bottom = quad(lambda x: (L - x) ** 2 / EI(x), 0, L, epsabs=0, epsrel=1e-13)[0]
    return top / bottom


def test_depth_taper_propped_cantilever_matches_an_independent_integration():
    st = lw.loads_case(_propped('["deep", "shallow"]', ', taper = "depth"'))
    sol = lw.solve(st)
    R = sol.cases["default"].reactions["B"]["y"]
    expected = _prop_force(lambda x: E * _depth_I(x))
    assert R == pytest.approx(expected, rel=1e-11)
    assert R == pytest.approx(20055.9, rel=1e-5)  # against 22.5 kN (3wL/8) prismatic
    assert sol.cases["default"].stiffness.difference < 1e-9


def test_linear_taper_propped_cantilever_matches_an_independent_integration():
    I1 = 0.2 * D1**3 / 12
    st = lw.loads_case(_propped('["deep", "shallow"]', ', taper = "linear"'))
    R = lw.solve(st).cases["default"].reactions["B"]["y"]
    expected = _prop_force(lambda x: E * (I0 + (I1 - I0) * x / L))
    assert R == pytest.approx(expected, rel=1e-11)


def test_prismatic_limit_equals_the_prismatic_beam_exactly():
    """Equal end sections: the tapered beam is the prismatic beam, to the last bit."""
    for law in ("linear", "depth"):
        tap = lw.solve(lw.loads_case(_propped('["deep", "deep"]', f', taper = "{law}"',
                                              extra="[analysis]\ndisplacements = "
                                              '["AB@2.y"]')))
        pri = lw.solve(lw.loads_case(_propped('"deep"', "", extra="[analysis]\n"
                                              'displacements = ["AB@2.y"]')))
        a, b = tap.cases["default"], pri.cases["default"]
        assert a.reactions == b.reactions
        assert np.array_equal(a.s, b.s)
        assert a.displacements == b.displacements
        assert R_3wl8(b) == pytest.approx(3 * Q * L / 8, rel=1e-12)  # from memory


def R_3wl8(res) -> float:
    return res.reactions["B"]["y"]


def test_deflection_along_a_tapered_beam():
    """w(x) = int_0^x (x - t) m(t) / EI(t) dt from the fixed end (w(0) = w'(0) = 0), with
    the prop force above; by scipy.integrate.quad."""
    st = lw.loads_case(_propped('["deep", "shallow"]', ', taper = "depth"',
                                extra='[analysis]\ndisplacements = ["AB@2.5.y"]'))
    sol = lw.solve(st)
    res = sol.cases["default"]
    R = _prop_force(lambda x: E * _depth_I(x))

    def w(x):
        return quad(lambda t: (x - t) * (R * (L - t) - Q * (L - t) ** 2 / 2)
                    / (E * _depth_I(t)), 0, x, epsabs=0, epsrel=1e-12)[0]

    assert res.displacements["AB@2.5.y"] == pytest.approx(w(2.5), rel=1e-9)
    best = minimize_scalar(w, bounds=(0.5, 5.5), method="bounded",
                           options={"xatol": 1e-9})
    value, at = deflection_extreme(st, sol.topology, res, "AB")
    assert value == pytest.approx(best.fun, rel=1e-7)
    assert at == pytest.approx(best.x, abs=1e-3)


def test_temperature_gradient_on_a_depth_taper():
    """Free curvature alpha dT / d(x) varies with the depth; least work on the prop force:
    R = -int (L - x) kappa(x) dx / int (L - x)^2 / EI dx (derived by least work)."""
    st = lw.loads_case(_propped('["deep", "shallow"]', ', taper = "depth"',
                                loads="temperature = { gradient = \"20 K\" }"))
    sol = lw.solve(st)
    res = sol.cases["default"]
    alpha, grad = 1.2e-5, 20.0
    top = quad(lambda x: (L - x) * alpha * grad / (D0 + (D1 - D0) * x / L), 0, L,
               epsabs=0, epsrel=1e-13)[0]
    bottom = quad(lambda x: (L - x) ** 2 / (E * _depth_I(x)), 0, L,
                  epsabs=0, epsrel=1e-13)[0]
    assert abs(res.reactions["B"]["y"]) == pytest.approx(top / bottom, rel=1e-10)
    assert res.stiffness.difference < 1e-9


def test_point_load_misfit_and_uniform_temperature_agree_with_the_stiffness_method():
    text = _propped('["deep", "shallow"]', ', taper = "linear"',
                    loads='at = "2 m"\nfy = "-30 kN"\nfx = "12 kN"\nmz = "5 kN*m"',
                    extra='[[loads]]\nmember = "AB"\n'
                          'temperature = { uniform = "25 K", gradient = "-15 K" }\n'
                          '[[loads]]\nmember = "AB"\n'
                          'wy = ["-4 kN/m", "-9 kN/m"]\nfrom = "1 m"\nto = "5 m"\n')
    text = text.replace('B = "roller"', 'B = "pinned"')
    sol = lw.solve(lw.loads_case(text))
    assert sol.cases["default"].stiffness.difference < 1e-9
    assert sol.equilibrium_ok


def _chain(n: int) -> float:
    """The depth-tapered propped cantilever as n prismatic beams, each with the section
    at its mid-length: prop force (N)."""
    nodes = "\n".join(f"N{k} = [{k * L / n!r}, 0]" for k in range(n + 1))
    beams = "\n".join(
        f'S{k} = {{ nodes = ["N{k}", "N{k + 1}"], EI = "{E * _depth_I((k + 0.5) * L / n)!r} '
        f'N*m^2" }}' for k in range(n))
    loads = "\n".join(f'[[loads]]\nmember = "S{k}"\nwy = "-10000 N/m"' for k in range(n))
    text = f"""
[structure]
name = "chain"
units = {{ force = "N", length = "m" }}
[nodes]
{nodes}
[beams]
{beams}
[supports]
N0 = "fixed"
N{n} = "roller"
{loads}
"""
    return lw.solve(lw.loads_case(text), verify=False).cases["default"].reactions[f"N{n}"]["y"]


def test_chain_of_prismatic_beams_converges_to_the_tapered_beam_at_second_order():
    """Midpoint sections: the error falls about 4 times per halving (second order)."""
    st = lw.loads_case(_propped('["deep", "shallow"]', ', taper = "depth"'))
    exact = lw.solve(st).cases["default"].reactions["B"]["y"]
    errors = [abs(_chain(n) - exact) for n in (8, 16, 32, 64)]
    ratios = [a / b for a, b in zip(errors[:-1], errors[1:], strict=True)]
    assert all(3.7 < r < 4.3 for r in ratios), ratios
    assert errors[-1] / exact < 1e-4


def test_adaptive_quadrature_meets_its_bound_on_a_taper_integrand():
    """int_0^1 dx / (1 - x/2)^3 = [1 / (1 - x/2)^2]_0^1 = 4 - 1 = 3 (calculus)."""
    assert integrate(lambda x: 1.0 / (1.0 - 0.5 * x) ** 3, 0.0, 1.0) == pytest.approx(
        3.0, rel=2e-13)


def test_flexibility_of_the_haunched_portal_is_symmetric_positive_definite():
    sol = lw.solve(lw.load_case(ROOT / "cases" / "haunched-portal.toml"))
    F = np.array(sol.flexibility, dtype=float)
    assert np.allclose(F, F.T, rtol=1e-12, atol=0)
    assert np.linalg.eigvalsh(F).min() > 0
    for res in sol.cases.values():
        assert res.stiffness.difference < 1e-9
    # the portal is symmetric and so is its roof load: equal and opposite base moments
    roof = sol.cases["roof"].reactions
    assert roof["A"]["rz"] == pytest.approx(-roof["E"]["rz"], rel=1e-10)


def test_independent_of_the_redundant_choice():
    path = ROOT / "cases" / "haunched-portal.toml"
    a = lw.solve(lw.load_case(path)).cases["roof"].reactions
    b = lw.solve(lw.load_case(path), redundants=["A.x", "A.y", "A.rz"]).cases["roof"].reactions
    for node in a:
        for k in a[node]:
            assert a[node][k] == pytest.approx(b[node][k], rel=1e-10, abs=1e-6)


def test_command_line_json_steps_and_symbolic(capsys, tmp_path):
    path = str(ROOT / "cases" / "haunched-portal.toml")
    assert main(["solve", path, "--json"]) == 0
    out = json.loads(capsys.readouterr().out)
    assert out["cases"]["roof"]["reactions"]["A"]["y"] > 0
    assert main(["solve", path, "--case", "roof", "--steps"]) == 0
    text = " ".join(capsys.readouterr().out.split())  # terminal lines rejoined
    assert "relative error bound 1×10⁻¹³" in text and "agrees" in text
    assert "Integrand of the bending coefficients" in text
    prop = tmp_path / "prop.toml"
    prop.write_text(_propped('["deep", "shallow"]', ', taper = "depth"'), encoding="utf-8")
    assert main(["solve", str(prop), "--symbolic"]) == 2
    err = capsys.readouterr().err.strip().splitlines()
    assert len(err) == 1 and "tapered" in err[0]


_SHEAR = ('[analysis]\nshear = true\ndisplacements = ["AB@3.y"]\n')


@pytest.mark.parametrize("variant", ["shear", "hinge", "joint spring"])
def test_shear_hinges_and_joint_springs_agree_with_the_stiffness_method(variant):
    """Invariant (two independent methods): the force method with the tapered beam's
    integrals = the exact tapered stiffness element, with shear energy (G·As ~ depth), a
    hinge at the end of a tapered beam framing into a post, and a joint spring."""
    text = _propped('["deep", "shallow"]', ', taper = "depth"', loads='at = "2 m"\nfy = "-30 kN"')
    if variant == "shear":
        text = (text.replace('E = "200 GPa"', 'E = "200 GPa"\nG = "77 GPa"')
                .replace('depth = "0.6 m"', 'depth = "0.6 m"\nshear_area = "0.1 m^2"')
                .replace('depth = "0.3 m"', 'depth = "0.3 m"\nshear_area = "0.05 m^2"')
                + _SHEAR)
    elif variant == "hinge":
        text = (text.replace('taper = "depth" }', 'taper = "depth", hinges = ["end"] }\n'
                             'BC = { nodes = ["B", "C"], material = "steel", section = "deep" }')
                .replace(f"B = [{L}, 0]", f"B = [{L}, 0]\nC = [{L}, -4]")
                .replace('B = "roller"', 'C = "fixed"'))
    else:
        text = text.replace('taper = "depth" }',
                            'taper = "depth", end_springs = { start = "20000 kN*m/rad" } }')
    sol = lw.solve(lw.loads_case(text))
    assert sol.cases["default"].stiffness.difference < 1e-9
    assert sol.equilibrium_ok
