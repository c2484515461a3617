"""Detect copper files written as negative images without saying so.

A plane layer is often written negatively: the file draws only what is *removed* from the
plane (antipads around holes of other nets, thermal reliefs, split lines) and the
fabricator inverts it. X2 says so with ``FilePolarity,Negative`` and RS-274X with
``%IPNEG*%``, but many files carry neither. Such a file read as positive looks like a layer
of round pads and no copper, which would make every magnetic above it look unshielded.

The evidence used (all must hold; each is common practice of how negative plane files
look, not a published rule):

1. no large dark region (a positive plane or pour draws one), less than 5 % of the
   layer's extent in region copper;
2. few draws compared with flashes (a positive signal layer connects its pads with tracks);
3. nearly every flash is centred on a drilled hole (antipads sit on holes);
4. the flashes are larger than the pads the outer layers have at the same holes (an
   antipad clears around a pad; a pad-only positive layer has pads of pad size).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import numpy.typing as npt
from scipy.spatial import cKDTree

from fluxshadow.io.records import FLASH, REGION, TRACK, ArtworkRecord

__all__ = ["NegativeEvidence", "flash_sizes_mm", "looks_negative", "region_area_mm2"]

_HOLE_MATCH_MM = 0.02
_MIN_FLASHES = 4
_MAX_REGION_FRACTION = 0.05
_MAX_TRACK_RATIO = 0.25
_MIN_AT_HOLES = 0.8
_MIN_GROWTH_MM = 0.05


@dataclass(frozen=True, kw_only=True)
class NegativeEvidence:
    """The figures behind a negative-image decision, for the report."""

    negative: bool
    flashes: int
    tracks: int
    region_fraction: float
    at_holes_fraction: float
    median_growth_mm: float | None

    def describe(self) -> str:
        """One line of the evidence, for ``fluxshadow stack``."""
        growth = "n/a" if self.median_growth_mm is None else f"{self.median_growth_mm:+.2f} mm"
        return (
            f"{self.flashes} flashes ({self.at_holes_fraction:.0%} on drilled holes, "
            f"median size against the outer pads {growth}), {self.tracks} draws, "
            f"regions cover {self.region_fraction:.1%} of the layer"
        )


def flash_sizes_mm(record: ArtworkRecord) -> npt.NDArray[np.float64]:
    """Largest extent (diameter-like size, mm) of each flash's aperture, shape (n_flash,)."""
    is_flash = record.obj_kind == FLASH
    sizes = np.array([2.0 * a.extent_mm for a in record.apertures] or [0.0])
    return sizes[record.obj_aperture[is_flash]] if is_flash.any() else np.empty(0)


def region_area_mm2(record: ArtworkRecord) -> float:
    """Sum of the shoelace areas of the dark region contours (mm^2, overlaps counted twice)."""
    total = 0.0
    rvs = record.ring_vertex_start
    ors = record.obj_ring_start
    for i in np.flatnonzero((record.obj_kind == REGION) & record.obj_dark):
        for r in range(int(ors[i]), int(ors[i + 1])):
            p = record.vertices[int(rvs[r]) : int(rvs[r + 1])]
            if len(p) >= 3:
                total += 0.5 * abs(float(np.dot(p[:-1, 0], p[1:, 1]) - np.dot(p[1:, 0], p[:-1, 1])))
    return total


def looks_negative(
    record: ArtworkRecord,
    *,
    hole_xy: npt.NDArray[np.float64],
    outer_pad_xy: npt.NDArray[np.float64],
    outer_pad_size_mm: npt.NDArray[np.float64],
    extent_area_mm2: float,
) -> NegativeEvidence:
    """Decide whether an unmarked copper file is a negative plane image.

    Parameters
    ----------
    record : ArtworkRecord
        The copper file as read (its own flags say positive).
    hole_xy : ndarray, shape (h, 2)
        Centres of all drilled holes (mm, artwork frame).
    outer_pad_xy, outer_pad_size_mm : ndarray, shapes (p, 2) and (p,)
        Flashes of the outer copper layers and their sizes (mm).
    extent_area_mm2 : float
        Area of the board (or of the copper extent) in mm^2.

    Returns
    -------
    NegativeEvidence
    """
    kinds = record.obj_kind
    dark = record.obj_dark
    flash = (kinds == FLASH) & dark
    n_flash = int(flash.sum())
    n_track = int(((kinds == TRACK) & dark).sum())
    region_fraction = region_area_mm2(record) / extent_area_mm2 if extent_area_mm2 > 0 else 0.0
    at_holes = 0.0
    growth: float | None = None
    if n_flash and len(hole_xy):
        xy = record.obj_xy[flash]
        d, _ = cKDTree(hole_xy).query(xy)
        on_hole = d <= _HOLE_MATCH_MM
        at_holes = float(on_hole.mean())
        if on_hole.any() and len(outer_pad_xy):
            sizes = flash_sizes_mm(record)[dark[kinds == FLASH]][on_hole]
            d2, j = cKDTree(outer_pad_xy).query(xy[on_hole])
            near = d2 <= _HOLE_MATCH_MM
            if near.any():
                growth = float(np.median(sizes[near] - outer_pad_size_mm[j[near]]))
    negative = (
        n_flash >= _MIN_FLASHES
        and region_fraction < _MAX_REGION_FRACTION
        and n_track <= _MAX_TRACK_RATIO * n_flash
        and at_holes >= _MIN_AT_HOLES
        and growth is not None
        and growth >= _MIN_GROWTH_MM
    )
    return NegativeEvidence(
        negative=bool(negative),
        flashes=n_flash,
        tracks=n_track,
        region_fraction=region_fraction,
        at_holes_fraction=at_holes,
        median_growth_mm=growth,
    )
