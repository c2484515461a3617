"""Benchmark: Gerber read throughput (MB/s) on every file of the shared real boards.

Run with ``.venv/bin/python benchmarks/bench_read.py``. Target (issue 2): >= 5 MB/s.
"""

from __future__ import annotations

import sys
import time

from _common import boards, machine, peak_rss_mb
from fluxshadow.io.gerber import looks_like_gerber, read_gerber


def main() -> int:
    files = []
    for board in boards():
        for f in sorted(board.rglob("*")):
            if f.is_file() and f.stat().st_size < 50_000_000:
                head = f.read_bytes()[:65536].decode("utf-8", "replace")
                if looks_like_gerber(head):
                    files.append(f)
    if not files:
        print("no shared real boards found; nothing to measure")
        return 0
    total_bytes = sum(f.stat().st_size for f in files)
    t0 = time.perf_counter()
    slowest = (0.0, "")
    for f in files:
        t = time.perf_counter()
        read_gerber(f)
        dt = time.perf_counter() - t
        mbps = f.stat().st_size / 1e6 / dt if dt > 0 else float("inf")
        if f.stat().st_size > 500_000 and (slowest[1] == "" or mbps < slowest[0]):
            slowest = (mbps, f.name)
    dt = time.perf_counter() - t0
    print(f"machine: {machine()}")
    print(f"Gerber files: {len(files)}, {total_bytes / 1e6:.1f} MB in {dt:.2f} s")
    print(f"read throughput: {total_bytes / 1e6 / dt:.1f} MB/s (target >= 5 MB/s)")
    if slowest[1]:
        print(f"slowest file over 0.5 MB: {slowest[1]} at {slowest[0]:.1f} MB/s")
    print(f"peak memory: {peak_rss_mb():.0f} MB")
    return 0


if __name__ == "__main__":
    sys.exit(main())
