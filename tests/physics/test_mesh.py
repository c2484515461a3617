"""Graded triangle meshes of polygons with holes (fluxshadow.physics.mesh).

Independent routes: a written-out crossing-number test and an analytic disc
(point-in-polygon), shapely (polygon area), the shoelace area of the
input rings, Euler's formula for a triangulated polygon with holes (V − E + F = 1 − holes,
textbook), and the radius-ratio quality 2r/R (textbook). Sizes are checked against the
size field's own definition on hand-picked points.
"""

from __future__ import annotations

import numpy as np
import pytest
import shapely
from scipy.spatial import cKDTree

from fluxshadow.errors import InputError, LimitError
from fluxshadow.physics.mesh import (
    SizeField,
    TriMesh,
    mesh_polygons,
    points_in_polygon,
    triangle_areas,
    triangle_quality,
)

MM = 1e-3


def square(side_m: float, centre: tuple[float, float] = (0.0, 0.0)) -> np.ndarray:
    half = side_m / 2
    return np.array([[-half, -half], [half, -half], [half, half], [-half, half]]) + centre


def circle(r_m: float, n: int = 48, centre: tuple[float, float] = (0.0, 0.0)) -> np.ndarray:
    a = 2 * np.pi * np.arange(n) / n
    return np.column_stack([centre[0] + r_m * np.cos(a), centre[1] + r_m * np.sin(a)])


def shoelace(ring: np.ndarray) -> float:
    x, y = ring[:, 0], ring[:, 1]
    return 0.5 * abs(float(np.sum(x * np.roll(y, -1) - np.roll(x, -1) * y)))


def winding_field(h_min: float = 0.2 * MM, h_max: float = 1.0 * MM) -> SizeField:
    """Sizes for a 2 mm winding projection at the origin."""
    return SizeField.from_groups([(circle(2 * MM, 400), h_min)], h_max_m=h_max, grading=0.3)


def edges_of(mesh: TriMesh) -> tuple[np.ndarray, np.ndarray]:
    """Unique edges and the number of triangles using each."""
    t = mesh.triangles
    e = np.sort(np.concatenate([t[:, [0, 1]], t[:, [1, 2]], t[:, [2, 0]]]), axis=1)
    return np.unique(e, axis=0, return_counts=True)


def check_topology(mesh: TriMesh, n_holes: int) -> None:
    """Manifold, oriented, Euler characteristic 1 − holes per polygon, boundary recovered."""
    assert np.all(triangle_areas(mesh.nodes_m, mesh.triangles) > 0.0)
    edges, count = edges_of(mesh)
    assert set(np.unique(count).tolist()) <= {1, 2}
    n_polys = int(mesh.node_polygon.max()) + 1
    # Euler's formula for a triangulated planar domain (textbook)
    assert mesh.n_nodes - len(edges) + mesh.n_triangles == n_polys - n_holes
    # every boundary edge (used once) joins two nodes of one ring, in ring order
    outer = edges[count == 1]
    ring_of = np.full(mesh.n_nodes, -1)
    ring_of[mesh.boundary] = 0
    for k, h in enumerate(mesh.hole_nodes):
        ring_of[h] = k + 1
    assert np.all(ring_of[outer[:, 0]] >= 0)
    assert np.all(ring_of[outer[:, 0]] == ring_of[outer[:, 1]])
    n_ring_nodes = int(np.count_nonzero(mesh.boundary)) + sum(len(h) for h in mesh.hole_nodes)
    assert len(outer) == n_ring_nodes


def test_size_field_definition() -> None:
    """h = min(h_max, size + grading * distance) at hand-picked points."""
    size = SizeField.from_groups(
        [(np.array([[0.0, 0.0]]), 0.1 * MM), (np.array([[10 * MM, 0.0]]), 0.3 * MM)],
        h_max_m=1 * MM,
        grading=0.25,
    )
    pts = np.array([[0.0, 0.0], [2 * MM, 0.0], [9 * MM, 0.0], [5 * MM, 20 * MM]])
    expected = [0.1 * MM, 0.6 * MM, 0.55 * MM, 1 * MM]
    np.testing.assert_allclose(size(pts), expected, rtol=1e-12)
    assert size.h_min_m == pytest.approx(0.1 * MM)


