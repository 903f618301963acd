"""Start-up cost of a plain solve: what it must not import, and that the cheaper paths taken
for it (member-graph counts by union-find, pint's disk cache of unit definitions) give the
same answers as the general ones (networkx's graph, a freshly built unit registry)."""

from __future__ import annotations

import json
import subprocess
import sys
from pathlib import Path

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

import leastwork
from leastwork.model import units
from leastwork.topology import member_graph_counts, structure_graph

ROOT = Path(__file__).resolve().parents[1]
CASES = sorted((ROOT / "cases").glob("*.toml"))
CANOPY = next(c for c in CASES if c.stem == "canopy-prop")

_PROBE = """
import contextlib, io, json, sys
from leastwork.cli import main
out = io.StringIO()
with contextlib.redirect_stdout(out):
    status = main(sys.argv[1:])
print(json.dumps({"status": status, "result": json.loads(out.getvalue()),
                  "modules": sorted(sys.modules)}))
"""


def _solve_in_fresh_interpreter(*args: str) -> dict:
    run = subprocess.run([sys.executable, "-c", _PROBE, "solve", str(CANOPY), "--json", *args],
                         capture_output=True, text=True, timeout=120, check=True)
    return json.loads(run.stdout)


def _imported(modules: list[str], package: str) -> bool:
    return any(m == package or m.startswith(package + ".") for m in modules)


#: The declared dependencies a plain solve may load: arrays, scipy's bare package (pint
#: looks for it), the unit reader and the terminal output. Every other one (the
#: exact-arithmetic and drawing libraries, the graph library) must stay unloaded.
_NEEDED = {"numpy", "scipy", "pint", "rich"}


def _declared_dependencies() -> set[str]:
    """Import names of the dependencies in pyproject.toml (each imports under its own
    name)."""
    import re
    import tomllib

    project = tomllib.loads((ROOT / "pyproject.toml").read_text(encoding="utf-8"))["project"]
    return {re.match(r"[A-Za-z0-9_]+", d).group(0).lower() for d in project["dependencies"]}


def test_a_plain_solve_loads_only_the_dependencies_it_needs():
    heavy = _declared_dependencies() - _NEEDED
    assert {"networkx", "matplotlib"} < heavy and len(heavy) >= 3  # the test has teeth
    probe = _solve_in_fresh_interpreter()
    assert probe["status"] == 0
    case = probe["result"]["cases"]["default"]
    assert case["checks"]["stiffness_ok"] is True  # the cross-check did run
    loaded = sorted(h for h in heavy if _imported(probe["modules"], h))
    assert not loaded, f"a plain solve imported {loaded}"
    assert _imported(probe["modules"], "leastwork.verify")
    assert not _imported(probe["modules"], "leastwork.symbolic")


def test_a_small_json_solve_loads_no_scipy_solver_dask_nor_terminal_output():
    """A small solve and its cross-check run on numpy's dense solvers: scipy's linear
    algebra (0.1-0.2 s to import), Dask (pint's optional hook) and the terminal output
    (JSON needs none of it) stay unloaded; the package's own names load on first use."""
    probe = _solve_in_fresh_interpreter()
    assert probe["status"] == 0
    assert probe["result"]["cases"]["default"]["checks"]["stiffness_ok"] is True
    modules = probe["modules"]
    unused = ("scipy.linalg", "scipy.sparse", "dask", "rich", "leastwork.output.terminal",
              "leastwork.studies.reanalysis", "leastwork.studies.sweep",
              "leastwork.sparse_solve", "leastwork.selfstress")
    loaded = [p for p in unused if _imported(modules, p)]
    assert not loaded, f"a small solve --json imported {loaded}"
    assert _imported(modules, "pint")  # the test has teeth: the unit reader did load


def test_no_verify_does_not_load_the_stiffness_solver():
    probe = _solve_in_fresh_interpreter("--no-verify")
    assert probe["status"] == 0
    assert "stiffness_difference" not in probe["result"]["cases"]["default"]["checks"]
    assert not _imported(probe["modules"], "leastwork.verify")


