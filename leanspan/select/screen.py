"""Vectorised screening of many candidate members against one beam job.

The beam is solved once per unit case (``leanspan.beam.respond``). For a prismatic
beam without springs the internal forces do not depend on EI and deflections scale
with 1/EI, so every combination for candidate k is ``A(x) + t_k B(x)`` where A is the
combination of the load cases, B the unit self-weight case and ``t_k`` the
candidate's factored weight per length. Extremes of M (cubic per element) and V come
in closed form from the roots of their derivatives; extremes of v (quintic) from the
best of a grid in every element polished by Newton steps on the exact polynomial.
Both equal the exact extremes to round-off. With springs the
unit cases are solved for all K stiffnesses as one batch and combined the same way.

The result is the beam's action effects per candidate and combination
(:class:`~leanspan.select.checks.Effects`); :func:`evaluate` then applies every
registered check (:mod:`leanspan.select.checks`) to them.

:func:`screen_loop` finds the same effects one candidate at a time through
:func:`leanspan.beam.solve`: the independent reference the tests compare with.
"""

from __future__ import annotations

import dataclasses
import os
from dataclasses import dataclass, field

import numpy as np

from ..beam import G, respond, solve
from ..beam.poly import (
    evaluate as _horner,  # coefficients (..., n) at points s, Horner's rule
)
from ..beam.results import snap_round_off
from .checks import Effects, active_checks
from .job import Limits
from .member import beam_with_member
from .envelope import EnvelopeTable
from .extremes import _cubic_best, _cubic_stations, _polished_best
from .screen_reduce import to_parents

__all__ = ["Candidates", "Screen", "screen", "screen_chunks", "screen_verdicts", "screen_loop", "evaluate",
           "check_names", "CHUNK"]

_BLOCK = 2048  # candidates per block (keeps the grid work in cache)


def check_names(limits=None) -> tuple:
    """Names of the checks the job's ``limits`` ask for, in order (the utilisation keys)."""
    return tuple(c.name for c in active_checks(limits))


@dataclass(frozen=True)
class Candidates:
    """Candidate members (SI units): arrays (K,).

    ``props`` holds the catalogue columns the checks read (``Sz_top``, ``shear_factor``,
    ``strength_bending`` ...); ``limits`` is the job's :class:`~leanspan.select.job.Limits`.
    """

    EI: np.ndarray
    mass_per_length: np.ndarray
    props: dict = field(default_factory=dict)
    limits: object = None

    @classmethod
    def with_allowables(cls, EI, mass_per_length, bending_allow, shear_allow, **props) -> "Candidates":
        """Candidates whose allowable bending and shear stresses are given directly (arrays (K,)).

        >>> c = Candidates.with_allowables([2e6], [30.0], [165e6], [95e6], Sz_top=[1e-4],
        ...                                Sz_bot=[1e-4], shear_factor=[500.0])
        >>> float(c.limits.bending_allowable(c.props["strength_bending"])[0])
        165000000.0
        """
        arrays = {k: np.asarray(v, float) for k, v in props.items()}
        arrays.update(strength_bending=np.asarray(bending_allow, float),
                      strength_shear=np.asarray(shear_allow, float))
        return cls(np.asarray(EI, float), np.asarray(mass_per_length, float), arrays, Limits(stress_factor=1.0))

    @property
    def size(self) -> int:
        return int(np.size(self.EI))

    def take(self, index) -> "Candidates":
        return Candidates(np.asarray(self.EI)[index], np.asarray(self.mass_per_length)[index],
                          {k: np.asarray(v)[index] for k, v in self.props.items()}, self.limits)


