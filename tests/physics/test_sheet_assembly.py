"""Fast assembly of the thin-sheet solver (fluxshadow.physics.sheet) against its plain forms.

The solver builds M block by block (lower half of the triangle-pair kernel only, triangles
in Z-order, near pairs found and integrated per block) and evaluates the closed-form
potential with asinh instead of the logarithm. These are rearrangements of the same sums,
so each is checked against the plain route to rounding: M against Σ Pᵀ K P with the whole
matrix of :func:`triangle_pair_integrals`, the pair rule against the public
:func:`triangle_potential` at the rule's points, the field operator against the closed
form within 4 diameters, and the frequency sweep against a dense complex solve.
"""

from __future__ import annotations

import numpy as np
import pytest
import scipy.sparse as sp

import fluxshadow.physics.sheet as sheet_mod
from fluxshadow.physics.constants import MU0
from fluxshadow.physics.sheet import (
    LoopSource,
    PlaneSheet,
    SheetModel,
    build_sheet_model,
    dunavant7_rule,
    triangle_pair_integrals,
    triangle_potential,
    triangle_potential_gradient,
)

MM = 1e-3
D = 35e-6
COARSE = {"h_min_m": 0.3e-3, "grading": 0.4, "h_max_m": 1.5e-3}


def square(side_m: float) -> np.ndarray:
    h = side_m / 2
    return np.array([[-h, -h], [h, -h], [h, h], [-h, h]])


def small_model(two_planes: bool) -> SheetModel:
    """A coarse 8 mm patch with an enclosed void (and a second plane below), 1 mm loop."""
    void = np.array([[1.5, -0.5], [1.5, 0.5], [2.5, 0.5], [2.5, -0.5]]) * MM  # clockwise
    sheets = [PlaneSheet.from_polygons([(square(8 * MM), [void])], z_m=-D / 2, thickness_m=D)]
    if two_planes:
        sheets.append(
            PlaneSheet.from_polygons([(square(6 * MM), [])], z_m=-0.3 * MM, thickness_m=D)
        )
    loops = LoopSource.from_arrays([0.0, 0.0, 0.3 * MM], [0, 0, 1], 1 * MM, 5.0)
    return build_sheet_model(sheets, loops, **COARSE)


@pytest.mark.parametrize("two_planes", [False, True])
def test_blocked_inductance_matrix_equals_the_dense_product(
    two_planes: bool, monkeypatch: pytest.MonkeyPatch
) -> None:
    """M of the model equals μ0/(4π) Σ (A∇φ)ᵀ K (A∇φ) with the whole K, to rounding, also
    with blocks of 16 triangles (many blocks, pairs across blocks)."""
    for block in (sheet_mod._KERNEL_BLOCK, 1):
        monkeypatch.setattr(sheet_mod, "_KERNEL_BLOCK", block)
        model = small_model(two_planes)
        ids = np.concatenate(
            [
                m.triangles + off
                for m, off in zip(model.meshes, [0, model.meshes[0].n_nodes], strict=False)
            ]
        )
        k = triangle_pair_integrals(
            model.tri_vertices_m, model.tri_z_m, node_ids=ids, per_unit_area=True
        )
        w = sp.diags(model.tri_area_m2)
        px = (w @ model.grad_x).toarray()
        py = (w @ model.grad_y).toarray()
        ref = MU0 / (4 * np.pi) * (px.T @ k @ px + py.T @ k @ py)
        ref = 0.5 * (ref + ref.T)
        scale = np.abs(ref).max()
        np.testing.assert_allclose(model.inductance_m, ref, rtol=0, atol=1e-12 * scale)
        assert np.array_equal(model.inductance_m, model.inductance_m.T)


