"""Geometry -> properties: polygons, parametric families, composites, torsion.

Modules: :mod:`.geometry` (edges and Green's-theorem moments), :mod:`.properties`
(elastic, principal, plastic and shear properties over arrays of sections),
:mod:`.families` (the parametric shapes), :mod:`.section` (parts, composites),
:mod:`.io` (section tables and files), :mod:`.drawing` (DXF drawings in and out), :mod:`.thin_walled` (closed-form J and Cw),
:mod:`.mesh` and :mod:`.torsion` (finite-element torsion: ``from leanspan.sections.torsion
import torsion``, kept out of this namespace so that importing sections stays light).
This package knows no catalogue: a composite takes a material lookup function.

>>> from leanspan.sections import section_from_spec
>>> s = section_from_spec({"units": "mm", "part": [{"shape": "rectangle", "b": 100, "d": 200}]})
>>> round(s.properties()["Iz"] * 1e12)   # b d^3 / 12 in mm^4
66666667
"""

from .drawing import load_drawing, read_drawing, write_drawing
from .families import FAMILIES, Family, get_family
from .io import load_section_file, section_from_spec
from .properties import KEYS, family_properties, properties
from .section import Composite, Part, Section, polygon_from_family
from .thin_walled import thin_walled_torsion

__all__ = ["FAMILIES", "Family", "get_family", "section_from_spec", "load_section_file", "KEYS",
           "properties", "family_properties", "Section", "Part", "Composite", "polygon_from_family",
           "thin_walled_torsion", "read_drawing", "load_drawing", "write_drawing"]

