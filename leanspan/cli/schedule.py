"""``leanspan schedule FILE.toml``: select every member of a schedule, rationalise the sizes."""

from __future__ import annotations

from . import add_common, check_finite, emit_json, option_paths, stage, warn

OBJECTIVE_CHOICES = ("mass", "depth", "cost", "carbon")


def add_parser(sub):
    p = sub.add_parser("schedule", help="size every member of a schedule, optionally with few distinct sections",
                       description="Select each member of a schedule (shared defaults plus one row per member, "
                                   "from the file or a CSV) with the same screen as `select`; identical members "
                                   "are solved once. Optionally limit the schedule to K distinct sections "
                                   "(exact MILP), and list the non-dominated sections for two objectives.")
    p.add_argument("file", help="schedule file: shared job tables, [schedule] and [[member]] rows")
    add_common(p)
    p.add_argument("--sizes", type=int, default=None, metavar="K",
                   help="at most K distinct sections over the schedule (overrides schedule.sizes)")
    p.add_argument("--sizes-per", choices=["all", "material", "family"], default=None,
                   help="count the K sections per material or per family (default: schedule.sizes_per, all)")
    p.add_argument("--objective", choices=OBJECTIVE_CHOICES, default=None,
                   help="what each member and the rationalisation minimise (overrides schedule.objective)")
    p.add_argument("--pareto", metavar="A,B", default=None,
                   help="non-dominated passing sections per member type for two objectives, e.g. mass,depth")
    p.add_argument("--jobs", type=int, default=1, metavar="N", help="processes to select on (default 1)")
    p.add_argument("--quiet", action="store_true", help="no progress bar")
    p.add_argument("--csv", metavar="OUT.csv", default=None, help="write the member table as CSV")
    p.add_argument("--markdown", metavar="OUT.md", default=None, help="write the schedule as Markdown")
    p.add_argument("--report", metavar="SHEET.html", default=None,
                   help="write the schedule sheet: a summary page, then one page per member type")
    p.add_argument("--plot", metavar="OUT.svg", default=None,
                   help="draw the penalty of each number of sections to OUT and the Pareto fronts to "
                        "OUT-pareto (.svg, .png or .pdf)")
    p.set_defaults(run=run, own_progress=True)


def run(args) -> int:
    import dataclasses
    import sys

    from .. import CAUTION
    from ..errors import InputError
    from ..report.schedule_text import schedule_text, write_schedule_exports
    from ..schedule.parse import check_pareto, check_sizes, load_schedule
    from ..schedule.result import build_result
    from ..schedule.run import run_schedule
    from .select import not_applicable

    if args.jobs < 1:
        raise InputError(f"--jobs: expected a positive number of processes, got {args.jobs}")
    sizes = check_sizes(args.sizes, "--sizes") if args.sizes is not None else None
    pareto = check_pareto(args.pareto, "--pareto") if args.pareto is not None else None
    schedule = load_schedule(args.file, objective=args.objective)
    opts = schedule.options
    sizes = sizes if sizes is not None else opts.sizes
    pareto = pareto if pareto is not None else opts.pareto
    per = args.sizes_per or opts.sizes_per
    if args.plot and sizes is None and pareto is None:
        raise InputError("--plot: nothing to draw; give --sizes K (the penalty plot) or --pareto A,B")
    schedule = dataclasses.replace(schedule, options=dataclasses.replace(opts, sizes=sizes, pareto=pareto,
                                                                         sizes_per=per))
    with stage("selecting the members"):
        run_ = run_schedule(schedule, jobs=args.jobs, progress=not args.quiet)
    with stage("rationalising the sections"):
        result = build_result(run_, sizes, per, pareto)
        payload = {**result.to_json(), "caution": CAUTION}
    nullable = not_applicable()
    check_finite(payload, "the schedule", nullable)  # before any output is written
    for w in run_.warnings:
        warn(args.command, w)
    with option_paths(("--csv", args.csv), ("--markdown", args.markdown)):
        write_schedule_exports(result, csv_path=args.csv, markdown_path=args.markdown, units=args.units)
    if args.report:
        from ..report.schedule_sheet import write_schedule_sheet

        with option_paths(("--report", args.report)), stage("writing the schedule sheet"):
            write_schedule_sheet(result, args.report, units=args.units, source=args.file)
    plots = []
    if args.plot:
        from ..report.schedule_plot import plot_schedule

        with option_paths(("--plot", args.plot)), stage("drawing the schedule"):
            plots = plot_schedule(result, args.plot, args.units)
    if args.json:
        emit_json(payload, "the schedule", nullable)
    else:
        print(schedule_text(result, args.units))
        if args.report:
            print(f"schedule sheet written to {args.report}")
        if plots:
            print("drawings written to " + ", ".join(str(p) for p in plots))
        print()
        print(CAUTION)
    for b in result.bad:
        print(f"leanspan {args.command}: error: {b.message}", file=sys.stderr)
    if result.bad:
        print(f"leanspan {args.command}: error: {len(result.bad)} of {len(result.bad) + len(result.members)} "
              "members have bad input and were not selected: "
              + ", ".join(f"{b.name} ({b.where})" for b in result.bad), file=sys.stderr)
        return 2
    infeasible = result.sizes is not None and not result.sizes["feasible"]
    return 1 if (result.no_pass or infeasible) else 0
