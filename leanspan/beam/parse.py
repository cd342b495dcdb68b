"""Job-file tables (a TOML dict) to a validated :class:`~leanspan.beam.model.BeamModel`.

Tables read here (GUIDE section 4): ``units``, ``[beam]``, ``[[support]]``,
``[[stiffness]]``, ``[[hinge]]``, ``[[load]]``, ``[[combination]]``. The array tables may
also sit inside ``[beam]`` (``[[beam.load]]``). Other top-level tables (``[search]``,
``[limits]`` ...) belong to other commands and are ignored. Unknown keys inside the
tables read here are errors, so a typo never passes silently.

``[beam]`` keys: ``length`` or ``spans = [...]`` (pin at the start, rollers at every
other span end; ``[[support]]`` tables then replace the support at the same position or
add one), ``EI`` *or* ``section`` (a section file relative to the job file, or an inline
table) with ``material`` *or* ``[[stiffness]]`` tables (``from``, ``to``, ``EI``; the
pieces must cover the beam), ``mass_per_length``, ``self_weight = "dead"`` (the case that
carries mass_per_length * g), ``name``.

Examples
--------
>>> from pathlib import Path
>>> m = parse_beam({"units": {"length": "m", "force": "kN"},
...                 "beam": {"length": 6, "EI": 8000},
...                 "support": [{"at": 0, "type": "pin"}, {"at": 6, "type": "roller"}],
...                 "load": [{"case": "imposed", "type": "point", "P": 10, "at": 2}],
...                 "combination": [{"name": "SLS", "factors": {"imposed": 1.0},
...                                  "check": "deflection", "limit": "span/360"}]}, Path("."))
>>> m.loads[0].P, m.stiffness[0].EI, m.combinations[0].limit.ratio
(10000.0, 8000000.0, 360.0)
>>> parse_beam({"beam": {"length": "6 m", "EI": "8 MN*m^2"},
...             "load": [{"case": "dead", "type": "udl", "w": "5 kN"}]}, Path("."))
Traceback (most recent call last):
...
leanspan.errors.UnitsError: load[1].w: expected a force per length (e.g. '5 kN/m'), got '5 kN' (a force)
"""

from __future__ import annotations

import bisect
import re
from pathlib import Path

from ..errors import BeamError, brief
from ..units import UnitSystem, check_number, parse
from .model import (BeamModel, Combination, Couple, DeflectionLimit, DistributedLoad, PointLoad,
                    Stiffness, Support)

__all__ = ["parse_beam", "parse_limit"]

_BEAM_KEYS = {"length", "spans", "EI", "section", "material", "catalog", "mass_per_length", "self_weight",
              "name", "title", "description", "support", "stiffness", "hinge", "load", "combination"}
_LOAD_KEYS = {"point": {"P", "at"}, "moment": {"M", "at"}, "udl": {"w", "from", "to", "spacing"},
              "linear": {"w1", "w2", "from", "to", "spacing"}}
_RATIO = re.compile(r"^\s*(?:span|l)\s*/\s*([0-9]*\.?[0-9]+(?:[eE][-+]?[0-9]+)?)\s*$", re.IGNORECASE)


def _need(table: dict, key: str, where: str):
    if key not in table:
        raise BeamError(f"{where}: missing '{key}'")
    return table[key]


def _only(table, allowed, where):
    if not isinstance(table, dict):
        raise BeamError(f"{where}: expected a table, got {brief(table)}")
    extra = sorted(set(table) - set(allowed))
    if extra:
        raise BeamError(f"{where}: unknown key '{extra[0]}' (expected: {', '.join(sorted(allowed))})")


def _tables(data, beam, key, prefix):
    a, b = data.get(key), beam.get(key)
    if a is not None and b is not None:
        raise BeamError(f"{prefix}{key}: give [[{key}]] either at the top level or inside [beam], not both")
    items = a if a is not None else (b if b is not None else [])
    if isinstance(items, dict):
        items = [items]
    if not isinstance(items, list):
        raise BeamError(f"{prefix}{key}: expected [[{key}]] tables, got {brief(items)}")
    return items


