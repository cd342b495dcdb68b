"""A selection job: the beam (without a member), the search space and the limits.

Job file = a beam job whose ``[beam]`` gives no ``EI``/``section`` (the candidates
supply them) + ``[search]`` + ``[limits]``::

    [search]
    families = ["sawn_metric", "glulam"]   # series or shape families
    materials = ["C24", "GL28h"]           # optional: pair the geometry with these
    catalog = "supplier.csv"               # optional user catalogue, relative to the job
    max_depth = "300 mm"
    objective = "mass"                     # or "depth"
    self_weight = "dead"                   # the case that carries each candidate's weight

    [limits]
    stress_factor = 0.6                    # x each material's bending and shear strength
    # bending_stress = "165 MPa"           # or absolute values (override the factor)

    # or, instead of the stress limits, design strengths from characteristic values:
    # [design]
    # service_class = 1
    # duration = {dead = "permanent", imposed = "medium"}
    # psi2 = {imposed = 0.3}

Examples
--------
>>> from pathlib import Path
>>> data = {"beam": {"spans": ["4 m"]}, "load": [{"case": "dead", "type": "udl", "w": "2 kN/m"}],
...         "search": {"families": ["sawn_metric"]}, "limits": {"stress_factor": 0.6}}
>>> job = parse_job(data, Path("."))
>>> job.search.self_weight, job.limits.stress_factor, [c.name for c in job.model.combinations]
('dead', 0.6, ['all cases'])
"""

from __future__ import annotations

from dataclasses import dataclass
from pathlib import Path

import numpy as np

from ..beam import parse_beam
from ..catalog.materials import get_material, materials_table
from ..catalog.table import check_shape_names
from ..errors import LeanspanError, SelectionError, brief
from ..fileio import is_file
from ..project import Project, parse_project
from ..units import UnitSystem, check_number, display_factor, fmt, parse
from .built_up import parse_built_up
from .checks import limit_keys
from .design import parse_design

__all__ = ["SearchSpec", "Limits", "Job", "parse_job"]

_SEARCH_KEYS = {"families", "series", "materials", "catalog", "max_depth", "min_depth", "max_width",
                "min_width", "objective", "self_weight", "materials_file"}
_LIMIT_KEYS = {"bending_stress", "shear_stress", "stress_factor"}


@dataclass(frozen=True)
class SearchSpec:
    """What to search: series/families, materials, a user catalogue, size limits, objective."""

    families: tuple | None = None
    materials: tuple | None = None
    catalog: Path | None = None
    max_depth: float | None = None
    min_depth: float | None = None
    max_width: float | None = None
    min_width: float | None = None
    objective: str = "mass"
    self_weight: str | None = "dead"
    materials_file: Path | None = None

    def __post_init__(self):
        if self.objective not in ("mass", "depth"):
            raise SelectionError(f"search.objective: expected mass or depth, got {brief(self.objective)}")


@dataclass(frozen=True)
class Limits:
    """Allowable stresses: absolute (Pa) or ``stress_factor`` x the material's strengths."""

    bending_stress: float | None = None
    shear_stress: float | None = None
    stress_factor: float | None = None
    extra: tuple = ()  # (key, value) of the [limits] keys that other registered checks read
    design: object = None  # leanspan.select.design.DesignBasis: design strengths instead of these limits

    def __post_init__(self):
        if self.design is not None:
            given = [k for k in ("stress_factor", "bending_stress", "shear_stress") if getattr(self, k) is not None]
            if given:
                raise SelectionError(f"limits.{given[0]}: [design] sets the allowable stresses (design "
                                     "strengths kmod x kh x f_k / gamma_M); remove stress_factor, "
                                     "bending_stress and shear_stress, or remove [design]")
            return
        if self.stress_factor is not None and not self.stress_factor > 0:
            raise SelectionError(f"limits.stress_factor: expected a positive number, got {brief(self.stress_factor)}")
        for name in ("bending_stress", "shear_stress"):
            v = getattr(self, name)
            if v is not None and not v > 0:
                raise SelectionError(f"limits.{name}: expected a positive stress, got {brief(v)}")
        if self.stress_factor is None and (self.bending_stress is None or self.shear_stress is None):
            missing = "bending_stress" if self.bending_stress is None else "shear_stress"
            raise SelectionError(f"limits.{missing}: missing; give bending_stress and shear_stress "
                                 "(e.g. \"165 MPa\") or stress_factor (x each material's strengths)")

    def bending_allowable(self, strength):
        """Allowable bending stress for materials of bending ``strength`` (array, Pa)."""
        return self._allowable(self.bending_stress, strength)

    def shear_allowable(self, strength):
        """Allowable shear stress for materials of shear ``strength`` (array, Pa)."""
        return self._allowable(self.shear_stress, strength)

    def _allowable(self, absolute, strength):
        if self.design is not None:  # a programming error, not bad input
            raise RuntimeError("with [design] the allowable stresses depend on the combination: call "
                               "leanspan.select.design.allowable_stress(props, limits, effects, which)")
        strength = np.asarray(strength, float)
        return np.full(strength.shape, absolute) if absolute is not None else self.stress_factor * strength

    def allowable(self, strength_bending, strength_shear):
        """Arrays of allowable bending and shear stress for the candidates' materials."""
        return self.bending_allowable(strength_bending), self.shear_allowable(strength_shear)

    def get(self, key, default=None):
        """A ``[limits]`` value read for another check (``extra``), else ``default``."""
        return dict(self.extra).get(key, default)

    def describe(self, units: str = "si") -> str:
        """The limits in words, stresses in the display unit system."""
        label, factor = display_factor("pressure", units)
        if self.design is not None:
            return self.design.describe()
        parts = []
        if self.stress_factor is not None:
            parts.append(f"{self.stress_factor:g} x material strengths")
        if self.bending_stress is not None:
            parts.append(f"bending {fmt(self.bending_stress / factor)} {label}")
        if self.shear_stress is not None:
            parts.append(f"shear {fmt(self.shear_stress / factor)} {label}")
        return ", ".join(parts)


