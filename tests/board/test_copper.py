"""Copper composition (fluxshadow.board.copper) against hand-computed areas.

Every expected value is a hand computation written next to the check. Circles are
polygons in the composer: a circle of radius r built with ``quad_segs = q`` is the regular
N-gon (N = 4 q) inscribed in it, area ``N / 2 r^2 sin(2 pi / N)`` (hand computation,
elementary geometry). Tests either use that exact polygon area with a tight tolerance,
or a large ``quad_segs`` and the true circle formula with a tolerance that covers the
polygon error ``1 - N sin(2 pi / N) / (2 pi)``.

Imaging rules under test (Gerber Layer Format Specification, sections on polarity,
regions and plotting, from memory): objects apply in file order, a clear object erases
what came before it only, an aperture's clear parts erase only that aperture's own dark
parts, a region contour with a cut-in leaves its hole open.
"""

from __future__ import annotations

import math
from collections.abc import Callable, Sequence
from pathlib import Path

import numpy as np
import pytest
import shapely
from hypothesis import given, settings
from hypothesis import strategies as st

from fluxshadow.board.copper import LayerArtwork, compose_record, split_plane_traces
from fluxshadow.errors import ConfigError, InputError
from fluxshadow.io.records import FLASH, REGION, TRACK, ApertureRecord, ArtworkRecord

# --------------------------------------------------------------------------- builder


def ngon(radius: float, n: int, cx: float = 0.0, cy: float = 0.0) -> np.ndarray:
    """Closed ring of a regular n-gon inscribed in a circle (first vertex repeated)."""
    a = 2.0 * np.pi * np.arange(n + 1) / n
    ring = np.column_stack([cx + radius * np.cos(a), cy + radius * np.sin(a)])
    ring[-1] = ring[0]
    return ring


def ngon_area(radius: float, n: int) -> float:
    """Area of the regular n-gon inscribed in a circle (hand computation: n triangles)."""
    return 0.5 * n * radius * radius * math.sin(2.0 * math.pi / n)


def rect_ring(w: float, h: float, cx: float = 0.0, cy: float = 0.0) -> np.ndarray:
    x0, x1, y0, y1 = cx - w / 2, cx + w / 2, cy - h / 2, cy + h / 2
    return np.array([[x0, y0], [x1, y0], [x1, y1], [x0, y1], [x0, y0]], dtype=float)


def box_ring(x0: float, y0: float, x1: float, y1: float) -> np.ndarray:
    return np.array([[x0, y0], [x1, y0], [x1, y1], [x0, y1], [x0, y0]], dtype=float)


