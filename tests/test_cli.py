"""The command line on every bundled case: exit status, JSON shape, caution and checks."""

from __future__ import annotations

import json
from pathlib import Path

import pytest

from leastwork.cli import main

CASES = sorted((Path(__file__).resolve().parents[1] / "cases").glob("*.toml"))
CONTRACT_CASE_KEYS = {"redundants", "flexibility", "load_terms", "reactions", "members",
                      "displacements", "checks"}


@pytest.mark.parametrize("case", CASES, ids=lambda p: p.stem)
def test_bundled_case_solves_with_equilibrium(case, capsys):
    assert main(["solve", str(case), "--json"]) == 0
    out = json.loads(capsys.readouterr().out)
    assert out["schema"] == "leastwork.result/1"
    assert set(out) >= {"schema", "name", "units", "indeterminacy", "redundants", "cases"}
    assert out["indeterminacy"]["stable"] is True
    assert len(out["redundants"]) == out["indeterminacy"]["degree"]
    for res in out["cases"].values():
        assert set(res) >= CONTRACT_CASE_KEYS
        assert res["checks"]["equilibrium_ok"] is True
        assert res["checks"]["equilibrium_residual"] <= res["checks"]["equilibrium_tolerance"]
        # flexibility symmetric and positive definite (Maxwell-Betti; energy positive)
        import numpy as np

        F = np.array(res["flexibility"])
        if F.size:
            assert np.allclose(F, F.T, rtol=1e-10, atol=0)
            assert np.all(np.linalg.eigvalsh(F) > 0)


@pytest.mark.parametrize("case", CASES, ids=lambda p: p.stem)
def test_bundled_case_summary_and_steps(case, capsys):
    assert main(["solve", str(case)]) == 0
    text = capsys.readouterr().out
    assert "qualified engineer" in text and "Equilibrium check" in text and "OK" in text
    assert main(["solve", str(case), "--steps"]) == 0
    steps = capsys.readouterr().out
    for n in range(1, 8):
        assert f"Step {n}" in steps
    assert main(["check", str(case)]) == 0
    assert "Suggested redundants" in capsys.readouterr().out


def test_redundants_override_and_at(capsys):
    case = str(CASES[0].parent / "canopy-prop.toml")
    assert main(["solve", case, "--json", "--redundants", "A.rz", "--at", "B.y"]) == 0
    out = json.loads(capsys.readouterr().out)
    assert out["redundants"] == ["A.rz"]
    assert "B.y" in out["cases"]["default"]["displacements"]


def test_help_states_assumptions_and_caution(capsys):
    assert main(["solve", "--help"]) == 0  # help printed, exit status returned
    text = capsys.readouterr().out
    assert "linear elastic" in text.lower() and "qualified engineer" in text
