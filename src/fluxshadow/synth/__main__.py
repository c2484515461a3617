"""Regenerate the bundled synthetic fixtures: ``python -m fluxshadow.synth [FOLDER]``."""

from __future__ import annotations

import sys
from pathlib import Path

from fluxshadow.synth.boards import mini4
from fluxshadow.synth.writer import write_package


def main(argv: list[str]) -> int:
    """Write the ``mini4`` package into ``FOLDER/mini4`` (default ``fixtures``)."""
    root = Path(argv[0]) if argv else Path("fixtures")
    for path in write_package(mini4(), root / "mini4"):
        print(path)
    return 0


if __name__ == "__main__":
    raise SystemExit(main(sys.argv[1:]))
