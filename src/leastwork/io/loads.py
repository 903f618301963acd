"""``[[loads]]`` (nodal loads, settlements, member loads: concentrated, distributed,
temperature, misfit) and ``[combinations]`` (factored load cases solved like load cases)."""

from __future__ import annotations

import math
from typing import Any

from ..model import (
    DEFAULT_CASE,
    DistributedLoad,
    Load,
    Member,
    Misfit,
    NodalLoad,
    Node,
    PointLoad,
    Settlement,
    Support,
    TemperatureLoad,
    rotational_nodes,
    scaled_load,
)
from ..plaintext import ECHO_LIMIT, literal
from .core import ID, CaseReader
from .messages import echo, hint, kind_of, shown

__all__ = ["read_loads", "read_combinations"]

_MEMBER_LOAD_KEYS = ("at", "wx", "wy", "wt", "wn", "per", "temperature", "misfit", "fx", "fy",
                     "ft", "fn", "mz", "from", "to")


def read_loads(reader: CaseReader, nodes: dict[str, Node], members: dict[str, Member],
               supports: dict[str, Support]) -> tuple[list[Load], list[str]]:
    """The loads in file order, and the load case names in order of first use (the default
    case alone if there are no loads)."""
    entries = reader.data.get("loads", [])
    if not isinstance(entries, list):
        raise reader.err("[[loads]]", "expected an array of tables ([[loads]] entries)")
    loads = []
    order: list[str] = []
    for i, spec in enumerate(entries, start=1):
        where = f"[[loads]] #{i}"
        if not isinstance(spec, dict):
            raise reader.err(where, f"expected a table, got {kind_of(spec)}")
        case = spec.get("case", DEFAULT_CASE)
        if not isinstance(case, str) or not case.strip():
            raise reader.err(where + ".case", f"expected a load case name, got {shown(case)}")
        targets = [k for k in ("node", "member", "settlement", "self_weight") if k in spec]
        if len(targets) != 1:
            raise reader.err(where, "each load needs exactly one of node, member, settlement "
                             "or self_weight"
                             + (f" (found {', '.join(targets)})" if targets else ""))
        if "self_weight" in spec:
            loads.extend(self_weight(reader, spec, where, members, case))
            if case not in order:
                order.append(case)
            continue
        if "node" in spec:
            load = _nodal_load(reader, spec, where, nodes, case)
        elif "settlement" in spec:
            load = _settlement(reader, spec, where, supports, case)
        else:
            load = _member_load(reader, spec, where, members, case)
        loads.append(load)
        if case not in order:
            order.append(case)
    return loads, order or [DEFAULT_CASE]


def _nodal_load(reader: CaseReader, spec: dict, where: str, nodes: dict[str, Node],
                case: str) -> NodalLoad:
    """A force (fx, fy) and moment (mz) at a node."""
    reader.keys_known(where, spec, ("node", "fx", "fy", "mz", "case"))
    nid = spec["node"]
    if not isinstance(nid, str) or nid not in nodes:
        raise reader.err(where + ".node", f'unknown node "{echo(nid)}"{hint(str(nid), nodes)}')
    if not any(k in spec for k in ("fx", "fy", "mz")):
        raise reader.err(where, "a nodal load needs fx, fy or mz")
    return NodalLoad(
        nid,
        fx=reader.quantity(spec.get("fx", 0.0), "force", where + ".fx"),
        fy=reader.quantity(spec.get("fy", 0.0), "force", where + ".fy"),
        mz=reader.quantity(spec.get("mz", 0.0), "moment", where + ".mz"),
        case=case,
    )


