"""Aperture shapes as shapely geometry, built once per aperture (private helper of copper).

An :class:`~fluxshadow.io.records.ApertureRecord` arrives with its parts already
transformed (mirroring, rotation, scaling applied) as closed ``(dark, ring)`` polygons in
millimetres relative to the flash point. This module turns one record into one polygonal
geometry and derives what the composer needs from it: the relative bounding box (for the
spatial index) and the convex-hull vertices (for tracks drawn with a non-circular aperture).
"""

from __future__ import annotations

import numpy as np
import numpy.typing as npt
import shapely
from shapely.geometry.base import BaseGeometry

from fluxshadow.io.records import ApertureRecord

__all__ = [
    "aperture_bounds",
    "aperture_hull_points",
    "aperture_shape",
    "polygon_parts",
    "polygons_from_rings",
    "ring_is_fillable",
]

FloatArray = npt.NDArray[np.float64]

_POLYGON = 3


def polygon_parts(
    geometries: npt.ArrayLike,
) -> tuple[npt.NDArray[np.object_], npt.NDArray[np.int64]]:
    """Flatten geometries into their non-empty polygon parts.

    Parameters
    ----------
    geometries : array_like of shapely geometry, shape (n,)
        Any geometries (collections included); coordinates in mm.

    Returns
    -------
    parts : ndarray of shapely.Polygon, shape (k,)
        Every non-empty polygon found inside the inputs; lines and points (the
        collapsed parts a validity repair or a touching overlay can leave) are dropped.
    source : ndarray of int, shape (k,)
        Index of the input each part came from.
    """
    arr = np.asarray(geometries, dtype=object).reshape(-1)
    parts, first = shapely.get_parts(arr, return_index=True)
    # A GeometryCollection can hold a MultiPolygon: flatten a second time.
    parts, second = shapely.get_parts(parts, return_index=True)
    source = np.asarray(first, dtype=np.int64)[second]
    keep = (shapely.get_type_id(parts) == _POLYGON) & ~shapely.is_empty(parts)
    return np.asarray(parts[keep], dtype=object), source[keep]


def ring_is_fillable(count: npt.ArrayLike, closed: npt.ArrayLike) -> npt.NDArray[np.bool_]:
    """Whether rings have at least three distinct corners to fill.

    Parameters
    ----------
    count : array_like of int, shape (r,)
        Vertices stored per ring.
    closed : array_like of bool, shape (r,)
        Whether the last stored vertex repeats the first.

    Returns
    -------
    ndarray of bool, shape (r,)
    """
    c = np.asarray(count, dtype=np.int64)
    return np.asarray(c - np.asarray(closed, dtype=np.int64) >= 3)


def polygons_from_rings(
    vertices: FloatArray, ring_of_vertex: npt.NDArray[np.int64]
) -> tuple[npt.NDArray[np.object_], npt.NDArray[np.int64]]:
    """Fill closed rings, each on its own, as valid polygons.

    Parameters
    ----------
    vertices : ndarray, shape (v, 2)
        Ring vertices in mm, ring after ring; each ring closed or not (it is closed here)
        and fillable (see :func:`ring_is_fillable`).
    ring_of_vertex : ndarray of int, shape (v,)
        Non-decreasing ring number of each vertex, ``0 .. r - 1`` without gaps.

    Returns
    -------
    polygons : ndarray of shapely.Polygon, shape (k,)
        The filled rings. A ring that touches or crosses itself (a cut-in joining an
        outer boundary to a hole, a bow-tie) is repaired with the ``linework`` method of
        ``shapely.make_valid``, which fills by the even-odd rule: the doubled cut-in
        edge cancels and the hole it leads to stays open, whatever the orientation of
        the hole. A ring may so give several polygons, or none when it has no area.
    ring : ndarray of int, shape (k,)
        Ring number each polygon came from.
    """
    if len(vertices) == 0:
        return np.empty(0, dtype=object), np.empty(0, dtype=np.int64)
    rings = shapely.linearrings(vertices, indices=ring_of_vertex)
    polygons = np.asarray(shapely.polygons(rings), dtype=object)
    ring_ids = np.arange(len(polygons), dtype=np.int64)
    bad = ~shapely.is_valid(polygons)
    if not np.any(bad):
        return polygons, ring_ids
    fixed, source = polygon_parts(shapely.make_valid(polygons[bad], method="linework"))
    return (
        np.concatenate([polygons[~bad], fixed]),
        np.concatenate([ring_ids[~bad], ring_ids[bad][source]]),
    )


