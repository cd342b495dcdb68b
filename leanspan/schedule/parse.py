"""A schedule file -> one selection job per member (shared defaults + each member's overrides).

A schedule is a selection job without a beam of its own: its top-level tables (``[beam]``,
``[[support]]``, ``[[load]]``, ``[[combination]]``, ``[search]``, ``[limits]``, ``units``) are
the defaults every member starts from; ``[schedule]`` holds the schedule's own options; each
``[[member]]`` (or each row of ``schedule.members_file``, a CSV) names one member and what
differs for it. A member can be a whole beam job (its own ``beam``, ``load``, ``support``,
``combination`` ...) or a short row: ``spans``/``length``, ``spacing`` (or ``tributary_width``)
with ``area_loads`` per case, ``line_loads``, ``point_loads``, and ``search``/``limits``
overrides. Resolving a member gives the data of an ordinary selection job, parsed by
:func:`leanspan.select.job.parse_job`, so a member is selected exactly as ``leanspan select``
would select it alone.

A member whose input is wrong does not stop the others: it is kept as a :class:`BadMember`
with a one-line message naming the member and its row.

Examples
--------
>>> from pathlib import Path
>>> data = {"search": {"families": ["sawn_metric"]}, "limits": {"stress_factor": 0.6},
...         "member": [{"name": "J1", "spans": "3.6 m", "spacing": "0.4 m",
...                     "area_loads": {"imposed": "1.5 kN/m^2"}},
...                    {"name": "J2", "spans": "3.6 m", "spacing": "nine"}]}
>>> sched = parse_schedule(data, Path("."), "floor.toml")
>>> [m.name for m in sched.members], [b.name for b in sched.bad]
(['J1'], ['J2'])
>>> sched.members[0].job.model.loads[0].w1   # 1.5 kN/m^2 x 0.4 m
600.0
>>> sched.bad[0].message.split(": ")[:3]
['floor.toml', 'member J2 ([[member]] 2)', 'spacing']
"""

from __future__ import annotations

import copy
import dataclasses
from dataclasses import dataclass, field
from pathlib import Path

from ..catalog.csvfile import read_table
from ..errors import InputError, LeanspanError, brief
from ..fileio import is_file
from ..select.job import parse_job
from ..units import UnitSystem, parse
from .objectives import OBJECTIVES, ValueTables, parse_value_tables

__all__ = ["Schedule", "ScheduleMember", "BadMember", "ScheduleOptions", "parse_schedule", "load_schedule",
           "member_key", "SCHEDULE_KEYS", "MEMBER_KEYS", "CSV_COLUMNS"]

SCHEDULE_KEYS = {"title", "objective", "pareto", "sizes", "sizes_per", "members_file", "currency"}
"""Keys of the ``[schedule]`` table."""
MEMBER_KEYS = {"name", "count", "spans", "length", "spacing", "tributary_width", "area_loads", "line_loads",
               "point_loads", "search", "limits", "beam", "load", "support", "hinge", "combination", "units"}
"""Keys of a ``[[member]]`` table."""
CSV_COLUMNS = {"name", "count", "spans", "length", "spacing", "tributary_width"}
"""Plain columns of a members CSV; the others are ``area.CASE``, ``line.CASE``, ``point.CASE``,
``search.KEY`` and ``limits.KEY``."""
_CSV_PREFIXES = ("area", "line", "point", "search", "limits")
_NOT_SHARED = {"schedule", "member", "member_defaults", "price", "carbon"}
DEFAULT_KEYS = {"count", "spacing", "tributary_width", "area_loads", "line_loads", "point_loads"}
"""Keys of ``[member_defaults]``: short-row values every member starts from."""
_SIZES_PER = ("all", "material", "family")


@dataclass(frozen=True)
class ScheduleOptions:
    """The ``[schedule]`` table: title, objective, pareto pair, sizes limit and grouping."""

    title: str = ""
    objective: str = "mass"
    pareto: tuple | None = None
    sizes: int | None = None
    sizes_per: str = "all"
    currency: str = ""


