"""The Gerber statement interpreter behind :mod:`fluxshadow.io.gerber` (private).

Tokenising: one compiled pattern splits the whole text into (1) runs of plain
coordinate operations (``X..Y..D01*`` / ``D02*`` / ``D03*`` without G-code or I/J),
(2) extended commands ``%...%``, (3) ``G04`` comments, (4) other word commands ``...*``.
Long runs in linear
interpolation mode are interpreted in bulk with numpy (number conversion, modal
coordinates, track chaining, region contours); everything else goes statement by
statement through the same rules. Both paths give identical tables (tested).

Conventions of the output (see :mod:`fluxshadow.io.records`):

- Consecutive D01 draws with the same aperture, polarity and attributes form one TRACK
  polyline; a D02 to the current point does not break it (the swept area is the same).
  A zero-length draw starting a track keeps two equal vertices.
- Each G36..G37 gives one REGION object whose rings are its contours (D02 starts a new
  contour); contours are closed, repeated vertices dropped, and contours with fewer than
  three distinct vertices dropped.
- Step-and-repeat copies are emitted copy by copy, X index outer, Y index inner.
"""

from __future__ import annotations

import itertools
import math
import re
from dataclasses import dataclass
from operator import itemgetter
from typing import Literal

import numpy as np
import numpy.typing as npt

from fluxshadow.errors import LimitError, Notice, ParseError
from fluxshadow.io._gerber_attrs import MAX_COMMENTS, comment_attribute, parse_attribute
from fluxshadow.io._gerber_geom import IDENTITY, Transform, arc_points
from fluxshadow.io._gerber_macro import (
    MacroError,
    MacroTemplate,
    macro_parts,
    parse_macro,
    standard_parts,
)
from fluxshadow.io._gerber_table import Chunk, Table, tile_chunk, transform_chunk
from fluxshadow.io.records import FLASH, REGION, TRACK, ApertureRecord, ArtworkRecord

__all__ = ["BULK_MIN_STATEMENTS", "Limits", "parse_text"]

FloatArray = npt.NDArray[np.float64]
Part = tuple[bool, FloatArray]

BULK_MIN_STATEMENTS = 24
"""Runs of plain operations at least this long are interpreted with numpy."""

# Possessive quantifiers: none of these alternatives needs backtracking, and avoiding it
# makes the scan about three times faster.
_MASTER = re.compile(
    r"((?:(?:X[+-]?\d++)?+(?:Y[+-]?\d++)?+D0*+[123]\*\s*+)++)"  # 1: run of plain operations
    r"|%([^%]*+)%"  # 2: extended command
    # 3: comment; its text may hold a '%' (not allowed, but written) when on one line
    r"|G0*+4(?![0-9])((?:[^*\n\r]*+|[^*%]*+))\*"
    r"|((?:[^%*\s][^%*]*+)?+)\*"  # 4: word command (possibly empty)
    r"|(\S)"  # 5: anything else (unterminated statement)
)
_SIMPLE = re.compile(r"(?:X([+-]?\d++))?+(?:Y([+-]?\d++))?+D0*+([123])\*")
_TO_SPACES = str.maketrans("XYD*", "    ")
_COL0 = itemgetter(0)
_COL1 = itemgetter(1)
_COL2 = itemgetter(2)
_WORD = re.compile(
    r"(?:N\d+)?(?:G0*(\d+))?(?:X([+-]?[\d.]+))?(?:Y([+-]?[\d.]+))?"
    r"(?:I([+-]?[\d.]+))?(?:J([+-]?[\d.]+))?(?:D0*(\d+))?(?:M0*(\d+))?"
)
_COMMENT = re.compile(r"G0*4(?!\d)")
_FS = re.compile(r"FS([LTD]?)([AI]?)(?:N\d)?(?:G\d)?X(\d)(\d)Y(\d)(\d)(?:D\d)?(?:M\d)?")
_AD = re.compile(r"ADD0*(\d+)([A-Za-z_.$][A-Za-z0-9_.$-]*)(?:,(.*))?", re.DOTALL)
_SR = re.compile(r"SR(?:X(\d+))?(?:Y(\d+))?(?:I([+-]?[\d.]+))?(?:J([+-]?[\d.]+))?")
_AB = re.compile(r"AB(?:D0*(\d+))?")
_OFSF = re.compile(r"(?:A([+-]?[\d.]+))?(?:B([+-]?[\d.]+))?")
_NUM = re.compile(r"[+-]?(?:\d+\.?\d*|\.\d+)")

_LEGACY_EXTENDED = {
    "AS": "axis select (%AS)",
    "MI": "mirror image (%MI)",
    "IR": "image rotation (%IR)",
    "IJ": "image justify (%IJ)",
    "IO": "image offset (%IO)",
    "KO": "knockout (%KO)",
    "PF": "plotter film (%PF)",
    "SM": "symbol mirror (%SM)",
    "IC": "input code (%IC)",
}


@dataclass(frozen=True)
class Limits:
    """Safety limits of one read (see :func:`fluxshadow.io.gerber.read_gerber`)."""

    max_repeat: int = 100_000
    max_macro_depth: int = 64
    max_objects: int = 20_000_000
    max_vertices: int = 50_000_000
    max_region_vertices: int = 2_000_000


RAISE_HINT = "raise it with {key} in the [limits] table of fluxshadow.toml"
"""How a limit message tells the user to raise the limit (``key`` the limit's name)."""


@dataclass(frozen=True)
class _ApDef:
    uid: int
    code: int
    template: str
    parts: tuple[Part, ...]
    circle_d: float | None
    function: str


@dataclass
class _Note:
    line: int | None
    count: int
    message: str


@dataclass(frozen=True)
class _BlockDef:
    code: int
    chunk: Chunk


