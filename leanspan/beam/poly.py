"""Piecewise polynomials on beam elements, vectorised over any leading axes.

A field on element ``e`` is stored as coefficients in ascending powers of the local
coordinate ``s = x - x_start[e]``: ``coeffs[..., e, k]`` multiplies ``s**k``, valid for
``0 <= s <= lengths[e]``. Extremes are exact to round-off: the candidates are the
element ends and the real roots of the derivative inside the element (companion
matrix eigenvalues, grouped by effective degree, polished by Newton steps).

Examples
--------
>>> import numpy as np
>>> c = np.array([[0.0, 3.0, -1.0]])          # 3 s - s^2 on [0, 2]
>>> vmax, smax, vmin, smin = extremes(c, np.array([2.0]))
>>> float(vmax[0]), float(smax[0]), float(vmin[0]), float(smin[0])
(2.25, 1.5, 0.0, 0.0)
>>> gmax, xmax, gmin, xmin = global_extremes(c, np.array([10.0]), np.array([2.0]))
>>> float(gmax), float(xmax)
(2.25, 11.5)
"""

from __future__ import annotations

import numpy as np

__all__ = ["evaluate", "derivative", "roots_in", "extremes", "global_extremes"]


def evaluate(coeffs, s):
    """Evaluate ``sum_k coeffs[..., k] * s**k`` by Horner's rule (``s`` broadcasts with ``coeffs[..., 0]``).

    >>> float(evaluate(np.array([1.0, 2.0, 3.0]), 2.0))
    17.0
    """
    c = np.asarray(coeffs, float)
    s = np.asarray(s, float)
    out = np.broadcast_to(c[..., -1], np.broadcast_shapes(c.shape[:-1], s.shape)).copy()
    for k in range(c.shape[-1] - 2, -1, -1):
        out = out * s + c[..., k]
    return out


def derivative(coeffs):
    """Coefficients of d/ds (one fewer along the last axis).

    >>> derivative(np.array([1.0, 2.0, 3.0])).tolist()
    [2.0, 6.0]
    """
    c = np.asarray(coeffs, float)
    n = c.shape[-1]
    return c[..., 1:] * np.arange(1, n)


