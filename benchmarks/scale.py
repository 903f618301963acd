"""How solve time and memory grow with the size of the structure: the force method on the
local self-stress basis (sparse throughout) against the project's own direct stiffness
solver (sparse), on the same structures, with their agreement.

For each family of :mod:`generators` (cross-braced truss, cross-braced grid, multi-bay
multi-storey frame, continuous beam, cross-braced truss on a support every 50 panels) the size starts near 100 members and roughly doubles
the member count (up to just over 10^5, or ``--max-members``) until the next size would
overrun the family's share of the time budget, judged from the growth seen so far.

Each size is measured in a fresh interpreter (``--measure FAMILY SIZE``), so that no size
inherits the memory of another. In it, after the imports and after reading the structure,
each method runs in a forked copy of that interpreter (same state, same structure object):
its time is the best of 3 runs when one run is under 0.2 s, else one run. Its memory is the
copy's peak resident set (``ru_maxrss`` of ``resource.getrusage``) less the file-backed
pages it holds at the end (library code, ``RssFile`` of /proc/self/status: a fork counts
those only as it touches them again, which would add a constant 10-15 MiB), minus the
anonymous memory (``RssAnon``) of the interpreter right after the imports (those the
reader makes when first used included: a few tiny cases are read first), before the
structure was read. So memory is the data of model plus solve above the imported modules,
in MiB, the sparse LU factors held by C code included (tracemalloc would miss those).
Without /proc, plain ``ru_maxrss`` differences; without ``os.fork`` (not POSIX) the methods
run in the interpreter itself and memory is not reported.

The table: members, redundants, nonzeros of the flexibility matrix, of its factor (L + U)
and of the stiffness factor, the time of each method, their ratio, peak memory of each, and
the largest difference of member end forces (n, v, m at both ends) and reactions between
the methods relative to the largest force (moments divided by the longest member). Then the
growth exponent of time and memory, fitted by least squares on log-log over the largest
sizes (up to four), and the split of the force method's time over its phases for the
largest size of each family. ``--dense`` adds the old released-structure (dense) path where
the structure has at most ``DENSE_MAX_COLUMNS`` basic forces and reactions.

No assertions on wall-clock: machines differ, and a busy machine slows one method more than
the other at times. BLAS threads are set to one unless the environment says otherwise (set
``OPENBLAS_NUM_THREADS`` etc. before running to change that).

Run: python benchmarks/scale.py [--budget SECONDS] [--max-members N] [--dense]
"""

from __future__ import annotations

import os

for _var in ("OPENBLAS_NUM_THREADS", "OMP_NUM_THREADS", "MKL_NUM_THREADS"):
    os.environ.setdefault(_var, "1")

import argparse  # noqa: E402
import dataclasses  # noqa: E402
import gc  # noqa: E402
import json  # noqa: E402
import math  # noqa: E402
import pickle  # noqa: E402
import subprocess  # noqa: E402
import sys  # noqa: E402
import tempfile  # noqa: E402
import time  # noqa: E402
from collections.abc import Callable  # noqa: E402
from dataclasses import dataclass  # noqa: E402
from pathlib import Path  # noqa: E402

import numpy as np  # noqa: E402

sys.path.insert(0, str(Path(__file__).resolve().parent))

# the modules both methods use, imported before any timing (the package imports them on
# first use only)
import scipy.linalg  # noqa: E402,F401
import scipy.sparse.csgraph  # noqa: E402,F401
import scipy.sparse.linalg  # noqa: E402,F401
from generators import FAMILIES, structure  # noqa: E402

import leastwork  # noqa: E402
import leastwork.selfstress  # noqa: E402,F401
import leastwork.sparse_solve  # noqa: E402,F401
import leastwork.verify.stiffness  # noqa: E402,F401
from leastwork.solve import column_count  # noqa: E402
from leastwork.verify import solve_stiffness  # noqa: E402

__all__ = ["Row", "Run", "members_of", "sizes", "measure", "measure_fresh", "difference", "force_summary",
           "growth_exponent", "format_row", "main", "DENSE_MAX_COLUMNS", "MAX_MEMBERS"]

#: Default largest member count: every family's last size is then just over 10^5.
MAX_MEMBERS = 110_000

