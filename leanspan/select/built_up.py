"""Built-up candidates: a parametric space of members made from stock, screened like the catalogue.

A selection job's ``[built_up]`` table holds up to three spaces, each a sub-table:

- ``[built_up.plate_girder]``: welded I girders from plates (web depth and thickness, flange
  width and thickness; ``bottom_flange_*`` for unequal flanges), no fillets;
- ``[built_up.laminated]``: timber members of ``count`` laminations glued on top of each other
  (``layout = "stacked"``) or plies fastened side by side (``"side_by_side"``);
- ``[built_up.flitch]``: timbers with steel plates between them (``timbers`` pieces, one plate
  between each pair), bolted to act together.

Every dimension is a list of stock sizes or a range ``{from, to, step}``; the space is every
combination of them. Proportion rules (``max_web_ratio`` ...) drop candidates before they are
screened. A candidate is a catalogue row built by :func:`leanspan.catalog.table.family_rows` (the
vectorised property calculator and every catalogue column the checks read) or, for flitch beams,
:func:`flitch_rows` (transformed properties per material, vectorised); it is screened by
:func:`leanspan.select.screen.screen` and the registered checks.

Large spaces are screened in chunks of :data:`CHUNK` candidates, keeping per candidate only its
pass/fail, objective value and largest utilisation; the rows that the ranked table can show (the
best :data:`KEEP` passing ones and the nearest failures) are then built again with their names and
join the catalogue rows for the final ranking.

Examples
--------
>>> from leanspan.units import UnitSystem
>>> spaces = parse_built_up({"plate_girder": {"material": "S355", "web_depth": {"from": 400, "to": 600,
...     "step": 100}, "web_thickness": [8, 10], "flange_width": [200], "flange_thickness": [12, 15]}},
...     UnitSystem.from_spec("mm"))
>>> spaces[0].size, spaces[0].dims(range(2))["d"].round(4).tolist()
(12, [0.424, 0.43])
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np

from ..catalog.materials import get_material, materials_table
from ..catalog.table import family_rows
from ..errors import LeanspanError, SelectionError, brief
from ..sections.families import FAMILIES, _mm_all
from ..units import check_number, parse
from .long_list import KEEP, kept_positions

__all__ = ["Space", "parse_built_up", "built_up_table", "KINDS", "CHUNK", "KEEP", "MAX_CANDIDATES"]

CHUNK = 2**18  # candidates screened at a time (large: more repeated weights per chunk)
MAX_CANDIDATES = 10_000_000  # combinations one space may hold (the first pass keeps 33 bytes each)
MAX_TIMBERS = 10  # timbers of one flitch beam
SERIES = "built_up"
_METAL = ("steel", "stainless", "aluminium")
_TIMBER = ("timber", "glulam")

# kind -> (dimension axes: name -> "length" or "count"; required axes; rule keys; family)
KINDS = {
    "plate_girder": ({"web_depth": "length", "web_thickness": "length", "flange_width": "length",
                      "flange_thickness": "length", "bottom_flange_width": "length",
                      "bottom_flange_thickness": "length"},
                     ("web_depth", "web_thickness", "flange_width", "flange_thickness"),
                     ("max_web_ratio", "max_outstand_ratio", "min_depth_to_width", "max_depth_to_width")),
    "laminated": ({"count": "count", "thickness": "length", "width": "length", "depth": "length"},
                  ("count", "thickness"), ("min_depth_to_width", "max_depth_to_width")),
    "flitch": ({"timbers": "count", "timber_width": "length", "timber_depth": "length",
                "plate_thickness": "length", "plate_depth": "length"},
               ("timber_width", "timber_depth", "plate_thickness", "plate_depth"),
               ("min_depth_to_width", "max_depth_to_width")),
}
_MATERIAL_KEYS = {"plate_girder": ("material",), "laminated": ("material", "layout"),
                  "flitch": ("timber", "plate")}


@dataclass(frozen=True)
class Space:
    """One built-up space: the value list of every axis (SI metres, counts as floats), the
    materials (``material`` a tuple of names, or ``timber`` and ``plate`` for a flitch), the
    proportion rules and the field name for messages."""

    kind: str
    axes: dict
    materials: dict
    rules: dict = field(default_factory=dict)
    where: str = "built_up"

    @property
    def names(self) -> tuple:
        return tuple(self.axes)

    @property
    def size(self) -> int:
        return math.prod(len(v) for v in self.axes.values()) * len(self.materials.get("material", ("",)))

    def values(self, flat) -> dict:
        """Axis values (and ``material`` index) of the candidates at flat indices ``flat``."""
        flat = np.asarray(flat, np.int64)
        mats = self.materials.get("material", ("",))
        shape = tuple(len(v) for v in self.axes.values()) + (len(mats),)
        idx = np.unravel_index(flat, shape)
        out = {k: v[i] for (k, v), i in zip(self.axes.items(), idx)}
        out["material"] = idx[-1]
        return out

    def dims(self, flat) -> dict:
        """Section dimensions (m) of the candidates at ``flat``: the ibeam family's for a girder,
        the rectangle's for laminations, the flitch's own (timber and plate sizes, count)."""
        v = self.values(flat)
        if self.kind == "plate_girder":
            tf_top, tf_bot = v["flange_thickness"], v.get("bottom_flange_thickness", v["flange_thickness"])
            b_top, b_bot = v["flange_width"], v.get("bottom_flange_width", v["flange_width"])
            return {"d": v["web_depth"] + tf_top + tf_bot, "b": b_top, "tw": v["web_thickness"],
                    "tf": tf_top, "r": np.zeros_like(tf_top), "b_top": b_top, "tf_top": tf_top,
                    "b_bot": b_bot, "tf_bot": tf_bot}
        if self.kind == "laminated":
            layers = v["count"] * v["thickness"]
            if self.materials["layout"] == "stacked":
                return {"b": v["width"], "d": layers}
            return {"b": layers, "d": v["depth"]}
        return {"timbers": v["timbers"], "timber_width": v["timber_width"], "timber_depth": v["timber_depth"],
                "plate_thickness": v["plate_thickness"], "plate_depth": v["plate_depth"]}

    def keep(self, dims, search) -> np.ndarray:
        """The candidates that meet the proportion rules, the shape's own geometry and the
        search's size limits (before screening)."""
        depth, width = extents(self.kind, dims)
        ok = np.ones(depth.shape, bool)
        r = self.rules
        if self.kind == "plate_girder":
            fam = FAMILIES["ibeam"]
            for bad, _ in fam.rules(dims):
                ok &= ~bad
            hw = dims["d"] - dims["tf_top"] - dims["tf_bot"]
            if "max_web_ratio" in r:
                ok &= hw / dims["tw"] <= r["max_web_ratio"] * (1 + 1e-12)
            if "max_outstand_ratio" in r:
                for b, tf in (("b_top", "tf_top"), ("b_bot", "tf_bot")):
                    ok &= (dims[b] - dims["tw"]) / 2 / dims[tf] <= r["max_outstand_ratio"] * (1 + 1e-12)
        if self.kind == "flitch":
            ok &= dims["plate_depth"] <= dims["timber_depth"] * (1 + 1e-12)
        if "min_depth_to_width" in r:
            ok &= depth / width >= r["min_depth_to_width"] * (1 - 1e-12)
        if "max_depth_to_width" in r:
            ok &= depth / width <= r["max_depth_to_width"] * (1 + 1e-12)
        # the catalogue's size limits, with its relative slack of 1e-4
        for limit, value, above in ((search.max_depth, depth, False), (search.min_depth, depth, True),
                                    (search.max_width, width, False), (search.min_width, width, True)):
            if limit is not None:
                ok &= value >= limit * (1 - 1e-4) if above else value <= limit * (1 + 1e-4)
        return ok

    def names_of(self, dims) -> list:
        """Designations generated from the dimensions, in mm."""
        if self.kind == "plate_girder":
            hw = dims["d"] - dims["tf_top"] - dims["tf_bot"]
            cols = [_mm_all(x) for x in (hw, dims["tw"], dims["b_top"], dims["tf_top"], dims["b_bot"],
                                         dims["tf_bot"])]
            return [f"web {a}x{b} fl {c}x{d}" + ("" if (c, d) == (e, f) else f"/{e}x{f}")
                    for a, b, c, d, e, f in zip(*cols)]
        if self.kind == "laminated":
            t = dims["_thickness"]
            stacked = self.materials["layout"] == "stacked"
            count = np.rint((dims["d"] if stacked else dims["b"]) / t).astype(int)
            other = _mm_all(dims["b"] if stacked else dims["d"])
            word = "laminated" if stacked else "plies"
            return [f"{word} {c}x{a}x{o}" for c, a, o in zip(count, _mm_all(t), other)]
        cols = [_mm_all(dims[k]) for k in ("timber_width", "timber_depth", "plate_thickness", "plate_depth")]
        n = np.asarray(dims["timbers"]).astype(int)
        return [f"flitch {c}x{a}x{b} + {c - 1}x{t}x{p}" for c, a, b, t, p in zip(n, *cols)]