@dataclass(frozen=True)
class ScheduleMember:
    """One member: its name, where it came from, how many, and its parsed selection job."""

    name: str
    where: str  # "[[member]] 1" or "members.csv row 4"
    count: int
    job: object  # leanspan.select.job.Job


@dataclass(frozen=True)
class BadMember:
    """A member whose input is wrong; ``message`` is the one-line error (file, member, row, field)."""

    name: str
    where: str
    message: str


@dataclass(frozen=True)
class Schedule:
    options: ScheduleOptions
    members: list
    bad: list = field(default_factory=list)
    values: ValueTables = field(default_factory=ValueTables)
    source: str = ""


def load_schedule(path, objective: str | None = None) -> Schedule:
    """Read a schedule TOML file (and its members CSV); errors of the file itself raise.
    ``objective`` replaces ``[schedule] objective``."""
    from ..fileio import load_toml

    return parse_schedule(load_toml(path), Path(path).resolve().parent, str(path), objective)


def parse_schedule(data: dict, base_dir: Path, source: str = "schedule", objective: str | None = None) -> Schedule:
    """Resolve every member of a schedule's ``data`` into a selection job.

    Errors of the schedule as a whole (``[schedule]``, ``[[price]]``, ``[carbon]``, the CSV file's
    header, no members at all) raise :class:`~leanspan.errors.InputError`; a wrong member is
    kept in ``Schedule.bad`` and the rest still resolve.
    """
    p = f"{source}: "
    options = _options(data.get("schedule", {}), base_dir, p)
    if objective is not None:
        options = dataclasses.replace(options, objective=objective)
    values = parse_value_tables(data.get("price"), data.get("carbon"), p)
    shared = {k: v for k, v in data.items() if k not in _NOT_SHARED}
    if isinstance(shared.get("search"), dict) and "objective" in shared["search"]:
        raise InputError(f"{p}search.objective: a schedule sets its objective in [schedule] objective")
    defaults = _member_defaults(data.get("member_defaults", {}), p)
    raw = _toml_members(data.get("member"), p)
    members_file = data.get("schedule", {}).get("members_file")
    if members_file is not None:
        raw += _csv_members(Path(base_dir) / members_file, str(members_file))
    if not raw:
        raise InputError(f"{p}no members: add [[member]] tables or [schedule] members_file")
    good, bad, seen = [], [], {}
    for name, where, spec in raw:
        label = member_label(source, name, where)
        try:
            if name in seen:
                raise InputError(f"name: {name!r} is already used by {seen[name]}")
            seen[name] = where
            count, job_data = resolve_member(shared, _with_defaults(defaults, spec), options.objective)
            job = parse_job(job_data, Path(base_dir), "")
            good.append(ScheduleMember(name, where, count, job))
        except LeanspanError as exc:
            bad.append(BadMember(name, where, f"{label}: {exc}"))
    return Schedule(options, good, bad, values, source)


def member_label(source: str, name: str, where: str) -> str:
    """How an error names a member: ``floor.toml: member J2 ([[member]] 2)`` or
    ``joists.csv row 4 (member J4)``."""
    if where.startswith("[[member]]"):
        return f"{source}: member {name} ({where})"
    return f"{where} (member {name})"


def member_key(job) -> str:
    """What makes two members the same job (everything but the title): identical members are
    selected once.

    >>> from pathlib import Path
    >>> from leanspan.select.job import parse_job
    >>> d = {"beam": {"spans": ["4 m"], "title": "A"}, "search": {"families": ["glulam"]},
    ...      "limits": {"stress_factor": 0.6}}
    >>> e = {**d, "beam": {"spans": ["4000 mm"], "title": "B"}}
    >>> member_key(parse_job(d, Path("."))) == member_key(parse_job(e, Path(".")))
    True
    """
    return repr((dataclasses.replace(job.model, name=""), job.search, job.limits))


def _member_defaults(t, p) -> dict:
    if not isinstance(t, dict):
        raise InputError(f"{p}member_defaults: expected a table, got {brief(t)}")
    for key in t:
        if key not in DEFAULT_KEYS:
            raise InputError(f"{p}member_defaults.{key}: unknown key; expected {', '.join(sorted(DEFAULT_KEYS))}")
    return t


