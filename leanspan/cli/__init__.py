"""The ``leanspan`` command: argument parsing, dispatch, printing and exit codes.

Each subcommand lives in its own module here (``section``, ``beam``, ``catalog``,
``materials``, ``select``, ``demo``) exposing ``add_parser(subparsers)`` and
``run(args) -> int``. Library code never prints or exits; this package does.
Exit status: 0 success, 1 a search where nothing passes, 2 bad input.

Around every command: numpy floating-point errors (overflow, 0/0, division by zero) raise
and, like RuntimeWarnings, become one error line naming the :func:`stage` being computed;
other Python warnings print as ``leanspan COMMAND: warning:`` lines; output paths are checked
before any work (:func:`check_outputs`); results are checked for non-finite values before
they are printed (:func:`check_finite`).
"""

from __future__ import annotations

import argparse
import importlib
import os
import sys
from contextlib import contextmanager

# One BLAS thread unless the user says otherwise (set before numpy loads): the command's linear
# algebra is many small systems (beam and modal matrices of a few hundred unknowns), where
# threads cost more than they give; on a busy 2-core machine the vibration screen of 10,000
# candidates ran in 4-13 s with threads and 1.5 s without.
for _var in ("OPENBLAS_NUM_THREADS", "OMP_NUM_THREADS", "MKL_NUM_THREADS"):
    os.environ.setdefault(_var, "1")

__all__ = ["main", "add_common", "emit_json", "option_paths", "warn", "stage", "check_finite",
           "check_outputs", "OUTPUT_OPTIONS"]

COMMANDS = ["section", "beam", "catalog", "materials", "select", "demo", "schedule"]
OUTPUT_OPTIONS = ("csv", "report", "markdown", "plot", "outline")  # argparse names of output-path options


def _parser(available):
    parser = argparse.ArgumentParser(
        prog="leanspan",
        description="Section properties, exact beams and the lightest section that passes.",
    )
    from .. import __version__

    parser.add_argument("--version", action="version", version=f"leanspan {__version__}")
    sub = parser.add_subparsers(dest="command", metavar="COMMAND")
    for name, module in available:
        module.add_parser(sub)
    return parser


def _modules():
    out = []
    for name in COMMANDS:
        try:
            out.append((name, importlib.import_module(f"{__name__}.{name}")))
        except ModuleNotFoundError as exc:
            if exc.name != f"{__name__}.{name}":
                raise
    return out


def main(argv=None) -> int:
    """Run the command line; return the exit status (also used as ``sys.exit``)."""
    from ..errors import LeanspanError

    available = _modules()
    parser = _parser(available)
    args = parser.parse_args(argv)
    if not args.command:
        parser.print_help()
        return 2
    try:
        status = _guarded(args)
    except LeanspanError as exc:
        print(f"leanspan {args.command}: error: {_with_file(exc, args)}", file=sys.stderr)
        return 2
    except BrokenPipeError:
        return 0
    except KeyboardInterrupt:
        print("leanspan: interrupted", file=sys.stderr)
        return 130
    return int(status or 0)


def _guarded(args):
    """``args.run(args)`` with floating-point errors raised and warnings kept off stderr."""
    import warnings

    import numpy as np

    def show(message, category, *_rest, **_kw):
        warn(args.command, f"{category.__name__}: {str(message).splitlines()[0] if str(message) else ''}")

    check_outputs(args)
    # underflow stays quiet: a tiny result rounding to zero is not an error
    with np.errstate(over="raise", divide="raise", invalid="raise"), warnings.catch_warnings(), \
            stage(f"leanspan {args.command}"), heartbeat(args.command, quiet=getattr(args, "own_progress", False)):
        warnings.simplefilter("error", RuntimeWarning)
        warnings.showwarning = show
        return args.run(args)


@contextmanager
def heartbeat(command: str, after: float = 1.0, every: float = 1.0, stream=None, quiet: bool = False):
    """On a terminal, a one-line progress note on stderr once work has taken ``after`` seconds
    (``leanspan select: working, 3 s``), updated every ``every`` seconds and wiped at the end;
    nothing when stderr is not a terminal (pipes, files, tests) or when the command shows its
    own progress (``quiet``)."""
    import threading
    import time

    stream = stream or sys.stderr
    if quiet or not getattr(stream, "isatty", lambda: False)():
        yield
        return
    start, done = time.monotonic(), threading.Event()

    def beat():
        if done.wait(after):
            return
        while not done.is_set():
            stream.write(f"\rleanspan {command}: working, {time.monotonic() - start:.0f} s ")
            stream.flush()
            done.wait(every)
        stream.write("\r\033[K")
        stream.flush()

    thread = threading.Thread(target=beat, daemon=True)
    thread.start()
    try:
        yield
    finally:
        done.set()
        thread.join(timeout=1.0)


