"""User text is shown literally in every output, and output files are written safely.

Names, load-case names and the case file's own name reach the terminal, documents and
messages; none of them may restyle the terminal (rich markup, emoji codes, escape
sequences), become live HTML in Markdown or HTML, split a one-line message, or crash a
command. Ids are restricted to letters, digits and underscores by the reader, so the text
that gets through is the structure name, load-case names, the file name, and whatever is
typed on the command line (echoed in error messages).

``-o FILE --force`` replaces only regular files (a symbolic link to a regular file: the file
it points to), never a FIFO, a device or a link to one (docs/command-line.md).
"""

from __future__ import annotations

import html
import io
import json
import os
import re
import stat
from html.parser import HTMLParser
from pathlib import Path

import pytest
from markdown_it import MarkdownIt
from rich.console import Console

from leastwork.cli import main
from leastwork.errors import MESSAGE_LIMIT, PLACE_LIMIT, CaseError, MechanismError
from leastwork.output.documents import md_block, md_text, sheet_markdown
from leastwork.output.sheet import Formula, Grid, Para, Sheet, Step
from leastwork.plaintext import literal

#: Names that would restyle or break output if shown raw: rich markup (a bare closing tag
#: raises MarkupError), a hidden hyperlink, live HTML, SGR and OSC 8 escape sequences, an
#: emoji code, Markdown emphasis, a Markdown link, a heading mark, a newline.
NAMES = [
    "probe [/]",
    "[red]x[/]",
    "[link=http://example.invalid]click[/link]",
    "<script>alert(1)</script>",
    "a\x1b[31mred",
    "\x1b]8;;http://x\x07y",
    "pipe | :smile: *em* _u_ [click](http://example.invalid)",
    "# heading\nsecond line\u202e\x9b",
]

#: Load-case names of the same kinds (any text the reader accepts as a case name).
CASE_NAMES = ["dead [/] <b>x</b>", "live \x1b[31m [red]y[/]", "\x1b]8;;http://x\x07z"]


def _toml_string(text: str) -> str:
    """A TOML basic string holding ``text`` exactly (control characters as \\uXXXX)."""
    out = []
    for ch in text:
        if ch in '"\\':
            out.append("\\" + ch)
        elif ord(ch) < 0x20 or 0x7F <= ord(ch) < 0xA0:
            out.append(f"\\u{ord(ch):04x}")
        else:
            out.append(ch)
    return '"' + "".join(out) + '"'


def _case(tmp_path: Path, name: str, cases=CASE_NAMES, file_name: str = "probe.toml") -> Path:
    """A beam fixed at A, held by a tie rod CB at its end B (degree 1), one load case per
    name in ``cases``."""
    loads = "".join(f'\n[[loads]]\nnode = "B"\nfy = "-{10 * (k + 1)} kN"\n'
                    f"case = {_toml_string(c)}\n" for k, c in enumerate(cases))
    text = f"""
[structure]
name = {_toml_string(name)}
units = {{ force = "kN", length = "m" }}

[nodes]
A = [0, 0]
B = [4, 0]
C = [4, 3]

[beams]
AB = {{ nodes = ["A", "B"], EI = "20000 kN*m^2", EA = "1e6 kN" }}

[bars]
CB = {{ nodes = ["C", "B"], EA = "50000 kN" }}

[supports]
A = "fixed"
C = "pinned"
{loads}"""
    path = tmp_path / file_name
    path.parent.mkdir(parents=True, exist_ok=True)
    path.write_text(text, encoding="utf-8")
    return path


@pytest.fixture(autouse=True)
def _wide_terminal(monkeypatch):
    """A wide console, so that no name is wrapped across lines."""
    monkeypatch.setenv("COLUMNS", "400")


def _run(capsys, argv) -> tuple[int, str, str]:
    status = main([str(a) for a in argv])
    out, err = capsys.readouterr()
    return status, out, err