def parse_limit(value, where: str = "limit", units: UnitSystem | None = None) -> DeflectionLimit:
    """``"span/360"`` (also ``"L/360"``) or a length (``"12 mm"``) to a :class:`DeflectionLimit`.

    >>> parse_limit("span/250").ratio, parse_limit("12 mm").absolute
    (250.0, 0.012)
    """
    if isinstance(value, str):
        m = _RATIO.match(value)
        if m:
            ratio = float(m.group(1))
            if ratio <= 0:
                raise BeamError(f"{where}: expected span/N with N > 0, got {brief(value)}")
            check_number(ratio, "factor", f"{where}: N in span/N", BeamError)
            return DeflectionLimit(ratio=ratio, text=value)
        if "/" in value and not any(ch.isdigit() for ch in value.split("/")[0]):
            raise BeamError(f"{where}: expected \"span/N\" (e.g. \"span/360\") or a length such as "
                            f"\"12 mm\", got {brief(value)}")
    length = parse(value, "length", where, units)
    if length <= 0:
        raise BeamError(f"{where}: expected a positive length, got {brief(value)}")
    return DeflectionLimit(absolute=length, text=str(value))


def _stiffness_from_section(beam, base_dir, prefix, units, section_stiffness):
    spec, material, catalog = beam["section"], beam.get("material"), beam.get("catalog")
    if material is not None and not isinstance(material, str):
        raise BeamError(f"{prefix}beam.material: expected a material name, got {brief(material)}")
    if catalog is not None and not isinstance(catalog, str):
        raise BeamError(f"{prefix}beam.catalog: expected a CSV file name, got {brief(catalog)}")
    if section_stiffness is None:
        raise BeamError(f"{prefix}beam.section: this reader takes EI only; a section needs a "
                        "stiffness maker (leanspan.select.member.section_stiffness)")
    EI, mass = section_stiffness(spec, material, Path(base_dir), f"{prefix}beam.section", units,
                                 catalog=None if catalog is None else Path(base_dir) / catalog)
    return float(EI), float(mass)


