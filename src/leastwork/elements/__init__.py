"""Member kinds: the formulas of each kind of member behind one interface.

:mod:`.base` states what a kind supplies (:class:`~.base.MemberKind`), keeps the registry
(:func:`~.base.kind_of`, :func:`~.base.register`) and integrates energy generically;
:mod:`.bar`, :mod:`.beam`, :mod:`.tapered` (a beam with ``taper``) and :mod:`.curved`
(a beam with ``curve``) are the kinds a case file can name. Nothing outside a
kind knows its formulas: topology, energy, statics, results, displacements and the audit
sheet ask the kind.
"""

from . import bar, beam, curved, tapered  # noqa: F401  (registers the kinds)
from .base import (
    MEMBER_KINDS,
    BasicForce,
    EnergyTerm,
    KindBase,
    MemberKind,
    carries_span_loads,
    column_of,
    generic_flexibility,
    generic_initial,
    has_bending,
    integrate,
    kind_of,
    poly_eval,
    register,
)

__all__ = ["MEMBER_KINDS", "BasicForce", "EnergyTerm", "KindBase", "MemberKind",
           "carries_span_loads", "column_of", "generic_flexibility", "generic_initial",
           "has_bending", "integrate", "kind_of", "poly_eval", "register"]
