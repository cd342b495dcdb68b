"""Rationalisation: at most K distinct sections for a whole schedule, least total objective.

Member type i (weight ``a_i``: count x length, or count for depth) may take candidate j when
j passes all its checks (``passes[i, j]``); taking it costs ``a_i * v_j``. Choose a set S of at
most K candidates (optionally at most K per group: per material or per family) and give each
member the cheapest passing candidate in S, so that the total is least. This is a p-median
problem with forbidden pairs; it is solved exactly as a mixed-integer program (HiGHS through
:func:`scipy.optimize.milp`)::

    minimise   sum_ij a_i v_j x_ij
    subject to sum_j x_ij = 1            every member gets one section   (j passing i only)
               x_ij <= y_j               only sections in the set
               sum_{j in g} y_j <= K     for each group g
               y_j in {0, 1}, 0 <= x_ij <= 1

Before the solve, three exact reductions keep the model small:

1. *Dominated candidates* go: j is dropped when a candidate k of the same group passes every
   member that j passes and ``v_k <= v_j`` (swapping j for k in any solution costs nothing).
2. *Members with the same pass set* over the remaining candidates become one row whose weight
   is the sum of theirs (they always take the same section of a set).
3. *Pairs that cannot be in a better solution* go: with a feasible total U (from the greedy
   method below) and each row's least cost ``L_i``, row i never takes j with
   ``a_i v_j > U - sum_{l != i} L_l``.

The greedy method (also the fallback when the model would still have more than
``max_pairs`` pairs, or when HiGHS stops at its time limit) tries two starts: from every
member's own best, drop the section whose removal costs least until each group holds K; and
from nothing, add the section that lowers the total most (covering members first). Each start
is improved by swapping a section in the set for one outside it while that lowers the total,
and the better result is kept. It is not proven optimal and says so (``optimal = False``).

>>> passes = np.array([[1, 1, 1], [0, 1, 1], [0, 0, 1]], bool)   # 3 members x 3 sections
>>> r = rationalise(passes, np.ones(3), np.array([1.0, 2.0, 3.0]), 1)
>>> r.choice.tolist(), r.total, r.method
([2, 2, 2], 9.0, 'milp')
>>> rationalise(passes, np.ones(3), np.array([1.0, 2.0, 3.0]), 2).total  # {1, 3}: 1 + 3 + 3 or {2, 3}: 2 + 2 + 3
7.0
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

__all__ = ["Rationalised", "rationalise", "penalty_table", "best_each", "MAX_PAIRS", "PENALTY_BUDGET"]

MAX_PAIRS = 400_000  # more member-section pairs than this after the reductions: greedy
_TIME_LIMIT = 60.0   # seconds per HiGHS solve
PENALTY_BUDGET = 120.0  # seconds of exact solves for the penalty table; the rest greedy


@dataclass(frozen=True)
class Rationalised:
    """One rationalisation: ``choice[i]`` the candidate of member i (-1: none), its ``total``,
    the distinct ``sections``, and how it was found (``method`` milp | greedy | each; ``optimal``
    when proven)."""

    k: int | None
    choice: np.ndarray
    total: float
    method: str
    optimal: bool
    feasible: bool

    @property
    def sections(self) -> np.ndarray:
        return np.unique(self.choice[self.choice >= 0])


def best_each(passes, value, tiebreak=None) -> np.ndarray:
    """Each member's least-value passing candidate (ties by ``tiebreak``, then index); -1 if none."""
    order = _order(value, tiebreak)
    p = passes[:, order]
    first = np.argmax(p, axis=1)
    return np.where(p.any(axis=1), order[first], -1)


def _order(value, tiebreak=None):
    value = np.asarray(value, float)
    keys = (np.arange(value.size),) + ((np.asarray(tiebreak, float),) if tiebreak is not None else ()) + (value,)
    return np.lexsort(keys)


