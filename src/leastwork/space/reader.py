"""Read a space case (nodes with three coordinates) into a :class:`SpaceStructure`.

The tables and keys are those of a plane case (docs/case-format.md) with the space keys of
docs/space.md: sections give ``Iy``, ``Iz``, ``J`` (or a member gives ``EIy``, ``EIz``,
``GJ``); supports restrain x, y, z, rx, ry, rz; loads have fx, fy, fz, mx, my, mz and wx,
wy, wz. The shared parts of the reader are reused: [structure] and its units,
[parameters], [materials], [defaults], [analysis], the quantity parser and its located
errors.
"""

from __future__ import annotations

import numpy as np

from ..io.analysis import read_analysis
from ..io.core import CaseReader
from ..io.loads import _intensity, read_combinations
from ..io.members import _pick, connected_nodes
from ..io.messages import echo, hint, kind_of, shown
from ..io.reader import _defaults, _head, _materials
from ..model.structure import DEFAULT_CASE
from .model import (
    DIRECTIONS,
    END_ACTIONS,
    SpaceDistributedLoad,
    SpaceMember,
    SpaceMisfit,
    SpaceNodalLoad,
    SpaceNode,
    SpacePointLoad,
    SpaceRestraint,
    SpaceSettlement,
    SpaceStructure,
    SpaceSupport,
    SpaceTemperature,
)

__all__ = ["is_space_case", "read_space"]

_SUPPORT_TYPES = {"fixed": DIRECTIONS, "pinned": ("x", "y", "z")}
_BEAM_KEYS = ("nodes", "material", "section", "EA", "EIy", "EIz", "GJ", "roll", "hinges",
              "releases", "description")
_BAR_KEYS = ("nodes", "material", "section", "EA", "description")
_SECTION_DIMS = {"A": "area", "Iy": "second moment of area", "Iz": "second moment of area",
                 "J": "second moment of area", "shear_area": "area", "shear_area_y": "area",
                 "shear_area_z": "area", "depth": "length", "S": "section modulus"}
#: Tables of a plane case that a space case does not take yet (a plain refusal).
_NOT_YET = ("patterns", "envelopes")


def is_space_case(data: dict) -> bool:
    """Whether a parsed case is spatial: its first node has three coordinates (then every
    node needs three; a node of another size is refused by name)."""
    nodes = data.get("nodes")
    if not isinstance(nodes, dict) or not nodes:
        return False
    first = next(iter(nodes.values()))
    return isinstance(first, list) and len(first) == 3


def read_space(reader: CaseReader) -> SpaceStructure:
    """The space structure of the parsed case ``reader.data``, every table checked."""
    name = _head(reader)
    for t in _NOT_YET:
        if t in reader.data:
            raise reader.err(f"[{t}]", f"[{t}] is not supported for space structures yet; "
                             "give each load case its own loads")
    nodes = _nodes(reader)
    specs = _member_specs(reader, nodes)
    connected_nodes(reader, nodes, [(k, i, s, e) for k, i, s, e in specs])
    materials = _materials(reader)
    sections = _sections(reader)
    defaults = _defaults(reader, materials, sections)
    members = {mid: _member(reader, kind, mid, spec, ends, nodes, materials, sections, defaults)
               for kind, mid, spec, ends in specs}
    supports = _supports(reader, nodes)
    redundants, displacements, shear, limits = read_analysis(reader)
    if limits != (None, None):
        raise reader.err("[analysis] deflection_limits", "deflection limits are not supported "
                         "for space structures yet")
    if shear:
        for m in members.values():
            if m.is_beam and (m.GAy is None or m.GAz is None):
                raise reader.err(f"[beams] {m.id}", "shear energy is asked ([analysis] shear "
                                 "= true) but this beam has no shear stiffness: give G in its "
                                 "material and shear_area (or shear_area_y and shear_area_z) "
                                 "in its section")
    st = SpaceStructure(name=name, nodes=nodes, members=members, supports=supports,
                        units=reader.units, redundants=redundants, displacements=displacements,
                        shear=shear, source=reader.source)
    loads, order = _loads(reader, st)
    combinations = read_combinations(reader, loads, order)
    from dataclasses import replace

    return replace(st, loads=tuple(loads), case_order=tuple(order), combinations=combinations)


