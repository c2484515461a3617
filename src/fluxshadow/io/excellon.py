"""Excellon drill and rout files to :class:`~fluxshadow.io.records.DrillRecord`.

What is read
------------
- Header ``M48`` ... ``%`` (or ``M95``); units from ``METRIC``/``INCH`` (with ``,LZ``/``,TZ``
  and a ``,000.000``-style digit pattern), ``M71``/``M72``; zero suppression from
  ``LZ``/``TZ``; the digit format from the unit line or from comment hints
  (``;FILE_FORMAT=3:3``, ``;Format: 2.4``, ``; FORMAT={2:4/ absolute / inch / ...}``).
  Numbers with a decimal point are read as written. Integer numbers without a stated
  format use 2:4 (inch) or 3:3 (mm) and without a stated zero mode are read with leading
  zeros suppressed; both assumptions are recorded as :class:`~fluxshadow.errors.Notice`.
- Tool tables ``T1C0.300``, ``T01F00S00C0.03150`` (any parameter order), tool
  definitions and changes in the body, ``T0`` unload.
- Drill mode (``G05``, the default): ``X..Y..`` holes with modal coordinates, ``G90``/``G91``
  absolute/incremental, ``G93`` zero offset, ``R<n>X..Y..`` repeats, ``G85`` slots.
- Rout mode: ``G00`` move, ``M15`` plunge, ``G01`` linear and ``G02``/``G03`` arcs (``A``
  radius or ``I``/``J`` centre offsets from the start point), ``M16``/``M17`` retract.
  Every cut becomes one straight slot; arcs are split into chords no longer than 10 degrees
  and with a sagitta of at most :data:`ARC_SAGITTA_MM` (at most 4096 chords per arc).
- Plating, per tool, from the first that applies: an X2-style ``TA.AperFunction`` comment
  (``; #@! TA.AperFunction,Plated,PTH,ViaDrill``), a ``;TYPE=PLATED``/``;TYPE=NON_PLATED``
  comment, the ``TF.FileFunction`` comment (``Plated``/``NonPlated``), the file name
  (``NPTH``, ``NonPlated``, ``unplated``, ``PTH``, ``plated``); otherwise assumed plated.
- Layer span from ``TF.FileFunction,Plated,i,j,Blind`` (or ``Buried``); through files
  (``PTH``, ``NPTH``, ``MixedPlating``) have ``span=None``.

Coordinates leave this module in millimetres, in the file's own frame.
"""

from __future__ import annotations

import itertools
import math
import re
from dataclasses import dataclass, field
from pathlib import Path
from typing import Literal

import numpy as np

from fluxshadow.errors import InputError, LimitError, Notice, ParseError
from fluxshadow.io.records import DrillRecord

__all__ = [
    "ARC_MAX_STEP_DEG",
    "ARC_SAGITTA_MM",
    "looks_like_excellon",
    "parse_excellon",
    "read_excellon",
]

MM_PER_INCH = 25.4
ARC_SAGITTA_MM = 0.005
"""Largest distance (mm) between a routed arc and the chords that replace it."""
ARC_MAX_STEP_DEG = 10.0
"""Largest angle (degrees) one chord of a linearised routed arc may span."""

_MAX_REPEAT = 100_000
_MAX_ARC_CHORDS = 4096
"""Most chords one routed arc becomes (arcs of absurd radius are coarser than the sagitta)."""
_RAISE_HINT = "raise it with max_drill_features in the [limits] table of fluxshadow.toml"
_MAX_NOTICES = 50

Units = Literal["mm", "inch"]

