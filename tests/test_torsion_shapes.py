"""Shapely test shapes for the torsion tests (bottom-centre of the bounding box at the origin).

The project's parametric families build the real shapes; these independent builders
keep the torsion tests self-contained. Each builder is checked here against its
closed-form area.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
import shapely
from shapely.geometry import Point, Polygon, box

QUAD = 8  # segments per quarter circle for fillets


def rectangle(b, d):
    return box(-b / 2, 0.0, b / 2, d)


def circle(d, quad_segs=64):
    return Point(0.0, d / 2).buffer(d / 2, quad_segs=quad_segs)


def tube(d, t, quad_segs=64):
    return circle(d, quad_segs).difference(Point(0.0, d / 2).buffer(d / 2 - t, quad_segs=quad_segs))


def _fillet(corner_z, corner_y, dz, dy, r):
    """Material filling a re-entrant corner at (corner_z, corner_y); the fillet grows
    into the quadrant (sign dz, sign dy)."""
    if r <= 0:
        return Polygon()
    sq = box(min(corner_z, corner_z + dz * r), min(corner_y, corner_y + dy * r),
             max(corner_z, corner_z + dz * r), max(corner_y, corner_y + dy * r))
    return sq.difference(Point(corner_z + dz * r, corner_y + dy * r).buffer(r, quad_segs=QUAD))


def ibeam(d, b, tw, tf, r=0.0, b_top=None, tf_top=None):
    bt, tft = (b_top or b), (tf_top or tf)
    pieces = [box(-b / 2, 0, b / 2, tf), box(-bt / 2, d - tft, bt / 2, d), box(-tw / 2, 0, tw / 2, d)]
    for s in (-1, 1):
        pieces.append(_fillet(s * tw / 2, tf, s, 1, r))
        pieces.append(_fillet(s * tw / 2, d - tft, s, -1, r))
    return shapely.union_all(pieces).normalize()


def channel(d, b, tw, tf, r=0.0):
    """Web on the left (z = -b/2), flanges to the right."""
    z0 = -b / 2
    pieces = [box(z0, 0, z0 + tw, d), box(z0, 0, b / 2, tf), box(z0, d - tf, b / 2, d),
              _fillet(z0 + tw, tf, 1, 1, r), _fillet(z0 + tw, d - tf, 1, -1, r)]
    return shapely.union_all(pieces).normalize()


def tee(d, b, tw, tf, r=0.0):
    """Flange on top, stem down to y = 0."""
    pieces = [box(-b / 2, d - tf, b / 2, d), box(-tw / 2, 0, tw / 2, d)]
    for s in (-1, 1):
        pieces.append(_fillet(s * tw / 2, d - tf, s, -1, r))
    return shapely.union_all(pieces).normalize()


def angle(d, b, t, r=0.0):
    """Vertical leg on the left, horizontal leg along the bottom."""
    z0 = -b / 2
    pieces = [box(z0, 0, z0 + t, d), box(z0, 0, b / 2, t), _fillet(z0 + t, t, 1, 1, r)]
    return shapely.union_all(pieces).normalize()


def box_section(b, d, t, r=0.0, quad_segs=QUAD):
    """Hollow rectangle, outer corner radius r (inner radius max(r - t, 0))."""
    def rounded(w, h, rad, y0):
        if rad <= 0:
            return box(-w / 2, y0, w / 2, y0 + h)
        core = box(-w / 2 + rad, y0 + rad, w / 2 - rad, y0 + h - rad)
        return core.buffer(rad, quad_segs=quad_segs)
    outer = rounded(b, d, r, 0.0)
    inner = rounded(b - 2 * t, d - 2 * t, max(r - t, 0.0), t)
    return outer.difference(inner)


# ---------------------------------------------------------------------------
# the builders themselves, against closed-form areas (exact geometry)

def test_ibeam_area():
    d, b, tw, tf, r = 300.0, 150.0, 7.1, 10.7, 15.0
    # plates plus four fillets, each r^2 less a quarter of the inscribed polygon
    # (QUAD chords): r^2 - QUAD * (r^2 / 2) sin(pi / (2 QUAD))
    fillet = r * r - QUAD * 0.5 * r * r * math.sin(math.pi / (2 * QUAD))
    exact = 2 * b * tf + (d - 2 * tf) * tw + 4 * fillet
    assert ibeam(d, b, tw, tf, r).area == pytest.approx(exact, rel=1e-12)
    assert ibeam(d, b, tw, tf, r).bounds == pytest.approx((-b / 2, 0.0, b / 2, d))


def test_channel_tee_angle_box_areas():
    assert channel(200, 75, 6, 10).area == pytest.approx(200 * 6 + 2 * 69 * 10)
    assert tee(150, 100, 8, 12).area == pytest.approx(100 * 12 + 138 * 8)
    assert angle(100, 80, 8).area == pytest.approx(8 * (100 + 72))
    assert box_section(100, 200, 10).area == pytest.approx(100 * 200 - 80 * 180)
    assert np.isclose(tube(100, 10).area, math.pi / 4 * (100**2 - 80**2), rtol=1e-3)
