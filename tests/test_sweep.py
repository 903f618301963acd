"""Parameter sweeps (contract 5.6): every combination solved, rows in order, the same rows
on one process, on local worker processes and on a Dask cluster.

Source: the elastic-prop reaction R = (3wL/8) / (1 + 3EI/(kL^3)) of a beam fixed at one end
and resting on a spring of stiffness k at the other (derived by least work: the prop force
is the redundant, its flexibility L^3/3EI + 1/k)."""

from __future__ import annotations

import json
import subprocess
import sys

import pytest

import leastwork
from leastwork.studies.sweep import parse_vary, plan, run_plan

W, L, EI = 10.0, 6.0, 20000.0

CASE = f"""
[structure]
name = "beam on an elastic prop"
units = {{ force = "kN", length = "m", displacement = "mm" }}

[parameters]
k = "5000 kN/m"
span = "{L} m"

[nodes]
A = [0, 0]
B = ["span", 0]

[beams]
AB = {{ nodes = ["A", "B"], EI = "{EI} kN*m^2" }}

[supports]
A = "fixed"
B = {{ springs = {{ y = "k" }} }}

[[loads]]
member = "AB"
wy = "-{W} kN/m"
"""


@pytest.fixture()
def case_file(tmp_path):
    path = tmp_path / "prop.toml"
    path.write_text(CASE)
    return path


def _prop(k: float, span: float = L) -> float:
    return (3 * W * span / 8) / (1 + 3 * EI / (k * span**3))


def test_elastic_prop_across_a_sweep_of_k(case_file):
    frame = leastwork.sweep(case_file, vary={"k": ["500 kN/m", "2000 kN/m", "1e5 kN/m"]},
                            quantities=["B.y", "A.rz", "d:B.y"])
    assert list(frame.columns) == ["k", "B.y", "A.rz", "d:B.y"]
    for row, k in zip(frame.itertuples(index=False), (500.0, 2000.0, 1e5), strict=True):
        R = _prop(k)
        assert row[1] == pytest.approx(R, rel=1e-10)
        assert row[3] == pytest.approx(-R / k * 1000, rel=1e-10)  # the spring's squeeze, mm


def test_geometry_changes_are_solved_afresh(case_file):
    # invariant: a sweep over the span (nodes move) equals solving each span directly
    frame = leastwork.sweep(case_file, vary={"span": [4.0, 5.0, 6.0]}, quantities=["B.y"])
    for span, value in zip((4.0, 5.0, 6.0), frame["B.y"], strict=True):
        assert value == pytest.approx(_prop(5000.0, span), rel=1e-10)


def test_the_same_rows_everywhere(case_file):
    # one process, local worker processes and a Dask cluster started here: identical rows
    p = plan(case_file.read_text(), str(case_file), dict([parse_vary("k=1000..9000:9")]),
             ["B.y", "AB.m_min"])
    one = run_plan(p)
    local = run_plan(p, workers=2)
    assert one == local
    distributed = pytest.importorskip("dask.distributed")
    with distributed.LocalCluster(n_workers=2, threads_per_worker=1, processes=False,
                                  dashboard_address=None) as cluster, \
            distributed.Client(cluster) as client:
        assert run_plan(p, scheduler=client) == one


def test_a_cluster_that_cannot_run_the_samples_is_one_line(case_file, monkeypatch):
    # a cluster whose workers lack leastwork fails on every chunk: one located line, not a
    # traceback, and samples are not reported as solved
    distributed = pytest.importorskip("dask.distributed")
    from leastwork.errors import CaseError
    from leastwork.studies import sweep as sweep_module

    def broken(*args, **kwargs):
        raise RuntimeError("Error during deserialization of the task graph. More text")

    monkeypatch.setattr(sweep_module, "run_chunk", broken)
    p = plan(case_file.read_text(), str(case_file), dict([parse_vary("k=1000..2000:2")]),
             ["B.y"])
    with distributed.LocalCluster(n_workers=1, threads_per_worker=1, processes=False,
                                  dashboard_address=None) as cluster, \
            distributed.Client(cluster) as client:
        with pytest.raises(CaseError) as err:
            run_plan(p, scheduler=client)
    text = str(err.value)
    assert "\n" not in text and "deserialization of the task graph." in text
    assert "More text" not in text and "same version" in text


def test_a_failed_sample_keeps_its_row(case_file):
    # span 0 makes a zero-length member: that sample fails, the others are solved
    frame = leastwork.sweep(case_file, vary={"span": [0.0, 6.0]}, quantities=["B.y"])
    assert frame["error"].notna().tolist() == [True, False]
    assert frame["B.y"].iloc[1] == pytest.approx(_prop(5000.0), rel=1e-10)


