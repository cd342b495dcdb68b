"""The calculation sheet: one self-contained HTML page that a checker can read, print and file.

Three kinds of sheet share the same frame (title, date, source, the caution, what is
assumed and what is not checked):

- :func:`write_selection_sheet` for ``leanspan select`` / ``leanspan demo``: the job,
  the loaded beam, V/M/v diagrams of the chosen member, its section and properties,
  the checks with utilisation bars and the ranked candidates;
- :func:`write_beam_sheet` for ``leanspan beam``: the job, diagrams, reactions,
  extremes and deflection checks;
- :func:`write_section_sheet` for ``leanspan section``: the drawing and the properties.

The page has inline CSS and inline SVG, no scripts and no external references, and
each part starts on a new printed page. Every number is formatted from the same SI
values the ``--json`` output carries, in the chosen display units; numeric cells carry
a ``data-key`` naming the value. The file is written atomically.
"""

from __future__ import annotations

import datetime as _dt
import os
from pathlib import Path

from .. import CAUTION, __version__
from ..errors import InputError
from ..fileio import is_dir
from ..select.checks import not_checked
from ..select.chosen import check_rows
from ..units import display_factor, fmt
from ..units import utilisation_text as _util
from . import labels as prop_labels
from .markup import Cell, esc, inline_svg, num, page, section, table, util_bar
from .tables import ranks_note

__all__ = ["write_selection_sheet", "write_beam_sheet", "write_section_sheet",
           "selection_sheet_html", "beam_sheet_html", "section_sheet_html"]


_DEFER = ("These results do not replace a design to the building code that applies where the "
          "member will be built. Check the design against your local building code and have it "
          "reviewed by a licensed or otherwise qualified engineer before anything is built.")


BEAM_CAPTION = ("The loaded beam, to scale along x: each load case on its own lane, load heights to scale "
                "within a lane; arrows show the direction (down: gravity, up: upward loads).")


# -- small helpers ---------------------------------------------------------------------------
def _u(kind, units):
    return display_factor(kind, units)


def _q(value, kind, units, digits=4) -> str:
    """``value`` (SI) in display units, without the unit label."""
    if value is None:
        return "-"
    return fmt(value / _u(kind, units)[1], digits)


def _qu(value, kind, units, digits=4) -> str:
    """``value`` (SI) with its display unit label."""
    return f"{_q(value, kind, units, digits)} {_u(kind, units)[0]}"


def _today() -> str:
    epoch = os.environ.get("SOURCE_DATE_EPOCH")
    if epoch and epoch.strip().isdigit():
        return _dt.datetime.fromtimestamp(int(epoch), _dt.timezone.utc).date().isoformat()
    return _dt.date.today().isoformat()


def _check_target(path) -> Path:
    path = Path(path)
    if path.suffix.lower() not in (".html", ".htm"):
        raise InputError(f"{path}: expected a file name ending in .html")
    folder = path.parent if str(path.parent) else Path(".")
    if not is_dir(folder):
        raise InputError(f"{path}: folder {folder} does not exist")
    return path


def _write(path, text: str) -> None:
    from ..fileio import atomic_write

    atomic_write(path, text)


def _figure(fig, prefix: str, caption: str, cls: str = "") -> str:
    from .diagrams import figure_svg

    svg = inline_svg(figure_svg(fig), prefix)
    c = f' class="{esc(cls)}"' if cls else ""
    return f"<figure{c}>{svg}<figcaption>{esc(caption)}</figcaption></figure>"


def _invented(*texts) -> bool:
    return any("invented" in (t or "").lower() for t in texts)


