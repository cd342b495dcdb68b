"""The vibration check: f1 of the beam model against closed forms and an independent model,
the vectorised path against one solve per candidate, the 1 kN deflection, and the CLI."""

from __future__ import annotations

import json

import numpy as np
import pytest
import scipy.linalg

from leanspan.beam.modal import TOL, fundamental_frequencies, natural_frequency, point_flexibility
from leanspan.beam.model import G, BeamModel, DistributedLoad, PointLoad, Stiffness, Support
from leanspan.cli import main

EI, M, L = 2.4e6, 45.0, 5.0


def _beam(supports, length=L, **kw):
    return BeamModel(length, tuple(supports), (Stiffness(0.0, length, kw.pop("EI", EI)),), **kw)


# Closed forms for the lowest bending mode of a uniform Euler-Bernoulli beam, f1 = (b L)^2 / (2 pi)
# sqrt(EI / (m L^4)), with b L = pi (simply supported), 1.875104 (cantilever), 4.730041
# (fixed-fixed): beam vibration texts and handbook tables of natural frequencies (from memory).
@pytest.mark.parametrize("supports, bL", [
    ((Support(0.0, "pin"), Support(L, "roller")), np.pi),
    ((Support(0.0, "fixed"),), 1.8751040687),
    ((Support(0.0, "fixed"), Support(L, "fixed")), 4.7300407449),
])
def test_f1_closed_forms(supports, bL):
    f = natural_frequency(_beam(supports, mass_per_length=M)).f1
    exact = bL**2 / (2 * np.pi) * np.sqrt(EI / (M * L**4))
    assert f == pytest.approx(exact, rel=1e-6)
    assert f >= exact * (1 - 1e-12)  # consistent mass: an upper bound (Rayleigh-Ritz)


def test_two_equal_spans_equal_one_simple_span():
    """Two equal continuous spans: the first mode is antisymmetric, zero moment over the middle
    support, so f1 is that of one simply supported span (symmetry; beam vibration texts)."""
    mode = natural_frequency(_beam((Support(0.0, "pin"), Support(L, "roller"), Support(2 * L, "roller")),
                                   length=2 * L, mass_per_length=M))
    assert mode.f1 == pytest.approx(np.pi / 2 * np.sqrt(EI / (M * L**4)), rel=1e-6)
    assert mode.v[np.argmin(np.abs(mode.x - L / 2))] == pytest.approx(-mode.v[np.argmin(np.abs(mode.x - 1.5 * L))],
                                                                        rel=1e-6)


def test_refinement_converges():
    """The stopping rule: the next finer mesh changes f1 by less than TOL (h^4 convergence)."""
    m = _beam((Support(0.0, "pin"), Support(3.0, "roller")), mass_per_length=M,
              loads=(PointLoad("dead", 2e3, 4.1),))
    mode = natural_frequency(m, permanent_cases=("dead",))
    level = mode.level
    finer = [natural_frequency(m, permanent_cases=("dead",), level=lv).f1 for lv in (level + 1, level + 3)]
    assert abs(finer[0] - mode.f1) <= TOL * mode.f1
    assert abs(finer[1] - mode.f1) <= TOL * mode.f1


# -- an independent model written here: textbook Hermite beam element, consistent mass ----------
def _reference_f1(length, n, EI_, m, point=None, k_right=None):
    """Simply supported at x = 0 and (rigidly, or on a spring k_right) at x = length, n equal
    elements, a point mass (x, mass) at a node. Element matrices: (EI/h^3)[12 6h -12 6h; ...] and
    (m h / 420)[156 22h 54 -13h; ...] (finite-element texts, from memory); scipy.linalg.eigh."""
    h = length / n
    k = EI_ / h**3 * np.array([[12, 6 * h, -12, 6 * h], [6 * h, 4 * h * h, -6 * h, 2 * h * h],
                               [-12, -6 * h, 12, -6 * h], [6 * h, 2 * h * h, -6 * h, 4 * h * h]])
    me = m * h / 420 * np.array([[156, 22 * h, 54, -13 * h], [22 * h, 4 * h * h, 13 * h, -3 * h * h],
                                 [54, 13 * h, 156, -22 * h], [-13 * h, -3 * h * h, -22 * h, 4 * h * h]])
    nd = 2 * (n + 1)
    K, Mm = np.zeros((nd, nd)), np.zeros((nd, nd))
    for e in range(n):
        d = slice(2 * e, 2 * e + 4)
        K[d, d] += k
        Mm[d, d] += me
    if point is not None:
        node = int(round(point[0] / h))
        Mm[2 * node, 2 * node] += point[1]
    keep = [i for i in range(nd) if i != 0 and (k_right is not None or i != 2 * n)]
    if k_right is not None:
        K[2 * n, 2 * n] += k_right
    lam = scipy.linalg.eigh(K[np.ix_(keep, keep)], Mm[np.ix_(keep, keep)], subset_by_index=[0, 0])[0][0]
    return np.sqrt(lam) / (2 * np.pi)


