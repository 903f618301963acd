"""How solve time grows with the size of the structure: the force method as it is today
(dense equilibrium matrix, dense rank decisions and flexibility matrix) against the
project's own direct stiffness solver (sparse), on the same structures, with their
agreement.

For each family of :mod:`generators` (cross-braced truss, multi-bay multi-storey frame,
continuous beam) the size starts near 100 members and doubles the member count until the
next size would overrun the family's share of the time budget (about a minute in all),
judged from the growth seen so far. A table gives members, redundants, the time of each
method, their ratio and the largest difference of reactions relative to the largest
reaction force (moments divided by the longest member); then the growth exponent of each
method fitted by least squares on log(time) against log(members).

The dense force method grows much faster than the stiffness solver, which is why the sizes
stop early; a sparse path for the force method is still to come, and this script is the
yardstick for it. No assertions on wall-clock: machines differ.

BLAS threads are set to one unless the environment says otherwise (set
``OPENBLAS_NUM_THREADS`` etc. before running to change that): on a busy machine threaded
dense factorisations of these sizes can run many times slower than on one thread, which
would measure the machine's load rather than the method.

Run: python benchmarks/scale.py [--budget SECONDS]
"""

from __future__ import annotations

import os

for _var in ("OPENBLAS_NUM_THREADS", "OMP_NUM_THREADS", "MKL_NUM_THREADS"):
    os.environ.setdefault(_var, "1")

import argparse  # noqa: E402
import math  # noqa: E402
import sys  # noqa: E402
import time  # noqa: E402
from dataclasses import dataclass  # noqa: E402
from pathlib import Path  # noqa: E402

import numpy as np  # noqa: E402

sys.path.insert(0, str(Path(__file__).resolve().parent))

from generators import FAMILIES, structure  # noqa: E402

import leastwork  # noqa: E402
from leastwork.stiffness import solve_stiffness  # noqa: E402

__all__ = ["Row", "measure", "growth_exponent", "main"]

#: Size sequences: member count roughly doubling at each step from about 100.
_SIZES = {
    "braced truss": [20, 40, 80, 160, 320, 640, 1280, 2560],
    "storey frame": [10, 14, 20, 28, 40, 57, 80, 113],
    "continuous beam": [100, 200, 400, 800, 1600, 3200, 6400, 12800],
}


@dataclass(frozen=True)
class Row:
    """One measured structure; times in seconds."""

    family: str
    size: int
    members: int
    redundants: int
    t_force: float
    t_stiffness: float
    difference: float  #: largest reaction difference / largest reaction force


def _best(fn, repeat: int) -> tuple[float, object]:
    best, out = math.inf, None
    for _ in range(repeat):
        t0 = time.perf_counter()
        out = fn()
        best = min(best, time.perf_counter() - t0)
    return best, out


def _reaction_difference(st, sol, stiff: dict) -> float:
    """Largest difference of reactions between the two methods over all load cases, relative
    to the largest reaction force; moment differences divided by the longest member (m)."""
    lref = max(st.length(m) for m in st.members)
    worst = 0.0
    for name, res in sol.cases.items():
        other = stiff[name].reactions
        scale = max([abs(v) for c in other.values() for k, v in c.items() if k != "rz"]
                    + [1e-300])
        for node, comps in res.reactions.items():
            for k, v in comps.items():
                d = abs(v - other.get(node, {}).get(k, 0.0)) / scale
                worst = max(worst, d / lref if k == "rz" else d)
    return worst


def measure(family: str, size: int) -> Row:
    """Time both methods on one structure (best of 3 below 0.2 s, else one run)."""
    st = structure(FAMILIES[family][0](size))
    t_force, sol = _best(lambda: leastwork.solve(st, verify=False), 1)
    if t_force < 0.2:
        t_force, sol = _best(lambda: leastwork.solve(st, verify=False), 3)
    run_stiff = lambda: {c: solve_stiffness(st, c) for c in st.case_names}  # noqa: E731
    t_stiff, stiff = _best(run_stiff, 1)
    if t_stiff < 0.2:
        t_stiff, stiff = _best(run_stiff, 3)
    return Row(family, size, len(st.members), sol.topology.degree, t_force, t_stiff,
               _reaction_difference(st, sol, stiff))


def growth_exponent(members: list[int], times: list[float]) -> float:
    """Slope of log(time) against log(members), least squares; nan with fewer than two
    points."""
    if len(members) < 2:
        return math.nan
    slope, _ = np.polyfit(np.log(members), np.log(times), 1)
    return float(slope)


def _family(family: str, budget: float) -> list[Row]:
    """Measure growing sizes while the next one is expected to fit in ``budget`` seconds."""
    rows: list[Row] = []
    start = time.perf_counter()
    for size in _SIZES[family]:
        if len(rows) >= 2:
            spent = time.perf_counter() - start
            p = max(1.0, growth_exponent([r.members for r in rows[-2:]],
                                         [r.t_force + r.t_stiffness for r in rows[-2:]]))
            last = rows[-1].t_force + rows[-1].t_stiffness
            ratio = 2.0  # the member count roughly doubles per step
            if spent + 2 * last * ratio ** p > budget:  # 2: repeats and set-up
                break
        row = measure(family, size)
        rows.append(row)
        print(f"{row.family:16s} {FAMILIES[family][1]}={row.size:<6d} {row.members:7d} "
              f"{row.redundants:10d} {row.t_force:9.3f} {row.t_stiffness:9.3f} "
              f"{row.t_force / row.t_stiffness:8.1f} {row.difference:10.1e}", flush=True)
    return rows


def main(argv: list[str] | None = None) -> None:
    p = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    p.add_argument("--budget", type=float, default=60.0,
                   help="seconds for the whole run, shared by the families (default 60)")
    args = p.parse_args(argv)
    print(f"BLAS threads: OPENBLAS_NUM_THREADS={os.environ['OPENBLAS_NUM_THREADS']}")
    print(f"{'family':16s} {'size':13s} {'members':>7s} {'redundants':>10s} "
          f"{'force s':>9s} {'stiff. s':>9s} {'ratio':>8s} {'reac.diff':>10s}")
    rows: list[Row] = []
    for family in FAMILIES:
        rows += _family(family, args.budget / len(FAMILIES))
    print("\ngrowth exponent (time ~ members^p, least squares on log-log):")
    print(f"{'family':16s} {'force p':>8s} {'stiff. p':>8s}")
    for family in FAMILIES:
        fam = [r for r in rows if r.family == family]
        m = [r.members for r in fam]
        print(f"{family:16s} {growth_exponent(m, [r.t_force for r in fam]):8.2f} "
              f"{growth_exponent(m, [r.t_stiffness for r in fam]):8.2f}")


if __name__ == "__main__":
    main()
