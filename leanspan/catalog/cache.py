"""The catalogue's disk cache: its folder, the keys of its files, reading and writing them.

Two kinds of file live in the user cache folder (:func:`cache_dir`):

- ``catalog-<hash>.npz``: the built-in series' rows, keyed on :func:`source_hash` (the
  package and numpy versions and every file the rows are computed from);
- ``user-<hash>.npz``: the computed rows of one supplier list, keyed on
  :func:`user_key`: a SHA-256 of the list's text, the materials table it was read with and
  :func:`source_hash`. A changed list, a changed material or changed code gives another key,
  so a file is never used for anything but the rows it was written from. The newest
  :data:`USER_FILES_KEPT` lists are kept; lists shorter than :data:`USER_MIN_ROWS` rows are
  computed every time (quicker than reading a file). It holds the float columns as one
  (columns, rows) array ``_numbers``, the file lines ``row``, each text column as int32 codes
  with its distinct values in ``_text_<column>`` (:func:`pack_text`), the key and the warnings.

Every file is written atomically (:func:`leanspan.fileio.atomic_write`); a file that cannot
be read, or holds other columns or lengths than expected, is ignored and written again. An
unwritable folder just means no cache. Deleting the folder is always safe.

Examples
--------
>>> from leanspan.catalog.materials import materials_table
>>> a = user_key("family,b,d\\nrectangle,45,200\\n", materials_table())
>>> b = user_key("family,b,d\\nrectangle,45,220\\n", materials_table())
>>> len(a), a == b
(64, False)
"""

from __future__ import annotations

import hashlib
import io
import os
from pathlib import Path

import numpy as np

from .. import __version__
from ..fileio import atomic_write

__all__ = ["cache_dir", "cache_enabled", "source_hash", "user_key", "user_cache_file", "load_columns",
           "save_columns", "pack_text", "unpack_text", "USER_MIN_ROWS", "USER_FILES_KEPT"]

#: supplier lists with fewer rows are not cached (computing them is quicker than a disk read)
USER_MIN_ROWS = 1000
#: how many supplier lists' files are kept (the newest; each 100,000-row list takes about 31 MB)
USER_FILES_KEPT = 8


def cache_dir() -> Path:
    """The user cache folder: ``$LEANSPAN_CACHE`` if set, else ``$XDG_CACHE_HOME/leanspan`` or
    ``~/.cache/leanspan``."""
    own = os.environ.get("LEANSPAN_CACHE")
    if own:
        return Path(own)
    base = os.environ.get("XDG_CACHE_HOME") or os.path.join(os.path.expanduser("~"), ".cache")
    return Path(base) / "leanspan"


def cache_enabled() -> bool:
    """False when ``LEANSPAN_NO_CACHE`` is set (to anything but "" or "0"): nothing is read or written."""
    return os.environ.get("LEANSPAN_NO_CACHE", "") in ("", "0")


def source_hash() -> str:
    """Hash of everything computed rows depend on: the package and numpy versions, the
    catalogue's code and data files, the section code and the unit table."""
    here = Path(__file__).resolve().parent
    h = hashlib.sha256(f"{__version__} numpy {np.__version__}".encode())
    files = sorted(here.glob("*.py")) + sorted((here / "data").glob("*"))
    files += sorted((here.parent / "sections").glob("*.py")) + [here.parent / "units.py"]
    for f in files:
        h.update(f.name.encode())
        h.update(f.read_bytes())
    return h.hexdigest()[:16]


def user_key(text: str, materials: dict) -> str:
    """The key of a supplier list's computed rows: SHA-256 of its text (as read, UTF-8), the
    materials table (every field of every material) and :func:`source_hash`."""
    h = hashlib.sha256(b"leanspan user rows 1\0")
    h.update(source_hash().encode())
    h.update(repr(sorted(materials.items())).encode())
    h.update(b"\0")
    h.update(text.encode("utf-8", "surrogatepass"))
    return h.hexdigest()


def user_cache_file(key: str) -> Path:
    """The cache file of the supplier list with :func:`user_key` ``key`` (it may not exist)."""
    return cache_dir() / f"user-{key[:32]}.npz"


def load_columns(path: Path, names, extra=()) -> dict | None:
    """The arrays of an ``.npz`` cache file, if it holds exactly the arrays ``names`` (1-D, of one
    length) and ``extra`` (any shape); None for a missing, partial, damaged or foreign file."""
    try:
        with np.load(path, allow_pickle=False) as z:
            if set(z.files) != set(names) | set(extra):
                return None
            cols = {k: z[k] for k in (*names, *extra)}
    except Exception:  # missing, partial or foreign file: rebuild
        return None
    if len({cols[k].shape for k in names}) > 1 or any(cols[k].ndim != 1 for k in names):
        return None
    return cols


def pack_text(values):
    """A column of str as arrays an ``.npz`` file holds without pickling: int32 codes (N,) and the
    distinct values in order of first appearance as UTF-8, each ended by NUL (uint8); None if a
    value holds NUL.

    >>> codes, blob = pack_text(np.array(["C24", "S355", "C24"], dtype=object))
    >>> codes.tolist(), blob.tobytes(), unpack_text(codes, blob).tolist()
    ([0, 1, 0], b'C24\\x00S355\\x00', ['C24', 'S355', 'C24'])
    """
    import pandas as pd

    codes, uniq = pd.factorize(np.asarray(values, dtype=object))  # (hashing: no sort)
    joined = "\0".join(uniq.tolist())
    if joined.count("\0") != max(len(uniq) - 1, 0):
        return None
    blob = (joined + "\0" if len(uniq) else "").encode("utf-8", "surrogatepass")
    return codes.astype(np.int32), np.frombuffer(blob, np.uint8)


def unpack_text(codes, blob):
    """The object array of str that :func:`pack_text` packed; None if the arrays do not fit."""
    try:
        uniq = blob.tobytes().decode("utf-8", "surrogatepass").split("\0")[:-1]
        if codes.dtype != np.int32 or (codes.size and not 0 <= codes.min() <= codes.max() < len(uniq)):
            return None
        return np.array(uniq, dtype=object)[codes] if uniq else np.empty(0, object)
    except (UnicodeDecodeError, AttributeError, ValueError):
        return None


def save_columns(path: Path, cols: dict, compress: bool = True, keep: int | None = None) -> None:
    """Write ``cols`` (numpy arrays, no objects) to ``path`` atomically; then delete the other
    files of the same kind (the name's part before the first ``-``), all of them, or all but
    the newest ``keep``. Any failure (read-only or full disk) leaves no cache, nothing else."""
    try:
        path.parent.mkdir(parents=True, exist_ok=True)
        buf = io.BytesIO()
        (np.savez_compressed if compress else np.savez)(buf, **cols)
        atomic_write(path, buf.getbuffer())  # no copy of the (large) file
        kind = path.name.split("-", 1)[0]
        others = [p for p in path.parent.glob(f"{kind}-*.npz") if p != path]
        if keep is not None:
            others.sort(key=lambda p: p.stat().st_mtime, reverse=True)
            others = others[max(keep - 1, 0):]
        for old in others:
            old.unlink(missing_ok=True)
    except Exception:  # read-only or full disk: work without a disk cache
        pass
