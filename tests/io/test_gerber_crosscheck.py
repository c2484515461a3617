"""Gerber reader cross-checked against two independent readers on what they handle well.

- gerbonara: flash positions and polarities in file order, straight draw segments,
  arc end points / centres, region areas (computed exactly from its outlines and arc
  centres), and bounding boxes including apertures. It drops step-and-repeat copies,
  R-aperture draws and LM/LR/LS, so the files and snippets used avoid those.
- pygerber 2.4.3: flashes, lines, arcs and region outlines of small files and snippets
  (it mis-reads LM, LR on polygon apertures, thermals, chained macro arithmetic and macro
  polygons in inch files, which are therefore not compared).
"""

from __future__ import annotations

import math
from collections.abc import Callable, Iterator
from pathlib import Path
from typing import Any

import numpy as np
import pytest
from gerbonara import GerberFile
from gerbonara.utils import MM
from shapely.geometry import Polygon

from fluxshadow.io.gerber import ARC_CHORD_TOLERANCE_MM, parse_gerber, read_gerber
from fluxshadow.io.records import FLASH, REGION, TRACK, ArtworkRecord

TOL = ARC_CHORD_TOLERANCE_MM


# ----------------------------------------------------------------------------- helpers


def track_segments(rec: ArtworkRecord) -> np.ndarray:
    """(k, 4) straight segments of all tracks in file order, zero-length ones dropped."""
    out = []
    for i in np.flatnonzero(rec.obj_kind == TRACK):
        r = rec.obj_ring_start[i]
        v = rec.vertices[rec.ring_vertex_start[r] : rec.ring_vertex_start[r + 1]]
        seg = np.hstack([v[:-1], v[1:]])
        out.append(seg[np.any(seg[:, :2] != seg[:, 2:], axis=1)])
    return np.vstack(out) if out else np.zeros((0, 4))


def region_rings(rec: ArtworkRecord) -> Iterator[np.ndarray]:
    for i in np.flatnonzero(rec.obj_kind == REGION):
        for r in range(rec.obj_ring_start[i], rec.obj_ring_start[i + 1]):
            yield rec.vertices[rec.ring_vertex_start[r] : rec.ring_vertex_start[r + 1]]


def our_bbox(rec: ArtworkRecord) -> np.ndarray:
    """[xmin, ymin, xmax, ymax] of the image including aperture shapes (mm)."""
    lo = np.full(2, np.inf)
    hi = np.full(2, -np.inf)
    ext = []
    for a in rec.apertures:
        if a.circle_diameter_mm is not None:
            r = 0.5 * a.circle_diameter_mm
            ext.append((np.array([-r, -r]), np.array([r, r])))
        elif a.parts:
            allp = np.vstack([p for _d, p in a.parts])
            ext.append((allp.min(axis=0), allp.max(axis=0)))
        else:
            ext.append((np.zeros(2), np.zeros(2)))
    for i in range(rec.n_objects):
        k = rec.obj_kind[i]
        if k == FLASH:
            e_lo, e_hi = ext[rec.obj_aperture[i]]
            lo = np.minimum(lo, rec.obj_xy[i] + e_lo)
            hi = np.maximum(hi, rec.obj_xy[i] + e_hi)
            continue
        r = rec.obj_ring_start[i]
        v = rec.vertices[
            rec.ring_vertex_start[r] : rec.ring_vertex_start[rec.obj_ring_start[i + 1]]
        ]
        e_lo, e_hi = (np.zeros(2), np.zeros(2)) if k == REGION else ext[rec.obj_aperture[i]]
        lo = np.minimum(lo, v.min(axis=0) + e_lo)
        hi = np.maximum(hi, v.max(axis=0) + e_hi)
    return np.concatenate([lo, hi])


def gb_objects(g: GerberFile, name: str) -> list[Any]:
    """gerbonara objects of one type, converted to mm in place."""
    out = []
    for o in g.objects:
        if type(o).__name__ != name:
            continue
        if name == "Region":  # (its convert_to does not work on regions)
            f = o.unit.convert_to(MM, 1.0) if o.unit is not None else 1.0
            o.outline = [(x * f, y * f) for x, y in o.outline]
            o.arc_centers = [
                (a[0], (a[1][0] * f, a[1][1] * f)) if a else None for a in o.arc_centers
            ]
            o.unit = MM
        else:
            o.convert_to(MM)
        out.append(o)
    return out


def exact_region_area(region: Any) -> tuple[float, float]:
    """|area| of a gerbonara region from its outline and arc centres (Green's theorem:
    a straight segment adds (x0 y1 - x1 y0)/2, an arc about c with signed sweep t adds
    (r^2 t + cx (y1 - y0) - cy (x1 - x0)) / 2). Also returns the total arc length."""
    area = 0.0
    arc_len = 0.0
    for (x0, y0), (x1, y1), (cw, (cx, cy)) in region.iter_segments():
        if cx is None:
            area += 0.5 * (x0 * y1 - x1 * y0)
            continue
        r = math.hypot(x0 - cx, y0 - cy)
        a0 = math.atan2(y0 - cy, x0 - cx)
        a1 = math.atan2(y1 - cy, x1 - cx)
        t = -((a0 - a1) % (2 * math.pi)) if cw else (a1 - a0) % (2 * math.pi)
        if t == 0.0:
            t = -2 * math.pi if cw else 2 * math.pi
        area += 0.5 * (r * r * t + cx * (y1 - y0) - cy * (x1 - x0))
        arc_len += abs(t) * r
    return abs(area), arc_len


