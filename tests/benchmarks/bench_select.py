"""Selection benchmarks (targets, not asserts: the shared runner prints the numbers).

``select_10k_seconds``: 10,000 candidates x 10 combinations (6 strength, 4 deflection)
on a three-span beam with an overhang, through the vectorised ``screen`` (target < 0.5 s).
``select_10k_spring_seconds``: the same with the second support a spring, so every
candidate's forces depend on its EI (target < 0.5 s, like the rigid case).
``select_speedup_vs_naive``: the same job through ``screen_loop`` (one solve per
candidate) on a subset, extrapolated per candidate to 10,000 (target >= 100); the subset's
utilisations must agree with ``screen`` to 1e-9 or the benchmark raises.
``select_loop_max_difference``: that largest disagreement; ``select_spring_loop_max_difference``
the same for the sprung beam (the screen's batched low-rank solve against one solve each).
``select_10k_vibration_seconds``: the first job with the vibration check on (``min_frequency``
and ``point_deflection``; the dead case's point loads make the permanent mass non-uniform, so
every candidate's own eigenproblem is solved, stacked).
``select_10k_all_checks_seconds``: 10,000 catalogue rows x 10 combinations with every check on
(bending, shear, deflection, lateral-torsional buckling, vibration); target < 0.6 s.
``select_10k_design_seconds``: the same 10,000 catalogue rows under ``[design]`` (design
strengths, final deflection with creep for two kdef values, bearing); no target yet.
``cli_demo_seconds``: ``leanspan demo`` end to end in a subprocess (target < 0.6 s).
``cli_section_seconds``: ``leanspan section`` on the flitch example in a subprocess (target < 0.4 s).
``cli_help_seconds``: ``leanspan --help`` in a subprocess (target < 0.5 s).
``screen_100k_c10_seconds``: the action effects (peak moments, shears, worst-span deflections)
of 100,000 candidates x the same 10 combinations through ``screen_effects`` (the envelope screen;
target < 0.05 s); ``screen_100k_c10_stations_seconds`` the station screen (the reference) on the
same; ``screen_envelope_max_difference`` their largest difference relative to each effect's size;
``screen_floor_ratio_100k_c10`` the envelope time over the memory floor (reading the candidates'
arrays and writing the five (K, C) effect arrays at the copy bandwidth measured here; target < 20);
``evaluate_100k_c10_seconds`` applying the bending, shear and deflection checks to those effects.
Candidate values are random but realistic (invented): timber to steel stiffnesses.
"""

from __future__ import annotations

import dataclasses
import os
import subprocess
import sys
import time
from pathlib import Path

import numpy as np

EXAMPLES = Path(__file__).resolve().parents[2] / "data" / "examples"
N_CAND = 10_000
N_LOOP = 40


def _job():
    from leanspan.select.job import parse_job

    loads = [{"case": "dead", "type": "udl", "w": "2.5 kN/m"},
             {"case": "imposed", "type": "udl", "w": "3 kN/m", "from": "0 m", "to": "13 m"},
             {"case": "snow", "type": "linear", "w1": "0.5 kN/m", "w2": "2 kN/m", "from": "4 m", "to": "14.5 m"},
             {"case": "dead", "type": "point", "P": "6 kN", "at": "2.2 m"},
             {"case": "imposed", "type": "point", "P": "4 kN", "at": "9.1 m"},
             {"case": "wind", "type": "udl", "w": "-0.8 kN/m"},
             {"case": "dead", "type": "point", "P": "2 kN", "at": "14.5 m"}]
    strength = [("ULS imposed", {"dead": 1.35, "imposed": 1.5, "snow": 0.75}),
                ("ULS snow", {"dead": 1.35, "imposed": 1.05, "snow": 1.5}),
                ("ULS dead only", {"dead": 1.35}),
                ("ULS uplift", {"dead": 1.0, "wind": 1.5}),
                ("ULS all", {"dead": 1.2, "imposed": 1.2, "snow": 1.2, "wind": 0.9}),
                ("ULS imposed light dead", {"dead": 1.0, "imposed": 1.5})]
    deflection = [("SLS total", {"dead": 1.0, "imposed": 1.0, "snow": 1.0}, "span/250"),
                  ("SLS imposed", {"imposed": 1.0}, "span/360"),
                  ("SLS snow", {"snow": 1.0}, "span/300"),
                  ("SLS absolute", {"dead": 1.0, "imposed": 1.0}, "20 mm")]
    combos = [{"name": n, "factors": f, "check": "strength"} for n, f in strength]
    combos += [{"name": n, "factors": f, "check": "deflection", "limit": lim} for n, f, lim in deflection]
    data = {"beam": {"length": "14.5 m"},
            "support": [{"at": f"{x} m", "type": "pin" if i == 0 else "roller"} for i, x in enumerate((0, 4.5, 9, 13))],
            "load": loads, "combination": combos,
            "search": {"families": ["rectangle"], "self_weight": "dead"},
            "limits": {"stress_factor": 0.6}}
    job = parse_job(data, Path("."))
    assert len(job.model.combinations) == 10
    return job


