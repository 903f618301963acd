"""Symbolic mode with load combinations and every kind of load, the redundants it shares
with the numeric sheet, and the --time-limit option.

Checked against
  * handbook closed forms of the propped cantilever, exactly (sympy.simplify of the
    difference is 0), with the source beside each;
  * linearity: every result of a combination other than the moment extremes is exactly the
    factored sum of its cases' closed forms;
  * the numeric solver (an independent floating-point pipeline): every number of its JSON
    result, for every load case and combination, equals the closed form at the parameters.
"""

from __future__ import annotations

import json
import math
import sys
from pathlib import Path

import pytest

sympy = pytest.importorskip("sympy")

import leastwork  # noqa: E402
from leastwork.cli import main  # noqa: E402
from leastwork.symbolic import solve_symbolic  # noqa: E402

sys.path.insert(0, str(Path(__file__).parent))
from _cases import case_text, flatten_numbers  # noqa: E402

CASES = Path(__file__).parent.parent / "cases"
REL = 1e-9

PROPPED = """
[structure]
name = "Propped cantilever, two cases"
units = { force = "kN", length = "m" }
[parameters]
L = "6 m"
w = "10 kN/m"
P = "20 kN"
EI = "20000 kN*m^2"
[nodes]
A = [0, 0]
B = ["L", 0]
[beams]
AB = { nodes = ["A", "B"], EI = "EI" }
[supports]
A = "fixed"
B = "roller"
[[loads]]
case = "dead"
member = "AB"
wy = "-w"
[[loads]]
case = "live"
member = "AB"
at = "L/2"
fy = "-P"
[combinations]
ULS = { dead = 1.35, live = 1.5 }
lift = { dead = 1, live = "-0.5" }
[analysis]
displacements = ["AB@3.y"]
"""

#: every kind of load and support the reader takes, with combinations over all of them
#: (a factor may be a [parameters] name)
FEATURES = """
[structure]
name = "Two-span beam with every kind of load"
units = { force = "kN", length = "m" }
[parameters]
L = "5 m"
w = "12 kN/m"
P = "30 kN"
k = "9000 kN/m"
gq = 1.5
[materials.steel]
E = "210 GPa"
alpha = "1.2e-5 1/K"
[sections.s]
A = "5000 mm^2"
I = "1.2e8 mm^4"
depth = "300 mm"
[defaults]
material = "steel"
section = "s"
[nodes]
A = [0, 0]
B = ["L", 0]
C = ["2*L", 0]
[beams]
AB = { nodes = ["A", "B"] }
BC = { nodes = ["B", "C"] }
[supports]
A = "fixed"
B = { springs = { y = "k" } }
C = { type = "roller", surface_angle = "30 deg" }
[[loads]]
case = "g"
member = "AB"
wy = "-w"
from = "1 m"
to = "L - 1 m"
[[loads]]
case = "g"
member = "BC"
wy = ["-w", "-2*w"]
[[loads]]
case = "q"
member = "BC"
at = "L/3"
fy = "-P"
fx = "P/4"
[[loads]]
case = "q"
node = "B"
mz = "10 kN*m"
[[loads]]
case = "s"
settlement = "A"
dy = "-5 mm"
drz = "0.001"
[[loads]]
case = "s"
settlement = "C"
dn = "-3 mm"
[[loads]]
case = "t"
member = "AB"
temperature = { uniform = "20 K", gradient = "-10 K" }
[[loads]]
case = "t"
member = "BC"
misfit = "2 mm"
[combinations]
ULS = { g = 1.35, q = "gq" }
all = { g = 1, q = "-0.5", s = 1.1, t = 0.8 }
[analysis]
displacements = ["B.y", "C.x", "AB@2.5.y", "A-C"]
"""

#: combinations added to bundled cases (their own load cases, factors invented)
BUNDLED_COMBINATIONS = {
    "settlement-and-heat": 'SLS = { pipes = 1, settlement = 1, sun = 0.6 }',
    "braced-bay-fitup": 'both = { fitup = 1, wind = "-1.5" }',
}


def exact(result, closed_form) -> None:
    assert sympy.simplify(result - closed_form) == 0, f"{result} != {closed_form}"


