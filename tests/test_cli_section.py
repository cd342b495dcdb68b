"""The `leanspan section` command: output contract and one-line errors with exit status 2."""

from __future__ import annotations

import json
import subprocess
import sys

import pytest

from leanspan.cli import main

CONTRACT_KEYS = ("A yc zc Iz Iy Iyz I1 I2 theta Sz_top Sz_bot Sy_left Sy_right Zz Zy rz ry "
                 "depth width").split()


def run_cli(capsys, *argv):
    status = main(list(argv))
    out, err = capsys.readouterr()
    return status, out, err


def write(tmp_path, text, name="s.toml"):
    p = tmp_path / name
    p.write_text(text)
    return str(p)


RECT = 'units = "mm"\n[[part]]\nshape = "rectangle"\nb = 100\nd = 200\n'


def test_json_has_contract_keys_and_values(tmp_path, capsys):
    status, out, _ = run_cli(capsys, "section", write(tmp_path, RECT), "--json")
    data = json.loads(out)
    assert status == 0
    assert all(k in data for k in CONTRACT_KEYS)
    # mechanics of materials: I = b d^3 / 12, S = b d^2 / 6 for a rectangle
    assert data["Iz"] == pytest.approx(0.1 * 0.2**3 / 12, rel=1e-12)
    assert data["Sz_top"] == pytest.approx(0.1 * 0.2**2 / 6, rel=1e-12)
    assert "EIz" not in data  # no materials given


def test_composite_keys_with_materials(tmp_path, capsys):
    text = RECT.replace('shape = "rectangle"', 'shape = "rectangle"\nmaterial = "S355"')
    status, out, _ = run_cli(capsys, "section", write(tmp_path, text), "--json")
    data = json.loads(out)
    # EN 1993-1-1 3.2.6: E = 210000 MPa for structural steel
    assert data["EIz"] == pytest.approx(210e9 * 0.1 * 0.2**3 / 12, rel=1e-12)
    # EN 1991-1-1 Table A.4: steel 77-78.5 kN/m^3, i.e. about 7850 kg/m^3 (from memory)
    assert data["mass_per_length"] == pytest.approx(7850 * 0.02, rel=0.01)


def test_readable_output_in_us_units(tmp_path, capsys):
    status, out, _ = run_cli(capsys, "section", write(tmp_path, RECT), "--units", "us")
    assert status == 0 and "in⁴" in out


BAD = {
    "broken toml": ("[[part]\nshape=", "broken TOML"),
    "unknown shape": ('[[part]]\nshape = "hexagon"\nb = "1 m"\n', "unknown shape 'hexagon'"),
    "missing dimension": ('[[part]]\nshape = "rectangle"\nb = "100 mm"\n', "part[1].d: missing"),
    "negative dimension": ('[[part]]\nshape = "rectangle"\nb = "-100 mm"\nd = "1 m"\n', "part[1].b"),
    "wrong unit kind": ('[[part]]\nshape = "rectangle"\nb = "100 kN"\nd = "1 m"\n', "expected a length"),
    "bare number without units": ('[[part]]\nshape = "rectangle"\nb = 100\nd = 200\n', "has no unit"),
    "self-intersecting": ('units = "mm"\n[[part]]\nshape = "polygon"\npoints = [[0,0],[100,100],[100,0],[0,100]]\n',
                          "self-intersection at z=50 mm, y=50 mm"),
    "zero area": ('units = "mm"\n[[part]]\nshape = "polygon"\npoints = [[0,0],[100,0],[200,0]]\n', "zero area"),
    "hole outside": ('units = "mm"\n[[part]]\nshape = "polygon"\npoints = [[0,0],[100,0],[100,100],[0,100]]\n'
                     'holes = [[[200,200],[210,200],[210,210]]]\n', "hole is not inside its outline"),
    "overlapping parts": (RECT + RECT, "part[1] and part[2] overlap"),
    "impossible flange": ('units = "mm"\n[[part]]\nshape = "ibeam"\nd = 100\nb = 100\ntw = 5\ntf = 60\n',
                          "tf_top + tf_bot + 2 r < d"),
    "unknown material": (RECT.replace('shape = "rectangle"', 'shape = "rectangle"\nmaterial = "S999"'), "S999"),
    "unknown key": (RECT + 'colour = "red"\n', "part[1].colour: unknown key"),
    "hole misses": (RECT + '[[hole]]\nshape = "circle"\nd = 10\nat = [500, 500]\n', "hole[1]: does not cut any part"),
}


@pytest.mark.parametrize("case", sorted(BAD))
def test_bad_input_is_one_line_exit_2(tmp_path, capsys, case):
    text, expected = BAD[case]
    status, out, err = run_cli(capsys, "section", write(tmp_path, text))
    assert status == 2
    assert expected in err
    assert err.count("\n") == 1 and "Traceback" not in err