@dataclass(frozen=True)
class Job:
    model: object  # leanspan.beam.BeamModel with a placeholder EI of 1 N m^2
    search: SearchSpec
    limits: Limits
    title: str = ""
    base_dir: Path = Path(".")
    project: Project = Project()  # the sheet's title-block fields ([project])
    built_up: tuple = ()  # built-up spaces (leanspan.select.built_up.Space) of [built_up]
    catalogue: bool = True  # search the catalogue too (always without [built_up])


def _names(value, field):
    if value is None:
        return None
    if isinstance(value, str):
        value = [value]
    if not isinstance(value, list) or not value or not all(isinstance(v, str) for v in value):
        raise SelectionError(f"{field}: expected a name or a list of names, got {brief(value)}")
    return tuple(dict.fromkeys(value))  # a name given twice is searched once


def parse_job(data: dict, base_dir: Path, where: str = "") -> Job:
    """Build a :class:`Job` from the whole job TOML; errors name the field."""
    p = where
    if not isinstance(data.get("beam"), dict):
        raise SelectionError(f"{p}beam: missing [beam] table")
    for key in ("EI", "section", "material", "stiffness", "mass_per_length", "self_weight"):
        if key in data["beam"] or (key == "stiffness" and "stiffness" in data):
            raise SelectionError(f"{p}beam.{key}: a selection job takes the member from the catalogue; "
                                 "remove it (self-weight goes in search.self_weight)")
    search_t = data.get("search")
    if search_t is None and "built_up" in data:
        search_t = {}  # a built-up search alone needs no [search] table
    if not isinstance(search_t, dict):
        raise SelectionError(f"{p}search: missing [search] table (families, materials, catalog ...)")
    limits_t = data.get("limits", {} if "design" in data else None)
    if not isinstance(limits_t, dict):
        raise SelectionError(f"{p}limits: missing [limits] table (bending_stress, shear_stress or stress_factor)")
    for key in search_t:
        if key not in _SEARCH_KEYS:
            raise SelectionError(f"{p}search.{key}: unknown key; expected {', '.join(sorted(_SEARCH_KEYS))}")
    known_limits = _LIMIT_KEYS | set(limit_keys())
    for key in limits_t:
        if key not in known_limits:
            raise SelectionError(f"{p}limits.{key}: unknown key; expected {', '.join(sorted(known_limits))}")
    units = UnitSystem.from_spec(data.get("units"), f"{p}units")

    families = _names(search_t.get("families"), f"{p}search.families")
    series = _names(search_t.get("series"), f"{p}search.series")
    materials = _names(search_t.get("materials"), f"{p}search.materials")
    catalog = search_t.get("catalog")
    if catalog is not None:
        if not isinstance(catalog, str):
            raise SelectionError(f"{p}search.catalog: expected a CSV file name, got {brief(catalog)}")
        catalog = Path(base_dir) / catalog
        if not is_file(catalog) or not str(search_t["catalog"]).strip():
            raise SelectionError(f"{p}search.catalog: file {catalog} not found")
    mat_file = search_t.get("materials_file")
    if mat_file is not None:
        if not isinstance(mat_file, str) or not mat_file.strip():
            raise SelectionError(f"{p}search.materials_file: expected a file name, got {brief(mat_file)}")
        mat_file = Path(base_dir) / mat_file
        if not is_file(mat_file):
            raise SelectionError(f"{p}search.materials_file: file {mat_file} not found")
    _check_names(families, series, materials, mat_file, p)
    sizes = {k: parse(search_t[k], "length", f"{p}search.{k}", units, within="section length")
             if k in search_t else None
             for k in ("max_depth", "min_depth", "max_width", "min_width")}
    for k, v in sizes.items():
        if v is not None and not v > 0:
            raise SelectionError(f"{p}search.{k}: expected a positive length, got {brief(search_t[k])}")
    objective = search_t.get("objective", "mass")
    sw = search_t.get("self_weight", "dead")
    if sw is not None and not isinstance(sw, str):
        raise SelectionError(f"{p}search.self_weight: expected a load case name or \"none\", got {brief(sw)}")
    if sw == "none":
        sw = None

    beam_data = dict(data)
    beam_data.pop("search", None)
    beam_data.pop("limits", None)
    beam_data.pop("design", None)
    beam_data.pop("built_up", None)
    beam = dict(data["beam"])
    beam["EI"] = "1 N*m^2"  # placeholder: candidates supply EI
    if sw is not None:
        beam["self_weight"] = sw
    beam_data["beam"] = beam
    combos = beam_data.get("combination", data["beam"].get("combination"))
    if combos is None or combos == []:  # anything else (a table, a number) goes to parse_beam
        loads = beam_data.get("load", data["beam"].get("load", []))
        loads = [loads] if isinstance(loads, dict) else loads if isinstance(loads, list) else []
        cases = {t.get("case") for t in loads if isinstance(t, dict) and isinstance(t.get("case"), str)}
        if sw is not None:
            cases.add(sw)
        # no combinations: one strength combination of every case at factor 1
        beam_data["combination"] = [{"name": "all cases",
                                     "factors": {c: 1.0 for c in sorted(cases) if isinstance(c, str) and c}}]
        beam.pop("combination", None)
    model = parse_beam(beam_data, Path(base_dir), p, units=units)
    if sw is not None:
        used = any(case == sw for c in model.combinations for case, f in c.factors if f != 0)
        if not used:
            raise SelectionError(f"{p}search.self_weight: case {sw!r} is in no combination, so the "
                                 "members' own weight would be left out; name a case the combinations "
                                 "use, or self_weight = \"none\"")
    if not any(c.check == "strength" for c in model.combinations):
        raise SelectionError(f"{p}combination: no strength combination; add one with check = \"strength\"")
    limits = Limits(
        bending_stress=parse(limits_t["bending_stress"], "pressure", f"{p}limits.bending_stress", units)
        if "bending_stress" in limits_t else None,
        shear_stress=parse(limits_t["shear_stress"], "pressure", f"{p}limits.shear_stress", units)
        if "shear_stress" in limits_t else None,
        stress_factor=_factor(limits_t.get("stress_factor"), f"{p}limits.stress_factor"),
        extra=tuple((k, _limit_value(limits_t[k], kind, f"{p}limits.{k}", units))
                    for k, kind in limit_keys().items() if k in limits_t and k not in _LIMIT_KEYS),
        design=parse_design(data["design"], model, f"{p}design", units) if "design" in data else None,
    )
    seats = [s for s in model.supports if s.bearing_length is not None]
    if seats and limits.design is None and limits.stress_factor is None and limits.get("bearing_stress") is None:
        raise SelectionError(f"{p}limits.bearing_stress: {seats[0].where} gives a bearing_length but the "
                             "limits are absolute stresses; give bearing_stress (e.g. \"1.5 MPa\"), "
                             "stress_factor or a [design] table")
    if series:
        families = (families or ()) + series
    search = SearchSpec(families, materials, catalog, sizes["max_depth"], sizes["min_depth"],
                        sizes["max_width"], sizes["min_width"], objective, sw, mat_file)
    title = data["beam"].get("title") or data["beam"].get("name") or ""
    built_up = parse_built_up(data.get("built_up"), units, p, mat_file)
    # with [built_up], the catalogue is searched only when [search] names what to take from it
    catalogue = not built_up or any(k in search_t for k in ("families", "series", "catalog"))
    return Job(model, search, limits, str(title), Path(base_dir), project=parse_project(data.get("project"), p),
               built_up=built_up, catalogue=catalogue)


