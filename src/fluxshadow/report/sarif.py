"""The SARIF report (``--format sarif``): a pure function of a :class:`Report`.

SARIF 2.1.0 (OASIS standard, errata 01) is the interchange format code-review services read
for static findings. One log holds one run of fluxshadow over one fabrication package:

- ``tool.driver.rules[]``: every rule of the report (id, summary, default level, where the
  rule is explained: ``docs/rules.md``);
- ``results[]``: one per finding, at the level of its severity, located in the copper
  layer's Gerber file (or the placement file for a part's finding not tied to a layer),
  with logical locations for the part (kind ``module``) and the copper layer (kind
  ``resource``), the finding's position and metrics as properties, and a partial
  fingerprint stable across runs for the same rule, part and layer;
- waived findings stay, with an ``external`` suppression carrying the waiver's reason;
- ``artifacts[]``: every input file with its SHA-256;
- ``invocations[0]``: the run succeeded; the report's notices as notifications.

Paths are relative to the package root (``uriBaseId`` ``PACKAGE``). Nothing is computed here.
"""

from __future__ import annotations

import hashlib
import json
import math
from collections.abc import Mapping
from typing import Any
from urllib.parse import quote

from fluxshadow.checks.model import Finding, Report
from fluxshadow.checks.settings import DEFAULT_SEVERITY
from fluxshadow.report.inventory import CAUTION

__all__ = [
    "SARIF_SCHEMA_URI",
    "SARIF_VERSION",
    "report_to_sarif",
    "report_to_sarif_dict",
]

SARIF_VERSION = "2.1.0"
SARIF_SCHEMA_URI = (
    "https://docs.oasis-open.org/sarif/sarif/v2.1.0/errata01/os/schemas/sarif-schema-2.1.0.json"
)
_BASE = "PACKAGE"
_FINGERPRINT = "fluxshadowFinding/v1"
_RULES_DOC = "docs/rules.md"


def _clean(v: Any) -> Any:
    if isinstance(v, float) and not math.isfinite(v):
        return None
    return v


def _uri(path: str) -> str:
    """A relative URI reference for a package path (forward slashes, percent-encoded)."""
    return quote(path.replace("\\", "/"), safe="/-._~")


def _rule_descriptor(rule_id: str, summary: str) -> dict[str, Any]:
    level = DEFAULT_SEVERITY.get(rule_id, "warning")
    text = summary or f"Rule {rule_id}."
    return {
        "id": rule_id,
        "shortDescription": {"text": text},
        "fullDescription": {
            "text": f"{text} Default severity: {level}; the [severity] table of "
            "fluxshadow.toml can change it or turn the rule off."
        },
        "defaultConfiguration": {"level": level if level != "off" else "none"},
        "help": {
            "text": f"See {_RULES_DOC}, section `{rule_id}`, for what the rule finds, its "
            "thresholds and its metrics.",
            "markdown": f"See [{_RULES_DOC}]({_RULES_DOC}), section `{rule_id}`.",
        },
    }


def _fingerprints(findings: tuple[Finding, ...]) -> list[str]:
    """One stable key a finding: a hash of (rule, part, layer), ``#n`` for repeats.

    Repeats (several assumptions of one part) are numbered in report order, which is
    deterministic for a given package and configuration.
    """
    seen: dict[str, int] = {}
    out = []
    for f in findings:
        key = f"{f.rule}|{f.ref}|{f.layer}"
        n = seen.get(key, 0)
        seen[key] = n + 1
        digest = hashlib.sha256(key.encode("utf-8")).hexdigest()[:32]
        out.append(digest if n == 0 else f"{digest}#{n}")
    return out


