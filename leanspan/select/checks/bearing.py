"""Bearing at the supports: the bearing length each support needs for its reaction, against the
length the job gives (``bearing_length`` on ``[[support]]``); always reported as a length.

The reaction is the largest upward support force over the strength combinations, each
candidate's own weight included (uplift needs no bearing). The bearing strength f is the
design value under ``[design]`` (timber kmod x fc_90 / gamma_M, kmod of each combination; metals
fy / gamma_M0), else ``[limits] bearing_stress`` if given, else ``stress_factor`` x the
material's strength (timber ``fc_90``, metals ``strength_bending``, the yield strength).

**Timber** (EN 1995-1-1 6.1.5, from memory): ``F <= kc90 f b l_ef`` with kc90 = 1.0 (the
6.1.5(4) increases are not used), b the member's width and the effective contact length
``l_ef = l + e_left + e_right``: the actual length l plus, on each side, min(30 mm, l, the
distance from the support to the member's end on that side), so a support at the member's end
gains 30 mm on the span side only. The required l solves ``l_ef(l) = F / (kc90 f b)``; l_ef is
piecewise linear in l, so in closed form. (The limit of half the distance to a neighbouring
bearing, l1 / 2, is not applied.)

**Steel I-sections and channels** (local web yielding, ANSI/AISC 360-16 J10.2, from memory):
``F <= f tw (n k + lb)`` with k = the flange thickness plus the root radius (the web toe of the
fillet), n = 5 at a support farther than the member depth from the member's end and 2.5 nearer;
at such an end lb is at least k (J10.2). Web crippling (J10.3) and web buckling are not checked.
**Steel boxes** (rectangular hollow sections: the same yielding of both walls, ANSI/AISC 360
chapter K, from memory): tw = 2 t and k = the outer corner radius (1.5 t where it is not known,
r = 0). Other shapes (tubes, tees, angles, solid bars) and aluminium are not covered: their
required length is ``null``, and where a support gives a ``bearing_length`` they fail the check
(it cannot be made for them), as the registry treats any candidate it cannot check.

>>> round(float(required_timber(12e3, 0.1, 1.7e6, 0.0, 3.0)) * 1e3, 3)      # end support: l + 30 mm = F / (f b)
40.588
>>> round(float(required_timber(12e3, 0.1, 1.7e6, 3.0, 3.0)) * 1e3, 3)      # interior, short: l_ef = 3 l
23.529
>>> round(float(required_timber(24e3, 0.1, 1.7e6, 3.0, 3.0)) * 1e3, 3)      # interior: l + 60 mm
81.176
"""

from __future__ import annotations

import numpy as np

from ..design import SOURCES, TIMBER
from .registry import Check, CheckRow, TextRule, register

__all__ = ["BEARING", "required_timber", "required_web", "bearing_lengths"]

_SPREAD = 0.030  # m: EN 1995-1-1 6.1.5(1), from memory
_WEB = ("ibeam", "channel")
_STEEL = ("steel", "stainless")


def required_timber(F, b, f, left, right, kc90=1.0):
    """Required actual contact length (m) of a timber member on a support: ``F`` the reaction (N),
    ``b`` the width (m), ``f`` the compression strength across the grain (Pa), ``left``/``right``
    the distances from the support to the member's ends (m); arrays broadcast."""
    with np.errstate(divide="ignore", invalid="ignore"):
        T = np.maximum(F, 0.0) / (kc90 * f * b)  # the effective length needed
    e = np.sort(np.stack(np.broadcast_arrays(np.minimum(_SPREAD, left), np.minimum(_SPREAD, right))), axis=0)
    e1, e2 = e[0], e[1]  # l_ef = 3 l (l <= e1), 2 l + e1 (e1 <= l <= e2), l + e1 + e2 beyond
    return np.where(T <= 3 * e1, T / 3, np.where(T <= 2 * e2 + e1, (T - e1) / 2, T - e1 - e2))


def required_web(F, tw, k, f, near_end):
    """Required stiff bearing length lb (m) of a steel web by local web yielding (AISC 360 J10.2):
    ``F <= f tw (n k + lb)``, n = 2.5 near an end (lb >= k there), 5 elsewhere; arrays broadcast."""
    with np.errstate(divide="ignore", invalid="ignore"):
        lb = np.maximum(F, 0.0) / (f * tw) - np.where(near_end, 2.5, 5.0) * k
    return np.where(near_end, np.maximum(lb, k), np.maximum(lb, 0.0))


def _column(props, name, K):
    """A catalogue column (K,), NaN (text: "") where the candidates do not carry it."""
    if name in props:
        return np.asarray(props[name]) if name in ("kind", "family") else np.asarray(props[name], float)
    return np.full(K, "") if name in ("kind", "family") else np.full(K, np.nan)