def _settlement(reader: CaseReader, spec: dict, where: str, supports: dict[str, Support],
                case: str) -> Settlement:
    """An imposed displacement of a support along its rigidly restrained directions."""
    reader.keys_known(where, spec, ("settlement", "dx", "dy", "drz", "dn", "case"))
    nid = spec["settlement"]
    if not isinstance(nid, str) or nid not in supports:
        raise reader.err(where + ".settlement", f'"{echo(nid)}" is not a support; settlement '
                         f"needs a node listed in [supports]{hint(str(nid), supports)}")
    values = []
    rigid = {r.direction for r in supports[nid].restraints if not r.is_spring}
    springs = {r.direction for r in supports[nid].restraints if r.is_spring}
    for key in ("dx", "dy", "drz", "dn"):
        if key not in spec:
            continue
        d = key[1:]
        dim = "angle" if d == "rz" else "length"
        v = reader.quantity(spec[key], dim, f"{where}.{key}")
        if d not in rigid:
            what = "is a spring" if d in springs else "is not restrained"
            raise reader.err(f"{where}.{key}", f'direction "{d}" of support "{echo(nid)}" {what}; '
                             "a settlement needs a rigidly restrained direction "
                             f"(restrained: {', '.join(sorted(rigid)) or 'none'})")
        if d == "rz" and nid not in rotational_nodes(reader.members.values()):
            raise reader.err(f"{where}.{key}", f'node "{echo(nid)}" has no rotation of its own '
                             "(only bars or hinged beam ends meet there), so a rotation "
                             "settlement of its support would act on nothing")
        values.append((d, v))
    if not values:
        raise reader.err(where, "a settlement needs dx, dy or drz")
    return Settlement(nid, tuple(values), case)


def _member_load(reader: CaseReader, spec: dict, where: str, members: dict[str, Member],
                 case: str) -> Load:
    """A load on a member: temperature, misfit, or (beams only) a concentrated or a
    distributed span load."""
    mid = spec["member"]
    if not isinstance(mid, str) or mid not in members:
        raise reader.err(where + ".member", f'unknown member "{echo(mid)}"{hint(str(mid), members)}')
    member = members[mid]
    L = _length_of(reader, member)
    kinds = [k for k in ("at", "wx", "wy", "temperature", "misfit") if k in spec]
    if "temperature" in spec:
        reader.keys_known(where, spec, ("member", "temperature", "case"))
        return _temperature(reader, spec["temperature"], where + ".temperature", member, case)
    if "misfit" in spec:
        reader.keys_known(where, spec, ("member", "misfit", "case"))
        e = reader.quantity(spec["misfit"], "length", where + ".misfit")
        if abs(e) >= 0.5 * L:
            raise reader.err(where + ".misfit", f"misfit {shown(spec['misfit'])} is not small "
                             "beside the member length; this tool assumes small displacements")
        return Misfit(mid, e, case)
    if member.kind == "bar":
        raise reader.err(where, f'"{echo(mid)}" is a bar: it carries axial force only and takes no '
                         "span loads; load its nodes, or make it a beam")
    if "at" in spec:
        return _point_load(reader, spec, where, mid, L, case)
    if any(k in spec for k in ("wx", "wy", "wt", "wn")):
        return _distributed_load(reader, spec, where, mid, L, case)
    raise reader.err(where, "a member load needs at (with fx/fy/mz or ft/fn), wx/wy or wt/wn, "
                     "temperature or "
                     f"misfit{' (found ' + ', '.join(kinds) + ')' if kinds else ''}; "
                     f"keys given: {echo(', '.join(spec))}"
                     + (_hint_keys(spec)))


def _point_load(reader: CaseReader, spec: dict, where: str, mid: str, L: float,
                case: str) -> PointLoad:
    """A concentrated force and moment ``at`` a distance from the start of beam ``mid``
    (length ``L``, m)."""
    reader.keys_known(where, spec, ("member", "at", "fx", "fy", "ft", "fn", "mz", "case"))
    at = reader.quantity(spec["at"], "length", where + ".at")
    if at < -1e-12 or at > L * (1 + 1e-12):
        raise reader.err(where + ".at", f"position {shown(spec['at'])} is off the member "
                         f"(its length is {L / reader.units.factor('length'):g} "
                         f"{reader.units.length}); expected 0 to the length")
    if not any(k in spec for k in ("fx", "fy", "ft", "fn", "mz")):
        raise reader.err(where, "a concentrated member load needs fx, fy, ft, fn or mz")
    local = _axes(reader, spec, where, ("fx", "fy"), ("ft", "fn"))
    keys = ("ft", "fn") if local else ("fx", "fy")
    f1, f2 = (reader.quantity(spec.get(k, 0.0), "force", f"{where}.{k}") for k in keys)
    fx, fy = _to_global(reader, mid, f1, f2, at) if local else (f1, f2)
    return PointLoad(
        mid, min(max(at, 0.0), L), fx=fx, fy=fy,
        mz=reader.quantity(spec.get("mz", 0.0), "moment", where + ".mz"),
        case=case, written="given as " + _written(reader, spec, keys, "force") if local else "",
    )


