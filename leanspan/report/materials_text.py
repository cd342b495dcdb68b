"""The materials listing: the terminal table and the CSV export with unit headers."""

from __future__ import annotations

from ..units import fmt
from . import labels
from .text import aligned_table, csv_text

__all__ = ["materials_text", "materials_csv"]


def materials_text(rows, units: str = "si") -> str:
    """The materials (:class:`leanspan.catalog.materials.Material` rows) as an aligned table."""
    keys = labels.MATERIAL_KEYS
    heads = ["name", "kind"] + [f"{labels.short(k)} [{labels.unit(k, units)[0]}]" for k in keys] \
        + ["basis", "source"]
    body = [[m.name, m.kind] + ["-" if getattr(m, k) is None else fmt(getattr(m, k) / labels.unit(k, units)[1])
                                for k in keys]
            + [m.basis, m.source] for m in rows]
    return aligned_table(heads, body)


def materials_csv(rows, units: str = "si") -> str:
    """The materials as CSV with unit headers (``E [MPa]``), readable back as a user materials file."""
    keys = labels.MATERIAL_KEYS
    columns = ["name", "kind", "group", *keys, "basis", "source"]
    body = ([m.name, m.kind, m.group] + [float("nan") if getattr(m, k) is None else getattr(m, k) for k in keys]
            + [m.basis, m.source] for m in rows)  # not given: an empty cell
    return csv_text(columns, body, {k: labels.unit(k, units) for k in keys})
