"""Units at the edge: parse quantities from job files into SI floats, format them back.

One pint registry serves the whole program; it is created on first use so that
``leanspan --help`` stays fast. Inside the program every value is an SI float
(m, N, Pa, kg). A dimensioned input is a string with its unit (``"300 mm"``,
``"5 kN/m"``, ``"0.8 kip/ft"``) or a bare number under a declared default unit
system (``units = "mm"`` or ``units = {length = "mm", force = "kN"}``).

Examples
--------
>>> parse("300 mm", "length", "part.d")
0.3
>>> round(parse("0.8 kip/ft", "force/length", "load.w"), 3)
11675.122
>>> parse(12, "length", "b", UnitSystem.from_spec("mm", "units"))
0.012
>>> parse("5 kN", "force/length", "load.w")
Traceback (most recent call last):
...
leanspan.errors.UnitsError: load.w: expected a force per length (e.g. '5 kN/m'), got '5 kN' (a force)
"""

from __future__ import annotations

from dataclasses import dataclass
from functools import lru_cache
import math
import re

from .errors import UnitsError, brief

__all__ = ["KINDS", "RANGES", "UnitSystem", "parse", "check_range", "check_number", "unit_factor", "registry", "DISPLAY", "display_factor", "fmt", "utilisation_text"]

# Exact definitions: 1 in = 0.0254 m, 1 ft = 0.3048 m, 1 lbf = 4.4482216152605 N,
# 1 lb = 0.45359237 kg. Every conversion in the program uses these.
_IN, _FT, _LBF, _LB = 0.0254, 0.3048, 4.4482216152605, 0.45359237
_KIP = 1000 * _LBF
_PSI = _LBF / _IN**2

# kind -> (pint dimensionality, length exponent, force exponent, mass exponent, example)
# The exponents say how a bare number is scaled under a declared unit system.
KINDS: dict[str, tuple[str, int, int, int, str]] = {
    "length": ("[length]", 1, 0, 0, "'300 mm'"),
    "area": ("[length] ** 2", 2, 0, 0, "'5000 mm^2'"),
    "second moment": ("[length] ** 4", 4, 0, 0, "'8.5e7 mm^4'"),
    "force": ("[mass] * [length] / [time] ** 2", 0, 1, 0, "'12 kN'"),
    "force/length": ("[mass] / [time] ** 2", -1, 1, 0, "'5 kN/m'"),
    "moment": ("[mass] * [length] ** 2 / [time] ** 2", 1, 1, 0, "'20 kN*m'"),
    "pressure": ("[mass] / [length] / [time] ** 2", -2, 1, 0, "'355 MPa'"),
    "flexural stiffness": ("[mass] * [length] ** 3 / [time] ** 2", 2, 1, 0, "'2e13 N*mm^2'"),
    "density": ("[mass] / [length] ** 3", -3, 0, 1, "'500 kg/m^3'"),
    "mass/length": ("[mass] / [length]", -1, 0, 1, "'25 kg/m'"),
    "frequency": ("1 / [time]", 0, 0, 0, "'8 Hz'"),
    "compliance": ("[time] ** 2 / [mass]", 1, -1, 0, "'1.5 mm/kN'"),
}

# The accepted magnitudes of every input quantity, by range name: (smallest non-zero, largest,
# SI unit shown in messages). Zero passes (a position at 0, an unloaded case); within these bounds
# no product or power the program forms can overflow a float. ``parse`` takes the range of its
# ``kind`` unless told another (``within="section length"``).
RANGES: dict[str, tuple[float, float, str]] = {
    "length": (1e-6, 1e4, "m"),              # beams: lengths, spans, spacings, deflection limits
    "position": (0.0, 1e4, "m"),             # beams: at, from, to
    "section length": (1e-5, 100.0, "m"),    # section dimensions, size limits
    "section position": (0.0, 100.0, "m"),   # polygon points, placements (at)
    "element size": (1e-7, 100.0, "m"),      # section --element-size (the mesh budget bounds it too)
    "area": (1e-12, 1e4, "m^2"),
    "section modulus": (1e-18, 1e6, "m^3"),
    "second moment": (1e-24, 1e8, "m^4"),
    "force": (0.0, 1e12, "N"),
    "force/length": (0.0, 1e12, "N/m"),     # distributed loads and spring stiffnesses
    "moment": (0.0, 1e12, "N*m"),           # couples and rotational springs
    "pressure": (1e-6, 1e12, "Pa"),          # stresses, moduli, area loads
    "flexural stiffness": (1e-6, 1e16, "N*m^2"),
    "density": (1e-3, 1e5, "kg/m^3"),
    "mass/length": (0.0, 1e6, "kg/m"),
    "frequency": (1e-3, 1e4, "Hz"),          # limits.min_frequency
    "compliance": (1e-12, 1.0, "m/N"),       # limits.point_deflection
    "factor": (0.0, 1e6, ""),                 # combination factors, span/N
    "stress factor": (1e-6, 1e6, ""),        # limits.stress_factor
    "angle": (0.0, 1e6, "degrees"),
    "points": (3, 20000, "points"),          # vertices of one polygon (outline plus holes)
    "parts": (1, 1000, "tables"),            # [[part]] or [[hole]] tables of one section
}


