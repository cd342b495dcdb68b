"""Supplier lists read as arrays and cached by a hash of their text.

References: the standard library's csv module (the cells and line numbers of a CSV text), the
row-by-row reader kept in ``leanspan.catalog.user._by_rows`` (the old code path, which names bad
rows), a cold computation (for the cache), and b d^3 / 12 for a rectangle (any strength of
materials text, e.g. Gere & Timoshenko, Mechanics of Materials, appendix D; from memory).
"""

from __future__ import annotations

import csv
import io
import subprocess
import sys
from pathlib import Path

import numpy as np
import pandas as pd
import pytest

from leanspan.catalog import cache, table, user
from leanspan.catalog.csvfile import read_grid
from leanspan.catalog.materials import load_user_materials
from leanspan.errors import CatalogError

ROOT = Path(__file__).resolve().parents[1]


@pytest.fixture(autouse=True)
def _own_cache(tmp_path, monkeypatch):
    """Each test its own cache folder (never the user's), cache on."""
    monkeypatch.setenv("LEANSPAN_CACHE", str(tmp_path / "cache"))
    monkeypatch.delenv("LEANSPAN_NO_CACHE", raising=False)
    return tmp_path / "cache"


def _csv_reference(text):
    """Brute force: the csv module's rows, cells stripped, comments and empty rows dropped, the
    first row the header, short rows padded; None when a row is longer than the header."""
    reader, rows = csv.reader(io.StringIO(text, newline="")), []  # (as a file opened with newline="")
    for cells in reader:
        cells = [c.strip() for c in cells]
        if any(cells) and not cells[0].startswith("#"):
            rows.append((reader.line_num, cells))
    (_, header), rows = rows[0], rows[1:]
    if any(len(c) > len(header) for _, c in rows):
        return None
    return header, [n for n, _ in rows], [c + [""] * (len(header) - len(c)) for _, c in rows]


def _random_text(rng, blanks=True):
    """A quote-free CSV text with blanks and tabs (unless not ``blanks``), comments, empty lines,
    comma-only lines, short rows and CR LF / CR line ends."""
    width = int(rng.integers(1, 6))
    words = ["a", "b c", "12.5", "", "x#y", "#", "\u00e9t\u00e9", "7"] if blanks else ["a", "12.5", "", "x#y", "#", "#z", "7"]
    pad = ["", " ", "\t", "  "] if blanks else [""]
    lines = ["#" + (" comment" if blanks else "comment")] if rng.random() < 0.5 else []
    lines.append(",".join(f"{rng.choice(pad)}h{j}{rng.choice(pad)}" for j in range(width)))
    for _ in range(int(rng.integers(0, 12))):
        kind = rng.random()
        if kind < 0.1:
            lines.append(rng.choice(["", "  ", ",,", " , ,\t", "# note, with, commas", "  #x"] if blanks else
                                    ["", ",,", ",", "#note,with,commas", "#", ",#x"]))
        else:
            k = int(rng.integers(1, width + 1)) if rng.random() < 0.98 else width + 1  # a few long rows
            lines.append(",".join(f"{rng.choice(pad)}{rng.choice(words)}{rng.choice(pad)}" for _ in range(k)))
    if not any(line.strip(" ,\t") and not line.strip().startswith("#") for line in lines[1:]) and rng.random() < 0.5:
        lines.append("z")
    end = rng.choice(["\n", "\r\n", "\r"])
    return end.join(lines) + (end if rng.random() < 0.7 else "")


@pytest.mark.parametrize("blanks", [True, False])
def test_split_text_equals_the_csv_module(blanks):
    """read_grid (the whole text split at once) gives the csv module's cells and line numbers (also
    for texts without blanks, whose comment lines are found from the places of their '#')."""
    rng = np.random.default_rng(18)
    compared = 0
    for _ in range(600):
        text = _random_text(rng, blanks)
        got, want = read_grid(text, "t.csv"), _csv_reference(text)
        if want is None:  # a row longer than the header: left to the row reader
            assert got is None, text
            continue
        compared += 1
        assert got is not None, text
        header, lines, grid = got
        assert [h for h, _ in header] == want[0], text
        assert lines.tolist() == want[1], text
        assert grid.tolist() == want[2], text
    assert 400 < compared < 600  # both kinds of text were met


