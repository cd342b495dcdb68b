"""Lateral-torsional buckling: Mcr against closed forms and an independent finite-element
eigenproblem written here, the reduction factor, and the check through the command line."""

from __future__ import annotations

import json
import math
from pathlib import Path

import numpy as np
import pytest
import scipy.linalg
from shapely.geometry import Polygon

from leanspan.cli import main
from leanspan.sections.families import get_family
from leanspan.sections.properties import family_properties, family_stability

ROOT = Path(__file__).resolve().parents[1]
from leanspan.select.checks.lateral_torsional import (
    critical_moment,
    moment_factor,
    reduction_factor,
)

E, G = 210e9, 81e9  # steel (EN 1993-1-1 3.2.6)


def _props(family, **dims):
    arr = {k: np.array([v]) for k, v in dims.items()}
    p = family_properties(family, arr)
    s = family_stability(family, arr, p["yc"], p["zc"])
    return {k: float(np.asarray(v)[0]) for k, v in {**p, **s}.items()}


def _fe_critical_load(L, EIy, GJ, ECw, moment, load, height, beta=0.0, n=40):
    """Smallest load factor of a simply supported (fork) beam: lateral deflection u and twist
    phi on n cubic Hermite elements; second variation of the total potential (Trahair,
    Flexural-Torsional Buckling of Structures, ch. 6, from memory):
    EIy u''^2 + GJ phi'^2 + ECw phi''^2 + 2 M u'' phi + M beta phi'^2 - q a phi^2,
    with a the load's height above the shear centre and beta the mono-symmetry parameter."""
    h = L / n
    gp, gw = np.polynomial.legendre.leggauss(5)
    ndof = 4 * (n + 1)  # per node: u, u', phi, phi'
    K, Kg = np.zeros((ndof, ndof)), np.zeros((ndof, ndof))
    for e in range(n):
        for xi, w in zip(gp, gw):
            s = (xi + 1) / 2
            x = (e + s) * h
            N = np.array([1 - 3 * s**2 + 2 * s**3, h * (s - 2 * s**2 + s**3), 3 * s**2 - 2 * s**3, h * (s**3 - s**2)])
            N1 = np.array([-6 * s + 6 * s**2, h * (1 - 4 * s + 3 * s**2), 6 * s - 6 * s**2, h * (3 * s**2 - 2 * s)]) / h
            N2 = np.array([-6 + 12 * s, h * (-4 + 6 * s), 6 - 12 * s, h * (6 * s - 2)]) / h**2
            iu = [4 * e, 4 * e + 1, 4 * e + 4, 4 * e + 5]
            ip = [4 * e + 2, 4 * e + 3, 4 * e + 6, 4 * e + 7]
            wt = w * h / 2
            M, q = moment(x), load(x)
            K[np.ix_(iu, iu)] += wt * EIy * np.outer(N2, N2)
            K[np.ix_(ip, ip)] += wt * (GJ * np.outer(N1, N1) + ECw * np.outer(N2, N2))
            Kg[np.ix_(iu, ip)] += wt * M * np.outer(N2, N)
            Kg[np.ix_(ip, iu)] += wt * M * np.outer(N, N2)
            Kg[np.ix_(ip, ip)] += wt * (M * beta * np.outer(N1, N1) - q * height * np.outer(N, N))
    fixed = [0, 2, 4 * n, 4 * n + 2]  # u = phi = 0 at both ends (fork supports)
    free = [i for i in range(ndof) if i not in fixed]
    A, B = K[np.ix_(free, free)], -Kg[np.ix_(free, free)]
    mu = scipy.linalg.eigh(B, A, eigvals_only=True)
    return 1.0 / mu.max()


