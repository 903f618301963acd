"""Whole-process time of a large solve from the command line: ``python -m leastwork solve
big.toml --json`` (output thrown away) against a straightforward process that reads the
same file with :func:`leastwork.load_case` and runs the direct stiffness solver
(:func:`leastwork.verify.solve_stiffness`) on every load case, nothing else. The case
is a cross-braced grid (:func:`generators.braced_grid`, square, about ``--members``
members, 10^4 by default) written to a temporary .toml file; with ``--truss``, the
cross-braced girder on a support every 50 panels (:func:`generators.multi_span_truss`,
10 001 bars at 10^4).

Both are fresh interpreters; each time is the best of ``--repeat`` runs (3) after one
warm run of each on a small case (bytecode written as in :mod:`startup`). The command line
does more than the plain process: it checks the case, picks the basis (the local
self-stress basis at this size), and writes every member's and support's results as
JSON; the ratio says what all that costs against the stiffness solver alone. BLAS is
pinned to one thread in both unless the environment says otherwise. No assertions on
wall-clock: machines differ.

Then the small-case start-up comparison of :mod:`startup` (``--no-startup`` leaves it
out).

Run: python benchmarks/process.py [--members N] [--repeat K] [--no-startup]
"""

from __future__ import annotations

import argparse
import math
import os
import sys
import tempfile
from contextlib import nullcontext
from dataclasses import dataclass
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent))

import startup  # noqa: E402
from generators import braced_grid, braced_truss, multi_span_truss, multi_span_truss_panels  # noqa: E402,E501

__all__ = ["ProcessTimes", "grid_panels", "commands", "measure", "report", "main"]

#: A plain process: read the case, run the stiffness solver on every load case.
STIFFNESS_SCRIPT = """\
import sys
import leastwork
from leastwork.verify import solve_stiffness
st = leastwork.load_case(sys.argv[1])
for case in st.case_names:
    solve_stiffness(st, case)
"""

CLI = "leastwork solve --json"
PLAIN = "load_case + solve_stiffness"
FLOOR = "import numpy"


def grid_panels(members: int) -> int:
    """Panels n of the square braced grid (4 n^2 + n members) closest to ``members``."""
    n = max(1, round((-1 + math.sqrt(1 + 16 * members)) / 8))
    return n


def commands(case: Path) -> dict[str, list[str]]:
    """The timed commands on ``case``: the command line, the plain stiffness process and
    the interpreter start-up floor."""
    return {
        CLI: [sys.executable, "-m", "leastwork", "solve", str(case), "--json"],
        PLAIN: [sys.executable, "-c", STIFFNESS_SCRIPT, str(case)],
        FLOOR: [sys.executable, "-c", "import numpy"],
    }


@dataclass(frozen=True)
class ProcessTimes:
    """Best wall-clock seconds of each command on a grid of ``members`` members."""

    members: int
    panels: int
    file_bytes: int
    times: dict[str, float]
    structure: str = "braced grid"

    @property
    def ratio(self) -> float:
        """Command line over the plain stiffness process."""
        return self.times[CLI] / self.times[PLAIN]


def measure(members: int = 10_000, repeat: int = 3, *, warm: bool = True,
            names: tuple[str, ...] = (CLI, PLAIN, FLOOR), truss: bool = False) -> ProcessTimes:
    """Write the grid case, warm every command on a small case, then time each command
    ``repeat`` times on the grid and keep the best (see the module docstring). With
    ``warm`` false (quick smoke runs): no warm runs, and bytecode where the environment
    puts it. ``names``: which of :func:`commands` to time (the ratio needs CLI and PLAIN)."""
    n = multi_span_truss_panels(members) if truss else grid_panels(members)
    with tempfile.TemporaryDirectory(prefix="leastwork-process-") as folder, \
            (startup.bytecode_env() if warm else nullcontext(dict(os.environ))) as env:
        for var in ("OPENBLAS_NUM_THREADS", "OMP_NUM_THREADS", "MKL_NUM_THREADS"):
            env.setdefault(var, "1")
        big, small = Path(folder) / "big.toml", Path(folder) / "small.toml"
        big.write_text(multi_span_truss(n) if truss else braced_grid(n, n), encoding="utf-8")
        small.write_text(braced_truss(2), encoding="utf-8")  # unit strings: warms the units
        for name, cmd in commands(small).items() if warm else ():
            if name in names:
                startup.best_of(cmd, 1, env=env)
        times = dict.fromkeys((k for k in commands(big) if k in names), math.inf)
        for _ in range(repeat):  # in turn, so that a burst of load falls on every command
            for name, cmd in commands(big).items():
                if name in names:
                    times[name] = min(times[name], startup.best_of(cmd, 1, env=env))
        size = big.stat().st_size
    if truss:
        return ProcessTimes(5 * n + 1, n, size, times, "multi-support truss")
    return ProcessTimes(4 * n * n + n, n, size, times)


def report(res: ProcessTimes, repeat: int) -> str:
    """The table of :func:`measure`'s times, with their ratio to the plain process."""
    head = f"best of {repeat} (s)"
    shape = (f"{res.panels} panels, a support every 50" if res.structure != "braced grid"
             else f"{res.panels} x {res.panels} panels")
    lines = [f"{res.structure} {shape}, {res.members} members, "
             f"case file {res.file_bytes / 1024:.0f} KiB; BLAS threads "
             f"{os.environ.get('OPENBLAS_NUM_THREADS', '1')}",
             f"{'process':36s} {head:>13s} {'/ plain':>8s}"]
    plain = res.times[PLAIN]
    lines += [f"{name:36s} {t:13.3f} {t / plain:8.2f}" for name, t in res.times.items()]
    return "\n".join(lines)


def main(argv: list[str] | None = None) -> None:
    p = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    p.add_argument("--members", type=int, default=10_000,
                   help="members of the braced grid (default 10000)")
    p.add_argument("--repeat", type=int, default=3, help="runs per command (default 3)")
    p.add_argument("--truss", action="store_true",
                   help="the multi-support truss instead of the grid")
    p.add_argument("--no-startup", action="store_true",
                   help="leave out the small-case start-up comparison")
    args = p.parse_args(argv)
    print(report(measure(args.members, args.repeat, truss=args.truss), args.repeat), flush=True)
    if not args.no_startup:
        print("\nstart-up on a small case (benchmarks/startup.py):")
        print(startup.report(startup.measure()))


if __name__ == "__main__":
    main()
