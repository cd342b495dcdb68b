"""Bad section input raises the project's errors with a message that helps.

GUIDE section 3: messages name the bad value (field path) and what was expected.
(The CLI's exit codes are tested elsewhere; these tests call the library.)
"""

from __future__ import annotations

import numpy as np
import pytest
from shapely.geometry import MultiPolygon, Polygon, box

from leanspan.errors import GeometryError, InputError, LeanspanError, MaterialError, UnitsError
from leanspan.catalog.materials import material_lookup
from leanspan.sections.io import section_from_spec
from leanspan.sections.properties import family_properties
from leanspan.sections.section import Part, Section, polygon_from_family


def spec_of(*parts, **extra):
    return {"units": "mm", "part": list(parts), **extra}


def square(**extra):
    return {"shape": "polygon", "points": [[-50, 0], [50, 0], [50, 100], [-50, 100]], **extra}


# --------------------------------------------------------------------------- polygons
def test_self_intersecting_polygon_says_where():
    spec = spec_of({"shape": "polygon", "points": [[0, 0], [200, 100], [200, 0], [0, 50]]})
    with pytest.raises(GeometryError, match=r"part\[1\]\.points") as err:
        section_from_spec(spec)
    msg = str(err.value)
    assert "self-intersection" in msg
    # the crossing of (0,0)-(200,100) with (200,0)-(0,50) is at z = 66.67, y = 33.33 mm
    assert "z=66.67 mm" in msg and "y=33.33 mm" in msg


def test_symmetric_bow_tie_is_reported_as_self_intersection():
    # signed areas of the two loops cancel; still a crossing, at the centre (50, 50) mm
    spec = spec_of({"shape": "polygon", "points": [[0, 0], [100, 100], [100, 0], [0, 100]]})
    with pytest.raises(GeometryError, match="self-intersection at z=50 mm, y=50 mm"):
        section_from_spec(spec)


def test_zero_area_polygon():
    spec = spec_of({"shape": "polygon", "points": [[0, 0], [100, 0], [200, 0]]})
    with pytest.raises(GeometryError, match=r"part\[1\]\.points: zero area"):
        section_from_spec(spec)


def test_too_few_points():
    with pytest.raises(GeometryError, match="at least three points"):
        section_from_spec(spec_of({"shape": "polygon", "points": [[0, 0], [100, 0]]}))


def test_hole_outside_its_outline():
    spec = spec_of(square(holes=[[[200, 10], [300, 10], [300, 50]]]))
    with pytest.raises(GeometryError, match=r"part\[1\]\.holes\[1\]: hole is not inside"):
        section_from_spec(spec)


def test_hole_crossing_its_outline():
    spec = spec_of(square(holes=[[[0, 10], [80, 10], [80, 50], [0, 50]]]))
    with pytest.raises(GeometryError, match=r"holes\[1\]"):
        section_from_spec(spec)


def test_hole_table_that_misses_every_part():
    spec = spec_of({"shape": "rectangle", "b": 100, "d": 10},
                   hole=[{"shape": "circle", "d": 10, "at": [500, 0]}])
    with pytest.raises(GeometryError, match=r"hole\[1\]: does not cut any part"):
        section_from_spec(spec)


def test_hole_table_that_removes_a_whole_part():
    spec = spec_of({"shape": "rectangle", "b": 100, "d": 10},
                   hole=[{"shape": "rectangle", "b": 200, "d": 30, "at": [0, -10]}])
    with pytest.raises(GeometryError, match=r"hole\[1\]"):
        section_from_spec(spec)


def test_hole_table_that_splits_a_part_keeps_the_pieces():
    """Bolt holes through the thickness of a 12 x 300 mm plate: the net section.

    Hand calculation (mechanics of materials, net section): two 22 mm holes at
    y = 75 and 225 mm remove 2 x 22 x 12 mm²; they sit symmetrically, so the centroid
    stays at mid-depth and I_net = t d³/12 - 2 [t d0³/12 + t d0 (75 mm)²].
    """
    spec = spec_of({"shape": "rectangle", "b": 12, "d": 300},
                   hole=[{"shape": "rectangle", "b": 20, "d": 22, "at": [0, 64]},
                         {"shape": "rectangle", "b": 20, "d": 22, "at": [0, 214]}])
    s = section_from_spec(spec)
    assert len(s.parts) == 3
    assert sorted(p.label for p in s.parts) == [f"part[1] piece {k}" for k in (1, 2, 3)]
    p = s.properties()
    t, d, d0, e = 0.012, 0.3, 0.022, 0.075
    assert p["A"] == pytest.approx(t * d - 2 * t * d0, rel=1e-12)
    assert p["yc"] == pytest.approx(d / 2, rel=1e-12)
    assert p["Iz"] == pytest.approx(t * d**3 / 12 - 2 * (t * d0**3 / 12 + t * d0 * e**2), rel=1e-12)


