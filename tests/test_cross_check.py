"""The built-in second opinion: the force method against the independent direct-stiffness
solver, reported in the JSON (checks.stiffness_difference) and on the terminal; a
disagreement is loud, never silent."""

from __future__ import annotations

import dataclasses
import json
import sys
from pathlib import Path

import pytest

from leastwork import load_case, solve
from leastwork.cli import main
from leastwork.verify.cross_check import STIFFNESS_RTOL

CASES = sorted((Path(__file__).resolve().parents[1] / "cases").glob("*.toml"))


@pytest.mark.parametrize("case", CASES, ids=lambda p: p.stem)
def test_bundled_cases_agree_with_the_stiffness_method(case, capsys):
    assert main(["solve", str(case), "--json"]) == 0
    out = json.loads(capsys.readouterr().out)
    # curved members are modelled by the stiffness solver as chains of straight beams,
    # extrapolated: agreement to that model's discretisation error, not to round-off
    curved = any(m.curve is not None for m in load_case(case).members.values())
    for res in out["cases"].values():
        assert res["checks"]["stiffness_ok"] is True
        assert 0 <= res["checks"]["stiffness_difference"] < (1e-7 if curved else 1e-10)


def test_no_verify_skips_the_cross_check(capsys):
    assert main(["solve", str(CASES[0]), "--json", "--no-verify"]) == 0
    out = json.loads(capsys.readouterr().out)
    for res in out["cases"].values():
        assert "stiffness_difference" not in res["checks"]
    assert main(["solve", str(CASES[0]), "--no-verify"]) == 0
    assert "not run" in capsys.readouterr().out


def _perturbed(monkeypatch, factor):
    """Make the stiffness solver's reactions differ by ``factor`` (a stand-in for a bug in
    either method)."""
    checks = sys.modules["leastwork.verify.cross_check"]
    real = checks.solve_stiffness

    def fake(st, case):
        r = real(st, case)
        reactions = {n: {k: v * factor for k, v in c.items()} for n, c in r.reactions.items()}
        return dataclasses.replace(r, reactions=reactions)

    monkeypatch.setattr(checks, "solve_stiffness", fake)


def test_a_disagreement_is_loud_everywhere(monkeypatch, capsys):
    case = next(c for c in CASES if c.stem == "canopy-prop")
    _perturbed(monkeypatch, 1.001)
    sol = solve(load_case(case))
    assert not sol.cross_check_ok
    assert any("DISAGREE" in w for w in sol.warnings)
    d = sol.to_dict()["cases"]["default"]["checks"]
    assert d["stiffness_ok"] is False and d["stiffness_difference"] > STIFFNESS_RTOL
    assert main(["solve", str(case)]) == 0
    assert "CROSS-CHECK FAILED" in capsys.readouterr().out
    assert main(["solve", str(case), "--json"]) == 0
    assert "cross-check DISAGREES" in capsys.readouterr().err
    assert main(["solve", str(case), "--steps"]) == 0
    assert "CROSS-CHECK FAILED" in capsys.readouterr().out


def test_round_off_differences_pass(monkeypatch):
    case = next(c for c in CASES if c.stem == "canopy-prop")
    _perturbed(monkeypatch, 1 + 1e-12)
    assert solve(load_case(case)).cross_check_ok


def test_case_with_no_forces_is_not_a_false_alarm(tmp_path):
    """A determinate cantilever that is only heated has no forces at all (common practice:
    a determinate structure takes up temperature strains freely); round-off of either
    method must neither fail the equilibrium check nor the cross-check."""
    case = tmp_path / "heated.toml"
    case.write_text(
        '[structure]\nname = "heated cantilever"\nunits = { force = "kN", length = "m" }\n'
        '[materials.s]\nE = "200 GPa"\nalpha = "1.2e-5 1/K"\n'
        '[sections.r]\nA = "6000 mm^2"\nI = "1e8 mm^4"\ndepth = "300 mm"\n'
        '[defaults]\nmaterial = "s"\nsection = "r"\n'
        '[nodes]\nA = [0, 0]\nB = [6, 0]\n[beams]\nAB = { nodes = ["A", "B"] }\n'
        '[supports]\nA = "fixed"\n'
        '[[loads]]\nmember = "AB"\ntemperature = { uniform = "30 K", gradient = "25 K" }\n')
    sol = solve(load_case(case))
    res = sol.cases["default"]
    assert res.equilibrium_ok and sol.cross_check_ok
    assert all(abs(v) < 1e-6 for v in res.reactions["A"].values())


def test_accepted_difference_widens_with_the_condition_number():
    """Round-off of the force method grows with the condition number of its flexibility
    matrix (common practice in numerical analysis): a long cross-braced truss with condition
    ~2e5 differs by ~1e-7 without any error."""
    from leastwork.verify.cross_check import CONDITION_RTOL, stiffness_check

    case = next(c for c in CASES if c.stem == "canopy-prop")
    sol = solve(load_case(case))
    res = sol.cases["default"]
    assert stiffness_check(sol.structure, res).tolerance == STIFFNESS_RTOL
    wide = stiffness_check(sol.structure, res, condition=1e6)
    assert wide.tolerance == CONDITION_RTOL * 1e6 and wide.ok
    assert sol.to_dict()["cases"]["default"]["checks"]["stiffness_tolerance"] == STIFFNESS_RTOL


def test_long_slender_truss_is_no_false_alarm():
    """On a long truss the stiffness method itself loses digits (its scaled stiffness
    condition grows like panels^4, about 1e10 at 400 panels), while the force method on its
    local states stays exact: the accepted difference follows the stiffness condition, so
    the cross-check agrees, and it still measures a real difference."""
    from generators import braced_truss, structure

    st = structure(braced_truss(400))
    sol = solve(st, verify=True)
    for res in sol.cases.values():
        check = res.stiffness
        assert check.ok, check
        # the stiffness solver's own round-off exceeds the fixed tolerance here (about
        # 2e-7), so only the tolerance widened by its condition number accepts it
        assert check.difference > STIFFNESS_RTOL
        assert check.tolerance > check.difference
    assert sol.cross_check_ok and not any("DISAGREE" in w for w in sol.warnings)
