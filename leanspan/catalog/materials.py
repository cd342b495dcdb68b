"""The materials table: built-in rows from the standards plus the user's own file.

The built-in rows live in ``leanspan/catalog/data/materials_*.csv`` (package data),
each with its source. A user materials file (TOML or CSV) adds rows or overrides
built-in ones by name; an override may give only the fields it changes.

Kinds: ``steel``, ``stainless``, ``aluminium``, ``timber`` (sawn: softwood and
hardwood classes, lumber grades) and ``glulam``. The catalogue pairs each section
series with the kinds it can be made of (see :mod:`leanspan.catalog.series`).

Examples
--------
>>> m = get_material("S355")
>>> m.kind, m.E, m.strength_bending
('steel', 210000000000.0, 355000000.0)
>>> get_material("c24").name
'C24'
>>> get_material("S356")
Traceback (most recent call last):
...
leanspan.errors.MaterialError: unknown material 'S356'; near names: S355, S235, S355J2H, S235JRH, S275
"""

from __future__ import annotations

import difflib
import math
import os
import re
from dataclasses import dataclass, fields, replace
from functools import lru_cache
from importlib import resources
from pathlib import Path

from ..errors import InputError, MaterialError, brief
from ..fileio import load_toml, protect_inputs
from ..units import check_range, parse
from .csvfile import column_factor, read_table, to_float

__all__ = ["KINDS", "REQUIRED", "OPTIONAL", "Material", "materials_table", "get_material", "load_user_materials", "material_lookup",
           "BUILTIN_FILES"]

KINDS = ("steel", "stainless", "aluminium", "timber", "glulam")
BUILTIN_FILES = ("materials_en.csv", "materials_us_steel.csv", "materials_us_lumber.csv")

# field -> (unit kind, default unit of a bare number, words for messages)
_QUANTITIES = {
    "E": ("pressure", "MPa", "an elastic modulus"),
    "G": ("pressure", "MPa", "a shear modulus"),
    "density": ("density", "kg/m^3", "a density"),
    "strength_bending": ("pressure", "MPa", "a bending strength"),
    "strength_shear": ("pressure", "MPa", "a shear strength"),
    # optional (blank where a standard gives none, e.g. metals): what bearing, buckling and the design basis read
    "E_05": ("pressure", "MPa", "an elastic modulus (5 % fractile)"),
    "rho_k": ("density", "kg/m^3", "a characteristic density"),
    "fc_90": ("pressure", "MPa", "a compression strength across the grain"),
    "ft_0": ("pressure", "MPa", "a tension strength parallel to the grain"),
    "fc_0": ("pressure", "MPa", "a compression strength parallel to the grain"),
}
#: the quantities every new material must give (the rest are optional)
REQUIRED = ("E", "G", "density", "strength_bending", "strength_shear")
OPTIONAL = tuple(k for k in _QUANTITIES if k not in REQUIRED)
_TEXT = ("name", "kind", "group", "basis", "source")


@dataclass(frozen=True)
class Material:
    """One material row (SI units: Pa, kg/m³).

    Attributes
    ----------
    name, kind : str
        The trade designation (``"S355"``, ``"C24"``) and one of :data:`KINDS`.
    E, G : float
        Elastic and shear moduli (mean values), Pa.
    density : float
        Mean density for self-weight, kg/m³.
    strength_bending, strength_shear : float
        Characteristic (timber), reference (lumber grades) or yield-based (metals)
        strengths, Pa; ``basis`` says which.
    E_05, rho_k, fc_90, ft_0, fc_0 : float or None
        Optional (None where not given): E at the 5 % fractile (Pa), the characteristic
        density (kg/m³), and the compression strength across the grain, tension and
        compression strengths parallel to the grain (Pa, on the same ``basis``).
    group, basis, source : str
        A finer grouping, the basis of the strengths, and where the row comes from.

    Examples
    --------
    >>> Material("x", "steel", 2e11, 8e10, 7850, 3e8, 1.7e8, source="invented").kind
    'steel'
    >>> Material("x", "plastic", 2e9, 8e8, 950, 3e7, 1e7)
    Traceback (most recent call last):
    ...
    leanspan.errors.MaterialError: material 'x': kind 'plastic' unknown; expected one of steel, stainless, aluminium, timber, glulam
    """

    name: str
    kind: str
    E: float
    G: float
    density: float
    strength_bending: float
    strength_shear: float
    group: str = ""
    basis: str = ""
    source: str = ""
    E_05: float | None = None
    rho_k: float | None = None
    fc_90: float | None = None
    ft_0: float | None = None
    fc_0: float | None = None

    def __post_init__(self):
        if not isinstance(self.name, str) or not self.name.strip():
            raise MaterialError(f"material name must be non-empty text, got {brief(self.name)}")
        if self.kind not in KINDS:
            raise MaterialError(f"material {self.name!r}: kind {self.kind!r} unknown; "
                                f"expected one of {', '.join(KINDS)}")
        for key in _QUANTITIES:
            value = getattr(self, key)
            if value is None and key in OPTIONAL:
                continue
            if not isinstance(value, (int, float)) or not math.isfinite(value) or value <= 0:
                raise MaterialError(f"material {self.name!r}: {key} must be a positive number, "
                                    f"got {brief(value)}")

    def as_dict(self) -> dict:
        """The row as a plain dict (the ``leanspan materials --json`` keys; ``None`` where an
        optional value is not given)."""
        return {f.name: getattr(self, f.name) for f in fields(self)}


