"""Benchmark: compose a synthetic 100k-object copper layer, whole and in windows.

Run with ``.venv/bin/python benchmarks/bench_compose.py [--seed N] [--windows N]``.
Prints wall-clock seconds and peak resident memory (``ru_maxrss``; GEOS allocates outside
the Python heap, so ``tracemalloc`` would miss most of it). Not a test.

The layer (250 x 160 mm), in file order:

1. a plane region over the left 100 mm of the board (outline with 4000 vertices) and
   300 small pad-like regions on it;
2. a clear run of 3000 antipads (circle flashes) punched into the plane;
3. 3000 via pads on the antipads;
4. about 27 000 more pad flashes over 10 apertures (circles, rectangles, an obround-like
   polygon, a rotated rectangle, a rectangle with a hole, ...);
5. 66 000 circle-aperture track segments, one object each, forming 6600 chains of 10
   segments (5 widths), in 10 chunks each followed by a clear run of 20 slots cut into
   the plane.

``--layout routed`` (default) places the chains like routed nets: one net per 2.9 x 1.2 mm
cell right of the plane, a jogging chain with a pad on each end, nets never touching each
other (13 800 further pads sit on the plane). ``--layout random`` is a stress case: pads
anywhere and chains as 45-degree random walks anywhere, so shapes of unrelated nets
overlap and most of the copper merges into one polygon of some 400 000 vertices.
"""

from __future__ import annotations

import argparse
import resource
import time

import numpy as np

from fluxshadow.board.copper import LayerArtwork
from fluxshadow.io.records import FLASH, REGION, TRACK, ApertureRecord, ArtworkRecord

BOARD_W_MM = 250.0
BOARD_H_MM = 160.0
PLANE_W_MM = 100.0


def _ring_circle(r: float, n: int = 32) -> np.ndarray:
    a = 2 * np.pi * np.arange(n + 1) / n
    ring = np.column_stack([r * np.cos(a), r * np.sin(a)])
    ring[-1] = ring[0]
    return ring


def _ring_rect(w: float, h: float, angle_deg: float = 0.0) -> np.ndarray:
    pts = np.array([[-w, -h], [w, -h], [w, h], [-w, h], [-w, -h]]) / 2
    t = np.radians(angle_deg)
    rot = np.array([[np.cos(t), -np.sin(t)], [np.sin(t), np.cos(t)]])
    return np.asarray(pts @ rot.T)


def _ring_obround(w: float, h: float, n: int = 16) -> np.ndarray:
    r = h / 2
    a1 = np.linspace(-np.pi / 2, np.pi / 2, n)
    a2 = np.linspace(np.pi / 2, 3 * np.pi / 2, n)
    right = np.column_stack([w / 2 - r + r * np.cos(a1), r * np.sin(a1)])
    left = np.column_stack([-w / 2 + r + r * np.cos(a2), r * np.sin(a2)])
    return np.concatenate([right, left, right[:1]])


def _apertures() -> tuple[ApertureRecord, ...]:
    def circ(d: float) -> ApertureRecord:
        return ApertureRecord(
            code=10, template="C", parts=((True, _ring_circle(d / 2)),), circle_diameter_mm=d
        )

    def poly(ring: np.ndarray, template: str, hole: float | None = None) -> ApertureRecord:
        parts: list[tuple[bool, np.ndarray]] = [(True, ring)]
        if hole:
            parts.append((False, _ring_circle(hole / 2)))
        return ApertureRecord(
            code=11, template=template, parts=tuple(parts), circle_diameter_mm=None
        )

    # 0..9: pad apertures; 10: antipad; 11..15: track widths
    pads = (
        circ(0.5),
        circ(0.8),
        poly(_ring_rect(0.6, 0.4), "R"),
        poly(_ring_rect(0.4, 0.6), "R"),
        poly(_ring_obround(1.0, 0.5), "O"),
        poly(_ring_rect(0.8, 0.5, 45.0), "RoundRect"),
        poly(_ring_rect(1.2, 1.2), "R", hole=0.7),
        poly(_ring_rect(0.25, 0.6), "R"),
        poly(_ring_rect(1.6, 1.2), "R"),
        circ(1.2),
    )
    tracks = tuple(circ(d) for d in (0.1, 0.15, 0.2, 0.3, 0.5))
    return (*pads, circ(0.8), *tracks)


