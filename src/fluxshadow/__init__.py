"""fluxshadow: what copper lies under every power magnetic of a PCB, from fabrication files.

The library's front door::

    import fluxshadow
    board = fluxshadow.load_package("package/")   # folder, .zip or .tgz
    board.layers                                   # copper layers, top to bottom
    board.copper("L2", window=(0, 0, 10, 10))      # shapely geometry, mm
    board.magnetics                                # power magnetics, artwork frame
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Any

__all__ = ["Board", "Layer", "__version__", "load_package"]

__version__ = "0.1.0"

if TYPE_CHECKING:
    from fluxshadow.board.load import load_package
    from fluxshadow.board.model import Board, Layer


def __getattr__(name: str) -> Any:
    # Imported on first use so that ``import fluxshadow`` stays cheap and cycle-free.
    if name == "load_package":
        from fluxshadow.board.load import load_package

        return load_package
    if name in ("Board", "Layer"):
        from fluxshadow.board import model

        return getattr(model, name)
    msg = f"module 'fluxshadow' has no attribute {name!r}"
    raise AttributeError(msg)
