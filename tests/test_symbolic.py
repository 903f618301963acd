"""Symbolic mode (leastwork.symbolic): closed forms in the parameter names.

Checked against
  * handbook closed forms, exactly (sympy.simplify(result - closed form) == 0), each with
    its source beside it;
  * the numeric solver (an independent pipeline in floating point) for every bundled case
    in cases/*.toml, every number of the JSON result evaluated at the parameter values;
  * invariants of exact arithmetic: no floating-point number in any result, an exactly
    symmetric flexibility matrix (Maxwell-Betti), exactly zero nodal equilibrium residuals;
  * the time limit and the refusals of unsupported input.

Signs: reactions are what the support applies to the structure (y up, rz counter-clockwise);
m is sagging-positive for a member drawn left to right; n tension positive.
"""

from __future__ import annotations

import dataclasses
import functools
import threading
import time
from pathlib import Path

import pytest

sympy = pytest.importorskip("sympy")

from _cases import flatten_numbers, toml_value  # noqa: E402

import leastwork  # noqa: E402
from leastwork.errors import CaseError  # noqa: E402
from leastwork.model.units import UnitSystem  # noqa: E402
from leastwork.symbolic import solve_symbolic  # noqa: E402

ALL_CASES = sorted((Path(__file__).parent.parent / "cases").glob("*.toml"))
#: which one-way members act depends on the numbers: symbolic mode refuses them (tested
#: in test_symbolic_mode_refuses_one_way_members); tapered beams have no closed forms and are
#: refused too (tests/test_tapered.py), and so are curved members (numerical integrals,
#: tests/test_curved.py)
CASES = [p for p in ALL_CASES if 'acts = "' not in p.read_text()
         and 'taper = "' not in p.read_text() and "curve = {" not in p.read_text()]
REL = 1e-9


@functools.cache
def solved(stem: str):
    """The symbolic solution of a bundled case (each is solved once per test run)."""
    return solve_symbolic(next(p for p in CASES if p.stem == stem))


# ------------------------------------------------------------------ helpers


def param_case(parameters: dict, nodes: dict, *, beams=None, bars=None, supports=None,
               loads=(), analysis=None) -> str:
    """Case text with a [parameters] table; node coordinates may be parameter strings."""
    out = ["[structure]", 'units = { force = "kN", length = "m" }', "", "[parameters]"]
    out += [f"{k} = {toml_value(v)}" for k, v in parameters.items()]
    out += ["", "[nodes]"]
    out += [f"{k} = {toml_value(list(xy))}" for k, xy in nodes.items()]
    out.append("")
    for table, content in (("beams", beams), ("bars", bars), ("supports", supports)):
        if content:
            out.append(f"[{table}]")
            out += [f"{k} = {toml_value(v)}" for k, v in content.items()]
            out.append("")
    for load in loads:
        out.append("[[loads]]")
        out += [f"{k} = {toml_value(v)}" for k, v in load.items()]
        out.append("")
    if analysis:
        out.append("[analysis]")
        out += [f"{k} = {toml_value(v)}" for k, v in analysis.items()]
    return "\n".join(out) + "\n"


def exact(result, closed_form) -> None:
    assert sympy.simplify(result - closed_form) == 0, f"{result} != {closed_form}"


def syms(sol, names: str):
    return [sol.parameters[n] for n in names.split()]


# ------------------------------------------------------------------ handbook closed forms


