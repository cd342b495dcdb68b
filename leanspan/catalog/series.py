"""The tool's own parametric section series: rules that generate dimension arrays.

Each :class:`Series` is a rule, not a copied table: a list of trade sizes (sawn
widths, stock plate thicknesses, tube outside diameters, wall-thickness steps) and
proportion rules (flange width, web and flange thickness, root radius as functions
of depth). Dimensions are generated in millimetres and returned in metres. Names
are generated from the dimensions by the shape family (``I 300x150x7.1x10.7``);
dressed lumber is named in inches.

Each series also says which material kinds it can be made of (``kinds``) and its
default material; the catalogue may pair the geometry with any material of those
kinds.

Examples
--------
>>> s = SERIES["steel_i_rolled"]
>>> d = s.dims()
>>> i = int(np.flatnonzero(np.isclose(d["d"], 0.300) & np.isclose(d["tw"], 0.0071))[0])
>>> [round(float(d[k][i]) * 1000, 1) for k in ("d", "b", "tw", "tf", "r")]
[300.0, 150.0, 7.1, 10.7, 15.0]
>>> len(SERIES) >= 14 and all(len(s.dims()["d"]) >= 20 for s in SERIES.values())
True
"""

from __future__ import annotations

from dataclasses import dataclass
from functools import lru_cache
from typing import Callable

import numpy as np

from ..errors import CatalogError
from ..sections.families import FAMILIES

__all__ = ["Series", "SERIES", "get_series", "PLATES", "TUBE_OD", "TUBE_WALLS", "BOX_WALLS"]

# Trade size lists (mm): facts of the trade, common practice.
PLATES = np.array([6, 8, 10, 12, 15, 20, 25, 30, 35, 40, 50], float)  # stock plate thicknesses
TUBE_OD = np.array([21.3, 26.9, 33.7, 42.4, 48.3, 60.3, 76.1, 88.9, 101.6, 114.3, 139.7, 168.3,
                    193.7, 219.1, 244.5, 273.0, 323.9, 355.6, 406.4, 457.0, 508.0, 610.0])  # pipe ODs
TUBE_WALLS = np.array([2.0, 2.3, 2.6, 2.9, 3.2, 3.6, 4.0, 4.5, 5.0, 5.6, 6.3, 7.1, 8.0, 8.8, 10.0,
                       11.0, 12.5, 14.2, 16.0, 20.0, 25.0])
BOX_SIDES = np.array([20, 25, 30, 40, 50, 60, 70, 80, 90, 100, 120, 140, 150, 160, 180, 200, 220,
                      250, 260, 300, 350, 400], float)
BOX_WALLS = np.array([2.0, 2.5, 3.0, 4.0, 5.0, 6.3, 8.0, 10.0, 12.5, 16.0])
ANGLE_LEGS = np.array([20, 25, 30, 35, 40, 45, 50, 60, 65, 70, 75, 80, 90, 100, 110, 120, 130,
                       150, 160, 180, 200, 250], float)
ANGLE_T = np.array([3, 4, 5, 6, 7, 8, 9, 10, 11, 12, 13, 14, 15, 16, 17, 18, 20, 22, 24, 25, 26,
                    28, 30, 35], float)


@dataclass(frozen=True)
class Series:
    """A generated series of sections of one shape family.

    Attributes
    ----------
    name : str
        Series key (``"glulam"``).
    family : str
        The shape family in :data:`leanspan.sections.families.FAMILIES`.
    material : str
        Default material name.
    kinds : tuple of str
        Material kinds the geometry may be paired with.
    description : str
        One line saying what the rule is.
    rule : callable
        ``() -> dict of key -> array`` in millimetres.
    label : callable, optional
        ``dims (m) -> list of names``; default: the family's designation.
    """

    name: str
    family: str
    material: str
    kinds: tuple
    description: str
    rule: Callable
    label: Callable | None = None

    def dims(self) -> dict[str, np.ndarray]:
        """Dimension arrays in metres (a fresh copy; rounded to 0.1 nm so 7.1 mm is 0.0071)."""
        return {k: np.round(v / 1000.0, 10) for k, v in _dims_mm(self.name).items()}

    def names(self, dims: dict[str, np.ndarray]) -> list[str]:
        """Generated names for ``dims`` (metres)."""
        if self.label is not None:
            return self.label(dims)
        fam = FAMILIES[self.family]
        return fam.designation(fam.complete(dims))


