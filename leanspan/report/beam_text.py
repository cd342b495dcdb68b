"""The beam report for the terminal: model, reactions, extremes with positions, deflection checks."""

from __future__ import annotations

from .. import CAUTION
from ..units import display_factor, fmt

__all__ = ["beam_text"]


def _u(kind, system, scale=0.0):
    """Display label and formatter; values below 1e-10 of ``scale`` (round-off) print as 0."""
    label, factor = display_factor(kind, system)
    return label, (lambda v: fmt((0.0 if abs(v) < 1e-10 * scale else v) / factor))


def beam_text(sol, system: str = "si", title: str = "") -> str:
    """The readable report of a solved beam (:class:`leanspan.beam.BeamSolution`): the model
    line, reactions, extremes, deflection checks and the caution, in the display ``system``."""
    m = sol.model
    res = sol.results.values()
    ext = lambda *keys: max([abs(r.extremes[k].value) for r in res for k in keys] + [0.0])  # noqa: E731
    react = lambda *keys: max([abs(row[k]) for r in res for row in r.reactions for k in keys if k in row]  # noqa: E731
                              + [0.0])
    fscale = max(ext("V_max", "V_min"), react("force", "force_max", "force_min"))
    mscale = max(ext("M_max", "M_min"), react("moment", "moment_max", "moment_min"), fscale * m.length)
    sl, sp = _u("span", system)
    fl, ff = _u("force", system, fscale)
    ml, mf = _u("moment", system, mscale)
    dl, df = _u("length", system, ext("v_max", "v_min"))
    el, ef = _u("flexural stiffness", system)
    lines = [f"Beam {title}".rstrip(), ""]
    sup = ", ".join(f"{s.type} at {sp(s.at)} {sl}" + (f" (k {fmt(s.k / display_factor('spring', system)[1])}"
                    f" {display_factor('spring', system)[0]})" if s.k else "")
                    + (f" (kr {fmt(s.kr / display_factor('rotational spring', system)[1])}"
                       f" {display_factor('rotational spring', system)[0]})" if s.kr else "")
                    for s in m.supports)
    lines.append(f"  length {sp(m.length)} {sl}; supports: {sup}")
    if m.hinges:
        lines.append("  hinges at " + ", ".join(f"{sp(h)} {sl}" for h in m.hinges))
    if m.prismatic:
        lines.append(f"  EI {ef(m.stiffness[0].EI)} {el}")
    else:
        lines.append("  EI " + "; ".join(f"{ef(p.EI)} {el} from {sp(p.start)} to {sp(p.end)} {sl}"
                                         for p in m.stiffness))
    if m.self_weight:
        wl, wf = _u("mass/length", system)
        lines.append(f"  self-weight {wf(m.mass_per_length)} {wl} in case '{m.self_weight}'")
    spans = "; ".join(f"{k} {i + 1}: {sp(a)}-{sp(b)} {sl}" for i, (a, b, k) in enumerate(m.spans))
    lines += [f"  {spans}", ""]

    names = list(sol.results)
    width = max(len(n) for n in names) + 6
    lines.append(f"Reactions (upward force {fl}, counter-clockwise moment {ml})")
    head = "".join(f"{s.type + ' ' + sp(s.at) + ' ' + sl:>22}" for s in m.supports)
    lines.append(f"  {'':<{width}}{head}")
    for n, r in sol.results.items():
        def cell(row, key):
            txt = ff(row[key]) if key == "force" else mf(row[key])
            return txt
        rows = [("", "force", "moment")] if len(r.members) == 1 else [(" max", "force_max", "moment_max"),
                                                                       (" min", "force_min", "moment_min")]
        for tag, fk, mk in rows:
            cells = ""
            for s, row in zip(m.supports, r.reactions):
                txt = ff(row[fk])
                if s.rotational:
                    txt += f" / {mf(row[mk])}"
                cells += f"{txt:>22}"
            lines.append(f"  {n + tag:<{width}}{cells}")
    lines.append("")
    lines.append(f"Extremes (value at x; M {ml}, V {fl}, v {dl}, x {sl})")
    cols = [("M_max", mf), ("M_min", mf), ("V_max", ff), ("V_min", ff), ("v_min", df), ("v_max", df)]
    lines.append(f"  {'':<{width}}" + "".join(f"{c:>20}" for c, _ in cols))
    for n, r in sol.results.items():
        cells = "".join(f"{f(r.extremes[c].value) + ' at ' + sp(r.extremes[c].at):>20}" for c, f in cols)
        lines.append(f"  {n:<{width}}{cells}")
    checks = [(n, r) for n, r in sol.results.items() if r.kind == "combination" and r.deflection_checks]
    limits = {c.name: c.limit.describe(system) for c in m.combinations if c.limit is not None}
    if checks:
        lines += ["", f"Deflection checks (v [{dl}])"]
        for n, r in checks:
            for c in r.deflection_checks:
                verdict = "ok" if c["utilisation"] <= 1.0 else "EXCEEDS"
                lines.append(f"  {n:<{width}}{c['kind']} {c['span']} ({sp(c['from'])}-{sp(c['to'])} {sl}): "
                             f"v {df(c['v_extreme'])} at {sp(c['at'])} {sl}, allowed {df(c['allowed'])} "
                             f"({limits.get(n, c['limit'])}), utilisation {c['utilisation']:.3f} {verdict}")
    patterns = [n for n, r in sol.results.items() if r.kind == "combination" and len(r.members) > 1]
    if patterns:
        lines += ["", "Pattern combinations report the envelope of their on/off patterns "
                      "(1 = case on that span/overhang, in span order); the pattern behind each extreme:"]
        for n in patterns:
            r = sol.results[n]
            picks = [f"{k} {r.extremes[k].member.removeprefix(n).strip()}" for k in
                     ("M_max", "M_min", "V_max", "V_min", "v_min", "v_max") if r.extremes[k].member]
            lines.append(f"  {n} ({len(r.members)} patterns): " + "; ".join(picks))
    lines += ["", CAUTION]
    return "\n".join(lines)