def test_hole_with_a_material_is_refused():
    spec = spec_of({"shape": "rectangle", "b": 100, "d": 10},
                   hole=[{"shape": "circle", "d": 5, "at": [0, 2], "material": "S355"}])
    with pytest.raises(InputError, match=r"hole\[1\]\.material"):
        section_from_spec(spec)


# ------------------------------------------------------------------------------ parts
def test_overlapping_parts_name_both_and_the_overlap():
    spec = spec_of({"shape": "rectangle", "b": 100, "d": 10},
                   {"shape": "rectangle", "b": 100, "d": 10, "at": [50, 5]})
    with pytest.raises(GeometryError, match=r"part\[1\] and part\[2\] overlap") as err:
        section_from_spec(spec)
    assert "250 mm^2" in str(err.value)  # 50 x 5 mm by hand


def test_touching_parts_are_fine():
    spec = spec_of({"shape": "rectangle", "b": 100, "d": 10},
                   {"shape": "rectangle", "b": 100, "d": 10, "at": [0, 10]})
    assert section_from_spec(spec).properties()["A"] == pytest.approx(0.002, rel=1e-12)


def test_from_polygons_overlap_and_multipolygon():
    with pytest.raises(GeometryError, match="overlap"):
        Section.from_polygons([box(0, 0, 1, 1), box(0.5, 0.5, 2, 2)])
    with pytest.raises(GeometryError, match="one connected part"):
        Part(MultiPolygon([box(0, 0, 1, 1), box(2, 0, 3, 1)]))
    with pytest.raises(GeometryError, match="no parts"):
        Section(())


def test_clockwise_polygon_is_accepted():
    # an outline given clockwise is re-oriented, not an error and not a negative area
    p = Section.from_polygons([Polygon([(0, 0), (0, 1), (1, 1), (1, 0)])]).properties()
    assert p["A"] == pytest.approx(1.0)


# ------------------------------------------------------------------------- dimensions
@pytest.mark.parametrize("value", [-100, 0])
def test_negative_or_zero_dimension_in_a_file(value):
    with pytest.raises(GeometryError, match=r"part\[1\]\.b: .*expected a positive length"):
        section_from_spec(spec_of({"shape": "rectangle", "b": value, "d": 10}))


def test_missing_dimension_in_a_file():
    with pytest.raises(GeometryError, match=r"part\[1\]\.d: missing; a rectangle needs b, d"):
        section_from_spec(spec_of({"shape": "rectangle", "b": 100}))


def test_unknown_dimension_and_unknown_shape():
    with pytest.raises(InputError, match=r"part\[1\]\.t: unknown key"):
        section_from_spec(spec_of({"shape": "rectangle", "b": 100, "d": 10, "t": 3}))
    with pytest.raises(GeometryError, match="unknown shape 'hexagon'.*ibeam"):
        section_from_spec(spec_of({"shape": "hexagon", "b": 100}))
    with pytest.raises(InputError, match=r"part\[1\]\.shape: missing"):
        section_from_spec(spec_of({"b": 100, "d": 10}))


def test_missing_dimension_in_arrays():
    with pytest.raises(GeometryError, match="missing dimension 'd'"):
        family_properties("rectangle", {"b": 0.1})


def test_negative_dimension_in_arrays_names_the_row():
    with pytest.raises(GeometryError, match=r"section 1: rectangle dimension b"):
        family_properties("rectangle", {"b": np.array([0.1, -0.1]), "d": 0.2})
    with pytest.raises(GeometryError, match="positive length"):
        family_properties("tube", {"d": np.nan, "t": 0.01})


def test_negative_dimension_message_shows_a_plain_number():
    with pytest.raises(GeometryError, match=r"b = -0\.1\b"):
        family_properties("rectangle", {"b": np.array([-0.1]), "d": 0.2})


@pytest.mark.parametrize("family, dims, expected", [
    ("ibeam", {"d": 0.1, "b": 0.1, "tw": 0.005, "tf": 0.05}, "tf_top + tf_bot + 2 r < d"),
    ("ibeam", {"d": 0.3, "b": 0.15, "tw": 0.16, "tf": 0.01}, "tw + 2 r <= flange widths"),
    ("ibeam", {"d": 0.3, "b": 0.15, "tw": 0.0071, "tf": 0.0107, "r": 0.1}, "tw + 2 r"),
    ("tube", {"d": 0.1, "t": 0.05}, "2 t < d"),
    ("box", {"b": 0.1, "d": 0.1, "t": 0.05}, "2 t < min(b, d)"),
    ("box", {"b": 0.1, "d": 0.2, "t": 0.005, "r": 0.06}, "2 r <= min(b, d)"),
    ("channel", {"d": 0.1, "b": 0.05, "tw": 0.05, "tf": 0.01}, "tw + r < b"),
    ("channel", {"d": 0.1, "b": 0.05, "tw": 0.005, "tf": 0.05}, "2 tf + 2 r < d"),
    ("tee", {"d": 0.1, "b": 0.05, "tw": 0.06, "tf": 0.01}, "tw + 2 r <= b"),
    ("tee", {"d": 0.1, "b": 0.1, "tw": 0.01, "tf": 0.1}, "tf + r < d"),
    ("angle", {"d": 0.1, "b": 0.1, "t": 0.05, "r": 0.05}, "t + r < min(b, d)"),
])
def test_impossible_family_geometry(family, dims, expected):
    with pytest.raises(GeometryError, match="impossible " + family) as err:
        family_properties(family, dims)
    msg = str(err.value)
    assert expected in msg
    assert " mm" in msg  # the dimensions are echoed in millimetres


