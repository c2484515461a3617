"""Placement (pick-and-place) and bill-of-materials tables to plain rows.

Dialects are recognised by structure, never by who wrote them:

- Encoding: UTF-8 with or without a byte-order mark, UTF-16 (byte-order mark or NUL-byte
  pattern), else Windows-1252 (with a notice).
- Layout: comma, tab or semicolon separated (quoted fields, commas inside quotes), or a
  whitespace-aligned text table (quoted fields allowed; column positions from the header
  line when a row does not split into as many fields as the header has), including the
  ``#``-commented position format (``# Ref Val ...`` header, ``## Unit = mm`` lines).
- Banner lines before the header are skipped; the header is the first line naming a
  designator column and either X and Y columns (placement) or a value, package or quantity
  column (BOM).
- Header synonyms: designator (Ref, Designator, RefDes, Reference, ...), value (Val, Value,
  Comment, Name), package (Package, Footprint, Pattern), X/Y (Mid X, MidX, Center-X, PosX,
  X, Ref X, ...: centre columns win over reference-point columns), rotation (Rot, Rotation,
  Angle), side (Side, Layer), description.
- Units: a suffix on the number (``45.72mm``, ``1800mil``, ``1.2in``), else a unit in the
  column name (``Center-X(mm)``, ``X (mil)``), else a banner line (``Units used: mm``,
  ``## Unit = mm``), else millimetres with a notice.
- Sides: top/t/front/f/toplayer/"top layer"/1 and bottom/b/back/bot/bottomlayer/"bottom
  layer"/2. Coordinates are kept exactly as the file gives them: a mirrored bottom-side X is
  not undone here (the board model registers the placement frame to the artwork).

Rotations are returned in degrees in [0, 360). Every notice names the file and the 1-based
line it is about.
"""

from __future__ import annotations

import csv
import io
import re
from collections.abc import Iterable, Iterator, Sequence
from dataclasses import dataclass, replace
from pathlib import Path
from typing import Literal

from fluxshadow.errors import InputError, LimitError, Notice
from fluxshadow.io.records import BomRow, PlacementRow

__all__ = [
    "decode_table",
    "join_bom",
    "parse_bom",
    "parse_placement",
    "read_bom",
    "read_placement",
    "sniff_table",
]

Role = Literal["ref", "value", "package", "x", "y", "rot", "side", "desc", "qty"]
LengthUnit = Literal["mm", "mil", "inch"]

_MM_PER: dict[LengthUnit, float] = {"mm": 1.0, "mil": 0.0254, "inch": 25.4}
_HEADER_SEARCH_LINES = 200
_SNIFF_BYTES = 65536
_MAX_RANGE = 1000
_MAX_MISSING_NOTICES = 20

# normalised header name -> (role, priority); lower priority wins when several match
_SYNONYMS: dict[str, tuple[Role, int]] = {
    # designator
    "designator": ("ref", 0),
    "designators": ("ref", 0),
    "ref": ("ref", 0),
    "refs": ("ref", 0),
    "refdes": ("ref", 0),
    "reference": ("ref", 0),
    "references": ("ref", 0),
    "referencedesignator": ("ref", 0),
    "referencedesignators": ("ref", 0),
    "part": ("ref", 2),
    "parts": ("ref", 2),
    # value
    "value": ("value", 0),
    "val": ("value", 0),
    "comment": ("value", 1),
    "name": ("value", 2),
    # package
    "package": ("package", 0),
    "footprint": ("package", 0),
    "pattern": ("package", 1),
    "packagename": ("package", 1),
    "footprintname": ("package", 1),
    "case": ("package", 2),
    # x / y
    "midx": ("x", 0),
    "centerx": ("x", 0),
    "centrex": ("x", 0),
    "posx": ("x", 1),
    "x": ("x", 1),
    "locationx": ("x", 1),
    "positionx": ("x", 1),
    "refx": ("x", 2),
    "midy": ("y", 0),
    "centery": ("y", 0),
    "centrey": ("y", 0),
    "posy": ("y", 1),
    "y": ("y", 1),
    "locationy": ("y", 1),
    "positiony": ("y", 1),
    "refy": ("y", 2),
    # rotation
    "rotation": ("rot", 0),
    "rot": ("rot", 0),
    "angle": ("rot", 1),
    "orientation": ("rot", 1),
    "rotate": ("rot", 1),
    # side
    "side": ("side", 0),
    "layer": ("side", 1),
    "boardside": ("side", 0),
    "placementside": ("side", 0),
    # other
    "description": ("desc", 0),
    "desc": ("desc", 1),
    "qty": ("qty", 0),
    "quantity": ("qty", 0),
}