def crossing_number_inside(pts: np.ndarray, rings: list[np.ndarray]) -> np.ndarray:
    """Textbook even-odd crossing-number test (a ray to +x crosses the rings an odd number
    of times from inside), written out here as the independent route."""
    inside = np.zeros(len(pts), dtype=bool)
    for ring in rings:
        a, b = ring, np.roll(ring, -1, axis=0)
        for (ax, ay), (bx, by) in zip(a, b, strict=True):
            straddle = (ay > pts[:, 1]) != (by > pts[:, 1])
            with np.errstate(divide="ignore", invalid="ignore"):
                x_cross = ax + (pts[:, 1] - ay) * (bx - ax) / (by - ay)
            inside ^= straddle & (pts[:, 0] < x_cross)
    return inside


def test_points_in_polygon_matches_the_crossing_number() -> None:
    """Even-odd test against a written-out crossing-number test on random points, and
    against the analytic inside of a disc with a square hole (points off the boundary)."""
    ext = circle(5 * MM, 37)
    holes = [circle(1 * MM, 23, (1 * MM, 0.5 * MM)), square(1.5 * MM, (-2.5 * MM, -1 * MM))]
    rng = np.random.default_rng(3)
    pts = rng.uniform(-6 * MM, 6 * MM, (4000, 2))
    ours = points_in_polygon(pts, [ext, *holes])
    assert np.array_equal(ours, crossing_number_inside(pts, [ext, *holes]))
    # a 4096-gon is a disc to 1e-6 of its radius; keep points 1 % away from any edge
    disc, hole = circle(5 * MM, 4096), square(2 * MM)
    r = np.hypot(*pts.T)
    off_edge = (np.abs(r - 5 * MM) > 0.05 * MM) & (
        np.abs(np.abs(pts).max(axis=1) - 1 * MM) > 0.01 * MM
    )
    analytic = (r < 5 * MM) & (np.abs(pts).max(axis=1) > 1 * MM)
    ours = points_in_polygon(pts[off_edge], [disc, hole])
    assert np.array_equal(ours, analytic[off_edge])
    assert 0 < ours.sum() < len(ours)


def test_points_on_a_ring_are_outside() -> None:
    """Vertices and edge midpoints of the rings are not inside (documented behaviour)."""
    ext, hole = square(10 * MM), square(2 * MM)[::-1]
    on = np.concatenate([ext, hole, 0.5 * (ext + np.roll(ext, -1, axis=0)), hole * 0.5])
    inside = points_in_polygon(on, [ext, hole])
    assert not np.any(inside[:12])
    assert not np.any(inside[12:])  # half-way to the hole's corners lies inside the hole
    assert points_in_polygon(np.array([[3 * MM, 3 * MM]]), [ext, hole])[0]


def test_square_with_hole_area_and_topology() -> None:
    """Meshed area equals the polygon area (shoelace, shapely); Euler and boundary hold."""
    ext = square(20 * MM)
    hole = circle(1 * MM, 64)[::-1]
    mesh = mesh_polygons([(ext, [hole])], winding_field(), simplify_m=0.0)
    expected = shoelace(ext) - shoelace(hole)
    assert mesh.area_m2() == pytest.approx(expected, rel=1e-12)
    assert shapely.Polygon(ext, [hole]).area == pytest.approx(expected, rel=1e-12)
    check_topology(mesh, n_holes=1)
    assert len(mesh.hole_nodes) == 1
    # the hole's nodes lie on its circle (a 64-gon: within its sagitta)
    r = np.hypot(*mesh.nodes_m[mesh.hole_nodes[0]].T)
    assert np.all(np.abs(r - 1 * MM) <= 1 * MM * (1 - np.cos(np.pi / 64)) + 1e-12)
    assert np.all(mesh.boundary[mesh.hole_nodes[0]] == False)  # noqa: E712


