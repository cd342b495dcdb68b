"""Vectorised screening of many candidate members against one beam job.

The beam is solved once per unit case (``leanspan.beam.respond``). For a prismatic
beam without springs the internal forces do not depend on EI and deflections scale
with 1/EI, so every combination for candidate k is ``A(x) + t_k B(x)`` where A is the
combination of the load cases, B the unit self-weight case and ``t_k`` the
candidate's factored weight per length. Extremes of M (cubic per element) and V come
in closed form from the roots of their derivatives; extremes of v (quintic) from the
best of a grid in every element polished by Newton steps on the exact polynomial.
Both equal the exact extremes to round-off. With springs the
unit cases are solved for all K stiffnesses as one batch and combined the same way.

:func:`screen_loop` does the same checks one candidate at a time through
:func:`leanspan.beam.solve`: the independent reference the tests compare with.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

__all__ = ["Candidates", "Screen", "screen", "screen_loop", "CHECKS"]

CHECKS = ("bending", "shear", "deflection")
_SAMPLES = 12  # grid points per element before the Newton polish
_BLOCK = 2048  # candidates per block (keeps the grid work in cache)


@dataclass(frozen=True)
class Candidates:
    """Arrays (K,) describing candidate members (SI units)."""

    EI: np.ndarray
    mass_per_length: np.ndarray
    Sz_top: np.ndarray
    Sz_bot: np.ndarray
    shear_factor: np.ndarray
    bending_allow: np.ndarray
    shear_allow: np.ndarray

    @property
    def size(self) -> int:
        return int(np.size(self.EI))

    def take(self, index) -> "Candidates":
        return Candidates(*(np.asarray(getattr(self, f))[index] for f in self.__dataclass_fields__))


@dataclass(frozen=True)
class Screen:
    """Demands and utilisations per candidate (arrays (K,), SI units).

    ``M_max``/``M_min`` over strength combinations (sagging +), ``V_abs`` the largest
    shear magnitude, ``sigma`` the peak bending stress at either extreme fibre,
    ``tau`` the peak shear stress, ``deflection_ratio`` the largest deflection / allowed
    over every span and overhang of every deflection combination (NaN if none),
    ``utilisation`` a dict of the three checks, ``governing`` the name of the largest,
    ``passes`` all utilisations <= 1.
    """

    M_max: np.ndarray
    M_min: np.ndarray
    V_abs: np.ndarray
    sigma: np.ndarray
    tau: np.ndarray
    v_abs: np.ndarray
    deflection_ratio: np.ndarray
    utilisation: dict
    governing: np.ndarray
    passes: np.ndarray


def _grid(lengths):
    return lengths[:, None] * np.linspace(0.0, 1.0, _SAMPLES)[None, :]


def _horner(coeffs, s):
    """coeffs (..., n) at points s (broadcasting with coeffs[..., 0]) by Horner's rule."""
    out = np.broadcast_to(coeffs[..., -1], np.broadcast_shapes(coeffs.shape[:-1], s.shape)).copy()
    for k in range(coeffs.shape[-1] - 2, -1, -1):
        out *= s
        out += coeffs[..., k]
    return out


def _cubic_extremes(coef, L, x0):
    """Exact max and min of cubics coef (K, E, 4) on [0, L_e]: ends and the roots of the
    quadratic derivative (stable formula; a vanishing s^2 term leaves the linear root).
    Returns {+1: (value, x), -1: (value, x)} over all elements."""
    c1, c2, c3 = coef[..., 1], 2.0 * coef[..., 2], 3.0 * coef[..., 3]
    disc = c2 * c2 - 4.0 * c3 * c1
    root = np.sqrt(np.maximum(disc, 0.0))
    q = -0.5 * (c2 + np.where(c2 >= 0, root, -root))
    with np.errstate(divide="ignore", invalid="ignore"):
        r1 = np.where(c3 != 0, q / c3, np.nan)
        r2 = np.where(q != 0, c1 / q, np.nan)
    ok = disc >= 0
    Lb = np.broadcast_to(L, r1.shape)
    cands = [np.zeros_like(r1), Lb]
    for r in (r1, r2):
        cands.append(np.where(ok & (r > 0) & (r < Lb), r, 0.0))
    s = np.stack(cands, axis=-1)  # (K, E, 4)
    vals = _horner(coef[..., None, :], s)
    out = {}
    K = coef.shape[0]
    for sign in (1, -1):
        flat = (sign * vals).reshape(K, -1)
        j = np.argmax(flat, axis=1)
        e = j // s.shape[-1]
        out[sign] = (sign * flat[np.arange(K), j], x0[e] + s.reshape(K, -1)[np.arange(K), j])
    return out