def test_point_mass_at_midspan():
    """A permanent point load at midspan becomes a point mass P / g: f1 equal to the model above
    (fine mesh) and just below the Rayleigh estimate with the static deflection shape,
    f = (1/2 pi) sqrt(48 EI / L^3 / (P/g + 17/35 m L)) (vibration texts, from memory)."""
    P = 6e3
    m = _beam((Support(0.0, "pin"), Support(L, "roller")), loads=(PointLoad("dead", P, L / 2),))
    f = natural_frequency(m, M, ("dead",)).f1
    assert f == pytest.approx(_reference_f1(L, 64, EI, M, (L / 2, P / G)), rel=1e-6)
    rayleigh = np.sqrt(48 * EI / L**3 / (P / G + 17 / 35 * M * L)) / (2 * np.pi)
    assert f <= rayleigh and f == pytest.approx(rayleigh, rel=2e-3)


def test_spring_support_against_the_independent_model():
    k = 4e5
    m = _beam((Support(0.0, "pin"), Support(L, "spring", k=k)), loads=(PointLoad("dead", 3e3, 2.5),))
    f = fundamental_frequencies(m, [EI], [M], ("dead",))[0]
    assert f == pytest.approx(_reference_f1(L, 64, EI, M, (2.5, 3e3 / G), k_right=k), rel=1e-6)


@pytest.mark.parametrize("springs, loads", [
    (False, (DistributedLoad("dead", 1.5e3, 1.5e3, 0.0, 9.0),)),          # exact scaling path
    (False, (PointLoad("dead", 4e3, 2.2), DistributedLoad("dead", 1e3, 2e3, 1.0, 6.0))),
    (True, (PointLoad("dead", 4e3, 7.4),)),
])
def test_vectorised_equals_one_solve_per_candidate(springs, loads):
    """On the same mesh the stacked solve equals natural_frequency of each candidate (1e-9); the
    converged defaults agree to the refinement tolerance."""
    sup = (Support(0.0, "pin"), Support(4.0, "spring", k=8e5) if springs else Support(4.0, "roller"),
           Support(7.5, "roller"))
    model = BeamModel(9.0, sup, (Stiffness(0.0, 9.0, 1.0),), loads=loads, hinges=(5.0,) if springs else ())
    rng = np.random.default_rng(3)
    EIk, mk = 10 ** rng.uniform(5.5, 7.5, 12), rng.uniform(5.0, 120.0, 12)
    each = lambda lv: np.array([natural_frequency(  # noqa: E731
        BeamModel(9.0, sup, (Stiffness(0.0, 9.0, e),), loads=loads, hinges=model.hinges), mm, ("dead",),
        level=lv).f1 for e, mm in zip(EIk, mk)])
    np.testing.assert_allclose(fundamental_frequencies(model, EIk, mk, ("dead",), level=2), each(2), rtol=1e-9)
    np.testing.assert_allclose(fundamental_frequencies(model, EIk, mk, ("dead",)), each(None), rtol=2e-6)


def test_point_flexibility_closed_forms():
    """P L^3 / (48 EI) at midspan of a simple span; P a^3 / (3 EI) + ... at an overhang tip
    (for a beam on supports at 0 and l with an overhang a: P a^2 (l + a) / (3 EI); beam-formula
    handbooks, from memory)."""
    l, a = 4.0, 1.2
    m = _beam((Support(0.0, "pin"), Support(l, "roller")), length=l + a)
    x, flex = point_flexibility(m, [EI, 2 * EI])
    assert x.tolist() == [l / 2, l + a]
    # a load at midspan of the span deflects it as a simple span: the overhang only rotates
    np.testing.assert_allclose(flex[:, 0], [l**3 / (48 * EI), l**3 / (96 * EI)], rtol=1e-12)
    np.testing.assert_allclose(flex[:, 1], [a * a * (l + a) / (3 * EI), a * a * (l + a) / (6 * EI)], rtol=1e-12)


# -- through the command line ---------------------------------------------------------------------
JOB = """
[beam]
title = "Invented floor joist, 4.2 m"
spans = ["4.2 m"]
[[load]]
case = "dead"
type = "udl"
w = "0.5 kN/m"
[[load]]
case = "imposed"
type = "udl"
w = "0.6 kN/m"
[[combination]]
name = "ULS"
factors = {dead = 1.35, imposed = 1.5}
[[combination]]
name = "SLS"
factors = {dead = 1.0, imposed = 1.0}
check = "deflection"
limit = "span/300"
[search]
families = ["sawn_metric"]
materials = ["C24"]
[limits]
stress_factor = 0.6
"""


def _run(tmp_path, capsys, extra, *args):
    job = tmp_path / "job.toml"
    job.write_text(JOB + extra, encoding="utf-8")
    status = main(["select", str(job), *args])
    return status, capsys.readouterr()


