"""The search: catalogue -> candidates -> screening -> a ranked result.

Like ``scipy.optimize``, a search where nothing passes is a result
(``success = False`` with a message), not an exception.
"""

from __future__ import annotations

import dataclasses
from dataclasses import dataclass, field
from functools import cached_property

import numpy as np

from ..catalog.materials import materials_table
from ..catalog.table import catalog_table, row_dims
from ..errors import SelectionError
from ..units import utilisation_text
from .checks import active_checks
from .chosen import chosen_member
from .long_list import LONG_LIST, long_list_rows
from .member import member_arrays, shared_name_ranks
from .screen import Candidates, Screen, screen

__all__ = ["Selection", "run_selection", "candidate_table", "candidates_from_table"]

_SECTION_COLUMNS = ("A", "Iz", "Sz_top", "Sz_bot", "shear_factor", "depth", "width", "mass_per_length")


@dataclass(frozen=True)
class Selection:
    """Outcome of a selection.

    Attributes
    ----------
    success : bool
        Some candidate passes every check.
    message : str
    chosen : dict or None
        The best passing candidate (JSON contract CANDIDATE).
    order : ndarray
        Row indices of ``table``: passing candidates in objective order, then failing
        ones by their largest utilisation (rank = position + 1).
    screened : int
        Candidates screened (built-up ones that the table does not keep included).
    table : pandas.DataFrame
        The catalogue rows screened (same order as the ``result`` arrays).
    result : Screen
    job : Job
    warnings : list of str
    passing : int
        Candidates that pass (built-up ones that the table does not keep included).
    """

    success: bool
    message: str
    chosen: dict | None
    order: np.ndarray
    screened: int
    table: object
    result: Screen
    job: object
    warnings: list = field(default_factory=list)
    passing: int | None = None  # candidates that pass, also those a built-up search did not keep

    def rows(self, positions) -> list:
        """CANDIDATE dicts for the given rank positions (0-based)."""
        return _rows(self.table, self.result, self.order, positions)

    @property
    def ranked(self) -> list:
        """Every candidate as a CANDIDATE dict, in rank order."""
        return self.rows(range(len(self.order)))

    def shown_positions(self, top: int = 10, failures: int = 3) -> list:
        """Rank positions for the table: ``top`` passing plus the nearest failures.

        With a winner the nearest failures are the heaviest failing candidates lighter
        (or, for objective depth, shallower) than it, in rank order; with none, the ``top``
        closest.
        """
        passes = self.result.passes[self.order]
        n_pass = int(passes.sum())
        if n_pass == 0:
            return list(range(min(top, len(self.order))))
        key = "mass_per_length" if self.job.search.objective == "mass" else "depth"
        value = self.table[key].to_numpy(float)[self.order]
        fail_pos = np.flatnonzero(~passes)
        lighter = fail_pos[value[fail_pos] < value[0]]
        lighter = lighter[np.argsort(-value[lighter], kind="stable")][:failures]
        # listed in rank order (closest to passing first), so the rank column reads downwards
        return list(range(min(top, n_pass))) + [int(p) for p in np.sort(lighter)]

    def shown(self, top: int = 10, failures: int = 3) -> list:
        return self.rows(self.shown_positions(top, failures))

    def to_frame(self):
        """Every candidate in rank order as a pandas DataFrame: rank, name, family, series,
        material, mass_per_length, depth, width (SI), one utilisation column per check,
        governing, passes."""
        import pandas as pd

        df = self.table.iloc[self.order]
        out = pd.DataFrame({"rank": np.arange(1, len(self.order) + 1)})
        for c in ("name", "family", "series", "material", "mass_per_length", "depth", "width"):
            out[c] = df[c].to_numpy()
        for c in self.result.utilisation:
            out[c] = self.result.utilisation[c][self.order]
        out["governing"] = self.result.governing[self.order].astype(str)
        out["passes"] = self.result.passes[self.order]
        return out

    def to_json(self, top: int = 10) -> dict:
        """The JSON contract: ``chosen``, ``candidates`` (the shown rows), ``screened`` and
        ``checks`` (each check's details for the chosen, else the closest, candidate)."""
        return {"chosen": self.chosen, "candidates": self.shown(top), "screened": self.screened,
                "checks": self.result.details(int(self.order[0]))}

    @cached_property
    def chosen_member(self):
        """The chosen (else the closest) candidate as a solved member: its row, section and
        the beam solution with its own EI and self-weight
        (:class:`~leanspan.select.chosen.ChosenMember`), built on first use."""
        return chosen_member(self)


