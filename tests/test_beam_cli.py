"""`leanspan beam`: readable output, JSON contract, plot files and one-line errors with exit 2."""

from __future__ import annotations

import json
from pathlib import Path

import pytest

from leanspan import CAUTION
from leanspan.cli import main

EXAMPLES = Path(__file__).resolve().parents[1] / "data" / "examples"

BASE = """
units = {length = "m", force = "kN"}
[beam]
length = 6
EI = 5000
"""


def run(tmp_path, text, *args):
    f = tmp_path / "job.toml"
    f.write_text(text)
    return main(["beam", str(f), *args])


@pytest.mark.parametrize("name", sorted(p.name for p in EXAMPLES.glob("beam-*.toml")))
def test_examples_run_with_caution(name, capsys):
    assert main(["beam", str(EXAMPLES / name)]) == 0
    out = capsys.readouterr().out
    assert CAUTION in out and "Reactions" in out and "Extremes" in out


def test_json_contract(capsys):
    assert main(["beam", str(EXAMPLES / "beam-three-span.toml"), "--json"]) == 0
    doc = json.loads(capsys.readouterr().out)
    assert doc["units"] == "SI"
    res = doc["results"]
    assert {"dead", "imposed", "ULS", "SLS", "envelope"} <= set(res)
    for r in res.values():
        assert {"reactions", "M_max", "M_min", "V_max", "v_min", "v_max", "stations"} <= set(r)
        assert {"at", "force", "moment"} <= set(r["reactions"][0])
        assert {"value", "at"} <= set(r["M_max"])
        st = r["stations"]
        assert {"x", "V", "M", "theta", "v"} <= set(st)
        assert len(st["x"]) == len(st["M"]) and st["x"] == sorted(st["x"])
    # stations include every support and the exact extreme positions
    xs = res["dead"]["stations"]["x"]
    for s in res["dead"]["reactions"]:
        assert any(abs(x - s["at"]) < 1e-12 for x in xs)
    assert any(abs(x - res["dead"]["M_max"]["at"]) < 1e-12 for x in xs)
    assert any(abs(x - res["dead"]["v_min"]["at"]) < 1e-12 for x in xs)
    checks = res["SLS"]["deflection_checks"]
    assert [c["span"] for c in checks] == [1, 2, 3]
    for c in checks:
        # span/360 on each span length (common practice limit, given in the job)
        assert c["allowed"] == pytest.approx((c["to"] - c["from"]) / 360)
        assert c["utilisation"] == pytest.approx(abs(c["v_extreme"]) / c["allowed"])
    assert len(res["ULS"]["members"]) == 8  # 2^3 on/off patterns of the imposed case


def test_plot_writes_files(tmp_path):
    out = tmp_path / "beam.svg"
    assert main(["beam", str(EXAMPLES / "beam-gerber.toml"), "--plot", str(out)]) == 0
    # GUIDE section 4: --plot OUT.svg writes OUT.svg (the loaded beam above its V, M, v diagrams)
    assert sorted(p.name for p in tmp_path.iterdir()) == ["beam.svg"]
    assert out.read_text().lstrip().startswith("<?xml")


def test_us_units(capsys):
    assert main(["beam", str(EXAMPLES / "beam-overhang-spring.toml"), "--units", "us"]) == 0
    out = capsys.readouterr().out
    assert "kip" in out and " in" in out


