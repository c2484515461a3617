"""Frame registration and magnetics identification on the shared real-board corpus.

Expected values come from each board's ``SOURCE.md`` in ``../shared/realboards`` (sections
"Coordinate frames (measured)" and "Power inductors / magnetics"); part sizes are EIA chip
sizes (common practice) or the dimensions written in the package name.
"""

from __future__ import annotations

from collections.abc import Callable
from pathlib import Path

import numpy as np
import numpy.typing as npt
import pytest
from scipy.spatial import cKDTree

from fluxshadow.board.magnetics import MagneticsResult, identify_magnetics
from fluxshadow.board.registration import FrameFit, apply_fit, fit_frame, invert_fit
from fluxshadow.io.gerber import read_gerber
from fluxshadow.io.placement import join_bom, read_bom, read_placement
from fluxshadow.io.records import FLASH, REGION, PlacementRow

pytestmark = pytest.mark.realboards

Board = dict[str, object]

# placement files, BOM (or None), top pad layer, bottom pad layer (paste, else copper)
BOARDS: dict[str, tuple[tuple[str, ...], str | None, str, str]] = {
    "bq25798-mppt-v2.1": (
        ("PickAndPlace_PCB_BQ25798-test-board-mppt-solar_2026-01-12.csv",),
        "BOM_BQ25798-test-board-mppt-solar_2026-01-12.csv",
        "Gerber_TopPasteMaskLayer.GTP",
        "Gerber_BottomLayer.GBL",  # no bottom paste layer in this package
    ),
    "cheap-focer-2": (
        ("Cheap FOCer 2 60mm-top-pos.csv",),
        "bom.csv",
        "Cheap FOCer 2 60mm-F_Paste.gbr",
        "Cheap FOCer 2 60mm-B_Paste.gbr",
    ),
    "huvud-tiny2": (
        ("Huvud-top-pos.csv",),
        "Huvud-BOM.csv",
        "Huvud-F_Paste.gtp",
        "Huvud-B_Paste.gbp",
    ),
    "incunest-motherboard": (
        ("Pick Place for Motherboard.csv",),
        None,
        "Motherboard.GTP",
        "Motherboard.GBP",
    ),
    "limesdr-xtrx-1v1": (
        ("Pick Place for LimeSDR-XTRX_1v1.csv",),
        None,
        "LimeSDR-XTRX_1v1.GTP",
        "LimeSDR-XTRX_1v1.GBP",
    ),
    "pycubed-mainboard-v05": (
        ("mainboard-top.pos", "mainboard-bottom.pos"),
        "mainboardv05.csv",
        "gerbers/mainboard-F_Paste.gtp",
        "gerbers/mainboard-B_Paste.gbp",
    ),
    "thunderscope-rev5.3": (
        ("Thunderscope_Rev5.3_TS-PCIe_Positions.txt",),
        "Thunderscope_Rev5.3_TS-PCIe_MP_BOM.csv",
        "Thunderscope_Rev5.3-Top Paste.gtp",
        "Thunderscope_Rev5.3-Bottom Paste.gbp",
    ),
}

_MAX_PAD_REGION_MM2 = 60.0


def _pads(path: Path) -> npt.NDArray[np.float64]:
    """Pad centres of a paste/copper layer: dark flashes, and small dark regions."""
    rec = read_gerber(path)
    flashes = rec.obj_xy[(rec.obj_kind == FLASH) & rec.obj_dark]
    centres = [flashes]
    for i in np.flatnonzero((rec.obj_kind == REGION) & rec.obj_dark):
        r = int(rec.obj_ring_start[i])
        ring = rec.vertices[int(rec.ring_vertex_start[r]) : int(rec.ring_vertex_start[r + 1])]
        lo, hi = ring.min(axis=0), ring.max(axis=0)
        if np.prod(hi - lo) <= _MAX_PAD_REGION_MM2:
            centres.append(((lo + hi) / 2)[None, :])
    return np.concatenate(centres).astype(np.float64)


def _rows(folder: Path, name: str) -> list[PlacementRow]:
    placements, bom, _top, _bottom = BOARDS[name]
    rows: list[PlacementRow] = []
    for p in placements:
        rows.extend(read_placement(folder / p)[0])
    if bom is not None:
        rows = join_bom(rows, read_bom(folder / bom)[0])
    return rows


