"""Random tolerance studies: every node placed within ±t of its drawn position (in x and in y,
uniformly) and every member made within ±t of its length (a misfit), drawn afresh for each
sample and solved in full (the geometry changes), on the workers of a sweep
(:mod:`.sweep`). The draws come from one seeded generator before any solve, so the rows do
not depend on where they are solved.

For small tolerances the response is linear: the mean tends to the nominal result and the
spread of a force locked in by length errors alone to the fit-up study's exact standard
deviation (:func:`leastwork.studies.fitup.exact_std`).
"""

from __future__ import annotations

from dataclasses import replace

import numpy as np

from ..errors import CaseError
from ..model import Misfit, Structure
from ..plaintext import ECHO_LIMIT, literal
from .fitup import _tolerance_value, parse_tolerances
from .sweep import SweepPlan

__all__ = ["node_tolerances", "random_plan", "perturbed", "summary", "RANDOM_SAMPLES_LIMIT"]

#: Most samples of a random study.
RANDOM_SAMPLES_LIMIT = 100_000


def node_tolerances(text: str, st: Structure) -> dict[str, float]:
    """``"A=1mm,*=3mm"``: a position tolerance (m) per node; ``*`` every other node."""
    out: dict[str, float] = {}
    star = None
    for item in (s.strip() for s in text.split(",")):
        if not item:
            continue
        name, sep, value = (s.strip() for s in item.partition("="))
        if not sep or not name or not value:
            raise CaseError(f'"{literal(item, ECHO_LIMIT)}": expected NODE=LENGTH (e.g. '
                            "A=1mm or *=3mm)", source="command line", where="--positions")
        if name != "*" and name not in st.nodes:
            raise CaseError(f'"{literal(item, ECHO_LIMIT)}": unknown node '
                            f'"{literal(name, ECHO_LIMIT)}"', source="command line",
                            where="--positions")
        t = _tolerance_value(st, item, value)
        if name == "*":
            star = t
        else:
            out[name] = t
    return {n: out.get(n, star) for n in st.nodes if out.get(n, star)}


def random_plan(text: str, source: str, quantities: list[str], samples: int, *,
                positions: str | None = None, lengths: str | None = None,
                seed: int | None = None, case: str | None = None) -> tuple[SweepPlan, int]:
    """The plan of a random study and its seed (a fresh one when none is given)."""
    from ..io.reader import loads_case

    if positions is None and lengths is None:
        raise CaseError("give --positions and/or --tolerance for a random study",
                        source="command line", where="--random")
    if not 2 <= samples <= RANDOM_SAMPLES_LIMIT:
        raise CaseError(f"expected 2 to {RANDOM_SAMPLES_LIMIT} samples, got {samples}",
                        source="command line", where="--random")
    if not quantities:
        raise CaseError("name at least one quantity, e.g. B.y", source="command line",
                        where="--quantity")
    st = loads_case(text, source)
    if getattr(st, "is_space", False):
        from ..space.cli import refuse

        raise refuse("a random tolerance study")
    nodes = node_tolerances(positions, st) if positions else {}
    members = parse_tolerances(lengths, st) if lengths else {}
    if seed is None:
        seed = int(np.random.SeedSequence().generate_state(1)[0])
    rng = np.random.default_rng(seed)
    draws = []
    for _ in range(samples):
        moved = tuple((n, float(rng.uniform(-t, t)), float(rng.uniform(-t, t)))
                      for n, t in nodes.items())
        misfits = tuple((m, float(rng.uniform(-t, t))) for m, t in members.items())
        draws.append((moved, misfits))
    plan = SweepPlan(text, source, case, ("sample",),
                     tuple((k + 1,) for k in range(samples)), tuple(quantities),
                     perturbations=tuple(draws))
    return plan, seed


def perturbed(st: Structure, draw: tuple, case: str | None) -> Structure:
    """``st`` with its nodes moved and misfits added to load ``case`` (default: the first
    load case) as drawn."""
    moved, misfits = draw
    nodes = dict(st.nodes)
    for n, dx, dy in moved:
        nodes[n] = replace(nodes[n], x=nodes[n].x + dx, y=nodes[n].y + dy)
    name = case or st.case_names[0]
    loads = (*st.loads, *(Misfit(m, e, name) for m, e in misfits if e))
    return replace(st, nodes=nodes, loads=loads)


def summary(rows: list[dict], quantities: list[str]) -> dict[str, dict[str, float]]:
    """Mean, standard deviation, 5th and 95th percentiles of each quantity over the samples
    that solved."""
    out = {}
    for q in quantities:
        v = np.array([r[q] for r in rows if r.get(q) is not None], dtype=float)
        if not v.size:
            out[q] = {"mean": None, "std": None, "p05": None, "p95": None, "samples": 0}
            continue
        out[q] = {"mean": float(v.mean()), "std": float(v.std(ddof=1)) if v.size > 1 else 0.0,
                  "p05": float(np.percentile(v, 5)), "p95": float(np.percentile(v, 95)),
                  "samples": int(v.size)}
    return out
