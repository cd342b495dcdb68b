"""Finite-element torsion against named outside sources."""

from __future__ import annotations

import math

import numpy as np
import pytest
from scipy.integrate import dblquad
from shapely import affinity
from shapely.geometry import Polygon, box

from leanspan.errors import GeometryError, InputError, LeanspanError
from leanspan.sections.mesh import mesh_section
from leanspan.sections.torsion import torsion
from test_torsion_shapes import channel, circle, ibeam, rectangle, tee, tube


def saint_venant_rectangle_J(a, b):
    """Saint-Venant's series for a solid rectangle, a >= b (Timoshenko & Goodier,
    Theory of Elasticity, 3rd ed., sec. 109): J = a b^3 / 3 [1 - 192 b / (pi^5 a)
    sum_{n odd} tanh(n pi a / 2b) / n^5]."""
    a, b = max(a, b), min(a, b)
    n = np.arange(1, 400, 2)
    return a * b**3 / 3 * (1 - 192 / np.pi**5 * (b / a) * np.sum(np.tanh(n * np.pi * a / (2 * b)) / n**5))


# Timoshenko & Goodier's table of k1 in J = k1 a b^3 (3 decimals, from memory)
TABLE_K1 = {1.0: 0.141, 1.5: 0.196, 2.0: 0.229, 3.0: 0.263, 4.0: 0.281, 5.0: 0.291, 10.0: 0.312}


@pytest.mark.parametrize("ratio", sorted(TABLE_K1))
def test_rectangle_J_series_and_table(ratio):
    r = torsion([rectangle(ratio, 1.0)], element_size=0.1)
    assert r.J == pytest.approx(saint_venant_rectangle_J(ratio, 1.0), rel=2e-4)  # series solution
    assert r.J / ratio == pytest.approx(TABLE_K1[ratio], abs=6e-4)               # table, 3 decimals
    # doubly symmetric: shear centre at the centre
    assert r.zs == pytest.approx(0.0, abs=1e-6) and r.ys == pytest.approx(0.5, abs=1e-6)


def test_rectangle_default_mesh_is_accurate():
    # default mesh of a 1:3 plate within 0.1 % of the series solution
    r = torsion([rectangle(3.0, 1.0)])
    assert r.J == pytest.approx(saint_venant_rectangle_J(3.0, 1.0), rel=1e-3)


def test_circle_and_tube_polar_moment():
    # J = pi d^4 / 32 for a circle, pi (d^4 - di^4) / 32 for a tube (any strength-of-
    # materials text); the 256-gon is 2e-4 short of the circle in J
    r = torsion([circle(100.0)])
    assert r.J == pytest.approx(math.pi * 100**4 / 32, rel=5e-4)
    t = torsion([tube(100.0, 8.0)])
    assert t.J == pytest.approx(math.pi * (100**4 - 84**4) / 32, rel=5e-4)
    # no warping for a circle: Cw ~ 0 compared with J d^2
    assert abs(r.Cw) < 1e-9 * r.J * 100**2 and abs(t.Cw) < 1e-9 * t.J * 100**2
    assert t.ys == pytest.approx(50.0, abs=1e-6) and t.zs == pytest.approx(0.0, abs=1e-6)


def test_rolled_ibeam_against_handbook():
    # 300 x 150 x 7.1 x 10.7, root radius 15 (the EN 10365 dimensions of the 300 mm
    # parallel-flange I). Steel producers' tables: It = 20.12 cm^4, Iw = 125.9e3 cm^6,
    # strong-axis I = 8356 cm^4 (from memory). Tables use approximate formulas: few %.
    shape = ibeam(300.0, 150.0, 7.1, 10.7, 15.0)
    r = torsion([shape])
    assert r.J == pytest.approx(20.12e4, rel=0.03)
    assert r.Cw == pytest.approx(125.9e9, rel=0.03)
    assert r.zs == pytest.approx(0.0, abs=1e-4) and r.ys == pytest.approx(150.0, abs=1e-4)
    # the geometry itself against the table's second moment (Iz here: about the horizontal axis)
    from shapely import get_coordinates  # noqa: F401  (keeps the shape check independent)
    m = mesh_section([shape])
    c = m.corners
    # exact second moment of each straight triangle: A/12 (sum y_i^2 + (sum y_i)^2) about y = 150
    y = c[..., 1] - 150.0
    Iz = np.sum(m.areas / 12 * ((y**2).sum(1) + y.sum(1) ** 2))
    assert Iz == pytest.approx(8356e4, rel=0.002)