def _no_raw_controls(*texts: str) -> None:
    for text in texts:
        bad = [ch for ch in text if (ord(ch) < 0x20 and ch not in "\n\t")
               or 0x7F <= ord(ch) < 0xA0 or ch == "\u202e"]
        assert not bad, f"raw control characters {bad!r} in output"


# ------------------------------------------------------------------------ terminal


@pytest.mark.parametrize("name", NAMES)
@pytest.mark.parametrize("mode", [[], ["--steps"], ["--quiet"], ["--no-color"]])
def test_solve_on_the_terminal_shows_names_literally(tmp_path, capsys, name, mode):
    case = _case(tmp_path, name)
    status, out, err = _run(capsys, ["solve", case, *mode])
    assert status == 0, err
    _no_raw_controls(out, err)
    if mode != ["--quiet"]:  # the brief output names the load cases only
        assert literal(name) in out
    for c in CASE_NAMES:
        assert literal(c) in out
    # emoji codes stay as typed
    assert "😄" not in out


def test_short_summary_shows_names_literally(tmp_path, capsys, monkeypatch):
    """A structure above the short-summary threshold takes another printing path."""
    monkeypatch.setattr("leastwork.output.terminal.SUMMARY_MAX_MEMBERS", 1)
    case = _case(tmp_path, "[red]big[/] \x1b[2J")
    status, out, err = _run(capsys, ["solve", case])
    assert status == 0, err
    assert "Short summary" in out
    assert literal("[red]big[/] \x1b[2J") in out
    assert literal(CASE_NAMES[1]) in out
    _no_raw_controls(out, err)


def test_case_file_name_is_shown_literally(tmp_path, capsys):
    # the folder "probe [" and the file "] ...": the path reads "probe [/] ..."
    case = _case(tmp_path, "plain", file_name="probe [/] \x1b[31m :smile:.toml")
    assert "probe [/]" in str(case)
    for argv in (["solve", case], ["check", case], ["solve", case, "--steps"]):
        status, out, err = _run(capsys, argv)
        assert status == 0, err
        # the sheet (--steps) names the file without its folders (contract 5.7)
        assert literal(case if "--steps" not in argv else Path(case).name) in out
        _no_raw_controls(out, err)


@pytest.mark.parametrize("name", NAMES)
def test_check_shows_the_name_literally(tmp_path, capsys, name):
    status, out, err = _run(capsys, ["check", _case(tmp_path, name)])
    assert status == 0, err
    assert literal(name) in out and "Suggested redundants" in out
    _no_raw_controls(out, err)


@pytest.mark.parametrize("name", [NAMES[0], NAMES[4]])
def test_fitup_and_influence_show_names_literally(tmp_path, capsys, name):
    case = _case(tmp_path, name)
    status, out, err = _run(capsys, ["fitup", case, "--tolerance", "*=1mm", "--samples", "50",
                                     "--seed", "1"])
    assert status == 0, err
    assert literal(name) in out
    _no_raw_controls(out, err)
    status, out, err = _run(capsys, ["fitup", case, "--adjust", "CB", "--zero", "CB",
                                     "--case", CASE_NAMES[1]])
    assert status == 0, err
    assert literal(name) in out and f"Load case {literal(CASE_NAMES[1])}:" in out
    _no_raw_controls(out, err)
    status, out, err = _run(capsys, ["influence", case, "--quantity", "CB", "--along", "AB",
                                     "--points", "2"])
    assert status == 0, err
    assert literal(name) in out
    _no_raw_controls(out, err)


