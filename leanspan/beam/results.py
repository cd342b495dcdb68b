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


def _padded(rows_of):
    """Rows of every result as one (G, n) index array: each result's own rows, then its first row
    repeated (repeats change no maximum or minimum, nor which row holds it first)."""
    n = max(rows.size for rows in rows_of)
    return np.array([np.concatenate([rows, np.full(n - rows.size, rows[0])]) for rows in rows_of], int)


def _member_fields(resp: Response, Fm):
    """Coefficients (C, 4, E, 6) of V, M, theta, v (ascending powers, zero-padded to the quintic),
    with views ``out[key]`` (C, E, n) of each field, and reactions ``out["R"]`` (C, nsup, 2), for
    factor rows ``Fm``."""
    unit = np.zeros((Fm.shape[1], len(_FIELDS)) + resp.v.shape[2:])
    for f, key in enumerate(_FIELDS):
        c = getattr(resp, key)[0]
        unit[:, f, :, :c.shape[-1]] = c
    every = np.einsum("cu,uz->cz", Fm, unit.reshape(unit.shape[0], -1)).reshape((-1,) + unit.shape[1:])
    out = {key: every[:, f, :, :getattr(resp, key).shape[-1]] for f, key in enumerate(_FIELDS)}
    out["all"] = every
    out["R"] = np.einsum("cu,usj->csj", Fm, resp.reactions[0])
    return out


def _regular_grid(resp, n_regular):
    """Local positions (E, m) of the regular subdivision, NaN-padded."""
    L = resp.lengths
    nsub = np.maximum(1, np.ceil(n_regular * L / float(L.sum()))).astype(int)
    j = np.arange(int(nsub.max()) + 1)[None, :]
    return np.where(j <= nsub[:, None], j / nsub[:, None] * L[:, None], np.nan)


def _sorted_unique(s, total):
    """``s`` (..., m) sorted along the last axis, with NaN in place of each near-duplicate (within
    1e-12 of ``total`` of the value before it): NaN, as a gap, is no station."""
    s = np.sort(s, axis=-1)
    s[..., 1:][np.abs(np.diff(s, axis=-1)) <= 1e-12 * total] = np.nan
    return s


