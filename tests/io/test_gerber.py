"""Gerber reader: formats, operations, arcs, regions, polarity, transforms, SR/AB, attributes.

Expected values are worked out by hand from the statements in each snippet. Section
numbers refer to the Gerber Layer Format Specification rev 2023.08 ("spec"); where the
number is given "from memory" it was not looked up.
"""

from __future__ import annotations

import math
from pathlib import Path

import numpy as np
import pytest
from shapely.geometry import Polygon

from fluxshadow.io._gerber_attrs import scan_header
from fluxshadow.io.gerber import (
    ARC_CHORD_TOLERANCE_MM,
    looks_like_gerber,
    parse_gerber,
    read_gerber,
    read_gerber_header,
)
from fluxshadow.io.records import FLASH, REGION, TRACK, ArtworkRecord

MM46 = "%FSLAX46Y46*%\n%MOMM*%\n"


def gbr(body: str, head: str = MM46, end: str = "M02*\n") -> ArtworkRecord:
    return parse_gerber(head + body + "\n" + end, source="t.gbr")


def rings(rec: ArtworkRecord, i: int) -> list[np.ndarray]:
    """Rings of object i as (n, 2) arrays."""
    out = []
    for r in range(rec.obj_ring_start[i], rec.obj_ring_start[i + 1]):
        a, b = rec.ring_vertex_start[r], rec.ring_vertex_start[r + 1]
        out.append(rec.vertices[a:b])
    return out


def sagitta_ok(pts: np.ndarray, cx: float, cy: float, r: float) -> bool:
    """Every chord's midpoint lies within the chord tolerance of the circle."""
    mid = 0.5 * (pts[1:] + pts[:-1])
    d = np.hypot(mid[:, 0] - cx, mid[:, 1] - cy)
    return bool(np.all(r - d <= ARC_CHORD_TOLERANCE_MM + 1e-9))


# ----------------------------------------------------------------------------- formats


def test_flash_in_mm_46_and_circle_aperture() -> None:
    rec = gbr("%ADD10C,1.0*%\nD10*\nX1000000Y-2500000D03*")
    assert rec.n_objects == 1
    assert rec.obj_kind[0] == FLASH
    assert rec.obj_dark[0]
    np.testing.assert_allclose(rec.obj_xy[0], [1.0, -2.5])
    ap = rec.apertures[rec.obj_aperture[0]]
    assert ap.code == 10
    assert ap.template == "C"
    assert ap.circle_diameter_mm == pytest.approx(1.0)
    ((dark, ring),) = ap.parts
    assert dark
    area = Polygon(ring).area
    # Inscribed polygon: short of pi/4 by at most perimeter x chord tolerance.
    assert math.pi / 4 - math.pi * ARC_CHORD_TOLERANCE_MM <= area <= math.pi / 4
    assert rec.units_in_file == "mm"
    assert rec.notices == ()


def test_inch_25_equals_mm_46() -> None:
    inch = gbr(
        "%ADD10C,0.01*%\nD10*\nX100000Y-50000D03*\nX0Y0D02*\nX12345Y0D01*",
        head="%FSLAX25Y25*%\n%MOIN*%\n",
    )
    mm = gbr("%ADD10C,0.254*%\nD10*\nX25400000Y-12700000D03*\nX0Y0D02*\nX3135630Y0D01*")
    assert inch.units_in_file == "inch"
    np.testing.assert_allclose(inch.obj_xy, mm.obj_xy, atol=1e-9)
    np.testing.assert_allclose(inch.vertices, mm.vertices, atol=1e-9)
    # 0.12345 in = 3.13563 mm
    assert inch.vertices[-1, 0] == pytest.approx(3.13563)
    assert inch.apertures[0].circle_diameter_mm == pytest.approx(0.254)


def test_legacy_g70_g71_units_with_notice() -> None:
    rec = gbr("%ADD10C,0.01*%\nD10*\nX100000Y0D03*", head="%FSLAX25Y25*%\nG70*\n")
    np.testing.assert_allclose(rec.obj_xy[0], [25.4, 0.0])
    assert rec.units_in_file == "inch"
    assert any("G70/G71" in n.message for n in rec.notices)


