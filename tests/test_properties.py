"""Property-based checks on random structures (continuous beams, trusses, frames).

For random stable structures under random loads, settlements, temperatures and misfits,
written as case files and read by the real reader:

* the force method and the independent direct stiffness method agree (reactions, member
  end forces, node displacements) to 1e-8 of the case's force / displacement scale;
  a structure the force method finds unstable is a mechanism for the stiffness method too;
* the flexibility matrix is symmetric (Maxwell-Betti) and positive definite (positive
  strain energy of every combination of unit redundants);
* the results do not depend on the redundants chosen (uniqueness of the elastic solution,
  Kirchhoff): a second, randomly chosen valid set gives the same forces and displacements.

The default run is short (12 examples per family and check); ``-m slow`` runs
many more examples of all three checks.
"""

from __future__ import annotations

import dataclasses
import random
import sys
from pathlib import Path

import numpy as np
import pytest
from hypothesis import HealthCheck, assume, given, settings
from hypothesis import strategies as st

sys.path.insert(0, str(Path(__file__).parent))
from _random_structures import beams, frames, trusses  # noqa: E402
from leastwork.verify import solve_stiffness  # noqa: E402

import leastwork  # noqa: E402
from leastwork.errors import MechanismError  # noqa: E402
from leastwork.topology import build_topology  # noqa: E402

REL = 1e-8

settings.register_profile(
    "leastwork-properties-fast", max_examples=12, deadline=None, derandomize=True,
    suppress_health_check=[HealthCheck.too_slow, HealthCheck.data_too_large])
settings.register_profile(
    "leastwork-properties-slow", max_examples=300, deadline=None,
    suppress_health_check=[HealthCheck.too_slow, HealthCheck.data_too_large])
FAST = settings.get_profile("leastwork-properties-fast")
SLOW = settings.get_profile("leastwork-properties-slow")

FAMILIES = {"beam": beams(), "truss": trusses(), "frame": frames()}


# ---------------------------------------------------------------- helpers


def _stable(case):
    """(structure, force-method solution) of a random case; a mechanism is checked to be
    one for the stiffness method too and then rejected."""
    structure = leastwork.loads_case(case.text, source=f"<random {case.family}>")
    if not build_topology(structure).stable:
        for name in structure.case_names:
            with pytest.raises(MechanismError):
                solve_stiffness(structure, name)
        assume(False)
    sol = leastwork.solve(structure, verify=False)
    # a near-mechanism (hinges or bearings almost in line after rounding the coordinates)
    # is warned about by the tool; agreement to 1e-8 is not expected there
    assume(not any("near-mechanism" in w for w in sol.warnings))
    return structure, sol


def _scales(structure, cr) -> tuple[float, float, float]:
    """(force, moment, displacement) scales of one case of a force-method result."""
    lmax = max(structure.length(m) for m in structure.members)
    forces = [abs(v) for rs in cr.reactions.values() for k, v in rs.items() if k != "rz"]
    forces += [abs(v) for m in cr.members.values() for v in (*m.start[:2], *m.end[:2])]
    # moments over the longest member count too: a couple carried by a rotational spring
    # alone leaves every force zero
    forces += [abs(v) / lmax for rs in cr.reactions.values() for k, v in rs.items() if k == "rz"]
    forces += [abs(v) / lmax for m in cr.members.values() for v in (m.start[2], m.end[2])]
    force = max(max(forces), cr.equilibrium_scale)
    topo_dofs = cr.released.topo.dofs
    u = cr.nodal_displacements
    trans = max(abs(v) for d, v in zip(topo_dofs, u) if not d.endswith(".rz"))
    rot = max([abs(v) for d, v in zip(topo_dofs, u) if d.endswith(".rz")], default=0.0)
    # floor: a millionth of the natural displacement (force * L^3 / EI or force * L / EA),
    # for a case in which hardly any node moves (round-off is ~1e-16 of it)
    flex = [lmax**3 / m.EI for m in structure.members.values() if m.EI]
    flex += [lmax / m.EA for m in structure.members.values() if m.EA]
    return force, force * lmax, max(trans, rot * lmax, 1e-6 * force * max(flex))


def _assert_close(got: float, want: float, scale: float, what: str) -> None:
    assert abs(got - want) <= REL * scale, f"{what}: {got!r} vs {want!r} (scale {scale:.3g})"


def _check_agreement(structure, sol, summary: str) -> None:
    lmax = max(structure.length(m) for m in structure.members)
    dof_index = sol.topology.dof_index
    for name, cr in sol.cases.items():
        res = solve_stiffness(structure, name)
        fs, ms, us = _scales(structure, cr)
        where = f"{summary}, case {name}"
        for node, rs in cr.reactions.items():
            assert set(res.reactions[node]) == set(rs), where
            for k, v in rs.items():
                _assert_close(res.reactions[node][k], v, ms if k == "rz" else fs,
                              f"{where}: reaction {node}.{k}")
        for mid, mr in cr.members.items():
            for end, want in (("start", mr.start), ("end", mr.end)):
                got = res.end_forces[mid][0 if end == "start" else 1]
                for label, g, w, s in zip("nvm", got, want, (fs, fs, ms)):
                    _assert_close(g, w, s, f"{where}: {mid}.{end}.{label}")
        for node, (ux, uy, rz) in res.displacements.items():
            for d, v in (("x", ux), ("y", uy), ("rz", rz)):
                key = f"{node}.{d}"
                assert (v is None) == (key not in dof_index), f"{where}: {key}"
                if v is None:
                    continue
                scale = us / lmax if d == "rz" else us
                _assert_close(v, cr.nodal_displacements[dof_index[key]], scale,
                              f"{where}: displacement {key}")
                _assert_close(v, cr.displacements[key], scale, f"{where}: target {key}")


