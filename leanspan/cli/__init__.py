"""The ``leanspan`` command: argument parsing, dispatch, printing and exit codes.

Each subcommand lives in its own module here (``section``, ``beam``, ``catalog``,
``materials``, ``select``, ``demo``) exposing ``add_parser(subparsers)`` and
``run(args) -> int``. Library code never prints or exits; this package does.
Exit status: 0 success, 1 a search where nothing passes, 2 bad input.
"""

from __future__ import annotations

import argparse
from contextlib import contextmanager
import importlib
import sys

__all__ = ["main", "add_common", "emit_json", "option_paths", "warn"]

COMMANDS = ["section", "beam", "catalog", "materials", "select", "demo"]


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
        status = args.run(args)
    except LeanspanError as exc:
        print(f"leanspan {args.command}: error: {_with_file(exc, args)}", file=sys.stderr)
        return 2
    except BrokenPipeError:
        return 0
    except KeyboardInterrupt:
        print("leanspan: interrupted", file=sys.stderr)
        return 130
    return int(status or 0)


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


def emit_json(obj) -> None:
    """Print ``obj`` as JSON (NaN and infinities become null)."""
    import json
    import math

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
