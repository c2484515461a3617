"""Hostile Excellon input: random and mutated drill files raise only fluxshadow errors,
quickly, and the hole/slot limit holds (repeats and routed arcs included).

Seeds: the small synthetic files in tests/data/fuzz/excellon/ (derandomized hypothesis).
"""

from __future__ import annotations

from pathlib import Path

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from fluxshadow.errors import FluxshadowError, LimitError
from fluxshadow.io.excellon import parse_excellon, read_excellon

SEEDS = sorted((Path(__file__).resolve().parents[1] / "data" / "fuzz" / "excellon").iterdir())
MAX_FEATURES = 100_000

TOKENS = [
    b"R99999X0.001Y0.001",
    b"R00005X1Y1",
    b"G03X1Y1A999999999999",
    b"G02X99999999999999999999Y0A1e308",
    b"X99999999999999999999999Y-9999999999999999999",
    b"T99C1e308",
    b"T1C-1",
    b"M15",
    b"M16",
    b"G00",
    b"G01",
    b"G05",
    b"M48",
    b"%",
    b"INCH,TZ",
    b"METRIC,LZ,000.000",
    b"G93X5Y5",
    b"X1Y1G85X2Y2",
    b"M30",
    b"\x00\xff",
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
            data[i:i] = b"\n" + draw(st.sampled_from(TOKENS)) + b"\n"
        elif op == "duplicate":
            j = draw(st.integers(i, min(len(data), i + 200)))
            data[i:i] = data[i:j] * draw(st.integers(1, 20))
    return bytes(data)


def _parse(data: bytes) -> None:
    try:
        rec = parse_excellon(data.decode("latin-1"), source="fuzz.drl", max_features=MAX_FEATURES)
    except FluxshadowError:
        return
    assert rec.hole_xy.shape == (len(rec.hole_diameter_mm), 2)
    assert rec.slot_xy.shape == (len(rec.slot_diameter_mm), 2, 2)
    assert len(rec.hole_xy) + len(rec.slot_xy) <= MAX_FEATURES


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
@given(st.lists(st.sampled_from(TOKENS), max_size=30))
def test_token_soup_raises_only_fluxshadow_errors(tokens: list[bytes]) -> None:
    _parse(b"M48\nMETRIC\nT1C0.3\n%\nT1\nX1Y1\n" + b"\n".join(tokens))


def test_seeds_read_cleanly() -> None:
    for seed in SEEDS:
        rec = parse_excellon(seed.read_text(), source=seed.name)
        assert len(rec.hole_xy) > 0


HEAD = "M48\nMETRIC\nT1C0.3\nT2C1.0\n%\n"


def test_repeats_are_limited_in_total() -> None:
    # Repeats start on line 8; 1 + 11 x 90000 holes fit, the 12th repeat (line 19) not.
    text = HEAD + "T1\nX1Y1\n" + "R90000X0.01Y0\n" * 200 + "M30\n"
    with pytest.raises(LimitError, match=r"fuzz\.drl:19: hole and slot count.*max_drill_features"):
        parse_excellon(text, source="fuzz.drl", max_features=1_000_000)


def test_routed_arc_of_absurd_radius_is_bounded() -> None:
    # A quarter turn of 1e9 mm radius would need ~250,000 chords for the sagitta; capped.
    text = HEAD + "T2\nG00X0Y0\nM15\nG03X1000000000.0Y1000000000.0A1000000000.0\nM16\nM30\n"
    rec = parse_excellon(text, source="fuzz.drl")
    assert len(rec.slot_xy) == 4096
    many = (
        HEAD
        + "T2\nG00X0Y0\nM15\n"
        + "G03X1000000000.0Y1000000000.0A1000000000.0\nM16\nG00X0Y0\nM15\n" * 100
        + "M16\nM30\n"
    )
    with pytest.raises(LimitError, match="max_drill_features"):
        parse_excellon(many, source="fuzz.drl", max_features=100_000)


def test_file_size_limit_names_the_key(tmp_path: Path) -> None:
    f = tmp_path / "big.drl"
    f.write_bytes(SEEDS[0].read_bytes())
    with pytest.raises(LimitError, match=r"big\.drl: drill file size.*max_file_bytes"):
        read_excellon(f, max_bytes=10)
