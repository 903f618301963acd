"""Step 7: the displacements asked for, by the unit-load method, contribution by
contribution, and the largest deflection along each beam."""

from __future__ import annotations

import math

import numpy as np

from ...model import Structure
from ..sheet import Formula, Grid, Para, Step, fmt
from .context import Context
from .contributions import displacement_contributions

__all__ = ["step_displacements"]


def step_displacements(ctx: Context) -> Step:
    blocks: list = [Para(
        "Unit-load method: a unit load (or couple) at the point and in the direction "
        "wanted, on the released structure (any released structure will do), does "
        "virtual work on the real deformations (imposed deformations e: temperature, "
        "misfit; c: support settlements):"),
        Formula("Δ = Σ ∫ m_u·M/EI dx + Σ ∫ n_u·N/EA dx + Σ ∫ (n_u·ε0 + m_u·κ0) dx - Σ r_u·c",
                r"\Delta = \sum\int \frac{m_u M}{EI}\,dx + \sum\int \frac{n_u N}{EA}\,dx"
                r" + \sum\int (n_u \varepsilon_0 + m_u \kappa_0)\,dx - \sum r_u c")]
    any_target = False
    shown_states: dict[str, np.ndarray] = {}  # unit-load states written out once
    for case in ctx.cases:
        numbers = ctx.numbers(case)
        for target, value in numbers.displacements.items():
            any_target = True
            blocks.extend(_displacement(ctx, case, target, value, shown_states))
        defl = [(mid, mj["deflection_max"]["value"], mj["deflection_max"]["at"])
                for mid, mj in numbers.members.items() if "deflection_max" in mj]
        if defl:
            lu, du = ctx.u.length_unit, ctx.u.displacement_unit
            blocks.append(Grid(f"Load case {case}: largest deflection along each beam "
                               "(perpendicular to the beam)",
                               ("beam", f"deflection [{du}]", f"at [{lu}]"), tuple(defl)))
    if not any_target:
        blocks.append(Para("No displacements were asked for ([analysis] displacements "
                           "or --at)."))
    return Step(7, "Displacements by the unit-load method", tuple(blocks))


def _displacement(ctx: Context, case: str, target: str, value,
                  shown_states: dict) -> list[Para | Grid]:
    """The unit-load state of displacement ``target`` (n_u and m_u(x) member by member;
    once, unless a load case's released structure differs) and the contributions to it in
    load case ``case``, summing to ``value`` (as reported); a point inside a member gets
    its total only."""
    s_u, dim = _virtual_state(ctx.st, ctx.topo, ctx.sol.cases[case], target)
    lab = "rad" if dim == (0, 0) else ctx.u.displacement_unit
    if s_u is None:
        return [Para(f"Load case {case}: {target} = {fmt(value)} {lab} (a point inside a "
                     "member: the unit load's own span field is included; see the total).")]
    s_u = ctx.denoise(s_u[:, None])[:, 0]
    rows = displacement_contributions(ctx, case, s_u, dim)
    before = shown_states.get(target)
    same = before is not None and before.shape == s_u.shape and np.array_equal(before, s_u)
    shown_states[target] = s_u
    state = [] if same else [_unit_load_state(ctx, target, s_u, dim)]
    return [*state,
            Grid(f"Load case {case}: displacement {target}",
                 ("source", "term", f"contribution [{lab}]"), tuple(rows), keys=2,
                 total=(target, "total", value))]


def _unit_load_state(ctx: Context, target: str, s_u: np.ndarray, dim) -> Grid:
    """The released structure's forces under the unit load (or couple) of ``target``:
    n_u and m_u(x) of each member that carries any (x from the start node), so that each
    contribution below can be redone by hand: ∫ m_u·M/EI dx, n_u·N·L/EA."""
    from ...elements import kind_of
    from .polynomials import poly_text, scaled_poly

    st, u, ci = ctx.st, ctx.u, ctx.topo.column_index
    couple = dim == (0, 0)
    n_dim, m_dim = ((0, -1), (0, 0)) if couple else ((0, 0), (0, 1))
    rows = []
    for m in st.members.values():
        kind = kind_of(m)
        values = [s_u[ci[bf.name]] for bf in kind.basic_forces(m)]
        if not any(values):
            continue
        if m.curve is not None:  # along the arc, in its own coordinate
            rows.append(_arc_unit_state(ctx, m, kind, values, u.power(*m_dim)))
            continue
        fields = kind.force_fields(m, st.length(m.id), values, 0.0)
        n = fields.get("n", [0.0])
        mom = fields.get("m")
        n_text = poly_text(scaled_poly(n, u.L, u.power(*n_dim)))
        m_text = "-" if mom is None else poly_text(scaled_poly(mom, u.L, u.power(*m_dim)))
        rows.append((m.id, n_text, m_text))
    load = "a unit couple" if couple else "a unit load"
    arcs = ("; curved members: n = N cos φ − Q sin φ along the arc, m_u in the arc's "
            "coordinate θ or u of the unit moments above"
            if any(m.curve is not None for m in st.members.values()) else "")
    return Grid(f"Unit-load state for {target}: {load} on the released structure (x from "
                f"the start node, in {u.length_unit}{arcs})",
                ("member", f"n_u(x) [{u.label(*n_dim)}]", f"m_u(x) [{u.label(*m_dim)}]"),
                tuple(rows))


def _arc_unit_state(ctx: Context, m, kind, values, f_m: float) -> tuple[str, str, str]:
    """A curved member's row of the unit-load state: its basic forces (n along the arc
    follows from them, n = N cos φ − Q sin φ) and m_u in the arc's own coordinate."""
    from .curved import arc_moment_text

    roles = dict(zip((bf.role for bf in kind.basic_forces(m)), values, strict=True))
    basic = (roles.get("axial", 0.0), roles.get("start_m", 0.0), roles.get("end_m", 0.0))
    return (m.id, f"chord force N = {fmt(basic[0] * ctx.u.power(0, 1) / f_m)}",
            arc_moment_text(ctx, m, basic, f_m))


def _virtual_state(st: Structure, topo, res, target: str):
    """Basic forces of the released structure under the unit load of ``target`` and the
    (force, length) exponents of the displacement; None for points inside members."""
    from ...displacements import parse_target

    t = parse_target(st, topo, target, "displacements")
    di = topo.dof_index
    p = np.zeros(len(topo.dofs))
    if t.kind == "node":
        p[di[f"{t.a}.{t.direction}"]] = 1.0
        dim = (0, 0) if t.direction == "rz" else (0, 1)
    elif t.kind == "pair":
        na, nb = st.nodes[t.a], st.nodes[t.b]
        L = math.hypot(nb.x - na.x, nb.y - na.y)
        ex, ey = (nb.x - na.x) / L, (nb.y - na.y) / L
        p[di[f"{t.b}.x"]], p[di[f"{t.b}.y"]] = ex, ey
        p[di[f"{t.a}.x"]], p[di[f"{t.a}.y"]] = -ex, -ey
        dim = (0, 1)
    else:
        return None, (0, 1)
    return res.released.forces(p)[:, 0], dim