def test_impossible_geometry_in_a_file_names_the_part():
    spec = spec_of({"shape": "ibeam", "d": 100, "b": 100, "tw": 5, "tf": 50})
    with pytest.raises(GeometryError, match=r"part\[1\]: impossible ibeam.*tf=50 mm"):
        section_from_spec(spec)


def test_zero_top_flange_is_refused_by_the_array_path():
    with pytest.raises(GeometryError):
        family_properties("ibeam", {"d": 0.3, "b": 0.15, "tw": 0.0071, "tf": 0.0107,
                                        "tf_top": 0.0})


def test_dimension_arrays_of_different_lengths():
    with pytest.raises(GeometryError, match="differ in length"):
        family_properties("rectangle", {"b": np.array([0.1, 0.2]), "d": np.array([0.1, 0.2, 0.3])})


def test_polygon_from_family_validates():
    with pytest.raises(GeometryError, match="web: impossible tee"):
        polygon_from_family("tee", {"d": 0.1, "b": 0.05, "tw": 0.06, "tf": 0.01}, where="web")


# ------------------------------------------------------------------------------ units
def test_unit_of_the_wrong_kind_names_the_field():
    spec = {"part": [{"shape": "rectangle", "b": "100 kN", "d": "10 mm"}]}
    with pytest.raises(UnitsError, match=r"part\[1\]\.b: expected a length.*a force"):
        section_from_spec(spec)


def test_bare_number_without_declared_units():
    spec = {"part": [{"shape": "rectangle", "b": 100, "d": "10 mm"}]}
    with pytest.raises(UnitsError, match=r"part\[1\]\.b: 100 has no unit"):
        section_from_spec(spec)


def test_file_units_of_the_wrong_kind():
    spec = {"units": "kg", "part": [{"shape": "rectangle", "b": 100, "d": 10}]}
    with pytest.raises(UnitsError, match="units.length: 'kg' is not a unit of length"):
        section_from_spec(spec)


def test_point_with_wrong_unit():
    spec = {"units": "mm", "part": [{"shape": "polygon",
                                     "points": [[0, 0], ["1 s", 0], [1, 1]]}]}
    with pytest.raises(UnitsError, match=r"part\[1\]\.points\[2\]\[0\]"):
        section_from_spec(spec)


def test_bad_transform_values():
    with pytest.raises(InputError, match=r"part\[1\]\.rotate"):
        section_from_spec(spec_of(square(rotate="90 deg")))
    with pytest.raises(InputError, match=r"part\[1\]\.mirror"):
        section_from_spec(spec_of(square(mirror="yes")))
    with pytest.raises(InputError, match=r"part\[1\]\.at"):
        section_from_spec(spec_of(square(at=[1, 2, 3])))


# -------------------------------------------------------------------------- materials
def test_materials_on_only_some_parts():
    spec = spec_of({"shape": "rectangle", "b": 100, "d": 10, "material": "S355"},
                   {"shape": "rectangle", "b": 100, "d": 10, "at": [0, 10]})
    with pytest.raises(MaterialError, match=r"part\[2\]: no material"):
        section_from_spec(spec).composite(material_lookup())


def test_unknown_material():
    spec = spec_of({"shape": "rectangle", "b": 100, "d": 10, "material": "S356"})
    with pytest.raises(MaterialError, match="unknown material 'S356'"):
        section_from_spec(spec).composite(material_lookup())


def test_every_error_is_a_value_error():
    # GUIDE section 3 / leanspan.errors: each project error is also a ValueError
    for cls in (GeometryError, InputError, UnitsError, MaterialError):
        assert issubclass(cls, LeanspanError) and issubclass(cls, ValueError)


def test_unknown_part_material_names_file_and_part(tmp_path, capsys):
    from leanspan.cli import main

    p = tmp_path / "s.toml"
    p.write_text('units = "mm"\n[[part]]\nshape = "rectangle"\nb = 100\nd = 200\nmaterial = "C99"\n')
    assert main(["section", str(p)]) == 2
    err = capsys.readouterr().err.strip()
    assert len(err.splitlines()) == 1 and "s.toml" in err and "part[1].material" in err and "C99" in err
