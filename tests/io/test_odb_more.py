"""ODB++ reader: compressed files, limits, nets from EDA data, drill layers, resized pads,
bad input (fluxshadow.io.odb).

Format facts are from the ODB++ Format Specification (v7/v8); section numbers are not
given because they are quoted from memory, so each check says "from memory" and names the
chapter. The ``.Z`` test data is written by a minimal LZW encoder in this file (the Unix
``compress`` format: magic ``1f 9d``, a flags byte with the maximum code width, codes
growing from 9 bits, LSB-first, padded to a whole group of codes at each width change --
common practice, as decoded by ``unlzw3``).
"""

from __future__ import annotations

import gzip
import math
from pathlib import Path

import numpy as np
import pytest
import shapely

from fluxshadow.board.copper import compose_record
from fluxshadow.errors import ConfigError, InputError, LimitError
from fluxshadow.io.odb import OdbPackage, parse_features, read_odb

ODB_CORPUS = Path(__file__).resolve().parents[2].parent / "shared" / "realboards-odb"
TOL = 0.02


def lzw_compress(data: bytes) -> bytes:
    """Unix ``compress`` (LZW, 16-bit maximum, no block mode) of ``data``."""
    table = {bytes([i]): i for i in range(256)}
    codes: list[int] = []
    w = b""
    for b in data:
        wc = w + bytes([b])
        if wc in table:
            w = wc
            continue
        codes.append(table[w])
        if len(table) < 65536:
            table[wc] = len(table)
        w = bytes([b])
    if w:
        codes.append(table[w])
    out = bytearray(b"\x1f\x9d\x10")
    bits, end, acc, nb, mark = 9, 255, 0, 0, 3
    for i, code in enumerate(codes):
        if end >= (1 << bits) - 1 and bits < 16:  # width grows: pad to a group of codes
            if nb:
                out.append(acc & 0xFF)
            acc = nb = 0
            out.extend(bytes(-(len(out) - mark) % bits))
            mark, bits = len(out), bits + 1
        acc |= code << nb
        nb += bits
        while nb >= 8:
            out.append(acc & 0xFF)
            acc >>= 8
            nb -= 8
        if i and end < (1 << bits) - 1:
            end += 1
    if nb:
        out.append(acc & 0xFF)
    return bytes(out)


def test_lzw_encoder_round_trips_through_the_decoder() -> None:
    import unlzw3

    rng = np.random.default_rng(3)
    data = bytes(rng.choice(list(b"OS 0123456789.-\n"), 40_000).tolist())
    packed = lzw_compress(data)
    assert packed[:2] == b"\x1f\x9d"
    assert len(packed) < len(data)  # several code-width changes happened on the way
    assert unlzw3.unlzw(packed) == data


# --------------------------------------------------------------------------- job writer

MATRIX = """STEP {
    COL=1
    NAME=PCB
}
LAYER {
    ROW=1
    CONTEXT=BOARD
    TYPE=SIGNAL
    NAME=TOP
    POLARITY=POSITIVE
}
LAYER {
    ROW=2
    CONTEXT=BOARD
    TYPE=DIELECTRIC
    NAME=CORE
    POLARITY=POSITIVE
    DIELECTRIC_TYPE=CORE
}
LAYER {
    ROW=3
    CONTEXT=BOARD
    TYPE=SIGNAL
    NAME=MID
    POLARITY=POSITIVE
}
LAYER {
    ROW=4
    CONTEXT=BOARD
    TYPE=SIGNAL
    NAME=BOT
    POLARITY=POSITIVE
}
LAYER {
    ROW=5
    CONTEXT=BOARD
    TYPE=DRILL
    NAME=DRILL_PLATED
    POLARITY=POSITIVE
    START_NAME=TOP
    END_NAME=BOT
}
LAYER {
    ROW=6
    CONTEXT=BOARD
    TYPE=DRILL
    NAME=NPTH
    POLARITY=POSITIVE
    START_NAME=TOP
    END_NAME=BOT
}
LAYER {
    ROW=7
    CONTEXT=BOARD
    TYPE=DRILL
    NAME=BLIND
    POLARITY=POSITIVE
    START_NAME=TOP
    END_NAME=MID
}
LAYER {
    ROW=8
    CONTEXT=BOARD
    TYPE=ROUT
    NAME=RT
    POLARITY=POSITIVE
}
"""