def test_pair_rule_equals_the_public_potential_on_edge_lines_and_between_planes() -> None:
    """The 7-point pair value equals the 7-point rule applied to triangle_potential (the
    logarithm form), also with the rule's centre point on the line of an edge of the other
    triangle (R0 = 0 there) and between parallel planes."""
    tj = np.array([[0.0, 0.0], [1.0, 0.0], [0.5, 0.8]]) * MM
    base = np.array([[0.0, -0.3], [0.45, 0.15], [-0.45, 0.15]]) * MM  # centroid at 0
    ti = base + np.array([1.6, 0.0]) * MM  # centroid on the line y = 0 of tj's first edge
    bary, w = dunavant7_rule()
    area_i, area_j = (
        0.5
        * abs((t[1, 0] - t[0, 0]) * (t[2, 1] - t[0, 1]) - (t[2, 0] - t[0, 0]) * (t[1, 1] - t[0, 1]))
        for t in (ti, tj)
    )
    for dz in (0.0, 0.2 * MM):
        g = triangle_pair_integrals(np.stack([ti, tj]), np.array([dz, 0.0]))
        pts = np.column_stack([bary @ ti, np.full(7, dz)])
        pot = triangle_potential(pts, np.broadcast_to(tj, (7, 3, 2)), np.zeros(7))
        # the pair is "near" (closer than 1.5 diameters): the 7-point rule on ti
        assert g[0, 1] == pytest.approx(area_i * float(pot @ w), rel=1e-13)
        assert g[0, 1] == g[1, 0]
        # the mean of 1/r is below 1/(closest approach, 0.206 mm)
        assert g[0, 1] < area_i * area_j / (0.2 * MM)


def test_field_operator_is_closed_form_within_four_diameters() -> None:
    """The operator's entries for point-triangle pairs within 4 diameters are the closed
    form ∇V, and beyond it the 3-point rule stays within 1e-3 of it."""
    model = small_model(False)
    rng = np.random.default_rng(3)
    pts = np.column_stack([rng.uniform(-5, 5, (40, 2)) * MM, rng.uniform(-1.0, -0.1, 40) * MM])
    g = model._operator_pairs(pts, "gradient")
    v = model.tri_vertices_m
    t = len(v)
    pi = np.repeat(np.arange(len(pts)), t)
    ti = np.tile(np.arange(t), len(pts))
    exact = triangle_potential_gradient(pts[pi], v[ti], model.tri_z_m[ti]).reshape(len(pts), t, 3)
    cent = v.mean(axis=1)
    diam = np.linalg.norm(np.roll(v, -1, axis=1) - v, axis=2).max(axis=1)
    dist = np.linalg.norm(
        np.concatenate(
            [pts[:, None, :2] - cent[None], (pts[:, 2:3] - model.tri_z_m)[..., None]], axis=2
        ),
        axis=2,
    )
    near = dist < 4.0 * diam[None, :]
    assert near.any()
    assert (~near).any()
    np.testing.assert_allclose(g[near], exact[near], rtol=1e-14, atol=0)
    scale = np.abs(exact[~near]).max()
    np.testing.assert_allclose(g[~near], exact[~near], rtol=0, atol=1e-3 * scale)


def test_sweep_matches_a_dense_solve_with_the_impedance_sheet() -> None:
    """Solving through the reduction equals (ζR + jωM) u = −jωΦ solved densely."""
    model = small_model(False)
    loops = model.loops
    imp = build_sheet_model(list(model.sheets), loops, copper_model="impedance", **COARSE)
    f = np.array([3e5, 3e6])
    sol = imp.solve(f)
    for k, fk in enumerate(f):
        zeta = imp.impedance_factor(float(fk))[0]
        w = 2 * np.pi * fk
        a = zeta * imp.stiffness_r + 1j * w * imp.inductance_m
        u = np.linalg.solve(a, -1j * w * imp.source_phi)
        np.testing.assert_allclose(sol.unknowns[k], u, rtol=0, atol=1e-9 * np.abs(u).max())
    # the loss from the real-part product equals ½ ΔR I²
    np.testing.assert_allclose(sol.sheet_loss_w, 0.5 * sol.delta_r_ohm, rtol=1e-9)


def test_spatial_order_is_a_permutation_that_keeps_neighbours_together() -> None:
    """Z-order of a 32 x 32 grid: a permutation, and most consecutive points are one grid
    step apart (a random order would almost never be)."""
    g = np.stack(np.meshgrid(np.arange(32.0), np.arange(32.0)), axis=-1).reshape(-1, 2)
    rng = np.random.default_rng(0)
    pts = rng.permutation(g) * 1e-4
    order = sheet_mod._spatial_order(np.column_stack([pts, np.zeros(len(pts))]))
    assert np.array_equal(np.sort(order), np.arange(len(pts)))
    step = np.linalg.norm(np.diff(pts[order], axis=0), axis=1)
    assert np.mean(np.isclose(step, 1e-4)) > 0.5
