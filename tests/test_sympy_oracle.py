"""Random continuous beams checked against an independent oracle:
sympy.physics.continuum_mechanics.beam.Beam (singularity-function beam solver).

Each beam: 2-4 spans of random length, one EI and one EA for the whole beam, a pin at the
first support (sometimes a fixed end instead), rollers at the others (sometimes a fixed
end at the right), random point loads, full and partial uniform loads, and sometimes a
free node inside a span (so that the section forces there can be read from leastwork).
All numbers are rounded to short decimals and handed to sympy as exact rationals.

sympy's sign conventions (sympy 1.14; checked by test_oracle_conventions below):
  * a load value is positive UPWARD (apply_load(-P, a, -1) is a downward point load), so a
    solved reaction load is the upward force of the support = leastwork's global "y";
  * a moment load (order -2) is positive CLOCKWISE, so a fixed-end reaction moment M
    equals -rz of leastwork (rz counter-clockwise positive);
  * Beam.bending_moment() is HOGGING-positive: m_leastwork = -bending_moment(x) for these
    left-to-right beams;  Beam.shear_force() = d(bending_moment)/dx, so v = -shear_force;
  * Beam.deflection() is positive upward, as leastwork's y displacement.
"""

from __future__ import annotations

import functools
from fractions import Fraction

import numpy as np
import pytest

sympy = pytest.importorskip("sympy")
from _cases import case_text, ea, ei, solve  # noqa: E402
from sympy import Rational, symbols  # noqa: E402
from sympy.physics.continuum_mechanics.beam import Beam  # noqa: E402

N_BEAMS = 10
SEED = 20240611
EI = 31500.0  # kN*m^2
EA = 2.0e6  # kN
REL = 1e-8


def q(value: float, step: float) -> Fraction:
    """value rounded to a multiple of step, as an exact fraction."""
    n = round(value / step)
    return Fraction(n) * Fraction(step).limit_denominator(1000)


# ------------------------------------------------------------------ random beams


def make_beam(rng: np.random.Generator) -> dict:
    """A random continuous beam as plain data (positions in m, loads in kN, kN/m)."""
    nspans = int(rng.integers(2, 5))
    spans = [q(rng.uniform(2.0, 8.0), 0.05) for _ in range(nspans)]
    supports_x = [Fraction(0)]
    for s in spans:
        supports_x.append(supports_x[-1] + s)
    fixed_left = bool(rng.random() < 0.3)
    fixed_right = bool(rng.random() < 0.3)

    # nodes: supports, plus sometimes one free node inside a span
    nodes = []  # (name, x, support kind or None)
    names = iter("ABCDEFGHJKLMNPQRSTUVWXYZ")
    for i, x in enumerate(supports_x):
        if i == 0:
            kind = "fixed" if fixed_left else "pinned"
        elif i == nspans:
            kind = "fixed" if fixed_right else "roller"
        else:
            kind = "roller"
        if i > 0 and rng.random() < 0.4:  # a free node in the span just completed
            lo, hi = supports_x[i - 1], x
            xf = lo + q(rng.uniform(0.25, 0.75) * float(hi - lo), 0.05)
            nodes.append((next(names), xf, None))
        nodes.append((next(names), x, kind))

    members = []  # (id, start name, end name, x0, x1)
    for (na, xa, _), (nb, xb, _) in zip(nodes, nodes[1:]):
        members.append((na + nb, na, nb, xa, xb))

    loads = []  # dicts in leastwork's form plus the absolute data for sympy
    for mid, _na, _nb, x0, x1 in members:
        length = x1 - x0
        for _ in range(int(rng.integers(0, 3))):  # point loads strictly inside
            a = q(rng.uniform(0.1, 0.9) * float(length), 0.05)
            a = min(max(a, Fraction(1, 20)), length - Fraction(1, 20))
            sign = -1 if rng.random() < 0.85 else 1
            p = sign * q(rng.uniform(5.0, 60.0), 0.5)
            loads.append({"kind": "point", "member": mid, "at": a, "x": x0 + a, "value": p})
        if rng.random() < 0.6:
            w = -q(rng.uniform(2.0, 20.0), 0.25)
            loads.append({"kind": "udl", "member": mid, "x0": x0, "x1": x1, "value": w})
        if rng.random() < 0.35:
            f = q(rng.uniform(0.0, 0.5) * float(length), 0.05)
            t = q(rng.uniform(0.55, 1.0) * float(length), 0.05)
            if t > f:
                w = -q(rng.uniform(2.0, 25.0), 0.25)
                loads.append(
                    {
                        "kind": "udl",
                        "member": mid,
                        "from": f,
                        "to": t,
                        "x0": x0 + f,
                        "x1": x0 + t,
                        "value": w,
                    }
                )
    for name, x, kind in nodes:
        if kind is None and rng.random() < 0.5:
            loads.append(
                {"kind": "node", "node": name, "x": x, "value": -q(rng.uniform(5, 40), 0.5)}
            )
    if not loads:  # every beam carries something
        mid, _, _, x0, x1 = members[0]
        loads.append({"kind": "udl", "member": mid, "x0": x0, "x1": x1, "value": Fraction(-10)})
    return {"nodes": nodes, "members": members, "loads": loads}