@contextmanager
def stage(what: str):
    """Name what is being computed (``"solving the beam"``): a floating-point error or a
    RuntimeWarning inside becomes a :class:`~leanspan.errors.NumericalError` naming it."""
    from ..errors import NumericalError

    try:
        yield
    except (FloatingPointError, RuntimeWarning) as exc:
        text = str(exc).splitlines()[0] if str(exc) else type(exc).__name__
        raise NumericalError(f"{what}: the computation left the range of floating point "
                             f"({text}); check the magnitudes of the inputs") from None


def check_outputs(args) -> None:
    """Refuse an empty output path or an existing folder before any work is done."""
    from pathlib import Path

    from ..errors import InputError
    from ..fileio import is_dir

    for name in OUTPUT_OPTIONS:
        value = getattr(args, name, None)
        if value is None:
            continue
        if not value.strip():
            raise InputError(f"--{name}: empty file name; expected a file to write")
        if is_dir(value):
            raise InputError(f"--{name} {value}: is a folder; expected a file name")


def check_finite(obj, what: str, nullable=()) -> None:
    """Raise :class:`~leanspan.errors.NumericalError` if a result holds NaN or an infinity.

    ``nullable`` lists keys (``"deflection"``) or ``parent.key`` pairs (``"utilisation.deflection"``)
    where NaN means "not applicable" and is printed as null or "-".

    >>> check_finite({"a": [1.0, 2.0], "u": {"deflection": float("nan")}}, "x", {"u.deflection"})
    >>> check_finite({"M_max": {"value": float("inf")}}, "the beam")
    Traceback (most recent call last):
    ...
    leanspan.errors.NumericalError: the beam: M_max.value is inf, not a finite number; the inputs are probably beyond what the computation can carry
    """
    import math

    from ..errors import NumericalError

    def walk(o, path):
        if isinstance(o, float):
            if not math.isfinite(o) and not (path and (path[-1] in nullable or
                                                         ".".join(path[-2:]) in nullable)):
                raise NumericalError(f"{what}: {'.'.join(path) or 'the result'} is {o}, not a finite "
                                     "number; the inputs are probably beyond what the computation can carry")
        elif isinstance(o, dict):
            for k, v in o.items():
                walk(v, path + [str(k)])
        elif isinstance(o, (list, tuple)):
            for v in o:
                walk(v, path)
        elif hasattr(o, "tolist"):
            walk(o.tolist(), path)

    walk(obj, [])


def _with_file(exc, args) -> str:
    """The error line, led by the input file's name when the message does not name it yet
    (option errors, which start with "--", stay as they are)."""
    from pathlib import Path

    msg = str(exc)
    source = getattr(args, "file", None) or getattr(args, "job", None)
    if isinstance(source, str) and Path(source).name not in msg and not msg.startswith("--"):
        return f"{source}: {msg}"
    return msg


@contextmanager
def option_paths(*pairs):
    """Lead an error about an output path by the option that named it.

    Report code names only the path (``out.txt: expected ...``); inside this block an error
    whose message starts with one of the ``(flag, path)`` pairs' paths is raised again as
    ``--flag out.txt: expected ...``.
    """
    from ..errors import LeanspanError

    try:
        yield
    except LeanspanError as exc:
        msg = str(exc)
        for flag, path in pairs:
            if path is not None and msg.startswith(f"{path}:"):
                raise type(exc)(f"{flag} {msg}") from None
        raise


def warn(command: str, text: str) -> None:
    """One warning line on stderr, with the prefix every command uses."""
    print(f"leanspan {command}: warning: {text}", file=sys.stderr)


def add_common(p, units=True):
    """Options every command shares: ``--json`` and ``--units si|us``."""
    p.add_argument("--json", action="store_true", help="print results as JSON (SI units)")
    if units:
        p.add_argument("--units", choices=["si", "us"], default="si",
                       help="units of the readable output (default si: mm, kN, kN·m, MPa, kg/m)")


def emit_json(obj, what: str = "the result", nullable=()) -> None:
    """Print ``obj`` as JSON; NaN is printed as null where ``nullable`` allows it (see
    :func:`check_finite`), anywhere else it is an error."""
    import json
    import math

    check_finite(obj, what, nullable)

    def clean(o):
        if isinstance(o, float):
            return o if math.isfinite(o) else None
        if isinstance(o, dict):
            return {k: clean(v) for k, v in o.items()}
        if isinstance(o, (list, tuple)):
            return [clean(v) for v in o]
        if hasattr(o, "tolist"):
            return clean(o.tolist())
        return o

    print(json.dumps(clean(obj), indent=2))


if __name__ == "__main__":  # pragma: no cover
    sys.exit(main())
