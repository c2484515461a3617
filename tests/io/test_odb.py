"""Tests of the ODB++ folder reader (fluxshadow.io.odb).

Hand-computed areas on small feature files written here, composed with the board model;
record syntax and symbol names follow the ODB++ Format Specification (v7/v8, chapters
"features file", "standard symbols", "components file", "matrix file" -- section numbers
from memory are not given, so every format fact below is marked "from memory"). The
real-package tests read /work/shared/realboards-odb (skipped when absent).
"""

from __future__ import annotations

import math
from collections.abc import Callable
from pathlib import Path

import numpy as np
import pytest
import shapely

from fluxshadow.board.copper import compose_record
from fluxshadow.errors import InputError, ParseError
from fluxshadow.io.odb import OdbPackage, parse_features, read_odb
from fluxshadow.io.records import ArtworkRecord

ODB_CORPUS = Path(__file__).resolve().parents[2].parent / "shared" / "realboards-odb"

# Linearised circles are inscribed polygons (chord error at most 0.002 mm in the reader,
# 64 segments per quarter turn in the composer here), so an area loses at most about
# perimeter * 0.002 mm^2.
TOL = 0.02
QUAD_SEGS = 64


def _job(tmp_path: Path, body: str, *, symbols: dict[str, str] | None = None) -> Path:
    """Write a features file (and user symbols) in a job-shaped tree; return its path."""
    path = tmp_path / "job" / "steps" / "s" / "layers" / "l" / "features"
    path.parent.mkdir(parents=True)
    path.write_text(body, encoding="utf-8")
    for name, text in (symbols or {}).items():
        sp = tmp_path / "job" / "symbols" / name / "features"
        sp.parent.mkdir(parents=True)
        sp.write_text(text, encoding="utf-8")
    return path


def _rec(tmp_path: Path, body: str, **kw: dict[str, str]) -> ArtworkRecord:
    return parse_features(_job(tmp_path, body, **kw))


def _area(rec: ArtworkRecord) -> float:
    return float(compose_record(rec, quad_segs=QUAD_SEGS).area)


SQUARE_SURFACE_MM = """UNITS=MM
S P 0
OB 0.5 0 I
OS 1.5 0
OS 1.5 1
OS 0.5 1
OS 0.5 0
OE
SE
"""


# --------------------------------------------------------------------------- pads


@pytest.mark.parametrize(
    ("symbol", "area_mm2"),
    [
        ("r1000", math.pi * 0.25),  # circle, diameter 1000 um (from memory: r<d>)
        ("s500", 0.25),  # square, side 500 um (from memory: s<s>)
        ("rect1000x2000", 2.0),  # rectangle w x h (from memory: rect<w>x<h>)
        ("rect1000x2000xr250", 2.0 - (4.0 - math.pi) * 0.25**2),  # rounded corners r
        ("oval1000x2000", 1.0 + math.pi * 0.25),  # obround: 1x1 body + two half circles
        ("donut_r2000x1000", math.pi * (1.0 - 0.25)),  # ring od 2 mm, id 1 mm
        ("rect1000x2000xc250", 2.0 - 4 * 0.5 * 0.25**2),  # chamfered corners (from memory)
        ("rect1000x2000xr250x1", 2.0 - (1.0 - math.pi / 4) * 0.25**2),  # corner 1 only
        ("donut_s2000x1000", 4.0 - 1.0),  # square ring (from memory)
        # rounded-rectangle ring w x h, line width lw, corner radius (from memory); the
        # inner corner radius is r - lw = 250 um.
        (
            "donut_rc2000x1000x250xr500",
            (2.0 - (4.0 - math.pi) * 0.5**2) - (0.75 - (4.0 - math.pi) * 0.25**2),
        ),
    ],
)
def test_standard_symbol_pad_areas_mm(tmp_path: Path, symbol: str, area_mm2: float) -> None:
    # Pad record: P <x> <y> <sym> <pol> <dcode> <orient> (from memory); um sizes in mm files.
    rec = _rec(tmp_path, f"UNITS=MM\n$0 {symbol}\nP 3 4 0 P 0 0;0=1\n")
    assert rec.units_in_file == "mm"
    assert rec.n_objects == 1
    assert _area(rec) == pytest.approx(area_mm2, abs=TOL)
    x0, y0, x1, y1 = compose_record(rec).bounds
    assert (0.5 * (x0 + x1), 0.5 * (y0 + y1)) == pytest.approx((3.0, 4.0), abs=1e-6)


