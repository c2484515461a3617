"""Plain records that leave ``io/``: frozen dataclasses of str, float, enums and numpy arrays.

Nothing here depends on shapely or on any reader's internal state. All lengths are
millimetres (Gerber's own unit after conversion), all angles degrees counter-clockwise,
coordinates in the file's own frame (Y up).

Copper artwork layout (:class:`ArtworkRecord`)
----------------------------------------------
A Gerber file becomes a flat table of *objects* in file order, after block apertures and
step-and-repeat have been expanded and every arc linearised:

- ``obj_kind[i]`` is :data:`FLASH`, :data:`TRACK` or :data:`REGION`.
- ``obj_dark[i]`` is ``True`` for dark (LPD) and ``False`` for clear (LPC) polarity,
  already combined with the polarity of any block aperture the object came from.
- ``obj_aperture[i]`` indexes :attr:`ArtworkRecord.apertures` (``-1`` for regions). Each
  aperture entry is already transformed (LM/LR/LS applied), so one Gerber D-code used
  under several transforms becomes several entries.
- ``obj_xy[i]`` is the flash position; for tracks and regions, the first vertex.
- ``obj_ring_start`` (length n+1) delimits each object's rings in the ring table; a flash
  has no ring, a track has exactly one (its polyline, >= 2 vertices, not closed), a region
  has one or more closed contours (first vertex repeated at the end), in the order written.
  Each contour is filled on its own (cut-in/keyhole contours included) and a region is the
  union of its filled contours, as the Gerber specification defines region objects.
- ``ring_vertex_start`` (length m+1) delimits each ring's vertices in ``vertices`` (v, 2).
- ``obj_net`` / ``obj_component`` / ``obj_function`` index the string tables ``nets``,
  ``components`` and ``functions`` (``-1`` when the attribute was not set). ``functions``
  holds ``.AperFunction`` values, e.g. ``"Conductor"`` or ``"SMDPad,CuDef"``.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from enum import Enum
from typing import Literal

import numpy as np
import numpy.typing as npt

from fluxshadow.errors import Notice

__all__ = [
    "FLASH",
    "REGION",
    "TRACK",
    "ApertureRecord",
    "ArtworkRecord",
    "BomRow",
    "DrillRecord",
    "FileKind",
    "JobRecord",
    "PackageFiles",
    "PlacementRow",
    "StackupLayer",
]

FloatArray = npt.NDArray[np.float64]
IntArray = npt.NDArray[np.int64]
BoolArray = npt.NDArray[np.bool_]

FLASH = 0
"""Object kind: an aperture flashed (D03) at ``obj_xy``."""
TRACK = 1
"""Object kind: a draw (D01, linear or arc) with an aperture, stored as a polyline."""
REGION = 2
"""Object kind: a G36/G37 region, stored as one or more closed contours."""


@dataclass(frozen=True, kw_only=True)
class ApertureRecord:
    """One aperture, in its final orientation, as dark and clear polygon parts.

    Attributes
    ----------
    code : int
        Gerber D-code it came from (``0`` for a synthetic aperture).
    template : str
        ``"C"``, ``"R"``, ``"O"``, ``"P"``, or the macro name.
    parts : tuple of (bool, ndarray (n, 2))
        ``(dark, ring)`` in drawing order, rings closed (first vertex repeated), in mm
        relative to the flash point. Clear parts erase earlier dark parts of the *same*
        aperture only (macro exposure off, standard-aperture holes).
    circle_diameter_mm : float or None
        Set for a plain circle without hole: tracks drawn with it are a buffer of the
        centre line by half this diameter (round caps), which the board model exploits.
    function : str
        The ``.AperFunction`` attribute in force when the aperture was defined ("" if none).
    """

    code: int
    template: str
    parts: tuple[tuple[bool, FloatArray], ...]
    circle_diameter_mm: float | None
    function: str = ""

    @property
    def extent_mm(self) -> float:
        """Largest distance of any part vertex from the aperture origin (mm)."""
        if self.circle_diameter_mm is not None:
            return 0.5 * self.circle_diameter_mm
        m = 0.0
        for _dark, ring in self.parts:
            if len(ring):
                m = max(m, float(np.max(np.hypot(ring[:, 0], ring[:, 1]))))
        return m


@dataclass(frozen=True, kw_only=True)
class ArtworkRecord:
    """One Gerber image (a copper layer or any other artwork) as flat primitive tables.

    See the module docstring for the layout. All coordinates in mm.

    Attributes
    ----------
    source : str
        Path of the file, as given to the reader.
    units_in_file : {"mm", "inch"}
        Unit the file was written in (coordinates here are always mm).
    negative_image : bool
        ``%IPNEG*%`` was set: the image is dark everywhere except where objects are dark.
    file_attributes : dict of str to str
        ``%TF`` attributes (real or inside ``G04 #@!`` comments), name without the leading
        dot, values joined by ``,`` as written (e.g. ``{"FileFunction": "Copper,L2,Inr"}``).
    comments : tuple of str
        Text of the first ``G04`` comments (at most a few hundred), for layer identification.
    """

    source: str
    units_in_file: Literal["mm", "inch"]
    negative_image: bool
    file_attributes: dict[str, str]
    comments: tuple[str, ...]
    apertures: tuple[ApertureRecord, ...]
    obj_kind: npt.NDArray[np.int8]
    obj_dark: BoolArray
    obj_aperture: IntArray
    obj_xy: FloatArray
    obj_ring_start: IntArray
    ring_vertex_start: IntArray
    vertices: FloatArray
    obj_net: IntArray
    obj_component: IntArray
    obj_function: IntArray
    nets: tuple[str, ...]
    components: tuple[str, ...]
    functions: tuple[str, ...]
    size_bytes: int = 0
    notices: tuple[Notice, ...] = ()

    @property
    def n_objects(self) -> int:
        """Number of objects (flashes, tracks and regions)."""
        return int(self.obj_kind.shape[0])


@dataclass(frozen=True, kw_only=True)
class DrillRecord:
    """Holes and slots of one Excellon file, in mm.

    Attributes
    ----------
    hole_xy : ndarray (n, 2)
        Hole centres.
    hole_diameter_mm : ndarray (n,)
    hole_plated : ndarray (n,) of bool
    slot_xy : ndarray (k, 2, 2)
        Start and end of straight slots (G85 and straight routed moves).
    slot_diameter_mm : ndarray (k,)
    slot_plated : ndarray (k,) of bool
    span : tuple of (int, int) or None
        First and last copper layer (1-based, top = 1) the holes connect, when the file
        says so (blind/buried); ``None`` for through holes or unknown.
    plating_from : str
        How plating was decided ("attribute", "comment", "file name", "tool table",
        "assumed plated").
    """

    source: str
    units_in_file: Literal["mm", "inch"]
    hole_xy: FloatArray
    hole_diameter_mm: FloatArray
    hole_plated: BoolArray
    slot_xy: FloatArray
    slot_diameter_mm: FloatArray
    slot_plated: BoolArray
    span: tuple[int, int] | None
    plating_from: str
    tool_count: int
    notices: tuple[Notice, ...] = ()


@dataclass(frozen=True, kw_only=True)
class PlacementRow:
    """One placed part, in the placement file's frame (mm, degrees CCW, Y up).

    ``value`` and ``package`` are "" when the file has none (a BOM may fill them).
    """

    ref: str
    value: str
    package: str
    x_mm: float
    y_mm: float
    rotation_deg: float
    side: Literal["top", "bottom"]
    source: str
    line: int
    description: str = ""


@dataclass(frozen=True, kw_only=True)
class BomRow:
    """One BOM line for one designator (a multi-designator line is split)."""

    ref: str
    value: str
    package: str
    description: str
    source: str
    line: int


@dataclass(frozen=True, kw_only=True)
class StackupLayer:
    """One layer of the board build, top to bottom.

    ``kind`` is ``"copper"``, ``"dielectric"``, ``"soldermask"`` or ``"other"``;
    ``name`` for copper layers is the copper layer name as identified (e.g. ``"L2"``
    or the file it belongs to, when the job file names it).
    """

    name: str
    kind: Literal["copper", "dielectric", "soldermask", "other"]
    thickness_mm: float
    material: str = ""
    epsilon_r: float | None = None
    source_file: str = ""


@dataclass(frozen=True, kw_only=True)
class JobRecord:
    """What a Gerber job file (``.gbrjob``) says about the board."""

    source: str
    stackup: tuple[StackupLayer, ...]
    board_thickness_mm: float | None
    layer_files: dict[str, str]
    """File path -> FileFunction, as listed under ``FilesAttributes``."""


class FileKind(Enum):
    """What a file in a package is, decided from its content."""

    GERBER = "gerber"
    EXCELLON = "excellon"
    PLACEMENT = "placement"
    BOM = "bom"
    JOB = "job"
    CONFIG = "config"
    OTHER = "other"


@dataclass(frozen=True, kw_only=True)
class PackageFiles:
    """The files of one package, classified by content.

    ``root`` is the folder all paths are relative to (a temporary folder for archives);
    ``display_root`` is what the user named.
    """

    root: str
    display_root: str
    files: dict[str, FileKind]
    unclassified: tuple[str, ...] = ()
    notices: tuple[Notice, ...] = field(default_factory=tuple)
