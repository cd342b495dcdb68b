"""Section properties for a batch of sections: elastic, principal, plastic and shear.

All functions take an :class:`~leanspan.sections.geometry.Edges` batch of N sections
and return a dict of arrays of shape (N,), SI units (m, m², m³, m⁴; theta in degrees).

Keys (GUIDE section 4): ``A yc zc Iz Iy Iyz I1 I2 theta Sz_top Sz_bot Sy_left
Sy_right Zz Zy rz ry depth width`` and ``shear_factor`` (peak vertical shear stress
is V × shear_factor, from max over y of Q(y) / (Iz b(y))).

Examples
--------
>>> import numpy as np
>>> from leanspan.sections.families import FAMILIES
>>> p = family_properties("rectangle", {"b": np.array([0.1]), "d": np.array([0.3])})
>>> round(float(p["Iz"][0] / (0.1 * 0.3**3 / 12)), 12)  # b d^3 / 12
1.0
>>> round(float(p["Zz"][0] / (0.1 * 0.3**2 / 4)), 12), round(float(p["shear_factor"][0] * 0.03), 12)
(1.0, 1.5)
"""

from __future__ import annotations

import numpy as np

from .geometry import Edges, bounds, moments, swap_axes

__all__ = ["properties", "family_properties", "KEYS", "elastic_properties"]

KEYS = ("A yc zc Iz Iy Iyz I1 I2 theta Sz_top Sz_bot Sy_left Sy_right Zz Zy rz ry "
        "depth width shear_factor").split()

_CHUNK = 4096  # sections per chunk: keeps the (sections x levels x edges) work in cache
_GOLDEN_STEPS = 14


def elastic_properties(e: Edges) -> dict[str, np.ndarray]:
    """Area, centroid, centroidal and principal second moments, elastic moduli, radii."""
    zmin, zmax, ymin, ymax = bounds(e)
    oz, oy = (zmin + zmax) / 2.0, (ymin + ymax) / 2.0  # a nearby origin keeps round-off small
    m = moments(e, (oz, oy))
    A = m["A"]
    dz, dy = m["Sz"] / A, m["Sy"] / A
    # round-off clean-up: offsets and products far below the section's size are zero
    size = (zmax - zmin) + (ymax - ymin)
    dz = np.where(np.abs(dz) < 1e-12 * size, 0.0, dz)
    dy = np.where(np.abs(dy) < 1e-12 * size, 0.0, dy)
    Iz = m["Syy"] - A * dy * dy
    Iy = m["Szz"] - A * dz * dz
    Iyz = m["Syz"] - A * dy * dz
    Iyz = np.where(np.abs(Iyz) < 1e-12 * (Iz + Iy), 0.0, Iyz)
    mean = (Iz + Iy) / 2.0
    radius = np.hypot((Iz - Iy) / 2.0, Iyz)
    yc, zc = oy + dy, oz + dz
    return {
        "A": A, "yc": yc, "zc": zc, "Iz": Iz, "Iy": Iy, "Iyz": Iyz,
        "I1": mean + radius, "I2": mean - radius,
        # angle from the z-axis to the I1 axis, counter-clockwise
        "theta": np.degrees(0.5 * np.arctan2(-2.0 * Iyz, Iz - Iy)) + 0.0,
        "Sz_top": Iz / (ymax - yc), "Sz_bot": Iz / (yc - ymin),
        "Sy_left": Iy / (zc - zmin), "Sy_right": Iy / (zmax - zc),
        "rz": np.sqrt(Iz / A), "ry": np.sqrt(Iy / A),
        "depth": ymax - ymin, "width": zmax - zmin,
        "_ymin": ymin, "_ymax": ymax, "_zmin": zmin, "_zmax": zmax,
    }