def test_round_pad_sets_circle_diameter(tmp_path: Path) -> None:
    rec = _rec(tmp_path, "UNITS=MM\n$0 r406.4\nP 0 0 0 P 0 0\n")
    assert rec.apertures[0].circle_diameter_mm == pytest.approx(0.4064)


@pytest.mark.parametrize(
    ("orient", "bounds"),
    [
        ("0", (-0.5, -1.0, 0.5, 1.0)),
        ("1", (-1.0, -0.5, 1.0, 0.5)),  # legacy code 1 = 90 degrees (from memory)
        ("8 90.0", (-1.0, -0.5, 1.0, 0.5)),  # code 8 + any angle (from memory)
        ("8 30.0", None),
    ],
)
def test_pad_orientation_turns_the_symbol(tmp_path: Path, orient: str, bounds: object) -> None:
    rec = _rec(tmp_path, f"UNITS=MM\n$0 rect1000x2000\nP 0 0 0 P 0 {orient}\n")
    geom = compose_record(rec)
    assert geom.area == pytest.approx(2.0, abs=1e-9)
    if bounds is None:
        # 30 degrees: the half-extent in X of a 1 x 2 rectangle is 0.5 cos30 + 1 sin30.
        assert geom.bounds[2] == pytest.approx(0.5 * math.cos(math.pi / 6) + 0.5, abs=1e-9)
    else:
        assert geom.bounds == pytest.approx(bounds, abs=1e-9)


USER_OFFSET = SQUARE_SURFACE_MM  # 1 x 1 mm square centred on (1, 0.5), off the origin


@pytest.mark.parametrize(
    ("orient", "centroid"),
    [
        ("0", (11.0, 10.5)),
        # ODB++ pad rotation is clockwise (from memory; the real packages cannot tell,
        # their rotated pads are symmetric): (1, 0.5) turned 90 cw -> (0.5, -1).
        ("8 90", (10.5, 9.0)),
        ("1", (10.5, 9.0)),
        # Mirror flips X before rotating (from memory): (1, 0.5) -> (-1, 0.5).
        ("9 0", (9.0, 10.5)),
        ("4", (9.0, 10.5)),
        # Mirror then 90 cw: (-1, 0.5) -> (0.5, 1).
        ("9 90", (10.5, 11.0)),
    ],
)
def test_user_symbol_pad_orientation(tmp_path: Path, orient: str, centroid: object) -> None:
    # User symbols live in symbols/<name>/features (from memory).
    rec = _rec(
        tmp_path,
        f"UNITS=MM\n$0 mysym\nP 10 10 0 P 0 {orient}\n",
        symbols={"mysym": USER_OFFSET},
    )
    geom = compose_record(rec)
    assert geom.area == pytest.approx(1.0, abs=1e-9)
    assert (geom.centroid.x, geom.centroid.y) == pytest.approx(centroid, abs=1e-9)
    assert rec.apertures[0].template == "mysym"


def test_user_symbol_cached_per_orientation(tmp_path: Path) -> None:
    body = "UNITS=MM\n$0 mysym\nP 0 0 0 P 0 0\nP 5 0 0 P 0 0\nP 9 0 0 P 0 8 90\n"
    rec = _rec(tmp_path, body, symbols={"mysym": USER_OFFSET})
    assert len(rec.apertures) == 2
    assert list(rec.obj_aperture) == [0, 0, 1]
    assert _area(rec) == pytest.approx(3.0, abs=1e-9)


def test_unknown_symbol_is_a_notice_not_silent(tmp_path: Path) -> None:
    body = "UNITS=MM\n$0 moire10x10x2x2x20x0\n$1 r1000\nP 0 0 0 P 0 0\nP 5 0 1 P 0 0\n"
    rec = _rec(tmp_path, body)
    assert rec.n_objects == 1
    assert any("moire" in n.message for n in rec.notices)


