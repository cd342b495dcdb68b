"""Exact beam solver: Hermite stiffness method for the nodes, exact polynomial fields inside.

The beam is cut into stiffness *elements* at every support, hinge and stiffness step, so
each element is prismatic; the cubic Hermite shape functions are then its exact homogeneous
solutions, and the load vector built from the loads' exact fixed-end forces (point forces
through the shape functions, couples through their slopes, linear loads by an exact Gauss
rule) gives exact nodal deflections and rotations. Loads do not add elements: many or close
loads neither grow the system nor make short, stiff elements whose ``K d`` would be a
difference of huge terms (that lost equilibrium digits before).

The fields are cut further into *pieces* at every load point and load start/end, so each
piece carries a load linear in x: ``V`` and ``M`` by statics from the left end (reactions
and loads are known), ``v`` is the quintic
``v0 + theta0 s + M0 s^2/(2EI) - V0 s^3/(6EI) + q0 s^4/(24EI) + q1 s^5/(120EI)``, with
``v0, theta0`` of each piece integrated from its element's left node.

The stiffness matrix is symmetric and banded (half-bandwidth 3, 4 with hinges), assembled in
long double, factored once by a banded Cholesky in double and refined with long double
residuals; every *unit case* is a column of the right-hand side; combinations are
superpositions (factor vectors over unit cases). Memory and time are linear in the number
of features.

Public entry point: :func:`respond` (arrays for many stiffness candidates at once);
:func:`leanspan.beam.solve` builds readable results on top of it.

Examples
--------
>>> from leanspan.beam.model import BeamModel, Support, Stiffness, PointLoad
>>> m = BeamModel(4.0, (Support(0.0, "fixed"),), (Stiffness(0.0, 4.0, 2.0e6),),
...               loads=(PointLoad("live", 1000.0, 4.0),))
>>> r = respond(m, unit_self_weight=False)
>>> tip = float(r.v[0, 0, -1, :] @ 4.0 ** np.arange(6))       # deflection at x = 4 m
>>> round(tip / (-1000.0 * 4.0**3 / (3 * 2.0e6)), 12)             # PL^3/(3EI), downward
1.0
>>> [round(x, 9) for x in r.reactions[0, 0, 0].tolist()]   # upward force, ccw moment at the wall
[1000.0, 4000.0]
"""

from __future__ import annotations

import itertools
from dataclasses import dataclass

import numpy as np

from ..errors import BeamError, MechanismError
from .model import FEATURE_GAP, BeamModel, Couple, DeflectionLimit, DistributedLoad, PointLoad

__all__ = ["Response", "ConcreteCombo", "respond", "check_mechanism", "MAX_PATTERN_SPANS"]

MAX_PATTERN_SPANS = 10
"""Pattern loading enumerates 2**n on/off patterns; n is capped here."""


@dataclass(frozen=True)
class ConcreteCombo:
    """One concrete combination: a factor per unit case.

    Attributes
    ----------
    name : str
        ``"ULS"``, or ``"ULS [pattern 1,0,1]"`` for one pattern of a pattern combination.
    check : str
        ``"strength"`` or ``"deflection"``.
    limit : DeflectionLimit or None
        ``limit.allowed(span_length)`` gives the allowed deflection (m).
    factors : ndarray (U,)
        Over ``Response.unit_cases``; the self-weight unit case (1 N/m) carries the factor
        of the self-weight case (multiply by mass_per_length * g).
    parent : str or None
        The model combination a pattern member belongs to (envelope over equal parents).
    pattern : tuple of int or None
        On/off flag per span (``Response.spans``) for pattern members.
    case_factors : dict
        The model combination's own ``{case: factor}``.
    """

    name: str
    check: str
    limit: DeflectionLimit | None
    factors: np.ndarray
    parent: str | None = None
    pattern: tuple | None = None
    case_factors: dict | None = None


