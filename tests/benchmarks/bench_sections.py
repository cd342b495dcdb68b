"""Section-property benchmarks: 100,000 filleted I-sections at once vs one at a time."""

from __future__ import annotations

import time

import numpy as np


def _dims(n, seed=7):
    rng = np.random.default_rng(seed)
    d = rng.uniform(0.1, 0.9, n)
    b = d * rng.uniform(0.3, 1.0, n)
    tw = d * rng.uniform(0.015, 0.04, n)
    tf = tw * rng.uniform(1.2, 2.0, n)
    return {"d": d, "b": b, "tw": tw, "tf": tf, "r": tw * 1.2}


def run() -> dict[str, float]:
    from leanspan.sections.properties import family_properties
    from leanspan.sections.section import Section, polygon_from_family

    n = 100_000
    dims = _dims(n)
    family_properties("ibeam", {k: v[:100] for k, v in dims.items()})  # warm-up
    t0 = time.perf_counter()
    vec = family_properties("ibeam", dims)
    vec_time = time.perf_counter() - t0

    m = 200  # the same properties, one section at a time through shapely polygons
    t0 = time.perf_counter()
    for i in range(m):
        poly = polygon_from_family("ibeam", {k: v[i] for k, v in dims.items()})
        one = Section.from_polygons([poly]).properties()
    loop_per_section = (time.perf_counter() - t0) / m
    agree = max(abs(one[k] / vec[k][m - 1] - 1) for k in ("A", "Iz", "Zz", "shear_factor"))
    return {
        "sections_100k_seconds": vec_time,
        "sections_loop_ms_per_section": loop_per_section * 1e3,
        "sections_speedup_vs_loop": loop_per_section * n / vec_time,
        "sections_loop_vs_array_max_rel_diff": float(agree),
    }
