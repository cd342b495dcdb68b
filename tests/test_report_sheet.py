"""The calculation sheet: every part is there, its numbers are the JSON numbers, it is
self-contained (no network references), and it is written atomically."""

from __future__ import annotations

import math
import os
import re
import tomllib
from html.parser import HTMLParser
from pathlib import Path

import pytest

import leanspan
from leanspan.cli import main
from leanspan.cli.demo import demo_text
from leanspan.errors import InputError
from leanspan.report import sheet
from leanspan.select.job import parse_job
from leanspan.select.search import run_selection
from leanspan.units import display_factor

ROOT = Path(__file__).resolve().parents[1]
EXAMPLES = ROOT / "data" / "examples"


class _Keys(HTMLParser):
    """Collect the text of every element carrying ``data-key``."""

    def __init__(self):
        super().__init__()
        self.values, self._stack = {}, []

    def handle_starttag(self, tag, attrs):
        key = dict(attrs).get("data-key")
        self._stack.append([tag, key, ""])

    def handle_endtag(self, tag):
        while self._stack:
            t, key, text = self._stack.pop()
            if key:
                self.values[key] = text.strip()
            if self._stack:
                self._stack[-1][2] += text
            if t == tag:
                break

    def handle_data(self, data):
        if self._stack:
            self._stack[-1][2] += data


def keyed(html: str) -> dict:
    p = _Keys()
    p.feed(html)
    return p.values


def first_number(text: str) -> float:
    m = re.search(r"-?\d+(?:\.\d+)?(?:e[+-]?\d+)?", text)
    assert m, f"no number in {text!r}"
    return float(m.group())


def close_to_sig(shown: float, exact: float, digits: int = 4) -> bool:
    """``shown`` is ``exact`` rounded to ``digits`` significant figures (half a unit in the last place)."""
    if exact == 0:
        return shown == 0
    step = 10 ** (math.floor(math.log10(abs(exact))) - digits + 1)
    return abs(shown - exact) <= 0.5 * step * 1.0001 + 1e-300


@pytest.fixture(scope="module")
def demo():
    job = parse_job(tomllib.loads(demo_text()), Path("."), "demo: ")
    sel = run_selection(job)
    html = sheet.selection_sheet_html(sel, "si", "built-in demo (invented scenario)", 10)
    return sel, html


def test_every_part_is_on_the_sheet(demo):
    sel, html = demo
    for heading in ("Job", "Loaded beam and internal forces", "The section", "Checks", "Ranked candidates",
                    "Assumptions and what is not checked"):
        assert f"<h2>{heading}</h2>" in html
    for caption in ("Spans", "Supports", "Loads by case", "Combinations", "Search space and limits",
                    "Properties of", "Characteristic support reactions per load case",
                    "Design support reactions"):
        assert caption in html
    assert re.search(r"\d{4}-\d{2}-\d{2}", html)                    # the date
    assert html.count('class="caution"') >= 2                      # prominent, top and bottom
    assert sheet.esc(leanspan.CAUTION) in html
    for item in ("local buckling", "bearing", "connections", "vibration", "fire", "durability"):
        assert item in html
    # the demo checks lateral-torsional buckling: a check row and its method, not a "not checked" item
    assert "Lateral-torsional buckling: the largest moment of each segment" in html
    assert "lateral-torsional buckling (the member is assumed restrained against it)" not in html
    assert "local building code" in html and "licensed" in html
    assert "Invented demo data" in html                             # the demo job says it is invented
    assert html.count("<svg") >= 3 + 3                              # beam, diagrams, section + bars
    assert html.count('class="bar"') == 6                           # bending, shear, two deflection checks, buckling, local buckling
    for label in ("dead", "snow", "span/360", "span/250", "1.35 × dead + 1.5 × snow"):
        assert label in html
    # the extremes are annotated on the diagrams (in the SVG text, fonts left to the browser)
    assert "max 28.69 kN·m at x = 2.794 m" in html


