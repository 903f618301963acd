"""Read a case file (TOML) into a :class:`~leastwork.model.Structure`: the pass over its
tables, and the tables of the whole case ([structure], its units, [parameters],
[materials], [sections], [defaults], [nodes]).

Quantities are converted once, here, to SI base units. Every problem is raised as a
:class:`~leastwork.errors.CaseError` naming the file, the table and key or id, and what was
expected. See docs/case-format.md for every key.
"""

from __future__ import annotations

from pathlib import Path
from typing import Any

from ..model import Node, Structure
from ..model.units import OUTPUT_QUANTITIES, STANDARD_GRAVITY, UnitSystem, check_unit
from .analysis import check_shear, read_analysis
from .core import CaseReader
from .files import parse_toml, read_case_text
from .loads import read_combinations, read_loads
from .members import connected_nodes, member_specs, read_members
from .messages import echo, hint, kind_of, shown
from .patterns import read_envelopes, read_patterns
from .quantities import SI_LIMIT
from .supports import read_supports

__all__ = ["load_case", "loads_case", "read_structure", "structure"]

_TABLES = (
    "structure", "parameters", "materials", "sections", "defaults", "nodes", "beams",
    "bars", "supports", "loads", "combinations", "analysis", "patterns", "envelopes",
    "project",
)

#: ``[project]`` keys: the calculation sheet's title block (all optional, free text).
PROJECT_KEYS = ("title", "job", "client", "by", "checked", "revision")
#: Longest text of a ``[project]`` entry.
PROJECT_TEXT_LIMIT = 200


def load_case(path: str | Path) -> Structure:
    """Read the case file at ``path``.

    Raises
    ------
    CaseError
        If the file cannot be read or anything in it is wrong.
    """
    p = Path(path)
    return loads_case(read_case_text(p), source=str(p))


def loads_case(text: str, source: str = "<string>") -> Structure:
    """Read a case from TOML text; ``source`` names it in error messages."""
    return read_structure(CaseReader(parse_toml(text, source), source))


def structure(source: str = "<python>", **tables) -> Structure:
    """A structure built in code: each keyword is a table of a case file, with the same
    keys, units and checks (docs/case-format.md); ``loads`` is the list of ``[[loads]]``
    entries. A bad value is a CaseError naming the table and key.

    Parameters
    ----------
    source : str
        Its name in messages.
    **tables
        ``structure``, ``parameters``, ``materials``, ``sections``, ``defaults``, ``nodes``,
        ``beams``, ``bars``, ``supports``, ``loads``, ``combinations``, ``analysis``...

    Examples
    --------
    >>> import leastwork
    >>> st = leastwork.structure(
    ...     structure={"name": "lintel", "units": {"force": "kN", "length": "m"}},
    ...     nodes={"A": [0, 0], "B": [4.8, 0]},
    ...     beams={"AB": {"nodes": ["A", "B"], "EI": "8500 kN*m^2"}},
    ...     supports={"A": "fixed", "B": "roller"},
    ...     loads=[{"member": "AB", "wy": "-14 kN/m"}])
    >>> sol = leastwork.solve(st)
    >>> round(sol.reaction("B", "y"), 6)  # 3wL/8
    25.2
    """
    return read_structure(CaseReader(dict(tables), source))


def read_structure(reader: CaseReader) -> Structure:
    """The structure of the parsed case ``reader.data``, every table checked (a case whose
    nodes have three coordinates is a space structure: :mod:`leastwork.space`)."""
    from ..space.reader import is_space_case, read_space

    if is_space_case(reader.data):
        return read_space(reader)  # type: ignore[return-value]
    name = _head(reader)
    # the checks that read no quantity first: a large case with a wrong id or a stray
    # node is refused before its values are read
    node_table = _node_table(reader)
    specs = member_specs(reader, node_table)
    connected_nodes(reader, node_table, specs)
    materials = _materials(reader)
    sections = _sections(reader)
    defaults = _defaults(reader, materials, sections)
    nodes = _nodes(reader, node_table)
    reader.nodes = nodes
    members = read_members(reader, specs, nodes, materials, sections, defaults)
    reader.members = members
    supports = read_supports(reader, nodes)
    loads, case_order = read_loads(reader, nodes, members, supports)
    patterns = read_patterns(reader, members, loads, case_order)
    variants: dict[str, list[str]] = {}
    combinations = read_combinations(reader, loads, case_order, dict(patterns), variants)
    groups = read_envelopes(reader, combinations, variants)
    redundants, displacements, shear, limits = read_analysis(reader)
    if shear:
        check_shear(reader, members)
    return Structure(
        name=name, nodes=nodes, members=members, supports=supports, loads=tuple(loads),
        units=reader.units, redundants=redundants, displacements=displacements, shear=shear,
        source=reader.source, case_order=tuple(case_order), combinations=combinations,
        deflection_limits=limits,
        patterns=patterns, envelope_groups=groups, project=_project(reader),
    )