def _candidates(n, seed=1):
    from leanspan.select.screen import Candidates

    rng = np.random.default_rng(seed)
    steel = rng.random(n) < 0.5
    E = np.where(steel, 210e9, rng.uniform(8e9, 13e9, n))
    I = 10 ** rng.uniform(-5.5, -3.5, n)
    depth = rng.uniform(0.1, 0.6, n)
    S = I / (depth / 2)
    A = np.where(steel, rng.uniform(2e-3, 1.5e-2, n), rng.uniform(5e-3, 8e-2, n))
    rho = np.where(steel, 7850.0, rng.uniform(350, 500, n))
    fb = np.where(steel, 0.6 * 355e6, 0.6 * 24e6)
    fv = np.where(steel, 0.6 * 205e6, 0.6 * 4e6)
    return Candidates.with_allowables(EI=E * I, mass_per_length=rho * A, bending_allow=fb, shear_allow=fv,
                                      Sz_top=S, Sz_bot=S * rng.uniform(0.8, 1.2, n),
                                      shear_factor=np.where(steel, 1.0 / (0.4 * A), 1.5 / A))


def _best_of(fn, repeats=3):
    best = np.inf
    for _ in range(repeats):
        t0 = time.perf_counter()
        fn()
        best = min(best, time.perf_counter() - t0)
    return best


def _copy_bandwidth() -> float:
    """Bytes per second read plus written by a large numpy copy (the memory floor's bandwidth)."""
    a = np.ones(25_000_000)
    b = np.empty_like(a)
    t = _best_of(lambda: np.copyto(b, a), repeats=5)
    return 2 * a.nbytes / t


def _subprocess_seconds(args, repeats=3):
    """Best wall time of ``leanspan ARGS`` in a child process, run as an installed copy runs it:
    with its bytecode cached (one untimed run first). This machine sets PYTHONDONTWRITEBYTECODE,
    which would recompile every leanspan module on each run (about 0.15 s); a ``pip install``
    writes the bytecode once."""
    env = {k: v for k, v in os.environ.items() if k != "PYTHONDONTWRITEBYTECODE"}
    best = np.inf
    for i in range(repeats + 1):
        t0 = time.perf_counter()
        r = subprocess.run([sys.executable, "-m", "leanspan", *args], capture_output=True, text=True, timeout=120,
                           env=env)
        dt = time.perf_counter() - t0
        if r.returncode not in (0, 1):
            raise RuntimeError(f"leanspan {' '.join(args)} exited {r.returncode}: {r.stderr.strip()}")
        if i:
            best = min(best, dt)
    return best


def _largest_difference(fast, ref, idx) -> float:
    """Largest relative utilisation difference of ``screen`` rows ``idx`` against ``screen_loop``;
    raises when it exceeds 1e-9 or the pass/fail verdicts differ."""

    diff = 0.0
    for c in ref.utilisation:
        a, b = fast.utilisation[c][idx], ref.utilisation[c]
        if not np.array_equal(np.isnan(a), np.isnan(b)):
            raise RuntimeError(f"screen and screen_loop disagree on which {c} checks apply")
        ok = ~np.isnan(a)
        diff = max(diff, float(np.max(np.abs(a[ok] - b[ok]) / np.maximum(1.0, np.abs(b[ok])), initial=0.0)))
    if diff > 1e-9 or not np.array_equal(fast.passes[idx], ref.passes):
        raise RuntimeError(f"screen and screen_loop disagree (largest relative difference {diff:.3g})")
    return diff


def _all_checks_candidates(job):
    """10,000 catalogue rows (the built-in series repeated) with every check on: buckling with a
    restraint at mid-length besides the supports, and vibration."""
    import pandas as pd

    from leanspan.catalog.table import catalog_table
    from leanspan.select.job import Limits
    from leanspan.select.search import candidates_from_table

    df = catalog_table()
    copies = N_CAND // len(df) + 1
    # each copy of the catalogue 1 % heavier than the last: 10,000 distinct candidates, as a real
    # list of that size would be (identical rows would share their beam results)
    df = pd.concat([df.assign(mass_per_length=df["mass_per_length"] * (1 + 0.01 * i)) for i in range(copies)],
                   ignore_index=True).iloc[:N_CAND]
    limits = Limits(stress_factor=0.6, extra=(("lateral_restraint", "supports"), ("lateral_restraint_at", (7.0,)),
                                              ("min_frequency", 8.0), ("point_deflection", 1.5e-6)))
    return candidates_from_table(df, limits)