def linear_results(case) -> dict[str, object]:
    """Every result of a symbolic case that is linear in the loads (all but the moment
    extremes), by a path name."""
    out = {f"redundant {k}": v for k, v in case.redundants.items()}
    out.update({f"load term {i}": v for i, v in enumerate(case.load_terms)})
    out.update({f"reaction {n}.{d}": v for n, comps in case.reactions.items()
                for d, v in comps.items()})
    out.update({f"{mid} {end} {q}": v for mid, r in case.members.items()
                for end in ("start", "end") for q, v in r[end].items()})
    out.update({f"displacement {t}": v for t, v in case.displacements.items()})
    return out


def assert_factored_sums(sol) -> None:
    assert sol.combinations
    for name, factors in sol.combinations.items():
        got = linear_results(sol.cases[name])
        parts = {case: linear_results(sol.cases[case]) for case in factors}
        for key, value in got.items():
            expected = sum(f * parts[case][key] for case, f in factors.items())
            # cancel is exact for rational functions; simplify only what it leaves (square
            # roots of sloping members are generators to cancel)
            diff = sympy.cancel(value - expected)
            assert diff == 0 or sympy.simplify(diff) == 0, f"{name} {key}"


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


def assert_matches_numeric(sym_dict: dict, num_dict: dict) -> None:
    """Every number of the numeric JSON equals the closed form at the parameter values."""
    assert sym_dict["redundants"] == num_dict["redundants"]
    assert set(sym_dict["cases"]) == set(num_dict["cases"])
    plain = {n: sympy.Symbol(n) for n in sym_dict["parameters"]}
    values = {plain[n]: sympy.sympify(p["exact"]) for n, p in sym_dict["parameters"].items()}
    for name, case in num_dict["cases"].items():
        nflat = {k: v for k, v in flatten_numbers(case).items()
                 # numeric only: deflections along members and stresses (docs/symbolic.md)
                 if "/deflection" not in k and "/stress/" not in k
                 and not k.startswith("/checks")}
        scale = max(abs(v) for k, v in nflat.items() if not k.endswith("/at"))
        sflat = _flatten_strings(sym_dict["cases"][name])
        assert set(nflat) <= set(sflat), sorted(set(nflat) - set(sflat))
        for key, expected in nflat.items():
            got = float(sympy.N(sympy.sympify(sflat[key], locals=plain).xreplace(values), 30))
            kind_scale = max(abs(v) for k, v in nflat.items()
                             if k.split("/")[1] == key.split("/")[1])
            floor = kind_scale if not key.endswith("/at") else scale
            assert abs(got - expected) <= REL * max(abs(expected), floor), (
                f"{name} {key}: symbolic {got!r} ({sflat[key]}), numeric {expected!r}")
        assert sym_dict["cases"][name]["checks"]["equilibrium_residual"] == "0"


# ------------------------------------------------------------------ combinations


@pytest.fixture(scope="module")
def propped():
    return solve_symbolic("propped.toml", text=PROPPED)


def test_combination_of_the_propped_cantilever_is_the_factored_handbook_forms(propped):
    """Propped cantilever (A fixed, B on a roller): uniform load w gives the prop 3wL/8 and
    the fixed-end moment wL^2/8 (AISC Steel Construction Manual, beam diagrams and
    formulas, case 12; Hicks, Civil Engineering Formulas, ch. 2); a point load P at midspan
    gives the prop 5P/16 and the fixed-end moment 3PL/16 (the same manual, case 13, from
    memory). The factors 1.35 and 1.5 are the exact rationals 27/20 and 3/2."""
    sol = propped
    L, w, P = (sol.parameters[n] for n in ("L", "w", "P"))
    half = sympy.Rational(1, 2)
    assert sol.combinations == {"ULS": {"dead": sympy.Rational(27, 20),
                                        "live": sympy.Rational(3, 2)},
                                "lift": {"dead": 1, "live": -half}}
    for name, fd, fl in (("ULS", sympy.Rational(27, 20), sympy.Rational(3, 2)),
                         ("lift", 1, -half)):
        c = sol.cases[name]
        exact(c.redundants["B.y"], fd * 3 * w * L / 8 + fl * 5 * P / 16)
        exact(c.reactions["B"]["y"], fd * 3 * w * L / 8 + fl * 5 * P / 16)
        # the support moment on the beam at A is counter-clockwise under downward loads
        exact(c.reactions["A"]["rz"], fd * w * L**2 / 8 + fl * 3 * P * L / 16)
        exact(c.members["AB"]["start"]["m"], -(fd * w * L**2 / 8 + fl * 3 * P * L / 16))
        assert c.equilibrium_residual == 0
    # the dead case alone: its largest sagging moment 9wL^2/128 at 5L/8 (AISC case 12)
    exact(sol.cases["dead"].members["AB"]["m_max"]["value"], 9 * w * L**2 / 128)
    exact(sol.cases["dead"].members["AB"]["m_max"]["at"], 5 * L / 8)


