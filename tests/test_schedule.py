"""Member schedules: parsing, equality with `select`, exact rationalisation, Pareto sets, bad input.

References: simply supported span under a uniform load M = w L^2 / 8 and peak shear stress of a
rectangle 1.5 V / (b d) (beam-formula handbooks); elastic modulus of a rectangle b d^2 / 6
(mechanics-of-materials texts); C24 mean density 420 kg/m^3 (EN 338 Table 1, from memory);
optimality by brute-force enumeration of every set of at most K sections (written here); the
Pareto filter by the definition of dominance, pair by pair (written here).
"""

from __future__ import annotations

import itertools
import json
from pathlib import Path

import numpy as np
import pytest

from leanspan.cli import main
from leanspan.schedule.pareto import front
from leanspan.schedule.parse import load_schedule, parse_schedule
from leanspan.schedule.rationalise import rationalise
from leanspan.schedule.run import run_schedule

ROOT = Path(__file__).resolve().parents[1]
EXAMPLE = ROOT / "data" / "examples" / "schedule-workshop-floor.toml"


def _json(capsys, argv, status=0):
    got = main(argv)
    out = capsys.readouterr()
    assert got == status, out.err
    return json.loads(out.out), out.err


# -- a hand-worked rationalisation -----------------------------------------------------------------
HAND = """
# invented: three members, four stock sections
[schedule]
title = "Invented hand check"
[search]
catalog = "stock.csv"
self_weight = "none"
[limits]
bending_stress = "10 MPa"
shear_stress = "10 MPa"
[[member]]
name = "A"
count = 10
spans = ["3 m"]
line_loads = { imposed = "1.5 kN/m" }
[[member]]
name = "B"
count = 4
spans = ["4 m"]
line_loads = { imposed = "1.5 kN/m" }
[[member]]
name = "C"
count = 2
spans = ["4 m"]
line_loads = { imposed = "2.5 kN/m" }
"""
STOCK = """# invented stock
name,family,material,b,d
S1,rectangle,C24,50,150
S2,rectangle,C24,50,200
S3,rectangle,C24,50,250
S4,rectangle,C24,75,250
"""


def _hand_files(tmp_path):
    (tmp_path / "stock.csv").write_text(STOCK, encoding="utf-8")
    path = tmp_path / "hand.toml"
    path.write_text(HAND, encoding="utf-8")
    return path


@pytest.mark.parametrize("k, total, sections", [(1, 283.5, {"S3"}), (2, 220.5, {"S1", "S3"}),
                                                (3, 203.7, {"S1", "S2", "S3"})])
