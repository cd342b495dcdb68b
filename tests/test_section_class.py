"""Steel yield by thickness, section class, effective section and web shear buckling: against the
published tables (from memory, as marked), hand-worked built-in sizes and the command line."""

from __future__ import annotations

import json
import math

import numpy as np
import pytest

from leanspan.catalog.table import catalog_table
from leanspan.catalog.thickness import governing_thickness, strength_factors, thickness_steps
from leanspan.cli import main
from leanspan.select.checks.section_class import (
    INTERNAL, OUTSTAND, TUBE, Elements, class_limits, classify, effective_moduli, web_shear,
)
from leanspan.select.member import member_arrays

EPS355 = math.sqrt(235 / 355)


# -- fy by thickness ------------------------------------------------------------------------------

# EN 10025-2:2004 Table 7, minimum yield strength ReH for t <= 16, 16 < t <= 40, 40 < t <= 63 mm
# (from memory); EN 10210-1 Table A.3 for the hot-finished hollow grades (from memory); EN 1993-1-4
# Table 2.1 for stainless by product form (cold rolled strip <= 8, hot rolled strip <= 13.5, hot
# rolled plate <= 75 mm, from memory).
@pytest.mark.parametrize("grade, values", [
    ("S235", (235, 225, 215)), ("S275", (275, 265, 255)), ("S355", (355, 345, 335)),
    ("S450", (450, 430, 410)), ("S355J2H", (355, 345, 335)), ("S235JRH", (235, 225, 215)),
])
def test_yield_steps_follow_the_product_standards(grade, values):
    fy0 = thickness_steps()[grade][1][0] / 1e6
    t = np.array([0.010, 0.016, 0.0161, 0.040, 0.0401, 0.063])
    got = strength_factors(np.array([grade] * t.size), t) * fy0
    want = [values[0], values[0], values[1], values[1], values[2], values[2]]
    np.testing.assert_allclose(got, want, rtol=1e-12)


def test_stainless_steps_by_product_form_and_astm_grades_unstepped():
    got = strength_factors(np.array(["1.4301"] * 3), np.array([0.006, 0.012, 0.030])) * 230
    np.testing.assert_allclose(got, [230, 210, 210], rtol=1e-12)  # EN 1993-1-4 Table 2.1 (from memory)
    # ASTM A992 / A36 / A500: one specified minimum yield over the common sizes (from memory)
    assert list(strength_factors(np.array(["A992", "A36", "A500-B"]), np.array([0.05, 0.05, 0.02]))) == [1, 1, 1]


def test_governing_thickness_is_the_thickest_element():
    nan = np.nan
    fam = np.array(["ibeam", "channel", "tee", "box", "tube", "angle", "rectangle", "circle"])
    dims = {"tw": np.array([0.012, 0.007, 0.009, nan, nan, nan, nan, nan]),
            "tf": np.array([0.010, 0.011, 0.014, nan, nan, nan, nan, nan]),
            "tf_top": np.array([0.010, nan, nan, nan, nan, nan, nan, nan]),
            "tf_bot": np.array([0.020, nan, nan, nan, nan, nan, nan, nan]),
            "t": np.array([nan, nan, nan, 0.008, 0.005, 0.012, nan, nan]),
            "b": np.array([nan] * 6 + [0.03, nan]), "d": np.array([nan] * 6 + [0.2, 0.05])}
    # by the rule of each family (flange / web / wall / leg; a bar's smaller side, a round's diameter)
    assert list(governing_thickness(fam, dims)) == [0.020, 0.011, 0.014, 0.008, 0.005, 0.012, 0.03, 0.05]


