"""Plain data for the pictures of ``fluxshadow check``: polygons, lines and field grids.

The reporter (:mod:`fluxshadow.report.pictures`) draws only what this module hands it:
frozen records of numpy arrays and strings, artwork frame, millimetres. Here the geometry
of each checked magnetic is recomputed (:func:`~fluxshadow.checks.analysis.
analyse_magnetic`, the same call the checks make) and joined with the report's findings:

- per layer under the part (nearest first): plane copper, trace copper, the voids, the
  zone, the path of a closed ring, and the exposed traces with the induced voltage of
  their ``exposed-trace`` finding;
- per exposed layer (a layer with an exposed trace; without one, the deepest layer): |B|
  of the winding on a coarse grid at that layer's mid-plane, from the spectral model with
  the solid planes above it (:mod:`fluxshadow.physics.slab` for a vertical winding,
  :mod:`fluxshadow.physics.spectral` for a horizontal one). A plane with a void in the
  zone is left out of the stack, as the figures do (conservative);
- the board overview: outline, cut-outs, every magnetic's body, and every finding that
  has a position.
"""

from __future__ import annotations

import math
from collections.abc import Mapping, Sequence
from dataclasses import dataclass

import numpy as np
import numpy.typing as npt
import shapely
from scipy.interpolate import RegularGridInterpolator
from shapely.geometry.base import BaseGeometry

from fluxshadow.board.model import Board
from fluxshadow.checks.analysis import (
    LayerGeometry,
    MagneticGeometry,
    analyse_magnetic,
    board_extent,
)
from fluxshadow.checks.figures import (
    MODEL_SHEET,
    SHEET_PATCH_DIAMETERS,
    is_coaxial_vertical,
    layer_stack,
    sheet_layer_figures,
)
from fluxshadow.checks.model import Finding, Report
from fluxshadow.checks.operating import OperatingPoint, operating_points
from fluxshadow.checks.settings import Settings, settings_from_config
from fluxshadow.checks.source import SourceModel, checked_part, source_model
from fluxshadow.physics.loop import loops_field_xyz
from fluxshadow.physics.sheet import SheetSolution
from fluxshadow.physics.slab import coaxial_loops_field_below_layers
from fluxshadow.physics.spectral import field_below_layers_from_top_bz

__all__ = [
    "FIELD_GRID",
    "ExposedLine",
    "FieldMap",
    "FindingMark",
    "LayerPicture",
    "MagneticPicture",
    "OverviewPicture",
    "PictureSet",
    "Polygon2",
    "field_map",
    "picture_data",
    "polygons_of",
]

FloatArray = npt.NDArray[np.float64]
Polygon2 = tuple[FloatArray, ...]
"""One polygon: its exterior ring then its holes, each an (n, 2) array in mm (closed)."""

FIELD_GRID = 41
"""Field-map samples along each side (coarse: the map is a picture, not a figure)."""

_FFT_MAX_SIDE = 257
_FFT_REACH = 4.0
"""The FFT window of a horizontal winding reaches this many (radius + height) beyond it."""


# ----------------------------------------------------------------------------- records


@dataclass(frozen=True, kw_only=True, eq=False)
class ExposedLine:
    """One exposed trace (one net on one layer) and its finding's figures.

    Attributes
    ----------
    net : str
    lines : tuple of ndarray, shape (n, 2)
        Exposed centre-line pieces (mm).
    exposed_length_mm : float
    induced_mv : float or None
        ``induced_voltage_mv`` of the finding (mV peak, or mV per A/us); ``None`` when no
        figure was computed.
    severity : str
        The finding's severity.
    """

    net: str
    lines: tuple[FloatArray, ...]
    exposed_length_mm: float
    induced_mv: float | None
    severity: str


