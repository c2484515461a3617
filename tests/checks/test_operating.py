"""Operating points from [[regulator]] entries (checked against physics reference row 18)."""

from __future__ import annotations

import numpy as np
import pytest

from fluxshadow.board.magnetics import Magnetic
from fluxshadow.checks.operating import MAX_HARMONIC, operating_points
from fluxshadow.errors import ConfigError
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
    ("body", "message"),
    [
        ("vin_v = 5\nvout_v = 12\nfsw_hz = 1e6\n", "vout_v must be below vin_v"),
        ("vin_v = 12\nvout_v = 3.3\nfsw_hz = 10\n", "fsw_hz must lie between"),
        ("vin_v = 12\nvout_v = 3.3\n", "fsw_hz must be given"),
    ],
)
def test_nonsense_operating_points_are_errors(body: str, message: str) -> None:
    cfg = parse_config("[[regulator]]\nparts = ['L1']\n" + body, source="f.toml")
    with pytest.raises(ConfigError, match=message):
        operating_points([_mag("L1", 2.2e-6)], cfg)


def test_missing_inductance_is_an_error_naming_the_key() -> None:
    cfg = parse_config("[[regulator]]\nparts = ['L1']\nvin_v = 12\nvout_v = 3.3\nfsw_hz = 1e6\n")
    with pytest.raises(ConfigError, match=r"regulator\[1\]\.inductance_h"):
        operating_points([_mag("L1", None)], cfg)


def test_regulator_without_electrical_values_is_not_an_operating_point() -> None:
    cfg = parse_config("[[regulator]]\nparts = ['L1']\nswitch_net = 'SW_A'\n")
    assert not operating_points([_mag("L1", 2.2e-6)], cfg)["L1"].stated
