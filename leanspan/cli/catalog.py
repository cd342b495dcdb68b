"""``leanspan catalog``: list catalogue sections with their properties.

Rows have ``name family series dims material`` plus the section keys and
``mass_per_length``; ``--json`` prints a list of rows in SI values, ``--csv OUT``
writes every column with unit headers (mm-based, or inch-based with ``--units us``).
Warnings about a user catalogue's tabulated values go to stderr.
"""

from __future__ import annotations

import sys

from . import add_common, emit_json

__all__ = ["add_parser", "run"]

# column -> display kind (readable table and CSV)
_KINDS = {"d": "length", "b": "length", "tw": "length", "tf": "length", "t": "length", "r": "length",
          "b_top": "length", "tf_top": "length", "b_bot": "length", "tf_bot": "length",
          "A": "area", "yc": "length", "zc": "length", "Iz": "second moment", "Iy": "second moment",
          "Iyz": "second moment", "I1": "second moment", "I2": "second moment", "theta": None,
          "Sz_top": "section modulus", "Sz_bot": "section modulus", "Sy_left": "section modulus",
          "Sy_right": "section modulus", "Zz": "section modulus", "Zy": "section modulus",
          "rz": "length", "ry": "length", "depth": "length", "width": "length",
          "shear_factor": "shear factor", "E": "modulus", "G": "modulus", "density": "density",
          "strength_bending": "pressure", "strength_shear": "pressure",
          "mass_per_length": "mass/length"}
_TABLE = ("depth", "width", "A", "Iz", "Sz_top", "Sz_bot", "Zz", "Iy", "mass_per_length")
_KEY_LINE = ("Iz: about the horizontal axis (bending under vertical load); Sz_top, Sz_bot: elastic section moduli to the top "
             "and bottom fibres; Zz: plastic modulus; Iy: about the vertical axis.")
_ASCII = str.maketrans({"²": "^2", "³": "^3", "⁴": "^4", "·": "*"})


def _csv_list(values):
    out = []
    for v in values or []:
        out += [x.strip() for x in v.split(",") if x.strip()]
    return out or None


def add_parser(subparsers):
    p = subparsers.add_parser("catalog", help="list catalogue sections and their properties",
                              description="List the built-in section series (or a user catalogue) "
                                          "with their section properties.")
    p.add_argument("--family", action="append", metavar="F",
                   help="shape family (i_section, rectangle ...) or series (glulam, chs ...); "
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
    from ..units import parse

    if text is None:
        return None
    try:
        return float(text) * 1e-3
    except ValueError:
        return parse(text, "length", field)


def _unit(kind, system):
    from ..units import display_factor

    if kind is None:
        return "deg", 1.0
    return display_factor(kind, system)


def _csv_text(df, system):
    import csv
    import io
    import math

    cols = ["name", "family", "series", "material", "kind"] + [c for c in _KINDS if c in df]
    heads = []
    for c in cols:
        if c in _KINDS:
            label = _unit(_KINDS[c], system)[0].translate(_ASCII)
            heads.append(f"{c} [{label}]")
        else:
            heads.append(c)
    buf = io.StringIO()
    w = csv.writer(buf, lineterminator="\n")
    w.writerow(heads)
    factors = [(_unit(_KINDS[c], system)[1] if c in _KINDS else None) for c in cols]
    data = [df[c].to_numpy() for c in cols]
    for i in range(len(df)):
        row = []
        for f, col in zip(factors, data):
            v = col[i]
            row.append(v if f is None else ("" if math.isnan(v) else f"{v / f:.6g}"))
        w.writerow(row)
    return buf.getvalue()


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
    from ..units import fmt

    df = catalog_table(families=_csv_list(args.family), materials=_csv_list(args.material),
                       user_csv=args.file, builtin=(args.with_builtin or not args.file),
                       material_table=args.materials_file,
                       max_depth=_length(args.max_depth, "--max-depth"),
                       min_depth=_length(args.min_depth, "--min-depth"),
                       max_width=_length(args.max_width, "--max-width"),
                       min_width=_length(args.min_width, "--min-width"))
    for w in df.attrs.get("warnings", []):
        print(f"leanspan catalog: warning: {w}", file=sys.stderr)
    if args.csv:
        atomic_write(args.csv, _csv_text(df, args.units))
    if args.json:
        emit_json(_rows_json(df))
        return 0
    heads = ["name", "series", "material"] + [
        f"{c.replace('mass_per_length', 'mass')} [{_unit(_KINDS[c], args.units)[0]}]" for c in _TABLE]
    cols = [df["name"].to_numpy(), df["series"].to_numpy(), df["material"].to_numpy()]
    for c in _TABLE:
        f = _unit(_KINDS[c], args.units)[1]
        cols.append([fmt(float(v) / f) for v in df[c].to_numpy()])
    widths = [max([len(h)] + [len(str(v)) for v in col]) for h, col in zip(heads, cols)]
    out = ["  ".join(h.ljust(w) for h, w in zip(heads, widths)).rstrip()]
    for i in range(len(df)):
        out.append("  ".join(str(col[i]).ljust(w) for col, w in zip(cols, widths)).rstrip())
    out.append(f"{len(df)} sections. {_KEY_LINE}")
    print("\n".join(out))
    return 0