def parse_beam(data: dict, base_dir: Path, field_prefix: str = "", section_stiffness=None,
               units: UnitSystem | None = None) -> BeamModel:
    """Build a :class:`BeamModel` from a job-file dict.

    Parameters
    ----------
    data : dict
        The whole TOML document; ``[search]``, ``[limits]`` and other foreign tables are ignored.
    base_dir : Path
        Folder of the job file (section files are relative to it).
    field_prefix : str
        Prepended to every field name in error messages (e.g. ``"job.toml: "``).
    section_stiffness : callable, optional
        ``(spec, material, base_dir, field, units) -> (EI, mass_per_length)`` for a beam that
        names a ``section`` (this package knows no sections; the caller passes
        :func:`leanspan.select.member.section_stiffness`). ``units`` is the file's
        :class:`~leanspan.units.UnitSystem`, so an inline section reads bare numbers alike.
    units : UnitSystem, optional
        The file's unit system when the caller has built it already (else from ``data["units"]``).

    Raises
    ------
    BeamError, UnitsError
        With the field and the expectation in the message.
    """
    p = field_prefix
    if not isinstance(data, dict):
        raise BeamError(f"{p}expected a table of job data")
    if units is None:
        units = UnitSystem.from_spec(data.get("units"), f"{p}units")
    beam = data.get("beam")
    if beam is None:
        raise BeamError(f"{p}beam: missing [beam] table")
    _only(beam, _BEAM_KEYS, f"{p}beam")

    # geometry and default supports
    supports = {}
    if "spans" in beam:
        if "length" in beam:
            raise BeamError(f"{p}beam: give either length or spans, not both")
        spans = beam["spans"]
        if not isinstance(spans, list) or not spans:
            raise BeamError(f"{p}beam.spans: expected a list of span lengths, got {brief(spans)}")
        x, pos = 0.0, [0.0]
        for i, s in enumerate(spans):
            ls = parse(s, "length", f"{p}beam.spans[{i + 1}]", units)
            if not ls > 0:
                raise BeamError(f"{p}beam.spans[{i + 1}]: expected a positive length, got {brief(s)}")
            x += ls
            pos.append(x)
        length = check_number(x, "length", f"{p}beam.spans (their total)", BeamError, "a total length")
        for i, xs in enumerate(pos):
            supports[xs] = Support(xs, "pin" if i == 0 else "roller", where=f"{p}beam.spans")
    else:
        length = parse(_need(beam, "length", f"{p}beam"), "length", f"{p}beam.length", units)
        if not length > 0:
            raise BeamError(f"{p}beam.length: expected a positive length, got {brief(beam['length'])}")
    tol = 1e-9 * length

    defaults = sorted(supports)  # a [[support]] at one of these replaces it
    for i, t in enumerate(_tables(data, beam, "support", p)):
        where = f"{p}support[{i + 1}]"
        _only(t, {"at", "type", "k", "kr", "bearing_length"}, where)
        at = parse(_need(t, "at", where), "length", f"{where}.at", units, within="position")
        kind = _need(t, "type", where)
        k = parse(t["k"], "force/length", f"{where}.k", units) if "k" in t else None
        kr = parse(t["kr"], "moment", f"{where}.kr", units) if "kr" in t else None
        seat = None
        if "bearing_length" in t:
            seat = parse(t["bearing_length"], "length", f"{where}.bearing_length", units, within="section length")
            if not seat > 0:
                raise BeamError(f"{where}.bearing_length: expected a positive length (the seat the member "
                                f"bears on, e.g. \"100 mm\"), got {brief(t['bearing_length'])}")
        s = Support(at, kind, k, kr, where=where, bearing_length=seat)
        j = bisect.bisect_left(defaults, at - tol)  # a default support within tol (they are far apart)
        if j < len(defaults) and abs(defaults[j] - at) <= tol and defaults[j] in supports \
                and supports[defaults[j]].where.endswith("beam.spans"):
            del supports[defaults[j]]
        if at in supports:
            raise BeamError(f"{where}.at: another support is already at x = {at:g} m")
        supports[at] = s
    xs = sorted(supports)
    for a, b in zip(xs, xs[1:]):  # sorted: a neighbour check finds every pair within tol
        if b - a <= tol:
            raise BeamError(f"{supports[b].where}.at: another support is already at x = {a:g} m")

    # stiffness and mass
    mass = None
    ways = [k for k in ("EI", "section") if k in beam] + (["[[stiffness]]"] if _tables(data, beam, "stiffness", p) else [])
    if len(ways) != 1:
        raise BeamError(f"{p}beam: give the stiffness one way: EI, section + material, or [[stiffness]] "
                        f"tables (found {', '.join(ways) or 'none'})")
    for key in ("material", "catalog"):
        if key in beam and "section" not in beam:
            raise BeamError(f"{p}beam.{key}: goes with a section (a file, a table or a catalogue name)")
    if "EI" in beam:
        pieces = (Stiffness(0.0, length, parse(beam["EI"], "flexural stiffness", f"{p}beam.EI", units),
                            where=f"{p}beam"),)
    elif "section" in beam:
        EI, mass = _stiffness_from_section(beam, base_dir, p, units, section_stiffness)
        pieces = (Stiffness(0.0, length, EI, where=f"{p}beam.section"),)
    else:
        pieces = []
        for i, t in enumerate(_tables(data, beam, "stiffness", p)):
            where = f"{p}stiffness[{i + 1}]"
            _only(t, {"from", "to", "EI"}, where)
            a = parse(_need(t, "from", where), "length", f"{where}.from", units, within="position")
            b = parse(_need(t, "to", where), "length", f"{where}.to", units, within="position")
            EI = parse(_need(t, "EI", where), "flexural stiffness", f"{where}.EI", units)
            pieces.append(Stiffness(a, b, EI, where=where))
        pieces = tuple(pieces)
    if "mass_per_length" in beam:
        mass = parse(beam["mass_per_length"], "mass/length", f"{p}beam.mass_per_length", units)
    self_weight = beam.get("self_weight")
    if self_weight is not None and (not isinstance(self_weight, str) or not self_weight.strip()):
        raise BeamError(f"{p}beam.self_weight: expected the name of a load case, got {brief(self_weight)}")

    hinges = []
    for i, t in enumerate(_tables(data, beam, "hinge", p)):
        where = f"{p}hinge[{i + 1}]"
        _only(t, {"at"}, where)
        hinges.append(parse(_need(t, "at", where), "length", f"{where}.at", units, within="position"))

    loads = []
    for i, t in enumerate(_tables(data, beam, "load", p)):
        where = f"{p}load[{i + 1}]"
        if not isinstance(t, dict):
            raise BeamError(f"{where}: expected a table, got {brief(t)}")
        kind = _need(t, "type", where)
        if not isinstance(kind, str) or kind not in _LOAD_KEYS:
            raise BeamError(f"{where}.type: expected point, moment, udl or linear, got {brief(kind)}")
        _only(t, _LOAD_KEYS[kind] | {"type", "case"}, where)
        case = _need(t, "case", where)
        if not isinstance(case, str) or not case.strip():
            raise BeamError(f"{where}.case: expected a load case name, got {brief(case)}")

        def get(key, kind_, default=None):
            if key not in t:
                if default is not None:
                    return default
                raise BeamError(f"{where}: missing '{key}'")
            return parse(t[key], kind_, f"{where}.{key}", units,
                         within="position" if key in ("at", "from", "to") else None)

        if kind == "point":
            loads.append(PointLoad(case, get("P", "force"), get("at", "length"), where=where))
        elif kind == "moment":
            loads.append(Couple(case, get("M", "moment"), get("at", "length"), where=where))
        else:
            # with a spacing (or tributary width) the intensities are per area: w = q x spacing
            spacing = get("spacing", "length") if "spacing" in t else None
            if spacing is not None and not spacing > 0:
                raise BeamError(f"{where}.spacing: expected a positive length, got {brief(t['spacing'])}")
            per = "pressure" if spacing is not None else "force/length"
            scale = spacing if spacing is not None else 1.0
            if kind == "udl":
                w = get("w", per) * scale
                loads.append(DistributedLoad(case, w, w, get("from", "length", 0.0),
                                             get("to", "length", length), where=where))
            else:
                loads.append(DistributedLoad(case, get("w1", per) * scale, get("w2", per) * scale,
                                             get("from", "length"), get("to", "length"), where=where))
    if not loads and self_weight is None:
        raise BeamError(f"{p}load: no loads; add [[load]] tables or beam.self_weight")

    combos, notes = [], []
    for i, t in enumerate(_tables(data, beam, "combination", p)):
        where = f"{p}combination[{i + 1}]"
        _only(t, {"name", "factors", "check", "limit", "pattern"}, where)
        name = _need(t, "name", where)
        if not isinstance(name, str) or not name.strip():
            raise BeamError(f"{where}.name: expected a combination name (text), got {brief(name)}")
        factors = _need(t, "factors", where)
        if not isinstance(factors, dict) or not factors:
            raise BeamError(f"{where}.factors: expected a table such as {{dead = 1.35, imposed = 1.5}}")
        for case, f in factors.items():
            check_number(f, "factor", f"{where}.factors.{case}", BeamError)
        check = t.get("check", "deflection" if "limit" in t else "strength")
        if "limit" in t and "check" not in t:
            notes.append(f"{where} {name!r}: a limit without check is taken as a deflection check")
        limit = parse_limit(t["limit"], f"{where}.limit", units) if "limit" in t else None
        pattern = t.get("pattern")
        if pattern is not None and not isinstance(pattern, str):
            raise BeamError(f"{where}.pattern: expected the name of a load case, got {brief(pattern)}")
        combos.append(Combination(str(name), tuple(factors.items()), check, limit, pattern, where=where))

    for key in ("name", "title", "description"):
        if key in beam and not isinstance(beam[key], str):
            raise BeamError(f"{p}beam.{key}: expected text, got {brief(beam[key])}")
    name = beam.get("title") or beam.get("name") or ""
    return BeamModel(length, tuple(sorted(supports.values(), key=lambda s: s.at)), pieces, tuple(loads),
                     tuple(hinges), tuple(combos), mass, self_weight, str(name), tuple(notes))
