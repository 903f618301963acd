"""Placement and wording of the diagrams: arrows of redundant reactions and settlements
drawn with one end on their node, labels that do not overlap (their extents measured by
the renderer), no e-notation in any text, values below the printed precision of their
panel drawn as zero and not labelled, moments without sign, one image per load case, text
at least 9 pt at print size, influence lines and fit-up drawings in the same style.

Outside facts: a symmetric portal under a symmetric load has equal moments at its two
eaves (symmetry, common practice), so both carry the same label; engineering rounding to
three significant figures with trailing zeros kept (45.0) is common practice; text of
9 pt or more is legible in print (common practice for drawings). The rest are invariants
of the drawing: node coordinates from the case file, label extents from matplotlib's Agg
renderer.
"""

from __future__ import annotations

import re
import subprocess
import sys
from functools import cache
from pathlib import Path

import numpy as np
import pytest

import leastwork
from leastwork.output.plot import DIAGRAMS, case_file_names
from leastwork.output.plot.data import diagram_lines
from leastwork.output.plot.figure import figure
from leastwork.output.plot.forces import force_panel
from leastwork.output.plot.geometry import structure_size, xy
from leastwork.output.plot.numbers import number, resolution, tension_mark
from leastwork.output.plot.panel import Panel
from leastwork.output.plot.structure import structure_panel
from leastwork.output.plot.style import PRINT_WIDTH

ROOT = Path(__file__).parent.parent
CASES = sorted((ROOT / "cases").glob("*.toml"))
E_NOTATION = re.compile(r"\d(?:\.\d+)?[eE][+-]?\d")


@cache
def solved(name: str):
    return leastwork.solve(leastwork.load_case(ROOT / "cases" / name))


def _panel(sol) -> Panel:
    from matplotlib.figure import Figure

    ax = Figure().add_subplot()
    size = structure_size(sol.structure)
    return Panel(ax, size, 2.0 * size / 6.0)


def _texts(fig) -> list:
    from matplotlib.text import Text

    return [t for t in fig.findobj(Text) if t.get_visible() and t.get_text().strip()]


# ---------------------------------------------------------------------------- numbers


@pytest.mark.parametrize(("x", "text"), [
    (45.0, "45.0"), (-62.25, "−62.2"), (1712.3, "1710"), (0.0123456, "0.0123"),
    (171234.0, "1.71×10⁵"), (-1.71e-5, "−1.71×10⁻⁵"), (99.96, "100"), (0.0, "0"),
])
def test_engineering_rounding_never_e_notation(x, text):
    # three significant figures, trailing zeros kept (common practice)
    assert number(x) == text
    assert not E_NOTATION.search(number(x))


def test_axial_forces_read_t_or_c_without_sign():
    assert tension_mark(33.3) == "33.3 T" and tension_mark(-26.64) == "26.6 C"


# ---------------------------------------------------------------------------- arrows


@pytest.mark.parametrize("path", CASES, ids=lambda p: p.stem)
def test_reaction_and_settlement_arrows_start_or_end_on_their_node(path):
    sol = solved(path.name)
    st = sol.structure
    topo = sol.topology
    for case in sol.cases:
        pn = _panel(sol)
        structure_panel(pn, sol, case)
        for i, j in enumerate(sol.redundant_columns):
            col = topo.columns[j]
            if col.kind != "reaction":
                continue
            drawn = [a for a in pn.arrows if a[2] == f"X{i + 1}"]
            assert len(drawn) == 1, (case, col.name)
            tail, tip, _ = drawn[0]
            node = xy(st, col.owner)
            assert np.allclose(tail, node, rtol=0, atol=1e-12) or np.allclose(
                tip, node, rtol=0, atol=1e-12), (case, col.name, tail, tip, node)
        settle = [ld for ld in st.loads if type(ld).__name__ == "Settlement"
                  and ld.case == case]
        marks = [a for a in pn.arrows if a[2] == "settlement"]
        assert len(marks) == sum(1 for ld in settle for _, v in ld.values if v)
        for tail, tip, _ in marks:
            assert any(np.allclose(tail, xy(st, ld.node), atol=1e-12)
                       or np.allclose(tip, xy(st, ld.node), atol=1e-12) for ld in settle)


