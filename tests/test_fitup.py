"""Fit-up tolerance study (leastwork.studies.fitup and ``leastwork fitup``).

Outside checks: the exact worst case against brute-force enumeration of the corners of the
tolerance box, each corner a full solve with misfit loads (agreement of two methods); the
Monte Carlo spread against the exact standard deviation of a linear response (sampling
error bounds); the prestrained three-bar system against its closed form; the length
adjustment against a full re-solve with that misfit added.
"""

from __future__ import annotations

import dataclasses
import itertools
import json
import math
from pathlib import Path

import numpy as np
import pytest

import leastwork
from leastwork.cli import main
from leastwork.errors import CaseError
from leastwork.model import Misfit
from leastwork.studies.fitup import (
    adjustment,
    axial_column,
    exact_std,
    fitup_study,
    monte_carlo,
    parse_tolerances,
)

CASES = Path(__file__).resolve().parents[1] / "cases"
BAY = CASES / "braced-bay-fitup.toml"
BRIDGE = CASES / "footbridge-truss.toml"
PORTAL = CASES / "portal-frame.toml"


def with_loads(st, loads):
    """``st`` with ``loads`` instead of its own, load cases in order of appearance."""
    names = tuple(dict.fromkeys(ld.case for ld in loads))
    return dataclasses.replace(st, loads=tuple(loads), case_order=names)


def quantity_value(st, res, name: str, group: str) -> float:
    """A reported quantity read from a full solve's CaseResult (SI)."""
    if group == "members":
        return float(res.members[name].end[0])
    if group == "moments":
        mid, end, _ = name.split(".")
        mr = res.members[mid]
        return float((mr.start if end == "start" else mr.end)[2])
    node, d = name.split(".")
    return float(res.reactions[node][d])


# ---------------------------------------------------------------------------- input
def test_spec_reads_units_star_and_bare_numbers():
    st = leastwork.load_case(BAY)
    tol = parse_tolerances("DC=2mm,*=1mm", st)
    assert list(tol) == list(st.members)  # structure order, every member
    assert tol["DC"] == pytest.approx(0.002)
    assert all(tol[m] == pytest.approx(0.001) for m in ("AD", "BC", "AC", "BD"))
    # a bare number is in the case length unit (m); inches through pint (1 in = 25.4 mm,
    # by definition)
    tol = parse_tolerances(" AC = 0.003 , BD=0.1 in", st)
    assert tol == {"AC": pytest.approx(0.003), "BD": pytest.approx(0.00254)}


@pytest.mark.parametrize("spec, item, phrase", [
    ("XX=2mm,*=1mm", "XX=2mm", "unknown member"),
    ("AC=-1mm", "AC=-1mm", "negative"),
    ("AC=nan", "AC=nan", "finite"),
    ("AC=inf", "AC=inf", "finite"),
    ("AC", "AC", "MEMBER=LENGTH"),
    ("=2mm", "=2mm", "MEMBER=LENGTH"),
    ("AC=2 kN", "AC=2 kN", "length"),
    ("AC=mm", "AC=mm", "not a length"),
    ("AC=1mm,AC=2mm", "AC=2mm", "twice"),
    ("*=1mm,*=2mm", "*=2mm", "twice"),
    ("AC=4m", "AC=4m", "half its length"),
    ("*=3m", "*=3m", "half its length"),
])
def test_spec_errors_name_the_item(spec, item, phrase):
    st = leastwork.load_case(BAY)
    with pytest.raises(CaseError) as exc:
        parse_tolerances(spec, st)
    assert exc.value.where == "--tolerance" and exc.value.source == "command line"
    assert phrase in str(exc.value)
    assert f'"{item}"' in str(exc.value)


