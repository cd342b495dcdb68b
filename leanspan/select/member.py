"""The member: a section of a material, as the beam and the checks see it.

One place turns a section + material into the numbers a beam and the checks need:
flexural stiffness EI (about the horizontal axis), EA, GJ, mass per length and the
section properties. :func:`member_from_section` serves any section (composites
included, transformed by the materials' moduli); :func:`member_from_row` a catalogue
row; :func:`member_arrays` the whole candidate table at once (arrays along the rows);
:func:`section_stiffness` is what ``leanspan beam`` hands the beam parser for a
``section`` + ``material``; :func:`beam_with_member` puts a member into a beam model.

Examples
--------
>>> from leanspan.sections.io import section_from_spec
>>> from leanspan.catalog.materials import material_lookup
>>> sec = section_from_spec({"units": "mm", "material": "C24",
...                          "part": [{"shape": "rectangle", "b": 100, "d": 200}]})
>>> m = member_from_section(sec, material_lookup())
>>> round(m.EI / 1e3, 1), round(m.mass_per_length, 3)   # 11 GPa x b d^3 / 12; 420 kg/m^3 x A
(733.3, 8.4)
"""

from __future__ import annotations

import dataclasses
from dataclasses import dataclass, field
from pathlib import Path

import weakref

import numpy as np

from ..beam import Stiffness
from ..catalog.materials import material_lookup
from ..catalog.table import catalog_table, row_dims
from ..errors import InputError, LeanspanError
from ..fileio import is_file, load_toml
from ..sections.io import section_from_spec
from ..sections.section import Section, polygon_from_family
from ..sections.thin_walled import FAMILY_DIMENSIONS, thin_walled_torsion

__all__ = ["Member", "member_from_section", "member_from_row", "member_arrays", "family_section",
           "section_stiffness", "beam_with_member"]


@dataclass(frozen=True)
class Member:
    """A section of a material (SI units).

    Attributes
    ----------
    name, material : str
    EI : float
        Flexural stiffness about the horizontal axis, E Iz (transformed for composites), N m².
    EA : float
        Axial stiffness, N.
    GJ : float or None
        Torsional stiffness (closed form for the built-in families), N m²; None where
        not computed (custom outlines: ``leanspan section --torsion`` gives it).
    mass_per_length : float
        kg/m.
    properties : dict
        Section properties (``A``, ``Iz``, ``Sz_top`` ... as in the JSON contract) and, for
        one material, its ``E``, ``G``, ``strength_bending``, ``strength_shear``.
    y_neutral : float
        Height of the (modulus-weighted) neutral axis above the base, m.
    section : Section or None
        The geometry, where built.
    """

    name: str
    material: str
    EI: float
    EA: float
    GJ: float | None
    mass_per_length: float
    properties: dict = field(default_factory=dict)
    y_neutral: float = float("nan")
    section: Section | None = None


def member_from_section(section: Section, lookup, name: str = "section") -> Member:
    """The member of a section whose parts carry materials; ``lookup(name) -> Material``.

    Raises
    ------
    InputError
        No part carries a material.
    """
    if not section.has_materials:
        raise InputError(f"{name}: no material; give `material` beside the section or in its parts")
    comp = section.composite(lookup)
    props = section.properties()
    names = sorted({p.material for p in section.parts})
    if len(names) == 1:
        mat = lookup(names[0])
        props.update(E=mat.E, G=mat.G, density=mat.density, strength_bending=mat.strength_bending,
                     strength_shear=mat.strength_shear)
    return Member(name, " + ".join(names), comp.EIz, comp.EA, None, comp.mass_per_length, props,
                  comp.y_neutral, section)


def family_section(family: str, dims: dict, material: str | None, name: str = "section") -> Section:
    """The one-part section of a shape family with dimensions ``dims`` (m)."""
    return Section.from_polygons([polygon_from_family(family, dims, where=name)], [material])


def _closed_form_GJ(family, dims, G):
    if family not in FAMILY_DIMENSIONS:
        return None
    try:
        J = thin_walled_torsion(family, {k: np.asarray([v]) for k, v in dims.items()})["J"]
    except LeanspanError:
        return None
    return float(np.asarray(J).ravel()[0]) * float(G)


