"""``[beams]`` and ``[bars]``: ids and end nodes first (no quantity read), then each member's
stiffnesses from its own values or from its material and section, and its hinges."""

from __future__ import annotations

import math
from typing import Any

from ..model import Curve, Member, Node, Taper
from .core import CaseReader
from .messages import echo, hint, kind_of, shown

__all__ = ["member_specs", "connected_nodes", "read_members"]

#: (kind, id, table, end nodes) of one member as written
MemberSpec = tuple[str, str, dict, list[str]]

_BEAM_KEYS = ("nodes", "material", "section", "EI", "EA", "hinges", "end_springs",
              "description", "taper", "curve")
_BAR_KEYS = ("nodes", "material", "section", "EA", "acts", "description")


def member_specs(reader: CaseReader, node_ids) -> list[MemberSpec]:
    """(kind, id, table, end nodes) of every member, checked without reading a quantity:
    ids, keys, and two different, known end nodes."""
    specs: list[MemberSpec] = []
    kinds: dict[str, str] = {}
    for kind, keys in (("beam", _BEAM_KEYS), ("bar", _BAR_KEYS)):
        table = reader.table(kind + "s")
        for mid, spec in table.items():
            where = f"[{kind}s] {mid}"
            reader.ident(where, mid, "member")
            if mid in kinds:
                raise reader.err(where, f'duplicate member id "{echo(mid)}": it is also a '
                                 f"{kinds[mid]}; ids must be unique")
            if not isinstance(spec, dict):
                raise reader.err(where, f'expected {{ nodes = ["A", "B"], ... }}, got {kind_of(spec)}')
            reader.keys_known(where, spec, keys)
            ends = spec.get("nodes")
            if not (isinstance(ends, list) and len(ends) == 2
                    and all(isinstance(e, str) for e in ends)):
                raise reader.err(where + ".nodes", f'expected two node ids ["A", "B"], got {shown(ends)}')
            for e in ends:
                if e not in node_ids:
                    raise reader.err(where + ".nodes", f'unknown node "{echo(e)}"{hint(e, node_ids)}')
            if ends[0] == ends[1]:
                raise reader.err(where + ".nodes", "a member needs two different nodes "
                                 "(zero length)")
            kinds[mid] = kind
            specs.append((kind, mid, spec, ends))
    if not specs:
        raise reader.err("[beams]/[bars]", "no members; expected a [beams] or [bars] table")
    return specs


def connected_nodes(reader: CaseReader, node_ids, specs: list[MemberSpec]) -> set[str]:
    """The nodes on a member; every node must be one."""
    used = {e for _, _, _, ends in specs for e in ends}
    for n in node_ids:
        if n not in used:
            raise reader.err(f"[nodes] {n}", f'node "{echo(n)}" is not connected to any member')
    return used


def read_members(reader: CaseReader, specs: list[MemberSpec], nodes: dict[str, Node],
                 materials: dict, sections: dict, defaults: dict) -> dict[str, Member]:
    """The members of ``specs`` (checked by :func:`member_specs`), stiffnesses in SI."""
    members: dict[str, Member] = {}
    for kind, mid, spec, ends in specs:
        where = f"[{kind}s] {mid}"
        a, b = nodes[ends[0]], nodes[ends[1]]
        if math.hypot(b.x - a.x, b.y - a.y) <= 1e-9:
            raise reader.err(where + ".nodes", "zero-length member")
        mat_id = spec.get("material", defaults.get("material"))
        sec_id = spec.get("section", defaults.get("section"))
        mat = _pick(reader, materials, mat_id, "material", where, "material" in spec)
        taper, sec_names = None, sec_id
        if kind == "beam" and "curve" in spec and ("taper" in spec
                                                   or isinstance(sec_id, list)):
            raise reader.err(where + (".taper" if "taper" in spec else ".section"),
                             "a curved beam is prismatic here: give one section and leave "
                             "out taper, or leave out curve")
        if kind == "beam" and ("taper" in spec or isinstance(sec_id, list)):
            sec_id, taper = _taper(reader, spec, where, mat, sections,
                                   math.hypot(b.x - a.x, b.y - a.y))
        sec = _pick(reader, sections, sec_id, "section", where, "section" in spec)
        EA, EI = _stiffnesses(reader, kind, spec, where, mat, sec, sec_id)
        GAs = None
        if mat and "G" in mat and sec and "shear_area" in sec:
            GAs = mat["G"] * sec["shear_area"]
        hinges = spec.get("hinges", [])
        if kind == "beam":
            if not isinstance(hinges, list) or not all(h in ("start", "end") for h in hinges):
                raise reader.err(where + ".hinges", 'expected ["start"], ["end"] or '
                                 f'["start", "end"], got {shown(hinges)}')
        members[mid] = Member(
            id=mid, kind="tapered" if taper else kind, start=ends[0], end=ends[1], EA=EA, EI=EI, GAs=GAs,
            alpha=mat.get("alpha") if mat else None,
            depth=sec.get("depth") if sec else None,
            hinge_start="start" in hinges, hinge_end="end" in hinges,
            weight=(mat["unit_weight"] * sec["A"]
                    if mat and "unit_weight" in mat and sec and "A" in sec else None),
            acts=_acts(reader, spec, where),
            end_springs=_end_springs(reader, spec, where, hinges) if kind == "beam"
            else (None, None),
            area=sec.get("A") if sec else None,
            section_modulus=_section_modulus(sec),
            curve=_curve(reader, spec, where, math.hypot(b.x - a.x, b.y - a.y))
            if "curve" in spec else None,
            taper=taper,
            material=mat_id if mat is not None else None,
            section=(" -> ".join(map(str, sec_names)) if isinstance(sec_names, list)
                     else sec_id) if sec is not None else None,
            E=mat.get("E") if mat else None,
            I=sec.get("I") if sec else None,
        )
    return members


