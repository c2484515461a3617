"""Stack-up resolution (fluxshadow.board.stackup).

Defaults are common practice for standard FR-4 boards (1.6 mm, 35 um copper, ~0.2 mm
prepreg, epsilon_r 4.3), not measurements; the job file used is the hand-written
fictional one in tests/io/data.
"""

from __future__ import annotations

import math
from pathlib import Path

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from fluxshadow.board.stackup import (
    DEFAULT_EPSILON_R,
    Stackup,
    default_stackup,
    resolve_stackup,
)
from fluxshadow.errors import ConfigError
from fluxshadow.io.config import parse_config
from fluxshadow.io.jobfile import parse_job_file, read_job_file
from fluxshadow.io.records import JobRecord, StackupLayer

JOB = Path(__file__).parents[1] / "io" / "data" / "fictional-buck4.gbrjob"


def _check_geometry(s: Stackup) -> None:
    """Depths increase, layers do not overlap, and the total adds up."""
    n = s.n_copper
    assert len(s.thickness_mm) == n
    assert len(s.gap_mm) == n - 1
    assert len(s.epsilon_r) == n - 1
    assert s.z_top_mm[0] == 0.0
    for k in range(n - 1):
        assert s.z_top_mm[k + 1] > s.z_top_mm[k]
        assert s.z_top_mm[k + 1] == pytest.approx(s.z_bottom_mm[k] + s.gap_mm[k])
    assert all(t > 0 for t in s.thickness_mm)
    assert all(g > 0 for g in s.gap_mm)
    assert all(e >= 1 for e in s.epsilon_r)
    if n > 1:
        assert s.board_thickness_mm == pytest.approx(s.z_bottom_mm[-1])
    assert list(s.z_mid_mm) == pytest.approx(
        [z + 0.5 * t for z, t in zip(s.z_top_mm, s.thickness_mm, strict=True)]
    )


@pytest.mark.parametrize("n", [1, 2, 3, 4, 5, 6, 8, 10, 12])
def test_defaults_by_layer_count(n: int) -> None:
    s, notes = resolve_stackup(n, job=None, config=None)
    _check_geometry(s)
    assert s.source == "default"
    assert s.board_thickness_mm == pytest.approx(1.6)  # common practice
    assert s.epsilon_r == (DEFAULT_EPSILON_R,) * (n - 1)
    assert notes == list(s.assumptions)
    assert any("copper thickness assumed 35 um" in m for m in notes)
    if n > 1:
        assert any("dielectric gaps assumed" in m for m in notes)
        assert any("permittivity assumed 4.3" in m for m in notes)
    assert s.names == tuple(f"L{k}" for k in range(1, n + 1))


def test_default_two_and_four_layers() -> None:
    two, _ = resolve_stackup(2, job=None, config=None)
    assert two.gap_mm == pytest.approx((1.53,))
    assert two.z_top_mm == pytest.approx((0.0, 1.565))
    four, _ = resolve_stackup(4, job=None, config=None)
    assert four.gap_mm == pytest.approx((0.2, 1.06, 0.2))
    assert four.thickness_mm == pytest.approx((0.035,) * 4)


@pytest.mark.parametrize("n", [6, 8])
def test_default_six_and_eight_layers_are_symmetric(n: int) -> None:
    s, _ = resolve_stackup(n, job=None, config=None)
    assert s.gap_mm == pytest.approx(tuple(reversed(s.gap_mm)))
    assert s.gap_mm[0] == pytest.approx(0.2)
    assert min(s.gap_mm) >= 0.1


def test_too_many_layers_for_the_default_thickness() -> None:
    s, notes = resolve_stackup(24, job=None, config=None)
    _check_geometry(s)
    assert s.board_thickness_mm > 1.6
    assert any("too many layers" in m for m in notes)


@settings(max_examples=60, deadline=None)
@given(n=st.integers(1, 16), board=st.floats(0.4, 3.2))
def test_default_geometry_property(n: int, board: float) -> None:
    copper, gaps, _ = default_stackup(n, board_thickness_mm=board)
    assert len(copper) == n
    assert len(gaps) == n - 1
    assert all(g > 0 for g in gaps)
    total = sum(copper) + sum(gaps)
    if n > 1 and min(gaps) > 0.1 - 1e-12 and total <= board + 1e-9:
        assert total == pytest.approx(board)


def test_job_file_takes_precedence_over_defaults() -> None:
    job = read_job_file(JOB)
    s, notes = resolve_stackup(4, job=job, config=None)
    _check_geometry(s)
    assert s.source == "job file"
    assert s.thickness_mm == pytest.approx((0.035, 0.0152, 0.0152, 0.035))
    # Two cores between L2 and L3 add up; their permittivities combine in series.
    assert s.gap_mm == pytest.approx((0.2104, 1.065, 0.2104))
    assert s.epsilon_r == pytest.approx((4.4, 4.6, 4.4))
    assert notes == []
    # 2 x 0.035 + 2 x 0.0152 + 2 x 0.2104 + (0.5 + 0.565) = 1.5862 mm (masks excluded).
    assert s.board_thickness_mm == pytest.approx(1.5862)