def test_catalogue_rows_carry_the_stepped_strengths():
    df = catalog_table(series=["gen_plate_girder", "gen_steel_h"])
    row = df[df.name == "I 1000x300x10x25"].iloc[0]  # flange 25 mm: 16 < t <= 40 -> 345 MPa
    assert row.strength_thickness == pytest.approx(0.025)
    assert row.strength_bending == pytest.approx(345e6, rel=1e-12)
    # the material's fy / sqrt(3) (EN 1993-1-1 6.2.6(2)) stepped with it: 204.96 x 345 / 355
    assert row.strength_shear == pytest.approx(345e6 / math.sqrt(3), rel=1e-4)
    thin = df[df.name == "I 1000x300x10x15"].iloc[0]
    assert thin.strength_bending == pytest.approx(355e6)
    assert (df.strength_bending[df.strength_thickness > 0.040] == 335e6).all()
    timber = catalog_table(series=["glulam"], max_depth=0.3)
    assert timber.strength_thickness.isna().all()


def test_user_rows_are_stepped_too(tmp_path):
    p = tmp_path / "list.csv"
    p.write_text("family,d,b,tw,tf,material\nibeam,500,250,10,20,S275\nibeam,500,250,10,12,S275\n")
    df = catalog_table(user_csv=p)
    assert list(df.strength_bending / 1e6) == pytest.approx([265, 275])  # EN 10025-2 Table 7 (from memory)


# -- class limits --------------------------------------------------------------------------------

def _one(kind, typ, c, t, psi=1.0, tip=True):
    el = Elements(np.array([[typ]]), np.array([[c]]), np.array([[t]]), np.ones((1, 1)), np.array([[False]]),
                  np.zeros((1, 1)), np.zeros((1, 1)), np.array(["x"]))
    eps = {"steel": EPS355, "stainless": math.sqrt(235 / 230 * 200 / 210), "aluminium": math.sqrt(250 / 240)}[kind]
    ratio, l1, l2, l3, _ = class_limits(el, np.array([kind]), np.array([eps]), np.array([[psi]]), np.array([[tip]]))
    return eps, float(ratio[0, 0]), [float(x[0, 0]) for x in (l1, l2, l3)]


@pytest.mark.parametrize("typ, psi, multiples", [
    (INTERNAL, -1.0, (72, 83, 124)),   # EN 1993-1-1 Table 5.2: internal part in bending
    (INTERNAL, 1.0, (33, 38, 42)),     # internal part in compression
    (OUTSTAND, 1.0, (9, 10, 14)),      # outstand flange in compression
])
def test_steel_limits_are_table_5_2(typ, psi, multiples):
    eps, _, lims = _one("steel", typ, 0.1, 0.01, psi)
    np.testing.assert_allclose(lims, [m * eps for m in multiples], rtol=2e-3)  # 396/5.5 = 72 exactly etc.


def test_tube_stainless_and_aluminium_limits():
    eps, ratio, lims = _one("steel", TUBE, 0.5, 0.01)
    assert ratio == pytest.approx(50.0)
    np.testing.assert_allclose(lims, [50 * eps**2, 70 * eps**2, 90 * eps**2])  # EN 1993-1-1 Table 5.2
    eps, _, lims = _one("stainless", INTERNAL, 0.1, 0.01, -1.0)
    # EN 1993-1-4 Table 5.2 (A1:2015, from memory); class 3 is our fit 18.5 eps sqrt(k_sigma): 90.5 eps here
    np.testing.assert_allclose(lims, [72 * eps, 76 * eps, 90 * eps], rtol=6e-3)
    eps, _, lims = _one("stainless", OUTSTAND, 0.1, 0.01)
    np.testing.assert_allclose(lims, [9 * eps, 10 * eps, 14 * eps])
    # EN 1999-1-1 Table 6.2, buckling class A, no welds: 11 / 16 / 22 eps internal, 3 / 4.5 / 6 eps outstand;
    # beta = 0.4 c/t for an internal part in pure bending (eta = 0.70 + 0.30 psi), all from memory
    eps, beta, lims = _one("aluminium", INTERNAL, 0.1, 0.005, -1.0)
    assert beta == pytest.approx(0.4 * 20)
    np.testing.assert_allclose(lims, [11 * eps, 16 * eps, 22 * eps])
    eps, _, lims = _one("aluminium", OUTSTAND, 0.1, 0.005)
    np.testing.assert_allclose(lims, [3 * eps, 4.5 * eps, 6 * eps])


