"""Bending: the peak elastic fibre stress against the allowable bending stress.

sigma = max(M_max+, |M_min-|) / min(Sz_top, Sz_bot): a sagging moment M stresses the
bottom fibre M / Sz_bot (tension) and the top fibre M / Sz_top (compression); a
hogging one the reverse, so the smaller modulus governs either way (Navier's formula,
any mechanics-of-materials text).

>>> import numpy as np
>>> from leanspan.select.checks.registry import Effects
>>> nan = np.full((1, 1), np.nan)
>>> eff = Effects(np.array([[20e3]]), np.array([[-5e3]]), nan, nan, nan, ())
>>> float(BENDING.demand(eff, {"Sz_top": np.array([1e-4]), "Sz_bot": np.array([2e-4])})[0, 0])
200000000.0
"""

from __future__ import annotations

import numpy as np

from ..design import allowable_stress, combination_free
from .registry import Check, register

__all__ = ["BENDING"]


def _demand(eff, props):
    S_min = np.minimum(props["Sz_top"], props["Sz_bot"])[:, None]
    return np.maximum(np.maximum(eff.M_max, 0.0), np.maximum(-eff.M_min, 0.0)) / S_min


def _allowable(props, limits, eff):
    return allowable_stress(props, limits, eff, "bending")  # the user's limits or [design]


def _action(eff, c):
    """The sagging and hogging moments behind the demand (a zero one is left out)."""
    hi, lo = float(eff.M_max[0, c]), float(eff.M_min[0, c])
    out = ([("M max", hi, "moment")] if hi > 0 else []) + ([("M min", lo, "moment")] if lo < 0 else [])
    return tuple(out) or (("M", 0.0, "moment"),)


def _formula(eff, props, c):
    """σ = M / Sz with the governing moment and the smaller modulus (the fibre it stresses)."""
    hi, lo = float(eff.M_max[0, c]), float(eff.M_min[0, c])
    sag = max(hi, 0.0) >= max(-lo, 0.0)
    top, bot = float(props["Sz_top"][0]), float(props["Sz_bot"][0])
    M, S = (hi if sag else -lo), min(top, bot)
    side = "bottom" if bot <= top else "top"
    return ("σ = |M| / Sz," + side + " = ", (M, "moment"), " / ", (S, "section modulus"), " = ",
            (M / S, "pressure"))


BENDING = register(Check(
    name="bending", label="bending", columns=("Sz_top", "Sz_bot", "strength_bending"),
    demand=_demand, allowable=_allowable, kind="pressure", demand_key="sigma",
    sentence="Bending stress σ = M / Sz, the larger of M max / Sz bottom and |M min| / Sz top, "
             "against the bending stress limit.",
    action=_action, formula=_formula, peaks_suffice=combination_free))
