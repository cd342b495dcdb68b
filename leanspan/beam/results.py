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


def _station_grid(resp, flds, n_regular, single, pre):
    """Local station positions (E, m) with NaN padding, sorted."""
    L = resp.lengths
    total = float(L.sum())
    nsub = np.maximum(1, np.ceil(n_regular * L / total)).astype(int)
    m = int(nsub.max())
    j = np.arange(m + 1)[None, :]
    reg = np.where(j <= nsub[:, None], j / nsub[:, None] * L[:, None], np.nan)
    if single:
        extra = [pre["roots_V"][0], pre["roots_theta"][0]]
    else:
        extra = []
        for key in ("M", "v"):
            vmax, smax, vmin, smin = pre[key]
            ia = np.argmax(vmax, axis=0)[None]
            ib = np.argmin(vmin, axis=0)[None]
            extra += [np.take_along_axis(smax, ia, 0)[0][:, None], np.take_along_axis(smin, ib, 0)[0][:, None]]
    s = np.sort(np.concatenate([reg] + extra, axis=1), axis=1)
    dup = np.zeros_like(s, bool)
    dup[:, 1:] = np.abs(np.diff(s, axis=1)) <= 1e-12 * total
    s[dup] = np.nan
    return np.sort(s, axis=1)


def _stations(resp, flds, n_regular, pre):
    C = flds["M"].shape[0]
    s = _station_grid(resp, flds, n_regular, C == 1, pre)
    E = s.shape[0]
    vals = {k: poly.evaluate(flds[k][:, :, None, :], np.nan_to_num(s)[None]) for k in _FIELDS}  # (C, E, m)
    valid = ~np.isnan(s)
    # drop the end of element e where V, M and theta are continuous into element e+1
    last = valid.sum(axis=1) - 1
    if E > 1:
        e = np.arange(E - 1)
        same = np.ones(E - 1, bool)
        for k in ("V", "M", "theta"):
            a = vals[k][:, e, last[:-1]]
            b = vals[k][:, e + 1, 0]
            scale = max(np.abs(vals[k]).max(), 1e-300)
            same &= np.all(np.abs(a - b) <= 1e-9 * scale, axis=0)
        valid[e[same], last[:-1][same]] = False
    x = (resp.x_nodes[:-1, None] + np.nan_to_num(s))[valid]
    out = {"x": x}
    for k in _FIELDS:
        f = vals[k][:, valid]  # (C, S)
        if C == 1:
            out[k] = f[0]
        else:
            hi, lo = f.max(axis=0), f.min(axis=0)
            out[k] = _bigger(hi, lo)
            out[f"{k}_max"], out[f"{k}_min"] = hi, lo
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


def _extremes(resp, pre, names):
    out = {}
    x0 = resp.x_nodes[:-1]
    for key in ("M", "V", "theta", "v"):
        vmax, smax, vmin, smin = pre[key]  # (C, E)
        i = np.unravel_index(np.argmax(vmax), vmax.shape)
        j = np.unravel_index(np.argmin(vmin), vmin.shape)
        many = len(names) > 1
        hi, lo = snap_round_off(float(vmax[i]), float(vmin[j]))
        out[f"{key}_max"] = Extreme(float(hi), float(x0[i[1]] + smax[i]), names[i[0]] if many else None)
        out[f"{key}_min"] = Extreme(float(lo), float(x0[j[1]] + smin[j]), names[j[0]] if many else None)
    return {k: out[k] for k in ("M_max", "M_min", "V_max", "V_min", "theta_max", "theta_min", "v_max", "v_min")}


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
    pre = {key: poly.extremes(flds[key], L) for key in _FIELDS}
    pre["roots_V"] = poly.roots_in(flds["V"], L)
    pre["roots_theta"] = poly.roots_in(flds["theta"], L)
    return flds, pre


def _take(d, sl):
    out = {}
    for k, v in d.items():
        out[k] = tuple(a[sl] for a in v) if isinstance(v, tuple) else v[sl]
    return out


def _result(name, kind, check, resp, members, n_regular, flds, pre):
    names = [m if isinstance(m, str) else m.name for m in members]
    rs = ResultSet(name, kind, check, names, _reactions(resp, flds["R"], names),
                   _extremes(resp, pre, names), _stations(resp, flds, n_regular, pre))
    combos = [m for m in members if not isinstance(m, str)]
    if combos:
        rs.deflection_checks = _deflection_checks(resp, pre["v"], combos)
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

    all_members, all_rows = [], []
    for c in model.combinations:
        members = [k for k in resp.combos if (k.parent or k.name) == c.name]
        Fm = np.array([scaled(k) for k in members])
        specs.append((c.name, "combination", c.check, Fm, members))
        all_members += members
        all_rows.append(Fm)
    if all_members:
        specs.append(("envelope", "envelope", None, np.vstack(all_rows), all_members))
        # strength and serviceability kept apart: one envelope per kind when there are both
        kinds = {c.name: c.check for c in model.combinations}
        for check in ("strength", "deflection"):
            pick = [i for i, k in enumerate(all_members) if kinds[k.parent or k.name] == check]
            if pick and len(pick) < len(all_members):
                specs.append((f"envelope_{check}", "envelope", check, np.vstack(all_rows)[pick],
                              [all_members[i] for i in pick]))
    else:
        cases = list(model.cases)
        specs.append(("envelope", "envelope", None, np.array([case_rows[c] for c in cases]), cases))
    # one pass over every member row of every result: fields, extremes and roots at once
    flds, pre = _precompute(resp, np.vstack([sp[3] for sp in specs]))
    results = {}
    start = 0
    for name, kind, check, Fm, members in specs:
        sl = slice(start, start + Fm.shape[0])
        start = sl.stop
        results[name] = _result(name, kind, check, resp, members, stations, _take(flds, sl), _take(pre, sl))
    return BeamSolution(model, resp, results)