def _rows(*names, series=None):
    df = catalog_table(series=series)
    df = df[df.name.isin(names)].set_index("name").loc[list(names)].reset_index()
    return df, member_arrays(df, list(df.columns))


def test_hand_worked_classes_of_built_in_sizes():
    """By hand, S355 (fy 355 for t <= 16 mm, eps = 0.8136), sagging:
    I 300x150x7.1x10.7 r 15: flange (150 - 7.1 - 30)/2/10.7 = 5.28 < 9 eps = 7.32; web (300 - 21.4 - 30)/7.1
    = 35.0 < 72 eps = 58.6: class 1.  I 1000x300x10x15: web 970/10 = 97.0 in (83 eps, 124 eps] = (67.5, 100.9];
    flange 145/15 = 9.67 in (10 eps, 14 eps] = (8.14, 11.39]: class 3.  I 1200x300x10x15: web 117 > 100.9:
    class 4.  box 400x400x10 (S355J2H): flange (400 - 30)/10 = 37 > 42 eps = 34.2: class 4.  tube 508x10:
    d/t = 50.8 in (70, 90] eps^2 = (46.3, 59.6]: class 3."""
    df, p = _rows("I 300x150x7.1x10.7", "I 1000x300x10x15", "I 1200x300x10x15", "box 400x400x10", "tube 508x10")
    c = classify(p, 1.0)
    assert list(c.section_class) == [1, 3, 4, 4, 3]
    assert [c.element_name(k) for k in range(5)] == ["top flange", "web", "web", "top flange", "wall"]
    np.testing.assert_allclose(c.ratio, [56.45 / 10.7, 97.0, 117.0, 37.0, 50.8], rtol=1e-9)
    np.testing.assert_allclose(c.limit, [14 * EPS355, 124 * EPS355, 124 * EPS355, 42 * EPS355, 90 * EPS355**2],
                               rtol=1e-9)
    assert list(classify(p, -1.0).section_class) == [1, 3, 4, 4, 3]  # doubly symmetric: the same hogging


def test_effective_section_of_a_slender_plate_girder_web_by_hand():
    """I 1200x300x10x15 S355 (welded, r = 0: rectangles), EN 1993-1-5 4.4: flanges class 3 (kept);
    web psi = -1, k_sigma = 23.9 (Table 4.1), lam_p = (1170/10) / (28.4 eps sqrt 23.9), rho =
    (lam_p - 0.055 (3 + psi)) / lam_p^2; compressed height bc = 585, beff = rho bc, be1 = 0.4 beff from
    the compressed edge; the strip bc - beff between be1 and be2 is removed."""
    df, p = _rows("I 1200x300x10x15")
    d, b, tw, tf = 1.2, 0.3, 0.010, 0.015
    hw = d - 2 * tf
    lam = (hw / tw) / (28.4 * EPS355 * math.sqrt(23.92))
    rho = (lam - 0.055 * 2) / lam**2
    bc = hw / 2
    beff = rho * bc
    hole = bc - beff
    y_top_web = d - tf
    y_hole = y_top_web - 0.4 * beff - hole / 2
    A = 2 * b * tf + hw * tw
    I = b * d**3 / 12 - (b - tw) * hw**3 / 12  # about mid-depth
    a_h = hole * tw
    ye = (A * d / 2 - a_h * y_hole) / (A - a_h)
    Ie = I + A * (d / 2 - ye) ** 2 - (tw * hole**3 / 12 + a_h * (y_hole - ye) ** 2)
    S_hand = Ie / max(d - ye, ye)
    S, r = effective_moduli(p, 1.0)
    assert float(r[0, 2]) == pytest.approx(rho, rel=1e-9)
    assert rho == pytest.approx(0.863, abs=1e-3)
    assert float(S[0]) == pytest.approx(S_hand, rel=1e-6)  # the catalogue's exact gross Iz vs rectangles
    assert float(S[0]) < float(df.Sz_top[0])