def _header(title: str, kind: str, source: str, units: str, invented: bool, contents, project=None) -> str:
    shown = ", ".join(_u(k, units)[0] for k in ("length", "force", "moment", "pressure", "mass/length"))
    system = "SI" if units == "si" else "US customary"
    rows = list(project.rows()) if project is not None else []
    rows += [("Sheet", kind), ("Date", _today()), ("Input", source or "(not given)"),
            ("Units", f"{system} ({shown}; positions in {_u('span', units)[0]})"),
            ("Program", f"leanspan {__version__}")]
    out = [f"<h1>{esc(title)}</h1>", '<table class="meta">']
    out += [f"<tr><td><b>{esc(k)}</b></td><td>{esc(v)}</td></tr>" for k, v in rows]
    out.append("</table>")
    if invented:
        out.append('<p class="invented"><b>Invented demo data.</b> This job is an invented scenario '
                   "for demonstration: it is not a real project, and its loads, factors and limits "
                   "are not design values.</p>")
    out.append(f'<p class="caution" id="caution">{esc(CAUTION)}</p>')
    if contents:
        items = "".join(f'<li><a href="#{esc(a)}">{esc(t)}</a></li>' for a, t in contents)
        out.append(f'<p class="small">Parts of this sheet (each starts on a new printed page):</p><ol class="small">{items}</ol>')
    return "\n".join(out)


SECTION_NOT_CHECKED = [
    "any member check: stresses under loads, deflection, buckling and bearing "
    "(this sheet gives section properties only; leanspan select makes the listed checks)",
    "the connection between the parts of a built-up section (they are taken to act as one, without slip)",
    "local buckling of thin parts, and the effect of holes on anything but these properties",
]


def _closing(assumptions, not_checked_items=None) -> str:
    out = ["<h3>Assumptions</h3><ul>"]
    out += [f"<li>{esc(a)}</li>" for a in assumptions]
    out.append("</ul><h3>Not checked</h3><p>This sheet does <b>not</b> check:</p><ul>")
    out += [f"<li>{esc(n)}</li>" for n in (not_checked() if not_checked_items is None else not_checked_items)]
    out.append("</ul>")
    out.append(f"<p><b>{esc(_DEFER)}</b></p>")
    out.append(f'<p class="caution">{esc(CAUTION)}</p>')
    return "\n".join(out)


def _footer(source) -> str:
    return (f"<footer>Written by leanspan {esc(__version__)} on {esc(_today())} from "
            f"{esc(source or 'an unnamed input')}. Self-contained page: no scripts, no external "
            "resources.</footer>")


