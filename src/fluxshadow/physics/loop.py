"""Circular filament loops in free space: field, vector potential, flux, inductances.

Frame of one loop ("loop frame"): centre at the origin, axis along +z, current ``I > 0``
flowing counter-clockwise seen from +z (so the field on the axis points to +z).
Cylindrical kernels (``*_cyl``) work in that frame; ``*_xyz`` kernels place loops with any
centre and axis direction and rotate points into each loop's frame
(:class:`scipy.spatial.transform.Rotation`).

Numerics
--------
The textbook elliptic-integral expressions (Simpson et al. 2001) subtract nearly equal
terms near the axis and far away. Here every quantity is written with four positive
integrals over ψ ∈ [0, π/2], with Δ² = 1 − m sin²ψ and m = 4aρ/((a+ρ)² + z²)::

    Js = ∫ sin²ψ/Δ³ dψ = R_D(0, 1, 1−m)/3
    Jc = ∫ cos²ψ/Δ³ dψ = R_D(0, 1−m, 1)/3
    G  = ∫ sin⁴ψ/Δ³ dψ = (Js − Jc)/m
    H  = ∫ sin²ψ cos²ψ/Δ³ dψ = (2 R_D(0, 1−m, 1)/3 − R_F(0, 1−m, 1))/m

(Carlson's symmetric integrals R_F, R_D from :mod:`scipy.special`). The last two lose
digits as m → 0, so below ``m = 0.2`` they come from their power series in m (28 terms,
truncation below 1e-19). Then, with lengths scaled by the loop radius a (ρ' = ρ/a,
z' = z/a, β'² = (1+ρ')² + z'²)::

    B_ρ = μ0 I z' m G / (π a β'³)
    B_z = μ0 I (Js + Jc − ρ' m G) / (π a β'³)
    A_φ = μ0 I m H / (π β')

which are exact rewritings of the Simpson et al. expressions (derived; checked against
them, against magpylib's ``Circle`` and against a numerical Biot–Savart sum in
``tests/reference/test_loop_reference.py``). On the axis m = 0 exactly; on the filament
itself (ρ = a, z = 0) the field is not finite and the kernels return ``nan``.
"""

from __future__ import annotations

from collections.abc import Callable
from math import comb, pi

import numpy as np
from scipy.spatial.transform import Rotation
from scipy.special import elliprd, elliprf

from fluxshadow.physics._types import ArrayLike, BoolArray, FloatArray
from fluxshadow.physics.constants import MU0

__all__ = [
    "coaxial_loops_field_cyl",
    "coaxial_loops_vector_potential_cyl",
    "dipole_field_xyz",
    "dipole_vector_potential_xyz",
    "loop_field_cyl",
    "loop_flux_disc_wb",
    "loop_frame_rotation",
    "loop_vector_potential_cyl",
    "loops_field_xyz",
    "loops_vector_potential_xyz",
    "mutual_inductance_coaxial_h",
    "pec_image_inductance_change_h",
    "ring_self_inductance_h",
]

_M_SERIES = 0.2
"""Below this m, G and H come from their power series."""
_N_SERIES = 28


def _series_coefficients() -> tuple[FloatArray, FloatArray]:
    """Power-series coefficients of G(m) and H(m) (see the module docstring).

    1/Δ³ = Σ c_n mⁿ sin²ⁿψ with c_n = (3/2)_n / n!, and ∫ sin²ʲψ dψ over [0, π/2] is
    W_j = (π/2) C(2j, j) / 4ʲ.
    """
    n = np.arange(_N_SERIES)
    c = np.ones(_N_SERIES)
    for i in range(1, _N_SERIES):
        c[i] = c[i - 1] * (0.5 + i) / i
    w = np.array([0.5 * pi * comb(2 * j, j) / 4.0**j for j in range(_N_SERIES + 3)])
    g = c * w[n + 2]
    h = c * (w[n + 1] - w[n + 2])
    return g, h


_G_COEF, _H_COEF = _series_coefficients()


