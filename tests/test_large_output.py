"""Terminal output of large structures: the short summary, ``--basis``, ``check`` on the
sparse path, and the progress display."""

from __future__ import annotations

import io
import math
import re
import time
from pathlib import Path

import pytest
from rich.console import Console

from leastwork import load_case, solve
from leastwork.cli import main
from leastwork.cli.progress import PhaseDisplay
from leastwork.output.terminal import SUMMARY_MAX_MEMBERS, SUMMARY_MAX_REDUNDANTS, is_large

ROOT = Path(__file__).resolve().parents[1]

import generators  # noqa: E402

CASES = sorted((ROOT / "cases").glob("*.toml"))


def _fast(text: str) -> str:
    """Generator text with EA as bare numbers (the case unit is kN): the same structure,
    read without parsing two thousand unit strings."""
    return re.sub(r'EA = "([-0-9.e+]+) kN"', r"EA = \1", text)


def _write(tmp_path: Path, name: str, text: str) -> str:
    path = tmp_path / name
    path.write_text(text)
    return str(path)


def _flat(text: str) -> str:
    """The text with every run of white space (line wraps included) made one space."""
    return " ".join(text.split())


def _row(text: str, label: str) -> list[str]:
    """Cells of the table row that starts with ``label`` (rich box characters)."""
    for line in text.splitlines():
        cells = [c.strip() for c in line.strip("│ ").split("│")]
        if cells and cells[0] == label:
            return cells
    raise AssertionError(f"no row {label!r} in:\n{text}")


@pytest.fixture(scope="module")
def truss(tmp_path_factory) -> tuple[str, int]:
    """A braced truss of 400 panels: 2001 bars, above the sparse threshold."""
    panels = 400
    path = tmp_path_factory.mktemp("large") / "truss.toml"
    path.write_text(_fast(generators.braced_truss(panels)))
    return str(path), panels


def _number(text: str) -> float:
    """A printed number back to a float: "-2.87654×10⁵" -> -287654.0."""
    mant, _, exp = text.replace("−", "-").partition("×10")
    return float(mant) * 10.0 ** int(exp.translate(str.maketrans("⁻⁰¹²³⁴⁵⁶⁷⁸⁹", "-0123456789"))
                                    or 0)


def test_short_summary_of_large_truss_names_the_governing_bar(truss, capsys):
    path, panels = truss
    assert main(["solve", path, "--no-color", "--figures", "6"]) == 0
    text = capsys.readouterr().out
    lines = text.splitlines()
    assert len(lines) < 60
    flat = _flat(text)
    assert "Short summary" in flat and "--json" in flat and "--steps" in flat
    assert "Basis: local self-stress states" in flat
    assert f"the states close): {panels} — {panels} bar forces" in flat
    # no row per member: far fewer bar names than bars
    assert len(re.findall(r"\b[BTDEV]\d+\b", text)) < 30
    cells = _row(text, "axial force n")
    value, unit, where = _number(cells[1]), cells[2], cells[3]
    assert unit == "kN" and where.startswith("member ")
    named = where.split()[1]
    # the JSON result of the same structure: the largest |n| over all member ends
    data = solve(load_case(path)).to_dict()
    ends = {mid: [m["start"]["n"], m["end"]["n"]]
            for mid, m in data["cases"]["default"]["members"].items()}
    largest = max(abs(n) for ns in ends.values() for n in ns)
    assert max(abs(n) for n in ends[named]) == pytest.approx(largest, rel=1e-9)
    assert value == pytest.approx(ends[named][0], rel=1e-5)  # --figures 6