def build_layer(seed: int = 0, layout: str = "routed") -> ArtworkRecord:
    """Build the synthetic layer described in the module docstring."""
    rng = np.random.default_rng(seed)
    kinds: list[np.ndarray] = []
    dark: list[np.ndarray] = []
    aper: list[np.ndarray] = []
    xy: list[np.ndarray] = []
    obj_rings: list[np.ndarray] = []  # rings per object
    ring_verts: list[np.ndarray] = []  # vertices per ring
    verts: list[np.ndarray] = []

    def add(kind: int, is_dark: bool, ap: np.ndarray, pos: np.ndarray) -> None:
        kinds.append(np.full(len(ap), kind, dtype=np.int8))
        dark.append(np.full(len(ap), is_dark))
        aper.append(ap.astype(np.int64))
        xy.append(pos)

    # 1. plane region (wavy outline) + 300 small regions
    t = np.linspace(0, 1, 1001)[:-1]
    edge = [
        np.column_stack([t * PLANE_W_MM, 0.3 * np.sin(40 * t)]),
        np.column_stack([PLANE_W_MM + 0.3 * np.sin(40 * t), t * BOARD_H_MM]),
        np.column_stack([PLANE_W_MM * (1 - t), BOARD_H_MM + 0.3 * np.sin(40 * t)]),
        np.column_stack([0.3 * np.sin(40 * t), BOARD_H_MM * (1 - t)]),
    ]
    outline = np.concatenate([*edge, edge[0][:1]])
    add(REGION, True, np.array([-1]), outline[:1])
    obj_rings.append(np.array([1]))
    ring_verts.append(np.array([len(outline)]))
    verts.append(outline)
    centres = rng.uniform([5, 5], [PLANE_W_MM - 5, BOARD_H_MM - 5], (300, 2))
    quad = _ring_rect(2.0, 1.5)
    small = centres[:, None, :] + quad[None] * rng.uniform(0.5, 1.5, (300, 1, 1))
    add(REGION, True, np.full(300, -1), small[:, 0])
    obj_rings.append(np.ones(300, dtype=np.int64))
    ring_verts.append(np.full(300, 5))
    verts.append(small.reshape(-1, 2))

    def no_rings(n: int) -> None:
        obj_rings.append(np.zeros(n, dtype=np.int64))

    # 2. antipads (clear)
    vias = rng.uniform([1, 1], [PLANE_W_MM - 1, BOARD_H_MM - 1], (3000, 2))
    add(FLASH, False, np.full(3000, 10), vias)
    no_rings(3000)

    # 3. via pads on the antipads
    add(FLASH, True, np.zeros(3000, dtype=np.int64), vias)
    no_rings(3000)

    def emit_tracks(seg: np.ndarray, ap: np.ndarray, is_dark: bool) -> None:
        add(TRACK, is_dark, ap, seg[:, 0])
        obj_rings.append(np.ones(len(seg), dtype=np.int64))
        ring_verts.append(np.full(len(seg), 2))
        verts.append(seg.reshape(-1, 2))

    n_chain, n_seg = 6600, 10
    widths = np.repeat(rng.integers(11, 16, n_chain), n_seg)
    if layout == "random":
        # 4. pads anywhere, 5. random-walk chains anywhere: shapes of unrelated nets overlap
        pads = rng.uniform([1, 1], [BOARD_W_MM - 1, BOARD_H_MM - 1], (27000, 2))
        add(FLASH, True, rng.integers(0, 10, 27000), pads)
        no_rings(27000)
        steps = np.array(
            [[1, 0], [1, 1], [0, 1], [-1, 1], [-1, 0], [-1, -1], [0, -1], [1, -1]], float
        )
        direction = rng.integers(0, 8, (n_chain, n_seg))
        lengths = rng.uniform(0.3, 1.5, (n_chain, n_seg, 1))
        start = rng.uniform([5, 5], [BOARD_W_MM - 5, BOARD_H_MM - 5], (n_chain, 1, 2))
        path = np.concatenate(
            [start, start + np.cumsum(steps[direction] * lengths, axis=1)], axis=1
        )
    else:
        # 4. 13 800 pads on the pour, 5. one net per 2.9 x 1.2 mm cell right of the pour:
        # a 10-segment jogging chain with a pad on each end; nets never touch each other
        pads = rng.uniform([1, 1], [PLANE_W_MM - 1, BOARD_H_MM - 1], (13800, 2))
        add(FLASH, True, rng.integers(0, 10, 13800), pads)
        no_rings(13800)
        col, row = np.divmod(np.arange(n_chain), 131)
        x0 = PLANE_W_MM + 1.0 + 2.9 * col
        yc = 1.0 + 0.6 + 1.2 * row
        xs = x0[:, None] + 0.35 + 0.22 * np.arange(n_seg + 1)[None]
        ys = yc[:, None] + 0.15 * rng.integers(-1, 2, (n_chain, n_seg + 1))
        path = np.stack([xs, ys], axis=2)
        ends = np.concatenate([path[:, 0], path[:, -1]])
        end_ap = np.array([0, 2, 3, 7])[rng.integers(0, 4, len(ends))]
        add(FLASH, True, end_ap, ends)
        no_rings(len(ends))
    seg = np.stack([path[:, :-1], path[:, 1:]], axis=2).reshape(-1, 2, 2)
    # tracks in 10 chunks, each followed by a clear run of 20 slots cut into the pour
    for k, (sl, ap) in enumerate(
        zip(np.array_split(seg, 10), np.array_split(widths, 10), strict=True)
    ):
        emit_tracks(sl, ap, True)
        a_pt = rng.uniform([2, 2], [PLANE_W_MM - 4, BOARD_H_MM - 4], (20, 1, 2))
        slot = np.concatenate([a_pt, a_pt + np.array([[[2.0, 0.0]]])], axis=1)
        emit_tracks(slot, np.full(20, 11 + k % 5), False)

    n_rings = np.concatenate(obj_rings)
    rv = np.concatenate(ring_verts)
    n = len(n_rings)
    return ArtworkRecord(
        source="synthetic",
        units_in_file="mm",
        negative_image=False,
        file_attributes={},
        comments=(),
        apertures=_apertures(),
        obj_kind=np.concatenate(kinds),
        obj_dark=np.concatenate(dark),
        obj_aperture=np.concatenate(aper),
        obj_xy=np.concatenate(xy).astype(float),
        obj_ring_start=np.concatenate([[0], np.cumsum(n_rings)]).astype(np.int64),
        ring_vertex_start=np.concatenate([[0], np.cumsum(rv)]).astype(np.int64),
        vertices=np.concatenate(verts).astype(float),
        obj_net=np.full(n, -1, dtype=np.int64),
        obj_component=np.full(n, -1, dtype=np.int64),
        obj_function=np.full(n, -1, dtype=np.int64),
        nets=(),
        components=(),
        functions=(),
    )