def _loop_integrals(
    rho_n: FloatArray, z_n: FloatArray
) -> tuple[FloatArray, FloatArray, FloatArray, FloatArray, FloatArray, FloatArray]:
    """Dimensionless building blocks at normalised coordinates ρ' = ρ/a, z' = z/a.

    Returns
    -------
    m, beta, bz_bracket, g, h, on_wire : ndarrays, broadcast shape
        Elliptic parameter m, β' = √((1+ρ')² + z'²), the B_z bracket
        Js + Jc − ρ' m G, G, H (see module docstring) and a mask of points on the
        filament.
    """
    beta2 = (1.0 + rho_n) ** 2 + z_n**2
    alpha2 = (1.0 - rho_n) ** 2 + z_n**2
    on_wire = alpha2 == 0.0
    # q2 = 1 - m computed from alpha2 directly keeps precision next to the filament.
    q2 = np.where(on_wire, 1.0, alpha2 / beta2)
    m = 4.0 * rho_n / beta2
    rd_c = elliprd(0.0, q2, 1.0)
    rd_s = elliprd(0.0, 1.0, q2)
    rf = elliprf(0.0, q2, 1.0)
    small = m < _M_SERIES
    m_safe = np.where(small, 1.0, m)
    g_direct = (rd_s - rd_c) / (3.0 * m_safe)
    h_direct = (2.0 * rd_c / 3.0 - rf) / m_safe
    m_small = np.where(small, m, 0.0)
    g_series = np.polynomial.polynomial.polyval(m_small, _G_COEF)
    h_series = np.polynomial.polynomial.polyval(m_small, _H_COEF)
    g = np.where(small, g_series, g_direct)
    h = np.where(small, h_series, h_direct)
    # Js + Jc - rho' m G: with m G = Js - Jc this is (1 - rho') Js + (1 + rho') Jc, which
    # stays accurate next to the filament, where Js and Jc grow like 1/(1 - m).
    bz_bracket = np.where(
        small,
        (rd_s + rd_c) / 3.0 - rho_n * m * g,
        ((1.0 - rho_n) * rd_s + (1.0 + rho_n) * rd_c) / 3.0,
    )
    return m, np.sqrt(beta2), bz_bracket, g, h, on_wire


def _far_mask(
    radius_m: FloatArray, rho_m: FloatArray, z_m: FloatArray, far_field_radii: float | None
) -> BoolArray | None:
    if far_field_radii is None:
        return None
    return np.asarray(np.hypot(rho_m, z_m) > far_field_radii * radius_m, dtype=np.bool_)


def loop_field_cyl(
    radius_m: ArrayLike,
    rho_m: ArrayLike,
    z_m: ArrayLike,
    current_a: ArrayLike = 1.0,
    *,
    far_field_radii: float | None = None,
) -> tuple[FloatArray, FloatArray]:
    """Magnetic flux density of a circular filament loop, in the loop frame.

    Parameters
    ----------
    radius_m : array_like, any shape
        Loop radius a (m), > 0.
    rho_m, z_m : array_like, broadcastable
        Observation point: distance from the axis ρ (m, >= 0) and height z above the
        loop plane (m).
    current_a : array_like, broadcastable, default 1
        Current (A), positive counter-clockwise seen from +z; for N turns at one place
        pass N·I.
    far_field_radii : float, optional
        If given, points farther than ``far_field_radii * a`` from the loop centre use
        the point dipole m = Iπa² instead (relative error about 1.5 (a/r)²). Off by
        default: the exact form is stable everywhere.

    Returns
    -------
    b_rho_t, b_z_t : ndarrays, broadcast shape
        B_ρ and B_z (T). ``nan`` on the filament itself.

    References
    ----------
    Verified: Simpson, Lane, Immer, Youngquist, *Simple analytic expressions for the
    magnetic field of a circular current loop*, NASA NTRS 20010038494 (2001) (the field in
    K(m), E(m)). Ortner, Leitner, Slanovc, *Magnetism* 3(1):2 (2023) (the loss of
    precision near the axis and far away, and a stable form). The cancellation-free form
    used here (Carlson R_D, R_F and series; module docstring) is derived and checked
    numerically against both (fluxshadow physics reference, rows 2 and 3).

    Examples
    --------
    >>> b_rho, b_z = loop_field_cyl(2e-3, 1e-3, -1e-3)
    >>> round(float(b_z) * 1e6, 3), round(float(b_rho) * 1e6, 4)
    (217.292, -80.8445)
    """
    a = np.asarray(radius_m, dtype=np.float64)
    rho = np.asarray(rho_m, dtype=np.float64)
    z = np.asarray(z_m, dtype=np.float64)
    i = np.asarray(current_a, dtype=np.float64)
    rho_n = rho / a
    z_n = z / a
    m, beta, bz_bracket, g, _h, on_wire = _loop_integrals(rho_n, z_n)
    scale = MU0 * i / (pi * a * beta**3)
    b_rho = scale * z_n * m * g
    b_z = scale * bz_bracket
    b_rho = np.where(on_wire, np.nan, b_rho)
    b_z = np.where(on_wire, np.nan, b_z)
    far = _far_mask(a, rho, z, far_field_radii)
    if far is not None and np.any(far):
        # the point dipole m = I pi a^2 along +z, evaluated at (rho, 0, z)
        r_far, z_far, m_far = np.broadcast_arrays(rho, z, i * pi * a * a)
        zeros = np.zeros(r_far.shape)
        b_dip = dipole_field_xyz(
            np.stack([r_far, zeros, z_far], axis=-1), np.stack([zeros, zeros, m_far], axis=-1)
        )
        b_rho = np.where(far, b_dip[..., 0], b_rho)
        b_z = np.where(far, b_dip[..., 2], b_z)
    return np.asarray(b_rho, dtype=np.float64), np.asarray(b_z, dtype=np.float64)


