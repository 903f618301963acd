"""The envelope over the load combinations as tables: per member the extremes of m, v and
n with where and the governing combination, per support the extreme reactions
(:func:`leastwork.output.reported.envelope_numbers`, as in the JSON result)."""

from __future__ import annotations

from ..quantities import quantities
from ..reported import envelope_numbers
from ..sheet import Grid

__all__ = ["envelope_grids"]


def envelope_grids(sol) -> list[Grid]:
    """Tables of the envelope over the load combinations of ``sol`` (none without them);
    with ``[envelopes]`` groups, the tables of each group instead."""
    if sol.group_envelopes:
        out: list[Grid] = []
        for group, env in sol.group_envelopes.items():
            out += _grids(sol, envelope_numbers(sol, env), f"Envelope {group}")
        return out
    env = envelope_numbers(sol)
    if env is None:
        return []
    return _grids(sol, env, "Envelope")


def _grids(sol, env: dict, what: str) -> list[Grid]:
    """The section-force and reaction tables of one envelope."""
    u = quantities(sol.units)
    ml, fu, lu = u.moment_unit, u.force_unit, u.length_unit
    rows = []
    for mid, qs in env["members"].items():
        for q, unit in (("m", ml), ("v", fu), ("n", fu)):
            e = qs[q]
            rows.append((mid, f"{q} [{unit}]", e["max"]["value"], e["max"]["at"],
                         e["max"]["combination"], e["min"]["value"], e["min"]["at"],
                         e["min"]["combination"]))
    members = Grid(f"{what} over the combinations ({', '.join(env['combinations'])}): "
                   "section forces", ("member", "force", "max", f"at [{lu}]", "governing",
                                      "min", f"at [{lu}]", "governing"), tuple(rows), keys=2)
    rows = []
    for node, ds in env["reactions"].items():
        for d, e in ds.items():
            unit = ml if d == "rz" else fu
            rows.append((node, f"{d} [{unit}]", e["max"]["value"], e["max"]["combination"],
                         e["min"]["value"], e["min"]["combination"]))
    reactions = Grid(f"{what} over the combinations: reactions",
                     ("support", "component", "max", "governing", "min", "governing"),
                     tuple(rows), keys=2)
    return [members, reactions]
