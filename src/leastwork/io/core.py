"""The reader's state while it passes over one parsed case: the tables, the quantities read,
the nodes and members once known; and the checks every table shares (a table's type, its
keys, an id)."""

from __future__ import annotations

import re
from typing import Any

from ..model import Member, Node
from .messages import echo, hint, kind_of
from .quantities import QuantityReader

__all__ = ["CaseReader", "ID"]

#: An id of a node, member, parameter or combination: letters, digits and underscores.
ID = re.compile(r"^[A-Za-z_][A-Za-z0-9_]*$|^[0-9]+[A-Za-z0-9_]*$")


class CaseReader(QuantityReader):
    """One pass over the parsed TOML ``data``, with the source and parameters at hand."""

    def __init__(self, data: dict[str, Any], source: str):
        super().__init__(source)
        self.data = data
        #: the nodes and members, once read (the loads refer to them)
        self.nodes: dict[str, Node] = {}
        self.members: dict[str, Member] = {}

    def table(self, name: str, required: bool = False) -> dict[str, Any]:
        """The top-level table ``[name]``, {} if absent (refused if ``required``)."""
        value = self.data.get(name)
        if value is None:
            if required:
                raise self.err(f"[{name}]", f"missing table [{name}]; every case needs one")
            return {}
        if not isinstance(value, dict):
            raise self.err(f"[{name}]", f"expected a table [{name}], got {kind_of(value)}")
        return value

    def keys_known(self, where: str, entry: dict, allowed: tuple[str, ...]) -> None:
        """Refuse a key of ``entry`` not in ``allowed``."""
        for key in entry:
            if key not in allowed:
                raise self.err(
                    where,
                    f'unknown key "{echo(key)}"{hint(key, allowed)}; expected one of: '
                    + ", ".join(allowed),
                )

    def ident(self, where: str, name: str, what: str) -> str:
        """``name``, refused unless it is an :data:`ID`."""
        if not ID.match(name):
            raise self.err(
                where,
                f'{what} id "{echo(name)}" must be letters, digits and underscores only '
                "(no dots, spaces, @ or dashes: they separate names in results)",
            )
        return name
