"""Drawing time of the bundled cases, as ratios to their solve time in the same process,
and the share of it spent placing labels (sizing them by the renderer, keeping them off
lines and each other), so that a change to the label placement shows its cost (no absolute
limits: machines differ).

Run: python benchmarks/bench_plot.py
"""

from __future__ import annotations

import io
import time
from pathlib import Path

import leastwork
from leastwork.output.plot import DIAGRAMS
from leastwork.output.plot.figure import figure
from leastwork.output.plot.files import _save
from leastwork.output.plot.panel import Panel

CASES = sorted((Path(__file__).resolve().parent.parent / "cases").glob("*.toml"))


def _best(fn, repeat: int = 3) -> float:
    best = float("inf")
    for _ in range(repeat):
        t0 = time.perf_counter()
        fn()
        best = min(best, time.perf_counter() - t0)
    return best


def _row(path: Path, placing: list) -> None:
    st = leastwork.load_case(path)
    t_solve = _best(lambda: leastwork.solve(st))
    sol = leastwork.solve(st)
    cases = list(sol.cases)
    placing[0] = 0.0
    t_draw = _best(lambda: figure(sol, cases, DIAGRAMS), repeat=1)
    share = placing[0] / t_draw
    t_png = _best(lambda: _save(figure(sol, cases, DIAGRAMS), io.BytesIO(), "png", "bench"),
                  repeat=1)
    print(f"{path.stem:24s} {len(cases):5d}  1.00  {t_draw / t_solve:10.1f}  "
          f"{t_png / t_solve:9.1f}  {share:6.2f}")


def main() -> None:
    warm = leastwork.solve(leastwork.load_case(CASES[0]))
    figure(warm, list(warm.cases), DIAGRAMS)  # imports and font caches
    placing = [0.0]
    original = Panel._place

    def timed(self, *a, **k):
        t0 = time.perf_counter()
        try:
            return original(self, *a, **k)
        finally:
            placing[0] += time.perf_counter() - t0

    Panel._place = timed
    print("case                     cases  solve  draw/solve  png/solve  labels share of draw")
    try:
        for path in CASES:
            _row(path, placing)
    finally:
        Panel._place = original


if __name__ == "__main__":
    main()
