"""The timber design basis ([design]) and the bearing check, against the published tables and
hand calculations.

Table values are recalled from the standards (from memory), each with its source beside it;
the tables in leanspan/select/design.py were typed separately. Hand calculations use statics and
the textbook deflection formulas.
"""

from __future__ import annotations

import json
import re
from pathlib import Path

import numpy as np
import pytest

from leanspan.catalog.table import catalog_table
from leanspan.cli import main
from leanspan.select.design import DURATIONS, gamma_M, kdef, kh, kmod

# EN 1995-1-1:2004 Table 3.1, solid timber (EN 14081-1) and glulam (EN 14080), from memory:
# service class -> kmod for permanent, long-term, medium-term, short-term, instantaneous actions
KMOD_TABLE = {1: (0.60, 0.70, 0.80, 0.90, 1.10), 2: (0.60, 0.70, 0.80, 0.90, 1.10),
              3: (0.50, 0.55, 0.65, 0.70, 0.90)}
# EN 1995-1-1:2004 Table 3.2, solid timber and glulam, from memory
KDEF_TABLE = {1: 0.60, 2: 0.80, 3: 2.00}


@pytest.mark.parametrize("sc", [1, 2, 3])
def test_kmod_and_kdef_against_en1995_tables(sc):
    assert [kmod(sc, d) for d in DURATIONS] == list(KMOD_TABLE[sc])
    assert kdef(sc) == KDEF_TABLE[sc]


def test_partial_factors():
    # EN 1995-1-1 Table 2.3 (from memory): solid timber 1.3, glued laminated timber 1.25;
    # EN 1993-1-1 6.1 recommended gamma_M0 = 1.0 (from memory)
    assert gamma_M("timber") == 1.3 and gamma_M("glulam") == 1.25 and gamma_M("steel") == 1.0


def test_depth_factor_kh():
    # EN 1995-1-1 3.2(3) (from memory): solid timber kh = min((150/h)^0.2, 1.3) for h < 150 mm,
    # characteristic density <= 700 kg/m3; 3.3(3): glulam kh = min((600/h)^0.1, 1.1) for h < 600 mm
    got = kh(["timber"] * 4 + ["glulam"] * 3 + ["timber", "steel"],
             [0.100, 0.050, 0.030, 0.200, 0.300, 0.100, 0.800, 0.050, 0.050],
             [350.0] * 8 + [np.nan])
    want = [1.5**0.2, 3**0.2, 1.3, 1.0, 2**0.1, 1.1, 1.0, 3**0.2, 1.0]
    assert got == pytest.approx(want, rel=1e-12)
    assert float(kh(["timber"], [0.05], [900.0])[0]) == 1.0  # dense hardwood: no depth factor


JOB = """
[beam]
spans = [{spans}]
{supports}
[[load]]
case = "dead"
type = "udl"
w = "{g} kN/m"
[[load]]
case = "{qcase}"
type = "udl"
w = "{q} kN/m"
[[combination]]
name = "ULS"
factors = {{dead = 1.35, {qcase} = 1.5}}
[[combination]]
name = "SLS"
factors = {{dead = 1.0, {qcase} = 1.0}}
check = "deflection"
limit = "span/300"
[search]
{search}
self_weight = "none"
{limits}
[design]
service_class = {sc}
duration = {{dead = "permanent", {qcase} = "{duration}"}}
psi2 = {{{qcase} = {psi2}}}
{design}
"""


def _job(tmp_path, **kw):
    parts = dict(spans='"4 m"', supports="", g=1.0, q=2.0, qcase="imposed", sc=1, duration="medium", psi2=0.3,
                 search='families = ["sawn_metric"]\nmaterials = ["C24"]', limits="", design="")
    parts.update(kw)
    path = tmp_path / "job.toml"
    path.write_text(JOB.format(**parts), encoding="utf-8")
    return path


def _select(path, capsys, *args):
    status = main(["select", str(path), "--json", "--top", "400", *args])
    cap = capsys.readouterr()
    assert status in (0, 1), cap.err
    return json.loads(cap.out), cap.err


