"""The property table: one row per catalogue section, built through the vectorised path.

:func:`catalog_table` returns a pandas DataFrame with the columns ``name family series
material kind``, one column per dimension key (:data:`DIM_KEYS`, NaN where a family
does not use it), the section keys of :data:`leanspan.sections.properties.KEYS`, and
the material columns ``E G density strength_bending strength_shear mass_per_length`` (and the
optional ``E_05 rho_k fc_90 ft_0 fc_0``, NaN where the material gives none) and
``strength_thickness`` (SI units throughout). The strengths of graded metals are stepped
by thickness (:mod:`.thickness`): ``strength_thickness`` is the row's governing thickness
(its thickest element), NaN for materials without steps.

The geometry and properties of the built-in series are computed once per family
(all rows at once) and cached: in memory for the process and on disk under
``$XDG_CACHE_HOME/leanspan`` (or ``~/.cache/leanspan``), keyed on the package version
and a hash of the series rules, the data files and the section code. An unwritable
cache folder just means no disk cache.

Materials: with ``materials=None`` every row carries its series' default material.
With ``materials=["S275", "C24"]`` each material is paired with every row whose series
accepts its kind (steel series take ``steel`` and ``stainless``, sawn series
``timber``, glulam series ``glulam``, aluminium series ``aluminium``), the row's
material is replaced and its mass recomputed; other rows are dropped.

Examples
--------
>>> df = catalog_table(series=["sawn_metric"], materials=["C16", "C30"], max_depth=0.2)
>>> sorted(df.material.unique()), bool((df.depth <= 0.2).all())
(['C16', 'C30'], True)
>>> row = df[(df.name == "rect 47x200") & (df.material == "C16")].iloc[0]
>>> round(row.Iz * 1e12), round(float(row.mass_per_length), 3)  # 47 * 200^3 / 12 mm^4; A * 370 kg/m^3
(31333333, 3.478)
"""

from __future__ import annotations

from functools import lru_cache
from pathlib import Path

import numpy as np

from ..errors import CatalogError, LeanspanError
from ..fileio import protect_inputs, read_text
from ..sections.families import FAMILIES
from ..sections.properties import KEYS, STABILITY_KEYS, family_properties, family_stability
from .cache import (USER_FILES_KEPT, USER_MIN_ROWS, cache_dir, cache_enabled, load_columns, pack_text,
                    save_columns, source_hash, unpack_text, user_cache_file, user_key)
from .csvfile import column_factor
from .materials import OPTIONAL as MATERIAL_OPTIONAL
from .materials import get_material, materials_table
from .series import RENAMED, SERIES
from .thickness import beyond_table, distinct, governing_thickness, graded, strength_factors
from .user import TABULATED, _factorize, read_user_catalog

__all__ = ["DIM_KEYS", "MATERIAL_COLUMNS", "catalog_table", "family_rows", "dims_of", "row_dims", "cache_dir",
           "cache_file", "cache_enabled", "builtin_frame"]

DIM_KEYS = ("d", "b", "tw", "tf", "t", "r", "b_top", "tf_top", "b_bot", "tf_bot")
# the sizes of built-up rows that are no shape family (flitch beams: leanspan.select.built_up_flitch)
BUILT_UP_DIM_KEYS = ("timbers", "timber_width", "timber_depth", "plate_thickness", "plate_depth")
MATERIAL_COLUMNS = ("kind", "E", "G", "density", "strength_bending", "strength_shear",
                    "mass_per_length", "strength_thickness") + MATERIAL_OPTIONAL  # optional: NaN where not given
_TEXT_COLUMNS = ("name", "family", "series", "material")
# the numeric columns of a block: dimensions, section properties, buckling
_NUMBER_COLUMNS = DIM_KEYS + tuple(KEYS) + STABILITY_KEYS
# every column a block builds: what the disk cache must hold to be used
_COLUMNS = _TEXT_COLUMNS + _NUMBER_COLUMNS
# a supplier list's rows: the same plus each row's file line, in front of the float columns
_USER_FRONT = _TEXT_COLUMNS + ("row",)
# what a supplier list's cache file holds besides those: its key, its warnings, the float block
_USER_EXTRA = ("_key", "_warnings", "_numbers")
# and each text column's distinct values (the column itself holds their codes: see cache.pack_text)
_USER_TEXT = tuple(f"_text_{k}" for k in _TEXT_COLUMNS)


