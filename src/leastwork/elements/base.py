"""What a member kind supplies, the registry of kinds, and the generic energy integrals.

A *member kind* (a bar, a beam, ...) owns every formula about its members:

* its **basic forces** — the end actions nodal equilibrium needs — with their column names
  and roles (:meth:`MemberKind.basic_forces`);
* the **equilibrium-matrix entries** of a unit value of each basic force
  (:meth:`MemberKind.equilibrium`), ``A s + p = 0``;
* the **section-force fields** n, v, m along the axis for a unit value of each basic force
  (:meth:`MemberKind.unit_fields`) and for given values (:meth:`MemberKind.force_fields`);
* the **particular fields** of span loads on its determinate analogue
  (:meth:`MemberKind.particular`);
* the **section flexibility** along the axis per field (:meth:`MemberKind.section`:
  EA for n, EI for m, GAs for v; room for GJ of a torsion field);
* the **initial deformations** conjugate to its basic forces under span loads, temperature
  and misfit (:meth:`MemberKind.initial_deformations`), and its **free strains** for the
  deflected shape (:meth:`MemberKind.free_strains`; the elastic strains are the fields
  over the section).

The formulas use only ``+ - * /`` on the numbers given (floats, or the exact field elements
of :mod:`leastwork.symbolic.algebra`) and on polynomial coefficient lists (ascending powers
of x, m from the start node), so that one code serves both number types; ``one`` and
``zero`` are passed in where a constant is needed.

Energy. The complementary energy of a member is ``1/2 s.F.s + s.e`` with

    F_ij = sum over fields f of  int_0^L u_i^f(x) u_j^f(x) / K_f(x) dx,
    e_i  = sum over fields f of  int_0^L u_i^f(x) (f_0(x) / K_f(x) + strain_f(x)) dx,

u_i the unit fields, K_f the section stiffness and f_0 the particular field. A kind that
supplies only unit fields and a section gets F from :func:`generic_flexibility`: exact
polynomial integration when every K_f is a constant (a prismatic straight member), else
adaptive Gauss–Kronrod quadrature with the error bound :data:`QUAD_RTOL`. Bars and beams
supply their closed forms (``L/EA``, ``L/3EI``, ``L/6EI``...) as :meth:`flexibility`, the
same numbers the generic integral gives (tests/test_elements.py) and bit for bit those
the solver always used.
"""

from __future__ import annotations

from collections.abc import Callable, Sequence
from typing import Any, NamedTuple, Protocol

from ..polynomials import Poly, poly_add, poly_eval, poly_integral, poly_mul

__all__ = [
    "BasicForce",
    "EnergyTerm",
    "MemberKind",
    "KindBase",
    "MEMBER_KINDS",
    "register",
    "kind_of",
    "column_of",
    "carries_span_loads",
    "has_bending",
    "poly_eval",
    "TERM_OF_FIELD",
    "QUAD_RTOL",
    "generic_flexibility",
    "generic_initial",
    "integrate",
    "poly_mul",
    "poly_integral",
    "poly_eval",
    "poly_add",
]

#: The energy term of each section-force field (names used in the audit sheet).
TERM_OF_FIELD = {"n": "axial", "m": "bending", "v": "shear", "t": "torsion"}

#: Relative error bound of the adaptive quadrature: each interval is accepted when the
#: Gauss (7 points) and Kronrod (15 points) estimates differ by at most this fraction of
#: the whole integral's magnitude (or of 1e-300 absolute for a zero integral).
QUAD_RTOL = 1e-13


class BasicForce(NamedTuple):
    """One basic force of a member: its column name and role (``Column.kind``: "axial",
    "start_m", "end_m", or a kind's own role)."""

    name: str
    role: str


class EnergyTerm(NamedTuple):
    """One energy block of a member: ``forces`` index the member's basic forces;
    ``block`` (nested lists) couples them; ``term`` is "axial", "bending", "shear"..."""

    term: str
    forces: tuple[int, ...]
    block: list


class MemberKind(Protocol):
    """The extension point for a kind of member (see the module docstring).

    ``m`` is the :class:`leastwork.model.Member`; ``sec`` an object with the section
    values as attributes (``EA``, ``EI``, ``GAs``, ``alpha``, ``depth``; ``None`` where
    absent) in the number type at hand — the member itself for floats; ``L`` its length
    and ``c``, ``s`` the cosine and sine of its axis.
    """

    name: str
    #: loads may act inside the span (the kind has particular fields for them)
    takes_span_loads: bool

    def basic_forces(self, m) -> tuple[BasicForce, ...]: ...

    def rotation_nodes(self, m) -> tuple[str, ...]: ...

    def equilibrium(self, m, L, c, s, one) -> list[list[tuple[str, Any]]]: ...

    #: per basic force: field name -> polynomial in xi = x/L (ascending coefficients)
    def unit_fields(self, m, L, one, zero) -> list[dict[str, Poly]]: ...

    def force_fields(self, m, L, values: Sequence, zero) -> dict[str, Poly]: ...

    def particular(self, m, L, direction, point_loads, dist_loads): ...

    def section(self, m, sec, shear: bool) -> dict[str, Any]: ...

    def flexibility(self, m, sec, L, shear: bool, one) -> list[EnergyTerm]: ...

    def initial_deformations(self, m, sec, L, shear: bool, integral, imposed,
                             one) -> list[tuple[str, int, Any]]: ...

    def free_strains(self, m, sec, L, imposed) -> dict[str, list]: ...


