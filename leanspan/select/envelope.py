"""The envelope screen: every candidate's peak demands from a few exact solves per combination.

For a prismatic member without springs, each combination's field is ``A(x) + w B(x)``: A the
combined load cases, B the unit self-weight case times its factor, w the candidate's weight per
length (``m g``). A peak demand

    h(w) = max over elements e and s in [0, L_e] of  sigma_e (A_e(s) + w B_e(s)) / d_e

(sigma_e = +1 or -1 picks the maximum or the minimum; d_e is 1, or a span's allowed deflection
so that h is the worst span's deflection ratio) is a maximum of functions linear in w, so it is
**convex in w**, with slope ``sigma B(x*) / d`` at the maximiser x* (the envelope theorem).
This module builds h once per combination on the candidates' sorted distinct weights:

* h is computed exactly (the same per-element evaluation as the station screen,
  :func:`leanspan.select.extremes._cubic_best` / :func:`~leanspan.select.extremes._polished_best`)
  at a few knot weights;
* between two knots whose maximiser is the same line (same A and B values: a support, a point
  load, a fixed peak), h *is* that line: h >= the line everywhere, equals it at both knots, and a
  convex function lies below its chord, so the piece is exact;
* elsewhere the maximiser moves with w (a span peak under loads of different shapes) and h is
  smooth; the piece is the cubic through the two knots' values and slopes, accepted once the
  exact value at the middle candidate weight agrees to round-off (1e-14 of the function's
  size, scaled by the cubic's error shape tau^2 (1 - tau)^2 to the middle of the interval),
  else the interval is halved. Where the maximiser jumps (a kink of h), halving goes on
  until no candidate lies inside, so those candidates are knots, exact.

Each candidate's demand is then one lookup and a cubic: O(candidates x combinations),
independent of the number of elements. :func:`leanspan.select.screen.screen_effects` uses this
for large candidate sets; the station screen stays as the reference the tests compare with.
"""

from __future__ import annotations

import numpy as np

from ..beam.poly import evaluate as _horner
from .extremes import _cubic_best, _polished_best

__all__ = ["Peak", "envelope_values", "envelope_effects"]

_KNOTS = 33  # initial knots per function (evenly spaced over the sorted weights)
_REL = 1e-14  # accepted gap between the cubic piece and the exact value, of the function's size


class Peak:
    """One peak demand h(w): the element polynomials ``A + w B`` (P, n) whose maximum is taken,
    their lengths ``L`` (P,) and a tag per element (P,) int (the span, for deflection)."""

    def __init__(self, A, B, L, tag=None):
        self.A, self.B = np.asarray(A, float), np.asarray(B, float)
        self.L = np.asarray(L, float)
        self.tag = np.zeros(self.L.size, int) if tag is None else np.asarray(tag, int)


def _exact(peaks, which, w, best):
    """h of peaks ``which`` (m,) at weights ``w`` (m,), all of one polynomial degree: the value, the
    maximiser's line a + w b (b is also the slope of h in w) and its tag, each (m,)."""
    P = max(p.L.size for p in peaks)
    n = max(p.A.shape[1] for p in peaks)

    def pad(p, a):  # repeat element 0 to P rows (a repeat does not change a maximum), zero-pad degree
        out = np.zeros((P, n))
        out[: a.shape[0], : a.shape[1]] = a
        out[a.shape[0]:, : a.shape[1]] = a[0]
        return out

    A = np.stack([pad(p, p.A) for p in peaks])[which]  # (m, P, n)
    B = np.stack([pad(p, p.B) for p in peaks])[which]
    L = np.stack([np.concatenate([p.L, np.full(P - p.L.size, p.L[0])]) for p in peaks])[which]
    tag = np.stack([np.concatenate([p.tag, np.full(P - p.L.size, p.tag[0])]) for p in peaks])[which]
    value, e, s = best(A + w[:, None, None] * B, L)
    r = np.arange(w.size)
    a = _horner(A[r, e], s)
    b = _horner(B[r, e], s)
    return value, a, b, tag[r, e]


def _hermite(ha, hb, da, db, dw):
    """c2, c3 of the cubic ha + da tau + c2 tau^2 + c3 tau^3 with values ha, hb and slopes da, db
    at tau = 0 and tau = dw > 0 (cubic Hermite interpolation)."""
    slope = (hb - ha) / dw
    return (3 * slope - 2 * da - db) / dw, (da + db - 2 * slope) / (dw * dw)


