"""Section files (TOML) -> :class:`~leanspan.sections.section.Section`.

A section file (or an inline ``section`` table in a beam job) holds ``[[part]]``
tables and optionally ``[[hole]]`` tables (shapes cut through every part they
cross, e.g. bolt holes), a file-level ``units`` for bare numbers and a file-level
``material`` default::

    units = "mm"
    [[part]]
    shape = "ibeam"
    d = 300
    b = 150
    tw = 7.1
    tf = 10.7
    r = 15
    material = "S355"

Examples
--------
>>> spec = {"units": "mm", "part": [{"shape": "rectangle", "b": 100, "d": 200}]}
>>> s = section_from_spec(spec)
>>> round(s.properties()["Iz"] * 1e12)  # mm^4: b d^3 / 12
66666667
"""

from __future__ import annotations

import numpy as np


from ..errors import GeometryError, InputError, brief
from ..fileio import load_toml
from ..units import RANGES, UnitSystem, check_number, parse
from .families import FAMILIES, get_family
from .section import Part, Section, check_polygon, polygon_from_family, transform

__all__ = ["section_from_spec", "load_section_file"]

#: Most vertices one polygon part or hole may have (outline and holes together).
MAX_POINTS = int(RANGES["points"][1])
#: Most [[part]] (and, separately, [[hole]]) tables of one section.
MAX_PARTS = int(RANGES["parts"][1])

_PLACEMENT = ("shape", "material", "at", "rotate", "mirror", "units")
_SECTION_KEYS = ("part", "hole", "units", "material", "title", "name", "description")


def _point(value, field, units):
    if not isinstance(value, (list, tuple)) or len(value) != 2:
        raise InputError(f"{field}: expected a point [z, y], got {brief(value)}")
    return tuple(parse(v, "length", f"{field}[{k}]", units, within="section position")
                 for k, v in enumerate(value))


def _ring(value, field, units):
    if not isinstance(value, (list, tuple)) or len(value) < 3:
        raise GeometryError(f"{field}: expected at least three points [[z, y], ...], got {brief(value)}")
    return [_point(p, f"{field}[{i + 1}]", units) for i, p in enumerate(value)]


def _shape_polygon(table: dict, field: str, units: UnitSystem, extra_keys=()):
    """Build the (untransformed) polygon of a part or hole table."""
    from shapely.geometry import Polygon

    shape = table.get("shape")
    if shape is None:
        raise InputError(f"{field}.shape: missing; expected one of {', '.join(FAMILIES)} or polygon")
    if "units" in table:
        units = UnitSystem.from_spec(table["units"], f"{field}.units")
    if shape == "polygon":
        allowed = set(_PLACEMENT) | {"points", "holes"} | set(extra_keys)
        _no_unknown(table, allowed, field)
        if "points" not in table:
            raise InputError(f"{field}.points: missing; expected a list of [z, y] points")
        holes = table.get("holes", [])
        if not isinstance(holes, list):
            raise InputError(f"{field}.holes: expected a list of point lists")
        count = sum(len(r) if isinstance(r, list) else 0 for r in [table["points"], *holes])
        if count > MAX_POINTS:
            raise GeometryError(f"{field}.points: {count} points (outline and holes); at most "
                                f"{MAX_POINTS} are accepted (simplify the outline)")
        outer = _ring(table["points"], f"{field}.points", units)
        inner = [_ring(h, f"{field}.holes[{i + 1}]", units) for i, h in enumerate(holes)]
        outline = check_polygon(Polygon(outer), f"{field}.points")
        for i, h in enumerate(inner):
            hole = check_polygon(Polygon(h), f"{field}.holes[{i + 1}]")
            if not outline.contains(hole):
                raise GeometryError(f"{field}.holes[{i + 1}]: hole is not inside its outline")
        poly = Polygon(outer, inner)
        check_polygon(poly, field)
        return poly
    fam = get_family(shape) if isinstance(shape, str) else get_family(repr(shape))
    allowed = set(_PLACEMENT) | set(fam.all_keys) | set(extra_keys)
    _no_unknown(table, allowed, field)
    dims = {}
    for key in fam.all_keys:
        if key in table:
            dims[key] = parse(table[key], "length", f"{field}.{key}", units, within="section length")
        elif key in fam.keys:
            raise GeometryError(f"{field}.{key}: missing; a {shape} needs {', '.join(fam.keys)}")
    for key, v in dims.items():
        if v < 0 or (v == 0 and key in fam.keys):
            raise GeometryError(f"{field}.{key}: {table[key]!r}; expected a positive length")
    return polygon_from_family(shape, dims, where=field)


def _no_unknown(table, allowed, field):
    for key in table:
        if key not in allowed:
            raise InputError(f"{field}.{key}: unknown key; expected {', '.join(sorted(allowed))}")