def test_trailing_zero_omission() -> None:
    # FST, 2.4 inch: digits are padded on the right to 6 -> "15" = 15.0000 in,
    # "025" = 02.5000 in, "-5" = -50.0000 in.
    rec = gbr(
        "%ADD10C,0.01*%\nD10*\nX15Y025D03*\nX-5D03*",
        head="%FSTAX24Y24*%\n%MOIN*%\n",
    )
    np.testing.assert_allclose(rec.obj_xy, [[15 * 25.4, 2.5 * 25.4], [-50 * 25.4, 2.5 * 25.4]])
    assert any("trailing-zero" in n.message for n in rec.notices)


def test_incremental_coordinates_fs_and_g91() -> None:
    body = "%ADD10C,0.1*%\nD10*\nX1000000Y1000000D02*\nX1000000D01*\nY2000000D01*\nX-500000Y0D01*"
    a = gbr(body, head="%FSLIX46Y46*%\n%MOMM*%\n")
    b = gbr(body, head="%FSLAX46Y46*%\n%MOMM*%\nG91*\n")
    expect = [[1, 1], [2, 1], [2, 3], [1.5, 3]]
    np.testing.assert_allclose(a.vertices, expect)
    np.testing.assert_allclose(b.vertices, expect)
    assert any("G91" in n.message for n in b.notices)


def test_modal_coordinates_keep_previous_value() -> None:
    rec = gbr("%ADD10C,0.1*%\nD10*\nX1000000Y1000000D02*\nX2000000D01*\nY2000000D01*")
    assert rec.n_objects == 1
    np.testing.assert_allclose(rings(rec, 0)[0], [[1, 1], [2, 1], [2, 2]])


def test_deprecated_modal_d01_and_g54_prefix() -> None:
    rec = gbr("%ADD10C,0.1*%\nG54D10*\nX0Y0D02*\nG01X1000000Y0D01*\nX2000000Y0*\nX3000000*")
    np.testing.assert_allclose(rings(rec, 0)[0], [[0, 0], [1, 0], [2, 0], [3, 0]])
    msgs = " ".join(n.message for n in rec.notices)
    assert "G54" in msgs
    assert "previous one" in msgs
    assert "(2 times)" in msgs


# ----------------------------------------------------------------------------- tracks


def test_track_chains_and_breaks() -> None:
    body = (
        "%ADD10C,0.2*%\n%ADD11C,0.3*%\nD10*\n"
        "X0Y0D02*\nX1000000Y0D01*\n"  # segment 1
        "X1000000Y0D02*\nX1000000Y1000000D01*\n"  # D02 to the current point: same chain
        "X5000000Y5000000D02*\nX6000000Y5000000D01*\n"  # real move: new track
        "D11*\nX7000000Y5000000D01*\n"  # aperture change: new track from (6, 5)
    )
    rec = gbr(body)
    assert list(rec.obj_kind) == [TRACK, TRACK, TRACK]
    np.testing.assert_allclose(rings(rec, 0)[0], [[0, 0], [1, 0], [1, 1]])
    np.testing.assert_allclose(rings(rec, 1)[0], [[5, 5], [6, 5]])
    np.testing.assert_allclose(rings(rec, 2)[0], [[6, 5], [7, 5]])
    assert [rec.apertures[a].code for a in rec.obj_aperture] == [10, 10, 11]
    np.testing.assert_allclose(rec.obj_xy, [[0, 0], [5, 5], [6, 5]])


def test_zero_length_draw_keeps_two_vertices() -> None:
    rec = gbr("%ADD10C,0.5*%\nD10*\nX1000000Y1000000D02*\nX1000000Y1000000D01*")
    assert rec.obj_kind[0] == TRACK
    np.testing.assert_allclose(rings(rec, 0)[0], [[1, 1], [1, 1]])


def test_flash_breaks_chain_and_keeps_file_order() -> None:
    rec = gbr("%ADD10C,0.5*%\nD10*\nX0Y0D02*\nX1000000Y0D01*\nX2000000Y0D03*\nX3000000Y0D01*")
    assert list(rec.obj_kind) == [TRACK, FLASH, TRACK]
    np.testing.assert_allclose(rings(rec, 2)[0], [[2, 0], [3, 0]])


# ----------------------------------------------------------------------------- arcs