def _polished_extremes(coef, L, x0):
    """Max and min of higher-degree polynomials coef (K, E, n) on [0, L_e]: the best of a
    grid in every element, polished by Newton steps on the exact derivative."""
    K, E, n = coef.shape
    s_grid = _grid(L)  # (E, S)
    vals = _horner(coef[:, :, None, :], s_grid[None])  # (K, E, S)
    d1 = coef[..., 1:] * np.arange(1, n)
    d2 = d1[..., 1:] * np.arange(1, n - 1)
    out = {}
    for sign in (1, -1):
        i = np.argmax(sign * vals, axis=2)  # best grid point of every element
        s_start = s_grid[np.arange(E)[None, :], i]
        s = s_start
        best = np.take_along_axis(vals, i[..., None], axis=2)[..., 0]
        for _ in range(4):
            g, h = _horner(d1, s), _horner(d2, s)
            ok = sign * h < 0  # curving the right way for a peak of sign * f
            with np.errstate(divide="ignore", invalid="ignore"):
                s = np.clip(s - np.where(ok, g / np.where(ok, h, 1.0), 0.0), 0.0, L)
        f = _horner(coef, s)
        better = sign * f > sign * best
        value = np.where(better, f, best)
        where = np.where(better, s, s_start)
        e = np.argmax(sign * value, axis=1)
        r = np.arange(K)
        out[sign] = (value[r, e], x0[e] + where[r, e])
    return out


def _field_extremes(field, F, sw, t, scale, lengths, x0, elems):
    """Max and min over elements ``elems`` of one combination, per candidate.

    field (1 or K, U, E, n); the combined field of candidate k is
    (sum_u F_u field_u + t_k field_sw) * scale_k (scale: None or (K,)).
    Returns {+1: (value, x), -1: (value, x)}.
    """
    Fn = F.copy()
    if sw is not None:
        Fn[sw] = 0.0
    sub = field[:, :, elems]
    L, xs = lengths[elems], x0[elems]
    K = t.size
    fixed = sub.shape[0] == 1
    if fixed:  # forces independent of the candidate: A + t B
        A = np.tensordot(Fn, sub[0], axes=(0, 0))  # (E, n)
        B = sub[0, sw] if sw is not None else np.zeros_like(A)
    parts = {1: [], -1: []}
    for start in range(0, K, _BLOCK):
        rows = slice(start, min(K, start + _BLOCK))
        tk = t[rows]
        if fixed:
            coef = A[None] + tk[:, None, None] * B[None]
        else:
            Fk = np.broadcast_to(Fn, (tk.size, Fn.size)).copy()
            if sw is not None:
                Fk[:, sw] = tk
            coef = np.einsum("ku,kuen->ken", Fk, sub[rows])
        if scale is not None:
            coef = coef * scale[rows, None, None]
        ext = _cubic_extremes(coef, L, xs) if coef.shape[-1] <= 4 else _polished_extremes(coef, L, xs)
        for sign in (1, -1):
            parts[sign].append(ext[sign])
    return {sg: tuple(np.concatenate([p[i] for p in parts[sg]]) for i in range(2)) for sg in (1, -1)}