def _rows(out, family):
    table = catalog_table(families=[family]).set_index("name")
    return [(c, table.loc[c["name"]]) for c in out["candidates"]]


@pytest.mark.parametrize("qcase,duration,sc,k_mod", [("imposed", "medium", 1, 0.8), ("snow", "short", 3, 0.7)])
def test_design_bending_and_shear_by_hand(tmp_path, capsys, qcase, duration, sc, k_mod):
    """M = w L^2 / 8, V = w L / 2 (statics); f_m,d = kmod kh f_m,k / gamma_M and f_v,d = kmod k_cr f_v,k /
    gamma_M with C24 f_m,k = 24 MPa, f_v,k = 4.0 MPa (EN 338:2016 Table 1), gamma_M = 1.3, k_cr = 0.67
    (EN 1995-1-1, from memory); kmod of the shorter-duration case (3.1.3(2))."""
    out, _ = _select(_job(tmp_path, qcase=qcase, duration=duration, sc=sc), capsys)
    L, w = 4.0, 1.35 * 1e3 + 1.5 * 2e3
    assert out["checks"]["deflection_final"]["kmod"][0]["kmod"] == k_mod
    for cand, row in _rows(out, "sawn_metric")[:40]:
        h, b = row.depth * 1e3, row.width * 1e3
        k_h = min((150 / h) ** 0.2, 1.3) if h < 150 else 1.0
        sigma = w * L**2 / 8 / (b * h**2 / 6 * 1e-9)
        tau = 1.5 * w * L / 2 / (b * h * 1e-6)
        assert cand["utilisation"]["bending"] == pytest.approx(sigma / (k_mod * k_h * 24e6 / 1.3), rel=1e-9)
        assert cand["utilisation"]["shear"] == pytest.approx(tau / (k_mod * 0.67 * 4.0e6 / 1.3), rel=1e-6)


def test_final_deflection_with_creep_by_hand(tmp_path, capsys):
    """u_fin = u_G (1 + kdef) + u_Q (1 + psi2 kdef) (EN 1995-1-1 2.2.3, from memory), u = 5 w L^4 /
    (384 E I) (simply supported span, any handbook), kdef = 0.8 in service class 2 (Table 3.2), psi2 =
    0.3; a steel candidate does not creep (u_fin = u_inst)."""
    path = _job(tmp_path, sc=2, design='final_limit = "span/250"',
                search='families = ["sawn_metric", "gen_steel_i"]\nmaterials = ["C24", "S355"]')
    out, _ = _select(path, capsys)
    L = 4.0
    assert out["checks"]["deflection_final"]["kdef"] in (0.8, 0.0)
    for cand in out["candidates"][:60]:
        row = catalog_table(families=[cand["family"] if cand["family"] == "rectangle" else "ibeam"],
                            materials=[cand["material"]]).set_index("name").loc[cand["name"]]
        u = lambda w: 5 * w * L**4 / (384 * row.E * row.Iz)  # noqa: E731
        kd = 0.8 if cand["material"] == "C24" else 0.0
        u_fin = u(1e3) * (1 + kd) + u(2e3) * (1 + 0.3 * kd)
        assert cand["demands"]["u_fin"] == pytest.approx(u_fin, rel=1e-9)
        assert cand["utilisation"]["deflection_final"] == pytest.approx(u_fin / (L / 250), rel=1e-9)
        assert cand["demands"]["v_abs"] == pytest.approx(u(3e3), rel=1e-9)  # the instantaneous one


def test_details_and_sheet_show_the_basis(tmp_path, capsys):
    sheet = tmp_path / "sheet.html"
    out, _ = _select(_job(tmp_path), capsys, "--report", str(sheet))
    det = out["checks"]["deflection_final"]
    assert det["gamma_M"] == 1.3 and det["k_cr"] == 0.67 and det["kdef"] == 0.6 and det["service_class"] == 1
    assert {(p["case"], p["psi2"]) for p in det["psi2"]} == {("dead", 1.0), ("imposed", 0.3)}
    assert "Table 3.1" in det["sources"]["kmod"] and "Table 2.3" in det["sources"]["gamma_M"]
    html = sheet.read_text(encoding="utf-8")
    assert "Design basis" in html and "EN 1995-1-1 Table 3.1" in html and "final deflection with creep" in html
    assert "creep and long-term deflection" not in html  # covered now


