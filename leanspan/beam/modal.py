"""Natural frequencies: the lowest mode of the beam model carrying distributed and point masses.

The beam (spans, overhangs, supports with springs, hinges, stepped EI) is cut into the same
cubic Hermite elements as the static solver, refined: every element between structural
features and mass points is divided evenly. The consistent stiffness K and mass M of the
generalised eigenproblem ``K phi = omega^2 M phi`` are assembled on that mesh: M from the
member's mass per length plus the mass of the permanent loads (``w / g`` spread as the load is,
point loads ``P / g`` as point masses); couples carry no mass. The lowest eigenvalue comes
from ``scipy.linalg.eigh`` with ``subset_by_index``, as the largest of the flexibility form
``M phi = (1 / omega^2) K phi`` (accurate to round-off on fine meshes, where the lowest
eigenvalue of the stiffness form loses digits like (L / h)^4). The mesh is refined (element count
doubled) until f1 changes by less than ``TOL`` relative.

What is exact and what is not
-----------------------------
- For a given mesh the eigenvalue is solved to round-off. Consistent-mass Hermite elements
  give an upper bound on f1 that converges as h^4; the refinement stops when one doubling
  changes f1 by less than ``TOL`` (1e-6), so the reported f1 is within about TOL / 15 above
  the continuous beam's value.
- Many candidates (:func:`fundamental_frequencies`, a prismatic member ``EI_k``, ``m_k``):
  ``K_k = r_k K_1 + S`` (``r_k = EI_k / EI_1``, S the springs) and ``M_k = m_k M_u + M_p``
  (``M_p`` the permanent loads' mass, the same for every candidate). Without springs and
  with no permanent mass, or a permanent mass uniform over the whole beam
  (``M_p = c M_u``), ``omega_k^2 = EI_k lambda_1 / (m_k + c)`` with ``lambda_1`` from
  ``(K_1, M_u)``: one eigen-solve, exact. Otherwise (springs, point masses, partial loads)
  each candidate's problem is projected on a small basis of full eigenvectors of a few
  candidates (Rayleigh-Ritz, the q x q problems stacked along the candidates axis); the basis
  grows greedily until every candidate's relative residual is below 1e-9, so the Ritz value
  (an upper bound) is within about 1e-18 of that candidate's own solve on the shared mesh,
  which is refined until the candidates at the ends of the range (lightest and heaviest,
  stiffest and softest) have converged. Not exact: nothing beyond round-off and the mesh.

Examples
--------
>>> from leanspan.beam.model import BeamModel, Support, Stiffness
>>> m = BeamModel(6.0, (Support(0.0, "pin"), Support(6.0, "roller")), (Stiffness(0.0, 6.0, 2e6),),
...               mass_per_length=40.0)
>>> f = natural_frequency(m).f1
>>> round(float(f / (np.pi / 2 * np.sqrt(2e6 / (40.0 * 6.0**4)))), 6)    # (pi/2) sqrt(EI/(m L^4))
1.0
"""

from __future__ import annotations

import dataclasses
from dataclasses import dataclass


import numpy as np

from ..errors import BeamError
from .model import G, BeamModel, DistributedLoad, PointLoad, Stiffness
from .solver import _band, _hermite, _mesh, _supports_dofs, check_mechanism, respond

__all__ = ["Mode", "natural_frequency", "fundamental_frequencies", "point_flexibility", "TOL"]

TOL = 1e-6
"""Refinement stops when one doubling of the mesh changes f1 by less than this, relative."""

_START = 4  # elements over the beam length at the first level (plus the features)
_MAX_LEVEL = 9
_BLOCK = 1024  # candidates per stacked eigen-solve
_GAUSS4 = np.polynomial.legendre.leggauss(4)  # exact for N_i N_j times a linear density


@dataclass(frozen=True)
class Mode:
    """The lowest mode: ``f1`` (Hz), the mode shape ``x``, ``v`` (normalised to max |v| = 1,
    sign so the largest is positive), the number of elements and the refinement level of the
    converged mesh."""

    f1: float
    x: np.ndarray
    v: np.ndarray
    elements: int
    level: int

    @property
    def peak(self) -> float:
        """Where the mode shape is largest (m)."""
        return float(self.x[int(np.argmax(np.abs(self.v)))])


@dataclass(frozen=True)
class _System:
    K1: np.ndarray   # (n, n) stiffness at the model's EI, restrained dofs removed
    S: np.ndarray    # (n,) spring terms on the diagonal
    Mu: np.ndarray   # (n, n) mass of 1 kg/m over the whole beam
    Mp: np.ndarray   # (n, n) mass of the permanent loads
    v_dof: np.ndarray  # (nodes,) column of each node's deflection in the reduced system, -1 if fixed
    x: np.ndarray    # (nodes,)
    elements: int