def test_uniform_moment_doubly_symmetric_closed_form():
    # Timoshenko & Gere, Theory of Elastic Stability, eq. (6-25): uniform moment, fork supports
    p = _props("ibeam", d=0.3, b=0.15, tw=0.0071, tf=0.0107, r=0.015)
    L = 6.0
    exact = math.pi / L * math.sqrt(E * p["Iy"] * G * p["J"] * (1 + math.pi**2 * E * p["Cw"] / (G * p["J"] * L**2)))
    C1 = moment_factor(1.0, 1.0, 1.0, 1.0)  # the quarter-point formula gives 1 for a uniform moment
    assert float(C1) == pytest.approx(1.0, rel=1e-15)
    assert float(critical_moment(E, G, p["Iy"], p["J"], p["Cw"], L, C1)) == pytest.approx(exact, rel=1e-9)


def test_udl_top_flange_against_finite_elements():
    """A uniformly loaded simply supported I beam, load on the top flange: the tool's Mcr (C1 from
    the quarter-point formula, C2 = 0.454) within 3 % of the eigenproblem above."""
    p = _props("ibeam", d=0.3, b=0.15, tw=0.0071, tf=0.0107, r=0.015)
    L, q = 6.0, 1.0
    a = p["depth"] - p["ys"]  # top flange above the shear centre
    lam = _fe_critical_load(L, E * p["Iy"], G * p["J"], E * p["Cw"], lambda x: q * x * (L - x) / 2,
                            lambda x: q, a)
    Mcr_fe = lam * q * L**2 / 8
    C1 = moment_factor(1.0, 0.75, 1.0, 0.75)
    Mcr = float(critical_moment(E, G, p["Iy"], p["J"], p["Cw"], L, C1, 0.454, 0.525, zg=a))
    assert Mcr == pytest.approx(Mcr_fe, rel=0.03)
    # the load height matters: on the bottom flange the same beam is clearly stiffer
    lam_bot = _fe_critical_load(L, E * p["Iy"], G * p["J"], E * p["Cw"], lambda x: q * x * (L - x) / 2,
                                lambda x: q, -p["ys"])
    assert lam_bot > 1.3 * lam


def _wagner_by_triangles(poly, yc):
    """∫ y (y^2 + z^2) dA about the centroid by 7-point Gauss rules on a triangulation (independent
    of the tool's edge formulas)."""
    import shapely

    tri = shapely.delaunay_triangles(poly, tolerance=0.0)
    # Dunavant degree-5 rule (barycentric points and weights)
    a1, b1, a2, b2 = 0.0597158717, 0.4701420641, 0.7974269853, 0.1012865073
    pts = [(1 / 3, 1 / 3, 1 / 3), (a1, b1, b1), (b1, a1, b1), (b1, b1, a1), (a2, b2, b2), (b2, a2, b2), (b2, b2, a2)]
    wts = [0.225] + [0.1323941527] * 3 + [0.1259391805] * 3
    total = 0.0
    for t in tri.geoms:
        if not poly.contains(t.representative_point()):
            continue
        c = np.asarray(t.exterior.coords)[:3]
        area = t.area
        for (l1, l2, l3), w in zip(pts, wts):
            z, y = l1 * c[0] + l2 * c[1] + l3 * c[2]
            y -= yc
            total += w * area * y * (y * y + z * z)
    return total


def test_mono_symmetric_uniform_moment_against_finite_elements():
    """An I with a wide top flange under uniform sagging moment (the wide flange compressed): the
    closed form with the tool's mono-symmetry parameter equals the eigenproblem with the
    Wagner term computed independently (triangles and Gauss points)."""
    dims = dict(d=0.4, b=0.12, tw=0.008, tf=0.012, b_top=0.2, tf_top=0.016, b_bot=0.12, tf_bot=0.012)
    p = _props("ibeam", **dims)
    fam = get_family("ibeam")
    ring = fam.build(fam.complete({k: np.array([v]) for k, v in dims.items()}))[0][0]
    wagner = _wagner_by_triangles(Polygon(ring), p["yc"])
    assert p["wagner"] == pytest.approx(wagner, rel=1e-6)
    beta = wagner / p["Iz"] - 2 * (p["ys"] - p["yc"])  # Trahair's beta_x, measured upwards
    L = 5.0
    lam = _fe_critical_load(L, E * p["Iy"], G * p["J"], E * p["Cw"], lambda x: 1.0, lambda x: 0.0, 0.0, beta=-beta)
    zj = (p["ys"] - p["yc"]) - p["wagner"] / (2 * p["Iz"])
    Mcr = float(critical_moment(E, G, p["Iy"], p["J"], p["Cw"], L, 1.0, 0.0, 1.0, zj=zj))
    assert zj > 0  # the wide flange in compression raises Mcr
    assert Mcr == pytest.approx(lam, rel=0.01)
    assert Mcr > float(critical_moment(E, G, p["Iy"], p["J"], p["Cw"], L))


