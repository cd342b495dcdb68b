"""The sheet's drawings as SVG text: the loaded beam, the V, M and v diagrams, the section.

matplotlib is imported inside the functions that draw, so importing this module is
cheap. Every figure is drawn to scale along x in display units; curves come from the
solver's own result stations (the numbers the JSON output carries), so what the
diagram shows is what the tables print.

:func:`plot_job` writes the same drawings to a file (.svg, .png or .pdf).
"""

from __future__ import annotations

import io
from pathlib import Path

import numpy as np

from ..errors import InputError
from ..fileio import is_dir
from ..units import display_factor, fmt

__all__ = ["governing", "loaded_beam_figure", "diagram_figure", "beam_and_diagrams_figure",
           "section_figure", "figure_svg", "plot_job", "plot_section", "CURVE_KEYS"]

# field -> (display kind, axis label)
CURVE_KEYS = {"V": ("force", "shear V"), "M": ("moment", "moment M"), "v": ("length", "deflection v")}
_CASE_COLOURS = ["#1f77b4", "#d62728", "#2ca02c", "#9467bd", "#8c564b", "#e377c2", "#7f7f7f", "#bcbd22"]
_LABEL_BOX = dict(fc="w", ec="none", alpha=0.85, pad=0.3)
_COMBO_COLOURS = ["#c0392b", "#1f618d", "#117a65", "#7d3c98", "#b9770e"]


def _mpl():
    import matplotlib

    matplotlib.use("Agg", force=True)
    import matplotlib.pyplot as plt

    matplotlib.rcParams.update({"svg.fonttype": "none", "svg.hashsalt": "leanspan",
                                "font.family": "DejaVu Sans", "font.size": 8})
    return plt


def governing(solution) -> dict:
    """The combination that governs each field: ``{"V": name, "M": name, "v": name}``.

    V and M come from the strength combinations (largest magnitude), v from the
    deflection check with the highest utilisation (else the largest magnitude over
    all combinations). Without combinations, the load case with the largest value.
    """
    results = solution.results
    combos = solution.model.combinations
    strength = [c.name for c in combos if c.check == "strength"] or [c.name for c in combos]
    pool = strength or [n for n, r in results.items() if r.kind == "case"]

    def biggest(names, key):
        def size(n):
            e = results[n].extremes
            return max(abs(e[f"{key}_max"].value), abs(e[f"{key}_min"].value))
        return max(names, key=size) if names else None

    out = {"V": biggest(pool, "V"), "M": biggest(pool, "M")}
    defl = [(c["utilisation"], n) for n, r in results.items()
            if r.kind == "combination" for c in r.deflection_checks]
    if defl:
        out["v"] = max(defl)[1]
    else:
        out["v"] = biggest([c.name for c in combos] or pool, "v")
    return out


def figure_svg(fig) -> str:
    """The figure as SVG text (fonts left to the browser, so the text stays searchable)."""
    plt = _mpl()
    buf = io.StringIO()
    try:
        fig.savefig(buf, format="svg", bbox_inches="tight", metadata={"Date": None})
    finally:
        plt.close(fig)
    return buf.getvalue()


# -- the loaded beam ----------------------------------------------------------------
# The drawing is laid out in inches: the y-limits are set so that one y unit is about one
# inch of the axes, and x is the span axis in display units with a known number of units
# per inch. Text is measured with the Agg renderer, so the labels can be packed into rows
# where they overlap neither each other nor a load line.
_BLOCK_H = 0.30      # height of the largest load of a lane (inches)
_ROW_H = 0.21        # one row of labels
_LANE_GAP = 0.10     # from one lane's top row to the next lane's baseline
_FIRST_LANE = 0.14   # the lowest lane's baseline above the beam
_SUPPORT_H = 0.17    # support symbol size
_LABEL_GAP = 0.07    # least clear space between two labels in a row
_ARROW_STEP = 0.22   # spacing of the arrows along a distributed load
_SHORTEST_ARROW = 0.05  # shorter arrows are left out (the head alone is about 0.03)
_PAD_W, _PAD_H = 0.12, 0.06  # taken by the layout pads around the axes
_TEXT_SLACK = 1.12   # a browser may set SVG text a little wider than Agg does


