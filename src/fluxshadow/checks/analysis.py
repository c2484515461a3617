"""Shared geometry of the checks: zones, plane/trace copper, voids, rings, shadows.

Computed once per magnetic (the rules only read it). Everything is in the artwork frame,
millimetres. The copper of each layer is composed once per magnetic, for a window around
the deepest (widest) zone; the rules clip it to each layer's zone.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass, field

import numpy as np
import numpy.typing as npt
import shapely
from shapely.geometry.base import BaseGeometry

from fluxshadow.board.magnetics import Magnetic
from fluxshadow.board.model import Board, Layer
from fluxshadow.board.outline import copper_extent
from fluxshadow.checks.model import RingInfo
from fluxshadow.checks.settings import Settings

__all__ = [
    "ExposedTrace",
    "LayerGeometry",
    "MagneticGeometry",
    "Void",
    "analyse_magnetic",
    "board_extent",
    "layer_depths_mm",
    "trace_void",
    "winding_radius_mm",
]

_EPS_MM = 1e-6
_MIN_PIECE_MM2 = 1e-4


@dataclass(frozen=True, kw_only=True)
class Void:
    """One connected part of a zone without plane copper."""

    polygon: BaseGeometry
    area_mm2: float
    to_winding_mm: float
    ring: RingInfo | None = None


@dataclass(frozen=True, kw_only=True)
class ExposedTrace:
    """Trace copper of one net on one layer, in the zone, with no plane above it."""

    net: str
    exposed: BaseGeometry
    exposed_length_mm: float
    length_in_zone_mm: float
    x_mm: float
    y_mm: float
    return_layer: str
    return_distance_mm: float | None


@dataclass(kw_only=True)
class LayerGeometry:
    """One layer under one magnetic."""

    layer: Layer
    depth_mm: float
    zone: BaseGeometry
    plane: BaseGeometry
    traces: BaseGeometry
    plane_around: bool
    coverage: float
    copper_coverage: float
    void_area_mm2: float
    trace_area_mm2: float
    voids: list[Void] = field(default_factory=list)
    exposed: list[ExposedTrace] = field(default_factory=list)
    shielded_by: str = ""


@dataclass(kw_only=True)
class MagneticGeometry:
    """All the layers under one magnetic, in the order the part looks (nearest first)."""

    magnetic: Magnetic
    body: BaseGeometry
    winding: BaseGeometry
    winding_radius_mm: float
    layers: list[LayerGeometry]
    window: tuple[float, float, float, float]


def layer_depths_mm(board: Board, side: str) -> list[float]:
    """Depth of each copper layer below the part's mounting surface (mm), board order.

    For a top part this is the layer's top-surface depth; for a bottom part the distance
    from the board's bottom copper surface up to the layer's bottom surface.
    """
    st = board.stackup
    if side == "bottom":
        bottom = st.z_bottom_mm[-1]
        return [bottom - zb for zb in st.z_bottom_mm]
    return list(st.z_top_mm)


def winding_radius_mm(magnetic: Magnetic, settings: Settings) -> float:
    """Mean winding radius (mm): a fraction of the body's smaller side (an assumption)."""
    return settings.winding_radius_fraction * min(magnetic.body_mm)


def board_extent(board: Board) -> BaseGeometry:
    """The board's shape (mm): outline polygon with cut-outs, else the copper extent.

    Without an outline the extent is the bounding box of the copper objects of every
    layer, leaving out small clusters of objects that stand more than 2 mm apart from the
    rest along an axis (fiducials and tooling marks of a fabrication panel, which would
    otherwise stretch the "board" far beyond its edge and count the margin as missing
    copper).
    """
    if board.outline is not None:
        return board.outline.board
    boxes = [a.object_bounds for a in board.artworks if a.n_objects > 0]
    boxes += [
        np.asarray([a.plane_extent.bounds], dtype=np.float64)
        for a in board.artworks
        if a.negative and not a.plane_extent.is_empty
    ]
    if not boxes:
        return shapely.Polygon()
    return copper_extent(np.concatenate(boxes))


def _parts(geom: BaseGeometry) -> list[BaseGeometry]:
    return [g for g in shapely.get_parts(geom) if g.area > _MIN_PIECE_MM2]


