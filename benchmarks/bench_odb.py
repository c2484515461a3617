"""Benchmark: ODB++ route against the Gerber route on the same board (thunderscope).

Run with ``.venv/bin/python benchmarks/bench_odb.py``. Reads the ODB++ package (whole
package: matrix, profile, six copper layers, EDA nets, drill layers, components) and the
six Gerber copper files of the same board; prints seconds, primitives (copper objects)
and microseconds per primitive for each route, and the ODB copper layers alone. Target:
ODB no slower per primitive than Gerber. CPU time (process time) is used, best of three,
because other jobs may share the machine.
"""

from __future__ import annotations

import sys
import time
from pathlib import Path

from _common import REALBOARDS, machine, peak_rss_mb
from fluxshadow.io.gerber import read_gerber
from fluxshadow.io.odb import parse_features, read_odb

ODB = REALBOARDS.parent / "realboards-odb" / "thunderscope-rev5.3" / "odb"
GERBER = REALBOARDS / "thunderscope-rev5.3"
COPPER_SUFFIXES = (".gtl", ".g1", ".g2", ".g3", ".g4", ".gbl")


def _best(fn: object, repeat: int = 3) -> tuple[float, int]:
    best, n = float("inf"), 0
    for _ in range(repeat):
        t = time.process_time()
        n = fn()  # type: ignore[operator]
        best = min(best, time.process_time() - t)
    return best, n


def main() -> int:
    if not ODB.is_dir() or not GERBER.is_dir():
        print(f"{ODB} or {GERBER} not present; nothing to measure")
        return 0
    gerbers = sorted(f for f in GERBER.iterdir() if f.suffix.lower() in COPPER_SUFFIXES)
    pkg = read_odb(ODB)
    copper_files = [Path(r.source) for r in pkg.copper]

    t_odb, n_odb = _best(lambda: sum(r.n_objects for r in read_odb(ODB).copper))
    t_cu, n_cu = _best(lambda: sum(parse_features(f, root=ODB).n_objects for f in copper_files))
    t_ger, n_ger = _best(lambda: sum(read_gerber(f).n_objects for f in gerbers))
    us = lambda t, n: 1e6 * t / max(n, 1)  # noqa: E731
    print(f"machine: {machine()}")
    print(
        f"ODB++ package:      {t_odb:6.2f} s, {n_odb} primitives, {us(t_odb, n_odb):5.1f} us each"
    )
    print(f"ODB++ copper only:  {t_cu:6.2f} s, {n_cu} primitives, {us(t_cu, n_cu):5.1f} us each")
    print(
        f"Gerber copper ({len(gerbers)}): {t_ger:6.2f} s, {n_ger} primitives, "
        f"{us(t_ger, n_ger):5.1f} us each"
    )
    print(
        f"ratio per primitive ODB/Gerber: package {us(t_odb, n_odb) / us(t_ger, n_ger):.2f}, "
        f"copper only {us(t_cu, n_cu) / us(t_ger, n_ger):.2f} (target <= 1)"
    )
    print(f"peak memory: {peak_rss_mb():.0f} MB")
    return 0


if __name__ == "__main__":
    sys.exit(main())