_UNIT_WORDS: dict[str, LengthUnit] = {
    "mm": "mm",
    "millimeter": "mm",
    "millimeters": "mm",
    "millimetre": "mm",
    "millimetres": "mm",
    "mil": "mil",
    "mils": "mil",
    "thou": "mil",
    "in": "inch",
    "inch": "inch",
    "inches": "inch",
    '"': "inch",
}

_TOP_WORDS = {"top", "t", "front", "f", "toplayer", "1", "topside", "componentside", "fcu"}
_BOTTOM_WORDS = {"bottom", "b", "back", "bot", "bottomlayer", "bottomside", "solderside", "bcu"}

_RE_HEADER_UNIT = re.compile(r"[(\[]\s*(mm|mils?|thou|in|inch|inches)\s*[)\]]", re.IGNORECASE)
_RE_BANNER_UNIT = re.compile(
    r"(?i)\bunits?\b(?:\s+used)?\s*[:=]\s*(mm|millimet\w*|mils?|thou|inch\w*|in)\b"
)
_RE_BANNER_SIDE = re.compile(r"(?i)^#*\s*side\s*:\s*(\w+)")
_RE_LENGTH = re.compile(
    r"""^\s*([-+]?(?:\d[\d,]*(?:\.\d*)?|\.\d+|\d+,\d+)(?:[eE][-+]?\d+)?)\s*
    (mm|millimet(?:er|re)s?|mils?|thou|in|inch|inches|")?\s*$""",
    re.IGNORECASE | re.VERBOSE,
)
_RE_ANGLE = re.compile(
    r"^\s*([-+]?(?:\d+(?:[.,]\d*)?|\.\d+))\s*(?:deg|degrees|°)?\s*$", re.IGNORECASE
)
_RE_RANGE = re.compile(r"^([A-Za-z_]+)(\d+)\s*-\s*(?:\1)?(\d+)$")


@dataclass(frozen=True)
class _Column:
    index: int
    role: Role
    priority: int
    unit: LengthUnit | None


@dataclass(frozen=True)
class _Table:
    """A located header and how to split the rows under it."""

    source: str
    lines: tuple[str, ...]
    header_index: int
    """0-based index of the header line in ``lines``."""
    delimiter: str | None
    """``None`` for a whitespace-aligned table."""
    names: tuple[str, ...]
    columns: dict[Role, _Column]
    column_starts: tuple[int, ...]
    """Character positions of the header names (whitespace tables only)."""
    banner_unit: LengthUnit | None
    banner_side: Literal["top", "bottom"] | None


# ----------------------------------------------------------------------------------------
# public API


def read_placement(
    path: str | Path, *, max_bytes: int = 50_000_000
) -> tuple[list[PlacementRow], tuple[Notice, ...]]:
    """Read a placement (pick-and-place) file.

    Parameters
    ----------
    path : str or Path
        The file.
    max_bytes : int
        Refuse files larger than this.

    Returns
    -------
    rows : list of PlacementRow
        One row per placed part in file order, coordinates in mm in the file's frame.
    notices : tuple of Notice
        Skipped rows, duplicate designators, assumed units or sides, encoding fallbacks.

    Raises
    ------
    InputError
        The file cannot be read or has no placement header (designator, X and Y columns).
    LimitError
        The file is larger than ``max_bytes``.
    """
    text, notices = _read_text(path, max_bytes)
    rows, more = parse_placement(text, source=str(path))
    return rows, (*notices, *more)