def _web(col):
    """Web thickness and k (K,): I-sections and channels tw and the bottom flange + root radius;
    boxes two walls 2 t and k = the outer corner radius (1.5 t where it is 0: not known)."""
    box = col["family"].astype(str) == "box"
    k_open = np.where(np.isfinite(col["tf_bot"]), col["tf_bot"], col["tf"]) + np.nan_to_num(col["r"])
    k_box = np.where(col["r"] > 0, col["r"], 1.5 * col["t"])
    return np.where(box, 2.0 * col["t"], col["tw"]), np.where(box, k_box, k_open)


def _strength(eff, props, concrete):
    """Bearing strength f (K, C_concrete) for every candidate (NaN where none applies)."""
    limits = eff.limits
    K = np.size(eff.mass_per_length) if eff.mass_per_length is not None else eff.M_max.shape[0]
    kind = _column(props, "kind", K).astype(str)
    timber = np.isin(kind, TIMBER)
    f = np.where(timber, _column(props, "fc_90", K), _column(props, "strength_bending", K))
    design = getattr(limits, "design", None)
    if design is not None:  # kmod fc_90 / gamma_M (timber), fy / gamma_M0 (metals: kh = 1)
        fd = np.where(timber[:, None], design.design_strength(props, eff.combinations, "fc_90"),
                      design.design_strength(props, eff.combinations, "bending"))
        return fd[:, eff.sampler.parents]
    absolute = limits.get("bearing_stress")
    if absolute is not None:
        return np.full((kind.size, len(concrete)), absolute)
    factor = limits.stress_factor if limits.stress_factor is not None else np.nan
    return (factor * f)[:, None] * np.ones((1, len(concrete)))


def bearing_lengths(eff, props):
    """``(required (K, S), reaction (K, S), strength (K, S), combination (K, S))`` at every support:
    the required length is monotonic in reaction / strength, so the strength concrete combination
    of the largest ratio governs (its index among ``resp.combos``); NaN where not covered."""
    sampler = eff.sampler
    resp = sampler.resp
    K, S = np.size(eff.mass_per_length), len(resp.supports)
    col = {c: _column(props, c, K) for c in ("kind", "family", "width", "depth", "tw", "tf", "tf_bot", "r", "t")}
    kind, family = col["kind"].astype(str), col["family"].astype(str)
    timber = np.isin(kind, TIMBER)
    web = np.isin(family, _WEB + ("box",)) & np.isin(kind, _STEEL)
    nan = np.full((K, S), np.nan)
    strength = sampler.strength
    if not (timber | web).any() or strength.size == 0:  # nothing this check covers
        return nan, nan, nan, np.zeros((K, S), int)
    f = _strength(eff, props, resp.combos)[:, strength]  # (K, Cs)
    # one strength for all combinations (no [design]): the largest upward reaction governs, the
    # upper envelope of lines in the weight (FieldSampler.worst_reactions); else every combination
    worst = sampler.worst_reactions(strength) if _same_over_combinations(f) and not np.any(f <= 0) else None
    if worst is not None:
        reaction, j = worst
        f_used = f[:, 0]
        with np.errstate(divide="ignore", invalid="ignore"):
            T = np.maximum(reaction, 0.0) / f_used[:, None]
        # an argmax of NaN ratios (no strength) takes the first combination
        bad = ~(np.isfinite(f_used) & (f_used > 0))
        if bad.any():
            first = sampler.only(strength[:1]).reactions()[:, 0, :]
            reaction[bad], j[bad] = first[bad], 0
        f_used = np.broadcast_to(f_used[:, None], j.shape).copy()
    else:
        R = sampler.only(strength).reactions()  # (K, Cs, S): the strength combinations alone
        with np.errstate(divide="ignore", invalid="ignore"):
            ratio = np.maximum(R, 0.0) / f[:, :, None]
        j = np.argmax(np.where(np.isnan(ratio), -np.inf, ratio), axis=1)  # (K, S)
        T = np.take_along_axis(ratio, j[:, None, :], axis=1)[:, 0, :]  # reaction / strength (m^2)
        reaction = np.take_along_axis(R, j[:, None, :], axis=1)[:, 0, :]
        f_used = np.take_along_axis(f, j, axis=1)
    L = eff.model.length
    at = np.array([s.at for s in resp.supports])
    req_t = required_timber(T, col["width"][:, None], 1.0, at, L - at)
    tw, k = _web(col)
    near = np.minimum(at, L - at)[None, :] <= col["depth"][:, None]  # (K, S)
    req_w = required_web(T, tw[:, None], k[:, None], 1.0, near)
    req = np.where(timber[:, None], req_t, np.where(web[:, None], req_w, np.nan))
    return req, reaction, f_used, strength[j]


def _same_over_combinations(f) -> bool:
    """Whether every candidate's strength (K, C) is one value for all combinations (NaN alike)."""
    same = (f == f[:, :1]) | (np.isnan(f) & np.isnan(f[:, :1]))
    return bool(f.shape[1] and same.all())


