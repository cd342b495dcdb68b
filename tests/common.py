"""Shared named shapes and helpers for the section-calculator tests.

Every builder places the bottom-centre of the bounding box at the origin (points
``[z, y]``, z horizontal, y up), like the project's parametric families. The
builders here use shapely only, independently of ``leanspan.sections.families``,
so the tests compare two separate constructions of the same shape.

``NAMED_SHAPES`` is a dict ``name -> shapely Polygon`` for parametrised tests.
``FAMILY_CASES`` lists one valid set of dimensions (metres) per family.
"""

from __future__ import annotations

import math

import numpy as np
from shapely.geometry import Point, Polygon, box

__all__ = [
    "rectangle", "triangle", "hollow_rectangle", "i_plates", "channel_plates", "tee_plates",
    "angle_plates", "ring", "NAMED_SHAPES", "FAMILY_CASES", "random_family_dims", "rel",
    "CENTROIDAL_KEYS",
]

# Properties that do not depend on where the section sits in the plane.
CENTROIDAL_KEYS = ("A", "Iz", "Iy", "Iyz", "I1", "I2", "theta", "Sz_top", "Sz_bot", "Sy_left",
                   "Sy_right", "Zz", "Zy", "rz", "ry", "depth", "width", "shear_factor")


def rectangle(b, d):
    """Solid rectangle b wide, d deep."""
    return box(-b / 2, 0.0, b / 2, d)


def triangle(b, h):
    """Isosceles triangle: base b on y = 0, apex at (0, h)."""
    return Polygon([(-b / 2, 0.0), (b / 2, 0.0), (0.0, h)])


def hollow_rectangle(b, d, t):
    """Rectangular hollow section with sharp corners, wall t."""
    return Polygon(rectangle(b, d).exterior.coords,
                   [box(-b / 2 + t, t, b / 2 - t, d - t).exterior.coords])


def ring(d, t, quad_segs=64):
    """Circular ring (coarse shapely buffer; used only for validity tests)."""
    return Point(0.0, d / 2).buffer(d / 2, quad_segs=quad_segs).difference(
        Point(0.0, d / 2).buffer(d / 2 - t, quad_segs=quad_segs))


def i_plates(d, b_top, tf_top, b_bot, tf_bot, tw):
    """An I without fillets as three touching plates (bottom flange, web, top flange)."""
    return [box(-b_bot / 2, 0.0, b_bot / 2, tf_bot),
            box(-tw / 2, tf_bot, tw / 2, d - tf_top),
            box(-b_top / 2, d - tf_top, b_top / 2, d)]


def channel_plates(d, b, tw, tf):
    """A channel without fillets (web on the left) as three touching plates."""
    back = -b / 2
    return [box(back, 0.0, back + tw, d),
            box(back + tw, 0.0, b / 2, tf),
            box(back + tw, d - tf, b / 2, d)]


def tee_plates(d, b, tw, tf):
    """A tee without fillets (flange on top) as two touching plates."""
    return [box(-tw / 2, 0.0, tw / 2, d - tf), box(-b / 2, d - tf, b / 2, d)]


def angle_plates(d, b, t):
    """An angle without fillets (vertical leg d on the left, leg b along the bottom)."""
    left = -b / 2
    return [box(left, 0.0, left + t, d), box(left + t, 0.0, b / 2, t)]


def _union(parts):
    import shapely

    return shapely.union_all(parts)


NAMED_SHAPES = {
    "square": rectangle(0.1, 0.1),
    "tall_rectangle": rectangle(0.05, 0.3),
    "wide_rectangle": rectangle(0.4, 0.02),
    "triangle": triangle(0.2, 0.3),
    "right_triangle": Polygon([(-0.05, 0.0), (0.05, 0.0), (-0.05, 0.15)]),
    "hollow_rectangle": hollow_rectangle(0.1, 0.2, 0.008),
    "i_shape": _union(i_plates(0.3, 0.15, 0.0107, 0.15, 0.0107, 0.0071)),
    "unequal_i": _union(i_plates(0.4, 0.12, 0.01, 0.2, 0.016, 0.009)),
    "channel_shape": _union(channel_plates(0.2, 0.075, 0.0085, 0.0115)),
    "tee_shape": _union(tee_plates(0.15, 0.15, 0.008, 0.012)),
    "angle_shape": _union(angle_plates(0.15, 0.09, 0.01)),
    "plate_with_hole": Polygon(rectangle(0.2, 0.1).exterior.coords,
                               [Point(0.04, 0.03).buffer(0.011, quad_segs=16).exterior.coords]),
    "z_shape": Polygon([(-0.1, 0.0), (0.01, 0.0), (0.01, 0.19), (0.1, 0.19), (0.1, 0.2),
                        (-0.01, 0.2), (-0.01, 0.01), (-0.1, 0.01)]),
    "l_with_lip": Polygon([(-0.05, 0.0), (0.05, 0.0), (0.05, 0.03), (0.04, 0.03), (0.04, 0.01),
                           (-0.04, 0.01), (-0.04, 0.12), (-0.05, 0.12)]),
}