# -- the job summary --------------------------------------------------------------------------
def _beam_tables(model, units: str, show_ei: bool) -> str:
    sl, _ = _u("span", units)
    out = []
    rows = [[str(i + 1), kind, num(_q(a, "span", units)), num(_q(b, "span", units)),
             num(_q(b - a, "span", units), f"span{i + 1}.length")]
            for i, (a, b, kind) in enumerate(model.spans)]
    out.append(table(["#", "kind", f"from [{sl}]", f"to [{sl}]", f"length [{sl}]"], rows,
                     caption=f"Spans (beam length {_qu(model.length, 'span', units)})"))
    srows = []
    for s in model.supports:
        extra = []
        if s.k:
            extra.append(f"k = {_qu(s.k, 'spring', units)}")
        if s.kr:
            extra.append(f"kr = {_qu(s.kr, 'rotational spring', units)}")
        srows.append([s.type, num(_q(s.at, "span", units)), "; ".join(extra) or "-"])
    out.append(table(["type", f"at x [{sl}]", "springs"], srows, caption="Supports"))
    if model.hinges:
        out.append("<p>Internal hinges at x = " + ", ".join(_qu(h, "span", units) for h in model.hinges) + ".</p>")
    lrows = []
    for case in model.cases:
        for ld in model.loads:
            if ld.case != case:
                continue
            if hasattr(ld, "w1"):
                kind = "uniform" if ld.w1 == ld.w2 else "linear"
                mag = (_qu(ld.w1, "force/length", units) if ld.w1 == ld.w2 else
                       f"{_q(ld.w1, 'force/length', units)} to {_qu(ld.w2, 'force/length', units)}")
                where = f"{_q(ld.start, 'span', units)} to {_qu(ld.end, 'span', units)}"
            elif hasattr(ld, "P"):
                kind, mag, where = "point (down)", _qu(ld.P, "force", units), _qu(ld.at, "span", units)
            else:
                kind, mag, where = "couple (counter-clockwise)", _qu(ld.M, "moment", units), _qu(ld.at, "span", units)
            lrows.append([case, kind, Cell(esc(mag), ' class="num"'), where])
        if case == model.self_weight:
            w = ("the member's own weight (each candidate's mass)" if model.mass_per_length is None
                 else f"{_qu(model.mass_per_length * 9.80665, 'force/length', units)} "
                      f"({_qu(model.mass_per_length, 'mass/length', units)} × g)")
            lrows.append([case, "self-weight (uniform)", w, "whole beam"])
    out.append(table(["case", "type", "magnitude", "where (x)"], lrows,
                     caption="Loads by case (downward magnitudes; couples counter-clockwise)"))
    crows = []
    for c in model.combinations:
        factors = " + ".join(f"{f:g} × {case}" for case, f in c.factors)
        lim = "-"
        if c.limit is not None:
            lim = c.limit.describe(units)
        crows.append([c.name, factors, c.check, lim, c.pattern or "-"])
    if crows:
        out.append(table(["combination", "factors", "check", "deflection limit", "pattern case"], crows,
                         caption="Combinations"))
    if show_ei:
        el, _ = _u("flexural stiffness", units)
        if model.prismatic:
            out.append(f"<p>Flexural stiffness EI = {esc(_qu(model.stiffness[0].EI, 'flexural stiffness', units))}.</p>")
        else:
            rows = [[num(_q(p.start, "span", units)), num(_q(p.end, "span", units)),
                     num(_q(p.EI, "flexural stiffness", units))] for p in model.stiffness]
            out.append(table([f"from [{sl}]", f"to [{sl}]", f"EI [{el}]"], rows, caption="Flexural stiffness"))
    return "\n".join(out)


def _search_table(sel, units: str) -> str:
    s, lim = sel.job.search, sel.job.limits
    n_pass = sel.passing if getattr(sel, "passing", None) is not None else int(sel.result.passes.sum())
    families = ", ".join(s.families) if s.families else "all built-in"
    if getattr(sel.job, "built_up", ()):  # [built_up] spaces, instead of or beside the catalogue
        built = "built up: " + ", ".join(space.kind.replace("_", " ") for space in sel.job.built_up)
        families = f"{families}; {built}" if sel.job.catalogue else built

    def size(lo, hi):
        if lo is None and hi is None:
            return "any"
        if lo is None:
            return f"up to {_qu(hi, 'length', units)}"
        if hi is None:
            return f"at least {_qu(lo, 'length', units)}"
        return f"{_q(lo, 'length', units)} to {_qu(hi, 'length', units)}"

    rows = [["families / series", families],
            ["materials", ", ".join(s.materials) if s.materials else "each family's own"],
            ["user catalogue", Path(s.catalog).name if s.catalog else "-"],
            ["depth", size(s.min_depth, s.max_depth)],
            ["width", size(s.min_width, s.max_width)],
            ["objective", f"least {s.objective}"],
            ["self-weight carried by case", s.self_weight or "(none: members are weightless)"],
            ["stress limits", lim.describe(units)],
            ["candidates screened", Cell(esc(str(sel.screened)), ' class="num" data-key="screened"')],
            ["candidates passing", Cell(esc(str(n_pass)), ' class="num" data-key="passing"')]]
    return table(["search", "value"], rows, caption="Search space and limits")


