"""Presentation options of `leastwork solve`: --units, --quiet, --no-color."""

from __future__ import annotations

import json
from pathlib import Path

import pytest

from leastwork.cli import main

CASES = Path(__file__).resolve().parents[1] / "cases"
BEAM = CASES / "floor-beam-3span.toml"


def _json(capsys, *extra):
    assert main(["solve", str(BEAM), "--json", *extra]) == 0
    return json.loads(capsys.readouterr().out)


def test_units_option_converts_every_result(capsys):
    """1 kN = 1000 N, 1 m = 1000 mm, 1 kN*m = 1e6 N*mm (SI definitions)."""
    base = _json(capsys)
    other = _json(capsys, "--units", "N,mm")
    assert other["units"] == {"force": "N", "length": "mm", "moment": "N*mm", "rotation": "rad",
                              "displacement": "mm", "distributed": "N/mm", "stress": "N/mm^2"}
    for name, case in base["cases"].items():
        o = other["cases"][name]
        for k, v in case["redundants"].items():
            assert o["redundants"][k] == pytest.approx(v * 1e3, rel=1e-12)
        for node, comps in case["reactions"].items():
            for d, v in comps.items():
                f = 1e6 if d == "rz" else 1e3
                assert o["reactions"][node][d] == pytest.approx(v * f, rel=1e-12, abs=1e-9)
        for mid, m in case["members"].items():
            assert o["members"][mid]["m_max"]["value"] == pytest.approx(
                m["m_max"]["value"] * 1e6, rel=1e-12, abs=1e-9)
            assert o["members"][mid]["m_max"]["at"] == pytest.approx(
                m["m_max"]["at"] * 1e3, rel=1e-12, abs=1e-9)
        # flexibility of force redundants: length per force, m/kN -> mm/N is x 1
        for row_b, row_o in zip(case["flexibility"], o["flexibility"], strict=True):
            assert row_o == pytest.approx(row_b, rel=1e-12)


@pytest.mark.parametrize("bad", ["kN", "kN,kg", "m,kN", "kN,,", "parsec/s,m"])
def test_units_option_rejects_nonsense(bad, capsys):
    assert main(["solve", str(BEAM), "--units", bad]) == 2
    err = capsys.readouterr().err
    assert "--units" in err and "Traceback" not in err


def test_quiet_prints_redundants_and_checks_only(capsys):
    assert main(["solve", str(BEAM), "--quiet"]) == 0
    out = capsys.readouterr().out.splitlines()
    assert out and len(out) == 6  # two redundants and one check line per load case
    assert all("equilibrium OK, cross-check agrees" in line for line in out if "equil" in line)
    assert any(line.startswith("dead  B.y = ") for line in out)


def test_no_color_strips_escape_codes(capsys, monkeypatch):
    monkeypatch.setenv("FORCE_COLOR", "1")
    monkeypatch.delenv("NO_COLOR", raising=False)
    assert main(["solve", str(BEAM)]) == 0
    assert "\x1b[" in capsys.readouterr().out
    assert main(["solve", str(BEAM), "--no-color"]) == 0
    assert "\x1b[" not in capsys.readouterr().out
