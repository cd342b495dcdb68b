"""Cross-section class, effective section and web shear buckling of metal sections, vectorised.

Every steel, stainless and aluminium candidate is split into up to four plate elements from its
family's dimensions (the catalogue's ``dims`` columns), bending about the horizontal axis:

- ``ibeam``: top and bottom flanges, each 2 outstands c = (b_top - tw - 2r)/2, t = tf_top (bottom
  alike); the web, internal, c = d - tf_top - tf_bot - 2r, t = tw;
- ``channel``: each flange 1 outstand c = b - tw - r, t = tf; the web, internal, c = d - 2tf - 2r;
- ``tee``: the flange, 2 outstands c = (b - tw - 2r)/2; the stem, an outstand with its root at the
  flange, c = d - tf - r, t = tw;
- ``angle``: the horizontal leg, an outstand c = b - t - r; the vertical leg, an outstand with its
  root at the bottom, c = d - t - r;
- ``box``: top and bottom flanges, internal, c = b - 3t; 2 webs, internal, c = d - 3t;
- ``tube``: the wall, d / t.

Welded I sections have no weld throat in the dimensions, so c runs to the web face (r = 0):
conservative. ``c = b - 3t`` for hollow sections is the simplification EN 1993-1-1 Table 5.2
allows (from memory). Solid metal bars have no plate elements (class 1); timber is not classified (0).

**Stress distribution.** Elastic bending about the horizontal axis, sagging (top in compression)
and hogging separately: a flange is in uniform compression (psi = 1) or in tension; a web or leg
has the stress ratio psi = sigma2 / sigma1 of its edges (sigma1 the larger compression) about the
elastic neutral axis. The plastic compression fraction alpha of the class 1 and 2 limits is taken
from the elastic distribution (alpha = 1 / (1 - psi) for psi < 0): an approximation that only
changes the reported class 1 or 2, since every resistance here is elastic.

**Class limits** (c/t against multiples of eps; all from memory):

- steel, EN 1993-1-1 Table 5.2, eps = sqrt(235 / fy): internal parts class 1 396 eps / (13 alpha - 1)
  (alpha > 0.5) else 36 eps / alpha (72 eps in bending, 33 eps in compression), class 2
  456 eps / (13 alpha - 1) else 41.5 eps / alpha (83, 38), class 3 42 eps / (0.67 + 0.33 psi)
  (psi > -1) else 62 eps (1 - psi) sqrt(-psi) (124, 42); outstand flanges 9 eps / alpha, 10 eps / alpha
  (tip in compression; with the tip in tension 9 eps / (alpha sqrt alpha), 10 eps / (alpha sqrt alpha)),
  class 3 21 eps sqrt(k_sigma) (14 eps in uniform compression); tubes d/t 50, 70, 90 eps^2;
- stainless, EN 1993-1-4 Table 5.2 (with A1:2015), eps = sqrt(235 / fy x E / 210000): internal 72, 76,
  90 eps in bending and 33, 35, 37 eps in compression (joined by the alpha forms of steel: 396 and 418
  / (13 alpha - 1), 36 and 38 / alpha; class 3 18.5 eps sqrt(k_sigma), our own fit of the two end
  values), outstands 9, 10, 14 eps (gradient forms as steel), tubes 50, 70, 90 eps^2;
- aluminium, EN 1999-1-1 6.1.4, eps = sqrt(250 / f0), buckling class A (heat-treated T6 alloys),
  no welds: beta = c/t for outstands and uniform compression, beta = eta c/t with eta =
  0.70 + 0.30 psi (psi >= -1) or 0.80 / (1 - psi) for internal parts under a stress gradient,
  beta = 3 sqrt(d/t) for tubes; limits beta1, beta2, beta3 = 11, 16, 22 eps (internal, tubes) and
  3, 4.5, 6 eps (outstands).

k_sigma: EN 1993-1-5 Table 4.1 (internal: 4.0 at psi = 1, 8.2 / (1.05 + psi), 7.81 - 6.29 psi +
9.78 psi^2, 5.98 (1 - psi)^2) and Table 4.2 (outstands: tip most compressed 0.57 - 0.21 psi +
0.07 psi^2; root most compressed 0.578 / (psi + 0.34), 1.7 - 5 psi + 17.1 psi^2) (from memory).

**Effective section** of a class 4 candidate (``slender_sections = "effective"``): each compressed
class 4 element keeps its effective width (EN 1993-1-5 4.4: rho = (lam_p - 0.055 (3 + psi)) /
lam_p^2 internal, (lam_p - 0.188) / lam_p^2 outstand, lam_p = (c/t) / (28.4 eps sqrt(k_sigma));
stainless EN 1993-1-4 5.2.3: 0.772 / lam_p - 0.079 / lam_p^2 internal, 1 / lam_p - 0.242 / lam_p^2
outstand, the welded value for both; aluminium EN 1999-1-1 6.1.5: the thickness rho_c t over the
compressed part, rho_c = 32 / (beta/eps) - 220 / (beta/eps)^2 internal, 10 / (beta/eps) - 24 /
(beta/eps)^2 outstand; from memory). The ineffective strip is placed as EN 1993-1-5 Tables 4.1
and 4.2 place it: the middle of a uniformly compressed internal part, between be1 = 0.4 beff (or
2 beff / (5 - psi)) from the compressed edge and be2 next to the neutral axis in a web, at the tip
of an outstand whose tip is compressed, next to the neutral axis where its root is. Flanges are
reduced first with the gross stress ratio, then the webs with the stress ratio of the section
with effective flanges (EN 1993-1-5 4.4(3), one pass, no iteration). The ineffective strips are
holes in the gross section (exact A, yc, Iz of the catalogue with fillets); S_eff = I_eff / the
larger distance of the gross section's extreme fibres from the effective neutral axis
(conservative where a strip at a tip is cut). Tubes (CHS) of class 4 have
no effective-width rule here (EN 1993-1-6 territory): they fail.

**Web shear buckling** (steel only): webs with hw / t > 72 eps / eta (EN 1993-1-5 5.1(2), eta = 1.2 up
to S460, 1.0 above; hw the clear depth between flanges) get chi_w of Table 5.1 for a non-rigid end
post, chi_w = 0.83 / lam_w beyond lam_w = 0.83 / eta, lam_w = hw / (86.4 t eps) (5.3(3), transverse
stiffeners at the supports only), applied as min(1, chi_w) to the allowable shear stress (the
demand is the peak shear stress, so the eta bonus is not taken).

Examples
--------
>>> import numpy as np
>>> p = {"family": np.array(["ibeam"]), "kind": np.array(["steel"]), "strength_bending": np.array([355e6]),
...      "E": np.array([210e9]), "d": np.array([0.3]), "b": np.array([0.15]), "tw": np.array([0.0071]),
...      "tf": np.array([0.0107]), "r": np.array([0.015]), "b_top": np.array([0.15]),
...      "b_bot": np.array([0.15]), "tf_top": np.array([0.0107]), "tf_bot": np.array([0.0107]),
...      "yc": np.array([0.15])}
>>> c = classify(p)    # sagging: flange c/t = (150 - 7.1 - 30)/2/10.7 = 5.28 < 9 eps = 7.32, web
>>> int(c.section_class[0]), c.element_name(0), round(float(c.ratio[0]), 2)   # 248.6/7.1 = 35.0 < 72 eps
(1, 'top flange', 5.28)
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

__all__ = ["SLOTS", "METALS", "Elements", "Classes", "elements", "classify", "class_limits", "effective_moduli", "epsilon",
           "k_sigma", "rho", "web_shear"]

METALS = ("steel", "stainless", "aluminium")
SLOTS = ("top flange", "bottom flange", "web", "wall")
_NAMES = {"tee": {2: "stem"}, "angle": {1: "horizontal leg", 2: "vertical leg"}}
NONE, INTERNAL, OUTSTAND, TUBE = 0, 1, 2, 3


def _col(props, key, n):
    return np.asarray(props[key], float) if key in props else np.full(n, np.nan)


def epsilon(props) -> np.ndarray:
    """eps of each candidate's class limits (K,): sqrt(235 / fy) steel, sqrt(235 / fy x E / 210000)
    stainless, sqrt(250 / f0) aluminium (fy, f0 in MPa: the candidate's stepped strength); NaN else."""
    kind = np.asarray(props["kind"]).astype(str)
    f = np.asarray(props["strength_bending"], float) / 1e6
    E = _col(props, "E", kind.size) / 210e9
    with np.errstate(divide="ignore", invalid="ignore"):
        return np.select([kind == "steel", kind == "stainless", kind == "aluminium"],
                         [np.sqrt(235 / f), np.sqrt(235 / f * E), np.sqrt(250 / f)], np.nan)


@dataclass(frozen=True)
class Elements:
    """Plate elements (K, 4): type (NONE, INTERNAL, OUTSTAND, TUBE), flat width c, thickness t,
    count, horizontal or not, and the levels: ``ya`` (a horizontal element's mid-plane; a vertical
    one's lower edge, an outstand's root) and ``yb`` (the upper edge; an outstand's tip)."""

    type: np.ndarray
    c: np.ndarray
    t: np.ndarray
    count: np.ndarray
    horizontal: np.ndarray
    ya: np.ndarray
    yb: np.ndarray
    family: np.ndarray


def elements(props) -> Elements:
    """The plate elements of every candidate from its family and dimensions (see the module notes)."""
    fam = np.asarray(props["family"]).astype(str)
    kind = np.asarray(props["kind"]).astype(str) if "kind" in props else np.full(fam.size, "")
    K = fam.size
    g = {k: _col(props, k, K) for k in ("d", "b", "tw", "tf", "t", "r", "b_top", "b_bot", "tf_top", "tf_bot")}
    d, b, tw, tf, t = g["d"], g["b"], g["tw"], g["tf"], g["t"]
    r = np.nan_to_num(g["r"])
    bt, bb = np.where(np.isnan(g["b_top"]), b, g["b_top"]), np.where(np.isnan(g["b_bot"]), b, g["b_bot"])
    tft, tfb = np.where(np.isnan(g["tf_top"]), tf, g["tf_top"]), np.where(np.isnan(g["tf_bot"]), tf, g["tf_bot"])
    metal = np.isin(kind, METALS)
    isf = {f: (fam == f) & metal for f in ("ibeam", "channel", "tee", "angle", "box", "tube")}
    shape = (K, 4)
    typ, c, th, cnt = np.zeros(shape, int), np.full(shape, np.nan), np.full(shape, np.nan), np.ones(shape)
    hor, ya, yb = np.zeros(shape, bool), np.full(shape, np.nan), np.full(shape, np.nan)

    def put(slot, mask, kind_, width, thick, count, horizontal, a, b_=np.nan):
        typ[mask, slot] = kind_
        for arr, v in ((c, width), (th, thick), (cnt, count), (hor, horizontal), (ya, a), (yb, b_)):
            arr[mask, slot] = np.broadcast_to(v, (K,))[mask]

    with np.errstate(invalid="ignore"):
        put(0, isf["ibeam"], OUTSTAND, (bt - tw - 2 * r) / 2, tft, 2, True, d - tft / 2)
        put(1, isf["ibeam"], OUTSTAND, (bb - tw - 2 * r) / 2, tfb, 2, True, tfb / 2)
        put(2, isf["ibeam"], INTERNAL, d - tft - tfb - 2 * r, tw, 1, False, tfb + r, d - tft - r)
        put(0, isf["channel"], OUTSTAND, b - tw - r, tf, 1, True, d - tf / 2)
        put(1, isf["channel"], OUTSTAND, b - tw - r, tf, 1, True, tf / 2)
        put(2, isf["channel"], INTERNAL, d - 2 * tf - 2 * r, tw, 1, False, tf + r, d - tf - r)
        put(0, isf["tee"], OUTSTAND, (b - tw - 2 * r) / 2, tf, 2, True, d - tf / 2)
        put(2, isf["tee"], OUTSTAND, d - tf - r, tw, 1, False, d - tf - r, 0.0)
        put(1, isf["angle"], OUTSTAND, b - t - r, t, 1, True, t / 2)
        put(2, isf["angle"], OUTSTAND, d - t - r, t, 1, False, t + r, d)
        put(0, isf["box"], INTERNAL, b - 3 * t, t, 1, True, d - t / 2)
        put(1, isf["box"], INTERNAL, b - 3 * t, t, 1, True, t / 2)
        put(2, isf["box"], INTERNAL, d - 3 * t, t, 2, False, 1.5 * t, d - 1.5 * t)
        put(3, isf["tube"], TUBE, d, t, 1, False, 0.0, d)
    return Elements(typ, c, th, cnt, hor, ya, yb, fam)


def k_sigma(psi, internal, tip):
    """Buckling factor k_sigma of EN 1993-1-5 Tables 4.1 (internal) and 4.2 (outstands; ``tip``:
    the free edge is the more compressed) for stress ratio psi (from memory).

    >>> [round(float(k_sigma(p, True, False)), 2) for p in (1.0, 0.0, -1.0)]
    [4.0, 7.81, 23.92]
    >>> [round(float(k_sigma(p, False, t)), 3) for p, t in ((1.0, True), (0.0, True), (0.0, False))]
    [0.43, 0.57, 1.7]
    """
    psi = np.asarray(psi, float)
    with np.errstate(divide="ignore", invalid="ignore"):
        ki = np.where(psi >= 1, 4.0, np.where(psi > 0, 8.2 / (1.05 + psi),
                      np.where(psi > -1, 7.81 - 6.29 * psi + 9.78 * psi ** 2, 5.98 * (1 - np.maximum(psi, -3)) ** 2)))
        p3 = np.maximum(psi, -3.0)
        k_tip = 0.57 - 0.21 * p3 + 0.07 * p3 ** 2
        p1 = np.maximum(psi, -1.0)
        k_root = np.where(p1 >= 0, 0.578 / (p1 + 0.34), 1.7 - 5 * p1 + 17.1 * p1 ** 2)
    return np.where(internal, ki, np.where(tip, k_tip, k_root))


def rho(lam_p, psi, internal, kind):
    """Effective width factor (steel EN 1993-1-5 4.4(2), stainless EN 1993-1-4 5.2.3), at most 1.

    >>> round(float(rho(1.0, 1.0, True, "steel")), 4), round(float(rho(1.0, 1.0, False, "steel")), 4)
    (0.78, 0.812)
    """
    lam = np.asarray(lam_p, float)
    psi = np.maximum(np.asarray(psi, float), -3.0)
    with np.errstate(divide="ignore", invalid="ignore"):
        steel = np.where(internal, np.where(lam <= 0.5 + np.sqrt(0.085 - 0.055 * psi), 1.0,
                                            (lam - 0.055 * (3 + psi)) / lam ** 2),
                         np.where(lam <= 0.748, 1.0, (lam - 0.188) / lam ** 2))
        stainless = np.where(internal, 0.772 / lam - 0.079 / lam ** 2, 1.0 / lam - 0.242 / lam ** 2)
    return np.minimum(1.0, np.where(np.asarray(kind) == "stainless", stainless, steel))


def _stress(el: Elements, y_n, sign):
    """Per element (K, 4): compressed?, psi, the outstand's tip the more compressed?, and the level
    of the more compressed edge (vertical elements), for neutral axis y_n (K,) and moment sign."""
    y_n = y_n[:, None]
    sa, sb = sign * (el.ya - y_n), sign * (el.yb - y_n)
    s1 = np.where(el.horizontal, sa, np.fmax(sa, sb))
    with np.errstate(divide="ignore", invalid="ignore"):
        psi = np.where(el.horizontal, 1.0, np.round(np.fmin(sa, sb) / s1, 9))  # -1 stays -1 (symmetric)
    tip = el.horizontal | (sb >= sa)  # outstands: yb is the tip; a flange is uniform (k_sigma 0.43)
    comp = (s1 > 0) & (el.type != NONE)
    comp = np.where(el.type == TUBE, el.type == TUBE, comp)
    return comp, np.where(comp, psi, 1.0), tip, np.where(sa >= sb, el.ya, el.yb)


def class_limits(el: Elements, kind, eps, psi, tip):
    """(ratio, class 1, 2, 3 limits, k_sigma) per element (K, 4) for its stress ratio psi."""
    k = kind[:, None]
    e = eps[:, None]
    internal = el.type == INTERNAL
    alu = k == "aluminium"
    stainless = k == "stainless"
    with np.errstate(divide="ignore", invalid="ignore"):
        ct = el.c / el.t
        alpha = np.where(psi >= 0, 1.0, 1.0 / (1.0 - psi))
        ks = k_sigma(psi, internal, tip)
        # steel and stainless internal parts
        a1, a2 = 396.0, np.where(stainless, 418.0, 456.0)
        b1, b2 = 36.0, np.where(stainless, 38.0, 41.5)
        i1 = np.where(alpha > 0.5, a1 / (13 * alpha - 1), b1 / alpha)
        i2 = np.where(alpha > 0.5, a2 / (13 * alpha - 1), b2 / alpha)
        i3 = np.where(stainless, 18.5 * np.sqrt(ks),
                      np.where(psi > -1, 42.0 / (0.67 + 0.33 * psi), 62.0 * (1 - psi) * np.sqrt(-psi)))
        # outstands
        tip_t = np.where(tip, 1.0, np.sqrt(alpha))
        o1, o2 = 9.0 / (alpha * tip_t), 10.0 / (alpha * tip_t)
        o3 = np.where(psi >= 1.0, 14.0, 21.0 * np.sqrt(ks))
        l1, l2, l3 = (np.where(internal, i, o) * e for i, o in ((i1, o1), (i2, o2), (i3, o3)))
        tube = el.type == TUBE
        l1, l2, l3 = (np.where(tube, m * e * e, lim) for m, lim in ((50.0, l1), (70.0, l2), (90.0, l3)))
        ratio = ct
        # aluminium: beta against beta1..3 (buckling class A, no welds)
        eta = np.where(psi >= -1, 0.70 + 0.30 * psi, 0.80 / (1 - psi))
        beta = np.where(tube, 3.0 * np.sqrt(ct), np.where(internal, eta * ct, ct))
        al = [np.where(internal | tube, x, y) * e for x, y in ((11.0, 3.0), (16.0, 4.5), (22.0, 6.0))]
        ratio = np.where(alu, beta, ratio)
        l1, l2, l3 = (np.where(alu, a, s) for a, s in zip(al, (l1, l2, l3)))
    return ratio, l1, l2, l3, ks


@dataclass(frozen=True)
class Classes:
    """Classification of K candidates under one moment sign (gross-section stresses).

    ``section_class`` (K,) 1 to 4 (0: not a metal plate section, nothing to classify),
    ``element`` (K,) the governing slot (-1: none), its ``ratio`` (c/t, d/t or beta) and class 3
    ``limit``; ``per_element`` the classes (K, 4)."""

    section_class: np.ndarray
    element: np.ndarray
    ratio: np.ndarray
    limit: np.ndarray
    per_element: np.ndarray
    family: np.ndarray

    def element_name(self, k: int) -> str:
        j = int(self.element[k])
        if j < 0:
            return ""
        return _NAMES.get(str(self.family[k]), {}).get(j, SLOTS[j])


def classify(props, sign: float = 1.0, parts=None) -> Classes:
    """The section class of every candidate for sagging (``sign`` +1, top compressed) or hogging (-1).

    ``parts``: ``(elements(props), kind, epsilon(props))`` when already worked out (they do not
    depend on the sign)."""
    el, kind, eps = parts if parts is not None else (elements(props), np.asarray(props["kind"]).astype(str),
                                                     epsilon(props))
    comp, psi, tip, _ = _stress(el, np.asarray(props["yc"], float), sign)
    ratio, l1, l2, l3, _ = class_limits(el, kind, eps, psi, tip)
    with np.errstate(invalid="ignore"):
        cls = 1 + (ratio > l1).astype(int) + (ratio > l2) + (ratio > l3)
        cls = np.where(comp, cls, 0)
        score = np.where(comp, cls + np.minimum(ratio / l3, 10.0) / 11.0, -1.0)  # class, then ratio / limit
    j = np.argmax(score, axis=1)
    rows = np.arange(j.size)
    none = ~comp.any(axis=1)
    return Classes(np.where(none, np.where(np.isin(kind, METALS), 1, 0), cls[rows, j]),
                   np.where(none, -1, j), np.where(none, np.nan, ratio[rows, j]),
                   np.where(none, np.nan, l3[rows, j]), cls, el.family)


def _holes(el, kind, eps, y_n, sign, which):
    """Area, first moment about y = 0 and own second moment (K,) of the ineffective strips of the
    elements selected by ``which`` (K, 4), with stresses about the neutral axis y_n; and rho (K, 4)."""
    comp, psi, tip, y1 = _stress(el, y_n, sign)
    ratio, _, _, l3, ks = class_limits(el, kind, eps, psi, tip)
    internal = el.type == INTERNAL
    e = eps[:, None]
    k = kind[:, None]
    slender = comp & which & (ratio > l3) & (el.type != TUBE)
    with np.errstate(divide="ignore", invalid="ignore"):
        lam = (el.c / el.t) / (28.4 * e * np.sqrt(ks))
        q = ratio / e  # aluminium beta / eps
        rho_al = np.where(internal, 32.0 / q - 220.0 / q ** 2, 10.0 / q - 24.0 / q ** 2)
        r_ = np.where(k == "aluminium", np.minimum(1.0, rho_al), rho(lam, psi, internal, k))
        r_ = np.where(slender, np.clip(r_, 0.0, 1.0), 1.0)
        bc = np.where(el.horizontal | (psi >= 0), el.c, el.c / (1.0 - psi))
        beff = r_ * bc
        alu = k == "aluminium"
        # strip along the element, measured from an edge: (edge level, s0, s1), thickness th
        be1 = np.where(psi >= 0, 2 * beff / (5 - psi), 0.4 * beff)
        s0 = np.where(alu, 0.0, np.where(internal, be1, np.where(tip, 0.0, beff)))
        s1 = np.where(alu, bc, np.where(internal, be1 + bc - beff, np.where(tip, bc - beff, bc)))
        th = np.where(alu, (1 - r_) * el.t, el.t)
        edge = np.where(internal, y1, np.where(tip, el.yb, el.ya))  # compressed edge / tip / root
        other = np.where(internal, np.where(y1 == el.ya, el.yb, el.ya), np.where(tip, el.ya, el.yb))
        u = np.sign(other - edge)
        length = s1 - s0
        area = np.where(slender, el.count * th * length, 0.0)
        y_h = np.where(el.horizontal, el.ya, edge + u * (s0 + s1) / 2)
        own = np.where(el.horizontal, el.count * length * th ** 3 / 12, el.count * th * length ** 3 / 12)
        own = np.where(slender, own, 0.0)
    return area.sum(1), (area * np.nan_to_num(y_h)).sum(1), own.sum(1), (area * np.nan_to_num(y_h) ** 2).sum(1), r_


def effective_moduli(props, sign: float = 1.0):
    """``(S_eff, rho)`` for sagging (+1) or hogging (-1): the smaller elastic modulus (K,) of the
    effective section (gross where no element is class 4; 0 for a class 4 tube) and rho (K, 4) of
    each element (see the module notes: flanges first, then the webs, EN 1993-1-5 4.4(3))."""
    el = elements(props)
    kind = np.asarray(props["kind"]).astype(str)
    eps = epsilon(props)
    A, yc, Iz = (np.asarray(props[k], float) for k in ("A", "yc", "Iz"))
    depth = np.asarray(props["depth"], float)
    S_gross = np.minimum(np.asarray(props["Sz_top"], float), np.asarray(props["Sz_bot"], float))
    a1, m1, i1, q1, r1 = _holes(el, kind, eps, yc, sign, el.horizontal)
    with np.errstate(divide="ignore", invalid="ignore"):
        y1 = (A * yc - m1) / (A - a1)
        a2, m2, i2, q2, r2 = _holes(el, kind, eps, y1, sign, ~el.horizontal)
        a, m, own, q = a1 + a2, m1 + m2, i1 + i2, q1 + q2
        Ae = A - a
        ye = (A * yc - m) / Ae
        # I about ye: gross Iz about yc moved to ye, minus the strips (own + area x distance^2)
        Ie = Iz + A * (yc - ye) ** 2 - (own + q - 2 * ye * m + a * ye ** 2)
        S = Ie / np.maximum(depth - ye, ye)
    cls = classify(props, sign).section_class
    tube4 = ((el.type == TUBE).any(axis=1)) & (cls == 4)
    S = np.where(cls == 4, np.where(tube4, 0.0, np.minimum(S, S_gross)), S_gross)
    return S, np.where(el.horizontal, r1, r2)


_MEMO: dict = {}  # key -> (the arrays it was worked out from, result), the last few
_MEMO_SIZE = 4


def memoised(props, columns, extra, compute):
    """``compute()``, kept for read-only candidate arrays (a shared table's, see
    :func:`leanspan.select.member.share_table_arrays`: a schedule's members screen the same
    catalogue rows, which are then classified once). The key is the arrays' identity, and the
    entry holds them, so an id is never reused while it is kept; writable arrays are not kept."""
    arrays = tuple(props[c] for c in columns if c in props)
    if not all(isinstance(a, np.ndarray) and not a.flags.writeable for a in arrays):
        return compute()
    key = (tuple(map(id, arrays)), extra)
    hit = _MEMO.get(key)
    if hit is not None and all(a is b for a, b in zip(hit[0], arrays)):
        return hit[1]
    result = compute()
    while len(_MEMO) >= _MEMO_SIZE:  # drop the oldest (another thread may have dropped it already)
        try:
            _MEMO.pop(next(iter(_MEMO)), None)
        except (StopIteration, RuntimeError):
            break
    _MEMO[key] = (arrays, result)
    return result


def web_shear(props):
    """Web shear buckling of steel webs: ``(hw/t, limit 72 eps / eta, lam_w, chi_w, factor)`` (K,),
    factor = min(1, chi_w) where hw/t exceeds the limit, else 1 (NaN columns where there is no web).

    >>> import numpy as np
    >>> p = {"family": np.array(["ibeam"]), "kind": np.array(["steel"]), "strength_bending": np.array([355e6]),
    ...      "d": np.array([1.54]), "tw": np.array([0.008]), "tf": np.array([0.02]), "b": np.array([0.4])}
    >>> hw_t, limit, lam, chi, f = (round(float(x[0]), 4) for x in web_shear(p))
    >>> hw_t, limit, lam, chi, f   # hw = 1500 mm, eps = 0.8136; lam = 187.5 / (86.4 eps); chi = 0.83 / lam
    (187.5, 48.817, 2.6673, 0.3112, 0.3112)
    """
    fam = np.asarray(props["family"]).astype(str)
    kind = np.asarray(props["kind"]).astype(str)
    K = fam.size
    g = {k: _col(props, k, K) for k in ("d", "tw", "tf", "t", "tf_top", "tf_bot")}
    tft = np.where(np.isnan(g["tf_top"]), g["tf"], g["tf_top"])
    tfb = np.where(np.isnan(g["tf_bot"]), g["tf"], g["tf_bot"])
    hw = np.select([fam == "ibeam", fam == "channel", fam == "box"],
                   [g["d"] - tft - tfb, g["d"] - 2 * g["tf"], g["d"] - 2 * g["t"]], np.nan)
    tw = np.select([np.isin(fam, ("ibeam", "channel")), fam == "box"], [g["tw"], g["t"]], np.nan)
    steel = kind == "steel"
    fy = np.asarray(props["strength_bending"], float)
    with np.errstate(divide="ignore", invalid="ignore"):
        eps = np.sqrt(235e6 / fy)
        eta = np.where(fy <= 460e6 * (1 + 1e-9), 1.2, 1.0)
        ratio = np.where(steel, hw / tw, np.nan)
        limit = 72 * eps / eta
        lam = ratio / (86.4 * eps)
        chi = np.where(lam < 0.83 / eta, eta, 0.83 / lam)
    slender = ratio > limit
    factor = np.where(slender, np.minimum(1.0, chi), 1.0)
    return ratio, np.where(steel & ~np.isnan(ratio), limit, np.nan), np.where(slender, lam, np.nan), \
        np.where(slender, chi, np.nan), factor
