"""Small synthetic boards, each isolating one situation, with the findings they must give.

Every case is a fictional 30 x 30 mm four-layer board with one power inductor ``L1``
(4 x 4 mm body, pads 1 x 3 mm at +-1.5 mm) centred at (15, 15), and an :class:`Expected`
record of what ``fluxshadow check`` must report for it. The expected values are worked out
BY HAND from the description (not by running the checks); the comments next to each value
say how.

Common hand-computation facts (see ``docs/rules.md``, "The zone"):

- stack-up: 35 um copper, dielectric gaps 0.165 / 1.065 / 0.165 mm, so the layer tops lie
  at depths 0, 0.2, 1.3 and 1.5 mm below the top surface (0.035 + 0.165 = 0.2;
  0.2 + 0.035 + 1.065 = 1.3; 1.3 + 0.035 + 0.165 = 1.5), and, seen from the bottom
  surface, the layer bottoms lie at 1.5, 1.3, 0.2 and 0 mm (the stack is symmetric);
- zone margin = 0.5 + 1.0 x depth: 0.5, 0.7, 1.8 and 2.0 mm, so the 4 x 4 mm body gives
  square zones of side 5.0, 5.4, 7.6 and 8.0 mm, areas 25, 29.16, 57.76 and 64 mm^2,
  spanning 12.5..17.5, 12.3..17.7, 11.2..18.8 and 11..19 mm on both axes;
- the body's pads (plane copper on the mounting layer, being wider than the 0.5 mm
  opening) cover 13..14 and 16..17 mm in x, 13.5..16.5 mm in y: 2 x 1 x 3 = 6 mm^2;
- planes are drawn 0.5 mm inside the board edge, (0.5, 0.5)..(29.5, 29.5).
"""

from __future__ import annotations

import math
from collections.abc import Mapping
from dataclasses import dataclass, field
from typing import Literal

from fluxshadow.synth.model import (
    Aperture,
    CopperLayer,
    Feature,
    Flash,
    Hole,
    Part,
    Region,
    SynthBoard,
    Track,
)

__all__ = ["CASE_DEPTHS_MM", "Expected", "SynthCase", "synthetic_cases", "zone_side_mm"]

Side = Literal["top", "bottom"]
Key = tuple[str, str]
"""``(ref, layer)``."""

CASE_DEPTHS_MM = (0.0, 0.2, 1.3, 1.5)
"""Depth of each copper layer below the top surface in every case (mm)."""

_BODY_MM = 4.0
_CX, _CY = 15.0, 15.0
_W = 30.0
_PADS_MM2 = 6.0
_ZONE_MARGIN_MM = 0.5
_ZONE_SPREAD = 1.0
_ANTIPAD_MM = 0.9
_VIA_PAD_MM = 0.6


def zone_side_mm(depth_mm: float, body_mm: float = _BODY_MM) -> float:
    """Side of the square zone of a square body at a depth (mm), default thresholds.

    Parameters
    ----------
    depth_mm : float
        Depth of the layer below the mounting surface (mm).
    body_mm : float
        Side of the square body (mm).

    Returns
    -------
    float
        ``body + 2 * (0.5 + 1.0 * depth)`` (mm), as in ``docs/rules.md``.
    """
    return body_mm + 2.0 * (_ZONE_MARGIN_MM + _ZONE_SPREAD * depth_mm)


def _zone_area(layer: int) -> float:
    """Zone area (mm^2) on layer ``layer`` (1-based) for the top-side part."""
    return zone_side_mm(CASE_DEPTHS_MM[layer - 1]) ** 2