def test_propped_cantilever_uniform_load():
    # AISC Steel Construction Manual, Beam Diagrams and Formulas, case 12 (beam fixed at
    # one end, supported at the other, uniformly distributed load): R at the supported end
    # 3wL/8, R at the fixed end 5wL/8, fixed-end moment wL^2/8, largest positive moment
    # 9wL^2/128 at 3L/8 from the supported end, slope at the supported end wL^3/(48EI).
    text = param_case(
        {"L": "6 m", "w": "10 kN/m", "EI": "20000 kN*m^2"},
        {"A": (0, 0), "B": ("L", 0)},
        beams={"AB": {"nodes": ["A", "B"], "EI": "EI"}},
        supports={"A": "fixed", "B": "roller"},
        loads=[{"member": "AB", "wy": "-w"}],
        analysis={"redundants": ["B.y"], "displacements": ["B.rz"]},
    )
    sol = solve_symbolic("propped.toml", text=text)
    L, w, EI = syms(sol, "L w EI")
    c = sol.cases["default"]
    exact(c.redundants["B.y"], 3 * w * L / 8)
    exact(c.reactions["A"]["y"], 5 * w * L / 8)
    exact(c.reactions["A"]["rz"], w * L**2 / 8)
    exact(c.members["AB"]["start"]["m"], -w * L**2 / 8)
    exact(c.members["AB"]["m_max"]["value"], 9 * w * L**2 / 128)
    exact(c.members["AB"]["m_max"]["at"], L - 3 * L / 8)
    exact(c.displacements["B.rz"], w * L**3 / (48 * EI))  # counter-clockwise at the prop


def test_fixed_fixed_beam_point_load():
    # AISC Manual, Beam Diagrams and Formulas, case 16 (beam fixed at both ends,
    # concentrated load at any point); Roark's Formulas for Stress and Strain, table 8.1:
    # b = L - a, M1 = Pab^2/L^2 and M2 = Pa^2b/L^2 (hogging), R1 = Pb^2(3a + b)/L^3,
    # moment at the load 2Pa^2b^2/L^3.
    text = param_case(
        {"L": "8 m", "a": "3 m", "P": "40 kN", "EI": "30000 kN*m^2", "EA": "1e6 kN"},
        {"A": (0, 0), "B": ("L", 0)},
        beams={"AB": {"nodes": ["A", "B"], "EI": "EI", "EA": "EA"}},
        supports={"A": "fixed", "B": "fixed"},
        loads=[{"member": "AB", "at": "a", "fy": "-P"}],
    )
    sol = solve_symbolic("fixed-fixed.toml", text=text)
    L, a, P = syms(sol, "L a P")
    b = L - a
    c = sol.cases["default"]
    ab = c.members["AB"]
    exact(ab["start"]["m"], -P * a * b**2 / L**2)
    exact(ab["end"]["m"], -P * a**2 * b / L**2)
    exact(c.reactions["A"]["y"], P * b**2 * (3 * a + b) / L**3)
    exact(c.reactions["B"]["y"], P * a**2 * (a + 3 * b) / L**3)
    exact(ab["m_max"]["value"], 2 * P * a**2 * b**2 / L**3)
    exact(ab["m_max"]["at"], a)
    exact(c.reactions["A"]["x"], 0)


def test_two_span_continuous_beam_uniform_load():
    # AISC Manual, Beam Diagrams and Formulas, case 29 (continuous beam, two equal spans,
    # uniform load on both spans): R1 = R3 = 3wL/8, R2 = 10wL/8, moment over the middle
    # support wL^2/8 (hogging).
    text = param_case(
        {"L": "5 m", "w": "12 kN/m", "EI": "20000 kN*m^2"},
        {"A": (0, 0), "B": ("L", 0), "C": ("2*L", 0)},
        beams={"AB": {"nodes": ["A", "B"], "EI": "EI"}, "BC": {"nodes": ["B", "C"], "EI": "EI"}},
        supports={"A": "pinned", "B": "roller", "C": "roller"},
        loads=[{"member": "AB", "wy": "-w"}, {"member": "BC", "wy": "-w"}],
        analysis={"redundants": ["B.y"]},
    )
    sol = solve_symbolic("two-span.toml", text=text)
    L, w = syms(sol, "L w")
    c = sol.cases["default"]
    exact(c.redundants["B.y"], 10 * w * L / 8)
    exact(c.reactions["A"]["y"], 3 * w * L / 8)
    exact(c.reactions["C"]["y"], 3 * w * L / 8)
    exact(c.members["AB"]["end"]["m"], -w * L**2 / 8)
    exact(c.members["BC"]["start"]["m"], -w * L**2 / 8)


