"""Excellon reader: synthetic snippets for every feature, coordinates computed by hand.

Zero-suppression convention checked here (common practice, from memory of the Excellon
format description): ``LZ`` means leading zeros are *kept* (trailing ones dropped, so the
number is padded on the right), ``TZ`` means trailing zeros are kept (leading ones dropped,
the number is an integer count of the last decimal place).

Routed arcs (common practice, from memory): ``G02`` clockwise, ``G03`` counter-clockwise,
``I``/``J`` are the centre's offsets from the arc's start point, a positive ``A`` radius takes
the arc shorter than 180 degrees and a negative one the longer arc.
"""

from __future__ import annotations

import math
from pathlib import Path

import numpy as np
import pytest

from fluxshadow.errors import InputError, LimitError, ParseError
from fluxshadow.io.excellon import looks_like_excellon, parse_excellon, read_excellon

IN = 25.4


def drill(body: str, header: str = "METRIC", **kw: str) -> object:
    """Parse a minimal file: M48, header lines, a 1 mm tool T1, %, body."""
    text = f"M48\n{header}\nT1C1.000\n%\nT1\n{body}\nM30\n"
    return parse_excellon(text, **kw)


# --- units, formats, zero suppression -------------------------------------------------


def test_metric_lz_with_digit_pattern() -> None:
    rec = parse_excellon("M48\nMETRIC,LZ,000.000\nT01C0.310\n%\nT01\nX045720Y024765\nM30\n")
    # 3:3, leading zeros kept: 045720 -> 045.720 mm
    np.testing.assert_allclose(rec.hole_xy, [[45.720, 24.765]])
    assert rec.units_in_file == "mm"
    np.testing.assert_allclose(rec.hole_diameter_mm, [0.310])
    assert rec.notices == ()


def test_inch_lz_file_format_comment_pads_right() -> None:
    text = "M48\n;FILE_FORMAT=2:5\nINCH,LZ\nT4F00S00C0.01969\n%\nT04\nX0290146Y-01925\nM30\n"
    rec = parse_excellon(text)
    # 0290146 -> 02.90146 in; -01925 padded to -0192500 -> -01.92500 in
    np.testing.assert_allclose(rec.hole_xy, [[2.90146 * IN, -1.925 * IN]])
    np.testing.assert_allclose(rec.hole_diameter_mm, [0.01969 * IN])
    assert rec.units_in_file == "inch"


def test_tz_keeps_trailing_zeros() -> None:
    rec = drill("X15000Y-2500", header="INCH,TZ\n;FILE_FORMAT=2:4")
    # trailing zeros kept, 4 decimals: 15000 -> 1.5000 in, -2500 -> -0.2500 in
    np.testing.assert_allclose(rec.hole_xy, [[1.5 * IN, -0.25 * IN]])


def test_decimal_coordinates_read_as_written() -> None:
    rec = drill("X1.5Y-2.25\nX.5Y3.")
    np.testing.assert_allclose(rec.hole_xy, [[1.5, -2.25], [0.5, 3.0]])
    assert rec.notices == ()


def test_defaults_inch_2_4_with_notices() -> None:
    rec = drill("X10000Y5000", header="INCH")
    # no format, no zero mode: 2:4 and leading zeros suppressed -> 1.0000 in, 0.5000 in
    np.testing.assert_allclose(rec.hole_xy, [[1.0 * IN, 0.5 * IN]])
    messages = " | ".join(n.message for n in rec.notices)
    assert "2:4 assumed" in messages
    assert "leading zeros assumed suppressed" in messages
    assert all(n.line == 6 for n in rec.notices)


def test_defaults_metric_3_3() -> None:
    rec = drill("X001Y0015", header="METRIC,LZ")
    # 3:3 leading zeros kept: 001 -> 001000 -> 1.000 mm, 0015 -> 001500 -> 1.5 mm
    np.testing.assert_allclose(rec.hole_xy, [[1.0, 1.5]])
    assert any("3:3 assumed" in n.message for n in rec.notices)


def test_format_hint_dot_style() -> None:
    rec = drill("X0012Y00125", header="METRIC,LZ\n;Format: 4.2")
    # 4:2 -> 001200 = 0012.00 mm, 001250 = 0012.50 mm (3:3 would give 1.2 and 1.25)
    np.testing.assert_allclose(rec.hole_xy, [[12.0, 12.5]])


def test_format_hint_brace_style_sets_zero_mode() -> None:
    header = "; FORMAT={3:3/ absolute / metric / suppress trailing zeros}\nMETRIC"
    rec = drill("X0125Y-0125", header=header)
    # trailing zeros suppressed = leading kept: 0125 -> 012500 -> 12.5 mm
    np.testing.assert_allclose(rec.hole_xy, [[12.5, -12.5]])
    assert rec.notices == ()


