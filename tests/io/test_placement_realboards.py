"""Placement and BOM readers on every table of the shared real-board corpus.

Row counts and per-side counts are those stated in each board's ``SOURCE.md`` ("Board"
section: placed parts, top/bottom). Inductor positions are the ``SOURCE.md`` tables
("position in Gerber frame", rounded to 0.01 mm); for every board but pycubed the placement
frame is the Gerber frame (identity, ``realboards/README.md``). BOM designator totals are
the sums of each file's own quantity column (for the BOM without one, the count of
designators on its lines, checked with a separate script).
"""

from __future__ import annotations

from collections.abc import Callable
from pathlib import Path

import pytest

from fluxshadow.errors import Notice
from fluxshadow.io.placement import join_bom, read_bom, read_placement, sniff_table
from fluxshadow.io.records import PlacementRow

Getter = Callable[[str], Path]

# board, file (a glob pattern matching exactly one file), rows, top, bottom
PLACEMENTS = [
    (
        "bq25798-mppt-v2.1",
        "PickAndPlace_PCB_BQ25798-test-board-mppt-solar_2026-01-12.csv",
        57,
        37,
        20,
    ),
    ("cheap-focer-2", "Cheap FOCer 2 60mm-top-pos.csv", 148, 148, 0),
    ("cheap-focer-2", "Cheap FOCer 2 60mm-bottom-pos.csv", 0, 0, 0),
    ("cheap-focer-2", "Cheap FOCer 2 60mm-top.pos", 148, 148, 0),
    ("cheap-focer-2", "Cheap FOCer 2 60mm-bottom.pos", 0, 0, 0),
    ("cheap-focer-2", "* SMT POS Cheap FOCer 2.csv", 148, 148, 0),
    ("cheap-focer-2", "cpl.csv", 148, 148, 0),
    ("huvud-tiny2", "Huvud-top-pos.csv", 113, 113, 0),
    ("huvud-tiny2", "Huvud-top-pos-*.csv", 113, 113, 0),
    ("incunest-motherboard", "Pick Place for Motherboard.csv", 226, 208, 18),
    ("limesdr-xtrx-1v1", "Pick Place for LimeSDR-XTRX_1v1.csv", 532, 306, 226),
    ("limesdr-xtrx-1v1", "Pick Place for LimeSDR-XTRX_1v1.txt", 532, 306, 226),
    ("pycubed-mainboard-v05", "mainboard-top.pos", 107, 107, 0),
    ("pycubed-mainboard-v05", "mainboard-bottom.pos", 70, 0, 70),
    ("thunderscope-rev5.3", "Thunderscope_Rev5.3_TS-PCIe_Positions.txt", 739, 454, 285),
]

# board, file, designators (sum of the quantity column)
BOMS = [
    ("bq25798-mppt-v2.1", "BOM_BQ25798-test-board-mppt-solar_2026-01-12.csv", 37),
    ("cheap-focer-2", "bom.csv", 164),
    ("huvud-tiny2", "Huvud-BOM.csv", 119),
    ("pycubed-mainboard-v05", "mainboardv05.csv", 176),
    ("thunderscope-rev5.3", "Thunderscope_Rev5.3_TS-PCIe_MP_BOM.csv", 746),
]


def _file(folder: Path, pattern: str) -> Path:
    matches = sorted(folder.glob(pattern))
    assert len(matches) == 1, (pattern, matches)
    return matches[0]


def _load(
    realboard: Getter, board: str, name: str
) -> tuple[dict[str, PlacementRow], tuple[Notice, ...]]:
    rows, notices = read_placement(_file(realboard(board), name))
    return {r.ref: r for r in rows}, notices


@pytest.mark.realboards
@pytest.mark.parametrize(
    ("board", "name", "n", "top", "bottom"), PLACEMENTS, ids=[p[1] for p in PLACEMENTS]
)
def test_placement_counts(
    realboard: Getter, board: str, name: str, n: int, top: int, bottom: int
) -> None:
    path = _file(realboard(board), name)
    assert sniff_table(path) == "placement"
    rows, notices = read_placement(path)
    assert len(rows) == n
    assert sum(r.side == "top" for r in rows) == top
    assert sum(r.side == "bottom" for r in rows) == bottom
    assert len({r.ref for r in rows}) == n  # no duplicates in these files
    assert all(0.0 <= r.rotation_deg < 360.0 for r in rows)
    assert not any(n.message.startswith("row skipped") for n in notices)


