"""Parameter sweeps (contract 5.6): a case solved for every combination of values of some
of its ``[parameters]``, one row of chosen results per combination.

Each sample is the case file with the parameters set, read and checked like the file
itself. Samples that change only sections, springs or loads reuse the previous sample's
topology and released structure (:func:`leastwork.reanalyse`); a sample that moves a node
is solved afresh. Samples run in chunks on local worker processes, or on a Dask cluster
(``scheduler``); rows come back in the order of the samples, and a sample that fails keeps
its row with the quantities empty and its ``error``.

Quantities, in the case's output units (the numbers of the JSON result):
``B.y`` a reaction; ``BC`` a bar's (member's) axial force; ``AB.start.m``, ``AB.end.n`` a
section force at an end; ``AB.m_max``, ``AB.m_min`` a moment extreme; ``d:B.y``,
``d:AB@2.5.y`` a displacement (the ``--at`` names).
"""

from __future__ import annotations

import itertools
import math
import re
from dataclasses import dataclass, replace

from ..errors import CaseError, LeastworkError
from ..plaintext import ECHO_LIMIT, literal

__all__ = ["SweepPlan", "parse_vary", "plan", "run_chunk", "run_plan", "sweep",
           "random_study", "quantity_units", "SAMPLES_LIMIT"]

#: Most samples one sweep solves.
SAMPLES_LIMIT = 100_000
_SOURCE = "command line"
_VARY = re.compile(r"^\s*([A-Za-z_][A-Za-z0-9_]*)\s*=\s*(-?[0-9.eE+]+)\s*([^.:]*?)\s*\.\.\s*"
                   r"(-?[0-9.eE+]+)\s*([^.:]*?)\s*:\s*([0-9]+)\s*$")


@dataclass(frozen=True)
class SweepPlan:
    """What to solve: the case text, its name in messages, the load case, the parameter
    names and the value combinations (each value a number or a quantity string), and the
    quantities."""

    text: str
    source: str
    case: str | None
    names: tuple[str, ...]
    samples: tuple[tuple, ...]
    quantities: tuple[str, ...]
    #: random studies: per sample, ((node, dx, dy), ...) and ((member, misfit), ...) in m,
    #: applied after reading (:mod:`.random_study`); None for a parameter sweep
    perturbations: tuple | None = None


def parse_vary(spec: str) -> tuple[str, list]:
    """``NAME=START..STOP:COUNT`` (START and STOP may carry the same unit, ``1000kN/m``) as
    (name, COUNT values from START to STOP, both included)."""
    m = _VARY.match(spec)
    if m is None:
        raise CaseError(f'cannot read "{literal(spec, ECHO_LIMIT)}": expected '
                        "NAME=START..STOP:COUNT, e.g. k=1000..5000:5 or k=1e3kN/m..5e3kN/m:5",
                        source=_SOURCE, where="--vary")
    name, a, ua, b, ub, count = m.groups()
    unit = ub or ua
    if ua and ub and ua != ub:
        raise CaseError(f"{name}: START and STOP in different units ({ua}, {ub})",
                        source=_SOURCE, where="--vary")
    n = int(count)
    start, stop = float(a), float(b)
    if not (math.isfinite(start) and math.isfinite(stop)) or not 1 <= n <= SAMPLES_LIMIT:
        raise CaseError(f"{name}: expected finite START and STOP and 1 to {SAMPLES_LIMIT} "
                        "values", source=_SOURCE, where="--vary")
    values = [start + (stop - start) * i / (n - 1) if n > 1 else start for i in range(n)]
    return name, [f"{v!r} {unit}" if unit else v for v in values]


def plan(text: str, source: str, vary: dict[str, list], quantities: list[str],
         case: str | None = None) -> SweepPlan:
    """The sweep of ``vary`` (parameter -> values) over the case ``text``, checked: every
    name a parameter of the case, every quantity readable, at most SAMPLES_LIMIT samples."""
    from ..io.files import parse_toml

    params = parse_toml(text, source).get("parameters", {}) or {}
    for name in vary:
        if name not in params:
            raise CaseError(f'"{literal(name, ECHO_LIMIT)}" is not one of the case\'s '
                            f"[parameters] ({', '.join(params) or 'none'})", source=_SOURCE,
                            where="--vary")
    if not quantities:
        raise CaseError("name at least one quantity, e.g. B.y", source=_SOURCE,
                        where="--quantity")
    count = math.prod(len(v) for v in vary.values())
    if count > SAMPLES_LIMIT:
        raise CaseError(f"{count} samples, more than {SAMPLES_LIMIT}", source=_SOURCE,
                        where="--vary")
    names = tuple(vary)
    samples = tuple(itertools.product(*(vary[n] for n in names)))
    return SweepPlan(text, source, case, names, samples, tuple(quantities))


