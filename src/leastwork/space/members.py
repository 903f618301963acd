"""Formulas of the space member kinds: basic forces, equilibrium entries, unit fields,
span-load fields and the energy terms (docs/space.md).

Section forces at x (local components; docs/space.md): ``n`` tension positive; ``t`` the
twisting moment, its vector along +x on the face whose outward normal is +x; ``my``
positive when it puts the local -z face in tension, ``mz`` positive when it puts the local
-y face in tension (for a level beam under gravity ``my`` > 0 is sagging; in a structure
lying in the global x-y plane ``mz`` is the plane moment ``m``); shears ``vy = dmz/dx``,
``vz = dmy/dx``.

Basic forces of a space beam: the axial force ``ID.n``, the twist ``ID.start.t`` (one
value along the member: no span torques), the end moments ``ID.start.my``, ``ID.end.my``,
``ID.start.mz``, ``ID.end.mz`` (each absent where released). A bar carries ``ID``. Span
loads act on the beam's determinate analogue: pinned at the start (three translations and
the twist held), on a roller along its axis at the end; their fields come from the plane
routine :func:`leastwork.fields.particular_fields`, once per bending plane.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from numpy.polynomial import polynomial as npoly

from ..fields import Piecewise, gauss_integral, particular_fields
from ..polynomials import poly_integral, poly_mul
from .model import SpaceMember

__all__ = ["FIELDS", "TERM_OF_FIELD", "basic_forces", "node_actions", "unit_fields",
           "SpanFields", "span_fields", "flexibility_terms", "span_terms", "field_stiffness"]

#: The six section-force fields, in the order of end actions.
FIELDS = ("n", "vy", "vz", "t", "my", "mz")
#: Energy term of each field (its own line in the audit trail).
TERM_OF_FIELD = {"n": "axial", "t": "torsion", "my": "bending about y",
                 "mz": "bending about z", "vy": "shear along y", "vz": "shear along z"}


def basic_forces(m: SpaceMember) -> list[tuple[str, str]]:
    """(column name, role) of member ``m``'s basic forces; roles: "bar", "n", "t", "my_s",
    "my_e", "mz_s", "mz_e"."""
    if not m.is_beam:
        return [(m.id, "bar")]
    out = [(f"{m.id}.n", "n")]
    if not (m.released("start", "t") or m.released("end", "t")):
        out.append((f"{m.id}.start.t", "t"))
    for axis in ("my", "mz"):
        for end in ("start", "end"):
            if not m.released(end, axis):
                out.append((f"{m.id}.{end}.{axis}", f"{axis}_{end[0]}"))
    return out


def node_actions(role: str, axes: np.ndarray, L: float) -> tuple[np.ndarray, np.ndarray]:
    """Force and moment (global, 6 components) that a unit value of the basic force
    ``role`` applies to the start node and to the end node (``A s + p = 0``)."""
    ex, ey, ez = axes
    zero = np.zeros(3)
    pairs = {
        "bar": ((ex, zero), (-ex, zero)),
        "n": ((ex, zero), (-ex, zero)),
        "t": ((zero, ex), (zero, -ex)),
        "my_s": ((ez / L, -ey), (-ez / L, zero)),
        "my_e": ((-ez / L, zero), (ez / L, ey)),
        "mz_s": ((ey / L, ez), (-ey / L, zero)),
        "mz_e": ((-ey / L, zero), (ey / L, -ez)),
    }
    (fs, ms), (fe, me) = pairs[role]
    return np.concatenate([fs, ms]), np.concatenate([fe, me])


def unit_fields(role: str, L: float) -> dict[str, tuple[float, ...]]:
    """Fields of a unit basic force, polynomials in xi = x/L (ascending coefficients)."""
    return {
        "bar": {"n": (1.0,)},
        "n": {"n": (1.0,)},
        "t": {"t": (1.0,)},
        "my_s": {"my": (1.0, -1.0), "vz": (-1.0 / L,)},
        "my_e": {"my": (0.0, 1.0), "vz": (1.0 / L,)},
        "mz_s": {"mz": (1.0, -1.0), "vy": (-1.0 / L,)},
        "mz_e": {"mz": (0.0, 1.0), "vy": (1.0 / L,)},
    }[role]


def field_stiffness(m: SpaceMember, shear: bool) -> dict[str, float | None]:
    """Section stiffness per field (None: no energy, a rigid part)."""
    out = {"n": m.EA, "t": m.GJ, "my": m.EIy, "mz": m.EIz}
    if shear and m.is_beam:
        out.update(vy=m.GAy, vz=m.GAz)
    return out


@dataclass(frozen=True)
class SpanFields:
    """Fields of a member's span loads on its determinate analogue (``fields`` by name,
    piecewise in x, m) and the forces (global, N) it passes to its start and end nodes."""

    fields: dict[str, Piecewise]
    start_force: np.ndarray
    end_force: np.ndarray


def span_fields(L: float, axes: np.ndarray, points, dists) -> SpanFields:
    """``points``: (at, global force 3-vector); ``dists``: (start, end, w0, w1) with global
    3-vectors. Local plane x-y gives n, vy, mz; plane x-z gives vz, my."""
    ex, ey, ez = axes
    loc = [(a, np.asarray(f) @ ex, np.asarray(f) @ ey, np.asarray(f) @ ez) for a, f in points]
    dl = [(a, b, axes @ np.asarray(w0), axes @ np.asarray(w1)) for a, b, w0, w1 in dists]
    xy = particular_fields(L, (1.0, 0.0), [(a, fx, fy, 0.0) for a, fx, fy, _ in loc],
                           [(a, b, (w0[0], w1[0]), (w0[1], w1[1])) for a, b, w0, w1 in dl])
    xz = particular_fields(L, (1.0, 0.0), [(a, 0.0, fz, 0.0) for a, _, _, fz in loc],
                           [(a, b, (0.0, 0.0), (w0[2], w1[2])) for a, b, w0, w1 in dl])
    zero = Piecewise.zero(L)
    fields = {"n": xy.n, "vy": xy.v, "mz": xy.m, "vz": xz.v, "my": xz.m, "t": zero}
    start = xy.start_force[0] * ex + xy.start_force[1] * ey + xz.start_force[1] * ez
    end = xy.end_force[0] * ex + xy.end_force[1] * ey + xz.end_force[1] * ez
    return SpanFields(fields, start, end)


def flexibility_terms(m: SpaceMember, L: float, shear: bool) -> dict[str, np.ndarray]:
    """Energy blocks of member ``m`` over its basic forces, one per term:
    F_ij = int u_i u_j / K dx (exact polynomial integrals)."""
    roles = [r for _, r in basic_forces(m)]
    units = [unit_fields(r, L) for r in roles]
    out: dict[str, np.ndarray] = {}
    for f, K in field_stiffness(m, shear).items():
        if K is None:
            continue
        block = np.zeros((len(roles), len(roles)))
        for i, ui in enumerate(units):
            for j, uj in enumerate(units):
                if f in ui and f in uj:
                    block[i, j] = L * float(poly_integral(poly_mul(ui[f], uj[f]), 0.0, 1.0)) / K
        if block.any():
            out[TERM_OF_FIELD[f]] = block
    return out


def span_terms(m: SpaceMember, L: float, shear: bool, span: SpanFields) -> dict[str, np.ndarray]:
    """Initial deformations of the span loads conjugate to each basic force, per term:
    e_i = int u_i f0 / K dx (Gauss-Legendre, exact for these polynomials)."""
    roles = [r for _, r in basic_forces(m)]
    out: dict[str, np.ndarray] = {}
    for f, K in field_stiffness(m, shear).items():
        pf = span.fields.get(f)
        if K is None or pf is None or not np.any(pf.coef):
            continue
        vec = np.zeros(len(roles))
        for i, r in enumerate(roles):
            u = unit_fields(r, L).get(f)
            if u is not None:
                vec[i] = gauss_integral(pf.breaks, lambda x, u=u, pf=pf: npoly.polyval(x / L, u)
                                        * pf(x)) / K
        if vec.any():
            out[f"span loads ({TERM_OF_FIELD[f]})"] = vec
    return out