def test_m71_m72_switch_units() -> None:
    text = "M48\nINCH\nT1C0.0100\n%\nT1\nX1.0Y2.0\nM71\nX10.0Y20.0\nM72\nX0.5Y0.5\nM30\n"
    rec = parse_excellon(text)
    np.testing.assert_allclose(
        rec.hole_xy, [[1.0 * IN, 2.0 * IN], [10.0, 20.0], [0.5 * IN, 0.5 * IN]]
    )
    np.testing.assert_allclose(rec.hole_diameter_mm, [0.254] * 3)
    assert rec.units_in_file == "inch"


def test_crlf_and_lowercase_and_trailing_comment() -> None:
    text = "M48\r\nmetric\r\nt1c0.5 ; small\r\n%\r\nt1\r\nx1.0y2.0\r\nm30\r\n"
    rec = parse_excellon(text)
    np.testing.assert_allclose(rec.hole_xy, [[1.0, 2.0]])
    np.testing.assert_allclose(rec.hole_diameter_mm, [0.5])


# --- tools and coordinates -------------------------------------------------------------


def test_tool_tables_and_body_tool_definition() -> None:
    text = (
        "M48\nMETRIC\nT01F00S00C0.300\nT2C0.800F100S3\n%\n"
        "T01\nX1.0Y1.0\nT02\nX2.0Y2.0\nT3C1.5\nX3.0Y3.0\nT0\nM30\n"
    )
    rec = parse_excellon(text)
    np.testing.assert_allclose(rec.hole_diameter_mm, [0.3, 0.8, 1.5])
    assert rec.tool_count == 3


def test_modal_coordinates() -> None:
    rec = drill("X1.0Y2.0\nY3.0\nX4.0\nX5.0Y6.0")
    np.testing.assert_allclose(rec.hole_xy, [[1, 2], [1, 3], [4, 3], [5, 6]])


def test_incremental_and_zero_offset() -> None:
    rec = drill("G91\nX1.0Y1.0\nX1.0Y1.0\nG90\nG93X10.0Y20.0\nX1.0Y1.0")
    np.testing.assert_allclose(rec.hole_xy, [[1, 1], [2, 2], [11, 21]])


def test_repeat_code() -> None:
    rec = drill("X1.0Y1.0\nR3X0.5Y-0.25")
    np.testing.assert_allclose(rec.hole_xy, [[1, 1], [1.5, 0.75], [2.0, 0.5], [2.5, 0.25]])


def test_undefined_tool_gives_zero_diameter_and_notice() -> None:
    rec = parse_excellon("M48\nMETRIC\n%\nT7\nX1.0Y1.0\nM30\n", source="u.drl")
    np.testing.assert_allclose(rec.hole_diameter_mm, [0.0])
    assert any("T7" in n.message and n.line == 4 for n in rec.notices)


def test_statements_after_m30_ignored() -> None:
    rec = drill("X1.0Y1.0\nM30\nX9.0Y9.0")
    assert len(rec.hole_xy) == 1


# --- slots and routing -----------------------------------------------------------------


def test_g85_slot_with_modal_y() -> None:
    rec = drill("X1.0Y2.0G85X3.0Y2.0\nG05\nX1.0Y5.0G85X4.0")
    np.testing.assert_allclose(rec.slot_xy, [[[1, 2], [3, 2]], [[1, 5], [4, 5]]])
    np.testing.assert_allclose(rec.slot_diameter_mm, [1.0, 1.0])
    assert len(rec.hole_xy) == 0


def test_routed_linear_path_becomes_consecutive_slots() -> None:
    body = "G00X1.0Y1.0\nM15\nG01X3.0Y1.0\nY2.0\nM16\nG05\nX7.0Y7.0"
    rec = drill(body)
    np.testing.assert_allclose(rec.slot_xy, [[[1, 1], [3, 1]], [[3, 1], [3, 2]]])
    np.testing.assert_allclose(rec.hole_xy, [[7, 7]])


def test_moves_with_tool_retracted_cut_nothing() -> None:
    rec = drill("G00X1.0Y1.0\nG01X2.0Y1.0\nM15\nG01X2.0Y3.0\nM17\nG01X5.0")
    np.testing.assert_allclose(rec.slot_xy, [[[2, 1], [2, 3]]])
    assert any("retracted" in n.message for n in rec.notices)


def _on_circle(points: np.ndarray, cx: float, cy: float, r: float) -> None:
    np.testing.assert_allclose(np.hypot(points[:, 0] - cx, points[:, 1] - cy), r, atol=1e-12)


