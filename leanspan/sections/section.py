"""One cross-section made of parts: polygons with holes, each with an optional material.

A :class:`Part` holds a valid shapely polygon in SI metres (``[z, y]``) after its
transforms; a :class:`Section` checks that parts do not overlap, cuts shared holes,
and computes geometric properties through the same vectorised code the catalogue
uses, plus transformed (modulus-weighted) properties when parts carry materials.

Examples
--------
>>> from shapely.geometry import box
>>> s = Section.from_polygons([box(-0.05, 0.0, 0.05, 0.2)])
>>> round(float(s.properties()["Iz"]) / (0.1 * 0.2**3 / 12), 12)
1.0
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from ..errors import GeometryError, MaterialError
from .families import get_family
from .geometry import edges_from_rings, moments
from .properties import properties

__all__ = ["Part", "Section", "Composite", "polygon_from_family", "check_polygon", "transform"]


def _mm(p) -> str:
    return f"z={p[0] * 1000:.4g} mm, y={p[1] * 1000:.4g} mm"


def check_polygon(poly, where: str):
    """Raise GeometryError (naming ``where`` and the place) unless ``poly`` is a valid area."""
    import numpy as np
    import shapely
    from shapely.validation import explain_validity

    ring = np.asarray(poly.exterior.coords) if not poly.is_empty else np.zeros((0, 2))
    flat = True  # all points on one line?
    if len(ring) >= 3:
        d = ring - ring[0]
        size = np.abs(d).max()
        k = np.argmax(np.hypot(d[:, 0], d[:, 1]))
        flat = size == 0 or np.abs(d[:, 0] * d[k, 1] - d[:, 1] * d[k, 0]).max() <= 1e-12 * size * size
    if poly.is_empty or flat or (poly.is_valid and poly.area <= 0):
        raise GeometryError(f"{where}: zero area; expected at least three points enclosing an area")
    if not poly.is_valid:
        text = explain_validity(poly)  # e.g. "Self-intersection[0.1 0.2]"
        kind, _, rest = text.partition("[")
        try:
            z, y = (float(v) for v in rest.rstrip("]").split()[:2])
            place = f" at {_mm((z, y))}"
        except ValueError:
            place = ""
        raise GeometryError(f"{where}: invalid outline ({kind.strip().lower()}{place}); "
                            "expected a simple polygon without crossing edges")
    if shapely.get_num_interior_rings(poly) and poly.area <= 1e-15:
        raise GeometryError(f"{where}: zero area after holes")
    return poly


def transform(poly, rotate=0.0, mirror=False, at=(0.0, 0.0)):
    """Rotate (degrees, counter-clockwise, about the origin), mirror about the y-axis, translate."""
    from shapely import affinity

    if rotate:
        poly = affinity.rotate(poly, rotate, origin=(0.0, 0.0))
    if mirror:
        poly = affinity.scale(poly, xfact=-1.0, yfact=1.0, origin=(0.0, 0.0))
    if at[0] or at[1]:
        poly = affinity.translate(poly, xoff=at[0], yoff=at[1])
    return poly


def polygon_from_family(family: str, dims: dict, where: str = "part"):
    """A shapely polygon for one section of a parametric family (dims in metres)."""
    from shapely.geometry import Polygon

    fam = get_family(family)
    full = fam.complete(dims)
    fam.validate(full, where=lambda i: where)
    rings = [r[0] for r in fam.rings(full)]
    return Polygon(rings[0], rings[1:])


def _oriented_rings(poly) -> list[np.ndarray]:
    """Exterior counter-clockwise, holes clockwise, each (V, 2) without the closing point."""
    from shapely.geometry.polygon import orient

    poly = orient(poly, sign=1.0)
    rings = [np.asarray(poly.exterior.coords)[:-1]]
    rings += [np.asarray(r.coords)[:-1] for r in poly.interiors]
    return rings


@dataclass(frozen=True)
class Part:
    """A polygon (SI metres, ``[z, y]``) with an optional material name, a label and the shape
    it was built from (``"I 300x150x7.1x10.7"``, for tables and sheets)."""

    polygon: object
    material: str | None = None
    label: str = "part"
    shape: str = ""

    def __post_init__(self):
        from shapely.geometry import MultiPolygon, Polygon

        if isinstance(self.polygon, MultiPolygon):
            raise GeometryError(f"{self.label}: splits into {len(self.polygon.geoms)} pieces; "
                                "expected one connected part (give each piece its own part)")
        if not isinstance(self.polygon, Polygon):
            raise GeometryError(f"{self.label}: expected a polygon, got {type(self.polygon).__name__}")
        check_polygon(self.polygon, self.label)

    def rings(self) -> list[np.ndarray]:
        return _oriented_rings(self.polygon)


@dataclass(frozen=True)
class Composite:
    """Transformed properties of a section whose parts carry materials (SI units).

    ``EIz`` about the modulus-weighted neutral axis at ``y_neutral``; ``EA``; ``EIy``;
    ``mass_per_length`` from each part's density; ``fibres`` maps each material to
    its (y_top, y_bottom, E) so :meth:`stresses` can give the bending stress there.
    """

    EIz: float
    EIy: float
    EA: float
    mass_per_length: float
    y_neutral: float
    z_neutral: float
    fibres: dict = field(default_factory=dict)

    def stresses(self, moment: float) -> dict[str, tuple[float, float]]:
        """Bending stress (Pa, tension positive) at the top and bottom fibre of each material.

        With sagging moment positive, ``sigma = -M E (y - y_neutral) / EIz``.
        """
        out = {}
        for name, (ytop, ybot, E) in self.fibres.items():
            out[name] = (-moment * E * (ytop - self.y_neutral) / self.EIz,
                         -moment * E * (ybot - self.y_neutral) / self.EIz)
        return out


@dataclass(frozen=True)
class Section:
    """A cross-section: one or more non-overlapping parts.

    Use :meth:`from_polygons` for shapely polygons, or
    :func:`leanspan.sections.io.section_from_spec` for a section file.
    """

    parts: tuple
    holes: tuple = ()

    def __post_init__(self):
        if not self.parts:
            raise GeometryError("section: no parts; expected at least one [[part]]")
        self._check_overlaps()

    @classmethod
    def from_polygons(cls, polygons, materials=None) -> "Section":
        materials = materials or [None] * len(polygons)
        return cls(tuple(Part(p, m, f"part[{i + 1}]") for i, (p, m) in enumerate(zip(polygons, materials))))

    def _check_overlaps(self):
        parts = self.parts
        for i in range(len(parts)):
            for j in range(i + 1, len(parts)):
                a, b = parts[i].polygon, parts[j].polygon
                if not a.intersects(b):
                    continue
                common = a.intersection(b).area
                if common > 1e-9 * min(a.area, b.area):
                    raise GeometryError(f"{parts[i].label} and {parts[j].label} overlap by "
                                        f"{common * 1e6:.4g} mm^2; expected parts that touch "
                                        "at most along their edges")

    # -- geometry ---------------------------------------------------------
    def rings(self) -> list[np.ndarray]:
        """All oriented rings of all parts, each ``(V, 2)``."""
        return [r for p in self.parts for r in p.rings()]

    def edges(self):
        return edges_from_rings([r[None] for r in self.rings()])

    def outline(self):
        """The union of all parts (touching parts merge) as a shapely geometry."""
        import shapely

        return shapely.union_all([p.polygon for p in self.parts])

    def properties(self, private: bool = False) -> dict[str, float]:
        """Geometric properties (:data:`leanspan.sections.properties.KEYS`) as floats."""
        return {k: float(v[0]) for k, v in properties(self.edges(), private=private).items()}

    @property
    def has_materials(self) -> bool:
        return any(p.material for p in self.parts)

    def composite(self, lookup) -> Composite:
        """Transformed properties; ``lookup(name) -> Material`` (with E, density).

        Raises
        ------
        MaterialError
            If only some parts carry a material.
        """
        missing = [p.label for p in self.parts if not p.material]
        if missing:
            raise MaterialError(f"{missing[0]}: no material while other parts have one; "
                                "give every part a material (or a file-level material)")
        groups: dict[str, list] = {}
        for p in self.parts:
            groups.setdefault(p.material, []).append(p)
        mats = {}
        for name, members in groups.items():
            try:
                mats[name] = lookup(name)
            except MaterialError as exc:  # name the first part that asks for it
                raise MaterialError(f"{members[0].label}.material: {exc}") from None
        ref = np.asarray([[0.0, 0.0]])
        EA = ES_y = ES_z = 0.0
        mass = 0.0
        sums = []
        for name, parts in groups.items():
            e = edges_from_rings([r[None] for p in parts for r in p.rings()])
            m = {k: float(v[0]) for k, v in moments(e, (ref[:, 0], ref[:, 1])).items()}
            E = mats[name].E
            EA += E * m["A"]
            ES_y += E * m["Sy"]
            ES_z += E * m["Sz"]
            mass += mats[name].density * m["A"]
            ys = np.concatenate([r[:, 1] for p in parts for r in p.rings()])
            sums.append((name, E, m, ys.max(), ys.min()))
        y_n, z_n = ES_y / EA, ES_z / EA
        EIz = sum(E * (m["Syy"] - 2 * y_n * m["Sy"] + y_n**2 * m["A"]) for _, E, m, _, _ in sums)
        EIy = sum(E * (m["Szz"] - 2 * z_n * m["Sz"] + z_n**2 * m["A"]) for _, E, m, _, _ in sums)
        fibres = {name: (top, bot, E) for name, E, _, top, bot in sums}
        return Composite(EIz=EIz, EIy=EIy, EA=EA, mass_per_length=mass,
                         y_neutral=y_n, z_neutral=z_n, fibres=fibres)
