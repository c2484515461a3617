"""Reference values for victim coupling (fluxshadow.physics.victim).

Rows 15 and 15b of the fluxshadow physics reference (/work/shared/docs/physics.md). The
source is one turn, a = 2 mm, 1 mm above the reference plane; the trace is 10 mm long,
0.1 mm from the plane and 2 mm off the axis. Independent routes: the flux of B through the
victim rectangle from magpylib's ``Circle`` (with an image circle for the perfect
conductor), the Neumann double integral, and the closed-form A_φ.
"""

from __future__ import annotations

from types import ModuleType
from typing import Any

import numpy as np
import pytest
from numpy.polynomial.legendre import leggauss

from fluxshadow.physics.buck import buck_slopes_a_per_s
from fluxshadow.physics.constants import MU0
from fluxshadow.physics.loop import loop_frame_rotation, loops_field_xyz
from fluxshadow.physics.victim import (
    harmonic_emf_v,
    mirror_loops_in_plane,
    path_gauss_points,
    path_mutual_inductance_h,
    slope_emf_v,
    trace_mutual_inductance_below_layers_h,
    trace_return_path,
)

A = 2e-3
TRACE = np.array([[-5e-3, 2e-3, 0.1e-3], [5e-3, 2e-3, 0.1e-3]])


@pytest.fixture
def magpy() -> ModuleType:
    """magpylib (version 6), an independent loop-field implementation; skips if absent."""
    return pytest.importorskip("magpylib")


def rectangle_flux(sources: Any, y: float, z0: float, z1: float) -> float:
    """∫∫ B_y dx dz over x ∈ [−5, 5] mm, z ∈ [z0, z1] at fixed y (Gauss–Legendre)."""
    gx, wx = leggauss(20)
    edges = np.linspace(-5e-3, 5e-3, 41)
    xs = (0.5 * (edges[:-1, None] + edges[1:, None]) + 0.5 * np.diff(edges)[:, None] * gx).ravel()
    wxs = (0.5 * np.diff(edges)[:, None] * wx).ravel()
    gz, wz = leggauss(12)
    zs = 0.5 * (z0 + z1) + 0.5 * (z1 - z0) * gz
    wzs = 0.5 * (z1 - z0) * wz
    xx, zz = np.meshgrid(xs, zs, indexing="ij")
    pts = np.column_stack([xx.ravel(), np.full(xx.size, y), zz.ravel()])
    by = sources.getB(pts)[:, 1].reshape(xx.shape)
    return float(np.einsum("i,ij,j->", wxs, by, wzs))


def test_trace_over_plane_row15() -> None:
    """Row 15 (textbook Stokes/Neumann; images from memory): |M| = 61.853 pH with a
    transparent plane, 118.159 pH over a perfect conductor; EMF 0.742 mV at 1 A peak and
    1 MHz; 0.467 mV during the high-side on-time of row 18 (12 V → 3.3 V, 2.2 µH)."""
    path = trace_return_path(TRACE, 0.0)
    m_free = path_mutual_inductance_h(path, [0, 0, 1e-3], [0, 0, 1], A)
    m_pec = path_mutual_inductance_h(path, [0, 0, 1e-3], [0, 0, 1], A, pec_plane_z_m=0.0)
    assert abs(m_free) * 1e12 == pytest.approx(61.853, abs=5e-4)
    assert abs(m_pec) * 1e12 == pytest.approx(118.159, abs=5e-4)
    emf = harmonic_emf_v(m_pec, 1e6, [1.0], [1])
    assert abs(complex(emf[0])) * 1e3 == pytest.approx(0.742, abs=5e-4)
    rise, _fall = buck_slopes_a_per_s(12.0, 3.3, 2.2e-6)
    assert abs(float(slope_emf_v(m_pec, rise))) * 1e3 == pytest.approx(0.467, abs=5e-4)


