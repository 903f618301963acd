"""Command line: ``leastwork solve CASE``, ``check``, ``new``, ``demo``, ``plot``,
``report``, ``fitup`` and ``influence``.

Exit status: 0 solved; 2 the case or the command line is wrong; 3 the structure or the
released structure is a mechanism; 1 only for a bug.

:func:`build_parser` builds the argument parser, each command family adding its subcommands;
:data:`COMMANDS` sends each command to its handler: :mod:`.solve`, :mod:`.check`,
:mod:`.starters` (``new``, ``demo``), :mod:`.drawing` (``plot``, ``report``) and
:mod:`.studies` (``fitup``, ``influence``). :mod:`.common` holds what they share (output
format, writing to ``-o``), :mod:`.progress` the progress line and spinner.
"""

from __future__ import annotations

import argparse
import sys
from collections.abc import Callable

from ..errors import CaseError, MechanismError
from ..output.sheet import shown_figures
from . import check, drawing, solve, starters, studies, sweep
from .common import version
from .parser import DESCRIPTION, Parser
from .progress import PhaseDisplay

__all__ = ["COMMANDS", "PhaseDisplay", "build_parser", "main"]


def build_parser() -> argparse.ArgumentParser:
    """The whole command line: ``leastwork [--version] COMMAND ...``, the command families
    adding their subcommands in the order ``--help`` lists them."""
    p = Parser(prog="leastwork", description=DESCRIPTION,
               formatter_class=argparse.RawDescriptionHelpFormatter)
    p.add_argument("--version", action="version", version=version())
    sub = p.add_subparsers(dest="command", parser_class=Parser)
    for family in (solve, check, starters, drawing, studies, sweep):
        family.add_parsers(sub)
    return p


#: Command name -> handler; each takes the parsed arguments and returns the exit status
#: (a bad case or option is raised as CaseError, a mechanism as MechanismError).
COMMANDS: dict[str, Callable[[argparse.Namespace], int]] = {
    "solve": solve.run,
    "check": check.run,
    "new": starters.run_new,
    "demo": starters.run_demo_command,
    "plot": drawing.run,
    "report": drawing.run,
    "fitup": studies.run_fitup,
    "influence": studies.run_influence,
    "sweep": sweep.run,
}


def main(argv: list[str] | None = None) -> int:
    """Entry point; returns the exit status."""
    from ..plaintext import literal

    try:
        return _run(argv)
    except CaseError as exc:  # str() is one line already; literal() again costs nothing
        print(f"leastwork: error: {literal(exc)}", file=sys.stderr)
        return 2
    except MechanismError as exc:
        print(f"leastwork: unstable: {literal(exc)}", file=sys.stderr)
        return 3
    except KeyboardInterrupt:
        return 130
    except SystemExit as exc:  # --help and --version print and stop
        return exc.code if isinstance(exc.code, int) else 0


def _run(argv) -> int:
    """Parse ``argv`` and run the command (no command: the help, exit status 2)."""
    parser = build_parser()
    args = parser.parse_args(argv)
    if args.command is None:
        parser.print_help()
        return 2
    with shown_figures(getattr(args, "figures", None)):  # --figures: every printed number
        return COMMANDS[args.command](args)
