"""Colour a section's mesh by the shear stress |tau| under a unit torque.

Each 6-node triangle is drawn as four straight sub-triangles through its edge
midpoints, shaded smoothly from its own nodal values (no averaging across
elements, so the jumps at interfaces between materials stay visible).

Examples
--------
>>> import tempfile, pathlib
>>> from shapely.geometry import box
>>> from leanspan.sections.torsion import torsion
>>> r = torsion([box(-0.05, 0.0, 0.05, 0.2)])
>>> out = pathlib.Path(tempfile.mkdtemp()) / "tau.png"
>>> ax = plot_shear_stress(r, out)
>>> out.stat().st_size > 1000
True
"""

from __future__ import annotations

from pathlib import Path

import numpy as np

from ..errors import InputError
from ..fileio import atomic_write

__all__ = ["plot_shear_stress"]

# the four sub-triangles of a 6-node triangle (corners 0-2, midpoints 3-5)
_SUB = np.array([[0, 3, 5], [3, 1, 4], [5, 4, 2], [3, 4, 5]])


def plot_shear_stress(result, path_or_ax, *, cmap: str = "viridis", show_mesh: bool = False,
                      title: str | None = None, units: str = ""):
    """Draw |tau| under a unit torque over the section.

    Parameters
    ----------
    result : TorsionResult
        From :func:`leanspan.sections.torsion.torsion`.
    path_or_ax : str, Path or matplotlib Axes
        A file to write (format from the suffix, e.g. ``.svg``, ``.png``; written
        through a temporary file and a rename) or an Axes to draw into.
    cmap : str
        Matplotlib colour map.
    show_mesh : bool
        Draw the element edges too.
    title : str, optional
        Axes title; default names the quantity and its peak.
    units : str
        Unit label of the colour bar (e.g. ``"1/m^3"``: stress per unit torque).

    Returns
    -------
    matplotlib.axes.Axes
    """
    mesh = result.mesh
    tri6 = mesh.triangles
    m = tri6.shape[0]
    # exploded nodes: each element keeps its own 6 nodal values
    xy = mesh.nodes[tri6].reshape(-1, 2)
    val = result.tau_magnitude.reshape(-1)
    sub = (_SUB[None, :, :] + 6 * np.arange(m)[:, None, None]).reshape(-1, 3)

    own_figure = not hasattr(path_or_ax, "tripcolor")
    if own_figure:
        from matplotlib.figure import Figure  # no pyplot: no global state, no GUI backend

        fig = Figure(figsize=(6, 5), layout="constrained")
        ax = fig.add_subplot()
    else:
        ax = path_or_ax
        fig = ax.figure
    import matplotlib.tri as mtri

    tri = mtri.Triangulation(xy[:, 0], xy[:, 1], sub)
    art = ax.tripcolor(tri, val, shading="gouraud", cmap=cmap, vmin=0.0)
    if show_mesh:
        edges = mtri.Triangulation(mesh.nodes[:, 0], mesh.nodes[:, 1], tri6[:, :3])
        ax.triplot(edges, color="k", lw=0.2, alpha=0.5)
    ax.plot([result.zs], [result.ys], marker="+", color="red", ms=10, mew=1.5, ls="none")
    ax.set_aspect("equal")
    ax.set_xlabel("z")
    ax.set_ylabel("y")
    ax.set_title(title if title is not None else f"|tau| per unit torque, max {result.tau_max:.4g}; + shear centre",
                 loc="left", fontsize="medium")
    fig.colorbar(art, ax=ax, label=f"|tau| / T{(' [' + units + ']') if units else ''}")

    if own_figure:
        import io

        path = Path(path_or_ax)
        fmt = path.suffix.lstrip(".").lower() or "png"
        buf = io.BytesIO()
        try:
            fig.savefig(buf, format=fmt, dpi=150)
        except ValueError:
            raise InputError(f"{path}: unknown plot format {fmt!r}; expected .svg, .png or .pdf") from None
        atomic_write(path, buf.getvalue())
    return ax
