"""What a schedule minimises: mass, depth, cost or embodied carbon, per candidate section.

Every objective of a member with candidate j is ``a_i * v_j``: a member factor ``a_i`` times a
candidate value ``v_j``:

=========  ==========================  ======================================================
objective  member factor a_i           candidate value v_j
=========  ==========================  ======================================================
mass       count x length (m)          mass per length (kg/m)
depth      count                       overall depth (m)
cost       count x length (m)          price per metre: ``per_m``, or ``per_kg`` x kg/m
carbon     count x length (m)          kg/m x carbon factor (kg CO2e per kg of material)
=========  ==========================  ======================================================

This split is what lets the rationalisation (:mod:`.rationalise`) and the Pareto sets
(:mod:`.pareto`) work on one value per candidate.

Prices come from the user (``[[price]]`` entries by ``material``, ``series`` or ``kind``, per kg
or per metre); a candidate no entry prices has no cost (it cannot be chosen for
``objective = "cost"``). Carbon factors default to :data:`CARBON_FACTORS` by material kind and
are overridden by ``[carbon]`` (by material name or kind).

>>> t = parse_value_tables([{"material": "C24", "per_kg": 1.5}, {"kind": "steel", "per_m": 40}],
...                        {"C24": {"factor": 0.3, "source": "supplier sheet (invented)"}}, "")
>>> import numpy as np
>>> cols = {"material": np.array(["C24", "S355"]), "series": np.array(["sawn_metric", "gen_steel_i"]),
...         "kind": np.array(["timber", "steel"]), "mass_per_length": np.array([10.0, 20.0]),
...         "depth": np.array([0.2, 0.15])}
>>> t.values("cost", cols).tolist(), t.values("carbon", cols).tolist()
([15.0, 40.0], [3.0, 31.0])
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from ..errors import InputError, brief
from ..units import check_number

__all__ = ["OBJECTIVES", "UNITS", "CARBON_FACTORS", "ValueTables", "parse_value_tables", "member_factor"]

OBJECTIVES = ("mass", "depth", "cost", "carbon")
UNITS = {"mass": "kg", "depth": "m", "cost": "", "carbon": "kg CO2e"}

# Cradle-to-gate (modules A1-A3) embodied carbon per kg of material, fossil carbon only (the carbon
# stored in timber is not subtracted). All from memory of published inventory databases of
# construction materials (e.g. the ICE database of the University of Bath); they vary by mill,
# country and year: replace them with your supplier's environmental product declaration.
CARBON_FACTORS = {
    "steel": (1.55, "hot-rolled structural steel sections, world average, about 1.55 kg CO2e/kg (from memory)"),
    "stainless": (6.15, "stainless steel, general, about 6.15 kg CO2e/kg (from memory)"),
    "aluminium": (9.2, "aluminium extrusions, general mix, about 9 kg CO2e/kg (from memory)"),
    "timber": (0.26, "sawn softwood, kiln dried, about 0.26 kg CO2e/kg fossil (from memory)"),
    "glulam": (0.51, "glued laminated timber, about 0.51 kg CO2e/kg fossil (from memory)"),
}
_PRICE_KEYS = {"material", "series", "kind", "per_kg", "per_m"}


def member_factor(objective: str, count, length):
    """The member factor ``a_i`` (arrays of counts and lengths in m)."""
    count = np.asarray(count, float)
    return count if objective == "depth" else count * np.asarray(length, float)


@dataclass(frozen=True)
class ValueTables:
    """The user's prices and carbon factors (with their sources)."""

    prices: tuple = ()  # (material, series, kind, per_kg, per_m)
    carbon: dict = field(default_factory=dict)  # material or kind -> (factor, source)

    def values(self, objective: str, cols) -> np.ndarray:
        """v_j for candidates given as columns (``material``, ``series``, ``kind``,
        ``mass_per_length``, ``depth``); NaN where a candidate has no price."""
        mpl = np.asarray(cols["mass_per_length"], float)
        if objective == "mass":
            return mpl
        if objective == "depth":
            return np.asarray(cols["depth"], float)
        if objective == "carbon":
            return mpl * self.carbon_factors(cols)[0]
        return self.cost_per_metre(cols)

    def carbon_factors(self, cols):
        """(factor per candidate, source per candidate): the user's by material, then by kind,
        then the built-in by kind; NaN and "no factor" for a kind without one."""
        mats, kinds = np.asarray(cols["material"]).astype(str), np.asarray(cols["kind"]).astype(str)
        factor = np.full(mats.size, np.nan)
        source = np.full(mats.size, "no factor", dtype=object)
        for mat, kind in dict.fromkeys(zip(mats, kinds)):  # the distinct materials (a small set)
            got = self.carbon.get(mat) or self.carbon.get(kind) or CARBON_FACTORS.get(kind)
            if got is not None:
                hit = (mats == mat) & (kinds == kind)
                factor[hit] = got[0]
                source[hit] = got[1]
        return factor, source

    def cost_per_metre(self, cols) -> np.ndarray:
        """Price per metre of each candidate from the most specific matching entry (series and
        material, then series, then material, then kind); NaN where none matches."""
        mats, series, kinds = (np.asarray(cols[k]).astype(str) for k in ("material", "series", "kind"))
        mpl = np.asarray(cols["mass_per_length"], float)
        out = np.full(mats.size, np.nan)
        rank = np.full(mats.size, -1)
        for mat, ser, kind, per_kg, per_m in self.prices:  # a small user list
            hit = np.ones(mats.size, bool)
            for want, have in ((mat, mats), (ser, series), (kind, kinds)):
                if want is not None:
                    hit &= have == want
            score = 4 * (ser is not None) + 2 * (mat is not None) + (kind is not None)
            take = hit & (score > rank)
            out = np.where(take, per_m if per_m is not None else per_kg * mpl, out)
            rank = np.where(take, score, rank)
        return out

    def describe_carbon(self) -> list:
        """(name, factor, source) of every carbon factor in force, the user's first."""
        rows = [(k, f, s) for k, (f, s) in self.carbon.items()]
        return rows + [(k, f, s) for k, (f, s) in CARBON_FACTORS.items() if k not in self.carbon]