def test_hand_worked_three_member_rationalisation(tmp_path, capsys, k, total, sections):
    """Worked by hand.

    Sz = b d^2 / 6: S1 187 500 mm^3, S2 333 333, S3 520 833, S4 781 250; at 10 MPa the moment
    capacities are 1.875, 3.333, 5.208 and 7.8125 kN m. Mass = b d x 420 kg/m^3: 3.15, 4.2, 5.25,
    7.875 kg/m. Moments w L^2 / 8: A 1.5 x 3^2 / 8 = 1.6875 kN m (S1 to S4 pass), B 1.5 x 4^2 / 8 =
    3.0 (S2 to S4), C 2.5 x 4^2 / 8 = 5.0 (S3, S4). Shear 1.5 V / (b d) stays below 1 MPa. Metres
    of member: A 10 x 3 = 30, B 4 x 4 = 16, C 2 x 4 = 8.
    Own best: 30 x 3.15 + 16 x 4.2 + 8 x 5.25 = 94.5 + 67.2 + 42 = 203.7 kg (K = 3).
    K = 1: only S3 and S4 carry C; S3 for all: 54 x 5.25 = 283.5 kg.
    K = 2: {S1, S3}: 94.5 + 16 x 5.25 + 42 = 220.5; {S2, S3}: 30 x 4.2 + 67.2 + 42 = 235.2;
    {S1, S4}: 94.5 + 24 x 7.875 = 283.5; {S2, S4}, {S3, S4} are heavier still: 220.5 kg.
    """
    path = _hand_files(tmp_path)
    out, _ = _json(capsys, ["schedule", str(path), "--json", "--sizes", str(k)])
    s = out["sizes"]
    assert s["feasible"] and s["total"] == pytest.approx(total, rel=1e-9)
    assert {x["section"] for x in s["sections"]} == sections
    assert s["totals"]["mass"] == pytest.approx(total, rel=1e-9)
    assert out["totals"]["mass"] == pytest.approx(203.7, rel=1e-9)
    pen = {p["sizes"]: p["penalty"] for p in s["penalty"]}
    assert pen[1] == pytest.approx(283.5 / 203.7 - 1, rel=1e-9)
    assert pen[2] == pytest.approx(220.5 / 203.7 - 1, rel=1e-9)
    assert pen[3] == pytest.approx(0.0, abs=1e-12)
    own = {m["name"]: m["own"]["section"] for m in out["members"]}
    assert own == {"A": "S1", "B": "S2", "C": "S3"}
    # A on S1: 1.6875 / 1.875 = 0.9 in bending
    a = next(m for m in out["members"] if m["name"] == "A")
    assert a["own"]["utilisation"] == pytest.approx(0.9, rel=1e-6) and a["own"]["governing"] == "bending"


# -- optimal: equal to exhaustive search ------------------------------------------------------------
def _exhaustive(P, w, v, k, groups):
    """The least total over every set of at most k sections per group (inf if none covers all)."""
    m = P.shape[1]
    best = np.inf
    for r in range(1, m + 1):
        for S in itertools.combinations(range(m), r):
            S = list(S)
            if np.bincount(groups[S]).max() > k:
                continue
            cost = np.where(P[:, S], w[:, None] * v[S][None, :], np.inf).min(axis=1)
            best = min(best, cost.sum())
    return best


def test_rationalisation_equals_exhaustive_search_on_200_random_schedules():
    rng = np.random.default_rng(20261203)
    checked_infeasible = 0
    for _ in range(200):
        n, m = int(rng.integers(1, 8)), int(rng.integers(1, 8))
        P = rng.random((n, m)) < rng.uniform(0.2, 0.9)
        w = rng.uniform(0.5, 5.0, n)
        v = rng.uniform(1.0, 10.0, m)
        if rng.random() < 0.3:
            v = np.round(v)  # ties between sections
        k = int(rng.integers(1, 4))
        groups = rng.integers(0, 2, m) if rng.random() < 0.3 else np.zeros(m, int)
        got = rationalise(P, w, v, k, groups)
        want = _exhaustive(P, w, v, k, groups)
        if np.isinf(want):
            assert not got.feasible
            checked_infeasible += 1
            continue
        assert got.feasible and got.total == pytest.approx(want, rel=1e-9)
        # the reported choice is a valid assignment with that total and at most k per group
        assert P[np.arange(n), got.choice].all()
        assert np.bincount(groups[np.unique(got.choice)]).max() <= k
        assert np.sum(w * v[got.choice]) == pytest.approx(got.total, rel=1e-12)
    assert checked_infeasible > 0  # the draw includes schedules no K covers


def test_greedy_fallback_is_feasible_and_not_claimed_optimal():
    rng = np.random.default_rng(7)
    P = rng.random((30, 12)) < 0.6
    P[:, 0] = True  # one section passes everything, so K = 1 is feasible
    w, v = rng.uniform(1, 3, 30), rng.uniform(1, 9, 12)
    exact = rationalise(P, w, v, 2)
    greedy = rationalise(P, w, v, 2, max_pairs=0)
    assert greedy.method == "greedy" and not greedy.optimal and greedy.feasible
    assert greedy.total >= exact.total * (1 - 1e-12)
    assert exact.total == pytest.approx(_exhaustive(P, w, v, 2, np.zeros(12, int)), rel=1e-9)


