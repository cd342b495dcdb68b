"""The chosen member of a selection, rebuilt for the sheet: its row, its beam, its section.

The selection screens candidates by array arithmetic; the sheet re-solves the beam
once with the chosen member's own EI and self-weight, so its diagrams, reactions
and deflection checks are the beam solver's exact results for that member.
"""

from __future__ import annotations

import dataclasses

__all__ = ["chosen_row", "member_model", "member_solution", "member_section"]


def chosen_row(sel):
    """The catalogue row (pandas Series) of the chosen candidate, else of the closest one."""
    return sel.table.iloc[int(sel.order[0])]


def member_model(sel, row=None):
    """The job's beam with the member's EI = E Iz and its mass per length for self-weight."""
    from ..beam import Stiffness

    row = chosen_row(sel) if row is None else row
    job = sel.job
    L = job.model.length
    return dataclasses.replace(job.model, stiffness=(Stiffness(0.0, L, float(row["E"]) * float(row["Iz"])),),
                               mass_per_length=float(row["mass_per_length"]),
                               self_weight=job.search.self_weight)


def member_solution(sel, row=None):
    """:func:`leanspan.beam.solve` of :func:`member_model`."""
    from ..beam import solve

    return solve(member_model(sel, row))


def member_section(candidate: dict):
    """The candidate's section (one part of its material) and its properties, with the
    neutral axis; for one material it lies at the centroid.

    >>> sec, props = member_section({"family": "rectangle", "dims": {"b": 0.1, "d": 0.2},
    ...                              "material": "C24"})
    >>> round(props["Iz"] * 1e12), round(props["y_neutral"], 6)
    (66666667, 0.1)
    """
    from ..errors import LeanspanError
    from ..sections.io import material_lookup
    from ..sections.section import Section, polygon_from_family

    poly = polygon_from_family(candidate["family"], candidate["dims"], where=candidate.get("name", "section"))
    section = Section.from_polygons([poly], [candidate.get("material")])
    props = section.properties()
    try:
        comp = section.composite(material_lookup())
        props["y_neutral"] = comp.y_neutral
    except LeanspanError:  # a material only a user file knows: one material, so at the centroid
        props["y_neutral"] = props["yc"]
    return section, props
