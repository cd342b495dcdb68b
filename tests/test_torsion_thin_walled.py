"""Closed-form J and Cw of the families, each checked against the finite-element solve."""

from __future__ import annotations

import math

import numpy as np
import pytest

from leanspan.errors import CatalogError, GeometryError
from leanspan.sections.thin_walled import thin_walled_torsion
from leanspan.sections.torsion import torsion
from test_torsion_shapes import angle, box_section, channel, circle, ibeam, rectangle, tee, tube

# (family, dims, builder, J tolerance, Cw tolerance); tolerances are the accuracy of
# the closed forms (fitted junction terms, mid-line idealisation), the FE is converged
CASES = [
    ("rectangle", dict(b=1.0, d=1.0), rectangle, 2e-4, 2e-4),
    ("rectangle", dict(b=3.0, d=1.0), rectangle, 2e-4, 2e-4),
    ("rectangle", dict(b=1.0, d=10.0), rectangle, 2e-3, 2e-3),
    ("circle", dict(d=100.0), circle, 5e-4, None),
    ("tube", dict(d=100.0, t=6.0), tube, 5e-4, None),
    ("box", dict(b=150.0, d=250.0, t=10.0, r=20.0), box_section, 0.01, 0.05),
    ("box", dict(b=200.0, d=100.0, t=4.0, r=8.0), box_section, 0.01, 0.05),
    ("ibeam", dict(d=300.0, b=150.0, tw=7.1, tf=10.7, r=15.0), ibeam, 0.03, 0.04),
    ("ibeam", dict(d=200.0, b=100.0, tw=5.6, tf=8.5, r=0.0), ibeam, 0.03, 0.04),
    ("ibeam", dict(d=250.0, b=250.0, tw=9.0, tf=14.0, r=23.0), ibeam, 0.03, 0.04),
    ("channel", dict(d=200.0, b=75.0, tw=8.5, tf=11.5, r=12.0), channel, 0.04, 0.04),
    ("channel", dict(d=150.0, b=50.0, tw=5.0, tf=6.0, r=0.0), channel, 0.04, 0.04),
    ("tee", dict(d=150.0, b=150.0, tw=10.0, tf=16.0, r=12.0), tee, 0.03, 0.06),
    ("tee", dict(d=100.0, b=80.0, tw=6.0, tf=8.0, r=0.0), tee, 0.03, 0.06),
    ("angle", dict(d=100.0, b=100.0, t=10.0, r=12.0), angle, 0.03, 0.05),
    ("angle", dict(d=150.0, b=90.0, t=12.0, r=0.0), angle, 0.03, 0.05),
]


@pytest.mark.parametrize("family, dims, build, tol_j, tol_cw", CASES,
                         ids=[f"{c[0]}-{i}" for i, c in enumerate(CASES)])
def test_closed_form_matches_fe(family, dims, build, tol_j, tol_cw):
    fast = thin_walled_torsion(family, dims)
    fe = torsion([build(**dims)])
    assert float(fast["J"]) == pytest.approx(fe.J, rel=tol_j)
    if tol_cw is None:  # no warping: both ~ 0 against J d^2
        assert float(fast["Cw"]) == 0.0 and abs(fe.Cw) < 1e-9 * fe.J * dims["d"] ** 2
    else:
        assert float(fast["Cw"]) == pytest.approx(fe.Cw, rel=tol_cw)


def test_square_box_warping_is_negligible():
    # a square single-cell box hardly warps (thin-walled theory: primary Cw = 0); both
    # the FE and the closed form give a warping length sqrt(E Cw / G J) of a few per cent
    # of the width, against several widths for an open I (E/G = 2.6 for steel, common practice)
    dims = dict(b=100.0, d=100.0, t=5.0, r=10.0)
    fast = thin_walled_torsion("box", dims)
    fe = torsion([box_section(**dims)])
    for J, Cw in ((float(fast["J"]), float(fast["Cw"])), (fe.J, fe.Cw)):
        assert math.sqrt(2.6 * Cw / J) < 0.05 * dims["b"]
    assert float(fast["J"]) == pytest.approx(fe.J, rel=0.01)


def test_rolled_ibeam_handbook():
    # 300 x 150 x 7.1 x 10.7, r 15: producers' tables It = 20.12 cm^4, Iw = 125.9e3 cm^6 (from memory)
    out = thin_walled_torsion("ibeam", dict(d=300.0, b=150.0, tw=7.1, tf=10.7, r=15.0))
    assert float(out["J"]) == pytest.approx(20.12e4, rel=0.02)
    assert float(out["Cw"]) == pytest.approx(125.9e9, rel=0.01)


def test_monosymmetric_i_matches_fe():
    dims = dict(d=300.0, b=100.0, tw=6.0, tf=10.0, r=0.0, b_top=200.0, tf_top=12.0)
    out = thin_walled_torsion("ibeam", dims)
    fe = torsion([ibeam(300.0, 100.0, 6.0, 10.0, 0.0, b_top=200.0, tf_top=12.0)])
    assert float(out["J"]) == pytest.approx(fe.J, rel=0.03)
    assert float(out["Cw"]) == pytest.approx(fe.Cw, rel=0.04)


def test_arrays_match_rows():
    rng = np.random.default_rng(1)
    n = 2000
    dims = {"d": rng.uniform(100, 600, n), "b": rng.uniform(60, 300, n), "tw": rng.uniform(4, 15, n),
            "tf": rng.uniform(6, 25, n), "r": rng.uniform(0, 25, n)}
    out = thin_walled_torsion("ibeam", dims)
    assert out["J"].shape == (n,) and out["Cw"].shape == (n,)
    for i in (0, 777, n - 1):
        one = thin_walled_torsion("ibeam", {k: v[i] for k, v in dims.items()})
        assert float(one["J"]) == pytest.approx(out["J"][i], rel=1e-12)
        assert float(one["Cw"]) == pytest.approx(out["Cw"][i], rel=1e-12)
    assert np.all(out["J"] > 0) and np.all(out["Cw"] > 0)
    # broadcasting a scalar against an array
    rect = thin_walled_torsion("rectangle", {"b": np.array([1.0, 2.0, 4.0]), "d": 1.0})
    assert rect["J"].shape == (3,)


@pytest.mark.parametrize("family, dims, cls, words", [
    ("hexagon", {"d": 1.0}, CatalogError, "unknown family 'hexagon'"),
    ("tube", {"d": 100.0}, GeometryError, "tube: missing dimension 't'"),
    ("tube", {"d": 100.0, "t": 60.0}, GeometryError, "wall t < d/2"),
    ("channel", {"d": np.array([200.0, -1.0]), "b": 75.0, "tw": 6.0, "tf": 9.0}, GeometryError,
     "channel.d (row 1): expected a positive length"),
    ("box", {"b": 100.0, "d": 100.0, "t": 5.0, "r": 80.0}, GeometryError, "corner radius"),
    ("angle", {"d": "big", "b": 1.0, "t": 0.1}, GeometryError, "angle.d: expected numbers"),
])
def test_bad_dimensions(family, dims, cls, words):
    with pytest.raises(cls) as info:
        thin_walled_torsion(family, dims)
    assert words in str(info.value)
