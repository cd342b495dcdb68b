"""A schedule's results as plain data: the member table, totals, rationalisation, Pareto sets.

:func:`build_result` takes a :class:`~leanspan.schedule.run.ScheduleRun` and returns a
:class:`ScheduleResult`, whose :meth:`~ScheduleResult.to_json` is the ``schedule --json``
document (docs/formats.md, section 9.6); the text, CSV, Markdown and the sheet are drawn
from the same data.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from .objectives import UNITS, member_factor
from .pareto import front
from .rationalise import best_each, penalty_table, rationalise

__all__ = ["ScheduleResult", "build_result"]


@dataclass
class ScheduleResult:
    run: object
    members: list        # MEMBER dicts, in schedule order (good members only)
    totals: dict
    sizes: dict | None
    pareto: dict | None
    no_pass: list        # names of members where nothing passes
    bad: list            # BadMember

    @property
    def objective(self):
        return self.run.objective

    def to_json(self) -> dict:
        opts = self.run.schedule.options
        return {"title": opts.title, "objective": opts.objective, "currency": opts.currency,
                "members": self.members, "member_types": len(self.run.outcomes), "totals": self.totals,
                "sizes": self.sizes, "pareto": self.pareto, "no_pass": self.no_pass,
                "bad_input": [{"member": b.name, "where": b.where, "error": b.message} for b in self.bad],
                "carbon_factors": [{"name": n, "factor": f, "source": s}
                                   for n, f, s in self.run.schedule.values.describe_carbon()]}


def _candidate_values(run):
    """v_j of every global candidate for each objective (cost NaN where unpriced)."""
    cols = run.candidates
    return {o: run.schedule.values.values(o, cols) for o in UNITS}


def _amounts(values, c, count, length) -> dict:
    """Mass, cost and carbon of ``count`` pieces of ``length`` in candidate ``c`` (None: no price)."""
    out = {}
    for o in ("mass", "cost", "carbon"):
        v = float(values[o][c]) * count * length
        out[o] = v if np.isfinite(v) else None
    return out


def _at(outcome, c):
    """(largest utilisation, governing check) of passing global candidate ``c`` for a type."""
    pos = np.flatnonzero(outcome.candidates == c)
    if pos.size == 0:
        return None, None
    return float(outcome.worst[pos[0]]), str(outcome.governing[pos[0]])


def _section(run, values, c, outcome, count, length) -> dict:
    cols = run.candidates
    u, g = _at(outcome, c)
    return {"section": str(cols["name"][c]), "material": str(cols["material"][c]),
            "series": str(cols["series"][c]), **_amounts(values, c, count, length),
            "governing": g, "utilisation": u}


def _totals(rows, key) -> dict:
    """Sums over the members' ``key`` entries (a sum is None if any part is unknown)."""
    parts = [r[key] for r in rows if r[key] is not None]
    out = {"members": len(rows), "pieces": sum(r["count"] for r in rows)}
    for o in ("mass", "cost", "carbon"):
        vals = [p[o] for p in parts]
        out[o] = None if any(v is None for v in vals) else float(sum(vals))
    out["distinct_sections"] = len({(p["series"], p["section"], p["material"]) for p in parts})
    return out


def build_result(run, sizes: int | None = None, sizes_per: str = "all", pareto=None,
                 penalty: bool = True) -> ScheduleResult:
    """Assemble the member table and totals; rationalise to ``sizes`` sections (per
    ``sizes_per`` group) with the penalty table; Pareto sets for the objective pair ``pareto``."""
    values = _candidate_values(run)
    rows, no_pass = [], []
    for i, m in enumerate(run.members):
        o = run.outcomes[run.member_type[i]]
        if o.error is not None:
            continue
        length = float(m.job.model.length)
        row = {"name": m.name, "where": m.where, "count": m.count, "length": length,
               "type": int(run.member_type[i]) + 1, "passes": bool(o.success), "chosen": None,
               "closest": None, "own": None, "rationalised": None}
        if o.success:
            row["chosen"] = o.chosen
            c = _candidate_id(run, o, o.chosen)
            row["own"] = _section(run, values, c, o, m.count, length)
        else:
            row["closest"] = o.chosen
            no_pass.append(m.name)
        rows.append(row)
    totals = _totals(rows, "own")
    sized = _rationalised(run, values, rows, sizes, sizes_per, penalty) if sizes is not None else None
    fronts = _pareto(run, values, pareto) if pareto else None
    return ScheduleResult(run, rows, totals, sized, fronts, no_pass, list(run.bad))