def test_quality_and_grading() -> None:
    """Good triangles; edges about h_min near the winding, about h_max far away."""
    mesh = mesh_polygons([(square(20 * MM), [])], winding_field())
    q = triangle_quality(mesh.nodes_m, mesh.triangles)
    assert q.min() > 0.25
    assert q.mean() > 0.85
    edges, _count = edges_of(mesh)
    a, b = mesh.nodes_m[edges[:, 0]], mesh.nodes_m[edges[:, 1]]
    length = np.hypot(*(a - b).T)
    r_mid = np.hypot(*(0.5 * (a + b)).T)
    near = np.abs(r_mid - 2 * MM) < 0.15 * MM
    far = r_mid > 8 * MM
    assert 0.6 * 0.2 * MM < np.median(length[near]) < 1.5 * 0.2 * MM
    assert 0.6 * MM < np.median(length[far]) < 1.3 * MM


def test_equilateral_triangle_quality_is_one() -> None:
    """2r/R = 1 for an equilateral triangle and small for a sliver (textbook)."""
    nodes = np.array([[0.0, 0.0], [1.0, 0.0], [0.5, np.sqrt(3) / 2], [0.5, 0.01]])
    q = triangle_quality(nodes, np.array([[0, 1, 2], [0, 1, 3]]))
    assert q[0] == pytest.approx(1.0, rel=1e-12)
    assert q[1] < 0.05


def test_guides_put_nodes_on_the_curve() -> None:
    """With a guide curve, nodes lie on it about h_min apart, and the topology holds."""
    guide = circle(2 * MM, 720)
    mesh = mesh_polygons([(square(20 * MM), [])], winding_field(), guides=[guide])
    r = np.hypot(*mesh.nodes_m.T)
    on = np.abs(r - 2 * MM) < 1e-3 * MM
    # circumference / h_min nodes on the curve, within 20 %
    assert abs(int(on.sum()) - 2 * np.pi * 2 / 0.2) < 0.2 * 2 * np.pi * 2 / 0.2
    check_topology(mesh, n_holes=0)


def test_slotted_void_is_part_of_the_exterior() -> None:
    """A void opened to the edge by a slot has no hole ring; Euler gives 1."""
    w = 0.15  # mm
    outline = [
        [-10, -10], [10, -10], [10, -w], [3, -w], [3, -1], [1, -1],
        [1, 1], [3, 1], [3, w], [10, w], [10, 10], [-10, 10],
    ]  # fmt: skip
    ext = np.array(outline) * MM
    mesh = mesh_polygons([(ext, [])], winding_field(), simplify_m=0.0)
    check_topology(mesh, n_holes=0)
    assert mesh.hole_nodes == ()
    assert mesh.area_m2() == pytest.approx(shoelace(ext), rel=1e-12)
    # the slot is resolved: no triangle straddles it
    cent = mesh.nodes_m[mesh.triangles].mean(axis=1)
    assert not np.any((cent[:, 0] > 3 * MM) & (np.abs(cent[:, 1]) < w * MM))


def test_two_islands_and_simplification() -> None:
    """Islands are meshed apart; simplification changes the area by at most tol x perimeter."""
    a = circle(3 * MM, 400, (-5 * MM, 0.0))
    b = square(4 * MM, (5 * MM, 0.0))
    tol = 0.02 * MM
    mesh = mesh_polygons([(a, []), (b, [])], winding_field(), simplify_m=tol)
    check_topology(mesh, n_holes=0)
    assert set(mesh.node_polygon.tolist()) == {0, 1}
    t_poly = mesh.node_polygon[mesh.triangles]
    assert np.all(t_poly == t_poly[:, :1])  # no triangle joins the islands
    exact = shoelace(a) + shoelace(b)
    perimeter = 2 * np.pi * 3 * MM
    assert abs(mesh.area_m2() - exact) <= tol * perimeter
    assert np.count_nonzero(mesh.node_polygon[mesh.boundary] == 0) < 400


