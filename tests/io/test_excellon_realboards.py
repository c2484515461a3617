"""Excellon reader on every drill file of the shared real-board corpus.

Expected tool and hit counts come from the "Files saved here" tables of each board's
``SOURCE.md``. There a "hit" is one coordinate-bearing line: a ``G85`` slot line counts once,
a routed slot (``G00`` move line + ``G01`` cut line) counts twice. So
``holes + lines_per_slot * slots == hits``; the split into holes and slots was counted from
the files' own statements (``G85`` lines, ``M15``...``M16`` blocks).
"""

from __future__ import annotations

from collections.abc import Callable
from pathlib import Path

import numpy as np
import pytest

from fluxshadow.io.excellon import looks_like_excellon, read_excellon

IN = 25.4

# board, file, units, tools, hits (SOURCE.md), holes, slots, lines per slot, plating_from
DRILLS = [
    ("bq25798-mppt-v2.1", "Drill_PTH_Through.DRL", "mm", 6, 74, 72, 2, 1, "comment"),
    ("bq25798-mppt-v2.1", "Drill_PTH_Through_Via.DRL", "mm", 1, 52, 52, 0, 1, "comment"),
    ("cheap-focer-2", "Cheap FOCer 2 60mm-NPTH.drl", "inch", 1, 6, 6, 0, 1, "attribute"),
    ("cheap-focer-2", "Cheap FOCer 2 60mm-PTH.drl", "inch", 9, 802, 796, 3, 2, "attribute"),
    ("huvud-tiny2", "Huvud-NPTH.drl", "inch", 1, 2, 2, 0, 1, "attribute"),
    ("huvud-tiny2", "Huvud-PTH.drl", "inch", 10, 245, 245, 0, 1, "attribute"),
    ("incunest-motherboard", "Motherboard-RectHoles.TXT", "inch", 1, 6, 0, 3, 2, "comment"),
    ("incunest-motherboard", "Motherboard-RoundHoles.TXT", "inch", 17, 945, 945, 0, 1, "comment"),
    ("incunest-motherboard", "Motherboard-SlotHoles.TXT", "inch", 1, 16, 0, 8, 2, "comment"),
    ("limesdr-xtrx-1v1", "LimeSDR-XTRX_1v1.TX1", "mm", 1, 105, 105, 0, 1, "comment"),
    ("limesdr-xtrx-1v1", "LimeSDR-XTRX_1v1.TX4", "mm", 1, 13, 13, 0, 1, "comment"),
    ("limesdr-xtrx-1v1", "LimeSDR-XTRX_1v1.TXT", "mm", 3, 789, 789, 0, 1, "comment"),
    ("pycubed-mainboard-v05", "gerbers/mainboard-NPTH.drl", "mm", 1, 2, 2, 0, 1, "attribute"),
    ("pycubed-mainboard-v05", "gerbers/mainboard-PTH.drl", "mm", 12, 509, 505, 4, 1, "attribute"),
    ("thunderscope-rev5.3", "Thunderscope_Rev5.3.drl", "inch", 14, 3877, 3866, 11, 1, "attribute"),
]

Getter = Callable[[str], Path]


@pytest.mark.realboards
@pytest.mark.parametrize(
    ("board", "name", "units", "tools", "hits", "holes", "slots", "per_slot", "plating"),
    DRILLS,
    ids=[f"{d[0]}:{d[1]}" for d in DRILLS],
)
def test_counts_match_source_md(
    realboard: Getter,
    board: str,
    name: str,
    units: str,
    tools: int,
    hits: int,
    holes: int,
    slots: int,
    per_slot: int,
    plating: str,
) -> None:
    path = realboard(board) / name
    head = path.read_text(encoding="utf-8", errors="replace")[:4096]
    assert looks_like_excellon(head)
    rec = read_excellon(path)
    assert rec.units_in_file == units
    assert rec.tool_count == tools
    assert rec.hole_xy.shape == (holes, 2)
    assert rec.slot_xy.shape == (slots, 2, 2)
    assert holes + per_slot * slots == hits
    assert rec.plating_from == plating
    assert rec.span is None
    assert np.all(rec.hole_diameter_mm > 0)
    assert np.all(rec.slot_diameter_mm > 0)
    assert np.all(np.isfinite(rec.hole_xy))