@dataclass(frozen=True)
class Screen:
    """Effects, demands and utilisations per candidate.

    ``effects`` are the beam's action effects (K, C); for each registered check (by
    name) ``demand``, ``allowable`` and ``combination`` (the index of the governing
    combination, -1 where none applies) are (K,) arrays at the combination of the
    largest utilisation; ``utilisation`` (K,) NaN where the check does not apply (no
    deflection combination); ``governing`` the name of the largest; ``passes`` all
    utilisations <= 1.
    """

    effects: Effects
    demand: dict
    allowable: dict
    combination: dict
    utilisation: dict
    governing: np.ndarray
    passes: np.ndarray
    checks: tuple = ()  # the Check entries applied, in order
    columns: dict = field(default_factory=dict)  # full (K, C) demand of checks with demand_json
    props: dict = field(default_factory=dict)  # the candidates' columns the checks read (K,)

    def details(self, k: int) -> dict:
        """``{check name: {key: value}}`` of candidate ``k`` from the checks that give details
        (:attr:`Check.details`), in registry order."""
        out = {}
        for check in self.checks:
            if check.details is not None:
                props = {c: np.asarray(v)[[k]] for c, v in self.props.items()}
                out[check.name] = check.details(self.effects.take(k), props)
        return out

    def _over(self, name, reduce):
        a = getattr(self.effects, name)
        return reduce.reduce(a, axis=1) if a.shape[1] else np.full(a.shape[0], np.nan)

    @property
    def M_max(self):
        """Largest sagging moment over the strength combinations (K,)."""
        return self._over("M_max", np.fmax)

    @property
    def M_min(self):
        return self._over("M_min", np.fmin)

    @property
    def V_abs(self):
        return self._over("V_abs", np.fmax)

    @property
    def sigma(self):
        return self.demand.get("bending")

    @property
    def tau(self):
        return self.demand.get("shear")

    @property
    def v_abs(self):
        return self.demand.get("deflection")

    @property
    def deflection_ratio(self):
        return self.utilisation.get("deflection")

    def demands(self, k: int) -> dict:
        """The demands of candidate ``k`` (JSON ``demands``): the effects and each check's own."""
        out = {"M_max": float(self.M_max[k]), "M_min": float(self.M_min[k]), "V_abs": float(self.V_abs[k])}
        for c in self.checks:
            if c.demand_json is not None:
                out.update(c.demand_json(self.columns[c.name][k]))
            elif c.name in self.demand:
                v = float(self.demand[c.name][k])
                out[c.demand_key] = None if np.isnan(v) else v
        return out


def evaluate(effects: Effects, cand: Candidates, first_pass: bool = False, nan_fails=frozenset()) -> Screen:
    """Apply every check active for ``cand.limits`` to ``effects`` (K, C) of candidates ``cand``;
    with ``first_pass``, not those that only report for this beam (:attr:`Check.reports_only`).

    A check that gives NaN for every candidate does not apply to the job (NaN utilisation); NaN
    for some only fails them. ``nan_fails`` names checks to treat as the latter even when all of
    ``cand`` are NaN (a part of a larger set in which some are not: see :func:`screen_chunks`)."""
    K = cand.size
    demand, allow, combo, util, columns = {}, {}, {}, {}, {}
    rows = np.arange(K)
    checks = first_pass_checks(cand.limits, effects.model) if first_pass else active_checks(cand.limits)
    effects = dataclasses.replace(effects, limits=cand.limits)
    for check in checks:  # a small fixed set
        d = np.asarray(check.demand(effects, cand.props), float)
        if check.demand_json is not None:
            columns[check.name] = d
        a = np.broadcast_to(np.asarray(check.allowable(cand.props, cand.limits, effects), float), d.shape)
        with np.errstate(divide="ignore", invalid="ignore"):
            u = d / a
        if u.shape[1] == 0:
            u = d = a = np.full((K, 1), np.nan)
        filled = np.where(np.isnan(u), -np.inf, u)
        j = np.argmax(filled, axis=1)
        none = np.isneginf(filled[rows, j])
        # NaN for every candidate: the check does not apply to this job (no deflection limit);
        # NaN for some only: their data could not be checked, so they fail rather than pass
        none = none & (bool(none.all()) and check.name not in nan_fails)
        util[check.name] = np.where(none, np.nan, np.where(np.isneginf(filled[rows, j]), np.inf, u[rows, j]))
        demand[check.name] = np.where(none, np.nan, d[rows, j])
        allow[check.name] = np.where(none, np.nan, a[rows, j])
        combo[check.name] = np.where(np.isneginf(filled[rows, j]), -1, j)
    names = list(util)
    stack = np.stack([util[c] for c in names], axis=1)
    filled = np.where(np.isnan(stack), -np.inf, stack)
    governing = np.asarray(names, dtype=object)[np.argmax(filled, axis=1)]
    passes = np.all(np.isnan(stack) | (stack <= 1.0), axis=1)
    return Screen(effects, demand, allow, combo, util, governing, passes, checks, columns, cand.props)


