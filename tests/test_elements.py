"""Member kinds as an extension point: the generic energy integration agrees with the
closed forms of bars and beams, and kinds defined only here solve through the whole
pipeline to closed forms derived by least work."""

from __future__ import annotations

import math

import numpy as np
import pytest

from leastwork import solve
from leastwork.arithmetic import FloatNumbers
from leastwork.elements import (
    MEMBER_KINDS,
    generic_flexibility,
    generic_initial,
    integrate,
    kind_of,
    register,
)
from leastwork.elements.bar import Bar
from leastwork.elements.beam import Beam
from leastwork.fields import particular_fields
from leastwork.model import Member, NodalLoad, Node, Restraint, Structure, Support

EA, EI, GAS, L = 2.0e8, 3.0e6, 5.0e7, 4.5


def _dense(terms, n):
    F = np.zeros((n, n))
    for t in terms:
        F[np.ix_(t.forces, t.forces)] += np.array(t.block, dtype=float)
    return F


@pytest.mark.parametrize("kind_name, hinges, shear", [
    ("bar", (False, False), False),
    ("beam", (False, False), False),
    ("beam", (False, False), True),
    ("beam", (True, False), True),
    ("beam", (False, True), False),
    ("beam", (True, True), True),
])
def test_generic_flexibility_equals_the_closed_forms(kind_name, hinges, shear):
    """Integrating the unit fields against each other over the section gives the kinds'
    closed forms L/EA, L/3EI, L/6EI, 1/(L GAs) (derived by least work: the integrals of
    1, (1 - x/L)^2, x/L (1 - x/L), (1/L)^2 over the length)."""
    m = Member("M", kind_name, "A", "B", EA=EA, EI=EI if kind_name == "beam" else None,
               GAs=GAS if kind_name == "beam" else None, hinge_start=hinges[0],
               hinge_end=hinges[1])
    kind = kind_of(m)
    n = len(kind.basic_forces(m))
    closed = _dense(kind.flexibility(m, m, L, shear, 1.0), n)
    generic = _dense(generic_flexibility(kind, m, m, L, shear, 1.0), n)
    np.testing.assert_allclose(generic, closed, rtol=1e-14, atol=0.0)
    if kind_name == "beam" and not any(hinges) and not shear:
        # the familiar values themselves, to the last bit (common practice)
        assert closed[0, 0] == L / EA
        assert closed[1, 1] == L / (3 * EI) and closed[1, 2] == L / (6 * EI)


def test_generic_initial_deformations_equal_the_closed_forms():
    """Span loads, temperature and misfit on a beam: the generic integral of the unit
    fields against the particular fields and free strains equals the beam's closed forms
    (kappa L/2 at each end moment, alpha dT L + e on the axial force)."""
    m = Member("M", "beam", "A", "B", EA=EA, EI=EI, GAs=GAS)
    pf = particular_fields(L, (0.6, 0.8), [(1.2, 3.0e3, -5.0e3, 2.0e3)],
                           [(0.5, 4.0, (1.0e3, 2.0e3), (-4.0e3, -1.0e3))])
    imposed = (1.2e-4, 3.0e-3, 2.0e-3)
    integral = FloatNumbers.span_integral(pf, L)
    kind = kind_of(m)

    def summed(items):
        out = np.zeros(3)
        for _, i, v in items:
            out[i] += v
        return out

    closed = summed(kind.initial_deformations(m, m, L, True, integral, imposed, 1.0))
    generic = summed(generic_initial(kind, m, m, L, True, integral, imposed, 1.0))
    np.testing.assert_allclose(generic, closed, rtol=1e-12, atol=1e-18)


def test_adaptive_quadrature_meets_its_bound():
    """int_0^1 dx/(1 + x) = ln 2 and int_0^pi sin x dx = 2 (from memory)."""
    assert integrate(lambda x: 1.0 / (1.0 + x), 0.0, 1.0) == pytest.approx(math.log(2.0),
                                                                         rel=1e-13)
    assert integrate(math.sin, 0.0, math.pi) == pytest.approx(2.0, rel=1e-13)


# ------------------------------------------------------------------ kinds defined here
class TaperedBeam(Beam):
    """A beam whose EI grows linearly from EI0 at the start to EI0 (1 + ratio) at the
    end: no closed-form block, so energy comes from the generic integrator."""

    def __init__(self, name: str, ratio: float):
        self.name, self.ratio = name, ratio

    def section(self, m, sec, shear):
        L = m_length[m.id]
        return {"n": sec.EA, "m": lambda x, EI0=sec.EI, L=L: EI0 * (1.0 + self.ratio * x / L)}

    def flexibility(self, m, sec, L, shear, one):
        return generic_flexibility(self, m, sec, L, shear, one)

    def initial_deformations(self, m, sec, L, shear, integral, imposed, one):
        return generic_initial(self, m, sec, L, shear, integral, imposed, one)


class SoftBar(Bar):
    """A bar whose EA falls linearly to EA0 / 2 at its end: flexibility
    int dx / (EA0 (1 - x/2L)) = 2 ln 2 L / EA0 (derived by least work)."""

    name = "soft-bar"

    def section(self, m, sec, shear):
        L = m_length[m.id]
        return {"n": lambda x, EA0=sec.EA, L=L: EA0 * (1.0 - 0.5 * x / L)}

    def flexibility(self, m, sec, L, shear, one):
        return generic_flexibility(self, m, sec, L, shear, one)


m_length: dict[str, float] = {}


@pytest.fixture
def kinds():
    before = dict(MEMBER_KINDS)
    register(TaperedBeam("tapered", 1.0))
    register(TaperedBeam("tapered-0", 0.0))
    register(SoftBar())
    yield
    MEMBER_KINDS.clear()
    MEMBER_KINDS.update(before)


