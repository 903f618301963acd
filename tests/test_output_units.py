"""Output units per quantity (displacement, moment, distributed, stress) and the US
customary units of the registry (k, kip, klf, plf, psf, ksf, ksi, kip*ft)."""

from __future__ import annotations

import json
from pathlib import Path

import pytest

from leastwork.cli import main
from leastwork.io.reader import loads_case
from leastwork.model.units import parse_quantity
from leastwork.solve import solve

ROOT = Path(__file__).resolve().parents[1]
US_CASE = ROOT / "cases" / "us-mezzanine-beam.toml"
FITUP = ROOT / "cases" / "braced-bay-fitup.toml"

# Definitions (common practice): 1 lbf = 4.4482216152605 N exactly, 1 ft = 0.3048 m,
# 1 in = 0.0254 m.
LBF = 4.4482216152605
KIP = 1000 * LBF
FT, INCH = 0.3048, 0.0254

PROPPED = """
[structure]
name = "Propped cantilever"
units = {{ force = "kN", length = "m"{extra} }}

[nodes]
A = [0, 0]
B = [6, 0]

[beams]
AB = {{ nodes = ["A", "B"], EI = "20000 kN*m^2" }}

[supports]
A = "fixed"
B = "roller"

[[loads]]
member = "AB"
wy = "-10 kN/m"

[analysis]
displacements = ["AB@3.y", "B.rz"]
"""


def _json(capsys, path, *extra):
    assert main(["solve", str(path), "--json", "--no-verify", *extra]) == 0
    return json.loads(capsys.readouterr().out)


def _case(tmp_path, extra: str = "", name: str = "propped.toml") -> Path:
    p = tmp_path / name
    p.write_text(PROPPED.format(extra=extra), encoding="utf-8")
    return p


# ------------------------------------------------------------------ the registry
@pytest.mark.parametrize(("text", "si"), [
    ("1 kip", KIP),                          # definition: 1 kip = 1000 lbf
    ("1 k", KIP),                            # common practice: k is the kip
    ("1 klf", KIP / FT),                     # kip per linear foot
    ("1 k/ft", KIP / FT),
    ("1 plf", LBF / FT),
    ("1 psf", LBF / FT**2),
    ("1 ksf", KIP / FT**2),
    ("1 ksi", KIP / INCH**2),
    ("1 kip*ft", KIP * FT),
    ("1 kN", 1000.0),                        # the prefix k still means kilo
    ("1 km", 1000.0),
])
def test_us_units_in_si(text, si):
    q = parse_quantity(text).to_base_units()
    assert float(q.magnitude) == pytest.approx(si, rel=1e-14)


def test_kip_and_ksi_against_their_published_values():
    # 1 kip = 4.4482216152605 kN (definition of the pound-force); 1 ksi = 6.894757 MPa
    # (common practice, to seven figures)
    assert float(parse_quantity("1 kip").to("kN").magnitude) == pytest.approx(
        4.4482216152605, rel=1e-15)
    assert float(parse_quantity("1 ksi").to("MPa").magnitude) == pytest.approx(
        6.894757, rel=1e-7)


def test_klf_and_k_per_ft_read_in_a_case():
    """"-1.2 klf" and "-0.3 k/ft" are loads of 1.2 and 0.3 kip per foot (definitions)."""
    text = PROPPED.format(extra="").replace('wy = "-10 kN/m"', 'wy = "-1.2 klf"') + """
[[loads]]
member = "AB"
wy = "-0.3 k/ft"
"""
    st = loads_case(text)
    wy = sorted(ld.wy[0] for ld in st.loads)
    assert wy == pytest.approx([-1.2 * KIP / FT, -0.3 * KIP / FT], rel=1e-14)


def test_a_parameter_named_k_wins_over_the_kip(tmp_path):
    """A parameter is looked up before a unit (as for every unit name, such as m):
    "2*k" with k = 3 m is 6 m."""
    text = PROPPED.format(extra="").replace("[nodes]", '[parameters]\nk = "3 m"\n\n[nodes]')
    text = text.replace('B = [6, 0]', 'B = ["2*k", 0]')
    st = loads_case(text)
    assert st.length("AB") == pytest.approx(6.0, rel=1e-15)


# ------------------------------------------------------------------ output units
def test_propped_cantilever_deflection_in_mm_and_m(tmp_path, capsys):
    """Mid-span deflection of a propped cantilever under w: w L^4 / (192 EI), from memory
    (also derived by least work); rotation at the prop w L^3 / (48 EI). The value in mm is
    1000 times that in m; rotations stay in rad."""
    w, L, EI = 10.0, 6.0, 20000.0
    in_m = _json(capsys, _case(tmp_path))["cases"]["default"]
    in_mm = _json(capsys, _case(tmp_path, ', displacement = "mm"', "mm.toml"))["cases"]["default"]
    assert in_m["displacements"]["AB@3.y"] == pytest.approx(-w * L**4 / (192 * EI), rel=1e-12)
    assert in_mm["displacements"]["AB@3.y"] == pytest.approx(
        1000 * in_m["displacements"]["AB@3.y"], rel=1e-14)
    assert in_mm["displacements"]["B.rz"] == in_m["displacements"]["B.rz"]
    assert in_m["displacements"]["B.rz"] == pytest.approx(w * L**3 / (48 * EI), rel=1e-12)
    d_m, d_mm = in_m["members"]["AB"]["deflection_max"], in_mm["members"]["AB"]["deflection_max"]
    assert d_mm["value"] == pytest.approx(1000 * d_m["value"], rel=1e-14)
    assert d_mm["at"] == d_m["at"]  # a position along the member stays in the length unit


