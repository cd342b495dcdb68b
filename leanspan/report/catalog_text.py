"""The catalogue listing: the terminal table and the CSV export with unit headers."""

from __future__ import annotations

from ..units import fmt
from . import labels
from .text import aligned_table, csv_text

__all__ = ["catalog_text", "catalog_csv"]

_KEY_LINE = ("Iz: about the horizontal axis (bending under vertical load); Sz_top, Sz_bot: elastic section moduli to the top "
             "and bottom fibres; Zz: plastic modulus; Iy: about the vertical axis.")
_TEXT_COLUMNS = ("name", "series", "material")
_CSV_COLUMNS = ("name", "family", "series", "material", "kind")


def catalog_text(df, units: str = "si") -> str:
    """The catalogue table (``df`` from :func:`leanspan.catalog.table.catalog_table`) for the
    terminal: name, series, material and the main properties in display units, then a key line."""
    keys = labels.CATALOG_TABLE_KEYS
    heads = list(_TEXT_COLUMNS) + [f"{labels.short(k)} [{labels.unit(k, units)[0]}]" for k in keys]
    cols = [df[c].to_numpy() for c in _TEXT_COLUMNS]
    cols += [[fmt(float(v) / labels.unit(k, units)[1]) for v in df[k].to_numpy()] for k in keys]
    rows = [[str(col[i]) for col in cols] for i in range(len(df))]
    table = aligned_table(heads, rows)
    note = labels.generated_note(set(df["series"]))
    return f"{table}\n{len(df)} sections. {_KEY_LINE}" + (f"\n{note}" if note else "")


def catalog_csv(df, units: str = "si") -> str:
    """Every column of the catalogue as CSV; properties carry their unit in the header
    (``Iz [mm^4]``, mm-based or, with ``units="us"``, inch-based), so the file reads back as a
    user catalogue."""
    keyed = [k for k in labels.CATALOG_CSV_KEYS if k in df]
    return csv_text(list(_CSV_COLUMNS) + keyed, df, {k: labels.unit(k, units) for k in keyed})