def test_effective_section_flanges_first_then_web_by_hand():
    """I 2000x600x20x25 in S460 (fy 440 for 16 < t <= 40, EN 10025-4, from memory), sagging, by the
    EN 1993-1-5 4.4(3) chain: top flange outstands c/t = 290/25 = 11.6 > 14 eps (k_sigma 0.43, tip cut),
    then the web 1950/20 = 97.5 > class 3 with psi from the section with the effective flange."""
    df = catalog_table(series=["gen_plate_girder"], materials=["S460"])
    df = df[df.name == "I 2000x600x20x25"].reset_index(drop=True)
    p = member_arrays(df, list(df.columns))
    eps = math.sqrt(235 / 440)
    d, b, tw, tf = 2.0, 0.6, 0.020, 0.025
    cf, hw = (b - tw) / 2, d - 2 * tf
    lam_f = (cf / tf) / (28.4 * eps * math.sqrt(0.43))
    rho_f = (lam_f - 0.188) / lam_f**2
    A, I = 2 * b * tf + hw * tw, (b * d**3 - (b - tw) * hw**3) / 12
    a_f, y_f = 2 * (1 - rho_f) * cf * tf, d - tf / 2
    y1 = (A * d / 2 - a_f * y_f) / (A - a_f)
    top, bot = d - tf, tf
    psi = (bot - y1) / (top - y1)
    k = 7.81 - 6.29 * psi + 9.78 * psi**2
    lam_w = (hw / tw) / (28.4 * eps * math.sqrt(k))
    rho_w = (lam_w - 0.055 * (3 + psi)) / lam_w**2
    bc = hw / (1 - psi)
    beff = rho_w * bc
    a_w, y_w = (bc - beff) * tw, top - 0.4 * beff - (bc - beff) / 2
    holes = [(a_f, y_f, 2 * (1 - rho_f) * cf * tf**3 / 12), (a_w, y_w, tw * (bc - beff) ** 3 / 12)]
    a = sum(h[0] for h in holes)
    ye = (A * d / 2 - sum(h[0] * h[1] for h in holes)) / (A - a)
    Ie = I + A * (d / 2 - ye) ** 2 - sum(h[2] + h[0] * (h[1] - ye) ** 2 for h in holes)
    S, r = effective_moduli(p, 1.0)
    assert float(r[0, 0]) == pytest.approx(rho_f, rel=1e-9) and float(r[0, 2]) == pytest.approx(rho_w, rel=1e-9)
    assert float(S[0]) == pytest.approx(Ie / max(d - ye, ye), rel=1e-9)
    assert 0.85 < float(S[0]) / float(df.Sz_top[0]) < 1.0


def test_effective_box_flange_in_compression_by_hand():
    """box 400x400x10, S355J2H: top flange c = 370, psi = 1, k_sigma = 4, lam_p = 37 / (28.4 eps 2),
    rho = (lam_p - 0.22) / lam_p^2 (EN 1993-1-5 4.4(2)); the middle (1 - rho) c of the flange is removed."""
    df, p = _rows("box 400x400x10")
    lam = 37 / (28.4 * EPS355 * 2)
    rho = (lam - 0.22) / lam**2
    S, r = effective_moduli(p, 1.0)
    assert float(r[0, 0]) == pytest.approx(rho, rel=1e-9)
    A, yc, Iz, d = (float(df[k][0]) for k in ("A", "yc", "Iz", "depth"))
    a_h, y_h = (1 - rho) * 0.370 * 0.010, d - 0.005
    ye = (A * yc - a_h * y_h) / (A - a_h)
    Ie = Iz + A * (yc - ye) ** 2 - (a_h * 0.010**2 / 12 + a_h * (y_h - ye) ** 2)
    assert float(S[0]) == pytest.approx(Ie / max(d - ye, ye), rel=1e-9)  # webs 37 < 124 eps: fully effective


