"""Exact beam solver: Hermite stiffness method for the nodes, exact polynomial fields inside.

The beam is cut into elements at every support, hinge, load point, load start/end and
stiffness step, so each element is prismatic and carries a load that is linear in x.
For such an element the cubic Hermite shape functions are exact homogeneous solutions
and the consistent load vector equals the exact fixed-end forces, so the nodal
deflections and rotations are exact. Inside each element the fields follow exactly:
``V`` and ``M`` by statics from the left end (reactions and loads are known), ``v`` is
the quintic ``v0 + theta0 s + M0 s^2/(2EI) - V0 s^3/(6EI) + q0 s^4/(24EI) + q1 s^5/(120EI)``.

The stiffness matrix is factored once and every *unit case* is a column of the
right-hand side; combinations are superpositions (factor vectors over unit cases).

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
    x: np.ndarray
    L: np.ndarray
    EI: np.ndarray
    v_dof: np.ndarray
    th_left: np.ndarray
    th_right: np.ndarray
    edofs: np.ndarray
    ndof: int


def _node_index(x, value):
    return int(np.argmin(np.abs(x - value)))


SNAP = FEATURE_GAP
"""Feature positions closer than SNAP * length share a node (short elements are ill-conditioned)."""


def _mesh(model: BeamModel) -> _Mesh:
    L = model.length
    tol = SNAP * L
    pts = [0.0, L]
    pts += [s.at for s in model.supports] + list(model.hinges)
    for p in model.stiffness:
        pts += [p.start, p.end]
    for ld in model.loads:
        pts += [ld.start, ld.end] if isinstance(ld, DistributedLoad) else [ld.at]
    pts = np.sort(np.clip(np.asarray(pts, float), 0.0, L))
    keep = np.concatenate([[True], np.diff(pts) > tol])
    x = pts[keep]
    if x[-1] < L - tol:
        x = np.append(x, L)
    x[0], x[-1] = 0.0, L
    n = x.size
    mid = 0.5 * (x[:-1] + x[1:])
    EI = np.empty(n - 1)
    for p in model.stiffness:  # few pieces
        EI[(mid >= p.start) & (mid <= p.end)] = p.EI
    hinge_nodes = {_node_index(x, h) for h in model.hinges}
    v_dof = np.empty(n, int)
    th_left = np.empty(n, int)
    th_right = np.empty(n, int)
    k = 0
    for i in range(n):  # one pass over nodes to number the degrees of freedom
        v_dof[i], th_left[i] = k, k + 1
        k += 2
        if i in hinge_nodes:
            th_right[i] = k
            k += 1
        else:
            th_right[i] = th_left[i]
    edofs = np.stack([v_dof[:-1], th_right[:-1], v_dof[1:], th_left[1:]], axis=1)
    return _Mesh(x, np.diff(x), EI, v_dof, th_left, th_right, edofs, k)


def _span_index(spans, x):
    starts = np.array([s[0] for s in spans])
    return np.clip(np.searchsorted(starts, x, side="right") - 1, 0, len(spans) - 1)


def _unit_cases(model, mesh, unit_self_weight, pattern_cases):
    """Names, nodal point forces/couples (U, N) and element loads q0, q1 (U, E), upward +."""
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
    x0, x1 = mesh.x[:-1], mesh.x[1:]
    tol = SNAP * model.length
    espan = _span_index(spans, 0.5 * (x0 + x1))
    for ld in model.loads:  # loads are a small set; each is vectorised over elements
        u = names.index(ld.case)
        if isinstance(ld, DistributedLoad):
            inside = (x0 >= ld.start - tol) & (x1 <= ld.end + tol)
            slope = (ld.w2 - ld.w1) / (ld.end - ld.start)
            a = np.where(inside, -(ld.w1 + slope * (x0 - ld.start)), 0.0)
            b = np.where(inside, -slope, 0.0)
            q0[u] += a
            q1[u] += b
            if ld.case in sub:
                rows = sub[ld.case] + espan
                np.add.at(q0, (rows, np.arange(E)), a)
                np.add.at(q1, (rows, np.arange(E)), b)
        else:
            i = _node_index(mesh.x, ld.at)
            target, val = (P, -ld.P) if isinstance(ld, PointLoad) else (C, ld.M)
            target[u, i] += val
            if ld.case in sub:
                target[sub[ld.case] + _span_index(spans, mesh.x[i]), i] += val
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

def _element_stiffness(L, EI):
    c = EI / L**3
    k = np.empty(L.shape + (4, 4))
    L2 = L * L
    k[..., 0, :] = np.stack([12 * c, 6 * L * c, -12 * c, 6 * L * c], -1)
    k[..., 1, :] = np.stack([6 * L * c, 4 * L2 * c, -6 * L * c, 2 * L2 * c], -1)
    k[..., 2, :] = np.stack([-12 * c, -6 * L * c, 12 * c, -6 * L * c], -1)
    k[..., 3, :] = np.stack([6 * L * c, 2 * L2 * c, -6 * L * c, 4 * L2 * c], -1)
    return k


def _consistent_loads(L, q0, q1):
    """Exact fixed-end forces of q = q0 + q1 s on each element: (U, E, 4)."""
    L2 = L * L
    return np.stack([L * (q0 / 2 + 3 * q1 * L / 20),
                     L2 * (q0 / 12 + q1 * L / 30),
                     L * (q0 / 2 + 7 * q1 * L / 20),
                     -L2 * (q0 / 12 + q1 * L / 20)], axis=-1)


def _supports_dofs(model, mesh):
    fixed, springs = [], []  # (dof, support index, component) / (dof, stiffness, support index, component)
    for i, s in enumerate(model.supports):
        n = _node_index(mesh.x, s.at)
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


def _refined_solve(A, b, steps: int = 2):
    """Solve stacked systems ``A x = b`` (``A`` in long double) by double-precision LU with
    iterative refinement (residuals in long double).

    Short elements next to soft springs make ``A`` ill-conditioned (element terms EI/L^3 far
    above k); refinement with an extended-precision residual recovers full double accuracy.
    """
    Ad = A.astype(float)
    x = np.linalg.solve(Ad, b)
    Al, bl = A.astype(np.longdouble), b.astype(np.longdouble)
    for _ in range(steps):
        r = (bl - np.matmul(Al, x.astype(np.longdouble))).astype(float)
        x = x + np.linalg.solve(Ad, r)
    return x


def _spring_batch_solve(K, springs, F, ratio):
    """Solve ``(r K + diag(springs)) d = F`` for every stiffness ratio ``r`` in ``ratio``.

    Only the few spring terms differ from a reference system ``A0 = r0 K + S`` (``r0`` the
    geometric mean of the ratios): ``r K + S = (r / r0) (A0 + c S)`` with ``c = r0 / r - 1``,
    a low-rank change, so the Woodbury identity gives every candidate from one refined solve
    of ``A0`` and an m x m solve per candidate (m = number of spring terms):
    ``(A0 + E C E^T)^-1 F = u0 - G C (I + H C)^-1 E^T u0`` with ``u0 = A0^-1 F``,
    ``G = A0^-1 E`` and ``H = E^T G``.

    Returns (R, n, U) displacements.
    """
    sp = np.flatnonzero(springs)
    m, n, U = sp.size, K.shape[0], F.shape[1]
    r0 = float(np.exp(np.mean(np.log(ratio))))
    A0 = r0 * K + np.diag(springs).astype(K.dtype)
    E = np.zeros((n, m))
    E[sp, np.arange(m)] = 1.0
    sol = _refined_solve(A0[None], np.concatenate([F, E], axis=1)[None])[0]
    u0, G = sol[:, :U], sol[:, U:]
    H = G[sp]  # (m, m) flexibility of the reference system at the spring terms
    C = (r0 / ratio - 1.0)[:, None] * springs[sp][None, :]  # (R, m): diagonal of c S
    Msys = np.eye(m)[None] + H[None] * C[:, None, :]  # I + H diag(C)
    y = np.linalg.solve(Msys, np.broadcast_to(u0[sp], (ratio.size, m, U)))
    corr = np.einsum("nm,rmu->rnu", G, C[:, :, None] * y)
    return (r0 / ratio)[:, None, None] * (u0[None] - corr)


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
    LD = np.longdouble
    Ke = _element_stiffness(mesh.L.astype(LD), mesh.EI.astype(LD))
    Kl = np.zeros((mesh.ndof, mesh.ndof), LD)
    np.add.at(Kl, (mesh.edofs[:, :, None], mesh.edofs[:, None, :]), Ke)
    K = Kl.astype(float)
    S = np.zeros(mesh.ndof)
    for dof, k, _, _ in springs:
        S[dof] += k
    F = np.zeros((mesh.ndof, len(names)))
    fe = _consistent_loads(mesh.L, q0, q1)  # (U, E, 4)
    np.add.at(F, mesh.edofs.ravel(), fe.transpose(1, 2, 0).reshape(-1, len(names)))
    np.add.at(F, mesh.v_dof, P.T)
    # couples act on the rotation of the element to the right (never at a hinge: checked in the model)
    np.add.at(F, mesh.th_left, C.T)
    fixed_dofs = np.array([f[0] for f in fixed], int)
    free = np.setdiff1d(np.arange(mesh.ndof), fixed_dofs)
    Kff = Kl[np.ix_(free, free)]
    batched = ratio is not None and bool(springs)
    if batched:
        d_free = _spring_batch_solve(Kff, S[free], F[free], ratio)
        kfac = ratio
    else:
        d_free = _refined_solve((Kff + np.diag(S[free]).astype(LD))[None], F[free][None])
        kfac = np.ones(1)
    nk = d_free.shape[0]
    d = np.zeros((nk, mesh.ndof, len(names)))
    d[:, free] = d_free

    # reactions (nk, U, nsup, 2): rigid ones from K d - F, springs -k d
    R = np.zeros((nk, len(names), len(model.supports), 2))
    if fixed:
        # K d - F in extended precision: stiff short elements make it a difference of large terms
        Kr = Kl[fixed_dofs]
        Rf = (kfac[:, None, None].astype(np.longdouble) * np.matmul(Kr[None], d.astype(np.longdouble))
              - F[fixed_dofs][None]).astype(float)
        for r, (_, i, comp) in enumerate(fixed):
            R[:, :, i, comp] += Rf[:, r]
    for dof, k, i, comp in springs:
        R[:, :, i, comp] -= k * d[:, dof]

    # statics from the left: nodal concentrated forces and couples including reactions
    Fn = np.broadcast_to(P, (nk,) + P.shape).copy()
    Cn = np.broadcast_to(C, (nk,) + C.shape).copy()
    for i, s in enumerate(model.supports):
        n = _node_index(mesh.x, s.at)
        Fn[:, :, n] += R[:, :, i, 0]
        Cn[:, :, n] += R[:, :, i, 1]
    Le = mesh.L
    Q = q0 * Le + q1 * Le**2 / 2  # load resultant on each element (upward)
    excl = lambda a: np.concatenate([np.zeros(a.shape[:-1] + (1,)), np.cumsum(a, -1)[..., :-1]], -1)  # noqa: E731
    V0 = -np.cumsum(Fn, -1)[..., :-1] - excl(Q)[None]
    dM = -V0 * Le + q0 * Le**2 / 2 + q1 * Le**3 / 6
    M0 = -np.cumsum(Cn, -1)[..., :-1] + excl(dM)
    q0b = np.broadcast_to(q0, V0.shape)
    q1b = np.broadcast_to(q1, V0.shape)
    zeros = np.zeros_like(V0)
    Mc = np.stack([M0, -V0, q0b / 2, q1b / 6], -1)
    Vc = np.stack([V0, -q0b, -q1b / 2, zeros], -1)
    EIk = kfac[:, None] * mesh.EI[None]  # (nk, E)
    inv = 1.0 / EIk[:, None, :]
    v0 = d[:, mesh.v_dof[:-1], :].transpose(0, 2, 1)
    t0 = d[:, mesh.th_right[:-1], :].transpose(0, 2, 1)
    vc = np.stack([v0, t0, M0 * inv / 2, -V0 * inv / 6, q0b * inv / 24, q1b * inv / 120], -1)
    EIout = EIk
    if ratio is not None and not batched:
        # no springs: forces do not depend on EI, deflections scale with 1/EI
        vc = vc / ratio[:, None, None, None]
        EIout = ratio[:, None] * mesh.EI[None]
    tc = vc[..., 1:] * np.arange(1, 6)
    return Response(mesh.x, mesh.L, EIout, names, Mc, Vc, tc, vc, R, model.supports,
                    list(model.spans), combos, sw)
