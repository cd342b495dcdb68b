"""User catalogues: a supplier's list as CSV, read into dimension arrays per family.

Columns: ``family`` and that family's dimension keys (GUIDE section 4), in mm unless
the header names a unit (``d [in]``); optional ``name`` and ``material``. Rows of
different families may share one file: a cell left blank is "not given". Columns
named after a section property (``A``, ``Iz``, ``Zz`` ..., ``mass_per_length``) are
tabulated values, compared with the computed ones (default units mm², mm⁴, mm³, mm,
kg/m). Other columns (a price, a stock code) are ignored. Lines starting with ``#``
are comments. Row numbers are file line numbers.

Examples
--------
>>> import tempfile, pathlib
>>> p = pathlib.Path(tempfile.mkdtemp()) / "list.csv"
>>> _ = p.write_text("family,b,d [in],material\\nrectangle,45,9.25,C24\\n")
>>> cat = read_user_catalog(p)
>>> cat.blocks["rectangle"].dims["d"], cat.blocks["rectangle"].lines
(array([0.23495]), [2])
>>> _ = p.write_text("family,b,d\\nrectangle,45,x\\n")
>>> read_user_catalog(p)
Traceback (most recent call last):
...
leanspan.errors.CatalogError: ...list.csv: row 2: column 'd': expected a length in mm (a number), got 'x'
"""

from __future__ import annotations

from dataclasses import dataclass, field
from pathlib import Path

import numpy as np

from ..errors import CatalogError, GeometryError, MaterialError
from ..fileio import protect_inputs
from ..sections.families import FAMILIES
from ..units import RANGES, check_range
from .csvfile import column_factor, read_table, to_float
from .materials import get_material, materials_table

__all__ = ["UserBlock", "UserCatalog", "read_user_catalog", "TABULATED", "DEFAULT_MATERIAL"]

# tabulated property -> (unit kind, default unit)
TABULATED = {
    "A": ("area", "mm^2"),
    **{k: ("second moment", "mm^4") for k in ("Iz", "Iy", "I1", "I2")},
    **{k: ("section modulus", "mm^3") for k in ("Sz_top", "Sz_bot", "Sy_left", "Sy_right", "Zz", "Zy")},
    **{k: ("length", "mm") for k in ("yc", "zc", "rz", "ry", "depth", "width")},
    "mass_per_length": ("mass/length", "kg/m"),
}

# Default material of a user row without one, by shape family (document in README).
DEFAULT_MATERIAL = {"rectangle": "C24", "circle": "S355", "tube": "S355J2H", "box": "S355J2H",
                    "ibeam": "S355", "channel": "S355", "tee": "S355", "angle": "S355"}


@dataclass
class UserBlock:
    """The rows of one family: dims (m, completed), names, materials, file lines, tabulated values."""

    family: str
    dims: dict = field(default_factory=dict)
    names: list = field(default_factory=list)
    materials: list = field(default_factory=list)
    lines: list = field(default_factory=list)
    tabulated: dict = field(default_factory=dict)  # key -> array (NaN where not given)


@dataclass
class UserCatalog:
    """A read user catalogue: one :class:`UserBlock` per family, plus notes for the user."""

    path: Path
    blocks: dict
    warnings: list


