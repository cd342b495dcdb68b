"""The sheet's drawings as SVG text: the loaded beam, the V, M and v diagrams, the section.

matplotlib is imported inside the functions that draw, so importing this module is
cheap. Every figure is drawn to scale along x in display units; curves come from the
solver's own result stations (the numbers the JSON output carries), so what the
diagram shows is what the tables print.

:func:`plot_job` writes the same drawings to a ``--plot`` file (.svg, .png or .pdf).
"""

from __future__ import annotations

import io
from pathlib import Path

import numpy as np

from ..errors import InputError
from ..units import display_factor, fmt

__all__ = ["governing", "loaded_beam_figure", "diagram_figure", "beam_and_diagrams_figure",
           "section_figure", "figure_svg", "plot_job", "CURVE_KEYS"]

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
def _draw_support(ax, s, x, h, sx):
    if s.type in ("pin", "roller"):
        w = 0.5 * h
        ax.fill([x - w, x, x + w], [-h, 0, -h], facecolor="#dddddd", edgecolor="k", lw=0.9, zorder=3)
        if s.type == "roller":
            for dx in (-0.55 * w, 0.0, 0.55 * w):
                ax.plot([x + dx], [-1.2 * h], "o", mfc="w", mec="k", ms=3.6, mew=0.8, zorder=3)
        else:
            ax.plot([x - 1.3 * w, x + 1.3 * w], [-h, -h], color="k", lw=1.2)
    elif s.type in ("fixed", "guided"):
        ax.plot([x, x], [-1.2 * h, 1.2 * h], color="k", lw=2.2 if s.type == "fixed" else 1.0,
                ls="-" if s.type == "fixed" else "--", zorder=3)
        side = -1 if x <= 0.5 * ax.get_xlim()[1] else 1
        for yy in np.linspace(-1.1 * h, 1.0 * h, 7):
            ax.plot([x, x + side * 0.35 * h], [yy, yy + 0.3 * h], color="k", lw=0.6)
    else:  # spring
        zig = np.array([0, -0.2, -0.35, -0.5, -0.65, -0.8, -1.0]) * 1.3 * h
        ax.plot(x + np.array([0, 0.25, -0.25, 0.25, -0.25, 0.25, 0]) * h, zig, color="k", lw=0.9)
        ax.plot([x - 0.4 * h, x + 0.4 * h], [-1.3 * h, -1.3 * h], color="k", lw=1.2)


def loaded_beam_height(model) -> float:
    """Height in inches of the loaded-beam drawing: a lane per loaded case (and self-weight)."""
    lanes = {ld.case for ld in model.loads} | ({model.self_weight} if model.self_weight else set())
    return 1.3 + 0.62 * max(1, len(lanes))


