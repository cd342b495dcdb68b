"""Yield strength by thickness: the standards step a grade's fy down for thicker products.

The steps live in ``leanspan/catalog/data/steel_thickness.csv`` (grade, largest thickness a
row covers, fy, source), read once. A catalogue row of a listed grade gets its
``strength_bending`` and ``strength_shear`` scaled by ``fy(t) / fy(first row)``, where ``t``
is the row's **governing thickness**, the thickest element of the section:

- ``ibeam``: the largest of ``tw``, ``tf_top``, ``tf_bot``; ``channel``, ``tee``: of ``tw``, ``tf``
  (in practice the flange);
- ``box``, ``tube``, ``angle``: the wall or leg thickness ``t``;
- ``rectangle``: the smaller of ``b``, ``d`` (a flat bar's thickness); ``circle``: ``d``.

A row applies above the previous row's ``t_max`` up to its own (``t <= 16 mm`` is the first
step of EN 10025-2). Thicker than the last row: the last row's fy, with a warning. Grades not
listed (ASTM, aluminium, timber) keep their strengths.

Examples
--------
>>> import numpy as np
>>> f = strength_factors(np.array(["S355"] * 4), np.array([0.010, 0.016, 0.0215, 0.050]))
>>> [round(float(x) * 355) for x in f]   # EN 10025-2 Table 7: 355 / 345 / 335 MPa (from memory)
[355, 355, 345, 335]
>>> float(strength_factors(np.array(["A992"]), np.array([0.05]))[0])
1.0
"""

from __future__ import annotations

from functools import lru_cache
from importlib import resources

import numpy as np

from ..errors import CatalogError
from .csvfile import column_factor, read_table, to_float

__all__ = ["STEPS_FILE", "thickness_steps", "governing_thickness", "strength_factors", "beyond_table", "graded",
           "distinct"]

STEPS_FILE = "steel_thickness.csv"


@lru_cache(maxsize=1)
def thickness_steps() -> dict:
    """``{grade: (t_max (m) array, fy (Pa) array, sources)}`` from the built-in file, read once."""
    text = resources.files("leanspan.catalog").joinpath("data", STEPS_FILE).read_text(encoding="utf-8")
    header, rows = read_table(STEPS_FILE, CatalogError, text)
    names = [h for h, _ in header]
    ft = column_factor(dict(header)["t_max"], "length", f"{STEPS_FILE}: column 't_max'")
    ff = column_factor(dict(header)["fy"], "pressure", f"{STEPS_FILE}: column 'fy'")
    out: dict[str, list] = {}
    for line, cells in rows:  # a small fixed file
        cell = dict(zip(names, cells))
        where = f"{STEPS_FILE}: row {line}"
        t = to_float(cell["t_max"], where, "a thickness") * ft
        fy = to_float(cell["fy"], where, "a yield strength") * ff
        out.setdefault(cell["grade"], []).append((t, fy, cell.get("source", "")))
    steps = {}
    for grade, rows_ in out.items():
        t, fy, src = zip(*rows_)
        if list(t) != sorted(t):
            raise CatalogError(f"{STEPS_FILE}: grade {grade}: t_max must increase row by row")
        steps[grade] = (np.array(t), np.array(fy), tuple(src))
    return steps


def governing_thickness(family, dims: dict, known=None) -> np.ndarray:
    """The thickest element of each row (m), from the family (N,) and dimension columns (N,) (NaN
    where a family does not use a key).

    >>> import numpy as np
    >>> fam = np.array(["ibeam", "box", "rectangle"])
    >>> nan = np.nan
    >>> dims = {"tw": np.array([0.008, nan, nan]), "tf": np.array([0.02, nan, nan]),
    ...         "tf_top": np.array([0.02, nan, nan]), "tf_bot": np.array([0.025, nan, nan]),
    ...         "t": np.array([nan, 0.01, nan]), "b": np.array([0.3, 0.2, 0.05]),
    ...         "d": np.array([0.6, 0.3, 0.2])}
    >>> [float(x) for x in governing_thickness(fam, dims)]
    [0.025, 0.01, 0.05]

    ``known``: ``(names, codes)`` of ``family`` if already known (as :func:`distinct` gives).
    """
    names, code = known or distinct(family)
    n = code.size
    get = lambda k: np.asarray(dims[k], float) if k in dims else np.full(n, np.nan)  # noqa: E731
    plates = np.fmax(get("tw"), np.fmax(get("tf"), np.fmax(get("tf_top"), get("tf_bot"))))
    rule = np.array([0 if f in ("ibeam", "channel", "tee") else 1 if f in ("box", "tube", "angle") else
                     {"rectangle": 2, "circle": 3}.get(f, 4) for f in names], int)[code]
    return np.select([rule == 0, rule == 1, rule == 2, rule == 3],
                     [plates, get("t"), np.fmin(get("b"), get("d")), get("d")], np.nan)


def distinct(values):
    """The distinct names (str) of an array and each entry's index among them (hashing, no sort)."""
    import pandas as pd

    code, names = pd.factorize(np.asarray(values, dtype=object).ravel(), use_na_sentinel=False)
    return [str(x) for x in names], code


def graded(materials, known=None) -> np.ndarray:
    """True for the rows whose material has thickness steps (``known``: see governing_thickness)."""
    names, code = known or distinct(materials)
    return np.array([x in thickness_steps() for x in names], bool)[code] if names else np.zeros(code.size, bool)


def strength_factors(materials, t, known=None) -> np.ndarray:
    """``fy(t) / fy(first step)`` per row (1 for grades without steps), arrays (N,) (``known``: see
    governing_thickness)."""
    names, code = known or distinct(materials)
    t = np.asarray(t, float)
    out = np.ones(code.size)
    steps = thickness_steps()
    for j, grade in enumerate(names):  # a small set of grades
        if grade not in steps:
            continue
        rows = code == j
        t_max, fy, _ = steps[grade]
        i = np.minimum(np.searchsorted(t_max * (1 + 1e-9), t[rows], side="left"), t_max.size - 1)
        out[rows] = np.where(np.isnan(t[rows]), 1.0, fy[i] / fy[0])
    return out


def beyond_table(materials, t) -> list:
    """Warnings for rows thicker than their grade's last step (they keep that step's fy)."""
    names, code = distinct(materials)
    t = np.asarray(t, float)
    out = []
    for grade, (t_max, _, src) in thickness_steps().items():
        if grade not in names:
            continue
        rows = (code == names.index(grade)) & (t > t_max[-1] * (1 + 1e-9))
        if rows.any():
            out.append(f"{grade}: {int(rows.sum())} catalogue row(s) thicker than {t_max[-1] * 1e3:g} mm, "
                       f"the largest thickness of {src[-1].split(' (')[0]}: their fy is taken as the "
                       "last step's; check the product standard")
    return out
