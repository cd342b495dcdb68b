"""Drawing of a cross-section: parts by material, centroid, principal axes, overall sizes.

matplotlib is imported inside the functions, so importing this module is cheap.
"""

from __future__ import annotations

import math

from ..units import display_factor, fmt

__all__ = ["draw_section"]

_COLOURS = ["#9bb7d4", "#d9b38c", "#a8c8a0", "#d4a5a5", "#c4b7d9", "#e0d38a"]


def draw_section(ax, section, props, units: str = "si"):
    """Draw ``section`` on matplotlib axes ``ax`` (coordinates shown in display units)."""
    import numpy as np
    from matplotlib.patches import PathPatch
    from matplotlib.path import Path as MplPath

    unit, f = display_factor("length", units)
    colours = {}
    for part in section.parts:
        key = part.material or "(no material)"
        colours.setdefault(key, _COLOURS[len(colours) % len(_COLOURS)])
        verts, codes = [], []
        for ring in part.rings():
            pts = np.vstack([ring, ring[:1]]) / f
            verts.extend(pts.tolist())
            codes.extend([MplPath.MOVETO] + [MplPath.LINETO] * (len(ring) - 1) + [MplPath.CLOSEPOLY])
        ax.add_patch(PathPatch(MplPath(verts, codes), facecolor=colours[key], edgecolor="#222222",
                               linewidth=0.8, label=key))
    zc, yc = props["zc"] / f, props["yc"] / f
    span = max(props["depth"], props["width"]) / f
    ax.plot([zc], [yc], marker="+", markersize=14, color="#c0392b", mew=1.6, zorder=5)
    ax.annotate("centroid", (zc, yc), xytext=(6, 6), textcoords="offset points", color="#c0392b", fontsize=8)
    xmin, ymin, xmax, ymax = (v / f for v in section.outline().bounds)
    pad = 0.12 * span
    label_box = dict(fc="w", ec="none", alpha=0.85, pad=0.6)
    # principal axes, clipped to the section's box plus a small margin so they cross no label
    t = math.radians(props["theta"])
    m = 0.025 * span
    for ang, name, style in ((t, "1", "-."), (t + math.pi / 2, "2", ":")):
        c, s_ = math.cos(ang), math.sin(ang)
        # the same length both ways: the nearer box side in z and in y bounds it
        reach = min((min(xmax - zc, zc - xmin) + m) / max(abs(c), 1e-12),
                    (min(ymax - yc, yc - ymin) + m) / max(abs(s_), 1e-12))
        dz, dy = reach * c, reach * s_
        ax.plot([zc - dz, zc + dz], [yc - dy, yc + dy], style, color="#555555", linewidth=0.9)
        ax.annotate(name, (zc + dz, yc + dy), xytext=(2, 2), textcoords="offset points", fontsize=8,
                    color="#555555", bbox=label_box)
    if "y_neutral" in props:
        yn = props["y_neutral"] / f
        ax.axhline(yn, color="#2e86c1", linewidth=0.8, linestyle="--")
        ax.annotate("neutral axis", (xmin - pad, yn), xytext=(3, 3), textcoords="offset points",
                    fontsize=7.5, color="#2e86c1", bbox=label_box)
    ax.annotate("", (xmin, ymin - pad / 2), (xmax, ymin - pad / 2),
                arrowprops=dict(arrowstyle="<->", color="#333333", linewidth=0.8))
    ax.annotate(f"{fmt(props['width'] / f)} {unit}", ((xmin + xmax) / 2, ymin - pad / 2), xytext=(0, -3),
                textcoords="offset points", ha="center", va="top", fontsize=8, bbox=label_box)
    ax.annotate("", (xmax + pad / 2, ymin), (xmax + pad / 2, ymax),
                arrowprops=dict(arrowstyle="<->", color="#333333", linewidth=0.8))
    ax.annotate(f"{fmt(props['depth'] / f)} {unit}", (xmax + pad / 2, (ymin + ymax) / 2), xytext=(3, 0),
                textcoords="offset points", ha="left", va="center", fontsize=8, rotation=90, bbox=label_box)
    ax.set_xlim(xmin - pad, xmax + 2 * pad)
    ax.set_ylim(ymin - 1.5 * pad, ymax + pad)
    ax.set_aspect("equal")
    ax.set_xlabel(f"z [{unit}]")
    ax.set_ylabel(f"y [{unit}]")
    if len(colours) > 1 or section.has_materials:
        handles = {h.get_label(): h for h in ax.patches}
        # below the axes, where it can hide nothing
        ax.legend(handles.values(), handles.keys(), fontsize=8, loc="upper center", bbox_to_anchor=(0.5, -0.14),
                  ncol=min(3, len(handles)), frameon=False)
    return ax
