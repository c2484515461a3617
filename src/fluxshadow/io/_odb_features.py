"""ODB++ ``features`` files (layers and user symbols) into flat object lists (mm).

Records (ODB++ Format Specification, features file, from memory; sizes of standard
symbols in um for mm files and mil for inch files):

- ``$<n> <name> [I|M]`` symbol declaration (``I``/``M`` gives the symbol's own unit);
- ``@<n> <name>`` / ``&<n> <text>`` attribute names and text strings (kept only when
  asked, for drill layers);
- ``P <x> <y> <apt_def> <pol> <dcode> <orient> [<angle>]`` pad, ``apt_def`` either
  ``<sym>`` or ``-1 <sym> <resize>`` (the symbol grown by ``resize`` small units);
- ``L <xs> <ys> <xe> <ye> <sym> <pol> <dcode>`` line, ``A <xs> <ys> <xe> <ye> <xc> <yc>
  <sym> <pol> <dcode> <cw>`` arc;
- ``S <pol> <dcode>`` ... ``SE`` surface with ``OB <x> <y> I|H``, ``OS``, ``OC <xe> <ye>
  <xc> <yc> <cw>``, ``OE`` contours;
- ``T`` text and ``B`` barcode records are counted (they take a feature number) but not
  drawn.

Every feature record (P, L, A, S, T, B) takes the next feature number (0-based), which
is what EDA ``FID`` records refer to; each object remembers the number it came from.

Records that cannot be drawn -- a symbol number no ``$`` line declared, a standard symbol
not drawn here, a user symbol without a readable folder, too few fields -- are skipped
and counted; one :class:`~fluxshadow.errors.Notice` per kind and file names the first
line. A field that is not a number is a :class:`~fluxshadow.errors.ParseError`.
"""

from __future__ import annotations

import itertools
import math
from collections.abc import Iterator
from dataclasses import dataclass, field
from pathlib import Path
from typing import Literal

import numpy as np
import numpy.typing as npt
import shapely
from shapely.geometry import LineString, Polygon
from shapely.geometry.base import BaseGeometry

from fluxshadow.errors import Notice, ParseError
from fluxshadow.io._gerber_geom import Transform, arc_points, circle_ring
from fluxshadow.io._odb_symbols import (
    closed,
    hole_free_rings,
    looks_standard,
    polygons,
    standard_symbol,
)
from fluxshadow.io._odb_text import (
    CompressedFileError,
    OdbLimits,
    limit_error,
    parse_float,
    read_lines,
    units_of,
)
from fluxshadow.io.records import FLASH, REGION, TRACK, ApertureRecord

__all__ = ["MM_PER_INCH", "MM_PER_MIL", "MM_PER_UM", "FeatureReader", "ParsedFeatures"]

FloatArray = npt.NDArray[np.float64]
Parts = list[tuple[bool, FloatArray]]

MM_PER_INCH = 25.4
MM_PER_MIL = 0.0254
MM_PER_UM = 0.001


@dataclass
class ParsedFeatures:
    """Objects of one features file as parallel lists (mm).

    ``rings[i]`` is empty for a flash, one polyline for a track, closed contours for a
    region. ``feature[i]`` is the feature number the object came from. ``attrs[i]`` is
    the text after ``;`` (only kept when asked). ``symbol_names`` maps ``$n`` to
    ``(name, mm per size unit)``.
    """

    source: str
    units: Literal["mm", "inch"]
    size_bytes: int
    apertures: list[ApertureRecord] = field(default_factory=list)
    kind: list[int] = field(default_factory=list)
    dark: list[bool] = field(default_factory=list)
    aperture: list[int] = field(default_factory=list)
    xy: list[tuple[float, float]] = field(default_factory=list)
    rings: list[list[FloatArray]] = field(default_factory=list)
    feature: list[int] = field(default_factory=list)
    attrs: list[str] = field(default_factory=list)
    attr_names: dict[int, str] = field(default_factory=dict)
    symbol_names: dict[int, tuple[str, float]] = field(default_factory=dict)
    n_features: int = 0