@dataclass(frozen=True, kw_only=True, eq=False)
class LayerPicture:
    """One copper layer under one magnetic, clipped to the picture window (mm).

    Attributes
    ----------
    layer : str
        ``"L2"``.
    depth_mm : float
        Depth below the mounting surface (mm).
    coverage : float
        Plane share of the zone (1).
    plane_around : bool
    plane, traces, voids : tuple of Polygon2
        Plane copper, trace copper and the voids of the zone.
    zone : tuple of Polygon2
    ring_paths : tuple of ndarray, shape (n, 2)
        Inner edges of the closed rings around the voids (the hole's outline, mm); the
        ring current circulates in the copper along them.
    exposed : tuple of ExposedLine
    shielding_db : float or None
        The layer's ``shielding_db`` figure.
    """

    layer: str
    depth_mm: float
    coverage: float
    plane_around: bool
    plane: tuple[Polygon2, ...]
    traces: tuple[Polygon2, ...]
    voids: tuple[Polygon2, ...]
    zone: tuple[Polygon2, ...]
    ring_paths: tuple[FloatArray, ...]
    exposed: tuple[ExposedLine, ...]
    shielding_db: float | None = None


@dataclass(frozen=True, kw_only=True, eq=False)
class FieldMap:
    """|B| of the winding on a grid at one layer's depth (artwork frame).

    Attributes
    ----------
    layer : str
    depth_mm : float
        Depth of the map below the mounting surface (the layer's mid-plane) (mm).
    x_mm : ndarray, shape (nx,)
    y_mm : ndarray, shape (ny,)
    b_ut : ndarray, shape (ny, nx)
        |B| (µT): the length of the phasor vector, per A of winding current or at the
        operating point (see ``per``).
    per : str
        ``"per A of winding current"`` or ``"at 0.81 A, the ripple's fundamental"``.
    planes : str
        Layers taken as solid planes above the map ("" for none).
    freq_hz : float
    exposed : bool
        The layer carries an exposed trace (else it is the deepest layer, mapped because
        nothing is exposed).
    sheets : str
        Layers above the map whose eddy currents are in it (the sheet model's solution,
        as in the report's figures: source and sheet currents, no solid plane between),
        e.g. ``"L2+L3"``; "" when the map is the spectral model of the solid planes. A
        sheet-model map covers only the solved patch (its grid lines say where).
    """

    layer: str
    depth_mm: float
    x_mm: FloatArray
    y_mm: FloatArray
    b_ut: FloatArray
    per: str
    planes: str
    freq_hz: float
    exposed: bool = True
    sheets: str = ""


@dataclass(frozen=True, kw_only=True, eq=False)
class MagneticPicture:
    """Everything drawn for one magnetic (artwork frame, mm).

    Attributes
    ----------
    ref, kind, value_text, side : str
    x_mm, y_mm : float
        Part centre.
    body : ndarray, shape (n, 2)
        Body outline (closed).
    winding_radius_mm : float
        Radius of the winding projection (a circle around the centre).
    window : tuple of 4 float
        ``(xmin, ymin, xmax, ymax)`` every layer panel shows.
    layers : tuple of LayerPicture
        Nearest layer first.
    fields : tuple of FieldMap
    induced_per : str
        ``"mV peak"`` (operating point) or ``"mV per A/us"``.
    """

    ref: str
    kind: str
    value_text: str
    side: str
    x_mm: float
    y_mm: float
    body: FloatArray
    winding_radius_mm: float
    window: tuple[float, float, float, float]
    layers: tuple[LayerPicture, ...]
    fields: tuple[FieldMap, ...]
    induced_per: str


@dataclass(frozen=True, kw_only=True)
class FindingMark:
    """A finding with a position, for the overview."""

    rule: str
    severity: str
    ref: str
    layer: str
    x_mm: float
    y_mm: float
    waived: bool


@dataclass(frozen=True, kw_only=True, eq=False)
class OverviewPicture:
    """The board with every magnetic and every located finding (mm).

    Attributes
    ----------
    package : str
    board : tuple of Polygon2
        The board's shape (outline with cut-outs as holes, else the copper extent).
    cutouts : tuple of Polygon2
    magnetics : tuple of (str, ndarray (n, 2))
        Designator and body outline.
    findings : tuple of FindingMark
        Findings with a position, the report's order.
    unplaced : int
        Findings without a position (assumptions, board-wide notes).
    """

    package: str
    board: tuple[Polygon2, ...]
    cutouts: tuple[Polygon2, ...]
    magnetics: tuple[tuple[str, FloatArray], ...]
    findings: tuple[FindingMark, ...]
    unplaced: int


