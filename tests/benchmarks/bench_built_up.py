"""Built-up search benchmark (a target, not an assert: the shared runner prints the numbers).

``built_up_1m_seconds``: one million welded plate-girder candidates (200 web depths x 5 web
thicknesses x 50 flange widths x 20 flange thicknesses) screened against the 10 combinations (6
strength, 4 deflection) of ``bench_select``'s invented three-span beam with an overhang, through
``run_selection`` (properties by the catalogue's row builder in chunks, the vectorised screen
and checks, the kept rows ranked); target < 10 s.
``built_up_1m_cpu_seconds``: the processor time of the same run (the machine is shared, so the
wall-clock figure varies with the load; numpy may use more than one core).
``built_up_1m_peak_mb``: the largest resident memory of the process after the run (target < 2048).
``built_up_1m_passing``: how many of them pass (a sanity figure).
"""

from __future__ import annotations

import resource
import time
from pathlib import Path


def job():
    """The 10-combination job of ``bench_select`` (three spans and an overhang) with a million
    plate girders as its search space."""
    import dataclasses
    import importlib.util

    from leanspan.select.built_up import parse_built_up
    from leanspan.units import UnitSystem

    spec = importlib.util.spec_from_file_location("bench_select", Path(__file__).with_name("bench_select.py"))
    bench_select = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(bench_select)
    thicknesses = [f"{t} mm" for t in (4, 5, 6, 8, 10, 12, 15, 18, 20, 22, 25, 28, 30, 32, 35, 40, 45, 50,
                                       55, 60)]
    girders = {"plate_girder": {
        "material": "S355",
        "web_depth": {"from": "50 mm", "to": "846 mm", "step": "4 mm"},
        "web_thickness": ["4 mm", "5 mm", "6 mm", "8 mm", "10 mm"],
        "flange_width": {"from": "40 mm", "to": "432 mm", "step": "8 mm"},
        "flange_thickness": thicknesses}}
    return dataclasses.replace(bench_select._job(), built_up=parse_built_up(girders, UnitSystem()),
                               catalogue=False)


def run() -> dict:
    from leanspan.select.search import run_selection

    j = job()
    assert j.built_up[0].size == 1_000_000
    start, cpu = time.perf_counter(), time.process_time()
    sel = run_selection(j)
    seconds, cpu = time.perf_counter() - start, time.process_time() - cpu
    peak = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024.0  # kB on Linux
    passing = int(sel.message.split(" of ")[0]) if sel.success else 0
    return {"built_up_1m_seconds": seconds, "built_up_1m_cpu_seconds": cpu, "built_up_1m_peak_mb": peak,
            "built_up_1m_passing": passing}


if __name__ == "__main__":
    for k, v in run().items():
        print(f"{k}: {v:.6g}")