def test_texts_the_split_leaves_to_the_csv_module():
    for text in ('family,name\nbox,"a, b"\n', "family,d\ncircle,\x0c5\n", "family,d\ncircle,\u00a05\n"):
        assert read_grid(text, "t.csv") is None


def _random_list(rng, n, quoted=False):
    """An invented supplier list of n rows: several families, unit headers, tabulated values,
    blank materials and names, comments, blanks around cells."""
    head = "name, family ,material,d [in],b,tw,tf,r,t,Iz [mm^4],A [cm^2],mass_per_length,price"
    lines = ["# invented list for a test", head]
    for i in range(n):
        f = rng.choice(["rectangle", "ibeam", "box", "circle"])
        name = rng.choice(["", f"P {i}", f'"Q, {i}"' if quoted else f"Q{i}"])
        mat = {"rectangle": rng.choice(["C24", "c 24", "", "GL28h"]), "ibeam": rng.choice(["S355", "", "S275"]),
               "box": rng.choice(["S355J2H", ""]), "circle": rng.choice(["S355", ""])}[f]
        if f == "rectangle":
            dims = [f"{rng.uniform(4, 12):.3f}", f"{rng.integers(38, 120)}", "", "", "", ""]
        elif f == "ibeam":
            dims = [f"{rng.uniform(6, 20):.2f}", f"{rng.integers(80, 200)}", f"{rng.uniform(4, 9):.1f}",
                    f"{rng.uniform(8, 14):.1f}", rng.choice(["", "8"]), ""]
        elif f == "box":
            dims = [f"{rng.uniform(3, 8):.2f}", f"{rng.integers(60, 150)}", "", "", "", f"{rng.uniform(3, 8):.1f}"]
        else:
            dims = [f"{rng.uniform(0.5, 3):.3f}", "", "", "", "", ""]
        tab = [rng.choice(["", f"{rng.uniform(1e6, 1e8):.6g}"]), rng.choice(["", f"{rng.uniform(5, 50):.4g}"]),
               rng.choice(["", f"{rng.uniform(5, 50):.4g}"])]
        cells = [name, f, mat, *dims, *tab, f"{rng.uniform(1, 99):.2f}"]
        # (a blank before a quote would make it a plain character)
        lines.append(",".join(f" {c}" if rng.random() < 0.05 and '"' not in c else c for c in cells))
        if rng.random() < 0.02:
            lines.append(rng.choice(["", "# a comment", ",,,"]))
    return "\n".join(lines) + "\n"


def _reference_table(monkeypatch, path, **kw):
    """The table through the csv module's rows and the row-by-row reader, no cache."""
    with monkeypatch.context() as m:
        m.setenv("LEANSPAN_NO_CACHE", "1")
        m.setattr(user, "read_grid", lambda *a, **k: None)
        m.setattr(user, "_by_columns", lambda *a, **k: None)
        return table.catalog_table(user_csv=path, **kw)


def _same_frames(a, b):
    pd.testing.assert_frame_equal(a, b, check_exact=True)
    assert a.attrs["warnings"] == b.attrs["warnings"]


@pytest.mark.parametrize("seed,quoted", [(1, False), (2, False), (3, True)])
def test_array_reader_gives_the_row_readers_table(tmp_path, monkeypatch, seed, quoted):
    rng = np.random.default_rng(seed)
    path = tmp_path / "list.csv"
    path.write_text(_random_list(rng, 400, quoted), encoding="utf-8")
    monkeypatch.setenv("LEANSPAN_NO_CACHE", "1")
    fast = table.catalog_table(user_csv=path)
    assert len(fast) == 400 and any("tabulated" in w for w in fast.attrs["warnings"])
    _same_frames(fast, _reference_table(monkeypatch, path))
    # with the built-in series and paired materials too
    both = dict(builtin=True, materials=["S355", "C30"], max_depth=0.4)
    _same_frames(table.catalog_table(user_csv=path, **both), _reference_table(monkeypatch, path, **both))


