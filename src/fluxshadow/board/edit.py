"""What-if edits of a board: fill a zone with plane copper, or cut it free of copper.

An edit appends one region to a layer's artwork (dark to fill, clear to cut) after every
object of the file, so it wins over whatever the file drew there, exactly as a last
``G36`` region in the Gerber file would. The original board is not changed.
"""

from __future__ import annotations

from dataclasses import replace

import numpy as np
import shapely
from shapely.geometry.base import BaseGeometry

from fluxshadow.board.copper import LayerArtwork
from fluxshadow.board.model import Board, Layer
from fluxshadow.board.outline import BoardOutline
from fluxshadow.io.records import REGION, ArtworkRecord

__all__ = ["with_cutout", "with_region"]


def _append_region(record: ArtworkRecord, polygon: BaseGeometry, *, dark: bool) -> ArtworkRecord:
    """The record with one more region object made of ``polygon``'s rings (mm)."""
    rings: list[np.ndarray] = []
    for part in shapely.get_parts(polygon):
        if part.is_empty or part.area <= 0:
            continue
        rings.append(np.asarray(part.exterior.coords, dtype=np.float64))
    if not rings:
        return record
    n_rings = len(record.ring_vertex_start) - 1
    v0 = len(record.vertices)
    counts = np.array([len(r) for r in rings], dtype=np.int64)
    new_rvs = v0 + np.cumsum(counts)
    new_ors = n_rings + len(rings)
    return replace(
        record,
        obj_kind=np.append(record.obj_kind, np.int8(REGION)).astype(np.int8),
        obj_dark=np.append(record.obj_dark, dark),
        obj_aperture=np.append(record.obj_aperture, -1),
        obj_xy=np.vstack([record.obj_xy, rings[0][:1]]),
        obj_ring_start=np.append(record.obj_ring_start, new_ors),
        ring_vertex_start=np.concatenate([record.ring_vertex_start, new_rvs]),
        vertices=np.vstack([record.vertices, *rings]),
        obj_net=np.append(record.obj_net, -1),
        obj_component=np.append(record.obj_component, -1),
        obj_function=np.append(record.obj_function, -1),
    )


def with_region(
    board: Board, layer: str | int | Layer, polygon: BaseGeometry, *, fill: bool
) -> Board:
    """A copy of ``board`` with ``polygon`` filled with copper (or cleared) on one layer.

    Parameters
    ----------
    board : Board
    layer : str or int or Layer
        The copper layer.
    polygon : shapely geometry
        Area to fill or clear (mm, artwork frame); holes of the polygon are filled too.
    fill : bool
        ``True`` adds copper, ``False`` removes it.

    Returns
    -------
    Board
        A new board sharing everything but the edited layer's artwork.
    """
    lay = board.layer(layer)
    i = lay.index - 1
    old = board.artworks[i]
    if old.negative:
        # A negative image draws clearances: filling means clearing the drawing there.
        record = _append_region(old.record, polygon, dark=not fill)
    else:
        record = _append_region(old.record, polygon, dark=fill)
    art = LayerArtwork(record, negative=old.negative, plane_extent=old.plane_extent)
    artworks = (*board.artworks[:i], art, *board.artworks[i + 1 :])
    return replace(board, artworks=artworks)


def with_cutout(board: Board, polygon: BaseGeometry) -> Board:
    """A copy of ``board`` with a milled opening through every layer (mm)."""
    out = board
    for lay in board.layers:
        out = with_region(out, lay, polygon, fill=False)
    cut = shapely.Polygon(shapely.get_parts(polygon)[0].exterior)
    if board.outline is None:
        outline = None
    else:
        outline = BoardOutline(
            board=shapely.difference(board.outline.board, cut),
            cutouts=(*board.outline.cutouts, cut),
            source=board.outline.source,
        )
    return replace(out, outline=outline)