class _Skips:
    """Counts of skipped records per kind, first line of each (one notice per kind)."""

    def __init__(self) -> None:
        self.by_kind: dict[str, list[int]] = {}

    def add(self, what: str, line: int) -> None:
        entry = self.by_kind.get(what)
        if entry is None:
            self.by_kind[what] = [1, line]
        else:
            entry[0] += 1

    def notices(self, src: str) -> list[Notice]:
        return [
            Notice(
                file=src,
                line=first,
                message=f"{count} feature record(s) skipped: {what} (first at line {first})",
            )
            for what, (count, first) in self.by_kind.items()
        ]


def _resized(parts: Parts, circle: float | None, grow_mm: float) -> tuple[Parts, float | None]:
    """A symbol grown by ``grow_mm`` in width and height (half on every side)."""
    if circle is not None:
        d = max(circle + grow_mm, 0.0)
        return ([(True, circle_ring(0.0, 0.0, 0.5 * d))] if d > 0.0 else []), d
    out: Parts = []
    for dark, ring in parts:
        geom = Polygon(ring).buffer(
            0.5 * grow_mm if dark else -0.5 * grow_mm, join_style="mitre", mitre_limit=10.0
        )
        for poly in polygons(geom):
            out += [(dark, r) for r in hole_free_rings(poly)]
    return out, None


class FeatureReader:
    """Reads features files of one job; caches user symbols under ``<root>/symbols``."""

    def __init__(self, root: Path, limits: OdbLimits, notices: list[Notice]) -> None:
        self.root = root
        self.limits = limits
        self.notices = notices
        self.user_symbols: dict[str, Parts | None] = {}
        self.no_units: list[str] = []
        self._depth = 0

    def note(self, file: str, line: int | None, message: str) -> None:
        self.notices.append(Notice(file=file, line=line, message=message))

    # -- user symbols -------------------------------------------------------------

    def user_symbol(self, name: str) -> Parts | None:
        """Parts (mm, untransformed) of ``symbols/<name>/features``, read once."""
        if name in self.user_symbols:
            return self.user_symbols[name]
        folder = self.root / "symbols" / name.lower()
        if not folder.is_dir() and (self.root / "symbols" / name).is_dir():
            folder = self.root / "symbols" / name
        path = folder / "features"
        self.user_symbols[name] = None  # guards self-reference
        if self._depth > 8:
            self.note(str(path), None, "symbols nested deeper than 8 levels; not drawn")
            return None
        self._depth += 1
        try:
            parsed = self.features(path)
        except CompressedFileError as exc:
            self.note(str(exc.file or path), None, f"{exc}; user symbol {name!r} left out")
            return None
        finally:
            self._depth -= 1
        if parsed is None:
            return None
        parts: Parts = []
        for k in range(len(parsed.kind)):
            kind, dark = parsed.kind[k], parsed.dark[k]
            if kind == FLASH:
                ap = parsed.apertures[parsed.aperture[k]]
                off = np.asarray(parsed.xy[k])
                parts += [(dark, ring + off) for dk, ring in ap.parts if dk]
            elif kind == TRACK:
                ap = parsed.apertures[parsed.aperture[k]]
                line = parsed.rings[k][0]
                if ap.circle_diameter_mm is not None:
                    geom: BaseGeometry = LineString(line).buffer(0.5 * ap.circle_diameter_mm)
                else:
                    hull = np.vstack([r for dk, r in ap.parts if dk])
                    segs = [
                        shapely.convex_hull(shapely.multipoints(np.vstack([hull + a, hull + b])))
                        for a, b in itertools.pairwise(line)
                    ]
                    geom = shapely.union_all(segs)
                for poly in polygons(geom):
                    parts += [(dark, r) for r in hole_free_rings(poly)]
            else:
                parts += [(dark, r) for r in parsed.rings[k]]
        self.user_symbols[name] = parts
        return parts

    # -- features files -----------------------------------------------------------

    def features(self, path: Path, *, keep_attrs: bool = False) -> ParsedFeatures | None:
        """Parse one features file (or its ``.Z``/``.gz``); None when none exists.

        Raises
        ------
        ParseError
            A field that must be a number is not; a surface without ``SE``.
        LimitError
            Size, object or vertex limit exceeded.
        CompressedFileError
            A compressed file that does not decode.
        """
        got = read_lines(path, self.limits, self.notices)
        if got is None:
            return None
        lines, actual, size = got
        src = str(actual)
        units = units_of(lines)
        if units is None:
            self.no_units.append(src)
            units = "inch"
        out = ParsedFeatures(source=src, units=units, size_bytes=size)
        _Parser(self, out, keep_attrs).run(lines)
        return out