def read_bom(
    path: str | Path, *, max_bytes: int = 50_000_000
) -> tuple[list[BomRow], tuple[Notice, ...]]:
    """Read a bill of materials, one :class:`BomRow` per designator.

    Parameters
    ----------
    path : str or Path
        The file.
    max_bytes : int
        Refuse files larger than this.

    Returns
    -------
    rows : list of BomRow
        Multi-designator cells (``"C1, C2"``, ``C1 C2``, ``R1-R4``) are split.
    notices : tuple of Notice

    Raises
    ------
    InputError
        The file cannot be read or has no BOM header (designator plus value, package or
        quantity columns).
    LimitError
        The file is larger than ``max_bytes``.
    """
    text, notices = _read_text(path, max_bytes)
    rows, more = parse_bom(text, source=str(path))
    return rows, (*notices, *more)


def sniff_table(path_or_text: str | Path) -> Literal["placement", "bom", "other"]:
    """Say whether a file (or text) is a placement table, a BOM, or neither.

    Parameters
    ----------
    path_or_text : str or Path
        A :class:`~pathlib.Path`, a ``str`` naming an existing file, or the text itself.
        Only the first 64 kB are looked at.

    Returns
    -------
    {"placement", "bom", "other"}
        ``"placement"`` when a header row names a designator and X and Y columns, ``"bom"``
        when it names a designator and a value, package or quantity column but no
        coordinates, ``"other"`` otherwise (also for unreadable or binary files).
    """
    text: str
    if isinstance(path_or_text, Path) or _is_file(path_or_text):
        try:
            with Path(path_or_text).open("rb") as fh:
                data = fh.read(_SNIFF_BYTES)
            text, _ = decode_table(data, source=str(path_or_text))
        except (OSError, InputError):
            return "other"
    else:
        text = path_or_text[:_SNIFF_BYTES]
    lines = tuple(text.splitlines())
    table = _find_header(lines, source="", want="placement")
    if table is not None:
        return "placement"
    table = _find_header(lines, source="", want="bom")
    return "bom" if table is not None else "other"


def _is_file(text: str) -> bool:
    if "\n" in text or len(text) > 4096:
        return False
    try:
        return Path(text).is_file()
    except (OSError, ValueError):
        return False


def join_bom(
    rows: Sequence[PlacementRow],
    bom_rows: Iterable[BomRow],
    *,
    notices: list[Notice] | None = None,
) -> list[PlacementRow]:
    """Fill value, package and description of placement rows from a BOM.

    Parameters
    ----------
    rows : sequence of PlacementRow
    bom_rows : iterable of BomRow
        When a designator appears on several BOM lines, the first one is used.
    notices : list of Notice, optional
        If given, a notice is appended for every placed designator missing from the BOM
        (one summary notice after the first 20).

    Returns
    -------
    list of PlacementRow
        New rows; fields the placement already has are kept, empty ones are filled.
    """
    by_ref: dict[str, BomRow] = {}
    for b in bom_rows:
        by_ref.setdefault(_ref_key(b.ref), b)
    out: list[PlacementRow] = []
    missing: list[PlacementRow] = []
    for row in rows:
        bom = by_ref.get(_ref_key(row.ref))
        if bom is None:
            missing.append(row)
            out.append(row)
            continue
        out.append(
            replace(
                row,
                value=row.value or bom.value,
                package=row.package or bom.package,
                description=row.description or bom.description,
            )
        )
    if notices is not None and missing:
        for row in missing[:_MAX_MISSING_NOTICES]:
            notices.append(
                Notice(
                    file=row.source,
                    line=row.line,
                    message=f"designator {row.ref!r} is not in the BOM; value and package "
                    "left as the placement gives them",
                )
            )
        if len(missing) > _MAX_MISSING_NOTICES:
            notices.append(
                Notice(
                    file=missing[0].source,
                    line=None,
                    message=f"{len(missing)} placed designators in all are not in the BOM",
                )
            )
    return out