@dataclass(frozen=True)
class Response:
    """Exact piecewise-polynomial fields for every unit case (and stiffness candidate).

    Coefficients are ascending powers of ``s = x - x_nodes[e]`` on element ``e``.

    Attributes
    ----------
    x_nodes : (E+1,)  element boundaries
    lengths : (E,)    element lengths
    EI : (K, E)       element stiffness per candidate (K = 1 for the model's own)
    unit_cases : list of str
    M, V : (K or 1, U, E, 4)   bending moment (sagging +), shear (V = -dM/dx)
    theta : (K, U, E, 5)       rotation (counter-clockwise +)
    v : (K, U, E, 6)           deflection (upward +)
    reactions : (K or 1, U, n_supports, 2)  [upward force, counter-clockwise moment]
    supports : tuple of Support (the order of ``reactions``)
    spans : list of (start, end, kind)  kind "span" or "overhang"
    combos : list of ConcreteCombo
    self_weight_index : int or None  index of the 1 N/m self-weight unit case
    """

    x_nodes: np.ndarray
    lengths: np.ndarray
    EI: np.ndarray
    unit_cases: list
    M: np.ndarray
    V: np.ndarray
    theta: np.ndarray
    v: np.ndarray
    reactions: np.ndarray
    supports: tuple
    spans: list
    combos: list
    self_weight_index: int | None


# ---------------------------------------------------------------------------------------
# mesh and unit cases

@dataclass(frozen=True)
class _Mesh:
    """Two levels: *pieces* (cut at every feature, the fields' polynomials) and stiffness
    *elements* (cut only at supports, hinges and stiffness steps: the banded system).

    Loads do not cut elements: their exact fixed-end forces go into the element's load
    vector, so close or many loads neither add degrees of freedom nor make short, stiff
    elements.
    """

    x: np.ndarray         # (n+1,) piece boundaries
    L: np.ndarray         # (n,) piece lengths
    EI: np.ndarray        # (n,) piece stiffness
    elem: np.ndarray      # (n,) element of each piece
    xe: np.ndarray        # (m+1,) element boundaries (the nodes)
    Le: np.ndarray        # (m,) element lengths
    EIe: np.ndarray       # (m,) element stiffness
    node_piece: np.ndarray  # (m+1,) piece boundary index of each node
    support_node: np.ndarray  # node of each model support
    v_dof: np.ndarray     # per node
    th_left: np.ndarray
    th_right: np.ndarray
    edofs: np.ndarray     # (m, 4)
    ndof: int


def _nearest(x, values):
    """Index of the nearest entry of the sorted array ``x`` for each of ``values``."""
    values = np.asarray(values, float)
    i = np.minimum(np.maximum(np.searchsorted(x, values), 1), max(x.size - 1, 1))  # (np.clip is slower)
    return np.where(np.abs(values - x[i - 1]) <= np.abs(x[i] - values), i - 1, i)


def _node_index(x, value):
    return int(_nearest(x, [value])[0])


SNAP = FEATURE_GAP
"""Supports, hinges and stiffness steps closer than SNAP * length share a node."""

LOAD_SNAP = 1e-12
"""Load positions closer than LOAD_SNAP * length share a piece boundary (round-off only)."""


def _merge(pts, tol):
    pts = np.sort(pts)
    return pts[np.concatenate([[True], np.diff(pts) > tol])]


def _load_points(model):
    pts = [np.array([ld.at for ld in model.loads if not isinstance(ld, DistributedLoad)], float)]
    pts += [np.array([[ld.start, ld.end] for ld in model.loads if isinstance(ld, DistributedLoad)],
                     float).reshape(-1)]
    return np.concatenate(pts)


def _mesh(model: BeamModel) -> _Mesh:
    L = model.length
    tol = SNAP * L
    pts = [0.0, L] + [s.at for s in model.supports] + list(model.hinges)
    for p in model.stiffness:
        pts += [p.start, p.end]
    xe = _merge(np.clip(np.asarray(pts, float), 0.0, L), tol)
    if xe[-1] < L - tol:
        xe = np.append(xe, L)
    xe[0], xe[-1] = 0.0, L
    m = xe.size
    mid = 0.5 * (xe[:-1] + xe[1:])
    EIe = np.empty(m - 1)
    for p in model.stiffness:  # few pieces
        EIe[(mid >= p.start) & (mid <= p.end)] = p.EI
    # pieces: the nodes plus every load position (those at a node's round-off take the node)
    lp = np.clip(_load_points(model), 0.0, L)
    lp = lp[np.abs(lp - xe[_nearest(xe, lp)]) > LOAD_SNAP * L]
    x = np.sort(np.concatenate([xe, _merge(lp, LOAD_SNAP * L)])) if lp.size else xe.copy()  # none equal
    node_piece = np.searchsorted(x, xe)
    elem = np.searchsorted(xe, 0.5 * (x[:-1] + x[1:])) - 1
    hinge = np.zeros(m, bool)
    if model.hinges:
        hinge[_nearest(xe, list(model.hinges))] = True
    # per node: v, theta (left), theta (right, a separate dof only at a hinge); banded order
    step = 2 + hinge
    v_dof = np.concatenate([[0], np.cumsum(step)[:-1]])
    th_left = v_dof + 1
    th_right = np.where(hinge, v_dof + 2, th_left)
    edofs = np.stack([v_dof[:-1], th_right[:-1], v_dof[1:], th_left[1:]], axis=1)
    support_node = _nearest(xe, [sp.at for sp in model.supports])
    return _Mesh(x, np.diff(x), EIe[elem], elem, xe, np.diff(xe), EIe, node_piece, support_node, v_dof, th_left,
                 th_right, edofs, int(step.sum()))


