"""Standard ODB++ symbols as polygon parts, and shared polygon helpers of the ODB++ reader.

Symbol names and parameters follow the ODB++ Format Specification's standard-symbol table
(from memory): ``r<d>``, ``s<s>``, ``rect<w>x<h>[xr<r>|xc<c>][<corners>]``,
``oval<w>x<h>``, ``donut_r<od>x<id>``, ``donut_s<od>x<id>``,
``donut_rc<w>x<h>x<lw>[xr<r>[<corners>]]``. Sizes are in the file's small unit (um in mm
files, mil in inch files) and are scaled by the caller.
"""

from __future__ import annotations

import math
import re

import numpy as np
import numpy.typing as npt
import shapely
from shapely.geometry import MultiLineString, Polygon
from shapely.geometry.base import BaseGeometry
from shapely.ops import split

from fluxshadow.io._gerber_geom import arc_segments, circle_ring, obround_ring, rect_ring

__all__ = [
    "STANDARD_PREFIXES",
    "closed",
    "hole_free_rings",
    "looks_standard",
    "polygons",
    "standard_symbol",
]

FloatArray = npt.NDArray[np.float64]

STANDARD_PREFIXES = frozenset(
    {
        "r", "s", "rect", "oval", "di", "oct", "donut_r", "donut_s", "donut_rc", "donut_sr",
        "donut_o", "hex_l", "hex_s", "bfr", "bfs", "tri", "oval_h", "thr", "ths", "s_ths",
        "s_tho", "s_thr", "sr_ths", "rc_ths", "rc_tho", "el", "moire", "hole", "null",
        "cross", "dogbone", "d_pie", "home_plate", "inv_home_plate", "flat_home_plate",
        "radhome_plate", "star", "rect_donut", "oblong_ths", "sq_ths",
    }
)  # fmt: skip
"""Name families of the standard symbol table (from memory), drawn or not."""

_PREFIX = re.compile(r"([a-z_]+?)_?\d")


def _rounded_rect(w: float, h: float, r: float, corners: str) -> FloatArray:
    """Closed CCW rectangle centred on the origin with corners ``corners`` rounded by r.

    Corner numbers (from memory): 1 top right, 2 top left, 3 bottom left, 4 bottom right.
    """
    hw, hh = 0.5 * w, 0.5 * h
    r = min(max(r, 0.0), hw, hh)
    pts: list[FloatArray] = []
    for k, (sx, sy, a0) in enumerate(
        ((1.0, 1.0, 0.0), (-1.0, 1.0, 90.0), (-1.0, -1.0, 180.0), (1.0, -1.0, 270.0)), start=1
    ):
        if r > 0.0 and str(k) in corners:
            n = max(arc_segments(r, 0.5 * math.pi), 2)
            ang = np.radians(a0 + 90.0 * np.arange(n + 1) / n)
            cx, cy = sx * (hw - r), sy * (hh - r)
            pts.append(np.column_stack([cx + r * np.cos(ang), cy + r * np.sin(ang)]))
        else:
            pts.append(np.array([[sx * hw, sy * hh]], dtype=np.float64))
    ring = np.vstack(pts)
    return np.vstack([ring, ring[:1]])


_NUM = r"(\d+(?:\.\d*)?|\.\d+)"
_RE_R = re.compile(rf"r{_NUM}")
_RE_S = re.compile(rf"s{_NUM}")
_RE_RECT = re.compile(rf"rect{_NUM}x{_NUM}(?:x([rc]){_NUM}(?:x?(\d+))?)?")
_RE_OVAL = re.compile(rf"oval{_NUM}x{_NUM}")
_RE_DONUT_R = re.compile(rf"donut_r{_NUM}x{_NUM}")
_RE_DONUT_S = re.compile(rf"donut_s{_NUM}x{_NUM}")
_RE_DONUT_RC = re.compile(rf"donut_rc{_NUM}x{_NUM}x{_NUM}(?:xr{_NUM}(?:x?(\d+))?)?")


def _chamfer_rect(w: float, h: float, c: float, corners: str) -> FloatArray:
    hw, hh = 0.5 * w, 0.5 * h
    c = min(max(c, 0.0), hw, hh)
    pts: list[tuple[float, float]] = []
    for k, (sx, sy) in enumerate(((1.0, 1.0), (-1.0, 1.0), (-1.0, -1.0), (1.0, -1.0)), start=1):
        if c > 0.0 and str(k) in corners:
            # CCW walk: arriving along the vertical (k odd) or horizontal edge.
            first = (sx * hw, sy * (hh - c)) if sx * sy > 0 else (sx * (hw - c), sy * hh)
            second = (sx * (hw - c), sy * hh) if sx * sy > 0 else (sx * hw, sy * (hh - c))
            pts += [first, second]
        else:
            pts.append((sx * hw, sy * hh))
    pts.append(pts[0])
    return np.array(pts, dtype=np.float64)


