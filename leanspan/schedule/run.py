"""Select every member of a schedule: identical members once, each with the same screen as
``leanspan select``, optionally on several processes.

Each distinct member job (:func:`~leanspan.schedule.parse.member_key`) is one *member type*.
A type is selected by :func:`~leanspan.select.search.run_selection` on the catalogue rows of its
own search (built once per distinct search and shared), so its result is exactly what
``leanspan select`` gives for that member alone. What is kept of each selection is small: the
chosen candidate (JSON contract CANDIDATE), and for every passing row its largest utilisation
and governing check, which the rationalisation and the Pareto sets need.

>>> from pathlib import Path
>>> from leanspan.schedule.parse import parse_schedule
>>> data = {"search": {"families": ["sawn_metric"], "materials": ["C24"]}, "limits": {"stress_factor": 0.6},
...         "member_defaults": {"spacing": "0.4 m", "area_loads": {"dead": "0.5 kPa", "imposed": "1.5 kPa"}},
...         "member": [{"name": "J1", "spans": "3.6 m", "count": 8}, {"name": "J2", "spans": "3600 mm"},
...                    {"name": "J3", "spans": "4.2 m"}]}
>>> run = run_schedule(parse_schedule(data, Path("."), "floor.toml"))
>>> len(run.outcomes), run.member_type.tolist()   # J1 and J2 are the same job
(2, [0, 0, 1])
>>> run.outcomes[0].chosen["name"] == run.outcomes[1].chosen["name"]
False
"""

from __future__ import annotations

import dataclasses
import os
import sys
from dataclasses import dataclass, field

import numpy as np

from ..errors import LeanspanError
from ..select.member import share_table_arrays
from ..select.search import candidate_table, run_selection
from .parse import BadMember, member_key, member_label

__all__ = ["Outcome", "ScheduleRun", "run_schedule", "select_member", "CANDIDATE_COLUMNS"]

CANDIDATE_COLUMNS = ("name", "family", "series", "material", "kind", "mass_per_length", "depth", "width")
_TABLES: dict = {}  # search -> catalogue rows (filled before workers fork, so they share it)


@dataclass
class Outcome:
    """The selection of one member type.

    ``chosen`` is the best passing candidate by the schedule's objective (CANDIDATE dict), or
    the closest one when nothing passes (``success`` False); ``rows`` are the passing row
    indices of the type's candidate table, ``worst`` their largest utilisation and
    ``governing`` the check that gives it; ``error`` a one-line message when the member's
    input proved wrong while selecting (no catalogue rows, a computation out of range).
    """

    success: bool
    message: str
    chosen: dict | None
    search: object = None
    rows: np.ndarray = field(default_factory=lambda: np.zeros(0, np.int32))
    worst: np.ndarray = field(default_factory=lambda: np.zeros(0, np.float32))
    governing: np.ndarray = field(default_factory=lambda: np.zeros(0, object))
    screened: int = 0
    warnings: list = field(default_factory=list)
    error: str | None = None
    candidates: np.ndarray | None = None  # global candidate ids of ``rows`` (set by run_schedule)


@dataclass
class ScheduleRun:
    """Every member's type, every type's outcome, the bad members and the global candidates.

    ``candidates`` holds :data:`CANDIDATE_COLUMNS` as arrays over every candidate any member
    screened (a candidate = series, designation and material), ``member_type[i]`` the type of
    ``schedule.members[i]``.
    """

    schedule: object
    member_type: np.ndarray
    outcomes: list
    bad: list
    candidates: dict
    warnings: list

    @property
    def members(self):
        return self.schedule.members

    @property
    def objective(self):
        return self.schedule.options.objective

    def good(self) -> np.ndarray:
        """Mask over members: selected without an input error."""
        return np.array([self.outcomes[t].error is None for t in self.member_type], bool)


def _search_key(search):
    return dataclasses.replace(search, objective="mass")


def table_for(search):
    """The catalogue rows of ``search`` (one table per distinct search, kept for the run)."""
    key = _search_key(search)
    if key not in _TABLES:
        _TABLES[key] = candidate_table(search)
        share_table_arrays(_TABLES[key])  # read-only from here: every member reuses its columns
    return _TABLES[key]


def select_member(job, objective: str = "mass", values=None) -> Outcome:
    """Select one member type; bad input found on the way becomes ``Outcome.error``.

    The numbers are those of ``run_selection(job)``: the same table, screen and ranking.
    """
    import warnings

    try:
        with np.errstate(over="raise", divide="raise", invalid="raise"), warnings.catch_warnings():
            warnings.simplefilter("error", RuntimeWarning)
            df = table_for(job.search)
            sel = run_selection(job, table=df) if len(df) else run_selection(job)
            return _outcome(sel, df, objective, values)
    except LeanspanError as exc:
        return Outcome(False, str(exc), None, error=str(exc))
    except (FloatingPointError, RuntimeWarning, ArithmeticError) as exc:
        text = str(exc).splitlines()[0] if str(exc) else type(exc).__name__
        msg = (f"selecting: the computation left the range of floating point ({text}); "
               "check the magnitudes of the inputs")
        return Outcome(False, msg, None, error=msg)


