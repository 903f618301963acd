"""Displacements by the unit-load method, and deflected shapes.

A unit load (or couple) is put on the *released* structure at the wanted point and
direction (any statically admissible state will do — the reduction theorem); the
displacement is the virtual work of its internal forces on the real deformations,

    Delta = s_u . (F s + e) - r_u . c  (+ the in-span terms of a load inside a member),

where s are the final basic forces, e the initial deformations (span loads, temperature,
misfit), c the support settlements and r_u the released structure's reactions to the unit
load. Deflected shapes of members are integrated from the end displacements and the
curvature m/EI + alpha*dTgrad/h, which is the same physics written kinematically.
"""

from __future__ import annotations

import re
from dataclasses import dataclass

import numpy as np
from numpy.polynomial import polynomial as P

from .arithmetic import FloatNumbers, Numbers
from .elements import kind_of
from .errors import CaseError
from .model import Structure
from .polynomials import poly_add, poly_antiderivative, poly_eval, poly_scale

__all__ = ["Target", "parse_target", "evaluate_target", "member_shape", "deflection_extreme"]

_NODE_DIR = re.compile(r"^([A-Za-z0-9_]+)\.(x|y|rz)$")
_MEMBER_AT = re.compile(r"^([A-Za-z0-9_]+)@([^.]+(?:\.[0-9]+)?(?:[eE][-+]?[0-9]+)?)\.(x|y)$")
_PAIR = re.compile(r"^([A-Za-z0-9_]+)-([A-Za-z0-9_]+)$")


@dataclass(frozen=True)
class Target:
    kind: str  #: "node", "member" or "pair"
    a: str
    b: str = ""
    direction: str = ""
    at: float = 0.0  #: m, for member points
    distance: str = ""  #: the distance as written, in the case's length unit


def parse_target(st: Structure, topo, text: str, where: str) -> Target:
    """Read ``NODE.x|y|rz``, ``MEMBER@DISTANCE.x|y`` or ``NODE1-NODE2``."""
    m = _NODE_DIR.match(text)
    if m:
        node, d = m.groups()
        if node not in st.nodes:
            raise CaseError(f'"{text}": unknown node "{node}"', source=st.source, where=where)
        if f"{node}.{d}" not in topo.dof_index:
            raise CaseError(f'"{text}": node {node} has no rotation of its own (every member '
                            "end there is hinged); ask for a displacement (x, y) instead",
                            source=st.source, where=where)
        return Target("node", node, direction=d)
    m = _MEMBER_AT.match(text)
    if m:
        mid, dist, d = m.groups()
        if mid not in st.members:
            raise CaseError(f'"{text}": unknown member "{mid}"', source=st.source, where=where)
        try:
            at = float(dist) * st.units.factor("length")
        except ValueError:
            raise CaseError(f'"{text}": distance "{dist}" is not a number (in '
                            f"{st.units.length})", source=st.source, where=where) from None
        L = st.length(mid)
        if not 0.0 <= at <= L * (1 + 1e-12):
            raise CaseError(f'"{text}": distance is off the member (length '
                            f"{L / st.units.factor('length'):g} {st.units.length})",
                            source=st.source, where=where)
        return Target("member", mid, direction=d, at=min(at, L), distance=dist)
    m = _PAIR.match(text)
    if m:
        a, b = m.groups()
        for n in (a, b):
            if n not in st.nodes:
                raise CaseError(f'"{text}": unknown node "{n}"', source=st.source, where=where)
        if a == b:
            raise CaseError(f'"{text}": two different nodes are needed', source=st.source,
                            where=where)
        return Target("pair", a, b)
    raise CaseError(f'cannot read displacement target "{text}"; expected NODE.x, NODE.y, '
                    "NODE.rz, MEMBER@DISTANCE.y (or .x) or NODE1-NODE2", source=st.source,
                    where=where)


def evaluate_target(st: Structure, topo, res, text: str, where: str = "[analysis] "
                    "displacements", nums: Numbers | None = None):
    """The displacement named ``text`` in case ``res`` (SI floats: m or rad; or in the
    number type of ``nums``). ``res`` gives ``nodal_displacements``, and for a point of a
    member what :func:`member_point_displacement` reads."""
    nums = nums or FloatNumbers(st)
    t = parse_target(st, topo, text, where)
    u = res.nodal_displacements
    di = topo.dof_index
    if t.kind == "node":
        return nums.scalar(u[di[f"{t.a}.{t.direction}"]])
    if t.kind == "pair":
        dx, dy, L = nums.pair(t.a, t.b)
        du = u[di[f"{t.b}.x"]] - u[di[f"{t.a}.x"]]
        dv = u[di[f"{t.b}.y"]] - u[di[f"{t.a}.y"]]
        return nums.scalar((du * dx + dv * dy) / L)
    return member_point_displacement(st, topo, res, t.a, nums.member_position(t),
                                     t.direction, nums)


