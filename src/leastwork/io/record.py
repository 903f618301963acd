"""The case as written, beside the structure in SI: for a reader that needs more than SI
floats (the exact arithmetic of :mod:`leastwork.symbolic`)."""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

from ..model import Structure
from .core import CaseReader
from .files import parse_toml
from .reader import read_structure

__all__ = ["CaseRecord", "read_case_record"]


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
    """Read a case from TOML text like :func:`~leastwork.io.reader.loads_case`, and also
    return the :class:`CaseRecord` of every quantity as written."""
    data = parse_toml(text, source)
    reader = CaseReader(data, source)
    reader.record = {}
    st = read_structure(reader)
    return st, CaseRecord(data, dict(reader.record), reader.parameters)
