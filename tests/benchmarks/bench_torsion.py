"""Torsion benchmarks: FE solve time at the default mesh and its error; closed-form throughput.

``run()`` returns ``name -> value``; tests/benchmarks/run.py prints them.
The reference for the FE error is the same solve on a mesh four times finer
(h = tw / 8), which converges as h^4 in J.
"""

from __future__ import annotations

import sys
import time
from pathlib import Path

import numpy as np


def _filleted_i():
    sys.path.insert(0, str(Path(__file__).resolve().parents[1]))
    from test_torsion_shapes import ibeam

    # 300 x 150 x 7.1 x 10.7, root radius 15 (8 segments per fillet)
    return ibeam(300.0, 150.0, 7.1, 10.7, 15.0)


def _best_of(fn, repeat=3):
    best = np.inf
    for _ in range(repeat):
        t0 = time.perf_counter()
        out = fn()
        best = min(best, time.perf_counter() - t0)
    return best, out


def run() -> dict[str, float]:
    from leanspan.sections.thin_walled import thin_walled_torsion
    from leanspan.sections.torsion import torsion

    shape = _filleted_i()
    seconds, r = _best_of(lambda: torsion([shape]))
    fine = torsion([shape], element_size=7.1 / 8)
    n = 100_000
    rng = np.random.default_rng(0)
    dims = {"d": rng.uniform(100, 600, n), "b": rng.uniform(60, 300, n), "tw": rng.uniform(4, 15, n),
            "tf": rng.uniform(6, 25, n), "r": rng.uniform(0, 25, n)}
    tw_seconds, _ = _best_of(lambda: thin_walled_torsion("ibeam", dims))
    return {
        "torsion_default_mesh_seconds": seconds,
        "torsion_default_mesh_elements": float(r.n_elements),
        "torsion_default_mesh_J_rel_error": abs(r.J / fine.J - 1),
        "torsion_default_mesh_Cw_rel_error": abs(r.Cw / fine.Cw - 1),
        # producers' table for this section: It = 20.12 cm^4, Iw = 125.9e3 cm^6 (from memory)
        "torsion_J_vs_handbook_rel_diff": r.J / 20.12e4 - 1,
        "torsion_Cw_vs_handbook_rel_diff": r.Cw / 125.9e9 - 1,
        "torsion_fine_mesh_seconds": _best_of(lambda: torsion([shape], element_size=7.1 / 8), 1)[0],
        "torsion_fine_mesh_elements": float(fine.n_elements),
        "thin_walled_ibeam_rows_per_second": n / tw_seconds,
    }


if __name__ == "__main__":
    for k, v in run().items():
        print(f"{k}: {v:.6g}")