def test_moment_unit_and_flexibility_in_named_units(tmp_path, capsys):
    """Moments in kN*mm are 1000 times those in kN*m (definition). The flexibility of the
    prop reaction is L^3/(3EI) (from memory) in mm/kN; flexibility . X + load_terms = 0 (the
    compatibility equation, an invariant) holds in the named units."""
    L, EI = 6.0, 20000.0
    base = _json(capsys, _case(tmp_path))
    named = _json(capsys, _case(tmp_path, ', displacement = "mm", moment = "kN*mm"', "n.toml"))
    assert named["units"]["moment"] == "kN*mm" and named["units"]["displacement"] == "mm"
    b, n = base["cases"]["default"], named["cases"]["default"]
    assert n["reactions"]["A"]["rz"] == pytest.approx(1000 * b["reactions"]["A"]["rz"],
                                                      rel=1e-14)
    assert n["reactions"]["A"]["y"] == b["reactions"]["A"]["y"]
    assert n["members"]["AB"]["m_max"]["value"] == pytest.approx(
        1000 * b["members"]["AB"]["m_max"]["value"], rel=1e-14)
    (flex,), (x,), (term,) = n["flexibility"], n["redundants"].values(), n["load_terms"]
    assert n["redundants"] == b["redundants"]
    assert flex[0] == pytest.approx(1000 * L**3 / (3 * EI), rel=1e-12)
    assert flex[0] * x + term == pytest.approx(0.0, abs=1e-12 * abs(term))


def test_units_option_pairs_on_top_of_the_case(tmp_path, capsys):
    """--units QUANTITY=UNIT keeps the case's other units; FORCE,LENGTH replaces them all."""
    p = _case(tmp_path, ', displacement = "mm"')
    d = _json(capsys, p, "--units", "moment=kN*mm")
    assert d["units"]["displacement"] == "mm" and d["units"]["moment"] == "kN*mm"
    assert d["units"]["force"] == "kN"
    d = _json(capsys, p, "--units", "N,mm")
    assert (d["units"]["displacement"], d["units"]["moment"]) == ("mm", "N*mm")
    d = _json(capsys, p, "--units", "kip,ft,displacement=in")
    assert (d["units"]["force"], d["units"]["displacement"], d["units"]["moment"]) == (
        "kip", "in", "kip*ft")


def test_at_names_keep_their_meaning(tmp_path, capsys):
    """"--at AB@3.y" is 3 m along AB (the case length unit) whatever the output units."""
    p = _case(tmp_path)
    base = _json(capsys, p)["cases"]["default"]["displacements"]["AB@3.y"]
    other = _json(capsys, p, "--units", "kN,mm", "--at", "AB@3.y")
    assert other["cases"]["default"]["displacements"]["AB@3.y"] == pytest.approx(
        1000 * base, rel=1e-14)


def test_steps_show_the_named_units(tmp_path, capsys):
    p = _case(tmp_path, ', displacement = "mm"')
    assert main(["solve", str(p), "--steps", "--no-color"]) == 0
    out = capsys.readouterr().out
    assert "mm/kN" in out  # the flexibility coefficient: displacement per unit redundant
    assert "deflection [mm]" in out


@pytest.mark.parametrize("args", [["check"], ["fitup", "--tolerance", "*=1mm"],
                                  ["influence", "--quantity", "A.y", "--along", "AB"]])
def test_every_command_takes_units(tmp_path, capsys, args):
    p = FITUP if args[0] == "fitup" else _case(tmp_path)
    assert main([args[0], str(p), *args[1:], "--units", "displacement=mm,moment=kN*m"]) == 0
    assert main([args[0], str(p), *args[1:], "--units", "moment=kN"]) == 2
    assert "'kN' is not a moment unit" in capsys.readouterr().err


def test_fitup_length_change_in_the_displacement_unit(capsys):
    """The same adjustment in mm is 1000 times that in m (definition)."""
    def run(*extra):
        assert main(["fitup", str(FITUP), "--adjust", "AC", "--zero", "AC", "--case",
                     "fitup", "--json", *extra]) == 0
        return json.loads(capsys.readouterr().out)

    base, mm = run(), run("--units", "displacement=mm")
    assert mm["units"]["displacement"] == "mm"
    assert mm["adjust"]["length_change"] == pytest.approx(
        1000 * base["adjust"]["length_change"], rel=1e-13)
    assert mm["adjust"]["force_per_length"] == pytest.approx(
        base["adjust"]["force_per_length"] / 1000, rel=1e-13)
    assert main(["fitup", str(FITUP), "--adjust", "AC", "--zero", "AC", "--case", "fitup",
                 "--units", "displacement=mm"]) == 0
    out = " ".join(capsys.readouterr().out.split())
    assert " mm shorter" in out or " mm longer" in out


