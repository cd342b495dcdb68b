"""Lateral-torsional buckling: the moment of every segment between lateral restraints against
the buckling-reduced bending resistance, for every candidate and strength combination.

Active when the job's ``[limits]`` sets ``lateral_restraint`` (``"supports"``: lateral and
torsional restraint at the supports only; ``"continuous"``: restrained all along, nothing to
check), optionally ``lateral_restraint_at`` (more restraint positions), ``load_height``
(``"top"``, default, ``"centroid"`` or ``"bottom"``: where gravity loads act),
``overhang_length_factor`` (effective length of a cantilever or overhang segment / its
length, default 2.0, common practice for a tip free to twist and move sideways),
``lateral_torsional_method`` (``"curve"``, default, or ``"ratio"``) with
``max_moment_ratio`` (M / Mcr allowed, for ``"ratio"``).

**Elastic critical moment** per segment of length L (the three-factor form for doubly and
mono-symmetric sections, Timoshenko & Gere, *Theory of Elastic Stability*, ch. 6, in the form
of the European guidance on Mcr, from memory)::

    Mcr = C1 pi^2 E Iy / (k L)^2 { sqrt(Cw / Iy + (k L)^2 G J / (pi^2 E Iy) + (C2 zg - C3 zj)^2)
                                   - (C2 zg - C3 zj) }

with Iy the minor-axis second moment (about the vertical axis), J, Cw the torsion and warping
constants, zg the height of the (gravity) load above the shear centre (destabilising above it,
in sagging and hogging segments alike) and zj the mono-symmetry parameter
``(ys - yc) - wagner / (2 Iz)``, measured towards the compressed flange (it changes sign where
the moment hogs). Supports, spring supports included, count as lateral and torsional restraints. C1 comes from the segment's own moment diagram by
the quarter-point formula ``12.5 Mmax / (2.5 Mmax + 3 MA + 4 MB + 3 MC)`` (capped at 3; ANSI/AISC
360 Eq. F1-1, from memory); C2 and C3 from the segment's loading: 0.454 and 0.525 under a
distributed load, 0.630 and 0.411 with a point load inside it, 0 and 1.0 under end moments
alone (the tabulated values for those diagrams, from memory), by the loads of each
combination's own cases. Cantilever segments take C1 = 1 and the same C2/C3, with the effective
length ``overhang_length_factor`` x L: a simple, conservative-leaning stand-in for cantilever
tables, not a cantilever solution.

**Resistance.** ``"curve"``: the general method of EN 1993-1-1 6.3.2.2 (from memory) with the
relative slenderness ``lam = sqrt(S fy / Mcr)`` (S the smaller elastic modulus, fy the
material's bending strength), ``Phi = 0.5 (1 + alpha (lam - lam0) + lam^2)``,
``chi = 1 / (Phi + sqrt(Phi^2 - lam^2)) <= 1``: steel alpha 0.21 (curve a, rolled I with
d/b <= 2), 0.34 (b, rolled, d/b > 2), 0.49 (c, welded, d/b <= 2), 0.76 (d, welded d/b > 2 and
other shapes), lam0 = 0.2 (EN 1993-1-1 Tables 6.3 and 6.4); stainless alpha 0.76, lam0 0.4
(EN 1993-1-4 6.3.4); aluminium alpha 0.20, lam0 0.4 (EN 1999-1-1 6.3.2.2, elastic sections);
timber and glulam by kcrit of EN 1995-1-1 6.3.3 (lam = sqrt(fm / sigma_crit); kcrit 1 up to
0.75, 1.56 - 0.75 lam up to 1.4, 1 / lam^2 beyond), with E at its 5 % fractile: the material's
``E_05`` (EN 338 / EN 14080 tables), G scaled by the same E_05 / E (common practice); a material
without E_05 takes 0.67 (solid timber, EN 338) or 0.83 (glulam, EN 14080) of the mean values
(from memory).
``"ratio"``: chi = max_moment_ratio Mcr / (S f), at most 1. The demand is the segment moment as
a stress, M / (chi S), against the same allowable bending stress as the bending check.
Sections with tilted principal axes (angles) cannot be checked this way and fail it.
"""

