"""The demo board: a fictional four-rail power board for a fictional data logger.

"QX-40 rail board" (everything here is invented): 24 V in, a 24 V -> 12 V pre-regulator
and three 12 V bucks (3.3 V, 5 V, 1.8 V), on a 60 x 45 mm four-layer board:

- L1 top: parts, switch-node and sense tracks, a GND pour strip along the lower edge;
- L2: GND plane;
- L3: signal tracks and a VIN_12V power plane in the lower right;
- L4 bottom: GND pour over the left two thirds (x < 40 mm), a sense track on the right.

The magnetics, one situation each:

- L1 (4.7 uH, 5 x 5 mm, shielded) at (10, 32): solid GND on L2 and L4; layer 3 carries
  only the SENSE_3V3 track there, shielded by L2. No finding, only assumptions.
- L2 (10 uH, 6 x 6 mm) at (30, 32): a 4 x 4 mm keep-out in the L2 plane, enclosed by
  plane copper (a closed ring); the ADC_IN_P track on L3 crosses under it, exposed over
  the 4 mm of the keep-out.
- L3 (2.2 uH, 4 x 4 mm) at (50, 32): a 3 x 3 mm keep-out in L2, opened by a 0.5 mm slot to
  the plane's right edge; the SENSE_1V8 track on L4 crosses under it, exposed over 3 mm.
  Between the pads no layer has copper there at all (a spot void on every copper layer).
- L4 (22 uH toroid on a surface-mount base, 12 x 12 mm) at (50, 11): a 1 x 10 mm milled
  slot under its centre (for the cable tie holding the winding); L2 and L3 are pulled back
  0.5 mm around it, so each closes a ring around the slot. The through-cutout finding is
  waived in the configuration.
- FB1 (ferrite bead) and L5 (47 nH RF coil) are not power magnetics.

Findings the demo must give, as ``rule`` part layer ("-": not layer-specific); the
demo test checks that each one is reported and that this list equals ``DEMO_FINDINGS``:

- ``plane-void`` L2 L2: the 4 x 4 mm keep-out, 16 mm^2 of the 7.4 x 7.4 mm zone;
- ``void-ring`` L2 L2: closed (a hole in the GND plane);
- ``exposed-trace`` L2 L3: ADC_IN_P, 4.0 mm exposed, return plane L4;
- ``plane-void`` L3 L2: the 3 x 3 mm keep-out and 1.2 mm of its slot, 9.6 mm^2;
- ``void-ring`` L3 L2: opened (the slot reaches the board edge);
- ``exposed-trace`` L3 L4: SENSE_1V8, 3.0 mm exposed, no return plane;
- ``through-cutout`` L3 -: no copper on any layer between the pads (a spot void);
- ``through-cutout`` L4 -: the milled slot (10 mm^2) and its pull-back; waived;
- ``plane-void`` L4 L2: the 0.5 mm pull-back around the slot, 12 mm^2;
- ``void-ring`` L4 L2: closed around the slot;
- ``plane-void`` L4 L3: the same pull-back in the VIN_12V plane;
- ``void-ring`` L4 L3: closed around the slot;
- ``switch-node-capacitance`` L1 L1: the SW_3V3 track and pad over the L2 plane;
- ``switch-node-capacitance`` L2 L1: SW_5V;
- ``switch-node-capacitance`` L3 L1: SW_1V8;
- ``switch-node-capacitance`` L4 L1: SW_12V.

Apart from its switch-node capacitance, L1 gives no finding but assumptions (its winding
radius is not configured).
"""

from __future__ import annotations

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

__all__ = ["DEMO_FINDINGS", "demo_board", "demo_config"]

