"""leastwork — statically indeterminate 2D structures by the least-work (force) method.

Linear elastic, small displacements; bending and axial energy (shear energy when asked).
Results must be checked by a qualified engineer against the governing local codes.

>>> import leastwork
>>> st = leastwork.loads_case('''
... [nodes]
... A = [0, 0]
... B = [6, 0]
... [beams]
... AB = { nodes = ["A", "B"], EI = "20000 kN*m^2" }
... [supports]
... A = "fixed"
... B = "roller"
... [[loads]]
... member = "AB"
... wy = "-10 kN/m"
... ''')
>>> sol = leastwork.solve(st)
>>> round(sol.to_dict()["cases"]["default"]["reactions"]["B"]["y"], 6)  # 3wl/8
22.5
"""

import sys as _sys
from types import ModuleType as _ModuleType
from typing import TYPE_CHECKING as _TYPE_CHECKING

from .errors import CaseError, LeastworkError, MechanismError

if _TYPE_CHECKING:  # for type checkers; at run time each name is imported on first use
    from .io.reader import load_case, loads_case, structure
    from .model import Structure
    from .solution import Solution
    from .solve import solve
    from .studies.reanalysis import reanalyse
    from .studies.sweep import random_study, sweep

#: Public name -> module that defines it, imported on first use (PEP 562), so that
#: ``import leastwork`` (and the command line) loads only what a command needs.
_LAZY = {
    "load_case": ".io.reader",
    "loads_case": ".io.reader",
    "structure": ".io.reader",
    "Structure": ".model",
    "Solution": ".solution",
    "solve": ".solve",
    "reanalyse": ".studies.reanalysis",
    "sweep": ".studies.sweep",
    "random_study": ".studies.sweep",
}


def __getattr__(name: str):
    module = _LAZY.get(name)
    if module is None:
        raise AttributeError(f"module 'leastwork' has no attribute {name!r}")
    from importlib import import_module

    value = getattr(import_module(module, __name__), name)
    globals()[name] = value
    return value


def __dir__() -> list[str]:
    return sorted({*globals(), *_LAZY})


class _Package(_ModuleType):
    """This package's module type: ``leastwork.solve`` stays the function when the module
    :mod:`leastwork.solve` is imported (which would otherwise bind the module there)."""

    def __setattr__(self, name: str, value) -> None:
        if name == "solve" and isinstance(value, _ModuleType):
            value = value.solve
        super().__setattr__(name, value)


_sys.modules[__name__].__class__ = _Package


__all__ = [
    "load_case",
    "loads_case",
    "structure",
    "solve",
    "reanalyse",
    "sweep",
    "random_study",
    "Structure",
    "Solution",
    "CaseError",
    "MechanismError",
    "LeastworkError",
    "__version__",
]

__version__ = "0.1.0"