def loaded_beam_figure(model, units: str = "si", title: str = "", fig=None):
    """A matplotlib figure of the beam: supports, hinges, and each load case on its own lane.

    Distributed loads are drawn to scale along x with a height proportional to the
    intensity (one scale per lane); point loads are arrows; every load is labelled
    with its magnitude in display units. A dimension chain under the beam gives the
    spans and overhangs. ``fig``: draw into this (sub)figure instead of a new one.
    """
    plt = _mpl()
    sl, sx = display_factor("span", units)
    fl, ff = display_factor("force", units)
    wl, wf = display_factor("force/length", units)
    ml, mf = display_factor("moment", units)
    L = model.length / sx
    cases = list(model.cases)
    loaded = [c for c in cases if any(ld.case == c for ld in model.loads)]
    sw = model.self_weight
    lanes = loaded + ([sw] if sw and sw not in loaded else [])
    lane_h, gap = 1.0, 0.55
    if fig is None:
        fig = plt.figure(figsize=(7.2, loaded_beam_height(model)))
    ax = fig.subplots()
    h = 0.42  # support symbol size in y units
    ax.set_xlim(-0.06 * L, 1.06 * L)
    ax.plot([0, L], [0, 0], color="k", lw=3.2, solid_capstyle="butt", zorder=2)
    for s in model.supports:
        _draw_support(ax, s, s.at / sx, h, sx)
    for hx in model.hinges:
        ax.plot([hx / sx], [0], "o", mfc="w", mec="k", ms=6, zorder=5)
    for i, case in enumerate(lanes):
        col = _CASE_COLOURS[i % len(_CASE_COLOURS)]
        y0 = 0.35 + i * (lane_h + gap)
        ax.text(-0.05 * L, y0 + 0.45 * lane_h, case, ha="right", va="center", color=col,
                fontsize=8, fontweight="bold")
        dist = [ld for ld in model.loads if ld.case == case and hasattr(ld, "w1")]
        wmax = max([abs(w) for ld in dist for w in (ld.w1, ld.w2)] + [1e-30])
        for ld in dist:
            xs = np.array([ld.start, ld.end]) / sx
            ys = y0 + 0.75 * lane_h * np.array([ld.w1, ld.w2]) / wmax
            ax.fill([xs[0], xs[1], xs[1], xs[0]], [y0, y0, ys[1], ys[0]], color=col, alpha=0.22, lw=0)
            ax.plot(xs, ys, color=col, lw=1.0)
            txt = (f"{fmt(ld.w1 / wf, 3)} {wl}" if ld.w1 == ld.w2 else
                   f"{fmt(ld.w1 / wf, 3)} to {fmt(ld.w2 / wf, 3)} {wl}")
            ax.text(xs.mean(), max(ys) + 0.04, txt, ha="center", va="bottom", fontsize=7.5, color=col,
                    bbox=_LABEL_BOX)
        if case == sw:
            txt = "+ member self-weight" if model.mass_per_length is None else (
                f"+ self-weight {fmt(model.mass_per_length * 9.80665 / wf, 3)} {wl}")
            ax.text(L, y0 + 0.95 * lane_h, txt, ha="right", va="bottom", fontsize=7, color=col,
                    style="italic")
        for ld in model.loads:
            if ld.case != case or hasattr(ld, "w1"):
                continue
            x = ld.at / sx
            if hasattr(ld, "P"):
                top, bot = (y0 + lane_h, y0) if ld.P >= 0 else (y0, y0 + lane_h)
                ax.annotate("", xy=(x, bot - 0.3 if ld.P >= 0 else bot), xytext=(x, top),
                            arrowprops=dict(arrowstyle="-|>", color=col, lw=1.4, mutation_scale=9))
                # above the arrow's tail, clear of the distributed-load line
                ax.text(x, y0 + lane_h + 0.04, f"{fmt(abs(ld.P) / ff, 3)} {fl}", ha="center",
                        va="bottom", fontsize=7.5, color=col, fontweight="bold", bbox=_LABEL_BOX)
            else:
                ax.text(x, y0 + 0.3, "↺" if ld.M >= 0 else "↻", color=col, ha="center", fontsize=13)
                ax.text(x + 0.012 * L, y0 + 0.75 * lane_h, f"{fmt(abs(ld.M) / mf, 3)} {ml}",
                        fontsize=7.5, color=col)
    # dimension chain
    yd = -1.75 * h - 0.25
    ticks = sorted({0.0, L, *(a / sx for a, b, k in model.spans), *(b / sx for a, b, k in model.spans)})
    ax.plot([0, L], [yd, yd], color="#333", lw=0.7)
    for t in ticks:
        ax.plot([t, t], [yd - 0.12, yd + 0.12], color="#333", lw=0.7)
    for a, b, kind in model.spans:
        label = f"{fmt((b - a) / sx, 4)} {sl}" + (" overhang" if kind == "overhang" else "")
        ax.text((a + b) / 2 / sx, yd - 0.12, label, ha="center", va="top", fontsize=7.5)
    top = 0.35 + len(lanes) * (lane_h + gap)
    ax.set_ylim(yd - 0.55, max(top, 1.2))
    ax.set_yticks([])
    for side in ("left", "right", "top"):
        ax.spines[side].set_visible(False)
    ax.spines["bottom"].set_visible(False)
    ax.set_xticks([])
    sup = ", ".join(f"{s.type} at {fmt(s.at / sx, 4)} {sl}" for s in model.supports)
    ax.set_title((title + "\n" if title else "") + f"supports: {sup}", fontsize=8.5, loc="left")
    return fig


