"""The check registry: each check is one declarative entry.

A :class:`Check` says which catalogue columns it needs, how to compute its demand
for every candidate and combination at once from the beam's action effects
(:class:`Effects`, arrays (K candidates, C combinations)), its allowable, its label
and display units, the sentence it adds to the sheet, and which of the "not checked"
topics it covers. The screen, the per-candidate reference loop, the ranked table,
the JSON, the sheet's checks and its "not checked" list all read the registry, so
adding a check is one module (and its tests) that calls :func:`register`.

Examples
--------
>>> [c.name for c in registered()][:3]
['bending', 'shear', 'deflection']
>>> "lateral-torsional buckling (the member is assumed restrained against it)" in not_checked()
True
"""

from __future__ import annotations

import contextlib
from dataclasses import dataclass, field
from typing import Callable

import numpy as np

from ...errors import SelectionError

__all__ = ["Check", "Effects", "CheckRow", "TextRule", "register", "unregister", "registered", "active_checks", "get_check",
           "registered_check", "not_checked", "NOT_CHECKED", "limit_keys"]

#: What a sizing run may leave unchecked: topic -> the sentence on the sheet. A check that
#: covers a topic (``Check.covers``) takes its sentence off the list.
NOT_CHECKED = {
    "lateral_torsional_buckling": "lateral-torsional buckling (the member is assumed restrained against it)",
    "local_buckling": "local buckling of flanges, webs or thin walls",
    "bearing": "bearing at the supports",
    "local_bearing": "bearing under point loads, and web crippling",
    "connections": "connections, fixings and notches",
    "vibration": "vibration and footfall response",
    "fire": "fire resistance",
    "durability": "durability: moisture, decay and corrosion",
    "creep": "creep and long-term deflection",
    "combined_actions": "combined actions: axial force, torsion and bending about the minor axis",
}


@dataclass(frozen=True)
class Effects:
    """The beam's action effects for K candidates under C combinations (SI units).

    Every array is (K, C); entries are NaN where a combination is not of the kind that
    gives them (``M_max``, ``M_min``, ``V_abs`` come from strength combinations,
    ``v_abs`` and ``v_allowed`` from deflection combinations: the worst span's
    deflection magnitude and its allowed value).
    """

    M_max: np.ndarray
    M_min: np.ndarray
    V_abs: np.ndarray
    v_abs: np.ndarray
    v_allowed: np.ndarray
    combinations: tuple  # the model's Combination objects, in column order
    sampler: object = None  # the fields at any x: leanspan.select.screen.FieldSampler
    EI: np.ndarray | None = None  # the candidates' flexural stiffness (K,)
    mass_per_length: np.ndarray | None = None  # (K,)
    model: object = None  # the job's BeamModel
    limits: object = None  # the job's Limits (set by the screen before the checks run)

    def take(self, index) -> "Effects":
        """The effects of candidates ``index`` (keeps the (K, C) shape)."""
        index = np.atleast_1d(index)
        pick = (lambda a: None if a is None else np.asarray(a)[index])  # noqa: E731
        return Effects(*(getattr(self, f)[index] for f in ("M_max", "M_min", "V_abs", "v_abs", "v_allowed")),
                       self.combinations, None if self.sampler is None else self.sampler.take(index),
                       pick(self.EI), pick(self.mass_per_length), self.model,
                       self.limits)


@dataclass(frozen=True)
class CheckRow:
    """One line of the sheet's checks table, in SI values (the report formats them).

    ``action`` lists ``(label, value, display kind)`` of the forces behind the demand;
    ``demand`` and ``limit`` are in ``kind`` units; ``rule``, where given, is the limit's
    rule with a ``describe(units)`` method (``span/360``, ``12 mm``) shown beside it;
    ``keys`` names the values for the sheet's ``data-key`` attributes (``demand``,
    ``limit``, ``utilisation``); ``formula``, where given, is the check's formula with its
    numbers substituted: text pieces and ``(value, display kind)`` pairs (a bare float is a
    plain number), e.g. ``("σ = M / Sz = ", (28.7e3, "moment"), " / ", (1.83e-4, "section modulus"))``.
    """

    check: str
    combination: str
    action: tuple
    demand: float
    limit: float
    kind: str
    utilisation: float | None
    rule: object = None
    keys: dict = field(default_factory=dict)
    formula: tuple = ()  # the formula with its numbers: text pieces and (value, kind) pairs


@dataclass(frozen=True)
class TextRule:
    """A limit's rule printed as given beside the limit on the sheet (``CheckRow.rule``).

    >>> TextRule("minimum").describe("us")
    'minimum'
    """

    text: str

    def describe(self, units: str = "si") -> str:
        return self.text


class TextRule:
    """A limit's rule given as text (``"minimum"``, ``"span/250 (final)"``), for ``CheckRow.rule``."""

    def __init__(self, text):
        self.text = text

    def describe(self, units="si"):
        return self.text