def _assign(passes, value, chosen, tiebreak=None) -> np.ndarray:
    """Each member's cheapest passing candidate among ``chosen`` (indices), -1 if none."""
    chosen = np.asarray(sorted(chosen), int)
    if chosen.size == 0:
        return np.full(passes.shape[0], -1)
    sub = best_each(passes[:, chosen], np.asarray(value)[chosen],
                    None if tiebreak is None else np.asarray(tiebreak)[chosen])
    return np.where(sub >= 0, chosen[np.maximum(sub, 0)], -1)


def _total(weight, value, choice) -> float:
    if (choice < 0).any():
        return float("inf")
    return float(np.sum(np.asarray(weight, float) * np.asarray(value, float)[choice]))


def _most_per_group(choice, groups) -> int:
    """The largest number of distinct candidates ``choice`` uses in one group."""
    used = np.unique(choice)
    return int(np.unique(np.asarray(groups)[used], return_counts=True)[1].max())


def _undominated(passes, value, groups, tiebreak=None) -> np.ndarray:
    """Candidate indices that no other candidate of their group dominates (see the module text)."""
    ok = passes.any(axis=0) & np.isfinite(value)
    order = [j for j in _order(value, tiebreak) if ok[j]]
    bits = np.packbits(passes, axis=0).T  # (m, n/8): each candidate's pass set
    keep = []
    kept_bits = {}
    for j in order:  # by value: a dominating candidate comes first
        g = groups[j]
        kb = kept_bits.get(g)
        if kb is not None and not np.any(bits[j] & ~kb, axis=1).all():
            continue  # some kept candidate passes everything j passes
        keep.append(j)
        kept_bits[g] = bits[j][None] if kb is None else np.vstack([kb, bits[j][None]])
    return np.asarray(sorted(keep), int)


def rationalise(passes, weight, value, k, groups=None, tiebreak=None, max_pairs: int = MAX_PAIRS,
                time_limit: float = _TIME_LIMIT) -> Rationalised:
    """At most ``k`` distinct candidates (per group) for all members, least total.

    Parameters
    ----------
    passes : (n, m) bool
        Member i may take candidate j.
    weight : (n,) float
        Member factors a_i (> 0).
    value : (m,) float
        Candidate values v_j (NaN: the candidate cannot be used).
    k : int
    groups : (m,) int, optional
        Group of each candidate; at most ``k`` per group (default: one group).
    tiebreak : (m,) float, optional
        Between candidates of equal value, the one with less of this (e.g. mass) first.
    """
    passes = np.asarray(passes, bool)
    weight, value = np.asarray(weight, float), np.asarray(value, float)
    n, m = passes.shape
    groups = np.zeros(m, int) if groups is None else np.asarray(groups)
    passes = passes & np.isfinite(value)[None, :]
    if n == 0:
        return Rationalised(k, np.zeros(0, int), 0.0, "each", True, True)
    if not passes.any(axis=1).all():
        return Rationalised(k, np.full(n, -1), float("inf"), "each", True, False)
    own = best_each(passes, value, tiebreak)
    if _most_per_group(own, groups) <= k:
        return Rationalised(k, own, _total(weight, value, own), "each", True, True)
    cols = _undominated(passes, value, groups, tiebreak)
    # members that pass the same remaining candidates always take the same one: one row, weights added
    rows, inverse = np.unique(passes[:, cols], axis=0, return_inverse=True)
    w_rows = np.bincount(np.ravel(inverse), weights=weight, minlength=rows.shape[0])
    greedy = _greedy(rows, w_rows, value[cols], groups[cols], k,
                     None if tiebreak is None else np.asarray(tiebreak)[cols])
    greedy_choice = _assign(passes, value, cols[greedy[greedy >= 0]], tiebreak) if (greedy >= 0).all() \
        else np.full(n, -1)
    upper = _total(weight, value, greedy_choice)
    sub = rows.copy()
    cost = w_rows[:, None] * value[cols][None, :]
    least = np.where(rows, cost, np.inf).min(axis=1)
    if np.isfinite(upper):
        slack = upper - (least.sum() - least)  # the most each row may cost
        sub = sub & (cost <= slack[:, None] * (1 + 1e-12) + 1e-300)
    if int(sub.sum()) > max_pairs:
        return Rationalised(k, greedy_choice, upper, "greedy", False, bool(np.isfinite(upper)))
    choice, status = _milp(sub, cost, groups[cols], k, time_limit)
    if status == "infeasible":
        return Rationalised(k, np.full(n, -1), float("inf"), "milp", True, False)
    if choice is None:  # time limit without a solution
        return Rationalised(k, greedy_choice, upper, "greedy", False, bool(np.isfinite(upper)))
    final = _assign(passes, value, np.unique(cols[choice]), tiebreak)
    total = _total(weight, value, final)
    if status != "optimal" and upper < total:
        return Rationalised(k, greedy_choice, upper, "greedy", False, True)
    return Rationalised(k, final, total, "milp", status == "optimal", True)