def member_point_displacement(st: Structure, topo, res, mid: str, at: float,
                              direction: str, nums: Numbers | None = None):
    """Global x or y displacement of the point ``at`` (m) along member ``mid`` by a unit
    load there on the released structure: ``res`` gives ``released``, ``deformations``,
    ``loading`` (settlements, free strains) and the member's final fields
    (``member_fields``). Floats, or the number type of ``nums``."""
    nums = nums or FloatNumbers(st)
    released = res.released if hasattr(res, "released") and res.released else None
    if released is None:
        raise RuntimeError("case result has no released structure attached")
    one, zero = nums.one, nums.zero
    fx, fy = (one, zero) if direction == "x" else (zero, one)
    mem = st.members[mid]
    p = nums.vector(len(topo.dofs))
    di = topo.dof_index
    end = nums.end_of(at, nums.length(mid))
    pf = None
    if end is not None:
        node = mem.start if end == "start" else mem.end
        p[di[f"{node}.x"]] += fx
        p[di[f"{node}.y"]] += fy
    else:
        pf = nums.particular(mem, [(at, fx, fy, zero)], [])
        p[di[f"{mem.start}.x"]] += pf.start_force[0]
        p[di[f"{mem.start}.y"]] += pf.start_force[1]
        p[di[f"{mem.end}.x"]] += pf.end_force[0]
        p[di[f"{mem.end}.y"]] += pf.end_force[1]
    s_u = released.forces(p)[:, 0]
    value = nums.scalar(s_u @ (res.deformations - res.loading.settlement))
    if pf is None:
        return value
    # virtual work of the unit load's fields on the strains
    return nums.span_work(value, pf, res.member_fields(mid), *_section(st, res, mid, nums))


def _section(st: Structure, res, mid: str, nums: Numbers | None = None) -> tuple[dict, dict]:
    """The section stiffness per field and the free strains per field of member ``mid``
    in case ``res``, as its kind gives them (in the number type of ``nums``)."""
    mem = st.members[mid]
    kind = kind_of(mem)
    if nums is None:
        sec, L, zero = mem, st.length(mid), 0.0
    else:
        sec, L, zero = nums.section(mid), nums.length(mid), nums.zero
    imposed = res.loading.imposed.get(mid, (zero, zero, zero))
    along = getattr(kind, "section_at_length", None)  # a section that varies along x
    section = along(mem, L, st.shear) if along else kind.section(mem, sec, st.shear)
    return section, kind.free_strains(mem, sec, L, imposed)


