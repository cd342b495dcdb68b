"""Section outlines from and to drawings in DXF (an open exchange format), through ezdxf.

Reading (:func:`read_drawing`): the closed shapes of the drawing's model space become the
section. Closed LWPOLYLINE and 2D POLYLINE entities (straight segments and arc bulges),
CIRCLE entities and closed SPLINE entities are shapes; a shape inside another shape of the
same layer is a hole in it (a shape inside a hole is a new part, and so on). Every layer is
one material: ``layer_materials`` maps layer names to material names, and a layer that the
map leaves out takes its own name when that is a material the ``lookup`` knows. Drawing
units come from the header's ``$INSUNITS`` unless ``units`` is given. Drawing x is the
section's z, drawing y its y.

Arcs become polygon vertices the way the shape families build them (``families._arc``:
inner vertices on a radius that keeps the area exact), 64 segments per quarter circle as
the ``circle`` family (a round bar drawn as two half-circle arcs has I within about
2e-6); circles as the ``circle`` family (256 segments, exact area and diameter); splines
are followed to 1e-6 of the drawing's size (A and I within about 1e-5).

Writing (:func:`write_drawing`): every ring of every part as a closed LWPOLYLINE, in
millimetres (``$INSUNITS`` = 4), on a layer named after the part's material (``SECTION``
without one), so reading the file back gives the same section.

ezdxf is imported inside the functions, so importing this module stays light.

Examples
--------
>>> import tempfile, pathlib
>>> from shapely.geometry import box
>>> from leanspan.sections.section import Section
>>> path = pathlib.Path(tempfile.mkdtemp()) / "plate.dxf"
>>> write_drawing(Section.from_polygons([box(-0.05, 0.0, 0.05, 0.2)], ["S355"]), path)
>>> section = read_drawing(path, {"S355": "S355"}).section
>>> round(section.properties()["Iz"] * 1e12), section.parts[0].material   # b d^3 / 12 in mm^4
(66666667, 'S355')
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from pathlib import Path

import numpy as np

from ..errors import GeometryError, InputError, LeanspanError
from ..units import RANGES, unit_factor
from .families import CIRCLE_SEGMENTS, _arc, _circle
from .section import Part, Section, check_polygon

__all__ = ["Drawing", "read_drawing", "load_drawing", "write_drawing", "drawing_text", "layers_file",
           "read_layers_file", "layer_material_options", "INSUNITS"]

#: $INSUNITS codes of the DXF header -> metres per drawing unit (0 = unitless).
INSUNITS = {1: 0.0254, 2: 0.3048, 4: 0.001, 5: 0.01, 6: 1.0, 8: 0.0254e-6, 9: 0.0254e-3,
            10: 0.9144, 12: 1e-9, 13: 1e-6, 14: 0.1}
_SHAPES = ("LWPOLYLINE", "POLYLINE", "CIRCLE", "SPLINE")
_LOOSE = ("LINE", "ARC", "ELLIPSE")  # pieces of an outline that is not one closed entity
_QUARTER = CIRCLE_SEGMENTS // 4  # arc segments per quarter circle, as the circle family
_SPLINE_TOLERANCE = 1e-6  # of the drawing's size
_FORBIDDEN_LAYER_CHARACTERS = '<>/\\":;?*|=`,'
MAX_POINTS = int(RANGES["points"][1])


@dataclass(frozen=True)
class Drawing:
    """A section read from a drawing: the section, each layer's material (None: geometry only),
    the metres per drawing unit and notes (ignored entities) for warnings."""

    section: Section
    materials: dict
    unit: float
    notes: list = field(default_factory=list)


def _name(entity) -> str:
    return f"{entity.dxftype()} #{entity.dxf.handle} on layer {entity.dxf.layer}"


def _bulge_ring(points, closed_to_start=True):
    """Vertices (V, 2) of a closed polyline with bulges ``points`` [(x, y, bulge)], arcs as
    area-exact polygon pieces (64 segments per quarter circle, as the circle family)."""
    out = []
    n = len(points)
    for i in range(n):
        x0, y0, b = points[i]
        x1, y1, _ = points[(i + 1) % n]
        out.append((x0, y0))
        if not b:
            continue
        theta = 4.0 * math.atan(b)  # included angle, counter-clockwise positive
        chord = math.hypot(x1 - x0, y1 - y0)
        if chord == 0.0:
            continue
        r = chord / (2.0 * abs(math.sin(theta / 2.0)))
        # centre: from the chord's middle, along its left normal by r cos(theta/2) (signed)
        mx, my = (x0 + x1) / 2.0, (y0 + y1) / 2.0
        nx, ny = -(y1 - y0) / chord, (x1 - x0) / chord
        h = r * math.cos(theta / 2.0) * (1.0 if theta > 0 else -1.0)
        cx, cy = mx + h * nx, my + h * ny
        a0 = math.degrees(math.atan2(y0 - cy, x0 - cx))
        segments = max(2, math.ceil(_QUARTER * abs(math.degrees(theta)) / 90.0 - 1e-9))
        arc = _arc(np.array([cx]), np.array([cy]), np.array([r]), a0, a0 + math.degrees(theta), segments)[0]
        out.extend(map(tuple, arc[1:-1]))  # the end points are the polyline's own vertices
    return np.asarray(out, float)


def _closed(points, size) -> bool:
    return len(points) > 2 and math.dist(points[0][:2], points[-1][:2]) <= 1e-9 * size


def _ring_of(entity, size):
    """The polygon ring (V, 2) of one shape entity, in drawing units (WCS x, y), or a
    GeometryError naming it."""
    kind = entity.dxftype()
    where = _name(entity)
    if kind in ("LWPOLYLINE", "POLYLINE"):
        if kind == "POLYLINE" and not entity.is_2d_polyline:
            raise GeometryError(f"{where}: a 3D polyline or mesh; expected a 2D outline in the drawing plane")
        if kind == "LWPOLYLINE":
            pts = [tuple(p) for p in entity.get_points("xyb")]
            closed = entity.closed
        else:
            pts = [(v.dxf.location.x, v.dxf.location.y, v.dxf.get("bulge", 0.0)) for v in entity.vertices]
            closed = entity.is_closed
        if not closed:
            if not _closed(pts, size):
                raise GeometryError(f"{where}: open outline (not closed); expected a closed polyline "
                                    "(close it in the drawing)")
            pts = pts[:-1]
        ring = _bulge_ring(pts)
        return _to_wcs(entity, ring)
    if kind == "CIRCLE":
        c, r = entity.dxf.center, float(entity.dxf.radius)
        ring = _circle(np.array([c.x]), np.array([c.y]), np.array([r]))[0]
        return _to_wcs(entity, ring)
    # SPLINE: in world coordinates already
    tool = entity.construction_tool()
    pts = np.array([(p.x, p.y) for p in tool.flattening(_SPLINE_TOLERANCE * size, segments=8)], float)
    closed = entity.closed or _closed(pts, size)
    if not closed:
        raise GeometryError(f"{where}: open spline (not closed); expected a closed spline")
    if math.dist(pts[0], pts[-1]) <= 1e-9 * size:
        pts = pts[:-1]
    return pts


def _to_wcs(entity, ring):
    """Object coordinates -> world coordinates (a mirrored entity has extrusion (0, 0, -1))."""
    ex = entity.dxf.get("extrusion", (0.0, 0.0, 1.0))
    ex = tuple(float(v) for v in ex)
    if abs(ex[0]) > 1e-12 or abs(ex[1]) > 1e-12:
        raise GeometryError(f"{_name(entity)}: not in the drawing plane (extrusion {ex}); expected a "
                            "shape drawn in the x-y plane")
    return ring if ex[2] > 0 else ring * np.array([-1.0, 1.0])


def _units(doc, path, units, field="--drawing-units"):
    if units is not None:
        return unit_factor(units, "length", field)
    code = int(doc.header.get("$INSUNITS", 0) or 0)
    if code not in INSUNITS:
        raise InputError(f"{path}: the drawing's units are not set ($INSUNITS = {code}); give the "
                         "drawing units, e.g. --drawing-units mm")
    return INSUNITS[code]


def _layer_materials(layers, first, layer_materials, lookup, path):
    """Material of every layer holding shapes: the map's (layer names ignore case), else the
    layer's own name when ``lookup`` knows it; every layer has one, or none does."""
    folded = {k.casefold(): v for k, v in layer_materials.items()}
    mats = {}
    for layer in layers:  # a small set
        given = layer_materials.get(layer, folded.get(layer.casefold()))
        if lookup is None:
            mats[layer] = given
        elif given is not None:
            try:
                mats[layer] = lookup(given).name
            except LeanspanError as exc:
                raise type(exc)(f"{path}: {first[layer]}: material of layer {layer}: {exc}") from None
        else:
            try:
                mats[layer] = lookup(layer).name
            except LeanspanError:
                mats[layer] = None
    with_material = [l for l in layers if mats[l] is not None]
    if with_material and len(with_material) < len(layers):
        bad = next(l for l in layers if mats[l] is None)
        raise InputError(f"{path}: {first[bad]}: layer {bad} has no material (layer {with_material[0]} "
                         f"is {mats[with_material[0]]}); expected a material for every layer "
                         "(--layer-material LAYER=MATERIAL or the layers file)")
    known = {l.casefold() for l in layers}
    for layer in layer_materials:
        if layer.casefold() not in known:
            raise InputError(f"{path}: layer {layer!r} (given a material) holds no closed shape; the "
                             f"layers with shapes: {', '.join(layers)}")
    return mats