def _demand(eff, props):
    return bearing_lengths(eff, props)[0]


def _allowable(props, limits, eff):
    given = [np.nan if s.bearing_length is None else s.bearing_length for s in eff.sampler.resp.supports]
    return np.array([given], float)


def _demand_json(row) -> dict:
    return {"bearing_required": [None if np.isnan(v) else float(v) for v in row]}


def _method(kind, family) -> str:
    if kind in TIMBER:
        return "timber compression across the grain, EN 1995-1-1 6.1.5 (kc90 = 1.0, l_ef = l + 30 mm per side)"
    if kind in _STEEL and family in _WEB:
        return "local web yielding, ANSI/AISC 360-16 J10.2: F <= f tw (5k or 2.5k + lb)"
    if kind in _STEEL and family == "box":
        return ("wall local yielding of a rectangular hollow section, ANSI/AISC 360 chapter K: "
                "F <= f 2t (5k or 2.5k + lb), k = outer corner radius")
    return "not covered for this shape and material"


def _details(eff, props) -> dict:
    """Each support of one candidate: its largest reaction, the combination, the strength used, the
    required and the given bearing length."""
    req, R, f, j = bearing_lengths(eff, props)
    kind, family = (str(_column(props, c, 1)[0]) for c in ("kind", "family"))
    out = []
    for s, support in enumerate(eff.sampler.resp.supports):  # a small set
        ok = bool(np.isfinite(req[0, s]))
        given = support.bearing_length
        out.append({"at": support.at, "type": support.type,
                    "reaction": float(R[0, s]) if ok else None,
                    "combination": eff.combinations[int(eff.sampler.parents[j[0, s]])].name if ok else None,
                    "strength": float(f[0, s]) if ok else None,
                    "required": float(req[0, s]) if ok else None, "given": given,
                    "utilisation": float(req[0, s] / given) if ok and given else None})
    return {"method": _method(kind, family), "supports": out}


def _inputs(props, support) -> tuple:
    """The section's values the formula reads, for the sheet: b (timber), tw and k (steel webs)."""
    kind = str(_column(props, "kind", 1)[0])
    if kind in TIMBER:
        return (("b", float(_column(props, "width", 1)[0]), "length"),)
    tw, k = _web({c: _column(props, c, 1) for c in ("family", "tw", "tf", "tf_bot", "r", "t")})
    return (("tw" if str(_column(props, "family", 1)[0]) != "box" else "2t", float(tw[0]), "length"),
            ("k", float(k[0]), "length"))


def _sheet_rows(chosen):
    """One row per support: the reaction, the strength, the required length and the given one."""
    res, k = chosen.selection.result, chosen.index
    props = {c: np.asarray(v)[[k]] for c, v in res.props.items()}
    det = _details(res.effects.take(k), props)
    method = det["method"]
    governing = int(res.combination["bearing"][k])  # the support column of the largest utilisation
    rows = []
    for i, s in enumerate(det["supports"]):
        if s["required"] is None:
            continue
        source = SOURCES["gamma_M"].split(";")[0] if chosen.selection.job.limits.design is not None else ""
        rows.append(CheckRow(
            check=f"bearing, {s['type']} support {i + 1}", combination=f"{s['combination']}: {method}"
                  + (f"; γM from {source}" if source else ""),
            action=(("R", s["reaction"], "force"), ("f", s["strength"], "pressure")) + _inputs(props, s),
            demand=s["required"], limit=s["given"], kind="length", utilisation=s["utilisation"],
            rule=None if s["given"] else TextRule("no bearing_length given: required length only"),
            keys={"demand": None, "limit": None,
                  "utilisation": None if not s["given"] else "chosen.utilisation.bearing" if i == governing
                  else f"chosen.utilisation.bearing.{i + 1}"}))
    return rows


# No peaks_suffice: the demand reads the support reactions, which the worst M, V and v do not
# give; a long list with a bearing_length is screened in chunks (screen.screen_chunks), each
# candidate's worst reaction per support found on the upper envelope of lines in its weight.
BEARING = register(Check(
    name="bearing", label="bearing",
    columns=("kind", "family", "width", "depth", "tw", "tf", "tf_bot", "r", "t", "fc_90", "strength_bending"),
    demand=_demand, allowable=_allowable, kind="length", demand_key="bearing_required",
    sentence="Bearing at each support: the bearing length the largest reaction of the strength "
             "combinations needs (timber: compression across the grain, EN 1995-1-1 6.1.5 with kc90 = 1.0 "
             "and 30 mm added per side where the member runs on; steel I-sections and channels: local web "
             "yielding, AISC 360 J10.2), against the support's bearing_length where the job gives one.",
    covers=("bearing",), limit_keys={"bearing_stress": "pressure"},
    sheet_rows=_sheet_rows, demand_json=_demand_json, details=_details,
    reports_only=lambda model: all(s.bearing_length is None for s in model.supports)))