# -- V, M, v diagrams ------------------------------------------------------------------
def _annotate(ax, x, y, text, colour, below=False, left=False):
    ax.plot([x], [y], "o", color=colour, ms=3.5, zorder=6)
    ax.annotate(text, (x, y), xytext=(-5 if left else 5, -11 if below else 5), textcoords="offset points",
                ha="right" if left else "left", fontsize=7.5, color=colour, fontweight="bold",
                bbox=dict(fc="w", ec="none", alpha=0.8, pad=0.4), zorder=7)


DIAGRAM_HEIGHT = 5.6  # inches, the three V, M, v panels


def diagram_figure(solution, units: str = "si", picks: dict | None = None, fig=None):
    """V, M and v along the beam: the envelope of every combination as a grey band and the
    governing combination (see :func:`governing`) as a line, with its extremes annotated.

    Sagging moment is drawn below the axis (on the tension side); deflection upward-positive.
    ``fig``: draw into this (sub)figure of a constrained-layout figure instead of a new one.
    """
    plt = _mpl()
    picks = picks or governing(solution)
    sl, sx = display_factor("span", units)
    model = solution.model
    env = solution.results["envelope"]
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
        ex = np.asarray(env.stations["x"], float) / sx
        lo = np.asarray(env.stations.get(f"{key}_min", env.stations[key]), float) / uf
        hi = np.asarray(env.stations.get(f"{key}_max", env.stations[key]), float) / uf
        ax.fill_between(ex, lo, hi, color="#bbbbbb", alpha=0.45, lw=0, label="envelope (all combinations)")
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
def section_figure(section, props, units: str = "si", title: str = ""):
    """The section to scale (equal axes) with its sizes, centroid and neutral axis."""
    from .section_plot import draw_section

    plt = _mpl()
    fig, ax = plt.subplots(figsize=(4.2, 4.2))
    draw_section(ax, section, props, units)
    if title:
        ax.set_title(title, fontsize=9, loc="left")
    return fig


# -- --plot files -------------------------------------------------------------------------
_FORMATS = {".svg": "svg", ".png": "png", ".pdf": "pdf"}


def beam_and_diagrams_figure(solution, units: str = "si", title: str = ""):
    """The loaded beam above its V, M and v diagrams, in one figure."""
    plt = _mpl()
    top = loaded_beam_height(solution.model)
    fig = plt.figure(figsize=(7.2, top + DIAGRAM_HEIGHT), layout="constrained")
    beam_part, diagram_part = fig.subfigures(2, 1, height_ratios=[top, DIAGRAM_HEIGHT])
    loaded_beam_figure(solution.model, units, title, fig=beam_part)
    diagram_figure(solution, units, fig=diagram_part)
    return fig


def plot_job(solution, path, units: str = "si", section=None, props=None, title: str = "") -> list:
    """Write the sheet's drawings to ``path`` (atomically): the loaded beam above its V, M
    and v diagrams at ``path`` itself, and the section, when given, at ``NAME-section.EXT``
    beside it. Returns the paths written.

    Raises
    ------
    InputError
        Unknown file type, a missing folder, or a target that is an input file.
    """
    from ..fileio import atomic_write

    path = Path(path)
    kind = _FORMATS.get(path.suffix.lower())
    if kind is None:
        raise InputError(f"--plot {path}: expected a file name ending in .svg, .png or .pdf")
    if not (path.parent if str(path.parent) else Path(".")).is_dir():
        raise InputError(f"--plot {path}: folder {path.parent} does not exist")
    plt = _mpl()
    figs = [(path, beam_and_diagrams_figure(solution, units, title))]
    if section is not None:
        figs.append((path.with_name(f"{path.stem}-section{path.suffix}"),
                     section_figure(section, props, units, title)))
    blobs = []
    try:
        for tag, fig in figs:
            buf = io.BytesIO()
            fig.savefig(buf, format=kind, bbox_inches="tight", dpi=150,
                        metadata={"Date": None} if kind == "svg" else None)
            blobs.append((tag, buf.getvalue()))
    finally:
        for _, fig in figs:
            plt.close(fig)
    for target, data in blobs:
        atomic_write(target, data)
    return [target for target, _ in blobs]