# ---------------------------------------------------------------- member graph counts


def _networkx_counts(structure) -> tuple[int, int]:
    """Parts and cycle rank of the member graph as networkx finds them."""
    import networkx as nx

    g = structure_graph(structure).subgraph(structure.nodes)
    parts = nx.number_connected_components(g)
    return parts, g.number_of_edges() - g.number_of_nodes() + parts


@pytest.mark.parametrize("case", CASES, ids=lambda p: p.stem)
def test_member_graph_counts_agree_with_networkx_on_bundled_cases(case):
    structure = leastwork.load_case(case)
    assert member_graph_counts(structure) == _networkx_counts(structure)


def _bars_case(pairs: list[tuple[int, int]]) -> str:
    """Bars between the given node numbers (repeats allowed); nodes on a parabola so that no
    two coincide; every part pinned at its lowest-numbered node."""
    used = sorted({i for p in pairs for i in p})
    nodes = "\n".join(f"N{i} = [{i}.0, {i * i % 7}.0]" for i in used)
    bars = "\n".join(f'B{k} = {{ nodes = ["N{a}", "N{b}"], EA = "1e5 kN" }}'
                     for k, (a, b) in enumerate(pairs))
    supports = "\n".join(f'N{i} = "pinned"' for i in used)
    return f"[nodes]\n{nodes}\n[bars]\n{bars}\n[supports]\n{supports}\n"


@settings(max_examples=40, deadline=None)
@given(st.lists(st.tuples(st.integers(0, 7), st.integers(0, 7)).filter(lambda p: p[0] != p[1]),
                min_size=1, max_size=14))
def test_member_graph_counts_agree_with_networkx_on_random_graphs(pairs):
    structure = leastwork.loads_case(_bars_case(pairs))
    assert member_graph_counts(structure) == _networkx_counts(structure)


def test_cross_braced_panels_have_three_loops_each():
    """n panels, both diagonals in each: 2(n+1) joints, 5n+1 bars, one part, so the cycle
    rank (members - joints + parts) is 5n+1 - 2(n+1) + 1 = 3n: three closed loops per panel
    of four joints and six bars, counted by hand."""
    n = 4
    pairs = []
    for i in range(n):
        b0, t0, b1, t1 = 2 * i, 2 * i + 1, 2 * i + 2, 2 * i + 3
        pairs += [(b0, b1), (t0, t1), (b0, t1), (t0, b1)]
    pairs += [(2 * i, 2 * i + 1) for i in range(n + 1)]
    structure = leastwork.loads_case(_bars_case(pairs))
    assert member_graph_counts(structure) == (1, 3 * n)


# ---------------------------------------------------------------- unit registry


_UNITS = ["kN", "N", "MN", "lbf", "kip", "m", "mm", "cm", "ft", "inch", "GPa", "MPa", "psi",
          "kN*m", "kN/m", "mm^4", "kN*m^2", "kN*m/rad", "deg", "1/K", "delta_degF"]


def test_the_cached_registry_converts_as_a_freshly_built_one():
    import pint

    fresh = pint.UnitRegistry(autoconvert_offset_to_baseunit=False)
    shared = units.ureg()
    for unit in _UNITS:
        a = shared.Quantity(1.0, unit).to_base_units()
        b = fresh.Quantity(1.0, unit).to_base_units()
        assert a.magnitude == pytest.approx(b.magnitude, rel=1e-15), unit
        assert str(a.units) == str(b.units), unit