_RE_NUMBER = r"[-+]?(?:\d+\.?\d*|\.\d+)"
_RE_COORD_WORD = re.compile(r"([XYIJA])(" + _RE_NUMBER + r")")
_RE_TOOL = re.compile(r"^T(\d+)((?:[A-Z][-+]?[\d.]*)*)$")
_RE_TOOL_PARAM = re.compile(r"([A-Z])([-+]?[\d.]*)")
_RE_COORDS_ONLY = re.compile(r"^(?:[XYIJA]" + _RE_NUMBER + r")+$")
_RE_GCODE = re.compile(r"^G(\d{1,2})(.*)$")
_RE_MCODE = re.compile(r"^M(\d{1,2})(.*)$")
_RE_REPEAT = re.compile(r"^R(\d+)((?:[XY]" + _RE_NUMBER + r")*)$")
_RE_UNIT_LINE = re.compile(r"^(METRIC|INCH)\s*(?:,(.*))?$")
_RE_DIGIT_PATTERN = re.compile(r"^(0*)\.(0*)$")
_RE_FORMAT_HINT = re.compile(r"(?i)format\s*[:=]?\s*\{?\s*(\d)\s*[:.]\s*(\d)")
_RE_FORMAT_BRACE = re.compile(r"(?i)format\s*=?\s*\{([^}]*)\}")
_RE_TYPE_COMMENT = re.compile(r"(?i)^\s*TYPE\s*=\s*(NON[-_ ]?PLATED|PLATED|NPTH|PTH)\b")
_RE_X2 = re.compile(r"#@!\s*(T[FAOD])\.?\s*([A-Za-z_.$][\w.$]*)?\s*,?\s*(.*)$")
_RE_NONPLATED_NAME = re.compile(r"(?i)npth|non[-_ ]?plated|unplated|non[-_ ]?pth")
_RE_PLATED_NAME = re.compile(r"(?i)pth|plated")
_RE_PAIR_EXTENSION = re.compile(r"(?i)\.tx[1-9]\d*$")

# Header statements that carry no geometry (machine set-up); read and ignored.
_IGNORED_HEADER = re.compile(
    r"^(?:FMAT|VER|ATC|DETECT|OSTOP|BLKD|SBK|SG|TCST|RSB|AFS|CCW|CP|PCR|NCSL|"
    r"TOOLBOX|OM48|R,)\b"
)


@dataclass
class _Tool:
    """A tool as defined in the file (internal, mutable while parsing)."""

    number: int
    diameter: float
    """Diameter as written, in ``units``."""
    units: Units | None
    """Unit in force at the definition (``None``: decided by the end of the file)."""
    plated: bool | None
    plated_from: str | None
    line: int


@dataclass
class _State:
    """Everything the parser carries from line to line."""

    source: str
    units: Units | None = None
    first_units: Units | None = None
    zeros: Literal["LZ", "TZ"] | None = None
    digits: tuple[int, int] | None = None
    hint_units: Units | None = None
    incremental: bool = False
    in_header: bool = False
    rout: bool = False
    motion: int = 0
    plunged: bool = False
    x_mm: float = 0.0
    y_mm: float = 0.0
    offset_mm: tuple[float, float] = (0.0, 0.0)
    tool: int | None = None
    tools: dict[int, _Tool] = field(default_factory=dict)
    ta_plated: bool | None = None
    type_plated: bool | None = None
    file_plated: bool | None = None
    mixed: bool = False
    span: tuple[int, int] | None = None
    last_hole: tuple[float, float] | None = None
    holes: list[tuple[float, float, int]] = field(default_factory=list)
    slots: list[tuple[float, float, float, float, int]] = field(default_factory=list)
    notices: list[Notice] = field(default_factory=list)
    notice_keys: set[str] = field(default_factory=set)
    ended: bool = False
    max_features: int = 10_000_000

    def notice(self, key: str, line: int | None, message: str) -> None:
        """Record a notice once per ``key`` (and at most ``_MAX_NOTICES`` in all)."""
        if key in self.notice_keys or len(self.notices) >= _MAX_NOTICES:
            return
        self.notice_keys.add(key)
        self.notices.append(Notice(file=self.source, line=line, message=message))

    def error(self, line: int, message: str, statement: str) -> ParseError:
        """Build a :class:`ParseError` for ``statement`` on ``line``."""
        return ParseError(message, file=self.source, line=line, statement=statement)


def looks_like_excellon(head: str) -> bool:
    """Tell from the first part of a file whether it is an Excellon drill file.

    Parameters
    ----------
    head : str
        The beginning of the file as text (a few kB is plenty).

    Returns
    -------
    bool
        ``True`` for a file that starts with ``M48`` or that has Excellon tool definitions
        together with unit lines or bare coordinate lines; ``False`` for Gerber files
        (statements ending in ``*``), tables and anything else.
    """
    lines = [ln.strip() for ln in head.splitlines()[:400]]
    lines = [ln for ln in lines if ln]
    if not lines:
        return False
    star_lines = sum(1 for ln in lines if ln.endswith("*"))
    if star_lines >= 2 or any(ln.startswith(("%FS", "%MO", "G04")) for ln in lines[:50]):
        return False
    statements = [ln for ln in lines if not ln.startswith(";")]
    if statements and statements[0] == "M48":
        return True
    has_tool_def = any(re.match(r"^T\d+(?:[A-Z][-+]?[\d.]*)*C\d*\.?\d+", ln) for ln in statements)
    has_units = any(_RE_UNIT_LINE.match(ln) or ln in ("M71", "M72") for ln in statements)
    has_coords = sum(1 for ln in statements if _RE_COORDS_ONLY.match(ln)) >= 2
    has_select = any(re.match(r"^T\d+$", ln) for ln in statements)
    if has_tool_def and (has_units or has_coords):
        return True
    return has_units and has_coords and has_select


