"""The array read of a supplier list against references written row by row in this file.

References:

- designations: the per-row label code the families used before they were built with numpy
  string operations (kept here as it was: each size in mm by ``f"{x:.4g}"``, joined per row);
- the table: a loop over the rows of a random valid list of all eight families, each row's
  dimensions parsed here with Python's ``float`` and its properties computed one section at a
  time (``family_properties`` / ``family_stability`` on a batch of one: no shared sort order, no
  chunk, no row scatter), and a sample held to the general polygon path (shapely polygons,
  ``Section.properties``), an independent construction of the same integrals;
- the cache: the columns written and read back, against the cold read;
- the two width-profile paths (level runs shared by every section, and not): each section of a
  mixed batch computed on its own.
"""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

from leanspan.catalog import cache, table
from leanspan.catalog.user import DEFAULT_MATERIAL
from leanspan.sections.families import FAMILIES
from leanspan.sections.properties import KEYS, STABILITY_KEYS, family_properties, family_stability
from leanspan.sections.section import Section, polygon_from_family

DIMS = ("d", "b", "tw", "tf", "t", "r", "b_top", "tf_top", "b_bot", "tf_bot")


def _mm_old(x) -> str:
    """The old per-value formatting (leanspan.sections.families._mm before the change)."""
    x = float(x) * 1000.0
    return f"{x:.4g}" if abs(x) < 1e4 else f"{x:.0f}"


def _label_old(family, d):
    """The old per-row labels: one f-string per section, sizes compared as mm text."""
    t = {k: _mm_old(v) for k, v in d.items()}
    if family == "ibeam":
        if t["b_top"] == t["b_bot"] and t["tf_top"] == t["tf_bot"]:
            return f"I {t['d']}x{t['b_top']}x{t['tw']}x{t['tf_top']}"
        return f"I {t['d']}x{t['b_top']}/{t['b_bot']}x{t['tw']}x{t['tf_top']}/{t['tf_bot']}"
    form = {"rectangle": "rect {b}x{d}", "circle": "round {d}", "tube": "tube {d}x{t}",
            "box": "box {d}x{b}x{t}", "channel": "channel {d}x{b}x{tw}x{tf}",
            "tee": "tee {d}x{b}x{tw}x{tf}", "angle": "angle {d}x{b}x{t}"}[family]
    return form.format(**t)


def _random_row(rng, family):
    """Valid invented dimensions (mm) of one section, as the cells of a supplier list."""
    d = rng.uniform(50, 800)
    u = rng.uniform
    if family == "rectangle":
        dims = {"b": d * u(.2, 1), "d": d}
    elif family == "circle":
        dims = {"d": d}
    elif family == "tube":
        dims = {"d": d, "t": d * u(.02, .2)}
    elif family == "box":
        dims = {"b": d * u(.4, 1), "d": d, "t": d * u(.02, .08), "r": rng.choice([0, d * u(.005, .1)])}
    elif family == "ibeam":
        dims = {"d": d, "b": d * u(.3, 1), "tw": d * u(.015, .04), "tf": d * u(.03, .06),
                "r": rng.choice([0, d * u(.005, .04)])}
        if rng.random() < 0.3:
            dims["b_top"] = dims["b"] * u(0.5, 1.0)
        if rng.random() < 0.3:
            dims["tf_bot"] = dims["tf"] * u(0.8, 1.5)
    elif family in ("channel", "tee"):
        dims = {"d": d, "b": d * u(.3, .6), "tw": d * u(.02, .05), "tf": d * u(.03, .08),
                "r": rng.choice([0, d * u(.005, .05)])}
    else:
        dims = {"d": d, "b": d * u(.5, 1), "t": d * u(.05, .12), "r": rng.choice([0, d * u(.005, .05)])}
    return {k: rng.choice([f"{v:.0f}", f"{v:.1f}", f"{v:.3f}", f"{v:.6g}"]) for k, v in dims.items()}


def _random_list(path, n, seed):
    """An invented list of all eight families (names and materials sometimes blank); its rows."""
    rng = np.random.default_rng(seed)
    rows, lines = [], ["# invented supplier list for a test", "name,family,material," + ",".join(DIMS) + ",price"]
    materials = {"rectangle": ["C24", "", "GL28h"], "ibeam": ["S355", "S275", ""]}
    for i in range(n):
        family = str(rng.choice(sorted(FAMILIES)))
        cells = _random_row(rng, family)
        name = str(rng.choice(["", "", f"P {i}", f"item-{i}"]))
        material = str(rng.choice(materials.get(family, [DEFAULT_MATERIAL[family], ""])))
        rows.append((family, name, material, cells))
        lines.append(",".join([name, family, material] + [cells.get(k, "") for k in DIMS] + ["9.50"]))
    path.write_text("\n".join(lines) + "\n", encoding="utf-8")
    return rows


def test_designations_equal_the_per_row_labels():
    rng = np.random.default_rng(11)
    for family, fam in FAMILIES.items():
        sizes = np.array([0.045, 0.0451, 0.04500001, 0.2, 0.12345, 12.5, 0.0071, 0.0107])  # equal text, other values
        n = 400
        dims = {k: rng.choice(sizes, n) * rng.choice([1.0, 1.0, 1.7], n) for k in fam.all_keys}
        if family == "ibeam":  # flanges that print alike and differ
            dims["b_bot"] = np.where(rng.random(n) < 0.5, dims["b_top"] * (1 + 1e-9), dims["b_bot"])
        want = [_label_old(family, {k: v[i] for k, v in dims.items()}) for i in range(n)]
        assert fam.designation(dims) == want, family