def _span_index(spans, x):
    starts = np.array([s[0] for s in spans])
    return np.clip(np.searchsorted(starts, x, side="right") - 1, 0, len(spans) - 1)


def _unit_cases(model, mesh, unit_self_weight, pattern_cases):
    """Names, point forces/couples at the piece boundaries (U, n+1) and piece loads q0, q1
    (U, n), upward +."""
    spans = model.spans
    names = list(model.cases)
    sub = {}
    for case in pattern_cases:
        sub[case] = len(names)
        names += [f"{case} [span {j + 1}]" for j in range(len(spans))]
    sw = None
    if unit_self_weight:
        sw = len(names)
        names.append("self-weight" if "self-weight" not in names else "self-weight (1 N/m)")
    U, n, E = len(names), mesh.x.size, mesh.L.size
    P = np.zeros((U, n))
    C = np.zeros((U, n))
    q0 = np.zeros((U, E))
    q1 = np.zeros((U, E))
    x0 = mesh.x[:-1]
    espan = _span_index(spans, 0.5 * (x0 + mesh.x[1:]))
    case_of = {c: i for i, c in enumerate(names)}
    conc = [ld for ld in model.loads if not isinstance(ld, DistributedLoad)]
    if conc:  # point loads and couples, vectorised (there may be many)
        at = _nearest(mesh.x, [ld.at for ld in conc])
        u = np.array([case_of[ld.case] for ld in conc])
        val = np.array([-ld.P if isinstance(ld, PointLoad) else ld.M for ld in conc])
        is_p = np.array([isinstance(ld, PointLoad) for ld in conc])
        pat = np.array([ld.case in sub for ld in conc])
        rows = np.array([sub.get(ld.case, 0) for ld in conc]) + _span_index(spans, mesh.x[at])
        for target, mask in ((P, is_p), (C, ~is_p)):
            np.add.at(target, (u[mask], at[mask]), val[mask])
            np.add.at(target, (rows[mask & pat], at[mask & pat]), val[mask & pat])
    dist = [ld for ld in model.loads if isinstance(ld, DistributedLoad)]
    bounds = _nearest(mesh.x, [x for ld in dist for x in (ld.start, ld.end)]).reshape(-1, 2).tolist()
    for ld, (i0, i1) in zip(dist, bounds):  # distributed loads are few; each touches only its own pieces
        u = case_of[ld.case]
        sl = slice(i0, i1)
        slope = (ld.w2 - ld.w1) / (ld.end - ld.start)
        a = -(ld.w1 + slope * (x0[sl] - ld.start))
        q0[u, sl] += a
        q1[u, sl] -= slope
        if ld.case in sub:
            rows = sub[ld.case] + espan[sl]
            idx = np.arange(i0, i1)
            np.add.at(q0, (rows, idx), a)
            np.add.at(q1, (rows, idx), -slope)
    if sw is not None:
        q0[sw] = -1.0
    return names, P, C, q0, q1, sw


def _combos(model, names, sw, self_weight_case):
    spans = model.spans
    out = []
    for c in model.combinations:
        base = np.zeros(len(names))
        for case, f in c.factors:
            if case != c.pattern:
                base[names.index(case)] += f
            if sw is not None and case == self_weight_case:
                base[sw] += f
        cf = dict(c.factors)
        if c.pattern is None:
            out.append(ConcreteCombo(c.name, c.check, c.limit, base, None, None, cf))
            continue
        first = names.index(f"{c.pattern} [span 1]")
        for bits in itertools.product((1, 0), repeat=len(spans)):
            f = base.copy()
            f[first:first + len(spans)] = cf[c.pattern] * np.array(bits, float)
            label = f"{c.name} [pattern {','.join(map(str, bits))}]"
            out.append(ConcreteCombo(label, c.check, c.limit, f, c.name, bits, cf))
    return out


# ---------------------------------------------------------------------------------------
# kinematics