def test_g75_quarter_arc_ccw() -> None:
    # From (1, 0) to (0, 1) about (0, 0): I = -1, J = 0 (offsets from the start point).
    rec = gbr("%ADD10C,0.1*%\nD10*\nG75*\nX1000000Y0D02*\nG03X0Y1000000I-1000000J0D01*")
    pts = rings(rec, 0)[0]
    np.testing.assert_allclose(pts[0], [1, 0])
    np.testing.assert_allclose(pts[-1], [0, 1], atol=1e-12)
    np.testing.assert_allclose(np.hypot(pts[:, 0], pts[:, 1]), 1.0, atol=1e-12)
    ang = np.arctan2(pts[:, 1], pts[:, 0])
    assert np.all(np.diff(ang) > 0)
    assert sagitta_ok(pts, 0, 0, 1.0)
    # the chord tolerance needs at least ceil((pi/2) / (2 acos(1 - 0.002))) chords
    assert len(pts) - 1 >= math.ceil((math.pi / 2) / (2 * math.acos(1 - 0.002)))


def test_g02_clockwise_takes_the_long_way() -> None:
    rec = gbr("%ADD10C,0.1*%\nD10*\nG75*\nX1000000Y0D02*\nG02X0Y1000000I-1000000J0D01*")
    pts = rings(rec, 0)[0]
    # Clockwise from (1,0) to (0,1) sweeps 270 degrees through (0,-1) and (-1,0).
    # (vertices are on the circle; the extreme points lie within the chord tolerance)
    assert pts[:, 1].min() == pytest.approx(-1.0, abs=ARC_CHORD_TOLERANCE_MM)
    assert pts[:, 0].min() == pytest.approx(-1.0, abs=ARC_CHORD_TOLERANCE_MM)
    ang = np.unwrap(np.arctan2(pts[:, 1], pts[:, 0]))
    assert ang[-1] - ang[0] == pytest.approx(-1.5 * math.pi)


def test_g75_full_circle_when_start_equals_end() -> None:
    rec = gbr("%ADD10C,0.1*%\nD10*\nG75*\nX2000000Y0D02*\nG03X2000000Y0I-2000000J0D01*")
    pts = rings(rec, 0)[0]
    np.testing.assert_allclose(pts[0], pts[-1])
    area = Polygon(pts).area
    assert math.pi * 4 - 2 * math.pi * 2 * ARC_CHORD_TOLERANCE_MM <= area <= math.pi * 4
    assert sagitta_ok(pts, 0, 0, 2.0)


def test_g74_single_quadrant_chooses_centre_sign() -> None:
    # G74: I and J are unsigned; from (1, 0) CCW to (0, 1) the centre must be (0, 0)
    # (start - (1, 0)), the only candidate giving equal radii and a sweep <= 90 degrees.
    g74 = gbr("%ADD10C,0.1*%\nD10*\nG74*\nX1000000Y0D02*\nG03X0Y1000000I1000000J0D01*")
    pts = rings(g74, 0)[0]
    np.testing.assert_allclose(np.hypot(pts[:, 0], pts[:, 1]), 1.0, atol=1e-12)
    assert pts[:, 0].min() >= -1e-12
    assert pts[:, 1].min() >= -1e-12
    # The same statement under G75 takes I = +1 literally: centre (2, 0).
    g75 = gbr("%ADD10C,0.1*%\nD10*\nG75*\nX1000000Y0D02*\nG03X0Y1000000I1000000J0D01*")
    q = rings(g75, 0)[0]
    assert not np.allclose(np.hypot(q[:, 0], q[:, 1]), 1.0)
    assert any("G74" in n.message for n in g74.notices)


def test_g74_zero_length_arc_is_not_a_full_circle() -> None:
    rec = gbr("%ADD10C,0.1*%\nD10*\nG74*\nX1000000Y0D02*\nG03X1000000Y0I1000000J0D01*")
    np.testing.assert_allclose(rings(rec, 0)[0], [[1, 0], [1, 0]])


# ----------------------------------------------------------------------------- regions