def test_the_registry_is_built_without_its_cache_when_the_cache_fails(monkeypatch):
    import pint

    real = pint.UnitRegistry

    def no_cache(*args, **kwargs):
        if kwargs.get("cache_folder") is not None:
            raise PermissionError("read-only cache folder")
        return real(*args, **kwargs)

    monkeypatch.setattr(pint, "UnitRegistry", no_cache)
    reg = units._registry.__wrapped__()  # the uncached builder; the shared one is untouched
    assert reg.cache_folder is None
    fresh = real(autoconvert_offset_to_baseunit=False)
    for unit in _UNITS:
        assert (reg.Quantity(1.0, unit).to_base_units().magnitude
                == pytest.approx(fresh.Quantity(1.0, unit).to_base_units().magnitude,
                                 rel=1e-15)), unit


# ---------------------------------------------------------------- dense solvers of small structures


def _end_forces_and_reactions(result) -> list[float]:
    """Every reaction component and member end force of a stiffness result, in order."""
    values = [v for node in sorted(result.reactions) for _, v in sorted(result.reactions[node].items())]
    return values + [v for m in sorted(result.end_forces) for end in result.end_forces[m] for v in end]


@pytest.mark.parametrize("case", CASES, ids=lambda p: p.stem)
def test_the_dense_stiffness_solve_agrees_with_the_sparse_one(case, monkeypatch):
    """Invariant: the dense solves of a small structure (numpy, no scipy) and the sparse
    ones give the same reactions and end forces to round-off, and the same condition number
    within the sparse estimate's factor (Hager's estimate is a lower bound of the exact
    one-norm condition, seldom below a third of it)."""
    from leastwork.verify import stiffness

    structure = leastwork.load_case(case)
    for name in structure.case_names:
        dense = stiffness.solve_stiffness(structure, name)
        monkeypatch.setattr(stiffness, "DENSE_MAX_DOFS", -1)
        sparse = stiffness.solve_stiffness(structure, name)
        monkeypatch.undo()
        a, b = _end_forces_and_reactions(dense), _end_forces_and_reactions(sparse)
        scale = max(map(abs, a + b), default=1.0) or 1.0
        assert max(abs(x - y) for x, y in zip(a, b, strict=True)) <= 1e-10 * scale
        assert sparse.condition <= dense.condition * (1 + 1e-9) <= 10 * sparse.condition


@pytest.mark.parametrize("case", CASES, ids=lambda p: p.stem)
def test_numpy_and_scipy_solve_the_released_structure_alike(case, monkeypatch):
    """Invariant: the released structure solved by numpy's LU afresh (small structures) and
    by scipy's stored factors give the same redundants to round-off."""
    from leastwork import statics

    structure = leastwork.load_case(case)
    small = leastwork.solve(structure, basis="released", verify=False).to_dict()
    monkeypatch.setattr(statics, "NUMPY_LU_MAX", -1)
    large = leastwork.solve(structure, basis="released", verify=False).to_dict()
    for name, case_result in small["cases"].items():
        ours, theirs = case_result["redundants"], large["cases"][name]["redundants"]
        assert ours.keys() == theirs.keys()
        scale = max([abs(v) for v in theirs.values()] + [1e-300])
        for key, value in ours.items():
            assert value == pytest.approx(theirs[key], abs=1e-10 * scale)


@settings(max_examples=60, deadline=None)
@given(st.lists(st.sampled_from([-2.5, -0.0, 0.0, 1.0, 1.5, 3.0, 7.25]), min_size=1, max_size=30),
       st.lists(st.sampled_from([0.0, 0.5, 1.5, 9.0]), max_size=10))
def test_the_sorting_helpers_give_numpys_median_unique_and_union(values, more):
    """Invariant: the helpers that keep numpy.ma unloaded return numpy's own results."""
    import numpy as np

    from leastwork.arrays import first_and_inverse, median, union

    x = np.array(values)
    assert median(x) == float(np.median(x))
    _, first, inverse = np.unique(x, return_index=True, return_inverse=True)
    ours_first, ours_inverse = first_and_inverse(x)
    assert ours_first.tolist() == first.tolist()
    assert ours_inverse.tolist() == inverse.ravel().tolist()
    assert union(x, np.array(more)).tolist() == np.union1d(x, np.array(more)).tolist()
