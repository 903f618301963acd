"""User text shown literally: control characters escaped, one line, cut to a length.

Every piece of text that came from a case file or the command line (names, ids, load-case
names, echoed values) passes through :func:`literal` before it reaches a terminal, a
message or a document, so that a newline cannot split a one-line message and an escape
sequence cannot restyle or take over the terminal.
"""

from __future__ import annotations

__all__ = ["literal", "ECHO_LIMIT"]

#: Longest echo of user input in a message (characters, before the cut mark).
ECHO_LIMIT = 80

_NAMED = {"\n": "\\n", "\r": "\\r", "\t": "\\t"}


def _escape(ch: str) -> str:
    if ch in _NAMED:
        return _NAMED[ch]
    code = ord(ch)
    if code < 0x100:
        return f"\\x{code:02x}"
    if code < 0x10000:
        return f"\\u{code:04x}"
    return f"\\U{code:08x}"


def _is_control(ch: str) -> bool:
    code = ord(ch)
    # C0, DEL, C1; line/paragraph separators; bidirectional overrides and isolates
    return (code < 0x20 or 0x7F <= code < 0xA0 or code in (0x2028, 0x2029)
            or 0x202A <= code <= 0x202E or 0x2066 <= code <= 0x2069)


def literal(text: object, limit: int | None = None) -> str:
    """``text`` as one printable line: control characters as escapes (``\\n``, ``\\x1b``),
    cut after ``limit`` characters with a note of how many were left out.

    >>> literal("probe\\n[red]x")
    'probe\\\\n[red]x'
    >>> literal("a" * 100, 10)
    'aaaaaaaaaa… (90 more characters)'
    """
    s = str(text)
    if any(_is_control(ch) for ch in s):
        s = "".join(_escape(ch) if _is_control(ch) else ch for ch in s)
    if limit is not None and len(s) > limit:
        return f"{s[:limit]}… ({len(s) - limit} more characters)"
    return s