def parse_placement(
    text: str, *, source: str = "<string>"
) -> tuple[list[PlacementRow], tuple[Notice, ...]]:
    """Parse placement text (already decoded); see :func:`read_placement`."""
    lines = tuple(text.splitlines())
    table = _find_header(lines, source=source, want="placement")
    if table is None:
        raise InputError(
            "placement file must have a header row naming a designator column "
            "(Designator/Ref/RefDes) and X and Y columns (Mid X/PosX/Center-X/X, Y alike); "
            f"got {_first_line(lines)}",
            file=source,
        )
    notices: list[Notice] = []
    rows: list[PlacementRow] = []
    cols = table.columns
    x_col, y_col = cols["x"], cols["y"]
    rot_col, side_col = cols.get("rot"), cols.get("side")
    unit_assumed_line: int | None = None
    side_default = table.banner_side
    if side_col is None and side_default is None:
        guess = _side_from_name(source)
        side_default = guess or "top"
        how = "from the file name" if guess else "assumed (no side column)"
        notices.append(
            Notice(file=source, line=None, message=f"side {side_default} {how} for every row")
        )
    if rot_col is None:
        notices.append(
            Notice(file=source, line=None, message="no rotation column; rotation 0 assumed")
        )
    for lineno, cells in _rows(table):
        ref = _cell(cells, cols["ref"]).strip()
        if not ref:
            notices.append(_skip(source, lineno, "it has no designator"))
            continue
        raw_x, raw_y = _cell(cells, x_col), _cell(cells, y_col)
        if not raw_x.strip() or not raw_y.strip():
            notices.append(_skip(source, lineno, f"{ref} has no X or Y"))
            continue
        x = _length_mm(raw_x, x_col.unit or table.banner_unit)
        y = _length_mm(raw_y, y_col.unit or table.banner_unit)
        if x is None or y is None:
            bad = raw_x if x is None else raw_y
            notices.append(_skip(source, lineno, f"{ref} X/Y must be a length; got {bad!r}"))
            continue
        if (x[1] or y[1]) and unit_assumed_line is None:
            unit_assumed_line = lineno
        rotation = 0.0
        if rot_col is not None:
            raw_rot = _cell(cells, rot_col)
            angle = _angle(raw_rot)
            if angle is None:
                what = "has no rotation" if not raw_rot.strip() else f"rotation {raw_rot!r}"
                notices.append(_skip(source, lineno, f"{ref} {what} is not an angle"))
                continue
            rotation = angle
        side: Literal["top", "bottom"]
        if side_col is not None:
            raw_side = _cell(cells, side_col)
            parsed = _side_word(raw_side)
            if parsed is None:
                notices.append(
                    _skip(source, lineno, f"{ref} side must be top or bottom; got {raw_side!r}")
                )
                continue
            side = parsed
        else:
            assert side_default is not None
            side = side_default
        rows.append(
            PlacementRow(
                ref=ref,
                value=_cell(cells, cols.get("value")).strip(),
                package=_cell(cells, cols.get("package")).strip(),
                x_mm=x[0],
                y_mm=y[0],
                rotation_deg=rotation,
                side=side,
                source=source,
                line=lineno,
                description=_cell(cells, cols.get("desc")).strip(),
            )
        )
    if unit_assumed_line is not None:
        notices.append(
            Notice(
                file=source,
                line=unit_assumed_line,
                message="no length unit stated (cell suffix, column name or banner); "
                "millimetres assumed",
            )
        )
    notices.extend(_duplicates(rows, source, "placement"))
    return rows, tuple(notices)


def parse_bom(text: str, *, source: str = "<string>") -> tuple[list[BomRow], tuple[Notice, ...]]:
    """Parse BOM text (already decoded); see :func:`read_bom`."""
    lines = tuple(text.splitlines())
    table = _find_header(lines, source=source, want="bom")
    if table is None:
        raise InputError(
            "BOM file must have a header row naming a designator column "
            "(Designator/Ref/References) and a value, package or quantity column "
            "(Value/Val/Comment, Package/Footprint, Qty); "
            f"got {_first_line(lines)}",
            file=source,
        )
    cols = table.columns
    notices: list[Notice] = []
    rows: list[BomRow] = []
    for lineno, cells in _rows(table):
        cell = _cell(cells, cols["ref"])
        refs = _split_refs(cell)
        if not refs:
            if any(c.strip() for c in cells):
                notices.append(_skip(source, lineno, "the BOM line has no designator"))
            continue
        value = _cell(cells, cols.get("value")).strip()
        package = _cell(cells, cols.get("package")).strip()
        desc = _cell(cells, cols.get("desc")).strip()
        for ref in refs:
            rows.append(
                BomRow(
                    ref=ref,
                    value=value,
                    package=package,
                    description=desc,
                    source=source,
                    line=lineno,
                )
            )
    notices.extend(_duplicates(rows, source, "BOM"))
    return rows, tuple(notices)