def _block(series: str, family: str, dims: dict, names: list, materials, stability: bool = True) -> dict:
    """Columns (numpy arrays) for N rows of one family: text, dims, section properties (the
    buckling columns NaN unless ``stability``)."""
    numbers = _section_columns(family, dims, stability)
    n = len(names)
    cols = {"name": np.array(names, dtype=str), "family": np.full(n, family),
            "series": np.full(n, series),
            "material": np.array(materials if not isinstance(materials, str) else [materials] * n, dtype=str)}
    for k in _NUMBER_COLUMNS:
        cols[k] = numbers[k] if k in numbers else np.full(n, np.nan)
    return cols


def _section_columns(family: str, dims: dict, stability: bool = True) -> dict:
    """The dimension (those of the family), section-property and buckling columns of N rows of
    one family (the buckling columns NaN unless ``stability``)."""
    fam = FAMILIES[family]
    dims = fam.complete(dims)
    props = family_properties(family, dims, wagner=stability)
    cols = {k: dims[k] for k in DIM_KEYS if k in dims}
    for k in KEYS:
        cols[k] = np.asarray(props[k], float)
    try:
        if not stability:
            raise LeanspanError("not asked for")
        stab = family_stability(family, dims, cols["yc"], cols["zc"], props["wagner"])
    except LeanspanError:  # a closed form that does not fit these walls: buckling checks refuse the row
        n = len(cols["A"])
        stab = {k: np.full(n, np.nan) for k in STABILITY_KEYS}
    for k in STABILITY_KEYS:
        cols[k] = np.asarray(stab[k], float)
    return cols


def _concat(blocks: list[dict]) -> dict:
    return {k: np.concatenate([b[k] for b in blocks]) for k in _COLUMNS}


def _build_builtin() -> dict:
    blocks = []
    for s in SERIES.values():  # a small fixed set: one vectorised call per series
        dims = s.dims()
        blocks.append(_block(s.name, s.family, dims, s.names(dims), s.material))
    return _concat(blocks)


def cache_file() -> Path:
    """The cache file of the current code and data (it may not exist yet)."""
    return cache_dir() / f"catalog-{source_hash()}.npz"


def _load_cache(path: Path) -> dict | None:
    return load_columns(path, _COLUMNS)


def _save_cache(path: Path, cols: dict) -> None:
    save_columns(path, cols)  # and drop the caches of older code


@lru_cache(maxsize=4)
def _builtin_columns(key: str, use_disk: bool) -> dict:
    path = cache_dir() / f"catalog-{key}.npz"
    cols = _load_cache(path) if use_disk else None
    if cols is None:
        cols = _build_builtin()
        if use_disk:
            _save_cache(path, cols)
    return cols


def builtin_frame(use_cache: bool = True):
    """Geometry and section properties of every built-in series row (default materials).

    Parameters
    ----------
    use_cache : bool
        False rebuilds from scratch (no memory or disk cache), as the benchmark does.
    """
    import pandas as pd

    cols = _build_builtin() if not (use_cache and cache_enabled()) else _builtin_columns(source_hash(), True)
    return pd.DataFrame({k: v.copy() for k, v in cols.items()})


def _user_frame(path, mats):
    """A supplier list's rows (series ``user``, column ``row``: the file line) and its warnings,
    from the disk cache when this text was computed before with these materials and this code
    (:mod:`.cache`)."""
    import pandas as pd

    path = Path(path)
    text = read_text(path, "a CSV file", CatalogError, encoding="utf-8-sig")
    key = user_key(text, mats) if cache_enabled() else None
    cached = _load_user_cache(user_cache_file(key), key) if key else None
    if cached is not None:
        protect_inputs(path)
        cols, notes = cached
        warnings = [f"{path}: {n}" for n in notes]
    else:
        cols, warnings = _user_columns(path, text, mats)
        if key and len(cols["row"]) >= USER_MIN_ROWS:
            _save_user_cache(user_cache_file(key), key, cols, warnings, path)
    # the float columns are the rows of one block ("_numbers"): one frame block, no copy
    df = pd.DataFrame(cols["_numbers"].T, columns=list(_NUMBER_COLUMNS), copy=False)
    for k in reversed(_USER_FRONT):  # text and file lines in front
        df.insert(0, k, cols[k])
    return df, warnings


