"""Space structures: trusses, grids and frames with three coordinates per node.

A case whose nodes have three coordinates is read into a :class:`SpaceStructure` and
solved by least work with six directions per joint (three at joints where no member end
passes a moment): axial, two bendings and torsion (T²/2GJ) each their own energy term.

Why a package of its own: the plane core's model, topology, statics and outputs are
written for the directions x, y, rz and the section forces n, v, m throughout; widening
every one of them to six directions would touch most of the package. This package keeps
the space path small and reuses what does not depend on the dimension: the reader's
tables, quantities and located errors, the span-load fields
(:func:`leastwork.fields.particular_fields`, once per bending plane), the polynomial
integrals, the compatibility solver and flexibility product (:mod:`leastwork.compatibility`),
the thresholds, the output units and round-off, and the calculation sheet with its
terminal, Markdown and LaTeX renderers. See docs/space.md.
"""

from importlib import import_module

__all__ = ["SpaceStructure", "SpaceNode", "SpaceMember", "SpaceSolution", "solve_space",
           "local_axes"]

#: Each public name and its module, imported on first use: the plane reader asks
#: ``space.reader`` whether a case is a space case, and a plane solve must not load the
#: space solver (and scipy's dense linear algebra with it).
_HOME = {"SpaceStructure": "model", "SpaceNode": "model", "SpaceMember": "model",
         "local_axes": "model", "SpaceSolution": "solve", "solve_space": "solve"}


def __getattr__(name: str):
    if name in _HOME:
        return getattr(import_module(f".{_HOME[name]}", __name__), name)
    raise AttributeError(f"module {__name__!r} has no attribute {name!r}")