def solver_like_size() -> SizeField:
    """h = 0.1 mm at a 2 mm winding, grading 0.25, 0.2 mm inside it, h_max 1 mm."""
    groups = [(circle(2 * MM, 400), 0.1 * MM)]
    g = np.mgrid[-2:2:0.1, -2:2:0.1].reshape(2, -1).T * MM
    groups.append((g[np.hypot(*g.T) < 2 * MM], 0.2 * MM))
    return SizeField.from_groups(groups, h_max_m=1 * MM, grading=0.25)


def implied_node_count(size: SizeField, half_side_m: float) -> float:
    """Nodes of an equilateral mesh following h on a square: each node owns two triangles
    of side h, area √3/2 h² (textbook), so N = ∫ 2 / (√3 h²) dA, plus half the boundary
    nodes (a boundary node owns half as much area), the boundary split at h."""
    g = np.linspace(-half_side_m, half_side_m, 801)
    cell = (g[1] - g[0]) ** 2
    x, y = np.meshgrid(0.5 * (g[1:] + g[:-1]), 0.5 * (g[1:] + g[:-1]))
    h = size(np.column_stack([x.ravel(), y.ravel()]))
    interior = float(np.sum(2.0 / (np.sqrt(3.0) * h * h)) * cell)
    edge = np.column_stack([g, np.full_like(g, half_side_m)])
    boundary = 4.0 * float(np.sum(1.0 / size(edge)[1:]) * (g[1] - g[0]))
    return interior + 0.5 * boundary


def test_default_solver_sizing_node_count() -> None:
    """A 20 mm patch sized as the sheet solver does has as many nodes as its size field
    implies, within 7 % (1,571 for 1,552; it had 1,734 before the guide layers followed h
    point by point)."""
    size = solver_like_size()
    mesh = mesh_polygons([(square(20 * MM), [])], size, guides=[circle(2 * MM, 720)])
    implied = implied_node_count(size, 10 * MM)
    assert 1450 <= implied <= 1650  # the check below is not vacuous
    assert abs(mesh.n_nodes / implied - 1.0) < 0.07
    check_topology(mesh, n_holes=0)
    q = triangle_quality(mesh.nodes_m, mesh.triangles)
    assert q.min() > 0.3
    assert q.mean() > 0.85


def test_guide_layers_are_stepped_by_the_local_size() -> None:
    """Layers along the winding sit (√3/2) h apart (equilateral rows), h taken half-way
    between them, and carry about circumference / h nodes each; the inside cap (0.2 mm)
    does not hold the outside layers back, nor does a copper edge near one part of the
    curve (a finer size there) shrink the steps elsewhere."""
    size = solver_like_size()
    near_edge = SizeField.from_groups(
        [
            (circle(2 * MM, 400), 0.1 * MM),
            (np.column_stack([np.full(200, 2.6 * MM), np.linspace(-1, 1, 200) * MM]), 0.1 * MM),
        ],
        h_max_m=1 * MM,
        grading=0.25,
    )
    for field in (size, near_edge):
        mesh = mesh_polygons([(square(20 * MM), [])], field, guides=[circle(2 * MM, 720)])
        p = mesh.nodes_m
        # the layers on the side x < 0 (away from the edge), outside the winding
        sel = (p[:, 0] < -0.5 * MM) & (np.abs(p[:, 1]) < 0.6 * MM)
        r = np.sort(np.hypot(*p[sel].T))
        r = r[(r > 2 * MM - 1e-9) & (r < 3.2 * MM)]
        # layers: clusters of radii (nodes of one layer lie within 1 µm of a circle)
        breaks = np.flatnonzero(np.diff(r) > 0.02 * MM)
        layer_r = np.array([c.mean() for c in np.split(r, breaks + 1)])
        assert len(layer_r) >= 5
        gaps = np.diff(layer_r)
        mid = 0.5 * (layer_r[1:] + layer_r[:-1])
        h_mid = 0.1 * MM + 0.25 * (mid - 2 * MM)
        np.testing.assert_allclose(gaps, 0.5 * np.sqrt(3.0) * h_mid, rtol=0.05)