from __future__ import annotations

import numpy as np

from ...errors import SelectionError
from ..screen_reduce import to_parents
from ..design import allowable_stress
from .registry import Check, register

__all__ = ["LATERAL_TORSIONAL", "critical_moment", "reduction_factor", "moment_factor"]

_SAMPLES = 5  # the ends and quarter points of a segment, for C1
_CURVES = {"a": 0.21, "b": 0.34, "c": 0.49, "d": 0.76}
_ROLLED = ("gen_steel_i", "gen_steel_h")
_FRACTILE = {"timber": 0.67, "glulam": 0.83}


def critical_moment(E, G, Iy, J, Cw, L, C1=1.0, C2=0.0, C3=1.0, zg=0.0, zj=0.0, k=1.0):
    """Elastic critical moment of a segment (SI), the three-factor form; arrays broadcast.

    >>> import math
    >>> E, G, Iy, J, Cw, L = 210e9, 81e9, 6.04e-6, 2.0e-7, 1.26e-7, 6.0
    >>> uniform = math.pi / L * math.sqrt(E * Iy * G * J * (1 + math.pi**2 * E * Cw / (G * J * L**2)))
    >>> round(float(critical_moment(E, G, Iy, J, Cw, L)) / uniform, 12)   # uniform moment, closed form
    1.0
    """
    a = C2 * np.asarray(zg, float) - C3 * np.asarray(zj, float)
    kL2 = (k * np.asarray(L, float)) ** 2
    with np.errstate(divide="ignore", invalid="ignore"):
        root = np.sqrt(Cw / Iy + kL2 * G * J / (np.pi**2 * E * Iy) + a * a)
        return C1 * np.pi**2 * E * Iy / kL2 * (root - a)


def moment_factor(Mmax, MA, MB, MC):
    """C1 from the quarter-point moments of a segment (magnitudes), capped at 3.

    >>> float(moment_factor(1.0, 0.75, 1.0, 0.75))   # a parabola, simply supported under a UDL
    1.1363636363636365
    """
    with np.errstate(divide="ignore", invalid="ignore"):
        c = 12.5 * Mmax / (2.5 * Mmax + 3.0 * MA + 4.0 * MB + 3.0 * MC)
    return np.where(Mmax > 0, np.minimum(c, 3.0), 1.0)


def reduction_factor(lam, alpha, lam0):
    """chi of the general buckling-curve method, at most 1.

    >>> f"{float(reduction_factor(1.0, 0.34, 0.2)):.4f}"   # curve b at lam = 1
    '0.5970'
    """
    phi = 0.5 * (1.0 + alpha * (lam - lam0) + lam * lam)
    with np.errstate(invalid="ignore"):
        return np.minimum(1.0, 1.0 / (phi + np.sqrt(np.maximum(phi * phi - lam * lam, 0.0))))


def _kcrit(lam):
    """EN 1995-1-1 eq. (6.34) (from memory)."""
    with np.errstate(divide="ignore"):
        return np.where(lam <= 0.75, 1.0, np.where(lam <= 1.4, 1.56 - 0.75 * lam, 1.0 / (lam * lam)))


_CHOICES = {"lateral_restraint": ("supports", "continuous"), "load_height": ("top", "centroid", "bottom"),
            "lateral_torsional_method": ("curve", "ratio")}


def _active(limits):
    for key, choices in _CHOICES.items():
        value = limits.get(key)
        if value is not None and value not in choices:
            raise SelectionError(f"limits.{key}: expected {' or '.join(repr(c) for c in choices)}, got {value!r}")
    for key in ("overhang_length_factor", "max_moment_ratio"):
        value = limits.get(key)
        if value is not None and not value > 0:
            raise SelectionError(f"limits.{key}: expected a positive number, got {value!r}")
    return limits.get("lateral_restraint") == "supports"


