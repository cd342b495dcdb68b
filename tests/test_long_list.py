"""Long lists: the chunked screen, the first pass on the worst effects, and the kept rows.

A search of more than ``LONG_LIST`` rows sorts every row into pass and fail first
(:func:`leanspan.select.screen.screen_verdicts`) and screens in full only the rows the ranked
table can show. The references are the whole screen of every row at once (the same code path the
short lists take, itself tested against the one-candidate-at-a-time solver in
``test_select_property``) and a selection over the full table: they must agree on every verdict,
utilisation, the winner, the rows shown and the counts. Jobs, lists and loads are invented.
"""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from leanspan.beam import G, respond
from leanspan.beam.results import snap_round_off
from leanspan.select import long_list, search
from leanspan.select.envelope import EnvelopeTable, Peak, envelope_pieces
from leanspan.select.extremes import _cubic_best
from leanspan.select.job import parse_job
from leanspan.select.screen import screen, screen_chunks, screen_verdicts
from leanspan.select.search import candidate_table, run_selection
from test_envelope_screen import many_candidates
from test_select_property import jobs, random_candidates


def _verdicts(res):
    return res.passes, np.fmax.reduce(np.stack(list(res.utilisation.values()), axis=1), axis=1)


@settings(max_examples=40, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(job=jobs(), cand=many_candidates(), chunk=st.sampled_from([7, 256, 5000]))
def test_chunks_equal_the_whole_screen(job, cand, chunk):
    # reference: one screen of every candidate at once
    sw = job.search.self_weight
    whole = screen(job.model, cand, sw, first_pass=True)
    seen = np.zeros(cand.size, int)
    for rows, res in screen_chunks(job.model, cand, sw, first_pass=True, chunk=chunk, workers=2):
        seen[rows] += 1
        for c, u in whole.utilisation.items():
            a, b = res.utilisation[c], u[rows]
            ok = ~np.isnan(b)
            if np.isnan(b).all():  # a check that does not apply to the job (or to these rows)
                continue
            np.testing.assert_allclose(a[ok], b[ok], rtol=1e-12, atol=0, err_msg=c)
    assert (seen == 1).all()  # every candidate in exactly one chunk


@settings(max_examples=60, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(job=jobs(), cand=many_candidates())
def test_verdicts_equal_the_full_screen(job, cand):
    # reference: the full first-pass screen, every combination per candidate
    sw = job.search.self_weight
    passes, worst = _verdicts(screen(job.model, cand, sw, first_pass=True))
    fast, fast_worst, some = screen_verdicts(job.model, cand, sw, chunk=500)
    np.testing.assert_array_equal(np.isnan(fast_worst), np.isnan(worst))
    ok = ~np.isnan(worst)
    # 1e-12: with springs each chunk is its own batched solve
    np.testing.assert_allclose(fast_worst[ok], worst[ok], rtol=1e-12, atol=0)
    # a verdict may differ only where the utilisation is 1 to round-off (a last-bit tie)
    differ = fast != passes
    assert np.all(np.abs(worst[differ] - 1.0) < 1e-12)


def test_worst_over_combinations_is_the_max_of_the_effects(tmp_path):
    # reference: the per-combination envelope effects, reduced by numpy over the combinations
    _write_list(tmp_path, 2, seed=1)
    job = _job(_BEAM, tmp_path)
    rng = np.random.default_rng(5)
    cand = random_candidates(rng, 4000, rng.uniform(5, 300, 4000))

    resp = respond(job.model, EI=cand.EI[:1], unit_self_weight=True, self_weight_case="dead")
    u = np.unique(cand.mass_per_length * G)
    table = EnvelopeTable(resp, u)
    e, w = table.effects(), table.worst(100, 3100)
    M_max, M_min = snap_round_off(e["M_max"], e["M_min"])
    np.testing.assert_array_equal(w["M_max"], np.nanmax(M_max[:, 100:3100], axis=0))
    np.testing.assert_array_equal(w["M_min"], np.nanmin(M_min[:, 100:3100], axis=0))
    np.testing.assert_array_equal(w["V_abs"], np.nanmax(e["V_abs"][:, 100:3100], axis=0))
    ratio = e["v_abs"] / e["v_allowed"]
    j = np.nanargmax(ratio[:, 100:3100], axis=0)
    cols = np.arange(3000)
    np.testing.assert_array_equal(w["v_allowed"], e["v_allowed"][:, 100:3100][j, cols])


def test_pieces_on_a_range_equal_the_whole():
    # reference: the pieces evaluated on every weight at once; any sub-range must give the same bits
    w = np.sort(np.random.default_rng(6).uniform(0.0, 6.0, 9000))
    p = Peak([[0.0, 10.0, -1.0, 0.0]], [[0.0, 2.0, -1.0, 0.0]], [4.0])
    q = Peak([[5.0, 0.0, 0.0, 0.0], [8.0, 0.0, 0.0, 0.0]], [[1.0, 0.0, 0.0, 0.0], [-1.0, 0.0, 0.0, 0.0]], [1.0, 1.0])
    pieces = envelope_pieces([p, q], w, _cubic_best)
    whole, tags = pieces.values()
    for lo, hi in ((0, 1), (17, 4113), (4096, 9000), (8999, 9000)):
        part, t = pieces.values(lo, hi)
        np.testing.assert_array_equal(part, whole[:, lo:hi])
        np.testing.assert_array_equal(t, tags[:, lo:hi])


# -- the selection over a long list, against the selection over the full table ------------------

_BEAM = ('[beam]\nspans = ["4.5 m", "5.5 m"]\n'
         '[[load]]\ncase = "dead"\ntype = "udl"\nw = "{dead} kN/m"\n'
         '[[load]]\ncase = "imposed"\ntype = "udl"\nw = "4 kN/m"\n'
         '[[load]]\ncase = "imposed"\ntype = "point"\nP = "9 kN"\nat = "7 m"\n'
         '[[combination]]\nname = "ULS"\ncheck = "strength"\nfactors = {{ dead = 1.35, imposed = 1.5 }}\n'
         '[[combination]]\nname = "ULS pattern"\ncheck = "strength"\npattern = "imposed"\n'
         'factors = {{ dead = 1.35, imposed = 1.5 }}\n'
         '[[combination]]\nname = "SLS"\ncheck = "deflection"\nlimit = "span/300"\n'
         'factors = {{ dead = 1.0, imposed = 1.0 }}\n'
         '[[combination]]\nname = "SLS imposed"\ncheck = "deflection"\nlimit = "12 mm"\n'
         'factors = {{ imposed = 1.0 }}\n'
         '{support}'
         '[search]\ncatalog = "list.csv"\nself_weight = "dead"\n{limits}')


def _job(text, tmp=None, dead=3, support="", limits='[limits]\nstress_factor = 0.6\n'):
    import tomllib

    data = tomllib.loads(text.format(dead=dead, support=support, limits=limits))
    return parse_job(data, Path(tmp) if tmp else Path("."))


def _write_list(folder, n, seed):
    """An invented supplier list: timber rectangles and steel I sections of random sizes."""
    rng = np.random.default_rng(seed)
    d = rng.integers(120, 400, n)
    b = np.where(np.arange(n) % 2, rng.integers(40, 200, n), (d * rng.uniform(0.4, 0.6, n)).astype(int))
    tw = np.round(d / 40 + rng.uniform(0, 3, n), 1)
    timber = [f"rectangle,C24,{x},{y},,," for x, y in zip(d[1::2], b[1::2])]
    steel = [f"ibeam,S355,{x},{y},{t},{round(t * 1.5, 1)},{round(t * 2, 1)}"
             for x, y, t in zip(d[0::2], b[0::2], tw[0::2])]
    rows = ["# invented supplier list for a test", "family,material,d,b,tw,tf,r"] + timber + steel
    (Path(folder) / "list.csv").write_text("\n".join(rows) + "\n", encoding="utf-8")


@pytest.mark.parametrize("variant", ["plain", "nothing passes", "spring", "design", "objective depth",
                                     "vibration", "restraints"])
def test_long_list_selection_equals_the_full_table(tmp_path, monkeypatch, variant):
    # reference: run_selection on the full table given directly (no long-list path: every row
    # screened in full at once and ranked)
    monkeypatch.setenv("LEANSPAN_NO_CACHE", "1")
    _write_list(tmp_path, 900, seed=11)
    kw = {}
    if variant == "nothing passes":
        kw["dead"] = 400
    if variant == "spring":
        kw["support"] = ('[[support]]\nat = "0 m"\ntype = "pin"\n[[support]]\nat = "4.5 m"\ntype = "spring"\n'
                         'k = "3000 kN/m"\n[[support]]\nat = "10 m"\ntype = "roller"\n')
    if variant == "vibration":  # a check that reads the member alone (the fast first pass still applies)
        kw["limits"] = '[limits]\nstress_factor = 0.6\nmin_frequency = "9 Hz"\n'
    if variant == "restraints":  # lateral-torsional buckling: the first pass in chunks
        kw["limits"] = ('[limits]\nstress_factor = 0.6\nlateral_restraint = "supports"\n'
                        'lateral_restraint_at = ["2.5 m", "7 m"]\n')
    if variant == "design":
        kw["limits"] = ('[design]\nservice_class = 1\nduration = { dead = "permanent", imposed = "medium" }\n'
                        'psi2 = { imposed = 0.3 }\n')
    text = _BEAM.replace('self_weight = "dead"\n', 'self_weight = "dead"\nobjective = "depth"\n') \
        if variant == "objective depth" else _BEAM
    job = _job(text, tmp_path, **kw)
    full = run_selection(job, table=candidate_table(job.search))
    monkeypatch.setattr(search, "LONG_LIST", 100)
    monkeypatch.setattr(long_list, "KEEP", 12)
    monkeypatch.setattr("leanspan.select.screen.CHUNK", 64)
    long = run_selection(job)
    assert len(long.table) < len(full.table)  # the long path ran and dropped rows
    assert long.screened == full.screened == 900
    assert long.passing == full.passing
    assert long.success == full.success
    assert long.message == full.message
    assert long.warnings == full.warnings  # worked out on every row, not only the kept ones
    a, b = long.shown(10), full.shown(10)
    assert [r["name"] for r in a] == [r["name"] for r in b]
    for x, y in zip(a, b):
        assert x["passes"] == y["passes"]
        if y["passes"]:  # a failing row's rank counts the kept rows only (README, "Long lists")
            assert x["rank"] == y["rank"]
        for c, u in y["utilisation"].items():
            if u is None:
                assert x["utilisation"][c] is None
            else:
                assert x["utilisation"][c] == pytest.approx(u, rel=1e-12)


def test_a_close_call_of_the_first_pass_is_decided_by_the_full_screen(tmp_path, monkeypatch):
    # reference: the full table. The first pass is made to fail the winner at 1 - 1e-12 (as a
    # round-off difference could); the row must be kept, screened again and win as before.
    monkeypatch.setenv("LEANSPAN_NO_CACHE", "1")
    _write_list(tmp_path, 900, seed=12)
    job = _job(_BEAM, tmp_path)
    full = run_selection(job, table=candidate_table(job.search))
    winner = full.chosen["name"]
    real = screen_verdicts
    names = candidate_table(job.search)["name"].to_numpy()

    def flipped(*args, **kwargs):
        passes, worst, some = real(*args, **kwargs)
        k = np.flatnonzero((names == winner) & passes)
        passes[k], worst[k] = False, 1.0 + 1e-12
        return passes, worst, some

    monkeypatch.setattr("leanspan.select.screen.screen_verdicts", flipped)
    monkeypatch.setattr(search, "LONG_LIST", 100)
    monkeypatch.setattr(long_list, "KEEP", 12)
    long = run_selection(job)
    assert long.chosen["name"] == winner
    assert [r["name"] for r in long.shown(10)] == [r["name"] for r in full.shown(10)]
    assert long.passing == full.passing