def check_mechanism(model: BeamModel) -> None:
    """Raise :class:`MechanismError` if the supports and hinges leave a rigid-body motion.

    The beam is a chain of rigid pieces between hinges (``v = a + b x`` on each); supports
    and hinge continuity are linear constraints on ``(a, b)``. Any null vector is a motion
    without bending; the message says which part moves.

    >>> from leanspan.beam.model import BeamModel, Support, Stiffness
    >>> check_mechanism(BeamModel(8.0, (Support(0.0, "pin"), Support(4.0, "roller")),
    ...                           (Stiffness(0.0, 8.0, 1e6),), hinges=(6.0,)))
    Traceback (most recent call last):
    ...
    leanspan.errors.MechanismError: beam is a mechanism: the part from x = 6 m to x = 8 m can move without bending (it can rotate about the hinge at x = 6 m); add a support or remove a hinge there
    """
    L = model.length
    cuts = [0.0, *model.hinges, L]
    nseg = len(cuts) - 1
    rows = []
    for j, h in enumerate(model.hinges):  # deflection continuous across each hinge
        r = np.zeros(2 * nseg)
        r[2 * j: 2 * j + 2] = [1.0, h / L]
        r[2 * j + 2: 2 * j + 4] = [-1.0, -h / L]
        rows.append(r)
    for s in model.supports:
        j = min(int(np.searchsorted(cuts, s.at, side="right")) - 1, nseg - 1)
        if s.vertical:
            r = np.zeros(2 * nseg)
            r[2 * j: 2 * j + 2] = [1.0, s.at / L]
            rows.append(r)
        if s.rotational:
            r = np.zeros(2 * nseg)
            r[2 * j + 1] = 1.0
            rows.append(r)
    A = np.array(rows) if rows else np.zeros((0, 2 * nseg))
    if A.shape[0]:
        _, sv, vt = np.linalg.svd(A)
        rank = int(np.sum(sv > 1e-10 * sv[0]))
    else:
        vt, rank = np.eye(2 * nseg), 0
    if rank == 2 * nseg:
        return
    if not any(s.vertical for s in model.supports):
        raise MechanismError("beam is a mechanism: no vertical restraint anywhere "
                             "(add a pin, roller, fixed or spring-k support)")
    null = vt[rank:]
    # the first null vector with the biggest motion tells where the beam is free
    vec = null[np.argmax(np.abs(null).max(axis=1))]
    ends = np.array([[vec[2 * j] + vec[2 * j + 1] * cuts[j] / L,
                      vec[2 * j] + vec[2 * j + 1] * cuts[j + 1] / L] for j in range(nseg)])
    scale = np.abs(ends).max()
    moving = [j for j in range(nseg) if np.abs(ends[j]).max() > 1e-8 * scale]
    lo, hi = cuts[moving[0]], cuts[moving[-1] + 1]
    a, b = vec[2 * moving[0]], vec[2 * moving[0] + 1]
    hint = ""
    slopes = [vec[2 * j + 1] for j in moving]
    folds = [cuts[j + 1] for j, k in zip(moving[:-1], moving[1:])
             if abs(slopes[moving.index(k)] - slopes[moving.index(j)]) > 1e-8 * scale]
    if folds:  # several pieces moving together: say where the chain folds and what it turns about
        still = [s.at for s in model.supports if s.vertical and lo - 1e-9 * L <= s.at <= hi + 1e-9 * L]
        where = " and ".join(f"x = {x + 0.0:.4g} m" for x in folds)
        about = (f", turning about the support{'s' if len(still) > 1 else ''} at "
                 + " and ".join(f"x = {x + 0.0:.4g} m" for x in still)) if still else ""
        hint = f" (it folds at the hinge{'s' if len(folds) > 1 else ''} at {where}{about})"
    elif abs(b) > 1e-8 * scale:
        pivot = -a / b * L
        if lo - 1e-9 * L <= pivot <= hi + 1e-9 * L:
            near = [h for h in model.hinges if abs(h - pivot) <= 1e-9 * L]
            near_s = [s.at for s in model.supports if abs(s.at - pivot) <= 1e-9 * L]
            what = "the hinge" if near else "the support" if near_s else ""
            pivot = (near or near_s or [pivot])[0]  # the feature's own position, free of round-off
            hint = f" (it can rotate about {what + ' at ' if what else ''}x = {pivot + 0.0:.4g} m)"
    else:
        hint = " (it can slide up and down)"
    raise MechanismError(f"beam is a mechanism: the part from x = {lo:.4g} m to x = {hi:.4g} m can move "
                         f"without bending{hint}; add a support or remove a hinge there")


