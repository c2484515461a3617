"""Read an unpacked ODB++ directory tree into the same plain records as the Gerber route.

An ODB++ job is a folder tree: ``matrix/matrix`` lists the steps and the layers (rows),
``steps/<step>/profile`` holds the board outline, ``steps/<step>/layers/<layer>/features``
the graphics of each layer, ``steps/<step>/layers/comp_+_top|comp_+_bot/components`` the
placed parts and ``symbols/<name>/features`` user-defined pad shapes. Matrix names are
upper case while folders are lower case; lines may end in CRLF.

What is read (ODB++ Format Specification, from memory: the chapters on the matrix file,
the features file, standard symbols and the components file):

- feature records ``P`` (pad), ``L`` (line), ``A`` (arc), ``S``...``SE`` (surface with
  ``OB``/``OS``/``OC``/``OE`` contours, ``I`` island, ``H`` hole); text ``T`` and barcode
  ``B`` records are skipped with a :class:`~fluxshadow.errors.Notice`;
- polarity ``P``/``N`` per feature, imaged in file order (a negative feature erases what
  was imaged before it);
- pad orientation codes ``0``-``7`` (quarter turns, ``4``-``7`` mirrored) and ``8``/``9``
  with an explicit angle (``9`` mirrored). ODB++ angles are clockwise; the mirror flips X
  and is applied before the rotation (from memory);
- units: a ``UNITS=MM`` / ``UNITS=INCH`` (or ``U MM`` / ``U INCH``) line per file; a file
  without one is inch. Standard symbol sizes are micrometres in mm files and mil in inch
  files; a ``$n name I|M`` symbol line overrides that for the symbol.

How records map to :class:`~fluxshadow.io.records.ArtworkRecord` objects:

- a pad is a FLASH with an :class:`~fluxshadow.io.records.ApertureRecord` built once per
  (symbol, orientation); round symbols set ``circle_diameter_mm``;
- a line or arc is a TRACK polyline (arcs linearised) drawn with the symbol's aperture;
- a surface is one REGION whose contours are filled on their own and united. Islands
  without holes are kept as written (keyhole outlines included). An island with ``H``
  hole contours is cut by vertical lines through its holes into hole-free pieces, which
  become the contours; this keeps the holes open without erasing copper drawn earlier
  by other features (which a clear object would do).

Any file may be stored as ``<name>.Z`` (Unix compress) or ``<name>.gz`` (gzip); the
decoded size counts against ``max_bytes``. A compressed copper features, matrix or profile
file that does not decode is an :class:`~fluxshadow.errors.InputError`; a components, EDA
data or user-symbol file that does not decode is left out with a Notice.

Nets come from ``steps/<step>/eda/data`` (``FID C`` records) when present; drill and rout
layers become :class:`~fluxshadow.io.records.DrillRecord` s.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from pathlib import Path
from typing import Literal

import numpy as np
import numpy.typing as npt

from fluxshadow.errors import InputError, Notice, ParseError
from fluxshadow.io._gerber_geom import arc_points
from fluxshadow.io._odb_drill import drill_record, span_of
from fluxshadow.io._odb_eda import EdaNets, parse_eda_nets
from fluxshadow.io._odb_features import MM_PER_INCH, FeatureReader, ParsedFeatures
from fluxshadow.io._odb_symbols import closed, standard_symbol
from fluxshadow.io._odb_text import (
    CompressedFileError,
    OdbLimits,
    blocks,
    find_file,
    parse_float,
    read_lines,
    units_of,
)
from fluxshadow.io.records import ArtworkRecord, DrillRecord, PlacementRow

__all__ = [
    "COPPER_TYPES",
    "MatrixRow",
    "OdbPackage",
    "parse_features",
    "read_odb",
    "standard_symbol",
]

FloatArray = npt.NDArray[np.float64]

COPPER_TYPES = ("SIGNAL", "POWER_GROUND", "MIXED")
"""Matrix layer types that hold copper (with ``CONTEXT=BOARD``)."""


@dataclass(frozen=True, kw_only=True)
class MatrixRow:
    """One ``LAYER`` block of ``matrix/matrix``.

    ``name`` is as written (upper case); the layer folder is ``name.lower()``.
    ``start_name``/``end_name`` are "" when absent.
    """

    name: str
    row: int
    context: str
    type: str
    polarity: str
    start_name: str = ""
    end_name: str = ""


@dataclass(frozen=True, kw_only=True)
class OdbPackage:
    """An ODB++ job read into plain records (all lengths mm, angles degrees CCW).

    Attributes
    ----------
    root : str
        The folder that was read.
    steps : tuple of str
        Step names from the matrix, in column order.
    step : str
        The board step that was read.
    step_reason : str
        Why that step was chosen.
    matrix : tuple of MatrixRow
        All layer rows, in row order.
    copper_names : tuple of str
        Matrix names of the copper layers (``CONTEXT=BOARD``, type in
        :data:`COPPER_TYPES`), in row order (top first).
    copper : tuple of ArtworkRecord
        One record per copper layer, same order; a ``NEGATIVE`` layer has
        ``negative_image=True``. ``obj_net``/``nets`` are filled from the EDA data
        (``-1`` for features on ``$NONE$`` or not listed); every object made from one
        feature carries that feature's net.
    profile_rings : tuple of ndarray (n, 2)
        Closed contours of the step profile in mm, islands first as written; holes follow
        their island.
    profile_ring : ndarray (n, 2)
        The first island of the profile (the board outline), closed, mm; ``(0, 2)`` when
        the profile is empty.
    placements : tuple of PlacementRow
        Components of both sides in the ODB frame (top file first).
    units_in_info : str
        ``UNITS`` of ``misc/info`` ("" when absent).
    notices : tuple of Notice
    drills : tuple of DrillRecord
        One record per ``CONTEXT=BOARD`` row of ``TYPE=DRILL`` or ``TYPE=ROUT`` (row
        order) whose features file exists; ``source`` is that file.
    drill_names : tuple of str
        Matrix names of those rows, same order.
    stack_thickness_mm : tuple of float or None
        Thicknesses in copper order with the dielectrics between (copper 1, dielectric,
        copper 2, ..., mm) when the package carries them. Neither shared real package
        does: matrix ``DIELECTRIC`` rows give only ``DIELECTRIC_TYPE`` (core/prepreg) and
        layer ``attrlist`` files are empty or hold unit-less CAM defaults (the same
        ``.copper_thickness`` on silk and mask layers, ``.layer_dielectric = 0``). No
        thickness is derived from those, so this is always ``None`` for now; the stack-up
        must come from the configuration or a job file.
    nets_from : str
        Where the nets came from: the EDA data file's path, or "" when there is none.
    """

    root: str
    steps: tuple[str, ...]
    step: str
    step_reason: str
    matrix: tuple[MatrixRow, ...]
    copper_names: tuple[str, ...]
    copper: tuple[ArtworkRecord, ...]
    profile_rings: tuple[FloatArray, ...]
    profile_ring: FloatArray
    placements: tuple[PlacementRow, ...]
    units_in_info: str = ""
    notices: tuple[Notice, ...] = field(default_factory=tuple)
    drills: tuple[DrillRecord, ...] = ()
    drill_names: tuple[str, ...] = ()
    stack_thickness_mm: tuple[float, ...] | None = None
    nets_from: str = ""


# --------------------------------------------------------------------------- records


def _artwork(
    parsed: ParsedFeatures | None,
    source: str,
    negative: bool,
    attributes: dict[str, str],
    notices: tuple[Notice, ...],
    eda: EdaNets | None = None,
    layer: str = "",
) -> ArtworkRecord:
    if parsed is None:
        parsed = ParsedFeatures(source=source, units="inch", size_bytes=0)
    n = len(parsed.kind)
    ring_list = [r for rings in parsed.rings for r in rings]
    counts = np.fromiter((len(r) for r in parsed.rings), dtype=np.int64, count=n)
    vcounts = np.fromiter((len(r) for r in ring_list), dtype=np.int64, count=len(ring_list))
    vertices = np.vstack(ring_list) if ring_list else np.zeros((0, 2), dtype=np.float64)
    minus = np.full(n, -1, dtype=np.int64)
    obj_net = minus.copy()
    nets: tuple[str, ...] = ()
    if eda is not None and n:
        obj_net = eda.feature_nets(layer, np.asarray(parsed.feature, dtype=np.int64))
        nets = eda.nets
    return ArtworkRecord(
        source=parsed.source,
        units_in_file=parsed.units,
        negative_image=negative,
        file_attributes=attributes,
        comments=(),
        apertures=tuple(parsed.apertures),
        obj_kind=np.array(parsed.kind, dtype=np.int8),
        obj_dark=np.array(parsed.dark, dtype=np.bool_),
        obj_aperture=np.array(parsed.aperture, dtype=np.int64),
        obj_xy=np.array(parsed.xy, dtype=np.float64).reshape(n, 2),
        obj_ring_start=np.concatenate([[0], np.cumsum(counts)]).astype(np.int64),
        ring_vertex_start=np.concatenate([[0], np.cumsum(vcounts)]).astype(np.int64),
        vertices=vertices.astype(np.float64, copy=False),
        obj_net=obj_net,
        obj_component=minus.copy(),
        obj_function=minus.copy(),
        nets=nets,
        components=(),
        functions=(),
        size_bytes=parsed.size_bytes,
        notices=notices,
    )


def parse_features(
    path: str | Path,
    *,
    root: str | Path | None = None,
    negative: bool = False,
    max_bytes: int = 200_000_000,
    max_objects: int = 20_000_000,
    max_vertices: int = 50_000_000,
) -> ArtworkRecord:
    """Read one ODB++ ``features`` file (or ``features.Z`` / ``.gz``) into an ArtworkRecord.

    Parameters
    ----------
    path : str or Path
        The features file (its plain name; a compressed variant is found).
    root : str or Path, optional
        Job root holding ``symbols/`` for user symbols; default four folders up from
        ``path`` (``<root>/steps/<step>/layers/<layer>/features``).
    negative : bool
        Layer polarity is NEGATIVE (sets ``negative_image``).
    max_bytes, max_objects, max_vertices : int
        As for :func:`read_odb`.

    Returns
    -------
    ArtworkRecord
        Coordinates in mm; no nets (those come from the job's EDA data).

    Raises
    ------
    InputError
        No such file, or a compressed file that does not decode.
    ParseError, LimitError, ConfigError
    """
    p = Path(path)
    if root is None:
        root = p.parents[4] if len(p.parents) > 4 else p.parent
    limits = OdbLimits(max_bytes=max_bytes, max_objects=max_objects, max_vertices=max_vertices)
    notices: list[Notice] = []
    reader = FeatureReader(Path(root), limits, notices)
    parsed = reader.features(p)
    if parsed is None:
        raise InputError("a features file must exist; got none", file=str(p))
    return _artwork(parsed, str(p), negative, {}, tuple(notices))


# --------------------------------------------------------------------------- job level


def _profile_contours(step_dir: Path, limits: OdbLimits, notices: list[Notice]) -> list[FloatArray]:
    """Profile contours as written (island first, holes after), closed, mm."""
    got = read_lines(step_dir / "profile", limits, notices)
    if got is None:
        return []
    lines, actual, _size = got
    src = str(actual)
    coord = 1.0 if units_of(lines) == "mm" else MM_PER_INCH
    rings: list[FloatArray] = []
    cur: list[FloatArray] = []
    for ln, raw in enumerate(lines, start=1):
        toks = raw.split(";", 1)[0].split()
        if not toks:
            continue
        try:
            if toks[0] == "OB":
                cur = [np.array([[float(toks[1]) * coord, float(toks[2]) * coord]])]
            elif toks[0] == "OS" and cur:
                cur.append(np.array([[float(toks[1]) * coord, float(toks[2]) * coord]]))
            elif toks[0] == "OC" and cur:
                xe, ye, xc, yc = (float(t) * coord for t in toks[1:5])
                x0, y0 = cur[-1][-1]
                full = math.hypot(xe - x0, ye - y0) < 1e-12
                cur.append(
                    arc_points(x0, y0, xe, ye, xc, yc, ccw=toks[5].upper() != "Y", full_circle=full)
                )
            elif toks[0] == "OE" and cur:
                rings.append(closed(np.vstack(cur)))
                cur = []
        except (ValueError, IndexError) as exc:
            raise ParseError(
                "a profile contour record must have numeric fields; got a malformed line",
                file=src,
                line=ln,
                statement=raw.strip(),
            ) from exc
    return rings


def _step_has_features(step_dir: Path) -> bool:
    layers = step_dir / "layers"
    if not layers.is_dir():
        return False
    return any(f.is_file() and f.stat().st_size > 0 for f in layers.glob("*/features*"))


def _components(
    path: Path,
    side: Literal["top", "bottom"],
    limits: OdbLimits,
    notices: list[Notice],
    no_units: list[str],
) -> list[PlacementRow]:
    try:
        got = read_lines(path, limits, notices)
    except CompressedFileError as exc:
        msg = f"{exc}; components of the {side} side left out"
        notices.append(Notice(file=str(exc.file or path), line=None, message=msg))
        return []
    if got is None:
        return []
    lines, actual, _size = got
    src = str(actual)
    units = units_of(lines)
    if units is None:
        no_units.append(src)
    coord = 1.0 if units == "mm" else MM_PER_INCH
    rows: list[dict[str, object]] = []
    short: list[int] = []
    attr_names: dict[str, str] = {}
    for ln, raw in enumerate(lines, start=1):
        stmt = raw.strip()
        if stmt.startswith("@"):
            num, _, attr = stmt[1:].partition(" ")
            attr_names[num.strip()] = attr.strip().lower()
        elif stmt.startswith("CMP "):
            head, _, attrs = stmt.partition(";")
            toks = head.split()
            if len(toks) < 7:
                short.append(ln)
                continue
            x, y = (parse_float(t, src, ln, stmt) * coord for t in toks[2:4])
            rot_cw = parse_float(toks[4], src, ln, stmt)
            rows.append(
                {
                    "ref": toks[6],
                    "package": toks[7] if len(toks) > 7 else "",
                    "x": x,
                    "y": y,
                    "rot": (-rot_cw) % 360.0,
                    "line": ln,
                    "value": "",
                    "description": "",
                    "no_pop": _flag_set(attrs, attr_names, ".no_pop"),
                }
            )
        elif stmt.startswith("PRP ") and rows:
            key, _, val = stmt[4:].partition(" ")
            val = val.strip()
            if len(val) >= 2 and val[0] == val[-1] == "'":
                val = val[1:-1]
            k = key.strip().lower()
            if k == "value" and val:
                rows[-1]["value"] = val
            elif k == "description" and val:
                rows[-1]["description"] = val
    if short:
        msg = (
            f"{len(short)} CMP record(s) with fewer than 7 fields skipped "
            f"(first at line {short[0]})"
        )
        notices.append(Notice(file=src, line=short[0], message=msg))
    return [
        PlacementRow(
            ref=str(r["ref"]),
            value=str(r["value"]),
            package=str(r["package"]),
            x_mm=float(r["x"]),  # type: ignore[arg-type]
            y_mm=float(r["y"]),  # type: ignore[arg-type]
            rotation_deg=float(r["rot"]),  # type: ignore[arg-type]
            side=side,
            source=src,
            line=int(r["line"]),  # type: ignore[call-overload]
            description=(
                f"not populated (ODB++ attribute .no_pop); {r['description']}"
                if r["no_pop"]
                else str(r["description"])
            ),
        )
        for r in rows
    ]


def _flag_set(attrs: str, names: dict[str, str], wanted: str) -> bool:
    """Whether a record's attribute list (``0=1,1``) sets the boolean attribute ``wanted``.

    Attributes are ``<n>`` (a boolean, set) or ``<n>=<value>`` with ``<n>`` the number of
    an ``@<n> <name>`` line (ODB++ Format Specification, from memory: feature and
    component attributes). A boolean written with a value counts when the value is not
    ``0``/``false``/``no``.
    """
    for item in attrs.split(";", 1)[0].split(","):
        num, eq, val = item.strip().partition("=")
        if names.get(num.strip()) != wanted:
            continue
        if not eq or val.strip().lower() not in ("0", "false", "no"):
            return True
    return False


def _eda_nets(
    step_dir: Path, limits: OdbLimits, notices: list[Notice]
) -> tuple[EdaNets | None, str]:
    path = step_dir / "eda" / "data"
    try:
        got = read_lines(path, limits, notices)
    except CompressedFileError as exc:
        msg = f"{exc}; nets left out (copper objects carry no net)"
        notices.append(Notice(file=str(exc.file or path), line=None, message=msg))
        return None, ""
    if got is None:
        return None, ""
    lines, actual, _size = got
    return parse_eda_nets(lines), str(actual)


def _find_root(base: Path) -> Path:
    if find_file(base / "matrix" / "matrix") is not None:
        return base
    inner = (
        [d for d in base.iterdir() if find_file(d / "matrix" / "matrix") is not None]
        if base.is_dir()
        else []
    )
    if len(inner) != 1:
        raise InputError("an ODB++ folder must contain matrix/matrix; got none", file=str(base))
    return inner[0]


def _matrix(
    base: Path, limits: OdbLimits, notices: list[Notice]
) -> tuple[tuple[str, ...], tuple[MatrixRow, ...]]:
    got = read_lines(base / "matrix" / "matrix", limits, notices)
    if got is None:  # pragma: no cover - _find_root checked it
        raise InputError("an ODB++ folder must contain matrix/matrix; got none", file=str(base))
    blks = blocks(got[0])

    def _int(v: str) -> int:
        try:
            return int(v)
        except ValueError:
            return 0

    steps = tuple(
        b.get("NAME", "")
        for _n, b in sorted(
            (x for x in blks if x[0] == "STEP"), key=lambda x: _int(x[1].get("COL", "0"))
        )
    )
    matrix = tuple(
        sorted(
            (
                MatrixRow(
                    name=b.get("NAME", ""),
                    row=_int(b.get("ROW", "0")),
                    context=b.get("CONTEXT", "").upper(),
                    type=b.get("TYPE", "").upper(),
                    polarity=b.get("POLARITY", "POSITIVE").upper(),
                    start_name=b.get("START_NAME", ""),
                    end_name=b.get("END_NAME", ""),
                )
                for n, b in blks
                if n == "LAYER"
            ),
            key=lambda r: r.row,
        )
    )
    return steps, matrix


def read_odb(
    root: str | Path,
    *,
    max_bytes: int = 200_000_000,
    max_objects: int = 20_000_000,
    max_vertices: int = 50_000_000,
) -> OdbPackage:
    """Read an unpacked ODB++ job folder.

    Parameters
    ----------
    root : str or Path
        The job folder (holding ``matrix/`` and ``steps/``), or a folder with exactly one
        such job folder inside.
    max_bytes : int
        Largest file read, after decompression (bytes), per file.
    max_objects : int
        Most objects one features file may produce.
    max_vertices : int
        Most vertices one features file may produce (arcs linearised).

    Returns
    -------
    OdbPackage

    Raises
    ------
    InputError
        No ``matrix/matrix`` file, no step with a non-empty profile and features, or a
        compressed matrix, profile or copper/drill features file that does not decode.
    ParseError
        A malformed record in a features, profile or components file.
    LimitError
        A file, or what it decompresses to, is larger than ``max_bytes``, or a features
        file makes more than ``max_objects`` objects or ``max_vertices`` vertices; the
        message names the file and the limit.
    ConfigError
        A limit below 1.
    """
    limits = OdbLimits(max_bytes=max_bytes, max_objects=max_objects, max_vertices=max_vertices)
    base = _find_root(Path(root))
    notices: list[Notice] = []
    steps, matrix = _matrix(base, limits, notices)
    units_in_info = ""
    info = read_lines(base / "misc" / "info", limits, notices)
    if info is not None:
        u = units_of(info[0])
        units_in_info = {"mm": "MM", "inch": "INCH", None: ""}[u]

    # Step choice: non-empty profile and at least one non-empty features file; among
    # several, prefer one without STEP-REPEAT (a panel repeats the board step).
    candidates: list[str] = []
    profiles: dict[str, list[FloatArray]] = {}
    for name in steps:
        sd = base / "steps" / name.lower()
        prof = _profile_contours(sd, limits, notices)
        if prof and _step_has_features(sd):
            candidates.append(name)
            profiles[name] = prof
    if not candidates:
        raise InputError(
            "an ODB++ job must have a step with a non-empty profile and features; got none "
            f"among {list(steps)}",
            file=str(base),
        )

    def _repeats(step: str) -> bool:
        hdr = base / "steps" / step.lower() / "stephdr"
        got = read_lines(hdr, limits, notices)
        return got is not None and any("STEP-REPEAT" in s.upper() for s in got[0])

    plain = [s for s in candidates if not _repeats(s)]
    if len(candidates) == 1:
        step = candidates[0]
        reason = f"only step with a non-empty profile and features (of {len(steps)})"
    elif plain:
        step = plain[0]
        reason = (
            f"first of {len(candidates)} steps with profile and features that has no "
            "STEP-REPEAT (not a panel)"
        )
    else:
        step = candidates[0]
        reason = f"first of {len(candidates)} steps with profile and features (all repeat)"
    if len(candidates) > 1:
        notices.append(Notice(file=str(base), line=None, message=f"step {step!r} chosen: {reason}"))
    step_dir = base / "steps" / step.lower()
    profile = profiles[step]

    eda, nets_from = _eda_nets(step_dir, limits, notices)
    reader = FeatureReader(base, limits, notices)
    copper_rows = [r for r in matrix if r.context == "BOARD" and r.type in COPPER_TYPES]
    copper: list[ArtworkRecord] = []
    for r in copper_rows:
        path = step_dir / "layers" / r.name.lower() / "features"
        attrs = {"OdbLayerName": r.name, "OdbLayerType": r.type}
        neg = r.polarity == "NEGATIVE"
        before = len(notices)
        parsed = reader.features(path)
        if parsed is None:
            notices.append(
                Notice(file=str(path), line=None, message="no features file; layer empty")
            )
        own = tuple(notices[before:])
        copper.append(_artwork(parsed, str(path), neg, attrs, own, eda, r.name))

    copper_names = tuple(r.name for r in copper_rows)
    drills: list[DrillRecord] = []
    drill_names: list[str] = []
    for r in matrix:
        if r.context != "BOARD" or r.type not in ("DRILL", "ROUT"):
            continue
        path = step_dir / "layers" / r.name.lower() / "features"
        parsed = reader.features(path, keep_attrs=True)
        if parsed is None:
            continue
        rec = drill_record(
            parsed,
            r.name,
            rout=r.type == "ROUT",
            span=span_of(r.start_name, r.end_name, copper_names),
        )
        notices.extend(rec.notices)
        drills.append(rec)
        drill_names.append(r.name)

    placements: list[PlacementRow] = []
    for folder, side in (("comp_+_top", "top"), ("comp_+_bot", "bottom")):
        cpath = step_dir / "layers" / folder / "components"
        placements += _components(cpath, side, limits, notices, reader.no_units)  # type: ignore[arg-type]
    if reader.no_units:
        notices.append(
            Notice(
                file=str(base),
                line=None,
                message=f"{len(reader.no_units)} file(s) have no UNITS line; read as inch "
                f"(first: {reader.no_units[0]})",
            )
        )
    island = profile[0] if profile else np.zeros((0, 2), dtype=np.float64)
    return OdbPackage(
        root=str(base),
        steps=steps,
        step=step,
        step_reason=reason,
        matrix=matrix,
        copper_names=copper_names,
        copper=tuple(copper),
        profile_rings=tuple(profile),
        profile_ring=island,
        placements=tuple(placements),
        units_in_info=units_in_info,
        notices=tuple(notices),
        drills=tuple(drills),
        drill_names=tuple(drill_names),
        stack_thickness_mm=None,
        nets_from=nets_from,
    )
