"""What every command family's parser shares: the parser class, the common description
with the assumptions, a subcommand's parser and the ``--basis`` option. The whole parser is
built by :func:`leastwork.cli.build_parser`, each command family adding its own
subcommands with ``add_parsers(sub)``.

A bad command line raises :class:`~leastwork.errors.CaseError` (exit status 2, one plain
line, no usage dump) instead of argparse's own exit.
"""

from __future__ import annotations

import argparse

from ..errors import CaseError

__all__ = ["DESCRIPTION", "Parser", "basis_option", "command_parser", "CAUTION_LINE",
           "command_description"]

DESCRIPTION = """\
Solve statically indeterminate 2D beams, trusses, frames and beam-and-tie structures by the
least-work (force) method, showing every step.

Assumptions: linear elastic material, small displacements, plane structure; the energy of
bending and axial force (shear only when asked), of springs and semi-rigid joints; one-way
ties, struts and bearings found by repeated linear solves, one state per load case. Results
must be checked by a qualified engineer against the governing local codes before use.
"""


#: The assumptions and caution, short, at the foot of every subcommand's own description.
CAUTION_LINE = """\
Assumes linear elastic material, small displacements and a plane structure (leastwork --help
lists every assumption). Results must be checked by a qualified engineer against the
governing local codes before use."""


def command_description(text: str) -> str:
    """A subcommand's ``--help`` description: what it does (``text``, wrapped), then the
    short assumptions and caution (:data:`CAUTION_LINE`)."""
    import textwrap

    return textwrap.fill(text, 92) + "\n\n" + CAUTION_LINE


class Parser(argparse.ArgumentParser):
    """An argument parser whose errors are one plain line with exit status 2."""

    def error(self, message: str):  # exit 2 with one plain line, no usage dump
        raise CaseError(message, source="command line")


def command_parser(sub, name: str, summary: str, description: str | None = None):
    """A subcommand whose ``--help`` shows ``description`` as written (default: what it
    does, from ``summary``, with the short assumptions and caution)."""
    if description is None:
        description = command_description(summary[0].upper() + summary[1:] + ".")
    return sub.add_parser(name, help=summary, description=description,
                          formatter_class=argparse.RawDescriptionHelpFormatter)


def basis_option(p: argparse.ArgumentParser) -> None:
    """``--basis auto|released|local`` (solve, check, plot, report)."""
    p.add_argument("--basis", choices=("auto", "released", "local"), default="auto",
                   help="released: unit redundant states of one released structure (dense); "
                        "local: local self-stress states, each closing the cut of one member "
                        "force or reaction (sparse, for large structures; redundants cannot "
                        "be named); auto (default): local above 1500 basic forces and "
                        "reactions when no redundants are named")
