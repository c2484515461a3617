"""load_package on synthetic packages whose content is known exactly.

The packages are written by fluxshadow.synth from a description, so the expected layers,
areas and part positions follow from that description (hand computation noted per check).
"""

from __future__ import annotations

import zipfile
from pathlib import Path

import pytest

import fluxshadow
from fluxshadow.errors import InputError
from fluxshadow.synth.boards import mini4, mini4_variants
from fluxshadow.synth.writer import write_package


@pytest.fixture(scope="module")
def packages(tmp_path_factory: pytest.TempPathFactory) -> dict[str, Path]:
    root = tmp_path_factory.mktemp("synth")
    out = {"base": root / "base"}
    write_package(mini4(), out["base"])
    for name, board in mini4_variants().items():
        out[name] = root / name
        write_package(board, out[name])
    return out


def test_layers_in_order_with_evidence(packages: dict[str, Path]) -> None:
    board = fluxshadow.load_package(packages["base"])
    assert [lay.name for lay in board.layers] == ["L1", "L2", "L3", "L4"]
    assert [lay.index for lay in board.layers] == [1, 2, 3, 4]
    assert [lay.source for lay in board.layers] == [
        "mini4-copper-L1-top.gbr",
        "mini4-copper-L2-inr.gbr",
        "mini4-copper-L3-inr.gbr",
        "mini4-copper-L4-bot.gbr",
    ]
    assert {lay.identified_by for lay in board.layers} == {"x2-attribute"}
    assert [lay.side for lay in board.layers] == ["top", "inner", "inner", "bottom"]
    # Stack-up from the job file: 35 um copper, gaps 0.2 / 1.065 / 0.2 mm (as written).
    assert board.stackup.source == "job file"
    assert board.layers[1].z_top_mm == pytest.approx(0.035 + 0.2)
    assert board.layers[3].z_top_mm == pytest.approx(3 * 0.035 + 0.2 + 1.065 + 0.2)


def test_copper_windows_match_the_description(packages: dict[str, Path]) -> None:
    board = fluxshadow.load_package(packages["base"])
    # Under L1: layer 2 is a solid plane -> the 10 x 10 window is full (hand computation).
    assert board.copper("L2", (5, 10, 15, 20)).area == pytest.approx(100.0, rel=1e-9)
    # Under L2: a 3 x 3 mm void in a 6 x 6 window: 36 - 9 = 27 mm^2.
    assert board.copper(2, (25, 12, 31, 18)).area == pytest.approx(27.0, rel=1e-9)
    # Layer 3 under L1: a 0.15 mm trace crossing a 10 mm window: 1.5 mm^2.
    assert board.copper("L3", (5, 10, 15, 20)).area == pytest.approx(1.5, rel=1e-6)
    # By file name too.
    assert board.copper("mini4-copper-L2-inr.gbr", (5, 10, 15, 20)).area == pytest.approx(100.0)
    with pytest.raises(InputError, match="L1 = top"):
        board.copper("L9")


def test_magnetics_and_exclusions(packages: dict[str, Path]) -> None:
    board = fluxshadow.load_package(packages["base"])
    refs = {m.ref: m for m in board.magnetics}
    assert set(refs) == {"L1", "L2"}
    assert (refs["L1"].x_mm, refs["L1"].y_mm) == pytest.approx((10.0, 15.0))
    assert refs["L1"].value_h == pytest.approx(4.7e-6)
    assert refs["L1"].body_mm == pytest.approx((5.0, 5.0))
    excluded = {e.ref: e.reason for e in board.excluded}
    assert set(excluded) == {"FB1", "L3"}
    assert board.frame_fit.is_identity


@pytest.mark.parametrize(
    ("variant", "identified_by"),
    [("comments", {"x2-comment"}), ("bare-inch", {"extension", "physical-order-comment"})],
)
def test_unseen_dialects_load_the_same_board(
    packages: dict[str, Path], variant: str, identified_by: set[str]
) -> None:
    base = fluxshadow.load_package(packages["base"])
    other = fluxshadow.load_package(packages[variant])
    assert len(other.layers) == 4
    assert {lay.identified_by for lay in other.layers} <= identified_by
    for a, b in zip(base.layers, other.layers, strict=True):
        window = (2, 2, 38, 28)
        # inch 2.5 coordinates round to 0.254 um, so areas agree to ~1e-4 relative.
        assert other.copper(b.index, window).area == pytest.approx(
            base.copper(a.index, window).area, rel=2e-4
        )
    assert {m.ref for m in other.magnetics} == {"L1", "L2"}


def test_unmarked_negative_plane_is_detected(packages: dict[str, Path]) -> None:
    board = fluxshadow.load_package(packages["negplane"])
    lay = board.layer("L2")
    assert lay.polarity == "negative"
    assert lay.polarity_from == "geometry"
    assert any("negative plane" in a for a in board.assumptions)
    # The negative image's copper: board minus clearances; the void under L2 is back.
    assert board.copper("L2", (25, 12, 31, 18)).area == pytest.approx(27.0, rel=1e-9)
    assert board.copper("L2", (5, 10, 15, 20)).area == pytest.approx(100.0, rel=1e-9)
    # The other layers stay positive.
    assert [x.polarity for x in board.layers] == ["positive", "negative", "positive", "positive"]


def test_shifted_placement_frame_is_recovered(packages: dict[str, Path]) -> None:
    board = fluxshadow.load_package(packages["shifted"])
    fit = board.frame_fit
    # Written with placement = artwork - (-50, 20) and bottom X mirrored (synth.writer).
    assert fit.dx_mm == pytest.approx(-50.0, abs=0.01)
    assert fit.dy_mm == pytest.approx(20.0, abs=0.01)
    assert fit.bottom_mirror
    refs = {m.ref: m for m in board.magnetics}
    assert (refs["L2"].x_mm, refs["L2"].y_mm) == pytest.approx((28.0, 15.0), abs=0.01)


def test_zip_package_loads(packages: dict[str, Path], tmp_path: Path) -> None:
    archive = tmp_path / "mini4.zip"
    with zipfile.ZipFile(archive, "w") as z:
        for f in sorted(packages["base"].iterdir()):
            z.write(f, f"mini4/{f.name}")
    board = fluxshadow.load_package(archive)
    assert len(board.layers) == 4
    assert {m.ref for m in board.magnetics} == {"L1", "L2"}


def test_every_file_is_accounted_for(packages: dict[str, Path]) -> None:
    board = fluxshadow.load_package(packages["base"])
    listed = {f.file for f in board.files}
    assert listed == {p.name for p in packages["base"].iterdir()}
    uses = {f.file: f.use for f in board.files}
    assert uses["mini4-profile.gbr"] == "gerber: board outline"
    assert board.outline is not None
    assert board.outline.board.area == pytest.approx(40 * 30)
