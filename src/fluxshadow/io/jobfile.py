"""Gerber job file reader (``.gbrjob``): the board build as its author stated it.

The Gerber job file is the JSON part of the open Gerber standard that describes the job
rather than one image: ``Header``, ``GeneralSpecs`` (``BoardThickness``, ``LayerNumber``,
...), ``FilesAttributes`` (``Path``, ``FileFunction``, ``FilePolarity`` per file) and
``MaterialStackup`` (the layers top to bottom: ``Type`` ``Copper``/``Dielectric``/
``SolderMask``/``Legend``/``SolderPaste``, ``Thickness`` in mm, ``Material``,
``DielectricConstant``, ``Name``). Lengths in the job file are millimetres.
"""

from __future__ import annotations

import json
import math
import re
from pathlib import Path
from typing import Any, Literal

from fluxshadow.errors import InputError, ParseError
from fluxshadow.io.identify import parse_file_function
from fluxshadow.io.records import JobRecord, StackupLayer

__all__ = ["MAX_JOB_FILE_BYTES", "parse_job_file", "read_job_file"]

MAX_JOB_FILE_BYTES = 10_000_000
"""Largest job file read (bytes); real ones are a few kB."""

_KINDS: dict[str, Literal["copper", "dielectric", "soldermask", "other"]] = {
    "copper": "copper",
    "dielectric": "dielectric",
    "soldermask": "soldermask",
}


def _line_of(text: str, needle: str, occurrence: int = 0, after: str | None = None) -> int | None:
    """1-based line of the ``occurrence``-th match of ``needle`` (best effort).

    With ``after``, counting starts at the first match of that pattern (a section key).
    """
    start = 0
    if after is not None:
        m = re.search(after, text)
        start = m.start() if m else 0
    matches = list(re.compile(needle).finditer(text, start))
    if occurrence < len(matches):
        return text.count("\n", 0, matches[occurrence].start()) + 1
    return None


def _number(
    value: object, what: str, source: str, line: int | None, *, positive: bool = False
) -> float:
    """A finite number (JSON number or numeric string)."""
    v: float | None = None
    if isinstance(value, bool):
        v = None
    elif isinstance(value, (int, float)):
        v = float(value)
    elif isinstance(value, str):
        try:
            v = float(value.strip())
        except ValueError:
            v = None
    ok = v is not None and math.isfinite(v) and (v > 0 if positive else v >= 0)
    if not ok or v is None:
        kind = "a positive number" if positive else "a number >= 0"
        msg = f"{what} must be {kind}; got {value!r}"
        raise ParseError(msg, file=source, line=line)
    return v