class Builder:
    """Small hand builder of ArtworkRecords: add apertures and objects in file order."""

    def __init__(self, *, negative: bool = False) -> None:
        self.negative = negative
        self.apertures: list[ApertureRecord] = []
        self.kind: list[int] = []
        self.dark: list[bool] = []
        self.ap: list[int] = []
        self.xy: list[tuple[float, float]] = []
        self.rings: list[list[np.ndarray]] = []
        self.net: list[int] = []
        self.nets: list[str] = []

    def circle(self, d: float) -> int:
        parts = ((True, ngon(d / 2, 64)),) if d > 0 else ()
        self.apertures.append(
            ApertureRecord(
                code=10 + len(self.apertures), template="C", parts=parts, circle_diameter_mm=d
            )
        )
        return len(self.apertures) - 1

    def rect(self, w: float, h: float, hole: float | None = None) -> int:
        parts: list[tuple[bool, np.ndarray]] = [(True, rect_ring(w, h))]
        if hole:
            parts.append((False, ngon(hole / 2, 64)))
        self.apertures.append(
            ApertureRecord(
                code=10 + len(self.apertures),
                template="R",
                parts=tuple(parts),
                circle_diameter_mm=None,
            )
        )
        return len(self.apertures) - 1

    def _net(self, net: str | None) -> int:
        if net is None:
            return -1
        if net not in self.nets:
            self.nets.append(net)
        return self.nets.index(net)

    def flash(
        self, ap: int, x: float, y: float, *, dark: bool = True, net: str | None = None
    ) -> None:
        self.kind.append(FLASH)
        self.dark.append(dark)
        self.ap.append(ap)
        self.xy.append((x, y))
        self.rings.append([])
        self.net.append(self._net(net))

    def track(
        self,
        ap: int,
        pts: Sequence[tuple[float, float]],
        *,
        dark: bool = True,
        net: str | None = None,
    ) -> None:
        arr = np.asarray(pts, dtype=float)
        self.kind.append(TRACK)
        self.dark.append(dark)
        self.ap.append(ap)
        self.xy.append((float(arr[0, 0]), float(arr[0, 1])))
        self.rings.append([arr])
        self.net.append(self._net(net))

    def region(self, *rings: np.ndarray, dark: bool = True, net: str | None = None) -> None:
        self.kind.append(REGION)
        self.dark.append(dark)
        self.ap.append(-1)
        self.xy.append((float(rings[0][0, 0]), float(rings[0][0, 1])))
        self.rings.append([np.asarray(r, dtype=float) for r in rings])
        self.net.append(self._net(net))

    def build(self, source: str = "test.gbr") -> ArtworkRecord:
        obj_ring_start = [0]
        ring_vertex_start = [0]
        verts: list[np.ndarray] = []
        for rings in self.rings:
            for r in rings:
                verts.append(r)
                ring_vertex_start.append(ring_vertex_start[-1] + len(r))
            obj_ring_start.append(obj_ring_start[-1] + len(rings))
        n = len(self.kind)
        return ArtworkRecord(
            source=source,
            units_in_file="mm",
            negative_image=self.negative,
            file_attributes={},
            comments=(),
            apertures=tuple(self.apertures),
            obj_kind=np.array(self.kind, dtype=np.int8),
            obj_dark=np.array(self.dark, dtype=bool),
            obj_aperture=np.array(self.ap, dtype=np.int64),
            obj_xy=np.array(self.xy, dtype=float).reshape(n, 2),
            obj_ring_start=np.array(obj_ring_start, dtype=np.int64),
            ring_vertex_start=np.array(ring_vertex_start, dtype=np.int64),
            vertices=np.concatenate(verts) if verts else np.empty((0, 2)),
            obj_net=np.array(self.net, dtype=np.int64),
            obj_component=np.full(n, -1, dtype=np.int64),
            obj_function=np.full(n, -1, dtype=np.int64),
            nets=tuple(self.nets),
            components=(),
            functions=(),
        )


# --------------------------------------------------------------------------- flashes


def test_circle_flash_area() -> None:
    b = Builder()
    b.flash(b.circle(1.0), 3.0, 4.0)
    rec = b.build()
    # hand computation: regular 32-gon (quad_segs 8) inscribed in r = 0.5
    assert LayerArtwork(rec).copper_area_mm2() == pytest.approx(ngon_area(0.5, 32), rel=1e-12)
    # pi d^2 / 4 with a 256-gon; polygon error 1 - 256 sin(2 pi/256)/(2 pi) = 1.0e-4
    fine = LayerArtwork(rec, quad_segs=64).copper_area_mm2()
    assert fine == pytest.approx(math.pi / 4, rel=1.1e-4)
    assert fine < math.pi / 4
    # the copy is placed at the flash point
    assert compose_record(rec).centroid.coords[0] == pytest.approx((3.0, 4.0), abs=1e-12)


def test_rect_flash_with_hole() -> None:
    b = Builder()
    b.flash(b.rect(2.0, 1.0, hole=0.5), 1.0, 1.0)
    # hand computation: 2 x 1 minus the 64-gon hole of radius 0.25 the builder writes
    expected = 2.0 - ngon_area(0.25, 64)
    assert compose_record(b.build()).area == pytest.approx(expected, rel=1e-12)


def test_aperture_hole_does_not_erase_earlier_objects() -> None:
    b = Builder()
    b.region(box_ring(0, 0, 10, 10))
    b.flash(b.rect(2.0, 1.0, hole=0.5), 5.0, 5.0)
    # hand computation: the hole clears only its own aperture; the region stays whole
    assert compose_record(b.build()).area == pytest.approx(100.0, rel=1e-12)


def test_many_disjoint_flashes_sum() -> None:
    b = Builder()
    r = b.rect(0.5, 0.3)
    c = b.circle(0.4)
    for i in range(20):
        for j in range(10):
            b.flash(r if (i + j) % 2 else c, i * 1.0, j * 1.0)
    # hand computation: 100 rectangles 0.15 mm^2 + 100 32-gons of r 0.2, all disjoint
    expected = 100 * 0.15 + 100 * ngon_area(0.2, 32)
    layer = LayerArtwork(b.build())
    assert layer.copper_area_mm2() == pytest.approx(expected, rel=1e-12)
    assert len(layer.compose().geoms) == 200