def read_excellon(
    path: str | Path, *, max_bytes: int = 100_000_000, max_features: int = 10_000_000
) -> DrillRecord:
    """Read one Excellon drill/rout file.

    Parameters
    ----------
    path : str or Path
        The file. Its name also serves as a plating hint (``NPTH``, ``PTH``, ...).
    max_bytes : int
        Refuse files larger than this (:class:`~fluxshadow.errors.LimitError`).
    max_features : int
        Most holes plus slots (repeats and linearised arcs counted).

    Returns
    -------
    DrillRecord
        Holes and slots in mm; see :func:`parse_excellon`.

    Raises
    ------
    InputError
        The file cannot be read or is binary.
    LimitError
        The file is larger than ``max_bytes`` or has more than ``max_features`` features.
    ParseError
        A statement is malformed or unsupported (with file and line).
    """
    p = Path(path)
    source = str(path)
    try:
        size = p.stat().st_size
    except OSError as exc:
        raise InputError(f"drill file must be readable; got {exc.strerror}", file=source) from exc
    if size > max_bytes:
        raise LimitError(
            f"drill file size must be at most {max_bytes} bytes; got {size} bytes (raise it "
            "with max_file_bytes in the [limits] table of fluxshadow.toml)",
            file=source,
        )
    try:
        data = p.read_bytes()
    except OSError as exc:
        raise InputError(f"drill file must be readable; got {exc.strerror}", file=source) from exc
    if b"\x00" in data[:65536]:
        raise InputError("drill file must be text; got binary data (NUL bytes)", file=source)
    try:
        text = data.decode("utf-8")
    except UnicodeDecodeError:
        text = data.decode("latin-1")
    return parse_excellon(text, source=source, filename_hint=p.name, max_features=max_features)


def parse_excellon(
    text: str,
    *,
    source: str = "<string>",
    filename_hint: str = "",
    max_features: int = 10_000_000,
) -> DrillRecord:
    """Parse Excellon text into holes and slots.

    Parameters
    ----------
    text : str
        The whole file.
    source : str
        Name used in the record and in messages.
    filename_hint : str
        File name used for plating hints; defaults to the last part of ``source``.
    max_features : int
        Most holes plus slots (:class:`~fluxshadow.errors.LimitError` beyond).

    Returns
    -------
    DrillRecord
        ``hole_xy`` (n, 2) mm, ``hole_diameter_mm`` (n,), ``hole_plated`` (n,),
        ``slot_xy`` (k, 2, 2) mm, ``slot_diameter_mm`` (k,), ``slot_plated`` (k,), the layer
        span when the file states one, how plating was decided, the number of tools defined
        and the notices collected while reading.

    Raises
    ------
    ParseError
        A statement is malformed or unsupported; the message names ``source`` and the
        1-based line.
    """
    if not filename_hint and source != "<string>":
        filename_hint = Path(source).name
    st = _State(source=source, max_features=max_features)
    for lineno, raw in enumerate(text.splitlines(), start=1):
        stmt = raw.strip()
        if not stmt:
            continue
        if stmt.startswith(";"):
            _comment(st, stmt[1:], lineno)
            continue
        if st.ended:
            continue
        if ";" in stmt:
            stmt = stmt.split(";", 1)[0].strip()
        _statement(st, stmt.upper(), lineno)
        if len(st.holes) + len(st.slots) > max_features:
            _too_many(st, lineno, 0)
    return _finish(st, filename_hint)


def _too_many(st: _State, lineno: int, extra: int) -> None:
    total = len(st.holes) + len(st.slots) + extra
    msg = f"hole and slot count must be at most {st.max_features}; got {total} ({_RAISE_HINT})"
    raise LimitError(msg, file=st.source, line=lineno)


# ----------------------------------------------------------------------------------------
# comments: format hints, plating, X2 attributes