@pytest.mark.realboards
def test_bq25798_first_hole_lz_3_3(realboard: Getter) -> None:
    rec = read_excellon(realboard("bq25798-mppt-v2.1") / "Drill_PTH_Through.DRL")
    # SOURCE.md: METRIC,LZ 3:3, X045720 = 45.720 mm (first line X045720Y024765)
    np.testing.assert_allclose(rec.hole_xy[0], [45.720, 24.765])
    np.testing.assert_allclose(sorted(set(rec.hole_diameter_mm)), [0.31, 1.0, 1.101, 1.301, 3.101])
    # the two G85 slots are cut with T06 (4.500 mm): X080391Y028362G85X080391Y028367
    np.testing.assert_allclose(rec.slot_xy[0], [[80.391, 28.362], [80.391, 28.367]])
    np.testing.assert_allclose(rec.slot_diameter_mm, [4.5, 4.5])


@pytest.mark.realboards
def test_incunest_routed_slots_inch_lz_2_5(realboard: Getter) -> None:
    folder = realboard("incunest-motherboard")
    slots = read_excellon(folder / "Motherboard-SlotHoles.TXT")
    # SOURCE.md: X0290146 = 2.90146 in; first rout G00X0290146Y-0228472, M15, G01Y-0224732
    np.testing.assert_allclose(
        slots.slot_xy[0], [[2.90146 * IN, -2.28472 * IN], [2.90146 * IN, -2.24732 * IN]]
    )
    np.testing.assert_allclose(slots.slot_diameter_mm, 0.01969 * IN)
    assert slots.slot_plated.all()
    rect = read_excellon(folder / "Motherboard-RectHoles.TXT")
    np.testing.assert_allclose(
        rect.slot_xy[0], [[2.41921 * IN, -2.32858 * IN], [2.39165 * IN, -2.32858 * IN]]
    )
    round_holes = read_excellon(folder / "Motherboard-RoundHoles.TXT")
    # first hit X01195Y-018465 (2:5, right-padded): 1.195 in, -1.8465 in
    np.testing.assert_allclose(round_holes.hole_xy[0], [1.195 * IN, -1.8465 * IN])


@pytest.mark.realboards
def test_cheap_focer_inch_decimal_and_routed_slot(realboard: Getter) -> None:
    folder = realboard("cheap-focer-2")
    npth = read_excellon(folder / "Cheap FOCer 2 60mm-NPTH.drl")
    np.testing.assert_allclose(npth.hole_xy[0], [0.2441 * IN, 3.7913 * IN])
    assert not npth.hole_plated.any()
    pth = read_excellon(folder / "Cheap FOCer 2 60mm-PTH.drl")
    # G00X2.1583Y0.5482 / M15 / G01X2.1976Y0.5482 / M16 with T2 (0.0138 in)
    np.testing.assert_allclose(
        pth.slot_xy[0], [[2.1583 * IN, 0.5482 * IN], [2.1976 * IN, 0.5482 * IN]]
    )
    np.testing.assert_allclose(pth.slot_diameter_mm[0], 0.0138 * IN)


@pytest.mark.realboards
def test_thunderscope_mixed_plating_per_tool(realboard: Getter) -> None:
    rec = read_excellon(realboard("thunderscope-rev5.3") / "Thunderscope_Rev5.3.drl")
    # T1-T7 Plated (3741+10+8+6+12+4+3 hits), T8-T14 NonPlated (82 holes + 11 G85 slots)
    assert int(rec.hole_plated.sum()) == 3784
    assert int((~rec.hole_plated).sum()) == 82
    assert not rec.slot_plated.any()
    np.testing.assert_allclose(
        rec.slot_xy[0], [[0.1575 * IN, 0.2362 * IN], [0.4331 * IN, 0.2362 * IN]]
    )


@pytest.mark.realboards
def test_limesdr_type_comments_and_pair_files(realboard: Getter) -> None:
    folder = realboard("limesdr-xtrx-1v1")
    through = read_excellon(folder / "LimeSDR-XTRX_1v1.TXT")
    # METRIC,LZ 4:4: X0000375 -> 0000.3750 mm; X-00009747 -> -0.9747 mm
    np.testing.assert_allclose(through.hole_xy[0], [0.375, 0.375])
    assert np.isclose(through.hole_xy[:, 0], -0.9747).any()
    # ;TYPE=NON_PLATED precedes T4 (0.8 mm): 6 hits
    non_plated = through.hole_diameter_mm[~through.hole_plated]
    np.testing.assert_allclose(non_plated, [0.8] * 6)
    # .TX1/.TX4: SOURCE.md knows their spans only from a drill report that is not in the
    # package; the files do not state them, so no span, but a notice says so.
    for name in ("LimeSDR-XTRX_1v1.TX1", "LimeSDR-XTRX_1v1.TX4"):
        rec = read_excellon(folder / name)
        assert rec.span is None
        assert any("layer span" in n.message for n in rec.notices)
        assert rec.hole_plated.all()
