"""Hypothesis strategies for random, stable, well-conditioned structures, as case-file text.

Three families, each written as TOML (so the real reader is exercised):

* continuous beams: 1-4 spans of 2-12 m on a random inclination, members drawn either way,
  random supports (pinned, fixed, rollers, inclined rollers, springs), internal hinges;
* trusses: 2-6 panels with a polygonal top chord, one diagonal per panel and extra crossed
  diagonals, pinned/roller/spring/inclined-roller bearings;
* frames: 1-3 bays, one or two storeys, fixed or pinned bases, some beam ends hinged and
  some members axially rigid.

Every load case carries at least one force, so that the forces of the case have a natural
scale; imposed effects (settlement, temperature, misfit) are added on top. The strategies
may produce mechanisms (a hinge too many); tests filter those with ``assume``.

Units of every case: kN and m. Stiffnesses vary within a factor 100 (EI) or 20 (EA).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from _cases import case_text, ea, ei
from hypothesis import strategies as st

__all__ = ["RandomCase", "beams", "trusses", "frames", "PROPS"]

#: Material and sections shared by every random case: members give EI (and EA) directly,
#: the defaults give G, alpha, depth and shear area.
PROPS = """
[materials.steel]
E = "200 GPa"
G = "77 GPa"
alpha = "1.2e-5 1/K"

[sections.deep]
depth = "450 mm"
shear_area = "4000 mm^2"

[sections.shallow]
depth = "250 mm"
shear_area = "2500 mm^2"