def _head(reader: CaseReader) -> str:
    """The tables known, ``[structure]`` (its name, returned, and its units, set on the
    reader) and ``[parameters]`` (every one read)."""
    for key in reader.data:
        if key not in _TABLES:
            raise reader.err(f"[{key}]", f"unknown table [{echo(key)}]{hint(key, _TABLES)}; "
                             "expected one of: " + ", ".join(f"[{t}]" for t in _TABLES))
    head = reader.table("structure")
    reader.keys_known("[structure]", head, ("name", "units", "description"))
    name = head.get("name", Path(reader.source).stem)
    if not isinstance(name, str):
        raise reader.err("[structure] name", f"expected text, got {kind_of(name)}")
    reader.units = _units(reader, head.get("units", {}))
    params = reader.table("parameters")
    for pname in params:
        reader.ident(f"[parameters] {pname}", pname, "parameter")
    reader.define_parameters(params)
    return name


def _project(reader: CaseReader) -> tuple[tuple[str, str], ...]:
    """``[project]``: title, job, client, by, checked, revision as one-line texts (a number
    such as revision = 2 is read as its text), in that order."""
    table = reader.table("project")  # a table (refused otherwise by reader.table)
    reader.keys_known("[project]", table, PROJECT_KEYS)
    out = []
    for key in PROJECT_KEYS:
        if key not in table:
            continue
        value = table[key]
        if isinstance(value, bool) or not isinstance(value, (str, int)):
            raise reader.err(f"[project] {key}", f"expected text, got {kind_of(value)}")
        text = " ".join(str(value).split())
        if len(text) > PROJECT_TEXT_LIMIT:
            raise reader.err(f"[project] {key}", f"expected at most {PROJECT_TEXT_LIMIT} "
                             f"characters, got {len(text)}")
        if text:
            out.append((key, text))
    return tuple(out)


def _units(reader: CaseReader, spec: Any) -> UnitSystem:
    """``[structure] units``: the force and length units of the case (bare numbers are
    read in them), and the output units named for displacement, moment, distributed and
    stress (docs/case-format.md)."""
    if not isinstance(spec, dict):
        raise reader.err("[structure] units", 'expected { force = "kN", length = "m" }, got '
                         + kind_of(spec))
    reader.keys_known("[structure] units", spec, ("force", "length", *OUTPUT_QUANTITIES))
    force = spec.get("force", "kN")
    length = spec.get("length", "m")
    named = {q: spec[q] for q in OUTPUT_QUANTITIES if q in spec}
    for kind, unit in (("force", force), ("length", length), *named.items()):
        if not isinstance(unit, str):
            raise reader.err(f"[structure] units.{kind}", f"expected a unit name, got {kind_of(unit)}")
        try:
            check_unit(unit, kind)
        except ValueError as exc:
            raise reader.err(f"[structure] units.{kind}", str(exc)) from None
    return UnitSystem(force=force, length=length).with_units(**named)


def _materials(reader: CaseReader) -> dict[str, dict[str, float]]:
    """``[materials]``: E, G (Pa) and alpha (1/K) of each material."""
    out: dict[str, dict[str, float]] = {}
    for mid, spec in reader.table("materials").items():
        where = f"[materials.{mid}]"
        if not isinstance(spec, dict):
            raise reader.err(where, f"expected a table of E, G, alpha, got {kind_of(spec)}")
        reader.keys_known(where, spec, ("E", "G", "alpha", "density", "description"))
        mat: dict[str, float] = {}
        for key, dim in (("E", "stress"), ("G", "stress")):
            if key in spec:
                mat[key] = reader.positive(spec[key], dim, f"{where} {key}")
        if "alpha" in spec:
            mat["alpha"] = reader.quantity(spec["alpha"], "thermal expansion coefficient",
                                           f"{where} alpha")
        if "density" in spec:
            mat["unit_weight"] = unit_weight(reader, spec["density"], f"{where} density")
        out[mid] = mat
    return out