def _segments(model, limits):
    """(start, end, cantilever) of the segments between lateral restraints."""
    L = model.length
    at = [s.at for s in model.supports]
    extra = limits.get("lateral_restraint_at") or ()
    for x in extra:
        if not 0.0 <= x <= L:
            raise SelectionError(f"limits.lateral_restraint_at: {x:g} m is off the beam (0 to {L:g} m)")
    points = sorted(set(at) | set(extra))
    segs = [(a, b, False) for a, b in zip(points[:-1], points[1:]) if b - a > 1e-9 * L]
    if points[0] > 1e-9 * L:  # an overhang beyond the last restraint: its tip is free
        segs.insert(0, (0.0, points[0], True))
    if points[-1] < L * (1 - 1e-9):
        segs.append((points[-1], L, True))
    return segs


def _loading(model, combos, unit_cases, a, b, cantilever=False):
    """C2, C3 (arrays over the concrete combinations) of a segment from the loads of each
    combination's own cases on it (its self-weight counts as distributed); on a cantilever a
    point load at the free tip counts too."""
    tol = 1e-9 * model.length
    tip = [x for x in (a, b) if cantilever and not any(abs(s.at - x) <= tol for s in model.supports)]
    inside = lambda x: a + tol < x < b - tol or any(abs(x - t) <= tol for t in tip)  # noqa: E731
    C2, C3 = np.zeros(len(combos)), np.ones(len(combos))
    for i, c in enumerate(combos):  # a small set
        used = {unit_cases[u].split(" [")[0] for u in np.flatnonzero(np.asarray(c.factors) != 0)}
        loads = [ld for ld in model.loads if ld.case in used]
        if any(hasattr(ld, "P") and inside(ld.at) for ld in loads):
            C2[i], C3[i] = 0.630, 0.411
        elif (model.self_weight in used or "self-weight" in used
              or any(hasattr(ld, "w1") and ld.start < b and ld.end > a for ld in loads)):
            C2[i], C3[i] = 0.454, 0.525
    return C2[None, :], C3[None, :]


def _curves(props):
    """Per candidate (K,): the imperfection factor alpha and plateau lam0 of its material's
    buckling curve, and whether it is timber (kcrit instead); computed once per screen."""
    kind = np.asarray(props["kind"]).astype(str)
    h_b = props["depth"] / props["width"]
    rolled = np.isin(np.asarray(props["series"]).astype(str), _ROLLED)
    is_i = np.asarray(props["family"]).astype(str) == "ibeam"
    alpha = np.where(is_i & rolled, np.where(h_b <= 2, 0.21, 0.34),
                     np.where(is_i, np.where(h_b <= 2, 0.49, 0.76), 0.76))
    alpha = np.select([kind == "stainless", kind == "aluminium"], [0.76, 0.20], alpha)
    lam0 = np.select([kind == "stainless", kind == "aluminium"], [0.4, 0.4], 0.2)
    return alpha, lam0, np.isin(kind, ("timber", "glulam"))


def _fractile_moduli(props):
    """E and G at their 5 % fractiles for timber (K,): the material's ``E_05`` where given (G scaled
    alike, common practice), else the stand-in fraction of the mean; metals their mean values."""
    kind = np.asarray(props["kind"]).astype(str)
    stand_in = np.select([kind == k for k in _FRACTILE], list(_FRACTILE.values()), 1.0)
    E05 = np.asarray(props.get("E_05", np.full(kind.shape, np.nan)), float)
    fractile = np.where(np.isin(kind, tuple(_FRACTILE)) & np.isfinite(E05), E05 / props["E"], stand_in)
    return props["E"] * fractile, props["G"] * fractile


