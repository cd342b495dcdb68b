"""The core's shape: import arrows point one way, a check is one registry entry, one unit edge.

- The arrows of DEVELOPERS.md, read from every module's imports (ast): beam and sections
  know nothing of each other, sections no catalogue, catalog no selection, no core package
  the report or the command line; schedule sits on select (no other core package imports it,
  and it reaches beams and sections only through select).
- A check registered from this file alone shows up in the screen, the ranked table, the
  JSON and the sheet, and takes its topic off the "not checked" list.
- A beam file's ``units`` reaches an inline section.
"""

from __future__ import annotations

import ast
import json
from pathlib import Path

import numpy as np
import pytest

from leanspan.cli import main
from leanspan.select.checks import Check, not_checked, registered_check

PACKAGE = Path(__file__).resolve().parents[1] / "leanspan"
CORE = ("sections", "catalog", "beam", "select", "schedule")
FORBIDDEN = {("beam", "sections"), ("sections", "beam"), ("sections", "catalog"), ("catalog", "select"),
             ("select", "report"), ("sections", "select"), ("beam", "select"), ("beam", "catalog"),
             ("catalog", "report")} | {(c, "cli") for c in CORE} | {(c, "report") for c in CORE} \
    | {(c, "schedule") for c in CORE if c != "schedule"} | {("schedule", "beam"), ("schedule", "sections")}


def _imports(path: Path, package: Path = PACKAGE):
    """(subpackage of the importer, subpackage imported, line) for every leanspan import."""
    parts = path.relative_to(package.parent).with_suffix("").parts
    pkg = list(parts[:-1])  # the package holding the module (an __init__ is its own package)
    own = pkg[1] if len(pkg) > 1 else ""
    for node in ast.walk(ast.parse(path.read_text(encoding="utf-8"))):
        if isinstance(node, ast.ImportFrom):
            base = pkg[: len(pkg) - node.level + 1] if node.level else []
            module = base + (node.module.split(".") if node.module else [])
            targets = [module] if node.module else [module + [a.name] for a in node.names]
        elif isinstance(node, ast.Import):
            targets = [a.name.split(".") for a in node.names]
        else:
            continue
        for t in targets:
            if len(t) > 1 and t[0] == "leanspan":
                yield own, t[1], node.lineno


def test_import_arrows_point_one_way():
    bad = []
    for path in sorted(PACKAGE.rglob("*.py")):
        for own, target, line in _imports(path):
            if (own, target) in FORBIDDEN:
                bad.append(f"{path.relative_to(PACKAGE.parent)}:{line}: {own} -> {target}")
    assert bad == []


def test_the_arrow_reader_sees_forbidden_imports(tmp_path):
    """The reader itself: relative and absolute imports from beam into sections and cli."""
    fake = tmp_path / "leanspan" / "beam"
    fake.mkdir(parents=True)
    (fake / "x.py").write_text("from ..sections.io import section_from_spec\nimport leanspan.cli\n"
                               "from . import poly\nfrom .. import units\n")
    (fake / "__init__.py").write_text("from ..sections import io\n")
    got = {(o, t) for f in ("x.py", "__init__.py") for o, t, _ in _imports(fake / f, tmp_path / "leanspan")}
    assert got == {("beam", "sections"), ("beam", "cli"), ("beam", "beam"), ("beam", "units")}


# -- a toy check, registered from this file alone -------------------------------------------------
def _plastic_demand(eff, props):
    """Plastic bending: |M| / Zz (the stress block of a fully plastic section)."""
    return np.maximum(np.maximum(eff.M_max, 0.0), np.maximum(-eff.M_min, 0.0)) / props["Zz"][:, None]


def _plastic_allowable(props, limits, eff):
    return np.full(props["Zz"].shape, limits.get("plastic_stress", 1e9))[:, None]


TOY = Check(name="plastic_bending", label="plastic", columns=("Zz",), demand=_plastic_demand,
            allowable=_plastic_allowable, kind="pressure", demand_key="sigma_plastic",
            sentence="Toy check: plastic bending stress M / Zz against the plastic stress limit.",
            covers=("connections",), limit_keys={"plastic_stress": "pressure"})

JOB = """
[beam]
title = "Toy check job (invented)"
spans = ["4 m"]
[[load]]
case = "imposed"
type = "udl"
w = "3 kN/m"
[search]
families = ["rectangle"]
materials = ["C24"]
self_weight = "none"
max_depth = "300 mm"
[limits]
stress_factor = 0.6
plastic_stress = "20 MPa"
"""


