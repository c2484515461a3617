"""Thin-sheet eddy currents in finite plane copper under filament loops.

Each plane of copper is a current sheet (the copper's mid-plane) meshed with P1 triangles
(:mod:`fluxshadow.physics.mesh`). The sheet current is J = ∇ψ × ẑ (A/m) with a stream
function ψ (A) that is linear on each triangle; quasi-statics gives, for every frequency,

    (R + jωM) ψ = −jω Φ,

- ``R = K / (σt)``, K the P1 stiffness matrix (so ½ψᴴRψ is the power dissipated);
- ``M_ij = μ0/(4π) ∬ ∇φ_i(r)·∇φ_j(r') / |r − r'| dA dA'`` (so ½ψᵀMψ is the magnetic
  energy of the sheet currents), over pairs of triangles of the same sheet and of
  different sheets;
- ``Φ_i = ∫ (∇φ_i × ẑ)·A_src dA``, A_src the vector potential of the loops.

Boundary conditions: ψ = 0 on the exterior ring of each polygon (no current leaves the
copper), and all nodes of one hole share one unknown, which is the net current circulating
around the hole (the *ring current*, positive counter-clockwise seen from +z). A void opened
to the edge by a slot is part of the exterior ring and has no such unknown. Φ in this
vector-potential form includes the flux through the hole itself, which the hole unknown
needs (fluxshadow physics reference, section 3, "Pitfall").

Integrals
---------
All triangle-pair integrals ∬ 1/|r − r'| are exact or nearly so:

- self pairs: closed form ``(4A²/3) Σ_i (1/l_i) ln(P / (P − 2 l_i))`` (P the perimeter;
  derived here by integrating the chord length over directions, checked against quadrature
  in the tests);
- pairs sharing a node or closer than one diameter: a 16-point collapsed Gauss rule on one
  triangle (collapsed at the shared vertex, or graded towards the shared edge) times the
  closed-form potential of the other (Wilton et al., IEEE Trans. AP 32(3), 1984; Graglia,
  IEEE Trans. AP 41(10), 1993; both from memory, checked against direct quadrature in
  the tests), within 5e-4 of the converged pair integral;
- pairs closer than ``near_diameters``: a 7-point rule (Dunavant 1985, degree 5, from
  memory; its exactness is tested) times the closed-form potential;
- pairs closer than ``far_diameters``: 3 x 3 points;
- all other pairs: the centroid rule A A' / |c − c'|.

(Diameters are the longest side of the larger triangle of a pair.) With the default 1.5
and 4 diameters, the most sensitive result, the field under a nearly perfect shield (44 dB
at 10 MHz), is within 1 % of its value with 5 and 16 diameters (other results within
0.3 %); 2 diameters for the centroid rule gave 12 % there, as the fluxshadow physics
reference warns.

The source vector potential is integrated over each triangle with the 7-point rule
(a 16-point rule changes the results by less than 1e-4).

The field of the sheet currents is exact for piecewise-constant currents:
B = μ0/(4π) Σ_T ∇V_T × J_T with V_T(r) = ∫_T dA'/|r − r'| (closed-form gradient: edge
logarithms in the plane, the signed solid angle along z).

Assembly
--------
M is never built from the whole triangle-pair matrix: the triangles are put in Z-order and
cut into compact blocks, and for each block only the lower half of its columns of the
pair matrix is made (centroid rule from a distance block, the near pairs found in that
block and integrated there, each pair once), multiplied into the gradient maps with one
sparse product, and added into the rows of the few nodes the block touches with one small
dense product. The values are those of :func:`triangle_pair_integrals` (the tests check
M against the plain product to rounding); memory is the (n, n) result plus one block.

Frequency sweeps
----------------
R and M are symmetric positive definite. With the Cholesky factor R = LLᵀ, one reduction
of L⁻¹ M L⁻ᵀ to tridiagonal form Q T Qᵀ (the first, and larger, half of a symmetric
eigen-decomposition) makes every frequency a tridiagonal solve plus two O(n²) products,
ψ = L⁻ᵀ Q (ζI + jωT)⁻¹ Qᵀ L⁻¹ (−jωΦ) (ζ = 1 for the thin sheet); see
:class:`SymmetricReduction`.

Thick copper
------------
``copper_model="impedance"`` replaces 1/(σt) by the surface impedance
Z_s = γ0 coth(γ0 t)/σ (γ0 = √(jωμ0σ)), i.e. ζ = γ0 t coth(γ0 t), puts the current sheet on
the copper face towards the loops and multiplies the total field on the far side by
1/cosh(γ0 t) (fluxshadow physics reference, section 3, "Thick copper"). Several planes of
different ζ are then solved directly per frequency. The attenuation 1/cosh is applied to
observation points only; the coupling between planes uses the impedance sheets as they
are.

Mesh and accuracy
-----------------
The mesh is graded (:func:`build_sheet_model`): half the winding-to-sheet gap at the
winding's projection, with nodes laid in layers along it, at most twice that inside it,
growing by 0.25 per unit distance to 1 mm; copper edges are refined by their distance to
the winding. For the validation case of the fluxshadow physics reference (section 3: a
20 mm sheet of 35 µm copper under a 10-turn, 2 mm loop 0.2 mm above) this gives about
1,600 nodes and, against the infinite thin-sheet Hankel integral, fields 0.5 mm below
within 1.1 %, ΔL within 0.4 % and ΔR within 1.3 % from 100 kHz to 10 MHz
(``tests/reference/test_sheet_reference.py``). Loss near copper edges close to a winding
does not converge in a thin-sheet model (edge current ~ 1/√distance; same section): report
ΔR there with care. Loops whose axis is tilted by more than 60° from the sheet normal get
no node layers; a horizontal-axis loop was within 4 % of the 2D-FFT route.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass, replace
from itertools import chain
from math import ceil, pi
from typing import Literal

import numpy as np
import scipy.linalg as sla
import scipy.linalg.lapack as sla_lapack
import scipy.sparse as sp
from numpy.polynomial.legendre import leggauss
from scipy.spatial import cKDTree
from scipy.spatial.distance import cdist

from fluxshadow.errors import InputError, LimitError
from fluxshadow.physics._types import ArrayLike, ComplexArray, FloatArray
from fluxshadow.physics.constants import MU0, SIGMA_CU_S_PER_M
from fluxshadow.physics.loop import (
    loop_frame_rotation,
    loops_field_xyz,
    loops_vector_potential_xyz,
)
from fluxshadow.physics.mesh import (
    IntArray,
    Polygon,
    SizeField,
    TriMesh,
    mesh_polygons,
    points_in_polygon,
    triangle_areas,
)

__all__ = [
    "CopperModel",
    "LoopSource",
    "PlaneSheet",
    "SheetModel",
    "SheetSolution",
    "SymmetricReduction",
    "build_sheet_model",
    "collapsed_gauss_rule",
    "dunavant7_rule",
    "solve_sheets",
    "triangle_pair_integrals",
    "triangle_potential",
    "triangle_potential_gradient",
    "triangle_self_integral",
]

CopperModel = Literal["thin", "impedance"]
"""``"thin"``: a sheet of conductance σt at the mid-plane (d ≪ δ). ``"impedance"``: the
surface-impedance sheet for thick copper (d/δ above about 0.7), see the module docstring."""

_C = MU0 / (4.0 * pi)
_BLOCK = 400_000
"""Point-triangle pairs evaluated at once by the closed-form kernels."""
_PAIR_BLOCK = 8_192
"""Triangle pairs of the point rule evaluated at once (arrays of 64 kB stay in cache)."""
_KERNEL_BLOCK = 400_000
"""Entries of the triangle-pair kernel made at once when M is assembled (3.2 MB)."""

_D7_A1, _D7_B1, _D7_W1 = 0.059715871789770, 0.470142064105115, 0.132394152788506
_D7_A2, _D7_B2, _D7_W2 = 0.797426985353087, 0.101286507323456, 0.125939180544827


def dunavant7_rule() -> tuple[FloatArray, FloatArray]:
    """The 7-point degree-5 symmetric rule on a triangle.

    Returns
    -------
    bary, weights : ndarrays, shapes (7, 3) and (7,)
        Barycentric coordinates and weights (summing to 1; multiply by the area).

    References
    ----------
    Dunavant, *High degree efficient symmetrical Gaussian quadrature rules for the
    triangle*, IJNME 21 (1985) (from memory; exactness for degree <= 5 is tested).
    """
    bary = [[1.0 / 3.0] * 3]
    for a, b in ((_D7_A1, _D7_B1), (_D7_A2, _D7_B2)):
        bary += [[a, b, b], [b, a, b], [b, b, a]]
    w = [0.225] + [_D7_W1] * 3 + [_D7_W2] * 3
    return np.asarray(bary, dtype=np.float64), np.asarray(w, dtype=np.float64)


def collapsed_gauss_rule(order: int) -> tuple[FloatArray, FloatArray]:
    """Conical-product (collapsed Gauss–Legendre) rule on a triangle, order² points.

    Maps the unit square to the triangle by (s, t) = (u, v(1 − u)); exact for
    polynomials of degree <= 2·order − 2 (textbook, Stroud 1971, from memory).

    Parameters
    ----------
    order : int
        Gauss–Legendre points per direction.

    Returns
    -------
    bary, weights : ndarrays, shapes (order², 3) and (order²,)
        Barycentric coordinates and weights (summing to 1).
    """
    x, w = leggauss(order)
    x = 0.5 * (x + 1.0)
    w = 0.5 * w
    u, v = np.meshgrid(x, x, indexing="ij")
    wu, wv = np.meshgrid(w, w, indexing="ij")
    s = u.ravel()
    t = (v * (1.0 - u)).ravel()
    weights = 2.0 * (wu * wv * (1.0 - u)).ravel()
    return np.column_stack([1.0 - s - t, s, t]), np.asarray(weights, dtype=np.float64)


def _edge_graded_rule(order: int) -> tuple[FloatArray, FloatArray]:
    """Collapsed Gauss rule graded (u = x²) towards the edge opposite vertex 1.

    For integrands with a u log u behaviour at that edge (the potential of a triangle
    sharing the edge); 2e-4 on edge-sharing pairs with order 4, against 1e-3 ungraded.
    """
    x, w = leggauss(order)
    x = 0.5 * (x + 1.0)
    w = 0.5 * w
    ug = x * x
    wu = 2.0 * w * x
    u, v = np.meshgrid(ug, x, indexing="ij")
    wwu, wwv = np.meshgrid(wu, w, indexing="ij")
    s = u.ravel()
    t = (v * (1.0 - u)).ravel()
    weights = 2.0 * (wwu * wwv * (1.0 - u)).ravel()
    return np.column_stack([1.0 - s - t, s, t]), np.asarray(weights, dtype=np.float64)


_D7 = dunavant7_rule()
# the degree-2 rule with points at (2/3, 1/6, 1/6) and permutations
_D3 = (np.array([[4.0, 1.0, 1.0], [1.0, 4.0, 1.0], [1.0, 1.0, 4.0]]) / 6.0, np.full(3, 1.0 / 3.0))
_SOURCE_RULE = _D7
_FINE_RULE = collapsed_gauss_rule(4)
_EDGE_RULE = _edge_graded_rule(4)
_FIELD_EXACT = 4.0


# --------------------------------------------------------------------------------------
# closed-form kernels of a uniform triangle
# --------------------------------------------------------------------------------------


_Frames = tuple[FloatArray, FloatArray, FloatArray, FloatArray]
_RuleCache = dict[tuple[str, int], tuple[FloatArray, FloatArray]]
"""Per-triangle arrays of the pair rules, kept between calls on the same triangles."""


def _edge_frames(vertices: FloatArray) -> _Frames:
    """Start vertex, unit tangent, outward unit normal and length of each edge.

    Shapes (..., 3, 2), (..., 3, 2), (..., 3, 2) and (..., 3). Edge e runs from vertex e
    to vertex e+1 (counter-clockwise triangles).
    """
    start = vertices
    tan = np.roll(vertices, -1, axis=-2) - start
    length = np.hypot(tan[..., 0], tan[..., 1])
    tan = tan / length[..., None]
    normal = np.stack([tan[..., 1], -tan[..., 0]], axis=-1)
    return start, tan, normal, length


def _edge_terms(
    rho: FloatArray, d: FloatArray, frames: _Frames
) -> tuple[FloatArray, FloatArray, FloatArray, FloatArray, FloatArray, FloatArray, FloatArray]:
    """Per-edge quantities of the closed-form kernels, broadcast shape (..., 3).

    ``rho`` (..., 2) and ``d`` (...) are the in-plane position and the height over the
    triangle's plane; ``frames`` broadcastable. Returns P0 (signed distance of the
    projected point to the edge line, positive inside), f = ln((R+ + l+)/(R- + l-)),
    R0², l+, l-, R+, R-.
    """
    start, tan, _normal, length = frames
    ax = start[..., 0] - rho[..., None, 0]
    ay = start[..., 1] - rho[..., None, 1]
    tx, ty = tan[..., 0], tan[..., 1]
    lm = ax * tx + ay * ty
    lp = lm + length
    p0 = ax * ty - ay * tx
    r02 = p0 * p0
    if np.any(d != 0.0):
        r02 = r02 + (d * d)[..., None]
    rp = np.sqrt(lp * lp + r02)
    rm = np.sqrt(lm * lm + r02)
    # ln((R+ + l+)/(R- + l-)) = −ln((R+ − l+)/(R- − l-)); with s = sign(l+ + l-) the form
    # s ln((R+ + s l+)/(R- + s l-)) has no cancellation
    sgn = np.where(lp + lm > 0.0, 1.0, -1.0)
    with np.errstate(divide="ignore", invalid="ignore"):  # point on an edge: f infinite
        f = sgn * np.log((rp + sgn * lp) / (rm + sgn * lm))
    return p0, f, r02, lp, lm, rp, rm


def _potential(rho: FloatArray, d: FloatArray, frames: _Frames) -> FloatArray:
    """Closed-form V of triangles at points, broadcast shape of ``d`` (see callers)."""
    p0, f, r02, lp, lm, rp, rm = _edge_terms(rho, d, frames)
    with np.errstate(invalid="ignore"):  # 0 x inf on an edge line, replaced below
        term = p0 * f
    if not np.all(np.isfinite(term)):
        # P0 = 0 (point on an edge line) contributes nothing, even where f is infinite
        term = np.where(p0 == 0.0, 0.0, term)
    out = np.sum(term, axis=-1)
    if np.any(d != 0.0):
        ad = np.abs(d)[..., None]
        with np.errstate(invalid="ignore"):  # R0 = d = 0 gives 0/0, multiplied by d = 0
            ang = np.arctan2(p0 * lp, r02 + ad * rp) - np.arctan2(p0 * lm, r02 + ad * rm)
        out = out - np.abs(d) * np.sum(np.where(ad > 0.0, ang, 0.0), axis=-1)
    return np.asarray(out, dtype=np.float64)


def triangle_potential(
    points_m: ArrayLike, vertices_m: ArrayLike, plane_z_m: ArrayLike
) -> FloatArray:
    """V(r) = ∫_T dA'/|r − r'| of a uniform triangle, point by point.

    Parameters
    ----------
    points_m : array_like, shape (m, 3)
        Observation points (m).
    vertices_m : array_like, shape (m, 3, 2)
        Vertices (m) of the triangle paired with each point, counter-clockwise.
    plane_z_m : array_like, shape (m,)
        Height of each triangle's plane (m).

    Returns
    -------
    ndarray, shape (m,)
        V (m): the potential per unit surface density, finite everywhere.

    References
    ----------
    Wilton, Rao, Glisson, Schaubert, Al-Bundak, Butler, IEEE Trans. AP 32(3) (1984), and
    Graglia, IEEE Trans. AP 41(10) (1993): V = Σ_e [P0 ln((R+ + l+)/(R- + l-)) −
    |d| (atan(P0 l+/(R0² + |d|R+)) − atan(P0 l-/(R0² + |d|R-)))] (from memory; checked
    against direct quadrature in the tests).
    """
    p = np.asarray(points_m, dtype=np.float64).reshape(-1, 3)
    v = np.asarray(vertices_m, dtype=np.float64).reshape(-1, 3, 2)
    d = p[:, 2] - np.asarray(plane_z_m, dtype=np.float64).reshape(-1)
    return _potential(p[:, :2], d, _edge_frames(v))


def triangle_potential_gradient(
    points_m: ArrayLike, vertices_m: ArrayLike, plane_z_m: ArrayLike
) -> FloatArray:
    """∇V of a uniform triangle, V as :func:`triangle_potential`.

    Parameters
    ----------
    points_m, vertices_m, plane_z_m
        As :func:`triangle_potential`; points must not lie on the triangle's edges.

    Returns
    -------
    ndarray, shape (m, 3)
        ∇V (1). In the plane: −Σ_e n̂_e ln((R+ + l+)/(R- + l-)) (n̂_e the outward edge
        normal; divergence theorem); along z: ∂V/∂z = −d ∫ dA'/R³, the solid angle of
        the triangle seen from the point, negative above the plane.

    References
    ----------
    Derived (the in-plane part by the divergence theorem on ∇'(1/R); the z part is the
    solid angle, computed with the Van Oosterom & Strackee formula, IEEE Trans. BME 30(2),
    1983, from memory). Checked against finite differences of :func:`triangle_potential`.
    """
    p = np.asarray(points_m, dtype=np.float64).reshape(-1, 3)
    v = np.asarray(vertices_m, dtype=np.float64).reshape(-1, 3, 2)
    d = p[:, 2] - np.asarray(plane_z_m, dtype=np.float64).reshape(-1)
    frames = _edge_frames(v)
    f = _edge_terms(p[:, :2], d, frames)[1]
    g_xy = -np.sum(frames[2] * f[..., None], axis=1)
    # signed solid angle: vertices relative to the point
    rel = np.concatenate(
        [v - p[:, None, :2], np.broadcast_to(-d[:, None, None], (len(p), 3, 1))], axis=2
    )
    a, b, c = rel[:, 0], rel[:, 1], rel[:, 2]
    na, nb, nc = (np.linalg.norm(x, axis=1) for x in (a, b, c))
    num = np.einsum("ij,ij->i", a, np.cross(b, c))
    den = (
        na * nb * nc
        + np.einsum("ij,ij->i", a, b) * nc
        + np.einsum("ij,ij->i", a, c) * nb
        + np.einsum("ij,ij->i", b, c) * na
    )
    g_z = 2.0 * np.arctan2(num, den)
    return np.asarray(np.column_stack([g_xy, g_z]), dtype=np.float64)


def triangle_self_integral(vertices_m: ArrayLike) -> FloatArray:
    """∬_{T×T} dA dA' / |r − r'| of a triangle with itself, in closed form.

    Parameters
    ----------
    vertices_m : array_like, shape (t, 3, 2)
        Triangle vertices (m), either orientation.

    Returns
    -------
    ndarray, shape (t,)
        The integral (m³): (4A²/3) Σ_i (1/l_i) ln(P / (P − 2 l_i)), l_i the sides,
        P the perimeter, A the area.

    References
    ----------
    Derived: in polar coordinates around r, the integral is ∫dθ over all directions of
    ∫ (chord²/2) dp, and for a triangle ∫chord² dp = 4A²/(3 W(θ)) with W the width
    across the direction; W is l_i |sin| of the angle to the side opposite the vertex
    whose angle contains the direction, and the remaining integral is elementary.
    Checked against high-order quadrature in the tests.
    """
    v = np.asarray(vertices_m, dtype=np.float64).reshape(-1, 3, 2)
    sides = np.linalg.norm(np.roll(v, -1, axis=1) - v, axis=2)
    per = sides.sum(axis=1, keepdims=True)
    area = np.abs(
        0.5
        * (
            (v[:, 1, 0] - v[:, 0, 0]) * (v[:, 2, 1] - v[:, 0, 1])
            - (v[:, 2, 0] - v[:, 0, 0]) * (v[:, 1, 1] - v[:, 0, 1])
        )
    )
    terms = np.log(per / (per - 2.0 * sides)) / sides
    return np.asarray(4.0 * area * area / 3.0 * terms.sum(axis=1), dtype=np.float64)


def _pair_distances(points: FloatArray, a: IntArray, b: IntArray) -> FloatArray:
    """|points[a] − points[b]| pair by pair; points (t, k), a and b (m,)."""
    acc = np.zeros(len(a))
    for c in range(points.shape[1]):
        col = np.ascontiguousarray(points[:, c])
        diff = col[a] - col[b]
        diff *= diff
        acc += diff
    return np.asarray(np.sqrt(acc), dtype=np.float64)


def _rule_points(vertices: FloatArray, bary: FloatArray) -> FloatArray:
    """Points of a barycentric rule on every triangle, shape (t, q, 2) (m)."""
    return np.asarray(np.einsum("qk,tkc->tqc", bary, vertices), dtype=np.float64)


def _potential_rule(
    vertices: FloatArray,
    plane_z: FloatArray,
    area: FloatArray,
    i: IntArray,
    j: IntArray,
    rule: tuple[FloatArray, FloatArray],
    frames: _Frames,
    perm: IntArray | None = None,
    cache: _RuleCache | None = None,
) -> FloatArray:
    """∫_{T_i} V_{T_j} dA with a rule on T_i and the closed-form V, pair by pair.

    ``perm`` (pairs, 3) reorders the vertices of T_i for the rule (which vertex the
    collapsed rules gather at). V as :func:`triangle_potential`, with the edge logarithm
    in the form ln((R+ + l+)/(R- + l-)) = asinh(l+/R0) − asinh(l-/R0) (the same
    function; no cancellation for either sign of l±, and cheaper). ``cache`` keeps the
    per-triangle arrays between calls on the same triangles.
    """
    bary, w = rule
    q = len(w)
    out = np.empty(len(i))
    if len(i) == 0:
        return out
    step = max(1, _BLOCK // (3 * q))
    cache = {} if cache is None else cache
    # edge data one contiguous (t, 3) array per component
    start, tan, _normal, length = frames
    if ("edges", 0) not in cache:
        cache["edges", 0] = (
            np.stack([start[..., 0], start[..., 1]]),
            np.stack([tan[..., 0], tan[..., 1]]),
        )
    (sx, sy), (tx, ty) = cache["edges", 0]
    # the rule's points on every triangle, for each cyclic reordering of its vertices
    # (the reorderings of the callers are cyclic: perm = (r + 2, r, r + 1) mod 3)
    rot = np.ones(len(i), dtype=np.int64) if perm is None else perm[:, 1]
    cyclic = perm is None or bool(np.all(perm == (rot[:, None] + np.array([2, 0, 1])) % 3))
    qx_rot = qy_rot = None
    if cyclic:
        key = ("rotated", id(bary))
        if key not in cache:
            qall = np.stack(
                [_rule_points(vertices[:, [(r + 2) % 3, r, (r + 1) % 3]], bary) for r in range(3)]
            )  # (3, t, q, 2)
            cache[key] = (np.ascontiguousarray(qall[..., 0]), np.ascontiguousarray(qall[..., 1]))
        qx_rot, qy_rot = cache[key]
    planar = bool(np.all(plane_z == plane_z[0]))
    for s in range(0, len(i), step):
        ii, jj = i[s : s + step], j[s : s + step]
        if qx_rot is not None and qy_rot is not None:
            rr = rot[s : s + step]
            px, py = qx_rot[rr, ii], qy_rot[rr, ii]  # (p, q)
        else:  # a reordering that is not cyclic (only a caller's perm gets here)
            order = np.tile(np.arange(3), (len(i), 1)) if perm is None else perm
            vi = np.take_along_axis(vertices[ii], order[s : s + step, :, None], axis=1)
            pts = np.einsum("qk,pkc->pqc", bary, vi)  # (p, q, 2)
            px, py = pts[..., 0], pts[..., 1]
        # (p, q, 3): rule point of T_i against each edge of T_j
        ax = sx[jj][:, None, :] - px[:, :, None]
        ay = sy[jj][:, None, :] - py[:, :, None]
        txj, tyj = tx[jj][:, None, :], ty[jj][:, None, :]
        lm = ax * txj
        lm += ay * tyj
        p0 = ax * tyj
        p0 -= ay * txj
        r02 = p0 * p0
        d = None
        if not planar:
            d = (plane_z[ii] - plane_z[jj])[:, None, None]
            r02 += d * d
        lp = lm + length[jj][:, None, :]
        r0 = np.sqrt(r02)
        # R0 = 0 only on an edge line in the plane, where P0 = 0 and the term is 0
        r0[r0 == 0.0] = 1.0
        f = np.arcsinh(lp / r0)
        f -= np.arcsinh(lm / r0)
        f *= p0
        pot = f.sum(axis=-1)
        if d is not None and np.any(d != 0.0):
            ad = np.abs(d)
            rp = np.sqrt(lp * lp + r02)
            rm = np.sqrt(lm * lm + r02)
            with np.errstate(invalid="ignore"):  # R0 = d = 0 gives 0/0, times d = 0
                ang = np.arctan2(p0 * lp, r02 + ad * rp) - np.arctan2(p0 * lm, r02 + ad * rm)
            pot -= ad[..., 0] * np.sum(np.where(ad > 0.0, ang, 0.0), axis=-1)
        out[s : s + step] = area[ii] * (pot @ w)
    return out


def _point_rule(
    vertices: FloatArray,
    plane_z: FloatArray,
    area: FloatArray,
    i: IntArray,
    j: IntArray,
    rule: tuple[FloatArray, FloatArray],
    cache: _RuleCache | None = None,
) -> FloatArray:
    """∬ 1/|r − r'| with the same point rule on both triangles, pair by pair.

    The pairs must be apart (no point of one on a point of the other). ``cache`` keeps
    the rule's points between calls on the same triangles.
    """
    bary, w = rule
    q = len(w)
    out = np.empty(len(i))
    if len(i) == 0:
        return out
    cache = {} if cache is None else cache
    key = ("points", id(bary))
    if key not in cache:
        qall = _rule_points(vertices, bary)
        # point-major layout: one contiguous row per rule point, gathered per block
        cache[key] = (np.ascontiguousarray(qall[..., 0].T), np.ascontiguousarray(qall[..., 1].T))
    qx, qy = cache[key]  # (q, t)
    planar = bool(np.all(plane_z == plane_z[0]))
    for s in range(0, len(i), _PAIR_BLOCK):
        ii, jj = i[s : s + _PAIR_BLOCK], j[s : s + _PAIR_BLOCK]
        xi, yi, xj, yj = qx[:, ii], qy[:, ii], qx[:, jj], qy[:, jj]
        dz = plane_z[ii] - plane_z[jj]
        dz2 = None if planar else dz * dz
        acc = np.zeros(len(ii))
        for a in range(q):
            for b in range(q):
                r2 = xi[a] - xj[b]
                r2 *= r2
                dy = yi[a] - yj[b]
                dy *= dy
                r2 += dy
                if dz2 is not None:
                    r2 += dz2
                np.sqrt(r2, out=r2)
                np.divide(w[a] * w[b], r2, out=r2)
                acc += r2
        out[s : s + _PAIR_BLOCK] = area[ii] * area[jj] * acc
    return out


def triangle_pair_integrals(
    vertices_m: ArrayLike,
    plane_z_m: ArrayLike,
    *,
    node_ids: ArrayLike | None = None,
    near_diameters: float = 1.5,
    far_diameters: float = 4.0,
    per_unit_area: bool = False,
) -> FloatArray:
    """Matrix G_ab = ∬_{T_a × T_b} dA dA' / |r − r'| over all pairs of triangles.

    Parameters
    ----------
    vertices_m : array_like, shape (t, 3, 2)
        Triangle vertices (m), counter-clockwise.
    plane_z_m : array_like, shape (t,)
        Plane height of each triangle (m) (parallel planes).
    node_ids : array_like of int, shape (t, 3), optional
        Global node indices; triangles sharing one are integrated with the finest rule.
    near_diameters, far_diameters : float
        Pairs whose centroids are closer than this many diameters (longest side of the
        larger triangle) use the closed-form potential with 7 points, resp. 3 x 3 points;
        farther pairs use the centroid rule.
    per_unit_area : bool, default False
        Return G_ab / (A_a A_b) (1/m) instead, the mean of 1/|r − r'|.

    Returns
    -------
    ndarray, shape (t, t)
        G (m⁴), or G / (A_a A_b) (1/m), symmetric.

    References
    ----------
    See the module docstring for each rule and its source. With the defaults the matrix
    M of the solver is within about 1e-3 of its converged value on the entries that
    matter most (the field under a nearly perfect shield).
    """
    v = np.asarray(vertices_m, dtype=np.float64).reshape(-1, 3, 2)
    z = np.asarray(plane_z_m, dtype=np.float64).reshape(-1)
    pairs = _near_pairs(v, z, node_ids, near_diameters, far_diameters)
    idx = np.arange(len(v))
    # centroid rule everywhere first (the near pairs and the diagonal are replaced)
    k = cdist(pairs.centroid_m, pairs.centroid_m)
    k[idx, idx] = 1.0
    np.divide(1.0, k, out=k)
    k[pairs.a, pairs.b] = pairs.value_per_m
    k[pairs.b, pairs.a] = pairs.value_per_m
    k[idx, idx] = pairs.self_per_m
    if not per_unit_area:
        k *= np.outer(pairs.area_m2, pairs.area_m2)  # A_a A_b = A_b A_a: G stays symmetric
    return np.asarray(k, dtype=np.float64)


@dataclass(frozen=True, kw_only=True, eq=False)
class _NearPairs:
    """Triangle pairs that need more than the centroid rule (see _near_pairs)."""

    a: IntArray
    b: IntArray
    value_per_m: FloatArray
    self_per_m: FloatArray
    centroid_m: FloatArray
    area_m2: FloatArray


@dataclass(frozen=True, kw_only=True, eq=False)
class _Triangles:
    """Per-triangle data of the pair integrals (see :func:`_triangles`)."""

    vertices_m: FloatArray
    z_m: FloatArray
    node_ids: IntArray | None
    area_m2: FloatArray
    centroid_m: FloatArray
    diameter_m: FloatArray
    frames: _Frames
    cache: _RuleCache


def _triangles(v: FloatArray, z: FloatArray, node_ids: ArrayLike | None) -> _Triangles:
    """Areas, centroids (t, 3), diameters (longest sides) and edge frames of triangles."""
    n = len(v)
    return _Triangles(
        vertices_m=v,
        z_m=z,
        node_ids=None if node_ids is None else np.asarray(node_ids, dtype=np.int64).reshape(-1, 3),
        area_m2=np.abs(triangle_areas(v.reshape(-1, 2), np.arange(3 * n).reshape(-1, 3))),
        centroid_m=np.column_stack([v.mean(axis=1), z]),
        diameter_m=np.linalg.norm(np.roll(v, -1, axis=1) - v, axis=2).max(axis=1),
        frames=_edge_frames(v),
        cache={},
    )


def _pair_values(
    tri: _Triangles, a: IntArray, b: IntArray, dist: FloatArray, near_diameters: float
) -> FloatArray:
    """Mean of 1/|r − r'| (1/m) over pairs (a, b) of distinct triangles closer than the
    far threshold, with the rule their distance ``dist`` (centroids, m) calls for."""
    v, z, area, diam = tri.vertices_m, tri.z_m, tri.area_m2, tri.diameter_m
    dmax = np.maximum(diam[a], diam[b])
    fine = dist < 1.0 * dmax
    n_shared = np.zeros(len(a), dtype=np.int64)
    perm = np.tile(np.arange(3, dtype=np.int64), (len(a), 1))
    if tri.node_ids is not None:
        ids = tri.node_ids
        # triangles sharing a node have centroids closer than 4/3 of the larger diameter
        cand = np.flatnonzero(dist < 1.4 * dmax)
        shared = np.any(ids[a[cand]][:, :, None] == ids[b[cand]][:, None, :], axis=2)  # (k, 3)
        n_shared[cand] = shared.sum(axis=1)
        fine[cand[n_shared[cand] > 0]] = True
        # edge: the rule's vertex 1 is the apex, the shared edge is graded towards;
        # vertex: the rule collapses at the shared vertex
        first = np.argmax(shared, axis=1)
        apex = np.argmin(shared, axis=1)
        pivot = np.where(n_shared[cand] == 2, apex, first)
        perm[cand] = (pivot[:, None] + np.array([2, 0, 1])[None, :]) % 3
    near = ~fine & (dist < near_diameters * dmax)
    mid = ~fine & ~near
    vals = np.empty(len(a))
    frames, cache = tri.frames, tri.cache
    edge = fine & (n_shared == 2)
    other = fine & ~edge
    vals[edge] = _potential_rule(
        v, z, area, a[edge], b[edge], _EDGE_RULE, frames, perm[edge], cache
    )
    vals[other] = _potential_rule(
        v, z, area, a[other], b[other], _FINE_RULE, frames, perm[other], cache
    )
    vals[near] = _potential_rule(v, z, area, a[near], b[near], _D7, frames, None, cache)
    vals[mid] = _point_rule(v, z, area, a[mid], b[mid], _D3, cache)
    vals /= area[a] * area[b]
    return vals


def _near_pairs(
    v: FloatArray,
    z: FloatArray,
    node_ids: ArrayLike | None,
    near_diameters: float,
    far_diameters: float,
) -> _NearPairs:
    """Pairs (a < b) closer than ``far_diameters`` and their mean of 1/|r − r'| (1/m).

    Also the self values (closed form), the centroids (t, 3) and the areas (t,), so that
    every other pair is the centroid rule 1/|c_a − c_b|.
    """
    tri = _triangles(v, z, node_ids)
    n = len(v)
    cent, diam, area = tri.centroid_m, tri.diameter_m, tri.area_m2
    idx = np.arange(n)
    # pairs (a < b) closer than far_diameters x the larger diameter
    lists = cKDTree(cent).query_ball_point(cent, far_diameters * diam, return_sorted=False)
    counts = np.fromiter(map(len, lists), dtype=np.int64, count=n)
    other = np.fromiter(chain.from_iterable(lists), dtype=np.int64, count=int(counts.sum()))
    own = np.repeat(idx, counts)
    found = _pair_distances(cent, own, other)
    # (own, other) with own < other, plus the pairs only the larger index's ball found
    up = own < other
    down = np.flatnonzero(own > other)
    down = down[found[down] >= far_diameters * diam[other[down]]]
    a = np.concatenate([own[up], other[down]])
    b = np.concatenate([other[up], own[down]])
    dist = np.concatenate([found[up], found[down]])
    return _NearPairs(
        a=a,
        b=b,
        value_per_m=_pair_values(tri, a, b, dist, near_diameters),
        self_per_m=triangle_self_integral(v) / (area * area),
        centroid_m=cent,
        area_m2=area,
    )


def _spatial_order(cent: FloatArray) -> IntArray:
    """Order of points along a Z-order (Morton) curve, by plane height first.

    Consecutive points in this order are close together, so a run of them touches few
    mesh nodes. ``cent`` is (t, 3) (m).
    """
    lo = cent[:, :2].min(axis=0)
    span = float(np.ptp(cent[:, :2], axis=0).max()) or 1.0
    q = np.minimum(((cent[:, :2] - lo) / span * 1024.0).astype(np.int64), 1023)

    def spread(v: IntArray) -> IntArray:
        # 10 bits to every other bit of 20 (textbook bit interleaving)
        v = (v | (v << 8)) & 0x00FF00FF
        v = (v | (v << 4)) & 0x0F0F0F0F
        v = (v | (v << 2)) & 0x33333333
        return (v | (v << 1)) & 0x55555555

    code = spread(q[:, 0]) | (spread(q[:, 1]) << 1)
    return np.asarray(np.lexsort((code, cent[:, 2])), dtype=np.int64)


def _inductance_matrix(
    vertices: FloatArray,
    plane_z: FloatArray,
    node_ids: IntArray,
    maps: Sequence[sp.csr_matrix],
    near_diameters: float,
    far_diameters: float,
) -> FloatArray:
    """Σ_m Pₘᵀ K Pₘ for sparse maps Pₘ (t, n), K the pair integrals per unit area.

    The same K as :func:`triangle_pair_integrals` (``per_unit_area=True``), but never
    stored whole, and only its lower half made. Triangles are put in Z-order and cut into
    blocks S (compact patches). For each block the columns K[s:, S] (centroid rule, then
    the near pairs and the diagonal written over it) give Y = K[S, S] P[S] + 2 K[S, R] P[R]
    (R the later triangles) in one sparse-dense product, and P[S]ᵀ Y is a small dense
    product over the few nodes S touches. Summed over the blocks this is X with
    (X + Xᵀ)/2 = Pᵀ K P (K symmetric).

    Returns
    -------
    ndarray, shape (n, n)
        X (units of K times those of P squared): symmetrise it, (X + Xᵀ)/2.
    """
    tri = _triangles(vertices, plane_z, node_ids)
    t = len(vertices)
    n = maps[0].shape[1]
    order = _spatial_order(tri.centroid_m)
    cent = tri.centroid_m[order]
    reach = far_diameters * tri.diameter_m[order]
    area = tri.area_m2[order]
    self_per_m = triangle_self_integral(vertices[order]) / (area * area)
    p_maps = [mp[order].tocsr() for mp in maps]
    for mp in p_maps:
        mp.sum_duplicates()
    width: int = max(16, _KERNEL_BLOCK // max(1, t))
    q_t = sp.vstack([mp.T for mp in p_maps]).tocsc()  # (m n, t)
    out = np.zeros((n, n))
    for s in range(0, t, width):
        e = min(t, s + width)
        # the lower part of K's columns s:e only (rows s: on): K[s:, s:e]
        blk = cdist(cent[s:], cent[s:e])
        # pairs needing more than the centroid rule, each once (row after column)
        r, c = np.nonzero((blk < reach[s:, None]) | (blk < reach[None, s:e]))
        below = r > c
        r, c = r[below], c[below]
        dist = blk[r, c]
        diag = np.arange(e - s)
        blk[diag, diag] = 1.0  # self pairs are written over below: no 1/0
        np.divide(1.0, blk, out=blk)
        blk[diag, diag] = self_per_m[s:e]
        # the rules are applied in the triangles' given order (a < b), as everywhere
        ta, tb = order[s + c], order[s + r]
        vals = _pair_values(tri, np.minimum(ta, tb), np.maximum(ta, tb), dist, near_diameters)
        blk[r, c] = vals
        inside = r < e - s  # both in the diagonal block: its upper half too
        blk[c[inside], r[inside]] = vals[inside]
        # the rows below the diagonal block stand for their mirror images too
        blk[e - s :] *= 2.0
        y = np.asarray(q_t[:, s:] @ blk)  # (m n, e − s)
        touched = [mp.indices[mp.indptr[s] : mp.indptr[e]] for mp in p_maps]
        nodes = np.unique(np.concatenate(touched))
        if len(nodes) == 0:
            continue
        acc = np.zeros((len(nodes), n))
        for m, mp in enumerate(p_maps):
            # P[S] restricted to its nodes, dense (e − s, nodes)
            sub = mp[s:e]
            dense = np.zeros((e - s, len(nodes)))
            dense[
                np.repeat(np.arange(e - s), np.diff(sub.indptr)),
                np.searchsorted(nodes, sub.indices),
            ] = sub.data
            acc += dense.T @ y[m * n : (m + 1) * n].T
        out[nodes] += acc
    return out


# --------------------------------------------------------------------------------------
# inputs
# --------------------------------------------------------------------------------------


@dataclass(frozen=True, kw_only=True, eq=False)
class PlaneSheet:
    """One plane of copper: polygons with holes at a height, with thickness and conductivity.

    Attributes
    ----------
    polygons : tuple of (exterior, holes)
        Exterior rings (n, 2) and tuples of hole rings (m_i, 2), in metres, in the plane. A
        hole is enclosed copper-free area (its ring carries a ring-current unknown); a void
        opened to the edge by a slot belongs to the exterior ring.
    z_m : float
        Height of the copper's mid-plane (m).
    thickness_m : float
        Copper thickness t (m), > 0.
    sigma_s_per_m : float
        Conductivity σ (S/m), > 0; default copper, 1/(1.68e-8 Ω·m).
    """

    polygons: tuple[tuple[FloatArray, tuple[FloatArray, ...]], ...]
    z_m: float
    thickness_m: float
    sigma_s_per_m: float = SIGMA_CU_S_PER_M

    @classmethod
    def from_polygons(
        cls,
        polygons: Sequence[Polygon],
        *,
        z_m: float,
        thickness_m: float,
        sigma_s_per_m: float = SIGMA_CU_S_PER_M,
    ) -> PlaneSheet:
        """Build a sheet from array-likes, checking the numbers.

        Parameters
        ----------
        polygons : sequence of (exterior, holes)
            As the attribute, array_like rings (m).
        z_m, thickness_m, sigma_s_per_m : float
            As the attributes.

        Returns
        -------
        PlaneSheet

        Raises
        ------
        InputError
            Thickness or conductivity not positive and finite, or no polygon.
        """
        for name, val in (("thickness_m", thickness_m), ("sigma_s_per_m", sigma_s_per_m)):
            if not (np.isfinite(val) and val > 0.0):
                msg = f"sheet {name} must be a positive finite number; got {val!r}"
                raise InputError(msg)
        if not np.isfinite(z_m):
            msg = f"sheet z_m must be finite; got {z_m!r}"
            raise InputError(msg)
        polys = tuple(
            (
                np.asarray(ext, dtype=np.float64),
                tuple(np.asarray(h, dtype=np.float64) for h in holes),
            )
            for ext, holes in polygons
        )
        if not polys:
            msg = "sheet polygons must hold at least one polygon; got none"
            raise InputError(msg)
        return cls(
            polygons=polys,
            z_m=float(z_m),
            thickness_m=float(thickness_m),
            sigma_s_per_m=float(sigma_s_per_m),
        )


@dataclass(frozen=True, kw_only=True, eq=False)
class LoopSource:
    """Filament loops of one winding, all in series.

    Attributes
    ----------
    centre_m : ndarray, shape (L, 3)
        Loop centres (m).
    axis : ndarray, shape (L, 3)
        Unit axis directions; positive current circulates counter-clockwise seen from the
        tip of the axis.
    radius_m : ndarray, shape (L,)
        Loop radii (m).
    current_a : ndarray, shape (L,)
        Current of each filament (A) when the winding carries ``series_current_a``; lumped
        turns carry N·I.
    series_current_a : float
        Winding (terminal) current the impedance change is referred to (A).
    """

    centre_m: FloatArray
    axis: FloatArray
    radius_m: FloatArray
    current_a: FloatArray
    series_current_a: float = 1.0

    @classmethod
    def from_arrays(
        cls,
        centre_m: ArrayLike,
        axis: ArrayLike,
        radius_m: ArrayLike,
        current_a: ArrayLike = 1.0,
        *,
        series_current_a: float = 1.0,
    ) -> LoopSource:
        """Build a source, broadcasting and checking the arrays.

        Parameters
        ----------
        centre_m : array_like, shape (L, 3) or (3,)
            Loop centres (m).
        axis : array_like, shape (L, 3) or (3,)
            Axis directions (normalised here).
        radius_m : array_like, shape (L,) or scalar
            Radii (m), > 0.
        current_a : array_like, shape (L,) or scalar, default 1
            Filament currents (A).
        series_current_a : float, default 1
            Winding current (A), non-zero.

        Returns
        -------
        LoopSource

        Raises
        ------
        InputError
            Non-positive radius, zero axis, zero series current or non-finite values.
        """
        c = np.atleast_2d(np.asarray(centre_m, dtype=np.float64))
        ax = np.atleast_2d(np.asarray(axis, dtype=np.float64))
        if c.shape[-1] != 3 or ax.shape[-1] != 3 or c.ndim != 2 or ax.ndim != 2:
            msg = f"loop centres and axes must be (L, 3) arrays; got {c.shape} and {ax.shape}"
            raise InputError(msg)
        try:
            c, ax = np.broadcast_arrays(c, ax)
            n_loops = c.shape[0]
            a = np.broadcast_to(np.asarray(radius_m, dtype=np.float64), (n_loops,)).copy()
            cur = np.broadcast_to(np.asarray(current_a, dtype=np.float64), (n_loops,)).copy()
        except ValueError as exc:
            msg = f"loop arrays must have one row per loop; got {exc}"
            raise InputError(msg) from exc
        norm = np.linalg.norm(ax, axis=1)
        finite = [np.all(np.isfinite(x)) for x in (c, ax, a, cur)]
        if not all(finite):
            msg = "loop centres, axes, radii and currents must be finite; got NaN or inf"
            raise InputError(msg)
        if np.any(norm == 0.0):
            msg = "loop axis must be a non-zero vector; got (0, 0, 0)"
            raise InputError(msg)
        if not np.all(a > 0.0):
            msg = f"loop radius_m must be > 0; got {a.min()!r}"
            raise InputError(msg)
        if not (np.isfinite(series_current_a) and series_current_a != 0.0):
            msg = f"series_current_a must be non-zero and finite; got {series_current_a!r}"
            raise InputError(msg)
        return cls(
            centre_m=c.copy(),
            axis=ax / norm[:, None],
            radius_m=a,
            current_a=cur,
            series_current_a=float(series_current_a),
        )

    def filament_polylines_m(self, spacing_m: float) -> list[FloatArray]:
        """Each filament as a closed polyline, vertices at most ``spacing_m`` apart.

        Parameters
        ----------
        spacing_m : float
            Largest spacing (m).

        Returns
        -------
        list of ndarray, each (P, 3)
            Vertices (m), the closing vertex not repeated.
        """
        mats = loop_frame_rotation(self.axis).as_matrix()
        out: list[FloatArray] = []
        for k in range(len(self.radius_m)):
            n = max(16, ceil(2.0 * pi * self.radius_m[k] / spacing_m))
            ang = 2.0 * pi * np.arange(n) / n
            local = np.column_stack(
                [self.radius_m[k] * np.cos(ang), self.radius_m[k] * np.sin(ang), np.zeros(n)]
            )
            out.append(self.centre_m[k] + local @ mats[k].T)
        return out

    def filament_points_m(self, spacing_m: float) -> FloatArray:
        """Points along every filament, at most ``spacing_m`` apart.

        Parameters
        ----------
        spacing_m : float
            Largest spacing (m).

        Returns
        -------
        ndarray, shape (P, 3)
            Points (m).
        """
        return np.concatenate(self.filament_polylines_m(spacing_m))


# --------------------------------------------------------------------------------------
# the frequency sweep
# --------------------------------------------------------------------------------------


@dataclass(frozen=True, kw_only=True, eq=False)
class SymmetricReduction:
    """One reduction of the pencil (M, R) that makes every frequency O(n²).

    With the Cholesky factor R = LLᵀ and the Householder tridiagonal form
    L⁻¹ M L⁻ᵀ = Q T Qᵀ, the system (ζR + jωM) u = b becomes
    (ζI + jωT) y = Qᵀ L⁻¹ b, u = L⁻ᵀ Q y: a tridiagonal solve (O(n)) and two O(n²)
    applications per frequency. This is the first stage of the symmetric eigen-solver
    (LAPACK sygst + sytrd, textbook: Golub & Van Loan, *Matrix Computations*, sections
    8.3 and 8.7, from memory); stopping there costs about half of a full generalised
    eigen-decomposition, with the same per-frequency cost.

    Attributes
    ----------
    chol : ndarray, shape (n, n)
        Lower Cholesky factor L of R (√Ω).
    reflectors : ndarray, shape (n, n)
        Householder vectors of Q below the subdiagonal (LAPACK sytrd, lower storage).
    tau : ndarray, shape (n − 1,)
        Householder scalars.
    diag_s : ndarray, shape (n,)
        Diagonal of T (s).
    offdiag_s : ndarray, shape (n − 1,)
        Off-diagonal of T (s).
    """

    chol: FloatArray
    reflectors: FloatArray
    tau: FloatArray
    diag_s: FloatArray
    offdiag_s: FloatArray

    @classmethod
    def of(cls, m_mat: FloatArray, r_mat: FloatArray) -> SymmetricReduction:
        """Reduce a symmetric pencil, R positive definite.

        Parameters
        ----------
        m_mat : ndarray, shape (n, n)
            Symmetric M (H).
        r_mat : ndarray, shape (n, n)
            Symmetric positive definite R (Ω).

        Returns
        -------
        SymmetricReduction
        """
        n = len(r_mat)
        low = sla.cholesky(r_mat, lower=True, check_finite=False)
        # M is symmetric: its transpose is the Fortran-ordered view LAPACK reads uncopied
        c, info = sla_lapack.dsygst(m_mat.T, low, itype=1, lower=1)
        if info != 0:  # pragma: no cover - LAPACK argument error
            msg = f"LAPACK dsygst must succeed; got info {info}"
            raise InputError(msg)
        if n == 1:
            return cls(
                chol=low, reflectors=np.zeros((1, 1)), tau=np.zeros(0),
                diag_s=np.array([c[0, 0]]), offdiag_s=np.zeros(0),
            )  # fmt: skip
        lwork = int(sla_lapack.dsytrd_lwork(n, lower=1)[0])
        refl, d, e, tau, info = sla_lapack.dsytrd(c, lower=1, lwork=max(lwork, n), overwrite_a=1)
        if info != 0:  # pragma: no cover - LAPACK argument error
            msg = f"LAPACK dsytrd must succeed; got info {info}"
            raise InputError(msg)
        return cls(
            chol=low,
            reflectors=np.asarray(refl, dtype=np.float64),
            tau=np.asarray(tau, dtype=np.float64),
            diag_s=np.asarray(d, dtype=np.float64),
            offdiag_s=np.asarray(e, dtype=np.float64),
        )

    def _apply_q(self, x: FloatArray, trans: str) -> FloatArray:
        """Q x (trans "N") or Qᵀ x (trans "T") for a real (n, k) array."""
        out = np.array(x, dtype=np.float64, order="F", copy=True)
        if len(out) < 2 or out.shape[1] == 0:
            return out
        k = out.shape[1]
        cq, _work, info = sla_lapack.dormqr(
            "L", trans, self.reflectors[1:, :-1], self.tau, out[1:], lwork=max(1, 64 * k)
        )
        if info != 0:  # pragma: no cover - LAPACK argument error
            msg = f"LAPACK dormqr must succeed; got info {info}"
            raise InputError(msg)
        out[1:] = cq
        return out

    def solve(self, phi: FloatArray, omega_rad_s: FloatArray, zeta: ArrayLike) -> ComplexArray:
        """Solve (ζR + jωM) u = −jωΦ for several frequencies.

        Parameters
        ----------
        phi : ndarray, shape (n,)
            Source vector Φ (Wb).
        omega_rad_s : ndarray, shape (F,)
            Angular frequencies (rad/s).
        zeta : array_like, shape (F,)
            Scale ζ of R at each frequency (1; complex for the impedance sheet).

        Returns
        -------
        ndarray of complex, shape (F, n)
            u (A).
        """
        z = np.broadcast_to(np.asarray(zeta, dtype=np.complex128), omega_rad_s.shape)
        # the factors are finite by construction: skip the checks (a pass over n² each)
        lphi = sla.solve_triangular(self.chol, phi, lower=True, check_finite=False)
        g = self._apply_q(lphi[:, None], "T")[:, 0]
        n = len(g)
        y = np.empty((n, len(omega_rad_s)), dtype=np.complex128)
        for k, (w, zk) in enumerate(zip(omega_rad_s, z, strict=True)):
            band = np.zeros((3, n), dtype=np.complex128)
            band[0, 1:] = 1j * w * self.offdiag_s
            band[1] = zk + 1j * w * self.diag_s
            band[2, :-1] = 1j * w * self.offdiag_s
            y[:, k] = sla.solve_banded((1, 1), band, -1j * w * g)
        # real and imaginary parts side by side: one pass over Q and one over L
        n_f = len(omega_rad_s)
        qy = self._apply_q(np.concatenate([y.real, y.imag], axis=1), "N")
        ur = sla.solve_triangular(self.chol.T, qy, lower=False, check_finite=False)
        u = ur[:, :n_f] + 1j * ur[:, n_f:]
        return np.asarray(u.T, dtype=np.complex128)


# --------------------------------------------------------------------------------------
# the model
# --------------------------------------------------------------------------------------


@dataclass(frozen=True, kw_only=True, eq=False)
class SheetModel:
    """Meshes and matrices of plane sheets under one winding; solve at any frequencies.

    Build with :func:`build_sheet_model`. Unknowns are stacked sheet by sheet: the free
    interior nodes of a sheet, then one unknown per hole of that sheet.

    Attributes
    ----------
    sheets : tuple of PlaneSheet
        The copper.
    loops : LoopSource
        The winding.
    meshes : tuple of TriMesh
        One mesh per sheet (coordinates in m).
    copper_model : {"thin", "impedance"}
        See :data:`CopperModel`.
    current_z_m : ndarray, shape (S,)
        Height of each current sheet (m): mid-plane (thin) or the face towards the loops
        (impedance).
    source_side : ndarray, shape (S,)
        +1 if the loops are above the sheet (mean height), else −1.
    n_unknowns : int
        Number of unknowns.
    node_unknown : tuple of int64 ndarrays
        Per sheet, the unknown of each node (−1 on the exterior rings).
    hole_unknown : ndarray of int64, shape (H,)
        Unknown index of each hole, sheets in order.
    hole_sheet : ndarray of int64, shape (H,)
        Sheet index of each hole.
    unknown_sheet : ndarray of int64, shape (n_unknowns,)
        Sheet of each unknown.
    tri_vertices_m : ndarray, shape (T, 3, 2)
        All triangles of all sheets (m).
    tri_z_m : ndarray, shape (T,)
        Current-sheet height of each triangle (m).
    tri_sheet : ndarray of int64, shape (T,)
        Sheet of each triangle.
    tri_area_m2 : ndarray, shape (T,)
        Triangle areas (m²).
    grad_x, grad_y : scipy.sparse.csr_matrix, shape (T, n_unknowns)
        ∂ψ/∂x and ∂ψ/∂y on each triangle per unit of each unknown (1/m).
    stiffness_r : ndarray, shape (n_unknowns, n_unknowns)
        R at the thin-sheet conductance, K/(σt) (Ω).
    inductance_m : ndarray, shape (n_unknowns, n_unknowns)
        M (H).
    source_phi : ndarray, shape (n_unknowns,)
        Φ (Wb) for the loop currents as given.
    reduction : SymmetricReduction
        R = LLᵀ and L⁻¹ M L⁻ᵀ = Q T Qᵀ (T tridiagonal), for O(n²) frequency sweeps.
    """

    sheets: tuple[PlaneSheet, ...]
    loops: LoopSource
    meshes: tuple[TriMesh, ...]
    copper_model: CopperModel
    current_z_m: FloatArray
    source_side: FloatArray
    n_unknowns: int
    node_unknown: tuple[IntArray, ...]
    hole_unknown: IntArray
    hole_sheet: IntArray
    unknown_sheet: IntArray
    tri_vertices_m: FloatArray
    tri_z_m: FloatArray
    tri_sheet: IntArray
    tri_area_m2: FloatArray
    grad_x: sp.csr_matrix
    grad_y: sp.csr_matrix
    stiffness_r: FloatArray
    inductance_m: FloatArray
    source_phi: FloatArray
    reduction: SymmetricReduction

    @property
    def n_nodes(self) -> int:
        """Total number of mesh nodes over all sheets."""
        return sum(m.n_nodes for m in self.meshes)

    def impedance_factor(self, freq_hz: float) -> FloatArray | ComplexArray:
        """ζ_s = Z_s σt of each sheet at a frequency (1 for the thin sheet).

        Parameters
        ----------
        freq_hz : float
            Frequency (Hz).

        Returns
        -------
        ndarray, shape (S,)
            ζ (1), complex for the impedance model.
        """
        if self.copper_model == "thin":
            return np.ones(len(self.sheets))
        x = np.array(
            [
                np.sqrt(2j * pi * freq_hz * MU0 * s.sigma_s_per_m) * s.thickness_m
                for s in self.sheets
            ],
            dtype=np.complex128,
        )
        e2 = np.exp(-2.0 * x)
        small = np.abs(x) < 1e-4
        x_safe = np.where(small, 1.0, x)
        zeta = np.where(small, 1.0 + x * x / 3.0, x_safe * (1.0 + e2) / (1.0 - e2))
        return np.asarray(zeta, dtype=np.complex128)

    def transmission_factor(self, points_m: ArrayLike, freq_hz: float) -> ComplexArray:
        """1/cosh(γ0 t) of every sheet between the loops and each point (impedance model).

        Parameters
        ----------
        points_m : array_like, shape (n, 3)
            Points (m).
        freq_hz : float
            Frequency (Hz).

        Returns
        -------
        ndarray of complex, shape (n,)
            Product of 1/cosh(γ0 t) over the sheets whose copper lies between the loops
            and the point (the point on the far side, its projection inside the copper);
            1 everywhere for the thin model.
        """
        p = np.atleast_2d(np.asarray(points_m, dtype=np.float64))
        out = np.ones(len(p), dtype=np.complex128)
        if self.copper_model == "thin":
            return out
        for s, sheet in enumerate(self.sheets):
            beyond = (p[:, 2] - sheet.z_m) * self.source_side[s] < 0.0
            if not np.any(beyond):
                continue
            inside = np.zeros(len(p), dtype=np.bool_)
            for ext, holes in sheet.polygons:
                inside |= points_in_polygon(p[:, :2], [ext, *holes])
            hit = beyond & inside
            x = np.sqrt(2j * pi * freq_hz * MU0 * sheet.sigma_s_per_m) * sheet.thickness_m
            out[hit] *= 2.0 * np.exp(-x) / (1.0 + np.exp(-2.0 * x))
        return out

    def _operator_pairs(
        self, points_m: FloatArray, kind: Literal["potential", "gradient"]
    ) -> FloatArray:
        """V_T or ∇V_T for every point and triangle: shape (n, T) or (n, T, 3).

        Closed form within 4 diameters of a triangle, 3-point rule beyond.
        """
        v = self.tri_vertices_m
        z = self.tri_z_m
        n_t = len(v)
        n_p = len(points_m)
        cent = np.column_stack([v.mean(axis=1), z])
        diam = np.linalg.norm(np.roll(v, -1, axis=1) - v, axis=2).max(axis=1)
        bary, w = _D3
        qpts = np.einsum("qk,tkc->tqc", bary, v)  # (T, 3, 2)
        shape = (n_p, n_t) if kind == "potential" else (n_p, n_t, 3)
        out = np.empty(shape)
        rows = max(1, _BLOCK // max(1, n_t))
        qx = np.ascontiguousarray(qpts[:, :, 0].T)  # (3, T)
        qy = np.ascontiguousarray(qpts[:, :, 1].T)
        reach = _FIELD_EXACT * diam
        near_p: list[IntArray] = []
        near_t: list[IntArray] = []
        for s in range(0, n_p, rows):
            blk = points_m[s : s + rows]
            dz = blk[:, 2][:, None] - z[None, :]
            dz2 = dz * dz
            acc = [np.zeros((len(blk), n_t)) for _ in range(1 if kind == "potential" else 3)]
            for q in range(len(w)):
                rx = blk[:, 0][:, None] - qx[q][None, :]
                ry = blk[:, 1][:, None] - qy[q][None, :]
                r2 = rx * rx
                r2 += ry * ry
                r2 += dz2
                wa = (w[q] * self.tri_area_m2)[None, :]
                if kind == "potential":
                    np.sqrt(r2, out=r2)
                    np.divide(wa, r2, out=r2)
                    acc[0] += r2
                else:
                    inv3 = np.sqrt(r2)
                    inv3 *= r2
                    np.divide(wa, inv3, out=inv3)
                    rx *= inv3
                    acc[0] -= rx
                    ry *= inv3
                    acc[1] -= ry
                    inv3 *= dz
                    acc[2] -= inv3
            if kind == "potential":
                out[s : s + rows] = acc[0]
            else:
                for c in range(3):
                    out[s : s + rows, :, c] = acc[c]
            # pairs for the closed form: within 4 diameters of the triangle's centroid
            pb, tb = np.nonzero(cdist(blk, cent) < reach[None, :])
            near_p.append(pb + s)
            near_t.append(tb)
        pi_ = np.concatenate(near_p).astype(np.int64)
        ti = np.concatenate(near_t).astype(np.int64)
        for s in range(0, len(pi_), _BLOCK):
            a, b = pi_[s : s + _BLOCK], ti[s : s + _BLOCK]
            if kind == "potential":
                out[a, b] = triangle_potential(points_m[a], v[b], z[b])
            else:
                out[a, b] = triangle_potential_gradient(points_m[a], v[b], z[b])
        return out

    def field_operator(self, points_m: ArrayLike) -> FloatArray:
        """Linear map from the unknowns to the sheet currents' field at points.

        Parameters
        ----------
        points_m : array_like, shape (n, 3)
            Observation points (m), not on a sheet.

        Returns
        -------
        ndarray, shape (3, n, n_unknowns)
            B (T) per ampere of each unknown: B = op @ u. Dense: for many points use
            :meth:`SheetSolution.field_at`, which works in blocks.
        """
        p = np.atleast_2d(np.asarray(points_m, dtype=np.float64))
        g = self._operator_pairs(p, "gradient")
        gx_t = self.grad_x.T.tocsr()
        gy_t = self.grad_y.T.tocsr()
        # B = μ0/(4π) Σ_T ∇V × J with J = (∂ψ/∂y, −∂ψ/∂x)
        bx = (gx_t @ g[:, :, 2].T).T
        by = (gy_t @ g[:, :, 2].T).T
        bz = -(gx_t @ g[:, :, 0].T).T - (gy_t @ g[:, :, 1].T).T
        return np.asarray(_C * np.stack([bx, by, bz]), dtype=np.float64)

    def vector_potential_operator(self, points_m: ArrayLike) -> FloatArray:
        """Linear map from the unknowns to the sheet currents' vector potential.

        Parameters
        ----------
        points_m : array_like, shape (n, 3)
            Points (m).

        Returns
        -------
        ndarray, shape (3, n, n_unknowns)
            A (T·m) per ampere of each unknown (the z component is zero).
        """
        p = np.atleast_2d(np.asarray(points_m, dtype=np.float64))
        pot = self._operator_pairs(p, "potential")
        ax = (self.grad_y.T.tocsr() @ pot.T).T
        ay = -(self.grad_x.T.tocsr() @ pot.T).T
        return np.asarray(_C * np.stack([ax, ay, np.zeros_like(ax)]), dtype=np.float64)

    def with_loops(self, loops: LoopSource) -> SheetModel:
        """The same copper, mesh and matrices driven by another winding.

        The mesh stays graded for the original winding; use this for a second winding
        near the first one (mutual impedances through the copper) or a change of currents.

        Parameters
        ----------
        loops : LoopSource
            The new winding.

        Returns
        -------
        SheetModel

        Raises
        ------
        InputError
            A filament lies in the plane of a current sheet.
        """
        phi = _source_phi(
            self.tri_vertices_m, self.tri_z_m, self.tri_area_m2, self.grad_x, self.grad_y, loops
        )
        mean_z = float(loops.centre_m[:, 2].mean())
        side = np.array([1.0 if mean_z >= s.z_m else -1.0 for s in self.sheets])
        if not np.array_equal(side, self.source_side) and self.copper_model == "impedance":
            msg = (
                "loops must stay on the same side of the copper for the impedance model; "
                "got a change of side"
            )
            raise InputError(msg)
        return replace(self, loops=loops, source_phi=phi, source_side=side)

    def solve(self, freqs_hz: ArrayLike) -> SheetSolution:
        """Sheet currents, ring currents and impedance change at each frequency.

        Parameters
        ----------
        freqs_hz : array_like, shape (F,) or scalar
            Frequencies (Hz), > 0.

        Returns
        -------
        SheetSolution

        Raises
        ------
        InputError
            A frequency is not positive and finite.
        """
        f = np.atleast_1d(np.asarray(freqs_hz, dtype=np.float64))
        if not np.all(np.isfinite(f) & (f > 0.0)):
            msg = f"freqs_hz must be positive and finite; got {f.tolist()!r}"
            raise InputError(msg)
        n_u = self.n_unknowns
        u = np.empty((len(f), n_u), dtype=np.complex128)
        zetas = np.stack([self.impedance_factor(float(x)) for x in f])  # (F, S)
        common = np.all(np.abs(zetas - zetas[:, :1]) <= 1e-12 * np.abs(zetas[:, :1]), axis=1)
        red = self.reduction
        sel = np.flatnonzero(common)
        if len(sel):
            u[sel] = red.solve(self.source_phi, 2.0 * pi * f[sel], zetas[sel, 0])
        for k, fk in enumerate(f):
            omega = 2.0 * pi * fk
            if not common[k]:
                scale = zetas[k][self.unknown_sheet]
                a = self.stiffness_r * scale[:, None] + 1j * omega * self.inductance_m
                u[k] = sla.solve(a, -1j * omega * self.source_phi.astype(np.complex128))
        omega = 2.0 * pi * f
        i_s = self.loops.series_current_a
        dz = 1j * omega * (u @ self.source_phi) / (i_s * i_s)
        # dissipated power ½ Σ_s Re(ζ_s) u_sᴴ R_s u_s (R is block-diagonal per sheet)
        # R symmetric and real: one real product for both parts of u
        ru_parts = np.concatenate([u.real, u.imag]) @ self.stiffness_r
        ru = ru_parts[: len(f)] + 1j * ru_parts[len(f) :]
        loss = np.zeros(len(f))
        for s in range(len(self.sheets)):
            sel = self.unknown_sheet == s
            loss += (
                0.5 * zetas[:, s].real * np.real(np.sum(np.conj(u[:, sel]) * ru[:, sel], axis=1))
            )
        return SheetSolution(
            model=self,
            freqs_hz=f,
            unknowns=u,
            ring_current_a=u[:, self.hole_unknown],
            delta_z_ohm=np.asarray(dz, dtype=np.complex128),
            delta_l_h=np.asarray(dz.imag / omega, dtype=np.float64),
            delta_r_ohm=np.asarray(dz.real, dtype=np.float64),
            sheet_loss_w=loss,
        )


@dataclass(frozen=True, kw_only=True, eq=False)
class SheetSolution:
    """Sheet currents at a set of frequencies (phasors, peak amplitudes).

    Attributes
    ----------
    model : SheetModel
        The model solved.
    freqs_hz : ndarray, shape (F,)
        Frequencies (Hz).
    unknowns : ndarray of complex, shape (F, n_unknowns)
        Stream-function unknowns (A).
    ring_current_a : ndarray of complex, shape (F, H)
        Net current around each hole (A), positive counter-clockwise seen from +z.
    delta_z_ohm : ndarray of complex, shape (F,)
        Change of the winding impedance, ΔZ = jω Φᵀu / I² (Ω).
    delta_l_h : ndarray, shape (F,)
        ΔL = Im ΔZ / ω (H).
    delta_r_ohm : ndarray, shape (F,)
        ΔR = Re ΔZ (Ω). Edge loss does not converge in a thin-sheet model when copper
        edges are close to the winding (fluxshadow physics reference, section 3).
    sheet_loss_w : ndarray, shape (F,)
        Power dissipated in the copper, ½ Σ Re(ζ) uᴴRu (W); equals ½ ΔR I².
    """

    model: SheetModel
    freqs_hz: FloatArray
    unknowns: ComplexArray
    ring_current_a: ComplexArray
    delta_z_ohm: ComplexArray
    delta_l_h: FloatArray
    delta_r_ohm: FloatArray
    sheet_loss_w: FloatArray

    def _point_block(self) -> int:
        """Points per block so that the dense operators stay near 50 MB."""
        per_point = 3 * max(len(self.model.tri_area_m2), self.model.n_unknowns)
        return max(1, 2_000_000 // per_point)

    def field_at(self, points_m: ArrayLike, *, include_source: bool = True) -> ComplexArray:
        """Magnetic flux density at points, per frequency.

        Parameters
        ----------
        points_m : array_like, shape (n, 3)
            Observation points (m), off the sheets.
        include_source : bool, default True
            Add the loops' own field (total field); False gives the sheet currents' field
            alone (without the thick-copper attenuation).

        Returns
        -------
        ndarray of complex, shape (F, n, 3)
            B phasors (T).
        """
        p = np.atleast_2d(np.asarray(points_m, dtype=np.float64))
        n_f = len(self.freqs_hz)
        b = np.empty((n_f, len(p), 3), dtype=np.complex128)
        # B = μ0/(4π) Σ_T ∇V_T × J_T, J real and imaginary parts side by side: (T, 2F)
        j = self.triangle_current_a_per_m()
        jx = np.concatenate([j[..., 0].real, j[..., 0].imag]).T
        jy = np.concatenate([j[..., 1].real, j[..., 1].imag]).T
        step = self._point_block()
        for s in range(0, len(p), step):
            g = self.model._operator_pairs(p[s : s + step], "gradient")
            gz = np.ascontiguousarray(g[:, :, 2])
            comp = [
                -(gz @ jy),
                gz @ jx,
                np.ascontiguousarray(g[:, :, 0]) @ jy - np.ascontiguousarray(g[:, :, 1]) @ jx,
            ]
            for c, val in enumerate(comp):
                b[:, s : s + step, c] = (_C * (val[:, :n_f] + 1j * val[:, n_f:])).T
        if not include_source:
            return np.asarray(b, dtype=np.complex128)
        lp = self.model.loops
        b = b + loops_field_xyz(p, lp.centre_m, lp.axis, lp.radius_m, lp.current_a)[None]
        for k, fk in enumerate(self.freqs_hz):
            b[k] *= self.model.transmission_factor(p, float(fk))[:, None]
        return np.asarray(b, dtype=np.complex128)

    def vector_potential_at(
        self,
        points_m: ArrayLike,
        *,
        include_source: bool = True,
        sheets: Sequence[int] | None = None,
    ) -> ComplexArray:
        """Vector potential at points, per frequency (no thick-copper attenuation).

        Parameters
        ----------
        points_m : array_like, shape (n, 3)
            Points (m).
        include_source : bool, default True
            Add the loops' own vector potential.
        sheets : sequence of int, optional
            Only the currents of these sheets (indices into ``model.sheets``); default all.

        Returns
        -------
        ndarray of complex, shape (F, n, 3)
            A phasors (T·m).
        """
        p = np.atleast_2d(np.asarray(points_m, dtype=np.float64))
        n_f = len(self.freqs_hz)
        a = np.zeros((n_f, len(p), 3), dtype=np.complex128)
        # A = μ0/(4π) Σ_T V_T J_T, J real and imaginary parts side by side: (T, 2F)
        j = self.triangle_current_a_per_m()
        if sheets is not None:
            j = j * np.isin(self.model.tri_sheet, np.asarray(sheets, dtype=np.int64))[None, :, None]
        jx = np.concatenate([j[..., 0].real, j[..., 0].imag]).T
        jy = np.concatenate([j[..., 1].real, j[..., 1].imag]).T
        step = self._point_block()
        for s in range(0, len(p), step):
            pot = self.model._operator_pairs(p[s : s + step], "potential")
            for c, jc in enumerate((jx, jy)):
                val = pot @ jc
                a[:, s : s + step, c] = (_C * (val[:, :n_f] + 1j * val[:, n_f:])).T
        if include_source:
            lp = self.model.loops
            a = (
                a
                + loops_vector_potential_xyz(p, lp.centre_m, lp.axis, lp.radius_m, lp.current_a)[
                    None
                ]
            )
        return np.asarray(a, dtype=np.complex128)

    def stream_function_a(self, sheet: int = 0) -> ComplexArray:
        """Stream function ψ at the nodes of one sheet's mesh, per frequency.

        Parameters
        ----------
        sheet : int, default 0
            Sheet index.

        Returns
        -------
        ndarray of complex, shape (F, n_nodes)
            ψ (A): 0 on the exterior rings, the ring current on each hole's ring.
        """
        un = self.model.node_unknown[sheet]
        psi = np.zeros((len(self.freqs_hz), len(un)), dtype=np.complex128)
        inner = un >= 0
        psi[:, inner] = self.unknowns[:, un[inner]]
        return psi

    def triangle_current_a_per_m(self) -> ComplexArray:
        """Sheet current density on every triangle of the model.

        Returns
        -------
        ndarray of complex, shape (F, T, 2)
            J = (∂ψ/∂y, −∂ψ/∂x) (A/m), triangles in the model's order.
        """
        jx = (self.model.grad_y @ self.unknowns.T).T
        jy = -(self.model.grad_x @ self.unknowns.T).T
        return np.asarray(np.stack([jx, jy], axis=-1), dtype=np.complex128)


# --------------------------------------------------------------------------------------
# building
# --------------------------------------------------------------------------------------


def _size_field(
    sheet: PlaneSheet,
    plane_z: float,
    loops: LoopSource,
    *,
    h_min_m: float | None,
    h_inside_m: float | None,
    h_max_m: float,
    grading: float,
    edge_h_m: float | None,
) -> SizeField:
    """Element sizes for one sheet: fine at the winding's projection and near edges."""
    coarse = loops.filament_points_m(0.25 * h_max_m)
    gap = float(np.min(np.abs(coarse[:, 2] - plane_z)))
    _check_clear(sheet, plane_z, loops, 0.05 * h_max_m)
    h_min = 0.5 * gap if h_min_m is None else h_min_m
    h_min = float(min(max(h_min, 0.02 * h_max_m), h_max_m))
    wind = loops.filament_points_m(0.5 * h_min)
    groups: list[tuple[ArrayLike, float]] = [(wind[:, :2], h_min)]
    # inside the winding's projection the source field is strong too: cap the size there
    h_in = 2.0 * h_min if h_inside_m is None else float(h_inside_m)
    caps: list[tuple[ArrayLike, float]] = []
    for curve in _guide_curves(loops, h_min):
        step = max(1, len(curve) // 64)
        caps.append((curve[::step], h_in))
    # copper edges: sampled along the rings
    edge_pts: list[FloatArray] = []
    for ext, holes in sheet.polygons:
        for ring in (ext, *holes):
            r = np.asarray(ring, dtype=np.float64)
            nxt = np.roll(r, -1, axis=0)
            for a, b in zip(r, nxt, strict=True):
                n = max(2, ceil(float(np.hypot(*(b - a))) / (0.5 * h_min)) + 1)
                edge_pts.append(a + np.linspace(0.0, 1.0, n)[:, None] * (b - a))
    e = np.concatenate(edge_pts)
    ramps: list[tuple[ArrayLike, float, int, float]] = []
    if edge_h_m is not None:
        groups.append((e, float(edge_h_m)))
    else:
        # the edge size follows the distance to the winding, at half the interior grading;
        # edges where that reaches h_max refine nothing
        slope = 0.5 * grading
        d_w, _ = cKDTree(wind[:, :2]).query(e)
        ramps.append((e[h_min + slope * d_w < h_max_m], h_min, 0, slope))
    return SizeField.from_groups(groups, h_max_m=h_max_m, grading=grading, ramps=ramps, caps=caps)


def _check_clear(sheet: PlaneSheet, plane_z: float, loops: LoopSource, spacing_m: float) -> None:
    """Refuse filaments that touch or cross a current sheet over its copper."""
    for k, line in enumerate(loops.filament_polylines_m(spacing_m)):
        dz = line[:, 2] - plane_z
        nxt = np.roll(dz, -1)
        cross = (dz == 0.0) | (dz * nxt < 0.0)
        if not np.any(cross):
            continue
        i = np.flatnonzero(cross)
        j = (i + 1) % len(line)
        with np.errstate(invalid="ignore", divide="ignore"):  # dz = nxt = 0: take the vertex
            t = np.where(dz[i] == nxt, 0.0, dz[i] / (dz[i] - nxt[i]))
        hit = line[i, :2] + t[:, None] * (line[j, :2] - line[i, :2])
        for ext, holes in sheet.polygons:
            if np.any(points_in_polygon(hit, [ext, *holes])):
                msg = (
                    f"loops must not touch a sheet; got loop {k} crossing the plane "
                    f"z = {plane_z * 1e3:.4f} mm over copper"
                )
                raise InputError(msg)


def _guide_curves(loops: LoopSource, h_min_m: float) -> list[FloatArray]:
    """Projections of the loops lying roughly parallel to the sheets (|n_z| >= 0.5).

    Loops with the same projection (stacked turns) give one curve.
    """
    keys: set[tuple[int, ...]] = set()
    mats = loop_frame_rotation(loops.axis).as_matrix()
    out: list[FloatArray] = []
    for k in range(len(loops.radius_m)):
        n = loops.axis[k]
        if abs(n[2]) < 0.5:
            continue
        q = 1e-3 * h_min_m
        key = (
            *(round(float(x) / q) for x in (*loops.centre_m[k, :2], loops.radius_m[k])),
            round(float(n[0]) * 1e6),
            round(float(n[1]) * 1e6),
        )
        if key in keys:
            continue
        keys.add(key)
        m = max(32, ceil(2.0 * pi * loops.radius_m[k] / (0.25 * h_min_m)))
        ang = 2.0 * pi * np.arange(m) / m
        local = np.column_stack(
            [loops.radius_m[k] * np.cos(ang), loops.radius_m[k] * np.sin(ang), np.zeros(m)]
        )
        out.append((loops.centre_m[k] + local @ mats[k].T)[:, :2])
    return out


def _source_phi(
    tri_v: FloatArray,
    tri_z: FloatArray,
    tri_a: FloatArray,
    grad_x: sp.csr_matrix,
    grad_y: sp.csr_matrix,
    loops: LoopSource,
) -> FloatArray:
    """Φ = Σ_T (∇φ × ẑ)·∫_T A_src dA on the unknowns (Wb)."""
    bary, w = _SOURCE_RULE
    qp = np.matmul(bary, tri_v)
    q3 = np.concatenate([qp, np.broadcast_to(tri_z[:, None, None], (*qp.shape[:2], 1))], axis=2)
    a_src = loops_vector_potential_xyz(
        q3.reshape(-1, 3), loops.centre_m, loops.axis, loops.radius_m, loops.current_a
    ).reshape(len(tri_v), len(w), 3)
    a_int = tri_a[:, None] * (a_src[..., :2].transpose(0, 2, 1) @ w)
    phi = np.asarray(grad_y.T @ a_int[:, 0] - grad_x.T @ a_int[:, 1], dtype=np.float64)
    if not np.all(np.isfinite(phi)):
        msg = "loops must not touch a sheet; got a filament in the plane of the copper"
        raise InputError(msg)
    return phi


def _gradients(mesh: TriMesh) -> tuple[FloatArray, FloatArray, FloatArray]:
    """∂φ/∂x, ∂φ/∂y of the three hat functions of each triangle (1/m), and areas."""
    p = mesh.nodes_m[mesh.triangles]  # (t, 3, 2)
    area = triangle_areas(mesh.nodes_m, mesh.triangles)
    x, y = p[..., 0], p[..., 1]
    # ∇φ_i = (y_j − y_k, x_k − x_j) / (2A), (i, j, k) cyclic
    gx = (np.roll(y, -1, axis=1) - np.roll(y, -2, axis=1)) / (2.0 * area[:, None])
    gy = (np.roll(x, -2, axis=1) - np.roll(x, -1, axis=1)) / (2.0 * area[:, None])
    return gx, gy, area


def build_sheet_model(
    sheets: Sequence[PlaneSheet],
    loops: LoopSource,
    *,
    copper_model: CopperModel = "thin",
    h_min_m: float | None = None,
    h_inside_m: float | None = None,
    h_max_m: float = 1e-3,
    grading: float = 0.25,
    edge_h_m: float | None = None,
    near_diameters: float = 1.5,
    far_diameters: float = 4.0,
    max_nodes: int = 5_000,
) -> SheetModel:
    """Mesh the sheets and assemble R, M and Φ for one winding.

    Parameters
    ----------
    sheets : sequence of PlaneSheet
        The copper planes (any heights; none may touch a loop).
    loops : LoopSource
        The winding.
    copper_model : {"thin", "impedance"}, default "thin"
        See :data:`CopperModel`; use "impedance" when t/δ exceeds about 0.7 at the
        frequencies of interest.
    h_min_m : float, optional
        Element size at the winding's projection (m); default half the gap between the
        filaments and each current sheet (about 1 % on fields, ring current and ΔL
        against the infinite-sheet reference; the full gap gives about 5 %).
    h_inside_m : float, optional
        Largest element inside the projection of a loop parallel to the sheet (m);
        default 2 x h_min. The field below the copper inside a winding is the small
        difference of the source field and the sheet field, which needs this.
    h_max_m : float, default 1e-3
        Largest element (m).
    grading : float, default 0.25
        Size growth per unit distance (1).
    edge_h_m : float, optional
        Element size along all copper edges (m); default h_min + grading/2 x the distance
        from the edge to the winding.
    near_diameters, far_diameters : float
        Pair-integral rule thresholds, see :func:`triangle_pair_integrals`.
    max_nodes : int, default 5000
        Refuse larger meshes, over all sheets: the matrices are dense (memory grows as
        the square of the node count; about 0.35 GB at 1,800 nodes).

    Returns
    -------
    SheetModel

    Raises
    ------
    InputError
        No sheets, bad polygons, a loop touching a sheet, or a model name not known.
    LimitError
        The mesh would exceed ``max_nodes``.
    """
    if copper_model not in ("thin", "impedance"):
        msg = f"copper_model must be 'thin' or 'impedance'; got {copper_model!r}"
        raise InputError(msg)
    if not sheets:
        msg = "sheets must hold at least one PlaneSheet; got none"
        raise InputError(msg)
    if not (h_max_m > 0.0 and grading > 0.0):
        msg = f"h_max_m and grading must be > 0; got {h_max_m!r} and {grading!r}"
        raise InputError(msg)
    mean_z = float(loops.centre_m[:, 2].mean())
    side = np.array([1.0 if mean_z >= s.z_m else -1.0 for s in sheets])
    if copper_model == "impedance":
        cz = np.array(
            [s.z_m + sd * 0.5 * s.thickness_m for s, sd in zip(sheets, side, strict=True)]
        )
    else:
        cz = np.array([s.z_m for s in sheets])
    meshes: list[TriMesh] = []
    for s, sheet in enumerate(sheets):
        size = _size_field(
            sheet, float(cz[s]), loops, h_min_m=h_min_m, h_inside_m=h_inside_m,
            h_max_m=h_max_m, grading=grading, edge_h_m=edge_h_m,
        )  # fmt: skip
        meshes.append(
            mesh_polygons(
                list(sheet.polygons),
                size,
                guides=_guide_curves(loops, size.h_min_m),
                max_nodes=max_nodes,
            )
        )
    total = sum(m.n_nodes for m in meshes)
    if total > max_nodes:
        msg = f"meshes of all sheets must need at most {max_nodes} nodes; got {total}"
        raise LimitError(msg)
    # unknown numbering
    node_unknown: list[IntArray] = []
    hole_unknown: list[int] = []
    hole_sheet: list[int] = []
    unknown_sheet: list[int] = []
    n_u = 0
    for s, mesh in enumerate(meshes):
        un = np.full(mesh.n_nodes, -1, dtype=np.int64)
        in_hole = np.zeros(mesh.n_nodes, dtype=np.bool_)
        for h in mesh.hole_nodes:
            in_hole[h] = True
        free = np.flatnonzero(~mesh.boundary & ~in_hole)
        un[free] = n_u + np.arange(len(free))
        n_u += len(free)
        for h in mesh.hole_nodes:
            un[h] = n_u
            hole_unknown.append(n_u)
            hole_sheet.append(s)
            n_u += 1
        unknown_sheet.extend([s] * (n_u - len(unknown_sheet)))
        node_unknown.append(un)
    if n_u == 0:
        msg = "sheets must have interior mesh nodes; got copper too small to mesh"
        raise InputError(msg)
    # triangle data and gradient maps onto the unknowns
    verts: list[FloatArray] = []
    tz: list[FloatArray] = []
    tsheet: list[IntArray] = []
    ids: list[IntArray] = []
    areas: list[FloatArray] = []
    rows: list[IntArray] = []
    cols: list[IntArray] = []
    vx: list[FloatArray] = []
    vy: list[FloatArray] = []
    t_off = 0
    n_off = 0
    for s, mesh in enumerate(meshes):
        gx, gy, area = _gradients(mesh)
        t = mesh.n_triangles
        verts.append(mesh.nodes_m[mesh.triangles])
        tz.append(np.full(t, cz[s]))
        tsheet.append(np.full(t, s, dtype=np.int64))
        ids.append(mesh.triangles + n_off)
        areas.append(area)
        un = node_unknown[s][mesh.triangles]  # (t, 3)
        ok = un >= 0
        rows.append((np.arange(t)[:, None] + t_off + np.zeros((1, 3), dtype=np.int64))[ok])
        cols.append(un[ok])
        vx.append(gx[ok])
        vy.append(gy[ok])
        t_off += t
        n_off += mesh.n_nodes
    r_idx = np.concatenate(rows)
    c_idx = np.concatenate(cols)
    grad_x = sp.csr_matrix((np.concatenate(vx), (r_idx, c_idx)), shape=(t_off, n_u))
    grad_y = sp.csr_matrix((np.concatenate(vy), (r_idx, c_idx)), shape=(t_off, n_u))
    tri_v = np.concatenate(verts)
    tri_z = np.concatenate(tz)
    tri_s = np.concatenate(tsheet)
    tri_a = np.concatenate(areas)
    # R = K/(σt), block-diagonal per sheet
    cond = np.array([s.sigma_s_per_m * s.thickness_m for s in sheets])[tri_s]
    wdiag = sp.diags(tri_a / cond)
    r_mat = (grad_x.T @ wdiag @ grad_x + grad_y.T @ wdiag @ grad_y).toarray()
    # M = μ0/(4π) (Gxᵀ G Gx + Gyᵀ G Gy)
    # G = diag(A) K diag(A), K per unit area: fold the areas into the gradient maps
    weight = sp.diags(tri_a)
    m_mat = _inductance_matrix(
        tri_v, tri_z, np.concatenate(ids),
        [(weight @ grad_x).tocsr(), (weight @ grad_y).tocsr()], near_diameters, far_diameters,
    )  # fmt: skip
    m_mat += m_mat.T
    m_mat *= 0.5 * _C
    phi = _source_phi(tri_v, tri_z, tri_a, grad_x, grad_y, loops)
    reduction = SymmetricReduction.of(m_mat, r_mat)
    return SheetModel(
        sheets=tuple(sheets),
        loops=loops,
        meshes=tuple(meshes),
        copper_model=copper_model,
        current_z_m=cz,
        source_side=side,
        n_unknowns=n_u,
        node_unknown=tuple(node_unknown),
        hole_unknown=np.asarray(hole_unknown, dtype=np.int64),
        hole_sheet=np.asarray(hole_sheet, dtype=np.int64),
        unknown_sheet=np.asarray(unknown_sheet, dtype=np.int64),
        tri_vertices_m=tri_v,
        tri_z_m=tri_z,
        tri_sheet=tri_s,
        tri_area_m2=tri_a,
        grad_x=grad_x,
        grad_y=grad_y,
        stiffness_r=r_mat,
        inductance_m=m_mat,
        source_phi=phi,
        reduction=reduction,
    )


def solve_sheets(
    sheets: Sequence[PlaneSheet],
    loops: LoopSource,
    freqs_hz: ArrayLike,
    *,
    copper_model: CopperModel = "thin",
    mesh_h_m: float | None = None,
    h_max_m: float = 1e-3,
    grading: float = 0.25,
) -> SheetSolution:
    """Build the model of the sheets under a winding and solve it at frequencies.

    Parameters
    ----------
    sheets : sequence of PlaneSheet
        The copper planes.
    loops : LoopSource
        The winding.
    freqs_hz : array_like, shape (F,) or scalar
        Frequencies (Hz).
    copper_model : {"thin", "impedance"}, default "thin"
        See :data:`CopperModel`.
    mesh_h_m : float, optional
        Element size at the winding's projection (m), ``h_min_m`` of
        :func:`build_sheet_model` (default half the winding-to-sheet gap).
    h_max_m, grading : float
        As :func:`build_sheet_model`.

    Returns
    -------
    SheetSolution
        Use ``solution.model`` to solve further frequencies without rebuilding.
    """
    model = build_sheet_model(
        sheets, loops, copper_model=copper_model, h_min_m=mesh_h_m, h_max_m=h_max_m,
        grading=grading,
    )  # fmt: skip
    return model.solve(freqs_hz)
