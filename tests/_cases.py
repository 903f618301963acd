"""Helpers shared by the outside-value tests.

They write case files as plain TOML text (the same format as files under cases/),
solve them through the public Python API and read the JSON-shaped result.

Units in every case built here: force kN, length m (stated in [structure]); stiffnesses
are written with their units ("kN*m^2", "kN") so that closed forms read directly.
"""

from __future__ import annotations

import json
import math

import leastwork

UNITS = {"force": "kN", "length": "m"}


# ---------------------------------------------------------------- TOML writing


def toml_value(v) -> str:
    """A Python value as a TOML value (inline tables for dicts)."""
    if isinstance(v, bool):
        return "true" if v else "false"
    if isinstance(v, int):
        return str(v)
    if isinstance(v, float):
        if not math.isfinite(v):
            raise ValueError(f"not a finite number: {v}")
        return repr(v)
    if isinstance(v, str):
        return json.dumps(v)  # a TOML basic string for plain ASCII text
    if isinstance(v, (list, tuple)):
        return "[" + ", ".join(toml_value(x) for x in v) + "]"
    if isinstance(v, dict):
        return "{ " + ", ".join(f"{k} = {toml_value(x)}" for k, x in v.items()) + " }"
    raise TypeError(f"cannot write {type(v).__name__} to TOML")


def case_text(
    name: str,
    nodes: dict,
    *,
    beams: dict | None = None,
    bars: dict | None = None,
    supports: dict | None = None,
    loads: list | tuple = (),
    analysis: dict | None = None,
) -> str:
    """The text of a case file.

    nodes    {"A": (x, y), ...}
    beams    {"AB": {"nodes": ["A", "B"], "EI": "... kN*m^2", ...}, ...}
    bars     {"AD": {"nodes": ["A", "D"], "EA": "... kN"}, ...}
    supports {"A": "fixed", "B": "roller", "C": {"restrain": ["x"]}, ...}
    loads    [{"member": "AB", "wy": -12.0}, {"node": "B", "fy": -20.0}, ...]
    """
    out = ["[structure]", f"name = {toml_value(name)}", f"units = {toml_value(UNITS)}", ""]
    out.append("[nodes]")
    for k, (x, y) in nodes.items():
        out.append(f"{k} = {toml_value([float(x), float(y)])}")
    out.append("")
    for table, content in (("beams", beams), ("bars", bars), ("supports", supports)):
        if content:
            out.append(f"[{table}]")
            for k, v in content.items():
                out.append(f"{k} = {toml_value(v)}")
            out.append("")
    for load in loads:
        out.append("[[loads]]")
        for k, v in load.items():
            out.append(f"{k} = {toml_value(v)}")
        out.append("")
    if analysis:
        out.append("[analysis]")
        for k, v in analysis.items():
            out.append(f"{k} = {toml_value(v)}")
        out.append("")
    return "\n".join(out)


def ei(value: float) -> str:
    """Flexural stiffness in kN*m^2, written with its unit."""
    return f"{float(value)!r} kN*m^2"


def ea(value: float) -> str:
    """Axial stiffness in kN, written with its unit."""
    return f"{float(value)!r} kN"


# ---------------------------------------------------------------- common shapes


def straight_beam(
    xs: dict,
    supports: dict,
    loads: list,
    *,
    EI: float,
    EA: float | None = None,
    name: str = "straight beam",
    hinges: dict | None = None,
    analysis: dict | None = None,
) -> str:
    """A straight horizontal beam through the nodes xs = {"A": 0.0, "B": 6.0, ...}.

    Members join consecutive nodes left to right and are named by their two nodes
    ("AB", "BC", ...).  hinges = {"AB": ["end"]} releases moments at member ends.
    """
    names = sorted(xs, key=lambda k: xs[k])
    beams = {}
    for a, b in zip(names, names[1:]):
        spec = {"nodes": [a, b], "EI": ei(EI)}
        if EA is not None:
            spec["EA"] = ea(EA)
        if hinges and a + b in hinges:
            spec["hinges"] = list(hinges[a + b])
        beams[a + b] = spec
    nodes = {k: (xs[k], 0.0) for k in names}
    return case_text(name, nodes, beams=beams, supports=supports, loads=loads, analysis=analysis)


# ---------------------------------------------------------------- solving / reading


def solve(text: str, redundants=None) -> dict:
    """Solve a case given as text; return the JSON-shaped result (a dict)."""
    st = leastwork.loads_case(text, source="<test>")
    return leastwork.solve(st, redundants=redundants).to_dict()