def decode_table(data: bytes, *, source: str = "<bytes>") -> tuple[str, tuple[Notice, ...]]:
    """Decode a text table: UTF-8 (BOM optional), UTF-16 (BOM or NUL pattern), else cp1252.

    Parameters
    ----------
    data : bytes
    source : str
        Name used in messages.

    Returns
    -------
    text : str
    notices : tuple of Notice
        A notice when the bytes were not UTF-8 or UTF-16.

    Raises
    ------
    InputError
        The bytes look binary.
    """
    if data.startswith((b"\xff\xfe", b"\xfe\xff")):
        return _decode_strict(data, "utf-16", source), ()
    if data.startswith(b"\xef\xbb\xbf"):
        return _decode_strict(data, "utf-8-sig", source), ()
    sample = data[:4096]
    if b"\x00" in sample:
        even = sample[0::2].count(0)
        odd = sample[1::2].count(0)
        half = len(sample) // 2
        if odd > 0.4 * half and even < 0.05 * half:
            return _decode_strict(data, "utf-16-le", source), ()
        if even > 0.4 * half and odd < 0.05 * half:
            return _decode_strict(data, "utf-16-be", source), ()
        raise InputError("table file must be text; got binary data (NUL bytes)", file=source)
    try:
        return data.decode("utf-8"), ()
    except UnicodeDecodeError:
        pass
    try:
        text = data.decode("cp1252")
    except UnicodeDecodeError:
        text = data.decode("latin-1")
    note = Notice(file=source, line=None, message="file is not UTF-8; read as Windows-1252")
    return text, (note,)


# ----------------------------------------------------------------------------------------
# reading and header detection


def _read_text(path: str | Path, max_bytes: int) -> tuple[str, tuple[Notice, ...]]:
    p = Path(path)
    source = str(path)
    try:
        size = p.stat().st_size
        if size > max_bytes:
            raise LimitError(
                f"table file size must be at most {max_bytes} bytes; got {size} bytes",
                file=source,
            )
        data = p.read_bytes()
    except OSError as exc:
        raise InputError(f"table file must be readable; got {exc.strerror}", file=source) from exc
    return decode_table(data, source=source)


def _decode_strict(data: bytes, encoding: str, source: str) -> str:
    try:
        return data.decode(encoding)
    except UnicodeDecodeError as exc:
        raise InputError(
            f"table file must be valid {encoding}; got a bad byte at offset {exc.start}",
            file=source,
        ) from exc


def _first_line(lines: Sequence[str]) -> str:
    for ln in lines:
        if ln.strip():
            shown = ln.strip()
            return repr(shown if len(shown) <= 60 else shown[:57] + "...")
    return "an empty file"


def _norm_header(name: str) -> tuple[str, LengthUnit | None]:
    """Normalised column name (lower case, letters and digits only) and a unit it names."""
    unit: LengthUnit | None = None
    m = _RE_HEADER_UNIT.search(name)
    if m:
        unit = _UNIT_WORDS[m.group(1).lower()]
        name = name[: m.start()] + name[m.end() :]
    key = re.sub(r"[^0-9a-z]", "", name.lower())
    return key, unit


def _classify(names: Sequence[str]) -> dict[Role, _Column]:
    cols: dict[Role, _Column] = {}
    for i, name in enumerate(names):
        key, unit = _norm_header(name)
        hit = _SYNONYMS.get(key)
        if hit is None:
            continue
        role, prio = hit
        old = cols.get(role)
        if old is None or prio < old.priority:
            cols[role] = _Column(i, role, prio, unit)
    return cols


def _delimiter_of(line: str) -> str | None:
    counts = dict.fromkeys("\t,;", 0)
    quoted = False
    for ch in line:
        if ch == '"':
            quoted = not quoted
        elif not quoted and ch in counts:
            counts[ch] += 1
    for d in "\t,;":
        if counts[d]:
            return d
    return None


