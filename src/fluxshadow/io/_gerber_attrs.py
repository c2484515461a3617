"""Gerber X2 attributes and comments: the one implementation shared by the full reader
and the cheap header scan.

Attributes come as extended commands (``%TF.FileFunction,Copper,L2,Inr*%``) or, in files
written for older readers, inside comments (``G04 #@! TF.FileFunction,Copper,L2,Inr*``).
Both forms are parsed by :func:`parse_attribute`.
"""

from __future__ import annotations

import re
from typing import Literal

__all__ = [
    "MAX_COMMENTS",
    "comment_attribute",
    "parse_attribute",
    "scan_header",
]

MAX_COMMENTS = 300
"""How many ``G04`` comment texts a record keeps (for layer identification)."""

_ESCAPE = re.compile(r"\\u([0-9A-Fa-f]{4})")


def _unescape(value: str) -> str:
    if "\\" not in value:
        return value
    return _ESCAPE.sub(lambda m: chr(int(m.group(1), 16)), value)


def parse_attribute(body: str) -> tuple[str, str, tuple[str, ...]] | None:
    """Split an attribute command into kind, name and values.

    Parameters
    ----------
    body : str
        The command without ``%`` and ``*``, e.g. ``"TF.FileFunction,Copper,L1,Top"``,
        ``"TO.N,GND"`` or ``"TD"``.

    Returns
    -------
    (kind, name, values) or None
        ``kind`` is ``"TF"``, ``"TA"``, ``"TO"`` or ``"TD"``; ``name`` has no leading dot
        (``""`` for a bare ``TD``); ``values`` are the comma-separated fields with
        ``\\uXXXX`` escapes decoded. None when ``body`` is not an attribute command.
    """
    body = body.strip()
    kind = body[:2]
    if kind not in ("TF", "TA", "TO", "TD"):
        return None
    rest = body[2:]
    fields = rest.split(",")
    name = fields[0].strip()
    name = name.removeprefix(".")
    return kind, name, tuple(_unescape(v) for v in fields[1:])


def comment_attribute(comment: str) -> tuple[str, str, tuple[str, ...]] | None:
    """Attribute written inside a comment (``#@! TF.xxx,...``), or None.

    Parameters
    ----------
    comment : str
        The comment text after ``G04`` (leading blanks allowed).
    """
    text = comment.lstrip()
    if not text.startswith("#@!"):
        return None
    return parse_attribute(text[3:])


# A comment's text may hold a '%' (not allowed, but written) when it stays on one line.
_HEADER = re.compile(
    r"%([^%]*)%"
    r"|(?<![A-Z0-9.+-])G0*4(?![0-9])((?:[^*\n\r]*+|[^*%]*+))\*"
    r"|(?<![A-Z0-9.+-])G7([01])\*"
)


def scan_header(
    text: str, *, max_comments: int = MAX_COMMENTS
) -> tuple[dict[str, str], tuple[str, ...], Literal["mm", "inch"] | None]:
    """Collect file attributes, comments and the unit from the text of a Gerber file.

    Parameters
    ----------
    text : str
        The whole file or its beginning.
    max_comments : int
        Keep at most this many comment texts.

    Returns
    -------
    file_attributes : dict of str to str
        ``TF`` attributes (also those inside ``G04 #@!`` comments), values joined by ``,``.
    comments : tuple of str
        The stripped, non-empty texts of the first ``G04`` comments (and ``%IN`` image
        names as ``"IN <name>"``).
    units : {"mm", "inch"} or None
        From the first ``%MO`` or legacy ``G70``/``G71``; None when absent.
    """
    attrs: dict[str, str] = {}
    comments: list[str] = []
    units: Literal["mm", "inch"] | None = None
    for m in _HEADER.finditer(text):
        ext, comment, g7 = m.groups()
        if ext is not None:
            for word in ext.split("*"):
                word = word.strip()
                if word.startswith("TF"):
                    parsed = parse_attribute(word)
                    if parsed is not None and parsed[1]:
                        attrs[parsed[1]] = ",".join(parsed[2])
                elif word.startswith("MO") and units is None:
                    if word[2:4] == "MM":
                        units = "mm"
                    elif word[2:4] == "IN":
                        units = "inch"
                elif word.startswith("IN") and len(comments) < max_comments:
                    comments.append(f"IN {word[2:].strip()}")
        elif comment is not None:
            parsed = comment_attribute(comment)
            if parsed is not None and parsed[0] == "TF" and parsed[1]:
                attrs[parsed[1]] = ",".join(parsed[2])
            text = comment.strip()
            if text and len(comments) < max_comments:
                comments.append(text)
        elif units is None:
            units = "inch" if g7 == "0" else "mm"
    return attrs, tuple(comments), units