class _WidthProfile:
    """Exact width b(u), area and first moment above level u, as piecewise polynomials.

    Each non-horizontal edge adds a linear term ±z(u) to the width over its own
    range of u (u = y - yc, measured from the centroid). Sorting the edge ends per
    section and taking cumulative sums gives b = alpha + beta u on every band
    between consecutive levels; integrating band by band from the top gives the
    area and first moment above each band start. Plastic axes and the shear factor
    then follow without iteration over the edges.
    """

    def __init__(self, e: Edges, yc):
        z0, y0, z1, y1 = e
        u0, u1 = y0 - yc[:, None], y1 - yc[:, None]
        du = u1 - u0
        # Edges flatter than this are horizontal: round-off in the vertex coordinates
        # would otherwise give them huge slopes that spoil the cumulative sums.
        sloped = np.abs(du) > 1e-9 * (u0.max(axis=1) - u0.min(axis=1))[:, None]
        with np.errstate(divide="ignore", invalid="ignore"):
            slope = np.where(sloped, (z1 - z0) / np.where(sloped, du, 1.0), 0.0)
        # edge k adds sign(du) * (a + b u) to the width between its ends; at each
        # vertex the width coefficients change by (a, b) of the edge leaving it
        # minus (a, b) of the edge arriving at it (zero for horizontal edges)
        a = np.where(sloped, z0 - slope * u0, 0.0)
        d_alpha = a - a[:, e.prev]
        d_beta = slope - slope[:, e.prev]
        order = np.argsort(u0, axis=1)
        self.u = np.take_along_axis(u0, order, axis=1)
        self.alpha = np.cumsum(np.take_along_axis(d_alpha, order, axis=1), axis=1)[:, :-1]
        self.beta = np.cumsum(np.take_along_axis(d_beta, order, axis=1), axis=1)[:, :-1]
        lo, hi = self.u[:, :-1], self.u[:, 1:]
        band_area = self.alpha * (hi - lo) + self.beta * (hi * hi - lo * lo) / 2.0
        band_first = self.alpha * (hi * hi - lo * lo) / 2.0 + self.beta * (hi * hi * hi - lo * lo * lo) / 3.0
        # area / first moment above the top of each band (reverse cumulative sums)
        rev = lambda a: np.concatenate([np.cumsum(a[:, ::-1], axis=1)[:, ::-1][:, 1:],  # noqa: E731
                                        np.zeros((a.shape[0], 1))], axis=1)
        self.area_top = rev(band_area)
        self.first_top = rev(band_first)
        self.area_start = self.area_top + band_area

    def _in_band(self, band, c):
        """Width, area and first moment above level c, for c inside band ``band`` (one per row)."""
        take = lambda a: np.take_along_axis(a, band[:, None], axis=1)[:, 0]  # noqa: E731
        a, b, top = take(self.alpha), take(self.beta), np.take_along_axis(self.u, band[:, None] + 1, axis=1)[:, 0]
        width = a + b * c
        area = take(self.area_top) + a * (top - c) + b * (top * top - c * c) / 2.0
        first = take(self.first_top) + a * (top * top - c * c) / 2.0 + b * (top * top * top - c * c * c) / 3.0
        return width, area, first

    def plastic(self, A):
        """Plastic modulus ∫|u - c| dA about the equal-area level c; returns (Z, c)."""
        half = A / 2.0
        band = np.clip((self.area_start >= half[:, None]).sum(axis=1) - 1, 0, self.alpha.shape[1] - 1)
        take = lambda a: np.take_along_axis(a, band[:, None], axis=1)[:, 0]  # noqa: E731
        a, b = take(self.alpha), take(self.beta)
        top = np.take_along_axis(self.u, band[:, None] + 1, axis=1)[:, 0]
        rest = half - take(self.area_top)  # area still needed below the band top
        width_top = a + b * top
        # area between c = top - t and top is width_top t - b t^2 / 2 = rest
        disc = np.sqrt(np.maximum(width_top * width_top - 2.0 * b * rest, 0.0))
        with np.errstate(divide="ignore", invalid="ignore"):
            t = np.where(rest > 0, 2.0 * rest / (width_top + disc), 0.0)
        c = top - np.nan_to_num(t)
        _, area_up, first_up = self._in_band(band, c)
        # first moment of the whole section about the centroid is zero
        Z = (first_up - c * area_up) - ((0.0 - first_up) - c * (A - area_up))
        return Z, c

    def shear_peak(self, depth):
        """max over u of Q(u) / b(u): band ends and the centroid, then golden sections."""
        lo, hi = self.u[:, :-1], self.u[:, 1:]
        live = (hi - lo) > 1e-12 * depth[:, None]
        tiny = 1e-9 * depth[:, None]

        def ratio_at(c, a, b, area_top, first_top, top):
            width = a + b * c
            first = first_top + a * (top * top - c * c) / 2.0 + b * (top * top * top - c * c * c) / 3.0
            q = first  # about the centroid (u = 0): Q = ∫_above u dA
            with np.errstate(divide="ignore", invalid="ignore"):
                return np.where(width > tiny if np.ndim(width) == 2 else width > tiny[:, 0], q / width, 0.0)

        args = (self.alpha, self.beta, self.area_top, self.first_top, hi)
        # in each band Q is largest at the point nearest the centroid
        g = np.where(live, ratio_at(np.clip(0.0, lo, hi), *args), -np.inf)
        best = np.argmax(g, axis=1)
        peak = g[np.arange(g.shape[0]), best]
        inv_phi = (np.sqrt(5.0) - 1.0) / 2.0
        nb = g.shape[1]
        for shift in (-1, 0, 1):
            band = np.clip(best + shift, 0, nb - 1)
            take = lambda arr: np.take_along_axis(arr, band[:, None], axis=1)[:, 0]  # noqa: E731
            a_, b_, at_, ft_, top_ = (take(x) for x in args)
            x_lo, x_hi = take(lo), top_
            ok = take(live)
            f = lambda c: ratio_at(c, a_, b_, at_, ft_, top_)  # noqa: E731
            x1, x2 = x_hi - inv_phi * (x_hi - x_lo), x_lo + inv_phi * (x_hi - x_lo)
            f1, f2 = f(x1), f(x2)
            for _ in range(_GOLDEN_STEPS):
                left = f1 >= f2
                x_lo, x_hi = np.where(left, x_lo, x1), np.where(left, x2, x_hi)
                x1n = np.where(left, x_hi - inv_phi * (x_hi - x_lo), x2)
                x2n = np.where(left, x1, x_lo + inv_phi * (x_hi - x_lo))
                fn = f(np.where(left, x1n, x2n))
                f1, f2 = np.where(left, fn, f2), np.where(left, f1, fn)
                x1, x2 = x1n, x2n
            peak = np.where(ok, np.maximum(peak, np.maximum(f1, f2)), peak)
        return peak


