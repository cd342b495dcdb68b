"""Sections from and to DXF drawings (leanspan/sections/drawing.py, `leanspan section FILE.dxf`).

The drawings are written here with ezdxf (an independent general-purpose DXF library), so each
test compares two separate descriptions of the same shape: a drawing and a TOML section, or a
drawing and a textbook formula.
"""

from __future__ import annotations

import json
import math

import ezdxf
import numpy as np
import pytest

from leanspan.catalog.materials import material_lookup
from leanspan.cli import main
from leanspan.sections.drawing import drawing_text, layer_material_options, read_drawing, write_drawing
from leanspan.sections.io import section_from_spec
from leanspan.sections.section import Section
from tests.common import CENTROIDAL_KEYS

FILLET = math.tan(math.radians(90.0) / 4.0)  # bulge of a quarter circle: tan(angle / 4) (DXF reference)

# an I 300 x 150, tw 8, tf 12, root radius 15 (mm), drawn counter-clockwise from the bottom left
D, B, TW, TF, R = 300.0, 150.0, 8.0, 12.0, 15.0
W = TW / 2
I_POINTS = [  # (x, y, bulge): a negative bulge turns clockwise (the concave root fillets)
    (-B / 2, 0, 0), (B / 2, 0, 0), (B / 2, TF, 0), (W + R, TF, -FILLET), (W, TF + R, 0),
    (W, D - TF - R, -FILLET), (W + R, D - TF, 0), (B / 2, D - TF, 0), (B / 2, D, 0), (-B / 2, D, 0),
    (-B / 2, D - TF, 0), (-W - R, D - TF, -FILLET), (-W, D - TF - R, 0), (-W, TF + R, -FILLET),
    (-W - R, TF, 0), (-B / 2, TF, 0)]
I_TOML = {"shape": "ibeam", "d": D, "b": B, "tw": TW, "tf": TF, "r": R}
# a 200 x 100 box, wall 10 (mm), 400 mm to the right of the I
BOX_AT = 400.0
BOX_TOML = {"shape": "polygon", "points": [[BOX_AT - 50, 0], [BOX_AT + 50, 0], [BOX_AT + 50, 200],
                                           [BOX_AT - 50, 200]],
            "holes": [[[BOX_AT - 40, 10], [BOX_AT + 40, 10], [BOX_AT + 40, 190], [BOX_AT - 40, 190]]]}


def rect_points(z0, y0, z1, y1):
    return [(z0, y0), (z1, y0), (z1, y1), (z0, y1)]


def new_doc(units=4):
    doc = ezdxf.new("R2010")
    doc.header["$INSUNITS"] = units
    return doc, doc.modelspace()


def save(doc, tmp_path, name="s.dxf"):
    path = tmp_path / name
    doc.saveas(path)
    return path


def two_layer_drawing(tmp_path):
    """The I on layer STEEL, the box with its hole on layer TIMBER."""
    doc, msp = new_doc()
    msp.add_lwpolyline(I_POINTS, format="xyb", close=True, dxfattribs={"layer": "STEEL"})
    msp.add_lwpolyline(rect_points(BOX_AT - 50, 0, BOX_AT + 50, 200), close=True, dxfattribs={"layer": "TIMBER"})
    msp.add_lwpolyline(rect_points(BOX_AT - 40, 10, BOX_AT + 40, 190), close=True, dxfattribs={"layer": "TIMBER"})
    msp.add_text("invented test drawing", dxfattribs={"layer": "NOTES"})  # ignored, with a note
    return save(doc, tmp_path)


def typed_section():
    return section_from_spec({"units": "mm", "part": [{**I_TOML, "material": "S355"},
                                                      {**BOX_TOML, "material": "C24"}]})


def assert_same(a, b, rel):
    pa, pb = a.properties(), b.properties()
    for k in CENTROIDAL_KEYS + ("yc", "zc"):
        assert pa[k] == pytest.approx(pb[k], rel=rel, abs=1e-15), k


def test_two_layers_equal_the_typed_section(tmp_path):
    drawing = read_drawing(two_layer_drawing(tmp_path), {"steel": "S355", "TIMBER": "C24"},
                           lookup=material_lookup())
    typed = typed_section()
    # the fillets are arcs: A is exact, the rest within the curved-shape tolerance of the families
    # (README "Curves": I within about 1e-5 of the curved shape; the drawing's arcs take 64
    # segments per quarter, the family's fillets 8)
    assert_same(drawing.section, typed, rel=1e-5)
    assert drawing.section.properties()["A"] == pytest.approx(typed.properties()["A"], rel=1e-12)
    lookup = material_lookup()
    cd, ct = drawing.section.composite(lookup), typed.composite(lookup)
    for k in ("EIz", "EIy", "EA", "mass_per_length", "y_neutral"):
        assert getattr(cd, k) == pytest.approx(getattr(ct, k), rel=1e-5), k
    assert drawing.materials == {"STEEL": "S355", "TIMBER": "C24"}
    assert any("1 TEXT" in n for n in drawing.notes)