def _field_extremes(field, F, sw, t, scale, lengths, x0, elems):
    """Max and min over elements ``elems`` of one combination, per candidate.

    field (1 or K, U, E, n); the combined field of candidate k is
    (sum_u F_u field_u + t_k field_sw) * scale_k (scale: None or (K,)).
    Returns {+1: (value, x), -1: (value, x)}.
    """
    Fn = F.copy()
    if sw is not None:
        Fn[sw] = 0.0
    sub = field[:, :, elems]
    L, xs = lengths[elems], x0[elems]
    K = t.size
    fixed = sub.shape[0] == 1
    if fixed:  # forces independent of the candidate: A + t B
        A = np.tensordot(Fn, sub[0], axes=(0, 0))  # (E, n)
        B = sub[0, sw] if sw is not None else np.zeros_like(A)
    parts = {1: [], -1: []}
    for start in range(0, K, _BLOCK):
        rows = slice(start, min(K, start + _BLOCK))
        tk = t[rows]
        if fixed:
            coef = A[None] + tk[:, None, None] * B[None]
        else:
            Fk = np.broadcast_to(Fn, (tk.size, Fn.size)).copy()
            if sw is not None:
                Fk[:, sw] = tk
            coef = np.einsum("ku,kuen->ken", Fk, sub[rows])
        if scale is not None:
            coef = coef * scale[rows, None, None]
        best = _cubic_best if coef.shape[-1] <= 4 else _polished_best
        ext = best(coef, L, signs=(1, -1))
        for sign in (1, -1):
            value, e, s = ext[sign]
            parts[sign].append((value, xs[e] + s))
    return {sg: tuple(np.concatenate([p[i] for p in parts[sg]]) for i in range(2)) for sg in (1, -1)}


def worst_span(field, F, sw, t, scale, spans, lengths, x0, limit):
    """The span (or overhang) of largest |v| / allowed under one combination's factors ``F``, per
    candidate: ``(|v|, allowed, ratio)`` arrays (K,), NaN where no span has elements (see
    :func:`_field_extremes` for ``field``, ``sw``, ``t``, ``scale``)."""
    mids = x0 + lengths / 2
    mag_out, allowed_out, ratio = (np.full(t.size, np.nan) for _ in range(3))
    for a, b, _kind in spans:  # a small set
        elems = np.nonzero((mids > a) & (mids < b))[0]
        if elems.size == 0:
            continue
        d = _field_extremes(field, F, sw, t, scale, lengths, x0, elems)
        mag = np.maximum(np.abs(d[1][0]), np.abs(d[-1][0]))
        allowed = float(limit.allowed(b - a))
        r = mag / allowed
        upd = ~(r <= ratio)  # NaN-aware maximum
        ratio = np.where(upd, r, ratio)
        mag_out = np.where(upd, mag, mag_out)
        allowed_out = np.where(upd, allowed, allowed_out)
    return mag_out, allowed_out, ratio


def screen(model, cand: Candidates, self_weight_case=None, first_pass: bool = False,
           nan_fails=frozenset()) -> Screen:
    """Check every candidate against every combination of ``model`` (a BeamModel).

    Parameters
    ----------
    model : BeamModel
        The job's beam (its own EI is ignored).
    cand : Candidates
    self_weight_case : str, optional
        The case carrying each candidate's weight (default: the model's ``self_weight``).
    first_pass : bool
        Pass and fail only: skip the checks that only report for this beam (see :func:`evaluate`).
    nan_fails : set of str
        See :func:`evaluate`.
    """
    return evaluate(screen_effects(model, cand, self_weight_case), cand, first_pass, nan_fails)


_SHARE = 0.7  # share the evaluation of equal weights when they cut the candidates to this fraction


_ENVELOPE_MIN = 1500  # distinct weights from which the envelope screen is used (below, stations are cheaper)


def screen_effects(model, cand: Candidates, self_weight_case=None, method: str = "auto") -> Effects:
    """The action effects (K, C) of every candidate under every combination, vectorised.

    ``method``: ``"stations"`` evaluates every element for every candidate (the reference);
    ``"envelope"`` builds each combination's peak demands as functions of the candidate's weight
    (:mod:`leanspan.select.envelope`; beams without springs only, else stations); ``"auto"``
    uses the envelope from ``_ENVELOPE_MIN`` distinct weights.
    """
    s = _Setup(model, cand, self_weight_case, method)
    if s.table is not None:  # through the peak envelopes, on the candidates' distinct weights
        return s.effects(np.arange(cand.size))
    resp, weights, sw = s.resp, s.weights, s.resp.self_weight_index
    lengths, x0 = resp.lengths, resp.x_nodes[:-1]
    all_elems = np.arange(lengths.size)
    C = len(resp.combos)
    out = {k: np.full((weights.size, C), np.nan) for k in ("M_max", "M_min", "V_abs", "v_abs", "v_allowed")}
    for ci, combo in enumerate(resp.combos):  # a small set
        F = np.asarray(combo.factors, float)
        t = weights * (F[sw] if sw is not None else 0.0)
        if combo.check == "strength":
            m = _field_extremes(resp.M, F, sw, t, None, lengths, x0, all_elems)
            v = _field_extremes(resp.V, F, sw, t, None, lengths, x0, all_elems)
            out["M_max"][:, ci], out["M_min"][:, ci] = snap_round_off(m[1][0], m[-1][0])
            out["V_abs"][:, ci] = np.maximum(np.abs(v[1][0]), np.abs(v[-1][0]))
        elif combo.limit is not None:  # the worst span does not depend on the (common) 1/EI factor
            out["v_abs"][:, ci], out["v_allowed"][:, ci], _ = worst_span(
                s.v_field, F, sw, t, None if s.shared else s.v_scale, resp.spans, lengths, x0, combo.limit)
    if s.shared:
        out = {k: a[s.back] for k, a in out.items()}
        out["v_abs"] *= s.v_scale[:, None]
    return s.finish(out, slice(None))