def _comment(st: _State, body: str, lineno: int) -> None:
    m = _RE_X2.search(body)
    if m:
        _x2(st, m.group(1), m.group(2) or "", m.group(3) or "", lineno)
        return
    m = _RE_TYPE_COMMENT.match(body)
    if m:
        word = m.group(1).upper().replace("-", "").replace("_", "").replace(" ", "")
        st.type_plated = word in ("PLATED", "PTH")
        return
    m = _RE_FORMAT_BRACE.search(body)
    if m:
        _brace_format(st, m.group(1))
        return
    m = _RE_FORMAT_HINT.search(body)
    if m and st.digits is None:
        st.digits = (int(m.group(1)), int(m.group(2)))


def _brace_format(st: _State, inner: str) -> None:
    """Read a ``{i:d/ absolute / inch / suppress trailing zeros}`` style format comment."""
    parts = [p.strip().lower() for p in inner.split("/")]
    if parts:
        m = re.match(r"^(\d)\s*:\s*(\d)$", parts[0])
        if m and st.digits is None:
            st.digits = (int(m.group(1)), int(m.group(2)))
    for p in parts[1:]:
        if p == "incremental":
            st.incremental = True
        elif p in ("inch", "inches"):
            st.hint_units = "inch"
        elif p in ("metric", "mm"):
            st.hint_units = "mm"
        elif st.zeros is None and p in ("suppress trailing zeros", "keep zeros", "keep zeroes"):
            st.zeros = "LZ"
        elif st.zeros is None and p == "suppress leading zeros":
            st.zeros = "TZ"


def _x2(st: _State, kind: str, name: str, value: str, lineno: int) -> None:
    fields = [f.strip() for f in value.split(",")] if value else []
    if kind == "TD":
        if not name or name.lstrip(".") == "AperFunction":
            st.ta_plated = None
        return
    name = name.lstrip(".")
    if kind == "TA" and name == "AperFunction":
        st.ta_plated = _plating_words(fields)
    elif kind == "TF" and name == "FileFunction" and fields:
        head = fields[0].lower()
        if head == "plated":
            st.file_plated = True
        elif head == "nonplated":
            st.file_plated = False
        elif head == "mixedplating":
            st.mixed = True
        if len(fields) >= 4 and fields[3].lower() in ("blind", "buried"):
            try:
                a, b = int(fields[1]), int(fields[2])
            except ValueError as exc:
                msg = (
                    f"FileFunction layer numbers must be integers; got {fields[1]!r}, {fields[2]!r}"
                )
                raise st.error(lineno, msg, value) from exc
            st.span = (min(a, b), max(a, b))


def _plating_words(fields: list[str]) -> bool | None:
    words = {f.lower() for f in fields}
    if words & {"nonplated", "npth"}:
        return False
    if words & {"plated", "pth"}:
        return True
    return None


# ----------------------------------------------------------------------------------------
# statements


def _statement(st: _State, stmt: str, lineno: int) -> None:
    if stmt == "M48":
        st.in_header = True
        return
    if stmt in ("%", "M95"):
        st.in_header = False
        return
    m = _RE_UNIT_LINE.match(stmt)
    if m:
        _unit_line(st, m.group(1), m.group(2) or "", lineno, stmt)
        return
    if stmt in ("LZ", "TZ"):
        st.zeros = "LZ" if stmt == "LZ" else "TZ"
        return
    m = _RE_TOOL.match(stmt)
    if m:
        _tool(st, int(m.group(1)), m.group(2), lineno, stmt)
        return
    if re.match(r"^T\d+[XY]", stmt):
        m2 = re.match(r"^T(\d+)(.*)$", stmt)
        assert m2 is not None
        _tool(st, int(m2.group(1)), "", lineno, stmt)
        _statement(st, m2.group(2), lineno)
        return
    if stmt[0] in "XY" and "G85" not in stmt:
        _coordinates(st, stmt, lineno)
        return
    m = _RE_GCODE.match(stmt)
    if m:
        _gcode(st, int(m.group(1)), m.group(2), lineno, stmt)
        return
    m = _RE_MCODE.match(stmt)
    if m:
        _mcode(st, int(m.group(1)), m.group(2), lineno, stmt)
        return
    m = _RE_REPEAT.match(stmt)
    if m:
        _repeat(st, int(m.group(1)), m.group(2), lineno, stmt)
        return
    if "G85" in stmt:
        _g85(st, stmt, lineno)
        return
    m = re.match(r"^ICI(?:,(ON|OFF))?$", stmt)
    if m:
        st.incremental = m.group(1) != "OFF"
        return
    if _IGNORED_HEADER.match(stmt) or stmt.startswith("/"):
        return
    if st.in_header:
        st.notice(f"header:{stmt[:20]}", lineno, f"unknown header statement {stmt[:40]!r} ignored")
        return
    raise st.error(
        lineno, "drill statement must be a known Excellon command; got an unknown one", stmt
    )