# ---------------------------------------------------------------- nodes and members
def _nodes(reader: CaseReader) -> dict[str, SpaceNode]:
    table = reader.table("nodes", required=True)
    nodes: dict[str, SpaceNode] = {}
    seen: dict[tuple, str] = {}
    for nid, xyz in table.items():
        where = f"[nodes] {nid}"
        reader.ident(where, nid, "node")
        if not isinstance(xyz, list) or len(xyz) != 3:
            raise reader.err(where, "expected coordinates [x, y, z] (the first node has three, "
                             f"so every node needs three), got {shown(xyz)}")
        x, y, z = (reader.quantity(v, "length", f"{where}[{i}] ({a})")
                   for i, (v, a) in enumerate(zip(xyz, "xyz", strict=True)))
        key = (round(x, 9), round(y, 9), round(z, 9))
        if key in seen:
            raise reader.err(where, f'same position as node "{echo(seen[key])}"; two nodes '
                             "may not coincide")
        seen[key] = nid
        nodes[nid] = SpaceNode(nid, x, y, z)
    return nodes


def _member_specs(reader: CaseReader, nodes) -> list[tuple[str, str, dict, list[str]]]:
    specs = []
    kinds: dict[str, str] = {}
    for kind, keys in (("beam", _BEAM_KEYS), ("bar", _BAR_KEYS)):
        for mid, spec in reader.table(kind + "s").items():
            where = f"[{kind}s] {mid}"
            reader.ident(where, mid, "member")
            if mid in kinds:
                raise reader.err(where, f'duplicate member id "{echo(mid)}"; ids must be unique')
            if not isinstance(spec, dict):
                raise reader.err(where, f'expected {{ nodes = ["A", "B"], ... }}, got '
                                 f"{kind_of(spec)}")
            if "curve" in spec:
                raise reader.err(where + ".curve", "curved members are for plane structures "
                                 "only; in space, give the arc as straight members")
            reader.keys_known(where, spec, keys)
            ends = spec.get("nodes")
            if not (isinstance(ends, list) and len(ends) == 2
                    and all(isinstance(e, str) for e in ends)):
                raise reader.err(where + ".nodes", 'expected two node ids ["A", "B"], got '
                                 + shown(ends))
            for e in ends:
                if e not in nodes:
                    raise reader.err(where + ".nodes", f'unknown node "{echo(e)}"{hint(e, nodes)}')
            if ends[0] == ends[1]:
                raise reader.err(where + ".nodes", "a member needs two different nodes")
            kinds[mid] = kind
            specs.append((kind, mid, spec, ends))
    if not specs:
        raise reader.err("[beams]/[bars]", "no members; expected a [beams] or [bars] table")
    return specs


def _sections(reader: CaseReader) -> dict[str, dict[str, float]]:
    out = {}
    for sid, spec in reader.table("sections").items():
        where = f"[sections.{sid}]"
        if not isinstance(spec, dict):
            raise reader.err(where, f"expected a table of A, Iy, Iz, J, got {kind_of(spec)}")
        if "I" in spec:
            raise reader.err(where + " I", "a space section gives Iy and Iz (bending about "
                             "local y and local z), not I")
        reader.keys_known(where, spec, (*_SECTION_DIMS, "description"))
        out[sid] = {k: reader.positive(spec[k], d, f"{where} {k}")
                    for k, d in _SECTION_DIMS.items() if k in spec}
    return out


def _stiffness(reader, spec, where, key, product, sec_key, factor, sec, what):
    """A member's own ``key`` (e.g. EIy), else ``factor`` (E or G) times the section's
    ``sec_key``; None where neither is given."""
    if key in spec:
        return reader.positive(spec[key], product, f"{where}.{key}")
    if sec and sec_key in sec:
        if factor is None:
            raise reader.err(where, f"needs {what}: its section gives {sec_key} but no "
                             f"material with {what} applies (give a material, or {key})")
        return factor * sec[sec_key]
    return None