def _with_defaults(defaults, spec):
    """The member's own keys over ``[member_defaults]`` (a member's spacing or tributary width
    replaces either default)."""
    if not isinstance(spec, dict) or not defaults:
        return spec
    base = dict(defaults)
    if "spacing" in spec or "tributary_width" in spec:
        base.pop("spacing", None)
        base.pop("tributary_width", None)
    return {**base, **spec}


# -- [schedule] ----------------------------------------------------------------------------------------
def _options(t, base_dir, p) -> ScheduleOptions:
    if not isinstance(t, dict):
        raise InputError(f"{p}schedule: expected a table [schedule], got {brief(t)}")
    for key in t:
        if key not in SCHEDULE_KEYS:
            raise InputError(f"{p}schedule.{key}: unknown key; expected {', '.join(sorted(SCHEDULE_KEYS))}")
    objective = t.get("objective", "mass")
    if objective not in OBJECTIVES:
        raise InputError(f"{p}schedule.objective: expected one of {', '.join(OBJECTIVES)}, got {brief(objective)}")
    pareto = t.get("pareto")
    if pareto is not None:
        pareto = check_pareto(pareto, f"{p}schedule.pareto")
    sizes = t.get("sizes")
    if sizes is not None:
        sizes = check_sizes(sizes, f"{p}schedule.sizes")
    per = t.get("sizes_per", "all")
    if per not in _SIZES_PER:
        raise InputError(f"{p}schedule.sizes_per: expected one of {', '.join(_SIZES_PER)}, got {brief(per)}")
    mf = t.get("members_file")
    if mf is not None and (not isinstance(mf, str) or not is_file(Path(base_dir) / mf)):
        raise InputError(f"{p}schedule.members_file: file {Path(base_dir) / str(mf)} not found"
                         if isinstance(mf, str) else f"{p}schedule.members_file: expected a CSV file name, got {brief(mf)}")
    for key in ("title", "currency"):
        if not isinstance(t.get(key, ""), str):
            raise InputError(f"{p}schedule.{key}: expected a text, got {brief(t[key])}")
    return ScheduleOptions(t.get("title", ""), objective, pareto, sizes, per, t.get("currency", ""))


def check_pareto(value, field: str) -> tuple:
    """Two different objectives, from a list or ``"mass,depth"``.

    >>> check_pareto("mass, carbon", "--pareto")
    ('mass', 'carbon')
    """
    if isinstance(value, str):
        value = [v.strip() for v in value.split(",")]
    if (not isinstance(value, list) or len(value) != 2 or not all(v in OBJECTIVES for v in value)
            or value[0] == value[1]):
        raise InputError(f"{field}: expected two different objectives of {', '.join(OBJECTIVES)}, got {brief(value)}")
    return tuple(value)


def check_sizes(value, field: str) -> int:
    if isinstance(value, bool) or not isinstance(value, int) or not 1 <= value <= 10_000:
        raise InputError(f"{field}: expected a whole number of sections from 1 to 10000, got {brief(value)}")
    return value


# -- members ---------------------------------------------------------------------------------------------
def _toml_members(items, p) -> list:
    if items is None:
        return []
    if isinstance(items, dict):
        items = [items]
    if not isinstance(items, list):
        raise InputError(f"{p}member: expected [[member]] tables, got {brief(items)}")
    out = []
    for i, m in enumerate(items, 1):
        name = m.get("name") if isinstance(m, dict) else None
        label = str(name) if isinstance(name, (str, int)) and str(name).strip() else f"#{i}"
        out.append((label, f"[[member]] {i}", m))
    return out


