"""The sparse force method on a local self-stress basis (leastwork.selfstress,
leastwork.sparse_solve) and reanalysis (leastwork.studies.reanalysis).

Checks are invariants and agreement of independent methods:

* the local basis and the released-structure basis (the small path) give the same forces,
  reactions and displacements on every bundled case;
* on generated mid-size structures (a few thousand members: braced grid, storey frame,
  beam with king-post ties) the local basis agrees with the direct stiffness method
  (leastwork.verify, an independent sparse solver) to 1e-8 of the largest force;
* every state is a self-stress (A N = 0 to round-off), the states are independent (their
  closing rows form a non-singular matrix), the flexibility N'FN is symmetric
  (Maxwell-Betti) and positive definite;
* reanalysis with new sections, springs and loads equals a fresh solve.
"""

from __future__ import annotations

import dataclasses
import json
import subprocess
import sys
from pathlib import Path

import numpy as np
import pytest
from scipy.sparse.linalg import splu

import leastwork
from leastwork import CaseError, MechanismError, reanalyse
from leastwork.verify import solve_stiffness

ROOT = Path(__file__).resolve().parents[1]

from generators import (  # noqa: E402
    braced_grid,
    braced_truss,
    multi_span_truss,
    multi_span_truss_degree,
    storey_frame,
    structure,
)

CASES = sorted((ROOT / "cases").glob("*.toml"))


def _kingpost_beam(spans: int, span: float = 8.0, sag: float = 1.2) -> str:
    """A continuous beam over ``spans`` spans, each trussed underneath by a king post (a
    bar down from mid-span) and two ties from the span's ends to the post's foot; pinned at
    the first support, rollers on the others, a spring under the last one; 15 kN/m on the
    beam, 4 kN sideways at the first mid-span. Beam, bars and a spring: a mixed structure."""
    nodes, beams, bars, sup, loads = [], [], [], [], []
    for i in range(spans + 1):
        nodes.append(f"S{i} = [{span * i:g}, 0]")
    for i in range(spans):
        nodes.append(f"M{i} = [{span * i + span / 2:g}, 0]")
        nodes.append(f"K{i} = [{span * i + span / 2:g}, {-sag:g}]")
        beams.append(f'A{i} = {{ nodes = ["S{i}", "M{i}"], EI = "3.0e4 kN*m^2", '
                     'EA = "2.0e6 kN" }')
        beams.append(f'Z{i} = {{ nodes = ["M{i}", "S{i + 1}"], EI = "3.0e4 kN*m^2", '
                     'EA = "2.0e6 kN" }')
        bars.append(f'P{i} = {{ nodes = ["M{i}", "K{i}"], EA = "4.0e5 kN" }}')
        bars.append(f'T{i} = {{ nodes = ["S{i}", "K{i}"], EA = "3.0e5 kN" }}')
        bars.append(f'U{i} = {{ nodes = ["K{i}", "S{i + 1}"], EA = "3.0e5 kN" }}')
        loads.append(f'[[loads]]\nmember = "A{i}"\nwy = "-15 kN/m"\n')
        loads.append(f'[[loads]]\nmember = "Z{i}"\nwy = "-15 kN/m"\n')
    sup.append('S0 = "pinned"')
    sup += [f'S{i} = "roller"' for i in range(1, spans)]
    sup.append(f'S{spans} = {{ springs = {{ y = "5e4 kN/m" }} }}')
    loads.append('[[loads]]\nnode = "M0"\nfx = "4 kN"\n')
    return ('[structure]\nname = "trussed runway beam"\nunits = { force = "kN", length = "m" }\n'
            "[nodes]\n" + "\n".join(nodes) + "\n[beams]\n" + "\n".join(beams)
            + "\n[bars]\n" + "\n".join(bars) + "\n[supports]\n" + "\n".join(sup) + "\n"
            + "\n".join(loads))


def _unnamed(st):
    """The structure with its own choice of redundants dropped (the local basis picks)."""
    return dataclasses.replace(st, redundants=None)


def _largest_force(res) -> float:
    return max(res.equilibrium_scale, 1.0)


def _end_force_difference(st, a, b) -> float:
    """Largest difference of member end forces and reactions between two case results,
    relative to the largest force (moments divided by the longest member)."""
    lref = max(st.length(m) for m in st.members)
    worst = 0.0
    for mid, ma in a.members.items():
        mb = b.members[mid]
        for k, (x, y) in enumerate(zip(ma.start + ma.end, mb.start + mb.end, strict=True)):
            worst = max(worst, abs(x - y) / (lref if k % 3 == 2 else 1.0))
    for node, comps in a.reactions.items():
        for d, x in comps.items():
            worst = max(worst, abs(x - b.reactions[node][d]) / (lref if d == "rz" else 1.0))
    return worst / _largest_force(a)


