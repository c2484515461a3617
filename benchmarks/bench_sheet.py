"""Benchmark: one local thin-sheet eddy-current solve under one magnetic.

Run with ``.venv/bin/python benchmarks/bench_sheet.py [--repeat N] [--model thin|impedance]
[--threads N]``. Not a test; prints wall-clock and CPU seconds per stage and the best of
``--repeat`` runs.

BLAS threads: the dense reduction of the solver runs in OpenBLAS. On a machine whose
cores are busy with other work, OpenBLAS's own threads spin against each other and the
reduction became 20 times slower (measured here: 11.5 s instead of 0.54 s with a second
process busy), so this script pins OpenBLAS to ``--threads`` (default 1) before numpy is
imported.

The zone: one plane of 35 µm copper, a 20 x 20 mm patch with an enclosed 3 x 2 mm void
near the winding (one ring-current unknown), under a 10-turn winding of 2 mm radius
lumped 0.2 mm above the copper. All harmonics of a 1 MHz switching frequency up to the
9th are solved, and the field is evaluated at 101 points 0.5 mm below the copper. The
default mesh has 1,589 nodes (1,476 unknowns, 3,064 triangles); its size field implies
about 1,520 in the patch plus half the boundary nodes (the mesh used to place 1,808, 19 %
more, in guide layers stepped by the smallest size along each layer). The target is one
second for the whole solve.

Figures on the 2-core machine of the issue, CPU seconds, best of 5, old and new code run
alternately in one process (the machine's speed varies by about 30 % with the other work
on it). Before the blocked assembly: mesh 0.29-0.40, M and R 0.76-1.0 (0.6 run alone),
reduction 0.42-0.44, 9 harmonics 0.06-0.08, field 0.07-0.09, total 1.6-2.1 s. After it:
mesh 0.32-0.37 (unchanged code), M and R 0.32-0.41, reduction 0.39-0.48, 9 harmonics
0.03, field 0.03, total 1.1-1.35 s; this script, best of 3: 1.35-1.56 s (1.84 s before).
With the mesh following its size field (1,808 -> 1,589 nodes) and the vectorised
point-in-polygon: mesh 0.30-0.34 -> 0.21-0.24, M 0.31-0.34 -> 0.23-0.28, reduction
0.42-0.46 -> 0.26-0.29, 9 harmonics 0.03 -> 0.02, field 0.03 -> 0.02, total 1.11-1.26 ->
0.78-0.93 s; this script, best of 3, old and new run back to back: 1.35 -> 0.89-0.95 s on
a quiet machine, 1.50 -> 1.20 s with the host's steal time up (ring current 0.2248 ->
0.2238 A, dL -401.53 -> -401.39 nH, |Bz| on the axis 167.26 -> 167.19 uT).
What remains is the O(n³) reduction (Cholesky, sygst, sytrd), M assembly and the mesh
generator's size-field look-ups (KD-tree queries, about 0.1 s).
"""

from __future__ import annotations

import argparse
import os
import sys
import time

if __name__ == "__main__":  # before numpy loads OpenBLAS
    _threads = sys.argv[sys.argv.index("--threads") + 1] if "--threads" in sys.argv else "1"
    os.environ.setdefault("OPENBLAS_NUM_THREADS", _threads)

import numpy as np

from _common import machine, peak_rss_mb
from fluxshadow.physics.sheet import LoopSource, PlaneSheet, build_sheet_model

SIGMA = 5.8e7
T_CU = 35e-6
RADIUS = 2e-3
HEIGHT = 0.2e-3
F_SW = 1e6


def _zone() -> tuple[PlaneSheet, LoopSource]:
    half = 10e-3
    patch = np.array([[-half, -half], [half, -half], [half, half], [-half, half]])
    void = np.array([[2.5e-3, -1e-3], [5.5e-3, -1e-3], [5.5e-3, 1e-3], [2.5e-3, 1e-3]])
    sheet = PlaneSheet.from_polygons(
        [(patch, [void[::-1]])], z_m=-T_CU / 2, thickness_m=T_CU, sigma_s_per_m=SIGMA
    )
    loops = LoopSource.from_arrays([0.0, 0.0, HEIGHT], [0.0, 0.0, 1.0], RADIUS, 10.0)
    return sheet, loops


def main() -> None:
    """Time mesh + assembly + reduction + sweep + field for the zone above."""
    parser = argparse.ArgumentParser(description=__doc__)
    parser.add_argument("--repeat", type=int, default=3)
    parser.add_argument("--model", choices=["thin", "impedance"], default="impedance")
    parser.add_argument("--threads", default="1", help="OpenBLAS threads (default 1)")
    args = parser.parse_args()
    sheet, loops = _zone()
    freqs = F_SW * np.arange(1, 10)
    x = np.linspace(-8e-3, 8e-3, 101)  # x = 0 is point 50
    points = np.column_stack([x, np.zeros_like(x), np.full_like(x, -T_CU - 0.5e-3)])
    best = np.inf
    for _ in range(args.repeat):
        c0, t0 = time.process_time(), time.perf_counter()
        model = build_sheet_model([sheet], loops, copper_model=args.model)
        t1 = time.perf_counter()
        sol = model.solve(freqs)
        t2 = time.perf_counter()
        b = sol.field_at(points)
        c3, t3 = time.process_time(), time.perf_counter()
        best = min(best, t3 - t0)
        print(
            f"nodes {model.n_nodes}, unknowns {model.n_unknowns}: build {t1 - t0:.3f} s, "
            f"9 harmonics {t2 - t1:.3f} s, field at {len(points)} points {t3 - t2:.3f} s, "
            f"total {t3 - t0:.3f} s (CPU {c3 - c0:.3f} s)"
        )
    print(
        f"ring current at 1 MHz: {abs(sol.ring_current_a[0, 0]):.4f} A; "
        f"dL {sol.delta_l_h[0] * 1e9:.2f} nH; |Bz| on axis {abs(b[0, 50, 2]) * 1e6:.2f} uT"
    )
    print(f"best of {args.repeat}: {best:.3f} s (target 1 s); peak RSS {peak_rss_mb():.0f} MB")
    print(f"{machine()}, OpenBLAS threads {os.environ.get('OPENBLAS_NUM_THREADS')}")


if __name__ == "__main__":
    main()
