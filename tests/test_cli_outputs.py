"""Files written by the command line (plot, report, solve -o): written whole, never over an
existing file without --force, never over the case file, nothing half-written on refusal."""

from __future__ import annotations

import os
from pathlib import Path

import pytest

from leastwork.cli import main

CASES = Path(__file__).resolve().parents[1] / "cases"
PORTAL = CASES / "portal-frame.toml"
TIED = CASES / "tied-beam.toml"


@pytest.mark.parametrize("suffix, magic", [(".png", b"\x89PNG"), (".svg", b"<?xml")])
def test_plot_writes_an_image_and_refuses_to_overwrite(tmp_path, capsys, suffix, magic):
    out = tmp_path / f"portal{suffix}"
    assert main(["plot", str(PORTAL), "-o", str(out), "--case", "wind"]) == 0
    data = out.read_bytes()
    assert data.startswith(magic) and len(data) > 10_000
    assert main(["plot", str(PORTAL), "-o", str(out)]) == 2
    assert "--force" in capsys.readouterr().err
    assert out.read_bytes() == data
    assert main(["plot", str(PORTAL), "-o", str(out), "--diagrams", "m", "--force"]) == 0
    assert out.read_bytes() != data


def test_plot_rejects_unknown_suffix_diagram_and_case(tmp_path, capsys):
    assert main(["plot", str(PORTAL), "-o", str(tmp_path / "x.pdf")]) == 2
    assert main(["plot", str(PORTAL), "-o", str(tmp_path / "x.png"), "--diagrams", "q"]) == 2
    assert main(["plot", str(PORTAL), "-o", str(tmp_path / "x.png"), "--case", "snow"]) == 2
    err = capsys.readouterr().err
    assert "Traceback" not in err
    assert list(tmp_path.iterdir()) == []


def test_report_html_and_markdown(tmp_path):
    html = tmp_path / "calc.html"
    assert main(["report", str(PORTAL), "-o", str(html)]) == 0
    text = html.read_text()
    assert "<svg" in text and "qualified engineer" in text
    md = tmp_path / "calc.md"
    assert main(["report", str(TIED), "-o", str(md)]) == 0
    images = sorted(p.name for p in tmp_path.glob("calc-*.svg"))
    assert images and all(name in md.read_text() for name in images)


def test_markdown_report_refuses_when_an_image_exists(tmp_path, capsys):
    """Every file of a report is checked before anything is written."""
    md = tmp_path / "calc.md"
    assert main(["report", str(TIED), "-o", str(md)]) == 0
    image = next(tmp_path.glob("calc-*.svg"))
    md.unlink()
    before = image.read_bytes()
    assert main(["report", str(TIED), "-o", str(md)]) == 2
    assert "exists" in capsys.readouterr().err
    assert not md.exists() and image.read_bytes() == before


def test_written_files_follow_the_umask(tmp_path):
    old = os.umask(0o022)
    try:
        out = tmp_path / "r.json"
        assert main(["solve", str(PORTAL), "--json", "-o", str(out)]) == 0
        assert (out.stat().st_mode & 0o777) == 0o644
    finally:
        os.umask(old)


def test_report_never_overwrites_the_case_file(tmp_path):
    case = tmp_path / "frame.toml"
    case.write_text(PORTAL.read_text())
    assert main(["report", str(case), "-o", str(case), "--force"]) == 2
    assert case.read_text() == PORTAL.read_text()


def test_influence_line_drawn_to_a_file(tmp_path, capsys):
    beam = CASES / "floor-beam-3span.toml"
    out = tmp_path / "il.svg"
    args = ["influence", str(beam), "--quantity", "B.y", "--along", "AB,BC,CD", "-o", str(out)]
    assert main(args) == 0
    data = out.read_bytes()
    assert data.startswith(b"<?xml") and b"B.y" in data
    assert main(args) == 2 and out.read_bytes() == data
    assert "--force" in capsys.readouterr().err
    assert main([*args[:-2], "-o", str(tmp_path / "il.pdf")]) == 2
