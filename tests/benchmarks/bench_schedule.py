"""Schedule benchmarks (targets, not asserts: the shared runner prints the numbers).

``schedule_1k_seconds``: 1,000 distinct members (random spans, spacings and area loads, two
combinations) against the whole built-in catalogue (every series, 3,276 candidates each):
parse, select every member, assemble the result; one process (target < 10 s).
``schedule_1k_jobs2_seconds``: the same on two processes (``--jobs 2``).
``schedule_10k_seconds`` and ``schedule_10k_peak_mb``: 10,000 such members on two processes, in a
child process whose peak resident memory (itself and its workers) is reported (targets < 60 s,
< 2 GB). Slow: skip it with ``LEANSPAN_BENCH_SKIP=schedule_10k``.
``rationalise_200_members_k5_seconds``: the exact rationalisation of 200 of those members to
at most 5 sections (the selection itself not timed; target < 5 s);
``rationalise_200_members_k5_pairs``: the member-section pairs of its model after the reductions.
Every number is invented.
"""

from __future__ import annotations

import os
import subprocess
import sys
import time
from pathlib import Path

import numpy as np

ROOT = Path(__file__).resolve().parents[2]


def schedule_data(n, seed=0):
    rng = np.random.default_rng(seed)
    members = [{"name": f"B{i}", "spans": [f"{rng.uniform(2, 8):.4f} m"], "spacing": f"{rng.uniform(0.3, 3):.4f} m",
                "area_loads": {"dead": f"{rng.uniform(0.3, 2):.4f} kPa", "imposed": f"{rng.uniform(1, 5):.4f} kPa"}}
               for i in range(n)]
    return {"search": {}, "limits": {"stress_factor": 0.6},
            "combination": [{"name": "ULS", "factors": {"dead": 1.35, "imposed": 1.5}},
                            {"name": "SLS", "factors": {"dead": 1.0, "imposed": 1.0}, "check": "deflection",
                             "limit": "span/300"}],
            "member": members}


def _schedule(n, jobs):
    from leanspan.schedule.parse import parse_schedule
    from leanspan.schedule.result import build_result
    from leanspan.schedule.run import run_schedule

    t = time.perf_counter()
    run = run_schedule(parse_schedule(schedule_data(n), Path("."), "bench"), jobs=jobs)
    build_result(run)
    assert len(run.outcomes) == n and not run.bad
    return time.perf_counter() - t, run


def _rationalise(run, n=200, k=5):
    from leanspan.schedule.rationalise import rationalise

    outcomes = run.outcomes[:n]
    m = len(run.candidates["name"])
    passes = np.zeros((len(outcomes), m), bool)
    for i, o in enumerate(outcomes):
        passes[i, o.candidates] = True
    weight = np.array([mm.job.model.length for mm in run.members[:n]])
    value = run.candidates["mass_per_length"]
    t = time.perf_counter()
    r = rationalise(passes, weight, value, k, tiebreak=run.candidates["depth"])
    dt = time.perf_counter() - t
    assert r.feasible and r.method == "milp" and r.optimal
    return dt


_CHILD = """
import resource, sys, time
sys.path.insert(0, {root!r}); sys.path.insert(0, {here!r})
from bench_schedule import _schedule
dt, _ = _schedule(10_000, 2)
peak = max(resource.getrusage(resource.RUSAGE_SELF).ru_maxrss, resource.getrusage(resource.RUSAGE_CHILDREN).ru_maxrss)
print(dt, peak / 1024)
"""


def run() -> dict:
    from leanspan.select.search import candidate_table
    from leanspan.select.job import SearchSpec

    candidate_table(SearchSpec())  # the catalogue built (or read from its cache) before timing
    out = {}
    out["schedule_1k_seconds"], run1 = _schedule(1000, 1)
    out["schedule_1k_jobs2_seconds"], _ = _schedule(1000, 2)
    out["rationalise_200_members_k5_seconds"] = _rationalise(run1)
    if "schedule_10k" not in os.environ.get("LEANSPAN_BENCH_SKIP", ""):
        code = _CHILD.format(root=str(ROOT), here=str(Path(__file__).parent))
        res = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
        seconds, peak = res.stdout.split()
        out["schedule_10k_seconds"] = float(seconds)
        out["schedule_10k_peak_mb"] = float(peak)
    return out
