"""The design basis: design strengths from characteristic values, and creep, set by ``[design]``.

Without a ``[design]`` table the allowable stresses are the user's (``[limits]``
``stress_factor`` or absolute stresses). With one, every candidate's allowable stress is its
design strength (EN 1995-1-1 and EN 1993-1-1, values from memory)::

    timber, glulam   f_d = kmod x kh x f_k / gamma_M      (bending; kh for bending only)
                     f_v,d = kmod x k_cr x f_v,k / gamma_M  (shear: k_cr for cracks)
    metals           f_d = f / gamma_M0

where kmod (EN 1995-1-1 Table 3.1) comes from the service class and the load-duration class of
the shortest-duration load case in each combination (3.1.3(2)), gamma_M from EN 1995-1-1 Table
2.3 (solid timber 1.3, glulam 1.25), kh from 3.2(3) (solid timber less than 150 mm deep,
``(150 / h)^0.2 <= 1.3``, for a characteristic density up to 700 kg/m3) and 3.3(3) (glulam less
than 600 mm deep, ``(600 / h)^0.1 <= 1.1``), k_cr = 0.67 from 6.1.7(2) (solid timber and glulam,
as amended in 2008). Metals: gamma_M0 = 1.0 for steel (EN 1993-1-1 6.1 recommended value), 1.1
for stainless (EN 1993-1-4 5.1) and aluminium (gamma_M1, EN 1999-1-1 6.1.3). Final deflection
with creep uses kdef (EN 1995-1-1 Table 3.2; metals 0) and the quasi-permanent factor psi2 of
each case (EN 1990 Table A1.1 values are the user's to give): see
:mod:`leanspan.select.checks.deflection_final`.

Examples
--------
>>> kmod(1, "medium"), kmod(3, "permanent"), kdef(2), gamma_M("glulam")
(0.8, 0.5, 0.8, 1.25)
>>> [round(float(x), 4) for x in kh(["timber", "timber", "glulam"], [0.1, 0.2, 0.4])]
[1.0845, 1.0, 1.0414]
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ..beam.parse import parse_limit
from ..errors import SelectionError, brief
from ..units import check_number

__all__ = ["DURATIONS", "SERVICE_CLASSES", "SOURCES", "DesignBasis", "kmod", "kdef", "gamma_M", "kh", "K_CR",
           "parse_design", "allowable_stress", "combination_free", "TIMBER"]

DURATIONS = ("permanent", "long", "medium", "short", "instantaneous")
SERVICE_CLASSES = (1, 2, 3)
TIMBER = ("timber", "glulam")

# EN 1995-1-1 Table 3.1, solid timber (EN 14081-1) and glulam (EN 14080), from memory
_KMOD = {1: (0.60, 0.70, 0.80, 0.90, 1.10), 2: (0.60, 0.70, 0.80, 0.90, 1.10),
         3: (0.50, 0.55, 0.65, 0.70, 0.90)}
# EN 1995-1-1 Table 3.2, solid timber and glulam, from memory
_KDEF = {1: 0.60, 2: 0.80, 3: 2.00}
# EN 1995-1-1 Table 2.3; EN 1993-1-1 6.1; EN 1993-1-4 5.1; EN 1999-1-1 6.1.3 (all from memory)
_GAMMA_M = {"timber": 1.3, "glulam": 1.25, "steel": 1.0, "stainless": 1.1, "aluminium": 1.1}
K_CR = 0.67  # EN 1995-1-1:2004+A1:2008 6.1.7(2), from memory

SOURCES = {
    "kmod": "EN 1995-1-1 Table 3.1 (service class, load-duration class; the shortest-duration load "
            "of the combination, 3.1.3(2))",
    "kdef": "EN 1995-1-1 Table 3.2 (metals: no creep, 0)",
    "gamma_M": "EN 1995-1-1 Table 2.3 (solid timber 1.3, glulam 1.25); metals gamma_M0: EN 1993-1-1 6.1 "
               "(steel 1.0), EN 1993-1-4 5.1 (stainless 1.1), EN 1999-1-1 6.1.3 (aluminium 1.1)",
    "kh": "EN 1995-1-1 3.2(3) solid timber (150/h)^0.2 <= 1.3 below 150 mm (rho_k <= 700 kg/m3), "
          "3.3(3) glulam (600/h)^0.1 <= 1.1 below 600 mm",
    "k_cr": "EN 1995-1-1 6.1.7(2), as amended 2008: 0.67 for solid timber and glulam",
    "psi2": "the job's [design] psi2 (EN 1990 Table A1.1 gives the values per category); "
            "1.0 for permanent cases",
}


def kmod(service_class: int, duration: str) -> float:
    """kmod of solid timber and glulam (EN 1995-1-1 Table 3.1, from memory)."""
    return _KMOD[service_class][DURATIONS.index(duration)]


def kdef(service_class: int) -> float:
    """kdef of solid timber and glulam (EN 1995-1-1 Table 3.2, from memory)."""
    return _KDEF[service_class]


def gamma_M(kind: str) -> float:
    """The material partial factor of a material kind (timber gamma_M, metals gamma_M0)."""
    return _GAMMA_M[kind]


def kh(kind, depth, rho_k=None) -> np.ndarray:
    """The depth factor of timber in bending (arrays (K,)); 1 for metals and for solid timber
    denser than 700 kg/m3 (characteristic)."""
    kind = np.asarray(kind).astype(str)
    h = np.asarray(depth, float) * 1e3  # mm
    rho = np.full(h.shape, np.nan) if rho_k is None else np.asarray(rho_k, float)
    with np.errstate(divide="ignore"):
        solid = np.where(~(rho > 700.0), np.minimum(np.maximum(150.0 / h, 1.0) ** 0.2, 1.3), 1.0)
        glulam = np.minimum(np.maximum(600.0 / h, 1.0) ** 0.1, 1.1)
    return np.select([kind == "timber", kind == "glulam"], [solid, glulam], 1.0)


@dataclass(frozen=True)
class DesignBasis:
    """The ``[design]`` table: service class, each load case's duration class and psi2, and the
    final-deflection limit (None: each deflection combination's own)."""

    service_class: int
    durations: tuple  # (case, duration class)
    psi2: tuple  # (case, psi2)
    final_limit: object = None  # leanspan.beam.model.DeflectionLimit

    def duration(self, case: str) -> str:
        return dict(self.durations)[case]

    def psi2_of(self, case: str) -> float:
        """psi2 of a case: as given, else 1.0 for a permanent case (else 0: the case is in no
        deflection combination, where parsing asks for it)."""
        given = dict(self.psi2)
        if case in given:
            return given[case]
        return 1.0 if dict(self.durations).get(case) == "permanent" else 0.0

    def combination_kmod(self, combination) -> tuple:
        """``(kmod, case, duration)`` of a model combination: its shortest-duration case (the
        largest kmod) among the cases with a non-zero factor."""
        best = None
        for case, f in combination.factors:  # a small set
            if f == 0:
                continue
            k = kmod(self.service_class, self.duration(case))
            if best is None or k > best[0]:
                best = (k, case, self.duration(case))
        return best or (kmod(self.service_class, "permanent"), "", "permanent")

    def kmod_row(self, combinations) -> np.ndarray:
        """kmod per combination (C,)."""
        return np.array([self.combination_kmod(c)[0] for c in combinations], float)

    def design_strength(self, props, combinations, which: str) -> np.ndarray:
        """Design strengths (K, C) for ``which`` = ``"bending"``, ``"shear"`` or ``"fc_90"``."""
        kind = np.asarray(props["kind"]).astype(str)
        column = {"bending": "strength_bending", "shear": "strength_shear", "fc_90": "fc_90"}[which]
        f = np.asarray(props.get(column, np.full(kind.shape, np.nan)), float)
        gm = np.select([kind == k for k in _GAMMA_M], list(_GAMMA_M.values()), np.nan)
        timber = np.isin(kind, TIMBER)
        factor = np.ones(kind.shape)
        if which == "bending":
            factor = kh(kind, props["depth"], props.get("rho_k"))
        elif which == "shear":
            factor = np.where(timber, K_CR, 1.0)
        k_mod = np.where(timber[:, None], self.kmod_row(combinations)[None, :], 1.0)
        return k_mod * (factor * f / gm)[:, None]

    def describe(self) -> str:
        return (f"design strengths from characteristic values, service class {self.service_class} "
                "(timber kmod × kh × f_k / γM, metals f / γM0)")


def combination_free(limits) -> bool:
    """Whether :func:`allowable_stress` is the same for every combination: the user's limits
    are; design strengths (``[design]``, kmod by load duration) are not."""
    return getattr(limits, "design", None) is None


def allowable_stress(props, limits, eff, which: str) -> np.ndarray:
    """The allowable stress of ``which`` (``"bending"`` or ``"shear"``), broadcasting to (K, C):
    the user's limits (K, 1), or the design strengths (K, C) when the job sets ``[design]``."""
    design = getattr(limits, "design", None)
    if design is None:
        strength = props["strength_bending" if which == "bending" else "strength_shear"]
        allow = limits.bending_allowable if which == "bending" else limits.shear_allowable
        return allow(strength)[:, None]
    return design.design_strength(props, eff.combinations, which)


def _table(value, field, what):
    if not isinstance(value, dict):
        raise SelectionError(f"{field}: expected a table such as {{{what}}}, got {brief(value)}")
    return value


def parse_design(table, model, where: str = "design", units=None) -> DesignBasis:
    """The ``[design]`` table of a selection job (``model``: the parsed beam) -> :class:`DesignBasis`.

    >>> from leanspan.beam.model import BeamModel, Support, Stiffness, DistributedLoad, Combination
    >>> m = BeamModel(4.0, (Support(0.0, "pin"), Support(4.0, "roller")), (Stiffness(0.0, 4.0, 1.0),),
    ...               (DistributedLoad("dead", 1e3, 1e3, 0, 4), DistributedLoad("snow", 2e3, 2e3, 0, 4)),
    ...               combinations=(Combination("ULS", (("dead", 1.35), ("snow", 1.5))),))
    >>> d = parse_design({"service_class": 2, "duration": {"dead": "permanent", "snow": "short"}}, m)
    >>> d.combination_kmod(m.combinations[0])
    (0.9, 'snow', 'short')
    >>> parse_design({"service_class": 4, "duration": {}}, m)
    Traceback (most recent call last):
    ...
    leanspan.errors.SelectionError: design.service_class: expected 1, 2 or 3 (EN 1995-1-1 2.3.1.3), got 4
    """
    allowed = {"service_class", "duration", "psi2", "final_limit"}
    if not isinstance(table, dict):
        raise SelectionError(f"{where}: expected a table with service_class, duration, psi2, final_limit")
    for key in table:
        if key not in allowed:
            raise SelectionError(f"{where}.{key}: unknown key; expected {', '.join(sorted(allowed))}")
    sc = table.get("service_class")
    if isinstance(sc, bool) or sc not in SERVICE_CLASSES:
        raise SelectionError(f"{where}.service_class: expected 1, 2 or 3 (EN 1995-1-1 2.3.1.3), got {brief(sc)}")
    cases = model.cases
    durations = dict(_table(table.get("duration", {}), f"{where}.duration", 'dead = "permanent", imposed = "medium"'))
    for case, d in durations.items():
        if case not in cases:
            raise SelectionError(f"{where}.duration.{case}: unknown load case (cases: {', '.join(cases)})")
        if d not in DURATIONS:
            raise SelectionError(f"{where}.duration.{case}: expected a load-duration class "
                                 f"{', '.join(DURATIONS)} (EN 1995-1-1 Table 2.1), got {brief(d)}")
    if model.self_weight is not None:
        durations.setdefault(model.self_weight, "permanent")  # the members' own weight
    used = {case for c in model.combinations for case, f in c.factors if f != 0}
    for case in cases:
        if case in used and case not in durations:
            raise SelectionError(f"{where}.duration: no load-duration class for case {case!r}; give "
                                 f"{case} = one of {', '.join(DURATIONS)}")
    psi2 = {}
    for case, v in _table(table.get("psi2", {}), f"{where}.psi2", "imposed = 0.3").items():
        if case not in cases:
            raise SelectionError(f"{where}.psi2.{case}: unknown load case (cases: {', '.join(cases)})")
        v = check_number(v, "factor", f"{where}.psi2.{case}", SelectionError, "a number from 0 to 1")
        if not 0.0 <= v <= 1.0:
            raise SelectionError(f"{where}.psi2.{case}: expected a number from 0 to 1, got {v:g}")
        psi2[case] = v
    deflection_cases = {case for c in model.combinations if c.check == "deflection" for case, f in c.factors if f != 0}
    for case in sorted(deflection_cases):
        if case not in psi2 and durations.get(case) != "permanent":
            raise SelectionError(f"{where}.psi2: no quasi-permanent factor for case {case!r} (a deflection "
                                 f"combination uses it); give {case} = psi2 (EN 1990 Table A1.1, e.g. 0.3 "
                                 "for domestic floors, 0 for snow below 1000 m)")
    final = None
    if "final_limit" in table:
        final = parse_limit(table["final_limit"], f"{where}.final_limit", units)
    return DesignBasis(int(sc), tuple(durations.items()), tuple(psi2.items()), final)