def test_basis_and_strength_bases_that_do_not_match_warn(tmp_path, capsys):
    out, err = _select(_job(tmp_path, search='families = ["sawn_metric", "sawn_dressed_in"]'), capsys)
    assert "warning: design:" in err and "DF-L" in err and "reference ASD" in err


SUPPORTS = """
[[support]]
at = "0 m"
type = "pin"
bearing_length = "{a}"
[[support]]
at = "{mid}"
type = "roller"
bearing_length = "{b}"
"""


def test_timber_bearing_by_hand(tmp_path, capsys):
    """Two equal spans under a UDL: end reactions 3 w L / 8, the middle one 10 w L / 8 (statics of the
    continuous beam, any handbook). EN 1995-1-1 6.1.5 (from memory): F = kc90 f_c,90,d b l_ef, kc90 =
    1, l_ef = l + 30 mm at the end support (member ends there), l + 2 x 30 mm at the middle;
    f_c,90,d = kmod f_c,90,k / gamma_M = 0.8 x 2.5 / 1.3 MPa (C24, EN 338:2016 Table 1)."""
    path = _job(tmp_path, spans='"3 m", "3 m"', supports=SUPPORTS.format(a="60 mm", mid="3 m", b="100 mm"))
    out, _ = _select(path, capsys)
    L, w, f = 3.0, 1.35e3 + 1.5 * 2e3, 0.8 * 2.5e6 / 1.3
    for cand, row in _rows(out, "sawn_metric")[:40]:
        b = row.width
        end = max(3 * w * L / 8 / (f * b) - 0.030, 3 * w * L / 8 / (f * b) / 2)  # l + min(30 mm, l)
        mid_T = 10 * w * L / 8 / (f * b)
        mid = mid_T - 0.060 if mid_T > 0.090 else mid_T / 3
        req = cand["demands"]["bearing_required"]
        assert req[0] == pytest.approx(end, rel=1e-9) and req[2] == pytest.approx(end, rel=1e-9)
        assert req[1] == pytest.approx(mid, rel=1e-9)
        assert cand["utilisation"]["bearing"] == pytest.approx(max(end / 0.060, mid / 0.100), rel=1e-9)
    sup = out["checks"]["bearing"]["supports"]
    assert sup[1]["reaction"] == pytest.approx(10 * w * L / 8, rel=1e-9) and sup[2]["given"] is None
    assert sup[0]["combination"] == "ULS" and "EN 1995-1-1 6.1.5" in out["checks"]["bearing"]["method"]


def test_steel_bearing_by_hand(tmp_path, capsys):
    """Local web yielding, AISC 360-16 J10.2 (from memory): R = f tw (2.5 k + lb) at an end (lb >= k),
    R = f tw (5 k + lb) at an interior support farther than d from the ends; k = tf + r; the user
    basis f = stress_factor x fy."""
    text = _job(tmp_path, spans='"3 m", "3 m"', supports=SUPPORTS.format(a="100 mm", mid="3 m", b="150 mm"),
                search='families = ["gen_steel_i"]', limits="[limits]\nstress_factor = 0.9").read_text()
    path = tmp_path / "steel.toml"
    path.write_text(text.split("[design]")[0], encoding="utf-8")  # the user basis
    out, _ = _select(path, capsys)
    L, w = 3.0, 1.35e3 + 1.5 * 2e3
    checked = 0
    for cand, row in _rows(out, "gen_steel_i")[:60]:
        f, k, tw = 0.9 * row.strength_bending, row.tf + row.r, row.tw
        end = max(3 * w * L / 8 / (f * tw) - 2.5 * k, k)
        mid = max(10 * w * L / 8 / (f * tw) - 5 * k, 0.0)
        req = cand["demands"]["bearing_required"]
        assert req[0] == pytest.approx(end, rel=1e-9, abs=1e-15) and req[1] == pytest.approx(mid, abs=1e-12)
        checked += 1
    assert checked and "J10.2" in out["checks"]["bearing"]["method"]