def test_ccw_arc_with_radius_linearised() -> None:
    rec = drill("G00X1.0Y0.0\nM15\nG03X0.0Y1.0A1.0\nM16")
    seg = rec.slot_xy
    # quarter circle about (0, 0), radius 1: 10 degree chords at most -> 9 chords
    assert seg.shape == (9, 2, 2)
    np.testing.assert_allclose(seg[0, 0], [1, 0])
    np.testing.assert_allclose(seg[-1, 1], [0, 1], atol=1e-12)
    np.testing.assert_allclose(seg[1:, 0], seg[:-1, 1])  # consecutive
    _on_circle(seg.reshape(-1, 2), 0.0, 0.0, 1.0)
    angles = np.degrees(np.arctan2(seg[:, 1, 1], seg[:, 1, 0]))
    assert np.all(np.diff(angles) > 0)  # counter-clockwise
    np.testing.assert_allclose(angles[0], 10.0)


def test_cw_arc_with_ij_takes_the_short_way() -> None:
    rec = drill("G00X0.0Y1.0\nM15\nG02X1.0Y0.0I0.0J-1.0\nM16")
    pts = rec.slot_xy.reshape(-1, 2)
    _on_circle(pts, 0.0, 0.0, 1.0)
    assert np.all(pts >= -1e-12)  # stays in the first quadrant
    np.testing.assert_allclose(rec.slot_xy[-1, 1], [1, 0], atol=1e-12)


def test_negative_radius_takes_the_long_way() -> None:
    rec = drill("G00X1.0Y0.0\nM15\nG03X0.0Y1.0A-1.0\nM16")
    pts = rec.slot_xy.reshape(-1, 2)
    # centre (1, 1): from -90 deg counter-clockwise to 180 deg, 270 deg of arc
    _on_circle(pts, 1.0, 1.0, 1.0)
    assert len(rec.slot_xy) == 27
    chord = 2 * math.sin(math.radians(5.0))
    lengths = np.hypot(*(rec.slot_xy[:, 1] - rec.slot_xy[:, 0]).T)
    np.testing.assert_allclose(lengths, chord)


def test_large_arc_chords_respect_sagitta() -> None:
    rec = drill("G00X100.0Y0.0\nM15\nG03X-100.0Y0.0I-100.0J0.0\nM16")
    seg = rec.slot_xy
    half = np.hypot(*(seg[:, 1] - seg[:, 0]).T) / 2
    sagitta = 100.0 - np.sqrt(100.0**2 - half**2)
    assert sagitta.max() <= 0.005 + 1e-9


# --- plating and span ------------------------------------------------------------------


def test_plating_per_tool_from_attributes() -> None:
    text = (
        "M48\n; #@! TF.FileFunction,MixedPlating,1,4\nINCH\n"
        "; #@! TA.AperFunction,Plated,PTH,ViaDrill\nT1C0.0100\n"
        "; #@! TA.AperFunction,NonPlated,NPTH,ComponentDrill\nT2C0.1000\n%\n"
        "T1\nX1.0Y1.0\nT2\nX2.0Y2.0\nX0.1Y0.1G85X0.5Y0.1\nM30\n"
    )
    rec = parse_excellon(text)
    assert rec.hole_plated.tolist() == [True, False]
    assert rec.slot_plated.tolist() == [False]
    assert rec.plating_from == "attribute"
    assert rec.span is None


def test_plating_from_type_comments() -> None:
    text = (
        "M48\n;FILE_FORMAT=4:4\nMETRIC,LZ\n;TYPE=PLATED\nT2F00S00C0.2000\n"
        ";TYPE=NON_PLATED\nT4F00S00C0.8000\n%\nT02\nX0001Y0001\nT04\nX0002Y0002\nM30\n"
    )
    rec = parse_excellon(text)
    assert rec.hole_plated.tolist() == [True, False]
    np.testing.assert_allclose(rec.hole_xy, [[1.0, 1.0], [2.0, 2.0]])
    assert rec.plating_from == "comment"


def test_plating_from_file_function() -> None:
    text = "M48\n; #@! TF.FileFunction,NonPlated,1,2,NPTH\nMETRIC\nT1C3.0\n%\nT1\nX1.0Y1.0\n"
    rec = parse_excellon(text, source="board-PTH.drl")  # attribute beats the name
    assert rec.hole_plated.tolist() == [False]
    assert rec.plating_from == "attribute"


@pytest.mark.parametrize(
    ("name", "plated", "how"),
    [
        ("board-NPTH.drl", False, "file name"),
        ("board_NonPlated.txt", False, "file name"),
        ("board-unplated.drl", False, "file name"),
        ("board-PTH.drl", True, "file name"),
        ("board.drl", True, "assumed plated"),
    ],
)
def test_plating_from_file_name(name: str, plated: bool, how: str) -> None:
    rec = drill("X1.0Y1.0", source=f"/some/dir/{name}")
    assert rec.hole_plated.tolist() == [plated]
    assert rec.plating_from == how