# --------------------------------------------------------------------------- tracks


def test_circle_track_area() -> None:
    b = Builder()
    w, length = 0.3, 5.0
    b.track(b.circle(w), [(1.0, 2.0), (1.0 + length, 2.0)])
    rec = b.build()
    # hand computation: L w + the two caps, which form one 32-gon of radius w/2
    exact_polygon = length * w + ngon_area(w / 2, 32)
    assert compose_record(rec).area == pytest.approx(exact_polygon, rel=1e-12)
    # L w + pi w^2 / 4, with the 256-gon error on the cap part only
    fine = compose_record(rec, quad_segs=64).area
    assert fine == pytest.approx(length * w + math.pi * w * w / 4, rel=1e-5)


def test_diagonal_track_area() -> None:
    b = Builder()
    w = 0.5
    b.track(b.circle(w), [(0.0, 0.0), (3.0, 4.0)])  # length 5
    # hand computation: L w + pi w^2 / 4
    fine = compose_record(b.build(), quad_segs=64).area
    assert fine == pytest.approx(5 * w + math.pi * w * w / 4, rel=1e-4)


def test_l_shaped_chain_counts_overlap_once() -> None:
    r = 0.25
    chained = Builder()
    ap = chained.circle(2 * r)
    chained.track(ap, [(0.0, 0.0), (10.0, 0.0)])
    chained.track(ap, [(10.0, 0.0), (10.0, 10.0)])
    single = Builder()
    single.track(single.circle(2 * r), [(0.0, 0.0), (10.0, 0.0), (10.0, 10.0)])
    # hand computation: two capsules (2 r 10 + pi r^2 each) minus their common part near
    # the corner, a disk of r plus an r x r square less the quarter disk they share:
    # 2 (20 r + pi r^2) - (pi r^2 + r^2 - pi r^2 / 4) = 40 r + 5 pi r^2 / 4 - r^2
    expected = 40 * r + 1.25 * math.pi * r * r - r * r
    a_chain = compose_record(chained.build(), quad_segs=64).area
    a_single = compose_record(single.build(), quad_segs=64).area
    assert a_chain == pytest.approx(expected, rel=1e-5)
    assert a_chain == pytest.approx(a_single, rel=1e-12)


def test_chain_breaks_on_gap_and_width() -> None:
    b = Builder()
    thin, thick = b.circle(0.2), b.circle(0.4)
    b.track(thin, [(0.0, 0.0), (5.0, 0.0)])
    b.track(thick, [(5.0, 0.0), (5.0, 5.0)])  # continues, other width
    b.track(thin, [(0.0, 3.0), (2.0, 3.0)])  # gap: starts elsewhere
    layer = LayerArtwork(b.build(), quad_segs=64)
    # reference: the union of each object's own buffer, built one by one (a wrong merge
    # would add copper along (5, 5) -> (0, 3) or draw the thin track with the thick width)
    parts = [
        shapely.LineString([(0, 0), (5, 0)]).buffer(0.1, quad_segs=64),
        shapely.LineString([(5, 0), (5, 5)]).buffer(0.2, quad_segs=64),
        shapely.LineString([(0, 3), (2, 3)]).buffer(0.1, quad_segs=64),
    ]
    assert layer.compose().symmetric_difference(shapely.union_all(parts)).area < 1e-9


def test_rectangle_aperture_track() -> None:
    b = Builder()
    b.track(b.rect(1.0, 0.5), [(0.0, 0.0), (10.0, 0.0)])
    # hand computation: swept rectangle = 10 x 0.5 + the aperture 1 x 0.5
    assert compose_record(b.build()).area == pytest.approx(5.5, rel=1e-12)
    b2 = Builder()
    b2.track(b2.rect(1.0, 1.0), [(0.0, 0.0), (3.0, 4.0)])
    # hand computation: Minkowski sum of a segment (dx, dy) and an a x a square:
    # a^2 + a (|dx| + |dy|) = 1 + 3 + 4
    assert compose_record(b2.build()).area == pytest.approx(8.0, rel=1e-12)


def test_zero_width_track_images_nothing() -> None:
    b = Builder()
    b.track(b.circle(0.0), [(0.0, 0.0), (10.0, 0.0)])
    b.flash(b.circle(0.0), 1.0, 1.0)
    assert compose_record(b.build()).is_empty


# --------------------------------------------------------------------------- regions, polarity