DEMO_FINDINGS: frozenset[tuple[str, str, str]] = frozenset(
    {
        ("plane-void", "L2", "L2"),
        ("void-ring", "L2", "L2"),
        ("exposed-trace", "L2", "L3"),
        ("plane-void", "L3", "L2"),
        ("void-ring", "L3", "L2"),
        ("exposed-trace", "L3", "L4"),
        ("through-cutout", "L3", ""),
        ("through-cutout", "L4", ""),
        ("plane-void", "L4", "L2"),
        ("plane-void", "L4", "L3"),
        ("void-ring", "L4", "L2"),
        ("void-ring", "L4", "L3"),
        ("switch-node-capacitance", "L1", "L1"),
        ("switch-node-capacitance", "L2", "L1"),
        ("switch-node-capacitance", "L3", "L1"),
        ("switch-node-capacitance", "L4", "L1"),
    }
)
"""The (rule, ref, layer) findings listed in the module docstring."""

_W, _H = 60.0, 45.0
_VIA = Aperture("C", (0.6,), "ViaPad")
_ANTIPAD = Aperture("C", (0.9,))

Point = tuple[float, float]
Pads = tuple[tuple[float, float, float, float], ...]


def _rect(x0: float, y0: float, x1: float, y1: float) -> tuple[Point, ...]:
    return ((x0, y0), (x1, y0), (x1, y1), (x0, y1))


def _two_pad(span: float, w: float, h: float) -> Pads:
    return ((-span / 2, 0.0, w, h), (span / 2, 0.0, w, h))


_SOT23_6: Pads = (
    (-0.95, -1.1, 0.6, 1.0),
    (0.0, -1.1, 0.6, 1.0),
    (0.95, -1.1, 0.6, 1.0),
    (-0.95, 1.1, 0.6, 1.0),
    (0.0, 1.1, 0.6, 1.0),
    (0.95, 1.1, 0.6, 1.0),
)
_C0805 = _two_pad(1.9, 1.0, 1.3)
_C1206 = _two_pad(3.0, 1.2, 1.8)

# Vias: net -> positions (mm). Signal vias get antipads in the planes they cross.
_SIGNAL_VIAS: dict[str, tuple[Point, ...]] = {
    "SENSE_3V3": ((3.0, 32.0), (18.0, 32.0)),
    "ADC_IN_P": ((36.0, 25.0), (30.7, 42.0)),
    "SENSE_1V8": ((50.5, 27.0), (50.5, 41.0)),
}
_GND_VIAS: tuple[Point, ...] = ((22.0, 18.0), (22.0, 28.0), (2.0, 40.0), (38.0, 40.0))
_MOUNTING_HOLES: tuple[Point, ...] = ((3.0, 3.0), (57.0, 42.0))
_HOLE_CLEARANCE = Aperture("C", (3.5,))

_L3_PLANE = (38.0, 0.5, _W - 0.5, 22.0)
"""VIN_12V plane region on layer 3 (lower right)."""
_L4_POUR = (0.5, 0.5, 40.0, _H - 0.5)
"""GND pour region on layer 4 (left two thirds)."""
_SLOT = (49.5, 6.0, 50.5, 16.0)
"""The milled slot under L4 (x0, y0, x1, y1), 1 x 10 mm."""
_SLOT_PULL_BACK = (49.0, 5.5, 51.0, 16.5)
"""Plane pull-back around the slot, 0.5 mm."""


def _inside(p: Point, box: tuple[float, float, float, float]) -> bool:
    return box[0] <= p[0] <= box[2] and box[1] <= p[1] <= box[3]


def _vias(layer: int) -> tuple[list[Feature], list[Feature]]:
    """Antipads (drawn after the plane) and via pads of one layer (1-based)."""
    antipads: list[Feature] = []
    pads: list[Feature] = []
    for net, points in _SIGNAL_VIAS.items():
        for p in points:
            in_plane = (
                layer == 2
                or (layer == 3 and _inside(p, _L3_PLANE))
                or (layer == 4 and _inside(p, _L4_POUR))
            )
            if in_plane:
                antipads.append(Flash(p[0], p[1], _ANTIPAD, dark=False))
            if layer != 2:  # no non-functional pad in the GND plane
                pads.append(Flash(p[0], p[1], _VIA, net=net))
    for p in _GND_VIAS:
        if layer == 3 and _inside(p, _L3_PLANE):
            antipads.append(Flash(p[0], p[1], _ANTIPAD, dark=False))
        else:
            pads.append(Flash(p[0], p[1], _VIA, net="GND"))
    antipads += [Flash(x, y, _HOLE_CLEARANCE, dark=False) for x, y in _MOUNTING_HOLES]
    return antipads, pads