# -- the design basis (only with [design]) ----------------------------------------------------
def _design_basis(sel, chosen) -> str:
    """The design basis of the chosen member: method, classes and factors, each with its source."""
    design = sel.job.limits.design
    if design is None:
        return ""
    import numpy as np

    from ..select.checks.deflection_final import basis_details

    props = {c: np.asarray(v)[[chosen.index]] for c, v in sel.result.props.items()}
    d = basis_details(design, props, sel.job.model.combinations)
    src = d["sources"]
    timber = d["material_kind"] in ("timber", "glulam")
    rows = [["method", "design strengths from characteristic values: timber f_d = kmod × kh × f_k / γM "
                       "(shear × k_cr), metals f_d = f / γM0; final deflection with creep",
             "[design] in the job"],
            ["service class", str(d["service_class"]), "the job (EN 1995-1-1 2.3.1.3)"]]
    for k in d["kmod"]:
        value = f"{k['kmod']:g}" if k["kmod"] is not None else "- (metal)"
        rows.append([f"kmod, {k['combination']}", f"{value}: shortest-duration case {k['case']} ({k['duration']})",
                     src["kmod"]])
    rows += [["γM" if timber else "γM0", f"{d['gamma_M']:g} ({d['material_kind']})", src["gamma_M"]],
             ["kh", f"{d['kh']:.4g}", src["kh"]],
             ["k_cr", "-" if d["k_cr"] is None else f"{d['k_cr']:g}", src["k_cr"]],
             ["kdef", f"{d['kdef']:g}", src["kdef"]]]
    rows += [[f"ψ2, {p['case']}", f"{'-' if p['psi2'] is None else format(p['psi2'], 'g')} ({p['duration']})",
              src["psi2"]] for p in d["psi2"]]
    return table(["design basis", "value", "source / why"], rows,
                 caption=f"Design basis of {chosen.candidate['name']} ({chosen.candidate['material']}); "
                         "values recalled from the standards (from memory)")


# -- selection sheet ---------------------------------------------------------------------------
def _property_rows(row, cand, units):
    """(label, key, value SI, kind) for the chosen member's property table."""
    values = {key: float(row[key]) for key in prop_labels.MEMBER_KEYS if key in row.index}
    values["EIz"] = float(row["E"]) * float(row["Iz"])
    return [(prop_labels.label(key), key, values[key], prop_labels.kind(key))
            for key in prop_labels.MEMBER_KEYS if key in values]


def _dims_text(cand, units):
    return ", ".join(f"{k} = {_qu(v, 'length', units)}" for k, v in cand["dims"].items())


def _reaction_rows(solution, units, kind_test=lambda kind: True) -> list:
    """Table rows (result, support, force, moment) of the results whose kind passes ``kind_test``."""
    out = []
    for n, r in solution.results.items():
        if not kind_test(r.kind):
            continue
        for i, (s, rx) in enumerate(zip(solution.model.supports, r.reactions)):
            out.append([n, f"{s.type} at {_qu(s.at, 'span', units)}",
                        num(_q(rx["force"], "force", units), f"{n}.R{i}.force"),
                        num(_q(rx["moment"], "moment", units), f"{n}.R{i}.moment") if s.rotational else "-"])
    return out


def _formula_text(tokens, units) -> str:
    """A substituted formula (:attr:`CheckRow.formula`) as text, values in display units."""
    out = []
    for t in tokens:
        if isinstance(t, tuple):
            out.append(_qu(t[0], t[1], units))
        elif isinstance(t, str):
            out.append(t)
        else:
            out.append(f"{float(t):.4g}")
    return "".join(out)


def _formulas(chosen, units) -> str:
    """The governing checks' formulas with their numbers, one line each."""
    items = [f"<li><b>{esc(r.check)}</b> ({esc(r.combination)}): {esc(_formula_text(r.formula, units))}</li>"
             for r in check_rows(chosen) if r.formula]
    if not items:
        return ""
    return ('<h3>Substituted formulas</h3><p class="small">Each check at its governing combination, '
            "the chosen member's own values substituted:</p><ul class=\"formulas\">" + "".join(items) + "</ul>")


