"""The JSON result of the interface contract (section 4), in the case units (or those of
``--units``). The numbers come from :mod:`leastwork.output.reported`, as on every other
output; this module only lays them out."""

from __future__ import annotations

import numpy as np

from .quantities import quantities
from .reported import (
    ROUND_OFF,
    case_numbers,
    envelope_numbers,
    flexibility_rows,
    number,
)

__all__ = ["solution_to_dict", "SCHEMA", "flexibility_rows"]

SCHEMA = "leastwork.result/1"


def _sparse_flexibility(sol) -> dict:
    """Local basis: the flexibility matrix of the state amplitudes as its nonzero entries
    (row, column, value in the output units), upper triangle and diagonal (it is
    symmetric)."""
    q = quantities(sol.units)
    red_cols = [sol.topology.columns[j] for j in sol.redundant_columns]
    delta = sol.flexibility.tocoo()
    diag = np.sqrt(np.abs(sol.flexibility.diagonal()))
    keep = (delta.row <= delta.col) & (np.abs(delta.data) > ROUND_OFF * diag[delta.row]
                                       * diag[delta.col])
    r, c, v = delta.row[keep], delta.col[keep], delta.data[keep]
    order = np.lexsort((c, r))
    r, c, v = r[order], c[order], v[order]
    xu = np.asarray([q.column_factor(col) for col in red_cols])
    du = np.asarray([q.conjugate_factor(col) for col in red_cols])
    return {"format": "sparse upper triangle", "size": int(delta.shape[0]),
            "rows": [int(i) for i in r], "columns": [int(j) for j in c],
            "values": [number(x) for x in v * xu[c] / du[r]]}


def solution_to_dict(sol) -> dict:
    st = sol.structure
    topo = sol.topology
    u = sol.units
    flex = flexibility_rows(sol) if sol.basis != "local" else _sparse_flexibility(sol)
    cases = {}
    for name in sol.cases:
        n = case_numbers(sol, name)
        cases[name] = {
            "redundants": n.redundants,
            "flexibility": flex,
            **({} if n.amplitudes is None else {"amplitudes": n.amplitudes}),
            "load_terms": n.load_terms,
            "imposed": n.imposed,
            "reactions": n.reactions,
            "members": n.members,
            "displacements": n.displacements,
            "checks": n.checks,
        }
        if name in sol.states:
            _one_way_states(sol, name, cases[name])
    out = {
        "schema": SCHEMA,
        "name": st.name,
        "units": quantities(u).table(),
        "indeterminacy": {"degree": topo.degree, "external": topo.external,
                          "internal": topo.internal, "stable": topo.stable},
        "redundants": sol.redundant_names,
        **({} if sol.basis != "local" else {"basis": {
            "kind": "local", "states": len(sol.redundant_columns),
            "long_range_states": int(sol.long_range_states),
            "members_per_state": _members_per_state(sol)}}),
        "cases": cases,
        "warnings": list(sol.warnings),
    }
    env = envelope_numbers(sol)
    if env is not None:
        out["envelope"] = env
    if sol.group_envelopes:
        out["envelopes"] = {g: envelope_numbers(sol, e) for g, e in sol.group_envelopes.items()}
    return out


def _one_way_states(sol, name: str, case: dict) -> None:
    """Contract 5.2: ``members.ID.state`` of every one-way bar ("acting" or "slack"),
    ``support_states.NODE`` of every one-way support ("bearing" or "lifted"), and how the
    state was found (``one_way``)."""
    st, state = sol.structure, sol.states[name]
    for mid, m in st.members.items():
        if m.acts != "both":
            case["members"][mid]["state"] = "slack" if mid in state.slack else "acting"
    bearings = [s.node for s in st.supports.values() if s.acts != "both"]
    if bearings:
        case["support_states"] = {n: "lifted" if n in state.lifted else "bearing"
                                  for n in bearings}
    case["one_way"] = {"solves": state.trials, "redundants": list(state.redundants)}


def _members_per_state(sol) -> dict:
    """Smallest, mean and largest number of members a local state touches."""
    from ..selfstress import members_per_state

    counts = members_per_state(sol.B, sol.topology.columns)
    if not counts.size:
        return {"min": 0, "mean": 0.0, "max": 0}
    return {"min": int(counts.min()), "mean": number(float(np.mean(counts))),
            "max": int(counts.max())}