def _key(name: str) -> str:
    """Matching key: case, spaces, dots, hyphens and underscores ignored."""
    return "".join(ch for ch in name.lower() if ch not in " .-_")


def _rows_from_csv(path, text=None, default_source="") -> list[dict]:
    """Read a materials CSV into partial row dicts (SI floats), validating each cell."""
    header, rows = read_table(path, MaterialError, text)
    names = [h for h, _ in header]
    unknown = [n for n in names if n not in _QUANTITIES and n not in _TEXT]
    if unknown:
        raise MaterialError(f"{path}: row 1: unknown column {unknown[0]!r}; expected "
                            f"{', '.join(_TEXT[:2] + tuple(_QUANTITIES) + _TEXT[2:])}")
    if "name" not in names:
        raise MaterialError(f"{path}: missing column 'name'")
    factors = {}
    for name, unit in header:
        if name in _QUANTITIES:
            kind, default, _ = _QUANTITIES[name]
            factors[name] = column_factor(unit or default, kind, f"{path}: column {name!r}",
                                          MaterialError)
    out = []
    for line, cells in rows:
        if len(cells) > len(header):
            raise MaterialError(f"{path}: row {line}: {len(cells)} cells but {len(header)} columns")
        row = {"_where": f"{path}: row {line}"}
        for (name, _), cell in zip(header, cells):
            if cell == "" and name != "name":
                continue
            if name in _QUANTITIES:
                words = _QUANTITIES[name][2]
                where = f"{path}: row {line}: column {name!r}"
                row[name] = check_range(to_float(cell, where, words, MaterialError) * factors[name],
                                        _QUANTITIES[name][0], where, MaterialError, shown=cell)
            else:
                row[name] = cell
        if not row.get("name"):
            raise MaterialError(f"{path}: row {line}: missing value in column 'name'")
        row.setdefault("source", default_source)
        out.append(row)
    return out


def _rows_from_toml(path) -> list[dict]:
    """Read ``[[material]]`` tables (values as quantity strings or numbers in MPa, kg/m³)."""

    try:
        data = load_toml(path)
    except InputError as exc:
        raise MaterialError(str(exc)) from None
    items = data.get("material")
    extra = set(data) - {"material"}
    if extra:
        raise MaterialError(f"{path}: unknown table {sorted(extra)[0]!r}; expected [[material]] tables")
    if not isinstance(items, list) or not all(isinstance(i, dict) for i in items):
        raise MaterialError(f"{path}: expected [[material]] tables with name, kind, E, G, density, "
                            "strength_bending, strength_shear")
    out = []
    for i, item in enumerate(items, 1):
        where = f"{path}: material[{i}]"
        row = {"_where": where}
        for key, value in item.items():
            if key in _QUANTITIES:
                kind, default, _ = _QUANTITIES[key]
                try:
                    if isinstance(value, (int, float)) and not isinstance(value, bool):
                        row[key] = check_range(float(value) * column_factor(default, kind, where, MaterialError),
                                               kind, f"{where}.{key}", MaterialError, shown=value)
                    else:
                        row[key] = parse(value, kind, f"{where}.{key}")
                except MaterialError:
                    raise
                except Exception as exc:  # a UnitsError: re-raise as a materials error
                    raise MaterialError(str(exc)) from None
            elif key in _TEXT:
                if not isinstance(value, str):
                    raise MaterialError(f"{where}.{key}: expected text, got {brief(value)}")
                row[key] = value
            else:
                raise MaterialError(f"{where}: unknown key {key!r}; expected "
                                    f"{', '.join(_TEXT[:2] + tuple(_QUANTITIES) + _TEXT[2:])}")
        if not row.get("name"):
            raise MaterialError(f"{where}: missing 'name'")
        row.setdefault("source", f"user file {Path(path).name}")
        out.append(row)
    return out