def _design_candidates(job):
    """The catalogue rows of :func:`_all_checks_candidates` under a design basis (service class 2;
    invented classes: dead permanent, the rest medium-term with psi2 = 0.3)."""
    import pandas as pd

    from leanspan.catalog.table import catalog_table
    from leanspan.select.design import DesignBasis
    from leanspan.select.job import Limits
    from leanspan.select.search import candidates_from_table

    df = catalog_table()
    copies = N_CAND // len(df) + 1
    # each copy of the catalogue 1 % heavier than the last: 10,000 distinct candidates, as a real
    # list of that size would be (identical rows would share their beam results)
    df = pd.concat([df.assign(mass_per_length=df["mass_per_length"] * (1 + 0.01 * i)) for i in range(copies)],
                   ignore_index=True).iloc[:N_CAND]
    cases = job.model.cases
    basis = DesignBasis(2, tuple((c, "permanent" if c == "dead" else "medium") for c in cases),
                        tuple((c, 0.3) for c in cases if c != "dead"))
    return candidates_from_table(df, Limits(design=basis))


def run() -> dict[str, float]:
    from leanspan.beam import Support
    from leanspan.select.job import Limits
    from leanspan.select.screen import evaluate, screen, screen_effects, screen_loop

    job = _job()
    cand = _candidates(N_CAND)
    sw = job.search.self_weight
    screen(job.model, cand.take(slice(0, 100)), sw)  # warm imports and caches
    fast_s = _best_of(lambda: screen(job.model, cand, sw))
    fast = screen(job.model, cand, sw)
    sups = list(job.model.supports)
    sups[1] = Support(sups[1].at, "spring", k=2e6)  # N/m: a stiff post (invented)
    sprung = dataclasses.replace(job.model, supports=tuple(sups))
    spring_s = _best_of(lambda: screen(sprung, cand, sw))
    vib = dataclasses.replace(cand, limits=Limits(stress_factor=1.0, extra=(("min_frequency", 8.0),
                                                                          ("point_deflection", 1.5e-6))))
    vib_s = _best_of(lambda: screen(job.model, vib, sw), repeats=1)
    every = _all_checks_candidates(job)
    all_s = _best_of(lambda: screen(job.model, every, sw), repeats=1)

    designed = _design_candidates(job)
    design_s = _best_of(lambda: screen(job.model, designed, sw), repeats=1)

    idx = np.linspace(0, N_CAND - 1, N_LOOP).astype(int)
    sub = cand.take(idx)
    t0 = time.perf_counter()
    ref = screen_loop(job.model, sub, sw)
    loop_per_cand = (time.perf_counter() - t0) / N_LOOP
    diff = _largest_difference(fast, ref, idx)
    spring_diff = _largest_difference(screen(sprung, cand, sw), screen_loop(sprung, sub, sw), idx)

    big = _candidates(100_000, seed=2)
    screen_effects(job.model, big, sw)  # warm
    env_s = _best_of(lambda: screen_effects(job.model, big, sw), repeats=5)
    env = screen_effects(job.model, big, sw)
    st_s = _best_of(lambda: screen_effects(job.model, big, sw, method="stations"), repeats=1)
    ref_eff = screen_effects(job.model, big, sw, method="stations")
    env_diff = 0.0
    for key in ("M_max", "M_min", "V_abs", "v_abs", "v_allowed"):
        a, b = getattr(env, key), getattr(ref_eff, key)
        ok = ~np.isnan(b)
        if ok.any():
            env_diff = max(env_diff, float(np.max(np.abs(a[ok] - b[ok])) / np.abs(b[ok]).max()))
    eval_s = _best_of(lambda: evaluate(env, big), repeats=3)
    moved = (sum(np.asarray(v).nbytes for v in big.props.values()) + big.EI.nbytes + big.mass_per_length.nbytes
             + 5 * env.M_max.nbytes)
    floor = moved / _copy_bandwidth()

    return {"screen_100k_c10_seconds": env_s,
            "screen_100k_c10_stations_seconds": st_s,
            "screen_envelope_max_difference": env_diff,
            "screen_floor_ratio_100k_c10": env_s / floor,
            "evaluate_100k_c10_seconds": eval_s,
            "select_10k_seconds": fast_s,
            "select_10k_spring_seconds": spring_s,
            "select_10k_vibration_seconds": vib_s,
            "select_10k_all_checks_seconds": all_s,
            "select_10k_design_seconds": design_s,
            "select_speedup_vs_naive": loop_per_cand * N_CAND / fast_s,
            "select_loop_max_difference": diff,
            "select_spring_loop_max_difference": spring_diff,
            "cli_demo_seconds": _subprocess_seconds(["demo"]),
            "cli_section_seconds": _subprocess_seconds(["section", str(EXAMPLES / "section-flitch.toml")]),
            "cli_help_seconds": _subprocess_seconds(["--help"])}


if __name__ == "__main__":
    for k, v in run().items():
        print(f"{k}: {v:.6g}")
