"""Parametric shape families: arrays of dimensions -> arrays of oriented rings.

Every shape is built with the bottom-centre of its bounding box at the origin,
points as ``[z, y]``. ``Family.rings(dims)`` returns a list of rings, each of shape
``(N, V, 2)``: the outline counter-clockwise, holes clockwise. Curves are
polygonised finely enough that A and I are within 1e-4 of the curved shape.

Channels have their web on the left (z = -b/2) and flanges pointing to +z; angles
have the vertical leg (d) on the left and the horizontal leg (b) along the bottom;
tees have the flange on top. Root radii ``r`` default to 0; toe radii are not
modelled (a small, conservative simplification).

Examples
--------
>>> import numpy as np
>>> fam = FAMILIES["ibeam"]
>>> dims = fam.complete({"d": 0.3, "b": 0.15, "tw": 0.0071, "tf": 0.0107, "r": 0.015})
>>> fam.designation(dims)
['I 300x150x7.1x10.7']
>>> [ring.shape for ring in fam.rings(dims)]
[(1, 44, 2)]
"""

from __future__ import annotations

from dataclasses import dataclass, field
from string import Formatter
from typing import Callable

import numpy as np

from ..errors import GeometryError

__all__ = ["Family", "FAMILIES", "get_family", "FILLET_SEGMENTS", "CIRCLE_SEGMENTS"]

FILLET_SEGMENTS = 8  # per quarter circle (root fillets, box corners)
CIRCLE_SEGMENTS = 256  # per full circle (round bars, tubes)


def _arc(cz, cy, r, a0, a1, n):
    """Points on arcs with centres (cz, cy) and radii r (arrays (N,)), angles a0 -> a1 (deg).

    The end points lie on the arc; the inner points sit on a slightly larger radius
    chosen so the polygonal fan has exactly the sector's area, which keeps A exact
    and the second moments within ~1e-6 of the curved shape with few points.
    """
    ang = np.radians(np.linspace(a0, a1, n + 1))
    theta = abs(np.radians(a1 - a0)) / n
    # fan area: 0.5 sin(theta) [2 r R + (n - 2) R^2] = 0.5 r^2 n theta
    k = n * theta / np.sin(theta)
    scale = 1.0 if n < 2 else ((-1.0 + np.sqrt(1.0 + (n - 2) * k)) / (n - 2) if n > 2 else k / 2.0)
    radius = np.full(n + 1, scale)
    radius[[0, -1]] = 1.0
    z = cz[:, None] + r[:, None] * (radius * np.cos(ang))[None, :]
    y = cy[:, None] + r[:, None] * (radius * np.sin(ang))[None, :]
    return np.stack([z, y], axis=-1)


def _pt(z, y):
    """One point per section as an (N, 1, 2) array."""
    z, y = np.broadcast_arrays(np.asarray(z, float), np.asarray(y, float))
    return np.stack([z, y], axis=-1)[:, None, :]


def _ring(*pieces):
    return np.concatenate(pieces, axis=1)