# -- a member equals `leanspan select` on that member alone -----------------------------------------
ALONE = """
[beam]
title = "{title}"
spans = ["{span}"]
{loads}
[[combination]]
name = "strength"
factors = {{ dead = 1.35, imposed = 1.5 }}
[[combination]]
name = "imposed deflection"
factors = {{ imposed = 1.0 }}
check = "deflection"
limit = "span/360"
[[combination]]
name = "total deflection"
factors = {{ dead = 1.0, imposed = 1.0 }}
check = "deflection"
limit = "span/250"
[search]
families = ["sawn_metric", "glulam"]
max_depth = "300 mm"
self_weight = "dead"
{search}
[limits]
stress_factor = 0.6
"""


def _alone(path, title, span, loads, search=""):
    """A select job for one member of the example, its loads written out: (case, type, values)."""
    text = "".join(f'[[load]]\ncase = "{case}"\ntype = "{kind}"\n'
                   + "".join(f'{k} = "{v}"\n' for k, v in values.items()) for case, kind, values in loads)
    path.write_text(ALONE.format(title=title, span=span, loads=text, search=search), encoding="utf-8")
    return str(path)


def test_schedule_members_equal_select_alone(tmp_path, capsys):
    """J1 (a CSV row: spacing x area loads, a width limit) and B1 (tributary width, point loads),
    written out by hand as select jobs: area load x width = line load."""
    sched, _ = _json(capsys, ["schedule", str(EXAMPLE), "--json"])
    by_name = {m["name"]: m for m in sched["members"]}
    j1 = _alone(tmp_path / "j1.toml", "J1 alone", "3.6 m",
                [("dead", "udl", {"w": "0.24 kN/m"}),       # 0.6 kN/m^2 x 0.4 m
                 ("imposed", "udl", {"w": "0.8 kN/m"})],     # 2.0 kN/m^2 x 0.4 m
                'max_width = "75 mm"')
    alone, _ = _json(capsys, ["select", j1, "--json"])
    assert by_name["J1"]["chosen"] == alone["chosen"]
    b1 = _alone(tmp_path / "b1.toml", "B1 alone", "3.6 m",
                [("dead", "udl", {"w": "0.78 kN/m"}),       # 0.6 kN/m^2 x 1.3 m
                 ("imposed", "udl", {"w": "2.6 kN/m"}),      # 2.0 kN/m^2 x 1.3 m
                 ("dead", "point", {"P": "2.5 kN", "at": "1.2 m"}),
                 ("imposed", "point", {"P": "4 kN", "at": "1.2 m"})])
    alone, _ = _json(capsys, ["select", b1, "--json"])
    assert by_name["B1 stair trimmer"]["chosen"] == alone["chosen"]


def test_every_member_equals_run_selection_on_its_own_job():
    from leanspan.select.search import run_selection

    schedule = load_schedule(EXAMPLE)
    run = run_schedule(schedule)
    for i, m in enumerate(schedule.members):
        sel = run_selection(m.job)  # the member's own search, its own catalogue table
        out = run.outcomes[run.member_type[i]]
        assert out.chosen == sel.chosen
        assert np.array_equal(np.sort(out.rows), np.flatnonzero(sel.result.passes))


def test_identical_members_are_solved_once_and_jobs_agree():
    data = {"search": {"families": ["sawn_metric"], "materials": ["C24"]}, "limits": {"stress_factor": 0.6},
            "member_defaults": {"spacing": "0.4 m", "area_loads": {"dead": "0.5 kPa", "imposed": "1.5 kPa"}},
            "member": [{"name": f"J{i}", "spans": s} for i, s in
                       enumerate(["3.6 m", "3600 mm", "4.2 m", "3.6 m", "2.4 m", "4.2 m"])]}
    schedule = parse_schedule(data, Path("."), "x.toml")
    one = run_schedule(schedule)
    assert len(one.outcomes) == 3 and one.member_type.tolist() == [0, 0, 1, 0, 2, 1]
    two = run_schedule(schedule, jobs=2)
    assert [o.chosen for o in one.outcomes] == [o.chosen for o in two.outcomes]