def _user_columns(path, text, mats):
    """Read and compute a supplier list: its columns (rows in file order) and its warnings.

    Each family's rows are computed at once and written straight to their places in file order."""
    cat = read_user_catalog(path, mats, text=text)
    if not cat.blocks:
        raise CatalogError(f"{path}: no catalogue rows")
    lines = np.concatenate([b.lines for b in cat.blocks.values()])
    order = np.argsort(lines, kind="stable")
    place = np.empty_like(order)
    place[order] = np.arange(order.size)  # each block row's place in file order
    n = order.size
    cols = {"name": np.empty(n, object), "family": np.empty(n, object), "series": np.full(n, "user", object),
            "material": np.empty(n, object), "row": lines[order]}
    # the float columns: rows of one block, "_numbers" (the frame takes it whole, without a copy)
    cols["_numbers"] = numbers = np.empty((len(_NUMBER_COLUMNS), n))
    numbers[:len(DIM_KEYS)] = np.nan  # a dimension a family does not use stays NaN; every row has the rest
    cols.update(zip(_NUMBER_COLUMNS, numbers))
    start = 0
    for fam, b in cat.blocks.items():  # one vectorised call per family present
        rows = place[start:start + b.lines.size]
        start += b.lines.size
        for k, v in _section_columns(fam, b.dims).items():
            cols[k][rows] = v
        cols["name"][rows], cols["family"][rows], cols["material"][rows] = b.names, fam, b.materials
    return cols, cat.warnings + _compare_tabulated(cols, cat, mats)


def _load_user_cache(file, key):
    """The columns and warnings (without the file name in front) of a supplier list's cache
    file; None when missing, damaged or not this key's."""
    cols = load_columns(file, _USER_FRONT, _USER_EXTRA + _USER_TEXT)
    if cols is None or cols.pop("_key").tolist() != [key]:
        return None
    numbers = cols["_numbers"]
    if numbers.shape != (len(_NUMBER_COLUMNS), len(cols["row"])) or numbers.dtype != float:
        return None
    cols.update(zip(_NUMBER_COLUMNS, numbers))
    for k, blob in zip(_TEXT_COLUMNS, _USER_TEXT):
        cols[k] = unpack_text(cols[k], cols.pop(blob))
        if cols[k] is None:
            return None
    return cols, cols.pop("_warnings").tolist()


def _save_user_cache(file, key, cols, warnings, path) -> None:
    prefix = f"{path}: "
    if not all(w.startswith(prefix) for w in warnings):  # a note that cannot be moved to another path
        return
    extra = {"_key": np.array([key]), "_warnings": np.array([w[len(prefix):] for w in warnings], dtype=str),
             "_numbers": cols["_numbers"]}
    cols = {k: cols[k] for k in _USER_FRONT}
    for k, blob in zip(_TEXT_COLUMNS, _USER_TEXT):  # text as codes and distinct values
        packed = pack_text(cols[k])
        if packed is None:  # a name holding NUL: not cached
            return
        cols[k], extra[blob] = packed
    save_columns(file, {**cols, **extra}, compress=False, keep=USER_FILES_KEPT)


def _compare_tabulated(cols, cat, mats) -> list:
    """Warnings, row by row, where a tabulated property differs from the computed one by > 1 %
    (``mass_per_length`` with the row's own material)."""
    warnings = []
    for block in cat.blocks.values():
        idx = np.searchsorted(cols["row"], block.lines)  # cols["row"]: every file line, ascending
        for key, given in block.tabulated.items():
            if key == "mass_per_length":
                names, code = _factorize(block.materials)
                computed = cols["A"][idx] * np.array([mats[m].density for m in names])[code]
            else:
                computed = cols[key][idx]
            with np.errstate(divide="ignore", invalid="ignore"):
                rel = (given - computed) / np.abs(computed)
            # 1 % of the computed value; lengths also pass within 1 micrometre (zc = 0 vs 1e-19)
            slack = 1e-6 if TABULATED[key][0] == "length" else 0.0
            bad = np.flatnonzero(np.isfinite(given) & ~(np.abs(given - computed)
                                                      <= 0.01 * np.abs(computed) + slack))
            unit = TABULATED[key][1]
            f = column_factor(unit, TABULATED[key][0], key)
            for i in bad:  # a loop over the few disagreeing rows only
                warnings.append(
                    f"{cat.path}: row {block.lines[i]} ({block.names[i]}): tabulated {key} = "
                    f"{given[i] / f:.5g} {unit}, computed {computed[i] / f:.5g} {unit} "
                    f"({100 * rel[i]:+.1f} %)")
    return warnings


