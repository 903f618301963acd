"""No number is ever cut short on the terminal: at any usual width the summary prints every
table whole or in parts (the first column repeated), never with an ellipsis in a value."""

from __future__ import annotations

import os
import subprocess
import sys
from pathlib import Path

import pytest

CASES = sorted((Path(__file__).parent.parent / "cases").glob("*.toml"))


@pytest.mark.parametrize("columns", [60, 80])
@pytest.mark.parametrize("path", CASES, ids=lambda p: p.stem)
def test_summary_has_no_cut_values(path, columns):
    env = {**os.environ, "COLUMNS": str(columns)}
    out = subprocess.run([sys.executable, "-m", "leastwork", "solve", str(path)],
                         capture_output=True, text=True, env=env)
    assert out.returncode == 0, out.stderr
    assert "…" not in out.stdout
    # invariant of a table that fits: no line is wider than the console
    assert max(len(line) for line in out.stdout.splitlines()) <= columns
