"""A schedule's tables: members (section, mass, governing check, utilisation), totals, the
rationalised sections and the penalty of each number of sections; text, CSV and Markdown."""

from __future__ import annotations

from .. import CAUTION
from ..fileio import atomic_write
from ..units import display_factor, fmt, utilisation_text
from .labels import generated_note
from .text import aligned_table, csv_text, numeric_columns

__all__ = ["member_rows", "schedule_text", "schedule_markdown", "schedule_csv", "penalty_rows",
           "write_schedule_exports"]


def _money(v, currency):
    return "-" if v is None else f"{v:.2f}{(' ' + currency) if currency else ''}"


def member_rows(result, units: str = "si"):
    """Header labels and display rows of the member table: the rationalised section when the
    schedule was rationalised (with each member's own best beside it), else the own best."""
    mu, mf = display_factor("mass", units)
    su, sf = display_factor("span", units)
    sized = result.sizes is not None and result.sizes["feasible"]
    labels = ["member", "count", f"length [{su}]", "section", "material", f"mass [{mu}]", "governing",
              "utilisation"]
    if sized:
        labels.append("own best")
    rows = []
    for r in result.members:
        pick = r["rationalised"] if sized else r["own"]
        if pick is None:
            c = r["closest"]
            cells = [r["name"], str(r["count"]), fmt(r["length"] / sf, 4), "NONE PASSES",
                     c["material"] if c else "-", "-", c["governing"] if c else "-",
                     utilisation_text(c["utilisation"][c["governing"]]) if c else "-"]
            if sized:
                cells.append(f"closest: {c['name']}" if c else "-")
        else:
            cells = [r["name"], str(r["count"]), fmt(r["length"] / sf, 4), pick["section"], pick["material"],
                     fmt(pick["mass"] / mf, 4), pick["governing"], utilisation_text(pick["utilisation"])]
            if sized:
                cells.append(r["own"]["section"])
        rows.append(cells)
    return labels, rows


def _total_lines(totals, currency, units, what):
    mu, mf = display_factor("mass", units)

    def mass(v, tag=""):
        return "-" if v is None else f"{fmt(v / mf, 5)} {mu}{tag}"

    return (f"{what}: {totals['pieces']} pieces in {totals['members']} members, "
            f"{totals['distinct_sections']} distinct sections; mass {mass(totals['mass'])}, "
            f"cost {_money(totals['cost'], currency)}, carbon {mass(totals['carbon'], ' CO2e')}")


def penalty_rows(result, units: str = "si"):
    """The penalty-of-K table: K, the total objective and how much more it is than unrestricted."""
    obj = result.objective
    label, factor = _objective_unit(obj, result.run.schedule.options.currency, units)
    rows = []
    for p in result.sizes["penalty"]:
        rows.append([str(p["sizes"]), "-" if p["total"] is None else fmt(p["total"] / factor, 6),
                     "infeasible" if not p["feasible"] else f"{100 * p['penalty']:.2f} %",
                     p["method"] + ("" if p["optimal"] else " (not proven optimal)")])
    return ["sections", f"total {obj}{label}", "penalty", "method"], rows


def _objective_unit(obj, currency, units):
    if obj in ("mass", "carbon"):
        u, f = display_factor("mass", units)
        return f" [{u}{' CO2e' if obj == 'carbon' else ''}]", f
    if obj == "depth":  # the sum of count x depth
        u, f = display_factor("span", units)
        return f" [{u}, sum of count x depth]", f
    return (f" [{currency}]" if currency else ""), 1.0