def candidate_table(search):
    """The catalogue rows a :class:`~leanspan.select.job.SearchSpec` asks for."""
    df = catalog_table(series=None, families=list(search.families) if search.families else None,
                       materials=list(search.materials) if search.materials else None,
                       user_csv=search.catalog, max_depth=search.max_depth, min_depth=search.min_depth,
                       min_width=search.min_width, max_width=search.max_width,
                       material_table=search.materials_file)
    return df


def _why_empty(search) -> str:
    """Which part of the search leaves no rows: the size limits or the materials."""
    no_sizes = dataclasses.replace(search, max_depth=None, min_depth=None, max_width=None, min_width=None)
    if len(candidate_table(no_sizes)):
        return ("the size limits (" + ", ".join(f"{k} {v * 1000:g} mm" for k in
                ("min_depth", "max_depth", "min_width", "max_width") if (v := getattr(search, k)) is not None)
                + ")")
    if search.materials and len(candidate_table(dataclasses.replace(no_sizes, materials=None))):
        return (f"the materials {', '.join(search.materials)}: none of them suits these families "
                "(timber series take timber grades, steel series steel grades)")
    return "the families, materials and size limits"


def _mixed_bases(df, job) -> list:
    """A warning when one stress factor scales strengths of different bases (characteristic
    timber values, metal yields, allowable-stress reference values): one factor cannot suit all."""
    lim = job.limits
    table = materials_table(job.search.materials_file)
    if lim.design is not None:
        return _design_bases(df, table)
    if lim.stress_factor is None or (lim.bending_stress is not None and lim.shear_stress is not None):
        return []
    by_basis = {}
    # the distinct materials, in table order (a flitch row names two: "C24 + S275")
    for name in dict.fromkeys(n for m in df["material"].unique() for n in str(m).split(" + ")):
        m = table.get(name)
        if m is not None and m.basis:
            by_basis.setdefault(m.basis, name)
    if len(by_basis) < 2:
        return []
    shown = ", ".join(f"{b} ({n} ...)" for b, n in by_basis.items())
    return [f"limits.stress_factor: {lim.stress_factor:g} scales strengths of different bases: {shown}; "
            "one factor rarely suits them all: use a job per material kind or absolute bending_stress "
            "and shear_stress"]


def _design_bases(df, table) -> list:
    """A warning when [design] (characteristic timber values, metal yields) meets materials whose
    strengths are on another basis (allowable-stress reference values): kmod / gamma_M do not suit them."""
    odd = {}
    for name in dict.fromkeys(df["material"]):
        m = table.get(name)
        expected = "characteristic" if m is not None and m.kind in ("timber", "glulam") else "yield"
        if m is not None and m.basis and m.basis != expected:
            odd.setdefault(m.basis, []).append(name)
    return [f"design: the design basis takes characteristic timber strengths and metal yield strengths, "
            f"but {', '.join(names[:3])}{' ...' if len(names) > 3 else ''} give {basis} values; kmod and "
            "gamma_M do not apply to them: use [limits] stress limits for these materials"
            for basis, names in odd.items()]


def candidates_from_table(df, limits) -> Candidates:
    """Arrays for :func:`screen` from catalogue rows: each member's EI and mass, and the
    columns the registered checks read."""
    columns = sorted({c for check in active_checks(limits) for c in check.columns})
    missing = [c for c in columns if c not in df]
    if missing:
        raise SelectionError(f"search: the catalogue has no column {missing[0]!r}, which a check needs")
    arrays = member_arrays(df, columns)
    return Candidates(arrays.pop("EI"), arrays.pop("mass_per_length"), arrays, limits)


def _rows(df, res: Screen, order, positions) -> list:
    names = df["name"].to_numpy()
    out = []
    for pos in positions:
        k = int(order[pos])
        rank = pos + 1
        row = df.iloc[k]
        util = {c: (None if np.isnan(res.utilisation[c][k]) else float(res.utilisation[c][k]))
                for c in res.utilisation}
        out.append({
            "rank": rank,
            "name": str(names[k]),
            "family": str(row["family"]),
            "series": str(row["series"]),
            "material": str(row["material"]),
            "dims": {key: float(v) for key, v in row_dims(row).items()},
            "mass_per_length": float(row["mass_per_length"]),
            **_strengths(row),
            "depth": float(row["depth"]),
            "width": float(row["width"]),
            "utilisation": util,
            "governing": str(res.governing[k]),
            "passes": bool(res.passes[k]),
            "demands": res.demands(k),
        })
    return out


def _strengths(row) -> dict:
    """The row's bending strength after any thickness step, and the thickness it is stepped for."""
    t = float(row["strength_thickness"]) if "strength_thickness" in row.index else float("nan")
    return {"strength_bending": float(row["strength_bending"]), "strength_thickness": None if np.isnan(t) else t}