# ----------------------------------------------------------------------- worst case
@pytest.mark.parametrize("path, members", [
    (BRIDGE, ["L1L2", "U1U2", "L1U1", "L2U2", "U1L2", "L1U2", "L2L3"]),
    (PORTAL, ["AB", "BC", "CD", "ED"]),
])
def test_worst_case_equals_corner_enumeration(path, members):
    """Exact extremes from G equal the largest and smallest value over every corner of the
    tolerance box, each corner solved in full with Misfit loads (two methods agree), and the
    reported patterns are corners that reach them."""
    st = leastwork.load_case(path)
    t = {m: 0.001 * (1 + k % 3) for k, m in enumerate(members)}
    study = fitup_study(leastwork.solve(st, verify=False), t, samples=2, seed=0)
    corners = list(itertools.product((-1.0, 1.0), repeat=len(members)))
    loads = [Misfit(m, sgn * t[m], case=f"c{i}") for i, signs in enumerate(corners)
             for m, sgn in zip(members, signs, strict=True)]
    full = leastwork.solve(with_loads(st, loads), verify=False)
    rep = study.quantities
    table = np.array([[quantity_value(st, full.cases[f"c{i}"], n, g)
                       for n, g in zip(rep.names, rep.groups, strict=True)]
                      for i in range(len(corners))])  # (corners, quantities)
    scale = np.max(np.abs(table))
    assert scale > 0
    np.testing.assert_allclose(study.worst.max, table.max(axis=0), rtol=0, atol=1e-9 * scale)
    np.testing.assert_allclose(study.worst.min, table.min(axis=0), rtol=0, atol=1e-9 * scale)
    index = {c: i for i, c in enumerate(corners)}
    for q in range(len(rep.names)):
        if study.worst.max[q] <= 1e-9 * scale:
            continue
        pattern = study.worst.pattern_max[q]
        # members that do not matter carry 0 in the pattern; any sign gives the same value
        signs = tuple(float(np.sign(e)) or 1.0 for e in pattern)
        assert table[index[signs], q] == pytest.approx(study.worst.max[q], abs=1e-9 * scale)
        signs = tuple(float(np.sign(e)) or 1.0 for e in study.worst.pattern_min[q])
        assert table[index[signs], q] == pytest.approx(study.worst.min[q], abs=1e-9 * scale)


def three_bar(alpha_deg: float, L: float, EA: float):
    """A vertical bar BD of length L and two bars AD, CD at alpha to it, all of axial
    stiffness EA, hanging from three pins A, B, C in one line, meeting at D."""
    a = math.radians(alpha_deg)
    return leastwork.loads_case(f"""
[structure]
name = "Three hangers of a plant-room platform"
units = {{ force = "kN", length = "m" }}
[nodes]
A = [{-L * math.tan(a)!r}, {L!r}]
B = [0, {L!r}]
C = [{L * math.tan(a)!r}, {L!r}]
D = [0, 0]
[bars]
AD = {{ nodes = ["A", "D"], EA = "{EA!r} kN" }}
BD = {{ nodes = ["B", "D"], EA = "{EA!r} kN" }}
CD = {{ nodes = ["C", "D"], EA = "{EA!r} kN" }}
[supports]
A = "pinned"
B = "pinned"
C = "pinned"
""")


def test_three_bar_prestrain_closed_form():
    """Middle bar of the symmetric three-bar system made too short by e: tension
    N = e EA/L * 2 cos^3(a) / (1 + 2 cos^3(a)) (Gere & Timoshenko, Mechanics of Materials,
    statically indeterminate structures, prestrain; checked by hand: compatibility
    e - N L/EA = delta, N_side = delta cos^2(a) EA/L, N = 2 N_side cos(a)). With a
    tolerance t on the middle bar alone, the worst tension is that N with e = t, reached
    when the bar is short."""
    alpha, L, EA, t = 35.0, 2.4, 2.1e5, 0.002  # kN, m
    st = three_bar(alpha, L, EA)
    c3 = math.cos(math.radians(alpha)) ** 3
    expected = t * EA / L * 2 * c3 / (1 + 2 * c3)  # kN
    study = fitup_study(leastwork.solve(st), parse_tolerances("BD=2mm", st), samples=2,
                        seed=0)
    q = study.quantities.names.index("BD")
    assert study.worst.max[q] / 1e3 == pytest.approx(expected, rel=1e-12)
    assert study.worst.pattern_max[q][0] == pytest.approx(-t)  # made too short -> tension
    assert study.worst.min[q] / 1e3 == pytest.approx(-expected, rel=1e-12)
    # uniform over +-t: std = |G| t / sqrt(3)
    assert study.std_exact[q] / 1e3 == pytest.approx(expected / math.sqrt(3), rel=1e-12)
    # the side bars: compression N_side = N / (2 cos a) (joint equilibrium at D)
    side = study.quantities.names.index("AD")
    assert study.worst.max[side] / 1e3 == pytest.approx(
        expected / (2 * math.cos(math.radians(alpha))), rel=1e-12)


