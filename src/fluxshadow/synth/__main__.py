"""Regenerate the bundled synthetic fixtures: ``python -m fluxshadow.synth [FOLDER]``.

Writes ``FOLDER/mini4`` (:func:`fluxshadow.synth.boards.mini4`) and ``FOLDER/demo``
(:func:`fluxshadow.synth.demo.demo_board`); ``FOLDER`` defaults to ``fixtures``.
"""

from __future__ import annotations

import sys
from collections.abc import Callable
from pathlib import Path

from fluxshadow.synth.boards import mini4
from fluxshadow.synth.demo import demo_board
from fluxshadow.synth.model import SynthBoard
from fluxshadow.synth.writer import write_package

__all__ = ["FIXTURES", "main"]

FIXTURES: dict[str, Callable[[], SynthBoard]] = {"mini4": mini4, "demo": demo_board}
"""Sub-folder name -> builder of each bundled fixture."""


def main(argv: list[str]) -> int:
    """Write every bundled fixture into ``FOLDER/<name>`` (default ``fixtures``).

    Parameters
    ----------
    argv : list of str
        Command-line arguments: an optional destination folder.

    Returns
    -------
    int
        Exit code 0.
    """
    root = Path(argv[0]) if argv else Path("fixtures")
    for name, build in FIXTURES.items():
        for path in write_package(build(), root / name):
            print(path)
    return 0


if __name__ == "__main__":
    raise SystemExit(main(sys.argv[1:]))
