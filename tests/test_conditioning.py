"""Conditioning of the flexibility matrix, near-mechanisms and soft springs.

Facts used (common practice): two supports very close together make their reactions
nearly interchangeable, so taking both as redundants gives an ill-conditioned flexibility
matrix, while the moments over them (three-moment style) do not; two bars almost in line
resist a load across them only through their tiny angle; a structure standing only on a
very soft spring is close to a mechanism.
"""

from __future__ import annotations

import numpy as np
from _cases import case_text

from leastwork import solve
from leastwork.io.reader import loads_case
from leastwork.thresholds import CONDITION_WARN

# a continuous beam whose middle span is 0.1 mm: supports B and C act almost as one
CLOSE_SUPPORTS = case_text(
    "close supports",
    nodes={"A": [0, 0], "B": [5, 0], "C": [5.0001, 0], "D": [10, 0]},
    beams={"AB": {"nodes": ["A", "B"], "EI": 1e4}, "BC": {"nodes": ["B", "C"], "EI": 1e4},
           "CD": {"nodes": ["C", "D"], "EI": 1e4}},
    supports={"A": "pinned", "B": "roller", "C": "roller", "D": "roller"},
    loads=[{"member": "AB", "wy": -10}],
)


def _jacobi_condition(delta: np.ndarray) -> float:
    d = 1 / np.sqrt(np.diag(delta))
    return float(np.linalg.cond(delta * d[:, None] * d[None, :]))


def test_condition_number_is_reported_and_is_that_of_the_scaled_matrix():
    sol = solve(loads_case(CLOSE_SUPPORTS, "close.toml"))
    assert np.isclose(sol.condition, _jacobi_condition(sol.flexibility), rtol=1e-6)
    case = sol.to_dict()["cases"]["default"]
    assert case["checks"]["flexibility_condition"] == sol.condition
    assert sol.condition < 100


def test_ill_conditioned_user_choice_is_warned_with_a_better_one():
    sol = solve(loads_case(CLOSE_SUPPORTS, "close.toml"), ["B.y", "C.y"])
    assert sol.condition > CONDITION_WARN
    assert any("ill-conditioned" in w and "would give" in w for w in sol.warnings)
    good = solve(loads_case(CLOSE_SUPPORTS, "close.toml"))
    # the answer is still right to the digits the conditioning leaves (about 1e-10 * cond)
    rb = sol.cases["default"].reactions["B"]["y"]
    rb_good = good.cases["default"].reactions["B"]["y"]
    assert abs(rb - rb_good) <= 1e-4 * abs(rb_good)
    # B and C act as a fixed end for span AB: moment w L^2 / 8 over a 0.1 mm lever
    # (propped cantilever, AISC Manual beam diagrams case 12)
    assert np.isclose(rb_good / 1e3, 10 * 5 * 5 / 8 / 0.0001, rtol=1e-3)


def test_automatic_choice_is_replaced_when_ill_conditioned(monkeypatch):
    """If the first automatic choice is ill-conditioned the member-force alternative is used
    and said so."""
    import sys

    import leastwork.topology as topo_mod

    solve_mod = sys.modules["leastwork.solve"]  # the module, not the function of that name

    real = topo_mod.choose_redundants

    def reactions_first(st, topo, names=None, where="", prefer="reactions"):
        if names is None and prefer == "reactions":
            return [topo.column_index["B.y"], topo.column_index["C.y"]]
        return real(st, topo, names, where, prefer=prefer)

    monkeypatch.setattr(solve_mod, "choose_redundants", reactions_first)
    sol = solve(loads_case(CLOSE_SUPPORTS, "close.toml"))
    assert sol.condition < 100
    assert set(sol.redundant_names) != {"B.y", "C.y"}
    assert any("was used instead" in w for w in sol.warnings)


def test_bars_almost_in_line_are_a_near_mechanism():
    text = case_text(
        "t",
        nodes={"A": [0, 0], "B": [5, -1e-6], "C": [10, 0]},
        bars={"AB": {"nodes": ["A", "B"], "EA": 1e5}, "BC": {"nodes": ["B", "C"], "EA": 1e5},
              "AC": {"nodes": ["A", "C"], "EA": 1e5}},
        supports={"A": "pinned", "C": "pinned"},
        loads=[{"node": "B", "fy": -1}],
    )
    sol = solve(loads_case(text, "shallow.toml"))
    near = [w for w in sol.warnings if "near-mechanism" in w]
    assert near and "B.y" in near[0]


def test_well_shaped_truss_has_no_near_mechanism_warning():
    text = case_text(
        "t",
        nodes={"A": [0, 0], "B": [5, -2], "C": [10, 0]},
        bars={"AB": {"nodes": ["A", "B"], "EA": 1e5}, "BC": {"nodes": ["B", "C"], "EA": 1e5}},
        supports={"A": "pinned", "C": "pinned"},
        loads=[{"node": "B", "fy": -1}],
    )
    assert solve(loads_case(text, "ok.toml")).warnings == ()


def test_structure_standing_on_a_very_soft_spring_is_warned():
    text = case_text(
        "t",
        nodes={"A": [0, 0], "B": [6, 0]},
        beams={"AB": {"nodes": ["A", "B"], "EI": 1e4}},
        supports={"A": "pinned", "B": {"springs": {"y": 1e-6}}},
        loads=[{"member": "AB", "wy": -1}],
    )
    sol = solve(loads_case(text, "soft.toml"))
    assert any("stands only on spring B.y" in w for w in sol.warnings)
