"""Drawings of a schedule: the penalty of each number of sections, and the Pareto fronts."""

from __future__ import annotations

from pathlib import Path

from ..units import display_factor
from .diagrams import _mpl, _plot_kind, _write_figures

__all__ = ["penalty_figure", "pareto_figure", "plot_schedule"]

_MAX_FRONTS = 12  # member types drawn on the Pareto plot (the heaviest first)


def _axis_label(obj, currency, units):
    if obj in ("mass", "carbon"):
        u = display_factor("mass", units)[0]
        return f"{obj} per piece [{u}{' CO2e' if obj == 'carbon' else ''}]", display_factor("mass", units)[1]
    if obj == "depth":
        u, f = display_factor("length", units)
        return f"depth [{u}]", f
    return f"cost per piece{' [' + currency + ']' if currency else ''}", 1.0


def penalty_figure(result, units: str = "si"):
    """Total objective against the number of distinct sections allowed, with the penalty in %."""
    plt = _mpl()
    rows = [p for p in result.sizes["penalty"] if p["feasible"]]
    fig, ax = plt.subplots(figsize=(6.0, 3.4))
    ks = [p["sizes"] for p in rows]
    pen = [100 * p["penalty"] for p in rows]
    ax.plot(ks, pen, "o-", color="#1f618d", lw=1.2, ms=4)
    for k, v in zip(ks, pen):
        ax.annotate(f"{v:.1f} %", (k, v), textcoords="offset points", xytext=(0, 5), ha="center", fontsize=7)
    if result.sizes["limit"] in ks:
        k = result.sizes["limit"]
        ax.axvline(k, color="#c0392b", lw=0.8, ls="--")
    ax.set_xlabel("distinct sections allowed (K)")
    ax.set_ylabel(f"extra total {result.objective} over unrestricted [%]")
    ax.set_title(f"Penalty of limiting the number of sections (objective: {result.objective})")
    if ks:
        ax.set_xticks(ks if len(ks) <= 20 else ks[::max(1, len(ks) // 20)])
    ax.grid(True, lw=0.3, color="#ccc")
    if pen:
        ax.set_ylim(-0.05 * max(max(pen), 1.0), 1.15 * max(max(pen), 1.0))
    none = [p["sizes"] for p in result.sizes["penalty"] if not p["feasible"]]
    if none:
        ax.text(0.99, 0.97, f"K = {none[0]}{'' if len(none) == 1 else f' to {none[-1]}'}: no set passes "
                "for every member", transform=ax.transAxes, ha="right", va="top", fontsize=7, color="#c0392b")
    return fig


def pareto_figure(result, units: str = "si"):
    """Each member type's non-dominated passing candidates in the two objectives, as a step line
    (up to twelve types, those with the longest members first)."""
    plt = _mpl()
    a, b = result.pareto["objectives"]
    cur = result.run.schedule.options.currency
    la, fa = _axis_label(a, cur, units)
    lb, fb = _axis_label(b, cur, units)
    types = sorted(result.pareto["types"], key=lambda t: -len(t["front"]))[:_MAX_FRONTS]
    fig, ax = plt.subplots(figsize=(6.4, 4.2))
    for i, t in enumerate(types):
        xs = [p[a] / fa for p in t["front"]]
        ys = [p[b] / fb for p in t["front"]]
        name = t["members"][0] + (f" +{len(t['members']) - 1}" if len(t["members"]) > 1 else "")
        ax.plot(xs, ys, "o-", drawstyle="steps-post", lw=0.9, ms=3, label=name)
    ax.set_xlabel(la)
    ax.set_ylabel(lb)
    ax.set_title(f"Non-dominated passing sections per member type ({a} against {b})")
    ax.grid(True, lw=0.3, color="#ccc")
    if types:
        ax.legend(fontsize=6.5, ncol=2, frameon=False)
    return fig


def plot_schedule(result, path, units: str = "si") -> list:
    """Write the penalty plot to ``path`` (when the schedule was rationalised) and the Pareto plot
    to ``NAME-pareto.EXT`` (when Pareto sets were asked for), atomically; returns the paths."""
    path = Path(path)
    kind = _plot_kind(path)
    figs = []
    if result.sizes is not None and result.sizes["penalty"]:
        figs.append((path, penalty_figure(result, units)))
    if result.pareto is not None:
        target = path.with_name(f"{path.stem}-pareto{path.suffix}") if figs else path
        figs.append((target, pareto_figure(result, units)))
    return _write_figures(figs, kind)