def test_missing_file(capsys):
    status, _, err = run_cli(capsys, "section", "/nonexistent/x.toml")
    assert status == 2 and "file not found" in err


def test_plot_is_written_atomically_and_refuses_input(tmp_path, capsys):
    path = write(tmp_path, RECT)
    out_svg = tmp_path / "s.svg"
    status, _, _ = run_cli(capsys, "section", path, "--plot", str(out_svg))
    assert status == 0 and out_svg.read_text().startswith("<?xml")
    status, _, err = run_cli(capsys, "section", path, "--plot", path.replace(".toml", ".txt"))
    assert status == 2 and ".svg, .png or .pdf" in err
    assert sorted(p.name for p in tmp_path.iterdir()) == ["s.svg", "s.toml"]  # no temporary left


def test_real_process_exit_status(tmp_path):
    path = write(tmp_path, "[[part]\n")
    proc = subprocess.run([sys.executable, "-m", "leanspan", "section", path], capture_output=True, text=True)
    assert proc.returncode == 2
    assert proc.stderr.startswith("leanspan section: error:") and "Traceback" not in proc.stderr


def test_beam_report_is_written(tmp_path, capsys):
    """`leanspan beam --report` writes a self-contained sheet that carries the caution."""
    from pathlib import Path


    job = Path(__file__).resolve().parents[1] / "data" / "examples" / "beam-three-span.toml"
    sheet = tmp_path / "beam.html"
    status, out, _ = run_cli(capsys, "beam", str(job), "--report", str(sheet))
    text = sheet.read_text()
    assert status == 0 and "calculation sheet written" in out
    import re

    assert "licensed" in text.replace("\n", " ")
    assert not re.search(r"""(src|href)\s*=\s*["']?https?:""", text)  # no network requests


def test_torsion_uses_the_gross_section(tmp_path, capsys):
    """Bolt holes that cut the flanges into strips are ignored for J, Cw and the shear centre
    (common practice: torsion and warping constants are gross-section values)."""
    from pathlib import Path

    src = Path(__file__).resolve().parents[1] / "data" / "examples" / "section-bolted-girder.toml"
    text = src.read_text()
    no_holes = write(tmp_path, text.split("[[hole]]")[0], "gross.toml")
    status, out, _ = run_cli(capsys, "section", str(src), "--torsion", "--json")
    holed = json.loads(out)
    status2, out2, _ = run_cli(capsys, "section", no_holes, "--torsion", "--json")
    gross = json.loads(out2)
    assert status == status2 == 0
    for key in ("J", "Cw", "ys", "zs"):
        assert holed[key] == pytest.approx(gross[key], rel=1e-12, abs=1e-12)
    assert holed["A"] < gross["A"]  # bending properties keep the holes
    # shear centre of a mono-symmetric I (thin-walled theory, e.g. Timoshenko & Gere, Theory of
    # elastic stability): e = h I_top / (I_top + I_bot) from the bottom flange, I of each flange
    # about the web axis; top = 200x16 flange (centre y 492) + 240x12 cover plate (centre 506)
    i_f, i_p, i_b = 16 * 200**3 / 12, 12 * 240**3 / 12, 20 * 260**3 / 12
    y_top = (i_f * 492 + i_p * 506) / (i_f + i_p)
    ys = 10 + (y_top - 10) * (i_f + i_p) / (i_f + i_p + i_b)
    assert holed["ys"] * 1000 == pytest.approx(ys, rel=0.02)  # the web and fillets shift it slightly


def test_composite_torsion_reports_gj_and_its_reference(capsys):
    """The flitch beam: J is GJ / G of part 1 (C24); GJ is printed and the reference named."""
    from pathlib import Path

    src = Path(__file__).resolve().parents[1] / "data" / "examples" / "section-flitch.toml"
    status, out, _ = run_cli(capsys, "section", str(src), "--torsion")
    assert status == 0
    assert "Torsional stiffness GJ" in out and "transformed to part 1's material, C24" in out
    assert "shear factor is from the geometry alone" in out
    status, js, _ = run_cli(capsys, "section", str(src), "--torsion", "--json")
    # C24 shear modulus 690 MPa (EN 338 mean G, from memory): GJ = 690e6 * J
    from leanspan.catalog.materials import get_material

    G = get_material("C24").G
    line = [ln for ln in out.splitlines() if "Torsional stiffness GJ" in ln][0]
    assert float(line.split()[-2]) == pytest.approx(G * json.loads(js)["J"] / 1e3, rel=1e-3)  # kN·m²