def test_reduction_factor_against_the_curve_formula():
    # EN 1993-1-1 6.3.2.2 (from memory): curve a at lam = 1.0 gives chi = 0.6656 (Table values)
    assert float(reduction_factor(1.0, 0.21, 0.2)) == pytest.approx(0.6656, abs=5e-5)
    assert float(reduction_factor(0.1, 0.34, 0.2)) == 1.0  # below the plateau


JOB = """
[beam]
spans = ["{L} m"]
[[load]]
case = "dead"
type = "moment"
M = "{M} kN*m"
at = "0 m"
[[load]]
case = "dead"
type = "moment"
M = "-{M} kN*m"
at = "{L} m"
[search]
families = ["gen_steel_i"]
self_weight = "none"
max_depth = "220 mm"
[limits]
stress_factor = 1.0
lateral_restraint = "{restraint}"
{extra}
"""


def _select(tmp_path, capsys, **kw):
    kw.setdefault("extra", "")
    path = tmp_path / "ltb.toml"
    path.write_text(JOB.format(**kw), encoding="utf-8")
    status = main(["select", str(path), "--json", "--top", "50"])
    return status, json.loads(capsys.readouterr().out)


def test_check_through_the_command_line_equals_the_hand_chain(tmp_path, capsys):
    """Equal and opposite end couples: a uniform moment (statics); the check's utilisation is
    M / (chi S fy) with Mcr of the closed form and chi of curve a or b (rolled, EN 1993-1-1
    Table 6.4, from memory)."""
    from leanspan.catalog.table import catalog_table

    L, M = 4.0, 12.0
    status, out = _select(tmp_path, capsys, L=L, M=M, restraint="supports")
    assert status in (0, 1)
    table = catalog_table(families=["gen_steel_i"]).set_index("name")
    for cand in out["candidates"]:
        row = table.loc[cand["name"]]
        Mcr = math.pi / L * math.sqrt(E * row.Iy * G * row.J * (1 + math.pi**2 * E * row.Cw / (G * row.J * L**2)))
        S = min(row.Sz_top, row.Sz_bot)
        lam = math.sqrt(S * 355e6 / Mcr)
        alpha = 0.21 if row.depth / row.width <= 2 else 0.34
        phi = 0.5 * (1 + alpha * (lam - 0.2) + lam**2)
        chi = min(1.0, 1 / (phi + math.sqrt(phi**2 - lam**2)))
        assert cand["utilisation"]["lateral_torsional"] == pytest.approx(M * 1e3 / (chi * S * 355e6), rel=1e-6)
        assert cand["utilisation"]["lateral_torsional"] >= cand["utilisation"]["bending"] * (1 - 1e-9)
        if cand["rank"] == 1:  # the JSON details of the chosen (else closest) candidate
            det = out["checks"]["lateral_torsional"]
            assert det["Mcr"] == pytest.approx(Mcr, rel=1e-9)  # the closed form above
            assert det["chi"] == pytest.approx(chi, rel=1e-6)
            assert det["C1"] == pytest.approx(1.0, rel=1e-12)  # quarter-point formula, uniform moment
            assert abs(det["M"]) == pytest.approx(M * 1e3, rel=1e-9)  # statics
            assert (det["segment_start"], det["segment_end"]) == (0.0, L)