def test_a_settlement_case_draws_its_arrow_on_the_node():
    sol = solved("settlement-and-heat.toml")
    cases = [c for c in sol.cases
             if any(type(ld).__name__ == "Settlement" and ld.case == c
                    for ld in sol.structure.loads)]
    assert cases  # the bundled case has one, so the test above is not empty


# ---------------------------------------------------------------------------- labels


def _overlaps(boxes) -> list:
    out = []
    for i in range(len(boxes)):
        for k in range(i + 1, len(boxes)):
            a, b = boxes[i][0], boxes[k][0]
            if (min(a.x1, b.x1) - max(a.x0, b.x0) > 0.5
                    and min(a.y1, b.y1) - max(a.y0, b.y0) > 0.5):
                out.append((boxes[i][1], boxes[k][1]))
    return out


@pytest.mark.parametrize("path", CASES, ids=lambda p: p.stem)
def test_no_two_labels_overlap_and_text_is_9_pt_or_more(path):
    from matplotlib.backends.backend_agg import FigureCanvasAgg

    sol = solved(path.name)
    fig = figure(sol, list(sol.cases), DIAGRAMS)
    renderer = FigureCanvasAgg(fig).get_renderer()
    texts = _texts(fig)
    boxes = []
    for t in texts:  # a boxed label by its frame, the others by their text
        patch = t.get_bbox_patch()
        if patch is not None:
            t.update_bbox_position_size(renderer)
            boxes.append((patch.get_window_extent(renderer), t.get_text()))
        else:
            boxes.append((t.get_window_extent(renderer), t.get_text()))
    assert not _overlaps(boxes)
    assert min(t.get_fontsize() for t in texts) >= 9.0
    assert fig.get_size_inches()[0] <= PRINT_WIDTH + 1e-9
    for t in texts:
        assert not E_NOTATION.search(t.get_text()), t.get_text()


def test_equal_eave_moments_of_a_symmetric_portal_read_alike_without_sign():
    sol = solved("portal-frame.toml")
    pn = _panel(sol)
    force_panel(pn, sol, "roof", "m")
    labels = [b[4] for b in pn.boxes if b[4]]
    eave = number(abs(sol.cases["roof"].members["BC"].m.breaks[0] * 0
                      + diagram_lines(sol, "roof", "m")["BC"]["value"][0]))
    assert eave in labels
    assert not any(lb.startswith(("−", "-")) for lb in labels)


@pytest.mark.parametrize("path", CASES, ids=lambda p: p.stem)
def test_values_below_the_printed_precision_are_not_labelled(path):
    sol = solved(path.name)
    for case in sol.cases:
        for q in ("n", "v", "m"):
            lines = diagram_lines(sol, case, q)
            vmax = max(float(np.max(np.abs(d["value"]))) for d in lines.values())
            if vmax == 0:
                continue
            pn = _panel(sol)
            force_panel(pn, sol, case, q)
            for b in pn.boxes:
                m = re.fullmatch(r"(−?)([0-9.]+)(?:×10([⁻⁰¹²³⁴⁵⁶⁷⁸⁹]+))?(?: [TC])?", b[4])
                if not m or b[4] == "0":  # a bar carrying nothing says so
                    continue
                assert m.group(3) is None, b[4]  # diagram values need no powers of ten
                assert float(m.group(2)) >= resolution(vmax), (case, q, b[4])


def test_a_negligible_end_force_is_drawn_as_zero():
    # the ramp's top bearing is set at 4.76 deg, not quite square to the 1-in-12 stringer,
    # so BC ends with a 0.000595 kN axial force: far below what three figures of the
    # panel's largest value (2.02 kN) print
    sol = solved("ramp-on-pile.toml")
    pn = _panel(sol)
    force_panel(pn, sol, "default", "n")
    assert not any("0.000595" in b[4] or "5.95" in b[4] for b in pn.boxes)


_ANTISYMMETRIC = """
[structure]
units = { force = "kip", length = "ft" }
[nodes]
A = [0, 0]
B = [7.3, 0]
C = [14.6, 0]
[beams]
AB = { nodes = ["A", "B"], EI = "29000 kip*ft^2" }
BC = { nodes = ["B", "C"], EI = "29000 kip*ft^2" }
[supports]
A = "pinned"
B = "roller"
C = "roller"
[[loads]]
member = "AB"
wy = "-1.3 kip/ft"
[[loads]]
member = "BC"
wy = "1.3 kip/ft"
[analysis]
redundants = ["B.y"]
"""


