"""Solve time of continuous beams with many spans, as ratios to a two-span beam solved in
the same process (no absolute limits: machines differ).

Run: python benchmarks/bench_solve.py
"""

from __future__ import annotations

import time

import leastwork


def continuous_beam(spans: int) -> str:
    nodes = "\n".join(f"N{i} = [{6.0 * i}, 0]" for i in range(spans + 1))
    beams = "\n".join(f'S{i} = {{ nodes = ["N{i}", "N{i + 1}"], EI = "30000 kN*m^2" }}'
                      for i in range(spans))
    supports = "N0 = \"pinned\"\n" + "\n".join(f'N{i} = "roller"' for i in range(1, spans + 1))
    loads = "\n".join(f'[[loads]]\nmember = "S{i}"\nwy = "-12 kN/m"' for i in range(spans))
    return f"[nodes]\n{nodes}\n[beams]\n{beams}\n[supports]\n{supports}\n{loads}\n"


def best_time(text: str, repeat: int = 5) -> float:
    st = leastwork.loads_case(text)
    best = float("inf")
    for _ in range(repeat):
        t0 = time.perf_counter()
        leastwork.solve(st)
        best = min(best, time.perf_counter() - t0)
    return best


def main() -> None:
    base = best_time(continuous_beam(2))
    print("spans  redundants  time / time(2 spans)")
    for spans in (2, 5, 10, 20, 40):
        t = best_time(continuous_beam(spans))
        print(f"{spans:5d}  {spans - 1:10d}  {t / base:8.2f}")


if __name__ == "__main__":
    main()