def aperture_shape(aperture: ApertureRecord, *, quad_segs: int) -> BaseGeometry:
    """Return the aperture as one polygonal geometry, relative to its origin (mm).

    Parameters
    ----------
    aperture : ApertureRecord
        The aperture, already transformed.
    quad_segs : int
        Segments per quarter circle for a plain circle aperture (which is built as a
        regular ``4 * quad_segs``-gon inscribed in the circle, the same polygon the
        composer uses to buffer tracks drawn with it).

    Returns
    -------
    shapely.Polygon or shapely.MultiPolygon
        The dark parts minus the clear parts, applied in the order written: a clear part
        erases what the earlier dark parts of the same aperture exposed. Empty when the
        aperture exposes nothing (e.g. a zero-size circle).
    """
    if aperture.circle_diameter_mm is not None:
        radius = 0.5 * aperture.circle_diameter_mm
        if radius <= 0.0:
            return shapely.Polygon()
        return shapely.Point(0.0, 0.0).buffer(radius, quad_segs=quad_segs)
    shape: BaseGeometry = shapely.Polygon()
    for dark, ring in aperture.parts:
        ring_arr = np.asarray(ring, dtype=np.float64).reshape(-1, 2)
        closed = len(ring_arr) > 0 and bool(np.all(ring_arr[0] == ring_arr[-1]))
        if not ring_is_fillable([len(ring_arr)], [closed])[0]:
            continue
        filled, _ = polygons_from_rings(ring_arr, np.zeros(len(ring_arr), dtype=np.int64))
        if len(filled) == 0:
            continue
        part = shapely.union_all(filled)
        if dark:
            shape = shapely.union(shape, part)
        elif not shape.is_empty:
            shape = shapely.difference(shape, part)
    parts, _ = polygon_parts([shape])
    if len(parts) == 0:
        return shapely.Polygon()
    if len(parts) == 1:
        return parts[0]  # type: ignore[no-any-return]
    return shapely.MultiPolygon(list(parts))


def aperture_bounds(apertures: tuple[ApertureRecord, ...]) -> FloatArray:
    """Bounding box of each aperture's dark parts, relative to its origin.

    Parameters
    ----------
    apertures : tuple of ApertureRecord, length a

    Returns
    -------
    ndarray, shape (a, 4)
        ``(xmin, ymin, xmax, ymax)`` in mm. Clear parts only remove copper, so the dark
        parts bound the shape; an aperture without dark parts gets ``(0, 0, 0, 0)``.
    """
    out = np.zeros((len(apertures), 4), dtype=np.float64)
    for i, aperture in enumerate(apertures):
        if aperture.circle_diameter_mm is not None:
            r = max(0.5 * aperture.circle_diameter_mm, 0.0)
            out[i] = (-r, -r, r, r)
            continue
        dark = [
            np.asarray(ring, dtype=np.float64).reshape(-1, 2)
            for is_dark, ring in aperture.parts
            if is_dark and len(ring)
        ]
        if dark:
            pts = np.concatenate(dark)
            out[i, :2] = pts.min(axis=0)
            out[i, 2:] = pts.max(axis=0)
    return out


def aperture_hull_points(shape: BaseGeometry) -> FloatArray:
    """Vertices of the convex hull of an aperture shape, without the closing vertex.

    Parameters
    ----------
    shape : shapely geometry
        Aperture shape relative to its origin (mm).

    Returns
    -------
    ndarray, shape (k, 2)
        Hull vertices in mm (``k = 0`` for an empty shape). Sweeping these points along a
        segment and taking the hull of start and end copies gives the swept area of any
        convex aperture exactly.
    """
    if shape.is_empty:
        return np.empty((0, 2), dtype=np.float64)
    hull = shape.convex_hull
    coords = shapely.get_coordinates(hull)
    if hull.geom_type == "Polygon":
        coords = coords[:-1]
    return np.asarray(coords, dtype=np.float64)