def test_series_permittivity_of_mixed_dielectrics() -> None:
    job = parse_job_file(
        '{"Header": {}, "MaterialStackup": ['
        '{"Type": "Copper", "Thickness": 0.035},'
        '{"Type": "Dielectric", "Thickness": 0.1, "DielectricConstant": 3.0},'
        '{"Type": "Dielectric", "Thickness": 0.1, "DielectricConstant": 6.0},'
        '{"Type": "Copper", "Thickness": 0.035}]}'
    )
    s, _ = resolve_stackup(2, job=job, config=None)
    # Two slabs in series: eps = (t1 + t2) / (t1/e1 + t2/e2) = 0.2 / (0.1/3 + 0.1/6) = 4.
    assert s.epsilon_r == pytest.approx((4.0,))


def test_config_takes_precedence_over_job() -> None:
    job = read_job_file(JOB)
    cfg = parse_config(
        "[stackup]\ncopper_mm = [0.07]\ndielectric_mm = [0.1, 1.2, 0.1]\nepsilon_r = 3.8\n",
        source="fluxshadow.toml",
    )
    s, notes = resolve_stackup(4, job=job, config=cfg)
    _check_geometry(s)
    assert s.source == "config"
    assert s.thickness_mm == pytest.approx((0.07,) * 4)
    assert s.gap_mm == pytest.approx((0.1, 1.2, 0.1))
    assert s.epsilon_r == pytest.approx((3.8,) * 3)
    assert notes == []


def test_partial_config_mixes_with_job() -> None:
    job = read_job_file(JOB)
    cfg = parse_config("[stackup]\nepsilon_r = 4.0\n")
    s, notes = resolve_stackup(4, job=job, config=cfg)
    assert s.source == "job file"
    assert s.gap_mm == pytest.approx((0.2104, 1.065, 0.2104))
    assert s.epsilon_r == pytest.approx((4.0,) * 3)
    assert notes == []


def test_config_copper_only_defaults_the_gaps() -> None:
    cfg = parse_config("[stackup]\ncopper_mm = [0.07, 0.07]\nboard_thickness_mm = 1.0\n")
    s, notes = resolve_stackup(2, job=None, config=cfg)
    assert s.source == "config"
    assert s.gap_mm == pytest.approx((0.86,))
    assert s.board_thickness_mm == pytest.approx(1.0)
    assert any("config's 1.0 mm board thickness" in m for m in notes)


def test_job_board_thickness_scales_default_gaps() -> None:
    job = JobRecord(source="j", stackup=(), board_thickness_mm=0.8, layer_files={})
    s, notes = resolve_stackup(2, job=job, config=None)
    assert s.board_thickness_mm == pytest.approx(0.8)
    assert any("job file's 0.8 mm" in m for m in notes)


def test_job_with_other_layer_count_is_not_used() -> None:
    job = read_job_file(JOB)
    s, notes = resolve_stackup(2, job=job, config=None)
    assert s.source == "default"
    assert any("lists 4 copper layers but the package has 2" in m for m in notes)
    # Its board thickness is still used.
    assert s.board_thickness_mm == pytest.approx(1.6)


def test_job_without_thicknesses_falls_back() -> None:
    layers = (
        StackupLayer(name="L1", kind="copper", thickness_mm=math.nan),
        StackupLayer(name="d", kind="dielectric", thickness_mm=math.nan, epsilon_r=4.5),
        StackupLayer(name="L2", kind="copper", thickness_mm=math.nan),
    )
    job = JobRecord(source="j", stackup=layers, board_thickness_mm=1.2, layer_files={})
    s, notes = resolve_stackup(2, job=job, config=None)
    _check_geometry(s)
    assert s.source == "default"
    assert s.board_thickness_mm == pytest.approx(1.2)
    assert len(notes) == 3


def test_stated_thickness_disagreeing_with_layers_is_noted() -> None:
    cfg = parse_config("[stackup]\ndielectric_mm = [0.5]\nboard_thickness_mm = 1.6\n")
    s, notes = resolve_stackup(2, job=None, config=cfg)
    assert s.board_thickness_mm == pytest.approx(0.57)
    assert any("adds up to 0.570 mm" in m for m in notes)


@pytest.mark.parametrize(
    ("text", "match"),
    [
        ("[stackup]\ncopper_mm = [0.035, 0.035, 0.035]\n", "copper_mm must have 4 entries"),
        ("[stackup]\ndielectric_mm = [0.2, 0.2]\n", "dielectric_mm must have 3 entries"),
        ("[stackup]\nepsilon_r = [4, 4]\n", "epsilon_r must have 3 entries"),
    ],
)
def test_config_length_mismatch(text: str, match: str) -> None:
    cfg = parse_config(text, source="fluxshadow.toml")
    with pytest.raises(ConfigError, match=match) as err:
        resolve_stackup(4, job=None, config=cfg)
    assert str(err.value).startswith("fluxshadow.toml: ")


def test_distance_and_bad_counts() -> None:
    s, _ = resolve_stackup(4, job=None, config=None)
    assert s.distance_mm(1, 2) == pytest.approx(0.2)
    assert s.distance_mm(1, 3) == pytest.approx(0.2 + 0.035 + 1.06)
    with pytest.raises(ValueError, match="layer pair"):
        s.distance_mm(3, 2)
    with pytest.raises(ValueError, match="at least 1"):
        resolve_stackup(0, job=None, config=None)