def compare_with_gerbonara(rec: ArtworkRecord, g: GerberFile, *, bbox: bool = True) -> None:
    # flashes: same positions and polarities, in file order
    flashes = gb_objects(g, "Flash")
    ours = np.flatnonzero(rec.obj_kind == FLASH)
    assert len(flashes) == len(ours)
    np.testing.assert_allclose(
        rec.obj_xy[ours], np.array([(f.x, f.y) for f in flashes]).reshape(-1, 2), atol=1e-9
    )
    assert [bool(f.polarity_dark) for f in flashes] == rec.obj_dark[ours].tolist()
    # straight draws: the same segments in file order (arcs compared separately)
    lines = gb_objects(g, "Line")
    arcs = gb_objects(g, "Arc")
    if not arcs:
        gl = np.array([(o.x1, o.y1, o.x2, o.y2) for o in lines]).reshape(-1, 4)
        gl = gl[np.any(gl[:, :2] != gl[:, 2:], axis=1)]
        np.testing.assert_allclose(track_segments(rec), gl, atol=1e-9)
    else:
        # every arc end point is one of our vertices; our vertices near an arc lie on it
        verts = rec.vertices
        for a in arcs:
            for px, py in ((a.x1, a.y1), (a.x2, a.y2)):
                assert np.min(np.hypot(verts[:, 0] - px, verts[:, 1] - py)) < 1e-9
    # regions: same count and the same total area (within the chord error on arcs)
    regions = gb_objects(g, "Region")
    rings = list(region_rings(rec))
    assert len(rings) == len(regions)
    gb_area = 0.0
    gb_arc = 0.0
    for reg in regions:
        a, length = exact_region_area(reg)
        gb_area += a
        gb_arc += length
    our_area = sum(Polygon(r).area for r in rings)
    assert our_area == pytest.approx(gb_area, rel=1e-9, abs=TOL * gb_arc + 1e-9)
    if bbox:
        (x0, y0), (x1, y1) = g.bounding_box(unit=MM)
        np.testing.assert_allclose(our_bbox(rec), [x0, y0, x1, y1], atol=2 * TOL)


# ----------------------------------------------------------------------------- gerbonara, real


@pytest.mark.realboards
@pytest.mark.parametrize(
    ("board", "rel", "bbox"),
    [
        ("bq25798-mppt-v2.1", "Gerber_TopLayer.GTL", True),
        ("bq25798-mppt-v2.1", "Gerber_BoardOutlineLayer.GKO", True),
        ("huvud-tiny2", "Huvud-In1_Cu.g2", True),
        ("huvud-tiny2", "Huvud-Edge_Cuts.gko", True),
        ("incunest-motherboard", "Motherboard.G1", True),
        ("incunest-motherboard", "Motherboard.GKO", True),
        ("limesdr-xtrx-1v1", "LimeSDR-XTRX_1v1.GM6", True),
        ("pycubed-mainboard-v05", "gerbers/mainboard-Edge_Cuts.gm1", True),
    ],
)
def test_gerbonara_on_real_files(
    realboard: Callable[[str], Path], board: str, rel: str, bbox: bool
) -> None:
    path = realboard(board) / rel
    compare_with_gerbonara(read_gerber(path), GerberFile.open(path), bbox=bbox)


# ----------------------------------------------------------------------------- gerbonara, snippets

SNIPPET_INCH = """G04 inch snippet*
%FSLAX25Y25*%
%MOIN*%
%ADD10C,0.010*%
%ADD11C,0.05X0.02*%
%ADD12O,0.08X0.04*%
%ADD13P,0.1X6X15*%
%AMRECT*21,1,$1,$2,0,0,0*%
%ADD14RECT,0.06X0.03*%
D10*
G01*
X0Y0D02*
X100000Y0D01*
Y50000D01*
X0D01*
G75*
G03X-50000Y100000I0J50000D01*
G02X0Y150000I50000J0D01*
D11*
X20000Y20000D03*
%LPC*%
D12*
X40000Y20000D03*
%LPD*%
D13*
X60000Y20000D03*
D14*
X80000Y20000D03*
G36*
X200000Y0D02*
G01*
X300000Y0D01*
X300000Y100000D01*
G03X200000Y100000I-50000J0D01*
G01*
X200000Y0D01*
X220000Y20000D02*
X240000Y20000D01*
X240000Y40000D01*
X220000Y20000D01*
G37*
M02*
"""


