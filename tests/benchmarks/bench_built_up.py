"""Built-up search benchmark (a target, not an assert: the shared runner prints the numbers).

``built_up_1m_seconds``: one million welded plate-girder candidates (200 web depths x 5 web
thicknesses x 50 flange widths x 20 flange thicknesses) screened against 10 combinations (6
strength, 4 deflection) on an invented two-span beam with an overhang, through
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
    from leanspan.select.job import parse_job

    thicknesses = [f"{t} mm" for t in (10, 12, 15, 18, 20, 22, 25, 28, 30, 32, 35, 38, 40, 45, 50, 55, 60,
                                       65, 70, 80)]
    strength = [("ULS imposed", {"dead": 1.35, "imposed": 1.5, "snow": 0.75}),
                ("ULS snow", {"dead": 1.35, "imposed": 1.05, "snow": 1.5}),
                ("ULS dead only", {"dead": 1.35}),
                ("ULS uplift", {"dead": 1.0, "wind": 1.5}),
                ("ULS all", {"dead": 1.2, "imposed": 1.2, "snow": 1.2, "wind": 0.9}),
                ("ULS imposed light dead", {"dead": 1.0, "imposed": 1.5})]
    deflection = [("SLS total", {"dead": 1.0, "imposed": 1.0, "snow": 1.0}, "span/250"),
                  ("SLS imposed", {"imposed": 1.0}, "span/360"),
                  ("SLS snow", {"snow": 1.0}, "span/300"),
                  ("SLS absolute", {"dead": 1.0, "imposed": 1.0}, "40 mm")]
    combos = [{"name": n, "factors": f, "check": "strength"} for n, f in strength]
    combos += [{"name": n, "factors": f, "check": "deflection", "limit": lim} for n, f, lim in deflection]
    data = {"beam": {"length": "22 m"},
            "support": [{"at": "0 m", "type": "pin"}, {"at": "9 m", "type": "roller"},
                        {"at": "19 m", "type": "roller"}],
            "load": [{"case": "dead", "type": "udl", "w": "12 kN/m"},
                     {"case": "imposed", "type": "udl", "w": "15 kN/m", "from": "0 m", "to": "19 m"},
                     {"case": "snow", "type": "udl", "w": "4 kN/m"},
                     {"case": "wind", "type": "udl", "w": "-3 kN/m"},
                     {"case": "dead", "type": "point", "P": "60 kN", "at": "4 m"},
                     {"case": "imposed", "type": "point", "P": "40 kN", "at": "14 m"}],
            "combination": combos,
            "limits": {"stress_factor": 0.6},
            "built_up": {"plate_girder": {
                "material": "S355",
                "web_depth": {"from": "400 mm", "to": "1395 mm", "step": "5 mm"},
                "web_thickness": ["8 mm", "10 mm", "12 mm", "15 mm", "20 mm"],
                "flange_width": {"from": "200 mm", "to": "690 mm", "step": "10 mm"},
                "flange_thickness": thicknesses}}}
    return parse_job(data, Path("."))


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