class _Measure:
    """Width and height in inches of one line of text, as Agg sets it (no figure needed)."""

    def __init__(self):
        from matplotlib.backends.backend_agg import RendererAgg
        from matplotlib.font_manager import FontProperties

        self._renderer, self._font = RendererAgg(8, 8, 72), FontProperties

    def __call__(self, text, size, weight="normal", style="normal", box=False):
        prop = self._font(family="DejaVu Sans", size=size, weight=weight, style=style)
        w, h, _ = self._renderer.get_text_width_height_descent(text, prop, ismath=False)
        pad = 2 * _LABEL_BOX["pad"] * size if box else 0.0
        return (w * _TEXT_SLACK + pad) / 72, (h + pad) / 72


def _pack(items, lo_lim, hi_lim, gap):
    """Put labels into rows, in the order given (most constrained first).

    Each item is a dict with its width ``w``, preferred centre ``pref`` and allowed
    centre range ``lo``..``hi`` (x data units). Each gets ``row`` (0 = lowest) and ``x``,
    the feasible centre nearest ``pref`` in the lowest row where it fits without coming
    closer than ``gap`` to a label already there, and inside ``lo_lim``..``hi_lim``.
    Returns the number of rows.

    >>> items = [dict(w=2.0, pref=5.0, lo=5.0, hi=5.0), dict(w=2.0, pref=5.0, lo=4.0, hi=8.0),
    ...          dict(w=2.0, pref=5.0, lo=5.0, hi=5.0)]
    >>> _pack(items, 0.0, 10.0, 0.5), [(it["row"], it["x"]) for it in items]
    (2, [(0, 5.0), (0, 7.5), (1, 5.0)])
    """
    rows = []
    eps = 1e-9 * (hi_lim - lo_lim)
    for it in items:
        w, pref = it["w"], it["pref"]
        a, b = max(it["lo"], lo_lim + w / 2), min(it["hi"], hi_lim - w / 2)
        if a > b:  # the allowed range is off the plot, or the label is wider than it
            a = b = min(max(pref, lo_lim + w / 2), max(hi_lim - w / 2, lo_lim + w / 2))
        for r in range(len(rows) + 1):
            if r == len(rows):
                rows.append([])
            taken = rows[r]
            tries = [pref] + [e for left, right in taken for e in (left - gap - w / 2, right + gap + w / 2)]
            fits = [c for c in (min(max(t, a), b) for t in tries)
                    if all(c + w / 2 + gap <= left + eps or c - w / 2 - gap >= right - eps
                           for left, right in taken)]
            if fits:
                x = min(fits, key=lambda c: abs(c - pref))
                taken.append((x - w / 2, x + w / 2))
                it["row"], it["x"] = r, x
                break
    return len(rows)


def _wrap(text, width, measure, size):
    """Break ``text`` at spaces into lines no wider than ``width`` inches (a single word may be)."""
    lines = []
    for para in text.split("\n"):
        line = ""
        for word in para.split(" "):
            trial = f"{line} {word}" if line else word
            if line and measure(trial, size)[0] > width:
                lines.append(line)
                line = word
            else:
                line = trial
        lines.append(line)
    return lines


def _w_text(w1, w2, wf, wl):
    """The label of a distributed load: magnitudes, and the direction unless downward throughout."""
    a, b = w1 / wf, w2 / wf
    if a == b:
        return f"{fmt(abs(a), 3)} {wl}" + (" upward" if a < 0 else "")
    if a >= 0 and b >= 0:
        return f"{fmt(a, 3)} to {fmt(b, 3)} {wl}"
    if a <= 0 and b <= 0:
        return f"{fmt(-a, 3)} to {fmt(-b, 3)} {wl} upward"
    way = {True: "downward", False: "upward"}
    return f"{fmt(abs(a), 3)} {wl} {way[a > 0]} to {fmt(abs(b), 3)} {wl} {way[b > 0]}"


