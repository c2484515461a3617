"""Hostile placement and BOM tables: random and mutated files raise only fluxshadow
errors, quickly (derandomized hypothesis over the seeds in tests/data/fuzz/placement/)."""

from __future__ import annotations

import contextlib
import math
from pathlib import Path

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from fluxshadow.errors import FluxshadowError, LimitError
from fluxshadow.io.placement import decode_table, parse_bom, parse_placement, read_placement

SEEDS = sorted((Path(__file__).resolve().parents[1] / "data" / "fuzz" / "placement").iterdir())

TOKENS = [
    b'"',
    b'""',
    b",,,,,,,,",
    b";;;;",
    b"\t\t",
    b"1e999",
    b"-1e308",
    b"nan",
    b"inf",
    b"99999999999999999999999999999999mm",
    b"L1,1,2,T,90",
    b"Designator,Mid X,Mid Y,Layer,Rotation",
    b"\xff\xfe",
    b"\xef\xbb\xbf",
    b"\x00",
    b"\r",
    b"## Unit = inch",
]


@st.composite
def mutated(draw: st.DrawFn) -> bytes:
    """A seed with a few random edits: truncation, byte flips, token insertion, slices."""
    data = bytearray(draw(st.sampled_from(SEEDS)).read_bytes())
    for _ in range(draw(st.integers(1, 4))):
        op = draw(st.sampled_from(["truncate", "flip", "insert", "duplicate"]))
        i = draw(st.integers(0, len(data)))
        if op == "truncate":
            del data[i:]
        elif op == "flip" and i < len(data):
            data[i] ^= 1 << draw(st.integers(0, 7))
        elif op == "insert":
            data[i:i] = draw(st.sampled_from(TOKENS))
        elif op == "duplicate":
            j = draw(st.integers(i, min(len(data), i + 200)))
            data[i:i] = data[i:j] * draw(st.integers(1, 20))
    return bytes(data)


def _parse(data: bytes) -> None:
    try:
        text, _notes = decode_table(data, source="fuzz.csv")
    except FluxshadowError:
        return
    try:
        rows, _n = parse_placement(text, source="fuzz.csv")
    except FluxshadowError:
        rows = []
    for r in rows:
        assert r.ref
        assert math.isfinite(r.x_mm)
        assert math.isfinite(r.y_mm)
        assert r.side in ("top", "bottom")
    with contextlib.suppress(FluxshadowError):
        parse_bom(text, source="fuzz.csv")


FUZZ = settings.get_profile("fuzz")


@FUZZ
@given(mutated())
def test_mutated_seeds_raise_only_fluxshadow_errors(data: bytes) -> None:
    _parse(data)


@FUZZ
@given(st.binary(max_size=2000))
def test_random_bytes_raise_only_fluxshadow_errors(data: bytes) -> None:
    _parse(data)


@FUZZ
@given(st.lists(st.sampled_from(TOKENS), max_size=40))
def test_token_soup_raises_only_fluxshadow_errors(tokens: list[bytes]) -> None:
    _parse(b"Designator,Mid X,Mid Y,Layer,Rotation\n" + b"".join(tokens))


def test_seeds_read_cleanly() -> None:
    rows, _n = parse_placement((SEEDS[1]).read_text())
    assert [r.ref for r in rows] == ["L1", "U1", "C1"]


def test_file_size_limit(tmp_path: Path) -> None:
    f = tmp_path / "big.csv"
    f.write_bytes(SEEDS[1].read_bytes())
    with pytest.raises(LimitError, match=r"big\.csv: table file size must be at most 10"):
        read_placement(f, max_bytes=10)