def test_box_with_hole_straight_edges_to_1e9(tmp_path):
    doc, msp = new_doc()
    msp.add_lwpolyline(rect_points(BOX_AT - 50, 0, BOX_AT + 50, 200), close=True, dxfattribs={"layer": "C24"})
    msp.add_lwpolyline(rect_points(BOX_AT - 40, 10, BOX_AT + 40, 190), close=True, dxfattribs={"layer": "C24"})
    section = read_drawing(save(doc, tmp_path), lookup=material_lookup()).section
    assert_same(section, section_from_spec({"units": "mm", "part": [BOX_TOML]}), rel=1e-9)
    # hollow rectangle, textbook: Iz = (b d^3 - bi di^3) / 12
    assert section.properties()["Iz"] == pytest.approx((0.1 * 0.2**3 - 0.08 * 0.18**3) / 12, rel=1e-9)
    assert section.parts[0].material == "C24"  # the layer is named after a known material


def test_round_trip_keeps_properties_and_materials(tmp_path):
    typed = typed_section()
    path = tmp_path / "out.dxf"
    write_drawing(typed, path)
    back = read_drawing(path, lookup=material_lookup())
    assert_same(back.section, typed, rel=1e-9)
    assert sorted(p.material for p in back.section.parts) == ["C24", "S355"]
    assert ezdxf.readfile(path).header["$INSUNITS"] == 4  # millimetres


def test_circle_and_bulged_polyline_give_the_round_bar(tmp_path):
    doc, msp = new_doc()
    msp.add_circle((0, 50), 50)
    # a second round bar as two half circles (bulge 1 = a half circle, DXF reference)
    msp.add_lwpolyline([(200, 0, 1), (200, 100, 1)], format="xyb", close=True)
    section = read_drawing(save(doc, tmp_path)).section
    circle, bulged = (Section((p,)).properties() for p in section.parts)
    for p in (circle, bulged):
        # textbook: A = pi r^2 (exact by construction), I = pi d^4 / 64 within the curve tolerance
        assert p["A"] == pytest.approx(math.pi * 0.05**2, rel=1e-12)
        assert p["Iz"] == pytest.approx(math.pi * 0.1**4 / 64, rel=1e-5)


def test_closed_splines(tmp_path):
    from ezdxf.math import ConstructionArc, rational_bspline_from_arc

    doc, msp = new_doc()
    # a degree-1 closed spline is the polygon through its control points
    msp.add_open_spline([(0, 0), (100, 0), (100, 50), (0, 50), (0, 0)], degree=1)
    # a rational spline that is exactly a circle of radius 40 around (300, 40) (NURBS, ezdxf.math)
    arc = rational_bspline_from_arc(center=(300, 40), radius=40, start_angle=0, end_angle=360)
    s = msp.add_rational_spline(arc.control_points, arc.weights(), degree=arc.degree, knots=arc.knots())
    assert ConstructionArc  # (the module holds both helpers)
    section = read_drawing(save(doc, tmp_path)).section
    props = sorted((Section((p,)).properties() for p in section.parts), key=lambda p: p["width"])
    circle, rect = props
    assert rect["Iz"] == pytest.approx(0.1 * 0.05**3 / 12, rel=1e-9)  # b d^3 / 12
    # the spline is followed to 1e-6 of the drawing's size: A = pi r^2, I = pi d^4 / 64 to ~1e-5
    assert circle["A"] == pytest.approx(math.pi * 0.04**2, rel=2e-5)
    assert circle["Iz"] == pytest.approx(math.pi * 0.08**4 / 64, rel=5e-5)
    assert s.dxf.layer == "0"


def test_drawing_units_from_header_or_option(tmp_path, capsys):
    doc, msp = new_doc(units=1)  # inches
    msp.add_lwpolyline(rect_points(0, 0, 2, 6), close=True)
    path = save(doc, tmp_path)
    assert main(["section", str(path), "--json"]) == 0
    # 2 x 6 in: b d^3 / 12 = 36 in^4, 1 in = 0.0254 m exactly
    assert json.loads(capsys.readouterr().out)["Iz"] == pytest.approx(36 * 0.0254**4, rel=1e-12)
    assert main(["section", str(path), "--json", "--drawing-units", "mm"]) == 0
    assert json.loads(capsys.readouterr().out)["Iz"] == pytest.approx(36e-12, rel=1e-12)
    doc, msp = new_doc(units=0)
    msp.add_lwpolyline(rect_points(0, 0, 2, 6), close=True)
    assert main(["section", str(save(doc, tmp_path, "plain.dxf")), "--json"]) == 2
    assert "--drawing-units" in capsys.readouterr().err