def roots_in(coeffs, lengths, imag_tol: float = 1e-6):
    """Real roots of each polynomial strictly inside ``(0, length)``.

    Returns an array of shape ``coeffs.shape[:-1] + (degree,)`` with NaN where there is
    no root. Nearly real roots (relative imaginary part below ``imag_tol``) are kept, so
    a pair of close roots is never lost; a spurious candidate only costs an evaluation.

    >>> r = roots_in(np.array([2.0, -3.0, 1.0]), 5.0)    # (s-1)(s-2)
    >>> sorted(r.tolist())
    [1.0, 2.0]
    """
    c = np.asarray(coeffs, float)
    n = c.shape[-1]
    deg = n - 1
    lead = c.shape[:-1]
    L = np.broadcast_to(np.asarray(lengths, float), lead)
    if deg < 1:
        return np.full(lead + (0,), np.nan)
    b = (c * L[..., None] ** np.arange(n)).reshape(-1, n)  # in t = s / L, t in (0, 1)
    out = np.full((b.shape[0], deg), np.nan)
    scale = np.abs(b).max(axis=1)
    big = np.abs(b) > 1e-12 * scale[:, None]
    has = big.any(axis=1)
    eff = np.where(has, deg - np.argmax(big[:, ::-1], axis=1), 0)
    for d in range(1, deg + 1):  # small fixed set of degrees
        idx = np.nonzero(eff == d)[0]
        if idx.size == 0:
            continue
        p = b[idx, : d + 1]
        if d == 1:
            t = (-p[:, 0] / p[:, 1])[:, None]
        elif d == 2:
            a2, a1, a0 = p[:, 2], p[:, 1], p[:, 0]
            disc = a1 * a1 - 4 * a2 * a0
            sq = np.sqrt(np.maximum(disc, 0.0))
            # stable quadratic formula; near-zero negative discriminants count as a double root
            keep = disc >= -1e-12 * (a1 * a1 + np.abs(4 * a2 * a0))
            qq = -0.5 * (a1 + np.copysign(sq, a1))
            with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
                r1 = np.where(qq != 0, qq / a2, -a1 / (2 * a2))
                r2 = np.where(qq != 0, a0 / qq, -a1 / (2 * a2))
            t = np.where(keep[:, None], np.stack([r1, r2], axis=1), np.nan)
        else:
            comp = np.zeros((idx.size, d, d))
            comp[:, 0, :] = -p[:, d - 1 :: -1] / p[:, d : d + 1]
            comp[:, np.arange(1, d), np.arange(d - 1)] = 1.0
            r = np.linalg.eigvals(comp)
            real = np.abs(r.imag) <= imag_tol * np.maximum(1.0, np.abs(r.real))
            t = np.where(real, r.real, np.nan)
        # two Newton steps polish round-off from the eigenvalue solver
        dp = p[:, 1:] * np.arange(1, d + 1)
        for _ in range(2):
            f = evaluate(p[:, None, :], t)
            g = evaluate(dp[:, None, :], t)
            with np.errstate(divide="ignore", invalid="ignore"):
                step = np.where(np.abs(g) > 0, f / g, 0.0)
            t_new = t - step
            t = np.where(np.isfinite(t_new) & (np.abs(step) < 0.1), t_new, t)
        t = np.where((t > 0.0) & (t < 1.0), t, np.nan)
        out[idx, :d] = t
    return out.reshape(lead + (deg,)) * L[..., None]


def extremes(coeffs, lengths):
    """Per-element maximum and minimum over ``[0, length]`` with their local positions.

    Parameters
    ----------
    coeffs : array (..., n)
        Ascending coefficients in the local coordinate.
    lengths : array broadcastable to ``coeffs.shape[:-1]``

    Returns
    -------
    vmax, smax, vmin, smin : arrays of shape ``coeffs.shape[:-1]``
        Values and local positions ``s`` (0 <= s <= length).
    """
    c = np.asarray(coeffs, float)
    lead = c.shape[:-1]
    L = np.broadcast_to(np.asarray(lengths, float), lead)
    inner = roots_in(derivative(c), L) if c.shape[-1] > 2 else np.full(lead + (0,), np.nan)
    cand = np.concatenate([np.zeros(lead + (1,)), L[..., None], inner], axis=-1)
    vals = evaluate(c[..., None, :], np.nan_to_num(cand, nan=0.0))
    bad = np.isnan(cand)
    vhi = np.where(bad, -np.inf, vals)
    vlo = np.where(bad, np.inf, vals)
    imax = np.argmax(vhi, axis=-1)[..., None]
    imin = np.argmin(vlo, axis=-1)[..., None]
    take = lambda a, i: np.take_along_axis(a, i, axis=-1)[..., 0]  # noqa: E731
    return take(vhi, imax), take(cand, imax), take(vlo, imin), take(cand, imin)


def global_extremes(coeffs, x_start, lengths):
    """Reduce over the element axis (the last leading axis): global max/min and their ``x``.

    Returns ``(vmax, xmax, vmin, xmin)`` with shape ``coeffs.shape[:-2]``.
    """
    vmax, smax, vmin, smin = extremes(coeffs, lengths)
    x0 = np.broadcast_to(np.asarray(x_start, float), vmax.shape)
    i = np.argmax(vmax, axis=-1)[..., None]
    j = np.argmin(vmin, axis=-1)[..., None]
    take = lambda a, k: np.take_along_axis(a, k, axis=-1)[..., 0]  # noqa: E731
    return take(vmax, i), take(x0 + smax, i), take(vmin, j), take(x0 + smin, j)
