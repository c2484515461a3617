"""Gerber reader: every ParseError names file and line; limits raise LimitError."""

from __future__ import annotations

import re
from pathlib import Path

import pytest

from fluxshadow.errors import InputError, LimitError, ParseError
from fluxshadow.io.gerber import parse_gerber, read_gerber

HEAD = "%FSLAX46Y46*%\n%MOMM*%\n"  # lines 1-2


def fails(text: str, line: int, *words: str) -> ParseError:
    with pytest.raises(ParseError) as info:
        parse_gerber(text, source="bad.gbr")
    err = info.value
    msg = str(err)
    assert msg.startswith(f"bad.gbr:{line}: "), msg
    assert err.file == "bad.gbr"
    assert err.line == line
    assert re.search(r" must .*; got ", msg), msg
    for w in words:
        assert w in msg, msg
    return err


def test_coordinate_before_fs() -> None:
    err = fails("%MOMM*%\n%ADD10C,1*%\nD10*\nX1Y1D03*\nM02*\n", 4, "%FS")
    assert err.statement == "X1Y1D03*"


def test_malformed_fs_and_unsupported_units() -> None:
    fails("%FSLAX4Y4*%\n", 1, "FSLAX46Y46")
    fails("%FSLAX46Y46*%\n%MOCM*%\n", 2, "MM or IN")


def test_undefined_aperture_used() -> None:
    fails(HEAD + "%ADD10C,1*%\nD11*\nX0Y0D02*\nX1Y1D01*\nM02*\n", 6, "D11", "defined")
    fails(HEAD + "X0Y0D03*\n", 3, "selected")


def test_unknown_macro_and_bad_aperture_definitions() -> None:
    fails(HEAD + "%ADD10FOO,1*%\n", 3, "'FOO'")
    fails(HEAD + "%ADD10C,1,2*%\n", 3, "numbers")
    fails(HEAD + "%ADD5C,1*%\n", 3, ">= 10")
    fails(HEAD + "%ADD10P,1X20*%\n", 3, "3..12")
    fails(HEAD + "%ADD10R,1*%\n", 3, "R must have 2 to 4")


def test_macro_errors() -> None:
    fails(HEAD + "%AMM*1,1,(1+2,0,0*%\n", 3, "parentheses")
    fails(HEAD + "%AMM*9,1,2*%\n", 3, "primitive code")
    fails(HEAD + "%AMM*1,1,1/$1,0,0*%\n%ADD10M,0*%\n", 4, "divisor")
    fails(HEAD + "%AMM*\n1,1,1,0*%\n%ADD10M*%\n", 5, "at least 4 parameters")
    fails(HEAD + "%AMM*1,1,1#2,0,0*%\n", 3, "macro expression")


def test_unknown_commands() -> None:
    fails(HEAD + "Q12*\n", 3, "unknown command")
    fails(HEAD + "%XY12*%\n", 3, "'XY'")
    fails(HEAD + "D07*\n", 3, "D01, D02, D03")
    fails(HEAD + "M05*\n", 3, "M00, M01 or M02")
    fails(HEAD + "%LPX*%\n", 3, "LPD or LPC")
    fails(HEAD + "%LMZ*%\n", 3, "LMXY")
    fails(HEAD + "%LRabc*%\n", 3, "number")
    fails(HEAD + "%LS-1*%\n", 3, "> 0")
    fails(HEAD + "%IPXX*%\n", 3, "IPNEG")


def test_g74_arc_without_sensible_centre() -> None:
    body = "%ADD10C,1*%\nD10*\nG74*\nX0Y0D02*\nG03X10000000Y0I1000000J0D01*\nM02*\n"
    fails(HEAD + body, 7, "G74", "centre")


def test_region_errors() -> None:
    fails(HEAD + "G01*\nG36*\nX1000000Y0D01*\n", 5, "current point")
    fails(HEAD + "%ADD10C,1*%\nD10*\nG36*\nX0Y0D02*\nX1Y1D03*\n", 7, "inside a region")


