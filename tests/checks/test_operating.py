"""Operating points from [[regulator]] entries (checked against physics reference row 18)."""

from __future__ import annotations

import numpy as np
import pytest

from fluxshadow.board.magnetics import Magnetic
from fluxshadow.checks.operating import MAX_HARMONIC, operating_points
from fluxshadow.io.config import parse_config


def _mag(ref: str, value_h: float | None) -> Magnetic:
    return Magnetic(
        ref=ref,
        kind="inductor",
        value_h=value_h,
        value_text="",
        package="",
        description="",
        side="top",
        x_mm=0.0,
        y_mm=0.0,
        rotation_deg=0.0,
        body_mm=(4.0, 4.0),
        height_mm=None,
        outline=np.zeros((5, 2)),
        body_from="default",
        reasons=(),
    )


def test_stated_point_matches_the_buck_example() -> None:
    # TI SLVA477 / physics reference row 18: 12 V -> 3.3 V, 2.2 uH, 1 MHz:
    # D = 0.275, ripple 1.0875 A, slopes +3.95455 / -1.5 A/us.
    cfg = parse_config("[[regulator]]\nparts = ['L1']\nvin_v = 12\nvout_v = 3.3\nfsw_hz = 1e6\n")
    op = operating_points([_mag("L1", 2.2e-6)], cfg)["L1"]
    assert op.stated
    assert op.duty == pytest.approx(0.275, rel=1e-9)
    assert op.ripple_a == pytest.approx(1.0875, rel=1e-9)
    assert op.slope_rise_a_per_s == pytest.approx(3.95455e6, rel=1e-5)
    assert op.slope_fall_a_per_s == pytest.approx(-1.5e6, rel=1e-9)
    # Row 19: I1 = 0.420247 A.
    assert op.harmonics_a[0] == pytest.approx(0.420247, rel=1e-5)
    assert len(op.harmonics_a) == MAX_HARMONIC


def test_without_a_regulator_figures_are_per_a_per_us() -> None:
    op = operating_points([_mag("L1", 2.2e-6)], parse_config(""))["L1"]
    assert not op.stated
    assert op.slope_rise_a_per_s == pytest.approx(1e6)
    assert "per A/us" in op.label


@pytest.mark.parametrize(
    ("body", "messages"),
    [
        (
            "vin_v = 5\nvout_v = 12\nfsw_hz = 1e6\n",
            ["f.toml: regulator[1].vout_v must be below vin_v for a buck stage; got 12 V >= 5 V"],
        ),
        (
            "vin_v = 12\nvout_v = 3.3\nfsw_hz = 10\n",
            ["f.toml: regulator[1].fsw_hz must lie between 1000 and 1e+08 Hz; got 10"],
        ),
        (
            "vin_v = 12\nvout_v = 3.3\n",
            ["f.toml: regulator[1].fsw_hz must be given with vin_v and vout_v; got nothing"],
        ),
        (
            "vin_v = -12\nvout_v = 3.3\nfsw_hz = 0\n",
            [
                "f.toml: regulator[1].vin_v must be a positive voltage (V); got -12 V",
                "f.toml: regulator[1].fsw_hz must lie between 1000 and 1e+08 Hz; got 0",
            ],
        ),
        (
            "vin_v = 12\nvout_v = 3.3\nfsw_hz = 1e6\ninductance_h = -2.2e-6\nripple_a = 0\n",
            [
                "f.toml: regulator[1].inductance_h must be a positive inductance (H); got -2.2e-06",
                "f.toml: regulator[1].ripple_a must be a positive current (A); got 0",
            ],
        ),
    ],
)
def test_nonsense_operating_points_fall_back_and_are_listed(body: str, messages: list[str]) -> None:
    cfg = parse_config("[[regulator]]\nparts = ['L1', 'L2']\n" + body, source="f.toml")
    ops = operating_points([_mag("L1", 2.2e-6), _mag("L2", 1e-6)], cfg)
    # every magnetic of the bad regulator has the per-A/us reference, nothing zeroed
    for ref in ("L1", "L2"):
        assert not ops[ref].stated
        assert ops[ref].slope_rise_a_per_s == pytest.approx(1e6)
        assert ops[ref].ripple_a > 0
    assert [p.message for p in ops.problems] == messages
    for p in ops.problems:
        assert p.refs == ("L1", "L2")
        assert p.text == p.message + "; figures for L1, L2 are given per A/us instead"


def test_a_bad_regulator_leaves_the_good_one_alone() -> None:
    cfg = parse_config(
        "[[regulator]]\nparts = ['L1']\nvin_v = 5\nvout_v = 12\nfsw_hz = 1e6\n"
        "[[regulator]]\nparts = ['L2']\nvin_v = 12\nvout_v = 3.3\nfsw_hz = 1e6\n"
    )
    ops = operating_points([_mag("L1", 2.2e-6), _mag("L2", 2.2e-6)], cfg)
    assert not ops["L1"].stated
    assert ops["L2"].stated
    assert ops["L2"].duty == pytest.approx(0.275)
    assert len(ops) == 2
    assert set(ops) == {"L1", "L2"}
    (problem,) = ops.problems
    assert problem.refs == ("L1",)
    assert "<string>: regulator[1].vout_v" in problem.message


def test_missing_inductance_is_a_problem_naming_the_key() -> None:
    cfg = parse_config("[[regulator]]\nparts = ['L1']\nvin_v = 12\nvout_v = 3.3\nfsw_hz = 1e6\n")
    ops = operating_points([_mag("L1", None)], cfg)
    assert not ops["L1"].stated
    (problem,) = ops.problems
    assert "regulator[1].inductance_h must be given: L1 has no inductance value" in problem.text
    assert problem.text.endswith("; figures for L1 are given per A/us instead")


def test_a_part_named_twice_keeps_the_first_regulator() -> None:
    cfg = parse_config(
        "[[regulator]]\nparts = ['L1']\nvin_v = 12\nvout_v = 3.3\nfsw_hz = 1e6\n"
        "[[regulator]]\nparts = ['L1']\nvin_v = 24\nvout_v = 5\nfsw_hz = 5e5\n"
    )
    ops = operating_points([_mag("L1", 2.2e-6)], cfg)
    assert ops["L1"].stated
    assert ops["L1"].vin_v == 12.0
    (problem,) = ops.problems
    assert "regulator[2].parts must not name a part another regulator names" in problem.text
    assert problem.text.endswith("L1 keeps the operating point of regulator[1]")


def test_regulator_without_electrical_values_is_not_an_operating_point() -> None:
    cfg = parse_config("[[regulator]]\nparts = ['L1']\nswitch_net = 'SW_A'\n")
    assert not operating_points([_mag("L1", 2.2e-6)], cfg)["L1"].stated
