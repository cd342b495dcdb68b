"""The README's "Use from Python" example runs as written and gives the hand values."""

from __future__ import annotations

import re
from pathlib import Path

import pytest

README = Path(__file__).resolve().parents[1] / "README.md"


def test_use_from_python_example(tmp_path, monkeypatch, capsys):
    text = README.read_text(encoding="utf-8")
    part = text.split("## Use from Python", 1)[1]
    code = re.search(r"```python\n(.*?)```", part, re.S).group(1)
    monkeypatch.chdir(tmp_path)
    ns: dict = {}
    exec(compile(code, "README.md", "exec"), ns)  # noqa: S102 - the documented example itself
    # transformed section: E_timber x 2 (45 x 220^3 / 12) + E_steel x 12 x 200^3 / 12, both parts
    # centred at mid-depth 110 mm (C24 E0,mean 11 kN/mm^2, EN 338 Table 1; S355 E 210 kN/mm^2,
    # EN 1993-1-1 3.2.6)
    EI = 11e9 * 2 * 0.045 * 0.22**3 / 12 + 210e9 * 0.012 * 0.2**3 / 12
    assert ns["member"].EI == pytest.approx(EI, rel=1e-9)
    # mid-span deflection of a simply supported span, 5 w L^4 / (384 EI) (beam-formula handbooks)
    v = ns["beam"].results["imposed"].extremes["v_min"].value
    assert v == pytest.approx(-5 * 3e3 * 4.2**4 / (384 * EI), rel=1e-9)
    ranked = ns["ranked"]
    assert list(ranked["rank"][:3]) == [1, 2, 3] and bool(ranked["passes"].iloc[0])
    assert {"bending", "shear", "deflection", "governing"} <= set(ranked.columns)
    assert "rect" in capsys.readouterr().out
