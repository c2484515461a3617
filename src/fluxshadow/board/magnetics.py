"""Identify the power magnetics of a board and give each a body outline.

Input is the placement (already joined with BOM values where a BOM exists); nothing here
reads files. Each placed part is classified from its designator prefix, its value, its
package name and its description; each power magnetic gets a rectangular body outline in
the *placement* frame (the caller maps it to the artwork frame with the frame fit).

Rules (common practice, in the order they are applied)
------------------------------------------------------
1. A configured part (:class:`PartOverride` with a ``kind``) is taken as configured:
   ``kind="exclude"`` drops it, any other kind includes it even if the rules below would
   exclude it (that is how a ferrite bead or RF coil is analysed on purpose).
2. Candidates: parts whose designator prefix is a magnetic one (``L``, ``IND``; ``FB``,
   ``BEAD``; ``T``, ``TR``, ``TX``, ``TF``, ``XFMR``; ``CMC``, ``LF``, ``CH``) or whose
   text names a magnetic (inductor, choke, transformer, ferrite bead, balun) or whose value
   is an inductance. Other parts are ignored. A candidate with another prefix (``MN16``
   valued ``100uH``, a resistor-numbered bead) is excluded with the reason, so it can be
   configured in.
3. Not fitted: a value such as ``DNP``, ``DNF``, ``NC``, ``not fitted`` excludes the part.
4. Ferrite beads: ``FB``/``BEAD`` designator, "bead"/"ferrite" text (not "ferrite core
   inductor"), or a value that is an impedance (``600R``, ``120@100MHz``,
   ``600R@100MHz``). On an ``L`` designator ``1R0`` is read as 1.0 uH (the R marks the
   decimal point in microhenries), but a plain ``600R`` (ohms, no decimal digits) or an
   impedance at a frequency is a bead. A common-mode choke's value is often its impedance
   at a frequency, so with choke text or a choke designator an impedance is not a bead.
5. RF parts: a balun or "RF" text; an inductance below 100 nH; or below 1 uH in a chip
   package of 0603 (inch) or smaller. RF matching coils and chokes carry no switching
   current; 0.47 uH in a 0806 power package is kept.
6. Kind: transformer text (transformer, flyback, xfmr) gives ``"transformer"``; common-mode
   or choke text, or a ``CMC``/``LF``/``CH`` designator, gives ``"choke"``; otherwise an
   ``L`` part is an ``"inductor"``. A ``T``/``TR``/``TX``/``TF`` designator needs
   transformer text or an inductance value (RF transformers, transistors and test points
   use these letters too); ``XFMR`` needs nothing more.
7. An ``L`` part without value and without a package hint is still included, with the
   assumption "value unknown".

Body outline, first that applies: the configured size; dimensions written in the package
name (``L7.0-W6.6``, ``7.0x6.6``, ``6x6``); a package code (``3225Metric``, inch chip codes
such as ``1210`` or ``0806``, square series codes whose first two digits are the side in
mm such as ``NR-60xx``), or a ``NNNN Metric`` code in the description; the part's pads
(box of the pad boxes, or 1.3 x the span of the pad centres, square across a single row of
pads); a default by value (stated as an assumption).
The outline is a rectangle, length along the part's local X, rotated by the placement
rotation (degrees counter-clockwise) about the placement centroid.
"""

from __future__ import annotations

import math
import re
from collections.abc import Iterable, Mapping
from dataclasses import dataclass
from typing import Literal, get_args

import numpy as np
import numpy.typing as npt

from fluxshadow.errors import ConfigError, InputError, Notice
from fluxshadow.io.records import PlacementRow

__all__ = [
    "BodyFrom",
    "Excluded",
    "Magnetic",
    "MagneticKind",
    "MagneticsResult",
    "PartOverride",
    "body_outline",
    "identify_magnetics",
    "package_body",
    "parse_inductance",
]

FloatArray = npt.NDArray[np.float64]

MagneticKind = Literal["inductor", "transformer", "choke"]
"""Kinds of power magnetics."""
OverrideKind = Literal["inductor", "transformer", "choke", "exclude"]
BodyFrom = Literal["package dimensions", "package code", "pads", "config", "default"]
"""Where a body size came from."""

_KINDS: tuple[str, ...] = get_args(OverrideKind)
_KIND_OF: dict[str, MagneticKind] = {k: k for k in get_args(MagneticKind)}

# ----------------------------------------------------------------------------- records


