"""Hostile input to the case reader and to quantity strings on the command line.

Source of every expectation: the interface contract (docs/command-line.md, exit statuses)
and docs/case-format.md §18 "Limits": bad input of any size or shape ends with exit status 2
and one plain line naming the file (or "command line"), the table and key, and what was
expected; never a traceback, never a run until memory or patience runs out. Each class of
fault is tested with the example that found it and a variant.

For the classes that used to hang (a device read until memory runs out, a power of ten
billion digits) the tests assert that the refusal happens; a watchdog alarm only keeps a
regression from stalling the whole suite, it asserts nothing about time.
"""

from __future__ import annotations

import contextlib
import json
import os
import signal
from pathlib import Path

import pytest

from leastwork.cli import main
from leastwork.errors import CaseError
from leastwork.io import files, quantities
from leastwork.io.reader import loads_case
from leastwork.io.record import read_case_record
from leastwork.model.units import (
    QUANTITY_LIMIT,
    UNIT_POWER_LIMIT,
    QuantityError,
    UnitSystem,
    parse_quantity,
    ureg,
)
from leastwork.plaintext import ECHO_LIMIT

#: A message that echoes input cut to ECHO_LIMIT characters stays below this length.
SHORT = 8 * ECHO_LIMIT
FITUP = Path(__file__).resolve().parents[1] / "cases" / "braced-bay-fitup.toml"

CASE = """\
[structure]
name = "hardening probe"
units = {{ force = "kN", length = "m" }}

[parameters]
L = "6 m"
{params}
[nodes]
A = [0, 0]
B = [{bx}, 0]

[beams]
AB = {{ nodes = ["A", "B"], EI = "{ei}" }}

[supports]
A = "fixed"

[[loads]]
node = "B"
fy = "{fy}"
"""


def case_text(bx: str = '"L"', ei: str = "24000 kN*m^2", fy: str = "-10 kN",
              params: str = "") -> str:
    """A cantilever AB (invented demo values) with one field replaced."""
    return CASE.format(bx=bx, ei=ei, fy=fy, params=params)


@contextlib.contextmanager
def watchdog(seconds: int = 120):
    """Turn a hang into a failure instead of a stalled suite (POSIX; no time assertion)."""
    if not hasattr(signal, "SIGALRM"):
        yield
        return

    def expired(signum, frame):
        raise AssertionError(f"no refusal within {seconds} s: the reader hangs")

    previous = signal.signal(signal.SIGALRM, expired)
    signal.alarm(seconds)
    try:
        yield
    finally:
        signal.alarm(0)
        signal.signal(signal.SIGALRM, previous)


def refused(capsys, argv: list[str], *names: str) -> str:
    """Run the CLI in-process; assert exit 2 and one clean line naming ``names``."""
    with watchdog():
        status = main(argv)
    err = capsys.readouterr().err
    assert status == 2, err
    assert "Traceback" not in err
    lines = [ln for ln in err.splitlines() if ln.strip()]
    assert len(lines) == 1, err
    assert lines[0].startswith("leastwork: error: "), lines[0]
    for name in names:
        assert name in lines[0], f"{name!r} not in: {lines[0]}"
    return lines[0]


def check_file(tmp_path: Path, capsys, text: str, *names: str) -> str:
    path = tmp_path / "probe.toml"
    path.write_text(text, encoding="utf-8")
    return refused(capsys, ["check", str(path)], str(path), *names)


def case_error(text: str) -> str:
    with watchdog(), pytest.raises(CaseError) as info:
        loads_case(text, "probe.toml")
    message = str(info.value)
    assert "probe.toml" in message and "\n" not in message
    return message


# ------------------------------------------------- 1. integer arithmetic beyond a float

@pytest.mark.parametrize("expr", ["10**400 m", "7**7**7", "2**1024 m", "(10**300)**2 m",
                                  "(1e300*1e300)**2 m"])
def test_arithmetic_beyond_the_float_range_is_refused(tmp_path, capsys, expr):
    line = check_file(tmp_path, capsys, case_text(bx=f'"{expr}"'), "[nodes] B[0] (x)")
    assert f'"{expr}"' in line
    assert "floating-point range" in line or "infinite" in line


