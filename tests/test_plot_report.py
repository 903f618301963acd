"""Diagrams (PNG, SVG) and calculation reports (HTML, Markdown with diagram files).

Outside values — a propped cantilever, fixed at A (x = 0) and on a roller at B (x = L),
under a uniform load w (beam diagrams and formulas for a beam fixed at one end and
supported at the other, uniformly distributed load, as tabulated in steel design manuals;
from memory):
  * end shear at the fixed end 5wL/8, at the roller -3wL/8 (v = dm/dx, so v is positive
    near the left support of a downward-loaded beam, docs/conventions.md);
  * moment at the fixed end -wL²/8 (hogging), largest sagging moment 9wL²/128;
  * deflection measured from the roller y(s) = w s (L³ - 3 L s² + 2 s³) / (48 EI), largest
    at s = L (1 + √33) / 16 (about wL⁴/185EI).
Common practice: a hogging moment stretches the top fibres, so a moment diagram drawn on
the tension side lies above a horizontal beam over a fixed end and below it mid-span.

The rest are invariants of the output: files that decode to non-blank images, SVG that is
well-formed XML with paths and text, HTML that is well-formed, self-contained and carries
every redundant, Markdown that links the diagram files it is returned with, and a page that
a headless browser renders to something that is not blank.
"""

from __future__ import annotations

import math
import shutil
import subprocess
import xml.etree.ElementTree as ET
from functools import cache
from pathlib import Path

import numpy as np
import pytest

import leastwork
from leastwork.errors import CaseError
from leastwork.output.html import image_names, report_html, report_markdown_files
from leastwork.output.plot import (
    DEFLECTION_SHARE,
    deflection_scale,
    diagram_lines,
    figure_svg,
    parse_diagrams,
    plot_case,
)
from leastwork.output.plot.numbers import magnitude, number
from leastwork.output.sheet import fmt
from leastwork.verify.cross_check import StiffnessCheck

CASES = sorted((Path(__file__).parent.parent / "cases").glob("*.toml"))
SVG = "{http://www.w3.org/2000/svg}"


@cache
def solved(name: str):
    return leastwork.solve(leastwork.load_case(Path(__file__).parent.parent / "cases" / name))


def _redundant_labels(sol) -> list[str]:
    """The redundants as the structure panel writes them (3 significant figures, a true
    minus sign)."""
    data = sol.to_dict()
    unit = {n: (f"{data['units']['force']}·{sol.structure.units.length}"
                if n.endswith(".rz") or n.endswith(".m") else data["units"]["force"])
            for n in data["redundants"]}
    return [f"X{i + 1} = {n} = {number(cj['redundants'][n])} {unit[n]}"
            for cj in data["cases"].values() for i, n in enumerate(data["redundants"])]


def _svg_texts(root) -> str:
    return "\n".join("".join(t.itertext()) for t in root.iter(f"{SVG}text"))


def _not_blank(png: Path) -> tuple[float, float]:
    """(standard deviation of the grey level, share of pixels that are not white)."""
    import matplotlib.image

    img = matplotlib.image.imread(str(png))
    grey = img[..., :3].mean(axis=2) if img.ndim == 3 else img
    return float(grey.std()), float(np.mean(grey < 0.95))


# ---------------------------------------------------------------------------- every bundled case


@pytest.mark.parametrize("path", CASES, ids=[p.stem for p in CASES])
def test_every_bundled_case_plots_to_png_and_svg(path, tmp_path):
    sol = solved(path.name)
    png, svg = tmp_path / "d.png", tmp_path / "d.SVG"
    plot_case(sol, png)
    plot_case(sol, svg)
    assert png.read_bytes()[:8] == b"\x89PNG\r\n\x1a\n" and png.stat().st_size > 30_000
    spread, inked = _not_blank(png)
    assert spread > 0.05 and 0.005 < inked < 0.6, (spread, inked)
    root = ET.parse(svg).getroot()
    assert root.tag == f"{SVG}svg"
    assert sum(1 for _ in root.iter(f"{SVG}path")) > 50
    texts = _svg_texts(root)
    assert sol.structure.name in texts
    for case in sol.cases:  # one band of panels per load case, every diagram named
        for what in ("structure", "axial force n", "deflected shape"):
            assert f"{case}: {what}" in texts
    for label in _redundant_labels(sol):
        assert label in texts, label


