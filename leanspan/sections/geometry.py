"""Exact integrals over polygon edges (Green's theorem), for many sections at once.

A section is a set of oriented edges: outlines counter-clockwise, holes clockwise,
points as ``[z, y]`` (z horizontal, y up). Edges are held as four arrays ``z0, y0,
z1, y1`` of shape ``(N, E)``: N sections, E edges each (padding edges of zero
length contribute nothing). Every function here works on the whole batch at once.

Examples
--------
>>> import numpy as np
>>> ring = np.array([[[-1.0, 0.0], [1.0, 0.0], [1.0, 3.0], [-1.0, 3.0]]])  # 2 x 3 rectangle
>>> e = edges_from_rings([ring])
>>> m = moments(e)
>>> float(m["A"][0]), float(m["Sy"][0]), float(m["Syy"][0])
(6.0, 9.0, 18.0)
>>> float(area_above(e, np.array([1.0]))[0][0])  # area and first moment above y = 1
4.0
"""

from __future__ import annotations

import numpy as np

__all__ = ["Edges", "edges_from_rings", "moments", "third_moments", "area_above", "width_at", "swap_axes",
           "bounds"]


class Edges:
    """Oriented edges of N sections: ``z0, y0, z1, y1`` arrays of shape ``(N, E)``.

    ``prev[k]`` is the index of the edge that ends where edge ``k`` starts (the
    same for every section in the batch). Iterating yields the four coordinate
    arrays, so ``z0, y0, z1, y1 = edges`` works.
    """

    __slots__ = ("z0", "y0", "z1", "y1", "prev")

    def __init__(self, z0, y0, z1, y1, prev=None):
        self.z0, self.y0, self.z1, self.y1 = z0, y0, z1, y1
        self.prev = np.roll(np.arange(z0.shape[1]), 1) if prev is None else prev

    def __iter__(self):
        return iter((self.z0, self.y0, self.z1, self.y1))

    @property
    def n(self) -> int:
        return self.z0.shape[0]

    def rows(self, index) -> "Edges":
        """The sections selected by ``index`` (a slice or an index array)."""
        return Edges(*(a[index] for a in self), prev=self.prev)


def edges_from_rings(rings) -> Edges:
    """Join a list of oriented rings, each ``(N, V_k, 2)``, into one edge batch.

    Each ring is closed implicitly (its last point joins its first).
    """
    rings = [np.asarray(ring, dtype=float) for ring in rings]
    counts = [ring.shape[1] for ring in rings]
    n, total = rings[0].shape[0], sum(counts)
    z0, y0, z1, y1 = (np.empty((n, total)) for _ in range(4))
    prevs, offset = [], 0
    for ring, count in zip(rings, counts):  # each ring's points, and the same rolled by one
        end = offset + count
        z0[:, offset:end], y0[:, offset:end] = ring[..., 0], ring[..., 1]
        z1[:, offset:end - 1], y1[:, offset:end - 1] = z0[:, offset + 1:end], y0[:, offset + 1:end]
        z1[:, end - 1], y1[:, end - 1] = z0[:, offset], y0[:, offset]
        prevs.append(offset + np.roll(np.arange(count), 1))
        offset = end
    return Edges(z0, y0, z1, y1, prev=np.concatenate(prevs))


def swap_axes(e: Edges) -> Edges:
    """Exchange z and y and reverse each edge, so orientation (and signed area) is kept.

    Used to integrate "to the right of a vertical line" with the same code as
    "above a horizontal line".
    """
    z0, y0, z1, y1 = e
    # Swapping the axes mirrors the plane; reversing the edges restores orientation.
    # A reversed edge k now starts where it used to end, which is where its old
    # successor started: its new predecessor is the old successor.
    nxt = np.empty_like(e.prev)
    nxt[e.prev] = np.arange(e.prev.size)
    return Edges(y1, z1, y0, z0, prev=nxt)


def bounds(e: Edges):
    """Return ``zmin, zmax, ymin, ymax`` per section (arrays of shape (N,)).

    Zero-length padding edges repeat a real vertex, so they never widen the box.
    """
    z0, y0, _, _ = e
    return z0.min(axis=1), z0.max(axis=1), y0.min(axis=1), y0.max(axis=1)


def _shifted(e: Edges, origin):
    """The edge end points relative to ``origin`` (subtracted first to keep round-off small) and
    each edge's cross product ``z0 y1 - z1 y0`` (twice the signed area it sweeps about the origin)."""
    z0, y0, z1, y1 = e
    if origin is not None:
        oz, oy = (np.asarray(o, float)[:, None] for o in origin)
        z0, z1, y0, y1 = z0 - oz, z1 - oz, y0 - oy, y1 - oy
    return z0, y0, z1, y1, z0 * y1 - z1 * y0


