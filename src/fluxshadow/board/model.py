"""The layered board model: copper layers top to bottom, magnetics, frame fit, stack-up.

A :class:`Board` is what :func:`fluxshadow.load_package` returns. It holds the records read
from the files and an indexed :class:`~fluxshadow.board.copper.LayerArtwork` per copper
layer, and composes copper on demand for a window (never the whole board unless asked).
Everything is in the artwork (Gerber) frame, millimetres, Y up.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass, field
from typing import Literal

from shapely.geometry.base import BaseGeometry

from fluxshadow.board.copper import LayerArtwork
from fluxshadow.board.magnetics import Excluded, Magnetic
from fluxshadow.board.outline import BoardOutline
from fluxshadow.board.registration import FrameFit
from fluxshadow.board.stackup import Stackup
from fluxshadow.errors import InputError, Notice
from fluxshadow.io.config import Config
from fluxshadow.io.records import DrillRecord, PlacementRow

__all__ = ["Board", "FileUse", "Layer"]


@dataclass(frozen=True, kw_only=True)
class Layer:
    """One copper layer as identified.

    Attributes
    ----------
    name : str
        ``"L1"`` (top) to ``"Ln"`` (bottom).
    index : int
        Physical position, 1 = top.
    source : str
        The Gerber file (path relative to the package).
    identified_by : str
        The evidence that placed it: ``"x2-attribute"``, ``"x2-comment"``,
        ``"layer-comment"``, ``"physical-order-comment"``, ``"extension"``,
        ``"file-name"`` or ``"config"``.
    detail : str
        The evidence in words.
    side : {"top", "inner", "bottom"}
    polarity : {"positive", "negative"}
        ``"negative"``: the file images where copper is absent (a negative plane).
    polarity_from : str
        ``"x2-attribute"``, ``"x2-comment"``, ``"image-polarity"`` (``%IPNEG``),
        ``"extension"``, ``"config"``, ``"geometry"`` (detected) or ``"default"``.
    z_top_mm : float
        Depth of the layer's top surface below the board's top surface (mm).
    thickness_mm : float
        Copper thickness (mm).
    """

    name: str
    index: int
    source: str
    identified_by: str
    detail: str
    side: Literal["top", "inner", "bottom"]
    polarity: Literal["positive", "negative"]
    polarity_from: str
    z_top_mm: float
    thickness_mm: float


@dataclass(frozen=True, kw_only=True)
class FileUse:
    """What one file of the package was taken as (every file is listed)."""

    file: str
    kind: str
    use: str


@dataclass(kw_only=True)
class Board:
    """A fabrication package read into a layered model (artwork frame, mm).

    Attributes
    ----------
    package : str
        The folder or archive as given.
    route : str
        The input route read: ``"gerber"`` (Gerber/Excellon files and a placement
        table) or ``"odb"`` (an ODB++ job).
    route_detail : str
        Why that route was taken.
    layers : tuple of Layer
        Copper layers, top to bottom.
    magnetics : tuple of Magnetic
        Power magnetics, positions and outlines in the artwork frame.
    excluded : tuple of Excluded
        Magnetic-looking parts left out (ferrite beads, RF coils, unpopulated), with reasons.
    frame_fit : FrameFit
        Placement-to-artwork transform and its quality.
    stackup : Stackup
        Heights and materials (from the job file, the config or defaults).
    outline : BoardOutline or None
        Board shape and cut-outs, when a profile layer was found.
    drills : tuple of DrillRecord
    placement : tuple of PlacementRow
        Placement rows as read (placement frame).
    files : tuple of FileUse
        Every file of the package and what it was used for.
    notices : tuple of Notice
        Recoverable oddities met while reading.
    assumptions : tuple of str
        Values the tool had to assume, each with how to state it in the config.
    config : Config
        The configuration the board was read with (empty when none was found).
    """

    package: str
    layers: tuple[Layer, ...]
    magnetics: tuple[Magnetic, ...]
    excluded: tuple[Excluded, ...]
    frame_fit: FrameFit
    stackup: Stackup
    outline: BoardOutline | None
    drills: tuple[DrillRecord, ...]
    placement: tuple[PlacementRow, ...]
    files: tuple[FileUse, ...]
    notices: tuple[Notice, ...]
    assumptions: tuple[str, ...]
    artworks: tuple[LayerArtwork, ...] = field(repr=False)
    input_hashes: dict[str, str] = field(default_factory=dict, repr=False)
    config: Config = field(default_factory=Config, repr=False)
    route: str = "gerber"
    route_detail: str = ""

    def layer(self, layer: str | int | Layer) -> Layer:
        """The copper layer named ``"L<n>"``, with 1-based index ``n``, or by its file name.

        Raises
        ------
        InputError
            When no copper layer matches.
        """
        if isinstance(layer, Layer):
            return layer
        if isinstance(layer, int) and not isinstance(layer, bool):
            for lay in self.layers:
                if lay.index == layer:
                    return lay
        elif isinstance(layer, str):
            key = layer.strip()
            for lay in self.layers:
                if key.upper() == lay.name.upper() or key == lay.source:
                    return lay
            for lay in self.layers:
                if lay.source.rsplit("/", 1)[-1] == key:
                    return lay
        names = ", ".join(lay.name for lay in self.layers) or "none"
        msg = (
            f"layer must be a copper layer name (L1 = top), a 1-based index or a file name; "
            f"got {layer!r} (layers: {names})"
        )
        raise InputError(msg)

    def artwork(self, layer: str | int | Layer) -> LayerArtwork:
        """The indexed artwork of a copper layer."""
        return self.artworks[self.layer(layer).index - 1]

    def copper(
        self, layer: str | int | Layer, window: Sequence[float] | None = None
    ) -> BaseGeometry:
        """Copper of a layer, optionally only inside a window.

        Parameters
        ----------
        layer : str or int or Layer
            ``"L2"``, ``2`` (1-based, top = 1) or the layer's file name.
        window : sequence of 4 float, optional
            ``(xmin, ymin, xmax, ymax)`` in mm, artwork frame.

        Returns
        -------
        shapely.MultiPolygon
            Copper in mm (negative plane files already inverted).
        """
        return self.artwork(layer).compose(window)

    def split(
        self, layer: str | int | Layer, window: Sequence[float] | None = None
    ) -> tuple[BaseGeometry, BaseGeometry]:
        """Plane copper and trace copper of a layer in a window (mm)."""
        return self.artwork(layer).split(window)

    def magnetic(self, ref: str) -> Magnetic:
        """The magnetic with designator ``ref``."""
        for m in self.magnetics:
            if m.ref == ref:
                return m
        found = ", ".join(m.ref for m in self.magnetics) or "none"
        msg = f"part must be one of the magnetics found ({found}); got {ref!r}"
        raise InputError(msg)