def test_a_redundant_that_is_round_off_is_labelled_zero():
    # two equal spans under equal and opposite loads: the middle reaction is zero by
    # antisymmetry (common practice); the solve leaves round-off of about 1e-12 kip
    sol = leastwork.solve(leastwork.loads_case(_ANTISYMMETRIC))
    x = float(sol.cases["default"].redundants[0])
    assert 0.0 < abs(x) < 1e-9  # round-off, not an exact zero: the test can fail
    fig = figure(sol, ["default"], ["structure"])
    words = [t.get_text() for t in _texts(fig)]
    assert any(w.startswith("X1 = B.y = 0 kip") for w in words), words
    assert not any(E_NOTATION.search(w) or "×10" in w for w in words), words


# ---------------------------------------------------------------------------- files


def test_each_case_writes_one_image_per_load_case(tmp_path):
    case = ROOT / "cases" / "us-mezzanine-beam.toml"
    out = tmp_path / "mez.png"
    r = subprocess.run([sys.executable, "-m", "leastwork", "plot", str(case), "-o", str(out),
                        "--each-case"], capture_output=True, text=True)
    assert r.returncode == 0, r.stderr
    sol = solved(case.name)
    files = sorted(p.name for p in tmp_path.iterdir())
    assert len(files) == len(sol.cases) >= 2
    assert files == sorted(p.name for p in case_file_names(out, list(sol.cases)).values())
    for name in files:
        assert (tmp_path / name).read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"


def test_each_case_with_one_case_is_refused(tmp_path):
    case = ROOT / "cases" / "us-mezzanine-beam.toml"
    r = subprocess.run([sys.executable, "-m", "leastwork", "plot", str(case), "-o",
                        str(tmp_path / "x.png"), "--each-case", "--case", "dead"],
                       capture_output=True, text=True)
    assert r.returncode == 2 and "--each-case" in r.stderr and "Traceback" not in r.stderr
    assert not list(tmp_path.iterdir())


def test_case_file_names_stay_apart():
    names = case_file_names("out/a.svg", ["wind", "Wind", "snow + wind", "***"])
    assert [p.name for p in names.values()] == ["a-wind.svg", "a-Wind-2.svg",
                                                "a-snow-wind.svg", "a-case.svg"]


def test_influence_line_has_words_a_sketch_and_print_size(tmp_path):
    from leastwork.output.plot.influence import influence_figure
    from leastwork.studies.influence import influence_line, influence_to_dict, parse_quantity

    sol = solved("floor-beam-3span.toml")
    st = sol.structure
    q = parse_quantity(st, sol.topology, "B.y")
    d = influence_to_dict(influence_line(sol, q, "AB,BC,CD", 10, st.units), st.units, st.name)
    fig = influence_figure(st, d)
    words = [t.get_text() for t in _texts(fig)]
    assert "position of the load along AB, BC, CD [m]" in words
    assert "B.y [kN]" in words
    assert not any(E_NOTATION.search(w) or "*" in w for w in words)
    assert fig.get_size_inches()[0] == pytest.approx(PRINT_WIDTH)
    # the sketch shares the line's horizontal scale: node B sits above x = its position
    sketch, line = fig.axes
    bx = xy(st, "B")[0]
    px_sketch = sketch.transData.transform((bx, 0.0))[0]
    px_line = line.transData.transform((bx / st.units.factor("length"), 0.0))[0]
    assert px_sketch == pytest.approx(px_line, abs=0.5)
    # the ordinate at B is one (the load stands on the support): Mueller-Breslau
    ordinates = {(p["member"], p["at"]): p["value"] for p in d["points"]}
    assert ordinates[("AB", st.length("AB") / st.units.factor("length"))] == pytest.approx(1.0)


def test_fitup_draws_to_a_file(tmp_path):
    case = ROOT / "cases" / "braced-bay-fitup.toml"
    out = tmp_path / "fit.svg"
    r = subprocess.run([sys.executable, "-m", "leastwork", "fitup", str(case), "--tolerance",
                        "*=2mm", "--seed", "1", "--samples", "200", "-o", str(out)],
                       capture_output=True, text=True)
    assert r.returncode == 0, r.stderr
    text = out.read_text()
    assert "<svg" in text and "±" in text and not E_NOTATION.search(
        " ".join(re.findall(r">([^<]+)<", text)))
