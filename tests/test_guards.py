"""Regression tests: each input that once crashed, hung or printed nan/inf now exits 2 with one line.

Each test names the crash it guards against (the traceback or the hang seen before the guard).
"""

from __future__ import annotations

import json
import math
import shutil
import sys
import tomllib
from pathlib import Path

import numpy as np
import pytest

from leanspan.cli import main
from leanspan.select.checks import Check, registered_check
from leanspan.units import RANGES

sys.path.insert(0, str(Path(__file__).parent))
from test_fuzz import to_toml  # noqa: E402

EXAMPLES = Path(__file__).resolve().parents[1] / "data" / "examples"


def edited(tmp_path, name, edit):
    """The example ``name`` with ``edit(data)`` applied, written to ``tmp_path``."""
    data = tomllib.loads((EXAMPLES / name).read_text(encoding="utf-8"))
    edit(data)
    path = tmp_path / name
    path.write_text(to_toml(data), encoding="utf-8")
    shutil.copy(EXAMPLES / "supplier-list.csv", tmp_path / "supplier-list.csv")
    return path


def one_error(capsys, argv):
    """Run argv; assert exit 2 and exactly one stderr line, the tool's own; return it."""
    status = main([str(a) for a in argv])
    err = capsys.readouterr().err.strip().splitlines()
    assert status == 2, err
    assert len(err) == 1 and err[0].startswith("leanspan ") and ": error: " in err[0], err
    return err[0]


def test_select_combination_not_a_list(tmp_path, capsys):
    # was: TypeError: 'int' object is not iterable
    job = edited(tmp_path, "select-floor-joist.toml", lambda d: d.__setitem__("combination", -1))
    assert "combination: expected [[combination]] tables, got -1" in one_error(capsys, ["select", job])


def test_select_load_case_a_table(tmp_path, capsys):
    # was: TypeError: unhashable type: 'dict' (found by the fuzz suite)
    def edit(d):
        d["combination"] = []
        d["load"][1]["case"] = {"a": 1}
    job = edited(tmp_path, "select-supplier.toml", edit)
    assert "load[2].case: expected a load case name" in one_error(capsys, ["select", job])


@pytest.mark.parametrize("value, words", [(3, "expected a table"), ({"dead": "x"}, "expected a number"),
                                          ({"dead": 1e308}, "out of range; expected a magnitude at most 1e+06")])
def test_combination_factors(tmp_path, capsys, value, words):
    # factors = {dead = 1e308} printed numpy overflow warnings and a success
    job = edited(tmp_path, "beam-gerber.toml", lambda d: d["combination"][0].__setitem__("factors", value))
    assert words in one_error(capsys, ["beam", job])


@pytest.mark.parametrize("key, value, words", [
    ("points", "x", "part[1].points: expected at least three points"),
    ("at", "a", "part[1].at: expected a point [z, y], got 'a'"),
    ("rotate", math.nan, "part[1].rotate: expected a finite value, got nan"),   # was a GEOSException
    ("rotate", 1e308, "part[1].rotate: 1e+308 is out of range"),               # was: math domain error
    ("mirror", 1, "part[1].mirror: expected true or false, got 1"),
    ("b", 1e300, "part[1].b: 1e+300 (= 1e+297 m) is out of range; expected a magnitude from 1e-05 to 100 m"),
])
def test_section_part_fields(tmp_path, capsys, key, value, words):
    def edit(d):
        d["part"][0][key] = value
        if key == "points":
            d["part"][0] = {"shape": "polygon", "points": value}
    path = edited(tmp_path, "section-flitch.toml", edit)
    assert words in one_error(capsys, ["section", path])


def test_torsion_on_a_huge_rectangle(tmp_path, capsys):
    # was: ValueError: repeats may not contain negative values (the mesh of a 1e300 mm rectangle)
    path = tmp_path / "big.toml"
    path.write_text('units = "mm"\n[[part]]\nshape = "rectangle"\nb = 1e300\nd = 1e300\n', encoding="utf-8")
    assert "part[1].b: 1e+300 (= 1e+297 m) is out of range" in one_error(capsys, ["section", path, "--torsion"])


