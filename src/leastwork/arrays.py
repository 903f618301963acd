"""Small array helpers of the plain solve: numpy's ``median`` and ``unique`` load
``numpy.ma`` (masked arrays, about 0.03 s of start-up) on their first call; these give the
same results with sorting alone.
"""

from __future__ import annotations

import numpy as np

__all__ = ["median", "first_and_inverse", "union"]


def median(values) -> float:
    """The median of ``values`` (at least one): the middle value, or the mean of the two
    middle ones, as ``np.median`` gives it."""
    s = np.sort(np.asarray(values, dtype=float).ravel())
    n = len(s)
    return float(s[n // 2]) if n % 2 else float((s[n // 2 - 1] + s[n // 2]) / 2.0)


def first_and_inverse(codes: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """For a 1-D array: the index of the first occurrence of each distinct value (in
    increasing order of value) and, for each entry, the number of its value in that order:
    ``np.unique(codes, return_index=True, return_inverse=True)[1:]``."""
    order = np.argsort(codes, kind="stable")
    ordered = codes[order]
    new = np.ones(len(codes), dtype=bool)
    new[1:] = ordered[1:] != ordered[:-1]
    inverse = np.empty(len(codes), dtype=np.intp)
    inverse[order] = np.cumsum(new) - 1
    return order[new], inverse


def union(a, b) -> np.ndarray:
    """The sorted distinct values of both 1-D arrays: ``np.union1d(a, b)``."""
    s = np.sort(np.concatenate([np.asarray(a).ravel(), np.asarray(b).ravel()]))
    if not len(s):
        return s
    keep = np.ones(len(s), dtype=bool)
    keep[1:] = s[1:] != s[:-1]
    return s[keep]
