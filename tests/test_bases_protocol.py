"""The two bases of the force method behind one protocol, and the one module of thresholds.

Invariants of the design (no outside values): both bases declare ``basis.Basis`` and their
solvers ``basis.CompatibilitySolver``; what shared code asks of a basis agrees with what the
solve produced; ``thresholds`` holds documented constants and imports nothing of the package.
"""

from __future__ import annotations

import ast
import dataclasses
from pathlib import Path

import numpy as np
import pytest

import leastwork
from leastwork import thresholds
from leastwork.basis import Basis, CompatibilitySolver
from leastwork.studies.reanalysis import reanalyse

ROOT = Path(__file__).resolve().parents[1]
CASE = ROOT / "cases" / "portal-frame.toml"


def _case():
    return dataclasses.replace(leastwork.load_case(CASE), redundants=None)


@pytest.mark.parametrize("basis", ["released", "local"])
def test_both_bases_declare_the_protocols(basis):
    sol = leastwork.solve(_case(), basis=basis, verify=False)
    rel = sol.released
    assert isinstance(rel, Basis) and rel.kind == sol.basis == basis
    assert isinstance(sol.flexibility_solver, CompatibilitySolver)
    assert list(rel.redundants) == list(sol.redundant_columns)
    assert rel.redundant_names == sol.redundant_names
    B = rel.states()
    dense = B.toarray() if hasattr(B, "toarray") else B
    ref = sol.B.toarray() if hasattr(sol.B, "toarray") else sol.B
    np.testing.assert_array_equal(dense, ref)
    # the unknowns: redundants on the released basis, state amplitudes on the local one
    for res in sol.cases.values():
        assert (res.amplitudes is not None) == rel.amplitudes
    eps = float(np.finfo(float).eps)
    assert rel.state_accuracy == (thresholds.LOCAL_STATE_ACCURACY if rel.amplitudes else eps)
    assert (rel.stability_basis(sol.B) is None) == (basis == "released")


@pytest.mark.parametrize("basis", ["released", "local"])
def test_reanalysis_asks_the_basis_for_its_solver(basis):
    sol = leastwork.solve(_case(), basis=basis, verify=False)
    again = reanalyse(sol, sol.structure, verify=False)
    assert type(again.flexibility_solver) is type(sol.flexibility_solver)
    assert type(again.F) is type(sol.F)
    for name, res in sol.cases.items():
        np.testing.assert_allclose(again.cases[name].s, res.s, rtol=0, atol=1e-9 * max(
            1.0, float(np.max(np.abs(res.s)))))


def test_thresholds_are_documented_and_import_nothing_of_the_package():
    source = Path(thresholds.__file__).read_text(encoding="utf-8")
    tree = ast.parse(source)
    assert not [n for n in ast.walk(tree) if isinstance(n, ast.ImportFrom) and n.level]
    lines = source.splitlines()
    names = []
    for node in tree.body:
        if isinstance(node, ast.Assign) and isinstance(node.targets[0], ast.Name):
            name = node.targets[0].id
            if name == "__all__":
                continue
            names.append(name)
            assert lines[node.lineno - 2].startswith("#:"), f"{name} has no doc comment"
            assert isinstance(getattr(thresholds, name), int | float)
    assert sorted(names) == sorted(thresholds.__all__)