def _distributed_load(reader: CaseReader, spec: dict, where: str, mid: str, L: float,
                      case: str) -> DistributedLoad:
    """A load per length (wx, wy; uniform or linear) ``from`` one distance ``to`` another
    along beam ``mid`` (length ``L``, m; the whole beam by default)."""
    reader.keys_known(where, spec, ("member", "wx", "wy", "wt", "wn", "per", "from", "to",
                                    "case"))
    start = reader.quantity(spec.get("from", 0.0), "length", where + ".from")
    end = reader.quantity(spec["to"], "length", where + ".to") if "to" in spec else L
    if start < -1e-12 or end > L * (1 + 1e-12) or end <= start:
        raise reader.err(where, f"from/to must satisfy 0 <= from < to <= length "
                         f"({L / reader.units.factor('length'):g} {reader.units.length})")
    local = _axes(reader, spec, where, ("wx", "wy"), ("wt", "wn"))
    per = spec.get("per", "length")
    if per not in ("length", "projection"):
        raise reader.err(where + ".per", 'expected "length" (per unit member length, the '
                         'default) or "projection" (wy per unit horizontal length, wx per unit '
                         f"vertical length), got {shown(per)}")
    if per == "projection" and local:
        raise reader.err(where + ".per", 'per = "projection" goes with global components '
                         "wx/wy; wt/wn are per unit member length")
    keys = ("wt", "wn") if local else ("wx", "wy")
    w1, w2 = (_intensity(reader, spec.get(k, 0.0), f"{where}.{k}") for k in keys)
    frame = "global"
    if reader.members[mid].curve is not None:  # resolved along the arc by its kind
        frame = "local" if local else per if per == "projection" else "global"
        wx, wy = w1, w2
    elif local:
        ends = [_to_global(reader, mid, a, b) for a, b in zip(w1, w2, strict=True)]
        wx, wy = (ends[0][0], ends[1][0]), (ends[0][1], ends[1][1])
    elif per == "projection":
        c, s = _direction(reader, mid)
        wx, wy = (abs(s) * w1[0], abs(s) * w1[1]), (abs(c) * w2[0], abs(c) * w2[1])
    else:
        wx, wy = w1, w2
    written = ""
    if local or per == "projection":
        written = "given as " + _written(reader, spec, keys, "force/length")
        if per == "projection":
            written += " per unit projected length"
    return DistributedLoad(mid, wx=wx, wy=wy, start=max(start, 0.0), end=min(end, L),
                           case=case, written=written, frame=frame)


def _axes(reader: CaseReader, spec: dict, where: str, global_keys: tuple[str, str],
          local_keys: tuple[str, str]) -> bool:
    """True when the load is given in member-local components (``local_keys``); giving
    both kinds in one load is refused."""
    g = [k for k in global_keys if k in spec]
    loc = [k for k in local_keys if k in spec]
    if g and loc:
        raise reader.err(where, f"give global components ({'/'.join(global_keys)}) or "
                         f"member-local ones ({'/'.join(local_keys)}), not both in one load "
                         f"(found {', '.join(g + loc)})")
    return bool(loc)


def _direction(reader: CaseReader, mid: str) -> tuple[float, float]:
    """Direction cosines (c, s) of member ``mid``, start to end."""
    m = reader.members[mid]
    a, b = reader.nodes[m.start], reader.nodes[m.end]
    L = math.hypot(b.x - a.x, b.y - a.y)
    return (b.x - a.x) / L, (b.y - a.y) / L