def loop_vector_potential_cyl(
    radius_m: ArrayLike,
    rho_m: ArrayLike,
    z_m: ArrayLike,
    current_a: ArrayLike = 1.0,
) -> FloatArray:
    """Azimuthal vector potential A_φ of a circular filament loop, in the loop frame.

    Parameters
    ----------
    radius_m : array_like, any shape
        Loop radius a (m), > 0.
    rho_m, z_m : array_like, broadcastable
        Observation point ρ (m, >= 0) and z (m) in the loop frame.
    current_a : array_like, broadcastable, default 1
        Current (A), sign convention as :func:`loop_field_cyl`.

    Returns
    -------
    ndarray, broadcast shape
        A_φ (T·m = Wb/m); ``nan`` on the filament. The flux through the coaxial disc of
        radius ρ at height z is 2πρ A_φ.

    References
    ----------
    Simpson et al., NASA NTRS 20010038494 (2001) give A_φ = μ0 I a ((2−m)K − 2E) /
    (π m √((a+ρ)² + z²)) (verified; fluxshadow physics reference row 3b); the
    cancellation-free form here is derived (module docstring).
    """
    a = np.asarray(radius_m, dtype=np.float64)
    rho_n = np.asarray(rho_m, dtype=np.float64) / a
    z_n = np.asarray(z_m, dtype=np.float64) / a
    i = np.asarray(current_a, dtype=np.float64)
    m, beta, _bz, _g, h, on_wire = _loop_integrals(rho_n, z_n)
    a_phi = MU0 * i * m * h / (pi * beta)
    return np.asarray(np.where(on_wire, np.nan, a_phi), dtype=np.float64)


def loop_flux_disc_wb(
    radius_m: ArrayLike,
    disc_radius_m: ArrayLike,
    z_m: ArrayLike,
    current_a: ArrayLike = 1.0,
) -> FloatArray:
    """Flux of a loop through a coaxial disc, Φ = 2πr A_φ(r, z).

    Parameters
    ----------
    radius_m : array_like
        Loop radius a (m).
    disc_radius_m : array_like, broadcastable
        Disc radius r (m), centred on the loop axis.
    z_m : array_like, broadcastable
        Height of the disc above the loop plane (m).
    current_a : array_like, broadcastable, default 1
        Loop current (A).

    Returns
    -------
    ndarray, broadcast shape
        Flux (Wb), positive along +z for positive current.

    References
    ----------
    Stokes' theorem on A_φ (textbook); fluxshadow physics reference row 3b.
    """
    r = np.asarray(disc_radius_m, dtype=np.float64)
    return np.asarray(
        2.0 * pi * r * loop_vector_potential_cyl(radius_m, r, z_m, current_a), dtype=np.float64
    )


