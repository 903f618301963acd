"""Calculation sheets and the terminal as an engineer files and reads them: engineering
rounding with round-off shown as 0, the title block from [project], typeset formulas
(well-formed MathML), the unit-load state of step 7, the trade's words for supports and
bars, the narrow terminal, and the printed page count."""

from __future__ import annotations

import io
import os
import re
import shutil
import subprocess
import sys
import xml.etree.ElementTree as ET
from pathlib import Path

import pytest
from rich.console import Console

import leastwork
from leastwork.output.audit import audit_sheet
from leastwork.output.conventions import SECTION_FORCES
from leastwork.output.documents import sheet_latex, sheet_markdown
from leastwork.output.html import report_html
from leastwork.output.mathml import latex_mathml
from leastwork.output.sheet import Grid, fmt, shown
from leastwork.output.terminal import print_steps, print_summary

CASES = sorted((Path(__file__).parent.parent / "cases").glob("*.toml"))

# A cantilever-like beam A (fixed) - B - C (roller) under a uniform load; redundant C.y,
# so the released structure is the cantilever A-C (invented demo numbers).
PROPPED = """
[project]
title = "Store room shelf beam"
job = "T-0042"
by = "A. Tester"
checked = "B. Checker"
revision = "C"

[structure]
name = "Propped shelf beam"
units = { force = "kN", length = "m" }

[nodes]
A = [0, 0]
B = [3, 0]
C = [5, 0]

[beams]
AB = { nodes = ["A", "B"], EI = "5000 kN*m^2" }
BC = { nodes = ["B", "C"], EI = "5000 kN*m^2" }

[supports]
A = "fixed"
C = "roller"

[[loads]]
member = "AB"
wy = "-2 kN/m"

[[loads]]
member = "BC"
wy = "-2 kN/m"

[analysis]
redundants = ["C.y"]
displacements = ["B.y"]
"""


@pytest.fixture(scope="module")
def propped():
    return leastwork.solve(leastwork.loads_case(PROPPED, source="/somewhere/deep/shelf.toml"))


# ------------------------------------------------------------------ numbers


@pytest.mark.parametrize("value, text", [
    (0.1 + 0.2, "0.300"),        # three significant figures, trailing zeros kept
    (-0.9, "-0.900"),
    (45.0004, "45.0"),
    (107.6, "108"),
    (-30.2574, "-30.3"),
    (3.07065e-06, "3.07×10⁻⁶"),  # a power of ten, never e-notation
    (-1234567.0, "-1.23×10⁶"),
    (0.0, "0"),
])
def test_engineering_rounding(value, text):
    # common practice: three significant figures, trailing zeros kept, powers of ten
    # written out
    assert fmt(value) == text


def test_more_figures_on_request_and_full_precision_in_json(propped, tmp_path):
    from leastwork.cli import main

    assert fmt(-30.2574, 5) == "-30.257"
    case = tmp_path / "shelf.toml"
    case.write_text(PROPPED)
    # the propped cantilever's prop reaction is 3wL/8 = 3.75 kN (handbook closed form,
    # from memory): three figures print 3.75, five print 3.7500
    for n, text in ((None, "3.75 kN"), ("5", "3.7500 kN")):
        args = ["solve", str(case), "--no-color", "--quiet"] + (["--figures", n] if n else [])
        out = subprocess.run([sys.executable, "-m", "leastwork", *args], capture_output=True,
                             text=True, env={**os.environ, "COLUMNS": "80"})
        assert out.returncode == 0 and text in out.stdout, out.stdout
    assert main(["solve", str(case), "--figures", "2"]) == 2
    data = propped.to_dict()
    assert data["cases"]["default"]["redundants"]["C.y"] == pytest.approx(3.75, rel=1e-12)


@pytest.mark.parametrize("x", [1e-30, 3.3e-16, 7e-7, 0.0123, 1.0, 987.6, 4.5e5, 6.1e9, 2e300])
def test_no_e_notation_at_any_magnitude(x):
    for v in (x, -x):
        assert not re.search(r"\de[-+]?\d", fmt(v)), fmt(v)
        assert len(fmt(v).replace("-", "")) <= 12


def test_round_off_in_a_column_is_zero_and_not_bold():
    g = Grid("t", ("member", "δ11"), (("AB", 3.07e-6), ("BC", 1.2e-4)),
             total=("total", 6.35275e-22))
    assert shown(g).total[1] == 0.0  # 1e-17 of the column's largest: round-off
    assert shown(g).rows == g.rows   # real values untouched
    md = sheet_markdown(audit_sheet(leastwork.solve(leastwork.loads_case(PROPPED))))
    assert "**0**" not in md
    assert not re.search(r"\de[-+]\d", md)


# ------------------------------------------------------------------ title block


