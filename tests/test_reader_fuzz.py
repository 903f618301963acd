"""Fuzzing the case reader: random and mutated TOML documents give a valid model or a
clean CaseError / MechanismError, never another exception (common practice: a reader of
user files must not crash on any input).

Mutations start from the bundled cases: lines deleted, duplicated or swapped, values
replaced by hostile ones (NaN, infinities, zero, negatives, huge numbers, wrong types,
unknown names, unit strings of the wrong dimension). A model that reads is also solved:
the solve too may only end cleanly or with one of the two errors.
"""

from __future__ import annotations

import re
from pathlib import Path

from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from leastwork import solve
from leastwork.errors import CaseError, MechanismError
from leastwork.io.reader import loads_case

CASES = sorted((Path(__file__).resolve().parents[1] / "cases").glob("*.toml"))
TEXTS = [p.read_text() for p in CASES]

HOSTILE = ['"nan"', "nan", "inf", "-inf", '"-inf kN"', "0", "-1", "1e308", "-1e308", "1e-308",
           '""', '"abc"', '"3 kg"', '"2 m"', '"12 kN/m"', '"200 GPa"', '"0.5 deg"', "true",
           "[]", "[1]", '["A"]', '["A", "A"]', '["Z", "A"]', "{}", '{ x = 1 }', '"L"',
           '"L/0"', '"1e999 m"', '"(1 m"', '"1 m, 2 m"', "1999-01-01", '"A.y"', '["A.y"]',
           '"start"', '["start", "end"]', '"fixed"', '"roller"', '{ restrain = ["q"] }']

_VALUE_LINE = re.compile(r"^(\s*[A-Za-z0-9_.\"-]+\s*=\s*)(.+)$")


def _mutate(text: str, ops: list[tuple[int, int, int]]) -> str:
    lines = text.splitlines()
    for kind, a, b in ops:
        if not lines:
            break
        i = a % len(lines)
        if kind == 0:
            del lines[i]
        elif kind == 1:
            lines.insert(i, lines[b % len(lines)])
        elif kind == 2:
            j = b % len(lines)
            lines[i], lines[j] = lines[j], lines[i]
        else:
            value_lines = [k for k, line in enumerate(lines) if _VALUE_LINE.match(line)]
            if value_lines:
                k = value_lines[a % len(value_lines)]
                m = _VALUE_LINE.match(lines[k])
                lines[k] = m.group(1) + HOSTILE[b % len(HOSTILE)]
    return "\n".join(lines)


def _read_and_solve(text: str) -> None:
    try:
        st_ = loads_case(text, "fuzz.toml")
    except (CaseError, MechanismError) as exc:
        assert str(exc).strip()
        assert "Traceback" not in str(exc)
        return
    try:
        sol = solve(st_)
    except (CaseError, MechanismError) as exc:
        assert str(exc).strip()
        return
    assert sol.cases


_SETTINGS = settings(max_examples=150, deadline=None,
                     suppress_health_check=[HealthCheck.too_slow])


@_SETTINGS
@given(case=st.integers(0, len(TEXTS) - 1),
       ops=st.lists(st.tuples(st.integers(0, 3), st.integers(0, 10 ** 6),
                              st.integers(0, 10 ** 6)), min_size=1, max_size=4))
def test_mutated_cases_fail_cleanly(case, ops):
    _read_and_solve(_mutate(TEXTS[case], ops))


@settings(max_examples=100, deadline=None)
@given(text=st.text(alphabet=st.sampled_from(list('[]{}="., \n-_0123456789abcxyzAB#')),
                    max_size=200))
def test_random_text_fails_cleanly(text):
    _read_and_solve(text)


@settings(max_examples=60, deadline=None)
@given(head=st.sampled_from(["[structure]", "[nodes]", "[beams]", "[bars]", "[supports]",
                             "[[loads]]", "[analysis]", "[parameters]", "[defaults]",
                             "[materials.m]", "[sections.s]"]),
       body=st.lists(st.tuples(st.sampled_from(["name", "units", "A", "B", "AB", "nodes", "E",
                                                "I", "EA", "EI", "node", "member", "fy", "wy",
                                                "at", "redundants", "displacements", "shear",
                                                "misfit", "settlement", "dy", "hinges"]),
                               st.sampled_from(HOSTILE)), max_size=6),
       case=st.integers(0, len(TEXTS) - 1))
def test_hostile_table_added_to_a_case_fails_cleanly(head, body, case):
    extra = "\n".join([head, *[f"{k} = {v}" for k, v in dict(body).items()]])
    _read_and_solve(TEXTS[case] + "\n" + extra + "\n")