def _parts() -> tuple[Part, ...]:
    inductor = "power inductor"
    return (
        # Input: connector, bead, bulk capacitor, pre-regulator U4 and its toroid L4.
        Part("J1", "24V IN", "CONN_2P_P3.5", 4.0, 11.0, 90.0, "top", _two_pad(3.5, 2.0, 2.0)),
        Part("FB1", "600R@100MHz", "0805", 10.0, 11.0, 0.0, "top", _C0805, "ferrite bead"),
        Part("C1", "4.7uF 50V", "C_1206", 16.0, 11.0, 0.0, "top", _C1206),
        Part(
            "U4",
            "QX3324",
            "SOT-23-6",
            36.0,
            11.0,
            0.0,
            "top",
            _SOT23_6,
            "step-down regulator 24 V to 12 V (fictional)",
        ),
        Part("C9", "10uF 25V", "C_1206", 30.0, 11.0, 90.0, "top", _C1206),
        Part(
            "L4",
            "22uH",
            "IND_12.0x12.0mm",
            50.0,
            11.0,
            0.0,
            "top",
            _two_pad(10.0, 2.0, 4.0),
            "toroidal power inductor on a surface-mount base, 12 x 12 mm",
        ),
        Part("C10", "22uF 25V", "C_1206", 36.0, 4.0, 0.0, "top", _C1206),
        # Three 12 V bucks in columns x = 10, 30, 50: regulator at y 23, inductor at y 32.
        Part(
            "U1",
            "QX3301",
            "SOT-23-6",
            10.0,
            23.0,
            0.0,
            "top",
            _SOT23_6,
            "step-down regulator 12 V to 3.3 V (fictional)",
        ),
        Part("C2", "10uF", "C_0805", 5.0, 23.0, 90.0, "top", _C0805),
        Part(
            "L1",
            "4.7uH",
            "IND_5.0x5.0mm",
            10.0,
            32.0,
            0.0,
            "top",
            _two_pad(3.6, 1.4, 4.0),
            f"{inductor}, shielded, 5 x 5 mm",
        ),
        Part("C3", "22uF", "C_0805", 5.0, 39.0, 90.0, "top", _C0805),
        Part(
            "U2",
            "QX3302",
            "SOT-23-6",
            30.0,
            23.0,
            0.0,
            "top",
            _SOT23_6,
            "step-down regulator 12 V to 5 V (fictional)",
        ),
        Part("C4", "10uF", "C_0805", 25.0, 23.0, 90.0, "top", _C0805),
        Part(
            "L2",
            "10uH",
            "IND_6.0x6.0mm",
            30.0,
            32.0,
            0.0,
            "top",
            _two_pad(4.4, 1.6, 5.0),
            f"{inductor}, semi-shielded, 6 x 6 mm",
        ),
        Part("C5", "22uF", "C_0805", 24.0, 39.0, 90.0, "top", _C0805),
        Part(
            "U3",
            "QX3303",
            "SOT-23-6",
            50.0,
            23.0,
            0.0,
            "top",
            _SOT23_6,
            "step-down regulator 12 V to 1.8 V (fictional)",
        ),
        Part("C6", "10uF", "C_0805", 45.0, 23.0, 90.0, "top", _C0805),
        Part(
            "L3",
            "2.2uH",
            "IND_4.0x4.0mm",
            50.0,
            32.0,
            0.0,
            "top",
            _two_pad(3.0, 1.0, 3.0),
            f"{inductor}, 4 x 4 mm",
        ),
        Part("C7", "22uF", "C_0805", 44.0, 39.0, 90.0, "top", _C0805),
        # The logger's front end: an ADC and an RF coil of its radio.
        Part(
            "U5",
            "QX9410",
            "SOT-23-6",
            40.0,
            27.0,
            0.0,
            "top",
            _SOT23_6,
            "2-channel ADC (fictional)",
        ),
        Part("J2", "SENSOR", "CONN_2P_P2.5", 16.0, 42.0, 0.0, "top", _two_pad(2.5, 1.5, 1.5)),
        Part("L5", "47nH", "L_0402", 57.0, 37.0, 0.0, "top", _two_pad(1.0, 0.6, 0.6), "RF coil"),
        Part("TP1", "TP", "TESTPOINT_1.0mm", 12.0, 36.0, 0.0, "top", ((0.0, 0.0, 1.0, 1.0),)),
        Part("C8", "100nF", "C_0402", 58.0, 21.0, 0.0, "bottom", _two_pad(1.0, 0.6, 0.6)),
    )