@dataclass(frozen=True, kw_only=True, eq=False)
class PictureSet:
    """The pictures' data for one report."""

    magnetics: tuple[MagneticPicture, ...]
    overview: OverviewPicture


# ----------------------------------------------------------------------------- geometry


def polygons_of(geom: BaseGeometry, window: Sequence[float] | None = None) -> tuple[Polygon2, ...]:
    """The polygons of a shapely geometry as plain rings, optionally clipped to a window.

    Parameters
    ----------
    geom : shapely geometry
        Polygons (other parts are skipped) in mm.
    window : sequence of 4 float, optional
        ``(xmin, ymin, xmax, ymax)`` (mm).

    Returns
    -------
    tuple of Polygon2
        Each polygon as (exterior, *holes), arrays of shape (n, 2), mm.
    """
    if geom is None or geom.is_empty:
        return ()
    if window is not None:
        geom = shapely.clip_by_rect(geom, *window)
    out: list[Polygon2] = []
    for part in shapely.get_parts(geom):
        if part.geom_type == "Polygon" and not part.is_empty and part.area > 0:
            rings = [np.asarray(part.exterior.coords, dtype=np.float64)[:, :2]]
            rings += [np.asarray(r.coords, dtype=np.float64)[:, :2] for r in part.interiors]
            out.append(tuple(rings))
        elif part.geom_type in ("MultiPolygon", "GeometryCollection"):
            out.extend(polygons_of(part))
    return tuple(out)


def _lines_of(geom: BaseGeometry) -> tuple[FloatArray, ...]:
    out: list[FloatArray] = []
    for part in shapely.get_parts(geom):
        if part.geom_type == "LineString" and part.length > 0:
            out.append(np.asarray(part.coords, dtype=np.float64)[:, :2])
        elif part.geom_type == "MultiLineString":
            out.extend(_lines_of(part))
    return tuple(out)


def _ring_paths(lg: LayerGeometry) -> tuple[FloatArray, ...]:
    """The inner edges of the closed rings of a layer, as traced by the analysis (a ring
    that closes beyond the picture's window is drawn up to the window's frame)."""
    out: list[FloatArray] = []
    seen: set[tuple[tuple[float, float], ...]] = set()
    for v in lg.voids:
        ring = v.ring
        if ring is None or not ring.closed or len(ring.path_mm) < 4 or ring.path_mm in seen:
            continue
        seen.add(ring.path_mm)
        out.append(np.asarray(ring.path_mm, dtype=np.float64))
    return tuple(out)


def _metric(f: Finding | None, key: str) -> float | None:
    if f is None:
        return None
    v = f.metrics.get(key)
    return float(v) if isinstance(v, int | float) and not isinstance(v, bool) else None


# ----------------------------------------------------------------------------- field maps


def _fft_field(
    source: SourceModel,
    xy_m: FloatArray,
    thickness_m: FloatArray,
    sigma_s_per_m: FloatArray,
    obs_depth_m: float,
    freq_hz: float,
) -> FloatArray:
    """|B| (T/A) below a stack at local points, through the 2D spectrum of the incident B_z."""
    low = max(source.lowest_m, 1e-6)
    size = float(np.max(np.abs(xy_m))) if len(xy_m) else 0.0
    reach = max(size, float(np.max(np.linalg.norm(source.centre_m[:, :2], axis=1)))) + (
        _FFT_REACH * (float(np.max(source.radius_m)) + float(np.max(source.centre_m[:, 2])))
    )
    spacing = 0.5 * low
    half = math.ceil(reach / spacing)
    if 2 * half + 1 > _FFT_MAX_SIDE:
        half = (_FFT_MAX_SIDE - 1) // 2
        spacing = reach / half
    u = (np.arange(2 * half + 1) - half) * spacing
    uu, vv = np.meshgrid(u, u)
    pts = np.column_stack([uu.ravel(), vv.ravel(), np.zeros(uu.size)])
    b_top = loops_field_xyz(
        pts, source.centre_m, source.axis_vec, source.radius_m, source.current_per_a
    )[:, 2].reshape(uu.shape)
    b = field_below_layers_from_top_bz(
        b_top, spacing, obs_depth_m, freq_hz, thickness_m, sigma_s_per_m
    )
    mag = np.sqrt(np.sum(np.abs(b) ** 2, axis=2))
    interp = RegularGridInterpolator((u, u), mag, bounds_error=False, fill_value=0.0)
    return np.asarray(interp(np.column_stack([xy_m[:, 1], xy_m[:, 0]])), dtype=np.float64)