def test_layers_file_beside_the_drawing(tmp_path, capsys):
    path = two_layer_drawing(tmp_path)
    (tmp_path / "s.layers.toml").write_text('drawing_units = "mm"\n[layers]\nSTEEL = "S355"\nTIMBER = "C24"\n')
    assert main(["section", str(path), "--json"]) == 0
    out = json.loads(capsys.readouterr().out)
    assert out["EIz"] == pytest.approx(typed_section().composite(material_lookup()).EIz, rel=1e-5)
    # the option overrides the file: C30 (EN 338: E0,mean 12 GPa) for the timber instead of C24 (11 GPa)
    assert main(["section", str(path), "--json", "--layer-material", "TIMBER=C30"]) == 0
    assert json.loads(capsys.readouterr().out)["EIz"] > out["EIz"]


def test_outline_of_a_selection(tmp_path, capsys):
    from pathlib import Path

    job = Path(__file__).resolve().parents[1] / "data" / "examples" / "select-floor-joist.toml"
    out = tmp_path / "chosen.dxf"
    assert main(["select", str(job), "--json", "--outline", str(out)]) == 0
    chosen = json.loads(capsys.readouterr().out)["chosen"]
    back = read_drawing(out).section.properties()
    assert back["depth"] == pytest.approx(chosen["depth"], rel=1e-12)
    assert back["width"] == pytest.approx(chosen["width"], rel=1e-12)


def test_layer_material_option_parsing():
    assert layer_material_options(["A=S355,B = C24"]) == {"A": "S355", "B": "C24"}
    with pytest.raises(ValueError, match="LAYER=MATERIAL"):
        layer_material_options(["STEEL"])


def bad_drawings(tmp_path):
    """name -> (path, options, words the one-line error must hold)."""
    out = {}
    doc, msp = new_doc()
    e = msp.add_lwpolyline(rect_points(0, 0, 100, 50), close=False, dxfattribs={"layer": "STEEL"})
    out["open polyline"] = (save(doc, tmp_path, "open.dxf"), [], [f"LWPOLYLINE #{e.dxf.handle}", "layer STEEL", "open"])
    doc, msp = new_doc()
    e = msp.add_lwpolyline([(0, 0), (100, 50), (100, 0), (0, 50)], close=True, dxfattribs={"layer": "STEEL"})
    out["self-crossing"] = (save(doc, tmp_path, "cross.dxf"), [], [f"LWPOLYLINE #{e.dxf.handle}", "layer STEEL",
                                                                     "crossing"])
    doc, msp = new_doc()
    a = msp.add_lwpolyline(rect_points(0, 0, 100, 50), close=True, dxfattribs={"layer": "STEEL"})
    b = msp.add_lwpolyline(rect_points(50, 0, 150, 50), close=True, dxfattribs={"layer": "TIMBER"})
    out["overlapping layers"] = (save(doc, tmp_path, "overlap.dxf"), [],
                                 [f"#{a.dxf.handle} on layer STEEL", f"#{b.dxf.handle} on layer TIMBER", "overlap"])
    doc, msp = new_doc()
    a = msp.add_lwpolyline(rect_points(0, 0, 100, 50), close=True, dxfattribs={"layer": "STEEL"})
    b = msp.add_circle((100, 25), 20, dxfattribs={"layer": "STEEL"})
    out["overlap in a layer"] = (save(doc, tmp_path, "overlap1.dxf"), [],
                                 [f"CIRCLE #{b.dxf.handle} on layer STEEL", f"#{a.dxf.handle}", "overlap"])
    doc, msp = new_doc()
    t = msp.add_text("only words")
    out["no closed shape"] = (save(doc, tmp_path, "empty.dxf"), [], ["no closed shape"])
    doc, msp = new_doc()
    e = msp.add_line((0, 0), (100, 0), dxfattribs={"layer": "WEB"})
    out["loose line"] = (save(doc, tmp_path, "line.dxf"), [], [f"LINE #{e.dxf.handle}", "layer WEB"])
    doc, msp = new_doc()
    msp.add_lwpolyline(rect_points(0, 0, 100, 50), close=True, dxfattribs={"layer": "STEEL"})
    e = msp.add_lwpolyline(rect_points(0, 50, 100, 150), close=True, dxfattribs={"layer": "FILL"})
    path = save(doc, tmp_path, "nomaterial.dxf")
    out["layer without material"] = (path, ["--layer-material", "STEEL=S355"],
                                     [f"LWPOLYLINE #{e.dxf.handle}", "layer FILL", "no material"])
    out["unknown material"] = (path, ["--layer-material", "STEEL=S355,FILL=S999"],
                               [f"LWPOLYLINE #{e.dxf.handle}", "layer FILL", "S999"])
    out["layer not in drawing"] = (path, ["--layer-material", "STEEL=S355,FILL=C24,ROOF=C24"], ["ROOF"])
    (tmp_path / "junk.dxf").write_text("this is not a drawing\n")
    out["not a drawing"] = (tmp_path / "junk.dxf", [], ["not a readable DXF"])
    assert t
    return out