# --------------------------------------------------------------------------- lines, arcs


def test_round_line_area(tmp_path: Path) -> None:
    # Line record: L <xs> <ys> <xe> <ye> <sym> <pol> <dcode> (from memory); round ends.
    rec = _rec(tmp_path, "UNITS=MM\n$0 r1000\nL 0 0 10 0 0 P 0\n")
    assert rec.apertures[0].circle_diameter_mm == pytest.approx(1.0)
    assert _area(rec) == pytest.approx(10.0 + math.pi * 0.25, abs=TOL)


def test_square_line_area(tmp_path: Path) -> None:
    # A square symbol swept along a horizontal line: square ends (from memory).
    rec = _rec(tmp_path, "UNITS=MM\n$0 s1000\nL 0 0 10 0 0 P 0\n")
    assert _area(rec) == pytest.approx(11.0, abs=1e-9)


@pytest.mark.parametrize(("cw", "above"), [("N", True), ("Y", False)])
def test_arc_area_and_direction(tmp_path: Path, cw: str, above: bool) -> None:
    # Arc record: A <xs> <ys> <xe> <ye> <xc> <yc> <sym> <pol> <dcode> <cw> (from memory).
    # Half circle of radius 5, width 1: half annulus 5*pi plus two half caps.
    rec = _rec(tmp_path, f"UNITS=MM\n$0 r1000\nA 5 0 -5 0 0 0 0 P 0 {cw}\n")
    geom = compose_record(rec, quad_segs=QUAD_SEGS)
    assert geom.area == pytest.approx(5.0 * math.pi + math.pi * 0.25, abs=TOL)
    assert (geom.centroid.y > 0) is above


# --------------------------------------------------------------------------- surfaces


SURFACE_WITH_HOLE = """S P 0
OB 0 0 I
OS 10 0
OS 10 10
OS 0 10
OS 0 0
OE
OB 3 3 H
OS 3 7
OS 7 7
OS 7 3
OS 3 3
OE
SE
"""


def test_surface_with_hole(tmp_path: Path) -> None:
    # Surface: S <pol> <dcode>, contours OB <x> <y> I|H ... OE, closed by SE (from memory).
    rec = _rec(tmp_path, "UNITS=MM\n" + SURFACE_WITH_HOLE)
    assert _area(rec) == pytest.approx(100.0 - 16.0, abs=1e-9)
    assert not compose_record(rec).contains(shapely.Point(5, 5))


def test_surface_hole_keeps_earlier_features(tmp_path: Path) -> None:
    # A hole belongs to its surface only: a pad drawn before it, inside the hole, stays.
    body = "UNITS=MM\n$0 s1000\nP 5 5 0 P 0 0\n" + SURFACE_WITH_HOLE
    rec = _rec(tmp_path, body)
    assert _area(rec) == pytest.approx(84.0 + 1.0, abs=1e-9)


def test_surface_arc_contour(tmp_path: Path) -> None:
    # OC <xe> <ye> <xc> <yc> <cw>: a full disc of radius 2 as two half arcs.
    body = "UNITS=MM\nS P 0\nOB 2 0 I\nOC -2 0 0 0 N\nOC 2 0 0 0 N\nOE\nSE\n"
    assert _area(_rec(tmp_path, body)) == pytest.approx(4.0 * math.pi, abs=TOL)


def test_negative_features_in_order(tmp_path: Path) -> None:
    # Polarity N erases what was imaged before it, not after (from memory).
    body = (
        "UNITS=MM\n$0 s2000\n$1 r1000\n"
        "S P 0\nOB 0 0 I\nOS 10 0\nOS 10 10\nOS 0 10\nOS 0 0\nOE\nSE\n"
        "P 5 5 0 N 0 0\n"
        "P 5 5 1 P 0 0\n"
    )
    rec = _rec(tmp_path, body)
    assert list(rec.obj_dark) == [True, False, True]
    assert _area(rec) == pytest.approx(96.0 + math.pi * 0.25, abs=TOL)


# --------------------------------------------------------------------------- units


