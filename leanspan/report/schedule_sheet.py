"""The schedule sheet: one HTML page with a summary part (members, totals, rationalised sections,
penalty of K, Pareto plot, carbon factors), then one part per member type: its beam, its section
and the checks of that section. Built from the pieces of :mod:`leanspan.report.sheet`."""

from __future__ import annotations

import numpy as np

from ..select.chosen import chosen_member
from ..select.search import run_selection
from ..units import display_factor, fmt
from .markup import esc, num, page, section, table
from .schedule_text import member_rows, penalty_rows
from .sheet import (BEAM_CAPTION, _beam_tables, _check_rows, _check_target, _closing, _figure, _footer,
                    _header, _invented, _search_table, _write)

__all__ = ["schedule_sheet_html", "write_schedule_sheet", "MAX_TYPE_PAGES"]

MAX_TYPE_PAGES = 60  # member types with a part of their own; the rest are in the table only


def _summary_part(result, units, source):
    opts = result.run.schedule.options
    title = opts.title or "Member schedule"
    contents = [("summary", "Schedule summary")]
    shown = _shown_types(result)
    contents += [(f"type{t + 1}", f"Member type {t + 1}: " + ", ".join(names[:3]) + (" ..." if len(names) > 3 else ""))
                 for t, names in shown]
    head = _header(title, "member schedule", source, units, _invented(title, source), contents)
    labels, rows = member_rows(result, units)
    body = [table(labels, [[num(c) if i in (1, 2, 5, 7) else c for i, c in enumerate(r)] for r in rows],
                  caption="Members: section, mass of all pieces, governing check and its utilisation")]
    from .schedule_text import _summary  # the same sentences as the terminal
    body.append("<ul>" + "".join(f"<li>{esc(s)}</li>" for s in _summary(result, units)) + "</ul>")
    if result.sizes is not None and result.sizes["penalty"]:
        plabels, prows = penalty_rows(result, units)
        body.append(table(plabels, prows, caption="Penalty of limiting the number of distinct sections"))
        from .schedule_plot import penalty_figure

        body.append(_figure(penalty_figure(result, units), "penalty",
                            "Extra total objective over each member's own best, against the number of sections allowed."))
    if result.pareto is not None:
        from .schedule_plot import pareto_figure

        body.append(_figure(pareto_figure(result, units), "pareto",
                            "Non-dominated passing sections of each member type (up to twelve types)."))
    mu = display_factor("mass", units)[0]
    crow = [[n, num(fmt(f, 4)), s] for n, f, s in result.run.schedule.values.describe_carbon()]
    body.append(table(["material or kind", "kg CO2e per kg", "source"], crow,
                      caption=f"Carbon factors (cradle to gate; carbon totals in {mu} CO2e)"))
    if result.no_pass:
        body.append(f"<p class=\"verdict fail\"><b>Nothing passes</b> for {esc(', '.join(result.no_pass))}.</p>")
    if result.bad:
        body.append("<p class=\"verdict fail\"><b>Bad input, not selected:</b></p><ul>"
                    + "".join(f"<li>{esc(b.message)}</li>" for b in result.bad) + "</ul>")
    if len(result.run.outcomes) > MAX_TYPE_PAGES:
        body.append(f"<p class=\"small\">The first {MAX_TYPE_PAGES} of {len(result.run.outcomes)} member types "
                    "have a part of their own; the JSON and CSV outputs list every member.</p>")
    return title, head + section("Schedule summary", "\n".join(body), anchor="summary")


def _shown_types(result):
    names = {}
    for r in result.members:
        names.setdefault(r["type"] - 1, []).append(r["name"])
    return sorted(names.items())[:MAX_TYPE_PAGES]


def _type_part(result, t, names, units):
    """The part of one member type: its members, beam, search, the section it gets and its checks."""
    run = result.run
    i = int(np.flatnonzero(run.member_type == t)[0])
    job = run.members[i].job
    rows = [r for r in result.members if r["type"] == t + 1]
    r0 = rows[0]
    pick = r0["rationalised"] or r0["own"]
    sel = run_selection(job)
    if pick is not None:
        df = sel.table
        hit = np.flatnonzero((df["name"].to_numpy().astype(str) == pick["section"])
                             & (df["material"].to_numpy().astype(str) == pick["material"])
                             & (df["series"].to_numpy().astype(str) == pick["series"]))
        position = int(np.flatnonzero(sel.order == hit[0])[0])
    else:
        position = 0
    chosen = chosen_member(sel, position)
    cand = chosen.candidate
    members = ", ".join(f"{r['name']} (x{r['count']})" for r in rows)
    if pick is not None:
        how = "rationalised section" if r0["rationalised"] else "own best"
        verdict = (f'<p class="verdict"><b>{esc(cand["name"])}</b> ({esc(cand["material"])}, {esc(how)}); '
                   f"governing check {esc(cand['governing'])}. Members: {esc(members)}.</p>")
    else:
        verdict = (f'<p class="verdict fail"><b>No candidate passes.</b> The closest, {esc(cand["name"])}, '
                   f"FAILS. Members: {esc(members)}.</p>")
    crow, cls = _check_rows(sel, chosen, units)
    ctable = table(["check / combination", "action", "demand", "limit", "utilisation", "", "result"],
                   crow, cls="checks", row_classes=cls)
    from .diagrams import loaded_beam_figure

    fig = _figure(loaded_beam_figure(chosen.solution.model, units), f"beam{t + 1}", BEAM_CAPTION)
    body = verdict + _beam_tables(job.model, units, show_ei=False) + _search_table(sel, units) + fig + ctable
    return section(f"Member type {t + 1}: {', '.join(names[:3])}{' ...' if len(names) > 3 else ''}", body,
                   anchor=f"type{t + 1}"), sel


def schedule_sheet_html(result, units: str = "si", source: str = "") -> str:
    """The whole schedule sheet as an HTML string (see :func:`write_schedule_sheet`)."""
    title, summary = _summary_part(result, units, source)
    parts = [summary]
    checks = None
    for t, names in _shown_types(result):
        part, sel = _type_part(result, t, names, units)
        parts.append(part)
        checks = sel.result.checks
    from ..select.checks import not_checked

    assumptions = [
        "Each member is selected on its own, by the same screen, checks and ranking as leanspan select.",
        "A rationalised section passes every check of each member it is given to.",
        "Masses are of the whole member length (the beam length) times the number of pieces; "
        "costs and carbon follow from the prices and factors listed.",
        "Carbon factors are cradle-to-gate values per kg of material; built-in ones are recalled "
        "from published inventories (from memory) and must be replaced by your suppliers' declarations.",
    ]
    parts.append(section("Assumptions and what is not checked",
                         _closing(assumptions, not_checked(checks) if checks is not None else None)
                         + _footer(source), anchor="assumptions"))
    return page(f"{title} — leanspan schedule sheet", "\n".join(parts))


def write_schedule_sheet(result, path, units: str = "si", source: str = "") -> None:
    """Write the schedule sheet to ``path`` (an ``.html`` file), atomically."""
    path = _check_target(path)
    _write(path, schedule_sheet_html(result, units, source))