def _station_values(every, rows, s):
    """Values (4, N) of V, M, theta, v of the coefficient rows ``every[rows]`` (``every``: R, 4, E, 6)
    at the stations ``s`` (len(rows), E, m; NaN: none), for the N stations in order (row,
    element, station); the mask (N,) of the ones kept: all but the end of element e where V, M
    and theta run on continuously into e + 1, in that row; and each station's element.

    The stations of an element are increasing, and the first is its start.
    """
    R, E, m = s.shape
    valid = ~np.isnan(s)
    at = np.flatnonzero(valid)
    row, e = np.divmod(at // m, E)
    coef = every.transpose(3, 1, 0, 2).reshape(24, -1)  # (6 powers x 4 fields, rows x elements)
    c = np.take(coef, rows[row] * E + e, axis=1).reshape(6, 4, -1)
    z = s.reshape(-1)[at]
    vals = c[5] * z + c[4]  # Horner's rule (as poly.evaluate), every field at once
    for k in range(3, -1, -1):
        vals *= z
        vals += c[k]
    keep = np.ones(at.size, bool)
    count = valid.sum(axis=2)  # (R, E)
    ends = np.cumsum(count).reshape(count.shape)
    first, last = ends - count, ends - 1
    if E > 1:
        scale = np.maximum(np.maximum.reduceat(np.abs(vals[:3]), first[:, 0], axis=1), 1e-300)  # (3, R)
        jump = np.abs(vals[:3, last[:, :-1]] - vals[:3, first[:, 1:]]) > 1e-9 * scale[:, :, None]
        keep[last[:, :-1][~jump.any(axis=0)]] = False
    return vals, keep, e


def _stations(resp, flds, pre, rows_of, n_regular):
    """Stations of every result (list of dicts), evaluated in one pass.

    A single result (one row) gets ``x, V, M, theta, v`` at the regular grid plus its roots of V
    and theta; a result with several members gets the regular grid plus, in each element, where
    its largest and smallest M and v lie, and ``K_max``, ``K_min`` per field over its members (an
    element end stays where any member jumps there).
    """
    total = float(resp.lengths.sum())
    grid = _regular_grid(resp, n_regular)
    singles = [g for g, rows in enumerate(rows_of) if rows.size == 1]
    multis = [g for g, rows in enumerate(rows_of) if rows.size > 1]
    one = np.array([rows_of[g][0] for g in singles], int)
    reg = np.broadcast_to(grid, (one.size,) + grid.shape)
    s_one = _sorted_unique(np.concatenate([reg, pre["roots_V"][one], pre["roots_theta"][one]], axis=2), total)
    groups = [rows_of[g] for g in multis]
    sizes = [rows.size for rows in groups]
    if groups:
        idx = _padded(groups)
        ext = pre["ext"][:, idx][:, :, :, [1, 3]]  # (4, G, n, 2 fields: M, v, E)
        ia = np.argmax(ext[0], axis=1)[:, None]  # the first member holding the maximum
        ib = np.argmin(ext[2], axis=1)[:, None]
        sa = np.take_along_axis(ext[1], ia, axis=1)[:, 0]  # (G, 2, E)
        sb = np.take_along_axis(ext[3], ib, axis=1)[:, 0]
        extra = np.stack([sa[:, 0], sb[:, 0], sa[:, 1], sb[:, 1]], axis=-1)  # M max, M min, v max, v min
        s_env = _sorted_unique(np.concatenate([np.broadcast_to(grid, (len(groups),) + grid.shape), extra],
                                              axis=2), total)
        width = max(s_one.shape[2], s_env.shape[2])
        pad = lambda a: np.concatenate([a, np.full(a.shape[:2] + (width - a.shape[2],), np.nan)], axis=2)  # noqa: E731
        s_all = np.concatenate([pad(s_one), pad(s_env)[np.repeat(np.arange(len(groups)), sizes)]])
        rows_all = np.concatenate([one] + groups)
    else:
        s_all, rows_all = s_one, one
    vals, keep, elem = _station_values(flds["all"], rows_all, s_all)
    x = resp.x_nodes[elem] + s_all[~np.isnan(s_all)]
    per_row = (~np.isnan(s_all)).sum(axis=(1, 2)).tolist()  # stations of each evaluated row
    out = [None] * len(rows_of)
    n1 = sum(per_row[:one.size])
    k1 = keep[:n1]
    table = np.concatenate([x[None, :n1], vals[:, :n1]])[:, k1]  # x, V, M, theta, v of the kept stations
    bounds = [0] + np.cumsum(k1)[np.cumsum(per_row[:one.size]) - 1].tolist()  # kept ones before each row's end
    for r, g in enumerate(singles):
        part = table[:, bounds[r]:bounds[r + 1]]
        out[g] = dict(zip(("x",) + _FIELDS, part))
    at, r = n1, one.size
    for g, size in zip(multis, sizes):
        n = per_row[r]
        r += size
        blk = slice(at, at + size * n)
        at += size * n
        kg = keep[blk].reshape(size, n).any(axis=0)
        hi = vals[:, blk].reshape(-1, size, n).max(axis=1)[:, kg]
        lo = vals[:, blk].reshape(-1, size, n).min(axis=1)[:, kg]
        big = _bigger(hi, lo)
        row = {"x": x[blk][:n][kg]}
        for f, k in enumerate(_FIELDS):
            row[k], row[f"{k}_max"], row[f"{k}_min"] = big[f], hi[f], lo[f]
        out[g] = row
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


def _extremes(resp, ext, idx, members):
    """``[{key: Extreme}]``, one dict per result: result g has the rows ``idx[g]`` (padded, see
    :func:`_padded`) of ``ext`` (4, R, fields, E: vmax, smax, vmin, smin) and the member names
    ``members[g]``."""
    x0 = resp.x_nodes[:-1]
    vmax, smax, vmin, smin = ext
    ia, ib = np.argmax(vmax, axis=2)[..., None], np.argmin(vmin, axis=2)[..., None]  # each row's element
    hi, lo = np.take_along_axis(vmax, ia, 2)[..., 0], np.take_along_axis(vmin, ib, 2)[..., 0]  # (R, F)
    xa = (x0[ia] + np.take_along_axis(smax, ia, 2))[..., 0]
    xb = (x0[ib] + np.take_along_axis(smin, ib, 2))[..., 0]
    i = np.argmax(hi[idx], axis=1)[:, None]  # (G, 1, F): each result's first member holding it
    j = np.argmin(lo[idx], axis=1)[:, None]
    pick = lambda a, k: np.take_along_axis(a[idx], k, axis=1)[:, 0]  # noqa: E731
    h, low = snap_round_off(pick(hi, i), pick(lo, j))
    H, LO, XA, XB, I, J = (a.tolist() for a in (h, low, pick(xa, i), pick(xb, j), i[:, 0], j[:, 0]))
    order = [(_FIELDS.index(k[:-4]), k, k[:-4] + "_min") for k in _EXTREME_KEYS[::2]]  # M, V, theta, v
    out = []
    for g, names in enumerate(members):
        many = len(names) > 1
        hg, lg, ag, bg, ig, jg = H[g], LO[g], XA[g], XB[g], I[g], J[g]
        d = {}
        for f, kmax, kmin in order:
            d[kmax] = Extreme(hg[f], ag[f], names[ig[f]] if many else None)
            d[kmin] = Extreme(lg[f], bg[f], names[jg[f]] if many else None)
        out.append(d)
    return out


def _reactions(resp, R, idx, sizes):
    """Reaction rows of every result (list of lists of dicts) from the member rows ``idx``."""
    Rg = R[idx]  # (G, n, nsup, 2)
    hi, lo = Rg.max(axis=1), Rg.min(axis=1)
    first, big, hi, lo = Rg[:, 0].tolist(), _bigger(hi, lo).tolist(), hi.tolist(), lo.tolist()
    out = []
    for g, size in enumerate(sizes):
        rows = []
        for i, s in enumerate(resp.supports):
            row = {"at": s.at, "type": s.type}
            if size == 1:
                row["force"], row["moment"] = first[g][i]
            else:
                row["force"], row["moment"] = big[g][i]
                row.update(force_max=hi[g][i][0], force_min=lo[g][i][0], moment_max=hi[g][i][1],
                           moment_min=lo[g][i][1])
            rows.append(row)
        out.append(rows)
    return out


def _span_deflections(resp, ext_v, rows):
    """Per base row in ``rows`` and span: the larger-magnitude extreme of v and where it lies,
    ``{row: [(value, at) or None per span]}`` (None for a span without elements)."""
    if not rows:
        return {}
    x0 = resp.x_nodes[:-1]
    mid = x0 + resp.lengths / 2
    inside = np.array([(mid > a) & (mid < b) for a, b, _ in resp.spans])  # (S, E)
    vmax, smax, vmin, smin = (a[rows][:, None, :] for a in ext_v)  # (D, 1, E)
    ia = np.argmax(np.where(inside, vmax, -np.inf), axis=2)[..., None]  # the first in the span
    ib = np.argmin(np.where(inside, vmin, np.inf), axis=2)[..., None]
    take = lambda a, k: np.take_along_axis(np.broadcast_to(a, k.shape[:2] + a.shape[2:]), k, 2)[..., 0]  # noqa: E731
    hi, lo = take(vmax, ia), take(vmin, ib)
    up = np.abs(hi) > np.abs(lo)
    value = np.where(up, hi, lo).tolist()
    at = np.where(up, x0[ia[..., 0]] + take(smax, ia), x0[ib[..., 0]] + take(smin, ib)).tolist()
    some = inside.any(axis=1).tolist()
    return {r: [(value[d][n], at[d][n]) if some[n] else None for n in range(len(some))]
            for d, r in enumerate(rows)}


def _deflection_checks(resp, table, members, rows):
    """Worst per span over the deflection members (base rows ``rows``) that carry a limit."""
    defl = [(c, r) for c, r in zip(members, rows) if c.check == "deflection" and c.limit is not None]
    if not defl:
        return []
    out = []
    for n, (a, b, kind) in enumerate(resp.spans):
        best = None
        for combo, r in defl:
            if table[r][n] is None:
                break
            value, at = table[r][n]
            allowed = float(combo.limit.allowed(b - a))
            util = abs(value) / allowed
            if best is None or util > best["utilisation"]:
                best = {"span": n + 1, "kind": kind, "from": a, "to": b, "limit": combo.limit.describe(),
                        "allowed": allowed, "v_extreme": value, "at": at, "utilisation": util,
                        "from_member": combo.name}
        if best is not None:
            out.append(best)
    return out


def _precompute(resp, Fm):
    """Fields, per-element extremes and derivative roots for all member rows at once.

    ``pre["ext"]`` (4, R, 4 fields, E): vmax, smax, vmin, smin of V, M, theta, v per element.
    """
    flds = _member_fields(resp, Fm)
    L = resp.lengths
    # the roots of every field's derivative (those of V and theta are also the stations at the
    # extremes of M and v), in one call for all four fields
    inner = poly.roots_in(poly.derivative(flds["all"]), L)  # (R, 4, E, 4)
    roots_V, roots_theta = inner[:, 1, :, :2], inner[:, 3]  # (dM/dx is quadratic)
    ext = np.stack(poly.extremes(flds["all"], L, inner))
    return flds, {"roots_V": roots_V, "roots_theta": roots_theta, "ext": ext}


def _names(members):
    return [m if isinstance(m, str) else m.name for m in members]


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
    idx = _padded(rows_of)
    names = [_names(sp[4]) for sp in specs]
    at = _stations(resp, flds, pre, rows_of, stations)
    extremes = _extremes(resp, pre["ext"], idx, names)
    reactions = _reactions(resp, flds["R"], idx, [rows.size for rows in rows_of])
    defl_rows = sorted({n_cases + i for i, k in enumerate(all_members)
                        if k.check == "deflection" and k.limit is not None})
    table = _span_deflections(resp, pre["ext"][:, :, 3], defl_rows)
    results = {}
    for g, (name, kind, check, _, members) in enumerate(specs):
        rs = ResultSet(name, kind, check, names[g], reactions[g], extremes[g], at[g])
        if kind != "case" and all_members:
            rs.deflection_checks = _deflection_checks(resp, table, members, rows_of[g].tolist())
        results[name] = rs
    return BeamSolution(model, resp, results)
