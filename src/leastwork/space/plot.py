"""Drawings of a space structure (matplotlib, imported only here): an axonometric view of
the structure with its supports and loads, the deflected shape, the section-force diagrams
drawn in each member's own planes, and a plan view for grids with the twist of each member
marked.

Projection: axonometric, global x drawn 20° above the horizontal to the right, global y
35° above it to the left, global z vertical — slightly unequal angles, so that the members
of a symmetric layout do not fall on one another as they would in an isometric view.
"""

from __future__ import annotations

import math

import numpy as np
import scipy.linalg as sla

from ..output.plot.numbers import number
from ..output.quantities import quantities
from .model import DIRECTIONS, SpaceDistributedLoad, SpaceNodalLoad, SpacePointLoad
from .solve import SpaceSolution

__all__ = ["SPACE_DIAGRAMS", "project", "nodal_displacements", "member_shape", "plot_space",
           "is_grid"]

#: Panels a space drawing can hold, in order.
SPACE_DIAGRAMS = ("structure", "deflected", "n", "t", "my", "mz", "plan")
_AX, _AY = math.radians(20), math.radians(35)
_MEMBER = "#303030"
_DIAGRAM = {"n": "#1f6f8b", "t": "#8b1f6f", "my": "#b34700", "mz": "#2f7d32"}


def project(p) -> tuple[float, float]:
    """The axonometric drawing position of a point (x, y, z)."""
    x, y, z = p
    return x * math.cos(_AX) - y * math.cos(_AY), x * math.sin(_AX) + y * math.sin(_AY) + z


def is_grid(st) -> bool:
    """All joints in one horizontal plane (a grid when loaded out of it)."""
    zs = [n.z for n in st.nodes.values()]
    return max(zs) - min(zs) <= 1e-9 * max(1.0, max(abs(z) for z in zs))


def nodal_displacements(sol: SpaceSolution, case: str) -> dict[str, np.ndarray]:
    """Displacement (x, y, z, rx, ry, rz; m and rad) of every joint by the unit-load
    method: one unit load per nodal direction on the released structure."""
    topo, c = sol.topology, sol.cases[case]
    st = sol.structure
    A0 = topo.A[:, sol.keep]
    strain = c.strain
    Su = np.zeros((len(topo.columns), len(topo.dofs)))
    if A0.size:
        Su[sol.keep] = -sla.solve(A0, np.eye(len(topo.dofs)))
    u = Su.T @ strain
    out = {}
    for nid in st.nodes:
        out[nid] = np.array([u[topo.dof_index[f"{nid}.{d}"]] if f"{nid}.{d}" in topo.dof_index
                             else 0.0 for d in DIRECTIONS])
    return out


def member_shape(sol: SpaceSolution, case: str, mid: str, disp: dict, points: int = 41):
    """Displaced positions (global, m) along member ``mid``: the end displacements joined
    by the deflection that the member's own curvature (my/EIy, mz/EIz) gives, measured from
    the chord (exact for the bending part; axial strain spread linearly)."""
    st = sol.structure
    m = st.members[mid]
    L = st.length(mid)
    axes = st.axes(mid)
    a, b = st.nodes[m.start].xyz, st.nodes[m.end].xyz
    xs = np.linspace(0.0, L, points)
    ua, ub = axes @ disp[m.start][:3], axes @ disp[m.end][:3]
    local = np.outer(1 - xs / L, ua) + np.outer(xs / L, ub)
    if m.is_beam:
        res = sol.cases[case].members[mid]
        for k, (field, K) in ((2, ("my", m.EIy)), (1, ("mz", m.EIz))):
            kappa = np.asarray(res.fields[field](xs)) / K
            slope = np.concatenate([[0.0], np.cumsum(0.5 * (kappa[1:] + kappa[:-1]) * np.diff(xs))])
            w = np.concatenate([[0.0], np.cumsum(0.5 * (slope[1:] + slope[:-1]) * np.diff(xs))])
            local[:, k] += w - xs / L * w[-1]  # zero at both ends: from the chord
    return np.outer(1 - xs / L, a) + np.outer(xs / L, b) + local @ axes