# One valid set of dimensions (metres) for every parametric family, with fillets.
FAMILY_CASES = {
    "rectangle": {"b": 0.1, "d": 0.3},
    "circle": {"d": 0.2},
    "tube": {"d": 0.1683, "t": 0.008},
    "box": {"b": 0.1, "d": 0.2, "t": 0.008, "r": 0.012},
    "ibeam": {"d": 0.3, "b": 0.15, "tw": 0.0071, "tf": 0.0107, "r": 0.015},
    "unequal_ibeam": {"d": 0.4, "b": 0.2, "tw": 0.009, "tf": 0.014, "r": 0.02,
                          "b_top": 0.12, "tf_top": 0.01},
    "channel": {"d": 0.2, "b": 0.075, "tw": 0.0085, "tf": 0.0115, "r": 0.0115},
    "tee": {"d": 0.15, "b": 0.15, "tw": 0.008, "tf": 0.012, "r": 0.01},
    "angle": {"d": 0.15, "b": 0.09, "t": 0.01, "r": 0.011},
}


def family_of(case_name):
    """Family key of a FAMILY_CASES entry (``unequal_ibeam`` -> ``ibeam``)."""
    return "ibeam" if case_name.endswith("ibeam") else case_name


def random_family_dims(family, rng, n):
    """``n`` random valid dimension sets (arrays, metres) for ``family``, drawn by ``rng``.

    Each dimension is a random fraction of what the family's geometric rules allow,
    so every row is valid but the whole range of proportions is covered.
    """
    u = lambda lo=0.0, hi=1.0: rng.uniform(lo, hi, n)  # noqa: E731
    d = u(0.02, 1.0)
    if family == "rectangle":
        return {"b": d * u(0.05, 3.0), "d": d}
    if family == "circle":
        return {"d": d}
    if family == "tube":
        return {"d": d, "t": d / 2 * u(0.02, 0.95)}
    if family == "box":
        b = d * u(0.2, 3.0)
        m = np.minimum(b, d)
        return {"b": b, "d": d, "t": m / 2 * u(0.02, 0.9), "r": m / 2 * u(0.0, 0.95)}
    if family == "ibeam":
        b_top, b_bot = d * u(0.1, 1.2), d * u(0.1, 1.2)
        tw = np.minimum(b_top, b_bot) * u(0.02, 0.5)
        r = (np.minimum(b_top, b_bot) - tw) / 2 * u(0.0, 0.9)
        room = d - 2 * r
        tf_top, tf_bot = room * u(0.01, 0.45), room * u(0.01, 0.45)
        return {"d": d, "b": b_bot, "tw": tw, "tf": tf_bot, "r": r, "b_top": b_top,
                "tf_top": tf_top}
    if family == "channel":
        b = d * u(0.1, 1.0)
        tw = b * u(0.02, 0.5)
        r = (b - tw) * u(0.0, 0.9)
        r = np.minimum(r, d * 0.3)
        tf = (d / 2 - r) * u(0.02, 0.9)
        return {"d": d, "b": b, "tw": tw, "tf": tf, "r": r}
    if family == "tee":
        b = d * u(0.2, 1.5)
        tw = b * u(0.02, 0.5)
        r = (b - tw) / 2 * u(0.0, 0.9)
        r = np.minimum(r, d * 0.4)
        tf = (d - r) * u(0.02, 0.9)
        return {"d": d, "b": b, "tw": tw, "tf": tf, "r": r}
    if family == "angle":
        b = d * u(0.2, 2.0)
        m = np.minimum(b, d)
        t = m * u(0.02, 0.5)
        r = (m - t) * u(0.0, 0.9)
        return {"d": d, "b": b, "t": t, "r": r}
    raise KeyError(family)


def rel(a, b):
    """Relative difference |a - b| / |b| (absolute when b is 0)."""
    b = float(b)
    return abs(float(a) - b) / (abs(b) if b else 1.0)