def field_map(
    source: SourceModel,
    stack_thickness_m: FloatArray,
    stack_sigma_s_per_m: FloatArray,
    obs_depth_m: float,
    freq_hz: float,
    x_mm: FloatArray,
    y_mm: FloatArray,
) -> FloatArray:
    """|B| per ampere of winding current on a grid below a stack of planes (T/A).

    Parameters
    ----------
    source : SourceModel
        The winding (local frame: the stack's top surface is z = 0).
    stack_thickness_m, stack_sigma_s_per_m : ndarray, shape (P,)
        The slabs from the mounting surface down (m, S/m); empty or all zero for none.
    obs_depth_m : float
        Depth of the map below the bottom of the stack (m), >= 0.
    freq_hz : float
        Frequency (Hz).
    x_mm, y_mm : ndarray, shape (nx,), (ny,)
        Grid lines, artwork frame (mm).

    Returns
    -------
    ndarray, shape (ny, nx)
        |B| (T per A): the length of the phasor vector. Without a conducting slab it is
        the closed-form free-space field; a vertical coaxial winding uses the Hankel
        route, any other the 2D FFT of its incident B_z (interpolated to the grid).
    """
    xx, yy = np.meshgrid(np.asarray(x_mm, dtype=np.float64), np.asarray(y_mm, dtype=np.float64))
    xy = source.to_local_m(xx.ravel(), yy.ravel())
    below = float(np.sum(stack_thickness_m)) + obs_depth_m
    if not np.any(np.asarray(stack_sigma_s_per_m) > 0.0):
        pts = np.column_stack([xy, np.full(len(xy), -below)])
        b = loops_field_xyz(
            pts, source.centre_m, source.axis_vec, source.radius_m, source.current_per_a
        )
        mag = np.linalg.norm(b, axis=1)
    elif is_coaxial_vertical(source):
        rho = np.hypot(xy[:, 0], xy[:, 1])
        rho_u, inverse = np.unique(np.round(rho, 9), return_inverse=True)
        b_rho, b_z = coaxial_loops_field_below_layers(
            source.radius_m, source.centre_m[:, 2], rho_u, np.full(len(rho_u), obs_depth_m),
            freq_hz, stack_thickness_m, stack_sigma_s_per_m, source.current_per_a,
        )  # fmt: skip
        mag = np.sqrt(np.abs(b_rho) ** 2 + np.abs(b_z) ** 2)[inverse.reshape(-1)]
    else:
        mag = _fft_field(source, xy, stack_thickness_m, stack_sigma_s_per_m, obs_depth_m, freq_hz)
    return np.asarray(mag, dtype=np.float64).reshape(xx.shape)


