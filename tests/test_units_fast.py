"""The fast unit reader (a small exact table) gives what pint gives, for every unit it accepts.

pint is the independent reference here: for each quantity text the table reads, the SI value
must equal pint's to 1e-12 and the dimension must agree; texts the table leaves alone go to
pint, so the program's result is identical either way.
"""

from __future__ import annotations

import re
from pathlib import Path

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from leanspan import units
from leanspan.units import KINDS, _dim_vector, _fast_quantity, registry

ROOT = Path(__file__).resolve().parents[1]
NAMES = sorted(units._UNIT_TABLE)


def _pint(text):
    q = registry().Quantity(text)
    vector = tuple(int(q.dimensionality.get(f"[{k}]", 0)) for k in ("length", "mass", "time"))
    return float(q.to_base_units().magnitude), vector


def _agrees(text):
    fast = _fast_quantity(text)
    if fast is None:
        return
    value, vector = _pint(text)
    assert fast[1] == vector, text
    assert fast[0] == pytest.approx(value, rel=1e-12, abs=0.0), text


def test_every_quantity_in_the_docs_and_examples():
    texts = set()
    for path in [ROOT / "README.md", ROOT / "docs" / "formats.md", *sorted((ROOT / "data" / "examples").glob("*.toml")),
                 ROOT / "leanspan" / "data" / "demo.toml"]:
        texts |= set(re.findall(r'"([-+]?\d[\d.eE+-]*\s*[A-Za-z][A-Za-z0-9*/^]*)"', path.read_text(encoding="utf-8")))
    assert len(texts) > 40
    read = [t for t in texts if _fast_quantity(t) is not None]
    assert len(read) > 0.8 * len(texts)  # the table covers what job files use
    for t in texts:
        _agrees(t)


@settings(max_examples=300, deadline=None)
@given(st.floats(1e-6, 1e6), st.lists(st.tuples(st.sampled_from(NAMES), st.integers(-3, 4)), min_size=1,
                                      max_size=3), st.lists(st.sampled_from(NAMES), max_size=2))
def test_generated_units(x, num, den):
    parts = "*".join(n if p == 1 else f"{n}^{p}" for n, p in num)
    text = f"{x!r} {parts}" + (f"/{'*'.join(den)}" if den else "")
    _agrees(text)


def test_kind_vectors():
    # pint's own dimensionality of each kind (the independent reference)
    for kind, (dim, *_rest) in KINDS.items():
        d = registry().get_dimensionality(dim)
        assert _dim_vector(dim) == tuple(int(d.get(f"[{k}]", 0)) for k in ("length", "mass", "time")), kind
