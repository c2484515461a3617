"""Skin depth and the quasi-static propagation constant of a conductor.

Both kernels broadcast their arguments with numpy rules and do no input checking.
"""

from __future__ import annotations

import numpy as np

from fluxshadow.physics._types import ArrayLike, ComplexArray, FloatArray
from fluxshadow.physics.constants import MU0

__all__ = ["propagation_constant", "skin_depth_m"]


def skin_depth_m(
    freq_hz: ArrayLike, resistivity_ohm_m: ArrayLike, mu_r: ArrayLike = 1.0
) -> FloatArray:
    """Skin depth of a good conductor.

    Parameters
    ----------
    freq_hz : array_like, any shape
        Frequency (Hz), > 0.
    resistivity_ohm_m : array_like, broadcastable
        Resistivity (Ω·m), e.g. :data:`~fluxshadow.physics.constants.RHO_CU_OHM_M`.
    mu_r : array_like, broadcastable, default 1
        Relative permeability (1).

    Returns
    -------
    ndarray, broadcast shape
        δ = √(ρ / (π f μ0 μr)) (m).

    References
    ----------
    Verified: W. C. Johnson, *Transmission Lines and Networks*, McGraw-Hill 1963, p. 58
    (δ_Cu = 6.64/√f cm); the formula also appears in the ECE 3317 notes (fluxshadow physics
    reference, row 1).

    Examples
    --------
    >>> round(float(skin_depth_m(1e6, 1.68e-8)) * 1e6, 3)
    65.234
    """
    f = np.asarray(freq_hz, dtype=np.float64)
    rho = np.asarray(resistivity_ohm_m, dtype=np.float64)
    mu = np.asarray(mu_r, dtype=np.float64)
    return np.asarray(np.sqrt(rho / (np.pi * f * MU0 * mu)), dtype=np.float64)


def propagation_constant(
    k_per_m: ArrayLike, freq_hz: ArrayLike, sigma_s_per_m: ArrayLike, mu_r: ArrayLike = 1.0
) -> ComplexArray:
    """Quasi-static propagation constant γ = √(k² + jωμ0μrσ) inside a conductor.

    A field component varying as exp(j(kx·x + ky·y)) with k = |(kx, ky)| varies across the
    thickness of a conductor as exp(±γz). With k = 0 this is the plane-wave value
    (1 + j)/δ, so ``1 / Re(propagation_constant(0, f, σ))`` is the skin depth.

    Parameters
    ----------
    k_per_m : array_like, any shape
        Spatial (horizontal) wavenumber (1/m), >= 0.
    freq_hz : array_like, broadcastable
        Frequency (Hz).
    sigma_s_per_m : array_like, broadcastable
        Conductivity (S/m); 0 gives γ = k (air).
    mu_r : array_like, broadcastable, default 1
        Relative permeability of the conductor (1).

    Returns
    -------
    ndarray of complex, broadcast shape
        γ (1/m), principal square root (Re γ >= 0).

    References
    ----------
    Derived (fluxshadow physics reference, rows 1 and 9): the diffusion equation
    ∇²A = jωμσA for fields proportional to exp(jωt); Theodoulidis & Kriezis, *Eddy current
    canonical problems* (2006) use the same quantity (exists).
    """
    k = np.asarray(k_per_m, dtype=np.float64)
    omega = 2.0 * np.pi * np.asarray(freq_hz, dtype=np.float64)
    sig = np.asarray(sigma_s_per_m, dtype=np.float64)
    mu = np.asarray(mu_r, dtype=np.float64)
    return np.asarray(np.sqrt(k * k + 1j * omega * MU0 * mu * sig), dtype=np.complex128)