def _unit_line(st: _State, word: str, rest: str, lineno: int, stmt: str) -> None:
    units: Units = "mm" if word == "METRIC" else "inch"
    _set_units(st, units)
    for part in (p.strip() for p in rest.split(",")):
        if not part:
            continue
        if part in ("LZ", "TZ"):
            st.zeros = "LZ" if part == "LZ" else "TZ"
            continue
        dm = _RE_DIGIT_PATTERN.match(part)
        if dm:
            st.digits = (len(dm.group(1)), len(dm.group(2)))
            continue
        msg = "unit statement options must be LZ, TZ or a digit pattern like 000.000"
        raise st.error(lineno, f"{msg}; got {part!r}", stmt)


def _set_units(st: _State, units: Units) -> None:
    st.units = units
    if st.first_units is None:
        st.first_units = units


def _scale(st: _State, lineno: int) -> float:
    """Millimetres per file unit, deciding the unit if the file never did."""
    if st.units is None:
        units: Units = st.hint_units or "inch"
        how = "from a format comment" if st.hint_units else "assumed (no METRIC/INCH statement)"
        st.notice("units", lineno, f"drill units {units} {how}")
        _set_units(st, units)
    return MM_PER_INCH if st.units == "inch" else 1.0


def _number(st: _State, text: str, lineno: int, stmt: str) -> float:
    """A coordinate or offset value in mm."""
    scale = _scale(st, lineno)
    if "." in text:
        try:
            return float(text) * scale
        except ValueError as exc:
            raise st.error(lineno, f"coordinate must be a number; got {text!r}", stmt) from exc
    sign = -1.0 if text.startswith("-") else 1.0
    digits = text.lstrip("+-")
    if not digits.isdigit():
        raise st.error(lineno, f"coordinate must be digits; got {text!r}", stmt)
    if st.digits is None:
        st.digits = (2, 4) if st.units == "inch" else (3, 3)
        st.notice(
            "digits",
            lineno,
            f"number format not stated; {st.digits[0]}:{st.digits[1]} assumed for {st.units}",
        )
    int_digits, dec_digits = st.digits
    if st.zeros is None:
        st.zeros = "TZ"
        st.notice(
            "zeros",
            lineno,
            "zero suppression not stated (no LZ/TZ); leading zeros assumed suppressed",
        )
    if st.zeros == "LZ":
        # leading zeros kept, trailing zeros dropped: the first int_digits are the integer
        digits = digits.ljust(int_digits + dec_digits, "0")
        value = int(digits) * 10.0 ** (int_digits - len(digits))
    else:
        value = int(digits) * 10.0**-dec_digits
    return sign * value * scale


def _tool(st: _State, number: int, params: str, lineno: int, stmt: str) -> None:
    diameter: float | None = None
    for pm in _RE_TOOL_PARAM.finditer(params):
        if pm.group(1) == "C":
            try:
                diameter = float(pm.group(2))
            except ValueError as exc:
                msg = f"tool diameter must be a number; got {pm.group(2)!r}"
                raise st.error(lineno, msg, stmt) from exc
    if diameter is None:
        if number == 0:
            st.tool = None
            return
        st.tool = number
        if number not in st.tools and not st.in_header:
            st.notice(
                f"tool-undefined:{number}",
                lineno,
                f"tool T{number} is used without a diameter; its holes get diameter 0",
            )
        return
    if diameter < 0:
        raise st.error(lineno, f"tool diameter must be >= 0; got {diameter}", stmt)
    plated: bool | None = None
    plated_from: str | None = None
    if st.ta_plated is not None:
        plated, plated_from = st.ta_plated, "attribute"
    elif st.type_plated is not None:
        plated, plated_from = st.type_plated, "comment"
    st.tools[number] = _Tool(number, diameter, st.units, plated, plated_from, lineno)
    if not st.in_header:
        st.tool = number


