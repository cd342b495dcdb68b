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
import stat
import tempfile
import tomllib
from pathlib import Path

from .errors import InputError

__all__ = ["read_text", "load_toml", "atomic_write", "protect_inputs", "is_file", "is_dir"]

_INPUTS: set[Path] = set()


def is_file(path) -> bool:
    """``Path(path).is_file()``, but False (not an exception) for a name too long for the system
    or one holding a NUL character.

    >>> is_file("x" * 5000), is_file("a" + chr(0) + "b")
    (False, False)
    """
    try:
        return Path(path).is_file()
    except (OSError, ValueError):
        return False


def is_dir(path) -> bool:
    """``Path(path).is_dir()``, False for an impossible name (see :func:`is_file`)."""
    try:
        return Path(path).is_dir()
    except (OSError, ValueError):
        return False


def read_text(path, what: str = "text", error=InputError, encoding: str = "utf-8") -> str:
    """Read a UTF-8 file; raise ``error`` naming the file on any problem.

    ``what`` names the expected file in the folder message ("a TOML file").
    """
    path = Path(path)
    try:
        raw = path.read_bytes()
    except FileNotFoundError:
        raise error(f"{path}: file not found") from None
    except IsADirectoryError:
        raise error(f"{path}: is a folder, expected {what}") from None
    except OSError as exc:
        raise error(f"{path}: cannot read ({exc.strerror})") from None
    except ValueError:  # a NUL character in the name
        raise error(f"{path}: not a possible file name") from None
    try:
        return raw.decode(encoding)
    except UnicodeDecodeError:
        raise error(f"{path}: not a UTF-8 text file") from None


def load_toml(path) -> dict:
    """Read a TOML file; raise :class:`InputError` naming the file on any problem."""
    path = Path(path)
    text = read_text(path, "a TOML file")
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


def _target_mode(path: Path) -> int:
    try:
        return stat.S_IMODE(path.stat().st_mode)
    except OSError:
        umask = os.umask(0)
        os.umask(umask)
        return 0o666 & ~umask


def atomic_write(path, data: str | bytes | memoryview) -> None:
    """Write ``data`` (text, or bytes or a buffer of them) to ``path`` through a temporary file and
    a rename.

    The file gets the permissions a plain ``open(path, "w")`` would give: those of the
    file it replaces, else 0666 less the user's umask.

    Raises
    ------
    InputError
        If ``path`` is empty, an existing folder, one of the inputs read in this run, or its
        folder is missing.
    """
    if not str(path).strip():
        raise InputError("empty file name; expected a file to write")
    path = Path(path)
    if is_dir(path):
        raise InputError(f"{path}: is a folder; expected a file name")
    if path.resolve() in _INPUTS:
        raise InputError(f"{path}: refusing to overwrite an input file; choose another output name")
    folder = path.parent if str(path.parent) else Path(".")
    if not is_dir(folder):
        raise InputError(f"{path}: folder {folder} does not exist")
    mode = "w" if isinstance(data, str) else "wb"
    fd, tmp = tempfile.mkstemp(prefix=f".{path.name}.", suffix=".tmp", dir=folder)
    try:
        with os.fdopen(fd, mode, **({} if mode == "wb" else {"encoding": "utf-8", "newline": ""})) as fh:
            fh.write(data)
        os.chmod(tmp, _target_mode(path))  # mkstemp makes 0600 files
        os.replace(tmp, path)
    except BaseException:
        try:
            os.unlink(tmp)
        except OSError:
            pass
        raise
