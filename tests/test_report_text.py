"""Readable output: display units in deflection limits, the CSV headers of the listings, the
aligned table and the flag named in output-path errors."""

from __future__ import annotations

from pathlib import Path

import pytest

from leanspan.beam import parse_beam, solve
from leanspan.cli import main
from leanspan.report.beam_text import beam_text
from leanspan.report.sheet import beam_sheet_html
from leanspan.report.text import aligned_table, csv_text

ROOT = Path(__file__).resolve().parents[1]
EXAMPLES = ROOT / "data" / "examples"

# 1 in = 25.4 mm exactly (the international inch, NIST SP 811 appendix B; from memory):
# 12 mm = 12 / 25.4 in = 0.47244 in, shown to 4 significant figures
TWELVE_MM_IN_INCHES = "0.4724 in"

# an invented beam: 4 m simply supported, 2 kN/m, EI 2 MN m^2, deflection limited to 12 mm
BEAM = {"beam": {"name": "invented deflection check", "spans": ["4 m"], "EI": "2000 kN*m^2"},
        "load": [{"case": "dead", "type": "udl", "w": "2 kN/m"}],
        "combination": [{"name": "service", "factors": {"dead": 1.0}, "check": "deflection",
                         "limit": "12 mm"}]}


def _solution():
    return solve(parse_beam(BEAM, Path(".")))


def test_absolute_deflection_limit_in_us_units_on_the_beam_sheet_and_text():
    sol = _solution()
    html = beam_sheet_html(sol, units="us")
    assert TWELVE_MM_IN_INCHES in html and "12 mm" not in html
    assert "12 mm" in beam_sheet_html(sol, units="si")
    text = beam_text(sol, "us")
    assert f"({TWELVE_MM_IN_INCHES})" in text and "12 mm" not in text
    # the JSON keeps the limit as given, in SI
    assert sol.to_json()["results"]["service"]["deflection_checks"][0]["limit"] == "12 mm"


def test_absolute_deflection_limit_in_us_units_in_the_ranked_table(tmp_path, capsys):
    job = (EXAMPLES / "select-floor-joist.toml").read_text(encoding="utf-8")
    assert job.count('limit = "span/360"') == 1
    path = tmp_path / "joist-12mm.toml"
    path.write_text(job.replace('limit = "span/360"', 'limit = "12 mm"'), encoding="utf-8")
    main(["select", str(path), "--units", "us", "--top", "3"])
    out = capsys.readouterr().out
    beam_line = next(ln for ln in out.splitlines() if ln.startswith("Beam:"))
    assert f"imposed deflection (deflection, {TWELVE_MM_IN_INCHES})" in beam_line
    main(["select", str(path), "--top", "3"])
    assert "imposed deflection (deflection, 12 mm)" in capsys.readouterr().out
    # the selection sheet's deflection rows too
    sheet = tmp_path / "joist.html"
    main(["select", str(path), "--units", "us", "--report", str(sheet)])
    html = sheet.read_text(encoding="utf-8")
    assert f"({TWELVE_MM_IN_INCHES})" in html and "(12 mm)" not in html