def test_influence_in_the_moment_unit(tmp_path, capsys):
    p = _case(tmp_path)

    def run(*extra):
        assert main(["influence", str(p), "--quantity", "A.rz", "--along", "AB", "--json",
                     *extra]) == 0
        return json.loads(capsys.readouterr().out)

    base, named = run(), run("--units", "moment=kN*mm")
    assert named["units"]["value"] == "kN*mm"
    for a, b in zip(base["points"], named["points"], strict=True):
        assert b["at"] == a["at"]
        assert b["value"] == pytest.approx(1000 * a["value"], rel=1e-13, abs=1e-12)


def test_starters_report_mm_and_kn_m(capsys):
    """Starter cases use the units engineers use: kN*m moments with mm deflections."""
    assert main(["new", "propped-beam"]) == 0
    st = loads_case(capsys.readouterr().out)
    d = solve(st, verify=False).to_dict()
    assert (d["units"]["moment"], d["units"]["displacement"]) == ("kN*m", "mm")


# ------------------------------------------------------------------ the US case
def _si_twin() -> str:
    """The bundled US case written in kN and m (1 kip, 1 ft, 1 in by definition)."""
    text = US_CASE.read_text(encoding="utf-8")
    klf = KIP / FT / 1000  # kN/m per klf
    reps = {
        'units = { force = "kip", length = "ft", displacement = "in", moment = "kip*ft", '
        'distributed = "klf", stress = "ksi" }': 'units = { force = "kN", length = "m" }',
        '"24 ft"': f'"{24 * FT!r} m"', '"6 ft"': f'"{6 * FT!r} m"',
        '"29000 ksi"': f'"{29000 * KIP / INCH**2!r} Pa"',
        '"7.68 in^2"': f'"{7.68 * INCH**2!r} m^2"', '"301 in^4"': f'"{301 * INCH**4!r} m^4"',
        '"-0.45 klf"': f'"{-0.45 * klf!r} kN/m"', '"-450 plf"': f'"{-0.45 * klf!r} kN/m"',
        '"-0.3 k/ft"': f'"{-0.3 * klf!r} kN/m"', '"-2.5 k"': f'"{-2.5 * KIP / 1000!r} kN"',
    }
    for a, b in reps.items():
        assert a in text, a
        text = text.replace(a, b)
    return text


def test_us_case_round_trip_with_si():
    """The same structure in SI and in US units gives the same physical answers."""
    us = solve(loads_case(US_CASE.read_text(encoding="utf-8")), verify=False)
    si = solve(loads_case(_si_twin()), verify=False)
    for name in ("dead", "live", "service", "strength"):
        a, b = us.cases[name], si.cases[name]
        assert a.redundants == pytest.approx(b.redundants, rel=1e-12)
        assert a.displacements["C.y"] == pytest.approx(b.displacements["C.y"], rel=1e-12)
    ju, js = us.to_dict(), si.to_dict()
    assert ju["units"] == {"force": "kip", "length": "ft", "moment": "kip*ft", "rotation": "rad",
                           "displacement": "in", "distributed": "klf", "stress": "ksi"}
    cu, cs = ju["cases"]["strength"], js["cases"]["strength"]
    assert cu["reactions"]["A"]["rz"] * KIP * FT / 1000 == pytest.approx(
        cs["reactions"]["A"]["rz"], rel=1e-12)
    assert cu["displacements"]["C.y"] * INCH == pytest.approx(cs["displacements"]["C.y"],
                                                              rel=1e-12)


def test_us_case_against_statics():
    """Strength combination (1.2 dead + 1.6 live): the hogging moment at the column is the
    overhang's cantilever moment w a^2/2 + P a (statics); the column reaction is
    3 w L/8 + 3 M_B/(2L) from the span plus the overhang's load (derived by least work)."""
    d = solve(loads_case(US_CASE.read_text(encoding="utf-8")), verify=False).to_dict()
    c = d["cases"]["strength"]
    w_span, w_over, P, L, a = 1.2 * 0.45 + 1.6 * 0.3, 1.2 * 0.45, 1.6 * 2.5, 24.0, 6.0
    m_b = w_over * a**2 / 2 + P * a
    assert c["members"]["BC"]["start"]["m"] == pytest.approx(-m_b, rel=1e-12)
    r_b = 3 * w_span * L / 8 + 3 * m_b / (2 * L) + w_over * a + P
    assert c["reactions"]["B"]["y"] == pytest.approx(r_b, rel=1e-12)