def _big_list(path, n=1200, seed=5):
    path.write_text(_random_list(np.random.default_rng(seed), n), encoding="utf-8")
    return path


def _count_builds(monkeypatch):
    calls = []
    original = table._user_columns

    def counted(*args):
        calls.append(args[0])
        return original(*args)

    monkeypatch.setattr(table, "_user_columns", counted)
    return calls


def test_cache_hit_equals_cold_read(tmp_path, monkeypatch, _own_cache):
    path = _big_list(tmp_path / "list.csv")
    builds = _count_builds(monkeypatch)
    cold = table.catalog_table(user_csv=path)
    files = list(_own_cache.glob("user-*.npz"))
    assert len(builds) == 1 and len(files) == 1
    hit = table.catalog_table(user_csv=path)
    assert len(builds) == 1  # read back, not computed
    _same_frames(hit, cold)
    r = hit[hit.family == "rectangle"].iloc[0]
    assert r.Iz == pytest.approx(r.b * r.d ** 3 / 12, rel=1e-12)  # b d^3 / 12
    # the same text under another name: a hit, and the warnings name the new file
    moved = tmp_path / "moved.csv"
    moved.write_bytes(path.read_bytes())
    again = table.catalog_table(user_csv=moved)
    assert len(builds) == 1
    assert again.attrs["warnings"] == [w.replace(str(path), str(moved)) for w in cold.attrs["warnings"]]


def test_a_changed_file_or_material_misses_the_cache(tmp_path, monkeypatch, _own_cache):
    path = _big_list(tmp_path / "list.csv")
    builds = _count_builds(monkeypatch)
    first = table.catalog_table(user_csv=path)
    text = path.read_text(encoding="utf-8")
    lines = text.split("\n")
    k = next(i for i, line in enumerate(lines) if ",rectangle," in line)
    cells = lines[k].split(",")
    cells[4] = "77"  # the b of that rectangle
    lines[k] = ",".join(cells)
    path.write_text("\n".join(lines), encoding="utf-8")
    changed = table.catalog_table(user_csv=path)
    assert len(builds) == 2
    assert changed.loc[changed.row == k + 1, "b"].iloc[0] == pytest.approx(0.077)
    assert first.loc[first.row == k + 1, "b"].iloc[0] != pytest.approx(0.077)
    # a materials file that changes C24's density: another key, recomputed
    mats = tmp_path / "mats.toml"
    mats.write_text('[[material]]\nname = "C24"\ndensity = "500 kg/m^3"\n', encoding="utf-8")
    heavier = table.catalog_table(user_csv=path, material_table=load_user_materials(mats))
    assert len(builds) == 3 and len(list(_own_cache.glob("user-*.npz"))) == 3
    c24 = heavier.material == "C24"
    # mass per length = A * density (500 kg/m^3 from the file above)
    np.testing.assert_allclose(heavier.mass_per_length[c24], heavier.A[c24] * 500.0, rtol=1e-12)