def check_range(value: float, within: str, field: str, error=UnitsError, shown=None) -> float:
    """Return ``value`` if it is finite and 0 or of a magnitude in ``RANGES[within]``; else raise
    ``error`` naming ``field`` and the accepted range (``shown`` is the value as the user wrote it).

    >>> check_range(0.3, "section length", "part[1].b")
    0.3
    >>> check_range(1e300, "length", "beam.length", shown="1e300 m")
    Traceback (most recent call last):
    ...
    leanspan.errors.UnitsError: beam.length: '1e300 m' is out of range; expected a magnitude from 1e-06 to 10000 m (or 0)
    """
    lo, hi, unit = RANGES[within]
    text = repr(value if shown is None else shown)
    if not math.isfinite(value):
        raise error(f"{field}: expected a finite value, got {text}")
    if value != 0 and not lo <= abs(value) <= hi:
        unit = f" {unit}" if unit else ""
        if isinstance(shown, (int, float)) and not isinstance(shown, bool) and value != _as_float(shown):
            text += f" (= {value:.4g}{unit})"  # a bare number scaled by the file's units
        accepted = f"at most {hi:g}{unit}" if lo == 0 else f"from {lo:g} to {hi:g}{unit} (or 0)"
        raise error(f"{field}: {text} is out of range; expected a magnitude {accepted}")
    return value


def _as_float(x) -> float:
    try:
        return float(x)
    except OverflowError:  # an integer beyond any float
        return math.inf


def check_number(value, within: str, field: str, error=UnitsError, expected: str = "a number") -> float:
    """A plain number (not a bool, not text) within ``RANGES[within]``, as a float.

    >>> check_number(1.35, "factor", "combination[1].factors.dead")
    1.35
    >>> check_number("x", "factor", "combination[1].factors.dead")
    Traceback (most recent call last):
    ...
    leanspan.errors.UnitsError: combination[1].factors.dead: expected a number, got 'x'
    """
    if isinstance(value, bool) or not isinstance(value, (int, float)):
        raise error(f"{field}: expected {expected}, got {brief(value)}")
    return check_range(_as_float(value), within, field, error, shown=value)


_KIND_WORDS = {
    "length": "a length",
    "area": "an area",
    "second moment": "a second moment of area",
    "force": "a force",
    "force/length": "a force per length",
    "moment": "a moment",
    "pressure": "a stress or pressure",
    "flexural stiffness": "a flexural stiffness EI",
    "density": "a density",
    "mass/length": "a mass per length",
    "frequency": "a frequency",
    "compliance": "a deflection per force",
}


@lru_cache(maxsize=1)
def registry():
    """Return the one pint ``UnitRegistry`` (created on first call)."""
    import pint

    ureg = pint.UnitRegistry()
    return ureg


