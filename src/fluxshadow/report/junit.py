"""The JUnit XML report (``--format junit``): a pure function of a :class:`Report`.

For CI services that show test results: one ``<testsuite>`` for the board (named after the
package) with one ``<testcase>`` per magnetic and rule, named ``"L2 plane-void"`` with
classname ``"fluxshadow.plane-void"``. Findings not tied to a magnetic get a test case of
their own (``"board through-cutout"`` for board-wide ones).

A test case

- **fails** when it has an unwaived finding at or above ``fail_on`` (default ``"error"``,
  the same default as ``fluxshadow check --fail-on``, so the JUnit verdict and the exit
  code agree); the failure's text lists those findings;
- is **skipped** when all its findings are waived (the waivers' reasons in the message);
- **passes** otherwise; findings below ``fail_on`` (notes, and warnings under the default)
  and waived ones are listed in its ``<system-out>``.

A rule that found nothing for a magnetic is a passing test case, so a CI service shows
what was checked, not only what was found.
"""

from __future__ import annotations

import re
import xml.etree.ElementTree as ET
from collections.abc import Iterable

from fluxshadow.checks.model import SEVERITY_RANK, Finding, Report
from fluxshadow.errors import ConfigError

__all__ = ["FAIL_ON_LEVELS", "report_to_junit"]

FAIL_ON_LEVELS = ("error", "warning", "note", "never")
"""Values of ``fail_on``: the lowest unwaived severity that fails a test case."""

# XML 1.0 forbids most C0 control characters, even escaped.
_BAD_XML = re.compile("[\x00-\x08\x0b\x0c\x0e-\x1f\ufffe\uffff]")


def _x(text: str) -> str:
    return _BAD_XML.sub("\ufffd", text)


def _line(f: Finding) -> str:
    where = f" {f.layer}" if f.layer else ""
    at = f" at ({f.x_mm:.2f}, {f.y_mm:.2f}) mm" if f.x_mm is not None and f.y_mm is not None else ""
    waived = f" [waived: {f.waiver_reason}]" if f.waived else ""
    return f"{f.severity} {f.rule}{where}{at}: {f.message}{waived}"


def _case(
    suite: ET.Element, name: str, rule: str, findings: list[Finding], limit: int
) -> tuple[int, int]:
    """Add one test case; return (failed, skipped) as 0/1."""
    case = ET.SubElement(
        suite, "testcase", {"name": _x(name), "classname": _x(f"fluxshadow.{rule}"), "time": "0"}
    )
    failing: list[Finding] = []
    others: list[Finding] = []
    for f in findings:
        fails = not f.waived and SEVERITY_RANK[f.severity] >= limit
        (failing if fails else others).append(f)
    failed = skipped = 0
    if failing:
        worst = max((f.severity for f in failing), key=SEVERITY_RANK.__getitem__)
        failure = ET.SubElement(
            case,
            "failure",
            {
                "message": _x(f"{len(failing)} finding(s): {failing[0].message}"),
                "type": worst,
            },
        )
        failure.text = _x("\n".join(_line(f) for f in failing))
        failed = 1
    elif findings and all(f.waived for f in findings):
        reasons = sorted({f.waiver_reason or "waived" for f in findings})
        ET.SubElement(case, "skipped", {"message": _x("waived: " + "; ".join(reasons))})
        skipped = 1
    if others:
        out = ET.SubElement(case, "system-out")
        out.text = _x("\n".join(_line(f) for f in others))
    return failed, skipped


def _groups(report: Report) -> Iterable[tuple[str, str, list[Finding]]]:
    """(case name, rule, findings) for every magnetic x rule, then stray findings."""
    rules = list(report.rules)
    rules += sorted({f.rule for f in report.findings} - set(rules))
    refs = [m.ref for m in report.magnetics]
    for ref in refs:
        for rule in rules:
            yield (
                f"{ref} {rule}",
                rule,
                [f for f in report.findings if f.ref == ref and f.rule == rule],
            )
    stray: dict[tuple[str, str], list[Finding]] = {}
    for f in report.findings:
        if f.ref not in refs:
            stray.setdefault((f.ref, f.rule), []).append(f)
    for (ref, rule), fs in stray.items():
        yield f"{ref or 'board'} {rule}", rule, fs


def report_to_junit(report: Report, *, fail_on: str = "error") -> str:
    """The report as JUnit XML text.

    Parameters
    ----------
    report : Report
    fail_on : {"error", "warning", "note", "never"}
        Lowest unwaived severity that fails a test case (``never``: none fails).

    Returns
    -------
    str
        An XML document (UTF-8 declaration, trailing newline) with one ``<testsuites>``
        holding one ``<testsuite>``.

    Raises
    ------
    ConfigError
        ``fail_on`` is not one of :data:`FAIL_ON_LEVELS`.
    """
    if fail_on not in FAIL_ON_LEVELS:
        msg = f"fail_on must be one of {', '.join(FAIL_ON_LEVELS)}; got {fail_on!r}"
        raise ConfigError(msg)
    limit = SEVERITY_RANK[fail_on]
    root = ET.Element("testsuites", {"name": "fluxshadow check"})
    suite = ET.SubElement(root, "testsuite", {"name": _x(report.package)})
    props = ET.SubElement(suite, "properties")
    for name, value in (
        ("fluxshadow.version", report.tool_version),
        ("fluxshadow.config", report.config),
        ("fluxshadow.fail_on", fail_on),
        ("fluxshadow.layers", " ".join(report.layers)),
    ):
        ET.SubElement(props, "property", {"name": name, "value": _x(value)})
    tests = failures = skipped = 0
    for name, rule, fs in _groups(report):
        failed, skip = _case(suite, name, rule, fs, limit)
        tests += 1
        failures += failed
        skipped += skip
    if report.notices:
        out = ET.SubElement(suite, "system-out")
        out.text = _x("\n".join(f"notice: {n}" for n in report.notices))
    for el in (root, suite):
        el.set("tests", str(tests))
        el.set("failures", str(failures))
        el.set("errors", "0")
        el.set("skipped", str(skipped))
        el.set("time", "0")
    ET.indent(root, space="  ")
    body = ET.tostring(root, encoding="unicode")
    return '<?xml version="1.0" encoding="UTF-8"?>\n' + body + "\n"
