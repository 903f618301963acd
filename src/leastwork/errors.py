"""The small exception hierarchy of leastwork.

Every error the user can cause is a :class:`CaseError` (exit status 2 at the command line);
an unstable structure or released structure is a :class:`MechanismError` (exit status 3).
Messages name the file, the table and key or id, and what was expected.

``str()`` of either is always one printable line: control characters (a newline or an
escape sequence in an id or a name) are shown escaped by :func:`leastwork.plaintext.literal`,
the file and location are cut after ``PLACE_LIMIT`` characters and the message after
``MESSAGE_LIMIT``, each with a note of how much was left out. The attributes keep the text
as given.
"""

from __future__ import annotations

from .plaintext import ECHO_LIMIT, literal

__all__ = ["LeastworkError", "CaseError", "MechanismError", "MESSAGE_LIMIT", "PLACE_LIMIT"]

#: Longest message (characters) in ``str()`` of an error before it is cut.
MESSAGE_LIMIT = 600
#: Longest file name, and longest location (table and key), in ``str()`` of an error.
PLACE_LIMIT = 200


class LeastworkError(Exception):
    """Base class of every error leastwork raises on purpose."""


class CaseError(ValueError, LeastworkError):
    """The case file or the command line is wrong.

    Parameters
    ----------
    message : str
        What is wrong and what was expected.
    source : str, optional
        The file (or ``<string>``/``command line``) the error is in.
    where : str, optional
        The table and key or id, e.g. ``"[beams] AB.nodes"``.
    """

    def __init__(self, message: str, source: str | None = None, where: str | None = None):
        super().__init__(message)
        self.message = message
        self.source = source
        self.where = where

    def __str__(self) -> str:
        prefix = ": ".join(literal(p, PLACE_LIMIT) for p in (self.source, self.where) if p)
        message = literal(self.message, MESSAGE_LIMIT)
        return f"{prefix}: {message}" if prefix else message


class MechanismError(LeastworkError):
    """The structure, or the released structure left by a choice of redundants, can move.

    Parameters
    ----------
    message : str
        Plain statement of what is unstable.
    motions : list of str
        The nodes and directions that take part in the mechanism, e.g. ``["C.x", "D.x"]``;
        all of them are kept, the message names the first :attr:`SHOWN`.
    """

    def __init__(self, message: str, motions: list[str] | None = None):
        super().__init__(message)
        self.message = message
        self.motions = list(motions or [])

    #: Most motion names the message shows; ``.motions`` keeps them all.
    SHOWN = 16

    def __str__(self) -> str:
        message = literal(self.message, MESSAGE_LIMIT)
        if not self.motions:
            return message
        shown = ", ".join(literal(m, ECHO_LIMIT) for m in self.motions[:self.SHOWN])
        rest = len(self.motions) - self.SHOWN
        more = f" … and {rest} more" if rest > 0 else ""
        return f"{message} Free motion: {shown}{more}."
