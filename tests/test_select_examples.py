"""The example selection jobs in data/examples run through the CLI and honour the JSON contract.

GUIDE section 4: ``{"chosen": CANDIDATE|null, "candidates": [CANDIDATE...], "screened": N}``
with CANDIDATE keys rank name family material dims mass_per_length depth width
utilisation{bending, shear, deflection} governing passes. The example data is invented.
"""

from __future__ import annotations

import json
import subprocess
import sys
from pathlib import Path

import pytest

from leanspan.cli import main

EXAMPLES = Path(__file__).resolve().parents[1] / "data" / "examples"
JOBS = ["select-floor-joist.toml", "select-two-span-pattern.toml", "select-steel-overhang.toml",
        "select-supplier.toml"]
CANDIDATE_KEYS = {"rank", "name", "family", "material", "dims", "mass_per_length", "depth", "width",
                  "utilisation", "governing", "passes"}


def check_contract(out):
    assert {"chosen", "candidates", "screened"} <= set(out)
    assert isinstance(out["screened"], int) and out["screened"] >= len(out["candidates"]) >= 1
    for c in out["candidates"] + ([out["chosen"]] if out["chosen"] else []):
        assert CANDIDATE_KEYS <= set(c), CANDIDATE_KEYS - set(c)
        # the contract's checks (bearing always: null without a bearing_length), and lateral_torsional
        # where the job asks for it (the demo does)
        assert set(c["utilisation"]) - {"lateral_torsional"} == {"bending", "shear", "deflection", "local_buckling", "bearing"}
        assert c["governing"] in c["utilisation"]
        assert isinstance(c["passes"], bool) and isinstance(c["rank"], int)
        assert isinstance(c["dims"], dict) and all(isinstance(v, float) for v in c["dims"].values())
        assert c["mass_per_length"] > 0 and c["depth"] > 0 and c["width"] > 0
        used = [u for u in c["utilisation"].values() if u is not None]
        # passes means every check given is within its limit; governing is the largest
        assert c["passes"] == all(u <= 1.0 for u in used)
        assert c["utilisation"][c["governing"]] == max(used)
    ranks = [c["rank"] for c in out["candidates"]]
    if out["chosen"]:
        # passing rows first (ranks 1..n), then the nearest failures: the heaviest failing rows
        # lighter than the winner, listed in rank order (smallest governing utilisation first)
        n = sum(c["passes"] for c in out["candidates"])
        assert ranks[:n] == list(range(1, n + 1))
        fails = out["candidates"][n:]
        assert not any(c["passes"] for c in fails)
        masses = [c["mass_per_length"] for c in fails]
        assert [c["rank"] for c in fails] == sorted(c["rank"] for c in fails)
        worst = [max(u for u in c["utilisation"].values() if u is not None) for c in fails]
        assert worst == sorted(worst)
        assert all(m < out["chosen"]["mass_per_length"] for m in masses)
        assert out["chosen"] == out["candidates"][0] and out["chosen"]["rank"] == 1 and out["chosen"]["passes"]


@pytest.mark.parametrize("job", JOBS)
def test_example_job_json(job, capsys):
    path = EXAMPLES / job
    assert path.read_text().lstrip().startswith("# INVENTED")  # says its data is invented
    status = main(["select", str(path), "--json", "--top", "5"])
    out = json.loads(capsys.readouterr().out)
    assert status in (0, 1)
    assert (status == 0) == (out["chosen"] is not None)
    check_contract(out)


def test_floor_joist_respects_width_and_materials(capsys):
    status = main(["select", str(EXAMPLES / "select-floor-joist.toml"), "--json", "--top", "20"])
    out = json.loads(capsys.readouterr().out)
    assert status == 0
    assert all(c["width"] <= 0.075 + 1e-12 and c["material"] in ("C16", "C24") for c in out["candidates"])
    passing = [c["mass_per_length"] for c in out["candidates"] if c["passes"]]
    assert passing == sorted(passing)  # objective mass: lightest first


def test_two_span_pattern_hogging_governs_bending(capsys):
    # Two equal spans under UDL, handbook continuous-beam coefficients: hogging over the
    # centre support w L^2 / 8 exceeds the sagging 0.070 w L^2 (fully loaded), so the
    # bending demand is a hogging moment: |M_min| > M_max for every candidate.
    main(["select", str(EXAMPLES / "select-two-span-pattern.toml"), "--json"])
    out = json.loads(capsys.readouterr().out)
    c = out["chosen"]
    assert -c["demands"]["M_min"] > c["demands"]["M_max"] > 0


