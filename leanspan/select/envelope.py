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

__all__ = ["Peak", "Pieces", "EnvelopeTable", "envelope_values", "envelope_pieces", "envelope_effects"]

_KNOTS = 33  # initial knots per function (evenly spaced over the sorted weights)
_BLOCK = 2048  # weights evaluated at a time (the pieces of every function on them stay in cache)
_REL = 1e-14  # accepted gap between the cubic piece and the exact value, of the function's size


class Peak:
    """One peak demand h(w): the element polynomials ``A + w B`` (P, n) whose maximum is taken,
    their lengths ``L`` (P,) and a tag per element (P,) int (the span, for deflection)."""

    def __init__(self, A, B, L, tag=None):
        self.A, self.B = np.asarray(A, float), np.asarray(B, float)
        self.L = np.asarray(L, float)
        self.tag = np.zeros(self.L.size, int) if tag is None else np.asarray(tag, int)


def _stacked(peaks):
    """The peaks' A, B (J, P, n), L and tag (J, P) as one padded stack: every peak repeats its
    element 0 to P rows (a repeat does not change a maximum) and is zero-padded in degree."""
    P = max(p.L.size for p in peaks)
    n = max(p.A.shape[1] for p in peaks)
    J = len(peaks)
    A, B = np.zeros((J, P, n)), np.zeros((J, P, n))
    L, tag = np.empty((J, P)), np.empty((J, P), int)
    for j, p in enumerate(peaks):  # a small set (a few per combination)
        m, d = p.A.shape
        A[j, :m, :d], A[j, m:, :d] = p.A, p.A[0]
        B[j, :m, :d], B[j, m:, :d] = p.B, p.B[0]
        L[j, :m], L[j, m:] = p.L, p.L[0]
        tag[j, :m], tag[j, m:] = p.tag, p.tag[0]
    return A, B, L, tag


def _exact(stack, which, w, best):
    """h of the stacked peaks (:func:`_stacked`) ``which`` (m,) at weights ``w`` (m,): the value,
    the maximiser's line a + w b (b is also the slope of h in w) and its tag, each (m,)."""
    A, B, L, tag = (x[which] for x in stack)
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


class Pieces:
    """Piecewise cubics h_j(w) on the sorted distinct weights ``u`` (n,): per piece its function
    ``fj``, first and last weight index ``ia``, ``ib`` and ``c0 + c1 tau + c2 tau^2 + c3 tau^3``
    (tau = w - u[ia]) with the maximiser's tag; the pieces of a function tile [0, n - 1] in order.
    :meth:`values` evaluates them on any contiguous range of the weights (a chunk of candidates
    sorted by weight), so the pieces are built once for every chunk."""

    def __init__(self, u, J, fj, ia, ib, coef, tag):
        self.u, self.J = u, J
        order = np.lexsort((ia, fj))
        self.fj, self.ia, self.ib, self.tag = fj[order], ia[order], ib[order], tag[order]
        self.coef = [c[order] for c in coef]  # c0, c1, c2, c3
        # piece p covers weight indices [ia, end): its successor's start, or n for a function's last
        last = np.r_[self.fj[1:] != self.fj[:-1], True]
        self.end = np.where(last, u.size, np.r_[self.ia[1:], 0])
        self.lines = not np.any(self.coef[2]) and not np.any(self.coef[3])

    def values(self, lo: int = 0, hi: int | None = None):
        """h of every function at the weights ``u[lo:hi]``: (J, hi - lo) values and tags."""
        hi = self.u.size if hi is None else hi
        m = max(hi - lo, 0)
        values, tags = np.empty((self.J, m)), np.empty((self.J, m), self.tag.dtype)
        for a in range(lo, hi, _BLOCK):  # blocks of weights: the temporaries stay in cache
            b = min(hi, a + _BLOCK)
            values[:, a - lo:b - lo], tags[:, a - lo:b - lo] = self._block(a, b)
        return values, tags

    def _block(self, lo, hi, tags=True):
        """Values (J, hi - lo) and, with ``tags``, the maximisers' tags on the weights [lo, hi)."""
        m = hi - lo
        keep = np.flatnonzero((self.end > lo) & (self.ia < hi))  # pieces overlapping [lo, hi)
        length = np.minimum(self.end[keep], hi) - np.maximum(self.ia[keep], lo)
        # pieces tile each function's weights: repeats, not gathers
        tau = np.tile(self.u[lo:hi], self.J) - np.repeat(self.u[self.ia[keep]], length)
        c0, c1, c2, c3 = (c[keep] for c in self.coef)
        if self.lines:  # every piece a line (no moving maximiser): skip the cubic terms
            values = np.repeat(c1, length)
        else:
            values = np.repeat(c3, length)
            for c in (c2, c1):
                values *= tau
                values += np.repeat(c, length)
        values *= tau
        values += np.repeat(c0, length)
        return values.reshape(self.J, m), np.repeat(self.tag[keep], length).reshape(self.J, m) if tags else None