def test_library_printing_takes_any_console(tmp_path):
    """The printing functions themselves make user text literal, whatever console they
    are given (markup and emoji on, colours on): no MarkupError, no restyling, no escape
    sequence but rich's own colours."""
    from leastwork.io.reader import load_case
    from leastwork.output.terminal import print_brief, print_check, print_steps, print_summary
    from leastwork.solve import solve
    from leastwork.topology import build_topology, choose_redundants

    name = "probe [/] :smile: [red]x[/] \x1b]8;;http://x\x07y"
    st = load_case(_case(tmp_path, name))
    sol = solve(st)
    topo = build_topology(st)
    shows = {"summary": lambda c: print_summary(c, sol), "brief": lambda c: print_brief(c, sol),
             "steps": lambda c: print_steps(c, sol),
             "check": lambda c: print_check(c, st, topo, choose_redundants(st, topo, None))}
    for what, show in shows.items():
        console = Console(file=io.StringIO(), width=300, force_terminal=True, emoji=True)
        show(console)
        out = console.file.getvalue()
        assert "\x1b]" not in out and "\x07" not in out  # no hyperlink or title sequence
        plain = re.sub(r"\x1b\[[0-9;]*m", "", out)  # rich's own colours removed
        _no_raw_controls(plain)
        if what != "check":
            for c in CASE_NAMES:
                assert literal(c) in plain, (what, c)
        if what != "brief":
            assert literal(name) in plain, what


def test_demo_and_starter_list_stay_clean(capsys):
    status, out, err = _run(capsys, ["demo"])
    assert status == 0 and "4/4" in out
    _no_raw_controls(out, err)
    status, out, err = _run(capsys, ["new", "--list"])
    assert status == 0 and "tied-beam" in out.split()
    _no_raw_controls(out, err)


def test_symbolic_closed_forms_show_names_literally(tmp_path, capsys):
    pytest.importorskip("sympy")
    case = _case(tmp_path, "[red]x[/] <b>y</b>", cases=["dead [/] \x1b[31m"])
    status, out, err = _run(capsys, ["solve", case, "--symbolic", "--no-color"])
    assert status == 0, err
    assert literal("[red]x[/] <b>y</b>") in out
    assert literal("dead [/] \x1b[31m") in out
    _no_raw_controls(out, err)
    status, out, err = _run(capsys, ["solve", case, "--symbolic", "--format", "md"])
    assert status == 0, err
    assert "<b>" not in _outside_fences(out)
    _no_raw_controls(out, err)


# ------------------------------------------------------------------------ JSON


@pytest.mark.parametrize("name", NAMES)
def test_json_keeps_names_exact_and_escapes_controls(tmp_path, capsys, name):
    status, out, err = _run(capsys, ["solve", _case(tmp_path, name), "--json"])
    assert status == 0, err
    _no_raw_controls(out, err)
    d = json.loads(out)
    assert d["name"] == name and list(d["cases"]) == CASE_NAMES


# ------------------------------------------------------------------------ documents


def _outside_fences(md: str) -> str:
    """Markdown text with fenced code blocks removed (their content is literal anyway)."""
    return re.sub(r"^(`{3,})[^\n]*\n.*?^\1\s*$", "", md, flags=re.S | re.M)


class _Tags(HTMLParser):
    """Tags and the text of each element (by tag name) of an HTML document."""

    def __init__(self):
        super().__init__(convert_charrefs=True)
        self.tags: list[str] = []
        self.stack: list[str] = []
        self.text: dict[str, list[str]] = {}

    def handle_starttag(self, tag, attrs):
        self.tags.append(tag)
        self.stack.append(tag)
        self.text.setdefault(tag, []).append("")

    def handle_endtag(self, tag):
        if tag in self.stack:
            while self.stack.pop() != tag:
                pass

    def handle_data(self, data):
        for tag in set(self.stack):
            self.text[tag][-1] += data


def _parse_html(text: str) -> _Tags:
    p = _Tags()
    p.feed(text)
    p.close()
    return p


def _render_md(md: str) -> _Tags:
    """Markdown rendered as CommonMark with pipe tables (markdown-it-py, rich's Markdown
    parser), parsed back."""
    return _parse_html(MarkdownIt("commonmark").enable("table").render(md))


#: Tags a calculation sheet in Markdown legitimately renders to.
_SHEET_TAGS = {"h1", "h2", "p", "br", "ul", "li", "strong", "em", "table", "thead", "tbody",
               "tr", "th", "td", "pre", "code", "blockquote", "img"}


