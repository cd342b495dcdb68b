"""The closed-form and companion-matrix roots of :func:`leanspan.beam.poly.roots_in` against
numpy.roots (an independent general-purpose reference), on random polynomials of degrees 1-4
with roots placed inside and outside the interval, double roots included."""

from __future__ import annotations

import numpy as np
import pytest

from leanspan.beam.poly import roots_in


def _from_roots(roots, scale):
    return np.polynomial.polynomial.polyfromroots(roots) * scale


@pytest.mark.parametrize("degree", [1, 2, 3, 4])
def test_roots_inside_the_interval_equal_numpy(degree):
    rng = np.random.default_rng(degree)
    L = 2.5
    for trial in range(400):
        roots = rng.uniform(-0.5, 1.5, degree) * L
        if trial % 5 == 0 and degree >= 2:  # a double root inside
            roots[1] = roots[0] = rng.uniform(0.1, 0.9) * L
        coef = _from_roots(roots, rng.uniform(0.5, 2.0) * rng.choice([-1, 1]))
        got = roots_in(coef[None], np.array([L]))[0]
        got = np.sort(got[~np.isnan(got)])
        ref = np.roots(coef[::-1])  # numpy.roots takes descending powers
        ref = np.sort(ref.real[(np.abs(ref.imag) < 1e-6) & (ref.real > 1e-9 * L) & (ref.real < L * (1 - 1e-9))])
        # every true root inside is found (double roots may come back once or twice)
        for r in ref:
            assert np.min(np.abs(got - r)) <= 1e-6 * L, (trial, roots, got, ref)
        # and nothing is returned that is not a root
        for g in got:
            assert np.min(np.abs(roots - g)) <= 1e-6 * L, (trial, roots, got, ref)


def test_cubic_with_one_real_root():
    # (s - 0.3)(s^2 + 1): one real root at 0.3 (hand factorisation)
    coef = np.polynomial.polynomial.polymul([-0.3, 1.0], [1.0, 0.0, 1.0])
    got = roots_in(coef[None], np.array([1.0]))[0]
    assert np.sort(got[~np.isnan(got)]).tolist() == pytest.approx([0.3], abs=1e-14)


@pytest.mark.parametrize("degree", [3, 4])
def test_one_huge_root_leaves_the_small_ones(degree):
    """A nearly lower-degree polynomial (tiny leading coefficient, so one root far outside) keeps
    its roots inside the interval: numpy.roots is the reference."""
    rng = np.random.default_rng(40 + degree)
    for _ in range(200):
        inside = rng.uniform(0.05, 0.95, degree - 1)
        far = rng.choice([-1, 1]) * 10 ** rng.uniform(4, 9)
        coef = _from_roots(np.r_[inside, far], 1.0 / far)  # leading coefficient ~ 1/far
        got = roots_in(coef[None], np.array([1.0]))[0]
        got = np.sort(got[~np.isnan(got)])
        for r in inside:
            assert np.min(np.abs(got - r)) <= 1e-7, (inside, far, got)


def test_a_beam_whose_slope_is_nearly_cubic_finds_its_sag():
    """Regression (found by the superposition property test): a tiny UDL beside a point load makes
    the slope's quartic term negligible; the largest sag must still be found. Every station of
    the exact solution is a value of v, so the reported minimum cannot lie above any of them."""
    from leanspan.beam import solve
    from leanspan.beam.model import BeamModel, Combination, DistributedLoad, PointLoad, Stiffness, Support

    w = 2.720647403985336e-09
    model = BeamModel(2.0, (Support(0.0, "pin"), Support(0.6, "pin")), (Stiffness(0.0, 2.0, 1e5),),
                      (DistributedLoad("A", w, w, 0.0, 0.35), PointLoad("A", 1.0, 0.05)), (),
                      (Combination("C", (("A", 0.75),)),))
    r = solve(model).results["C"]
    assert r.extremes["v_min"].value <= np.min(r.stations["v"]) + 1e-22
    # the point load alone (the UDL adds 1e-8 of it): a simply supported span L with P at a from
    # the left sags by P a (L - x)(2 L x - x^2 - a^2) / (6 EI L) for x > a (any beam-deflection
    # table); its largest value by a fine grid
    P, a, L, EI = 0.75, 0.05, 0.6, 1e5
    x = np.linspace(a, L, 200_001)
    sag = np.max(P * a * (L - x) * (2 * L * x - x**2 - a**2) / (6 * EI * L))
    assert -r.extremes["v_min"].value == pytest.approx(sag, rel=1e-6)


@pytest.mark.parametrize("degree", [2, 3, 4])
def test_roots_at_the_edges_and_nearly_touching_pairs(degree):
    """The rows roots_in skips (one sign on the interval, by their Bernstein coefficients) never
    hide a root: roots just outside either end are not returned, roots just inside are, and a
    complex pair a +- ib with a inside is returned (as a) when b is below the nearly-real
    tolerance and not when b is large. numpy.roots is the reference for the real roots."""
    rng = np.random.default_rng(70 + degree)
    for trial in range(300):
        kind = trial % 4
        eps = 10 ** rng.uniform(-9, -3)
        if kind == 0:  # all roots just outside: none inside
            roots = np.r_[-eps, 1 + eps, rng.uniform(1.5, 3.0, degree - 2)]
            expect = []
        elif kind == 1:  # one root just inside each end
            roots = np.r_[eps, 1 - eps, rng.uniform(1.5, 3.0, degree - 2)]
            expect = [eps, 1 - eps]
        else:
            a = rng.uniform(0.1, 0.9)
            b = 1e-9 if kind == 2 else 1e-2  # nearly real (kept) / clearly complex (not a root)
            pair = np.polynomial.polynomial.polyfromroots([a + 1j * b, a - 1j * b]).real
            rest = np.polynomial.polynomial.polyfromroots(rng.uniform(1.5, 3.0, degree - 2))
            coef = np.polynomial.polynomial.polymul(pair, rest) * rng.choice([-1, 1])
            got = roots_in(coef[None], np.array([1.0]))[0]
            got = got[~np.isnan(got)]
            if kind == 2:
                assert got.size >= 1 and np.all(np.abs(got - a) <= 1e-4), (a, got)
            else:
                assert got.size == 0, (a, got)
                ref = np.roots(coef[::-1])
                inside = ref[(ref.real > 0) & (ref.real < 1)]
                assert np.all(np.abs(inside.imag) > 1e-3)  # numpy.roots: no real root inside either
            continue
        coef = _from_roots(roots, rng.uniform(0.5, 2.0) * rng.choice([-1, 1]))
        got = np.sort(roots_in(coef[None], np.array([1.0]))[0])
        got = got[~np.isnan(got)]
        ref = np.roots(coef[::-1]).real
        ref = np.sort(ref[(ref > 0) & (ref < 1)])
        assert got.size == len(expect) == ref.size, (roots, got, ref)
        assert np.allclose(got, ref, rtol=0, atol=1e-9), (roots, got, ref)