@dataclass(frozen=True, kw_only=True)
class Expected:
    """What the checks must report for a case (all values computed by hand).

    Attributes
    ----------
    findings : frozenset of (rule, ref, layer)
        Exactly the non-``assumption`` findings; ``layer`` is ``""`` for
        ``through-cutout``.
    coverage : mapping of (ref, layer) to float
        Fraction of the zone covered by plane copper.
    plane_around : mapping of (ref, layer) to bool
        Whether the layer carries a plane around the zone.
    void_area_mm2 : mapping of (ref, layer) to float
        Zone area without plane copper on plane layers (mm^2).
    ring_closed : mapping of (ref, layer) to bool
        Ring verdict of the largest void of the layer.
    ring_inner_area_mm2 : mapping of (ref, layer) to float
        Area of the copper-free region around that void, when known exactly (mm^2).
    exposed : mapping of (ref, layer) to (net, exposed mm, in-zone mm, return layer)
        The exposed trace of a layer: its net, its centre-line length outside the shadow
        of the planes above and inside the zone (mm), and the layer of its return plane.
    cutout_area_mm2 : mapping of ref to float
        Board material removed in the body zone (mm^2).
    depth_mm : mapping of (ref, layer) to float
        Depth of the layer measured from the part's mounting surface (mm).
    assumptions_for : tuple of str
        Refs that must have at least one ``assumption`` finding.
    """

    findings: frozenset[tuple[str, str, str]]
    coverage: Mapping[Key, float] = field(default_factory=dict)
    plane_around: Mapping[Key, bool] = field(default_factory=dict)
    void_area_mm2: Mapping[Key, float] = field(default_factory=dict)
    ring_closed: Mapping[Key, bool] = field(default_factory=dict)
    ring_inner_area_mm2: Mapping[Key, float] = field(default_factory=dict)
    exposed: Mapping[Key, tuple[str, float, float, str]] = field(default_factory=dict)
    cutout_area_mm2: Mapping[str, float] = field(default_factory=dict)
    depth_mm: Mapping[Key, float] = field(default_factory=dict)
    assumptions_for: tuple[str, ...] = ("L1",)


@dataclass(frozen=True, kw_only=True)
class SynthCase:
    """A synthetic board with the findings it must give."""

    name: str
    summary: str
    board: SynthBoard
    expected: Expected


# ----------------------------------------------------------------------------- builders


def _rect(x0: float, y0: float, x1: float, y1: float) -> tuple[tuple[float, float], ...]:
    return ((x0, y0), (x1, y0), (x1, y1), (x0, y1))


def _plane(net: str) -> Region:
    return Region(_rect(0.5, 0.5, _W - 0.5, _W - 0.5), net=net)


def _clear(x0: float, y0: float, x1: float, y1: float) -> Region:
    return Region(_rect(x0, y0, x1, y1), dark=False)


def _inductor(side: Side = "top") -> Part:
    return Part(
        "L1",
        "2.2uH",
        "IND_4.0x4.0mm",
        _CX,
        _CY,
        0.0,
        side,
        ((-1.5, 0.0, 1.0, 3.0), (1.5, 0.0, 1.0, 3.0)),
        "power inductor, shielded, 4 x 4 mm",
    )


def _others(side: Side = "top") -> tuple[Part, ...]:
    """A regulator and its two capacitors, their pads at y 23.4..26.6 mm: outside every
    zone and its plane ring (the widest zone ends at y = 19 mm, its ring at y = 21 mm)."""
    return (
        Part(
            "U1",
            "QX2201",
            "SOT-23-6",
            15.0,
            25.0,
            0.0,
            side,
            (
                (-0.95, -1.1, 0.6, 1.0),
                (0.0, -1.1, 0.6, 1.0),
                (0.95, -1.1, 0.6, 1.0),
                (-0.95, 1.1, 0.6, 1.0),
                (0.0, 1.1, 0.6, 1.0),
                (0.95, 1.1, 0.6, 1.0),
            ),
            "step-down regulator (fictional)",
        ),
        Part(
            "C1",
            "10uF",
            "C_0805",
            8.0,
            25.0,
            0.0,
            side,
            ((-0.95, 0.0, 1.0, 1.3), (0.95, 0.0, 1.0, 1.3)),
        ),
        Part(
            "C2",
            "22uF",
            "C_0805",
            22.0,
            25.0,
            0.0,
            side,
            ((-0.95, 0.0, 1.0, 1.3), (0.95, 0.0, 1.0, 1.3)),
        ),
    )


