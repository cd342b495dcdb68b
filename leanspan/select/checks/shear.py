"""Shear: the peak shear stress tau = |V| x shear factor against the allowable shear stress.

The shear factor is the section's max over y of Q(y) / (Iz b(y)) (Jourawski's formula,
any mechanics-of-materials text), so tau is the peak of V Q / (I b) over the depth.

>>> import numpy as np
>>> from leanspan.select.checks.registry import Effects
>>> nan = np.full((1, 1), np.nan)
>>> eff = Effects(nan, nan, np.array([[10e3]]), nan, nan, ())
>>> b, d = 0.1, 0.2      # rectangle: tau max = 1.5 V / (b d)
>>> round(float(SHEAR.demand(eff, {"shear_factor": np.array([1.5 / (b * d)])})[0, 0]), 6)
750000.0
"""

from __future__ import annotations

from ..design import allowable_stress
from .registry import Check, register

__all__ = ["SHEAR"]


def _demand(eff, props):
    return eff.V_abs * props["shear_factor"][:, None]


def _allowable(props, limits, eff):
    return allowable_stress(props, limits, eff, "shear")  # the user's limits or [design]


def _action(eff, c):
    return (("|V| max", float(eff.V_abs[0, c]), "force"),)


SHEAR = register(Check(
    name="shear", label="shear", columns=("shear_factor", "strength_shear"),
    demand=_demand, allowable=_allowable, kind="pressure", demand_key="tau",
    sentence="Shear stress τ = |V| × shear factor (the section's peak shear stress per unit shear "
             "force) against the shear stress limit.",
    action=_action))