def parse_value_tables(prices, carbon, p: str = "") -> ValueTables:
    """``[[price]]`` entries and the ``[carbon]`` table -> :class:`ValueTables`."""
    entries = []
    if prices is not None:
        if isinstance(prices, dict):
            prices = [prices]
        if not isinstance(prices, list):
            raise InputError(f"{p}price: expected [[price]] tables, got {brief(prices)}")
        for i, e in enumerate(prices, 1):
            f = f"{p}price[{i}]"
            if not isinstance(e, dict):
                raise InputError(f"{f}: expected a table with material/series/kind and per_kg or per_m")
            for key in e:
                if key not in _PRICE_KEYS:
                    raise InputError(f"{f}.{key}: unknown key; expected {', '.join(sorted(_PRICE_KEYS))}")
            names = []
            for key in ("material", "series", "kind"):
                v = e.get(key)
                if v is not None and (not isinstance(v, str) or not v.strip()):
                    raise InputError(f"{f}.{key}: expected a name, got {brief(v)}")
                names.append(v)
            if all(v is None for v in names):
                raise InputError(f"{f}: give material, series or kind (what the price is for)")
            if ("per_kg" in e) == ("per_m" in e):
                raise InputError(f"{f}: give per_kg or per_m (a price per kg or per metre of member), one of them")
            key = "per_kg" if "per_kg" in e else "per_m"
            value = check_number(e[key], "factor", f"{f}.{key}", InputError, "a price (a number, e.g. 1.8)")
            if not value >= 0:
                raise InputError(f"{f}.{key}: expected a price of 0 or more, got {brief(e[key])}")
            entries.append((*names, value if key == "per_kg" else None, value if key == "per_m" else None))
    table = {}
    if carbon is not None:
        if not isinstance(carbon, dict):
            raise InputError(f"{p}carbon: expected a table of material or kind = factor, got {brief(carbon)}")
        for name, v in carbon.items():
            f = f"{p}carbon.{name}"
            source = "given in the schedule"
            if isinstance(v, dict):
                extra = set(v) - {"factor", "source"}
                if extra or "factor" not in v:
                    raise InputError(f"{f}: expected a number or {{factor = 1.2, source = \"...\"}}, got {brief(v)}")
                source = v.get("source", source)
                if not isinstance(source, str):
                    raise InputError(f"{f}.source: expected a text, got {brief(source)}")
                v = v["factor"]
            value = check_number(v, "factor", f, InputError, "kg CO2e per kg of material (a number)")
            if not value >= 0:
                raise InputError(f"{f}: expected a factor of 0 or more, got {brief(v)}")
            table[name] = (value, source)
    return ValueTables(tuple(entries), table)