def _board(
    name: str,
    layers: tuple[tuple[Feature, ...], ...],
    *,
    side: Side = "top",
    holes: tuple[Hole, ...] = (),
    cutouts: tuple[tuple[tuple[float, float], ...], ...] = (),
) -> SynthBoard:
    return SynthBoard(
        name=name,
        width_mm=_W,
        height_mm=_W,
        layers=tuple(CopperLayer(f) for f in layers),
        parts=(_inductor(side), *_others(side)),
        holes=holes,
        cutouts=cutouts,
        copper_mm=(0.035, 0.035, 0.035, 0.035),
        dielectric_mm=(0.165, 1.065, 0.165),
    )


def _key(layer: int) -> Key:
    return ("L1", f"L{layer}")


def _solid_coverage(**over: float) -> dict[Key, float]:
    """Coverage of the standard stack: pads only on L1 (6 / 25), full planes below."""
    cov = {_key(1): _PADS_MM2 / _zone_area(1), _key(2): 1.0, _key(3): 1.0, _key(4): 1.0}
    for layer, value in over.items():
        cov[("L1", layer)] = value
    return cov


_PLANES_AROUND = {_key(1): False, _key(2): True, _key(3): True, _key(4): True}

_VOID_3X3 = (13.5, 13.5, 16.5, 16.5)
"""A 3 x 3 mm keep-out under the body centre: 9 mm^2."""

_SIGNAL_TRACE = Track(((15.0, 3.0), (15.0, 27.0)), 0.2, net="ADC_IN")
"""A vertical 0.2 mm trace at x = 15 mm (between the pads), crossing every zone."""


# ----------------------------------------------------------------------------- the cases


def _solid() -> SynthCase:
    board = _board("case-solid", ((), (_plane("GND"),), (_plane("VCC_3V3"),), (_plane("GND"),)))
    return SynthCase(
        name="solid",
        summary="solid planes on L2, L3 and L4: no geometry finding at all",
        board=board,
        expected=Expected(
            findings=frozenset(),
            coverage=_solid_coverage(),
            plane_around=_PLANES_AROUND,
            void_area_mm2={_key(2): 0.0, _key(3): 0.0, _key(4): 0.0},
            depth_mm={_key(k): CASE_DEPTHS_MM[k - 1] for k in range(1, 5)},
        ),
    )


def _enclosed() -> SynthCase:
    l2 = (_plane("GND"), _clear(*_VOID_3X3))
    board = _board("case-enclosed", ((), l2, (_plane("VCC_3V3"),), (_plane("GND"),)))
    # Hand computation: void 3 x 3 = 9 mm^2 inside the 5.4 x 5.4 zone of L2;
    # coverage 1 - 9 / 29.16. The hole is surrounded by plane: a closed ring whose
    # copper-free region is the 3 x 3 square itself (area 9).
    return SynthCase(
        name="enclosed",
        summary="a 3 x 3 mm void on L2 enclosed by plane copper (closed ring)",
        board=board,
        expected=Expected(
            findings=frozenset({("plane-void", "L1", "L2"), ("void-ring", "L1", "L2")}),
            coverage=_solid_coverage(L2=1 - 9.0 / _zone_area(2)),
            plane_around=_PLANES_AROUND,
            void_area_mm2={_key(2): 9.0},
            ring_closed={_key(2): True},
            ring_inner_area_mm2={_key(2): 9.0},
        ),
    )