def _nest(shapes, path):
    """Outline polygons with their holes from the closed shapes of one layer: a shape inside
    an odd number of others is a hole of the smallest one around it. Returns
    [(label, polygon)]; partly overlapping shapes are an error."""
    from shapely.geometry import Polygon

    order = sorted(range(len(shapes)), key=lambda i: -shapes[i][1].area)
    parent, depth = {}, {}
    for pos, i in enumerate(order):
        label, poly = shapes[i]
        inside = None
        for j in reversed(order[:pos]):  # smallest first among the larger ones
            other = shapes[j][1]
            if not other.intersects(poly):
                continue
            if other.contains(poly):
                inside = j
                break
            common = other.intersection(poly).area
            if common > 1e-9 * min(other.area, poly.area):
                raise GeometryError(f"{path}: {label} overlaps {shapes[j][0]} by {common:.4g} square "
                                    "drawing units; expected shapes that touch at most, or lie wholly "
                                    "inside one another (a hole)")
        parent[i], depth[i] = inside, 0 if inside is None else depth[inside] + 1
    out = []
    for i in order:
        if depth[i] % 2 == 0:
            holes = [k for k in order if parent[k] == i]
            label, poly = shapes[i]
            whole = Polygon(poly.exterior.coords, [shapes[k][1].exterior.coords for k in holes])
            out.append((label, check_polygon(whole, f"{path}: {label}")))
    return out