def _distinct(values):
    """``np.unique(values, return_inverse=True)`` and an order that sorts ``values``.

    >>> [a.tolist() for a in _distinct(np.array([3.0, 1.0, 2.0]))]
    [[1.0, 2.0, 3.0], [2, 0, 1], [1, 2, 0]]
    """
    order = np.argsort(values)
    v = values[order]
    new = np.r_[True, v[1:] != v[:-1]] if v.size else np.zeros(0, bool)
    back = np.empty(v.size, np.int64)
    back[order] = np.cumsum(new) - 1
    return v[new], back, order


def _sprung(model) -> bool:
    """Whether the beam has a spring support (its forces then depend on each candidate's EI)."""
    return any(s.type == "spring" for s in model.supports)


def first_pass_checks(limits, model) -> tuple:
    """The checks a pass/fail first pass applies: the active ones that can fail a candidate on this
    beam (not those that only report, :attr:`~leanspan.select.checks.Check.reports_only`)."""
    return tuple(c for c in active_checks(limits) if c.reports_only is None or not c.reports_only(model))


class _Setup:
    """What every chunk of a screen shares: the beam's unit-case response (one stiffness without
    springs, else one per candidate), the candidates' distinct weights and, for the envelope
    screen, the peak envelopes built on them once (:class:`~leanspan.select.envelope.EnvelopeTable`)."""

    def __init__(self, model, cand, self_weight_case=None, method="auto"):
        sw_case = self_weight_case if self_weight_case is not None else model.self_weight
        EI = np.asarray(cand.EI, float)
        sprung = _sprung(model)
        # without springs one stiffness gives every candidate's response (v scales with 1/EI; the
        # deflections of all K would be K copies): respond still checks all of them
        valid = EI.ndim == 1 and EI.size > 0 and bool(np.all(np.isfinite(EI)) and np.all(EI > 0))
        self.resp = resp = respond(model, EI=EI if sprung or not valid else EI[:1],
                                   unit_self_weight=sw_case is not None, self_weight_case=sw_case)
        self.model, self.cand = model, cand
        K = cand.size
        self.mass_g = np.asarray(cand.mass_per_length, float) * G
        self.fixed = fixed = resp.M.shape[0] == 1
        if fixed:  # deflection = (v EI of the unit solve) / EI_k
            self.v_field = resp.v[:1] * resp.EI[:1, None, :, None]
            self.v_scale = 1.0 / EI
        else:
            self.v_field, self.v_scale = resp.v, None
        # Without springs the forces depend on a candidate's weight alone and v scales with 1/EI, so
        # candidates of equal weight (one section in several steel grades ...) share one evaluation
        weights, self.back, self.order = _distinct(self.mass_g) if fixed else (self.mass_g, None, None)
        envelope = fixed and (method == "envelope" or (method == "auto" and weights.size >= _ENVELOPE_MIN))
        self.shared = fixed and (envelope or weights.size <= _SHARE * K)
        self.weights = weights if self.shared else self.mass_g
        self.table = EnvelopeTable(resp, weights) if envelope else None
        names = [c.name for c in model.combinations]
        self.parents = np.array([names.index(c.parent or c.name) for c in resp.combos], int)

    def effects(self, rows) -> Effects:
        """The envelope screen's effects of candidates ``rows`` (fastest in weight order: their
        distinct weights are then one contiguous range of the table's)."""
        idx = self.back[rows]
        lo, hi = (int(idx.min()), int(idx.max()) + 1) if idx.size else (0, 0)
        out = self.table.effects(lo, hi)  # (C, n'), moments snapped
        local = idx - lo
        if local.size != hi - lo or not np.array_equal(local, np.arange(local.size)):
            out = {k: np.take(a, local, axis=1) for k, a in out.items()}  # (C, K')
        out = {k: a.T for k, a in out.items()}  # (K', C) views
        out["v_abs"] *= self.v_scale[rows, None]
        return self.finish(out, rows)

    def finish(self, out, rows) -> Effects:
        """The Effects of candidates ``rows`` from their concrete combinations' arrays ``out``."""
        cand = self.cand
        sampler = FieldSampler(self.resp, self.parents, self.mass_g[rows],
                               None if not self.fixed else self.v_scale[rows])
        return Effects(**_by_parent(out, self.parents, len(self.model.combinations)),
                       combinations=tuple(self.model.combinations), sampler=sampler,
                       EI=np.asarray(cand.EI, float)[rows],
                       mass_per_length=np.asarray(cand.mass_per_length, float)[rows],
                       model=self.model, limits=cand.limits)