def test_a_registered_check_reaches_screen_table_json_and_sheet(tmp_path, capsys):
    job = tmp_path / "toy.toml"
    job.write_text(JOB, encoding="utf-8")
    sheet = tmp_path / "toy.html"
    with registered_check(TOY):
        assert main(["select", str(job), "--json", "--report", str(sheet)]) == 0
        out = json.loads(capsys.readouterr().out)
        assert main(["select", str(job)]) == 0
        text = capsys.readouterr().out
        assert "connections, fixings and notches" not in not_checked()
    # JSON: the check's utilisation, equal to the hand value. Simply supported span under a
    # uniform load: M = w L^2 / 8 (beam-formula handbooks); plastic modulus of a rectangle
    # Zz = b d^2 / 4 (mechanics-of-materials texts).
    for cand in out["candidates"]:
        b, d = cand["dims"]["b"], cand["dims"]["d"]
        M = 3e3 * 4.0**2 / 8
        assert cand["utilisation"]["plastic_bending"] == pytest.approx(M / (b * d**2 / 4) / 20e6, rel=1e-9)
        assert cand["demands"]["sigma_plastic"] == pytest.approx(M / (b * d**2 / 4), rel=1e-9)
    chosen = out["chosen"]
    assert chosen["passes"] and max(u for u in chosen["utilisation"].values() if u is not None) <= 1.0
    # the ranked table has its column; the sheet its row, sentence and topic taken off the list
    header = next(line for line in text.splitlines() if line.startswith("rank"))
    assert "plastic" in header.split()
    html = sheet.read_text(encoding="utf-8")
    assert 'data-key="chosen.utilisation.plastic_bending"' in html
    assert "Toy check: plastic bending stress" in html
    assert "connections, fixings and notches" not in html
    # unregistered again: the contract's three checks only
    assert "connections, fixings and notches" in not_checked()
    assert main(["select", str(job), "--json"]) == 2  # plastic_stress is unknown without the check
    assert "limits.plastic_stress: unknown key" in capsys.readouterr().err


def test_a_registered_check_can_govern_and_fail(tmp_path, capsys):
    """A tight toy limit makes the toy check govern: nothing lighter than it passes."""
    job = tmp_path / "toy.toml"
    job.write_text(JOB.replace('plastic_stress = "20 MPa"', 'plastic_stress = "0.01 MPa"'), encoding="utf-8")
    with registered_check(TOY):
        assert main(["select", str(job), "--json"]) == 1
    out = json.loads(capsys.readouterr().out)
    assert out["chosen"] is None
    assert out["candidates"][0]["governing"] == "plastic_bending"


# -- one unit edge --------------------------------------------------------------------------------
def test_inline_section_reads_the_files_units(tmp_path, capsys):
    job = tmp_path / "beam.toml"
    job.write_text("""
units = "mm"
[beam]
length = 4000
material = "C24"
[beam.section]
[[beam.section.part]]
shape = "rectangle"
b = 100
d = 200
[[support]]
at = 0
type = "pin"
[[support]]
at = 4000
type = "roller"
[[load]]
case = "imposed"
type = "point"
P = "10 kN"
at = 2000
""", encoding="utf-8")
    assert main(["beam", str(job), "--json"]) == 0
    out = json.loads(capsys.readouterr().out)
    # C24: E0,mean = 11 kN/mm^2 (EN 338 Table 1); centre deflection P L^3 / (48 E I) (handbooks)
    EI = 11e9 * 0.1 * 0.2**3 / 12
    assert out["results"]["imposed"]["v_min"]["value"] == pytest.approx(-10e3 * 4.0**3 / (48 * EI), rel=1e-9)


def test_an_inactive_check_adds_nothing(tmp_path, capsys):
    """A check that the job does not ask for adds no column, key, row or cover."""
    import dataclasses

    lazy = dataclasses.replace(TOY, active=lambda limits: limits.get("plastic_stress") is not None)
    job = tmp_path / "toy.toml"
    job.write_text(JOB.replace('plastic_stress = "20 MPa"\n', ""), encoding="utf-8")
    sheet = tmp_path / "toy.html"
    with registered_check(lazy):
        out = _json_select(capsys, job, sheet)
        assert set(out["chosen"]["utilisation"]) == {"bending", "shear", "deflection", "local_buckling", "bearing"}  # bearing: always
        html = sheet.read_text(encoding="utf-8")
        assert "plastic_bending" not in html and "connections, fixings and notches" in html
        job.write_text(JOB, encoding="utf-8")  # now asked for
        out = _json_select(capsys, job, sheet)
        assert "plastic_bending" in out["chosen"]["utilisation"]


def _json_select(capsys, job, sheet):
    assert main(["select", str(job), "--json", "--report", str(sheet)]) == 0
    return json.loads(capsys.readouterr().out)


def test_a_candidate_whose_data_cannot_be_checked_fails():
    """A NaN property on one candidate: that candidate fails the check (inf), the others do not
    change; a check with no applicable combination stays NaN (not applicable) for all."""
    from pathlib import Path

    from leanspan.select.job import parse_job
    from leanspan.select.screen import Candidates, screen

    job = parse_job({"beam": {"spans": ["4 m"]}, "load": [{"case": "dead", "type": "udl", "w": "2 kN/m"}],
                     "search": {"families": ["rectangle"], "self_weight": "none"},
                     "limits": {"stress_factor": 1.0}}, Path("."))
    one = np.ones(3)
    cand = Candidates.with_allowables(2e6 * one, 10 * one, 20e6 * one, 2e6 * one, Sz_top=1e-3 * one,
                                      Sz_bot=1e-3 * one, shear_factor=np.array([75.0, np.nan, 75.0]))
    res = screen(job.model, cand)
    # tau = V x factor, V = w L / 2 (statics); the NaN row fails instead of passing
    assert res.utilisation["shear"][0] == pytest.approx(2e3 * 4 / 2 * 75.0 / 2e6, rel=1e-12)
    assert np.isinf(res.utilisation["shear"][1]) and not res.passes[1] and res.passes[0]
    assert np.isnan(res.utilisation["deflection"]).all()  # no deflection combination: not applicable
