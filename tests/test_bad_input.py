"""Bad input: every malformed case file and command line gets a clear one-line message.

Source of every expectation here: the interface contract (docs, "Command line"): exit
status 2 when the case or the command line is wrong, with a clear message naming the file,
the table and key or id, and what is expected — never a traceback; 3 when the structure or
the released structure is a mechanism, with what moves; 1 only for a bug.

The corpus is tests/bad_cases/, one malformed case per file. Each file starts with

    # expect: 2            (exit status; 3 for a mechanism)
    # message: PHRASE      (must appear in the error message, case-insensitive)

and a third comment line saying what is wrong (for the mechanisms: why it moves, a fact of
the trade).
"""

from __future__ import annotations

import ast
import shutil
import subprocess
import sys
from pathlib import Path

import pytest

import leastwork.io
from leastwork.cli import main
from leastwork.errors import CaseError, MechanismError
from leastwork.io.reader import load_case

BAD = Path(__file__).parent / "bad_cases"
FILES = sorted(BAD.glob("*.toml"))


def header(path: Path) -> tuple[int, str]:
    """(expected exit status, phrase) from the two comment lines that open ``path``."""
    lines = path.read_text(encoding="utf-8").splitlines()
    assert lines[0].startswith("# expect: "), f"{path.name}: first line must be '# expect: N'"
    assert lines[1].startswith("# message: "), f"{path.name}: second line must be '# message: ...'"
    expect = int(lines[0].removeprefix("# expect: ").strip())
    phrase = lines[1].removeprefix("# message: ").strip()
    return expect, phrase


def assert_one_clean_line(err: str, status: int, names: str) -> str:
    """The contract's shape of an error report: one line on stderr, no traceback, the
    right prefix, naming ``names`` (the file, or "command line")."""
    assert "Traceback" not in err, err
    lines = [ln for ln in err.splitlines() if ln.strip()]
    assert len(lines) == 1, f"expected exactly one error line, got:\n{err}"
    prefix = "leastwork: error: " if status == 2 else "leastwork: unstable: "
    assert lines[0].startswith(prefix), lines[0]
    assert names in lines[0], f"{names!r} not named in: {lines[0]}"
    return lines[0]


# ---------------------------------------------------------------- the corpus itself


def test_corpus_is_large_and_well_formed():
    # the brief for the corpus: at least 55 files, each with a valid header
    assert len(FILES) >= 55
    statuses = set()
    for f in FILES:
        expect, phrase = header(f)
        assert expect in (2, 3), f.name
        assert phrase, f"{f.name}: empty phrase"
        statuses.add(expect)
    assert statuses == {2, 3}


# ---------------------------------------------------------------- in process (fast)


@pytest.mark.parametrize("path", FILES, ids=[f.stem for f in FILES])
def test_bad_case_in_process(path: Path, capsys):
    expect, phrase = header(path)
    status = main(["solve", str(path)])
    err = capsys.readouterr().err
    assert status == expect, err
    line = assert_one_clean_line(err, expect, str(path))
    assert phrase.lower() in line.lower(), f"{phrase!r} not in: {line}"


def test_toml_syntax_errors_give_the_line(capsys):
    # contract: the message says where; for a TOML syntax error that is the line
    for f in (BAD / "toml-syntax-error.toml", BAD / "toml-duplicate-key.toml"):
        assert main(["solve", str(f)]) == 2
        assert "line" in capsys.readouterr().err


# Mechanisms of the structure itself are found by `check` too (it solves nothing, so a
# moment on a pin joint, which needs the loads, is left to `solve`).
STRUCTURAL_MECHANISMS = [f for f in FILES if header(f)[0] == 3
                         and f.stem != "mech-moment-at-hinged-node"]


@pytest.mark.parametrize("path", STRUCTURAL_MECHANISMS, ids=[f.stem for f in STRUCTURAL_MECHANISMS])
def test_mechanism_found_by_check(path: Path, capsys):
    expect, phrase = header(path)
    status = main(["check", str(path)])
    err = capsys.readouterr().err
    assert status == 3, err
    line = assert_one_clean_line(err, 3, str(path))
    assert phrase.lower() in line.lower()


# ---------------------------------------------------------------- as a real process

