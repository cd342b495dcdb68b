"""Local buckling: the section class of every metal candidate, and bending on its effective section.

Every steel, stainless and aluminium candidate is classified from its width-to-thickness ratios
(:mod:`.section_class`: EN 1993-1-1 Table 5.2, EN 1993-1-4 Table 5.2, EN 1999-1-1 6.1.4), for
sagging and for hogging separately. The demand is the bending stress on the effective section,
``max(M_max / S_sag, |M_min| / S_hog)``, against the bending stress limit, where S is the smaller
elastic modulus: the gross one for classes 1 to 3 (so the utilisation equals the bending check's;
plastic resistance of classes 1 and 2 is not used, which is conservative), and for class 4 by the
job's ``[limits] slender_sections``:

- ``"exclude"`` (default): a class 4 candidate fails (utilisation ``inf``) wherever a moment of
  the sign that makes it class 4 acts;
- ``"effective"``: S_eff of the effective section (EN 1993-1-5 4.4 effective widths, flanges first
  then webs; aluminium: effective thickness), see :mod:`.section_class`. Class 4 tubes still fail.

Timber and solid bars have no plate elements: their utilisation is the bending check's.

>>> import numpy as np
>>> from leanspan.select.checks.registry import Effects
>>> from leanspan.select.job import Limits
>>> nan = np.full((1, 1), np.nan)
>>> p = {"family": np.array(["box"]), "kind": np.array(["steel"]), "strength_bending": np.array([355e6]),
...      "E": np.array([210e9]), "d": np.array([0.4]), "b": np.array([0.4]), "t": np.array([0.005]),
...      "A": np.array([7.9e-3]), "yc": np.array([0.2]), "Iz": np.array([2.02e-4]), "depth": np.array([0.4]),
...      "Sz_top": np.array([1.01e-3]), "Sz_bot": np.array([1.01e-3])}
>>> eff = Effects(np.array([[100e3]]), np.array([[0.0]]), nan, nan, nan, (), limits=Limits(stress_factor=1.0))
>>> float(LOCAL_BUCKLING.demand(eff, p)[0, 0])   # flange (400 - 15)/5 = 77 > 42 eps: class 4, excluded
inf
"""

from __future__ import annotations

import dataclasses

import numpy as np

from ...errors import SelectionError
from ..design import allowable_stress, combination_free
from .bending import BENDING
from .registry import Check, TextRule, register
from .section_class import METALS, classify, effective_moduli, elements, epsilon, memoised

__all__ = ["LOCAL_BUCKLING", "CHOICES", "slender_choice"]

CHOICES = ("exclude", "effective")
_DIMS = ("d", "b", "tw", "tf", "t", "r", "b_top", "tf_top", "b_bot", "tf_bot")
_NEEDED = ("family", "kind", "strength_bending", "E", "A", "yc", "Iz", "depth", "Sz_top", "Sz_bot")
_COLUMNS = _NEEDED + _DIMS  # a dimension a family does not use may be absent


def slender_choice(limits) -> str:
    """The job's ``slender_sections`` choice, checked."""
    value = "exclude" if limits is None else limits.get("slender_sections", "exclude")
    if value not in CHOICES:
        raise SelectionError(f"limits.slender_sections: expected {' or '.join(repr(c) for c in CHOICES)}, "
                             f"got {value!r}")
    return value


def _active(limits) -> bool:
    slender_choice(limits)  # always runs; a bad choice is an input error
    return True


_BLOCK = 8192  # candidates classified at a time


def _moduli(props, limits):
    """S for sagging and hogging (K,) by the job's choice, and the two classifications."""
    choice = slender_choice(limits)
    gross = np.minimum(np.asarray(props["Sz_top"], float), np.asarray(props["Sz_bot"], float))
    out = []
    parts = (elements(props), np.asarray(props["kind"]).astype(str), epsilon(props))  # for both signs
    for sign in (1.0, -1.0):
        cls = classify(props, sign, parts)
        if choice == "effective":
            S = effective_moduli(props, sign)[0]
        else:
            S = np.where(cls.section_class == 4, 0.0, gross)
        out.append((S, cls))
    return out


def _metal_moduli(props, limits):
    """S for sagging and hogging (K,), classifying the metal candidates only: the others keep the
    gross modulus (they have no plates to classify), which :func:`_moduli` would give them too.
    Worked out once for a shared table's arrays (:func:`.section_class.memoised`)."""
    return memoised(props, _COLUMNS, ("metal", slender_choice(limits)), lambda: _metal_moduli_of(props, limits))