def test_bad_requests_are_case_errors(tmp_path):
    sol = solved("canopy-prop.toml")
    with pytest.raises(CaseError, match=r"\.png or \.svg"):
        plot_case(sol, tmp_path / "d.pdf")
    with pytest.raises(CaseError, match="unknown load case"):
        plot_case(sol, tmp_path / "d.png", case="snow")
    with pytest.raises(CaseError, match='unknown diagram "torsion"'):
        plot_case(sol, tmp_path / "d.png", diagrams="m,torsion")
    with pytest.raises(CaseError, match="no diagram"):
        parse_diagrams(" , ")
    assert not list(tmp_path.iterdir())
    with pytest.raises(CaseError, match="unknown load case"):
        report_html(sol, ["snow"])


def test_chosen_diagrams_only():
    sol = solved("canopy-prop.toml")
    texts = _svg_texts(ET.fromstring(figure_svg(sol, "default", "m, deflected")))
    assert "default: bending moment m" in texts and "default: deflected shape" in texts
    assert "shear force" not in texts and "structure, loads" not in texts


# ---------------------------------------------------------------------------- outside values

W, L, EI = 10.0, 6.0, 20000.0  # kN/m, m, kN*m^2

PROPPED = f"""
[structure]
name = "Propped lintel"
units = {{ force = "kN", length = "m" }}
[nodes]
A = [0, 0]
B = [{L}, 0]
[beams]
AB = {{ nodes = ["A", "B"], EI = "{EI} kN*m^2" }}
[supports]
A = "fixed"
B = "roller"
[[loads]]
member = "AB"
wy = "-{W} kN/m"
"""


def test_propped_cantilever_diagrams_match_the_closed_forms():
    sol = leastwork.solve(leastwork.loads_case(PROPPED))
    m = diagram_lines(sol, "default", "m")["AB"]
    v = diagram_lines(sol, "default", "v")["AB"]
    assert math.isclose(m["value"][0], -W * L**2 / 8, rel_tol=1e-9)
    assert math.isclose(v["value"][0], 5 * W * L / 8, rel_tol=1e-9)
    assert math.isclose(v["value"][-1], -3 * W * L / 8, rel_tol=1e-9)
    assert max(m["value"]) <= 9 * W * L**2 / 128 * (1 + 1e-9)
    assert max(m["value"]) > 0.995 * 9 * W * L**2 / 128
    # tension side: above the beam over the fixed end, below it where it sags
    k = int(np.argmax(m["value"]))
    assert m["points"][0, 1] > 0 and m["points"][k, 1] < 0
    assert v["points"][0, 1] > 0 > v["points"][-1, 1]  # v: + on local +y (up)
    # the labels carry the closed-form values (3 significant figures): moments without
    # sign (the tension side shows the sense), shear forces with it
    texts = _svg_texts(ET.fromstring(figure_svg(sol))).split()
    for value in (-W * L**2 / 8, 9 * W * L**2 / 128):
        assert magnitude(value) in texts, value
    for value in (5 * W * L / 8, -3 * W * L / 8):
        assert number(value) in texts, value


def test_deflected_shape_magnification_and_largest_deflection():
    sol = leastwork.solve(leastwork.loads_case(PROPPED))
    factor, umax, where = deflection_scale(sol, "default")
    s = L * (1 + math.sqrt(33)) / 16
    exact = W * s * (L**3 - 3 * L * s**2 + 2 * s**3) / (48 * EI)
    assert math.isclose(umax, exact, rel_tol=2e-3)
    assert where.startswith("AB at ")
    assert math.isclose(float(where.split()[2]), L - s, abs_tol=L / 40)
    # the largest displacement is drawn at 5 % to 10 % of the structure's size
    assert DEFLECTION_SHARE / 2 * L < factor * umax <= DEFLECTION_SHARE * L
    texts = _svg_texts(ET.fromstring(figure_svg(sol, "default", "deflected")))
    assert f"displacements drawn × {number(factor, 1)}" in texts


