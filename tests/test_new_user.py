"""What a new user trips over, each point through the command line.

Catalogue names as beam sections, loads per area, strength and serviceability envelopes
apart, round-off extremes, honest rounding, and the small things (labels, messages,
warnings, pattern vectors, the section sheet, the cache). And the README's example
commands run as written.
"""

from __future__ import annotations

import json
import re
import shutil
from pathlib import Path

import pytest

from leanspan.cli import main

ROOT = Path(__file__).resolve().parents[1]
EXAMPLES = ROOT / "data" / "examples"
# C24: E0,mean = 11 kN/mm^2, mean density 420 kg/m^3 (EN 338 Table 1)
E_C24, RHO_C24, G = 11e9, 420.0, 9.80665


def _json(capsys, argv, status=0):
    assert main(argv) == status
    return json.loads(capsys.readouterr().out)


def _write(tmp_path, name, text):
    path = tmp_path / name
    path.write_text(text, encoding="utf-8")
    return path


SPAN = """
[beam]
spans = ["4 m"]
section = "{section}"
{extra}
[[load]]
case = "imposed"
type = "udl"
w = "{w}"
{spacing}
"""


# 1. catalogue names in beam jobs -------------------------------------------------------------
def test_beam_section_by_catalogue_name(tmp_path, capsys):
    job = _write(tmp_path, "b.toml", SPAN.format(section="rect 47x200", extra='material = "C24"',
                                                 w="2 kN/m", spacing=""))
    out = _json(capsys, ["beam", str(job), "--json"])
    EI = E_C24 * 0.047 * 0.2**3 / 12
    # mid-span deflection 5 w L^4 / (384 EI) (beam-formula handbooks)
    assert out["results"]["imposed"]["v_min"]["value"] == pytest.approx(-5 * 2e3 * 4**4 / (384 * EI), rel=1e-9)


def test_beam_section_by_supplier_list_name(tmp_path, capsys):
    shutil.copy(EXAMPLES / "supplier-list.csv", tmp_path / "supplier.csv")
    job = _write(tmp_path, "b.toml", SPAN.format(section="rect 45x195", extra='catalog = "supplier.csv"',
                                                 w="2 kN/m", spacing=""))
    out = _json(capsys, ["beam", str(job), "--json"])
    capsys.readouterr()
    EI = E_C24 * 0.045 * 0.195**3 / 12  # the list's row is C24
    assert out["results"]["imposed"]["v_min"]["value"] == pytest.approx(-5 * 2e3 * 4**4 / (384 * EI), rel=1e-9)


def test_unknown_catalogue_name_is_one_line(tmp_path, capsys):
    job = _write(tmp_path, "b.toml", SPAN.format(section="rect 47x20", extra='material = "C24"',
                                                 w="2 kN/m", spacing=""))
    assert main(["beam", str(job)]) == 2
    err = capsys.readouterr().err.strip()
    assert "\n" not in err and "neither a section file nor a catalogue name" in err and "near names" in err


# 2. area loads --------------------------------------------------------------------------------
def test_udl_per_area_with_spacing(tmp_path, capsys):
    job = _write(tmp_path, "b.toml", SPAN.format(section="rect 47x200", extra='material = "C24"',
                                                 w="1.5 kN/m^2", spacing='spacing = "400 mm"'))
    out = _json(capsys, ["beam", str(job), "--json"])
    # w = 1.5 kN/m^2 x 0.4 m = 0.6 kN/m; each reaction w L / 2 (statics)
    assert [r["force"] for r in out["results"]["imposed"]["reactions"]] == pytest.approx([1200.0, 1200.0], rel=1e-12)


def test_spacing_needs_a_load_per_area(tmp_path, capsys):
    job = _write(tmp_path, "b.toml", SPAN.format(section="rect 47x200", extra='material = "C24"',
                                                 w="1.5 kN/m", spacing='spacing = "400 mm"'))
    assert main(["beam", str(job)]) == 2
    assert "load[1].w: expected a stress or pressure" in capsys.readouterr().err


# 3. strength and serviceability apart ---------------------------------------------------------
def test_envelopes_per_kind(capsys, tmp_path):
    out = _json(capsys, ["beam", str(EXAMPLES / "beam-three-span.toml"), "--json"])
    res = out["results"]
    kinds = {n: r.get("check") for n, r in res.items() if r["kind"] == "combination"}
    assert set(kinds.values()) == {"strength", "deflection"}
    for check in ("strength", "deflection"):
        env = res[f"envelope_{check}"]
        names = [n for n, k in kinds.items() if k == check]
        assert env["v_min"]["value"] == pytest.approx(min(res[n]["v_min"]["value"] for n in names), rel=1e-12)
        assert env["M_max"]["value"] == pytest.approx(max(res[n]["M_max"]["value"] for n in names), rel=1e-12)
    sheet = tmp_path / "s.html"
    assert main(["beam", str(EXAMPLES / "beam-three-span.toml"), "--report", str(sheet)]) == 0
    assert "envelope (strength combinations)" in sheet.read_text(encoding="utf-8")