def _member(reader, kind, mid, spec, ends, nodes, materials, sections, defaults) -> SpaceMember:
    where = f"[{kind}s] {mid}"
    a, b = nodes[ends[0]].xyz, nodes[ends[1]].xyz
    if np.linalg.norm(b - a) <= 1e-9:
        raise reader.err(where + ".nodes", "zero-length member")
    mat = _pick(reader, materials, spec.get("material", defaults.get("material")), "material",
                where, "material" in spec) or {}
    sec = _pick(reader, sections, spec.get("section", defaults.get("section")), "section",
                where, "section" in spec) or {}
    E, G = mat.get("E"), mat.get("G")
    EA = _stiffness(reader, spec, where, "EA", "axial stiffness", "A", E, sec, "E")
    if kind == "bar":
        if EA is None:
            raise reader.err(where, "a bar needs an axial stiffness: give EA, or a section "
                             "with A and a material with E")
        return SpaceMember(mid, "bar", ends[0], ends[1], EA=EA, alpha=mat.get("alpha"))
    EIy = _stiffness(reader, spec, where, "EIy", "flexural stiffness", "Iy", E, sec, "E")
    EIz = _stiffness(reader, spec, where, "EIz", "flexural stiffness", "Iz", E, sec, "E")
    GJ = _stiffness(reader, spec, where, "GJ", "flexural stiffness", "J", G, sec, "G")
    if EIy is None or EIz is None:
        raise reader.err(where, "a space beam needs both flexural stiffnesses: give EIy and "
                         "EIz, or a section with Iy and Iz and a material with E")
    releases = _releases(reader, spec, where)
    if GJ is None and not any(a == "t" for _, a in releases):
        raise reader.err(where, "a space beam needs a torsional stiffness: give GJ, or a "
                         "section with J and a material with G (or release its twist with "
                         'releases = { start = ["t"] } if it carries none)')
    Ay = sec.get("shear_area_y", sec.get("shear_area"))
    Az = sec.get("shear_area_z", sec.get("shear_area"))
    roll = reader.quantity(spec["roll"], "angle", where + ".roll") if "roll" in spec else 0.0
    return SpaceMember(mid, "beam", ends[0], ends[1], EA=EA, EIy=EIy, EIz=EIz, GJ=GJ,
                       GAy=G * Ay if G and Ay else None, GAz=G * Az if G and Az else None,
                       alpha=mat.get("alpha"), roll=roll, releases=releases)


def _releases(reader: CaseReader, spec: dict, where: str) -> frozenset[tuple[str, str]]:
    """``hinges = ["start"]`` (both bending moments released at that end) and ``releases =
    { start = ["t", "my", "mz"], end = [...] }`` (each action named)."""
    out: set[tuple[str, str]] = set()
    hinges = spec.get("hinges", [])
    if not isinstance(hinges, list) or not all(h in ("start", "end") for h in hinges):
        raise reader.err(where + ".hinges", 'expected ["start"], ["end"] or ["start", "end"], '
                         f"got {shown(hinges)}")
    for h in hinges:
        out |= {(h, "my"), (h, "mz")}
    table = spec.get("releases", {})
    if not isinstance(table, dict):
        raise reader.err(where + ".releases", 'expected { start = ["my", "mz"], end = ["t"] }, '
                         f"got {kind_of(table)}")
    reader.keys_known(where + ".releases", table, ("start", "end"))
    for end, acts in table.items():
        if not isinstance(acts, list) or not all(a in END_ACTIONS for a in acts):
            raise reader.err(f"{where}.releases.{end}", 'expected a list of "t", "my", "mz", '
                             f"got {shown(acts)}")
        out |= {(end, a) for a in acts}
    if ("start", "t") in out and ("end", "t") in out:
        out.discard(("end", "t"))  # the twist is one action along a member: one release
    return frozenset(out)


