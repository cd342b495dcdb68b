"""Long catalogue lists: a first pass in chunks, then the full screen of the rows a table can show.

A search over more than :data:`LONG_LIST` catalogue rows (a large supplier list) would hold
(rows x combinations) arrays for every effect and check at once: 400 MB each for a million rows
and 50 combinations. Instead :func:`long_list_rows` sorts the rows into pass and fail first
(:func:`leanspan.select.screen.screen_verdicts`: on the worst effects over the combinations where
the checks allow it, else in chunks), keeping per row its verdict,
objective values and largest utilisation, and returns the rows the ranked table can show: the
best :data:`KEEP` passing ones (and any tied with the last), the heaviest failing ones lighter than
the winner (the nearest failures) or, with nothing passing, the :data:`KEEP` closest.
:func:`leanspan.select.search.run_selection` then screens those in full as usual; the counts of
screened and passing rows include the rest. The built-up search keeps its rows the same way.
"""

from __future__ import annotations

import numpy as np

__all__ = ["LONG_LIST", "KEEP", "CLOSE_CALL", "long_list_rows", "kept_positions", "nearest_failures", "best_rows"]

LONG_LIST = 2**17  # catalogue rows from which a search screens in chunks and keeps the best
KEEP = 1000  # passing candidates kept for the ranked table
CLOSE_CALL = 1e-9  # rows whose first-pass utilisation is this close to 1 are kept and screened again
_MAYBE = 20  # close calls lighter than the lightest sure pass whose nearest failures are kept too


def best_rows(first, second, idx, n):
    """``idx`` sorted by (first, second), the first ``n`` and those tied with the n-th (at most
    ``4 n`` of them, in index order: the full ranking would break such ties by name).

    >>> best_rows(np.array([3.0, 1.0, 2.0, 1.0]), np.zeros(4), np.arange(4), 1).tolist()
    [1, 3]
    """
    if idx.size <= n:
        return idx
    order = idx[np.lexsort((second[idx], first[idx]))]
    edge = order[n - 1]
    tied = order[n:][(first[order[n:]] == first[edge]) & (second[order[n:]] == second[edge])]
    return np.concatenate([order[:n], tied[: 4 * n]])


def kept_positions(passes, first, second, worst, threshold, top_failures=3):
    """Positions the ranked table can show: the best KEEP passing, the heaviest (for objective
    depth: deepest) ``top_failures`` failing ones below ``threshold`` (the winner's objective value;
    ties kept), and with nothing passing anywhere the KEEP closest (smallest largest utilisation).

    >>> passes = np.array([True, False, True, False, False])
    >>> mass = np.array([30.0, 12.0, 25.0, 20.0, 40.0])
    >>> kept_positions(passes, mass, np.zeros(5), np.array([0.9, 1.4, 0.8, 1.1, 1.2]), 25.0).tolist()
    [0, 1, 2, 3]
    """
    p = np.flatnonzero(passes)
    f = np.flatnonzero(~passes)
    keep = [best_rows(first, second, p, KEEP)]
    if np.isfinite(threshold):
        keep.append(nearest_failures(f, first, threshold, top_failures))
    else:
        keep.append(best_rows(worst, first, f, KEEP))
    return np.unique(np.concatenate(keep))


def nearest_failures(f, first, threshold, top_failures=3):
    """Of the failing positions ``f``, the ``top_failures`` with the largest ``first`` below
    ``threshold`` (and any tied with the last of them, at most ``4 KEEP``)."""
    lighter = f[first[f] < threshold]
    if not lighter.size:
        return lighter
    order = lighter[np.argsort(-first[lighter], kind="stable")]
    edge = first[order[min(top_failures, order.size) - 1]]
    return order[first[order] >= edge][: 4 * KEEP]


def long_list_rows(df, job, chunk=None):
    """The rows of a long catalogue table ``df`` to screen in full, from a first pass in chunks.

    Returns
    -------
    (DataFrame, int, int, frozenset)
        The kept rows, how many rows were screened but not kept, how many of those passed, and the
        checks whose NaN means fail for the kept rows (those that gave some row of the list a
        value: ``nan_fails`` of :func:`leanspan.select.screen.evaluate`).
    """
    from .screen import CHUNK, screen_verdicts
    from .search import candidates_from_table

    cand = candidates_from_table(df, job.limits)
    passes, worst, nan_fails = screen_verdicts(job.model, cand, job.search.self_weight, chunk=chunk or CHUNK)
    K = cand.size
    mass = df["mass_per_length"].to_numpy(float)
    depth = df["depth"].to_numpy(float)
    first, second = (mass, depth) if job.search.objective == "mass" else (depth, mass)
    # rows within round-off of their limit are kept whatever the first pass said: the full screen of
    # the kept rows decides them, so the winner is the lightest sure pass or one of them, and the
    # nearest failures below each of those are kept too
    close = np.abs(worst - 1.0) <= CLOSE_CALL
    sure = first[passes & ~close]
    sure = sure[np.isfinite(sure)]
    threshold = float(sure.min()) if sure.size else np.inf
    maybe = np.unique(first[close & (first < threshold)])[:_MAYBE]
    if not np.isfinite(threshold):  # every pass a close call: the lightest of them
        lead = first[passes]
        lead = lead[np.isfinite(lead)]
        threshold = float(lead.min()) if lead.size else np.inf
    pos = [kept_positions(passes, first, second, worst, threshold), np.flatnonzero(close)]
    f = np.flatnonzero(~passes)
    pos += [nearest_failures(f, first, t) for t in maybe]
    pos = np.unique(np.concatenate(pos))
    dropped = K - pos.size
    dropped_pass = int(passes.sum() - passes[pos].sum())
    kept = df.iloc[pos].reset_index(drop=True)
    kept.attrs = dict(df.attrs)
    return kept, dropped, dropped_pass, nan_fails