def trace_void(
    board: Board,
    layer: Layer,
    seed: BaseGeometry,
    *,
    max_half_mm: float,
    known: tuple[tuple[float, float, float, float], BaseGeometry] | None = None,
    extent: BaseGeometry | None = None,
) -> RingInfo:
    """Decide whether the copper around a void closes a ring (widening the window).

    The copper-free region containing ``seed`` is traced in a square window around it;
    the window doubles until the region closes inside it (a closed ring), reaches the
    board's outer edge (opened), or the window reaches ``max_half_mm`` (opened into a
    copper-free area larger than the search).

    Parameters
    ----------
    board : Board
    layer : Layer
    seed : shapely geometry
        A copper-free part of the void (mm).
    max_half_mm : float
        Largest half-size of the search window (mm).
    known : (window, copper), optional
        Copper already composed for a window around the seed, tried first.
    extent : shapely geometry, optional
        The board's shape from :func:`board_extent`, when the caller has it already.

    Returns
    -------
    RingInfo
    """
    outer = board_extent(board) if extent is None else extent
    outer = shapely.Polygon(outer.exterior) if outer.geom_type == "Polygon" else outer.envelope
    edge = outer.exterior
    point = seed.representative_point()
    x0, y0, x1, y1 = seed.bounds
    cx, cy = 0.5 * (x0 + x1), 0.5 * (y0 + y1)
    half = max(x1 - x0, y1 - y0) * 0.5 + 2.0
    tries: list[tuple[tuple[float, float, float, float], BaseGeometry | None]] = []
    if known is not None:
        tries.append((known[0], known[1]))
    while True:
        if tries:
            window, copper = tries.pop(0)
        else:
            window, copper = (cx - half, cy - half, cx + half, cy + half), None
        if copper is None:
            copper = board.copper(layer, window)
        box = shapely.box(*window)
        free = shapely.difference(shapely.intersection(box, outer), copper)
        parts = np.asarray(shapely.get_parts(free))
        hit = parts[shapely.dwithin(parts, point, _EPS_MM)] if len(parts) else parts
        if len(hit) == 0:
            return RingInfo(
                closed=False,
                inner_perimeter_mm=0.0,
                inner_area_mm2=0.0,
                search_window_mm=window[2] - window[0],
                opened_to="no copper-free area",
            )
        region = hit[0]
        size = max(window[2] - window[0], window[3] - window[1])
        at_edge = bool(shapely.dwithin(region, edge, 1e-4))
        # Contact with the window's own sides (not where they run along the board edge).
        sides = shapely.difference(box.exterior, shapely.buffer(edge, 1e-3))
        at_window = bool(shapely.dwithin(region, sides, 1e-4))
        perimeter, area = float(region.length), float(region.area)
        if at_edge:
            return RingInfo(
                closed=False,
                opened_to="board edge",
                inner_perimeter_mm=perimeter,
                inner_area_mm2=area,
                search_window_mm=size,
            )
        if not at_window:
            # The ring's hole is everything inside the copper-free region's outer edge:
            # islands of copper within it (traces, pads of other nets) are not part of the
            # ring and do not shorten the path of its current.
            hole = shapely.Polygon(region.exterior)
            return RingInfo(
                closed=True,
                inner_perimeter_mm=float(region.exterior.length),
                inner_area_mm2=float(hole.area),
                search_window_mm=size,
                path_mm=tuple((float(x), float(y)) for x, y, *_ in region.exterior.coords),
            )
        if 0.5 * size >= max_half_mm:
            return RingInfo(
                closed=False,
                opened_to=f"copper-free area beyond {size:.0f} mm",
                inner_perimeter_mm=perimeter,
                inner_area_mm2=area,
                search_window_mm=size,
            )
        half = min(max(2 * half, size), max_half_mm)


def _track_lines(
    board: Board, layer: Layer, window: Sequence[float]
) -> dict[str, list[BaseGeometry]]:
    """Centre lines of the dark tracks in a window, grouped by net name ("" if none).

    Each track keeps only its runs of segments whose boxes meet the window (see
    :meth:`~fluxshadow.board.copper.LayerArtwork.track_lines`): the part of the centre
    lines within the window, and within any distance ``d`` of it when the window is grown
    by ``d``, is the same as the whole tracks', at the cost of the local part only.
    """
    art = board.artwork(layer)
    rec = art.record
    lines, objs = art.track_lines(window)
    out: dict[str, list[BaseGeometry]] = {}
    for line, i in zip(lines, objs, strict=True):
        net_i = int(rec.obj_net[i])
        net = rec.nets[net_i] if net_i >= 0 else ""
        out.setdefault(net, []).append(line)
    return out


@dataclass(frozen=True, kw_only=True)
class _Landings:
    """Plated holes standing in a clearance of the shadow, with that clearance (mm)."""

    points: npt.NDArray[np.object_]
    radius_mm: npt.NDArray[np.float64]
    discs: npt.NDArray[np.object_]