[defaults]
material = "steel"
section = "deep"
"""

CASES = ("first", "second")


@dataclass(frozen=True)
class RandomCase:
    """A random case: its TOML text and a short description for failure messages."""

    family: str
    text: str
    summary: str


def _num(draw, lo: float, hi: float) -> float:
    """A float in [lo, hi], rounded to 4 significant digits (readable in failures)."""
    v = draw(st.floats(lo, hi, allow_nan=False, allow_infinity=False))
    return float(f"{v:.4g}")


def _signed(draw, lo: float, hi: float) -> float:
    return _num(draw, lo, hi) * draw(st.sampled_from((-1.0, 1.0)))


def _stiffness(draw, base: float, decades: float) -> float:
    return float(f"{base * 10 ** draw(st.floats(0.0, decades)):.4g}")


def _member_spec(draw, a: str, b: str, *, beam: bool, rigid_axial: bool = False,
                 hinges: tuple[str, ...] = ()) -> dict:
    """Spec of one member, drawn from a to b or from b to a at random."""
    if draw(st.booleans()):
        a, b = b, a
        hinges = tuple({"start": "end", "end": "start"}[h] for h in hinges)
    spec: dict = {"nodes": [a, b]}
    if beam:
        spec["EI"] = ei(_stiffness(draw, 1.0e4, 2.0))
        if draw(st.booleans()):
            spec["section"] = "shallow"
        if hinges:
            spec["hinges"] = sorted(set(hinges))
    if not (beam and rigid_axial):
        spec["EA"] = ea(_stiffness(draw, 1.0e5, 1.3) * (10.0 if beam else 1.0))
    return spec


def _member_load(draw, mid: str, length: float, case: str) -> dict:
    """A point load or a (partial, linearly varying) distributed load on a beam."""
    kind = draw(st.sampled_from(("point", "uniform", "partial")))
    if kind == "point":
        load = {"member": mid, "case": case, "at": _num(draw, 0.1 * length, 0.9 * length)}
        for key in draw(st.lists(st.sampled_from(("fx", "fy", "mz")), min_size=1,
                                 max_size=3, unique=True)):
            load[key] = _signed(draw, 5.0, 50.0)
        return load
    load = {"member": mid, "case": case}
    for key in draw(st.lists(st.sampled_from(("wx", "wy")), min_size=1, max_size=2,
                             unique=True)):
        if kind == "uniform":
            load[key] = _signed(draw, 2.0, 20.0)
        else:
            load[key] = [_signed(draw, 0.0, 20.0), _signed(draw, 2.0, 20.0)]
    if kind == "partial":
        a = _num(draw, 0.0, 0.5 * length)
        b = _num(draw, a + 0.2 * length, length)
        load["from"], load["to"] = a, min(b, length)
    return load


def _imposed(draw, members: dict, beams: set, supports: dict, rotational: set,
             case: str) -> list[dict]:
    """Temperature, misfit and settlement loads of one case."""
    out: list[dict] = []
    mids = sorted(members)
    for mid in draw(st.lists(st.sampled_from(mids), max_size=2, unique=True)):
        temp = {"uniform": _signed(draw, 5.0, 40.0)}
        if mid in beams and draw(st.booleans()):
            temp["gradient"] = _signed(draw, 5.0, 20.0)
        out.append({"member": mid, "case": case, "temperature": temp})
    for mid in draw(st.lists(st.sampled_from(mids), max_size=2, unique=True)):
        out.append({"member": mid, "case": case, "misfit": _signed(draw, 0.001, 0.005)})
    for node in draw(st.lists(st.sampled_from(sorted(supports)), max_size=2, unique=True)):
        dirs = _rigid_directions(supports[node])
        if node not in rotational:
            dirs.discard("rz")
        if not dirs:
            continue
        load = {"settlement": node, "case": case}
        for d in sorted(dirs):
            if draw(st.booleans()) or len(load) == 2:
                load["d" + d] = (_signed(draw, 0.001, 0.002) if d == "rz"
                                 else _signed(draw, 0.001, 0.02))
        out.append(load)
    return out


def _rigid_directions(spec) -> set[str]:
    if isinstance(spec, str):
        spec = {"type": spec}
    if "surface_angle" in spec:
        return {"n"}
    kind = spec.get("type")
    dirs = {"fixed": {"x", "y", "rz"}, "pinned": {"x", "y"}, "roller": {"y"}}.get(kind, set())
    return dirs | set(spec.get("restrain", ()))


def _rotational(beams: dict) -> set[str]:
    out = set()
    for spec in beams.values():
        a, b = spec["nodes"]
        hinges = spec.get("hinges", ())
        if "start" not in hinges:
            out.add(a)
        if "end" not in hinges:
            out.add(b)
    return out


def _nodal_load(draw, node: str, rotational: set, case: str) -> dict:
    keys = ["fx", "fy"] + (["mz"] if node in rotational else [])
    load = {"node": node, "case": case}
    for key in draw(st.lists(st.sampled_from(keys), min_size=1, max_size=len(keys),
                             unique=True)):
        load[key] = _signed(draw, 5.0, 50.0)
    return load


def _targets(nodes, rotational: set) -> list[str]:
    out = []
    for n in nodes:
        out += [f"{n}.x", f"{n}.y"] + ([f"{n}.rz"] if n in rotational else [])
    return out


def _text(name, nodes, beams, bars, supports, loads, shear: bool) -> str:
    rot = _rotational(beams or {})
    analysis = {"displacements": _targets(nodes, rot)}
    if shear:
        analysis["shear"] = True
    return case_text(name, nodes, beams=beams or None, bars=bars or None, supports=supports,
                     loads=loads, analysis=analysis) + PROPS


# ---------------------------------------------------------------- continuous beams


_BEAM_SUPPORTS = ("none", "roller", "pinned", "fixed", "spring", "inclined", "roller+rz")


@st.composite
def beams(draw) -> RandomCase:
    """A continuous beam over 1-4 spans on random supports, with hinges and span loads."""
    nspan = draw(st.integers(1, 4))
    spans = [_num(draw, 2.0, 12.0) for _ in range(nspan)]
    angle = draw(st.sampled_from((0.0, 0.0, _signed(draw, 0.05, 0.5))))
    c, s = math.cos(angle), math.sin(angle)
    names = [f"N{i}" for i in range(nspan + 1)]
    pos = [0.0]
    for L in spans:
        pos.append(pos[-1] + L)
    nodes = {n: (round(x * c, 6), round(x * s, 6)) for n, x in zip(names, pos)}
    supports: dict = {}
    for i, n in enumerate(names):
        choices = _BEAM_SUPPORTS if 0 < i < nspan else _BEAM_SUPPORTS[1:]
        kind = draw(st.sampled_from(choices))
        if kind == "none":
            continue
        if kind == "spring":
            supports[n] = {"springs": {"y": f"{_stiffness(draw, 2.0e3, 2.0)!r} kN/m"}}
        elif kind == "inclined":
            # 20-40 deg: a shallower bearing that alone holds the beam along its axis makes
            # the stiffness matrix ill-conditioned (round-off ~1e-8), beyond what this
            # property test compares
            supports[n] = {"type": "roller",
                           "surface_angle": f"{_signed(draw, 20.0, 40.0)!r} deg"}
        elif kind == "roller+rz":
            supports[n] = {"restrain": ["y"],
                           "springs": {"rz": f"{_stiffness(draw, 2.0e3, 2.0)!r} kN*m/rad"}}
        else:
            supports[n] = kind
    # at most one support may hold the beam along its axis if the beam is axially rigid
    along = sum(1 for n, sp in supports.items()
                if _rigid_directions(sp) - {"rz"} - ({"y"} if angle == 0.0 else set()))
    rigid_axial = along <= 1 and draw(st.booleans())
    hinge_at = set(draw(st.lists(st.integers(1, nspan - 1), max_size=2, unique=True))
                   if nspan > 1 else [])
    beams_spec = {}
    for i in range(nspan):
        a, b = names[i], names[i + 1]
        hinges = ("end",) if (i + 1) in hinge_at else ()
        beams_spec[f"M{i}"] = _member_spec(draw, a, b, beam=True, rigid_axial=rigid_axial,
                                           hinges=hinges)
    rot = _rotational(beams_spec)
    loads = []
    for case in CASES:
        for mid in draw(st.lists(st.sampled_from(sorted(beams_spec)), min_size=1,
                                 max_size=3)):
            a, b = beams_spec[mid]["nodes"]
            loads.append(_member_load(draw, mid, math.dist(nodes[a], nodes[b]), case))
        for n in draw(st.lists(st.sampled_from(names), max_size=2, unique=True)):
            loads.append(_nodal_load(draw, n, rot, case))
        loads += _imposed(draw, beams_spec, set(beams_spec), supports, rot, case)
    shear = draw(st.booleans())
    text = _text("random continuous beam", nodes, beams_spec, None, supports, loads, shear)
    return RandomCase("beam", text, f"{nspan} spans, supports {supports}, hinges {hinge_at}")


# ---------------------------------------------------------------- trusses


@st.composite
def trusses(draw) -> RandomCase:
    """A truss of 2-6 panels: chords, verticals, one diagonal per panel, extra crossed
    diagonals; pinned at one end, pinned/roller/inclined roller at the other."""
    npanel = draw(st.integers(2, 6))
    width = _num(draw, 2.0, 5.0)
    heights = [_num(draw, 1.5, 4.0) for _ in range(npanel + 1)]
    nodes = {}
    for i in range(npanel + 1):
        nodes[f"L{i}"] = (round(i * width, 6), 0.0)
        nodes[f"U{i}"] = (round(i * width, 6), heights[i])
    bars: dict = {}

    def add(a: str, b: str) -> None:
        bars[a + b] = _member_spec(draw, a, b, beam=False)

    for i in range(npanel):
        add(f"L{i}", f"L{i + 1}")
        add(f"U{i}", f"U{i + 1}")
        rising = draw(st.booleans())
        add(*((f"L{i}", f"U{i + 1}") if rising else (f"U{i}", f"L{i + 1}")))
        if draw(st.integers(0, 3)) == 0:  # a crossed second diagonal
            add(*((f"U{i}", f"L{i + 1}") if rising else (f"L{i}", f"U{i + 1}")))
    for i in range(npanel + 1):
        add(f"L{i}", f"U{i}")
    far = f"L{npanel}"
    supports: dict = {"L0": "pinned"}
    end = draw(st.sampled_from(("roller", "pinned", "inclined")))
    supports[far] = ({"type": "roller", "surface_angle": f"{_signed(draw, 20.0, 40.0)!r} deg"}
                     if end == "inclined" else end)
    if npanel > 2 and draw(st.booleans()):
        supports[f"L{draw(st.integers(1, npanel - 1))}"] = {
            "springs": {"y": f"{_stiffness(draw, 5.0e3, 2.0)!r} kN/m"}}
    loads = []
    for case in CASES:
        for n in draw(st.lists(st.sampled_from(sorted(nodes)), min_size=1, max_size=4,
                               unique=True)):
            loads.append(_nodal_load(draw, n, set(), case))
        loads += _imposed(draw, bars, set(), supports, set(), case)
    text = _text("random truss", nodes, None, bars, supports, loads, False)
    return RandomCase("truss", text, f"{npanel} panels, {len(bars)} bars, supports {supports}")


# ---------------------------------------------------------------- frames


@st.composite
def frames(draw) -> RandomCase:
    """A frame of 1-3 bays and 1-2 storeys on fixed or pinned bases; some beam ends hinged,
    some members axially rigid, columns and beams drawn either way."""
    nbay = draw(st.integers(1, 3))
    nstorey = draw(st.integers(1, 2))
    xs = [0.0]
    for _ in range(nbay):
        xs.append(xs[-1] + _num(draw, 3.0, 10.0))
    nodes: dict = {}
    level = [0.0] * (nbay + 1)
    for k in range(nstorey + 1):
        for i, x in enumerate(xs):
            if k:
                level[i] += _num(draw, 3.0, 6.0)
            nodes[f"N{k}_{i}"] = (round(x, 6), round(level[i], 6))
    beams_spec: dict = {}
    for k in range(1, nstorey + 1):
        for i in range(nbay + 1):
            beams_spec[f"C{k}_{i}"] = _member_spec(
                draw, f"N{k - 1}_{i}", f"N{k}_{i}", beam=True,
                rigid_axial=draw(st.integers(0, 3)) == 0)
        for i in range(nbay):
            hinges = tuple(h for h in ("start", "end") if draw(st.integers(0, 4)) == 0)
            beams_spec[f"B{k}_{i}"] = _member_spec(
                draw, f"N{k}_{i}", f"N{k}_{i + 1}", beam=True,
                rigid_axial=draw(st.integers(0, 3)) == 0, hinges=hinges)
    supports = {f"N0_{i}": draw(st.sampled_from(("fixed", "pinned"))) for i in range(nbay + 1)}
    rot = _rotational(beams_spec)
    lengths = {mid: math.dist(nodes[sp["nodes"][0]], nodes[sp["nodes"][1]])
               for mid, sp in beams_spec.items()}
    loads = []
    for case in CASES:
        for mid in draw(st.lists(st.sampled_from(sorted(beams_spec)), min_size=1,
                                 max_size=4)):
            loads.append(_member_load(draw, mid, lengths[mid], case))
        upper = [n for n in nodes if not n.startswith("N0_")]
        for n in draw(st.lists(st.sampled_from(upper), max_size=2, unique=True)):
            loads.append(_nodal_load(draw, n, rot, case))
        loads += _imposed(draw, beams_spec, set(beams_spec), supports, rot, case)
    shear = draw(st.booleans())
    text = _text("random frame", nodes, beams_spec, None, supports, loads, shear)
    return RandomCase("frame", text, f"{nbay} bays x {nstorey} storeys, bases {supports}")