def _split_delimited(line: str, delimiter: str) -> list[str]:
    return next(csv.reader([line], delimiter=delimiter, skipinitialspace=True), [])


def _split_ws(line: str) -> list[tuple[str, int, int]]:
    """Whitespace tokens with ``"quoted fields"`` (``""`` inside is a quote): (text, start, end)."""
    out: list[tuple[str, int, int]] = []
    i, n = 0, len(line)
    while i < n:
        if line[i].isspace():
            i += 1
            continue
        start = i
        if line[i] == '"':
            i += 1
            buf: list[str] = []
            while i < n:
                if line[i] == '"':
                    if i + 1 < n and line[i + 1] == '"':
                        buf.append('"')
                        i += 2
                        continue
                    i += 1
                    break
                buf.append(line[i])
                i += 1
            while i < n and not line[i].isspace():  # text glued to a closing quote
                buf.append(line[i])
                i += 1
            out.append(("".join(buf), start, i))
        else:
            while i < n and not line[i].isspace():
                i += 1
            out.append((line[start:i], start, i))
    return out


def _header_candidates(line: str) -> tuple[str | None, list[str], tuple[int, ...]]:
    stripped = line.lstrip()
    if stripped.startswith("#"):
        # commented header: blank the marks so column positions stay aligned with the rows
        lead = len(line) - len(line.lstrip(" \t#"))
        body = " " * lead + line[lead:]
        toks = _split_ws(body)
        return None, [t[0] for t in toks], tuple(t[1] for t in toks)
    delim = _delimiter_of(line)
    if delim is None:
        toks = _split_ws(line)
        return None, [t[0] for t in toks], tuple(t[1] for t in toks)
    return delim, [c.strip() for c in _split_delimited(line, delim)], ()


def _find_header(
    lines: Sequence[str], *, source: str, want: Literal["placement", "bom"]
) -> _Table | None:
    banner_unit: LengthUnit | None = None
    banner_side: Literal["top", "bottom"] | None = None
    forced_delim: str | None = None
    for idx, line in enumerate(lines[:_HEADER_SEARCH_LINES]):
        text = line.lstrip("\ufeff")
        if not text.strip():
            continue
        if idx == 0 and text.lower().startswith("sep=") and len(text.strip()) == 5:
            forced_delim = text.strip()[4]
            continue
        m = _RE_BANNER_UNIT.search(text)
        if m and banner_unit is None:
            word = m.group(1).lower()
            banner_unit = (
                "mm"
                if word.startswith(("mm", "milli"))
                else ("mil" if word in ("mil", "mils", "thou") else "inch")
            )
        m = _RE_BANNER_SIDE.match(text)
        if m:
            banner_side = _side_word(m.group(1))
        if forced_delim is not None:
            delim: str | None = forced_delim
            names = [c.strip() for c in _split_delimited(text, forced_delim)]
            starts: tuple[int, ...] = ()
        else:
            delim, names, starts = _header_candidates(text)
        cols = _classify(names)
        if "ref" not in cols:
            continue
        is_placement = "x" in cols and "y" in cols
        if want == "placement" and not is_placement:
            continue
        if want == "bom" and (
            is_placement or not ({"value", "package", "qty", "desc"} & set(cols))
        ):
            continue
        return _Table(
            source=source,
            lines=tuple(lines),
            header_index=idx,
            delimiter=delim,
            names=tuple(names),
            columns=cols,
            column_starts=starts,
            banner_unit=banner_unit,
            banner_side=banner_side,
        )
    return None


# ----------------------------------------------------------------------------------------
# rows


def _rows(table: _Table) -> Iterator[tuple[int, list[str]]]:
    """Yield ``(1-based line, cells)`` for every non-blank, non-comment row after the header."""
    first = table.header_index + 1
    if table.delimiter is not None:
        body = "\n".join(table.lines[first:])
        reader = csv.reader(io.StringIO(body), delimiter=table.delimiter, skipinitialspace=True)
        prev = 0
        for cells in reader:
            lineno = first + prev + 1
            prev = reader.line_num
            if not any(c.strip() for c in cells):
                continue
            yield lineno, cells
        return
    ncols = len(table.names)
    for offset, line in enumerate(table.lines[first:]):
        stripped = line.strip()
        if not stripped or stripped.startswith("#"):
            continue
        toks = _split_ws(line)
        if len(toks) == ncols or not table.column_starts:
            yield first + offset + 1, [t[0] for t in toks]
        else:
            yield first + offset + 1, _by_position(toks, table.column_starts)