def unit_weight(reader: CaseReader, value: Any, where: str) -> float:
    """Weight per unit volume (N/m^3) from a mass density ("7850 kg/m^3", times standard
    gravity 9.80665 m/s^2) or a unit weight ("77 kN/m^3"). A bare number is refused: it
    could be either."""
    q = reader.expression(value, where) if isinstance(value, str) else None
    if q is None or q.dimensionless:
        raise reader.err(where, 'expected a density with its units, e.g. "7850 kg/m^3" or '
                         f'a unit weight such as "77 kN/m^3", got {shown(value)}')
    if q.check("[mass] / [length] ** 3"):
        si = float(q.to("kg/m^3").magnitude) * STANDARD_GRAVITY
        if not 1.0 / SI_LIMIT < si < SI_LIMIT:
            raise reader.err(where, f"expected a positive density of a real material, got "
                             f"{shown(value)}")
        return si
    if not q.check("[mass] / [length] ** 2 / [time] ** 2"):
        raise reader.err(where, 'expected a mass density such as "7850 kg/m^3" or a unit '
                         f'weight such as "77 kN/m^3", got {shown(value)}')
    return reader.positive(value, "unit weight", where)


def _sections(reader: CaseReader) -> dict[str, dict[str, float]]:
    """``[sections]``: A, I, depth and shear_area of each section (SI)."""
    out: dict[str, dict[str, float]] = {}
    dims = {"A": "area", "I": "second moment of area", "depth": "length",
            "shear_area": "area", "S": "section modulus"}
    for sid, spec in reader.table("sections").items():
        where = f"[sections.{sid}]"
        if not isinstance(spec, dict):
            raise reader.err(where, f"expected a table of A, I, depth, shear_area, got {kind_of(spec)}")
        reader.keys_known(where, spec, (*dims, "description"))
        out[sid] = {k: reader.positive(spec[k], d, f"{where} {k}") for k, d in dims.items()
                    if k in spec}
    return out


def _defaults(reader: CaseReader, materials: dict, sections: dict) -> dict[str, Any]:
    """``[defaults]``: the material and section of a member that names none."""
    defaults = reader.table("defaults")
    reader.keys_known("[defaults]", defaults, ("material", "section"))
    for key, pool in (("material", materials), ("section", sections)):
        if key in defaults and (not isinstance(defaults[key], str)
                                or defaults[key] not in pool):
            raise reader.err(f"[defaults] {key}", f'no {key} "{echo(defaults[key])}" in [{key}s]'
                             f"{hint(str(defaults[key]), pool)}")
    return defaults


def _node_table(reader: CaseReader) -> dict[str, Any]:
    """``[nodes]`` checked without reading a coordinate: ids, and [x, y] pairs."""
    table = reader.table("nodes", required=True)
    if not table:
        raise reader.err("[nodes]", "no nodes; expected lines such as A = [0, 0]")
    for nid, xy in table.items():
        where = f"[nodes] {nid}"
        reader.ident(where, nid, "node")
        if not isinstance(xy, list) or len(xy) != 2:
            raise reader.err(where, f"expected coordinates [x, y], got {shown(xy)}")
    return table


def _nodes(reader: CaseReader, table: dict[str, Any]) -> dict[str, Node]:
    """The nodes of ``table`` (checked by :func:`_node_table`) at their coordinates."""
    nodes: dict[str, Node] = {}
    seen: dict[tuple[float, float], str] = {}
    for nid, xy in table.items():
        where = f"[nodes] {nid}"
        x = reader.quantity(xy[0], "length", where + "[0] (x)")
        y = reader.quantity(xy[1], "length", where + "[1] (y)")
        key = (round(x, 9), round(y, 9))
        if key in seen:
            raise reader.err(where, f'same position as node "{echo(seen[key])}"; '
                             "two nodes may not coincide")
        seen[key] = nid
        nodes[nid] = Node(nid, x, y)
    return nodes
