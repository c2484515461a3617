"""``check`` with operating points or part values that make no sense: a report, not exit 2.

The configuration only checks types; a regulator with Vout >= Vin, negative values or a
switching frequency out of range, and a [[part]] whose winding does not fit its body, are
reported as ``assumption`` warnings naming the key, the figures fall back to per A/us or
to the default winding, and every geometric finding is still there.
"""

from __future__ import annotations

import json
import shutil
from pathlib import Path
from typing import Any

import pytest
from typer.testing import CliRunner

import fluxshadow
from fluxshadow.checks.run import run_checks
from fluxshadow.cli.app import app

REPO = Path(__file__).resolve().parents[2]
MINI4 = REPO / "fixtures" / "mini4"
runner = CliRunner()

# the geometric rules at "note", so that the only warnings are the problems
_QUIET = '[severity]\nplane-void = "note"\nthrough-cutout = "note"\n'
_BAD_REGULATOR = '[[regulator]]\nparts = ["L2", "U2"]\nvin_v = 5\nvout_v = 12\nfsw_hz = -3\n'
_BAD_PART = '[[part]]\nref = "L2"\nwinding_radius_mm = 7\nturns = -4\n'


def _package(tmp_path: Path, config: str) -> Path:
    pkg = tmp_path / "pkg"
    shutil.copytree(MINI4, pkg)
    (pkg / "fluxshadow.toml").write_text(config)
    return pkg


def _geometric(data: dict[str, Any]) -> set[tuple[str, str, str]]:
    return {
        (f["rule"], f["ref"], f["layer"]) for f in data["findings"] if f["rule"] != "assumption"
    }


@pytest.fixture(scope="module")
def plain_findings(tmp_path_factory: pytest.TempPathFactory) -> set[tuple[str, str, str]]:
    pkg = _package(tmp_path_factory.mktemp("plain"), _QUIET)
    result = runner.invoke(app, ["check", str(pkg), "-f", "json", "--fail-on", "never"])
    assert result.exit_code == 0, result.output
    found = _geometric(json.loads(result.stdout))
    assert ("plane-void", "L2", "L2") in found
    assert ("void-ring", "L2", "L2") in found
    return found


@pytest.mark.parametrize(
    ("config", "messages"),
    [
        (
            _BAD_REGULATOR,
            [
                (
                    "fluxshadow.toml: regulator[1].vout_v must be below vin_v for a buck stage; "
                    "got 12 V >= 5 V; figures for L2 are given per A/us instead"
                ),
                (
                    "fluxshadow.toml: regulator[1].fsw_hz must lie between 1000 and 1e+08 Hz; "
                    "got -3; figures for L2 are given per A/us instead"
                ),
            ],
        ),
        (
            _BAD_PART,
            [
                (
                    "fluxshadow.toml: part[1].turns must be a positive number of turns for L2; "
                    "got -4; the default is used instead"
                ),
                (
                    "fluxshadow.toml: part[1].winding_radius_mm must be at most half the body's "
                    "longer side (2 mm) for L2; got 7 mm; the default is used instead"
                ),
            ],
        ),
    ],
)
def test_nonsense_values_are_warnings_and_the_geometry_is_still_reported(
    tmp_path: Path,
    plain_findings: set[tuple[str, str, str]],
    config: str,
    messages: list[str],
) -> None:
    pkg = _package(tmp_path, _QUIET + config)
    result = runner.invoke(app, ["check", str(pkg), "-f", "json", "--fail-on", "error"])
    assert result.exit_code == 0, result.output
    data = json.loads(result.stdout)
    problems = [
        f for f in data["findings"] if f["rule"] == "assumption" and f["severity"] == "warning"
    ]
    shown = [f["message"].split("fluxshadow.toml: ", 1)[-1] for f in problems]
    assert shown == [m.split("fluxshadow.toml: ", 1)[-1] for m in messages]
    assert all(f["ref"] == "L2" for f in problems)
    assert all(any(m.split(": ", 1)[-1] in n for n in data["notices"]) for m in messages)
    # every geometric finding of the same board with a sound configuration is still there
    assert _geometric(data) == plain_findings
    # nothing zeroed: L2's figures are there, per A/us
    l2 = next(m for m in data["magnetics"] if m["ref"] == "L2")
    layer2 = next(lr for lr in l2["layers"] if lr["layer"] == "L2")
    assert layer2["figures"]["figures_per"] == "A/us"
    assert layer2["figures"]["ring_current_a"] > 0
    assert layer2["figures"]["delta_l_nh"] < 0


def test_exit_code_follows_fail_on_and_text_shows_the_problem(tmp_path: Path) -> None:
    pkg = _package(tmp_path, _QUIET + _BAD_REGULATOR + _BAD_PART)
    strict = runner.invoke(app, ["check", str(pkg), "--fail-on", "warning"])
    assert strict.exit_code == 1, strict.output  # the problems are the only warnings
    relaxed = runner.invoke(app, ["check", str(pkg), "--fail-on", "error"])
    assert relaxed.exit_code == 0, relaxed.output
    flat = " ".join(relaxed.stdout.split())
    assert "regulator[1].vout_v must be below vin_v for a buck stage; got 12 V >= 5 V" in flat
    assert "part[1].winding_radius_mm must be at most half the body's longer side" in flat
    assert "figures for L2 are given per A/us instead" in flat
    # the geometric findings of L2 are printed too
    assert "plane-void" in flat
    assert "void-ring" in flat
    assert "Traceback" not in relaxed.output


def test_assumption_off_keeps_the_notice(tmp_path: Path) -> None:
    pkg = _package(tmp_path, _QUIET + 'assumption = "off"\n' + _BAD_REGULATOR)
    report = run_checks(fluxshadow.load_package(pkg))
    assert not [f for f in report.findings if f.rule == "assumption"]
    assert any("regulator[1].vout_v must be below vin_v" in n for n in report.notices)


def test_a_wrong_type_is_still_exit_2(tmp_path: Path) -> None:
    pkg = _package(tmp_path, '[[regulator]]\nparts = ["L2"]\nvin_v = "5 V"\n')
    result = runner.invoke(app, ["check", str(pkg)])
    assert result.exit_code == 2
    assert "regulator[1].vin_v must be a finite number; got '5 V'" in result.stderr