def _by_position(toks: Sequence[tuple[str, int, int]], starts: Sequence[int]) -> list[str]:
    """Assign whitespace tokens to header columns by overlap with each column's span."""
    cells: list[list[str]] = [[] for _ in starts]
    bounds = [*starts[1:], 1 << 30]
    for text, s, e in toks:
        best, best_overlap = 0, -1
        for i, (c0, c1) in enumerate(zip(starts, bounds, strict=True)):
            overlap = min(e, c1) - max(s, c0)
            if overlap > best_overlap:
                best, best_overlap = i, overlap
        if best_overlap <= 0:
            best = max((i for i, c0 in enumerate(starts) if c0 <= s), default=0)
        cells[best].append(text)
    return [" ".join(c) for c in cells]


def _cell(cells: Sequence[str], col: _Column | None) -> str:
    if col is None or col.index >= len(cells):
        return ""
    return cells[col.index]


def _length_mm(text: str, unit: LengthUnit | None) -> tuple[float, bool] | None:
    """Length in mm and whether the unit was assumed (``None`` if not a length)."""
    m = _RE_LENGTH.match(text)
    if not m:
        return None
    number = m.group(1)
    if "," in number:
        number = number.replace(",", "") if "." in number else number.replace(",", ".")
    try:
        value = float(number)
    except ValueError:
        return None
    suffix = m.group(2)
    assumed = False
    if suffix:
        word = suffix.lower()
        if word.startswith("millimet"):
            word = "mm"
        u: LengthUnit = _UNIT_WORDS[word]
    elif unit is not None:
        u = unit
    else:
        u, assumed = "mm", True
    return value * _MM_PER[u], assumed


def _angle(text: str) -> float | None:
    m = _RE_ANGLE.match(text)
    if not m:
        return None
    value = float(m.group(1).replace(",", "."))
    value %= 360.0
    return 0.0 if value == 360.0 else value


def _side_word(text: str) -> Literal["top", "bottom"] | None:
    key = re.sub(r"[^0-9a-z]", "", text.lower())
    if key in _TOP_WORDS:
        return "top"
    if key in _BOTTOM_WORDS:
        return "bottom"
    return None


def _side_from_name(source: str) -> Literal["top", "bottom"] | None:
    name = Path(source).name.lower()
    words = set(re.split(r"[^a-z]+", name))
    if words & {"bottom", "bot", "back"}:
        return "bottom"
    if words & {"top", "front"}:
        return "top"
    return None


def _split_refs(cell: str) -> list[str]:
    out: list[str] = []
    for tok in re.split(r"[,;\s]+", cell.strip()):
        if not tok:
            continue
        m = _RE_RANGE.match(tok)
        if m:
            a, b = int(m.group(2)), int(m.group(3))
            if a <= b and b - a < _MAX_RANGE:
                out.extend(f"{m.group(1)}{k}" for k in range(a, b + 1))
                continue
        out.append(tok)
    return out


def _ref_key(ref: str) -> str:
    return ref.strip().upper()


def _skip(source: str, line: int, why: str) -> Notice:
    return Notice(file=source, line=line, message=f"row skipped: {why}")


def _duplicates(rows: Sequence[PlacementRow | BomRow], source: str, what: str) -> list[Notice]:
    lines_of: dict[str, list[int]] = {}
    for r in rows:
        lines_of.setdefault(_ref_key(r.ref), []).append(r.line)
    out: list[Notice] = []
    for ref, lines in lines_of.items():
        if len(lines) > 1:
            shown = ", ".join(str(n) for n in lines[:6]) + (", ..." if len(lines) > 6 else "")
            keep = "all rows kept" if what == "placement" else "the first is used when joining"
            out.append(
                Notice(
                    file=source,
                    line=lines[0],
                    message=f"designator {ref!r} appears {len(lines)} times in the {what} "
                    f"(lines {shown}); {keep}",
                )
            )
    return out