def _csv_members(path: Path, shown: str) -> list:
    """(name, where, spec) per CSV row; a cell that is wrong is found when the row resolves."""
    header, rows = read_table(path, InputError)
    names = [h for h, _ in header]
    if "name" not in names:
        raise InputError(f"{shown}: no 'name' column; expected columns such as name,spans,spacing,area.dead")
    for h, _ in header:
        prefix, _, rest = h.partition(".")
        if h not in CSV_COLUMNS and not (prefix in _CSV_PREFIXES and rest):
            raise InputError(f"{shown}: column {h!r}: unknown; expected {', '.join(sorted(CSV_COLUMNS))} "
                             "or area.CASE, line.CASE, point.CASE, search.KEY, limits.KEY")
    out = []
    for line, cells in rows:
        if len(cells) > len(header) and any(cells[len(header):]):
            out.append((cells[0] or f"row {line}", f"{shown} row {line}",
                        {"_error": f"expected {len(header)} cells ({', '.join(names)}), got {len(cells)}"}))
            continue
        cells = cells + [""] * (len(header) - len(cells))
        spec = _row_spec(header, cells)
        name = spec.get("name") or f"row {line}"
        out.append((name, f"{shown} row {line}", spec))
    return out


def _with_unit(cell: str, unit):
    if unit is None:
        return cell
    return f"{cell} {unit}" if _is_number(cell) else cell


def _is_number(text) -> bool:
    try:
        float(text)
        return True
    except (TypeError, ValueError):
        return False


def _row_spec(header, cells) -> dict:
    """A CSV row as the same dict a ``[[member]]`` table gives (empty cells left out)."""
    spec: dict = {}
    for (h, unit), cell in zip(header, cells):
        if not cell:
            continue
        prefix, _, rest = h.partition(".")
        if h == "name":
            spec["name"] = cell
        elif h == "count":
            spec["count"] = int(cell) if cell.isdigit() else cell
        elif h == "spans":
            spec["spans"] = [_with_unit(s.strip(), unit) for s in cell.split(";")]
        elif h in CSV_COLUMNS:
            spec[h] = _with_unit(cell, unit)
        elif prefix == "area":
            spec.setdefault("area_loads", {})[rest] = _with_unit(cell, unit)
        elif prefix == "line":
            spec.setdefault("line_loads", {})[rest] = _with_unit(cell, unit)
        elif prefix == "point":
            spec.setdefault("point_loads", []).extend(_points(cell, rest))
        else:  # search.KEY, limits.KEY: numbers stay numbers, lists are separated by ';'
            value = float(cell) if unit is None and _is_number(cell) else _with_unit(cell, unit)
            if isinstance(value, str) and ";" in value:
                value = [v.strip() for v in value.split(";")]
            spec.setdefault(prefix, {})[rest] = value
    return spec


def _points(cell, case) -> list:
    """``"3 kN at 1.2 m; 2 kN at 2.4 m"`` -> point loads of ``case``."""
    out = []
    for part in cell.split(";"):
        P, sep, at = part.partition(" at ")
        out.append({"case": case, "P": P.strip(), "at": at.strip()} if sep else {"case": case, "P": part.strip(),
                                                                                  "at": None})
    return out