# ---------------------------------------------------------------------- Monte Carlo
@pytest.mark.parametrize("distribution", ["uniform", "normal"])
def test_monte_carlo_spread_matches_the_exact_one(distribution):
    """Sample std within sampling error of sqrt(sum (G sigma)^2); the mean within sampling
    error of zero. For a sum of independent uniform or normal terms the kurtosis is at most
    3, so the standard error of the sample std is at most std / sqrt(2N) (common practice);
    the bounds below are five standard errors."""
    from scipy.stats import norm

    st = leastwork.load_case(BRIDGE)
    sol = leastwork.solve(st, verify=False)
    n = 20000
    study = fitup_study(sol, parse_tolerances("*=2mm", st), n, distribution, seed=11)
    live = study.std_exact > 1e-9 * study.std_exact.max()
    assert live.sum() >= 10
    std, exact = study.stats.std[live], study.std_exact[live]
    assert np.all(np.abs(std / exact - 1) < 5 / math.sqrt(2 * n))
    assert np.all(np.abs(study.stats.mean[live]) < 5 * exact / math.sqrt(n))
    # quantities that no misfit reaches stay exactly zero
    assert np.all(study.stats.std[~live] == 0) and np.all(study.worst.max[~live] == 0)
    if distribution == "normal":
        # a linear function of normal errors is normal: p95 = 1.645 sigma (scipy.stats.norm
        # as the oracle); standard error of a 95th percentile sqrt(.05*.95/N)/phi(1.645)
        z = norm.ppf(0.95)
        se = math.sqrt(0.05 * 0.95 / n) / norm.pdf(z)
        assert np.all(np.abs(study.stats.p95[live] / exact - z) < 5 * se)
        assert np.all(np.abs(study.stats.p05[live] / exact + z) < 5 * se)
    else:
        # a sample can never leave the tolerance box: p05, p95 inside the exact extremes
        assert np.all(study.stats.p95 <= study.worst.max + 1e-12)
        assert np.all(study.stats.p05 >= study.worst.min - 1e-12)


def test_monte_carlo_is_reproducible_and_linear():
    G = np.array([[2.0, -1.0, 0.5], [0.0, 3.0, 0.0]])
    t = np.array([1.0, 2.0, 4.0])
    a = monte_carlo(G, t, 5000, "uniform", seed=5)
    b = monte_carlo(G, t, 5000, "uniform", seed=5)
    c = monte_carlo(G, t, 5000, "uniform", seed=6)
    assert np.array_equal(a.std, b.std) and np.array_equal(a.p95, b.p95)
    assert not np.array_equal(a.std, c.std)
    d = monte_carlo(2 * G, t, 5000, "uniform", seed=5)  # linear in G, same samples
    np.testing.assert_allclose(d.std, 2 * a.std, rtol=1e-12)
    # std of a single uniform term c*U(-t, t) is |c| t / sqrt(3)
    assert exact_std(G[1:], t, "uniform")[0] == pytest.approx(6 / math.sqrt(3))
    assert exact_std(G[1:], t, "normal")[0] == pytest.approx(2.0)


# ------------------------------------------------------------------ inverse question
@pytest.mark.parametrize("path, member, target, case", [
    (BRIDGE, "L1U2", "U1L2", None),
    (BRIDGE, "L2L3", "L0L1", None),
    (BAY, "BD", "AC", "fitup-and-wind"),
    (BAY, "AC", "AC", "fitup"),
])
def test_adjustment_zeroes_the_target_when_resolved(path, member, target, case):
    """Add the computed length change as a Misfit to the case's own loads and solve again:
    the target's axial force vanishes and every other force is as predicted."""
    st = leastwork.load_case(path)
    sol = leastwork.solve(st, verify=False)
    adj = adjustment(sol, member, target, case)
    name = case or st.case_names[0]
    assert adj.case == name
    assert abs(adj.force_before) > 1.0  # N: there is something to zero
    loads = [ld for ld in st.loads if ld.case == name] + [Misfit(member, adj.change, name)]
    again = leastwork.solve(with_loads(st, loads), verify=False)
    res = again.cases[name]
    topo = again.topology
    scale = max(abs(v) for v in adj.before.values())
    assert abs(res.s[axial_column(st, topo, target)]) <= 1e-9 * scale
    for mid, v in adj.after.items():
        assert res.s[axial_column(st, topo, mid)] == pytest.approx(v, abs=1e-9 * scale)


def test_adjustment_refuses_a_member_without_effect():
    st = leastwork.load_case(BRIDGE)
    sol = leastwork.solve(st, verify=False)
    # a vertical outside the crossed panel and the bottom chord takes part in no
    # self-straining state: its length locks nothing in
    with pytest.raises(CaseError, match="locks in no force"):
        adjustment(sol, "L3U3", "U1L2")
    with pytest.raises(CaseError, match="--case"):
        adjustment(sol, "L1U2", "U1L2", "nonexistent")


