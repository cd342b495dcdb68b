"""Bad selection jobs: exit status 2, one line on stderr naming the field or row, no traceback.

GUIDE section 3 (errors): the CLI prints one line and exits 2; a search where nothing
passes is a result (exit 1), tested in test_select_hand.py.
"""

from __future__ import annotations

import pytest

from leanspan.cli import main

BASE = """[beam]
spans = ["4 m"]
{beam}
[[load]]
case = "dead"
type = "udl"
w = "{w}"
{combo}
[search]
{search}
[limits]
{limits}
"""
GOOD = dict(beam="", w="4 kN/m", combo="", search='families = ["sawn_metric"]', limits="stress_factor = 0.6")


def write(tmp_path, csv=None, **kw):
    parts = {**GOOD, **kw}
    text = BASE.format(**parts)
    if parts["limits"] is None:
        text = text.split("[limits]")[0]
    if csv is not None:
        (tmp_path / "cat.csv").write_text(csv)
    path = tmp_path / "job.toml"
    path.write_text(text)
    return path


def run_bad(capsys, path):
    status = main(["select", str(path)])
    cap = capsys.readouterr()
    return status, cap.err


ROW_CSV = "family,b,d,material\nrectangle,75,200,C24\n"
CASES = [
    # (id, job pieces, user CSV, words the one line must contain)
    ("unknown family", dict(search='families = ["oak_logs"]'), None, ["oak_logs"]),
    ("sizes exclude all", dict(search='families = ["glulam"]\nmin_depth = "400 mm"\nmax_depth = "300 mm"'), None,
     ["job.toml", "size limits", "min_depth 400 mm"]),
    ("materials do not pair", dict(search='families = ["glulam"]\nmaterials = ["S355"]'), None,
     ["job.toml", "materials S355", "none of them suits"]),
    ("unknown material", dict(search='families = ["sawn_metric"]\nmaterials = ["C99"]'), None, ["C99"]),
    ("missing catalogue file", dict(search='catalog = "nope.csv"'), None, ["search.catalog", "nope.csv"]),
    ("bad limit text", dict(limits='bending_stress = "lots"\nshear_stress = "2 MPa"'), None,
     ["limits.bending_stress", "lots"]),
    ("limit of the wrong kind", dict(limits='bending_stress = "10 m"\nshear_stress = "2 MPa"'), None,
     ["limits.bending_stress", "length"]),
    ("shear limit missing", dict(limits='bending_stress = "10 MPa"'), None, ["limits.shear_stress"]),
    ("stress factor as text", dict(limits='stress_factor = "0.6"'), None, ["limits.stress_factor"]),
    ("negative stress factor", dict(limits="stress_factor = -1"), None, ["limits.stress_factor"]),
    ("unknown limit key", dict(limits="stress_factor = 0.6\nsafety = 2"), None, ["limits.safety"]),
    ("missing [limits]", dict(limits=None), None, ["limits"]),
    ("wrong units on a load", dict(w="4 kN"), None, ["load[1].w", "force per length"]),
    ("wrong units on max_depth", dict(search='families = ["sawn_metric"]\nmax_depth = "300 kg"'), None,
     ["search.max_depth"]),
    ("bare number for max_depth", dict(search='families = ["sawn_metric"]\nmax_depth = 300'), None,
     ["search.max_depth", "unit"]),
    ("negative min_width", dict(search='families = ["sawn_metric"]\nmin_width = "-5 mm"'), None,
     ["search.min_width"]),
    ("unknown search key", dict(search='families = ["sawn_metric"]\ncolour = "red"'), None, ["search.colour"]),
    ("bad objective", dict(search='families = ["sawn_metric"]\nobjective = "cost"'), None,
     ["search.objective", "cost"]),
    ("self_weight not a name", dict(search='families = ["sawn_metric"]\nself_weight = 3'), None,
     ["search.self_weight"]),
    ("self_weight in no combination",
     dict(combo='[[combination]]\nname = "ULS"\nfactors = { dead = 1.35 }\n',
          search='families = ["sawn_metric"]\nself_weight = "permanent"'), None, ["search.self_weight", "permanent"]),
    ("combination names an unknown case",
     dict(combo='[[combination]]\nname = "ULS"\nfactors = { dead = 1.35, snow = 1.5 }\n'), None,
     ["combination[1].factors", "snow"]),
    ("bad deflection limit", dict(combo='[[combination]]\nname = "ULS"\nfactors = { dead = 1.35 }\n'
                                        '[[combination]]\nname = "SLS"\nfactors = { dead = 1.0 }\nlimit = "span/abc"\n'),
     None, ["combination[2].limit", "span/abc"]),
    ("no strength combination", dict(combo='[[combination]]\nname = "SLS"\nfactors = { dead = 1.0 }\n'
                                           'limit = "span/360"\n'), None, ["strength"]),
    ("member given in [beam]", dict(beam='EI = "1 MN*m^2"'), None, ["beam.EI"]),
    ("catalogue row not a number", dict(search='catalog = "cat.csv"\nself_weight = "none"'),
     "family,b,d\nrectangle,75,200\nrectangle,75,x\n", ["row 3", "'d'", "x"]),
    ("catalogue row unknown family", dict(search='catalog = "cat.csv"\nself_weight = "none"'),
     ROW_CSV + "hexagon,75,200,C24\n", ["row 3", "hexagon"]),
    ("catalogue row unknown material", dict(search='catalog = "cat.csv"\nself_weight = "none"'),
     ROW_CSV + "rectangle,75,225,C99\n", ["row 3", "C99"]),
    ("catalogue row negative size", dict(search='catalog = "cat.csv"\nself_weight = "none"'),
     ROW_CSV + "rectangle,75,-200,C24\n", ["row 3", "positive"]),
    ("catalogue column wrong unit", dict(search='catalog = "cat.csv"\nself_weight = "none"'),
     "family,b,d [kg]\nrectangle,75,200\n", ["column 'd'", "kg"]),
    ("catalogue without family column", dict(search='catalog = "cat.csv"\nself_weight = "none"'),
     "b,d\n75,200\n", ["family"]),
    ("catalogue row missing dimension", dict(search='catalog = "cat.csv"\nself_weight = "none"'),
     "family,b\nrectangle,75\n", ["row 2", "'d'"]),
    ("filters leave nothing", dict(search='families = ["sawn_metric"]\nmax_depth = "10 mm"'), None, ["search"]),
]