# 4. trivial extremes ----------------------------------------------------------------------------
CANTILEVER = """
[beam]
length = "2.5 m"
{member}
[[support]]
at = "0 m"
type = "fixed"
[[load]]
case = "dead"
type = "udl"
w = "1.5 kN/m"
[[combination]]
name = "ULS"
factors = {{dead = 1.35}}
{search}
"""


def test_cantilever_free_end_moment_is_zero(tmp_path, capsys):
    beam = _write(tmp_path, "c.toml", CANTILEVER.format(member='EI = "2000 kN*m^2"', search=""))
    out = _json(capsys, ["beam", str(beam), "--json"])
    uls = out["results"]["ULS"]
    # a cantilever under gravity never sags: M max = 0 at the tip; M min = -w L^2 / 2 (statics)
    assert uls["M_max"]["value"] == 0.0
    assert uls["M_min"]["value"] == pytest.approx(-1.35 * 1.5e3 * 2.5**2 / 2, rel=1e-12)
    job = _write(tmp_path, "s.toml", CANTILEVER.format(member="", search='[search]\nfamilies = ["gen_steel_i"]\n'
                                                       'self_weight = "none"\n[limits]\nstress_factor = 0.6'))
    sheet = tmp_path / "s.html"
    out = _json(capsys, ["select", str(job), "--json", "--report", str(sheet)])
    assert out["chosen"]["demands"]["M_max"] == 0.0
    assert "M max" not in re.sub(r"M max / Sz", "", sheet.read_text(encoding="utf-8"))


# 5. honest rounding ---------------------------------------------------------------------------
def test_rounding_up_is_said(tmp_path, capsys):
    sheet = tmp_path / "d.html"
    assert main(["demo", "--report", str(sheet)]) == 0
    assert "rounded up to 3 decimals" in capsys.readouterr().out
    assert "rounded up to 3 decimals" in sheet.read_text(encoding="utf-8")


# 6. the small things ----------------------------------------------------------------------------
def test_failure_ranks_are_explained(capsys):
    assert main(["demo"]) == 0
    assert "ranks count every candidate screened" in capsys.readouterr().out


def test_shear_factor_label_is_whole(capsys):
    assert main(["section", str(EXAMPLES / "section-flitch.toml")]) == 0
    assert "Shear factor (τ max = V × factor)" in capsys.readouterr().out


def test_no_pass_message_says_times(tmp_path, capsys):
    job = _write(tmp_path, "j.toml", '[beam]\nspans = ["9 m"]\n[[load]]\ncase = "dead"\ntype = "udl"\n'
                                     'w = "60 kN/m"\n[search]\nfamilies = ["sawn_metric"]\nself_weight = "none"\n'
                                     '[limits]\nstress_factor = 0.6\n')
    out = _json(capsys, ["select", str(job), "--json"], status=1)
    assert out["chosen"] is None
    assert main(["select", str(job)]) == 1
    assert re.search(r"at \d+\.\d{3} × its limit", capsys.readouterr().out)


def test_deflection_heading_in_us_units(capsys):
    assert main(["beam", str(EXAMPLES / "beam-three-span.toml"), "--units", "us"]) == 0
    out = capsys.readouterr().out
    assert "Deflection checks (v [in])" in out and "v in in" not in out


def test_element_size_message_has_a_unit(tmp_path, capsys):
    assert main(["section", str(EXAMPLES / "section-flitch.toml"), "--torsion", "--element-size", "0.001 mm"]) == 2
    err = capsys.readouterr().err
    assert re.search(r"element_size: 0\.001 mm would give about .*at least [\d.]+ mm", err)


def test_limit_without_check_is_said(tmp_path, capsys):
    job = _write(tmp_path, "b.toml", '[beam]\nspans = ["4 m"]\nEI = "2000 kN*m^2"\n[[load]]\ncase = "live"\n'
                                     'type = "udl"\nw = "2 kN/m"\n[[combination]]\nname = "SLS"\n'
                                     'factors = {live = 1.0}\nlimit = "span/360"\n')
    assert main(["beam", str(job)]) == 0
    err = capsys.readouterr().err
    assert "leanspan beam: warning:" in err and "a limit without check is taken as a deflection check" in err


def test_mechanism_with_a_hinge_names_the_fold(tmp_path, capsys):
    job = _write(tmp_path, "m.toml", '[beam]\nlength = "6 m"\nEI = "5000 kN*m^2"\n[[support]]\nat = "0 m"\n'
                                     'type = "pin"\n[[support]]\nat = "6 m"\ntype = "roller"\n[[hinge]]\nat = "2 m"\n'
                                     '[[load]]\ncase = "d"\ntype = "udl"\nw = "1 kN/m"\n')
    assert main(["beam", str(job)]) == 2
    err = capsys.readouterr().err
    # pin - hinge - roller: the two pieces fold at the hinge, each turning about its support (statics)
    assert "folds at the hinge at x = 2 m, turning about the supports at x = 0 m and x = 6 m" in err


