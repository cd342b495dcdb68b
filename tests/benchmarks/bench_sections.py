"""Section-property benchmarks.

- ``sections_100k_seconds``: the full set (:data:`leanspan.sections.properties.KEYS`) of
  100,000 filleted I sections through ``family_properties`` (polygons built too);
- ``sections_elastic_100k_seconds`` / ``sections_full_100k_seconds``: ``elastic_properties``
  and ``properties`` on the same prebuilt edges, in the same chunks, and their ratio
  ``sections_full_over_elastic_ratio`` (target < 3);
- ``family_properties_1m_ibeam_seconds``: 1,000,000 welded (unfilleted) plate-girder-like
  I sections through ``family_properties("ibeam", ...)``, 100,000 at a time;
- ``family_<name>_us_per_section``: every family through ``family_properties``;
- the one-at-a-time path through shapely polygons, for comparison.

Each time is the best of a few runs (the machine is shared).
"""

from __future__ import annotations

import time
import timeit

import numpy as np


def _dims(n, seed=7):
    rng = np.random.default_rng(seed)
    d = rng.uniform(0.1, 0.9, n)
    b = d * rng.uniform(0.3, 1.0, n)
    tw = d * rng.uniform(0.015, 0.04, n)
    tf = tw * rng.uniform(1.2, 2.0, n)
    return {"d": d, "b": b, "tw": tw, "tf": tf, "r": tw * 1.2}


def _girder_dims(n, seed=11):
    """Invented welded plate girders: depth 0.3-2 m, flanges a quarter to half the depth."""
    rng = np.random.default_rng(seed)
    d = rng.uniform(0.3, 2.0, n)
    return {"d": d, "b": d * rng.uniform(0.25, 0.5, n), "tw": d * rng.uniform(0.005, 0.02, n),
            "tf": d * rng.uniform(0.02, 0.05, n)}


def _family_dims(name, n, rng):
    """Valid invented dimensions of one family (m)."""
    d = rng.uniform(0.05, 0.8, n)
    u = lambda lo, hi: rng.uniform(lo, hi, n)  # noqa: E731
    if name == "rectangle":
        return {"b": d * u(0.2, 1.0), "d": d}
    if name == "circle":
        return {"d": d}
    if name == "tube":
        return {"d": d, "t": d * u(0.02, 0.2)}
    if name == "box":
        return {"b": d * u(0.4, 1.0), "d": d, "t": d * u(0.02, 0.08), "r": d * u(0.0, 0.1)}
    if name == "ibeam":
        return {"d": d, "b": d * u(0.3, 1.0), "tw": d * u(0.015, 0.04), "tf": d * u(0.03, 0.06),
                "r": d * u(0.0, 0.04)}
    if name in ("channel", "tee"):
        return {"d": d, "b": d * u(0.3, 0.6), "tw": d * u(0.02, 0.05), "tf": d * u(0.03, 0.08),
                "r": d * u(0.0, 0.05)}
    return {"d": d, "b": d * u(0.5, 1.0), "t": d * u(0.05, 0.12), "r": d * u(0.0, 0.05)}  # angle


def _best(fn, runs=3):
    """Best wall time of ``runs`` calls (timeit's repeat), and one result."""
    return min(timeit.repeat(fn, number=1, repeat=runs)), fn()


def run() -> dict[str, float]:
    from leanspan.sections.families import FAMILIES
    from leanspan.sections.properties import (_chunk_size, edges_from_family, elastic_properties,
                                              family_properties, properties)
    from leanspan.sections.section import Section, polygon_from_family

    n = 100_000
    dims = _dims(n)
    family_properties("ibeam", {k: v[:100] for k, v in dims.items()})  # warm-up
    vec_time, vec = _best(lambda: family_properties("ibeam", dims))

    # elastic and full set on the same prebuilt edges, chunk by chunk as properties() does
    fam = FAMILIES["ibeam"]
    full_dims = fam.complete(dims)
    edges = edges_from_family(fam, full_dims)
    step = _chunk_size(edges.z0.shape[1])
    chunks = [edges.rows(slice(s, s + step)) for s in range(0, n, step)]
    elastic_time, _ = _best(lambda: [elastic_properties(c) for c in chunks], runs=5)
    full_time, _ = _best(lambda: properties(edges), runs=5)

    girders = _girder_dims(1_000_000)
    girder_step = 100_000

    def girder_run():
        for s in range(0, 1_000_000, girder_step):
            family_properties("ibeam", {k: v[s:s + girder_step] for k, v in girders.items()})
    girder_time, _ = _best(girder_run, runs=2)

    per_family = {}
    rng = np.random.default_rng(5)
    for name in FAMILIES:
        fd = _family_dims(name, 20_000, rng)
        t, _ = _best(lambda: family_properties(name, fd))
        per_family[f"family_{name}_us_per_section"] = t / 20_000 * 1e6

    m = 200  # the same properties, one section at a time through shapely polygons
    t0 = time.perf_counter()
    for i in range(m):
        poly = polygon_from_family("ibeam", {k: v[i] for k, v in dims.items()})
        one = Section.from_polygons([poly]).properties()
    loop_per_section = (time.perf_counter() - t0) / m
    agree = max(abs(one[k] / vec[k][m - 1] - 1) for k in ("A", "Iz", "Zz", "shear_factor"))
    return {
        "sections_100k_seconds": vec_time,
        "sections_elastic_100k_seconds": elastic_time,
        "sections_full_100k_seconds": full_time,
        "sections_full_over_elastic_ratio": full_time / elastic_time,
        "family_properties_1m_ibeam_seconds": girder_time,
        **per_family,
        "sections_loop_ms_per_section": loop_per_section * 1e3,
        "sections_speedup_vs_loop": loop_per_section * n / vec_time,
        "sections_loop_vs_array_max_rel_diff": float(agree),
    }