def test_region_with_clear_flash_hole() -> None:
    b = Builder()
    b.region(box_ring(0, 0, 10, 10))
    b.flash(b.circle(2.0), 5.0, 5.0, dark=False)
    # hand computation: 100 - 32-gon of r 1
    assert compose_record(b.build()).area == pytest.approx(100 - ngon_area(1.0, 32), rel=1e-12)


def test_lpd_lpc_lpd_order() -> None:
    b = Builder()
    b.flash(b.rect(1, 1), 20, 20, dark=False)  # clear before anything: no effect
    b.region(box_ring(0, 0, 10, 10))
    b.region(box_ring(3, 3, 7, 7), dark=False)
    b.flash(b.rect(2, 2), 5, 5)  # re-darkens inside the cleared square
    # hand computation: 100 - 16 + 4
    layer = LayerArtwork(b.build())
    assert layer.copper_area_mm2() == pytest.approx(88.0, rel=1e-12)
    # a clear object only erases what came before it
    b2 = Builder()
    b2.flash(b2.rect(2, 2), 5, 5)
    b2.region(box_ring(3, 3, 7, 7), dark=False)
    b2.region(box_ring(0, 0, 10, 10), dark=True)
    assert compose_record(b2.build()).area == pytest.approx(100.0, rel=1e-12)


@pytest.mark.parametrize("hole_ccw", [False, True])
def test_cut_in_region_keeps_hole(hole_ccw: bool) -> None:
    hole = [(7, 5), (7, 3), (3, 3), (3, 7), (7, 7), (7, 5)]
    if hole_ccw:
        hole = hole[::-1]
    ring = np.array([(0, 0), (10, 0), (10, 5), *hole, (10, 5), (10, 10), (0, 10), (0, 0)], float)
    b = Builder()
    b.region(ring)
    # hand computation: 10 x 10 minus the 4 x 4 hole the cut-in leads to
    assert compose_record(b.build()).area == pytest.approx(84.0, rel=1e-12)


def test_region_contours_union() -> None:
    b = Builder()
    b.region(box_ring(0, 0, 4, 4), box_ring(2, 2, 6, 6), box_ring(10, 10, 11, 11))
    # hand computation: 16 + 16 - 4 (overlap) + 1
    assert compose_record(b.build()).area == pytest.approx(29.0, rel=1e-12)


def test_degenerate_contour_is_a_notice() -> None:
    b = Builder()
    b.region(box_ring(0, 0, 1, 1), np.array([[5, 5], [6, 6], [5, 5]], float))
    layer = LayerArtwork(b.build(source="x.gbr"))
    assert layer.copper_area_mm2() == pytest.approx(1.0)
    assert len(layer.notices) == 1
    assert "x.gbr" in str(layer.notices[0])


# --------------------------------------------------------------------------- windows, negative


def test_window_clips_half_a_square() -> None:
    b = Builder()
    b.region(box_ring(0, 0, 10, 10))
    layer = LayerArtwork(b.build())
    # hand computation: the window keeps x 5 .. 10 of the square
    assert layer.copper_area_mm2((5, -1, 15, 11)) == pytest.approx(50.0, rel=1e-12)
    assert layer.copper_area_mm2((20, 20, 30, 30)) == 0.0
    out = layer.compose((5, -1, 15, 11))
    assert out.geom_type == "MultiPolygon"
    assert out.bounds == pytest.approx((5, 0, 10, 10))


def test_query_includes_touching_boxes() -> None:
    b = Builder()
    r = b.rect(1.0, 1.0)
    b.flash(r, 0.0, 0.0)  # box -0.5 .. 0.5
    b.flash(r, 3.0, 0.0)  # box 2.5 .. 3.5
    layer = LayerArtwork(b.build())
    np.testing.assert_array_equal(layer.query((0.5, 0.0, 1.0, 1.0)), [0])
    np.testing.assert_array_equal(layer.query((0.5, 0.0, 2.5, 1.0)), [0, 1])
    assert layer.query((0.6, 0.0, 2.4, 1.0)).size == 0