def test_short_summary_against_three_moment_closed_form(tmp_path, capsys):
    """Continuous beam over many equal spans under a uniform load w (sagging +).

    Three-moment equation for equal spans and EI: M_(i-1) + 4 M_i + M_(i+1) = -w L^2 / 2,
    with M_0 = 0 at the end support. Far from the other end its solution is
    M_i = -w L^2 / 12 (1 - r^i), r = sqrt(3) - 2 (the root of r^2 + 4 r + 1 = 0 below one
    in size); derived here. So M_1 = -(3 - sqrt(3)) w L^2 / 12 = -0.10566 w L^2 is the
    largest moment, the shear just left of support 1 is -(w L / 2 + |M_1| / L), and the
    reaction there R_1 = w L + (M_0 - 2 M_1 + M_2) / L.
    """
    supports, w, L = 80, 12.0, 6.0  # generator: 12 kN/m on 6 m spans
    path = _write(tmp_path, "beam.toml", _fast(generators.continuous_beam(supports)))
    assert main(["solve", path, "--no-color", "--basis", "local", "--figures", "6"]) == 0
    text = capsys.readouterr().out
    r = math.sqrt(3.0) - 2.0
    M1 = -w * L**2 / 12 * (1 - r)
    M2 = -w * L**2 / 12 * (1 - r**2)
    m = _row(text, "bending moment m")
    assert float(m[1]) == pytest.approx(M1, rel=1e-4)
    assert m[3] == "member P0" and float(m[4]) == pytest.approx(L)  # first of two equals
    v = _row(text, "shear force v")
    assert float(v[1]) == pytest.approx(-(w * L / 2 - M1 / L), rel=1e-4)
    ry = _row(text, "reaction y")
    assert float(ry[1]) == pytest.approx(w * L + (0.0 - 2 * M1 + M2) / L, rel=1e-4)
    assert ry[3] == "support S1"
    n = _row(text, "axial force n")  # no horizontal load: zero, nothing named
    assert n[1] == "0" and n[3] == "—"


def test_threshold_between_full_and_short_summary(tmp_path, capsys):
    """braced_truss(p) has 5 p + 1 bars and degree p (m + r - 2j, common practice)."""
    small, large = 7, 8  # 36 and 41 bars
    assert 5 * small + 1 <= SUMMARY_MAX_MEMBERS < 5 * large + 1
    assert large <= SUMMARY_MAX_REDUNDANTS
    for panels, short in ((small, False), (large, True)):
        path = _write(tmp_path, f"t{panels}.toml", _fast(generators.braced_truss(panels)))
        sol = solve(load_case(path))
        assert sol.topology.degree == panels
        assert is_large(sol) is short
        assert main(["solve", path, "--no-color"]) == 0
        text = capsys.readouterr().out
        # a truss's full summary gives its bar forces (n with T/C)
        assert ("Bar forces" in text or "Member end forces" in text) is not short
        assert ("Short summary" in text) is short


@pytest.mark.parametrize("case", CASES, ids=lambda p: p.stem)
def test_basis_released_prints_what_the_default_prints(case, capsys):
    assert main(["solve", str(case), "--no-color"]) == 0
    default = capsys.readouterr().out
    assert main(["solve", str(case), "--no-color", "--basis", "released"]) == 0
    assert capsys.readouterr().out == default
    assert main(["check", str(case), "--basis", "released"]) == 0
    released = capsys.readouterr().out
    assert main(["check", str(case)]) == 0
    assert capsys.readouterr().out == released


def _indeterminacy(text: str) -> tuple[int, int, int]:
    """(degree, external, internal) from the check's table."""
    m = re.search(r"│\s*(\d+)\s*│\s*(\d+)\s*│\s*(\d+)\s*│\s*yes", text)
    assert m, text
    return int(m[1]), int(m[2]), int(m[3])


def test_check_of_large_truss_takes_the_sparse_path(truss, monkeypatch, capsys):
    path, panels = truss

    def dense(*args, **kwargs):
        raise AssertionError("check built the dense topology")

    monkeypatch.setattr("leastwork.topology.build_topology", dense)
    assert main(["check", path, "--no-color"]) == 0
    text = capsys.readouterr().out
    # m + r - 2j = (5p + 1) + 3 - 2 (2p + 2) = p (common practice): all internal, since a
    # pin and a roller hold the girder determinately
    assert _indeterminacy(text) == (panels, 0, panels)
    flat = _flat(text)
    assert f"m + r - 2j = {5 * panels + 1} + 3 - 2*{2 * panels + 2} = {panels}" in flat
    assert f"Suggested redundants: {panels} local self-stress states" in flat
    assert f"and {panels - 10} more" in flat and len(text.splitlines()) < 25


