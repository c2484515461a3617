"""Graded triangle meshes of plane polygons with holes, for the thin-sheet solver.

numpy and scipy, shapely for point-in-polygon. A polygon is an exterior ring and a list
of hole rings, each an (n, 2) array of vertices (m) in the plane of the sheet; the closing
vertex may be repeated or not. The mesh is graded by a :class:`SizeField`: the target edge
length at a point is ``min(h_max, min_g (size_g + grading * distance to feature group
g))`` (plus ramps and caps, see the class), so elements are small near the features (the
projection of a winding, copper edges) and grow linearly away from them, by ``grading``
metres per metre.

Method
------
1. Each ring is simplified (Douglas–Peucker, tolerance ``simplify_m``) and then densified:
   its edges are cut into pieces of about the local size (equal steps of ∫ ds / h). The
   polygon's corners stay nodes, so the meshed domain is the simplified polygon exactly.
2. Along optional guide curves (the projection of a winding) nodes are laid in layers:
   on the curve and on offset curves both sides. Each side is stepped sample by sample,
   by (√3/2) h taken half-way to the next layer (h averaged over about h_min of curve to
   keep the layers smooth), so the layers follow the size field where it varies along
   the curve; points on a layer are about h apart and staggered from one layer to the
   next. A sample stops where h reaches h_max or past a centre of curvature. These nodes
   stay fixed.
3. The other interior points start on a hexagonal lattice of spacing ``min h``, thinned
   at random (fixed seed, so meshes are reproducible) with probability (h_min / h)², and
   kept only inside the polygon, at least ``0.5 h`` from its boundary and ``0.7 h`` from
   the guide nodes.
4. A few force-based smoothing passes (a bar-spring relaxation towards the target sizes,
   boundary and guide nodes fixed; after Persson & Strang's DistMesh, SIAM Review 46(2),
   2004, from memory) even out the spacing.
5. ``scipy.spatial.Delaunay`` triangulates all points; triangles whose centroid lies
   outside the exterior ring or inside a hole are dropped. Every densified boundary piece
   must come out as a triangle edge (then no kept triangle crosses the boundary, and the
   centroid test is exact): missing pieces are split at their midpoint, interior points
   inside the piece's diametral circle are removed, and the triangulation is redone.

Several polygons (islands of one sheet) are meshed separately and stacked.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass, field
from math import ceil, sqrt

import numpy as np
import numpy.typing as npt
import shapely
from scipy.spatial import Delaunay, cKDTree

from fluxshadow.errors import InputError, LimitError
from fluxshadow.physics._types import ArrayLike, BoolArray, FloatArray

__all__ = [
    "IntArray",
    "Polygon",
    "SizeField",
    "TriMesh",
    "mesh_polygons",
    "points_in_polygon",
    "triangle_areas",
    "triangle_quality",
]

IntArray = npt.NDArray[np.int64]

Polygon = tuple[ArrayLike, Sequence[ArrayLike]]
"""A polygon: exterior ring (n, 2) and a sequence of hole rings (m_i, 2), metres."""

_SEED = 20240611
_RECOVERY_ROUNDS = 30
_MIN_BOUNDARY_GAP = 0.5
_LAYER_WINDOW = 5
"""Guide layers average h over this many curve samples (0.2 h_min apart) each side."""
"""Interior points keep at least this fraction of the local size from the boundary."""


@dataclass(frozen=True, kw_only=True, eq=False)
class SizeField:
    """Target element size h(p) (m) of a graded mesh.

    ``h(p) = min(h_max_m, groups, ramps, caps)`` with

    - a group: ``size + grading * dist(p, points)``;
    - a ramp: ``size + slope * dist(p, points of a group) + grading * dist(p, points)``
      (e.g. copper edges, finer where they are close to a winding);
    - a cap: ``size`` inside a closed ring.

    Distances are to the nearest feature point (sample features densely: at about half
    the smallest size).

    Attributes
    ----------
    h_max_m : float
        Largest element size (m).
    grading : float
        Growth of the size per unit distance from a feature (1), e.g. 0.3.
    sizes_m : tuple of float
        Size at the features of each group (m).
    trees : tuple of scipy.spatial.cKDTree
        One tree per group over its feature points (m); build with :meth:`from_groups`.
    ramps : tuple of (cKDTree, size_m, group index, slope)
        Ramp features.
    caps : tuple of (ring (k, 2), size_m)
        Caps.
    """

    h_max_m: float
    grading: float
    sizes_m: tuple[float, ...]
    trees: tuple[cKDTree, ...] = field(repr=False)
    ramps: tuple[tuple[cKDTree, float, int, float], ...] = field(default=(), repr=False)
    caps: tuple[tuple[FloatArray, float], ...] = field(default=(), repr=False)

    @classmethod
    def from_groups(
        cls,
        groups: Sequence[tuple[ArrayLike, float]],
        *,
        h_max_m: float,
        grading: float = 0.3,
        ramps: Sequence[tuple[ArrayLike, float, int, float]] = (),
        caps: Sequence[tuple[ArrayLike, float]] = (),
    ) -> SizeField:
        """Build a size field from feature groups.

        Parameters
        ----------
        groups : sequence of (points, size_m)
            Feature points, array_like of shape (k, 2) (m), and the element size at them
            (m). Empty groups are dropped (ramps then must not refer to them).
        h_max_m : float
            Largest element size (m), > 0.
        grading : float, default 0.3
            Size growth per unit distance (1), > 0.
        ramps : sequence of (points, size_m, group, slope), optional
            Features whose size grows by ``slope`` per unit distance from group
            ``group`` (an index into ``groups``).
        caps : sequence of (ring, size_m), optional
            Closed rings (k, 2) inside which the size is at most ``size_m``.

        Returns
        -------
        SizeField
        """
        sizes: list[float] = []
        trees: list[cKDTree] = []
        index: dict[int, int] = {}
        for k, (pts, size) in enumerate(groups):
            p = np.asarray(pts, dtype=np.float64).reshape(-1, 2)
            if len(p) == 0:
                continue
            index[k] = len(trees)
            sizes.append(min(float(size), h_max_m))
            trees.append(cKDTree(p))
        ramp_list = [
            (
                cKDTree(np.asarray(p, dtype=np.float64).reshape(-1, 2)),
                float(sz),
                index[g],
                float(sl),
            )
            for p, sz, g, sl in ramps
            if len(np.asarray(p).reshape(-1, 2))
        ]
        cap_list = [(np.asarray(r, dtype=np.float64).reshape(-1, 2), float(sz)) for r, sz in caps]
        return cls(
            h_max_m=h_max_m,
            grading=grading,
            sizes_m=tuple(sizes),
            trees=tuple(trees),
            ramps=tuple(ramp_list),
            caps=tuple(cap_list),
        )

    @property
    def h_min_m(self) -> float:
        """Smallest size anywhere (m)."""
        return min(
            [self.h_max_m, *self.sizes_m, *(r[1] for r in self.ramps), *(c[1] for c in self.caps)]
        )

    def __call__(self, points_m: ArrayLike) -> FloatArray:
        """Evaluate h at points.

        Parameters
        ----------
        points_m : array_like, shape (n, 2)
            Points (m).

        Returns
        -------
        ndarray, shape (n,)
            Target size (m).
        """
        p = np.asarray(points_m, dtype=np.float64).reshape(-1, 2)
        h = np.full(len(p), self.h_max_m)
        dists: list[FloatArray] = []
        for size, tree in zip(self.sizes_m, self.trees, strict=True):
            reach = (self.h_max_m - size) / self.grading
            # ramps need the distance farther out
            slopes = [r[3] for r in self.ramps if self.trees[r[2]] is tree]
            if slopes:
                reach = max(reach, (self.h_max_m - size) / min(slopes))
            dist, _ = tree.query(p, distance_upper_bound=reach)
            dists.append(dist)
            h = np.minimum(h, size + self.grading * dist)  # inf beyond reach
        for tree, size, group, slope in self.ramps:
            base = size + slope * dists[group]
            near = base < self.h_max_m
            if not np.any(near):
                continue
            reach = (self.h_max_m - size) / self.grading
            dist, _ = tree.query(p[near], distance_upper_bound=reach)
            h[near] = np.minimum(h[near], base[near] + self.grading * dist)
        for ring, size in self.caps:
            lo, hi = ring.min(axis=0), ring.max(axis=0)
            box = np.all((p >= lo) & (p <= hi), axis=1) & (h > size)
            if np.any(box):
                idx = np.flatnonzero(box)
                inside = points_in_polygon(p[idx], [ring])
                h[idx[inside]] = size
        return h


@dataclass(frozen=True, kw_only=True, eq=False)
class TriMesh:
    """A triangle mesh of one or more polygons with holes.

    Attributes
    ----------
    nodes_m : ndarray, shape (n, 2)
        Node coordinates (m).
    triangles : ndarray of int64, shape (t, 3)
        Node indices of each triangle, counter-clockwise.
    boundary : ndarray of bool, shape (n,)
        True on the exterior ring of each polygon (slotted voids included: a void opened
        to the edge is part of the exterior ring).
    hole_nodes : tuple of int64 ndarrays
        Node indices on each hole ring, in ring order; holes of polygon 0 first.
    hole_polygon : ndarray of int64, shape (H,)
        Polygon index of each hole.
    node_polygon : ndarray of int64, shape (n,)
        Polygon index of each node.
    """

    nodes_m: FloatArray
    triangles: IntArray
    boundary: BoolArray
    hole_nodes: tuple[IntArray, ...]
    hole_polygon: IntArray
    node_polygon: IntArray

    @property
    def n_nodes(self) -> int:
        """Number of nodes."""
        return int(self.nodes_m.shape[0])

    @property
    def n_triangles(self) -> int:
        """Number of triangles."""
        return int(self.triangles.shape[0])

    def area_m2(self) -> float:
        """Total meshed area (m²)."""
        return float(triangle_areas(self.nodes_m, self.triangles).sum())


def triangle_areas(nodes_m: ArrayLike, triangles: ArrayLike) -> FloatArray:
    """Signed triangle areas (positive for counter-clockwise triangles).

    Parameters
    ----------
    nodes_m : array_like, shape (n, 2)
        Node coordinates (m).
    triangles : array_like of int, shape (t, 3)
        Node indices.

    Returns
    -------
    ndarray, shape (t,)
        Signed areas (m²).
    """
    p = np.asarray(nodes_m, dtype=np.float64)
    t = np.asarray(triangles, dtype=np.int64)
    a, b, c = p[t[:, 0]], p[t[:, 1]], p[t[:, 2]]
    return np.asarray(
        0.5
        * ((b[:, 0] - a[:, 0]) * (c[:, 1] - a[:, 1]) - (c[:, 0] - a[:, 0]) * (b[:, 1] - a[:, 1])),
        dtype=np.float64,
    )


def triangle_quality(nodes_m: ArrayLike, triangles: ArrayLike) -> FloatArray:
    """Radius ratio 2 r_in / r_circ of each triangle (1 equilateral, 0 degenerate).

    Parameters
    ----------
    nodes_m : array_like, shape (n, 2)
        Node coordinates (m).
    triangles : array_like of int, shape (t, 3)
        Node indices.

    Returns
    -------
    ndarray, shape (t,)
        Radius ratio (1).

    References
    ----------
    r_in = 2A / (a+b+c), r_circ = abc / (4A) (textbook), so the ratio is
    16 A² / (abc (a+b+c)).
    """
    p = np.asarray(nodes_m, dtype=np.float64)
    t = np.asarray(triangles, dtype=np.int64)
    a = np.linalg.norm(p[t[:, 1]] - p[t[:, 2]], axis=1)
    b = np.linalg.norm(p[t[:, 2]] - p[t[:, 0]], axis=1)
    c = np.linalg.norm(p[t[:, 0]] - p[t[:, 1]], axis=1)
    area = np.abs(triangle_areas(p, t))
    return np.asarray(16.0 * area * area / (a * b * c * (a + b + c)), dtype=np.float64)


def _segments_of_rings(rings: Sequence[FloatArray]) -> tuple[FloatArray, FloatArray]:
    """Start and end points of all ring edges, shapes (E, 2)."""
    starts = list(rings)
    ends = [np.roll(r, -1, axis=0) for r in rings]
    return np.concatenate(starts), np.concatenate(ends)


def points_in_polygon(points_m: ArrayLike, rings: Sequence[ArrayLike]) -> BoolArray:
    """Even-odd point-in-polygon test against a set of closed rings.

    Parameters
    ----------
    points_m : array_like, shape (n, 2)
        Points (m).
    rings : sequence of array_like, each (k, 2)
        Closed rings (the closing vertex may be repeated or not): an exterior ring and
        its holes, the holes inside the exterior ring.

    Returns
    -------
    ndarray of bool, shape (n,)
        True for points inside an odd number of rings (inside the copper). Points exactly
        on a ring are outside.

    Notes
    -----
    One vectorised call of shapely's ``contains_xy`` on a prepared polygon of all the
    rings: its point locator counts ray crossings over the segments of every ring
    (even-odd, so it needs no valid polygon) and reports points on a segment as on the
    boundary (not contained). Points outside the first ring's bounding box are outside.
    """
    p = np.asarray(points_m, dtype=np.float64).reshape(-1, 2)
    rs = [np.asarray(r, dtype=np.float64).reshape(-1, 2) for r in rings]
    if len(p) == 0 or not rs:
        return np.zeros(len(p), dtype=np.bool_)
    poly = shapely.Polygon(rs[0], rs[1:])
    shapely.prepare(poly)
    return np.asarray(shapely.contains_xy(poly, p[:, 0], p[:, 1]), dtype=np.bool_)


def _clean_ring(ring: ArrayLike, what: str) -> FloatArray:
    """Drop a repeated closing vertex and consecutive duplicates; check the size."""
    r = np.asarray(ring, dtype=np.float64)
    if r.ndim != 2 or r.shape[1] != 2:
        msg = f"{what} must be an (n, 2) array of vertices; got shape {r.shape}"
        raise InputError(msg)
    if not np.all(np.isfinite(r)):
        msg = f"{what} must have finite coordinates; got a NaN or infinite vertex"
        raise InputError(msg)
    if len(r) > 1 and np.array_equal(r[0], r[-1]):
        r = r[:-1]
    if len(r) > 1:
        keep = np.any(r != np.roll(r, 1, axis=0), axis=1)
        r = r[keep]
    if len(r) < 3:
        msg = f"{what} must have at least 3 distinct vertices; got {len(r)}"
        raise InputError(msg)
    area = 0.5 * float(np.sum(r[:, 0] * np.roll(r[:, 1], -1) - np.roll(r[:, 0], -1) * r[:, 1]))
    if area == 0.0:
        msg = f"{what} must enclose a non-zero area; got a degenerate ring"
        raise InputError(msg)
    return r


def _simplify_ring(ring: FloatArray, tol_m: float) -> FloatArray:
    """Douglas–Peucker simplification of a closed ring (keeps at least 3 vertices)."""
    n = len(ring)
    if tol_m <= 0.0 or n <= 3:
        return ring
    # split the ring at vertex 0 and at the vertex farthest from it
    far = int(np.argmax(np.sum((ring - ring[0]) ** 2, axis=1)))
    keep = np.zeros(n + 1, dtype=np.bool_)
    keep[[0, far, n]] = True
    closed = np.concatenate([ring, ring[:1]])
    stack = [(0, far), (far, n)]
    while stack:
        i, j = stack.pop()
        if j - i < 2:
            continue
        seg = closed[j] - closed[i]
        rel = closed[i + 1 : j] - closed[i]
        length = float(np.hypot(seg[0], seg[1]))
        if length == 0.0:
            dist = np.hypot(rel[:, 0], rel[:, 1])
        else:
            dist = np.abs(seg[0] * rel[:, 1] - seg[1] * rel[:, 0]) / length
        k = int(np.argmax(dist))
        if dist[k] > tol_m:
            m = i + 1 + k
            keep[m] = True
            stack.extend([(i, m), (m, j)])
    out = closed[:-1][keep[:-1]]
    return out if len(out) >= 3 else ring


def _densify_ring(ring: FloatArray, size: SizeField, sample_m: float) -> FloatArray:
    """Insert points along each edge so that pieces are about the local size long."""
    ends = np.roll(ring, -1, axis=0)
    length = np.hypot(*(ends - ring).T)
    n_s = np.maximum(2, np.ceil(length / sample_m).astype(np.int64) + 1)
    edge = np.repeat(np.arange(len(ring)), n_s)
    first = np.concatenate([[0], np.cumsum(n_s)[:-1]])
    s = (np.arange(int(n_s.sum())) - first[edge]) / (n_s[edge] - 1)
    pts = ring[edge] + s[:, None] * (ends - ring)[edge]
    inv_h = 1.0 / size(pts)
    # per edge: cumulative ∫ ds / h by the trapezoid rule
    ds = np.diff(s, prepend=0.0) * length[edge]
    ds[first] = 0.0
    trap = 0.5 * (inv_h + np.roll(inv_h, 1)) * ds
    trap[first] = 0.0
    cum = np.cumsum(trap)
    cum -= np.repeat(cum[first], n_s)
    total = cum[first + n_s - 1]
    pieces: list[FloatArray] = []
    for k in range(len(ring)):
        sl = slice(first[k], first[k] + n_s[k])
        n_seg = max(1, round(total[k]))
        targets = np.linspace(0.0, total[k], n_seg + 1)[:-1]
        s_new = np.interp(targets, cum[sl], s[sl])
        pieces.append(ring[k] + s_new[:, None] * (ends[k] - ring[k]))
    return np.concatenate(pieces)


def _boundary_distance(points: FloatArray, rings: Sequence[FloatArray]) -> FloatArray:
    """Distance from points to the nearest ring edge (exact, via a KD-tree shortlist)."""
    a, b = _segments_of_rings(rings)
    mid = 0.5 * (a + b)
    half = 0.5 * np.hypot(*(b - a).T)
    tree = cKDTree(mid)
    k = min(len(mid), 8)
    d_mid, idx = tree.query(points, k=k)
    d_mid = np.asarray(d_mid).reshape(len(points), k)
    idx = np.asarray(idx).reshape(len(points), k)
    sa, sb = a[idx], b[idx]
    seg = sb - sa
    len2 = np.sum(seg * seg, axis=-1)
    rel = points[:, None, :] - sa
    with np.errstate(invalid="ignore", divide="ignore"):  # zero-length pieces: t = 0
        t = np.clip(np.where(len2 > 0.0, np.sum(rel * seg, axis=-1) / len2, 0.0), 0.0, 1.0)
    dist = np.hypot(*(rel - t[..., None] * seg).transpose(2, 0, 1)).min(axis=1)
    # a piece not among the k nearest midpoints is at least (d_mid_k - max half) away
    bound = d_mid[:, -1] - float(half.max())
    need = (dist > bound) & (k < len(mid))
    if np.any(need):
        p = points[need]
        rel_all = p[:, None, :] - a[None, :, :]
        seg_all = (b - a)[None, :, :]
        len2_all = np.sum(seg_all * seg_all, axis=-1)
        with np.errstate(invalid="ignore", divide="ignore"):
            t_all = np.clip(
                np.where(len2_all > 0.0, np.sum(rel_all * seg_all, axis=-1) / len2_all, 0.0),
                0.0,
                1.0,
            )
        d_all = np.hypot(*(rel_all - t_all[..., None] * seg_all).transpose(2, 0, 1))
        dist[need] = d_all.min(axis=1)
    return np.asarray(dist, dtype=np.float64)


def _hex_lattice(lo: FloatArray, hi: FloatArray, spacing: float) -> FloatArray:
    """Hexagonal lattice points covering the box [lo, hi]."""
    dy = spacing * sqrt(3.0) / 2.0
    ny = ceil((hi[1] - lo[1]) / dy) + 1
    nx = ceil((hi[0] - lo[0]) / spacing) + 2
    iy, ix = np.meshgrid(np.arange(ny), np.arange(nx), indexing="ij")
    x = lo[0] + (ix + 0.5 * (iy % 2)) * spacing - 0.5 * spacing
    y = lo[1] + iy * dy
    return np.column_stack([x.ravel(), y.ravel()])


def _edges_of(triangles: IntArray) -> IntArray:
    """Unique undirected edges (e, 2), smaller index first."""
    e = np.concatenate([triangles[:, [0, 1]], triangles[:, [1, 2]], triangles[:, [2, 0]]])
    e.sort(axis=1)
    n = int(e.max(initial=0)) + 1
    key = np.sort(e[:, 0] * n + e[:, 1])
    key = key[np.concatenate([[True], key[1:] != key[:-1]])]
    return np.column_stack([key // n, key % n])


def _triangulate(points: FloatArray, rings: Sequence[FloatArray], n_boundary: int) -> IntArray:
    """Delaunay triangles (CCW) inside the polygon, of non-zero area.

    Points from ``n_boundary`` on are inside the polygon, so a triangle with such a
    vertex is inside once the boundary pieces are edges; only triangles of boundary
    nodes alone need the centroid test.
    """
    tri = np.asarray(Delaunay(points).simplices, dtype=np.int64)
    area = triangle_areas(points, tri)
    scale = float(np.ptp(points, axis=0).max())
    ok = np.abs(area) > 1e-12 * scale * scale
    tri, area = tri[ok], area[ok]
    flip = area < 0.0
    tri[flip] = tri[flip][:, [0, 2, 1]]
    test = np.all(tri < n_boundary, axis=1)
    keep = ~test
    keep[test] = points_in_polygon(points[tri[test]].mean(axis=1), rings)
    return np.asarray(tri[keep], dtype=np.int64)


def _smooth(
    points: FloatArray,
    n_fixed: int,
    n_boundary: int,
    rings: Sequence[FloatArray],
    size: SizeField,
    iterations: int,
) -> FloatArray:
    """Bar-spring relaxation of the free points (indices >= n_fixed) towards h(p)."""
    p = points.copy()
    if iterations <= 0 or len(p) == n_fixed:
        return p
    for _ in range(iterations):
        tri = _triangulate(p, rings, n_boundary)
        bars = _edges_of(tri)
        vec = p[bars[:, 0]] - p[bars[:, 1]]
        length = np.hypot(vec[:, 0], vec[:, 1])
        h_bar = size(0.5 * (p[bars[:, 0]] + p[bars[:, 1]]))
        # desired lengths slightly longer than the current ones: bars push apart
        l0 = 1.2 * h_bar * sqrt(float(np.sum(length**2) / np.sum(h_bar**2)))
        force = np.maximum(l0 - length, 0.0) / length
        fvec = force[:, None] * vec
        total = np.zeros_like(p)
        np.add.at(total, bars[:, 0], fvec)
        np.add.at(total, bars[:, 1], -fvec)
        total[:n_fixed] = 0.0
        step = 0.2 * total
        new = p + step
        free = np.arange(n_fixed, len(p))
        moved = new[free]
        h_new = size(moved)
        ok = points_in_polygon(moved, rings) & (
            _boundary_distance(moved, rings) > 0.3 * _MIN_BOUNDARY_GAP * h_new
        )
        p[free[ok]] = moved[ok]
        if float(np.max(np.abs(step[free]), initial=0.0)) < 1e-3 * size.h_min_m:
            break
    return p


def _resample_by_size(
    dense: FloatArray, h: FloatArray, phase: float, *, min_picks: int = 3
) -> IntArray:
    """Pick points of a densely sampled closed curve about one local size apart.

    The curve may have gaps (dropped samples): steps longer than four samples' length are
    not counted as arc length. Without gaps the picks are spread evenly over the whole
    closed curve (no short piece at the seam); with gaps, a last pick closer than 0.6 h
    to the first one is dropped.
    """
    if len(dense) < 3:
        return np.arange(len(dense), dtype=np.int64)
    closed = np.concatenate([dense, dense[:1]])
    step = np.hypot(*np.diff(closed, axis=0).T)
    typical = float(np.median(step))
    gap = step > 4.0 * typical
    inv_h = 1.0 / h
    inc = 0.5 * (inv_h + np.roll(inv_h, -1)) * np.where(gap, 0.0, step)
    cum = np.concatenate([[0.0], np.cumsum(inc)])  # (len + 1,), closing step last
    if not np.any(gap):
        n_pick = round(float(cum[-1]))
        if n_pick < min_picks:  # a layer shrunk around a centre of curvature: none
            return np.zeros(0, dtype=np.int64)
        n_pick = max(3, n_pick)
        targets = (np.arange(n_pick) + phase) * (cum[-1] / n_pick)
        picks = np.searchsorted(cum[:-1], targets)
        return np.asarray(np.unique(np.minimum(picks, len(dense) - 1)), dtype=np.int64)
    marks = np.floor(cum[:-1] + phase)
    picks = np.flatnonzero(np.concatenate([[True], marks[1:] != marks[:-1]]))
    if len(picks) > 2:
        d_seam = float(np.hypot(*(dense[picks[-1]] - dense[picks[0]])))
        if d_seam < 0.6 * min(h[picks[-1]], h[picks[0]]):
            picks = picks[:-1]
    return np.asarray(picks, dtype=np.int64)


def _circular_mean(values: FloatArray, half: int) -> FloatArray:
    """Moving average over 2 half + 1 neighbours of a closed sequence, shape as values."""
    if half <= 0 or len(values) < 2 * half + 1:
        return values
    padded = np.concatenate([values[-half:], values, values[:half]])
    cum = np.concatenate([[0.0], np.cumsum(padded)])
    return np.asarray((cum[2 * half + 1 :] - cum[: -2 * half - 1]) / (2 * half + 1))


def _guide_points(
    guides: Sequence[FloatArray], size: SizeField, rings: Sequence[FloatArray]
) -> FloatArray:
    """Nodes in layers along guide curves: on each curve and on offset curves both sides.

    Each side of a curve is stepped on its own, point by point: the point of layer k+1
    sits at offset d_(k+1) = d_k + (√3/2) h(point of layer k) along the normal of its
    curve sample, so the layers follow the size field where it varies along the curve
    (finer near a copper edge, capped inside the winding) instead of all taking its
    smallest value. Points along a layer are about h apart and staggered by half a
    spacing from one layer to the next (near-equilateral triangles aligned with the
    curve). A sample stops after the layer where h reaches h_max, or once its offset
    passes a centre of curvature of the curve.
    """
    out: list[FloatArray] = []
    accepted: FloatArray = np.concatenate(rings)
    tree = cKDTree(accepted)
    step_factor = 0.5 * sqrt(3.0)

    def emit(pts: FloatArray, h_pts: FloatArray, layer: int) -> None:
        nonlocal accepted, tree
        inside = points_in_polygon(pts, rings)
        pts, h_pts = pts[inside], h_pts[inside]
        if len(pts) == 0:
            return
        # an offset layer too short for three picks gets none here (see below)
        sel = _resample_by_size(pts, h_pts, 0.5 * (layer % 2), min_picks=3 if layer else 0)
        centre = pts.mean(axis=0)
        shrunk = layer > 0 and float(np.max(np.hypot(*(pts - centre).T))) < 0.5 * float(
            np.mean(h_pts)
        )
        if len(sel) == 0 or shrunk:
            # a layer shrunk to less than 3 h around a centre of curvature: a small
            # triangle (side 0.52 h) centred there instead, so that no node sits on the
            # centre (the winding axis, where the field near the sheet is evaluated: a
            # node there puts a kink of the stream function under the evaluation point)
            h_c = float(np.mean(h_pts))
            ang = np.pi / 2.0 + 2.0 * np.pi / 3.0 * np.arange(3)
            pick = centre + 0.3 * h_c * np.column_stack([np.cos(ang), np.sin(ang)])
            h_pick = np.full(3, h_c)
        else:
            pick, h_pick = pts[sel], h_pts[sel]
        d_acc, _ = tree.query(pick)
        keep = d_acc > 0.5 * h_pick
        # a layer shorter than a few h (near a centre of curvature) still gets three
        # picks: of two picks nearer than 0.5 h, drop the later one
        pairs = cKDTree(pick).query_pairs(0.5 * float(h_pick.max()), output_type="ndarray")
        if len(pairs):
            gap = np.hypot(*(pick[pairs[:, 0]] - pick[pairs[:, 1]]).T)
            close = gap <= 0.5 * np.minimum(h_pick[pairs[:, 0]], h_pick[pairs[:, 1]])
            keep[pairs[close].max(axis=1)] = False
        pick, h_pick = pick[keep], h_pick[keep]
        if len(pick):
            pick = pick[_boundary_distance(pick, rings) > _MIN_BOUNDARY_GAP * h_pick]
        if len(pick):
            out.append(pick)
            accepted = np.concatenate([accepted, pick])
            tree = cKDTree(accepted)

    for curve in guides:
        c = np.asarray(curve, dtype=np.float64)
        # dense closed sampling of the curve: each segment cut into ceil(length / fine)
        # equal steps, all segments at once
        nxt = np.roll(c, -1, axis=0)
        seg = np.hypot(*(nxt - c).T)
        fine = 0.2 * size.h_min_m
        n_seg = np.maximum(1, np.ceil(seg / fine).astype(np.int64))
        which = np.repeat(np.arange(len(c)), n_seg)
        k_in = np.arange(len(which)) - np.repeat(np.cumsum(n_seg) - n_seg, n_seg)
        dense = c[which] + (k_in * (1.0 / n_seg)[which])[:, None] * (nxt - c)[which]
        tan = np.roll(dense, -1, axis=0) - np.roll(dense, 1, axis=0)
        tlen = np.hypot(tan[:, 0], tan[:, 1])
        ok_t = tlen > 1e-3 * fine
        dense = dense[ok_t]
        normal = np.column_stack([tan[ok_t, 1], -tan[ok_t, 0]]) / tlen[ok_t, None]
        if len(dense) == 0:
            continue
        curve_tree = cKDTree(dense)
        # h along a layer, averaged over about one h_min of curve each side (five
        # samples): the steps, and so the offset curves, stay smooth where h ripples
        # between the feature points of the size field
        h_raw0 = size(dense)
        h0 = _circular_mean(h_raw0, _LAYER_WINDOW)
        emit(dense, h0, 0)
        for sgn in (1.0, -1.0):
            # first step by h half-way out too
            h_half_raw = size(dense + sgn * (0.5 * step_factor * h0)[:, None] * normal)
            offset = step_factor * _circular_mean(h_half_raw, _LAYER_WINDOW)
            h_raw = h_raw0.copy()
            active = h_raw0 < size.h_max_m
            layer = 1
            while np.any(active):
                # h is re-evaluated at the active samples; stopped ones keep their last
                # value for their neighbours' averages
                idx = np.flatnonzero(active)
                off = offset[idx]
                pts = dense[idx] + sgn * off[:, None] * normal[idx]
                h_raw[idx] = size(pts)
                h_pts = _circular_mean(h_raw, _LAYER_WINDOW)[idx]
                # past a centre of curvature: a curve point nearer than 0.95 offset
                # (those samples stop for good)
                dist, _ = curve_tree.query(
                    pts, distance_upper_bound=np.nextafter(0.95 * float(off.max()), 1.0)
                )
                past = dist <= 0.95 * off
                emit(pts[~past], h_pts[~past], layer)
                # step by h half-way to the next layer (h grows away from the curve)
                half = pts + sgn * (0.5 * step_factor * h_pts)[:, None] * normal[idx]
                h_half_raw[idx] = size(half)
                offset[idx] = off + step_factor * _circular_mean(h_half_raw, _LAYER_WINDOW)[idx]
                active[idx[past | (h_raw[idx] >= size.h_max_m)]] = False
                active &= offset <= 1e3 * size.h_max_m
                layer += 1
    if not out:
        return np.zeros((0, 2))
    return np.concatenate(out)


def _mesh_one(
    exterior: FloatArray,
    holes: list[FloatArray],
    size: SizeField,
    *,
    guides: Sequence[FloatArray],
    smooth_iterations: int,
    max_nodes: int,
) -> tuple[FloatArray, IntArray, int, list[IntArray]]:
    """Mesh one polygon; returns nodes, triangles, exterior node count and hole nodes."""
    h_min = size.h_min_m
    sample = 0.25 * h_min
    rings = [_densify_ring(r, size, sample) for r in [exterior, *holes]]
    lo = exterior.min(axis=0)
    hi = exterior.max(axis=0)
    n_lattice = (hi - lo).prod() / (h_min * h_min * sqrt(3.0) / 2.0)
    if n_lattice > 20 * max_nodes:
        msg = (
            f"mesh of the sheet must need at most {max_nodes} nodes; got a "
            f"{(hi - lo)[0] * 1e3:.1f} x {(hi - lo)[1] * 1e3:.1f} mm polygon at "
            f"{h_min * 1e3:.3f} mm elements"
        )
        raise LimitError(msg)
    fixed = _guide_points(guides, size, rings)
    cand = _hex_lattice(lo, hi, h_min)
    h = size(cand)
    rng = np.random.default_rng(_SEED)
    cand = cand[rng.random(len(cand)) < (h_min / h) ** 2]
    cand = cand[points_in_polygon(cand, rings)]
    if len(cand):
        cand = cand[_boundary_distance(cand, rings) > _MIN_BOUNDARY_GAP * size(cand)]
    if len(cand) and len(fixed):
        d_f, _ = cKDTree(fixed).query(cand)
        cand = cand[d_f > 0.7 * size(cand)]
    for _round in range(_RECOVERY_ROUNDS):
        bnd = np.concatenate(rings)
        if len(bnd) + len(fixed) + len(cand) > max_nodes:
            msg = (
                f"mesh of the sheet must need at most {max_nodes} nodes; got "
                f"{len(bnd) + len(fixed) + len(cand)}"
            )
            raise LimitError(msg)
        n_fixed = len(bnd) + len(fixed)
        pts = _smooth(
            np.concatenate([bnd, fixed, cand]),
            n_fixed,
            len(bnd),
            rings,
            size,
            smooth_iterations if _round == 0 else 0,
        )
        cand = pts[n_fixed:]
        tri = _triangulate(pts, rings, len(bnd))
        missing = _missing_boundary_pieces(tri, [len(r) for r in rings])
        if not any(len(m) for m in missing):
            return _compact(pts, tri, rings)
        # split the missing pieces and clear their diametral circles
        for r_idx, miss in enumerate(missing):
            if len(miss) == 0:
                continue
            ring = rings[r_idx]
            nxt = np.roll(ring, -1, axis=0)
            mids = 0.5 * (ring[miss] + nxt[miss])
            radius = 0.5 * np.hypot(*(nxt[miss] - ring[miss]).T)
            mid_tree = cKDTree(mids)
            if len(cand):
                d, which = mid_tree.query(cand)
                cand = cand[d > 1.05 * radius[which]]
            if len(fixed):
                d, which = mid_tree.query(fixed)
                fixed = fixed[d > 1.05 * radius[which]]
            rings[r_idx] = np.insert(ring, miss + 1, mids, axis=0)
    msg = (
        "boundary of the meshed polygon must be recovered by the triangulation; "
        "got edges still missing"
    )
    raise InputError(msg)


def _missing_boundary_pieces(tri: IntArray, ring_sizes: list[int]) -> list[IntArray]:
    """For each ring, the indices i of pieces (i, i+1) that are not triangle edges."""
    edges = _edges_of(tri)
    n_all = int(sum(ring_sizes)) + int(tri.max(initial=0)) + 1
    keys = edges[:, 0] * n_all + edges[:, 1]
    out: list[IntArray] = []
    start = 0
    for n in ring_sizes:
        i = np.arange(n, dtype=np.int64) + start
        j = np.roll(i, -1)
        present = np.isin(np.minimum(i, j) * n_all + np.maximum(i, j), keys)
        out.append(np.flatnonzero(~present).astype(np.int64))
        start += n
    return out


def _compact(
    pts: FloatArray, tri: IntArray, rings: list[FloatArray]
) -> tuple[FloatArray, IntArray, int, list[IntArray]]:
    """Drop nodes no triangle uses; return nodes, triangles, exterior count, hole nodes."""
    used = np.zeros(len(pts), dtype=np.bool_)
    used[tri.ravel()] = True
    sizes = [len(r) for r in rings]
    n_ext = sizes[0]
    # every boundary node is used when all pieces are edges; keep them regardless
    used[: sum(sizes)] = True
    new_index = np.cumsum(used) - 1
    hole_nodes: list[IntArray] = []
    start = n_ext
    for n in sizes[1:]:
        hole_nodes.append(new_index[start : start + n].astype(np.int64))
        start += n
    return pts[used], new_index[tri].astype(np.int64), n_ext, hole_nodes


def _check_holes(ext: FloatArray, holes: list[FloatArray], k: int) -> None:
    """Holes must lie inside the exterior ring and outside each other."""
    for j, h in enumerate(holes):
        if not np.all(points_in_polygon(h, [ext])):
            msg = f"hole {j} of polygon {k} must lie inside the exterior ring; got a vertex outside"
            raise InputError(msg)
        for i, other in enumerate(holes):
            if i != j and np.any(points_in_polygon(h, [other])):
                msg = f"hole {j} of polygon {k} must not overlap hole {i}; got a vertex inside it"
                raise InputError(msg)


def mesh_polygons(
    polygons: Sequence[Polygon],
    size: SizeField,
    *,
    simplify_m: float | None = None,
    guides: Sequence[ArrayLike] = (),
    smooth_iterations: int = 8,
    max_nodes: int = 50_000,
) -> TriMesh:
    """Graded triangle mesh of polygons with holes.

    Parameters
    ----------
    polygons : sequence of (exterior, holes)
        Each exterior is array_like (n, 2) (m), each hole array_like (m_i, 2) (m); holes
        must lie inside their exterior and not touch each other. A void opened to the
        edge by a slot belongs to the exterior ring, not to the holes.
    size : SizeField
        Target element size.
    simplify_m : float, optional
        Douglas–Peucker tolerance for the rings (m); default 5 % of the smallest size.
    guides : sequence of array_like (k, 2), optional
        Closed curves (m), e.g. the projection of a winding, along which nodes are laid
        in layers (on the curve and on offset curves both sides, spaced by the size
        field) instead of at random: the mesh is then aligned with the feature.
    smooth_iterations : int, default 8
        Force-based smoothing passes (0 keeps the thinned lattice points).
    max_nodes : int, default 50000
        Refuse meshes larger than this.

    Returns
    -------
    TriMesh
        The mesh; exterior-ring nodes are flagged in ``boundary``, each hole's ring nodes
        listed in ``hole_nodes``.

    Raises
    ------
    InputError
        A ring is not an (n, 2) array of at least 3 finite, distinct vertices, or the
        boundary cannot be recovered.
    LimitError
        The mesh would exceed ``max_nodes``.
    """
    tol = 0.05 * size.h_min_m if simplify_m is None else simplify_m
    all_nodes: list[FloatArray] = []
    all_tri: list[IntArray] = []
    boundary: list[BoolArray] = []
    hole_nodes: list[IntArray] = []
    hole_polygon: list[int] = []
    node_polygon: list[IntArray] = []
    offset = 0
    for k, (ext_in, holes_in) in enumerate(polygons):
        ext = _simplify_ring(_clean_ring(ext_in, f"exterior ring of polygon {k}"), tol)
        holes = [
            _simplify_ring(_clean_ring(h, f"hole {j} of polygon {k}"), tol)
            for j, h in enumerate(holes_in)
        ]
        _check_holes(ext, holes, k)
        nodes, tri, n_ext, holes_idx = _mesh_one(
            ext,
            holes,
            size,
            guides=[np.asarray(g, dtype=np.float64).reshape(-1, 2) for g in guides],
            smooth_iterations=smooth_iterations,
            max_nodes=max_nodes,
        )
        all_nodes.append(nodes)
        all_tri.append(tri + offset)
        flag = np.zeros(len(nodes), dtype=np.bool_)
        flag[:n_ext] = True
        boundary.append(flag)
        hole_nodes.extend(h + offset for h in holes_idx)
        hole_polygon.extend([k] * len(holes_idx))
        node_polygon.append(np.full(len(nodes), k, dtype=np.int64))
        offset += len(nodes)
    if not all_nodes:
        msg = "polygons must hold at least one polygon; got none"
        raise InputError(msg)
    return TriMesh(
        nodes_m=np.concatenate(all_nodes),
        triangles=np.concatenate(all_tri),
        boundary=np.concatenate(boundary),
        hole_nodes=tuple(hole_nodes),
        hole_polygon=np.asarray(hole_polygon, dtype=np.int64),
        node_polygon=np.concatenate(node_polygon),
    )