def _structure(p: SweepPlan, values: tuple, index: int = 0):
    """The case with the parameters of one sample set (and, in a random study, its nodes
    moved and its members made too long or short), read and checked like a file."""
    from ..io.core import CaseReader
    from ..io.files import parse_toml
    from ..io.reader import read_structure

    data = parse_toml(p.text, p.source)
    if p.perturbations is None:
        data.setdefault("parameters", {})
        data["parameters"].update(zip(p.names, values, strict=True))
    st = read_structure(CaseReader(data, p.source))
    if getattr(st, "is_space", False):
        from ..space.cli import refuse

        raise refuse("leastwork sweep")
    if p.perturbations is not None:
        from .random_study import perturbed

        st = perturbed(st, p.perturbations[index], p.case)
    wanted = [q[2:] for q in p.quantities if q.startswith("d:")]
    if wanted:
        st = replace(st, displacements=tuple(dict.fromkeys([*st.displacements, *wanted])))
    return st


def _value(entry: dict, q: str, where: str) -> float | None:
    """Quantity ``q`` from a case entry of the JSON result."""
    if q.startswith("d:"):
        return entry["displacements"][q[2:]]
    head, _, rest = q.partition(".")
    members, reactions = entry["members"], entry["reactions"]
    if head in reactions and rest in reactions[head]:
        return reactions[head][rest]
    if head in members:
        m = members[head]
        if not rest:
            return m["start"]["n"]
        if rest in ("m_max", "m_min"):
            return m[rest]["value"]
        end, _, force = rest.partition(".")
        if end in ("start", "end") and force in ("n", "v", "m"):
            return m[end][force]
    raise CaseError(f'cannot read the quantity "{literal(q, ECHO_LIMIT)}": expected a '
                    "reaction B.y, a member id, AB.start.m / AB.end.n, AB.m_max / AB.m_min "
                    "or a displacement d:B.y", source=_SOURCE, where=where)


def _magnitude(value):
    """A parameter value as a row shows it: the number of a quantity string ("2000.0 kN/m"
    -> 2000.0; its unit is in :func:`quantity_units`)."""
    if isinstance(value, str):
        head = value.split()[0] if value.split() else value
        try:
            return float(head)
        except ValueError:
            return value
    return value


def quantity_units(p: SweepPlan) -> dict[str, str]:
    """The unit of each varied parameter given with one, and the output unit of each
    quantity (those of the case's first sample)."""
    from ..output.quantities import quantities

    q = quantities(_structure(p, p.samples[0]).units)
    out = {}
    for name, value in zip(p.names, p.samples[0], strict=True):
        if isinstance(value, str) and len(value.split()) > 1:
            out[name] = value.split(maxsplit=1)[1]
    for name in p.quantities:
        if name.startswith("d:"):
            out[name] = "rad" if name.endswith(".rz") else q.displacement_unit
        elif name.endswith((".rz", ".m", ".m_max", ".m_min")):
            out[name] = q.moment_unit
        else:
            out[name] = q.force_unit
    return out


def run_chunk(p: SweepPlan, first: int, count: int) -> list[dict]:
    """Rows of samples ``first`` to ``first + count - 1`` (in a worker process or on a Dask
    worker): each sample reanalysed from the previous one when its layout is the same."""
    from ..solve import solve
    from ..studies.reanalysis import reanalyse

    rows, previous = [], None
    for index in range(first, first + count):
        values = p.samples[index]
        row: dict = {n: _magnitude(v) for n, v in zip(p.names, values, strict=True)}
        try:
            st = _structure(p, values, index)
            sol = None
            if previous is not None:
                try:
                    sol = reanalyse(previous, st)
                except CaseError:
                    sol = None
            sol = sol or solve(st)
            previous = sol
            data = sol.to_dict()
            case = p.case or next(iter(data["cases"]))
            if case not in data["cases"]:
                raise CaseError(f'no load case "{literal(case, ECHO_LIMIT)}"',
                                source=_SOURCE, where="--case")
            for q in p.quantities:
                row[q] = _value(data["cases"][case], q, "--quantity")
        except LeastworkError as exc:
            if isinstance(exc, CaseError) and exc.where in ("--quantity", "--case"):
                raise  # a wrong name on the command line, not a failed sample
            row.update(dict.fromkeys(p.quantities))
            row["error"] = str(exc)
        rows.append(row)
    return rows


def _chunks(n: int, parts: int) -> list[tuple[int, int]]:
    size = max(1, math.ceil(n / max(parts, 1)))
    return [(i, min(size, n - i)) for i in range(0, n, size)]