def test_title_block_in_every_format(propped):
    sheet = audit_sheet(propped, meta={"Date": "2026-01-01"})
    assert sheet.source == "shelf.toml"  # the name, not the path it was read from
    texts = {"html": report_html(propped, meta={"Date": "2026-01-01"}),
             "md": sheet_markdown(sheet), "latex": sheet_latex(sheet)}
    buf = Console(file=io.StringIO(), width=80, color_system=None)
    print_steps(buf, propped)
    texts["steps"] = buf.file.getvalue()
    for fmt_name, text in texts.items():
        for field in ("Store room shelf beam", "T-0042", "A. Tester", "B. Checker",
                      "shelf.toml", "Propped shelf beam"):
            assert field in text, (fmt_name, field)
        assert "/somewhere/deep" not in text, fmt_name
    assert "counter(pages)" in texts["html"]       # sheet n of N in print
    assert r"\pageref{sheet-last-page}" in texts["latex"]


def test_project_table_bad_key_is_one_line(tmp_path):
    path = tmp_path / "bad.toml"
    path.write_text(PROPPED.replace('revision = "C"', 'revison = "C"'))
    out = subprocess.run([sys.executable, "-m", "leastwork", "solve", str(path)],
                         capture_output=True, text=True)
    assert out.returncode == 2
    assert "[project]" in out.stderr and "revision" in out.stderr
    assert "Traceback" not in out.stderr and len(out.stderr.strip().splitlines()) == 1


# ------------------------------------------------------------------ formulas


def test_mathml_well_formed_for_every_formula(propped):
    html = report_html(propped)
    maths = re.findall(r"<math\b.*?</math>", html, flags=re.S)
    sheet = audit_sheet(propped)
    typeset = [b for s in sheet.steps for b in s.blocks if getattr(b, "latex", None)]
    assert typeset and len(maths) == len(typeset)
    for m in maths:
        root = ET.fromstring(m)  # raises on a malformed element
        assert root.tag == "math"
    assert "<script" not in html  # offline: nothing to fetch or run


def test_mathml_fraction_and_subscript():
    root = ET.fromstring(latex_mathml(r"\delta_{11} = \frac{L}{EA}"))
    assert root.find(".//mfrac") is not None and root.find(".//msub") is not None


# ------------------------------------------------------------------ steps


def test_step7_shows_the_unit_load_moment(propped):
    sheet = audit_sheet(propped)
    step7 = next(s for s in sheet.steps if s.number == 7)
    state = next(b for b in step7.blocks
                 if isinstance(b, Grid) and b.title.startswith("Unit-load state for B.y"))
    rows = {r[0]: r for r in state.rows}
    # released structure: the cantilever A-C; an upward unit load at B (x = 3 m) gives
    # m_u(x) = 3 - x on AB (sagging +) and nothing on BC (statics of a cantilever,
    # common practice)
    assert rows["AB"][2] == "3 - x"
    assert "BC" not in rows
    contributions = next(b for b in step7.blocks
                         if isinstance(b, Grid) and b.title.endswith("displacement B.y"))
    labels = [(r[0], r[1]) for r in contributions.rows]
    assert len(labels) == len(set(labels))  # every row says which term it is
    span = [t for _, t in labels if t.startswith("span loads (bending)")]
    assert span and all(t.endswith(("start term", "end term")) for t in span)


def test_inputs_echo_supports_and_sections():
    text = (Path(__file__).parent.parent / "cases" / "tied-beam.toml").read_text()
    sol = leastwork.solve(leastwork.loads_case(text))
    sheet = sheet_markdown(audit_sheet(sol))
    assert "pinned" in sheet and "support yes" not in sheet
    for word in ("steel", "ub254", "E \\[", "A \\[", "I \\["):  # Markdown escapes [
        assert word in sheet, word


def test_truss_tables_have_no_empty_v_and_m_columns():
    sol = leastwork.load_case(CASES[0].parent / "footbridge-truss.toml")
    sheet = audit_sheet(leastwork.solve(sol))
    step6 = next(s for s in sheet.steps if s.number == 6)
    forces = [b for b in step6.blocks if isinstance(b, Grid) and "bar forces" in b.title]
    assert forces
    for g in forces:
        assert not any(h.startswith(("v ", "m ")) for h in g.headers)
        assert "left out" in g.title  # says why
        assert {r[-1] for r in g.rows} <= {"T", "C", "-"}


def test_sign_convention_worded_once(propped):
    sheet = sheet_markdown(audit_sheet(propped))
    buf = Console(file=io.StringIO(), width=200, color_system=None)
    print_summary(buf, propped)
    assert SECTION_FORCES.replace("-", "\\-").replace("+", "\\+") in sheet.replace(
        "\\(", "(") or SECTION_FORCES in sheet
    assert SECTION_FORCES in buf.file.getvalue().replace("\n", " ")