@pytest.mark.parametrize("units_line", ["", "UNITS=INCH\n", "U INCH\n"])
def test_inch_file_uses_mil_symbols(tmp_path: Path, units_line: str) -> None:
    # No units line means inch (from memory); symbol sizes are then mil.
    body = units_line + "$0 r10\n$1 r100\nL 0 0 1 0 0 P 0\nP 2 0 1 P 0 0\n"
    rec = _rec(tmp_path, body)
    assert rec.units_in_file == "inch"
    w = 10 * 0.0254
    line_area = 25.4 * w + math.pi * (w / 2) ** 2
    pad_area = math.pi * (100 * 0.0254 / 2) ** 2
    assert _area(rec) == pytest.approx(line_area + pad_area, abs=TOL)
    assert rec.obj_xy[1] == pytest.approx((50.8, 0.0))


def test_symbol_unit_override(tmp_path: Path) -> None:
    # "$n <name> I" gives the symbol in mil inside a mm file (from memory).
    rec = _rec(tmp_path, "UNITS=MM\n$0 r100 I\nP 0 0 0 P 0 0\n")
    assert rec.apertures[0].circle_diameter_mm == pytest.approx(2.54)


def test_malformed_record_is_parse_error(tmp_path: Path) -> None:
    with pytest.raises(ParseError, match=r"features:3: .*must be a finite number"):
        _rec(tmp_path, "UNITS=MM\n$0 r100\nP x 0 0 P 0 0\n")


# --------------------------------------------------------------------------- job level

MATRIX = """STEP {
    COL=2
    NAME=PANEL
}
STEP {
    COL=1
    NAME=BOARD
}
LAYER {
    ROW=3
    CONTEXT=BOARD
    TYPE=POWER_GROUND
    NAME=GND
    POLARITY=NEGATIVE
}
LAYER {
    ROW=1
    CONTEXT=BOARD
    TYPE=COMPONENT
    NAME=COMP_+_TOP
    POLARITY=POSITIVE
}
LAYER {
    ROW=2
    CONTEXT=BOARD
    TYPE=SIGNAL
    NAME=TOP
    POLARITY=POSITIVE
}
LAYER {
    ROW=4
    CONTEXT=MISC
    TYPE=SIGNAL
    NAME=PASTE
    POLARITY=POSITIVE
}
LAYER {
    ROW=5
    CONTEXT=BOARD
    TYPE=SIGNAL
    NAME=BOT
    POLARITY=POSITIVE
}
"""

COMPONENTS_TOP = """UNITS=MM
CMP 0 10.0 20.0 90.0 N L7 IND_1210 ;0=1
PRP Value '2.2\u00b5H'
PRP Description 'power inductor'
TOP 0 10 20 0 N 1 0 1
"""

COMPONENTS_BOT = """UNITS=INCH
CMP 0 1.0 2.0 270 M U3 SOIC8
"""


def _write_job(root: Path) -> None:
    (root / "matrix").mkdir(parents=True)
    (root / "matrix" / "matrix").write_bytes(MATRIX.replace("\n", "\r\n").encode())
    board = root / "steps" / "board"
    for layer in ("top", "gnd", "bot", "paste", "comp_+_top", "comp_+_bot"):
        (board / "layers" / layer).mkdir(parents=True)
    (board / "profile").write_text(
        "UNITS=MM\nS P 0\nOB 0 0 I\nOS 30 0\nOS 30 40\nOS 0 40\nOE\nSE\n"
    )
    (board / "layers" / "top" / "features").write_text("UNITS=MM\n$0 r1000\nP 1 1 0 P 0 0\n")
    (board / "layers" / "gnd" / "features").write_text("UNITS=MM\n$0 r1000\nP 1 1 0 P 0 0\n")
    (board / "layers" / "bot" / "features.Z").write_bytes(b"\x1f\x9d\x90")
    (board / "layers" / "comp_+_top" / "components").write_text(COMPONENTS_TOP, "utf-8")
    (board / "layers" / "comp_+_bot" / "components").write_text(COMPONENTS_BOT, "utf-8")
    panel = root / "steps" / "panel"
    (panel / "layers" / "top").mkdir(parents=True)
    (panel / "profile").write_text("")
    (panel / "layers" / "top" / "features").write_text("UNITS=MM\n$0 r1000\nP 1 1 0 P 0 0\n")


