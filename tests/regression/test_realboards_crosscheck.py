"""Copper coverage under real inductors, cross-checked by an independent rasterizer.

For two layers under one magnetic of every shared real board, the fraction of the zone
covered by copper (``copper_coverage``, from ``fluxshadow``'s own Gerber reader and shapely
composition) is measured again from pixels:

- outside source for the artwork: **gerbonara 1.5** (an independent Gerber reader) parses
  the file and expands apertures, aperture macros, regions with arcs, units and polarity
  into primitives (``GraphicObject.to_primitives``);
- outside source for the area: **matplotlib's Agg rasterizer** fills those primitives in file
  order (dark white, clear black) with anti-aliasing at 20 px/mm, so every pixel holds its
  covered fraction and the measured area does not depend on the pixel size (the same
  windows at 40 px/mm agree to 0.001);
- the zone polygon is sampled at the pixel centres.

Primitives are outlined here by their definitions (circle, stroked line and arc with round
ends, rotated rectangle, polygon with arc edges approximated to 1 um), not with gerbonara's
``to_arc_poly``: in gerbonara 1.5 that method turns a line's round ends inwards and returns
a rotated rectangle's bounding box, which showed up as 1-2 % too little copper before the
outlines were written out (found in the hand check recorded in
``tests/regression/realboards/*.json``). Over all 128 magnetic/layer pairs of the seven
boards the two routes agreed within 0.005; 0.01 is allowed here.
"""

from __future__ import annotations

import itertools
import math
import warnings
from collections.abc import Callable, Iterator
from pathlib import Path
from typing import Any

import numpy as np
import numpy.typing as npt
import pytest
import shapely
from gerbonara import GerberFile  # type: ignore[import-untyped]
from gerbonara.graphic_primitives import (  # type: ignore[import-untyped]
    Arc,
    ArcPoly,
    Circle,
    Line,
    Rectangle,
    approximate_arc,
)
from gerbonara.utils import MM  # type: ignore[import-untyped]
from matplotlib.backends.backend_agg import FigureCanvasAgg
from matplotlib.figure import Figure
from matplotlib.patches import PathPatch
from matplotlib.path import Path as MPath

import fluxshadow
from fluxshadow.checks.analysis import analyse_magnetic
from fluxshadow.checks.settings import Settings

pytestmark = pytest.mark.realboards

PX_PER_MM = 20
TOLERANCE = 0.01
_ARC_ERROR_MM = 0.001
_N_CIRCLE = 64

# board -> (magnetic, two layers): layers with partial coverage, mixed dialects (inch and
# mm, clear-polarity cut-outs, aperture macros, arcs in regions, bottom-side parts).
CASES: dict[str, tuple[str, tuple[str, str]]] = {
    "bq25798-mppt-v2.1": ("L1", ("L1", "L2")),
    "cheap-focer-2": ("L1", ("L1", "L2")),
    "huvud-tiny2": ("L1", ("L1", "L3")),
    "incunest-motherboard": ("L2", ("L1", "L4")),
    "limesdr-xtrx-1v1": ("L2", ("L3", "L6")),
    "pycubed-mainboard-v05": ("L3", ("L1", "L3")),
    "thunderscope-rev5.3": ("L5", ("L4", "L6")),
}

Outline = npt.NDArray[np.float64]

# A 2 x 1 mm rectangle rotated 30 degrees (macro primitive 21) at (2, 2), a 1.0 mm round
# flash at (6, 2) and a 0.5 mm track from (1, 5) to (4, 5) (Gerber Layer Format
# Specification rev 2023.08, sections 4.5 and 4.2).
SHAPES_GERBER = """%FSLAX46Y46*%
%MOMM*%
%AMROT*21,1,2.0,1.0,0,0,30*%
%ADD10ROT*%
%ADD11C,1.0*%
%ADD12C,0.5*%
%LPD*%
D10*
X2000000Y2000000D03*
D11*
X6000000Y2000000D03*
D12*
X1000000Y5000000D02*
X4000000Y5000000D01*
M02*
"""


def _disc(x: float, y: float, r: float) -> Outline:
    t = np.linspace(0.0, 2.0 * np.pi, _N_CIRCLE, endpoint=False)
    return np.column_stack([x + r * np.cos(t), y + r * np.sin(t)])