def _merge(table: dict[str, Material], rows: list[dict]) -> dict[str, Material]:
    """Add rows to ``table`` (a copy); a row naming an existing material overrides its fields."""
    table = dict(table)
    index = {_key(n): n for n in table}
    for row in rows:
        where = row.pop("_where")
        old_name = index.get(_key(row["name"]))
        try:
            if old_name is not None:
                row.pop("name")
                table[old_name] = replace(table[old_name], **row)  # keeps its place
            else:
                missing = [k for k in ("kind",) + REQUIRED if k not in row]
                if missing:
                    raise MaterialError(f"{where}: new material {row['name']!r} is missing "
                                        f"{', '.join(missing)}")
                new = Material(**row)
                table[new.name] = new
                index[_key(new.name)] = new.name
        except MaterialError as exc:
            msg = str(exc)
            raise MaterialError(msg if msg.startswith(where) else f"{where}: {msg}") from None
    return table


@lru_cache(maxsize=1)
def _builtin() -> dict[str, Material]:
    table: dict[str, Material] = {}
    base = resources.files(__package__).joinpath("data")
    for name in BUILTIN_FILES:
        text = base.joinpath(name).read_text(encoding="utf-8")
        rows = _rows_from_csv(f"leanspan/catalog/data/{name}", text=text)
        for row in rows:
            if _key(row["name"]) in {_key(n) for n in table}:
                raise MaterialError(f"{row['_where']}: duplicate material {row['name']!r}")
        table = _merge(table, rows)
    return table


def load_user_materials(path, base: dict[str, Material] | None = None) -> dict[str, Material]:
    """Read a user materials file (``.toml`` or ``.csv``) and merge it over ``base``.

    Parameters
    ----------
    path : path-like
        TOML with ``[[material]]`` tables (values like ``"11 GPa"``; bare numbers are
        MPa and kg/m³) or CSV with the columns of :func:`materials_table` (units in the
        header, e.g. ``E [GPa]``; default MPa and kg/m³).
    base : dict, optional
        The table to extend (default: the built-in table).

    Returns
    -------
    dict of name -> Material
        A new table; a row naming an existing material replaces the fields it gives.

    Examples
    --------
    >>> import tempfile, pathlib
    >>> p = pathlib.Path(tempfile.mkdtemp()) / "mine.toml"
    >>> _ = p.write_text('[[material]]\\nname = "C24"\\nE = "10.5 GPa"\\n')
    >>> t = load_user_materials(p)
    >>> t["C24"].E, t["C24"].strength_bending
    (10500000000.0, 24000000.0)
    """
    path = Path(path)
    suffix = path.suffix.lower()
    if suffix == ".toml":
        rows = _rows_from_toml(path)
    elif suffix == ".csv":
        rows = _rows_from_csv(path, default_source=f"user file {path.name}")
    else:
        raise MaterialError(f"{path}: expected a .toml or .csv materials file")
    protect_inputs(path)
    return _merge(_builtin() if base is None else base, rows)


def materials_table(extra=None) -> dict[str, Material]:
    """All materials by name: the built-in rows, plus ``extra``.

    Parameters
    ----------
    extra : path-like or dict of Material, optional
        A user materials file, or a table already loaded with :func:`load_user_materials`.

    Examples
    --------
    >>> t = materials_table()
    >>> "GL28h" in t and "A992" in t and "6061-T6" in t
    True
    """
    if extra is None:
        return dict(_builtin())
    if isinstance(extra, dict):
        return dict(extra)
    return load_user_materials(extra)


def get_material(name: str, extra=None) -> Material:
    """Look up a material by name (case, spaces, dots and hyphens ignored).

    Raises
    ------
    MaterialError
        Unknown name; the message lists the nearest names.
    """
    table = materials_table(extra)
    if isinstance(name, Material):
        return name
    if not isinstance(name, str):
        raise MaterialError(f"material name must be text, got {brief(name)}")
    keys = {_key(n): n for n in table}
    hit = keys.get(_key(name))
    if hit is not None:
        return table[hit]
    # the same grade letters first (C99 -> C14, C16 ...), then spelling neighbours
    letters = re.match(r"[a-z]*", _key(name)).group()
    same = {k for k in keys if letters and re.fullmatch(rf"{letters}\d.*", k)}
    pool = same | set(difflib.get_close_matches(_key(name), list(keys), n=3, cutoff=0.5))
    likeness = {k: difflib.SequenceMatcher(None, _key(name), k).ratio() for k in pool}
    prefix = {k: len(os.path.commonprefix([_key(name), k])) for k in pool}
    order = {k: i for i, k in enumerate(keys)}  # last tie-break: the table's order
    near = sorted(pool, key=lambda k: (k not in same, -likeness[k], -prefix[k], order[k]))[:5]
    hint = f"; near names: {', '.join(keys[k] for k in near)}" if near else \
        "; see 'leanspan materials' for the list"
    raise MaterialError(f"unknown material {name!r}{hint}")


def material_lookup(extra=None):
    """A function ``name -> Material`` over the built-in (and ``extra``) materials: what
    :meth:`leanspan.sections.section.Section.composite` takes (sections know no catalogue).

    >>> material_lookup()("s355").name
    'S355'
    """
    table = materials_table(extra)
    return lambda name: get_material(name, table)
