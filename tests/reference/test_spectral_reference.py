"""The 2D Fourier route for any source below planes (fluxshadow.physics.spectral).

Physics reference section 2(a): below a plane, use the order-1 Hankel transform for a
horizontal dipole "or a 2D FFT with T(|k|). T depends only on |k|, so it holds for any
source geometry". Checked against the Hankel routes (rows 11 and 13) and, with an
air-only stack, against the closed-form field of a tilted loop. The errors left are
those of the finite window (the incident field's 1/r³ tail is cut at 20 mm).
"""

from __future__ import annotations

import numpy as np

from fluxshadow.physics.loop import loops_field_xyz
from fluxshadow.physics.slab import coaxial_loops_field_below_layers, dipole_field_below_layers
from fluxshadow.physics.spectral import field_below_layers_from_top_bz

D = 35e-6
SIGMA = 5.8e7
H = 0.2e-3
ZO = 0.5e-3
DX = 0.1e-3
X = np.arange(-200, 201) * DX  # ±20 mm
I0 = 200  # index of x = 0
I3 = 230  # index of x = 3 mm


def grid_points(z: float) -> np.ndarray:
    xx, yy = np.meshgrid(X, X)
    return np.column_stack([xx.ravel(), yy.ravel(), np.full(xx.size, z)])


def test_vertical_loop_matches_hankel_row11() -> None:
    """Row 11 geometry (2 mm loop 0.2 mm over 35 µm Cu, 0.5 mm below, 1 MHz): the FFT route
    agrees with the order-0 Hankel integral to 1e-4."""
    bz_top = loops_field_xyz(grid_points(0.0), [0, 0, H], [0, 0, 1], 2e-3)[:, 2]
    b = field_below_layers_from_top_bz(bz_top.reshape(X.size, X.size), DX, ZO, 1e6, [D], [SIGMA])
    b_rho, b_z = coaxial_loops_field_below_layers(2e-3, H, [0.0, 3e-3], ZO, 1e6, [D], [SIGMA])
    assert abs(b[I0, I0, 2] / b_z[0] - 1) < 1e-4
    assert abs(b[I0, I3, 2] / b_z[1] - 1) < 1e-4
    assert abs(b[I0, I3, 0] / b_rho[1] - 1) < 1e-4  # on the +x axis B_x = B_rho
    assert abs(b[I3, I0, 1] / b_rho[1] - 1) < 1e-4  # on the +y axis B_y = B_rho


def test_horizontal_dipole_matches_hankel_row13() -> None:
    """Row 13: the order-1 Hankel integral for a horizontal dipole (m = 1e-6 A·m² along x,
    0.2 mm above the sheet, 1 MHz) against the FFT route, all three components."""
    from fluxshadow.physics.loop import dipole_field_xyz

    pts = grid_points(0.0)
    rel = pts - np.array([0.0, 0.0, H])
    bz_top = dipole_field_xyz(rel, [1e-6, 0.0, 0.0])[:, 2].reshape(X.size, X.size)
    b = field_below_layers_from_top_bz(bz_top, DX, ZO, 1e6, [D], [SIGMA])
    sel = [(I0 + 5, I0 + 10), (I0 - 20, I0 + 7), (I0, I0 + 30)]
    pts_h = np.array([[X[j], X[i], ZO] for i, j in sel])
    ref = dipole_field_below_layers(pts_h, [1e-6, 0, 0], H, 1e6, [D], [SIGMA])
    got = np.array([b[i, j] for i, j in sel])
    assert np.abs(got - ref).max() < 2e-4 * np.abs(ref).max()


def test_tilted_loop_continuation_through_air() -> None:
    """With an air-only stack the route is a pure continuation of the field downwards:
    a horizontal-axis loop's field on the lower plane equals the closed form."""
    centre = [0.0, 0.0, H + 1e-3]
    bz_top = loops_field_xyz(grid_points(0.0), centre, [1.0, 0.3, 0.0], 1e-3)[:, 2]
    b = field_below_layers_from_top_bz(bz_top.reshape(X.size, X.size), DX, ZO, 1e6, [D], [0.0])
    sel = [(I0, I0), (I0, I3), (I3, I0), (I0 + 10, I0 - 30)]
    pts = np.array([[X[j], X[i], -(D + ZO)] for i, j in sel])
    ref = loops_field_xyz(pts, centre, [1.0, 0.3, 0.0], 1e-3)
    got = np.array([b[i, j] for i, j in sel])
    assert np.abs(got.imag).max() < 1e-12 * np.abs(ref).max()
    assert np.abs(got.real - ref).max() < 1e-4 * np.abs(ref).max()
