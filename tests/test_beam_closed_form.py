"""Beam solver against closed forms from beam-formula handbook tables (all to 1e-9 relative).

Sources (values "from memory" of the standard tables; each formula is also re-derivable
by integrating EI v'''' = q with the stated boundary conditions):
  [R]  Roark's Formulas for Stress and Strain, 7th ed., Table 8.1 (beams; shear, moment, slope,
       deflection), and Table 8.1 case 2e/3e for linearly varying loads.
  [A]  AISC Steel Construction Manual, Table 3-23 "Shears, moments and deflections" (cases for
       simple, cantilever, propped, fixed, overhanging and continuous beams).
  [C]  Continuous-beam coefficient tables (two and three equal spans, uniform load, e.g. the
       coefficient tables in AISC Table 3-23 cases 29-35 / common design handbooks).
The stepped beam is checked against scipy.integrate.solve_bvp as an independent reference.
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from leanspan.beam import (BeamModel, Couple, DistributedLoad, PointLoad, Stiffness, Support,
                           Combination, poly, solve)

REL = 1e-9
EI = 2.5e6  # N m^2


def beam(length, supports, loads, hinges=(), stiffness=None, combos=()):
    st = stiffness or (Stiffness(0.0, length, EI),)
    return BeamModel(length, tuple(Support(*s) for s in supports), st, tuple(loads), tuple(hinges),
                     tuple(combos))


def field(sol, case, key, x):
    """Exact field value at x (right-hand limit at element boundaries)."""
    r = sol.response
    u = r.unit_cases.index(case)
    e = int(np.clip(np.searchsorted(r.x_nodes, x, side="right") - 1, 0, len(r.lengths) - 1))
    return float(poly.evaluate(getattr(r, key)[0, u, e], x - r.x_nodes[e]))


def close(a, b, rel=REL):
    assert a == pytest.approx(b, rel=rel, abs=1e-12 * max(1.0, abs(b))), (a, b)


def test_simply_supported_udl():
    # [R] Table 8.1 case 2a / [A] case 1: R = wL/2, M = wL^2/8, d = 5wL^4/(384EI), theta = wL^3/(24EI)
    L, w = 6.0, 4.0e3
    sol = solve(beam(L, [(0, "pin"), (L, "roller")], [DistributedLoad("d", w, w, 0, L)]))
    r = sol.results["d"]
    close(r.reactions[0]["force"], w * L / 2)
    close(r.extremes["M_max"].value, w * L**2 / 8)
    close(r.extremes["M_max"].at, L / 2)
    close(r.extremes["v_min"].value, -5 * w * L**4 / (384 * EI))
    close(r.extremes["v_min"].at, L / 2)
    close(field(sol, "d", "theta", 0.0), -w * L**3 / (24 * EI))


def test_off_centre_point_load():
    # [A] case 8 (from memory): M = Pab/L, R1 = Pb/L, d_load = Pa^2 b^2/(3EIL),
    # d_max = Pb (L^2-b^2)^1.5 / (9 sqrt(3) EI L) at x = sqrt((L^2-b^2)/3) for a > b
    L, P, a = 5.0, 9.0e3, 3.5
    b = L - a
    sol = solve(beam(L, [(0, "pin"), (L, "roller")], [PointLoad("p", P, a)]))
    r = sol.results["p"]
    close(r.reactions[0]["force"], P * b / L)
    close(r.reactions[1]["force"], P * a / L)
    close(r.extremes["M_max"].value, P * a * b / L)
    close(r.extremes["M_max"].at, a)
    close(field(sol, "p", "v", a), -P * a**2 * b**2 / (3 * EI * L))
    close(r.extremes["v_min"].value, -P * b * (L**2 - b**2) ** 1.5 / (9 * math.sqrt(3) * EI * L))
    close(r.extremes["v_min"].at, math.sqrt((L**2 - b**2) / 3))


def test_triangular_load():
    # [A] case 2 (from memory): load rising to w at the right end; R1 = wL/6, R2 = wL/3,
    # M_max = wL^2/(9 sqrt 3) at x = L/sqrt 3, v = w x (7L^4 - 10L^2x^2 + 3x^4)/(360 EI L),
    # d_max at x = L sqrt(1 - sqrt(8/15))
    L, w = 4.0, 6.0e3
    sol = solve(beam(L, [(0, "pin"), (L, "roller")], [DistributedLoad("t", 0.0, w, 0, L)]))
    r = sol.results["t"]
    close(r.reactions[0]["force"], w * L / 6)
    close(r.reactions[1]["force"], w * L / 3)
    close(r.extremes["M_max"].value, w * L**2 / (9 * math.sqrt(3)))
    close(r.extremes["M_max"].at, L / math.sqrt(3))
    xm = L * math.sqrt(1 - math.sqrt(8 / 15))
    close(r.extremes["v_min"].at, xm)
    close(r.extremes["v_min"].value, -w * xm * (7 * L**4 - 10 * L**2 * xm**2 + 3 * xm**4) / (360 * EI * L))


def test_cantilever_tip_load_and_tip_couple():
    # [R] Table 8.1 case 1a / [A] case 22: d = PL^3/(3EI), theta = PL^2/(2EI), M = -PL at the wall
    # [R] Table 8.1 case 3a: end couple M0: d = M0 L^2/(2EI), theta = M0 L/EI, M = M0 throughout
    L, P, M0 = 3.0, 5.0e3, 4.0e3
    sol = solve(beam(L, [(0, "fixed")], [PointLoad("p", P, L), Couple("c", M0, L)]))
    p, c = sol.results["p"], sol.results["c"]
    close(field(sol, "p", "v", L), -P * L**3 / (3 * EI))
    close(field(sol, "p", "theta", L), -P * L**2 / (2 * EI))
    close(p.extremes["M_min"].value, -P * L)
    close(p.reactions[0]["force"], P)
    close(p.reactions[0]["moment"], P * L)
    close(field(sol, "c", "v", L), M0 * L**2 / (2 * EI))
    close(field(sol, "c", "theta", L), M0 * L / EI)
    close(c.extremes["M_max"].value, M0)
    close(c.extremes["M_min"].value, M0)
    close(c.reactions[0]["moment"], -M0)


def test_propped_cantilever_udl():
    # [A] case 12: R_fixed = 5wL/8, R_prop = 3wL/8, M_fixed = -wL^2/8, M+ = 9wL^2/128 at 3L/8
    # from the prop, v = w xi (L^3 - 3L xi^2 + 2 xi^3)/(48EI) (xi from the prop), max at xi = L(1+sqrt33)/16
    L, w = 5.0, 3.0e3
    sol = solve(beam(L, [(0, "fixed"), (L, "roller")], [DistributedLoad("d", w, w, 0, L)]))
    r = sol.results["d"]
    close(r.reactions[0]["force"], 5 * w * L / 8)
    close(r.reactions[1]["force"], 3 * w * L / 8)
    close(r.reactions[0]["moment"], w * L**2 / 8)
    close(r.extremes["M_min"].value, -w * L**2 / 8)
    close(r.extremes["M_max"].value, 9 * w * L**2 / 128)
    close(r.extremes["M_max"].at, L - 3 * L / 8)
    xi = L * (1 + math.sqrt(33)) / 16
    close(r.extremes["v_min"].at, L - xi)
    close(r.extremes["v_min"].value, -w * xi * (L**3 - 3 * L * xi**2 + 2 * xi**3) / (48 * EI))


def test_fixed_fixed():
    # [A] case 15: UDL: M_end = -wL^2/12, M_mid = wL^2/24, d = wL^4/(384EI)
    # [A] case 16: central P: M_end = -PL/8, M_mid = PL/8, d = PL^3/(192EI)
    L, w, P = 4.0, 2.0e3, 7.0e3
    sol = solve(beam(L, [(0, "fixed"), (L, "fixed")],
                     [DistributedLoad("w", w, w, 0, L), PointLoad("p", P, L / 2)]))
    rw, rp = sol.results["w"], sol.results["p"]
    close(rw.extremes["M_min"].value, -w * L**2 / 12)
    close(rw.extremes["M_max"].value, w * L**2 / 24)
    close(rw.extremes["v_min"].value, -w * L**4 / (384 * EI))
    close(rp.extremes["M_min"].value, -P * L / 8)
    close(rp.extremes["M_max"].value, P * L / 8)
    close(rp.extremes["v_min"].value, -P * L**3 / (192 * EI))


def test_two_equal_spans():
    # [C] two equal spans, UDL: R = 3/8, 10/8, 3/8 wL; M_B = -wL^2/8; M+ = 9wL^2/128 at 3L/8
    # [C] central point load on each span: R_A = 5P/16, R_B = 22P/16, M_B = -3PL/16, M+ = 5PL/32
    L, w, P = 4.0, 5.0e3, 8.0e3
    sol = solve(beam(2 * L, [(0, "pin"), (L, "roller"), (2 * L, "roller")],
                     [DistributedLoad("w", w, w, 0, 2 * L), PointLoad("p", P, L / 2), PointLoad("p", P, 1.5 * L)]))
    rw, rp = sol.results["w"], sol.results["p"]
    for got, want in zip([x["force"] for x in rw.reactions], [3 / 8, 10 / 8, 3 / 8]):
        close(got, want * w * L)
    close(rw.extremes["M_min"].value, -w * L**2 / 8)
    close(rw.extremes["M_min"].at, L)
    close(rw.extremes["M_max"].value, 9 * w * L**2 / 128)
    assert rw.extremes["M_max"].at in (pytest.approx(3 * L / 8, rel=REL), pytest.approx(2 * L - 3 * L / 8, rel=REL))
    close(rp.reactions[0]["force"], 5 * P / 16)
    close(rp.reactions[1]["force"], 22 * P / 16)
    close(rp.extremes["M_min"].value, -3 * P * L / 16)
    close(rp.extremes["M_max"].value, 5 * P * L / 32)


def test_three_equal_spans_udl():
    # [C] three equal spans, UDL: R_A = 0.4 wL, R_B = 1.1 wL, M_B = -0.1 wL^2,
    # end-span M+ = 0.08 wL^2 at 0.4 L, middle-span M+ = 0.025 wL^2
    L, w = 5.0, 2.0e3
    sol = solve(beam(3 * L, [(0, "pin"), (L, "roller"), (2 * L, "roller"), (3 * L, "roller")],
                     [DistributedLoad("w", w, w, 0, 3 * L)]))
    r = sol.results["w"]
    f = [x["force"] for x in r.reactions]
    for got, want in zip(f, [0.4, 1.1, 1.1, 0.4]):
        close(got, want * w * L)
    close(r.extremes["M_min"].value, -0.1 * w * L**2)
    close(r.extremes["M_max"].value, 0.08 * w * L**2)
    close(min(r.extremes["M_max"].at, 3 * L - r.extremes["M_max"].at), 0.4 * L)
    close(field(sol, "w", "M", 1.5 * L), 0.025 * w * L**2)


def test_overhang_tip_load():
    # [A] case 26 (from memory): simple span L, overhang a, load P at the tip:
    # R_near = P(L+a)/L, R_far = -Pa/L, M at support = -Pa, tip d = Pa^2 (L+a)/(3EI),
    # greatest upward d between supports = P a L^2/(9 sqrt(3) EI) at x = L/sqrt 3
    L, a, P = 6.0, 1.5, 4.0e3
    sol = solve(beam(L + a, [(0, "pin"), (L, "roller")], [PointLoad("p", P, L + a)]))
    r = sol.results["p"]
    close(r.reactions[0]["force"], -P * a / L)
    close(r.reactions[1]["force"], P * (L + a) / L)
    close(r.extremes["M_min"].value, -P * a)
    close(field(sol, "p", "v", L + a), -P * a**2 * (L + a) / (3 * EI))
    close(r.extremes["v_max"].value, P * a * L**2 / (9 * math.sqrt(3) * EI))
    close(r.extremes["v_max"].at, L / math.sqrt(3))


def test_spring_supports():
    # Compatibility with [R] Table 8.1 cases: midspan spring under a simple beam with UDL,
    # R_s (1/k + L^3/(48EI)) = 5wL^4/(384EI); cantilever with a tip spring, R (1/k + L^3/(3EI)) = PL^3/(3EI)
    L, w, k = 8.0, 3.0e3, 2.0e5
    sol = solve(beam(L, [(0, "pin"), (L / 2, "spring", k), (L, "roller")], [DistributedLoad("w", w, w, 0, L)]))
    Rs = (5 * w * L**4 / (384 * EI)) / (1 / k + L**3 / (48 * EI))
    r = sol.results["w"]
    close(r.reactions[1]["force"], Rs)
    close(field(sol, "w", "v", L / 2), -Rs / k)
    close(r.reactions[0]["force"], (w * L - Rs) / 2)
    Lc, P = 3.0, 2.0e3
    sol = solve(beam(Lc, [(0, "fixed"), (Lc, "spring", k)], [PointLoad("p", P, Lc)]))
    R = (P * Lc**3 / (3 * EI)) / (1 / k + Lc**3 / (3 * EI))
    close(sol.results["p"].reactions[1]["force"], R)
    close(sol.results["p"].reactions[0]["moment"], (P - R) * Lc)


def test_rotational_spring_and_guided_end():
    # Guided end = symmetry plane: a guided-pin beam of length L under UDL is half of a simple beam
    # of length 2L ([R] Table 8.1 case 2a): M_guided = w(2L)^2/8, d = 5w(2L)^4/(384EI)
    L, w = 3.0, 2.0e3
    sol = solve(beam(L, [(0, "guided"), (L, "pin")], [DistributedLoad("w", w, w, 0, L)]))
    r = sol.results["w"]
    close(r.extremes["M_max"].value, w * (2 * L) ** 2 / 8)
    close(field(sol, "w", "v", 0.0), -5 * w * (2 * L) ** 4 / (384 * EI))
    # rotational spring kr at midspan of a simple beam with a couple M0 there: the couple on a simple
    # beam turns midspan by M0 L/(12EI) ([R] Table 8.1 case 3e at a = L/2); compatibility with the
    # spring gives theta = M0 L/(12EI) / (1 + kr L/(12EI)) and the spring moment -kr theta
    kr, M0 = 3.0e6, 5.0e3
    sol = solve(beam(L, [(0, "pin"), (L / 2, "spring", None, kr), (L, "roller")],
                     [Couple("c", M0, L / 2)]))
    theta = M0 * L / (12 * EI) / (1 + kr * L / (12 * EI))
    close(field(sol, "c", "theta", L / 2), theta)
    close(sol.results["c"].reactions[1]["moment"], -kr * theta)
    assert abs(sol.results["c"].reactions[1]["force"]) == 0.0


def test_gerber_beam():
    # Statics of a hinged (Gerber) beam, free bodies, with [R] Table 8.1 cantilever cases 1a, 2a:
    # fixed at 0, hinge at a, roller at L, UDL w: hinge force F = w(L-a)/2,
    # R_fixed = wa + F, M_fixed = wa^2/2 + Fa, v_hinge = -(wa^4/(8EI) + Fa^3/(3EI))
    L, a, w = 10.0, 3.0, 1.5e3
    sol = solve(beam(L, [(0, "fixed"), (L, "roller")], [DistributedLoad("w", w, w, 0, L)], hinges=(a,)))
    r = sol.results["w"]
    F = w * (L - a) / 2
    close(r.reactions[1]["force"], F)
    close(r.reactions[0]["force"], w * a + F)
    close(r.reactions[0]["moment"], w * a**2 / 2 + F * a)
    close(field(sol, "w", "v", a), -(w * a**4 / (8 * EI) + F * a**3 / (3 * EI)))
    assert abs(field(sol, "w", "M", a)) <= 1e-9 * w * L**2
    close(r.extremes["M_max"].value, w * (L - a) ** 2 / 8)


def test_pattern_loading_two_spans():
    # [C] two equal spans, UDL on one span only: R_A = 7wL/16, M_B = -wL^2/16, M+ = 49wL^2/512
    # at 7L/16; both spans loaded gives M_B = -wL^2/8. The pattern envelope must find both.
    L, w = 4.0, 3.0e3
    m = beam(2 * L, [(0, "pin"), (L, "roller"), (2 * L, "roller")], [DistributedLoad("q", w, w, 0, 2 * L)],
             combos=(Combination("P", (("q", 1.0),), pattern="q"),))
    r = solve(m).results["P"]
    assert len(r.members) == 4
    close(r.extremes["M_max"].value, 49 * w * L**2 / 512)
    close(min(r.extremes["M_max"].at, 2 * L - r.extremes["M_max"].at), 7 * L / 16)
    close(r.extremes["M_min"].value, -w * L**2 / 8)
    close(r.reactions[0]["force_max"], 7 * w * L / 16)
    close(r.reactions[0]["force_min"], -w * L / 16)


def test_stepped_beam_against_solve_bvp():
    # Independent reference: scipy.integrate.solve_bvp on v' = theta, theta' = M/EI(x), M' = -V,
    # V' = -q, with the two prismatic pieces mapped onto [0, 1] and joined by continuity conditions.
    from scipy.integrate import solve_bvp

    a, b = 2.0, 3.0  # piece lengths
    EI1, EI2, w1, w2 = 4.0e6, 1.5e6, 2.0e3, 5.0e3  # linear load w1 -> w2 over the whole beam
    L = a + b
    m = BeamModel(L, (Support(0.0, "fixed"), Support(L, "pin")),
                  (Stiffness(0.0, a, EI1), Stiffness(a, L, EI2)), (DistributedLoad("q", w1, w2, 0.0, L),))
    sol = solve(m)

    def q(x):
        return -(w1 + (w2 - w1) * x / L)

    def rhs(t, y):
        x1, x2 = a * t, a + b * t
        return np.vstack([a * y[1], a * y[2] / EI1, -a * y[3], -a * q(x1),
                          b * y[5], b * y[6] / EI2, -b * y[7], -b * q(x2)])

    def bc(y0, y1):
        return np.array([y0[0], y0[1], y1[4], y1[6],                       # fixed at 0; pin at L (v = M = 0)
                         y1[0] - y0[4], y1[1] - y0[5], y1[2] - y0[6], y1[3] - y0[7]])

    t = np.linspace(0, 1, 41)
    ref = solve_bvp(rhs, bc, t, np.zeros((8, t.size)), tol=1e-10, max_nodes=100000)
    assert ref.success
    for x in (0.0, 1.0, a, 3.7, L):
        yy = ref.sol(x / a)[:4] if x <= a else ref.sol((x - a) / b)[4:]
        for k, key in enumerate(("v", "theta", "M", "V")):
            scale = np.abs(ref.y[[k, k + 4]]).max()
            assert field(sol, "q", key, x) == pytest.approx(yy[k], abs=1e-7 * scale), (key, x)
