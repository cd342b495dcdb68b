"""The project's exceptions: one base class and one subclass per domain.

Every class also inherits :class:`ValueError`, so callers that only know the
standard library can still catch bad input. Messages name the bad value and what
was expected; the CLI prints ``str(err)`` on one line and exits with status 2.

Examples
--------
>>> from leanspan.errors import UnitsError, LeanspanError
>>> err = UnitsError("load.w: expected a force per length, got '5 kN'")
>>> isinstance(err, LeanspanError) and isinstance(err, ValueError)
True
"""

__all__ = [
    "LeanspanError",
    "InputError",
    "UnitsError",
    "GeometryError",
    "MaterialError",
    "CatalogError",
    "BeamError",
    "MechanismError",
    "SelectionError",
    "NumericalError",
    "brief",
]


def brief(value, limit: int = 80) -> str:
    """``repr(value)`` cut to ``limit`` characters, so that a message stays one short line.

    >>> brief(list(range(100)), 20)
    '[0, 1, 2, 3, 4, 5, 6… and 370 more characters'
    """
    text = repr(value)
    return text if len(text) <= limit else f"{text[:limit]}… and {len(text) - limit} more characters"


class LeanspanError(ValueError):
    """Base of every error leanspan raises on bad input."""


class InputError(LeanspanError):
    """A malformed file, a missing or unknown field, a bad value."""


class UnitsError(InputError):
    """A quantity with no unit, an unknown unit or a unit of the wrong kind."""


class GeometryError(InputError):
    """Impossible geometry: self-intersection, zero area, overlaps, bad dimensions."""


class MaterialError(InputError):
    """An unknown material or a bad row in a materials file."""


class CatalogError(InputError):
    """A bad catalogue row, an unknown family or a missing catalogue file."""


class BeamError(InputError):
    """A bad beam model: supports or loads off the beam, bad lengths, unknown cases."""


class MechanismError(BeamError):
    """The beam (with its supports and hinges) can move without straining."""


class SelectionError(InputError):
    """A bad search or limits table in a selection job."""


class NumericalError(LeanspanError):
    """A computation overflowed or gave no finite value (inputs at the edge of their ranges)."""
