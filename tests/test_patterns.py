"""Live loads span by span ([patterns]) and envelopes per group of combinations
([envelopes]).

Sources: the three-moment equation for three equal spans (derived; the same coefficients
as the handbook continuous-beam tables, from memory: 0.101 wL^2 in an end span with spans
1 and 3 loaded, -0.117 wL^2 at the first interior support with spans 1 and 2 loaded);
invariants (the arrangement "all" is the case itself; each group's envelope covers only its
combinations).
"""

from __future__ import annotations

import pytest
from _cases import check

import leastwork

W, L = 10.0, 6.0


def _three_spans(extra: str = "") -> str:
    spans = "".join(f'\n[[loads]]\nmember = "{m}"\nwy = -{W}\ncase = "live"\n'
                    for m in ("AB", "BC", "CD"))
    dead = "".join(f'\n[[loads]]\nmember = "{m}"\nwy = -2\ncase = "dead"\n'
                   for m in ("AB", "BC", "CD"))
    return f"""
[structure]
name = "three spans"
units = {{ force = "kN", length = "m" }}
[nodes]
A = [0, 0]
B = [{L}, 0]
C = [{2 * L}, 0]
D = [{3 * L}, 0]
[beams]
AB = {{ nodes = ["A", "B"], EI = "30000 kN*m^2" }}
BC = {{ nodes = ["B", "C"], EI = "30000 kN*m^2" }}
CD = {{ nodes = ["C", "D"], EI = "30000 kN*m^2" }}
[supports]
A = "pinned"
B = "roller"
C = "roller"
D = "roller"
{dead}{spans}
[patterns]
live = "spans"
{extra}"""


def _solve(text: str) -> dict:
    return leastwork.solve(leastwork.loads_case(text, source="<test>")).to_dict()


def test_the_arrangements_of_three_spans():
    st = leastwork.loads_case(_three_spans(), source="<test>")
    assert dict(st.patterns)["live"] == ("live[AB+CD]", "live[BC]", "live[AB+BC]",
                                         "live[BC+CD]")


def test_pattern_coefficients_of_three_equal_spans():
    # three-moment equation: spans 1 and 3 loaded, M_B = M_C = -wL^2/20 and the end span's
    # largest moment 0.10125 wL^2 at 0.45 L; spans 1 and 2 loaded, M_B = -7wL^2/60
    c = _solve(_three_spans())["cases"]
    odd = c["live[AB+CD]"]["members"]["AB"]["m_max"]
    check(odd["value"], 0.10125 * W * L**2, W * L**2, "end-span moment")
    check(odd["at"], 0.45 * L, L, "where")
    check(c["live[AB+BC]"]["members"]["AB"]["end"]["m"], -7 * W * L**2 / 60, W * L**2,
          "support moment")
    # invariant: "all spans" is the case itself (handbook 0.1 wL^2 at the supports)
    check(c["live"]["members"]["AB"]["end"]["m"], -0.1 * W * L**2, W * L**2, "all spans")


def test_combinations_take_every_arrangement_and_groups_keep_their_own_envelope():
    extra = ("[combinations]\nuls = { dead = 1.35, live = 1.5 }\n"
             "sls = { dead = 1.0, live = 1.0 }\n\n"
             '[envelopes]\nstrength = ["uls"]\nservice = ["sls"]\n')
    d = _solve(_three_spans(extra))
    strength = d["envelopes"]["strength"]
    assert strength["combinations"] == ["uls", "uls[AB+CD]", "uls[BC]", "uls[AB+BC]",
                                        "uls[BC+CD]"]
    # the governing support moment: 1.35 x dead on all spans (-0.1 wL^2) + 1.5 x live on
    # spans 1 and 2 (-7/60 wL^2), three-moment equation
    bmin = strength["members"]["BC"]["m"]["min"]
    check(bmin["value"], -(1.35 * 2 * 0.1 + 1.5 * W * 7 / 60) * L**2, W * L**2, "support")
    assert bmin["combination"] == "uls[AB+BC]"
    service = d["envelopes"]["service"]
    assert all(c.startswith("sls") for c in service["combinations"])
    assert service["members"]["BC"]["m"]["min"]["combination"].startswith("sls")
    # the envelope over all the combinations is still there, covering both groups
    assert len(d["envelope"]["combinations"]) == 10


@pytest.mark.parametrize(("extra", "words"), [
    ('[envelopes]\nstrength = ["nothing"]', 'no combination "nothing"'),
    ("[envelopes]\nstrength = 3", "expected a list"),
])
def test_bad_groups(extra, words):
    with pytest.raises(leastwork.CaseError, match=words):
        leastwork.loads_case(_three_spans(extra), source="<test>")


def test_bad_patterns():
    text = _three_spans().replace('live = "spans"', 'live = "bays"')
    with pytest.raises(leastwork.CaseError, match='expected "spans"'):
        leastwork.loads_case(text, source="<test>")
    text = _three_spans().replace('live = "spans"', 'wind = "spans"')
    with pytest.raises(leastwork.CaseError, match='no load case "wind"'):
        leastwork.loads_case(text, source="<test>")