def _permanent_loads(model, cases):
    cases = set(cases)
    return [ld for ld in model.loads if ld.case in cases and isinstance(ld, (PointLoad, DistributedLoad))]


def _system(model: BeamModel, loads, level: int) -> _System:
    """K, springs and the two mass matrices on the mesh of refinement ``level``."""
    L = model.length
    pts = [0.0, L] + [s.at for s in model.supports] + list(model.hinges)
    pts += [p.start for p in model.stiffness] + [p.end for p in model.stiffness]
    for ld in loads:
        pts += [ld.start, ld.end] if isinstance(ld, DistributedLoad) else [ld.at]
    base = np.unique(np.clip(np.asarray(pts, float), 0.0, L))
    h = L / (_START * 2 ** level)
    cuts = [np.linspace(a, b, max(1, int(np.ceil((b - a) / h - 1e-9))) + 1)[:-1] for a, b in zip(base, base[1:])]
    grid = np.append(np.concatenate(cuts), L)
    pieces = []
    for p in model.stiffness:  # few pieces: each cut at the grid points inside it
        inner = grid[(grid > p.start) & (grid < p.end)]
        ends = np.concatenate([[p.start], inner, [p.end]])
        pieces += [Stiffness(a, b, p.EI) for a, b in zip(ends, ends[1:])]
    mesh = _mesh(BeamModel(L, model.supports, tuple(pieces), hinges=model.hinges))
    ab = _band(mesh).astype(float)
    u = ab.shape[0] - 1
    n = mesh.ndof
    K = np.zeros((n, n))
    for d in range(u + 1):
        idx = np.arange(d, n)
        K[idx - d, idx] = ab[u - d, d:]
        K[idx, idx - d] = ab[u - d, d:]
    # mass: density m0 + m1 s on each element (s from its left node), by a 4-point Gauss rule
    Le, x0 = mesh.Le, mesh.xe[:-1]
    mid = x0 + Le / 2
    m0, m1 = np.zeros_like(Le), np.zeros_like(Le)
    Mp = np.zeros((n, n))
    for ld in loads:  # few loads
        if isinstance(ld, DistributedLoad):
            if min(ld.w1, ld.w2) < 0:
                raise BeamError(f"{ld.where}: an upward permanent load has no mass; leave its case out of the "
                                "permanent cases")
            on = (mid > ld.start) & (mid < ld.end)
            slope = (ld.w2 - ld.w1) / (ld.end - ld.start) / G
            m0[on] += ld.w1 / G + slope * (x0[on] - ld.start)
            m1[on] += slope
        else:
            if ld.P < 0:
                raise BeamError(f"{ld.where}: an upward permanent load has no mass; leave its case out of the "
                                "permanent cases")
            node = int(np.argmin(np.abs(mesh.xe - ld.at)))
            Mp[mesh.v_dof[node], mesh.v_dof[node]] += ld.P / G
    g, w = _GAUSS4
    s = Le[:, None] * (1 + g[None, :]) / 2  # (m, 4)
    N = _hermite(s, Le[:, None])  # (m, 4, 4): element, Gauss point, shape function
    NN = np.einsum("egi,egj->egij", N, N) * (w * Le[:, None] / 2)[..., None, None]
    Mu = np.zeros((n, n))
    for target, me in ((Mu, NN.sum(1)), (Mp, np.einsum("eg,egij->eij", m0[:, None] + m1[:, None] * s, NN))):
        for a in range(4):
            for b in range(4):
                np.add.at(target, (mesh.edofs[:, a], mesh.edofs[:, b]), me[:, a, b])
    fixed, springs = _supports_dofs(model, mesh)
    S = np.zeros(n)
    for dof, k, _, _ in springs:
        S[dof] += k
    free = np.setdiff1d(np.arange(n), [f[0] for f in fixed])
    col = np.full(n, -1)
    col[free] = np.arange(free.size)
    sub = np.ix_(free, free)
    return _System(K[sub], S[free], Mu[sub], Mp[sub], col[mesh.v_dof], mesh.xe, int(Le.size))