def test_aluminium_effective_thickness_by_hand():
    """box 200x200x5 of 6061-T6 (f0 240 MPa, EN 1999-1-1 Table 3.2b, from memory): eps = sqrt(250/240);
    top flange beta = (200 - 15)/5 = 37 > 22 eps (class 4, buckling class A); rho_c = 32 / (beta/eps) -
    220 / (beta/eps)^2 (EN 1999-1-1 6.1.5, from memory); the flange keeps the thickness rho_c t."""
    df, p = _rows("box 200x200x5", series=["gen_alu_box"])
    eps = math.sqrt(250 / 240)
    q = 37 / eps
    rho = 32 / q - 220 / q**2
    c = classify(p, 1.0)
    assert int(c.section_class[0]) == 4 and c.limit[0] == pytest.approx(22 * eps)
    S, r = effective_moduli(p, 1.0)
    assert float(r[0, 0]) == pytest.approx(rho, rel=1e-12)
    A, yc, Iz, d = (float(df[k][0]) for k in ("A", "yc", "Iz", "depth"))
    th = (1 - rho) * 0.005
    a_h, y_h = th * 0.185, d - 0.0025
    ye = (A * yc - a_h * y_h) / (A - a_h)
    Ie = Iz + A * (yc - ye) ** 2 - (0.185 * th**3 / 12 + a_h * (y_h - ye) ** 2)
    assert float(S[0]) == pytest.approx(Ie / max(d - ye, ye), rel=1e-9)  # webs: beta 0.4 x 37 < 22 eps


def test_web_shear_buckling_of_a_slender_plate_girder_by_hand():
    """hw = 1500, tw = 8 mm, flanges 20 mm S355 -> fy 345 (16 < t <= 40, EN 10025-2 Table 7), eps =
    sqrt(235/345); hw/tw = 187.5 > 72 eps / 1.2 (EN 1993-1-5 5.1(2)); lam_w = hw / (86.4 tw eps) (5.3(3));
    non-rigid end post, chi_w = 0.83 / lam_w (Table 5.1) (all from memory)."""
    eps = math.sqrt(235 / 345)
    p = {"family": np.array(["ibeam"]), "kind": np.array(["steel"]), "strength_bending": np.array([345e6]),
         "d": np.array([1.54]), "tw": np.array([0.008]), "tf": np.array([0.020])}
    ratio, limit, lam, chi, factor = (float(x[0]) for x in web_shear(p))
    assert ratio == pytest.approx(187.5)
    assert limit == pytest.approx(72 * eps / 1.2)
    assert lam == pytest.approx(1.5 / (86.4 * 0.008 * eps))
    assert chi == pytest.approx(0.83 / lam) and factor == chi
    assert chi == pytest.approx(0.3157, abs=1e-4)
    # hw/tw = 55: beyond 72 eps / eta = 49.5, but lam_w = 0.78 < 0.83, so chi_w = 0.83 / lam_w > 1: no reduction
    stocky = dict(p, d=np.array([0.48]))
    assert float(web_shear(stocky)[3][0]) > 1.0 and float(web_shear(stocky)[4][0]) == 1.0


# -- through the command line ---------------------------------------------------------------------

JOB = """
title = "Invented: roof beam over a loading bay"
[beam]
length = "6 m"
[[support]]
at = "0 m"
type = "pin"
[[support]]
at = "6 m"
type = "roller"
[[load]]
case = "dead"
type = "udl"
w = "{w} kN/m"
[search]
catalog = "boxes.csv"
self_weight = "none"
[limits]
stress_factor = 1.0
{extra}
"""

BOXES = "family,d,b,t,r,material\nbox,400,400,10,25,S355J2H\nbox,400,400,16,48,S355J2H\n"


def _run(tmp_path, capsys, w=40.0, extra=""):
    (tmp_path / "boxes.csv").write_text(BOXES, encoding="utf-8")
    job = tmp_path / "job.toml"
    job.write_text(JOB.format(w=w, extra=extra), encoding="utf-8")
    status = main(["select", str(job), "--json"])
    return status, json.loads(capsys.readouterr().out)