@dataclass(frozen=True)
class UnitSystem:
    """Default units for bare numbers: metres per length unit, newtons per force unit.

    ``length`` and ``force`` are SI factors; ``None`` means bare numbers are refused.
    """

    length: float | None = None
    force: float | None = None
    mass: float | None = None
    label: str = ""

    @classmethod
    def from_spec(cls, spec, field: str = "units") -> "UnitSystem":
        """Build from ``"mm"`` or ``{length = "mm", force = "kN"}`` (``None`` gives no defaults)."""
        if spec is None:
            return cls()
        if isinstance(spec, str):
            spec = {"length": spec}
        if not isinstance(spec, dict):
            raise UnitsError(f"{field}: expected a length unit such as \"mm\" or a table "
                             f"{{length = \"mm\", force = \"kN\"}}, got {brief(spec)}")
        unknown = set(spec) - {"length", "force", "mass"}
        if unknown:
            raise UnitsError(f"{field}: unknown key {sorted(unknown)[0]!r}; expected length, force or mass")
        factors = {}
        for key in ("length", "force", "mass"):
            if key in spec:
                text = spec[key]
                if not isinstance(text, str):
                    raise UnitsError(f"{field}.{key}: expected a unit name such as \"mm\", got {brief(text)}")
                factors[key], why = _si_factor(text, key)
                if why == "unknown":
                    raise UnitsError(f"{field}.{key}: unknown unit {text!r}")
                if why:
                    raise UnitsError(f"{field}.{key}: {text!r} is not a unit of {key}")
        return cls(label=str(spec), **factors)


# Common units by kind, exactly: these need no pint import (a user CSV header, units = "mm").
_FAST: dict[str, dict[str, float]] = {
    "length": {"m": 1.0, "cm": 1e-2, "mm": 1e-3, "in": _IN, "inch": _IN, "ft": _FT},
    "area": {"m^2": 1.0, "m2": 1.0, "cm^2": 1e-4, "cm2": 1e-4, "mm^2": 1e-6, "mm2": 1e-6,
             "in^2": _IN**2, "in2": _IN**2},
    "section modulus": {"m^3": 1.0, "m3": 1.0, "cm^3": 1e-6, "cm3": 1e-6, "mm^3": 1e-9,
                        "mm3": 1e-9, "in^3": _IN**3, "in3": _IN**3},
    "second moment": {"m^4": 1.0, "m4": 1.0, "cm^4": 1e-8, "cm4": 1e-8, "mm^4": 1e-12,
                      "mm4": 1e-12, "in^4": _IN**4, "in4": _IN**4},
    "force": {"N": 1.0, "kN": 1e3, "MN": 1e6, "lbf": _LBF, "kip": _KIP},
    "mass": {"kg": 1.0, "t": 1e3, "lb": _LB},
    "pressure": {"Pa": 1.0, "kPa": 1e3, "MPa": 1e6, "GPa": 1e9, "N/mm^2": 1e6, "N/mm2": 1e6,
                 "kN/mm^2": 1e9, "kN/mm2": 1e9, "psi": _PSI, "ksi": 1e3 * _PSI},
    "density": {"kg/m^3": 1.0, "kg/m3": 1.0, "t/m^3": 1e3, "t/m3": 1e3, "g/cm^3": 1e3,
                "g/cm3": 1e3, "lb/ft^3": _LB / _FT**3, "lb/ft3": _LB / _FT**3, "pcf": _LB / _FT**3},
    "mass/length": {"kg/m": 1.0, "lb/ft": _LB / _FT, "plf": _LB / _FT},
    "dimensionless": {"": 1.0, "-": 1.0, "rad": 1.0},
}
# kinds beyond KINDS that a unit can be checked against: pint dimensionality, words
_MORE_KINDS = {"section modulus": ("[length] ** 3", "a length cubed"),
               "mass": ("[mass]", "a mass"),
               "dimensionless": ("", "dimensionless")}


def _si_factor(text: str, kind: str) -> tuple[float | None, str]:
    """SI value of one ``text`` unit of ``kind``, or ``(None, why)`` with why "unknown" or "kind"."""
    key = text.replace(" ", "").replace("**", "^").replace("³", "^3").replace("²", "^2").replace("⁴", "^4")
    fast = _FAST.get(kind, {})
    if key in fast:
        return fast[key], ""
    if len(text) > _MAX_TEXT or not _powers_ok(text):
        return None, "unknown"
    ureg = registry()
    try:
        q = ureg.Quantity(1.0, text)
    except Exception:
        return None, "unknown"
    dim = KINDS[kind][0] if kind in KINDS else _MORE_KINDS[kind][0]
    if q.dimensionality != ureg.get_dimensionality(dim):
        return None, "kind"
    factor = float(q.to_base_units().magnitude)
    return (factor, "") if math.isfinite(factor) and factor > 0 else (None, "unknown")


