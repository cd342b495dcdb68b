"""Closed-form torsion and warping constants of the section families, over arrays.

A fast path for catalogues: each family's J and Cw from its dimensions, for many
sections at once (every argument an array, broadcast together). The finite-element
solve (:mod:`leanspan.sections.torsion`) checks every formula in the tests.

Formulas (sources beside each; dimensions follow the family definitions, ``r``
the root fillet, or for ``box`` the outer corner radius, missing ``r`` = 0):

- rectangle: Saint-Venant's series for J and, for Cw, the series of the exact
  warping function ``omega = -yz + sum 8 (-1)^n sinh(k z) sin(k y) / (c k^3 cosh(k a/2))``
  integrated term by term (derived here from the theory-of-elasticity solution);
- circle, tube: J = polar moment, Cw = 0 (exact);
- box: Bredt's closed-cell J plus the open-wall term ``p t^3 / 3`` on the mid-line
  with rounded corners, the form of the EN 10219-2 tables (from memory); Cw of a
  single-cell rectangle with uniform wall, ``t b^2 d^2 (b - d)^2 / (24 (b + d))``
  on the mid-line (thin-walled theory, derived by integrating the closed-cell
  warping function), plus each wall's own warping through its thickness,
  ``L^3 t^3 / 144`` per wall (thin-rectangle limit of the series above);
- ibeam, channel, tee, angle: J as the sum of plates ``b t^3 / 3`` with free-end
  corrections ``-0.105 t^4`` and fillet-junction terms ``alpha D^4`` fitted by
  El Darwish and Johnston (1965), as printed in steel section handbooks (from
  memory); Cw from thin-walled theory: ``h^2 I1 I2 / (I1 + I2)`` for I-sections,
  the classic channel formula, and the secondary-warping forms for tees and angles.

Examples
--------
>>> import numpy as np
>>> out = thin_walled_torsion("rectangle", {"b": np.array([1.0, 2.0]), "d": np.array([1.0, 1.0])})
>>> np.round(out["J"], 4)                   # 0.1406 a^4; 0.2287 a b^3 with a = 2, b = 1
array([0.1406, 0.4574])
"""

from __future__ import annotations

import numpy as np

from ..errors import CatalogError, GeometryError

__all__ = ["thin_walled_torsion", "shear_centre_height", "FAMILY_DIMENSIONS"]

#: Required and optional dimension keys of each family.
FAMILY_DIMENSIONS = {
    "rectangle": (("b", "d"), ()),
    "circle": (("d",), ()),
    "tube": (("d", "t"), ()),
    "box": (("b", "d", "t"), ("r",)),
    "ibeam": (("d", "b", "tw", "tf"), ("r", "b_top", "tf_top", "b_bot", "tf_bot")),
    "channel": (("d", "b", "tw", "tf"), ("r",)),
    "tee": (("d", "b", "tw", "tf"), ("r",)),
    "angle": (("d", "b", "t"), ("r",)),
}

_ODD = np.arange(1, 60, 2, dtype=float)  # series terms: the tail is below 1e-8 relative


_EXACT = 8  # terms with their hyperbolic factors; beyond, tanh = 1 and sech = 0 to below 1e-10
_POWER = {p: float(np.sum(_ODD[_EXACT:] ** -p)) for p in (5, 6, 7)}  # the saturated tails


_ROWS = 4096  # rectangles per pass of the series: its (rows, terms) arrays stay in cache


