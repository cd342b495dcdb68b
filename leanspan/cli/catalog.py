"""``leanspan catalog``: list catalogue sections with their properties.

Rows have ``name family series dims material`` plus the section keys and
``mass_per_length``; ``--json`` prints a list of rows in SI values, ``--csv OUT``
writes every column with unit headers (mm-based, or inch-based with ``--units us``).
Warnings about a user catalogue's tabulated values go to stderr.
"""

from __future__ import annotations

import sys

from . import add_common, check_finite, emit_json, option_paths, stage, warn

__all__ = ["add_parser", "run"]


def _csv_list(values):
    out = []
    for v in values or []:
        out += [x.strip() for x in v.split(",") if x.strip()]
    return list(dict.fromkeys(out)) or None  # a name given twice is listed once


def add_parser(subparsers):
    p = subparsers.add_parser("catalog", help="list catalogue sections and their properties",
                              description="List the built-in section series (or a user catalogue) "
                                          "with their section properties.")
    p.add_argument("--family", action="append", metavar="F",
                   help="shape family (ibeam, rectangle ...) or series (glulam, gen_chs ...); "
                        "repeatable or comma-separated")
    p.add_argument("--material", action="append", metavar="M",
                   help="pair the sections with material M (rows of other kinds dropped); repeatable")
    p.add_argument("--file", metavar="USER.csv", help="user catalogue CSV (family + dimension "
                   "columns, mm unless the header says 'd [in]')")
    p.add_argument("--with-builtin", action="store_true",
                   help="with --file, also list the built-in series")
    p.add_argument("--materials-file", metavar="MATERIALS", help="user materials file (.toml/.csv)")
    p.add_argument("--max-depth", metavar="LEN", help="largest overall depth (e.g. '300 mm'; bare: mm)")
    p.add_argument("--min-depth", metavar="LEN", help="smallest overall depth")
    p.add_argument("--max-width", metavar="LEN", help="largest overall width")
    p.add_argument("--min-width", metavar="LEN", help="smallest overall width")
    p.add_argument("--csv", metavar="OUT.csv", help="also write all columns to a CSV file")
    add_common(p)
    p.set_defaults(run=run)
    return p


def _length(text, field):
    from ..units import UnitSystem, parse

    if text is None:
        return None
    try:
        value = float(text)  # a bare number is mm
    except ValueError:
        return parse(text, "length", field, within="section length")
    return parse(value, "length", field, UnitSystem(length=1e-3), within="section length")


def _rows_json(df):
    from ..catalog.table import row_dims
    from ..sections.properties import KEYS

    keys = list(KEYS) + ["mass_per_length", "E", "density"]
    recs = df.to_dict("records")
    return [{"name": r["name"], "family": r["family"], "series": r["series"], "dims": row_dims(r),
             "material": r["material"], **{k: r[k] for k in keys}} for r in recs]


def run(args) -> int:
    from ..catalog.table import catalog_table
    from ..fileio import atomic_write
    from ..report.catalog_text import catalog_csv, catalog_text

    with stage("computing the catalogue's properties"):
        df = catalog_table(families=_csv_list(args.family), materials=_csv_list(args.material),
                           user_csv=args.file, builtin=(args.with_builtin or not args.file),
                           material_table=args.materials_file,
                           max_depth=_length(args.max_depth, "--max-depth"),
                           min_depth=_length(args.min_depth, "--min-depth"),
                           max_width=_length(args.max_width, "--max-width"),
                           min_width=_length(args.min_width, "--min-width"))
        rows = _rows_json(df)
    check_finite(rows, "the catalogue")  # before any output is written
    for w in df.attrs.get("warnings", []):
        warn("catalog", w)
    if args.csv:
        with option_paths(("--csv", args.csv)):
            atomic_write(args.csv, catalog_csv(df, args.units))
    if args.json:
        emit_json(rows, "the catalogue")
        return 0
    print(catalog_text(df, args.units))
    return 0
