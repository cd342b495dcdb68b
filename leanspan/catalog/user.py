"""User catalogues: a supplier's list as CSV, read into dimension arrays per family.

Columns: ``family`` and that family's dimension keys (docs/formats.md 3.3), in mm unless
the header names a unit (``d [in]``); optional ``name`` and ``material``. Rows of
different families may share one file: a cell left blank is "not given". Columns
named after a section property (``A``, ``Iz``, ``Zz`` ..., ``mass_per_length``) are
tabulated values, compared with the computed ones (default units mm², mm⁴, mm³, mm,
kg/m). Other columns (a price, a stock code) are ignored. Lines starting with ``#``
are comments. Row numbers are file line numbers.

The text is split into an (N, columns) array of cells at once
(:func:`~leanspan.catalog.csvfile.read_grid`) and parsed a column at a time; only a file with
a bad cell is read again row by row, to name the first bad row.

Examples
--------
>>> import tempfile, pathlib
>>> p = pathlib.Path(tempfile.mkdtemp()) / "list.csv"
>>> _ = p.write_text("family,b,d [in],material\\nrectangle,45,9.25,C24\\n")
>>> cat = read_user_catalog(p)
>>> cat.blocks["rectangle"].dims["d"], cat.blocks["rectangle"].lines
(array([0.23495]), array([2]))
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
from ..fileio import protect_inputs, read_text
from ..sections.families import FAMILIES
from ..units import RANGES, check_range
from .csvfile import column_factor, read_grid, read_table, to_float
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
    """The rows of one family: dims (m, completed), names and materials (object arrays of str),
    file lines (int array), tabulated values (lists while the row reader fills them)."""

    family: str
    dims: dict = field(default_factory=dict)
    names: list | np.ndarray = field(default_factory=list)
    materials: list | np.ndarray = field(default_factory=list)
    lines: list | np.ndarray = field(default_factory=list)
    tabulated: dict = field(default_factory=dict)  # key -> array (NaN where not given)


@dataclass
class UserCatalog:
    """A read user catalogue: one :class:`UserBlock` per family, plus notes for the user."""

    path: Path
    blocks: dict
    warnings: list


def read_user_catalog(path, materials: dict | None = None, text: str | None = None) -> UserCatalog:
    """Read and check a user catalogue CSV.

    Parameters
    ----------
    path : path-like
        The CSV file (never modified).
    materials : dict of name -> Material, optional
        Table used to check the ``material`` column (default: the built-in table).
    text : str, optional
        The file's text, already read (the file is then not read again).

    Raises
    ------
    CatalogError
        Naming the file, the row and what was expected: a non-numeric or missing
        dimension, an unknown family or material, impossible geometry.
    """
    path = Path(path)
    if text is None:
        text = read_text(path, "a CSV file", CatalogError, encoding="utf-8-sig")
    protect_inputs(path)
    split = read_grid(text, path, CatalogError)
    if split is None:  # quotes, odd white space or a long row: the csv module's rows
        header, rows = read_table(path, CatalogError, text)
        lines, grid = _grid_of(rows, len(header))
    else:
        (header, lines, grid), rows = split, None
    names = [h for h, _ in header]
    if "family" not in names:
        raise CatalogError(f"{path}: missing column 'family'; expected family plus dimension "
                           "columns such as b, d (mm unless the header says, e.g. 'd [in]')")
    dim_keys = {k for f in FAMILIES.values() for k in f.all_keys}
    col = {}
    warnings = []
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
    found = _by_columns(path, lines, grid, col, table) if grid is not None else None
    if found is None:  # some cell needs a message: the row reader names the first
        if rows is None:
            header, rows = read_table(path, CatalogError, text)
        found = _by_rows(path, header, rows, col, table)
    blocks, raw, defaulted = found
    for assumed, lines in defaulted.items():  # a grade nobody chose must not pass unnoticed
        shown = ", ".join(str(n) for n in lines[:8]) + (" ..." if len(lines) > 8 else "")
        warnings.append(f"{path}: no material given in row(s) {shown}: assumed {assumed}; "
                        "fill in the material column to be sure")
    for fam_name, block in blocks.items():
        fam = FAMILIES[fam_name]
        block.names = np.array(block.names, dtype=object)
        block.materials = np.array(block.materials, dtype=object)
        block.lines = np.asarray(block.lines, dtype=np.int64)
        given = {k: np.asarray(v, float) for k, v in raw[fam_name].items() if k in fam.all_keys}
        given = {k: v for k, v in given.items() if k in fam.keys or not np.isnan(v).all()}
        try:
            dims = fam.complete(given)
            fam.validate(dims, lambda i, b=block: f"{path}: row {b.lines[i]}")
        except GeometryError as exc:
            raise CatalogError(str(exc)) from None
        block.dims = dims
        block.tabulated = {k: np.asarray(v, float) for k, v in block.tabulated.items()}
        unnamed = np.flatnonzero(block.names == "")
        if unnamed.size:  # designations generated for the rows without a name only
            block.names[unnamed] = fam.designations({k: v[unnamed] for k, v in dims.items()})
    return UserCatalog(path, blocks, warnings)


def _grid_of(rows, width):
    """Line numbers and the (N, width) cell array of rows from :func:`read_table` (short rows
    padded); no grid (None) when a row has more cells than the header."""
    lines = np.array([ln for ln, _ in rows], dtype=np.int64)
    if any(len(c) > width for _, c in rows):
        return lines, None
    grid = np.empty((len(rows), width), dtype=object)
    grid[:] = ""
    for i, (_, cells) in enumerate(rows):  # quoted files only (the csv module reads them a row at a time)
        grid[i, :len(cells)] = cells
    return lines, grid


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
    blank = ~cells.astype(bool)  # (str truth: not empty)
    try:
        if blank.any():
            out = np.full(cells.shape, np.nan)
            out[~blank] = cells[~blank].astype(float) * factor
            given = out[~blank]
        else:
            out = given = cells.astype(float) * factor
    except ValueError:
        return None, blank
    lo, hi, _ = RANGES[within]
    if not np.isfinite(given).all() or ((given != 0) & ((np.abs(given) < lo) | (np.abs(given) > hi))).any():
        return None, blank
    return out, blank


def _factorize(values):
    """The distinct values (in order of first appearance) and each value's index among them
    (pandas' hash table: no Python step per value).

    >>> _factorize(np.array(["C24", "S355", "C24"], dtype=object))
    (['C24', 'S355'], array([0, 1, 0]))
    """
    import pandas as pd

    code, uniq = pd.factorize(np.asarray(values, dtype=object), use_na_sentinel=False)
    return uniq.tolist(), code.astype(np.intp, copy=False)


def _by_columns(path, lines, grid, col, table):
    """The same result as :func:`_by_rows` from the (N, columns) cell array, a column at a time;
    None if any cell needs a message."""
    n = len(lines)
    fam_names, fam_code = _factorize(grid[:, col["family"][0]])  # families in order of first appearance
    if any(f not in FAMILIES for f in fam_names):
        return None
    mats = grid[:, col["material"][0]] if "material" in col else np.full(n, "", dtype=object)
    mat_names, mat_code = _factorize(mats)
    resolved = []
    for name in mat_names:  # each distinct material once
        try:
            resolved.append(get_material(name, table).name if name else "")
        except MaterialError:
            return None
    resolved = np.array(resolved, dtype=object)
    parsed = {}  # each number column parsed once, for all rows: key -> (SI values, blank)
    for key, (j, what, factor) in col.items():
        if what != "text":
            within = "section length" if what == "dim" or TABULATED[key][0] == "length" else TABULATED[key][0]
            parsed[key] = _numbers(grid[:, j], factor, within)
            if parsed[key][0] is None:
                return None
    blocks, raw, defaulted = {}, {}, {}
    for i, f in enumerate(fam_names):  # a small set
        fam = FAMILIES[f]
        idx = np.flatnonzero(fam_code == i)
        if any(k not in col for k in fam.keys):
            return None
        block, values = UserBlock(f), {}
        for key, (j, what, factor) in col.items():
            if what == "text":
                continue
            nums, blank = (a[idx] for a in parsed[key])
            if what == "dim":
                if (key in fam.keys and blank.any()) or (key not in fam.all_keys and (~blank).any()):
                    return None
                values[key] = nums
            else:
                block.tabulated[key] = nums
        m = resolved[mat_code[idx]]
        blank = m == ""
        if blank.any():
            m[blank] = DEFAULT_MATERIAL[f]
            defaulted[f"{DEFAULT_MATERIAL[f]} ({f})"] = lines[idx][blank].tolist()
        block.materials = m
        block.names = grid[idx, col["name"][0]] if "name" in col else np.full(idx.size, "", dtype=object)
        block.lines = lines[idx]
        blocks[f], raw[f] = block, values
    # the "assumed material" notes in the order the row reader gives: by their first row
    return blocks, raw, dict(sorted(defaulted.items(), key=lambda item: item[1][0]))
