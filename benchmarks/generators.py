"""Large structures for benchmarks, as case-file text (TOML, kN and m) or read Structures.

* :func:`braced_truss` - a cross-braced truss of ``panels`` panels on a pin and a roller;
  degree of indeterminacy ``panels`` (one per crossed panel).
* :func:`storey_frame` - a rigid frame of ``bays`` bays and ``storeys`` storeys on fixed
  bases; degree ``3 * bays * storeys + 3 * bays`` (three per closed ring, three per extra
  fixed base).
* :func:`continuous_beam` - a beam over ``supports`` supports (one pinned, the rest
  rollers); degree ``supports - 2``.

Every member is elastic in bending and axially (EI and EA given), so that no redundant is a
force without flexibility. Loads: gravity on every node or span, plus a sideways load on
the frame, so that no redundant is zero by symmetry alone.
"""

from __future__ import annotations

from leastwork import Structure, loads_case

__all__ = ["braced_truss", "storey_frame", "continuous_beam", "structure", "FAMILIES"]

_HEADER = '[structure]\nname = "{name}"\nunits = {{ force = "kN", length = "m" }}\n'


def _table(name: str, rows: list[str]) -> str:
    return f"[{name}]\n" + "\n".join(rows) + "\n"


def _node_load(node: str, fx: float = 0.0, fy: float = 0.0) -> str:
    parts = [f'node = "{node}"']
    if fx:
        parts.append(f'fx = "{fx:g} kN"')
    if fy:
        parts.append(f'fy = "{fy:g} kN"')
    return "[[loads]]\n" + "\n".join(parts) + "\n"


def braced_truss(panels: int, *, panel: float = 3.0, depth: float = 2.5) -> str:
    """A Pratt-like girder with both diagonals in every panel: bottom joints ``L0..Ln``,
    top joints ``U0..Un``, vertical end posts; pinned at ``L0``, roller at ``Ln``; 12 kN on
    every bottom joint, 3 kN sideways at the top of the first post."""
    nodes = [f"L{i} = [{panel * i:g}, 0]" for i in range(panels + 1)]
    nodes += [f"U{i} = [{panel * i:g}, {depth:g}]" for i in range(panels + 1)]
    bars = []
    for i in range(panels):
        for name, a, b in ((f"B{i}", f"L{i}", f"L{i + 1}"), (f"T{i}", f"U{i}", f"U{i + 1}"),
                           (f"D{i}", f"L{i}", f"U{i + 1}"), (f"E{i}", f"U{i}", f"L{i + 1}")):
            bars.append(f'{name} = {{ nodes = ["{a}", "{b}"], EA = "{_ea(name):g} kN" }}')
    bars += [f'V{i} = {{ nodes = ["L{i}", "U{i}"], EA = "{_ea("V"):g} kN" }}'
             for i in range(panels + 1)]
    supports = ['L0 = "pinned"', f'L{panels} = "roller"']
    loads = [_node_load(f"L{i}", fy=-12.0) for i in range(1, panels)]
    loads.append(_node_load("U0", fx=3.0))
    return (_HEADER.format(name=f"braced truss, {panels} panels") + _table("nodes", nodes)
            + _table("bars", bars) + _table("supports", supports) + "\n".join(loads))


def _ea(name: str) -> float:
    """Chords stiffer than diagonals and posts (kN)."""
    return 1.6e6 if name[0] in "BT" else 6.0e5


def storey_frame(bays: int, storeys: int, *, bay: float = 6.0, storey: float = 3.5) -> str:
    """A rigid multi-bay, multi-storey frame: columns ``C{i}_{j}`` (line i, storey j), floor
    beams ``F{i}_{j}`` (bay i, floor j), fixed bases; 20 kN/m on every floor beam and 5 kN
    sideways at every floor on the first column line."""
    nodes = [f"N{i}_{j} = [{bay * i:g}, {storey * j:g}]"
             for j in range(storeys + 1) for i in range(bays + 1)]
    beams = []
    for j in range(storeys):
        for i in range(bays + 1):
            beams.append(f'C{i}_{j} = {{ nodes = ["N{i}_{j}", "N{i}_{j + 1}"], '
                         'EI = "4.0e4 kN*m^2", EA = "2.5e6 kN" }')
    for j in range(1, storeys + 1):
        for i in range(bays):
            beams.append(f'F{i}_{j} = {{ nodes = ["N{i}_{j}", "N{i + 1}_{j}"], '
                         'EI = "6.0e4 kN*m^2", EA = "3.0e6 kN" }')
    supports = [f'N{i}_0 = "fixed"' for i in range(bays + 1)]
    loads = [f'[[loads]]\nmember = "F{i}_{j}"\nwy = "-20 kN/m"\n'
             for j in range(1, storeys + 1) for i in range(bays)]
    loads += [_node_load(f"N0_{j}", fx=5.0) for j in range(1, storeys + 1)]
    return (_HEADER.format(name=f"frame, {bays} bays x {storeys} storeys")
            + _table("nodes", nodes) + _table("beams", beams) + _table("supports", supports)
            + "\n".join(loads))


def continuous_beam(supports: int, *, span: float = 6.0) -> str:
    """A beam over ``supports`` supports ``S0..`` at ``span`` spacing, pinned at the first,
    rollers elsewhere, 12 kN/m on every span."""
    n = supports - 1
    nodes = [f"S{i} = [{span * i:g}, 0]" for i in range(n + 1)]
    beams = [f'P{i} = {{ nodes = ["S{i}", "S{i + 1}"], EI = "3.0e4 kN*m^2", EA = "2.0e6 kN" }}'
             for i in range(n)]
    sup = ['S0 = "pinned"'] + [f'S{i} = "roller"' for i in range(1, n + 1)]
    loads = [f'[[loads]]\nmember = "P{i}"\nwy = "-12 kN/m"\n' for i in range(n)]
    return (_HEADER.format(name=f"continuous beam over {supports} supports")
            + _table("nodes", nodes) + _table("beams", beams) + _table("supports", sup)
            + "\n".join(loads))


def structure(text: str) -> Structure:
    """Read case text through the real reader."""
    return loads_case(text, source="<benchmark>")


#: Family name -> (generator of case text from one size parameter, what the parameter is).
#: The frame grows square-ish: ``n`` bays and ``max(1, n // 2)`` storeys.
FAMILIES = {
    "braced truss": (braced_truss, "panels"),
    "storey frame": (lambda n: storey_frame(n, max(1, n // 2)), "bays"),
    "continuous beam": (continuous_beam, "supports"),
}