BAD = {
    "udl too short": ("[[support]]\nat = 0\ntype = \"pin\"\n[[support]]\nat = 6\ntype = \"roller\"\n"
                      "[[load]]\ncase = \"a\"\ntype = \"udl\"\nw = 1000\nfrom = 3\nto = 3.000001\n",
                      "give it as a point load"),
    "supports too close": ("[[support]]\nat = 0\ntype = \"pin\"\n[[support]]\nat = 3\ntype = \"roller\"\n"
                           "[[support]]\nat = 3.000001\ntype = \"roller\"\n[[load]]\ncase = \"a\"\n"
                           "type = \"point\"\nP = 1\nat = 3\n", "closer than"),
    "single pin": ("[[support]]\nat = 0\ntype = \"pin\"\n[[load]]\ncase = \"a\"\ntype = \"point\"\nP = 1\nat = 3\n",
                   "mechanism"),
    "hinge mechanism": ("[[support]]\nat = 0\ntype = \"pin\"\n[[support]]\nat = 6\ntype = \"pin\"\n"
                        "[[hinge]]\nat = 3\n[[load]]\ncase = \"a\"\ntype = \"point\"\nP = 1\nat = 2\n",
                        "x = 0 m to x = 6 m"),
    "support off": ("[[support]]\nat = 7\ntype = \"fixed\"\n[[load]]\ncase = \"a\"\ntype = \"point\"\nP = 1\nat = 2\n",
                    "support[1].at: x = 7 m is off the beam"),
    "load off": ("[[support]]\nat = 0\ntype = \"fixed\"\n[[load]]\ncase = \"a\"\ntype = \"point\"\nP = 1\nat = -1\n",
                 "load[1].at"),
    "wrong kind": ("[[support]]\nat = 0\ntype = \"fixed\"\n[[load]]\ncase = \"a\"\ntype = \"udl\"\nw = \"5 kN\"\n",
                   "expected a force per length"),
    "unknown case": ("[[support]]\nat = 0\ntype = \"fixed\"\n[[load]]\ncase = \"a\"\ntype = \"udl\"\nw = 1\n"
                     "[[combination]]\nname = \"U\"\nfactors = {a = 1, snow = 1.5}\n", "unknown load case 'snow'"),
    "bad type": ("[[support]]\nat = 0\ntype = \"clamp\"\n[[load]]\ncase = \"a\"\ntype = \"udl\"\nw = 1\n",
                 "support[1].type"),
    "bad limit": ("[[support]]\nat = 0\ntype = \"fixed\"\n[[load]]\ncase = \"a\"\ntype = \"udl\"\nw = 1\n"
                  "[[combination]]\nname = \"S\"\nfactors = {a = 1}\nlimit = \"span/abc\"\n", "combination[1].limit"),
    "reversed udl": ("[[support]]\nat = 0\ntype = \"fixed\"\n[[load]]\ncase = \"a\"\ntype = \"udl\"\nw = 1\n"
                     "from = 4\nto = 2\n", "must be beyond"),
}


@pytest.mark.parametrize("key", sorted(BAD))
def test_bad_input_exit_2_one_line(tmp_path, capsys, key):
    body, expect = BAD[key]
    assert run(tmp_path, BASE + body) == 2
    err = capsys.readouterr().err
    assert err.count("\n") == 1 and expect in err and "Traceback" not in err


def test_zero_length_and_negative_span(tmp_path, capsys):
    assert run(tmp_path, "[beam]\nlength = \"0 m\"\nEI = \"1 kN*m^2\"\n") == 2
    assert "beam.length" in capsys.readouterr().err
    assert run(tmp_path, "[beam]\nspans = [\"4 m\", \"-2 m\"]\nEI = \"1 kN*m^2\"\n"
                         "[[load]]\ncase = \"a\"\ntype = \"udl\"\nw = \"1 kN/m\"\n") == 2
    assert "beam.spans[2]" in capsys.readouterr().err


def test_section_and_material(tmp_path):
    from leanspan.beam import parse_beam
    from leanspan.select.member import section_stiffness

    spec = {"part": [{"shape": "rectangle", "b": "100 mm", "d": "200 mm"}]}
    data = {"beam": {"length": "4 m", "section": spec, "material": "C24"},
            "support": [{"at": "0 m", "type": "pin"}, {"at": "4 m", "type": "roller"}],
            "load": [{"case": "d", "type": "udl", "w": "1 kN/m"}]}
    m = parse_beam(data, tmp_path, section_stiffness=section_stiffness)
    # C24: E0,mean = 11 kN/mm^2, mean density 420 kg/m^3 (EN 338 Table 1)
    assert m.stiffness[0].EI == pytest.approx(11e9 * 0.1 * 0.2**3 / 12, rel=1e-12)
    assert m.mass_per_length == pytest.approx(420 * 0.1 * 0.2, rel=1e-12)


def test_round_off_prints_as_zero(tmp_path, capsys):
    """A tip-loaded cantilever: R = P and M = -PL at the wall, M = 0 at the free end exactly
    (statics); the solver's ~1e-15 round-off must not be printed as a value."""
    p = tmp_path / "cant.toml"
    p.write_text('[beam]\nlength = "3 m"\nEI = "1000 kN*m^2"\n[[support]]\nat = "0 m"\ntype = "fixed"\n'
                 '[[load]]\ncase = "live"\ntype = "point"\nP = "5 kN"\nat = "3 m"\n')
    assert main(["beam", str(p)]) == 0
    out = capsys.readouterr().out
    assert "e-1" not in out  # no 1e-15-style noise anywhere
    assert "5 / 15" in out  # R = P = 5 kN, M = PL = 15 kN·m at the wall
    assert "-45 at 3" in out  # v = -PL^3 / 3EI = -45 mm at the tip (beam-formula handbook)
