"""The shear-stress plot of a torsion result."""

from __future__ import annotations

import pytest

from leanspan.errors import InputError
from leanspan.report.torsion_plot import plot_shear_stress
from leanspan.sections.torsion import torsion
from test_torsion_shapes import ibeam


@pytest.fixture(scope="module")
def result():
    return torsion([ibeam(300.0, 150.0, 7.1, 10.7, 15.0)])


@pytest.mark.parametrize("suffix, magic", [(".png", b"\x89PNG"), (".svg", b"<?xml")])
def test_writes_file(result, tmp_path, suffix, magic):
    out = tmp_path / f"tau{suffix}"
    plot_shear_stress(result, out, show_mesh=True)
    assert out.read_bytes()[:5].startswith(magic)
    assert not list(tmp_path.glob(".*.tmp"))  # the temporary file was renamed


def test_draws_into_axes(result):
    from matplotlib.figure import Figure

    ax = Figure().add_subplot()
    plot_shear_stress(result, ax, title="I section")
    # colour limits: 0 to the largest nodal |tau| under a unit torque
    mesh_art = ax.collections[0]
    assert mesh_art.get_array().max() == pytest.approx(result.tau_max)
    assert ax.get_title(loc="left") == "I section"


def test_unknown_format(result, tmp_path):
    with pytest.raises(InputError, match="unknown plot format"):
        plot_shear_stress(result, tmp_path / "tau.xyz")
