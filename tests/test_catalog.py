"""The built-in catalogue: series sizes, spot checks against the section calculator and
handbook values, filters and material pairing, user catalogues, the cache and the CLI."""

import json
import math
import subprocess
import sys

import numpy as np
import pytest

from leanspan.catalog import table as table_mod
from leanspan.catalog.series import SERIES
from leanspan.catalog.table import catalog_table, dims_of, row_dims
from leanspan.errors import CatalogError


@pytest.fixture(autouse=True, scope="module")
def _private_cache(tmp_path_factory):
    """One cache folder for this module (also seen by the CLI subprocesses), not the user's."""
    with pytest.MonkeyPatch.context() as mp:
        mp.setenv("XDG_CACHE_HOME", str(tmp_path_factory.mktemp("cache")))
        table_mod._builtin_columns.cache_clear()
        yield
    table_mod._builtin_columns.cache_clear()


@pytest.fixture(scope="module")
def full():
    return table_mod.builtin_frame(use_cache=False)


def _row(df, name, series=None):
    sub = df[(df.name == name) & ((df.series == series) if series else True)]
    assert len(sub) == 1, (name, len(sub))
    return sub.iloc[0]


def test_series_sizes_and_names(full):
    assert len(full) >= 2000
    counts = full.groupby("series").size()
    assert set(counts.index) == set(SERIES) and (counts >= 20).all()
    for s, sub in full.groupby("series"):
        assert sub.name.is_unique, s
    assert not full.name.str.contains(r"IPE|HE[ABM]|UB|UC|W\d", regex=True).any()