class KindBase:
    """Defaults for a member kind: everything energy needs is derived from
    :meth:`basic_forces`, :meth:`unit_fields` and :meth:`section`."""

    name = "?"
    takes_span_loads = False

    def basic_forces(self, m) -> tuple[BasicForce, ...]:
        raise NotImplementedError

    def rotation_nodes(self, m) -> tuple[str, ...]:
        """Nodes where this member's end is rigidly connected in rotation."""
        return ()

    def equilibrium(self, m, L, c, s, one) -> list[list[tuple[str, Any]]]:
        raise NotImplementedError

    def unit_fields(self, m, L, one, zero) -> list[dict[str, Poly]]:
        raise NotImplementedError

    def force_fields(self, m, L, values: Sequence, zero) -> dict[str, Poly]:
        """Fields (coefficients in x) for the given values of the basic forces: the sum of
        the unit fields (given in x/L) times the values."""
        one = zero + 1
        out: dict[str, Poly] = {}
        for value, unit in zip(values, self.unit_fields(m, L, one, zero), strict=True):
            for f, p in unit.items():
                scaled, power = [], one
                for c in p:
                    scaled.append(value * c / power)
                    power = power * L
                out[f] = poly_add(out.get(f, [zero]), scaled)
        return out

    def particular(self, m, L, direction, point_loads, dist_loads):
        """Fields of span loads on the member's statically determinate analogue and the
        forces it passes to its nodes (:class:`leastwork.fields.ParticularFields`): by
        default the straight member pinned at the start and on a roller along its axis at
        the end (:func:`leastwork.fields.particular_fields`, floats)."""
        from ..fields import particular_fields

        return particular_fields(L, direction, point_loads, dist_loads)

    def section(self, m, sec, shear: bool) -> dict[str, Any]:
        raise NotImplementedError

    def flexibility(self, m, sec, L, shear: bool, one) -> list[EnergyTerm]:
        return generic_flexibility(self, m, sec, L, shear, one)

    def initial_deformations(self, m, sec, L, shear: bool, integral, imposed,
                             one) -> list[tuple[str, int, Any]]:
        return generic_initial(self, m, sec, L, shear, integral, imposed, one)

    def free_strains(self, m, sec, L, imposed) -> dict[str, list]:
        """Strains free of stress per field, as terms to add (in this order): ``n`` the
        axial strain, ``m`` the curvature (sagging positive), from ``imposed`` =
        (alpha dT, alpha dTgrad/h, misfit); uniform along the member."""
        eps, kappa, misfit = imposed
        return {"n": [eps, misfit / L], "m": [kappa]}


MEMBER_KINDS: dict[str, MemberKind] = {}


def register(kind: MemberKind) -> MemberKind:
    """Make ``kind`` known under ``kind.name`` (the ``Member.kind`` that selects it)."""
    MEMBER_KINDS[kind.name] = kind
    return kind


def kind_of(m) -> MemberKind:
    """The kind of member ``m`` (a beam with a curved axis is of kind "curved")."""
    if getattr(m, "curve", None) is not None:
        return MEMBER_KINDS["curved"]
    return MEMBER_KINDS[m.kind]


def carries_span_loads(m) -> bool:
    """Whether loads may act inside the span of member ``m``."""
    return kind_of(m).takes_span_loads


def has_bending(m) -> bool:
    """Whether member ``m``'s kind has a bending field (a moment along its axis)."""
    return "m" in kind_of(m).section(m, m, False)


def column_of(m, role: str) -> str | None:
    """Column name of member ``m``'s basic force with ``role`` (None if it has none)."""
    for bf in kind_of(m).basic_forces(m):
        if bf.role == role:
            return bf.name
    return None


# ---------------------------------------------------------------- integration
_XK = (0.991455371120812639206854697526329, 0.949107912342758524526189684047851,
       0.864864423359769072789712788640926, 0.741531185599394439863864773280788,
       0.586087235467691130294144845693013, 0.405845151377397166906606412076961,
       0.207784955007898467600689403773245, 0.0)