def test_a_tower_of_powers_in_a_parameter_is_refused():
    message = case_error(case_text(params='n = "7**7**7"\n', bx='"n * 1 m"'))
    assert "[parameters] n" in message and "floating-point range" in message


def test_integers_of_the_toml_file_beyond_a_float_are_refused():
    # a 401-digit TOML integer: Python reads it exactly, no float holds it
    assert "expected a finite length" in case_error(case_text(bx="1" + "0" * 400))
    # a 5001-digit one: Python refuses to convert it at all (4300-digit limit)
    assert "not valid TOML" in case_error(case_text(bx="1" + "0" * 5000))


# ------------------------------------------------------------------ 3. nesting depth

@pytest.mark.parametrize("value", [
    "[" * 3000 + "1" + "]" * 3000,                 # arrays, far beyond the parser's recursion
    "{ a = " * 3000 + "1" + " }" * 3000,           # inline tables
    "[" * (files.NESTING_LIMIT + 1) + "1" + "]" * (files.NESTING_LIMIT + 1),  # just over
])
def test_deep_nesting_is_refused(tmp_path, capsys, value):
    text = case_text().replace('name = "hardening probe"',
                               f'name = "hardening probe"\ndescription = {value}')
    line = check_file(tmp_path, capsys, text)
    assert f"nested more than {files.NESTING_LIMIT} deep" in line


def test_nesting_hidden_from_the_count_by_strings_is_still_refused():
    # every level holds a string "]": counting brackets alone sees no nesting, and the
    # TOML parser recurses until Python's limit; that too ends as a clean refusal
    value = '[ "]", ' * 3000 + "1" + " ]" * 3000
    text = case_text().replace('name = "hardening probe"',
                               f'name = "hardening probe"\ndescription = {value}')
    assert "nested more than" in case_error(text)


def test_brackets_inside_strings_and_comments_are_not_nesting():
    deep = "[" * 40
    text = case_text().replace(
        'name = "hardening probe"',
        f'name = "hardening probe"  # {deep}\ndescription = "{deep}{"{" * 40}"')
    st = loads_case(text, "probe.toml")
    assert st.name == "hardening probe"


def test_nesting_at_the_limit_is_read():
    n = files.NESTING_LIMIT
    text = case_text().replace('name = "hardening probe"',
                               f'name = "hardening probe"\ndescription = {"[" * n}1{"]" * n}')
    loads_case(text, "probe.toml")


# --------------------------------------------------- 7. devices, pipes, enormous files

def test_a_device_is_refused(capsys):
    if not os.path.exists("/dev/zero"):
        pytest.skip("no /dev/zero here")
    line = refused(capsys, ["check", "/dev/zero"], "/dev/zero")
    assert "is a device" in line


def test_a_link_to_a_device_is_refused(tmp_path, capsys):
    if not os.path.exists("/dev/zero"):
        pytest.skip("no /dev/zero here")
    link = tmp_path / "case.toml"
    link.symlink_to("/dev/zero")
    assert "is a device" in refused(capsys, ["solve", str(link)], str(link))


@pytest.mark.skipif(not hasattr(os, "mkfifo"), reason="no named pipes here")
def test_a_named_pipe_is_refused_not_waited_on(tmp_path, capsys):
    fifo = tmp_path / "case.toml"
    os.mkfifo(fifo)
    assert "is a named pipe" in refused(capsys, ["check", str(fifo)], str(fifo))


def test_a_file_above_the_size_limit_is_refused(tmp_path, capsys):
    big = tmp_path / "big.toml"
    with big.open("wb") as fh:  # sparse: costs no disk space
        fh.truncate(files.CASE_FILE_LIMIT + 1)
    line = refused(capsys, ["check", str(big)], str(big))
    assert "is larger than 32 MiB" in line


def test_a_file_at_the_size_limit_is_read_to_its_end(tmp_path):
    # exactly the limit: read (and then refused for what it holds, not for its size)
    text = case_text()
    path = tmp_path / "padded.toml"
    path.write_bytes(text.encode() + b"#" + b"x" * (files.CASE_FILE_LIMIT - len(text) - 2)
                     + b"\n")
    assert path.stat().st_size == files.CASE_FILE_LIMIT
    assert files.read_case_text(path).startswith("[structure]")


