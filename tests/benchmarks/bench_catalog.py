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
    return {"catalog_build_seconds": build, "catalog_cached_seconds": cached,
            "catalog_memory_seconds": memory, "catalog_rows": float(len(df))}


if __name__ == "__main__":
    for k, v in run().items():
        print(f"{k}: {v:.6g}")
