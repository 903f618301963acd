"""The Python API (contract 5.8): a short repr, an HTML view with the diagram, DataFrames,
values by name, a figure, the sheet. Each checked against the JSON result of the same
solution (invariant: one set of numbers behind every output) or an outside value."""

from __future__ import annotations

from pathlib import Path

import pytest

import leastwork

ROOT = Path(__file__).resolve().parents[1]


@pytest.fixture(scope="module")
def shed():
    return leastwork.solve(leastwork.load_case(ROOT / "cases" / "shed-rod-bracing.toml"))


def test_repr_is_short_even_for_a_large_structure():
    # a 60-span continuous beam: the repr still names a few redundants and counts the rest
    n = 60
    st = leastwork.structure(
        nodes={f"N{i}": [4.0 * i, 0] for i in range(n + 1)},
        beams={f"S{i}": {"nodes": [f"N{i}", f"N{i + 1}"], "EI": "5000 kN*m^2"}
               for i in range(n)},
        supports={f"N{i}": "pinned" if i == 0 else "roller" for i in range(n + 1)},
        loads=[{"member": f"S{i}", "wy": -1} for i in range(n)])
    text = repr(leastwork.solve(st))
    assert len(text) < 2000 and "and 53 more" in text


def test_repr_names_the_essentials(shed):
    text = repr(shed)
    assert len(text) < 2000 and text.count("\n") <= 4
    assert "degree 3" in text and "R1, R2, B.x" in text and "equilibrium OK" in text


def test_html_view_has_the_tables_and_the_diagram(shed):
    html = shed._repr_html_()
    assert "<table>" in html and "<svg" in html and "qualified engineer" in html
    assert "<?xml" not in html  # an inline figure, not a document


def test_frames_match_the_json_result(shed):
    d = shed.to_dict()["cases"]["east"]
    f = shed.to_frames("east")
    for node, comps in d["reactions"].items():
        for k, v in comps.items():
            assert f["reactions"].loc[node, k] == v
    for mid, m in d["members"].items():
        assert f["members"].loc[mid, "start.n"] == m["start"]["n"]
        assert f["members"].loc[mid, "end.m"] == m["end"]["m"]
        assert f["members"].loc[mid, "m_max"] == m["m_max"]["value"]
    every = shed.to_frames()
    assert every["reactions"].loc[("east", "A"), "y"] == d["reactions"]["A"]["y"]


def test_accessors_match_the_json_result(shed):
    d = shed.to_dict()["cases"]["west"]
    assert shed.reaction("B", "x", case="west") == d["reactions"]["B"]["x"]
    m = d["members"]["DC"]
    assert shed.section_force("DC", "m", 0.0, case="west") == pytest.approx(
        m["start"]["m"], abs=1e-12 * abs(m["m_min"]["value"]))
    assert shed.section_force("DC", "m", 6.0, case="west") == pytest.approx(
        m["end"]["m"], abs=1e-12 * abs(m["m_min"]["value"]))
    with pytest.raises(leastwork.CaseError, match="name the load case"):
        shed.reaction("A", "y")
    with pytest.raises(leastwork.CaseError, match='no reaction "A.rz"'):
        shed.reaction("A", "rz", case="west")


def test_values_by_name_against_closed_forms():
    # propped cantilever under w (handbook, from memory): prop 3wL/8; moment at x from
    # the prop side m = R (L - x) - w (L - x)^2 / 2; end slope at the prop wL^3/(48EI)
    w, L, EI = 12.0, 5.0, 9000.0
    st = leastwork.structure(
        structure={"name": "propped", "units": {"force": "kN", "length": "m"}},
        nodes={"A": [0, 0], "B": [L, 0]},
        beams={"AB": {"nodes": ["A", "B"], "EI": f"{EI} kN*m^2"}},
        supports={"A": "fixed", "B": "roller"},
        loads=[{"member": "AB", "wy": f"-{w} kN/m"}])
    sol = leastwork.solve(st)
    R = 3 * w * L / 8
    assert sol.reaction("B", "y") == pytest.approx(R, rel=1e-12)
    x = 2.0
    assert sol.section_force("AB", "m", x) == pytest.approx(
        R * (L - x) - w * (L - x) ** 2 / 2, rel=1e-10)
    assert sol.displacement("B.rz") == pytest.approx(w * L**3 / (48 * EI), rel=1e-10)
    # a point inside the member by the unit-load method (wx^2(3L^2 - 5Lx + 2x^2)/(48EI)
    # from the fixed end, handbook)
    assert sol.displacement("AB@2.5.y") == pytest.approx(
        -w * 2.5**2 * (3 * L**2 - 5 * L * 2.5 + 2 * 2.5**2) / (48 * EI), rel=1e-9)


def test_structure_in_code_is_checked_like_a_file():
    with pytest.raises(leastwork.CaseError, match=r"\[beams\] AB"):
        leastwork.structure(nodes={"A": [0, 0], "B": [1, 0]},
                            beams={"AB": {"nodes": ["A", "B"]}}, supports={"A": "fixed"})


def test_figure_sheet_and_steps(shed, tmp_path):
    fig = shed.plot("east")
    assert fig.__class__.__name__ == "Figure" and len(fig.axes) >= 4
    path = tmp_path / "shed.html"
    shed.report(path, case="east")
    assert "Step 5" in path.read_text() and "qualified engineer" in path.read_text()
    with pytest.raises(leastwork.CaseError, match="exists"):
        shed.report(path, case="east")
    shed.report(path, case="east", force=True)
    text = shed.steps("east")
    assert "Step 6" in text and "R2" in text


def test_type_information_is_shipped():
    assert (Path(leastwork.__file__).parent / "py.typed").exists()


def test_the_python_tutorial_runs_top_to_bottom(monkeypatch):
    # docs/python.md: every python block, in order, in one namespace, from the top folder
    import re

    import matplotlib

    matplotlib.use("Agg")
    text = (ROOT / "docs" / "python.md").read_text(encoding="utf-8")
    blocks = re.findall(r"```python\n(.*?)```", text, flags=re.S)
    assert len(blocks) >= 6
    monkeypatch.chdir(ROOT)
    namespace: dict = {}
    for block in blocks:
        exec(compile(block, "docs/python.md", "exec"), namespace)  # noqa: S102
    assert namespace["every"]["reactions"].shape[0] > 0
