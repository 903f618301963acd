"""User text in the diagrams, and the one-drawer-per-load-kind rule.

Outside fact (the XML 1.0 specification, production [2] Char; from memory): a document may
hold tab, line feed and carriage return but no other C0 control character, and neither
U+FFFE nor U+FFFF, even as character references. An SVG file with one of them in a
<text> element is not well-formed, so every piece of user text (the structure's name,
load-case names) must reach the drawing escaped: leastwork.plaintext.literal writes a
control character as a visible escape such as \\x01.
"""

from __future__ import annotations

import typing
import xml.etree.ElementTree as ET

import pytest

import leastwork
from leastwork.cli import main
from leastwork.model import Load
from leastwork.output.plot import figure_svg, plot_case
from leastwork.output.plot.loads import LOAD_DRAWERS, PASSES

SVG = "{http://www.w3.org/2000/svg}"

#: A propped cantilever (fixed at A, roller at B) under a uniform load: any small stable
#: case will do, the values are not checked here.
CASE = """
[structure]
name = "{name}"
units = {{ force = "kN", length = "m" }}

[nodes]
A = [0, 0]
B = [6, 0]

[beams]
AB = {{ nodes = ["A", "B"], EI = "2e4 kN*m^2", EA = "1e6 kN" }}

[supports]
A = "fixed"
B = "roller"

[[loads]]
member = "AB"
wy = "-10 kN/m"
case = "{case}"
"""


def _solved(name: str, case: str = "dead"):
    """The case above with ``name`` and ``case`` written as TOML basic-string text."""
    return leastwork.solve(leastwork.loads_case(CASE.format(name=name, case=case),
                                                "hygiene.toml"))


def _texts(svg: str) -> str:
    root = ET.fromstring(svg)  # raises ParseError when the SVG is not well-formed XML
    return "\n".join("".join(t.itertext()) for t in root.iter(f"{SVG}text"))


def test_control_characters_in_the_name_give_a_well_formed_svg(tmp_path):
    sol = _solved(r"a\u0001b\u001bc")
    assert sol.structure.name == "a\x01b\x1bc"
    texts = _texts(figure_svg(sol))
    assert "a\\x01b\\x1bc" in texts  # drawn escaped, visibly
    # the command line writes the same well-formed file and succeeds
    path = tmp_path / "case.toml"
    path.write_text(CASE.format(name=r"a\u0001b\u001bc", case="dead"), encoding="utf-8")
    out = tmp_path / "d.svg"
    assert main(["plot", str(path), "-o", str(out)]) == 0
    assert "a\\x01b\\x1bc" in _texts(out.read_text(encoding="utf-8"))


def test_control_characters_in_a_load_case_name_give_a_well_formed_svg(tmp_path):
    sol = _solved("plain", case=r"snow\u0007\u0000day")
    texts = _texts(figure_svg(sol))
    assert "snow\\x07\\x00day: structure, loads and redundants" in texts
    plot_case(sol, tmp_path / "d.svg")
    _texts((tmp_path / "d.svg").read_text(encoding="utf-8"))


@pytest.mark.parametrize(("char", "shown"), [(r"\uFFFE", r"\ufffe"), (r"\uFFFF", r"\uffff"),
                                             (r"\u0085", r"\x85"), (r"\u202E", r"\u202e")])
def test_other_characters_xml_or_a_terminal_refuses(char, shown):
    """Noncharacters that XML forbids, a C1 control and a bidirectional override: the
    SVG stays well-formed and the character is shown as an escape."""
    texts = _texts(figure_svg(_solved(f"x{char}y"), diagrams="structure"))
    assert f"x{shown}y" in texts


def test_newline_and_dollar_in_the_name_stay_on_one_line_and_literal():
    texts = _texts(figure_svg(_solved(r"two\nlines $5"), diagrams="structure"))
    assert "two\\nlines $5" in texts


def test_every_load_kind_has_one_drawer():
    """A new load class in leastwork.model needs its drawer in LOAD_DRAWERS."""
    kinds = set(typing.get_args(Load))
    assert kinds == set(LOAD_DRAWERS)
    passes = [name for name, _ in PASSES]
    assert all(stage in passes for stage, _ in LOAD_DRAWERS.values())