def _curve(reader: CaseReader, spec: dict, where: str, chord: float) -> Curve:
    """``curve = { shape = "circle" | "parabola", rise = ... }`` of a beam (chord in m)."""
    table = spec["curve"]
    key = where + ".curve"
    if not isinstance(table, dict):
        raise reader.err(key, 'expected { shape = "circle", rise = "3 m" } (or shape = '
                         f'"parabola"), got {kind_of(table)}')
    reader.keys_known(key, table, ("shape", "rise"))
    shape = table.get("shape")
    if shape not in ("circle", "parabola"):
        raise reader.err(key + ".shape", 'expected "circle" or "parabola", got '
                         + (shown(shape) if shape is not None else "nothing"))
    if "rise" not in table:
        raise reader.err(key + ".rise", "expected the rise: the largest distance of the axis "
                         'from the chord, e.g. rise = "3 m" (negative: on the local -y side)')
    rise = reader.quantity(table["rise"], "length", key + ".rise")
    if not math.isfinite(rise) or abs(rise) <= 1e-9 * chord:
        raise reader.err(key + ".rise", f"expected a rise other than zero, got "
                         f"{shown(table['rise'])}; leave out curve for a straight beam")
    if shape == "parabola" and abs(rise) > 10 * chord:
        raise reader.err(key + ".rise", f"a parabola rising {shown(table['rise'])} over its "
                         "chord is steeper than this tool handles (rise up to 10 chords)")
    return Curve(shape, rise, chord)


def _end_springs(reader: CaseReader, spec: dict, where: str,
                 hinges: list) -> tuple[float | None, float | None]:
    """Rotational stiffness (N*m/rad) of the joint at each end of a beam: ``end_springs =
    { start = ..., end = ... }``; an end may not be both hinged and sprung."""
    table = spec.get("end_springs")
    if table is None:
        return (None, None)
    key = where + ".end_springs"
    if not isinstance(table, dict) or not table:
        raise reader.err(key, 'expected { start = "5000 kN*m/rad", end = "5000 kN*m/rad" } '
                         f"(either end or both), got {kind_of(table)}")
    reader.keys_known(key, table, ("start", "end"))
    out: list[float | None] = []
    for end in ("start", "end"):
        if end not in table:
            out.append(None)
            continue
        if end in hinges:
            raise reader.err(f"{key}.{end}", f"the {end} is hinged (no moment): it cannot also "
                             "have a joint spring; give one or the other")
        out.append(reader.positive(table[end], "rotational stiffness", f"{key}.{end}"))
    return (out[0], out[1])
_TAPERS = ("linear", "depth")
#: relative agreement asked of the end section of a "depth" taper with the start's
_DEPTH_RTOL = 1e-3


