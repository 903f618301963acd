"""Smoke tests of the benchmark scripts on tiny structures: the measuring functions give
complete rows, the two methods agree, the growth fit recovers a known power law, and the
braced grid's degree of indeterminacy is what its docstring derives. No wall-clock
assertions."""

from __future__ import annotations

import math
import os
from pathlib import Path

import generators  # noqa: E402
import process  # noqa: E402
import pytest
import scale  # noqa: E402

import leastwork

#: Tiny size of each family (a few to a few dozen members).
TINY = {"braced truss": 4, "braced grid": 3, "storey frame": 3, "continuous beam": 6,
        "multi-support truss": 5}


@pytest.mark.parametrize("nx, ny", [(1, 1), (2, 1), (1, 3), (3, 2), (4, 4)])
def test_braced_grid_degree_is_the_derived_formula(nx, ny):
    st = generators.structure(generators.braced_grid(nx, ny))
    assert len(st.members) == 4 * nx * ny + ny
    # m + r - 2 j (common practice) counted on the structure as read
    counted = (len(st.members) + sum(len(s.restraints) for s in st.supports.values())
               - 2 * len(st.nodes))
    assert counted == generators.braced_grid_degree(nx, ny) == ny * (2 * nx - 1)
    # the solvers' own degree (rank of the equilibrium matrix; number of self-stress
    # states): equal only if the grid is stable
    for basis in ("released", "local"):
        sol = leastwork.solve(st, verify=False, basis=basis)
        assert sol.topology.degree == generators.braced_grid_degree(nx, ny)


def test_families_include_the_grid_and_members_of_counts_them():
    assert set(TINY) == set(generators.FAMILIES)
    for family, size in TINY.items():
        st = generators.structure(generators.FAMILIES[family][0](size))
        assert len(st.members) == scale.members_of(family, size)


@pytest.mark.parametrize("family", list(scale._START))
def test_sizes_start_near_100_members_and_double_up_to_the_limit(family):
    sizes = scale.sizes(family)
    members = [scale.members_of(family, s) for s in sizes]
    assert 90 <= members[0] <= 130
    assert all(1.6 <= b / a <= 2.5 for a, b in zip(members, members[1:]))
    assert 0.9e5 <= members[-1] <= scale.MAX_MEMBERS  # about 10^5 at the top
    assert scale.sizes(family, 1000)[-1] == max(s for s in sizes
                                                if scale.members_of(family, s) <= 1000)


@pytest.mark.parametrize("family", list(TINY))
def test_measure_gives_a_complete_row_and_the_methods_agree(family):
    row = scale.measure(family, TINY[family], dense=True)
    assert row.failures == ()
    assert row.members == scale.members_of(family, TINY[family])
    assert row.redundants > 0
    assert row.flex_nonzeros >= row.redundants  # the diagonal at least
    assert row.flex_factor_nonzeros >= row.redundants
    assert row.stiff_factor_nonzeros >= 0
    assert row.t_force > 0 and row.t_stiffness > 0 and row.t_dense > 0
    assert math.isfinite(row.ratio)
    assert row.difference < 1e-8
    assert [p for p, _ in row.phases][:2] == ["equilibrium matrix", "self-stress states"]
    if hasattr(os, "fork"):
        assert all(math.isfinite(m) for m in (row.mem_force, row.mem_stiffness, row.mem_dense))
    line = scale.format_row(row, dense=True)
    assert line.split()[-1] == f"{row.difference:.1e}" and str(row.members) in line.split()
    if family == "braced grid":
        assert row.redundants == generators.braced_grid_degree(TINY[family], TINY[family])


def test_measure_in_a_fresh_interpreter_round_trips_the_row_and_growth_is_fitted():
    row = scale.measure_fresh("braced grid", 2, timeout=120)
    assert row.members == 18 and row.redundants == generators.braced_grid_degree(2, 2)
    assert row.difference < 1e-8 and row.failures == ()
    assert isinstance(row.phases, tuple) and row.phases
    bigger = scale.measure("braced grid", 3)
    for pick in (lambda r: r.t_force, lambda r: r.t_stiffness):
        assert math.isfinite(scale.growth_exponent([row.members, bigger.members],
                                                    [pick(row), pick(bigger)]))


def test_growth_exponent_recovers_a_power_law():
    m = [100, 200, 400, 800]
    assert scale.growth_exponent(m, [3e-4 * x ** 1.5 for x in m]) == pytest.approx(1.5)
    # the largest sizes only, non-positive and nan values left out
    values = [1.0, 5.0, 2e-3 * 400 ** 2, 2e-3 * 800 ** 2]
    assert scale.growth_exponent(m, values, last=2) == pytest.approx(2.0)
    assert scale.growth_exponent(m + [1600], [*values, math.nan], last=2) == pytest.approx(2.0)
    assert math.isnan(scale.growth_exponent([100], [1.0]))
    assert math.isnan(scale.growth_exponent([100, 200], [1.0, -1.0]))


def test_difference_is_relative_to_the_largest_force_and_moments_to_the_length():
    ours = {"c": ({"A": {"x": 10.0, "y": -4.0}}, {"M": ((1.0, 2.0, 3.0), (4.0, 5.0, 6.0))})}
    assert scale.difference(ours, ours, 2.0) == 0.0
    moved = {"c": ({"A": {"x": 10.0, "y": -4.0}}, {"M": ((1.0, 2.0, 3.5), (4.0, 5.0, 6.0))})}
    assert scale.difference(ours, moved, 2.0) == pytest.approx(0.5 / 10.0 / 2.0)
    missing = {"c": ({"A": {"x": 10.0}}, {"M": ((1.0, 2.0, 3.0), (4.0, 5.0, 6.0))})}
    assert scale.difference(ours, missing, 2.0) == pytest.approx(0.4)


def test_process_timing_on_a_tiny_grid():
    assert process.grid_panels(10_000) == 50  # 10 050 members
    assert set(process.commands(Path("case.toml"))) == {process.CLI, process.PLAIN,
                                                          process.FLOOR}
    res = process.measure(members=100, repeat=1, warm=False,
                          names=(process.CLI, process.PLAIN))
    assert res.members == 4 * res.panels ** 2 + res.panels == 105
    assert set(res.times) == {process.CLI, process.PLAIN}
    assert all(t > 0 for t in res.times.values()) and math.isfinite(res.ratio)
    assert process.CLI in process.report(res, 1)
