"""``leanspan section FILE.toml``: properties of a custom, built-up or composite section."""

from __future__ import annotations

from pathlib import Path

from . import add_common, emit_json

# (label, JSON key, display kind)
ROWS = [
    ("Area A", "A", "area"),
    ("Centroid y from base yc", "yc", "length"),
    ("Centroid z zc", "zc", "length"),
    ("Depth", "depth", "length"),
    ("Width", "width", "length"),
    ("Iz (about horizontal axis)", "Iz", "second moment"),
    ("Iy (about vertical axis)", "Iy", "second moment"),
    ("Iyz", "Iyz", "second moment"),
    ("I1 (major principal)", "I1", "second moment"),
    ("I2 (minor principal)", "I2", "second moment"),
    ("theta (z-axis to I1, CCW)", "theta", None),
    ("Sz top fibre", "Sz_top", "section modulus"),
    ("Sz bottom fibre", "Sz_bot", "section modulus"),
    ("Sy left fibre", "Sy_left", "section modulus"),
    ("Sy right fibre", "Sy_right", "section modulus"),
    ("Plastic modulus Zz", "Zz", "section modulus"),
    ("Plastic modulus Zy", "Zy", "section modulus"),
    ("Radius of gyration rz", "rz", "length"),
    ("Radius of gyration ry", "ry", "length"),
    ("Shear factor (tau_max = V x)", "shear_factor", "shear factor"),
]
COMPOSITE_ROWS = [
    ("EIz (transformed)", "EIz", "flexural stiffness"),
    ("EA", "EA", "axial stiffness"),
    ("Mass per length", "mass_per_length", "mass/length"),
    ("Neutral axis y (E-weighted)", "y_neutral", "length"),
]
TORSION_ROWS = [
    ("Torsion constant J", "J", "second moment"),
    ("Torsional stiffness GJ", "GJ", "flexural stiffness"),
    ("Warping constant Cw", "Cw", "warping"),
    ("Shear centre z", "zs", "length"),
    ("Shear centre y", "ys", "length"),
]


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
    from ..units import display_factor, fmt

    section, out, extra, tors = compute(args.file, args.torsion, args.mesh_size, args.moment)
    if extra.get("pieces_from_holes"):
        import sys

        print(f"leanspan section: warning: {args.file}: the holes cut the section into {len(section.parts)} "
              f"separate pieces ({extra['pieces_from_holes']} part table(s)); bending properties treat "
              "them as acting together, which holds only where they are joined along the member",
              file=sys.stderr)
    if args.plot:
        from ..report.diagrams import plot_section

        plot_section(section, out, args.plot, title=Path(args.file).name, units=args.units)
    if getattr(args, "report", None):
        from ..report.sheet import write_section_sheet

        write_section_sheet(section, out, args.report, units=args.units, source=args.file)
    if args.json:
        payload = dict(out)
        if "stresses" in extra:
            payload["stresses"] = extra["stresses"]
        emit_json(payload)
        return 0
    rows = ROWS + (COMPOSITE_ROWS if "EIz" in out else []) + (TORSION_ROWS if tors is not None else [])
    values = dict(out, **extra)
    size = max(out["depth"], out["width"])
    for s_key, c_key in (("zs", "zc"), ("ys", "yc")):
        # the finite-element shear centre is good to about 1e-3 of the size: a shift below 1e-4
        # of it from the centroid is mesh noise (a symmetric section's lies on the axis)
        if s_key in values and abs(values[s_key] - values[c_key]) < 1e-4 * size:
            values[s_key] = values[c_key]
    lines = [f"Section {args.file}: {len(section.parts)} part(s)"]
    for label, key, kind in rows:
        if key not in values:
            continue
        unit, factor = display_factor(kind, args.units) if kind else ("deg", 1.0)
        lines.append(f"  {label:<32} {fmt(values[key] / factor):>12} {unit}")
    if "stresses" in extra:
        unit, factor = display_factor("pressure", args.units)
        mu, mf = display_factor("moment", args.units)
        lines.append(f"Bending stress under M = {fmt(extra['moment'] / mf)} {mu} (tension +):")
        for name, s in extra["stresses"].items():
            lines.append(f"  {name:<12} top {fmt(s['top'] / factor):>10} {unit}   "
                         f"bottom {fmt(s['bottom'] / factor):>10} {unit}")
    if "EIz" in out and len({p.material for p in section.parts}) > 1:
        lines.append("  (the shear factor is from the geometry alone: with several materials the shear "
                     "stress in each part differs)")
    if extra.get("torsion_reference"):
        lines.append(f"  (J and Cw are transformed to part 1's material, {extra['torsion_reference']}: "
                     f"J = GJ / G of {extra['torsion_reference']})")
    if extra.get("torsion_gross"):
        lines.append("  (J, Cw and the shear centre are for the gross section: holes ignored)")
    print("\n".join(lines))
    if args.plot:
        print(f"drawing written to {args.plot}")
    if getattr(args, "report", None):
        print(f"calculation sheet written to {args.report}")
    return 0