def beams():
    rng = np.random.default_rng(SEED)
    return [make_beam(rng) for _ in range(N_BEAMS)]


BEAMS = beams()


def leastwork_text(beam: dict) -> str:
    nodes = {n: (float(x), 0.0) for n, x, _ in beam["nodes"]}
    members = {
        mid: {"nodes": [a, b], "EI": ei(EI), "EA": ea(EA)} for mid, a, b, _, _ in beam["members"]
    }
    supports = {n: kind for n, _, kind in beam["nodes"] if kind}
    loads = []
    for ld in beam["loads"]:
        if ld["kind"] == "point":
            loads.append({"member": ld["member"], "at": float(ld["at"]), "fy": float(ld["value"])})
        elif ld["kind"] == "node":
            loads.append({"node": ld["node"], "fy": float(ld["value"])})
        elif "from" in ld:
            loads.append(
                {
                    "member": ld["member"],
                    "wy": float(ld["value"]),
                    "from": float(ld["from"]),
                    "to": float(ld["to"]),
                }
            )
        else:
            loads.append({"member": ld["member"], "wy": float(ld["value"])})
    free = [n for n, _, kind in beam["nodes"] if kind is None]
    analysis = {"displacements": [f"{n}.y" for n in free]} if free else None
    return case_text(
        "random continuous beam",
        nodes,
        beams=members,
        supports=supports,
        loads=loads,
        analysis=analysis,
    )


# ------------------------------------------------------------------ the oracle


def R(f: Fraction):
    return Rational(f.numerator, f.denominator)


@functools.cache
def oracle(index: int) -> dict:
    """sympy's solution of beam `index`: reactions, moment/shear/deflection functions."""
    beam = BEAMS[index]
    total = beam["nodes"][-1][1]
    b = Beam(R(total), Rational(EI), 1)  # E = EI (kN*m^2, an integer), I = 1
    unknowns, reaction_of = [], {}
    deflection_bc, slope_bc = [], []
    for name, x, kind in beam["nodes"]:
        if kind is None:
            continue
        r = symbols(f"R_{name}")
        b.apply_load(r, R(x), -1)
        unknowns.append(r)
        reaction_of[(name, "y")] = r
        deflection_bc.append((R(x), 0))
        if kind == "fixed":
            m = symbols(f"M_{name}")
            b.apply_load(m, R(x), -2)
            unknowns.append(m)
            reaction_of[(name, "rz")] = m
            slope_bc.append((R(x), 0))
    for ld in beam["loads"]:
        if ld["kind"] in ("point", "node"):
            b.apply_load(R(ld["value"]), R(ld["x"]), -1)
        else:
            b.apply_load(R(ld["value"]), R(ld["x0"]), 0, end=R(ld["x1"]))
    b.bc_deflection = deflection_bc
    if slope_bc:
        b.bc_slope = slope_bc
    b.solve_for_reaction_loads(*unknowns)
    sol = b.reaction_loads
    reactions = {}
    for (name, comp), sym in reaction_of.items():
        value = float(sol[sym])
        reactions[(name, comp)] = value if comp == "y" else -value  # clockwise -> ccw
    x = b.variable
    moment = sympy.lambdify(x, b.bending_moment(), "math")
    shear = sympy.lambdify(x, b.shear_force(), "math")
    defl = b.deflection()
    scale = max(abs(v) for v in reactions.values())
    return {
        "reactions": reactions,
        "M": moment,
        "V": shear,
        "defl": defl,
        "x": x,
        "scale_f": scale,
        "scale_m": scale * float(total),
        "length": float(total),
    }