def rank_order(df, res: Screen, objective: str) -> np.ndarray:
    """Indices: passing candidates by objective (mass or depth, ties by the other, then
    name), then failing ones by their largest utilisation."""
    mass = df["mass_per_length"].to_numpy(float)
    depth = df["depth"].to_numpy(float)
    names = df["name"].to_numpy()
    worst = np.fmax.reduce(np.stack(list(res.utilisation.values()), axis=1), axis=1)
    first, second = (mass, depth) if objective == "mass" else (depth, mass)
    p = np.flatnonzero(res.passes)
    f = np.flatnonzero(~res.passes)
    ranks = shared_name_ranks(df)
    if ranks is not None:  # a shared table: its names ranked once, for every screen of it
        p = p[np.lexsort((ranks[p], second[p], first[p]))]
        f = f[np.lexsort((ranks[f], first[f], worst[f]))]
    else:
        p = _by_keys(p, (second[p], first[p]), names)
        f = _by_keys(f, (first[f], worst[f]), names)
    return np.concatenate([p, f])


def _by_keys(index, keys, names):
    """``index`` sorted by the float ``keys`` (last key first, as ``np.lexsort``), ties by name.

    The names are compared only within runs of equal keys (sorting text is slow, ties are rare).

    >>> _by_keys(np.arange(4), (np.zeros(4), np.array([2.0, 1.0, 1.0, 0.0])),
    ...          np.array(["d", "c", "b", "a"], dtype=object)).tolist()
    [3, 2, 1, 0]
    """
    order = np.lexsort(keys)
    k = np.stack([np.asarray(a)[order] for a in keys], axis=1)
    same = np.all((k[1:] == k[:-1]) | (np.isnan(k[1:]) & np.isnan(k[:-1])), axis=1)
    if not same.any():
        return index[order]
    tied = np.zeros(order.size, bool)  # sorted positions inside a run of equal keys
    tied[1:] |= same
    tied[:-1] |= same
    rows = order[tied]
    name_rank = np.zeros(order.size, np.int64)  # only the tied rows need their names ranked
    name_rank[rows] = np.unique(np.asarray(names[index[rows]]).astype(str), return_inverse=True)[1]
    return index[np.lexsort((name_rank,) + tuple(keys))]


def run_selection(job, table=None) -> Selection:
    """Screen the job's whole search space and rank it.

    Parameters
    ----------
    job : Job
    table : pandas.DataFrame, optional
        Catalogue rows to screen instead of the job's own search (schedules, tests): all of them
        are kept in the result.

    A catalogue search (without ``[built_up]``) of more than :data:`~leanspan.select.long_list.LONG_LIST`
    rows sorts them into pass and fail first and keeps the rows the table can show
    (:func:`~leanspan.select.long_list.long_list_rows`).
    """
    dropped = dropped_pass = 0  # candidates screened but not kept for the table
    nan_fails = frozenset()
    if table is None and getattr(job, "built_up", ()):
        from .built_up import built_up_table

        df, dropped, dropped_pass = built_up_table(job, candidate_table(job.search) if job.catalogue else None)
    else:
        df = candidate_table(job.search) if table is None else table
    warnings = (list(df.attrs.get("warnings", [])) if hasattr(df, "attrs") else []) + list(job.model.notes)
    warnings += _mixed_bases(df, job)  # on every row of the search, also of a long list
    if table is None and not getattr(job, "built_up", ()) and len(df) > LONG_LIST:
        df, dropped, dropped_pass, nan_fails = long_list_rows(df, job)
    if len(df) == 0:
        why = _why_empty(job.search) if table is None else "the given table"
        raise SelectionError(f"search: no catalogue rows match {why}; widen the search")
    cand = candidates_from_table(df, job.limits)
    res = screen(job.model, cand, job.search.self_weight, nan_fails=nan_fails)
    order = rank_order(df, res, job.search.objective)
    first = _rows(df, res, order, [0])[0]
    n_pass = int(res.passes.sum())
    screened = len(df) + dropped
    if n_pass:
        chosen = first
        msg = (f"{n_pass + dropped_pass} of {screened} candidates pass; lightest by {job.search.objective}: "
               f"{chosen['name']}")
    else:
        chosen = None
        best = first
        g = best["governing"]
        msg = (f"no candidate passes ({screened} screened); closest is {best['name']} "
               f"({best['material']}) with {g} at {utilisation_text(best['utilisation'][g])} × its limit")
    return Selection(bool(n_pass), msg, chosen, order, screened, df, res, job, warnings, n_pass + dropped_pass)