def _stiffness_difference(st, res) -> float:
    other = solve_stiffness(st, res.name)
    lref = max(st.length(m) for m in st.members)
    worst = 0.0
    for mid, mr in res.members.items():
        ts, te = other.end_forces[mid]
        for k, (x, y) in enumerate(zip(mr.start + mr.end, ts + te, strict=True)):
            worst = max(worst, abs(x - y) / (lref if k % 3 == 2 else 1.0))
    for node, comps in res.reactions.items():
        for d, x in comps.items():
            worst = max(worst, abs(x - other.reactions[node].get(d, 0.0))
                        / (lref if d == "rz" else 1.0))
    return worst / _largest_force(res)


# ------------------------------------------------------------------ small path agreement
@pytest.mark.parametrize("path", CASES, ids=lambda p: p.stem)
def test_local_basis_matches_released_basis_on_bundled_cases(path):
    st = _unnamed(leastwork.load_case(path))
    small = leastwork.solve(st, basis="released", verify=False)
    local = leastwork.solve(st, basis="local", verify=False)
    assert local.basis == "local" and small.basis == "released"
    assert local.topology.degree == small.topology.degree
    assert local.topology.internal == small.topology.internal
    for name, a in small.cases.items():
        b = local.cases[name]
        assert _end_force_difference(st, a, b) < 1e-9, name
        umax = max(float(np.max(np.abs(a.nodal_displacements))), 1e-300)
        assert np.max(np.abs(a.nodal_displacements - b.nodal_displacements)) < 1e-9 * umax
        for t, v in a.displacements.items():
            assert b.displacements[t] == pytest.approx(v, rel=1e-8, abs=1e-12 * umax)
        # every basic force and reaction, not only the end forces, agrees
        lref = max(st.length(m) for m in st.members)
        lever = np.array([lref if c.is_moment else 1.0 for c in small.topology.columns])
        assert np.max(np.abs(a.s - b.s) / lever) < 1e-9 * _largest_force(a)
        assert b.equilibrium_ok


# ------------------------------------------------------------------ mid-size vs stiffness
MID_SIZE = {
    "braced grid 30x20": lambda: braced_grid(30, 20),  # 2420 bars
    "storey frame 35x30": lambda: storey_frame(35, 30),  # 2130 beams, 3150 redundants
    "king-post beam 500 spans": lambda: _kingpost_beam(500),  # 2500 members
}


@pytest.fixture(scope="module", params=list(MID_SIZE))
def mid_size(request):
    st = structure(MID_SIZE[request.param]())
    return st, leastwork.solve(st, verify=False)


def test_mid_size_takes_the_local_basis_and_agrees_with_stiffness(mid_size):
    st, sol = mid_size
    assert sol.basis == "local"  # automatic: above LOCAL_BASIS_MIN_COLUMNS
    for res in sol.cases.values():
        assert res.equilibrium_ok
        assert _stiffness_difference(st, res) < 1e-8


def test_states_are_independent_self_stresses(mid_size):
    st, sol = mid_size
    topo = sol.topology
    A, N = topo.A_sparse, sol.B.tocsc()
    # A N = 0 to round-off, column by column (scale: |A| |N|)
    resid = abs(A @ N)
    scale = abs(A) @ abs(N)
    assert (resid.max() if resid.nnz else 0.0) <= 1e-12 * max(scale.max(), 1e-300)
    # independent: the rows of the closing columns form a non-singular (triangular) matrix
    T = N[sol.redundant_columns, :].tocsc()
    assert np.allclose(T.diagonal(), 1.0)
    assert T.shape[0] == topo.degree
    pivots = np.abs(splu(T).U.diagonal())
    assert pivots.min() > 1e-8 * pivots.max()


def test_flexibility_is_symmetric_positive_definite(mid_size):
    st, sol = mid_size
    N, F = sol.B.tocsc(), sol.F
    raw = (N.T @ F @ N).toarray()
    assert np.max(np.abs(raw - raw.T)) <= 1e-12 * np.max(np.abs(raw))  # Maxwell-Betti
    d = np.sqrt(np.diag(raw))
    np.linalg.cholesky(raw / np.outer(d, d))  # raises unless positive definite


def test_states_stay_local(mid_size):
    """The point of the local basis: each state touches a few members (a few panels at
    most: docs/performance.md), so the flexibility matrix is as sparse as the structure (a
    released-structure basis is nearly dense)."""
    st, sol = mid_size
    info = sol.to_dict()["basis"]
    assert info["kind"] == "local" and info["long_range_states"] == 0
    assert info["members_per_state"]["max"] <= 24
    n = sol.topology.degree
    assert sol.flexibility.nnz <= 40 * n