def envelope_values(peaks, weights, best):
    """h of every peak at every weight: (len(peaks), n) values and tags.

    Parameters
    ----------
    peaks : list of Peak
        Functions of one polynomial degree.
    weights : ndarray (n,)
        Sorted distinct weights per length w.
    best : callable
        ``best(coef (m, P, n), L (m, P)) -> (value, element, s)`` each (m,): the exact maximum of
        the element polynomials (the station screen's evaluator).

    Examples
    --------
    One element, M(s) = 10 s - s^2 + w (2 s - s^2) on [0, 4]: the peak moves with w.

    >>> from leanspan.select.extremes import _cubic_best
    >>> p = Peak([[0.0, 10.0, -1.0, 0.0]], [[0.0, 2.0, -1.0, 0.0]], [4.0])
    >>> w = np.linspace(0.0, 3.0, 200)
    >>> h, _ = envelope_values([p], w, _cubic_best)
    >>> peak_s = (10 + 2 * w) / (2 + 2 * w)  # where the derivative vanishes
    >>> exact = np.where(peak_s < 4, (10 + 2 * w) ** 2 / (4 + 4 * w), 24 - 8 * w)
    >>> bool(np.allclose(h[0], exact, rtol=1e-13))
    True
    """
    u = np.asarray(weights, float)
    n, J = u.size, len(peaks)
    if n == 0 or J == 0:
        return np.zeros((J, n)), np.zeros((J, n), int)
    start = np.unique(np.linspace(0, n - 1, min(n, _KNOTS)).round().astype(int))
    if start.size == n:  # few weights: every one is a knot
        h, _, _, t = _exact(peaks, np.repeat(np.arange(J), n), np.tile(u, J), best)
        return h.reshape(J, n), t.reshape(J, n)
    # the knot table: function, weight index, value, line (a, b; b the slope), tag
    kj = np.repeat(np.arange(J), start.size)
    ki = np.tile(start, J)
    kh, ka, kb, kt = _exact(peaks, kj, u[ki], best)
    size = np.zeros(J)
    np.maximum.at(size, kj, np.abs(kh))
    # pending intervals: rows of the knot table at their two ends
    base = np.arange(J)[:, None] * start.size
    pa = (base + np.arange(start.size - 1)[None]).ravel()
    pb = pa + 1
    pieces = []  # (function, ia, ib, c0, c1, c2, c3, tag)

    def accept(a, b, cubic):  # the intervals between knot rows a and b become pieces
        if cubic:
            c2, c3 = _hermite(kh[a], kh[b], kb[a], kb[b], u[ki[b]] - u[ki[a]])
        else:
            c2 = c3 = np.zeros(a.size)
        pieces.append((kj[a], ki[a], ki[b], kh[a], kb[a], c2, c3, kt[a]))

    while pa.size:
        scale = size[kj[pa]]
        line = ((np.abs(ka[pa] - ka[pb]) <= _REL * scale + 1e-300)
                & (np.abs(kb[pa] - kb[pb]) * max(abs(u[0]), abs(u[-1])) <= _REL * scale + 1e-300))
        accept(pa[line], pb[line], cubic=False)
        pa, pb = pa[~line], pb[~line]
        short = ki[pb] - ki[pa] <= 1  # no candidate inside: both ends are knots
        accept(pa[short], pb[short], cubic=True)
        pa, pb = pa[~short], pb[~short]
        if not pa.size:
            break
        mid = (ki[pa] + ki[pb]) // 2
        j = kj[pa]
        h, a, b, t = _exact(peaks, j, u[mid], best)
        pm = kh.size + np.arange(mid.size)
        kj, ki = np.concatenate([kj, j]), np.concatenate([ki, mid])
        kh, ka, kb, kt = (np.concatenate([x, y]) for x, y in ((kh, h), (ka, a), (kb, b), (kt, t)))
        np.maximum.at(size, j, np.abs(h))
        # the cubic piece over [a, b], checked at the middle knot
        wa, wb, wm = u[ki[pa]], u[ki[pb]], u[mid]
        dw, tau = wb - wa, wm - wa
        c2, c3 = _hermite(kh[pa], kh[pb], kb[pa], kb[pb], dw)
        guess = kh[pa] + tau * (kb[pa] + tau * (c2 + tau * c3))
        # a cubic through values and slopes errs by about c tau^2 (dw - tau)^2 (largest at the
        # middle): the gap seen at the knot, scaled to the middle, must be round-off
        shape = 16.0 * (tau / dw) ** 2 * (1.0 - tau / dw) ** 2
        ok = (np.abs(guess - h) <= _REL * size[j] * shape) & (kt[pa] == t) & (kt[pb] == t)
        # accepted or not, the middle knot splits the interval: accepted halves are cubic pieces
        accept(np.concatenate([pa[ok], pm[ok]]), np.concatenate([pm[ok], pb[ok]]), cubic=True)
        pa = np.concatenate([pa[~ok], pm[~ok]])
        pb = np.concatenate([pm[~ok], pb[~ok]])

    fj, ia, ib, c0, c1, c2, c3, tg = (np.concatenate(p) for p in zip(*pieces))
    order = np.lexsort((ia, fj))
    fj, ia, ib, c0, c1, c2, c3, tg = (x[order] for x in (fj, ia, ib, c0, c1, c2, c3, tg))
    # the piece of every (function, weight index): pieces of a function tile [0, n - 1]
    length = ib - ia
    last = np.r_[fj[1:] != fj[:-1], True]
    length = length + last  # the final piece of each function also owns its end point
    ua = np.repeat(u[ia], length)  # pieces tile the weights: repeats, not gathers
    tau = np.tile(u, J) - ua
    values = np.repeat(c3, length)
    for c in (c2, c1, c0):
        values *= tau
        values += np.repeat(c, length)
    return values.reshape(J, n), np.repeat(tg, length).reshape(J, n)