def _rectangle(b, d):
    """J and Cw of solid rectangles b x d (arrays) by the series below, with the terms past the
    eighth (where tanh(n pi a / 2c) = 1 and sech = 0 to 1e-10 since a >= c) summed in closed form."""
    if np.ndim(b) == np.ndim(d) == 1 and len(b) > _ROWS:  # (each row on its own: the same numbers)
        parts = [_rectangle(b[s:s + _ROWS], d[s:s + _ROWS]) for s in range(0, len(b), _ROWS)]
        return np.concatenate([J for J, _ in parts]), np.concatenate([Cw for _, Cw in parts])
    a, c = np.maximum(b, d), np.minimum(b, d)  # long and short sides
    n = _ODD[:_EXACT]
    k = np.pi * n / c[..., None]             # (..., terms)
    ka2 = k * a[..., None] / 2
    th = np.tanh(ka2)
    # J: Saint-Venant's series (Timoshenko & Goodier, Theory of Elasticity, sec. 109)
    J = a * c**3 / 3 * (1 - 192 / np.pi**5 * (c / a) * (np.sum(th / n**5, axis=-1) + _POWER[5]))
    # Cw = int omega^2 dA with the series above; sech^2 written to avoid overflow
    e = np.exp(-2 * ka2)
    sech2 = 4 * e / (1 + e) ** 2
    a_, c_ = a[..., None], c[..., None]
    t2 = 64 / (c_ * k**5) * (a_ / (2 * k) - th / k**2)
    t3 = 32 / (c_ * k**6) * (th / k - a_ * sech2 / 2)
    # the tail with th = 1, sech = 0 and k = n pi / c: 64/c (a/2 (c/pi)^6 S6 - (c/pi)^7 S7) for
    # t2 and 32/c (c/pi)^7 S7 for t3
    cp = c / np.pi
    tail = 64 / c * (a / 2 * cp**6 * _POWER[6] - cp**7 * _POWER[7]) - 32 / c * cp**7 * _POWER[7]
    Cw = a**3 * c**3 / 144 - np.sum(t2, axis=-1) + np.sum(t3, axis=-1) - tail
    return J, Cw


def _tee_junction(tf, tw, r):
    """Fillet term alpha1 D1^4 of a web meeting a flange from one side (El Darwish & Johnston)."""
    alpha = -0.042 + 0.2204 * tw / tf + 0.1355 * r / tf - 0.0865 * r * tw / tf**2 - 0.0725 * tw**2 / tf**2
    D = ((tf + r) ** 2 + tw * (r + tw / 4)) / (2 * r + tf)
    return alpha * D**4


def _corner_junction(tf, tw, r):
    """Fillet term alpha3 D3^4 of two plates meeting at an L corner (El Darwish & Johnston)."""
    alpha = (-0.0908 + 0.2621 * tw / tf + 0.1231 * r / tf - 0.0752 * tw * r / tf**2
             - 0.0945 * (tw / tf) ** 2)
    D = 2 * ((3 * r + tw + tf) - np.sqrt(2 * (2 * r + tw) * (2 * r + tf)))
    return alpha * D**4


def _ibeam(d, b, tw, tf, r, b_top, tf_top, b_bot, tf_bot):
    J = (d - tf_top - tf_bot) * tw**3 / 3
    for bf, tff in ((b_top, tf_top), (b_bot, tf_bot)):  # two flanges
        J = J + bf * tff**3 / 3 - 0.21 * tff**4 + _tee_junction(tff, tw, r)
    # Cw: flanges as plates about the web axis, their centroids hs apart
    i1, i2 = tf_top * b_top**3 / 12, tf_bot * b_bot**3 / 12
    hs = d - tf_top / 2 - tf_bot / 2
    return J, hs**2 * i1 * i2 / (i1 + i2)


def _channel(d, b, tw, tf, r):
    J = 2 * b * tf**3 / 3 + (d - 2 * tf) * tw**3 / 3 + 2 * _corner_junction(tf, tw, r) - 0.21 * tf**4
    # mid-line flange width and depth (thin-walled channel, e.g. Timoshenko & Gere)
    bm, hm = b - tw / 2, d - tf
    Cw = tf * bm**3 * hm**2 / 12 * (3 * bm * tf + 2 * hm * tw) / (6 * bm * tf + hm * tw)
    return J, Cw


def _tee(d, b, tw, tf, r):
    J = b * tf**3 / 3 + (d - tf) * tw**3 / 3 + _tee_junction(tf, tw, r) - 0.21 * tf**4 - 0.105 * tw**4
    # secondary warping of the two plates about their meeting point (thin-walled form)
    Cw = (tf**3 * b**3 / 4 + tw**3 * (d - tf / 2) ** 3) / 36
    return J, Cw