PROFILE = "UNITS=MM\nS P 0\nOB 0 0 I\nOS 30 0\nOS 30 40\nOS 0 40\nOE\nSE\n"

# Feature numbers (0-based over P/L/A/S/T/B records, from memory: EDA data file, FID):
# 0 pad, 1 line, 2 text (not drawn, still numbered), 3 surface, 4 pad.
TOP = """UNITS=MM
$0 r1000
$1 s2000
P 1 1 0 P 0 0
L 0 5 10 5 0 P 0
T 1 1 standard 0 P 0 1 1 1 'x' 0
S P 0
OB 20 20 I
OS 22 20
OS 22 22
OS 20 22
OS 20 20
OE
SE
P 5 1 1 P 0 0
"""

EDA = """UNITS=MM
LYR top mid
LYR bot
NET $NONE$
SNT TOP T 0 0
FID C 0 4
NET VSW
SNT TRC
FID C 0 0
FID C 0 1
FID C 2 0
NET GND
SNT PLN
FID C 0 3
FID H 0 99
"""

# Drill: .drill attribute options PLATED, NON_PLATED, VIA (option number; from memory,
# system attributes chapter). Round pad = hole, oval pad = slot, line = routed slot.
DRILL = """UNITS=MM
$0 r300
$1 oval2000x1000
$2 r800
@0 .drill
P 1 1 0 P 0 0 ;0=2
P 2 2 1 P 0 8 90 ;0=0
L 5 5 8 5 2 P 0 ;0=0
P 3 3 2 P 0 0
"""

NPTH = "UNITS=MM\n$0 r3000\nP 10 10 0 P 0 0\nP 12 10 0 P 0 0\n"
BLIND = "UNITS=MM\n$0 r200\nP 4 4 0 P 0 0\n"
ROUT = "UNITS=MM\n$0 r2000\nL 0 0 0 10 0 P 0\nL 0 10 5 10 0 P 0\n"


def _write(path: Path, text: str, how: str = "plain") -> None:
    path.parent.mkdir(parents=True, exist_ok=True)
    data = text.encode("utf-8")
    if how == "Z":
        path.with_name(path.name + ".Z").write_bytes(lzw_compress(data))
    elif how == "gz":
        path.with_name(path.name + ".gz").write_bytes(gzip.compress(data))
    else:
        path.write_bytes(data)


def _job(root: Path, how: dict[str, str] | None = None, *, eda: bool = True) -> Path:
    how = how or {}
    _write(root / "matrix" / "matrix", MATRIX, how.get("matrix", "plain"))
    step = root / "steps" / "pcb"
    _write(step / "profile", PROFILE, how.get("profile", "plain"))
    layers = step / "layers"
    _write(layers / "top" / "features", TOP, how.get("top", "plain"))
    _write(layers / "mid" / "features", "UNITS=MM\n$0 r1000\nP 3 3 0 P 0 0\n")
    _write(layers / "bot" / "features", "UNITS=MM\n$0 r1000\nP 3 3 0 P 0 0\n")
    _write(layers / "drill_plated" / "features", DRILL)
    _write(layers / "npth" / "features", NPTH)
    _write(layers / "blind" / "features", BLIND)
    _write(layers / "rt" / "features", ROUT)
    comp = "UNITS=MM\nCMP 0 10.0 20.0 0 N L1 IND\n"
    _write(layers / "comp_+_top" / "components", comp, how.get("components", "plain"))
    if eda:
        _write(step / "eda" / "data", EDA, how.get("eda", "plain"))
    return root


def _nets(rec_nets: tuple[str, ...], obj_net: np.ndarray) -> list[str | None]:
    return [rec_nets[i] if i >= 0 else None for i in obj_net.tolist()]


# --------------------------------------------------------------------------- compression


@pytest.mark.parametrize("how", ["Z", "gz"])
def test_compressed_files_read_like_plain_ones(tmp_path: Path, how: str) -> None:
    # Any ODB++ file may be stored compressed as <name>.Z or <name>.gz (from memory:
    # the chapter on the product model's file structure).
    plain = read_odb(_job(tmp_path / "plain"))
    parts = dict.fromkeys(("matrix", "profile", "top", "components", "eda"), how)
    packed = read_odb(_job(tmp_path / "packed", parts))
    assert packed.copper_names == plain.copper_names == ("TOP", "MID", "BOT")
    assert packed.copper[0].source.endswith(f"features.{how}")
    a, b = packed.copper[0], plain.copper[0]
    assert a.n_objects == b.n_objects == 4
    assert np.array_equal(a.vertices, b.vertices)
    assert _nets(a.nets, a.obj_net) == _nets(b.nets, b.obj_net)
    assert [p.ref for p in packed.placements] == ["L1"]
    assert shapely.Polygon(packed.profile_ring).area == pytest.approx(1200.0)
    assert packed.copper[0].size_bytes == len(TOP.encode())  # decoded size