def test_thin_channel_shear_centre_and_cw():
    # thin-walled channel (e.g. Timoshenko & Gere, Theory of Elastic Stability; any
    # thin-walled beams text): on the mid-line, e = 3 b^2 tf / (6 b tf + h tw) from the
    # web's mid-line, away from the flanges;
    # Cw = tf b^3 h^2 / 12 (3 b tf + 2 h tw) / (6 b tf + h tw).
    d, b, t = 200.0, 100.0, 2.0
    r = torsion([channel(d, b, t, t)])
    bm, hm = b - t / 2, d - t
    e = 3 * bm**2 * t / (6 * bm * t + hm * t)
    web_mid = -b / 2 + t / 2
    assert r.zs == pytest.approx(web_mid - e, abs=0.01 * e)
    assert r.ys == pytest.approx(d / 2, abs=1e-6 * d)  # on the axis of symmetry
    cw = t * bm**3 * hm**2 / 12 * (3 * bm * t + 2 * hm * t) / (6 * bm * t + hm * t)
    assert r.Cw == pytest.approx(cw, rel=0.01)
    assert r.J == pytest.approx((2 * bm + hm) * t**3 / 3, rel=0.01)  # sum of b t^3 / 3


@pytest.mark.parametrize("angle_deg", [0.0, 30.0, 90.0])
def test_shear_centre_on_symmetry_axis(angle_deg):
    # a section symmetric about an axis has its shear centre on that axis (symmetry);
    # a tee's lies at the flange-web junction to thin-walled accuracy (Timoshenko & Gere)
    d, b, tw, tf = 150.0, 120.0, 8.0, 12.0
    shape = affinity.rotate(tee(d, b, tw, tf), angle_deg, origin=(0.0, 0.0))
    r = torsion([shape])
    s, c = math.sin(math.radians(angle_deg)), math.cos(math.radians(angle_deg))
    # the axis of symmetry is the image of the y-axis: direction (-s, c)
    off_axis = r.zs * c + r.ys * s
    assert abs(off_axis) < 1e-4 * d  # the mesh itself is not symmetric: discretisation error only
    along = -r.zs * s + r.ys * c
    assert along == pytest.approx(d - tf / 2, abs=0.05 * tf + 1.0)
    # a mono-symmetric I: on the web's axis, between the flanges, nearer the bigger one
    r2 = torsion([ibeam(300.0, 100.0, 6.0, 10.0, 0.0, b_top=200.0, tf_top=12.0)])
    assert abs(r2.zs) < 1e-4 * 300.0
    # thin-walled: distance from bottom flange centre = hs I_top / (I_top + I_bot)
    i_top, i_bot = 12 * 200**3 / 12, 10 * 100**3 / 12
    hs = 300 - 6 - 5
    assert r2.ys == pytest.approx(5 + hs * i_top / (i_top + i_bot), rel=0.01)


def test_convergence_rate_equilateral_triangle():
    # exact: J = sqrt(3) a^4 / 80 (Timoshenko & Goodier, sec. 107, Prandtl's
    # function for the equilateral triangle). The error in J, an energy, falls as
    # h^4 for quadratic elements (a priori FE estimate, error^2 in the energy norm).
    a = 1.0
    tri = Polygon([(-a / 2, 0.0), (a / 2, 0.0), (0.0, a * math.sqrt(3) / 2)])
    exact = math.sqrt(3) * a**4 / 80
    hs = np.array([0.2, 0.1, 0.05, 0.025])
    err = np.array([abs(torsion([tri], element_size=h).J / exact - 1) for h in hs])
    rate = np.polyfit(np.log(hs), np.log(err), 1)[0]
    assert 3.6 < rate < 4.6
    assert err[-1] < 1e-6