def _angle(d, b, t, r):
    J = b * t**3 / 3 + (d - t) * t**3 / 3 + _corner_junction(t, t, r) - 0.21 * t**4
    Cw = t**3 * ((d - t / 2) ** 3 + (b - t / 2) ** 3) / 36
    return J, Cw


def _box(b, d, t, r):
    rm = np.maximum(r - t / 2, 0.0)                 # mid-line corner radius
    bm, dm = b - t, d - t
    Am = bm * dm - (4 - np.pi) * rm**2              # area inside the mid-line
    pm = 2 * (bm + dm) - (8 - 2 * np.pi) * rm       # mid-line perimeter
    J = 4 * Am**2 * t / pm + pm * t**3 / 3
    # primary (mid-line) warping plus each wall's own warping through its thickness
    Cw = t * bm**2 * dm**2 * (bm - dm) ** 2 / (24 * (bm + dm)) + (bm**3 + dm**3) * t**3 / 72
    return J, Cw


def _check(family, dims):
    if family not in FAMILY_DIMENSIONS:
        raise CatalogError(f"family: unknown family {family!r}; expected one of {', '.join(FAMILY_DIMENSIONS)}")
    need, optional = FAMILY_DIMENSIONS[family]
    out = {}
    for key in need + optional:
        if key not in dims or dims[key] is None:
            if key in need:
                raise GeometryError(f"{family}: missing dimension {key!r}")
            continue
        try:
            v = np.asarray(dims[key], dtype=float)
        except (TypeError, ValueError):
            raise GeometryError(f"{family}.{key}: expected numbers, got {dims[key]!r}") from None
        bad = ~np.isfinite(v) | (v < 0) | ((v == 0) & (key != "r"))
        if bad.any():
            row = np.argwhere(bad)[0]
            where = f" (row {int(row[0])})" if v.ndim else ""
            raise GeometryError(f"{family}.{key}{where}: expected a positive length, got {v[tuple(row)]!r}")
        out[key] = v
    try:
        shape = np.broadcast_shapes(*(v.shape for v in out.values()))
    except ValueError:
        raise GeometryError(f"{family}: dimension arrays have different lengths") from None
    return {k: np.broadcast_to(v, shape).astype(float) for k, v in out.items()}


def _require(family, cond, what, dims):
    if np.any(~cond):
        row = np.argwhere(~np.broadcast_to(cond, np.shape(cond)))
        where = f" (row {int(row[0][0])})" if row.size and np.ndim(cond) else ""
        raise GeometryError(f"{family}{where}: expected {what}")