def test_filename_hint_overrides_source() -> None:
    rec = drill("X1.0Y1.0", source="<upload>", filename_hint="x-NPTH.drl")
    assert rec.hole_plated.tolist() == [False]


@pytest.mark.parametrize(
    ("function", "span"),
    [
        ("Plated,1,2,Blind", (1, 2)),
        ("Plated,3,2,Buried", (2, 3)),
        ("NonPlated,5,8,Blind,Drill", (5, 8)),
        ("Plated,1,4,PTH", None),
        ("MixedPlating,1,6", None),
    ],
)
def test_span_from_file_function(function: str, span: tuple[int, int] | None) -> None:
    rec = drill("X1.0Y1.0", header=f"; #@! TF.FileFunction,{function}\nMETRIC")
    assert rec.span == span


def test_pair_extension_without_span_gives_notice() -> None:
    rec = drill("X1.0Y1.0", source="board.TX1")
    assert rec.span is None
    assert any("layer span" in n.message for n in rec.notices)


# --- errors ----------------------------------------------------------------------------


@pytest.mark.parametrize(
    ("line", "fragment"),
    [
        ("X1.0Y2.0Z3.0", "coordinates must be"),
        ("X1.0.0Y2.0", "coordinates must be"),
        ("G99", "G code must be"),
        ("M80", "M code must be"),
        ("HELLO", "known Excellon command"),
        ("G00X0Y0\nM15\nG02X10.0Y0A1.0", "arc radius must be"),
        ("G00X0Y0\nM15\nG02X10.0Y0", "radius A or centre"),
    ],
)
def test_malformed_lines_raise_with_file_and_line(line: str, fragment: str) -> None:
    text = "M48\nMETRIC\nT1C1.0\n%\nT1\n" + line + "\nM30\n"
    bad_line = 5 + line.count("\n") + 1
    with pytest.raises(ParseError) as info:
        parse_excellon(text, source="bad.drl")
    err = info.value
    assert err.file == "bad.drl"
    assert err.line == bad_line
    assert str(err).startswith(f"bad.drl:{bad_line}: ")
    assert fragment in str(err)


def test_hole_before_any_tool_is_an_error() -> None:
    with pytest.raises(ParseError, match=r"x\.drl:4: a tool must be selected"):
        parse_excellon("M48\nMETRIC\n%\nX1.0Y1.0\n", source="x.drl")


def test_bad_unit_option_is_an_error() -> None:
    with pytest.raises(ParseError, match=r"<string>:2: unit statement options"):
        parse_excellon("M48\nMETRIC,QZ\n%\n")


def test_unknown_header_statement_is_a_notice() -> None:
    rec = parse_excellon("M48\nMETRIC\nWHATEVER,1\nT1C1.0\n%\nT1\nX1.0Y1.0\n")
    assert [n.line for n in rec.notices] == [3]


def test_read_excellon_limits_and_binary(tmp_path: Path) -> None:
    good = tmp_path / "a.drl"
    good.write_text("M48\nMETRIC\nT1C1.0\n%\nT1\nX1.0Y1.0\nM30\n")
    assert read_excellon(good).hole_xy.shape == (1, 2)
    with pytest.raises(LimitError, match="at most 10 bytes"):
        read_excellon(good, max_bytes=10)
    binary = tmp_path / "b.drl"
    binary.write_bytes(b"M48\x00\x01\x02")
    with pytest.raises(InputError, match="must be text"):
        read_excellon(binary)
    with pytest.raises(InputError, match="must be readable"):
        read_excellon(tmp_path / "missing.drl")


def test_empty_file_gives_empty_record() -> None:
    rec = parse_excellon("")
    assert rec.hole_xy.shape == (0, 2)
    assert rec.slot_xy.shape == (0, 2, 2)
    assert rec.hole_diameter_mm.shape == (0,)
    assert rec.tool_count == 0


# --- detection -------------------------------------------------------------------------


@pytest.mark.parametrize(
    "head",
    [
        "M48\nMETRIC,LZ\nT1C0.3\n%\n",
        "; a comment first\nM48\nINCH\n",
        "INCH,TZ\nT1C0.0300\n%\nT1\nX1000Y1000\n",
        "T1C0.0300\nT1\nX1000Y1000\nX2000Y2000\n",
    ],
)
def test_looks_like_excellon_true(head: str) -> None:
    assert looks_like_excellon(head)


@pytest.mark.parametrize(
    "head",
    [
        "%FSLAX46Y46*%\n%MOMM*%\nG04 comment*\nX100Y100D03*\n",
        "G04 Layer: TopLayer*\n%FSLAX45Y45*%\n",
        "Designator,Mid X,Mid Y,Layer,Rotation\nC1,1,2,top,0\n",
        "",
        "hello world\n",
    ],
)
def test_looks_like_excellon_false(head: str) -> None:
    assert not looks_like_excellon(head)
