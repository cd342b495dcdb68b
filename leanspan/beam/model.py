"""Beam model: supports, hinges, stiffness, loads and combinations as frozen dataclasses.

Every value is an SI float (m, N, N/m, N m, N m^2, kg/m). Loads are *downward*
magnitudes (gravity) as in job files; couples are counter-clockwise positive.
Each class checks itself in ``__post_init__`` and raises
:class:`~leanspan.errors.BeamError` with a message that names the field
(``where``) and what was expected.

Examples
--------
>>> m = BeamModel(length=6.0, supports=(Support(0.0, "pin"), Support(6.0, "roller")),
...               stiffness=(Stiffness(0.0, 6.0, 1e7),),
...               loads=(DistributedLoad("dead", 5e3, 5e3, 0.0, 6.0),))
>>> m.cases, m.spans
(('dead',), ((0.0, 6.0, 'span'),))
>>> Support(7.0, "pin", where="support[1]").at
7.0
>>> BeamModel(length=6.0, supports=(Support(7.0, "pin", where="support[1]"),),
...           stiffness=(Stiffness(0.0, 6.0, 1e7),))
Traceback (most recent call last):
...
leanspan.errors.BeamError: support[1].at: x = 7 m is off the beam (0 to 6 m)
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np

from ..errors import BeamError, brief

__all__ = [
    "SUPPORT_TYPES",
    "Support",
    "Stiffness",
    "PointLoad",
    "Couple",
    "DistributedLoad",
    "DeflectionLimit",
    "Combination",
    "BeamModel",
    "G",
]

G = 9.80665
"""Standard gravity in m/s^2 (used for self-weight = mass_per_length * G)."""

SUPPORT_TYPES = ("pin", "roller", "fixed", "guided", "spring")


def _num(value, where: str, positive=False, nonneg=False) -> float:
    try:
        x = float(value)
    except (TypeError, ValueError):
        raise BeamError(f"{where}: expected a number, got {brief(value)}") from None
    if not math.isfinite(x):
        raise BeamError(f"{where}: expected a finite value, got {brief(value)}")
    if positive and not x > 0:
        raise BeamError(f"{where}: expected a positive value, got {x:g}")
    if nonneg and x < 0:
        raise BeamError(f"{where}: expected zero or a positive value, got {x:g}")
    return x


FEATURE_GAP = 1e-6
"""Supports, hinges and load ends closer than FEATURE_GAP * length share one solver node."""


@dataclass(frozen=True)
class Support:
    """A support at ``at``: pin | roller | fixed | guided | spring (``k`` N/m and/or ``kr`` N m/rad).

    ``pin`` and ``roller`` both restrain the deflection (axial effects are not modelled);
    ``fixed`` restrains deflection and rotation; ``guided`` restrains rotation only.
    ``bearing_length`` (m, optional) is the length of the seat the member bears on, for the
    selection's bearing check (the beam solution does not use it).
    """

    at: float
    type: str
    k: float | None = None
    kr: float | None = None
    where: str = "support"
    bearing_length: float | None = None

    def __post_init__(self):
        object.__setattr__(self, "at", _num(self.at, f"{self.where}.at"))
        if self.bearing_length is not None:
            object.__setattr__(self, "bearing_length",
                               _num(self.bearing_length, f"{self.where}.bearing_length", positive=True))
        if not isinstance(self.type, str) or self.type not in SUPPORT_TYPES:
            raise BeamError(f"{self.where}.type: expected one of {', '.join(SUPPORT_TYPES)}, got {brief(self.type)}")
        if self.type == "spring":
            if self.k is None and self.kr is None:
                raise BeamError(f"{self.where}: a spring support needs k (force/length) and/or kr (moment per radian)")
            for name in ("k", "kr"):
                val = getattr(self, name)
                if val is not None:
                    object.__setattr__(self, name, _num(val, f"{self.where}.{name}", positive=True))
        elif self.k is not None or self.kr is not None:
            raise BeamError(f"{self.where}: k and kr belong to type = \"spring\", not {self.type!r}")

    @property
    def fixes_v(self) -> bool:
        """Deflection rigidly restrained."""
        return self.type in ("pin", "roller", "fixed")

    @property
    def fixes_theta(self) -> bool:
        """Rotation rigidly restrained."""
        return self.type in ("fixed", "guided")

    @property
    def vertical(self) -> bool:
        """Any vertical restraint (rigid or spring): these positions bound the spans."""
        return self.fixes_v or (self.type == "spring" and self.k is not None)

    @property
    def rotational(self) -> bool:
        """Any rotational restraint (rigid or spring)."""
        return self.fixes_theta or (self.type == "spring" and self.kr is not None)


@dataclass(frozen=True)
class Stiffness:
    """Flexural stiffness ``EI`` (N m^2) over ``start <= x <= end``."""

    start: float
    end: float
    EI: float
    where: str = "stiffness"

    def __post_init__(self):
        object.__setattr__(self, "start", _num(self.start, f"{self.where}.from"))
        object.__setattr__(self, "end", _num(self.end, f"{self.where}.to"))
        object.__setattr__(self, "EI", _num(self.EI, f"{self.where}.EI", positive=True))
        if not self.end > self.start:
            raise BeamError(f"{self.where}: 'to' ({self.end:g} m) must be beyond 'from' ({self.start:g} m)")


@dataclass(frozen=True)
class PointLoad:
    """A downward force ``P`` (N) at ``at`` in load case ``case``."""

    case: str
    P: float
    at: float
    where: str = "load"

    def __post_init__(self):
        object.__setattr__(self, "P", _num(self.P, f"{self.where}.P"))
        object.__setattr__(self, "at", _num(self.at, f"{self.where}.at"))


@dataclass(frozen=True)
class Couple:
    """A counter-clockwise couple ``M`` (N m) at ``at`` in load case ``case``."""

    case: str
    M: float
    at: float
    where: str = "load"

    def __post_init__(self):
        object.__setattr__(self, "M", _num(self.M, f"{self.where}.M"))
        object.__setattr__(self, "at", _num(self.at, f"{self.where}.at"))


@dataclass(frozen=True)
class DistributedLoad:
    """A downward load varying linearly from ``w1`` at ``start`` to ``w2`` at ``end`` (N/m)."""

    case: str
    w1: float
    w2: float
    start: float
    end: float
    where: str = "load"

    def __post_init__(self):
        for name, label in (("w1", "w1"), ("w2", "w2"), ("start", "from"), ("end", "to")):
            object.__setattr__(self, name, _num(getattr(self, name), f"{self.where}.{label}"))
        if not self.end > self.start:
            raise BeamError(f"{self.where}: 'to' ({self.end:g} m) must be beyond 'from' ({self.start:g} m)")


@dataclass(frozen=True)
class DeflectionLimit:
    """Allowed deflection: ``span / ratio`` or an absolute length (m).

    >>> DeflectionLimit(ratio=360).allowed(7.2)
    0.02
    >>> DeflectionLimit(absolute=0.012).allowed(7.2)
    0.012
    """

    ratio: float | None = None
    absolute: float | None = None
    text: str = ""

    def __post_init__(self):
        if (self.ratio is None) == (self.absolute is None):
            raise BeamError(f"limit: give either span/ratio or an absolute length, got {brief(self.text)}")
        if self.ratio is not None and not (math.isfinite(self.ratio) and self.ratio > 0):
            raise BeamError(f"limit: ratio must be positive, got {brief(self.text)}")
        if self.absolute is not None and not (math.isfinite(self.absolute) and self.absolute > 0):
            raise BeamError(f"limit: length must be positive, got {brief(self.text)}")

    def allowed(self, span):
        """Allowed deflection (m) for a span (or overhang) length; works on arrays."""
        if self.ratio is not None:
            return np.asarray(span, float) / self.ratio if np.ndim(span) else float(span) / self.ratio
        return np.full(np.shape(span), self.absolute) if np.ndim(span) else self.absolute

    def describe(self, units: str = "si") -> str:
        """``"span/360"``, or the length in the display ``units`` (``"12 mm"``, ``"0.4724 in"``).

        >>> DeflectionLimit(absolute=0.012).describe(), DeflectionLimit(absolute=0.012).describe("us")
        ('12 mm', '0.4724 in')
        """
        if self.ratio is not None:
            return f"span/{self.ratio:g}"
        from ..units import display_factor, fmt

        label, factor = display_factor("length", units)
        value = self.absolute / factor
        # SI reads back as given, to 6 figures (the JSON carries this text); converted values get 4
        return f"{value:g} {label}" if units == "si" else f"{fmt(value)} {label}"


@dataclass(frozen=True)
class Combination:
    """Factored sum of load cases, optionally checked for deflection, optionally pattern-loaded.

    ``factors`` is a tuple of ``(case, factor)``; ``check`` is ``"strength"`` or
    ``"deflection"``; ``limit`` a :class:`DeflectionLimit` (deflection checks only);
    ``pattern`` names a case that is placed span by span in every on/off pattern.
    """

    name: str
    factors: tuple
    check: str = "strength"
    limit: DeflectionLimit | None = None
    pattern: str | None = None
    where: str = "combination"

    def __post_init__(self):
        if not isinstance(self.name, str) or not self.name.strip():
            raise BeamError(f"{self.where}.name: expected a non-empty name, got {brief(self.name)}")
        if self.check not in ("strength", "deflection"):
            raise BeamError(f"{self.where}.check: expected strength or deflection, got {brief(self.check)}")
        if self.limit is not None and self.check != "deflection":
            raise BeamError(f"{self.where}.limit: a limit needs check = \"deflection\"")
        if not self.factors:
            raise BeamError(f"{self.where}.factors: expected at least one case = factor")
        fixed = tuple((str(c), _num(f, f"{self.where}.factors.{c}")) for c, f in self.factors)
        object.__setattr__(self, "factors", fixed)
        if self.pattern is not None and self.pattern not in dict(fixed):
            raise BeamError(f"{self.where}.pattern: case {self.pattern!r} is not among the factors")


@dataclass(frozen=True)
class BeamModel:
    """A straight beam along 0 <= x <= ``length`` with everything that acts on it.

    Parameters
    ----------
    length : float
        Beam length (m).
    supports : tuple of Support
    stiffness : tuple of Stiffness
        Pieces that cover the whole beam without gaps or overlaps (one piece if prismatic).
    loads : tuple of PointLoad, Couple, DistributedLoad
    hinges : tuple of float
        Positions of internal hinges (moment releases).
    combinations : tuple of Combination
    mass_per_length : float, optional
        kg/m, for self-weight.
    self_weight : str, optional
        The load case that carries ``mass_per_length * G`` downward over the whole beam.
    name : str
        A title for reports.
    """

    length: float
    supports: tuple
    stiffness: tuple
    loads: tuple = ()
    hinges: tuple = ()
    combinations: tuple = ()
    mass_per_length: float | None = None
    self_weight: str | None = None
    name: str = ""
    notes: tuple = ()  # what the reader assumed, for the user (e.g. a limit taken as a deflection check)
    cases: tuple = field(init=False)

    def __post_init__(self):
        L = _num(self.length, "beam.length", positive=True)
        object.__setattr__(self, "length", L)
        tol = 1e-9 * L
        gap = FEATURE_GAP * L  # the solver gives features closer than this one node

        def on_beam(x, where, inside=False):
            if x < -tol or x > L + tol:
                raise BeamError(f"{where}: x = {x:.10g} m is off the beam (0 to {L:.10g} m)")
            if inside and (x <= tol or x >= L - tol):
                raise BeamError(f"{where}: x = {x:g} m must be strictly inside the beam (0 to {L:g} m)")

        for s in self.supports:
            on_beam(s.at, f"{s.where}.at")
        xs = sorted(s.at for s in self.supports)
        for a, b in zip(xs, xs[1:]):
            if b - a <= gap:
                raise BeamError(f"support: two supports at x = {a:.10g} and {b:.10g} m, closer than "
                                f"{FEATURE_GAP:g} of the length; give one support per position")
        if not self.supports:
            raise BeamError("beam: no supports; add [[support]] tables or use spans = [...]")
        # stiffness pieces must tile [0, L]
        pieces = sorted(self.stiffness, key=lambda p: p.start)
        if not pieces:
            raise BeamError("beam: no stiffness; give EI, section + material, or [[stiffness]] tables")
        if abs(pieces[0].start) > tol or abs(pieces[-1].end - L) > tol:
            raise BeamError(f"stiffness: the pieces must run from 0 to the beam length {L:g} m "
                            f"(they cover {pieces[0].start:g} to {pieces[-1].end:g} m)")
        for p, q in zip(pieces, pieces[1:]):
            if abs(q.start - p.end) > tol:
                raise BeamError(f"{q.where}: starts at {q.start:g} m but the previous piece ends at "
                                f"{p.end:g} m; pieces must meet without gap or overlap")
        object.__setattr__(self, "stiffness", tuple(pieces))
        hinges = tuple(sorted(_num(h, "hinge.at") for h in self.hinges))
        for i, h in enumerate(hinges):
            on_beam(h, f"hinge[{i + 1}].at", inside=True)
        for a, b in zip(hinges, hinges[1:]):
            if b - a <= gap:
                raise BeamError(f"hinge: two hinges at x = {a:.10g} and {b:.10g} m, closer than "
                                f"{FEATURE_GAP:g} of the length; give one")
        for h in hinges:
            for s in self.supports:
                if abs(s.at - h) <= tol and s.rotational:
                    raise BeamError(f"{s.where}: a hinge at x = {h:g} m cannot sit on a support that "
                                    f"restrains rotation ({s.type}); move one of them")
        object.__setattr__(self, "hinges", hinges)
        cases = []
        for ld in self.loads:
            if not isinstance(ld.case, str) or not ld.case.strip():
                raise BeamError(f"{ld.where}.case: expected a load case name, got {brief(ld.case)}")
            if isinstance(ld, DistributedLoad):
                on_beam(ld.start, f"{ld.where}.from")
                on_beam(ld.end, f"{ld.where}.to")
                if ld.end - ld.start <= gap:
                    total = (ld.w1 + ld.w2) / 2 * (ld.end - ld.start)
                    raise BeamError(f"{ld.where}: 'from' and 'to' are {ld.end - ld.start:.3g} m apart, closer "
                                    f"than {FEATURE_GAP:g} of the length; give it as a point load "
                                    f"(P = {total:.4g} N at x = {(ld.start + ld.end) / 2:g} m)")
            else:
                on_beam(ld.at, f"{ld.where}.at")
            if isinstance(ld, Couple) and any(abs(ld.at - h) <= tol for h in hinges):
                raise BeamError(f"{ld.where}: a couple exactly at the hinge x = {ld.at:g} m is ambiguous; "
                                f"place it just to one side")
            if ld.case not in cases:
                cases.append(ld.case)
        if self.mass_per_length is not None:
            object.__setattr__(self, "mass_per_length",
                               _num(self.mass_per_length, "beam.mass_per_length", nonneg=True))
        if self.self_weight is not None and self.self_weight not in cases:
            cases.append(self.self_weight)
        object.__setattr__(self, "cases", tuple(cases))
        names = set()
        for c in self.combinations:
            if c.name in ("envelope", "envelope_strength", "envelope_deflection"):
                raise BeamError(f"{c.where}.name: {c.name!r} is the name of a result; choose another")
            if c.name in names or c.name in cases:
                raise BeamError(f"{c.where}.name: {c.name!r} is already used by a case or combination")
            names.add(c.name)
            for case, _ in c.factors:
                if case not in cases:
                    known = ", ".join(cases) or "none"
                    raise BeamError(f"{c.where}.factors: unknown load case {case!r} (cases: {known})")
            if c.pattern is not None and c.pattern == self.self_weight:
                raise BeamError(f"{c.where}.pattern: the self-weight case {c.pattern!r} cannot be pattern-loaded")

    # -- derived geometry -------------------------------------------------------------
    @property
    def prismatic(self) -> bool:
        """One stiffness along the whole beam."""
        return len({p.EI for p in self.stiffness}) == 1

    @property
    def spans(self) -> tuple:
        """``(start, end, kind)`` between vertical supports; ends beyond them are ``"overhang"``.

        A cantilever (one vertical support) is a single overhang: its span is its length.
        """
        L = self.length
        xs = sorted(s.at for s in self.supports if s.vertical)
        if not xs:
            return ((0.0, L, "overhang"),)
        tol = 1e-9 * L
        out = []
        if xs[0] > tol:
            out.append((0.0, xs[0], "overhang"))
        out += [(a, b, "span") for a, b in zip(xs, xs[1:])]
        if xs[-1] < L - tol:
            out.append((xs[-1], L, "overhang"))
        return tuple(out)