@pytest.mark.parametrize("pieces, csv, words", [c[1:] for c in CASES], ids=[c[0] for c in CASES])
def test_bad_job_exit_2_one_line(tmp_path, capsys, pieces, csv, words):
    status, err = run_bad(capsys, write(tmp_path, csv, **pieces))
    assert status == 2, err
    lines = err.strip().splitlines()
    assert len(lines) == 1, err
    assert "Traceback" not in err
    assert lines[0].startswith("leanspan select: error: ")
    for w in words:
        assert w in lines[0], (w, lines[0])


def test_broken_toml_and_missing_file(tmp_path, capsys):
    p = tmp_path / "job.toml"
    p.write_text("[beam\nspans = 3\n")
    status, err = run_bad(capsys, p)
    assert status == 2 and len(err.strip().splitlines()) == 1 and "job.toml" in err
    status, err = run_bad(capsys, tmp_path / "absent.toml")
    assert status == 2 and len(err.strip().splitlines()) == 1 and "absent.toml" in err


def test_bad_top_option(tmp_path, capsys):
    p = write(tmp_path)
    status = main(["select", str(p), "--top", "0"])
    err = capsys.readouterr().err
    assert status == 2 and "--top" in err and len(err.strip().splitlines()) == 1


def test_job_file_untouched(tmp_path, capsys):
    p = write(tmp_path, "family,b,d\nrectangle,75,x\n", search='catalog = "cat.csv"')
    before = p.read_bytes(), (tmp_path / "cat.csv").read_bytes()
    run_bad(capsys, p)
    assert (p.read_bytes(), (tmp_path / "cat.csv").read_bytes()) == before  # GUIDE 3: inputs never modified


# The line names the field and the job file.
@pytest.mark.parametrize("search, field", [('families = ["oak_logs"]', "search.families"),
                                           ('families = ["sawn_metric"]\nmaterials = ["C99"]', "search.materials")])
def test_unknown_name_line_names_field(tmp_path, capsys, search, field):
    status, err = run_bad(capsys, write(tmp_path, search=search))
    assert status == 2 and field in err and "job.toml" in err


def test_negative_row_message_plain(tmp_path, capsys):
    p = write(tmp_path, ROW_CSV + "rectangle,75,-200,C24\n", search='catalog = "cat.csv"\nself_weight = "none"')
    status, err = run_bad(capsys, p)
    assert status == 2 and "np.float64" not in err and "-200" in err