def test_warnings_share_one_prefix(capsys):
    assert main(["select", str(EXAMPLES / "select-supplier.toml")]) == 0
    err = [ln for ln in capsys.readouterr().err.splitlines() if ln.strip()]
    assert err and all(ln.startswith("leanspan select: warning: ") for ln in err)


def test_select_json_carries_the_caution(capsys):
    out = _json(capsys, ["demo", "--json"])
    assert out["caution"].startswith("CAUTION")


def test_pattern_vectors_are_printed(capsys):
    assert main(["beam", str(EXAMPLES / "beam-three-span.toml")]) == 0
    line = next(ln for ln in capsys.readouterr().out.splitlines() if ln.strip().startswith("ULS ("))
    # three equal-ish spans, imposed load patterned: the largest sagging moment sits in the middle
    # span with only that span loaded (pattern 0,1,0), the largest hogging over an inner support
    # with both adjacent spans loaded (influence lines, any structural analysis text)
    assert "8 patterns" in line and "M_max [pattern 0,1,0]" in line and "M_min [pattern 1,1,0]" in line


def test_section_sheet_lists_part_shapes_and_its_own_not_checked(tmp_path, capsys):
    sheet = tmp_path / "s.html"
    assert main(["section", str(EXAMPLES / "section-bolted-girder.toml"), "--report", str(sheet)]) == 0
    html = sheet.read_text(encoding="utf-8")
    assert "I 500x200/260x10x16/20" in html and "rect 240x12" in html
    assert "lateral-torsional buckling" not in html and "this sheet gives section properties only" in html


def test_shear_centre_noise_is_zero_everywhere(tmp_path, capsys):
    sec = _write(tmp_path, "i.toml", 'units = "mm"\n[[part]]\nshape = "ibeam"\nd = 300\nb = 150\ntw = 7\n'
                                     'tf = 11\n')
    out = _json(capsys, ["section", str(sec), "--torsion", "--json"])
    # a doubly symmetric I: the shear centre is the centroid (any thin-walled beam text)
    assert out["zs"] == out["zc"] == 0.0 and out["ys"] == out["yc"]


def test_cache_can_be_turned_off(tmp_path):
    """A fresh process writes the catalogue cache to LEANSPAN_CACHE, and nothing with LEANSPAN_NO_CACHE."""
    import os
    import subprocess
    import sys

    def run(**env):
        e = dict(os.environ, LEANSPAN_CACHE=str(tmp_path / "cache"), **env)
        r = subprocess.run([sys.executable, "-m", "leanspan", "catalog", "--family", "glulam", "--json"],
                           capture_output=True, text=True, env=e, cwd=ROOT)
        assert r.returncode == 0, r.stderr

    run(LEANSPAN_NO_CACHE="1")
    assert not (tmp_path / "cache").exists()
    run(LEANSPAN_NO_CACHE="")
    assert list((tmp_path / "cache").glob("catalog-*.npz"))


# the README's example commands run as written ----------------------------------------------------
def _readme_commands():
    text = (ROOT / "README.md").read_text(encoding="utf-8")
    blocks = re.findall(r"```\n(.*?)```", text, re.S)[1:]  # the first block is the set-up
    return [ln.strip() for b in blocks for ln in b.splitlines() if ln.strip().startswith("leanspan ")]


def test_readme_has_example_commands():
    assert len(_readme_commands()) >= 6


@pytest.mark.parametrize("command", _readme_commands())
def test_readme_command_runs(command, tmp_path, monkeypatch, capsys):
    import shlex

    shutil.copytree(EXAMPLES, tmp_path / "data" / "examples")
    monkeypatch.chdir(tmp_path)
    argv = shlex.split(command)[1:]
    assert main(argv) in (0, 1), command
    out = capsys.readouterr()
    assert "Traceback" not in out.err


def test_the_cache_written_is_the_cache_read(tmp_path, monkeypatch):
    """Every column the catalogue builds is in the cache file, so the next run loads it."""
    import leanspan.catalog.table as table

    monkeypatch.setenv("LEANSPAN_CACHE", str(tmp_path))
    monkeypatch.delenv("LEANSPAN_NO_CACHE", raising=False)
    table._builtin_columns.cache_clear()
    try:
        built = table.builtin_frame()
        path = table.cache_file()
        assert path.is_file()
        loaded = table._load_cache(path)
        assert loaded is not None and set(loaded) == set(built.columns) & set(loaded)
        assert {"J", "Cw", "ys", "wagner"} <= set(loaded)
    finally:
        table._builtin_columns.cache_clear()


def test_one_stress_factor_over_mixed_strength_bases_is_warned(capsys):
    """C24 strengths are characteristic values (EN 338), S355's a yield (EN 10025-2): one factor
    over both gets a warning; a timber-only job none."""
    assert main(["demo"]) == 0
    err = capsys.readouterr().err
    assert "leanspan demo: warning: limits.stress_factor: 0.6 scales strengths of different bases" in err
    assert "characteristic" in err and "yield" in err
    assert main(["select", str(EXAMPLES / "select-floor-joist.toml")]) == 0
    assert "different bases" not in capsys.readouterr().err
