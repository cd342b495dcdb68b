"""Catalogue benchmarks: the full built-in table from scratch, and from the caches.

``catalog_build_seconds``: every built-in series with all section properties, no cache
(target < 2 s on the 2-core machine). ``catalog_cached_seconds``: the same table read
back from the disk cache in a fresh process state (memory cache cleared).
``catalog_memory_seconds``: a repeat call within one process. ``catalog_rows``: the size.
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
    csv_s, csv_mb = _select_100k_csv()
    return {"catalog_build_seconds": build, "catalog_cached_seconds": cached,
            "catalog_memory_seconds": memory, "catalog_rows": float(len(df)),
            "select_100k_csv_seconds": csv_s, "select_100k_csv_peak_mb": csv_mb}


def _select_100k_csv(n: int = 100_000):
    """``leanspan select`` end to end on an invented 100,000-row supplier list (half timber
    rectangles, half steel I sections): wall time and the child process's peak memory."""
    import resource
    import subprocess
    import sys

    import numpy as np

    rng = np.random.default_rng(1)
    with tempfile.TemporaryDirectory() as tmp:
        rows = ["# invented supplier list for the benchmark", "family,material,d,b,tw,tf,r"]
        for i in range(n):
            if i % 2:
                rows.append(f"rectangle,C24,{rng.integers(100, 600)},{rng.integers(50, 300)},,,")
            else:
                d = int(rng.integers(150, 600))
                tw = round(d / 40 + rng.uniform(0, 3), 1)
                rows.append(f"ibeam,S355,{d},{int(d * rng.uniform(0.4, 0.6))},{tw},{round(tw * 1.5, 1)},"
                            f"{round(tw * 2, 1)}")
        with open(os.path.join(tmp, "list.csv"), "w", encoding="utf-8") as f:
            f.write("\n".join(rows) + "\n")
        with open(os.path.join(tmp, "job.toml"), "w", encoding="utf-8") as f:
            f.write('[beam]\nspans = ["6 m"]\n[[load]]\ncase = "dead"\ntype = "udl"\nw = "8 kN/m"\n'
                    '[search]\ncatalog = "list.csv"\n[limits]\nstress_factor = 0.6\n')
        # the child reports its own peak (VmHWM): a child's ru_maxrss also counts the memory of this
        # process at the fork, which an earlier benchmark in the same run may have grown
        code = ("import sys\nfrom leanspan.cli import main\ntry:\n    status = main(sys.argv[1:])\nfinally:\n"
                "    hwm = [l for l in open('/proc/self/status') if l.startswith('VmHWM')]\n"
                "    print('peak_kb', hwm[0].split()[1] if hwm else 'nan', file=sys.stderr)\nsys.exit(status)")
        t0 = time.perf_counter()
        r = subprocess.run([sys.executable, "-c", code, "select", os.path.join(tmp, "job.toml"), "--json"],
                           capture_output=True, text=True, timeout=600)
        seconds = time.perf_counter() - t0
        if r.returncode not in (0, 1):
            raise RuntimeError(f"select on the 100k list exited {r.returncode}: {r.stderr.strip()[:300]}")
    peak = [line.split()[1] for line in r.stderr.splitlines() if line.startswith("peak_kb")]
    peak_mb = float(peak[-1]) / 1024.0 if peak else resource.getrusage(resource.RUSAGE_CHILDREN).ru_maxrss / 1024.0
    return seconds, peak_mb


if __name__ == "__main__":
    for k, v in run().items():
        print(f"{k}: {v:.6g}")
