"""Step 6: the redundants, the superposition of the basic forces, the reactions, the
member end forces and moment extremes of each load case, and the envelope over the load
combinations. Every number is the one the JSON result reports
(:mod:`leastwork.output.reported`)."""

from __future__ import annotations

from ..conventions import AXIAL_SIGN, REACTION_SIGN, SECTION_FORCES
from ..quantities import quantities
from ..sheet import Formula, Grid, Para, Step
from .context import Context
from .envelope import envelope_grids

__all__ = ["step_solution", "tension_word"]


def step_solution(ctx: Context) -> Step:
    blocks: list = []
    for case in ctx.cases:
        state = ctx.sol.states.get(case)
        if state is not None:
            from ...one_way import state_text

            blocks.append(Para(f"Load case {case} — {state_text(ctx.st, state)}",
                               "note" if state.changed else "plain"))
        if ctx.nred:
            blocks.append(_redundants(ctx, case))
        if state is not None and state.changed:
            blocks.append(Para(
                "The final forces of this load case are those of the solve without the "
                "members and supports taken out (set to zero here), not the superposition "
                "of the states above; the redundants are those forces at the redundant "
                "columns. They satisfy equilibrium (checked below) and the compatibility of "
                "every member and support that acts; a slack member's ends and a lifted "
                "support move apart freely.", "note"))
        else:
            blocks.append(Formula("final force = released structure under the loads + "
                                  "Σ Xi · (unit state i)",
                                  r"S = S_0 + \sum_i X_i\,s_i \quad (S_0\text{: released "
                                  r"structure under the loads; }s_i\text{: unit state }i)"))
            blocks.append(_superposition(ctx, case))
        blocks.append(_reactions(ctx, case))
        blocks.append(_end_forces(ctx, case))
        for grid in (_moment_extremes(ctx, case), _deflections(ctx, case),
                     _stresses(ctx, case)):
            if grid is not None:
                blocks.append(grid)
    blocks.extend(envelope_grids(ctx.sol))
    return Step(6, "Solution, superposition and reactions", tuple(blocks))


def _unknowns(ctx: Context, case: str):
    """What the compatibility equations solved for: the amplitudes of the local states,
    or the redundants themselves (SI)."""
    res = ctx.sol.cases[case]
    return res.redundants if res.amplitudes is None else res.amplitudes


def _redundants(ctx: Context, case: str) -> Grid:
    from ..reported import redundants_shown

    values = redundants_shown(ctx.sol, case)
    if ctx.local:
        X = _unknowns(ctx, case)
        return Grid(f"Load case {case}: amplitudes of the states and the redundants they "
                    "close", ("X", "closes", "amplitude", "redundant force", "unit"),
                    tuple((ctx.x_label(i), c.name, ctx.u.to_output(X[i], ctx.xq[i]),
                           values[c.name], ctx.unit_of_x(i))
                          for i, c in enumerate(ctx.rcols)))
    return Grid(f"Load case {case}: the redundants", ("X", "redundant", "value", "unit"),
                tuple((ctx.x_label(i), c.name, values[c.name], ctx.unit_of_x(i))
                      for i, c in enumerate(ctx.rcols)))


def _superposition(ctx: Context, case: str) -> Grid:
    """Every basic force: released structure under the loads + X_i times state i."""
    u, res = ctx.u, ctx.sol.cases[case]
    X = _unknowns(ctx, case)
    heads = ["force", "unit", "released, loads"]
    heads += [f"X{i + 1}·(state {i + 1})" for i in range(ctx.nred)] + ["final"]
    rows = []
    for k, c in enumerate(ctx.cols):
        parts = [u.column(X[i] * ctx.B[k, i], c) for i in range(ctx.nred)]
        rows.append((c.name, u.column_unit(c), u.column(ctx.s0[res.name][k], c), *parts,
                     u.column(res.s[k], c)))
    return Grid(f"Load case {case}: superposition of the basic forces", tuple(heads),
                tuple(rows), keys=2)