@dataclass(frozen=True, kw_only=True)
class PartOverride:
    """Per-part settings from the configuration (a ``[[part]]`` entry).

    Attributes
    ----------
    ref : str
        Designator the entry applies to (exact match).
    kind : {"inductor", "transformer", "choke", "exclude"} or None
        Force the part in as this kind, or out (``"exclude"``); ``None`` keeps the
        automatic decision.
    body_mm : tuple of (float, float) or None
        Body length along the part's local X and width (mm).
    height_mm : float or None
        Body height above the board (mm).
    """

    ref: str
    kind: OverrideKind | None = None
    body_mm: tuple[float, float] | None = None
    height_mm: float | None = None


@dataclass(frozen=True, kw_only=True)
class Magnetic:
    """One power magnetic as identified and modelled, in the placement frame.

    Attributes
    ----------
    ref : str
        Designator.
    kind : {"inductor", "transformer", "choke"}
    value_h : float or None
        Inductance (H) when the value text gives one.
    value_text, package, description : str
        As in the placement/BOM.
    side : {"top", "bottom"}
    x_mm, y_mm : float
        Placement centroid (mm, placement frame).
    rotation_deg : float
        Placement rotation (degrees counter-clockwise).
    body_mm : tuple of (float, float)
        Body length (along local X) and width (mm).
    height_mm : float or None
        Body height (mm) when known (config or package code).
    outline : ndarray, shape (5, 2)
        Closed body rectangle (first vertex repeated), mm, placement frame.
    body_from : {"package dimensions", "package code", "pads", "config", "default"}
    reasons : tuple of str
        Why the part is a power magnetic of this kind and where its body came from.
    assumptions : tuple of str
        The subset of the reasons that are guesses a user should confirm.
    source : str
        Placement file of the row.
    line : int
        Line of the row in that file.
    """

    ref: str
    kind: MagneticKind
    value_h: float | None
    value_text: str
    package: str
    description: str
    side: Literal["top", "bottom"]
    x_mm: float
    y_mm: float
    rotation_deg: float
    body_mm: tuple[float, float]
    height_mm: float | None
    outline: FloatArray
    body_from: BodyFrom
    reasons: tuple[str, ...]
    assumptions: tuple[str, ...] = ()
    source: str = ""
    line: int = 0


@dataclass(frozen=True, kw_only=True)
class Excluded:
    """A part that looked magnetic but is not analysed, and why."""

    ref: str
    value_text: str
    package: str
    reason: str


@dataclass(frozen=True, kw_only=True)
class MagneticsResult:
    """Power magnetics found, magnetic-looking parts left out, and notices."""

    magnetics: tuple[Magnetic, ...]
    excluded: tuple[Excluded, ...]
    notices: tuple[Notice, ...] = ()

    def by_ref(self, ref: str) -> Magnetic | None:
        """The magnetic with designator ``ref``, or ``None``."""
        for m in self.magnetics:
            if m.ref == ref:
                return m
        return None


# ----------------------------------------------------------------------------- value text

_MICRO = str.maketrans({"\u00b5": "u", "\u03bc": "u", "\u03a9": "R", "\u2126": "R"})
_SI_EXP = {"p": -12, "n": -9, "u": -6, "m": -3, "": 0}
_HZ = {"": 1.0, "k": 1e3, "m": 1e6, "g": 1e9}
_NUM = r"(\d+(?:[.,]\d+)?|\.\d+)"
_HENRY_RE = re.compile(
    r"(?<![a-z0-9.])" + _NUM + r"\s*([pnum]?)\s*h(?:enr(?:y|ies))?(?![a-z0-9])", re.IGNORECASE
)
_RKM_RE = re.compile(r"^(\d*)([pnumr])(\d+)$", re.IGNORECASE)
_UNIT_ONLY_RE = re.compile(r"^" + _NUM + r"\s*([pnum])$", re.IGNORECASE)
_AT_FREQ_RE = re.compile(
    r"(?:" + _NUM + r"\s*(k)?\s*(?:r|ohms?)?)?\s*@\s*" + _NUM + r"\s*([kmg]?)\s*hz", re.IGNORECASE
)
_OHM_RE = re.compile(r"^" + _NUM + r"\s*(k)?\s*(?:r|ohms?)$", re.IGNORECASE)
_DNP_VALUE_RE = re.compile(
    r"(?<![a-z0-9])(dnp|dnf|dni|dnm|nc|n/c|nf|np|no[\s_-]?pop|no[\s_-]?stuff)(?![a-z0-9])",
    re.IGNORECASE,
)
_DNP_TEXT_RE = re.compile(
    r"(?<![a-z0-9])(dnp|dnf|dni|not[\s_-]+(?:fitted|populated|mounted|placed|assembled)"
    r"|do[\s_-]+not[\s_-]+(?:fit|populate|place|mount|assemble|install)|unpopulated)"
    r"(?![a-z0-9])",
    re.IGNORECASE,
)


