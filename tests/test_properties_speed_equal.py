"""The fast full set (plastic moduli, shear factor) against brute-force references.

Large random batches of every family go through ``family_properties`` (batches big
enough for the row-loop sums, shared sort orders that hold for some sections and not
for others, repeated levels merged into fewer bands); a sample of each batch is then
checked one section at a time against references written here, which use only the
library's simple clipping path (``geometry.area_above`` / ``width_at``) and scipy:

- plastic modulus (mechanics of materials: Z = ∫|y - c| dA about the equal-area axis c):
  c by ``scipy.optimize.brentq`` on the area above a level, Z from the clipped moments;
- shear factor (mechanics of materials: tau = V Q / (I b), the peak of Q(y) / b(y)):
  a golden-section search for the largest Q/b inside every band between consecutive
  vertex levels (Q/b has one peak per band), plus the band ends.
"""

from __future__ import annotations

import numpy as np
import pytest
from scipy.optimize import brentq

from common import random_family_dims
from leanspan.sections.families import FAMILIES
from leanspan.sections.geometry import area_above, moments, swap_axes, width_at
from leanspan.sections.properties import (_running_sum, edges_from_family, elastic_properties,
                                          family_properties)

FAMILY_NAMES = sorted(FAMILIES)
N_BATCH = 300  # enough sections for the row-loop path of the running sums
N_CHECK = 5  # of them checked one by one


def _valid(family, dims):
    """Rows of random_family_dims that the family accepts (it can draw a few impossible ones)."""
    fam = FAMILIES[family]
    dims = fam.complete(dims)
    ok = np.ones(len(next(iter(dims.values()))), bool)
    for bad, _ in fam.rules(dims):
        ok &= ~np.asarray(bad)
    for k in fam.all_keys:
        ok &= dims[k] >= 0
        if not (k in fam.optional and not isinstance(fam.optional[k], str)):
            ok &= dims[k] > 0
    return {k: v[ok] for k, v in dims.items()}


def _one(dims, i):
    return {k: v[i:i + 1] for k, v in dims.items()}


def brute_plastic(e, A, lo, hi):
    """Z about the equal-area axis: brentq for the axis, clipped moments for Z (one section)."""
    def excess(c):
        return area_above(e, np.array([c]))[0][0] - A / 2

    c = brentq(excess, lo, hi, xtol=1e-15 * (hi - lo), rtol=1e-15, maxiter=500)
    a_up, s_up = (x[0] for x in area_above(e, np.array([c])))
    s_all = moments(e)["Sy"][0]
    return (s_up - c * a_up) - ((s_all - s_up) - c * (A - a_up))


def brute_shear_peak(e, yc, Iz, depth, width):
    """max of Q(y) / (Iz b(y)): golden-section search inside each band, plus its ends."""
    levels = np.unique(e.y0[0])
    lo, hi = levels[:-1], levels[1:]
    eps = 1e-13 * depth
    keep = hi - lo > 4 * eps
    lo, hi = lo[keep] + eps, hi[keep] - eps  # inside the band: b(y) is that band's width

    def ratio(y):
        area, first = area_above(e, y[None, :])
        b = width_at(e, y[None, :])[0]
        q = first[0] - yc * area[0]
        return np.where(b > 1e-9 * width, q / np.where(b > 0, b, 1.0), 0.0)

    best = max(ratio(lo).max(), ratio(hi).max())
    g = (np.sqrt(5.0) - 1.0) / 2.0
    a, b = lo.copy(), hi.copy()
    x1, x2 = b - g * (b - a), a + g * (b - a)
    f1, f2 = ratio(x1), ratio(x2)
    for _ in range(90):  # the bracket shrinks by 0.618 per step: far below round-off
        right = f1 < f2  # the peak lies in [x1, b]
        a = np.where(right, x1, a)
        b = np.where(right, b, x2)
        x1, x2 = b - g * (b - a), a + g * (b - a)
        f1, f2 = ratio(x1), ratio(x2)
    best = max(best, f1.max(), f2.max())
    return best / Iz


@pytest.mark.parametrize("family", FAMILY_NAMES)
def test_full_set_matches_brute_force_references(family):
    dims = _valid(family, random_family_dims(family, np.random.default_rng(2026), N_BATCH))
    n = len(dims["d"])
    assert n > N_BATCH // 2
    p = family_properties(family, dims, private=True)
    fam = FAMILIES[family]
    for i in np.linspace(0, n - 1, N_CHECK).astype(int):
        e = edges_from_family(fam, _one(dims, i))
        A = p["A"][i]
        # the elastic set is computed by the same function in both paths
        for k, v in elastic_properties(e).items():
            assert v[0] == pytest.approx(p[k][i], rel=1e-12, abs=1e-12 * p["width"][i] ** 4), k
        Zz = brute_plastic(e, A, p["_ymin"][i], p["_ymax"][i])
        assert p["Zz"][i] == pytest.approx(Zz, rel=1e-10), (family, i)
        # about the vertical axis: the same reference with z and y exchanged
        Zy = brute_plastic(swap_axes(e), A, p["_zmin"][i], p["_zmax"][i])
        assert p["Zy"][i] == pytest.approx(Zy, rel=1e-10), (family, i)
        peak = brute_shear_peak(e, p["yc"][i], p["Iz"][i], p["depth"][i], p["width"][i])
        assert p["shear_factor"][i] == pytest.approx(peak, rel=1e-10), (family, i)


def test_mixed_batch_equals_sections_one_at_a_time():
    """A batch whose first section's vertex order (unequal flanges, wider at the bottom) does
    not sort the others (wider at the top), with and without fillets, gives each section the
    numbers it gets alone. Reference: the same sections one at a time (a batch of one always
    has its own order), to round-off (1e-12)."""
    rng = np.random.default_rng(8)
    n = 400
    d = rng.uniform(0.2, 1.0, n)
    b_bot = d * rng.uniform(0.3, 0.6, n)
    b_top = np.where(np.arange(n) % 3 == 0, b_bot * 0.7, b_bot * 1.4)
    tw = d * 0.02
    dims = {"d": d, "b": b_bot, "b_top": b_top, "tw": tw, "tf": d * 0.04, "tf_top": d * 0.05,
            "r": np.where(np.arange(n) % 2 == 0, 0.0, tw)}
    batch = family_properties("ibeam", dims)
    for i in range(0, n, 37):
        one = family_properties("ibeam", _one(dims, i))
        for k in ("Zz", "Zy", "shear_factor", "A", "Iz", "Iy"):
            assert batch[k][i] == pytest.approx(one[k][0], rel=1e-12), (k, i)


@pytest.mark.parametrize("shape", [(7, 300), (1, 5), (44, 2, 200), (3, 40)])
@pytest.mark.parametrize("reverse", [False, True])
def test_running_sum_equals_numpy_cumsum(shape, reverse):
    """The row-loop running sums against numpy.cumsum (and numpy.maximum.accumulate)."""
    a = np.random.default_rng(1).normal(size=shape)
    want = np.cumsum(a[::-1], axis=0)[::-1] if reverse else np.cumsum(a, axis=0)
    np.testing.assert_allclose(_running_sum(a, reverse=reverse), want, rtol=1e-14, atol=1e-14)
    np.testing.assert_array_equal(_running_sum(a, op=np.maximum), np.maximum.accumulate(a, axis=0))
