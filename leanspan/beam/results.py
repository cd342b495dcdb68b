"""Readable results: per load case, per combination and the envelope.

:func:`solve` runs :func:`~leanspan.beam.solver.respond` once and builds, for every
result, the reactions, extremes with their positions, station values and (for
deflection combinations) the per-span deflection checks. A result with several
*members* (a pattern combination, the envelope) reports the envelope of its members.

Stations include every element boundary (both sides where V, M or theta jump), a
regular subdivision, and the exact extreme locations: every root of V (extremes of M)
and of theta (extremes of v) for a single result; for an envelope, each element's
positions of the envelope maxima and minima.

Examples
--------
>>> from leanspan.beam.model import BeamModel, Support, Stiffness, DistributedLoad
>>> m = BeamModel(6.0, (Support(0.0, "pin"), Support(6.0, "roller")), (Stiffness(0.0, 6.0, 1e7),),
...               loads=(DistributedLoad("dead", 1e3, 1e3, 0.0, 6.0),))
>>> sol = solve(m)
>>> r = sol.results["dead"]
>>> round(r.extremes["M_max"].value / (1e3 * 36 / 8), 12), r.extremes["M_max"].at   # wL^2/8 at midspan
(1.0, 3.0)
>>> [round(x["force"], 6) for x in r.reactions]
[3000.0, 3000.0]
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from ..errors import BeamError
from . import poly
from .model import G, BeamModel
from .solver import Response, respond

__all__ = ["Extreme", "ResultSet", "BeamSolution", "solve"]

_FIELDS = ("V", "M", "theta", "v")


@dataclass(frozen=True)
class Extreme:
    """A signed extreme value, its position x (m) and the member that gives it."""

    value: float
    at: float
    member: str | None = None

    def to_json(self):
        out = {"value": self.value, "at": self.at}
        if self.member is not None:
            out["from"] = self.member
        return out


@dataclass
class ResultSet:
    """Results of one load case, combination or envelope (SI units).

    ``reactions``: list of dicts ``{"at", "type", "force", "moment"}`` (and ``*_max``,
    ``*_min`` for envelopes, where ``force``/``moment`` are the larger-magnitude bound);
    ``extremes``: ``M_max, M_min, V_max, V_min, theta_max, theta_min, v_max, v_min``;
    ``stations``: arrays ``x, V, M, theta, v`` (and ``*_max``, ``*_min`` for envelopes);
    ``deflection_checks``: per span ``{"span", "kind", "from", "to", "limit", "allowed",
    "v_extreme", "at", "utilisation", "from_member"}``.
    """

    name: str
    kind: str
    check: str | None
    members: list
    reactions: list
    extremes: dict
    stations: dict
    deflection_checks: list = field(default_factory=list)

    def to_json(self) -> dict:
        out = {"kind": self.kind}
        if self.check:
            out["check"] = self.check
        if len(self.members) > 1:
            out["members"] = list(self.members)
        out["reactions"] = self.reactions
        for key, ext in self.extremes.items():
            out[key] = ext.to_json()
        out["stations"] = {k: np.asarray(v).tolist() for k, v in self.stations.items()}
        if self.deflection_checks:
            out["deflection_checks"] = self.deflection_checks
        return out


@dataclass
class BeamSolution:
    """Everything :func:`solve` found: the model, the raw :class:`Response`, named results."""

    model: BeamModel
    response: Response
    results: dict

    def to_json(self) -> dict:
        """The stable JSON contract: ``{"units": "SI", "results": {NAME: {...}}}``."""
        return {"units": "SI", "results": {k: r.to_json() for k, r in self.results.items()}}


def _bigger(a, b):
    return np.where(np.abs(b) > np.abs(a), b, a)


def _member_fields(resp: Response, Fm):
    """Coefficient arrays (C, E, n) of each field and reactions (C, nsup, 2) for factor rows Fm."""
    out = {}
    for key in _FIELDS:
        out[key] = np.einsum("cu,uek->cek", Fm, getattr(resp, key)[0])
    out["R"] = np.einsum("cu,usj->csj", Fm, resp.reactions[0])
    return out


def _regular_grid(resp, n_regular):
    """Local positions (E, m) of the regular subdivision, NaN-padded."""
    L = resp.lengths
    nsub = np.maximum(1, np.ceil(n_regular * L / float(L.sum()))).astype(int)
    j = np.arange(int(nsub.max()) + 1)[None, :]
    return np.where(j <= nsub[:, None], j / nsub[:, None] * L[:, None], np.nan)


def _sorted_unique(s, total):
    """``s`` (..., m) sorted along the last axis with near-duplicates (1e-12 of ``total``) set to
    NaN, which sorts last."""
    s = np.sort(s, axis=-1)
    dup = np.zeros_like(s, bool)
    dup[..., 1:] = np.abs(np.diff(s, axis=-1)) <= 1e-12 * total
    s[dup] = np.nan
    return np.sort(s, axis=-1)


def _station_values(resp, flds, s):
    """Field values (R, E, m) at local stations ``s`` (R, E, m) and the mask of stations kept:
    valid ones, less the end of element e where V, M and theta run on continuously into e+1."""
    z = np.nan_to_num(s)
    vals = {k: poly.evaluate(flds[k][:, :, None, :], z) for k in _FIELDS}
    valid = ~np.isnan(s)
    R, E = s.shape[:2]
    if E > 1:
        last = valid.sum(axis=2) - 1  # (R, E)
        same = np.ones((R, E - 1), bool)
        for k in ("V", "M", "theta"):
            a = np.take_along_axis(vals[k][:, :-1], last[:, :-1, None], axis=2)[..., 0]
            b = vals[k][:, 1:, 0]
            scale = np.maximum(np.abs(vals[k]).max(axis=(1, 2)), 1e-300)[:, None]
            same &= np.abs(a - b) <= 1e-9 * scale
        r, e = np.nonzero(same)
        valid[r, e, last[r, e]] = False
    return vals, valid


def _single_stations(resp, flds, n_regular, pre):
    """Stations of R single results at once (list of R dicts ``x, V, M, theta, v``): the regular
    grid plus each row's roots of V and theta."""
    R = flds["M"].shape[0]
    grid = _regular_grid(resp, n_regular)
    reg = np.broadcast_to(grid, (R,) + grid.shape)
    s = _sorted_unique(np.concatenate([reg, pre["roots_V"], pre["roots_theta"]], axis=2),
                       float(resp.lengths.sum()))
    vals, valid = _station_values(resp, flds, s)
    x_all = resp.x_nodes[:-1, None] + np.nan_to_num(s)
    out = []
    for r in range(R):  # the small set of results
        keep = valid[r]
        row = {"x": x_all[r][keep]}
        row.update({k: vals[k][r][keep] for k in _FIELDS})
        out.append(row)
    return out


