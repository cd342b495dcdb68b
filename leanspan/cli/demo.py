"""``leanspan demo``: a built-in selection on an invented scenario."""

from __future__ import annotations

from importlib import resources
from pathlib import Path

from .select import add_options, finish


def add_parser(sub):
    p = sub.add_parser("demo", help="run a built-in selection on an invented demo scenario",
                       description="Timber, glulam and steel options for a beam over a 4.8 m opening "
                                   "(an invented scenario): the ranked table of the lightest that pass.")
    add_options(p)
    p.add_argument("--show-job", action="store_true", help="print the demo job file and stop")
    p.set_defaults(run=run)


def demo_text() -> str:
    return resources.files("leanspan").joinpath("data/demo.toml").read_text(encoding="utf-8")


def run(args) -> int:
    import tomllib

    from ..select.job import parse_job

    text = demo_text()
    if args.show_job:
        print(text)
        return 0
    job = parse_job(tomllib.loads(text), Path("."), "demo: ")
    return finish(args, job, source="built-in demo (invented scenario)")
