"""Flitch beams (timbers with steel plates between them) as screenable rows, vectorised.

A flitch candidate is ``timbers`` timbers ``timber_width`` x ``timber_depth`` side by side with
one plate ``plate_thickness`` x ``plate_depth`` between each pair, every plate centred on the
timbers' mid-depth, bolted so that all pieces share one curvature. Its transformed properties
follow :meth:`leanspan.sections.section.Section.composite` (the reference the tests compare
with): EIz and EIy about the modulus-weighted axes, EA, mass from each material's density.

The screen's checks read one set of columns per candidate, so the row states them for the
material that governs each check:

- bending: the stress at the extreme fibre of material i is ``M E_i c_i / EIz`` (c_i half its
  depth, the section being symmetric); the row carries the material with the largest
  ``E_i c_i / f_i`` (``f_i`` its bending strength when the limits scale strengths, else 1), as
  ``Sz_top = Sz_bot = EIz / (E_g c_g)`` and ``strength_bending = f_g``, so demand / allowable is
  the largest over both materials;
- shear: pieces side by side each carry the shear flow ``V E_i Q_i(y) / EIz``; at the neutral
  axis of a rectangle ``Q_i / b_i = d_i^2 / 8``, so the peak stress in material i is
  ``V E_i d_i^2 / (8 EIz)``; the row carries the governing one's factor and strength;
- stiffness and buckling: ``E`` (and ``G``) of the bending-governing material with ``Iz``, ``Iy``,
  ``J``, ``Cw`` transformed to it (so ``E Iz`` is the composite EIz), ``kind`` its kind.

>>> import numpy as np
>>> from leanspan.select.job import Limits
>>> dims = {k: np.array([v]) for k, v in dict(timbers=2, timber_width=0.045, timber_depth=0.22,
...         plate_thickness=0.012, plate_depth=0.2).items()}
>>> row = flitch_rows(dims, ["f"], "C24", "S355", None, Limits(stress_factor=0.6)).iloc[0]
>>> round(row.E * row.Iz / 1e3), row.material       # the composite of data/examples/section-flitch.toml
(2558, 'C24 + S355')
"""

from __future__ import annotations

import numpy as np

from ..catalog.materials import OPTIONAL as MATERIAL_OPTIONAL
from ..catalog.materials import get_material, materials_table
from ..catalog.table import BUILT_UP_DIM_KEYS, DIM_KEYS
from ..catalog.thickness import strength_factors
from ..sections.thin_walled import thin_walled_torsion

__all__ = ["FLITCH_KEYS", "flitch_rows", "flitch_spec"]

FLITCH_KEYS = BUILT_UP_DIM_KEYS  # timbers, timber_width, timber_depth, plate_thickness, plate_depth


def _pieces(dims):
    """z centres of timbers and plates: (K, n_max) arrays with a mask of the pieces present."""
    n = np.asarray(dims["timbers"]).astype(int)
    bt, tp = dims["timber_width"], dims["plate_thickness"]
    width = n * bt + (n - 1) * tp
    k = np.arange(int(n.max()))[None, :]
    zt = -width[:, None] / 2 + bt[:, None] / 2 + k * (bt + tp)[:, None]
    zp = -width[:, None] / 2 + bt[:, None] + tp[:, None] / 2 + k * (bt + tp)[:, None]
    return zt, k < n[:, None], zp, k < n[:, None] - 1, width