def test_negative_image() -> None:
    b = Builder(negative=True)
    r = b.rect(1, 1)
    b.flash(r, 1, 1)
    b.flash(r, 5, 5)
    rec = b.build()
    extent = shapely.box(0, 0, 10, 10)
    # hand computation: extent 100 minus two 1 x 1 clearances
    assert compose_record(rec, plane_extent=extent).area == pytest.approx(98.0, rel=1e-12)
    # default extent: the objects' bounding box 0.5 .. 5.5 squared = 25, minus 2
    assert compose_record(rec).area == pytest.approx(23.0, rel=1e-12)
    # window: extent x 0 .. 3 = 30, minus the one clearance inside
    layer = LayerArtwork(rec, plane_extent=extent)
    assert layer.copper_area_mm2((0, 0, 3, 10)) == pytest.approx(29.0, rel=1e-12)
    # override on an unmarked file
    pos = Builder()
    pos.flash(pos.rect(1, 1), 1, 1)
    assert compose_record(pos.build(), negative=True, plane_extent=extent).area == pytest.approx(
        99.0, rel=1e-12
    )
    assert compose_record(rec, negative=False).area == pytest.approx(2.0, rel=1e-12)


def test_nets_filter() -> None:
    b = Builder()
    b.region(box_ring(0, 0, 10, 10), net="GND")
    b.flash(b.rect(1, 1), 20, 20, net="SW")
    b.flash(b.rect(2, 2), 5, 5, dark=False)
    layer = LayerArtwork(b.build())
    # hand computation: GND square minus the clearance (clears apply whatever their net)
    assert layer.compose(nets={"GND"}).area == pytest.approx(96.0, rel=1e-12)
    assert layer.compose(nets={"SW"}).area == pytest.approx(1.0, rel=1e-12)
    assert layer.compose(nets=set()).is_empty


def test_empty_record() -> None:
    layer = LayerArtwork(Builder().build())
    assert layer.n_objects == 0
    assert layer.bounds is None
    assert layer.compose().is_empty
    assert layer.query((0, 0, 1, 1)).size == 0


# --------------------------------------------------------------------------- plane / traces


def _pour_with_traces() -> Builder:
    b = Builder()
    b.region(box_ring(0, 0, 10, 10), net="GND")
    t = b.circle(0.2)
    b.track(t, [(-1.0, 0.0), (-1.0, 10.0)], net="GND")  # free-standing, 0.9 mm away
    b.track(t, [(10.0, 5.0), (15.0, 5.0)], net="SW")  # leaves the pour's edge
    return b


def test_split_plane_traces() -> None:
    layer = LayerArtwork(_pour_with_traces().build())
    copper = layer.compose()
    plane, traces = split_plane_traces(copper, opening_mm=0.5)
    # hand computation: the pour survives a 0.5 mm opening whole (its rounded corners
    # come back as fringes); traces: 10 x 0.2 + a full 32-gon of r 0.1 for the free one,
    # 5 x 0.2 + half a 32-gon (its left cap lies inside the pour) for the attached one.
    # Where the attached trace leaves the pour, a disk of r = 0.25 fits a little past the
    # edge: its cap beyond x = 10 has half-chord sqrt(2 r e) <= w / 2 for e <= (w/2)^2 /
    # (2 r) = 0.02 mm, so the opening takes at most 0.02 x 0.2 = 0.004 mm^2 of the trace.
    root = 0.02 * 0.2
    expected_traces = 2.0 + ngon_area(0.1, 32) + 1.0 + 0.5 * ngon_area(0.1, 32)
    assert 100.0 - 1e-9 <= plane.area <= 100.0 + root
    assert expected_traces - root <= traces.area <= expected_traces + 1e-9
    assert len(traces.geoms) == 2
    assert plane.area + traces.area == pytest.approx(copper.area, rel=1e-12)
    assert plane.intersection(traces).area < 1e-9
    # a wider opening (r = 0.5) keeps the pour too; root bite e <= 0.1^2 / 1.0 = 0.01 mm
    plane2, _ = split_plane_traces(copper, opening_mm=1.0)
    assert 100.0 - 1e-9 <= plane2.area <= 100.0 + 0.01 * 0.2


