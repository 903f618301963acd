"""Read a case file (TOML) into a :class:`~leastwork.model.Structure`.

Quantities are converted once, here, to SI base units. Every problem is raised as a
:class:`~leastwork.errors.CaseError` naming the file, the table and key or id, and what was
expected. See docs/case-format.md for every key.
"""

from __future__ import annotations

import difflib
import math
import re
import tomllib
from dataclasses import dataclass
from pathlib import Path
from typing import Any

from .errors import CaseError
from .model import (
    DEFAULT_CASE,
    DistributedLoad,
    Member,
    Misfit,
    NodalLoad,
    Node,
    PointLoad,
    Restraint,
    Settlement,
    Structure,
    Support,
    TemperatureLoad,
    rotational_nodes,
    scaled_load,
)
from .units import UnitSystem, check_unit, example_for, ureg

__all__ = ["load_case", "loads_case", "CaseRecord", "read_case_record"]

_TABLES = (
    "structure", "parameters", "materials", "sections", "defaults", "nodes", "beams",
    "bars", "supports", "loads", "combinations", "analysis",
)
_ID = re.compile(r"^[A-Za-z_][A-Za-z0-9_]*$|^[0-9]+[A-Za-z0-9_]*$")
_SUPPORT_TYPES = {"fixed": ("x", "y", "rz"), "pinned": ("x", "y"), "roller": ("y",)}
_DIRECTIONS = ("x", "y", "rz")
#: no real quantity is this large in SI units (or, for a stiffness, this small); beyond it
#: the arithmetic of the force method would overflow
_SI_LIMIT = 1e30


def load_case(path: str | Path) -> Structure:
    """Read the case file at ``path``.

    Raises
    ------
    CaseError
        If the file cannot be read or anything in it is wrong.
    """
    p = Path(path)
    try:
        text = p.read_text(encoding="utf-8")
    except FileNotFoundError:
        raise CaseError("no such file", source=str(p)) from None
    except IsADirectoryError:
        raise CaseError("is a folder, expected a case file (.toml)", source=str(p)) from None
    except (OSError, UnicodeDecodeError) as exc:
        raise CaseError(f"cannot be read ({exc})", source=str(p)) from None
    return loads_case(text, source=str(p))


def loads_case(text: str, source: str = "<string>") -> Structure:
    """Read a case from TOML text; ``source`` names it in error messages."""
    return _Reader(_parse_toml(text, source), source).structure()


def _parse_toml(text: str, source: str) -> dict[str, Any]:
    try:
        return tomllib.loads(text)
    except tomllib.TOMLDecodeError as exc:
        raise CaseError(f"not valid TOML: {exc}", source=source) from None


@dataclass(frozen=True)
class CaseRecord:
    """What the reader saw, for a reader that needs more than SI floats (the exact
    arithmetic of :mod:`leastwork.symbolic`).

    Attributes
    ----------
    data : dict
        The parsed TOML.
    fields : dict
        Every quantity field read, as written (a number or a string) with its dimension,
        keyed by its place in the file as error messages name it: ``"[nodes] B[0] (x)"``,
        ``"[materials.steel] E"``, ``"[beams] AB.EI"``, ``"[supports] B.springs.y"``,
        ``"[[loads]] #2.wy"`` (``.wy[0]``/``.wy[1]`` for a [start, end] pair).
    parameters : dict
        Each ``[parameters]`` name with its value as read (a pint quantity).
    """

    data: dict[str, Any]
    fields: dict[str, tuple[Any, str]]
    parameters: dict[str, Any]


def read_case_record(text: str, source: str = "<string>") -> tuple[Structure, CaseRecord]:
    """Read a case from TOML text like :func:`loads_case`, and also return the
    :class:`CaseRecord` of every quantity as written."""
    data = _parse_toml(text, source)
    reader = _Reader(data, source)
    reader.record = {}
    st = reader.structure()
    return st, CaseRecord(data, dict(reader.record), dict(reader._param_val))


def _hint(word: str, choices) -> str:
    close = difflib.get_close_matches(word, list(choices), n=1, cutoff=0.6)
    return f' (did you mean "{close[0]}"?)' if close else ""


