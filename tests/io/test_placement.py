"""Placement and BOM readers: synthetic snippets for every dialect feature."""

from __future__ import annotations

from pathlib import Path

import pytest

from fluxshadow.errors import InputError, Notice
from fluxshadow.io.placement import (
    decode_table,
    join_bom,
    parse_bom,
    parse_placement,
    read_bom,
    read_placement,
    sniff_table,
)
from fluxshadow.io.records import BomRow, PlacementRow


def rows_of(text: str, source: str = "p.csv") -> list[PlacementRow]:
    rows, _ = parse_placement(text, source=source)
    return rows


def by_ref(rows: list[PlacementRow]) -> dict[str, PlacementRow]:
    return {r.ref: r for r in rows}


# --- placement dialects ----------------------------------------------------------------


def test_quoted_csv_with_value_package_side() -> None:
    text = (
        "Ref,Val,Package,PosX,PosY,Rot,Side\n"
        '"C1","100n","C_0603",24.900001,27.317514,270.000000,top\n'
        '"L1","22u","L_6x6",10.900000,50.200000,270.000000,bottom\n'
    )
    rows, notices = parse_placement(text, source="a.csv")
    l1 = by_ref(rows)["L1"]
    assert (l1.value, l1.package, l1.side) == ("22u", "L_6x6", "bottom")
    assert (l1.x_mm, l1.y_mm, l1.rotation_deg) == (10.9, 50.2, 270.0)
    assert (l1.source, l1.line) == ("a.csv", 3)
    # no unit anywhere: one notice, at the first data line
    assert [(n.file, n.line) for n in notices] == [("a.csv", 2)]
    assert "millimetres assumed" in notices[0].message


def test_cpl_without_values() -> None:
    rows = rows_of("Designator,Mid X,Mid Y,Layer,Rotation\nL1,10.9,50.2,top,270\n")
    assert rows[0].value == ""
    assert rows[0].package == ""
    assert (rows[0].x_mm, rows[0].y_mm) == (10.9, 50.2)


def test_midx_without_space_and_negative_rotation() -> None:
    text = "Designator,Val,Package,MidX,MidY,Rotation,Layer\nC2,0.1uF,C0402,4.48,25.49,-90,top\n"
    row = rows_of(text)[0]
    assert (row.x_mm, row.y_mm, row.rotation_deg) == (4.48, 25.49, 270.0)


def test_rotation_normalised_to_0_360() -> None:
    text = "Ref,X,Y,Rot,Side\nA,0,0,360,top\nB,0,0,-45,top\nC,0,0,720.5,top\n"
    assert [r.rotation_deg for r in rows_of(text)] == [0.0, 315.0, 0.5]


def test_banner_before_header_and_unit_in_column_name() -> None:
    text = (
        "Pick and Place Locations\n"
        "C:\\temp\\out\\file.csv\n"
        "\n"
        "==========\n"
        "Units used: mil\n"  # overruled by the column names below
        "\n"
        '"Designator","Center-X(mm)","Center-Y(mm)","Layer","Rotation"\n'
        '"BUZ1","34.9400","-5.7396","BottomLayer","270"\n'
        '"L1","49.8267","-38.3332","TopLayer","0"\n'
    )
    rows, notices = parse_placement(text, source="b.csv")
    assert [r.line for r in rows] == [8, 9]
    assert by_ref(rows)["BUZ1"].side == "bottom"
    assert by_ref(rows)["L1"].x_mm == pytest.approx(49.8267)
    assert notices == ()


def test_banner_units_mils() -> None:
    text = "Units used: mils\n\nDesignator,X,Y,Layer,Rotation\nR1,1000,-500,TopLayer,0\n"
    row = rows_of(text)[0]
    assert (row.x_mm, row.y_mm) == pytest.approx((25.4, -12.7))