def read_user_catalog(path, materials: dict | None = None) -> UserCatalog:
    """Read and check a user catalogue CSV.

    Parameters
    ----------
    path : path-like
        The CSV file (never modified).
    materials : dict of name -> Material, optional
        Table used to check the ``material`` column (default: the built-in table).

    Raises
    ------
    CatalogError
        Naming the file, the row and what was expected: a non-numeric or missing
        dimension, an unknown family or material, impossible geometry.
    """
    path = Path(path)
    header, rows = read_table(path, CatalogError)
    protect_inputs(path)
    names = [h for h, _ in header]
    if "family" not in names:
        raise CatalogError(f"{path}: missing column 'family'; expected family plus dimension "
                           "columns such as b, d (mm unless the header says, e.g. 'd [in]')")
    dim_keys = {k for f in FAMILIES.values() for k in f.all_keys}
    col = {}
    warnings = []
    defaulted = {}  # "C24 (rectangle)" -> file lines that got it by default
    ignored = []
    for j, (name, unit) in enumerate(header):
        if name in dim_keys:
            col[name] = (j, "dim", column_factor(unit or "mm", "length", f"{path}: column {name!r}"))
        elif name in TABULATED:
            kind, default = TABULATED[name]
            col[name] = (j, "tab", column_factor(unit or default, kind, f"{path}: column {name!r}"))
        elif name in ("family", "name", "material"):
            col[name] = (j, "text", None)
        else:
            ignored.append(name)
    if ignored:
        warnings.append(f"{path}: ignored columns (not a dimension or property): {', '.join(ignored)}")
    table = materials if materials is not None else materials_table()
    found = _by_columns(path, header, rows, col, table)
    blocks, raw, defaulted = found if found is not None else _by_rows(path, header, rows, col, table)
    for assumed, lines in defaulted.items():  # a grade nobody chose must not pass unnoticed
        shown = ", ".join(str(n) for n in lines[:8]) + (" ..." if len(lines) > 8 else "")
        warnings.append(f"{path}: no material given in row(s) {shown}: assumed {assumed}; "
                        "fill in the material column to be sure")
    for fam_name, block in blocks.items():
        fam = FAMILIES[fam_name]
        given = {k: np.array(v) for k, v in raw[fam_name].items() if k in fam.all_keys}
        given = {k: v for k, v in given.items() if k in fam.keys or not np.isnan(v).all()}
        try:
            dims = fam.complete(given)
            fam.validate(dims, lambda i, b=block: f"{path}: row {b.lines[i]}")
        except GeometryError as exc:
            raise CatalogError(str(exc)) from None
        block.dims = dims
        block.tabulated = {k: np.array(v) for k, v in block.tabulated.items()}
        generated = fam.designation(dims)
        block.names = [n or g for n, g in zip(block.names, generated)]
    return UserCatalog(path, blocks, warnings)

def _by_rows(path, header, rows, col, table):
    """The rows one at a time: the reference path, and the one that names the first bad cell."""
    defaulted = {}
    blocks: dict[str, UserBlock] = {}
    raw: dict[str, dict[str, list]] = {}
    resolved: dict[str, str] = {}
    for line, cells in rows:
        where = f"{path}: row {line}"
        if len(cells) > len(header):
            raise CatalogError(f"{where}: {len(cells)} cells but {len(header)} columns")
        cells = cells + [""] * (len(header) - len(cells))
        fam_name = cells[col["family"][0]]
        fam = FAMILIES.get(fam_name)
        if fam is None:
            raise CatalogError(f"{where}: unknown family {fam_name!r}; expected one of "
                               f"{', '.join(FAMILIES)}")
        absent = [k for k in fam.keys if k not in col]
        if absent:
            raise CatalogError(f"{where}: missing dimension {absent[0]!r} for {fam_name} (no such "
                               f"column); expected {', '.join(fam.keys)}")
        block = blocks.setdefault(fam_name, UserBlock(fam_name))
        values = raw.setdefault(fam_name, {})
        for key, (j, what, factor) in col.items():
            cell = cells[j]
            if what == "dim":
                if cell == "":
                    if key in fam.keys:
                        raise CatalogError(f"{where}: missing dimension {key!r} for {fam_name}; "
                                           f"expected {', '.join(fam.keys)}")
                    value = np.nan
                elif key not in fam.all_keys:
                    raise CatalogError(f"{where}: {fam_name} has no dimension {key!r}; expected "
                                       f"{', '.join(fam.all_keys)} (leave the cell blank)")
                else:
                    unit = header[j][1] or "mm"
                    value = check_range(to_float(cell, f"{where}: column {key!r}", f"a length in {unit}") * factor,
                                        "section length", f"{where}: column {key!r}", CatalogError, shown=cell)
                values.setdefault(key, []).append(value)
            elif what == "tab":
                value = np.nan if cell == "" else check_range(
                    to_float(cell, f"{where}: column {key!r}", f"a tabulated {key}") * factor,
                    "section length" if TABULATED[key][0] == "length" else TABULATED[key][0],
                    f"{where}: column {key!r}", CatalogError, shown=cell)
                block.tabulated.setdefault(key, []).append(value)
        material = cells[col["material"][0]] if "material" in col else ""
        if material:
            if material not in resolved:  # each distinct name is looked up once, not once a row
                try:
                    resolved[material] = get_material(material, table).name
                except MaterialError as exc:
                    raise CatalogError(f"{where}: {exc}") from None
            material = resolved[material]
        else:
            material = DEFAULT_MATERIAL[fam_name]
            defaulted.setdefault(f"{material} ({fam_name})", []).append(line)
        block.materials.append(material)
        block.names.append(cells[col["name"][0]] if "name" in col else "")
        block.lines.append(line)
    return blocks, raw, defaulted


