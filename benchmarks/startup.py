"""Start-up cost of the command line: ``leastwork solve`` on a bundled case, as a fresh
process each time, against fresh interpreters that only import numpy, or numpy and
scipy.linalg (the floor a solve cannot go below, the ratios' baseline). Best of 5 runs
each; no assertions on wall-clock (machines differ), the ratio to the baseline is what to
watch.

The command is run as ``python -m leastwork`` with this interpreter, so that a version
manager's launcher in front of the installed ``leastwork`` script is not timed. Bytecode is
written to a temporary folder (``PYTHONPYCACHEPREFIX``) even where the environment forbids
it (``PYTHONDONTWRITEBYTECODE``), so that every run after the first warm one reads compiled
modules, as an installed tool does; otherwise compiling the project's modules at every start
would be timed.

Run: python benchmarks/startup.py (benchmarks/process.py adds a large case).
"""

from __future__ import annotations

import os
import subprocess
import sys
import tempfile
import time
from collections.abc import Iterator
from contextlib import contextmanager
from pathlib import Path

__all__ = ["best_of", "bytecode_env", "measure", "report", "main"]

ROOT = Path(__file__).resolve().parents[1]
CASE = ROOT / "cases" / "canopy-prop.toml"

COMMANDS: dict[str, list[str]] = {
    "python -c pass": [sys.executable, "-c", "pass"],
    "import numpy": [sys.executable, "-c", "import numpy"],
    "import numpy, scipy.linalg": [sys.executable, "-c", "import numpy, scipy.linalg"],
    "leastwork solve --json": [sys.executable, "-m", "leastwork", "solve", str(CASE), "--json"],
    "leastwork solve --json --no-verify": [sys.executable, "-m", "leastwork", "solve",
                                           str(CASE), "--json", "--no-verify"],
}
BASELINE = "import numpy, scipy.linalg"


def best_of(cmd: list[str], repeat: int = 5, env: dict[str, str] | None = None) -> float:
    """Shortest wall-clock time (s) of ``repeat`` runs of ``cmd``; raises if it fails."""
    best = float("inf")
    for _ in range(repeat):
        t0 = time.perf_counter()
        subprocess.run(cmd, check=True, stdout=subprocess.DEVNULL, cwd=ROOT, env=env)
        best = min(best, time.perf_counter() - t0)
    return best


@contextmanager
def bytecode_env() -> Iterator[dict[str, str]]:
    """This environment with bytecode written to a temporary folder (removed afterwards),
    whatever ``PYTHONDONTWRITEBYTECODE`` says (see the module docstring)."""
    with tempfile.TemporaryDirectory(prefix="leastwork-pyc-") as pyc:
        env = {k: v for k, v in os.environ.items() if k != "PYTHONDONTWRITEBYTECODE"}
        env["PYTHONPYCACHEPREFIX"] = pyc
        yield env


def measure(repeat: int = 5) -> dict[str, float]:
    """Best-of-``repeat`` wall-clock time (s) of every command of ``COMMANDS``, after one
    warm run of each."""
    with bytecode_env() as env:
        for cmd in COMMANDS.values():  # warm: bytecode and the unit-definition cache written
            subprocess.run(cmd, check=True, stdout=subprocess.DEVNULL, cwd=ROOT, env=env)
        return {name: best_of(cmd, repeat, env=env) for name, cmd in COMMANDS.items()}


def report(times: dict[str, float], repeat: int = 5) -> str:
    """The table of :func:`measure`'s times, with their ratio to the baseline."""
    base = times[BASELINE]
    head = f"best of {repeat} (s)"
    lines = [f"{'command':36s} {head:>13s} {'/ numpy+scipy':>14s}"]
    lines += [f"{name:36s} {t:13.3f} {t / base:14.2f}" for name, t in times.items()]
    return "\n".join(lines)


def main() -> None:
    print(report(measure()))


if __name__ == "__main__":
    main()