def test_class_4_box_excluded_by_default_and_checked_on_its_effective_section(tmp_path, capsys):
    status, out = _run(tmp_path, capsys)
    by = {c["name"]: c for c in out["candidates"]}
    thin, thick = by["box 400x400x10"], by["box 400x400x16"]
    assert status == 0 and out["chosen"]["name"] == "box 400x400x16"
    assert thin["utilisation"]["local_buckling"] is None and not thin["passes"]  # inf: excluded
    assert thin["governing"] == "local_buckling"
    assert thin["utilisation"]["bending"] < 1.0  # it would pass on the gross section
    assert thick["utilisation"]["local_buckling"] == pytest.approx(thick["utilisation"]["bending"], rel=1e-12)
    status, out = _run(tmp_path, capsys, extra='slender_sections = "effective"')
    assert out["chosen"]["name"] == "box 400x400x10"
    det = out["checks"]["local_buckling"]
    assert det["section_class"] == 4 and det["element"] == "top flange"
    assert det["ratio"] == pytest.approx((400 - 30) / 10) and det["limit"] == pytest.approx(42 * EPS355)
    M = 40e3 * 6**2 / 8  # wL^2/8 (statics)
    assert out["chosen"]["utilisation"]["local_buckling"] == pytest.approx(M / det["S"] / 355e6, rel=1e-3)
    assert out["chosen"]["utilisation"]["local_buckling"] > out["chosen"]["utilisation"]["bending"]
    assert out["checks"]["shear"] == {"web": True, "hw_over_t": pytest.approx(38.0),
                                      "limit": pytest.approx(72 * EPS355 / 1.2), "lam_w": None, "chi_w": None,
                                      "factor": 1.0}


def test_unknown_slender_choice_is_one_line_exit_2(tmp_path, capsys):
    (tmp_path / "boxes.csv").write_text(BOXES, encoding="utf-8")
    job = tmp_path / "job.toml"
    job.write_text(JOB.format(w=40.0, extra='slender_sections = "ignore"'), encoding="utf-8")
    assert main(["select", str(job)]) == 2
    err = capsys.readouterr().err.strip()
    assert "limits.slender_sections: expected 'exclude' or 'effective', got 'ignore'" in err and "\n" not in err


def test_sheet_names_the_class_and_the_source(tmp_path, capsys):
    (tmp_path / "boxes.csv").write_text(BOXES, encoding="utf-8")
    job = tmp_path / "job.toml"
    job.write_text(JOB.format(w=40.0, extra='slender_sections = "effective"'), encoding="utf-8")
    sheet = tmp_path / "sheet.html"
    assert main(["select", str(job), "--report", str(sheet)]) == 0
    html = sheet.read_text(encoding="utf-8")
    assert "class 4 (sagging): top flange c/t 37.0" in html and "EN 1993-1-5 4.4" in html
    assert "local buckling of flanges, webs or thin walls" not in html  # covered: off the not-checked list


def test_rows_thicker_than_the_table_keep_its_last_step_with_a_warning(tmp_path):
    p = tmp_path / "list.csv"
    p.write_text("family,d,b,tw,tf,material\nibeam,900,400,40,160,S355\n")
    df = catalog_table(user_csv=p)
    assert df.strength_bending[0] == pytest.approx(295e6)  # EN 10025-2 Table 7, 100 < t <= 150 mm (from memory)
    assert any("S355: 1 catalogue row(s) thicker than 150 mm" in w for w in df.attrs["warnings"])


def test_results_are_kept_only_for_read_only_arrays():
    """memoised keeps a result for read-only (shared) arrays, keyed by their identity; writable
    arrays, or other arrays with equal values, are worked out afresh (a counter is the reference)."""
    from leanspan.select.checks.section_class import memoised

    calls = []

    def compute():
        calls.append(1)
        return len(calls)

    a = np.arange(3.0)
    assert memoised({"x": a}, ("x",), "t", compute) == 1
    assert memoised({"x": a}, ("x",), "t", compute) == 2  # writable: not kept
    a.flags.writeable = False
    assert memoised({"x": a}, ("x",), "t", compute) == 3
    assert memoised({"x": a}, ("x",), "t", compute) == 3  # kept
    assert memoised({"x": a}, ("x",), "other", compute) == 4  # another question
    b = np.arange(3.0)
    b.flags.writeable = False
    assert memoised({"x": b}, ("x",), "t", compute) == 5  # other arrays, even with equal values
