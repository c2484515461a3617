"""Fictional boards used as bundled fixtures and synthetic test boards.

All names, values and part numbers here are invented for fluxshadow. Each builder returns a
:class:`SynthBoard`; ``expected`` companions describe what a reader must recover.
"""

from __future__ import annotations

from dataclasses import replace

from fluxshadow.synth.model import (
    Aperture,
    CopperLayer,
    Flash,
    Hole,
    Part,
    Region,
    SynthBoard,
    Track,
)

__all__ = ["mini4", "mini4_variants"]

_VIA = Aperture("C", (0.6,), "ViaPad")
_ANTIPAD = Aperture("C", (0.9,))


def _rect(x0: float, y0: float, x1: float, y1: float) -> tuple[tuple[float, float], ...]:
    return ((x0, y0), (x1, y0), (x1, y1), (x0, y1))


def _two_pad(span: float, w: float, h: float) -> tuple[tuple[float, float, float, float], ...]:
    return ((-span / 2, 0.0, w, h), (span / 2, 0.0, w, h))


def mini4() -> SynthBoard:
    """A 40 x 30 mm four-layer board with two buck regulators ("mini4").

    - L1 (4.7 uH, 5 x 5 mm body) at (10, 15) over solid planes on L2 and L4;
    - L2 (2.2 uH, 4 x 4 mm body) at (28, 15); L2's inner layer 2 has a 3 x 3 mm void under it;
    - FB1 (a ferrite bead) and L3 (47 nH, an RF coil) must be excluded;
    - a signal trace on layer 3 runs under L1, one on layer 4 under L2;
    - seven signal vias with antipads in the planes and one ground via.
    """
    w, h = 40.0, 30.0
    signal_vias = ((20.0, 5.0), (20.0, 25.0), *((x, 27.0) for x in (8.0, 12.0, 24.0, 28.0, 32.0)))
    vias = (*signal_vias, (5.0, 5.0))
    plane = Region(_rect(0.5, 0.5, w - 0.5, h - 0.5), net="GND")
    antipads = tuple(Flash(x, y, _ANTIPAD, dark=False) for x, y in signal_vias)
    via_pads = tuple(
        Flash(x, y, _VIA, net="GND" if (x, y) == (5.0, 5.0) else "SIG") for x, y in vias
    )
    top = CopperLayer(
        (
            Region(_rect(14.0, 22.0, 24.0, 28.0), net="VIN_A"),
            Track(((12.5, 15.0), (16.0, 15.0), (16.0, 22.0)), 0.4, net="SW_A"),
            Track(((25.5, 15.0), (22.0, 15.0), (22.0, 10.0)), 0.4, net="SW_B"),
            *via_pads,
        )
    )
    inner2 = CopperLayer(
        (
            plane,
            *antipads,
            Region(_rect(26.5, 13.5, 29.5, 16.5), dark=False),
            *via_pads,
        )
    )
    inner3 = CopperLayer(
        (
            Track(((2.0, 14.0), (38.0, 14.0)), 0.15, net="SENSE_A"),
            Region(_rect(2.0, 2.0, 12.0, 8.0), net="VOUT_A"),
            *via_pads,
        )
    )
    bottom = CopperLayer(
        (
            Region(_rect(0.5, 0.5, w - 0.5, 11.0), net="GND"),
            Region(_rect(0.5, 19.0, w - 0.5, h - 0.5), net="GND"),
            *antipads,
            Track(((24.0, 12.5), (24.0, 17.5), (32.0, 17.5)), 0.2, net="FB_B"),
            *via_pads,
        )
    )
    parts = (
        Part(
            "L1",
            "4.7uH",
            "IND_5.0x5.0mm",
            10.0,
            15.0,
            0.0,
            "top",
            _two_pad(4.0, 1.5, 4.0),
            "power inductor, shielded, 5 x 5 mm",
        ),
        Part(
            "L2",
            "2.2uH",
            "IND_4.0x4.0mm",
            28.0,
            15.0,
            90.0,
            "top",
            _two_pad(3.0, 1.2, 3.2),
            "power inductor, 4 x 4 mm",
        ),
        Part(
            "U1",
            "QX3301",
            "SOT-23-6",
            10.0,
            22.0,
            0.0,
            "top",
            ((-0.95, -1.1, 0.6, 1.0), (0.95, -1.1, 0.6, 1.0), (0.0, 1.1, 0.6, 1.0)),
            "step-down regulator (fictional)",
        ),
        Part(
            "U2",
            "QX3302",
            "SOT-23-6",
            28.0,
            22.0,
            0.0,
            "top",
            ((-0.95, -1.1, 0.6, 1.0), (0.95, -1.1, 0.6, 1.0), (0.0, 1.1, 0.6, 1.0)),
            "step-down regulator (fictional)",
        ),
        Part("C1", "22uF", "C_0805", 14.0, 12.0, 90.0, "top", _two_pad(1.9, 1.0, 1.3)),
        Part("C2", "10uF", "C_0805", 32.0, 10.0, 0.0, "bottom", _two_pad(1.9, 1.0, 1.3)),
        Part(
            "FB1",
            "120R@100MHz",
            "0603",
            35.0,
            25.0,
            0.0,
            "top",
            _two_pad(1.6, 0.8, 0.9),
            "ferrite bead",
        ),
        Part("L3", "47nH", "L_0402", 35.0, 5.0, 0.0, "bottom", _two_pad(1.0, 0.6, 0.6), "RF coil"),
    )
    holes = (*(Hole(x, y, 0.3) for x, y in vias), Hole(2.5, 27.5, 1.0, plated=False))
    return SynthBoard(
        name="mini4",
        width_mm=w,
        height_mm=h,
        layers=(top, inner2, inner3, bottom),
        parts=parts,
        holes=holes,
        copper_mm=(0.035, 0.035, 0.035, 0.035),
        dielectric_mm=(0.2, 1.065, 0.2),
    )


def mini4_variants() -> dict[str, SynthBoard]:
    """Variants of :func:`mini4` that a reader has not seen: other dialects and frames.

    - ``bare-inch``: no attributes anywhere, inch 2.5 coordinates, identity only from
      three-letter extensions and physical-order comments, text placement;
    - ``comments``: X2 attributes only inside ``G04 #@!`` comments;
    - ``negplane``: layer 2 written as a negative image *without* any marker;
    - ``shifted``: placement in a frame shifted by (-50, +20) mm with bottom X mirrored.
    """
    base = mini4()
    plane_layer = base.layers[1]
    # A negative plane file holds only the clearances: antipads and the void.
    clearances = tuple(
        replace(f, dark=True) for f in plane_layer.features if getattr(f, "dark", True) is False
    )
    neg_layer = CopperLayer(clearances, negative=True, mark_negative=False)
    return {
        "bare-inch": replace(
            base,
            name="mini4b",
            dialect="bare",
            units="inch",
            placement_style="text",
            write_job=False,
        ),
        "comments": replace(base, name="mini4c", dialect="x2-comments"),
        "negplane": replace(
            base, name="mini4n", layers=(base.layers[0], neg_layer, *base.layers[2:])
        ),
        "shifted": replace(
            base, name="mini4s", placement_offset=(-50.0, 20.0), mirror_bottom_x=True
        ),
    }
