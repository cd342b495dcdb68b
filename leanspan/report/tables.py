"""The ranked table of a selection: text for the terminal, CSV and Markdown exports."""

from __future__ import annotations

from .. import CAUTION
from ..catalog.thickness import thickness_steps
from ..fileio import atomic_write
from ..units import display_factor, fmt, utilisation_text
from .labels import generated_note
from .text import aligned_table, csv_text, numeric_columns

__all__ = ["utilisation_text", "table_rows", "ranked_table_text", "ranked_table_markdown", "ranked_table_csv",
           "write_table_exports", "HEADERS"]

HEADERS = ["rank", "name", "material", "mass", "depth", "width", "governing", "pass"]
"""The fixed columns; one column per active check stands between width and governing."""


def table_rows(sel, units: str = "si", top: int = 10):
    """Header labels (with units) and rows of display strings for the shown candidates;
    one utilisation column per registered check."""
    mu, mf = display_factor("mass/length", units)
    lu, lf = display_factor("length", units)
    checks = sel.result.checks
    labels = ["rank", "name", "material", f"mass [{mu}]", f"depth [{lu}]", f"width [{lu}]",
              *(c.label for c in checks), "governing", "pass"]
    rows = []
    for c in sel.shown(top):
        u = c["utilisation"]
        rows.append([str(c["rank"]), c["name"], c["material"], fmt(c["mass_per_length"] / mf, 4, strip=False),
                     fmt(c["depth"] / lf, 4), fmt(c["width"] / lf, 4),
                     *(utilisation_text(u[check.name]) for check in checks), c["governing"],
                     "yes" if c["passes"] else "NO"])
    return labels, rows


def _summary(sel, units):
    job = sel.job
    lines = []
    if job.title:
        lines.append(job.title)
    su, sf = display_factor("span", units)
    spans = ", ".join(f"{fmt((b - a) / sf, 4)} {su}" + (" overhang" if k == "overhang" else "")
                      for a, b, k in job.model.spans)
    combos = ", ".join(f"{c.name} ({c.check}{', ' + c.limit.describe(units) if c.limit else ''})"
                       for c in job.model.combinations)
    lines.append(f"Beam: {spans}; combinations: {combos}")
    lines.append(f"Limits: {job.limits.describe(units)}; self-weight in case "
                 f"{job.search.self_weight or '(none)'}; objective: least {job.search.objective}")
    lines.append(sel.message)
    return lines


def ranks_note(sel) -> str:
    """What the ranks count: every candidate, or (a built-up search and a long list keep only the
    rows the table can show) the rows kept."""
    if sel.screened == len(sel.table):
        return "ranks count every candidate screened"
    return f"ranks count the {len(sel.table)} rows kept of the {sel.screened} screened"


def ranked_table_text(sel, units: str = "si", top: int = 10) -> str:
    """Summary lines and an aligned table of the shown candidates (numeric columns to the right)."""
    labels, rows = table_rows(sel, units, top)
    marked = _unrestrained(sel, top)
    rows = [r[:-1] + [r[-1] + ("*" if m else "")] for r, m in zip(rows, marked)]
    out = _summary(sel, units) + ["", aligned_table(labels, rows, rule=True)]
    out.append("Utilisation = demand / limit, rounded up to 3 decimals; rows marked NO fail (the heaviest "
               f"lighter sections that fail, closest to passing first; {ranks_note(sel)}).")
    if any(marked):
        out.append("* assumes full lateral restraint: lateral-torsional buckling is not checked; set "
                   "lateral_restraint = \"supports\" in [limits] to check it.")
    note = generated_note(c["series"] for c in sel.shown(top))
    if note:
        out.append(note)
    if any(c["utilisation"].get("local_buckling") is None and not c["passes"]
           and c["governing"] == "local_buckling" for c in sel.shown(top)):
        out.append("inf under local buckling: a slender (class 4) section, excluded; set slender_sections = "
                   "\"effective\" in [limits] to check it on its effective section.")
    stepped = thickness_note(sel.shown(top), units)
    if stepped:
        out.append(stepped)
    return "\n".join(out)


def thickness_note(shown, units: str = "si") -> str:
    """A line naming the shown rows whose yield strength is stepped down for thickness ("" if none).

    >>> thickness_note([{"name": "I 1000x300x10x25", "material": "S355", "strength_bending": 345e6,
    ...                  "strength_thickness": 0.025}])
    'Yield stepped down by thickness (the thickest element; EN 10025-2 and the other product standards): S355 345 MPa: I 1000x300x10x25.'
    """
    steps = thickness_steps()
    su, sf = display_factor("pressure", units)
    groups = {}
    for c in shown:
        t = c.get("strength_thickness")
        if t is not None and c["material"] in steps and t > steps[c["material"]][0][0] * (1 + 1e-9):
            groups.setdefault(f"{c['material']} {fmt(c['strength_bending'] / sf, 4)} {su}", []).append(c["name"])
    if not groups:
        return ""
    return ("Yield stepped down by thickness (the thickest element; EN 10025-2 and the other product standards): "
            + "; ".join(f"{k}: {', '.join(v)}" for k, v in groups.items()) + ".")


def _unrestrained(sel, top):
    """Which shown rows lean on full lateral restraint: open metal shapes and timber deeper than
    twice its width (common practice), while the buckling check is off."""
    if any(c.name == "lateral_torsional" for c in sel.result.checks) \
            or sel.job.limits.get("lateral_restraint") == "continuous":  # restrained all along, as the job says
        return [False] * len(sel.shown_positions(top))
    return [c["family"] in ("ibeam", "channel", "tee", "angle")
            or (c["family"] == "rectangle" and c["depth"] > 2 * c["width"]) for c in sel.shown(top)]


def ranked_table_markdown(sel, units: str = "si", top: int = 10) -> str:
    """The ranked table as a Markdown (pipe) table, with the summary above it and the caution below."""
    labels, rows = table_rows(sel, units, top)
    right = numeric_columns(rows)
    out = [f"- {s}" for s in _summary(sel, units)] + [""]
    out.append("| " + " | ".join(labels) + " |")
    out.append("|" + "|".join("---:" if i in right else "---" for i in range(len(labels))) + "|")
    out += ["| " + " | ".join(r) + " |" for r in rows]
    out += ["", f"> {CAUTION}"]
    return "\n".join(out) + "\n"


def ranked_table_csv(sel, units: str = "si", top: int = 10) -> str:
    """The ranked table as CSV (display units in the headers)."""
    labels, rows = table_rows(sel, units, top)
    return csv_text(labels, rows)


def write_table_exports(sel, csv_path=None, markdown_path=None, units: str = "si", top: int = 10) -> None:
    """Write the ranked table to ``csv_path`` and ``markdown_path`` (atomically), where given."""
    if csv_path:
        atomic_write(csv_path, ranked_table_csv(sel, units, top))
    if markdown_path:
        atomic_write(markdown_path, ranked_table_markdown(sel, units, top))
