"""The audit trail of curved members: each unit moment written in the arc's own coordinate
(for a circle m(θ) = A + B sin θ + C cos θ, θ = s/R − α, ds = R dθ; for a parabola a
quadratic in the chord coordinate u, ds = √(1 + w′²) du) and each bending integral with its
integrand, its value and the quadrature's error bound."""

from __future__ import annotations

import math

import numpy as np

from ...elements import kind_of
from ...elements.arc import arc_of, gauss_kronrod, piece_breaks
from ...elements.curved import unit_values
from ..sheet import Grid, fmt
from .context import Context

__all__ = ["curved_unit_moments", "curved_integrals", "curved_under_loads", "arc_moment_text"]


def _coefficients(ctx: Context, m, i: int) -> tuple[float, float, float]:
    """(bN, bMs, bMe): the basic forces of member ``m`` in unit state ``i`` (SI)."""
    ci = ctx.topo.column_index
    vals = {bf.role: ctx.B[ci[bf.name], i] for bf in kind_of(m).basic_forces(m)}
    return vals.get("axial", 0.0), vals.get("start_m", 0.0), vals.get("end_m", 0.0)


def _moment_text(ctx: Context, m, i: int) -> str:
    """m_i along the arc in the output units (moment per unit redundant)."""
    return arc_moment_text(ctx, m, _coefficients(ctx, m, i),
                           ctx.u.ratio("moment", ctx.xq[i])[0])


def arc_moment_text(ctx: Context, m, basic: tuple[float, float, float], f_m: float) -> str:
    """The moment along curved member ``m`` carrying basic forces ``basic`` = (N, Ms, Me)
    (SI) in its arc coordinate (θ for a circle, u for a parabola, see
    :func:`arc_coordinate`), divided by ``f_m`` (SI value of one unit shown)."""
    u = ctx.u
    bN, bMs, bMe = basic
    arc = arc_of(m.curve)
    c, f = arc.chord, arc.rise
    if arc.shape == "circle":
        a = abs(f)
        R = (0.25 * c * c + a * a) / (2 * a)
        sg = 1.0 if f > 0 else -1.0
        A = bMs + 0.5 * (bMe - bMs) - bN * sg * (R - a)
        B = (bMe - bMs) * R / c
        C = bN * sg * R
        terms = [(A / f_m, ""), (B / f_m, "·sin θ"), (C / f_m, "·cos θ")]
    else:  # m = bMs + (bMe - bMs) u/c + bN 4 f u (c - u)/c^2, u in the output length unit
        L = u.L
        k1 = (bMe - bMs) / c + bN * 4 * f / c
        k2 = -bN * 4 * f / (c * c)
        terms = [(bMs / f_m, ""), (k1 * L / f_m, "·u"), (k2 * L * L / f_m, "·u²")]
    big = max(abs(t[0]) for t in terms)  # round-off of the cancelling constant left out
    text = " ".join(f"{'−' if v < 0 else '+'} {fmt(abs(v), 5)}{w}" for v, w in terms
                    if abs(v) > 1e-9 * big)
    text = text.removeprefix("+ ").replace("− ", "−", 1) if text.startswith("−") else \
        text.removeprefix("+ ")
    return text or "0"


def arc_coordinate(ctx: Context, m) -> str:
    """The arc coordinate of curved member ``m`` in words (θ or u, and ds)."""
    arc = arc_of(m.curve)
    L = ctx.u.L
    if arc.shape == "circle":
        a = abs(arc.rise)
        R = (0.25 * arc.chord ** 2 + a * a) / (2 * a)
        alpha = math.atan2(0.5 * arc.chord, R - a)
        return (f"circle R = {fmt(R / L, 5)} {ctx.u.length_unit}: θ = s/R − α from "
                f"−{fmt(alpha, 5)} to {fmt(alpha, 5)} rad, ds = R dθ")
    return (f"parabola w = 4f·u(c − u)/c², f = {fmt(arc.rise / L, 5)}, c = "
            f"{fmt(arc.chord / L, 5)} {ctx.u.length_unit}: u from 0 to c, ds = √(1 + w′²) du")


def curved_unit_moments(ctx: Context) -> Grid:
    """The unit moments of the curved members in their arc coordinate."""
    u, nr = ctx.u, ctx.nred
    rows = []
    for m in (m for m in ctx.st.members.values() if m.curve is not None):
        rows.append((m.id, arc_coordinate(ctx, m), u.convert(m.EI, 1, 2),
                     *[_moment_text(ctx, m, i) for i in range(nr)]))
    heads = ["curved member", "arc coordinate", f"EI [{u.label(1, 2)}]"]
    heads += [f"m{i + 1} [{u.ratio('moment', ctx.xq[i])[1]}]" for i in range(nr)]
    return Grid("Bending moments of the curved members per unit redundant, in the arc's "
                "own coordinate (section forces follow the tangent)", tuple(heads),
                tuple(rows))


def curved_integrals(ctx: Context, pairs) -> Grid:
    """Each bending integral ∫ m_i m_j ds / EI of a curved member: its integrand in the
    arc coordinate, its value (output units) and the quadrature's relative error bound."""
    rows = []
    for m in (m for m in ctx.st.members.values() if m.curve is not None):
        arc = arc_of(m.curve)
        circle = arc.shape == "circle"
        ds = "R dθ" if circle else "√(1 + w′²) du"
        coef = np.array([_coefficients(ctx, m, i) for i in range(ctx.nred)])  # (nr, 3)
        kind = kind_of(m)
        roles = [bf.role for bf in kind.basic_forces(m)]
        pick = [("axial", "start_m", "end_m").index(r) for r in roles]

        def integrand(x, coef=coef, m=m, pick=pick):
            um = unit_values(m, x)[:, 2, :]  # (basic force, x)
            mi = coef[:, pick] @ um  # (nr, x)
            return np.array([mi[i] * mi[j] for i, j in pairs]) / m.EI

        vals, bound = gauss_kronrod(integrand, piece_breaks(arc.length))
        for (i, j), v in zip(pairs, vals, strict=True):
            rows.append((m.id, f"∫ m{i + 1}·m{j + 1} {ds} / EI",
                         ctx.delta_case(float(v), i, j), fmt(bound, 2)))
    return Grid("Bending integrals along the curved members (adaptive Gauss–Kronrod "
                "along the true axis; error bound relative to the largest integral)",
                ("curved member", "integral", "value", "error bound"), tuple(rows))


def curved_under_loads(ctx: Context, case: str, mr0) -> list[tuple]:
    """One row per curved member of the table of moments under the loads: M0 is not a
    polynomial; its integrals against each unit moment along the arc."""
    u, nr = ctx.u, ctx.nred
    rows = []
    for m in (m for m in ctx.st.members.values() if m.curve is not None):
        arc = arc_of(m.curve)
        mr = mr0(m.id)
        coef = np.array([_coefficients(ctx, m, i) for i in range(nr)]).reshape(nr, 3)
        roles = [bf.role for bf in kind_of(m).basic_forces(m)]
        pick = [("axial", "start_m", "end_m").index(r) for r in roles]

        def integrand(x, coef=coef, m=m, pick=pick, mr=mr):
            mi = coef[:, pick] @ unit_values(m, x)[:, 2, :]
            return mi * mr.m(x) / m.EI

        vals = gauss_kronrod(integrand, mr.m.breaks)[0] if nr else []
        rows.append((m.id, u.convert(0.0, 0, 1), u.convert(arc.length, 0, 1),
                     "along the arc (see the diagrams)",
                     *[ctx.load_term_case(float(v), i) for i, v in enumerate(vals)]))
    return rows
