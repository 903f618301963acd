"""Influence lines on a space structure: the value of a reaction or section force as a
downward unit load (one force unit along −z) moves along chosen members — a load moving
along a grid beam. Each position is one more load case on the factorised structure
(:func:`.solve.solve_loads`): released structure, flexibility and its solver are reused."""

from __future__ import annotations

import re

import numpy as np

from ..errors import CaseError
from .members import FIELDS
from .model import ROTATIONS, SpaceNodalLoad, SpacePointLoad
from .solve import SpaceCase, SpaceSolution, solve_loads

__all__ = ["influence_line", "quantity_value"]

_SECTION = re.compile(r"^(\w+)@([0-9.eE+-]+)\.(\w+)$")


def quantity_value(sol: SpaceSolution, case: SpaceCase, q: str, where: str) -> float:
    """The value (SI) of quantity ``q`` in ``case``: a reaction ``NODE.DIR``, a bar's id,
    an end action ``MEMBER.start|end.F`` or a section force ``MEMBER@DIST.F`` (DIST in the
    case length unit), F among n, vy, vz, t, my, mz."""
    st = sol.structure
    if q in st.members and not st.members[q].is_beam:
        return case.members[q].at("n", 0.0)
    parts = q.split(".")
    if len(parts) == 2 and parts[0] in case.reactions and parts[1] in case.reactions[parts[0]]:
        return case.reactions[parts[0]][parts[1]]
    if len(parts) == 3 and parts[0] in st.members and parts[1] in ("start", "end") \
            and parts[2] in FIELDS:
        start, end = case.members[parts[0]].end_actions()
        return (start if parts[1] == "start" else end)[parts[2]]
    m = _SECTION.match(q)
    if m and m.group(1) in st.members and m.group(3) in FIELDS:
        x = float(m.group(2)) * st.units.factor("length")
        L = st.length(m.group(1))
        if not 0 <= x <= L * (1 + 1e-12):
            raise CaseError(f'"{q}": the distance is beyond the member (length '
                            f"{L / st.units.factor('length'):g} {st.units.length})",
                            source="command line", where=where)
        return case.members[m.group(1)].at(m.group(3), min(x, L))
    raise CaseError(f'"{q}" is not a quantity of this space structure; expected a reaction '
                    "NODE.x|y|z|rx|ry|rz (restrained), a bar id, MEMBER.start.F, MEMBER.end.F "
                    "or MEMBER@DIST.F with F one of n, vy, vz, t, my, mz", source="command line",
                    where=where)


def is_moment(q: str) -> bool:
    last = q.rsplit(".", 1)[-1]
    return last in ROTATIONS or last in ("t", "my", "mz")


def influence_line(sol: SpaceSolution, quantity: str, along: list[str],
                   points: int = 10) -> list[tuple[str, float, float]]:
    """(member, distance from its start (m), value per unit load (SI)) for a downward load
    of one case force unit at ``points`` + 1 equal stations of each member of ``along``."""
    st = sol.structure
    unit = st.units.factor("force")
    for mid in along:
        if mid not in st.members:
            raise CaseError(f'unknown member "{mid}" in --along', source="command line",
                            where="--along")
        if not st.members[mid].is_beam:
            raise CaseError(f'"{mid}" is a bar: a load cannot move along it (put loads on its '
                            "nodes)", source="command line", where="--along")
    quantity_value(sol, next(iter(sol.cases.values())), quantity, "--quantity")
    out = []
    for mid in along:
        m = st.members[mid]
        L = st.length(mid)
        for k in range(points + 1):
            x = L * k / points
            if k == 0 or k == points:
                node = m.start if k == 0 else m.end
                load = SpaceNodalLoad(node, (0.0, 0.0, -unit, 0.0, 0.0, 0.0), "influence")
            else:
                load = SpacePointLoad(mid, x, (0.0, 0.0, -unit), "influence")
            case = solve_loads(sol, (load,), "influence")
            out.append((mid, x, quantity_value(sol, case, quantity, "--quantity") / unit))
    return out


def influence_dict(sol: SpaceSolution, quantity: str, rows) -> dict:
    from ..output.quantities import quantities

    q = quantities(sol.structure.units)
    per = q.factor("moment") if is_moment(quantity) else q.factor("force")
    vals = [v * q.factor("force") / per for _, _, v in rows]
    top = max([abs(v) for v in vals] + [1e-300])
    vals = [0.0 if abs(v) <= 1e-12 * top else v for v in vals]  # round-off shown as zero
    pts = [{"member": mid, "at": x / q.factor("length"), "value": v}
           for (mid, x, _), v in zip(rows, vals, strict=True)]
    k_hi, k_lo = int(np.argmax(vals)), int(np.argmin(vals))
    return {"quantity": quantity,
            "load": f"1 {q.force_unit} downward (-z)",
            "unit": f"{q.moment_unit if is_moment(quantity) else q.force_unit} per "
                    f"{q.force_unit}",
            "points": pts, "max": pts[k_hi], "min": pts[k_lo]}
