"""``leanspan section FILE.toml``: properties of a custom, built-up or composite section."""

from __future__ import annotations

from pathlib import Path

from . import add_common, emit_json, option_paths


def add_parser(sub):
    p = sub.add_parser("section", help="properties of a section described in a TOML file",
                       description="Area, centroid, second moments, principal axes, elastic and "
                                   "plastic moduli, shear factor; transformed properties when parts "
                                   "carry materials; torsion by finite elements with --torsion.")
    p.add_argument("file", help="section file with [[part]] tables")
    add_common(p)
    p.add_argument("--torsion", action="store_true", help="also J, Cw and the shear centre (finite elements)")
    p.add_argument("--mesh-size", default=None, help="element size for --torsion, e.g. '2 mm'")
    p.add_argument("--moment", default=None, help="a bending moment, e.g. '12 kN*m': print the stress in each material")
    p.add_argument("--plot", metavar="OUT", default=None, help="draw the section to OUT (.svg or .png)")
    p.add_argument("--report", metavar="SHEET.html", default=None,
                   help="write a calculation sheet (one self-contained HTML page)")
    p.set_defaults(run=run)


def compute(path, torsion=False, mesh_size=None, moment=None):
    """Everything the command reports, as a dict of SI values (JSON contract keys)."""
    from ..catalog.materials import material_lookup
    from ..sections.io import load_section_file, section_from_spec
    from ..units import parse

    section, data = load_section_file(path)
    props = section.properties(private=True)
    out = {k: v for k, v in props.items() if not k.startswith("_")}
    extra = {"pna_y": props["_pna_y"], "pna_z": props["_pna_z"]}
    n_tables = len(data.get("part", []))
    if data.get("hole") and len(section.parts) > n_tables:
        extra["pieces_from_holes"] = n_tables
    comp = None
    lookup = material_lookup() if section.has_materials else None
    if section.has_materials:
        comp = section.composite(lookup)
        out.update(EIz=comp.EIz, EA=comp.EA, mass_per_length=comp.mass_per_length)
        extra["y_neutral"] = comp.y_neutral
        if moment is not None:
            M = parse(moment, "moment", "--moment")
            extra["moment"] = M
            extra["stresses"] = {k: {"top": a, "bottom": b} for k, (a, b) in comp.stresses(M).items()}
    elif moment is not None:
        M = parse(moment, "moment", "--moment")
        extra["moment"] = M
        extra["stresses"] = {"(geometry)": {"top": -M / out["Sz_top"], "bottom": M / out["Sz_bot"]}}
    tors = None
    if torsion:
        from ..sections.torsion import torsion as solve_torsion

        size = parse(mesh_size, "length", "--mesh-size") if mesh_size is not None else None
        # torsion and warping on the gross section, as is common practice: a bolt hole seen in
        # the cross-section would cut a flange into strips free to slip along each other
        gross = section
        if data.get("hole"):
            gross = section_from_spec({k: v for k, v in data.items() if k != "hole"})
            extra["torsion_gross"] = True
        G = None
        if gross.has_materials:
            G = [lookup(p.material).G for p in gross.parts]
            E = [lookup(p.material).E for p in gross.parts]
            tors = solve_torsion([p.polygon for p in gross.parts], G, size, elastic_moduli=E)
            extra["GJ"] = tors.J * tors.G_ref
            if len(set(G)) > 1:  # J and Cw are transformed to the first part's material
                extra["torsion_reference"] = gross.parts[0].material
        else:
            tors = solve_torsion([p.polygon for p in gross.parts], None, size)
        out.update(J=tors.J, Cw=tors.Cw, ys=tors.ys, zs=tors.zs)
        extra["torsion_elements"] = int(tors.mesh.triangles.shape[0]) if hasattr(tors.mesh, "triangles") else None
    return section, out, extra, tors


def run(args) -> int:
    import sys

    from ..report.section_text import pieces_warning, section_text

    section, out, extra, tors = compute(args.file, args.torsion, args.mesh_size, args.moment)
    warning = pieces_warning(section, extra, args.file)
    if warning:
        print(f"leanspan section: warning: {warning}", file=sys.stderr)
    if args.plot:
        from ..report.diagrams import plot_section

        with option_paths(("--plot", args.plot)):
            plot_section(section, out, args.plot, title=Path(args.file).name, units=args.units)
    if getattr(args, "report", None):
        from ..report.sheet import write_section_sheet

        with option_paths(("--report", args.report)):
            write_section_sheet(section, out, args.report, units=args.units, source=args.file)
    if args.json:
        payload = dict(out)
        if "stresses" in extra:
            payload["stresses"] = extra["stresses"]
        emit_json(payload)
        return 0
    print(section_text(section, out, extra, args.units, source=args.file))
    if args.plot:
        print(f"drawing written to {args.plot}")
    if getattr(args, "report", None):
        print(f"calculation sheet written to {args.report}")
    return 0