def test_region_with_d02_contour_breaks() -> None:
    body = (
        "G01*\nG36*\n"
        "X0Y0D02*\nX1000000Y0D01*\nX1000000Y1000000D01*\nX0Y1000000D01*\nX0Y0D01*\n"
        "X5000000Y0D02*\nX7000000Y0D01*\nX7000000Y2000000D01*\nX5000000Y2000000D01*\n"
        "X5000000Y0D01*\nG37*"
    )
    rec = gbr(body)
    assert list(rec.obj_kind) == [REGION]
    assert rec.obj_aperture[0] == -1
    rs = rings(rec, 0)
    assert len(rs) == 2
    for r in rs:
        np.testing.assert_allclose(r[0], r[-1])
    assert Polygon(rs[0]).area == pytest.approx(1.0)
    assert Polygon(rs[1]).area == pytest.approx(4.0)
    np.testing.assert_allclose(rec.obj_xy[0], [0, 0])


def test_region_with_arc_and_unclosed_contour() -> None:
    # Half disc of radius 1: (1,0) -> arc CCW to (-1,0) -> straight back (not closed).
    body = "G75*\nG36*\nX1000000Y0D02*\nG03X-1000000Y0I-1000000J0D01*\nG37*"
    rec = gbr(body)
    (r,) = rings(rec, 0)
    np.testing.assert_allclose(r[0], r[-1])
    area = Polygon(r).area
    assert math.pi / 2 - math.pi * ARC_CHORD_TOLERANCE_MM <= area <= math.pi / 2
    assert any("closed" in n.message for n in rec.notices)


def test_region_attributes_and_polarity() -> None:
    body = (
        "%TA.AperFunction,Conductor*%\n%TO.N,GND*%\n%LPC*%\nG01*\nG36*\n"
        "X0Y0D02*\nX1000000Y0D01*\nX0Y1000000D01*\nX0Y0D01*\nG37*\n%TD*%"
    )
    rec = gbr(body)
    assert not rec.obj_dark[0]
    assert rec.functions[rec.obj_function[0]] == "Conductor"
    assert rec.nets[rec.obj_net[0]] == "GND"


# ----------------------------------------------------------------------------- polarity


def test_polarity_in_file_order_and_negative_image() -> None:
    rec = gbr(
        "%ADD10C,1*%\nD10*\nX0Y0D03*\n%LPC*%\nX0Y0D03*\n%LPD*%\nX1000000Y0D03*",
        head="%FSLAX46Y46*%\n%MOMM*%\n%IPNEG*%\n",
    )
    assert list(rec.obj_dark) == [True, False, True]
    assert rec.negative_image
    assert not gbr("%ADD10C,1*%").negative_image


# ----------------------------------------------------------------------------- LM/LR/LS

TRI = "%AMTRI*4,1,3,0,0,1,0.5,0,1,0,0,0*%\n"


def part_ring(rec: ArtworkRecord, i: int) -> np.ndarray:
    ap = rec.apertures[rec.obj_aperture[i]]
    return ap.parts[0][1]


def test_lr_rotates_a_rectangle_flash() -> None:
    rec = gbr("%ADD10R,2X1*%\nD10*\nX0Y0D03*\n%LR90*%\nX0Y0D03*")
    a, b = part_ring(rec, 0), part_ring(rec, 1)
    np.testing.assert_allclose(np.ptp(a, axis=0), [2, 1])
    np.testing.assert_allclose(np.ptp(b, axis=0), [1, 2], atol=1e-12)
    assert rec.obj_aperture[0] != rec.obj_aperture[1]
    assert rec.apertures[rec.obj_aperture[1]].code == 10


def test_lm_mirror_then_rotate_then_scale() -> None:
    # Macro triangle with vertex (1, 0.5). Spec 4.9.1 (order from memory): mirroring, then
    # rotation, then scaling. LMX: (1, 0.5) -> (-1, 0.5); LR90: -> (-0.5, -1);
    # LS2: -> (-1, -2). Rotating first would give (0.5, 1) -> (1, 2) instead.
    rec = gbr(TRI + "%ADD10TRI*%\nD10*\n%LMX*%\n%LR90*%\n%LS2*%\nX0Y0D03*")
    ring = part_ring(rec, 0)
    assert np.any(np.all(np.isclose(ring, [-1.0, -2.0], atol=1e-12), axis=1))
    assert not np.any(np.all(np.isclose(ring, [1.0, 2.0], atol=1e-12), axis=1))


