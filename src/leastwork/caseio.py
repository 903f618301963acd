"""Read a case file (TOML) into a :class:`~leastwork.model.Structure`.

Quantities are converted once, here, to SI base units. Every problem is raised as a
:class:`~leastwork.errors.CaseError` naming the file, the table and key or id, and what was
expected. See docs/case-format.md for every key.
"""

from __future__ import annotations

import difflib
import math
import os
import re
import reprlib
import stat
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
from .plaintext import ECHO_LIMIT, literal
from .units import (
    QUANTITY_LIMIT,
    QuantityError,
    UnitSystem,
    _has_angle,
    check_unit,
    example_for,
    parse_quantity,
    ureg,
)

__all__ = ["load_case", "loads_case", "read_case_text", "CaseRecord", "read_case_record",
           "CASE_FILE_LIMIT", "NESTING_LIMIT"]

#: Largest case file read (bytes): 32 MiB, twice the largest generated benchmark case
#: (16.7 MB: a continuous beam of 102,399 members, benchmarks/generators.py). The TOML
#: parser alone takes about 15 s and 1 GB for a file of this size.
CASE_FILE_LIMIT = 32 * 2 ** 20
#: Deepest nesting of arrays and inline tables read (``A = [0, 0]`` is 1, a member's
#: ``{ nodes = ["A", "B"] }`` 2; a table header counts as its brackets, ``[[loads]]`` 2).
NESTING_LIMIT = 16
#: Most quantity strings of one case read by the full expression parser (about 0.3 ms
#: each): distinct strings other than a plain "NUMBER UNIT" ("2.5 m", "24000 kN*m^2"), which
#: are read at a small part of that cost, and other than repeats, which are read once.
EXPRESSION_LIMIT = 10_000
#: Longest chain of parameters defined through each other (a = "2*b", b = "c + 1 m", ...).
PARAMETER_CHAIN_LIMIT = 50
#: A plain "NUMBER UNIT" quantity string, read without the general parser (see _Reader._simple)
_UNIT = r"[^\W\d]\w*(?:\s*(?:\*\*|\^)\s*[1-9])?"
_SIMPLE = re.compile(r"\s*([-+]?(?:(?:0|[1-9]\d*)(?:\.\d*)?|\.\d+)(?:[eE][-+]?\d+)?)\s*"
                     rf"({_UNIT}(?:\s*[*/]\s*{_UNIT})*)\s*")
_NAME = re.compile(r"[^\W\d]\w*")
_UNKNOWN = object()

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
    return loads_case(read_case_text(p), source=str(p))


def read_case_text(path: str | Path) -> str:
    """The text of the case file at ``path``, refused unless it is a regular file of at most
    :data:`CASE_FILE_LIMIT` bytes in UTF-8 (a device, a pipe or a huge file would otherwise
    be read until memory runs out).

    Raises
    ------
    CaseError
        If the file cannot be read, is not a regular file or is too large.
    """
    p = Path(path)
    try:
        data = _read_regular_file(p)
    except FileNotFoundError:
        raise CaseError("no such file", source=str(p)) from None
    except IsADirectoryError:
        raise CaseError("is a folder, expected a case file (.toml)", source=str(p)) from None
    except OSError as exc:
        data = exc
    refusal = _refusal(data)
    if refusal is None:
        try:
            return data.decode("utf-8")
        except UnicodeDecodeError as exc:
            refusal = f"cannot be read: it is not UTF-8 text (byte {exc.start + 1})"
    raise CaseError(refusal, source=str(p))


def _read_regular_file(p: Path) -> bytes | int:
    """The bytes of ``p`` (at most CASE_FILE_LIMIT + 1 of them), or its ``st_mode`` if it is
    not a regular file. Opened without blocking, so that a named pipe is refused, not
    waited on."""
    if stat.S_ISDIR(os.stat(p).st_mode):
        raise IsADirectoryError(str(p))
    fd = os.open(p, os.O_RDONLY | getattr(os, "O_NONBLOCK", 0))
    try:
        mode = os.fstat(fd).st_mode
        if not stat.S_ISREG(mode):
            return mode
        with os.fdopen(fd, "rb", closefd=False) as fh:
            return fh.read(CASE_FILE_LIMIT + 1)
    finally:
        os.close(fd)


