"""``leanspan select JOB.toml``: the lightest catalogue section that passes, ranked."""

from __future__ import annotations

from pathlib import Path

from . import add_common, check_finite, emit_json, option_paths, stage, warn


def add_parser(sub):
    p = sub.add_parser("select", help="find the lightest section that passes a beam job's limits",
                       description="Screen every catalogue section (and your own list) against the "
                                   "job's beam, loads, combinations and limits; print the ranked table.")
    p.add_argument("job", help="job file: a beam job plus [search] and [limits]")
    add_options(p)
    p.set_defaults(run=run)


def add_options(p):
    add_common(p)
    p.add_argument("--top", type=int, default=10, metavar="N", help="passing candidates to list (default 10)")
    p.add_argument("--report", metavar="SHEET.html", default=None, help="write the calculation sheet")
    p.add_argument("--csv", metavar="OUT.csv", default=None, help="write the ranked table as CSV")
    p.add_argument("--markdown", metavar="OUT.md", default=None, help="write the ranked table as Markdown")
    p.add_argument("--plot", metavar="OUT.svg", default=None,
                   help="draw the chosen member's loaded beam and V, M, v diagrams to OUT and its "
                        "section to OUT-section (.svg, .png or .pdf)")
    p.add_argument("--outline", metavar="OUT.dxf", default=None,
                   help="write the chosen (else the closest) section's outline as a DXF drawing")


def load_job(path):
    from ..fileio import load_toml
    from ..select.job import parse_job

    data = load_toml(path)
    return parse_job(data, Path(path).resolve().parent, f"{path}: ")


def run(args) -> int:
    job = load_job(args.job)
    return finish(args, job, source=args.job)


def finish(args, job, source) -> int:
    """Run the selection, print, export; exit status 0 (a winner) or 1 (nothing passes)."""
    import sys

    from .. import CAUTION
    from ..report.tables import ranked_table_text, write_table_exports
    from ..select.search import run_selection

    if args.top < 1:
        from ..errors import InputError

        raise InputError(f"--top: expected a positive number, got {args.top}")
    with stage("screening the candidates"):
        sel = run_selection(job)
        payload = {**sel.to_json(args.top), "caution": CAUTION}
    nullable = not_applicable()
    check_finite(payload, "the selection", nullable)  # before any output is written
    for w in sel.warnings:
        warn(args.command, w)
    with option_paths(("--csv", args.csv), ("--markdown", args.markdown)):
        write_table_exports(sel, csv_path=args.csv, markdown_path=args.markdown, units=args.units, top=args.top)
    if getattr(args, "report", None):
        from ..report.sheet import write_selection_sheet

        with option_paths(("--report", args.report)):
            write_selection_sheet(sel, args.report, units=args.units, source=source, top=args.top)
    if getattr(args, "plot", None):
        with option_paths(("--plot", args.plot)), stage("drawing the chosen member"):
            plots = write_plots(sel, args.plot, args.units)
    if getattr(args, "outline", None):
        from ..sections.drawing import write_drawing

        with option_paths(("--outline", args.outline)), stage("drawing the chosen section"):
            write_drawing(sel.chosen_member.section, args.outline)
    if args.json:
        emit_json(payload, "the selection", nullable)
    else:
        print(ranked_table_text(sel, args.units, args.top))
        if getattr(args, "report", None):
            print(f"calculation sheet written to {args.report}")
        if getattr(args, "plot", None):
            print("drawings written to " + ", ".join(str(p) for p in plots))
        if getattr(args, "outline", None):
            print(f"outline drawing written to {args.outline}")
        note = principal_axis_note(sel)
        if note:
            print(note)
        print()
        print(CAUTION)
    return 0 if sel.success else 1


def not_applicable() -> set:
    """Result keys where NaN means "not checked" (printed as null or "-"): the deflection
    utilisation and demand without a deflection combination, and any further registered
    check's (bending and shear always apply)."""
    from ..select.checks import registered

    keys = {"utilisation.deflection", "demands.v_abs"}
    for check in registered():
        if check.name not in ("bending", "shear"):
            keys |= {f"utilisation.{check.name}", f"demands.{check.demand_key}"}
    return keys


def write_plots(sel, path, units):
    """The loaded beam, V/M/v diagrams and section of the chosen (else closest) member, as
    ``--plot`` files; returns their paths."""
    from ..report.diagrams import plot_job

    chosen = sel.chosen_member
    return plot_job(chosen.solution, path, units, section=chosen.section, props=chosen.properties,
                    title=chosen.candidate["name"])


def principal_axis_note(sel) -> str:
    """A reminder when the chosen section's principal axes are tilted (angles): the checks use
    Iz, which holds only if the member is restrained to bend in the vertical plane."""
    row = sel.table.iloc[int(sel.order[0])]
    theta = float(row.get("theta", 0.0))
    if abs(theta) < 1e-6 or abs(abs(theta) - 90.0) < 1e-6:
        return ""
    return (f"note: {row['name']} has principal axes at {theta:.1f} deg: the checks use Iz about the "
            "horizontal axis, which holds only where the member is restrained to bend vertically; "
            "unrestrained, it bends about its principal axes and deflects sideways too")
