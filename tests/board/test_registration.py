"""Placement-to-artwork frame registration on synthetic boards.

Every board here is built in the test: parts with point-symmetric pad patterns (chip
passives, a power inductor, an SO-8 and a QFN with a centre pad) plus an asymmetric
three-pad part, placed at random, then seen through a known transform. The fit must give
the transform back.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from hypothesis import HealthCheck, assume, given, settings
from hypothesis import strategies as st

from fluxshadow.board.registration import (
    FrameFit,
    FrameOverride,
    apply_fit,
    fit_frame,
    invert_fit,
)
from fluxshadow.errors import InputError

# Pad offsets (mm) of footprints relative to the part centroid, at rotation 0.
_CHIP_PITCHES_MM = (0.9, 1.5, 1.9, 2.9)
_SO8 = np.array([(sx * 2.7, -1.905 + 1.27 * i) for sx in (-1, 1) for i in range(4)])
_QFN = np.array(
    [(0.0, 0.0)]
    + [(-1.95, -0.75 + 0.5 * i) for i in range(4)]
    + [(1.95, -0.75 + 0.5 * i) for i in range(4)]
    + [(-0.75 + 0.5 * i, -1.95) for i in range(4)]
    + [(-0.75 + 0.5 * i, 1.95) for i in range(4)]
)
_POWER_L = np.array([(-2.4, 0.0), (2.4, 0.0)])
_SOT23 = np.array([(-0.95, -1.1), (0.95, -1.1), (0.0, 1.1)])


def _footprint(rng: np.random.Generator) -> np.ndarray:
    kind = rng.choice(8)
    if kind < 4:
        p = _CHIP_PITCHES_MM[kind] / 2
        return np.array([(-p, 0.0), (p, 0.0)])
    return (_SO8, _QFN, _POWER_L, _SOT23)[kind - 4]


def _side(rng: np.random.Generator, n: int, size_mm: float) -> tuple[np.ndarray, np.ndarray]:
    """Artwork-frame part centres (n, 2) and all their pads (m, 2)."""
    centres = rng.uniform(3.0, size_mm - 3.0, size=(n, 2))
    pads = []
    for c in centres:
        a = rng.uniform(0, 2 * math.pi)
        rot = np.array([[math.cos(a), -math.sin(a)], [math.sin(a), math.cos(a)]])
        pads.append(c + _footprint(rng) @ rot.T)
    return centres, np.concatenate(pads)


def _with_outliers(
    rng: np.random.Generator, centres: np.ndarray, pads: np.ndarray, size_mm: float
) -> tuple[np.ndarray, np.ndarray]:
    """About 10 % outliers: stray pads without parts and parts far off the board."""
    n_out = max(2, len(centres) // 10)
    stray = rng.uniform(0.0, size_mm, size=(n_out, 2))
    far = rng.uniform(-400.0, -150.0, size=(n_out, 2))
    return np.concatenate([centres, far]), np.concatenate([pads, stray])


@st.composite
def _frames(draw: st.DrawFn) -> dict[str, float | bool | int]:
    return {
        "seed": draw(st.integers(0, 2**31 - 1)),
        "dx": draw(st.floats(-200.0, 200.0)),
        "dy": draw(st.floats(-200.0, 200.0)),
        "mirror": draw(st.booleans()),
        "c": draw(st.floats(-200.0, 200.0)),
        "n_top": draw(st.integers(20, 60)),
        "n_bottom": draw(st.integers(15, 40)),
    }


@settings(max_examples=12, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(_frames())
def test_recovers_random_shift_and_bottom_mirror(frame: dict[str, float | bool | int]) -> None:
    dx, dy, c = float(frame["dx"]), float(frame["dy"]), float(frame["c"])
    mirror = bool(frame["mirror"])
    assume(mirror or math.hypot(dx, dy) > 0.5)
    rng = np.random.default_rng(int(frame["seed"]))
    size = 80.0
    top_art, top_pads = _side(rng, int(frame["n_top"]), size)
    bot_art, bot_pads = _side(rng, int(frame["n_bottom"]), size)
    # unpopulated parts: pads on the board but not in the placement
    top_pads = np.concatenate([top_pads, _side(rng, 3, size)[1]])
    top_art, top_pads = _with_outliers(rng, top_art, top_pads, size)
    bot_art, bot_pads = _with_outliers(rng, bot_art, bot_pads, size)

    top_place = top_art - (dx, dy)
    if mirror:
        bot_place = np.column_stack([c - bot_art[:, 0], bot_art[:, 1] - dy])
    else:
        bot_place = bot_art - (dx, dy)
    fit = fit_frame(top_place, bot_place, top_pads, bot_pads)

    assert fit.method == "fitted"
    assert fit.dx_mm == pytest.approx(dx, abs=0.01)
    assert fit.dy_mm == pytest.approx(dy, abs=0.01)
    assert fit.bottom_mirror is mirror
    if mirror:
        assert fit.bottom_mirror_c_mm == pytest.approx(c, abs=0.01)
    # the far-off parts and SOT-23s never match; everything symmetric does
    assert fit.total == len(top_place) + len(bot_place)
    assert fit.matched < fit.total
    assert fit.score > 0.6
    assert fit.residual_mm < 0.01
    # the fitted transform maps the placement onto the artwork centres
    xs, ys = apply_fit(fit, bot_place[:, 0], bot_place[:, 1], "bottom")
    inside = bot_art[:, 0] > -100
    assert np.allclose(xs[inside], bot_art[inside, 0], atol=0.02)
    assert np.allclose(ys[inside], bot_art[inside, 1], atol=0.02)


def test_identity_preferred_when_frames_agree_within_noise() -> None:
    rng = np.random.default_rng(7)
    art, pads = _side(rng, 60, 70.0)
    pads = pads + rng.normal(0.0, 0.002, size=pads.shape)
    fit = fit_frame(art, np.zeros((0, 2)), pads, np.zeros((0, 2)))
    assert fit.method == "identity"
    assert fit.is_identity
    assert (fit.dx_mm, fit.dy_mm, fit.bottom_mirror) == (0.0, 0.0, False)
    assert fit.identity_score == fit.score
    assert fit.score > 0.7  # SOT-23s (1 in 8) and overlapping parts do not match


def test_small_real_shift_is_not_taken_for_identity() -> None:
    rng = np.random.default_rng(11)
    art, pads = _side(rng, 60, 70.0)
    fit = fit_frame(art - (0.4, -0.3), np.zeros((0, 2)), pads, np.zeros((0, 2)))
    assert fit.method == "fitted"
    assert fit.dx_mm == pytest.approx(0.4, abs=0.005)
    assert fit.dy_mm == pytest.approx(-0.3, abs=0.005)
    assert fit.identity_score < 0.5 < fit.score


def test_bottom_only_board_mirrored_about_zero() -> None:
    rng = np.random.default_rng(3)
    art, pads = _side(rng, 40, 60.0)
    place = np.column_stack([-art[:, 0], art[:, 1]])  # X negated, no shift
    fit = fit_frame(np.zeros((0, 2)), place, np.zeros((0, 2)), pads)
    assert fit.bottom_mirror
    assert fit.bottom_mirror_c_mm == pytest.approx(0.0, abs=0.005)
    assert fit.dy_mm == pytest.approx(0.0, abs=0.005)


def test_two_mirrored_bottom_parts_are_enough_with_top_evidence() -> None:
    """With the Y shift fixed by the top side, two bottom parts decide the mirror."""
    rng = np.random.default_rng(17)
    top_art, top_pads = _side(rng, 8, 40.0)
    bot_art = np.array([[32.0, 10.0], [35.0, 5.0]])
    bot_pads = np.array([[32.95, 10.0], [31.05, 10.0], [35.5, 5.0], [34.5, 5.0]])
    bot_place = np.column_stack([-50.0 - bot_art[:, 0], bot_art[:, 1] - 20.0])
    fit = fit_frame(top_art - (-50.0, 20.0), bot_place, top_pads, bot_pads)
    assert fit.bottom_mirror
    assert fit.bottom_mirror_c_mm == pytest.approx(-50.0, abs=1e-6)
    assert (fit.dx_mm, fit.dy_mm) == pytest.approx((-50.0, 20.0), abs=1e-6)


def test_separate_bottom_shift_is_reported() -> None:
    rng = np.random.default_rng(19)
    top_art, top_pads = _side(rng, 40, 60.0)
    bot_art, bot_pads = _side(rng, 30, 60.0)
    fit = fit_frame(top_art - (5.0, 7.0), bot_art - (9.0, 7.0), top_pads, bot_pads)
    assert (fit.dx_mm, fit.dy_mm) == pytest.approx((5.0, 7.0), abs=0.005)
    assert not fit.bottom_mirror
    assert any("bottom side alone fits a shift 4.00 mm away" in n.message for n in fit.notices)


def test_centroids_between_pads_match_pad_pairs_not_pads() -> None:
    """A two-pad part's centroid is on no pad; nearest-pad matching would fail here."""
    centres = np.array([[10.0 + 6.0 * i, 20.0 + 4.0 * (i % 3)] for i in range(30)])
    half = np.array([1.0, 0.0])
    pads = np.concatenate([centres - half, centres + half])
    fit = fit_frame(centres - (50.0, 30.0), np.zeros((0, 2)), pads, np.zeros((0, 2)))
    assert fit.dx_mm == pytest.approx(50.0, abs=1e-6)
    assert fit.dy_mm == pytest.approx(30.0, abs=1e-6)
    assert fit.matched == 30
    assert fit.residual_mm == pytest.approx(0.0, abs=1e-9)