def unit_factor(unit_text: str, kind: str, field: str, error=UnitsError) -> float:
    """SI value of one ``unit_text`` unit, for a quantity of ``kind``; raise ``error`` naming ``field``.

    ``kind`` is one of :data:`KINDS` or "section modulus", "mass", "dimensionless". Common units
    come from a small exact table; anything else goes through pint.

    >>> unit_factor("in", "length", "x.csv: column 'd'"), unit_factor("kip", "force", "f")
    (0.0254, 4448.2216152605)
    >>> round(unit_factor("ft*lbf", "moment", "m"), 9)  # through pint: 0.3048 m x 4.4482216152605 N
    1.355817948
    >>> unit_factor("kg", "length", "x.csv: column 'd'")
    Traceback (most recent call last):
    ...
    leanspan.errors.UnitsError: x.csv: column 'd': unit 'kg' is not a length
    """
    factor, why = _si_factor(unit_text, kind)
    if why == "unknown":
        raise error(f"{field}: unknown unit {unit_text!r}")
    if why == "kind":
        words = _KIND_WORDS[kind] if kind in _KIND_WORDS else _MORE_KINDS[kind][1]
        raise error(f"{field}: unit {unit_text!r} is not {words}")
    return factor


def _describe(dimensionality) -> str:
    ureg = registry()
    for kind, (dim, *_rest) in KINDS.items():
        if dimensionality == ureg.get_dimensionality(dim):
            return _KIND_WORDS[kind]
    return "dimensionless" if not dimensionality else str(dimensionality)


_MAX_TEXT = 100
_POWER = re.compile(r"(\*\*|\^)")
_UNIT_POWER = re.compile(r"[A-Za-z_]\s*(\*\*|\^)\s*\(?\s*[-+]?\d{1,2}(\.\d+)?\s*\)?")


def _powers_ok(text: str) -> bool:
    """Every ``**`` or ``^`` raises a unit name to a small number (``mm^2``, ``m**-1``): pint
    evaluates numeric powers exactly, and ``9**9**9`` would never finish."""
    return len(_POWER.findall(text)) == len(_UNIT_POWER.findall(text))


# The unit names job files use, exactly: SI value and (length, mass, time) exponents. A quantity
# written with these alone ("5 kN/m", "2e13 N*mm^2") is read without building pint's registry
# (about a second); anything else goes to pint. tests/test_units_fast.py holds the two to agree.
_UNIT_TABLE = {
    "m": (1.0, (1, 0, 0)), "mm": (1e-3, (1, 0, 0)), "cm": (1e-2, (1, 0, 0)), "km": (1e3, (1, 0, 0)),
    "in": (_IN, (1, 0, 0)), "inch": (_IN, (1, 0, 0)), "ft": (_FT, (1, 0, 0)),
    "N": (1.0, (1, 1, -2)), "kN": (1e3, (1, 1, -2)), "MN": (1e6, (1, 1, -2)), "lbf": (_LBF, (1, 1, -2)),
    "kip": (_KIP, (1, 1, -2)),
    "Pa": (1.0, (-1, 1, -2)), "kPa": (1e3, (-1, 1, -2)), "MPa": (1e6, (-1, 1, -2)), "GPa": (1e9, (-1, 1, -2)),
    "psi": (_PSI, (-1, 1, -2)), "ksi": (1e3 * _PSI, (-1, 1, -2)),
    "kg": (1.0, (0, 1, 0)), "g": (1e-3, (0, 1, 0)), "t": (1e3, (0, 1, 0)), "lb": (_LB, (0, 1, 0)),
    "s": (1.0, (0, 0, 1)), "Hz": (1.0, (0, 0, -1)),
}
_NUMBER_UNIT = re.compile(r"^\s*([-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?)\s*([A-Za-z][A-Za-z0-9*/^]*)\s*$")
_FACTOR = re.compile(r"^([A-Za-z]+)(?:\^([-+]?\d))?$")


def _dim_vector(dim: str) -> tuple:
    """``"[mass] / [length] / [time] ** 2"`` -> (-1, 1, -2): the (length, mass, time) exponents."""
    out = {"length": 0, "mass": 0, "time": 0}
    sign = 1
    for token in re.findall(r"\[(\w+)\](?:\s*\*\*\s*(\d+))?|(/)", dim):
        name, power, slash = token
        if slash:
            sign = -1
        else:
            out[name] += sign * int(power or 1)
    return (out["length"], out["mass"], out["time"])