@pytest.mark.parametrize("name", NAMES)
def test_markdown_sheet_has_no_live_html_and_reads_literally(tmp_path, capsys, name):
    status, out, err = _run(capsys, ["solve", _case(tmp_path, name), "--format", "md"])
    assert status == 0, err
    _no_raw_controls(out, err)
    assert not re.search(r"<[A-Za-z!/?]", _outside_fences(out))
    doc = _render_md(out)
    assert set(doc.tags) <= _SHEET_TAGS, set(doc.tags) - _SHEET_TAGS
    assert doc.text["h1"] == [literal(name)]
    cells = [t.strip() for t in doc.text.get("td", [])]
    for c in CASE_NAMES:
        assert literal(c) in cells


@pytest.mark.parametrize("name", [NAMES[3], NAMES[6], NAMES[7]])
def test_markdown_and_html_reports(tmp_path, capsys, name):
    case = _case(tmp_path, name)
    md = tmp_path / "calc.md"
    status, _, err = _run(capsys, ["report", case, "-o", md])
    assert status == 0, err
    text = md.read_text(encoding="utf-8")
    _no_raw_controls(text)
    assert not re.search(r"<[A-Za-z!/?]", _outside_fences(text))
    doc = _render_md(text)
    assert set(doc.tags) <= _SHEET_TAGS
    assert doc.text["h1"] == [literal(name)]
    page = tmp_path / "calc.html"
    status, _, err = _run(capsys, ["report", case, "-o", page])
    assert status == 0, err
    text = page.read_text(encoding="utf-8")
    _no_raw_controls(text)
    doc = _parse_html(text)
    assert "script" not in doc.tags and "a" not in doc.tags and "b" not in doc.tags
    assert doc.text["h1"] == [literal(name)]
    assert doc.text["title"] == [f"{literal(name)} — calculation report"]


def _tex_plain(tex: str) -> str:
    """The text a run of tex_escape output stands for (the special characters only)."""
    for k, v in ((r"\textbackslash{}", "\\"), (r"\textasciitilde{}", "~"), (r"\^{}", "^")):
        tex = tex.replace(k, v)
    return re.sub(r"\\([&%$#_{}])", r"\1", tex)


@pytest.mark.parametrize("name", [*NAMES, "50% of $x$ & {y} ~ a_b ^ \\end{document}"])
def test_latex_sheet_escapes_everything(tmp_path, capsys, name):
    status, out, err = _run(capsys, ["solve", _case(tmp_path, name), "--format", "latex"])
    assert status == 0, err
    _no_raw_controls(out, err)
    title = re.search(r"^\\title\{(.*)\}$", out, flags=re.M).group(1)
    assert _tex_plain(title) == literal(name)
    assert out.count(r"\end{document}") == 1


def test_markdown_block_marks_cannot_start_blocks():
    """A paragraph, list item or quote that begins like a heading, a list or code renders
    as that text (checked by a CommonMark renderer)."""
    texts = ["# not a heading", "1. not a list", "2) nor this", "- nor a bullet",
             "+ nor this", "    not code", "=== nor an underline", "> not a quote"]
    sheet = Sheet(title="t", source="s", assumptions=tuple(texts),
                  steps=(Step(1, "# step", tuple(Para(t) for t in texts)
                              + (Formula("x = 1\n``` `\ny"),
                                 Grid("g | h", ("a|b", "c"), (("<i>", 1.0),)))),),
                  cautions=tuple(texts))
    doc = _render_md(sheet_markdown(sheet))
    assert set(doc.tags) <= _SHEET_TAGS - {"img"}
    assert doc.tags.count("h2") == 3  # assumptions, the step, caution
    assert doc.tags.count("pre") == 1 and doc.tags.count("li") == len(texts)
    assert doc.tags.count("blockquote") == len(texts)  # the cautions, one quote each
    assert "ol" not in doc.tags and doc.tags.count("table") == 2  # title block and grid
    paragraphs = [t.strip() for t in doc.text["p"]]
    for t in texts:
        assert t.strip() in paragraphs
    assert doc.text["pre"] == [literal("x = 1\n``` `\ny") + "\n"]
    # the title block's table first (two header cells, its rows), then the grid
    assert [c.strip() for c in doc.text["th"]][-2:] == ["a|b", "c"]
    assert [c.strip() for c in doc.text["td"]][-2:] == ["<i>", "1.00"]


