"""Gerber reader: RS-274X with X2/X3 attributes into an :class:`ArtworkRecord`.

Follows the Gerber Layer Format Specification (rev 2023.08) including its deprecated
constructs (G70/G71, G74, G90/G91, FS with trailing-zero omission or incremental
coordinates, M00/M01, %IN/%LN/%AS/%OF/%SF), which are read and reported as
:class:`~fluxshadow.errors.Notice` records. Arcs and circles become polylines with a chord
error of at most :data:`ARC_CHORD_TOLERANCE_MM`; block apertures and step-and-repeat are
expanded; aperture transformations (LM/LR/LS) give transformed aperture entries.

Record conventions beyond :mod:`fluxshadow.io.records`:

- consecutive D01 draws (same aperture, polarity, attributes) form one TRACK polyline;
  a D02 to the current point does not break it; a zero-length draw that starts a track
  has two equal vertices;
- each G36..G37 is one REGION object with one ring per contour (a D02 starts a new
  contour); open contours are closed (with a notice), degenerate ones dropped;
- ``comments`` also holds ``%IN`` image names, as ``"IN <name>"``;
- step-and-repeat copies come copy by copy, X index outer, Y index inner.
"""

from __future__ import annotations

import os
import re
from typing import Literal

from fluxshadow.errors import ConfigError, InputError, LimitError
from fluxshadow.io._gerber_attrs import scan_header
from fluxshadow.io._gerber_geom import ARC_CHORD_TOLERANCE_MM
from fluxshadow.io._gerber_parser import RAISE_HINT, Limits, parse_text
from fluxshadow.io.records import ArtworkRecord

__all__ = [
    "ARC_CHORD_TOLERANCE_MM",
    "looks_like_gerber",
    "parse_gerber",
    "read_gerber",
    "read_gerber_header",
]


def _decode(data: bytes) -> str:
    text = data.decode("utf-8", errors="replace")
    return text.removeprefix("\ufeff")


def _check_limits(
    max_repeat: int,
    max_macro_depth: int,
    max_objects: int,
    max_vertices: int,
    max_region_vertices: int,
) -> Limits:
    for name, value in (
        ("max_repeat", max_repeat),
        ("max_macro_depth", max_macro_depth),
        ("max_objects", max_objects),
        ("max_vertices", max_vertices),
        ("max_region_vertices", max_region_vertices),
    ):
        if value < 1:
            msg = f"{name} must be >= 1; got {value}"
            raise ConfigError(msg)
    return Limits(
        max_repeat=max_repeat,
        max_macro_depth=max_macro_depth,
        max_objects=max_objects,
        max_vertices=max_vertices,
        max_region_vertices=max_region_vertices,
    )


_SIZE_HINT = RAISE_HINT.format(key="max_file_bytes")


def read_gerber(
    path: str | os.PathLike[str],
    *,
    max_bytes: int = 200_000_000,
    max_repeat: int = 100_000,
    max_macro_depth: int = 64,
    max_objects: int = 20_000_000,
    max_vertices: int = 50_000_000,
    max_region_vertices: int = 2_000_000,
) -> ArtworkRecord:
    """Read one Gerber file.

    Parameters
    ----------
    path : str or os.PathLike
        The file.
    max_bytes : int
        Refuse files larger than this (bytes).
    max_repeat : int
        Largest number of copies one step-and-repeat may make.
    max_macro_depth : int
        Deepest nesting of macro expressions and of block apertures / step-and-repeat.
    max_objects : int
        Largest number of objects after expansion.
    max_vertices : int
        Largest number of polyline/ring vertices after expansion (arcs linearised,
        blocks and step-and-repeat copies counted).
    max_region_vertices : int
        Largest number of vertices of one region (G36..G37, all its contours).

    Returns
    -------
    ArtworkRecord
        Objects, rings and vertices in mm; ``source`` is ``str(path)``.

    Raises
    ------
    InputError
        The file cannot be read.
    ParseError
        A statement is malformed or unsupported (message names file and line).
    LimitError
        A safety limit was exceeded (file size, copies, nesting depth, object or vertex
        count); the message names the limit and how to raise it.
    ConfigError
        A limit option is below 1.
    """
    source = os.fspath(path)
    try:
        size = os.path.getsize(source)
    except OSError as e:
        msg = f"Gerber file must be readable; got {e.strerror or e}"
        raise InputError(msg, file=source) from e
    if size > max_bytes:
        msg = f"file size must be at most {max_bytes} bytes; got {size} ({_SIZE_HINT})"
        raise LimitError(msg, file=source)
    try:
        with open(source, "rb") as fh:
            data = fh.read(max_bytes + 1)
    except OSError as e:
        msg = f"Gerber file must be readable; got {e.strerror or e}"
        raise InputError(msg, file=source) from e
    if len(data) > max_bytes:
        msg = f"file size must be at most {max_bytes} bytes; got more ({_SIZE_HINT})"
        raise LimitError(msg, file=source)
    limits = _check_limits(
        max_repeat, max_macro_depth, max_objects, max_vertices, max_region_vertices
    )
    return parse_text(_decode(data), source=source, limits=limits, size_bytes=len(data))


