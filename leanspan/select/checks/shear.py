"""Shear: the peak shear stress tau = |V| x shear factor against the allowable shear stress,
reduced for web shear buckling of slender steel webs.

The shear factor is the section's max over y of Q(y) / (Iz b(y)) (Jourawski's formula,
any mechanics-of-materials text), so tau is the peak of V Q / (I b) over the depth. A steel
web (I, channel, box) with hw / t > 72 eps / eta gets the allowable times min(1, chi_w), chi_w of
EN 1993-1-5 Table 5.1 for a non-rigid end post with lam_w = hw / (86.4 t eps) (transverse
stiffeners at the supports only; see :func:`.section_class.web_shear`). Stainless and aluminium
webs are not checked for shear buckling.

>>> import numpy as np
>>> from leanspan.select.checks.registry import Effects
>>> nan = np.full((1, 1), np.nan)
>>> eff = Effects(nan, nan, np.array([[10e3]]), nan, nan, ())
>>> b, d = 0.1, 0.2      # rectangle: tau max = 1.5 V / (b d)
>>> round(float(SHEAR.demand(eff, {"shear_factor": np.array([1.5 / (b * d)])})[0, 0]), 6)
750000.0
"""

from __future__ import annotations

import dataclasses

import numpy as np

from ..design import allowable_stress, combination_free
from .registry import Check, TextRule, register
from .section_class import memoised, web_shear

__all__ = ["SHEAR"]

_WEB = ("family", "kind", "strength_bending", "d", "tw", "tf", "t", "tf_top", "tf_bot")


def _demand(eff, props):
    return eff.V_abs * props["shear_factor"][:, None]


def _web(props):
    """web_shear of the candidates, or None for candidates without geometry (direct allowables)."""
    if not all(c in props for c in _WEB):
        return None
    return memoised(props, _WEB, "web", lambda: web_shear(props))  # depends on the sections alone


def _allowable(props, limits, eff):
    web = _web(props)
    factor = 1.0 if web is None else np.asarray(web[4], float)[:, None]
    return allowable_stress(props, limits, eff, "shear") * factor  # the user's limits or [design], x chi_w


def _details(eff, props) -> dict:
    """The web's slenderness hw / t, its limit 72 eps / eta, and lam_w, chi_w where it is beyond."""
    web = _web(props)
    if web is None or np.isnan(web[0][0]):
        return {"web": False}
    ratio, limit, lam, chi, factor = (float(x[0]) for x in web)
    none = lambda x: None if np.isnan(x) else x  # noqa: E731
    return {"web": True, "hw_over_t": ratio, "limit": limit, "lam_w": none(lam), "chi_w": none(chi),
            "factor": factor}


def _action(eff, c):
    return (("|V| max", float(eff.V_abs[0, c]), "force"),)


def _formula(eff, props, c):
    V, k = float(eff.V_abs[0, c]), float(props["shear_factor"][0])
    return ("τ = |V| × shear factor = ", (V, "force"), " × ", (k, "shear factor"), " = ", (V * k, "pressure"))


def _sheet_rows(chosen):
    """The default row; where the web buckles in shear, chi_w beside the limit."""
    from ..chosen import default_row

    rows = default_row(SHEAR, chosen)
    d = chosen.selection.result.details(chosen.index).get("shear", {})
    if not rows or d.get("chi_w") is None:
        return rows
    text = (f"× {d['factor']:.3f}: web shear buckling, hw/t = {d['hw_over_t']:.1f} > 72 ε / η = "
            f"{d['limit']:.1f}, λw = {d['lam_w']:.3f}, χw = {d['chi_w']:.3f}")
    return [dataclasses.replace(rows[0], rule=TextRule(text))]


SHEAR = register(Check(
    name="shear", label="shear", columns=("shear_factor", "strength_shear") + _WEB,
    demand=_demand, allowable=_allowable, kind="pressure", demand_key="tau",
    sentence="Shear stress τ = |V| × shear factor (the section's peak shear stress per unit shear "
             "force) against the shear stress limit; for steel webs with hw/t > 72 ε / η the limit is "
             "times min(1, χw), the shear buckling factor of EN 1993-1-5 Table 5.1 (non-rigid end post, "
             "λw = hw / (86.4 t ε), stiffeners at the supports only; η = 1.2 up to S460).",
    action=_action, sheet_rows=_sheet_rows, details=_details, formula=_formula,
    peaks_suffice=combination_free))