def curved_shape(st: Structure, topo, res, mid: str, samples: int = 41):
    """Displacements along a curved member (SI): (s, ux, uy, w) at ``samples`` arc
    lengths s plus every break, from the start node's displacement and the strains along
    the arc: d(theta)/ds = m/EI + free curvature, du/ds = eps t + (theta - v/GAs) n
    (t the tangent, n local +y), the start rotation theta0 chosen so that the arc reaches
    the end node's displacement (least squares of the two components: they agree when the
    fields are in equilibrium). ``w``: the displacement across the chord, less the line
    between the displaced ends (the deflection of a curved member)."""
    from scipy.integrate import cumulative_trapezoid

    from .elements.arc import arc_of

    mem = st.members[mid]
    mr = res.members[mid]
    L = mr.length
    sec, free = _section(st, res, mid)
    fine = np.union1d(np.linspace(0.0, L, 2001), mr.m.breaks)
    ex = st.direction(mid)
    tx, ty = arc_of(mem.curve).tangent(fine, ex)
    kappa = mr.m(fine) / sec["m"] + sum(free.get("m", []), 0.0)
    theta_rel = cumulative_trapezoid(kappa, fine, initial=0.0)
    fn = free.get("n", [0.0])
    eps = (mr.n(fine) / sec["n"] if sec.get("n") is not None else 0.0) + sum(fn, 0.0)
    gam = mr.v(fine) / sec["v"] if sec.get("v") is not None else 0.0
    nx, ny = -ty, tx
    rot = theta_rel - gam
    ux_rel = cumulative_trapezoid(eps * tx + rot * nx, fine, initial=0.0)
    uy_rel = cumulative_trapezoid(eps * ty + rot * ny, fine, initial=0.0)
    ux_th = cumulative_trapezoid(nx, fine, initial=0.0)  # per unit start rotation
    uy_th = cumulative_trapezoid(ny, fine, initial=0.0)
    u = res.nodal_displacements
    di = topo.dof_index
    us = np.array([u[di[f"{mem.start}.x"]], u[di[f"{mem.start}.y"]]])
    ue = np.array([u[di[f"{mem.end}.x"]], u[di[f"{mem.end}.y"]]])
    need = ue - us - np.array([ux_rel[-1], uy_rel[-1]])
    a = np.array([ux_th[-1], uy_th[-1]])
    theta0 = float(a @ need / (a @ a)) if a @ a > 0 else 0.0
    ux = us[0] + ux_rel + theta0 * ux_th
    uy = us[1] + uy_rel + theta0 * uy_th
    ey = np.array([-ex[1], ex[0]])
    u_arc = np.c_[ux, uy] @ ey
    cx = arc_of(mem.curve).frame(fine)[0] / arc_of(mem.curve).chord
    w = u_arc - ((1 - cx) * (us @ ey) + cx * (ue @ ey))
    xs = np.union1d(np.linspace(0.0, L, samples), mr.m.breaks)
    pick = np.searchsorted(fine, xs).clip(0, len(fine) - 1)
    return fine[pick], ux[pick], uy[pick], w[pick], (fine, w)


def member_shape(st: Structure, topo, res, mid: str, samples: int = 41,
                 return_extreme: bool = False):
    """Deflected shape of a member: positions x (m), and global displacements (ux, uy) (m)
    at ``samples`` points plus every break, from the end displacements and the curvature.

    Returns (x, ux, uy, w) where w is the displacement along local y.
    """
    mem = st.members[mid]
    if mem.curve is not None:
        xs, ux, uy, w, (fine, wf) = curved_shape(st, topo, res, mid, samples)
        if return_extreme:
            k = int(np.argmax(np.abs(wf)))
            return xs, ux, uy, w, (float(wf[k]), float(fine[k]))
        return xs, ux, uy, w
    mr = res.members[mid]
    L = mr.length
    c, s = st.direction(mid)
    u = res.nodal_displacements
    di = topo.dof_index
    us = np.array([u[di[f"{mem.start}.x"]], u[di[f"{mem.start}.y"]]])
    ue = np.array([u[di[f"{mem.end}.x"]], u[di[f"{mem.end}.y"]]])
    ex, ey = np.array([c, s]), np.array([-s, c])
    sec, free = _section(st, res, mid)
    breaks = mr.m.breaks
    xs = np.union1d(np.linspace(0.0, L, samples), breaks)
    w_pieces = []  # (a, b, poly of w_rel)
    w_rel = np.zeros_like(xs)  # K(x) - Gamma(x): deflection from curvature/shear with w(0)=w'(0)=0
    ua_rel = np.zeros_like(xs)
    if _varies(sec, free):
        return _varying_shape(mr, sec, free, xs, us, ue, ex, ey, return_extreme)
    if sec.get("m") is not None:
        slope0 = 0.0
        w0 = 0.0
        for k, (a, b, coef) in enumerate(mr.m.pieces()):
            kap = coef / sec["m"]
            kap = P.polyadd(kap, [sum(free.get("m", []), 0.0)])
            slope = P.polyadd(P.polyint(kap, lbnd=a), [slope0])
            if sec.get("v") is not None:
                gam = mr.v.coef[k] / sec["v"]
                wpoly = P.polyadd(P.polyint(P.polysub(slope, gam), lbnd=a), [w0])
            else:
                wpoly = P.polyadd(P.polyint(slope, lbnd=a), [w0])
            sel = (xs >= a) & (xs <= b)
            w_rel[sel] = P.polyval(xs[sel], wpoly)
            w_pieces.append((a, b, wpoly))
            slope0 = P.polyval(b, slope)
            w0 = P.polyval(b, wpoly)
    strain_n = 0.0
    free_n = free.get("n", [0.0])
    free_n = free_n[0] + free_n[1] if len(free_n) == 2 else sum(free_n, 0.0)
    for a, b, coef in mr.n.pieces():
        npoly = coef / sec["n"] if sec.get("n") is not None else np.zeros(1)
        npoly = P.polyadd(npoly, [free_n])
        upoly = P.polyint(npoly, lbnd=a)
        sel = (xs >= a) & (xs <= b)
        ua_rel[sel] = strain_n + P.polyval(xs[sel], upoly)
        strain_n += P.polyval(b, upoly)
    ws, we = us @ ey, ue @ ey
    theta = (we - ws - w_rel[-1]) / L
    w = ws + theta * xs + w_rel
    ua = us @ ex + ua_rel
    ux = ua * ex[0] + w * ey[0]
    uy = ua * ex[1] + w * ey[1]
    if return_extreme:
        return xs, ux, uy, w, _extreme(w_pieces, ws, theta, xs, w)
    return xs, ux, uy, w


