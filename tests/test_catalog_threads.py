"""Section properties of a long family block on two threads equal the one-thread computation.

Reference: :func:`leanspan.sections.properties.family_properties` with threads off (the same
chunks one after another; that path is tested against the general polygon path in
``test_user_read_reference``). The threads run the same chunks, so the numbers must be the same
bits, and a bad section must give the same error. Dimensions are random (invented).
"""

from __future__ import annotations

import importlib

import numpy as np
import pytest

from leanspan.errors import LeanspanError
from leanspan.sections.families import FAMILIES
from common import random_family_dims

P = importlib.import_module("leanspan.sections.properties")  # the module (the package exports a function of that name)


def _dims(family, n, seed):
    dims = FAMILIES[family].complete(random_family_dims(family, np.random.default_rng(seed), n))
    ok = np.all([np.asarray(v) > 0 for v in dims.values()], axis=0)  # the generator can overshoot
    return {k: np.asarray(v)[ok] for k, v in dims.items()}


@pytest.mark.parametrize("family", ["ibeam", "rectangle", "box", "tube"])
def test_two_threads_equal_one(family, monkeypatch):
    dims = _dims(family, 700, seed=8)
    monkeypatch.setattr(P, "_CHUNK", 64)  # several chunks
    monkeypatch.setattr(P.os, "cpu_count", lambda: 2)
    monkeypatch.setattr(P, "_THREAD_ROWS", 10**9)
    one = P.family_properties(family, dims, wagner=True)
    monkeypatch.setattr(P, "_THREAD_ROWS", 10)
    two = P.family_properties(family, dims, wagner=True)
    assert two.keys() == one.keys()
    for k in one:
        np.testing.assert_array_equal(two[k], one[k], err_msg=k)


def test_a_bad_section_gives_the_same_error(monkeypatch):
    dims = _dims("ibeam", 400, seed=9)
    dims["tw"] = dims["tw"].copy()
    dims["tw"][333] = dims["b"][333] * 2  # a web wider than the flanges: impossible
    monkeypatch.setattr(P, "_CHUNK", 64)
    monkeypatch.setattr(P.os, "cpu_count", lambda: 2)
    messages = []
    for rows in (10**9, 10):
        monkeypatch.setattr(P, "_THREAD_ROWS", rows)
        with pytest.raises(LeanspanError) as err:
            P.family_properties("ibeam", dims)
        messages.append(str(err.value))
    assert messages[0] == messages[1]