def test_split_plane_nets_and_window() -> None:
    layer = LayerArtwork(_pour_with_traces().build())
    plane, traces = layer.split(plane_nets={"GND"})
    # hand computation: the free trace is on the plane net, so only the SW trace remains
    # (less at most 0.004 mm^2 at its root, see test_split_plane_traces)
    root = 0.02 * 0.2
    sw = 1.0 + 0.5 * ngon_area(0.1, 32)
    assert sw - root <= traces.area <= sw + 1e-9
    gnd = 100.0 + 2.0 + ngon_area(0.1, 32)
    assert gnd - 1e-9 <= plane.area <= gnd + root
    # a window split equals the whole split clipped to the window
    win = (8.0, 3.0, 12.0, 7.0)
    wp, wt = layer.split(win)
    gp, gt = layer.split()
    box = shapely.box(*win)
    assert wp.symmetric_difference(gp.intersection(box)).area < 1e-9
    assert wt.symmetric_difference(gt.intersection(box)).area < 1e-9
    # hand computation: plane part 2 x 4 = 8; traces: the SW trace 2 x 0.2 (its root to
    # within 0.004 mm^2)
    assert 8.0 - 1e-9 <= wp.area <= 8.0 + root
    assert 0.4 - root <= wt.area <= 0.4 + 1e-9


def test_split_does_not_depend_on_window_edge() -> None:
    b = Builder()
    b.region(box_ring(0, 0, 10, 10))
    b.track(b.circle(0.08), [(10.0, 5.0), (15.0, 5.0)])  # thin trace leaving the pour
    layer = LayerArtwork(b.build())
    win = (0.0, 0.0, 10.2, 10.0)  # ends 0.2 mm after the pour: a short stub inside it
    wp, wt = layer.split(win)
    gp, gt = layer.split()
    box = shapely.box(*win)
    assert wt.symmetric_difference(gt.intersection(box)).area < 1e-9
    assert wp.symmetric_difference(gp.intersection(box)).area < 1e-9
    # hand computation: the stub 0.2 x 0.08 stays a trace (less a root bite of at most
    # (w/2)^2 / (2 r) = 0.0032 mm times 0.08)
    assert 0.016 - 0.0032 * 0.08 <= wt.area <= 0.016 + 1e-9


def test_split_rejects_bad_opening() -> None:
    with pytest.raises(ConfigError, match="opening_mm must be"):
        split_plane_traces(shapely.box(0, 0, 1, 1), opening_mm=0.0)


# --------------------------------------------------------------------------- errors


def test_bad_records_raise_input_error() -> None:
    b = Builder()
    b.flash(b.rect(1, 1), 0, 0)
    rec = b.build(source="bad.gbr")
    broken = ArtworkRecord(**{**rec.__dict__, "obj_aperture": np.array([5])})
    with pytest.raises(InputError, match=r"bad\.gbr: obj_aperture\[0\].* must be .*; got 5"):
        LayerArtwork(broken)
    nan = ArtworkRecord(**{**rec.__dict__, "obj_xy": np.array([[np.nan, 0.0]])})
    with pytest.raises(InputError, match="finite"):
        LayerArtwork(nan)
    layer = LayerArtwork(rec)
    with pytest.raises(InputError, match="window must be"):
        layer.compose((1, 1, 0, 0))
    with pytest.raises(InputError, match="window must be"):
        layer.query((0, 0, 1))
    with pytest.raises(ConfigError, match="quad_segs"):
        LayerArtwork(rec, quad_segs=0)


# --------------------------------------------------------------------------- properties

coord = st.floats(0.0, 50.0, allow_nan=False)
size = st.floats(0.05, 5.0, allow_nan=False)


@st.composite
def random_layer(draw: st.DrawFn) -> tuple[ArtworkRecord, np.ndarray]:
    """A random layer and the bounding boxes computed independently by the test."""
    b = Builder()
    boxes: list[tuple[float, float, float, float]] = []
    n = draw(st.integers(1, 25))
    for _ in range(n):
        kind = draw(st.sampled_from(["flash", "track", "region", "region", "plane"]))
        dark = draw(st.booleans())
        if kind == "plane":
            # a pour with thousands of vertices: takes the composer's separate merge path
            cx, cy, r = draw(coord), draw(coord), draw(st.floats(3.0, 20.0))
            b.region(ngon(r, 2500, cx, cy), dark=dark)
            boxes.append((cx - r, cy - r, cx + r, cy + r))
        elif kind == "flash":
            w, h, x, y = draw(size), draw(size), draw(coord), draw(coord)
            b.flash(b.rect(w, h), x, y, dark=dark)
            boxes.append((x - w / 2, y - h / 2, x + w / 2, y + h / 2))
        elif kind == "track":
            d = draw(size)
            pts = draw(st.lists(st.tuples(coord, coord), min_size=2, max_size=4))
            b.track(b.circle(d), pts, dark=dark)
            arr = np.array(pts)
            lo, hi = arr.min(axis=0) - d / 2, arr.max(axis=0) + d / 2
            boxes.append((lo[0], lo[1], hi[0], hi[1]))
        else:
            x, y, w, h = draw(coord), draw(coord), 4 * draw(size), 4 * draw(size)
            b.region(box_ring(x, y, x + w, y + h), dark=dark)
            boxes.append((x, y, x + w, y + h))
    return b.build(), np.array(boxes)


