"""Geometry helpers of the Gerber reader: arc linearisation, aperture shapes, transforms.

Everything here works in millimetres and degrees counter-clockwise; rings are closed
``(n, 2)`` float arrays (first vertex repeated at the end) wound counter-clockwise.
Curves are replaced by inscribed polylines whose chord error (sagitta) is at most
:data:`ARC_CHORD_TOLERANCE_MM`.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
import numpy.typing as npt

__all__ = [
    "ARC_CHORD_TOLERANCE_MM",
    "IDENTITY",
    "MAX_ARC_SEGMENTS",
    "Transform",
    "annulus_parts",
    "arc_points",
    "arc_segments",
    "circle_ring",
    "obround_ring",
    "polygon_ring",
    "rect_ring",
    "segment_rect_ring",
    "thermal_rings",
]

FloatArray = npt.NDArray[np.float64]

ARC_CHORD_TOLERANCE_MM = 0.002
"""Largest distance (mm) between a true arc and the chord that replaces it."""

MAX_ARC_SEGMENTS = 20_000
"""Upper bound on the segments of one linearised arc or circle (guards huge radii)."""

_HALF_PI = 0.5 * math.pi
_TWO_PI = 2.0 * math.pi


def arc_segments(radius_mm: float, sweep_rad: float) -> int:
    """Number of chords needed for an arc of ``radius_mm`` sweeping ``sweep_rad``.

    Parameters
    ----------
    radius_mm : float
        Arc radius (mm).
    sweep_rad : float
        Swept angle (rad, sign ignored).

    Returns
    -------
    int
        At least one chord per quarter turn, and enough chords that the sagitta
        ``r (1 - cos(step / 2))`` stays below :data:`ARC_CHORD_TOLERANCE_MM`.
    """
    sweep = abs(sweep_rad)
    if not math.isfinite(sweep) or not math.isfinite(radius_mm):
        return MAX_ARC_SEGMENTS
    n_quarter = math.ceil(sweep / _HALF_PI - 1e-9)
    if radius_mm <= ARC_CHORD_TOLERANCE_MM:
        n = n_quarter
    else:
        step = 2.0 * math.acos(1.0 - ARC_CHORD_TOLERANCE_MM / radius_mm)
        # A radius so large that the step rounds to zero gets the most chords allowed.
        n = max(n_quarter, math.ceil(sweep / step - 1e-9)) if step > 0.0 else MAX_ARC_SEGMENTS
    return int(min(max(n, 1), MAX_ARC_SEGMENTS))


def arc_points(
    x0: float,
    y0: float,
    x1: float,
    y1: float,
    cx: float,
    cy: float,
    *,
    ccw: bool,
    full_circle: bool,
) -> FloatArray:
    """Linearise a circular arc from ``(x0, y0)`` to ``(x1, y1)`` about ``(cx, cy)``.

    Parameters
    ----------
    x0, y0, x1, y1 : float
        Start and end points (mm).
    cx, cy : float
        Centre (mm).
    ccw : bool
        Counter-clockwise (G03) when true, clockwise (G02) otherwise.
    full_circle : bool
        When start and end coincide, draw a full 360° turn instead of nothing.

    Returns
    -------
    ndarray (k, 2)
        The arc's vertices after the start point, ending exactly at ``(x1, y1)``. When
        the start and end radii differ (rounded coordinates), the radius is interpolated
        linearly along the sweep so that both end points are met.
    """
    r0 = math.hypot(x0 - cx, y0 - cy)
    r1 = math.hypot(x1 - cx, y1 - cy)
    if r0 == 0.0 or r1 == 0.0:
        return np.array([[x1, y1]], dtype=np.float64)
    a0 = math.atan2(y0 - cy, x0 - cx)
    a1 = math.atan2(y1 - cy, x1 - cx)
    if ccw:
        sweep = (a1 - a0) % _TWO_PI
    else:
        sweep = -((a0 - a1) % _TWO_PI)
    if abs(sweep) < 1e-12 or abs(abs(sweep) - _TWO_PI) < 1e-12:
        if full_circle:
            sweep = _TWO_PI if ccw else -_TWO_PI
        else:
            return np.array([[x1, y1]], dtype=np.float64)
    n = arc_segments(max(r0, r1), sweep)
    t = np.arange(1, n + 1, dtype=np.float64) / n
    ang = a0 + sweep * t
    rad = r0 + (r1 - r0) * t
    pts = np.empty((n, 2), dtype=np.float64)
    pts[:, 0] = cx + rad * np.cos(ang)
    pts[:, 1] = cy + rad * np.sin(ang)
    pts[-1, 0] = x1
    pts[-1, 1] = y1
    return pts


def _close(pts: FloatArray) -> FloatArray:
    return np.vstack([pts, pts[:1]])


def circle_ring(cx: float, cy: float, radius_mm: float) -> FloatArray:
    """Closed inscribed polygon of a circle (mm), at least 8 sides, CCW."""
    n = max(arc_segments(radius_mm, _TWO_PI), 8)
    ang = np.arange(n, dtype=np.float64) * (_TWO_PI / n)
    pts = np.column_stack([cx + radius_mm * np.cos(ang), cy + radius_mm * np.sin(ang)])
    return _close(pts)


def rect_ring(cx: float, cy: float, width_mm: float, height_mm: float) -> FloatArray:
    """Closed axis-aligned rectangle centred on ``(cx, cy)``, CCW."""
    hw = 0.5 * width_mm
    hh = 0.5 * height_mm
    return np.array(
        [
            [cx - hw, cy - hh],
            [cx + hw, cy - hh],
            [cx + hw, cy + hh],
            [cx - hw, cy + hh],
            [cx - hw, cy - hh],
        ],
        dtype=np.float64,
    )


def segment_rect_ring(x0: float, y0: float, x1: float, y1: float, width_mm: float) -> FloatArray:
    """Closed rectangle of ``width_mm`` around the segment from ``(x0, y0)`` to ``(x1, y1)``.

    Butt ends (the rectangle ends at the segment's end points). Returns an empty
    ``(0, 2)`` array for a zero-length segment or zero width.
    """
    dx = x1 - x0
    dy = y1 - y0
    length = math.hypot(dx, dy)
    if length == 0.0 or width_mm <= 0.0:
        return np.zeros((0, 2), dtype=np.float64)
    nx = -dy / length * 0.5 * width_mm
    ny = dx / length * 0.5 * width_mm
    return np.array(
        [
            [x0 - nx, y0 - ny],
            [x1 - nx, y1 - ny],
            [x1 + nx, y1 + ny],
            [x0 + nx, y0 + ny],
            [x0 - nx, y0 - ny],
        ],
        dtype=np.float64,
    )


def obround_ring(width_mm: float, height_mm: float) -> FloatArray:
    """Closed obround (stadium) centred on the origin, CCW.

    The shorter side sets the diameter of the two semicircular ends; a square obround
    is a circle.
    """
    if width_mm == height_mm:
        return circle_ring(0.0, 0.0, 0.5 * width_mm)
    r = 0.5 * min(width_mm, height_mm)
    n = max(arc_segments(r, math.pi), 4)
    half = np.arange(n + 1, dtype=np.float64) * (math.pi / n)
    if width_mm > height_mm:
        c = 0.5 * width_mm - r
        right = np.column_stack([c + r * np.cos(half - _HALF_PI), r * np.sin(half - _HALF_PI)])
        left = np.column_stack([-c + r * np.cos(half + _HALF_PI), r * np.sin(half + _HALF_PI)])
    else:
        c = 0.5 * height_mm - r
        right = np.column_stack([r * np.cos(half), c + r * np.sin(half)])
        left = np.column_stack([r * np.cos(half + math.pi), -c + r * np.sin(half + math.pi)])
    return _close(np.vstack([right, left]))


def polygon_ring(
    cx: float, cy: float, diameter_mm: float, n_vertices: int, rotation_deg: float
) -> FloatArray:
    """Closed regular polygon inscribed in a circle of ``diameter_mm``, CCW.

    The first vertex lies at ``rotation_deg`` from the positive X axis, seen from the
    centre.
    """
    r = 0.5 * diameter_mm
    ang = math.radians(rotation_deg) + np.arange(n_vertices, dtype=np.float64) * (
        _TWO_PI / n_vertices
    )
    pts = np.column_stack([cx + r * np.cos(ang), cy + r * np.sin(ang)])
    return _close(pts)


def _arc_between(r: float, a0: float, a1: float) -> FloatArray:
    """Points on a circle of radius ``r`` about the origin from angle a0 to a1 (incl.)."""
    n = max(arc_segments(r, a1 - a0), 1)
    ang = a0 + (a1 - a0) * np.arange(n + 1, dtype=np.float64) / n
    return np.column_stack([r * np.cos(ang), r * np.sin(ang)])


def annulus_parts(cx: float, cy: float, outer_d_mm: float, inner_d_mm: float) -> list[FloatArray]:
    """An annulus as two simple closed half-rings (upper and lower), CCW.

    Used where a hole cannot be expressed as a clear part (it would also erase earlier
    primitives of the same macro). An inner diameter of 0 gives one full circle.
    """
    ro = 0.5 * outer_d_mm
    ri = 0.5 * inner_d_mm
    if ro <= 0.0 or ri >= ro:
        return []
    if ri <= 0.0:
        return [circle_ring(cx, cy, ro)]
    rings = []
    for a0 in (0.0, math.pi):
        outer = _arc_between(ro, a0, a0 + math.pi)
        inner = _arc_between(ri, a0 + math.pi, a0)
        ring = _close(np.vstack([outer, inner]))
        ring[:, 0] += cx
        ring[:, 1] += cy
        rings.append(ring)
    return rings


def thermal_rings(
    cx: float, cy: float, outer_d_mm: float, inner_d_mm: float, gap_mm: float
) -> list[FloatArray]:
    """The four dark pieces of a thermal (annulus cut by a cross of width ``gap_mm``).

    Returns up to four simple closed rings (CCW), one per quadrant, centred on
    ``(cx, cy)`` and not yet rotated. The cross is aligned with the axes.
    """
    ro = 0.5 * outer_d_mm
    ri = max(0.5 * inner_d_mm, 0.0)
    h = 0.5 * max(gap_mm, 0.0)
    if ro <= 0.0 or ri >= ro or h * math.sqrt(2.0) >= ro:
        return []
    # First quadrant piece: x >= h, y >= h, ri <= r <= ro.
    a_lo = math.asin(h / ro)
    a_hi = _HALF_PI - a_lo
    outer = _arc_between(ro, a_lo, a_hi)
    if h * math.sqrt(2.0) >= ri:
        inner = np.array([[h, h]], dtype=np.float64)
    else:
        b_lo = math.asin(h / ri)
        inner = _arc_between(ri, _HALF_PI - b_lo, b_lo)
    piece = np.vstack([outer, inner])
    rings = []
    for k in range(4):
        a = k * _HALF_PI
        c = math.cos(a)
        s = math.sin(a)
        rot = np.column_stack(
            [c * piece[:, 0] - s * piece[:, 1] + cx, s * piece[:, 0] + c * piece[:, 1] + cy]
        )
        rings.append(_close(rot))
    return rings


@dataclass(frozen=True)
class Transform:
    """A similarity about the origin: ``p -> scale * R(rotation_deg) * Mx^mirror_x * p``.

    ``Mx`` negates x. Gerber's LM/LR/LS (spec rev 2023.08 sections 4.9.3-4.9.5) map onto
    it as mirror first, then rotate, then scale (order per section 4.9.1, from memory);
    LMX negates x, LMY (negate y) is ``R(180°) Mx`` and LMXY is ``R(180°)``.
    """

    mirror_x: bool = False
    rotation_deg: float = 0.0
    scale: float = 1.0

    @staticmethod
    def from_gerber(mirror: str, rotation_deg: float, scale: float) -> Transform:
        """Build from the LM value (``"N"``, ``"X"``, ``"Y"``, ``"XY"``), LR and LS."""
        mx = mirror in ("X", "Y")
        extra = 180.0 if mirror in ("Y", "XY") else 0.0
        return Transform(mx, (rotation_deg + extra) % 360.0, scale)

    @property
    def is_identity(self) -> bool:
        """True when the transform leaves every point in place."""
        return not self.mirror_x and self.rotation_deg == 0.0 and self.scale == 1.0

    def key(self) -> tuple[bool, float, float]:
        """Hashable, rounded identity of the transform (for caches)."""
        rot = round(self.rotation_deg % 360.0, 9) % 360.0
        return (self.mirror_x, rot, round(self.scale, 12))

    def compose(self, inner: Transform) -> Transform:
        """Return ``self ∘ inner`` (apply ``inner`` first)."""
        rot = self.rotation_deg + (-inner.rotation_deg if self.mirror_x else inner.rotation_deg)
        return Transform(self.mirror_x != inner.mirror_x, rot % 360.0, self.scale * inner.scale)

    def matrix(self) -> FloatArray:
        """The 2×2 linear map (acts on column vectors)."""
        a = math.radians(self.rotation_deg)
        c = math.cos(a)
        s = math.sin(a)
        # Snap exact quarter turns so that 90° rotations stay exact.
        for v in (-1.0, 0.0, 1.0):
            if abs(c - v) < 1e-15:
                c = v
            if abs(s - v) < 1e-15:
                s = v
        m = np.array([[c, -s], [s, c]], dtype=np.float64) * self.scale
        if self.mirror_x:
            m[:, 0] = -m[:, 0]
        return m

    def apply(self, pts: FloatArray) -> FloatArray:
        """Transform an ``(n, 2)`` array of points (mm)."""
        if self.is_identity:
            return pts
        return pts @ self.matrix().T


IDENTITY = Transform()
"""The identity transform."""