def test_symmetric_three_bar_system():
    # Gere & Timoshenko, Mechanics of Materials, statically indeterminate structures
    # (symmetric three-bar system, vertical bar of length h, two bars at angle alpha from
    # the vertical, same EA, load P at the common joint): force in the vertical bar
    # P/(1 + 2 cos^3 alpha), in each inclined bar P cos^2 alpha/(1 + 2 cos^3 alpha), joint
    # deflection P h/(EA (1 + 2 cos^3 alpha)). Geometry from parameters:
    # cos alpha = h/sqrt(h^2 + b^2).
    text = param_case(
        {"b": "2 m", "h": "3 m", "P": "100 kN", "EA": "2e5 kN"},
        {"A": ("-b", "h"), "B": (0, "h"), "C": ("b", "h"), "D": (0, 0)},
        bars={m: {"nodes": [m[0], "D"], "EA": "EA"} for m in ("AD", "BD", "CD")},
        supports={"A": "pinned", "B": "pinned", "C": "pinned"},
        loads=[{"node": "D", "fy": "-P"}],
        analysis={"displacements": ["D.y"]},
    )
    sol = solve_symbolic("three-bar.toml", text=text)
    b, h, P, EA = syms(sol, "b h P EA")
    cos = h / sympy.sqrt(h**2 + b**2)
    c = sol.cases["default"]
    exact(c.members["BD"]["start"]["n"], P / (1 + 2 * cos**3))
    exact(c.members["AD"]["start"]["n"], P * cos**2 / (1 + 2 * cos**3))
    exact(c.members["CD"]["end"]["n"], P * cos**2 / (1 + 2 * cos**3))
    exact(c.displacements["D.y"], -P * h / (EA * (1 + 2 * cos**3)))


PORTAL = param_case(
    {"L": "10 m", "h": "4 m", "w": "8 kN/m", "EIc": "20000 kN*m^2", "EIb": "50000 kN*m^2"},
    {"A": (0, 0), "B": (0, "h"), "C": ("L", "h"), "D": ("L", 0)},
    beams={"AB": {"nodes": ["A", "B"], "EI": "EIc"}, "BC": {"nodes": ["B", "C"], "EI": "EIb"},
           "DC": {"nodes": ["D", "C"], "EI": "EIc"}},
    supports={"A": "pinned", "D": "pinned"},
    loads=[{"member": "BC", "wy": "-w"}],
)


def test_pinned_base_portal_thrust():
    # From memory: pinned-base portal frame (columns of height h and stiffness EIc, beam of
    # span L and stiffness EIb, members axially rigid) under a uniform load w on the beam
    # has the horizontal base thrust H = w L^2 / (4 h (2k + 3)), k = (EIb/EIc)(h/L).
    # Checked independently of the symbolic mode below (numeric solve at other values).
    sol = solve_symbolic("portal.toml", text=PORTAL)
    L, h, w, EIc, EIb = syms(sol, "L h w EIc EIb")
    k = (EIb / EIc) * (h / L)
    H = w * L**2 / (4 * h * (2 * k + 3))
    c = sol.cases["default"]
    exact(c.reactions["A"]["x"], H)  # the base pushes the column inwards (+x at A)
    exact(c.reactions["D"]["x"], -H)
    exact(c.reactions["A"]["y"], w * L / 2)
    exact(c.members["BC"]["start"]["m"], -H * h)  # corner moment, hogging


@pytest.mark.parametrize("values", [(10.0, 4.0, 8.0, 2.0e4, 5.0e4), (7.0, 6.5, 3.0, 9.0e4, 1.0e4)])
def test_pinned_base_portal_formula_agrees_with_numeric_solve(values):
    # The remembered formula above, checked against the numeric force method (which uses
    # no symbolic algebra) at two sets of values.
    L, h, w, EIc, EIb = values
    text = (PORTAL.replace('L = "10 m"', f'L = "{L} m"').replace('h = "4 m"', f'h = "{h} m"')
            .replace('w = "8 kN/m"', f'w = "{w} kN/m"')
            .replace('EIc = "20000 kN*m^2"', f'EIc = "{EIc} kN*m^2"')
            .replace('EIb = "50000 kN*m^2"', f'EIb = "{EIb} kN*m^2"'))
    res = leastwork.solve(leastwork.loads_case(text)).to_dict()["cases"]["default"]
    k = (EIb / EIc) * (h / L)
    assert res["reactions"]["A"]["x"] == pytest.approx(w * L**2 / (4 * h * (2 * k + 3)), rel=REL)