window_st = st.tuples(coord, coord, size, size).map(
    lambda t: (t[0], t[1], t[0] + 3 * t[2], t[1] + 3 * t[3])
)


@settings(max_examples=60, deadline=None)
@given(random_layer(), window_st)
def test_query_matches_brute_force(
    layer_boxes: tuple[ArtworkRecord, np.ndarray], window: tuple[float, float, float, float]
) -> None:
    rec, boxes = layer_boxes
    layer = LayerArtwork(rec)
    np.testing.assert_allclose(layer.object_bounds, boxes, rtol=0, atol=1e-12)
    x0, y0, x1, y1 = window
    brute = np.flatnonzero(
        (boxes[:, 2] >= x0) & (boxes[:, 0] <= x1) & (boxes[:, 3] >= y0) & (boxes[:, 1] <= y1)
    )
    np.testing.assert_array_equal(layer.query(window), brute)


@settings(max_examples=25, deadline=None)
@given(random_layer(), window_st)
def test_window_equals_whole_layer_clipped(
    layer_boxes: tuple[ArtworkRecord, np.ndarray], window: tuple[float, float, float, float]
) -> None:
    rec, _ = layer_boxes
    layer = LayerArtwork(rec)
    local = layer.compose(window)
    whole = layer.compose().intersection(shapely.box(*window))
    assert local.symmetric_difference(whole).area < 1e-7


@settings(max_examples=25, deadline=None)
@given(random_layer())
def test_composition_matches_sequential_reference(
    layer_boxes: tuple[ArtworkRecord, np.ndarray],
) -> None:
    """Runs + vectorised pieces give the same image as one object at a time."""
    rec, _ = layer_boxes
    acc = shapely.Polygon()
    for i in range(rec.n_objects):
        if rec.obj_kind[i] == FLASH:
            ring = rec.apertures[rec.obj_aperture[i]].parts[0][1] + rec.obj_xy[i]
            g = shapely.Polygon(ring)
        elif rec.obj_kind[i] == TRACK:
            r0 = rec.ring_vertex_start[rec.obj_ring_start[i]]
            pts = rec.vertices[r0 : rec.ring_vertex_start[rec.obj_ring_start[i] + 1]]
            d = rec.apertures[rec.obj_aperture[i]].circle_diameter_mm
            g = shapely.LineString(pts).buffer(d / 2, quad_segs=8)
        else:
            r0 = rec.ring_vertex_start[rec.obj_ring_start[i]]
            g = shapely.Polygon(rec.vertices[r0 : rec.ring_vertex_start[rec.obj_ring_start[i] + 1]])
        acc = acc.union(g) if rec.obj_dark[i] else acc.difference(g)
    assert compose_record(rec).symmetric_difference(acc).area < 1e-7


# --------------------------------------------------------------------------- real files


def _reader() -> Callable[[str], ArtworkRecord]:
    mod = pytest.importorskip("fluxshadow.io.gerber")
    read = getattr(mod, "read_gerber", None)
    if read is None:
        pytest.skip("fluxshadow.io.gerber.read_gerber is not available")
    return read  # type: ignore[no-any-return]


REAL_LAYERS = [
    ("huvud-tiny2", "Huvud-In1_Cu.g2"),  # mm, pours as regions
    ("cheap-focer-2", "Cheap FOCer 2 60mm-Top_Signal.gbr"),
    ("limesdr-xtrx-1v1", "LimeSDR-XTRX_1v1.G2"),  # LPC cut-outs
    ("incunest-motherboard", "Motherboard.G2"),  # inch, LPC cut-outs
]


@pytest.mark.realboards
@pytest.mark.parametrize(("board", "name"), REAL_LAYERS)
def test_real_layer_window_equals_whole(
    realboard: Callable[[str], Path], board: str, name: str
) -> None:
    read = _reader()
    path = realboard(board) / name
    layer = LayerArtwork(read(str(path)))
    assert layer.bounds is not None
    x0, y0, x1, y1 = layer.bounds
    cx, cy = 0.5 * (x0 + x1), 0.5 * (y0 + y1)
    win = (cx - 7.5, cy - 7.5, cx + 7.5, cy + 7.5)
    whole = layer.compose()
    local = layer.compose(win)
    assert whole.is_valid
    assert local.is_valid
    assert 0.0 < local.area <= 225.0 + 1e-9
    # tracks cut to the window are buffered from slightly different vertices: slivers of
    # nanometre width along their edges are the only allowed difference
    assert local.symmetric_difference(whole.intersection(shapely.box(*win))).area < 1e-5