def test_numbers_on_the_sheet_equal_the_json(demo):
    sel, html = demo
    js = sel.to_json(10)
    got = keyed(html)
    c = js["chosen"]
    mf = display_factor("mass/length", "si")[1]
    pf = display_factor("pressure", "si")[1]
    lf = display_factor("length", "si")[1]
    assert close_to_sig(first_number(got["chosen.mass_per_length"]) * mf, c["mass_per_length"])
    assert close_to_sig(first_number(got["chosen.demands.sigma"]) * pf, c["demands"]["sigma"])
    assert close_to_sig(first_number(got["chosen.demands.tau"]) * pf, c["demands"]["tau"])
    assert close_to_sig(first_number(got["chosen.demands.v_abs"]) * lf, c["demands"]["v_abs"])
    for check in ("bending", "shear", "deflection"):
        # printed to 3 decimals, rounded up (a failure never reads as within the limit)
        shown = float(got[f"chosen.utilisation.{check}"])
        assert 0 <= shown - c["utilisation"][check] <= 1e-3 + 1e-12
    # utilisation = demand / limit, as printed
    fb = first_number(got["limit.bending"]) * pf
    assert abs(c["demands"]["sigma"] / fb - c["utilisation"]["bending"]) < 1e-3
    assert int(got["screened"]) == js["screened"]
    assert int(got["passing"]) == int(sel.result.passes.sum())
    # the ranked table: every shown candidate, in order
    for cand in js["candidates"]:
        r = cand["rank"]
        assert int(got[f"rank{r}.rank"]) == r
        assert close_to_sig(float(got[f"rank{r}.mass_per_length"]) * mf, cand["mass_per_length"])
        assert close_to_sig(float(got[f"rank{r}.depth"]) * lf, cand["depth"])
        for check in ("bending", "shear", "deflection"):
            if cand["utilisation"][check] is not None:
                assert 0 <= float(got[f"rank{r}.{check}"]) - cand["utilisation"][check] <= 1e-3 + 1e-12
    # properties: the catalogue row screened, and the drawn section agrees with it
    row = sel.chosen_member.row
    props = sel.chosen_member.properties
    for key, kind in (("Iz", "second moment"), ("A", "area"), ("Sz_bot", "section modulus")):
        shown = first_number(got[f"prop.{key}"]) * display_factor(kind, "si")[1]
        assert close_to_sig(shown, float(row[key]))
        assert props[key] == pytest.approx(float(row[key]), rel=1e-9)


def test_us_units(demo):
    sel, _ = demo
    html = sheet.selection_sheet_html(sel, "us", "demo", 5)
    got = keyed(html)
    mf = display_factor("mass/length", "us")[1]
    assert "lb/ft" in html and "kip·ft" in html and "ksi" in html and "ft" in html
    assert close_to_sig(first_number(got["chosen.mass_per_length"]), sel.chosen["mass_per_length"] / mf)
    assert "rank6.rank" not in got                      # --top 5 shows five passing ones


def _no_network(html: str):
    assert "<script" not in html.lower() and "<link" not in html.lower() and "@import" not in html
    refs = re.findall(r"""\b(?:src|href|xlink:href)\s*=\s*["']([^"']*)["']""", html)
    assert refs, "expected the local anchors of the contents list"
    for ref in refs:
        assert ref.startswith("#"), ref
    assert not re.search(r"url\(\s*['\"]?\s*(?:https?:)?//", html)
    assert not re.search(r"""(?:src|href)\s*=\s*["']?\s*(?:https?:)?//""", html)


def test_no_network_requests(demo):
    _no_network(demo[1])


def test_atomic_write_failure_leaves_no_partial_file(demo, tmp_path, monkeypatch):
    sel, _ = demo
    target = tmp_path / "sheet.html"
    target.write_text("previous sheet", encoding="utf-8")

    def boom(*a, **k):
        raise RuntimeError("drawing failed half-way")

    monkeypatch.setattr("leanspan.report.diagrams.section_figure", boom)
    with pytest.raises(RuntimeError):
        sheet.write_selection_sheet(sel, target)
    assert target.read_text(encoding="utf-8") == "previous sheet"
    monkeypatch.undo()

    real_replace = os.replace

    def failing_replace(src, dst):
        raise OSError("disk full")

    monkeypatch.setattr(os, "replace", failing_replace)
    with pytest.raises(OSError):
        sheet.write_selection_sheet(sel, target)
    monkeypatch.setattr(os, "replace", real_replace)
    assert target.read_text(encoding="utf-8") == "previous sheet"
    assert sorted(p.name for p in tmp_path.iterdir()) == ["sheet.html"]   # no temp file left behind


