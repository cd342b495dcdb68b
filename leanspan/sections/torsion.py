"""Saint-Venant torsion by finite elements: J, the shear centre and Cw of any section.

Conventions and method
----------------------
Points are ``[z, y]`` (z horizontal, y up). A twist rate ``theta'`` turns the
section counter-clockwise as drawn (z to the right, y up) and warps it out of
plane, ``u_x = theta' omega(z, y)``, with in-plane displacements
``u_z = -theta x y`` and ``u_y = theta x z``. The shear strains are
``gamma_xz = theta' (omega_z - y)`` and ``gamma_xy = theta' (omega_y + z)``, and
equilibrium with traction-free faces gives

    div(G grad omega) = 0 in each part,  G d(omega)/dn = G (y n_z - z n_y) on the outline,

with continuity of ``G (grad omega - (y, -z)) . n`` across part interfaces. Its
weak form needs no boundary integral: ``int G grad v . grad omega dA =
int G grad v . (y, -z) dA`` for every test function ``v`` (the field
``(y, -z)`` has no divergence), which also handles composite parts exactly.
Then

    GJ = int G (z^2 + y^2 + z omega_y - y omega_z) dA,

the same for any origin (the circle gives ``omega = 0`` and J = pi d^4 / 32).

The warping function about a pole ``(zs, ys)`` is ``omega_P = omega - ys z + zs y + c``.
The shear centre is the pole whose warping stresses ``E theta'' omega_P`` carry
no axial force and no bending moment (Trefftz's definition):
``int E omega_P dA = int E omega_P z dA = int E omega_P y dA = 0``; these are the
normal equations of ``min int E omega_P^2 dA`` over the pole and ``c``, whose
minimum is ``E Cw``. Parts that do not touch get one constant each (the pieces
are taken as tied together in the plane, e.g. by battens: J is the sum of the
pieces' J). For thin-walled sections this point agrees with the shear centre of
bending shear flows; for solid sections the two definitions differ slightly
(the flexural one depends on Poisson's ratio).

Elements are 6-node triangles (see :mod:`leanspan.sections.mesh`) with a
6-point degree-4 Gauss rule, exact for every integral used on straight-sided
elements. Assembly is vectorised over elements x points and sparse
(``scipy.sparse`` coo -> csr); the null space (``omega`` + constant) is removed
by pinning one node per connected piece.

Examples
--------
A square of side 1 has J = 0.1406 a^4 (theory-of-elasticity series):

>>> from shapely.geometry import box
>>> r = torsion([box(-0.5, 0.0, 0.5, 1.0)], element_size=0.1)
>>> round(r.J, 4), round(r.zs, 6) == 0.0, round(r.ys, 6)
(0.1406, True, 0.5)
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import scipy.sparse as sp
from scipy.sparse.linalg import spsolve

from ..errors import GeometryError, InputError
from .mesh import MAX_ELEMENTS, TriMesh, check_parts, mesh_section

__all__ = ["TorsionResult", "torsion", "shape_gradients", "QUAD_POINTS", "QUAD_WEIGHTS"]

# 6-point Gauss rule on a triangle, exact to degree 4 (Dunavant 1985):
# barycentric points and weights that sum to 1 (multiply by the area).
_A, _B = 0.445948490915965, 0.091576213509771
QUAD_POINTS = np.array([
    [_A, _A, 1 - 2 * _A], [_A, 1 - 2 * _A, _A], [1 - 2 * _A, _A, _A],
    [_B, _B, 1 - 2 * _B], [_B, 1 - 2 * _B, _B], [1 - 2 * _B, _B, _B],
])
QUAD_WEIGHTS = np.array([0.223381589678011] * 3 + [0.109951743655322] * 3)

# barycentric coordinates of the 6 element nodes (corners, then edge midpoints)
_NODE_POINTS = np.array([
    [1, 0, 0], [0, 1, 0], [0, 0, 1], [0.5, 0.5, 0], [0, 0.5, 0.5], [0.5, 0, 0.5],
])


def _shape(L):
    """Quadratic shape functions at barycentric points L (q, 3) -> (q, 6)."""
    L1, L2, L3 = L.T
    return np.column_stack([L1 * (2 * L1 - 1), L2 * (2 * L2 - 1), L3 * (2 * L3 - 1),
                            4 * L1 * L2, 4 * L2 * L3, 4 * L3 * L1])


def _shape_dL(L):
    """Derivatives dN_a/dL_i at barycentric points L (q, 3) -> (q, 6, 3)."""
    L1, L2, L3 = L.T
    z = np.zeros_like(L1)
    return np.stack([
        np.stack([4 * L1 - 1, z, z], -1), np.stack([z, 4 * L2 - 1, z], -1),
        np.stack([z, z, 4 * L3 - 1], -1), np.stack([4 * L2, 4 * L1, z], -1),
        np.stack([z, 4 * L3, 4 * L2], -1), np.stack([4 * L3, z, 4 * L1], -1),
    ], axis=1)


def shape_gradients(corners, L):
    """Gradients of the 6 shape functions, shape (M, q, 6, 2), and areas (M,).

    Parameters
    ----------
    corners : ndarray, shape (M, 3, 2)
        Counter-clockwise corner coordinates ``[z, y]``.
    L : ndarray, shape (q, 3)
        Barycentric evaluation points.

    >>> import numpy as np
    >>> g, a = shape_gradients(np.array([[[0., 0.], [1., 0.], [0., 1.]]]), QUAD_POINTS)
    >>> float(a[0]), bool(np.allclose(g.sum(axis=2), 0.0))   # the N_a sum to 1
    (0.5, True)
    """
    p0, p1, p2 = corners[:, 0], corners[:, 1], corners[:, 2]
    area2 = (p1[:, 0] - p0[:, 0]) * (p2[:, 1] - p0[:, 1]) - (p2[:, 0] - p0[:, 0]) * (p1[:, 1] - p0[:, 1])
    # grad L_i = (y_j - y_k, z_k - z_j) / 2A for (i, j, k) cyclic
    pj, pk = corners[:, [1, 2, 0]], corners[:, [2, 0, 1]]
    gradL = np.stack([pj[..., 1] - pk[..., 1], pk[..., 0] - pj[..., 0]], -1) / area2[:, None, None]
    return np.einsum("qai,eid->eqad", _shape_dL(L), gradL), 0.5 * area2


@dataclass(frozen=True)
class TorsionResult:
    """Torsion properties of a section and the fields behind them.

    Attributes
    ----------
    J : float
        Torsion constant, ``GJ / G_ref`` (the geometric J when all parts share one G).
    GJ : float
        Torsional rigidity ``int G (...) dA``; equals J when ``shear_moduli`` is None.
    Cw : float
        Warping constant about the shear centre, ``ECw / E_ref``.
    ECw : float
        Warping rigidity ``int E omega_s^2 dA``.
    zs, ys : float
        Shear centre, in the input's coordinates.
    zc, yc : float
        Modulus-weighted (E) centroid used as the origin of the solve.
    G_ref, E_ref : float
        Moduli of the reference part (1.0 when none are given).
    mesh : TriMesh
        The mesh solved on.
    omega : ndarray, shape (N,)
        Nodal warping function about the shear centre (zero E-weighted mean).
    tau : ndarray, shape (M, 6, 2)
        Shear stresses ``[tau_xz, tau_xy]`` at each element's 6 nodes under a unit
        torque (stress per unit torque, 1 / length^3 in the input's units).
    """

    J: float
    GJ: float
    Cw: float
    ECw: float
    zs: float
    ys: float
    zc: float
    yc: float
    G_ref: float
    E_ref: float
    mesh: TriMesh
    omega: np.ndarray
    tau: np.ndarray

    @property
    def n_elements(self) -> int:
        """Number of triangles solved on."""
        return self.mesh.n_elements

    @property
    def tau_magnitude(self) -> np.ndarray:
        """|tau| at each element's nodes under a unit torque, shape (M, 6)."""
        return np.hypot(self.tau[..., 0], self.tau[..., 1])

    @property
    def tau_max(self) -> float:
        """Largest |tau| under a unit torque (at element nodes), so tau = T * tau_max."""
        return float(self.tau_magnitude.max())


def _moduli(values, n, name):
    if values is None:
        return np.ones(n)
    try:
        arr = np.asarray(values, dtype=float).reshape(-1)
    except (TypeError, ValueError):
        raise InputError(f"{name}: expected one positive number per part, got {values!r}") from None
    if arr.size == 1 and n > 1:
        arr = np.full(n, arr[0])
    if arr.size != n:
        raise InputError(f"{name}: expected {n} values (one per part), got {arr.size}")
    bad = ~(np.isfinite(arr) & (arr > 0))
    if bad.any():
        i = int(np.argmax(bad))
        raise InputError(f"{name}[{i}]: expected a positive modulus, got {arr[i]!r}")
    return arr


def torsion(polygons, shear_moduli=None, element_size=None, *, elastic_moduli=None,
            reference_part: int = 0, max_elements: int | None = None) -> TorsionResult:
    """Torsion constant, shear centre and warping constant of a section by FE.

    Parameters
    ----------
    polygons : list of shapely Polygon
        The parts, points ``[z, y]``; holes allowed; parts may touch along edges.
    shear_moduli : sequence of float, optional
        G of each part (any consistent unit). None: all 1, so J is geometric.
    element_size : float, optional
        Target element edge length; default :func:`~leanspan.sections.mesh.default_element_size`.
    elastic_moduli : sequence of float, optional
        E of each part, weighting the shear centre and Cw (warping stresses are
        ``E theta'' omega``). None: proportional to ``shear_moduli`` (one Poisson
        ratio for all parts).
    reference_part : int
        Part whose moduli ``G_ref``, ``E_ref`` turn GJ and ECw into J and Cw.
    max_elements : int, optional
        Element cap for the default element size.

    Returns
    -------
    TorsionResult

    Raises
    ------
    GeometryError, InputError
        Bad parts, a bad element size, or moduli that are not one positive value per part.

    Examples
    --------
    A thin-walled tube: J = pi (d^4 - di^4) / 32 within the polygon's chord error.

    >>> import math
    >>> from shapely.geometry import Point
    >>> ring = Point(0, 0).buffer(1.0, quad_segs=32).difference(Point(0, 0).buffer(0.9, quad_segs=32))
    >>> r = torsion([ring], element_size=0.05)
    >>> abs(r.J / (math.pi * (2**4 - 1.8**4) / 32) - 1) < 0.005, abs(r.Cw) < 1e-6
    (True, True)
    """
    parts = check_parts(polygons)
    n_parts = len(parts)
    G_part = _moduli(shear_moduli, n_parts, "shear_moduli")
    E_part = G_part if elastic_moduli is None else _moduli(elastic_moduli, n_parts, "elastic_moduli")
    if not (isinstance(reference_part, (int, np.integer)) and 0 <= reference_part < n_parts):
        raise InputError(f"reference_part: expected a part index 0..{n_parts - 1}, got {reference_part!r}")
    mesh = mesh_section(parts, element_size, max_elements or MAX_ELEMENTS)

    tri = mesh.triangles
    G, E = G_part[mesh.part], E_part[mesh.part]
    grads, area = shape_gradients(mesh.corners, QUAD_POINTS)        # (M, q, 6, 2), (M,)
    Nq = _shape(QUAD_POINTS)                                          # (q, 6)
    wA = area[:, None] * QUAD_WEIGHTS[None, :]                       # (M, q)

    # origin at the E-weighted centroid (better conditioning; J does not depend on it)
    xq = np.einsum("qa,ead->eqd", Nq, mesh.nodes[tri])               # (M, q, 2) [z, y]
    EA = np.sum(E[:, None] * wA)
    zc, yc = (np.einsum("e,eq,eqd->d", E, wA, xq) / EA)
    zq, yq = xq[..., 0] - zc, xq[..., 1] - yc

    # stiffness and load, element by element in one go
    Ke = np.einsum("e,eq,eqad,eqbd->eab", G, wA, grads, grads)
    fe = np.einsum("e,eq,eqa->ea", G, wA, grads[..., 0] * yq[..., None] - grads[..., 1] * zq[..., None])
    n = mesh.nodes.shape[0]
    rows = np.broadcast_to(tri[:, :, None], Ke.shape).ravel()
    cols = np.broadcast_to(tri[:, None, :], Ke.shape).ravel()
    K = sp.coo_matrix((Ke.ravel(), (rows, cols)), shape=(n, n)).tocsr()
    f = np.bincount(tri.ravel(), weights=fe.ravel(), minlength=n)

    # remove the null space: pin the first node of each connected piece
    comp = mesh.components()
    n_comp = int(comp.max()) + 1
    pinned = np.zeros(n, bool)
    pinned[np.unique(comp, return_index=True)[1]] = True
    free = ~pinned
    omega = np.zeros(n)
    omega[free] = spsolve(K[free][:, free].tocsc(), f[free])

    # torsional rigidity
    og = np.einsum("eqad,ea->eqd", grads, omega[tri])                # grad omega at points
    GJ = float(np.sum(G[:, None] * wA * (zq**2 + yq**2 + zq * og[..., 1] - yq * og[..., 0])))

    # shear centre and Cw: omega_P = omega + [-z, y, 1_piece] . [ys, zs, c_k]
    oq = np.einsum("qa,ea->eq", Nq, omega[tri])
    piece = comp[tri[:, 0]]
    B = np.zeros(zq.shape + (2 + n_comp,))
    B[..., 0], B[..., 1] = -zq, yq
    B[np.arange(tri.shape[0]), :, 2 + piece] = 1.0
    W = E[:, None] * wA
    gram = np.einsum("eq,eqi,eqj->ij", W, B, B)
    rhs = -np.einsum("eq,eqi,eq->i", W, B, oq)
    coef = np.linalg.solve(gram, rhs)
    ys_rel, zs_rel = coef[0], coef[1]
    omega_s = omega - ys_rel * (mesh.nodes[:, 0] - zc) + zs_rel * (mesh.nodes[:, 1] - yc) + coef[2 + comp]
    ECw = float(np.sum(W * (oq + B @ coef) ** 2))

    # shear stresses under a unit torque at the element nodes
    gn, _ = shape_gradients(mesh.corners, _NODE_POINTS)               # (M, 6, 6, 2)
    ogn = np.einsum("enad,ea->end", gn, omega[tri])
    xn = mesh.nodes[tri]
    tau = (G / GJ)[:, None, None] * np.stack(
        [ogn[..., 0] - (xn[..., 1] - yc), ogn[..., 1] + (xn[..., 0] - zc)], -1)

    G_ref, E_ref = float(G_part[reference_part]), float(E_part[reference_part])
    if not (np.isfinite(GJ) and GJ > 0):
        raise GeometryError("section: the torsion solve failed (non-positive GJ); check the parts")
    return TorsionResult(
        J=GJ / G_ref, GJ=GJ, Cw=ECw / E_ref, ECw=ECw,
        zs=float(zc + zs_rel), ys=float(yc + ys_rel), zc=float(zc), yc=float(yc),
        G_ref=G_ref, E_ref=E_ref, mesh=mesh, omega=omega_s, tau=tau,
    )