# ---------------------------------------------------------------------------------------
# assembly and solution

_K0 = np.array([[12, 0, -12, 0], [0, 0, 0, 0], [-12, 0, 12, 0], [0, 0, 0, 0]], float)
_K1 = np.array([[0, 6, 0, 6], [6, 0, -6, 0], [0, -6, 0, -6], [6, 0, -6, 0]], float)
_K2 = np.array([[0, 0, 0, 0], [0, 4, 0, 2], [0, 0, 0, 0], [0, 2, 0, 4]], float)


def _element_stiffness(L, EI):
    """Hermite beam element stiffness (..., 4, 4) in double (worked out in the precision of ``L``):
    ``EI / L^3`` times the constant, ``L`` and ``L^2`` terms [[12, 6L, -12, 6L], [6L, 4L^2, -6L,
    2L^2], ...] (any stiffness-method text)."""
    c = (EI / L**3)[..., None, None]
    Lk = L[..., None, None]
    return ((_K0.astype(L.dtype) + _K1.astype(L.dtype) * Lk + _K2.astype(L.dtype) * (Lk * Lk)) * c).astype(float)


_GAUSS = (np.array([-np.sqrt(0.6), 0.0, np.sqrt(0.6)]), np.array([5.0, 8.0, 5.0]) / 9.0)
"""3-point Gauss-Legendre rule on [-1, 1]: exact for the quartic N_i(s) q(s)."""


def _hermite(s, L, derivative=False):
    """Cubic Hermite shape functions (or their slopes) at ``s`` on elements of length ``L``: (..., 4)."""
    t = s / L
    if derivative:
        return np.stack([6 * (t * t - t) / L, 1 - 4 * t + 3 * t * t, 6 * (t - t * t) / L, 3 * t * t - 2 * t], -1)
    return np.stack([1 - t * t * (3 - 2 * t), L * t * (1 - t) ** 2, t * t * (3 - 2 * t), L * t * t * (t - 1)], -1)


def _load_vector(mesh, P, C, q0, q1):
    """Exact fixed-end forces of all loads, assembled: (ndof, U).

    Point forces work through the shape functions at their position, couples through their
    slopes, piece loads ``q0 + q1 t`` by a Gauss rule that is exact for them; the pieces and
    boundaries of one element are contiguous, so ``reduceat`` sums them per element.
    """
    x0 = mesh.xe[mesh.elem]
    Lp = mesh.L[:, None]
    g, w = _GAUSS
    t = Lp * (1 + g[None, :]) / 2  # (n, 3) Gauss points on each piece
    N = _hermite(mesh.x[:-1, None] - x0[:, None] + t, mesh.Le[mesh.elem][:, None])  # (n, 3, 4)
    q = q0[:, :, None] + q1[:, :, None] * t[None]  # (U, n, 3)
    fq = np.einsum("ung,ngk->nku", q * (w * Lp / 2)[None], N)
    belem = np.append(mesh.elem, mesh.elem[-1])  # each boundary belongs to the element on its right
    s = mesh.x - mesh.xe[belem]
    Lb = mesh.Le[belem]
    fc = _hermite(s, Lb)[:, :, None] * P.T[:, None, :] + _hermite(s, Lb, True)[:, :, None] * C.T[:, None, :]
    first = mesh.node_piece[:-1]
    fe = np.add.reduceat(fq, first, axis=0) + np.add.reduceat(fc, first, axis=0)  # (m, 4, U)
    F = np.zeros((mesh.ndof, P.shape[0]))
    for a in range(4):  # each local dof number meets every global dof at most once
        F[mesh.edofs[:, a]] += fe[:, a]
    return F


def _band(mesh, dtype=np.longdouble):
    """Stiffness matrix in upper band storage ``ab[u + i - j, j] = K[i, j]``: (u + 1, ndof)."""
    Ke = _element_stiffness(mesh.Le.astype(dtype), mesh.EIe.astype(dtype))
    u = int((mesh.edofs[:, 3] - mesh.edofs[:, 0]).max())
    ab = np.zeros((u + 1, mesh.ndof), dtype)
    a, b = np.triu_indices(4)  # the upper triangle of each element, pair by pair
    i, j = mesh.edofs[:, a].T, mesh.edofs[:, b].T  # (10, m)
    np.add.at(ab, (u + i - j, j), Ke[:, a, b].T)
    return ab