def _slot_to_edge() -> SynthCase:
    # The slot is 0.5 mm wide (y 14.75..15.25) from the void's right side (x 16.5) to the
    # plane's outer edge (x 29.5), where the 0.5 mm copper-free border reaches the board edge.
    l2 = (_plane("GND"), _clear(*_VOID_3X3), _clear(16.5, 14.75, 29.5, 15.25))
    board = _board("case-slot", ((), l2, (_plane("VCC_3V3"),), (_plane("GND"),)))
    # Hand computation: inside the L2 zone (x up to 17.7) the void is the 3 x 3 square plus
    # 1.2 mm of slot (16.5..17.7) x 0.5 mm = 9.6 mm^2; coverage 1 - 9.6 / 29.16.
    return SynthCase(
        name="slot-to-edge",
        summary="the same void opened by a 0.5 mm slot to the plane's outer edge (opened)",
        board=board,
        expected=Expected(
            findings=frozenset({("plane-void", "L1", "L2"), ("void-ring", "L1", "L2")}),
            coverage=_solid_coverage(L2=1 - 9.6 / _zone_area(2)),
            plane_around=_PLANES_AROUND,
            void_area_mm2={_key(2): 9.6},
            ring_closed={_key(2): False},
        ),
    )


def _slot_to_cutout() -> SynthCase:
    # A 3 x 2 mm milled opening at x 22..25, y 14..16 (outside every zone: the widest zone
    # ends at x = 19 and its 2 mm plane ring at x = 21); every plane is pulled back 0.5 mm
    # from it. On L2 a 0.5 mm slot joins the void to that pull-back.
    cutout = _rect(22.0, 14.0, 25.0, 16.0)
    pull_back = _clear(21.5, 13.5, 25.5, 16.5)
    l2 = (_plane("GND"), _clear(*_VOID_3X3), _clear(16.5, 14.75, 21.5, 15.25), pull_back)
    l3 = (_plane("VCC_3V3"), pull_back)
    l4 = (_plane("GND"), pull_back)
    board = _board("case-cutout-ring", ((), l2, l3, l4), cutouts=(cutout,))
    # Hand computation: the zone part of the void is 9.6 mm^2 as in slot-to-edge. The
    # copper-free region (void 9 + slot 5 x 0.5 = 2.5 + pull-back and opening 4 x 3 = 12)
    # never reaches the board's outer edge: the cut-out lies inside the board, so the
    # copper around it is still a closed ring (docs/rules.md: cut-outs inside the board are
    # copper-free area). Inner area 9 + 2.5 + 12 = 23.5 mm^2.
    return SynthCase(
        name="slot-to-cutout",
        summary="a void opened by a slot into a board cut-out: the ring stays closed",
        board=board,
        expected=Expected(
            findings=frozenset({("plane-void", "L1", "L2"), ("void-ring", "L1", "L2")}),
            coverage=_solid_coverage(L2=1 - 9.6 / _zone_area(2)),
            plane_around=_PLANES_AROUND,
            void_area_mm2={_key(2): 9.6},
            ring_closed={_key(2): True},
            ring_inner_area_mm2={_key(2): 23.5},
        ),
    )


def _outline_cutout() -> SynthCase:
    # A 1 x 4 mm milled opening across the body between the pads: x 14.5..15.5, y 13..17.
    # The planes are drawn up to its edge (a clear region exactly the opening), so the zone
    # (clipped to the board, i.e. without the opening) is fully covered.
    x0, y0, x1, y1 = 14.5, 13.0, 15.5, 17.0
    hole = _clear(x0, y0, x1, y1)
    layers = ((), (_plane("GND"), hole), (_plane("VCC_3V3"), hole), (_plane("GND"), hole))
    board = _board("case-milled", layers, cutouts=(_rect(x0, y0, x1, y1),))
    # Hand computation: the opening (4 mm^2) lies inside the body zone (12.5..17.5), so
    # cutout_area = 4.0; on L1 the zone without the opening is 25 - 4 = 21 mm^2 with the
    # 6 mm^2 of pads; the planes cover their zones entirely (coverage 1).
    return SynthCase(
        name="outline-cutout",
        summary="a milled opening in the board outline under the body (through-cutout)",
        board=board,
        expected=Expected(
            findings=frozenset({("through-cutout", "L1", "")}),
            coverage=_solid_coverage(L1=_PADS_MM2 / (_zone_area(1) - 4.0)),
            plane_around=_PLANES_AROUND,
            cutout_area_mm2={"L1": 4.0},
        ),
    )