def envelope_values(peaks, weights, best):
    """h of every peak at every weight: (len(peaks), n) values and tags
    (:func:`envelope_pieces` evaluated at all the weights).

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
    return envelope_pieces(peaks, weights, best).values()


def envelope_pieces(peaks, weights, best) -> Pieces:
    """The pieces of every peak over the weights (see the module docstring).

    Parameters
    ----------
    peaks : list of Peak
        Functions of one polynomial degree.
    weights : ndarray (n,)
        Sorted distinct weights per length w.
    best : callable
        ``best(coef (m, P, n), L (m, P)) -> (value, element, s)`` each (m,): the exact maximum of
        the element polynomials (the station screen's evaluator).
    """
    u = np.asarray(weights, float)
    n, J = u.size, len(peaks)
    none = np.zeros(0, int)
    if n == 0 or J == 0:
        return Pieces(u, J, none, none, none, [np.zeros(0)] * 4, none)
    start = np.unique(np.linspace(0, n - 1, min(n, _KNOTS)).round().astype(int))
    stack = _stacked(peaks)
    if start.size == n:  # few weights: every one is a knot, a constant piece each
        h, _, _, t = _exact(stack, np.repeat(np.arange(J), n), np.tile(u, J), best)
        z = np.zeros(h.size)
        idx = np.tile(np.arange(n), J)
        return Pieces(u, J, np.repeat(np.arange(J), n), idx, idx, [h, z, z, z], t)
    # the knot table: function, weight index, value, line (a, b; b the slope), tag
    kj = np.repeat(np.arange(J), start.size)
    ki = np.tile(start, J)
    kh, ka, kb, kt = _exact(stack, kj, u[ki], best)
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
        h, a, b, t = _exact(stack, j, u[mid], best)
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
    return Pieces(u, J, fj, ia, ib, [c0, c1, c2, c3], tg)


def envelope_effects(resp, weights):
    """Peak moments, shears and worst-span deflections of every concrete combination of a
    response without springs (``resp.M.shape[0] == 1``), for the sorted distinct weights per
    length ``weights`` (n,) of the candidates: arrays (C, n) (combination first) ``M_max``,
    ``M_min``, ``V_abs``, ``v_abs`` (times EI: the caller divides by each candidate's EI) and
    ``v_allowed``, as the station screen gives them (:class:`EnvelopeTable` at all the weights).
    """
    return EnvelopeTable(resp, weights).effects()


class EnvelopeTable:
    """The peak envelopes of every concrete combination of a response without springs, built once
    on the sorted distinct weights ``weights`` (n,); :meth:`effects` gives them on any contiguous
    range of those weights (a chunk of candidates in weight order), :meth:`worst` the worst over
    the combinations.

    Examples
    --------
    A 4 m simple span under 2 kN/m of dead load, factor 1.35, the member's weight in the dead case:
    the peak moment is 1.35 (2000 + w) L^2 / 8 (statics).

    >>> from leanspan.beam import respond
    >>> from leanspan.beam.model import BeamModel, Combination, DistributedLoad, Stiffness, Support
    >>> m = BeamModel(4.0, (Support(0.0, "pin"), Support(4.0, "roller")), (Stiffness(0.0, 4.0, 1.0),),
    ...               (DistributedLoad("dead", 2e3, 2e3, 0, 4),),
    ...               combinations=(Combination("ULS", (("dead", 1.35),)),), self_weight="dead")
    >>> resp = respond(m, unit_self_weight=True, self_weight_case="dead")
    >>> w = np.linspace(100.0, 900.0, 3000)
    >>> t = EnvelopeTable(resp, w)
    >>> bool(np.allclose(t.worst()["M_max"], 1.35 * (2e3 + w) * 16 / 8, rtol=1e-12))
    True
    """

    def __init__(self, resp, weights):
        self.C, self.n = len(resp.combos), np.size(weights)
        self.strength, self.deflection = _peaks(resp)
        self.m_pieces = self.v_pieces = None
        if self.strength:
            self.m_pieces = envelope_pieces([p for _, ps in self.strength for p in ps], weights, _cubic_best)
        if self.deflection:
            self.v_pieces = envelope_pieces([p for _, _, p in self.deflection], weights, _polished_best)
        self._strength_columns = np.array([ci for ci, _ in self.strength], int)
        self._deflection_columns = np.array([ci for ci, _, _ in self.deflection], int)
        self._unfilled = np.setdiff1d(np.arange(self.C), np.r_[self._strength_columns, self._deflection_columns])
        self._allowed = np.array([t for _, t, _ in self.deflection]) if self.deflection else np.zeros((0, 1))

    def effects(self, lo: int = 0, hi: int | None = None) -> dict:
        """Arrays (C, hi - lo) of the weights ``[lo, hi)`` (see :func:`envelope_effects`), the
        moments snapped to zero per combination (:func:`~leanspan.beam.results.snap_round_off`)
        as the station screen does."""
        hi = self.n if hi is None else hi
        out = {k: np.empty((self.C, max(hi - lo, 0))) for k in _KEYS}
        for k, v in out.items():  # NaN in the rows the blocks do not fill
            v[self._strength_columns if k.startswith("v_") else self._deflection_columns] = np.nan
            v[self._unfilled] = np.nan
        for a in range(lo, hi, _BLOCK):  # blocks of weights: the temporaries stay in cache
            b = min(hi, a + _BLOCK)
            self._fill({k: v[:, a - lo:b - lo] for k, v in out.items()}, a, b)
        return out

    def _fill(self, out, a, b):
        """Write the effects of weights [a, b) into the (C, b - a) arrays ``out``."""
        from ..beam.results import snap_round_off

        if self.strength:
            h, _ = self.m_pieces._block(a, b, tags=False)  # (J, b - a): M+, M-, |V| of each combination
            ci = self._strength_columns
            out["M_max"][ci], out["M_min"][ci] = snap_round_off(h[0::3], -h[1::3])
            out["V_abs"][ci] = h[2::3]
        if self.deflection:
            h, tag = self.v_pieces._block(a, b)
            allowed = self._allowed[np.arange(tag.shape[0])[:, None], tag]
            ci = self._deflection_columns
            out["v_allowed"][ci] = allowed
            np.multiply(h, allowed, out=h)
            out["v_abs"][ci] = h

    def worst(self, lo: int = 0, hi: int | None = None) -> dict:
        """The effects' worst values over every combination at the weights ``[lo, hi)``: arrays
        (hi - lo,) ``M_max`` (largest), ``M_min`` (smallest), ``V_abs`` (largest), and the
        ``v_abs`` (times EI), ``v_allowed`` of the largest deflection ratio; NaN where no
        combination gives them (moments snapped per combination first, as in :meth:`effects`)."""
        from ..beam.results import snap_round_off

        hi = self.n if hi is None else hi
        out = {k: np.full(max(hi - lo, 0), np.nan) for k in _KEYS}
        for a in range(lo, hi, _BLOCK):  # blocks of weights: the pieces' values stay in cache
            b = min(hi, a + _BLOCK)
            at = slice(a - lo, b - lo)
            if self.strength:
                h, _ = self.m_pieces._block(a, b, tags=False)  # (J, b - a): M+, M-, |V| per combination
                M_max, M_min = snap_round_off(h[0::3], -h[1::3])
                np.fmax.reduce(M_max, axis=0, out=out["M_max"][at])
                np.fmin.reduce(M_min, axis=0, out=out["M_min"][at])
                np.fmax.reduce(h[2::3], axis=0, out=out["V_abs"][at])
            if self.deflection:
                # h is each combination's worst-span |v| / allowed times EI: the same EI for all
                h, tag = self.v_pieces._block(a, b)
                j = np.argmax(np.where(np.isnan(h), -np.inf, h), axis=0)
                cols = np.arange(b - a)
                allowed = self._allowed[j, tag[j, cols]]
                out["v_allowed"][at] = allowed
                out["v_abs"][at] = h[j, cols] * allowed
        return out


_KEYS = ("M_max", "M_min", "V_abs", "v_abs", "v_allowed")


def _peaks(resp):
    """The peak functions of every concrete combination: ``[(combination index, [M+, M-, |V|])]``
    for strength ones and ``[(combination index, allowed deflection per span, worst-span peak)]``
    for deflection ones."""
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
    return strength, deflection
