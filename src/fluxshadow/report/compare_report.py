"""Text and JSON views of a what-if comparison (pure functions)."""

from __future__ import annotations

import io
import json
from typing import Any

from rich.console import Console
from rich.table import Table
from rich.text import Text

from fluxshadow.checks.compare import Comparison
from fluxshadow.checks.model import Finding
from fluxshadow.report.inventory import CAUTION
from fluxshadow.report.json_report import SCHEMA_VERSION

__all__ = ["comparison_to_dict", "comparison_to_json", "comparison_to_text"]


def _finding(f: Finding) -> dict[str, Any]:
    return {
        "rule": f.rule,
        "severity": f.severity,
        "ref": f.ref,
        "layer": f.layer,
        "message": f.message,
    }


def comparison_to_dict(c: Comparison) -> dict[str, Any]:
    """The comparison as JSON-ready data."""
    return {
        "schema_version": SCHEMA_VERSION,
        "command": "compare",
        "package": c.before.package,
        "edits": [{"kind": e.kind, "ref": e.ref, "layer": e.layer} for e in c.edits],
        "changes": [
            {
                "ref": r.ref,
                "layer": r.layer,
                "what": r.what,
                "before": r.before,
                "after": r.after,
                "delta": r.delta,
            }
            for r in c.rows
        ],
        "resolved": [_finding(f) for f in c.resolved],
        "new": [_finding(f) for f in c.new],
        "cautions": CAUTION,
    }


def comparison_to_json(c: Comparison) -> str:
    """The comparison as indented JSON text."""
    return json.dumps(comparison_to_dict(c), indent=2, ensure_ascii=False) + "\n"


def _fmt(v: Any) -> str:
    if v is None:
        return "-"
    if isinstance(v, bool):
        return "yes" if v else "no"
    if isinstance(v, float):
        return f"{v:.4g}"
    return str(v)


def comparison_to_text(c: Comparison, *, width: int = 110) -> str:
    """The comparison as a table of changed figures plus resolved and new findings."""
    buf = io.StringIO()
    con = Console(file=buf, width=width, color_system=None, highlight=False)
    con.print(Text(f"fluxshadow compare · {c.before.package} · " + "; ".join(map(str, c.edits))))
    t = Table(title="Figures that change", title_justify="left")
    for col in ("part", "layer", "figure", "as built", "edited", "change"):
        t.add_column(col, overflow="fold")
    for r in c.rows:
        d = r.delta
        t.add_row(
            r.ref,
            r.layer or "-",
            r.what,
            _fmt(r.before),
            _fmt(r.after),
            "" if d is None else f"{d:+.4g}",
        )
    con.print(t if c.rows else Text("No figure changes."))
    for title, items in (
        ("Findings resolved by the edit", c.resolved),
        ("Findings the edit introduces", c.new),
    ):
        if items:
            con.print(Text(title))
            for f in items:
                con.print(Text(f"  - {f.severity} {f.rule} {f.ref} {f.layer}: {f.message}"))
    con.print(Text(f"Caution: {CAUTION}"))
    return buf.getvalue()
