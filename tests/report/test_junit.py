"""The JUnit XML report, read back with a general-purpose JUnit library (junitparser)."""

from __future__ import annotations

from dataclasses import replace
from pathlib import Path

import pytest
from junitparser import Failure, JUnitXml, Skipped, TestSuite
from typer.testing import CliRunner

import fluxshadow
from fluxshadow.checks.model import Finding, Report
from fluxshadow.checks.run import run_checks
from fluxshadow.cli.app import app
from fluxshadow.errors import ConfigError
from fluxshadow.report.junit import report_to_junit

REPO = Path(__file__).resolve().parents[2]
MINI4 = REPO / "fixtures" / "mini4"


@pytest.fixture(scope="module")
def report() -> Report:
    return run_checks(fluxshadow.load_package(MINI4))


def _suite(text: str) -> TestSuite:
    xml = JUnitXml.fromstring(text)
    suites = list(xml)
    assert len(suites) == 1
    suite = suites[0]
    assert isinstance(suite, TestSuite)
    return suite


def _outcomes(suite: TestSuite) -> dict[str, str]:
    out = {}
    for case in suite:
        kinds = {type(r) for r in case.result}
        out[case.name] = (
            "failure" if Failure in kinds else "skipped" if Skipped in kinds else "passed"
        )
    return out


def test_one_case_per_magnetic_and_rule(report: Report) -> None:
    suite = _suite(report_to_junit(report))
    names = [c.name for c in suite]
    expected = [f"{m.ref} {r}" for m in report.magnetics for r in report.rules]
    assert names == expected
    assert suite.tests == len(expected)
    assert {c.classname for c in suite} == {f"fluxshadow.{r}" for r in report.rules}
    assert suite.name == report.package


@pytest.mark.parametrize("fail_on", ["error", "warning", "note", "never"])
def test_failures_follow_fail_on(report: Report, fail_on: str) -> None:
    suite = _suite(report_to_junit(report, fail_on=fail_on))
    rank = {"error": 3, "warning": 2, "note": 1, "never": 99}[fail_on]
    order = {"error": 3, "warning": 2, "note": 1}
    expected = {
        f"{f.ref} {f.rule}" for f in report.findings if not f.waived and order[f.severity] >= rank
    }
    outcomes = _outcomes(suite)
    assert {n for n, o in outcomes.items() if o == "failure"} == expected
    assert suite.failures == len(expected)
    assert suite.skipped == 0
    assert suite.errors == 0


def test_default_is_error_like_the_cli(report: Report) -> None:
    """mini4 has warnings and notes but no error: nothing fails by default."""
    assert report.worst() == "warning"
    assert _suite(report_to_junit(report)).failures == 0
    assert _suite(report_to_junit(report, fail_on="warning")).failures > 0


def test_findings_below_the_level_are_in_system_out(report: Report) -> None:
    suite = _suite(report_to_junit(report))
    case = next(c for c in suite if c.name == "L2 void-ring")
    out = case.system_out or ""
    assert "closed" in out or "ring" in out
    assert out.count("\n") + 1 == sum(
        1 for f in report.findings if f.ref == "L2" and f.rule == "void-ring"
    )
    clean = next(c for c in suite if c.name == "L1 exposed-trace")
    assert not clean.result
    assert not clean.system_out


def test_waived_findings_skip_their_case(report: Report) -> None:
    waived = tuple(
        replace(f, waived=True, waiver_reason="slot is intended")
        if f.ref == "L2" and f.rule == "plane-void"
        else f
        for f in report.findings
    )
    suite = _suite(report_to_junit(replace(report, findings=waived), fail_on="warning"))
    outcomes = _outcomes(suite)
    assert outcomes["L2 plane-void"] == "skipped"
    assert outcomes["L1 plane-void"] == "failure"
    case = next(c for c in suite if c.name == "L2 plane-void")
    assert "slot is intended" in case.result[0].message
    assert suite.skipped == 1


def test_board_findings_and_odd_text(report: Report) -> None:
    odd = Finding(
        rule="through-cutout",
        severity="error",
        ref="",
        layer="",
        x_mm=None,
        y_mm=None,
        message='cut-out <near> & "edge" \x07 bell',
    )
    r = replace(report, findings=(*report.findings, odd), notices=("a notice",))
    text = report_to_junit(r)
    suite = _suite(text)
    case = next(c for c in suite if c.name == "board through-cutout")
    assert isinstance(case.result[0], Failure)
    assert case.result[0].type == "error"
    assert "<near>" in case.result[0].text
    assert suite.tests == len(report.magnetics) * len(report.rules) + 1
    assert "notice: a notice" in text


def test_bad_fail_on_is_a_config_error(report: Report) -> None:
    with pytest.raises(ConfigError, match="fail_on must be one of"):
        report_to_junit(report, fail_on="fatal")


def test_cli_writes_junit(tmp_path: Path) -> None:
    out = tmp_path / "check.xml"
    args = ["check", str(MINI4), "--format", "junit", "--fail-on", "warning", "-o", str(out)]
    result = CliRunner().invoke(app, args)
    assert result.exit_code == 1  # warnings at --fail-on warning
    suite = _suite(out.read_text(encoding="utf-8"))
    assert suite.failures > 0


def test_demo_writes_junit(tmp_path: Path) -> None:
    out = tmp_path / "demo.xml"
    result = CliRunner().invoke(app, ["demo", "--format", "junit", "-o", str(out)])
    assert result.exit_code == 0, result.output  # demo: --fail-on never by default
    suite = _suite(out.read_text(encoding="utf-8"))
    assert suite.tests > 0
    assert suite.failures == 0  # the JUnit verdict follows --fail-on never too
    props = {p.name: p.value for p in suite.properties()}
    assert props["fluxshadow.fail_on"] == "never"