def _capsule(x1: float, y1: float, x2: float, y2: float, r: float) -> Outline:
    """A segment stroked with round ends (a circle aperture drawn from 1 to 2)."""
    a = math.atan2(y2 - y1, x2 - x1)
    t = np.linspace(-np.pi / 2, np.pi / 2, _N_CIRCLE // 2 + 1)
    end = np.column_stack([x2 + r * np.cos(a + t), y2 + r * np.sin(a + t)])
    start = np.column_stack([x1 + r * np.cos(a + np.pi + t), y1 + r * np.sin(a + np.pi + t)])
    return np.vstack([end, start])


def _arc_points(
    cx: float, cy: float, x1: float, y1: float, x2: float, y2: float, cw: bool
) -> list[tuple[float, float]]:
    return [
        (float(x), float(y))
        for x, y in approximate_arc(cx, cy, x1, y1, x2, y2, cw, max_error=_ARC_ERROR_MM)
    ]


def outlines(prim: Any) -> Iterator[Outline]:
    """Closed outlines (mm) whose union is one gerbonara primitive."""
    if isinstance(prim, Circle):
        yield _disc(prim.x, prim.y, prim.r)
    elif isinstance(prim, Line):
        yield _capsule(prim.x1, prim.y1, prim.x2, prim.y2, prim.width / 2)
    elif isinstance(prim, Arc):
        pts = _arc_points(prim.cx, prim.cy, prim.x1, prim.y1, prim.x2, prim.y2, prim.clockwise)
        if len(pts) < 2:
            yield _disc(prim.x1, prim.y1, prim.width / 2)
        for p, q in itertools.pairwise(pts):
            yield _capsule(*p, *q, prim.width / 2)
    elif isinstance(prim, Rectangle):
        c, s = math.cos(prim.rotation), math.sin(prim.rotation)
        k = np.array([(-1.0, -1.0), (1.0, -1.0), (1.0, 1.0), (-1.0, 1.0)]) * (prim.w, prim.h) / 2
        yield np.column_stack(
            [prim.x + c * k[:, 0] - s * k[:, 1], prim.y + s * k[:, 0] + c * k[:, 1]]
        )
    elif isinstance(prim, ArcPoly):
        poly: list[tuple[float, float]] = []
        for (x1, y1), (x2, y2), (cw, (cx, cy)) in prim.segments:
            if cw is None:
                poly.append((x1, y1))
            else:
                poly.extend(_arc_points(cx, cy, x1, y1, x2, y2, cw)[:-1])
        if len(poly) >= 3:
            yield np.asarray(poly, dtype=np.float64)
    else:
        raise TypeError(f"unexpected gerbonara primitive {type(prim).__name__}")


def raster_copper(path: Path, window: tuple[float, float, float, float]) -> Outline:
    """Covered fraction of every pixel of ``window`` (mm), shape (rows, cols), row 0 at top."""
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", DeprecationWarning)  # G70/G71 in the inch files
        gerber = GerberFile.open(path)
    x0, y0, x1, y1 = window
    cols, rows = round((x1 - x0) * PX_PER_MM), round((y1 - y0) * PX_PER_MM)
    fig = Figure(figsize=(cols / 100, rows / 100), dpi=100)
    canvas = FigureCanvasAgg(fig)
    ax = fig.add_axes((0.0, 0.0, 1.0, 1.0))
    ax.set_xlim(x0, x1)
    ax.set_ylim(y0, y1)
    ax.axis("off")
    fig.patch.set_facecolor("black")
    for obj in gerber.objects:
        (bx0, by0), (bx1, by1) = obj.bounding_box(MM)
        if bx1 < x0 or bx0 > x1 or by1 < y0 or by0 > y1:
            continue
        for prim in obj.to_primitives(MM):
            colour = "white" if prim.polarity_dark else "black"
            for ring in outlines(prim):
                edge = MPath(np.vstack([ring, ring[:1]]), closed=True)
                ax.add_patch(PathPatch(edge, lw=0, ec="none", fc=colour, antialiased=True))
    canvas.draw()  # type: ignore[no-untyped-call]
    rgba = np.asarray(canvas.buffer_rgba())  # type: ignore[no-untyped-call]
    image: Outline = rgba[:, :, 0].astype(np.float64) / 255.0
    assert image.shape == (rows, cols)
    return image


def zone_pixels(
    zone: shapely.Geometry, window: tuple[float, float, float, float], shape: tuple[int, ...]
) -> npt.NDArray[np.bool_]:
    """Pixels of ``window`` whose centre lies in ``zone``."""
    x0, y0, x1, y1 = window
    rows, cols = shape
    xs = x0 + (np.arange(cols) + 0.5) * (x1 - x0) / cols
    ys = y1 - (np.arange(rows) + 0.5) * (y1 - y0) / rows
    gx, gy = np.meshgrid(xs, ys)
    return np.asarray(shapely.contains_xy(zone, gx, gy), dtype=bool)


def test_rasterizer_areas_of_known_shapes(tmp_path: Path) -> None:
    # Exact areas by hand: 2 x 1; pi 0.5^2; 3 x 0.5 + pi 0.25^2 (a track with round ends).
    # The rectangle's bounding box (what gerbonara's to_arc_poly gives) would be 4.17 mm^2.
    path = tmp_path / "shapes.gbr"
    path.write_text(SHAPES_GERBER)
    window = (0.0, 0.0, 8.0, 6.0)
    image = raster_copper(path, window)
    boxes = {
        "rotated rectangle": ((0.5, 0.5, 3.5, 3.5), 2.0),
        "flash": ((5.0, 1.0, 7.0, 3.0), math.pi * 0.25),
        "track": ((0.5, 4.5, 4.5, 5.5), 1.5 + math.pi * 0.0625),
    }
    for what, (box, area) in boxes.items():
        mask = zone_pixels(shapely.box(*box), window, image.shape)
        measured = float((image * mask).sum()) / PX_PER_MM**2
        assert measured == pytest.approx(area, rel=0.01), what


@pytest.mark.parametrize("name", sorted(CASES))
def test_copper_coverage_matches_independent_raster(
    realboard: Callable[[str], Path], name: str
) -> None:
    folder = realboard(name)
    ref, layers = CASES[name]
    board = fluxshadow.load_package(folder)
    geo = analyse_magnetic(board, board.magnetic(ref), Settings())
    by_name = {lg.layer.name: lg for lg in geo.layers}
    for layer in layers:
        lg = by_name[layer]
        zx0, zy0, zx1, zy1 = lg.zone.bounds
        window = (zx0 - 0.5, zy0 - 0.5, zx1 + 0.5, zy1 + 0.5)
        image = raster_copper(folder / lg.layer.source, window)
        mask = zone_pixels(lg.zone, window, image.shape)
        raster = float((image * mask).sum() / mask.sum())
        assert raster == pytest.approx(lg.copper_coverage, abs=TOLERANCE), (
            f"{name} {ref} {layer}: fluxshadow {lg.copper_coverage:.4f}, raster {raster:.4f}"
        )
