"""Assembly of the direct-stiffness solver: global dof numbering, the sparse global
stiffness with its springs (ground displacement of a spring as a load), the fixed-end
forces and the load vector.

The unknowns are node displacements: ``x``, ``y`` at every node and ``rz`` where a beam end
is rigidly connected (:func:`leastwork.model.rotational_nodes`).
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import TYPE_CHECKING

import numpy as np

from ..model import Structure, rotational_nodes
from .elements import condense, element, element_map, joint_springs, local_stiffness
from .loads import CaseLoads, MemberLoading, member_loading
from .tapered import tapered_loading, tapered_stiffness

if TYPE_CHECKING:
    import scipy.sparse as sp

__all__ = ["dof_index", "restraint_row", "spring_data", "Assembly", "assemble"]


def dof_index(st: Structure) -> dict[str, int]:
    """Global numbering "NODE.x", "NODE.y", "NODE.rz" (rz only at rotational nodes)."""
    rot = rotational_nodes(st.members.values())
    index: dict[str, int] = {}
    for nid in st.nodes:
        index[f"{nid}.x"] = len(index)
        index[f"{nid}.y"] = len(index)
        if nid in rot:
            index[f"{nid}.rz"] = len(index)
    return index


def restraint_row(r, index: dict[str, int]) -> dict[int, float]:
    """Coefficients of a restraint's direction on the node's dofs (rz dropped where the node
    has no rotation of its own)."""
    row = {}
    for comp, key in zip(r.vector, ("x", "y", "rz")):
        dof = index.get(f"{r.node}.{key}")
        if comp and dof is not None:
            row[dof] = float(comp)
    return row


def spring_data(st: Structure, index, settle):
    """Springs as (restraint, row over dofs, ground displacement); a spring on a rotation
    the node does not have is left out (its entry is reported as 0.0)."""
    out = []
    for sup in st.supports.values():
        for r in sup.restraints:
            if r.is_spring:
                row = restraint_row(r, index)
                if row:
                    out.append((r, row, settle.get((sup.node, r.direction), 0.0)))
    return out


@dataclass
class Assembly:
    """Global stiffness K (springs included), fixed-end forces f0, load vector p."""

    K: sp.csr_matrix | np.ndarray  #: dense for a small structure (see assemble)
    f0: np.ndarray
    p: np.ndarray
    elements: dict[str, tuple]  #: member -> (element, k local, f0 local, T, dof map)
    elongations: dict[str, float]  #: free elongation of axially rigid members
    springs: list


def assemble(st: Structure, index: dict[str, int], loads: CaseLoads,
             dense: bool = False) -> Assembly:
    """Global stiffness (springs included), fixed-end forces and load vector of one case;
    each member's element is kept for its end forces. ``dense``: K as a numpy array (a
    small structure, solved without scipy), else sparse CSR."""
    n = len(index)
    rows: list[np.ndarray] = []
    cols: list[np.ndarray] = []
    vals: list[np.ndarray] = []
    f0g = np.zeros(n)
    p = loads.p.copy()
    elements: dict[str, tuple] = {}
    elongations: dict[str, float] = {}
    for mid in st.members:
        el = element(st, mid)
        if el.member.taper is not None:
            k = tapered_stiffness(st, mid, el.L)
            ml = MemberLoading(*tapered_loading(st, mid, el.L, el.c, el.s,
                                                loads.by_member[mid]))
        else:
            ml = member_loading(st, el, loads.by_member[mid])
            k = local_stiffness(el)
        kc, fc = condense(*joint_springs(k, ml.f0, el.springs), el.hinged)
        T = el.transform()
        g = element_map(el, index)
        live = g >= 0
        gl = g[live]
        rows.append(np.repeat(gl, gl.size))
        cols.append(np.tile(gl, gl.size))
        vals.append((T.T @ kc @ T)[np.ix_(live, live)].ravel())
        np.add.at(f0g, gl, (T.T @ fc)[live])
        elements[mid] = (el, k, ml.f0, T, g)
        if el.EA is None:
            elongations[mid] = ml.elongation
    springs = spring_data(st, index, loads.settle)
    for r, row, ground in springs:
        d = np.array(list(row))
        v = np.array(list(row.values()))
        rows.append(np.repeat(d, d.size))
        cols.append(np.tile(d, d.size))
        vals.append(r.stiffness * np.outer(v, v).ravel())
        p[d] += r.stiffness * ground * v
    if dense:
        K = np.zeros((n, n))
        if vals:
            np.add.at(K, (np.concatenate(rows), np.concatenate(cols)), np.concatenate(vals))
        return Assembly(K, f0g, p, elements, elongations, springs)
    import scipy.sparse as sp

    if vals:
        K = sp.csr_matrix((np.concatenate(vals), (np.concatenate(rows), np.concatenate(cols))),
                          shape=(n, n))
    else:
        K = sp.csr_matrix((n, n))
    return Assembly(K, f0g, p, elements, elongations, springs)
