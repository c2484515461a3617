"""Benchmark: load_package + compose every magnetic's zone on each shared real board.

Run with ``.venv/bin/python benchmarks/bench_load.py``. Targets: the largest shared board
(6 layers, 10.5 MB) loaded with all magnetic zones composed in <= 5 s (load + zones), peak
memory <= 1 GB; ``check`` of it (with physics) <= 10 s. "split" times the plane/trace split
of the same windows (what the checks use).
"""

from __future__ import annotations

import sys
import time

import fluxshadow
from _common import boards, machine, peak_rss_mb
from fluxshadow.board.model import Board
from fluxshadow.checks.run import run_checks

ZONE_MARGIN_MM = 3.0
"""Half-width added around each body outline for the zone composition (covers the deepest
zone of a 1.6 mm board with the default spread)."""


def _zones(board: Board, *, split: bool) -> None:
    """Compose (or split into plane and traces) every layer in every magnetic's window."""
    for m in board.magnetics:
        xs, ys = m.outline[:, 0], m.outline[:, 1]
        window = (
            xs.min() - ZONE_MARGIN_MM,
            ys.min() - ZONE_MARGIN_MM,
            xs.max() + ZONE_MARGIN_MM,
            ys.max() + ZONE_MARGIN_MM,
        )
        for layer in board.layers:
            if split:
                board.split(layer, window)
            else:
                board.copper(layer, window)


def main() -> int:
    found = boards()
    if not found:
        print("no shared real boards found; nothing to measure")
        return 0
    print(f"machine: {machine()}")
    print(
        f"{'board':28s} {'MB':>6s} {'layers':>6s} {'mags':>5s} {'load s':>7s} "
        f"{'zones s':>8s} {'split s':>8s} {'check s':>8s}"
    )
    for path in found:
        size = sum(f.stat().st_size for f in path.rglob("*") if f.is_file()) / 1e6
        t0 = time.perf_counter()
        board = fluxshadow.load_package(path)
        t1 = time.perf_counter()
        _zones(board, split=False)
        t2 = time.perf_counter()
        _zones(board, split=True)
        t3 = time.perf_counter()
        run_checks(board)
        t4 = time.perf_counter()
        print(
            f"{path.name:28s} {size:6.1f} {len(board.layers):6d} {len(board.magnetics):5d} "
            f"{t1 - t0:7.2f} {t2 - t1:8.2f} {t3 - t2:8.2f} {t4 - t3:8.2f}"
        )
    print(f"peak memory: {peak_rss_mb():.0f} MB (target <= 1024 MB)")
    return 0


if __name__ == "__main__":
    sys.exit(main())