# ---------------------------------------------------------------- supports
def _supports(reader: CaseReader, nodes) -> dict[str, SpaceSupport]:
    out: dict[str, SpaceSupport] = {}
    for nid, spec in reader.table("supports").items():
        where = f"[supports] {nid}"
        if nid not in nodes:
            raise reader.err(where, f'unknown node "{echo(nid)}"{hint(nid, nodes)}')
        if isinstance(spec, str):
            spec = {"type": spec}
        if not isinstance(spec, dict):
            raise reader.err(where, 'expected "fixed", "pinned" or a table such as { restrain '
                             f'= ["x", "y", "z"] }}, got {kind_of(spec)}')
        reader.keys_known(where, spec, ("type", "restrain", "springs"))
        rigid: list[str] = []
        if "type" in spec:
            if spec["type"] not in _SUPPORT_TYPES:
                raise reader.err(where, f'unknown support type "{echo(str(spec["type"]))}" for a '
                                 'space structure; expected "fixed" (x, y, z, rx, ry, rz), '
                                 '"pinned" (x, y, z) or { restrain = [...] }')
            if "restrain" in spec:
                raise reader.err(where, "give either type or restrain, not both")
            rigid = list(_SUPPORT_TYPES[spec["type"]])
        if "restrain" in spec:
            dirs = spec["restrain"]
            if not isinstance(dirs, list) or not all(d in DIRECTIONS for d in dirs) \
                    or len(set(dirs)) != len(dirs):
                raise reader.err(where + ".restrain", "expected a list of distinct directions "
                                 f"among x, y, z, rx, ry, rz, got {shown(dirs)}")
            rigid = list(dirs)
        restraints = [SpaceRestraint(nid, d) for d in DIRECTIONS if d in rigid]
        springs = spec.get("springs", {})
        if not isinstance(springs, dict):
            raise reader.err(where + ".springs", 'expected { z = "8000 kN/m" }, got '
                             + kind_of(springs))
        for d, k in springs.items():
            if d not in DIRECTIONS:
                raise reader.err(where + ".springs", f'unknown direction "{echo(d)}"; expected '
                                 "x, y, z, rx, ry or rz")
            if d in rigid:
                raise reader.err(where + ".springs", f'direction "{d}" is both rigid and a spring')
            dim = "rotational stiffness" if d.startswith("r") else "force/length"
            restraints.append(SpaceRestraint(nid, d, reader.positive(k, dim,
                                                                      f"{where}.springs.{d}")))
        if not restraints:
            raise reader.err(where, "restrains nothing; give a type, restrain or springs")
        out[nid] = SpaceSupport(nid, tuple(restraints))
    if not out:
        raise reader.err("[supports]", "no supports: a structure needs at least one")
    return out


# ---------------------------------------------------------------- loads
_NODAL = (("fx", "force"), ("fy", "force"), ("fz", "force"), ("mx", "moment"),
          ("my", "moment"), ("mz", "moment"))


def _loads(reader: CaseReader, st: SpaceStructure) -> tuple[list, list[str]]:
    raw = reader.data.get("loads", [])
    if not isinstance(raw, list):
        raise reader.err("[[loads]]", f"expected [[loads]] entries, got {kind_of(raw)}")
    loads, order = [], []
    for i, spec in enumerate(raw):
        where = f"[[loads]] #{i + 1}"
        if not isinstance(spec, dict):
            raise reader.err(where, f"expected a table, got {kind_of(spec)}")
        case = spec.get("case", DEFAULT_CASE)
        if not isinstance(case, str) or not case.strip():
            raise reader.err(where + ".case", f"expected a load case name, got {shown(case)}")
        if "node" in spec:
            load = _nodal(reader, spec, where, st, case)
        elif "settlement" in spec:
            load = _settlement(reader, spec, where, st, case)
        elif "member" in spec:
            load = _member_load(reader, spec, where, st, case)
        else:
            raise reader.err(where, "expected node = ..., member = ... or settlement = ... "
                             "(self_weight is not supported for space structures yet)")
        loads.append(load)
        if case not in order:
            order.append(case)
    return loads, order or [DEFAULT_CASE]


def _nodal(reader, spec, where, st, case) -> SpaceNodalLoad:
    reader.keys_known(where, spec, ("node", *(k for k, _ in _NODAL), "case"))
    nid = spec["node"]
    if not isinstance(nid, str) or nid not in st.nodes:
        raise reader.err(where + ".node", f'unknown node "{echo(str(nid))}"'
                         f"{hint(str(nid), st.nodes)}")
    if not any(k in spec for k, _ in _NODAL):
        raise reader.err(where, "a nodal load needs fx, fy, fz, mx, my or mz")
    values = tuple(reader.quantity(spec.get(k, 0.0), dim, f"{where}.{k}") for k, dim in _NODAL)
    return SpaceNodalLoad(nid, values, case)  # type: ignore[arg-type]