def test_no_bearing_length_reports_the_length_without_a_utilisation(tmp_path, capsys):
    out, _ = _select(_job(tmp_path), capsys)
    c = out["chosen"]
    assert c["utilisation"]["bearing"] is None and all(v > 0 for v in c["demands"]["bearing_required"])


def test_vectorised_equals_the_per_candidate_loop():
    """screen (vectorised) against screen_loop (one beam solve per candidate) with [design] on, a
    spring support and pattern loading, for the design strengths, the final deflection and the
    bearing lengths."""
    import tomllib

    from leanspan.select.job import parse_job
    from leanspan.select.screen import screen, screen_loop
    from leanspan.select.search import candidates_from_table

    text = JOB.format(spans='"3 m", "2.5 m"', supports='[[support]]\nat = "5.5 m"\ntype = "spring"\nk = "3 MN/m"\n'
                      'bearing_length = "90 mm"', g=1.0, q=2.0, qcase="imposed", sc=2, duration="short", psi2=0.3,
                      search='families = ["sawn_metric"]', limits="", design="")
    text = text.replace('self_weight = "none"', 'self_weight = "dead"').replace(
        "imposed = 1.5}", 'imposed = 1.5}\npattern = "imposed"')  # pattern members reduced to their combination
    job = parse_job(tomllib.loads(text), Path("."))
    df = catalog_table(families=["sawn_metric", "gen_steel_i"]).iloc[::25]
    cand = candidates_from_table(df, job.limits)
    fast, slow = screen(job.model, cand), screen_loop(job.model, cand)
    for name in ("bending", "shear", "deflection", "deflection_final"):
        assert np.allclose(fast.utilisation[name], slow.utilisation[name], rtol=1e-9, atol=0), name
    assert np.allclose(fast.columns["bearing"], slow.columns["bearing"], rtol=1e-9, atol=1e-15, equal_nan=True)


@pytest.mark.parametrize("design,supports,limits,words", [
    ('', SUPPORTS.format(a="-50 mm", mid="4 m", b="100 mm"), "", ["support[1].bearing_length", "positive"]),
    ('', SUPPORTS.format(a="0 mm", mid="4 m", b="100 mm"), "", ["support[1].bearing_length"]),
    ('duration = {dead = "permanent", imposed = "forever"}', "", "", ["design.duration.imposed", "forever"]),
    ('service_class = 4', "", "", ["design.service_class", "1, 2 or 3"]),
    ('psi2 = {imposed = 1.5}', "", "", ["design.psi2.imposed", "0 to 1"]),
    ('duration = {dead = "permanent"}', "", "", ["design.duration", "imposed"]),
    ('psi2 = {}', "", "", ["design.psi2", "imposed"]),
    ('colour = "red"', "", "", ["design.colour", "unknown key"]),
    ('', "", "[limits]\nstress_factor = 0.6", ["limits.stress_factor", "[design]"]),
    ("drop", SUPPORTS.format(a="50 mm", mid="4 m", b="100 mm"),
     '[limits]\nbending_stress = "10 MPa"\nshear_stress = "1 MPa"', ["limits.bearing_stress", "support[1]"]),
])
def test_bad_design_and_bearing_input(tmp_path, capsys, design, supports, limits, words):
    text = _job(tmp_path, supports=supports, limits=limits).read_text()
    if design == "drop":  # no [design]: the user basis
        text = text.split("[design]")[0]
    elif design:  # replace the [design] key it names
        key = design.split(" =")[0]
        lines = [ln for ln in text.split("[design]")[1].splitlines() if ln and not ln.startswith(key + " ")]
        text = text.split("[design]")[0] + "[design]\n" + "\n".join(lines + [design]) + "\n"
    path = tmp_path / "bad.toml"
    path.write_text(text, encoding="utf-8")
    status = main(["select", str(path)])
    err = capsys.readouterr().err
    assert status == 2 and err.count("\n") == 1 and "Traceback" not in err, err
    for w in words:
        assert w in err, err


