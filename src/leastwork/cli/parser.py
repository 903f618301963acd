"""The argument parser: the program's options and one subparser per command, each command
family adding its own with ``add_parsers(sub)`` (:mod:`.solve`, :mod:`.check`,
:mod:`.starters`, :mod:`.drawing`, :mod:`.studies`, in the order ``--help`` lists them).

A bad command line raises :class:`~leastwork.errors.CaseError` (exit status 2, one plain
line, no usage dump) instead of argparse's own exit.
"""

from __future__ import annotations

import argparse

from ..errors import CaseError

__all__ = ["DESCRIPTION", "Parser", "basis_option", "build_parser", "command_parser"]

DESCRIPTION = """\
Solve statically indeterminate 2D beams, trusses, frames and beam-and-tie structures by the
least-work (force) method, showing every step.

Assumptions: linear elastic material, small displacements, plane structure; the energy of
bending and axial force (shear only when asked) and of springs. Results must be checked by
a qualified engineer against the governing local codes before use.
"""


class Parser(argparse.ArgumentParser):
    """An argument parser whose errors are one plain line with exit status 2."""

    def error(self, message: str):  # exit 2 with one plain line, no usage dump
        raise CaseError(message, source="command line")


def build_parser() -> argparse.ArgumentParser:
    """The whole command line: ``leastwork [--version] COMMAND ...``."""
    from . import check, drawing, solve, starters, studies
    from .common import version

    p = Parser(prog="leastwork", description=DESCRIPTION,
               formatter_class=argparse.RawDescriptionHelpFormatter)
    p.add_argument("--version", action="version", version=version())
    sub = p.add_subparsers(dest="command", parser_class=Parser)
    for family in (solve, check, starters, drawing, studies):
        family.add_parsers(sub)
    return p


def command_parser(sub, name: str, summary: str, description: str = DESCRIPTION):
    """A subcommand whose ``--help`` shows ``description`` as written (the common
    description with the assumptions and the caution by default)."""
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