def _reactions(ctx: Context, case: str) -> Grid:
    u = ctx.u
    reactions = ctx.numbers(case).reactions
    fu = u.force_unit
    heads = {"x": f"x [{fu}]", "y": f"y [{fu}]", "rz": f"rz [{u.moment_unit}]",
             "n": f"normal n [{fu}]"}
    dirs = [d for d in heads if any(d in comps for comps in reactions.values())]
    rows = [(node, *[comps.get(d, "-") for d in dirs]) for node, comps in reactions.items()]
    return Grid(f"Load case {case}: reactions ({REACTION_SIGN}; components no support "
                "has are left out)", ("support", *[heads[d] for d in dirs]), tuple(rows))


def _end_forces(ctx: Context, case: str) -> Grid:
    fu, ml = ctx.u.force_unit, ctx.u.moment_unit
    members = ctx.numbers(case).members
    if not any(ctx.st.members[mid].is_beam for mid in members):  # a truss: n only
        title = (f"Load case {case}: bar forces ({AXIAL_SIGN}; T tension, C compression; "
                 "pin-ended bars carry no shear or moment, so v and m are left out)")
        if all(mj["start"]["n"] == mj["end"]["n"] for mj in members.values()):
            return Grid(title, ("bar", f"n [{fu}]", "T/C"), tuple(
                (mid, mj["start"]["n"], tension_word(mj["start"]["n"]))
                for mid, mj in members.items()))
        return Grid(title, ("bar", f"n start [{fu}]", f"n end [{fu}]", "T/C (start)"), tuple(
            (mid, mj["start"]["n"], mj["end"]["n"], tension_word(mj["start"]["n"]))
            for mid, mj in members.items()))
    rows = [(mid, *[mj[e][q] for e in ("start", "end") for q in "nvm"])
            for mid, mj in members.items()]
    return Grid(f"Load case {case}: member end forces ({SECTION_FORCES})",
                ("member", f"n start [{fu}]", f"v start [{fu}]", f"m start [{ml}]",
                 f"n end [{fu}]", f"v end [{fu}]", f"m end [{ml}]"), tuple(rows))


def tension_word(n: float | None) -> str:
    """"T" for tension, "C" for compression, "-" for none (round-off shown as 0 is none)."""
    return "-" if not n else "T" if n > 0 else "C"


def _moment_extremes(ctx: Context, case: str) -> Grid | None:
    lu, ml = ctx.u.length_unit, ctx.u.moment_unit
    rows = [(mid, mj["m_max"]["value"], mj["m_max"]["at"], mj["m_min"]["value"],
             mj["m_min"]["at"]) for mid, mj in ctx.numbers(case).members.items()
            if ctx.st.members[mid].is_beam]
    if not rows:
        return None
    return Grid(f"Load case {case}: bending moment extremes along beams",
                ("beam", f"m max [{ml}]", f"at [{lu}]", f"m min [{ml}]", f"at [{lu}]"),
                tuple(rows))


def _deflections(ctx: Context, case: str) -> Grid | None:
    """The deflection each beam's limit L/N is compared with, the limit and the ratio."""
    q = quantities(ctx.sol.units)
    du, lu = q.displacement_unit, ctx.u.length_unit
    rows = []
    for mid, mj in ctx.numbers(case).members.items():
        d = mj.get("deflection")
        if d is None:
            continue
        rows.append((mid, "from the tangent at the root" if d["measured"] == "cantilever"
                     else "from the chord", d["value"], d["at"],
                     "-" if d["limit"] is None else d["limit"],
                     "-" if d["ratio"] is None else d["ratio"]))
    if not rows:
        return None
    return Grid(f"Load case {case}: deflections along beams (largest, measured as said; "
                "limit L/N from [analysis] deflection_limits)",
                ("beam", "measured", f"deflection [{du}]", f"at [{lu}]", f"limit [{du}]",
                 "ratio"), tuple(rows), keys=1)


def _stresses(ctx: Context, case: str) -> Grid | None:
    """Extreme-fibre stresses N/A ± M/S along the members that have them."""
    q = quantities(ctx.sol.units)
    su, lu = q.unit("stress"), ctx.u.length_unit
    rows = [(mid, s["max"]["value"], s["max"]["at"], s["min"]["value"], s["min"]["at"])
            for mid, mj in ctx.numbers(case).members.items()
            if (s := mj.get("stress")) is not None]
    if not rows:
        return None
    return Grid(f"Load case {case}: extreme-fibre stresses σ = N/A ± M/S (tension +)",
                ("member", f"max [{su}]", f"at [{lu}]", f"min [{su}]", f"at [{lu}]"),
                tuple(rows))
