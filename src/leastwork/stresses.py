"""Extreme-fibre stresses along a member: sigma = N/A + M/S on the local -y face and
N/A - M/S on the local +y face (tension positive; a sagging moment, m > 0, puts the -y face
in tension), with A the section area and S its elastic section modulus (given, or I/(depth/2)).

Bars: N/A, constant. A member without an area (stiffnesses given directly), or a beam
without a section modulus, has no stress result.
"""

from __future__ import annotations

from .fields import Piecewise
from .model import Member

__all__ = ["stress_extremes"]


def stress_extremes(member: Member, mr) -> tuple[tuple[float, float], tuple[float, float]] | None:
    """((largest stress, at), (smallest stress, at)) along ``member`` (Pa, m from its start)
    for its member result ``mr``; max and min algebraic; None without A (and S for a beam).
    Exact: each face's stress is a polynomial on each piece, maximised at the piece ends and
    the roots of its derivative (:meth:`Piecewise.extremes`)."""
    A = member.area
    if A is None:
        return None
    if not member.is_beam:
        sigma = float(mr.start[0]) / A
        return (sigma, 0.0), (sigma, 0.0)
    S = member.section_modulus
    if S is None:
        return None
    n, m = mr.n, mr.m
    bottom = Piecewise(m.breaks, n.coef / A + m.coef / S).extremes()
    top = Piecewise(m.breaks, n.coef / A - m.coef / S).extremes()
    largest = max((bottom[0], top[0]), key=lambda e: (e[0], -e[1]))
    smallest = min((bottom[1], top[1]), key=lambda e: (e[0], e[1]))
    return largest, smallest