def _band_matvec(ab, x):
    """``A x`` for symmetric ``A`` in upper band storage; ``x`` (..., n, U) in ``ab``'s precision."""
    u = ab.shape[0] - 1
    y = ab[u][:, None] * x
    for d in range(1, u + 1):  # off-diagonals
        a = ab[u - d, d:][:, None]
        y[..., :-d, :] += a * x[..., d:, :]
        y[..., d:, :] += a * x[..., :-d, :]
    return y


def _restrain(ab, fixed):
    """Band with the rows and columns of ``fixed`` dofs set to zero (the caller puts 1 on their
    diagonal, so that d = 0 there)."""
    u = ab.shape[0] - 1
    out = ab.copy()
    mask = np.zeros(ab.shape[1], bool)
    mask[fixed] = True
    for d in range(u + 1):
        hit = mask[d:] | mask[:ab.shape[1] - d]  # column j or row j - d restrained
        out[u - d, d:][hit] = 0.0
    return out


def _singular():
    return MechanismError("beam: the stiffness system is singular or not finite (a spring far too soft "
                          "for the beam, or stiffnesses out of range); stiffen the springs or add a support")


def _supports_dofs(model, mesh):
    fixed, springs = [], []  # (dof, support index, component) / (dof, stiffness, support index, component)
    for i, (s, n) in enumerate(zip(model.supports, mesh.support_node.tolist())):
        if s.fixes_v:
            fixed.append((mesh.v_dof[n], i, 0))
        if s.fixes_theta:
            fixed.append((mesh.th_left[n], i, 1))
        if s.type == "spring":
            if s.k is not None:
                springs.append((mesh.v_dof[n], s.k, i, 0))
            if s.kr is not None:
                springs.append((mesh.th_left[n], s.kr, i, 1))
    return fixed, springs


DENSE_LIMIT = 300
"""Systems up to this many unknowns are factored densely by numpy (no scipy import on the
hot path of a small job); larger ones by scipy's banded Cholesky."""


def _cholesky_solver(ab):
    """``solve(b)`` for the symmetric positive definite matrix in upper band storage ``ab``
    (float): a dense numpy Cholesky factor for small systems, scipy's banded one for large.
    Raises ``numpy.linalg.LinAlgError`` when the matrix is not positive definite.

    >>> ab = np.array([[0.0, -1.0], [2.0, 2.0]])          # [[2, -1], [-1, 2]]
    >>> np.round(_cholesky_solver(ab)(np.array([1.0, 1.0])), 12).tolist()
    [1.0, 1.0]
    """
    u, n = ab.shape[0] - 1, ab.shape[1]
    if n > DENSE_LIMIT:
        from scipy.linalg import cho_solve_banded, cholesky_banded

        cb = cholesky_banded(ab, lower=False)
        return lambda b: cho_solve_banded((cb, False), b)
    A = np.diag(ab[u])
    for k in range(1, u + 1):  # the band's few diagonals
        A += np.diag(ab[u - k, k:], k) + np.diag(ab[u - k, k:], -k)
    L = np.linalg.cholesky(A)

    def solve(b):
        return np.linalg.solve(L.T, np.linalg.solve(L, b))
    return solve


def _refined_solve(ab, b, steps: int = 2):
    """Solve ``A x = b`` (``A`` symmetric positive definite, long double upper band) by a
    double-precision banded Cholesky factor and iterative refinement; the iterate and its
    residuals are kept in long double. Returns ``x`` in long double.

    Short elements next to soft springs make ``A`` ill-conditioned (element terms EI/L^3 far
    above k); the extended-precision residual recovers the lost digits.
    """
    try:
        with np.errstate(all="ignore"):
            factor_solve = _cholesky_solver(ab.astype(float))
            x = factor_solve(b).astype(ab.dtype)
            bl = b.astype(ab.dtype)
            for _ in range(steps):
                r = (bl - _band_matvec(ab, x)).astype(float)
                x += factor_solve(r)
    except (np.linalg.LinAlgError, ValueError):
        raise _singular() from None
    if not np.all(np.isfinite(x)):
        raise _singular()
    return x