@lru_cache(maxsize=None)
def _dims_mm(name: str) -> dict[str, np.ndarray]:
    out = SERIES[name].rule()
    return {k: np.asarray(v, float) for k, v in out.items()}


def _grid(*lists):
    """Cartesian product of 1-D lists as flat arrays."""
    mesh = np.meshgrid(*[np.asarray(a, float) for a in lists], indexing="ij")
    return [m.ravel() for m in mesh]


def _tenths(x):
    """Round half up to 0.1 mm, exactly (integer tenths)."""
    return np.floor(np.asarray(x) * 10 + 0.5 + 1e-9) / 10


def _halves(x):
    """Round half up to 0.5 mm."""
    return np.floor(np.asarray(x) * 2 + 0.5 + 1e-9) / 2


# --- timber -----------------------------------------------------------------------------

def _sawn_metric():
    # Common metric sawn and regularised sizes (common practice): widths x depths, d >= b.
    b, d = _grid([38, 44, 45, 47, 50, 63, 75, 100, 150],
                 [75, 95, 100, 120, 125, 145, 150, 170, 175, 195, 200, 220, 225, 245, 250, 275, 300])
    keep = d >= b
    return {"b": b[keep], "d": d[keep]}


_IN = 25.4


def _dressed(nominal):
    """Dressed (dry) size of a nominal inch size: -1/2 in up to 6 in, -3/4 in from 8 in (trade fact)."""
    nominal = np.asarray(nominal, float)
    return np.where(nominal <= 6, nominal - 0.5, nominal - 0.75)


def _sawn_dressed_in():
    # Dimension lumber: nominal 2, 3, 4 in thick x 2 ... 16 in wide; timbers 6, 8, 10, 12 in
    # thick (dressed 1/2 in under nominal). Widths >= thickness.
    tn, wn = _grid([2, 3, 4], [2, 3, 4, 6, 8, 10, 12, 14, 16])
    keep = wn >= tn
    tn, wn = tn[keep], wn[keep]
    b, d = _dressed(tn), _dressed(wn)
    Tn, Wn = _grid([6, 8, 10, 12], [6, 8, 10, 12, 14, 16])
    keep = Wn >= Tn
    Tn, Wn = Tn[keep], Wn[keep]
    b = np.concatenate([b, Tn - 0.5])
    d = np.concatenate([d, Wn - 0.5])
    return {"b": b * _IN, "d": d * _IN}


def _label_dressed(dims):
    b, d = dims["b"] / 0.0254, dims["d"] / 0.0254
    nb = b + 0.5
    nd = np.where(d < 6.0, d + 0.5, np.where(np.isclose(d % 1, 0.25), d + 0.75, d + 0.5))
    return [f"rect {x:g}x{y:g}in (nominal {p:g}x{q:g})" for x, y, p, q in zip(b, d, nb, nd)]


def _glulam():
    # Widths (common practice) x number of laminations x lamination thickness 40 or 45 mm;
    # kept where 1 <= d/b <= 10 and d <= 2000 mm; sorted by width and depth.
    b, n, t = _grid([90, 115, 140, 165, 190, 215, 240], np.arange(3, 51), [40, 45])
    d = n * t
    keep = (d >= b) & (d <= 10 * b) & (d <= 2000)
    b, d = b[keep], d[keep]
    _, first = np.unique(b * 1e4 + d, return_index=True)  # 9 x 40 = 8 x 45: keep one
    return {"b": b[first], "d": d[first]}