def parse_job_file(text: str, *, source: str = "<string>") -> JobRecord:
    """Parse the text of a Gerber job file.

    Parameters
    ----------
    text : str
        The JSON text.
    source : str
        File name for messages and the record.

    Returns
    -------
    JobRecord
        ``stackup`` holds every ``MaterialStackup`` entry top to bottom; copper layers are
        named ``L1``, ``L2``, ... in stack order with ``source_file`` set to the file whose
        ``FileFunction`` is ``Copper,L<n>,...`` (when listed). A layer whose entry gives no
        ``Thickness`` has ``thickness_mm`` = NaN (unknown) so the stack-up resolver can
        fall back to defaults for it; soldermask, legend and paste entries without one
        get 0.

    Raises
    ------
    ParseError
        Malformed JSON (with its line), a top level that is not an object or lacks the
        job sections, or a value of the wrong type (with the key path).
    """
    try:
        data = json.loads(text)
    except json.JSONDecodeError as exc:
        msg = f"job file must be valid JSON; got {exc.msg} at column {exc.colno}"
        lines = text.splitlines()
        statement = lines[exc.lineno - 1].strip() if 0 < exc.lineno <= len(lines) else None
        raise ParseError(msg, file=source, line=exc.lineno, statement=statement) from exc
    if not isinstance(data, dict):
        msg = f"job file must hold a JSON object; got {type(data).__name__}"
        raise ParseError(msg, file=source, line=1)
    sections = {"Header", "GeneralSpecs", "FilesAttributes", "MaterialStackup"}
    if not sections & set(data):
        msg = (
            "job file must have Header, GeneralSpecs, FilesAttributes or MaterialStackup; "
            f"got keys {sorted(data)[:6]}"
        )
        raise ParseError(msg, file=source, line=1)

    specs = data.get("GeneralSpecs", {})
    if not isinstance(specs, dict):
        msg = f"GeneralSpecs must be an object; got {type(specs).__name__}"
        raise ParseError(msg, file=source, line=_line_of(text, r'"GeneralSpecs"'))
    thickness: float | None = None
    if specs.get("BoardThickness") is not None:
        thickness = _number(
            specs["BoardThickness"],
            "GeneralSpecs.BoardThickness",
            source,
            _line_of(text, r'"BoardThickness"'),
            positive=True,
        )

    layer_files: dict[str, str] = {}
    copper_file: dict[int, str] = {}
    attrs = data.get("FilesAttributes", [])
    if not isinstance(attrs, list):
        msg = f"FilesAttributes must be a list; got {type(attrs).__name__}"
        raise ParseError(msg, file=source, line=_line_of(text, r'"FilesAttributes"'))
    for i, entry in enumerate(attrs):
        line = _line_of(text, r'"Path"', i, after=r'"FilesAttributes"')
        if not isinstance(entry, dict):
            msg = f"FilesAttributes[{i}] must be an object; got {type(entry).__name__}"
            raise ParseError(msg, file=source, line=line)
        path, function = entry.get("Path"), entry.get("FileFunction", "")
        if not isinstance(path, str) or not path:
            msg = f"FilesAttributes[{i}].Path must be a file name; got {path!r}"
            raise ParseError(msg, file=source, line=line)
        if not isinstance(function, str):
            msg = f"FilesAttributes[{i}].FileFunction must be a string; got {function!r}"
            raise ParseError(msg, file=source, line=line)
        layer_files[path] = function
        kind, _side, index = parse_file_function(function)
        if kind == "copper" and index is not None:
            copper_file.setdefault(index, path)

    stack = data.get("MaterialStackup", [])
    if not isinstance(stack, list):
        msg = f"MaterialStackup must be a list; got {type(stack).__name__}"
        raise ParseError(msg, file=source, line=_line_of(text, r'"MaterialStackup"'))
    layers: list[StackupLayer] = []
    n_copper = 0
    for i, entry in enumerate(stack):
        line = _line_of(text, r'"Type"', i, after=r'"MaterialStackup"')
        where = f"MaterialStackup[{i}]"
        if not isinstance(entry, dict):
            msg = f"{where} must be an object; got {type(entry).__name__}"
            raise ParseError(msg, file=source, line=line)
        raw_type = entry.get("Type")
        if not isinstance(raw_type, str):
            msg = f"{where}.Type must be a string such as Copper or Dielectric; got {raw_type!r}"
            raise ParseError(msg, file=source, line=line)
        layer_kind = _KINDS.get(raw_type.strip().lower(), "other")
        t_raw: Any = entry.get("Thickness")
        if t_raw is None:
            t = float("nan") if layer_kind in ("copper", "dielectric") else 0.0
        else:
            t = _number(t_raw, f"{where}.Thickness", source, line, positive=layer_kind == "copper")
        eps: float | None = None
        if entry.get("DielectricConstant") is not None:
            eps = _number(entry["DielectricConstant"], f"{where}.DielectricConstant", source, line)
            if eps < 1.0:
                msg = (
                    f"{where}.DielectricConstant must be >= 1; got {entry['DielectricConstant']!r}"
                )
                raise ParseError(msg, file=source, line=line)
        material = entry.get("Material", "")
        own_name = entry.get("Name", "")
        if layer_kind == "copper":
            n_copper += 1
            name = f"L{n_copper}"
            src_file = copper_file.get(n_copper, "")
        else:
            name = str(own_name) if own_name is not None else ""
            src_file = ""
        layers.append(
            StackupLayer(
                name=name,
                kind=layer_kind,
                thickness_mm=t,
                material=str(material) if material is not None else "",
                epsilon_r=eps,
                source_file=src_file,
            )
        )
    return JobRecord(
        source=source,
        stackup=tuple(layers),
        board_thickness_mm=thickness,
        layer_files=layer_files,
    )


def read_job_file(path: str | Path) -> JobRecord:
    """Read a Gerber job file (``.gbrjob``) from disk.

    Parameters
    ----------
    path : path
        The file (UTF-8, with or without byte-order mark).

    Returns
    -------
    JobRecord
        See :func:`parse_job_file`.

    Raises
    ------
    InputError
        When the file cannot be read or is larger than :data:`MAX_JOB_FILE_BYTES`.
    ParseError
        When its content is malformed.
    """
    p = Path(path)
    source = str(path)
    try:
        size = p.stat().st_size
        if size > MAX_JOB_FILE_BYTES:
            msg = f"job file size must be at most {MAX_JOB_FILE_BYTES} bytes; got {size}"
            raise InputError(msg, file=source)
        raw = p.read_bytes()
    except OSError as exc:
        msg = f"job file must be readable; got {exc.strerror}"
        raise InputError(msg, file=source) from exc
    try:
        text = raw.decode("utf-8-sig")
    except UnicodeDecodeError as exc:
        line = raw.count(b"\n", 0, exc.start) + 1
        msg = "job file must be UTF-8 text; got undecodable bytes"
        raise ParseError(msg, file=source, line=line) from exc
    return parse_job_file(text, source=source)