def mutual_inductance_coaxial_h(
    radius_a_m: ArrayLike, radius_b_m: ArrayLike, distance_m: ArrayLike
) -> FloatArray:
    """Mutual inductance of two coaxial circular filaments (Maxwell's formula).

    Computed as the flux of loop a through loop b per ampere, 2πb A_φ(b, d), which is
    algebraically Maxwell's M = μ0√(ab)[(2/k − k)K(k) − (2/k)E(k)],
    k² = 4ab/((a+b)² + d²).

    Parameters
    ----------
    radius_a_m, radius_b_m : array_like, broadcastable
        Radii (m), > 0.
    distance_m : array_like, broadcastable
        Axial separation d (m); d = 0 with a = b is singular (``nan``).

    Returns
    -------
    ndarray, broadcast shape
        M (H).

    References
    ----------
    Exists: Maxwell, *A Treatise on Electricity and Magnetism* (1873) §701, as presented
    in de Queiroz, *Mutual Inductance and Inductance Calculations by Maxwell's Method*;
    Grover, *Inductance Calculations* (1946, Dover 2004) ch. 11. Checked numerically
    against the Neumann double integral (fluxshadow physics reference row 6).
    """
    return loop_flux_disc_wb(radius_a_m, radius_b_m, distance_m, 1.0)


def pec_image_inductance_change_h(
    radius_m: ArrayLike, height_m: ArrayLike, turns: ArrayLike = 1.0
) -> float:
    """Inductance change of a coaxial winding above a perfectly conducting plane.

    The image of each turn is a loop at depth −h carrying the opposite current, so
    ΔL = −Σᵢ Σⱼ Nᵢ Nⱼ M(aᵢ, aⱼ, hᵢ + hⱼ).

    Parameters
    ----------
    radius_m : array_like, shape (L,) or scalar
        Radius of each lumped loop (m).
    height_m : array_like, shape (L,) or scalar
        Height of each loop above the plane (m), > 0.
    turns : array_like, shape (L,) or scalar, default 1
        Turns lumped in each loop (1). For N turns in one place pass ``turns=N``:
        ΔL = −N² M(a, a, 2h).

    Returns
    -------
    float
        ΔL (H), negative.

    References
    ----------
    Method of images for a perfect conductor (textbook, from memory); fluxshadow physics
    reference row 7 (checked against the Hankel integral ∫J1²e^{−2kh}dk).
    """
    a, h, n = np.broadcast_arrays(
        np.atleast_1d(np.asarray(radius_m, dtype=np.float64)),
        np.atleast_1d(np.asarray(height_m, dtype=np.float64)),
        np.atleast_1d(np.asarray(turns, dtype=np.float64)),
    )
    m = mutual_inductance_coaxial_h(a[:, None], a[None, :], h[:, None] + h[None, :])
    return float(-np.einsum("i,ij,j->", n, m, n))


def ring_self_inductance_h(
    radius_m: ArrayLike, wire_radius_m: ArrayLike, internal_y: ArrayLike = 0.0
) -> FloatArray:
    """Self-inductance of a thin circular ring of round wire.

    L = μ0 a (ln(8a/r) − 2 + Y/4), with Y = 0 when the current flows on the wire surface
    (high frequency) and Y = 1 for uniform current (DC). For a tight bundle of N turns
    multiply by N².

    Parameters
    ----------
    radius_m : array_like
        Ring (mean) radius a (m).
    wire_radius_m : array_like, broadcastable
        Wire radius r (m), r ≪ a.
    internal_y : array_like, broadcastable, default 0
        Internal-inductance term Y (1), between 0 (HF) and 1 (DC).

    Returns
    -------
    ndarray, broadcast shape
        L (H).

    References
    ----------
    From memory (Rosa; Grover, *Inductance Calculations*, 1946): the thin-ring formula
    (fluxshadow physics reference row 8; not verified against a stored source).
    """
    a = np.asarray(radius_m, dtype=np.float64)
    r = np.asarray(wire_radius_m, dtype=np.float64)
    y = np.asarray(internal_y, dtype=np.float64)
    return np.asarray(MU0 * a * (np.log(8.0 * a / r) - 2.0 + y / 4.0), dtype=np.float64)


