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
import re
from collections import Counter
from operator import methodcaller
from pathlib import Path

import numpy as np

from ..errors import CatalogError, brief
from ..units import unit_factor

__all__ = ["split_header", "column_factor", "read_table", "read_grid", "to_float"]

_ODD_SPACE = re.compile(r"[^\S \t\n]")  # white space other than blanks, tabs and line ends
_ODD_ASCII_SPACE = "\x0b\x0c\x1c\x1d\x1e\x1f"


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
            header = _header(cells, line, path, error)
            continue
        rows.append((line, cells))
    if header is None:
        raise error(_NO_HEADER.format(path=path))
    return header, rows


_NO_HEADER = "{path}: no header row; expected column names such as 'family,d,b'"


def _header(cells, line, path, error) -> list:
    """The header cells as ``(name, unit)``; a column named twice is an error."""
    header = [split_header(c) for c in cells]
    counts = Counter(h for h, _ in header)
    dup = {n for n, k in counts.items() if k > 1}
    if dup:
        raise error(f"{path}: row {line}: column {sorted(dup)[0]!r} appears twice")
    return header


def read_grid(text: str, path, error=CatalogError):
    """The rows of a CSV text as one (N, columns) array of stripped cells, split all at once.

    The same cells and line numbers as :func:`read_table` (short rows padded with blanks),
    without a Python step per row: the text is split on line ends and commas once, and
    comments, blank lines and short rows are found with arrays over the lines. Text the
    direct split cannot read exactly (quotes, white space other than blanks and tabs) and a
    row with more cells than the header give None: :func:`read_table` then reads it (and
    names the row).

    Returns
    -------
    header : list of (name, unit or None)
    lines : ndarray of int
        The file line number of every row.
    grid : ndarray of object (N, columns)
        The cells (str).

    Examples
    --------
    >>> header, lines, grid = read_grid("# invented\\nfamily, d [in]\\n\\ncircle , 2\\ntube\\n", "x.csv")
    >>> header, lines.tolist(), grid.tolist()
    ([('family', None), ('d', 'in')], [4, 5], [['circle', '2'], ['tube', '']])
    >>> read_grid('family,name\\nbox,"a, b"\\n', "x.csv") is None  # quotes: the csv module reads it
    True
    """
    if '"' in text:
        return None
    text = text.replace("\r\n", "\n").replace("\r", "\n")  # the csv module's line ends
    if _odd_space(text):
        return None
    lines = text.split("\n")
    n = len(lines)
    spaced = " " in text or "\t" in text
    if spaced:  # (str.strip takes blanks and tabs, the only white space left)
        lines = list(map(str.strip, lines))
    # per line, each a pass in C: commas, a comment mark, anything but commas (and blanks)
    commas = np.fromiter(map(methodcaller("count", ","), lines), np.int64, n)
    if spaced:
        comment = np.fromiter(map(methodcaller("startswith", "#"), lines), bool, n)
        filled = np.fromiter(map(len, map(methodcaller("strip", ", \t"), lines)), np.int64, n) > 0
    else:  # no blanks: a line of commas only is as long as its commas; comments found from the '#'s
        lengths = np.fromiter(map(len, lines), np.int64, n)
        filled = lengths > commas
        comment = _comment_lines(text, lines, lengths)
    rows = np.flatnonzero(filled & ~comment)
    if rows.size == 0:
        raise error(_NO_HEADER.format(path=path))
    header = _header([c.strip() for c in lines[rows[0]].split(",")], int(rows[0]) + 1, path, error)
    width, rows = len(header), rows[1:]
    if (commas[rows] >= width).any():
        return None
    picked = np.array(lines, dtype=object)[rows]
    short = commas[rows] < width - 1
    if short.any():  # pad short rows with blank cells
        picked[short] = picked[short] + np.full(int(short.sum()), ",", object) * (width - 1 - commas[rows][short])
    data = ",".join(picked.tolist())
    cells = data.split(",") if rows.size else []
    if spaced and (" " in data or "\t" in data):  # a row with blanks: strip every cell
        cells = list(map(str.strip, cells))
    grid = np.array(cells, dtype=object)
    return header, rows + 1, grid.reshape(rows.size, width)


def _comment_lines(text: str, lines, lengths) -> np.ndarray:
    """Which ``lines`` (``text`` split on line ends, ``lengths`` long) start with ``#``: from the
    places of the few ``#`` in the text, else a test of every line."""
    if text.count("#") > 64:
        return np.fromiter(map(methodcaller("startswith", "#"), lines), bool, len(lines))
    starts = np.concatenate(([0], np.cumsum(lengths[:-1] + 1)))  # each line's first character
    marks, at = [], text.find("#")
    while at >= 0:
        marks.append(at)
        at = text.find("#", at + 1)
    line = np.searchsorted(starts, marks, side="right") - 1
    comment = np.zeros(lengths.size, bool)
    comment[line[starts[line] == marks]] = True
    return comment


def _odd_space(text: str) -> bool:
    """True if ``text`` holds white space other than blanks, tabs and line ends (which
    :func:`read_grid` leaves to the csv module's reader)."""
    if text.isascii():  # (a few scans in C: quicker than the expression)
        return any(c in text for c in _ODD_ASCII_SPACE)
    return _ODD_SPACE.search(text) is not None


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