def _npth_slot() -> SynthCase:
    # A non-plated slot drilled with G85 from (15, 14) to (15, 16), 1.0 mm wide; every
    # plane is cleared along it with a 1.0 mm clear track (the hole itself, no pull-back).
    clear = Track(((15.0, 14.0), (15.0, 16.0)), 1.0, dark=False)
    layers = ((), (_plane("GND"), clear), (_plane("VCC_3V3"), clear), (_plane("GND"), clear))
    hole = Hole(15.0, 14.0, 1.0, plated=False, slot_to=(15.0, 16.0))
    board = _board("case-npth-slot", layers, holes=(hole,))
    # Hand computation: a stadium of length 2 between centres and diameter 1:
    # 2 x 1 + pi x 0.5^2 = 2 + pi/4 = 2.785 mm^2, inside the body zone. The clearance is a
    # void of that area on L2, L3 and L4 (above the 1 mm^2 threshold), each a hole in its
    # plane: a closed ring.
    slot = 2.0 + math.pi / 4
    return SynthCase(
        name="npth-slot",
        summary="a routed non-plated slot under the body (through-cutout), planes cleared",
        board=board,
        expected=Expected(
            findings=frozenset(
                {("through-cutout", "L1", "")}
                | {(rule, "L1", f"L{k}") for rule in ("plane-void", "void-ring") for k in (2, 3, 4)}
            ),
            coverage=_solid_coverage(**{f"L{k}": 1 - slot / _zone_area(k) for k in (2, 3, 4)}),
            plane_around=_PLANES_AROUND,
            void_area_mm2={_key(k): slot for k in (2, 3, 4)},
            ring_closed={_key(k): True for k in (2, 3, 4)},
            ring_inner_area_mm2={_key(k): slot for k in (2, 3, 4)},
            cutout_area_mm2={"L1": slot},
        ),
    )


def _exposed_trace() -> SynthCase:
    l2 = (_plane("GND"), _clear(*_VOID_3X3))
    board = _board("case-exposed", ((), l2, (_SIGNAL_TRACE,), (_plane("GND"),)))
    # Hand computation: the trace at x = 15 crosses the L3 zone (y 11.2..18.8): 7.6 mm in
    # the zone. Above it L1 has only the pads (x 13..14 and 16..17, not at x = 15) and L2
    # has plane copper everywhere but the void y 13.5..16.5: 3.0 mm are exposed.
    # L3 carries no plane (the ring around its zone holds no copper but the trace). The
    # nearest layer with plane copper under those 3 mm is L4, 0.2 mm below: the return.
    return SynthCase(
        name="exposed-trace",
        summary="a trace on L3 under a void in L2: exposed over the void's 3 mm",
        board=board,
        expected=Expected(
            findings=frozenset(
                {
                    ("plane-void", "L1", "L2"),
                    ("void-ring", "L1", "L2"),
                    ("exposed-trace", "L1", "L3"),
                }
            ),
            coverage=_solid_coverage(L2=1 - 9.0 / _zone_area(2), L3=0.0),
            plane_around={**_PLANES_AROUND, _key(3): False},
            void_area_mm2={_key(2): 9.0},
            ring_closed={_key(2): True},
            exposed={_key(3): ("ADC_IN", 3.0, 7.6, "L4")},
        ),
    )


def _shielded_trace() -> SynthCase:
    board = _board("case-shielded", ((), (_plane("GND"),), (_SIGNAL_TRACE,), (_plane("GND"),)))
    # Hand computation: the same trace, but L2 is solid over the whole zone: nothing exposed.
    return SynthCase(
        name="shielded-trace",
        summary="the same trace under a solid L2 plane: nothing to report",
        board=board,
        expected=Expected(
            findings=frozenset(),
            coverage=_solid_coverage(L3=0.0),
            plane_around={**_PLANES_AROUND, _key(3): False},
        ),
    )