def _words(st: _State, text: str, lineno: int, stmt: str) -> dict[str, float]:
    """Parse ``X..Y..I..J..A..`` words into mm values (rest of the text must be empty)."""
    out: dict[str, float] = {}
    pos = 0
    for m in _RE_COORD_WORD.finditer(text):
        if m.start() != pos:
            break
        if m.group(1) in out:
            raise st.error(
                lineno, f"each axis must appear once per statement; got two {m.group(1)}", stmt
            )
        out[m.group(1)] = _number(st, m.group(2), lineno, stmt)
        pos = m.end()
    if pos != len(text):
        raise st.error(
            lineno, f"coordinates must be X/Y words with numbers; got {text[pos:]!r}", stmt
        )
    return out


def _target(st: _State, words: dict[str, float]) -> tuple[float, float]:
    """New absolute position (mm) after coordinate words, honouring modal and G91."""
    if st.incremental:
        return st.x_mm + words.get("X", 0.0), st.y_mm + words.get("Y", 0.0)
    ox, oy = st.offset_mm
    x = words["X"] + ox if "X" in words else st.x_mm
    y = words["Y"] + oy if "Y" in words else st.y_mm
    return x, y


def _need_tool(st: _State, lineno: int, stmt: str) -> int:
    if st.tool is None:
        raise st.error(
            lineno, "a tool must be selected before drilling; got coordinates with no tool", stmt
        )
    return st.tool


def _coordinates(st: _State, stmt: str, lineno: int) -> None:
    words = _words(st, stmt, lineno, stmt)
    if not st.rout:
        if set(words) - {"X", "Y"}:
            raise st.error(lineno, "a drill hit must have only X and Y; got arc words", stmt)
        x, y = _target(st, words)
        tool = _need_tool(st, lineno, stmt)
        st.holes.append((x, y, tool))
        st.x_mm, st.y_mm = x, y
        st.last_hole = (x, y)
        return
    _rout_move(st, st.motion, words, lineno, stmt)


def _rout_move(st: _State, motion: int, words: dict[str, float], lineno: int, stmt: str) -> None:
    x0, y0 = st.x_mm, st.y_mm
    x1, y1 = _target(st, words)
    if motion == 0 or not st.plunged:
        if motion != 0 and not st.plunged:
            st.notice(
                "cut-retracted",
                lineno,
                f"G0{motion} move with the tool retracted (no M15) cuts nothing",
            )
        st.x_mm, st.y_mm = x1, y1
        return
    tool = _need_tool(st, lineno, stmt)
    if motion == 1:
        if set(words) - {"X", "Y"}:
            raise st.error(lineno, "a linear rout move must have only X and Y; got arc words", stmt)
        st.slots.append((x0, y0, x1, y1, tool))
    else:
        for a, b in _arc_chords(st, (x0, y0), (x1, y1), words, motion == 2, lineno, stmt):
            st.slots.append((a[0], a[1], b[0], b[1], tool))
    st.x_mm, st.y_mm = x1, y1


def _arc_chords(
    st: _State,
    start: tuple[float, float],
    end: tuple[float, float],
    words: dict[str, float],
    clockwise: bool,
    lineno: int,
    stmt: str,
) -> list[tuple[tuple[float, float], tuple[float, float]]]:
    """Split a routed arc (mm) into chords; centre from ``A`` (radius) or ``I``/``J``."""
    (x0, y0), (x1, y1) = start, end
    if "A" in words:
        r_signed = words["A"]
        r = abs(r_signed)
        dx, dy = x1 - x0, y1 - y0
        d = math.hypot(dx, dy)
        if d == 0.0 or r < d / 2 - 1e-9:
            msg = f"arc radius must be at least half the chord ({d / 2:.4f} mm); got {r:.4f} mm"
            raise st.error(lineno, msg, stmt)
        h = math.sqrt(max(r * r - d * d / 4, 0.0))
        nx, ny = -dy / d, dx / d  # left of the chord direction
        side = 1.0 if not clockwise else -1.0
        if r_signed < 0:
            side = -side  # negative radius: the long way round
        cx, cy = (x0 + x1) / 2 + side * h * nx, (y0 + y1) / 2 + side * h * ny
    elif "I" in words or "J" in words:
        cx, cy = x0 + words.get("I", 0.0), y0 + words.get("J", 0.0)
        r = math.hypot(x0 - cx, y0 - cy)
        if r == 0.0:
            raise st.error(lineno, "arc centre must differ from its start; got I=J=0", stmt)
    else:
        raise st.error(
            lineno, "an arc must give a radius A or centre offsets I/J; got neither", stmt
        )
    a0 = math.atan2(y0 - cy, x0 - cx)
    a1 = math.atan2(y1 - cy, x1 - cx)
    if clockwise:
        sweep = -((a0 - a1) % (2 * math.pi))
    else:
        sweep = (a1 - a0) % (2 * math.pi)
    if sweep == 0.0:
        sweep = -2 * math.pi if clockwise else 2 * math.pi
    step = math.radians(ARC_MAX_STEP_DEG)
    if r > ARC_SAGITTA_MM:
        step = min(step, 2 * math.acos(1 - ARC_SAGITTA_MM / r))
    n = min(max(1, math.ceil(abs(sweep) / step - 1e-9)), _MAX_ARC_CHORDS)
    if len(st.holes) + len(st.slots) + n > st.max_features:
        _too_many(st, lineno, n)
    pts = [
        (cx + r * math.cos(a0 + sweep * k / n), cy + r * math.sin(a0 + sweep * k / n))
        for k in range(n + 1)
    ]
    pts[0], pts[-1] = (x0, y0), (x1, y1)
    return list(itertools.pairwise(pts))


