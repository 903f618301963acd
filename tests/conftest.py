"""Shared test set-up: the helper modules of tests/ (``_cases``, ``_random_structures``) and
the structure generators of benchmarks/ (``generators``, ``process``, ``scale``...) are
importable by name from every test module."""

from __future__ import annotations

import sys
from pathlib import Path

_TESTS = Path(__file__).resolve().parent
for _folder in (_TESTS, _TESTS.parent / "benchmarks"):
    if str(_folder) not in sys.path:
        sys.path.insert(0, str(_folder))