def _check_rows(sel, chosen, units):
    """The checks table rows (and row classes) from the registry's rows for the chosen member."""
    rows, classes = [], []

    def two(a, b):
        return Cell(f"{esc(a)}<br><span class=\"small\">{esc(b)}</span>")

    def action_text(items):
        parts = [f"{label} {_qu(value, kind, units)}" for label, value, kind in items]
        if not parts:
            return "-"
        return parts[0] if len(parts) == 1 else two(parts[0], " ".join(parts[1:]))

    for r in check_rows(chosen):
        ok = r.utilisation is None or r.utilisation <= 1.0
        limit = _qu(r.limit, r.kind, units) + (f" ({r.rule.describe(units)})" if r.rule is not None else "")
        rows.append([two(r.check, r.combination), action_text(r.action),
                     num(_qu(r.demand, r.kind, units), r.keys.get("demand")),
                     num(limit, r.keys.get("limit")),
                     num(_util(r.utilisation), r.keys.get("utilisation")),
                     Cell(util_bar(r.utilisation, width=80)),
                     Cell("pass" if ok else "FAILS", f' class="{"pass" if ok else "fail"}"')])
        classes.append("" if ok else "fails")
    return rows, classes


def selection_sheet_html(sel, units: str = "si", source: str = "", top: int = 10) -> str:
    """The whole selection sheet as an HTML string (see :func:`write_selection_sheet`)."""
    from .diagrams import diagram_figure, governing, loaded_beam_figure, section_figure
    from .tables import table_rows

    job = sel.job
    title = job.title or job.model.name or "Member selection"
    chosen = sel.chosen_member
    row, cand, sol = chosen.row, chosen.candidate, chosen.solution
    picks = governing(sol)
    contents = [("job", "Job"), ("beam", "Loaded beam and internal forces"), ("section", "The section"),
                ("checks", "Checks"), ("candidates", "Ranked candidates"),
                ("assumptions", "Assumptions and what is not checked")]
    head = _header(title, "member selection", source, units, _invented(title, source), contents, job.project)
    if sel.success:
        verdict = (f'<p class="verdict"><b>Chosen: {esc(cand["name"])}</b> ({esc(cand["material"])}, '
                   f'{esc(cand["series"])}), <span data-key="chosen.mass_per_length">'
                   f'{esc(_qu(cand["mass_per_length"], "mass/length", units))}</span>; governing check: '
                   f'{esc(cand["governing"])} at <span data-key="chosen.governing_utilisation">'
                   f'{esc(_util(cand["utilisation"][cand["governing"]]))}</span> of its limit. '
                   f'{esc(sel.message)}.</p>')
    else:
        detail = sel.message.removeprefix("no candidate passes").lstrip()
        verdict = (f'<p class="verdict fail"><b>No candidate passes</b> {esc(detail)}. The sheet '
                   f'shows the closest candidate, {esc(cand["name"])}, which FAILS.</p>')
    parts = [head + verdict, section("Job", _beam_tables(job.model, units, show_ei=False)
                                     + _search_table(sel, units) + _design_basis(sel, chosen), anchor="job")]

    beam_fig = _figure(loaded_beam_figure(sol.model, units), "beam",
                       BEAM_CAPTION)
    diag = _figure(diagram_figure(sol, units, picks), "diagrams",
                   f"Shear V, moment M and deflection v of {cand['name']} ({cand['material']}, "
                   f"EI = {_qu(float(row['E']) * float(row['Iz']), 'flexural stiffness', units)}, "
                   f"self-weight included): envelope of all combinations in grey, the governing "
                   f"combination as a line with its extremes marked.")
    fl, ml = _u("force", units)[0], _u("moment", units)[0]

    heads = ["support", f"force [{fl}] (up +)", f"moment [{ml}] (ccw +)"]
    sw = job.search.self_weight
    reactions = (table(["load case"] + heads, _reaction_rows(sol, units, lambda k: k == "case"),
                       caption="Characteristic support reactions per load case (unfactored"
                               + (f"; case {sw} includes the chosen member's self-weight" if sw else "")
                               + "), for the supporting structure and the bearings")
                 + table(["combination"] + heads, _reaction_rows(sol, units, lambda k: k != "case"),
                         caption="Design support reactions of the chosen member per combination "
                                 "(envelope: the larger-magnitude bound)"))
    parts.append(section("Loaded beam and internal forces", beam_fig + diag + reactions, anchor="beam"))

    secn, props = chosen.section, chosen.properties
    sfig = _figure(section_figure(secn, props, units, cand["name"]), "section",
                   f"{cand['name']} ({cand['material']}) to scale: {_dims_text(cand, units)}. "
                   "+ centroid; dashed blue line: neutral axis; 1 and 2: principal axes.",
                   cls="section-drawing")
    prow = [[label, num(_q(v, kind, units), f"prop.{key}"), _u(kind, units)[0]]
            for label, key, v, kind in _property_rows(row, cand, units)]
    ptable = table(["property", "value", "unit"], prow,
                   caption=f"Properties of {cand['name']} ({cand['material']}, {cand['series']})")
    parts.append(section("The section", sfig + ptable, anchor="section"))

    crow, cls = _check_rows(sel, chosen, units)
    ctable = table(["check / combination", "action", "demand", "limit", "utilisation", "", "result"],
                   crow, cls="checks", row_classes=cls)
    how = " ".join(esc(c.sentence) for c in sel.result.checks)
    note = ("<p class=\"small\">Utilisation = demand / limit, printed rounded up to 3 decimals (the bar's "
            "black mark is 1.0); each check "
            f"is shown at its governing combination. Stress limits: {esc(job.limits.describe(units))} "
            f"(for {esc(cand['material'])}). {how}</p>")
    parts.append(section("Checks", ctable + _formulas(chosen, units) + note, anchor="checks"))

    labels, trows = table_rows(sel, units, top)
    shown = sel.shown(top)
    numeric = {0: "rank", 3: "mass_per_length", 4: "depth", 5: "width",
               **{6 + i: c.name for i, c in enumerate(sel.result.checks)}}
    cells, rcls = [], []
    for c, r in zip(shown, trows):
        cells.append([num(v, f"rank{c['rank']}.{numeric[i]}") if i in numeric else v for i, v in enumerate(r)])
        rcls.append("chosen" if (sel.success and c["rank"] == 1) else ("fails" if not c["passes"] else ""))
    rtable = table(labels, cells, cls="ranked", row_classes=rcls)
    rnote = ("<p class=\"small\">Passing candidates in order of the objective (least "
             f"{esc(job.search.objective)}), then the nearest failures: the heaviest lighter "
             f"sections that fail, marked NO, closest to passing first ({esc(ranks_note(sel))}). "
             "Utilisations are demand / limit, rounded up to 3 decimals.</p>")
    parts.append(section("Ranked candidates", rtable + rnote, anchor="candidates"))

    assumptions = [
        "Linear-elastic, small-deflection bending of a straight prismatic member (shear deformation neglected).",
        "Loads are static and act in the vertical plane through the shear centre; no torsion.",
        "Bending about the horizontal axis (Iz) only; the member is assumed to be restrained "
        "laterally along its length.",
        f"Self-weight of each candidate is added to load case '{job.search.self_weight}'."
        if job.search.self_weight else "Self-weight of the members is not included.",
        "Stress limits and deflection limits are the ones given in the job; their suitability "
        "for the material, load duration and service class is the user's responsibility.",
        "Section properties are gross-section values from the catalogue dimensions.",
    ]
    parts.append(section("Assumptions and what is not checked", _closing(assumptions, not_checked(sel.result.checks)) + _footer(source),
                         anchor="assumptions"))
    return page(f"{title} — leanspan calculation sheet", "\n".join(parts))