def _glulam_in():
    # Inch-world glulam: widths 3-1/8 ... 10-3/4 in x laminations of 1-1/2 in.
    b, n = _grid([3.125, 5.125, 6.75, 8.75, 10.75], np.arange(4, 49))
    d = 1.5 * n
    keep = (d >= b) & (d <= 10 * b)
    return {"b": b[keep] * _IN, "d": d[keep] * _IN}


def _label_inch_rect(dims):
    return [f"rect {b / 0.0254:g}x{d / 0.0254:g}in" for b, d in zip(dims["b"], dims["d"])]


# --- steel ------------------------------------------------------------------------------

_I_DEPTHS = np.concatenate([np.arange(80, 301, 20), [330, 360], np.arange(400, 1001, 50)]).astype(float)
_WEIGHTS = np.array([0.85, 1.0, 1.25])  # light / normal / heavy: factor on web and flange thickness


def _root_radius(tw):
    """Root radius about twice the web, in 3 mm steps (common practice for rolled shapes)."""
    return 3 * np.ceil(2 * tw / 3 - 1e-9)


def _steel_i_rolled():
    # Narrow-flange rolled-like beams: b grows as 0.45 d + 10 up to d/2, then 0.2 d + 100;
    # tw = 2.6 + 0.015 d; tf = 1.5 tw; r from tw. Three weights per depth.
    d, k = _grid(_I_DEPTHS, _WEIGHTS)
    b = np.round(np.minimum(np.maximum(0.45 * d + 10, 0.5 * d), 0.2 * d + 100))
    tw0 = _tenths(2.6 + 0.015 * d)
    tw = _tenths(tw0 * k)
    tf = _tenths(1.5 * tw)
    return {"d": d, "b": b, "tw": tw, "tf": tf, "r": _root_radius(tw0)}


def _steel_h_rolled():
    # Wide-flange rolled-like columns/beams: b = d up to 300 mm, then 300;
    # tw, tf grow linearly with depth (faster up to 300 mm); three weights per depth.
    d, k = _grid(np.concatenate([np.arange(100, 301, 20), np.arange(320, 1001, 40)]), _WEIGHTS)
    b = np.minimum(d, 300.0)
    tw0 = np.where(d <= 300, 6 + 0.025 * (d - 100), 11 + 0.0114 * (d - 300))
    tf0 = np.where(d <= 300, 10 + 0.045 * (d - 100), 19 + 0.0243 * (d - 300))
    tw0, tf0 = _halves(tw0), _halves(tf0)
    return {"d": d, "b": b, "tw": _halves(tw0 * k), "tf": _halves(tf0 * k),
            "r": 3 * np.ceil(2.4 * tw0 / 3 - 1e-9)}


def _plate_girder():
    # Welded girders from stock plates: web the thinnest plate with d/tw <= 120 (and a next-
    # thicker option), flanges of stock plates with 5 <= b/(2 tf) <= 12 and tf >= tw; no fillet.
    d, b, tw_opt = _grid(np.arange(400, 2001, 100), np.arange(200, 601, 50), [0, 1])
    keep = (b <= 0.6 * d) & (b >= 0.2 * d)
    d, b, tw_opt = d[keep], b[keep], tw_opt[keep]
    first = np.searchsorted(PLATES, np.maximum(d / 120, 8), side="left")
    tw = PLATES[np.minimum(first + tw_opt.astype(int), len(PLATES) - 1)]
    rows = []
    for tf in PLATES:  # small fixed set of stock plates
        ok = (b / (2 * tf) >= 5) & (b / (2 * tf) <= 12) & (tf >= tw)
        rows.append((d[ok], b[ok], tw[ok], np.full(ok.sum(), tf)))
    d, b, tw, tf = (np.concatenate(c) for c in zip(*rows))
    order = np.lexsort((tf, tw, b, d))
    return {"d": d[order], "b": b[order], "tw": tw[order], "tf": tf[order], "r": np.zeros(len(d))}