def _top() -> tuple[Feature, ...]:
    _, via_pads = _vias(1)
    return (
        Region(_rect(0.5, 0.5, 26.0, 5.0), net="GND"),
        # Switch nodes: regulator pin 3 (x + 0.95, y 21.9) to the inductor's right pad.
        Track(((10.95, 24.1), (10.95, 26.0), (11.8, 26.0), (11.8, 30.0)), 0.6, net="SW_3V3"),
        Track(((30.95, 24.1), (30.95, 26.0), (32.2, 26.0), (32.2, 29.5)), 0.6, net="SW_5V"),
        Track(((50.95, 24.1), (50.95, 26.0), (51.5, 26.0), (51.5, 30.5)), 0.6, net="SW_1V8"),
        Track(((36.95, 12.1), (40.0, 12.1), (40.0, 11.0), (44.0, 11.0)), 0.8, net="SW_12V"),
        # Outputs: the inductor's left pad up to its output capacitor.
        Track(((8.2, 34.0), (5.0, 37.0), (5.0, 38.05)), 0.6, net="VOUT_3V3"),
        Track(((27.8, 34.5), (24.0, 37.0), (24.0, 38.05)), 0.6, net="VOUT_5V"),
        Track(((48.5, 33.5), (44.0, 37.0), (44.0, 38.05)), 0.6, net="VOUT_1V8"),
        # Signal ends: sensor connector to the ADC_IN_P via, ADC to its other via, the
        # sense vias to the regulators' feedback pins.
        Track(((17.25, 42.0), (30.7, 42.0)), 0.2, net="ADC_IN_P"),
        Track(((36.0, 25.0), (39.05, 25.0), (39.05, 25.9)), 0.2, net="ADC_IN_P"),
        Track(((3.0, 32.0), (3.0, 26.0), (9.05, 26.0), (9.05, 24.1)), 0.2, net="SENSE_3V3"),
        Track(((18.0, 32.0), (18.0, 36.0), (12.0, 36.0)), 0.2, net="SENSE_3V3"),
        Track(((50.5, 27.0), (49.05, 26.0), (49.05, 24.1)), 0.2, net="SENSE_1V8"),
        Track(((50.5, 41.0), (45.0, 41.0), (44.0, 40.0), (44.0, 39.95)), 0.2, net="SENSE_1V8"),
        *via_pads,
    )


def _inner2() -> tuple[Feature, ...]:
    antipads, via_pads = _vias(2)
    return (
        Region(_rect(0.5, 0.5, _W - 0.5, _H - 0.5), net="GND"),
        # Keep-out under L2: 4 x 4 mm, enclosed by the plane.
        Region(_rect(28.0, 30.0, 32.0, 34.0), dark=False),
        # Keep-out under L3: 3 x 3 mm, opened by a 0.5 mm slot to the plane's right edge.
        Region(_rect(48.5, 30.5, 51.5, 33.5), dark=False),
        Region(_rect(51.5, 31.75, _W - 0.5, 32.25), dark=False),
        Region(_rect(*_SLOT_PULL_BACK), dark=False),
        *antipads,
        *via_pads,
    )