def coaxial_loops_field_cyl(
    radius_m: ArrayLike,
    z_loop_m: ArrayLike,
    rho_m: ArrayLike,
    z_m: ArrayLike,
    current_a: ArrayLike = 1.0,
    *,
    far_field_radii: float | None = None,
) -> tuple[FloatArray, FloatArray]:
    """Field of several coaxial loops (a coil as lumped turns) at points, summed.

    Parameters
    ----------
    radius_m : array_like, shape (L,) or scalar
        Loop radii (m).
    z_loop_m : array_like, shape (L,) or scalar
        Loop heights on the common axis (m).
    rho_m, z_m : array_like, shape (n,) (broadcastable to each other)
        Observation points: distance from the axis and height (m), same axis frame.
    current_a : array_like, shape (L,) or scalar, default 1
        Current of each loop (A); lumped turns carry N·I.
    far_field_radii : float, optional
        See :func:`loop_field_cyl`.

    Returns
    -------
    b_rho_t, b_z_t : ndarrays, shape (n,)
        Summed B_ρ and B_z (T).

    References
    ----------
    Superposition of :func:`loop_field_cyl` (fluxshadow physics reference row 4).
    """
    a, zl, i = (
        np.atleast_1d(np.asarray(v, dtype=np.float64)) for v in (radius_m, z_loop_m, current_a)
    )
    a, zl, i = np.broadcast_arrays(a, zl, i)
    rho, z = np.broadcast_arrays(
        np.atleast_1d(np.asarray(rho_m, dtype=np.float64)),
        np.atleast_1d(np.asarray(z_m, dtype=np.float64)),
    )
    b_rho, b_z = loop_field_cyl(
        a[:, None],
        rho[None, :],
        z[None, :] - zl[:, None],
        i[:, None],
        far_field_radii=far_field_radii,
    )
    return np.asarray(b_rho.sum(axis=0)), np.asarray(b_z.sum(axis=0))


def coaxial_loops_vector_potential_cyl(
    radius_m: ArrayLike,
    z_loop_m: ArrayLike,
    rho_m: ArrayLike,
    z_m: ArrayLike,
    current_a: ArrayLike = 1.0,
) -> FloatArray:
    """A_φ of several coaxial loops at points, summed.

    Parameters and frame as :func:`coaxial_loops_field_cyl`.

    Returns
    -------
    ndarray, shape (n,)
        A_φ (T·m).

    References
    ----------
    Superposition of :func:`loop_vector_potential_cyl`.
    """
    a, zl, i = (
        np.atleast_1d(np.asarray(v, dtype=np.float64)) for v in (radius_m, z_loop_m, current_a)
    )
    a, zl, i = np.broadcast_arrays(a, zl, i)
    rho, z = np.broadcast_arrays(
        np.atleast_1d(np.asarray(rho_m, dtype=np.float64)),
        np.atleast_1d(np.asarray(z_m, dtype=np.float64)),
    )
    a_phi = loop_vector_potential_cyl(
        a[:, None], rho[None, :], z[None, :] - zl[:, None], i[:, None]
    )
    return np.asarray(a_phi.sum(axis=0))


def dipole_field_xyz(points_m: ArrayLike, moment_a_m2: ArrayLike) -> FloatArray:
    """Field of a point magnetic dipole at the origin.

    Parameters
    ----------
    points_m : array_like, shape (..., 3)
        Observation points relative to the dipole (m).
    moment_a_m2 : array_like, shape (..., 3), broadcastable
        Dipole moment (A·m²); a loop or coil has m = N I π a² along its axis.

    Returns
    -------
    ndarray, broadcast shape (..., 3)
        B = μ0/(4π) (3(m·r̂)r̂ − m)/r³ (T); ``nan`` at r = 0.

    References
    ----------
    Textbook (fluxshadow physics reference row 5).
    """
    r = np.asarray(points_m, dtype=np.float64)
    mom = np.asarray(moment_a_m2, dtype=np.float64)
    r2 = np.sum(r * r, axis=-1, keepdims=True)
    with np.errstate(divide="ignore", invalid="ignore"):  # r = 0 gives nan on purpose
        mdotr = np.sum(mom * r, axis=-1, keepdims=True)
        b = MU0 / (4.0 * pi) * (3.0 * mdotr * r / r2 - mom) / (r2 * np.sqrt(r2))
    return np.asarray(np.where(r2 == 0.0, np.nan, b), dtype=np.float64)


