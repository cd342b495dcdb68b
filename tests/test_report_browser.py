"""Headless Chromium renders the committed demo sheet to a PNG without errors, and the image
is not blank: it shows the red caution box and the drawings."""

from __future__ import annotations

import shutil
import subprocess
from pathlib import Path

import pytest

SHEET = Path(__file__).resolve().parents[1] / "data" / "examples" / "demo-sheet.html"


def _chromium():
    for name in ("chromium", "chromium-browser"):
        path = shutil.which(name)
        if path:
            return path
    return None


def test_chromium_renders_the_sheet(tmp_path):
    exe = _chromium()
    if exe is None:
        pytest.skip("no chromium binary on PATH (.ci/run installs the Debian package 'chromium')")
    from PIL import Image

    png = tmp_path / "sheet.png"
    cmd = [exe, "--headless", "--no-sandbox", "--disable-gpu", "--disable-background-networking",
           "--disable-component-update", "--disable-sync", "--no-first-run",
           f"--user-data-dir={tmp_path / 'profile'}", f"--screenshot={png}", "--window-size=1200,3000",
           SHEET.as_uri()]
    run = subprocess.run(cmd, capture_output=True, text=True, timeout=90)
    assert run.returncode == 0, run.stderr[-2000:]
    assert png.is_file() and png.stat().st_size > 10_000
    im = Image.open(png).convert("RGB")
    assert im.size == (1200, 3000)
    import numpy as np

    a = np.asarray(im.resize((300, 750)), dtype=int)
    ink = float((a.sum(axis=2) < 600).mean())
    assert ink > 0.02, f"page looks blank ({ink:.1%} non-white)"
    # the caution box (pale red fill) is visible, and the drawings add many colours
    r, g, b = a[..., 0], a[..., 1], a[..., 2]
    caution = int(((r > 240) & (g >= 225) & (g <= 245) & (b >= 225) & (b <= 240) & (r - b > 12)).sum())
    assert caution > 100, "caution box not rendered"
    assert len(np.unique(a.reshape(-1, 3), axis=0)) > 200, "too few colours: drawings missing?"