def _bottom_part() -> SynthCase:
    # The inductor and its regulator sit on the bottom; L4 carries their pads only, L3 a
    # plane with the 3 x 3 void, L2 and L1 solid planes.
    l3 = (_plane("GND"), _clear(*_VOID_3X3))
    layers = ((_plane("GND"),), (_plane("VCC_3V3"),), l3, ())
    board = _board("case-underside", layers, side="bottom")
    # Hand computation: seen from the bottom surface the depths are L4 0, L3 0.2, L2 1.3,
    # L1 1.5 (symmetric stack), so L3 has the 5.4 mm zone: coverage 1 - 9 / 29.16 and L4
    # carries the 6 mm^2 of pads in its 25 mm^2 zone.
    return SynthCase(
        name="bottom-part",
        summary="a bottom-side inductor looking upward: the void on L3 is found for it",
        board=board,
        expected=Expected(
            findings=frozenset({("plane-void", "L1", "L3"), ("void-ring", "L1", "L3")}),
            coverage={
                _key(4): _PADS_MM2 / _zone_area(1),
                _key(3): 1 - 9.0 / _zone_area(2),
                _key(2): 1.0,
                _key(1): 1.0,
            },
            plane_around={_key(4): False, _key(3): True, _key(2): True, _key(1): True},
            void_area_mm2={_key(3): 9.0},
            ring_closed={_key(3): True},
            ring_inner_area_mm2={_key(3): 9.0},
            depth_mm={_key(4): 0.0, _key(3): 0.2, _key(2): 1.3, _key(1): 1.5},
        ),
    )


def _bottom_exposed() -> SynthCase:
    # The bottom-side inductor again, now with the signal trace on L2 (no plane there) under
    # the void of L3; L1 is a solid plane.
    l3 = (_plane("GND"), _clear(*_VOID_3X3))
    layers = ((_plane("GND"),), (_SIGNAL_TRACE,), l3, ())
    board = _board("case-underside-trace", layers, side="bottom")
    # Hand computation: from the bottom, L2 lies 1.3 mm deep: zone side 7.6 mm, so 7.6 mm of
    # the trace are in the zone; the layers between it and the part are L4 (pads at x 13..14
    # and 16..17 only) and L3 (void y 13.5..16.5): 3.0 mm exposed. The nearest plane under
    # it is L1, 0.2 mm further from the part.
    return SynthCase(
        name="bottom-exposed",
        summary="a bottom-side inductor over a trace on L2 exposed through the void of L3",
        board=board,
        expected=Expected(
            findings=frozenset(
                {
                    ("plane-void", "L1", "L3"),
                    ("void-ring", "L1", "L3"),
                    ("exposed-trace", "L1", "L2"),
                }
            ),
            coverage={
                _key(4): _PADS_MM2 / _zone_area(1),
                _key(3): 1 - 9.0 / _zone_area(2),
                _key(2): 0.0,
                _key(1): 1.0,
            },
            plane_around={_key(4): False, _key(3): True, _key(2): False, _key(1): True},
            ring_closed={_key(3): True},
            exposed={_key(2): ("ADC_IN", 3.0, 7.6, "L1")},
            depth_mm={_key(4): 0.0, _key(3): 0.2, _key(2): 1.3, _key(1): 1.5},
        ),
    )