def _envelope_stations(resp, flds, n_regular, pre, groups):
    """Stations of the results with several members (list of dicts): the regular grid plus, in
    each element, where the envelope's largest and smallest M and v lie; ``K_max``, ``K_min``
    per field. ``groups[g]`` are the rows of result g in ``flds`` and ``pre``; all are evaluated
    in one pass."""
    total = float(resp.lengths.sum())
    grid = _regular_grid(resp, n_regular)
    grids = []
    for rows in groups:  # the small set of envelopes
        extra = []
        for key in ("M", "v"):
            vmax, smax, vmin, smin = pre[key][:, rows]
            ia = np.argmax(vmax, axis=0)[None]
            ib = np.argmin(vmin, axis=0)[None]
            extra += [np.take_along_axis(smax, ia, 0)[0][:, None], np.take_along_axis(smin, ib, 0)[0][:, None]]
        grids.append(_sorted_unique(np.concatenate([grid] + extra, axis=1), total))
    sizes = [len(rows) for rows in groups]
    which = np.repeat(np.arange(len(groups)), sizes)
    starts = np.concatenate([[0], np.cumsum(sizes)[:-1]]).astype(int)
    every = np.concatenate(groups)
    vals, valid = _station_values(resp, {k: flds[k][every] for k in _FIELDS}, np.stack(grids)[which])
    # an element end stays where any member jumps there
    keep = np.logical_or.reduceat(valid, starts, axis=0)
    hi = {k: np.maximum.reduceat(vals[k], starts, axis=0) for k in _FIELDS}
    lo = {k: np.minimum.reduceat(vals[k], starts, axis=0) for k in _FIELDS}
    x0 = resp.x_nodes[:-1, None]
    out = []
    for g, s in enumerate(grids):
        row = {"x": (x0 + np.nan_to_num(s))[keep[g]]}
        for k in _FIELDS:
            h, low = hi[k][g][keep[g]], lo[k][g][keep[g]]
            row[k] = _bigger(h, low)
            row[f"{k}_max"], row[f"{k}_min"] = h, low
        out.append(row)
    return out


ROUND_OFF = 1e-10  # extremes smaller than this fraction of the field's largest magnitude are zeros


def snap_round_off(hi, lo):
    """``hi``, ``lo`` with values below :data:`ROUND_OFF` of ``max(|hi|, |lo|)`` set to 0.

    The exact fields are evaluated in floating point, so a zero (the moment at a free end)
    comes out as about 1e-16 of the largest value; reported as such it reads as a real extreme.

    >>> [float(v) for v in snap_round_off(7.3e-12, -14419.76)]
    [0.0, -14419.76]
    """
    scale = np.maximum(np.abs(hi), np.abs(lo)) * ROUND_OFF
    return np.where(np.abs(hi) < scale, 0.0, hi)[()], np.where(np.abs(lo) < scale, 0.0, lo)[()]


