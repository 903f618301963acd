"""How values from a case file appear in the reader's messages: one line, cut, shallow.

Every id, key or value echoed goes through :func:`leastwork.plaintext.literal`.
"""

from __future__ import annotations

import difflib
import math
import reprlib
from typing import Any

from ..plaintext import ECHO_LIMIT, literal

__all__ = ["hint", "kind_of", "echo", "shown", "as_float"]

#: Most choices a misspelt name is compared with for a hint.
_HINT_CHOICES = 5000


def hint(word: str, choices) -> str:
    """' (did you mean "X"?)' for the choice closest to ``word``, or ""; none for a long
    word or very many choices (the comparison costs their product)."""
    if len(word) > ECHO_LIMIT or len(choices) > _HINT_CHOICES:
        return ""
    close = difflib.get_close_matches(word, list(choices), n=1, cutoff=0.6)
    return f' (did you mean "{echo(close[0])}"?)' if close else ""


def kind_of(value: Any) -> str:
    """What ``value`` is, for "got ..." in a message: a boolean, a table, a list, text or a
    number, with the value shown."""
    if isinstance(value, bool):
        return f"{str(value).lower()} (a boolean)"
    if isinstance(value, dict):
        return "a table"
    if isinstance(value, list):
        return f"a list {shown(value)}"
    if isinstance(value, str):
        return f'"{echo(value)}" (text)'
    return shown(value)


def echo(text: Any) -> str:
    """Text from the file (an id, a name, a key) as shown in a message: one line, cut."""
    return literal(text, ECHO_LIMIT)


_REPR = reprlib.Repr()
_REPR.maxlevel, _REPR.maxlist, _REPR.maxdict = 3, 6, 4
_REPR.maxstring = _REPR.maxother = ECHO_LIMIT


def shown(value: Any) -> str:
    """A value from the file as written (Python's repr), shallow, short and on one line:
    a huge or deeply nested list costs nothing to show."""
    return literal(_REPR.repr(value), ECHO_LIMIT)


def as_float(x: int | float) -> float:
    """``x`` as a float; an integer beyond the floating-point range becomes an infinity (so
    that it is refused as not finite)."""
    try:
        return float(x)
    except OverflowError:
        return math.inf if x > 0 else -math.inf
