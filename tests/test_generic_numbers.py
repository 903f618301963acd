"""The core is generic over the number type: the same topology, statics and energy
functions give the closed forms exactly over the rationals (Python's ``Fraction``, a number
type defined only here) and the same values in floats; the exact pipeline calls those same
functions instead of copies."""

from __future__ import annotations

from fractions import Fraction
from types import SimpleNamespace

import numpy as np

from leastwork import displacements, energy, model, solution, statics, superposition, topology
from leastwork.arithmetic import FloatNumbers
from leastwork.fields import ParticularFields, span_fields
from leastwork.loadkinds import load_kind
from leastwork.model import DistributedLoad, Member, Node, Restraint, Structure, Support

L, EA, EI, Q = 5, 2 * 10**8, 3 * 10**6, -12000  # m, N, N*m^2, N/m (our own numbers)


def _beam() -> Structure:
    """A simply supported beam A-B along x under a uniform load."""
    return Structure(
        "generic", {"A": Node("A", 0.0, 0.0), "B": Node("B", float(L), 0.0)},
        {"M": Member("M", "beam", "A", "B", EA=float(EA), EI=float(EI))},
        {"A": Support("A", (Restraint("A", "x", (1.0, 0.0, 0.0)),
                            Restraint("A", "y", (0.0, 1.0, 0.0)))),
         "B": Support("B", (Restraint("B", "y", (0.0, 1.0, 0.0)),))},
        loads=(DistributedLoad("M", wy=(float(Q), float(Q))),))


def _exact(v):
    if v is None or isinstance(v, str):
        return v
    if isinstance(v, (list, tuple)):
        return type(v)(_exact(x) for x in v)
    return Fraction(v)


class FractionNumbers:
    """The rationals as a number type of the core (``arithmetic.Numbers``), for this
    straight beam along x."""

    one, zero = Fraction(1), Fraction(0)

    def __init__(self, st: Structure):
        self.st = st

    def length(self, mid):
        return Fraction(L)

    def direction(self, mid):
        return self.one, self.zero

    def section(self, mid):
        return SimpleNamespace(EA=Fraction(EA), EI=Fraction(EI), GAs=None, alpha=None,
                               depth=None)

    def restraint_vector(self, r):
        return tuple(Fraction(v) for v in r.vector)

    def vector(self, n):
        out = np.empty(n, dtype=object)
        out.fill(self.zero)
        return out

    def matrix(self, n):
        out = np.empty((n, n), dtype=object)
        out.fill(self.zero)
        return out

    @staticmethod
    def add_block(F, columns, block):
        for a, row in zip(columns, block):
            for b, v in zip(columns, row):
                F[a, b] += v

    block = staticmethod(list)
    scalar = staticmethod(Fraction)

    def load_values(self, index, ld):
        return {k: _exact(v) for k, v in load_kind(ld).values(ld).items()}

    def end_of(self, at, length):
        return "start" if at == 0 else "end" if at == length else None

    def particular(self, m, points, dists):
        breaks = sorted({self.zero, Fraction(L), *[d[0] for d in dists],
                         *[d[1] for d in dists]})
        n, v, mm, start, end = span_fields(Fraction(L), self.direction(m.id), points, dists,
                                           breaks, breaks.index)
        return ParticularFields(*((breaks, f) for f in (n, v, mm)), start, end)

    @staticmethod
    def span_integral(pf, length):
        from leastwork.polynomials import poly_integral, poly_mul

        def integral(f, weight):  # weight: a polynomial in x/L
            breaks, pieces = getattr(pf, f)
            w = [c / length**k for k, c in enumerate(weight)]
            return sum(poly_integral(poly_mul(p, w), a, b)
                       for p, a, b in zip(pieces, breaks[:-1], breaks[1:]))

        return integral


def test_one_flexibility_function_gives_L_over_3EI_exactly_and_in_floats():
    """energy.flexibility_terms over the rationals and over floats: a beam's end-moment
    block is [[L/3EI, L/6EI], [L/6EI, L/3EI]] and its axial term L/EA (the closed forms of a
    prismatic member, from memory), exactly as Fractions and to round-off as floats."""
    st = _beam()
    topo = topology.build_topology(st)
    exact = {t.term: t.block for t in energy.flexibility_terms(st, topo, FractionNumbers(st))}
    floats = {t.term: t.block for t in energy.flexibility_terms(st, topo)}
    third, sixth = Fraction(L, 3 * EI), Fraction(L, 6 * EI)
    assert exact["bending"] == [[third, sixth], [sixth, third]]
    assert exact["axial"] == [[Fraction(L, EA)]]
    for term, block in exact.items():
        np.testing.assert_allclose(floats[term], np.array(block, dtype=float), rtol=1e-15)


def test_equilibrium_entries_and_loading_are_the_same_in_both_types():
    """topology.equilibrium_columns and statics.case_loading give the same entries and
    nodal loads over the rationals as over floats (the float ones exact here: every value
    is a small integer or a half)."""
    st = _beam()
    topo = topology.build_topology(st)
    cols_q = topology.equilibrium_columns(st, FractionNumbers(st))[5]
    cols_f = topology.equilibrium_columns(st, FloatNumbers(st))[5]
    assert [[(i, float(v)) for i, v in c] for c in cols_q] == cols_f
    assert all(isinstance(v, Fraction) for c in cols_q for _, v in c)
    p_q = statics.case_loading(st, topo, "default", FractionNumbers(st)).p
    p_f = statics.case_loading(st, topo, "default").p
    # statics: half the total load Q L at each end node
    assert p_q[topo.dof_index["A.y"]] == p_q[topo.dof_index["B.y"]] == Fraction(Q * L, 2)
    np.testing.assert_array_equal(np.array(p_q, dtype=float), p_f)


def test_initial_deformations_of_a_uniform_load_exactly():
    """energy.initial_deformation_terms over the rationals: a uniform load q on the simply
    supported analogue turns each end by q L^3 / (24 EI) (handbook closed form of the end
    slope, from memory), the same at both end moments (both unit fields sag: by symmetry);
    floats agree."""
    st = _beam()
    topo = topology.build_topology(st)
    nq, loading = FractionNumbers(st), statics.case_loading(st, topo, "default",
                                                            FractionNumbers(st))
    terms = energy.initial_deformation_terms(st, topo, loading.particulars, loading.imposed,
                                             nq)
    by_column = {topo.columns[t.column].name: t.value for t in terms}
    slope = Fraction(Q * L**3, 24 * EI)
    assert {abs(by_column["M.start.m"]), abs(by_column["M.end.m"])} == {abs(slope)}
    assert by_column["M.start.m"] == by_column["M.end.m"]
    lf = statics.case_loading(st, topo, "default")
    floats = energy.initial_deformations(st, topo, lf.particulars, lf.imposed)
    for name, value in by_column.items():
        assert abs(floats[topo.column_index[name]] - float(value)) <= 1e-15 * abs(float(slope))


def test_the_exact_pipeline_calls_the_shared_core():
    """The exact pipeline imports the core's functions themselves, not copies of them."""
    from leastwork.symbolic import backend, pipeline

    assert pipeline.case_state is superposition.case_state
    assert pipeline.equilibrium_columns is topology.equilibrium_columns
    assert pipeline.evaluate_target is displacements.evaluate_target
    assert pipeline.reaction_components is model.reaction_components
    assert pipeline.basic_force_fields is solution.basic_force_fields
    assert issubclass(backend.ExactReleased, statics.ReleasedStructure)
    assert superposition.case_loading is statics.case_loading
    assert superposition.initial_deformations is energy.initial_deformations