def _metal_moduli_of(props, limits):
    gross = np.minimum(np.asarray(props["Sz_top"], float), np.asarray(props["Sz_bot"], float))
    metal = np.isin(np.asarray(props["kind"]).astype(str), METALS)
    out = [gross.copy(), gross.copy()]
    rows = np.flatnonzero(metal)
    for start in range(0, rows.size, _BLOCK):  # blocks that keep the (K, 4) plate arrays in cache
        take = rows[start:start + _BLOCK]
        sub = {c: np.asarray(v)[take] for c, v in props.items()}
        for S, (S_metal, _) in zip(out, _moduli(sub, limits)):
            S[take] = S_metal
    return out


def _demand(eff, props):
    if any(c not in props for c in _NEEDED):  # candidates without geometry (direct allowables)
        return np.full(eff.M_max.shape, np.nan)
    S_sag, S_hog = _metal_moduli(props, eff.limits)
    with np.errstate(divide="ignore", invalid="ignore"):
        sag = np.where(eff.M_max > 0, eff.M_max / S_sag[:, None], 0.0)
        hog = np.where(eff.M_min < 0, -eff.M_min / S_hog[:, None], 0.0)
    return np.where(np.isnan(eff.M_max), np.nan, np.maximum(sag, hog))


def _allowable(props, limits, eff):
    return allowable_stress(props, limits, eff, "bending")  # the user's limits or [design]


def _details(eff, props) -> dict:
    """One candidate's class (sagging, hogging and the governing one), its governing element, ratio
    and class 3 limit, eps, and the modulus the check used."""
    if any(c not in props for c in _NEEDED):
        return {"section_class": 0}
    (S_sag, c_sag), (S_hog, c_hog) = _moduli(props, eff.limits)
    sag_acts = bool(np.any(eff.M_max > 0)) or not bool(np.any(eff.M_min < 0))
    hog_acts = bool(np.any(eff.M_min < 0))
    pick_hog = hog_acts and (not sag_acts or int(c_hog.section_class[0]) > int(c_sag.section_class[0]))
    cls, S = (c_hog, S_hog) if pick_hog else (c_sag, S_sag)
    k = int(cls.section_class[0])
    out = {"section_class": k, "class_sagging": int(c_sag.section_class[0]),
           "class_hogging": int(c_hog.section_class[0]), "moment": "hogging" if pick_hog else "sagging",
           "slender_sections": slender_choice(eff.limits)}
    if str(np.asarray(props["kind"])[0]) not in METALS or int(cls.element[0]) < 0:
        return out
    rho = 1.0
    if k == 4 and out["slender_sections"] == "effective":
        rho = float(effective_moduli(props, -1.0 if pick_hog else 1.0)[1][0, int(cls.element[0])])
    out.update(element=cls.element_name(0), ratio=float(cls.ratio[0]), limit=float(cls.limit[0]),
               epsilon=float(epsilon(props)[0]), fy=float(np.asarray(props["strength_bending"])[0]),
               rho=rho, S=float(S[0]))
    return out


def _sheet_rows(chosen):
    """The default row, with the class beside the limit."""
    from ..chosen import default_row

    rows = default_row(LOCAL_BUCKLING, chosen)
    d = chosen.selection.result.details(chosen.index).get("local_buckling", {})
    if not rows or "element" not in d:
        return rows
    what = "β" if str(chosen.row["kind"]) == "aluminium" else ("d/t" if d["element"] == "wall" else "c/t")
    text = (f"class {d['section_class']} ({d['moment']}): {d['element']} {what} {d['ratio']:.1f} vs class 3 "
            f"limit {d['limit']:.1f}, ε = {d['epsilon']:.3f}")
    if d["section_class"] == 4:
        text += (f"; effective section, ρ = {d['rho']:.3f}" if d["slender_sections"] == "effective"
                 else "; excluded (slender_sections = \"exclude\")")
    return [dataclasses.replace(rows[0], rule=TextRule(text))]


LOCAL_BUCKLING = register(Check(
    name="local_buckling", label="local buckling", columns=_COLUMNS,
    demand=_demand, allowable=_allowable, kind="pressure", demand_key="sigma_eff",
    sentence="Local buckling: metal sections are classified from their width-to-thickness ratios "
             "(steel EN 1993-1-1 Table 5.2, stainless EN 1993-1-4 Table 5.2, aluminium EN 1999-1-1 "
             "6.1.4; sagging and hogging apart); classes 1 to 3 are checked on the gross elastic "
             "modulus (plastic resistance of classes 1 and 2 is not used: conservative), class 4 "
             "sections are excluded or checked as M / S_eff on the effective section (EN 1993-1-5 4.4 "
             "effective widths, flanges then webs), as [limits] slender_sections says.",
    covers=("local_buckling",), limit_keys={"slender_sections": "text"},
    action=BENDING.action, active=_active, sheet_rows=_sheet_rows, details=_details,
    peaks_suffice=combination_free))