def member_from_row(row, with_section: bool = True) -> Member:
    """The member of one catalogue row (a pandas Series or a dict of its columns).

    EI = E Iz and the mass per length are the row's own (so the member equals the
    candidate that was screened); GJ comes from the family's closed form.

    >>> from leanspan.catalog.table import catalog_table
    >>> row = catalog_table(families=["glulam"]).iloc[0]
    >>> m = member_from_row(row)
    >>> bool(m.EI == row["E"] * row["Iz"]), bool(abs(m.section.properties()["Iz"] / row["Iz"] - 1) < 1e-12)
    (True, True)
    """
    get = row.get if hasattr(row, "get") else row.__getitem__
    if str(get("family")) == "flitch":
        return _flitch_member(row, get, with_section)
    dims = row_dims(row)
    E, Iz, A = float(get("E")), float(get("Iz")), float(get("A"))
    props = {k: float(v) for k, v in dict(row).items()
             if isinstance(v, (int, float, np.floating)) and not isinstance(v, bool)}
    section = family_section(str(get("family")), dims, str(get("material")), str(get("name"))) \
        if with_section else None
    y_n = float(get("yc"))  # one material: the neutral axis is at the centroid
    return Member(str(get("name")), str(get("material")), E * Iz, E * A,
                  _closed_form_GJ(str(get("family")), dims, get("G")), float(get("mass_per_length")),
                  props, y_n, section)


def _flitch_member(row, get, with_section):
    """A built-up flitch row: its transformed EI and mass, the section from its parts."""
    from .built_up_flitch import flitch_spec

    props = {k: float(v) for k, v in dict(row).items()
             if isinstance(v, (int, float, np.floating)) and not isinstance(v, bool)}
    section = section_from_spec(flitch_spec(row_dims(row), str(get("timber_material")),
                                            str(get("plate_material")))) if with_section else None
    E = float(get("E"))
    EA = section.composite(material_lookup()).EA if section is not None else float("nan")
    return Member(str(get("name")), str(get("material")), E * float(get("Iz")), EA,
                  float(get("G")) * float(get("J")), float(get("mass_per_length")), props,
                  float(get("yc")), section)


def member_arrays(df, columns=()) -> dict:
    """EI, mass per length and the named property columns of every row, as float arrays.

    >>> import pandas as pd
    >>> out = member_arrays(pd.DataFrame({"E": [2e11], "Iz": [1e-5], "mass_per_length": [30.0],
    ...                                   "Sz_top": [1e-4]}), ["Sz_top"])
    >>> round(float(out["EI"][0])), float(out["Sz_top"][0])
    (2000000, 0.0001)
    """
    cache = _shared_columns(df)
    for c in ("EI", "mass_per_length", *columns):
        if c not in cache:  # numbers as floats; text columns (kind, series, family) as numpy text
            if c == "EI":
                col = df["E"].to_numpy(float) * df["Iz"].to_numpy(float)
            else:
                col = df[c].to_numpy()
                col = col.astype(float) if col.dtype.kind in "biuf" else col.astype(str)
            cache[c] = col
    return {c: cache[c] for c in ("EI", "mass_per_length", *columns)}


_SHARED: dict = {}  # id(table) -> (weak reference, {column: array}) of the tables shared read-only


def share_table_arrays(df) -> None:
    """Declare table ``df`` read-only from now on, so that :func:`member_arrays` takes each of its
    columns once and every later screen of it reuses the arrays (a schedule screens one table for
    every member; pandas column access then costs more than a small screen's arithmetic). Do not
    change ``df`` afterwards."""
    entry = _SHARED.get(id(df))
    if entry is None or entry[0]() is not df:
        _SHARED[id(df)] = (weakref.ref(df), _ReadOnlyColumns())
        weakref.finalize(df, _SHARED.pop, id(df), None)  # the arrays go with their table


def _shared_columns(df) -> dict:
    """The column arrays kept for a shared table; a fresh dict (nothing kept) for any other."""
    entry = _SHARED.get(id(df))
    return entry[1] if entry is not None and entry[0]() is df else {}


def shared_name_ranks(df):
    """The rank of each row's name in text order, kept for a shared table (None for any other)."""
    cache = _shared_columns(df)
    if not isinstance(cache, _ReadOnlyColumns):
        return None
    if "_name_rank" not in cache:
        cache["_name_rank"] = np.unique(df["name"].to_numpy().astype(str), return_inverse=True)[1].ravel()
    return cache["_name_rank"]