def _location(
    f: Finding, layer_files: Mapping[str, str], placement: str, index: Mapping[str, int]
) -> dict[str, Any] | None:
    file = layer_files.get(f.layer, "") if f.layer else (placement if f.ref else "")
    loc: dict[str, Any] = {}
    if file:
        art: dict[str, Any] = {"uri": _uri(file), "uriBaseId": _BASE}
        if file in index:
            art["index"] = index[file]
        loc["physicalLocation"] = {"artifactLocation": art}
    logical = []
    if f.ref:
        logical.append({"name": f.ref, "kind": "module", "properties": {"what": "part"}})
    if f.layer:
        logical.append(
            {
                "name": f.layer,
                "fullyQualifiedName": f"{f.ref}/{f.layer}" if f.ref else f.layer,
                "kind": "resource",
                "properties": {"what": "copper layer"},
            }
        )
    if logical:
        loc["logicalLocations"] = logical
    if f.x_mm is not None and f.y_mm is not None:
        loc["message"] = {"text": f"({f.x_mm:.2f}, {f.y_mm:.2f}) mm, artwork frame"}
    return loc or None


def report_to_sarif_dict(report: Report) -> dict[str, Any]:
    """The report as a SARIF 2.1.0 log (JSON-ready data).

    Parameters
    ----------
    report : Report
        From :func:`fluxshadow.checks.run.run_checks`.

    Returns
    -------
    dict
        ``{"$schema", "version": "2.1.0", "runs": [run]}``; coordinates in mm (artwork
        frame) under ``results[].properties`` as ``x_mm`` / ``y_mm``, the finding's
        figures under ``properties.metrics`` with their unit-suffixed keys.
    """
    rule_ids = list(report.rules)
    rule_ids += sorted({f.rule for f in report.findings} - set(rule_ids))
    rule_index = {rid: i for i, rid in enumerate(rule_ids)}
    artifacts: list[dict[str, Any]] = []
    index: dict[str, int] = {}
    for i in report.inputs:
        art: dict[str, Any] = {
            "location": {"uri": _uri(i.path), "uriBaseId": _BASE},
            "description": {"text": f"{i.kind}: {i.use}"},
        }
        if i.sha256:
            art["hashes"] = {"sha-256": i.sha256}
        if not i.use.startswith("not "):
            art["roles"] = ["analysisTarget"]
        index[i.path] = len(artifacts)
        artifacts.append(art)
    placement = next((i.path for i in report.inputs if i.kind == "placement"), "")

    results = []
    for f, fp in zip(report.findings, _fingerprints(report.findings), strict=True):
        res: dict[str, Any] = {
            "ruleId": f.rule,
            "ruleIndex": rule_index[f.rule],
            "level": f.severity,
            "message": {"text": f.message},
        }
        loc = _location(f, report.layer_files, placement, index)
        if loc is not None:
            res["locations"] = [loc]
        res["partialFingerprints"] = {_FINGERPRINT: fp}
        res["suppressions"] = (
            [
                {
                    "kind": "external",
                    "status": "accepted",
                    "justification": f.waiver_reason or "waived in the configuration",
                }
            ]
            if f.waived
            else []
        )
        res["properties"] = {
            "ref": f.ref,
            "layer": f.layer,
            "x_mm": _clean(f.x_mm),
            "y_mm": _clean(f.y_mm),
            "metrics": {k: _clean(v) for k, v in f.metrics.items()},
        }
        results.append(res)

    invocation: dict[str, Any] = {"executionSuccessful": True}
    if report.notices:
        invocation["toolExecutionNotifications"] = [
            {"message": {"text": n}, "level": "note"} for n in report.notices
        ]
    run: dict[str, Any] = {
        "tool": {
            "driver": {
                "name": "fluxshadow",
                "version": report.tool_version,
                "rules": [_rule_descriptor(rid, report.rules.get(rid, "")) for rid in rule_ids],
            }
        },
        "originalUriBaseIds": {
            _BASE: {"description": {"text": f"the fabrication package {report.package}"}}
        },
        "invocations": [invocation],
        "artifacts": artifacts,
        "results": results,
        "properties": {
            "package": report.package,
            "config": report.config,
            "layers": list(report.layers),
            "assumptions": list(report.assumptions),
            "cautions": CAUTION,
        },
    }
    return {"$schema": SARIF_SCHEMA_URI, "version": SARIF_VERSION, "runs": [run]}


def report_to_sarif(report: Report) -> str:
    """The report as SARIF 2.1.0 JSON text (indented, trailing newline)."""
    return json.dumps(report_to_sarif_dict(report), indent=2, ensure_ascii=False) + "\n"
