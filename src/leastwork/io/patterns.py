"""``[patterns]`` (live loads applied span by span in the arrangements that govern a
continuous beam) and ``[envelopes]`` (envelopes kept per group of combinations).

A patterned load case keeps its own name for the arrangement with every span loaded; each
other arrangement becomes a load case named after the spans it loads, ``live[AB+CD]``, and
every combination that uses the case gets one variant per arrangement, ``uls[AB+CD]``, so
that the envelope over the combinations covers them. The spans are the members that carry
the case's concentrated and distributed loads, in the order of the file; two spans are
adjacent when they follow each other there and share a node. The arrangements: the odd and
the even spans; and for each pair of adjacent spans, the pair with every second span beyond
it on either side (the arrangements of the largest span moments and support moments of a
continuous beam of equal spans). Other loads of the case (nodal loads, temperature, misfit)
act in every arrangement.
"""

from __future__ import annotations

from dataclasses import replace

from ..model import DistributedLoad, Member, PointLoad
from .core import CaseReader
from .messages import echo, hint, kind_of

__all__ = ["read_patterns", "arrangements", "read_envelopes", "PATTERN_VARIANTS_LIMIT"]

#: Most variants of one combination (the product of the arrangements of its patterned
#: cases).
PATTERN_VARIANTS_LIMIT = 64


def arrangements(spans: list[str], members: dict[str, Member]) -> list[tuple[str, ...]]:
    """The loaded spans of each arrangement other than "all", without repeats."""
    n = len(spans)
    out: list[tuple[str, ...]] = []

    def add(idx) -> None:
        chosen = tuple(spans[i] for i in sorted(set(idx)))
        if chosen and len(chosen) < n and chosen not in out:
            out.append(chosen)

    add(range(0, n, 2))
    add(range(1, n, 2))
    for k in range(n - 1):
        a, b = members[spans[k]], members[spans[k + 1]]
        if {a.start, a.end} & {b.start, b.end}:
            add([*range(k - 2, -1, -2), k, k + 1, *range(k + 3, n, 2)])
    return out


def read_patterns(reader: CaseReader, members: dict[str, Member], loads: list,
                  case_order: list) -> tuple[tuple[str, tuple[str, ...]], ...]:
    """``[patterns]``: CASE = "spans". Appends each arrangement's loads and case name (after
    its case) and returns (case, arrangement case names) pairs."""
    spec = reader.table("patterns")
    out = []
    for case, how in spec.items():
        where = f"[patterns] {case}"
        if case not in case_order:
            raise reader.err(where, f'no load case "{echo(case)}"{hint(case, case_order)}; the '
                             "cases are: " + echo(", ".join(case_order)))
        if how != "spans":
            raise reader.err(where, 'expected "spans" (the case is applied span by span), got '
                             + kind_of(how))
        spans = list(dict.fromkeys(ld.member for ld in loads if ld.case == case
                                   and isinstance(ld, (PointLoad, DistributedLoad))))
        spans.sort(key=list(members).index)
        if len(spans) < 2:
            raise reader.err(where, "a patterned case needs span loads on at least two "
                             f"members (found {len(spans)})")
        names = []
        at = case_order.index(case) + 1
        for chosen in arrangements(spans, members):
            name = f"{case}[{'+'.join(chosen)}]"
            loads.extend(replace(ld, case=name) for ld in list(loads) if ld.case == case and (
                not isinstance(ld, (PointLoad, DistributedLoad)) or ld.member in chosen))
            case_order.insert(at + len(names), name)
            names.append(name)
        out.append((case, tuple(names)))
    return tuple(out)


def read_envelopes(reader: CaseReader, combinations: tuple,
                   variants: dict[str, list[str]]) -> tuple[tuple[str, tuple[str, ...]], ...]:
    """``[envelopes]``: GROUP = ["COMBINATION", ...]; each name stands for the combination
    and its pattern variants."""
    spec = reader.table("envelopes")
    known = [name for name, _ in combinations]
    out = []
    for group, names in spec.items():
        where = f"[envelopes] {group}"
        if not isinstance(names, list) or not names or not all(isinstance(n, str) for n in names):
            raise reader.err(where, 'expected a list of combination names, e.g. ["uls_1", '
                             f'"uls_2"], got {kind_of(names)}')
        full: list[str] = []
        for n in names:
            if n not in variants:
                raise reader.err(where, f'no combination "{echo(n)}"{hint(n, known)}; the '
                                 "combinations are: " + echo(", ".join(known)))
            full += variants[n]
        out.append((group, tuple(dict.fromkeys(full))))
    return tuple(out)
