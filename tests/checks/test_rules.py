"""The void-ring rule groups the voids of one copper-free region into one finding."""

from __future__ import annotations

from types import SimpleNamespace
from typing import Any

import shapely

from fluxshadow.checks.analysis import Void
from fluxshadow.checks.model import RingInfo
from fluxshadow.checks.rules import Context, void_ring
from fluxshadow.checks.settings import Settings


def _void(x0: float, area_side: float, ring: RingInfo) -> Void:
    poly = shapely.box(x0, 0.0, x0 + area_side, area_side)
    return Void(polygon=poly, area_mm2=poly.area, to_winding_mm=0.0, ring=ring)


def _geo(voids: list[Void]) -> Any:
    layer = SimpleNamespace(layer=SimpleNamespace(name="L2"), voids=voids)
    return SimpleNamespace(magnetic=SimpleNamespace(kind="inductor", ref="L7"), layers=[layer])


def test_voids_of_one_hole_give_one_finding() -> None:
    """Two voids of the zone on one traced ring (a hole cut in two by a trace, or by the
    zone's edge) are one region: one finding with the area of both; a void on another
    ring keeps its own finding."""
    hole = RingInfo(closed=True, inner_perimeter_mm=20.0, inner_area_mm2=25.0, search_window_mm=8.0)
    other = RingInfo(
        closed=False,
        inner_perimeter_mm=40.0,
        inner_area_mm2=30.0,
        search_window_mm=16.0,
        opened_to="board edge",
    )
    ctx = Context(board=None, settings=Settings())  # type: ignore[arg-type]
    found = void_ring(
        ctx, _geo([_void(0.0, 2.0, hole), _void(5.0, 3.0, hole), _void(10.0, 1.0, other)])
    )
    assert len(found) == 2
    closed = next(f for f in found if f.metrics["closed"])
    assert closed.metrics["void_parts"] == 2
    assert closed.metrics["void_area_mm2"] == 13.0  # 4 + 9 mm²
    assert "13.0 mm² void (in 2 parts within the zone)" in closed.message
    # the finding sits in the larger part (so the sheet figures of that void attach to it)
    assert 5.0 < closed.x_mm < 8.0  # type: ignore[operator]
    opened = next(f for f in found if not f.metrics["closed"])
    assert opened.metrics["void_parts"] == 1
    assert opened.severity == "note"
    assert opened.message.startswith("The void of 1.0 mm² on layer L2")