def _num(text: str) -> float:
    return float(text.replace(",", "."))


def _scaled(number: str, prefix: str) -> float:
    """``number`` (decimal text) times the SI ``prefix``, without binary rounding noise."""
    return float(f"{number.replace(',', '.')}e{_SI_EXP[prefix.lower()]}")


def parse_inductance(text: str, *, rkm: bool = True) -> float | None:
    """Inductance (H) written in a value text, or ``None``.

    Parameters
    ----------
    text : str
        Value as written: ``"2.2uH"``, ``"4.7µH"``, ``"0.47uH, 4A"``, ``"470nH"``,
        ``"33uH 20%"``, ``"10 nH, 5%"``; with ``rkm`` also ``"2u2"``, ``"22u"``,
        ``"100n"``, ``"4R7"`` / ``"1R0"`` / ``"R47"`` (microhenries, R as decimal point).
    rkm : bool
        Accept unit-letter forms without ``H`` (only sensible for inductor designators).

    Returns
    -------
    float or None
        Inductance (H).
    """
    t = text.translate(_MICRO).strip()
    m = _HENRY_RE.search(t)
    if m is not None:
        return _scaled(m.group(1), m.group(2))
    if not rkm:
        return None
    first = re.split(r"[\s,;/]+", t, maxsplit=1)[0] if t else ""
    m = _UNIT_ONLY_RE.match(first)
    if m is not None:
        return _scaled(m.group(1), m.group(2))
    m = _RKM_RE.match(first)
    if m is not None and (m.group(1) or m.group(3)):
        letter = m.group(2).lower()
        return _scaled(f"{m.group(1) or '0'}.{m.group(3)}", "u" if letter == "r" else letter)
    return None


def _impedance_text(value: str, *, rkm_inductor: bool) -> str | None:
    """Describe a value that is an impedance (ferrite bead), else ``None``."""
    t = value.translate(_MICRO).strip()
    m = _AT_FREQ_RE.search(t)
    if m is not None:
        ohm = f"{m.group(1)}{'k' if m.group(2) else ''} ohm" if m.group(1) else "impedance"
        f_hz = _num(m.group(3)) * _HZ[m.group(4).lower()]
        return f"{ohm} at {f_hz / 1e6:g} MHz"
    first = re.split(r"[\s,;/]+", t, maxsplit=1)[0] if t else ""
    m = _OHM_RE.match(first)
    if m is not None:
        if rkm_inductor and _RKM_RE.match(first):
            return None  # "1R0" on an inductor is 1.0 uH
        return f"{m.group(1)}{'k' if m.group(2) else ''} ohm"
    return None


def _fmt_h(value_h: float) -> str:
    if value_h >= 1e-3:
        return f"{value_h * 1e3:g} mH"
    if value_h >= 1e-6:
        return f"{value_h * 1e6:g} µH"
    return f"{value_h * 1e9:g} nH"


# ----------------------------------------------------------------------------- package text

_INCH_CHIP_MM: dict[str, tuple[float, float]] = {
    "0201": (0.6, 0.3),
    "0402": (1.0, 0.5),
    "0603": (1.6, 0.8),
    "0805": (2.0, 1.25),
    "0806": (2.0, 1.6),
    "1008": (2.5, 2.0),
    "1206": (3.2, 1.6),
    "1210": (3.2, 2.5),
    "1806": (4.5, 1.6),
    "1812": (4.5, 3.2),
    "2010": (5.0, 2.5),
    "2512": (6.3, 3.2),
}
"""Inch chip codes -> (length, width) in mm (EIA sizes, common practice)."""

_METRIC_CHIP_MM: dict[str, tuple[float, float]] = {
    "0603": (0.6, 0.3),
    "1005": (1.0, 0.5),
    "1608": (1.6, 0.8),
    "2012": (2.0, 1.25),
    "2016": (2.0, 1.6),
    "2520": (2.5, 2.0),
    "3216": (3.2, 1.6),
    "3225": (3.2, 2.5),
    "4516": (4.5, 1.6),
    "4532": (4.5, 3.2),
    "5025": (5.0, 2.5),
    "6332": (6.3, 3.2),
}
"""Metric chip codes (length and width in 0.1 mm) -> (length, width) in mm."""