def read_drawing(path, layer_materials=None, units=None, lookup=None, units_field="--drawing-units") -> Drawing:
    """Read the section drawn in the DXF file at ``path``.

    Parameters
    ----------
    layer_materials : dict, optional
        Layer name -> material name (layer names matched ignoring case).
    units : str, optional
        The drawing unit (``"mm"``, ``"in"``), overriding the header's ``$INSUNITS``.
    lookup : callable, optional
        ``name -> Material`` (raising for an unknown name): checks the map's materials and
        lets a layer named after a material take it. Without it the map's names are taken
        as they are.

    Raises
    ------
    InputError, GeometryError
        One line naming the file, the entity (type and handle) and its layer.
    """
    import ezdxf

    from ..fileio import protect_inputs

    layer_materials = dict(layer_materials or {})
    try:
        doc = ezdxf.readfile(str(path))
    except FileNotFoundError:
        raise InputError(f"{path}: file not found") from None
    except IsADirectoryError:
        raise InputError(f"{path}: is a folder, expected a DXF drawing") from None
    except IOError as exc:  # ezdxf: not a DXF file, or not readable
        raise InputError(f"{path}: not a readable DXF drawing ({str(exc).splitlines()[0] if str(exc) else 'unreadable'})") from None
    except ezdxf.DXFError as exc:
        raise InputError(f"{path}: not a readable DXF drawing ({str(exc).splitlines()[0] if str(exc) else 'broken'})") from None
    except Exception as exc:  # a damaged file can fail anywhere in the reader
        raise InputError(f"{path}: not a readable DXF drawing ({type(exc).__name__})") from None
    protect_inputs(path)  # an output may not overwrite the drawing
    unit = _units(doc, path, units, units_field)
    msp = doc.modelspace()
    entities = list(msp)
    ignored: dict[str, int] = {}
    for e in entities:
        kind = e.dxftype()
        if kind in _LOOSE:
            raise GeometryError(f"{path}: {_name(e)}: a loose {kind.lower()}, not a closed shape; expected "
                                "each outline as one closed polyline, circle or closed spline (join the pieces)")
        if kind not in _SHAPES:
            ignored[kind] = ignored.get(kind, 0) + 1
    shapes = [e for e in entities if e.dxftype() in _SHAPES]
    if not shapes:
        raise GeometryError(f"{path}: no closed shape in the drawing's model space; expected closed "
                            "polylines, circles or closed splines")
    size = _drawing_size(shapes)
    by_layer: dict[str, list] = {}
    first: dict[str, str] = {}
    count = 0
    from shapely.geometry import Polygon

    for e in shapes:
        try:
            ring = _ring_of(e, size)
        except GeometryError as exc:
            raise GeometryError(f"{path}: {exc}") from None
        except LeanspanError:
            raise
        except Exception as exc:  # ezdxf on a damaged entity
            raise GeometryError(f"{path}: {_name(e)}: unreadable ({type(exc).__name__})") from None
        count += len(ring)
        if count > MAX_POINTS:
            raise GeometryError(f"{path}: {_name(e)}: the drawing's shapes take more than {MAX_POINTS} "
                                "points; simplify the outline")
        ring = ring * unit
        label = _name(e)
        if not np.all(np.isfinite(ring)) or np.abs(ring).max() > RANGES["section position"][1]:
            raise GeometryError(f"{path}: {label}: coordinates not finite or beyond "
                                f"{RANGES['section position'][1]:g} m; expected a section drawn to scale "
                                "(check the drawing units)")
        poly = check_polygon(Polygon(ring), f"{path}: {label}")
        by_layer.setdefault(e.dxf.layer, []).append((label, poly))
        first.setdefault(e.dxf.layer, label)
    layers = list(by_layer)
    mats = _layer_materials(layers, first, layer_materials, lookup, path)
    parts = []
    for layer in layers:  # a small set
        for label, poly in _nest(by_layer[layer], path):
            parts.append(Part(poly, mats[layer], label, "outline from a drawing"))
    try:
        section = Section(tuple(parts))
    except GeometryError as exc:
        raise GeometryError(f"{path}: {exc}") from None
    notes = []
    if ignored:
        notes.append(f"{path}: ignored " + ", ".join(f"{n} {k}" for k, n in sorted(ignored.items()))
                     + " (only closed polylines, circles and closed splines make the section)")
    return Drawing(section, mats, unit, notes)


