"""An independent direct stiffness method solver, used to cross-check the force method.

It reads only the model (:mod:`leastwork.model`) and works in SI units (N, m, rad, K); it
keeps its own element code and its own handling of the load kinds, sharing nothing else
with the force method. The unknowns are node displacements: ``x``, ``y`` at every node and
``rz`` where a beam end is rigidly connected (:func:`leastwork.model.rotational_nodes`).

One job per module:

* :mod:`.elements`: exact beam and bar elements (unit end-displacement fields, local
  stiffness, static condensation of moment hinges, map to the global dofs);
* :mod:`.loads`: the loads of one case sorted into nodal loads, settlements and member
  loads; fixed-end forces from the reciprocal theorem (Maxwell-Betti);
* :mod:`.assembly`: dof numbering, the sparse global stiffness with springs, the load vector;
* :mod:`.constraints`: rigid supports, inclined rollers and axially rigid beams as exact
  linear constraints ``C u = g``, eliminated master-slave (never by a penalty), and their
  forces from the residual ``C' lambda = K u + f0 - p``;
* :mod:`.stiffness`: the Jacobi-scaled sparse solve, mechanism detection (pivot and
  condition number) and the results (:class:`StiffnessResult`).

Sign conventions (docs/conventions.md): reactions are what the support applies to the
structure; end forces are section forces (n tension positive, m positive with the local
-y face in tension, v = dm/dx) at x = 0 and x = L.
"""

from __future__ import annotations

from .stiffness import StiffnessResult, solve_stiffness, stiffness_dofs

__all__ = ["StiffnessResult", "solve_stiffness", "stiffness_dofs"]