def test_settling_prop():
    # AISC Manual, Beam Diagrams and Formulas (propped cantilever: a deflection d of the
    # supported end needs the end force 3EId/L^3; common practice): the prop settles d, so
    # it pulls the beam down with 3EId/L^3 and the wall holds it with a couple 3EId/L^2.
    text = param_case(
        {"L": "6 m", "EI": "20000 kN*m^2", "d": "10 mm"},
        {"A": (0, 0), "B": ("L", 0)},
        beams={"AB": {"nodes": ["A", "B"], "EI": "EI"}},
        supports={"A": "fixed", "B": "roller"},
        loads=[{"settlement": "B", "dy": "-d"}],
        analysis={"redundants": ["B.y"]},
    )
    sol = solve_symbolic("settling-prop.toml", text=text)
    L, EI, d = syms(sol, "L EI d")
    c = sol.cases["default"]
    exact(c.redundants["B.y"], -3 * EI * d / L**3)
    exact(c.reactions["A"]["rz"], 3 * EI * d / L**2)
    exact(c.imposed[0], -d)
    assert sol.values[d] == pytest.approx(0.01)  # d stands for metres (case units)


# ------------------------------------------------------------------ against the numeric solver


def _scales(flat: dict) -> dict[str, float]:
    """Largest magnitude of each kind of number in a numeric case result (absolute floor
    for values that are zero in exact arithmetic but round-off in floating point)."""
    out: dict[str, float] = {}
    for path, v in flat.items():
        kind = "at" if path.endswith("/at") else path.split("/")[1].split("[")[0]
        out[kind] = max(out.get(kind, 0.0), abs(v))
    return out


@pytest.mark.parametrize("path", CASES, ids=[p.stem for p in CASES])
def test_bundled_case_matches_numeric_solve(path, record_property):
    t0 = time.perf_counter()
    sol = solved(path.stem)
    elapsed = time.perf_counter() - t0
    record_property("symbolic_seconds", round(elapsed, 2))
    assert elapsed < 30.0
    st = leastwork.load_case(path)
    numeric = leastwork.solve(st)
    # closed forms are in the case's force and length units, whatever output units the
    # case names (docs/json-result.md): compare with the numeric result in those
    numeric.display_units = UnitSystem(st.units.force, st.units.length)
    num = numeric.to_dict()
    sym = sol.to_dict()
    assert sym["units"] == {k: num["units"][k] for k in sym["units"]}
    assert sym["redundants"] == num["redundants"]
    for key in ("degree", "external", "internal", "stable"):
        assert sym["indeterminacy"][key] == num["indeterminacy"][key]
    assert set(sym["cases"]) == set(num["cases"])
    # every string parses with plain sympy.sympify (parameter names as plain symbols) and
    # evaluates, at the parameter values, to the numeric result
    plain = {n: sympy.Symbol(n) for n in sym["parameters"]}
    values = {plain[n]: sympy.sympify(p["exact"]) for n, p in sym["parameters"].items()}
    for name, case in num["cases"].items():
        nflat = {k: v for k, v in flatten_numbers(case).items()
                 # numeric only: deflections along members and stresses (docs/symbolic.md)
                 if "/deflection" not in k and "/stress/" not in k
                 and not k.startswith("/checks")}
        scales = _scales(nflat)
        sflat = _flatten_strings(sym["cases"][name])
        assert set(nflat) <= set(sflat), sorted(set(nflat) - set(sflat))
        for key, expected in nflat.items():
            expr = sympy.sympify(sflat[key], locals=plain)
            assert not expr.atoms(sympy.Float), f"{key}: floating-point number in {expr}"
            got = float(sympy.N(expr.xreplace(values), 30))
            scale = scales["at" if key.endswith("/at") else key.split("/")[1].split("[")[0]]
            assert abs(got - expected) <= REL * max(abs(expected), scale), (
                f"{path.stem} {name} {key}: symbolic {got!r} ({sflat[key]}), numeric "
                f"{expected!r}")
        assert sym["cases"][name]["checks"]["equilibrium_residual"] == "0"