def _rss_mb() -> float:
    return resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024.0


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--seed", type=int, default=0)
    parser.add_argument("--windows", type=int, default=100)
    parser.add_argument("--layout", choices=("routed", "random"), default="routed")
    args = parser.parse_args()

    t0 = time.perf_counter()
    record = build_layer(args.seed, args.layout)
    t1 = time.perf_counter()
    print(f"objects: {record.n_objects}  (record built in {t1 - t0:.2f} s)")
    print(f"peak RSS after building the record: {_rss_mb():.0f} MB")

    t0 = time.perf_counter()
    layer = LayerArtwork(record)
    t1 = time.perf_counter()
    print(f"index (boxes + STRtree): {t1 - t0:.3f} s")

    rng = np.random.default_rng(args.seed + 1)
    lo = rng.uniform([0, 0], [BOARD_W_MM - 15, BOARD_H_MM - 15], (args.windows, 2))
    times = []
    areas = []
    for x, y in lo:
        t0 = time.perf_counter()
        areas.append(layer.copper_area_mm2((x, y, x + 15, y + 15)))
        times.append(time.perf_counter() - t0)
    tw = np.array(times)
    print(
        f"{args.windows} windows of 15 x 15 mm: mean {tw.mean() * 1e3:.1f} ms, "
        f"max {tw.max() * 1e3:.1f} ms (first {tw[0] * 1e3:.1f} ms, builds aperture shapes), "
        f"mean copper {np.mean(areas):.1f} mm^2"
    )
    print(f"peak RSS after windows: {_rss_mb():.0f} MB")

    t0 = time.perf_counter()
    copper = layer.compose()
    t1 = time.perf_counter()
    print(
        f"whole layer: {t1 - t0:.2f} s, {len(copper.geoms)} polygons, "
        f"{copper.area:.0f} mm^2 of {BOARD_W_MM * BOARD_H_MM:.0f} mm^2"
    )
    print(f"peak RSS after whole layer: {_rss_mb():.0f} MB")

    t0 = time.perf_counter()
    plane, traces = layer.split((60.0, 40.0, 75.0, 55.0))
    t1 = time.perf_counter()
    print(
        f"plane/trace split of one 15 x 15 mm window: {(t1 - t0) * 1e3:.0f} ms "
        f"(plane {plane.area:.1f} mm^2, traces {traces.area:.1f} mm^2)"
    )


if __name__ == "__main__":
    main()
