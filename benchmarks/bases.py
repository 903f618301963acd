"""Compare self-stress bases on the same mid-size structures: how local the states are,
how sparse and how well conditioned the flexibility matrix comes out, what it costs, and
whether the answer still agrees with the direct stiffness method.

Bases:

* ``released``        - unit redundant states of one released structure (the small path:
  dense rank decisions, member forces kept first so reactions become redundants);
* ``released, members`` - the same with reactions kept first (member forces as
  redundants: the alternative the small path tries when the first is ill-conditioned);
* ``local``           - the tool's local basis (docs/method.md section 15);
* ``local, plain balls`` - local, without the first test on the joints tied to two of the
  closing force's joints (least-norm over every earlier force within 1, 2, 3 members);
* ``local, kept first`` - local, trying the kept forces alone before all earlier forces in
  each set of joints (their state is unique, so it mixes in no other self-stress);
* ``local, members first`` - local, with member forces kept before reactions at each joint
  (so that reactions close the states).

Columns: states n; members a state touches (mean, max); nonzeros of the flexibility matrix
per state and as a fraction of n^2; its condition number (exact: eigenvalues of the matrix
scaled to a unit diagonal); time of the solve (s, one load case, no cross-check); largest
difference of member end forces and reactions from the stiffness solver, relative to the
largest force of either answer (moments divided by the longest member), as in scale.py.

Run: python benchmarks/bases.py   (a few minutes on a busy two-core machine)
"""

from __future__ import annotations

import os

for _var in ("OPENBLAS_NUM_THREADS", "OMP_NUM_THREADS", "MKL_NUM_THREADS"):
    os.environ.setdefault(_var, "1")

import sys  # noqa: E402
import time  # noqa: E402
from pathlib import Path  # noqa: E402

import numpy as np  # noqa: E402

sys.path.insert(0, str(Path(__file__).resolve().parent))

from generators import (  # noqa: E402
    braced_grid,
    braced_truss,
    continuous_beam,
    storey_frame,
    structure,
)
from scale import difference, force_summary  # noqa: E402

import leastwork  # noqa: E402
from leastwork.selfstress import members_per_state  # noqa: E402
from leastwork.sparse_solve import solve_local  # noqa: E402
from leastwork.topology import build_topology, choose_redundants  # noqa: E402
from leastwork.verify import solve_stiffness  # noqa: E402

__all__ = ["STRUCTURES", "BASES", "measure", "main"]

STRUCTURES = {
    "braced truss, 300 panels": lambda: braced_truss(300),
    "braced grid, 20 x 20": lambda: braced_grid(20, 20),
    "storey frame, 12 x 12": lambda: storey_frame(12, 12),
    "continuous beam, 400 supports": lambda: continuous_beam(400),
}


def _released(st, prefer: str):
    topo = build_topology(st)
    red = choose_redundants(st, topo, None, prefer=prefer)
    names = [topo.columns[j].name for j in red]
    return leastwork.solve(st, names, basis="released", verify=False)


BASES = {
    "released": lambda st: _released(st, "reactions"),
    "released, members": lambda st: _released(st, "members"),
    "local": lambda st: solve_local(st, verify=False),
    "local, plain balls": lambda st: solve_local(
        st, verify=False, basis_options={"tied_joints": False}),
    "local, kept first": lambda st: solve_local(
        st, verify=False, basis_options={"kept_first": True}),
    "local, members first": lambda st: solve_local(
        st, verify=False, basis_options={"reactions_first": False}),
}


def _members_per_state(sol) -> tuple[float, int]:
    """Mean and largest members a state touches (entries above 1e-12 of the state's
    largest: the released basis's dense states carry round-off)."""
    counts = members_per_state(sol.B, sol.topology.columns, rel=1e-12)
    return (float(np.mean(counts)), int(counts.max())) if counts.size else (0.0, 0)


def _flexibility_stats(sol) -> tuple[float, float, float]:
    D = sol.flexibility.toarray() if hasattr(sol.flexibility, "toarray") else sol.flexibility
    n = D.shape[0]
    d = np.sqrt(np.abs(np.diag(D)))
    nz = np.abs(D) > 1e-12 * np.outer(d, d)
    w = np.linalg.eigvalsh(D / np.outer(d, d))
    return nz.sum() / n, nz.sum() / n ** 2, float(w.max() / w.min())


def _difference(st, sol) -> float:
    """Largest difference from the stiffness solver (:func:`scale.difference`)."""
    theirs = {}
    for case in sol.cases:
        r = solve_stiffness(st, case)
        theirs[case] = (r.reactions, r.end_forces)
    lref = max(st.length(m) for m in st.members)
    return difference(force_summary(sol), theirs, lref)


def measure(name: str, basis: str) -> dict:
    """One row: the statistics of ``basis`` on structure ``name``."""
    st = structure(STRUCTURES[name]())
    t0 = time.perf_counter()
    sol = BASES[basis](st)
    elapsed = time.perf_counter() - t0
    mean, worst = _members_per_state(sol)
    per_state, fraction, cond = _flexibility_stats(sol)
    return {"structure": name, "members": len(st.members), "basis": basis,
            "states": sol.topology.degree, "members/state": (mean, worst),
            "nnz/state": per_state, "density": fraction, "condition": cond,
            "time": elapsed, "difference": _difference(st, sol),
            "long range": getattr(sol, "long_range_states", 0)}


def main() -> None:
    print(f"{'structure':31s} {'basis':22s} {'states':>6s} {'mbr/state':>10s} "
          f"{'nnz/state':>9s} {'density':>8s} {'cond':>9s} {'time s':>7s} {'vs stiff':>8s}")
    for name in STRUCTURES:
        for basis in BASES:
            r = measure(name, basis)
            mean, worst = r["members/state"]
            print(f"{name:31s} {basis:22s} {r['states']:6d} {mean:5.1f}/{worst:<4d} "
                  f"{r['nnz/state']:9.1f} {r['density']:8.1%} {r['condition']:9.2e} "
                  f"{r['time']:7.2f} {r['difference']:8.1e}", flush=True)


if __name__ == "__main__":
    main()
