"""The section listing for the terminal: the properties, stresses under a moment and notes."""

from __future__ import annotations

from ..units import display_factor, fmt
from . import labels
from .text import aligned_table

__all__ = ["section_text", "pieces_warning"]


def section_text(section, out: dict, extra: dict, units: str = "si", source: str = "") -> str:
    """The readable listing of a section.

    Parameters
    ----------
    section : leanspan.sections.section.Section
    out : dict
        The JSON-contract properties (SI).
    extra : dict
        What the listing adds: ``y_neutral``, ``GJ``, ``moment`` and ``stresses``, and the notes'
        flags ``torsion_reference`` and ``torsion_gross``.
    units : {"si", "us"}
    source : str
        The section file, named in the first line.
    """
    values = dict(out, **extra)
    rows = []
    for key in labels.SECTION_KEYS:
        if key in values:
            unit, factor = labels.unit(key, units)
            rows.append([labels.label(key), fmt(values[key] / factor), unit])
    lines = [f"Section {source}: {len(section.parts)} part(s)", aligned_table(None, rows, indent="  ")]
    if "stresses" in extra:
        unit, factor = display_factor("pressure", units)
        mu, mf = display_factor("moment", units)
        lines.append(f"Bending stress under M = {fmt(extra['moment'] / mf)} {mu} (tension +):")
        rows = [[name, "top", fmt(s["top"] / factor), unit, "bottom", fmt(s["bottom"] / factor), unit]
                for name, s in extra["stresses"].items()]
        lines.append(aligned_table(None, rows, indent="  "))
    if "EIz" in out and len({p.material for p in section.parts}) > 1:
        lines.append("  (the shear factor is from the geometry alone: with several materials the shear "
                     "stress in each part differs)")
    if extra.get("torsion_reference"):
        lines.append(f"  (J and Cw are transformed to part 1's material, {extra['torsion_reference']}: "
                     f"J = GJ / G of {extra['torsion_reference']})")
    if extra.get("torsion_gross"):
        lines.append("  (J, Cw and the shear centre are for the gross section: holes ignored)")
    return "\n".join(lines)


def pieces_warning(section, extra: dict, source: str = "") -> str:
    """The warning when holes cut the section into separate pieces ("" when they do not)."""
    if not extra.get("pieces_from_holes"):
        return ""
    return (f"{source}: the holes cut the section into {len(section.parts)} separate pieces "
            f"({extra['pieces_from_holes']} part table(s)); bending properties treat them as acting "
            "together, which holds only where they are joined along the member")