def test_lmy_and_lmxy() -> None:
    rec = gbr(TRI + "%ADD10TRI*%\nD10*\n%LMY*%\nX0Y0D03*\n%LMXY*%\nX0Y0D03*")
    y, xy = part_ring(rec, 0), part_ring(rec, 1)
    assert np.any(np.all(np.isclose(y, [1.0, -0.5], atol=1e-12), axis=1))
    assert np.any(np.all(np.isclose(xy, [-1.0, -0.5], atol=1e-12), axis=1))


def test_transform_applies_to_draw_aperture_and_is_cached() -> None:
    rec = gbr(
        "%ADD10R,2X1*%\n%ADD11C,1*%\nD10*\n%LR90*%\nX0Y0D02*\nX1000000Y0D01*\nX5000000Y0D03*\n"
        "D11*\n%LS3*%\nX9000000Y0D03*\n%LR0*%\n%LS1*%\nD10*\nX0Y0D03*"
    )
    ap = [rec.apertures[i] for i in rec.obj_aperture]
    # track and flash with R 2x1 under LR90 share one transformed entry
    assert rec.obj_aperture[0] == rec.obj_aperture[1]
    np.testing.assert_allclose(np.ptp(ap[0].parts[0][1], axis=0), [1, 2], atol=1e-12)
    assert ap[2].circle_diameter_mm == pytest.approx(3.0)
    np.testing.assert_allclose(np.ptp(ap[3].parts[0][1], axis=0), [2, 1])
    assert len(rec.apertures) == 3


# ----------------------------------------------------------------------------- SR and AB


def test_step_and_repeat_copies_and_offsets() -> None:
    rec = gbr(
        "%ADD10C,0.5*%\nD10*\n%SRX3Y2I5.0J4.0*%\nX1000000Y0D03*\nX0Y0D02*\nX1000000Y1000000D01*\n"
        "%SR*%\nX-9000000Y0D03*"
    )
    assert rec.n_objects == 3 * 2 * 2 + 1
    flashes = rec.obj_xy[rec.obj_kind == FLASH]
    expect = {(1 + 5 * i, 4 * j) for i in range(3) for j in range(2)} | {(-9, 0)}
    assert {(round(x, 9), round(y, 9)) for x, y in flashes} == expect
    tracks = np.flatnonzero(rec.obj_kind == TRACK)
    starts = {tuple(np.round(rings(rec, i)[0][0], 9)) for i in tracks}
    assert starts == {(5.0 * i, 4.0 * j) for i in range(3) for j in range(2)}
    for i in tracks:
        r = rings(rec, i)[0]
        np.testing.assert_allclose(r[1] - r[0], [1, 1])
    assert rec.obj_kind[-1] == FLASH  # objects after the SR block follow it


def test_block_aperture_nesting_polarity_and_transform() -> None:
    body = (
        "%ADD10C,0.5*%\n"
        "%ABD12*%\nD10*\nX1000000Y0D03*\n%LPC*%\nX2000000Y0D03*\n%LPD*%\n%AB*%\n"
        "%ABD13*%\nD12*\nX0Y1000000D03*\n%AB*%\n"
        "D13*\nX10000000Y10000000D03*\n"
        "%LPC*%\n%LR90*%\nX20000000Y0D03*\n"
    )
    rec = gbr(body)
    assert rec.n_objects == 4
    # first flash of D13: D12 at (0,1) + (10,10): flashes at (11,11) dark, (12,11) clear
    np.testing.assert_allclose(rec.obj_xy[:2], [[11, 11], [12, 11]])
    assert list(rec.obj_dark[:2]) == [True, False]
    # second flash under LPC and LR90: (1,1) -> (-1,1), (2,1) -> (-1,2), + (20, 0),
    # polarities toggled
    np.testing.assert_allclose(rec.obj_xy[2:], [[19, 1], [19, 2]], atol=1e-12)
    assert list(rec.obj_dark[2:]) == [False, True]
    assert all(rec.apertures[a].code == 10 for a in rec.obj_aperture)


# ----------------------------------------------------------------------------- attributes