def test_command_line_rows_and_csv(case_file, tmp_path):
    out = subprocess.run([sys.executable, "-m", "leastwork", "sweep", str(case_file),
                          "--vary", "k=1000..3000:3", "--quantity", "B.y", "--json"],
                         capture_output=True, text=True, check=True)
    data = json.loads(out.stdout)
    assert [r["k"] for r in data["rows"]] == [1000.0, 2000.0, 3000.0]
    assert data["units"] == {"B.y": "kN"}
    assert data["rows"][1]["B.y"] == pytest.approx(_prop(2000.0), rel=1e-10)
    csv = tmp_path / "rows.csv"
    subprocess.run([sys.executable, "-m", "leastwork", "sweep", str(case_file), "--vary",
                    "k=1000..3000:3", "--quantity", "B.y", "-o", str(csv)],
                   capture_output=True, text=True, check=True)
    assert csv.read_text().splitlines()[0] == "k,B.y"


@pytest.mark.parametrize(("args", "words"), [
    (["--vary", "q=1..2:2", "--quantity", "B.y"], "not one of the case's [parameters]"),
    (["--vary", "k=1..2", "--quantity", "B.y"], "expected NAME=START..STOP:COUNT"),
    (["--vary", "k=1..2:2", "--quantity", "Z.y"], 'cannot read the quantity "Z.y"'),
])
def test_bad_sweeps_are_one_line(case_file, args, words):
    out = subprocess.run([sys.executable, "-m", "leastwork", "sweep", str(case_file), *args],
                         capture_output=True, text=True)
    assert out.returncode == 2 and words in out.stderr, out.stderr
    assert len(out.stderr.strip().splitlines()) == 1


BAY = """
[structure]
name = "braced bay"
units = { force = "kN", length = "m" }
[nodes]
A = [0, 0]
B = [4, 0]
C = [4, 3]
D = [0, 3]
[bars]
AD = { nodes = ["A", "D"], EA = "400000 kN" }
BC = { nodes = ["B", "C"], EA = "400000 kN" }
CD = { nodes = ["C", "D"], EA = "400000 kN" }
AC = { nodes = ["A", "C"], EA = "60000 kN" }
BD = { nodes = ["B", "D"], EA = "60000 kN" }
[supports]
A = "pinned"
B = "pinned"
"""


def test_random_lengths_spread_as_the_linear_theory(tmp_path):
    # lengths within +-1 mm, uniform, no loads: the locked-in force of a diagonal has mean
    # 0 and the standard deviation of the linear fit-up theory, sqrt(sum (G_k t_k)^2 / 3)
    # (exact_std); 1500 samples estimate a spread to about 2 % (1/sqrt(2N))
    from leastwork.studies.fitup import fitup_study

    path = tmp_path / "bay.toml"
    path.write_text(BAY)
    frame = leastwork.random_study(path, ["AC"], 1500, lengths="*=1mm", seed=7)
    sol = leastwork.solve(leastwork.load_case(path))
    study = fitup_study(sol, {m: 0.001 for m in sol.structure.members}, samples=10, seed=1)
    q = study.quantities.names.index("AC")
    theory = study.std_exact[q] / 1000.0  # kN
    assert frame["AC"].std() == pytest.approx(theory, rel=0.08)
    assert abs(frame["AC"].mean()) < 4 * theory / 1500**0.5
    assert frame.attrs["seed"] == 7


def test_random_positions_scatter_about_the_nominal_answer(tmp_path):
    # nodes within +-0.05 mm on a loaded bay: the responses stay within a hair of the
    # nominal solve (linear for small changes) and differ from sample to sample
    path = tmp_path / "bay.toml"
    path.write_text(BAY + '\n[[loads]]\nnode = "D"\nfx = "10 kN"\n')
    nominal = leastwork.solve(leastwork.load_case(path)).to_dict()["cases"]["default"]
    frame = leastwork.random_study(path, ["A.x", "AC"], 40, positions="*=0.05mm", seed=3)
    assert frame["AC"].std() > 0
    assert abs(frame["AC"].mean() - nominal["members"]["AC"]["start"]["n"]) < 1e-3 * 10
    same = leastwork.random_study(path, ["A.x", "AC"], 40, positions="*=0.05mm", seed=3,
                                  workers=2)
    assert same.equals(frame)