def write_selection_sheet(sel, path, units: str = "si", source: str = "", top: int = 10) -> None:
    """Write the calculation sheet of a selection to ``path`` (an ``.html`` file), atomically.

    Parameters
    ----------
    sel : leanspan.select.search.Selection
    path : str or Path
    units : {"si", "us"}
    source : str
        Where the job came from (file name), shown on the sheet.
    top : int
        Passing candidates listed in the ranked table.

    Raises
    ------
    InputError
        ``path`` does not end in .html, its folder is missing, or it is an input file.
    """
    path = _check_target(path)
    _write(path, selection_sheet_html(sel, units, source, top))


# -- beam sheet --------------------------------------------------------------------------------
def beam_sheet_html(solution, units: str = "si", source: str = "", project=None) -> str:
    """The whole beam sheet as an HTML string (see :func:`write_beam_sheet`)."""
    from .diagrams import diagram_figure, governing, loaded_beam_figure

    model = solution.model
    title = model.name or (Path(source).stem if source else "Beam")
    contents = [("job", "Job"), ("beam", "Loaded beam and internal forces"), ("results", "Results"),
                ("assumptions", "Assumptions and what is not checked")]
    head = _header(title, "beam analysis", source, units, _invented(title, source), contents, project)
    parts = [head, section("Job", _beam_tables(model, units, show_ei=True), anchor="job")]
    picks = governing(solution)
    parts.append(section("Loaded beam and internal forces",
                         _figure(loaded_beam_figure(model, units), "beam",
                                 BEAM_CAPTION)
                         + _figure(diagram_figure(solution, units, picks), "diagrams",
                                   "Shear V, moment M and deflection v: envelope of all combinations "
                                   "in grey, the governing combination as a line with its extremes marked."),
                         anchor="beam"))
    fl, ml, dl, sl = (_u(k, units)[0] for k in ("force", "moment", "length", "span"))
    erows = []
    for n, r in solution.results.items():
        cells = [Cell(f"{esc(n)}<br><span class=\"small\">{esc(r.kind)}</span>")]
        for key, kind in (("M", "moment"), ("V", "force"), ("v", "length")):
            lines = []
            for tag in ("max", "min"):
                e = r.extremes[f"{key}_{tag}"]
                lines.append(f'{tag} <span data-key="{esc(n)}.{key}_{tag}">{esc(_q(e.value, kind, units))}</span>'
                             f" @ {esc(_q(e.at, 'span', units))}")
            cells.append(Cell("<br>".join(lines), ' class="num"'))
        erows.append(cells)
    ext = table(["result", f"M [{ml}]", f"V [{fl}]", f"v [{dl}]"], erows,
                caption=f"Extremes (value @ x in {sl}); sagging M positive, V = -dM/dx, v upward positive")
    rrows = _reaction_rows(solution, units)
    rea = table(["result", "support", f"force [{fl}] (up +)", f"moment [{ml}] (ccw +)"], rrows,
                caption="Support reactions (envelope: the larger-magnitude bound)")
    drows, dcls = [], []
    limits = {c.name: c.limit.describe(units) for c in model.combinations if c.limit is not None}
    for n, r in solution.results.items():
        if r.kind != "combination":
            continue
        for c in r.deflection_checks:
            ok = c["utilisation"] <= 1.0
            drows.append([n, f"{c['kind']} {c['span']} ({_q(c['from'], 'span', units)} to "
                             f"{_qu(c['to'], 'span', units)})",
                          num(f"{_q(c['v_extreme'], 'length', units)} @ {_q(c['at'], 'span', units)}"),
                          num(f"{_q(c['allowed'], 'length', units)} ({limits.get(n, c['limit'])})"),
                          num(_util(c["utilisation"]), f"{n}.defl{c['span']}"), Cell(util_bar(c["utilisation"])),
                          Cell("pass" if ok else "FAILS", f' class="{"pass" if ok else "fail"}"')])
            dcls.append("" if ok else "fails")
    defl = (table(["combination", "span", f"v [{dl}] @ x [{sl}]", f"allowed [{dl}]", "utilisation", "",
                   "result"], drows, cls="checks", row_classes=dcls,
                  caption="Deflection checks (worst per span)") if drows else
            "<p>No combination carries a deflection limit, so no deflection check is made.</p>")
    stress = ("<p class=\"small\">A beam job names no allowable stresses: this sheet reports forces, "
              "moments and deflections; stresses are not checked here (use leanspan select for that).</p>")
    parts.append(section("Results", defl + stress + ext + rea, anchor="results"))
    assumptions = [
        "Linear-elastic, small-deflection bending of a straight member (shear deformation neglected).",
        "Loads are static and act in the vertical plane; no torsion and no axial force.",
        "The flexural stiffness EI is the one given in the job; its suitability (cracking, creep, "
        "moisture) is the user's responsibility.",
    ]
    parts.append(section("Assumptions and what is not checked", _closing(assumptions) + _footer(source),
                         anchor="assumptions"))
    return page(f"{title} — leanspan calculation sheet", "\n".join(parts))