class _ReadOnlyColumns(dict):
    """The kept arrays of a shared table, each made read-only as it is stored: the checks may
    then keep results per array (see :func:`leanspan.select.checks.section_class.memoised`)."""

    def __setitem__(self, key, value):
        value.flags.writeable = False
        super().__setitem__(key, value)


def section_stiffness(spec, material, base_dir, field: str = "beam.section", units=None, catalog=None):
    """EI (N m²) and mass per length (kg/m) of a beam's ``section`` + ``material``.

    The stiffness maker :func:`leanspan.beam.parse_beam` takes (the beam package knows
    no sections). ``spec`` is a section file (relative to ``base_dir``), an inline table,
    or a name from the catalogue as ``leanspan select`` prints it (``"rect 47x200"``),
    looked up in the built-in series and in the supplier list ``catalog`` if given;
    ``material`` is then the grade (default: the row's own). ``units`` is the job file's
    unit system, used for an inline table's bare numbers.

    >>> from leanspan.units import UnitSystem
    >>> EI, mass = section_stiffness({"part": [{"shape": "rectangle", "b": 100, "d": 200}]},
    ...                              "C24", ".", units=UnitSystem.from_spec("mm"))
    >>> round(EI / 1e3, 1), round(mass, 3)
    (733.3, 8.4)
    >>> EI, mass = section_stiffness("rect 100x200", "C24", ".")   # a catalogue name
    >>> round(EI / 1e3, 1), round(mass, 3)
    (733.3, 8.4)
    """
    if isinstance(spec, str) and not is_file(Path(base_dir) / spec) and not spec.endswith(".toml"):
        return _catalogue_stiffness(spec, material, catalog, field)
    if isinstance(spec, str):
        path = Path(base_dir) / spec
        data, where, units = load_toml(path), "section", None  # a file declares its own units
    elif isinstance(spec, dict):
        data, where = spec, field
    else:
        raise InputError(f"{field}: expected a section file name, a catalogue name or a table, got {spec!r}")
    if material is not None:
        data = dict(data)
        data["material"] = material
    try:
        section = section_from_spec(data, where, units)
        member = member_from_section(section, material_lookup(), field)
    except InputError as exc:
        if isinstance(spec, str):
            raise type(exc)(f"{path}: {exc}") from None
        raise
    return member.EI, member.mass_per_length


def _catalogue_stiffness(name, material, catalog, field):
    """EI and mass of the catalogue (or supplier-list) row called ``name``, in ``material``."""
    import difflib

    df = catalog_table(user_csv=catalog, builtin=True)
    rows = df[df["name"] == name]
    if not len(rows):
        near = difflib.get_close_matches(name, list(dict.fromkeys(df["name"])), n=3, cutoff=0.6)
        hint = f"; near names: {', '.join(near)}" if near else ""
        raise InputError(f"{field}: {name!r} is neither a section file nor a catalogue name"
                         f"{' in the built-in series or ' + str(catalog) if catalog else ''}{hint}")
    if material is not None:
        rows = catalog_table(user_csv=catalog, builtin=True, materials=[material])
        rows = rows[rows["name"] == name]
        if not len(rows):
            raise InputError(f"{field}: {name!r} does not come in {material!r} (its grades: "
                             f"{', '.join(sorted(set(df[df['name'] == name]['material'])))})")
    elif len(set(rows["material"])) > 1:
        raise InputError(f"{field}: {name!r} comes in {', '.join(sorted(set(rows['material'])))}; "
                         "give beam.material")
    m = member_from_row(rows.iloc[0], with_section=False)
    return m.EI, m.mass_per_length


def beam_with_member(model, member: Member | None = None, *, EI=None, mass_per_length=None,
                     self_weight=None):
    """The beam ``model`` with a prismatic member's EI and mass per length (for self-weight
    in case ``self_weight``; None leaves the member weightless)."""
    EI = member.EI if member is not None else EI
    mass = member.mass_per_length if member is not None else mass_per_length
    return dataclasses.replace(model, stiffness=(Stiffness(0.0, model.length, float(EI)),),
                               mass_per_length=float(mass) if self_weight is not None else None,
                               self_weight=self_weight)