def test_steel_overhang_filters(capsys):
    main(["select", str(EXAMPLES / "select-steel-overhang.toml"), "--json"])
    out = json.loads(capsys.readouterr().out)
    assert all(c["depth"] <= 0.360 + 1e-12 and c["material"] == "S355" for c in out["candidates"])
    # a cantilever with the tip load gives hogging over the right support
    assert out["chosen"]["demands"]["M_min"] < 0


def test_supplier_job_uses_only_the_list(capsys):
    status = main(["select", str(EXAMPLES / "select-supplier.toml"), "--json", "--top", "50"])
    cap = capsys.readouterr()
    out = json.loads(cap.out)
    supplier_rows = [ln for ln in (EXAMPLES / "supplier-list.csv").read_text().splitlines()
                     if ln.strip() and not ln.startswith("#")][1:]
    assert out["screened"] == len(supplier_rows)
    assert status == 0
    assert "ignored columns" in cap.err  # stock code / price columns are reported, not used


def test_subprocess_example_and_exports(tmp_path):
    csv_out, md_out = tmp_path / "ranked.csv", tmp_path / "ranked.md"
    r = subprocess.run([sys.executable, "-m", "leanspan", "select", str(EXAMPLES / "select-floor-joist.toml"),
                        "--csv", str(csv_out), "--markdown", str(md_out)],
                       capture_output=True, text=True, timeout=60)
    assert r.returncode == 0, r.stderr
    assert "Traceback" not in r.stderr
    assert "CAUTION" in r.stdout and "rect" in r.stdout
    assert csv_out.read_text().count("\n") >= 2 and "|" in md_out.read_text()
    r = subprocess.run([sys.executable, "-m", "leanspan", "select", str(tmp_path / "missing.toml")],
                       capture_output=True, text=True, timeout=60)
    assert r.returncode == 2 and len(r.stderr.strip().splitlines()) == 1 and "Traceback" not in r.stderr


def test_us_units_output(capsys):
    status = main(["select", str(EXAMPLES / "select-floor-joist.toml"), "--units", "us", "--top", "3"])
    text = capsys.readouterr().out
    assert status == 0 and "lb/ft" in text and "[in]" in text


def test_demo_runs(capsys):
    status = main(["demo", "--json", "--top", "3"])
    out = json.loads(capsys.readouterr().out)
    assert status == 0
    check_contract(out)


def test_select_plot_files(tmp_path, capsys):
    """--plot writes the chosen member's beam drawing at OUT and its section beside it, readable by others (0644 under
    the usual umask 022: POSIX open(2) creates files with mode 0666 & ~umask)."""
    import os

    old = os.umask(0o022)
    try:
        status = main(["select", str(EXAMPLES / "select-floor-joist.toml"), "--plot", str(tmp_path / "joist.svg")])
    finally:
        os.umask(old)
    out = capsys.readouterr().out
    names = sorted(p.name for p in tmp_path.iterdir())
    assert status == 0 and names == ["joist-section.svg", "joist.svg"]
    assert "drawings written to" in out
    for p in tmp_path.iterdir():
        assert p.read_text(encoding="utf-8").lstrip().startswith(("<?xml", "<svg"))
        assert p.stat().st_mode & 0o777 == 0o644


def test_select_plot_bad_suffix_is_one_line(tmp_path, capsys):
    status = main(["select", str(EXAMPLES / "select-floor-joist.toml"), "--plot", str(tmp_path / "joist.txt")])
    err = capsys.readouterr().err.strip().splitlines()
    assert status == 2 and len(err) == 1 and ".svg, .png or .pdf" in err[0]
    assert list(tmp_path.iterdir()) == []


def test_tilted_principal_axes_get_a_note(tmp_path, capsys):
    """An unequal angle's principal axes are tilted (tan 2 theta = -2 Iyz / (Iz - Iy), mechanics of
    materials): the output must remind that the checks assume bending about the horizontal axis."""
    p = tmp_path / "lintel.toml"
    p.write_text('[beam]\nlength = "1.2 m"\n[[support]]\nat = "0 m"\ntype = "pin"\n[[support]]\nat = "1.2 m"\n'
                 'type = "roller"\n[[load]]\ncase = "dead"\ntype = "udl"\nw = "1 kN/m"\n'
                 '[search]\nfamilies = ["gen_angle_unequal"]\n[limits]\nstress_factor = 0.6\n')
    assert main(["select", str(p)]) == 0
    assert "principal axes at" in capsys.readouterr().out
    assert main(["select", str(EXAMPLES / "select-floor-joist.toml")]) == 0
    assert "principal axes at" not in capsys.readouterr().out  # rectangles: theta = 0