def _via_landings(
    board: Board, geo: MagneticGeometry, shadow: BaseGeometry, settings: Settings
) -> _Landings | None:
    """The clearances (antipads) of the plated holes in the shadow, as discs (mm).

    A plated hole (a via or a pin) passes through the planes above a deeper layer in a
    clearance of its own, so a trace that lands on it ends inside an opening of the
    shadow. For each plated hole in the window that is not under shadow copper the disc
    out to the nearest shadow copper is its clearance, when that disc is no larger than
    ``void_min_area_mm2`` (radius ``sqrt(void_min_area_mm2 / pi)``; an antipad is
    0.3-0.8 mm^2, docs/rules.md); a hole standing in a larger opening has none.
    """
    if shadow.is_empty:
        return None
    x0, y0, x1, y1 = geo.window
    xy_parts, r_parts = [], []
    for d in board.drills:
        if len(d.hole_xy):
            xy, dia = d.hole_xy, d.hole_diameter_mm
            sel = d.hole_plated & (xy[:, 0] >= x0) & (xy[:, 0] <= x1)
            sel &= (xy[:, 1] >= y0) & (xy[:, 1] <= y1)
            xy_parts.append(xy[sel])
            r_parts.append(0.5 * dia[sel])
    if not xy_parts or sum(len(x) for x in xy_parts) == 0:
        return None
    points = shapely.points(np.concatenate(xy_parts))
    hole_r = np.concatenate(r_parts)
    reach = shapely.distance(points, shapely.boundary(shadow))
    r_max = float(np.sqrt(settings.void_min_area_mm2 / np.pi))
    ok = ~shapely.intersects(shadow, points) & (reach > 0) & (reach <= r_max)
    if not ok.any():
        return None
    return _Landings(
        points=points[ok],
        radius_mm=hole_r[ok],
        discs=shapely.buffer(points[ok], reach[ok], quad_segs=16),
    )


def _exposed_traces(
    board: Board,
    geo: MagneticGeometry,
    k: int,
    shadow: BaseGeometry,
    settings: Settings,
) -> list[ExposedTrace]:
    lg = geo.layers[k]
    in_zone = shapely.intersection(lg.traces, lg.zone)
    if in_zone.is_empty or in_zone.area <= _MIN_PIECE_MM2:
        return []
    open_area = shapely.difference(lg.zone, shadow)
    exposed_copper = shapely.intersection(in_zone, open_area)
    if exposed_copper.is_empty:
        return []
    # Only drawn tracks count as traces: pads and regions narrower than the opening are
    # copper too, but not conductors running under the part. The zone lies inside the
    # window and the landing holes stand in it, so the centre lines near the window (out
    # to the largest landing radius) are all that the lengths and landings below see.
    landings = _via_landings(board, geo, shadow, settings)
    reach = 2.0 * _EPS_MM
    if landings is not None and len(landings.radius_mm):
        reach += float(landings.radius_mm.max())
    x0, y0, x1, y1 = geo.window
    lines = _track_lines(board, lg.layer, (x0 - reach, y0 - reach, x1 + reach, y1 + reach))
    out: list[ExposedTrace] = []
    for net, segs in sorted(lines.items()):
        centre = shapely.union_all(segs)
        inside = shapely.intersection(centre, in_zone.buffer(_EPS_MM))
        if inside.length <= 0:
            continue
        exposed = shapely.intersection(inside, open_area)
        if landings is not None and not exposed.is_empty:
            # Where the trace lands on a plated hole it runs inside that hole's own
            # clearance: the via, not a conductor under the part (docs/rules.md).
            lands = shapely.dwithin(landings.points, centre, landings.radius_mm + _EPS_MM)
            if lands.any():
                exposed = shapely.difference(exposed, shapely.union_all(landings.discs[lands]))
        length = float(exposed.length)
        if length < settings.exposed_min_length_mm:
            continue
        out.append(_exposed_record(geo, k, net, exposed, length, float(inside.length)))
    return out


def _exposed_record(
    geo: MagneticGeometry, k: int, net: str, exposed: BaseGeometry, length: float, in_zone: float
) -> ExposedTrace:
    lg = geo.layers[k]
    lines = [g for g in shapely.get_parts(exposed) if g.geom_type == "LineString"]
    if lines:
        exposed = shapely.line_merge(shapely.multilinestrings(lines))
        p = exposed.interpolate(0.5, normalized=True)
    else:
        p = exposed.representative_point()
    # The return path: the nearest layer whose plane lies under most of the exposed part.
    best: tuple[str, float | None] = ("", None)
    is_line = bool(lines)
    total = float(exposed.length) if is_line else float(exposed.area)
    candidates = sorted(
        (j for j in range(len(geo.layers)) if j != k),
        key=lambda j: abs(geo.layers[j].depth_mm - lg.depth_mm),
    )
    for j in candidates:
        other = geo.layers[j]
        cut = shapely.intersection(exposed, other.plane)
        share = (float(cut.length) if is_line else float(cut.area)) / max(total, 1e-12)
        if share >= 0.5:
            best = (other.layer.name, abs(other.depth_mm - lg.depth_mm))
            break
    return ExposedTrace(
        net=net,
        exposed=exposed,
        exposed_length_mm=length,
        length_in_zone_mm=in_zone,
        x_mm=float(p.x),
        y_mm=float(p.y),
        return_layer=best[0],
        return_distance_mm=best[1],
    )