def test_gerbonara_on_inch_snippet_with_arcs_regions_and_macros() -> None:
    rec = parse_gerber(SNIPPET_INCH)
    g = GerberFile.from_string(SNIPPET_INCH)
    compare_with_gerbonara(rec, g, bbox=False)
    # the region's two contours are one REGION object here, two regions there
    assert int(np.count_nonzero(rec.obj_kind == REGION)) == 1
    # arcs: every vertex of the two arc tracks lies on gerbonara's circles
    arcs = gb_objects(g, "Arc")
    assert len(arcs) == 2
    verts = track_segments(rec)
    for a in arcs:
        cx, cy = a.x1 + a.cx, a.y1 + a.cy
        r = math.hypot(a.cx, a.cy)
        d = np.hypot(verts[:, 0] - cx, verts[:, 1] - cy)
        on = np.abs(d - r) < 1e-9
        assert on.sum() >= math.ceil(0.5 * math.pi / (2 * math.acos(1 - TOL / r)))


# ----------------------------------------------------------------------------- pygerber


def _pyg_commands(text: str) -> list[Any]:
    from pygerber.gerberx3.api.v2 import GerberFile as PygFile

    return list(PygFile.from_str(text).parse()._command_buffer)


def _vec(v: Any) -> tuple[float, float]:
    return float(v.x.value), float(v.y.value)


def compare_with_pygerber(rec: ArtworkRecord, cmds: list[Any]) -> None:
    flashes = [_vec(c.flash_point) for c in cmds if type(c).__name__ == "Flash2"]
    ours = np.flatnonzero(rec.obj_kind == FLASH)
    np.testing.assert_allclose(rec.obj_xy[ours], np.array(flashes).reshape(-1, 2), atol=1e-9)
    draws = [c for c in cmds if type(c).__name__ in ("Line2", "CCArc2", "CWArc2")]
    verts = rec.vertices
    segs = track_segments(rec)
    n_lines = 0
    for c in draws:
        s, e = _vec(c.start_point), _vec(c.end_point)
        if type(c).__name__ == "Line2":
            if s != e:
                n_lines += 1
                assert np.any(np.all(np.abs(segs - [*s, *e]) < 1e-9, axis=1))
        else:
            cx, cy = _vec(c.center_point)
            r = math.hypot(s[0] - cx, s[1] - cy)
            d = np.hypot(verts[:, 0] - cx, verts[:, 1] - cy)
            assert np.count_nonzero(np.abs(d - r) < 1e-6) >= 3
    regions = [c for c in cmds if type(c).__name__ == "Region2"]
    assert len(regions) == int(np.count_nonzero(rec.obj_kind == REGION))
    for reg, i in zip(regions, np.flatnonzero(rec.obj_kind == REGION), strict=True):
        inner = [c for c in reg.command_buffer if type(c).__name__ == "Line2"]
        pts = {_vec(c.start_point) for c in inner} | {_vec(c.end_point) for c in inner}
        r0 = rec.obj_ring_start[i]
        mine = rec.vertices[
            rec.ring_vertex_start[r0] : rec.ring_vertex_start[rec.obj_ring_start[i + 1]]
        ]
        for p in pts:
            assert np.min(np.hypot(mine[:, 0] - p[0], mine[:, 1] - p[1])) < 1e-9


SNIPPET_MM = """%FSLAX46Y46*%
%MOMM*%
%ADD10C,0.2*%
%ADD11R,1.2X0.8*%
D10*
G01*
X1000000Y1000000D02*
X5000000Y1000000D01*
X5000000Y3000000D01*
G75*
G02X7000000Y5000000I2000000J0D01*
D11*
X10000000Y10000000D03*
X-2500000Y-1500000D03*
G01*
G36*
X0Y0D02*
X2000000Y0D01*
X2000000Y2000000D01*
X0Y0D01*
G37*
M02*
"""


# pygerber 2.4.3 cannot flash polygon or macro apertures inside this snippet: drop them.
SNIPPET_INCH_PLAIN = SNIPPET_INCH.replace("D13*\nX60000Y20000D03*\n", "").replace(
    "D14*\nX80000Y20000D03*\n", ""
)


@pytest.mark.parametrize("text", [SNIPPET_MM, SNIPPET_INCH_PLAIN], ids=["mm46", "inch25"])
def test_pygerber_on_snippets(text: str) -> None:
    compare_with_pygerber(parse_gerber(text), _pyg_commands(text))


@pytest.mark.realboards
@pytest.mark.parametrize(
    ("board", "rel"),
    [
        ("bq25798-mppt-v2.1", "Gerber_BoardOutlineLayer.GKO"),
        ("huvud-tiny2", "Huvud-Edge_Cuts.gko"),
        ("pycubed-mainboard-v05", "gerbers/mainboard-Edge_Cuts.gm1"),
    ],
)
def test_pygerber_on_small_real_files(
    realboard: Callable[[str], Path], board: str, rel: str
) -> None:
    path = realboard(board) / rel
    text = path.read_text(encoding="utf-8")
    compare_with_pygerber(read_gerber(path), _pyg_commands(text))
