"""Board outline and cut-outs from a profile (outline) artwork.

A profile layer draws the board edge as thin tracks (and sometimes regions). The centre
lines are noded and polygonised; the largest face is the board, faces inside it that are
bounded by drawn lines are cut-outs.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np
import numpy.typing as npt
import shapely
from shapely.geometry.base import BaseGeometry

from fluxshadow.io.records import REGION, TRACK, ArtworkRecord

__all__ = ["BoardOutline", "copper_extent", "outline_from_artwork", "outline_from_rings"]

_SNAP_MM = 0.01
"""Drawn outline segments whose ends lie this close are joined (common practice: outline
files written with rounded coordinates leave gaps of a few micrometres)."""


@dataclass(frozen=True, kw_only=True)
class BoardOutline:
    """The board shape in the artwork frame (mm).

    Attributes
    ----------
    board : shapely.Polygon
        Outer edge with the cut-outs as holes.
    cutouts : tuple of shapely.Polygon
        Material removed inside the board (milled openings), each a polygon.
    source : str
        The profile file it came from.
    """

    board: BaseGeometry
    cutouts: tuple[BaseGeometry, ...]
    source: str


def outline_from_artwork(record: ArtworkRecord) -> BoardOutline | None:
    """Polygonise the centre lines of a profile artwork.

    Parameters
    ----------
    record : ArtworkRecord
        The profile/outline layer.

    Returns
    -------
    BoardOutline or None
        ``None`` when the lines enclose no area.
    """
    rings = []
    rvs = record.ring_vertex_start
    ors = record.obj_ring_start
    for i in np.flatnonzero((record.obj_kind == TRACK) | (record.obj_kind == REGION)):
        for r in range(int(ors[i]), int(ors[i + 1])):
            rings.append(record.vertices[int(rvs[r]) : int(rvs[r + 1])])
    return outline_from_rings(rings, source=record.source)


def outline_from_rings(
    rings: Sequence[npt.NDArray[np.float64]], *, source: str
) -> BoardOutline | None:
    """Polygonise outline centre lines given as polylines or closed contours.

    The largest enclosed face is the board; faces inside it that no other inner face
    contains are cut-outs. Used for a profile artwork's tracks and regions and for the
    contours of an ODB++ step profile (whose hole contours become cut-outs).

    Parameters
    ----------
    rings : sequence of ndarray, shape (n, 2)
        Polylines or closed contours in the artwork frame (mm); those with fewer than
        two points are ignored.
    source : str
        The file they came from.

    Returns
    -------
    BoardOutline or None
        ``None`` when the lines enclose no area.
    """
    lines = [shapely.linestrings(pts) for pts in rings if len(pts) >= 2]
    if not lines:
        return None
    merged = shapely.union_all(shapely.set_precision(np.array(lines), _SNAP_MM))
    faces = list(shapely.get_parts(shapely.polygonize([merged])))
    faces = [f for f in faces if f.area > 0]
    if not faces:
        return None
    faces.sort(key=lambda f: f.area, reverse=True)
    outer = shapely.Polygon(faces[0].exterior)
    inner = [
        shapely.Polygon(f.exterior) for f in faces[1:] if outer.contains(f.representative_point())
    ]
    # Faces nested inside a cut-out (an island left in a hole) are not cut-outs themselves.
    cutouts: list[BaseGeometry] = []
    for f in sorted(inner, key=lambda g: g.area, reverse=True):
        if not any(c.contains(f.representative_point()) for c in cutouts):
            cutouts.append(f)
    board = outer
    if cutouts:
        board = shapely.difference(outer, shapely.union_all(cutouts))
    return BoardOutline(board=board, cutouts=tuple(cutouts), source=source)


_STRAY_GAP_MM = 2.0
"""Copper-free gap that sets a cluster of copper objects apart from the rest (mm)."""

_STRAY_SHARE = 0.01
"""Clusters beyond such a gap with fewer than this share of all objects are not the board."""


def _main_span(lo: npt.NDArray[np.float64], hi: npt.NDArray[np.float64]) -> tuple[float, float]:
    """Span along one axis of the object intervals, without small stray clusters (mm).

    The intervals ``[lo, hi]`` are grouped into clusters separated by more than
    ``_STRAY_GAP_MM`` of empty axis; clusters holding fewer than ``_STRAY_SHARE`` of all
    objects (panel fiducials and tooling marks drawn outside the board) are left out,
    unless no cluster is large enough, when the largest one is kept.
    """
    order = np.argsort(lo, kind="stable")
    lo, hi = lo[order], hi[order]
    reach = np.maximum.accumulate(hi)
    breaks = np.flatnonzero(lo[1:] > reach[:-1] + _STRAY_GAP_MM) + 1
    starts = np.concatenate(([0], breaks))
    ends = np.concatenate((breaks, [len(lo)]))
    counts = ends - starts
    keep = counts >= _STRAY_SHARE * len(lo)
    if not keep.any():
        keep = counts == counts.max()
    return float(lo[starts[keep]].min()), float(reach[ends[keep] - 1].max())


def copper_extent(boxes: npt.NDArray[np.float64]) -> shapely.Polygon:
    """The board's extent from the boxes of its copper objects, when it has no outline.

    The bounding box of all boxes, leaving out small clusters that stand more than
    ``_STRAY_GAP_MM`` apart from the rest along an axis (fiducials and tooling marks of a
    fabrication panel, which would otherwise stretch the "board" far beyond its edge).

    Parameters
    ----------
    boxes : ndarray, shape (n, 4)
        ``(xmin, ymin, xmax, ymax)`` per object in mm (a point is a box of zero size).

    Returns
    -------
    shapely.Polygon
        A rectangle in mm; empty when ``boxes`` is.
    """
    b = np.asarray(boxes, dtype=np.float64).reshape(-1, 4)
    if not len(b):
        return shapely.Polygon()
    x0, x1 = _main_span(b[:, 0], b[:, 2])
    y0, y1 = _main_span(b[:, 1], b[:, 3])
    return shapely.box(x0, y0, x1, y1)