def test_block_aperture_misuse() -> None:
    fails(
        HEAD + "%ADD10C,1*%\n%ABD12*%\nD10*\nX0Y0D03*\n%AB*%\nD12*\nX0Y0D02*\nX1Y0D01*\n",
        10,
        "only be flashed",
    )
    fails(HEAD + "%AB*%\n", 3, "open")


def test_statement_without_terminator_in_the_middle() -> None:
    fails(HEAD + "X1Y1D03 %ADD10C,1*%\nM02*\n", 3, "end with '*'")


def test_bulk_run_errors_report_the_right_line() -> None:
    # A long run of plain operations that fails in its 30th statement: the bulk path
    # defers to the statement-by-statement path, which names the exact line.
    ops = "".join(f"X{i}000Y0D03*\n" for i in range(29)) + "X0Y0D02*\nX1Y0D01*\n"
    body = "%ABD12*%\n%ADD10C,1*%\nD10*\nX0Y0D03*\n%AB*%\nD12*\n" + ops
    fails(HEAD + body, 3 + 6 + 30, "only be flashed")


# ----------------------------------------------------------------------------- limits


def test_step_repeat_count_limit() -> None:
    with pytest.raises(
        LimitError, match=r"^lim\.gbr:3: step and repeat copies must be at most 100"
    ):
        parse_gerber(HEAD + "%SRX20Y10I1J1*%\n", source="lim.gbr", max_repeat=100)


def test_object_count_limit_through_expansion() -> None:
    text = HEAD + "%ADD10C,1*%\nD10*\n%SRX10Y10I1J1*%\nX0Y0D03*\nX1Y0D03*\n%SR*%\nM02*\n"
    assert parse_gerber(text).n_objects == 200
    with pytest.raises(LimitError, match=r"^lim\.gbr:8: object count must be at most 150; got 200"):
        parse_gerber(text, source="lim.gbr", max_objects=150)


def test_block_flash_object_limit() -> None:
    text = HEAD + "%ADD10C,1*%\n%ABD12*%\nD10*\nX0Y0D03*\nX1Y0D03*\n%AB*%\nD12*\n"
    text += "".join(f"X{i}000000Y0D03*\n" for i in range(5)) + "M02*\n"
    assert parse_gerber(text).n_objects == 10
    with pytest.raises(LimitError, match="object count must be at most 7"):
        parse_gerber(text, max_objects=7)


def test_macro_depth_limit() -> None:
    deep = "(" * 70 + "1" + ")" * 70
    text = HEAD + f"%AMM*1,1,{deep},0,0*%\n"
    with pytest.raises(
        LimitError, match=r"^lim\.gbr:3: macro expression nesting must be at most 64"
    ):
        parse_gerber(text, source="lim.gbr")
    assert parse_gerber(text, max_macro_depth=100).n_objects == 0


def test_block_nesting_limit() -> None:
    text = HEAD + "".join(f"%ABD{10 + i}*%\n" for i in range(5))
    with pytest.raises(LimitError, match="block nesting must be at most 3"):
        parse_gerber(text, max_macro_depth=3)


def test_file_size_limit_and_unreadable_file(tmp_path: Path) -> None:
    p = tmp_path / "x.gbr"
    p.write_text(HEAD + "M02*\n")
    size = p.stat().st_size
    with pytest.raises(LimitError, match=rf"file size must be at most 10 bytes; got {size}"):
        read_gerber(p, max_bytes=10)
    with pytest.raises(InputError, match="must be readable"):
        read_gerber(tmp_path / "missing.gbr")
    with pytest.raises(LimitError, match="text size must be at most"):
        parse_gerber(HEAD, max_bytes=5)


def test_bad_limit_options_are_config_errors() -> None:
    from fluxshadow.errors import ConfigError

    with pytest.raises(ConfigError, match="max_repeat must be >= 1; got 0"):
        parse_gerber(HEAD, max_repeat=0)