@pytest.mark.parametrize(
    ("cell", "mm"),
    [
        ("45.72mm", 45.72),
        ("1800mil", 45.72),
        ("1.8in", 45.72),
        ("1.8 inch", 45.72),
        ("45,72", 45.72),
    ],
)
def test_unit_suffix_on_the_number(cell: str, mm: float) -> None:
    text = f'Ref;X;Y;Side;Rot\nR1;"{cell}";0mm;T;0\n'
    assert rows_of(text)[0].x_mm == pytest.approx(mm)


def test_header_unit_mil() -> None:
    row = rows_of("Ref,X (mil),Y (mil),Side,Rot\nR1,100,200,top,0\n")[0]
    assert (row.x_mm, row.y_mm) == pytest.approx((2.54, 5.08))


def test_commas_inside_quotes() -> None:
    text = (
        '"Designator","Comment","Layer","Footprint","Center-X(mm)","Center-Y(mm)","Rotation",'
        '"Description"\n'
        '"L2","0.47uH, 4A","BottomLayer","IND0806","24.2750","1.6500","90","power, 4 A"\n'
    )
    row = rows_of(text)[0]
    assert row.value == "0.47uH, 4A"
    assert row.description == "power, 4 A"
    assert row.side == "bottom"


def test_tab_separated_utf16_with_bom_and_suffixes(tmp_path: Path) -> None:
    text = (
        "Designator\tFootprint\tMid X\tMid Y\tRef X\tRef Y\tPad X\tPad Y\tLayer\tRotation"
        "\tComment\n"
        '"L1"\t"IND-7x6"\t"45.72mm"\t"36.96mm"\t"45.72mm"\t"36.96mm"\t"42.69mm"\t"36.96mm"\t"T"'
        '\t"0"\t"2.2uH"\n'
    )
    path = tmp_path / "pnp.csv"
    path.write_bytes(b"\xff\xfe" + text.encode("utf-16-le"))
    rows, notices = read_placement(path)
    assert len(rows) == 1
    row = rows[0]
    # Mid X/Y (the part centre) wins over Ref X/Y and Pad X/Y
    assert (row.x_mm, row.y_mm, row.side, row.value, row.package) == (
        45.72,
        36.96,
        "top",
        "2.2uH",
        "IND-7x6",
    )
    assert notices == ()


def test_decode_utf16_without_bom_and_utf8_bom() -> None:
    text = "Ref,X,Y,Side,Rot\nµ1,1,2,top,0\n"
    for data in (
        text.encode("utf-16-le"),
        text.encode("utf-16-be"),
        b"\xef\xbb\xbf" + text.encode(),
    ):
        decoded, notices = decode_table(data)
        assert decoded.splitlines()[1].startswith("µ1")
        assert notices == ()
    decoded, notices = decode_table(text.encode("cp1252"), source="w.csv")
    assert decoded.splitlines()[1].startswith("µ1")
    assert notices[0].file == "w.csv"
    with pytest.raises(InputError, match="must be text"):
        decode_table(b"\x00\x01\x02\x03\x00\x00\x00\x05\x06", source="bin")


def test_whitespace_table_with_quotes() -> None:
    text = (
        "Units used: mm\n"
        "\n"
        "Designator Comment               Layer       Footprint   Center-X(mm) Center-Y(mm) "
        "Rotation Description\n"
        'R57        "15R, 1%"             TopLayer    RES0201     4.0500       22.5500      '
        '270      ""\n'
        "MECH1      SHIELD                TopLayer    SHIELD      -100.0000    -100.0000    "
        '0        "far away"\n'
    )
    rows = by_ref(rows_of(text))
    assert rows["R57"].value == "15R, 1%"
    assert rows["R57"].description == ""
    # parts far off the board are kept as they are
    assert (rows["MECH1"].x_mm, rows["MECH1"].y_mm) == (-100.0, -100.0)
    assert rows["MECH1"].description == "far away"


def test_whitespace_table_falls_back_to_header_positions() -> None:
    text = (
        "Designator Comment     Layer       X(mm)   Y(mm)   Rotation\n"
        "R1         10k 1%      TopLayer    1.0     2.0     90\n"
        "R2         4k7         BottomLayer 3.0     4.0     0\n"
    )
    rows = by_ref(rows_of(text))
    assert rows["R1"].value == "10k 1%"
    assert (rows["R1"].x_mm, rows["R1"].y_mm, rows["R1"].rotation_deg) == (1.0, 2.0, 90.0)
    assert rows["R2"].side == "bottom"