def analyse_magnetic(
    board: Board,
    magnetic: Magnetic,
    settings: Settings,
    *,
    radius_mm: float | None = None,
) -> MagneticGeometry:
    """Zones, plane/trace copper, voids, rings and exposed traces under one magnetic.

    Parameters
    ----------
    board : Board
    magnetic : Magnetic
        In the artwork frame.
    settings : Settings
    radius_mm : float, optional
        Winding mean radius stated in the config (mm); default from the body size.

    Returns
    -------
    MagneticGeometry
        Layers ordered from the mounting surface away (top part: L1 first; bottom part:
        Ln first).
    """
    extent = board_extent(board)
    body = shapely.Polygon(magnetic.outline)
    radius = radius_mm if radius_mm is not None else winding_radius_mm(magnetic, settings)
    winding = shapely.Point(magnetic.x_mm, magnetic.y_mm).buffer(radius, quad_segs=16)
    depths = layer_depths_mm(board, magnetic.side)
    order = list(range(len(board.layers)))
    if magnetic.side == "bottom":
        order.reverse()
    margins = [settings.zone_margin_mm + settings.zone_spread * depths[i] for i in order]
    widest = body.buffer(max(margins) + settings.plane_ring_mm + settings.opening_mm)
    window = tuple(float(v) for v in widest.bounds)
    layers: list[LayerGeometry] = []
    for i, margin in zip(order, margins, strict=True):
        lay = board.layers[i]
        zone = shapely.intersection(body.buffer(margin, join_style="mitre"), extent)
        plane, traces = board.artwork(lay).split(window, opening_mm=settings.opening_mm)
        zone_area = float(zone.area)
        ring_area = shapely.intersection(
            shapely.difference(zone.buffer(settings.plane_ring_mm, join_style="mitre"), zone),
            extent,
        )
        around = (
            float(shapely.intersection(ring_area, plane).area) / float(ring_area.area)
            if ring_area.area > 0
            else 0.0
        )
        plane_in = float(shapely.intersection(plane, zone).area)
        copper_in = plane_in + float(shapely.intersection(traces, zone).area)
        lg = LayerGeometry(
            layer=lay,
            depth_mm=depths[i],
            zone=zone,
            plane=plane,
            traces=traces,
            plane_around=around >= settings.plane_around_fraction,
            coverage=plane_in / zone_area if zone_area > 0 else 0.0,
            copper_coverage=copper_in / zone_area if zone_area > 0 else 0.0,
            void_area_mm2=max(zone_area - plane_in, 0.0),
            trace_area_mm2=float(shapely.intersection(traces, zone).area),
        )
        if lg.plane_around:
            copper = shapely.union(plane, traces)
            for piece in _parts(shapely.difference(zone, plane)):
                if piece.area < settings.void_min_area_mm2:
                    continue
                free = _parts(shapely.difference(piece, copper))
                if not free or max(f.area for f in free) < settings.void_min_area_mm2:
                    continue  # filled by narrow copper (pads, traces): not a void
                seed = max(free, key=lambda f: f.area)
                touches = piece.intersects(winding.exterior) or piece.intersects(winding)
                lg.voids.append(
                    Void(
                        polygon=piece,
                        area_mm2=float(piece.area),
                        to_winding_mm=0.0 if touches else float(piece.distance(winding.exterior)),
                        ring=trace_void(
                            board,
                            lay,
                            seed,
                            max_half_mm=settings.ring_search_max_mm,
                            known=(window, copper),  # type: ignore[arg-type]
                            extent=extent,
                        ),
                    )
                )
            lg.voids.sort(key=lambda v: -v.area_mm2)
        layers.append(lg)
    geo = MagneticGeometry(
        magnetic=magnetic,
        body=body,
        winding=winding,
        winding_radius_mm=radius,
        layers=layers,
        window=window,  # type: ignore[arg-type]
    )
    shadow: BaseGeometry = shapely.MultiPolygon()
    for k, lg in enumerate(layers):
        if k > 0:
            lg.exposed = _exposed_traces(board, geo, k, shadow, settings)
            shields = [x.layer.name for x in layers[:k] if x.coverage >= 0.99]
            lg.shielded_by = ",".join(shields)
        shadow = shapely.union(shadow, shapely.intersection(lg.plane, shapely.box(*window)))
    return geo