def test_attributes_real_and_in_comments() -> None:
    body = (
        "%TF.FileFunction,Copper,L2,Inr*%\n"
        "G04 #@! TF.FilePolarity,Positive*\n"
        "G04 just a comment*\n"
        "%TA.AperFunction,SMDPad,CuDef*%\n%ADD10R,1X1*%\n%TD*%\n"
        "G04 #@! TA.AperFunction,Conductor*\n%ADD11C,0.2*%\nG04 #@! TD.AperFunction*\n"
        "%ADD12C,0.3*%\n"
        "%TO.N,VIN,extra*%\n%TO.C,L1*%\nD10*\nX0Y0D03*\n"
        "%TD.C*%\nD11*\nX0Y0D02*\nX1000000Y0D01*\n"
        "%TD*%\nG04 #@! TO.N,SW*\nD12*\nX2000000Y0D03*\nG04 #@! TD*\nX3000000Y0D03*"
    )
    rec = gbr(body)
    assert rec.file_attributes == {"FileFunction": "Copper,L2,Inr", "FilePolarity": "Positive"}
    assert "just a comment" in rec.comments
    fn = [rec.functions[i] if i >= 0 else None for i in rec.obj_function]
    net = [rec.nets[i] if i >= 0 else None for i in rec.obj_net]
    comp = [rec.components[i] if i >= 0 else None for i in rec.obj_component]
    assert fn == ["SMDPad,CuDef", "Conductor", None, None]
    assert net == ["VIN", "VIN", "SW", None]
    assert comp == ["L1", None, None, None]
    assert rec.apertures[rec.obj_aperture[0]].function == "SMDPad,CuDef"


def test_attribute_value_escapes() -> None:
    rec = gbr("%TF.Part,Single\\u002C board*%")
    assert rec.file_attributes["Part"] == "Single, board"


def test_in_name_kept_as_comment() -> None:
    rec = gbr("%INTOP COPPER*%\n%LNlayer1*%")
    assert "IN TOP COPPER" in rec.comments
    assert any("%LN" in n.message for n in rec.notices)


# ----------------------------------------------------------------------------- end of file


def test_missing_m02_and_data_after_m02() -> None:
    rec = gbr("%ADD10C,1*%\nD10*\nX0Y0D03*", end="")
    assert rec.n_objects == 1
    assert any("M02" in n.message and "truncated" in n.message for n in rec.notices)
    rec2 = gbr("%ADD10C,1*%\nD10*\nX0Y0D03*", end="M02*\nX1Y1D03*\n")
    assert rec2.n_objects == 1
    assert any("after the end-of-file" in n.message for n in rec2.notices)
    rec3 = gbr("%ADD10C,1*%\nD10*\nX0Y0D03*\nX1000", end="")
    assert rec3.n_objects == 1
    assert any("ends inside a statement" in n.message for n in rec3.notices)


def test_notice_names_file_and_line() -> None:
    rec = gbr("%ADD10C,1*%\nD10*\nG74*\nX0Y0D03*")
    (n,) = [n for n in rec.notices if "G74" in n.message]
    assert n.file == "t.gbr"
    assert n.line == 5
    assert str(n).startswith("t.gbr:5: ")


def test_offset_and_scale_factor_applied() -> None:
    rec = gbr(
        "%ADD10C,1*%\nD10*\nX1000000Y1000000D03*",
        head="%FSLAX46Y46*%\n%MOMM*%\n%OFA1.0B-2.0*%\n%SFA2B2*%\n",
    )
    np.testing.assert_allclose(rec.obj_xy[0], [3.0, 0.0])
    assert rec.apertures[0].circle_diameter_mm == pytest.approx(2.0)


# ----------------------------------------------------------------------------- file entry points


def test_read_gerber_and_header(tmp_path: Path) -> None:
    text = (
        "G04 Layer: TopLayer*\n%TF.GenerationSoftware,Test,gen,1*%\n"
        "G04 #@! TF.FileFunction,Copper,L1,Top*\n%FSLAX46Y46*%\n%MOIN*%\n%ADD10C,0.01*%\n"
        "D10*\nX1000000Y0D03*\nM02*\n"
    )
    p = tmp_path / "a b.gtl"
    p.write_text(text, encoding="utf-8")
    rec = read_gerber(p)
    assert rec.source == str(p)
    assert rec.size_bytes == len(text.encode())
    attrs, comments, units = read_gerber_header(p)
    assert attrs == {"GenerationSoftware": "Test,gen,1", "FileFunction": "Copper,L1,Top"}
    assert attrs == rec.file_attributes
    assert comments == rec.comments
    assert comments[0] == "Layer: TopLayer"
    assert units == "inch"
    # a scan cut short still returns the complete statements before the cut
    attrs2, comments2, units2 = read_gerber_header(p, max_bytes_scanned=40)
    assert comments2 == ("Layer: TopLayer",)
    assert attrs2 == {}
    assert units2 is None


