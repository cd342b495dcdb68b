"""The chosen member of a selection, solved: what the sheet and the drawings show.

The screen checks candidates by array arithmetic; for the chosen (else the closest)
candidate this module builds its :class:`~leanspan.select.member.Member` and solves
the job's beam once with the member's own EI and self-weight, so diagrams, reactions
and the per-span deflection rows are the beam solver's exact results for it. The
checks' sheet rows (:class:`~leanspan.select.checks.CheckRow`) come from the registry.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ..beam import solve
from .checks import CheckRow
from .member import Member, beam_with_member, member_from_row

__all__ = ["ChosenMember", "chosen_member", "check_rows", "default_row"]


@dataclass(frozen=True)
class ChosenMember:
    """The chosen (or closest) candidate: its screen index, JSON row, catalogue row, member,
    section properties and exact beam solution."""

    index: int
    candidate: dict
    row: object  # pandas Series
    member: Member
    properties: dict
    solution: object  # leanspan.beam.BeamSolution
    selection: object

    @property
    def section(self):
        return self.member.section


def chosen_member(sel, position: int = 0) -> ChosenMember:
    """Solve the chosen (else the closest) candidate of selection ``sel``, or the candidate at
    rank ``position`` (0-based) when given."""
    k = int(sel.order[position])
    row = sel.table.iloc[k]
    member = member_from_row(row)
    props = member.section.properties()
    props["y_neutral"] = member.y_neutral
    model = beam_with_member(sel.job.model, member, self_weight=sel.job.search.self_weight)
    cand = sel.chosen if (sel.chosen is not None and position == 0) else sel.rows([position])[0]
    return ChosenMember(k, cand, row, member, props, solve(model), sel)


def default_row(check, chosen) -> list:
    """One row: the check at its governing combination, from the screen's arrays."""
    res, k = chosen.selection.result, chosen.index
    c = int(res.combination[check.name][k])
    if c < 0:
        return []
    util = float(res.utilisation[check.name][k])
    one = res.effects.take(k)
    action = check.action(one, c) if check.action is not None else ()
    formula = ()
    if check.formula is not None:
        formula = check.formula(one, {col: np.asarray(v)[[k]] for col, v in res.props.items()}, c)
    return [CheckRow(check=check.label, combination=res.effects.combinations[c].name, action=action,
                     demand=float(res.demand[check.name][k]), limit=float(res.allowable[check.name][k]),
                     kind=check.kind, utilisation=None if np.isnan(util) else util,
                     keys={"demand": f"chosen.demands.{check.demand_key}", "limit": f"limit.{check.name}",
                           "utilisation": f"chosen.utilisation.{check.name}"}, formula=formula)]


def check_rows(chosen: ChosenMember) -> list:
    """The sheet's check rows of the chosen member, check by check in registry order (the
    checks the job asks for)."""
    out = []
    for check in chosen.selection.result.checks:
        out += check.sheet_rows(chosen) if check.sheet_rows is not None else default_row(check, chosen)
    return out
