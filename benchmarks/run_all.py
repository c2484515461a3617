"""Run every benchmark script in turn (``make bench``). Prints figures; not a test."""

from __future__ import annotations

import subprocess
import sys
from pathlib import Path

HERE = Path(__file__).resolve().parent


def main() -> int:
    for script in (
        "bench_read.py",
        "bench_odb.py",
        "bench_load.py",
        "bench_compose.py",
        "bench_sheet.py",
    ):
        print(f"== {script}", flush=True)
        subprocess.run([sys.executable, str(HERE / script)], check=False, cwd=HERE)
    return 0


if __name__ == "__main__":
    sys.exit(main())
