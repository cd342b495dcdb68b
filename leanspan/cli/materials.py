"""``leanspan materials``: the materials table (built-in rows plus a user file).

Columns: name kind E G density strength_bending strength_shear source (and group,
basis); ``--json`` prints a list of rows in SI values; ``--csv OUT`` writes the table with unit headers
(readable back as a user materials file).
"""

from __future__ import annotations

from . import add_common, emit_json, option_paths

__all__ = ["add_parser", "run"]


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


def run(args) -> int:
    from ..catalog.materials import KINDS, materials_table
    from ..errors import MaterialError
    from ..fileio import atomic_write
    from ..report.materials_text import materials_csv, materials_text

    table = materials_table(args.file)
    rows = list(table.values())
    if args.kind:
        bad = [k for k in args.kind if k not in KINDS]
        if bad:
            raise MaterialError(f"--kind {bad[0]!r}: expected one of {', '.join(KINDS)}")
        rows = [m for m in rows if m.kind in args.kind]
    if args.csv:
        with option_paths(("--csv", args.csv)):
            atomic_write(args.csv, materials_csv(rows, args.units))
    if args.json:
        emit_json([m.as_dict() for m in rows])
        return 0
    print(materials_text(rows, args.units))
    return 0
