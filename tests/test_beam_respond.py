"""The screening API: respond() for many stiffness candidates, unit cases, combos; poly extremes."""

from __future__ import annotations

import numpy as np
import pytest

from leanspan.beam import (BeamModel, Combination, DistributedLoad, PointLoad, Stiffness, Support, poly,
                           respond, solve)
from leanspan.errors import BeamError


def sprung(EI=2.0e6):
    return BeamModel(9.0, (Support(0.0, "pin"), Support(4.0, "spring", k=3.0e5), Support(9.0, "roller")),
                     (Stiffness(0.0, 9.0, EI),),
                     (DistributedLoad("dead", 2e3, 2e3, 0.0, 9.0), PointLoad("imposed", 5e3, 6.0)),
                     combinations=(Combination("ULS", (("dead", 1.35), ("imposed", 1.5)), pattern="imposed"),
                                   Combination("SLS", (("dead", 1.0), ("imposed", 1.0)), "deflection")),
                     self_weight="dead", mass_per_length=20.0)


def test_batched_springs_match_individual_solves():
    EIs = np.array([5e5, 2e6, 7e6])
    r = respond(sprung(), EI=EIs)
    assert r.v.shape[0] == 3 and r.M.shape[0] == 3
    for k, ei in enumerate(EIs):
        one = respond(sprung(ei))
        for key in ("M", "V", "v", "theta", "reactions"):
            a, b = getattr(r, key)[k], getattr(one, key)[0]
            assert np.allclose(a, b, rtol=0, atol=1e-10 * np.abs(b).max())


def test_batched_several_springs_over_a_wide_stiffness_range():
    """The batched (low-rank update) solve against one direct solve per candidate, with a
    translational + rotational spring and a second translational spring, EI over five decades."""
    def model(EI):
        return BeamModel(10.0, (Support(0.0, "spring", k=1e5, kr=2e6), Support(5.0, "pin"),
                                Support(8.0, "spring", k=4e4)),
                         (Stiffness(0.0, 10.0, EI),),
                         (DistributedLoad("dead", 1e3, 3e3, 0.0, 10.0), PointLoad("imposed", 4e3, 9.5)))
    EIs = np.geomspace(1e4, 1e9, 7)
    r = respond(model(1e6), EI=EIs)
    for k, ei in enumerate(EIs):
        one = respond(model(ei))
        for key in ("M", "V", "v", "reactions"):
            a, b = getattr(r, key)[k], getattr(one, key)[0]
            assert np.allclose(a, b, rtol=0, atol=1e-10 * np.abs(b).max())


def test_no_springs_scale_with_one_over_EI():
    m = BeamModel(6.0, (Support(0.0, "fixed"), Support(6.0, "roller")), (Stiffness(0.0, 6.0, 1e6),),
                  (DistributedLoad("d", 1e3, 3e3, 1.0, 5.0),))
    r = respond(m, EI=np.array([1e6, 4e6]))
    assert r.M.shape[0] == 1 and r.v.shape[0] == 2  # forces independent of EI
    assert np.allclose(r.v[1], r.v[0] / 4, rtol=1e-12)
    with pytest.raises(BeamError):
        respond(BeamModel(6.0, m.supports, (Stiffness(0, 3, 1e6), Stiffness(3, 6, 2e6)), m.loads), EI=[1e6])


def test_unit_cases_and_combos():
    r = respond(sprung())
    assert r.unit_cases[:2] == ["dead", "imposed"]
    assert r.unit_cases[-1] == "self-weight" and r.self_weight_index == len(r.unit_cases) - 1
    assert [s[2] for s in r.spans] == ["span", "span"]
    uls = [c for c in r.combos if c.parent == "ULS"]
    assert len(uls) == 4 and uls[0].name == "ULS [pattern 1,1]"
    assert uls[0].factors[r.self_weight_index] == 1.35  # self-weight carries the dead factor
    # the pattern sub-cases sum to the imposed case (superposition)
    sub = [r.unit_cases.index(f"imposed [span {j}]") for j in (1, 2)]
    assert np.allclose(r.M[0, sub].sum(axis=0), r.M[0, 1], atol=1e-9 * np.abs(r.M[0, 1]).max())
    # the unit self-weight case is 1 N/m downward: total reaction = length
    assert r.reactions[0, r.self_weight_index, :, 0].sum() == pytest.approx(9.0, rel=1e-12)