def _resistance_factor(Mcr, S, f, curves, limits, allow=None):
    """chi (K, C) from Mcr (K, C), the smaller elastic modulus S and strength f (K, 1) by the
    material's method (``curves`` from :func:`_curves`, each (K, 1)); ``allow`` (broadcasting to
    (K, C)) is the allowable bending stress the ``"ratio"`` method reads."""
    with np.errstate(divide="ignore", invalid="ignore"):
        if limits.get("lateral_torsional_method", "curve") == "ratio":
            r = limits.get("max_moment_ratio", 1.0)
            return np.minimum(1.0, r * Mcr / (S * allow))
        lam = np.sqrt(S * f / Mcr)
    alpha, lam0, timber = curves
    return np.where(timber, _kcrit(lam), reduction_factor(lam, alpha, lam0))


def _segment_results(eff, props):
    """Per segment between restraints: ``(a, b, cantilever, M, C1, Mcr, chi, demand)``, the
    arrays (K, Cs) over the strength combinations (``sampler.strength``) (C1 a float on a cantilever)."""
    limits, model, sampler = eff.limits, eff.model, eff.sampler
    E, G = _fractile_moduli(props)
    curves = tuple(c[:, None] for c in _curves(props))
    f = np.asarray(props["strength_bending"], float)[:, None]
    Iy, Iz, J, Cw = props["Iy"], props["Iz"], props["J"], props["Cw"]
    ys, yc, depth = props["ys"], props["yc"], props["depth"]
    y_load = {"top": depth, "centroid": yc, "bottom": np.zeros_like(depth)}[limits.get("load_height", "top")]
    zj_up = (ys - yc) - props["wagner"] / (2.0 * Iz)  # mono-symmetry, measured upwards
    S = np.minimum(props["Sz_top"], props["Sz_bot"])
    allow = None
    if limits.get("lateral_torsional_method", "curve") == "ratio":  # per concrete combination
        allow = np.asarray(allowable_stress(props, limits, eff, "bending"), float)
        allow = allow[:, sampler.parents] if allow.shape[1] > 1 else allow
    k_over = limits.get("overhang_length_factor", 2.0)
    strength = sampler.strength
    on = sampler.only(strength)  # the strength combinations alone
    combos = [sampler.resp.combos[i] for i in strength]
    for a, b, cantilever in _segments(model, limits):  # a small set
        x = np.linspace(a, b, _SAMPLES)
        M = on.at("M", x)  # (K, Cs, P): the quarter points for C1
        Mpk = on.peak("M", a, b)  # the exact extreme on the segment
        up = np.where(Mpk >= 0, 1.0, -1.0)  # sagging: the top flange is compressed
        C1 = 1.0 if cantilever else moment_factor(np.abs(Mpk), *(np.abs(M[..., j]) for j in (1, 2, 3)))
        C2, C3 = _loading(model, combos, sampler.resp.unit_cases, a, b, cantilever)
        # zg: the load's height above the shear centre, destabilising above it whichever flange is
        # compressed (gravity loads); zj follows the compressed flange
        Mcr = critical_moment(E[:, None], G[:, None], Iy[:, None], J[:, None], Cw[:, None], b - a, C1, C2, C3,
                              zg=(y_load - ys)[:, None], zj=up * zj_up[:, None],
                              k=k_over if cantilever else 1.0)
        chi = _resistance_factor(Mcr, S[:, None], f, curves, limits, allow)
        with np.errstate(divide="ignore", invalid="ignore"):
            d = np.abs(Mpk) / (chi * S[:, None])
        yield a, b, cantilever, Mpk, C1, Mcr, chi, np.where(np.isnan(d), np.inf, d)


def _untestable(props):
    """Sections with tilted principal axes (K,): not checkable by this method."""
    return ~np.isclose(np.abs(np.sin(np.radians(2 * props["theta"]))), 0.0, atol=1e-9)