# ------------------------------------------------------- 8. powers of billions of digits

@pytest.mark.parametrize("field", ["bx", "fy", "ei"])
def test_ten_to_the_ten_billion_is_refused_in_any_quantity(field):
    text = case_text(**{field: '"10**10**10 m"' if field == "bx" else "10**10**10 kN"})
    assert "floating-point range" in case_error(text)


@pytest.mark.parametrize("expr", ["m**(10**10**10)", "2**(10**10)*1 m", "(-3)**(9**9**9) m"])
def test_huge_exponents_are_refused_before_they_are_computed(expr):
    with watchdog(), pytest.raises(QuantityError):
        parse_quantity(expr)


@pytest.mark.parametrize("spec", ["DC=10**10**10", "*=7**7**7 mm", "DC=10**400 mm"])
def test_fitup_tolerance_with_a_huge_power_is_refused(capsys, spec):
    line = refused(capsys, ["fitup", str(FITUP), "--tolerance", spec],
                   "command line", "--tolerance")
    assert "floating-point range" in line


def test_a_unit_name_with_a_huge_power_is_refused(tmp_path, capsys):
    text = case_text().replace('length = "m"', 'length = "m**10**10**10"')
    line = check_file(tmp_path, capsys, text, "[structure] units.length")
    assert "unknown unit" in line
    line = refused(capsys, ["solve", str(FITUP), "--units", "kN,m**10**10**10"], "--units")
    assert "unknown unit" in line


def test_a_unit_raised_to_a_large_power_is_refused():
    assert parse_quantity(f"m**{UNIT_POWER_LIMIT}").units == ureg().parse_units(
        f"m**{UNIT_POWER_LIMIT}")
    message = case_error(case_text(ei="24000 kN*m**20"))
    assert "[beams] AB.EI" in message and "raised to the power 20" in message


# -------------------------------------------- 9. long strings, large cases, short echoes

@pytest.mark.parametrize("length", [QUANTITY_LIMIT + 1, 100_000])
def test_a_long_quantity_string_is_refused_unread(tmp_path, capsys, length):
    expr = "1" * (length - 2) + " m"
    line = check_file(tmp_path, capsys, case_text(bx=f'"{expr}"'), "[nodes] B[0] (x)")
    assert f"at most {QUANTITY_LIMIT} characters long; this one has {length}" in line
    assert len(line) < SHORT  # the value is echoed cut, not in full