def _inner3() -> tuple[Feature, ...]:
    antipads, via_pads = _vias(3)
    return (
        Region(_rect(*_L3_PLANE), net="VIN_12V"),
        Region(_rect(*_SLOT_PULL_BACK), dark=False),
        *antipads,
        # SENSE_3V3 under L1 (shielded by L2); ADC_IN_P under L2 (exposed in its keep-out),
        # 0.7 mm off the winding axis (a track right under the axis links no net flux).
        Track(((3.0, 32.0), (18.0, 32.0)), 0.2, net="SENSE_3V3"),
        Track(((36.0, 25.0), (30.7, 25.0), (30.7, 42.0)), 0.2, net="ADC_IN_P"),
        *via_pads,
    )


def _bottom() -> tuple[Feature, ...]:
    antipads, via_pads = _vias(4)
    return (
        Region(_rect(*_L4_POUR), net="GND"),
        *antipads,
        # SENSE_1V8 under L3 (exposed in the keep-out of L2), 0.5 mm off its axis.
        Track(((50.5, 27.0), (50.5, 41.0)), 0.2, net="SENSE_1V8"),
        *via_pads,
    )


def demo_config() -> str:
    """The demo's ``fluxshadow.toml``: parts, operating points and one waiver.

    Returns
    -------
    str
        TOML text (see :mod:`fluxshadow.io.config` for the keys).
    """
    return """\
# fluxshadow configuration of the fictional QX-40 rail board (demo).

[[part]]
ref = "L1"
construction = "shielded"

[[part]]
ref = "L2"
construction = "semi-shielded"
winding_radius_mm = 2.0
turns = 9

[[part]]
ref = "L3"
construction = "unshielded"
winding_radius_mm = 1.4

[[part]]
ref = "L4"
construction = "toroidal"
winding_radius_mm = 4.5
height_mm = 7.0

[[regulator]]
parts = ["U4", "L4"]
vin_v = 24
vout_v = 12
fsw_hz = 300e3

[[regulator]]
parts = ["U1", "L1"]
vin_v = 12
vout_v = 3.3
fsw_hz = 1e6

[[regulator]]
parts = ["U2", "L2"]
vin_v = 12
vout_v = 5
fsw_hz = 600e3

[[regulator]]
parts = ["U3", "L3"]
vin_v = 12
vout_v = 1.8
fsw_hz = 2.2e6

[[waiver]]
rule = "through-cutout"
ref = "L4"
layer = "*"
reason = "slot for the cable tie that holds the toroid; reviewed, no copper crosses it"
"""


def demo_board() -> SynthBoard:
    """The fictional QX-40 rail board (see the module docstring for what it shows).

    Returns
    -------
    SynthBoard
        60 x 45 mm, four layers (35 um copper, gaps 0.165 / 1.065 / 0.165 mm), with its
        ``fluxshadow.toml`` in ``config_text``.
    """
    via_holes = [Hole(x, y, 0.3) for pts in _SIGNAL_VIAS.values() for x, y in pts]
    via_holes += [Hole(x, y, 0.3) for x, y in _GND_VIAS]
    mounting = tuple(Hole(x, y, 2.7, plated=False) for x, y in _MOUNTING_HOLES)
    return SynthBoard(
        name="qx40-rails",
        width_mm=_W,
        height_mm=_H,
        layers=(
            CopperLayer(_top()),
            CopperLayer(_inner2()),
            CopperLayer(_inner3()),
            CopperLayer(_bottom()),
        ),
        parts=_parts(),
        holes=(*via_holes, *mounting),
        cutouts=(_rect(*_SLOT),),
        copper_mm=(0.035, 0.035, 0.035, 0.035),
        dielectric_mm=(0.165, 1.065, 0.165),
        config_text=demo_config(),
    )