# -- Pareto sets against a brute-force filter ---------------------------------------------------------
def _brute_front(a, b):
    keep = []
    for i in range(a.size):
        dominated = any(a[j] <= a[i] and b[j] <= b[i] and (a[j] < a[i] or b[j] < b[i]) for j in range(a.size))
        if not dominated:
            keep.append(i)
    return keep


def test_pareto_front_equals_brute_force_filter():
    rng = np.random.default_rng(5)
    for _ in range(200):
        n = int(rng.integers(1, 30))
        a, b = rng.integers(0, 8, n).astype(float), rng.integers(0, 8, n).astype(float)  # many ties
        assert front(a, b).tolist() == _brute_front(a, b)


def test_schedule_pareto_sets_are_the_non_dominated_passing_sections(capsys):
    out, _ = _json(capsys, ["schedule", str(EXAMPLE), "--json", "--pareto", "mass,depth"])
    schedule = load_schedule(EXAMPLE)
    run = run_schedule(schedule)
    cols = run.candidates
    for t in out["pareto"]["types"]:
        o = run.outcomes[t["type"] - 1]
        ids = o.candidates
        keep = _brute_front(cols["mass_per_length"][ids], cols["depth"][ids])
        want = {(cols["name"][ids[i]], cols["material"][ids[i]]) for i in keep}
        assert {(p["section"], p["material"]) for p in t["front"]} == want
        length = run.members[int(np.flatnonzero(run.member_type == t["type"] - 1)[0])].job.model.length
        for p in t["front"]:
            c = next(i for i in ids if cols["name"][i] == p["section"] and cols["material"][i] == p["material"])
            assert p["mass"] == pytest.approx(cols["mass_per_length"][c] * length, rel=1e-12)


# -- objectives ----------------------------------------------------------------------------------
def test_cost_objective_picks_the_cheapest_passing_section(tmp_path, capsys):
    """Steel at 0.01 per kg is far cheaper than any timber at 100 per kg: every member goes steel,
    and its cost is count x length x kg/m x 0.01."""
    path = _hand_files(tmp_path)
    text = HAND.replace('catalog = "stock.csv"', 'families = ["sawn_metric", "gen_steel_i"]')
    text += '[[price]]\nkind = "timber"\nper_kg = 100\n[[price]]\nkind = "steel"\nper_kg = 0.01\n'
    path.write_text(text, encoding="utf-8")
    out, _ = _json(capsys, ["schedule", str(path), "--json", "--objective", "cost"])
    for m in out["members"]:
        assert m["own"]["material"] == "S355"
        assert m["own"]["cost"] == pytest.approx(m["count"] * m["length"] * m["chosen"]["mass_per_length"] * 0.01)
    by_mass, _ = _json(capsys, ["schedule", str(path), "--json"])
    assert {m["own"]["material"] for m in by_mass["members"]} == {"C24"}  # timber is lighter here


def test_carbon_uses_the_default_factor_unless_overridden(tmp_path, capsys):
    from leanspan.schedule.objectives import CARBON_FACTORS

    path = _hand_files(tmp_path)
    out, _ = _json(capsys, ["schedule", str(path), "--json"])
    assert out["totals"]["carbon"] == pytest.approx(203.7 * CARBON_FACTORS["timber"][0], rel=1e-9)
    path.write_text(HAND + '[carbon]\nC24 = { factor = 0.5, source = "invented EPD" }\n', encoding="utf-8")
    out, _ = _json(capsys, ["schedule", str(path), "--json"])
    assert out["totals"]["carbon"] == pytest.approx(203.7 * 0.5, rel=1e-9)
    assert {"name": "C24", "factor": 0.5, "source": "invented EPD"} in out["carbon_factors"]


