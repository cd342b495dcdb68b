"""Draw a solved beam: the loaded beam, then the V, M and v diagrams.

Every combination is drawn (a pattern combination as the band between its envelope
bounds); with no combinations, every load case. matplotlib is imported inside
:func:`plot_beam` only.
"""

from __future__ import annotations

from pathlib import Path

import numpy as np

from ..errors import InputError
from ..units import display_factor

__all__ = ["plot_beam", "dense_fields"]

_FORMATS = {".svg": "svg", ".png": "png", ".pdf": "pdf"}


def dense_fields(solution, Fm, per_element: int = 24):
    """Evaluate V, M, v for factor rows ``Fm`` (C, U) on a dense grid: ``x`` (S,), fields (C, S).

    >>> from leanspan.beam import BeamModel, Support, Stiffness, PointLoad, solve
    >>> m = BeamModel(2.0, (Support(0.0, "fixed"),), (Stiffness(0.0, 2.0, 1.0),),
    ...               loads=(PointLoad("a", 1.0, 2.0),))
    >>> x, f = dense_fields(solve(m), np.array([[1.0]]), per_element=4)
    >>> round(float(f["M"][0, 0]), 12), round(float(f["v"][0, -1]), 12)   # -PL at the wall, -PL^3/3EI at the tip
    (-2.0, -2.666666666667)
    """
    from ..beam import poly

    resp = solution.response
    s = np.linspace(0.0, 1.0, per_element + 1)[None, :] * resp.lengths[:, None]  # (E, m)
    x = (resp.x_nodes[:-1, None] + s).ravel()
    out = {}
    for key in ("V", "M", "v"):
        c = np.einsum("cu,uek->cek", Fm, getattr(resp, key)[0])
        out[key] = poly.evaluate(c[:, :, None, :], s[None]).reshape(Fm.shape[0], -1)
    return x, out


def _groups(solution):
    """(label, factor rows) per drawn curve: combinations, else cases."""
    from ..beam.model import G

    resp, model = solution.response, solution.model
    scale = np.ones(len(resp.unit_cases))
    if resp.self_weight_index is not None:
        scale[resp.self_weight_index] = (model.mass_per_length or 0.0) * G
    groups = []
    for c in model.combinations:
        rows = [k.factors * scale for k in resp.combos if (k.parent or k.name) == c.name]
        groups.append((c.name, np.array(rows)))
    if not groups:
        for c in model.cases:
            f = np.zeros(len(resp.unit_cases))
            f[resp.unit_cases.index(c)] = 1.0
            if c == model.self_weight:
                f[resp.self_weight_index] = model.mass_per_length * G
            groups.append((c, f[None]))
    return groups