def resolve_member(shared: dict, spec, objective: str = "mass") -> tuple:
    """``(count, job data)``: the shared tables with the member's overrides applied.

    >>> count, job = resolve_member({"beam": {"spans": ["3 m"]}, "search": {"families": ["glulam"]}},
    ...                             {"name": "B", "count": 2, "length": "5 m", "line_loads": {"dead": "1 kN/m"}})
    >>> count, job["beam"], job["load"]
    (2, {'length': '5 m', 'title': 'B'}, [{'case': 'dead', 'type': 'udl', 'w': '1 kN/m'}])
    """
    if not isinstance(spec, dict):
        raise InputError(f"expected a table with name, spans, loads ..., got {brief(spec)}")
    if "_error" in spec:
        raise InputError(spec["_error"])
    for key in spec:
        if key not in MEMBER_KEYS:
            raise InputError(f"{key}: unknown member key; expected {', '.join(sorted(MEMBER_KEYS))}")
    name = spec.get("name")
    if not isinstance(name, (str, int)) or not str(name).strip():
        raise InputError(f"name: expected a member name, got {brief(name)}")
    count = spec.get("count", 1)
    if isinstance(count, bool) or not isinstance(count, int) or not 1 <= count <= 1_000_000:
        raise InputError(f"count: expected a whole number of members from 1 to 1000000, got {brief(count)}")
    job = copy.deepcopy(shared)
    units = UnitSystem.from_spec(spec.get("units", job.get("units")), "units")
    if "units" in spec:
        job["units"] = spec["units"]
    beam = dict(job.get("beam") or {})
    own_beam = spec.get("beam", {})
    if not isinstance(own_beam, dict):
        raise InputError(f"beam: expected a table, got {brief(own_beam)}")
    geometry = {k: v for k, v in own_beam.items() if k in ("length", "spans")}
    geometry.update({k: spec[k] for k in ("length", "spans") if k in spec})
    if geometry:
        beam.pop("length", None)
        beam.pop("spans", None)
    beam.update({k: v for k, v in own_beam.items()})
    beam.update({k: spec[k] for k in ("length", "spans") if k in spec})
    if isinstance(beam.get("spans"), str):
        beam["spans"] = [beam["spans"]]
    beam.setdefault("title", str(name))
    job["beam"] = beam
    for key in ("support", "hinge", "combination"):
        if key in spec:
            job[key] = spec[key]
    for key in ("search", "limits"):
        if key in spec:
            if not isinstance(spec[key], dict):
                raise InputError(f"{key}: expected a table of [{key}] keys, got {brief(spec[key])}")
            if key == "search" and "objective" in spec[key]:
                raise InputError("search.objective: a schedule sets its objective in [schedule] objective")
            job[key] = {**(job.get(key) or {}), **spec[key]}
    search = dict(job.get("search") or {})
    search["objective"] = objective if objective in ("mass", "depth") else "mass"
    job["search"] = search
    loads = job.get("load", [])
    loads = [loads] if isinstance(loads, dict) else list(loads) if isinstance(loads, list) else loads
    if not isinstance(loads, list):
        raise InputError(f"load: expected [[load]] tables, got {brief(loads)}")
    own = spec.get("load", [])
    loads += [own] if isinstance(own, dict) else own if isinstance(own, list) else [own]
    loads += _short_loads(spec, units)
    if loads:
        job["load"] = loads
    return count, job


def _short_loads(spec, units) -> list:
    """Uniform loads from ``area_loads`` x the tributary width and ``line_loads``; ``point_loads``."""
    out = []
    width_keys = [k for k in ("spacing", "tributary_width") if k in spec]
    if len(width_keys) == 2:
        raise InputError("tributary_width: give spacing or tributary_width, not both")
    area = spec.get("area_loads")
    if width_keys and area is None:
        raise InputError(f"{width_keys[0]}: given without area_loads (loads per area to multiply it by)")
    if area is not None:
        if not width_keys:
            raise InputError("area_loads: needs spacing or tributary_width (the width of floor each member carries)")
        width = parse(spec[width_keys[0]], "length", width_keys[0], units)
        if not width > 0:
            raise InputError(f"{width_keys[0]}: expected a positive length, got {brief(spec[width_keys[0]])}")
        for case, q in _case_table(area, "area_loads"):
            w = parse(q, "pressure", f"area_loads.{case}", units) * width
            out.append({"case": case, "type": "udl", "w": f"{w!r} N/m"})
    for case, w in _case_table(spec.get("line_loads"), "line_loads"):
        out.append({"case": case, "type": "udl", "w": w})
    points = spec.get("point_loads", [])
    if isinstance(points, dict):
        points = [points]
    if not isinstance(points, list):
        raise InputError(f"point_loads: expected a list of {{case, P, at}} tables, got {brief(points)}")
    for i, pt in enumerate(points, 1):
        if not isinstance(pt, dict) or set(pt) - {"case", "P", "at"} or not {"case", "P", "at"} <= set(pt) \
                or pt["at"] is None:
            raise InputError(f"point_loads[{i}]: expected case, P and at (e.g. \"3 kN at 1.2 m\"), got {brief(pt)}")
        out.append({"case": pt["case"], "type": "point", "P": pt["P"], "at": pt["at"]})
    return out


def _case_table(t, field):
    if t is None:
        return []
    if not isinstance(t, dict) or not t:
        raise InputError(f"{field}: expected a table of load case = value, e.g. {{dead = \"0.5 kN/m^2\"}}, got {brief(t)}")
    return list(t.items())