_EXTREME_KEYS = ("M_max", "M_min", "V_max", "V_min", "theta_max", "theta_min", "v_max", "v_min")


def _group_arg(values, starts, group, reduce):
    """Index of the first row holding each group's ``reduce`` (np.maximum / np.minimum) value."""
    best = reduce.reduceat(values, starts)
    hit = np.flatnonzero(values == best[group])
    return hit[np.unique(group[hit], return_index=True)[1]]


def _extremes(resp, pre, members):
    """``[{key: Extreme}]``, one dict per result: ``members[g]`` names the members of result g,
    whose rows follow one another in ``pre`` (the rows of every result, in order)."""
    x0 = resp.x_nodes[:-1]
    sizes = np.array([len(m) for m in members])
    starts = np.concatenate([[0], np.cumsum(sizes)[:-1]])
    group = np.repeat(np.arange(len(members)), sizes)
    member_of = [name for names in members for name in names]
    out = [{} for _ in members]
    for key in ("M", "V", "theta", "v"):
        vmax, smax, vmin, smin = pre[key]  # (R, E)
        r = np.arange(vmax.shape[0])
        ia, ib = np.argmax(vmax, axis=1), np.argmin(vmin, axis=1)  # each row's element
        hi, lo = vmax[r, ia], vmin[r, ib]
        i, j = _group_arg(hi, starts, group, np.maximum), _group_arg(lo, starts, group, np.minimum)
        h, low = snap_round_off(hi[i], lo[j])
        xa, xb = (x0[ia] + smax[r, ia])[i], (x0[ib] + smin[r, ib])[j]
        for g, (hg, lg, ag, bg, ig, jg) in enumerate(zip(h.tolist(), low.tolist(), xa.tolist(), xb.tolist(),
                                                        i.tolist(), j.tolist())):
            many = sizes[g] > 1
            out[g][f"{key}_max"] = Extreme(hg, ag, member_of[ig] if many else None)
            out[g][f"{key}_min"] = Extreme(lg, bg, member_of[jg] if many else None)
    return [{k: o[k] for k in _EXTREME_KEYS} for o in out]


def _reactions(resp, R, names):
    out = []
    for i, s in enumerate(resp.supports):
        f, m = R[:, i, 0], R[:, i, 1]
        row = {"at": s.at, "type": s.type}
        if len(names) == 1:
            row["force"], row["moment"] = float(f[0]), float(m[0])
        else:
            row["force"] = float(_bigger(f.max(), f.min()))
            row["moment"] = float(_bigger(m.max(), m.min()))
            row.update(force_max=float(f.max()), force_min=float(f.min()),
                       moment_max=float(m.max()), moment_min=float(m.min()))
        out.append(row)
    return out


def _deflection_checks(resp, pre_v, members):
    """Worst per span over the deflection members that carry a limit."""
    rows = [(c, i) for i, c in enumerate(members) if c.check == "deflection" and c.limit is not None]
    if not rows:
        return []
    L = resp.lengths
    x0 = resp.x_nodes[:-1]
    mid = x0 + L / 2
    idx = [i for _, i in rows]
    vmax, smax, vmin, smin = (a[idx] for a in pre_v)
    out = []
    for n, (a, b, kind) in enumerate(resp.spans):
        sel = np.nonzero((mid > a) & (mid < b))[0]
        if sel.size == 0:
            continue
        best = None
        for r, (combo, _) in enumerate(rows):
            ia = sel[np.argmax(vmax[r, sel])]
            ib = sel[np.argmin(vmin[r, sel])]
            hi, lo = vmax[r, ia], vmin[r, ib]
            value, at = (hi, x0[ia] + smax[r, ia]) if abs(hi) > abs(lo) else (lo, x0[ib] + smin[r, ib])
            allowed = float(combo.limit.allowed(b - a))
            util = abs(value) / allowed
            if best is None or util > best["utilisation"]:
                best = {"span": n + 1, "kind": kind, "from": a, "to": b, "limit": combo.limit.describe(),
                        "allowed": allowed, "v_extreme": float(value), "at": float(at),
                        "utilisation": float(util), "from_member": combo.name}
        out.append(best)
    return out


def _precompute(resp, Fm):
    """Fields, per-element extremes and derivative roots for all member rows at once."""
    flds = _member_fields(resp, Fm)
    L = resp.lengths
    # the stations at the extremes of M and v: the roots of dM/dx (= V) and dv/dx (= theta),
    # found once from the derivatives themselves and shared with the extremes
    pre = {"roots_V": poly.roots_in(poly.derivative(flds["M"]), L),
           "roots_theta": poly.roots_in(poly.derivative(flds["v"]), L)}
    inner = {"M": pre["roots_V"], "v": pre["roots_theta"]}
    pre.update({key: np.stack(poly.extremes(flds[key], L, inner.get(key))) for key in _FIELDS})
    return flds, pre


