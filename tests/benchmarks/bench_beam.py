"""Beam benchmarks: one full solve with stations, and 10,000 sprung-beam stiffness variants batched.

beam_solve_ms          three spans, 20 loads, 10 combinations, full stations (target < 5 ms; 5.4-6.6 ms
                       on the shared 2-core machine before the work of issues 18/19, about 3.4 after)
beam_batch_10k_seconds respond() for 10,000 EI candidates of a beam on a spring (target < 1 s)
beam_10k_loads_seconds  solve() of a two-span beam with 10,000 point loads (target < 0.5 s)
beam_10k_loads_peak_mb  peak memory allocated by that solve (tracemalloc; linear in the loads)
beam_100k_loads_seconds the same with 100,000 point loads (target: a few seconds)
"""

from __future__ import annotations

import time
import tracemalloc

import numpy as np

from leanspan.beam import (BeamModel, Combination, Couple, DistributedLoad, PointLoad, Stiffness, Support,
                           respond, solve)


def _three_span():
    L = 15.0
    rng = np.random.default_rng(1)
    loads = [DistributedLoad("dead", 3e3, 3e3, 0, L), DistributedLoad("imposed", 4e3, 4e3, 0, L)]
    cases = ["dead", "imposed", "snow", "wind"]
    while len(loads) < 20:
        c = cases[len(loads) % 4]
        a = float(rng.uniform(0, L))
        k = len(loads) % 3
        if k == 0:
            loads.append(PointLoad(c, float(rng.uniform(1e3, 1e4)), a))
        elif k == 1:
            b = min(L, a + float(rng.uniform(0.5, 4)))
            loads.append(DistributedLoad(c, float(rng.uniform(0, 3e3)), float(rng.uniform(0, 3e3)), a, b))
        else:
            loads.append(Couple(c, float(rng.uniform(-5e3, 5e3)), a))
    combos = tuple(Combination(f"C{i}", tuple(zip(cases, rng.uniform(0.5, 1.5, 4).round(2))),
                               "deflection" if i % 3 == 0 else "strength") for i in range(10))
    sups = (Support(0, "pin"), Support(5, "roller"), Support(10, "roller"), Support(15, "roller"))
    return BeamModel(L, sups, (Stiffness(0, L, 2e7),), tuple(loads), combinations=combos)


def _sprung():
    return BeamModel(10.0, (Support(0, "pin"), Support(4.0, "spring", k=5e5), Support(10.0, "roller")),
                     (Stiffness(0, 10.0, 2e6),),
                     (DistributedLoad("dead", 2e3, 2e3, 0, 10.0), PointLoad("imposed", 8e3, 7.0)),
                     combinations=(Combination("ULS", (("dead", 1.35), ("imposed", 1.5))),),
                     self_weight="dead")


def _many_loads(n):
    rng = np.random.default_rng(2)
    L = 12.0
    loads = tuple(PointLoad("imposed", float(p), float(a))
                  for p, a in zip(rng.uniform(10.0, 100.0, n), rng.uniform(0.0, L, n)))
    return BeamModel(L, (Support(0, "pin"), Support(7.0, "roller"), Support(L, "roller")),
                     (Stiffness(0, L, 2e7),), loads)


def _peak_mb(fn):
    tracemalloc.start()
    try:
        fn()
        return tracemalloc.get_traced_memory()[1] / 2**20
    finally:
        tracemalloc.stop()


def _best(fn, repeat):
    best = float("inf")
    for _ in range(repeat):
        t = time.perf_counter()
        fn()
        best = min(best, time.perf_counter() - t)
    return best


def run() -> dict[str, float]:
    model = _three_span()
    solve(model)  # warm-up
    solve_ms = _best(lambda: solve(model), 7) * 1e3
    sp = _sprung()
    EI = np.linspace(5e5, 5e7, 10_000)
    respond(sp, EI=EI[:10])
    batch = _best(lambda: respond(sp, EI=EI), 3)
    many = _many_loads(10_000)
    solve(many)
    many_s = _best(lambda: solve(many), 3)
    many_mb = _peak_mb(lambda: solve(many))
    huge = _many_loads(100_000)
    huge_s = _best(lambda: solve(huge), 1)
    return {"beam_solve_ms": solve_ms, "beam_batch_10k_seconds": batch, "beam_10k_loads_seconds": many_s,
            "beam_10k_loads_peak_mb": many_mb, "beam_100k_loads_seconds": huge_s}


if __name__ == "__main__":
    for k, v in run().items():
        print(f"{k}: {v:.6g}")