def _drawing_size(shapes) -> float:
    """A length scale of the drawing (its extents, in drawing units) for closure tolerances."""
    from ezdxf import bbox

    try:
        box = bbox.extents(shapes, fast=True)
        size = float(max(box.size.x, box.size.y)) if box.has_data else 1.0
    except Exception:
        size = 1.0
    return size if size > 0 and math.isfinite(size) else 1.0


def _layer(material) -> str:
    if not material:
        return "SECTION"
    return "".join("_" if c in _FORBIDDEN_LAYER_CHARACTERS else c for c in str(material))


def drawing_text(section: Section) -> str:
    """The section as DXF text: each ring a closed LWPOLYLINE in mm, layers named after materials."""
    import io

    import ezdxf

    doc = ezdxf.new("R2010")
    doc.header["$INSUNITS"] = 4  # millimetres
    doc.header["$MEASUREMENT"] = 1  # metric
    msp = doc.modelspace()
    for part in section.parts:
        layer = _layer(part.material)
        if layer not in doc.layers:
            doc.layers.add(layer)
        for ring in part.rings():
            msp.add_lwpolyline([(float(z) * 1000.0, float(y) * 1000.0) for z, y in ring], close=True,
                               dxfattribs={"layer": layer})
    buf = io.StringIO()
    doc.write(buf)
    return buf.getvalue()


def write_drawing(section: Section, path) -> None:
    """Write ``section`` as a DXF drawing to ``path`` (atomically; see :func:`drawing_text`)."""
    from ..fileio import atomic_write

    atomic_write(path, drawing_text(section))


def layers_file(path) -> Path:
    """The layers file beside a drawing: ``girder.dxf`` -> ``girder.layers.toml``."""
    path = Path(path)
    return path.with_name(path.stem + ".layers.toml")


def read_layers_file(path) -> tuple[dict, str | None]:
    """``[layers]`` (layer -> material) and ``drawing_units`` of the layers file beside the
    drawing at ``path``; empty when there is none."""
    from ..fileio import is_file, load_toml

    side = layers_file(path)
    if not is_file(side):
        return {}, None
    data = load_toml(side)
    for key in data:
        if key not in ("layers", "drawing_units"):
            raise InputError(f"{side}: {key}: unknown key; expected layers, drawing_units")
    layers = data.get("layers", {})
    if not isinstance(layers, dict) or not all(isinstance(v, str) for v in layers.values()):
        raise InputError(f"{side}: layers: expected a table of LAYER = \"MATERIAL\" entries")
    units = data.get("drawing_units")
    if units is not None and not isinstance(units, str):
        raise InputError(f"{side}: drawing_units: expected a unit name such as \"mm\"")
    return dict(layers), units


def layer_material_options(values) -> dict:
    """``["STEEL=S355", "WOOD=C24,PLY=C16"]`` (the ``--layer-material`` option) -> a dict.

    >>> layer_material_options(["STEEL=S355", "WOOD = C24, PLY=C16"])
    {'STEEL': 'S355', 'WOOD': 'C24', 'PLY': 'C16'}
    """
    out = {}
    for value in values or ():
        for item in str(value).split(","):
            layer, eq, material = item.partition("=")
            if not eq or not layer.strip() or not material.strip():
                raise InputError(f"--layer-material: expected LAYER=MATERIAL, got {item.strip()!r}")
            out[layer.strip()] = material.strip()
    return out


def load_drawing(path, layer_materials=None, units=None, lookup=None) -> Drawing:
    """:func:`read_drawing` with the layers file beside the drawing; ``layer_materials`` and
    ``units`` (the command's options) override its entries."""
    side, side_units = read_layers_file(path)
    field = "--drawing-units" if units else f"{layers_file(path)}: drawing_units"
    return read_drawing(path, {**side, **(layer_materials or {})}, units or side_units, lookup, field)
