"""Catalogue benchmarks: the full built-in table from scratch, and from the caches.

``catalog_build_seconds``: every built-in series with all section properties, no cache
(target < 2 s on the 2-core machine). ``catalog_cached_seconds``: the same table read
back from the disk cache in a fresh process state (memory cache cleared).
``catalog_memory_seconds``: a repeat call within one process. ``catalog_rows``: the size.
``select_1m_c50_seconds`` / ``select_1m_c50_peak_mb``: ``leanspan select`` end to end on an invented
1,000,000-row list of the same kind against 50 combinations on a two-span beam, empty cache
(targets < 5 s, < 2 GB); ``select_1m_c50_cached_seconds`` / ``..._cached_peak_mb`` the run after it
(the list's computed rows read from the cache); slow: skip with ``LEANSPAN_BENCH_SKIP=select_1m``.

The invented 100,000-row supplier list (half timber rectangles, half steel I sections):
``user_csv_100k_seconds`` reads it into the selection's candidate table with an empty cache
(text split, columns parsed, section properties computed, the cache file written; target < 1 s),
``user_csv_100k_cached_seconds`` the same read again (a cache hit); best of three each, in a
process that has imported pandas and parsed the job. ``select_100k_csv_seconds`` is
``leanspan select`` on it end to end in a fresh process with an empty cache (target < 3 s),
``select_100k_csv_cached_seconds`` the run after it; ``select_100k_csv_peak_mb`` the first
run's peak memory (target < 500 MB); best of two each.
"""

from __future__ import annotations

import os
import tempfile
import time


def run() -> dict[str, float]:
    from leanspan.catalog import series, table

    old = os.environ.get("XDG_CACHE_HOME")
    with tempfile.TemporaryDirectory() as tmp:
        os.environ["XDG_CACHE_HOME"] = tmp
        try:
            import pandas  # noqa: F401  (import time is not the catalogue's)

            table.builtin_frame(use_cache=False)  # warm imports and the series rules
            series._dims_mm.cache_clear()  # the rules run again too
            t0 = time.perf_counter()
            df = table.builtin_frame(use_cache=False)
            build = time.perf_counter() - t0
            table._builtin_columns.cache_clear()
            table.catalog_table()  # writes the disk cache
            table._builtin_columns.cache_clear()
            t0 = time.perf_counter()
            table.catalog_table()
            cached = time.perf_counter() - t0
            t0 = time.perf_counter()
            table.catalog_table()
            memory = time.perf_counter() - t0
        finally:
            table._builtin_columns.cache_clear()
            if old is None:
                os.environ.pop("XDG_CACHE_HOME", None)
            else:
                os.environ["XDG_CACHE_HOME"] = old
    out = {"catalog_build_seconds": build, "catalog_cached_seconds": cached,
           "catalog_memory_seconds": memory, "catalog_rows": float(len(df))}
    with tempfile.TemporaryDirectory() as tmp:
        job = _write_100k_job(tmp)
        out.update(_user_csv_100k(job, tmp))
        out.update(_select_100k_csv(job, tmp))
    if "select_1m" not in os.environ.get("LEANSPAN_BENCH_SKIP", ""):
        with tempfile.TemporaryDirectory() as tmp:
            out.update(_select_1m_c50(tmp))
    return out


def _write_100k_job(folder: str, n: int = 100_000) -> str:
    """An invented 100,000-row supplier list (half timber rectangles, half steel I sections) and a
    selection job on it, in ``folder``; the job file's path."""
    import numpy as np

    rng = np.random.default_rng(1)
    rows = ["# invented supplier list for the benchmark", "family,material,d,b,tw,tf,r"]
    for i in range(n):
        if i % 2:
            rows.append(f"rectangle,C24,{rng.integers(100, 600)},{rng.integers(50, 300)},,,")
        else:
            d = int(rng.integers(150, 600))
            tw = round(d / 40 + rng.uniform(0, 3), 1)
            rows.append(f"ibeam,S355,{d},{int(d * rng.uniform(0.4, 0.6))},{tw},{round(tw * 1.5, 1)},"
                        f"{round(tw * 2, 1)}")
    with open(os.path.join(folder, "list.csv"), "w", encoding="utf-8") as f:
        f.write("\n".join(rows) + "\n")
    job = os.path.join(folder, "job.toml")
    with open(job, "w", encoding="utf-8") as f:
        f.write('[beam]\nspans = ["6 m"]\n[[load]]\ncase = "dead"\ntype = "udl"\nw = "8 kN/m"\n'
                '[search]\ncatalog = "list.csv"\n[limits]\nstress_factor = 0.6\n')
    return job


def _user_csv_100k(job_path: str, folder: str) -> dict:
    """The list into the candidate table: cold (an empty cache folder each time) and from the cache."""
    import shutil

    from leanspan.cli.select import load_job
    from leanspan.select.search import candidate_table

    search = load_job(job_path).search
    saved = {k: os.environ.pop(k, None) for k in ("LEANSPAN_CACHE", "LEANSPAN_NO_CACHE")}
    cold, hit = [], []
    try:
        for i in range(3):
            os.environ["LEANSPAN_CACHE"] = where = os.path.join(folder, f"cache-in-process-{i}")
            t0 = time.perf_counter()
            rows = len(candidate_table(search))
            cold.append(time.perf_counter() - t0)
            if i == 0:
                for _ in range(3):
                    t0 = time.perf_counter()
                    assert len(candidate_table(search)) == rows
                    hit.append(time.perf_counter() - t0)
            shutil.rmtree(where, ignore_errors=True)
    finally:
        for k, v in saved.items():
            os.environ.pop(k, None)
            if v is not None:
                os.environ[k] = v
    return {"user_csv_100k_seconds": min(cold), "user_csv_100k_cached_seconds": min(hit)}