def _channel():
    # Rolled-like channels: b = 0.25 d + 25; tw = 2.5 + 0.03 d; tf = 1.35 tw; r = tf;
    # three weights per depth.
    d, k = _grid(np.concatenate([np.arange(80, 301, 20), np.arange(320, 401, 40)]), _WEIGHTS)
    b = np.round(0.25 * d + 25)
    tw = _tenths((2.5 + 0.03 * d) * k)
    tf = _tenths(1.35 * tw)
    return {"d": d, "b": b, "tw": tw, "tf": tf, "r": _halves(tf)}


def _tee():
    # Tees cut from the rolled-like I and H series at mid-depth.
    parts = [_dims_mm("steel_i_rolled"), _dims_mm("steel_h_rolled")]
    out = {k: np.concatenate([p[k] for p in parts]) for k in ("d", "b", "tw", "tf", "r")}
    out["d"] = out["d"] / 2
    return out


def _angle_radius(leg):
    return np.minimum(np.round(leg / 10 + 2), 18.0)


def _angle_equal():
    # Equal legs from the leg list; thickness from the stock list with 6.5 <= leg/t <= 13.
    leg, t = _grid(ANGLE_LEGS, ANGLE_T)
    r = _angle_radius(leg)
    keep = (leg / t >= 6.5) & (leg / t <= 13) & (t + r < leg)
    return {"d": leg[keep], "b": leg[keep], "t": t[keep], "r": r[keep]}


def _angle_unequal():
    # Long leg from the leg list; short leg the listed leg nearest 0.5, 0.67 and 0.75 of it;
    # thickness with 9 <= long/t <= 17 and short/t >= 5.
    long_, ratio, t = _grid(ANGLE_LEGS[ANGLE_LEGS >= 40], [0.5, 0.67, 0.75], ANGLE_T)
    short = ANGLE_LEGS[np.abs(ANGLE_LEGS[None, :] - (ratio * long_)[:, None]).argmin(axis=1)]
    r = _angle_radius(short)
    keep = (short < long_) & (long_ / t >= 9) & (long_ / t <= 17) & (short / t >= 5) & (t + r < short)
    d, b, t, r = long_[keep], short[keep], t[keep], r[keep]
    key = d * 1e6 + b * 1e3 + t
    _, first = np.unique(key, return_index=True)
    first.sort()
    return {"d": d[first], "b": b[first], "t": t[first], "r": r[first]}


def _box_corner(t):
    """Outer corner radius of cold-formed hollow sections: 2t, 2.5t above 6 mm, 3t above 10 mm."""
    return np.where(t <= 6, 2.0, np.where(t <= 10, 2.5, 3.0)) * t


def _box_sizes(sides, ratios):
    d, ratio = _grid(sides, ratios)
    b = sides[np.abs(sides[None, :] - (ratio * d)[:, None]).argmin(axis=1)]
    keep = (b <= d) & ((ratio == 1) | (b < d))
    d, b = d[keep], b[keep]
    key = d * 1e4 + b
    _, first = np.unique(key, return_index=True)
    return d[np.sort(first)], b[np.sort(first)]


def _shs_rhs():
    # Square and rectangular (b about 0.5, 0.6, 0.75 d) tubes; walls with 8 <= b/t, d/t <= 40.
    d, b = _box_sizes(BOX_SIDES, [1.0, 0.5, 0.6, 0.75])
    i, t = _grid(np.arange(len(d)), BOX_WALLS)
    i = i.astype(int)
    d, b = d[i], b[i]
    keep = (b / t >= 8) & (d / t <= 40)
    d, b, t = d[keep], b[keep], t[keep]
    return {"d": d, "b": b, "t": t, "r": _box_corner(t)}


def _chs():
    # Pipe outside diameters x wall series, 10 <= D/t <= 60.
    D, t = _grid(TUBE_OD, TUBE_WALLS)
    keep = (D / t >= 10) & (D / t <= 60)
    return {"d": D[keep], "t": t[keep]}