def _corrupt(how: str, text: str) -> bytes:
    if how == "Z-truncated":
        return lzw_compress(text.encode())[:4]  # a partial first code
    if how == "Z-corrupt":
        return b"\x1f\x9d\x10\xff\xff\xff\xff\xff"  # first code is no literal
    if how == "gz-truncated":
        return gzip.compress(text.encode())[:-12]
    return b"\x1f\x8b\x08\x00garbage-not-deflate"


BROKEN = ["Z-truncated", "Z-corrupt", "gz-truncated", "gz-corrupt"]


@pytest.mark.parametrize("how", BROKEN)
@pytest.mark.parametrize("which", ["top", "profile", "matrix"])
def test_broken_compressed_copper_profile_matrix_is_input_error(
    tmp_path: Path, how: str, which: str
) -> None:
    root = _job(tmp_path / "job")
    target = {
        "top": root / "steps" / "pcb" / "layers" / "top" / "features",
        "profile": root / "steps" / "pcb" / "profile",
        "matrix": root / "matrix" / "matrix",
    }[which]
    text = target.read_text()
    target.unlink()
    ext = ".Z" if how.startswith("Z") else ".gz"
    target.with_name(target.name + ext).write_bytes(_corrupt(how, text))
    with pytest.raises(InputError, match="compressed file must decode") as info:
        read_odb(root)
    assert str(info.value.file).endswith(target.name + ext)


@pytest.mark.parametrize("how", BROKEN)
def test_broken_compressed_components_eda_symbol_are_notices(tmp_path: Path, how: str) -> None:
    root = _job(tmp_path / "job")
    ext = ".Z" if how.startswith("Z") else ".gz"
    comp = root / "steps" / "pcb" / "layers" / "comp_+_top" / "components"
    eda = root / "steps" / "pcb" / "eda" / "data"
    sym = root / "symbols" / "mysym" / "features"
    sym.parent.mkdir(parents=True)
    for path in (comp, eda):
        text = path.read_text()
        path.unlink()
        path.with_name(path.name + ext).write_bytes(_corrupt(how, text))
    sym.with_name("features" + ext).write_bytes(_corrupt(how, PROFILE))
    mid = root / "steps" / "pcb" / "layers" / "mid" / "features"
    mid.write_text("UNITS=MM\n$0 mysym\nP 3 3 0 P 0 0\n")
    pkg = read_odb(root)
    msgs = [(n.file, n.message) for n in pkg.notices]
    assert pkg.placements == ()
    assert any(f.endswith("components" + ext) and "top side left out" in m for f, m in msgs)
    assert pkg.nets_from == ""
    assert all(r.nets == () and (r.obj_net == -1).all() for r in pkg.copper)
    assert any(f.endswith("data" + ext) and "nets left out" in m for f, m in msgs)
    assert any(f.endswith("features" + ext) and "'mysym' left out" in m for f, m in msgs)
    assert pkg.copper[1].n_objects == 0
    assert any("mysym" in n.message and n.line == 3 for n in pkg.copper[1].notices)


def test_decoded_size_counts_against_max_bytes(tmp_path: Path) -> None:
    root = _job(tmp_path / "job", {"top": "Z"})
    packed = root / "steps" / "pcb" / "layers" / "top" / "features.Z"
    big = TOP + "#" * 5000 + "\n"
    packed.write_bytes(lzw_compress(big.encode()))
    assert packed.stat().st_size < 2000 < len(big)
    with pytest.raises(LimitError, match=r"features\.Z.*max_file_bytes"):
        read_odb(root, max_bytes=2000)
    gz = root / "steps" / "pcb" / "layers" / "top" / "features.gz"
    packed.unlink()
    gz.write_bytes(gzip.compress(big.encode()))
    with pytest.raises(LimitError, match=r"features\.gz: decompressed size must be at most"):
        read_odb(root, max_bytes=2000)


# --------------------------------------------------------------------------- limits