def _varies(sec: dict, free: dict) -> bool:
    """Whether a section stiffness or a free strain varies along the member (a tapered
    beam): its deflection is then integrated numerically."""
    return any(callable(v) for v in sec.values()) or any(
        callable(e) for e in free.get("m", []) + free.get("n", []))


def _at(value, x: float) -> float:
    return float(value(x)) if callable(value) else float(value)


#: sub-intervals per piece of a member whose section varies: between two grid points the
#: deflection is the quintic through the exact values, slopes and curvatures there
#: (Hermite; the cubic through values and slopes when shear strains count), an error of
#: order h^6 (h^4) of the sub-interval h
VARYING_SUBDIVISIONS = 32


def varying_pieces(mr, sec: dict, free: dict):
    """(pieces (a, b, w_rel cubic in x), w_rel(L)) of a member whose EI (or free curvature)
    varies: the slope and w_rel = int (slope - v/GAs) from the curvature m/EI + kappa_free by
    adaptive integration between grid points (w_rel(0) = slope(0) = 0), joined by cubic
    Hermite pieces through the exact values and slopes."""
    from .elements import integrate

    EI, GAs = sec["m"], sec.get("v")
    kap_free = free.get("m", [])

    def kappa(x: float) -> float:
        acc = float(mr.m(x)) / _at(EI, x)
        for e in kap_free:
            acc += _at(e, x)
        return acc

    def gamma(x: float) -> float:
        return float(mr.v(x)) / _at(GAs, x) if GAs is not None else 0.0

    pieces = []
    slope = w = 0.0
    for a, b, _ in mr.m.pieces():
        grid = np.linspace(float(a), float(b), VARYING_SUBDIVISIONS + 1)
        for x0, x1 in zip(grid[:-1], grid[1:], strict=True):
            d_slope = integrate(kappa, x0, x1)
            # w(x1) - w(x0) = slope0 h + int_x0^x1 (x1 - t) kappa dt - int gamma
            d_w = slope * (x1 - x0) + integrate(lambda t, x1=x1: (x1 - t) * kappa(t), x0, x1)
            if GAs is not None:
                d_w -= integrate(gamma, x0, x1)
            d0 = slope - _gamma_at(gamma, x0, 1)
            s1 = slope + d_slope
            d1 = s1 - _gamma_at(gamma, x1, -1)
            if GAs is None:  # w'' = kappa at both ends: the quintic through all six
                c0, c1 = _inside(kappa, x0, 1), _inside(kappa, x1, -1)
                poly = _hermite(x0, x1, (w, d0, c0), (w + d_w, d1, c1))
            else:
                poly = _hermite(x0, x1, (w, d0), (w + d_w, d1))
            pieces.append((float(x0), float(x1), poly))
            slope, w = s1, w + d_w
    return pieces, w


def _gamma_at(gamma, x: float, side: int) -> float:
    """The shear strain just inside a sub-interval (v jumps at a point load)."""
    return _inside(gamma, x, side)


def _inside(f, x: float, side: int) -> float:
    """``f`` just inside a sub-interval from its end ``x`` (fields jump at point loads)."""
    return f(x + side * 1e-12 * max(abs(x), 1.0))


