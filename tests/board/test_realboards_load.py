"""Every shared real board loads: copper order, power inductors, placement frame.

Expected values come from each board's ``SOURCE.md`` in ``../shared/realboards`` (the
corpus notes, written from the published files): the "Copper layers (top -> bottom)",
"Power inductors / magnetics" and "Coordinate frames (measured)" sections.
"""

from __future__ import annotations

from collections.abc import Callable
from pathlib import Path

import pytest

import fluxshadow
from fluxshadow.board.model import Board

pytestmark = pytest.mark.realboards

EXPECTED: dict[str, tuple[list[str], set[str]]] = {
    "bq25798-mppt-v2.1": (["Gerber_TopLayer.GTL", "Gerber_BottomLayer.GBL"], {"L1"}),
    "cheap-focer-2": (
        ["Cheap FOCer 2 60mm-Top_Signal.gbr", "Cheap FOCer 2 60mm-Bottom_Signal.gbr"],
        {"L1"},
    ),
    "huvud-tiny2": (
        ["Huvud-F_Cu.gtl", "Huvud-In1_Cu.g2", "Huvud-In2_Cu.g3", "Huvud-B_Cu.gbl"],
        {"L1"},
    ),
    "incunest-motherboard": (
        ["Motherboard.GTL", "Motherboard.G1", "Motherboard.G2", "Motherboard.GBL"],
        {"L1", "L2", "L3", "L5"},
    ),
    "limesdr-xtrx-1v1": (
        [f"LimeSDR-XTRX_1v1.{e}" for e in ("GTL", "G1", "G2", "G3", "G4", "G5", "G6", "GBL")],
        {f"L{i}" for i in range(2, 10)},
    ),
    "pycubed-mainboard-v05": (
        [
            "gerbers/mainboard-F_Cu.gtl",
            "gerbers/mainboard-Route2.g2",
            "gerbers/mainboard-Route15.g3",
            "gerbers/mainboard-B_Cu.gbl",
        ],
        # SOURCE.md lists L1 (10 uH 0805, "could be a filter") with the power inductors.
        {"L1", "L2", "L3", "L4"},
    ),
    "thunderscope-rev5.3": (
        [
            "Thunderscope_Rev5.3-Top Layer.gtl",
            "Thunderscope_Rev5.3-Int1 (GND).g1",
            "Thunderscope_Rev5.3-Int2 (Sign).g2",
            "Thunderscope_Rev5.3-Int3 (Sign).g3",
            "Thunderscope_Rev5.3-Int4 (GND).g4",
            "Thunderscope_Rev5.3-Bottom Layer.gbl",
        ],
        {"L2", "L3", "L4", "L5"},
    ),
}

_CACHE: dict[str, Board] = {}


def _board(realboard: Callable[[str], Path], name: str) -> Board:
    if name not in _CACHE:
        _CACHE[name] = fluxshadow.load_package(realboard(name))
    return _CACHE[name]


@pytest.mark.parametrize("name", sorted(EXPECTED))
def test_copper_layers_in_source_order(realboard: Callable[[str], Path], name: str) -> None:
    board = _board(realboard, name)
    files, _ = EXPECTED[name]
    assert [lay.source for lay in board.layers] == files
    assert [lay.index for lay in board.layers] == list(range(1, len(files) + 1))
    assert all(lay.identified_by for lay in board.layers)
    # Nothing is dropped silently: every file of the folder is listed with its use.
    listed = {f.file for f in board.files}
    on_disk = {
        str(p.relative_to(realboard(name))) for p in realboard(name).rglob("*") if p.is_file()
    }
    assert listed == on_disk


@pytest.mark.parametrize("name", sorted(EXPECTED))
def test_power_inductors_found(realboard: Callable[[str], Path], name: str) -> None:
    board = _board(realboard, name)
    _, refs = EXPECTED[name]
    assert {m.ref for m in board.magnetics} == refs
    excluded = {e.ref for e in board.excluded}
    assert not refs & excluded


def test_beads_and_rf_coils_are_excluded(realboard: Callable[[str], Path]) -> None:
    # thunderscope: FB* are ferrite beads; limesdr: L1 47 nH in a 0402 footprint is RF.
    ts = _board(realboard, "thunderscope-rev5.3")
    assert any(e.ref.startswith("FB") and "bead" in e.reason for e in ts.excluded)
    lime = _board(realboard, "limesdr-xtrx-1v1")
    assert "L1" in {e.ref for e in lime.excluded}


def test_pycubed_frame_recovered(realboard: Callable[[str], Path]) -> None:
    # SOURCE.md, "Coordinate frames (measured)": gerber_x = 98.340 + x (top) or
    # 98.340 - x (bottom), gerber_y = y - 148.369 (mm).
    fit = _board(realboard, "pycubed-mainboard-v05").frame_fit
    assert fit.dx_mm == pytest.approx(98.340, abs=0.05)
    assert fit.dy_mm == pytest.approx(-148.369, abs=0.05)
    assert fit.bottom_mirror
    assert fit.bottom_mirror_c_mm == pytest.approx(98.340, abs=0.05)


@pytest.mark.parametrize("name", sorted(set(EXPECTED) - {"pycubed-mainboard-v05"}))
def test_other_frames_are_identity(realboard: Callable[[str], Path], name: str) -> None:
    # SOURCE.md: "All other boards here: identity".
    assert _board(realboard, name).frame_fit.is_identity


def test_inductor_positions_in_artwork_frame(realboard: Callable[[str], Path]) -> None:
    # Positions in the Gerber frame from the SOURCE.md tables ("position in Gerber frame").
    cases = {
        ("bq25798-mppt-v2.1", "L1"): (45.72, 36.96),
        ("cheap-focer-2", "L1"): (10.90, 50.20),
        ("huvud-tiny2", "L1"): (15.81, 28.70),
        ("incunest-motherboard", "L2"): (63.12, -46.99),
        ("limesdr-xtrx-1v1", "L2"): (24.27, 1.65),
    }
    for (name, ref), xy in cases.items():
        m = _board(realboard, name).magnetic(ref)
        assert (m.x_mm, m.y_mm) == pytest.approx(xy, abs=0.01)


def test_copper_near_an_inductor_is_composed(realboard: Callable[[str], Path]) -> None:
    # huvud SOURCE.md: inner layer 1 (L2) fully poured under L1 (5/5 sample points).
    board = _board(realboard, "huvud-tiny2")
    m = board.magnetic("L1")
    w = (m.x_mm - 0.8, m.y_mm - 0.8, m.x_mm + 0.8, m.y_mm + 0.8)
    assert board.copper("L2", w).area == pytest.approx(1.6 * 1.6, rel=1e-6)