def _flatten_strings(obj, prefix=""):
    out = {}
    if isinstance(obj, dict):
        for k, v in obj.items():
            out.update(_flatten_strings(v, f"{prefix}/{k}"))
    elif isinstance(obj, list):
        for i, v in enumerate(obj):
            out.update(_flatten_strings(v, f"{prefix}[{i}]"))
    elif isinstance(obj, str):
        out[prefix] = obj
    return out


def test_flexibility_is_exactly_symmetric():
    # Maxwell-Betti reciprocity: delta_ij = delta_ji, here as an exact identity in the
    # parameters (two redundants of different kinds in the footbridge truss, two reactions
    # of the three-span beam with shear energy).
    for name in ("footbridge-truss", "floor-beam-3span"):
        sol = solved(name)
        F = next(iter(sol.cases.values())).flexibility
        assert F.shape == (2, 2)
        assert sympy.simplify(F - F.T) == sympy.zeros(2, 2)
        assert F[0, 1] != 0


def test_case_without_parameters_gives_exact_numbers():
    path = next(p for p in CASES if p.stem == "tied-beam")
    sol = solved("tied-beam")
    c = sol.cases["default"]
    assert sol.parameters == {}
    assert isinstance(c.redundants["DB"], sympy.Rational)
    assert isinstance(c.flexibility[0, 0], sympy.Rational)
    num = leastwork.solve(leastwork.load_case(path)).to_dict()["cases"]["default"]
    assert float(c.redundants["DB"]) == pytest.approx(num["redundants"]["DB"], rel=REL)


def test_units_of_symbols_are_case_units():
    # parameters given in other units stand for their values in the case units (N, mm)
    text = """
[structure]
units = { force = "N", length = "mm" }
[parameters]
L = "3 m"
M = "5 kN*m"
EI = "2e12 N*mm^2"
[nodes]
A = [0, 0]
B = ["L", 0]
[beams]
AB = { nodes = ["A", "B"], EI = "EI" }
[supports]
A = "fixed"
[[loads]]
node = "B"
mz = "M"
[analysis]
displacements = ["B.y", "B.rz"]
"""
    sol = solve_symbolic("units.toml", text=text)
    L, M, EI = syms(sol, "L M EI")
    assert sol.values == {L: 3000.0, M: 5.0e6, EI: 2.0e12}
    assert sol.parameter_units == {"L": "mm", "M": "N*mm", "EI": "N*mm**2"}
    c = sol.cases["default"]
    # a cantilever under an end couple M: end rotation ML/EI, end deflection ML^2/(2EI)
    # (AISC Manual, Beam Diagrams and Formulas; common practice)
    exact(c.displacements["B.rz"], M * L / EI)
    exact(c.displacements["B.y"], M * L**2 / (2 * EI))
    exact(c.members["AB"]["start"]["m"], M)


def test_extra_displacements_and_chosen_redundants():
    path = next(p for p in CASES if p.stem == "canopy-prop")
    sol = solve_symbolic(path, redundants=["A.rz"], extra_displacements=["B.x", "AB@3.y"])
    assert sol.redundant_names == ["A.rz"]
    c = sol.cases["default"]
    st = leastwork.load_case(path)
    st = dataclasses.replace(st, displacements=(*st.displacements, "B.x", "AB@3.y"))
    num = leastwork.solve(st, ["A.rz"]).to_dict()["cases"]["default"]
    for t in ("B.y", "AB@2.25.y", "B.x", "AB@3.y"):
        assert sol.numeric(c.displacements[t]) == pytest.approx(
            num["displacements"][t], rel=REL, abs=1e-15)
    assert sol.numeric(c.redundants["A.rz"]) == pytest.approx(num["redundants"]["A.rz"],
                                                               rel=REL)


