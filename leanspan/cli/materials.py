"""``leanspan materials``: the materials table (built-in rows plus a user file).

Columns: name kind E G density strength_bending strength_shear source (and group,
basis); ``--json`` prints a list of rows in SI values; ``--csv OUT`` writes the table with unit headers
(readable back as a user materials file).
"""

from __future__ import annotations

from . import add_common, emit_json

__all__ = ["add_parser", "run"]

_COLUMNS = (("E", "modulus"), ("G", "modulus"), ("density", "density"),
            ("strength_bending", "pressure"), ("strength_shear", "pressure"))


def add_parser(subparsers):
    p = subparsers.add_parser("materials", help="list the materials table",
                              description="List the materials: built-in rows from the standards "
                                          "plus an optional user file (TOML or CSV).")
    p.add_argument("--file", metavar="MATERIALS", help="user materials file (.toml or .csv) that "
                   "adds or overrides rows")
    p.add_argument("--kind", action="append", metavar="KIND",
                   help="only this kind (steel, stainless, aluminium, timber, glulam); repeatable")
    p.add_argument("--csv", metavar="OUT.csv", help="also write the table to a CSV file")
    add_common(p)
    p.set_defaults(run=run)
    return p


def _csv_text(rows, system):
    import csv
    import io

    from ..units import display_factor

    buf = io.StringIO()
    w = csv.writer(buf, lineterminator="\n")
    units = {k: display_factor(kind, system) for k, kind in _COLUMNS}
    plain = {"lb/ft³": "lb/ft^3", "kg/m³": "kg/m^3"}
    w.writerow(["name", "kind", "group"] + [f"{k} [{plain.get(units[k][0], units[k][0])}]"
                                           for k, _ in _COLUMNS] + ["basis", "source"])
    for m in rows:
        w.writerow([m.name, m.kind, m.group] + [f"{getattr(m, k) / units[k][1]:.6g}" for k, _ in _COLUMNS]
                   + [m.basis, m.source])
    return buf.getvalue()


def run(args) -> int:
    from ..catalog.materials import KINDS, materials_table
    from ..errors import MaterialError
    from ..fileio import atomic_write
    from ..units import display_factor, fmt

    table = materials_table(args.file)
    rows = list(table.values())
    if args.kind:
        bad = [k for k in args.kind if k not in KINDS]
        if bad:
            raise MaterialError(f"--kind {bad[0]!r}: expected one of {', '.join(KINDS)}")
        rows = [m for m in rows if m.kind in args.kind]
    if args.csv:
        atomic_write(args.csv, _csv_text(rows, args.units))
    if args.json:
        emit_json([m.as_dict() for m in rows])
        return 0
    heads = ["name", "kind"] + [f"{k} [{display_factor(kind, args.units)[0]}]" for k, kind in _COLUMNS] \
        + ["basis", "source"]
    heads = [h.replace("strength_bending", "f_bending").replace("strength_shear", "f_shear") for h in heads]
    body = [[m.name, m.kind] + [fmt(getattr(m, k) / display_factor(kind, args.units)[1])
                                for k, kind in _COLUMNS] + [m.basis, m.source] for m in rows]
    widths = [max(len(h), *(len(r[i]) for r in body)) if body else len(h) for i, h in enumerate(heads)]
    widths[-1] = 0
    print("  ".join(h.ljust(w) for h, w in zip(heads, widths)).rstrip())
    for r in body:
        print("  ".join(c.ljust(w) for c, w in zip(r, widths)).rstrip())
    return 0