def _circle(cz, cy, r, n=CIRCLE_SEGMENTS, clockwise=False):
    """Polygon for circles: exact area and exactly d across (n divisible by 4).

    The four vertices on the axes lie on the circle, so depth and width are exact;
    the others sit on a radius R chosen so the polygon has the circle's area:
    0.5 sin(theta) [8 r R + (n - 8) R^2] = pi r^2. The second moment then differs
    from the circle's by about 1e-7 at n = 256.
    """
    theta = 2 * np.pi / n
    k = 2 * np.pi / np.sin(theta)  # (8 R/r + (n - 8) (R/r)^2) = k
    scale = (-8.0 + np.sqrt(64.0 + 4.0 * (n - 8) * k)) / (2.0 * (n - 8))
    radius = np.full(n, scale)
    radius[:: n // 4] = 1.0
    ang = np.arange(n) * theta
    if clockwise:
        ang, radius = -ang, radius
    z = cz[:, None] + r[:, None] * (radius * np.cos(ang))[None, :]
    y = cy[:, None] + r[:, None] * (radius * np.sin(ang))[None, :]
    return np.stack([z, y], axis=-1)


def _rounded_rect(b, d, r, y0=None, clockwise=False, n=FILLET_SEGMENTS):
    """Rectangle b x d with corner radius r, bottom-centre at (0, y0)."""
    y0 = np.zeros_like(b) if y0 is None else y0
    hb = b / 2
    ring = _ring(
        _arc(hb - r, y0 + r, r, -90, 0, n),
        _arc(hb - r, y0 + d - r, r, 0, 90, n),
        _arc(-hb + r, y0 + d - r, r, 90, 180, n),
        _arc(-hb + r, y0 + r, r, 180, 270, n),
    )
    return ring[:, ::-1] if clockwise else ring


def _rect_rings(d):
    b, h = d["b"], d["d"]
    z = np.zeros_like(b)
    return [_ring(_pt(-b / 2, z), _pt(b / 2, z), _pt(b / 2, h), _pt(-b / 2, h))]


def _circle_rings(d):
    r = d["d"] / 2
    return [_circle(np.zeros_like(r), r, r)]


def _tube_rings(d):
    r = d["d"] / 2
    zero = np.zeros_like(r)
    return [_circle(zero, r, r), _circle(zero, r, r - d["t"], clockwise=True)]


def _box_rings(d):
    b, h, t, r = d["b"], d["d"], d["t"], d["r"]
    inner_r = np.maximum(r - t, 0.0)  # inner corner radius = outer - t (common practice)
    return [_rounded_rect(b, h, r), _rounded_rect(b - 2 * t, h - 2 * t, inner_r, y0=t, clockwise=True)]


def _i_rings(d):
    h, tw, r = d["d"], d["tw"], d["r"]
    bt, bb, tft, tfb = d["b_top"], d["b_bot"], d["tf_top"], d["tf_bot"]
    n = FILLET_SEGMENTS
    w = tw / 2
    if not np.any(r):  # welded plates, no fillets: 12 corners (the arcs would be repeated points)
        return [_ring(
            _pt(-bb / 2, 0 * h), _pt(bb / 2, 0 * h), _pt(bb / 2, tfb), _pt(w, tfb), _pt(w, h - tft),
            _pt(bt / 2, h - tft), _pt(bt / 2, h), _pt(-bt / 2, h), _pt(-bt / 2, h - tft),
            _pt(-w, h - tft), _pt(-w, tfb), _pt(-bb / 2, tfb))]
    return [_ring(
        _pt(-bb / 2, 0 * h), _pt(bb / 2, 0 * h), _pt(bb / 2, tfb),
        _arc(w + r, tfb + r, r, 270, 180, n),
        _arc(w + r, h - tft - r, r, 180, 90, n),
        _pt(bt / 2, h - tft), _pt(bt / 2, h), _pt(-bt / 2, h), _pt(-bt / 2, h - tft),
        _arc(-w - r, h - tft - r, r, 90, 0, n),
        _arc(-w - r, tfb + r, r, 0, -90, n),
        _pt(-bb / 2, tfb),
    )]


def _channel_rings(d):
    h, b, tw, tf, r = d["d"], d["b"], d["tw"], d["tf"], d["r"]
    n = FILLET_SEGMENTS
    back = -b / 2
    return [_ring(
        _pt(back, 0 * h), _pt(b / 2, 0 * h), _pt(b / 2, tf),
        _arc(back + tw + r, tf + r, r, 270, 180, n),
        _arc(back + tw + r, h - tf - r, r, 180, 90, n),
        _pt(b / 2, h - tf), _pt(b / 2, h), _pt(back, h),
    )]


def _tee_rings(d):
    h, b, tw, tf, r = d["d"], d["b"], d["tw"], d["tf"], d["r"]
    n = FILLET_SEGMENTS
    w = tw / 2
    return [_ring(
        _pt(-w, 0 * h), _pt(w, 0 * h),
        _arc(w + r, h - tf - r, r, 180, 90, n),
        _pt(b / 2, h - tf), _pt(b / 2, h), _pt(-b / 2, h), _pt(-b / 2, h - tf),
        _arc(-w - r, h - tf - r, r, 90, 0, n),
    )]


def _angle_rings(d):
    h, b, t, r = d["d"], d["b"], d["t"], d["r"]
    n = FILLET_SEGMENTS
    left = -b / 2
    return [_ring(
        _pt(left, 0 * h), _pt(b / 2, 0 * h), _pt(b / 2, t),
        _arc(left + t + r, t + r, r, 270, 180, n),
        _pt(left + t, h), _pt(left, h),
    )]


def _mm(x) -> str:
    x = float(x) * 1000.0
    return f"{x:.4g}" if abs(x) < 1e4 else f"{x:.0f}"


def _mm_text(values) -> np.ndarray:
    """:func:`_mm` of many values as an array of str, each distinct value formatted once
    (catalogues repeat their sizes).

    >>> _mm_text([0.2, 0.045, 0.2, 12.5]).tolist()
    ['200', '45', '200', '12500']
    """
    uniq, inverse = np.unique(np.asarray(values, float).ravel(), return_inverse=True)
    return np.array([_mm(u) for u in uniq], dtype=str)[inverse]


def _mm_all(values) -> list:
    """:func:`_mm` of many values, as a list (see :func:`_mm_text`)."""
    return _mm_text(values).tolist()


class _MmColumns(dict):
    """The dimension columns of ``dims`` as mm text (:func:`_mm_text`), each formatted when first used."""

    def __init__(self, dims: dict):
        super().__init__()
        self.dims = dims

    def __missing__(self, key):
        self[key] = text = _mm_text(self.dims[key])
        return text


def _template(form: str) -> Callable:
    """A designation maker from a template such as ``"rect {b}x{d}"``: the dimension columns in mm
    text joined with the literal pieces by numpy string operations (no step per section).

    >>> label = _template("tube {d}x{t}")
    >>> label(_MmColumns({"d": np.array([0.1143, 0.06]), "t": np.array([0.0036, 0.003])})).tolist()
    ['tube 114.3x3.6', 'tube 60x3']
    """
    pieces = []  # literal text (str) and dimension keys (1-tuples)
    for literal, key, _, _ in Formatter().parse(form):
        pieces += [literal] if literal else []
        pieces += [(key,)] if key else []

    def label(text: _MmColumns) -> np.ndarray:
        out = np.array("", dtype=str)
        for piece in pieces:
            out = np.strings.add(out, text[piece[0]] if isinstance(piece, tuple) else piece)
        return out
    return label


@dataclass(frozen=True)
class Family:
    """A parametric shape family.

    Attributes
    ----------
    name : str
        Family key used in files (``"ibeam"``).
    keys : tuple of str
        Required dimensions.
    optional : dict
        Optional dimensions: a number default, or the name of another key it copies.
    build : callable
        ``dims -> list of rings``.
    rules : callable
        ``dims -> list of (bad_mask, field, expectation)`` geometric checks.
    label : callable
        ``text -> designations``: from the dimension columns as mm text (a dict of str arrays,
        :class:`_MmColumns`) to an array of str, one per section (mostly :func:`_template`).
    """

    name: str
    keys: tuple
    optional: dict
    build: Callable
    rules: Callable
    label: Callable
    description: str = ""
    thin: tuple = field(default=())

    @property
    def all_keys(self) -> tuple:
        return self.keys + tuple(self.optional)

    def complete(self, dims: dict) -> dict:
        """Arrays of equal length for every key, optional ones filled with their defaults.

        Raises GeometryError for a missing or unknown dimension.
        """
        missing = [k for k in self.keys if k not in dims or dims[k] is None]
        if missing:
            raise GeometryError(f"{self.name}: missing dimension {missing[0]!r}; "
                                f"expected {', '.join(self.keys)}")
        unknown = [k for k in dims if k not in self.all_keys]
        if unknown:
            raise GeometryError(f"{self.name}: unknown dimension {unknown[0]!r}; "
                                f"expected {', '.join(self.all_keys)}")
        given = {k: np.atleast_1d(np.asarray(v, dtype=float)) for k, v in dims.items() if v is not None}
        try:
            arrays = np.broadcast_arrays(*given.values())
        except ValueError:
            raise GeometryError(f"{self.name}: dimension arrays differ in length") from None
        out = {k: np.array(a, dtype=float) for k, a in zip(given, arrays)}
        n = arrays[0].shape
        for k, default in self.optional.items():
            if k in out:
                out[k] = np.where(np.isnan(out[k]), out[default] if isinstance(default, str) else default, out[k])
            else:
                out[k] = np.array(out[default], dtype=float) if isinstance(default, str) else np.full(n, float(default))
        return out

    def validate(self, dims: dict, where: Callable[[int], str] | None = None) -> None:
        """Raise GeometryError naming the first section whose dimensions are impossible."""
        where = where or (lambda i: f"section {i}")
        for k in self.all_keys:
            v = dims[k]
            # zero is allowed only for an optional size with a numeric default (a root radius);
            # an optional size that defaults to another one (tf_top -> tf) must be positive too
            zero_ok = k in self.optional and not isinstance(self.optional[k], str)
            bad = ~np.isfinite(v) | (v < 0) | ((v == 0) & (not zero_ok))
            if bad.any():
                i = int(np.flatnonzero(bad)[0])
                raise GeometryError(f"{where(i)}: {self.name} dimension {k} = {float(v[i]):g} m "
                                    f"({_mm(v[i])} mm); expected a positive length")
        for bad, text in self.rules(dims):
            if np.any(bad):
                i = int(np.flatnonzero(bad)[0])
                vals = ", ".join(f"{k}={_mm(dims[k][i])} mm" for k in self.all_keys)
                raise GeometryError(f"{where(i)}: impossible {self.name} ({vals}): expected {text}")

    def rings(self, dims: dict) -> list:
        """Oriented rings for complete, validated dims (see :meth:`complete`)."""
        return self.build(dims)

    def designations(self, dims: dict) -> np.ndarray:
        """Names generated from complete dimensions (m) as an array of str, sizes in millimetres."""
        return self.label(_MmColumns(dims))

    def designation(self, dims: dict) -> list[str]:
        """Names generated from complete dimensions (m), in millimetres (a list of str)."""
        return self.designations(dims).tolist()


_I_PLAIN = _template("I {d}x{b_top}x{tw}x{tf_top}")
_I_MONO = _template("I {d}x{b_top}/{b_bot}x{tw}x{tf_top}/{tf_bot}")


def _i_label(text):
    """Equal flanges (the same text in mm) name each size once, others both: ``I 600x300/250x12x25/20``."""
    same = (text["b_top"] == text["b_bot"]) & (text["tf_top"] == text["tf_bot"])
    return _I_PLAIN(text) if same.all() else np.where(same, _I_PLAIN(text), _I_MONO(text))


FAMILIES: dict[str, Family] = {
    f.name: f
    for f in [
        Family("rectangle", ("b", "d"), {}, _rect_rings, lambda d: [],
               _template("rect {b}x{d}"), "solid rectangle b wide, d deep"),
        Family("circle", ("d",), {}, _circle_rings, lambda d: [],
               _template("round {d}"), "solid round bar of diameter d"),
        Family("tube", ("d", "t"), {}, _tube_rings,
               lambda d: [(2 * d["t"] >= d["d"], "2 t < d")],
               _template("tube {d}x{t}"), "circular hollow section", ("t",)),
        Family("box", ("b", "d", "t"), {"r": 0.0}, _box_rings,
               lambda d: [(2 * d["t"] >= np.minimum(d["b"], d["d"]), "2 t < min(b, d)"),
                          (2 * d["r"] > np.minimum(d["b"], d["d"]), "2 r <= min(b, d)")],
               _template("box {d}x{b}x{t}"),
               "rectangular hollow section, outer corner radius r", ("t",)),
        Family("ibeam", ("d", "b", "tw", "tf"),
               {"r": 0.0, "b_top": "b", "tf_top": "tf", "b_bot": "b", "tf_bot": "tf"}, _i_rings,
               lambda d: [(d["tw"] + 2 * d["r"] > np.minimum(d["b_top"], d["b_bot"]),
                           "tw + 2 r <= flange widths"),
                          (d["tf_top"] + d["tf_bot"] + 2 * d["r"] >= d["d"], "tf_top + tf_bot + 2 r < d")],
               _i_label, "I or H section with root fillets, flanges may differ", ("tw", "tf")),
        Family("channel", ("d", "b", "tw", "tf"), {"r": 0.0}, _channel_rings,
               lambda d: [(d["tw"] + d["r"] >= d["b"], "tw + r < b"),
                          (2 * d["tf"] + 2 * d["r"] >= d["d"], "2 tf + 2 r < d")],
               _template("channel {d}x{b}x{tw}x{tf}"),
               "channel, web on the left, parallel flanges", ("tw", "tf")),
        Family("tee", ("d", "b", "tw", "tf"), {"r": 0.0}, _tee_rings,
               lambda d: [(d["tw"] + 2 * d["r"] > d["b"], "tw + 2 r <= b"),
                          (d["tf"] + d["r"] >= d["d"], "tf + r < d")],
               _template("tee {d}x{b}x{tw}x{tf}"),
               "tee, flange on top", ("tw", "tf")),
        Family("angle", ("d", "b", "t"), {"r": 0.0}, _angle_rings,
               lambda d: [(d["t"] + d["r"] >= np.minimum(d["b"], d["d"]), "t + r < min(b, d)")],
               _template("angle {d}x{b}x{t}"),
               "angle, vertical leg d on the left, horizontal leg b at the bottom", ("t",)),
    ]
}


def get_family(name: str) -> Family:
    """Look up a family by name; GeometryError listing the known names otherwise."""
    try:
        return FAMILIES[name]
    except (KeyError, TypeError):
        if name == "i_section":
            raise GeometryError("shape 'i_section' is now called 'ibeam' (same keys)") from None
        raise GeometryError(f"unknown shape {name!r}; expected one of {', '.join(FAMILIES)} or polygon") from None
