"""Property tests on random beams (hypothesis): statics, reciprocity, field relations, superposition.

References: equilibrium of a free body and Maxwell-Betti reciprocity (any mechanics-of-materials
textbook, e.g. Timoshenko & Gere, Mechanics of Materials, chapters on statically indeterminate
beams and energy methods); M = EI v'' and V = -dM/dx are the beam equations of GUIDE section 3,
checked here with finite differences of the computed fields, independent of how they were built.
"""

from __future__ import annotations

import numpy as np
import pytest
from hypothesis import HealthCheck, assume, given, settings
from hypothesis import strategies as st

from leanspan.beam import (
    BeamModel,
    Combination,
    Couple,
    DistributedLoad,
    PointLoad,
    Stiffness,
    Support,
    poly,
    solve,
)
from leanspan.beam.solver import LOAD_SNAP
from leanspan.errors import MechanismError

SETTINGS = settings(max_examples=25, deadline=None, suppress_health_check=[HealthCheck.too_slow])


@st.composite
def beams(draw, with_loads=True):
    L = draw(st.floats(2.0, 20.0))
    n = draw(st.integers(1, 4))
    fr = sorted(set(draw(st.lists(st.sampled_from([0.0, 0.15, 0.3, 0.45, 0.5, 0.62, 0.8, 0.9, 1.0]),
                                  min_size=n, max_size=n))))
    sups = []
    for f in fr:
        kind = draw(st.sampled_from(["pin", "roller", "fixed", "spring", "spring_r", "guided"]))
        if kind == "spring":
            sups.append(Support(f * L, "spring", k=draw(st.floats(1e4, 1e8))))
        elif kind == "spring_r":
            sups.append(Support(f * L, "spring", k=draw(st.floats(1e4, 1e8)), kr=draw(st.floats(1e4, 1e8))))
        else:
            sups.append(Support(f * L, kind))
    hinges = ()
    if draw(st.booleans()):
        h = draw(st.sampled_from([0.25, 0.55, 0.7])) * L
        if not any(abs(s.at - h) < 1e-9 and s.rotational for s in sups):
            hinges = (h,)
    if draw(st.booleans()):
        # midway between the 1/40 grid of supports and loads: features stay >= L/80 apart (the
        # solver's round-off grows like (L / shortest element)^2, see README "Known limits")
        cut = (draw(st.integers(8, 31)) + 0.5) / 40 * L
        stiff = (Stiffness(0, cut, draw(st.floats(1e5, 1e7))), Stiffness(cut, L, draw(st.floats(1e5, 1e7))))
    else:
        stiff = (Stiffness(0, L, draw(st.floats(1e5, 1e7))),)
    loads = []
    if with_loads:
        for _ in range(draw(st.integers(1, 5))):
            kind = draw(st.sampled_from(["point", "moment", "udl", "linear"]))
            case = draw(st.sampled_from(["A", "B"]))
            a = draw(st.integers(0, 40)) / 40 * L  # on a grid: features 1/40 of the span apart
            if kind == "point":
                loads.append(PointLoad(case, draw(st.floats(-1e4, 1e4)), a))
            elif kind == "moment":
                if any(abs(a - h) < 1e-6 * L for h in hinges):
                    continue
                loads.append(Couple(case, draw(st.floats(-1e4, 1e4)), a))
            else:
                b = draw(st.integers(0, 40)) / 40 * L
                lo, hi = min(a, b), max(a, b)
                assume(hi - lo > 1e-3 * L)
                w1 = draw(st.floats(-5e3, 5e3))
                w2 = w1 if kind == "udl" else draw(st.floats(-5e3, 5e3))
                loads.append(DistributedLoad(case, w1, w2, lo, hi))
    try:
        model = BeamModel(L, tuple(sups), stiff, tuple(loads), hinges)
        if with_loads:
            assume(model.cases)
            sol = solve(model)
        else:
            from leanspan.beam import check_mechanism
            check_mechanism(model)
            sol = None
    except MechanismError:
        assume(False)
    return model, sol