def test_no_pads_gives_identity_with_notice() -> None:
    fit = fit_frame(np.array([[1.0, 2.0]]), np.zeros((0, 2)), np.zeros((0, 2)), [])
    assert fit.method == "identity (no pads)"
    assert fit.total == 0
    assert math.isnan(fit.residual_mm)
    messages = " ".join(n.message for n in fit.notices)
    assert "no top-side pads" in messages
    assert "could not be checked" in messages


def test_no_pads_with_override_uses_it() -> None:
    ov = FrameOverride(dx_mm=1.0, dy_mm=2.0, bottom_mirror=True)
    fit = fit_frame([], np.array([[3.0, 4.0]]), [], [], override=ov)
    assert (fit.method, fit.dx_mm, fit.dy_mm) == ("config", 1.0, 2.0)
    assert fit.bottom_mirror
    assert fit.bottom_mirror_c_mm == 1.0  # None in the override means "mirror, then dx"
    assert fit_frame([], [], [], []).notices == ()


def test_bottom_without_pads_follows_top_with_notice() -> None:
    rng = np.random.default_rng(5)
    art, pads = _side(rng, 40, 60.0)
    bottom = np.array([[10.0, 10.0], [20.0, 30.0]])
    fit = fit_frame(art - (5.0, 7.0), bottom, pads, np.zeros((0, 2)))
    assert fit.dx_mm == pytest.approx(5.0, abs=0.005)
    assert not fit.bottom_mirror
    assert fit.total == 40
    assert any("no bottom-side pads" in n.message for n in fit.notices)