# ------------------------------------------------------------------ long-range states
def test_long_range_state_of_a_truss_pinned_at_both_ends():
    """Pinned at both far ends, the truss gains one external redundant whose self-stress
    runs along the whole chord: found by the global step, results as on the small path."""
    text = braced_truss(60).replace('L60 = "roller"', 'L60 = "pinned"')
    st = structure(text)
    local = leastwork.solve(st, basis="local", verify=False)
    small = leastwork.solve(st, basis="released", verify=False)
    # m + r - 2j = 301 bars + 4 reactions - 2 * 122 joints = 61 (common practice: the
    # counting rule of pin-jointed plane trusses)
    assert local.topology.degree == small.topology.degree == 61
    assert local.long_range_states >= 1
    for name, a in small.cases.items():
        assert _end_force_difference(st, a, local.cases[name]) < 1e-9


def test_long_range_states_of_a_girder_over_many_supports_stay_well_conditioned():
    """A cross-braced girder of 120 panels on a support every 10: 11 long-range states
    (one per support beyond the second). Closed at their largest forces (the chords over
    the supports), they leave a released structure of short pieces: the scaled
    flexibility's condition number stays near that of the panel states alone (about 3;
    it was 7e5 with the latest forces of the sweep as closers), and the answer agrees with
    the stiffness solver."""
    st = structure(multi_span_truss(120, every=10))
    local = leastwork.solve(st, basis="local", verify=False)
    # m + r - 2j = n + s - 2 (common practice: the counting rule of pin-jointed trusses)
    assert local.topology.degree == multi_span_truss_degree(120, every=10) == 131
    assert local.long_range_states >= 5
    assert local.condition < 10.0
    for name, res in local.cases.items():
        other = solve_stiffness(st, name)
        scale = max(abs(v) for ends in other.end_forces.values() for e in ends for v in e)
        worst = max(abs(a - b) for mid, mr in res.members.items()
                    for ours, theirs in zip((mr.start, mr.end), other.end_forces[mid],
                                            strict=True)
                    for a, b in zip(ours, theirs, strict=True))
        assert worst <= 1e-9 * scale


def test_unstable_structure_on_the_local_path_is_a_mechanism():
    text = braced_truss(40).replace('L0 = "pinned"', 'L0 = "roller"')  # free to slide
    st = structure(text)
    with pytest.raises(MechanismError):
        leastwork.solve(st, basis="local", verify=False)


def test_named_redundants_need_the_released_basis():
    st = leastwork.load_case(ROOT / "cases" / "floor-beam-3span.toml")
    with pytest.raises(CaseError, match="local self-stress basis"):
        leastwork.solve(st, basis="local")
    assert leastwork.solve(st).basis == "released"  # auto keeps the user's redundants


# ------------------------------------------------------------------ JSON of a local basis
def test_json_compatibility_equations_hold_with_amplitudes():
    st = structure(storey_frame(3, 2))
    sol = leastwork.solve(st, basis="local")
    d = json.loads(json.dumps(sol.to_dict()))
    assert d["basis"]["kind"] == "local" and d["basis"]["states"] == len(d["redundants"])
    for cj in d["cases"].values():
        flex = cj["flexibility"]
        n = flex["size"]
        D = np.zeros((n, n))
        for i, j, v in zip(flex["rows"], flex["columns"], flex["values"], strict=True):
            D[i, j] = D[j, i] = v
        X = np.array(cj["amplitudes"])
        lhs = D @ X + np.array(cj["load_terms"])
        imposed = np.array(cj["imposed"])
        scale = np.max(np.abs(D)) * np.max(np.abs(X))
        assert np.max(np.abs(lhs - imposed)) <= 1e-9 * scale


def test_audit_trail_names_what_each_state_closes():
    st = structure(storey_frame(1, 2))
    sol = leastwork.solve(st, basis="local")
    from leastwork.output.audit import audit_sheet

    text = str([b for step in audit_sheet(sol).steps for b in step.blocks])
    for name in sol.redundant_names:
        assert name in text
    assert "closes the cut of" in text


# ------------------------------------------------------------------ reanalysis
def _resized(text: str) -> str:
    return (text.replace('EI = "3.0e4 kN*m^2"', 'EI = "4.5e4 kN*m^2"')
            .replace('EA = "3.0e5 kN"', 'EA = "2.2e5 kN"')
            .replace('y = "5e4 kN/m"', 'y = "2e4 kN/m"')
            .replace('wy = "-15 kN/m"', 'wy = "-11 kN/m"'))