#: Basic forces and reactions up to which ``--dense`` also runs the released (dense) path.
DENSE_MAX_COLUMNS = 3000

#: Size parameter of the smallest structure of each family (about 100 members) and the
#: factor that roughly doubles its member count.
_START = {"braced truss": (20, 2.0), "braced grid": (5, math.sqrt(2.0)),
          "storey frame": (10, math.sqrt(2.0)), "continuous beam": (100, 2.0),
          "multi-support truss": (20, 2.0)}

#: Summary of one load case: (reactions, member end forces), SI, as both methods give them.
Summary = dict[str, tuple[dict[str, dict[str, float]], dict[str, tuple[tuple, tuple]]]]


def members_of(family: str, size: int) -> int:
    """Member count of ``family`` at ``size`` without reading the structure."""
    if family in ("braced truss", "multi-support truss"):
        return 5 * size + 1
    if family == "braced grid":
        return 4 * size * size + size
    if family == "storey frame":
        return (2 * size + 1) * max(1, size // 2)
    if family == "continuous beam":
        return size - 1
    raise KeyError(family)


def sizes(family: str, max_members: int = MAX_MEMBERS) -> list[int]:
    """Size parameters of ``family`` from about 100 members, the member count roughly
    doubling, while it stays at most ``max_members``."""
    first, factor = _START[family]
    out: list[int] = []
    x = float(first)
    while members_of(family, round(x)) <= max_members:
        out.append(round(x))
        x *= factor
    return out


@dataclass(frozen=True)
class Run:
    """One method on one structure: best time (s), peak memory above the imports (MiB,
    nan when not measured), what the method reports, and the error that stopped it."""

    seconds: float = math.nan
    memory: float = math.nan
    info: dict = dataclasses.field(default_factory=dict)
    summary: Summary | None = None
    failure: str = ""


@dataclass(frozen=True)
class Row:
    """One measured structure; times in seconds, memory in MiB above the imported
    modules, nonzero counts of the sparse matrices (0: not reported)."""

    family: str
    size: int
    members: int
    redundants: int
    flex_nonzeros: int  #: of the flexibility matrix
    flex_factor_nonzeros: int  #: of its sparse LU factor, L + U
    stiff_factor_nonzeros: int  #: of the reduced stiffness factor (0 until reported)
    t_force: float
    t_stiffness: float
    mem_force: float
    mem_stiffness: float
    difference: float  #: largest end-force or reaction difference / largest force
    condition: float  #: condition estimate of the Jacobi-scaled flexibility matrix
    phases: tuple[tuple[str, float], ...] = ()  #: force method: (phase, seconds)
    t_dense: float = math.nan
    mem_dense: float = math.nan
    failures: tuple[str, ...] = ()

    @property
    def ratio(self) -> float:
        """Force time over stiffness time."""
        return self.t_force / self.t_stiffness if self.t_stiffness > 0 else math.nan


# ------------------------------------------------------------------------- one method

def _best(fn: Callable[[], object], repeat: int = 3, quick: float = 0.2):
    """Best wall-clock time (s) of ``fn`` (repeated only when one run is under ``quick``),
    the last output and the index of the best run."""
    best, out, which = math.inf, None, 0
    for i in range(repeat):
        t0 = time.perf_counter()
        out = None  # let the previous answer go before the next run
        out = fn()
        t = time.perf_counter() - t0
        if t < best:
            best, which = t, i
        if t >= quick:
            break
    return best, out, which


def force_summary(sol) -> Summary:
    return {name: (res.reactions, {mid: (tuple(m.start), tuple(m.end))
                                   for mid, m in res.members.items()})
            for name, res in sol.cases.items()}


def _run_force(st, basis: str) -> Run:
    """The force method on ``basis`` ("local" or "released"), timed, phases recorded."""
    stamps: list[list[tuple[str, float]]] = []

    def once():
        marks: list[tuple[str, float]] = []
        stamps.append(marks)
        out = leastwork.solve(st, verify=False, basis=basis,
                              progress=lambda phase: marks.append((phase, time.perf_counter())))
        marks.append(("", time.perf_counter()))
        return out

    seconds, sol, which = _best(once)
    marks = stamps[which]
    phases = tuple((a, b2 - b1) for (a, b1), (_, b2) in zip(marks, marks[1:]))
    flex = sol.flexibility
    nnz = int(flex.nnz) if hasattr(flex, "nnz") else int(np.count_nonzero(flex))
    solver = sol.flexibility_solver
    info = {"redundants": int(sol.topology.degree), "flex_nonzeros": nnz,
            "flex_factor_nonzeros": int(getattr(solver, "nonzeros", 0)),
            "condition": float(sol.condition), "phases": phases}
    return Run(seconds, info=info, summary=force_summary(sol))


def _run_stiffness(st) -> Run:
    """The direct stiffness method, every load case, timed."""
    seconds, res, _ = _best(lambda: {c: solve_stiffness(st, c) for c in st.case_names})
    nnz = max((int(getattr(r, "factor_nonzeros", 0)) for r in res.values()), default=0)
    summary = {c: (r.reactions, r.end_forces) for c, r in res.items()}
    return Run(seconds, info={"factor_nonzeros": nnz}, summary=summary)


def _guarded(run: Callable[[], Run]) -> Run:
    """``run()``, or a Run that says why it failed (a benchmark records failures)."""
    try:
        return run()
    except Exception as exc:  # noqa: BLE001 - any failure is a result to report
        return Run(failure=f"{type(exc).__name__}: {str(exc).splitlines()[0][:160]}")


# ------------------------------------------------------------------ memory by fork

def _status_mib(key: str) -> float:
    """A ``kB`` field of /proc/self/status in MiB; nan where there is no such file."""
    try:
        with open("/proc/self/status", encoding="ascii") as f:
            for line in f:
                if line.startswith(key + ":"):
                    return int(line.split()[1]) / 1024
    except OSError:
        pass
    return math.nan


def _peak_data_mib() -> float:
    """Peak resident set of this process (``ru_maxrss``; KiB on Linux, bytes on macOS) less
    its file-backed pages now resident (library code, Linux ``RssFile``): the peak of its
    data memory, MiB. Plain ``ru_maxrss`` where /proc is missing."""
    import resource

    r = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss
    peak = r / 2**20 if sys.platform == "darwin" else r / 1024
    files = _status_mib("RssFile")
    return peak - files if math.isfinite(files) else peak


def _data_mib() -> float:
    """Data memory of this process now (Linux ``RssAnon`` + ``RssShmem``), MiB; without
    /proc, the peak as :func:`_peak_data_mib` gives it."""
    anon = _status_mib("RssAnon")
    if not math.isfinite(anon):
        return _peak_data_mib()
    shmem = _status_mib("RssShmem")
    return anon + (shmem if math.isfinite(shmem) else 0.0)


def _forked(run: Callable[[], Run], folder: str, tag: str) -> Callable[[], Run]:
    """Run ``run`` in a forked copy of this process; the returned function gives its Run
    with ``memory`` = the copy's peak data memory (:func:`_peak_data_mib`, MiB, absolute).
    The copy writes its answer to a file, so that this process holds nothing more while
    later copies are forked."""
    path = os.path.join(folder, tag)
    sys.stdout.flush()
    sys.stderr.flush()
    pid = os.fork()
    if pid == 0:  # the copy
        code = 1
        try:
            out = _guarded(run)
            out = dataclasses.replace(out, memory=_peak_data_mib())
            with open(path, "wb") as f:
                pickle.dump(out, f, protocol=pickle.HIGHEST_PROTOCOL)
            code = 0
        finally:
            os._exit(code)
    _, status = os.waitpid(pid, 0)

    def result() -> Run:
        if status != 0 or not os.path.exists(path):
            return Run(failure=f"the measuring process ended with status {status}")
        with open(path, "rb") as f:
            return pickle.load(f)

    return result


def _in_process(run: Callable[[], Run]) -> Callable[[], Run]:
    out = _guarded(run)
    return lambda: out


# --------------------------------------------------------------------- agreement

def difference(ours: Summary, theirs: Summary, lref: float) -> float:
    """Largest difference of reactions and member end forces (n, v, m at both ends) over
    all load cases, relative to the largest force of either answer (reaction forces, end
    n and v); moment differences are divided by ``lref`` (m, the longest member). A
    reaction or member missing from one side counts as zero there."""
    worst = 0.0
    for case, (r1, e1) in ours.items():
        r2, e2 = theirs[case]
        forces = [abs(v) for r in (r1, r2) for c in r.values() for k, v in c.items()
                  if k != "rz"]
        forces += [abs(v) for e in (e1, e2) for ends in e.values() for end in ends
                   for v in end[:2]]
        scale = max(forces + [1e-300])
        for node in set(r1) | set(r2):
            a, b = r1.get(node, {}), r2.get(node, {})
            for k in set(a) | set(b):
                d = abs(a.get(k, 0.0) - b.get(k, 0.0)) / scale
                worst = max(worst, d / lref if k == "rz" else d)
        zero = ((0.0, 0.0, 0.0), (0.0, 0.0, 0.0))
        for mid in set(e1) | set(e2):
            for end1, end2 in zip(e1.get(mid, zero), e2.get(mid, zero)):
                for q, (a, b) in enumerate(zip(end1, end2)):
                    d = abs(a - b) / scale
                    worst = max(worst, d / lref if q == 2 else d)
    return worst


# ----------------------------------------------------------------------- one size

def _warm_reader() -> None:
    """Read one tiny case of every family, so that the modules the reader imports only when
    first used (the unit registry: about 7 MiB) count as imported, not as the model's."""
    from generators import braced_grid, braced_truss, continuous_beam, storey_frame

    for text in (braced_truss(1), braced_grid(1, 1), storey_frame(1, 1), continuous_beam(3)):
        structure(text)


def measure(family: str, size: int, *, dense: bool = False) -> Row:
    """Measure one structure of ``family`` at ``size`` in this process (methods in forked
    copies where the platform can fork); ``dense`` adds the released path when the
    structure has at most ``DENSE_MAX_COLUMNS`` columns."""
    fork = hasattr(os, "fork")
    with tempfile.TemporaryDirectory(prefix="leastwork-scale-") as folder:
        _warm_reader()
        gc.collect()
        base = _data_mib() if fork else math.nan  # the interpreter with its imports only
        text = FAMILIES[family][0](size)
        st = structure(text)
        del text
        gc.collect()
        start = (lambda r, tag: _forked(r, folder, tag)) if fork else \
            (lambda r, tag: _in_process(r))
        # every copy is forked before any answer is read back, so that none inherits one
        pending = [start(lambda: _run_force(st, "local"), "force"),
                   start(lambda: _run_stiffness(st), "stiffness")]
        if dense and column_count(st) <= DENSE_MAX_COLUMNS:
            pending.append(start(lambda: _run_force(st, "released"), "dense"))
        force, stiff, old = [get() for get in pending] + [Run()] * (3 - len(pending))
    lref = max((st.length(m) for m in st.members), default=1.0)
    diff = math.nan
    if force.summary is not None and stiff.summary is not None:
        diff = difference(force.summary, stiff.summary, lref)
        if old.summary is not None:
            diff = max(diff, difference(old.summary, stiff.summary, lref))
    f = force.info
    failures = tuple(f"{name}: {run.failure}" for name, run in
                     (("force", force), ("stiffness", stiff), ("dense", old)) if run.failure)
    return Row(family, size, len(st.members), f.get("redundants", -1),
               f.get("flex_nonzeros", 0), f.get("flex_factor_nonzeros", 0),
               stiff.info.get("factor_nonzeros", 0), force.seconds, stiff.seconds,
               force.memory - base, stiff.memory - base, diff, f.get("condition", math.nan),
               f.get("phases", ()), old.seconds, old.memory - base, failures)


def measure_fresh(family: str, size: int, *, dense: bool = False,
                  timeout: float | None = None) -> Row:
    """:func:`measure` in a fresh interpreter (this script with ``--measure``)."""
    cmd = [sys.executable, str(Path(__file__).resolve()), "--measure", family, str(size)]
    if dense:
        cmd.append("--dense")
    run = subprocess.run(cmd, capture_output=True, text=True, check=True, timeout=timeout)
    data = json.loads(run.stdout.strip().splitlines()[-1])
    data["phases"] = tuple(tuple(p) for p in data["phases"])
    data["failures"] = tuple(data["failures"])
    return Row(**data)


def _row_json(row: Row) -> str:
    return json.dumps(dataclasses.asdict(row))  # nan is written as NaN, read back as nan


# ------------------------------------------------------------------------ summary

def growth_exponent(members: list[int], values: list[float], last: int = 0) -> float:
    """Slope p of log(value) against log(members) (value ~ members^p), least squares over
    the ``last`` largest sizes (all when 0), leaving out non-positive and nan values; nan
    with fewer than two points left."""
    pts = [(m, v) for m, v in zip(members, values) if v > 0 and math.isfinite(v)]
    pts = sorted(pts)[-last:] if last else pts
    if len({m for m, _ in pts}) < 2:
        return math.nan
    slope, _ = np.polyfit(np.log([m for m, _ in pts]), np.log([v for _, v in pts]), 1)
    return float(slope)


#: The growth exponents are fitted on this many of the largest sizes (small sizes are
#: dominated by fixed costs).
FIT_LAST = 4


def _header(dense: bool) -> str:
    h = (f"{'family':15s} {'size':>5s} {'members':>7s} {'redund.':>7s} {'nnz flex':>9s} "
         f"{'nnz fl.LU':>10s} {'nnz K LU':>9s} {'force s':>8s} {'stiff s':>8s} "
         f"{'ratio':>6s} ")
    if dense:
        h += f"{'dense s':>8s} "
    h += f"{'MiB frc':>7s} {'MiB stf':>7s} "
    if dense:
        h += f"{'MiB dns':>7s} "
    return h + f"{'diff.':>8s}"


def format_row(row: Row, dense: bool = False) -> str:
    """One line of the table (see :func:`_header`)."""
    s = (f"{row.family:15s} {row.size:5d} {row.members:7d} {row.redundants:7d} "
         f"{row.flex_nonzeros:9d} {row.flex_factor_nonzeros:10d} {row.stiff_factor_nonzeros:9d} "
         f"{row.t_force:8.3f} {row.t_stiffness:8.3f} {row.ratio:6.2f} ")
    if dense:
        s += f"{row.t_dense:8.3f} "
    s += f"{row.mem_force:7.1f} {row.mem_stiffness:7.1f} "
    if dense:
        s += f"{row.mem_dense:7.1f} "
    s += f"{row.difference:8.1e}"
    for failure in row.failures:
        s += f"\n    ! {failure}"
    return s


def _cost(row: Row) -> dict[str, float]:
    """Seconds each timed method took in all, repeats included (see :func:`_best`)."""
    return {k: (3 * t if t < 0.2 else t) for k, t in
            (("force", row.t_force), ("stiffness", row.t_stiffness), ("dense", row.t_dense))
            if math.isfinite(t)}


def _predict(rows: list[Row], walls: list[float], members: int) -> tuple[float, float]:
    """Expected wall-clock seconds of measuring ``members`` members, and of its dense part,
    from the last two sizes: each method's time grows with its own exponent (at least 1),
    the rest (start-up, reading) in proportion to members."""
    (r0, w0), (r1, w1) = zip(rows[-2:], walls[-2:])
    ratio = members / r1.members
    c0, c1 = _cost(r0), _cost(r1)
    rest = max(w1 - sum(c1.values()), 0.0) * ratio
    parts = {}
    for k, t1 in c1.items():
        t0 = c0.get(k, math.nan)
        p = math.log(t1 / t0) / math.log(r1.members / r0.members) \
            if t0 > 0 and t1 > 0 and r1.members > r0.members else 1.0
        parts[k] = t1 * ratio ** max(1.0, p)
    return rest + sum(parts.values()), parts.get("dense", 0.0)


def _family(family: str, budget: float, max_members: int, dense: bool) -> list[Row]:
    """Measure growing sizes while the next one is expected to fit in ``budget`` seconds
    (at least two sizes, for a growth exponent); the dense path only while its next run
    is expected to take under a quarter of what is left."""
    rows: list[Row] = []
    walls: list[float] = []
    start = time.perf_counter()
    dense_on = dense
    for size in sizes(family, max_members):
        total = 60.0
        if len(rows) >= 2:
            left = budget - (time.perf_counter() - start)
            total, dense_part = _predict(rows, walls, members_of(family, size))
            if dense_on and dense_part > left / 4:
                dense_on = False
                total -= dense_part
            if total > left:
                break
        t0 = time.perf_counter()
        try:
            row = measure_fresh(family, size, dense=dense_on, timeout=max(120.0, 10 * total))
        except (subprocess.CalledProcessError, subprocess.TimeoutExpired) as exc:
            why = (getattr(exc, "stderr", "") or "").strip().splitlines()[-1:] or [str(exc)]
            print(f"{family:15s} {size:5d} ! the measuring process failed: {why[0]}",
                  flush=True)
            break
        walls.append(time.perf_counter() - t0)
        rows.append(row)
        dense_on = dense_on and math.isfinite(row.t_dense)  # nan: too many columns
        print(format_row(row, dense), flush=True)
    return rows


def _summary(rows: list[Row], dense: bool) -> None:
    print(f"\ngrowth exponent p (quantity ~ members^p), least squares on log-log over the "
          f"{FIT_LAST} largest sizes:")
    cols = ["time force", "time stiff."] + (["time dense"] if dense else []) + \
        ["mem force", "mem stiff."]
    print(f"{'family':15s} {'members':>15s} " + " ".join(f"{c:>11s}" for c in cols))
    for family in FAMILIES:
        fam = [r for r in rows if r.family == family]
        if not fam:
            continue
        m = [r.members for r in fam]
        series = [[r.t_force for r in fam], [r.t_stiffness for r in fam]]
        if dense:
            series.append([r.t_dense for r in fam])
        series += [[r.mem_force for r in fam], [r.mem_stiffness for r in fam]]
        used = sorted(m)[-FIT_LAST:]
        span = f"{used[0]}-{used[-1]}"
        print(f"{family:15s} {span:>15s} "
              + " ".join(f"{growth_exponent(m, s, FIT_LAST):11.2f}" for s in series))
    print("\nforce method, split of time over its phases at the largest size of each family:")
    for family in FAMILIES:
        fam = [r for r in rows if r.family == family and r.phases]
        if not fam:
            continue
        row = fam[-1]
        total = sum(t for _, t in row.phases) or 1.0
        parts = ", ".join(f"{name} {t:.3f} s ({100 * t / total:.0f}%)"
                          for name, t in row.phases)
        print(f"{family:15s} {row.members:7d} members: {parts}")


def main(argv: list[str] | None = None) -> None:
    p = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    p.add_argument("--budget", type=float, default=120.0,
                   help="seconds for the whole run, shared by the families (default 120)")
    p.add_argument("--max-members", type=int, default=MAX_MEMBERS,
                   help=f"largest member count measured (default {MAX_MEMBERS})")
    p.add_argument("--dense", action="store_true",
                   help=f"also the released (dense) path, up to {DENSE_MAX_COLUMNS} columns")
    p.add_argument("--family", choices=list(FAMILIES), action="append",
                   help="measure only this family (repeatable)")
    p.add_argument("--measure", nargs=2, metavar=("FAMILY", "SIZE"),
                   help=argparse.SUPPRESS)  # one size, as JSON: the fresh interpreter's job
    args = p.parse_args(argv)
    if args.measure:
        print(_row_json(measure(args.measure[0], int(args.measure[1]), dense=args.dense)))
        return
    families = args.family or list(FAMILIES)
    print(f"BLAS threads: OPENBLAS_NUM_THREADS={os.environ['OPENBLAS_NUM_THREADS']}; "
          f"cores: {os.cpu_count()}; budget {args.budget:g} s\n"
          "memory: peak data memory (ru_maxrss less file-backed pages) of a forked copy, "
          "above the interpreter with its imports, MiB")
    print(_header(args.dense))
    rows: list[Row] = []
    start = time.perf_counter()
    for i, family in enumerate(families):
        left = args.budget - (time.perf_counter() - start)
        rows += _family(family, left / (len(families) - i), args.max_members, args.dense)
    print(f"(total {time.perf_counter() - start:.0f} s)")
    _summary(rows, args.dense)


if __name__ == "__main__":
    main()
