"""Load combinations and their envelope.

Linear elastic, small displacements: the answer to factored loads is the factored sum of
the answers (superposition; common practice). The envelope is checked against brute force
over the combinations' own results.
"""

from __future__ import annotations

import json

import numpy as np
import pytest

from leastwork import loads_case, solve
from leastwork.cli import main

CASE = """
[structure]
name = "Crane-runway girder over two bays"
units = { force = "kN", length = "m" }
[nodes]
A = [0, 0]
B = [5, 0]
C = [11, 0]
[beams]
AB = { nodes = ["A", "B"], EI = "20000 kN*m^2", EA = "2e6 kN" }
BC = { nodes = ["B", "C"], EI = "20000 kN*m^2", EA = "2e6 kN" }
[supports]
A = "pinned"
B = "roller"
C = "fixed"
[[loads]]
case = "dead"
member = "AB"
wy = -4
[[loads]]
case = "dead"
member = "BC"
wy = -4
[[loads]]
case = "crane"
member = "BC"
at = 2.0
fy = -60
fx = 6
[[loads]]
case = "settle"
settlement = "B"
dy = "-5 mm"
[combinations]
ULS = { dead = 1.35, crane = 1.5 }
uplift = { dead = 1.0, crane = "-0.5", settle = 1 }
service = { dead = 1, crane = 1, settle = 1 }
[analysis]
displacements = ["B.x", "BC@3.y"]
"""

FACTORS = {"ULS": {"dead": 1.35, "crane": 1.5},
           "uplift": {"dead": 1.0, "crane": -0.5, "settle": 1.0},
           "service": {"dead": 1.0, "crane": 1.0, "settle": 1.0}}


@pytest.fixture(scope="module")
def result():
    sol = solve(loads_case(CASE, "runway.toml"))
    return sol, sol.to_dict()


def _numbers(case: dict) -> np.ndarray:
    vals = [*case["redundants"].values(), *case["displacements"].values()]
    vals += [v for r in case["reactions"].values() for v in r.values()]
    vals += [m[e][q] for m in case["members"].values() for e in ("start", "end") for q in "nvm"]
    return np.array(vals)


def test_combination_is_the_factored_sum_of_its_cases(result):
    _, d = result
    for name, factors in FACTORS.items():
        expected = sum(f * _numbers(d["cases"][c]) for c, f in factors.items())
        got = _numbers(d["cases"][name])
        assert np.allclose(got, expected, rtol=1e-9, atol=1e-9 * np.abs(expected).max())


def test_combinations_are_checked_like_load_cases(result):
    sol, d = result
    assert list(d["cases"]) == ["dead", "crane", "settle", "ULS", "uplift", "service"]
    for name in FACTORS:
        assert d["cases"][name]["checks"]["equilibrium_ok"]
        assert d["cases"][name]["checks"]["stiffness_ok"]


def test_envelope_equals_brute_force_over_the_combinations(result):
    sol, d = result
    env = d["envelope"]
    assert env["combinations"] == list(FACTORS)
    Ff = 1e3  # kN in N
    for mid, qs in env["members"].items():
        # m: the combinations' own m_max / m_min (found by member_result)
        best = max(FACTORS, key=lambda c: d["cases"][c]["members"][mid]["m_max"]["value"])
        assert qs["m"]["max"]["value"] == d["cases"][best]["members"][mid]["m_max"]["value"]
        assert qs["m"]["max"]["combination"] == best
        worst = min(FACTORS, key=lambda c: d["cases"][c]["members"][mid]["m_min"]["value"])
        assert qs["m"]["min"]["value"] == d["cases"][worst]["members"][mid]["m_min"]["value"]
        # n and v: dense sampling of every combination's fields
        L = sol.structure.length(mid)
        x = np.linspace(0, L, 2001)
        for q, fac in (("n", Ff), ("v", Ff)):
            samples = {c: getattr(sol.cases[c].members[mid], q)(x) / fac for c in FACTORS}
            hi = max(samples, key=lambda c: samples[c].max())
            lo = min(samples, key=lambda c: samples[c].min())
            assert qs[q]["max"]["value"] == pytest.approx(samples[hi].max(), abs=1e-9)
            assert qs[q]["min"]["value"] == pytest.approx(samples[lo].min(), abs=1e-9)
            assert qs[q]["max"]["combination"] == hi and qs[q]["min"]["combination"] == lo
    for node, ds in env["reactions"].items():
        for comp, e in ds.items():
            vals = {c: d["cases"][c]["reactions"][node][comp] for c in FACTORS}
            assert e["max"]["value"] == max(vals.values())
            assert e["min"]["value"] == min(vals.values())
            assert vals[e["max"]["combination"]] == e["max"]["value"]


def test_no_envelope_without_combinations():
    text = CASE.split("[combinations]")[0] + '[analysis]\ndisplacements = ["B.x"]\n'
    assert "envelope" not in solve(loads_case(text, "x.toml")).to_dict()


def test_terminal_and_steps_show_the_combinations(tmp_path, capsys):
    case = tmp_path / "runway.toml"
    case.write_text(CASE)
    assert main(["solve", str(case)]) == 0
    out = capsys.readouterr().out
    assert "Envelope over the combinations" in out and "governing" in out
    assert main(["solve", str(case), "--steps", "--case", "ULS"]) == 0
    out = capsys.readouterr().out
    assert "Load combinations" in out and "1.35 × dead + 1.5 × crane" in out
    assert main(["solve", str(case), "--json"]) == 0
    assert "envelope" in json.loads(capsys.readouterr().out)