def _pieces(ld, sx):
    """A distributed load split where it changes sign: [(x_a, x_b, w_a, w_b)], x in display units."""
    x1, x2 = ld.start / sx, ld.end / sx
    if ld.w1 * ld.w2 < 0:
        xc = x1 + (x2 - x1) * ld.w1 / (ld.w1 - ld.w2)
        return [(x1, xc, ld.w1, 0.0), (xc, x2, 0.0, ld.w2)]
    return [(x1, x2, ld.w1, ld.w2)]


def _lanes(model):
    loaded = [c for c in model.cases if any(ld.case == c for ld in model.loads)]
    sw = model.self_weight
    return loaded + ([sw] if sw and sw not in loaded else [])


def _beam_plan(model, units, width, measure):
    """Where everything of the loaded-beam drawing goes, for a figure ``width`` inches wide."""
    sl, sx = display_factor("span", units)
    fl, ff = display_factor("force", units)
    wl, wf = display_factor("force/length", units)
    ml, mf = display_factor("moment", units)
    L = model.length / sx
    lanes = _lanes(model)
    usable = width - _PAD_W
    left = max([measure(c, 8, "bold")[0] + 0.12 for c in lanes] + [0.3])
    right = 0.3
    kx = L / max(usable - left - right, 1.0)  # x units per inch
    xlo, xhi = -left * kx, L + right * kx
    gap = _LABEL_GAP * kx

    def label(text, pref, lo, hi, size=7.5, weight="normal", style="normal", box=True):
        w = measure(text, size, weight, style, box)[0] * kx
        return dict(text=text, pref=pref, lo=lo, hi=hi, w=w, size=size, weight=weight,
                    style=style, box=box)

    def over(w, x1, x2):  # centres that keep a label over its load
        return (x1 + w / 2, x2 - w / 2) if x2 - x1 >= w else (x1, x2)

    plan_lanes, y0 = [], _FIRST_LANE
    for case in lanes:
        loads = [ld for ld in model.loads if ld.case == case]
        points = [ld for ld in loads if not hasattr(ld, "w1")]
        dist = [ld for ld in loads if hasattr(ld, "w1")]
        items = []
        for ld in sorted(points, key=lambda p: p.at):
            x = ld.at / sx
            if hasattr(ld, "P"):
                text = f"{fmt(abs(ld.P) / ff, 3)} {fl}" + (" upward" if ld.P < 0 else "")
                it = label(text, x, 0, 0, weight="bold")
            else:
                it = label(f"{fmt(abs(ld.M) / mf, 3)} {ml}", x, 0, 0)
            it["lo"], it["hi"] = x - 0.35 * it["w"], x + 0.35 * it["w"]
            items.append(it)
        for ld in sorted(dist, key=lambda d: d.end - d.start):
            x1, x2 = ld.start / sx, ld.end / sx
            it = label(_w_text(ld.w1, ld.w2, wf, wl), (x1 + x2) / 2, 0, 0)
            it["lo"], it["hi"] = over(it["w"], x1, x2)
            items.append(it)
        if case == model.self_weight:
            text = "+ member self-weight" if model.mass_per_length is None else (
                f"+ self-weight {fmt(model.mass_per_length * 9.80665 / wf, 3)} {wl}")
            it = label(text, 0, 0, L, size=7, style="italic")
            it["lo"], it["hi"] = over(it["w"], 0.0, L)
            it["pref"] = it["hi"]
            items.append(it)
        rows = _pack(items, xlo, xhi, gap)
        plan_lanes.append(dict(case=case, y0=y0, points=points, dist=dist, labels=items))
        y0 += _BLOCK_H + max(rows, 1) * _ROW_H + _LANE_GAP
    top = (y0 - _LANE_GAP if lanes else _FIRST_LANE + _BLOCK_H) + 0.04

    yd = -1.3 * _SUPPORT_H - 0.12
    dims = []
    for a, b, kind in model.spans:
        text = f"{fmt((b - a) / sx, 4)} {sl}" + (" overhang" if kind == "overhang" else "")
        it = label(text, (a + b) / 2 / sx, 0, 0, box=False)
        it["lo"], it["hi"] = over(it["w"], a / sx, b / sx)
        dims.append(it)
    drows = _pack(dims, xlo, xhi, gap)
    bottom = yd - 0.05 - max(drows, 1) * _ROW_H - 0.03

    sup = ", ".join(f"{s.type} at {fmt(s.at / sx, 4)} {sl}" for s in model.supports)
    return dict(L=L, sx=sx, wf=wf, kx=kx, xlo=xlo, xhi=xhi, lanes=plan_lanes, top=top, yd=yd,
                dims=dims, bottom=bottom, sup=sup, usable=usable)