def _take(d, rows, stacked=()):
    """Rows ``rows`` of every array of ``d``; keys in ``stacked`` hold (4, R, E) arrays (the
    extremes vmax, smax, vmin, smin), whose rows are axis 1."""
    return {k: v[:, rows] if k in stacked else v[rows] for k, v in d.items()}


def _names(members):
    return [m if isinstance(m, str) else m.name for m in members]


def _result(name, kind, check, resp, members, stations, extremes, R, pre_v):
    """One result set from its rows' reactions ``R`` and v extremes ``pre_v`` (4, rows, E)."""
    names = _names(members)
    rs = ResultSet(name, kind, check, names, _reactions(resp, R, names), extremes, stations)
    combos = [m for m in members if not isinstance(m, str)]
    if combos:
        rs.deflection_checks = _deflection_checks(resp, pre_v, combos)
    return rs


def solve(model: BeamModel, stations: int = 48) -> BeamSolution:
    """Solve ``model`` exactly and build results per case, per combination and the envelope.

    Parameters
    ----------
    model : BeamModel
    stations : int
        Roughly how many regular intervals along the whole beam (besides the element
        boundaries and exact extreme locations).

    The envelope covers every concrete combination (pattern members included), or every
    load case when there are no combinations. When there are both strength and deflection
    combinations, ``envelope_strength`` and ``envelope_deflection`` cover each kind alone.
    """
    sw = model.self_weight
    if sw is not None and model.mass_per_length is None:
        raise BeamError("beam.self_weight: needs mass_per_length (or section + material) to load "
                        f"case {sw!r}")
    resp = respond(model, unit_self_weight=sw is not None)
    U = len(resp.unit_cases)
    specs = []  # (name, kind, check, factor rows, members)
    case_rows = {}
    for c in model.cases:
        f = np.zeros(U)
        f[resp.unit_cases.index(c)] = 1.0
        if sw is not None and c == sw:
            f[resp.self_weight_index] = model.mass_per_length * G
        case_rows[c] = f
        specs.append((c, "case", None, f[None], [c]))

    def scaled(combo):  # the self-weight unit case carries 1 N/m: scale to the model's weight
        f = combo.factors.copy()
        if resp.self_weight_index is not None:
            f[resp.self_weight_index] *= model.mass_per_length * G
        return f

    all_members = []
    for c in model.combinations:
        members = [k for k in resp.combos if (k.parent or k.name) == c.name]
        Fm = np.array([scaled(k) for k in members])
        specs.append((c.name, "combination", c.check, Fm, members))
        all_members += members
    # every result row is a case or a concrete combination: the envelopes reuse those rows
    base = np.vstack([sp[3] for sp in specs])
    rows_of, start = [], 0
    for sp in specs:
        rows_of.append(np.arange(start, start + sp[3].shape[0]))
        start += sp[3].shape[0]
    n_cases = len(model.cases)
    if all_members:
        every = np.arange(n_cases, base.shape[0])
        specs.append(("envelope", "envelope", None, None, all_members))
        rows_of.append(every)
        # strength and serviceability kept apart: one envelope per kind when there are both
        kinds = {c.name: c.check for c in model.combinations}
        for check in ("strength", "deflection"):
            pick = [i for i, k in enumerate(all_members) if kinds[k.parent or k.name] == check]
            if pick and len(pick) < len(all_members):
                specs.append((f"envelope_{check}", "envelope", check, None, [all_members[i] for i in pick]))
                rows_of.append(every[pick])
    else:
        specs.append(("envelope", "envelope", None, None, list(model.cases)))
        rows_of.append(np.arange(n_cases))
    # one pass over every distinct row: fields, extremes and roots at once
    flds, pre = _precompute(resp, base)
    singles = [i for i, rows in enumerate(rows_of) if rows.size == 1]
    multis = [i for i, rows in enumerate(rows_of) if rows.size > 1]
    one = np.array([rows_of[i][0] for i in singles], int)
    at = dict(zip(singles, _single_stations(resp, _take(flds, one), stations, _take(pre, one, _FIELDS))))
    if multis:
        at.update(zip(multis, _envelope_stations(resp, flds, stations, pre, [rows_of[i] for i in multis])))
    extremes = _extremes(resp, _take(pre, np.concatenate(rows_of), _FIELDS), [_names(sp[4]) for sp in specs])
    results = {}
    for i, ((name, kind, check, _, members), rows) in enumerate(zip(specs, rows_of)):
        results[name] = _result(name, kind, check, resp, members, at[i], extremes[i], flds["R"][rows],
                                pre["v"][:, rows])
    return BeamSolution(model, resp, results)