def standard_symbol(
    name: str, scale: float
) -> tuple[str, list[tuple[bool, FloatArray]], float | None] | None:
    """Shape of a standard ODB++ symbol, or None when the name is not one we draw.

    Parameters
    ----------
    name : str
        Symbol name, e.g. ``"r254"``, ``"rect1500x1600xr375"``.
    scale : float
        mm per size unit (0.001 for um, 0.0254 for mil).

    Returns
    -------
    (template, parts, circle_diameter_mm) or None
        Parts are closed rings (mm) around the origin, ``(dark, ring)``.
    """
    if m := _RE_R.fullmatch(name):
        d = float(m[1]) * scale
        return "C", [(True, circle_ring(0.0, 0.0, 0.5 * d))], d
    if m := _RE_S.fullmatch(name):
        s = float(m[1]) * scale
        return "R", [(True, rect_ring(0.0, 0.0, s, s))], None
    if m := _RE_RECT.fullmatch(name):
        w, h = float(m[1]) * scale, float(m[2]) * scale
        if m[3] is None:
            return "R", [(True, rect_ring(0.0, 0.0, w, h))], None
        corners = m[5] or "1234"
        rr = float(m[4]) * scale
        ring = _rounded_rect(w, h, rr, corners) if m[3] == "r" else _chamfer_rect(w, h, rr, corners)
        return "P", [(True, ring)], None
    if m := _RE_OVAL.fullmatch(name):
        w, h = float(m[1]) * scale, float(m[2]) * scale
        return "O", [(True, obround_ring(w, h))], None
    if m := _RE_DONUT_R.fullmatch(name):
        od, idia = float(m[1]) * scale, float(m[2]) * scale
        parts = [(True, circle_ring(0.0, 0.0, 0.5 * od))]
        if idia > 0.0:
            parts.append((False, circle_ring(0.0, 0.0, 0.5 * idia)))
        return "donut_r", parts, None
    if m := _RE_DONUT_S.fullmatch(name):
        od, idia = float(m[1]) * scale, float(m[2]) * scale
        parts = [(True, rect_ring(0.0, 0.0, od, od))]
        if idia > 0.0:
            parts.append((False, rect_ring(0.0, 0.0, idia, idia)))
        return "donut_s", parts, None
    if m := _RE_DONUT_RC.fullmatch(name):
        w, h, lw = float(m[1]) * scale, float(m[2]) * scale, float(m[3]) * scale
        rr = float(m[4]) * scale if m[4] else 0.0
        corners = m[5] or "1234"
        parts = [(True, _rounded_rect(w, h, rr, corners))]
        if w > 2 * lw and h > 2 * lw:
            parts.append((False, _rounded_rect(w - 2 * lw, h - 2 * lw, rr - lw, corners)))
        return "donut_rc", parts, None
    return None


def looks_standard(name: str) -> bool:
    """True when ``name`` belongs to a standard symbol family (drawn here or not)."""
    m = _PREFIX.match(name.lower())
    return m is not None and (m[1] in STANDARD_PREFIXES or m[1].rstrip("_") in STANDARD_PREFIXES)


def polygons(geom: BaseGeometry) -> list[Polygon]:
    """Non-empty polygons of ``geom``."""
    return [g for g in shapely.get_parts(geom) if isinstance(g, Polygon) and not g.is_empty]


def closed(ring: FloatArray) -> FloatArray:
    """``ring`` with its first vertex repeated at the end (unchanged when already so)."""
    if len(ring) and not np.array_equal(ring[0], ring[-1]):
        return np.vstack([ring, ring[:1]])
    return ring


def hole_free_rings(poly: Polygon) -> list[FloatArray]:
    """Closed rings of hole-free pieces whose union is ``poly`` (mm)."""
    if not poly.interiors:
        return [np.asarray(poly.exterior.coords, dtype=np.float64)]
    ymin, ymax = poly.bounds[1] - 1.0, poly.bounds[3] + 1.0
    xs = sorted({0.5 * (h.bounds[0] + h.bounds[2]) for h in poly.interiors})
    cutter = MultiLineString([[(x, ymin), (x, ymax)] for x in xs])
    out: list[FloatArray] = []
    for piece in polygons(split(poly, cutter)):
        if piece.interiors:  # cannot happen for a valid polygon; triangulate to be safe
            for tri in polygons(shapely.constrained_delaunay_triangles(piece)):
                out.append(np.asarray(tri.exterior.coords, dtype=np.float64))
        else:
            out.append(np.asarray(piece.exterior.coords, dtype=np.float64))
    return out
