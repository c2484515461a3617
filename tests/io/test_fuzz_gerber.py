"""Hostile Gerber input: random and mutated files raise only fluxshadow errors, quickly,
and the safety limits (copies, nesting, objects, vertices, region vertices) hold.

Seeds are the small synthetic files in tests/data/fuzz/gerber/. Hypothesis runs
derandomized (fixed examples) with a deadline per example, so a hang fails the test.
"""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from fluxshadow.errors import FluxshadowError, LimitError
from fluxshadow.io.gerber import parse_gerber, read_gerber

SEEDS = sorted((Path(__file__).resolve().parents[1] / "data" / "fuzz" / "gerber").iterdir())

# Small limits keep every example's memory bounded (a few MB) whatever the mutation.
SMALL = {"max_repeat": 2_000, "max_objects": 50_000, "max_vertices": 200_000}

TOKENS = [
    b"%SRX99999Y99999I0.1J0.1*%",
    b"%SRX300Y300I0.1J0.1*%",
    b"%SR*%",
    b"%ABD30*%",
    b"%AB*%",
    b"G36*",
    b"G37*",
    b"G02X99999999999Y1I99999999999J0D01*",
    b"G03X1Y1I-999999999999999999999J0D01*",
    b"X99999999999999999999999999Y-99999999999999999999D01*",
    b"%ADD10C,1e308*%",
    b"%ADD11R,-1X0*%",
    b"%AMZ*1,1,((((((((((((((((1))))))))))))))))*%",
    b"%ADD12Z*%",
    b"%FSLAX66Y66*%",
    b"%MOIN*%",
    b"%LPC*%",
    b"%LR1e400*%",
    b"%LS0*%",
    b"D03*",
    b"G74*",
    b"M02*",
    b"\x00\xff\xfe",
    b"%",
    b"*",
]


@st.composite
def mutated(draw: st.DrawFn) -> bytes:
    """A seed with a few random edits: truncation, byte flips, token insertion, slices."""
    data = bytearray(draw(st.sampled_from(SEEDS)).read_bytes())
    for _ in range(draw(st.integers(1, 4))):
        op = draw(st.sampled_from(["truncate", "flip", "insert", "duplicate", "delete"]))
        i = draw(st.integers(0, len(data)))
        if op == "truncate":
            del data[i:]
        elif op == "flip" and i < len(data):
            data[i] ^= 1 << draw(st.integers(0, 7))
        elif op == "insert":
            data[i:i] = draw(st.sampled_from(TOKENS)) + b"\n"
        elif op == "duplicate":
            j = draw(st.integers(i, min(len(data), i + 200)))
            data[i:i] = data[i:j] * draw(st.integers(1, 20))
        elif op == "delete":
            del data[i : i + draw(st.integers(1, 50))]
    return bytes(data)


def _parse(data: bytes) -> None:
    """Parse; only fluxshadow errors may escape, and a record must be consistent."""
    text = data.decode("utf-8", errors="replace")
    try:
        rec = parse_gerber(text, source="fuzz.gbr", **SMALL)
    except FluxshadowError:
        return
    n = rec.n_objects
    assert rec.obj_xy.shape == (n, 2)
    assert rec.obj_ring_start.shape == (n + 1,)
    assert rec.vertices.shape[1] == 2
    assert int(rec.ring_vertex_start[-1]) == rec.vertices.shape[0]
    assert n <= SMALL["max_objects"]
    assert rec.vertices.shape[0] <= SMALL["max_vertices"]


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
    _parse(b"%FSLAX46Y46*%\n%MOMM*%\n%ADD10C,0.1*%\nD10*\n" + b"\n".join(tokens))


def test_seeds_read_cleanly() -> None:
    for seed in SEEDS:
        rec = parse_gerber(seed.read_text(), source=seed.name)
        assert rec.n_objects > 0


# --------------------------------------------------------------------------- limits

HEAD = "%FSLAX46Y46*%\n%MOMM*%\n%ADD10C,0.1*%\nD10*\n"


def test_step_and_repeat_count_limit_names_the_key() -> None:
    text = HEAD + "%SRX1000Y1000I1J1*%\nX0Y0D03*\n%SR*%\nM02*\n"
    with pytest.raises(LimitError, match=r"fuzz\.gbr:5: step and repeat copies.*max_repeat"):
        parse_gerber(text, source="fuzz.gbr")


def test_nested_step_and_repeat_multiplies_within_the_object_limit() -> None:
    # 100 x 100 copies of a block holding 100 x 100 flashes: 1e8 objects if expanded.
    block = "%ABD20*%\n%SRX100Y100I0.1J0.1*%\nD10*\nX0Y0D03*\n%SR*%\n%AB*%\n"
    text = HEAD + block + "%SRX100Y100I20J20*%\nD20*\nX0Y0D03*\n%SR*%\nM02*\n"
    with pytest.raises(LimitError, match=r"object count must be at most 1000000.*max_objects"):
        parse_gerber(text, source="fuzz.gbr", max_objects=1_000_000)


def test_deep_block_nesting_and_macro_expressions_are_limited() -> None:
    text = HEAD + "".join(f"%ABD{20 + i}*%\n" for i in range(100)) + "M02*\n"
    with pytest.raises(LimitError, match=r"block nesting must be at most 64.*max_macro_depth"):
        parse_gerber(text, source="fuzz.gbr")
    expr = "(" * 500 + "1" + ")" * 500
    text = HEAD + f"%AMDEEP*1,1,{expr},0,0*%\n%ADD11DEEP*%\nM02*\n"
    with pytest.raises(LimitError, match=r"macro expression nesting.*max_macro_depth"):
        parse_gerber(text, source="fuzz.gbr")


def test_region_vertex_limit() -> None:
    pts = "".join(f"X{i * 1000}Y{(i % 2) * 1000}D01*\n" for i in range(1, 3000))
    text = HEAD + "G01*\nG36*\nX0Y0D02*\n" + pts + "G37*\nM02*\n"
    with pytest.raises(LimitError, match=r"region \(G36..G37\) vertex count.*max_region_vertices"):
        parse_gerber(text, source="fuzz.gbr", max_region_vertices=1000)
    rec = parse_gerber(text, source="fuzz.gbr", max_region_vertices=5000)
    assert rec.vertices.shape[0] == 3001  # 3000 distinct vertices and the closing one


def test_huge_arcs_hit_the_vertex_limit_early() -> None:
    # Full circles of 1 km radius: each is linearised into thousands of vertices.
    arcs = "G03X1000000000Y0I-1000000000J0D01*\n" * 5000
    text = HEAD + "G75*\nX1000000000Y0D02*\n" + arcs + "M02*\n"
    with pytest.raises(LimitError, match=r"vertex count must be at most 100000.*max_vertices"):
        parse_gerber(text, source="fuzz.gbr", max_vertices=100_000)


def test_file_size_limit_names_the_key(tmp_path: Path) -> None:
    f = tmp_path / "big.gbr"
    f.write_bytes(SEEDS[0].read_bytes())
    with pytest.raises(
        LimitError, match=r"big\.gbr: file size must be at most 100.*max_file_bytes"
    ):
        read_gerber(f, max_bytes=100)
    rec = read_gerber(f)
    assert np.isfinite(rec.vertices).all()