def _applied(model, case):
    """Total upward force and counter-clockwise moment about x = 0 of the applied loads."""
    F = Mo = 0.0
    for ld in model.loads:
        if ld.case != case:
            continue
        if isinstance(ld, PointLoad):
            F -= ld.P
            Mo -= ld.P * ld.at
        elif isinstance(ld, Couple):
            Mo += ld.M
        else:
            a, b = ld.start, ld.end
            c = b - a
            F -= (ld.w1 + ld.w2) / 2 * c
            Mo -= c / 6 * (ld.w1 * (2 * a + b) + ld.w2 * (a + 2 * b))  # integral of w(x) x dx
    return F, Mo


def _scale(model, case):
    out = 1.0
    for ld in model.loads:
        if ld.case == case:
            out = max(out, abs(getattr(ld, "P", 0.0)), abs(getattr(ld, "M", 0.0)) / model.length,
                      abs(getattr(ld, "w1", 0.0)) * model.length, abs(getattr(ld, "w2", 0.0)) * model.length)
    return out


@SETTINGS
@given(beams())
def test_equilibrium(mb):
    model, sol = mb
    for case in model.cases:
        F, Mo = _applied(model, case)
        R = sol.results[case].reactions
        sF = F + sum(r["force"] for r in R)
        sM = Mo + sum(r["force"] * r["at"] + r["moment"] for r in R)
        s = _scale(model, case)
        assert abs(sF) <= 1e-9 * s * 10
        assert abs(sM) <= 1e-9 * s * model.length * 10


def _eval(sol, case, key, x):
    r = sol.response
    u = r.unit_cases.index(case)
    e = np.clip(np.searchsorted(r.x_nodes, x, side="right") - 1, 0, len(r.lengths) - 1)
    return poly.evaluate(getattr(r, key)[0, u, e], x - r.x_nodes[e])


@SETTINGS
@given(beams())
def test_fields_continuous_and_consistent(mb):
    """v continuous everywhere, theta except at hinges; M = EI v'' and V = -dM/dx by finite differences."""
    model, sol = mb
    r = sol.response
    L = model.length
    for case in model.cases:
        u = r.unit_cases.index(case)
        v, th = r.v[0, u], r.theta[0, u]
        end_v = poly.evaluate(v[:-1], r.lengths[:-1])
        ext = sol.results[case].extremes
        # floor: round-off of the largest deflection the applied loads could cause (a load sitting
        # on a support leaves a response that is pure round-off)
        v_round = 1e-13 * _scale(model, case) * L**3 / r.EI[0].min()
        vscale = max(abs(ext["v_max"].value), abs(ext["v_min"].value)) + 1e-300
        assert np.allclose(end_v, v[1:, 0], rtol=0, atol=1e-9 * vscale + v_round)
        end_t = poly.evaluate(th[:-1], r.lengths[:-1])
        hinge = np.isin(np.round(r.x_nodes[1:-1] / L, 9), np.round(np.array(model.hinges) / L, 9))
        tscale = max(abs(ext["theta_max"].value), abs(ext["theta_min"].value)) + 1e-300
        assert np.allclose(end_t[~hinge], th[1:, 0][~hinge], rtol=0, atol=1e-8 * tscale + v_round / L)
        # finite differences at the middle of each element (fields are smooth inside)
        xm = r.x_nodes[:-1] + r.lengths / 2
        h = 1e-3 * r.lengths
        ei = r.EI[0]
        vm, vp, v0 = (_eval(sol, case, "v", xm - h), _eval(sol, case, "v", xm + h), _eval(sol, case, "v", xm))
        d2v = (vp - 2 * v0 + vm) / h**2
        M = _eval(sol, case, "M", xm)
        Mscale = max(abs(ext["M_max"].value), abs(ext["M_min"].value)) + 1e-9 * _scale(model, case) * L
        # floor: a second difference of v carries round-off ~ eps |v| / h^2 (large when a spring
        # support lets the beam move as a rigid body while M is nearly zero)
        fd_round = 16 * np.finfo(float).eps * ei * np.maximum.reduce([abs(vm), abs(vp), abs(v0)]) / h**2
        assert np.allclose(ei * d2v, M, rtol=0, atol=1e-4 * Mscale + fd_round)
        h = 1e-4 * r.lengths  # M is at most cubic: the central-difference error h^2 M'''/6 stays tiny
        dM = (_eval(sol, case, "M", xm + h) - _eval(sol, case, "M", xm - h)) / (2 * h)
        V = _eval(sol, case, "V", xm)
        Vscale = np.abs(V).max() + Mscale / L
        assert np.allclose(-dM, V, rtol=0, atol=1e-6 * Vscale)