# ---------------------------------------------------------------------------- reports


def _html_root(text: str):
    assert text.startswith("<!DOCTYPE html>")
    return ET.fromstring(text[len("<!DOCTYPE html>"):])


@pytest.mark.parametrize("name", ["floor-beam-3span.toml", "tied-beam.toml"])
def test_html_report_is_whole_and_self_contained(name):
    sol = solved(name)
    text = report_html(sol, meta={"Prepared with": "leastwork test", "Date": "2031-04-05"})
    root = _html_root(text)  # well-formed: every piece of text escaped
    data = sol.to_dict()
    for cj in data["cases"].values():
        for value in cj["redundants"].values():
            assert f">{fmt(value)}<" in text
    # one figure per load case, or a case's panels gathered into figures that fit a page
    assert text.count("<figcaption>") == len(sol.cases) <= text.count("<svg")
    assert len({e.get("id") for e in root.iter() if e.get("id")}) == \
        sum(1 for e in root.iter() if e.get("id"))  # ids stay unique across figures
    for step in range(1, 9):
        assert f'id="step-{step}"' in text
    assert "2031-04-05" in text and "leastwork test" in text
    assert "@media print" in text and "break-inside: avoid" in text
    assert "direct-stiffness" in text and "Caution" in text
    lowered = text.lower()
    for external in ("src=", "<link", "<script", "@import", "url(http", 'href="http'):
        assert external not in lowered, external


def test_html_escapes_text_and_marks_failed_checks():
    text = PROPPED.replace('"Propped lintel"', '"Lintel <b>&amp; \\"$1$\\" co"')
    sol = leastwork.solve(leastwork.loads_case(text))
    sol.cases["default"].stiffness = StiffnessCheck(3e-3, "AB end m")
    out = report_html(sol)
    root = _html_root(out)
    assert root.find(".//h1").text == 'Lintel <b>&amp; "$1$" co'
    assert "<b>&amp;" not in out and "&lt;b&gt;&amp;amp;" in out
    alarms = [p for p in root.iter("p") if p.get("class") == "tone-alarm"]
    assert alarms and all(p.get("role") == "alert" for p in alarms)
    assert any("FAILED" in "".join(p.itertext()) for p in alarms)


def test_markdown_report_links_the_diagram_files(tmp_path):
    sol = solved("settlement-and-heat.toml")
    md = tmp_path / "rack calc.md"
    files = report_markdown_files(sol, md, meta={"Date": "2031-04-05"})
    assert list(files)[0] == md
    images = list(files)[1:]
    assert [p.name for p in images] == list(image_names(md, sol.cases).values())
    assert len(images) == len(sol.cases) and all(p.parent == tmp_path for p in images)
    text = files[md]
    for p, case in zip(images, sol.cases, strict=True):
        link = f"![Diagrams of load case {case}]({p.name.replace(' ', '%20')})"
        assert link in text
        root = ET.fromstring(files[p])
        assert f"{case}: bending moment m" in _svg_texts(root)
    for cj in sol.to_dict()["cases"].values():
        for value in cj["redundants"].values():
            assert fmt(value) in text
    assert "| Date | 2031-04-05 |" in text and "## Step 8." in text  # the title block
    assert not list(tmp_path.iterdir())  # nothing written


def _browser() -> str | None:
    return next((b for b in map(shutil.which, ("chromium", "chromium-browser")) if b), None)


def test_html_report_renders_in_a_headless_browser(tmp_path):
    browser = _browser()
    if browser is None:
        pytest.skip("chromium is not installed (apt-get install chromium)")
    page = tmp_path / "report.html"
    page.write_text(report_html(solved("portal-frame.toml"), ["wind"]), encoding="utf-8")
    shot = tmp_path / "shot.png"
    run = subprocess.run([browser, "--headless", "--no-sandbox", "--disable-gpu",
                          f"--screenshot={shot}", "--window-size=1200,1600",
                          page.as_uri()], capture_output=True, text=True, timeout=180,
                         cwd=tmp_path)
    assert shot.exists(), run.stderr[-2000:]
    spread, inked = _not_blank(shot)
    assert spread > 0.05 and inked > 0.01, (spread, inked)