def _spring_batch_solve(ab, restrained, springs, F, ratio):
    """Solve ``(r K + diag(springs)) d = F`` for every stiffness ratio ``r`` in ``ratio``
    (``ab``: ``K`` in long double band storage with the rows and columns of restrained dofs
    zero; ``restrained`` is 1 on those dofs, whose identity rows are not scaled).

    Only the few spring terms differ from a reference system ``A0 = r0 K + S`` (``r0`` the
    geometric mean of the ratios): ``r K + S = (r / r0) (A0 + c S)`` with ``c = r0 / r - 1``,
    a low-rank change, so the Woodbury identity gives every candidate from one refined solve
    of ``A0`` and an m x m solve per candidate (m = number of spring terms):
    ``(A0 + E C E^T)^-1 F = u0 - G C (I + H C)^-1 E^T u0`` with ``u0 = A0^-1 F``,
    ``G = A0^-1 E`` and ``H = E^T G``.

    Returns (R, n, U) displacements.
    """
    sp = np.flatnonzero(springs)
    m, n, U = sp.size, ab.shape[1], F.shape[1]
    r0 = float(np.exp(np.mean(np.log(ratio))))
    u = ab.shape[0] - 1
    A0 = r0 * ab
    A0[u] += springs + restrained
    E = np.zeros((n, m))
    E[sp, np.arange(m)] = 1.0
    sol = _refined_solve(A0, np.concatenate([F, E], axis=1)).astype(float)
    u0, G = sol[:, :U], sol[:, U:]
    H = G[sp]  # (m, m) flexibility of the reference system at the spring terms
    C = (r0 / ratio - 1.0)[:, None] * springs[sp][None, :]  # (R, m): diagonal of c S
    Msys = np.eye(m)[None] + H[None] * C[:, None, :]  # I + H diag(C)
    try:
        with np.errstate(all="ignore"):
            y = np.linalg.solve(Msys, np.broadcast_to(u0[sp], (ratio.size, m, U)))
            corr = np.einsum("nm,rmu->rnu", G, C[:, :, None] * y)
            out = (r0 / ratio)[:, None, None] * (u0[None] - corr)
    except np.linalg.LinAlgError:
        raise _singular() from None
    if not np.all(np.isfinite(out)):
        raise _singular()
    return out


def respond(model: BeamModel, EI=None, unit_self_weight: bool = True, self_weight_case: str | None = None,
            ) -> Response:
    """Solve every unit case exactly, for the model's stiffness or for K candidates at once.

    Parameters
    ----------
    model : BeamModel
    EI : array_like (K,), optional
        Candidate flexural stiffnesses (N m^2) of a prismatic member; ``None`` uses the
        model's own stiffness (which may be stepped).
    unit_self_weight : bool
        Add a unit case "self-weight": 1 N/m downward over the whole length.
    self_weight_case : str, optional
        The case whose combination factor goes onto the self-weight unit case
        (default: the model's ``self_weight``).

    Returns
    -------
    Response
        Without springs the forces do not depend on EI (leading axis 1) and v, theta scale
        with 1/EI (one solve); with springs the K systems are solved as one batch.

    Raises
    ------
    MechanismError
        Supports and hinges leave a rigid-body motion.
    BeamError
        Candidate stiffnesses for a stepped member, non-positive EI, too many pattern spans.
    """
    check_mechanism(model)
    with np.errstate(all="ignore"):  # a non-finite result is turned into an error below
        out = _respond(model, EI, unit_self_weight, self_weight_case)
    if not all(np.all(np.isfinite(a)) for a in (out.M, out.v, out.reactions)):
        raise _singular()
    return out