_LW_RE = re.compile(
    r"(?<![a-z])L(\d+(?:\.\d+)?)(?:mm)?[-_ ]?W(\d+(?:\.\d+)?)(?:mm)?"
    r"(?:[-_ ]?H(\d+(?:\.\d+)?))?",
    re.IGNORECASE,
)
_METRIC_RE = re.compile(r"(?<!\d)(\d{4})[\s_-]*metric", re.IGNORECASE)
_PAD_TOKEN_RE = re.compile(
    r"(?:pad|drill|hole)\s*\d+(?:\.\d+)?(?:\s*[x×]\s*\d+(?:\.\d+)?)?(?:mm)?"
    r"|(?<![a-z])p\d+(?:\.\d+)?mm",
    re.IGNORECASE,
)
_AXB_RE = re.compile(
    r"(?<![\d.])(\d+(?:\.\d+)?)\s*(?:mm)?\s*[x×*]\s*(\d+(?:\.\d+)?)"
    r"(?:\s*(?:mm)?\s*[x×*]\s*(\d+(?:\.\d+)?))?",
    re.IGNORECASE,
)
_SERIES_RE = re.compile(r"(?<![a-z])(?:nr|srn)[-_ ]?(\d{2})(\d{2}|xx)", re.IGNORECASE)
_CODE_RE = re.compile(r"(?<!\d)(\d{4})(?!\d)")


@dataclass(frozen=True)
class _Body:
    w_mm: float
    h_mm: float
    height_mm: float | None
    body_from: BodyFrom
    how: str


def package_body(text: str) -> tuple[float, float, float | None, BodyFrom, str] | None:
    """Body size written in a package name.

    Parameters
    ----------
    text : str
        Package (footprint) name, e.g. ``"IND-SMD_L7.0-W6.6_..."``, ``"L_1210_3225Metric"``,
        ``"IND0806"``, ``"L_..._NR-60xx_..."``, ``"L_7.3x7.3_H4.5"``.

    Returns
    -------
    tuple or None
        ``(length_mm, width_mm, height_mm or None, body_from, matched_text)`` with
        ``body_from`` ``"package dimensions"`` or ``"package code"``; ``None`` when the
        name gives no size.

    Notes
    -----
    A bare four-digit code is read as an inch chip code when it is one (``0603`` is the
    inch size 1.6 x 0.8 mm), else as a metric code (``2520`` -> 2.5 x 2.0 mm); a code
    followed by ``Metric`` is always metric. Pad and pitch tokens (``Pad1.15x1.40mm``,
    ``P2.54mm``) are ignored when looking for ``A x B`` dimensions.
    """
    m = _LW_RE.search(text)
    if m is not None:
        w, h = float(m.group(1)), float(m.group(2))
        height = float(m.group(3)) if m.group(3) else None
        if _plausible(w, h):
            return w, h, height, "package dimensions", m.group(0)
    m = _METRIC_RE.search(text)
    if m is not None and m.group(1) in _METRIC_CHIP_MM:
        w, h = _METRIC_CHIP_MM[m.group(1)]
        return w, h, None, "package code", m.group(0)
    cleaned = _PAD_TOKEN_RE.sub(" ", text)
    m = _AXB_RE.search(cleaned)
    if m is not None:
        w, h = float(m.group(1)), float(m.group(2))
        height = float(m.group(3)) if m.group(3) else None
        if _plausible(w, h):
            hm = re.search(r"(?<![a-z])H(\d+(?:\.\d+)?)", cleaned[m.end() :], re.IGNORECASE)
            if height is None and hm is not None:
                height = float(hm.group(1))
            return w, h, height, "package dimensions", m.group(0)
    m = _SERIES_RE.search(text)
    if m is not None:
        side = int(m.group(1)) / 10.0
        height = int(m.group(2)) / 10.0 if m.group(2).isdigit() else None
        if _plausible(side, side):
            return side, side, height, "package code", m.group(0)
    for m in _CODE_RE.finditer(text):
        code = m.group(1)
        if code in _INCH_CHIP_MM:
            w, h = _INCH_CHIP_MM[code]
            return w, h, None, "package code", code
        if code in _METRIC_CHIP_MM:
            w, h = _METRIC_CHIP_MM[code]
            return w, h, None, "package code", code
    return None


def _plausible(w: float, h: float) -> bool:
    return 0.2 <= w <= 80.0 and 0.2 <= h <= 80.0


# ----------------------------------------------------------------------------- geometry


