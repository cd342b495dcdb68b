"""``leanspan section FILE.toml``: properties of a custom, built-up or composite section."""

from __future__ import annotations

from pathlib import Path

from . import add_common, check_finite, emit_json, option_paths, stage, warn


def add_parser(sub):
    p = sub.add_parser("section", help="properties of a section described in a TOML file",
                       description="Area, centroid, second moments, principal axes, elastic and "
                                   "plastic moduli, shear factor; transformed properties when parts "
                                   "carry materials; torsion by finite elements with --torsion.")
    p.add_argument("file", help="section file with [[part]] tables, or a drawing FILE.dxf")
    add_common(p)
    p.add_argument("--torsion", action="store_true", help="also J, Cw and the shear centre (finite elements)")
    p.add_argument("--element-size", default=None, help="element size for --torsion, e.g. '2 mm'")
    p.add_argument("--moment", default=None, help="a bending moment, e.g. '12 kN*m': print the stress in each material")
    p.add_argument("--plot", metavar="OUT", default=None, help="draw the section to OUT (.svg or .png)")
    p.add_argument("--report", metavar="SHEET.html", default=None,
                   help="write a calculation sheet (one self-contained HTML page)")
    add_drawing_options(p)
    p.set_defaults(run=run)


def add_drawing_options(p, reading: bool = True):
    """``--outline OUT.dxf`` (write the section as a drawing) and, for reading a drawing,
    ``--layer-material LAYER=MATERIAL`` and ``--drawing-units UNIT``."""
    p.add_argument("--outline", metavar="OUT.dxf", default=None,
                   help="write the section's outline as a DXF drawing (mm, one layer per material)")
    if reading:
        p.add_argument("--layer-material", action="append", metavar="LAYER=MATERIAL", default=None,
                       help="material of a drawing's layer (repeatable or comma-separated)")
        p.add_argument("--drawing-units", metavar="UNIT", default=None,
                       help="unit of the drawing's coordinates, e.g. mm (default: the drawing's header)")


def run(args) -> int:
    import sys

    from ..report.section_text import pieces_warning, section_text
    from ..select.section_analysis import analyse_section
    from ..units import parse

    moment = parse(args.moment, "moment", "--moment") if args.moment is not None else None
    size = parse(args.element_size, "length", "--element-size", within="element size") \
        if args.element_size is not None else None
    if size is not None and not size > 0:
        from ..errors import InputError

        raise InputError(f"--element-size: expected a positive length, got {args.element_size!r}")
    from ..sections.drawing import layer_material_options

    layers = layer_material_options(args.layer_material)
    with stage("computing the section" + (" and its torsion" if args.torsion else "")):
        a = analyse_section(args.file, args.torsion, size, moment, layers, args.drawing_units)
    section, out, extra = a.section, a.values, a.extra
    payload = dict(out)
    if "stresses" in extra:
        payload["stresses"] = extra["stresses"]
    check_finite(payload, "the section's properties")  # before any output is written
    for note in a.notes:
        warn("section", note)
    warning = pieces_warning(section, extra, args.file)
    if warning:
        warn("section", warning)
    if args.plot:
        from ..report.diagrams import plot_section

        with option_paths(("--plot", args.plot)):
            plot_section(section, out, args.plot, title=Path(args.file).name, units=args.units)
    if getattr(args, "report", None):
        from ..report.sheet import write_section_sheet

        with option_paths(("--report", args.report)):
            write_section_sheet(section, out, args.report, units=args.units, source=args.file)
    if args.outline:
        from ..sections.drawing import write_drawing

        with option_paths(("--outline", args.outline)):
            write_drawing(section, args.outline)
    if args.json:
        emit_json(payload, "the section's properties")
        return 0
    print(section_text(section, out, extra, args.units, source=args.file))
    if args.plot:
        print(f"drawing written to {args.plot}")
    if getattr(args, "report", None):
        print(f"calculation sheet written to {args.report}")
    if args.outline:
        print(f"outline drawing written to {args.outline}")
    return 0