def _title_lines(plan, title, measure):
    return _wrap((title + "\n" if title else "") + f"supports: {plan['sup']}", plan["usable"], measure, 8.5)


def _title_height(n_lines):
    return (n_lines * 8.5 * 1.2 + 6) / 72 + 0.02


def loaded_beam_height(model, units: str = "si", title: str = "") -> float:
    """Height in inches of the loaded-beam drawing, 7.2 inches wide: a lane per loaded case
    (and self-weight), each with as many label rows as its loads need."""
    measure = _Measure()
    plan = _beam_plan(model, units, 7.2, measure)
    n = len(_title_lines(plan, title, measure))
    return _title_height(n) + plan["top"] - plan["bottom"] + _PAD_H


def _draw_support(ax, s, x, h, hx, L):
    """A support symbol at ``x``: ``h`` its size in y units (inches), ``hx`` the same in x units."""
    if s.type in ("pin", "roller"):
        w = 0.75 * hx
        ax.fill([x - w, x, x + w], [-h, 0, -h], facecolor="#dddddd", edgecolor="k", lw=0.9, zorder=3)
        if s.type == "roller":
            for dx in (-0.6 * w, 0.0, 0.6 * w):
                ax.plot([x + dx], [-1.2 * h], "o", mfc="w", mec="k", ms=3.4, mew=0.8, zorder=3)
        else:
            ax.plot([x - 1.3 * w, x + 1.3 * w], [-h, -h], color="k", lw=1.2)
    elif s.type in ("fixed", "guided"):
        ax.plot([x, x], [-1.2 * h, 0.7 * h], color="k", lw=2.2 if s.type == "fixed" else 1.0,
                ls="-" if s.type == "fixed" else "--", zorder=3)
        side = -1 if x <= 0.5 * L else 1
        for yy in np.linspace(-1.1 * h, 0.4 * h, 6):
            ax.plot([x, x + side * 0.35 * hx], [yy, yy + 0.3 * h], color="k", lw=0.6)
    else:  # spring
        zig = np.array([0, -0.2, -0.35, -0.5, -0.65, -0.8, -1.0]) * 1.3 * h
        ax.plot(x + np.array([0, 0.25, -0.25, 0.25, -0.25, 0.25, 0]) * hx, zig, color="k", lw=0.9)
        ax.plot([x - 0.4 * hx, x + 0.4 * hx], [-1.3 * h, -1.3 * h], color="k", lw=1.2)


def _arrow(ax, tail, head, col, gid, lw=0.7, scale=6.0):
    from matplotlib.patches import FancyArrowPatch

    ax.add_patch(FancyArrowPatch(tail, head, arrowstyle="-|>", color=col, lw=lw, mutation_scale=scale,
                                 shrinkA=0, shrinkB=0, zorder=4, gid=gid))