def extents(kind, dims):
    """Overall depth and width (m) of built-up candidates of ``kind`` from their dimensions."""
    if kind == "plate_girder":
        return dims["d"], np.maximum(dims["b_top"], dims["b_bot"])
    if kind == "laminated":
        return dims["d"], dims["b"]
    n = dims["timbers"]
    return dims["timber_depth"], n * dims["timber_width"] + (n - 1) * dims["plate_thickness"]


# -- parsing ------------------------------------------------------------------------------------
def _axis(value, kind, field, units):
    """A list of stock values or a range table ``{from, to, step}`` -> sorted unique array."""
    def one(v, f):
        if kind == "count":
            n = check_number(v, "factor", f, SelectionError, "a whole number such as 3")
            if n != int(n) or not 1 <= n <= 1000:
                raise SelectionError(f"{f}: expected a whole number from 1 to 1000, got {brief(v)}")
            return float(int(n))
        x = parse(v, "length", f, units, within="section length")
        if not x > 0:
            raise SelectionError(f"{f}: expected a positive length, got {brief(v)}")
        return x

    if isinstance(value, dict):
        unknown = set(value) - {"from", "to", "step"}
        if unknown or not {"from", "to"} <= set(value):
            bad = sorted(unknown)[0] if unknown else ("from" if "from" not in value else "to")
            raise SelectionError(f"{field}.{bad}: expected a range {{from = ..., to = ..., step = ...}}")
        lo, hi = one(value["from"], f"{field}.from"), one(value["to"], f"{field}.to")
        step = one(value.get("step", 1 if kind == "count" else None), f"{field}.step") \
            if ("step" in value or kind == "count") else None
        if step is None:
            raise SelectionError(f"{field}.step: missing; expected the step of the range")
        if hi < lo:
            raise SelectionError(f"{field}: to ({brief(value['to'])}) is below from ({brief(value['from'])})")
        n = int(math.floor((hi - lo) / step * (1 + 1e-12) + 1e-9)) + 1
        if n > 100_000:
            raise SelectionError(f"{field}: {n} values; at most 100000 per dimension (a larger step)")
        vals = lo + step * np.arange(n)
        if kind != "count":  # round to 1e-9 m so that 0.1 mm steps stay on their values
            vals = np.round(vals, 9)
        return np.unique(vals)
    if isinstance(value, (list, tuple)):
        if not value:
            raise SelectionError(f"{field}: empty list; expected stock sizes")
        if len(value) > 100_000:
            raise SelectionError(f"{field}: {len(value)} values; at most 100000 per dimension")
        return np.unique([one(v, f"{field}[{i + 1}]") for i, v in enumerate(value)])
    return np.array([one(value, field)])