def test_box_bearing_by_hand_and_uncovered_shapes_fail(tmp_path, capsys):
    """Rectangular hollow sections: both walls yield, R = f 2t (2.5 k + lb) at an end, lb >= k, k =
    the outer corner radius (ANSI/AISC 360 chapter K, from memory); end reaction w L / 2 (statics).
    Round tubes are not covered: with a bearing_length given they fail the check (null length)."""
    path = tmp_path / "box.toml"
    path.write_text('[beam]\nspans = ["4 m"]\n[[support]]\nat = "0 m"\ntype = "pin"\nbearing_length = "20 mm"\n'
                    '[[load]]\ncase = "dead"\ntype = "udl"\nw = "60 kN/m"\n[search]\nfamilies = ["gen_shs_rhs", '
                    '"gen_chs"]\nself_weight = "none"\n[limits]\nstress_factor = 1.0\n', encoding="utf-8")
    out, _ = _select(path, capsys)
    table = catalog_table(families=["gen_shs_rhs", "gen_chs"]).set_index("name")
    seen = set()
    for cand in out["candidates"]:
        row = table.loc[cand["name"]]
        req = cand["demands"]["bearing_required"]
        if cand["family"] == "tube":
            assert req[0] is None and cand["utilisation"]["bearing"] is None and not cand["passes"]
        else:
            k = row.r if row.r > 0 else 1.5 * row.t
            assert req[0] == pytest.approx(max(60e3 * 4 / 2 / (row.strength_bending * 2 * row.t) - 2.5 * k, k),
                                           rel=1e-9)
        seen.add(cand["family"])
    assert "box" in seen


def test_the_invented_example_by_hand(tmp_path, capsys):
    """data/examples/select-glulam-design-basis.toml: the chosen glulam beam's bending utilisation
    M / (S kmod kh f_m,g,k / gamma_M) with M = w L^2 / 8 (statics), kmod = 0.9 (service class 2, short
    term: EN 1995-1-1 Table 3.1), kh = (600 / h)^0.1 (3.3(3)), gamma_M = 1.25 (Table 2.3), all from
    memory; and a continuously restrained beam is not marked as assuming restraint."""
    path = Path(__file__).resolve().parents[1] / "data" / "examples" / "select-glulam-design-basis.toml"
    out, _ = _select(path, capsys)
    c = out["chosen"]
    row = catalog_table(families=["glulam"], materials=[c["material"]]).set_index("name").loc[c["name"]]
    w = 1.35 * (0.9e3 + row.mass_per_length * 9.80665) + 1.5 * 1.2e3
    f_d = 0.9 * min((600 / (row.depth * 1e3)) ** 0.1, 1.1) * row.strength_bending / 1.25
    assert c["utilisation"]["bending"] == pytest.approx(w * 6.0**2 / 8 / (row.Sz_bot * f_d), rel=1e-9)
    assert main(["select", str(path)]) == 0
    assert "assumes full lateral restraint" not in capsys.readouterr().out
    # R = w L / 2 at each end (statics, the snow-leading combination governs); the sheet prints the
    # JSON's bearing utilisation rounded up to 3 decimals
    sup = out["checks"]["bearing"]["supports"]
    assert sup[0]["reaction"] == pytest.approx(w * 6.0 / 2, rel=1e-9)
    assert sup[0]["utilisation"] == pytest.approx(c["utilisation"]["bearing"], rel=1e-12)
    sheet = tmp_path / "sheet.html"
    assert main(["select", str(path), "--report", str(sheet)]) == 0
    capsys.readouterr()
    shown = re.search(r'data-key="chosen.utilisation.bearing">([0-9.]+)', sheet.read_text(encoding="utf-8"))
    assert 0 <= float(shown.group(1)) - c["utilisation"]["bearing"] <= 1e-3 + 1e-12