def test_never_overwrites_an_input(demo, tmp_path):
    from leanspan.fileio import protect_inputs

    sel, _ = demo
    inp = tmp_path / "input.html"
    inp.write_text("an input", encoding="utf-8")
    protect_inputs(inp)
    with pytest.raises(InputError, match="refusing to overwrite"):
        sheet.write_selection_sheet(sel, inp)
    assert inp.read_text(encoding="utf-8") == "an input"


def test_cli_errors_are_one_line(tmp_path, capsys):
    src = EXAMPLES / "section-flitch.toml"
    before = src.read_bytes()
    assert main(["section", str(src), "--report", str(src)]) == 2
    err = capsys.readouterr().err.strip()
    assert "\n" not in err and "expected a file name ending in .html" in err
    assert src.read_bytes() == before
    assert main(["section", str(src), "--report", str(tmp_path / "missing" / "s.html")]) == 2
    err = capsys.readouterr().err.strip()
    assert "\n" not in err and "does not exist" in err and "Traceback" not in err


def test_section_sheet_from_the_command(tmp_path, capsys):
    out = tmp_path / "flitch.html"
    assert main(["section", str(EXAMPLES / "section-flitch.toml"), "--report", str(out)]) == 0
    capsys.readouterr()
    assert main(["section", str(EXAMPLES / "section-flitch.toml"), "--json"]) == 0
    import json

    js = json.loads(capsys.readouterr().out)
    html = out.read_text(encoding="utf-8")
    _no_network(html)
    got = keyed(html)
    for key, kind in (("A", "area"), ("Iz", "second moment"), ("Sz_top", "section modulus"),
                      ("EIz", "flexural stiffness"), ("mass_per_length", "mass/length")):
        assert close_to_sig(first_number(got[key]) * display_factor(kind, "si")[1], js[key])
    assert "neutral axis" in html and sheet.esc(leanspan.CAUTION) in html and "C24" in html


def test_beam_sheet_numbers_equal_the_json(tmp_path):
    from leanspan.beam import parse_beam, solve
    from leanspan.fileio import load_toml

    path = EXAMPLES / "beam-three-span.toml"
    sol = solve(parse_beam(load_toml(path), path.parent, "t: "))
    out = tmp_path / "beam.html"
    sheet.write_beam_sheet(sol, out, units="us", source=str(path))
    html = out.read_text(encoding="utf-8")
    _no_network(html)
    got = keyed(html)
    js = sol.to_json()["results"]
    for name, res in js.items():
        for key, kind in (("M_max", "moment"), ("M_min", "moment"), ("V_max", "force"), ("v_min", "length")):
            f = display_factor(kind, "us")[1]
            assert close_to_sig(float(got[f"{name}.{key}"]), res[key]["value"] / f) or abs(res[key]["value"]) < 1e-6
        for i, r in enumerate(res["reactions"]):
            f = display_factor("force", "us")[1]
            assert close_to_sig(float(got[f"{name}.R{i}.force"]), r["force"] / f)
    for item in ("Deflection checks", "lateral-torsional buckling", "Extremes"):
        assert item in html


def test_plot_files(tmp_path, demo):
    from leanspan.report.diagrams import plot_job

    sel, _ = demo
    chosen = sel.chosen_member
    plot_job(chosen.solution, tmp_path / "demo.svg", section=chosen.section, props=chosen.properties)
    names = sorted(p.name for p in tmp_path.iterdir())
    assert names == ["demo-section.svg", "demo.svg"]  # GUIDE section 4: the beam drawing at OUT itself
    assert "<svg" in (tmp_path / "demo.svg").read_text(encoding="utf-8")
    with pytest.raises(InputError, match=".svg, .png or .pdf"):
        plot_job(chosen.solution, tmp_path / "demo.txt")


def test_committed_demo_sheet_matches_the_demo():
    path = EXAMPLES / "demo-sheet.html"
    html = path.read_text(encoding="utf-8")
    job = parse_job(tomllib.loads(demo_text()), Path("."), "demo: ")
    chosen = run_selection(job).chosen
    got = keyed(html)
    assert f"Chosen: {chosen['name']}" in html
    assert close_to_sig(first_number(got["chosen.mass_per_length"]), chosen["mass_per_length"])
    assert "Invented demo data" in html and sheet.esc(leanspan.CAUTION) in html
    _no_network(html)