def _expand_names(names, what, known_series, known_families):
    if names is None:
        return None
    if isinstance(names, str):
        names = [names]
    out = list(names)
    for n in out:
        if n in RENAMED and n not in known_series:
            raise CatalogError(f"{what} {n!r} is now called {RENAMED[n]!r} (generated by rules, not "
                               "a stock product list)")
        if n not in known_series and n not in known_families and n != "user":
            raise CatalogError(f"unknown {what} {n!r}; expected a shape family "
                               f"({', '.join(known_families)}) or a series "
                               f"({', '.join(known_series)})")
    return out


def check_shape_names(names, what: str = "family") -> None:
    """Raise CatalogError for a name that is neither a shape family nor a series (nor "user").

    >>> check_shape_names(["glulam", "tube"])
    >>> check_shape_names(["oak_logs"])
    Traceback (most recent call last):
    ...
    leanspan.errors.CatalogError: unknown family 'oak_logs'; expected a shape family (...) or a series (...)
    """
    _expand_names(names, what, SERIES, FAMILIES)


def catalog_table(series=None, families=None, materials=None, user_csv=None, max_depth=None,
                  min_width=None, max_width=None, min_depth=None, builtin=None,
                  material_table=None):
    """The catalogue as a DataFrame, filtered.

    Parameters
    ----------
    series : str or list of str, optional
        Keep these series (``"glulam"``, ``"gen_steel_i"`` ...; ``"user"`` for the rows
        of ``user_csv``).
    families : str or list of str, optional
        Keep these shape families (``"ibeam"``) — a series name is accepted too.
    materials : str or list of str, optional
        Pair the geometry with these materials (see the module notes); default: each
        series' own material (a user row's ``material`` column).
    user_csv : path-like, optional
        A user catalogue (see :mod:`leanspan.catalog.user`). Its rows come in series
        ``"user"``; warnings about tabulated values are in ``df.attrs["warnings"]``.
    max_depth, min_depth, min_width, max_width : float, optional
        Limits on the overall depth and width, m (met within a relative 1e-4).
    builtin : bool, optional
        Include the built-in series (default: yes without ``user_csv``, no with it).
    material_table : path-like or dict, optional
        A user materials file or table (adds and overrides materials).

    Returns
    -------
    pandas.DataFrame
        One row per section and material; see the module notes for the columns.

    Raises
    ------
    CatalogError, MaterialError
        Unknown series/family/material, a bad user catalogue.
    """
    import pandas as pd

    mats = materials_table(material_table)
    series = _expand_names(series, "series", SERIES, FAMILIES)
    families = _expand_names(families, "family", SERIES, FAMILIES)
    if builtin is None:
        builtin = user_csv is None
    frames, warnings = [], []
    if builtin:
        frames.append(builtin_frame())
    if user_csv is not None:
        udf, user_warnings = _user_frame(user_csv, mats)
        warnings += user_warnings
        frames.append(udf)
    if not frames:
        raise CatalogError("empty catalogue: give a user catalogue or include the built-in series")
    df = pd.concat(frames, ignore_index=True) if len(frames) > 1 else frames[0]
    keep = np.ones(len(df), bool)
    if series is not None:
        keep &= df["series"].isin(series).to_numpy()
    if families is not None:
        keep &= (df["family"].isin(families) | df["series"].isin(families)).to_numpy()
    for limit, col, op in ((max_depth, "depth", np.less_equal), (min_depth, "depth", np.greater_equal),
                           (max_width, "width", np.less_equal), (min_width, "width", np.greater_equal)):
        if limit is not None:
            # relative slack 1e-4: a polygonised tube of d = 21.3 mm is 21.301 mm deep
            keep &= op(df[col].to_numpy(), float(limit) * (1 + 1e-4) if op is np.less_equal
                       else float(limit) * (1 - 1e-4))
    if not keep.all():  # (no copy when every row stays)
        df = df[keep].reset_index(drop=True)
    if materials is None:
        df = _with_materials(df, None, mats)
    else:
        if isinstance(materials, str):
            materials = [materials]
        parts = []
        for name in materials:  # a small set of materials
            m = get_material(name, mats)
            accepts = {s: m.kind in SERIES[s].kinds for s in SERIES}
            ok = np.isin(df["series"].to_numpy(), [s for s, yes in accepts.items() if yes])
            user = (df["series"] == "user").to_numpy()
            if user.any():  # user rows pair with materials of their own material's kind
                own = {x: mats[x].kind == m.kind for x in df["material"][user].unique()}
                ok[user] = df["material"][user].map(own).to_numpy(bool)
            parts.append(_with_materials(df[ok], m.name, mats))
        df = pd.concat(parts, ignore_index=True)
    df.attrs["warnings"] = warnings + beyond_table(df["material"].to_numpy(), df["strength_thickness"].to_numpy())
    return df