def _to_global(reader: CaseReader, mid: str, t: float, n: float,
               at: float = 0.0) -> tuple[float, float]:
    """Global (x, y) components of a member-local pair: ``t`` along the member towards its
    end node, ``n`` along local +y (local x turned 90 degrees counter-clockwise); on a
    curved member, the axes of the tangent at ``at`` (m along the arc)."""
    c, s = _direction(reader, mid)
    curve = reader.members[mid].curve
    if curve is not None:
        from ..elements.arc import arc_of

        tx, ty = arc_of(curve).tangent(at, (c, s))
        c, s = float(tx), float(ty)
    return t * c - n * s, t * s + n * c


def _written(reader: CaseReader, spec: dict, keys: tuple[str, ...], dimension: str) -> str:
    """The values of ``keys`` as the file gave them ("wn = -0.8 kN/m"; a bare number with
    the case unit), for the calculation sheet."""
    u = reader.units
    unit = {"force": u.force, "force/length": f"{u.force}/{u.length}"}[dimension]

    def one(v: Any) -> str:
        if isinstance(v, list):
            return " to ".join(one(x) for x in v)
        return literal(v, ECHO_LIMIT) if isinstance(v, str) else f"{v:g} {unit}"

    return ", ".join(f"{k} = {one(spec[k])}" for k in keys if k in spec)


def self_weight(reader: CaseReader, spec: dict, where: str, members: dict[str, Member],
                case: str) -> list[Load]:
    """Every member's own weight, downward (-y), per unit member length: on a beam as a
    distributed load, on a bar as half its weight on each end node (a pin-ended bar's own
    bending is not part of a truss model)."""
    reader.keys_known(where, spec, ("self_weight", "case"))
    if spec["self_weight"] is not True:
        raise reader.err(where + ".self_weight", "expected true (every member's own weight "
                         f"in this load case), got {shown(spec['self_weight'])}")
    out: list[Load] = []
    for mid, m in members.items():
        if m.weight is None:
            raise reader.err(where, f'member "{echo(mid)}" has no own weight: self_weight '
                             "needs a density in its material and an area A in its section")
        text = f"self-weight of {mid}"
        if m.kind == "bar":
            half = -0.5 * m.weight * _length_of(reader, m)
            out += [NodalLoad(m.start, fy=half, case=case, written=text),
                    NodalLoad(m.end, fy=half, case=case, written=text)]
        else:
            end = m.taper.weight if m.taper and m.taper.weight is not None else m.weight
            out.append(DistributedLoad(mid, wy=(-m.weight, -end), case=case,
                                       written=text))
    return out


def _intensity(reader: CaseReader, value: Any, where: str) -> tuple[float, float]:
    """(start, end) intensity (N/m) of one value or a [start, end] pair."""
    if isinstance(value, list):
        if len(value) != 2:
            raise reader.err(where, f"expected one value or a [start, end] pair, got {shown(value)}")
        return (reader.quantity(value[0], "force/length", where + "[0]"),
                reader.quantity(value[1], "force/length", where + "[1]"))
    v = reader.quantity(value, "force/length", where)
    return (v, v)


def _temperature(reader: CaseReader, spec: Any, where: str, member: Member,
                 case: str) -> TemperatureLoad:
    """A uniform temperature change and a gradient (top to bottom, K) on ``member``; its
    thermal strain must stay small."""
    if not isinstance(spec, dict):
        raise reader.err(where, 'expected { uniform = "25 K", gradient = "10 K" }, got '
                         + kind_of(spec))
    reader.keys_known(where, spec, ("uniform", "gradient"))
    if not spec:
        raise reader.err(where, "needs uniform and/or gradient")
    uniform = reader.quantity(spec.get("uniform", 0.0), "temperature difference", where + ".uniform")
    gradient = reader.quantity(spec.get("gradient", 0.0), "temperature difference", where + ".gradient")
    if member.alpha is None and (uniform or gradient):
        raise reader.err(where, f'member "{echo(member.id)}" has no thermal expansion coefficient: '
                         "give alpha in its material")
    if member.alpha is not None:
        for key, dT in (("uniform", uniform), ("gradient", gradient)):
            if abs(member.alpha * dT) >= 0.01:
                raise reader.err(f"{where}.{key}", f'thermal strain alpha*dT = '
                                 f'{member.alpha * dT:.3g} on member "{echo(member.id)}" is not '
                                 "small (1% or more); check alpha in its material and the "
                                 "temperature change: this tool assumes small displacements")
    if gradient:
        if member.kind == "bar":
            raise reader.err(where + ".gradient", f'"{echo(member.id)}" is a bar; a temperature '
                             "gradient bends, so it applies to beams only")
        if member.depth is None:
            raise reader.err(where + ".gradient", f'member "{echo(member.id)}" has no section '
                             "depth: give depth in its section for a temperature gradient")
    return TemperatureLoad(member.id, uniform, gradient, case)


