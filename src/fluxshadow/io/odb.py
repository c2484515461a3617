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

Compressed ``.Z`` files are reported with a Notice and not read.
"""

from __future__ import annotations

import itertools
import math
import re
from dataclasses import dataclass, field
from pathlib import Path
from typing import Literal

import numpy as np
import numpy.typing as npt
import shapely
from shapely.geometry import LineString, MultiLineString, Polygon
from shapely.geometry.base import BaseGeometry
from shapely.ops import split

from fluxshadow.errors import InputError, Notice, ParseError
from fluxshadow.io._gerber_geom import (
    Transform,
    arc_points,
    arc_segments,
    circle_ring,
    obround_ring,
    rect_ring,
)
from fluxshadow.io.records import FLASH, REGION, TRACK, ApertureRecord, ArtworkRecord, PlacementRow

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

_MM_PER_INCH = 25.4
_MM_PER_MIL = 0.0254
_MM_PER_UM = 0.001
_FULL_TURN = 2.0 * math.pi


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
        ``negative_image=True``.
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


# --------------------------------------------------------------------------- text helpers


def _read_lines(path: Path, notices: list[Notice]) -> list[str]:
    try:
        data = path.read_bytes()
    except OSError as exc:
        raise InputError(f"file must be readable; got {exc.strerror}", file=str(path)) from exc
    try:
        text = data.decode("utf-8")
    except UnicodeDecodeError:
        text = data.decode("latin-1")
        notices.append(Notice(file=str(path), line=None, message="not UTF-8; read as Latin-1"))
    return text.splitlines()


def _units_of(lines: list[str]) -> Literal["mm", "inch"] | None:
    for raw in lines[:50]:
        s = raw.strip().upper()
        if s.startswith("UNITS="):
            return "mm" if s[6:].strip() == "MM" else "inch"
        if s.startswith("U "):
            return "mm" if s[2:].strip() == "MM" else "inch"
    return None


def _float(tok: str, path: str, line: int, stmt: str) -> float:
    try:
        v = float(tok)
    except ValueError:
        v = math.nan
    if not math.isfinite(v):
        raise ParseError(
            f"a coordinate must be a finite number; got {tok!r}",
            file=path,
            line=line,
            statement=stmt,
        )
    return v


def _need(toks: list[str], n: int, what: str, path: str, line: int, stmt: str) -> None:
    if len(toks) < n:
        raise ParseError(
            f"a {what} record must have at least {n} fields; got {len(toks)}",
            file=path,
            line=line,
            statement=stmt,
        )


def _blocks(lines: list[str]) -> list[tuple[str, dict[str, str]]]:
    """Parse ``NAME { KEY=VALUE ... }`` blocks (matrix, stephdr)."""
    out: list[tuple[str, dict[str, str]]] = []
    cur: dict[str, str] | None = None
    name = ""
    for raw in lines:
        s = raw.strip()
        if s.endswith("{"):
            name = s[:-1].strip().upper()
            cur = {}
        elif s == "}":
            if cur is not None:
                out.append((name, cur))
            cur = None
        elif cur is not None and "=" in s:
            k, _, v = s.partition("=")
            cur[k.strip().upper()] = v.strip()
    return out


# --------------------------------------------------------------------------- symbols


def _rounded_rect(w: float, h: float, r: float, corners: str) -> FloatArray:
    """Closed CCW rectangle centred on the origin with corners ``corners`` rounded by r.

    Corner numbers (from memory): 1 top right, 2 top left, 3 bottom left, 4 bottom right.
    """
    hw, hh = 0.5 * w, 0.5 * h
    r = min(max(r, 0.0), hw, hh)
    pts: list[FloatArray] = []
    for k, (sx, sy, a0) in enumerate(
        ((1.0, 1.0, 0.0), (-1.0, 1.0, 90.0), (-1.0, -1.0, 180.0), (1.0, -1.0, 270.0)), start=1
    ):
        if r > 0.0 and str(k) in corners:
            n = max(arc_segments(r, 0.5 * math.pi), 2)
            ang = np.radians(a0 + 90.0 * np.arange(n + 1) / n)
            cx, cy = sx * (hw - r), sy * (hh - r)
            pts.append(np.column_stack([cx + r * np.cos(ang), cy + r * np.sin(ang)]))
        else:
            pts.append(np.array([[sx * hw, sy * hh]], dtype=np.float64))
    ring = np.vstack(pts)
    return np.vstack([ring, ring[:1]])


_NUM = r"(\d+(?:\.\d*)?|\.\d+)"
_RE_R = re.compile(rf"r{_NUM}")
_RE_S = re.compile(rf"s{_NUM}")
_RE_RECT = re.compile(rf"rect{_NUM}x{_NUM}(?:x([rc]){_NUM}(?:x?(\d+))?)?")
_RE_OVAL = re.compile(rf"oval{_NUM}x{_NUM}")
_RE_DONUT_R = re.compile(rf"donut_r{_NUM}x{_NUM}")
_RE_DONUT_S = re.compile(rf"donut_s{_NUM}x{_NUM}")
_RE_DONUT_RC = re.compile(rf"donut_rc{_NUM}x{_NUM}x{_NUM}(?:xr{_NUM}(?:x?(\d+))?)?")


def _chamfer_rect(w: float, h: float, c: float, corners: str) -> FloatArray:
    hw, hh = 0.5 * w, 0.5 * h
    c = min(max(c, 0.0), hw, hh)
    pts: list[tuple[float, float]] = []
    for k, (sx, sy) in enumerate(((1.0, 1.0), (-1.0, 1.0), (-1.0, -1.0), (1.0, -1.0)), start=1):
        if c > 0.0 and str(k) in corners:
            # CCW walk: arriving along the vertical (k odd) or horizontal edge.
            first = (sx * hw, sy * (hh - c)) if sx * sy > 0 else (sx * (hw - c), sy * hh)
            second = (sx * (hw - c), sy * hh) if sx * sy > 0 else (sx * hw, sy * (hh - c))
            pts += [first, second]
        else:
            pts.append((sx * hw, sy * hh))
    pts.append(pts[0])
    return np.array(pts, dtype=np.float64)


def standard_symbol(
    name: str, scale: float
) -> tuple[str, list[tuple[bool, FloatArray]], float | None] | None:
    """Shape of a standard ODB++ symbol, or None when the name is not one we draw.

    Parameters
    ----------
    name : str
        Symbol name, e.g. ``"r254"``, ``"rect1500x1600xr375"``.
    scale : float
        mm per size unit (0.001 for um, 0.0254 for mil).

    Returns
    -------
    (template, parts, circle_diameter_mm) or None
        Parts are closed rings (mm) around the origin, ``(dark, ring)``.
    """
    if m := _RE_R.fullmatch(name):
        d = float(m[1]) * scale
        return "C", [(True, circle_ring(0.0, 0.0, 0.5 * d))], d
    if m := _RE_S.fullmatch(name):
        s = float(m[1]) * scale
        return "R", [(True, rect_ring(0.0, 0.0, s, s))], None
    if m := _RE_RECT.fullmatch(name):
        w, h = float(m[1]) * scale, float(m[2]) * scale
        if m[3] is None:
            return "R", [(True, rect_ring(0.0, 0.0, w, h))], None
        corners = m[5] or "1234"
        rr = float(m[4]) * scale
        ring = _rounded_rect(w, h, rr, corners) if m[3] == "r" else _chamfer_rect(w, h, rr, corners)
        return "P", [(True, ring)], None
    if m := _RE_OVAL.fullmatch(name):
        w, h = float(m[1]) * scale, float(m[2]) * scale
        return "O", [(True, obround_ring(w, h))], None
    if m := _RE_DONUT_R.fullmatch(name):
        od, idia = float(m[1]) * scale, float(m[2]) * scale
        parts = [(True, circle_ring(0.0, 0.0, 0.5 * od))]
        if idia > 0.0:
            parts.append((False, circle_ring(0.0, 0.0, 0.5 * idia)))
        return "donut_r", parts, None
    if m := _RE_DONUT_S.fullmatch(name):
        od, idia = float(m[1]) * scale, float(m[2]) * scale
        parts = [(True, rect_ring(0.0, 0.0, od, od))]
        if idia > 0.0:
            parts.append((False, rect_ring(0.0, 0.0, idia, idia)))
        return "donut_s", parts, None
    if m := _RE_DONUT_RC.fullmatch(name):
        w, h, lw = float(m[1]) * scale, float(m[2]) * scale, float(m[3]) * scale
        rr = float(m[4]) * scale if m[4] else 0.0
        corners = m[5] or "1234"
        parts = [(True, _rounded_rect(w, h, rr, corners))]
        if w > 2 * lw and h > 2 * lw:
            parts.append((False, _rounded_rect(w - 2 * lw, h - 2 * lw, rr - lw, corners)))
        return "donut_rc", parts, None
    return None


# --------------------------------------------------------------------------- features


@dataclass
class _Obj:
    kind: int
    dark: bool
    xy: tuple[float, float]
    aperture: int = -1
    rings: list[FloatArray] = field(default_factory=list)


class _Reader:
    """Shared state of one job: user-symbol cache and notices."""

    def __init__(self, root: Path) -> None:
        self.root = root
        self.notices: list[Notice] = []
        self.user_symbols: dict[str, list[tuple[bool, FloatArray]] | None] = {}
        self.no_units: list[str] = []
        self._depth = 0

    def note(self, file: str, line: int | None, message: str) -> None:
        self.notices.append(Notice(file=file, line=line, message=message))

    # -- user symbols -------------------------------------------------------------

    def user_symbol(self, name: str) -> list[tuple[bool, FloatArray]] | None:
        """Parts (mm, untransformed) of ``symbols/<name>/features``, read once."""
        if name in self.user_symbols:
            return self.user_symbols[name]
        folder = self.root / "symbols" / name.lower()
        if not folder.is_dir() and (self.root / "symbols" / name).is_dir():
            folder = self.root / "symbols" / name
        path = folder / "features"
        if not path.is_file():
            if (folder / "features.Z").is_file():
                self.note(str(folder / "features.Z"), None, "compressed symbol not read")
            self.user_symbols[name] = None
            return None
        if self._depth > 8:
            self.note(str(path), None, "symbols nested deeper than 8 levels; not drawn")
            self.user_symbols[name] = None
            return None
        self.user_symbols[name] = None  # guards self-reference
        self._depth += 1
        try:
            apertures, objs, _units = self.features(path)
        finally:
            self._depth -= 1
        parts: list[tuple[bool, FloatArray]] = []
        for o in objs:
            if o.kind == FLASH:
                ap = apertures[o.aperture]
                for dk, ring in ap.parts:
                    if dk:
                        parts.append((o.dark, ring + np.asarray(o.xy)))
            elif o.kind == TRACK:
                ap = apertures[o.aperture]
                line = o.rings[0]
                if ap.circle_diameter_mm is not None:
                    geom: BaseGeometry = LineString(line).buffer(0.5 * ap.circle_diameter_mm)
                else:
                    hull = np.vstack([r for dk, r in ap.parts if dk])
                    segs = [
                        shapely.convex_hull(shapely.multipoints(np.vstack([hull + a, hull + b])))
                        for a, b in itertools.pairwise(line)
                    ]
                    geom = shapely.union_all(segs)
                for poly in _polygons(geom):
                    parts += [(o.dark, r) for r in _hole_free_rings(poly)]
            else:
                parts += [(o.dark, r) for r in o.rings]
        self.user_symbols[name] = parts
        return parts

    # -- features files -----------------------------------------------------------

    def features(
        self, path: Path
    ) -> tuple[list[ApertureRecord], list[_Obj], Literal["mm", "inch"]]:
        """Parse one features file into apertures and objects (mm)."""
        src = str(path)
        lines = _read_lines(path, self.notices)
        units = _units_of(lines)
        if units is None:
            self.no_units.append(src)
            units = "inch"
        coord = 1.0 if units == "mm" else _MM_PER_INCH
        size_default = _MM_PER_UM if units == "mm" else _MM_PER_MIL
        symbols: dict[int, tuple[str, float]] = {}
        apertures: list[ApertureRecord] = []
        ap_index: dict[tuple[int, bool, float], int] = {}
        skipped: dict[str, int] = {}
        objs: list[_Obj] = []

        def aperture(sym: int, mirror: bool, cw_deg: float, ln: int, stmt: str) -> int | None:
            key = (sym, mirror, round(cw_deg % 360.0, 9))
            if key in ap_index:
                return ap_index[key]
            if sym not in symbols:
                raise ParseError(
                    f"symbol number must be defined by a $ line; got {sym}",
                    file=src,
                    line=ln,
                    statement=stmt,
                )
            name, scale = symbols[sym]
            std = standard_symbol(name, scale)
            if std is not None:
                template, parts, circle = std
            else:
                user = self.user_symbol(name)
                if user is None:
                    skipped[name] = skipped.get(name, 0) + 1
                    return None
                template, parts, circle = name, user, None
            t = Transform(mirror, (-cw_deg) % 360.0, 1.0)
            if not t.is_identity:
                parts = [(dk, t.apply(r)) for dk, r in parts]
            ap_index[key] = len(apertures)
            apertures.append(
                ApertureRecord(
                    code=sym, template=template, parts=tuple(parts), circle_diameter_mm=circle
                )
            )
            return ap_index[key]

        surf: _Obj | None = None
        contours: list[tuple[bool, list[FloatArray]]] = []  # (is_island, vertex chunks)
        for ln, raw in enumerate(lines, start=1):
            stmt = raw.split(";", 1)[0].strip()
            if not stmt or stmt.startswith("#"):
                continue
            toks = stmt.split()
            head = toks[0]
            if surf is not None:
                if head == "OB":
                    _need(toks, 4, "OB", src, ln, stmt)
                    p = [_float(t, src, ln, stmt) * coord for t in toks[1:3]]
                    contours.append((toks[3].upper() != "H", [np.array([p])]))
                elif head == "OS" and contours:
                    _need(toks, 3, "OS", src, ln, stmt)
                    p = [_float(t, src, ln, stmt) * coord for t in toks[1:3]]
                    contours[-1][1].append(np.array([p]))
                elif head == "OC" and contours:
                    _need(toks, 6, "OC", src, ln, stmt)
                    xe, ye, xc, yc = (_float(t, src, ln, stmt) * coord for t in toks[1:5])
                    x0, y0 = contours[-1][1][-1][-1]
                    ccw = toks[5].upper() != "Y"
                    full = math.hypot(xe - x0, ye - y0) < 1e-12
                    pts = arc_points(x0, y0, xe, ye, xc, yc, ccw=ccw, full_circle=full)
                    contours[-1][1].append(pts)
                elif head == "OE":
                    pass
                elif head == "SE":
                    surf.rings = _surface_rings(contours)
                    if surf.rings:
                        surf.xy = (float(surf.rings[0][0, 0]), float(surf.rings[0][0, 1]))
                        objs.append(surf)
                    surf = None
                    contours = []
                else:
                    raise ParseError(
                        "a surface record must be OB, OS, OC, OE or SE; got " + repr(head),
                        file=src,
                        line=ln,
                        statement=stmt,
                    )
                continue
            if head.startswith("$") and len(toks) >= 2:
                try:
                    num = int(head[1:])
                except ValueError:
                    continue
                scale = size_default
                if len(toks) >= 3 and toks[2].upper() in ("I", "M"):
                    scale = _MM_PER_MIL if toks[2].upper() == "I" else _MM_PER_UM
                symbols[num] = (toks[1], scale)
            elif head.startswith(("@", "&")) or "=" in head:
                continue
            elif head == "P":
                _need(toks, 7, "pad", src, ln, stmt)
                x, y = (_float(t, src, ln, stmt) * coord for t in toks[1:3])
                i = 3
                if toks[i] == "-1":
                    self.note(src, ln, "resized pad (apt_def -1) not supported; skipped")
                    continue
                sym = int(_float(toks[i], src, ln, stmt))
                dark = toks[i + 1].upper() != "N"
                orient = int(_float(toks[i + 3], src, ln, stmt))
                if orient in (8, 9):
                    _need(toks, 8, "pad with orientation 8/9", src, ln, stmt)
                    cw = _float(toks[i + 4], src, ln, stmt)
                    mirror = orient == 9
                elif 0 <= orient <= 7:
                    cw = 90.0 * (orient % 4)
                    mirror = orient >= 4
                else:
                    raise ParseError(
                        f"pad orientation must be 0 to 9; got {orient}",
                        file=src,
                        line=ln,
                        statement=stmt,
                    )
                ap = aperture(sym, mirror, cw, ln, stmt)
                if ap is not None:
                    objs.append(_Obj(FLASH, dark, (x, y), ap))
            elif head == "L":
                _need(toks, 7, "line", src, ln, stmt)
                x0, y0, x1, y1 = (_float(t, src, ln, stmt) * coord for t in toks[1:5])
                sym = int(_float(toks[5], src, ln, stmt))
                ap = aperture(sym, False, 0.0, ln, stmt)
                if ap is not None:
                    line = np.array([[x0, y0], [x1, y1]], dtype=np.float64)
                    objs.append(_Obj(TRACK, toks[6].upper() != "N", (x0, y0), ap, [line]))
            elif head == "A":
                _need(toks, 11, "arc", src, ln, stmt)
                x0, y0, x1, y1, xc, yc = (_float(t, src, ln, stmt) * coord for t in toks[1:7])
                sym = int(_float(toks[7], src, ln, stmt))
                ccw = toks[10].upper() != "Y"
                full = math.hypot(x1 - x0, y1 - y0) < 1e-12
                pts = arc_points(x0, y0, x1, y1, xc, yc, ccw=ccw, full_circle=full)
                ap = aperture(sym, False, 0.0, ln, stmt)
                if ap is not None:
                    line = np.vstack([[[x0, y0]], pts])
                    objs.append(_Obj(TRACK, toks[8].upper() != "N", (x0, y0), ap, [line]))
            elif head == "S":
                _need(toks, 2, "surface", src, ln, stmt)
                surf = _Obj(REGION, toks[1].upper() != "N", (0.0, 0.0))
                contours = []
            elif head in ("T", "B"):
                what = "text" if head == "T" else "barcode"
                skipped[f"<{what} record>"] = skipped.get(f"<{what} record>", 0) + 1
            elif head == "F":
                continue
            else:
                self.note(src, ln, f"unknown record {head!r} skipped")
        if surf is not None:
            raise ParseError(
                "a surface must end with SE; got the end of the file", file=src, line=len(lines)
            )
        for name, count in skipped.items():
            self.note(src, None, f"{count} feature(s) with {name!r} not drawn (not supported)")
        return apertures, objs, units


def _polygons(geom: BaseGeometry) -> list[Polygon]:
    return [g for g in shapely.get_parts(geom) if isinstance(g, Polygon) and not g.is_empty]


def _closed(ring: FloatArray) -> FloatArray:
    if len(ring) and not np.array_equal(ring[0], ring[-1]):
        return np.vstack([ring, ring[:1]])
    return ring


def _hole_free_rings(poly: Polygon) -> list[FloatArray]:
    """Closed rings of hole-free pieces whose union is ``poly`` (mm)."""
    if not poly.interiors:
        return [np.asarray(poly.exterior.coords, dtype=np.float64)]
    ymin, ymax = poly.bounds[1] - 1.0, poly.bounds[3] + 1.0
    xs = sorted({0.5 * (h.bounds[0] + h.bounds[2]) for h in poly.interiors})
    cutter = MultiLineString([[(x, ymin), (x, ymax)] for x in xs])
    out: list[FloatArray] = []
    for piece in _polygons(split(poly, cutter)):
        if piece.interiors:  # cannot happen for a valid polygon; triangulate to be safe
            for tri in _polygons(shapely.constrained_delaunay_triangles(piece)):
                out.append(np.asarray(tri.exterior.coords, dtype=np.float64))
        else:
            out.append(np.asarray(piece.exterior.coords, dtype=np.float64))
    return out


def _surface_rings(contours: list[tuple[bool, list[FloatArray]]]) -> list[FloatArray]:
    """Contours of one surface record as rings that are filled on their own and united."""
    rings: list[FloatArray] = []
    k = 0
    while k < len(contours):
        island = _closed(np.vstack(contours[k][1]))
        k += 1
        holes: list[FloatArray] = []
        while k < len(contours) and not contours[k][0]:
            holes.append(_closed(np.vstack(contours[k][1])))
            k += 1
        if len(island) < 4:
            continue
        if not holes:
            rings.append(island)
            continue
        poly = shapely.make_valid(Polygon(island, [h for h in holes if len(h) >= 4]))
        for p in _polygons(poly):
            rings += _hole_free_rings(p)
    return rings


def _artwork(
    source: str,
    units: Literal["mm", "inch"],
    negative: bool,
    apertures: list[ApertureRecord],
    objs: list[_Obj],
    attributes: dict[str, str],
    size_bytes: int,
    notices: tuple[Notice, ...],
) -> ArtworkRecord:
    n = len(objs)
    ring_list = [r for o in objs for r in o.rings]
    counts = np.array([len(o.rings) for o in objs], dtype=np.int64)
    vcounts = np.array([len(r) for r in ring_list], dtype=np.int64)
    vertices = np.vstack(ring_list) if ring_list else np.zeros((0, 2), dtype=np.float64)
    minus = np.full(n, -1, dtype=np.int64)
    return ArtworkRecord(
        source=source,
        units_in_file=units,
        negative_image=negative,
        file_attributes=attributes,
        comments=(),
        apertures=tuple(apertures),
        obj_kind=np.array([o.kind for o in objs], dtype=np.int8),
        obj_dark=np.array([o.dark for o in objs], dtype=np.bool_),
        obj_aperture=np.array([o.aperture for o in objs], dtype=np.int64),
        obj_xy=np.array([o.xy for o in objs], dtype=np.float64).reshape(n, 2),
        obj_ring_start=np.concatenate([[0], np.cumsum(counts)]).astype(np.int64),
        ring_vertex_start=np.concatenate([[0], np.cumsum(vcounts)]).astype(np.int64),
        vertices=vertices.astype(np.float64),
        obj_net=minus,
        obj_component=minus.copy(),
        obj_function=minus.copy(),
        nets=(),
        components=(),
        functions=(),
        size_bytes=size_bytes,
        notices=notices,
    )


def parse_features(
    path: str | Path, *, root: str | Path | None = None, negative: bool = False
) -> ArtworkRecord:
    """Read one ODB++ ``features`` file into an :class:`ArtworkRecord` (mm).

    Parameters
    ----------
    path : str or Path
        The features file.
    root : str or Path, optional
        Job root holding ``symbols/`` for user symbols; default four folders up from
        ``path`` (``<root>/steps/<step>/layers/<layer>/features``).
    negative : bool
        Layer polarity is NEGATIVE (sets ``negative_image``).

    Returns
    -------
    ArtworkRecord
    """
    p = Path(path)
    if root is None:
        root = p.parents[4] if len(p.parents) > 4 else p.parent
    reader = _Reader(Path(root))
    return _layer_record(reader, p, negative, {})


def _layer_record(
    reader: _Reader, path: Path, negative: bool, attributes: dict[str, str]
) -> ArtworkRecord:
    before = len(reader.notices)
    apertures, objs, units = reader.features(path)
    own = tuple(reader.notices[before:])
    return _artwork(
        str(path), units, negative, apertures, objs, attributes, path.stat().st_size, own
    )


# --------------------------------------------------------------------------- job level


def _profile_contours(reader: _Reader, step_dir: Path) -> list[FloatArray]:
    """Profile contours as written (island first, holes after), closed, mm."""
    path = step_dir / "profile"
    if not path.is_file() or path.stat().st_size == 0:
        return []
    lines = _read_lines(path, reader.notices)
    coord = 1.0 if _units_of(lines) == "mm" else _MM_PER_INCH
    rings: list[FloatArray] = []
    cur: list[FloatArray] = []
    for raw in lines:
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
                rings.append(_closed(np.vstack(cur)))
                cur = []
        except (ValueError, IndexError) as exc:
            raise ParseError(
                "a profile contour record must have numeric fields; got a malformed line",
                file=str(path),
                statement=raw.strip(),
            ) from exc
    return rings


def _step_has_features(step_dir: Path) -> bool:
    layers = step_dir / "layers"
    if not layers.is_dir():
        return False
    return any(f.is_file() and f.stat().st_size > 0 for f in layers.glob("*/features*"))


def _components(reader: _Reader, path: Path, side: Literal["top", "bottom"]) -> list[PlacementRow]:
    src = str(path)
    lines = _read_lines(path, reader.notices)
    units = _units_of(lines)
    if units is None:
        reader.no_units.append(src)
    coord = 1.0 if units == "mm" else _MM_PER_INCH
    rows: list[dict[str, object]] = []
    for ln, raw in enumerate(lines, start=1):
        stmt = raw.strip()
        if stmt.startswith("CMP "):
            toks = stmt.split(";", 1)[0].split()
            _need(toks, 7, "CMP", src, ln, stmt)
            x, y = (_float(t, src, ln, stmt) * coord for t in toks[2:4])
            rot_cw = _float(toks[4], src, ln, stmt)
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
            description=str(r["description"]),
        )
        for r in rows
    ]


def read_odb(root: str | Path) -> OdbPackage:
    """Read an unpacked ODB++ job folder.

    Parameters
    ----------
    root : str or Path
        The job folder (holding ``matrix/`` and ``steps/``), or a folder with exactly one
        such job folder inside.

    Returns
    -------
    OdbPackage

    Raises
    ------
    InputError
        No ``matrix/matrix`` file, or no step with a non-empty profile and features.
    ParseError
        A malformed record in a features, profile or components file.
    """
    base = Path(root)
    if not (base / "matrix" / "matrix").is_file():
        inner = (
            [d for d in base.iterdir() if (d / "matrix" / "matrix").is_file()]
            if base.is_dir()
            else []
        )
        if len(inner) != 1:
            raise InputError("an ODB++ folder must contain matrix/matrix; got none", file=str(base))
        base = inner[0]
    reader = _Reader(base)
    blocks = _blocks(_read_lines(base / "matrix" / "matrix", reader.notices))
    steps = tuple(
        b["NAME"]
        for _n, b in sorted(
            (x for x in blocks if x[0] == "STEP"), key=lambda x: int(x[1].get("COL", "0") or 0)
        )
    )
    matrix = tuple(
        sorted(
            (
                MatrixRow(
                    name=b.get("NAME", ""),
                    row=int(b.get("ROW", "0") or 0),
                    context=b.get("CONTEXT", "").upper(),
                    type=b.get("TYPE", "").upper(),
                    polarity=b.get("POLARITY", "POSITIVE").upper(),
                    start_name=b.get("START_NAME", ""),
                    end_name=b.get("END_NAME", ""),
                )
                for n, b in blocks
                if n == "LAYER"
            ),
            key=lambda r: r.row,
        )
    )
    info = base / "misc" / "info"
    units_in_info = ""
    if info.is_file():
        u = _units_of(_read_lines(info, reader.notices))
        units_in_info = {"mm": "MM", "inch": "INCH", None: ""}[u]

    # Step choice: non-empty profile and at least one non-empty features file; among
    # several, prefer one without STEP-REPEAT (a panel repeats the board step).
    candidates: list[str] = []
    for name in steps:
        sd = base / "steps" / name.lower()
        if _profile_contours(reader, sd) and _step_has_features(sd):
            candidates.append(name)
    if not candidates:
        raise InputError(
            "an ODB++ job must have a step with a non-empty profile and features; got none "
            f"among {list(steps)}",
            file=str(base),
        )
    plain = [
        s
        for s in candidates
        if "STEP-REPEAT"
        not in (
            (base / "steps" / s.lower() / "stephdr").read_text("utf-8", "replace").upper()
            if (base / "steps" / s.lower() / "stephdr").is_file()
            else ""
        )
    ]
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
        reader.note(str(base), None, f"step {step!r} chosen: {reason}")
    step_dir = base / "steps" / step.lower()

    profile = _profile_contours(reader, step_dir)
    copper_rows = [r for r in matrix if r.context == "BOARD" and r.type in COPPER_TYPES]
    copper: list[ArtworkRecord] = []
    for r in copper_rows:
        ldir = step_dir / "layers" / r.name.lower()
        path = ldir / "features"
        attrs = {"OdbLayerName": r.name, "OdbLayerType": r.type}
        neg = r.polarity == "NEGATIVE"
        if path.is_file():
            copper.append(_layer_record(reader, path, neg, attrs))
            continue
        note: tuple[Notice, ...]
        if (ldir / "features.Z").is_file():
            msg = "compressed features file not read (needs an LZW decoder); layer left empty"
            note = (Notice(file=str(ldir / "features.Z"), line=None, message=msg),)
        else:
            note = (Notice(file=str(path), line=None, message="no features file; layer empty"),)
        reader.notices.extend(note)
        copper.append(_artwork(str(path), "inch", neg, [], [], attrs, 0, note))

    placements: list[PlacementRow] = []
    for folder, side in (("comp_+_top", "top"), ("comp_+_bot", "bottom")):
        cdir = step_dir / "layers" / folder
        if (cdir / "components").is_file():
            placements += _components(reader, cdir / "components", side)  # type: ignore[arg-type]
        elif (cdir / "components.Z").is_file():
            reader.note(str(cdir / "components.Z"), None, "compressed components file not read")
    for z in sorted(step_dir.glob("layers/*/*.Z")):
        if z.name not in ("features.Z", "components.Z"):
            reader.note(str(z), None, "compressed file not read")
    if reader.no_units:
        reader.note(
            str(base),
            None,
            f"{len(reader.no_units)} file(s) have no UNITS line; read as inch "
            f"(first: {reader.no_units[0]})",
        )
    island = profile[0] if profile else np.zeros((0, 2), dtype=np.float64)
    return OdbPackage(
        root=str(base),
        steps=steps,
        step=step,
        step_reason=reason,
        matrix=matrix,
        copper_names=tuple(r.name for r in copper_rows),
        copper=tuple(copper),
        profile_rings=tuple(profile),
        profile_ring=island,
        placements=tuple(placements),
        units_in_info=units_in_info,
        notices=tuple(reader.notices),
    )
