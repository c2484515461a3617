"""Benchmark: performance at scale.

1. A generated 12-layer board of about one million primitives (flashes, track segments and
   plane regions with voids), written as Gerber files into a temporary folder: time
   ``load_package`` and ``run_checks``, and the peak memory of this process. Each layer's
   random walk restarts where it stopped, so all its tracks form ONE polyline object of
   tens of thousands of vertices whose box is the whole board: every window meets it, and
   composition and the trace-length figures cut it to its runs of segments near the
   window (whole-polyline work made the 1M check take over 17 minutes; now 15-25 s).
2. A batch of 50 packages (copies of the demo board and of mini4, some as zip archives)
   timed with ``run_batch`` on local worker processes, against one process.

Run with ``.venv/bin/python benchmarks/bench_scale.py [--primitives N] [--packages N]``.
"""

from __future__ import annotations

import argparse
import random
import shutil
import sys
import tempfile
import time
import zipfile
from pathlib import Path

import fluxshadow
from _common import REPO, machine, peak_rss_mb
from fluxshadow.batch import run_batch
from fluxshadow.checks.run import run_checks
from fluxshadow.synth.demo import demo_board
from fluxshadow.synth.writer import write_package

N_LAYERS = 12
BOARD_W_MM = 200.0
BOARD_H_MM = 150.0
PARTS = (  # ref, value, package, x, y (mm): power magnetics spread over the board
    ("L1", "4.7uH", "IND_5.0x5.0mm", 30.0, 30.0),
    ("L2", "2.2uH", "IND_4.0x4.0mm", 100.0, 75.0),
    ("L3", "10uH", "IND_6.0x6.0mm", 170.0, 120.0),
    ("T1", "XFMR", "EP13", 60.0, 110.0),
)


def _coord(v_mm: float) -> str:
    return str(round(v_mm * 1e6))


def _layer_text(index: int, per_layer: int, rng: random.Random) -> str:
    """One copper layer: a plane region with voids (inner layers), pads and tracks."""
    side = "Top" if index == 1 else "Bot" if index == N_LAYERS else "Inr"
    out = [
        f"G04 generated scale board, copper layer {index} of {N_LAYERS}*",
        f"%TF.FileFunction,Copper,L{index},{side}*%",
        "%TF.FilePolarity,Positive*%",
        "%FSLAX46Y46*%",
        "%MOMM*%",
        "G01*",
        "%ADD10C,0.600000*%",
        "%ADD11C,0.200000*%",
        "%ADD12R,1.000000X0.600000*%",
    ]
    n = 0
    if side == "Inr":
        out += ["%LPD*%", "G36*", "X0Y0D02*", f"X{_coord(BOARD_W_MM)}Y0D01*"]
        out += [f"X{_coord(BOARD_W_MM)}Y{_coord(BOARD_H_MM)}D01*", f"X0Y{_coord(BOARD_H_MM)}D01*"]
        out += ["X0Y0D01*", "G37*", "%LPC*%"]
        for _ in range(200):  # rectangular voids
            x, y = rng.uniform(5, BOARD_W_MM - 10), rng.uniform(5, BOARD_H_MM - 10)
            w, h = rng.uniform(0.5, 4.0), rng.uniform(0.5, 4.0)
            out += [
                "G36*",
                f"X{_coord(x)}Y{_coord(y)}D02*",
                f"X{_coord(x + w)}Y{_coord(y)}D01*",
                f"X{_coord(x + w)}Y{_coord(y + h)}D01*",
                f"X{_coord(x)}Y{_coord(y + h)}D01*",
                f"X{_coord(x)}Y{_coord(y)}D01*",
                "G37*",
            ]
            n += 1
        out.append("%LPD*%")
    n_flash = per_layer // 2
    out.append("D10*" if side == "Inr" else "D12*")
    for _ in range(n_flash):
        x, y = rng.uniform(1, BOARD_W_MM - 1), rng.uniform(1, BOARD_H_MM - 1)
        if index == 1 and any(abs(x - px) < 5.0 and abs(y - py) < 5.0 for *_, px, py in PARTS):
            # the magnetics' own pads stand alone, as on a real board (a random pad on
            # top of them would move the pad centres the placement frame is fitted to)
            x = x + 10.0 if x < BOARD_W_MM / 2 else x - 10.0
        out.append(f"X{_coord(x)}Y{_coord(y)}D03*")
    n += n_flash
    out.append("D11*")
    x, y = 1.0, 1.0
    while n < per_layer:  # meandering tracks: each D01 is one segment
        out.append(f"X{_coord(x)}Y{_coord(y)}D02*")
        for _ in range(50):
            x = min(max(x + rng.uniform(-3, 3), 0.5), BOARD_W_MM - 0.5)
            y = min(max(y + rng.uniform(-3, 3), 0.5), BOARD_H_MM - 0.5)
            out.append(f"X{_coord(x)}Y{_coord(y)}D01*")
        n += 50
    out.append("M02*")
    return "\n".join(out) + "\n"