def _draw_beam(ax, model, sl, sx):
    L = model.length
    ax.plot([0, L / sx], [0, 0], color="k", lw=3, solid_capstyle="butt")
    h = 0.12
    for s in model.supports:
        x = s.at / sx
        if s.type in ("pin", "roller"):
            ax.plot([x - 0.012 * L / sx, x, x + 0.012 * L / sx, x - 0.012 * L / sx], [-h, 0, -h, -h], color="k")
            if s.type == "roller":
                ax.plot([x - 0.012 * L / sx, x + 0.012 * L / sx], [-1.35 * h, -1.35 * h], color="k")
        elif s.type in ("fixed", "guided"):
            ax.plot([x, x], [-2 * h, 2 * h], color="k", lw=2 if s.type == "fixed" else 1,
                    ls="-" if s.type == "fixed" else "--")
        else:
            zig = np.array([0, -0.3, -0.45, -0.6, -0.75, -0.9, -1.0]) * 2 * h
            ax.plot(x + np.array([0, 0.006, -0.006, 0.006, -0.006, 0.006, 0]) * L / sx, zig, color="k")
        ax.text(x, -2.6 * h, s.type, ha="center", va="top", fontsize=7)
    for hx in model.hinges:
        ax.plot([hx / sx], [0], "o", mfc="w", mec="k", ms=6, zorder=5)
    cases = list(model.cases)
    colours = [f"C{i}" for i in range(10)]
    wmax = max([abs(w) for ld in model.loads if hasattr(ld, "w1") for w in (ld.w1, ld.w2)] + [1e-30])
    for ld in model.loads:
        col = colours[cases.index(ld.case) % 10]
        if hasattr(ld, "w1"):
            xs = np.array([ld.start, ld.end]) / sx
            ys = 0.05 + 0.5 * np.array([ld.w1, ld.w2]) / wmax
            ax.fill_between(xs, 0.05, ys, color=col, alpha=0.25, lw=0)
        elif hasattr(ld, "P"):
            sign = 1 if ld.P >= 0 else -1
            ax.annotate("", xy=(ld.at / sx, 0.05 * sign), xytext=(ld.at / sx, 0.8 * sign),
                        arrowprops=dict(arrowstyle="->", color=col, lw=1.5))
        else:
            ax.text(ld.at / sx, 0.2, "↺" if ld.M >= 0 else "↻", color=col, ha="center", fontsize=14)
    for i, c in enumerate(cases):
        ax.plot([], [], color=colours[i % 10], lw=4, alpha=0.6, label=c)
    if cases:
        ax.legend(loc="upper right", fontsize=7, ncol=min(len(cases), 4), frameon=False)
    ax.set_ylim(-0.6, 1.0)
    ax.set_yticks([])
    ax.set_title(model.name or "Beam", fontsize=10)


def plot_beam(solution, path, units: str = "si", per_element: int = 24) -> None:
    """Write a figure of the loaded beam and its V, M, v diagrams to ``path`` (.svg, .png or .pdf).

    Raises
    ------
    InputError
        Unknown file type, missing folder, or ``path`` is an input file.
    """
    from ..fileio import atomic_write

    path = Path(path)
    fmt_ = _FORMATS.get(path.suffix.lower())
    if fmt_ is None:
        raise InputError(f"--plot {path}: expected a .svg, .png or .pdf file name")
    import io

    import matplotlib

    matplotlib.use("Agg", force=True)
    import matplotlib.pyplot as plt

    model = solution.model
    sl, sx = display_factor("span", units)
    labels = {"V": ("V", "force"), "M": ("M", "moment"), "v": ("v", "length")}
    fig, axes = plt.subplots(4, 1, figsize=(9, 9), sharex=True,
                             gridspec_kw={"height_ratios": [1.0, 1.2, 1.2, 1.2]})
    _draw_beam(axes[0], model, sl, sx)
    for gi, (name, Fm) in enumerate(_groups(solution)):
        x, f = dense_fields(solution, Fm, per_element)
        for ax, key in zip(axes[1:], ("V", "M", "v")):
            ul, uf = display_factor(labels[key][1], units)
            vals = f[key] / uf
            if vals.shape[0] == 1:
                ax.plot(x / sx, vals[0], color=f"C{gi % 10}", lw=1.3, label=name)
            else:
                ax.fill_between(x / sx, vals.min(0), vals.max(0), color=f"C{gi % 10}", alpha=0.3,
                                label=f"{name} (pattern envelope)")
    for ax, key in zip(axes[1:], ("V", "M", "v")):
        ul, _ = display_factor(labels[key][1], units)
        ax.axhline(0, color="k", lw=0.6)
        ax.set_ylabel(f"{key} [{ul}]")
        ax.grid(True, lw=0.3)
        for s in model.supports:
            ax.axvline(s.at / sx, color="0.7", lw=0.5)
    axes[2].invert_yaxis()  # sagging moment drawn below the axis, on the tension side
    axes[1].legend(fontsize=7, frameon=False)
    axes[-1].set_xlabel(f"x [{sl}]")
    fig.tight_layout()
    buf = io.BytesIO()
    fig.savefig(buf, format=fmt_)
    plt.close(fig)
    atomic_write(path, buf.getvalue())