class _Parser:
    """One pass over a features file's lines."""

    def __init__(self, reader: FeatureReader, out: ParsedFeatures, keep_attrs: bool) -> None:
        self.r = reader
        self.out = out
        self.src = out.source
        self.keep_attrs = keep_attrs
        self.coord = 1.0 if out.units == "mm" else MM_PER_INCH
        self.size_default = MM_PER_UM if out.units == "mm" else MM_PER_MIL
        self.ap_index: dict[tuple[int, bool, float, float], int] = {}
        self.pad_cache: dict[tuple[str, ...], int] = {}
        self.bad_symbols: set[tuple[int, bool, float, float]] = set()
        self.skips = _Skips()
        self.n_vertices = 0
        self.max_objects = reader.limits.max_objects
        self.max_vertices = reader.limits.max_vertices

    # -- helpers ------------------------------------------------------------------

    def fail(self, tok: str, ln: int, raw: str) -> ParseError:
        """The ParseError for a field that is not a finite number."""
        try:
            parse_float(tok, self.src, ln, raw.strip())
        except ParseError as exc:
            return exc
        return ParseError(
            "a record field must be a number; got a malformed line",
            file=self.src,
            line=ln,
            statement=raw.strip(),
        )

    def floats(self, toks: list[str], ln: int, raw: str) -> list[float]:
        try:
            vals = [float(t) for t in toks]
        except ValueError:
            bad = next(t for t in toks if not _is_float(t))
            raise self.fail(bad, ln, raw) from None
        for t, v in zip(toks, vals, strict=True):
            if not math.isfinite(v):
                raise self.fail(t, ln, raw)
        return vals

    def integer(self, tok: str, ln: int, raw: str) -> int:
        try:
            return int(tok)
        except ValueError:
            v = parse_float(tok, self.src, ln, raw.strip())
            if v != int(v):
                raise ParseError(
                    f"a symbol number must be an integer; got {tok!r}",
                    file=self.src,
                    line=ln,
                    statement=raw.strip(),
                ) from None
            return int(v)

    def add(
        self,
        kind: int,
        dark: bool,
        xy: tuple[float, float],
        ap: int,
        rings: list[FloatArray],
        feature: int,
        attrs: str,
        ln: int,
    ) -> None:
        out = self.out
        if len(out.kind) >= self.max_objects:
            msg = f"object count must be at most {self.max_objects}; got more"
            raise limit_error(msg, "max_objects", self.src, ln)
        for r in rings:
            self.n_vertices += len(r)
        if self.n_vertices > self.max_vertices:
            msg = f"vertex count must be at most {self.max_vertices}; got more"
            raise limit_error(msg, "max_vertices", self.src, ln)
        out.kind.append(kind)
        out.dark.append(dark)
        out.xy.append(xy)
        out.aperture.append(ap)
        out.rings.append(rings)
        out.feature.append(feature)
        if self.keep_attrs:
            out.attrs.append(attrs)

    def aperture(self, sym: int, mirror: bool, cw_deg: float, resize: float, ln: int) -> int | None:
        key = (sym, mirror, round(cw_deg % 360.0, 9), resize)
        got = self.ap_index.get(key)
        if got is not None:
            return got
        if key in self.bad_symbols:
            self.skip_symbol(sym, ln)
            return None
        symbols = self.out.symbol_names
        if sym not in symbols:
            self.bad_symbols.add(key)
            self.skips.add(f"symbol number ${sym} is not declared by a $ line", ln)
            return None
        name, scale = symbols[sym]
        std = standard_symbol(name, scale)
        if std is not None:
            template, parts, circle = std
        else:
            user = self.r.user_symbol(name)
            if user is None:
                self.bad_symbols.add(key)
                self.skip_symbol(sym, ln)
                return None
            template, parts, circle = name, user, None
        if resize:
            parts, circle = _resized(parts, circle, resize * scale)
        t = Transform(mirror, (-cw_deg) % 360.0, 1.0)
        if not t.is_identity:
            parts = [(dk, t.apply(r)) for dk, r in parts]
        aps = self.out.apertures
        self.ap_index[key] = len(aps)
        aps.append(
            ApertureRecord(
                code=sym, template=template, parts=tuple(parts), circle_diameter_mm=circle
            )
        )
        return self.ap_index[key]

    def skip_symbol(self, sym: int, ln: int) -> None:
        if sym not in self.out.symbol_names:
            self.skips.add(f"symbol number ${sym} is not declared by a $ line", ln)
            return
        name = self.out.symbol_names[sym][0]
        if looks_standard(name):
            self.skips.add(f"standard symbol {name!r} is not drawn by this reader", ln)
        else:
            self.skips.add(
                f"user symbol {name!r} has no readable folder symbols/{name.lower()}", ln
            )

    # -- the pass -----------------------------------------------------------------

    def run(self, lines: list[str]) -> None:
        out, src = self.out, self.src
        feat = -1
        it = enumerate(lines, start=1)
        for ln, raw in it:
            if not raw:
                continue
            c = raw[0]
            if c in " \t":
                raw = raw.strip()
                if not raw:
                    continue
                c = raw[0]
            if c == "P" or c == "L" or c == "A" or c == "S" or c == "T" or c == "B":
                body, _, attrs = raw.partition(";")
                t = body.split()
                head = t[0]
                if head == "P":
                    feat += 1
                    self.pad(t, ln, raw, feat, attrs)
                elif head == "L":
                    feat += 1
                    self.line(t, ln, raw, feat, attrs)
                elif head == "A":
                    feat += 1
                    self.arc(t, ln, raw, feat, attrs)
                elif head == "S":
                    feat += 1
                    dark = len(t) < 2 or t[1].upper() != "N"
                    self.read_surface(it, dark, feat, attrs, ln, len(t) < 2)
                elif head == "T" or head == "B":
                    feat += 1
                    what = "text" if head == "T" else "barcode"
                    self.skips.add(f"{what} records are not drawn", ln)
                else:
                    self.unknown(head, ln)
            elif c == "$":
                self.symbol_line(raw, ln)
            elif c == "@" or c == "&":
                if c == "@" and self.keep_attrs:
                    num, _, name = raw[1:].partition(" ")
                    if num.isdigit():
                        out.attr_names[int(num)] = name.strip().lower()
            elif c == "#" or c == "F" or "=" in raw or raw.startswith("U "):
                continue
            else:
                self.unknown(raw.split()[0], ln)
        out.n_features = feat + 1
        self.r.notices.extend(self.skips.notices(src))

    def read_surface(
        self,
        it: Iterator[tuple[int, str]],
        dark: bool,
        feat: int,
        attrs: str,
        s_line: int,
        bad: bool,
    ) -> None:
        """Consume the contour lines of one surface (up to ``SE``) from ``it``."""
        coord = self.coord
        contours: list[tuple[bool, list[FloatArray]]] = []
        buf: list[float] = []
        append = buf.append

        def flush() -> None:
            if buf:
                arr = np.array(buf, dtype=np.float64).reshape(-1, 2)
                if coord != 1.0:
                    arr *= coord
                contours[-1][1].append(arr)
                buf.clear()

        for ln, raw in it:
            tag = raw[:2]
            if tag == "OS":
                xs, _, ys = raw[3:].partition(" ")
                try:
                    x = float(xs)
                    y = float(ys)
                except ValueError:
                    t = raw.split()
                    if len(t) < 3:
                        bad = True
                        continue
                    x, y = self.floats(t[1:3], ln, raw)
                append(x)
                append(y)
                continue
            if not tag.strip():
                raw = raw.strip()
                tag = raw[:2]
                if not raw:
                    continue
                if tag == "OS":  # indented vertex: take the slow path once
                    t = raw.split()
                    if len(t) < 3:
                        bad = True
                        continue
                    buf.extend(self.floats(t[1:3], ln, raw))
                    continue
            if tag == "OB":
                t = raw.split()
                if len(t) < 3:
                    bad = True
                    continue
                if contours:
                    flush()
                x, y = self.floats(t[1:3], ln, raw)
                contours.append((len(t) < 4 or t[3].upper() != "H", []))
                append(x)
                append(y)
            elif tag == "OC":
                t = raw.split()
                if len(t) < 6 or not contours:
                    bad = True
                    continue
                flush()
                xe, ye, xc, yc = (v * coord for v in self.floats(t[1:5], ln, raw))
                chunks = contours[-1][1]
                if not chunks:
                    bad = True
                    continue
                x0, y0 = chunks[-1][-1]
                full = math.hypot(xe - x0, ye - y0) < 1e-12
                ccw = t[5].upper() != "Y"
                chunks.append(
                    arc_points(float(x0), float(y0), xe, ye, xc, yc, ccw=ccw, full_circle=full)
                )
            elif tag == "OE":
                if contours:
                    flush()
            elif tag == "SE":
                if contours:
                    flush()
                if bad:
                    self.skips.add("surface record with too few fields", s_line)
                else:
                    self.surface(contours, dark, feat, attrs, s_line)
                return
            else:
                raise ParseError(
                    "a surface record must be OB, OS, OC, OE or SE; got " + repr(raw.split()[0]),
                    file=self.src,
                    line=ln,
                    statement=raw.strip(),
                )
        raise ParseError(
            "a surface must end with SE; got the end of the file", file=self.src, line=s_line
        )

    def unknown(self, head: str, ln: int) -> None:
        self.skips.add(f"unknown record {head[:20]!r}", ln)

    def symbol_line(self, raw: str, ln: int) -> None:
        toks = raw.split()
        if len(toks) < 2:
            return
        try:
            num = int(toks[0][1:])
        except ValueError:
            return
        scale = self.size_default
        if len(toks) >= 3 and toks[2].upper() in ("I", "M"):
            scale = MM_PER_MIL if toks[2].upper() == "I" else MM_PER_UM
        self.out.symbol_names[num] = (toks[1], scale)

    def pad(self, t: list[str], ln: int, raw: str, feat: int, attrs: str) -> None:
        n = len(t)
        if n < 7:
            self.skips.add("pad record with too few fields", ln)
            return
        key = (
            (t[3], t[4], t[5], t[6], t[7], t[8], t[9] if n > 9 else "")
            if n > 8
            else (t[3], t[6] if n > 6 else "", t[7] if n > 7 else "")
        )
        cached: int | None = self.pad_cache.get(key, -2)
        if cached == -2:
            cached = self.pad_aperture(t, ln, raw)
            if cached is not None and cached >= 0:
                self.pad_cache[key] = cached
        if cached is None or cached < 0:
            return
        try:
            x = float(t[1]) * self.coord
            y = float(t[2]) * self.coord
        except ValueError:
            self.floats(t[1:3], ln, raw)
            raise  # pragma: no cover - floats raised
        if not (math.isfinite(x) and math.isfinite(y)):
            self.floats(t[1:3], ln, raw)
        pol = t[7] if t[3] == "-1" else t[4]
        self.add(FLASH, pol != "N" and pol != "n", (x, y), cached, [], feat, attrs, ln)

    def pad_aperture(self, t: list[str], ln: int, raw: str) -> int | None:
        """Aperture of a pad record (slow path, once per distinct symbol/orientation)."""
        if len(t) < 7:
            self.skips.add("pad record with too few fields", ln)
            return None
        resize = 0.0
        if t[3] == "-1":
            if len(t) < 9:
                self.skips.add("pad record with too few fields", ln)
                return None
            sym = self.integer(t[4], ln, raw)
            resize = self.floats(t[5:6], ln, raw)[0]
            rest = t[6:]
        else:
            sym = self.integer(t[3], ln, raw)
            rest = t[4:]
        self.floats(t[1:3], ln, raw)
        orient = self.integer(rest[2], ln, raw)
        if orient == 8 or orient == 9:
            if len(rest) < 4:
                self.skips.add("pad record with too few fields", ln)
                return None
            cw = self.floats(rest[3:4], ln, raw)[0]
            mirror = orient == 9
        elif 0 <= orient <= 7:
            cw = 90.0 * (orient % 4)
            mirror = orient >= 4
        else:
            raise ParseError(
                f"pad orientation must be 0 to 9; got {orient}",
                file=self.src,
                line=ln,
                statement=raw.strip(),
            )
        return self.aperture(sym, mirror, cw, resize, ln)

    def line(self, t: list[str], ln: int, raw: str, feat: int, attrs: str) -> None:
        if len(t) < 7:
            self.skips.add("line record with too few fields", ln)
            return
        x0, y0, x1, y1 = (v * self.coord for v in self.floats(t[1:5], ln, raw))
        ap = self.aperture(self.integer(t[5], ln, raw), False, 0.0, 0.0, ln)
        if ap is not None:
            ring = np.array([[x0, y0], [x1, y1]], dtype=np.float64)
            self.add(TRACK, t[6].upper() != "N", (x0, y0), ap, [ring], feat, attrs, ln)

    def arc(self, t: list[str], ln: int, raw: str, feat: int, attrs: str) -> None:
        if len(t) < 11:
            self.skips.add("arc record with too few fields", ln)
            return
        x0, y0, x1, y1, xc, yc = (v * self.coord for v in self.floats(t[1:7], ln, raw))
        ap = self.aperture(self.integer(t[7], ln, raw), False, 0.0, 0.0, ln)
        if ap is None:
            return
        full = math.hypot(x1 - x0, y1 - y0) < 1e-12
        pts = arc_points(x0, y0, x1, y1, xc, yc, ccw=t[10].upper() != "Y", full_circle=full)
        ring = np.vstack([[[x0, y0]], pts])
        self.add(TRACK, t[8].upper() != "N", (x0, y0), ap, [ring], feat, attrs, ln)

    def surface(
        self,
        contours: list[tuple[bool, list[FloatArray]]],
        dark: bool,
        feat: int,
        attrs: str,
        ln: int,
    ) -> None:
        for _island, chunks in contours:
            for ch in chunks:
                if not np.isfinite(ch).all():
                    raise ParseError(
                        "a surface coordinate must be a finite number; got nan or inf",
                        file=self.src,
                        line=ln,
                    )
        rings = surface_rings(contours)
        if rings:
            xy = (float(rings[0][0, 0]), float(rings[0][0, 1]))
            self.add(REGION, dark, xy, -1, rings, feat, attrs, ln)


def _is_float(tok: str) -> bool:
    try:
        float(tok)
    except ValueError:
        return False
    return True


def surface_rings(contours: list[tuple[bool, list[FloatArray]]]) -> list[FloatArray]:
    """Contours of one surface record as rings that are filled on their own and united.

    Islands without holes are kept as written; an island with holes is cut into hole-free
    pieces (see :func:`~fluxshadow.io._odb_symbols.hole_free_rings`).
    """
    rings: list[FloatArray] = []
    k = 0
    while k < len(contours):
        island = closed(np.vstack(contours[k][1])) if contours[k][1] else np.zeros((0, 2))
        k += 1
        holes: list[FloatArray] = []
        while k < len(contours) and not contours[k][0]:
            if contours[k][1]:
                holes.append(closed(np.vstack(contours[k][1])))
            k += 1
        if len(island) < 4:
            continue
        if not holes:
            rings.append(island)
            continue
        poly = shapely.make_valid(Polygon(island, [h for h in holes if len(h) >= 4]))
        for p in polygons(poly):
            rings += hole_free_rings(p)
    return rings
