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

import os

import numpy as np

from ..errors import GeometryError
from .families import get_family
from .geometry import Edges, bounds, edges_from_rings, moments, third_moments
from .thin_walled import shear_centre_height, thin_walled_torsion

__all__ = ["properties", "family_properties", "family_stability", "KEYS", "STABILITY_KEYS", "elastic_properties"]

KEYS = ("A yc zc Iz Iy Iyz I1 I2 theta Sz_top Sz_bot Sy_left Sy_right Zz Zy rz ry "
        "depth width shear_factor").split()

_CHUNK = 4096  # sections per chunk: keeps the (sections x levels x edges) work in cache
_THREAD_ROWS = 50_000  # sections from which family_properties works on two threads
_CHUNK_VERTICES = 196608  # and at most this many vertices per chunk (many-sided tubes: fewer sections)


def _chunk_size(vertices: int) -> int:
    """Sections per chunk for sections of ``vertices`` vertices each."""
    return max(16, min(_CHUNK, _CHUNK_VERTICES // max(vertices, 1)))


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
    # for theta: equal Iz and Iy (a circle, a square) leave the axes free: say 0; "+ 0.0"
    # turns -0.0 into +0.0 so a wide section gets +90, keeping theta in (-90, 90]
    spread = np.where(np.abs(Iz - Iy) < 1e-12 * (Iz + Iy), 0.0, Iz - Iy)
    yc, zc = oy + dy, oz + dz
    return {
        "A": A, "yc": yc, "zc": zc, "Iz": Iz, "Iy": Iy, "Iyz": Iyz,
        "I1": mean + radius, "I2": mean - radius,
        # angle from the z-axis to the I1 axis, counter-clockwise
        "theta": np.degrees(0.5 * np.arctan2(-2.0 * Iyz + 0.0, spread)) + 0.0,
        "Sz_top": Iz / (ymax - yc), "Sz_bot": Iz / (yc - ymin),
        "Sy_left": Iy / (zc - zmin), "Sy_right": Iy / (zmax - zc),
        "rz": np.sqrt(Iz / A), "ry": np.sqrt(Iy / A),
        "depth": ymax - ymin, "width": zmax - zmin,
        "_ymin": ymin, "_ymax": ymax, "_zmin": zmin, "_zmax": zmax,
    }


def _largest_cubic_root(alpha, c):
    """Largest real root w of ``4 w^3 - 3 alpha w^2 + c = 0``, elementwise.

    With w = alpha/4 + t the cubic becomes t^3 + p t + q = 0, p = -3 alpha^2/16,
    q = (c - alpha^3/8)/4. It has one real root when |q| > |alpha|^3/32 (Cardano,
    the larger cube root taken first so nothing cancels), else three
    (trigonometric form; rare here, so computed only where needed).
    """
    q = (c - alpha * alpha * alpha / 8.0) / 4.0
    half_q, half = np.abs(q) / 2.0, np.abs(alpha) ** 3 / 64.0  # |q|/2 and sqrt(-p^3/27)
    big = np.cbrt(half_q + np.sqrt(np.maximum((half_q - half) * (half_q + half), 0.0)))
    big = np.where(q > 0.0, -big, big)
    with np.errstate(divide="ignore", invalid="ignore"):
        # Cardano's two cube roots multiply to -p/3 = alpha^2/16
        t = big + np.where(big != 0.0, alpha * alpha / 16.0 / big, 0.0)
    three = half_q < half
    if three.any():
        m = np.clip(-q[three] / (2.0 * half[three]), -1.0, 1.0)
        t[three] = np.abs(alpha[three]) / 2.0 * np.cos(np.arccos(m) / 3.0)
    return alpha / 4.0 + t


def _running_sum(a, reverse=False, op=np.add, out=None):
    """Cumulative sums along the first axis of a (V, N) array (from the last row if ``reverse``).

    The same sums, in the same order, as ``np.cumsum(a, axis=0)`` (``op=np.maximum``:
    running maxima); for many sections a loop of row operations is several times
    faster than numpy's accumulate along the slow axis. ``out``: write the sums to its
    first V rows (and return it).
    """
    if len(a) < 2 or a[0].size < 256:
        sums = op.accumulate(a[::-1], axis=0)[::-1] if reverse else op.accumulate(a, axis=0)
        if out is None:
            return sums.copy() if reverse else sums
        out[:len(a)] = sums
        return out
    if out is None:
        out = np.empty_like(a)
    rows = range(len(a) - 1, -1, -1) if reverse else range(len(a))
    previous = None
    for i in rows:
        if previous is None:
            out[i] = a[i]
        else:
            op(out[previous], a[i], out=out[i])
        previous = i
    return out


def _sorter(order, n):
    """``(sort, unsort)`` for one sort order per section, ``order`` of shape (V, N)."""
    v = order.shape[0]
    flat = (order * n + np.arange(n)).ravel()  # one flat index: faster than take_along_axis

    def sort(a):
        return a.ravel().take(flat).reshape(v, n)

    def unsort(a):
        out = np.empty(v * n)
        out[flat] = a.ravel()
        return out.reshape(v, n)
    return sort, unsort


def _snapped_levels(lev, extent):
    """Sort the vertex levels (V, N) of each section, merging levels closer than 1e-9 of the extent.

    Returns ``(order, s, start, shared)``: the sort order (one for all sections (V,), or one
    per section (V, N)), the sorted levels, a (V, N) mask of the sorted vertices
    that start a new level and whether that mask is the same in every section. Each run
    of levels with gaps up to the tolerance takes the level of its lowest member (of its
    first, if round-off leaves it a hair out of order), so an edge tilted by less than that
    becomes exactly horizontal and every band is either empty or thicker than the tolerance.

    The sections of one family mostly share one order, so the first section's order is
    tried on all; a section keeps it if it sorts its levels up to disorder far below
    the tolerance (round-off in the vertex coordinates), and only the others are
    sorted on their own.
    """
    v, n = lev.shape
    tol = 1e-9 * extent
    slack = 1e-6 * tol  # disorder allowed within a run of merged levels
    order = np.argsort(lev[:, 0], kind="stable")
    s = lev[order]
    gap = s[1:] - s[:-1]
    start = np.empty((v, n), bool)
    start[0] = True
    np.greater(gap, tol, out=start[1:])
    # a tried order fails where levels step down by more than round-off, or where a gap
    # is too close to the tolerance to say that the runs of merged levels are the same
    # (gap > tol but not > tol + 2 v slack): counted over all sections first, as nearly always none fails
    near = tol + 2 * v * slack
    if (gap < -slack).any() or np.count_nonzero(gap > near) != np.count_nonzero(start[1:]):
        fails = ((gap < -slack) | ((gap > tol) & (gap <= near))).any(axis=0)
    else:
        fails = np.zeros(n, bool)
    if fails.any():
        # the tried order leaves them nearly sorted: a merge sort of runs finishes quickly
        full = np.repeat(order[:, None], n, axis=1)
        nearly = np.ascontiguousarray((s if fails.all() else s[:, fails]).T)
        full[:, fails] = order[np.argsort(nearly, axis=1, kind="stable")].T
        order = full
        s = _sorter(order, n)[0](lev)
        gap = s[1:] - s[:-1]
        np.greater(gap, tol, out=start[1:])
    shared = bool((start == start[:, :1]).all())  # the same runs in every section
    # levels to merge: gaps up to the tolerance that are not zero (every start is a non-zero gap)
    if np.count_nonzero(gap) != np.count_nonzero(start[1:]):
        if shared:
            s = s[np.maximum.accumulate(np.where(start[:, 0], np.arange(v), 0))]
        else:
            run_start = _running_sum(np.where(start, np.arange(v)[:, None], 0), op=np.maximum)
            s = s.ravel().take(run_start * n + np.arange(n)).reshape(v, n)
    return order, s, start, shared


def _level_groups(s, start, shared):
    """The distinct levels, when every section has its repeated levels at the same sorted rows.

    Returns ``(pick, levels)``: ``pick(a)`` takes, from a sorted (V, N) array, the rows
    of the last vertex at each distinct level; ``levels`` = ``pick(s)``. Cumulative
    sums picked this way hold everything up to and including that level, so repeated
    levels leave no empty bands and the band work shrinks (a welded I has 4 levels,
    not 12). Otherwise every vertex keeps its row (repeated levels give empty bands).
    """
    if not shared or start.all():
        return (lambda a: a), s
    rows = np.flatnonzero(np.append(start[1:, 0], True))
    return (lambda a: a[rows]), s[rows]


def _zero_row(a):
    """An uninitialised array of ``a``'s rows and one more row of zeros (B + 1, N)."""
    out = np.empty((a.shape[0] + 1,) + a.shape[1:])
    out[-1] = 0.0
    return out


class _WidthProfile:
    """Exact width b(u), area and first moment above level u, as piecewise polynomials.

    Works on vertices: ``lev`` (V, N) are the vertex levels u measured from the
    centroid (V vertices, N sections: sections along the fast axis), ``wid`` (V, N)
    the vertex coordinates across, and ``succ`` / ``prev`` the vertex each edge leads
    to / comes from. Each non-horizontal edge adds a linear term ±z(u) to the width
    over its own range of u. Sorting the vertices per section and taking cumulative
    sums of the width's jumps and slope changes at the vertices gives, on every band
    between consecutive distinct levels, the width at the band's foot and its slope
    (also held as b = alpha + beta u); integrating band by band from the top gives the
    area and first moment above each band start. Plastic axes and the shear factor
    then follow without iteration over the edges.

    Levels closer than 1e-9 of the depth are merged first (:func:`_snapped_levels`),
    so round-off in the vertex coordinates leaves no sliver bands. The widths are
    summed from vertex z values, never from slope x level products, so the huge
    slopes of nearly horizontal edges just above that tolerance cancel exactly.
    """

    def __init__(self, lev, wid, succ, prev, extent, shear=True):
        order, s, start, shared = _snapped_levels(lev, extent)
        v, n = s.shape
        if order.ndim == 1:  # one order for all sections: renumber the vertices in it
            rank = np.empty_like(order)
            rank[order] = np.arange(v)
            succ, prev, lev, wid, sort = rank[succ[order]], rank[prev[order]], s, wid[order], None
        else:
            sort, unsort = _sorter(order, n)
            lev = unsort(s)
        # edge k adds sign(du) z_k(u) to the width between its ends. Sweeping up through
        # the vertices, the width jumps by z of the sloped edge leaving a vertex minus z
        # of the sloped edge arriving there (the same point: no slopes involved), and the
        # width slope changes by the leaving edge's slope minus the arriving one's.
        changes = np.empty((v, 2, n))  # both, to sum them in one pass
        dslope, jump = changes[:, 0], changes[:, 1]
        du = lev[succ]
        du -= lev  # each edge from a vertex ends at the next vertex
        if sort is None and shared:  # the same levels in every section: the same edges are horizontal
            level = np.cumsum(start[:, 0])
            sloped = (level[succ] != level)[:, None]
            du[~sloped[:, 0]] = np.inf
        else:
            sloped = du != 0.0
            du = np.where(sloped, du, np.inf)
        slope = wid[succ]
        slope -= wid
        slope /= du  # 0 for horizontal edges
        # +1 where a sloped edge leaves a vertex, -1 where one arrives
        np.multiply(wid, np.subtract(sloped, sloped[prev], dtype=float), out=jump)
        np.subtract(slope, slope[prev], out=dslope)
        if sort is not None:
            changes[:, 0], changes[:, 1] = sort(dslope), sort(jump)
        pick, self.u = _level_groups(s, start, shared)
        sums = pick(_running_sum(changes))[:-1]
        self.beta, jumps = np.ascontiguousarray(sums[:, 0]), sums[:, 1]
        lo, hi = self.u[:-1], self.u[1:]
        h = hi - lo
        self.rise = rise = self.beta * h  # width gained across each band
        w = np.empty_like(h)
        w[0] = 0.0
        w[1:] = _running_sum(rise[:-1])
        w += jumps
        if not h.all():
            w[h == 0.0] = 0.0  # between repeated levels: the partial sums there are no width
        self.width_lo = w
        # area / first moment of each band, and above the start of each band: rows 0 .. B-1
        # (row B: zero, so that rows 1 .. B are the sums above the top of each band)
        band_area, band_first, t = np.empty_like(h), np.empty_like(h), np.empty_like(h)
        np.multiply(rise, 0.5, out=t)  # band area h (w + rise/2)
        t += w
        np.multiply(h, t, out=band_area)
        np.multiply(rise, 1.0 / 3.0, out=t)  # first moment lo area + h^2 (w/2 + rise/3)
        np.multiply(w, 0.5, out=band_first)
        t += band_first
        t *= h
        t *= h
        np.multiply(lo, band_area, out=band_first)
        band_first += t
        self.area_start = _running_sum(band_area, reverse=True, out=_zero_row(h))
        if shear:  # every band's first moments
            self.first_start = _running_sum(band_first, reverse=True, out=_zero_row(h))
        else:  # the plastic axis needs them in one band only (see _first_top)
            self.first_start, self.band_first = None, band_first

    def _first_top(self, band):
        """First moment above the top of band ``band[i]`` of section i."""
        if self.first_start is not None:
            return self.first_start.ravel().take(self._at(band + 1))
        above = np.arange(self.band_first.shape[0])[:, None] > band
        return np.where(above, self.band_first, 0.0).sum(axis=0)

    def _at(self, band):
        """Flat index of band ``band[i]`` of section i in the (B, N) arrays."""
        return band * band.size + np.arange(band.size)

    def _in_band(self, band, c):
        """Width, area and first moment above level c, for c inside band ``band`` (one per section)."""
        at = self._at(band)
        b = self.beta.ravel().take(at)
        a = self.width_lo.ravel().take(at) - b * self.u.ravel().take(at)  # b = a + beta u in the band
        top = self.u.ravel().take(at + band.size)
        width = a + b * c
        area = self.area_start.ravel().take(at + band.size) + a * (top - c) + b * (top * top - c * c) / 2.0
        first = (self._first_top(band) + a * (top * top - c * c) / 2.0
                 + b * (top * top * top - c * c * c) / 3.0)
        return width, area, first

    def plastic(self, A):
        """Plastic modulus ∫|u - c| dA about the equal-area level c; returns (Z, c)."""
        half = A / 2.0
        band = np.clip((self.area_start[:-1] >= half).sum(axis=0) - 1, 0, self.beta.shape[0] - 1)
        at = self._at(band)
        b = self.beta.ravel().take(at)
        top = self.u.ravel().take(at + band.size)
        rest = half - self.area_start.ravel().take(at + band.size)  # area still needed below the band top
        width_top = self.width_lo.ravel().take(at) + self.rise.ravel().take(at)
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
        """max over u of Q(u) / b(u), exact: every band's ends and its interior maximum.

        In a band Q(u) = k - alpha u^2/2 - beta u^3/3 and Q'(u) = -u b(u). As a
        function of the width w = alpha + beta u, d(Q/w)/dw = -h(w) / (6 beta^2 w^2)
        with h(w) = 4 w^3 - 3 alpha w^2 + 6 beta^2 k - alpha^3, which rises wherever
        w > max(0, alpha/2). So Q/b has at most one interior maximum, at the largest
        root of h; there s = w - alpha solves (2/3) s^3 + (3/2) alpha s^2 + alpha^2 s
        = -beta^2 k, which gives u = s/beta without dividing by a small beta.

        Q rises towards the centroid from both sides, so inside a band that does not
        hold the centroid Q/b is at most Q at the band's end nearer the centroid over
        the band's smaller end width; the interior is solved only in bands where that
        bound could beat the best end value (a few per section), which gives the same
        maximum.
        """
        lo, hi = self.u[:-1], self.u[1:]
        w_lo, b, q_lo, q_hi = self.width_lo, self.beta, self.first_start[:-1], self.first_start[1:]
        w_hi = w_lo + self.rise
        tiny = 1e-9 * depth

        def ratio(q, width, tiny):
            return np.divide(q, width, out=np.zeros_like(q), where=width > tiny)

        best = np.maximum(ratio(q_lo, w_lo, tiny), ratio(q_hi, w_hi, tiny)).max(axis=0)
        w_min = np.minimum(w_lo, w_hi)
        q_max = np.where(lo >= 0.0, q_lo, q_hi)
        maybe = (w_min <= tiny) | (q_max > (1.0 - 1e-12) * best * w_min) | ((lo < 0.0) & (hi > 0.0))
        live = np.flatnonzero(maybe & (hi > lo))  # merged levels leave empty bands
        n = best.size
        lo, hi, w_lo, b, q_lo, q_hi = (x.ravel().take(live) for x in (lo, hi, w_lo, b, q_lo, q_hi))
        a = w_lo - b * lo
        k = q_hi + a * hi * hi / 2.0 + b * hi * hi * hi / 3.0
        s = _largest_cubic_root(a, 6.0 * b * b * k - a * a * a) - a
        denom = a * a + 1.5 * a * s + (2.0 / 3.0) * s * s  # > 0 unless a = s = 0
        with np.errstate(divide="ignore", invalid="ignore"):
            v = np.clip(np.where(denom > 0.0, -b * k / denom, lo), lo, hi) - lo  # from the band's foot
        # widths and Q measured from the band's foot: no large alpha in thin steep bands
        q_v = q_lo - (lo * (w_lo * v + b * v * v / 2.0) + v * v * (w_lo / 2.0 + b * v / 3.0))
        section = live % n
        np.maximum.at(best, section, ratio(q_v, w_lo + b * v, tiny.take(section)))
        return best


def _properties_chunk(e: Edges, wagner: bool = False) -> dict[str, np.ndarray]:
    p = elastic_properties(e)
    if wagner:  # on these edges, about the centroid: see family_stability
        t = third_moments(e, (p["zc"], p["yc"]))
        p["wagner"] = t["Syyy"] + t["Syzz"]
    A = p["A"]
    prev = e.prev
    succ = np.empty_like(prev)
    succ[prev] = np.arange(prev.size)
    # vertices (V, N): the sections along the fast axis, so sums over vertices vectorise
    z, y = np.ascontiguousarray(e.z0.T), np.ascontiguousarray(e.y0.T)
    # plastic modulus about the horizontal axis (bending in the vertical plane)
    vertical = _WidthProfile(y - p["yc"], z, succ, prev, p["depth"])
    Zz, c = vertical.plastic(A)
    p["Zz"], p["_pna_y"] = Zz, p["yc"] + c
    p["shear_factor"] = vertical.shear_peak(p["depth"]) / p["Iz"]
    # about the vertical axis: the same code with z and y exchanged; the mirror image
    # runs the other way round, so each edge leads to the vertex before it
    Zy, c = _WidthProfile(z - p["zc"], y, prev, succ, p["width"], shear=False).plastic(A)
    p["Zy"], p["_pna_z"] = Zy, p["zc"] + c
    return p


def properties(e: Edges, private: bool = False, offset: int = 0, wagner: bool = False) -> dict[str, np.ndarray]:
    """All section properties (:data:`KEYS`) for every section in the batch ``e``.

    Parameters
    ----------
    e : Edges
        Oriented edges of N sections (outlines counter-clockwise, holes clockwise).
    private : bool
        Also return helper arrays (bounds ``_ymin`` …, plastic axes ``_pna_y``, ``_pna_z``).
    offset : int
        Index of the first section, for error messages.
    wagner : bool
        Also return ``wagner`` (see :data:`STABILITY_KEYS`), from the same edges.

    Raises
    ------
    GeometryError
        If a section has zero or negative area (wrong orientation or degenerate).
    """
    n = e.n
    chunks = []
    step = _chunk_size(e.z0.shape[1])
    for start in range(0, n, step):
        sub = e.rows(slice(start, start + step))
        chunks.append(_properties_chunk(sub, wagner))
    out = {k: np.concatenate([c[k] for c in chunks]) for k in chunks[0]}
    bad = np.flatnonzero(~(out["A"] > 0))
    if bad.size:
        raise GeometryError(f"section {int(bad[0]) + offset}: area is {out['A'][bad[0]]:.3g} m^2; "
                            "expected a positive area (outline counter-clockwise, holes inside)")
    if not private:
        out = {k: v for k, v in out.items() if not k.startswith("_")}
    return out


def family_properties(family: str, dims: dict, private: bool = False,
                      wagner: bool = False) -> dict[str, np.ndarray]:
    """Properties of N sections of one parametric family, from arrays of dimensions (m).

    Parameters
    ----------
    family : str
        A name in :data:`leanspan.sections.families.FAMILIES` (``"ibeam"`` …).
    dims : dict of str to array_like
        Dimension arrays of equal length N (or scalars), SI metres.
    private, wagner : bool
        As in :func:`properties` (``wagner``: the Wagner integral too, which
        :func:`family_stability` then takes instead of building the polygons again).
    """
    fam = get_family(family)
    dims = fam.complete(dims)
    fam.validate(dims)
    n = len(next(iter(dims.values())))

    def chunk(s):  # build the polygons chunk by chunk too: small arrays stay in cache
        return properties(edges_from_family(fam, {k: v[s:s + _CHUNK] for k, v in dims.items()}), private, s, wagner)

    starts = range(0, n, _CHUNK)
    if n >= _THREAD_ROWS and (os.cpu_count() or 1) >= 2:
        # the chunks on two threads (numpy's loops run outside Python's lock); the same chunks, so
        # the same numbers, and the first bad chunk in order raises, as one thread would
        from concurrent.futures import ThreadPoolExecutor

        with ThreadPoolExecutor(2) as pool:
            chunks = list(pool.map(chunk, starts))
    else:
        chunks = [chunk(s) for s in starts]
    return {k: np.concatenate([c[k] for c in chunks]) for k in chunks[0]}


#: What lateral-torsional buckling needs beyond :data:`KEYS`: the torsion constant ``J``, the
#: warping constant ``Cw`` (closed forms), the shear centre's height above the base ``ys`` and
#: the Wagner integral ``wagner`` = ∫y (y² + z²) dA about the centroid (zero for a section
#: symmetric about its horizontal axis).
STABILITY_KEYS = ("J", "Cw", "ys", "wagner")


def family_stability(family: str, dims: dict, yc, zc, wagner=None) -> dict[str, np.ndarray]:
    """:data:`STABILITY_KEYS` of N sections of one family (centroid ``yc``, ``zc`` given), SI;
    ``wagner`` too if given (from ``family_properties(..., wagner=True)``, the same numbers).

    >>> import numpy as np
    >>> out = family_stability("rectangle", {"b": np.array([0.1]), "d": np.array([0.2])},
    ...                        np.array([0.1]), np.array([0.0]))
    >>> round(float(out["ys"][0]), 12), abs(float(out["wagner"][0])) < 1e-15
    (0.1, True)
    """
    fam = get_family(family)
    dims = fam.complete(dims)
    tw = thin_walled_torsion(family, dims)
    n = len(next(iter(dims.values())))
    if wagner is None:
        wagner = _wagner(fam, dims, yc, zc, n)
    return {"J": tw["J"], "Cw": tw["Cw"], "ys": shear_centre_height(family, dims), "wagner": wagner}


def _wagner(fam, dims, yc, zc, n) -> np.ndarray:
    """The Wagner integral of N sections about their centroids, polygons built chunk by chunk."""
    wagner = np.empty(n)
    for s in range(0, n, _CHUNK):  # chunks keep the polygons small
        e = edges_from_family(fam, {k: v[s:s + _CHUNK] for k, v in dims.items()})
        t = third_moments(e, (np.asarray(zc[s:s + _CHUNK], float), np.asarray(yc[s:s + _CHUNK], float)))
        wagner[s:s + _CHUNK] = t["Syyy"] + t["Syzz"]
    return wagner


def edges_from_family(fam, dims) -> Edges:
    """Oriented edges of a family's sections (helper for :func:`family_properties`)."""
    return edges_from_rings(fam.rings(dims))