_WK = (0.022935322010529224963732008058970, 0.063092092629978553290700663189204,
       0.104790010322250183839876322541518, 0.140653259715525918745189590510238,
       0.169004726639267902826583426598550, 0.190350578064785409913256402421014,
       0.204432940075298892414161999234649, 0.209482141084727828012999174891714)
_WG = (0.129484966168869693270611432679082, 0.279705391489276667901467771423780,
       0.381830050505118944950369775488975, 0.417959183673469387755102040816327)


def _gauss_kronrod(f: Callable[[float], float], a: float, b: float) -> tuple[float, float]:
    h, mid = 0.5 * (b - a), 0.5 * (a + b)
    fc = f(mid)
    k, g = _WK[7] * fc, _WG[3] * fc
    for i in range(7):
        x = h * _XK[i]
        pair = f(mid - x) + f(mid + x)
        k += _WK[i] * pair
        if i % 2 == 1:
            g += _WG[i // 2] * pair
    return k * h, abs((k - g) * h)


def integrate(f: Callable[[float], float], a: float, b: float,
              rtol: float = QUAD_RTOL, depth: int = 40) -> float:
    """Adaptive Gauss–Kronrod (7/15) integral of ``f`` over [a, b]: intervals are halved
    until the sum of the differences between the two rules is below ``rtol`` times the
    integral's magnitude. That difference bounds the error of the 7-point rule, so the
    15-point value returned is within the stated bound for smooth integrands."""
    total, err = _gauss_kronrod(f, a, b)
    work = [(a, b, total, err)]
    for _ in range(depth * 50):
        tol = rtol * max(abs(sum(w[2] for w in work)), 1e-300)
        if sum(w[3] for w in work) <= tol:
            break
        i = max(range(len(work)), key=lambda k: work[k][3])
        lo, hi, _, _ = work.pop(i)
        mid = 0.5 * (lo + hi)
        for x0, x1 in ((lo, mid), (mid, hi)):
            v, e = _gauss_kronrod(f, x0, x1)
            work.append((x0, x1, v, e))
    return sum(w[2] for w in work)


def xi_integral(p: Poly, K, L, zero):
    """int_0^L p(x/L) / K(x) dx of a polynomial ``p`` in xi = x/L: exact (L times the
    integral over [0, 1]) for a constant K, else by :func:`integrate`."""
    if not callable(K):
        return L * poly_integral(p, zero, zero + 1) / K
    Lf = float(L)
    return integrate(lambda x: float(poly_eval(p, x / Lf)) / float(K(x)), 0.0, Lf)


def _alive(u: dict, f: str) -> bool:
    return any(c != 0 for c in u.get(f, ()))


def generic_flexibility(kind: MemberKind, m, sec, L, shear: bool, one) -> list[EnergyTerm]:
    """The flexibility blocks of a member integrated from its unit fields and section."""
    zero = one - one
    units = kind.unit_fields(m, L, one, zero)
    out = []
    for f, K in kind.section(m, sec, shear).items():
        if K is None:
            continue
        idx = tuple(i for i, u in enumerate(units) if _alive(u, f))
        if not idx:
            continue
        block = [[xi_integral(poly_mul(units[i][f], units[j][f]), K, L, zero) for j in idx]
                 for i in idx]
        out.append(EnergyTerm(TERM_OF_FIELD.get(f, f), idx, block))
    return out


def generic_initial(kind: MemberKind, m, sec, L, shear: bool, integral, imposed,
                    one) -> list[tuple[str, int, Any]]:
    """Initial deformations ``(effect, basic force index, value)`` of a member from its
    unit fields: ``integral(f, weight)`` = int_0^L weight(x) f0(x) dx of the span-load
    field f0 of field ``f`` (None without span loads; ``weight`` a polynomial in x/L, or
    a function of x for a varying section), over the section stiffness; and the free
    strains ``imposed`` = (alpha dT, alpha dTgrad/h, misfit) (or None) as uniform axial
    strain and curvature."""
    zero = one - one
    units = kind.unit_fields(m, L, one, zero)
    section = kind.section(m, sec, shear)
    out = []
    if integral is not None:
        for f, K in section.items():
            for i, u in enumerate(units):
                if K is None or not _alive(u, f):
                    continue
                if callable(K):
                    value = integral(f, lambda x, p=u[f], K=K, Lf=float(L):
                                     poly_eval(p, x / Lf) / K(x))
                else:
                    value = integral(f, u[f]) / K
                out.append((f"span loads ({TERM_OF_FIELD.get(f, f)})", i, value))
    if imposed is not None:
        eps, kappa, misfit = imposed
        for i, u in enumerate(units):
            if _alive(u, "n"):
                value = L * poly_integral(u["n"], zero, one) * (eps + misfit / L)
                out.append(("temperature and misfit", i, value))
            if _alive(u, "m") and kappa:
                out.append(("temperature (gradient)", i,
                            L * poly_integral(u["m"], zero, one) * kappa))
    return out