# ------------------------------------------------------------------- command line
def test_cli_json_shape_and_seed(capsys):
    args = ["fitup", str(PORTAL), "--tolerance", "BC=2mm,*=1mm", "--samples", "3000",
            "--seed", "7", "--json"]
    assert main(args) == 0
    out = json.loads(capsys.readouterr().out)
    assert out["samples"] == 3000 and out["seed"] == 7 and out["distribution"] == "uniform"
    assert out["tolerances"] == {"AB": 0.001, "BC": 0.002, "CD": 0.001, "ED": 0.001}
    assert set(out["members"]) == {"AB", "BC", "CD", "ED"}
    for entry in (*out["members"].values(), *out["moments"].values(),
                  *out["reactions"].values()):
        assert set(entry) == {"worst", "mean", "std", "std_exact", "p05", "p95"}
        w = entry["worst"]
        assert w["min"] == -w["max"] and set(w["pattern_max"]) == set(out["tolerances"])
        assert entry["p05"] <= entry["p95"] and entry["p95"] <= w["max"]
    assert {"AB.start.m", "ED.end.m"} <= set(out["moments"])
    assert {"A.x", "A.y", "A.rz", "E.x"} <= set(out["reactions"])
    assert out["units"] == {"force": "kN", "length": "m", "moment": "kN*m", "displacement": "m"}
    assert main(args) == 0
    assert json.loads(capsys.readouterr().out) == out  # same seed, same numbers


def test_cli_text_and_adjust(capsys):
    assert main(["fitup", str(BAY), "--tolerance", "*=1mm", "--samples", "500",
                 "--adjust", "BD", "--zero", "AC", "--case", "wind", "--no-color"]) == 0
    text = " ".join(capsys.readouterr().out.split())  # the terminal wraps long lines
    assert "Axial forces [kN]" in text and "qualified engineer" in text
    assert "Load case wind" in text and "Make BD" in text
    assert main(["fitup", str(BAY), "--adjust", "BD", "--zero", "AC", "--json"]) == 0
    out = json.loads(capsys.readouterr().out)
    assert out["adjust"]["case"] == "fitup" and out["adjust"]["after"]["AC"] == 0.0
    assert "members" not in out


@pytest.mark.parametrize("args, phrase", [
    (["--tolerance", "XX=2mm"], '"XX=2mm": unknown member'),
    (["--tolerance", "AC=-2mm"], '"AC=-2mm": a tolerance is a +- band'),
    (["--tolerance", "*=1mm", "--samples", "1"], "--samples"),
    (["--tolerance", "*=1mm", "--samples", "many"], "invalid int value"),
    (["--tolerance", "*=1mm", "--distribution", "triangular"], "invalid choice"),
    (["--adjust", "BD"], "go together"),
    (["--adjust", "BD", "--zero", "QQ"], '--zero: unknown member "QQ"'),
    (["--tolerance", "*=1mm", "--case", "wind"], "--case picks the load case"),
    ([], "give --tolerance"),
])
def test_cli_bad_input_exits_2_with_one_line(args, phrase, capsys):
    assert main(["fitup", str(BAY), *args]) == 2
    err = capsys.readouterr().err
    assert "Traceback" not in err
    lines = [ln for ln in err.splitlines() if ln.strip()]
    assert len(lines) == 1 and lines[0].startswith("leastwork: error: "), err
    assert phrase in lines[0]


def test_reported_quantities_need_memory_proportional_to_their_table():
    """One row per member force, end moment and reaction: the table is quantities x
    columns; building it must not hold an identity matrix per quantity (invariant: memory
    of the result's order; a 410-bar grid once peaked at 600 MB here)."""
    import tracemalloc

    from generators import braced_grid, structure

    from leastwork.studies.fitup import reported_quantities
    from leastwork.topology import sparse_topology

    st = structure(braced_grid(10, 10))
    topo = sparse_topology(st)
    tracemalloc.start()
    rep = reported_quantities(st, topo)
    peak = tracemalloc.get_traced_memory()[1]
    tracemalloc.stop()
    table = len(rep.names) * len(topo.columns) * 8  # bytes of the (nq, ncol) table
    assert rep.rows.shape == (len(rep.names), len(topo.columns))
    assert peak < 10 * table  # was about 200 x the table (one identity per quantity)
