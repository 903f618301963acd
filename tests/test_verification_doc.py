"""docs/verification.md against the test suite, so that the table stays current.

* Every ``tests/FILE::FUNCTION`` the page names is a test function defined in that file
  (a renamed or removed test shows up here).
* Every test module whose text cites an outside source (a handbook by author, "from
  memory", "common practice", sympy as an oracle) is named on the page (a new module shows
  up here).
* The checks themselves catch a stale page (run on a made-up page and test folder).

Plain text only: nothing is imported or run, so the whole file takes milliseconds.
"""

from __future__ import annotations

import re
from pathlib import Path

__all__ = [
    "SOURCE_WORDS",
    "cites_outside_source",
    "defined_tests",
    "missing_modules",
    "named_tests",
    "stale_names",
    "table_rows",
]

ROOT = Path(__file__).resolve().parents[1]
DOC = ROOT / "docs" / "verification.md"
TESTS = ROOT / "tests"

#: Words by which a test module cites a source outside the project.
SOURCE_WORDS: tuple[str, ...] = ("AISC", "Roark", "Timoshenko", "Gere", "Hicks",
                                 "from memory", "common practice", "sympy")
_SOURCE = re.compile(r"\b(?:" + "|".join(map(re.escape, SOURCE_WORDS)) + r")\b")
_REF = re.compile(r"`tests/(test_\w+\.py)::(test_\w+)`")
_DEF = re.compile(r"^[ \t]*(?:async[ \t]+)?def[ \t]+(test_\w+)[ \t]*\(", re.M)
_COLUMNS = 6  # test, case, source, expected value, tolerance, result


def named_tests(doc: str) -> list[tuple[str, str]]:
    """(file name, function name) of every ``tests/FILE::FUNCTION`` reference in ``doc``."""
    return _REF.findall(doc)


def defined_tests(module_text: str) -> set[str]:
    """Names of the test functions defined in a module's source text."""
    return set(_DEF.findall(module_text))


def cites_outside_source(module_text: str) -> bool:
    """True when the text names one of :data:`SOURCE_WORDS` (as a whole word)."""
    return _SOURCE.search(module_text) is not None


def table_rows(doc: str) -> list[list[str]]:
    """The cells of every table row whose first cell names a test."""
    rows = []
    for line in doc.splitlines():
        if line.startswith("| `tests/"):
            rows.append([cell.strip() for cell in line.strip().strip("|").split("|")])
    return rows


def stale_names(doc: str, tests_dir: Path) -> list[str]:
    """``FILE::FUNCTION`` references in ``doc`` whose file or function does not exist."""
    texts: dict[str, str | None] = {}
    out = []
    for file, func in named_tests(doc):
        if file not in texts:
            path = tests_dir / file
            texts[file] = path.read_text(encoding="utf-8") if path.is_file() else None
        text = texts[file]
        if text is None or func not in defined_tests(text):
            out.append(f"{file}::{func}")
    return out


def missing_modules(doc: str, tests_dir: Path, skip: tuple[str, ...] = ()) -> list[str]:
    """Test modules of ``tests_dir`` that cite an outside source but are not named in
    ``doc`` (``skip``: file names left out, e.g. this one, whose source words are data)."""
    named = {file for file, _ in named_tests(doc)}
    return sorted(p.name for p in tests_dir.glob("test_*.py")
                  if p.name not in skip and p.name not in named
                  and cites_outside_source(p.read_text(encoding="utf-8")))


# ---------------------------------------------------------------- the page itself


def _doc() -> str:
    return DOC.read_text(encoding="utf-8")


def test_the_table_is_whole():
    rows = table_rows(_doc())
    assert len(rows) >= 150, f"only {len(rows)} rows: is the table there?"
    for cells in rows:
        where = cells[0]
        assert len(cells) == _COLUMNS, f"{where}: {len(cells)} cells, expected {_COLUMNS}"
        assert len(named_tests(cells[0])) == 1, f"{where}: first cell must name one test"
        assert all(cells), f"{where}: an empty cell"
        assert cells[-1].startswith(("passes", "FAILS")), f"{where}: result {cells[-1]!r}"


def test_every_named_test_exists():
    stale = stale_names(_doc(), TESTS)
    assert not stale, "docs/verification.md names tests that do not exist:\n  " + "\n  ".join(
        stale)


def test_every_module_citing_a_source_is_in_the_doc():
    citing = [p for p in TESTS.glob("test_*.py") if p.name != Path(__file__).name
              and cites_outside_source(p.read_text(encoding="utf-8"))]
    assert len(citing) >= 10, "the source words no longer find the handbook tests"
    missing = missing_modules(_doc(), TESTS, skip=(Path(__file__).name,))
    assert not missing, ("test modules citing an outside source but absent from "
                         "docs/verification.md:\n  " + "\n  ".join(missing))


# ---------------------------------------------------------------- the checks can fail


def test_the_checks_catch_a_stale_table(tmp_path):
    (tmp_path / "test_beams.py").write_text(
        "# R = 3wL/8 (Roark, Table 8.1)\ndef test_kept():\n    pass\n\n"
        "async def test_awaited():\n    pass\n", encoding="utf-8")
    (tmp_path / "test_new.py").write_text(
        "def test_added():\n    assert 1 + 1 == 2  # from memory\n", encoding="utf-8")
    (tmp_path / "test_plain.py").write_text(
        "def test_shape():\n    pass  # Gerety, Hickson: not source words\n", encoding="utf-8")
    doc = ("| `tests/test_beams.py::test_kept` | a | b | c | d | passes |\n"
           "| `tests/test_beams.py::test_awaited` | a | b | c | d | passes |\n"
           "| `tests/test_beams.py::test_renamed` | a | b | c | d | passes |\n"
           "| `tests/test_gone.py::test_kept` | a | b | c | d | FAILS |\n")
    assert stale_names(doc, tmp_path) == ["test_beams.py::test_renamed",
                                          "test_gone.py::test_kept"]
    assert missing_modules(doc, tmp_path) == ["test_new.py"]
    assert not cites_outside_source((tmp_path / "test_plain.py").read_text())
    assert [len(r) for r in table_rows(doc)] == [_COLUMNS] * 4