@pytest.mark.realboards
@pytest.mark.parametrize(("board", "name", "n"), BOMS, ids=[b[1] for b in BOMS])
def test_bom_counts(realboard: Getter, board: str, name: str, n: int) -> None:
    path = realboard(board) / name
    assert sniff_table(path) == "bom"
    rows, notices = read_bom(path)
    assert len(rows) == n
    assert len({r.ref for r in rows}) == n
    assert notices == ()


@pytest.mark.realboards
def test_cheap_focer_l1_in_every_dialect(realboard: Getter) -> None:
    for name in ("Cheap FOCer 2 60mm-top-pos.csv", "Cheap FOCer 2 60mm-top.pos"):
        rows, _ = _load(realboard, "cheap-focer-2", name)
        l1 = rows["L1"]
        assert (l1.x_mm, l1.y_mm, l1.rotation_deg, l1.side) == (10.9, 50.2, 270.0, "top")
        assert (l1.value, l1.package) == ("22u", "L_Taiyo-Yuden_NR-60xx_HandSoldering")


@pytest.mark.realboards
def test_cheap_focer_cpl_joined_with_bom(realboard: Getter) -> None:
    folder = realboard("cheap-focer-2")
    cpl, cpl_notices = read_placement(folder / "cpl.csv")
    l1 = next(r for r in cpl if r.ref == "L1")
    assert (l1.value, l1.package) == ("", "")
    assert any("millimetres assumed" in n.message for n in cpl_notices)
    bom, _ = read_bom(folder / "bom.csv")
    notices: list[Notice] = []
    joined = {r.ref: r for r in join_bom(cpl, bom, notices=notices)}
    assert joined["L1"].value == "22u"
    assert joined["L1"].package == "L_Taiyo-Yuden_NR-60xx_HandSoldering"
    assert (joined["L1"].x_mm, joined["L1"].y_mm, joined["L1"].side) == (10.9, 50.2, "top")
    # C5 is one of 16 designators in one quoted cell ("C5, C8, C19, ...")
    assert joined["C5"].value == "2.2u"
    assert joined["U5"].value == "STM32F405RGT6"
    assert notices == []  # every placed part is in the BOM


@pytest.mark.realboards
def test_bq25798_utf16_with_mm_suffix(realboard: Getter) -> None:
    rows, notices = _load(realboard, "bq25798-mppt-v2.1", PLACEMENTS[0][1])
    l1 = rows["L1"]
    assert (l1.x_mm, l1.y_mm, l1.side, l1.rotation_deg) == (45.72, 36.96, "top", 0.0)
    assert (l1.value, l1.package) == ("2.2uH", "IND-SMD_L7.0-W6.6_MCW-0650-220")
    assert rows["TP1"].side == "bottom"
    assert notices == ()  # units come from the suffixes


@pytest.mark.realboards
def test_huvud_both_dialects_agree_on_l1(realboard: Getter) -> None:
    for name in ("Huvud-top-pos.csv", "Huvud-top-pos-*.csv"):
        l1 = _load(realboard, "huvud-tiny2", name)[0]["L1"]
        assert (l1.x_mm, l1.y_mm) == pytest.approx((15.81, 28.70), abs=0.005)
        assert (l1.value, l1.side) == ("6.8uH", "top")
    bom = {r.ref: r for r in read_bom(realboard("huvud-tiny2") / "Huvud-BOM.csv")[0]}
    assert (bom["L1"].value, bom["L1"].package) == ("6.8uH", "Inductor_SMD:L_1210_3225Metric")


@pytest.mark.realboards
def test_incunest_banner_and_no_values(realboard: Getter) -> None:
    rows, notices = _load(realboard, "incunest-motherboard", "Pick Place for Motherboard.csv")
    expected = {
        "L1": (49.83, -38.33),
        "L2": (63.12, -46.99),
        "L3": (73.15, -29.97),
        "L5": (33.91, -32.38),
    }
    for ref, xy in expected.items():
        assert (rows[ref].x_mm, rows[ref].y_mm) == pytest.approx(xy, abs=0.005)
        assert (rows[ref].side, rows[ref].value, rows[ref].package) == ("top", "", "")
    assert rows["BUZ1"].side == "bottom"
    assert rows["L1"].line == 122  # 13 banner lines, header on line 13
    assert notices == ()  # unit from "Center-X(mm)"