@pytest.mark.parametrize("basis", ["local", "released"])
def test_reanalysis_with_new_sections_equals_a_fresh_solve(basis):
    text = _kingpost_beam(12)
    first = leastwork.solve(structure(text), basis=basis, verify=False)
    st2 = structure(_resized(text))
    again = reanalyse(first, st2, verify=False)
    fresh = leastwork.solve(st2, basis=basis, verify=False)
    assert again.B is first.B and again.released is first.released  # states reused
    for name, a in fresh.cases.items():
        assert _end_force_difference(st2, a, again.cases[name]) < 1e-10
        assert np.allclose(again.cases[name].nodal_displacements, a.nodal_displacements,
                           rtol=0, atol=1e-10 * np.max(np.abs(a.nodal_displacements)))


def test_reanalysis_refuses_another_layout():
    first = leastwork.solve(structure(_kingpost_beam(4)), verify=False)
    moved = structure(_kingpost_beam(4, sag=1.5))
    with pytest.raises(CaseError, match="joint K0 moved"):
        reanalyse(first, moved)


# ------------------------------------------------------------------ command line
def test_cli_solves_a_large_case_on_the_local_basis(tmp_path):
    case = tmp_path / "grid.toml"
    case.write_text(braced_grid(30, 12))
    run = subprocess.run([sys.executable, "-m", "leastwork", "solve", str(case), "--json"],
                         capture_output=True, text=True, timeout=120)
    assert run.returncode == 0, run.stderr
    d = json.loads(run.stdout)
    assert d["basis"]["kind"] == "local"
    assert d["indeterminacy"]["degree"] == 12 * (2 * 30 - 1)  # m + r - 2j (common practice)
    assert all(c["checks"]["equilibrium_ok"] for c in d["cases"].values())


def test_condition_estimate_is_close_and_repeatable():
    """The local path estimates cond(δ) (2-norm, unit diagonal) by power and inverse
    iteration: a lower bound within 10 % of the exact eigenvalue ratio, the same every run."""
    st = structure(storey_frame(6, 5))
    a = leastwork.solve(st, basis="local", verify=False)
    b = leastwork.solve(st, basis="local", verify=False)
    D = a.flexibility.toarray()
    d = np.sqrt(np.diag(D))
    w = np.linalg.eigvalsh(D / np.outer(d, d))
    exact = w.max() / w.min()
    assert a.condition == b.condition
    assert 0.9 * exact <= a.condition <= exact * (1 + 1e-9)


def test_audit_trail_of_many_local_states_is_summarised_and_says_so(tmp_path):
    """Above AUDIT_MAX_LOCAL_STATES states --steps and report write a summary sheet that
    says so first (the trail would run to tens of thousands of lines): the structure and
    method, the governing values (the extremes of the solution's own end forces and
    reactions, an invariant), the equilibrium check and the cross-check."""
    from leastwork.output.audit import AUDIT_MAX_LOCAL_STATES, audit_sheet
    from leastwork.output.sheet import Grid

    text = storey_frame(6, 5)  # three per closed ring (common practice): 3 * 6 * 5 = 90
    sol = leastwork.solve(structure(text), basis="local")
    assert sol.topology.degree == 90 > AUDIT_MAX_LOCAL_STATES
    sheet = audit_sheet(sol)
    assert len(sheet.steps) == 3
    first = sheet.steps[0].blocks[0]
    assert first.tone == "warning" and "SUMMARY ONLY" in first.text and "90" in first.text
    res = sol.cases[next(iter(sol.cases))]
    grid = next(b for b in sheet.steps[1].blocks if isinstance(b, Grid))
    got = {row[0]: row[2] for row in grid.rows}
    n = [v for m in res.members.values() for v in (m.start[0], m.end[0])]
    m = [max(abs(r.m_max[0]), abs(r.m_min[0])) for r in res.members.values()]
    assert got["largest tension n"] == pytest.approx(max(n) / 1e3, rel=1e-12)  # kN
    assert got["largest compression n"] == pytest.approx(min(n) / 1e3, rel=1e-12)
    assert got["largest |m|"] == pytest.approx(max(m) / 1e3, rel=1e-12)  # kN*m
    assert any("agrees" in b.text for b in sheet.steps[2].blocks if hasattr(b, "text"))
    case = tmp_path / "frame.toml"
    case.write_text(text)
    for args in (["solve", str(case), "--basis", "local", "--steps"],
                 ["report", str(case), "--basis", "local", "-o", str(tmp_path / "r.html")]):
        run = subprocess.run([sys.executable, "-m", "leastwork", *args], capture_output=True,
                             text=True, timeout=120)
        assert run.returncode == 0, run.stderr
        assert "Traceback" not in run.stderr
        if "--steps" in args:
            assert "SUMMARY ONLY" in run.stdout
    assert "SUMMARY ONLY" in (tmp_path / "r.html").read_text(encoding="utf-8")