def _hermite(x0: float, x1: float, left: tuple, right: tuple) -> list:
    """Ascending coefficients in x of the polynomial with the given (value, slope[,
    second derivative]) at x0 and x1: the cubic or the quintic Hermite interpolant."""
    h, k = x1 - x0, len(left)
    n = 2 * k
    rows, rhs = [], []
    for t, vals in ((0.0, left), (h, right)):
        for order, v in enumerate(vals):
            row = [0.0] * n
            for p in range(order, n):
                coef = 1.0
                for q in range(order):
                    coef *= p - q
                row[p] = coef * t ** (p - order)
            rows.append(row)
            rhs.append(v)
    local = np.linalg.solve(np.array(rows), np.array(rhs))  # in t = x - x0
    return _shift(local, x0).tolist()


def _shift(coef: np.ndarray, x0: float) -> np.ndarray:
    """Coefficients in x of p(x - x0), p given in ascending powers."""
    out = np.zeros(len(coef))
    for k, c in enumerate(coef):
        out[: k + 1] += c * P.polypow([-x0, 1.0], k)[: k + 1]
    return out


def _varying_shape(mr, sec: dict, free: dict, xs, us, ue, ex, ey, return_extreme: bool):
    """:func:`member_shape` of a member whose section varies (see :func:`varying_pieces`);
    the axial displacement from n/EA + the free strain, integrated adaptively."""
    from .elements import integrate

    L = mr.length
    pieces, w_end = varying_pieces(mr, sec, free)
    w_rel = np.array([_piece_value(pieces, x) for x in xs])
    EA = sec.get("n")
    free_n = free.get("n", [0.0])
    free_n = free_n[0] + free_n[1] if len(free_n) == 2 else sum(free_n, 0.0)

    def strain(x: float) -> float:
        return (float(mr.n(x)) / _at(EA, x) if EA is not None else 0.0) + _at(free_n, x)

    ua_rel = np.zeros_like(xs)
    for k in range(1, len(xs)):
        ua_rel[k] = ua_rel[k - 1] + (integrate(strain, xs[k - 1], xs[k])
                                     if xs[k] > xs[k - 1] else 0.0)
    ws, we = us @ ey, ue @ ey
    theta = (we - ws - w_end) / L
    w = ws + theta * xs + w_rel
    ua = us @ ex + ua_rel
    ux = ua * ex[0] + w * ey[0]
    uy = ua * ex[1] + w * ey[1]
    if return_extreme:
        return xs, ux, uy, w, _extreme(pieces, ws, theta, xs, w)
    return xs, ux, uy, w


def _piece_value(pieces, x: float) -> float:
    for a, b, poly in pieces:
        if a <= x <= b:
            return float(poly_eval(poly, x))
    return float(poly_eval(pieces[-1][2], x))


def _extreme(pieces, ws, theta, xs, w) -> tuple[float, float]:
    """Largest |w| along the member (value with its sign, position), exact on each piece."""
    best_x = float(xs[int(np.argmax(np.abs(w)))])
    best = float(w[int(np.argmax(np.abs(w)))])
    for a, b, poly in pieces:
        total = P.polyadd(poly, [ws, theta])
        der = P.polyder(total)
        if len(der) > 1:
            for r in P.polyroots(der):
                if abs(r.imag) < 1e-12 and a < r.real < b:
                    val = float(P.polyval(r.real, total))
                    if abs(val) > abs(best):
                        best, best_x = val, float(r.real)
    return best, best_x


def _deflection_pieces(st: Structure, topo, res, mid: str):
    """(pieces (a, b, w_rel polynomial), ws, we, theta): the transverse displacement of a
    beam is w(x) = ws + theta x + w_rel(x), w_rel from the curvature (and shear strain) with
    w_rel(0) = w_rel'(0) = 0, in plain floats (SI)."""
    mem = st.members[mid]
    mr = res.members[mid]
    L = mr.length
    c, s = st.direction(mid)
    u = res.nodal_displacements
    di = topo.dof_index
    ws = -s * u[di[f"{mem.start}.x"]] + c * u[di[f"{mem.start}.y"]]
    we = -s * u[di[f"{mem.end}.x"]] + c * u[di[f"{mem.end}.y"]]
    sec, free = _section(st, res, mid)
    if _varies(sec, free):
        pieces, w0 = varying_pieces(mr, sec, free)
        return pieces, ws, we, (we - ws - w0) / L
    kappa_t = sum(free.get("m", []), 0.0)
    EI, GAs = sec["m"], sec.get("v")
    pieces = []
    slope0 = w0 = 0.0
    for k, (a, b, coef) in enumerate(mr.m.pieces()):
        kap = [cc / EI for cc in coef.tolist()]
        kap[0] += kappa_t
        slope = poly_add((slope0,), poly_antiderivative(kap, a))
        if GAs is not None:
            gam = [cc / GAs for cc in mr.v.coef[k].tolist()]
            rot = poly_add(slope, poly_scale(gam, -1))
            wpoly = poly_add((w0,), poly_antiderivative(rot, a))
        else:
            wpoly = poly_add((w0,), poly_antiderivative(slope, a))
        pieces.append((float(a), float(b), wpoly))
        slope0, w0 = poly_eval(slope, b), poly_eval(wpoly, b)
    return pieces, ws, we, (we - ws - w0) / L