class _Parser:
    """Graphics state and output tables of one Gerber file."""

    def __init__(self, text: str, source: str, limits: Limits) -> None:
        self.text = text
        self.source = source
        self.limits = limits
        # coordinate format and units
        self.fs_set = False
        self.omit = "L"
        self.x_digits = (2, 6)
        self.y_digits = (2, 6)
        self.incremental = False
        self.unit_mm: float | None = None
        self.units_first: Literal["mm", "inch"] | None = None
        self.fx = 1.0  # mm per coordinate unit (x)
        self.fy = 1.0
        # graphics state
        self.x = 0.0
        self.y = 0.0
        self.have_point = False
        self.interp: int | None = None
        self.quadrant: int | None = None
        self.dark = True
        self.mirror = "N"
        self.rotation = 0.0
        self.scale = 1.0
        self.transform = IDENTITY
        self.cur_dcode: int | None = None
        self.cur_ap = -1  # output aperture index cache (-1: not computed)
        self.last_d: int | None = None
        self.chain_open = False
        self.ended = False
        # regions
        self.in_region = False
        self.rverts: list[float] = []
        self.rstarts: list[int] = []
        self.contour_open = False
        self.region_attrs = (-1, -1, -1, True)
        # definitions
        self.macros: dict[str, MacroTemplate] = {}
        self.apdefs: dict[int, _ApDef | _BlockDef] = {}
        self.n_defs = 0
        self.apertures: list[ApertureRecord] = []
        self.ap_base: list[tuple[_ApDef, Transform]] = []
        self.ap_func: list[int] = []
        self.ap_index: dict[tuple[int, tuple[bool, float, float]], int] = {}
        # attributes and strings
        self.file_attrs: dict[str, str] = {}
        self.comments: list[str] = []
        self.ta: dict[str, tuple[str, ...]] = {}
        self.to: dict[str, tuple[str, ...]] = {}
        self.cur_net = -1
        self.cur_comp = -1
        self.nets: dict[str, int] = {}
        self.comps: dict[str, int] = {}
        self.funcs: dict[str, int] = {}
        # image
        self.negative = False
        self.offset = (0.0, 0.0)
        self.image_scale = (1.0, 1.0)
        # tables: root, then one per open block aperture / step-and-repeat
        self.table = Table()
        self.stack: list[tuple[str, object, Table]] = []
        self.notes: dict[str, _Note] = {}
        self.newline = "\n" if "\n" in text or "\r" not in text else "\r"

    # ------------------------------------------------------------------ helpers

    def line(self, pos: int) -> int:
        """1-based line number of character offset ``pos``."""
        return self.text.count(self.newline, 0, pos) + 1

    def err(self, message: str, pos: int, stmt: str | None = None) -> ParseError:
        return ParseError(message, file=self.source, line=self.line(pos), statement=stmt)

    def limit(self, message: str, pos: int, key: str) -> LimitError:
        hint = RAISE_HINT.format(key=key)
        return LimitError(f"{message} ({hint})", file=self.source, line=self.line(pos))

    def note(self, key: str, pos: int | None, message: str) -> None:
        entry = self.notes.get(key)
        if entry is None:
            self.notes[key] = _Note(None if pos is None else self.line(pos), 1, message)
        else:
            entry.count += 1

    def _intern(self, table: dict[str, int], value: str) -> int:
        idx = table.get(value)
        if idx is None:
            idx = len(table)
            table[value] = idx
        return idx

    def total_objects(self) -> int:
        return self.table.n_objects + sum(t.n_objects for _k, _v, t in self.stack)

    def check_objects(self, extra: int, pos: int, extra_vertices: int = 0) -> None:
        total = self.total_objects() + extra
        if total > self.limits.max_objects:
            msg = f"object count must be at most {self.limits.max_objects}; got {total}"
            raise self.limit(msg, pos, "max_objects")
        self.check_vertices(extra_vertices, pos)

    def total_vertices(self) -> int:
        return self.table.n_vertices + sum(t.n_vertices for _k, _v, t in self.stack)

    def check_vertices(self, extra: int, pos: int) -> None:
        total = self.total_vertices() + len(self.rverts) // 2 + extra
        if total > self.limits.max_vertices:
            msg = f"vertex count must be at most {self.limits.max_vertices}; got {total}"
            raise self.limit(msg, pos, "max_vertices")

    def check_region(self, pos: int) -> None:
        n = len(self.rverts) // 2
        if n > self.limits.max_region_vertices:
            msg = (
                f"region (G36..G37) vertex count must be at most "
                f"{self.limits.max_region_vertices}; got {n} or more"
            )
            raise self.limit(msg, pos, "max_region_vertices")

    # ------------------------------------------------------------------ main loop

    def parse(self) -> None:
        text = self.text
        end = 0
        for m in _MASTER.finditer(text):
            li = m.lastindex
            if li == 1:
                self.run(m.group(1), m.start())
            elif li == 4:
                word = m.group(4)
                if word:
                    self.word(word, m.start())
            elif li == 2:
                self.extended(m.group(2), m.start())
            elif li == 3:
                self.comment(m.group(3), m.start())
            else:
                rest = text[m.start() :]
                if "*" not in rest and "%" not in rest[1:]:
                    self.note(
                        "unterminated",
                        m.start(),
                        "the file ends inside a statement (no closing '*' or '%'); "
                        "the file may be truncated, the partial statement was ignored",
                    )
                    end = len(text)
                    break
                msg = "statement must end with '*' (and extended commands with '%')"
                raise self.err(f"{msg}; got {rest[:20]!r}", m.start(), rest[:40])
            if self.ended:
                end = m.end()
                break
        if self.ended and text[end:].strip():
            self.note(
                "after-m02",
                end,
                "data after the end-of-file code M02 was ignored",
            )

    # ------------------------------------------------------------------ coordinates

    def conv(self, s: str, axis: int, pos: int) -> float:
        """Convert one coordinate string to mm (not accumulated)."""
        f = self.fx if axis == 0 else self.fy
        if "." in s:
            self.note(
                "decimal",
                pos,
                "coordinates with a decimal point (not allowed by the format) were read "
                "as plain numbers in file units",
            )
            assert self.unit_mm is not None
            return float(s) * self.unit_mm
        if self.omit == "T":
            digits = s.lstrip("+-")
            total = sum(self.x_digits if axis == 0 else self.y_digits)
            v: int = int(digits) * 10 ** max(total - len(digits), 0)
            return float(-v if s[0] == "-" else v) * f
        return int(s) * f

    def need_format(self, pos: int, stmt: str) -> None:
        if not self.fs_set:
            msg = "coordinate format (%FS) must be set before the first coordinate; got none"
            raise self.err(msg, pos, stmt)
        if self.unit_mm is None:
            self.assume_units(pos)

    def assume_units(self, pos: int) -> None:
        self.note(
            "no-units",
            pos,
            "units must be set with %MOMM/%MOIN (or G71/G70) before use; none was set, "
            "inch assumed (legacy default)",
        )
        self.set_units("inch")

    def set_units(self, units: Literal["mm", "inch"]) -> None:
        self.unit_mm = 1.0 if units == "mm" else 25.4
        if self.units_first is None:
            self.units_first = units
        self.update_factors()

    def update_factors(self) -> None:
        u = self.unit_mm if self.unit_mm is not None else 1.0
        self.fx = u / 10 ** self.x_digits[1]
        self.fy = u / 10 ** self.y_digits[1]

    # ------------------------------------------------------------------ apertures

    def current_def(self, pos: int, stmt: str) -> _ApDef | _BlockDef:
        if self.cur_dcode is None:
            msg = "an aperture must be selected (Dnn) before a draw or flash; got none selected"
            raise self.err(msg, pos, stmt)
        d = self.apdefs.get(self.cur_dcode)
        if d is None:
            msg = (
                f"aperture D{self.cur_dcode} must be defined (%ADD{self.cur_dcode}...% or "
                f"%ABD{self.cur_dcode}%) before use; got an undefined aperture"
            )
            raise self.err(msg, pos, stmt)
        return d

    def current_ap(self, pos: int, stmt: str) -> int:
        """Output aperture index for a draw or a flash of a standard/macro aperture."""
        if self.cur_ap >= 0:
            return self.cur_ap
        d = self.current_def(pos, stmt)
        if isinstance(d, _BlockDef):
            msg = f"block aperture D{d.code} must only be flashed (D03); got a draw"
            raise self.err(msg, pos, stmt)
        self.cur_ap = self.ap_entry(d, self.transform)
        return self.cur_ap

    def ap_entry(self, d: _ApDef, t: Transform) -> int:
        key = (d.uid, t.key())
        idx = self.ap_index.get(key)
        if idx is not None:
            return idx
        parts = d.parts if t.is_identity else tuple((dk, t.apply(r)) for dk, r in d.parts)
        circle = None if d.circle_d is None else d.circle_d * t.scale
        rec = ApertureRecord(
            code=d.code,
            template=d.template,
            parts=parts,
            circle_diameter_mm=circle,
            function=d.function,
        )
        idx = len(self.apertures)
        self.apertures.append(rec)
        self.ap_base.append((d, t))
        self.ap_func.append(self._intern(self.funcs, d.function) if d.function else -1)
        self.ap_index[key] = idx
        return idx

    def define_aperture(self, body: str, pos: int) -> None:
        m = _AD.fullmatch(body)
        if m is None:
            raise self.err(
                "aperture definition must look like ADDnn<template>[,p1Xp2...]; "
                "got a malformed one",
                pos,
                body,
            )
        code = int(m.group(1))
        name = m.group(2)
        pstr = m.group(3)
        if code < 10:
            raise self.err(f"aperture number must be >= 10; got D{code}", pos, body)
        try:
            params = [float(p) for p in pstr.split("X") if p.strip() != ""] if pstr else []
        except ValueError:
            raise self.err(
                f"aperture parameters must be numbers separated by 'X'; got {pstr!r}", pos, body
            ) from None
        if self.unit_mm is None:
            self.assume_units(pos)
        assert self.unit_mm is not None
        circle: float | None = None
        try:
            if name in ("C", "R", "O", "P"):
                plist, circle, legacy = standard_parts(name, params, self.unit_mm)
                if legacy:
                    self.note(
                        "rect-hole", pos, "rectangular aperture holes are deprecated; read as given"
                    )
            elif name in self.macros:
                plist = macro_parts(self.macros[name], params, self.unit_mm)
            else:
                msg = (
                    "aperture template must be C, R, O, P or a macro defined earlier "
                    f"with %AM; got {name!r}"
                )
                raise self.err(msg, pos, body)
        except MacroError as e:
            raise self.err(str(e), pos, body) from e
        if code in self.apdefs:
            self.note(
                "redefined", pos, f"aperture D{code} was defined again; the new definition is used"
            )
        self.n_defs += 1
        function = ",".join(self.ta.get("AperFunction", ()))
        self.apdefs[code] = _ApDef(self.n_defs, code, name, tuple(plist), circle, function)
        if code == self.cur_dcode:
            self.cur_ap = -1

    def define_macro(self, body: str, pos: int) -> None:
        blocks = body.split("*")
        name = blocks[0].strip()[2:].strip()
        if not name:
            raise self.err("aperture macro must have a name; got none", pos, body)
        try:
            self.macros[name] = parse_macro(name, blocks[1:], max_depth=self.limits.max_macro_depth)
        except MacroError as e:
            if e.limit:
                raise self.limit(str(e), pos, "max_macro_depth") from e
            raise self.err(str(e), pos, body) from e

    # ------------------------------------------------------------------ objects

    def new_object(self, kind: int, ap: int, x: float, y: float, func: int) -> None:
        t = self.table
        t.kind.append(kind)
        t.dark.append(self.dark)
        t.ap.append(ap)
        t.ox.append(x)
        t.oy.append(y)
        t.rstart.append(len(t.vstart))
        t.net.append(self.cur_net)
        t.comp.append(self.cur_comp)
        t.func.append(func)

    def draw(self, pts: list[float], pos: int, stmt: str) -> None:
        """Extend the open track with flat vertices ``pts`` (x, y, ...) or start one."""
        t = self.table
        if self.chain_open:
            t.verts.extend(pts)
            return
        ap = self.current_ap(pos, stmt)
        if not self.have_point:
            self.note(
                "no-point", pos, "a draw (D01) came before any current point; it starts at (0, 0)"
            )
        self.new_object(TRACK, ap, self.x, self.y, self.ap_func[ap])
        t.vstart.append(len(t.verts) // 2)
        t.verts.append(self.x)
        t.verts.append(self.y)
        if not pts:  # zero-length draw: keep two equal vertices
            pts = [self.x, self.y]
        t.verts.extend(pts)
        self.chain_open = True

    def flash(self, x: float, y: float, pos: int, stmt: str) -> None:
        if self.in_region:
            raise self.err(
                "a flash (D03) must not appear inside a region (G36..G37); got one", pos, stmt
            )
        d = self.current_def(pos, stmt)
        self.chain_open = False
        if isinstance(d, _BlockDef):
            self.flash_block(d, x, y, pos)
            return
        ap = self.current_ap(pos, stmt)
        self.new_object(FLASH, ap, x, y, self.ap_func[ap])

    def flash_block(self, d: _BlockDef, x: float, y: float, pos: int) -> None:
        chunk = d.chunk
        if chunk.n_objects == 0:
            return
        self.check_objects(chunk.n_objects, pos, int(chunk.vertices.shape[0]))
        t = self.transform
        uniq, inverse = np.unique(chunk.aperture, return_inverse=True)
        mapped = np.empty(len(uniq), dtype=np.int64)
        for i, u in enumerate(uniq.tolist()):
            if u < 0:
                mapped[i] = -1
            else:
                base, inner = self.ap_base[u]
                mapped[i] = self.ap_entry(base, t.compose(inner))
        placed = transform_chunk(
            chunk,
            t.matrix(),
            (x, y),
            mapped[inverse.reshape(-1)],
            invert=not self.dark,
            net=self.cur_net,
            component=self.cur_comp,
        )
        self.table.add_chunk(placed)

    # ------------------------------------------------------------------ regions

    def region_start(self, pos: int) -> None:
        if self.in_region:
            self.note("nested-g36", pos, "G36 inside a region was ignored")
            return
        self.in_region = True
        self.chain_open = False
        self.rverts = []
        self.rstarts = []
        self.contour_open = False
        fn = ",".join(self.ta.get("AperFunction", ()))
        self.region_attrs = (
            self.cur_net,
            self.cur_comp,
            self._intern(self.funcs, fn) if fn else -1,
            self.dark,
        )

    def region_end(self, pos: int) -> None:
        if not self.in_region:
            self.note("stray-g37", pos, "G37 outside a region was ignored")
            return
        self.in_region = False
        self.contour_open = False
        if not self.rstarts:
            return
        rv = self.rverts
        bounds = [*self.rstarts, len(rv) // 2]
        rings: list[list[float]] = []
        arr = np.asarray(rv, dtype=np.float64).reshape(-1, 2) if len(rv) > 512 else None
        for a, b in itertools.pairwise(bounds):
            # Drop repeated vertices, then a closing vertex; fewer than 3 left: no area.
            if arr is not None:
                c = arr[a:b]
                if len(c) > 1:
                    keep = np.ones(len(c), dtype=np.bool_)
                    keep[1:] = np.any(c[1:] != c[:-1], axis=1)
                    c = c[keep]
                closed = len(c) > 1 and c[0, 0] == c[-1, 0] and c[0, 1] == c[-1, 1]
                n_distinct = len(c) - 1 if closed else len(c)
                if n_distinct >= 3:
                    rings.append(np.vstack([c[:n_distinct], c[:1]]).ravel().tolist())
            else:
                flat = rv[2 * a : 2 * b]
                pts = list(zip(flat[0::2], flat[1::2], strict=True))
                pts = [pts[0], *(p for p, q in zip(pts[1:], pts[:-1], strict=True) if p != q)]
                closed = len(pts) > 1 and pts[0] == pts[-1]
                if closed:
                    pts.pop()
                n_distinct = len(pts)
                if n_distinct >= 3:
                    pts.append(pts[0])
                    rings.append([v for p in pts for v in p])
            if not closed and n_distinct >= 3:
                self.note(
                    "unclosed", pos, "region contours must be closed; an open contour was closed"
                )
        if not rings:
            return
        net, comp, func, dark = self.region_attrs
        t = self.table
        t.kind.append(REGION)
        t.dark.append(dark)
        t.ap.append(-1)
        t.ox.append(float(rings[0][0]))
        t.oy.append(float(rings[0][1]))
        t.rstart.append(len(t.vstart))
        t.net.append(net)
        t.comp.append(comp)
        t.func.append(func)
        for ring in rings:
            t.vstart.append(len(t.verts) // 2)
            t.verts.extend(ring)

    def region_draw(self, pts: list[float], pos: int, stmt: str) -> None:
        if not self.contour_open:
            if not self.have_point:
                msg = (
                    "a draw (D01) inside a region must start from a current point; "
                    "got none (no D02 before it)"
                )
                raise self.err(msg, pos, stmt)
            self.rstarts.append(len(self.rverts) // 2)
            self.rverts.append(self.x)
            self.rverts.append(self.y)
            self.contour_open = True
        self.rverts.extend(pts)
        if len(self.rverts) > 2 * self.limits.max_region_vertices:
            self.check_region(pos)

    # ------------------------------------------------------------------ operations

    def op(
        self,
        xs: str | None,
        ys: str | None,
        is_: str | None,
        js: str | None,
        d: int,
        pos: int,
        stmt: str,
    ) -> None:
        self.need_format(pos, stmt)
        nx = self.x
        ny = self.y
        if xs:
            v = self.conv(xs, 0, pos)
            nx = nx + v if self.incremental else v
        if ys:
            v = self.conv(ys, 1, pos)
            ny = ny + v if self.incremental else v
        self.last_d = d
        if d == 1:
            interp = self.interp
            if interp is None:
                self.note(
                    "no-interp",
                    pos,
                    "interpolation mode was not set before a draw; linear (G01) assumed",
                )
                self.interp = interp = 1
            if interp == 1:
                if self.in_region:
                    self.region_draw([nx, ny], pos, stmt)
                elif self.chain_open:
                    if nx != self.x or ny != self.y:
                        self.table.verts.append(nx)
                        self.table.verts.append(ny)
                else:
                    self.draw([nx, ny], pos, stmt)
            else:
                iv = self.conv(is_, 0, pos) if is_ else 0.0
                jv = self.conv(js, 1, pos) if js else 0.0
                pts = self.arc(nx, ny, iv, jv, pos, stmt)
                self.check_vertices(len(pts) // 2, pos)
                if self.in_region:
                    self.region_draw(pts, pos, stmt)
                elif self.chain_open:
                    if len(pts) == 2 and pts[0] == self.x and pts[1] == self.y:
                        pass
                    else:
                        self.table.verts.extend(pts)
                else:
                    if len(pts) == 2 and pts[0] == self.x and pts[1] == self.y:
                        pts = []
                    self.draw(pts, pos, stmt)
        elif d == 2:
            if self.in_region:
                self.contour_open = False
            elif nx != self.x or ny != self.y:
                self.chain_open = False
        else:
            self.flash(nx, ny, pos, stmt)
        self.x = nx
        self.y = ny
        self.have_point = True

    def arc(self, nx: float, ny: float, iv: float, jv: float, pos: int, stmt: str) -> list[float]:
        """Linearised arc from the current point to (nx, ny): flat vertex list after the start."""
        x0, y0 = self.x, self.y
        ccw = self.interp == 3
        quadrant = self.quadrant
        if quadrant is None:
            self.note(
                "no-quadrant",
                pos,
                "arc before any G74/G75; read as multi-quadrant (G75) unless only the "
                "single-quadrant reading gives a consistent centre",
            )
            cx, cy = x0 + iv, y0 + jv
            r0 = math.hypot(x0 - cx, y0 - cy)
            r1 = math.hypot(nx - cx, ny - cy)
            if abs(r0 - r1) > max(1e-3, 0.01 * max(r0, r1)):
                found = self.g74_centre(x0, y0, nx, ny, iv, jv, ccw)
                quadrant = 74 if found is not None else 75
            else:
                quadrant = 75
        if quadrant == 74:
            if x0 == nx and y0 == ny:
                return [nx, ny]
            found = self.g74_centre(x0, y0, nx, ny, iv, jv, ccw)
            if found is None:
                msg = (
                    "a single-quadrant (G74) arc must have a centre at (±I, ±J) with equal "
                    "radii and a sweep of at most 90°; got none"
                )
                raise self.err(msg, pos, stmt)
            cx, cy = found
            pts = arc_points(x0, y0, nx, ny, cx, cy, ccw=ccw, full_circle=False)
        else:
            cx, cy = x0 + iv, y0 + jv
            r0 = math.hypot(x0 - cx, y0 - cy)
            r1 = math.hypot(nx - cx, ny - cy)
            if abs(r0 - r1) > max(0.005, 0.01 * max(r0, r1)):
                self.note(
                    "radius",
                    pos,
                    f"arc start and end radii differ ({r0:.4f} vs {r1:.4f} mm); drawn as a spiral",
                )
            pts = arc_points(x0, y0, nx, ny, cx, cy, ccw=ccw, full_circle=True)
        out: list[float] = pts.ravel().tolist()
        return out

    @staticmethod
    def g74_centre(
        x0: float, y0: float, x1: float, y1: float, iv: float, jv: float, ccw: bool
    ) -> tuple[float, float] | None:
        best: tuple[float, float] | None = None
        best_err = math.inf
        ai, aj = abs(iv), abs(jv)
        for sx in (1.0, -1.0):
            for sy in (1.0, -1.0):
                cx = x0 + sx * ai
                cy = y0 + sy * aj
                r0 = math.hypot(x0 - cx, y0 - cy)
                r1 = math.hypot(x1 - cx, y1 - cy)
                if r0 == 0.0 or r1 == 0.0:
                    continue
                a0 = math.atan2(y0 - cy, x0 - cx)
                a1 = math.atan2(y1 - cy, x1 - cx)
                sweep = (a1 - a0) % (2 * math.pi) if ccw else (a0 - a1) % (2 * math.pi)
                if sweep > 0.5 * math.pi + 1e-3:
                    continue
                e = abs(r0 - r1)
                if e < best_err:
                    best_err = e
                    best = (cx, cy)
        if best is None:
            return None
        r = math.hypot(x0 - best[0], y0 - best[1])
        if best_err > max(1e-3, 0.05 * r):
            return None
        return best

    # ------------------------------------------------------------------ runs (bulk)

    def run(self, run: str, pos: int) -> None:
        n = run.count("*")
        if n >= BULK_MIN_STATEMENTS and self.bulk_ok():
            try:
                if self.bulk(run, pos):
                    return
            except (ValueError, OverflowError, DeprecationWarning):
                pass  # e.g. digits beyond int64: the scalar path copes
        self.run_scalar(run, pos)

    def run_scalar(self, run: str, pos: int) -> None:
        for m in _SIMPLE.finditer(run):
            self.op(
                m.group(1), m.group(2), None, None, int(m.group(3)), pos + m.start(), m.group(0)
            )

    def bulk_ok(self) -> bool:
        return self.fs_set and self.unit_mm is not None and self.interp == 1

    def column_counts(self, col: list[str], axis: int) -> tuple[FloatArray, npt.NDArray[np.bool_]]:
        """Coordinate strings of one axis as raw integer counts (0 where absent) and mask."""
        n = len(col)
        mask = np.fromiter(map(bool, col), dtype=np.bool_, count=n)
        counts = np.zeros(n, dtype=np.float64)
        n_set = int(np.count_nonzero(mask))
        if not n_set:
            return counts, mask
        if self.omit == "T":
            total = sum(self.x_digits if axis == 0 else self.y_digits)
            iv = np.array(
                [
                    (-1 if s[0] == "-" else 1)
                    * int(s.lstrip("+-"))
                    * 10 ** max(total - len(s.lstrip("+-")), 0)
                    for s in col
                    if s
                ],
                dtype=np.int64,
            )
        else:
            # Joining the digit strings and parsing them in one call is far faster than
            # converting each string.
            iv = np.fromstring(" ".join(filter(None, col)), dtype=np.int64, sep=" ")
            if iv.shape[0] != n_set:
                msg = "coordinate digits must parse as integers; got a mismatch"
                raise ValueError(msg)
        counts[mask] = iv
        return counts, mask

    def axis_values(
        self, counts: FloatArray, mask: npt.NDArray[np.bool_] | None, start: float, axis: int
    ) -> FloatArray:
        """Absolute coordinates (mm) from raw counts: modal fill or accumulation.

        ``mask`` None means every statement carries the coordinate. The products and
        sums are the same floating-point operations as in the scalar path.
        """
        raw = counts * (self.fx if axis == 0 else self.fy)
        if self.incremental:
            out: FloatArray = np.cumsum(np.concatenate([[start], raw]))[1:]
            return out
        if mask is None:
            return raw
        n = raw.shape[0]
        idx = np.maximum.accumulate(np.where(mask, np.arange(n), -1))
        return np.where(idx >= 0, raw[np.maximum(idx, 0)], start)

    def bulk(self, run: str, pos: int) -> bool:
        n = run.count("*")
        mx: npt.NDArray[np.bool_] | None = None
        my: npt.NDArray[np.bool_] | None = None
        if self.omit == "L" and run.count("X") == n and run.count("Y") == n:
            # Every statement is X<int>Y<int>D<int>*: read all numbers in one call.
            flat = np.fromstring(run.translate(_TO_SPACES), dtype=np.int64, sep=" ")
            if flat.shape[0] != 3 * n:
                return False
            table = flat.reshape(n, 3)
            if np.any(np.abs(table[:, :2]) >= 2**53):
                return False  # not exactly representable; the scalar path decides
            cx = table[:, 0].astype(np.float64)
            cy = table[:, 1].astype(np.float64)
            d = table[:, 2].astype(np.int8)
        else:
            tups = _SIMPLE.findall(run)
            codes = "".join(map(_COL2, tups)).encode("ascii")
            d = (np.frombuffer(codes, dtype=np.uint8) - 48).astype(np.int8)
            cx, mx = self.column_counts(list(map(_COL0, tups)), 0)
            cy, my = self.column_counts(list(map(_COL1, tups)), 1)
        is1 = d == 1
        is3 = d == 3
        any1 = bool(is1.any())
        if not self.have_point and bool(is1[0]):
            return False
        if self.in_region:
            if bool(is3.any()):
                return False
        elif (any1 or bool(is3.any())) and (
            self.cur_dcode is None or not isinstance(self.apdefs.get(self.cur_dcode), _ApDef)
        ):
            return False
        px = self.axis_values(cx, mx, self.x, 0)
        py = self.axis_values(cy, my, self.y, 1)
        prevx = np.concatenate([[self.x], px[:-1]])
        prevy = np.concatenate([[self.y], py[:-1]])
        if self.in_region:
            cont_all = np.concatenate([[self.contour_open], is1[:-1]])
            k = np.flatnonzero(is1)
            ck = cont_all[k]
            vx, vy, first = _emit(k, ck, px, py, prevx, prevy)
            base = len(self.rverts) // 2
            self.rstarts.extend((base + first[~ck]).tolist())
            self.rverts.extend(np.column_stack([vx, vy]).ravel().tolist())
            self.contour_open = bool(is1[-1])
            self.check_region(pos)
            self.check_vertices(0, pos)
        else:
            self.emit_tracks_and_flashes(d, px, py, prevx, prevy, pos)
        self.x = float(px[-1])
        self.y = float(py[-1])
        self.have_point = True
        self.last_d = int(d[-1])
        return True

    def emit_tracks_and_flashes(
        self,
        d: npt.NDArray[np.int8],
        px: FloatArray,
        py: FloatArray,
        prevx: FloatArray,
        prevy: FloatArray,
        pos: int,
    ) -> None:
        n = d.shape[0]
        is1 = d == 1
        is2 = d == 2
        is3 = d == 3
        moved = (px != prevx) | (py != prevy)
        noop2 = is2 & ~moved
        last = np.maximum.accumulate(np.where(~noop2, np.arange(n), -1))
        open_after = np.where(last >= 0, is1[np.maximum(last, 0)], self.chain_open)
        open_before = np.concatenate([[self.chain_open], open_after[:-1]])
        k = np.flatnonzero(is1)
        cont = open_before[k]
        keep = ~(cont & ~moved[k])
        kk = k[keep]
        ck = cont[keep]
        flashes = np.flatnonzero(is3)
        t = self.table
        if kk.size or flashes.size:
            ap = self.current_ap(pos, "")
            vx, vy, first = _emit(kk, ck, px, py, prevx, prevy)
            starts = kk[~ck]
            start_vpos = first[~ck]
            n_new = int(starts.size + flashes.size)
            self.check_objects(n_new, pos)
            keys = np.concatenate([starts, flashes])
            is_track = np.concatenate(
                [np.ones(starts.size, dtype=np.bool_), np.zeros(flashes.size, dtype=np.bool_)]
            )
            ox = np.concatenate([prevx[starts], px[flashes]])
            oy = np.concatenate([prevy[starts], py[flashes]])
            order = np.argsort(keys, kind="stable")
            is_track = is_track[order]
            ox = ox[order]
            oy = oy[order]
            n_tr_before = np.cumsum(is_track) - is_track
            rstart = len(t.vstart) + n_tr_before
            base_v = len(t.verts) // 2
            t.kind.extend(np.where(is_track, TRACK, FLASH).tolist())
            t.dark.extend([self.dark] * n_new)
            t.ap.extend([ap] * n_new)
            t.ox.extend(ox.tolist())
            t.oy.extend(oy.tolist())
            t.rstart.extend(rstart.tolist())
            t.net.extend([self.cur_net] * n_new)
            t.comp.extend([self.cur_comp] * n_new)
            t.func.extend([self.ap_func[ap]] * n_new)
            t.vstart.extend((base_v + start_vpos).tolist())
            t.verts.extend(np.column_stack([vx, vy]).ravel().tolist())
            self.check_vertices(0, pos)
        self.chain_open = bool(open_after[-1])

    # ------------------------------------------------------------------ word commands

    def word(self, word: str, pos: int) -> None:
        if word[0] == "G" and (cm := _COMMENT.match(word)) is not None:
            self.comment(word[cm.end() :], pos)
            return
        pieces = word.split()
        w = pieces[0] if len(pieces) == 1 else "".join(pieces)
        m = _WORD.fullmatch(w)
        if m is None:
            msg = "command must be a G, D or M code or coordinate data; got an unknown command"
            raise self.err(msg, pos, w)
        g, xs, ys, is_, js, ds, ms = m.groups()
        has_coord = xs is not None or ys is not None or is_ is not None or js is not None
        if g is not None:
            self.gcode(int(g), pos, w)
        if ds is not None:
            dn = int(ds)
            if dn >= 10:
                if has_coord:
                    raise self.err(
                        "coordinates must not accompany an aperture selection; got both", pos, w
                    )
                if dn != self.cur_dcode:
                    self.cur_dcode = dn
                    self.cur_ap = -1
                    self.chain_open = False
            elif dn in (1, 2, 3):
                self.op(xs, ys, is_, js, dn, pos, w)
            else:
                msg = (
                    "operation code must be D01, D02, D03 or an aperture number >= 10; "
                    f"got D{dn:02d}"
                )
                raise self.err(msg, pos, w)
        elif has_coord:
            if self.last_d is None:
                self.note(
                    "modal-none",
                    pos,
                    "coordinates without an operation code and no earlier one; "
                    "read as a move (D02)",
                )
                self.op(xs, ys, is_, js, 2, pos, w)
            else:
                self.note(
                    "modal-d",
                    pos,
                    "coordinates without an operation code reuse the previous one (deprecated)",
                )
                self.op(xs, ys, is_, js, self.last_d, pos, w)
        if ms is not None:
            mn = int(ms)
            if mn == 2:
                self.ended = True
            elif mn == 0:
                self.note("m00", pos, "M00 (program stop, deprecated) read as the end of the file")
                self.ended = True
            elif mn == 1:
                self.note("m01", pos, "M01 (optional stop, deprecated) ignored")
            else:
                raise self.err(f"M code must be M00, M01 or M02; got M{mn:02d}", pos, w)

    def gcode(self, g: int, pos: int, stmt: str) -> None:
        if g in (1, 2, 3):
            if g != self.interp:
                self.interp = g
        elif g == 36:
            self.region_start(pos)
        elif g == 37:
            self.region_end(pos)
        elif g == 75:
            self.quadrant = 75
        elif g == 74:
            self.note("g74", pos, "single-quadrant arc mode G74 is deprecated; read as specified")
            self.quadrant = 74
        elif g in (54, 55):
            self.note(f"g{g}", pos, f"G{g} before aperture codes is deprecated; ignored")
        elif g in (70, 71):
            self.note("g7x", pos, "G70/G71 unit codes are deprecated; read as inch/mm")
            self.set_units("inch" if g == 70 else "mm")
        elif g in (90, 91):
            if g == 91:
                self.note("g91", pos, "incremental coordinates (G91) are deprecated; read as such")
            self.incremental = g == 91
        else:
            self.note(f"g-unknown-{g}", pos, f"unknown G code G{g:02d} ignored")

    def comment(self, text: str, pos: int) -> None:
        stripped = text.strip()
        if stripped and len(self.comments) < MAX_COMMENTS:
            self.comments.append(stripped)
        parsed = comment_attribute(text)
        if parsed is not None:
            self.attribute(*parsed)

    # ------------------------------------------------------------------ extended commands

    def extended(self, body: str, pos: int) -> None:
        stripped = body.lstrip()
        if stripped.startswith("AM"):
            self.define_macro(stripped, pos)
            return
        for word in body.split("*"):
            w = word.strip()
            if not w:
                continue
            if "\n" in w or "\r" in w:
                w = w.replace("\r", "").replace("\n", "")
            self.ext_word(w, pos)

    def ext_word(self, w: str, pos: int) -> None:
        code = w[:2]
        if code == "TO" or code == "TA" or code == "TD" or code == "TF":
            parsed = parse_attribute(w)
            assert parsed is not None
            self.attribute(*parsed)
        elif code == "AD":
            self.define_aperture(w, pos)
        elif code == "LP":
            if w[2:] not in ("D", "C"):
                raise self.err(f"polarity must be LPD or LPC; got {w!r}", pos, w)
            dark = w[2:] == "D"
            if dark != self.dark:
                self.dark = dark
                self.chain_open = False
        elif code == "LM":
            if w[2:] not in ("N", "X", "Y", "XY"):
                raise self.err(f"mirroring must be LMN, LMX, LMY or LMXY; got {w!r}", pos, w)
            self.mirror = w[2:]
            self.set_transform()
        elif code == "LR":
            self.rotation = self.number(w[2:], pos, w, "rotation (LR)")
            self.set_transform()
        elif code == "LS":
            s = self.number(w[2:], pos, w, "scale (LS)")
            if s <= 0.0:
                raise self.err(f"scale (LS) must be > 0; got {s}", pos, w)
            self.scale = s
            self.set_transform()
        elif code == "FS":
            self.format_spec(w, pos)
        elif code == "MO":
            if w[2:] == "MM":
                self.set_units("mm")
            elif w[2:] == "IN":
                self.set_units("inch")
            else:
                raise self.err(f"unit (MO) must be MM or IN; got {w[2:]!r}", pos, w)
        elif code == "SR":
            self.step_repeat(w, pos)
        elif code == "AB":
            self.block(w, pos)
        elif code == "IP":
            if w[2:] == "NEG":
                self.negative = True
            elif w[2:] == "POS":
                self.negative = False
            else:
                raise self.err(f"image polarity must be IPPOS or IPNEG; got {w!r}", pos, w)
        elif code in ("OF", "SF"):
            self.offset_scale(w, pos)
        elif code == "IN":
            if len(self.comments) < MAX_COMMENTS:
                self.comments.append(f"IN {w[2:].strip()}")
        elif code == "LN":
            self.note("ln", pos, "%LN (load name, deprecated) ignored")
        elif code in _LEGACY_EXTENDED:
            trivial = w in ("ASAXBY", "MIA0B0", "IR0", "IRO", "MIA0", "MIB0") or code in (
                "IJ",
                "IO",
                "KO",
                "PF",
                "SM",
                "IC",
            )
            if not trivial:
                self.note(
                    f"legacy-{code}",
                    pos,
                    f"{_LEGACY_EXTENDED[code]} is deprecated and was ignored ({w})",
                )
        else:
            raise self.err(f"extended command must be a known Gerber command; got {code!r}", pos, w)

    def number(self, s: str, pos: int, stmt: str, what: str) -> float:
        if _NUM.fullmatch(s) is None:
            raise self.err(f"{what} must be a number; got {s!r}", pos, stmt)
        return float(s)

    def set_transform(self) -> None:
        t = Transform.from_gerber(self.mirror, self.rotation, self.scale)
        if t.key() != self.transform.key():
            self.transform = t
            self.cur_ap = -1
            self.chain_open = False

    def format_spec(self, w: str, pos: int) -> None:
        m = _FS.fullmatch(w)
        if m is None:
            raise self.err("format (FS) must look like FSLAX46Y46; got a malformed one", pos, w)
        omit, mode, xi, xd, yi, yd = m.groups()
        if omit == "T":
            self.note("fs-t", pos, "trailing-zero omission (FST) is deprecated; read as specified")
        self.omit = "T" if omit == "T" else "L"
        if mode == "I":
            self.note("fs-i", pos, "incremental coordinates (FS..I) are deprecated; read as such")
        self.incremental = mode == "I"
        self.x_digits = (int(xi), int(xd))
        self.y_digits = (int(yi), int(yd))
        self.fs_set = True
        self.update_factors()

    def offset_scale(self, w: str, pos: int) -> None:
        m = _OFSF.fullmatch(w[2:])
        if m is None:
            raise self.err(f"{w[:2]} must look like {w[:2]}A<n>B<n>; got {w!r}", pos, w)
        a = float(m.group(1)) if m.group(1) else None
        b = float(m.group(2)) if m.group(2) else None
        if w[:2] == "OF":
            if self.unit_mm is None:
                self.assume_units(pos)
            assert self.unit_mm is not None
            off = ((a or 0.0) * self.unit_mm, (b or 0.0) * self.unit_mm)
            if off != (0.0, 0.0):
                self.note(
                    "of", pos, f"image offset %OF (deprecated) applied: {off[0]:g}, {off[1]:g} mm"
                )
            self.offset = off
        else:
            sc = (1.0 if a is None else a, 1.0 if b is None else b)
            if sc[0] <= 0.0 or sc[1] <= 0.0:
                raise self.err(f"scale factors (SF) must be > 0; got {w!r}", pos, w)
            if sc != (1.0, 1.0):
                self.note("sf", pos, f"image scale %SF (deprecated) applied: {sc[0]:g} x {sc[1]:g}")
            self.image_scale = sc

    # ------------------------------------------------------------------ attributes

    def attribute(self, kind: str, name: str, values: tuple[str, ...]) -> None:
        if kind == "TF":
            if name:
                self.file_attrs[name] = ",".join(values)
        elif kind == "TA":
            self.ta[name] = values
        elif kind == "TO":
            self.to[name] = values
            self.refresh_object_attrs()
        else:
            if not name:
                self.ta.clear()
                self.to.clear()
            else:
                self.ta.pop(name, None)
                self.to.pop(name, None)
            self.refresh_object_attrs()

    def refresh_object_attrs(self) -> None:
        net_v = self.to.get("N", ())
        comp_v = self.to.get("C", ())
        net = self._intern(self.nets, net_v[0]) if net_v and net_v[0] else -1
        comp = self._intern(self.comps, comp_v[0]) if comp_v and comp_v[0] else -1
        if net != self.cur_net or comp != self.cur_comp:
            self.cur_net = net
            self.cur_comp = comp
            self.chain_open = False

    # ------------------------------------------------------------------ blocks, step-repeat

    def step_repeat(self, w: str, pos: int) -> None:
        m = _SR.fullmatch(w)
        if m is None:
            raise self.err(
                "step and repeat must look like SRX<n>Y<n>I<step>J<step>; got a malformed one",
                pos,
                w,
            )
        self.close_sr(pos)
        xs, ys, is_, js = m.groups()
        nx = int(xs) if xs else 1
        ny = int(ys) if ys else 1
        if nx < 1 or ny < 1:
            raise self.err(f"step and repeat counts must be >= 1; got X{nx} Y{ny}", pos, w)
        if nx * ny > self.limits.max_repeat:
            msg = f"step and repeat copies must be at most {self.limits.max_repeat}; got {nx * ny}"
            raise self.limit(msg, pos, "max_repeat")
        if nx == 1 and ny == 1:
            return
        if self.unit_mm is None:
            self.assume_units(pos)
        assert self.unit_mm is not None
        di = float(is_) * self.unit_mm if is_ else 0.0
        dj = float(js) * self.unit_mm if js else 0.0
        self.push("SR", (nx, ny, di, dj), pos)

    def push(self, kind: str, info: object, pos: int) -> None:
        if len(self.stack) >= self.limits.max_macro_depth:
            msg = f"block nesting must be at most {self.limits.max_macro_depth} deep; got deeper"
            raise self.limit(msg, pos, "max_macro_depth")
        self.end_region_if_open(pos)
        self.stack.append((kind, info, self.table))
        self.table = Table()
        self.chain_open = False

    def close_sr(self, pos: int) -> None:
        if not self.stack or self.stack[-1][0] != "SR":
            return
        self.end_region_if_open(pos)
        _kind, info, parent = self.stack.pop()
        assert isinstance(info, tuple)
        nx, ny, di, dj = info
        chunk = self.table.finish()
        self.table = parent
        self.chain_open = False
        copies = nx * ny
        self.check_objects(chunk.n_objects * copies, pos, int(chunk.vertices.shape[0]) * copies)
        ii, jj = np.meshgrid(np.arange(nx), np.arange(ny), indexing="ij")
        offsets = np.column_stack([ii.ravel() * di, jj.ravel() * dj]).astype(np.float64)
        self.table.add_chunk(tile_chunk(chunk, offsets))

    def block(self, w: str, pos: int) -> None:
        m = _AB.fullmatch(w)
        if m is None:
            raise self.err("block aperture must look like ABDnn or AB; got a malformed one", pos, w)
        if m.group(1) is not None:
            code = int(m.group(1))
            if code < 10:
                raise self.err(f"aperture number must be >= 10; got D{code}", pos, w)
            self.push("AB", code, pos)
            return
        if not self.stack or self.stack[-1][0] != "AB":
            raise self.err(
                "a block aperture close (%AB*%) must match an open %ABDnn*%; got none open", pos, w
            )
        self.close_ab(pos)

    def close_ab(self, pos: int) -> None:
        self.end_region_if_open(pos)
        _kind, info, parent = self.stack.pop()
        assert isinstance(info, int)
        chunk = self.table.finish()
        self.table = parent
        self.chain_open = False
        if info in self.apdefs:
            self.note(
                "redefined", pos, f"aperture D{info} was defined again; the new definition is used"
            )
        self.apdefs[info] = _BlockDef(info, chunk)
        if info == self.cur_dcode:
            self.cur_ap = -1

    def end_region_if_open(self, pos: int) -> None:
        if self.in_region:
            self.note("open-region", pos, "a region (G36) was not closed with G37; closed it")
            self.region_end(pos)

    # ------------------------------------------------------------------ result

    def finish(self, size_bytes: int) -> ArtworkRecord:
        end = len(self.text)
        self.end_region_if_open(end)
        while self.stack:
            if self.stack[-1][0] == "SR":
                self.note(
                    "open-sr",
                    end,
                    "a step and repeat was not closed; closed it at the end of the file",
                )
                self.close_sr(end)
            else:
                self.note(
                    "open-ab",
                    end,
                    "a block aperture was not closed; closed it at the end of the file",
                )
                self.close_ab(end)
        if not self.ended:
            self.note(
                "no-m02",
                None,
                "the file does not end with M02; it may be truncated (what was read is used)",
            )
        chunk = self.table.finish()
        self.check_objects(0, end)
        xy = chunk.xy
        verts = chunk.vertices
        apertures = tuple(self.apertures)
        sa, sb = self.image_scale
        if (sa, sb) != (1.0, 1.0):
            xy = xy * np.array([sa, sb])
            verts = verts * np.array([sa, sb])
            apertures = tuple(_scale_aperture(a, sa, sb) for a in apertures)
        if self.offset != (0.0, 0.0):
            xy = xy + np.array(self.offset)
            verts = verts + np.array(self.offset)
        notices = tuple(
            Notice(
                file=self.source,
                line=e.line,
                message=e.message + (f" ({e.count} times)" if e.count > 1 else ""),
            )
            for e in self.notes.values()
        )
        return ArtworkRecord(
            source=self.source,
            units_in_file=self.units_first or "mm",
            negative_image=self.negative,
            file_attributes=dict(self.file_attrs),
            comments=tuple(self.comments),
            apertures=apertures,
            obj_kind=chunk.kind,
            obj_dark=chunk.dark,
            obj_aperture=chunk.aperture,
            obj_xy=xy,
            obj_ring_start=chunk.ring_start,
            ring_vertex_start=chunk.vertex_start,
            vertices=verts,
            obj_net=chunk.net,
            obj_component=chunk.component,
            obj_function=chunk.function,
            nets=tuple(self.nets),
            components=tuple(self.comps),
            functions=tuple(self.funcs),
            size_bytes=size_bytes,
            notices=notices,
        )


def _emit(
    k: npt.NDArray[np.intp],
    cont: npt.NDArray[np.bool_],
    px: FloatArray,
    py: FloatArray,
    prevx: FloatArray,
    prevy: FloatArray,
) -> tuple[FloatArray, FloatArray, npt.NDArray[np.int64]]:
    """Vertices emitted by draws at statement indices ``k``.

    A draw that continues a polyline (``cont``) emits its end point; one that starts a
    polyline emits its start (the previous point) and its end point. Returns the vertex
    coordinates and, per draw, the position of its first emitted vertex.
    """
    counts = np.where(cont, 1, 2).astype(np.int64)
    first = np.cumsum(counts) - counts
    rep = np.repeat(k, counts)
    isprev = np.zeros(rep.shape[0], dtype=np.bool_)
    isprev[first[~cont]] = True
    vx = np.where(isprev, prevx[rep], px[rep])
    vy = np.where(isprev, prevy[rep], py[rep])
    return vx, vy, first


def _scale_aperture(a: ApertureRecord, sa: float, sb: float) -> ApertureRecord:
    m = np.array([sa, sb])
    circle = a.circle_diameter_mm * sa if a.circle_diameter_mm is not None and sa == sb else None
    if a.circle_diameter_mm is not None and sa != sb:
        circle = None
    return ApertureRecord(
        code=a.code,
        template=a.template,
        parts=tuple((dk, r * m) for dk, r in a.parts),
        circle_diameter_mm=circle,
        function=a.function,
    )


def parse_text(text: str, *, source: str, limits: Limits, size_bytes: int) -> ArtworkRecord:
    """Interpret the text of a Gerber file into an :class:`ArtworkRecord`.

    Parameters
    ----------
    text : str
        The whole file.
    source : str
        Name used in messages and in the record.
    limits : Limits
        Safety limits.
    size_bytes : int
        Size of the file (for the record).
    """
    p = _Parser(text, source, limits)
    p.parse()
    return p.finish(size_bytes)