def default(result: dict) -> dict:
    """The result of the load case "default"."""
    return result["cases"]["default"]


def solve_default(text: str, redundants=None) -> dict:
    return default(solve(text, redundants))


def close(actual, expected, *, scale: float, rel: float = 1e-9) -> bool:
    """|actual - expected| <= rel * max(|expected|, scale)."""
    return abs(actual - expected) <= rel * max(abs(expected), abs(scale))


#: Relative tolerance of :func:`check` against an exact closed form.
REL = 1e-9


def check(actual, expected, scale, what, rel=REL):
    """Assert that a result of leastwork equals an outside value: ``close`` within ``rel``
    of max(|expected|, scale); ``what`` names the quantity in the failure message."""
    assert close(actual, expected, scale=scale, rel=rel), (
        f"{what}: leastwork {actual!r}, expected {expected!r}"
    )


def flatten_numbers(obj, prefix=""):
    """Every number in a nested dict/list result, keyed by its path."""
    out = {}
    if isinstance(obj, dict):
        for k, v in obj.items():
            out.update(flatten_numbers(v, f"{prefix}/{k}"))
    elif isinstance(obj, (list, tuple)):
        for i, v in enumerate(obj):
            out.update(flatten_numbers(v, f"{prefix}[{i}]"))
    elif isinstance(obj, (int, float)) and not isinstance(obj, bool):
        out[prefix] = float(obj)
    return out


# ---------------------------------------------------------------- statics of the loads


def load_resultant(spec: dict) -> tuple[float, float, float]:
    """(Fx, Fy, Mz about the origin) of the loads of a case spec (the keyword arguments of
    case_text).  Handles nodal loads, concentrated member loads and constant distributed
    member loads (whole member or from/to), all in global components."""
    nodes = spec["nodes"]
    members = {**(spec.get("beams") or {}), **(spec.get("bars") or {})}
    fx = fy = mz = 0.0

    def add(x, y, px, py, m=0.0):
        nonlocal fx, fy, mz
        fx += px
        fy += py
        mz += x * py - y * px + m

    for ld in spec.get("loads", ()):
        if "node" in ld:
            x, y = nodes[ld["node"]]
            add(x, y, ld.get("fx", 0.0), ld.get("fy", 0.0), ld.get("mz", 0.0))
            continue
        a, b = members[ld["member"]]["nodes"]
        (xa, ya), (xb, yb) = nodes[a], nodes[b]
        length = math.hypot(xb - xa, yb - ya)
        ux, uy = (xb - xa) / length, (yb - ya) / length
        if "at" in ld:
            s = ld["at"]
            add(xa + s * ux, ya + s * uy, ld.get("fx", 0.0), ld.get("fy", 0.0), ld.get("mz", 0.0))
        elif "wx" in ld or "wy" in ld:
            s0, s1 = ld.get("from", 0.0), ld.get("to", length)
            sm, ds = (s0 + s1) / 2, s1 - s0
            add(xa + sm * ux, ya + sm * uy, ld.get("wx", 0.0) * ds, ld.get("wy", 0.0) * ds)
    return fx, fy, mz


def reaction_resultant(spec: dict, reactions: dict) -> tuple[float, float, float]:
    """(Rx, Ry, Mz about the origin) of the reactions of a result."""
    rx = ry = mz = 0.0
    for node, comps in reactions.items():
        x, y = spec["nodes"][node]
        px, py = comps.get("x", 0.0), comps.get("y", 0.0)
        rx += px
        ry += py
        mz += x * py - y * px + comps.get("rz", 0.0)
    return rx, ry, mz


def braced_bay_geometry() -> dict:
    """A 4 m x 3 m rectangular bay braced by both diagonals, pinned at both bases: nodes,
    bars and supports as keyword arguments of :func:`case_text` (degree 2: one internal,
    one external)."""
    return dict(
        nodes={"A": (0.0, 0.0), "B": (4.0, 0.0), "C": (4.0, 3.0), "D": (0.0, 3.0)},
        bars={
            "AB": {"nodes": ["A", "B"], "EA": ea(2.0e5)},
            "BC": {"nodes": ["B", "C"], "EA": ea(2.5e5)},
            "CD": {"nodes": ["C", "D"], "EA": ea(2.0e5)},
            "DA": {"nodes": ["D", "A"], "EA": ea(2.5e5)},
            "AC": {"nodes": ["A", "C"], "EA": ea(1.0e5)},
            "BD": {"nodes": ["B", "D"], "EA": ea(1.5e5)},
        },
        supports={"A": "pinned", "B": "pinned"},
    )
