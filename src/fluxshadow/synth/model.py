"""Descriptions of synthetic boards (plain frozen data, millimetres, Y up).

A :class:`SynthBoard` says what copper, holes, parts and stack-up a fictional board has;
:mod:`fluxshadow.synth.writer` turns it into fabrication files. Because the description is
exact, tests know the copper area, voids and parts that the reader must recover.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Literal

__all__ = [
    "Aperture",
    "CopperLayer",
    "Flash",
    "Hole",
    "Part",
    "Region",
    "SynthBoard",
    "Track",
]

Point = tuple[float, float]


@dataclass(frozen=True)
class Aperture:
    """A standard aperture (``C``, ``R``, ``O``, ``P``) or the thermal macro ``THERMAL``.

    ``params`` are in mm as in the Gerber ``%AD`` statement: C (diameter[, hole]),
    R/O (x, y[, hole]), P (outer diameter, vertices[, rotation]), THERMAL (outer, inner, gap).
    """

    kind: Literal["C", "R", "O", "P", "THERMAL"]
    params: tuple[float, ...]
    function: str = ""


@dataclass(frozen=True)
class Flash:
    """An aperture flashed at ``(x, y)``."""

    x: float
    y: float
    aperture: Aperture
    dark: bool = True
    net: str = ""
    component: str = ""


@dataclass(frozen=True)
class Track:
    """A polyline drawn with a round aperture of ``width`` (mm)."""

    points: tuple[Point, ...]
    width: float
    dark: bool = True
    net: str = ""


@dataclass(frozen=True)
class Region:
    """A filled contour (closed automatically)."""

    ring: tuple[Point, ...]
    dark: bool = True
    net: str = ""


Feature = Flash | Track | Region


@dataclass(frozen=True)
class CopperLayer:
    """One copper layer's features in drawing order.

    When ``negative`` is set the features are the *clearances* of a plane layer and the
    file is written as a negative image; ``mark_negative`` decides whether the file says so
    (``%IPNEG`` and ``FilePolarity,Negative``) or leaves it for the reader to detect.
    """

    features: tuple[Feature, ...]
    negative: bool = False
    mark_negative: bool = True


@dataclass(frozen=True)
class Part:
    """A placed part with its pads (centre offsets and sizes in the part's frame, mm)."""

    ref: str
    value: str
    package: str
    x: float
    y: float
    rotation_deg: float
    side: Literal["top", "bottom"]
    pads: tuple[tuple[float, float, float, float], ...]
    description: str = ""


@dataclass(frozen=True)
class Hole:
    """A drilled hole (``slot_to`` set for a slot drawn from ``(x, y)`` to it)."""

    x: float
    y: float
    diameter: float
    plated: bool = True
    slot_to: Point | None = None


@dataclass(frozen=True)
class SynthBoard:
    """A fictional board, complete enough to write a fabrication package.

    ``dialect`` selects how the files are written:

    - ``"x2"``: ``%TF`` attributes, descriptive file names, a job file with the stack-up;
    - ``"x2-comments"``: the same attributes inside ``G04 #@!`` comments;
    - ``"bare"``: no attributes at all; layer identity only from three-letter extensions
      (``.gtl``, ``.g1`` ...) and a physical-order comment.

    ``placement_offset`` shifts the placement file's frame against the artwork
    (placement = artwork - offset; bottom X is written mirrored when
    ``mirror_bottom_x`` is set).

    ``config_text``, when not empty, is written as ``fluxshadow.toml`` into the package
    folder (TOML text, see :mod:`fluxshadow.io.config`).
    """

    name: str
    width_mm: float
    height_mm: float
    layers: tuple[CopperLayer, ...]
    parts: tuple[Part, ...] = ()
    holes: tuple[Hole, ...] = ()
    cutouts: tuple[tuple[Point, ...], ...] = ()
    copper_mm: tuple[float, ...] = ()
    dielectric_mm: tuple[float, ...] = ()
    epsilon_r: float = 4.3
    dialect: Literal["x2", "x2-comments", "bare"] = "x2"
    units: Literal["mm", "inch"] = "mm"
    placement_offset: Point = (0.0, 0.0)
    mirror_bottom_x: bool = False
    write_job: bool = True
    placement_style: Literal["csv", "text"] = "csv"
    extra_files: dict[str, str] = field(default_factory=dict)
    config_text: str = ""