def thin_walled_torsion(family: str, dims: dict) -> dict:
    """J and Cw of many sections of one family from closed-form expressions.

    Parameters
    ----------
    family : str
        ``rectangle (b, d)``, ``circle (d)``, ``tube (d, t)``, ``box (b, d, t, r)``,
        ``ibeam (d, b, tw, tf, r; b_top, tf_top, b_bot, tf_bot)``,
        ``channel (d, b, tw, tf, r)``, ``tee (d, b, tw, tf, r)``, ``angle (d, b, t, r)``.
    dims : dict of str -> array_like
        Dimensions in one consistent length unit, arrays broadcast together.
        A missing ``r`` means 0; missing flange keys of ``ibeam`` default to ``b``, ``tf``.

    Returns
    -------
    dict
        ``{"J": ndarray, "Cw": ndarray}`` (length^4 and length^6), the broadcast shape.

    Raises
    ------
    CatalogError
        Unknown family.
    GeometryError
        A missing or non-positive dimension, or walls that do not fit.

    Examples
    --------
    >>> out = thin_walled_torsion("ibeam", {"d": 300.0, "b": 150.0, "tw": 7.1, "tf": 10.7, "r": 15.0})
    >>> round(float(out["J"]) / 1e4, 1), round(float(out["Cw"]) / 1e9, 1)   # cm^4, 10^3 cm^6
    (19.9, 125.9)
    """
    v = _check(family, dims)
    r = v.get("r", np.zeros_like(next(iter(v.values()))))
    if family == "rectangle":
        J, Cw = _rectangle(v["b"], v["d"])
    elif family == "circle":
        J, Cw = np.pi * v["d"] ** 4 / 32, np.zeros_like(v["d"])
    elif family == "tube":
        d, t = v["d"], v["t"]
        _require(family, 2 * t < d, "wall t < d/2", dims)
        J, Cw = np.pi * (d**4 - (d - 2 * t) ** 4) / 32, np.zeros_like(d)
    elif family == "box":
        b, d, t = v["b"], v["d"], v["t"]
        _require(family, (2 * t < b) & (2 * t < d), "wall t smaller than b/2 and d/2", dims)
        _require(family, 2 * r <= np.minimum(b, d), "corner radius r at most half the smaller side", dims)
        J, Cw = _box(b, d, t, r)
    elif family == "ibeam":
        d, b, tw, tf = v["d"], v["b"], v["tw"], v["tf"]
        bt, tft = v.get("b_top", b), v.get("tf_top", tf)
        bb, tfb = v.get("b_bot", b), v.get("tf_bot", tf)
        _require(family, tft + tfb < d, "flange thicknesses smaller than the depth", dims)
        _require(family, (tw < bt) & (tw < bb), "web thinner than the flanges are wide", dims)
        J, Cw = _ibeam(d, b, tw, tf, r, bt, tft, bb, tfb)
    elif family == "channel":
        d, b, tw, tf = v["d"], v["b"], v["tw"], v["tf"]
        _require(family, (2 * tf < d) & (tw < b), "2 tf < d and tw < b", dims)
        J, Cw = _channel(d, b, tw, tf, r)
    elif family == "tee":
        d, b, tw, tf = v["d"], v["b"], v["tw"], v["tf"]
        _require(family, (tf < d) & (tw < b), "tf < d and tw < b", dims)
        J, Cw = _tee(d, b, tw, tf, r)
    else:  # angle
        d, b, t = v["d"], v["b"], v["t"]
        _require(family, (t < d) & (t < b), "t smaller than both legs", dims)
        J, Cw = _angle(d, b, t, r)
    return {"J": np.asarray(J, float), "Cw": np.asarray(Cw, float)}


def shear_centre_height(family: str, dims: dict) -> np.ndarray:
    """Height of the shear centre above the base (bottom of the bounding box), thin-walled theory.

    - ibeam: on the web, between the flanges' mid-planes in the ratio of the flanges' own
      second moments about the web: ``tf_bot/2 + h_s I_top / (I_top + I_bot)`` with
      ``h_s = d - (tf_top + tf_bot) / 2`` (thin-walled open sections, e.g. Timoshenko & Gere,
      Theory of Elastic Stability, ch. 6; from memory);
    - tee (flange on top): where the flange and web mid-lines meet, ``d - tf/2``;
    - angle: where the legs' mid-lines meet, ``t/2`` (the horizontal leg at the base);
    - channel (symmetric about its horizontal axis), rectangle, circle, tube, box: mid-height.

    >>> import numpy as np
    >>> float(shear_centre_height("ibeam", {"d": np.array([0.3]), "b": np.array([0.15]),
    ...                                     "tw": np.array([0.007]), "tf": np.array([0.01])})[0])
    0.15
    """
    v = _check(family, dims)
    d = v.get("d", v.get("b"))
    if family == "ibeam":
        b, tf = v["b"], v["tf"]
        bt, tft = v.get("b_top", b), v.get("tf_top", tf)
        bb, tfb = v.get("b_bot", b), v.get("tf_bot", tf)
        It, Ib = tft * bt**3, tfb * bb**3  # the common factor 1/12 cancels
        return np.asarray(tfb / 2 + (d - (tft + tfb) / 2) * It / (It + Ib), float)
    if family == "tee":
        return np.asarray(d - v["tf"] / 2, float)
    if family == "angle":
        return np.asarray(v["t"] / 2 + 0 * d, float)
    return np.asarray(d / 2, float)