def test_trace_over_plane_row15_against_magpylib(magpy: ModuleType) -> None:
    """Row 15 cross-check (reference: 1.3e-10): the flux of B_y from magpylib's ``Circle``
    through the victim rectangle, with an image circle of opposite current for the
    perfect conductor."""
    path = trace_return_path(TRACE, 0.0)
    m_free = path_mutual_inductance_h(path, [0, 0, 1e-3], [0, 0, 1], A)
    m_pec = path_mutual_inductance_h(path, [0, 0, 1e-3], [0, 0, 1], A, pec_plane_z_m=0.0)

    def circle(current: float, z: float) -> Any:
        return magpy.current.Circle(current=current, diameter=2 * A, position=(0, 0, z))

    flux = rectangle_flux(magpy.Collection(circle(1.0, 1e-3)), 2e-3, 0.0, 0.1e-3)
    pair = magpy.Collection(circle(1.0, 1e-3), circle(-1.0, -1e-3))
    flux_pec = rectangle_flux(pair, 2e-3, 0.0, 0.1e-3)
    # orientation of the path: its vector area ½ Σ rᵢ × rᵢ₊₁ points along ±y
    vec_area = 0.5 * np.cross(path, np.roll(path, -1, axis=0)).sum(axis=0)
    sign = np.sign(vec_area[1])
    assert abs(vec_area[1]) == pytest.approx(10e-3 * 0.1e-3, rel=1e-12)
    assert m_free == pytest.approx(sign * flux, rel=1e-9)
    assert m_pec == pytest.approx(sign * flux_pec, rel=1e-9)


def test_symmetric_trace_links_nothing() -> None:
    """Section 2(c): a trace through the coil's axis under a symmetric loop links no flux."""
    tr = np.array([[-5e-3, 0.0, 0.1e-3], [5e-3, 0.0, 0.1e-3]])
    m = path_mutual_inductance_h(trace_return_path(tr, 0.0), [0, 0, 1e-3], [0, 0, 1], A)
    assert abs(m) < 1e-25


def test_neumann_reciprocity_tilted_loop() -> None:
    """A horizontal-axis loop in general position against the Neumann double integral
    M = μ0/(4π) ∮∮ dl₁·dl₂ / |r₁ − r₂| (textbook), path discretised by Gauss–Legendre and
    the circle by the (spectrally accurate) periodic trapezoid rule."""
    centre = np.array([1e-3, 1.5e-3, 1.2e-3])
    axis = np.array([1.0, 0.2, 0.0])
    path = trace_return_path(
        np.array([[-4e-3, 3e-3, 0.1e-3], [2e-3, 2.5e-3, 0.1e-3], [6e-3, -1e-3, 0.1e-3]]), 0.0
    )
    m = path_mutual_inductance_h(path, centre, axis, 1.5e-3, 3.0)
    t = np.linspace(0, 2 * np.pi, 1024, endpoint=False)
    local = np.stack([np.cos(t), np.sin(t), np.zeros_like(t)], axis=1) * 1.5e-3
    dlocal = (
        np.stack([-np.sin(t), np.cos(t), np.zeros_like(t)], axis=1) * 1.5e-3 * (2 * np.pi / t.size)
    )
    rot = loop_frame_rotation(axis)
    circ = rot.apply(local) + centre
    dcirc = rot.apply(dlocal)
    pts, dl = path_gauss_points(path, max_piece_m=0.05e-3, order=10)
    dist = np.linalg.norm(pts[:, None, :] - circ[None, :, :], axis=2)
    neumann = 3.0 * MU0 / (4 * np.pi) * np.sum((dl @ dcirc.T) / dist)
    assert m == pytest.approx(neumann, rel=1e-8)


