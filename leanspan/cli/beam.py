"""``leanspan beam FILE.toml [--json] [--units si|us] [--plot OUT.svg] [--report SHEET.html]``.

Solves a beam job exactly and prints reactions, extremes with positions and the
deflection checks (or the JSON contract of GUIDE section 4 with ``--json``).
"""

from __future__ import annotations

from pathlib import Path

from .. import CAUTION
from . import add_common, check_finite, emit_json, option_paths, stage, warn

__all__ = ["add_parser", "run"]


def add_parser(subparsers):
    p = subparsers.add_parser("beam", help="solve a beam exactly: reactions, V, M, rotation, deflection",
                              description="Solve a beam job (TOML) exactly for every load case and "
                                          "combination, with the envelope and deflection checks.")
    p.add_argument("file", help="beam job file (TOML)")
    p.add_argument("--plot", metavar="OUT.svg", help="draw the loaded beam above its V, M, v diagrams "
                                                      "(.svg, .png or .pdf)")
    p.add_argument("--report", metavar="SHEET.html", help="write the calculation sheet (one self-contained HTML page)")
    add_common(p)
    p.set_defaults(run=run)
    return p


def run(args) -> int:
    from ..beam import parse_beam, solve
    from ..fileio import load_toml
    from ..project import parse_project
    from ..select.member import section_stiffness

    path = Path(args.file)
    data = load_toml(path)
    with stage("reading the job"):
        model = parse_beam(data, path.parent, field_prefix=f"{path.name}: ", section_stiffness=section_stiffness)
        project = parse_project(data.get("project"), f"{path.name}: ")
    for note in model.notes:
        warn("beam", note)
    with stage("solving the beam"):
        sol = solve(model)
        out = sol.to_json()
    check_finite(out, "the beam's results")  # before any output is written
    plots = []
    if args.plot:
        from ..report.diagrams import plot_job

        with option_paths(("--plot", args.plot)):
            plots = plot_job(sol, args.plot, units=args.units, title=model.name)
    if args.report:
        from ..report.sheet import write_beam_sheet

        with option_paths(("--report", args.report)):
            write_beam_sheet(sol, args.report, units=args.units, source=str(path), project=project)
    if args.json:
        out["caution"] = CAUTION
        emit_json(out, "the beam's results")
    else:
        from ..report.beam_text import beam_text

        print(beam_text(sol, args.units, title=model.name or path.name))
        if args.report:
            print(f"calculation sheet written to {args.report}")
        if plots:
            print("drawings written to " + ", ".join(str(p) for p in plots))
    return 0
