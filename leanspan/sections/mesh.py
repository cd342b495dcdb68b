"""Triangular meshes of cross-sections: conforming Delaunay, then 6-node triangles.

A section is a list of parts (shapely Polygons, holes allowed, points ``[z, y]``).
Parts may touch along edges (a flitch plate between two timbers); the mesh then
shares nodes along the common edges, so the parts act together. Each triangle
carries the index of the part it lies in.

Method (numpy, shapely and scipy only):

1. every part boundary is *noded* together (``shapely.union_all`` of the rings),
   so touching parts get identical vertices along shared edges;
2. each noded edge is split into pieces no longer than the element size ``h``;
3. interior points on a triangular lattice of spacing ``h`` (a tiny fixed jitter
   breaks ties) are kept where they lie in a part and farther than ``h / 2`` from
   every boundary, so no interior point encroaches on a boundary piece;
4. ``scipy.spatial.Delaunay`` triangulates all points; boundary pieces that are
   not edges of the triangulation are split at their midpoints and the
   triangulation is redone until every piece is an edge (a conforming Delaunay
   mesh; a few rounds at most for sections);
5. triangles are given the part that contains their centroid, those in no part
   (holes, notches, gaps) are dropped, and the edge midpoints become the extra
   nodes of the quadratic (6-node) triangles.

Curved boundaries arrive as polygons and are meshed as such (straight-sided
elements reproduce the polygon exactly).

Examples
--------
>>> from shapely.geometry import box
>>> m = mesh_section([box(-0.5, 0.0, 0.5, 1.0)], element_size=0.25)
>>> m.triangles.shape[1], round(float(m.areas.sum()), 12)
(6, 1.0)
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import shapely
from scipy.spatial import Delaunay
from shapely.geometry import MultiPolygon, Polygon

from ..errors import GeometryError

__all__ = ["TriMesh", "mesh_section", "default_element_size", "check_parts", "MAX_ELEMENTS",
           "MAX_BOUNDARY_POINTS", "MAX_GRID_POINTS"]

#: Cap on the element count that the default element size respects (keeps a default
#: solve well under a second on a small machine); a given element size may reach 50 times it.
MAX_ELEMENTS = 6000
#: Work limits of one mesh, whatever the element size: boundary pieces (perimeter / h) and
#: candidate interior points (bounding box / lattice cell). The default size keeps a tenth of each.
MAX_BOUNDARY_POINTS = 200_000
MAX_GRID_POINTS = 4_000_000


def _work(whole, parts, h):
    """Estimated (triangles, boundary pieces, lattice points) of a mesh of size ``h``."""
    zmin, ymin, zmax, ymax = whole.bounds
    perimeter = sum(p.length for p in parts)
    grid = ((zmax - zmin) / h + 2.0) * ((ymax - ymin) / (0.866 * h) + 1.0)
    return whole.area / (0.433 * h * h), perimeter / h, grid


@dataclass(frozen=True)
class TriMesh:
    """A mesh of 6-node (quadratic, straight-sided) triangles.

    Attributes
    ----------
    nodes : ndarray, shape (N, 2)
        Node coordinates ``[z, y]``; the first ``n_vertices`` are triangle corners,
        the rest edge midpoints.
    triangles : ndarray of int, shape (M, 6)
        Corners 0, 1, 2 counter-clockwise, then the midpoints of edges 0-1, 1-2, 2-0.
    part : ndarray of int, shape (M,)
        Index of the input part each triangle lies in.
    n_vertices : int
        Number of corner nodes.
    element_size : float
        The target edge length used.
    """

    nodes: np.ndarray
    triangles: np.ndarray
    part: np.ndarray
    n_vertices: int
    element_size: float

    @property
    def n_elements(self) -> int:
        """Number of triangles."""
        return int(self.triangles.shape[0])

    @property
    def corners(self) -> np.ndarray:
        """Corner coordinates, shape (M, 3, 2)."""
        return self.nodes[self.triangles[:, :3]]

    @property
    def areas(self) -> np.ndarray:
        """Triangle areas, shape (M,) (all positive)."""
        c = self.corners
        d1, d2 = c[:, 1] - c[:, 0], c[:, 2] - c[:, 0]
        return 0.5 * (d1[:, 0] * d2[:, 1] - d1[:, 1] * d2[:, 0])

    def components(self) -> np.ndarray:
        """Connected piece of each node (pieces share at least one node), shape (N,).

        >>> from shapely.geometry import box
        >>> m = mesh_section([box(0, 0, 1, 1), box(2, 0, 3, 1)], element_size=0.5)
        >>> int(m.components().max()) + 1
        2
        """
        from scipy.sparse import coo_matrix
        from scipy.sparse.csgraph import connected_components

        t = self.triangles
        rows = np.repeat(t[:, 0], 5)
        cols = t[:, 1:].ravel()
        n = self.nodes.shape[0]
        graph = coo_matrix((np.ones(rows.size), (rows, cols)), shape=(n, n))
        return connected_components(graph, directed=False)[1]


def check_parts(polygons) -> list[Polygon]:
    """Validate the parts of a section and return them as a list of Polygons.

    Raises
    ------
    GeometryError
        If a part is not a polygon, is empty, invalid, has no area, or overlaps
        another part (touching along edges is fine).

    >>> from shapely.geometry import box
    >>> check_parts([box(0, 0, 1, 1), box(0.5, 0, 2, 1)])
    Traceback (most recent call last):
    ...
    leanspan.errors.GeometryError: parts 0 and 1 overlap (area 0.5); parts may touch along edges but not overlap
    """
    if isinstance(polygons, (Polygon, MultiPolygon)):
        polygons = [polygons]
    try:
        parts = list(polygons)
    except TypeError:
        raise GeometryError(f"section: expected a list of polygons, got {type(polygons).__name__}") from None
    if not parts:
        raise GeometryError("section: expected at least one polygon, got none")
    for i, p in enumerate(parts):
        if not isinstance(p, (Polygon, MultiPolygon)):
            raise GeometryError(f"part {i}: expected a shapely Polygon, got {type(p).__name__}")
        if p.is_empty:
            raise GeometryError(f"part {i}: the polygon is empty")
        if not np.all(np.isfinite(shapely.get_coordinates(p))):
            raise GeometryError(f"part {i}: coordinates must be finite numbers")
        if not p.is_valid:
            reason = shapely.is_valid_reason(p)
            raise GeometryError(f"part {i}: invalid polygon ({reason}); expected a simple ring without self-intersections")
        if not p.area > 0:
            raise GeometryError(f"part {i}: the polygon has no area")
    if len(parts) > 1:
        tree = shapely.STRtree(parts)
        pairs = tree.query(parts, predicate="intersects")
        scale = max(p.area for p in parts)
        for i, j in pairs.T:
            if i < j:
                overlap = parts[i].intersection(parts[j]).area
                if overlap > 1e-9 * scale:
                    raise GeometryError(
                        f"parts {i} and {j} overlap (area {overlap:.6g}); parts may touch along edges but not overlap"
                    )
    return parts


def default_element_size(polygons, max_elements: int = MAX_ELEMENTS) -> float:
    """The element size used when none is given.

    Half the thinnest part's mean wall thickness, estimated as ``2 A / P`` (exact
    for a strip or a tube), but no larger than 1/20 of the section's bounding-box
    diagonal and no smaller than what keeps about ``max_elements`` triangles.

    >>> from shapely.geometry import box
    >>> round(default_element_size([box(0, 0, 0.01, 0.2)]), 6)   # 10 mm plate: 5 mm
    0.004762
    """
    parts = check_parts(polygons)
    whole = shapely.union_all(parts)
    zmin, ymin, zmax, ymax = whole.bounds
    diag = float(np.hypot(zmax - zmin, ymax - ymin))
    thick = min(2.0 * p.area / p.length for p in parts)
    h = min(0.5 * thick, diag / 20.0)
    # an equilateral triangle of side h has area 0.433 h^2; a lattice cell is 0.866 h^2
    h_floor = max(np.sqrt(whole.area / (0.433 * max_elements)),
                  sum(p.length for p in parts) / (0.1 * MAX_BOUNDARY_POINTS),
                  np.sqrt((zmax - zmin) * (ymax - ymin) / (0.866 * 0.05 * MAX_GRID_POINTS)))
    return float(max(h, h_floor))


def _noded_segments(parts, h):
    """Boundary points and segments (index pairs) no longer than h, shared across parts."""
    # node on a fine grid so that edges meeting to within rounding (e.g. -0.0285 + 0.0225
    # against -0.006) become one edge and every T-junction gets a vertex
    zmin, ymin, zmax, ymax = shapely.total_bounds(parts)
    grid = 1e-12 * float(np.hypot(zmax - zmin, ymax - ymin))
    rings = shapely.union_all([p.boundary for p in parts], grid_size=grid)
    coords, which = shapely.get_coordinates(shapely.get_parts(rings), return_index=True)
    # consecutive vertices of one line form an edge
    same = which[1:] == which[:-1]
    a, b = coords[:-1][same], coords[1:][same]
    length = np.hypot(*(b - a).T)
    a, b, length = a[length > 0], b[length > 0], length[length > 0]
    n = np.maximum(1, np.ceil(length / h - 1e-9)).astype(int)
    # points a + (b - a) k / n for k = 0..n on each edge, numbered edge after edge
    start = np.cumsum(n + 1) - (n + 1)
    edge = np.repeat(np.arange(a.shape[0]), n + 1)
    k = np.arange(edge.size) - start[edge]
    pts = a[edge] + (b[edge] - a[edge]) * (k / n[edge])[:, None]
    pts, inverse = _unique_points(pts, h)
    lo = np.arange(edge.size)[k < n[edge]]  # piece from point lo to lo + 1
    seg = np.column_stack([inverse[lo], inverse[lo + 1]])
    seg = seg[seg[:, 0] != seg[:, 1]]
    return pts, seg


def _unique_points(pts, h):
    """Merge points closer than a tiny tolerance; return unique points and the index map."""
    tol = 1e-9 * h
    key = np.round(pts / tol).astype(np.int64)
    _, first, inverse = np.unique(key, axis=0, return_index=True, return_inverse=True)
    return pts[first], inverse.ravel()


def _interior_points(whole, boundary, h):
    """Jittered triangular lattice points inside ``whole`` and > h/2 from ``boundary``."""
    zmin, ymin, zmax, ymax = whole.bounds
    dy = h * np.sqrt(3.0) / 2.0
    ny = int(np.floor((ymax - ymin) / dy)) + 1
    nz = int(np.floor((zmax - zmin) / h)) + 2
    j, i = np.meshgrid(np.arange(ny), np.arange(nz), indexing="ij")
    z = zmin + h * (i + 0.5 * (j % 2)) - 0.25 * h
    y = ymin + dy * j + 0.5 * ((ymax - ymin) - dy * (ny - 1))
    pts = np.column_stack([z.ravel(), y.ravel()])
    rng = np.random.default_rng(12345)  # fixed: the same input always gives the same mesh
    pts += rng.uniform(-0.02 * h, 0.02 * h, pts.shape)
    inside = shapely.contains_xy(whole, pts[:, 0], pts[:, 1])
    pts = pts[inside]
    if pts.size:
        far = shapely.distance(boundary, shapely.points(pts)) > 0.5 * h
        pts = pts[far]
    return pts


def _edge_keys(tri, n):
    e = np.concatenate([tri[:, [0, 1]], tri[:, [1, 2]], tri[:, [2, 0]]])
    e.sort(axis=1)
    return e[:, 0].astype(np.int64) * n + e[:, 1]


def _conforming_delaunay(bpts, seg, ipts, h, max_rounds=30):
    """Delaunay triangulation in which every boundary segment is an edge."""
    pts = np.concatenate([bpts, ipts]) if ipts.size else bpts
    for _ in range(max_rounds):
        try:
            tri = Delaunay(pts, qhull_options="Qbb Qc Qz Q12").simplices
        except Exception as exc:  # qhull failure: degenerate input
            raise GeometryError(f"section: could not triangulate ({str(exc).splitlines()[0]})") from None
        n = pts.shape[0]
        s = np.sort(seg, axis=1)
        missing = ~np.isin(s[:, 0].astype(np.int64) * n + s[:, 1], _edge_keys(tri, n))
        if not missing.any():
            return pts, tri
        bad = seg[missing]
        if np.min(np.hypot(*(pts[bad[:, 0]] - pts[bad[:, 1]]).T)) < 1e-4 * h:
            break  # a vertex sits on a boundary edge: splitting cannot recover it
        mid = 0.5 * (pts[bad[:, 0]] + pts[bad[:, 1]])
        new = np.arange(n, n + bad.shape[0])
        seg = np.concatenate([seg[~missing], np.column_stack([bad[:, 0], new]), np.column_stack([new, bad[:, 1]])])
        pts = np.concatenate([pts, mid])
    raise GeometryError("section: the mesh could not follow the part boundaries; "
                        "check for parts that nearly touch, or try another element_size")


def mesh_section(polygons, element_size: float | None = None, max_elements: int = MAX_ELEMENTS) -> TriMesh:
    """Mesh the parts of a section with 6-node triangles.

    Parameters
    ----------
    polygons : list of shapely Polygon
        The parts, points ``[z, y]``; holes allowed; parts may touch along edges.
    element_size : float, optional
        Target edge length (same unit as the coordinates). Default:
        :func:`default_element_size`. Shorter polygon edges (fillets, arcs) are kept.
    max_elements : int
        Cap used by the default element size (ignored if ``element_size`` is given).

    Returns
    -------
    TriMesh

    Raises
    ------
    GeometryError
        Bad parts (see :func:`check_parts`) or a non-positive element size.

    Examples
    --------
    Two touching parts share the nodes on their common edge:

    >>> from shapely.geometry import box
    >>> m = mesh_section([box(-1, 0, 0, 1), box(0, 0, 1, 1)], element_size=0.2)
    >>> sorted(set(m.part.tolist())), round(float(m.areas.sum()), 12)
    ([0, 1], 2.0)
    """
    parts = check_parts(polygons)
    if element_size is None:
        h = default_element_size(parts, max_elements)
    else:
        try:
            h = float(element_size)
        except (TypeError, ValueError):
            raise GeometryError(f"element_size: expected a positive length, got {element_size!r}") from None
        if not (np.isfinite(h) and h > 0):
            raise GeometryError(f"element_size: expected a positive length, got {h * 1e3:g} mm")
    whole = shapely.union_all(parts)
    n_est, n_edge, n_grid = _work(whole, parts, h)
    limits = (n_est / (50 * MAX_ELEMENTS), n_edge / MAX_BOUNDARY_POINTS, n_grid / MAX_GRID_POINTS)
    if max(limits) > 1:
        what = ("triangles", "boundary pieces", "lattice points")[int(np.argmax(limits))]
        count = (n_est, n_edge, n_grid)[int(np.argmax(limits))]
        # work grows like 1/h (boundary) or 1/h^2: the size that brings the worst one in
        need = h * max(limits[0] ** 0.5, limits[1], limits[2] ** 0.5) * 1.01
        raise GeometryError(f"element_size: {h * 1e3:.4g} mm would give about {count:.3g} {what}; "
                            f"expected a larger element size (at least {need * 1e3:.3g} mm)")
    bpts, seg = _noded_segments(parts, h)
    boundary = shapely.union_all([p.boundary for p in parts])
    ipts = _interior_points(whole, boundary, h)
    pts, tri = _conforming_delaunay(bpts, seg, ipts, h)

    # orient counter-clockwise, drop slivers of zero area, assign parts by centroid
    c = pts[tri]
    d1, d2 = c[:, 1] - c[:, 0], c[:, 2] - c[:, 0]
    area2 = d1[:, 0] * d2[:, 1] - d1[:, 1] * d2[:, 0]
    flip = area2 < 0
    tri[flip] = tri[flip][:, [0, 2, 1]]
    ok = np.abs(area2) > 1e-12 * h * h
    tri = tri[ok]
    cen = pts[tri].mean(axis=1)
    part = np.full(tri.shape[0], -1)
    for k, p in enumerate(parts):  # few parts: a short loop, each test vectorised
        hit = (part < 0) & shapely.contains_xy(p, cen[:, 0], cen[:, 1])
        part[hit] = k
    tri, part = tri[part >= 0], part[part >= 0]

    # keep used corner nodes only, renumbered
    used, tri = np.unique(tri, return_inverse=True)
    tri = tri.reshape(-1, 3)
    verts = pts[used]
    nv = verts.shape[0]

    # midside nodes: one per unique edge
    e = np.concatenate([tri[:, [0, 1]], tri[:, [1, 2]], tri[:, [2, 0]]])
    e.sort(axis=1)
    uniq, inv = np.unique(e[:, 0].astype(np.int64) * nv + e[:, 1], return_inverse=True)
    ea, eb = uniq // nv, uniq % nv
    mids = 0.5 * (verts[ea] + verts[eb])
    m = tri.shape[0]
    mid_idx = nv + inv.ravel().reshape(3, m).T
    nodes = np.concatenate([verts, mids])
    tri6 = np.concatenate([tri, mid_idx], axis=1)
    return TriMesh(nodes=nodes, triangles=tri6, part=part, n_vertices=nv, element_size=h)