def _demand(eff, props):
    K, C = eff.M_max.shape
    strength = eff.sampler.strength
    worst = np.full((K, strength.size), -np.inf)
    for *_, d in _segment_results(eff, props):
        worst = np.fmax(worst, d)
    worst = np.where(_untestable(props)[:, None], np.inf, worst)
    full = np.full((K, len(eff.sampler.resp.combos)), np.nan)  # NaN: not a strength combination
    full[:, strength] = worst
    return to_parents(full, eff.sampler.parents, C, np.fmax)


def _details(eff, props) -> dict:
    """The governing segment of one candidate: where it is, its moment, C1, Mcr and chi."""
    strength = eff.sampler.strength
    best = None
    for a, b, cantilever, M, C1, Mcr, chi, d in _segment_results(eff, props):
        if d.shape[1] == 0:
            break
        j = int(np.argmax(d[0]))
        if best is None or d[0, j] > best[0]:
            c1 = float(np.broadcast_to(C1, M.shape)[0, j])
            best = (d[0, j], a, b, cantilever, float(M[0, j]), c1, float(Mcr[0, j]), float(chi[0, j]), j)
    if best is None or not np.isfinite(best[0]) or bool(_untestable(props)[0]):
        return {"checked": False}
    _, a, b, cantilever, M, c1, mcr, chi, j = best
    parent = int(eff.sampler.parents[strength[j]])
    return {"checked": True, "segment_start": a, "segment_end": b, "cantilever": bool(cantilever),
            "combination": eff.combinations[parent].name, "M": M, "C1": c1, "Mcr": mcr, "chi": chi,
            "method": eff.limits.get("lateral_torsional_method", "curve")}


def _formula(eff, props, c):
    """σ = |M| / (χ Sz) of the governing segment, with its Mcr and C1 (from :func:`_details`)."""
    d = _details(eff, props)
    if not d["checked"]:
        return ("not checkable: the principal axes are tilted",)
    S = float(min(props["Sz_top"][0], props["Sz_bot"][0]))
    M, chi = abs(d["M"]), d["chi"]
    return ("σ = |M| / (χ Sz) = ", (M, "moment"), " / (", chi, " × ", (S, "section modulus"), ") = ",
            (M / (chi * S), "pressure"), "; segment x = ", (d["segment_start"], "span"), " to ",
            (d["segment_end"], "span"), ", Mcr = ", (d["Mcr"], "moment"), ", C1 = ", d["C1"])


def _allowable(props, limits, eff):
    return allowable_stress(props, limits, eff, "bending")


# No peaks_suffice: Mcr (through C1) depends on the shape of each segment's moment diagram under
# each combination, not only on the peak moment, so the worst effects over the combinations do not
# decide it; a long list with restraints given is screened in chunks (screen.screen_chunks).
LATERAL_TORSIONAL = register(Check(
    name="lateral_torsional", label="buckling",
    columns=("E", "E_05", "G", "Iy", "Iz", "J", "Cw", "ys", "yc", "wagner", "depth", "width", "theta", "Sz_top",
             "Sz_bot", "strength_bending", "kind", "series", "family"),
    demand=_demand, allowable=_allowable, kind="pressure", demand_key="sigma_lt",
    sentence="Lateral-torsional buckling: the largest moment of each segment between lateral "
             "restraints as a stress, M / (χ Sz), against the bending stress limit; χ from the "
             "elastic critical moment Mcr of the segment (three-factor form, C1 from its moment "
             "diagram) by the material's buckling curve (steel EN 1993-1-1 6.3.2.2, timber "
             "kcrit of EN 1995-1-1 6.3.3).",
    covers=("lateral_torsional_buckling",),
    limit_keys={"lateral_restraint": "text", "lateral_restraint_at": "lengths", "load_height": "text",
                "overhang_length_factor": "number", "lateral_torsional_method": "text",
                "max_moment_ratio": "number"},
    active=_active, details=_details, formula=_formula))