def test_importing_the_command_does_not_load_matplotlib():
    import subprocess
    import sys

    code = ("import sys, leanspan.cli, leanspan.cli.select, leanspan.cli.section; "
            "import leanspan.report.sheet; print('matplotlib' in sys.modules)")
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    assert out.stdout.strip() == "False"


def test_print_layout_rules():
    """Short tables print whole and every part after the first starts a page (CSS paged media,
    W3C css-break-3: break-inside / break-before)."""
    from leanspan.report import markup

    short = markup.table(["a"], [["1"]] * markup.KEEP_ROWS)
    long = markup.table(["a"], [["1"]] * (markup.KEEP_ROWS + 1))
    assert 'class="keep"' in short and "keep" not in long
    assert "table.keep { break-inside: avoid" in markup.CSS
    assert "section.part + section.part { break-before: page" in markup.CSS
    assert "h2, h3, caption { break-after: avoid" in markup.CSS


# Invented test beam (not a real project): a linear load that changes sign, an upward point
# load and a clockwise couple in one case; three loads in another.
_MIXED_BEAM = """
units = {length = "m", force = "kN"}
[beam]
name = "invented check beam"
length = 8.0
EI = "5000 kN*m^2"
[[support]]
at = 0
type = "fixed"
[[support]]
at = 5.0
type = "roller"
[[load]]
case = "dead"
type = "linear"
w1 = 2.0
w2 = -1.0
from = 0
to = 6.0
[[load]]
case = "dead"
type = "point"
P = -3.0
at = 2.5
[[load]]
case = "dead"
type = "moment"
M = -1.5
at = 4.0
[[load]]
case = "live"
type = "udl"
w = 1.0
from = 0
to = 3.0
[[load]]
case = "live"
type = "udl"
w = 0.4
from = 1.0
to = 8.0
[[load]]
case = "live"
type = "point"
P = 2.0
at = 8.0
"""


def _drawn(model, **kw):
    """The loaded-beam figure, drawn, with its axes and renderer."""
    from leanspan.report.diagrams import loaded_beam_figure

    fig = loaded_beam_figure(model, **kw)
    fig.canvas.draw()
    return fig, fig.axes[0], fig.canvas.get_renderer()


def _by_gid(ax, prefix, kind="any"):
    """The patches whose id starts with ``prefix``: ``kind`` "block" (load areas), "arrow" or "any"."""
    from matplotlib.patches import FancyArrowPatch, Polygon

    want = {"block": Polygon, "arrow": FancyArrowPatch, "any": object}[kind]
    return [p for p in ax.patches if (p.get_gid() or "").startswith(prefix) and isinstance(p, want)]


def _baseline(ax, case):
    (line,) = [ln for ln in ax.lines if ln.get_gid() == f"baseline:{case}"]
    return line.get_ydata()[0]


def _lane_text_problems(fig, ax, renderer) -> list:
    """Text outside the figure, labels overlapping each other, labels crossing a drawn line."""
    from matplotlib.text import Text

    problems = []
    fb = fig.bbox
    for t in fig.findobj(Text):
        if t.get_visible() and t.get_text():
            b = t.get_window_extent(renderer)
            if b.x0 < fb.x0 - 0.5 or b.x1 > fb.x1 + 0.5 or b.y0 < fb.y0 - 0.5 or b.y1 > fb.y1 + 0.5:
                problems.append(f"outside the figure: {t.get_text()!r}")
    boxes = []
    for t in ax.texts:
        patch = t.get_bbox_patch()
        boxes.append((t.get_text(), patch.get_window_extent(renderer) if patch else t.get_window_extent(renderer)))
    for i, (a, ba) in enumerate(boxes):
        for b, bb in boxes[i + 1:]:
            if ba.overlaps(bb):
                problems.append(f"labels overlap: {a!r} and {b!r}")
    for line in ax.lines:
        path = line.get_transform().transform_path(line.get_path())
        for text, box in boxes:
            if path.intersects_bbox(box, filled=False):
                problems.append(f"{text!r} crosses a line through {line.get_xydata()[0].tolist()}")
    return problems