def _refusal(data: bytes | int | OSError) -> str | None:
    """Why what :func:`_read_regular_file` gave (or the error it raised) is no case file,
    or None."""
    if isinstance(data, OSError):
        return f"cannot be read ({literal(data.strerror or data, ECHO_LIMIT)})"
    if isinstance(data, int):
        kind = ("a device" if stat.S_ISCHR(data) or stat.S_ISBLK(data) else
                "a named pipe" if stat.S_ISFIFO(data) else
                "a socket" if stat.S_ISSOCK(data) else "not a regular file")
        return f"is {kind}, expected a case file (.toml)"
    if len(data) > CASE_FILE_LIMIT:
        return (f"is larger than {CASE_FILE_LIMIT // 2 ** 20} MiB, the most a case file may "
                "have (see docs/case-format.md, Limits)")
    return None


def loads_case(text: str, source: str = "<string>") -> Structure:
    """Read a case from TOML text; ``source`` names it in error messages."""
    return _Reader(_parse_toml(text, source), source).structure()


def _parse_toml(text: str, source: str) -> dict[str, Any]:
    deep = f"arrays or inline tables are nested more than {NESTING_LIMIT} deep; a case " \
        "needs at most 3"
    if _nested_deeper(text, NESTING_LIMIT):  # before the parser, which recurses per level
        raise CaseError(deep, source=source)
    try:
        return tomllib.loads(text)
    except ValueError as exc:  # TOMLDecodeError; also an integer of over 4300 digits
        message = f"not valid TOML: {literal(exc, 200)}"
    except RecursionError:  # nesting hidden from the count by brackets inside strings
        message = deep
    raise CaseError(message, source=source)


#: Every byte but the four brackets deleted, braces made brackets, to count the nesting.
_NOT_BRACKETS = bytes(b for b in range(256) if b not in b"[]{}")
_AS_BRACKETS = bytes.maketrans(b"{}", b"[]")
#: TOML strings (multi-line first) and comments, whose brackets do not nest.
_STRINGS_AND_COMMENTS = re.compile(
    r'"""(?:\\.|[^\\])*?"""|\'\'\'.*?\'\'\'|"(?:\\.|[^"\\\n])*"|\'[^\'\n]*\'|#[^\n]*', re.S)


def _nested_deeper(text: str, limit: int) -> bool:
    """Whether the arrays and inline tables of the TOML ``text`` nest more than ``limit``
    deep (a table header counts as its brackets: ``[nodes]`` 1, ``[[loads]]`` 2). The
    brackets alone are counted first, at the cost of a copy; only if they nest too deep are
    strings and comments (which may hold brackets) taken out and the count made again."""
    if not _brackets_deeper(_brackets(text), limit):
        return False
    return _brackets_deeper(_brackets(_STRINGS_AND_COMMENTS.sub("", text)), limit)


def _brackets(text: str) -> bytes:
    """The brackets and braces of ``text`` in order, braces as brackets."""
    return text.encode("utf-8", "surrogatepass").translate(_AS_BRACKETS, _NOT_BRACKETS)


def _brackets_deeper(brackets: bytes, limit: int) -> bool:
    """Whether more than ``limit`` brackets are open at some point of ``brackets``; read in
    chunks, so that deep nesting is found after the first."""
    if len(brackets) <= limit:
        return False
    import numpy as np

    steps = np.frombuffer(brackets.translate(_AS_STEPS), dtype=np.int8)
    open_before = 0
    for start in range(0, len(steps), _CHUNK):
        depth = np.cumsum(steps[start:start + _CHUNK], dtype=np.int64) + open_before
        if int(depth.max()) > limit:
            return True
        open_before = int(depth[-1])
    return False


#: "[" as +1 and "]" as -1 (a signed byte), to count open brackets.
_AS_STEPS = bytes.maketrans(b"[]", b"\x01\xff")
_CHUNK = 1 << 20


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
    """' (did you mean "X"?)' for the choice closest to ``word``, or ""; none for a long
    word or very many choices (the comparison costs their product)."""
    if len(word) > ECHO_LIMIT or len(choices) > _HINT_CHOICES:
        return ""
    close = difflib.get_close_matches(word, list(choices), n=1, cutoff=0.6)
    return f' (did you mean "{_text(close[0])}"?)' if close else ""