def run_plan(p: SweepPlan, workers: int = 1, scheduler: str | None = None,
             progress=None) -> list[dict]:
    """Every row of ``p`` in sample order: on one process (``workers=1``), on local worker
    processes, or on the Dask cluster at ``scheduler``. ``progress(done, total)`` is called
    as chunks finish."""
    n = len(p.samples)
    chunks = _chunks(n, 1 if workers <= 1 and scheduler is None else 4 * max(workers, 1))
    if scheduler is not None:
        return _on_dask(p, chunks, scheduler, progress)
    if workers <= 1:
        rows: list[dict] = []
        for first, count in chunks:
            rows += run_chunk(p, first, count)
            if progress:
                progress(len(rows), n)
        return rows
    from concurrent.futures import ProcessPoolExecutor

    out: dict[int, list[dict]] = {}
    with ProcessPoolExecutor(max_workers=workers) as pool:
        futures = {pool.submit(run_chunk, p, first, count): first for first, count in chunks}
        from concurrent.futures import as_completed

        for fut in as_completed(futures):
            out[futures[fut]] = fut.result()
            if progress:
                progress(sum(len(v) for v in out.values()), n)
    return [row for first in sorted(out) for row in out[first]]


def _on_dask(p: SweepPlan, chunks, scheduler: str, progress) -> list[dict]:
    """The chunks on a Dask distributed cluster, gathered in order."""
    try:
        from dask.distributed import Client, as_completed
    except ImportError:
        raise CaseError("--scheduler needs Dask: pip install 'dask[distributed]'",
                        source=_SOURCE, where="--scheduler") from None
    try:
        client = Client(scheduler, timeout=20) if isinstance(scheduler, str) else scheduler
    except OSError as exc:
        raise CaseError(f"no Dask scheduler at {literal(str(scheduler), ECHO_LIMIT)} ({exc})",
                        source=_SOURCE, where="--scheduler") from None
    try:
        futures = [client.submit(run_chunk, p, first, count, pure=False)
                   for first, count in chunks]
        done = 0
        for fut in as_completed(futures):
            done += len(fut.result())
            if progress:
                progress(done, len(p.samples))
        return [row for fut in futures for row in fut.result()]
    except LeastworkError:
        raise
    except Exception as exc:  # the cluster, not a sample: samples keep their own errors
        first = re.split(r"(?<=\.)\s|\n", str(exc).strip())[0] or type(exc).__name__
        raise CaseError(
            f"the Dask cluster at {literal(str(scheduler), ECHO_LIMIT)} could not run the "
            f"samples ({literal(first, ECHO_LIMIT)}); the scheduler and every worker need "
            "leastwork installed, the same version as here", source=_SOURCE,
            where="--scheduler") from None
    finally:
        if isinstance(scheduler, str):
            client.close()


def sweep(case, vary: dict[str, list], quantities: list[str], *, scheduler=None,
          workers: int = 1, load_case: str | None = None):
    """A sweep from Python: ``case`` a case file's path, or a structure read from one;
    ``vary`` parameter -> values (numbers in the case's units, or quantity strings);
    ``quantities`` as the command's. Returns a pandas DataFrame, one row per combination,
    a column per parameter and quantity (and ``error`` when a sample failed).
    ``scheduler``: a Dask scheduler's address (or a ``dask.distributed.Client``)."""
    import pandas as pd

    from ..io.files import read_case_text

    path = getattr(case, "source", case)
    text = read_case_text(path)
    p = plan(text, str(path), {k: list(v) for k, v in vary.items()}, list(quantities),
             load_case)
    return pd.DataFrame(run_plan(p, workers=workers, scheduler=scheduler))


def random_study(case, quantities: list[str], samples: int, *, positions: str | None = None,
                 lengths: str | None = None, seed: int | None = None, scheduler=None,
                 workers: int = 1, load_case: str | None = None):
    """A random tolerance study from Python (:mod:`.random_study`): node positions within
    ``positions`` ("*=3mm") and member lengths within ``lengths`` ("*=1mm") drawn afresh
    for each of ``samples`` full solves. Returns a pandas DataFrame (a row per sample; the
    seed in ``frame.attrs["seed"]``)."""
    import pandas as pd

    from ..io.files import read_case_text
    from .random_study import random_plan

    path = getattr(case, "source", case)
    p, used = random_plan(read_case_text(path), str(path), list(quantities), samples,
                          positions=positions, lengths=lengths, seed=seed, case=load_case)
    frame = pd.DataFrame(run_plan(p, workers=workers, scheduler=scheduler))
    frame.attrs["seed"] = used
    return frame