def test_object_and_vertex_limits(tmp_path: Path) -> None:
    root = _job(tmp_path / "job")
    assert read_odb(root, max_objects=4).copper[0].n_objects == 4
    with pytest.raises(LimitError, match=r"top/features:\d+: object count .*max_objects"):
        read_odb(root, max_objects=3)
    # Top layer vertices: line 2 + surface 5 = 7 (from the records above).
    read_odb(root, max_vertices=7)
    with pytest.raises(LimitError, match=r"top/features:\d+: vertex count .*max_vertices"):
        read_odb(root, max_vertices=6)
    with pytest.raises(ConfigError, match="max_objects must be >= 1; got 0"):
        read_odb(root, max_objects=0)


# --------------------------------------------------------------------------- nets


def test_nets_from_eda_data_follow_feature_numbers(tmp_path: Path) -> None:
    pkg = read_odb(_job(tmp_path / "job"))
    top, mid, bot = pkg.copper
    assert pkg.nets_from.endswith("eda/data")
    assert top.nets == ("VSW", "GND")  # $NONE$ is no net
    # Objects: pad (feature 0), line (1), surface (3; the text record took number 2),
    # pad (4, on $NONE$).
    assert _nets(top.nets, top.obj_net) == ["VSW", "VSW", "GND", None]
    assert _nets(mid.nets, mid.obj_net) == [None]  # layer 1 has no FID records
    assert _nets(bot.nets, bot.obj_net) == ["VSW"]  # LYR continued on a second line


def test_surface_split_into_several_regions_keeps_its_net(tmp_path: Path) -> None:
    # A surface with a hole becomes several hole-free rings; all carry the net.
    root = _job(tmp_path / "job")
    body = (
        "UNITS=MM\n$0 r100\nS P 0\nOB 0 0 I\nOS 10 0\nOS 10 10\nOS 0 10\nOS 0 0\nOE\n"
        "OB 4 4 H\nOS 4 6\nOS 6 6\nOS 6 4\nOS 4 4\nOE\nSE\n"
    )
    (root / "steps" / "pcb" / "layers" / "top" / "features").write_text(body)
    (root / "steps" / "pcb" / "eda" / "data").write_text("LYR top\nNET PLANE\nFID C 0 0\n", "utf-8")
    rec = read_odb(root).copper[0]
    assert rec.n_objects == 1
    assert int(rec.obj_ring_start[1]) >= 2
    assert _nets(rec.nets, rec.obj_net) == ["PLANE"]
    assert compose_record(rec).area == pytest.approx(96.0, abs=1e-9)


def test_no_eda_data_means_no_nets(tmp_path: Path) -> None:
    pkg = read_odb(_job(tmp_path / "job", eda=False))
    assert pkg.nets_from == ""
    assert all((r.obj_net == -1).all() and r.nets == () for r in pkg.copper)


# --------------------------------------------------------------------------- drills


def test_drill_layers(tmp_path: Path) -> None:
    pkg = read_odb(_job(tmp_path / "job"))
    assert pkg.drill_names == ("DRILL_PLATED", "NPTH", "BLIND", "RT")
    plated, npth, blind, rout = pkg.drills
    # Round pads are holes with the symbol's diameter (r300 = 0.3 mm in a mm file).
    assert plated.hole_xy.tolist() == [[1.0, 1.0], [3.0, 3.0]]
    assert plated.hole_diameter_mm == pytest.approx([0.3, 0.8])
    # .drill=VIA -> plated; the feature without .drill falls back to "assumed plated".
    assert plated.hole_plated.tolist() == [True, True]
    assert plated.plating_from == "attribute, else assumed plated"
    # Oval 2 x 1 mm turned 90 degrees: a slot 1 mm wide along Y, ends 0.5 mm from centre.
    slots = {tuple(np.round(s.ravel(), 9)) for s in plated.slot_xy}
    assert (2.0, 1.5, 2.0, 2.5) in slots or (2.0, 2.5, 2.0, 1.5) in slots
    assert (5.0, 5.0, 8.0, 5.0) in slots
    assert sorted(plated.slot_diameter_mm.tolist()) == pytest.approx([0.8, 1.0])
    assert plated.slot_plated.all()
    assert plated.span is None  # TOP..BOT is the full stack
    assert plated.tool_count == 3
    # No attribute, layer name says nothing: the NPTH row is "assumed plated" unless the
    # name says non-plated -- "npth" does.
    assert npth.plating_from == "layer name"
    assert not npth.hole_plated.any()
    assert npth.hole_diameter_mm == pytest.approx([3.0, 3.0])
    assert blind.span == (1, 2)
    assert blind.plating_from == "assumed plated"
    assert rout.plating_from == "rout layer"
    assert rout.slot_xy.shape == (2, 2, 2)
    assert not rout.slot_plated.any()
    assert rout.slot_diameter_mm == pytest.approx([2.0, 2.0])


