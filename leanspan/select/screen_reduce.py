"""Reducing the concrete combinations (pattern members) to the job's combinations."""

from __future__ import annotations

import numpy as np

__all__ = ["to_parents"]


def to_parents(values, parents, C: int, reduce=np.fmax):
    """``values`` (K, C_concrete) reduced over the members of each of the C model combinations
    (``parents[c]`` is the model combination of concrete combination c); NaN where a combination
    has no member. ``reduce`` ignores NaN (``np.fmax``, ``np.fmin``).

    >>> to_parents(np.array([[1.0, 3.0, 2.0]]), np.array([0, 0, 1]), 2).tolist()
    [[3.0, 2.0]]
    """
    out = np.full((values.shape[0], C), np.nan)
    for c in range(C):  # a small set
        cols = np.flatnonzero(parents == c)
        if cols.size:
            out[:, c] = reduce.reduce(values[:, cols], axis=1)
    return out