def dipole_vector_potential_xyz(points_m: ArrayLike, moment_a_m2: ArrayLike) -> FloatArray:
    """Vector potential of a point magnetic dipole at the origin.

    Parameters
    ----------
    points_m : array_like, shape (..., 3)
        Observation points relative to the dipole (m).
    moment_a_m2 : array_like, shape (..., 3), broadcastable
        Dipole moment (A·m²).

    Returns
    -------
    ndarray, broadcast shape (..., 3)
        A = μ0/(4π) m × r / r³ (T·m); ``nan`` at r = 0.

    References
    ----------
    Textbook (fluxshadow physics reference row 5).
    """
    r = np.asarray(points_m, dtype=np.float64)
    mom = np.asarray(moment_a_m2, dtype=np.float64)
    r2 = np.sum(r * r, axis=-1, keepdims=True)
    with np.errstate(divide="ignore", invalid="ignore"):  # r = 0 gives nan on purpose
        a = MU0 / (4.0 * pi) * np.cross(mom, r) / (r2 * np.sqrt(r2))
    return np.asarray(np.where(r2 == 0.0, np.nan, a), dtype=np.float64)


def loop_frame_rotation(axis: ArrayLike) -> Rotation:
    """Rotations that carry the loop-frame +z axis onto each given axis direction.

    Parameters
    ----------
    axis : array_like, shape (L, 3) or (3,)
        Axis directions (any length > 0; normalised here).

    Returns
    -------
    scipy.spatial.transform.Rotation
        ``L`` rotations (a single one for a (3,) input); ``R.apply(local)`` gives global
        directions. A loop is symmetric about its axis, so the remaining freedom is fixed
        by rotating about ẑ × n (about x̂ when n = −ẑ).
    """
    n = np.asarray(axis, dtype=np.float64)
    single = n.ndim == 1
    n = np.atleast_2d(n)
    n = n / np.linalg.norm(n, axis=1, keepdims=True)
    cross = np.stack([-n[:, 1], n[:, 0], np.zeros(len(n))], axis=1)  # ẑ × n
    s = np.linalg.norm(cross, axis=1)
    angle = np.arctan2(s, n[:, 2])
    with np.errstate(invalid="ignore", divide="ignore"):  # s = 0 handled below
        unit = cross / s[:, None]
    unit = np.where((s == 0.0)[:, None], np.array([1.0, 0.0, 0.0]), unit)
    rot = Rotation.from_rotvec(unit * angle[:, None])
    return rot[0] if single else rot


_BLOCK_PAIRS = 1_000_000
"""Loop-point pairs evaluated at once by the ``*_xyz`` kernels (bounds memory)."""

_LocalKernel = Callable[
    [FloatArray, FloatArray, FloatArray, FloatArray, FloatArray, FloatArray], FloatArray
]