def _describe(table, poly, field, units) -> str:
    """``"I 300x150x7.1x10.7"`` or ``"polygon, 5 points"``: the part as given, in mm."""
    shape = table.get("shape")
    if shape == "polygon":
        holes = len(table.get("holes", []))
        return f"polygon, {len(table['points'])} points" + (f", {holes} hole(s)" if holes else "")
    fam = get_family(shape)
    dims = fam.complete({k: np.atleast_1d(parse(table[k], "length", f"{field}.{k}", units))
                         for k in fam.all_keys if k in table})
    return fam.designation(dims)[0]


def _placed(table, field, units, describe=None):
    poly = _shape_polygon(table, field, units)
    if describe is not None:
        local = UnitSystem.from_spec(table["units"], f"{field}.units") if "units" in table else units
        describe.append(_describe(table, poly, field, local))
    units = UnitSystem.from_spec(table["units"], f"{field}.units") if "units" in table else units
    at = _point(table["at"], f"{field}.at", units) if "at" in table else (0.0, 0.0)
    rotate = check_number(table.get("rotate", 0.0), "angle", f"{field}.rotate", InputError,
                          "an angle in degrees (a number)")
    mirror = table.get("mirror", False)
    if not isinstance(mirror, bool):
        raise InputError(f"{field}.mirror: expected true or false, got {brief(mirror)}")
    return transform(poly, float(rotate), mirror, at)


def section_from_spec(spec: dict, field: str = "section", units: UnitSystem | None = None) -> Section:
    """Build a :class:`Section` from a parsed section table (file or inline).

    Raises
    ------
    InputError, GeometryError, UnitsError
        With the field path of the bad value (``part[2].tw``).
    """
    if not isinstance(spec, dict):
        raise InputError(f"{field}: expected a table with [[part]] entries, got {brief(spec)}")
    prefix = "" if field == "section" else f"{field}."
    for key in spec:
        if key not in _SECTION_KEYS:
            raise InputError(f"{prefix}{key}: unknown key; expected {', '.join(_SECTION_KEYS)}")
    if "units" in spec:
        units = UnitSystem.from_spec(spec["units"], f"{prefix}units")
    units = units or UnitSystem()
    parts_spec = spec.get("part")
    if not parts_spec:
        raise InputError(f"{prefix}part: missing; expected one or more [[part]] tables")
    if not isinstance(parts_spec, list) or not all(isinstance(p, dict) for p in parts_spec):
        raise InputError(f"{prefix}part: expected [[part]] tables")
    holes_spec = spec.get("hole", [])
    for key, tables in (("part", parts_spec), ("hole", holes_spec)):
        if isinstance(tables, list) and len(tables) > MAX_PARTS:
            raise InputError(f"{prefix}{key}: {len(tables)} [[{key}]] tables; at most {MAX_PARTS} are accepted")
    default_material = spec.get("material")
    if default_material is not None and not isinstance(default_material, str):
        raise InputError(f"{prefix}material: expected a material name, got {brief(default_material)}")
    polys, shapes = [], []
    for i, table in enumerate(parts_spec):
        label = f"{prefix}part[{i + 1}]"
        polys.append((label, _placed(table, label, units, shapes), table.get("material", default_material)))
    if not isinstance(holes_spec, list) or not all(isinstance(h, dict) for h in holes_spec):
        raise InputError(f"{prefix}hole: expected [[hole]] tables")
    for k, table in enumerate(holes_spec):
        label = f"{prefix}hole[{k + 1}]"
        if "material" in table:
            raise InputError(f"{label}.material: a hole has no material")
        hole = _placed(table, label, units)
        hit = False
        for j, (plabel, poly, mat) in enumerate(polys):
            if poly.intersects(hole) and poly.intersection(hole).area > 0:
                hit = True
                cut = poly.difference(hole)
                if cut.is_empty or cut.area <= 0:
                    raise GeometryError(f"{label}: removes all of {plabel}")
                polys[j] = (plabel, cut, mat)
        if not hit:
            raise GeometryError(f"{label}: does not cut any part; expected a hole inside the section")
    for label, _, mat in polys:
        if mat is not None and not isinstance(mat, str):
            raise InputError(f"{label}.material: expected a material name, got {brief(mat)}")
    parts = []
    for (label, poly, mat), shape in zip(polys, shapes):
        # a hole may cut a part into pieces (a bolt hole through a plate): keep each piece
        pieces = [poly] if poly.geom_type == "Polygon" else [g for g in poly.geoms if g.area > 0]
        for k, piece in enumerate(pieces):
            parts.append(Part(piece, mat, label if len(pieces) == 1 else f"{label} piece {k + 1}", shape))
    return Section(tuple(parts))


def load_section_file(path) -> tuple[Section, dict]:
    """Read a section TOML file; return the section and the raw table."""
    data = load_toml(path)
    try:
        return section_from_spec(data), data
    except InputError as exc:
        raise type(exc)(f"{path}: {exc}") from None