def _alu_i():
    # Extrusion-like I sections: b = d/2 or d; tw = max(2, d/25) to 0.5 mm, tf = 1.4 tw,
    # fillet r = tw; a normal and a heavy (x1.5) wall.
    d, ratio, k = _grid([40, 50, 60, 70, 80, 100, 120, 140, 160, 180, 200, 250, 300], [0.5, 1.0],
                        [1.0, 1.5])
    b = np.round(ratio * d)
    tw = _halves(np.maximum(2, d / 25) * k)
    tf = _halves(1.4 * tw)
    return {"d": d, "b": b, "tw": tw, "tf": tf, "r": tw}


def _alu_box():
    # Extrusion-like square and rectangular tubes; walls with 8 <= b/t, d/t <= 40; corner r = t.
    sides = np.array([20, 25, 30, 40, 50, 60, 80, 100, 120, 150, 200], float)
    d, b = _box_sizes(sides, [1.0, 0.5])
    i, t = _grid(np.arange(len(d)), [1.5, 2, 2.5, 3, 4, 5, 6, 8, 10])
    i = i.astype(int)
    d, b = d[i], b[i]
    keep = (b / t >= 8) & (d / t <= 40)
    return {"d": d[keep], "b": b[keep], "t": t[keep], "r": t[keep]}


_STEEL = ("steel", "stainless")
SERIES: dict[str, Series] = {
    s.name: s
    for s in [
        Series("sawn_metric", "rectangle", "C24", ("timber",),
               "metric sawn and regularised widths x depths", _sawn_metric),
        Series("sawn_dressed_in", "rectangle", "DF-L No.2", ("timber",),
               "inch-world dressed lumber and timbers from nominal sizes", _sawn_dressed_in,
               _label_dressed),
        Series("glulam", "rectangle", "GL28h", ("glulam",),
               "glulam widths x laminations of 40 or 45 mm", _glulam),
        Series("glulam_in", "rectangle", "24F-1.8E", ("glulam",),
               "inch-world glulam widths x 1-1/2 in laminations", _glulam_in, _label_inch_rect),
        Series("steel_i_rolled", "i_section", "S355", _STEEL,
               "rolled-like narrow-flange I beams, three weights per depth", _steel_i_rolled),
        Series("steel_h_rolled", "i_section", "S355", _STEEL,
               "rolled-like wide-flange H sections, three weights per depth", _steel_h_rolled),
        Series("plate_girder", "i_section", "S355", _STEEL,
               "welded I girders from stock plate thicknesses", _plate_girder),
        Series("channel", "channel", "S355", _STEEL,
               "rolled-like parallel-flange channels, three weights per depth", _channel),
        Series("tee", "tee", "S355", _STEEL,
               "tees cut from the rolled-like I and H series", _tee),
        Series("angle_equal", "angle", "S355", _STEEL,
               "equal-leg angles, stock thicknesses", _angle_equal),
        Series("angle_unequal", "angle", "S355", _STEEL,
               "unequal-leg angles (short leg about 1/2, 2/3, 3/4 of the long)", _angle_unequal),
        Series("shs_rhs", "box", "S355J2H", _STEEL,
               "square and rectangular hollow sections, cold-formed corners", _shs_rhs),
        Series("chs", "tube", "S355J2H", _STEEL,
               "circular hollow sections: pipe outside diameters x wall series", _chs),
        Series("alu_i", "i_section", "6061-T6", ("aluminium",),
               "extrusion-like aluminium I sections", _alu_i),
        Series("alu_box", "box", "6061-T6", ("aluminium",),
               "extrusion-like aluminium square and rectangular tubes", _alu_box),
    ]
}


def get_series(name: str) -> Series:
    """Look up a series by name; CatalogError listing the known names otherwise.

    >>> get_series("glulam").family
    'rectangle'
    """
    try:
        return SERIES[name]
    except (KeyError, TypeError):
        raise CatalogError(f"unknown series {name!r}; expected one of {', '.join(SERIES)}") from None