def _lowest(A, B):
    """Lowest eigenpair of ``A phi = lam B phi`` (A stiffness, B mass), solved as the largest of
    ``B phi = mu A phi`` (mu = 1 / lam): the lowest mode of a fine mesh is then accurate to
    round-off of mu_max instead of losing digits with (L / h)^4 (the flexibility form)."""
    import scipy.linalg  # imported where used: a job without vibration never loads it

    n = A.shape[0]
    try:
        mu, vec = scipy.linalg.eigh(B, A, subset_by_index=[n - 1, n - 1])
    except (np.linalg.LinAlgError, ValueError):
        raise BeamError("beam: the stiffness matrix is not positive definite (a spring far too soft "
                        "for the beam?); stiffen the springs or add a support") from None
    if not mu[0] > 0:
        raise BeamError("beam: no mass on the beam; give a mass per length or permanent loads")
    return 1.0 / float(mu[0]), vec[:, 0]


def natural_frequency(model: BeamModel, mass_per_length: float | None = None, permanent_cases=(),
                      tol: float = TOL, level: int | None = None) -> Mode:
    """The lowest natural frequency and mode of ``model`` (its own, possibly stepped, EI).

    Parameters
    ----------
    model : BeamModel
    mass_per_length : float, optional
        The member's mass (kg/m); default the model's ``mass_per_length`` (else 0).
    permanent_cases : iterable of str
        Load cases whose point and distributed loads become mass (``P / g``, ``w / g``).
    tol : float
        Stop refining when one doubling changes f1 by less than this, relative.
    level : int, optional
        Solve on this one mesh (element length about L / (4 * 2**level)) without refining.

    Raises
    ------
    MechanismError
        The supports and hinges leave a rigid-body motion (it would have f = 0).
    BeamError
        No mass, or an upward permanent load.
    """
    check_mechanism(model)
    m = float(model.mass_per_length or 0.0) if mass_per_length is None else float(mass_per_length)
    loads = _permanent_loads(model, permanent_cases)
    prev = None
    for lev in range(_MAX_LEVEL + 1) if level is None else (level,):
        sysm = _system(model, loads, lev)
        lam, vec = _lowest(sysm.K1 + np.diag(sysm.S), m * sysm.Mu + sysm.Mp)
        f = np.sqrt(max(lam, 0.0)) / (2 * np.pi)
        if prev is not None and abs(f - prev) <= tol * f:
            break
        prev = f
    v = np.where(sysm.v_dof >= 0, vec[np.maximum(sysm.v_dof, 0)], 0.0)
    v = v / v[np.argmax(np.abs(v))]
    return Mode(float(f), sysm.x, v, sysm.elements, lev)


def _uniform_permanent(model, loads) -> float | None:
    """The permanent mass per length c when it is uniform over the whole beam without point
    masses (so ``M_p = c M_u`` exactly), else None."""
    L, tol = model.length, 1e-9 * model.length
    c = 0.0
    for ld in loads:
        if isinstance(ld, PointLoad) or ld.w1 != ld.w2 or ld.start > tol or ld.end < L - tol:
            return None
        c += ld.w1 / G
    return c


def fundamental_frequencies(model: BeamModel, EI, mass_per_length, permanent_cases=(), tol: float = TOL,
                            level: int | None = None):
    """f1 (Hz) of K prismatic candidates ``EI`` (N m^2), ``mass_per_length`` (kg/m): arrays (K,).

    ``model`` gives the geometry, supports and permanent loads; its own EI is replaced by each
    candidate's (it must be prismatic). Exact scaling from one eigen-solve without springs and
    with no or uniform permanent mass; otherwise Rayleigh-Ritz on a greedily grown basis of
    full solves, to round-off of each candidate's own solve (see the module notes). ``level`` fixes the mesh as in :func:`natural_frequency`.

    >>> from leanspan.beam.model import BeamModel, Support, Stiffness
    >>> m = BeamModel(4.0, (Support(0.0, "fixed"),), (Stiffness(0.0, 4.0, 1.0),))
    >>> f = fundamental_frequencies(m, [1e6, 4e6], [20.0, 20.0])
    >>> round(float(f[1] / f[0]), 9)                  # f scales with sqrt(EI)
    2.0
    """
    check_mechanism(model)
    EI = np.atleast_1d(np.asarray(EI, float))
    mass = np.broadcast_to(np.asarray(mass_per_length, float), EI.shape)
    if not model.prismatic:
        raise BeamError("EI: candidate stiffnesses need a prismatic beam (one EI along the length)")
    if np.any(~(EI > 0)) or np.any(~(mass >= 0)) or np.any(~np.isfinite(EI + mass)):
        raise BeamError("mass_per_length, EI: expected positive finite candidate values")
    ratio = EI / model.stiffness[0].EI
    loads = _permanent_loads(model, permanent_cases)
    springs = any(s.type == "spring" for s in model.supports)
    c = None if springs else _uniform_permanent(model, loads)
    if c is not None:  # exact scaling: omega_k^2 = r_k lambda_1 / (m_k + c)
        if np.any(mass + c <= 0):
            raise BeamError("mass_per_length: a candidate without mass has no natural frequency")
        lam = natural_frequency(model, 1.0, (), tol, level).f1 * 2 * np.pi
        return np.sqrt(ratio / (mass + c)) * lam / (2 * np.pi)
    # a shared mesh, converged at the ends of the candidate range
    ends = np.unique([np.argmin(mass), np.argmax(mass), np.argmin(ratio), np.argmax(ratio)])
    if level is None:
        level = max(_converged_level(model, loads, ratio[k], mass[k], tol) for k in ends)
    sysm = _system(model, loads, level)
    if not springs:
        # K phi = lambda (m Mu + Mp) phi with K = r K1: lambda scales with r exactly, so only the
        # distinct masses need the Ritz solve (at r = 1), a one-parameter family
        m_unique, back = np.unique(mass, return_inverse=True)
        # the first mode alone, sampled along the masses, spans the family well: a small basis
        return _reduced_basis(sysm, np.ones(m_unique.size), m_unique, modes=1)[back] * np.sqrt(ratio)
    return _reduced_basis(sysm, ratio, mass)