def m_ours(orc, x: float) -> float:
    """Sagging moment at x.  At the far end of the beam sympy's singularity functions
    already include a fixed end's reaction moment (<0>^0 = 1), giving the moment just
    beyond the beam; the beam's own end moment is the limit from the left."""
    if x >= orc["length"]:
        x = orc["length"] - 1e-10
    return -orc["M"](x)


def member_extremes(orc, beam, mid):
    """Exact max/min of the sagging moment over a member: the moment is quadratic between
    breakpoints (member ends, point loads, ends of partial loads), so each piece's
    extreme is at a piece end or at its vertex."""
    _, _, _, x0, x1 = next(m for m in beam["members"] if m[0] == mid)
    pts = {x0, x1}
    for ld in beam["loads"]:
        for key in ("x", "x0", "x1"):
            if key in ld and x0 < ld[key] < x1:
                pts.add(ld[key])
    pts = sorted(float(p) for p in pts)
    cand = []
    for p, r in zip(pts, pts[1:]):
        xs = np.array([p, (p + r) / 2, r])
        ys = np.array([m_ours(orc, xx) for xx in xs])
        cand += list(zip(xs, ys))
        a2, a1, _a0 = np.polyfit(xs - p, ys, 2)
        if abs(a2) > 1e-12 * orc["scale_m"]:
            xv = p - a1 / (2 * a2)
            if p < xv < r:
                cand.append((xv, m_ours(orc, xv)))
    vmax = max(c[1] for c in cand)
    vmin = min(c[1] for c in cand)
    return vmax, vmin, float(x0)


# ------------------------------------------------------------------ tests


def test_oracle_conventions():
    """The sympy conventions stated above, on handbook cases (Hicks ch. 2 / AISC beam
    formulas: propped cantilever under uniform load, R = 5wl/8 and 3wl/8, wall moment
    wl^2/8; simply supported span under a central load, M = Pl/4)."""
    l, w = Rational(6), Rational(12)
    for fixed_at in (0, l):
        b = Beam(l, EI, 1)
        rf, rs, mf = symbols("rf rs mf")
        other = l - fixed_at
        b.apply_load(rf, fixed_at, -1)
        b.apply_load(mf, fixed_at, -2)
        b.apply_load(rs, other, -1)
        b.apply_load(-w, 0, 0, end=l)
        b.bc_deflection = [(0, 0), (l, 0)]
        b.bc_slope = [(fixed_at, 0)]
        b.solve_for_reaction_loads(rf, rs, mf)
        s = b.reaction_loads
        assert s[rf] == 5 * w * l / 8 and s[rs] == 3 * w * l / 8
        # wall moment counter-clockwise at a left wall, clockwise at a right wall
        ccw = w * l**2 / 8 if fixed_at == 0 else -w * l**2 / 8
        assert s[mf] == -ccw  # sympy: clockwise positive
    b = Beam(4, EI, 1)
    r1, r2 = symbols("r1 r2")
    b.apply_load(r1, 0, -1)
    b.apply_load(r2, 4, -1)
    b.apply_load(-10, 2, -1)
    b.bc_deflection = [(0, 0), (4, 0)]
    b.solve_for_reaction_loads(r1, r2)
    x = b.variable
    assert b.bending_moment().subs(x, 2) == -10  # sagging Pl/4 = 10 comes out negative
    assert b.shear_force().subs(x, 1) == -5  # v = dm/dx = +5 for sagging m
    assert b.deflection().subs(x, 2) < 0  # downward is negative