def _via_antipad() -> SynthCase:
    # A via of net VCC_3V3 at the body centre joins the top to the L3 plane; it needs
    # 0.9 mm antipads in the GND planes L2 and L4 (non-functional pads left out there).
    antipad = Flash(_CX, _CY, Aperture("C", (_ANTIPAD_MM,)), dark=False)
    via_pad = Flash(_CX, _CY, Aperture("C", (_VIA_PAD_MM,), "ViaPad"), net="VCC_3V3")
    layers = (
        (via_pad,),
        (_plane("GND"), antipad),
        (_plane("VCC_3V3"), via_pad),
        (_plane("GND"), antipad),
    )
    board = _board("case-antipad", layers, holes=(Hole(_CX, _CY, 0.3),))
    # Hand computation: antipad area pi x 0.45^2 = 0.636 mm^2 < 1 mm^2, so no void is
    # reported, but the coverage is 1 - 0.636 / zone area on L2 and L4. On L1 the 0.6 mm via
    # pad is wider than the opening and counts as plane with the pads: 6 + pi x 0.3^2.
    antipad_area = math.pi * (_ANTIPAD_MM / 2) ** 2
    return SynthCase(
        name="via-antipad",
        summary="a via antipad under the body: below void_min_area, coverage just under 1",
        board=board,
        expected=Expected(
            findings=frozenset(),
            coverage=_solid_coverage(
                L1=(_PADS_MM2 + math.pi * (_VIA_PAD_MM / 2) ** 2) / _zone_area(1),
                L2=1 - antipad_area / _zone_area(2),
                L4=1 - antipad_area / _zone_area(4),
            ),
            plane_around=_PLANES_AROUND,
            void_area_mm2={_key(2): antipad_area, _key(3): 0.0, _key(4): antipad_area},
        ),
    )


def _no_plane_layer() -> SynthCase:
    # L3 carries a single trace far from the part (y = 3): no plane anywhere near the zone.
    l3 = (Track(((3.0, 3.0), (27.0, 3.0)), 0.2, net="SPARE_IO"),)
    board = _board("case-no-plane", ((), (_plane("GND"),), l3, (_plane("GND"),)))
    # Hand computation: no copper of L3 in its zone (11.2..18.8) or its ring (9.2..20.8):
    # coverage 0, not a plane layer, so no plane-void however empty it is.
    return SynthCase(
        name="no-plane-layer",
        summary="a layer with no plane at all near the part: no plane-void for it",
        board=board,
        expected=Expected(
            findings=frozenset(),
            coverage=_solid_coverage(L3=0.0),
            plane_around={**_PLANES_AROUND, _key(3): False},
        ),
    )


def _split_planes() -> SynthCase:
    # L2 is split between GND (x < 14.75) and VCC_3V3 (x > 15.25): a 0.5 mm gap across the
    # whole board, under the body centre, reaching the copper-free border at both ends.
    l2 = (
        Region(_rect(0.5, 0.5, 14.75, _W - 0.5), net="GND"),
        Region(_rect(15.25, 0.5, _W - 0.5, _W - 0.5), net="VCC_3V3"),
    )
    board = _board("case-split", ((), l2, (_plane("VCC_5V"),), (_plane("GND"),)))
    # Hand computation: the gap inside the L2 zone is 0.5 x 5.4 = 2.7 mm^2; coverage
    # 1 - 2.7 / 29.16. The gap reaches the board edge: opened.
    return SynthCase(
        name="split-planes",
        summary="two plane nets on L2 with a gap under the part reaching the board edge",
        board=board,
        expected=Expected(
            findings=frozenset({("plane-void", "L1", "L2"), ("void-ring", "L1", "L2")}),
            coverage=_solid_coverage(L2=1 - 2.7 / _zone_area(2)),
            plane_around=_PLANES_AROUND,
            void_area_mm2={_key(2): 2.7},
            ring_closed={_key(2): False},
        ),
    )


def synthetic_cases() -> dict[str, SynthCase]:
    """Every synthetic case by name (see each case's ``summary``).

    Returns
    -------
    dict of str to SynthCase
        In a fixed order: solid, enclosed, slot-to-edge, slot-to-cutout, outline-cutout,
        npth-slot, exposed-trace, shielded-trace, bottom-part, bottom-exposed, via-antipad,
        no-plane-layer, split-planes.
    """
    cases = (
        _solid(),
        _enclosed(),
        _slot_to_edge(),
        _slot_to_cutout(),
        _outline_cutout(),
        _npth_slot(),
        _exposed_trace(),
        _shielded_trace(),
        _bottom_part(),
        _bottom_exposed(),
        _via_antipad(),
        _no_plane_layer(),
        _split_planes(),
    )
    return {c.name: c for c in cases}