def body_outline(
    x_mm: float, y_mm: float, w_mm: float, h_mm: float, rotation_deg: float
) -> FloatArray:
    """Closed rectangle of a part body.

    Parameters
    ----------
    x_mm, y_mm : float
        Centre (mm).
    w_mm, h_mm : float
        Length along the part's local X and width along its local Y (mm).
    rotation_deg : float
        Rotation of the local X axis, degrees counter-clockwise.

    Returns
    -------
    ndarray, shape (5, 2)
        Corners counter-clockwise, first repeated at the end (mm).
    """
    hw, hh = 0.5 * w_mm, 0.5 * h_mm
    local = np.array([[-hw, -hh], [hw, -hh], [hw, hh], [-hw, hh], [-hw, -hh]])
    a = math.radians(rotation_deg)
    c, s = math.cos(a), math.sin(a)
    rot = np.array([[c, -s], [s, c]])
    return np.asarray(local @ rot.T + np.array([x_mm, y_mm]), dtype=np.float64)


_PAD_GROW_MM = 0.2
"""Growth of a pad bounding box to a body (mm): bodies overhang their pads slightly."""
_CENTRE_SPAN_FACTOR = 1.3
"""Body length / span of pad centres when only centres are known (terminal pads sit
under the body ends, so the body is about the pad pitch plus one pad length)."""


def _body_from_pads(
    pads: npt.ArrayLike, x_mm: float, y_mm: float, rotation_deg: float, ref: str
) -> tuple[float, float, str] | None:
    arr = np.asarray(pads, dtype=np.float64)
    if arr.size == 0:
        return None
    if arr.ndim != 2 or arr.shape[1] not in (2, 4):
        msg = (
            f"pads_by_ref[{ref!r}] must be an (n, 2) array of pad centres or an (n, 4) "
            f"array of pad boxes in mm; got shape {arr.shape}"
        )
        raise InputError(msg)
    if arr.shape[1] == 4:
        pts = np.concatenate(
            [arr[:, [0, 1]], arr[:, [2, 1]], arr[:, [2, 3]], arr[:, [0, 3]]], axis=0
        )
    else:
        pts = arr
    pts = pts[np.all(np.isfinite(pts), axis=1)]
    if pts.shape[0] == 0:
        return None
    a = math.radians(rotation_deg)
    c, s = math.cos(a), math.sin(a)
    d = pts - np.array([x_mm, y_mm])
    lx = d[:, 0] * c + d[:, 1] * s
    ly = -d[:, 0] * s + d[:, 1] * c
    span_x = float(lx.max() - lx.min())
    span_y = float(ly.max() - ly.min())
    if arr.shape[1] == 4:
        w, h = span_x + _PAD_GROW_MM, span_y + _PAD_GROW_MM
        how = "bounding box of its pads"
    else:
        w, h = _CENTRE_SPAN_FACTOR * span_x, _CENTRE_SPAN_FACTOR * span_y
        how = "span of its pad centres"
        if min(w, h) < 0.5 * max(w, h):
            w = h = max(w, h)
            how += " (square body assumed across one row of pads)"
    if max(w, h) < 0.5:
        return None
    return max(w, 0.5), max(h, 0.5), how


_DEFAULT_SIDE_MM = (
    (1.0e-6, 4.0),
    (4.7e-6, 5.0),
    (22e-6, 6.0),
    (100e-6, 8.0),
)
"""Typical shielded SMD power inductor side (mm) up to a value (H); larger: 10 mm."""


def _default_body(kind: MagneticKind, value_h: float | None) -> tuple[float, str]:
    if kind == "transformer":
        return 10.0, "typical small SMD transformer"
    if value_h is None:
        return (6.0 if kind == "choke" else 5.0), "value unknown"
    for limit, side in _DEFAULT_SIDE_MM:
        if value_h <= limit * (1 + 1e-9):
            return side, f"typical size for {_fmt_h(value_h)}"
    return 10.0, f"typical size for {_fmt_h(value_h)}"


# ----------------------------------------------------------------------------- classification

_INDUCTOR_PREFIXES = frozenset({"L", "IND"})
_BEAD_PREFIXES = frozenset({"FB", "BEAD"})
_TRANSFORMER_PREFIXES = frozenset({"T", "TR", "TX", "TF", "XFMR"})
_CHOKE_PREFIXES = frozenset({"CMC", "LF", "CH"})

_BEAD_TEXT = re.compile(r"bead|(?<![a-z])ferrite(?![a-z])", re.IGNORECASE)
_MAGNETIC_CORE_TEXT = re.compile(r"inductor|choke|transformer|(?<![a-z])core", re.IGNORECASE)
_BALUN_TEXT = re.compile(r"balun", re.IGNORECASE)
_RF_TEXT = re.compile(r"(?<![a-z0-9])rf(?![a-z0-9])", re.IGNORECASE)
_CM_TEXT = re.compile(r"common[\s_-]*mode|(?<![a-z])cmc(?![a-z])|cm[\s_-]*choke", re.IGNORECASE)
_CHOKE_TEXT = re.compile(r"choke", re.IGNORECASE)
_TRANSFORMER_TEXT = re.compile(
    r"transformer|xfmr|(?<![a-z])trafo|flyback|gate[\s_-]*drive[\s_-]*trans", re.IGNORECASE
)
_INDUCTOR_TEXT = re.compile(r"inductor|(?<![a-z])ind(?![a-z])|^l_", re.IGNORECASE)
_SMALL_CHIP_MAX_MM = 1.6
"""Longest body (mm) of a chip package counted as small for the RF rule (0603 inch)."""
_RF_BELOW_H = 100e-9
_SMALL_RF_BELOW_H = 1e-6