def _milp(sub, cost, groups, k, time_limit):
    """Solve the model on the pairs ``sub`` (n, m'); returns (column per member or None, status)."""
    from scipy.optimize import Bounds, LinearConstraint, milp
    from scipy.sparse import coo_matrix, vstack

    n, m = sub.shape
    ii, jj = np.nonzero(sub)
    P = ii.size
    scale = float(np.max(cost[ii, jj])) or 1.0  # objective of order 1 for the solver's tolerances
    c = np.concatenate([np.zeros(m), cost[ii, jj] / scale])
    xs = m + np.arange(P)
    assign = coo_matrix((np.ones(P), (ii, xs)), shape=(n, m + P))
    link = coo_matrix((np.concatenate([np.ones(P), -np.ones(P)]),
                       (np.concatenate([np.arange(P)] * 2), np.concatenate([xs, jj]))), shape=(P, m + P))
    gid = np.unique(groups, return_inverse=True)[1]
    card = coo_matrix((np.ones(m), (gid, np.arange(m))), shape=(gid.max() + 1, m + P))
    A = vstack([assign, link, card]).tocsr()
    lo = np.concatenate([np.ones(n), np.full(P, -np.inf), np.full(card.shape[0], -np.inf)])
    hi = np.concatenate([np.ones(n), np.zeros(P), np.full(card.shape[0], float(k))])
    res = milp(c, constraints=LinearConstraint(A, lo, hi), integrality=np.r_[np.ones(m), np.zeros(P)],
               bounds=Bounds(0, 1), options={"time_limit": time_limit, "mip_rel_gap": 0.0})
    if res.status == 2:
        return None, "infeasible"
    if res.x is None:
        return None, "no solution"
    y = res.x[:m] > 0.5
    return np.flatnonzero(y), ("optimal" if res.status == 0 else "time limit")


def _greedy(passes, weight, value, groups, k, tiebreak=None) -> np.ndarray:
    """The better of two greedy starts, each followed by improving swaps (column per member, -1
    where no feasible set was found): removal from every member's own best, and addition from
    nothing (an uncovered member costs more than any whole assignment, so coverage comes first)."""
    n = passes.shape[0]
    cost = np.where(passes, weight[:, None] * value[None, :], np.inf)
    big = float(np.max(cost[passes])) * (n + 1) + 1.0
    penalised = np.where(passes, cost, big)
    best, best_total = np.full(n, -1), np.inf
    for start in (_drop(cost, passes, value, groups, k, tiebreak), _add(penalised, groups, k)):
        if start is None:
            continue
        chosen = _swaps(penalised, groups, start)
        choice = np.asarray(chosen)[np.argmin(cost[:, chosen], axis=1)]
        total = cost[np.arange(n), choice].sum()
        if total < best_total:
            best, best_total = choice, total
    return best


