"""The check report: JSON against its published schema, text view, CLI exit codes."""

from __future__ import annotations

import json
from pathlib import Path

import jsonschema
import pytest
from typer.testing import CliRunner

import fluxshadow
from fluxshadow.checks.model import Report
from fluxshadow.checks.run import run_checks
from fluxshadow.cli.app import app
from fluxshadow.report.json_report import report_to_dict
from fluxshadow.report.terminal import report_to_text

REPO = Path(__file__).resolve().parents[2]
MINI4 = REPO / "fixtures" / "mini4"
SCHEMA = json.loads((REPO / "docs" / "report.schema.json").read_text())

runner = CliRunner()


@pytest.fixture(scope="module")
def report() -> Report:
    return run_checks(fluxshadow.load_package(MINI4))


def test_json_validates_against_the_schema(report: Report) -> None:
    data = report_to_dict(report)
    jsonschema.Draft202012Validator.check_schema(SCHEMA)
    jsonschema.validate(data, SCHEMA)
    # The schema is strict enough to catch a broken report.
    broken = dict(data)
    broken["findings"] = [dict(data["findings"][0], severity="fatal")]
    with pytest.raises(jsonschema.ValidationError):
        jsonschema.validate(broken, SCHEMA)


def test_json_has_the_design_fields(report: Report) -> None:
    data = report_to_dict(report)
    assert data["schema_version"] == 1
    lr = data["magnetics"][1]["layers"][1]
    assert {"layer", "coverage", "void_area_mm2", "ring"} <= set(lr)
    f = data["findings"][0]
    assert {
        "rule",
        "severity",
        "ref",
        "layer",
        "x_mm",
        "y_mm",
        "message",
        "metrics",
        "waived",
    } <= set(f)
    assert all(len(i["sha256"]) == 64 for i in data["inputs"])
    # Physics figures are present and null until the physics models fill them.
    ring = next(f for f in data["findings"] if f["rule"] == "void-ring")
    assert ring["metrics"]["ring_current_a"] is None


def test_text_view_shows_every_part_and_the_caution(report: Report) -> None:
    text = report_to_text(report, width=200)
    assert "L1 inductor 4.7uH" in text
    assert "L2 inductor 2.2uH" in text
    assert "closed ring" in text
    assert "qualified engineer" in text
    assert "\x1b[" not in text  # no colour codes unless asked
    assert "\x1b[" in report_to_text(report, color=True)


@pytest.mark.parametrize(
    ("fail_on", "code"), [("error", 0), ("warning", 1), ("note", 1), ("never", 0)]
)
def test_fail_on_sets_the_exit_code(fail_on: str, code: int) -> None:
    # mini4 has warnings and notes but no errors (see the checks on the mini4 description).
    result = runner.invoke(app, ["check", str(MINI4), "--fail-on", fail_on, "-f", "json"])
    assert result.exit_code == code, result.output
    assert json.loads(result.stdout)["summary"]["worst"] == "warning"


def test_waiver_keeps_the_finding_marked(tmp_path: Path) -> None:
    cfg = tmp_path / "fluxshadow.toml"
    cfg.write_text(
        '[[waiver]]\nrule = "void-ring"\nref = "L2"\nlayer = "L2"\nreason = "ring accepted"\n'
        '[[waiver]]\nrule = "plane-void"\nref = "L2"\nlayer = "L2"\nreason = "keep-out"\n'
        '[[waiver]]\nrule = "plane-void"\nref = "L9"\nlayer = ""\nreason = "no such part"\n'
    )
    result = runner.invoke(app, ["check", str(MINI4), "--config", str(cfg), "-f", "json"])
    data = json.loads(result.stdout)
    waived = [f for f in data["findings"] if f["waived"]]
    assert {(f["rule"], f["ref"], f["layer"]) for f in waived} == {
        ("void-ring", "L2", "L2"),
        ("plane-void", "L2", "L2"),
    }
    assert all(f["waiver_reason"] for f in waived)
    assert any("'L9'" in n for n in data["notices"])


def test_unknown_threshold_is_an_error_naming_the_key(tmp_path: Path) -> None:
    cfg = tmp_path / "fluxshadow.toml"
    cfg.write_text("[thresholds]\nzone_margni_mm = 1.0\n")
    result = runner.invoke(app, ["check", str(MINI4), "--config", str(cfg)])
    assert result.exit_code == 2
    assert "thresholds.zone_margni_mm" in result.stderr


def test_severity_can_turn_a_rule_off(tmp_path: Path) -> None:
    cfg = tmp_path / "fluxshadow.toml"
    cfg.write_text('[severity]\nplane-void = "off"\nvoid-ring = "error"\n')
    result = runner.invoke(app, ["check", str(MINI4), "--config", str(cfg), "-f", "json"])
    assert result.exit_code == 1  # a closed ring is now an error
    rules = {f["rule"] for f in json.loads(result.stdout)["findings"]}
    assert "plane-void" not in rules
