"""The audit trail (--steps) and the calculation sheets (--format md/latex, -o).

Checks are invariants of the method: every contribution table sums to the coefficient the
solver used (delta = B'FB term by term; load terms term by term), the per-segment
integrals of M0*mi/EI sum to the bending part of the load terms, the unit-load
contributions sum to the displacement, and every number the sheet shows from the result
equals the JSON result.
"""

from __future__ import annotations

import json
from pathlib import Path

import numpy as np
import pytest

from leastwork import load_case, solve
from leastwork.cli import main
from leastwork.output.audit import audit_sheet
from leastwork.output.sheet import Grid, fmt, split_grid

CASES = sorted((Path(__file__).resolve().parents[1] / "cases").glob("*.toml"))


def _grids(sheet):
    for step in sheet.steps:
        for b in step.blocks:
            if isinstance(b, Grid):
                yield step.number, b


@pytest.fixture(scope="module", params=CASES, ids=lambda p: p.stem)
def solved(request):
    sol = solve(load_case(request.param))
    return request.param, sol, audit_sheet(sol)


def test_every_total_row_is_the_sum_of_its_column(solved):
    _, _, sheet = solved
    n_checked = 0
    for number, g in _grids(sheet):
        if g.total is None:
            continue
        for k, tot in enumerate(g.total):
            if isinstance(tot, str):
                continue
            col = np.array([r[k] for r in g.rows], dtype=float)
            scale = max(np.abs(col).sum(), abs(tot), 1e-300)
            assert abs(col.sum() - tot) <= 1e-9 * scale, (number, g.title, g.headers[k])
            n_checked += 1
    assert n_checked > 0


def test_segment_integrals_equal_the_bending_load_terms(solved):
    """Step 3's integrals of M0*mi/EI per segment sum to step 4's bending contributions."""
    _, sol, sheet = solved
    grids = list(_grids(sheet))
    for case in sol.cases:
        seg = [g for n, g in grids if n == 3 and g.title.startswith(f"Load case {case}: bending")]
        terms = [g for n, g in grids if n == 4 and g.title.startswith(f"Load case {case}: load")]
        if not seg or not terms or not sol.redundant_names:
            continue
        seg_tot = np.array(seg[0].total[4:], dtype=float)
        rows = [r for r in terms[0].rows if r[1] == "loads, bending"]
        bend = np.sum([np.array(r[2:], dtype=float) for r in rows], axis=0) if rows else 0.0
        scale = max(np.max(np.abs(seg_tot)), 1e-300)
        assert np.allclose(seg_tot, bend, rtol=0, atol=1e-9 * scale)


def test_flexibility_total_equals_json_and_solver(solved):
    _, sol, sheet = solved
    d = sol.to_dict()
    first = next(iter(d["cases"].values()))
    nr = len(sol.redundant_names)
    if not nr:
        return
    g = next(g for n, g in _grids(sheet) if n == 4 and g.title.startswith("Flexibility"))
    pairs = [(i, j) for i in range(nr) for j in range(i, nr)]
    for k, (i, j) in enumerate(pairs):
        assert g.total[2 + k] == first["flexibility"][i][j]


@pytest.mark.parametrize("case", CASES, ids=lambda p: p.stem)
def test_steps_text_shows_the_json_numbers(case, capsys, monkeypatch):
    """`--steps` on the terminal (80 columns) prints every redundant, reaction and end force
    of the JSON result, formatted alike, and no line is wider than 80 characters."""
    monkeypatch.setenv("COLUMNS", "80")
    assert main(["solve", str(case), "--steps"]) == 0
    steps = capsys.readouterr().out
    assert main(["solve", str(case), "--json"]) == 0
    js = json.loads(capsys.readouterr().out)
    assert max(len(line) for line in steps.splitlines()) <= 80, case.name
    for res in js["cases"].values():
        values = [*res["redundants"].values()]
        values += [v for r in res["reactions"].values() for v in r.values()]
        values += [m[e][q] for m in res["members"].values() for e in ("start", "end")
                   for q in "nvm"]
        values += [*res["displacements"].values(), *res["load_terms"]]
        values += [x for row in res["flexibility"] for x in row]
        for v in values:
            assert fmt(v) in steps, (case.name, v)
    for n in range(1, 9):
        assert f"Step {n} " in steps


def test_displacement_contributions_sum_to_the_result():
    """Unit-load contributions (virtual work per member and term) add up to the
    displacement of the JSON result (braced bay: distance change and node displacements)."""
    case = next(c for c in CASES if c.stem == "braced-bay-fitup")
    sol = solve(load_case(case))
    sheet = audit_sheet(sol)
    found = [g for n, g in _grids(sheet) if n == 7 and "displacement" in g.title]
    assert found
    for g in found:
        col = np.array([r[2] for r in g.rows], dtype=float)
        assert abs(col.sum() - g.total[2]) <= 1e-9 * max(np.abs(col).sum(), 1e-300)


def test_wide_tables_split_keep_key_columns():
    g = Grid("t", ("member", "term", *[f"c{i}" for i in range(12)]),
             (("A", "x", *[123456.789] * 12),), keys=2, total=("s", "t", *[1.0] * 12))
    parts = split_grid(g, 60)
    assert len(parts) > 1
    assert all(p.headers[:2] == ("member", "term") for p in parts)
    assert sum(len(p.headers) - 2 for p in parts) == 12


def test_markdown_sheet_written_and_never_overwritten(tmp_path, capsys):
    case = next(c for c in CASES if c.stem == "floor-beam-3span")
    out = tmp_path / "sheet.md"
    assert main(["solve", str(case), "--steps", "--format", "md", "-o", str(out)]) == 0
    text = out.read_text()
    js = solve(load_case(case)).to_dict()
    for n in range(1, 9):
        assert f"## Step {n}." in text
    for res in js["cases"].values():
        for v in res["redundants"].values():
            assert fmt(v) in text
    assert "qualified engineer" in text and "Linear elastic" in text
    before = out.read_text()
    capsys.readouterr()
    assert main(["solve", str(case), "--format", "md", "-o", str(out)]) == 2
    assert "--force" in capsys.readouterr().err
    assert out.read_text() == before
    assert main(["solve", str(case), "--format", "md", "-o", str(out), "--force",
                 "--case", "dead"]) == 0
    assert out.read_text() != before
    # the case file itself is never overwritten, even with --force
    copy = tmp_path / "case.toml"
    copy.write_text(case.read_text())
    assert main(["solve", str(copy), "--json", "-o", str(copy), "--force"]) == 2
    assert copy.read_text() == case.read_text()


def test_latex_sheet_is_balanced(tmp_path):
    case = next(c for c in CASES if c.stem == "portal-frame")
    out = tmp_path / "sheet.tex"
    assert main(["solve", str(case), "-o", str(out)]) == 0
    tex = out.read_text()
    assert tex.startswith("\\documentclass") and tex.rstrip().endswith("\\end{document}")
    assert tex.count("\\begin{tabular}") == tex.count("\\end{tabular}") > 5
    body = tex.replace("\\{", "").replace("\\}", "")
    assert body.count("{") == body.count("}")
    assert "δ" not in tex and "∫" not in tex  # Unicode maths turned into LaTeX


def test_output_format_needs_a_known_suffix(tmp_path, capsys):
    case = CASES[0]
    assert main(["solve", str(case), "-o", str(tmp_path / "x.pdf")]) == 2
    assert "suffix" in capsys.readouterr().err
    assert not (tmp_path / "x.pdf").exists()