#: Most choices a misspelt name is compared with for a hint.
_HINT_CHOICES = 5000


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
        #: SI factor of one unit per dimension, or None, for :meth:`_simple`
        self._unit_factor: dict[tuple[str, str], float | None] = {}
        #: quantity strings read by the full parser so far (see EXPRESSION_LIMIT)
        self._readings = 0

    # ------------------------------------------------------------------ helpers
    def err(self, where: str, message: str) -> CaseError:
        """The located error; ``where`` may hold ids from the file, so it is shown literally
        and cut."""
        return CaseError(message, source=self.source, where=literal(where, 2 * ECHO_LIMIT))

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
                    f'unknown key "{_text(key)}"{_hint(key, allowed)}; expected one of: '
                    + ", ".join(allowed),
                )

    def ident(self, where: str, name: str, what: str) -> str:
        if not _ID.match(name):
            raise self.err(
                where,
                f'{what} id "{_text(name)}" must be letters, digits and underscores only '
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
        si = self._simple(value, dimension) if isinstance(value, str) else None
        if si is None:
            q = self._parse_expression(value, where) if isinstance(value, str) else _float(value)
            try:
                si = self.units.to_si(q, dimension)
            except (ValueError, ArithmeticError) as exc:
                raise self.err(where, str(exc) if isinstance(exc, ValueError) else
                               f"{_shown(value)}: the conversion to SI units overflows") from None
        if not math.isfinite(si):
            raise self.err(where, f"expected a finite {dimension}, got {_shown(value)}")
        if abs(si) > _SI_LIMIT:
            raise self.err(where, f"{_shown(value)} is beyond any sensible {dimension} (more "
                           f"than {_SI_LIMIT:g} in SI units); check the value and its units")
        if self.record is not None:
            self.record[where] = (value, dimension)
        if isinstance(value, str):
            self._si_cache[(value, dimension)] = si
        return si

    def _simple(self, text: str, dimension: str) -> float | None:
        """The SI value of ``text`` if it is a plain "NUMBER UNIT" (such as "2.5 m"), else
        None. The exact steps of the full reading (pint's number, times the SI factor of
        the unit, one multiplication), at a small part of its cost: a large case repeats a
        few units in many distinct values."""
        m = _SIMPLE.fullmatch(text) if len(text) <= QUANTITY_LIMIT else None
        if m is None:
            return None
        key = (m.group(2), dimension)
        factor = self._unit_factor.get(key, _UNKNOWN)
        if factor is _UNKNOWN:  # first time: a parameter among the names reads in full
            parameter = any(n in self._param_raw for n in _NAME.findall(key[0]))
            factor = None if parameter else self._factor_of(key[0], dimension)
            self._unit_factor[key] = factor
        if factor is None:
            return None
        number = m.group(1)
        try:
            value: float = int(number)  # pint reads an integer as int, anything else as float
        except ValueError:
            value = float(number)
        try:
            return value * factor
        except OverflowError:
            return None

    def _factor_of(self, unit: str, dimension: str) -> float | None:
        """SI value of one ``unit`` in a field of ``dimension`` by the full reading, or None
        if that is not one multiplication (a dimensionless unit, a wrong dimension, a name
        that is no unit: the full reading then gives the value or the message)."""
        if any(n.lower() in ("inf", "infinity", "nan", "dimensionless")
               for n in _NAME.findall(unit)):
            return None
        try:
            q = self._read(f"1 {unit}", "")
            if bool(q.dimensionless) and not _has_angle(q):
                return None
            factor = self.units.to_si(q, dimension)
        except (ValueError, ArithmeticError):
            return None
        return factor if math.isfinite(factor) else None

    def positive(self, value: Any, dimension: str, where: str) -> float:
        v = self.quantity(value, dimension, where)
        if v <= 0.0:
            raise self.err(where, f"expected a positive {dimension}, got {_shown(value)}")
        if v < 1.0 / _SI_LIMIT:
            raise self.err(where, f"{_shown(value)} is too small for any real {dimension} (less "
                           f"than {1.0 / _SI_LIMIT:g} in SI units); check the value and its units")
        return v

    def _parse_expression(self, text: str, where: str):
        text_stripped = text.strip()
        shown = literal(text, ECHO_LIMIT)
        if not text_stripped:
            raise self.err(where, "expected a quantity, got an empty string")
        if re.search(r"[\[\]{},;]", text_stripped):
            # the unit parser would silently drop these and read "[-9, -3]" as -3
            raise self.err(where, f'cannot read the quantity "{shown}": brackets, braces, '
                           "commas and semicolons are not allowed in a quantity (a [start, end] "
                           "pair is a TOML list of two quantities)")
        try:
            q = self._read(text_stripped, where)
        except QuantityError as exc:
            if exc.kind == "unknown":
                hint = _hint(exc.name, self._param_raw)
                raise self.err(where, f'"{shown}": "{literal(exc.name, ECHO_LIMIT)}" is neither '
                               f"a parameter nor a unit{hint}") from None
            if exc.kind == "offset":
                raise self.err(where, f'"{shown}": give temperature changes in K '
                               '(e.g. "25 K"), not degC/degF') from None
            raise self.err(where, f'cannot read the quantity "{shown}": {exc}') from None
        try:
            mag = float(q.magnitude)
        except (TypeError, ValueError, OverflowError) as exc:
            what = ("beyond the floating-point range" if isinstance(exc, OverflowError)
                    else "not a single number")
            raise self.err(where, f'"{shown}" is {what}') from None
        if not math.isfinite(mag):
            raise self.err(where, f'expected a finite value, got "{shown}"')
        return q

    def _read(self, text: str, where: str):
        """:func:`~leastwork.units.parse_quantity` of ``text`` (stripped) with the parameters
        it names, within the case's budget of :data:`EXPRESSION_LIMIT` readings."""
        self._readings += 1
        if self._readings > EXPRESSION_LIMIT:
            raise QuantityError(f"the case has more than {EXPRESSION_LIMIT} distinct quantity "
                                'expressions; write values as a number with units ("2.5 m", '
                                '"24000 kN*m^2") or a plain number')
        values = {}
        if len(text) <= QUANTITY_LIMIT:  # a longer one is refused unread
            names = set(re.findall(r"[A-Za-z_][A-Za-z0-9_]*", text))
            values = {n: self.parameter(n, where) for n in names if n in self._param_raw}
        return parse_quantity(text, **values)

    def parameter(self, name: str, where: str):
        if name in self._param_val:
            return self._param_val[name]
        if name in self._param_busy:
            chain = " -> ".join([*self._param_busy[self._param_busy.index(name):], name])
            raise self.err(f"[parameters] {name}", f"circular definition: {literal(chain, ECHO_LIMIT)}")
        if len(self._param_busy) >= PARAMETER_CHAIN_LIMIT:
            raise self.err(f"[parameters] {name}", "parameters defined through more than "
                           f"{PARAMETER_CHAIN_LIMIT} others in a chain ("
                           f"{literal(' -> '.join(self._param_busy[:3]), ECHO_LIMIT)} ...)")
        raw = self._param_raw[name]
        self._param_busy.append(name)
        try:
            if isinstance(raw, bool) or not isinstance(raw, (int, float, str)):
                raise self.err(f"[parameters] {name}",
                               f"expected a number or a quantity string, got {_kind(raw)}")
            if isinstance(raw, str):
                value = self._parse_expression(raw, f"[parameters] {name}")
            else:
                if not math.isfinite(_float(raw)):
                    raise self.err(f"[parameters] {name}",
                                   f"expected a finite value, got {_shown(raw)}")
                value = ureg().Quantity(float(raw), "")
        finally:
            self._param_busy.pop()
        self._param_val[name] = value
        return value

    # ------------------------------------------------------------------- tables
    def structure(self) -> Structure:
        for key in self.data:
            if key not in _TABLES:
                raise self.err(f"[{key}]", f"unknown table [{_text(key)}]{_hint(key, _TABLES)}; "
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

        # the checks that read no quantity first: a large case with a wrong id or a stray
        # node is refused before its values are read
        node_table = self._node_table()
        specs = self._member_specs(node_table)
        used = self._connected(node_table, specs)
        materials = self._materials()
        sections = self._sections()
        defaults = self.table("defaults")
        self.keys_known("[defaults]", defaults, ("material", "section"))
        for key, pool in (("material", materials), ("section", sections)):
            if key in defaults and (not isinstance(defaults[key], str)
                                    or defaults[key] not in pool):
                raise self.err(f"[defaults] {key}", f'no {key} "{_text(defaults[key])}" in [{key}s]'
                               f"{_hint(str(defaults[key]), pool)}")
        nodes = self._nodes(node_table)
        self.nodes = nodes
        members = self._members(specs, nodes, materials, sections, defaults)
        self.members = members
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

    def _node_table(self) -> dict[str, Any]:
        """``[nodes]`` checked without reading a coordinate: ids, and [x, y] pairs."""
        table = self.table("nodes", required=True)
        if not table:
            raise self.err("[nodes]", "no nodes; expected lines such as A = [0, 0]")
        for nid, xy in table.items():
            where = f"[nodes] {nid}"
            self.ident(where, nid, "node")
            if not isinstance(xy, list) or len(xy) != 2:
                raise self.err(where, f"expected coordinates [x, y], got {_shown(xy)}")
        return table

    def _nodes(self, table: dict[str, Any]) -> dict[str, Node]:
        """The nodes of ``table`` (checked by :meth:`_node_table`) at their coordinates."""
        nodes: dict[str, Node] = {}
        seen: dict[tuple[float, float], str] = {}
        for nid, xy in table.items():
            where = f"[nodes] {nid}"
            x = self.quantity(xy[0], "length", where + "[0] (x)")
            y = self.quantity(xy[1], "length", where + "[1] (y)")
            key = (round(x, 9), round(y, 9))
            if key in seen:
                raise self.err(where, f'same position as node "{_text(seen[key])}"; '
                               "two nodes may not coincide")
            seen[key] = nid
            nodes[nid] = Node(nid, x, y)
        return nodes

    def _member_specs(self, node_ids) -> list[tuple[str, str, dict, list[str]]]:
        """(kind, id, table, end nodes) of every member, checked without reading a quantity:
        ids, keys, and two different, known end nodes."""
        specs: list[tuple[str, str, dict, list[str]]] = []
        kinds: dict[str, str] = {}
        beam_keys = ("nodes", "material", "section", "EI", "EA", "hinges", "description")
        bar_keys = ("nodes", "material", "section", "EA", "description")
        for kind, keys in (("beam", beam_keys), ("bar", bar_keys)):
            table = self.table(kind + "s")
            for mid, spec in table.items():
                where = f"[{kind}s] {mid}"
                self.ident(where, mid, "member")
                if mid in kinds:
                    raise self.err(where, f'duplicate member id "{_text(mid)}": it is also a '
                                   f"{kinds[mid]}; ids must be unique")
                if not isinstance(spec, dict):
                    raise self.err(where, f'expected {{ nodes = ["A", "B"], ... }}, got {_kind(spec)}')
                self.keys_known(where, spec, keys)
                ends = spec.get("nodes")
                if not (isinstance(ends, list) and len(ends) == 2
                        and all(isinstance(e, str) for e in ends)):
                    raise self.err(where + ".nodes", f'expected two node ids ["A", "B"], got {_shown(ends)}')
                for e in ends:
                    if e not in node_ids:
                        raise self.err(where + ".nodes", f'unknown node "{_text(e)}"{_hint(e, node_ids)}')
                if ends[0] == ends[1]:
                    raise self.err(where + ".nodes", "a member needs two different nodes "
                                   "(zero length)")
                kinds[mid] = kind
                specs.append((kind, mid, spec, ends))
        if not specs:
            raise self.err("[beams]/[bars]", "no members; expected a [beams] or [bars] table")
        return specs

    def _connected(self, node_ids, specs) -> set[str]:
        """The nodes on a member; every node must be one."""
        used = {e for _, _, _, ends in specs for e in ends}
        for n in node_ids:
            if n not in used:
                raise self.err(f"[nodes] {n}", f'node "{_text(n)}" is not connected to any member')
        return used

    def _members(self, specs, nodes, materials, sections, defaults) -> dict[str, Member]:
        members: dict[str, Member] = {}
        for kind, mid, spec, ends in specs:
            where = f"[{kind}s] {mid}"
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
                    raise self.err(where, f'needs E: its section "{_text(sec_id)}" gives A but '
                                   "no material with E applies (give material, or EA)")
                EA = E * sec["A"]
            if kind == "beam":
                if "EI" in spec:
                    EI = self.positive(spec["EI"], "flexural stiffness", where + ".EI")
                elif sec and "I" in sec:
                    if E is None:
                        raise self.err(where, f'needs E: its section "{_text(sec_id)}" gives I '
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
                                   f'["start", "end"], got {_shown(hinges)}')
            members[mid] = Member(
                id=mid, kind=kind, start=ends[0], end=ends[1], EA=EA, EI=EI, GAs=GAs,
                alpha=mat.get("alpha") if mat else None,
                depth=sec.get("depth") if sec else None,
                hinge_start="start" in hinges, hinge_end="end" in hinges,
            )
        return members

    def _pick(self, pool, ident, what, where, explicit):
        if ident is None:
            return None
        if not isinstance(ident, str):
            raise self.err(f"{where}.{what}", f"expected a {what} name, got {_kind(ident)}")
        if ident not in pool:
            raise self.err(f"{where}.{what}" if explicit else f"[defaults] {what}",
                           f'no {what} "{_text(ident)}" in [{what}s]{_hint(ident, pool)}')
        return pool[ident]

    def _supports(self, nodes, used) -> dict[str, Support]:
        supports: dict[str, Support] = {}
        for nid, spec in self.table("supports").items():
            where = f"[supports] {nid}"
            if nid not in nodes:
                raise self.err(where, f'unknown node "{_text(nid)}"{_hint(nid, nodes)}')
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
                    raise self.err(where, f'unknown support type "{_text(kind)}"'
                                   f'{_hint(str(kind), _SUPPORT_TYPES)}; expected fixed, pinned or roller')
                rigid = list(_SUPPORT_TYPES[kind])
            if "restrain" in spec:
                if "type" in spec:
                    raise self.err(where, "give either type or restrain, not both")
                dirs = spec["restrain"]
                if not isinstance(dirs, list) or not all(d in _DIRECTIONS for d in dirs):
                    raise self.err(where + ".restrain", 'expected a list of "x", "y", "rz", '
                                   f"got {_shown(dirs)}")
                if len(set(dirs)) != len(dirs):
                    raise self.err(where + ".restrain", f"a direction is named twice: {_shown(dirs)}")
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
                    raise self.err(where + ".springs", f'unknown direction "{_text(d)}"; expected x, y or rz')
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
                raise self.err(where + ".case", f"expected a load case name, got {_shown(case)}")
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
            raise self.err(where + ".node", f'unknown node "{_text(nid)}"{_hint(str(nid), nodes)}')
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
            raise self.err(where + ".settlement", f'"{_text(nid)}" is not a support; settlement '
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
                raise self.err(f"{where}.{key}", f'direction "{d}" of support "{_text(nid)}" {what}; '
                               "a settlement needs a rigidly restrained direction "
                               f"(restrained: {', '.join(sorted(rigid)) or 'none'})")
            if d == "rz" and nid not in rotational_nodes(self.members.values()):
                raise self.err(f"{where}.{key}", f'node "{_text(nid)}" has no rotation of its own '
                               "(only bars or hinged beam ends meet there), so a rotation "
                               "settlement of its support would act on nothing")
            values.append((d, v))
        if not values:
            raise self.err(where, "a settlement needs dx, dy or drz")
        return Settlement(nid, tuple(values), case)

    def _member_load(self, spec, where, members, case):
        mid = spec["member"]
        if not isinstance(mid, str) or mid not in members:
            raise self.err(where + ".member", f'unknown member "{_text(mid)}"{_hint(str(mid), members)}')
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
                raise self.err(where + ".misfit", f"misfit {_shown(spec['misfit'])} is not small "
                               "beside the member length; this tool assumes small displacements")
            return Misfit(mid, e, case)
        if member.kind == "bar":
            raise self.err(where, f'"{_text(mid)}" is a bar: it carries axial force only and takes no '
                           "span loads; load its nodes, or make it a beam")
        if "at" in spec:
            self.keys_known(where, spec, ("member", "at", "fx", "fy", "mz", "case"))
            at = self.quantity(spec["at"], "length", where + ".at")
            if at < -1e-12 or at > L * (1 + 1e-12):
                raise self.err(where + ".at", f"position {_shown(spec['at'])} is off the member "
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
                       f"keys given: {_text(', '.join(spec))}"
                       + (_hint_keys(spec)))

    def _intensity(self, value, where):
        if isinstance(value, list):
            if len(value) != 2:
                raise self.err(where, f"expected one value or a [start, end] pair, got {_shown(value)}")
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
            raise self.err(where, f'member "{_text(member.id)}" has no thermal expansion coefficient: '
                           "give alpha in its material")
        if member.alpha is not None:
            for key, dT in (("uniform", uniform), ("gradient", gradient)):
                if abs(member.alpha * dT) >= 0.01:
                    raise self.err(f"{where}.{key}", f'thermal strain alpha*dT = '
                                   f'{member.alpha * dT:.3g} on member "{_text(member.id)}" is not '
                                   "small (1% or more); check alpha in its material and the "
                                   "temperature change: this tool assumes small displacements")
        if gradient:
            if member.kind == "bar":
                raise self.err(where + ".gradient", f'"{_text(member.id)}" is a bar; a temperature '
                               "gradient bends, so it applies to beams only")
            if member.depth is None:
                raise self.err(where + ".gradient", f'member "{_text(member.id)}" has no section '
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
                raise self.err(where, f'"{_text(name)}" is already the name of a load case')
            if not isinstance(parts, dict) or not parts:
                raise self.err(where, 'expected { CASE = factor, ... }, e.g. '
                               '{ dead = 1.35, live = 1.5 }, got ' + _kind(parts))
            factors = []
            for case, value in parts.items():
                if case not in cases:
                    raise self.err(f"{where}.{case}", f'no load case "{_text(case)}"'
                                   f"{_hint(case, cases)}; the cases are: "
                                   + _text(", ".join(cases)))
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
                               f'["C.y", "BC"], got {_shown(redundants)}')
            redundants = tuple(redundants)
        disp = spec.get("displacements", [])
        if not isinstance(disp, list) or not all(isinstance(r, str) for r in disp):
            raise self.err("[analysis] displacements", 'expected a list such as ["B.y", '
                           f'"A.rz"], got {_shown(disp)}')
        shear = spec.get("shear", False)
        if not isinstance(shear, bool):
            raise self.err("[analysis] shear", f"expected true or false, got {_shown(shear)}")
        return redundants, tuple(disp), shear


def _hint_keys(spec) -> str:
    for key in spec:
        if key not in ("member", "case"):
            h = _hint(key, ("at", "wx", "wy", "temperature", "misfit", "fx", "fy", "mz", "from", "to"))
            if h:
                return f' — "{_text(key)}"{h}'
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
        return f"a list {_shown(value)}"
    if isinstance(value, str):
        return f'"{_text(value)}" (text)'
    return _shown(value)


def _text(text: Any) -> str:
    """Text from the file (an id, a name, a key) as shown in a message: one line, cut."""
    return literal(text, ECHO_LIMIT)


_REPR = reprlib.Repr()
_REPR.maxlevel, _REPR.maxlist, _REPR.maxdict = 3, 6, 4
_REPR.maxstring = _REPR.maxother = ECHO_LIMIT


def _shown(value: Any) -> str:
    """A value from the file as written (Python's repr), shallow, short and on one line:
    a huge or deeply nested list costs nothing to show."""
    return literal(_REPR.repr(value), ECHO_LIMIT)


def _float(x: int | float) -> float:
    """``x`` as a float; an integer beyond the floating-point range becomes an infinity (so
    that it is refused as not finite)."""
    try:
        return float(x)
    except OverflowError:
        return math.inf if x > 0 else -math.inf