def _numbers(cells, factor, within):
    """Cells (strings) -> SI floats (NaN where blank) and whether all are good: numbers, finite,
    in the range ``within``; None when any is not (the row path then names it)."""
    blank = cells == ""
    out = np.full(cells.shape, np.nan)
    try:
        out[~blank] = cells[~blank].astype(float) * factor
    except ValueError:
        return None, blank
    given = out[~blank]
    lo, hi, _ = RANGES[within]
    if not np.isfinite(given).all() or ((given != 0) & ((np.abs(given) < lo) | (np.abs(given) > hi))).any():
        return None, blank
    return out, blank


def _by_columns(path, header, rows, col, table):
    """The same result as :func:`_by_rows`, a column at a time; None if any cell needs a message."""
    H = len(header)
    if any(len(c) > H for _, c in rows):
        return None
    cells = [c for _, c in rows]
    if any(len(c) != H for c in cells):
        cells = [c + [""] * (H - len(c)) for c in cells]
    # a column at a time: zip transposes in C
    grid = [np.array(column, dtype=object) for column in zip(*cells)] if cells else [np.array([], object)] * H
    lines = np.array([ln for ln, _ in rows], int)
    fam_col = grid[col["family"][0]]
    order = list(dict.fromkeys(fam_col))  # families in order of first appearance
    if any(f not in FAMILIES for f in order):
        return None
    mats = grid[col["material"][0]] if "material" in col else np.full(len(rows), "", object)
    resolved = {}
    for name in set(mats) - {""}:  # each distinct material once
        try:
            resolved[name] = get_material(name, table).name
        except MaterialError:
            return None
    blocks, raw, defaulted = {}, {}, {}
    for f in order:  # a small set
        fam = FAMILIES[f]
        idx = np.flatnonzero(fam_col == f)
        if any(k not in col for k in fam.keys):
            return None
        block, values = UserBlock(f), {}
        for key, (j, what, factor) in col.items():
            if what == "text":
                continue
            within = "section length" if what == "dim" or TABULATED[key][0] == "length" else TABULATED[key][0]
            nums, blank = _numbers(grid[j][idx], factor, within)
            if nums is None:
                return None
            if what == "dim":
                if (key in fam.keys and blank.any()) or (key not in fam.all_keys and (~blank).any()):
                    return None
                values[key] = nums
            else:
                block.tabulated[key] = nums
        m = mats[idx]
        block.materials = [resolved[x] if x else DEFAULT_MATERIAL[f] for x in m]
        if (m == "").any():
            defaulted[f"{DEFAULT_MATERIAL[f]} ({f})"] = lines[idx][m == ""].tolist()
        block.names = list(grid[col["name"][0]][idx]) if "name" in col else [""] * idx.size
        block.lines = lines[idx].tolist()
        blocks[f], raw[f] = block, values
    # the "assumed material" notes in the order the row reader gives: by their first row
    return blocks, raw, dict(sorted(defaulted.items(), key=lambda item: item[1][0]))