def _g85(st: _State, stmt: str, lineno: int) -> None:
    first, _, second = stmt.partition("G85")
    w0 = _words(st, first, lineno, stmt)
    w1 = _words(st, second, lineno, stmt)
    if (set(w0) | set(w1)) - {"X", "Y"}:
        raise st.error(lineno, "a G85 slot must have only X and Y; got other words", stmt)
    x0, y0 = _target(st, w0)
    st.x_mm, st.y_mm = x0, y0
    x1, y1 = _target(st, w1)
    tool = _need_tool(st, lineno, stmt)
    st.slots.append((x0, y0, x1, y1, tool))
    st.x_mm, st.y_mm = x1, y1


def _gcode(st: _State, code: int, rest: str, lineno: int, stmt: str) -> None:
    if code in (0, 1, 2, 3):
        st.rout = True
        st.motion = code
        if code == 0:
            st.plunged = False
        if rest:
            words = _words(st, rest, lineno, stmt)
            _rout_move(st, code, words, lineno, stmt)
        return
    if code == 5:
        st.rout = False
        st.plunged = False
    elif code == 90:
        st.incremental = False
    elif code == 91:
        st.incremental = True
    elif code == 93:
        words = _words(st, rest, lineno, stmt)
        st.offset_mm = (words.get("X", 0.0), words.get("Y", 0.0))
        return
    elif code in (40, 41, 42):
        if code != 40:
            st.notice(
                "cutter-comp",
                lineno,
                "cutter compensation (G41/G42) ignored: rout paths kept on the centre line",
            )
    elif code == 85:
        _g85(st, stmt, lineno)
        return
    elif code in (80, 81):
        pass  # canned drill cycle on/off: holes are the coordinate lines themselves
    else:
        raise st.error(lineno, f"G code must be one Excellon supports; got G{code:02d}", stmt)
    if rest:
        if _RE_COORDS_ONLY.match(rest):
            _coordinates(st, rest, lineno)
        else:
            raise st.error(
                lineno, f"text after G{code:02d} must be coordinates; got {rest!r}", stmt
            )


def _mcode(st: _State, code: int, rest: str, lineno: int, stmt: str) -> None:
    if code == 15:
        st.plunged = True
    elif code in (16, 17):
        st.plunged = False
    elif code in (0, 30):
        st.ended = True
    elif code == 71:
        _set_units(st, "mm")
    elif code == 72:
        _set_units(st, "inch")
    elif code in (97, 98):
        st.notice("canned-text", lineno, "canned text (M97/M98) is not drilled here; ignored")
    elif code in (6, 9, 45, 47, 50, 51, 60, 96, 99):
        pass  # operator stops and messages: no geometry
    else:
        # M25/M01/M02/M08 patterns, M70/M80/M90 axis swap and mirror images, ...
        msg = "M code must be one this reader supports (M15-M17, M30, M71, M72, ...)"
        raise st.error(lineno, f"{msg}; got M{code:02d}", stmt)