def _largest(pieces, line: tuple, start: tuple[float, float]) -> tuple[float, float]:
    """Largest |w_rel(x) + line(x)| over the pieces (value with its sign, x), from
    ``start`` (value, x at the start node): piece ends and the roots of the slope."""
    best, best_x = start
    for a, b, wpoly in pieces:
        total = poly_add(wpoly, line)
        cand = [b]
        der = [i * t for i, t in enumerate(total)][1:]
        while len(der) > 1 and der[-1] == 0.0:
            der.pop()
        if len(der) == 2:
            cand.append(-der[0] / der[1])
        elif len(der) > 2:
            cand += [r.real for r in P.polyroots(der) if abs(r.imag) < 1e-12]
        for x in cand:
            if a < x < b or x == b:
                val = poly_eval(total, x)
                if abs(val) > abs(best):
                    best, best_x = val, x
    return float(best), float(best_x)


def deflection_extreme(st: Structure, topo, res, mid: str) -> tuple[float, float]:
    """Largest transverse (local y) displacement along a beam and its distance from the
    start node (SI): the same deflection polynomials as :func:`member_shape`, integrated in
    plain floats, maximised over the piece ends and the roots of the slope (exact, with no
    sampling: a polynomial's extreme on an interval is at an end or a critical point)."""
    if st.members[mid].curve is not None:
        return member_shape(st, topo, res, mid, return_extreme=True)[4]
    pieces, ws, _, theta = _deflection_pieces(st, topo, res, mid)
    return _largest(pieces, (ws, theta), (ws, 0.0))


def cantilever_root(st: Structure, mid: str) -> str | None:
    """"start" or "end": the end a cantilever member is built in at, when its other end is
    free (no support, no other member) and this end takes a moment; else None."""
    m = st.members[mid]
    if not m.is_beam:
        return None
    count: dict[str, int] = {}
    for other in st.members.values():
        for n in (other.start, other.end):
            count[n] = count.get(n, 0) + 1
    free = [n not in st.supports and count.get(n, 0) == 1 for n in (m.start, m.end)]
    if free[1] and not free[0] and not m.hinge_start:
        return "start"
    if free[0] and not free[1] and not m.hinge_end:
        return "end"
    return None


def relative_deflection(st: Structure, topo, res, mid: str) -> tuple[float, float, str]:
    """The largest deflection of a beam that a limit L/N is compared with: (value >= 0 (m),
    at (m from the start node), "span" or "cantilever"). A span: relative to the chord
    joining its displaced ends. A cantilever (:func:`cantilever_root`): relative to the
    tangent of its axis at the built-in end."""
    if st.members[mid].curve is not None:  # across the chord, from the displaced ends
        value, at = member_shape(st, topo, res, mid, return_extreme=True)[4]
        return abs(value), at, "span"
    pieces, _, _, _ = _deflection_pieces(st, topo, res, mid)
    L = res.members[mid].length
    root = cantilever_root(st, mid)
    if root == "start":  # w_rel(0) = 0: less its own slope at 0 (the shear strain there)
        slope0 = poly_eval([i * t for i, t in enumerate(pieces[0][2])][1:] or [0.0], 0.0)
        line: tuple = (0.0, -slope0)
    elif root == "end":
        a, b, last = pieces[-1]
        wl = poly_eval(last, b)
        sl = poly_eval([i * t for i, t in enumerate(last)][1:] or [0.0], b)
        line = (-wl + sl * L, -sl)
    else:
        line = (0.0, -poly_eval(pieces[-1][2], pieces[-1][1]) / L)
    value, at = _largest(pieces, line, (line[0], 0.0))
    return abs(value), at, "cantilever" if root else "span"