@SETTINGS
@given(beams(with_loads=False), st.integers(0, 40).map(lambda i: i / 40), st.integers(0, 40).map(lambda i: i / 40))
def test_maxwell_betti(mb, fa, fb):
    """Deflection at b from a unit load at a equals deflection at a from a unit load at b."""
    model, _ = mb
    L = model.length
    a, b = fa * L, fb * L
    m = BeamModel(L, model.supports, model.stiffness, (PointLoad("A", 1.0, a), PointLoad("B", 1.0, b)),
                  model.hinges)
    sol = solve(m)
    vab = float(_eval(sol, "A", "v", np.array(b)))
    vba = float(_eval(sol, "B", "v", np.array(a)))
    # floor: round-off of a unit load's deflection, for loads that sit on a support
    scale = max(abs(vab), abs(vba), abs(sol.results["A"].extremes["v_min"].value),
                1e-4 * L**3 / min(s.EI for s in model.stiffness))
    assert abs(vab - vba) <= 1e-9 * scale


@SETTINGS
@given(beams(), st.floats(-3, 3), st.floats(-3, 3))
def test_superposition(mb, fa, fb):
    """A combination fa*A + fb*B equals one case holding the loads scaled by hand."""
    model, sol = mb
    assume(set(model.cases) == {"A", "B"})
    combo = Combination("C", (("A", fa), ("B", fb)))
    m1 = BeamModel(model.length, model.supports, model.stiffness, model.loads, model.hinges, (combo,))
    scaled = []
    for ld in model.loads:
        f = fa if ld.case == "A" else fb
        if isinstance(ld, PointLoad):
            scaled.append(PointLoad("S", f * ld.P, ld.at))
        elif isinstance(ld, Couple):
            scaled.append(Couple("S", f * ld.M, ld.at))
        else:
            scaled.append(DistributedLoad("S", f * ld.w1, f * ld.w2, ld.start, ld.end))
    m2 = BeamModel(model.length, model.supports, model.stiffness, tuple(scaled), model.hinges)
    r1, r2 = solve(m1).results["C"], solve(m2).results["S"]
    # a floor for the tolerances: the applied loads themselves (cases whose loads sit on
    # supports give responses that are pure round-off, ~1e-16)
    load_scale = max(abs(fa), abs(fb)) * sum(
        abs(ld.P) if isinstance(ld, PointLoad) else abs(ld.M) / model.length if isinstance(ld, Couple)
        else (abs(ld.w1) + abs(ld.w2)) * (ld.end - ld.start) for ld in model.loads)

    def size(r, letter):
        return max(abs(r.extremes[k].value) for k in r.extremes if k[0] == letter)

    for key in ("M_max", "M_min", "V_max", "v_min", "v_max"):
        scale = max(abs(fa), abs(fb)) * (size(sol.results["A"], key[0]) + size(sol.results["B"], key[0]))
        unit = {"M": model.length, "V": 1.0, "v": model.length**3 / min(s.EI for s in model.stiffness)}
        scale = max(scale, load_scale * unit[key[0]]) + 1e-300
        assert r1.extremes[key].value == pytest.approx(r2.extremes[key].value, abs=1e-9 * scale)
    fscale = max(abs(fa), abs(fb)) * sum(max(abs(x["force"]) for x in sol.results[c].reactions) for c in "AB")
    fscale = max(fscale, load_scale)
    for a, b in zip(r1.reactions, r2.reactions):
        assert a["force"] == pytest.approx(b["force"], abs=1e-9 * fscale + 1e-300)