def test_commented_position_format_with_unit_line() -> None:
    text = (
        "### Module positions - created on some date ###\n"
        "### Printed by a program\n"
        "## Unit = inches, Angle = deg.\n"
        "## Side : bottom\n"
        "# Ref     Val       Package           PosX       PosY       Rot  Side\n"
        "C4        1uF       C_0603          -1.5000     2.0000    0.0000  bottom\n"
        "U1        MCU       QFN-32           0.5000    -0.2500  -90.0000  bottom\n"
        "## End\n"
    )
    rows, notices = parse_placement(text, source="b.pos")
    # bottom X stays as written (negative): mirroring is undone in the board model
    assert [(r.ref, r.x_mm, r.y_mm, r.rotation_deg, r.line) for r in rows] == [
        ("C4", pytest.approx(-38.1), pytest.approx(50.8), 0.0, 6),
        ("U1", pytest.approx(12.7), pytest.approx(-6.35), 270.0, 7),
    ]
    assert notices == ()


@pytest.mark.parametrize(
    ("word", "side"),
    [
        ("top", "top"),
        ("T", "top"),
        ("Front", "top"),
        ("F", "top"),
        ("TopLayer", "top"),
        ("Top Layer", "top"),
        ("1", "top"),
        ("F.Cu", "top"),
        ("B.Cu", "bottom"),
        ("bottom", "bottom"),
        ("B", "bottom"),
        ("back", "bottom"),
        ("Bot", "bottom"),
        ("BottomLayer", "bottom"),
        ("Bottom Layer", "bottom"),
    ],
)
def test_side_words(word: str, side: str) -> None:
    assert rows_of(f'Ref,X,Y,Rot,Side\nR1,0,0,0,"{word}"\n')[0].side == side


def test_unknown_side_skips_row_with_notice() -> None:
    rows, notices = parse_placement("Ref,X,Y,Rot,Side\nR1,0,0,0,inner\nR2,0,0,0,top\n")
    assert [r.ref for r in rows] == ["R2"]
    assert any(n.line == 2 and "'inner'" in n.message for n in notices)


def test_side_from_banner_from_file_name_or_assumed() -> None:
    banner = "## Side : bottom\nRef X Y Rot\nR1 1 2 0\n"
    assert rows_of(banner)[0].side == "bottom"
    rows, notices = parse_placement("Ref,X,Y,Rot\nR1,1,2,0\n", source="board-bottom-pos.csv")
    assert rows[0].side == "bottom"
    assert any("file name" in n.message for n in notices)
    rows, notices = parse_placement("Ref,X,Y,Rot\nR1,1,2,0\n", source="board.csv")
    assert rows[0].side == "top"
    assert any("side top assumed" in n.message for n in notices)


def test_missing_rotation_column_gives_notice() -> None:
    rows, notices = parse_placement("Ref,X,Y,Side\nR1,1mm,2mm,top\n")
    assert rows[0].rotation_deg == 0.0
    assert any("rotation 0 assumed" in n.message for n in notices)


def test_duplicates_kept_with_notice() -> None:
    text = "Ref,X,Y,Rot,Side\nR1,0,0,0,top\nR2,1,1,0,top\nR1,5,5,0,bottom\n"
    rows, notices = parse_placement(text, source="d.csv")
    assert [r.ref for r in rows] == ["R1", "R2", "R1"]
    dup = [n for n in notices if "appears 2 times" in n.message]
    assert len(dup) == 1
    assert dup[0].line == 2
    assert "lines 2, 4" in dup[0].message