def test_a_quantity_at_the_length_limit_is_read():
    expr = "(1" + " + 0" * ((QUANTITY_LIMIT - 5) // 4) + ") m"
    assert len(expr) <= QUANTITY_LIMIT
    assert loads_case(case_text(bx=f'"{expr}"'), "probe.toml").nodes["B"].x == 1.0


def test_a_long_unit_name_is_refused(tmp_path, capsys):
    text = case_text().replace('force = "kN"', 'force = "' + "k" * 100_000 + 'N"')
    line = check_file(tmp_path, capsys, text, "[structure] units.force")
    assert len(line) < SHORT


def _many_nodes(n: int, stray: bool) -> str:
    """``n`` nodes with distinct string coordinates on a chain of bars; with ``stray`` the
    last node is on no bar."""
    nodes = [f'N{i} = ["{i} m", "{i % 7} m"]' for i in range(n)]
    last = n - 1 if stray else n
    bars = [f'B{i} = {{ nodes = ["N{i}", "N{i + 1}"], EA = "{1000 + i} kN" }}'
            for i in range(last - 1)]
    return ("[structure]\nname = \"many nodes\"\n[nodes]\n" + "\n".join(nodes)
            + "\n[bars]\n" + "\n".join(bars) + '\n[supports]\nN0 = "pinned"\n')


def test_cheap_checks_come_before_any_value_is_read(monkeypatch):
    # a stray node and an unknown node id are refused before a single quantity is read:
    # a large hostile case costs its TOML parse, not the conversion of every value
    def no_reading(self, *args, **kwargs):
        raise AssertionError("a quantity was read before the cheap checks")

    monkeypatch.setattr(quantities.QuantityReader, "quantity", no_reading)
    message = case_error(_many_nodes(20_000, stray=True))
    assert "[nodes] N19999" in message and "not connected to any member" in message
    unknown = _many_nodes(2000, stray=False).replace('nodes = ["N5", "N6"]',
                                                     'nodes = ["N5", "Q6"]')
    assert 'unknown node "Q6"' in case_error(unknown)


def test_long_ids_and_values_are_echoed_cut(tmp_path, capsys):
    node = "N" + "x" * 10_000
    text = case_text().replace("B = [", f"{node} = [0, 5]\nB = [")
    line = check_file(tmp_path, capsys, text, "not connected to any member")
    assert "more characters)" in line and len(line) < SHORT
    coords = "[" + ", ".join(["1"] * 100_000) + "]"
    line = check_file(tmp_path, capsys, case_text().replace("B = [", f"C = {coords}\nB = ["),
                      "[nodes] C", "expected coordinates [x, y]")
    assert len(line) < SHORT


def test_distinct_expressions_beyond_the_budget_are_refused(monkeypatch):
    monkeypatch.setattr(quantities, "EXPRESSION_LIMIT", 4)
    # repeats and plain "NUMBER UNIT" strings do not count against the budget
    cheap = _many_nodes(50, stray=False)
    assert len(loads_case(cheap, "probe.toml").nodes) == 50
    many = "\n".join(f'p{i} = "L + {i} m"' for i in range(6))
    message = case_error(case_text(params=many))
    assert "more than 4 distinct quantity expressions" in message


def test_a_long_chain_of_parameters_is_refused():
    chain = "".join(f'p{i} = "p{i + 1} + 0 m"\n' for i in range(100)) + 'p100 = "1 m"\n'
    message = case_error(case_text(params=chain, bx='"p0"'))
    assert f"more than {quantities.PARAMETER_CHAIN_LIMIT} others in a chain" in message
    short = "".join(f'p{i} = "p{i + 1} + 0 m"\n' for i in range(20)) + 'p20 = "1 m"\n'
    assert loads_case(case_text(params=short, bx='"p0"'), "probe.toml").nodes["B"].x == 1.0


# -------------------------------------------------- 11. a number followed by a number

@pytest.mark.parametrize(("expr", "advice"), [
    ("2 500 mm", 'write "2500 mm"'),
    ("12 500 000 N", 'write "12500000 N"'),
    ("1.5 3 m", "write one number"),
    ("2 1/2 in", "write one number"),
])
def test_a_number_followed_by_a_number_is_refused(expr, advice):
    with pytest.raises(QuantityError) as info:
        parse_quantity(expr)
    assert "a number followed by a number" in str(info.value)
    assert advice in str(info.value)


@pytest.mark.parametrize("expr", ["2 mm 3", "L 2", "(L) 2", "07 m", "1.2.3 m"])
def test_other_numbers_side_by_side_are_refused(expr):
    message = case_error(case_text(bx=f'"{expr}"'))
    assert "[nodes] B[0] (x)" in message
    assert "side by side" in message or "only a space between" in message


def test_thousands_space_on_the_command_line(capsys):
    line = refused(capsys, ["fitup", str(FITUP), "--tolerance", "DC=2 500 mm"], "--tolerance")
    assert 'write "2500 mm"' in line


# ------------------------------------------------ 19. messages that say what is wrong

@pytest.mark.parametrize(("expr", "phrase"), [
    ("2 +", "incomplete expression"),
    ("()", "incomplete expression"),
    ("* m", '"*" needs a value on each side'),
    ("(2 m", "unbalanced parentheses"),
    ("2 m)", "unbalanced parentheses"),
    ("'2 m'", "is not allowed in a quantity"),
    ("2 @ 3 m", '"@" is not allowed in a quantity'),
    ("1 +/- 0.1 m", "needs a value on each side"),
    ("2 // 3 m", '"//" is not allowed'),
    ("0x10 m", '"x10" is neither a parameter nor a unit'),
    ("2**(1 m) m", "an exponent must be a plain number"),
    ("1/0 m", "division by zero"),
])
def test_refusals_say_what_is_not_allowed(expr, phrase):
    message = case_error(case_text(bx=f'"{expr}"'))
    assert phrase in message, message
    for word in ("AssertionError", "DefinitionSyntaxError", "TokenError", "Traceback"):
        assert word not in message


@pytest.mark.parametrize("expr", [
    "__import__('os').system('echo hi')", "().__class__", "L.__class__", "open('x')",
    "lambda: 1", "[x for x in ()]", "exec", "eval('1')", "1 if L else 2",
])
def test_expressions_are_never_evaluated_as_code(expr):
    # nothing but numbers, units, parameters and arithmetic: names are looked up as units
    with pytest.raises(CaseError) as info:
        loads_case(case_text(bx=json.dumps(expr)), "probe.toml")
    assert "[nodes] B[0] (x)" in str(info.value)


# ------------------------------------------- engineering expressions read exactly as before

ENGINEERING = ["2*L + 1.5 m", "L/2", "1.2e-5 1/K", "0.5 deg", "kN*m^2", "m**4", "(L/2)**2",
               "24000 kN*m^2", "-3.5e2 mm", "2_500 mm", "9 kN/m", "5000 kN*m/rad", "3 kN m",
               "6500 mm^2", "1.2e8 mm**4", "210 GPa", "L**2/8", "-L", "+L", "2 ^ 3 m",
               "5 %", "3 m²", "1 m * 2", "1/(2*L)", "(L - 1 m)*(L + 1 m)", "25 K", "1e-3 m"]


@pytest.mark.parametrize("expr", ENGINEERING)
def test_engineering_expressions_are_read_as_pint_reads_them(expr):
    # outside value: pint's own parser, the reader's behaviour before these checks
    reg = ureg()
    values = {"L": reg.parse_expression("6 m")}
    ours = parse_quantity(expr, **values)
    theirs = reg.parse_expression(expr, **values)
    assert ours.magnitude == theirs.magnitude
    assert type(ours.magnitude) is type(theirs.magnitude)
    assert ours.units == theirs.units


def test_plain_values_take_the_short_way_to_the_same_number(monkeypatch):
    # the short reading of "NUMBER UNIT" gives bit for bit the value of the full one
    texts = ["2.5 m", "-12 kN", "24000 kN*m^2", "9 kN/m", "6500 mm^2", "1.2e8 mm**4",
             "210 GPa", "30 deg", "5000 kN*m/rad", "1.2e-5 1/K", "25 K", "0.1 in", "7 kip",
             "3.25e-3 ft", "12 lbf*ft", "1e300 m"]
    dims = ["length", "force", "flexural stiffness", "force/length", "area",
            "second moment of area", "stress", "angle", "rotational stiffness",
            "thermal expansion coefficient", "temperature difference", "moment"]
    for units in (UnitSystem(), UnitSystem("N", "mm"), UnitSystem("kip", "ft")):
        short = quantities.QuantityReader("x")
        full = quantities.QuantityReader("x")
        short.units = full.units = units
        full._simple = lambda text, dimension: None
        used = 0
        for text in texts:
            for dim in dims:
                try:
                    a = short.quantity(text, dim, "w")
                except CaseError as exc:
                    a = str(exc)
                try:
                    b = full.quantity(text, dim, "w")
                except CaseError as exc:
                    b = str(exc)
                assert a == b, (units, text, dim)
                used += short._simple(text, dim) is not None
        assert used >= 15  # the short way is really taken (17 of the pairs fit)


def test_the_reader_record_keeps_working():
    st, record = read_case_record(case_text(bx='"L/2 + 1 m"'), "probe.toml")
    assert st.nodes["B"].x == 4.0
    assert record.fields["[nodes] B[0] (x)"] == ("L/2 + 1 m", "length")
    assert record.fields["[beams] AB.EI"] == ("24000 kN*m^2", "flexural stiffness")
    assert "L" in record.parameters

