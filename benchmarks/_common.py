"""Helpers shared by the benchmark scripts (not a test; prints figures)."""

from __future__ import annotations

import os
import platform
import resource
from pathlib import Path

REPO = Path(__file__).resolve().parents[1]
REALBOARDS = REPO.parent / "shared" / "realboards"


def peak_rss_mb() -> float:
    """Peak resident memory of this process so far (MB)."""
    return resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024.0


def machine() -> str:
    """One line describing the machine the figures were taken on."""
    return f"{platform.machine()}, {os.cpu_count()} cores, Python {platform.python_version()}"


def boards() -> list[Path]:
    """The shared real boards, or an empty list when the corpus is absent."""
    if not REALBOARDS.is_dir():
        return []
    return sorted(p for p in REALBOARDS.iterdir() if p.is_dir())