@pytest.mark.parametrize("damage", ["garbage", "truncated", "other key", "empty"])
def test_a_damaged_cache_file_is_ignored_and_rewritten(tmp_path, monkeypatch, _own_cache, damage):
    path = _big_list(tmp_path / "list.csv")
    cold = table.catalog_table(user_csv=path)
    (file,) = _own_cache.glob("user-*.npz")
    good = file.read_bytes()
    if damage == "garbage":
        file.write_bytes(b"not a cache")
    elif damage == "truncated":
        file.write_bytes(good[: len(good) // 2])
    elif damage == "empty":
        file.write_bytes(b"")
    else:  # another list's cache under this list's name
        other = _big_list(tmp_path / "other.csv", seed=9)
        table.catalog_table(user_csv=other)
        (other_file,) = set(_own_cache.glob("user-*.npz")) - {file}
        file.write_bytes(other_file.read_bytes())
    builds = _count_builds(monkeypatch)
    _same_frames(table.catalog_table(user_csv=path), cold)
    assert len(builds) == 1  # computed again ...
    _same_frames(table.catalog_table(user_csv=path), cold)
    assert len(builds) == 1  # ... and the rewritten file is read


def test_no_cache_small_lists_and_bounded_folder(tmp_path, monkeypatch, _own_cache):
    path = _big_list(tmp_path / "list.csv")
    monkeypatch.setenv("LEANSPAN_NO_CACHE", "1")
    table.catalog_table(user_csv=path)
    assert not _own_cache.exists()
    monkeypatch.delenv("LEANSPAN_NO_CACHE")
    small = _big_list(tmp_path / "small.csv", n=cache.USER_MIN_ROWS - 1)
    table.catalog_table(user_csv=small)
    assert not list(_own_cache.glob("user-*.npz"))
    monkeypatch.setattr(cache, "USER_FILES_KEPT", 2)
    monkeypatch.setattr(table, "USER_FILES_KEPT", 2)
    for seed in range(3):
        table.catalog_table(user_csv=_big_list(tmp_path / f"l{seed}.csv", seed=seed))
    assert len(list(_own_cache.glob("user-*.npz"))) == 2


def test_unwritable_cache_folder(tmp_path, monkeypatch):
    blocker = tmp_path / "file"
    blocker.write_text("x")
    monkeypatch.setenv("LEANSPAN_CACHE", str(blocker))  # a file: no folder inside
    path = _big_list(tmp_path / "list.csv")
    assert len(table.catalog_table(user_csv=path)) == 1200


BAD_ROWS = [  # (cells of line 700 of a 1200-row list, the one-line error the row reader gives)
    ("rectangle,45,x", "row 700: column 'd': expected a length in mm (a number), got 'x'"),
    ("rectangle,45,", "row 700: missing dimension 'd' for rectangle; expected b, d"),
    ("rectangle,45,1e9", "row 700: column 'd':"),
    ("oak,45,200", "row 700: unknown family 'oak'; expected one of"),
    ("rectangle,45,200,C99", "row 700: unknown material 'C99'"),
    ("rectangle,45,200,C24,9", "row 700: 5 cells but 4 columns"),
    ("ibeam,45,200", "row 700: missing dimension 'tw' for ibeam (no such column)"),
]


@pytest.mark.parametrize("row,message", BAD_ROWS)
def test_bad_rows_keep_their_one_line_errors(tmp_path, row, message):
    lines = ["family,b,d,material"] + ["rectangle,45,200,C24"] * 1198
    lines.insert(699, row)  # file line 700
    path = tmp_path / "bad.csv"
    path.write_text("\n".join(lines) + "\n", encoding="utf-8")
    with pytest.raises(CatalogError) as first:
        table.catalog_table(user_csv=path)
    assert str(first.value).startswith(f"{path}: {message}")
    r = subprocess.run([sys.executable, "-m", "leanspan", "catalog", "--file", str(path)],
                       capture_output=True, text=True, cwd=ROOT)
    assert r.returncode == 2 and r.stdout == ""
    assert r.stderr == f"leanspan catalog: error: {first.value}\n"


def test_select_with_a_cached_list_prints_the_same(tmp_path, _own_cache):
    """`leanspan select` on a supplier list: the second run (from the cache) prints what the first did."""
    import os

    path = _big_list(tmp_path / "list.csv")
    job = tmp_path / "job.toml"
    job.write_text('# invented job\n[beam]\nspans = ["4 m"]\n[[load]]\ncase = "dead"\ntype = "udl"\n'
                   'w = "3 kN/m"\n[search]\ncatalog = "list.csv"\n[limits]\nstress_factor = 0.6\n', encoding="utf-8")
    env = dict(os.environ, LEANSPAN_CACHE=str(_own_cache))
    runs = [subprocess.run([sys.executable, "-m", "leanspan", "select", str(job), "--json"], capture_output=True,
                           text=True, cwd=ROOT, env=env) for _ in range(2)]
    assert runs[0].returncode in (0, 1), runs[0].stderr
    assert len(list(_own_cache.glob("user-*.npz"))) == 1
    assert runs[0].stdout == runs[1].stdout and runs[0].stderr == runs[1].stderr