def _xy(rows: list[PlacementRow], side: str) -> npt.NDArray[np.float64]:
    return np.array([(r.x_mm, r.y_mm) for r in rows if r.side == side]).reshape(-1, 2)


_FIT_CACHE: dict[str, tuple[list[PlacementRow], FrameFit, dict[str, np.ndarray]]] = {}


def _fit(
    realboard: Callable[[str], Path], name: str
) -> tuple[list[PlacementRow], FrameFit, dict[str, np.ndarray]]:
    if name not in _FIT_CACHE:
        folder = realboard(name)
        rows = _rows(folder, name)
        _p, _b, top, bottom = BOARDS[name]
        pads = {"top": _pads(folder / top), "bottom": _pads(folder / bottom)}
        fit = fit_frame(_xy(rows, "top"), _xy(rows, "bottom"), pads["top"], pads["bottom"])
        _FIT_CACHE[name] = (rows, fit, pads)
    return _FIT_CACHE[name]


# ----------------------------------------------------------------------------- registration


def test_pycubed_frame_is_shifted_and_bottom_mirrored(realboard: Callable[[str], Path]) -> None:
    # SOURCE.md, "Coordinate frames (measured)": gerber_x = 98.340 + x (top) or
    # 98.340 - x (bottom), gerber_y = y - 148.369 mm.
    _, fit, _ = _fit(realboard, "pycubed-mainboard-v05")
    assert fit.method == "fitted"
    assert fit.dx_mm == pytest.approx(98.340, abs=0.05)
    assert fit.dy_mm == pytest.approx(-148.369, abs=0.05)
    assert fit.bottom_mirror
    assert fit.bottom_mirror_c_mm == pytest.approx(98.340, abs=0.05)
    assert fit.identity_score < 0.1
    assert fit.score > 0.8
    assert fit.residual_mm < 0.02


@pytest.mark.parametrize("name", [n for n in BOARDS if n != "pycubed-mainboard-v05"])
def test_other_boards_share_the_artwork_frame(realboard: Callable[[str], Path], name: str) -> None:
    # SOURCE.md of each board, "Coordinate frames (measured)": identity.
    _, fit, _ = _fit(realboard, name)
    assert fit.method == "identity"
    assert fit.is_identity
    assert fit.score > 0.75
    assert fit.residual_mm < 0.02


# ----------------------------------------------------------------------------- magnetics

# SOURCE.md of each board, "Power inductors / magnetics".
POWER: dict[str, dict[str, float | None]] = {
    "bq25798-mppt-v2.1": {"L1": 2.2e-6},
    "cheap-focer-2": {"L1": 22e-6},
    "huvud-tiny2": {"L1": 6.8e-6},
    "incunest-motherboard": {"L1": None, "L2": None, "L3": None, "L5": None},
    "limesdr-xtrx-1v1": {f"L{i}": 0.47e-6 for i in range(2, 10)},
    "pycubed-mainboard-v05": {"L1": 10e-6, "L2": 3.3e-6, "L3": 33e-6, "L4": 1e-6},
    "thunderscope-rev5.3": {f"L{i}": 1e-6 for i in range(2, 6)},
}


def _magnetics(realboard: Callable[[str], Path], name: str) -> MagneticsResult:
    return identify_magnetics(_rows(realboard(name), name))


@pytest.mark.parametrize("name", list(POWER))
def test_power_magnetics_match_the_corpus(realboard: Callable[[str], Path], name: str) -> None:
    res = _magnetics(realboard, name)
    got = {m.ref: m.value_h for m in res.magnetics}
    assert set(got) == set(POWER[name])
    for ref, value in POWER[name].items():
        if value is None:
            assert got[ref] is None
        else:
            assert got[ref] == pytest.approx(value, rel=1e-9)
    assert all(m.kind == "inductor" for m in res.magnetics)


def test_incunest_inductors_carry_value_assumption(realboard: Callable[[str], Path]) -> None:
    # SOURCE.md: the placement has no value or footprint columns (values only in an xlsx BOM).
    res = _magnetics(realboard, "incunest-motherboard")
    for m in res.magnetics:
        assert "value unknown" in m.assumptions
        assert m.body_from == "default"


