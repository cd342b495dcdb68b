"""Reading the CSV tables of the catalogue: unit headers, comment lines, row numbers.

A column header may carry its unit in square brackets (``d [in]``, ``E [MPa]``);
lines starting with ``#`` and blank lines are skipped. Row numbers in messages are
line numbers of the file (the header is usually line 1), as a text editor shows them.
Common units are converted from a small exact table; anything else goes through pint.

Examples
--------
>>> split_header("d [in]"), split_header(" family ")
(('d', 'in'), ('family', None))
>>> column_factor("in", "length", "x.csv: column 'd'")
0.0254
>>> column_factor("kg", "length", "x.csv: column 'd'")
Traceback (most recent call last):
...
leanspan.errors.CatalogError: x.csv: column 'd': unit 'kg' is not a length
"""

from __future__ import annotations

import csv
import io
from pathlib import Path

from ..errors import CatalogError

__all__ = ["split_header", "column_factor", "read_table", "to_float"]

_IN, _FT, _LBF, _LB = 0.0254, 0.3048, 4.4482216152605, 0.45359237
_PSI = _LBF / _IN**2
# kind -> {unit text: SI factor}; exact definitions, no pint import needed for these.
_FAST: dict[str, dict[str, float]] = {
    "length": {"m": 1.0, "cm": 1e-2, "mm": 1e-3, "in": _IN, "inch": _IN, "ft": _FT},
    "area": {"m^2": 1.0, "m2": 1.0, "cm^2": 1e-4, "cm2": 1e-4, "mm^2": 1e-6, "mm2": 1e-6,
             "in^2": _IN**2, "in2": _IN**2},
    "section modulus": {"m^3": 1.0, "m3": 1.0, "cm^3": 1e-6, "cm3": 1e-6, "mm^3": 1e-9,
                        "mm3": 1e-9, "in^3": _IN**3, "in3": _IN**3},
    "second moment": {"m^4": 1.0, "m4": 1.0, "cm^4": 1e-8, "cm4": 1e-8, "mm^4": 1e-12,
                      "mm4": 1e-12, "in^4": _IN**4, "in4": _IN**4},
    "pressure": {"Pa": 1.0, "kPa": 1e3, "MPa": 1e6, "GPa": 1e9, "N/mm^2": 1e6, "N/mm2": 1e6,
                 "kN/mm^2": 1e9, "kN/mm2": 1e9, "psi": _PSI, "ksi": 1e3 * _PSI},
    "density": {"kg/m^3": 1.0, "kg/m3": 1.0, "t/m^3": 1e3, "t/m3": 1e3, "g/cm^3": 1e3,
                "g/cm3": 1e3, "lb/ft^3": _LB / _FT**3, "lb/ft3": _LB / _FT**3, "pcf": _LB / _FT**3},
    "mass/length": {"kg/m": 1.0, "lb/ft": _LB / _FT, "plf": _LB / _FT},
    "dimensionless": {"": 1.0, "-": 1.0, "rad": 1.0},
}
_PINT_DIM = {"section modulus": "[length] ** 3", "dimensionless": ""}
_WORDS = {"length": "a length", "area": "an area", "section modulus": "a length cubed",
          "second moment": "a length to the fourth", "pressure": "a stress",
          "density": "a density", "mass/length": "a mass per length",
          "dimensionless": "dimensionless"}


def split_header(text: str) -> tuple[str, str | None]:
    """Split ``"name [unit]"`` into ``(name, unit)``; no brackets gives ``(name, None)``."""
    text = text.strip()
    if text.endswith("]") and "[" in text:
        name, unit = text[:-1].split("[", 1)
        return name.strip(), unit.strip()
    return text, None


def column_factor(unit: str, kind: str, field: str, error=CatalogError) -> float:
    """SI factor of ``unit`` for a quantity of ``kind``; raise ``error`` naming ``field``."""
    fast = _FAST.get(kind, {})
    key = unit.replace(" ", "").replace("**", "^").replace("³", "^3").replace("²", "^2").replace("⁴", "^4")
    if key in fast:
        return fast[key]
    from ..units import KINDS, registry

    ureg = registry()
    try:
        q = ureg.Quantity(1.0, unit)
    except Exception:
        raise error(f"{field}: unknown unit {unit!r}") from None
    dim = _PINT_DIM.get(kind, KINDS[kind][0] if kind in KINDS else "")
    if q.dimensionality != ureg.get_dimensionality(dim):
        raise error(f"{field}: unit {unit!r} is not {_WORDS.get(kind, kind)}") from None
    return float(q.to_base_units().magnitude)


def read_table(path, error=CatalogError, text: str | None = None):
    """Read a CSV file into ``(header, rows)``.

    Parameters
    ----------
    path : path-like
        The file (also used in messages when ``text`` is given).
    error : exception class
        Raised for a missing, unreadable or empty file.
    text : str, optional
        File contents already read (the built-in tables come from package data).

    Returns
    -------
    header : list of (name, unit or None)
    rows : list of (line number, list of cell strings)

    Examples
    --------
    >>> h, rows = read_table("demo.csv", text="# invented\\nfamily,d [in]\\ncircle,2\\n")
    >>> h, rows
    ([('family', None), ('d', 'in')], [(3, ['circle', '2'])])
    """
    path = Path(path)
    if text is None:
        from ..fileio import read_text

        text = read_text(path, "a CSV file", error, encoding="utf-8-sig")
    header = None
    rows = []
    reader = csv.reader(io.StringIO(text))
    try:
        for cells in reader:
            line = reader.line_num
            if not cells or all(not c.strip() for c in cells) or cells[0].lstrip().startswith("#"):
                continue
            if header is None:
                header = [split_header(c) for c in cells]
                names = [h for h, _ in header]
                dup = {n for n in names if names.count(n) > 1}
                if dup:
                    raise error(f"{path}: row {line}: column {sorted(dup)[0]!r} appears twice")
                continue
            rows.append((line, [c.strip() for c in cells]))
    except csv.Error as exc:
        raise error(f"{path}: row {reader.line_num}: broken CSV ({exc})") from None
    if header is None:
        raise error(f"{path}: no header row; expected column names such as 'family,d,b'")
    return header, rows


def to_float(text: str, where: str, expected: str, error=CatalogError) -> float:
    """Read a number from a cell; raise ``error`` saying ``where`` and what was ``expected``.

    >>> to_float(" 12.5 ", "x.csv: row 3: column 'd'", "a length")
    12.5
    """
    import math

    try:
        value = float(text)
    except ValueError:
        if not text.strip():
            raise error(f"{where}: missing value; expected {expected}") from None
        raise error(f"{where}: expected {expected} (a number), got {text!r}") from None
    if not math.isfinite(value):
        raise error(f"{where}: expected a finite number, got {text!r}")
    return value