@pytest.mark.parametrize("i", range(N_BEAMS))
def test_reactions_match_sympy(i):
    beam, orc = BEAMS[i], oracle(i)
    c = solve(leastwork_text(beam))["cases"]["default"]
    tol = REL * orc["scale_f"]
    for (name, comp), expected in orc["reactions"].items():
        scale = orc["scale_m"] if comp == "rz" else orc["scale_f"]
        assert c["reactions"][name][comp] == pytest.approx(expected, abs=REL * scale), (
            f"{name}.{comp}"
        )
    first = beam["nodes"][0][0]
    assert c["reactions"][first]["x"] == pytest.approx(0.0, abs=tol)  # no horizontal load


@pytest.mark.parametrize("i", range(N_BEAMS))
def test_member_end_forces_match_sympy(i):
    beam, orc = BEAMS[i], oracle(i)
    c = solve(leastwork_text(beam))["cases"]["default"]
    eps = 1e-9  # look just inside the member for shear (it jumps at supports and loads)
    for mid, _a, _b, x0, x1 in beam["members"]:
        x0, x1 = float(x0), float(x1)
        res = c["members"][mid]
        assert res["start"]["m"] == pytest.approx(m_ours(orc, x0), abs=REL * orc["scale_m"]), (
            f"{mid} start m"
        )
        assert res["end"]["m"] == pytest.approx(m_ours(orc, x1), abs=REL * orc["scale_m"]), (
            f"{mid} end m"
        )
        v0 = -orc["V"](x0 + eps)
        v1 = -orc["V"](x1 - eps)
        assert res["start"]["v"] == pytest.approx(v0, abs=1e-6 * orc["scale_f"]), f"{mid} start v"
        assert res["end"]["v"] == pytest.approx(v1, abs=1e-6 * orc["scale_f"]), f"{mid} end v"
        for end in ("start", "end"):
            assert res[end]["n"] == pytest.approx(0.0, abs=REL * orc["scale_f"])


@pytest.mark.parametrize("i", range(N_BEAMS))
def test_moment_extremes_match_sympy(i):
    beam, orc = BEAMS[i], oracle(i)
    c = solve(leastwork_text(beam))["cases"]["default"]
    tol = REL * orc["scale_m"]
    for mid, *_ in beam["members"]:
        vmax, vmin, x0 = member_extremes(orc, beam, mid)
        res = c["members"][mid]
        assert res["m_max"]["value"] == pytest.approx(vmax, abs=tol), f"{mid} m_max"
        assert res["m_min"]["value"] == pytest.approx(vmin, abs=tol), f"{mid} m_min"
        # the reported position carries the reported value (sympy's moment there); the
        # moment is flat at a smooth extreme, so a small position error barely shows
        for key in ("m_max", "m_min"):
            at = res[key]["at"]
            assert m_ours(orc, x0 + at) == pytest.approx(
                res[key]["value"], abs=1e-7 * orc["scale_m"]
            ), f"{mid} {key} at"


@pytest.mark.parametrize(
    "i", [i for i, b in enumerate(BEAMS) if any(k is None for _, _, k in b["nodes"])]
)
def test_free_node_deflections_match_sympy(i):
    beam, orc = BEAMS[i], oracle(i)
    c = solve(leastwork_text(beam))["cases"]["default"]
    for name, x, kind in beam["nodes"]:
        if kind is None:
            expected = float(orc["defl"].subs(orc["x"], R(x)))
            scale = orc["scale_m"] * float(beam["nodes"][-1][1]) ** 2 / EI
            assert c["displacements"][f"{name}.y"] == pytest.approx(expected, abs=REL * scale), name


def test_random_beams_cover_the_intended_variety():
    """Guard on the generator itself, so that a change of seed keeps the oracle meaningful."""
    kinds = {k for b in BEAMS for _, _, k in b["nodes"]}
    assert {"pinned", "roller", "fixed", None} <= kinds
    load_kinds = {("partial" if "from" in ld else ld["kind"]) for b in BEAMS for ld in b["loads"]}
    assert {"point", "udl", "partial", "node"} <= load_kinds
    assert {len([n for n in b["nodes"] if n[2]]) - 1 for b in BEAMS} >= {2, 3, 4}