def flitch_rows(dims, names, timber, plate, material_table, limits):
    """Rows (a DataFrame with every column the checks read) for K flitch candidates."""
    import pandas as pd

    mats = materials_table(material_table)
    T, P = get_material(timber, mats), get_material(plate, mats)
    n = np.asarray(dims["timbers"], float)
    bt, dt, tp, dp = (np.asarray(dims[k], float) for k in FLITCH_KEYS[1:])
    K = n.size
    zt, has_t, zp, has_p, width = _pieces(dims)
    At, Ap = n * bt * dt, (n - 1) * tp * dp
    EIz = T.E * n * bt * dt**3 / 12 + P.E * (n - 1) * tp * dp**3 / 12  # all centred at dt / 2
    EIy = (T.E * (n * dt * bt**3 / 12 + bt * dt * np.where(has_t, zt**2, 0.0).sum(axis=1))
           + P.E * ((n - 1) * dp * tp**3 / 12 + tp * dp * np.where(has_p, zp**2, 0.0).sum(axis=1)))
    tors_t = thin_walled_torsion("rectangle", {"b": bt, "d": dt})
    tors_p = thin_walled_torsion("rectangle", {"b": tp, "d": dp})
    GJ = T.G * n * tors_t["J"] + P.G * (n - 1) * tors_p["J"]
    ECw = T.E * n * tors_t["Cw"] + P.E * (n - 1) * tors_p["Cw"]
    # the material that governs bending, and the one that governs shear (see the module notes)
    scale_b = (1.0, 1.0) if limits is None or limits.bending_stress is not None else \
        (T.strength_bending, P.strength_bending)
    scale_v = (1.0, 1.0) if limits is None or limits.shear_stress is not None else \
        (T.strength_shear, P.strength_shear)
    # the plate's yield stepped by its thickness (EN 10025-2 and the like; a flitch plate is
    # rarely over 16 mm, so it is usually the grade's first step)
    step = strength_factors(np.full(K, P.name), tp)
    P_fb, P_fv = P.strength_bending * step, P.strength_shear * step
    plate_b = P.E * dp / 2 / np.where(scale_b[1] == 1.0, 1.0, P_fb) > T.E * dt / 2 / scale_b[0]
    sf_t, sf_p = T.E * dt**2 / (8 * EIz), P.E * dp**2 / (8 * EIz)
    plate_v = sf_p / np.where(scale_v[1] == 1.0, 1.0, P_fv) > sf_t / scale_v[0]
    Eg = np.where(plate_b, P.E, T.E)
    Gg = np.where(plate_b, P.G, T.G)
    S = EIz / (Eg * np.where(plate_b, dp, dt) / 2)
    Iz, Iy = EIz / Eg, EIy / Eg
    A = At + Ap
    cols = {"name": np.array(names, dtype=str), "family": np.full(K, "flitch"), "series": np.full(K, "built_up"),
            "material": np.full(K, " + ".join(sorted({T.name, P.name})))}
    for k in DIM_KEYS:
        cols[k] = np.full(K, np.nan)
    cols["d"], cols["b"], cols["t"] = dt, width, tp
    cols.update({"A": A, "yc": dt / 2, "zc": np.zeros(K), "Iz": Iz, "Iy": Iy, "Iyz": np.zeros(K), "I1": np.maximum(Iz, Iy),
                 "I2": np.minimum(Iz, Iy), "theta": np.where(Iz >= Iy, 0.0, 90.0), "Sz_top": S, "Sz_bot": S,
                 "Sy_left": Iy / (width / 2), "Sy_right": Iy / (width / 2),
                 # plastic moduli of the gross shape (timber and steel do not share a plastic state)
                 "Zz": (n * bt * dt**2 + (n - 1) * tp * dp**2) / 4, "Zy": np.full(K, np.nan),  # (unused)
                 "rz": np.sqrt(Iz / A), "ry": np.sqrt(Iy / A), "depth": dt, "width": width,
                 "shear_factor": np.where(plate_v, sf_p, sf_t),
                 "J": GJ / Gg, "Cw": ECw / Eg, "ys": dt / 2, "wagner": np.zeros(K),
                 "kind": np.where(plate_b, P.kind, T.kind).astype(object), "E": Eg, "G": Gg,
                 "density": (T.density * At + P.density * Ap) / A,
                 "strength_bending": np.where(plate_b, P_fb, T.strength_bending),
                 "strength_shear": np.where(plate_v, P_fv, T.strength_shear),
                 "strength_thickness": np.where(plate_b | plate_v, tp, np.nan),
                 "mass_per_length": T.density * At + P.density * Ap})
    # the optional material values (E_05, fc_90 ...) belong to one material, not to the pair:
    # not given, so the checks that read them treat a flitch as they treat a material without them
    cols.update({k: np.full(K, np.nan) for k in MATERIAL_OPTIONAL})
    for k in FLITCH_KEYS:
        cols[k] = np.asarray(dims[k], float)
    cols["timber_material"] = np.full(K, T.name)
    cols["plate_material"] = np.full(K, P.name)
    return pd.DataFrame(cols)


def flitch_spec(dims: dict, timber: str, plate: str) -> dict:
    """The section table (section 3 of docs/formats.md, in metres) of one flitch candidate:
    what the chosen member's drawing, sheet and the tests build through the section machinery.

    >>> spec = flitch_spec(dict(timbers=2, timber_width=0.045, timber_depth=0.22,
    ...                         plate_thickness=0.012, plate_depth=0.2), "C24", "S355")
    >>> [p["material"] for p in spec["part"]], spec["part"][1]["d"]
    (['C24', 'S355', 'C24'], '0.2 m')
    """
    n = int(dims["timbers"])
    bt, dt, tp, dp = (float(dims[k]) for k in FLITCH_KEYS[1:])
    width = n * bt + (n - 1) * tp
    parts = []
    for k in range(n):  # a few pieces
        z = -width / 2 + bt / 2 + k * (bt + tp)
        parts.append({"shape": "rectangle", "b": f"{bt!r} m", "d": f"{dt!r} m", "at": [f"{z!r} m", "0 m"],
                      "material": timber})
        if k < n - 1:
            parts.append({"shape": "rectangle", "b": f"{tp!r} m", "d": f"{dp!r} m",
                          "at": [f"{z + bt / 2 + tp / 2!r} m", f"{(dt - dp) / 2!r} m"], "material": plate})
    return {"part": parts}