def loaded_beam_figure(model, units: str = "si", title: str = "", fig=None):
    """A matplotlib figure of the beam: supports, hinges, and each load case on its own lane.

    Every load is drawn inside its lane, above the lane's baseline: distributed loads to
    scale along x with a height proportional to the magnitude (one scale per lane) and
    small arrows showing the direction (down for gravity, up for a negative load; a
    linear load that changes sign is two triangles meeting at the zero), point loads as
    arrows, couples as curved arrows. Every load is labelled with its magnitude in display
    units (and "upward" where it acts upward); the labels sit in rows above the loads,
    clear of each other and of the load lines. A dimension chain under the beam gives the
    spans and overhangs. ``fig``: draw into this (sub)figure instead of a new one (a new
    figure is 7.2 inches wide, :func:`loaded_beam_height` tall, constrained layout).
    Artists carry ids: ``baseline:CASE`` for a lane's baseline, ``load:CASE:K:up|down``
    for the block pieces and arrows of load K of the case (in job order).
    """
    from matplotlib.patches import FancyArrowPatch, Polygon
    from matplotlib.path import Path as MplPath

    plt = _mpl()
    measure = _Measure()
    if fig is None:
        fig = plt.figure(figsize=(7.2, loaded_beam_height(model, units, title)), layout="constrained")
    width, height = fig.bbox.width / fig.dpi, fig.bbox.height / fig.dpi
    plan = _beam_plan(model, units, width, measure)
    lines = _title_lines(plan, title, measure)
    L, sx, kx = plan["L"], plan["sx"], plan["kx"]
    ax = fig.subplots()
    ax.set_xlim(plan["xlo"], plan["xhi"])
    room = height - _title_height(len(lines)) - _PAD_H
    ax.set_ylim(plan["bottom"], plan["bottom"] + max(plan["top"] - plan["bottom"], room))
    ax.plot([0, L], [0, 0], color="k", lw=3.2, solid_capstyle="butt", zorder=2)
    for s in model.supports:
        _draw_support(ax, s, s.at / sx, _SUPPORT_H, _SUPPORT_H * kx, L)
    for hx in model.hinges:
        ax.plot([hx / sx], [0], "o", mfc="w", mec="k", ms=6, zorder=5)
    index = {id(ld): k for k, ld in enumerate(model.loads)}
    for i, lane in enumerate(plan["lanes"]):
        case, y0 = lane["case"], lane["y0"]
        col = _CASE_COLOURS[i % len(_CASE_COLOURS)]
        ax.plot([0, L], [y0, y0], color=col, lw=0.6, alpha=0.6, gid=f"baseline:{case}")
        ax.text(plan["xlo"] + 0.04 * kx, y0 + 0.5 * _BLOCK_H, case, ha="left", va="center", color=col,
                fontsize=8, fontweight="bold")
        wmax = max([abs(w) for ld in lane["dist"] for w in (ld.w1, ld.w2)] + [1e-30])
        # arrows on one grid per lane, so that loads that overlap share their arrows' lines
        step = _ARROW_STEP * kx
        grid = np.linspace(0.0, L, max(2, int(round(L / step))) + 1)
        marks = [ld.at / sx for ld in lane["points"]]
        ends = [x / sx for ld in lane["dist"] for x in (ld.start, ld.end)]
        for ld in lane["dist"]:
            k = index[id(ld)]
            for xa, xb, wa, wb in _pieces(ld, sx):
                way = "up" if wa + wb < 0 else "down"
                ya, yb = y0 + _BLOCK_H * abs(wa) / wmax, y0 + _BLOCK_H * abs(wb) / wmax
                ax.add_patch(Polygon([(xa, y0), (xb, y0), (xb, yb), (xa, ya)], closed=True, fc=col,
                                     alpha=0.22 if way == "down" else 0.15, lw=0, gid=f"load:{case}:{k}:{way}"))
                ax.plot([xa, xb], [ya, yb], color=col, lw=1.0)
            x1, x2 = ld.start / sx, ld.end / sx
            inner = [g for g in grid[(grid > x1 + 0.4 * step) & (grid < x2 - 0.4 * step)]
                     if all(abs(g - e) >= 0.4 * step for e in ends)]  # not beside another end
            for x in (x1, *inner, x2):
                if any(abs(x - p) < 0.1 * kx for p in marks):
                    continue  # the point load's arrow or the couple's circle is drawn there
                w = ld.w1 + (ld.w2 - ld.w1) * (x - x1) / (x2 - x1)
                tip = _BLOCK_H * abs(w) / wmax
                if tip < _SHORTEST_ARROW:
                    continue
                if w > 0:
                    _arrow(ax, (x, y0 + tip), (x, y0), col, f"load:{case}:{k}:down")
                else:
                    _arrow(ax, (x, y0), (x, y0 + tip), col, f"load:{case}:{k}:up")
        for ld in lane["points"]:
            k, x = index[id(ld)], ld.at / sx
            if hasattr(ld, "P"):
                ends = [(x, y0 + _BLOCK_H), (x, y0)]
                if ld.P < 0:
                    ends.reverse()
                _arrow(ax, *ends, col, f"load:{case}:{k}:{'up' if ld.P < 0 else 'down'}", lw=1.4, scale=9)
            else:  # a couple: three quarters of a circle, counter-clockwise for M > 0
                r, yc = 0.085, y0 + 0.5 * _BLOCK_H
                t = np.radians(np.linspace(-45, 225, 40))
                if ld.M < 0:
                    t = t[::-1]
                arc = MplPath(np.column_stack([x + r * kx * np.cos(t), yc + r * np.sin(t)]))
                ax.add_patch(FancyArrowPatch(path=arc, arrowstyle="-|>", color=col, lw=1.1,
                                             mutation_scale=7, zorder=4,
                                             gid=f"load:{case}:{k}:{'ccw' if ld.M >= 0 else 'cw'}"))
                ax.plot([x], [yc], "o", color=col, ms=2.2, zorder=4)
        for it in lane["labels"]:
            ax.text(it["x"], y0 + _BLOCK_H + (it["row"] + 0.5) * _ROW_H, it["text"], ha="center",
                    va="center", fontsize=it["size"], color=col, fontweight=it["weight"],
                    style=it["style"], bbox=_LABEL_BOX if it["box"] else None, zorder=6)
    # dimension chain
    yd = plan["yd"]
    ticks = sorted({0.0, L, *(a / sx for a, b, k in model.spans), *(b / sx for a, b, k in model.spans)})
    ax.plot([0, L], [yd, yd], color="#333", lw=0.7)
    for t in ticks:
        ax.plot([t, t], [yd - 0.04, yd + 0.04], color="#333", lw=0.7)
    for it in plan["dims"]:
        ax.text(it["x"], yd - 0.05 - (it["row"] + 0.5) * _ROW_H, it["text"], ha="center", va="center",
                fontsize=7.5)
    ax.set_yticks([])
    ax.set_xticks([])
    for side in ("left", "right", "top", "bottom"):
        ax.spines[side].set_visible(False)
    ax.set_title("\n".join(lines), fontsize=8.5, loc="left")
    return fig