def test_looks_like_gerber() -> None:
    assert looks_like_gerber("%FSLAX46Y46*%\n%MOMM*%\n")
    assert looks_like_gerber("G04 Layer: TopLayer*\nG04 x*\nX1Y1D02*\n")
    assert looks_like_gerber("G04*\nG04 #@! TF.GenerationSoftware,x*\n")
    excellon = "M48\n;FILE_FORMAT=2:5\nINCH,LZ\nT01C0.0100\n%\nT01\nX0290146Y-01000\nM30\n"
    assert not looks_like_gerber(excellon)
    assert not looks_like_gerber("Designator,Mid X,Mid Y,Layer,Rotation\nL1,1mm,2mm,T,90\n")
    assert not looks_like_gerber('{"Header": {"GenerationSoftware": {}}}')
    assert not looks_like_gerber(
        "# Notes\n- `%FSLAX45Y45*%` mm; `G36*` regions, `X1Y1D03*` flashes\n"
    )


def test_comment_with_percent_sign_on_one_line() -> None:
    rec = gbr("G04 Scale: 100%, mirrored: no*\n%ADD10C,1*%\nD10*\nX0Y0D03*")
    assert "Scale: 100%, mirrored: no" in rec.comments
    assert rec.n_objects == 1
    assert scan_header("G04 Scale: 100%, mirrored: no*\n%MOMM*%\n") == (
        {},
        ("Scale: 100%, mirrored: no",),
        "mm",
    )


def test_large_region_dedupes_and_closes() -> None:
    # 300-gon (large enough for the array path), one vertex written twice, not closed
    ang = np.arange(300) * 2 * np.pi / 300
    pts = np.round(np.column_stack([np.cos(ang), np.sin(ang)]) * 1e6).astype(int)
    lines = [f"X{x}Y{y}D01*" for x, y in pts[1:]]
    lines.insert(10, lines[9])
    body = "G01*\nG36*\n" + f"X{pts[0][0]}Y{pts[0][1]}D02*\n" + "\n".join(lines) + "\nG37*"
    rec = gbr(body)
    (ring,) = rings(rec, 0)
    assert ring.shape == (301, 2)
    np.testing.assert_array_equal(ring[0], ring[-1])
    np.testing.assert_allclose(ring[:-1], pts / 1e6)
    assert any("closed" in n.message for n in rec.notices)


def test_m00_m01_and_unknown_g_code() -> None:
    rec = gbr(
        "%ADD10C,1*%\nD10*\nG10*\nX0Y0D03*\nM01*\nX1000000Y0D03*\nM00*\nX2000000Y0D03*", end=""
    )
    assert rec.n_objects == 2
    msgs = " ".join(n.message for n in rec.notices)
    assert "G10" in msgs
    assert "M01" in msgs
    assert "M00" in msgs
    assert "after the end-of-file" in msgs
    assert "truncated" not in msgs


def test_arc_before_any_quadrant_mode() -> None:
    # No G74/G75: a consistent multi-quadrant centre is used (with a notice) ...
    rec = gbr("%ADD10C,0.1*%\nD10*\nX1000000Y0D02*\nG03X0Y1000000I-1000000J0D01*")
    pts = rings(rec, 0)[0]
    np.testing.assert_allclose(np.hypot(pts[:, 0], pts[:, 1]), 1.0, atol=1e-12)
    assert any("G74/G75" in n.message for n in rec.notices)
    # ... and unsigned offsets that only make sense single-quadrant are read that way
    rec2 = gbr("%ADD10C,0.1*%\nD10*\nX1000000Y0D02*\nG03X0Y1000000I1000000J0D01*")
    q = rings(rec2, 0)[0]
    np.testing.assert_allclose(np.hypot(q[:, 0], q[:, 1]), 1.0, atol=1e-12)