def test_selection_where_vibration_governs(tmp_path, capsys):
    sheet = tmp_path / "sheet.html"
    status, cap = _run(tmp_path, capsys, 'min_frequency = "14 Hz"\npoint_deflection = "1.8 mm/kN"\n',
                       "--json", "--report", str(sheet))
    assert status == 0
    out = json.loads(cap.out)
    chosen = out["chosen"]
    assert chosen["governing"] == "vibration"
    # C24: E0,mean = 11 kN/mm^2 (EN 338 Table 1, from memory); I = b d^3 / 12; the mass is the
    # joist's own plus the dead load / g (uniform, so f1 is the simple-span closed form exactly)
    for cand in out["candidates"]:
        b, d = cand["dims"]["b"], cand["dims"]["d"]
        EIc = 11e9 * b * d**3 / 12
        m = cand["mass_per_length"] + 500.0 / G
        f1 = np.pi / 2 * np.sqrt(EIc / (m * 4.2**4))
        flex = 4.2**3 / (48 * EIc)  # P L^3 / (48 EI) per newton (beam-formula handbooks)
        assert cand["demands"]["f1"] == pytest.approx(f1, rel=1e-6)
        assert cand["demands"]["point_deflection"] == pytest.approx(flex, rel=1e-9)
        assert cand["utilisation"]["vibration"] == pytest.approx(max(14.0 / f1, flex / 1.8e-6), rel=1e-6)
    assert chosen["utilisation"]["vibration"] <= 1.0
    lighter = [c for c in out["candidates"] if not c["passes"]]
    assert lighter and all(c["governing"] == "vibration" for c in lighter)
    html = sheet.read_text(encoding="utf-8")
    assert 'data-key="chosen.utilisation.vibration"' in html and "vibration, fundamental frequency f1" in html
    assert "vibration and footfall response" not in html
    # the ranked table has the column
    status, cap = _run(tmp_path, capsys, 'min_frequency = "14 Hz"\n')
    assert "vibration" in next(line for line in cap.out.splitlines() if line.startswith("rank")).split()


def test_inactive_check_adds_nothing(tmp_path, capsys):
    sheet = tmp_path / "sheet.html"
    status, cap = _run(tmp_path, capsys, "", "--json", "--report", str(sheet))
    assert status == 0
    chosen = json.loads(cap.out)["chosen"]
    assert set(chosen["utilisation"]) == {"bending", "shear", "deflection", "local_buckling", "bearing"}  # bearing: always
    assert "f1" not in chosen["demands"] and "point_deflection" not in chosen["demands"]
    html = sheet.read_text(encoding="utf-8")
    assert "vibration and footfall response" in html and "chosen.utilisation.vibration" not in html
    status, cap = _run(tmp_path, capsys, "")
    assert "vibration" not in next(line for line in cap.out.splitlines() if line.startswith("rank")).split()


def test_permanent_cases_choose_the_mass(tmp_path, capsys):
    """permanent_cases = ["dead", "imposed"]: both loads become mass (closed form as above)."""
    status, cap = _run(tmp_path, capsys, 'min_frequency = "8 Hz"\npermanent_cases = ["dead", "imposed"]\n', "--json")
    cand = json.loads(cap.out)["candidates"][0]
    b, d = cand["dims"]["b"], cand["dims"]["d"]
    f1 = np.pi / 2 * np.sqrt(11e9 * b * d**3 / 12 / ((cand["mass_per_length"] + 1100.0 / G) * 4.2**4))
    assert cand["demands"]["f1"] == pytest.approx(f1, rel=1e-6)


@pytest.mark.parametrize("extra, field", [
    ('min_frequency = "-3 Hz"\n', "limits.min_frequency"),
    ('min_frequency = "8 Hz"\npermanent_cases = ["deadd"]\n', "limits.permanent_cases"),
    ('point_deflection = "1.5 mm"\n', "limits.point_deflection"),
])
def test_bad_input_is_one_line(tmp_path, capsys, extra, field):
    status, cap = _run(tmp_path, capsys, extra, "--json")
    assert status == 2
    lines = cap.err.strip().splitlines()
    assert len(lines) == 1 and field in lines[0]


def test_point_deflection_at_a_cantilever_tip():
    """Fixed at x = 0, free at L: the unit load goes to the free tip, P L^3 / (3 EI) (handbooks);
    fixed at x = L instead, the same at x = 0."""
    from leanspan.beam.model import BeamModel, Stiffness, Support
    from leanspan.beam.modal import point_flexibility

    EI, L = 2e6, 3.0
    for fixed_at, tip in ((0.0, L), (L, 0.0)):
        m = BeamModel(L, (Support(fixed_at, "fixed"),), (Stiffness(0.0, L, EI),))
        x, flex = point_flexibility(m, [EI])
        assert float(x[0]) == tip
        assert float(abs(flex[0, 0])) == pytest.approx(L**3 / (3 * EI), rel=1e-12)
