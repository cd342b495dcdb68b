"""Run every benchmark and print ``name: value`` lines.

Each ``tests/benchmarks/bench_*.py`` module exposes ``run() -> dict[str, float]``.
Usage: ``python tests/benchmarks/run.py [substring ...]`` (only modules whose name
contains one of the substrings).
"""

from __future__ import annotations

import importlib.util
import os
import sys
from pathlib import Path

# the command line's BLAS setting (leanspan/cli/__init__.py), before numpy loads
for _var in ("OPENBLAS_NUM_THREADS", "OMP_NUM_THREADS", "MKL_NUM_THREADS"):
    os.environ.setdefault(_var, "1")


def main(argv: list[str]) -> int:
    here = Path(__file__).resolve().parent
    for path in sorted(here.glob("bench_*.py")):
        if argv and not any(a in path.stem for a in argv):
            continue
        spec = importlib.util.spec_from_file_location(path.stem, path)
        module = importlib.util.module_from_spec(spec)
        spec.loader.exec_module(module)
        for name, value in module.run().items():
            print(f"{name}: {value:.6g}" if isinstance(value, float) else f"{name}: {value}", flush=True)
    return 0


if __name__ == "__main__":
    sys.exit(main(sys.argv[1:]))
