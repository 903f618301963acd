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


#: The declared dependencies a plain solve needs: arrays, the dense and sparse solvers, the
#: unit reader and the terminal output. Every other one (the exact-arithmetic and drawing
#: libraries, the graph library) must stay unloaded.
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
