"""Time and peak memory of every command on the 10^4-bar multi-support truss, against the
solve of the same file.

The case is :func:`generators.multi_span_truss` (2 000 panels, 10 001 bars, a support
every 50 panels) written to a temporary folder. Each command runs as a fresh process
(``python -m leastwork ...``, output thrown away, files written into the folder), in turn,
``--repeat`` times; the time is the best wall-clock and the memory the largest peak
resident set (``ru_maxrss`` of that child, from ``os.wait4``). Ratios are to
``solve --json`` of the same run. BLAS is pinned to one thread. No assertions on
wall-clock: machines differ.

The fit-up study tolerances both diagonals of the first 50 panels (100 bars, 2 000
samples): a study of every bar is quadratic by nature (every misfit locks forces into the
whole continuous girder: 10^4 x 10^4 influence coefficients).

Run: python benchmarks/large_outputs.py [--panels N] [--repeat K]
"""

from __future__ import annotations

import argparse
import math
import os
import subprocess
import sys
import tempfile
import time
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent))

from generators import multi_span_truss  # noqa: E402

__all__ = ["commands", "run_once", "main"]


def commands(case: Path, folder: Path, panels: int) -> dict[str, list[str]]:
    """The timed commands on ``case`` (outputs into ``folder``)."""
    lw = [sys.executable, "-m", "leastwork"]
    tol = ",".join(f"D{i}=2mm,E{i}=2mm" for i in range(min(50, panels)))
    mid = f"L{min(50, panels)}.y"
    return {
        "solve --json": [*lw, "solve", str(case), "--json"],
        "solve (summary)": [*lw, "solve", str(case)],
        "solve --steps": [*lw, "solve", str(case), "--steps"],
        "fitup (100 bars)": [*lw, "fitup", str(case), "--tolerance", tol, "--samples", "2000",
                             "--seed", "1"],
        "influence": [*lw, "influence", str(case), "--quantity", mid, "--along",
                      "B0,B1,B2,B3,B4,B5"],
        "plot": [*lw, "plot", str(case), "-o", str(folder / "big.png"), "--force"],
        "report": [*lw, "report", str(case), "-o", str(folder / "big.html"), "--force"],
    }


def run_once(cmd: list[str], env: dict) -> tuple[float, float, int]:
    """(seconds, peak resident MiB, exit status) of one run of ``cmd``."""
    t0 = time.perf_counter()
    proc = subprocess.Popen(cmd, stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL,
                            env=env)
    _, status, usage = os.wait4(proc.pid, 0)
    proc.returncode = os.waitstatus_to_exitcode(status)
    return time.perf_counter() - t0, usage.ru_maxrss / 1024.0, proc.returncode


def main(argv: list[str] | None = None) -> None:
    p = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    p.add_argument("--panels", type=int, default=2000, help="panels (default 2000)")
    p.add_argument("--repeat", type=int, default=1, help="runs per command (default 1)")
    args = p.parse_args(argv)
    env = dict(os.environ)
    for var in ("OPENBLAS_NUM_THREADS", "OMP_NUM_THREADS", "MKL_NUM_THREADS"):
        env.setdefault(var, "1")
    with tempfile.TemporaryDirectory(prefix="leastwork-outputs-") as tmp:
        folder = Path(tmp)
        case = folder / "big.toml"
        case.write_text(multi_span_truss(args.panels), encoding="utf-8")
        cmds = commands(case, folder, args.panels)
        best = {k: (math.inf, 0.0, 0) for k in cmds}
        for _ in range(args.repeat):  # in turn, so that a burst of load falls on each
            for name, cmd in cmds.items():
                t, mib, rc = run_once(cmd, env)
                b = best[name]
                best[name] = (min(b[0], t), max(b[1], mib), rc or b[2])
        load = os.getloadavg()
    t0, m0 = best["solve --json"][:2]
    print(f"multi-support truss, {args.panels} panels ({5 * args.panels + 1} bars); "
          f"best of {args.repeat}; load average at the end {load[0]:.2f} {load[1]:.2f} "
          f"{load[2]:.2f} on {os.cpu_count()} cores")
    print(f"{'command':20s} {'time s':>8s} {'/ solve':>8s} {'peak MiB':>9s} {'/ solve':>8s} "
          f"{'exit':>5s}")
    for name, (t, mib, rc) in best.items():
        print(f"{name:20s} {t:8.2f} {t / t0:8.2f} {mib:9.0f} {mib / m0:8.2f} {rc:5d}")


if __name__ == "__main__":
    main()