def test_drill_non_plated_attribute_wins_over_name(tmp_path: Path) -> None:
    root = _job(tmp_path / "job")
    path = root / "steps" / "pcb" / "layers" / "drill_plated" / "features"
    path.write_text("UNITS=MM\n$0 r300\n@0 .drill\nP 1 1 0 P 0 0;0=1\nP 2 2 0 P 0 0;0=0\n")
    rec = read_odb(root).drills[0]
    assert rec.hole_plated.tolist() == [False, True]
    assert rec.plating_from == "attribute"


# --------------------------------------------------------------------------- resized pads


def _features(tmp_path: Path, body: str, symbols: dict[str, str] | None = None) -> Path:
    path = tmp_path / "job" / "steps" / "s" / "layers" / "l" / "features"
    path.parent.mkdir(parents=True)
    path.write_text(body, encoding="utf-8")
    for name, text in (symbols or {}).items():
        sp = tmp_path / "job" / "symbols" / name / "features"
        sp.parent.mkdir(parents=True)
        sp.write_text(text, encoding="utf-8")
    return path


@pytest.mark.parametrize(
    ("symbol", "area_mm2"),
    [
        # Resized pad "P x y -1 <sym> <resize> ..." (from memory: features file, pad
        # record): the symbol grows by <resize> small units (um here) in width and height.
        ("rect1000x2000", 1.2 * 2.2),
        ("r1000", math.pi * 0.6**2),
        ("s500", 0.7 * 0.7),
    ],
)
def test_resized_pad_area(tmp_path: Path, symbol: str, area_mm2: float) -> None:
    rec = parse_features(_features(tmp_path, f"UNITS=MM\n$0 {symbol}\nP 2 3 -1 0 200 P 0 0\n"))
    assert rec.n_objects == 1
    geom = compose_record(rec, quad_segs=64)
    assert geom.area == pytest.approx(area_mm2, abs=TOL)
    assert (geom.centroid.x, geom.centroid.y) == pytest.approx((2.0, 3.0), abs=1e-6)


def test_resized_pad_with_angle(tmp_path: Path) -> None:
    body = "UNITS=MM\n$0 rect1000x2000\nP 0 0 -1 0 200 P 0 8 90\n"
    geom = compose_record(parse_features(_features(tmp_path, body)))
    assert geom.bounds == pytest.approx((-1.1, -0.6, 1.1, 0.6), abs=1e-9)


# --------------------------------------------------------------------------- bad input


def test_bad_features_are_counted_notices(tmp_path: Path) -> None:
    body = (
        "UNITS=MM\n"  # 1
        "$0 r1000\n"  # 2
        "$1 moire10x10x2x2x20x0\n"  # 3: a standard symbol this reader does not draw
        "$2 nosuchsym\n"  # 4: a user symbol without a folder
        "P 0 0 0 P 0 0\n"  # 5: fine
        "P 1 0 1 P 0 0\n"  # 6: moire
        "P 2 0 1 P 0 0\n"  # 7: moire again (same notice, counted)
        "P 3 0 7 P 0 0\n"  # 8: $7 undeclared
        "P 4 0\n"  # 9: too few fields
        "L 0 0 1\n"  # 10: too few fields
        "P 5 0 2 P 0 0\n"  # 11: missing user symbol folder
        "L 0 0 5 0 0 P 0\n"  # 12: fine
    )
    path = _features(tmp_path, body)
    rec = parse_features(path)
    assert rec.n_objects == 2
    by_line = {n.line: n for n in rec.notices}
    assert set(by_line) == {6, 8, 9, 10, 11}
    assert all(n.file == str(path) for n in rec.notices)
    assert "2 feature record(s) skipped: standard symbol 'moire" in by_line[6].message
    assert "$7 is not declared" in by_line[8].message
    assert "pad record with too few fields" in by_line[9].message
    assert "line record with too few fields" in by_line[10].message
    assert "'nosuchsym' has no readable folder symbols/nosuchsym" in by_line[11].message