def _taper(reader: CaseReader, spec: dict, where: str, mat: dict | None, sections: dict,
           length: float) -> tuple[str, Taper]:
    """The start section's name and the end section (:class:`Taper`) of a tapered beam:
    ``section = ["start", "end"]`` with ``taper = "linear"`` or ``"depth"``."""
    names = spec.get("section")
    law = spec.get("taper")
    if law is None:
        raise reader.err(where + ".taper", 'a section pair ["start", "end"] needs taper = '
                         '"linear" or "depth"')
    if law not in _TAPERS:
        raise reader.err(where + ".taper", 'expected "linear" (A and I vary linearly) or '
                         '"depth" (a solid rectangle whose depth varies linearly), got '
                         f"{shown(law)}")
    if not (isinstance(names, list) and len(names) == 2
            and all(isinstance(n, str) for n in names)):
        raise reader.err(where + ".section", "a tapered beam needs two section names "
                         f'["start", "end"], got {shown(names)}')
    for key in ("EI", "EA"):
        if key in spec:
            raise reader.err(where + "." + key, "a tapered beam takes its stiffnesses from "
                             f"its two sections; remove {key}")
    secs = [_pick(reader, sections, n, "section", where, True) for n in names]
    E = mat.get("E") if mat else None
    if E is None:
        raise reader.err(where, "a tapered beam needs a material with E")
    for n, sec in zip(names, secs, strict=True):
        if "I" not in sec:
            raise reader.err(f"[sections.{n}]", f'needs I (section "{echo(n)}" ends the '
                             f"tapered beam {where})")
    s0, s1 = secs
    if law == "depth":
        for n, sec in zip(names, secs, strict=True):
            if "depth" not in sec:
                raise reader.err(f"[sections.{n}]", 'needs depth for taper = "depth"')
        r = s1["depth"] / s0["depth"]
        for key, want in (("I", s0["I"] * r**3), ("A", s0["A"] * r if "A" in s0 else None)):
            if want is None or abs(s1.get(key, want) - want) <= _DEPTH_RTOL * abs(want):
                continue
            unit = "m^4" if key == "I" else "m^2"
            raise reader.err(where + ".section", f'taper = "depth" needs the end section '
                             f'"{echo(names[1])}" to agree with the start: {key} = {key}_start '
                             f"(d_end/d_start)^{3 if key == 'I' else 1} = {want:.6g} {unit}, "
                             f"got {s1[key]:.6g} {unit}; give matching sections or taper = \"linear\"")
    G = mat.get("G") if mat else None
    weight = (mat["unit_weight"] * s1["A"]
              if mat and "unit_weight" in mat and "A" in s1 else None)
    taper = Taper(
        law=law, EA=E * s1["A"] if "A" in s1 else None, EI=E * s1["I"],
        GAs=G * s1["shear_area"] if G is not None and "shear_area" in s1 else None,
        depth=s1.get("depth"), weight=weight, area=s1.get("A"),
        section_modulus=_section_modulus(s1), length=length)
    if (taper.EA is None) != ("A" not in s0):
        raise reader.err(where + ".section", "both sections of a tapered beam need A, or "
                         "neither (axially rigid)")
    return names[0], taper


def _section_modulus(sec: dict | None) -> float | None:
    """Elastic section modulus (m^3): the section's S, else I / (depth / 2)."""
    if not sec:
        return None
    if "S" in sec:
        return sec["S"]
    if "I" in sec and "depth" in sec:
        return sec["I"] / (0.5 * sec["depth"])
    return None


def _acts(reader: CaseReader, spec: dict, where: str) -> str:
    """How a bar may act: "both" (default), "tension" or "compression"."""
    acts = spec.get("acts", "both")
    if acts not in ("both", "tension", "compression"):
        raise reader.err(where + ".acts", 'expected "tension" (a tie, rod or cable that goes '
                         'slack rather than push), "compression" (a strut that lifts off '
                         f'rather than pull) or "both" (the default), got {shown(acts)}')
    return acts


def _stiffnesses(reader: CaseReader, kind: str, spec: dict, where: str, mat: dict | None,
                 sec: dict | None, sec_id: Any) -> tuple[float | None, float | None]:
    """(EA, EI) of one member in SI: its own EA / EI, else E of its material times A / I of
    its section; a beam needs EI, a bar EA."""
    E = mat.get("E") if mat else None
    EA = EI = None
    if "EA" in spec:
        EA = reader.positive(spec["EA"], "axial stiffness", where + ".EA")
    elif sec and "A" in sec:
        if E is None:
            raise reader.err(where, f'needs E: its section "{echo(sec_id)}" gives A but '
                             "no material with E applies (give material, or EA)")
        EA = E * sec["A"]
    if kind == "beam":
        if "EI" in spec:
            EI = reader.positive(spec["EI"], "flexural stiffness", where + ".EI")
        elif sec and "I" in sec:
            if E is None:
                raise reader.err(where, f'needs E: its section "{echo(sec_id)}" gives I '
                                 "but no material with E applies (give material, or EI)")
            EI = E * sec["I"]
        else:
            raise reader.err(where, "a beam needs a flexural stiffness: give EI, or a "
                             "section with I and a material with E")
    elif EA is None:
        raise reader.err(where, "a bar needs an axial stiffness: give EA, or a "
                         "section with A and a material with E")
    return EA, EI


def _pick(reader: CaseReader, pool: dict, ident: Any, what: str, where: str,
          explicit: bool) -> dict | None:
    """The material or section ``ident`` of ``pool`` (None if none applies); ``explicit``
    when the member names it, else it came from ``[defaults]``."""
    if ident is None:
        return None
    if not isinstance(ident, str):
        raise reader.err(f"{where}.{what}", f"expected a {what} name, got {kind_of(ident)}")
    if ident not in pool:
        raise reader.err(f"{where}.{what}" if explicit else f"[defaults] {what}",
                         f'no {what} "{echo(ident)}" in [{what}s]{hint(ident, pool)}')
    return pool[ident]