def family_rows(family: str, dims: dict, names, material: str, series: str = "built_up",
                material_table=None, stability: bool = True):
    """Rows with every catalogue column for N sections of one family in one material, built as
    the catalogue builds its own (what a built-up search screens); ``stability=False`` leaves the
    buckling columns (:data:`~leanspan.sections.properties.STABILITY_KEYS`) NaN.

    >>> import numpy as np
    >>> df = family_rows("rectangle", {"b": np.array([0.1]), "d": np.array([0.3])}, ["r"], "C24")
    >>> round(float(df.Iz[0] / (0.1 * 0.3**3 / 12)), 12), df.series[0], df.material[0]   # b d^3 / 12
    (1.0, 'built_up', 'C24')
    """
    import pandas as pd

    mats = materials_table(material_table)
    df = pd.DataFrame(_block(series, family, dims, list(names), material, stability))
    return _with_materials(df, get_material(material, mats).name, mats)


def _with_materials(df, material, mats):
    """Set the material columns (one material for all rows, or each row's own)."""
    import pandas as pd

    df = df.copy(deep=False)  # (copy-on-write: the caller's frame keeps its columns)
    if material is not None:
        df["material"] = material
    names = df["material"].to_numpy()
    grades = uniq, inv = distinct(names)  # (by hashing: quicker than sorting the names)
    rows = [mats[u] for u in uniq]
    df["kind"] = np.array([m.kind for m in rows], dtype=object)[inv] if rows else []
    for col in ("E", "G", "density", "strength_bending", "strength_shear") + MATERIAL_OPTIONAL:
        df[col] = np.array([getattr(m, col) for m in rows], float)[inv] if rows else []  # None -> NaN
    df["mass_per_length"] = df["A"].to_numpy() * df["density"].to_numpy()
    _step_strengths(df, names, grades)
    return df


def _step_strengths(df, names, grades) -> None:
    """Scale the strengths of graded metals by their yield step at the governing thickness (the
    thickest element, :mod:`.thickness`); ``strength_thickness`` is that thickness (NaN: no steps).
    ``names``: the material column, ``grades``: its distinct names and codes."""
    t = governing_thickness(df["family"].to_numpy(), {k: df[k].to_numpy(float) for k in DIM_KEYS})
    stepped = graded(names, grades)
    factor = strength_factors(names, t, grades)
    df["strength_bending"] = df["strength_bending"].to_numpy() * factor
    df["strength_shear"] = df["strength_shear"].to_numpy() * factor
    df["strength_thickness"] = np.where(stepped, t, np.nan)


def dims_of(df) -> dict[str, dict[str, np.ndarray]]:
    """Dimension arrays per shape family, rows in the order of ``df[df.family == f]``.

    Examples
    --------
    >>> df = catalog_table(series="gen_chs", max_depth=0.05)
    >>> d = dims_of(df)["tube"]
    >>> sorted(d), bool((d["d"] <= 0.05).all())
    (['d', 't'], True)
    """
    out = {}
    for fam in df["family"].unique():
        sub = df[df["family"] == fam]
        out[fam] = {k: sub[k].to_numpy(float) for k in FAMILIES[fam].all_keys}
    return out


def row_dims(row) -> dict[str, float]:
    """The dimensions of one row (a Series or dict), SI; optional keys equal to defaults dropped.

    >>> df = catalog_table(series="gen_steel_i")
    >>> row_dims(df[df.name == "I 300x150x7.1x10.7"].iloc[0])
    {'d': 0.3, 'b': 0.15, 'tw': 0.0071, 'tf': 0.0107, 'r': 0.015}
    """
    if row["family"] not in FAMILIES:  # a built-up flitch row: its own sizes
        return {k: float(row[k]) for k in BUILT_UP_DIM_KEYS if k in row and not np.isnan(float(row[k]))}
    fam = FAMILIES[row["family"]]
    out = {k: float(row[k]) for k in fam.keys}
    for k, default in fam.optional.items():
        v = float(row[k])
        base = out.get(default) if isinstance(default, str) else default
        if not np.isnan(v) and v != base:
            out[k] = v
    return out
