"""A solution as pandas DataFrames (contract 5.8), in the case's output units: the numbers
of the JSON result (:mod:`.reported`), laid out as tables. pandas is an optional extra
(``pip install leastwork[frames]``) imported only here."""

from __future__ import annotations

from .reported import case_numbers

__all__ = ["solution_frames"]


def _flat(entry: dict, prefix: str = "") -> dict:
    """A nested member entry as flat columns: ``start.n``, ``m_max``, ``m_max.at``..."""
    out: dict = {}
    for key, value in entry.items():
        name = f"{prefix}{key}"
        if isinstance(value, dict):
            if set(value) >= {"value", "at"}:
                out[name] = value["value"]
                out.update(_flat({k: v for k, v in value.items() if k != "value"},
                                 f"{name}."))
            else:
                out.update(_flat(value, f"{name}."))
        else:
            out[name] = value
    return out


def _one_case(sol, name: str) -> dict:
    import pandas as pd

    n = case_numbers(sol, name)
    reactions = pd.DataFrame.from_dict(n.reactions, orient="index")
    reactions.index.name = "node"
    members = pd.DataFrame.from_dict({mid: _flat(e) for mid, e in n.members.items()},
                                     orient="index")
    members.index.name = "member"
    displacements = pd.DataFrame({"value": list(n.displacements.values())},
                                 index=pd.Index(list(n.displacements), name="target"))
    redundants = pd.DataFrame({"value": list(n.redundants.values())},
                              index=pd.Index(list(n.redundants), name="redundant"))
    return {"reactions": reactions, "members": members, "displacements": displacements,
            "redundants": redundants}


def solution_frames(sol, case: str | None = None) -> dict:
    """``{"reactions", "members", "displacements", "redundants"}`` DataFrames of load case
    ``case``; with ``case=None`` the only load case, or every case with the case name as
    the first level of the index."""
    import pandas as pd

    names = list(sol.cases)
    if case is not None:
        if case not in sol.cases:
            from ..errors import CaseError

            raise CaseError(f'no load case "{case}"; the cases are: {", ".join(names)}',
                            source=sol.structure.source)
        return _one_case(sol, case)
    if len(names) == 1:
        return _one_case(sol, names[0])
    parts = {c: _one_case(sol, c) for c in names}
    return {key: pd.concat({c: parts[c][key] for c in names}, names=["case"])
            for key in parts[names[0]]}