def test_upward_load_drawn_above_its_own_baseline_with_upward_arrows():
    from leanspan.beam import parse_beam
    from leanspan.fileio import load_toml

    path = EXAMPLES / "beam-gerber.toml"
    model = parse_beam(load_toml(path), path.parent, "t: ")
    fig, ax, r = _drawn(model)
    y_dead, y_wind = _baseline(ax, "dead"), _baseline(ax, "wind")
    lane = y_wind - y_dead
    assert lane > 0
    (wind,) = _by_gid(ax, "load:wind:", "block")  # w = -1.1 kN/m: one piece, upward
    assert wind.get_gid().endswith(":up")
    y = wind.get_xy()[:, 1]
    assert y.min() == pytest.approx(y_wind) and y_wind < y.max() < y_wind + lane
    assert wind.get_xy()[:, 0].min() == pytest.approx(2.0)  # from 2000 mm, x in m
    (dead,) = _by_gid(ax, "load:dead:", "block")
    yd = dead.get_xy()[:, 1]
    assert yd.min() == pytest.approx(y_dead) and yd.max() < y_wind
    up, down = _by_gid(ax, "load:wind:", "arrow"), _by_gid(ax, "load:dead:0:", "arrow")
    assert len(up) >= 5 and len(down) >= 5
    for a in up:
        (x0, y0), (x1, y1) = a._posA_posB
        assert x0 == x1 and 2.0 - 1e-9 <= x0 <= 12.0 + 1e-9 and y0 == pytest.approx(y_wind) and y1 > y0
    for a in down:
        (x0, y0), (x1, y1) = a._posA_posB
        assert y1 == pytest.approx(y_dead) and y0 > y1
    labels = [t.get_text() for t in ax.texts]
    assert "1.1 kN/m upward" in labels and "0.8 kN/m" in labels and "0.6 kN·m" in labels
    assert _lane_text_problems(fig, ax, r) == []


def test_sign_changing_load_is_drawn_to_scale_on_both_sides_of_its_zero():
    from leanspan.beam import parse_beam

    model = parse_beam(tomllib.loads(_MIXED_BEAM), Path("."), "t: ")
    for units in ("si", "us"):
        fig, ax, r = _drawn(model, units=units, title="invented check beam")
        y0 = _baseline(ax, "dead")
        pieces = {p.get_gid(): p.get_xy() for p in _by_gid(ax, "load:dead:0:", "block")}
        assert set(pieces) == {"load:dead:0:down", "load:dead:0:up"}
        sx = display_factor("span", units)[1]
        down, up = pieces["load:dead:0:down"], pieces["load:dead:0:up"]
        # w = 2 -> -1 kN/m over 0..6 m: zero at 4 m; the upward end is half as tall
        assert down[:, 0].min() == pytest.approx(0.0, abs=1e-12) and down[:, 0].max() == pytest.approx(4.0 / sx)
        assert up[:, 0].min() == pytest.approx(4.0 / sx) and up[:, 0].max() == pytest.approx(6.0 / sx)
        assert down[:, 1].min() == pytest.approx(y0) and up[:, 1].min() == pytest.approx(y0)
        assert (up[:, 1].max() - y0) == pytest.approx(0.5 * (down[:, 1].max() - y0))
        assert up[:, 1].max() < _baseline(ax, "live")
        (point,) = _by_gid(ax, "load:dead:1:")
        assert point.get_gid().endswith(":up") and point._posA_posB[1][1] > point._posA_posB[0][1]
        assert [a.get_gid() for a in _by_gid(ax, "load:dead:2:")] == ["load:dead:2:cw"]
        assert any(t.get_text().endswith("upward") and "downward" in t.get_text() for t in ax.texts)
        assert _lane_text_problems(fig, ax, r) == []


@pytest.mark.parametrize("name", ["beam-overhang-spring.toml", "beam-three-span.toml"])
def test_loaded_beam_text_stays_inside_and_apart(name):
    from leanspan.beam import parse_beam
    from leanspan.fileio import load_toml

    model = parse_beam(load_toml(EXAMPLES / name), EXAMPLES, "t: ")
    for units in ("si", "us"):
        assert _lane_text_problems(*_drawn(model, units=units)) == []