@pytest.mark.parametrize(
    ("name", "ref", "body_mm", "body_from"),
    [
        ("bq25798-mppt-v2.1", "L1", (7.0, 6.6), "package dimensions"),  # L7.0-W6.6
        ("cheap-focer-2", "L1", (6.0, 6.0), "package code"),  # NR-60xx: 6 x 6 mm class
        ("huvud-tiny2", "L1", (3.2, 2.5), "package code"),  # 1210 / 3225 metric
        ("limesdr-xtrx-1v1", "L5", (2.0, 1.6), "package code"),  # 0806 inch
        ("thunderscope-rev5.3", "L3", (3.2, 2.5), "package code"),  # 1210
        ("pycubed-mainboard-v05", "L3", (4.5, 3.2), "package code"),  # 1812 / 4532 metric
    ],
)
def test_body_sizes(
    realboard: Callable[[str], Path],
    name: str,
    ref: str,
    body_mm: tuple[float, float],
    body_from: str,
) -> None:
    m = _magnetics(realboard, name).by_ref(ref)
    assert m is not None
    assert m.body_mm == pytest.approx(body_mm)
    assert m.body_from == body_from


def test_limesdr_rf_parts_excluded(realboard: Callable[[str], Path]) -> None:
    # SOURCE.md: "L1 47 nH (RES0402 footprint) is RF, not power"; T1-T10 are RF baluns and
    # RF transformers, not power magnetics.
    res = _magnetics(realboard, "limesdr-xtrx-1v1")
    reasons = {e.ref: e.reason for e in res.excluded}
    assert reasons["L1"].startswith("RF coil")
    for i in range(1, 11):
        assert f"T{i}" in reasons
    assert all(m.side == "bottom" for m in res.magnetics)


def test_thunderscope_beads_excluded(realboard: Callable[[str], Path]) -> None:
    # SOURCE.md: "FB* ferrite beads"; the BOM also lists R91 on the ferrite-bead line.
    res = _magnetics(realboard, "thunderscope-rev5.3")
    beads = {e.ref for e in res.excluded if e.reason.startswith("ferrite bead")}
    placed_fb = {
        r.ref
        for r in _rows(realboard("thunderscope-rev5.3"), "thunderscope-rev5.3")
        if r.ref.startswith("FB")
    }
    assert placed_fb
    assert placed_fb | {"R91"} <= beads


def test_pycubed_bodies_from_registered_pads(realboard: Callable[[str], Path]) -> None:
    """L2 (``L_2141``) and L4 (``L_2510``) name no size: their bodies come from the pads.

    The pads are the paste pads within 2 mm of each part's registered centroid, mapped back
    to the placement frame; L4 is on the mirrored bottom side.
    """
    rows, fit, pads = _fit(realboard, "pycubed-mainboard-v05")
    pads_by_ref: dict[str, np.ndarray] = {}
    for r in rows:
        if r.ref not in ("L2", "L4"):
            continue
        xa, ya = apply_fit(fit, [r.x_mm], [r.y_mm], r.side)
        tree = cKDTree(pads[r.side])
        near = pads[r.side][tree.query_ball_point([xa[0], ya[0]], 2.0)]
        px, py = invert_fit(fit, near[:, 0], near[:, 1], r.side)
        pads_by_ref[r.ref] = np.column_stack([px, py])
    res = identify_magnetics(rows, pads_by_ref=pads_by_ref)
    l2, l4 = res.by_ref("L2"), res.by_ref("L4")
    assert l2 is not None
    assert l4 is not None
    assert (l2.body_from, l4.body_from) == ("pads", "pads")
    # two pads 3.6 mm (L2) and 2.4 mm (L4) apart, measured on the paste layer
    assert l2.body_mm == pytest.approx((1.3 * 3.6, 1.3 * 3.6), abs=0.01)
    assert l4.body_mm == pytest.approx((1.3 * 2.4, 1.3 * 2.4), abs=0.01)
    assert l4.side == "bottom"
    # the outline in the artwork frame lies around the pads
    ox, oy = apply_fit(fit, l4.outline[:, 0], l4.outline[:, 1], "bottom")
    xa, ya = apply_fit(fit, [l4.x_mm], [l4.y_mm], "bottom")
    assert np.mean(ox[:-1]) == pytest.approx(xa[0])
    assert np.mean(oy[:-1]) == pytest.approx(ya[0])
