"""``leastwork sweep``: a case solved for every combination of parameter values, one row of
results per combination (:mod:`leastwork.studies.sweep`)."""

from __future__ import annotations

import argparse
import json
import sys

from ..errors import CaseError
from .common import console_for
from .parser import CAUTION_LINE

__all__ = ["add_parsers", "run"]

_HELP = """\
Solve a case over ranges of its parameters. Every combination of the values given by
--vary (COUNT values from START to STOP, both included; each NAME a [parameters] name) is
solved; each row gives the values and the quantities asked for, in the case's output units. Samples that change only sections,
springs or loads reuse the previous sample's structure; a moved node is solved afresh.
Quantities: B.y (reaction), BC (a member's axial force), AB.start.m / AB.end.n,
AB.m_max / AB.m_min, d:B.y or d:AB@2.5.y (displacements, the --at names).

""" + CAUTION_LINE


def add_parsers(sub) -> None:
    """Add the ``sweep`` subcommand to ``sub``."""
    s = sub.add_parser("sweep", help="solve a case over ranges of its parameters",
                       description=_HELP, formatter_class=argparse.RawDescriptionHelpFormatter)
    s.add_argument("case", help="case file (TOML) with [parameters]")
    s.add_argument("--vary", action="append", metavar="NAME=START..STOP:COUNT",
                   help="a parameter and its values, e.g. k=1000..5000:5 (repeat for more)")
    s.add_argument("--random", type=int, metavar="N",
                   help="instead of --vary: N samples of random node positions and member "
                        "lengths within --positions / --tolerance, each solved in full")
    s.add_argument("--positions", metavar="SPEC",
                   help="node position tolerances, e.g. A=1mm,*=3mm (each of x and y "
                        "within +-t)")
    s.add_argument("--tolerance", metavar="SPEC",
                   help="member length tolerances, e.g. DA=2mm,*=1mm (misfits in the load "
                        "case)")
    s.add_argument("--seed", type=int, metavar="S", help="seed of a random study")
    s.add_argument("--quantity", required=True, metavar="Q[,Q...]",
                   help="results to report, e.g. B.y,AB.start.m,d:B.y")
    s.add_argument("--case", dest="load_case", metavar="NAME",
                   help="load case (default: the first one)")
    s.add_argument("--json", action="store_true", help="print the rows as JSON")
    s.add_argument("-o", "--output", metavar="FILE",
                   help="write the rows to FILE.csv (or FILE.parquet with pyarrow)")
    s.add_argument("--force", action="store_true", help="replace FILE if it exists")
    s.add_argument("--workers", type=int, default=1, metavar="N",
                   help="local worker processes (default 1)")
    s.add_argument("--scheduler", metavar="ADDRESS",
                   help="run the samples on the Dask cluster at ADDRESS (tcp://host:8786)")
    s.add_argument("--no-color", action="store_true", help="plain text, no colours")


def run(args) -> int:
    """``leastwork sweep``; returns the exit status (errors are raised as CaseError)."""
    from ..io.files import read_case_text
    from ..studies.sweep import parse_vary, plan, quantity_units, run_plan

    if not 1 <= args.workers <= 256:
        raise CaseError(f"expected 1 to 256 workers, got {args.workers}",
                        source="command line", where="--workers")
    quantities = [q.strip() for q in args.quantity.split(",") if q.strip()]
    text = read_case_text(args.case)
    seed = None
    if args.random is not None:
        if args.vary:
            raise CaseError("give --vary or --random, not both", source="command line",
                            where="--random")
        from ..studies.random_study import random_plan

        p, seed = random_plan(text, args.case, quantities, args.random,
                              positions=args.positions, lengths=args.tolerance,
                              seed=args.seed, case=args.load_case)
    else:
        if not args.vary:
            raise CaseError("give --vary NAME=START..STOP:COUNT (or --random N)",
                            source="command line", where="--vary")
        vary = dict(parse_vary(v) for v in args.vary)
        p = plan(text, args.case, vary, quantities, args.load_case)
    with _bar(len(p.samples)) as tick:
        rows = run_plan(p, workers=args.workers, scheduler=args.scheduler, progress=tick)
    if args.output:
        _write(rows, args)
    units = quantity_units(p)
    stats = None
    if seed is not None:
        from ..studies.random_study import summary

        stats = summary(rows, list(p.quantities))
    if args.json:
        out: dict = {"rows": rows, "units": units}
        if stats is not None:
            out.update(seed=seed, summary=stats)
        sys.stdout.write(json.dumps(out, indent=2) + "\n")
        return 0
    console = console_for(args)
    if stats is not None:
        _stats_table(console, stats, units, seed, len(rows))
        return 0
    _table(console, rows, p, units)
    return 0