def _propped(kind: str, M0: float) -> Structure:
    """Fixed at A (x = 0), roller in y at B (x = L), a couple M0 at B."""
    nodes = {"A": Node("A", 0.0, 0.0), "B": Node("B", L, 0.0)}
    members = {"AB": Member("AB", kind, "A", "B", EA=EA, EI=EI)}
    m_length["AB"] = L
    supports = {
        "A": Support("A", (Restraint("A", "x", (1.0, 0.0, 0.0)),
                           Restraint("A", "y", (0.0, 1.0, 0.0)),
                           Restraint("A", "rz", (0.0, 0.0, 1.0)))),
        "B": Support("B", (Restraint("B", "y", (0.0, 1.0, 0.0)),)),
    }
    return Structure("propped", nodes, members, supports, (NodalLoad("B", mz=M0),))


def test_tapered_beam_kind_solves_to_the_least_work_closed_form(kinds):
    """Propped cantilever, fixed at A, roller at B, couple M0 at B; EI = EI0 (1 + x/L).
    Least work on the prop force R: int m (L - x) / EI dx = 0 with m = M0 + R (L - x)
    gives |R| = M0 / L * int (1-t)/(1+t) dt / int (1-t)^2/(1+t) dt
    = M0 / L * (2 ln 2 - 1) / (4 ln 2 - 5/2) (derived by least work); with a constant EI
    the same formula gives the familiar 3 M0 / (2 L) (from memory)."""
    M0 = 10.0e3
    for kind, expected in (("tapered-0", 1.5 * M0 / L),
                           ("tapered", M0 / L * (2 * math.log(2) - 1)
                            / (4 * math.log(2) - 2.5))):
        sol = solve(_propped(kind, M0), verify=False)
        R = sol.cases["default"].reactions["B"]["y"]
        assert abs(R) == pytest.approx(expected, rel=1e-11)
        assert sol.equilibrium_ok


def test_soft_bar_kind_shares_a_load_by_its_flexibility(kinds):
    """Two bars in line between fixed nodes A and C, load P along them at B: the bar
    forces split in proportion to the other bar's flexibility, N_AB = P f_BC/(f_AB + f_BC)
    with f_AB = 2 ln 2 L/EA (the soft bar) and f_BC = L/EA (derived by least work)."""
    P = 1.0e4
    nodes = {"A": Node("A", 0.0, 0.0), "B": Node("B", L, 0.0), "C": Node("C", 2 * L, 0.0)}
    members = {"AB": Member("AB", "soft-bar", "A", "B", EA=EA),
               "BC": Member("BC", "bar", "B", "C", EA=EA)}
    m_length.update(AB=L, BC=L)
    pin = (Restraint("x", "x", (1.0, 0.0, 0.0)), Restraint("y", "y", (0.0, 1.0, 0.0)))
    supports = {n: Support(n, tuple(Restraint(n, r.direction, r.vector) for r in pin))
                for n in ("A", "C")}
    supports["B"] = Support("B", (Restraint("B", "y", (0.0, 1.0, 0.0)),))
    st = Structure("series", nodes, members, supports, (NodalLoad("B", fx=P),))
    sol = solve(st, verify=False)
    f_ab, f_bc = 2 * math.log(2) * L / EA, L / EA
    n_ab = sol.cases["default"].members["AB"].start[0]
    assert abs(n_ab) == pytest.approx(P * f_bc / (f_ab + f_bc), rel=1e-11)


# ------------------------------------------------------------------ a load kind defined here
def test_every_load_dataclass_has_a_kind():
    """The registry covers every member of the Load union (invariant of the design)."""
    import typing

    from leastwork.loadkinds import LOAD_KINDS
    from leastwork.model import Load

    assert set(typing.get_args(Load)) <= set(LOAD_KINDS)


def test_a_load_kind_defined_here_acts_through_the_registry():
    """A free shortening d of a bar held between two fixed supports (a load kind defined
    only in this test) makes the tension N = EA d / L (derived by least work: the bar's
    elongation N L/EA - d must vanish); the same as a misfit of -d."""
    from dataclasses import dataclass, replace

    from leastwork.loadkinds import LOAD_KINDS, LoadKind, register_load

    @dataclass(frozen=True)
    class Shortening:
        member: str
        value: float
        case: str = "default"

        def scaled(self, f, case):
            return replace(self, value=f * self.value, case=case)

    register_load(LoadKind(
        "shortening", Shortening,
        values=lambda ld: {"value": ld.value},
        exact=lambda ld, w, get, fields: {"value": get(f"{w}.value", ld.value, "length")},
        apply=lambda v, ld, sink: sink.member_strain(ld.member, sink.zero, sink.zero,
                                                     -v["value"]),
        resultant=lambda st, ld, centre: None,
        describe=lambda st, u, ld: (ld.member, f"{ld.value:g} m"),
    ))
    try:
        d = 2.0e-3
        nodes = {"A": Node("A", 0.0, 0.0), "B": Node("B", L, 0.0)}
        members = {"AB": Member("AB", "bar", "A", "B", EA=EA)}
        supports = {n: Support(n, (Restraint(n, "x", (1.0, 0.0, 0.0)),
                                   Restraint(n, "y", (0.0, 1.0, 0.0)))) for n in nodes}
        st = Structure("held", nodes, members, supports, (Shortening("AB", d),))
        sol = solve(st, verify=False)
        assert sol.cases["default"].members["AB"].start[0] == pytest.approx(EA * d / L,
                                                                           rel=1e-12)
        assert sol.equilibrium_ok
    finally:
        LOAD_KINDS.pop(Shortening)