def _summary(result, units):
    opts = result.run.schedule.options
    n_types = len(result.run.outcomes)
    out = [opts.title] if opts.title else []
    out.append(f"Schedule: {len(result.members)} members selected as {n_types} member types; "
               f"objective: least {opts.objective}")
    if result.members:
        out.append(_total_lines(result.totals, opts.currency, units, "Each member's own best"))
    s = result.sizes
    if s is not None:
        per = "" if s["per"] == "all" else f" per {s['per']}"
        if s["feasible"]:
            how = "exact MILP, optimal" if s["method"] == "milp" and s["optimal"] else (
                "each member's own best already fits" if s["method"] == "each" else
                f"{s['method']}, not proven optimal")
            out.append(f"Rationalised to at most {s['limit']} section{'s' if s['limit'] != 1 else ''}{per} ({how}): "
                       + ", ".join(f"{x['section']} {x['material']} ({x['pieces']} pieces)" for x in s["sections"]))
            out.append(_total_lines(s["totals"], opts.currency, units, "Rationalised"))
        else:
            out.append(f"No set of at most {s['limit']} section{'s' if s['limit'] != 1 else ''}{per} passes for "
                       "every member; allow more sections (see the penalty table)")
    return out


def _tail(result):
    out = []
    if result.no_pass:
        out.append("Nothing passes for: " + ", ".join(result.no_pass))
    if result.bad:
        out.append(f"Bad input ({len(result.bad)} members, not selected): "
                   + ", ".join(f"{b.name} ({b.where})" for b in result.bad))
    return out


def schedule_text(result, units: str = "si") -> str:
    """Summary lines, the member table, the penalty table and what failed."""
    labels, rows = member_rows(result, units)
    out = _summary(result, units) + [""]
    if rows:
        out.append(aligned_table(labels, rows, rule=True))
        out.append("Utilisation = demand / limit of the governing check, rounded up to 3 decimals; mass of "
                   "all pieces of the member.")
    if result.sizes is not None and result.sizes["penalty"]:
        out += ["", "Penalty of limiting the number of distinct sections:",
                aligned_table(*penalty_rows(result, units), rule=True)]
    note = generated_note(r["own"]["series"] for r in result.members if r["own"])
    if note:
        out.append(note)
    if _leans_on_restraint(result):
        out.append("Some sections assume full lateral restraint (open metal shapes, timber deeper than twice "
                   "its width): lateral-torsional buckling is not checked; set lateral_restraint = \"supports\" "
                   "in [limits] to check it.")
    tail = _tail(result)
    if tail:
        out += [""] + tail
    return "\n".join(out)


def _leans_on_restraint(result) -> bool:
    """A member's chosen section is open metal or slender timber while buckling is not checked
    (common practice, as in the ranked table of ``select``)."""
    for r in result.members:
        c = r["chosen"]
        if c and "lateral_torsional" not in c["utilisation"] and (
                c["family"] in ("ibeam", "channel", "tee", "angle")
                or (c["family"] == "rectangle" and c["depth"] > 2 * c["width"])):
            return True
    return False


def _md_table(labels, rows):
    right = numeric_columns(rows)
    out = ["| " + " | ".join(labels) + " |",
           "|" + "|".join("---:" if i in right else "---" for i in range(len(labels))) + "|"]
    return out + ["| " + " | ".join(r) + " |" for r in rows]


def schedule_markdown(result, units: str = "si") -> str:
    """The summary as a list, the member table and the penalty table as pipe tables, the caution."""
    out = [f"- {s}" for s in _summary(result, units)] + [""]
    out += _md_table(*member_rows(result, units))
    if result.sizes is not None and result.sizes["penalty"]:
        out += ["", *_md_table(*penalty_rows(result, units))]
    out += [""] + [f"- {t}" for t in _tail(result)] + ["", f"> {CAUTION}"]
    return "\n".join(out) + "\n"


def schedule_csv(result, units: str = "si") -> str:
    """The member table as CSV (display units in the headers)."""
    return csv_text(*member_rows(result, units))


def write_schedule_exports(result, csv_path=None, markdown_path=None, units: str = "si") -> None:
    """Write the member table as CSV and the whole schedule as Markdown (atomically), where given."""
    if csv_path:
        atomic_write(csv_path, schedule_csv(result, units))
    if markdown_path:
        atomic_write(markdown_path, schedule_markdown(result, units))