def test_polygon_above_the_vertex_limit(tmp_path, capsys):
    # a 200,000-point polygon ran for more than ten minutes; now refused, naming the limit
    n = 200_000
    t = np.linspace(0.0, 2 * np.pi, n, endpoint=False)
    pts = ", ".join(f"[{100 * math.cos(a):.6f}, {100 * math.sin(a):.6f}]" for a in t)
    path = tmp_path / "many.toml"
    path.write_text(f'units = "mm"\n[[part]]\nshape = "polygon"\npoints = [{pts}]\n', encoding="utf-8")
    limit = int(RANGES["points"][1])
    assert f"200000 points (outline and holes); at most {limit} are accepted" in one_error(
        capsys, ["section", path, "--torsion"])


def test_mesh_boundary_budget(tmp_path, capsys):
    # a long thin strip with a small given element size: too many boundary pieces, refused
    path = tmp_path / "strip.toml"
    path.write_text('units = "mm"\n[[part]]\nshape = "rectangle"\nb = 100000\nd = 0.1\n', encoding="utf-8")
    line = one_error(capsys, ["section", path, "--torsion", "--element-size", "0.5 mm"])
    assert "would give about" in line and "boundary pieces" in line and "at least" in line


def test_numeric_power_in_a_unit_does_not_hang(tmp_path, capsys):
    # "9**9**9 m" made pint compute a number of 370 million digits: it never finished
    job = edited(tmp_path, "beam-gerber.toml", lambda d: d["beam"].__setitem__("length", "9**9**9 m"))
    assert "powers only on unit names" in one_error(capsys, ["beam", job])


def test_beam_spans_total_in_range(tmp_path, capsys):
    # 9000 spans in range one by one, 45 km in all
    job = edited(tmp_path, "beam-three-span.toml", lambda d: d["beam"].__setitem__("spans", [5.0] * 9000))
    assert "beam.spans (their total): 45000.0 is out of range" in one_error(capsys, ["beam", job])


def test_materials_and_catalogue_values_in_range(tmp_path, capsys):
    mats = tmp_path / "mine.toml"
    mats.write_text('[[material]]\nname = "C24"\nE = 1e300\n', encoding="utf-8")
    assert "material[1].E: 1e+300 (= 1e+306 Pa) is out of range" in one_error(capsys, ["materials", "--file", mats])
    csv = tmp_path / "list.csv"
    csv.write_text("family,b,d\nrectangle,45,1e300\n", encoding="utf-8")
    assert "row 2: column 'd': '1e300' is out of range" in one_error(capsys, ["catalog", "--file", csv])
    line = one_error(capsys, ["catalog", "--max-depth", "nan"])
    assert "--max-depth" in line and "finite" in line  # float("nan") was taken as a depth


@pytest.mark.parametrize("option", ["--csv", "--report", "--markdown", "--plot"])
def test_output_path_is_a_folder(tmp_path, capsys, option):
    # was: IsADirectoryError
    line = one_error(capsys, ["select", EXAMPLES / "select-floor-joist.toml", option, tmp_path])
    assert f"{option} {tmp_path}: is a folder; expected a file name" in line


@pytest.mark.parametrize("argv", [["select", EXAMPLES / "select-floor-joist.toml", "--csv", ""],
                                  ["beam", EXAMPLES / "beam-gerber.toml", "--report", " "],
                                  ["catalog", "--csv", ""], ["section", EXAMPLES / "section-flitch.toml",
                                                             "--plot", ""]])
def test_empty_output_path(capsys, argv):
    # an empty --csv was silently skipped
    assert "empty file name; expected a file to write" in one_error(capsys, argv)


def _zero_over_zero(eff, props):
    return (eff.M_max * 0.0) / (eff.M_max * 0.0)


def test_a_floating_point_error_is_one_line_naming_the_stage(capsys):
    # a check that computes 0/0: numpy's RuntimeWarning used to reach the user and NaN passed
    bad = Check(name="zero_over_zero", label="0/0", columns=("Zz",), demand=_zero_over_zero,
                allowable=lambda props, limits, eff: np.ones((props["Zz"].shape[0], 1)),
                kind="pressure", demand_key="zz", sentence="A check that divides zero by zero.")
    with registered_check(bad):
        line = one_error(capsys, ["select", EXAMPLES / "select-floor-joist.toml", "--json"])
    assert "screening the candidates: the computation left the range of floating point" in line
    assert "invalid value" in line


