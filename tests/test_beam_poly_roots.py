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
