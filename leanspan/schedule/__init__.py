"""Member schedules: many members selected at once, rationalised to few sections.

Modules: :mod:`.parse` (schedule TOML + members CSV -> one selection job per member),
:mod:`.run` (each member type through ``run_selection``, optionally on several processes),
:mod:`.objectives` (mass, depth, cost, carbon), :mod:`.rationalise` (at most K sections, exact
MILP), :mod:`.pareto` (non-dominated candidates), :mod:`.result` (the tables, totals and JSON).

>>> from pathlib import Path
>>> from leanspan.schedule import parse_schedule, run_schedule, build_result
>>> data = {"search": {"families": ["sawn_metric"], "materials": ["C24"]}, "limits": {"stress_factor": 0.6},
...         "member": [{"name": "J1", "spans": "3.6 m", "line_loads": {"imposed": "0.8 kN/m"}, "count": 12},
...                    {"name": "J2", "spans": "2.4 m", "line_loads": {"imposed": "0.8 kN/m"}, "count": 6}]}
>>> result = build_result(run_schedule(parse_schedule(data, Path("."), "floor.toml")), sizes=1)
>>> result.sizes["feasible"], len(result.sizes["sections"]), result.totals["pieces"]
(True, 1, 18)
"""

__all__ = ["Schedule", "ScheduleMember", "BadMember", "parse_schedule", "load_schedule", "member_key",
           "ScheduleRun", "Outcome", "run_schedule", "ValueTables", "CARBON_FACTORS", "OBJECTIVES",
           "Rationalised", "rationalise", "penalty_table", "front", "ScheduleResult", "build_result"]

_WHERE = {**{n: "parse" for n in ("Schedule", "ScheduleMember", "BadMember", "parse_schedule", "load_schedule",
                                  "member_key")},
          **{n: "run" for n in ("ScheduleRun", "Outcome", "run_schedule")},
          **{n: "objectives" for n in ("ValueTables", "CARBON_FACTORS", "OBJECTIVES")},
          **{n: "rationalise" for n in ("Rationalised", "rationalise", "penalty_table")},
          "front": "pareto", "ScheduleResult": "result", "build_result": "result"}


def __getattr__(name):
    if name in _WHERE:
        import importlib

        return getattr(importlib.import_module(f"{__name__}.{_WHERE[name]}"), name)
    raise AttributeError(f"module {__name__!r} has no attribute {name!r}")
