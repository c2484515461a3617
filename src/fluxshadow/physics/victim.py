"""Coupling from loop sources into a victim trace and its return path; induced EMF.

The victim circuit is the trace plus its return path: for a trace over a solid reference
plane, the return current flows in the plane directly under the trace. Its mutual
inductance with the source is the line integral of the source's vector potential around
that closed path per ampere, M = (1/I) ∮ A·dl, evaluated with Gauss–Legendre rules along
each straight segment.
"""

from __future__ import annotations

import numpy as np
from numpy.polynomial.legendre import leggauss

from fluxshadow.physics._types import ArrayLike, ComplexArray, FloatArray
from fluxshadow.physics.loop import loop_frame_rotation, loops_vector_potential_xyz
from fluxshadow.physics.slab import Model, coaxial_loops_vector_potential_below_layers

__all__ = [
    "harmonic_emf_v",
    "mirror_loops_in_plane",
    "path_gauss_points",
    "path_mutual_inductance_h",
    "slope_emf_v",
    "trace_mutual_inductance_below_layers_h",
    "trace_return_path",
]

_GL_ORDER = 8
_COARSE = 65


def trace_return_path(trace_m: ArrayLike, plane_z_m: float) -> FloatArray:
    """Closed victim path: the trace, then its return directly under it in a plane.

    Parameters
    ----------
    trace_m : array_like, shape (m, 3)
        Trace centre-line vertices (m), m >= 2.
    plane_z_m : float
        Height of the return plane (m).

    Returns
    -------
    ndarray, shape (2m, 3)
        Vertices of the closed path (the closing segment back to the first vertex is
        implied): the trace forward, then its projection onto the plane backward. The
        two vertical end segments stand for the vias or pads.
    """
    t = np.asarray(trace_m, dtype=np.float64)
    back = t[::-1].copy()
    back[:, 2] = plane_z_m
    return np.asarray(np.concatenate([t, back]), dtype=np.float64)


def mirror_loops_in_plane(
    centre_m: ArrayLike, axis: ArrayLike, plane_z_m: float
) -> tuple[FloatArray, FloatArray]:
    """Image loops of circular loops in a perfectly conducting plane z = z0.

    The image of a current element mirrors its position and reverses its horizontal
    components, so a loop's image has the mirrored centre and the axis (nx, ny, −nz) with
    the same current: a vertical-axis loop's image carries the opposite circulation, a
    horizontal-axis loop's image the same moment.

    Parameters
    ----------
    centre_m : array_like, shape (L, 3) or (3,)
        Loop centres (m).
    axis : array_like, shape (L, 3) or (3,)
        Loop axis directions.
    plane_z_m : float
        Height of the conducting plane (m).

    Returns
    -------
    centre_m, axis : ndarrays, shape (L, 3)
        Image centres (m) and axes; use them with the original radii and currents.

    References
    ----------
    Method of images for a perfect conductor (textbook; from memory, fluxshadow physics
    reference row 15).
    """
    c = np.atleast_2d(np.asarray(centre_m, dtype=np.float64)).copy()
    ax = np.atleast_2d(np.asarray(axis, dtype=np.float64)).copy()
    c[:, 2] = 2.0 * plane_z_m - c[:, 2]
    ax[:, 2] = -ax[:, 2]
    return c, ax


def _filament_distance(
    points_m: FloatArray, centre_m: FloatArray, axis: FloatArray, radius_m: FloatArray
) -> FloatArray:
    """Distance of each point to the nearest loop filament, shape (n,)."""
    rot = loop_frame_rotation(axis)
    mats = rot.as_matrix()
    rel = points_m[None, :, :] - centre_m[:, None, :]
    local = np.einsum("lji,lnj->lni", mats, rel)
    rho = np.hypot(local[..., 0], local[..., 1])
    dist = np.hypot(rho - radius_m[:, None], local[..., 2])
    return np.asarray(dist.min(axis=0), dtype=np.float64)


def path_gauss_points(
    vertices_m: ArrayLike,
    *,
    closed: bool = True,
    max_piece_m: float | ArrayLike = np.inf,
    order: int = _GL_ORDER,
) -> tuple[FloatArray, FloatArray]:
    """Gauss–Legendre nodes along a polyline, for ∫ F·dl ≈ Σ F(pᵢ)·dlᵢ.

    Parameters
    ----------
    vertices_m : array_like, shape (m, 3)
        Polyline vertices (m).
    closed : bool, default True
        Add the segment from the last vertex back to the first.
    max_piece_m : float or array_like of shape (segments,), default inf
        Each segment is cut into equal pieces no longer than this (m).
    order : int, default 8
        Gauss–Legendre points per piece.

    Returns
    -------
    points_m, dl_m : ndarrays, shape (P, 3)
        Node positions (m) and weighted tangent vectors (m): the segment direction times
        the node's share of its length.

    References
    ----------
    Composite Gauss–Legendre quadrature (textbook).
    """
    v = np.asarray(vertices_m, dtype=np.float64)
    if closed:
        v = np.concatenate([v, v[:1]])
    start, end = v[:-1], v[1:]
    length = np.linalg.norm(end - start, axis=1)
    keep = length > 0.0
    start, end, length = start[keep], end[keep], length[keep]
    piece = np.broadcast_to(np.asarray(max_piece_m, dtype=np.float64), keep.shape)[keep]
    n_piece = np.maximum(1, np.ceil(length / piece)).astype(np.int64)
    x, w = leggauss(order)
    pts: list[FloatArray] = []
    dls: list[FloatArray] = []
    for s, e, n in zip(start, end, n_piece, strict=True):
        u = (np.arange(n)[:, None] + 0.5 * (x[None, :] + 1.0)) / n  # (n, order) in [0, 1]
        pts.append(s + u.reshape(-1, 1) * (e - s))
        dls.append(np.tile(0.5 * w / n, n)[:, None] * (e - s))
    if not pts:
        return np.zeros((0, 3)), np.zeros((0, 3))
    return np.concatenate(pts), np.concatenate(dls)