def test_read_odb_small_job(tmp_path: Path) -> None:
    root = tmp_path / "job"
    _write_job(root)
    pkg = read_odb(root)
    assert pkg.steps == ("BOARD", "PANEL")
    assert pkg.step == "BOARD"  # the panel step's profile is empty
    assert [r.row for r in pkg.matrix] == [1, 2, 3, 4, 5]
    # CONTEXT=MISC rows are not copper even when typed SIGNAL.
    assert pkg.copper_names == ("TOP", "GND", "BOT")
    assert [r.negative_image for r in pkg.copper] == [False, True, False]
    # A header-only .Z file (ncompress format: magic 1f 9d, flags byte) decodes to no text.
    assert pkg.copper[2].n_objects == 0
    assert pkg.copper[2].source.endswith("features.Z")
    assert pkg.profile_ring.shape == (5, 2)
    assert shapely.Polygon(pkg.profile_ring).area == pytest.approx(1200.0)
    by_ref = {p.ref: p for p in pkg.placements}
    l7, u3 = by_ref["L7"], by_ref["U3"]
    assert (l7.x_mm, l7.y_mm, l7.side) == (10.0, 20.0, "top")
    # ODB++ component rotation is clockwise (from memory); rows carry CCW degrees.
    assert l7.rotation_deg == pytest.approx(270.0)
    assert l7.value == "2.2\u00b5H"
    assert l7.description == "power inductor"
    assert l7.package == "IND_1210"
    assert (u3.x_mm, u3.y_mm, u3.side) == pytest.approx((25.4, 50.8, "bottom"))
    assert u3.rotation_deg == pytest.approx(90.0)


def test_read_odb_without_matrix(tmp_path: Path) -> None:
    with pytest.raises(InputError, match="matrix/matrix"):
        read_odb(tmp_path)


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
def test_thunderscope_layers_and_step(thunderscope: OdbPackage) -> None:
    pkg = thunderscope
    assert pkg.step == "PCB"
    assert pkg.copper_names == (
        "TOP_LAYER",
        "INT1__GND_",
        "INT2__SIGN_",
        "INT3__SIGN_",
        "INT4__GND_",
        "BOTTOM_LAYER",
    )
    # Record counts from SOURCE.md (P + L + A + S per layer).
    assert [r.n_objects for r in pkg.copper] == [
        5721 + 5247 + 988 + 98,
        3784 + 5 + 8,
        3784 + 13 + 31,
        3784 + 1087 + 216 + 499,
        3784 + 10 + 8,
        4673 + 1631 + 16 + 188,
    ]
    # Board outline 122.50 x 103.50 mm, lower-left corner (87.0, -156.8) (SOURCE.md).
    lo, hi = pkg.profile_ring.min(axis=0), pkg.profile_ring.max(axis=0)
    assert lo == pytest.approx((87.0, -156.8), abs=1e-6)
    assert hi - lo == pytest.approx((122.5, 103.5), abs=1e-6)
    assert len(pkg.placements) == 598 + 424


@pytest.mark.realboards
def test_thunderscope_inductors_match_gerber_placement(
    thunderscope: OdbPackage, realboard: Callable[[str], Path]
) -> None:
    from fluxshadow.io.placement import read_placement

    folder = realboard("thunderscope-rev5.3")
    rows, _ = read_placement(folder / "Thunderscope_Rev5.3_TS-PCIe_Positions.txt")
    gerber = {r.ref: r for r in rows}
    odb = {r.ref: r for r in thunderscope.placements}
    for ref in ("L2", "L3", "L4", "L5"):
        g, o = gerber[ref], odb[ref]
        # Frame offset from SOURCE.md: Gerber = ODB + (-87.000, +156.800) mm.
        assert o.x_mm - 87.0 == pytest.approx(g.x_mm, abs=0.05)
        assert o.y_mm + 156.8 == pytest.approx(g.y_mm, abs=0.05)
        turn = (o.rotation_deg - g.rotation_deg) % 360.0
        assert min(turn, 360.0 - turn) < 0.01
        assert o.side == g.side == "top"
        assert o.value == "1uH"  # PRP Value of the component (SOURCE.md: 1 uH)
        assert o.description.startswith("1 \u00b5H")