def test_md_text_examples():
    # CommonMark: a backslash before ASCII punctuation shows that character; entities
    # show the character they name (both from the CommonMark specification, from memory)
    assert md_text("a<b>&c") == "a&lt;b&gt;&amp;c"
    assert md_text("x_*y*_") == r"x\_\*y\*\_"
    assert md_block("-1.5 kN") == r"\-1.5 kN"
    assert md_text("-1.5 kN") == "-1.5 kN"  # numbers in tables stay readable


# ------------------------------------------------------------------------ messages


def test_error_messages_are_one_literal_line(tmp_path, capsys):
    case = _case(tmp_path, "plain")
    for argv in (["solve", case, "--case", "no\nsuch \x1b[31mcase [/]"],
                 ["solve", case, "--redundants", "A.y\x1b]8;;http://x\x07"],
                 ["solve", case, "--at", "B.q\n\x1b[2J"],
                 ["new", "kind\x1b[31m\nnext"],
                 ["influence", case, "--quantity", "ZZ\x1b[0m\n", "--along", "AB"],
                 ["fitup", case, "--tolerance", "X\x9b=1mm"]):
        status, out, err = _run(capsys, argv)
        assert status == 2, (argv, err)
        assert err.startswith("leastwork: error: ") and err.count("\n") == 1, err
        _no_raw_controls(out, err)
        assert "Traceback" not in err


def test_bad_id_with_a_newline_in_the_case_file(tmp_path, capsys):
    case = tmp_path / "bad.toml"
    case.write_text('[structure]\nname = "x"\n[nodes]\n"A\\nB\\u001b[31m" = [0, 0]\n',
                    encoding="utf-8")
    status, out, err = _run(capsys, ["solve", case])
    assert status == 2
    assert err.count("\n") == 1 and "A\\nB\\x1b[31m" in err
    _no_raw_controls(out, err)


def test_error_str_is_one_line_and_cut():
    e = CaseError("bad \"a\nb\x1b[31m\" " + "z" * 5000, source="f\n.toml", where="[nodes] A")
    s = str(e)
    assert "\n" not in s and "\x1b" not in s
    assert s.startswith("f\\n.toml: [nodes] A: bad \"a\\nb\\x1b[31m\" ")
    assert len(s) < MESSAGE_LIMIT + 2 * PLACE_LIMIT + 60 and "more characters)" in s
    assert e.message.endswith("z")  # the attribute keeps the text as given
    long_place = str(CaseError("m", source="p" * 1000))
    assert len(long_place) < PLACE_LIMIT + 40
    m = str(MechanismError("moves\x07\n", ["A\n.x", "B.y"]))
    assert "\n" not in m and "\x07" not in m and "A\\n.x" in m


# ------------------------------------------------------------------------ output files


def _special_targets(tmp_path: Path, suffix: str) -> dict[str, Path]:
    """A FIFO, a link to /dev/null, a link to nothing and a folder, named ``*suffix``."""
    fifo = tmp_path / f"pipe{suffix}"
    os.mkfifo(fifo)
    devlink = tmp_path / f"null{suffix}"
    devlink.symlink_to("/dev/null")
    dangling = tmp_path / f"gone{suffix}"
    dangling.symlink_to(tmp_path / "missing")
    folder = tmp_path / f"folder{suffix}"
    folder.mkdir()
    return {"FIFO": fifo, "device": devlink, "nothing": dangling, "directory": folder}


