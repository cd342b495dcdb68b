"""The column-wise reader of user catalogues (cells split all at once by ``read_grid``) gives
exactly what the row-by-row reader gives (cells from ``read_table``), and leaves every file with
a bad cell to the row reader (which names the row)."""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pytest

from leanspan.catalog import user
from leanspan.catalog.csvfile import read_grid, read_table
from leanspan.catalog.materials import materials_table
from leanspan.errors import CatalogError

ROOT = Path(__file__).resolve().parents[1]

EXAMPLES = Path(__file__).resolve().parents[1] / "data" / "examples"


def _both(path):
    header, rows = read_table(path)
    names = [h for h, _ in header]
    dim_keys = {k for f in user.FAMILIES.values() for k in f.all_keys}
    col = {}
    for j, (name, unit) in enumerate(header):
        if name in dim_keys:
            col[name] = (j, "dim", user.column_factor(unit or "mm", "length", "c"))
        elif name in user.TABULATED:
            kind, default = user.TABULATED[name]
            col[name] = (j, "tab", user.column_factor(unit or default, kind, "c"))
        elif name in ("family", "name", "material"):
            col[name] = (j, "text", None)
    assert "family" in names
    table = materials_table()
    split = read_grid(path.read_text(encoding="utf-8"), path)
    assert split is not None and split[0] == header
    _, lines, grid = split
    return user._by_columns(path, lines, grid, col, table), (lambda: user._by_rows(path, header, rows, col, table))


def _same(a, b):
    (ba, ra, da), (bb, rb, db) = a, b
    assert list(ba) == list(bb) and da == db
    for f in ba:
        for attr in ("names", "materials", "lines"):
            assert list(getattr(ba[f], attr)) == list(getattr(bb[f], attr)), (f, attr)
        assert set(ra[f]) == set(rb[f]) and set(ba[f].tabulated) == set(bb[f].tabulated)
        for k in ra[f]:
            np.testing.assert_array_equal(np.asarray(ra[f][k]), np.asarray(rb[f][k]))
        for k in ba[f].tabulated:
            np.testing.assert_array_equal(np.asarray(ba[f].tabulated[k]), np.asarray(bb[f].tabulated[k]))


def test_the_example_supplier_list(tmp_path):
    fast, slow = _both(EXAMPLES / "supplier-list.csv")
    assert fast is not None
    _same(fast, slow())


def test_random_valid_lists(tmp_path):
    rng = np.random.default_rng(7)
    lines = ["name,family,material,d [in],b,tw,tf,r,t,Iz [mm^4]"]
    for i in range(300):
        if rng.random() < 0.5:
            lines.append(f",rectangle,{rng.choice(['C24', 'c 24', ''])},{rng.uniform(4, 12):.3f},"
                         f"{rng.integers(38, 120)},,,,,{'' if rng.random() < 0.5 else rng.uniform(1e6, 1e8):}")
        else:
            d = rng.uniform(6, 20)
            lines.append(f"P{i},ibeam,S355,{d:.2f},{rng.integers(80, 200)},{rng.uniform(4, 9):.1f},"
                         f"{rng.uniform(8, 14):.1f},{rng.choice(['', '8'])},,")
    path = tmp_path / "list.csv"
    path.write_text("\n".join(lines) + "\n", encoding="utf-8")
    fast, slow = _both(path)
    assert fast is not None
    _same(fast, slow())


@pytest.mark.parametrize("row", ["rectangle,x,200", "rectangle,45,", "rectangle,45,1e9", "oak,45,200",
                                 "rectangle,45,200,C99", "rectangle,45,nan"])
def test_a_bad_cell_goes_to_the_row_reader(tmp_path, row):
    path = tmp_path / "bad.csv"
    path.write_text("family,b,d,material\nrectangle,45,200,C24\n" + row + "\n", encoding="utf-8")
    fast, slow = _both(path)
    assert fast is None
    with pytest.raises(CatalogError, match="row 3"):
        slow()


def test_defaulted_material_notes_in_row_order(tmp_path):
    """Two families with blank materials, the later family's blank first: the notes agree."""
    path = tmp_path / "list.csv"
    path.write_text("family,b,d,material\nrectangle,45,200,C24\nbox,100,100,\nrectangle,45,220,\n"
                    "box,120,120,\n".replace("box,100,100,", "circle,,60,").replace("box,120,120,", "circle,,70,"),
                    encoding="utf-8")
    fast, slow = _both(path)
    assert fast is not None
    _same(fast, slow())


def test_quote_free_reader_equals_the_csv_module():
    """The quote-free fast path of the CSV reader gives the csv module's rows and line numbers
    (the standard library's csv module is the reference)."""
    import csv
    import io

    from leanspan.catalog.csvfile import _lines

    def reference(text):
        reader, out = csv.reader(io.StringIO(text)), []
        for cells in reader:
            cells = [c.strip() for c in cells]
            if any(cells) and not cells[0].startswith("#"):
                out.append((reader.line_num, cells))
        return out

    texts = ["a,b\n\n  ,  ,\n# c\n 1 , 2 \n\t3,4\r\n5,6", "a,b\x0c,c\n1,2\n", "x\n,\n,,1\n  # note\n,#x\n"]
    for path in (ROOT / "data" / "examples").glob("*.csv"):
        texts.append(path.read_text(encoding="utf-8"))
    for text in texts:
        assert '"' not in text
        assert list(_lines(text, "t.csv", ValueError)) == reference(text)