def test_images_cancel_normal_field_on_plane() -> None:
    """Perfect-conductor images (from memory): with the mirrored loops the normal field
    vanishes on the plane, for vertical, horizontal and oblique axes."""
    rng = np.random.default_rng(3)
    centre = np.array([[0.0, 0.0, 1e-3], [2e-3, -1e-3, 0.6e-3], [-1e-3, 2e-3, 2e-3]])
    axis = np.array([[0.0, 0.0, 1.0], [1.0, 0.0, 0.0], [0.3, -0.5, 0.8]])
    ci, ai = mirror_loops_in_plane(centre, axis, 0.2e-3)
    pts = np.column_stack([rng.uniform(-8e-3, 8e-3, (300, 2)), np.full(300, 0.2e-3)])
    b_src = loops_field_xyz(pts, centre, axis, 1e-3)
    b = b_src + loops_field_xyz(pts, ci, ai, 1e-3)
    assert np.abs(b[:, 2]).max() < 1e-12 * np.abs(b_src).max()
    np.testing.assert_allclose(b[:, :2], 2 * b_src[:, :2], rtol=1e-12, atol=1e-20)


def test_trace_below_plane_row15b() -> None:
    """Row 15b (derived): trace 0.1 mm below the 35 µm plane it references (σ = 5.8e7),
    plane between source and trace; no plane 54.540 pH (closed-form A_φ, 6e-15); with the
    plane 36.11 pH (3.58 dB) at 100 kHz, 6.062 pH (19.08 dB) at 1 MHz, 0.538 pH
    (40.12 dB) at 10 MHz."""
    xy = TRACE[:, :2]
    m0 = trace_mutual_inductance_below_layers_h(xy, 0.1e-3, A, 1e-3, 1e6, [35e-6], [0.0])
    assert abs(m0) * 1e12 == pytest.approx(54.540, abs=5e-4)
    # closed form: the same rectangle in free space, by the general path integral
    tr = np.column_stack([xy, np.full(2, -1.135e-3)])
    m_closed = path_mutual_inductance_h(trace_return_path(tr, -1.035e-3), [0, 0, 0], [0, 0, 1], A)
    assert m0.real == pytest.approx(m_closed, rel=1e-9)
    assert abs(m0.imag) == 0.0
    for f, m_ref, se_ref, m_tol in [
        (1e5, 36.11, 3.58, 5e-3),
        (1e6, 6.062, 19.08, 5e-4),
        (1e7, 0.538, 40.12, 5e-4),
    ]:
        m = trace_mutual_inductance_below_layers_h(xy, 0.1e-3, A, 1e-3, f, [35e-6], [5.8e7])
        assert abs(m) * 1e12 == pytest.approx(m_ref, abs=m_tol)
        assert 20 * np.log10(abs(m0) / abs(m)) == pytest.approx(se_ref, abs=5e-3)


def test_gauss_points_integrate_exactly() -> None:
    """Composite Gauss–Legendre along a closed polygon: ∮ dl = 0 and
    ½ ∮ (x dy − y dx) = the enclosed area (textbook)."""
    square = np.array([[0, 0, 0], [2, 0, 0], [2, 1, 0], [0, 1, 0]], dtype=float)
    pts, dl = path_gauss_points(square, max_piece_m=0.3)
    np.testing.assert_allclose(dl.sum(axis=0), 0.0, atol=1e-15)
    area = 0.5 * np.sum(pts[:, 0] * dl[:, 1] - pts[:, 1] * dl[:, 0])
    assert area == pytest.approx(2.0, rel=1e-14)


def test_long_trace_close_to_a_winding_converges() -> None:
    """Quadrature robustness (numerical, no outside value): a 60 mm trace passing 0.05 mm
    under the lowest point of a horizontal-axis loop. The automatic piece length must
    already be converged: 8 and 24 Gauss points per piece agree to 1e-9."""
    tr = np.array([[-30e-3, 0.0, 0.1e-3], [30e-3, 0.0, 0.1e-3]])
    path = trace_return_path(tr, 0.0)
    args = (path, [0.0, 0.0, 1.15e-3], [0.0, 1.0, 0.0], 1e-3, 5.0)
    m8 = path_mutual_inductance_h(*args, pec_plane_z_m=0.0)
    m24 = path_mutual_inductance_h(*args, pec_plane_z_m=0.0, order=24)
    assert m8 == pytest.approx(m24, rel=1e-9)
    assert abs(m8) > 0.0
