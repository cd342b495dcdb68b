"""What `solve` reports (extremes and where they lie, stations, envelope bounds and members,
deflection checks) against a brute-force loop over the same exact fields.

The reference rebuilds each result's member fields from the unit cases of ``sol.response`` in a
plain Python loop, samples them densely with numpy.polynomial (an independent general-purpose
evaluator) and takes maxima and minima by brute force. The fields themselves are checked against
closed-form beam formulas in test_beam_closed_form.py; this file checks the result building: root
finding, the rows it skips, the station layout and the reductions over members.
"""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pytest
from numpy.polynomial import polynomial as npoly

from leanspan.beam import (BeamModel, Combination, Couple, DeflectionLimit, DistributedLoad, PointLoad,
                           Stiffness, Support, parse_beam, solve)
from leanspan.beam.model import G
from leanspan.fileio import load_toml
from leanspan.select.member import section_stiffness

EXAMPLES = Path(__file__).resolve().parents[1] / "data" / "examples"
FIELDS = ("V", "M", "theta", "v")
SAMPLES = 4001  # per element: a smooth extreme is missed by about (1 / 8000)^2 of the curvature term


def _invented_models():
    """Invented beams beside the examples: three spans with mixed loads and a pattern, and a
    hinged beam on a spring with a stepped stiffness."""
    rng = np.random.default_rng(5)
    L = 15.0
    loads = [DistributedLoad("dead", 3e3, 3e3, 0, L), DistributedLoad("imposed", 4e3, 4e3, 0, L)]
    for k in range(12):
        a = float(rng.uniform(0, L))
        case = ("dead", "imposed", "snow")[k % 3]
        if k % 3 == 0:
            loads.append(PointLoad(case, float(rng.uniform(1e3, 1e4)), a))
        elif k % 3 == 1:
            loads.append(DistributedLoad(case, float(rng.uniform(0, 3e3)), float(rng.uniform(0, 3e3)), a,
                                         min(L, a + float(rng.uniform(0.5, 4)))))
        else:
            loads.append(Couple(case, float(rng.uniform(-5e3, 5e3)), a))
    limit = DeflectionLimit(ratio=300.0, text="span/300")
    combos = (Combination("ULS", (("dead", 1.35), ("imposed", 1.5), ("snow", 0.75))),
              Combination("ULS pattern", (("dead", 1.35), ("imposed", 1.5)), pattern="imposed"),
              Combination("SLS", (("dead", 1.0), ("imposed", 1.0), ("snow", 0.5)), "deflection", limit))
    three = BeamModel(L, (Support(0, "pin"), Support(5, "roller"), Support(10, "roller"), Support(15, "roller")),
                      (Stiffness(0, L, 2e7),), tuple(loads), combinations=combos)
    hinged = BeamModel(9.0, (Support(0, "fixed"), Support(4.0, "spring", k=3e6), Support(9.0, "roller")),
                       (Stiffness(0, 6.2, 4e6), Stiffness(6.2, 9.0, 2.5e6)),
                       (DistributedLoad("dead", 1.5e3, 2.5e3, 0, 9.0), PointLoad("imposed", 6e3, 7.0),
                        Couple("imposed", 2e3, 2.0)), hinges=(5.5,),
                       combinations=(Combination("ULS", (("dead", 1.35), ("imposed", 1.5))),
                                     Combination("SLS", (("dead", 1.0), ("imposed", 1.0)), "deflection",
                                                 DeflectionLimit(ratio=250.0, text="span/250"))),
                       mass_per_length=30.0, self_weight="dead")
    return {"invented three spans": three, "invented hinged spring": hinged}


def _models():
    out = {}
    for path in sorted(EXAMPLES.glob("beam-*.toml")):
        out[path.name] = parse_beam(load_toml(path), path.parent, field_prefix=f"{path.name}: ",
                                    section_stiffness=section_stiffness)
    out.update(_invented_models())
    return out


MODELS = _models()


def _member_factors(sol, result):
    """Factor rows over the unit cases of each member of a result (rebuilt here, by name)."""
    resp, model = sol.response, sol.model
    U = len(resp.unit_cases)
    weight = model.mass_per_length * G if model.mass_per_length is not None else 0.0
    by_name = {c.name: c for c in resp.combos}
    rows = []
    for name in result.members:
        if name in by_name:  # a concrete combination (pattern members included)
            f = by_name[name].factors.copy()
            if resp.self_weight_index is not None:
                f[resp.self_weight_index] *= weight
        else:  # a load case
            f = np.zeros(U)
            f[resp.unit_cases.index(name)] = 1.0
            if name == model.self_weight:
                f[resp.self_weight_index] = weight
        rows.append(f)
    return rows


