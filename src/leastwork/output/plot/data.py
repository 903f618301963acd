"""The diagrams as data: which diagrams and load cases are asked for, the n, v and m
diagrams sampled along each member (in the case units, with the outline drawn to scale),
and the deflected shape with its magnification."""

from __future__ import annotations

from collections.abc import Iterable

import numpy as np
from numpy.polynomial import polynomial as P

from ...errors import CaseError
from ...model import Structure
from ..conventions import moment_convention
from .geometry import MemberAxis, case_units, nice_factor, structure_size
from .numbers import number

#: Diagram names in their usual order.
DIAGRAMS = ("structure", "n", "v", "m", "deflected")
#: Largest displacement of the deflected shape, drawn as this share of the structure size.
DEFLECTION_SHARE = 0.10

#: Per section force: (what it is, its dimension, the sign convention of its panel).
QUANTITY = {
    "n": ("axial force n", "force",
          "T tension, C compression (hatched; bars ticked); tension on local +y side"),
    "v": ("shear force v", "force", "v = dm/dx, signed; + on local +y side, \u2212 hatched"),
    "m": ("bending moment m", "moment", "on the tension side, values without sign"),
}


def legend() -> str:
    """The figure's key, once: the moment convention (the wording every output shares)
    and the symbols."""
    return (f"{moment_convention().capitalize()}. Loads: solid blue arrows; imposed "
            "effects: dashed plum; redundants X: orange and boxed, in their + sense, "
            "reaction arrows with one end on their node; open circles: hinges and pins; "
            "T/C: tension/compression.")


def parse_diagrams(diagrams: str | Iterable[str]) -> tuple[str, ...]:
    """Diagram names from a comma-separated string or a sequence, checked against
    :data:`DIAGRAMS`, duplicates dropped, order kept.

    >>> parse_diagrams("m, structure,m")
    ('m', 'structure')
    """
    items = diagrams.split(",") if isinstance(diagrams, str) else list(diagrams)
    out: list[str] = []
    for item in items:
        name = str(item).strip().lower()
        if not name:
            continue
        if name not in DIAGRAMS:
            raise CaseError(f'unknown diagram "{item}"; expected some of '
                            f"{', '.join(DIAGRAMS)}", where="diagrams")
        if name not in out:
            out.append(name)
    if not out:
        raise CaseError(f"no diagram asked for; expected some of {', '.join(DIAGRAMS)}",
                        where="diagrams")
    return tuple(out)


def case_names(sol, case: str | None) -> list[str]:
    """The load cases to draw: ``case`` (checked), or every case when None."""
    if case is None:
        return list(sol.cases)
    if case not in sol.cases:
        raise CaseError(f'unknown load case "{case}"; the cases are '
                        f"{', '.join(sol.cases)}", where="case")
    return [case]


def _pw_samples(pw, per_piece: int = 24) -> tuple[np.ndarray, np.ndarray]:
    """Positions and values of a Piecewise field, both sides of every break."""
    xs, vs = [], []
    for a, b, coef in pw.pieces():
        if b <= a:
            continue
        deg = int(np.max(np.flatnonzero(coef), initial=0))
        x = np.linspace(a, b, 2 if deg <= 1 else per_piece)
        xs.append(x)
        vs.append(P.polyval(x, coef))
    return np.concatenate(xs), np.concatenate(vs)


def field_zero(sol, res, quantity: str) -> float:
    """Values below this (case units) are round-off and shown as zero."""
    uf = case_units(sol.structure)
    lref = max(sol.structure.length(m) for m in sol.structure.members)
    scale = res.equilibrium_scale / uf["force"][0]
    return 1e-9 * scale * (lref / uf["length"][0] if quantity == "m" else 1.0)