@pytest.mark.parametrize(
    ("ring", "what"),
    [
        (np.array([[0.0, 0.0], [1.0, 0.0]]), "at least 3 distinct vertices"),
        (np.array([[0.0, 0.0], [1.0, 0.0], [np.nan, 1.0]]), "finite coordinates"),
        (np.array([[0.0, 0.0], [1.0, 0.0], [2.0, 0.0]]), "non-zero area"),
        (np.zeros((4, 3)), "(n, 2) array"),
    ],
)
def test_bad_rings_are_input_errors(ring: np.ndarray, what: str) -> None:
    with pytest.raises(InputError, match=r"exterior ring of polygon 0 must") as err:
        mesh_polygons([(ring, [])], winding_field())
    assert what in str(err.value)


def test_too_many_nodes_is_a_limit_error() -> None:
    with pytest.raises(LimitError, match="must need at most 100 nodes"):
        mesh_polygons([(square(20 * MM), [])], winding_field(), max_nodes=100)


def test_no_polygon_is_an_input_error() -> None:
    with pytest.raises(InputError, match="at least one polygon"):
        mesh_polygons([], winding_field())


def test_hole_outside_the_exterior_is_an_input_error() -> None:
    with pytest.raises(InputError, match="hole 0 of polygon 0 must lie inside the exterior"):
        mesh_polygons([(square(4 * MM), [square(1 * MM, (3 * MM, 0.0))])], winding_field())


def test_overlapping_holes_are_an_input_error() -> None:
    holes = [square(1 * MM), square(1 * MM, (0.3 * MM, 0.2 * MM))]
    with pytest.raises(InputError, match="must not overlap hole"):
        mesh_polygons([(square(10 * MM), holes)], winding_field())


@pytest.mark.parametrize(
    ("radius_mm", "h_curve_mm", "h_inside_mm"),
    [(1.4, 0.37, 0.75), (2.0, 0.1, 0.2), (1.0, 0.3, 0.6)],
)
def test_layers_shrunk_around_the_centre_leave_a_small_triangle_there(
    radius_mm: float, h_curve_mm: float, h_inside_mm: float
) -> None:
    """Inside a winding (size h_curve at the curve, h_inside inside) the inner layers close
    in on the centre: no node within 0.25 h of it (a node on the winding axis puts a kink
    of the stream function right under the field points there), a triangle of good
    quality contains it, and no two nodes there are nearer than 0.4 h."""
    h_in = h_inside_mm * MM
    g = np.mgrid[-2:2:0.05, -2:2:0.05].reshape(2, -1).T * MM
    size = SizeField.from_groups(
        [
            (circle(radius_mm * MM, 400), h_curve_mm * MM),
            (g[np.hypot(*g.T) < radius_mm * MM], h_in),
        ],
        h_max_m=1 * MM,
        grading=0.25,
    )
    mesh = mesh_polygons([(square(14 * MM), [])], size, guides=[circle(radius_mm * MM, 720)])
    check_topology(mesh, n_holes=0)
    r = np.hypot(*mesh.nodes_m.T)
    assert r.min() > 0.25 * h_in
    tri = mesh.nodes_m[mesh.triangles]
    # the triangle holding the origin: all three edge functions positive (CCW)
    cross = [
        (tri[:, (i + 1) % 3, 0] - tri[:, i, 0]) * (0.0 - tri[:, i, 1])
        - (tri[:, (i + 1) % 3, 1] - tri[:, i, 1]) * (0.0 - tri[:, i, 0])
        for i in range(3)
    ]
    holding = np.flatnonzero(np.all(np.array(cross) > 0.0, axis=0))
    assert len(holding) == 1
    q = triangle_quality(mesh.nodes_m, mesh.triangles)
    assert q[holding[0]] > 0.8
    near = r < 2 * h_in
    d, _ = cKDTree(mesh.nodes_m[near]).query(mesh.nodes_m[near], k=2)
    assert d[:, 1].min() > 0.4 * h_in