def _respond(model, EI, unit_self_weight, self_weight_case):
    mesh = _mesh(model)
    sw_case = self_weight_case if self_weight_case is not None else model.self_weight
    pattern_cases = list(dict.fromkeys(c.pattern for c in model.combinations if c.pattern))
    if pattern_cases and len(model.spans) > MAX_PATTERN_SPANS:
        raise BeamError(f"combination.pattern: {len(model.spans)} spans would need 2^{len(model.spans)} "
                        f"patterns; at most {MAX_PATTERN_SPANS} spans are supported")
    names, P, C, q0, q1, sw = _unit_cases(model, mesh, unit_self_weight, pattern_cases)
    combos = _combos(model, names, sw, sw_case)
    fixed, springs = _supports_dofs(model, mesh)

    ratio = None
    if EI is not None:
        EI = np.atleast_1d(np.asarray(EI, float))
        if EI.ndim != 1 or not np.all(np.isfinite(EI)) or np.any(EI <= 0):
            raise BeamError("EI: candidate stiffnesses must be a 1-D array of positive finite values")
        if not model.prismatic:
            raise BeamError("EI: candidate stiffnesses need a prismatic beam (one EI along the length)")
        ratio = EI / mesh.EI[0]

    # assembled in long double: short stiff elements then keep their rigid-body modes free of
    # spurious stiffness far below round-off of EI/L^3 (which would pollute soft springs)
    Kb = _band(mesh)
    S = np.zeros(mesh.ndof)
    for dof, k, _, _ in springs:
        S[dof] += k
    F = _load_vector(mesh, P, C, q0, q1)
    fixed_dofs = np.array([f[0] for f in fixed], int)
    restrained = np.zeros(mesh.ndof)
    restrained[fixed_dofs] = 1.0  # identity rows: d = 0 there
    Kz = _restrain(Kb, fixed_dofs)
    Ff = F.copy()
    Ff[fixed_dofs] = 0.0
    batched = ratio is not None and bool(springs)
    if batched:
        d = _spring_batch_solve(Kz, restrained, S, Ff, ratio)
        kfac = ratio
    else:
        Kz[-1] += S + restrained
        d = _refined_solve(Kz, Ff)[None]
        kfac = np.ones(1)
    nk = d.shape[0]

    # reactions (nk, U, nsup, 2): rigid ones from K d - F (in long double, from the long double
    # solution where there is one), springs -k d
    R = np.zeros((nk, len(names), len(model.supports), 2))
    if fixed:
        Kd = _band_matvec(Kb, d.astype(np.longdouble))[:, fixed_dofs]
        Rf = (kfac[:, None, None].astype(np.longdouble) * Kd - F[fixed_dofs][None]).astype(float)
        for r, (_, i, comp) in enumerate(fixed):
            R[:, :, i, comp] += Rf[:, r]
    d = d.astype(float)
    for dof, k, i, comp in springs:
        R[:, :, i, comp] -= k * d[:, dof]

    # statics from the left: concentrated forces and couples at piece boundaries, with reactions
    Fn = np.broadcast_to(P, (nk,) + P.shape).copy()
    Cn = np.broadcast_to(C, (nk,) + C.shape).copy()
    at = mesh.node_piece[mesh.support_node]
    np.add.at(Fn, (slice(None), slice(None), at), R[..., 0])  # support by support, as a loop would
    np.add.at(Cn, (slice(None), slice(None), at), R[..., 1])
    Le = mesh.L
    Q = q0 * Le + q1 * Le**2 / 2  # load resultant on each piece (upward)
    excl = lambda a: np.concatenate([np.zeros(a.shape[:-1] + (1,)), np.cumsum(a, -1)[..., :-1]], -1)  # noqa: E731
    V0 = -np.cumsum(Fn, -1)[..., :-1] - excl(Q)[None]
    dM = -V0 * Le + q0 * Le**2 / 2 + q1 * Le**3 / 6
    M0 = -np.cumsum(Cn, -1)[..., :-1] + excl(dM)
    q0b = np.broadcast_to(q0, V0.shape)
    q1b = np.broadcast_to(q1, V0.shape)
    zeros = np.zeros_like(V0)
    Mc = np.stack([M0, -V0, q0b / 2, q1b / 6], -1)
    Vc = np.stack([V0, -q0b, -q1b / 2, zeros], -1)
    EIk = kfac[:, None] * mesh.EI[None]  # (nk, n)
    inv = 1.0 / EIk[:, None, :]
    bend = np.stack([M0 * inv / 2, -V0 * inv / 6, q0b * inv / 24, q1b * inv / 120], -1)  # s^2 .. s^5
    # v, theta at each piece start: the element's left node, then integrated along its pieces
    powers = Le[:, None] ** np.arange(1, 6)
    dth = np.sum(bend * np.arange(2, 6) * powers[:, :4], -1)
    first = mesh.node_piece[:-1]

    def along(a):  # sum of a over the earlier pieces of the same element
        ex = excl(a)
        return ex - ex[..., first][..., mesh.elem]

    node = lambda dofs: d[:, dofs[:-1][mesh.elem], :].transpose(0, 2, 1)  # noqa: E731
    t0 = node(mesh.th_right) + along(dth)
    v0 = node(mesh.v_dof) + along(t0 * Le + np.sum(bend * powers[:, 1:], -1))
    vc = np.concatenate([v0[..., None], t0[..., None], bend], -1)
    EIout = EIk
    if ratio is not None and not batched:
        # no springs: forces do not depend on EI, deflections scale with 1/EI
        vc = vc / ratio[:, None, None, None]
        EIout = ratio[:, None] * mesh.EI[None]
    tc = vc[..., 1:] * np.arange(1, 6)
    return Response(mesh.x, mesh.L, EIout, names, Mc, Vc, tc, vc, R, model.supports,
                    list(model.spans), combos, sw)