SUBPROCESS = ["toml-syntax-error", "missing-nodes", "E-nan", "unknown-top-table",
              "mech-truss-panel-no-diagonal", "redundant-leaves-mechanism",
              "compatibility-impossible", "displacement-rotation-hinged-node"]


@pytest.mark.parametrize("stem", SUBPROCESS)
def test_bad_case_as_subprocess(stem: str):
    path = BAD / f"{stem}.toml"
    expect, phrase = header(path)
    run = subprocess.run([sys.executable, "-m", "leastwork.cli", "solve", str(path)],
                         capture_output=True, text=True, timeout=120)
    assert run.returncode == expect, run.stderr
    line = assert_one_clean_line(run.stderr, expect, str(path))
    assert phrase.lower() in line.lower()
    assert run.stdout == ""


def test_installed_script_reports_without_traceback():
    script = shutil.which("leastwork")
    if script is None:
        pytest.skip("the leastwork script is not on PATH")
    path = BAD / "member-unknown-node.toml"
    run = subprocess.run([script, "solve", str(path)], capture_output=True, text=True,
                         timeout=120)
    assert run.returncode == 2
    line = assert_one_clean_line(run.stderr, 2, str(path))
    assert 'unknown node "X"' in line


# ---------------------------------------------------------------- command line

# A valid case: a canopy beam fixed at A, propped by a post (a bar) from C.
GOOD = """\
[structure]
name = "Canopy beam on a post"
units = { force = "kN", length = "m" }

[nodes]
A = [0, 3]
B = [4, 3]
C = [4, 0]

[beams]
AB = { nodes = ["A", "B"], EI = "24000 kN*m^2" }

[bars]
CB = { nodes = ["C", "B"], EA = "3e5 kN" }

[supports]
A = "fixed"
C = "pinned"

[[loads]]
member = "AB"
wy = "-9 kN/m"
"""


@pytest.fixture
def good(tmp_path) -> Path:
    p = tmp_path / "canopy.toml"
    p.write_text(GOOD, encoding="utf-8")
    return p


def test_good_case_solves(good, capsys):
    # the fixture is valid, so the errors below come from the one wrong thing in each call
    assert main(["solve", str(good), "--json"]) == 0
    assert capsys.readouterr().err == ""


@pytest.mark.parametrize(
    ("args", "phrase", "names"),
    [
        (["--jsn"], "unrecognized arguments: --jsn", "command line"),
        (["--redundants", "Q.y"], '--redundants: "Q.y" is not a force', "FILE"),
        (["--redundants", "CB,CB"], '--redundants: "CB" is named twice', "FILE"),
        (["--redundants", "CB,A.rz"], "degree 1 but 2 redundant(s)", "FILE"),
        (["--redundants", ","], "--redundants: expected a comma-separated list", "command line"),
        (["--case", "wind"], '--case: no load case "wind"', "command line"),
        (["--case", ""], 'no load case ""', "command line"),
        (["--at", "B.z"], '--at: cannot read displacement target "B.z"', "FILE"),
        (["--at", "Z.y"], '--at: "Z.y": unknown node "Z"', "FILE"),
        (["--at", "C.rz"], '"C.rz": node C has no rotation of its own', "FILE"),
        (["--at", "AB@9.y"], '"AB@9.y": distance is off the member', "FILE"),
        (["--at", "XY@1.y"], '"XY@1.y": unknown member "XY"', "FILE"),
        (["--at", "A-Q"], '"A-Q": unknown node "Q"', "FILE"),
        (["--case"], "argument --case: expected one argument", "command line"),
    ],
    ids=lambda v: v if isinstance(v, str) else " ".join(v),
)
def test_bad_command_line_options(good, capsys, args, phrase, names):
    status = main(["solve", str(good), *args])
    err = capsys.readouterr().err
    assert status == 2, err
    line = assert_one_clean_line(err, 2, str(good) if names == "FILE" else names)
    assert phrase.lower() in line.lower(), line


def test_redundants_leaving_a_mechanism_on_the_command_line(good, capsys):
    # Releasing C.x leaves the post foot C held only vertically: the vertical post can then
    # swing about B, C moving sideways (common practice: a pin-ended bar whose end is held
    # only along a line across the bar is free to turn).
    assert main(["solve", str(good), "--redundants", "C.x"]) == 3
    line = assert_one_clean_line(capsys.readouterr().err, 3, str(good))
    assert "releasing C.x leaves a mechanism" in line
    assert "C.x" in line.split("Free motion:")[1]