def test_no_deflection_combination_prints_null(tmp_path, capsys):
    # legitimate NaN: without a deflection combination the deflection utilisation is null
    def edit(d):
        d["combination"] = [c for c in d["combination"] if c.get("check") != "deflection"]
    job = edited(tmp_path, "select-supplier.toml", edit)
    assert main(["select", str(job), "--json"]) == 0
    out = json.loads(capsys.readouterr().out)
    assert out["chosen"]["utilisation"]["deflection"] is None
    assert out["chosen"]["demands"]["v_abs"] is None
    assert main(["select", str(job)]) == 0
    assert capsys.readouterr().err.count("Warning") == 0


@pytest.mark.parametrize("name", ["x" * 300, "a\x00b.csv"])
def test_impossible_catalogue_file_name(tmp_path, capsys, name):
    # was: OSError: [Errno 36] File name too long (found by the fuzz suite)
    job = edited(tmp_path, "select-supplier.toml", lambda d: d["search"].__setitem__("catalog", name))
    assert "search.catalog: file" in one_error(capsys, ["select", job])


def test_progress_note_on_a_terminal_only():
    """Work over a second shows 'working, N s' on a terminal, wiped at the end; a pipe sees nothing."""
    import io
    import time

    from leanspan.cli import heartbeat

    class Tty(io.StringIO):
        def isatty(self):
            return True

    tty, pipe = Tty(), io.StringIO()
    with heartbeat("select", after=0.05, every=0.05, stream=tty):
        time.sleep(0.3)
    with heartbeat("select", after=0.05, every=0.05, stream=pipe):
        time.sleep(0.2)
    assert "leanspan select: working, 0 s" in tty.getvalue() and tty.getvalue().endswith("\r\033[K")
    assert pipe.getvalue() == ""
    quick = Tty()
    with heartbeat("beam", after=0.5, stream=quick):
        pass
    assert quick.getvalue() == ""  # quick work shows nothing


@pytest.mark.parametrize("table", ["load", "support"])
def test_a_list_as_a_type(tmp_path, capsys, table):
    # was: TypeError: unhashable type: 'list'
    load = '[[load]]\ncase = "d"\ntype = []\nw = "1 kN/m"\n' if table == "load" else \
        '[[load]]\ncase = "d"\ntype = "udl"\nw = "1 kN/m"\n'
    support = '[[support]]\nat = "0 m"\ntype = []\n' if table == "support" else ""
    job = tmp_path / "b.toml"
    job.write_text(f'[beam]\nlength = "4 m"\nEI = "2000 kN*m^2"\n{support}{load}', encoding="utf-8")
    assert main(["beam", str(job)]) == 2
    err = capsys.readouterr().err.strip()
    assert f"{table}[1].type: expected" in err and "\n" not in err


def test_a_huge_rectangle_is_refused(tmp_path, capsys):
    # was: exit 0 with nan/inf/null properties
    sec = tmp_path / "s.toml"
    sec.write_text('units = "mm"\n[[part]]\nshape = "rectangle"\nb = 1e154\nd = 1e154\n', encoding="utf-8")
    assert main(["section", str(sec), "--json"]) == 2
    err = capsys.readouterr().err.strip()
    assert "part[1].b" in err and "out of range" in err


def test_a_schedule_where_no_member_passes(tmp_path, capsys):
    # was: TypeError in the totals line (no passing member left the total mass None)
    sched = tmp_path / "s.toml"
    sched.write_text('[search]\nfamilies = ["sawn_metric"]\nmax_depth = "100 mm"\n[limits]\nstress_factor = 0.6\n'
                     '[[member]]\nname = "A"\nspans = ["6 m"]\nline_loads = { imposed = "5 kN/m" }\n',
                     encoding="utf-8")
    assert main(["schedule", str(sched), "--sizes", "2"]) == 1
    out = capsys.readouterr().out
    assert "mass 0 kg" in out and "Nothing passes for: A" in out