@pytest.mark.realboards
def test_limesdr_bottom_inductors_in_both_files(realboard: Getter) -> None:
    for name in ("Pick Place for LimeSDR-XTRX_1v1.csv", "Pick Place for LimeSDR-XTRX_1v1.txt"):
        rows, _ = _load(realboard, "limesdr-xtrx-1v1", name)
        l2 = rows["L2"]
        assert (l2.x_mm, l2.y_mm) == pytest.approx((24.27, 1.65), abs=0.01)
        assert (l2.side, l2.value, l2.package) == ("bottom", "0.47uH, 4A", "IND0806")
        positions = {
            "L3": (27.62, 1.65),
            "L4": (24.27, 4.55),
            "L5": (27.62, 4.55),
            "L6": (15.22, 4.55),
            "L7": (11.93, 4.55),
            "L8": (15.22, 1.65),
            "L9": (11.93, 1.65),
        }
        for ref, xy in positions.items():
            assert (rows[ref].x_mm, rows[ref].y_mm) == pytest.approx(xy, abs=0.01)
            assert rows[ref].side == "bottom"
        assert (rows["MECH1"].x_mm, rows["MECH1"].y_mm) == (-100.0, -100.0)
        assert rows["R57"].value == "15R, 1%"
        assert rows["IC28"].rotation_deg == 0.0  # written as 360


@pytest.mark.realboards
def test_pycubed_bottom_x_kept_raw(realboard: Getter) -> None:
    bottom, notices = _load(realboard, "pycubed-mainboard-v05", "mainboard-bottom.pos")
    # README.md: gerber_x = 98.340 - x (bottom), gerber_y = y - 148.369; SOURCE.md puts L4
    # at (148.52, -70.23) in the Gerber frame, so the file must hold x = -50.18, y = 78.14.
    l4 = bottom["L4"]
    assert (l4.x_mm, l4.y_mm) == pytest.approx((98.340 - 148.52, -70.23 + 148.369), abs=0.01)
    assert (l4.side, l4.value, l4.package) == ("bottom", "1uH", "L_2510")
    assert (bottom["C4"].x_mm, bottom["C4"].y_mm) == (-36.9189, 48.2981)
    assert notices == ()  # "## Unit = mm" banner
    top = _load(realboard, "pycubed-mainboard-v05", "mainboard-top.pos")[0]
    for ref, xy in {
        "L1": (137.29, -103.25),
        "L2": (154.82, -87.62),
        "L3": (171.20, -96.01),
    }.items():
        assert (top[ref].x_mm + 98.340, top[ref].y_mm - 148.369) == pytest.approx(xy, abs=0.01)
    bom = {r.ref: r for r in read_bom(realboard("pycubed-mainboard-v05") / "mainboardv05.csv")[0]}
    assert (bom["L4"].value, bom["L3"].value, bom["L2"].value) == ("1uH", "33uH", "3.3uH")
    assert bom["C3"].description == "0.1uF +-10% 50V X7R 0603"


@pytest.mark.realboards
def test_thunderscope_both_sides_and_bom(realboard: Getter) -> None:
    rows, _ = _load(realboard, "thunderscope-rev5.3", PLACEMENTS[-1][1])
    expected = {
        "L2": (98.42, 35.17),
        "L3": (68.30, 41.95),
        "L4": (64.58, 49.85),
        "L5": (94.47, 43.16),
    }
    for ref, xy in expected.items():
        assert (rows[ref].x_mm, rows[ref].y_mm) == pytest.approx(xy, abs=0.01)
        assert (rows[ref].side, rows[ref].value) == ("top", "1uH")
    assert rows["L2"].rotation_deg == 270.0  # written as -90
    assert rows["C1"].side == "bottom"
    bom = {r.ref: r for r in read_bom(realboard("thunderscope-rev5.3") / BOMS[-1][1])[0]}
    assert {bom[f"L{i}"].value for i in range(2, 6)} == {"1uH"}
    assert bom["L2"].package == "1210"
    assert "C70_1" in bom