# ------------------------------------------------------------------ terminal


def _uncut(out: str, width: int) -> None:
    """Nothing cut: no ellipsis, no line wider than the console, and every table line
    closed by its right border (a table cropped at the edge would lose it)."""
    assert "…" not in out
    assert max(len(line) for line in out.splitlines()) <= width
    for line in out.splitlines():
        if line[:1] in "│┃┏┡└├┗┣":
            assert line.rstrip()[-1] in "│┃┓┩┘┤┛┫", line


@pytest.mark.parametrize("path", CASES, ids=lambda p: p.stem)
def test_steps_never_cut_at_60_columns(path):
    sol = leastwork.solve(leastwork.load_case(path))
    for width in (60, 80):
        buf = Console(file=io.StringIO(), width=width, color_system=None, highlight=False)
        print_steps(buf, sol)
        out = buf.file.getvalue()
        _uncut(out, width)
        assert "(part 1 of" not in out
        assert not re.search(r"\d\.?\d*e[-+]\d", out)  # no e-notation anywhere
        buf = Console(file=io.StringIO(), width=width, color_system=None, highlight=False)
        print_summary(buf, sol)
        _uncut(buf.file.getvalue(), width)


def test_subcommand_help_says_what_it_does():
    def helptext(*args):
        return subprocess.run([sys.executable, "-m", "leastwork", *args, "--help"],
                              capture_output=True, text=True).stdout

    check = helptext("check")
    assert "without solving" in check and "Solve statically" not in check
    assert "qualified engineer" in check  # the caution stays on every help
    assert helptext("solve") != helptext("report")
    out = subprocess.run([sys.executable, "-m", "leastwork", "demo", "--no-color"],
                         capture_output=True, text=True, env={**os.environ, "COLUMNS": "60"})
    assert out.returncode == 0 and "\x1b[" not in out.stdout and "…" not in out.stdout


# ------------------------------------------------------------------ print


@pytest.mark.skipif(shutil.which("chromium") is None, reason="no headless Chromium here")
def test_printed_sheet_pages_and_width(tmp_path, propped):
    html = tmp_path / "shelf.html"
    html.write_text(report_html(propped))
    pdf = tmp_path / "shelf.pdf"
    subprocess.run(["chromium", "--headless", "--no-sandbox", "--disable-gpu",
                    "--no-pdf-header-footer", f"--print-to-pdf={pdf}", html.as_uri()],
                   capture_output=True, timeout=120, check=False)
    if not pdf.exists():
        pytest.skip("Chromium could not print here")
    pages = len(re.findall(rb"/Type\s*/Page[^s]", pdf.read_bytes()))
    # a one-case, one-redundant beam: summary, inputs, diagrams and eight steps
    assert 1 <= pages <= 8, pages


# The page as a browser lays it out for print: the print rules applied on screen, the
# window as wide as an A4 page inside its 12 mm margins (186 mm = 703 CSS px), and a
# script that writes what it measured into the page for --dump-dom to return.
PRINT_WIDTH_PX = 703
_PROBE = """<script>
(function () {
  const W = document.documentElement.clientWidth;
  const wide = [];
  for (const el of document.body.querySelectorAll('*')) {
    const r = el.getBoundingClientRect();
    if (r.width > 0 && r.right > W + 0.5) {
      wide.push(el.tagName.toLowerCase() + ' ' + Math.round(r.right));
    }
  }
  const maths = Array.from(document.querySelectorAll('math'));
  const fracs = Array.from(document.querySelectorAll('mfrac'));
  const box = e => e.getBoundingClientRect();
  const out = document.createElement('pre');
  out.id = 'probe';
  out.textContent = JSON.stringify({
    width: W, wide: wide, maths: maths.length,
    shown: maths.filter(m => box(m).width > 0 && box(m).height > 0).length,
    fracs: fracs.length,
    stacked: fracs.filter(f => f.children.length === 2 &&
                          box(f.children[0]).bottom <= box(f.children[1]).top + 1).length,
    drawings: Array.from(document.querySelectorAll('svg'))
                   .filter(s => box(s).width > 300 && box(s).height > 150).length});
  document.body.appendChild(out);
})();
</script>"""


def _browser_layout(page: Path, tmp_path: Path) -> dict:
    """What headless Chromium measures on ``page`` laid out for print (see _PROBE)."""
    import html as html_lib
    import json

    text = page.read_text(encoding="utf-8").replace("@media print {", "@media all {")
    probe = tmp_path / f"probe-{page.name}"
    probe.write_text(text.replace("</body>", _PROBE + "</body>"), encoding="utf-8")
    r = subprocess.run(["chromium", "--headless", "--no-sandbox", "--disable-gpu",
                        "--hide-scrollbars", f"--window-size={PRINT_WIDTH_PX},1000",
                        "--virtual-time-budget=5000", "--dump-dom", probe.as_uri()],
                       capture_output=True, text=True, timeout=120, check=False)
    m = re.search(r'<pre id="probe">(.*?)</pre>', r.stdout, re.S)
    if m is None:
        pytest.skip("Chromium could not lay the page out here")
    return json.loads(html_lib.unescape(m.group(1)))