def _fast_quantity(text: str):
    """``(SI magnitude, exponents)`` of ``"5 kN/m"`` from :data:`_UNIT_TABLE`, or None to ask pint."""
    m = _NUMBER_UNIT.match(text)
    if not m:
        return None
    number, unit = m.groups()
    num, slash, den = unit.partition("/")
    if "/" in den or "*" in den or (slash and not den):
        return None  # kN/m/m and kN/m*s (read left to right, (kN/m)*s) go to pint
    factor, dims = 1.0, [0, 0, 0]
    for part, sign in ((num, 1), (den, -1)):
        for f in (part.split("*") if part else []):
            fm = _FACTOR.match(f)
            if not fm or fm.group(1) not in _UNIT_TABLE:
                return None
            power = sign * int(fm.group(2) or 1)
            si, d = _UNIT_TABLE[fm.group(1)]
            factor *= si**power
            dims = [a + power * b for a, b in zip(dims, d)]
    return float(number) * factor, tuple(dims)


@lru_cache(maxsize=4096)
def _read_quantity(text: str, dim: str):
    """``(problem, SI magnitude)`` of a quantity text: problem "" when it has dimension ``dim``,
    else the words for what it is, or None when pint cannot read it (cached: jobs repeat values)."""
    fast = _fast_quantity(text)
    if fast is not None and fast[1] == _dim_vector(dim):
        return "", fast[0]
    ureg = registry()
    try:
        q = ureg.Quantity(text)
        if not hasattr(q, "dimensionality"):
            return "dimensionless", None
        if q.dimensionality != ureg.get_dimensionality(dim):
            return _describe(q.dimensionality), None
        return "", float(q.to_base_units().magnitude)
    except Exception:  # pint's parse errors, a complex or non-numeric magnitude
        return None, None


def parse(value, kind: str, field: str, units: UnitSystem | None = None, within: str | None = None) -> float:
    """Parse ``value`` as a quantity of ``kind`` and return it as an SI float.

    Parameters
    ----------
    value : str or number
        ``"300 mm"`` style text, or a bare number when ``units`` declares a default.
    kind : str
        One of :data:`KINDS` (``"length"``, ``"force/length"``, ``"pressure"`` ...).
    field : str
        Where the value came from, for the error message (``"load[2].w"``).
    units : UnitSystem, optional
        Defaults for bare numbers.
    within : str, optional
        The entry of :data:`RANGES` the value must fall in (default: ``kind``'s own).

    Raises
    ------
    UnitsError
        No unit where one is needed, an unknown unit, a unit of the wrong kind, or a value
        out of range.
    """
    dim, e_len, e_force, e_mass, example = KINDS[kind]
    word = _KIND_WORDS[kind]
    if isinstance(value, bool):
        raise UnitsError(f"{field}: expected {word} (e.g. {example}), got {brief(value)}")
    if isinstance(value, (int, float)):
        units = units or UnitSystem()
        needs = [(units.length, e_len, "length"), (units.force, e_force, "force"), (units.mass, e_mass, "mass")]
        factor = 1.0
        for unit, exp, name in needs:
            if exp == 0:
                continue
            if unit is None:
                raise UnitsError(f"{field}: {value!r} has no unit; expected {word} such as {example} "
                                 f"(or declare a default {name} unit with units = ...)")
            factor *= unit**exp
        try:
            result = float(value) * factor
        except OverflowError:  # an integer beyond any float
            result = math.inf
    elif isinstance(value, str):
        if len(value) > _MAX_TEXT or not _powers_ok(value):
            raise UnitsError(f"{field}: cannot read {value[:_MAX_TEXT]!r} as {word} (e.g. {example}; "
                             f"at most {_MAX_TEXT} characters, powers only on unit names such as mm^2)")
        got, result = _read_quantity(value.strip(), dim)
        if got is None:
            raise UnitsError(f"{field}: cannot read {value!r} as {word} (e.g. {example})")
        if got == "dimensionless":
            raise UnitsError(f"{field}: {value!r} has no unit; expected {word} such as {example}")
        if got:
            raise UnitsError(f"{field}: expected {word} (e.g. {example}), got {value!r} ({got})")
    else:
        raise UnitsError(f"{field}: expected {word} (e.g. {example}), got {brief(value)}")
    return check_range(result, within or kind, field, shown=value)