def path_mutual_inductance_h(
    vertices_m: ArrayLike,
    centre_m: ArrayLike,
    axis: ArrayLike,
    radius_m: ArrayLike,
    turns: ArrayLike = 1.0,
    *,
    closed: bool = True,
    pec_plane_z_m: float | None = None,
    order: int = _GL_ORDER,
) -> float:
    """Mutual inductance between circular loops and a closed polygonal path.

    M = ∮ A·dl per ampere of source current, A from the loops (plus their images in a
    perfectly conducting plane when ``pec_plane_z_m`` is given). Each segment is cut
    into pieces no longer than half its closest distance to a filament (at least 1/4096
    of the segment), with ``order``-point Gauss–Legendre rules on each piece.

    Parameters
    ----------
    vertices_m : array_like, shape (m, 3)
        Path vertices (m), e.g. from :func:`trace_return_path`.
    centre_m, axis : array_like, shape (L, 3) or (3,)
        Loop centres (m) and axis directions (see
        :func:`~fluxshadow.physics.loop.loops_field_xyz`).
    radius_m : array_like, shape (L,) or scalar
        Loop radii (m).
    turns : array_like, shape (L,) or scalar, default 1
        Turns lumped in each loop (1); all turns carry the same current.
    closed : bool, default True
        Close the path from the last vertex to the first.
    pec_plane_z_m : float, optional
        Height of a perfectly conducting plane (m) whose image currents are included.
        The path should lie on or above it.
    order : int, default 8
        Gauss–Legendre points per piece.

    Returns
    -------
    float
        M (H); the sign follows the path direction and the loops' circulation.

    References
    ----------
    Stokes' theorem / Neumann (textbook); images from memory (fluxshadow physics
    reference row 15).
    """
    c = np.atleast_2d(np.asarray(centre_m, dtype=np.float64))
    ax = np.atleast_2d(np.asarray(axis, dtype=np.float64))
    c, ax = np.broadcast_arrays(c, ax)
    n_loops = c.shape[0]
    a = np.broadcast_to(np.asarray(radius_m, dtype=np.float64), (n_loops,))
    n = np.broadcast_to(np.asarray(turns, dtype=np.float64), (n_loops,))
    if pec_plane_z_m is not None:
        ci, axi = mirror_loops_in_plane(c, ax, pec_plane_z_m)
        c = np.concatenate([c, ci])
        ax = np.concatenate([ax, axi])
        a = np.concatenate([a, a])
        n = np.concatenate([n, n])
    v = np.asarray(vertices_m, dtype=np.float64)
    ends = np.concatenate([v, v[:1]]) if closed else v
    # closest approach of each segment to a filament, from a coarse sampling
    u = np.linspace(0.0, 1.0, _COARSE)
    coarse = ends[:-1, None, :] + u[None, :, None] * (ends[1:] - ends[:-1])[:, None, :]
    dist = _filament_distance(coarse.reshape(-1, 3), c, ax, a).reshape(len(ends) - 1, _COARSE)
    seg_len = np.linalg.norm(ends[1:] - ends[:-1], axis=1)
    # every point of a segment is within half a sample spacing of a sample, so the true
    # closest approach is at least the sampled one minus that
    closest = dist.min(axis=1) - 0.5 * seg_len / (_COARSE - 1)
    piece = np.maximum(0.5 * closest, seg_len / 4096.0)
    pts, dl = path_gauss_points(v, closed=closed, max_piece_m=piece, order=order)
    a_vec = loops_vector_potential_xyz(pts, c, ax, a, n)
    return float(np.sum(a_vec * dl))