def test_surface_with_short_contour_line_is_skipped_with_notice(tmp_path: Path) -> None:
    body = "UNITS=MM\nS P 0\nOB 0 0 I\nOS 1\nOS 1 1\nOE\nSE\n$0 r100\nP 0 0 0 P 0 0\n"
    rec = parse_features(_features(tmp_path, body))
    assert rec.n_objects == 1
    assert [(n.line, "surface record with too few fields" in n.message) for n in rec.notices] == [
        (2, True)
    ]


def test_missing_matrix_is_input_error(tmp_path: Path) -> None:
    root = _job(tmp_path / "job")
    (root / "matrix" / "matrix").unlink()
    with pytest.raises(InputError, match="must contain matrix/matrix"):
        read_odb(root)


# --------------------------------------------------------------------------- real packages


def _odb(name: str) -> Path:
    path = ODB_CORPUS / name / "odb"
    if not path.is_dir():
        pytest.skip(f"{path} is not present")
    return path


@pytest.fixture(scope="module")
def thunderscope() -> OdbPackage:
    return read_odb(_odb("thunderscope-rev5.3"))


@pytest.mark.realboards
def test_thunderscope_l2_pads_and_plane_nets(thunderscope: OdbPackage) -> None:
    pkg = thunderscope
    l2 = next(r for r in pkg.placements if r.ref == "L2")
    top = pkg.copper[0]
    d = np.hypot(top.obj_xy[:, 0] - l2.x_mm, top.obj_xy[:, 1] - l2.y_mm)
    # L2 is a 1210 part turned 90 degrees: its two pads sit about 1.4 mm either side of
    # the centre along Y (SOURCE.md table: nets Net-(U20-SW) / +1V0_R).
    pads = np.nonzero((top.obj_kind == 0) & (d < 2.0) & (np.abs(top.obj_xy[:, 0] - l2.x_mm) < 0.01))
    names = {top.nets[top.obj_net[i]] for i in pads[0] if top.obj_net[i] >= 0}
    assert "Net-(U20-SW)" in names
    assert any(n.endswith("+1V0_R") for n in names)
    # The INT1 plane surface under L2 carries GND.
    int1 = pkg.copper[1]
    point = shapely.Point(l2.x_mm, l2.y_mm)
    hits = []
    for i in np.nonzero(int1.obj_kind == 2)[0]:
        r0 = int1.obj_ring_start[i]
        ring = int1.vertices[int1.ring_vertex_start[r0] : int1.ring_vertex_start[r0 + 1]]
        if shapely.Polygon(ring).buffer(0).contains(point):
            hits.append(int1.nets[int1.obj_net[i]])
    assert hits == ["GND"]


@pytest.mark.realboards
def test_thunderscope_drill_counts(thunderscope: OdbPackage) -> None:
    # SOURCE.md: 3784 plated hits and 93 non-plated hits, both rows TOP..BOTTOM.
    by_name = dict(zip(thunderscope.drill_names, thunderscope.drills, strict=True))
    plated = by_name["DRILL_PLATED_TOP_LAYER-BOTTOM_LAYER"]
    npth = by_name["DRILL_NON-PLATED_TOP_LAYER-BOTTOM_LAYER"]
    assert len(plated.hole_xy) + len(plated.slot_xy) == 3784
    assert plated.hole_plated.all()
    assert plated.plating_from == "attribute"
    assert len(npth.hole_xy) + len(npth.slot_xy) == 93
    assert not npth.hole_plated.any()
    assert not npth.slot_plated.any()
    assert plated.span is None
    assert npth.span is None
    # Vias (option VIA) use r203.20 = 0.2032 mm.
    assert np.count_nonzero(np.isclose(plated.hole_diameter_mm, 0.2032)) > 3000
    assert thunderscope.stack_thickness_mm is None  # the package carries no thicknesses
    assert not any("skipped" in n.message for n in thunderscope.notices)


@pytest.mark.realboards
def test_camjob_drill_and_rout() -> None:
    pkg = read_odb(_odb("gerbonara-camjob-2layer"))
    by_name = dict(zip(pkg.drill_names, pkg.drills, strict=True))
    assert set(by_name) == {"DRL", "KO"}
    drl, ko = by_name["DRL"], by_name["KO"]
    assert drl.units_in_file == "inch"
    assert drl.plating_from == "attribute"
    assert drl.hole_plated.any()
    assert not drl.hole_plated.all()
    assert ko.plating_from == "rout layer"
    assert len(ko.slot_xy) > 0
    assert pkg.stack_thickness_mm is None
