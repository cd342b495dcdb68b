"""Beam benchmarks: one full solve with stations, and 10,000 sprung-beam stiffness variants batched.

beam_solve_ms          three spans, 20 loads, 10 combinations, full stations (target < 20 ms)
beam_batch_10k_seconds respond() for 10,000 EI candidates of a beam on a spring (target < 1 s)
"""

from __future__ import annotations

import time

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
    return {"beam_solve_ms": solve_ms, "beam_batch_10k_seconds": batch}


if __name__ == "__main__":
    for k, v in run().items():
        print(f"{k}: {v:.6g}")
