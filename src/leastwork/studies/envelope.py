"""Envelopes over load combinations: per member the largest and smallest n, v and m along
it, per support the extreme reactions, each with the combination that governs.

:func:`combination_envelope` is the envelope every output reports (the JSON result, the
sheet, the summary); ``Solution.combination_envelope`` keeps it once found."""

from __future__ import annotations

__all__ = ["envelope", "combination_envelope", "group_envelopes"]


def envelope(sol, names) -> dict:
    """Extremes over the load cases (or combinations) ``names`` of ``sol`` (SI values).

    Returns ``{"members": {ID: {q: {"max": (value, at, name), "min": (...)}}},
    "reactions": {NODE: {d: {"max": (value, name), "min": (value, name)}}}}`` with q in
    n, v, m. Ties keep the first name in ``names``.
    """
    members: dict = {}
    reactions: dict = {}
    for name in names:
        res = sol.cases[name]
        for mid, mr in res.members.items():
            slot = members.setdefault(mid, {})
            for q, field in (("n", mr.n), ("v", mr.v), ("m", mr.m)):
                (hi, at_hi), (lo, at_lo) = field.extremes()
                e = slot.setdefault(q, {"max": (hi, at_hi, name), "min": (lo, at_lo, name)})
                if hi > e["max"][0]:
                    e["max"] = (hi, at_hi, name)
                if lo < e["min"][0]:
                    e["min"] = (lo, at_lo, name)
        for node, comps in res.reactions.items():
            slot = reactions.setdefault(node, {})
            for d, v in comps.items():
                e = slot.setdefault(d, {"max": (v, name), "min": (v, name)})
                if v > e["max"][0]:
                    e["max"] = (v, name)
                if v < e["min"][0]:
                    e["min"] = (v, name)
    return {"members": members, "reactions": reactions}


def combination_envelope(sol) -> dict | None:
    """:func:`envelope` over the load combinations of ``sol``, in the order they are
    written, with their names under ``"combinations"``; None without combinations. Use
    ``sol.combination_envelope``, which finds it once."""
    names = [name for name, _ in sol.structure.combinations]
    if not names:
        return None
    return {"combinations": names, **envelope(sol, names)}


def group_envelopes(sol) -> dict[str, dict]:
    """:func:`envelope` of each ``[envelopes]`` group (strength apart from serviceability,
    say), with its combinations under ``"combinations"``; empty without groups. Use
    ``sol.group_envelopes``, which finds them once."""
    return {group: {"combinations": list(names), **envelope(sol, names)}
            for group, names in sol.structure.envelope_groups}
