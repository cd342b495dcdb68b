"""The one table of property labels and display kinds, shared by every readable output.

``PROPERTIES`` maps a JSON key to ``(label, display kind)``; the kind is a key of
:data:`leanspan.units.DISPLAY` (``None``: an angle in degrees). The key lists say which
properties each listing shows, in order.

Examples
--------
>>> label("shear_factor")
'Shear factor (τ max = V × factor)'
>>> unit("Iz", "us"), unit("theta")
(('in⁴', 4.162314255999999e-07), ('deg', 1.0))
>>> short("strength_bending"), short("Iz")
('f_bending', 'Iz')
"""

from __future__ import annotations

from ..units import display_factor

__all__ = ["PROPERTIES", "SECTION_KEYS", "MEMBER_KEYS", "CATALOG_CSV_KEYS", "CATALOG_TABLE_KEYS",
           "MATERIAL_KEYS", "label", "kind", "unit", "short"]

PROPERTIES: dict[str, tuple[str, str | None]] = {
    # dimensions of the shape families
    "d": ("Overall depth d", "length"),
    "b": ("Overall width b", "length"),
    "tw": ("Web thickness tw", "length"),
    "tf": ("Flange thickness tf", "length"),
    "t": ("Wall thickness t", "length"),
    "r": ("Corner radius r", "length"),
    "b_top": ("Top flange width b_top", "length"),
    "tf_top": ("Top flange thickness tf_top", "length"),
    "b_bot": ("Bottom flange width b_bot", "length"),
    "tf_bot": ("Bottom flange thickness tf_bot", "length"),
    # section properties
    "A": ("Area A", "area"),
    "yc": ("Centroid y from base yc", "length"),
    "zc": ("Centroid z zc", "length"),
    "depth": ("Depth", "length"),
    "width": ("Width", "length"),
    "Iz": ("Iz (about the horizontal axis)", "second moment"),
    "Iy": ("Iy (about the vertical axis)", "second moment"),
    "Iyz": ("Iyz", "second moment"),
    "I1": ("I1 (major principal)", "second moment"),
    "I2": ("I2 (minor principal)", "second moment"),
    "theta": ("theta (z-axis to I1, counter-clockwise)", None),
    "Sz_top": ("Sz top fibre", "section modulus"),
    "Sz_bot": ("Sz bottom fibre", "section modulus"),
    "Sy_left": ("Sy left fibre", "section modulus"),
    "Sy_right": ("Sy right fibre", "section modulus"),
    "Zz": ("Plastic modulus Zz", "section modulus"),
    "Zy": ("Plastic modulus Zy", "section modulus"),
    "rz": ("Radius of gyration rz", "length"),
    "ry": ("Radius of gyration ry", "length"),
    "shear_factor": ("Shear factor (τ max = V × factor)", "shear factor"),
    # composite (E-weighted) properties
    "EIz": ("Flexural stiffness EIz", "flexural stiffness"),
    "EA": ("Axial stiffness EA", "axial stiffness"),
    "mass_per_length": ("Mass per length", "mass/length"),
    "y_neutral": ("Neutral axis y (E-weighted)", "length"),
    # torsion
    "J": ("Torsion constant J", "second moment"),
    "GJ": ("Torsional stiffness GJ", "flexural stiffness"),
    "Cw": ("Warping constant Cw", "warping"),
    "zs": ("Shear centre z", "length"),
    "ys": ("Shear centre y", "length"),
    # materials
    "E": ("Elastic modulus E", "modulus"),
    "G": ("Shear modulus G", "modulus"),
    "density": ("Density", "density"),
    "strength_bending": ("Bending strength (material)", "pressure"),
    "strength_shear": ("Shear strength (material)", "pressure"),
    "strength_thickness": ("Thickness the strengths are stepped for (thickest element)", "length"),
    "E_05": ("Elastic modulus, 5 % fractile E_05", "modulus"),
    "rho_k": ("Characteristic density rho_k", "density"),
    "fc_90": ("Compression strength across the grain fc_90", "pressure"),
    "ft_0": ("Tension strength parallel ft_0", "pressure"),
    "fc_0": ("Compression strength parallel fc_0", "pressure"),
}

# the section listing (text and sheet); keys without a value are left out
SECTION_KEYS = ("A", "yc", "zc", "depth", "width", "Iz", "Iy", "Iyz", "I1", "I2", "theta",
                "Sz_top", "Sz_bot", "Sy_left", "Sy_right", "Zz", "Zy", "rz", "ry", "shear_factor",
                "EIz", "EA", "mass_per_length", "y_neutral", "J", "GJ", "Cw", "zs", "ys")
# the chosen member's table on the selection sheet
MEMBER_KEYS = ("A", "yc", "depth", "width", "Iz", "Iy", "Sz_top", "Sz_bot", "Zz", "rz", "ry",
               "shear_factor", "mass_per_length", "E", "G", "density", "strength_bending",
               "strength_shear", "strength_thickness", "EIz")
# the catalogue: every column with a unit (CSV, in this order) and the terminal table
CATALOG_CSV_KEYS = ("d", "b", "tw", "tf", "t", "r", "b_top", "tf_top", "b_bot", "tf_bot",
                    "A", "yc", "zc", "Iz", "Iy", "Iyz", "I1", "I2", "theta", "Sz_top", "Sz_bot",
                    "Sy_left", "Sy_right", "Zz", "Zy", "rz", "ry", "depth", "width", "shear_factor",
                    "E", "G", "density", "strength_bending", "strength_shear", "mass_per_length")
CATALOG_TABLE_KEYS = ("depth", "width", "A", "Iz", "Sz_top", "Sz_bot", "Zz", "Iy", "mass_per_length")
# the materials table
MATERIAL_KEYS = ("E", "G", "density", "strength_bending", "strength_shear", "E_05", "rho_k", "fc_90", "ft_0", "fc_0")

# column names of the terminal tables where the key is long
_SHORT = {"mass_per_length": "mass", "strength_bending": "f_bending", "strength_shear": "f_shear"}


def label(key: str) -> str:
    """The readable label of a property."""
    return PROPERTIES[key][0]


def kind(key: str) -> str | None:
    """The display kind of a property (``None``: degrees)."""
    return PROPERTIES[key][1]


def unit(key: str, system: str = "si") -> tuple[str, float]:
    """``(unit label, SI value of one unit)`` of a property in the display ``system``."""
    k = kind(key)
    return ("deg", 1.0) if k is None else display_factor(k, system)


def short(key: str) -> str:
    """A short column name for terminal tables."""
    return _SHORT.get(key, key)


def generated_note(series) -> str:
    """A reminder when any of ``series`` is one of the built-in generated series (``gen_``).

    >>> generated_note(["glulam"]), generated_note(["gen_steel_i", "glulam"])[:40]
    ('', 'Series gen_*: sizes generated by proport')
    """
    if not any(str(s).startswith("gen_") for s in series):
        return ""
    return ("Series gen_*: sizes generated by proportion rules, not a maker's stock list; check that "
            "the size can be bought, or screen your supplier's list (search.catalog).")