def test_rows_with_missing_fields_skipped_with_line() -> None:
    text = (
        "Ref,X,Y,Rot,Side\n"
        "R1,,2,0,top\n"  # no X
        "R2,1,2\n"  # short row
        ",1,2,0,top\n"  # no designator
        "R4,abc,2,0,top\n"  # not a number
        "R5,1,2,,top\n"  # no rotation
        "R6,1,2,0,top\n"
        ",,,,\n"  # blank row: silently ignored
    )
    rows, notices = parse_placement(text, source="m.csv")
    assert [r.ref for r in rows] == ["R6"]
    skipped = sorted(n.line for n in notices if n.message.startswith("row skipped"))
    assert skipped == [2, 3, 4, 5, 6]
    assert all(n.file == "m.csv" for n in notices)
    assert "m.csv:5: row skipped: R4 X/Y must be a length; got 'abc'" in [str(n) for n in notices]


def test_header_only_gives_no_rows_and_no_error() -> None:
    rows, notices = parse_placement("Ref,Val,Package,PosX,PosY,Rot,Side\n")
    assert rows == []
    assert notices == ()
    rows, _ = parse_placement("# Ref Val Package PosX PosY Rot Side\n## End\n")
    assert rows == []


def test_not_a_placement_file(tmp_path: Path) -> None:
    path = tmp_path / "notes.txt"
    path.write_text("just some notes\nnothing tabular\n")
    with pytest.raises(InputError) as info:
        read_placement(path)
    message = str(info.value)
    assert message.startswith(f"{path}: placement file must have a header row")
    assert "Designator" in message
    assert "'just some notes'" in message
    with pytest.raises(InputError, match="BOM file must have a header row"):
        read_bom(path)
    with pytest.raises(InputError, match="an empty file"):
        parse_placement("")


def test_read_errors(tmp_path: Path) -> None:
    with pytest.raises(InputError, match="must be readable"):
        read_placement(tmp_path / "missing.csv")
    big = tmp_path / "big.csv"
    big.write_text("Ref,X,Y\n" + "R1,0,0\n" * 10)
    with pytest.raises(InputError, match="at most 20 bytes"):
        read_placement(big, max_bytes=20)


# --- BOM -------------------------------------------------------------------------------


def test_bom_multi_designators_duplicated_and_trailing_columns() -> None:
    text = (
        "Comment,Designator,Footprint,LCSC, LCSC,,\n"
        '"330u, 63V","C38, C39",CP_10x20,C437643,,,a note, with comma\n'
        '22u,L1,L_6x6,C266430,," C266430 ",\n'
        "10k,R1 R2,R_0603,,,,\n"
        "1k,R10-R12,R_0603,,,,\n"
    )
    rows, notices = parse_bom(text, source="bom.csv")
    assert [r.ref for r in rows] == ["C38", "C39", "L1", "R1", "R2", "R10", "R11", "R12"]
    c38 = rows[0]
    assert (c38.value, c38.package, c38.line, c38.source) == ("330u, 63V", "CP_10x20", 2, "bom.csv")
    assert rows[2].value == "22u"
    assert notices == ()


@pytest.mark.parametrize("value_col", ["Value", "Val", "Comment", "Name"])
def test_bom_value_synonyms(value_col: str) -> None:
    rows, _ = parse_bom(f"ID,{value_col},Designator,Footprint\n1,4.7uH,L3,L_1210\n")
    assert (rows[0].ref, rows[0].value, rows[0].package) == ("L3", "4.7uH", "L_1210")


def test_bom_value_column_preferred_over_comment_and_description_kept() -> None:
    text = (
        '"Line Item","Qty","Comment","Value","Description","PACKAGE","Reference"\n'
        '"30","4","note","1uH","1 µH Shielded Drum Core","1210","L2,L3,L4,L5"\n'
    )
    rows, _ = parse_bom(text)
    assert [r.ref for r in rows] == ["L2", "L3", "L4", "L5"]
    assert {(r.value, r.package, r.description) for r in rows} == {
        ("1uH", "1210", "1 µH Shielded Drum Core")
    }