def _material_names(value, field):
    names = [value] if isinstance(value, str) else value
    if not isinstance(names, list) or not names or not all(isinstance(n, str) for n in names):
        raise SelectionError(f"{field}: expected a material name or a list of names, got {brief(value)}")
    return tuple(dict.fromkeys(names))


def _check_kind(names, kinds, field, table, what):
    out = []
    for name in names:
        try:
            m = get_material(name, table)
        except LeanspanError as exc:  # an unknown name
            raise SelectionError(f"{field}: {exc}") from None
        if m.kind not in kinds:
            raise SelectionError(f"{field}: {m.name} is {m.kind}; {what} takes {' or '.join(kinds)}")
        out.append(m.name)
    return tuple(out)


def parse_built_up(data, units, where: str = "", materials_file=None) -> tuple:
    """The job's ``[built_up]`` table -> a tuple of :class:`Space` (empty for none)."""
    if data is None:
        return ()
    p = f"{where}built_up"
    if not isinstance(data, dict) or not data:
        raise SelectionError(f"{p}: expected sub-tables [built_up.plate_girder], [built_up.laminated] "
                             "or [built_up.flitch]")
    table = materials_table(materials_file)
    spaces = []
    for kind, spec in data.items():
        f = f"{p}.{kind}"
        if kind not in KINDS:
            raise SelectionError(f"{f}: unknown built-up kind; expected {', '.join(KINDS)}")
        if not isinstance(spec, dict):
            raise SelectionError(f"{f}: expected a table")
        axes_kinds, required, rule_keys = KINDS[kind]
        allowed = set(axes_kinds) | set(rule_keys) | set(_MATERIAL_KEYS[kind])
        for key in spec:
            if key not in allowed:
                raise SelectionError(f"{f}.{key}: unknown key; expected {', '.join(sorted(allowed))}")
        mats = {}
        if kind == "plate_girder":
            mats["material"] = _check_kind(_material_names(spec.get("material", "S355"), f"{f}.material"),
                                           _METAL, f"{f}.material", table, "a plate girder")
        elif kind == "laminated":
            mats["material"] = _check_kind(_material_names(spec.get("material", "C24"), f"{f}.material"),
                                           _TIMBER, f"{f}.material", table, "a laminated member")
            layout = spec.get("layout", "stacked")
            if layout not in ("stacked", "side_by_side"):
                raise SelectionError(f"{f}.layout: expected \"stacked\" or \"side_by_side\", got {brief(layout)}")
            mats["layout"] = layout
            required = required + (("width",) if layout == "stacked" else ("depth",))
            other = "depth" if layout == "stacked" else "width"
            if other in spec:
                raise SelectionError(f"{f}.{other}: not used with layout = \"{layout}\" (the "
                                     f"{'depth is count x thickness' if layout == 'stacked' else 'width is count x thickness'})")
        else:
            for key, kinds, default in (("timber", _TIMBER, "C24"), ("plate", _METAL, "S275")):
                value = spec.get(key, default)
                if not isinstance(value, str):
                    raise SelectionError(f"{f}.{key}: expected one material name, got {brief(value)}")
                mats[key] = _check_kind((value,), kinds, f"{f}.{key}", table, f"a flitch {key}")[0]
        for key in required:
            if key not in spec:
                raise SelectionError(f"{f}.{key}: missing; a {kind} space needs {', '.join(required)}")
        axes = {}
        for key, axis_kind in axes_kinds.items():
            if key in spec:
                axes[key] = _axis(spec[key], axis_kind, f"{f}.{key}", units)
            elif kind == "flitch" and key == "timbers":
                axes[key] = np.array([2.0])
        rules = {}
        for key in rule_keys:
            if key in spec:
                v = check_number(spec[key], "factor", f"{f}.{key}", SelectionError, "a positive number")
                if not v > 0:
                    raise SelectionError(f"{f}.{key}: expected a positive number, got {brief(spec[key])}")
                rules[key] = float(v)
        if kind == "flitch" and (np.any(axes["timbers"] < 2) or np.any(axes["timbers"] > MAX_TIMBERS)):
            raise SelectionError(f"{f}.timbers: expected 2 to {MAX_TIMBERS} timbers (a plate between each pair)")
        space = Space(kind, axes, mats, rules, f)
        if space.size > MAX_CANDIDATES:
            raise SelectionError(f"{f}: {space.size:,} combinations; at most {MAX_CANDIDATES:,} are "
                                 "screened (narrow the lists or take larger steps)")
        spaces.append(space)
    return tuple(spaces)


