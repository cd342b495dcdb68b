"""Final deflection with creep: every deflection combination plus the creep of its quasi-permanent
part, against the final-deflection limit. Active only when the job sets ``[design]``.

For a deflection combination with factors f_i on the cases i (EN 1995-1-1 2.2.3(5), from memory)::

    u_fin = sum_i (f_i + psi2_i kdef) u_inst,i

which is ``u_inst,G (1 + kdef) + u_inst,Q1 (1 + psi2,1 kdef) + u_inst,Qi (psi0,i + psi2,i kdef)``
for the characteristic combination G + Q1 + psi0,i Qi, with psi2 = 1 for permanent cases (the
members' own weight among them). kdef is EN 1995-1-1 Table 3.2 for the service class (timber and
glulam; metals creep 0, so u_fin = u_inst). The combined field is the solver's exact one, so the
largest |u_fin| of each span is found like the instantaneous one (grid + Newton polish); its limit
is ``[design] final_limit`` for that span, else the combination's own ``limit``.

>>> import numpy as np
>>> from leanspan.beam.model import BeamModel, Combination, DeflectionLimit, DistributedLoad, Stiffness, Support
>>> from leanspan.select.job import Limits
>>> from leanspan.select.design import DesignBasis
>>> from leanspan.select.screen import Candidates, screen
>>> m = BeamModel(4.0, (Support(0.0, "pin"), Support(4.0, "roller")), (Stiffness(0.0, 4.0, 1.0),),
...               (DistributedLoad("dead", 1e3, 1e3, 0, 4), DistributedLoad("imposed", 2e3, 2e3, 0, 4)),
...               combinations=(Combination("ULS", (("dead", 1.35), ("imposed", 1.5))),
...                             Combination("SLS", (("dead", 1.0), ("imposed", 1.0)), "deflection",
...                                         DeflectionLimit(ratio=250))))
>>> basis = DesignBasis(1, (("dead", "permanent"), ("imposed", "medium")), (("imposed", 0.3),))
>>> props = {"kind": ["timber"], "depth": [0.2], "rho_k": [350.0], "strength_bending": [24e6],
...          "strength_shear": [4e6], "Sz_top": [1e-3], "Sz_bot": [1e-3], "shear_factor": [75.0]}
>>> cand = Candidates(np.array([1e6]), np.array([0.0]), {k: np.array(v) for k, v in props.items()},
...                   Limits(design=basis))
>>> u = float(screen(m, cand).demand["deflection_final"][0])
>>> hand = 5 * (1e3 * (1 + 0.6) + 2e3 * (1 + 0.3 * 0.6)) * 4.0**4 / (384 * 1e6)   # 5 w L^4 / (384 EI)
>>> round(u / hand, 12)
1.0
"""

from __future__ import annotations

import weakref

import numpy as np

from ..design import SOURCES, TIMBER, gamma_M, kdef, kh
from .registry import Check, CheckRow, TextRule, register

__all__ = ["DEFLECTION_FINAL", "final_deflections", "creep_factors"]


def _active(limits) -> bool:
    return limits is not None and getattr(limits, "design", None) is not None


def creep_factors(design, kind) -> np.ndarray:
    """kdef per candidate (K,): Table 3.2 for timber and glulam, 0 for metals."""
    return np.where(np.isin(np.asarray(kind).astype(str), TIMBER), kdef(design.service_class), 0.0)


def _one_sampler(s, design, model, kd):
    """(u_fin, allowed, ratio) (K, C_concrete) of one FieldSampler: the worst span of every
    deflection combination."""
    from ..screen import worst_span  # here, not at the top: the screen imports the checks

    r = s.resp
    sw = r.self_weight_index
    case = [model.self_weight if i == sw else u.split(" [")[0] for i, u in enumerate(r.unit_cases)]
    q = np.array([design.psi2_of(c) for c in case], float)  # quasi-permanent part per unit case
    if s.v_scale is not None:  # deflection = (v EI of the unit solve) / EI_k
        field, scale = r.v[:1] * r.EI[:1, None, :, None], s.v_scale
    else:
        field, scale = (r.v if s.rows is None else r.v[s.rows]), None
    lengths, x0 = r.lengths, r.x_nodes[:-1]
    K, Cc = s.mass_g.size, len(r.combos)
    out = {k: np.full((K, Cc), np.nan) for k in ("u", "allowed", "ratio")}
    for ci, combo in enumerate(r.combos):  # a small set
        limit = design.final_limit or combo.limit
        if combo.check != "deflection" or limit is None:
            continue
        F = np.asarray(combo.factors, float)
        for value in np.unique(kd):  # at most two: timber's kdef and the metals' 0
            rows = np.flatnonzero(kd == value)
            F2 = F + value * q * (F != 0)
            t = s.mass_g[rows] * (F2[sw] if sw is not None else 0.0)
            got = worst_span(field if field.shape[0] == 1 else field[rows], F2, sw, t,
                             None if scale is None else scale[rows], r.spans, lengths, x0, limit)
            for key, value_k in zip(("u", "allowed", "ratio"), got):
                out[key][rows, ci] = value_k
    return out


# sampler -> (props, limits, result): the demand and the allowable of one screen share one pass
_LAST = weakref.WeakKeyDictionary()