class _bar:
    """A progress bar of the samples on standard error, only on a terminal."""

    def __init__(self, total: int):
        self.total, self._bar, self._task = total, None, None

    def __enter__(self):
        if sys.stderr.isatty():
            from rich.console import Console
            from rich.progress import Progress

            self._bar = Progress(console=Console(stderr=True), transient=True)
            self._bar.__enter__()
            self._task = self._bar.add_task("samples", total=self.total)
        return self.tick

    def tick(self, done: int, total: int) -> None:
        if self._bar is not None:
            self._bar.update(self._task, completed=done)

    def __exit__(self, *exc):
        if self._bar is not None:
            self._bar.__exit__(*exc)
        return False


def _write(rows: list[dict], args) -> None:
    import io
    import pathlib

    from ..io.writing import write_files

    out = pathlib.Path(args.output)
    suffix = out.suffix.lower()
    if suffix == ".csv":
        import csv

        keys = list(dict.fromkeys(k for r in rows for k in r))
        buf = io.StringIO()
        w = csv.DictWriter(buf, fieldnames=keys)
        w.writeheader()
        w.writerows(rows)
        data: str | bytes = buf.getvalue()
    elif suffix == ".parquet":
        try:
            import pandas as pd
            import pyarrow  # noqa: F401
        except ImportError:
            raise CaseError("a .parquet file needs pandas and pyarrow (pip install pyarrow); "
                            "or write .csv", source="command line", where="--output") from None
        buf = io.BytesIO()
        pd.DataFrame(rows).to_parquet(buf)
        data = buf.getvalue()
    else:
        raise CaseError(f'cannot write rows to "{out.name}": name it .csv or .parquet',
                        source="command line", where="--output")
    write_files({out: data}, force=args.force, case=args.case)


def _table(console, rows: list[dict], p, units: dict[str, str]) -> None:
    from rich.table import Table

    from ..output.terminal import print_fitted, user_text

    t = Table(title=user_text(f"Sweep of {', '.join(p.names)}: {len(rows)} samples"),
              header_style="bold")
    keys = [*p.names, *p.quantities]
    for k in keys:
        t.add_column(user_text(f"{k} [{units[k]}]" if k in units else k), justify="right")
    failed = [r for r in rows if "error" in r]
    for r in rows:
        t.add_row(*(user_text(_cell(r.get(k))) for k in keys))
    print_fitted(console, t)
    for r in failed[:5]:
        console.print(user_text(f"FAILED {', '.join(f'{n}={r[n]}' for n in p.names)}: "
                                f"{r['error']}", "red"))
    console.print("Results must be checked by a qualified engineer against the governing "
                  "codes.")


def _stats_table(console, stats: dict, units: dict, seed: int, n: int) -> None:
    from rich.table import Table

    from ..output.terminal import print_fitted, user_text

    t = Table(title=f"Random study: {n} samples, seed {seed} (rows: --json or -o)",
              header_style="bold")
    for head in ("quantity", "mean", "std", "p05", "p95", "solved"):
        t.add_column(head, justify="left" if head == "quantity" else "right")
    for q, s in stats.items():
        t.add_row(user_text(f"{q} [{units[q]}]"), *(_cell(s[k]) for k in
                                                    ("mean", "std", "p05", "p95")),
                  str(s["samples"]))
    print_fitted(console, t)
    console.print("Results must be checked by a qualified engineer against the governing "
                  "codes.")


def _cell(v) -> str:
    if v is None:
        return "-"
    if isinstance(v, float):
        return f"{v:.5g}"
    return str(v)