#: Candidates screened at a time by :func:`screen_chunks` (bounds the (K, C) arrays held at once).
CHUNK = 2**14


def screen_chunks(model, cand: Candidates, self_weight_case=None, first_pass: bool = False,
                  chunk: int = CHUNK, nan_fails=frozenset(), workers: int | None = None, setup=None):
    """:func:`screen` in chunks of ``chunk`` candidates: yields ``(rows, Screen)`` (rows: indices
    into ``cand``), holding a few chunks' (K, C) arrays at a time.

    Without springs the beam is solved and the peak envelopes built once (on however many distinct
    weights; ``setup``: a ``_Setup`` with them already), and the chunks follow the candidates'
    weights (each chunk's weights are one range of the envelopes). With springs each chunk is its
    own screen. ``nan_fails`` as for :func:`evaluate`. ``workers`` threads screen chunks at the
    same time (default: up to two, as the machine allows; numpy's array loops run outside
    Python's lock).
    """
    K = cand.size
    s = setup if setup is not None or _sprung(model) else _Setup(model, cand, self_weight_case, "envelope")
    if s is None or s.table is None:
        parts = [np.arange(a, min(K, a + chunk)) for a in range(0, K, chunk)]

        def one(rows):
            return rows, screen(model, cand.take(rows), self_weight_case, first_pass, nan_fails)
    else:
        parts = [s.order[a:a + chunk] for a in range(0, K, chunk)]  # each chunk a range of weights

        def one(rows):
            return rows, evaluate(s.effects(rows), cand.take(rows), first_pass, nan_fails)
    yield from _threaded(one, parts, workers)


def _threaded(fn, items, workers=None):
    """``map(fn, items)`` on ``workers`` threads (default: up to two, as the machine allows; numpy's
    array loops run outside Python's lock), results in order."""
    workers = min(2, os.cpu_count() or 1) if workers is None else workers
    if workers <= 1 or len(items) <= 1:
        yield from map(fn, items)
        return
    from concurrent.futures import ThreadPoolExecutor

    with ThreadPoolExecutor(workers) as pool:
        yield from pool.map(fn, items)