# the headers the CSV exports have always written (they read back as user files)
CATALOG_HEADERS = {
    "si": "name,family,series,material,kind,d [mm],b [mm],tw [mm],tf [mm],t [mm],r [mm],b_top [mm],"
          "tf_top [mm],b_bot [mm],tf_bot [mm],A [mm^2],yc [mm],zc [mm],Iz [mm^4],Iy [mm^4],Iyz [mm^4],"
          "I1 [mm^4],I2 [mm^4],theta [deg],Sz_top [mm^3],Sz_bot [mm^3],Sy_left [mm^3],Sy_right [mm^3],"
          "Zz [mm^3],Zy [mm^3],rz [mm],ry [mm],depth [mm],width [mm],shear_factor [1/mm^2],E [MPa],"
          "G [MPa],density [kg/m^3],strength_bending [MPa],strength_shear [MPa],mass_per_length [kg/m]",
    "us": "name,family,series,material,kind,d [in],b [in],tw [in],tf [in],t [in],r [in],b_top [in],"
          "tf_top [in],b_bot [in],tf_bot [in],A [in^2],yc [in],zc [in],Iz [in^4],Iy [in^4],Iyz [in^4],"
          "I1 [in^4],I2 [in^4],theta [deg],Sz_top [in^3],Sz_bot [in^3],Sy_left [in^3],Sy_right [in^3],"
          "Zz [in^3],Zy [in^3],rz [in],ry [in],depth [in],width [in],shear_factor [1/in^2],E [ksi],"
          "G [ksi],density [lb/ft^3],strength_bending [ksi],strength_shear [ksi],mass_per_length [lb/ft]",
}
MATERIAL_HEADERS = {
    "si": "name,kind,group,E [MPa],G [MPa],density [kg/m^3],strength_bending [MPa],strength_shear [MPa],"
          "E_05 [MPa],rho_k [kg/m^3],fc_90 [MPa],ft_0 [MPa],fc_0 [MPa],basis,source",
    "us": "name,kind,group,E [ksi],G [ksi],density [lb/ft^3],strength_bending [ksi],strength_shear [ksi],"
          "E_05 [ksi],rho_k [lb/ft^3],fc_90 [ksi],ft_0 [ksi],fc_0 [ksi],basis,source",
}


@pytest.mark.parametrize("units", ["si", "us"])
def test_catalog_and_materials_csv_headers_are_unchanged(tmp_path, capsys, units):
    cat, mat = tmp_path / "cat.csv", tmp_path / "mat.csv"
    assert main(["catalog", "--family", "glulam", "--units", units, "--csv", str(cat), "--json"]) == 0
    assert main(["materials", "--units", units, "--csv", str(mat), "--json"]) == 0
    capsys.readouterr()
    assert cat.read_text(encoding="utf-8").splitlines()[0] == CATALOG_HEADERS[units]
    assert mat.read_text(encoding="utf-8").splitlines()[0] == MATERIAL_HEADERS[units]
    # one row checked by hand: glulam 90x120 (GL28h); A = b d = 10800 mm^2 = 16.74 in^2 (1 in = 25.4 mm)
    row = next(r for r in cat.read_text(encoding="utf-8").splitlines() if r.startswith("rect 90x120,"))
    area = float(row.split(",")[CATALOG_HEADERS[units].split(",").index(f"A [{'mm' if units == 'si' else 'in'}^2]")])
    assert area == pytest.approx(10800 if units == "si" else 10800 / 25.4**2, rel=1e-5)  # the CSV keeps 6 figures


def test_aligned_table_right_aligns_numeric_columns_only():
    text = aligned_table(["name", "mass [kg/m]", "pass"], [["rect 38x170", "2.713", "yes"],
                                                          ["R2", "-", "NO"]], rule=True)
    lines = text.splitlines()
    assert lines[1] == "-----------  -----------  ----"
    assert lines[2].endswith("2.713  yes") and lines[3] == "R2                     -  NO"
    assert all(ln == ln.rstrip() for ln in lines)


def test_csv_text_scales_columns_with_a_unit():
    # 0.0254 m = 1 in exactly (NIST SP 811; from memory)
    text = csv_text(["name", "d"], [["a", 0.0254], ["b", float("nan")]], {"d": ("in", 0.0254)})
    assert text == "name,d [in]\na,1\nb,\n"


def test_output_path_errors_name_the_flag(tmp_path, capsys):
    src = EXAMPLES / "beam-gerber.toml"
    assert main(["beam", str(src), "--report", str(tmp_path / "sheet.txt")]) == 2
    err = capsys.readouterr().err
    assert f"--report {tmp_path / 'sheet.txt'}: expected a file name ending in .html" in err
    assert main(["beam", str(src), "--plot", str(tmp_path / "no" / "b.svg")]) == 2
    err = capsys.readouterr().err
    assert f"--plot {tmp_path / 'no' / 'b.svg'}: folder" in err and "does not exist" in err
    assert main(["materials", "--csv", str(tmp_path / "no" / "m.csv")]) == 2
    assert f"--csv {tmp_path / 'no' / 'm.csv'}: folder" in capsys.readouterr().err
