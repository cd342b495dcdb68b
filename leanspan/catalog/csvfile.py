"""Reading the CSV tables of the catalogue: unit headers, comment lines, row numbers.

A column header may carry its unit in square brackets (``d [in]``, ``E [MPa]``);
lines starting with ``#`` and blank lines are skipped. Row numbers in messages are
line numbers of the file (the header is usually line 1), as a text editor shows them.
Units are read by :func:`leanspan.units.unit_factor`.

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

from ..errors import CatalogError, brief
from ..units import unit_factor

__all__ = ["split_header", "column_factor", "read_table", "to_float"]


def split_header(text: str) -> tuple[str, str | None]:
    """Split ``"name [unit]"`` into ``(name, unit)``; no brackets gives ``(name, None)``."""
    text = text.strip()
    if text.endswith("]") and "[" in text:
        name, unit = text[:-1].split("[", 1)
        return name.strip(), unit.strip()
    return text, None


def column_factor(unit: str, kind: str, field: str, error=CatalogError) -> float:
    """SI factor of a column's ``unit`` for a quantity of ``kind``; raise ``error`` naming ``field``
    (:func:`leanspan.units.unit_factor`, raising a catalogue error by default)."""
    return unit_factor(unit, kind, field, error)


def _lines(text: str, path, error):
    """``(line number, stripped cells)`` of every row that is neither blank nor a comment.

    Text without quotes is split on commas directly (a supplier list of 100,000 rows reads in a
    fraction of the csv module's time, and cells are stripped only on lines with blanks); text
    with quotes goes through the csv module.
    """
    if '"' not in text:
        # the csv module's line ends only (str.splitlines would also split on \f, \x1c ...)
        for number, line in enumerate(text.replace("\r\n", "\n").replace("\r", "\n").split("\n"), 1):
            bare = line.strip()
            if not bare.strip(",") or bare.startswith("#"):
                continue
            cells = line.split(",")
            if " " in line or not line.isprintable():  # blanks, tabs and other white space
                cells = [c.strip() for c in cells]
            if any(cells):
                yield number, cells
        return
    reader = csv.reader(io.StringIO(text))
    try:
        for cells in reader:
            cells = [c.strip() for c in cells]
            if not any(cells) or cells[0].startswith("#"):
                continue
            yield reader.line_num, cells
    except csv.Error as exc:
        raise error(f"{path}: row {reader.line_num}: broken CSV ({exc})") from None


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
    for line, cells in _lines(text, path, error):
        if header is None:
            header = [split_header(c) for c in cells]
            names = [h for h, _ in header]
            dup = {n for n in names if names.count(n) > 1}
            if dup:
                raise error(f"{path}: row {line}: column {sorted(dup)[0]!r} appears twice")
            continue
        rows.append((line, cells))
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
        raise error(f"{where}: expected {expected} (a number), got {brief(text)}") from None
    if not math.isfinite(value):
        raise error(f"{where}: expected a finite number, got {brief(text)}")
    return value