# -- bad input ------------------------------------------------------------------------------------
def test_bad_rows_are_named_the_rest_run_and_the_exit_is_2(tmp_path, capsys):
    path = _hand_files(tmp_path)
    (tmp_path / "more.csv").write_text("name,spans [m],line.imposed [kN/m],count\nD,3,1.5,2\nE,3,lots,1\n"
                                       "F,3,1.5,1,9\n", encoding="utf-8")
    path.write_text(HAND.replace('title = "Invented hand check"', 'members_file = "more.csv"')
                    + '[[member]]\nname = "G"\nspans = "3 m"\nspacing = "0.4 m"\n', encoding="utf-8")
    csv_out = tmp_path / "out.csv"
    status = main(["schedule", str(path), "--json", "--csv", str(csv_out)])
    cap = capsys.readouterr()
    assert status == 2
    out = json.loads(cap.out)
    assert [m["name"] for m in out["members"]] == ["A", "B", "C", "D"]
    lines = cap.err.strip().splitlines()
    assert lines[0] == ("leanspan schedule: error: " + f"{path}: member G ([[member]] 4): spacing: given without "
                        "area_loads (loads per area to multiply it by)")
    assert lines[1].startswith("leanspan schedule: error: more.csv row 3 (member E): load[1].w: ")
    assert "'lots'" in lines[1]
    assert lines[2] == ("leanspan schedule: error: more.csv row 4 (member F): expected 4 cells (name, spans, "
                        "line.imposed, count), got 5")
    assert lines[3] == ("leanspan schedule: error: 3 of 7 members have bad input and were not selected: "
                        "G ([[member]] 4), E (more.csv row 3), F (more.csv row 4)")
    assert all("Traceback" not in x for x in lines)
    assert csv_out.read_text().count("\n") == 5  # header + the four good members


def test_a_member_where_nothing_passes_is_listed_and_exits_1(tmp_path, capsys):
    path = _hand_files(tmp_path)
    path.write_text(HAND + '[[member]]\nname = "H"\nspans = ["9 m"]\nline_loads = { imposed = "9 kN/m" }\n',
                    encoding="utf-8")
    out, _ = _json(capsys, ["schedule", str(path), "--json", "--sizes", "2"], status=1)
    assert out["no_pass"] == ["H"]
    h = next(m for m in out["members"] if m["name"] == "H")
    assert h["chosen"] is None and h["closest"]["name"] == "S4" and not h["passes"]
    assert out["sizes"]["total"] == pytest.approx(220.5, rel=1e-9)  # H left out of the rationalisation
    main(["schedule", str(path)])
    assert "Nothing passes for: H" in capsys.readouterr().out


@pytest.mark.parametrize("extra, message", [
    ('[schedule]\nsizes = 0\n', "schedule.sizes: expected a whole number"),
    ('[schedule]\nobjective = "price"\n', "schedule.objective: expected one of mass, depth, cost, carbon"),
    ('[schedule]\ncolour = 1\n', "schedule.colour: unknown key"),
    ('[[price]]\nmaterial = "C24"\n', "price[1]: give per_kg or per_m"),
    ('[carbon]\nC24 = "low"\n', "carbon.C24: expected kg CO2e per kg"),
    ('[schedule]\nmembers_file = "none.csv"\n', "schedule.members_file: file"),
])
def test_a_bad_schedule_file_is_one_line_and_exit_2(tmp_path, capsys, extra, message):
    path = tmp_path / "s.toml"
    body = HAND.replace('[schedule]\ntitle = "Invented hand check"\n', "")
    path.write_text(extra + body.replace('catalog = "stock.csv"', 'families = ["sawn_metric"]'), encoding="utf-8")
    assert main(["schedule", str(path)]) == 2
    err = capsys.readouterr().err.strip().splitlines()
    assert len(err) == 1 and message in err[0] and err[0].startswith(f"leanspan schedule: error: {path}: ")