def _check_flexibility(sol) -> None:
    f = sol.flexibility
    f = np.asarray(f.toarray() if hasattr(f, "toarray") else f, dtype=float)
    if f.size == 0:
        return
    d = 1.0 / np.sqrt(np.diag(f))
    g = f * d[:, None] * d[None, :]  # unit diagonal; symmetry and definiteness unchanged
    assert np.abs(g - g.T).max() <= 1e-10
    assert np.linalg.eigvalsh(0.5 * (g + g.T)).min() > 1e-12


def _alternative_redundants(structure, sol, rnd: random.Random) -> list[str] | None:
    """A second valid set of redundants: the columns left out by a greedy, well-conditioned
    basis of the equilibrium matrix taken in random order (None when the degree is 0)."""
    topo = sol.topology
    if topo.degree == 0:
        return None
    lref = float(np.mean([structure.length(m) for m in structure.members]))
    S = topo.A * np.array([1.0 / lref if d.endswith(".rz") else 1.0 for d in topo.dofs])[:, None]
    S = S / np.linalg.norm(S, axis=0)
    order = list(range(S.shape[1]))
    rnd.shuffle(order)
    kept: list[int] = []
    Q = np.zeros((S.shape[0], 0))
    for threshold in (0.3, 1e-6):
        for j in order:
            if j in kept or len(kept) == S.shape[0]:
                continue
            r = S[:, j] - Q @ (Q.T @ S[:, j])
            r -= Q @ (Q.T @ r)
            if np.linalg.norm(r) > threshold:
                kept.append(j)
                Q = np.column_stack([Q, r / np.linalg.norm(r)])
    assert len(kept) == S.shape[0]
    return [topo.columns[j].name for j in range(S.shape[1]) if j not in kept]


def _check_redundant_choice(structure, sol, rnd: random.Random, summary: str) -> None:
    names = _alternative_redundants(structure, sol, rnd)
    if names is None:
        return
    other = leastwork.solve(structure, names)
    assert sorted(other.redundant_names) == sorted(names)
    _check_flexibility(other)
    lmax = max(structure.length(m) for m in structure.members)
    for case, cr in sol.cases.items():
        alt = other.cases[case]
        fs, ms, us = _scales(structure, cr)
        where = f"{summary}, case {case}, redundants {names} vs {sol.redundant_names}"
        for node, rs in cr.reactions.items():
            for k, v in rs.items():
                _assert_close(alt.reactions[node][k], v, ms if k == "rz" else fs,
                              f"{where}: reaction {node}.{k}")
        for mid, mr in cr.members.items():
            for got, want in ((alt.members[mid].start, mr.start), (alt.members[mid].end, mr.end)):
                for g, w, s in zip(got, want, (fs, fs, ms)):
                    _assert_close(g, w, s, f"{where}: member {mid}")
        for d, g, w in zip(sol.topology.dofs, alt.nodal_displacements, cr.nodal_displacements):
            _assert_close(g, w, us / lmax if d.endswith(".rz") else us, f"{where}: {d}")


# ---------------------------------------------------------------- default (short) runs


@pytest.mark.parametrize("family", FAMILIES)
@FAST
@given(data=st.data())
def test_force_and_stiffness_methods_agree(family, data):
    case = data.draw(FAMILIES[family])
    structure, sol = _stable(case)
    _check_agreement(structure, sol, case.summary)


@pytest.mark.parametrize("family", FAMILIES)
@FAST
@given(data=st.data())
def test_flexibility_is_symmetric_positive_definite(family, data):
    case = data.draw(FAMILIES[family])
    _, sol = _stable(case)
    _check_flexibility(sol)


@pytest.mark.parametrize("family", FAMILIES)
@FAST
@given(data=st.data(), rnd=st.randoms(use_true_random=False))
def test_results_do_not_depend_on_the_redundants(family, data, rnd):
    case = data.draw(FAMILIES[family])
    structure, sol = _stable(case)
    _check_redundant_choice(structure, sol, rnd, case.summary)


def _check_local_basis(structure, summary: str) -> None:
    """The sparse path (local self-stress states) on the same random structure: agreement
    with the stiffness method and a symmetric positive definite flexibility matrix."""
    unnamed = dataclasses.replace(structure, redundants=None)
    local = leastwork.solve(unnamed, basis="local", verify=False)
    assert local.basis == "local"
    A, N = local.topology.A_sparse, local.B.tocsc()
    if N.shape[1]:  # every state a self-stress to round-off (A N = 0)
        resid = abs(A @ N).max()
        assert resid <= 1e-12 * max((abs(A) @ abs(N)).max(), 1e-300), f"{summary}: A N"
    _check_agreement(unnamed, local, f"{summary} (local basis)")
    _check_flexibility(local)


@pytest.mark.parametrize("family", FAMILIES)
@FAST
@given(data=st.data())
def test_local_basis_agrees_with_the_stiffness_method(family, data):
    case = data.draw(FAMILIES[family])
    structure, _ = _stable(case)
    _check_local_basis(structure, case.summary)


# ---------------------------------------------------------------- long runs (-m slow)


@pytest.mark.slow
@pytest.mark.parametrize("family", FAMILIES)
@SLOW
@given(data=st.data(), rnd=st.randoms(use_true_random=False))
def test_long_run_all_properties(family, data, rnd):
    case = data.draw(FAMILIES[family])
    structure, sol = _stable(case)
    _check_agreement(structure, sol, case.summary)
    _check_flexibility(sol)
    _check_redundant_choice(structure, sol, rnd, case.summary)
    _check_local_basis(structure, case.summary)