def _field_maps(
    geo: MagneticGeometry,
    source: SourceModel,
    op: OperatingPoint,
    grid: int,
    solutions: Mapping[str, tuple[SheetSolution, int]] | None = None,
) -> tuple[FieldMap, ...]:
    layers = geo.layers
    ks = [k for k in range(1, len(layers)) if layers[k].exposed]
    if not ks and len(layers) > 1:
        ks = [len(layers) - 1]
    solid = [lg.plane_around and not lg.voids for lg in layers]
    x0, y0, x1, y1 = geo.window
    xs = np.linspace(x0, x1, grid)
    ys = np.linspace(y0, y1, grid)
    if op.stated and op.harmonics_a:
        scale = float(op.harmonics_a[0])
        per = f"at {scale:.3g} A, the ripple's fundamental"
    else:
        scale, per = 1.0, "per A of winding current"
    out: list[FieldMap] = []
    for k in ks:
        lg = layers[k]
        stack = layer_stack(layers, k - 1, planes=solid)
        mid_m = (lg.depth_mm + 0.5 * float(lg.layer.thickness_mm)) * 1e-3
        obs = max(mid_m - float(np.sum(stack.thickness_m)), 0.0)
        # Voided layers above solved with the sheet model, and no solid plane in between:
        # the map is that solution's field (the part's and the eddy currents'), the model
        # the report's figures of those layers come from.
        above = [
            name
            for name in (solutions or {})
            if any(x.layer.name == name and x.depth_mm < lg.depth_mm for x in layers)
        ]
        sols = {id((solutions or {})[n][0]): (solutions or {})[n][0] for n in above}
        sheets = ""
        map_x, map_y = xs, ys
        if above and not stack.planes and len(sols) == 1:
            sol = next(iter(sols.values()))
            # over the solved patch only: beyond it the model has no copper
            half = SHEET_PATCH_DIAMETERS * 2.0 * source.winding_radius_mm
            map_x = np.linspace(max(x0, source.x_mm - half), min(x1, source.x_mm + half), grid)
            map_y = np.linspace(max(y0, source.y_mm - half), min(y1, source.y_mm + half), grid)
            xx, yy = np.meshgrid(map_x, map_y)
            xy = source.to_local_m(xx.ravel(), yy.ravel())
            pts = np.column_stack([xy, np.full(len(xy), -mid_m)])
            b = np.linalg.norm(sol.field_at(pts)[0], axis=1).reshape(xx.shape)
            sheets = "+".join(
                sorted(
                    above, key=lambda n: next(x.layer.index for x in layers if x.layer.name == n)
                )
            )
        else:
            b = field_map(
                source, stack.thickness_m, stack.sigma_s_per_m, obs, float(op.fsw_hz), xs, ys
            )
        out.append(
            FieldMap(
                layer=lg.layer.name,
                depth_mm=mid_m * 1e3,
                x_mm=map_x,
                y_mm=map_y,
                b_ut=b * scale * 1e6,
                per=per,
                planes=",".join(stack.planes),
                freq_hz=float(op.fsw_hz),
                exposed=bool(lg.exposed),
                sheets=sheets,
            )
        )
    return tuple(out)


# ----------------------------------------------------------------------------- assembly


def _magnetic_picture(
    board: Board,
    geo: MagneticGeometry,
    findings: Sequence[Finding],
    source: SourceModel,
    op: OperatingPoint,
    figures: dict[str, float | None],
    grid: int,
    solutions: Mapping[str, tuple[SheetSolution, int]] | None = None,
) -> MagneticPicture:
    m = geo.magnetic
    window = geo.window
    exposed_findings = {(f.layer, str(f.metrics.get("net", ""))): f for f in findings}
    layers: list[LayerPicture] = []
    for lg in geo.layers:
        name = lg.layer.name
        exposed: list[ExposedLine] = []
        for e in lg.exposed:
            f = exposed_findings.get((name, e.net))
            if f is None:
                continue  # the rule is off or the finding was not made: drawn as a trace
            exposed.append(
                ExposedLine(
                    net=e.net,
                    lines=_lines_of(e.exposed),
                    exposed_length_mm=e.exposed_length_mm,
                    induced_mv=_metric(f, "induced_voltage_mv"),
                    severity=f.severity,
                )
            )
        voids = shapely.union_all([v.polygon for v in lg.voids]) if lg.voids else None
        layers.append(
            LayerPicture(
                layer=name,
                depth_mm=lg.depth_mm,
                coverage=lg.coverage,
                plane_around=lg.plane_around,
                plane=polygons_of(lg.plane, window),
                traces=polygons_of(lg.traces, window),
                voids=polygons_of(voids, window) if voids is not None else (),
                zone=polygons_of(lg.zone),
                ring_paths=_ring_paths(lg),
                exposed=tuple(exposed),
                shielding_db=figures.get(name),
            )
        )
    return MagneticPicture(
        ref=m.ref,
        kind=m.kind,
        value_text=m.value_text,
        side=m.side,
        x_mm=m.x_mm,
        y_mm=m.y_mm,
        body=np.asarray(m.outline, dtype=np.float64)[:, :2],
        winding_radius_mm=geo.winding_radius_mm,
        window=window,
        layers=tuple(layers),
        fields=_field_maps(geo, source, op, grid, solutions),
        induced_per="mV peak" if op.stated else "mV per A/us",
    )


