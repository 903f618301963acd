"""Reading a case file: a regular file of bounded size, UTF-8 text, TOML of bounded nesting.

Every refusal is a :class:`~leastwork.errors.CaseError` naming the file (docs/case-format.md,
Limits).
"""

from __future__ import annotations

import os
import re
import stat
import tomllib
from pathlib import Path
from typing import Any

from ..errors import CaseError
from ..plaintext import ECHO_LIMIT, literal

__all__ = ["read_case_text", "parse_toml", "CASE_FILE_LIMIT", "NESTING_LIMIT"]

#: Largest case file read (bytes): 32 MiB, twice the largest generated benchmark case
#: (16.7 MB: a continuous beam of 102,399 members, benchmarks/generators.py). The TOML
#: parser alone takes about 15 s and 1 GB for a file of this size.
CASE_FILE_LIMIT = 32 * 2 ** 20
#: Deepest nesting of arrays and inline tables read (``A = [0, 0]`` is 1, a member's
#: ``{ nodes = ["A", "B"] }`` 2; a table header counts as its brackets, ``[[loads]]`` 2).
NESTING_LIMIT = 16


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


def parse_toml(text: str, source: str) -> dict[str, Any]:
    """The parsed TOML ``text``; ``source`` names it in error messages."""
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