def _settlement(reader, spec, where, st, case) -> SpaceSettlement:
    keys = tuple(f"d{d}" for d in DIRECTIONS)
    reader.keys_known(where, spec, ("settlement", *keys, "case"))
    nid = spec["settlement"]
    if not isinstance(nid, str) or nid not in st.supports:
        raise reader.err(where + ".settlement", f'"{echo(str(nid))}" is not a support; '
                         "settlement needs a node listed in [supports]")
    rigid = {r.direction for r in st.supports[nid].restraints if not r.is_spring}
    values = []
    for key in keys:
        if key in spec:
            d = key[1:]
            if d not in rigid:
                raise reader.err(f"{where}.{key}", f'direction "{d}" of support "{echo(nid)}" '
                                 "is not rigidly restrained; a settlement needs one "
                                 f"(restrained: {', '.join(sorted(rigid)) or 'none'})")
            dim = "angle" if d.startswith("r") else "length"
            values.append((d, reader.quantity(spec[key], dim, f"{where}.{key}")))
    if not values:
        raise reader.err(where, "a settlement needs dx, dy, dz, drx, dry or drz")
    return SpaceSettlement(nid, tuple(values), case)


def _member_load(reader, spec, where, st, case):
    mid = spec["member"]
    if not isinstance(mid, str) or mid not in st.members:
        raise reader.err(where + ".member", f'unknown member "{echo(str(mid))}"'
                         f"{hint(str(mid), st.members)}")
    m = st.members[mid]
    L = st.length(mid)
    if "misfit" in spec:
        reader.keys_known(where, spec, ("member", "misfit", "case"))
        return SpaceMisfit(mid, reader.quantity(spec["misfit"], "length", where + ".misfit"),
                           case)
    if "temperature" in spec:
        reader.keys_known(where, spec, ("member", "temperature", "case"))
        t = spec["temperature"]
        if not isinstance(t, dict) or set(t) - {"uniform"} or "uniform" not in t:
            raise reader.err(where + ".temperature", 'expected { uniform = "25 K" } (a '
                             "gradient is not supported for space structures yet), got "
                             + shown(t))
        if m.alpha is None:
            raise reader.err(where + ".temperature", f'member "{mid}" has no alpha: give '
                             "alpha in its material")
        return SpaceTemperature(mid, reader.quantity(t["uniform"], "temperature difference",
                                                     where + ".temperature.uniform"), case)
    if not m.is_beam:
        raise reader.err(where + ".member", f'"{mid}" is a bar (axial force only): put the load '
                         "on its nodes")
    if "at" in spec:
        reader.keys_known(where, spec, ("member", "at", "fx", "fy", "fz", "case"))
        at = reader.quantity(spec["at"], "length", where + ".at")
        if not 0 < at < L:
            raise reader.err(where + ".at", "expected a distance from the start node inside "
                             f"the member (0 < at < {L / reader.units.factor('length'):g} "
                             f"{reader.units.length})")
        if not any(k in spec for k in ("fx", "fy", "fz")):
            raise reader.err(where, "a point load on a member needs fx, fy or fz")
        f = tuple(reader.quantity(spec.get(k, 0.0), "force", f"{where}.{k}")
                  for k in ("fx", "fy", "fz"))
        return SpacePointLoad(mid, at, f, case)  # type: ignore[arg-type]
    reader.keys_known(where, spec, ("member", "wx", "wy", "wz", "from", "to", "case"))
    if not any(k in spec for k in ("wx", "wy", "wz")):
        raise reader.err(where, "a member load needs wx, wy or wz (or at with fx, fy, fz; "
                         "misfit; temperature)")
    start = reader.quantity(spec.get("from", 0.0), "length", where + ".from")
    end = reader.quantity(spec["to"], "length", where + ".to") if "to" in spec else L
    if start < -1e-12 or end > L * (1 + 1e-12) or end <= start:
        raise reader.err(where, "from/to must satisfy 0 <= from < to <= length "
                         f"({L / reader.units.factor('length'):g} {reader.units.length})")
    w = [_intensity(reader, spec.get(k, 0.0), f"{where}.{k}") for k in ("wx", "wy", "wz")]
    return SpaceDistributedLoad(mid, (w[0][0], w[1][0], w[2][0]), (w[0][1], w[1][1], w[2][1]),
                                max(start, 0.0), min(end, L), case)