def test_combination_results_are_the_factored_sums_of_the_cases(propped):
    assert_factored_sums(propped)


def test_every_load_kind_in_combinations_matches_the_numeric_solve():
    """From/to and linearly varying loads, point loads with fx, nodal couples, settlements
    (dy, drz, dn of an inclined roller), a spring support, temperature (uniform and
    gradient) and a misfit, combined with decimal and parameter factors."""
    sol = solve_symbolic("features.toml", text=FEATURES)
    assert sol.combinations["ULS"] == {"g": sympy.Rational(27, 20), "q": sol.parameters["gq"]}
    assert sol.combinations["all"] == {"g": 1, "q": sympy.Rational(-1, 2),
                                       "s": sympy.Rational(11, 10), "t": sympy.Rational(4, 5)}
    num = leastwork.solve(leastwork.loads_case(FEATURES, "features.toml")).to_dict()
    assert_matches_numeric(sol.to_dict(), num)
    assert_factored_sums(sol)


@pytest.mark.parametrize("stem", sorted(BUNDLED_COMBINATIONS))
def test_bundled_case_with_combinations_matches_the_numeric_solve(stem, tmp_path):
    text = (CASES / f"{stem}.toml").read_text(encoding="utf-8")
    text += f"\n[combinations]\n{BUNDLED_COMBINATIONS[stem]}\n"
    path = tmp_path / f"{stem}.toml"
    path.write_text(text, encoding="utf-8")
    sol = solve_symbolic(path)
    assert_matches_numeric(sol.to_dict(), leastwork.solve(leastwork.load_case(path)).to_dict())
    assert_factored_sums(sol)


def test_combinations_through_the_command_line(tmp_path, capsys):
    path = tmp_path / "propped.toml"
    path.write_text(PROPPED)
    assert main(["solve", str(path), "--symbolic", "--json"]) == 0
    sym = json.loads(capsys.readouterr().out)
    assert sym["combinations"] == {"ULS": {"dead": "27/20", "live": "3/2"},
                                   "lift": {"dead": "1", "live": "-1/2"}}
    assert main(["solve", str(path), "--json"]) == 0
    assert_matches_numeric(sym, json.loads(capsys.readouterr().out))
    assert main(["solve", str(path), "--symbolic", "--json", "--case", "ULS"]) == 0
    only = json.loads(capsys.readouterr().out)
    assert list(only["cases"]) == ["ULS"]
    assert main(["solve", str(path), "--symbolic", "--no-color"]) == 0
    out = capsys.readouterr().out
    assert "Load case ULS" in out and "ULS = 27/20 × dead + 3/2 × live" in out
    assert "lift = 1 × dead − 1/2 × live" in out
    md = tmp_path / "calc.md"
    assert main(["solve", str(path), "--symbolic", "-o", str(md)]) == 0
    text = md.read_text()
    assert "Load case ULS" in text and "ULS = 27/20 × dead + 3/2 × live" in text
    tex = tmp_path / "calc.tex"
    assert main(["solve", str(path), "--symbolic", "-o", str(tex)]) == 0
    text = tex.read_text()
    # prop of ULS: 27/20 * 3wL/8 + 3/2 * 5P/16 = 3 (27 L w + 25 P) / 160
    assert "Load case ULS" in text and r"\frac{3 \left(27 L w + 25 P\right)}{160}" in text


# ------------------------------------------------------------------ redundants


