"""`leastwork solve --symbolic` through the command line: closed forms on the terminal, as
JSON strings that sympy parses, and in calculation sheets; bounded time."""

from __future__ import annotations

import json

import pytest
import sympy

from leastwork.cli import main

PROPPED = """
[structure]
name = "Canopy beam on a prop"
units = { force = "kN", length = "m" }
[parameters]
L = "6 m"
w = "8 kN/m"
EI = "20000 kN*m^2"
[nodes]
A = [0, 0]
B = ["L", 0]
[beams]
AB = { nodes = ["A", "B"], EI = "EI" }
[supports]
A = "fixed"
B = "roller"
[[loads]]
member = "AB"
wy = "-w"
"""


@pytest.fixture()
def case(tmp_path):
    path = tmp_path / "prop.toml"
    path.write_text(PROPPED)
    return path


def test_json_strings_are_the_handbook_closed_forms_and_match_the_numbers(case, capsys):
    """Propped cantilever, uniform load: prop 3wL/8, fixed-end moment wL^2/8 (AISC Steel
    Construction Manual, beam diagrams and formulas, case 12)."""
    assert main(["solve", str(case), "--symbolic", "--json"]) == 0
    sym = json.loads(capsys.readouterr().out)
    assert main(["solve", str(case), "--json"]) == 0
    num = json.loads(capsys.readouterr().out)
    L, w, EI = sympy.symbols("L w EI")
    names = {"L": L, "w": w, "EI": EI}
    got = sympy.sympify(sym["cases"]["default"]["redundants"]["B.y"], locals=names)
    assert sympy.simplify(got - 3 * w * L / 8) == 0
    m_a = sympy.sympify(sym["cases"]["default"]["members"]["AB"]["start"]["m"], locals=names)
    assert sympy.simplify(m_a + w * L**2 / 8) == 0
    values = {L: 6, w: 8, EI: 20000}
    for node, comps in num["cases"]["default"]["reactions"].items():
        for d, v in comps.items():
            expr = sympy.sympify(sym["cases"]["default"]["reactions"][node][d], locals=names)
            assert float(expr.subs(values)) == pytest.approx(v, rel=1e-12, abs=1e-12)


def test_terminal_table_and_steps(case, capsys):
    assert main(["solve", str(case), "--symbolic", "--steps"]) == 0
    out = capsys.readouterr().out
    assert "3*L*w/8" in out and "Step 8" in out and "closed form" in out


def test_sheets_carry_the_closed_forms(case, tmp_path):
    tex = tmp_path / "calc.tex"
    assert main(["solve", str(case), "--symbolic", "--format", "latex", "-o", str(tex)]) == 0
    text = tex.read_text()
    assert "Closed forms" in text and r"\frac{3 L w}{8}" in text
    md = tmp_path / "calc.md"
    assert main(["solve", str(case), "--symbolic", "-o", str(md)]) == 0
    assert "`3*L*w/8`" in md.read_text()


def test_time_limit_is_a_clean_error(case, capsys):
    assert main(["solve", str(case), "--symbolic", "--time-limit", "0.001"]) == 2
    err = capsys.readouterr().err
    assert "beyond reach" in err and "Traceback" not in err


def test_symbolic_solve_reads_the_case_file_once(case, capsys, monkeypatch):
    """Invariant: the closed forms are made from the case the numeric solve read (one
    reading of the file, not two)."""
    from leastwork.io import files

    reads = []
    real = files._read_regular_file

    def counted(p):
        reads.append(p)
        return real(p)

    monkeypatch.setattr(files, "_read_regular_file", counted)
    assert main(["solve", str(case), "--symbolic", "--json"]) == 0
    assert json.loads(capsys.readouterr().out)["mode"] == "symbolic"
    assert len(reads) == 1
