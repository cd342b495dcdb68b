"""Vibration: the fundamental frequency and the deflection under a 1 kN point load.

Active only when the job's ``[limits]`` set ``min_frequency`` (f1 of the member carrying its
own mass and the permanent loads turned into mass must be at least this) and/or
``point_deflection`` (the deflection under a point load at the middle of each span, at the
free end of each overhang, per unit force, must be at most this). ``permanent_cases``
names the load cases whose loads become mass (default: the self-weight case).

The demand has two columns, one per sub-check, so that the utilisation is the usual
demand / allowable: the period 1 / f1 against 1 / ``min_frequency`` (that is
``min_frequency / f1``), and the worst span's deflection per newton against
``point_deflection``. f1 comes from :func:`leanspan.beam.modal.fundamental_frequencies`
(the consistent-mass eigenproblem, see there what is exact), the deflections from the
static unit solve (exact).

>>> import numpy as np
>>> from leanspan.beam.model import BeamModel, Support, Stiffness
>>> from leanspan.select.checks.registry import Effects
>>> from leanspan.select.job import Limits
>>> model = BeamModel(5.0, (Support(0.0, "pin"), Support(5.0, "roller")), (Stiffness(0.0, 5.0, 1.0),))
>>> nan = np.full((1, 1), np.nan)
>>> lim = Limits(stress_factor=0.6, extra=(("min_frequency", 8.0),))
>>> eff = Effects(nan, nan, nan, nan, nan, (), None, np.array([2e6]), np.array([30.0]), model, lim)
>>> f1 = float(1 / VIBRATION.demand(eff, {})[0, 0])
>>> round(float(f1 / (np.pi / 2 * np.sqrt(2e6 / (30.0 * 5.0**4)))), 6)     # (pi/2) sqrt(EI / (m L^4))
1.0
"""

from __future__ import annotations

import numpy as np

from ...beam.modal import fundamental_frequencies, natural_frequency, point_flexibility
from ...errors import SelectionError
from .registry import Check, CheckRow, TextRule, register

__all__ = ["VIBRATION", "settings"]


def _active(limits) -> bool:
    return limits is not None and (limits.get("min_frequency") is not None
                                   or limits.get("point_deflection") is not None)


def settings(limits, model):
    """``(min_frequency or None, point_deflection or None, permanent cases)``, checked."""
    f_min, flex = limits.get("min_frequency"), limits.get("point_deflection")
    for key, value, word in (("min_frequency", f_min, "frequency such as \"8 Hz\""),
                             ("point_deflection", flex, "deflection per force such as \"1.5 mm/kN\"")):
        if value is not None and not value > 0:
            raise SelectionError(f"limits.{key}: expected a positive {word}, got {value:g} (SI)")
    cases = limits.get("permanent_cases")
    if cases is None:
        cases = (model.self_weight,) if model.self_weight is not None else ()
    for c in cases:
        if c not in model.cases:
            raise SelectionError(f"limits.permanent_cases: unknown load case {c!r} "
                                 f"(cases: {', '.join(model.cases) or 'none'})")
    return f_min, flex, tuple(cases)


def _demand(eff, props):
    f_min, flex, cases = settings(eff.limits, eff.model)
    K = np.size(eff.EI)
    out = np.full((K, 2), np.nan)
    if f_min is not None:
        f1 = fundamental_frequencies(eff.model, eff.EI, eff.mass_per_length, cases)
        out[:, 0] = np.where(f1 > 0, 1.0 / np.where(f1 > 0, f1, 1.0), np.inf)  # NaN or <= 0: fails
    if flex is not None:
        out[:, 1] = np.max(point_flexibility(eff.model, eff.EI)[1], axis=1)
    return out


def _allowable(props, limits, eff):
    f_min, flex = limits.get("min_frequency"), limits.get("point_deflection")
    return np.array([[np.nan if f_min is None else 1.0 / f_min, np.nan if flex is None else flex]])


def _demand_json(row) -> dict:
    return {"f1": None if np.isnan(row[0]) else float(1.0 / row[0]),
            "point_deflection": None if np.isnan(row[1]) else float(row[1])}


def _sheet_rows(chosen):
    """The frequency row (f1, where its mode peaks, the limit) and the 1 kN deflection row,
    from the screen's values for the chosen member (the numbers of the JSON)."""
    res, k = chosen.selection.result, chosen.index
    limits, model = chosen.selection.job.limits, chosen.selection.job.model
    f_min, flex, cases = settings(limits, model)
    row = res.columns["vibration"][k]
    governing = int(res.combination["vibration"][k])
    perm = "own mass" + "".join(f" + case {c}" for c in cases)
    out = []
    if f_min is not None:
        mode = natural_frequency(chosen.solution.model, chosen.member.mass_per_length, cases)
        f1 = 1.0 / row[0]
        out.append(CheckRow(
            check="vibration, fundamental frequency f1", combination=f"mass: {perm}",
            action=(("mode 1 peaks at x =", mode.peak, "span"),), demand=f1, limit=f_min, kind="frequency",
            utilisation=f_min / f1, rule=TextRule("minimum"),
            keys={"demand": "chosen.demands.f1", "limit": "limit.min_frequency",
                  "utilisation": "chosen.utilisation.vibration" if governing == 0
                  else "chosen.utilisation.vibration.f1"}))
    if flex is not None:
        xs, fl = point_flexibility(chosen.solution.model)
        j = int(np.argmax(fl[0]))
        out.append(CheckRow(
            check="vibration, deflection under 1 kN", combination="1 kN alone",
            action=(("1 kN at x =", float(xs[j]), "span"), ("v", -1e3 * row[1], "length")),
            demand=row[1], limit=flex, kind="compliance", utilisation=row[1] / flex, rule=TextRule("maximum"),
            keys={"demand": "chosen.demands.point_deflection", "limit": "limit.point_deflection",
                  "utilisation": "chosen.utilisation.vibration" if governing == 1
                  else "chosen.utilisation.vibration.point"}))
    return out


VIBRATION = register(Check(
    name="vibration", label="vibration", columns=(), demand=_demand, allowable=_allowable,
    kind="frequency", demand_key="f1",
    sentence="Vibration: the fundamental frequency f1 of the member carrying its own mass and the "
             "permanent loads as mass (consistent-mass eigenvalue of the beam model, supports, springs "
             "and hinges included) against the minimum frequency, and/or the deflection under a 1 kN "
             "point load at the middle of each span (free end of an overhang) against its limit.",
    covers=("vibration",),
    limit_keys={"min_frequency": "frequency", "point_deflection": "compliance", "permanent_cases": "names"},
    sheet_rows=_sheet_rows, active=_active, demand_json=_demand_json,
    details=lambda eff, props: _demand_json(_demand(eff, props)[0]),
    # the frequency and the point deflection come from the member's stiffness and mass alone
    peaks_suffice=lambda limits: True))
