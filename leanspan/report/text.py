"""Plain-text and CSV tables: the one aligned-table writer and the one CSV writer.

Examples
--------
>>> print(aligned_table(["name", "d [mm]"], [["rect 38x170", "170"], ["R-2", "-"]]))
name         d [mm]
rect 38x170     170
R-2               -
>>> print(csv_text(["name", "d"], [["rect 38x170", 0.17]], {"d": ("mm", 1e-3)}), end="")
name,d [mm]
rect 38x170,170
"""

from __future__ import annotations

__all__ = ["aligned_table", "numeric_columns", "ascii_unit", "csv_text"]

_ASCII = str.maketrans({"²": "^2", "³": "^3", "⁴": "^4", "⁶": "^6", "·": "*"})


def _reads_as_number(text: str) -> bool:
    try:
        float(text)
    except ValueError:
        return False
    return True


def numeric_columns(rows) -> set[int]:
    """Indices of the columns whose cells all read as numbers or "-" (at least one a number).

    >>> sorted(numeric_columns([["1", "C24", "-"], ["12", "S355", "0.5"]]))
    [0, 2]
    """
    rows = [list(r) for r in rows]
    if not rows:
        return set()
    out = set()
    for i in range(len(rows[0])):
        cells = [str(r[i]).strip() for r in rows]
        if all(c == "-" or _reads_as_number(c) for c in cells) and any(c != "-" for c in cells):
            out.add(i)
    return out


def aligned_table(headers, rows, right=None, rule: bool = False, indent: str = "") -> str:
    """Columns padded to their widest cell, two spaces apart, without trailing blanks.

    Parameters
    ----------
    headers : list of str
        The first line; ``None`` or empty for a table without a header line.
    rows : list of list of str
    right : set of int, optional
        Columns aligned to the right; by default those of :func:`numeric_columns`.
    rule : bool
        A line of dashes under the headers.
    indent : str
        Put in front of every line.

    >>> print(aligned_table(["n", "x"], [["a", "1.5"], ["bb", "10"]], rule=True))
    n     x
    --  ---
    a   1.5
    bb   10
    """
    rows = [[str(c) for c in r] for r in rows]
    lines = [list(headers)] if headers else []
    if headers and rule:
        lines.append(None)
    lines += rows
    n = max(len(r) for r in lines if r is not None) if any(r is not None for r in lines) else 0
    widths = [max(len(r[i]) for r in lines if r is not None) for i in range(n)]
    right = numeric_columns(rows) if right is None else set(right)

    def line(cells):
        return indent + "  ".join(c.rjust(w) if i in right else c.ljust(w)
                                  for i, (c, w) in enumerate(zip(cells, widths))).rstrip()

    return "\n".join(line(["-" * w for w in widths] if r is None else r) for r in lines)


def ascii_unit(label: str) -> str:
    """A display unit in plain ASCII, for file headers.

    >>> ascii_unit("mm⁴"), ascii_unit("kN·m²"), ascii_unit("lb/ft³")
    ('mm^4', 'kN*m^2', 'lb/ft^3')
    """
    return label.translate(_ASCII)


def csv_text(columns, rows, units=None) -> str:
    """CSV text with a header line; columns with a unit get ``name [unit]`` and scaled values.

    Parameters
    ----------
    columns : list of str
        Column names, in order.
    rows : pandas.DataFrame or iterable of sequences
        A DataFrame (columns taken by name) or rows of cells in the order of ``columns``.
    units : dict, optional
        ``column -> (display label, SI value of one display unit)``. Those columns are written
        as ``value / factor`` to 6 significant figures (NaN as an empty cell) under the header
        ``column [label]`` in ASCII; the others as they are.

    >>> print(csv_text(["name", "A"], [["a", 1.5e-3], ["b", float("nan")]], {"A": ("mm²", 1e-6)}), end="")
    name,A [mm^2]
    a,1500
    b,
    """
    import csv
    import io
    import math

    units = units or {}
    buf = io.StringIO()
    w = csv.writer(buf, lineterminator="\n")
    w.writerow([f"{c} [{ascii_unit(units[c][0])}]" if c in units else c for c in columns])
    factors = [units[c][1] if c in units else None for c in columns]
    if hasattr(rows, "columns"):  # a DataFrame: read it by column, which is fast
        data = [rows[c].to_numpy() for c in columns]
        rows = (tuple(col[i] for col in data) for i in range(len(rows)))
    for r in rows:
        w.writerow([v if f is None else ("" if math.isnan(v) else f"{v / f:.6g}")
                    for f, v in zip(factors, r)])
    return buf.getvalue()
