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

from .errors import CaseError, LeastworkError, MechanismError
from .io.reader import load_case, loads_case, structure
from .model import Structure
from .solution import Solution
from .solve import solve
from .studies.reanalysis import reanalyse
from .studies.sweep import random_study, sweep

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
