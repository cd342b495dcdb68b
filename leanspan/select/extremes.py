"""Exact extremes of many piecewise polynomials at once (the screens' per-element evaluators).

Every function here takes coefficients (K, E, n) (K rows, E elements, local coordinate s on
[0, L_e], lowest power first) and returns, per row, the extreme value, the element and s where it
occurs. Cubics and lower (moments, shears) come from the ends and the roots of the derivative;
higher degrees (deflections) from the best of a grid, polished by Newton steps.

Examples
--------
>>> coef = np.array([[[0.0, 4.0, -1.0, 0.0]]])  # 4 s - s^2 on [0, 3]: peak 4 at s = 2
>>> value, e, s = _cubic_best(coef, np.array([3.0]))
>>> float(value[0]), int(e[0]), float(s[0])
(4.0, 0, 2.0)
"""

from __future__ import annotations

import numpy as np

from ..beam.poly import evaluate as _horner

_SAMPLES = 12  # grid points per element before the Newton polish


def _grid(lengths):
    return lengths[..., None] * np.linspace(0.0, 1.0, _SAMPLES)


def _cubic_stations(coef, lo, hi):
    """Where a cubic (coefficients ``coef`` (..., n <= 4), local s) can peak on [lo, hi]: both ends
    and the real roots of its quadratic derivative inside (stable formula; a vanishing s^2 term
    leaves the linear root). Returns s (..., 4); unused slots repeat ``lo``."""
    n = coef.shape[-1]
    c1 = coef[..., 1]
    c2 = 2.0 * coef[..., 2] if n > 2 else np.zeros_like(c1)
    c3 = 3.0 * coef[..., 3] if n > 3 else np.zeros_like(c1)
    disc = c2 * c2 - 4.0 * c3 * c1
    root = np.sqrt(np.maximum(disc, 0.0))
    q = -0.5 * (c2 + np.where(c2 >= 0, root, -root))
    with np.errstate(divide="ignore", invalid="ignore"):
        r1 = np.where(c3 != 0, q / c3, np.nan)
        r2 = np.where(q != 0, c1 / q, np.nan)
    lo, hi = np.broadcast_to(lo, c1.shape), np.broadcast_to(hi, c1.shape)
    pts = [lo, hi] + [np.where((disc >= 0) & (r > lo) & (r < hi), r, lo) for r in (r1, r2)]
    return np.stack(pts, axis=-1)


def _pick(values, s, sign):
    """The largest of ``sign * values`` (K, E, S) at points ``s`` (same shape) per row:
    (value, element, s), each (K,)."""
    K, E, S = values.shape
    flat = (sign * values).reshape(K, -1)
    j = np.argmax(flat, axis=1)
    r = np.arange(K)
    return sign * flat[r, j], j // S, s.reshape(K, -1)[r, j]


def _cubic_best(coef, L, signs=(1,)):
    """Exact maximum (sign +1) and minimum (-1) of cubics coef (K, E, n <= 4) on [0, L] (L (E,)
    or (K, E)), from the stations of :func:`_cubic_stations`: {sign: (value, element, s)}; with
    the default ``signs`` only the maximum, as a tuple."""
    s = _cubic_stations(coef, 0.0, L)  # (K, E, 4)
    vals = _horner(coef[..., None, :], s)
    out = {sign: _pick(vals, s, sign) for sign in signs}
    return out[1] if signs == (1,) else out


def _polished_best(coef, L, signs=(1,)):
    """Maximum (+1) and minimum (-1) of higher-degree polynomials coef (K, E, n) on [0, L] (L (E,)
    or (K, E)): the best of a grid in every element, polished by Newton steps on the exact
    derivative. {sign: (value, element, s)}; with the default ``signs`` the maximum, as a tuple."""
    K, E, n = coef.shape
    s_grid = _grid(L)  # (E, S) or (K, E, S)
    vals = _horner(coef[:, :, None, :], s_grid)  # (K, E, S)
    s_grid = np.broadcast_to(s_grid, vals.shape)
    d1 = coef[..., 1:] * np.arange(1, n)
    d2 = d1[..., 1:] * np.arange(1, n - 1)
    out = {}
    for sign in signs:
        i = np.argmax(sign * vals, axis=2)[..., None]  # best grid point of every element
        s_start = np.take_along_axis(s_grid, i, axis=2)[..., 0]
        s = s_start
        best = np.take_along_axis(vals, i, axis=2)[..., 0]
        for _ in range(4):  # Newton converges in two or three steps from the grid: stop when it has
            g, h = _horner(d1, s), _horner(d2, s)
            ok = sign * h < 0  # curving the right way for a peak of sign * f
            with np.errstate(divide="ignore", invalid="ignore"):
                s_new = np.clip(s - np.where(ok, g / np.where(ok, h, 1.0), 0.0), 0.0, L)
            done = np.all(np.abs(s_new - s) <= 1e-15 * L)
            s = s_new
            if done:
                break
        f = _horner(coef, s)
        better = sign * f > sign * best
        value = np.where(better, f, best)
        where = np.where(better, s, s_start)
        e = np.argmax(sign * value, axis=1)
        r = np.arange(K)
        out[sign] = (value[r, e], e, where[r, e])
    return out[1] if signs == (1,) else out