def _repeat(st: _State, count: int, rest: str, lineno: int, stmt: str) -> None:
    if st.rout:
        raise st.error(lineno, "a repeat (R) must be in drill mode; got it in rout mode", stmt)
    if st.last_hole is None:
        raise st.error(lineno, "a repeat (R) must follow a hole; got no hole before it", stmt)
    if count > _MAX_REPEAT:
        raise st.error(lineno, f"repeat count must be at most {_MAX_REPEAT}; got {count}", stmt)
    words = _words(st, rest, lineno, stmt)
    dx, dy = words.get("X", 0.0), words.get("Y", 0.0)
    tool = _need_tool(st, lineno, stmt)
    if len(st.holes) + len(st.slots) + count > st.max_features:
        _too_many(st, lineno, count)
    x, y = st.last_hole
    for _ in range(count):
        x, y = x + dx, y + dy
        st.holes.append((x, y, tool))
    st.x_mm, st.y_mm = x, y
    st.last_hole = (x, y)


# ----------------------------------------------------------------------------------------
# finishing: plating, span, arrays


def _finish(st: _State, filename_hint: str) -> DrillRecord:
    name_plated: bool | None = None
    if filename_hint:
        if _RE_NONPLATED_NAME.search(filename_hint):
            name_plated = False
        elif _RE_PLATED_NAME.search(filename_hint):
            name_plated = True
    used = {h[2] for h in st.holes} | {s[4] for s in st.slots}
    for number in sorted(used - set(st.tools)):
        st.tools[number] = _Tool(number, 0.0, None, None, None, 0)
    default_units: Units = st.first_units or st.hint_units or "inch"
    diameter_mm = {
        t.number: t.diameter * (MM_PER_INCH if (t.units or default_units) == "inch" else 1.0)
        for t in st.tools.values()
    }
    sources: set[str] = set()
    for tool in st.tools.values():
        if tool.plated is None:
            if st.file_plated is not None:
                tool.plated, tool.plated_from = st.file_plated, "attribute"
            elif name_plated is not None and not st.mixed:
                tool.plated, tool.plated_from = name_plated, "file name"
            else:
                tool.plated, tool.plated_from = True, "assumed plated"
                if st.mixed:
                    st.notice(
                        f"mixed-unknown:{tool.number}",
                        tool.line or None,
                        f"tool T{tool.number} in a mixed-plating file has no plating attribute; "
                        "assumed plated",
                    )
        if tool.number in used or not used:
            sources.add(tool.plated_from or "assumed plated")
    order = ["attribute", "comment", "tool table", "file name", "assumed plated"]
    if not sources:
        if st.file_plated is not None:
            sources = {"attribute"}
        elif name_plated is not None:
            sources = {"file name"}
        else:
            sources = {"assumed plated"}
    plating_from = max(sources, key=order.index)
    if len(sources) > 1:
        st.notice(
            "plating-mixed-sources",
            None,
            "plating decided from several sources: " + ", ".join(sorted(sources, key=order.index)),
        )
    if st.span is None and filename_hint and _RE_PAIR_EXTENSION.search(filename_hint):
        st.notice(
            "span-unstated",
            None,
            f"file extension of {filename_hint!r} marks a layer-pair drill file but the file "
            "does not state its layer span; holes treated as through holes",
        )
    n = len(st.holes)
    hole_xy = np.array([(h[0], h[1]) for h in st.holes], dtype=np.float64).reshape(n, 2)
    hole_d = np.array([diameter_mm[h[2]] for h in st.holes], dtype=np.float64)
    hole_p = np.array([bool(st.tools[h[2]].plated) for h in st.holes], dtype=np.bool_)
    k = len(st.slots)
    slot_xy = np.array([((s[0], s[1]), (s[2], s[3])) for s in st.slots], dtype=np.float64)
    slot_xy = slot_xy.reshape(k, 2, 2)
    slot_d = np.array([diameter_mm[s[4]] for s in st.slots], dtype=np.float64)
    slot_p = np.array([bool(st.tools[s[4]].plated) for s in st.slots], dtype=np.bool_)
    defined = sum(1 for t in st.tools.values() if t.line)
    return DrillRecord(
        source=st.source,
        units_in_file=default_units,
        hole_xy=hole_xy,
        hole_diameter_mm=hole_d.reshape(n),
        hole_plated=hole_p.reshape(n),
        slot_xy=slot_xy,
        slot_diameter_mm=slot_d.reshape(k),
        slot_plated=slot_p.reshape(k),
        span=st.span,
        plating_from=plating_from,
        tool_count=defined,
        notices=tuple(st.notices),
    )