def picture_data(
    report: Report,
    board: Board,
    *,
    settings: Settings | None = None,
    grid: int = FIELD_GRID,
) -> PictureSet:
    """Plain data for every picture of a report.

    Parameters
    ----------
    report : Report
        From :func:`~fluxshadow.checks.run.run_checks` on ``board``.
    board : Board
        The board the report was made from (its geometry is recomputed here).
    settings : Settings, optional
        The settings the report was made with; default from the board's config.
    grid : int, default 41
        Field-map samples along each side.

    Returns
    -------
    PictureSet
        One :class:`MagneticPicture` per magnetic of the report (the report's order) and
        the overview.
    """
    cfg = board.config
    if settings is None:
        settings = settings_from_config(cfg.thresholds, cfg.severity, source=cfg.source)
    ops = operating_points(board.magnetics, cfg)
    by_ref = {m.ref: m for m in board.magnetics}
    pictures: list[MagneticPicture] = []
    for res in report.magnetics:
        m = by_ref.get(res.ref)
        if m is None:
            continue
        part = next((p for p in cfg.parts if p.ref == m.ref), None)
        # the same checked part values the checks used (bad ones fall back to defaults)
        part, _problems = checked_part(m, part)
        geo = analyse_magnetic(
            board, m, settings, radius_mm=part.winding_radius_mm if part else None
        )
        op = ops[m.ref]
        src = source_model(m, part, settings, inductance_h=op.inductance_h)
        mine = [f for f in report.findings if f.ref == m.ref and f.rule == "exposed-trace"]
        se: dict[str, float | None] = {}
        sheet_layers: list[str] = []
        for lr in res.layers:
            v = lr.figures.get("shielding_db")
            se[lr.layer] = float(v) if isinstance(v, int | float) else None
            if lr.figures.get("model") == MODEL_SHEET:
                sheet_layers.append(lr.layer)
        sheet_out = sheet_layer_figures(
            geo,
            src,
            op,
            only=[k for k, lg in enumerate(geo.layers) if lg.layer.name in sheet_layers],
        )
        pictures.append(_magnetic_picture(board, geo, mine, src, op, se, grid, sheet_out.solutions))
    return PictureSet(magnetics=tuple(pictures), overview=_overview(report, board))


def _overview(report: Report, board: Board) -> OverviewPicture:
    if board.outline is not None:
        shape: BaseGeometry = board.outline.board
        cutouts = tuple(p for c in board.outline.cutouts for p in polygons_of(c))
    else:
        shape, cutouts = board_extent(board), ()
    marks = tuple(
        FindingMark(
            rule=f.rule,
            severity=f.severity,
            ref=f.ref,
            layer=f.layer,
            x_mm=float(f.x_mm),
            y_mm=float(f.y_mm),
            waived=f.waived,
        )
        for f in report.findings
        if f.x_mm is not None and f.y_mm is not None
    )
    return OverviewPicture(
        package=report.package,
        board=polygons_of(shape),
        cutouts=cutouts,
        magnetics=tuple((r.ref, np.asarray(r.outline, dtype=np.float64)) for r in report.magnetics),
        findings=marks,
        unplaced=len(report.findings) - len(marks),
    )
