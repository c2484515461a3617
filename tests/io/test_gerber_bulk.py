"""Gerber reader: the numpy bulk path for runs of plain operations equals the
statement-by-statement path exactly (property test on random operation sequences)."""

from __future__ import annotations

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from fluxshadow.errors import ParseError
from fluxshadow.io import _gerber_parser
from fluxshadow.io.gerber import parse_gerber
from fluxshadow.io.records import ArtworkRecord

ARRAYS = (
    "obj_kind",
    "obj_dark",
    "obj_aperture",
    "obj_xy",
    "obj_ring_start",
    "ring_vertex_start",
    "vertices",
    "obj_net",
    "obj_component",
    "obj_function",
)


def parse_with(text: str, bulk_min: int) -> ArtworkRecord | str:
    with pytest.MonkeyPatch.context() as mp:
        mp.setattr(_gerber_parser, "BULK_MIN_STATEMENTS", bulk_min)
        try:
            return parse_gerber(text, source="b.gbr")
        except ParseError as e:
            return str(e)


def same(a: ArtworkRecord | str, b: ArtworkRecord | str) -> None:
    if isinstance(a, str) or isinstance(b, str):
        assert a == b
        return
    for name in ARRAYS:
        x, y = getattr(a, name), getattr(b, name)
        assert x.dtype == y.dtype, name
        np.testing.assert_array_equal(x, y, err_msg=name)
    assert [str(n) for n in a.notices] == [str(n) for n in b.notices]


coord = st.one_of(st.none(), st.integers(-3, 3))
op = st.tuples(coord, coord, st.sampled_from([1, 2, 3]))


def render(ops: list[tuple[int | None, int | None, int]], trailing: bool, scale: int) -> str:
    out = []
    for x, y, d in ops:
        s = ""
        if x is not None:
            s += f"X{x * scale}" if not trailing else f"X{x}"
        if y is not None:
            s += f"Y{y * scale}" if not trailing else f"Y{y}"
        out.append(f"{s}D0{d}*")
    return "\n".join(out)


@settings(max_examples=150, deadline=None)
@given(
    ops=st.lists(op, min_size=1, max_size=60),
    region=st.booleans(),
    incremental=st.booleans(),
    trailing=st.booleans(),
    start_point=st.booleans(),
    lead=st.sampled_from(["", "X1000Y1000D01*\n", "X1000Y1000D02*\n"]),
    full=st.booleans(),
)
def test_bulk_equals_scalar(
    ops: list[tuple[int | None, int | None, int]],
    region: bool,
    incremental: bool,
    trailing: bool,
    start_point: bool,
    lead: str,
    full: bool,
) -> None:
    fs = f"%FS{'T' if trailing else 'L'}{'I' if incremental else 'A'}X34Y34*%\n%MOMM*%\n"
    if region:
        ops = [(x, y, 1 if d == 3 else d) for x, y, d in ops]
    if full:  # every statement with X and Y (the bulk path's fastest case)
        ops = [(x or 0, y or 0, d) for x, y, d in ops]
    body = "%TO.N,NET1*%\n%ADD10C,0.1*%\nD10*\nG01*\n"
    if start_point:
        body += "X0Y0D02*\n"
    body += lead
    if region:
        body += "G36*\n"
    body += render(ops, trailing, 1000) + "\n"
    if region:
        body += "G37*\n"
    text = fs + body + "M02*\n"
    scalar = parse_with(text, 10**9)
    bulk = parse_with(text, 1)
    same(scalar, bulk)


def test_bulk_path_is_used_on_long_runs() -> None:
    # 100 chained draws: one track with 101 vertices either way
    ops = "\n".join(f"X{i * 1000}Y{(i % 2) * 1000}D01*" for i in range(1, 101))
    text = "%FSLAX34Y34*%\n%MOMM*%\n%ADD10C,0.1*%\nD10*\nG01*\nX0Y0D02*\n" + ops + "\nM02*\n"
    calls = []
    orig = _gerber_parser._Parser.bulk

    def spy(self: _gerber_parser._Parser, run: str, pos: int) -> bool:
        ok = orig(self, run, pos)
        calls.append(ok)
        return ok

    with pytest.MonkeyPatch.context() as mp:
        mp.setattr(_gerber_parser._Parser, "bulk", spy)
        rec = parse_gerber(text)
    assert calls == [True]
    assert rec.n_objects == 1
    assert rec.vertices.shape == (101, 2)
    np.testing.assert_allclose(rec.vertices[-1], [10.0, 0.0])  # X100000 in 3.4 format