@pytest.mark.parametrize("command", ["solve", "check"])
def test_missing_file(tmp_path, capsys, command):
    missing = tmp_path / "nowhere.toml"
    assert main([command, str(missing)]) == 2
    assert "no such file" in assert_one_clean_line(capsys.readouterr().err, 2, str(missing))


def test_folder_instead_of_file(tmp_path, capsys):
    assert main(["solve", str(tmp_path)]) == 2
    line = assert_one_clean_line(capsys.readouterr().err, 2, str(tmp_path))
    assert "is a folder" in line


def test_file_not_utf8(tmp_path, capsys):
    p = tmp_path / "latin1.toml"
    p.write_bytes('[structure]\nname = "Vordach Stütze"\n'.encode("latin-1"))
    assert main(["solve", str(p)]) == 2
    assert "cannot be read" in assert_one_clean_line(capsys.readouterr().err, 2, str(p))


@pytest.mark.parametrize(
    ("argv", "phrase"),
    [
        (["solve"], "the following arguments are required: case"),
        (["check"], "the following arguments are required: case"),
        (["frobnicate", "x.toml"], "invalid choice: 'frobnicate'"),
    ],
)
def test_bad_command(capsys, argv, phrase):
    assert main(argv) == 2
    assert phrase in assert_one_clean_line(capsys.readouterr().err, 2, "command line")


# ---------------------------------------------------------------- every branch is reached


#: The modules of leastwork/io/ that read no case: the starters and result files.
_NOT_READER = ("starters.py", "writing.py")


def _reader_modules() -> list[Path]:
    """The reader's modules: every module of leastwork/io/ but those in _NOT_READER."""
    folder = Path(leastwork.io.__file__).parent
    return sorted(p for p in folder.glob("*.py") if p.name not in _NOT_READER)


def _raise_lines() -> dict[tuple[str, int], str]:
    """(module file, line number) -> source text of every ``raise ….err(...)`` /
    ``raise CaseError(...)`` in the reader's modules."""
    out = {}
    for path in _reader_modules():
        src = path.read_text(encoding="utf-8")
        for node in ast.walk(ast.parse(src)):
            if isinstance(node, ast.Raise) and isinstance(node.exc, ast.Call):
                f = node.exc.func
                if (isinstance(f, ast.Attribute) and f.attr == "err") or (
                        isinstance(f, ast.Name) and f.id == "CaseError"):
                    text = ast.get_source_segment(src, node).splitlines()[0].strip()
                    out[(str(path), node.lineno)] = text
    return out


def test_every_validation_branch_of_the_reader_is_reached(tmp_path):
    if sys.gettrace() is not None:
        pytest.skip("a tracer (debugger or coverage) is already active")
    raises = _raise_lines()
    assert len(raises) > 50  # the reader validates a lot; guards against a broken parse
    assert {Path(f).name for f, _ in raises} >= {"files.py", "quantities.py", "reader.py",
                                                 "members.py", "supports.py", "loads.py"}
    targets = {str(p) for p in _reader_modules()}
    hit: set[tuple[str, int]] = set()

    def local(frame, event, arg):
        if event == "line":
            hit.add((frame.f_code.co_filename, frame.f_lineno))
        return local

    def tracer(frame, event, arg):
        return local if frame.f_code.co_filename in targets else None

    bad_bytes = tmp_path / "latin1.toml"
    bad_bytes.write_bytes("name = 'Stütze'\n".encode("latin-1"))
    paths = [*FILES, tmp_path / "nowhere.toml", tmp_path, bad_bytes]
    sys.settrace(tracer)
    try:
        for p in paths:
            try:
                load_case(p)
            except (CaseError, MechanismError):
                pass
    finally:
        sys.settrace(None)
    missed = {key: text for key, text in raises.items() if key not in hit}
    assert not missed, "branches of the reader (leastwork/io/) no bad case reaches:\n" + "\n".join(
        f"  {Path(f).name} line {ln}: {text}" for (f, ln), text in sorted(missed.items()))