def _top_vector(C, mu):
    """The eigenvector of each symmetric C (K, q, q) for its largest eigenvalue ``mu`` (K,), by one
    step of inverse iteration with the shift just above it (the other components shrink by the
    relative gap over 1e-9). Only the residual check reads it: a poorer vector can only make that
    check stricter."""
    q = C.shape[1]
    shift = mu * (1.0 + 1e-9) + 1e-300
    start = np.broadcast_to(np.linspace(1.0, 2.0, q), (C.shape[0], q))[..., None]  # any vector with some of it
    v = np.linalg.solve(C - shift[:, None, None] * np.eye(q), start)[..., 0]
    v = np.linalg.solve(C - shift[:, None, None] * np.eye(q), v[..., None])[..., 0]  # a second step
    return v / np.linalg.norm(v, axis=1, keepdims=True)


def _congruent(L, X):
    """``L^-1 X L^-T`` of the symmetric part of ``X`` (``L`` lower triangular, a Cholesky factor)."""
    return np.linalg.solve(L, np.linalg.solve(L, (X + X.T) / 2).T)


_SEEDS = 6  # full solves spread over the masses to start a one-parameter basis


def _reduced_basis(sysm, ratio, mass, rtol=1e-9, modes=3, max_rounds=40):
    """f1 of every candidate by Rayleigh-Ritz on a basis grown greedily from full solves.

    The basis holds the lowest ``modes`` eigenvectors of a few candidates' full problems; each
    candidate's q x q problem is solved stacked. A Ritz value is an upper bound whose error is
    of the order of the squared relative residual ``||(A - lam B) x|| / (lam ||B x||)``; the
    candidate with the largest residual gets its own full solve added to the basis until every
    residual is below ``rtol`` (eigenvalue error about rtol^2: exact to round-off).
    """
    import scipy.linalg  # imported where used: a job without vibration never loads it

    n = sysm.K1.shape[0]
    Sd = np.diag(sysm.S)
    full = lambda k: scipy.linalg.eigh(mass[k] * sysm.Mu + sysm.Mp, ratio[k] * sysm.K1 + Sd,  # noqa: E731
                                       subset_by_index=[max(0, n - modes), n - 1])[1]
    seeds = [np.argmin(mass), np.argmax(mass), np.argmin(ratio), np.argmax(ratio)]
    if np.ptp(ratio) == 0:  # one parameter (the mass): seed along it, so that few rounds remain
        order = np.argsort(mass)
        seeds += list(order[np.linspace(0, mass.size - 1, min(mass.size, _SEEDS)).astype(int)])
    seeds = np.unique(seeds)
    basis = np.concatenate([full(k) for k in seeds], axis=1)
    lam = np.empty(ratio.size)
    res = np.empty(ratio.size)
    todo = np.arange(ratio.size)  # the candidates whose residual is not yet below rtol
    for _ in range(max_rounds):
        V = np.linalg.qr(basis)[0]
        KV, SV, MuV, MpV = sysm.K1 @ V, Sd @ V, sysm.Mu @ V, sysm.Mp @ V
        k1, sv, mu_, mp = (V.T @ X for X in (KV, SV, MuV, MpV))
        one_stiffness = np.ptp(ratio) == 0
        if one_stiffness:
            A1 = ratio[0] * k1 + sv
            Lc1 = np.linalg.cholesky((A1 + A1.T) / 2)
            Cu, Cp = _congruent(Lc1, mu_), _congruent(Lc1, mp)
        for start in range(0, todo.size, _BLOCK):
            rows = todo[start:start + _BLOCK]
            r, m = ratio[rows, None, None], mass[rows, None, None]
            if one_stiffness:  # A is the same for all: one factor, C = m Cu + Cp
                C = m * Cu + Cp
                w = np.linalg.eigvalsh(C)  # the values alone: half the work of eigh
                z = _top_vector(C, w[:, -1])
                y = np.linalg.solve(Lc1.T, z.T).T  # Ritz vector coefficients
            else:
                A, B = r * k1 + sv, m * mu_ + mp
                A, B = (A + np.swapaxes(A, 1, 2)) / 2, (B + np.swapaxes(B, 1, 2)) / 2
                Lc = np.linalg.cholesky(A)
                C = np.linalg.solve(Lc, np.swapaxes(np.linalg.solve(Lc, B), 1, 2))
                w, z = np.linalg.eigh(C)
                y = np.linalg.solve(np.swapaxes(Lc, 1, 2), z[:, :, -1:])[..., 0]  # Ritz vector coefficients
            lam[rows] = 1.0 / w[:, -1]
            Ax = r[..., 0] * (y @ KV.T) + y @ SV.T
            Bx = m[..., 0] * (y @ MuV.T) + y @ MpV.T
            res[rows] = np.linalg.norm(Ax - lam[rows, None] * Bx, axis=1) / (lam[rows] * np.linalg.norm(Bx, axis=1))
        # a converged candidate keeps its value: a larger basis only moves it by about rtol^2
        todo = todo[~(res[todo] <= rtol)]
        if todo.size == 0 or basis.shape[1] >= n:
            break
        basis = np.concatenate([basis, full(int(todo[np.argmax(res[todo])]))], axis=1)
    return np.sqrt(lam) / (2 * np.pi)