def write_beam_sheet(solution, path, units: str = "si", source: str = "", project=None) -> None:
    """Write the calculation sheet of a solved beam (:class:`leanspan.beam.BeamSolution`) atomically;
    ``project`` (:class:`leanspan.project.Project`) fills the title block.

    Raises
    ------
    InputError
        ``path`` does not end in .html, its folder is missing, or it is an input file.
    """
    path = _check_target(path)
    _write(path, beam_sheet_html(solution, units, source, project))


# -- section sheet -----------------------------------------------------------------------------
def section_sheet_html(section_obj, out: dict, units: str = "si", source: str = "") -> str:
    """The whole section sheet as an HTML string (see :func:`write_section_sheet`)."""
    from .diagrams import section_figure

    title = f"Section {Path(source).name}" if source else "Section properties"
    values = dict(out)
    if section_obj.has_materials and "y_neutral" not in values:
        from ..catalog.materials import material_lookup
        from ..errors import LeanspanError

        try:
            values["y_neutral"] = section_obj.composite(material_lookup()).y_neutral
        except LeanspanError:
            pass
    contents = [("section", "Drawing and properties"), ("assumptions", "Assumptions and what is not checked")]
    head = _header(title, "section properties", source, units, _invented(title, source), contents)
    parts_rows = []
    for p in section_obj.parts:
        a = p.polygon.area
        parts_rows.append([p.label, p.shape or "-", p.material or "-", num(_q(a, "area", units))])
    ptab = table(["part", "shape (mm)", "material", f"area [{_u('area', units)[0]}]"], parts_rows,
                 caption=f"{len(section_obj.parts)} part(s)")
    props = dict(values)
    fig = _figure(section_figure(section_obj, props, units, title), "section",
                  "The section to scale: + centroid; 1 and 2: principal axes"
                  + ("; dashed blue line: neutral axis (E-weighted)" if "y_neutral" in props else "") + ".",
                  cls="section-drawing")
    rows = []
    for key in prop_labels.SECTION_KEYS:
        if values.get(key) is None:
            continue
        name, factor = prop_labels.unit(key, units)
        rows.append([prop_labels.label(key), num(fmt(values[key] / factor, 4), key), name])
    prop = table(["property", "value", "unit"], rows, caption="Properties (about the centroid unless stated)")
    parts = [head, section("Drawing and properties", fig + ptab + prop, anchor="section")]
    assumptions = [
        "Gross-section, linear-elastic properties of the polygons as given (holes as drawn).",
        "Parts with different materials are combined by their elastic moduli (transformed section); "
        "parts act together with no slip at their interfaces.",
        "y is up and z is horizontal; Iz is about the horizontal centroidal axis.",
    ]
    parts.append(section("Assumptions and what is not checked",
                         _closing(assumptions, SECTION_NOT_CHECKED) + _footer(source),
                         anchor="assumptions"))
    return page(f"{title} — leanspan calculation sheet", "\n".join(parts))


def write_section_sheet(section, out, path, units: str = "si", source: str = "") -> None:
    """Write the calculation sheet of a section (``out`` = the JSON-contract properties) atomically.

    Raises
    ------
    InputError
        ``path`` does not end in .html, its folder is missing, or it is an input file.
    """
    path = _check_target(path)
    _write(path, section_sheet_html(section, out, units, source))