def _hint_keys(spec: dict) -> str:
    """' — "KEY" (did you mean "X"?)' for the first key of a member load that looks like a
    misspelt load key, or ""."""
    for key in spec:
        if key not in ("member", "case"):
            h = hint(key, _MEMBER_LOAD_KEYS)
            if h:
                return f' — "{echo(key)}"{h}'
    return ""


def _length_of(reader: CaseReader, member: Member) -> float:
    """The length of ``member`` along its axis (m; the arc length of a curved one)."""
    if member.curve is not None:
        from ..elements.arc import arc_of

        return arc_of(member.curve).length
    a, b = reader.nodes[member.start], reader.nodes[member.end]
    return math.hypot(b.x - a.x, b.y - a.y)


def read_combinations(reader: CaseReader, loads: list, case_order: list,
                      patterns: dict[str, tuple[str, ...]] | None = None,
                      variants: dict[str, list[str]] | None = None) -> tuple:
    """``[combinations]``: NAME = { CASE = factor, ... }. Each combination's factored
    loads are appended to ``loads`` under its name (and the name to ``case_order``), so
    that it solves like a load case."""
    spec = reader.table("combinations")
    out = []
    cases = list(case_order)
    for name, parts in spec.items():
        where = f"[combinations] {name}"
        if not ID.match(name):
            raise reader.err(where, "a combination name is made of letters, digits and _")
        if name in cases:
            raise reader.err(where, f'"{echo(name)}" is already the name of a load case')
        if not isinstance(parts, dict) or not parts:
            raise reader.err(where, 'expected { CASE = factor, ... }, e.g. '
                             '{ dead = 1.35, live = 1.5 }, got ' + kind_of(parts))
        factors = []
        for case, value in parts.items():
            if case not in cases:
                raise reader.err(f"{where}.{case}", f'no load case "{echo(case)}"'
                                 f"{hint(case, cases)}; the cases are: "
                                 + echo(", ".join(cases)))
            factors.append((case, reader.quantity(value, "number", f"{where}.{case}")))
        for variant, parts_v in _variants(reader, where, name, factors, patterns or {}):
            for case, f in parts_v:
                loads.extend(scaled_load(ld, f, variant) for ld in list(loads)
                             if ld.case == case)
            case_order.append(variant)
            out.append((variant, tuple(parts_v)))
            if variants is not None:
                variants.setdefault(name, []).append(variant)
    return tuple(out)


def _variants(reader: CaseReader, where: str, name: str, factors: list,
              patterns: dict[str, tuple[str, ...]]) -> list[tuple[str, list]]:
    """The combination itself and, when it uses patterned load cases ([patterns]), one
    variant per arrangement (per combination of arrangements), named ``NAME[AB+CD]``."""
    from itertools import product

    from .patterns import PATTERN_VARIANTS_LIMIT

    choices = [[case, *patterns.get(case, ())] for case, _ in factors]
    count = 1
    for c in choices:
        count *= len(c)
    if count > PATTERN_VARIANTS_LIMIT:
        raise reader.err(where, f"its patterned load cases make {count} arrangements, more "
                         f"than {PATTERN_VARIANTS_LIMIT}; pattern fewer cases or split the "
                         "structure")
    out = []
    for pick in product(*choices):
        tags = [p[len(case) + 1:-1] for p, (case, _) in zip(pick, factors, strict=True)
                if p != case]
        label = name if not tags else f"{name}[{'|'.join(tags)}]"
        out.append((label, [(p, f) for p, (_, f) in zip(pick, factors, strict=True)]))
    return out
