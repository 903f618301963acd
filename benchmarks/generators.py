"""Large structures for benchmarks, as case-file text (TOML, kN and m) or read Structures.

* :func:`braced_truss` - a cross-braced truss of ``panels`` panels on a pin and a roller;
  degree of indeterminacy ``panels`` (one per crossed panel).
* :func:`braced_grid` - a wall of ``nx`` by ``ny`` panels, both diagonals in every panel,
  pinned along the bottom; degree ``ny * (2 * nx - 1)`` (derivation in its docstring). It
  keeps 10^4 - 10^5 members compact where the long truss gets very slender.
* :func:`storey_frame` - a rigid frame of ``bays`` bays and ``storeys`` storeys on fixed
  bases; degree ``3 * bays * storeys``: three per closed ring, the rings of the lowest
  storey closed through the ground between two fixed bases (common practice).
* :func:`continuous_beam` - a beam over ``supports`` supports (one pinned, the rest
  rollers); degree ``supports - 2``.

Every member is elastic in bending and axially (EI and EA given), so that no redundant is a
force without flexibility. Loads: gravity on every node or span, plus a sideways load on
the frame, so that no redundant is zero by symmetry alone.
"""

from __future__ import annotations

from leastwork import Structure, loads_case

__all__ = ["braced_truss", "braced_grid", "braced_grid_degree", "storey_frame",
           "continuous_beam", "structure", "FAMILIES"]

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


def braced_grid(nx: int, ny: int, *, panel: float = 3.0, height: float = 3.0) -> str:
    """A cross-braced wall (or tower face) ``nx`` panels wide and ``ny`` panels high.

    Joints ``G{i}_{j}`` at ``(panel * i, height * j)`` (m), i = 0..nx, j = 0..ny; bars:
    horizontals ``H{i}_{j}`` at every level j = 1..ny (none along the supported bottom),
    verticals ``V{i}_{j}`` from level j to j + 1, diagonals ``D{i}_{j}`` (rising to the
    right) and ``E{i}_{j}`` (falling) in every panel. Every bottom joint is pinned.
    Loads: 12 kN down on every free joint, 5 kN to the right (+x) at the top left joint.

    Degree of indeterminacy of a pin-jointed plane truss, m + r - 2 j (common practice),
    with m = nx ny + (nx + 1) ny + 2 nx ny bars, r = 2 (nx + 1) reactions and
    j = (nx + 1)(ny + 1) joints: ``ny * (2 * nx - 1)`` (each row of panels adds nx + 1
    joints and 4 nx + 1 bars). Stable: each row stands on the row below as on a support.

    Quantities are written as bare numbers in the case units (kN, m) so that reading stays
    cheap at 10^5 members.
    """
    if nx < 1 or ny < 1:
        raise ValueError("braced_grid needs nx >= 1 and ny >= 1")
    nodes = [f"G{i}_{j} = [{panel * i:g}, {height * j:g}]"
             for j in range(ny + 1) for i in range(nx + 1)]
    bars = []
    for j in range(ny):
        for i in range(nx + 1):
            bars.append(_bar(f"V{i}_{j}", f"G{i}_{j}", f"G{i}_{j + 1}", 1.6e6))
        for i in range(nx):
            bars.append(_bar(f"H{i}_{j + 1}", f"G{i}_{j + 1}", f"G{i + 1}_{j + 1}", 1.6e6))
            bars.append(_bar(f"D{i}_{j}", f"G{i}_{j}", f"G{i + 1}_{j + 1}", 6.0e5))
            bars.append(_bar(f"E{i}_{j}", f"G{i + 1}_{j}", f"G{i}_{j + 1}", 6.0e5))
    supports = [f'G{i}_0 = "pinned"' for i in range(nx + 1)]
    loads = [f'[[loads]]\nnode = "G{i}_{j}"\nfy = -12\n'
             for j in range(1, ny + 1) for i in range(nx + 1)]
    loads.append(f'[[loads]]\nnode = "G0_{ny}"\nfx = 5\n')
    return (_HEADER.format(name=f"braced grid, {nx} x {ny} panels") + _table("nodes", nodes)
            + _table("bars", bars) + _table("supports", supports) + "\n".join(loads))