def _prefix(ref: str) -> str:
    m = re.match(r"[A-Za-z]+", ref.strip())
    return m.group(0).upper() if m else ""


@dataclass(frozen=True)
class _Decision:
    include: bool
    kind: MagneticKind | None
    reasons: tuple[str, ...]
    assumptions: tuple[str, ...]
    exclude_reason: str = ""


def _classify(row: PlacementRow) -> _Decision | None:
    """Decide one row; ``None`` when nothing about it looks magnetic."""
    prefix = _prefix(row.ref)
    value = row.value.strip()
    text = " ".join(t for t in (row.value, row.package, row.description) if t)
    is_l = prefix in _INDUCTOR_PREFIXES
    is_fb = prefix in _BEAD_PREFIXES
    is_t = prefix in _TRANSFORMER_PREFIXES
    is_ch = prefix in _CHOKE_PREFIXES
    magnetic_prefix = is_l or is_fb or is_t or is_ch

    value_h = parse_inductance(value, rkm=is_l or is_ch)
    impedance = _impedance_text(value, rkm_inductor=is_l)
    bead_text = _BEAD_TEXT.search(text)
    if (
        bead_text is not None
        and _MAGNETIC_CORE_TEXT.search(text)
        and not re.search("bead", text, re.IGNORECASE)
    ):
        bead_text = None  # "ferrite core inductor" is an inductor
    desc_imp = _AT_FREQ_RE.search(row.description.translate(_MICRO))
    transformer_text = _TRANSFORMER_TEXT.search(text)
    cm_text = _CM_TEXT.search(text)
    choke_text = _CHOKE_TEXT.search(text)
    inductor_text = _INDUCTOR_TEXT.search(row.package) or _INDUCTOR_TEXT.search(row.description)
    balun_text = _BALUN_TEXT.search(text)
    looks_magnetic = (
        magnetic_prefix
        or value_h is not None
        or bead_text is not None
        or transformer_text is not None
        or choke_text is not None
        or cm_text is not None
        or inductor_text is not None
        or balun_text is not None
    )
    if not looks_magnetic:
        return None

    def out(reason: str) -> _Decision:
        return _Decision(False, None, (), (), reason)

    # --- not fitted
    m = _DNP_VALUE_RE.search(value) or _DNP_TEXT_RE.search(row.description)
    if m is not None:
        return out(f"not fitted ({m.group(0)!r})")

    # --- ferrite beads
    if is_fb:
        return out(f"ferrite bead (designator prefix {prefix!r})")
    # A common-mode choke's value is often its common-mode impedance at a frequency,
    # so an impedance only marks a bead when nothing says "choke".
    chokeish = is_ch or cm_text is not None or choke_text is not None
    if bead_text is not None and cm_text is None:
        return out(f"ferrite bead (text {bead_text.group(0)!r})")
    if impedance is not None and not chokeish:
        return out(f"ferrite bead (value {value!r} is an impedance, {impedance})")
    if desc_imp is not None and value_h is None and not chokeish:
        return out(f"ferrite bead (description gives an impedance, {desc_imp.group(0)!r})")

    if not magnetic_prefix:
        if value_h is not None:
            what = f"value {_fmt_h(value_h)}"
        else:
            texts = (transformer_text, cm_text, choke_text, inductor_text, balun_text)
            what = "text " + repr(next((t.group(0) for t in texts if t is not None), ""))
        return out(
            f"designator prefix {prefix!r} is not a magnetic one ({what}); "
            "configure the part to include it"
        )

    # --- RF parts
    if balun_text is not None:
        return out(f"RF balun (text {balun_text.group(0)!r})")
    rf = _RF_TEXT.search(text)
    if rf is not None:
        return out(f"RF part (text {rf.group(0)!r})")
    if value_h is not None and value_h < _RF_BELOW_H:
        return out(f"RF coil (value {_fmt_h(value_h)} < 100 nH)")
    small = _small_chip(row.package)
    if value_h is not None and value_h < _SMALL_RF_BELOW_H and small is not None:
        return out(f"RF coil ({_fmt_h(value_h)} in a {small} chip package)")

    reasons: list[str] = [f"designator prefix {prefix!r}"]
    assumptions: list[str] = []
    if value_h is not None:
        reasons.append(f"value {_fmt_h(value_h)}")
    kind: MagneticKind
    if transformer_text is not None:
        kind = "transformer"
        reasons.append(f"text {transformer_text.group(0)!r}")
    elif cm_text is not None:
        kind = "choke"
        reasons.append(f"text {cm_text.group(0)!r}")
    elif choke_text is not None or is_ch:
        kind = "choke"
        if choke_text is not None:
            reasons.append(f"text {choke_text.group(0)!r}")
    elif is_t:
        if value_h is None and prefix != "XFMR":
            return out(
                f"designator prefix {prefix!r} without transformer text or inductance "
                "(RF transformers, transistors and test points use it too); configure "
                "the part to include it"
            )
        kind = "transformer"
        if prefix != "XFMR":
            assumptions.append("transformer assumed from the designator and an inductance value")
    else:
        kind = "inductor"
    if value_h is None:
        if value:
            assumptions.append(f"value unknown (value text {value!r} gives no inductance)")
        else:
            assumptions.append("value unknown")
        if not row.package and inductor_text is None:
            assumptions.append("no package or description hint; identified by designator only")
    if inductor_text is not None:
        reasons.append(f"package/description hint {inductor_text.group(0)!r}")
    return _Decision(True, kind, tuple(reasons), tuple(assumptions))