def test_a_case_already_read_is_not_read_again(tmp_path):
    # invariant: `--symbolic` hands over the case the numeric solve read (the structure
    # and the quantities as written); the closed forms are those of reading the file
    from leastwork.io.files import read_case_text
    from leastwork.io.record import read_case_record

    path = next(p for p in CASES if p.stem == "canopy-prop")
    read = read_case_record(read_case_text(path), str(path))
    gone = tmp_path / "no-such-file.toml"  # nothing may be read from this name
    again = solve_symbolic(gone, read=read)
    assert again.to_dict()["cases"] == solved("canopy-prop").to_dict()["cases"]
    with pytest.raises(CaseError, match="no such file"):
        solve_symbolic(gone)


def test_derived_parameters_can_be_expanded():
    # a simply supported beam with a point load at mid-span given through a derived
    # parameter: mid-span moment PL/4 (AISC Manual, Beam Diagrams and Formulas, case 7)
    text = param_case(
        {"L": "6 m", "P": "20 kN", "half": "L/2"},
        {"A": (0, 0), "B": ("L", 0)},
        beams={"AB": {"nodes": ["A", "B"], "EI": "20000 kN*m^2"}},
        supports={"A": "pinned", "B": "roller"},
        loads=[{"member": "AB", "at": "half", "fy": "-P"}],
    )
    kept = solve_symbolic("derived.toml", text=text)
    expanded = solve_symbolic("derived.toml", text=text, expand_derived=True)
    L, P, half = syms(kept, "L P half")
    m_kept = kept.cases["default"].members["AB"]["m_max"]
    m_exp = expanded.cases["default"].members["AB"]["m_max"]
    exact(m_kept["value"], P * half * (L - half) / L)  # half stays a symbol of its own
    assert m_exp["value"].free_symbols == {L, P}
    exact(m_exp["value"], P * L / 4)
    exact(m_exp["at"], L / 2)
    assert kept.values[half] == pytest.approx(3.0)


# ------------------------------------------------------------------ limits and refusals


def test_time_limit_gives_a_clear_case_error():
    path = next(p for p in CASES if p.stem == "portal-frame")
    t0 = time.perf_counter()
    with pytest.raises(CaseError, match=r"beyond reach within 0\.3 s.*numerically"):
        solve_symbolic(path, time_limit=0.3)
    assert time.perf_counter() - t0 < 5.0


def test_time_limit_outside_the_main_thread():
    path = next(p for p in CASES if p.stem == "portal-frame")
    out = {}

    def run():
        try:
            solve_symbolic(path, time_limit=0.3)
        except CaseError as exc:
            out["error"] = str(exc)

    t = threading.Thread(target=run)
    t.start()
    t.join(30.0)
    assert not t.is_alive()
    assert "beyond reach" in out.get("error", "")


def test_refuses_parameter_with_units_beyond_force_length_temperature():
    text = param_case(
        {"L": "6 m", "t": "3 s"},
        {"A": (0, 0), "B": ("L", 0)},
        beams={"AB": {"nodes": ["A", "B"], "EI": "20000 kN*m^2"}},
        supports={"A": "fixed"},
        loads=[{"node": "B", "fy": -10.0}],
    )
    with pytest.raises(CaseError, match="force, length and temperature"):
        solve_symbolic("seconds.toml", text=text)


def test_refuses_singular_flexibility_instead_of_guessing():
    # two axially rigid beams in line between two pinned supports, heated: the horizontal
    # redundant strains no flexible part, and the imposed elongation has nowhere to go
    text = param_case(
        {"L": "6 m"},
        {"A": (0, 0), "B": ("L", 0)},
        beams={"AB": {"nodes": ["A", "B"], "EI": "20000 kN*m^2"}},
        supports={"A": "pinned", "B": "pinned"},
        loads=[{"member": "AB", "misfit": "2 mm"}],
    )
    with pytest.raises(CaseError, match="no solution"):
        solve_symbolic("rigid.toml", text=text)


def test_symbolic_mode_refuses_one_way_members():
    one_way = [p for p in ALL_CASES if 'acts = "' in p.read_text()]
    assert one_way  # the bundled rod-braced shed
    for path in one_way:
        with pytest.raises(leastwork.CaseError, match="does not take one-way members"):
            solve_symbolic(path)
