"""Everything ``leanspan section`` reports about a section file, in SI values.

Geometry from :mod:`leanspan.sections`, transformed (composite) properties with the
catalogue's materials, bending stresses under a given moment, and torsion on the
gross section. It sits in ``select`` because it joins sections and the catalogue,
which know nothing of each other.

>>> from pathlib import Path
>>> a = analyse_section(Path(__file__).parents[2] / "data/examples/section-flitch.toml")
>>> round(a.values["EIz"] / 1e3), sorted(a.extra)[:2]
(2558, ['pna_y', 'pna_z'])
"""

from __future__ import annotations

from dataclasses import dataclass

from ..catalog.materials import material_lookup
from ..sections.io import load_section_file, section_from_spec
from ..sections.section import Section

__all__ = ["SectionAnalysis", "analyse_section"]


@dataclass(frozen=True)
class SectionAnalysis:
    """``values``: the JSON-contract keys (SI); ``extra``: what the text and sheet add
    (plastic axes, neutral axis, stresses, torsion notes); ``torsion``: the finite-element
    result or None."""

    section: Section
    values: dict
    extra: dict
    torsion: object = None
    notes: tuple = ()  # warnings (entities a drawing holds besides its shapes)


def load_any_section(path, layer_materials=None, drawing_units=None):
    """A section file (TOML) or a drawing (``.dxf``, :mod:`leanspan.sections.drawing`): the
    section, the raw table (empty for a drawing) and notes for warnings."""
    from pathlib import Path

    from ..errors import InputError

    if Path(path).suffix.lower() == ".dxf":
        from ..sections.drawing import load_drawing

        drawing = load_drawing(path, layer_materials, drawing_units, material_lookup())
        return drawing.section, {}, tuple(drawing.notes)
    if layer_materials or drawing_units:
        option = "--layer-material" if layer_materials else "--drawing-units"
        raise InputError(f"{option}: only for a drawing (FILE.dxf), not for the section file {path}")
    section, data = load_section_file(path)
    return section, data, ()


def analyse_section(path, torsion: bool = False, element_size: float | None = None,
                    moment: float | None = None, layer_materials=None,
                    drawing_units=None) -> SectionAnalysis:
    """Analyse the section file at ``path``.

    Parameters
    ----------
    torsion : bool
        Also J, Cw and the shear centre, by finite elements on the gross section (holes ignored).
    element_size : float, optional
        Element size (m) for the torsion mesh; default from the section's size.
    moment : float, optional
        A bending moment (N m, sagging positive): the stress at the top and bottom of each material.
    layer_materials, drawing_units
        For a drawing (``.dxf``): layer -> material names and the drawing unit (see
        :func:`leanspan.sections.drawing.load_drawing`).
    """
    section, data, notes = load_any_section(path, layer_materials, drawing_units)
    props = section.properties(private=True)
    out = {k: v for k, v in props.items() if not k.startswith("_")}
    extra = {"pna_y": props["_pna_y"], "pna_z": props["_pna_z"]}
    n_tables = len(data.get("part", []))
    if data.get("hole") and len(section.parts) > n_tables:
        extra["pieces_from_holes"] = n_tables
    lookup = material_lookup() if section.has_materials else None
    if section.has_materials:
        comp = section.composite(lookup)
        out.update(EIz=comp.EIz, EA=comp.EA, mass_per_length=comp.mass_per_length)
        extra["y_neutral"] = comp.y_neutral
        if moment is not None:
            extra["moment"] = moment
            extra["stresses"] = {k: {"top": a, "bottom": b} for k, (a, b) in comp.stresses(moment).items()}
    elif moment is not None:
        extra["moment"] = moment
        extra["stresses"] = {"(geometry)": {"top": -moment / out["Sz_top"], "bottom": moment / out["Sz_bot"]}}
    tors = None
    if torsion:
        from ..sections.torsion import torsion as solve_torsion  # scipy's sparse solver, when asked

        # torsion and warping on the gross section, as is common practice: a bolt hole seen in
        # the cross-section would cut a flange into strips free to slip along each other
        gross = section
        if data.get("hole"):
            gross = section_from_spec({k: v for k, v in data.items() if k != "hole"})
            extra["torsion_gross"] = True
        if gross.has_materials:
            G = [lookup(p.material).G for p in gross.parts]
            E = [lookup(p.material).E for p in gross.parts]
            tors = solve_torsion([p.polygon for p in gross.parts], G, element_size, elastic_moduli=E)
            extra["GJ"] = tors.J * tors.G_ref
            if len(set(G)) > 1:  # J and Cw are transformed to the first part's material
                extra["torsion_reference"] = gross.parts[0].material
        else:
            tors = solve_torsion([p.polygon for p in gross.parts], None, element_size)
        out.update(J=tors.J, Cw=tors.Cw, ys=tors.ys, zs=tors.zs)
        size = max(out["depth"], out["width"])
        for s_key, c_key in (("zs", "zc"), ("ys", "yc")):
            # the finite-element shear centre is good to about 1e-3 of the size: a shift below 1e-4
            # of it from the centroid is mesh noise (a symmetric section's lies on the axis), so the
            # JSON, the listing and the sheet all show the centroid's value
            if abs(out[s_key] - out[c_key]) < 1e-4 * size:
                out[s_key] = out[c_key]
        extra["torsion_elements"] = int(tors.mesh.triangles.shape[0]) if hasattr(tors.mesh, "triangles") else None
    return SectionAnalysis(section, out, extra, tors, notes)