def parse_gerber(
    text: str,
    *,
    source: str = "<string>",
    max_bytes: int = 200_000_000,
    max_repeat: int = 100_000,
    max_macro_depth: int = 64,
    max_objects: int = 20_000_000,
    max_vertices: int = 50_000_000,
    max_region_vertices: int = 2_000_000,
) -> ArtworkRecord:
    """Parse Gerber text (same rules and limits as :func:`read_gerber`).

    Parameters
    ----------
    text : str
        The file content.
    source : str
        Name used in messages and in the record.
    max_bytes, max_repeat, max_macro_depth, max_objects, max_vertices : int
        As for :func:`read_gerber` (``max_bytes`` counts UTF-8 bytes).
    max_region_vertices : int
        As for :func:`read_gerber`.

    Returns
    -------
    ArtworkRecord
        As for :func:`read_gerber`, with ``source`` as given.

    Raises
    ------
    ParseError, LimitError, ConfigError
        As for :func:`read_gerber`.
    """
    size = len(text.encode("utf-8"))
    if size > max_bytes:
        msg = f"text size must be at most {max_bytes} bytes; got {size} ({_SIZE_HINT})"
        raise LimitError(msg, file=source)
    limits = _check_limits(
        max_repeat, max_macro_depth, max_objects, max_vertices, max_region_vertices
    )
    return parse_text(text, source=source, limits=limits, size_bytes=size)


def read_gerber_header(
    path: str | os.PathLike[str], *, max_bytes_scanned: int = 65_536
) -> tuple[dict[str, str], tuple[str, ...], Literal["mm", "inch"] | None]:
    """Cheap scan of the beginning of a Gerber file for layer identification.

    Parameters
    ----------
    path : str or os.PathLike
        The file.
    max_bytes_scanned : int
        How many bytes from the start are looked at.

    Returns
    -------
    file_attributes : dict of str to str
        ``%TF`` attributes, also those written as ``G04 #@! TF...`` comments
        (name without the dot, values joined by ``,``).
    comments : tuple of str
        Texts of the ``G04`` comments (and ``%IN`` names as ``"IN <name>"``) in order.
    units : {"mm", "inch"} or None
        From ``%MO`` or ``G70``/``G71``, None when not seen.

    Raises
    ------
    InputError
        The file cannot be read.
    """
    source = os.fspath(path)
    try:
        with open(source, "rb") as fh:
            data = fh.read(max(int(max_bytes_scanned), 0))
    except OSError as e:
        msg = f"Gerber file must be readable; got {e.strerror or e}"
        raise InputError(msg, file=source) from e
    text = _decode(data)
    if len(data) >= max_bytes_scanned:
        # Drop a statement cut in half at the end of the scanned part.
        cut = max(text.rfind("*"), text.rfind("%"))
        text = text[: cut + 1] if cut >= 0 else ""
    return scan_header(text)


# Every pattern must start a line or follow a statement end ('*' or '%'), so that prose
# quoting Gerber statements (documentation, READMEs) does not match.
_START = r"(?:^|(?<=[*%\n\r]))[ \t]*"
_SNIFF = (
    re.compile(
        _START
        + r"(?:%(?:FS[LTD]?[AI]?X\d\dY\d\d|MO(?:MM|IN)|ADD\d+|AM\w|TF\.)|G0?4 ?#@! ?T[FAOD])",
        re.MULTILINE,
    ),
    re.compile(_START + r"G0?4(?:[ #:@!][^*%\n]*)?\*", re.MULTILINE),
    re.compile(_START + r"(?:X[+-]?\d+)?(?:Y[+-]?\d+)?D0?[123]\*", re.MULTILINE),
    re.compile(_START + r"(?:M02|G7[01]|G75|G36|G01)\*", re.MULTILINE),
)


def looks_like_gerber(head: str) -> bool:
    """Whether the beginning of a file looks like Gerber (content sniffing).

    Parameters
    ----------
    head : str
        The first few kilobytes of the file, decoded.

    Returns
    -------
    bool
        True when an extended Gerber parameter (``%FS``, ``%MO``, ``%ADD``, ``%AM``,
        ``%TF.``) or an attribute comment (``G04 #@! TF...``) is present, or when at
        least two of: ``G04`` comments, ``D01``/``D02``/``D03`` operations,
        ``M02*``/``G70*``/``G71*``/``G75*``/``G36*``/``G01*`` words. Each must start a
        line or follow ``*``/``%``, so prose that quotes Gerber, Excellon drill files (no
        ``*`` terminators) and CSV files do not match.
    """
    if _SNIFF[0].search(head):
        return True
    hits = sum(1 for pat in _SNIFF[1:] if pat.search(head))
    return hits >= 2
