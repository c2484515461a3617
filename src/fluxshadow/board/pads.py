"""Pad centres of an artwork layer, for frame registration and part bodies."""

from __future__ import annotations

import numpy as np
import numpy.typing as npt

from fluxshadow.io.records import FLASH, REGION, ArtworkRecord

__all__ = ["pad_centres"]

_MAX_PAD_REGION_MM2 = 60.0
"""Regions up to this area count as pads drawn as regions (larger ones are pours)."""


def pad_centres(record: ArtworkRecord) -> npt.NDArray[np.float64]:
    """Centres of the dark pads of a layer (mm), shape (n, 2).

    Flashes count at their position; small dark regions (pads some writers draw as
    regions) count at the centroid of their first contour.
    """
    dark = record.obj_dark
    flashes = record.obj_xy[(record.obj_kind == FLASH) & dark]
    cents = []
    rvs = record.ring_vertex_start
    ors = record.obj_ring_start
    for i in np.flatnonzero((record.obj_kind == REGION) & dark):
        r = int(ors[i])
        p = record.vertices[int(rvs[r]) : int(rvs[r + 1])]
        if len(p) < 4:
            continue
        x0, y0, x1, y1 = p[:-1, 0], p[:-1, 1], p[1:, 0], p[1:, 1]
        cross = x0 * y1 - x1 * y0
        a = 0.5 * float(cross.sum())
        if a == 0.0 or abs(a) > _MAX_PAD_REGION_MM2:
            continue
        cx = float(((x0 + x1) * cross).sum()) / (6.0 * a)
        cy = float(((y0 + y1) * cross).sum()) / (6.0 * a)
        cents.append((cx, cy))
    if cents:
        return np.vstack([flashes, np.array(cents)])
    return np.asarray(flashes, dtype=np.float64).reshape(-1, 2)