@pytest.mark.parametrize("series", sorted(SERIES))
def test_rows_equal_the_section_calculator(full, series):
    """One row per series (the middle one) through leanspan.sections.section.Section."""
    from leanspan.sections.section import Section, polygon_from_family

    sub = full[full.series == series]
    row = sub.iloc[len(sub) // 2]
    sec = Section.from_polygons([polygon_from_family(row.family, row_dims(row))])
    p = sec.properties()
    for k in ("A", "Iz", "Iy", "Sz_top", "Zz", "Zy", "shear_factor"):
        assert math.isclose(float(p[k]), row[k], rel_tol=1e-9), (series, k)


def test_rectangles_and_tubes_closed_form(full):
    # b d^3 / 12 and pi (D^4 - d^4) / 64 (mechanics of materials, any textbook)
    rect = full[full.family == "rectangle"]
    assert np.allclose(rect.Iz, rect.b * rect.d**3 / 12, rtol=1e-12)
    tube = full[full.family == "tube"]
    assert np.allclose(tube.Iz, np.pi * (tube.d**4 - (tube.d - 2 * tube.t) ** 4) / 64, rtol=1e-6)


# Handbook values for sections whose dimensions are a standard size (from memory):
# 300x150x7.1x10.7 r15 narrow-flange beam: A 53.8 cm2, I 8356 cm4, Wel 557 cm3, Wpl 628 cm3, 42.2 kg/m;
# 300x300x11x19 r27 wide-flange: A 149.1 cm2, I 25170 cm4, Wel 1678 cm3, Wpl 1869 cm3 (EN 10365 sizes);
# CHS 114.3x6.3: A 21.4 cm2, I 313 cm4 (EN 10210-2); cold-formed SHS 100x100x5: A 18.4 cm2, I 271 cm4
# (EN 10219-2); angle 100x100x10: A 19.2 cm2, I 177 cm4 (EN 10056-1; ours has no toe radius, so a
# little more area far out on the legs: tolerance 2.5 %).
HANDBOOK = [
    ("I 300x150x7.1x10.7", "gen_steel_i", {"A": 53.8e-4, "Iz": 8356e-8, "Sz_top": 557e-6, "Zz": 628e-6,
                                              "mass_per_length": 42.2}, 0.005),
    ("I 300x300x11x19", "gen_steel_h", {"A": 149.1e-4, "Iz": 25170e-8, "Sz_top": 1678e-6, "Zz": 1869e-6},
     0.005),
    ("tube 114.3x6.3", "gen_chs", {"A": 21.4e-4, "Iz": 313e-8}, 0.005),
    ("box 100x100x5", "gen_shs_rhs", {"A": 18.4e-4, "Iz": 271e-8}, 0.005),
    ("angle 100x100x10", "gen_angle_equal", {"A": 19.2e-4, "Iz": 177e-8}, 0.025),
]


@pytest.mark.parametrize("name,series,values,tol", HANDBOOK)
def test_rolled_like_rows_match_handbook(name, series, values, tol):
    row = _row(catalog_table(series=series), name)
    for k, v in values.items():
        assert math.isclose(row[k], v, rel_tol=tol), (name, k, row[k], v)


def test_dressed_lumber_sizes():
    # dressed dry sizes: nominal 2x8 is 1-1/2 x 7-1/4 in, 2x4 is 1-1/2 x 3-1/2 in (trade fact)
    df = catalog_table(series="sawn_dressed_in")
    r = _row(df, "rect 1.5x7.25in (nominal 2x8)")
    assert math.isclose(r.b, 0.0381) and math.isclose(r.d, 0.18415)
    assert "rect 1.5x3.5in (nominal 2x4)" in set(df.name)


def test_filters_and_material_pairing():
    df = catalog_table(families=["ibeam"], materials=["S275", "6082-T6"], max_depth=0.4,
                       min_width=0.1)
    assert set(df.series) == {"gen_steel_i", "gen_steel_h", "gen_plate_girder", "gen_alu_i"}
    assert set(df[df.series == "gen_alu_i"].material) == {"6082-T6"}
    assert set(df[df.series != "gen_alu_i"].material) == {"S275"}
    assert (df.depth <= 0.4 * (1 + 1e-4)).all() and (df.width >= 0.1 * (1 - 1e-4)).all()
    steel = df[df.material == "S275"]
    assert np.allclose(steel.mass_per_length, steel.A * 7850)
    # EN 10025-2 Table 7 (from memory): 275 MPa up to 16 mm, 265 up to 40 mm, 255 up to 63 mm
    t = steel.strength_thickness
    assert (steel.strength_bending == np.select([t <= 0.016, t <= 0.040], [275e6, 265e6], 255e6)).all()
    timber = catalog_table(materials="C16")
    assert set(timber.series) == {"sawn_metric", "sawn_dressed_in"}
    with pytest.raises(CatalogError, match="unknown family 'wood'"):
        catalog_table(families="wood")


def test_dims_of_round_trips(full):
    d = dims_of(full)
    assert set(d) == set(full.family)
    i = full[full.family == "ibeam"]
    assert np.array_equal(d["ibeam"]["tw"], i.tw.to_numpy())
    assert np.array_equal(d["ibeam"]["b_top"], i.b.to_numpy())


def test_cache_is_written_reused_and_survives_damage(tmp_path, monkeypatch):
    monkeypatch.setenv("XDG_CACHE_HOME", str(tmp_path))
    table_mod._builtin_columns.cache_clear()
    first = catalog_table()
    path = table_mod.cache_file()
    assert path.is_file() and str(path).startswith(str(tmp_path))
    table_mod._builtin_columns.cache_clear()
    again = catalog_table()
    assert again.equals(first)
    path.write_bytes(b"not a cache")
    table_mod._builtin_columns.cache_clear()
    assert catalog_table().equals(first)
    table_mod._builtin_columns.cache_clear()


def test_unwritable_cache_folder_still_works(tmp_path, monkeypatch):
    blocker = tmp_path / "file"
    blocker.write_text("x")
    monkeypatch.setenv("XDG_CACHE_HOME", str(blocker))  # a file: no folder can be made inside
    table_mod._builtin_columns.cache_clear()
    assert len(catalog_table(series="gen_chs")) >= 20
    table_mod._builtin_columns.cache_clear()


USER = "family,name,material,d,b,tw,tf,t,r,Iz [cm^4]\n"


def test_user_catalogue_and_tabulated_warnings(tmp_path):
    p = tmp_path / "list.csv"
    p.write_text(USER + "ibeam,,S275,300,150,7.1,10.7,,15,8356\n"
                        "rectangle,my joist,,200,47,,,,,3300\n")
    df = catalog_table(user_csv=p)
    assert list(df.name) == ["I 300x150x7.1x10.7", "my joist"] and list(df.row) == [2, 3]
    assert list(df.material) == ["S275", "C24"]
    warns = df.attrs["warnings"]
    # row 3 has no material: the assumed grade is announced, never silent
    assert "no material given in row(s) 3: assumed C24 (rectangle)" in warns[0]
    # 47 x 200^3 / 12 = 3133 cm4, the file says 3300 (+5.3 %): one warning, for row 3 only
    tab = [w for w in warns if "tabulated" in w]
    assert len(warns) == 2 and len(tab) == 1 and "row 3 (my joist)" in tab[0] and "+5.3 %" in tab[0]
    both = catalog_table(user_csv=p, builtin=True, materials="S355")
    assert "user" in set(both.series) and set(both.material) == {"S355"}


@pytest.mark.parametrize("line,match", [
    ("ibeam,,,300,150,x,10.7,,15,", r"list\.csv: row 2: column 'tw': expected a length in mm"),
    ("ibeam,,,300,150,,10.7,,15,", r"list\.csv: row 2: missing dimension 'tw'"),
    ("hexagon,,,300,150,,,,,", r"list\.csv: row 2: unknown family 'hexagon'"),
    ("box,,,100,100,,,60,,", r"list\.csv: row 2: impossible box"),
    ("rectangle,,,100,50,5,,,,", r"list\.csv: row 2: rectangle has no dimension 'tw'"),
    ("rectangle,,C99,100,50,,,,,", r"list\.csv: row 2: unknown material 'C99'"),
])
def test_bad_user_rows(tmp_path, line, match):
    p = tmp_path / "list.csv"
    p.write_text(USER + line + "\n")
    with pytest.raises(CatalogError, match=match):
        catalog_table(user_csv=p)


def _cli(*args):
    return subprocess.run([sys.executable, "-m", "leanspan", *args], capture_output=True, text=True)


def test_cli_bad_user_row_exit_2(tmp_path):
    p = tmp_path / "list.csv"
    p.write_text(USER + "rectangle,,,100,50,,,,,\nibeam,,,300,150,7,abc,,15,\n")
    r = _cli("catalog", "--file", str(p))
    assert r.returncode == 2 and r.stdout == ""
    assert r.stderr.count("\n") == 1 and "list.csv: row 3" in r.stderr and "Traceback" not in r.stderr


def test_cli_catalog_json_and_csv_round_trip(tmp_path):
    out = tmp_path / "out.csv"
    r = _cli("catalog", "--family", "gen_chs,glulam", "--max-depth", "200 mm", "--json", "--csv", str(out))
    assert r.returncode == 0, r.stderr
    rows = json.loads(r.stdout)
    assert {x["series"] for x in rows} == {"gen_chs", "glulam"}
    assert all({"name", "family", "dims", "material", "Iz", "mass_per_length"} <= set(x) for x in rows)
    # the written CSV reads back as a user catalogue; its tabulated values agree (no warnings)
    back = _cli("catalog", "--file", str(out), "--json")
    assert back.returncode == 0, back.stderr
    assert "tabulated" not in back.stderr
    again = json.loads(back.stdout)
    assert [x["name"] for x in again] == [x["name"] for x in rows]
    assert all(math.isclose(a["Iz"], b["Iz"], rel_tol=1e-5) for a, b in zip(again, rows))


def test_cli_example_supplier_list():
    r = _cli("catalog", "--file", "data/examples/supplier-list.csv")
    assert r.returncode == 0 and "10 sections" in r.stdout
    assert "row 14 (channel 200x75x8.5x11.5): tabulated Iz" in r.stderr
