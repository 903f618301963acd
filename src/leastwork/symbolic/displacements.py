"""Displacements in exact arithmetic by the unit-load method (as
:mod:`leastwork.displacements`): a unit load on the released structure at the point and in
the direction wanted, its forces times the case's deformations less settlements, and for
a point inside a member the virtual work of the unit load's span fields on the member's
strains."""

from __future__ import annotations

import re
from typing import Any

import sympy

from ..elements import kind_of
from ..errors import CaseError
from ..polynomials import poly_add, poly_integral, poly_mul, poly_scale
from .algebra import dot, merged

__all__ = ["displacement"]


def _unit_state(pipe, dof: int) -> list:
    if dof not in pipe._unit_states:
        rhs = [pipe.zero] * pipe.ndof
        rhs[dof] = pipe.alg.one
        pipe._unit_states[dof] = pipe.forces(rhs)
    return pipe._unit_states[dof]

def _node_disp(pipe, dof_name: str, ctx) -> Any:
    su = _unit_state(pipe, pipe.topo.dof_index[dof_name])
    d, c = ctx["d"], ctx["c"]
    return dot(su, [a - b for a, b in zip(d, c)])

def displacement(pipe, text: str, ctx) -> Any:
    """The displacement ``text`` (``NODE.x|y|rz``, ``MEMBER@DISTANCE.x|y``,
    ``NODE1-NODE2``) by the unit-load method; ``ctx``: the case's deformations ``d``,
    settlements ``c``, final fields ``finals`` and free strains ``imposed``."""
    st = pipe.st
    m = re.match(r"^([A-Za-z0-9_]+)\.(x|y|rz)$", text)
    if m:
        return _node_disp(pipe, text, ctx)
    m = re.match(r"^([A-Za-z0-9_]+)@(.+)\.(x|y)$", text)
    if m and m.group(1) in st.members:
        mid, dist, direction = m.groups()
        try:
            at = sympy.Rational(dist)
        except (TypeError, ValueError):
            raise CaseError(f'"{text}": distance "{dist}" is not a plain decimal number',
                            source=st.source) from None
        return _member_point(pipe, mid, at, direction, ctx)
    m = re.match(r"^([A-Za-z0-9_]+)-([A-Za-z0-9_]+)$", text)
    if m:
        a, b = m.groups()
        dx = pipe.xy[b][0] - pipe.xy[a][0]
        dy = pipe.xy[b][1] - pipe.xy[a][1]
        du = _node_disp(pipe, f"{b}.x", ctx) - _node_disp(pipe, f"{a}.x", ctx)
        dv = _node_disp(pipe, f"{b}.y", ctx) - _node_disp(pipe, f"{a}.y", ctx)
        return (du * dx + dv * dy) / pipe.pair_len[text]
    raise CaseError(f'cannot read displacement target "{text}"', source=st.source)

def _member_point(pipe, mid: str, at_value, direction: str, ctx) -> Any:
    """As displacements.member_point_displacement: a unit load at the point."""
    st, alg, di = pipe.st, pipe.alg, pipe.topo.dof_index
    mem = st.members[mid]
    g = pipe.mem[mid]
    L = g.L
    at = alg.el(at_value)
    if alg.num(at) >= alg.num(L):
        at = L
    one, z = alg.one, pipe.zero
    fx, fy = (one, z) if direction == "x" else (z, one)
    p = [z] * pipe.ndof
    pf = None
    if at == z or at == L:
        node = mem.start if at == z else mem.end
        p[di[f"{node}.x"]] += fx
        p[di[f"{node}.y"]] += fy
    else:
        pf = pipe._fields(mid, [(at, fx, fy, z)], [])
        p[di[f"{mem.start}.x"]] += pf.start_force[0]
        p[di[f"{mem.start}.y"]] += pf.start_force[1]
        p[di[f"{mem.end}.x"]] += pf.end_force[0]
        p[di[f"{mem.end}.y"]] += pf.end_force[1]
    su = pipe.forces(p)
    value = dot(su, [a - b for a, b in zip(ctx["d"], ctx["c"])])
    if pf is None:
        return value
    mr = ctx["finals"][mid]
    kind = kind_of(mem)
    section = kind.section(mem, g, st.shear)
    free = kind.free_strains(mem, g, L, ctx["imposed"].get(mid, [z, z, z]))
    for f in ("n", "m", "v"):  # virtual work of the unit load's fields on the strains
        K, extra = section.get(f), free.get(f, [])
        if K is None and not any(extra):
            continue
        for x0, x1, pu, pr in merged(alg, getattr(pf, f), getattr(mr, f)):
            inner = poly_scale(pr, one / K) if K is not None else (z,)
            for e in extra:
                inner = poly_add(inner, (e,))
            value += poly_integral(poly_mul(pu, inner), x0, x1)
    return value