@pytest.mark.realboards
def test_real_plane_under_inductor(realboard: Callable[[str], Path]) -> None:
    """huvud-tiny2 SOURCE.md: under L1 at (15.81, 28.70) mm, all 5 sample points (centre and
    centre +- 0.8 mm in X and Y) lie in poured regions of In1_Cu, a layer without clear
    objects, so all five must be copper, and plane copper after the split."""
    read = _reader()
    layer = LayerArtwork(read(str(realboard("huvud-tiny2") / "Huvud-In1_Cu.g2")))
    cx, cy, h = 15.81, 28.70, 0.8
    pts = shapely.points([(cx, cy), (cx + h, cy), (cx - h, cy), (cx, cy + h), (cx, cy - h)])
    win = (cx - 3, cy - 3, cx + 3, cy + 3)
    copper = layer.compose(win)
    assert np.all(shapely.contains(copper, pts))
    plane, traces = layer.split(win)
    assert np.all(shapely.contains(plane, pts))
    # plane | traces is the copper up to dropped slivers (< 1e-6 mm^2 each)
    assert plane.area + traces.area == pytest.approx(copper.area, abs=1e-4)


# --------------------------------------------------------------------------- centre lines


def test_track_lines_keeps_local_runs() -> None:
    """A U-shaped polyline that leaves a window and comes back gives two runs with its own
    vertices; a clear track and a flash give none (hand construction)."""
    b = Builder()
    ap = b.circle(0.2)
    u = [(0.0, 0.0), (0.0, 5.0), (20.0, 5.0), (20.0, 0.0), (20.0, -5.0)]
    b.track(ap, u, net="A")
    b.track(ap, [(1.0, 1.0), (2.0, 1.0)], dark=False)
    b.flash(b.circle(1.0), 1.0, 1.0)
    layer = LayerArtwork(b.build())
    # window x -1..1, y -1..1 meets only segment 0; x 19..21, y -1..1 segments 2 and 3
    lines, objs = layer.track_lines((-1.0, -1.0, 1.0, 1.0))
    assert objs.tolist() == [0]
    assert shapely.get_coordinates(lines).tolist() == [[0.0, 0.0], [0.0, 5.0]]
    lines, objs = layer.track_lines((-1.0, -1.0, 21.0, 1.0))
    assert objs.tolist() == [0, 0]
    got = [shapely.get_coordinates(g).tolist() for g in lines]
    assert got == [[[0.0, 0.0], [0.0, 5.0]], [[20.0, 5.0], [20.0, 0.0], [20.0, -5.0]]]
    empty, none = layer.track_lines((50.0, 50.0, 60.0, 60.0))
    assert empty.size == 0
    assert none.size == 0


@settings(max_examples=40, deadline=None)
@given(
    st.lists(
        st.tuples(st.booleans(), st.lists(st.tuples(coord, coord), min_size=2, max_size=8)),
        min_size=1,
        max_size=5,
    ),
    window_st,
)
def test_track_lines_equal_whole_tracks_in_window(
    tracks: list[tuple[bool, list[tuple[float, float]]]],
    window: tuple[float, float, float, float],
) -> None:
    """Inside the window the local runs are exactly the whole dark polylines."""
    b = Builder()
    ap = b.circle(0.1)
    for dark, pts in tracks:
        b.track(ap, pts, dark=dark)
    layer = LayerArtwork(b.build())
    lines, objs = layer.track_lines(window)
    box = shapely.box(*window)
    whole = [shapely.LineString(p) for d, p in tracks if d]
    expect = shapely.intersection(shapely.union_all(whole), box) if whole else shapely.Point()
    local = shapely.intersection(shapely.union_all(lines), box) if lines.size else shapely.Point()
    assert abs(local.length - expect.length) < 1e-9
    if expect.length > 0:  # same place, not only the same length
        assert shapely.hausdorff_distance(local, expect) < 1e-9
    assert all(tracks[i][0] for i in objs.tolist())