def _outcome(sel, df, objective, values) -> Outcome:
    res = sel.result
    names = list(res.utilisation)
    stack = np.stack([res.utilisation[c] for c in names], axis=1)
    rows = np.flatnonzero(res.passes).astype(np.int32)
    worst = np.fmax.reduce(stack[rows], axis=1).astype(np.float32) if rows.size else np.zeros(0, np.float32)
    governing = res.governing[rows]
    chosen, success, message = sel.chosen, sel.success, sel.message
    if success and objective in ("cost", "carbon"):
        v = values.values(objective, {c: df[c].to_numpy() for c in ("material", "series", "kind",
                                                                     "mass_per_length", "depth")})
        ok = rows[np.isfinite(v[rows])]
        if ok.size == 0:
            chosen, success = None, False
            message = (f"{rows.size} candidates pass but none has a price; add a [[price]] entry for "
                       "their material, series or kind")
        else:
            mass = df["mass_per_length"].to_numpy(float)
            name = df["name"].to_numpy().astype(str)
            best = ok[np.lexsort((name[ok], mass[ok], v[ok]))[0]]
            chosen = sel.rows([int(np.flatnonzero(sel.order == best)[0])])[0]
            message = f"{rows.size} of {sel.screened} candidates pass; least {objective}: {chosen['name']}"
    if chosen is None and sel.chosen is None:
        closest = sel.rows([0])[0]
    else:
        closest = chosen
    return Outcome(success, message, closest, _search_key(sel.job.search), rows, worst, governing,
                   sel.screened, list(sel.warnings))


def _select_chunk(items, objective, values):
    """Worker: [(type index, job)] -> [(type index, Outcome)]."""
    return [(t, select_member(job, objective, values)) for t, job in items]


def run_schedule(schedule, jobs: int = 1, progress: bool = False) -> ScheduleRun:
    """Select every member type of ``schedule`` (a :class:`~leanspan.schedule.parse.Schedule`).

    Parameters
    ----------
    jobs : int
        Processes to use (1: this process only).
    progress : bool
        Show a progress bar on stderr for work over about a second.
    """
    objective, values = schedule.options.objective, schedule.values
    keys: dict = {}
    member_type = np.zeros(len(schedule.members), int)
    jobs_by_type = []
    for i, m in enumerate(schedule.members):
        k = member_key(m.job)
        if k not in keys:
            keys[k] = len(jobs_by_type)
            jobs_by_type.append(m.job)
        member_type[i] = keys[k]
    outcomes = [None] * len(jobs_by_type)
    bar = _bar(len(jobs_by_type), progress)
    for job in jobs_by_type:  # the distinct searches, before any worker starts
        try:
            table_for(job.search)
        except LeanspanError:
            pass  # reported by the member's own selection
    if jobs > 1 and len(jobs_by_type) > 1:
        _run_pool(jobs_by_type, outcomes, objective, values, jobs, bar)
    else:
        for t, job in enumerate(jobs_by_type):
            outcomes[t] = select_member(job, objective, values)
            bar.update(1)
    bar.close()
    candidates, ids = _global_candidates({o.search for o in outcomes if o.error is None})
    warnings = []
    for o in outcomes:
        if o.error is None:
            o.candidates = ids[o.search][o.rows]
        warnings += [w for w in o.warnings if w not in warnings]
    bad = list(schedule.bad)
    for i, m in enumerate(schedule.members):
        o = outcomes[member_type[i]]
        if o.error is not None:
            label = member_label(schedule.source, m.name, m.where)
            bad.append(BadMember(m.name, m.where, f"{label}: {o.error}"))
    return ScheduleRun(schedule, member_type, outcomes, bad, candidates, warnings)


def _run_pool(jobs_by_type, outcomes, objective, values, jobs, bar):
    import multiprocessing as mp
    from concurrent.futures import ProcessPoolExecutor

    ctx = mp.get_context("fork" if "fork" in mp.get_all_start_methods() and sys.platform != "darwin" else "spawn")
    n = len(jobs_by_type)
    size = max(1, min(64, n // (4 * jobs) or 1))
    chunks = [[(t, jobs_by_type[t]) for t in range(s, min(n, s + size))] for s in range(0, n, size)]
    with ProcessPoolExecutor(max_workers=min(jobs, os.cpu_count() or jobs), mp_context=ctx) as pool:
        futures = [pool.submit(_select_chunk, c, objective, values) for c in chunks]
        for f in futures:
            for t, o in f.result():
                outcomes[t] = o
                bar.update(1)


def _global_candidates(searches):
    """One index over every candidate of every table: columns, and per search the row -> id map."""
    cols = {c: [] for c in CANDIDATE_COLUMNS}
    index: dict = {}
    ids = {}
    for s in sorted(searches, key=repr):
        df = _TABLES[s]
        keys = list(zip(df["series"].astype(str), df["name"].astype(str), df["material"].astype(str)))
        new = np.zeros(len(keys), bool)
        out = np.empty(len(keys), np.int64)
        for r, k in enumerate(keys):  # one dict look-up per catalogue row
            if k not in index:
                index[k] = len(index)
                new[r] = True
            out[r] = index[k]
        ids[s] = out
        for c in CANDIDATE_COLUMNS:
            cols[c].append(df[c].to_numpy()[new])
    arrays = {c: (np.concatenate(v) if v else np.zeros(0)) for c, v in cols.items()}
    for c in ("mass_per_length", "depth", "width"):
        arrays[c] = arrays[c].astype(float)
    for c in ("name", "family", "series", "material", "kind"):
        arrays[c] = arrays[c].astype(str)
    return arrays, ids


class _NoBar:
    def update(self, n=1):
        pass

    def close(self):
        pass


def _bar(total, progress):
    """A tqdm bar on stderr, shown after a second of work, only on a terminal."""
    if not progress or not getattr(sys.stderr, "isatty", lambda: False)():
        return _NoBar()
    from tqdm import tqdm

    return tqdm(total=total, desc="member types", unit="type", file=sys.stderr, delay=1.0, leave=False)