def diagram_lines(sol, case: str, quantity: str) -> dict[str, dict[str, np.ndarray]]:
    """The n, v or m diagram of load case ``case``, per member: ``x`` (distances from the
    start node, case length unit), ``value`` (case units; round-off shown as zero) and
    ``points`` (k, 2): the diagram's outline in global coordinates (case length unit),
    i.e. the member axis point plus ``side * value * scale``, where ``side`` is the local
    +y unit vector for n and v and local -y (the tension side) for m, and ``scale`` puts
    the largest value of the diagram :func:`diagram_amplitude` away from its member.
    (In the figure a bar's axial force is drawn as the coloured bar with its value.)"""
    if quantity not in QUANTITY:
        raise CaseError(f'unknown section force "{quantity}"; expected n, v or m',
                        where="diagrams")
    st = sol.structure
    res = sol.cases[case_names(sol, case)[0]]
    uf = case_units(st)
    vf = uf[QUANTITY[quantity][1]][0]
    lf = uf["length"][0]
    zero = field_zero(sol, res, quantity)
    raw = {}
    for mid, mr in res.members.items():
        x, v = _pw_samples(getattr(mr, quantity))
        v = v / vf
        v[np.abs(v) <= zero] = 0.0
        raw[mid] = (x, v)
    vmax = max((float(np.max(np.abs(v))) for _, v in raw.values()), default=0.0)
    scale = diagram_amplitude(st) / vmax if vmax > 0 else 0.0
    out = {}
    for mid, (x, v) in raw.items():
        axis = MemberAxis(st, mid)
        base = axis.at(x)
        pts = base + (-1.0 if quantity == "m" else 1.0) * axis.normal(x) * (v * scale)[:, None]
        out[mid] = {"x": x / lf, "value": v, "points": pts / lf}
    return out


def diagram_amplitude(st: Structure) -> float:
    """Largest offset of an n, v or m diagram from its member (m)."""
    size = structure_size(st)
    lmin = min(st.length(m) for m in st.members)
    return min(0.12 * size, 0.5 * lmin)


def deflection_scale(sol, case: str, samples: int = 81) -> tuple[float, float, str]:
    """(magnification, largest displacement in the output displacement unit, where it is) of the
    deflected shape of ``case``: the magnification is a 1-2-5 number chosen so that the
    largest displacement is drawn at most :data:`DEFLECTION_SHARE` (and at least half of
    it) of the structure size."""
    factor, umax, where, _ = deflection(sol, sol.cases[case_names(sol, case)[0]], samples)
    return factor, umax / case_units(sol.structure)["displacement"][0], where


def deflection(sol, res, samples: int):
    """(magnification, largest displacement (m), where, shapes of the members)."""
    shapes = _shapes(sol, res, samples)
    umax, where = 0.0, ""
    for mid, (x, ux, uy) in shapes.items():
        mag = np.hypot(ux, uy)
        k = int(np.argmax(mag))
        if mag[k] > umax:
            umax, where = float(mag[k]), _place(sol.structure, mid, float(x[k]))
    size = structure_size(sol.structure)
    if umax <= 1e-12 * size:
        return 1.0, 0.0, "", shapes
    return nice_factor(DEFLECTION_SHARE * size / umax), umax, where, shapes


def _place(st: Structure, mid: str, x: float) -> str:
    """A point of a member in words: its node at an end, else the distance along it."""
    L = st.length(mid)
    if x <= 1e-9 * L:
        return f"node {st.members[mid].start}"
    if x >= L * (1 - 1e-9):
        return f"node {st.members[mid].end}"
    lf, lu = case_units(st)["length"]
    return f"{mid} at {number(x / lf)} {lu}"


def _shapes(sol, res, samples: int) -> dict[str, tuple[np.ndarray, np.ndarray, np.ndarray]]:
    """Positions along each member and the global displacements there (m)."""
    from ...displacements import member_shape

    out = {}
    for mid in sol.structure.members:
        x, ux, uy, _ = member_shape(sol.structure, sol.topology, res, mid, samples=samples)
        out[mid] = (x, ux, uy)
    return out
