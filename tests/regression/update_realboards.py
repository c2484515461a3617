"""Rewrite the real-board regression files from a fresh ``fluxshadow`` check.

Usage (from the repository root)::

    .venv/bin/python tests/regression/update_realboards.py [BOARD ...]

For each shared real board (default: all seven found in ``../shared/realboards``) this runs
``load_package`` and ``run_checks`` and writes ``tests/regression/realboards/<board>.json``:
per magnetic and copper layer the ``coverage``, ``copper_coverage``, ``plane_around`` and
whether the largest void's ring is closed (``null`` when the layer has no reported void),
and the set of findings of the geometry rules as ``[rule, ref, layer]``. The hand-written
``checked_by_hand`` list of an existing file is kept as it is: after a change that moves the
numbers, look at the pictures again and update that list by hand.

``tests/regression/test_realboards_regression.py`` compares a fresh check against these
files.
"""

from __future__ import annotations

import argparse
import json
import sys
from pathlib import Path
from typing import Any

import fluxshadow
from fluxshadow.checks.model import Report
from fluxshadow.checks.run import run_checks

__all__ = ["GEOMETRY_RULES", "REALBOARDS", "RESULTS", "main", "snapshot"]

HERE = Path(__file__).resolve().parent
RESULTS = HERE / "realboards"
REALBOARDS = HERE.parents[2] / "shared" / "realboards"

GEOMETRY_RULES = ("plane-void", "void-ring", "through-cutout", "exposed-trace")
"""The rules whose findings were checked by hand and are frozen here."""


def snapshot(report: Report) -> dict[str, Any]:
    """The figures and findings of a report that the regression files hold."""
    magnetics: dict[str, Any] = {}
    for m in report.magnetics:
        layers = {
            lr.layer: {
                "coverage": lr.coverage,
                "copper_coverage": lr.copper_coverage,
                "plane_around": lr.plane_around,
                "ring_closed": None if lr.ring is None else lr.ring.closed,
            }
            for lr in m.layers
        }
        magnetics[m.ref] = {"side": m.side, "layers": layers}
    findings = sorted(
        {(f.rule, f.ref, f.layer) for f in report.findings if f.rule in GEOMETRY_RULES}
    )
    return {
        "rules": list(GEOMETRY_RULES),
        "magnetics": magnetics,
        "findings": [list(f) for f in findings],
    }


def main(argv: list[str] | None = None) -> int:
    """Rewrite the regression files of the named boards (all present ones by default)."""
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("boards", nargs="*", help="board folder names under shared/realboards")
    args = parser.parse_args(argv)
    if not REALBOARDS.is_dir():
        print(f"{REALBOARDS} is not present", file=sys.stderr)
        return 1
    names = args.boards or sorted(p.name for p in REALBOARDS.iterdir() if p.is_dir())
    RESULTS.mkdir(exist_ok=True)
    for name in names:
        out = RESULTS / f"{name}.json"
        old = json.loads(out.read_text()) if out.exists() else {}
        report = run_checks(fluxshadow.load_package(REALBOARDS / name))
        data = {"board": name, **snapshot(report)}
        data["checked_by_hand"] = old.get("checked_by_hand", [])
        out.write_text(json.dumps(data, indent=1, ensure_ascii=False) + "\n")
        print(f"wrote {out.relative_to(HERE.parents[1])}: {len(data['findings'])} findings")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