def screen_verdicts(model, cand: Candidates, self_weight_case=None, chunk: int = CHUNK):
    """Pass and fail of every candidate and its largest utilisation (K,), the first pass of a long
    list (the checks that only report for this beam left out, as ``screen(..., first_pass=True)``),
    and the checks that gave any candidate a value (for the rows kept: ``nan_fails`` of
    :func:`evaluate`).

    Without springs, when every check needs only the effects' worst values over the combinations
    (:attr:`~leanspan.select.checks.Check.peaks_suffice`), those are found per distinct weight
    from the peak envelopes (:meth:`~leanspan.select.envelope.EnvelopeTable.worst`) and the checks
    run once on them: no (K, C) array is formed. The utilisations equal the full screen's (a
    deflection ratio may differ in its last bit where two combinations tie). Otherwise
    :func:`screen_chunks`. Either way parts of the work run on two threads where the machine has
    two cores.
    """
    checks = first_pass_checks(cand.limits, model)
    # without springs the envelopes are built once, on however many distinct weights
    s = None if _sprung(model) else _Setup(model, cand, self_weight_case, "envelope")
    if s is not None and all(c.peaks_suffice is not None and c.peaks_suffice(cand.limits) for c in checks):
        n = s.table.n
        halves = [(0, n // 2), (n // 2, n)]  # two ranges of weights, one per thread
        worst_parts = list(_threaded(lambda r: s.table.worst(*r), halves))
        peak = {k: np.concatenate([w[k] for w in worst_parts])[s.back][:, None] for k in worst_parts[0]}
        peak["v_abs"] *= s.v_scale[:, None]
        eff = Effects(**peak, combinations=(), EI=np.asarray(cand.EI, float),
                      mass_per_length=np.asarray(cand.mass_per_length, float), model=model, limits=cand.limits)
        parts = [np.arange(a, min(cand.size, a + 8 * chunk)) for a in range(0, cand.size, 8 * chunk)]
        results = _threaded(lambda rows: (rows, evaluate(eff.take(rows), cand.take(rows), first_pass=True)),
                            parts)
    else:
        results = screen_chunks(model, cand, self_weight_case, first_pass=True, chunk=chunk, setup=s)
    passes, worst = np.zeros(cand.size, bool), np.full(cand.size, np.nan)
    all_nan, some = {}, set()  # per check: the chunks in which every row is NaN; checks with a value
    for rows, res in results:
        passes[rows], worst[rows] = _verdicts(res)
        for name, u in res.utilisation.items():  # a small set
            if np.isnan(u).all():
                all_nan.setdefault(name, []).append(rows)
            else:
                some.add(name)
    # a check NaN for a whole chunk but not for the whole list: those rows could not be checked
    for name in (n for n in all_nan if n in some):
        for rows in all_nan[name]:
            passes[rows], worst[rows] = False, np.inf
    return passes, worst, frozenset(some)


def _verdicts(res):
    """Pass/fail and the largest utilisation (K,) of a :class:`Screen`."""
    return np.array(res.passes), np.fmax.reduce(np.stack(list(res.utilisation.values()), axis=1), axis=1)


def _by_parent(out, parents, C):
    """Effects of the concrete combinations (pattern members) reduced to their model combination:
    the largest moments and shears, and each member's worst span where its ratio is the largest."""
    if parents.size == C and np.array_equal(parents, np.arange(C)):  # no pattern members
        return out
    K = next(iter(out.values())).shape[0]
    red = {k: np.full((K, C), np.nan) for k in out}
    for c in range(C):  # a small set
        cols = np.flatnonzero(parents == c)
        if cols.size == 1:
            for k in out:
                red[k][:, c] = out[k][:, cols[0]]
            continue
        with np.errstate(invalid="ignore"):
            ratio = out["v_abs"][:, cols] / out["v_allowed"][:, cols]
        j = np.argmax(np.where(np.isnan(ratio), -np.inf, ratio), axis=1)
        rows = np.arange(K)
        red["v_abs"][:, c] = out["v_abs"][:, cols][rows, j]
        red["v_allowed"][:, c] = out["v_allowed"][:, cols][rows, j]
    for key, reduce in (("M_max", np.fmax), ("M_min", np.fmin), ("V_abs", np.fmax)):
        red[key] = to_parents(out[key], parents, C, reduce)
    return red


class FieldSampler:
    """The combined fields of every candidate under every concrete combination, at any x.

    ``at(name, x)`` gives an array (K, C_concrete, P) of ``"M"``, ``"V"`` or ``"v"`` at the
    points ``x`` (P,); ``parents[c]`` is the model combination of concrete combination c
    (pattern members share their parent). Checks that need more than the extremes
    (buckling segments, point deflections) read the fields here, still vectorised.
    """

    def __init__(self, resp, parents, mass_g, v_scale=None, rows=None):
        self.resp, self.parents, self.mass_g, self.v_scale = resp, parents, mass_g, v_scale
        self.rows = rows  # candidates of a batched (spring) response this sampler covers
        self.combos = None  # the concrete combinations covered (None: all), see only()
        self.F = np.array([np.asarray(c.factors, float) for c in resp.combos]).reshape(len(resp.combos), -1)

    def take(self, index) -> "FieldSampler":
        """The sampler of candidates ``index`` only (for one candidate's details)."""
        index = np.atleast_1d(index)
        rows = index if self.rows is None else np.asarray(self.rows)[index]
        out = FieldSampler(self.resp, self.parents, self.mass_g[index],
                           None if self.v_scale is None else self.v_scale[index], rows)
        out.combos = self.combos
        return out

    @property
    def strength(self) -> np.ndarray:
        """Indices of the strength combinations among the concrete ones."""
        return np.flatnonzero([c.check == "strength" for c in self.resp.combos])

    def only(self, combos) -> "FieldSampler":
        """The sampler of the concrete combinations ``combos`` (indices) only: ``at`` and ``peak``
        then return (K, len(combos), ...) (a check that reads strength combinations alone skips
        the others' arithmetic)."""
        out = FieldSampler(self.resp, self.parents, self.mass_g, self.v_scale, self.rows)
        out.combos = np.asarray(combos, int)
        return out

    def _weights(self):
        """The factors (C_concrete, U) with the self-weight unit case zeroed, and each candidate's
        factored weight per length on it, t (K, C_concrete); only the combinations ``self.combos``
        when the sampler is restricted to them (:meth:`only`)."""
        sw = self.resp.self_weight_index
        F = self.F[self.combos] if self.combos is not None else self.F.copy()
        t = self.mass_g[:, None] * (F[:, sw][None, :] if sw is not None else 0.0)
        if sw is not None:
            F[:, sw] = 0.0
        return F, t

    def _combine(self, field):
        """sum_u F_cu field_u + t_kc field_self-weight of a field (1 or K, U, ...) -> (K', C_concrete, ...)."""
        if field.shape[0] > 1 and self.rows is not None:
            field = field[self.rows]
        sw = self.resp.self_weight_index
        F, t = self._weights()
        if field.shape[0] == 1:
            out = np.einsum("cu,u...->c...", F, field[0])[None]
            if sw is not None:
                out = out + t[(...,) + (None,) * (field.ndim - 2)] * field[0, sw][None, None]
        else:
            Fk = np.broadcast_to(F, (field.shape[0],) + F.shape).copy()
            if sw is not None:
                Fk[:, :, sw] = t
            out = np.einsum("kcu,ku...->kc...", Fk, field)
        return out

    def reactions(self) -> np.ndarray:
        """The upward support forces (K, C_concrete, n_supports), in the order of ``resp.supports``."""
        out = self._combine(self.resp.reactions[..., 0])
        return np.broadcast_to(out, (self.mass_g.size,) + out.shape[1:])

    def worst_reactions(self, combos):
        """The largest upward force of the concrete combinations ``combos`` (indices) at every support
        and the position in ``combos`` of the combination giving it, each (K, S); where no force is
        upward, the first combination's (as an argmax of max(R, 0) would give); where two give the
        same force exactly, either may be named. None with springs.

        Each reaction is a line in the candidate's weight, ``R = a + t b`` (t: the factored weight per
        length), so the largest is the upper envelope of ``len(combos)`` lines per support: each
        candidate looks up its line among the envelope's breakpoints, O(K log C) not O(K C).
        """
        r = self.resp.reactions[..., 0]
        if r.shape[0] != 1 or self.rows is not None:
            return None
        sub = self.only(combos)
        F, _ = sub._weights()  # (Cc, U): self-weight factor zeroed
        sw = self.resp.self_weight_index
        a = np.einsum("cu,u...->c...", F, r[0])  # (Cc, S): the other loads' (as _combine sums them)
        f_sw = self.F[np.asarray(combos, int), sw] if sw is not None else np.zeros(len(combos))
        b = r[0, sw] if sw is not None else np.zeros(a.shape[1])  # per unit factored weight (S,)
        K, S = self.mass_g.size, a.shape[1]
        R, j = np.empty((K, S)), np.empty((K, S), int)
        for s in range(S):  # a small set
            lines, breaks = _upper_lines(a[:, s], f_sw * b[s])
            pick = lines[np.searchsorted(breaks, self.mass_g, side="right")]
            R[:, s] = a[pick, s] + self.mass_g * f_sw[pick] * b[s]
            first = a[0, s] + self.mass_g * f_sw[0] * b[s]
            up = R[:, s] > 0
            R[:, s], j[:, s] = np.where(up, R[:, s], first), np.where(up, pick, 0)
        return R, j

    def _combined(self, name, elems):
        """Coefficients (K, C_concrete, len(elems), n) of the combined field on elements ``elems``:
        sum_u F_cu field_u + t_kc field_self-weight (t = the candidate's factored weight), for
        ``"M"``, ``"V"`` or ``"v"`` (deflections of the unit-EI solve scaled by 1/EI_k)."""
        field, scale = self._field(name)
        return self._scaled(self._combine(field[:, :, elems, :]), scale)

    def _field(self, name):
        """The unit-case coefficients (1 or K, U, E, n) of ``name`` and whether they still need
        each candidate's 1/EI (deflections of the unit-EI solve)."""
        r = self.resp
        scale = name == "v" and self.v_scale is not None
        if scale:
            return r.v[:1] * r.EI[:1, None, :, None], True
        return {"M": r.M, "V": r.V, "v": r.v}[name], False

    def _scaled(self, out, scale):
        """Combined values (K', C, ...) times 1/EI_k where needed, broadcast to all K."""
        if scale:
            out = out * self.v_scale.reshape((-1,) + (1,) * (out.ndim - 1))
        return np.broadcast_to(out, (self.mass_g.size,) + out.shape[1:])

    def peak(self, name: str, a: float, b: float) -> np.ndarray:
        """The signed value of largest magnitude of ``"M"`` or ``"V"`` on [a, b], exact: the cubic
        (or quadratic) of every element at the interval ends and at the roots of its derivative.
        Returns (K, C_concrete)."""
        r = self.resp
        x0, x1 = r.x_nodes[:-1], r.x_nodes[1:]
        elems = np.flatnonzero((x0 < b) & (x1 > a))
        coef = self._combined(name, elems)  # (K, C, E', n)
        lo = np.maximum(a, x0[elems]) - x0[elems]
        hi = np.minimum(b, x1[elems]) - x0[elems]
        s = _cubic_stations(coef, lo, hi)  # (K, C, E', 4)
        vals = _horner(coef[..., None, :], s).reshape(coef.shape[0], coef.shape[1], -1)
        j = np.argmax(np.abs(vals), axis=2)[..., None]
        return np.take_along_axis(vals, j, axis=2)[..., 0]

    def at(self, name: str, x) -> np.ndarray:
        r = self.resp
        x = np.atleast_1d(np.asarray(x, float))
        e = np.clip(np.searchsorted(r.x_nodes, x, side="right") - 1, 0, r.lengths.size - 1)
        field, scale = self._field(name)
        # the unit cases at the points first (1 or K, U, P), then combined: O(K C P), not O(K C P n)
        return self._scaled(self._combine(_horner(field[:, :, e, :], x - r.x_nodes[e])), scale)  # (K, C, P)


def _upper_lines(a, b):
    """The upper envelope of the lines ``a[i] + m b[i]`` over m >= 0: line indices (P,) and the
    P - 1 values of m where each next one takes over (sorted). Where lines tie exactly (equal at
    m = 0, or at a breakpoint) the steeper one is listed, the larger just after; of identical
    lines the lowest index.

    >>> lines, breaks = _upper_lines(np.array([5.0, 8.0, 0.0]), np.array([1.0, -1.0, 4.0]))
    >>> lines.tolist(), breaks.tolist()
    ([1, 0, 2], [1.5, 1.6666666666666667])
    """
    # at m = 0 the largest a leads (the steepest among equals, then the lowest index)
    order = np.lexsort((np.arange(a.size), -b, -a))
    lines, breaks, m = [int(order[0])], [], 0.0
    while True:  # at most len(a) steps: each takes over from the current line at a larger m
        i = lines[-1]
        steeper = np.flatnonzero(b > b[i])
        if steeper.size == 0:
            break
        cross = (a[i] - a[steeper]) / (b[steeper] - b[i])  # where each steeper line reaches line i
        cross = np.maximum(cross, m)
        first = cross.min()
        cand = steeper[cross == first]
        nxt = int(cand[np.lexsort((cand, -b[cand]))[0]])  # the steepest of those crossing first
        lines.append(nxt)
        breaks.append(float(first))
        m = first
    return np.array(lines, int), np.array(breaks, float)


def screen_loop(model, cand: Candidates, self_weight_case=None) -> Screen:
    """The same checks, one candidate at a time through :func:`leanspan.beam.solve`.

    Slow on purpose: the reference the vectorised :func:`screen` is tested against.
    """
    sw_case = self_weight_case if self_weight_case is not None else model.self_weight
    K, C = cand.size, len(model.combinations)
    out = {k: np.full((K, C), np.nan) for k in ("M_max", "M_min", "V_abs", "v_abs", "v_allowed")}
    samplers = []
    names = [c.name for c in model.combinations]
    for k in range(K):
        m = beam_with_member(model, EI=cand.EI[k], mass_per_length=cand.mass_per_length[k],
                             self_weight=sw_case)
        sol = solve(m)
        r = sol.response
        samplers.append(FieldSampler(r, np.array([names.index(c.parent or c.name) for c in r.combos], int),
                                     np.asarray(cand.mass_per_length[k:k + 1], float) * G))
        for ci, c in enumerate(m.combinations):
            r = sol.results[c.name]
            if c.check == "strength":
                out["M_max"][k, ci] = r.extremes["M_max"].value
                out["M_min"][k, ci] = r.extremes["M_min"].value
                out["V_abs"][k, ci] = max(abs(r.extremes["V_max"].value), abs(r.extremes["V_min"].value))
            elif r.deflection_checks:
                row = max(r.deflection_checks, key=lambda row: row["utilisation"])
                out["v_abs"][k, ci], out["v_allowed"][k, ci] = abs(row["v_extreme"]), row["allowed"]
    return evaluate(Effects(**out, combinations=tuple(model.combinations), sampler=_StackedSampler(samplers),
                            EI=np.asarray(cand.EI, float), mass_per_length=np.asarray(cand.mass_per_length, float),
                            model=model, limits=cand.limits), cand)


class _StackedSampler:
    """One :class:`FieldSampler` per candidate (the reference path), read as one."""

    def __init__(self, samplers):
        self.samplers = samplers
        self.parents = samplers[0].parents if samplers else np.zeros(0, int)
        self.resp = samplers[0].resp if samplers else None  # the combinations are the same for all

    @property
    def strength(self) -> np.ndarray:
        return self.samplers[0].strength if self.samplers else np.zeros(0, int)

    def only(self, combos) -> "_StackedSampler":
        return _StackedSampler([s.only(combos) for s in self.samplers])

    def at(self, name, x):
        return np.concatenate([s.at(name, x) for s in self.samplers], axis=0)

    def peak(self, name, a, b):
        return np.concatenate([s.peak(name, a, b) for s in self.samplers], axis=0)

    def reactions(self):
        return np.concatenate([s.reactions() for s in self.samplers], axis=0)

    def worst_reactions(self, combos):
        return None  # the reference takes every combination's reactions
