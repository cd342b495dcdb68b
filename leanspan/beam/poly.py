"""Piecewise polynomials on beam elements, vectorised over any leading axes.

A field on element ``e`` is stored as coefficients in ascending powers of the local
coordinate ``s = x - x_start[e]``: ``coeffs[..., e, k]`` multiplies ``s**k``, valid for
``0 <= s <= lengths[e]``. Extremes are exact to round-off: the candidates are the
element ends and the real roots of the derivative inside the element, grouped by
effective degree: closed forms up to the cubic (stable quadratic formula, trigonometric
or Cardano cubic), higher degrees (and nearly quadratic cubics) by companion-matrix
eigenvalues, polished by Newton steps. A derivative whose Bernstein coefficients keep one
sign by a margin has no root in its element and is not solved: in a beam most elements'
derivatives are such, so few polynomials reach the root finders.

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

import functools
import math

import numpy as np

__all__ = ["evaluate", "derivative", "roots_in", "extremes", "global_extremes"]


def evaluate(coeffs, s):
    """Evaluate ``sum_k coeffs[..., k] * s**k`` by Horner's rule (``s`` broadcasts with ``coeffs[..., 0]``).

    >>> float(evaluate(np.array([1.0, 2.0, 3.0]), 2.0))
    17.0
    """
    c = np.asarray(coeffs, float)
    s = np.asarray(s, float)
    if c.shape[-1] == 1:
        return np.broadcast_to(c[..., 0], np.broadcast_shapes(c.shape[:-1], s.shape)).copy()
    out = c[..., -1] * s + c[..., -2]  # broadcasts to the full shape
    for k in range(c.shape[-1] - 3, -1, -1):
        out *= s
        out += c[..., k]
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
    Only the polynomials that can vanish on the interval are solved (:func:`_may_vanish`).

    >>> r = roots_in(np.array([2.0, -3.0, 1.0]), 5.0)    # (s-1)(s-2)
    >>> sorted(r.tolist())
    [1.0, 2.0]
    >>> c = np.array([[2.0, -3.0, 1.0], [2.5, -3.0, 1.0]])   # the second, (s-1.5)^2 + 0.25, has none
    >>> np.sort(roots_in(c, 5.0)).round(12).tolist()
    [[1.0, 2.0], [nan, nan]]
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
    live = np.flatnonzero(_may_vanish(b, scale))
    b = b[live]
    big = np.abs(b) > 1e-12 * scale[live, None]
    eff = np.where(big.any(axis=1), deg - np.argmax(big[:, ::-1], axis=1), 0)
    t = np.full((live.size, deg), np.nan)
    for d in range(1, deg + 1):  # small fixed set of degrees
        idx = np.flatnonzero(eff == d)
        if idx.size == 0:
            continue
        p = b[idx, : d + 1]
        if d == 1:
            t[idx, :1] = (-p[:, 0] / p[:, 1])[:, None]
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
            t[idx, :2] = np.where(keep[:, None], np.stack([r1, r2], axis=1), np.nan)
        elif d == 3:
            t[idx, :3] = _cubic_roots(p, imag_tol)
        else:
            t[idx, :d] = _companion_roots(p, imag_tol)
    # two Newton steps polish the round-off of the trigonometric cubic and the eigenvalues,
    # each kept only where it lowers |p| (near a double root the step is unreliable); the
    # quadratic formula is converged already. Higher coefficients of a lower degree are zero,
    # so all degrees from the cubic up are polished together.
    idx = np.flatnonzero(eff >= 3)
    if idx.size:
        p, r = b[idx], t[idx]
        dp = p[:, 1:] * np.arange(1, n)
        f = evaluate(p[:, None, :], r)
        for _ in range(2):
            g = evaluate(dp[:, None, :], r)
            with np.errstate(divide="ignore", invalid="ignore"):
                step = np.where(np.abs(g) > 0, f / g, 0.0)
            r_new = r - step
            f_new = evaluate(p[:, None, :], np.where(np.isfinite(r_new), r_new, 0.0))  # (not a root: ok below)
            ok = np.isfinite(r_new) & (np.abs(step) < 0.1) & (np.abs(f_new) <= np.abs(f))
            r, f = np.where(ok, r_new, r), np.where(ok, f_new, f)
        t[idx] = r
    out[live] = np.where((t > 0.0) & (t < 1.0), t, np.nan)
    return out.reshape(lead + (deg,)) * L[..., None]


_VANISH_TOL = 1e-6
"""A polynomial whose Bernstein coefficients on [0, 1] all exceed this fraction of its largest
coefficient, with one sign, keeps that sign with a margin: it has no root there (nor a nearly
real pair, whose value at its real part is far smaller). The others are solved."""


@functools.lru_cache(maxsize=None)
def _to_bernstein(deg):
    """(deg + 1, deg + 1) matrix from ascending power coefficients on [0, 1] to Bernstein ones:
    ``b_i = sum_k C(i, k) / C(deg, k) a_k`` (any text on Bezier curves, e.g. Farin, Curves and
    Surfaces for CAGD, on degree conversion)."""
    return np.array([[math.comb(i, k) / math.comb(deg, k) if k <= i else 0.0 for k in range(deg + 1)]
                     for i in range(deg + 1)])


def _may_vanish(b, scale):
    """Rows of ``b`` (N, n), polynomials in ``t``, that may have a root in [0, 1]: a polynomial lies
    between the smallest and largest of its Bernstein coefficients (their convex hull), so one
    whose coefficients all keep one sign by a margin has none.

    >>> _may_vanish(np.array([[0.06, -0.5, 1.0], [1.0, -1.0, 1.0]]), np.array([1.0, 1.0])).tolist()
    [True, False]
    """
    bern = b @ _to_bernstein(b.shape[1] - 1).T
    tol = _VANISH_TOL * scale[:, None]
    return ~((bern > tol).all(axis=1) | (bern < -tol).all(axis=1))


_CUBIC_WELL = 1e3  # the closed-form cubic for monic coefficients up to this (roots of that size)


def _companion_roots(p, imag_tol):
    """Real roots (N, d) of polynomials ``p`` (N, d + 1) of exact degree d: the eigenvalues of
    the companion matrix, nearly real ones (relative imaginary part below ``imag_tol``) kept."""
    d = p.shape[1] - 1
    comp = np.zeros((p.shape[0], d, d))
    comp[:, 0, :] = -p[:, d - 1 :: -1] / p[:, d : d + 1]
    comp[:, np.arange(1, d), np.arange(d - 1)] = 1.0
    r = np.linalg.eigvals(comp)
    real = np.abs(r.imag) <= imag_tol * np.maximum(1.0, np.abs(r.real))
    return np.where(real, r.real, np.nan)


def _cubic_roots(p, imag_tol):
    """Real roots (N, 3) of cubics with ascending coefficients ``p`` (N, 4), ``p[:, 3] != 0``, in
    closed form (NaN where none): three by the trigonometric formula, else Cardano's one with
    the stable choice of cube root; the real part of a nearly real complex pair (relative
    imaginary part below ``imag_tol``) is kept, as from the eigenvalues.

    >>> sorted(np.round(_cubic_roots(np.array([[-6.0, 11.0, -6.0, 1.0]]), 1e-6)[0], 12).tolist())   # (t-1)(t-2)(t-3)
    [1.0, 2.0, 3.0]
    """
    a, b, c = (p[:, 2] / p[:, 3]), (p[:, 1] / p[:, 3]), (p[:, 0] / p[:, 3])
    # a nearly quadratic cubic (small leading coefficient: one huge root) loses its small roots to
    # cancellation in the closed form; those rows take the companion matrix's eigenvalues
    ill = np.fmax(np.fmax(np.abs(a), np.abs(b)), np.abs(c)) > _CUBIC_WELL
    if ill.any():
        out = np.full((p.shape[0], 3), np.nan)
        out[ill] = _companion_roots(p[ill], imag_tol)
        if (~ill).any():
            out[~ill] = _cubic_roots(p[~ill], imag_tol)
        return out
    shift = a / 3.0
    P = b - a * shift
    Q = (2.0 * a * a * a / 27.0) - a * b / 3.0 + c
    D = (Q / 2.0) ** 2 + (P / 3.0) ** 3
    out = np.full((p.shape[0], 3), np.nan)
    three = D <= 0
    if three.any():
        Pt, Qt = P[three], Q[three]
        r = np.sqrt(np.maximum(-Pt / 3.0, 0.0))
        with np.errstate(divide="ignore", invalid="ignore"):
            cos3 = np.where(r > 0, -Qt / (2.0 * r**3), 1.0)
        phi = np.arccos(np.clip(cos3, -1.0, 1.0)) / 3.0
        k = np.arange(3)[None, :]
        out[three] = 2.0 * r[:, None] * np.cos(phi[:, None] - 2.0 * np.pi * k / 3.0) - shift[three, None]
    one = ~three
    if one.any():
        Po, Qo = P[one], Q[one]
        u = np.cbrt(-Qo / 2.0 - np.copysign(np.sqrt(D[one]), Qo))  # no cancellation
        with np.errstate(divide="ignore", invalid="ignore"):
            v = np.where(u != 0, -Po / (3.0 * u), 0.0)
        y, re, im = u + v, -(u + v) / 2.0, np.sqrt(3.0) / 2.0 * np.abs(u - v)
        near = im <= imag_tol * np.maximum(1.0, np.abs(re))
        out[one, 0] = y - shift[one]
        out[one, 1] = np.where(near, re - shift[one], np.nan)
    return out


def extremes(coeffs, lengths, inner=None):
    """Per-element maximum and minimum over ``[0, length]`` with their local positions.

    Parameters
    ----------
    coeffs : array (..., n)
        Ascending coefficients in the local coordinate.
    lengths : array broadcastable to ``coeffs.shape[:-1]``
    inner : array (..., m), optional
        The roots of the derivative inside the elements (:func:`roots_in` of
        :func:`derivative`), when the caller has them already.

    Returns
    -------
    vmax, smax, vmin, smin : arrays of shape ``coeffs.shape[:-1]``
        Values and local positions ``s`` (0 <= s <= length).
    """
    c = np.asarray(coeffs, float)
    lead = c.shape[:-1]
    L = np.broadcast_to(np.asarray(lengths, float), lead)
    if inner is None:
        inner = roots_in(derivative(c), L) if c.shape[-1] > 2 else np.full(lead + (0,), np.nan)
    cand = np.concatenate([np.zeros(lead + (1,)), L[..., None], inner], axis=-1)
    bad = np.isnan(cand)
    vals = evaluate(c[..., None, :], np.where(bad, 0.0, cand))
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
