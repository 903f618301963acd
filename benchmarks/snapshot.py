"""Save, then compare, the results of many cases: a guard for changes that must not move a
number (a restructuring of the code).

    python benchmarks/snapshot.py save DIR      # before the change
    python benchmarks/snapshot.py compare DIR   # after: every number to 1e-12 relative,
                                                # every closed form identical; entries
                                                # added to a "units" table are noted only

The set: every bundled case and starter case (JSON result; closed forms where the case has
[parameters]), random beams, trusses and frames drawn by the test suite's strategies
(springs, settlements, temperature, misfit, hinges, inclined rollers, two load cases), and
generated large structures on both bases. Each case's text is saved beside its result, so
``compare`` solves exactly what ``save`` solved.
"""

from __future__ import annotations

import contextlib
import io
import json
import math
import sys
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
sys.path[:0] = [str(ROOT / "tests"), str(ROOT / "benchmarks")]

REL = 1e-12


def _texts() -> dict[str, tuple[str, dict]]:
    """name -> (case text, options)."""
    import generators as gen
    from hypothesis import HealthCheck, given, settings
    out: dict[str, tuple[str, dict]] = {}
    for p in sorted((ROOT / "cases").glob("*.toml")):
        out[f"case-{p.stem}"] = (p.read_text(), {"symbolic": True})
    with contextlib.suppress(Exception):
        for kind in _starter_kinds():
            out[f"starter-{kind}"] = (_starter_text(kind), {"symbolic": True})
    import _random_structures as rs

    for fam in ("beams", "trusses", "frames"):
        found: list[str] = []

        @settings(max_examples=40, derandomize=True, database=None, deadline=None,
                  suppress_health_check=list(HealthCheck))
        @given(getattr(rs, fam)())
        def collect(case):
            found.append(case.text)  # noqa: B023 - run at once, in this iteration

        collect()
        for i, text in enumerate(found):
            out[f"random-{fam}-{i:02d}"] = (text, {})
    for name, text in (("truss-300", gen.braced_truss(300)), ("grid-12x10", gen.braced_grid(12, 10)),
                       ("frame-6x5", gen.storey_frame(6, 5)), ("beam-60", gen.continuous_beam(60))):
        out[f"gen-{name}-released"] = (text, {"basis": "released"})
        out[f"gen-{name}-local"] = (text, {"basis": "local"})
    return out


def _starter_kinds() -> list[str]:
    from leastwork.cli import main

    buf = io.StringIO()
    with contextlib.redirect_stdout(buf):
        main(["new", "--list"])
    return [line.split()[0] for line in buf.getvalue().splitlines() if line.strip()]


def _starter_text(kind: str) -> str:
    from leastwork.cli import main

    buf = io.StringIO()
    with contextlib.redirect_stdout(buf):
        main(["new", kind])
    return buf.getvalue()


def _result(text: str, opts: dict) -> dict:
    import leastwork
    from leastwork.errors import LeastworkError

    try:
        st = leastwork.loads_case(text, source="<snapshot>")
        res: dict = {"json": leastwork.solve(st, basis=opts.get("basis", "auto")).to_dict()}
    except LeastworkError as exc:
        return {"error": f"{type(exc).__name__}: {exc}"}
    if opts.get("symbolic") and "[parameters]" in text:
        res["symbolic"] = _symbolic(text)
    return res


def _symbolic(text: str) -> dict:
    import tempfile

    from leastwork.cli import main

    with tempfile.TemporaryDirectory() as d:
        path = Path(d) / "case.toml"
        path.write_text(text)
        out, err = io.StringIO(), io.StringIO()
        with contextlib.redirect_stdout(out), contextlib.redirect_stderr(err):
            rc = main(["solve", str(path), "--symbolic", "--json", "--no-verify"])
    if rc != 0:
        return {"exit": rc, "stderr": err.getvalue().strip()}
    d = json.loads(out.getvalue())
    return d.get("closed_forms", d)


def save(folder: Path) -> None:
    folder.mkdir(parents=True, exist_ok=True)
    texts = _texts()
    for name, (text, opts) in texts.items():
        res = _result(text, opts)
        (folder / f"{name}.json").write_text(json.dumps(
            {"text": text, "options": opts, "result": res}, indent=1, sort_keys=True))
    print(f"saved {len(texts)} cases to {folder}")


def _walk(a, b, path, out):
    if isinstance(a, dict) and isinstance(b, dict):
        for k in sorted(set(a) | set(b)):
            if k not in a and path.endswith("/units"):
                # a unit table may gain entries (a quantity listed that was implied): noted,
                # not a difference; a changed or removed unit still is one
                out["added"].append(k)
            elif k not in a or k not in b:
                out["structure"].append(f"{path}/{k}: only in {'after' if k in b else 'before'}")
            else:
                _walk(a[k], b[k], f"{path}/{k}", out)
    elif isinstance(a, list) and isinstance(b, list):
        if len(a) != len(b):
            out["structure"].append(f"{path}: length {len(a)} -> {len(b)}")
        for i, (x, y) in enumerate(zip(a, b)):
            _walk(x, y, f"{path}[{i}]", out)
    elif isinstance(a, (int, float)) and isinstance(b, (int, float)) \
            and not isinstance(a, bool) and not isinstance(b, bool):
        out["numbers"] += 1
        diff = abs(a - b)
        scale = max(abs(a), abs(b))
        rel = diff / scale if scale else 0.0
        out["largest"] = max(out["largest"], rel)
        if diff > REL * scale and not (math.isnan(a) and math.isnan(b)):
            out["differ"].append(f"{path}: {a!r} -> {b!r} (rel {rel:.2e})")
    else:
        if isinstance(a, str):
            out["strings"] += 1
        if a != b:
            out["differ"].append(f"{path}: {str(a)[:80]!r} -> {str(b)[:80]!r}")


def compare(folder: Path) -> int:
    out = {"numbers": 0, "strings": 0, "largest": 0.0, "differ": [], "structure": [],
           "added": []}
    files = sorted(folder.glob("*.json"))
    for f in files:
        saved = json.loads(f.read_text())
        now = _result(saved["text"], saved["options"])
        _walk(saved["result"], json.loads(json.dumps(now)), f.stem, out)
    print(f"{len(files)} cases, {out['numbers']} numbers, {out['strings']} strings compared; "
          f"largest relative difference {out['largest']:.3e}")
    for line in (out["structure"] + out["differ"])[:60]:
        print("  " + line)
    if out["added"]:
        keys = sorted(set(out["added"]))
        print(f"  note: {len(out['added'])} entries added to unit tables ({', '.join(keys)}); "
              "not differences")
    bad = len(out["structure"]) + len(out["differ"])
    print("IDENTICAL to 1e-12" if not bad else f"{bad} DIFFERENCES")
    return 1 if bad else 0


if __name__ == "__main__":
    verb, folder = sys.argv[1], Path(sys.argv[2])
    sys.exit(save(folder) if verb == "save" else compare(folder))