def test_bad_options_exit_2(tmp_path, capsys):
    path = _hand_files(tmp_path)
    for argv, message in ((["--jobs", "0"], "--jobs"), (["--pareto", "mass,mass"], "--pareto"),
                          (["--plot", str(tmp_path / "p.svg")], "--plot: nothing to draw")):
        assert main(["schedule", str(path), *argv]) == 2
        assert message in capsys.readouterr().err


def test_text_markdown_plot_and_sheet_are_written(tmp_path, capsys):
    path = _hand_files(tmp_path)
    md, plot, sheet = tmp_path / "s.md", tmp_path / "k.svg", tmp_path / "s.html"
    assert main(["schedule", str(path), "--sizes", "2", "--pareto", "mass,depth", "--markdown", str(md),
                 "--plot", str(plot), "--report", str(sheet)]) == 0
    text = capsys.readouterr().out
    assert "Rationalised to at most 2 sections (exact MILP, optimal)" in text and "CAUTION" in text
    assert "| A | 10 |" in md.read_text() and "> CAUTION" in md.read_text()
    assert plot.read_text().startswith("<?xml") and (tmp_path / "k-pareto.svg").exists()
    html = sheet.read_text(encoding="utf-8")
    assert html.count('class="part"') >= 4 and "licensed" in html  # summary + 3 member types


def test_the_readme_figures_of_the_example(capsys):
    """The README quotes the example's masses and penalties; they are the program's numbers."""
    out, _ = _json(capsys, ["schedule", str(EXAMPLE), "--json"])
    s = out["sizes"]
    assert round(out["totals"]["mass"], 1) == 460.2 and out["totals"]["distinct_sections"] == 7
    assert round(s["total"], 1) == 493.0 and s["method"] == "milp" and s["optimal"]
    pen = {p["sizes"]: p for p in s["penalty"]}
    assert round(100 * pen[3]["penalty"], 1) == 7.1 and round(100 * pen[2]["penalty"], 1) == 14.5
    assert not pen[1]["feasible"]
    text = (ROOT / "README.md").read_text(encoding="utf-8")
    assert "460.2 kg in 7 distinct sections" in text and "493.0 kg, 7.1 % more" in text


def test_penalty_table_past_its_budget_uses_greedy_never_below_the_exact_totals():
    from leanspan.schedule.rationalise import penalty_table

    rng = np.random.default_rng(3)
    P = rng.random((40, 15)) < 0.5
    P[:, 0] = True
    w, v = rng.uniform(1, 2, 40), rng.uniform(1, 9, 15)
    exact, late = penalty_table(P, w, v), penalty_table(P, w, v, budget=-1.0)
    assert [r.k for r in exact] == [r.k for r in late] and exact[-1].method == "each"
    for a, b in zip(exact, late):
        assert b.method in ("greedy", "each") and b.total >= a.total * (1 - 1e-12)
    # K = 1 exactly: the best single section passing all 40 members (brute force over the 15)
    single = min(float(np.sum(w * v[j])) for j in range(15) if P[:, j].all())
    assert exact[0].total == pytest.approx(single, rel=1e-12)


def test_the_progress_bar_shows_only_on_a_terminal(monkeypatch):
    import io

    from leanspan.schedule import run as run_module

    class Tty(io.StringIO):
        def isatty(self):
            return True

    monkeypatch.setattr("sys.stderr", io.StringIO())
    assert isinstance(run_module._bar(10, True), run_module._NoBar)   # a pipe or file: nothing
    monkeypatch.setattr("sys.stderr", Tty())
    assert isinstance(run_module._bar(10, False), run_module._NoBar)  # --quiet: nothing
    bar = run_module._bar(10, True)
    assert not isinstance(bar, run_module._NoBar)
    bar.close()