def test_solve_self_weight_needs_mass():
    m = BeamModel(5.0, (Support(0.0, "pin"), Support(5.0, "roller")), (Stiffness(0, 5, 1e6),),
                  self_weight="dead")
    with pytest.raises(BeamError, match="mass_per_length"):
        solve(m)


def test_poly_extremes_against_dense_sampling():
    rng = np.random.default_rng(7)
    c = rng.normal(size=(50, 6))
    L = rng.uniform(0.2, 3.0, size=50)
    vmax, smax, vmin, smin = poly.extremes(c, L)
    s = np.linspace(0, 1, 20001)[None, :] * L[:, None]
    dense = poly.evaluate(c[:, None, :], s)
    # exact extremes are never below a dense sample, and agree with it to sampling accuracy
    assert np.all(vmax >= dense.max(1) - 1e-12) and np.all(vmin <= dense.min(1) + 1e-12)
    assert np.allclose(vmax, dense.max(1), rtol=1e-6, atol=1e-6)
    assert np.allclose(poly.evaluate(c, smax), vmax) and np.all((smax >= 0) & (smax <= L))
    # degenerate leading zeros (a cubic stored in a quintic slot) still work
    cubic = np.array([0.0, 3.0, 0.0, -1.0, 0.0, 0.0])  # 3s - s^3: max 2 at s = 1
    hi, at, lo, _ = poly.extremes(cubic, 1.5)
    assert float(hi) == pytest.approx(2.0, rel=1e-15) and float(at) == pytest.approx(1.0, rel=1e-15)


def test_springs_too_soft_raise_a_mechanism_error_without_numpy_warnings():
    """Two springs of 1e-30 N/m under a 6 m beam: EI/L^3 / k ~ 1e34 is far beyond 1/eps of double
    precision (2.2e-16, IEEE 754), so the beam is a mechanism to working precision."""
    import warnings

    from leanspan.errors import MechanismError

    m = BeamModel(6.0, (Support(0.0, "spring", k=1e-30), Support(6.0, "spring", k=1e-30)),
                  (Stiffness(0.0, 6.0, 1e7),), (PointLoad("A", 1e3, 2.0),))
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        with pytest.raises(MechanismError, match="singular"):
            solve(m)
        with pytest.raises(MechanismError, match="singular"):
            respond(m, EI=np.array([1e6, 1e7]))


def test_dense_and_banded_factorisations_agree(monkeypatch):
    """Small systems are factored densely by numpy, large ones by scipy's banded Cholesky: the
    same beam through both gives the same answer (scipy is the independent reference)."""
    from leanspan.beam import solver
    from leanspan.beam.model import BeamModel, DistributedLoad, PointLoad, Stiffness, Support

    sups = tuple(Support(float(x), "pin" if x == 0 else "roller") for x in range(0, 13, 3))
    sups = sups[:2] + (Support(6.0, "spring", k=2e5),) + sups[3:]
    model = BeamModel(12.0, sups, (Stiffness(0.0, 12.0, 3e6),),
                      (DistributedLoad("dead", 2e3, 5e3, 0.0, 12.0), PointLoad("imposed", 7e3, 4.4)))
    dense = solver.respond(model)
    monkeypatch.setattr(solver, "DENSE_LIMIT", 0)
    banded = solver.respond(model)
    for name in ("M", "V", "v", "reactions"):
        a, b = getattr(dense, name), getattr(banded, name)
        assert np.allclose(a, b, rtol=1e-12, atol=1e-12 * np.abs(a).max()), name
