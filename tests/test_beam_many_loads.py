"""Many point loads: the banded solve against superposition of handbook closed forms.

Reference (from memory; any beam handbook's "simple beam, concentrated load at any point" case):
a simply supported span L with a downward load P at x = a (b = L - a) has reactions
R_left = P b / L, R_right = P a / L, moment M(x) = P b x / L for x <= a, and deflection
v(x) = -P b x (L^2 - b^2 - x^2) / (6 EI L) for x <= a (mirror the formula for x > a).
"""

from __future__ import annotations

import numpy as np

from leanspan.beam import BeamModel, PointLoad, Stiffness, Support, poly, solve


def _handbook(P, a, L, EI, x):
    """Superposed M and v at stations x of a simple span under loads P at a (arrays)."""
    X, A, Pm = x[:, None], a[None, :], P[None, :]
    left = X <= A
    b = L - A
    # mirror image for stations right of the load: swap a <-> b and x <-> L - x
    Xm = np.where(left, X, L - X)
    Bm = np.where(left, b, A)
    M = Pm * Bm * Xm / L
    v = -Pm * Bm * Xm * (L**2 - Bm**2 - Xm**2) / (6 * EI * L)
    return M.sum(axis=1), v.sum(axis=1)


def test_2000_point_loads_match_superposed_handbook_results():
    rng = np.random.default_rng(11)
    L, EI, n = 9.0, 3.5e6, 2000
    P = rng.uniform(-50.0, 200.0, n)
    a = rng.uniform(0.0, L, n)
    model = BeamModel(L, (Support(0.0, "pin"), Support(L, "roller")), (Stiffness(0.0, L, EI),),
                      tuple(PointLoad("live", float(p), float(x)) for p, x in zip(P, a)))
    sol = solve(model)
    R = sol.results["live"].reactions
    scale = np.abs(P).sum()
    assert abs(R[0]["force"] - np.sum(P * (L - a) / L)) <= 1e-12 * scale
    assert abs(R[1]["force"] - np.sum(P * a / L)) <= 1e-12 * scale
    r = sol.response
    x = np.linspace(0.0, L, 37)[1:-1] + 0.013  # stations off the load grid
    e = np.clip(np.searchsorted(r.x_nodes, x, side="right") - 1, 0, r.lengths.size - 1)
    u = r.unit_cases.index("live")
    M = poly.evaluate(r.M[0, u, e], x - r.x_nodes[e])
    v = poly.evaluate(r.v[0, u, e], x - r.x_nodes[e])
    M_ref, v_ref = _handbook(P, a, L, EI, x)
    assert np.allclose(M, M_ref, rtol=0, atol=1e-11 * scale * L)
    assert np.allclose(v, v_ref, rtol=0, atol=1e-11 * np.abs(v_ref).max())