def _sum_over_loops(
    points_m: ArrayLike,
    centre_m: ArrayLike,
    axis: ArrayLike,
    radius_m: ArrayLike,
    current_a: ArrayLike,
    local: _LocalKernel,
) -> FloatArray:
    """Σ over loops of a loop-frame vector kernel, rotated back to the global frame.

    ``local(a (L, 1), rho (L, b), z (L, b), i (L, 1), cos_phi, sin_phi)`` returns the
    loop-frame Cartesian vectors, shape (L, b, 3). Points go in blocks.
    """
    p = np.atleast_2d(np.asarray(points_m, dtype=np.float64))
    c = np.atleast_2d(np.asarray(centre_m, dtype=np.float64))
    ax = np.atleast_2d(np.asarray(axis, dtype=np.float64))
    c, ax = np.broadcast_arrays(c, ax)
    n_loops = c.shape[0]
    a = np.broadcast_to(np.asarray(radius_m, dtype=np.float64), (n_loops,))[:, None]
    i = np.broadcast_to(np.asarray(current_a, dtype=np.float64), (n_loops,))[:, None]
    mats = loop_frame_rotation(ax).as_matrix()  # (L, 3, 3): columns = local axes
    out = np.zeros((p.shape[0], 3))
    step = max(1, _BLOCK_PAIRS // n_loops)
    for start in range(0, p.shape[0], step):
        blk = p[start : start + step]
        rel = blk[None, :, :] - c[:, None, :]
        loc = np.einsum("lji,lnj->lni", mats, rel)  # R^T (p - c)
        x, y, z = loc[..., 0], loc[..., 1], loc[..., 2]
        rho = np.hypot(x, y)
        with np.errstate(invalid="ignore", divide="ignore"):  # rho = 0: any direction
            cos_phi = np.where(rho > 0.0, x / rho, 1.0)
            sin_phi = np.where(rho > 0.0, y / rho, 0.0)
        vec = local(a, rho, z, i, cos_phi, sin_phi)
        out[start : start + step] = np.einsum("lij,lnj->ni", mats, vec)
    return out


def loops_field_xyz(
    points_m: ArrayLike,
    centre_m: ArrayLike,
    axis: ArrayLike,
    radius_m: ArrayLike,
    current_a: ArrayLike = 1.0,
    *,
    far_field_radii: float | None = None,
) -> FloatArray:
    """Summed field of circular loops with any centre and axis direction.

    Parameters
    ----------
    points_m : array_like, shape (n, 3)
        Observation points (m), global frame.
    centre_m : array_like, shape (L, 3) or (3,)
        Loop centres (m).
    axis : array_like, shape (L, 3) or (3,)
        Loop axis directions (normalised here); positive current circulates
        counter-clockwise seen from the tip of the axis.
    radius_m : array_like, shape (L,) or scalar
        Loop radii (m).
    current_a : array_like, shape (L,) or scalar, default 1
        Loop currents (A); lumped turns carry N·I.
    far_field_radii : float, optional
        See :func:`loop_field_cyl`.

    Returns
    -------
    ndarray, shape (n, 3)
        B (T), global frame.

    References
    ----------
    :func:`loop_field_cyl` in each loop's frame, rotated back (scipy ``Rotation``).
    """

    def local(
        a: FloatArray,
        rho: FloatArray,
        z: FloatArray,
        i: FloatArray,
        cph: FloatArray,
        sph: FloatArray,
    ) -> FloatArray:
        b_rho, b_z = loop_field_cyl(a, rho, z, i, far_field_radii=far_field_radii)
        return np.stack([b_rho * cph, b_rho * sph, b_z], axis=-1)

    return _sum_over_loops(points_m, centre_m, axis, radius_m, current_a, local)


def loops_vector_potential_xyz(
    points_m: ArrayLike,
    centre_m: ArrayLike,
    axis: ArrayLike,
    radius_m: ArrayLike,
    current_a: ArrayLike = 1.0,
) -> FloatArray:
    """Summed vector potential of circular loops with any centre and axis direction.

    Parameters
    ----------
    points_m, centre_m, axis, radius_m, current_a
        As :func:`loops_field_xyz`.

    Returns
    -------
    ndarray, shape (n, 3)
        A (T·m), global frame; ``nan`` on a filament.

    References
    ----------
    :func:`loop_vector_potential_cyl` in each loop's frame (A = A_φ φ̂), rotated back.
    """

    def local(
        a: FloatArray,
        rho: FloatArray,
        z: FloatArray,
        i: FloatArray,
        cph: FloatArray,
        sph: FloatArray,
    ) -> FloatArray:
        a_phi = loop_vector_potential_cyl(a, rho, z, i)
        return np.stack([-a_phi * sph, a_phi * cph, np.zeros_like(a_phi)], axis=-1)

    return _sum_over_loops(points_m, centre_m, axis, radius_m, current_a, local)
