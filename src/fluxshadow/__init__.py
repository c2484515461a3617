"""fluxshadow: what copper lies under every power magnetic of a PCB, from fabrication files."""

from __future__ import annotations

__all__ = ["__version__"]

__version__ = "0.1.0"