def _size(st) -> float:
    pts = np.array([n.xyz for n in st.nodes.values()])
    return float(max(np.ptp(pts, axis=0).max(), 1e-9))


def _frame(ax, st, colour=_MEMBER, width=1.6):
    for m in st.members.values():
        p = [project(st.nodes[n].xyz) for n in (m.start, m.end)]
        ax.plot([p[0][0], p[1][0]], [p[0][1], p[1][1]], color=colour, lw=width,
                ls="-" if m.is_beam else "--", zorder=2)


def _supports(ax, st, size: float):
    for sup in st.supports.values():
        x, y = project(st.nodes[sup.node].xyz)
        dirs = {r.direction for r in sup.restraints if not r.is_spring}
        if set(DIRECTIONS) <= dirs:
            ax.plot(x, y, marker="s", ms=9, color="#555555", zorder=4)
        elif {"x", "y", "z"} <= dirs:
            ax.plot(x, y, marker="^", ms=9, color="#555555", zorder=4)
        else:
            ax.plot(x, y, marker="o", ms=7, mfc="white", mec="#555555", zorder=4)
        springs = [r.direction for r in sup.restraints if r.is_spring]
        text = ",".join(d for d in DIRECTIONS if d in dirs)
        if springs:
            text += " k:" + ",".join(springs)
        if not set(DIRECTIONS) <= dirs:
            ax.annotate(text, (x, y), xytext=(4, -11), textcoords="offset points", fontsize=6,
                        color="#555555")


def _arrow(ax, tail, head, colour, label=None):
    t, h = project(tail), project(head)
    ax.annotate("", xy=h, xytext=t, arrowprops={"arrowstyle": "->", "color": colour, "lw": 1.2},
                zorder=5)
    if label:
        ax.annotate(label, t, fontsize=6, color=colour, xytext=(2, 2), textcoords="offset points")


def _loads(ax, st, case: str, size: float):
    q = quantities(st.units)
    loads = [ld for ld in st.loads if ld.case == case]
    scale = 0.18 * size
    for ld in loads:
        if isinstance(ld, SpaceNodalLoad):
            p = st.nodes[ld.node].xyz
            f = np.array(ld.values[:3])
            if np.any(f):
                d = f / np.linalg.norm(f) * scale
                _arrow(ax, p - d, p, "#c0392b",
                       f"{number(np.linalg.norm(f) / q.factor('force'))} {q.force_unit}")
            mo = np.array(ld.values[3:])
            if np.any(mo):
                d = mo / np.linalg.norm(mo) * scale
                _arrow(ax, p, p + d, "#8e44ad",
                       f"{number(np.linalg.norm(mo) / q.factor('moment'))} {q.moment_unit} (⇉)")
                _arrow(ax, p, p + 0.8 * d, "#8e44ad")
        elif isinstance(ld, SpacePointLoad | SpaceDistributedLoad):
            m = st.members[ld.member]
            a, ex = st.nodes[m.start].xyz, st.axes(m.id)[0]
            if isinstance(ld, SpacePointLoad):
                f = np.array(ld.force)
                p = a + ld.at * ex
                _arrow(ax, p - f / np.linalg.norm(f) * scale, p, "#c0392b")
                continue
            for t in np.linspace(0, 1, 5):
                x = ld.start + t * (ld.end - ld.start)
                w = (1 - t) * np.array(ld.w0) + t * np.array(ld.w1)
                if np.any(w):
                    p = a + x * ex
                    label = (f"{number(np.linalg.norm(w) / q.factor('distributed'))} "
                             f"{q.distributed_unit}" if t == 0.5 else None)
                    _arrow(ax, p - w / np.linalg.norm(w) * 0.5 * scale, p, "#e67e22", label)


def _peak(sol, case: str, field: str) -> float:
    """Largest size of ``field`` over the members (SI)."""
    return max(max(abs(float(v)) for v in r.fields[field](np.linspace(0, r.length, 41)))
               for r in sol.cases[case].members.values())