# -- V, M, v diagrams ------------------------------------------------------------------
def _annotate(ax, x, y, text, colour, below=False, left=False):
    ax.plot([x], [y], "o", color=colour, ms=3.5, zorder=6)
    ax.annotate(text, (x, y), xytext=(-5 if left else 5, -11 if below else 5), textcoords="offset points",
                ha="right" if left else "left", fontsize=7.5, color=colour, fontweight="bold",
                bbox=dict(fc="w", ec="none", alpha=0.8, pad=0.4), zorder=7)


DIAGRAM_HEIGHT = 5.6  # inches, the three V, M, v panels


def diagram_figure(solution, units: str = "si", picks: dict | None = None, fig=None):
    """V, M and v along the beam: the envelope as a grey band (V and M of the strength
    combinations, v of the deflection combinations, where the job has both kinds; else of
    all) and the governing combination (see :func:`governing`) as a line, extremes annotated.

    Sagging moment is drawn below the axis (on the tension side); deflection upward-positive.
    ``fig``: draw into this (sub)figure of a constrained-layout figure instead of a new one.
    """
    plt = _mpl()
    picks = picks or governing(solution)
    sl, sx = display_factor("span", units)
    model = solution.model
    # strength and serviceability apart: V and M bands from the strength combinations, v from
    # the deflection combinations, where the job has both kinds
    results = solution.results
    envelopes = {"V": results.get("envelope_strength"), "M": results.get("envelope_strength"),
                 "v": results.get("envelope_deflection")}
    band = {"envelope_strength": "envelope (strength combinations)",
            "envelope_deflection": "envelope (deflection combinations)"}
    if fig is None:
        fig = plt.figure(figsize=(7.2, DIAGRAM_HEIGHT), layout="constrained")
    axes = fig.subplots(3, 1, sharex=True)
    names = []
    for key in ("V", "M", "v"):
        if picks.get(key) not in names:
            names.append(picks.get(key))
    colours = {n: _COMBO_COLOURS[i % len(_COMBO_COLOURS)] for i, n in enumerate(names)}
    for ax, key in zip(axes, ("V", "M", "v")):
        kind, label = CURVE_KEYS[key]
        ul, uf = display_factor(kind, units)
        env = envelopes[key] or results["envelope"]
        ex = np.asarray(env.stations["x"], float) / sx
        lo = np.asarray(env.stations.get(f"{key}_min", env.stations[key]), float) / uf
        hi = np.asarray(env.stations.get(f"{key}_max", env.stations[key]), float) / uf
        ax.fill_between(ex, lo, hi, color="#bbbbbb", alpha=0.45, lw=0,
                        label=band.get(env.name, "envelope (all combinations)"))
        ax.plot(ex, lo, color="#888888", lw=0.5)
        ax.plot(ex, hi, color="#888888", lw=0.5)
        name = picks.get(key)
        r = solution.results[name]
        col = colours[name]
        st = r.stations
        xs = np.asarray(st["x"], float) / sx
        if f"{key}_max" in st:  # a pattern combination: draw both bounds
            ax.plot(xs, np.asarray(st[f"{key}_max"], float) / uf, color=col, lw=1.4, label=f"{name} (governing, max)")
            ax.plot(xs, np.asarray(st[f"{key}_min"], float) / uf, color=col, lw=1.0, ls="--",
                    label=f"{name} (governing, min)")
        else:
            ax.plot(xs, np.asarray(st[key], float) / uf, color=col, lw=1.4, label=f"{name} (governing)")
        ax.axhline(0, color="k", lw=0.7)
        for s in model.supports:
            ax.axvline(s.at / sx, color="#999999", lw=0.5, ls=":")
        emax, emin = r.extremes[f"{key}_max"], r.extremes[f"{key}_min"]
        span = max(abs(emax.value), abs(emin.value)) or 1.0
        shown = 0
        for tag, e in (("max", emax), ("min", emin)):
            if abs(e.value) < 1e-6 * span:
                continue
            below = (e.value < 0) != (key == "M")
            _annotate(ax, e.at / sx, e.value / uf,
                      f"{tag} {fmt(e.value / uf, 4)} {ul} at x = {fmt(e.at / sx, 4)} {sl}", col,
                      below=below, left=e.at > 0.55 * model.length)
            shown += 1
        ax.set_ylabel(f"{label} [{ul}]")
        ax.grid(True, lw=0.3, color="#dddddd")
        ax.margins(y=0.28)
        note = {"V": " (V = -dM/dx)", "M": " (sagging +, drawn downward)", "v": " (upward +)"}[key]
        ax.set_title(f"{label}{note}", fontsize=8.5, loc="left")
    axes[1].invert_yaxis()
    axes[-1].set_xlabel(f"x [{sl}]")
    axes[-1].set_xlim(-0.02 * model.length / sx, 1.02 * model.length / sx)
    # one legend for the three panels, above them, where it hides no curve or label
    legend = {}
    for ax in axes:
        for handle, text in zip(*ax.get_legend_handles_labels()):
            legend.setdefault(text, handle)
    fig.legend(legend.values(), legend.keys(), loc="outside upper center", ncol=min(3, len(legend)),
               fontsize=7, frameon=False)
    return fig