def test_more_restraints_and_continuous_restraint(tmp_path, capsys):
    _, base = _select(tmp_path, capsys, L=4.0, M=12.0, restraint="supports")
    _, mid = _select(tmp_path, capsys, L=4.0, M=12.0, restraint="supports", extra='lateral_restraint_at = ["2 m"]')
    u = {c["name"]: c["utilisation"]["lateral_torsional"] for c in base["candidates"]}
    for c in mid["candidates"]:
        if c["name"] in u:
            assert c["utilisation"]["lateral_torsional"] <= u[c["name"]] + 1e-12
    _, cont = _select(tmp_path, capsys, L=4.0, M=12.0, restraint="continuous")
    assert "lateral_torsional" not in cont["candidates"][0]["utilisation"]


@pytest.mark.parametrize("extra, message", [
    ('lateral_restraint_at = ["9 m"]', "limits.lateral_restraint_at: 9 m is off the beam"),
    ('load_height = "middle"', "limits.load_height: expected 'top' or 'centroid' or 'bottom'"),
    ('overhang_length_factor = -1', "limits.overhang_length_factor: expected a positive number"),
])
def test_bad_buckling_input(tmp_path, capsys, extra, message):
    path = tmp_path / "ltb.toml"
    path.write_text(JOB.format(L=4.0, M=12.0, restraint="supports", extra=extra), encoding="utf-8")
    assert main(["select", str(path)]) == 2
    err = capsys.readouterr().err.strip()
    assert message in err and "\n" not in err


def test_vectorised_equals_the_per_candidate_loop():
    """Spans, an overhang, a spring, a pattern combination and a restraint inside a span: the
    screen and the one-solve-per-candidate reference give the same buckling utilisations."""
    from pathlib import Path

    from leanspan.select.job import parse_job
    from leanspan.select.screen import screen, screen_loop
    from leanspan.select.search import candidate_table, candidates_from_table

    data = {"beam": {"length": "8.2 m"},
            "support": [{"at": "0 m", "type": "pin"}, {"at": "4 m", "type": "roller"},
                        {"at": "7 m", "type": "spring", "k": "5000 kN/m"}],
            "load": [{"case": "dead", "type": "udl", "w": "3 kN/m"},
                     {"case": "live", "type": "udl", "w": "4 kN/m"},
                     {"case": "live", "type": "point", "P": "6 kN", "at": "2.5 m"}],
            "combination": [{"name": "ULS", "factors": {"dead": 1.35, "live": 1.5}, "pattern": "live"}],
            "search": {"families": ["gen_steel_i"], "max_depth": "260 mm"},
            "limits": {"stress_factor": 0.6, "lateral_restraint": "supports",
                       "lateral_restraint_at": ["1.5 m"], "load_height": "centroid"}}
    job = parse_job(data, Path("."))
    df = candidate_table(job.search).iloc[::7]
    cand = candidates_from_table(df, job.limits)
    fast, ref = screen(job.model, cand, "dead"), screen_loop(job.model, cand, "dead")
    a, b = fast.utilisation["lateral_torsional"], ref.utilisation["lateral_torsional"]
    assert np.all(np.isfinite(a))
    np.testing.assert_allclose(a, b, rtol=1e-9)
    assert np.all(a >= fast.utilisation["bending"] * (1 - 1e-12))


def test_an_angle_fails_the_check_without_a_crash(tmp_path, capsys):
    """Tilted principal axes: the check cannot be made, so the angle fails it (printed inf)."""
    csv = tmp_path / "list.csv"
    csv.write_text("family,d,b,t,tw,tf\nangle,80,80,8,,\nibeam,200,100,,5.6,8.5\n", encoding="utf-8")
    job = tmp_path / "j.toml"
    job.write_text(JOB.format(L=2.0, M=1.0, restraint="supports", extra="").replace(
        'families = ["gen_steel_i"]', 'catalog = "list.csv"\nmaterials = ["S355"]'), encoding="utf-8")
    assert main(["select", str(job), "--top", "5"]) == 0
    out = capsys.readouterr().out
    line = next(ln for ln in out.splitlines() if "angle" in ln)
    assert " inf " in line and line.rstrip().endswith("NO")