def moments(e: Edges, origin=None) -> dict[str, np.ndarray]:
    """Area, first and second moments about axes through ``origin`` (default: z = y = 0).

    Returns ``A``, ``Sy`` = ∫y dA, ``Sz`` = ∫z dA, ``Syy`` = ∫y² dA, ``Szz`` = ∫z² dA,
    ``Syz`` = ∫yz dA, each of shape (N,). ``origin`` is ``(z, y)`` arrays of shape
    (N,), subtracted first to keep round-off small.
    """
    z0, y0, z1, y1, cross = _shifted(e, origin)
    return {
        "A": cross.sum(axis=1) / 2.0,
        "Sy": (cross * (y0 + y1)).sum(axis=1) / 6.0,
        "Sz": (cross * (z0 + z1)).sum(axis=1) / 6.0,
        "Syy": (cross * (y0 * y0 + y0 * y1 + y1 * y1)).sum(axis=1) / 12.0,
        "Szz": (cross * (z0 * z0 + z0 * z1 + z1 * z1)).sum(axis=1) / 12.0,
        "Syz": (cross * (z0 * y1 + 2.0 * z0 * y0 + 2.0 * z1 * y1 + z1 * y0)).sum(axis=1) / 24.0,
    }


def third_moments(e: Edges, origin=None) -> dict[str, np.ndarray]:
    """Third moments ``Syyy`` = ∫y³ dA and ``Syzz`` = ∫y z² dA about axes through ``origin``.

    The general polygon-moment formula (Green's theorem, each edge's term a polynomial in its
    end points; e.g. C. Steger, "On the calculation of arbitrary moments of polygons", 1996).
    They give the Wagner term of mono-symmetric sections, ``∫y (y² + z²) dA``.

    >>> ring = np.array([[[0.0, 0.0], [2.0, 0.0], [0.0, 3.0]]])   # right triangle, legs 2 and 3
    >>> t = third_moments(edges_from_rings([ring]))
    >>> round(float(t["Syyy"][0]), 9), round(float(t["Syzz"][0]), 9)  # b h^4 / 20, b^3 h^2 / 60
    (8.1, 1.2)
    """
    z0, y0, z1, y1, cross = _shifted(e, origin)
    return {
        "Syyy": (cross * (y0 + y1) * (y0 * y0 + y1 * y1)).sum(axis=1) / 20.0,
        "Syzz": (cross * (3.0 * z0 * z0 * y0 + z0 * z0 * y1 + 2.0 * z0 * z1 * (y0 + y1) + z1 * z1 * y0
                          + 3.0 * z1 * z1 * y1)).sum(axis=1) / 60.0,
    }


def area_above(e: Edges, level: np.ndarray):
    """Area and first moment ∫y dA of the part of each section above ``y = level``.

    Uses A = ∮ z dy and ∫y dA = ∮ z y dy over each edge clipped to ``y >= level``;
    the cut along the level itself has dy = 0 and adds nothing, so no closing edge
    is needed. ``level`` has shape (N,) (one level per section) or (N, L); the
    results have the same shape.
    """
    z0, y0, z1, y1 = e
    level = np.asarray(level, dtype=float)
    extra = level.ndim == 2
    if extra:  # (N, L) levels: broadcast as (N, L, E)
        z0, y0, z1, y1 = (a[:, None, :] for a in (z0, y0, z1, y1))
        c = level[:, :, None]
    else:
        c = level[:, None]
    dy = y1 - y0
    with np.errstate(divide="ignore", invalid="ignore"):
        slope = np.where(dy != 0.0, (z1 - z0) / np.where(dy != 0.0, dy, 1.0), 0.0)
    ya = np.maximum(y0, c)
    yb = np.maximum(y1, c)
    za = z0 + slope * (ya - y0)
    zb = z0 + slope * (yb - y0)
    d = yb - ya
    area = ((za + zb) * d).sum(axis=-1) / 2.0
    first = (d * (za * (2.0 * ya + yb) + zb * (ya + 2.0 * yb))).sum(axis=-1) / 6.0
    return area, first


def width_at(e: Edges, level: np.ndarray) -> np.ndarray:
    """Total width of material cut by the line ``y = level`` (= -d(area above)/d level).

    ``level`` has shape (N,) or (N, L). Edges are counted half-open in y so a level
    through a vertex is not counted twice.
    """
    z0, y0, z1, y1 = e
    level = np.asarray(level, dtype=float)
    if level.ndim == 2:
        z0, y0, z1, y1 = (a[:, None, :] for a in (z0, y0, z1, y1))
        c = level[:, :, None]
    else:
        c = level[:, None]
    up = (y0 <= c) & (c < y1)
    down = (y1 <= c) & (c < y0)
    dy = y1 - y0
    with np.errstate(divide="ignore", invalid="ignore"):
        zc = z0 + (z1 - z0) * (c - y0) / np.where(dy != 0.0, dy, 1.0)
    return np.where(up, zc, 0.0).sum(axis=-1) - np.where(down, zc, 0.0).sum(axis=-1)
