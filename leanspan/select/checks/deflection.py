"""Deflection: the largest |v| of every span and overhang against its combination's limit.

The effects carry, per candidate and deflection combination, the worst span's |v| and
its allowed value (``"span/360"`` of that span, or a length), so the utilisation is
|v| / allowed of the span closest to its limit.

>>> import numpy as np
>>> from leanspan.select.checks.registry import Effects
>>> nan = np.full((1, 1), np.nan)
>>> eff = Effects(nan, nan, nan, np.array([[0.012]]), np.array([[4.8 / 360]]), ())
>>> round(float(DEFLECTION.demand(eff, {})[0, 0] / DEFLECTION.allowable({}, None, eff)[0, 0]), 4)
0.9
"""

from __future__ import annotations

from .registry import Check, CheckRow, register

__all__ = ["DEFLECTION"]


def _demand(eff, props):
    return eff.v_abs


def _allowable(props, limits, eff):
    return eff.v_allowed


def _sheet_rows(chosen):
    """One row per span and deflection combination, from the chosen member's exact solution."""
    sol = chosen.solution
    rules = {c.name: c.limit for c in sol.model.combinations}
    rows = [(n, c) for n, r in sol.results.items() if r.kind == "combination" for c in r.deflection_checks]
    if not rows:
        return []
    worst = max(range(len(rows)), key=lambda i: rows[i][1]["utilisation"])
    out = []
    for i, (name, c) in enumerate(rows):
        key = "deflection" if i == worst else f"deflection.{i}"
        out.append(CheckRow(
            check=f"deflection, {c['kind']} {c['span']}", combination=name,
            action=(("v", c["v_extreme"], "length"), ("at x =", c["at"], "span")),
            demand=abs(c["v_extreme"]), limit=c["allowed"], kind="length",
            utilisation=c["utilisation"], rule=rules.get(name),
            formula=("|v| = ", (abs(c["v_extreme"]), "length"), " at x = ", (c["at"], "span"), " ≤ allowed ",
                     (c["allowed"], "length"), f" ({c['limit']} of the {c['kind']}, "
                     f"length ", (c["to"] - c["from"], "span"), ")"),
            keys={"demand": "chosen.demands.v_abs" if i == worst else None, "limit": None,
                  "utilisation": f"chosen.utilisation.{key}"}))
    return out


DEFLECTION = register(Check(
    name="deflection", label="deflection", columns=(),
    demand=_demand, allowable=_allowable, kind="length", demand_key="v_abs",
    sentence="Deflection |v| of every span and overhang against each deflection combination's "
             "limit (for an overhang, span means the overhang length).",
    sheet_rows=_sheet_rows, peaks_suffice=lambda limits: True))