# a continuous beam whose middle span is 0.1 mm: supports B and C act almost as one, so
# the reactions B.y and C.y as redundants give an ill-conditioned flexibility matrix
# (common practice)
CLOSE_SUPPORTS = case_text(
    "close supports",
    nodes={"A": [0, 0], "B": [5, 0], "C": [5.0001, 0], "D": [10, 0]},
    beams={"AB": {"nodes": ["A", "B"], "EI": 1e4}, "BC": {"nodes": ["B", "C"], "EI": 1e4},
           "CD": {"nodes": ["C", "D"], "EI": 1e4}},
    supports={"A": "pinned", "B": "roller", "C": "roller", "D": "roller"},
    loads=[{"member": "AB", "wy": -10}],
)


@pytest.fixture()
def reactions_first(monkeypatch):
    """Make the automatic choice take B.y and C.y first, so that the numeric solve swaps
    them for member forces (solve._better_choice)."""
    import leastwork.topology as topo_mod

    solve_mod = sys.modules["leastwork.solve"]
    real = topo_mod.choose_redundants

    def choose(st, topo, names=None, where="", prefer="reactions"):
        if names is None and prefer == "reactions":
            return [topo.column_index["B.y"], topo.column_index["C.y"]]
        return real(st, topo, names, where, prefer=prefer)

    monkeypatch.setattr(solve_mod, "choose_redundants", choose)
    monkeypatch.setattr(topo_mod, "choose_redundants", choose)


def test_closed_forms_use_the_redundants_of_the_numeric_sheet(reactions_first, tmp_path,
                                                              capsys):
    path = tmp_path / "close.toml"
    path.write_text(CLOSE_SUPPORTS)
    num = leastwork.solve(leastwork.load_case(path))
    assert set(num.redundant_names) != {"B.y", "C.y"}  # the numeric solve swapped them
    assert main(["solve", str(path), "--symbolic", "--steps", "--no-color"]) == 0
    out = capsys.readouterr().out
    assert f"Redundants: {', '.join(num.redundant_names)}; degree 2" in out
    # without the numeric solve at hand, the library finds the same choice and says why
    sol = solve_symbolic(path)
    assert sol.redundant_names == num.redundant_names
    assert any("as in the numeric solve" in w for w in sol.warnings)
    assert sol.cases["default"].equilibrium_residual == 0


def test_user_redundants_are_kept(reactions_first, tmp_path):
    path = tmp_path / "close.toml"
    path.write_text(CLOSE_SUPPORTS)
    sol = solve_symbolic(path, redundants=["B.y", "C.y"])
    assert sol.redundant_names == ["B.y", "C.y"] and sol.chosen_by_user


# ------------------------------------------------------------------ --time-limit


@pytest.mark.parametrize("value", ["nan", "inf", "-inf", "1e300", "-1", "0", "3601", "ten"])
def test_bad_time_limit_is_one_line_naming_the_option(value, tmp_path, capsys):
    path = tmp_path / "propped.toml"
    path.write_text(PROPPED)
    assert main(["solve", str(path), "--symbolic", f"--time-limit={value}"]) == 2
    err = capsys.readouterr().err
    assert err.count("\n") == 1 and "--time-limit" in err and "3600" in err
    assert "Traceback" not in err


def test_time_limit_at_the_maximum_is_taken(tmp_path, capsys):
    path = tmp_path / "propped.toml"
    path.write_text(PROPPED)
    assert main(["solve", str(path), "--symbolic", "--time-limit", "3600", "--json"]) == 0
    assert json.loads(capsys.readouterr().out)["mode"] == "symbolic"


@pytest.mark.parametrize("value", [math.nan, 0.0, -1.0, -math.inf])
def test_library_refuses_a_time_limit_that_is_not_positive(value):
    with pytest.raises(ValueError, match="positive number of seconds"):
        solve_symbolic("propped.toml", text=PROPPED, time_limit=value)


@pytest.mark.parametrize("value", [math.inf, 1e300])
def test_library_takes_an_unbounded_time_limit(value):
    sol = solve_symbolic("propped.toml", text=PROPPED, time_limit=value)
    assert set(sol.cases) == {"dead", "live", "ULS", "lift"}