def _drop(cost, passes, value, groups, k, tiebreak):
    """From every member's own best, drop the section whose removal costs least until each group
    holds at most k; None if that leaves a member without a section."""
    n = cost.shape[0]
    chosen = sorted(set(best_each(passes, value, tiebreak).tolist()))
    while True:
        counts = {g: sum(groups[j] == g for j in chosen) for g in set(groups[chosen].tolist())}
        over = [j for j in chosen if counts[groups[j]] > k]
        if not over:
            return chosen
        M = cost[:, chosen]
        arg = np.argmin(M, axis=1)
        first = M[np.arange(n), arg]
        M2 = M.copy()
        M2[np.arange(n), arg] = np.inf
        second = M2.min(axis=1)
        extra = np.full(len(chosen), np.inf)
        for s, j in enumerate(chosen):  # the set is small (at most the distinct best sections)
            if j in over:
                mine = arg == s
                with np.errstate(invalid="ignore"):
                    extra[s] = np.sum(second[mine] - first[mine])
        if not np.isfinite(extra).any():
            return None
        chosen.pop(int(np.argmin(extra)))


def _add(penalised, groups, k):
    """From nothing, add the section that lowers the (penalised) total most, while groups have room."""
    n, m = penalised.shape
    current = np.full(n, np.inf)
    chosen = []
    while True:
        counts = {g: sum(groups[j] == g for j in chosen) for g in set(groups.tolist())}
        eligible = np.flatnonzero([counts[groups[j]] < k and j not in chosen for j in range(m)])
        if eligible.size == 0:
            return chosen or None
        totals = np.concatenate([np.minimum(current[:, None], penalised[:, c]).sum(axis=0)
                                 for c in np.array_split(eligible, max(1, eligible.size // 512))])
        i = int(np.argmin(totals))
        if chosen and not totals[i] < current.sum():
            return chosen
        chosen.append(int(eligible[i]))
        current = np.minimum(current, penalised[:, eligible[i]])


def _swaps(cost, groups, chosen, rounds: int = 50):
    """Swap one section of the set for one outside it (same group) while the total falls."""
    n, m = cost.shape
    for _ in range(rounds):
        M = cost[:, chosen]
        total = M.min(axis=1).sum()
        best_gain, move = 0.0, None
        for s, j in enumerate(chosen):
            rest = np.delete(M, s, axis=1)
            base = rest.min(axis=1) if rest.shape[1] else np.full(n, np.inf)
            same = np.flatnonzero((groups == groups[j]) & ~np.isin(np.arange(m), chosen))
            for start in range(0, same.size, 512):  # blocks of candidates keep the work in cache
                c = same[start:start + 512]
                new = np.minimum(base[:, None], cost[:, c]).sum(axis=0)
                i = int(np.argmin(new))
                gain = total - new[i]
                if np.isfinite(new[i]) and gain > best_gain + 1e-12 * abs(total):
                    best_gain, move = gain, (s, int(c[i]))
        if move is None:
            break
        chosen = sorted(chosen[:move[0]] + chosen[move[0] + 1:] + [move[1]])
    return chosen


def penalty_table(passes, weight, value, groups=None, tiebreak=None, up_to: int | None = None,
                  budget: float = PENALTY_BUDGET, **kw) -> list:
    """Rationalisations for K = 1, 2, ... up to the number of distinct sections the members pick
    on their own (the unrestricted optimum), or ``up_to``; each a :class:`Rationalised`. Once the
    exact solves have taken ``budget`` seconds, the remaining K are found by the greedy method."""
    import time

    passes = np.asarray(passes, bool) & np.isfinite(np.asarray(value, float))[None, :]
    if passes.shape[0] == 0 or not passes.any(axis=1).all():
        return []
    m = passes.shape[1]
    groups = np.zeros(m, int) if groups is None else np.asarray(groups)
    own = best_each(passes, value, tiebreak)
    k_max = _most_per_group(own, groups)
    if up_to is not None:
        k_max = min(k_max, up_to)
    start, out = time.perf_counter(), []
    for k in range(1, k_max + 1):
        late = time.perf_counter() - start > budget
        out.append(rationalise(passes, weight, value, k, groups, tiebreak, **({**kw, "max_pairs": 0} if late else kw)))
    return out
