"""The one wording of the bending-moment convention that the diagrams, the terminal and the
sheets print (docs/conventions.md section 3), so that the three never say it differently."""

from __future__ import annotations

__all__ = ["moment_convention"]

_WORDING = ("bending moment drawn on the tension side of each member, values without sign; "
            "in tables m is + when the member's local -y face is in tension (sagging for a "
            "beam drawn left to right)")


def moment_convention() -> str:
    """The sentence stating how bending moments are drawn and signed (plain text)."""
    return _WORDING
