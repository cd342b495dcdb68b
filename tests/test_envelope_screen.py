"""Property test: the envelope screen equals the station screen (the reference) to 1e-12.

The envelope screen (:mod:`leanspan.select.envelope`) builds each combination's peak demands
as functions of the candidate's weight from a few exact solves; the station screen evaluates
every element for every candidate. On random jobs (the generator of ``test_select_property``:
spans, overhangs, point / UDL / linear / couple loads, strength, deflection and pattern
combinations, self-weight on or off) and random catalogues of many distinct weights they must
agree on every effect and utilisation to 1e-12 of the largest value. Jobs with a spring support
fall back to the station screen (forces then depend on EI) and must agree exactly.
Candidate values are random but realistic (timber to steel: EI 0.1-20 MN m^2).
"""

from __future__ import annotations

import numpy as np
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from leanspan.select.envelope import Peak, envelope_values
from leanspan.select.extremes import _cubic_best
from leanspan.select.screen import evaluate, screen_effects
from test_select_property import jobs, random_candidates


@st.composite
def many_candidates(draw):
    K = draw(st.sampled_from([40, 300, 3000]))
    rng = np.random.default_rng(draw(st.integers(0, 2 ** 32 - 1)))
    mass = rng.uniform(5, 400, K)
    mass[: K // 4] = mass[K // 4: K // 2]  # some equal weights (one section, two grades)
    return random_candidates(rng, K, mass)


@settings(max_examples=60, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(job=jobs(), cand=many_candidates())
def test_envelope_equals_stations(job, cand):
    sw = job.search.self_weight
    ref = screen_effects(job.model, cand, sw, method="stations")
    env = screen_effects(job.model, cand, sw, method="envelope")
    for key in ("M_max", "M_min", "V_abs", "v_abs", "v_allowed"):
        a, b = getattr(env, key), getattr(ref, key)
        assert np.array_equal(np.isnan(a), np.isnan(b)), key
        ok = ~np.isnan(b)
        if ok.any():
            scale = np.abs(b[ok]).max()
            np.testing.assert_allclose(a[ok], b[ok], rtol=1e-12, atol=1e-12 * scale, err_msg=key)
    ua, ub = evaluate(env, cand).utilisation, evaluate(ref, cand).utilisation
    for c in ub:
        ok = ~np.isnan(ub[c])
        assert np.array_equal(ok, ~np.isnan(ua[c])), c
        np.testing.assert_allclose(ua[c][ok], ub[c][ok], rtol=1e-12, atol=1e-12, err_msg=c)


def test_moving_peak_matches_closed_form():
    # f(s) = (10 + 2 w) s - (1 + w) s^2 on [0, 4]: the peak is at s* = (10 + 2 w) / (2 + 2 w) while
    # s* < 4, value (10 + 2 w)^2 / (4 + 4 w), else at s = 4, value 24 - 8 w (calculus)
    w = np.sort(np.random.default_rng(3).uniform(0.0, 6.0, 5000))
    p = Peak([[0.0, 10.0, -1.0, 0.0]], [[0.0, 2.0, -1.0, 0.0]], [4.0])
    h, _ = envelope_values([p], w, _cubic_best)
    s_star = (10 + 2 * w) / (2 + 2 * w)
    exact = np.where(s_star < 4, (10 + 2 * w) ** 2 / (4 + 4 * w), 24 - 8 * w)
    np.testing.assert_allclose(h[0], exact, rtol=1e-13)


def test_kink_between_two_peaks():
    # two fixed stations: lines 5 + w and 8 - w cross at w = 1.5; the maximum of two lines
    # (a kink) must come out exact on both sides
    w = np.sort(np.random.default_rng(4).uniform(0.0, 3.0, 4001))
    p = Peak([[5.0, 0.0], [8.0, 0.0]], [[1.0, 0.0], [-1.0, 0.0]], [1.0, 1.0])
    h, _ = envelope_values([p], w, _cubic_best)
    np.testing.assert_allclose(h[0], np.maximum(5 + w, 8 - w), rtol=1e-15)