def envelope_effects(resp, weights):
    """Peak moments, shears and worst-span deflections of every concrete combination of a
    response without springs (``resp.M.shape[0] == 1``), for the sorted distinct weights per
    length ``weights`` (n,) of the candidates: arrays (C, n) (combination first) ``M_max``,
    ``M_min``, ``V_abs``, ``v_abs`` (times EI: the caller divides by each candidate's EI) and
    ``v_allowed``, as the station screen gives them.
    """
    sw = resp.self_weight_index
    lengths, x0 = resp.lengths, resp.x_nodes[:-1]
    mids = x0 + lengths / 2
    v_field = resp.v[0] * resp.EI[0, None, :, None]  # deflection x EI of the unit-EI solve
    strength, deflection = [], []  # (combination index, peaks)
    for ci, combo in enumerate(resp.combos):  # a small set
        F = np.asarray(combo.factors, float)
        Fn = F.copy()
        f_sw = 0.0
        if sw is not None:
            f_sw, Fn[sw] = F[sw], 0.0

        def parts(field):
            A = np.tensordot(Fn, field, axes=(0, 0))
            B = f_sw * field[sw] if sw is not None else np.zeros_like(A)
            return A, B

        if combo.check == "strength":
            (AM, BM), (AV, BV) = parts(resp.M[0]), parts(resp.V[0])
            strength.append((ci, [Peak(AM, BM, lengths), Peak(-AM, -BM, lengths),
                                  Peak(np.r_[AV, -AV], np.r_[BV, -BV], np.r_[lengths, lengths])]))
        elif combo.limit is not None:
            A, B = parts(v_field)
            table = np.full(len(resp.spans), np.nan)  # allowed deflection per span
            rows, tags = [], []  # the elements of each span, and the span of every element
            for si, (a, b, _kind) in enumerate(resp.spans):  # a small set
                elems = np.nonzero((mids > a) & (mids < b))[0]
                if elems.size:
                    rows.append(elems)
                    tags.append(np.full(elems.size, si))
                    table[si] = float(combo.limit.allowed(b - a))
            if rows:
                e, t = np.concatenate(rows), np.concatenate(tags)
                d = table[t][:, None]
                deflection.append((ci, table, Peak(np.r_[A[e] / d, -A[e] / d], np.r_[B[e] / d, -B[e] / d],
                                                   np.r_[lengths[e], lengths[e]], np.r_[t, t])))
    C = len(resp.combos)
    out = {k: np.full((C, weights.size), np.nan) for k in ("M_max", "M_min", "V_abs", "v_abs", "v_allowed")}
    if strength:
        peaks = [p for _, ps in strength for p in ps]
        h, _ = envelope_values(peaks, weights, _cubic_best)
        for i, (ci, _) in enumerate(strength):
            out["M_max"][ci] = h[3 * i]
            out["M_min"][ci] = -h[3 * i + 1]
            out["V_abs"][ci] = h[3 * i + 2]
    if deflection:
        h, tag = envelope_values([p for _, _, p in deflection], weights, _polished_best)
        for i, (ci, table, _) in enumerate(deflection):
            out["v_allowed"][ci] = table[tag[i]]
            out["v_abs"][ci] = h[i] * out["v_allowed"][ci]
    return out