# -- rows ---------------------------------------------------------------------------------------
def space_rows(space: Space, flat, job, named: bool = True):
    """Catalogue-like rows (a DataFrame, every column the checks read) of the candidates at flat
    indices ``flat`` of ``space``; unless ``named`` (the first pass), placeholder names and no
    buckling columns when no check of the job reads them."""
    import pandas as pd

    flat = np.asarray(flat, np.int64)
    dims = space.dims(flat)
    mat_index = space.values(flat)["material"]
    frames = []
    if space.kind == "flitch":
        from .built_up_flitch import flitch_rows

        names = space.names_of(dims) if named else [""] * flat.size
        return flitch_rows(dims, names, space.materials["timber"], space.materials["plate"],
                           job.search.materials_file, job.limits)
    family = "ibeam" if space.kind == "plate_girder" else "rectangle"
    keys = FAMILIES[family].all_keys
    for m, material in enumerate(space.materials["material"]):  # a small set
        sel = np.flatnonzero(mat_index == m)
        if not sel.size:
            continue
        sub = {k: dims[k][sel] for k in keys if k in dims}
        if named:
            label = dict(sub)
            if space.kind == "laminated":
                label["_thickness"] = space.values(flat[sel])["thickness"]
            names = space.names_of(label)
        else:
            names = [""] * sel.size
        df = family_rows(family, sub, names, material, SERIES, job.search.materials_file,
                         stability=named or _reads_stability(job))
        df["_order"] = sel
        frames.append(df)
    df = pd.concat(frames, ignore_index=True) if len(frames) > 1 else frames[0]
    return df.sort_values("_order", kind="stable").drop(columns="_order").reset_index(drop=True)