def final_deflections(eff, props):
    """``(u_fin, allowed)`` (K, C) of every candidate and model combination: the span closest to
    its final-deflection limit (pattern members reduced to their combination by the worst ratio)."""
    hit = _LAST.get(eff.sampler)
    if hit is not None and hit[0] is props and hit[1] is eff.limits:
        return hit[2]
    result = _final_deflections(eff, props)
    _LAST[eff.sampler] = (props, eff.limits, result)
    return result


def _final_deflections(eff, props):
    design, sampler, model = eff.limits.design, eff.sampler, eff.model
    kd = creep_factors(design, props["kind"])
    parts = getattr(sampler, "samplers", None)  # the per-candidate reference path
    if parts is None:
        out = _one_sampler(sampler, design, model, kd)
    else:
        pieces = [_one_sampler(s, design, model, kd[[k]]) for k, s in enumerate(parts)]
        out = {key: np.concatenate([p[key] for p in pieces]) for key in ("u", "allowed", "ratio")}
    K, C = eff.v_abs.shape
    u, allowed = np.full((K, C), np.nan), np.full((K, C), np.nan)
    rows = np.arange(K)
    for c in range(C):  # a small set
        cols = np.flatnonzero(sampler.parents == c)
        if cols.size == 0:
            continue
        j = np.argmax(np.where(np.isnan(out["ratio"][:, cols]), -np.inf, out["ratio"][:, cols]), axis=1)
        u[:, c], allowed[:, c] = out["u"][:, cols][rows, j], out["allowed"][:, cols][rows, j]
    return u, allowed


def _demand(eff, props):
    return final_deflections(eff, props)[0]


def _allowable(props, limits, eff):
    return final_deflections(eff, props)[1]


def basis_details(design, props, combinations) -> dict:
    """The design basis of one candidate (props of length 1): every factor with its source."""
    kind = str(np.asarray(props["kind"])[0])
    timber = kind in TIMBER
    kmods = []
    for c in combinations:  # a small set
        if c.check != "strength":
            continue
        k, case, dur = design.combination_kmod(c)
        kmods.append({"combination": c.name, "kmod": k if timber else None, "case": case, "duration": dur})
    return {"service_class": design.service_class, "material_kind": kind,
            "kmod": kmods, "gamma_M": gamma_M(kind),
            "kh": float(kh([kind], props["depth"], props.get("rho_k"))[0]),
            "k_cr": 0.67 if timber else None, "kdef": float(creep_factors(design, [kind])[0]),
            "psi2": [{"case": case, "duration": dur,  # None: not given and not needed (in no deflection combination)
                      "psi2": design.psi2_of(case) if dur == "permanent" or case in dict(design.psi2) else None}
                     for case, dur in design.durations],
            "sources": dict(SOURCES)}


def _details(eff, props) -> dict:
    out = basis_details(eff.limits.design, props, eff.combinations)
    u, allowed = final_deflections(eff, props)
    ratio = np.where(np.isnan(u[0]), -np.inf, u[0] / allowed[0])
    j = int(np.argmax(ratio)) if ratio.size else 0
    if ratio.size and np.isfinite(ratio[j]):
        out.update(combination=eff.combinations[j].name, u_fin=float(u[0, j]), u_fin_allowed=float(allowed[0, j]))
    else:
        out.update(combination=None, u_fin=None, u_fin_allowed=None)
    return out


def _sheet_rows(chosen):
    """One row: the governing deflection combination, with kdef and each case's psi2 beside it."""
    res, k = chosen.selection.result, chosen.index
    c = int(res.combination["deflection_final"][k])
    if c < 0:
        return []
    design = chosen.selection.job.limits.design
    combo = res.effects.combinations[c]
    kd = float(creep_factors(design, [chosen.row["kind"]])[0])
    terms = " + ".join(f"({f:g} + {design.psi2_of(case):g} × {kd:g}) u_inst,{case}" for case, f in combo.factors
                       if f != 0)
    rule = design.final_limit or combo.limit
    util = float(res.utilisation["deflection_final"][k])
    return [CheckRow(
        check="final deflection with creep", combination=f"{combo.name}: u_fin = {terms}",
        action=((f"kdef = {kd:g} ({SOURCES['kdef'].split(' (')[0]}), service class {design.service_class}; "
                 "u_inst", float(res.effects.v_abs[k, c]), "length"),),
        demand=float(res.demand["deflection_final"][k]), limit=float(res.allowable["deflection_final"][k]),
        kind="length", utilisation=None if np.isnan(util) else util,
        rule=None if rule is None else TextRule(rule.describe() + (" (final)" if design.final_limit else "")),
        keys={"demand": "chosen.demands.u_fin", "limit": None,
              "utilisation": "chosen.utilisation.deflection_final"})]


# No peaks_suffice: the final deflection adds creep per load case (kdef x psi2 of each case), read
# from the fields, not from the worst deflection of one combination.
DEFLECTION_FINAL = register(Check(
    name="deflection_final", label="final defl.",
    columns=("kind", "depth", "rho_k", "strength_bending", "strength_shear"),  # also what [design] strengths read
    demand=_demand, allowable=_allowable, kind="length", demand_key="u_fin",
    sentence="Final deflection with creep (EN 1995-1-1 2.2.3): u_fin = Σ (f + ψ2 kdef) u_inst of each case "
             "of every deflection combination (ψ2 = 1 for permanent cases, kdef from EN 1995-1-1 Table 3.2, "
             "0 for metals), the worst span against the final-deflection limit.",
    covers=("creep",), active=_active, details=_details, sheet_rows=_sheet_rows))