def test_override_is_used_and_checked() -> None:
    rng = np.random.default_rng(9)
    art, pads = _side(rng, 40, 60.0)
    place = art - (5.0, 7.0)
    good = fit_frame(place, [], pads, [], override=FrameOverride(dx_mm=5.0, dy_mm=7.0))
    assert good.method == "config"
    assert (good.dx_mm, good.dy_mm) == (5.0, 7.0)
    assert good.score > 0.8
    assert not good.notices
    bad = fit_frame(place, [], pads, [], override=FrameOverride(dx_mm=0.0, dy_mm=0.0))
    assert bad.method == "config"
    assert bad.is_identity
    assert bad.score < 0.3
    assert any("configured placement transform matches" in n.message for n in bad.notices)


def test_unrelated_pads_give_a_weak_fit_notice() -> None:
    rng = np.random.default_rng(13)
    parts = rng.uniform(0, 50, size=(30, 2))
    pads = rng.uniform(0, 50, size=(25, 2))
    fit = fit_frame(parts, [], pads, [])
    assert fit.score < 0.3
    assert any("weak" in n.message for n in fit.notices)


def test_apply_and_invert_round_trip_with_mixed_sides() -> None:
    fit = FrameFit(
        dx_mm=98.34,
        dy_mm=-148.369,
        bottom_mirror=True,
        bottom_mirror_c_mm=98.34,
        residual_mm=0.0,
        matched=1,
        total=1,
        method="fitted",
        identity_score=0.0,
        score=1.0,
    )
    x = np.array([10.0, -50.1839, 3.0])
    y = np.array([20.0, 78.1431, -4.0])
    sides = np.array(["top", "bottom", "top"])
    xa, ya = apply_fit(fit, x, y, sides)
    assert xa == pytest.approx([108.34, 148.5239, 101.34])
    assert ya == pytest.approx([-128.369, -70.2259, -152.369])
    xb, yb = apply_fit(fit, x, y, sides == "bottom")  # boolean "is bottom" works too
    assert np.array_equal(xa, xb)
    assert np.array_equal(ya, yb)
    xp, yp = invert_fit(fit, xa, ya, sides)
    assert xp == pytest.approx(x)
    assert yp == pytest.approx(y)
    xs, _ = apply_fit(fit, 1.0, 2.0, "bottom")
    assert float(xs) == pytest.approx(97.34)


@pytest.mark.parametrize(
    ("kwargs", "match"),
    [
        ({"top_xy": np.zeros((3, 3))}, "top_xy must be an \\(n, 2\\) array"),
        ({"pads_bottom_xy": np.zeros(4)}, "pads_bottom_xy must be an \\(n, 2\\) array"),
        ({"match_tol_mm": 0.0}, "match_tol_mm must be a positive number"),
    ],
)
def test_bad_inputs_raise_input_error(kwargs: dict[str, object], match: str) -> None:
    args: dict[str, object] = {
        "top_xy": np.zeros((1, 2)),
        "bottom_xy": np.zeros((0, 2)),
        "pads_top_xy": np.zeros((1, 2)),
        "pads_bottom_xy": np.zeros((0, 2)),
    }
    args.update(kwargs)
    tol = args.pop("match_tol_mm", 0.1)
    with pytest.raises(InputError, match=match):
        fit_frame(**args, match_tol_mm=tol)  # type: ignore[arg-type]


def test_bad_side_raises_input_error() -> None:
    fit = fit_frame([], [], [], [])
    with pytest.raises(InputError, match="side must be 'top' or 'bottom'; got 'left'"):
        apply_fit(fit, [1.0], [2.0], "left")
    with pytest.raises(InputError, match="got 'middle'"):
        apply_fit(fit, [1.0, 2.0], [2.0, 3.0], ["top", "middle"])