def _reads_stability(job) -> bool:
    """Whether a check of this job reads the buckling columns (else the first pass skips them)."""
    from ..sections.properties import STABILITY_KEYS
    from .checks import active_checks

    return any(set(c.columns) & set(STABILITY_KEYS) for c in active_checks(job.limits))


# -- screening ----------------------------------------------------------------------------------
@dataclass
class _Summary:
    """Per screened candidate of one space: flat index, passes, objective values, worst utilisation."""

    flat: list = field(default_factory=list)
    passes: list = field(default_factory=list)
    first: list = field(default_factory=list)
    second: list = field(default_factory=list)
    worst: list = field(default_factory=list)

    def arrays(self):
        cat = lambda xs, dt: np.concatenate(xs) if xs else np.zeros(0, dt)  # noqa: E731
        return (cat(self.flat, np.int64), cat(self.passes, bool), cat(self.first, float),
                cat(self.second, float), cat(self.worst, float))


#: Weights per length within this relative difference share their beam extremes in the first pass.
SAME_WEIGHT = 1e-12
#: Candidates whose first-pass utilisation lies this close to 1 are screened again exactly.
CLOSE_CALL = 1e-9


def _screen_rows(df, job):
    """Pass/fail and the largest utilisation of every row: :func:`screen_by_weight`, then the
    exact screen again for the close calls (so every pass/fail is the exact screen's)."""
    from .screen import screen
    from .search import candidates_from_table

    cand = candidates_from_table(df, job.limits)
    # pass and fail only here (the rows kept are screened again in full): checks that only report
    # for this beam (bearing without a bearing_length) are left out
    passes, worst = _verdict(screen_by_weight(job.model, cand, job.search.self_weight, first_pass=True))
    close = np.flatnonzero(np.abs(worst - 1.0) <= CLOSE_CALL)
    if close.size:
        passes[close], worst[close] = _verdict(screen(job.model, cand.take(close), job.search.self_weight,
                                                      first_pass=True))
    return passes, worst


def _verdict(res):
    worst = np.fmax.reduce(np.stack(list(res.utilisation.values()), axis=1), axis=1)
    return np.array(res.passes), worst