def test_bom_utf16_tsv(tmp_path: Path) -> None:
    text = (
        "ID\tName\tDesignator\tFootprint\tQuantity\tManufacturer\n"
        '"3"\t"33uF"\t"C15,C16"\t"C1206"\t"2"\t"TDK"\n'
        '"14"\t"2.2uH"\t"L1"\t"IND-7x6"\t"1"\t"厂商"\n'
    )
    path = tmp_path / "bom.csv"
    path.write_bytes(b"\xff\xfe" + text.encode("utf-16-le"))
    rows, notices = read_bom(path)
    assert [(r.ref, r.value, r.line) for r in rows] == [
        ("C15", "33uF", 2),
        ("C16", "33uF", 2),
        ("L1", "2.2uH", 3),
    ]
    assert notices == ()


def test_bom_duplicate_designator_and_missing_designator_notices() -> None:
    text = "Value,Designator\n1k,R1\n2k,R1\n3k,\n"
    rows, notices = parse_bom(text, source="b.csv")
    assert [r.value for r in rows] == ["1k", "2k"]
    lines = sorted((n.line, n.message.split(":")[0]) for n in notices)
    assert lines[0][0] == 2  # duplicate R1 reported at its first line
    assert any(n.line == 4 and "no designator" in n.message for n in notices)


# --- sniffing and joining --------------------------------------------------------------


def test_sniff_table(tmp_path: Path) -> None:
    assert sniff_table("Designator,Mid X,Mid Y,Layer,Rotation\nL1,1,2,top,0\n") == "placement"
    assert sniff_table("# Ref Val Package PosX PosY Rot Side\n") == "placement"
    assert sniff_table("Comment,Designator,Footprint\n22u,L1,L\n") == "bom"
    assert sniff_table("Line,References,Description,Value,Quantity\n") == "bom"
    assert sniff_table("Designator,Something\n") == "other"
    assert sniff_table("%FSLAX46Y46*%\nG04 x*\n") == "other"
    path = tmp_path / "p.csv"
    path.write_bytes(b"\xff\xfe" + "Designator\tMid X\tMid Y\n".encode("utf-16-le"))
    assert sniff_table(path) == "placement"
    assert sniff_table(str(path)) == "placement"
    binary = tmp_path / "b.bin"
    binary.write_bytes(bytes(range(256)) * 4)
    assert sniff_table(binary) == "other"


def _place(ref: str, value: str = "", package: str = "", line: int = 2) -> PlacementRow:
    return PlacementRow(
        ref=ref,
        value=value,
        package=package,
        x_mm=0.0,
        y_mm=0.0,
        rotation_deg=0.0,
        side="top",
        source="cpl.csv",
        line=line,
    )


def _bom(ref: str, value: str, package: str = "PKG", line: int = 2) -> BomRow:
    return BomRow(
        ref=ref, value=value, package=package, description="d", source="bom.csv", line=line
    )


def test_join_bom_fills_only_missing_fields() -> None:
    rows = [_place("L1"), _place("C1", value="1u"), _place("l2"), _place("FID1", line=9)]
    bom = [_bom("L1", "22u"), _bom("C1", "100n"), _bom("L2", "1u"), _bom("L1", "other", line=7)]
    notices: list[Notice] = []
    out = join_bom(rows, bom, notices=notices)
    assert [(r.ref, r.value, r.package, r.description) for r in out] == [
        ("L1", "22u", "PKG", "d"),  # first BOM line for L1 wins
        ("C1", "1u", "PKG", "d"),  # the placement's own value is kept
        ("l2", "1u", "PKG", "d"),  # designators compare without case
        ("FID1", "", "", ""),
    ]
    assert [(n.file, n.line) for n in notices] == [("cpl.csv", 9)]
    assert "'FID1' is not in the BOM" in notices[0].message
    assert join_bom(rows, bom) == out  # notices are optional


def test_join_bom_caps_missing_notices() -> None:
    rows = [_place(f"R{i}", line=i + 2) for i in range(30)]
    notices: list[Notice] = []
    join_bom(rows, [], notices=notices)
    assert len(notices) == 21
    assert "30 placed designators" in notices[-1].message
