"""Text access for the ODB++ reader: plain, ``.Z`` (Unix compress) or ``.gz`` files, limits.

Any file of an ODB++ job may be stored compressed next to (instead of) its plain name:
``features.Z`` (LZW, the Unix ``compress`` format) or ``features.gz`` (gzip). One helper,
:func:`read_lines`, finds whichever exists and returns its decoded lines; the decoded size
counts against the same ``max_bytes`` limit as a plain file.
"""

from __future__ import annotations

import gzip
import math
import zlib
from dataclasses import dataclass
from pathlib import Path
from typing import Literal

import unlzw3

from fluxshadow.errors import ConfigError, InputError, LimitError, Notice, ParseError
from fluxshadow.io._gerber_parser import RAISE_HINT

__all__ = [
    "CompressedFileError",
    "OdbLimits",
    "blocks",
    "find_file",
    "limit_error",
    "parse_float",
    "read_lines",
    "units_of",
]

_SUFFIXES = ("", ".Z", ".gz")


class CompressedFileError(InputError):
    """A ``.Z`` or ``.gz`` file that does not decode (truncated or corrupt)."""


@dataclass(frozen=True, kw_only=True)
class OdbLimits:
    """Safety limits of one ODB++ read, per file (same meaning as the Gerber reader's).

    Attributes
    ----------
    max_bytes : int
        Largest file, after decompression (bytes).
    max_objects : int
        Most objects one features file may produce.
    max_vertices : int
        Most ring/polyline vertices one features file may produce (arcs linearised).
    """

    max_bytes: int = 200_000_000
    max_objects: int = 20_000_000
    max_vertices: int = 50_000_000

    def __post_init__(self) -> None:
        for name in ("max_bytes", "max_objects", "max_vertices"):
            value = getattr(self, name)
            if value < 1:
                msg = f"{name} must be >= 1; got {value}"
                raise ConfigError(msg)


def limit_error(message: str, key: str, file: str, line: int | None = None) -> LimitError:
    """A :class:`LimitError` for ``file`` whose message says how to raise limit ``key``."""
    key_in_config = "max_file_bytes" if key == "max_bytes" else key
    hint = RAISE_HINT.format(key=key_in_config)
    return LimitError(f"{message} ({hint})", file=file, line=line)


def find_file(path: Path) -> Path | None:
    """``path``, ``path.Z`` or ``path.gz``, whichever exists first; None when none does."""
    for suffix in _SUFFIXES:
        cand = path.with_name(path.name + suffix) if suffix else path
        if cand.is_file():
            return cand
    return None


def _gunzip(data: bytes, limit: int, src: str) -> bytes:
    out = bytearray()
    d = zlib.decompressobj(wbits=16 + zlib.MAX_WBITS)
    buf = data
    try:
        while True:
            out += d.decompress(buf, limit + 1 - len(out))
            if len(out) > limit:
                msg = f"decompressed size must be at most {limit} bytes; got more"
                raise limit_error(msg, "max_bytes", src)
            if d.eof:
                if d.unused_data and d.unused_data.lstrip(b"\0"):
                    # Concatenated gzip members: decode the rest the simple way.
                    rest = gzip.decompress(d.unused_data)
                    out += rest
                    if len(out) > limit:
                        msg = f"decompressed size must be at most {limit} bytes; got more"
                        raise limit_error(msg, "max_bytes", src)
                break
            buf = d.unconsumed_tail
            if not buf:
                msg = "compressed file must decode; got a truncated gzip stream"
                raise CompressedFileError(msg, file=src)
    except (zlib.error, OSError, EOFError) as exc:
        msg = f"compressed file must decode; got {exc}"
        raise CompressedFileError(msg, file=src) from exc
    return bytes(out)


def _unlzw(data: bytes, limit: int, src: str) -> bytes:
    try:
        out = unlzw3.unlzw(data)
    except (ValueError, IndexError) as exc:
        msg = f"compressed file must decode; got {exc}"
        raise CompressedFileError(msg, file=src) from exc
    if len(out) > limit:
        msg = f"decompressed size must be at most {limit} bytes; got {len(out)}"
        raise limit_error(msg, "max_bytes", src)
    return bytes(out)


def read_lines(
    path: Path, limits: OdbLimits, notices: list[Notice]
) -> tuple[list[str], Path, int] | None:
    """Decoded lines of ``path`` (or ``path.Z`` / ``path.gz``).

    Parameters
    ----------
    path : Path
        The plain name of the file.
    limits : OdbLimits
        ``max_bytes`` bounds the file on disk and after decompression.
    notices : list of Notice
        Receives a notice when the text is not UTF-8 (it is then read as Latin-1).

    Returns
    -------
    (lines, actual_path, size_bytes) or None
        None when no variant of the file exists. ``size_bytes`` is the decoded size.

    Raises
    ------
    InputError
        The file cannot be read.
    CompressedFileError
        A compressed file does not decode ("compressed file must decode; got ...").
    LimitError
        The file, or what it decompresses to, exceeds ``max_bytes``.
    """
    actual = find_file(path)
    if actual is None:
        return None
    src = str(actual)
    limit = limits.max_bytes
    try:
        size = actual.stat().st_size
        if size > limit:
            msg = f"file size must be at most {limit} bytes; got {size}"
            raise limit_error(msg, "max_bytes", src)
        data = actual.read_bytes()
    except OSError as exc:
        raise InputError(f"file must be readable; got {exc.strerror}", file=src) from exc
    if actual.name.endswith(".Z"):
        data = _unlzw(data, limit, src)
    elif actual.name.endswith(".gz"):
        data = _gunzip(data, limit, src)
    try:
        text = data.decode("utf-8")
    except UnicodeDecodeError:
        text = data.decode("latin-1")
        notices.append(Notice(file=src, line=None, message="not UTF-8; read as Latin-1"))
    return text.removeprefix("\ufeff").splitlines(), actual, len(data)


def units_of(lines: list[str]) -> Literal["mm", "inch"] | None:
    """Units from a ``UNITS=MM|INCH`` or ``U MM|INCH`` line near the top; None if absent."""
    for raw in lines[:50]:
        s = raw.strip().upper()
        if s.startswith("UNITS="):
            return "mm" if s[6:].strip() == "MM" else "inch"
        if s.startswith("U "):
            return "mm" if s[2:].strip() == "MM" else "inch"
    return None


def parse_float(tok: str, path: str, line: int, stmt: str) -> float:
    """``float(tok)``, or a :class:`ParseError` when it is not a finite number."""
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


def blocks(lines: list[str]) -> list[tuple[str, dict[str, str]]]:
    """Parse ``NAME { KEY=VALUE ... }`` blocks (matrix, stephdr, tools); keys upper case."""
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