def _round_off(sol, case: str, field: str) -> float:
    """Below this a value of ``field`` is round-off (the scale of the case's loads and
    reactions, times the longest member for a moment; as the reported numbers)."""
    from ..output.reported import ROUND_OFF

    c = sol.cases[case]
    st = sol.structure
    force = max([abs(float(v)) for v in c.p] + [abs(v) for r in c.reactions.values()
                                                for v in r.values()] + [1e-300])
    lmax = max(st.length(m) for m in st.members)
    return 1e3 * ROUND_OFF * force * (lmax if field in ("t", "my", "mz") else 1.0)


def _diagram(ax, sol, case: str, field: str, size: float):
    """A section-force diagram drawn in each member's plane: my offset along local −z for
    positive values (the tension side), mz along local −y, n and t along local z."""
    st = sol.structure
    q = quantities(st.units)
    res = sol.cases[case].members
    unit, factor = ((q.moment_unit, q.factor("moment")) if field in ("t", "my", "mz")
                    else (q.force_unit, q.factor("force")))
    peak = _peak(sol, case, field)
    tol = _round_off(sol, case, field)
    if peak <= tol:
        ax.annotate("zero in every member", (0.5, 0.05), xycoords="axes fraction",
                    ha="center", fontsize=7)
        return unit
    scale = 0.15 * size / peak
    offset_axis, sign = {"my": (2, -1.0), "mz": (1, -1.0), "n": (2, 1.0), "t": (2, 1.0)}[field]
    for mid, r in res.items():
        m = st.members[mid]
        if not m.is_beam and field != "n":
            continue
        axes = st.axes(mid)
        a = st.nodes[m.start].xyz
        xs = np.linspace(0, r.length, 41)
        vals = np.asarray(r.fields[field](xs), dtype=float)
        vals[np.abs(vals) <= tol] = 0.0
        base = [a + x * axes[0] for x in xs]
        pts = [b + sign * v * scale * axes[offset_axis] for b, v in zip(base, vals, strict=True)]
        poly = [project(p) for p in [base[0], *pts, base[-1]]]
        ax.fill([p[0] for p in poly], [p[1] for p in poly], color=_DIAGRAM[field], alpha=0.25,
                lw=0, zorder=1)
        ax.plot([p[0] for p in poly[1:-1]], [p[1] for p in poly[1:-1]], color=_DIAGRAM[field],
                lw=0.9, zorder=3)
        k = int(np.argmax(np.abs(vals)))
        if abs(vals[k]) > 0.0:
            ax.annotate(f"{number(vals[k] / factor)}", project(pts[k]), fontsize=6,
                        color=_DIAGRAM[field])
    return unit


def _plan(ax, sol, case: str):
    """Plan view (x right, y up) with each member's twist marked: a double-headed arrow
    along the member (the torque vector) and its value."""
    st = sol.structure
    q = quantities(st.units)
    for m in st.members.values():
        a, b = st.nodes[m.start].xyz, st.nodes[m.end].xyz
        ax.plot([a[0], b[0]], [a[1], b[1]], color=_MEMBER, lw=1.6, ls="-" if m.is_beam else "--")
        if not m.is_beam:
            continue
        t = sol.cases[case].members[m.id].at("t", 0.0)
        if abs(t) <= 1e-9 * max(1.0, abs(t)) or abs(t) / q.factor("moment") < 5e-4:
            continue
        mid, ex = 0.5 * (a + b), st.axes(m.id)[0]
        d = ex * 0.12 * st.length(m.id) * (1 if t > 0 else -1)
        ax.annotate("", xy=(mid + d)[:2], xytext=(mid - d)[:2],
                    arrowprops={"arrowstyle": "-|>", "color": _DIAGRAM["t"], "lw": 1.4})
        ax.annotate(f"T {number(t / q.factor('moment'))}", mid[:2], xytext=(3, 4),
                    textcoords="offset points", fontsize=6, color=_DIAGRAM["t"])
    for sup in st.supports.values():
        n = st.nodes[sup.node]
        ax.plot(n.x, n.y, marker="^", ms=7, color="#555555")
    ax.set_aspect("equal")
    ax.set_xlabel(f"x ({q.length_unit})", fontsize=7)
    ax.set_ylabel(f"y ({q.length_unit})", fontsize=7)
    ax.tick_params(labelsize=6)