def braced_grid_degree(nx: int, ny: int) -> int:
    """Degree of indeterminacy of :func:`braced_grid` ``(nx, ny)`` (see there)."""
    return ny * (2 * nx - 1)


def _bar(name: str, a: str, b: str, ea: float) -> str:
    """One bar line, EA in kN as a bare number."""
    return f'{name} = {{ nodes = ["{a}", "{b}"], EA = {ea:g} }}'


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
#: The frame grows square-ish: ``n`` bays and ``max(1, n // 2)`` storeys; the grid is
#: square: ``n`` by ``n`` panels.
FAMILIES = {
    "braced truss": (braced_truss, "panels"),
    "braced grid": (lambda n: braced_grid(n, n), "panels"),
    "storey frame": (lambda n: storey_frame(n, max(1, n // 2)), "bays"),
    "continuous beam": (continuous_beam, "supports"),
}


def multi_span_truss(panels: int, *, every: int = 50, panel: float = 3.0,
                     depth: float = 2.5) -> str:
    """The cross-braced girder of :func:`braced_truss` (same joints, bars and loads) on a
    support every ``every`` panels: pinned at ``L0``, a roller at ``L{k * every}`` for
    k = 1, 2, ... and at ``Ln``.

    Degree of indeterminacy m + r - 2 j (common practice) with m = 5 n + 1 bars,
    j = 2 (n + 1) joints and r = 2 + (s - 1) reactions for s supported joints:
    ``n + s - 2`` (:func:`multi_span_truss_degree`). Quantities are bare numbers in the case
    units (kN, m) so that reading stays cheap at 10^4 bars.
    """
    if panels < 1 or every < 1:
        raise ValueError("multi_span_truss needs panels >= 1 and every >= 1")
    nodes = [f"L{i} = [{panel * i:g}, 0]" for i in range(panels + 1)]
    nodes += [f"U{i} = [{panel * i:g}, {depth:g}]" for i in range(panels + 1)]
    bars = []
    for i in range(panels):
        for name, a, b in ((f"B{i}", f"L{i}", f"L{i + 1}"), (f"T{i}", f"U{i}", f"U{i + 1}"),
                           (f"D{i}", f"L{i}", f"U{i + 1}"), (f"E{i}", f"U{i}", f"L{i + 1}")):
            bars.append(_bar(name, a, b, _ea(name)))
    bars += [_bar(f"V{i}", f"L{i}", f"U{i}", _ea("V")) for i in range(panels + 1)]
    supports = ['L0 = "pinned"'] + [f'L{i} = "roller"' for i in _supported(panels, every)[1:]]
    loads = [f'[[loads]]\nnode = "L{i}"\nfy = -12\n' for i in range(1, panels)]
    loads.append('[[loads]]\nnode = "U0"\nfx = 3\n')
    return (_HEADER.format(name=f"braced truss, {panels} panels, a support every {every}")
            + _table("nodes", nodes) + _table("bars", bars) + _table("supports", supports)
            + "\n".join(loads))


def _supported(panels: int, every: int) -> list[int]:
    """Panel points of :func:`multi_span_truss` with a support, from 0 to ``panels``."""
    return sorted(set(range(0, panels + 1, every)) | {panels})


def multi_span_truss_degree(panels: int, every: int = 50) -> int:
    """Degree of indeterminacy of :func:`multi_span_truss` (see there)."""
    return panels + len(_supported(panels, every)) - 2


def multi_span_truss_panels(bars: int) -> int:
    """Panels of :func:`multi_span_truss` with about ``bars`` bars (5 per panel, plus one)."""
    return max(1, round((bars - 1) / 5))


__all__ += ["multi_span_truss", "multi_span_truss_degree", "multi_span_truss_panels"]

#: The multi-support girder as a family of its own (a support every 50 panels).
FAMILIES["multi-support truss"] = (multi_span_truss, "panels")