def write_scale_board(folder: Path, primitives: int, seed: int = 1) -> None:
    """Write the 12-layer board (about ``primitives`` primitives in all) into ``folder``."""
    rng = random.Random(seed)
    folder.mkdir(parents=True, exist_ok=True)
    per_layer = primitives // N_LAYERS
    for i in range(1, N_LAYERS + 1):
        (folder / f"scale-L{i:02d}.gbr").write_text(_layer_text(i, per_layer, rng))
    w, h = _coord(BOARD_W_MM), _coord(BOARD_H_MM)
    (folder / "scale-profile.gbr").write_text(
        "%TF.FileFunction,Profile,NP*%\n%FSLAX46Y46*%\n%MOMM*%\nG01*\n%ADD10C,0.1*%\nD10*\n"
        f"X0Y0D02*\nX{w}Y0D01*\nX{w}Y{h}D01*\nX0Y{h}D01*\nX0Y0D01*\nM02*\n"
    )
    rows = ["Ref,Val,Package,PosX(mm),PosY(mm),Rot,Side"]
    rows += [f'"{r}","{v}","{p}",{x:.4f},{y:.4f},0.00,top' for r, v, p, x, y in PARTS]
    (folder / "scale-placement.csv").write_text("\n".join(rows) + "\n")
    # Pads under each part on the top layer so the frame fit has something to match.
    top = folder / "scale-L01.gbr"
    pads = [
        f"X{_coord(x + dx)}Y{_coord(y)}D03*" for _r, _v, _p, x, y in PARTS for dx in (-2.0, 2.0)
    ]
    text = top.read_text().replace("M02*\n", "D12*\n" + "\n".join(pads) + "\nM02*\n")
    top.write_text(text)


def bench_board(primitives: int) -> None:
    with tempfile.TemporaryDirectory(prefix="fluxshadow-scale-") as tmp:
        folder = Path(tmp) / "scale"
        t0 = time.perf_counter()
        write_scale_board(folder, primitives)
        t1, c1 = time.perf_counter(), time.process_time()
        mb = sum(f.stat().st_size for f in folder.iterdir()) / 1e6
        board = fluxshadow.load_package(folder)
        t2, c2 = time.perf_counter(), time.process_time()
        print(
            f"  (loaded in {t2 - t1:.1f} s, peak memory {peak_rss_mb():.0f} MB; checking...)",
            flush=True,
        )
        report = run_checks(board)
        t3, c3 = time.perf_counter(), time.process_time()
        n_obj = sum(a.record.n_objects for a in board.artworks)
        n_seg = sum(
            len(a.record.vertices) - (len(a.record.ring_vertex_start) - 1) for a in board.artworks
        )
    print(
        f"12-layer board: {n_obj:,} objects, {n_seg:,} track/region segments, flashes "
        f"and segments ~{primitives:,} ({mb:.0f} MB of Gerber, written in "
        f"{t1 - t0:.1f} s)\n"
        f"  load_package {t2 - t1:.1f} s (CPU {c2 - c1:.1f} s), check {t3 - t2:.1f} s "
        f"(CPU {c3 - c2:.1f} s) "
        f"({len(report.magnetics)} magnetics, {len(report.findings)} findings), "
        f"peak memory {peak_rss_mb():.0f} MB"
    )


def bench_batch(n_packages: int) -> None:
    with tempfile.TemporaryDirectory(prefix="fluxshadow-batch-") as tmp:
        root = Path(tmp)
        write_package(demo_board(), root / "src-demo")
        sources = [root / "src-demo", REPO / "fixtures" / "mini4"]
        paths: list[Path] = []
        for i in range(n_packages):
            src = sources[i % 2]
            if i % 5 == 4:  # every fifth package as a zip archive
                dest = root / f"pkg{i:02d}.zip"
                with zipfile.ZipFile(dest, "w", zipfile.ZIP_DEFLATED) as zf:
                    for f in sorted(src.iterdir()):
                        zf.write(f, f.name)
            else:
                dest = root / f"pkg{i:02d}"
                shutil.copytree(src, dest)
            paths.append(dest)
        t0 = time.perf_counter()
        serial = run_batch(paths[:10], jobs=1)
        t1 = time.perf_counter()
        par = run_batch(paths)
        t2 = time.perf_counter()
    assert serial.n_failed == 0
    assert par.n_failed == 0
    per_pkg = (t1 - t0) / 10
    print(
        f"batch of {len(paths)} packages (demo and mini4 copies, 1 in 5 zipped): "
        f"{t2 - t1:.1f} s on {par.jobs} worker processes "
        f"({len(paths) / (t2 - t1):.1f} packages/s); one process: {per_pkg:.2f} s per package"
    )


def main() -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--primitives", type=int, default=1_000_000)
    ap.add_argument("--packages", type=int, default=50)
    args = ap.parse_args()
    print(f"machine: {machine()}")
    bench_batch(args.packages)
    bench_board(args.primitives)
    return 0


if __name__ == "__main__":
    sys.exit(main())