@pytest.mark.realboards
def test_thunderscope_plane_matches_gerber_under_l2(
    thunderscope: OdbPackage, realboard: Callable[[str], Path]
) -> None:
    from fluxshadow.io.gerber import read_gerber

    folder = realboard("thunderscope-rev5.3")
    gerber = read_gerber(folder / "Thunderscope_Rev5.3-Int1 (GND).g1")
    l2 = next(r for r in thunderscope.placements if r.ref == "L2")
    win = (l2.x_mm - 5, l2.y_mm - 5, l2.x_mm + 5, l2.y_mm + 5)
    a = compose_record(thunderscope.copper[1], win)
    b = compose_record(gerber, (win[0] - 87.0, win[1] + 156.8, win[2] - 87.0, win[3] + 156.8))
    b = shapely.affinity.translate(b, 87.0, -156.8)
    # ODB coordinates are rounded to 0.01 mm, so edges move by up to 0.005 mm.
    assert a.area == pytest.approx(b.area, rel=1e-3)
    assert a.symmetric_difference(b).area < 0.01 * b.area


@pytest.mark.realboards
def test_camjob_edit_step_and_copper_match_gerbers() -> None:
    from fluxshadow.io.gerber import read_gerber

    root = _odb("gerbonara-camjob-2layer")
    pkg = read_odb(root)
    assert pkg.steps == ("ORIG", "NET", "EDIT")
    assert pkg.step == "EDIT"
    assert pkg.copper_names == ("TL", "BL")
    assert pkg.placements == ()
    assert any("no UNITS line" in n.message for n in pkg.notices)
    # Board outline about 50.0 x 50.0 mm (SOURCE.md).
    span = pkg.profile_ring.max(axis=0) - pkg.profile_ring.min(axis=0)
    assert span == pytest.approx((50.0, 50.0), abs=0.05)
    for name, rec in zip(pkg.copper_names, pkg.copper, strict=True):
        assert int(np.count_nonzero(~rec.obj_dark)) == 41  # negative edge pull-back lines
        assert any(ap.template.startswith("construct") for ap in rec.apertures)
        gerber = read_gerber(root.parent / "gerber" / name.lower())
        a, b = compose_record(rec), compose_record(gerber)
        assert a.area == pytest.approx(b.area, rel=1e-4)
        assert a.symmetric_difference(b).area < 0.05


def test_not_populated_components_are_marked(tmp_path: Path) -> None:
    """A component whose boolean attribute ``.no_pop`` is set (``@n .no_pop`` declared in
    the components file, ``;n`` or ``;n=1`` on the CMP line; ODB++ Format Specification,
    components file and system attributes, from memory) is marked not populated in its
    description, which the magnetics step excludes; ``;n=0`` leaves it populated."""
    root = tmp_path / "job"
    _write_job(root)
    comp = root / "steps" / "board" / "layers" / "comp_+_top" / "components"
    comp.write_text(
        "UNITS=MM\n@0 .comp_mount_type\n@1 .no_pop\n"
        "CMP 0 10.0 20.0 0 N L7 IND_1210 ;0=1,1\nPRP Description 'power inductor'\n"
        "CMP 1 12.0 20.0 0 N L8 IND_1210 ;0=1,1=0\n"
        "CMP 2 14.0 20.0 0 N L9 IND_1210 ;1=1\n"
        "CMP 3 16.0 20.0 0 N L10 IND_1210 ;0=1\n",
        "utf-8",
    )
    by_ref = {p.ref: p for p in read_odb(root).placements}
    assert by_ref["L7"].description == "not populated (ODB++ attribute .no_pop); power inductor"
    assert "not populated" in by_ref["L9"].description
    assert "not populated" not in by_ref["L8"].description
    assert "not populated" not in by_ref["L10"].description