BAD = ["open polyline", "self-crossing", "overlapping layers", "overlap in a layer", "no closed shape",
       "loose line", "layer without material", "unknown material", "layer not in drawing", "not a drawing"]


@pytest.mark.parametrize("name", BAD)
def test_bad_drawings_exit_2_with_one_line(name, tmp_path, capsys):
    path, options, words = bad_drawings(tmp_path)[name]
    assert main(["section", str(path), "--json", *options]) == 2
    captured = capsys.readouterr()
    assert captured.out == ""
    lines = captured.err.strip().splitlines()
    assert len(lines) == 1, lines
    assert lines[0].startswith("leanspan section: error: ") and str(path.name) in lines[0]
    for w in words:
        assert w in lines[0], (w, lines[0])


def test_outline_refuses_to_overwrite_the_drawing(tmp_path, capsys):
    path = two_layer_drawing(tmp_path)
    assert main(["section", str(path), "--layer-material", "STEEL=S355,TIMBER=C24",
                 "--outline", str(path)]) == 2
    assert "--outline" in capsys.readouterr().err


def test_drawing_options_are_refused_for_toml(tmp_path, capsys):
    p = tmp_path / "s.toml"
    p.write_text('units = "mm"\n[[part]]\nshape = "rectangle"\nb = 100\nd = 200\n')
    assert main(["section", str(p), "--layer-material", "A=S355"]) == 2
    assert "only for a drawing" in capsys.readouterr().err


def test_drawing_text_is_one_polyline_per_ring():
    doc = ezdxf.read(__import__("io").StringIO(drawing_text(typed_section())))
    kinds = [e.dxftype() for e in doc.modelspace()]
    assert kinds == ["LWPOLYLINE"] * 3  # the I, the box and its hole
    assert np.isclose(sum(1 for e in doc.modelspace() if e.dxf.layer == "C24"), 2)


def test_old_polyline_and_mirrored_entities(tmp_path):
    """A 2D POLYLINE reads like the LWPOLYLINE of the same vertices and bulges, and an entity
    drawn with extrusion (0, 0, -1) (mirrored: world x = -object x, DXF reference) is mirrored."""
    pts = [(0, 0, 0), (100, 0, 0), (100, 60, 1), (0, 60, 0)]  # a half circle on top, diameter 100
    doc, msp = new_doc()
    msp.add_lwpolyline(pts, format="xyb", close=True)
    lw = read_drawing(save(doc, tmp_path, "lw.dxf")).section.properties()
    doc, msp = new_doc()
    poly = msp.add_polyline2d([(x, y) for x, y, _ in pts], close=True)
    for v, (_, _, b) in zip(poly.vertices, pts):
        v.dxf.bulge = b
    old = read_drawing(save(doc, tmp_path, "old.dxf")).section.properties()
    for k in ("A", "Iz", "Iy", "yc", "zc"):
        assert old[k] == pytest.approx(lw[k], rel=1e-12, abs=1e-15), k
    # bulge 1 from (100, 60) to (0, 60) turns counter-clockwise: a half disc above y = 60 mm
    assert lw["A"] == pytest.approx(0.1 * 0.06 + math.pi * 0.05**2 / 2, rel=1e-12)
    doc, msp = new_doc()
    msp.add_lwpolyline(pts, format="xyb", close=True, dxfattribs={"extrusion": (0, 0, -1)})
    mirrored = read_drawing(save(doc, tmp_path, "mirror.dxf")).section.properties()
    assert mirrored["zc"] == pytest.approx(-lw["zc"], rel=1e-12)
    assert mirrored["Iz"] == pytest.approx(lw["Iz"], rel=1e-12)