@st.composite
def determinate_and_continuous(draw):
    """Cantilevers, simple spans and continuous spans with overhangs, loads anywhere (no grid:
    loads may sit arbitrarily close to each other and to the supports)."""
    L = draw(st.floats(0.5, 30.0))
    kind = draw(st.sampled_from(["cantilever", "simple", "continuous"]))
    if kind == "cantilever":
        sups = (Support(draw(st.sampled_from([0.0, L])), "fixed"),)
    elif kind == "simple":
        sups = (Support(0.0, "pin"), Support(L, "roller"))
    else:
        fr = sorted(draw(st.lists(st.floats(0.0, 1.0), min_size=2, max_size=6, unique=True)))
        assume(min(np.diff(fr)) > 0.02)
        # a support within FEATURE_GAP of an end shares the end's node by design (README "Known
        # limits"); its reaction then acts 1e-6 L from where it is reported: not round-off
        assume(all(f == 0.0 or f == 1.0 or 1e-5 < f < 1 - 1e-5 for f in fr))
        ends = draw(st.sampled_from(["pin", "fixed"]))
        sups = tuple(Support(f * L, ends if i == 0 else "roller") for i, f in enumerate(fr))
    loads = []
    frac = st.floats(0.0, 1.0)
    # magnitudes 0 or at least 1e-6 (N, N*m, N/m): below about 1e-300 floats go subnormal and lose
    # relative precision, which no relative round-off bound survives (and no job carries such loads)
    real = lambda top: st.one_of(st.just(0.0), st.floats(1e-6, top), st.floats(-top, -1e-6))  # noqa: E731
    for _ in range(draw(st.integers(1, 12))):
        what = draw(st.sampled_from(["point", "couple", "udl", "linear"]))
        at = draw(frac) * L
        if what == "point":
            loads.append(PointLoad("A", draw(real(1e5)), at))
        elif what == "couple":
            loads.append(Couple("A", draw(real(1e5)), at))
        else:
            end = min(L, at + draw(st.floats(1e-4, 1.0)) * L)
            assume(end - at > 1e-5 * L)
            w1 = draw(real(2e4))
            loads.append(DistributedLoad("A", w1, w1 if what == "udl" else draw(real(2e4)), at, end))
    return BeamModel(L, sups, (Stiffness(0.0, L, draw(st.floats(1e3, 1e9))),), tuple(loads))


@settings(max_examples=1000, deadline=None, suppress_health_check=[HealthCheck.too_slow, HealthCheck.filter_too_much])
@given(determinate_and_continuous())
def test_equilibrium_to_round_off(model):
    """Sum of vertical forces and of moments about x = 0 (reactions + applied loads) vanish to
    1e-10 of the load scale: statics of the free body (any mechanics textbook)."""
    sol = solve(model)
    F, Mo = _applied(model, "A")
    R = sol.results["A"].reactions
    L = model.length
    scale = sum(abs(ld.P) if isinstance(ld, PointLoad) else abs(ld.M) / L if isinstance(ld, Couple)
                else (abs(ld.w1) + abs(ld.w2)) / 2 * (ld.end - ld.start) for ld in model.loads) + 1e-300
    # load ends within LOAD_SNAP * L of a node move onto it (the solver's documented round-off of
    # positions): each end may add or drop w * LOAD_SNAP * L of load, beside the 1e-10 round-off
    snapped = sum(2 * max(abs(ld.w1), abs(ld.w2)) * LOAD_SNAP * L for ld in model.loads
                  if isinstance(ld, DistributedLoad))
    assert abs(F + sum(r["force"] for r in R)) <= 1e-10 * scale + snapped
    assert abs(Mo + sum(r["force"] * r["at"] + r["moment"] for r in R)) <= (1e-10 * scale + snapped) * L