def _candidate_id(run, outcome, cand) -> int:
    cols = run.candidates
    hit = np.flatnonzero((cols["name"][outcome.candidates] == cand["name"])
                         & (cols["material"][outcome.candidates] == cand["material"])
                         & (cols["series"][outcome.candidates] == cand["series"]))
    return int(outcome.candidates[hit[0]])


def _rationalised(run, values, rows, k, per, penalty) -> dict:
    """Rationalise the member types that pass; fill each row's ``rationalised`` entry."""
    objective = run.objective
    types = sorted({r["type"] - 1 for r in rows if r["passes"]})
    n_cand = len(run.candidates["name"])
    passes = np.zeros((len(types), n_cand), bool)
    weight = np.zeros(len(types))
    for t_pos, t in enumerate(types):
        passes[t_pos, run.outcomes[t].candidates] = True
    for r in rows:
        if r["passes"]:
            weight[types.index(r["type"] - 1)] += float(member_factor(objective, r["count"], r["length"]))
    v = values[objective]
    tiebreak = values["depth"] if objective != "depth" else values["mass"]
    groups = (np.unique(run.candidates[per], return_inverse=True)[1] if per != "all"
              else np.zeros(n_cand, int))
    best = rationalise(passes, weight, v, k, groups, tiebreak)
    own_total = float(np.sum(weight * v[best_each(passes, v, tiebreak)])) if types else 0.0
    table = []
    if penalty:
        for r in penalty_table(passes, weight, v, groups, tiebreak):
            table.append({"sizes": r.k, "total": r.total if r.feasible else None,
                          "penalty": (r.total / own_total - 1.0) if r.feasible and own_total > 0 else None,
                          "method": r.method, "optimal": r.optimal, "feasible": r.feasible})
    by_type = {t: int(best.choice[p]) for p, t in enumerate(types)} if best.feasible else {}
    for r in rows:
        t = r["type"] - 1
        if t in by_type:
            r["rationalised"] = _section(run, values, by_type[t], run.outcomes[t], r["count"], r["length"])
    sections = []
    for c in best.sections if best.feasible else []:
        users = [r for r in rows if r["rationalised"] and (r["type"] - 1) in by_type and by_type[r["type"] - 1] == c]
        sections.append({"section": str(run.candidates["name"][c]), "material": str(run.candidates["material"][c]),
                         "series": str(run.candidates["series"][c]), "members": len(users),
                         "pieces": sum(u["count"] for u in users)})
    totals = _totals([r for r in rows if r["passes"]], "rationalised") if best.feasible else None
    return {"limit": k, "per": per, "method": best.method, "optimal": best.optimal, "feasible": best.feasible,
            "total": best.total if best.feasible else None, "unrestricted_total": own_total,
            "sections": sections, "totals": totals, "penalty": table}


def _pareto(run, values, pair) -> dict:
    """Per member type: the passing candidates that no other passing one beats in both objectives,
    valued per piece (one member of its length)."""
    a, b = pair
    cols = run.candidates
    out = []
    names = {}
    for i, m in enumerate(run.members):
        names.setdefault(int(run.member_type[i]), []).append(m.name)
    for t, o in enumerate(run.outcomes):
        if o.error is not None or not o.success:
            continue
        length = float(run.members[int(np.flatnonzero(run.member_type == t)[0])].job.model.length)
        ids = o.candidates
        va, vb = values[a][ids], values[b][ids]
        keep = ids[front(va, vb)]
        scale = {obj: (1.0 if obj == "depth" else length) for obj in pair}
        order = np.lexsort((values[b][keep], values[a][keep]))
        out.append({"type": t + 1, "members": names[t],
                    "front": [{"section": str(cols["name"][c]), "material": str(cols["material"][c]),
                               "series": str(cols["series"][c]),
                               a: float(values[a][c] * scale[a]), b: float(values[b][c] * scale[b])}
                              for c in keep[order]]})
    return {"objectives": list(pair), "types": out}
