"""Any source below a stack of planes: the 2D Fourier route.

T(k) of a laterally infinite stack depends only on |k| (see :mod:`fluxshadow.physics.slab`),
so the field of *any* source above the stack (a horizontal-axis coil close to the plane,
where the dipole of :func:`~fluxshadow.physics.slab.dipole_field_below_layers` is poor) is
obtained from its incident B_z sampled on the top surface: transform, multiply by
T(|k|) e^{−|k| z_o}, and transform back. Below the stack, B = −μ0∇Φ with
Φ ∝ e^{j(kx·x + ky·y)} e^{|k|z}, so B_x = j(kx/|k|) B_z and B_y = j(ky/|k|) B_z per
component.

The map is zero-padded before the transform so that the periodic images of the FFT stay
away from the window; the sampled window should reach where the incident field has
fallen to a small fraction of its peak (a few source heights beyond the source), and the
spacing should be a fraction (about 1/4) of the source height above the top surface.
"""

from __future__ import annotations

import numpy as np

from fluxshadow.physics._types import ArrayLike, ComplexArray
from fluxshadow.physics.slab import Model, layers_transmission_reflection

__all__ = ["field_below_layers_from_top_bz"]


def field_below_layers_from_top_bz(
    bz_top_t: ArrayLike,
    spacing_m: float,
    depth_m: float,
    freq_hz: float,
    thickness_m: ArrayLike,
    sigma_s_per_m: ArrayLike,
    *,
    mu_r: ArrayLike = 1.0,
    model: Model = "full",
    pad_factor: int = 2,
) -> ComplexArray:
    """Field below a stack of planes from the incident B_z sampled on its top surface.

    Parameters
    ----------
    bz_top_t : array_like, shape (ny, nx)
        Incident (free-space, no stack) B_z phasor on the top surface of the stack (T),
        on a uniform grid: row i at y = y0 + i·spacing, column j at x = x0 + j·spacing.
    spacing_m : float
        Grid spacing (m), the same along x and y.
    depth_m : float
        Depth below the bottom surface of the stack where the field is wanted (m), >= 0.
    freq_hz : float
        Frequency (Hz).
    thickness_m, sigma_s_per_m : array_like, shape (P,)
        The stack, top to bottom (see
        :func:`~fluxshadow.physics.slab.layers_transmission_reflection`).
    mu_r : array_like, shape (P,) or scalar, default 1
        Relative permeabilities.
    model : {"full", "thin"}
        Slab model.
    pad_factor : int, default 2
        The map is zero-padded to this multiple of its size before the transform.

    Returns
    -------
    ndarray of complex, shape (ny, nx, 3)
        Phasor of B (T) at depth ``depth_m`` under the stack, same grid, components
        (x, y, z up).

    References
    ----------
    Derived (fluxshadow physics reference section 2(a): "a 2D FFT with T(|k|) ... holds for
    any source geometry"); checked against the Hankel routes for a vertical loop and a
    dipole, and against the closed-form field of a tilted loop when the stack is air.
    """
    bz = np.asarray(bz_top_t, dtype=np.complex128)
    ny, nx = bz.shape
    py, px = pad_factor * ny, pad_factor * nx
    spec = np.fft.fft2(bz, s=(py, px))
    ky = 2.0 * np.pi * np.fft.fftfreq(py, d=spacing_m)
    kx = 2.0 * np.pi * np.fft.fftfreq(px, d=spacing_m)
    kxx, kyy = np.meshgrid(kx, ky)
    k = np.hypot(kxx, kyy)
    # the k = 0 term: T is continuous there; evaluate just above zero
    k_eval = np.where(k > 0.0, k, 1e-9 * (2.0 * np.pi / (spacing_m * max(px, py))))
    t, _r = layers_transmission_reflection(
        k_eval, freq_hz, thickness_m, sigma_s_per_m, mu_r, model=model
    )
    bz_k = spec * t * np.exp(-k_eval * depth_m)
    with np.errstate(invalid="ignore", divide="ignore"):  # k = 0 handled by the mask
        ux = np.where(k > 0.0, 1j * kxx / k, 0.0)
        uy = np.where(k > 0.0, 1j * kyy / k, 0.0)
    out = np.empty((ny, nx, 3), dtype=np.complex128)
    out[..., 0] = np.fft.ifft2(bz_k * ux)[:ny, :nx]
    out[..., 1] = np.fft.ifft2(bz_k * uy)[:ny, :nx]
    out[..., 2] = np.fft.ifft2(bz_k)[:ny, :nx]
    return out