def _converged_level(model, loads, ratio, mass, tol) -> int:
    prev = None
    for level in range(_MAX_LEVEL + 1):
        s = _system(model, loads, level)
        f = np.sqrt(max(_lowest(ratio * s.K1 + np.diag(s.S), mass * s.Mu + s.Mp)[0], 0.0))
        if prev is not None and abs(f - prev) <= tol * f:
            return level
        prev = f
    return _MAX_LEVEL



def point_flexibility(model: BeamModel, EI=None):
    """Deflection per newton under a unit point load at the middle of each span (at the free
    end of each overhang), one load at a time: ``(x (S,), flex (K, S))`` in m/N.

    Exact: the static solver's unit solve (``respond``) with the candidates' ``EI`` (K,)
    (``None``: the model's own stiffness, K = 1); without springs it scales with 1/EI.

    >>> from leanspan.beam.model import BeamModel, Support, Stiffness
    >>> m = BeamModel(5.0, (Support(0.0, "pin"), Support(5.0, "roller")), (Stiffness(0.0, 5.0, 1.0),))
    >>> x, flex = point_flexibility(m, [2e6])
    >>> float(x[0]), round(float(flex[0, 0] / (5.0**3 / (48 * 2e6))), 12)     # L^3 / (48 EI)
    (2.5, 1.0)
    """
    L = model.length
    held = [s.at for s in model.supports if s.vertical]
    free = lambda a, b: a if not any(abs(x - a) <= 1e-9 * L for x in held) else b  # noqa: E731
    xs = np.array([(a + b) / 2 if kind == "span" else free(a, b) for a, b, kind in model.spans])
    loads = tuple(PointLoad(f"unit {j}", 1.0, x) for j, x in enumerate(xs))
    unit = dataclasses.replace(model, loads=loads, combinations=(), self_weight=None, mass_per_length=None,
                               notes=())
    r = respond(unit, EI=None if EI is None else np.atleast_1d(np.asarray(EI, float)), unit_self_weight=False)
    e = np.clip(np.searchsorted(r.x_nodes, xs, side="right") - 1, 0, r.lengths.size - 1)
    s = xs - r.x_nodes[e]
    j = np.arange(xs.size)
    coef = r.v[:, j, e, :]  # (K, S, 6): each unit case at its own load point
    v = np.polynomial.polynomial.polyval(s, np.moveaxis(coef, -1, 0), tensor=False)
    return xs, -v