def trace_mutual_inductance_below_layers_h(
    trace_xy_m: ArrayLike,
    trace_depth_m: float,
    radius_m: ArrayLike,
    height_m: ArrayLike,
    freq_hz: float,
    thickness_m: ArrayLike,
    sigma_s_per_m: ArrayLike,
    turns: ArrayLike = 1.0,
    *,
    return_depth_m: float = 0.0,
    mu_r: ArrayLike = 1.0,
    model: Model = "full",
    order: int = _GL_ORDER,
) -> complex:
    """Mutual inductance of coaxial loops above a plane stack and a trace below it.

    The trace runs at depth z_t below the bottom surface of the stack and returns in the
    plane directly under (here: over) itself at depth ``return_depth_m``;
    M = (1/I) [∫_trace A·dl − ∫_return A·dl], with A the Hankel-transformed A_φ below
    the stack (shielded by T(k)). The loops' vector potential is horizontal, so the
    vertical end segments add nothing.

    Parameters
    ----------
    trace_xy_m : array_like, shape (m, 2)
        Trace centre-line vertices (m), relative to the loops' common axis.
    trace_depth_m : float
        Depth of the trace below the bottom surface of the stack (m).
    radius_m, height_m : array_like, shape (L,) or scalar
        Loop radii (m) and heights above the top surface (m).
    freq_hz : float
        Frequency (Hz).
    thickness_m, sigma_s_per_m : array_like, shape (P,)
        The stack, top to bottom (σ = 0 everywhere gives the unshielded value).
    turns : array_like, shape (L,) or scalar, default 1
        Turns lumped in each loop (1).
    return_depth_m : float, default 0
        Depth of the return current below the bottom surface (m).
    mu_r, model
        As :func:`~fluxshadow.physics.slab.coaxial_loops_field_below_layers`.
    order : int, default 8
        Gauss–Legendre points per piece (pieces no longer than half the depth of the
        trace below the loops).

    Returns
    -------
    complex
        Phasor M (H); |M| is the coupling, its phase the lag of the eddy currents.

    References
    ----------
    Derived (fluxshadow physics reference row 15b).
    """
    xy = np.asarray(trace_xy_m, dtype=np.float64)
    h = np.atleast_1d(np.asarray(height_m, dtype=np.float64))
    stack = float(np.sum(np.asarray(thickness_m, dtype=np.float64)))
    piece = 0.5 * (float(h.min()) + stack + return_depth_m)
    verts = np.column_stack([xy, np.zeros(len(xy))])
    pts, dl = path_gauss_points(verts, closed=False, max_piece_m=piece, order=order)
    rho = np.hypot(pts[:, 0], pts[:, 1])
    depth = np.concatenate([np.full(len(pts), trace_depth_m), np.full(len(pts), return_depth_m)])
    a_phi = coaxial_loops_vector_potential_below_layers(
        radius_m, height_m, np.concatenate([rho, rho]), depth, freq_hz,
        thickness_m, sigma_s_per_m, turns, mu_r=mu_r, model=model,
    )  # fmt: skip
    with np.errstate(invalid="ignore", divide="ignore"):  # on the axis A = 0 anyway
        cph = np.where(rho > 0.0, pts[:, 0] / rho, 1.0)
        sph = np.where(rho > 0.0, pts[:, 1] / rho, 0.0)
    # A = A_phi * phi_hat, phi_hat = (-sin, cos); dl is horizontal
    a_dot_dl = -sph * dl[:, 0] + cph * dl[:, 1]
    n = len(pts)
    return complex(np.sum(a_phi[:n] * a_dot_dl) - np.sum(a_phi[n:] * a_dot_dl))


def slope_emf_v(mutual_h: ArrayLike, di_dt_a_per_s: ArrayLike) -> FloatArray:
    """EMF induced by a current ramp, e = M dI/dt.

    Parameters
    ----------
    mutual_h : array_like
        Mutual inductance (H) (its magnitude if a phasor).
    di_dt_a_per_s : array_like, broadcastable
        Current slope (A/s), e.g. from :func:`~fluxshadow.physics.buck.buck_slopes`.

    Returns
    -------
    ndarray
        EMF (V), signed as the slope.

    References
    ----------
    Faraday's law (textbook; fluxshadow physics reference row 15).
    """
    m = np.abs(np.asarray(mutual_h))
    return np.asarray(m * np.asarray(di_dt_a_per_s, dtype=np.float64), dtype=np.float64)


def harmonic_emf_v(
    mutual_h: ArrayLike, freq_hz: float, current_a: ArrayLike, order: ArrayLike
) -> ComplexArray:
    """EMF phasor amplitudes of harmonics, eₙ = j n ω M(nω) Iₙ.

    Parameters
    ----------
    mutual_h : array_like, shape (n,) or scalar
        Mutual inductance at each harmonic's frequency (H), real or complex.
    freq_hz : float
        Fundamental frequency (Hz).
    current_a : array_like, shape (n,)
        Harmonic current amplitudes Iₙ (A, peak), e.g. from
        :func:`~fluxshadow.physics.buck.triangle_harmonics_a`.
    order : array_like, shape (n,)
        Harmonic numbers n (1).

    Returns
    -------
    ndarray of complex, shape (n,)
        EMF amplitudes (V, peak); take ``abs``.

    References
    ----------
    Faraday's law per harmonic (textbook; fluxshadow design, victims).
    """
    n = np.asarray(order, dtype=np.float64)
    omega = 2.0 * np.pi * freq_hz * n
    return np.asarray(
        1j * omega * np.asarray(mutual_h) * np.asarray(current_a, dtype=np.float64),
        dtype=np.complex128,
    )