def _timed_select(job_path: str, cache: str, timeout: int = 600):
    """Wall seconds and the child's peak memory (MB) of ``leanspan select JOB --json`` in a child
    process using the cache folder ``cache``."""
    import subprocess
    import sys

    # the child reports its own peak (VmHWM): a child's ru_maxrss also counts the memory of this
    # process at the fork, which an earlier benchmark in the same run may have grown
    code = ("import sys\nfrom leanspan.cli import main\ntry:\n    status = main(sys.argv[1:])\nfinally:\n"
            "    hwm = [l for l in open('/proc/self/status') if l.startswith('VmHWM')]\n"
            "    print('peak_kb', hwm[0].split()[1] if hwm else 'nan', file=sys.stderr)\nsys.exit(status)")
    env = dict(os.environ, LEANSPAN_CACHE=cache)
    env.pop("LEANSPAN_NO_CACHE", None)
    t0 = time.perf_counter()
    r = subprocess.run([sys.executable, "-c", code, "select", job_path, "--json"],
                       capture_output=True, text=True, timeout=timeout, env=env)
    seconds = time.perf_counter() - t0
    if r.returncode not in (0, 1):
        raise RuntimeError(f"select on {job_path} exited {r.returncode}: {r.stderr.strip()[:300]}")
    peak = [line.split()[1] for line in r.stderr.splitlines() if line.startswith("peak_kb")]
    return seconds, float(peak[-1]) / 1024.0 if peak else float("nan")


def _combinations_50() -> str:
    """50 invented combinations (40 strength, 10 deflection) of four load cases, as TOML."""
    out = []
    for i, (g, q, s, w) in enumerate([(g, q, s, w) for g in (1.0, 1.2, 1.35, 1.15) for q in (0.0, 1.05, 1.5)
                                      for s in (0.0, 0.75, 1.5) for w in (0.0, 0.9)][:40]):
        out.append(f'[[combination]]\nname = "ULS {i}"\ncheck = "strength"\n'
                   f'factors = {{ dead = {g}, imposed = {q}, snow = {s}, wind = {w} }}\n')
    for i in range(10):
        limit = ("span/250", "span/360", "span/300", "25 mm")[i % 4]
        out.append(f'[[combination]]\nname = "SLS {i}"\ncheck = "deflection"\nlimit = "{limit}"\n'
                   f'factors = {{ dead = {1.0 if i % 2 else 0.0}, imposed = {0.5 + 0.1 * i}, snow = {0.1 * i} }}\n')
    return "".join(out)


def _select_1m_c50(folder: str) -> dict:
    """``leanspan select`` end to end (empty cache) on an invented 1,000,000-row list against 50
    combinations on a two-span beam: seconds and peak MB. Skip with LEANSPAN_BENCH_SKIP=select_1m."""
    _write_100k_job(folder, n=1_000_000)
    job = os.path.join(folder, "job-c50.toml")
    with open(job, "w", encoding="utf-8") as f:
        f.write('[beam]\nspans = ["5 m", "6.5 m"]\n'
                '[[load]]\ncase = "dead"\ntype = "udl"\nw = "6 kN/m"\n'
                '[[load]]\ncase = "imposed"\ntype = "udl"\nw = "5 kN/m"\n'
                '[[load]]\ncase = "imposed"\ntype = "point"\nP = "12 kN"\nat = "8 m"\n'
                '[[load]]\ncase = "snow"\ntype = "linear"\nw1 = "0.5 kN/m"\nw2 = "2 kN/m"\nfrom = "0 m"\nto = "11.5 m"\n'
                '[[load]]\ncase = "wind"\ntype = "udl"\nw = "-1.2 kN/m"\n'
                + _combinations_50()
                + '[search]\ncatalog = "list.csv"\nself_weight = "dead"\n[limits]\nstress_factor = 0.6\n')
    cache = os.path.join(folder, "cache-1m")
    seconds, mb = _timed_select(job, cache, timeout=1800)
    cached, cached_mb = _timed_select(job, cache, timeout=1800)  # the list's rows from the cache
    return {"select_1m_c50_seconds": seconds, "select_1m_c50_peak_mb": mb,
            "select_1m_c50_cached_seconds": cached, "select_1m_c50_cached_peak_mb": cached_mb}


def _select_100k_csv(job_path: str, folder: str) -> dict:
    """``leanspan select`` end to end on the list: wall time and the child process's peak memory,
    with an empty cache and then with the cache the first run wrote."""
    cold, cached, peaks = [], [], []
    for i in range(2):
        cache = os.path.join(folder, f"cache-select-{i}")
        seconds, mb = _timed_select(job_path, cache)
        cold.append(seconds)
        peaks.append(mb)
        cached.append(_timed_select(job_path, cache)[0])
    return {"select_100k_csv_seconds": min(cold), "select_100k_csv_cached_seconds": min(cached),
            "select_100k_csv_peak_mb": max(peaks)}


if __name__ == "__main__":
    for k, v in run().items():
        print(f"{k}: {v:.6g}")