def _small_chip(package: str) -> str | None:
    """Name of a chip code in ``package`` no longer than 0603 (inch), else ``None``."""
    got = package_body(package)
    if got is None or got[3] != "package code":
        return None
    w, h = got[0], got[1]
    if max(w, h) <= _SMALL_CHIP_MAX_MM + 1e-9:
        return got[4]
    return None


# ----------------------------------------------------------------------------- public entry


def _overrides_by_ref(
    overrides: Iterable[PartOverride] | Mapping[str, PartOverride],
) -> dict[str, PartOverride]:
    items: Iterable[PartOverride]
    if isinstance(overrides, Mapping):
        items = overrides.values()
        for key, o in overrides.items():
            if key != o.ref:
                msg = f"part override key must equal its ref; got key {key!r} for ref {o.ref!r}"
                raise ConfigError(msg)
    else:
        items = overrides
    out: dict[str, PartOverride] = {}
    for o in items:
        if o.ref in out:
            msg = f"part override refs must be unique; got {o.ref!r} twice"
            raise ConfigError(msg)
        if o.kind is not None and o.kind not in _KINDS:
            msg = f"part kind must be one of {', '.join(_KINDS)}; got {o.kind!r} for {o.ref!r}"
            raise ConfigError(msg)
        if o.body_mm is not None and (
            len(o.body_mm) != 2
            or not all(isinstance(v, int | float) and math.isfinite(v) and v > 0 for v in o.body_mm)
        ):
            msg = (
                f"part body_mm must be two positive lengths in mm; got {o.body_mm!r} for {o.ref!r}"
            )
            raise ConfigError(msg)
        if o.height_mm is not None and not (math.isfinite(o.height_mm) and o.height_mm > 0):
            msg = (
                f"part height_mm must be a positive length in mm; got {o.height_mm!r} for {o.ref!r}"
            )
            raise ConfigError(msg)
        out[o.ref] = o
    return out