# -- the section ------------------------------------------------------------------------
def section_figure(section, props, units: str = "si", title: str = "", size: float = 4.2):
    """The section to scale (equal axes) with its sizes, centroid and neutral axis;
    ``size``: the figure's width and height in inches."""
    from .section_plot import draw_section

    plt = _mpl()
    fig, ax = plt.subplots(figsize=(size, size))
    draw_section(ax, section, props, units)
    if title:
        ax.set_title(title, fontsize=9, loc="left")
    return fig


# -- drawing files ------------------------------------------------------------------------
_FORMATS = {".svg": "svg", ".png": "png", ".pdf": "pdf"}


def beam_and_diagrams_figure(solution, units: str = "si", title: str = ""):
    """The loaded beam above its V, M and v diagrams, in one figure."""
    plt = _mpl()
    top = loaded_beam_height(solution.model, units, title)
    fig = plt.figure(figsize=(7.2, top + DIAGRAM_HEIGHT), layout="constrained")
    beam_part, diagram_part = fig.subfigures(2, 1, height_ratios=[top, DIAGRAM_HEIGHT])
    loaded_beam_figure(solution.model, units, title, fig=beam_part)
    diagram_figure(solution, units, fig=diagram_part)
    return fig


def _plot_kind(path: Path) -> str:
    """The file type of a drawing file; raises InputError for an unknown one or a missing folder."""
    kind = _FORMATS.get(path.suffix.lower())
    if kind is None:
        raise InputError(f"{path}: expected a file name ending in .svg, .png or .pdf")
    if not is_dir(path.parent if str(path.parent) else Path(".")):
        raise InputError(f"{path}: folder {path.parent} does not exist")
    return kind