def plot_space(sol: SpaceSolution, path: str, case: str | None = None,
               diagrams: tuple[str, ...] | None = None) -> None:
    """Write the drawing of one load case (the first by default) to ``path`` (.png/.svg)."""
    import matplotlib

    matplotlib.use("Agg")
    import matplotlib.pyplot as plt

    st = sol.structure
    case = case or next(iter(sol.cases))
    if diagrams is None:
        # the default leaves out the plan of a structure that is not a grid and a
        # force diagram that is zero (round-off) in every member (the tables show it)
        diagrams = tuple(d for d in SPACE_DIAGRAMS if (d != "plan" or is_grid(st)) and (
            d in ("structure", "deflected", "plan")
            or _peak(sol, case, d) > _round_off(sol, case, d)))
    size = _size(st)
    q = quantities(st.units)
    n = len(diagrams)
    cols = 2 if n > 1 else 1
    rows = math.ceil(n / cols)
    fig, axs = plt.subplots(rows, cols, figsize=(5.2 * cols, 4.2 * rows), squeeze=False)
    titles = {"structure": f"Structure and loads — case {case} (axonometric view)",
              "deflected": "Deflected shape (scaled)",
              "n": "N — axial force", "t": "T — twist (in the local x–z plane)",
              "my": "My — drawn on the tension side (local x–z plane)",
              "mz": "Mz — drawn on the tension side (local x–y plane)",
              "plan": "Plan view: twist of each member (torque arrows)"}
    for k, d in enumerate(diagrams):
        ax = axs[k // cols][k % cols]
        if d == "plan":
            _plan(ax, sol, case)
            ax.set_title(titles[d] + f", {q.moment_unit}", fontsize=8)
            continue
        _frame(ax, st, "#b0b0b0" if d != "structure" else _MEMBER,
               1.0 if d != "structure" else 1.6)
        if d == "structure":
            _supports(ax, st, size)
            _loads(ax, st, case, size)
            for nid, node in st.nodes.items():
                ax.annotate(nid, project(node.xyz), fontsize=7, xytext=(3, 3),
                            textcoords="offset points")
            title = titles[d]
        elif d == "deflected":
            disp = nodal_displacements(sol, case)
            peak = max(float(np.linalg.norm(v[:3])) for v in disp.values()) or 1.0
            shapes = {mid: member_shape(sol, case, mid, disp) for mid in st.members}
            base = {mid: np.linspace(st.nodes[m.start].xyz, st.nodes[m.end].xyz, 41)
                    for mid, m in st.members.items()}
            big = max(float(np.max(np.linalg.norm(shapes[m] - base[m], axis=1)))
                      for m in st.members) or peak
            factor = 0.1 * size / big
            for mid in st.members:
                pts = base[mid] + factor * (shapes[mid] - base[mid])
                xy = [project(p) for p in pts]
                ax.plot([p[0] for p in xy], [p[1] for p in xy], color="#1f4e9b", lw=1.4,
                        zorder=3)
            title = (titles[d] + f"; largest {number(big / q.factor('displacement'))} "
                     f"{q.displacement_unit}, drawn ×{number(factor)}")
        else:
            unit = _diagram(ax, sol, case, d, size)
            title = f"{titles[d]}, {unit}"
        ax.set_title(title, fontsize=8)
        ax.set_aspect("equal")
        ax.axis("off")
    for k in range(n, rows * cols):
        axs[k // cols][k % cols].axis("off")
    fig.suptitle(f"{st.name} — check by a qualified engineer before use", fontsize=9)
    fig.tight_layout()
    fig.savefig(path, dpi=130)
    plt.close(fig)
