"""Reading job files and writing outputs safely.

``load_toml`` turns a broken file into one :class:`~leanspan.errors.InputError` line
naming the file and the position; ``atomic_write`` writes to a temporary file in the
target's folder and renames it, so a failure never leaves a half-written output and
an input is never overwritten.

Examples
--------
>>> import tempfile, pathlib
>>> d = pathlib.Path(tempfile.mkdtemp())
>>> atomic_write(d / "out.txt", "hello")
>>> (d / "out.txt").read_text()
'hello'
"""

from __future__ import annotations

import os
import tempfile
import tomllib
from pathlib import Path

from .errors import InputError

__all__ = ["load_toml", "atomic_write", "protect_inputs"]

_INPUTS: set[Path] = set()


def load_toml(path) -> dict:
    """Read a TOML file; raise :class:`InputError` naming the file on any problem."""
    path = Path(path)
    try:
        raw = path.read_bytes()
    except FileNotFoundError:
        raise InputError(f"{path}: file not found") from None
    except IsADirectoryError:
        raise InputError(f"{path}: is a folder, expected a TOML file") from None
    except OSError as exc:
        raise InputError(f"{path}: cannot read ({exc.strerror})") from None
    try:
        text = raw.decode("utf-8")
    except UnicodeDecodeError:
        raise InputError(f"{path}: not a UTF-8 text file") from None
    try:
        data = tomllib.loads(text)
    except tomllib.TOMLDecodeError as exc:
        raise InputError(f"{path}: broken TOML: {exc}") from None
    _INPUTS.add(path.resolve())
    return data


def protect_inputs(*paths) -> None:
    """Remember ``paths`` as inputs, which :func:`atomic_write` refuses to overwrite."""
    for p in paths:
        _INPUTS.add(Path(p).resolve())


def atomic_write(path, data: str | bytes) -> None:
    """Write ``data`` to ``path`` through a temporary file and a rename.

    Raises
    ------
    InputError
        If ``path`` is one of the inputs read in this run, or its folder is missing.
    """
    path = Path(path)
    if path.resolve() in _INPUTS:
        raise InputError(f"{path}: refusing to overwrite an input file; choose another output name")
    folder = path.parent if str(path.parent) else Path(".")
    if not folder.is_dir():
        raise InputError(f"{path}: folder {folder} does not exist")
    mode = "wb" if isinstance(data, bytes) else "w"
    fd, tmp = tempfile.mkstemp(prefix=f".{path.name}.", suffix=".tmp", dir=folder)
    try:
        with os.fdopen(fd, mode, **({} if mode == "wb" else {"encoding": "utf-8", "newline": ""})) as fh:
            fh.write(data)
        os.replace(tmp, path)
    except BaseException:
        try:
            os.unlink(tmp)
        except OSError:
            pass
        raise