def screen(model, cand: Candidates, self_weight_case=None) -> Screen:
    """Check every candidate against every combination of ``model`` (a BeamModel).

    Parameters
    ----------
    model : BeamModel
        The job's beam (its own EI is ignored).
    cand : Candidates
    self_weight_case : str, optional
        The case carrying each candidate's weight (default: the model's ``self_weight``).
    """
    from ..beam import G, respond

    sw_case = self_weight_case if self_weight_case is not None else model.self_weight
    resp = respond(model, EI=np.asarray(cand.EI, float), unit_self_weight=sw_case is not None,
                   self_weight_case=sw_case)
    K = cand.size
    sw = resp.self_weight_index
    mass_g = np.asarray(cand.mass_per_length, float) * G
    lengths, x0 = resp.lengths, resp.x_nodes[:-1]
    all_elems = np.arange(lengths.size)
    fixed = resp.M.shape[0] == 1
    if fixed:  # deflection = (v EI of the unit solve) / EI_k
        v_field = resp.v[:1] * resp.EI[:1, None, :, None]
        v_scale = 1.0 / np.asarray(cand.EI, float)
    else:
        v_field, v_scale = resp.v, None

    M_max = np.full(K, -np.inf)
    M_min = np.full(K, np.inf)
    V_abs = np.zeros(K)
    ratio = np.full(K, np.nan)
    v_abs = np.full(K, np.nan)
    mids = x0 + lengths / 2
    for combo in resp.combos:  # a small set
        F = np.asarray(combo.factors, float)
        t = mass_g * (F[sw] if sw is not None else 0.0)
        if combo.check == "strength":
            m = _field_extremes(resp.M, F, sw, t, None, lengths, x0, all_elems)
            v = _field_extremes(resp.V, F, sw, t, None, lengths, x0, all_elems)
            M_max = np.maximum(M_max, m[1][0])
            M_min = np.minimum(M_min, m[-1][0])
            V_abs = np.maximum(V_abs, np.maximum(np.abs(v[1][0]), np.abs(v[-1][0])))
        elif combo.limit is not None:
            for a, b, _kind in resp.spans:
                elems = np.nonzero((mids > a) & (mids < b))[0]
                if elems.size == 0:
                    continue
                d = _field_extremes(v_field, F, sw, t, v_scale, lengths, x0, elems)
                mag = np.maximum(np.abs(d[1][0]), np.abs(d[-1][0]))
                r = mag / float(combo.limit.allowed(b - a))
                upd = ~(r <= ratio)  # NaN-aware maximum
                ratio = np.where(upd, r, ratio)
                v_abs = np.where(upd, mag, v_abs)
    S_min = np.minimum(cand.Sz_top, cand.Sz_bot)
    # peak fibre stress: sagging M gives M/S at both fibres, hogging |M|/S likewise
    sigma = np.maximum(np.maximum(M_max, 0.0), np.maximum(-M_min, 0.0)) / S_min
    tau = V_abs * cand.shear_factor
    util = {"bending": sigma / cand.bending_allow, "shear": tau / cand.shear_allow,
            "deflection": ratio}
    return _finish(M_max, M_min, V_abs, sigma, tau, v_abs, ratio, util)


def _finish(M_max, M_min, V_abs, sigma, tau, v_abs, ratio, util):
    stack = np.stack([util[c] for c in CHECKS], axis=1)
    filled = np.where(np.isnan(stack), -np.inf, stack)
    governing = np.asarray(CHECKS, dtype=object)[np.argmax(filled, axis=1)]
    passes = np.all(np.isnan(stack) | (stack <= 1.0), axis=1)
    return Screen(M_max, M_min, V_abs, sigma, tau, v_abs, ratio, util, governing, passes)


def screen_loop(model, cand: Candidates, self_weight_case=None) -> Screen:
    """The same checks, one candidate at a time through :func:`leanspan.beam.solve`.

    Slow on purpose: the reference the vectorised :func:`screen` is tested against.
    """
    import dataclasses

    from ..beam import Stiffness, solve

    sw_case = self_weight_case if self_weight_case is not None else model.self_weight
    K = cand.size
    out = {k: np.zeros(K) for k in ("M_max", "M_min", "V_abs", "v_abs", "ratio")}
    for k in range(K):
        m = dataclasses.replace(
            model, stiffness=(Stiffness(0.0, model.length, float(cand.EI[k])),),
            mass_per_length=float(cand.mass_per_length[k]) if sw_case is not None else None,
            self_weight=sw_case)
        sol = solve(m)
        mx, mn, va, ratio, vabs = -np.inf, np.inf, 0.0, np.nan, np.nan
        for c in m.combinations:
            r = sol.results[c.name]
            if c.check == "strength":
                mx = max(mx, r.extremes["M_max"].value)
                mn = min(mn, r.extremes["M_min"].value)
                va = max(va, abs(r.extremes["V_max"].value), abs(r.extremes["V_min"].value))
            else:
                for row in r.deflection_checks:
                    if np.isnan(ratio) or row["utilisation"] > ratio:
                        ratio, vabs = row["utilisation"], abs(row["v_extreme"])
        out["M_max"][k], out["M_min"][k], out["V_abs"][k] = mx, mn, va
        out["ratio"][k], out["v_abs"][k] = ratio, vabs
    S_min = np.minimum(cand.Sz_top, cand.Sz_bot)
    sigma = np.maximum(np.maximum(out["M_max"], 0.0), np.maximum(-out["M_min"], 0.0)) / S_min
    tau = out["V_abs"] * cand.shear_factor
    util = {"bending": sigma / cand.bending_allow, "shear": tau / cand.shear_allow,
            "deflection": out["ratio"]}
    return _finish(out["M_max"], out["M_min"], out["V_abs"], sigma, tau, out["v_abs"], out["ratio"], util)