# Display units: kind -> (label, SI value of one display unit).
DISPLAY: dict[str, dict[str, tuple[str, float]]] = {
    "si": {
        "length": ("mm", 1e-3),
        "span": ("m", 1.0),
        "area": ("mm²", 1e-6),
        "second moment": ("mm⁴", 1e-12),
        "section modulus": ("mm³", 1e-9),
        "warping": ("mm⁶", 1e-18),
        "force": ("kN", 1e3),
        "force/length": ("kN/m", 1e3),
        "moment": ("kN·m", 1e3),
        "pressure": ("MPa", 1e6),
        "modulus": ("MPa", 1e6),
        "flexural stiffness": ("kN·m²", 1e3),
        "axial stiffness": ("kN", 1e3),
        "density": ("kg/m³", 1.0),
        "mass/length": ("kg/m", 1.0),
        "mass": ("kg", 1.0),
        "rotation": ("rad", 1.0),
        "shear factor": ("1/mm²", 1e6),
        "spring": ("kN/m", 1e3),
        "rotational spring": ("kN·m/rad", 1e3),
        "frequency": ("Hz", 1.0),
        "compliance": ("mm/kN", 1e-6),
    },
    "us": {
        "length": ("in", _IN),
        "span": ("ft", _FT),
        "area": ("in²", _IN**2),
        "second moment": ("in⁴", _IN**4),
        "section modulus": ("in³", _IN**3),
        "warping": ("in⁶", _IN**6),
        "force": ("kip", _KIP),
        "force/length": ("kip/ft", _KIP / _FT),
        "moment": ("kip·ft", _KIP * _FT),
        "pressure": ("ksi", _KIP / _IN**2),
        "modulus": ("ksi", _KIP / _IN**2),
        "flexural stiffness": ("kip·in²", _KIP * _IN**2),
        "axial stiffness": ("kip", _KIP),
        "density": ("lb/ft³", _LB / _FT**3),
        "mass/length": ("lb/ft", _LB / _FT),
        "mass": ("lb", _LB),
        "rotation": ("rad", 1.0),
        "shear factor": ("1/in²", 1 / _IN**2),
        "spring": ("kip/in", _KIP / _IN),
        "rotational spring": ("kip·ft/rad", _KIP * _FT),
        "frequency": ("Hz", 1.0),
        "compliance": ("in/kip", _IN / _KIP),
    },
}


def display_factor(kind: str, system: str = "si") -> tuple[str, float]:
    """Return ``(label, si_per_unit)`` for showing a quantity of ``kind``.

    >>> display_factor("moment", "us")[0]
    'kip·ft'
    """
    return DISPLAY[system][kind]


def fmt(value: float, digits: int = 4, strip: bool = True) -> str:
    """Format a number with ``digits`` significant figures, plain where readable;
    ``strip=False`` keeps trailing zeros (for columns of like values).

    >>> fmt(1234567.0), fmt(798727.0), fmt(0.000123456), fmt(12.5), fmt(0.0), fmt(18.9, strip=False)
    ('1.235e+06', '798700', '0.0001235', '12.5', '0', '18.90')
    """
    if value is None or (isinstance(value, float) and math.isnan(value)):
        return "-"
    if value == 0:
        return "0"
    if math.isinf(value):
        return "inf" if value > 0 else "-inf"
    mag = abs(value)
    if 1e-4 <= mag < 1e6:
        exp = int(math.floor(math.log10(mag)))
        decimals = max(0, digits - 1 - exp)
        # large values keep ``digits`` significant figures too: 798727 -> 798700
        text = f"{value:.{decimals}f}" if exp < digits else f"{round(value, digits - 1 - exp):.0f}"
        if "." in text and strip:
            text = text.rstrip("0").rstrip(".")
        return text
    return f"{value:.{digits - 1}e}"


def utilisation_text(u) -> str:
    """A utilisation to 3 decimals, rounded up, so a failure never reads as within the limit.

    >>> utilisation_text(1.0003), utilisation_text(0.9335), utilisation_text(1.0), utilisation_text(None)
    ('1.001', '0.934', '1.000', '-')
    >>> utilisation_text(float("inf"))   # a check the section cannot pass (it cannot be made for it)
    'inf'
    """
    if u is None:
        return "-"
    if math.isinf(float(u)):
        return "inf"
    return f"{math.ceil(round(float(u) * 1000.0, 6)) / 1000.0:.3f}"