_PLANE_CASES = list(CASES)
_SPACE_CASES = sorted((Path(__file__).parent.parent / "cases" / "space").glob("*.toml"))
_QUICK = {"portal-frame", "four-legged-mast"}


@pytest.mark.skipif(shutil.which("chromium") is None, reason="no headless Chromium here")
@pytest.mark.parametrize("path", [
    pytest.param(p, id=p.stem, marks=() if p.stem in _QUICK else pytest.mark.slow)
    for p in _PLANE_CASES + _SPACE_CASES])
def test_html_sheet_in_a_browser(path, tmp_path):
    # every formula typeset (a fraction's numerator laid out above its denominator), every
    # load case's drawing on the page, and nothing wider than the printed page
    page = tmp_path / f"{path.stem}.html"
    r = subprocess.run([sys.executable, "-m", "leastwork", "report", str(path), "-o", str(page)],
                       capture_output=True, text=True, timeout=300)
    assert r.returncode == 0, r.stderr
    got = _browser_layout(page, tmp_path)
    assert got["width"] == PRINT_WIDTH_PX
    assert got["wide"] == [], got["wide"][:10]
    assert got["drawings"] >= 1
    if path in _PLANE_CASES:
        assert got["maths"] > 0 and got["shown"] == got["maths"]
        assert got["fracs"] > 0 and got["stacked"] == got["fracs"]


@pytest.mark.skipif(shutil.which("pdflatex") is None, reason="no pdflatex here")
def test_latex_sheet_compiles_without_error_or_overflow(tmp_path):
    # the whole trail of a three-redundant portal (stacked headings, a table scaled to the
    # text width) through pdflatex twice: no error, no line wider than the text, "of N"
    case = Path(__file__).parent.parent / "cases" / "portal-frame.toml"
    tex = tmp_path / "portal.tex"
    r = subprocess.run([sys.executable, "-m", "leastwork", "solve", str(case), "--format",
                        "latex", "-o", str(tex)], capture_output=True, text=True, timeout=300)
    assert r.returncode == 0, r.stderr
    for _ in range(2):
        run = subprocess.run(["pdflatex", "-interaction=nonstopmode", "-halt-on-error",
                              tex.name], cwd=tmp_path, capture_output=True, text=True,
                             timeout=300, check=False)
    log = (tmp_path / "portal.log").read_text(errors="replace")
    assert run.returncode == 0, "\n".join(ln for ln in log.splitlines() if ln.startswith("!"))
    assert "Overfull \\hbox" not in log
    assert "Missing character" not in log
    assert "undefined" not in log  # the page count's label was found
    assert (tmp_path / "portal.pdf").stat().st_size > 10_000


def test_the_excerpt_in_the_docs_is_what_the_tool_prints():
    # docs/audit-trail.md shows a few lines of a real sheet; they must still be the tool's
    root = Path(__file__).parent.parent
    doc = (root / "docs" / "audit-trail.md").read_text(encoding="utf-8")
    m = re.search(r"<!-- excerpt of: leastwork (solve \S+ --format md) -->\n```markdown\n"
                  r"(.*?)\n```", doc, re.S)
    assert m is not None
    args = m.group(1).split()
    out = subprocess.run([sys.executable, "-m", "leastwork", *args], cwd=root,
                         capture_output=True, text=True, timeout=300)
    assert out.returncode == 0, out.stderr
    assert m.group(2) in out.stdout
    assert len(m.group(2).splitlines()) >= 10


def test_every_drawing_on_the_sheet_prints_at_full_size():
    # a drawing taller than the printed page's 235 mm would be shrunk with its 9 pt text
    # (common practice: text of 9 pt or more is legible in print), so the tall figure of
    # this nearly square walkway is gathered into figures that each fit a page
    from leastwork.output.html import PAGE_FIGURE_HEIGHT
    from leastwork.output.plot.style import PRINT_WIDTH

    sol = leastwork.solve(leastwork.load_case(CASES[0].parent / "tied-beam.toml"))
    page = report_html(sol)
    sizes = [(float(w) / 72, float(h) / 72) for w, h in
             re.findall(r'<svg[^>]*\bwidth="([0-9.]+)pt" height="([0-9.]+)pt"', page)]
    assert len(sizes) >= 2  # the five panels did not fit one page
    assert all(h <= PAGE_FIGURE_HEIGHT and w <= PRINT_WIDTH + 1e-6 for w, h in sizes), sizes
    assert page.count("<figcaption>") == 1