def _properties_chunk(e: Edges) -> dict[str, np.ndarray]:
    p = elastic_properties(e)
    A = p["A"]
    # plastic modulus about the horizontal axis (bending in the vertical plane)
    vertical = _WidthProfile(e, p["yc"])
    Zz, c = vertical.plastic(A)
    p["Zz"], p["_pna_y"] = Zz, p["yc"] + c
    p["shear_factor"] = vertical.shear_peak(p["depth"]) / p["Iz"]
    # about the vertical axis: the same code with z and y exchanged
    Zy, c = _WidthProfile(swap_axes(e), p["zc"]).plastic(A)
    p["Zy"], p["_pna_z"] = Zy, p["zc"] + c
    return p


def properties(e: Edges, private: bool = False, offset: int = 0) -> dict[str, np.ndarray]:
    """All section properties (:data:`KEYS`) for every section in the batch ``e``.

    Parameters
    ----------
    e : Edges
        Oriented edges of N sections (outlines counter-clockwise, holes clockwise).
    private : bool
        Also return helper arrays (bounds ``_ymin`` …, plastic axes ``_pna_y``, ``_pna_z``).
    offset : int
        Index of the first section, for error messages.

    Raises
    ------
    GeometryError
        If a section has zero or negative area (wrong orientation or degenerate).
    """
    from ..errors import GeometryError

    n = e.n
    chunks = []
    for start in range(0, n, _CHUNK):
        sub = e.rows(slice(start, start + _CHUNK))
        chunks.append(_properties_chunk(sub))
    out = {k: np.concatenate([c[k] for c in chunks]) for k in chunks[0]}
    bad = np.flatnonzero(~(out["A"] > 0))
    if bad.size:
        raise GeometryError(f"section {int(bad[0]) + offset}: area is {out['A'][bad[0]]:.3g} m^2; "
                            "expected a positive area (outline counter-clockwise, holes inside)")
    if not private:
        out = {k: v for k, v in out.items() if not k.startswith("_")}
    return out


def family_properties(family: str, dims: dict, private: bool = False) -> dict[str, np.ndarray]:
    """Properties of N sections of one parametric family, from arrays of dimensions (m).

    Parameters
    ----------
    family : str
        A name in :data:`leanspan.sections.families.FAMILIES` (``"i_section"`` …).
    dims : dict of str to array_like
        Dimension arrays of equal length N (or scalars), SI metres.
    """
    from .families import FAMILIES, get_family

    fam = get_family(family)
    dims = fam.complete(dims)
    fam.validate(dims)
    n = len(next(iter(dims.values())))
    # build the polygons chunk by chunk too: small arrays stay in cache
    chunks = [properties(edges_from_family(fam, {k: v[s:s + _CHUNK] for k, v in dims.items()}), private, s)
              for s in range(0, n, _CHUNK)]
    return {k: np.concatenate([c[k] for c in chunks]) for k in chunks[0]}


def edges_from_family(fam, dims) -> Edges:
    """Oriented edges of a family's sections (helper for :func:`family_properties`)."""
    from .geometry import edges_from_rings

    return edges_from_rings(fam.rings(dims))
