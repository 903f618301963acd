"""Command line: ``leastwork solve CASE`` and ``leastwork check CASE``.

Exit status: 0 solved; 2 the case or the command line is wrong; 3 the structure or the
released structure is a mechanism; 1 only for a bug.
"""

from __future__ import annotations

import argparse
import json
import sys

from .errors import CaseError, MechanismError

__all__ = ["main"]

_DESCRIPTION = """\
Solve statically indeterminate 2D beams, trusses, frames and beam-and-tie structures by the
least-work (force) method, showing every step.

Assumptions: linear elastic material, small displacements, plane structure; the energy of
bending and axial force (shear only when asked) and of springs. Results must be checked by
a qualified engineer against the governing local codes before use.
"""


class _Parser(argparse.ArgumentParser):
    def error(self, message: str):  # exit 2 with one plain line, no usage dump
        raise CaseError(message, source="command line")


def _parser() -> argparse.ArgumentParser:
    p = _Parser(prog="leastwork", description=_DESCRIPTION,
                formatter_class=argparse.RawDescriptionHelpFormatter)
    p.add_argument("--version", action="version", version=_version())
    sub = p.add_subparsers(dest="command", parser_class=_Parser)
    s = sub.add_parser("solve", help="solve a case file", description=_DESCRIPTION,
                       formatter_class=argparse.RawDescriptionHelpFormatter)
    s.add_argument("case", help="case file (TOML)")
    s.add_argument("--json", action="store_true", help="print only the JSON result")
    s.add_argument("--steps", action="store_true", help="print the whole audit trail")
    s.add_argument("--case", dest="load_case", metavar="NAME",
                   help="report only this load case")
    s.add_argument("--redundants", metavar="LIST",
                   help="comma-separated redundants, e.g. C.y,BC (overrides the case)")
    s.add_argument("--at", metavar="LIST",
                   help="comma-separated displacements to add, e.g. B.y,C.rz,AB@2.5.y,A-C")
    c = sub.add_parser("check", help="indeterminacy, stability and suggested redundants",
                       description=_DESCRIPTION,
                       formatter_class=argparse.RawDescriptionHelpFormatter)
    c.add_argument("case", help="case file (TOML)")
    return p


def _version() -> str:
    from . import __version__

    return f"leastwork {__version__}"


def _split(text: str | None) -> list[str] | None:
    if text is None:
        return None
    items = [t.strip() for t in text.split(",") if t.strip()]
    return items


def main(argv: list[str] | None = None) -> int:
    """Entry point; returns the exit status."""
    try:
        return _run(argv)
    except CaseError as exc:
        print(f"leastwork: error: {exc}", file=sys.stderr)
        return 2
    except MechanismError as exc:
        print(f"leastwork: unstable: {exc}", file=sys.stderr)
        return 3
    except KeyboardInterrupt:
        return 130


def _run(argv) -> int:
    import dataclasses

    from rich.console import Console

    from .caseio import load_case
    from .report.terminal import print_check, print_steps, print_summary
    from .solve import solve
    from .topology import build_topology, check_stable, choose_redundants

    args = _parser().parse_args(argv)
    if args.command is None:
        _parser().print_help()
        return 2
    st = load_case(args.case)
    console = Console()
    if args.command == "check":
        topo = build_topology(st)
        if not topo.stable:
            print_check(console, st, topo, [])
            check_stable(st, topo)
        red = choose_redundants(st, topo, st.redundants)
        print_check(console, st, topo, red)
        return 0
    extra = _split(args.at) or []
    if extra:
        st = dataclasses.replace(st, displacements=tuple(dict.fromkeys([*st.displacements,
                                                                         *extra])))
        from .displacements import parse_target

        topo = build_topology(st)
        for t in extra:
            parse_target(st, topo, t, "--at")
    names = _split(args.redundants)
    if args.redundants is not None and not names:
        raise CaseError("expected a comma-separated list of redundants", source="command line",
                        where="--redundants")
    sol = solve(st, names)
    cases = None
    if args.load_case is not None:
        if args.load_case not in sol.cases:
            raise CaseError(f'no load case "{args.load_case}"; the case has: '
                            + ", ".join(sol.cases), source="command line", where="--case")
        cases = [args.load_case]
    if args.json:
        d = sol.to_dict()
        if cases:
            d["cases"] = {k: v for k, v in d["cases"].items() if k in cases}
        print(json.dumps(d, indent=2))
        if not sol.equilibrium_ok:
            print("leastwork: WARNING: the equilibrium check FAILED; do not use these results",
                  file=sys.stderr)
        return 0
    if args.steps:
        print_steps(console, sol, cases)
    else:
        print_summary(console, sol, cases)
    return 0


if __name__ == "__main__":  # pragma: no cover
    sys.exit(main())