def screen_by_weight(model, cand, self_weight_case=None, first_pass: bool = False):
    """:func:`leanspan.select.screen.screen` with the beam's extremes found once per weight.

    On rigid supports the forces do not depend on EI and the deflections scale with 1 / EI
    (DEVELOPERS.md, "Selection screening"), so candidates of the same mass per length share their
    moments, shears and EI-scaled deflections. Stock plates repeat areas a lot (a million girders
    of whole-millimetre plates have some 16,000 distinct areas), so the extremes are found once
    for every group of weights equal within :data:`SAME_WEIGHT` (at the group's first weight,
    EI = 1) and spread to its candidates, deflections divided by each one's EI; then the
    registered checks run on all of them as usual. Utilisations differ from the plain screen's by
    about 1e-12 at most. With springs (forces depending on EI) or few repeats this is the plain
    screen.
    """
    import dataclasses

    from ..beam import G
    from .screen import FieldSampler, evaluate, screen, screen_effects

    mass = np.asarray(cand.mass_per_length, float)
    order = np.argsort(mass, kind="stable")
    sorted_mass = mass[order]
    start = np.ones(mass.size, bool)
    start[1:] = sorted_mass[1:] > sorted_mass[:-1] * (1.0 + SAME_WEIGHT)
    # a run of weights each within SAME_WEIGHT of the one before starts a new group at most every
    # SAME_WEIGHT of the group's first weight: close enough for the first pass
    group_first = np.maximum.accumulate(np.where(start, np.arange(mass.size), 0))
    start |= sorted_mass > sorted_mass[group_first] * (1.0 + SAME_WEIGHT)
    group = np.cumsum(start) - 1
    if group[-1] + 1 > 0.5 * mass.size:
        return screen(model, cand, self_weight_case, first_pass)
    weights = sorted_mass[start]
    inverse = np.empty(mass.size, np.int64)
    inverse[order] = group
    unit = type(cand)(np.ones(weights.size), weights, {}, cand.limits)
    eff = screen_effects(model, unit, self_weight_case)
    resp = eff.sampler.resp
    if resp.M.shape[0] != 1:  # springs: every candidate's forces depend on its EI
        return screen(model, cand, self_weight_case, first_pass)
    EI = np.asarray(cand.EI, float)
    spread = {k: getattr(eff, k)[inverse] for k in ("M_max", "M_min", "V_abs", "v_allowed")}
    effects = dataclasses.replace(
        eff, **spread, v_abs=eff.v_abs[inverse] / EI[:, None],
        sampler=FieldSampler(resp, eff.sampler.parents, mass * G, 1.0 / EI), EI=EI, mass_per_length=mass)
    return evaluate(effects, cand, first_pass)


def _objective(df, objective):
    mass = df["mass_per_length"].to_numpy(float)
    depth = df["depth"].to_numpy(float)
    return (mass, depth) if objective == "mass" else (depth, mass)


def screen_space(space: Space, job, chunk: int | None = None) -> _Summary:
    """Screen every candidate of ``space`` in chunks (default :data:`CHUNK`); the summary arrays
    of those the rules keep."""
    chunk = chunk or CHUNK
    out = _Summary()
    for start in range(0, space.size, chunk):
        flat = np.arange(start, min(space.size, start + chunk), dtype=np.int64)
        ok = space.keep(space.dims(flat), job.search)
        flat = flat[ok]
        if flat.size == 0:
            continue
        df = space_rows(space, flat, job, named=False)
        passes, worst = _screen_rows(df, job)
        first, second = _objective(df, job.search.objective)
        out.flat.append(flat)
        out.passes.append(passes)
        out.first.append(first)
        out.second.append(second)
        out.worst.append(worst)
    return out


def built_up_table(job, catalogue=None, chunk: int | None = None):
    """The rows to rank for a job with ``[built_up]``: the catalogue rows (``catalogue``, a
    DataFrame or None) and the built-up rows the table can show.

    Returns
    -------
    (DataFrame, int, int)
        The rows, the number of built-up candidates screened but not kept, and how many of
        those passed.
    """
    import pandas as pd

    threshold = np.inf
    if catalogue is not None and len(catalogue):
        passes, _ = _screen_rows(catalogue, job)
        if passes.any():
            threshold = float(_objective(catalogue, job.search.objective)[0][passes].min())
    summaries = [screen_space(s, job, chunk).arrays() for s in job.built_up]
    for arrays in summaries:  # the winner's value over every space and the catalogue
        if arrays[1].any():
            threshold = min(threshold, float(arrays[2][arrays[1]].min()))
    frames = [catalogue] if catalogue is not None and len(catalogue) else []
    dropped = dropped_pass = 0
    for space, arrays in zip(job.built_up, summaries):
        if arrays[0].size == 0:
            continue
        pos = kept_positions(*arrays[1:], threshold)
        dropped += arrays[0].size - pos.size
        dropped_pass += int(arrays[1].sum() - arrays[1][pos].sum())
        frames.append(space_rows(space, arrays[0][pos], job))
    if not frames:
        raise SelectionError("built_up: no candidate meets the proportion rules and size limits; "
                             "relax the rules or widen the lists")
    df = pd.concat(frames, ignore_index=True) if len(frames) > 1 else frames[0]
    df.attrs["warnings"] = list(catalogue.attrs.get("warnings", [])) if catalogue is not None else []
    return df, dropped, dropped_pass