@pytest.mark.parametrize("job", ["demo", "select-steel-overhang.toml"])
def test_selection_beam_drawing_keeps_the_self_weight_note_inside(job, demo):
    """The note sits in the dead-load lane beside the 5 kN tip load of the overhang job."""
    from leanspan.fileio import load_toml
    sel = demo[0] if job == "demo" else run_selection(parse_job(load_toml(EXAMPLES / job), EXAMPLES, "t: "))
    model = sel.chosen_member.solution.model
    for units in ("si", "us"):
        fig, ax, r = _drawn(model, units=units)
        assert any(t.get_text().startswith("+ self-weight") for t in ax.texts)
        assert _lane_text_problems(fig, ax, r) == []


def test_characteristic_reactions_per_case_by_statics(demo):
    """The demo's simply supported 4.8 m beam: per load case, the unfactored reactions are the
    lever-rule shares of the case's loads (statics): dead 2.6 kN/m + 3.5 kN at 3.0 m + the chosen
    member's self-weight, snow 2.4 kN/m + 2.0 kN at 3.0 m (the demo job's invented loads)."""
    sel, html = demo
    got = keyed(html)
    L, g = 4.8, 9.80665
    m = sel.chosen["mass_per_length"]
    for case, w, P in (("dead", 2.6 + m * g / 1e3, 3.5), ("snow", 2.4, 2.0)):
        right = w * L / 2 + P * 3.0 / L
        left = w * L + P - right
        assert close_to_sig(first_number(got[f"{case}.R0.force"]), left)   # kN
        assert close_to_sig(first_number(got[f"{case}.R1.force"]), right)


def test_substituted_formulas_reproduce_the_demands(demo):
    """Each formula's numbers give the check's demand: sigma = M / S and tau = V x factor
    (Navier's and Jourawski's formulas), sigma_lt = M / (chi S)."""
    from leanspan.select.chosen import check_rows

    sel, html = demo
    rows = {r.check: r for r in check_rows(sel.chosen_member)}
    vals = lambda r: [t[0] if isinstance(t, tuple) else t for t in r.formula if not isinstance(t, str)]  # noqa: E731
    M, S, sigma = vals(rows["bending"])
    assert M / S == pytest.approx(sel.chosen["demands"]["sigma"], rel=1e-12) and sigma == pytest.approx(M / S)
    V, k, tau = vals(rows["shear"])
    assert V * k == pytest.approx(sel.chosen["demands"]["tau"], rel=1e-12)
    M, chi, S, s_lt = vals(rows["buckling"])[:4]
    assert M / (chi * S) == pytest.approx(sel.chosen["demands"]["sigma_lt"], rel=1e-9)
    assert "Substituted formulas" in html and "σ = |M| / Sz" in html


def test_project_fields_fill_the_title_block(tmp_path, capsys):
    src = demo_text().replace("[beam]", '[project]\nname = "Invented boathouse"\nreference = "J-17"\n'
                                        'revision = "C"\nprepared_by = "A. Nobody"\n\n[beam]', 1)
    job = tmp_path / "job.toml"
    job.write_text(src, encoding="utf-8")
    out = tmp_path / "sheet.html"
    assert main(["select", str(job), "--report", str(out)]) in (0, 1)
    html = out.read_text(encoding="utf-8")
    for label, value in (("Project", "Invented boathouse"), ("Reference", "J-17"), ("Revision", "C"),
                         ("Prepared by", "A. Nobody")):
        assert f"<tr><td><b>{label}</b></td><td>{value}</td></tr>" in html
    assert "<tr><td><b>Checked by</b></td><td></td></tr>" in html  # left blank to sign
    bad = tmp_path / "bad.toml"
    bad.write_text(src.replace("revision", "revison"), encoding="utf-8")
    capsys.readouterr()
    assert main(["select", str(bad)]) == 2
    err = capsys.readouterr().err.strip().splitlines()
    assert len(err) == 1 and "project.revison: unknown key" in err[0]


def test_beam_sheet_carries_the_project_fields(tmp_path):
    src = (EXAMPLES / "beam-three-span.toml").read_text(encoding="utf-8")
    job = tmp_path / "beam.toml"
    job.write_text(src + '\n[project]\nname = "Invented footbridge"\nchecked_by = "B. Somebody"\n', encoding="utf-8")
    out = tmp_path / "beam.html"
    assert main(["beam", str(job), "--report", str(out)]) == 0
    html = out.read_text(encoding="utf-8")
    assert "<tr><td><b>Project</b></td><td>Invented footbridge</td></tr>" in html
    assert "<tr><td><b>Checked by</b></td><td>B. Somebody</td></tr>" in html