def _fields(sol, factors):
    """Coefficients (E, n) of each field of one member, summed case by case."""
    resp = sol.response
    out = {}
    for key in FIELDS:
        unit = getattr(resp, key)[0]
        total = np.zeros(unit.shape[1:])
        for u, f in enumerate(factors):
            total = total + f * unit[u]
        out[key] = total
    return out


def _dense(coef, lengths):
    """Values (E, SAMPLES) of each element's polynomial on its own length."""
    t = np.linspace(0.0, 1.0, SAMPLES)
    scaled = coef * lengths[:, None] ** np.arange(coef.shape[1])
    return npoly.polyval(t, scaled.T)


def _at(coef, x_nodes, x):
    """The field at x from the element on each side of it (two values at a node)."""
    e = int(np.clip(np.searchsorted(x_nodes, x, side="right") - 1, 0, len(x_nodes) - 2))
    sides = {e, max(e - 1, 0)} if abs(x - x_nodes[e]) <= 1e-12 * x_nodes[-1] else {e}
    return [float(npoly.polyval(x - x_nodes[k], coef[k])) for k in sides]


@pytest.mark.parametrize("name", sorted(MODELS))
def test_results_against_brute_force(name):
    sol = solve(MODELS[name])
    resp = sol.response
    x_nodes, lengths = resp.x_nodes, resp.lengths
    for rname, res in sol.results.items():
        members = [_fields(sol, f) for f in _member_factors(sol, res)]
        many = len(members) > 1
        for key in FIELDS:
            dense = np.array([_dense(m[key], lengths) for m in members])  # (members, E, SAMPLES)
            scale = max(np.abs(dense).max(), 1e-300)
            for which, pick in (("max", np.max), ("min", np.min)):
                ext = res.extremes[f"{key}_{which}"]
                brute = pick(dense)
                sign = 1.0 if which == "max" else -1.0
                # exact extremes lie on or beyond every sample, and within sampling accuracy of the best
                assert sign * (ext.value - brute) >= -1e-9 * scale, (name, rname, key, which)
                assert abs(ext.value - brute) <= 1e-6 * scale, (name, rname, key, which, ext.value, brute)
                # the reported member's field takes that value where it is reported
                k = res.members.index(ext.member) if many else 0
                here = _at(members[k][key], x_nodes, ext.at)
                assert min(abs(h - ext.value) for h in here) <= 1e-9 * scale, (name, rname, key, which)
            # every station lies on the fields (on one side of a node), the envelope's on their bounds
            st = res.stations
            assert np.all(np.diff(st["x"]) >= 0)
            for i in range(0, st["x"].size, 7):  # every 7th station keeps the loop short
                x = float(st["x"][i])
                vals = np.array([_at(m[key], x_nodes, x) for m in members])  # (members, sides)
                if many:
                    for bound, pick in ((f"{key}_max", np.max), (f"{key}_min", np.min)):
                        assert np.min(np.abs(pick(vals, axis=0) - st[bound][i])) <= 1e-9 * scale, (name, rname, x)
                else:
                    assert np.min(np.abs(vals[0] - st[key][i])) <= 1e-9 * scale, (name, rname, key, x)
        # envelope reactions: the bounds over the members' own reactions
        if many:
            R = np.array([np.einsum("u,usj->sj", f, resp.reactions[0]) for f in _member_factors(sol, res)])
            for s, row in enumerate(res.reactions):
                assert row["force_max"] == pytest.approx(R[:, s, 0].max(), rel=1e-12, abs=1e-9)
                assert row["moment_min"] == pytest.approx(R[:, s, 1].min(), rel=1e-12, abs=1e-9)
        # deflection checks: the worst |v| / allowed over the deflection members, span by span
        combos = {c.name: c for c in resp.combos}
        defl = [(i, combos[n]) for i, n in enumerate(res.members)
                if n in combos and combos[n].check == "deflection" and combos[n].limit is not None]
        mid = x_nodes[:-1] + lengths / 2
        for chk in res.deflection_checks:
            a, b = chk["from"], chk["to"]
            inside = (mid > a) & (mid < b)
            utils = [np.abs(_dense(members[i]["v"], lengths)[inside]).max() / c.limit.allowed(b - a)
                     for i, c in defl]
            assert chk["utilisation"] == pytest.approx(max(utils), rel=1e-6), (name, rname, chk["span"])
        assert (len(res.deflection_checks) > 0) == bool(defl)
