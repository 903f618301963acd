"""Start-up cost of the command line: ``leastwork solve`` on a bundled case, as a fresh
process each time, against fresh interpreters that only import numpy (the ratios'
baseline: a small solve aims at 3 times it), or numpy and scipy.linalg. Best of 7 runs
each, the commands taken in turn (so that a burst of load on the machine falls on all of
them); no assertions on wall-clock (machines differ), the ratio to the baseline is what to
watch. Then the third-party packages a small solve loads (module names, counted).

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

__all__ = ["best_of", "bytecode_env", "measure", "loaded_packages", "report", "main"]

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
BASELINE = "import numpy"


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


def measure(repeat: int = 7) -> dict[str, float]:
    """Best-of-``repeat`` wall-clock time (s) of every command of ``COMMANDS``, after one
    warm run of each; the commands run in turn, ``repeat`` rounds."""
    with bytecode_env() as env:
        for cmd in COMMANDS.values():  # warm: bytecode and the unit-definition cache written
            subprocess.run(cmd, check=True, stdout=subprocess.DEVNULL, cwd=ROOT, env=env)
        best = dict.fromkeys(COMMANDS, float("inf"))
        for _ in range(repeat):
            for name, cmd in COMMANDS.items():
                best[name] = min(best[name], best_of(cmd, 1, env=env))
        return best


_PROBE = ("import contextlib, io, sys\n"
          "from leastwork.cli import main\n"
          "with contextlib.redirect_stdout(io.StringIO()):\n"
          "    main(sys.argv[1:])\n"
          "print(' '.join(sorted(sys.modules)))\n")


def loaded_packages(*args: str) -> dict[str, int]:
    """Top-level packages a fresh ``leastwork solve CASE --json ARGS`` has loaded, outside
    the standard library, with their number of modules."""
    run = subprocess.run([sys.executable, "-c", _PROBE, "solve", str(CASE), "--json", *args],
                         check=True, capture_output=True, text=True, cwd=ROOT)
    std = set(sys.stdlib_module_names) | {"__main__", "_distutils_hack"}
    counts: dict[str, int] = {}
    for name in run.stdout.split():
        top = name.split(".")[0]
        if top not in std and not top.startswith("_"):
            counts[top] = counts.get(top, 0) + 1
    return dict(sorted(counts.items()))


def report(times: dict[str, float], repeat: int = 7) -> str:
    """The table of :func:`measure`'s times, with their ratio to the baseline."""
    base = times[BASELINE]
    head = f"best of {repeat} (s)"
    lines = [f"{'command':36s} {head:>13s} {'/ numpy':>14s}"]
    lines += [f"{name:36s} {t:13.3f} {t / base:14.2f}" for name, t in times.items()]
    return "\n".join(lines)


def main() -> None:
    print(report(measure()))
    for args in ((), ("--no-verify",)):
        shown = ", ".join(f"{k} ({v})" for k, v in loaded_packages(*args).items())
        print(f"\npackages loaded by solve --json {' '.join(args)}: {shown}")


if __name__ == "__main__":
    main()