def _write_figures(figs, kind: str) -> list:
    """Render ``(path, figure)`` pairs as ``kind`` and write them atomically; returns the paths.
    Every figure is rendered (and closed) before any file is written."""
    from ..fileio import atomic_write

    plt = _mpl()
    blobs = []
    try:
        for target, fig in figs:
            buf = io.BytesIO()
            fig.savefig(buf, format=kind, bbox_inches="tight", dpi=150,
                        metadata={"Date": None} if kind == "svg" else None)
            blobs.append((target, buf.getvalue()))
    finally:
        for _, fig in figs:
            plt.close(fig)
    for target, data in blobs:
        atomic_write(target, data)
    return [target for target, _ in blobs]


def plot_job(solution, path, units: str = "si", section=None, props=None, title: str = "") -> list:
    """Write the sheet's drawings to ``path`` (atomically): the loaded beam above its V, M
    and v diagrams at ``path`` itself, and the section, when given, at ``NAME-section.EXT``
    beside it. Returns the paths written.

    Raises
    ------
    InputError
        Unknown file type, a missing folder, or a target that is an input file.
    """
    path = Path(path)
    kind = _plot_kind(path)
    figs = [(path, beam_and_diagrams_figure(solution, units, title))]
    if section is not None:
        figs.append((path.with_name(f"{path.stem}-section{path.suffix}"),
                     section_figure(section, props, units, title)))
    return _write_figures(figs, kind)


def plot_section(section, props, path, title: str = "", units: str = "si") -> list:
    """Write the section drawing alone to ``path`` (.svg, .png or .pdf, atomically)."""
    path = Path(path)
    kind = _plot_kind(path)
    return _write_figures([(path, section_figure(section, props, units, title, size=5.5))], kind)
