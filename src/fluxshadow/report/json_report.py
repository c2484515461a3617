"""The JSON report (``--format json``): a pure function of a :class:`Report`.

The layout is versioned by ``schema_version`` and described by ``docs/report.schema.json``.
Numbers are plain JSON numbers in the units their key names carry; figures a model has
not computed are ``null``.
"""

from __future__ import annotations

import json
import math
from typing import Any

from fluxshadow.checks.model import SEVERITIES, Report, RingInfo
from fluxshadow.report.inventory import CAUTION

__all__ = ["SCHEMA_VERSION", "report_to_dict", "report_to_json"]

SCHEMA_VERSION = 1


def _clean(v: Any) -> Any:
    if isinstance(v, float) and not math.isfinite(v):
        return None
    return v


def _ring(ring: RingInfo | None) -> dict[str, Any] | None:
    if ring is None:
        return None
    return {
        "closed": ring.closed,
        "opened_to": ring.opened_to,
        "inner_perimeter_mm": round(ring.inner_perimeter_mm, 3),
        "inner_area_mm2": round(ring.inner_area_mm2, 3),
        "search_window_mm": round(ring.search_window_mm, 3),
    }


def report_to_dict(report: Report) -> dict[str, Any]:
    """The report as JSON-ready data (see ``docs/report.schema.json``)."""
    counts = dict.fromkeys(SEVERITIES, 0)
    waived = 0
    for f in report.findings:
        if f.waived:
            waived += 1
        else:
            counts[f.severity] += 1
    return {
        "schema_version": SCHEMA_VERSION,
        "tool": {"name": "fluxshadow", "version": report.tool_version},
        "package": report.package,
        "route": report.route,
        "config": report.config or None,
        "summary": {
            "magnetics": len(report.magnetics),
            "findings": counts,
            "waived": waived,
            "worst": report.worst(),
        },
        "layers": list(report.layers),
        "magnetics": [
            {
                "ref": m.ref,
                "kind": m.kind,
                "value_text": m.value_text,
                "side": m.side,
                "x_mm": m.x_mm,
                "y_mm": m.y_mm,
                "body_mm": list(m.body_mm),
                "outline_mm": [list(p) for p in m.outline],
                "winding_radius_mm": m.winding_radius_mm,
                "layers": [
                    {
                        "layer": lr.layer,
                        "depth_mm": lr.depth_mm,
                        "zone_area_mm2": lr.zone_area_mm2,
                        "plane_around": lr.plane_around,
                        "coverage": lr.coverage,
                        "copper_coverage": lr.copper_coverage,
                        "void_area_mm2": lr.void_area_mm2,
                        "trace_area_mm2": lr.trace_area_mm2,
                        "ring": _ring(lr.ring),
                        "shielded_by": [s for s in lr.shielded_by.split(",") if s],
                        "figures": {k: _clean(v) for k, v in lr.figures.items()},
                    }
                    for lr in m.layers
                ],
            }
            for m in report.magnetics
        ],
        "findings": [
            {
                "rule": f.rule,
                "severity": f.severity,
                "ref": f.ref,
                "layer": f.layer,
                "x_mm": _clean(f.x_mm),
                "y_mm": _clean(f.y_mm),
                "message": f.message,
                "metrics": {k: _clean(v) for k, v in f.metrics.items()},
                "waived": f.waived,
                "waiver_reason": f.waiver_reason or None,
            }
            for f in report.findings
        ],
        "rules": dict(report.rules),
        "assumptions": list(report.assumptions),
        "notices": list(report.notices),
        "inputs": [
            {"path": i.path, "kind": i.kind, "use": i.use, "sha256": i.sha256}
            for i in report.inputs
        ],
        "cautions": CAUTION,
    }


def report_to_json(report: Report) -> str:
    """The report as indented JSON text (trailing newline)."""
    return json.dumps(report_to_dict(report), indent=2, ensure_ascii=False) + "\n"