def test_equilateral_triangle_warping_constant():
    # the exact warping function about the centroid is omega = (3 y^2 z - z^3) / (2 h),
    # h the height (it meets d(omega)/dn = y n_z - z n_y on all three sides; derived).
    # Cw = int omega^2 dA, integrated independently with scipy's dblquad.
    a = 1.0
    h = a * math.sqrt(3) / 2
    exact, _ = dblquad(lambda z, y: ((3 * y * y * z - z**3) / (2 * h)) ** 2, -h / 3, 2 * h / 3,
                       lambda y: -(2 * h / 3 - y) / math.sqrt(3), lambda y: (2 * h / 3 - y) / math.sqrt(3))
    tri = Polygon([(-a / 2, -h / 3), (a / 2, -h / 3), (0.0, 2 * h / 3)])
    r = torsion([tri], element_size=0.05)
    assert r.Cw == pytest.approx(exact, rel=1e-5)
    assert r.zs == pytest.approx(0.0, abs=1e-6) and r.ys == pytest.approx(0.0, abs=1e-6)


def test_results_do_not_depend_on_placement():
    # J and Cw are properties of the shape; the shear centre moves with it
    shape = channel(120.0, 60.0, 5.0, 7.0, 6.0)
    r0 = torsion([shape])
    r1 = torsion([affinity.translate(shape, 1000.0, -500.0)])
    assert r1.J == pytest.approx(r0.J, rel=1e-9) and r1.Cw == pytest.approx(r0.Cw, rel=1e-6)
    assert (r1.zs - r0.zs, r1.ys - r0.ys) == pytest.approx((1000.0, -500.0), abs=1e-6)


def test_composite_parts():
    # one material cut into touching parts: the same J as the whole (the mesh conforms)
    whole = torsion([box(-55, 0, 55, 200)], element_size=5.0)
    parts = [box(-55, 0, -5, 200), box(-5, 0, 5, 200), box(5, 0, 55, 200)]
    split = torsion(parts, element_size=5.0)
    assert split.J == pytest.approx(whole.J, rel=1e-4)
    # equal moduli scale GJ and leave J unchanged
    same = torsion(parts, shear_moduli=[3.0, 3.0, 3.0], element_size=5.0)
    assert same.GJ == pytest.approx(3 * split.J, rel=1e-9) and same.J == pytest.approx(split.J, rel=1e-9)
    # a stiff core: GJ lies between the Voigt/Reuss-type bounds, sum of separate parts'
    # GJ (lower: no shear transfer) and the stiff modulus over the whole (upper)
    G = [1.0, 50.0, 1.0]
    comp = torsion(parts, shear_moduli=G, element_size=5.0)
    separate = sum(g * torsion([p], element_size=5.0).J for g, p in zip(G, parts))
    assert separate < comp.GJ < 50.0 * whole.J
    assert comp.J == pytest.approx(comp.GJ / 1.0)
    assert comp.zs == pytest.approx(0.0, abs=1e-4) and comp.ys == pytest.approx(100.0, abs=1e-4)


def test_parts_touching_along_part_of_an_edge_share_nodes():
    # a plate shorter than the timbers beside it: the noded mesh must conform, so with
    # one modulus the split section equals its outline meshed as one polygon
    import shapely

    parts = [box(-55, 0, -5, 200), box(-5, 20, 5, 180), box(5, 0, 55, 200)]
    split = torsion(parts, element_size=5.0)
    whole = torsion([shapely.union_all(parts)], element_size=5.0)
    assert split.J == pytest.approx(whole.J, rel=2e-4)
    assert split.Cw == pytest.approx(whole.Cw, rel=2e-3)