def _factor(value, field):
    if value is None:
        return None
    return check_number(value, "stress factor", field, SelectionError, "a number such as 0.6")


def _limit_value(value, kind, field, units):
    """A ``[limits]`` value of a registered check: a number, a text, names or a quantity of ``kind``."""
    if kind == "names":
        return _names(value, field)
    if kind == "number":
        return _factor(value, field)
    if kind == "text":
        if not isinstance(value, str):
            raise SelectionError(f"{field}: expected a text value, got {brief(value)}")
        return value
    if kind == "lengths":
        if not isinstance(value, list):
            raise SelectionError(f"{field}: expected a list of positions such as [\"1.6 m\", \"3.2 m\"], "
                                 f"got {value!r}")
        return tuple(parse(v, "length", f"{field}[{i + 1}]", units) for i, v in enumerate(value))
    return parse(value, kind, field, units)


def _check_names(families, series, materials, mat_file, p):
    """Fail early, naming the field, on a series, family or material nobody knows."""
    for field, names in (("families", families), ("series", series)):
        try:
            check_shape_names(names, "family" if field == "families" else "series")
        except LeanspanError as e:
            raise SelectionError(f"{p}search.{field}: {e}") from None
    if materials:
        mats = materials_table(mat_file)
        for name in materials:
            try:
                get_material(name, mats)
            except LeanspanError as e:
                raise SelectionError(f"{p}search.materials: {e}") from None