def test_load_above_the_shear_centre_destabilises_in_hogging_too(tmp_path, capsys):
    """A cantilever (hogging all along): gravity load on the top flange gives a lower Mcr than at
    the centroid, and on the bottom flange a higher one (a load acting towards the shear centre
    from above destabilises whatever the moment's sign; Trahair, Flexural-Torsional Buckling of
    Structures, ch. 8, from memory)."""
    job = """
[beam]
length = "2.5 m"
[[support]]
at = "0 m"
type = "fixed"
[[load]]
case = "dead"
type = "point"
P = "4 kN"
at = "2.5 m"
[search]
families = ["gen_steel_i"]
self_weight = "none"
max_depth = "200 mm"
[limits]
stress_factor = 0.6
lateral_restraint = "supports"
load_height = "{h}"
"""
    util = {}
    for h in ("top", "centroid", "bottom"):
        path = tmp_path / f"{h}.toml"
        path.write_text(job.format(h=h), encoding="utf-8")
        main(["select", str(path), "--json", "--top", "100"])
        out = json.loads(capsys.readouterr().out)
        util[h] = {c["name"]: c["utilisation"]["lateral_torsional"] for c in out["candidates"]}
    common = set(util["top"]) & set(util["centroid"]) & set(util["bottom"])
    assert common
    for name in common:
        assert util["top"][name] > util["centroid"][name] > util["bottom"][name]


@pytest.mark.parametrize("support", ['type = "roller"', 'type = "spring"\nk = "4000 kN/m"'])
def test_json_details_reproduce_the_chosen_demand(tmp_path, capsys, support):
    """checks.lateral_torsional of the chosen member: M / (chi S) is its sigma_lt demand (the
    definition of the demand), also when a spring support batches the beam per candidate."""
    from leanspan.catalog.table import catalog_table

    src = (ROOT / "data" / "examples" / "select-steel-overhang.toml").read_text(encoding="utf-8")
    src = src.replace('at = "6.0 m"\ntype = "roller"', 'at = "6.0 m"\n' + support, 1)
    src = src.replace("[limits]", '[limits]\nlateral_restraint = "supports"', 1)
    path = tmp_path / "job.toml"
    path.write_text(src, encoding="utf-8")
    assert main(["select", str(path), "--json"]) in (0, 1)
    out = json.loads(capsys.readouterr().out)
    best = out["chosen"] or out["candidates"][0]
    det = out["checks"]["lateral_torsional"]
    table = catalog_table()
    row = table[(table.name == best["name"]) & (table.material == best["material"])].iloc[0]
    S = min(row.Sz_top, row.Sz_bot)
    assert abs(det["M"]) / (det["chi"] * S) == pytest.approx(best["demands"]["sigma_lt"], rel=1e-9)
    assert det["segment_start"] < det["segment_end"]


def test_timber_uses_the_tabulated_fifth_percentile_modulus(tmp_path, capsys):
    """Glulam under a uniform moment: Mcr of the closed form (Timoshenko & Gere) with E = E_0,g,05 of
    EN 14080:2013 Table 5 (GL28h: 10,500 MPa, from memory) and G scaled by the same E_05 / E_mean
    (common practice), not the 0.83 stand-in."""
    from leanspan.catalog.table import catalog_table

    L, M = 6.0, 3.0
    path = tmp_path / "glulam.toml"
    path.write_text(JOB.format(L=L, M=M, restraint="supports", extra="").replace(
        'families = ["gen_steel_i"]', 'families = ["glulam"]\nmaterials = ["GL28h"]').replace(
        'max_depth = "220 mm"', 'max_depth = "400 mm"'), encoding="utf-8")
    main(["select", str(path), "--json"])
    out = json.loads(capsys.readouterr().out)
    first = out["candidates"][0]
    row = catalog_table(families=["glulam"], materials=["GL28h"]).set_index("name").loc[first["name"]]
    E05, G05 = 10500e6, 650e6 * 10500 / 12600
    Mcr = math.pi / L * math.sqrt(E05 * row.Iy * G05 * row.J * (1 + math.pi**2 * E05 * row.Cw / (G05 * row.J * L**2)))
    assert out["checks"]["lateral_torsional"]["Mcr"] == pytest.approx(Mcr, rel=1e-9)