@pytest.fixture
def listing(tmp_path, monkeypatch):
    monkeypatch.setenv("LEANSPAN_CACHE", str(tmp_path / "cache"))
    monkeypatch.delenv("LEANSPAN_NO_CACHE", raising=False)
    path = tmp_path / "list.csv"
    return path, _random_list(path, 1500, seed=4)


def test_table_equals_a_loop_over_rows(listing):
    path, rows = listing
    df = table.catalog_table(user_csv=path)
    assert len(df) == len(rows) and df["row"].tolist() == list(range(3, 3 + len(rows)))
    polygons = 0
    for i, (family, name, material, cells) in enumerate(rows):
        fam = FAMILIES[family]
        given = {k: np.array([float(v) * 0.001]) for k, v in cells.items()}  # mm -> m, as the reader
        dims = fam.complete(given)
        props = family_properties(family, dims)
        stab = family_stability(family, dims, props["yc"], props["zc"])
        row = df.iloc[i]
        assert (row["name"], row["family"], row["series"]) == (name or _label_old(family, {
            k: v[0] for k, v in dims.items()}), family, "user")
        assert row["material"] == (material or DEFAULT_MATERIAL[family])
        for k in DIMS:  # the same floats, NaN where the family has no such size
            assert (row[k] == dims[k][0]) if k in dims else np.isnan(row[k]), (i, k)
        size = float(props["depth"][0] + props["width"][0])
        scale = {"Iyz": float(props["I1"][0]), "zc": size, "theta": 90.0,
                 "wagner": float(props["A"][0]) * size ** 3}
        for k in (*KEYS, *STABILITY_KEYS):
            got, want = row[k], (props if k in props else stab)[k][0]
            assert got == pytest.approx(want, rel=1e-12, abs=1e-12 * scale.get(k, 0.0)), (i, family, k)
        if i % 40 == 0:  # the general polygon path: shapely polygons, Green's theorem integrals
            polygons += 1
            ref = Section.from_polygons([polygon_from_family(family, {k: v[0] for k, v in dims.items()})]).properties()
            for k in ("A", "Iz", "Iy", "Zz", "Zy", "shear_factor"):
                assert row[k] == pytest.approx(ref[k], rel=1e-9), (i, family, k)
    assert polygons >= 30


def test_cached_read_equals_the_cold_read(listing):
    path, _ = listing
    cold = table.catalog_table(user_csv=path)
    (file,) = (path.parent / "cache").glob("user-*.npz")
    hit = table.catalog_table(user_csv=path)
    pd.testing.assert_frame_equal(hit, cold, check_exact=True)
    assert hit.attrs["warnings"] == cold.attrs["warnings"]
    with np.load(file) as z:  # text as codes + distinct values, the floats as one block
        assert z["name"].dtype == np.int32 and z["_numbers"].shape == (len(table._NUMBER_COLUMNS), len(cold))


def test_text_packing_round_trips():
    rng = np.random.default_rng(2)
    alphabet = list("abc ,x\u00e9\u4e2d\U0001f600-#\t\"")
    for _ in range(200):
        values = np.array(["".join(rng.choice(alphabet, rng.integers(0, 6))) for _ in range(rng.integers(1, 30))],
                          dtype=object)
        codes, blob = cache.pack_text(values)
        assert cache.unpack_text(codes, blob).tolist() == values.tolist()
    assert cache.pack_text(np.array(["a\0b", "c"], dtype=object)) is None  # NUL: not packed
    codes, blob = cache.pack_text(np.array(["a", "b"], dtype=object))
    assert cache.unpack_text(codes + 5, blob) is None and cache.unpack_text(codes.astype(float), blob) is None


def test_a_name_with_nul_is_read_but_not_cached(tmp_path, monkeypatch):
    monkeypatch.setenv("LEANSPAN_CACHE", str(tmp_path / "cache"))
    path = tmp_path / "list.csv"
    path.write_text("name,family,b,d\n" + "".join(f"P{i}\0x,rectangle,45,{100 + i}\n" for i in range(1200)),
                    encoding="utf-8")
    df = table.catalog_table(user_csv=path)
    assert df["name"][0] == "P0\0x" and not list((tmp_path / "cache").glob("user-*.npz"))


def test_both_width_profile_paths_give_each_sections_own_numbers():
    """A batch whose level runs differ between sections (filleted and welded I's, boxes with and
    without corner radii) takes the general path; each section alone takes the shared one."""
    rng = np.random.default_rng(8)
    for family in ("ibeam", "box", "channel"):
        fam = FAMILIES[family]
        n = 300
        d = rng.uniform(0.1, 0.8, n)
        r = np.where(rng.random(n) < 0.5, 0.0, d * rng.uniform(0.005, 0.03, n))
        dims = {"d": d, "b": d * rng.uniform(0.5, 1.0, n), "r": r}
        dims.update({"t": d * rng.uniform(0.02, 0.06, n)} if family == "box" else
                    {"tw": d * rng.uniform(0.02, 0.04, n), "tf": d * rng.uniform(0.03, 0.06, n)})
        batch = family_properties(family, dims)
        for i in range(0, n, 15):
            one = family_properties(family, {k: v[i:i + 1] for k, v in fam.complete(dims).items()})
            for k in ("A", "Iz", "Zz", "Zy", "shear_factor"):
                assert batch[k][i] == pytest.approx(one[k][0], rel=1e-12), (family, i, k)