class _Reader:
    """One pass over the parsed TOML, with the source and parameters at hand."""

    def __init__(self, data: dict[str, Any], source: str):
        self.data = data
        self.source = source
        self.units = UnitSystem()
        self._param_raw: dict[str, Any] = {}
        self._param_val: dict[str, Any] = {}
        self._param_busy: list[str] = []
        #: where -> (value as written, dimension) of every quantity read, when asked for
        self.record: dict[str, tuple[Any, str]] | None = None
        #: SI value of each quantity string already read, per dimension: a large generated
        #: case repeats the same few strings thousands of times, and the unit parser costs
        #: far more than the lookup (the parameters are fixed for the file, so the same text
        #: always means the same value)
        self._si_cache: dict[tuple[str, str], float] = {}

    # ------------------------------------------------------------------ helpers
    def err(self, where: str, message: str) -> CaseError:
        return CaseError(message, source=self.source, where=where)

    def table(self, name: str, required: bool = False) -> dict[str, Any]:
        value = self.data.get(name)
        if value is None:
            if required:
                raise self.err(f"[{name}]", f"missing table [{name}]; every case needs one")
            return {}
        if not isinstance(value, dict):
            raise self.err(f"[{name}]", f"expected a table [{name}], got {_kind(value)}")
        return value

    def keys_known(self, where: str, entry: dict, allowed: tuple[str, ...]) -> None:
        for key in entry:
            if key not in allowed:
                raise self.err(
                    where,
                    f'unknown key "{key}"{_hint(key, allowed)}; expected one of: '
                    + ", ".join(allowed),
                )

    def ident(self, where: str, name: str, what: str) -> str:
        if not _ID.match(name):
            raise self.err(
                where,
                f'{what} id "{name}" must be letters, digits and underscores only '
                "(no dots, spaces, @ or dashes: they separate names in results)",
            )
        return name

    # --------------------------------------------------------------- quantities
    def quantity(self, value: Any, dimension: str, where: str) -> float:
        """A number in case units, or a string with units / an expression of parameters."""
        if isinstance(value, bool) or not isinstance(value, (int, float, str)):
            raise self.err(
                where, f"expected a {dimension} (a number or a string such as "
                f"{example_for(dimension)}), got {_kind(value)}"
            )
        cached = self._si_cache.get((value, dimension)) if isinstance(value, str) else None
        if cached is not None:
            if self.record is not None:
                self.record[where] = (value, dimension)
            return cached
        if isinstance(value, str):
            q = self._parse_expression(value, where)
        else:
            q = float(value)
        try:
            si = self.units.to_si(q, dimension)
        except ValueError as exc:
            raise self.err(where, str(exc)) from None
        if not math.isfinite(si):
            raise self.err(where, f"expected a finite {dimension}, got {value!r}")
        if abs(si) > _SI_LIMIT:
            raise self.err(where, f"{value!r} is beyond any sensible {dimension} (more than "
                           f"{_SI_LIMIT:g} in SI units); check the value and its units")
        if self.record is not None:
            self.record[where] = (value, dimension)
        if isinstance(value, str):
            self._si_cache[(value, dimension)] = si
        return si

    def positive(self, value: Any, dimension: str, where: str) -> float:
        v = self.quantity(value, dimension, where)
        if v <= 0.0:
            raise self.err(where, f"expected a positive {dimension}, got {value!r}")
        if v < 1.0 / _SI_LIMIT:
            raise self.err(where, f"{value!r} is too small for any real {dimension} (less "
                           f"than {1.0 / _SI_LIMIT:g} in SI units); check the value and its units")
        return v

    def _parse_expression(self, text: str, where: str):
        text_stripped = text.strip()
        if not text_stripped:
            raise self.err(where, "expected a quantity, got an empty string")
        if re.search(r"[\[\]{},;]", text_stripped):
            # the unit parser would silently drop these and read "[-9, -3]" as -3
            raise self.err(where, f'cannot read the quantity "{text}": brackets, braces, commas '
                           "and semicolons are not allowed in a quantity (a [start, end] pair "
                           "is a TOML list of two quantities)")
        names = set(re.findall(r"[A-Za-z_][A-Za-z0-9_]*", text_stripped))
        values = {n: self.parameter(n, where) for n in names if n in self._param_raw}
        reg = ureg()
        try:
            q = reg.parse_expression(text_stripped, **values)
        except Exception as exc:  # pint raises several kinds; tokenizer errors too
            unknown = re.findall(r"'([^']+)' is not defined", str(exc))
            if unknown:
                name = unknown[0]
                hint = _hint(name, self._param_raw)
                raise self.err(
                    where,
                    f'"{text}": "{name}" is neither a parameter nor a unit{hint}',
                ) from None
            if "offset" in str(exc).lower():
                raise self.err(where, f'"{text}": give temperature changes in K '
                               '(e.g. "25 K"), not degC/degF') from None
            raise self.err(where, f'cannot read the quantity "{text}" ({exc.__class__.__name__}: '
                           f"{exc})") from None
        if not hasattr(q, "magnitude"):
            q = reg.Quantity(float(q), "")
        try:
            mag = float(q.magnitude)
        except (TypeError, ValueError):
            raise self.err(where, f'"{text}" is not a single number') from None
        if not math.isfinite(mag):
            raise self.err(where, f'expected a finite value, got "{text}"')
        return q

    def parameter(self, name: str, where: str):
        if name in self._param_val:
            return self._param_val[name]
        if name in self._param_busy:
            chain = " -> ".join([*self._param_busy[self._param_busy.index(name):], name])
            raise self.err(f"[parameters] {name}", f"circular definition: {chain}")
        raw = self._param_raw[name]
        self._param_busy.append(name)
        try:
            if isinstance(raw, bool) or not isinstance(raw, (int, float, str)):
                raise self.err(f"[parameters] {name}",
                               f"expected a number or a quantity string, got {_kind(raw)}")
            if isinstance(raw, str):
                value = self._parse_expression(raw, f"[parameters] {name}")
            else:
                if not math.isfinite(float(raw)):
                    raise self.err(f"[parameters] {name}", f"expected a finite value, got {raw}")
                value = ureg().Quantity(float(raw), "")
        finally:
            self._param_busy.pop()
        self._param_val[name] = value
        return value

    # ------------------------------------------------------------------- tables
    def structure(self) -> Structure:
        for key in self.data:
            if key not in _TABLES:
                raise self.err(f"[{key}]", f"unknown table [{key}]{_hint(key, _TABLES)}; "
                               "expected one of: " + ", ".join(f"[{t}]" for t in _TABLES))
        head = self.table("structure")
        self.keys_known("[structure]", head, ("name", "units", "description"))
        name = head.get("name", Path(self.source).stem)
        if not isinstance(name, str):
            raise self.err("[structure] name", f"expected text, got {_kind(name)}")
        self.units = self._units(head.get("units", {}))
        params = self.table("parameters")
        for pname in params:
            self.ident(f"[parameters] {pname}", pname, "parameter")
        self._param_raw = dict(params)
        for pname in params:
            self.parameter(pname, f"[parameters] {pname}")

        materials = self._materials()
        sections = self._sections()
        defaults = self.table("defaults")
        self.keys_known("[defaults]", defaults, ("material", "section"))
        for key, pool in (("material", materials), ("section", sections)):
            if key in defaults and (not isinstance(defaults[key], str)
                                    or defaults[key] not in pool):
                raise self.err(f"[defaults] {key}", f'no {key} "{defaults[key]}" in [{key}s]'
                               f"{_hint(str(defaults[key]), pool)}")
        nodes = self._nodes()
        self.nodes = nodes
        members = self._members(nodes, materials, sections, defaults)
        self.members = members
        used = {m.start for m in members.values()} | {m.end for m in members.values()}
        supports = self._supports(nodes, used)
        loads, case_order = self._loads(nodes, members, supports, used, materials)
        combinations = self._combinations(loads, case_order)
        redundants, displacements, shear = self._analysis(members)
        if shear:
            for m in members.values():
                if m.is_beam and m.GAs is None:
                    raise self.err(f"[beams] {m.id}", "shear energy is asked ([analysis] "
                                   "shear = true) but this beam has no shear stiffness: give "
                                   "G in its material and shear_area in its section")
        unused = [n for n in nodes if n not in used]
        for n in unused:
            raise self.err(f"[nodes] {n}", f'node "{n}" is not connected to any member')
        return Structure(
            name=name, nodes=nodes, members=members, supports=supports, loads=tuple(loads),
            units=self.units, redundants=redundants, displacements=displacements, shear=shear,
            source=self.source, case_order=tuple(case_order), combinations=combinations,
        )

    def _units(self, spec: Any) -> UnitSystem:
        if not isinstance(spec, dict):
            raise self.err("[structure] units", 'expected { force = "kN", length = "m" }, got '
                           + _kind(spec))
        self.keys_known("[structure] units", spec, ("force", "length"))
        force = spec.get("force", "kN")
        length = spec.get("length", "m")
        for kind, unit in (("force", force), ("length", length)):
            if not isinstance(unit, str):
                raise self.err(f"[structure] units.{kind}", f"expected a unit name, got {_kind(unit)}")
            try:
                check_unit(unit, kind)
            except ValueError as exc:
                raise self.err(f"[structure] units.{kind}", str(exc)) from None
        return UnitSystem(force=force, length=length)

    def _materials(self) -> dict[str, dict[str, float]]:
        out: dict[str, dict[str, float]] = {}
        for mid, spec in self.table("materials").items():
            where = f"[materials.{mid}]"
            if not isinstance(spec, dict):
                raise self.err(where, f"expected a table of E, G, alpha, got {_kind(spec)}")
            self.keys_known(where, spec, ("E", "G", "alpha", "description"))
            mat: dict[str, float] = {}
            for key, dim in (("E", "stress"), ("G", "stress")):
                if key in spec:
                    mat[key] = self.positive(spec[key], dim, f"{where} {key}")
            if "alpha" in spec:
                mat["alpha"] = self.quantity(spec["alpha"], "thermal expansion coefficient",
                                             f"{where} alpha")
            out[mid] = mat
        return out

    def _sections(self) -> dict[str, dict[str, float]]:
        out: dict[str, dict[str, float]] = {}
        dims = {"A": "area", "I": "second moment of area", "depth": "length",
                "shear_area": "area"}
        for sid, spec in self.table("sections").items():
            where = f"[sections.{sid}]"
            if not isinstance(spec, dict):
                raise self.err(where, f"expected a table of A, I, depth, shear_area, got {_kind(spec)}")
            self.keys_known(where, spec, (*dims, "description"))
            out[sid] = {k: self.positive(spec[k], d, f"{where} {k}") for k, d in dims.items()
                        if k in spec}
        return out

    def _nodes(self) -> dict[str, Node]:
        nodes: dict[str, Node] = {}
        table = self.table("nodes", required=True)
        if not table:
            raise self.err("[nodes]", "no nodes; expected lines such as A = [0, 0]")
        seen: dict[tuple[float, float], str] = {}
        for nid, xy in table.items():
            where = f"[nodes] {nid}"
            self.ident(where, nid, "node")
            if not isinstance(xy, list) or len(xy) != 2:
                raise self.err(where, f"expected coordinates [x, y], got {xy!r}")
            x = self.quantity(xy[0], "length", where + "[0] (x)")
            y = self.quantity(xy[1], "length", where + "[1] (y)")
            key = (round(x, 9), round(y, 9))
            if key in seen:
                raise self.err(where, f'same position as node "{seen[key]}"; '
                               "two nodes may not coincide")
            seen[key] = nid
            nodes[nid] = Node(nid, x, y)
        return nodes

    def _members(self, nodes, materials, sections, defaults) -> dict[str, Member]:
        members: dict[str, Member] = {}
        beam_keys = ("nodes", "material", "section", "EI", "EA", "hinges", "description")
        bar_keys = ("nodes", "material", "section", "EA", "description")
        for kind, keys in (("beam", beam_keys), ("bar", bar_keys)):
            table = self.table(kind + "s")
            for mid, spec in table.items():
                where = f"[{kind}s] {mid}"
                self.ident(where, mid, "member")
                if mid in members:
                    raise self.err(where, f'duplicate member id "{mid}": it is also a '
                                   f"{members[mid].kind}; ids must be unique")
                if not isinstance(spec, dict):
                    raise self.err(where, f'expected {{ nodes = ["A", "B"], ... }}, got {_kind(spec)}')
                self.keys_known(where, spec, keys)
                ends = spec.get("nodes")
                if not (isinstance(ends, list) and len(ends) == 2
                        and all(isinstance(e, str) for e in ends)):
                    raise self.err(where + ".nodes", f'expected two node ids ["A", "B"], got {ends!r}')
                for e in ends:
                    if e not in nodes:
                        raise self.err(where + ".nodes", f'unknown node "{e}"{_hint(e, nodes)}')
                if ends[0] == ends[1]:
                    raise self.err(where + ".nodes", "a member needs two different nodes "
                                   "(zero length)")
                a, b = nodes[ends[0]], nodes[ends[1]]
                if math.hypot(b.x - a.x, b.y - a.y) <= 1e-9:
                    raise self.err(where + ".nodes", "zero-length member")
                mat_id = spec.get("material", defaults.get("material"))
                sec_id = spec.get("section", defaults.get("section"))
                mat = self._pick(materials, mat_id, "material", where, "material" in spec)
                sec = self._pick(sections, sec_id, "section", where, "section" in spec)
                E = mat.get("E") if mat else None
                EA = EI = None
                if "EA" in spec:
                    EA = self.positive(spec["EA"], "axial stiffness", where + ".EA")
                elif sec and "A" in sec:
                    if E is None:
                        raise self.err(where, f'needs E: its section "{sec_id}" gives A but '
                                       "no material with E applies (give material, or EA)")
                    EA = E * sec["A"]
                if kind == "beam":
                    if "EI" in spec:
                        EI = self.positive(spec["EI"], "flexural stiffness", where + ".EI")
                    elif sec and "I" in sec:
                        if E is None:
                            raise self.err(where, f'needs E: its section "{sec_id}" gives I '
                                           "but no material with E applies (give material, or EI)")
                        EI = E * sec["I"]
                    else:
                        raise self.err(where, "a beam needs a flexural stiffness: give EI, or a "
                                       "section with I and a material with E")
                elif EA is None:
                    raise self.err(where, "a bar needs an axial stiffness: give EA, or a "
                                   "section with A and a material with E")
                GAs = None
                if mat and "G" in mat and sec and "shear_area" in sec:
                    GAs = mat["G"] * sec["shear_area"]
                hinges = spec.get("hinges", [])
                if kind == "beam":
                    if not isinstance(hinges, list) or not all(h in ("start", "end") for h in hinges):
                        raise self.err(where + ".hinges", 'expected ["start"], ["end"] or '
                                       f'["start", "end"], got {hinges!r}')
                members[mid] = Member(
                    id=mid, kind=kind, start=ends[0], end=ends[1], EA=EA, EI=EI, GAs=GAs,
                    alpha=mat.get("alpha") if mat else None,
                    depth=sec.get("depth") if sec else None,
                    hinge_start="start" in hinges, hinge_end="end" in hinges,
                )
        if not members:
            raise self.err("[beams]/[bars]", "no members; expected a [beams] or [bars] table")
        return members

    def _pick(self, pool, ident, what, where, explicit):
        if ident is None:
            return None
        if not isinstance(ident, str):
            raise self.err(f"{where}.{what}", f"expected a {what} name, got {_kind(ident)}")
        if ident not in pool:
            raise self.err(f"{where}.{what}" if explicit else f"[defaults] {what}",
                           f'no {what} "{ident}" in [{what}s]{_hint(ident, pool)}')
        return pool[ident]

    def _supports(self, nodes, used) -> dict[str, Support]:
        supports: dict[str, Support] = {}
        for nid, spec in self.table("supports").items():
            where = f"[supports] {nid}"
            if nid not in nodes:
                raise self.err(where, f'unknown node "{nid}"{_hint(nid, nodes)}')
            if isinstance(spec, str):
                spec = {"type": spec}
            if not isinstance(spec, dict):
                raise self.err(where, 'expected "fixed", "pinned", "roller" or a table such as '
                               '{ restrain = ["x", "y"] }, got ' + _kind(spec))
            self.keys_known(where, spec, ("type", "restrain", "springs", "surface_angle"))
            rigid: list[str] = []
            if "type" in spec:
                kind = spec["type"]
                if not isinstance(kind, str) or kind not in _SUPPORT_TYPES:
                    raise self.err(where, f'unknown support type "{kind}"'
                                   f'{_hint(str(kind), _SUPPORT_TYPES)}; expected fixed, pinned or roller')
                rigid = list(_SUPPORT_TYPES[kind])
            if "restrain" in spec:
                if "type" in spec:
                    raise self.err(where, "give either type or restrain, not both")
                dirs = spec["restrain"]
                if not isinstance(dirs, list) or not all(d in _DIRECTIONS for d in dirs):
                    raise self.err(where + ".restrain", 'expected a list of "x", "y", "rz", '
                                   f"got {dirs!r}")
                if len(set(dirs)) != len(dirs):
                    raise self.err(where + ".restrain", f"a direction is named twice: {dirs!r}")
                rigid = list(dirs)
            angle = None
            restraints: list[Restraint] = []
            if "surface_angle" in spec:
                if spec.get("type") != "roller":
                    raise self.err(where + ".surface_angle", 'only a roller (type = "roller") '
                                   "takes a rolling-surface angle")
                angle = self.quantity(spec["surface_angle"], "angle", where + ".surface_angle")
                restraints.append(Restraint(nid, "n", (-math.sin(angle), math.cos(angle), 0.0)))
                rigid = []
            for d in rigid:
                restraints.append(Restraint(nid, d, _unit_vector(d)))
            springs = spec.get("springs", {})
            if not isinstance(springs, dict):
                raise self.err(where + ".springs", 'expected { y = "8000 kN/m" }, got ' + _kind(springs))
            for d, k in springs.items():
                if d not in _DIRECTIONS:
                    raise self.err(where + ".springs", f'unknown direction "{d}"; expected x, y or rz')
                if d in rigid:
                    raise self.err(where + ".springs", f'direction "{d}" is both rigid and a spring')
                dim = "rotational stiffness" if d == "rz" else "force/length"
                stiff = self.positive(k, dim, f"{where}.springs.{d}")
                restraints.append(Restraint(nid, d, _unit_vector(d), stiff))
            if not restraints:
                raise self.err(where, "restrains nothing; give a type, restrain or springs")
            supports[nid] = Support(nid, tuple(restraints), angle)
        if not supports:
            raise self.err("[supports]", "no supports: a structure needs at least one")
        return supports

    def _loads(self, nodes, members, supports, used, materials):
        entries = self.data.get("loads", [])
        if not isinstance(entries, list):
            raise self.err("[[loads]]", "expected an array of tables ([[loads]] entries)")
        loads = []
        order: list[str] = []
        for i, spec in enumerate(entries, start=1):
            where = f"[[loads]] #{i}"
            if not isinstance(spec, dict):
                raise self.err(where, f"expected a table, got {_kind(spec)}")
            case = spec.get("case", DEFAULT_CASE)
            if not isinstance(case, str) or not case.strip():
                raise self.err(where + ".case", f"expected a load case name, got {case!r}")
            targets = [k for k in ("node", "member", "settlement") if k in spec]
            if len(targets) != 1:
                raise self.err(where, "each load needs exactly one of node, member or settlement"
                               + (f" (found {', '.join(targets)})" if targets else ""))
            if "node" in spec:
                load = self._nodal_load(spec, where, nodes, used, case)
            elif "settlement" in spec:
                load = self._settlement(spec, where, supports, case)
            else:
                load = self._member_load(spec, where, members, case)
            loads.append(load)
            if case not in order:
                order.append(case)
        return loads, order or [DEFAULT_CASE]

    def _nodal_load(self, spec, where, nodes, used, case):
        self.keys_known(where, spec, ("node", "fx", "fy", "mz", "case"))
        nid = spec["node"]
        if not isinstance(nid, str) or nid not in nodes:
            raise self.err(where + ".node", f'unknown node "{nid}"{_hint(str(nid), nodes)}')
        if not any(k in spec for k in ("fx", "fy", "mz")):
            raise self.err(where, "a nodal load needs fx, fy or mz")
        return NodalLoad(
            nid,
            fx=self.quantity(spec.get("fx", 0.0), "force", where + ".fx"),
            fy=self.quantity(spec.get("fy", 0.0), "force", where + ".fy"),
            mz=self.quantity(spec.get("mz", 0.0), "moment", where + ".mz"),
            case=case,
        )

    def _settlement(self, spec, where, supports, case):
        self.keys_known(where, spec, ("settlement", "dx", "dy", "drz", "dn", "case"))
        nid = spec["settlement"]
        if not isinstance(nid, str) or nid not in supports:
            raise self.err(where + ".settlement", f'"{nid}" is not a support; settlement '
                           f"needs a node listed in [supports]{_hint(str(nid), supports)}")
        values = []
        rigid = {r.direction for r in supports[nid].restraints if not r.is_spring}
        springs = {r.direction for r in supports[nid].restraints if r.is_spring}
        for key in ("dx", "dy", "drz", "dn"):
            if key not in spec:
                continue
            d = key[1:]
            dim = "angle" if d == "rz" else "length"
            v = self.quantity(spec[key], dim, f"{where}.{key}")
            if d not in rigid:
                what = "is a spring" if d in springs else "is not restrained"
                raise self.err(f"{where}.{key}", f'direction "{d}" of support "{nid}" {what}; '
                               "a settlement needs a rigidly restrained direction "
                               f"(restrained: {', '.join(sorted(rigid)) or 'none'})")
            if d == "rz" and nid not in rotational_nodes(self.members.values()):
                raise self.err(f"{where}.{key}", f'node "{nid}" has no rotation of its own '
                               "(only bars or hinged beam ends meet there), so a rotation "
                               "settlement of its support would act on nothing")
            values.append((d, v))
        if not values:
            raise self.err(where, "a settlement needs dx, dy or drz")
        return Settlement(nid, tuple(values), case)

    def _member_load(self, spec, where, members, case):
        mid = spec["member"]
        if not isinstance(mid, str) or mid not in members:
            raise self.err(where + ".member", f'unknown member "{mid}"{_hint(str(mid), members)}')
        member = members[mid]
        L = _length_of(self, member)
        kinds = [k for k in ("at", "wx", "wy", "temperature", "misfit") if k in spec]
        if "temperature" in spec:
            self.keys_known(where, spec, ("member", "temperature", "case"))
            return self._temperature(spec["temperature"], where + ".temperature", member, case)
        if "misfit" in spec:
            self.keys_known(where, spec, ("member", "misfit", "case"))
            e = self.quantity(spec["misfit"], "length", where + ".misfit")
            if abs(e) >= 0.5 * L:
                raise self.err(where + ".misfit", f"misfit {spec['misfit']!r} is not small "
                               "beside the member length; this tool assumes small displacements")
            return Misfit(mid, e, case)
        if member.kind == "bar":
            raise self.err(where, f'"{mid}" is a bar: it carries axial force only and takes no '
                           "span loads; load its nodes, or make it a beam")
        if "at" in spec:
            self.keys_known(where, spec, ("member", "at", "fx", "fy", "mz", "case"))
            at = self.quantity(spec["at"], "length", where + ".at")
            if at < -1e-12 or at > L * (1 + 1e-12):
                raise self.err(where + ".at", f"position {spec['at']!r} is off the member "
                               f"(its length is {L / self.units.factor('length'):g} "
                               f"{self.units.length}); expected 0 to the length")
            if not any(k in spec for k in ("fx", "fy", "mz")):
                raise self.err(where, "a concentrated member load needs fx, fy or mz")
            return PointLoad(
                mid, min(max(at, 0.0), L),
                fx=self.quantity(spec.get("fx", 0.0), "force", where + ".fx"),
                fy=self.quantity(spec.get("fy", 0.0), "force", where + ".fy"),
                mz=self.quantity(spec.get("mz", 0.0), "moment", where + ".mz"),
                case=case,
            )
        if "wx" in spec or "wy" in spec:
            self.keys_known(where, spec, ("member", "wx", "wy", "from", "to", "case"))
            start = self.quantity(spec.get("from", 0.0), "length", where + ".from")
            end = self.quantity(spec["to"], "length", where + ".to") if "to" in spec else L
            if start < -1e-12 or end > L * (1 + 1e-12) or end <= start:
                raise self.err(where, f"from/to must satisfy 0 <= from < to <= length "
                               f"({L / self.units.factor('length'):g} {self.units.length})")
            return DistributedLoad(
                mid,
                wx=self._intensity(spec.get("wx", 0.0), where + ".wx"),
                wy=self._intensity(spec.get("wy", 0.0), where + ".wy"),
                start=max(start, 0.0), end=min(end, L), case=case,
            )
        raise self.err(where, "a member load needs at (with fx/fy/mz), wx/wy, temperature or "
                       f"misfit{' (found ' + ', '.join(kinds) + ')' if kinds else ''}; "
                       f"keys given: {', '.join(spec)}"
                       + (_hint_keys(spec)))

    def _intensity(self, value, where):
        if isinstance(value, list):
            if len(value) != 2:
                raise self.err(where, f"expected one value or a [start, end] pair, got {value!r}")
            return (self.quantity(value[0], "force/length", where + "[0]"),
                    self.quantity(value[1], "force/length", where + "[1]"))
        v = self.quantity(value, "force/length", where)
        return (v, v)

    def _temperature(self, spec, where, member, case):
        if not isinstance(spec, dict):
            raise self.err(where, 'expected { uniform = "25 K", gradient = "10 K" }, got '
                           + _kind(spec))
        self.keys_known(where, spec, ("uniform", "gradient"))
        if not spec:
            raise self.err(where, "needs uniform and/or gradient")
        uniform = self.quantity(spec.get("uniform", 0.0), "temperature difference", where + ".uniform")
        gradient = self.quantity(spec.get("gradient", 0.0), "temperature difference", where + ".gradient")
        if member.alpha is None and (uniform or gradient):
            raise self.err(where, f'member "{member.id}" has no thermal expansion coefficient: '
                           "give alpha in its material")
        if member.alpha is not None:
            for key, dT in (("uniform", uniform), ("gradient", gradient)):
                if abs(member.alpha * dT) >= 0.01:
                    raise self.err(f"{where}.{key}", f'thermal strain alpha*dT = '
                                   f'{member.alpha * dT:.3g} on member "{member.id}" is not '
                                   "small (1% or more); check alpha in its material and the "
                                   "temperature change: this tool assumes small displacements")
        if gradient:
            if member.kind == "bar":
                raise self.err(where + ".gradient", f'"{member.id}" is a bar; a temperature '
                               "gradient bends, so it applies to beams only")
            if member.depth is None:
                raise self.err(where + ".gradient", f'member "{member.id}" has no section '
                               "depth: give depth in its section for a temperature gradient")
        return TemperatureLoad(member.id, uniform, gradient, case)

    def _combinations(self, loads: list, case_order: list) -> tuple:
        """``[combinations]``: NAME = { CASE = factor, ... }. Each combination's factored
        loads are appended to ``loads`` under its name (and the name to ``case_order``), so
        that it solves like a load case."""
        spec = self.table("combinations")
        out = []
        cases = list(case_order)
        for name, parts in spec.items():
            where = f"[combinations] {name}"
            if not _ID.match(name):
                raise self.err(where, "a combination name is made of letters, digits and _")
            if name in cases:
                raise self.err(where, f'"{name}" is already the name of a load case')
            if not isinstance(parts, dict) or not parts:
                raise self.err(where, 'expected { CASE = factor, ... }, e.g. '
                               '{ dead = 1.35, live = 1.5 }, got ' + _kind(parts))
            factors = []
            for case, value in parts.items():
                if case not in cases:
                    raise self.err(f"{where}.{case}", f'no load case "{case}"'
                                   f"{_hint(case, cases)}; the cases are: " + ", ".join(cases))
                factors.append((case, self.quantity(value, "number", f"{where}.{case}")))
            for case, f in factors:
                loads.extend(scaled_load(ld, f, name) for ld in list(loads) if ld.case == case)
            case_order.append(name)
            out.append((name, tuple(factors)))
        return tuple(out)

    def _analysis(self, members):
        spec = self.table("analysis")
        self.keys_known("[analysis]", spec, ("redundants", "displacements", "shear"))
        redundants = spec.get("redundants")
        if redundants is not None:
            if not isinstance(redundants, list) or not all(isinstance(r, str) for r in redundants):
                raise self.err("[analysis] redundants", f'expected a list of names such as '
                               f'["C.y", "BC"], got {redundants!r}')
            redundants = tuple(redundants)
        disp = spec.get("displacements", [])
        if not isinstance(disp, list) or not all(isinstance(r, str) for r in disp):
            raise self.err("[analysis] displacements", 'expected a list such as ["B.y", '
                           f'"A.rz"], got {disp!r}')
        shear = spec.get("shear", False)
        if not isinstance(shear, bool):
            raise self.err("[analysis] shear", f"expected true or false, got {shear!r}")
        return redundants, tuple(disp), shear


def _hint_keys(spec) -> str:
    for key in spec:
        if key not in ("member", "case"):
            h = _hint(key, ("at", "wx", "wy", "temperature", "misfit", "fx", "fy", "mz", "from", "to"))
            if h:
                return f' — "{key}"{h}'
    return ""


def _length_of(reader: _Reader, member: Member) -> float:
    a, b = reader.nodes[member.start], reader.nodes[member.end]
    return math.hypot(b.x - a.x, b.y - a.y)


def _unit_vector(d: str) -> tuple[float, float, float]:
    return {"x": (1.0, 0.0, 0.0), "y": (0.0, 1.0, 0.0), "rz": (0.0, 0.0, 1.0)}[d]


def _kind(value: Any) -> str:
    if isinstance(value, bool):
        return f"{str(value).lower()} (a boolean)"
    if isinstance(value, dict):
        return "a table"
    if isinstance(value, list):
        return f"a list {value!r}"
    if isinstance(value, str):
        return f'"{value}" (text)'
    return repr(value)