def identify_magnetics(
    rows: Iterable[PlacementRow],
    *,
    pads_by_ref: Mapping[str, npt.ArrayLike] | None = None,
    overrides: Iterable[PartOverride] | Mapping[str, PartOverride] = (),
) -> MagneticsResult:
    """Find the power magnetics among placed parts and give each a body outline.

    Parameters
    ----------
    rows : iterable of PlacementRow
        Placed parts (placement frame, mm, degrees CCW), joined with BOM values.
    pads_by_ref : mapping of str to array_like, optional
        Pads of each part in the *placement* frame (mm): ``(n, 2)`` pad centres or
        ``(n, 4)`` pad boxes ``(xmin, ymin, xmax, ymax)``. Used for the body when the
        package name gives no size.
    overrides : iterable of PartOverride or mapping of ref to PartOverride
        Per-part configuration (kind, body size, height).

    Returns
    -------
    MagneticsResult
        Magnetics in row order, excluded magnetic-looking parts with the reason, and
        notices (configured parts that are not placed, bodies given for excluded parts).

    Raises
    ------
    ConfigError
        An override has an unknown kind, a non-positive size, or repeats a ref.
    InputError
        A pad array has the wrong shape.

    Notes
    -----
    The rules are listed in the module docstring.
    """
    by_ref = _overrides_by_ref(overrides)
    pads = pads_by_ref or {}
    magnetics: list[Magnetic] = []
    excluded: list[Excluded] = []
    notices: list[Notice] = []
    seen: set[str] = set()
    for row in rows:
        seen.add(row.ref)
        ov = by_ref.get(row.ref)
        decision = _classify(row)
        if ov is not None and ov.kind == "exclude":
            excluded.append(_excluded(row, "excluded by configuration"))
            continue
        if ov is not None and ov.kind is not None:
            kind: MagneticKind = _KIND_OF[ov.kind]
            reasons = [f"kind {kind!r} set by configuration"]
            assumptions: list[str] = []
            if decision is not None and not decision.include:
                reasons.append(f"included although {decision.exclude_reason}")
            elif decision is not None:
                reasons.extend(decision.reasons[1:] if decision.kind == kind else ())
        elif decision is None:
            continue
        elif not decision.include or decision.kind is None:
            excluded.append(_excluded(row, decision.exclude_reason))
            if ov is not None and (ov.body_mm is not None or ov.height_mm is not None):
                notices.append(
                    Notice(
                        file=row.source,
                        line=row.line,
                        message=(
                            f"configuration gives a body for {row.ref}, but it is excluded "
                            f"({decision.exclude_reason}); set its kind to include it"
                        ),
                    )
                )
            continue
        else:
            kind = decision.kind
            reasons = list(decision.reasons)
            assumptions = list(decision.assumptions)

        value_h = parse_inductance(
            row.value, rkm=_prefix(row.ref) in (_INDUCTOR_PREFIXES | _CHOKE_PREFIXES)
        )
        body = _body(row, kind, value_h, ov, pads.get(row.ref))
        if body.body_from == "default":
            assumptions.append(
                f"body {body.w_mm:g} x {body.h_mm:g} mm assumed ({body.how}); "
                "give body_mm in the configuration"
            )
        else:
            reasons.append(f"body {body.w_mm:g} x {body.h_mm:g} mm from {body.how}")
        all_reasons = [*reasons, *(a for a in assumptions if a not in reasons)]
        magnetics.append(
            Magnetic(
                ref=row.ref,
                kind=kind,
                value_h=value_h,
                value_text=row.value,
                package=row.package,
                description=row.description,
                side=row.side,
                x_mm=row.x_mm,
                y_mm=row.y_mm,
                rotation_deg=row.rotation_deg,
                body_mm=(body.w_mm, body.h_mm),
                height_mm=body.height_mm,
                outline=body_outline(row.x_mm, row.y_mm, body.w_mm, body.h_mm, row.rotation_deg),
                body_from=body.body_from,
                reasons=tuple(all_reasons),
                assumptions=tuple(assumptions),
                source=row.source,
                line=row.line,
            )
        )
    for ref in by_ref:
        if ref not in seen:
            notices.append(
                Notice(
                    file="",
                    line=None,
                    message=f"configuration names part {ref!r}, which is not in the placement",
                )
            )
    return MagneticsResult(
        magnetics=tuple(magnetics), excluded=tuple(excluded), notices=tuple(notices)
    )


def _excluded(row: PlacementRow, reason: str) -> Excluded:
    return Excluded(ref=row.ref, value_text=row.value, package=row.package, reason=reason)


def _body(
    row: PlacementRow,
    kind: MagneticKind,
    value_h: float | None,
    ov: PartOverride | None,
    pads: npt.ArrayLike | None,
) -> _Body:
    height = ov.height_mm if ov is not None else None
    if ov is not None and ov.body_mm is not None:
        w, h = float(ov.body_mm[0]), float(ov.body_mm[1])
        return _Body(w, h, height, "config", "the configuration")
    for text, where in ((row.package, "package"), (row.description, "description")):
        got = package_body(text) if text else None
        if got is not None and (where == "package" or got[3] == "package code"):
            w, h, pkg_height, body_from, matched = got
            src = "dimensions" if body_from == "package dimensions" else "code"
            return _Body(
                w,
                h,
                height if height is not None else pkg_height,
                body_from,
                f"{where} {src} {matched!r}",
            )
    if pads is not None:
        got_pads = _body_from_pads(pads, row.x_mm, row.y_mm, row.rotation_deg, row.ref)
        if got_pads is not None:
            return _Body(got_pads[0], got_pads[1], height, "pads", got_pads[2])
    side, why = _default_body(kind, value_h)
    return _Body(side, side, height, "default", why)