def _unchanged(targets: dict[str, Path]) -> None:
    assert stat.S_ISFIFO(os.lstat(targets["FIFO"]).st_mode)
    assert targets["device"].is_symlink()
    assert os.readlink(targets["device"]) == "/dev/null"
    assert targets["nothing"].is_symlink() and not targets["nothing"].exists()
    assert targets["directory"].is_dir() and not any(targets["directory"].iterdir())


#: A command writing to the file ``-o`` names, by suffix.
_WRITERS = {".json": ["solve", "--json"], ".md": ["solve", "--format", "md"],
            ".html": ["report"]}


@pytest.mark.skipif(not hasattr(os, "mkfifo") or not os.path.exists("/dev/null"),
                    reason="needs named pipes and /dev/null")
@pytest.mark.parametrize("force", [[], ["--force"]])
@pytest.mark.parametrize("suffix", list(_WRITERS))
def test_only_regular_files_are_written(tmp_path, capsys, force, suffix):
    case = _case(tmp_path, "plain")
    targets = _special_targets(tmp_path, suffix)
    command, *options = _WRITERS[suffix]
    for what, path in targets.items():
        status, out, err = _run(capsys, [command, case, *options, "-o", path, *force])
        assert status == 2, (what, err)
        assert err.count("\n") == 1 and what in err and "Traceback" not in err, err
    _unchanged(targets)
    left = sorted(p.name for p in tmp_path.iterdir())
    assert left == sorted(["probe.toml", *(p.name for p in targets.values())])


@pytest.mark.skipif(not hasattr(os, "mkfifo"), reason="needs named pipes")
def test_report_refuses_a_fifo_among_its_images(tmp_path, capsys):
    """Every file of a Markdown report is checked before anything is written."""
    case = _case(tmp_path, "plain", cases=["dead"])
    md = tmp_path / "calc.md"
    os.mkfifo(tmp_path / "calc-dead.svg")
    status, _, err = _run(capsys, ["report", case, "-o", md, "--force"])
    assert status == 2 and "FIFO" in err
    assert not md.exists() and stat.S_ISFIFO(os.lstat(tmp_path / "calc-dead.svg").st_mode)


def test_a_link_to_a_regular_file_is_followed(tmp_path, capsys):
    """Decision (docs/command-line.md): --force replaces the file a symbolic link points
    to and keeps the link; without --force the link counts as an existing file."""
    case = _case(tmp_path, "plain")
    real = tmp_path / "results" / "out.json"
    real.parent.mkdir()
    real.write_text("old\n")
    link = tmp_path / "out.json"
    link.symlink_to(real)
    status, _, err = _run(capsys, ["solve", case, "--json", "-o", link])
    assert status == 2 and "exists" in err and real.read_text() == "old\n"
    status, _, err = _run(capsys, ["solve", case, "--json", "-o", link, "--force"])
    assert status == 0, err
    assert link.is_symlink() and os.readlink(link) == str(real)
    assert json.loads(real.read_text())["name"] == "plain"
    assert sorted(p.name for p in real.parent.iterdir()) == ["out.json"]  # no temporary left


def test_a_link_to_the_case_file_is_refused(tmp_path, capsys):
    case = _case(tmp_path, "plain")
    link = tmp_path / "out.json"
    link.symlink_to(case)
    before = case.read_text()
    status, _, err = _run(capsys, ["solve", case, "--json", "-o", link, "--force"])
    assert status == 2 and "case file" in err
    assert case.read_text() == before and link.is_symlink()


def test_the_written_path_is_echoed_literally(tmp_path, capsys):
    case = _case(tmp_path, "plain")
    out = tmp_path / "a\x1b[31m\nb.json"
    status, _, err = _run(capsys, ["solve", case, "--json", "-o", out])
    assert status == 0 and out.exists()
    assert err == f"leastwork: wrote {literal(out)}\n"
    _no_raw_controls(err)


def test_html_escape_reference():
    # the HTML report escapes exactly as the standard library does, after literal()
    from leastwork.output.html import _e

    assert _e('<a href="x">\x1b') == html.escape('<a href="x">\\x1b', quote=True)