@dataclass(frozen=True)
class Check:
    """One check: what it needs, how its demand and allowable are found, how it is shown.

    Attributes
    ----------
    name : str
        The key in ``utilisation`` (JSON) and the check's column in tables.
    label : str
        The column heading and the check's name on the sheet.
    columns : tuple of str
        Catalogue columns the demand and allowable read (``props[column]`` arrays (K,)).
    demand : callable
        ``demand(effects, props) -> (K, C)``: the demand of every candidate under every
        combination (NaN where the combination does not apply).
    allowable : callable
        ``allowable(props, limits, effects) -> array`` broadcasting to (K, C).
    kind : str
        Display kind of the demand and allowable (``"pressure"``, ``"length"`` ...,
        see :data:`leanspan.units.DISPLAY`).
    demand_key : str
        Key of the demand in a candidate's ``demands`` (``"sigma"``).
    sentence : str
        How the check works, for the sheet.
    covers : tuple of str
        Topics of :data:`NOT_CHECKED` this check answers.
    limit_keys : dict
        ``[limits]`` keys this check reads -> their kind (``"pressure"``, ``"number"``,
        ``"text"``, ``"lengths"``, ``"names"`` for a name or list of names); parsed into ``Limits.extra``.
    active : callable, optional
        ``active(limits) -> bool``: whether the job asks for this check (default: always). An
        inactive check adds no column, JSON key or sheet row, and covers nothing.
    action : callable, optional
        ``action(effects_row, combination_index) -> ((label, value, kind), ...)`` for the sheet.
    sheet_rows : callable, optional
        ``sheet_rows(chosen) -> [CheckRow]`` replacing the one default row (e.g. one row
        per span); ``chosen`` is a :class:`leanspan.select.chosen.ChosenMember`.
    demand_json : callable, optional
        ``demand_json(demand_row) -> {key: value}``: the candidate's ``demands`` entries from
        its demand row (C,), replacing the one ``demand_key`` entry (for a check whose
        columns are sub-checks in different units rather than combinations).
    details : callable, optional
        ``details(effects, props) -> {key: value}`` for ONE candidate (``effects`` taken with
        :meth:`Effects.take`, ``props`` arrays of length 1): the values behind its result (Mcr,
        segment, C1, reduction factor ...; SI floats, strings), shown as ``checks.<name>`` in
        the selection's JSON for the chosen (else closest) candidate.
    reports_only : callable, optional
        ``reports_only(model) -> bool``: true when, for this beam, the check cannot fail a
        candidate and only reports a value (bearing with no ``bearing_length`` given). A first
        pass that only sorts a large space into pass and fail may skip it (the built-up search
        does, and screens the rows it keeps again in full).
    formula : callable, optional
        ``formula(effects, props, c) -> tuple`` for ONE candidate at combination ``c``: the
        :attr:`CheckRow.formula` of its default sheet row (the sheet prints it with the numbers
        in display units).
    peaks_suffice : callable, optional
        ``peaks_suffice(limits) -> bool``: true when the check's largest utilisation over the
        combinations is its utilisation at the effects' worst values over all of them (largest
        ``M_max`` and ``V_abs``, smallest ``M_min``, the ``v_abs``, ``v_allowed`` pair of the
        largest ratio): its allowable does not depend on the combination, its demand rises with
        ``M_max``, ``V_abs`` and the deflection ratio and falls with ``M_min``, and it reads
        nothing else of the effects. A first pass over a long list then works on those worst
        values alone (:func:`leanspan.select.screen.screen_verdicts`).
    """

    name: str
    label: str
    columns: tuple
    demand: Callable
    allowable: Callable
    kind: str
    demand_key: str
    sentence: str
    covers: tuple = ()
    limit_keys: dict = field(default_factory=dict)
    active: Callable | None = None
    action: Callable | None = None
    sheet_rows: Callable | None = None
    demand_json: Callable | None = None
    details: Callable | None = None
    formula: Callable | None = None
    reports_only: Callable | None = None
    peaks_suffice: Callable | None = None

    def __post_init__(self):
        if not self.name.isidentifier():
            raise SelectionError(f"check name {self.name!r}: expected a plain identifier")
        unknown = set(self.covers) - set(NOT_CHECKED)
        if unknown:
            raise SelectionError(f"check {self.name!r}: covers unknown topic {sorted(unknown)[0]!r}; "
                                 f"expected one of {', '.join(NOT_CHECKED)}")


_REGISTRY: dict[str, Check] = {}


def register(check: Check) -> Check:
    """Add ``check`` to the registry (after those already there); returns it."""
    if check.name in _REGISTRY:
        raise SelectionError(f"check {check.name!r} is registered already")
    _REGISTRY[check.name] = check
    return check


def unregister(name: str) -> None:
    """Remove the check called ``name``."""
    _REGISTRY.pop(name, None)


@contextlib.contextmanager
def registered_check(check: Check):
    """``with registered_check(c):`` registers ``c`` for the block only (tests, one-off runs)."""
    register(check)
    try:
        yield check
    finally:
        unregister(check.name)


def registered() -> tuple:
    """The registered checks, in order."""
    return tuple(_REGISTRY.values())


def get_check(name: str) -> Check:
    return _REGISTRY[name]


def active_checks(limits=None) -> tuple:
    """The registered checks the job's ``limits`` ask for, in order (all when ``limits`` is None)."""
    return tuple(c for c in _REGISTRY.values() if c.active is None or limits is None or c.active(limits))


def not_checked(checks=None) -> list:
    """The "not checked" sentences left after the ``covers`` of ``checks`` (default: every
    registered check that is always active)."""
    checks = [c for c in _REGISTRY.values() if c.active is None] if checks is None else checks
    covered = {t for c in checks for t in c.covers}
    return [text for topic, text in NOT_CHECKED.items() if topic not in covered]


def limit_keys() -> dict:
    """Every ``[limits]`` key the registered checks read -> its kind."""
    out = {}
    for c in _REGISTRY.values():
        out.update(c.limit_keys)
    return out