def test_edges_that_meet_only_to_rounding_are_merged():
    # metres from arithmetic: -0.0285 + 0.0225 is not exactly -0.006; the noding must
    # still join the timber's edge and the plate's (this once stalled the mesher)
    import shapely

    c, w = 0.0285, 0.0225
    parts = [box(-c - w, 0.0, -c + w, 0.22), box(-0.006, 0.01, 0.006, 0.21), box(c - w, 0.0, c + w, 0.22)]
    split = torsion(parts, shear_moduli=[0.5e9, 81e9, 0.5e9])
    assert split.n_elements < 5000
    same = torsion(parts)
    whole = torsion([shapely.union_all(parts)], element_size=same.mesh.element_size)
    assert same.J == pytest.approx(whole.J, rel=1e-3)


def test_disconnected_parts_add_their_J():
    # parts that do not touch twist as separate pieces: J is the sum (the two meshes
    # differ slightly, hence the discretisation-level tolerance)
    a = torsion([box(0, 0, 1, 1)], element_size=0.1).J
    two = torsion([box(0, 0, 1, 1), box(3, 0, 4, 1)], element_size=0.1)
    assert two.J == pytest.approx(2 * a, rel=1e-5)
    assert two.J == pytest.approx(2 * saint_venant_rectangle_J(1.0, 1.0), rel=3e-4)
    assert (two.zs, two.ys) == pytest.approx((2.0, 0.5), abs=1e-4)  # symmetry


def test_plate_with_holes_mesh_conforms():
    plate = box(-100, 0, 100, 20).difference(
        __import__("shapely").geometry.MultiPoint([(-50, 10), (50, 10)]).buffer(5, quad_segs=16))
    r = torsion([plate])
    m = r.mesh
    assert m.areas.sum() == pytest.approx(plate.area, rel=1e-12)
    assert r.J < saint_venant_rectangle_J(200.0, 20.0)
    assert r.tau_max > 0 and np.isfinite(r.tau).all()


def test_unit_torque_stress_of_circle():
    # tau_max = T r / J for a circular shaft (strength of materials), T = 1
    r = torsion([circle(2.0)], element_size=0.05)
    assert r.tau_max == pytest.approx(1.0 / (math.pi * 2**4 / 32), rel=0.01)


@pytest.mark.parametrize("bad, cls, words", [
    ([], GeometryError, "at least one polygon"),
    (["not a polygon"], GeometryError, "part 0: expected a shapely Polygon"),
    ([Polygon([(0, 0), (1, 1), (1, 0), (0, 1)])], GeometryError, "part 0: invalid polygon"),
    ([box(0, 0, 1, 1), box(0.5, 0.5, 2, 2)], GeometryError, "parts 0 and 1 overlap"),
    ([Polygon()], GeometryError, "part 0: the polygon is empty"),
])
def test_bad_geometry_is_one_line_error(bad, cls, words):
    with pytest.raises(cls) as info:
        torsion(bad)
    assert words in str(info.value) and "\n" not in str(info.value)


def test_bad_moduli_and_element_size():
    sq = [box(0, 0, 1, 1)]
    for kwargs, words in [
        ({"shear_moduli": [1.0, 2.0]}, "expected 1 values"),
        ({"shear_moduli": [-1.0]}, "shear_moduli[0]: expected a positive modulus"),
        ({"elastic_moduli": ["x"]}, "elastic_moduli"),
        ({"element_size": 0.0}, "element_size: expected a positive length"),
        ({"element_size": "big"}, "element_size: expected a positive length"),
        ({"element_size": 1e-5}, "expected a larger element size"),
        ({"reference_part": 3}, "reference_part"),
    ]:
        with pytest.raises(LeanspanError) as info:
            torsion(sq, **kwargs)
        assert words in str(info.value), kwargs
        assert isinstance(info.value, (InputError, GeometryError))