@pytest.mark.parametrize("text", [
    (ROOT / "cases" / "portal-frame.toml").read_text(),
    (ROOT / "cases" / "ramp-on-pile.toml").read_text(),
    generators.storey_frame(3, 2),
    generators.braced_grid(3, 3),
], ids=["portal", "ramp", "frame-3x2", "grid-3x3"])
def test_check_local_agrees_with_dense_rank(text, tmp_path, capsys):
    """Two methods: the sparse self-stress sweep and the dense rank give the same degree
    and the same split into internal and external."""
    path = _write(tmp_path, "case.toml", text)
    assert main(["check", path, "--no-color", "--basis", "released"]) == 0
    dense = _indeterminacy(capsys.readouterr().out)
    assert main(["check", path, "--no-color", "--basis", "local"]) == 0
    assert _indeterminacy(capsys.readouterr().out) == dense


@pytest.mark.parametrize("name", ["mech-only-a-roller", "mech-truss-panel-no-diagonal",
                                  "mech-concurrent-reactions"])
def test_check_local_of_a_mechanism_exits_3_with_what_moves(name, capsys):
    case = str(ROOT / "tests" / "bad_cases" / f"{name}.toml")
    assert main(["check", case, "--basis", "local"]) == 3
    err = capsys.readouterr().err
    assert err.startswith("leastwork: unstable:") and "Free motion:" in err


def test_local_basis_with_named_redundants_is_a_clean_error(truss, capsys):
    path, _ = truss
    assert main(["solve", path, "--basis", "local", "--redundants", "D0"]) == 2
    err = capsys.readouterr().err
    assert err.startswith("leastwork: error:") and "--redundants" in err
    assert "Traceback" not in err and len(err.strip().splitlines()) == 1
    named = str(ROOT / "cases" / "canopy-prop.toml")  # [analysis] redundants = ["CB"]
    for cmd in ("solve", "check"):
        assert main([cmd, named, "--basis", "local"]) == 2
        err = capsys.readouterr().err
        assert "[analysis] redundants" in err and "Traceback" not in err
    assert main(["solve", named, "--basis", "sparse"]) == 2
    assert "--basis" in capsys.readouterr().err


def test_phase_display_shows_phase_and_time_only_after_the_delay():
    buf = io.StringIO()
    with PhaseDisplay("solving", console=Console(file=buf, force_terminal=True, width=80),
                      delay=0.0) as say:
        say("flexibility")
        time.sleep(0.4)
    assert re.search(r"solving: flexibility \(\d+ s\)", buf.getvalue())
    buf = io.StringIO()
    with PhaseDisplay("solving", console=Console(file=buf, force_terminal=True, width=80),
                      delay=5.0) as say:
        say("flexibility")
    assert buf.getvalue() == ""


def test_solve_reports_its_phases_to_the_display(tmp_path):
    """The callback the command line passes is called with each phase of the sparse path."""
    seen: list[str] = []
    st = load_case(_write(tmp_path, "beam.toml", _fast(generators.continuous_beam(30))))
    solve(st, basis="local", verify=True, progress=seen.append)
    assert seen == ["equilibrium matrix", "self-stress states", "released structure",
                    "flexibility", "load cases", "cross-check"]


def test_help_states_the_automatic_threshold(capsys):
    from leastwork.thresholds import LOCAL_BASIS_MIN_COLUMNS

    assert main(["solve", "--help"]) == 0
    assert f"local above {LOCAL_BASIS_MIN_COLUMNS} basic forces" in _flat(capsys.readouterr().out)
