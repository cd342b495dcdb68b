"""Bearing: the worst reaction per support from the upper envelope of lines in the weight.

Without springs each support reaction of a combination is a line in the member's weight, so the
largest over the strength combinations is an upper envelope of lines
(:meth:`leanspan.select.screen.FieldSampler.worst_reactions`). Reference: every combination's
reaction for every candidate and an argmax over them (the path kept for ``[design]``, where the
strength differs per combination), forced here by switching the envelope off. Jobs and the list
are invented.
"""

from __future__ import annotations

import numpy as np
import pytest

from leanspan.select.checks.bearing import bearing_lengths
from leanspan.select.screen import FieldSampler, screen
from leanspan.select.search import candidate_table, candidates_from_table
from test_long_list import _BEAM, _job, _write_list

_WIND = _BEAM.replace('[[combination]]\nname = "ULS pattern"',
                      '[[load]]\ncase = "wind"\ntype = "udl"\nw = "-9 kN/m"\nfrom = "6 m"\nto = "10 m"\n'
                      '[[combination]]\nname = "ULS uplift"\ncheck = "strength"\n'
                      'factors = {{ dead = 1.0, wind = 1.5 }}\n'
                      '[[combination]]\nname = "ULS pattern"')
_SUPPORTS = ('[[support]]\nat = "0 m"\ntype = "pin"\nbearing_length = "100 mm"\n'
             '[[support]]\nat = "4.5 m"\ntype = "roller"\nbearing_length = "150 mm"\n'
             '[[support]]\nat = "10 m"\ntype = "roller"\nbearing_length = "100 mm"\n')


@pytest.mark.parametrize("text", [_BEAM, _WIND], ids=["gravity", "uplift"])
def test_envelope_of_reactions_equals_every_combination(tmp_path, monkeypatch, text):
    monkeypatch.setenv("LEANSPAN_NO_CACHE", "1")
    _write_list(tmp_path, 3000, seed=3)
    job = _job(text, tmp_path, support=_SUPPORTS)
    df = candidate_table(job.search)
    res = screen(job.model, candidates_from_table(df, job.limits), job.search.self_weight)
    eff, props = res.effects, res.props
    fast = bearing_lengths(eff, props)
    monkeypatch.setattr(FieldSampler, "worst_reactions", lambda self, combos: None)
    ref = bearing_lengths(eff, props)
    for name, a, b in zip(("required", "reaction", "strength"), fast[:3], ref[:3]):
        np.testing.assert_array_equal(np.isnan(a), np.isnan(b), err_msg=name)
        ok = ~np.isnan(b)
        np.testing.assert_allclose(a[ok], b[ok], rtol=1e-12, atol=1e-9, err_msg=name)
    # the combination: the same, or one whose reaction equals the reference's to round-off
    R = eff.sampler.only(eff.sampler.strength).reactions()  # (K, Cs, S)
    pos = {c: i for i, c in enumerate(eff.sampler.strength)}
    K, S = fast[3].shape
    rows, cols = np.arange(K)[:, None], np.arange(S)[None, :]
    ja = np.vectorize(pos.get)(fast[3])
    jb = np.vectorize(pos.get)(ref[3])
    same = (ja == jb) | np.isclose(R[rows, ja, cols], R[rows, jb, cols], rtol=1e-12, atol=1e-9)
    assert same.all()
    if text is _WIND:  # uplift: some support has no upward force under some combination
        assert (R < 0).any()
