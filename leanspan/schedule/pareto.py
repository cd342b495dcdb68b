"""Non-dominated candidates of a member for two objectives.

A passing candidate is dominated when another passing candidate is no worse in both
objectives and better in one. Per member, values are ``a_i * v_j`` (see :mod:`.objectives`),
so the front in member values is the front in the candidate values ``v_j``.

>>> front(np.array([1.0, 2.0, 2.0, 3.0, 1.0]), np.array([5.0, 3.0, 4.0, 1.0, 5.0])).tolist()
[0, 1, 3, 4]
"""

from __future__ import annotations

import numpy as np

__all__ = ["front"]


def front(a, b) -> np.ndarray:
    """Indices (sorted) of the points (a_k, b_k) that no other point dominates; NaN points are
    left out. Equal points are all kept (neither dominates the other)."""
    a, b = np.asarray(a, float), np.asarray(b, float)
    ok = np.flatnonzero(np.isfinite(a) & np.isfinite(b))
    if ok.size == 0:
        return ok
    pts = np.stack([a[ok], b[ok]], axis=1)
    uniq, inverse = np.unique(pts, axis=0, return_inverse=True)  # sorted by a, then b
    inverse = np.ravel(inverse)
    # a distinct point is on the front when its b is below every b of a point with smaller a
    # (within one a, only the smallest b can be)
    first_of_a = np.r_[True, uniq[1:, 0] != uniq[:-1, 0]]
    prev_min = np.minimum.accumulate(np.r_[np.inf, uniq[:-1, 1]])
    on = first_of_a & (uniq[:, 1] < prev_min)
    return np.sort(ok[on[inverse]])
