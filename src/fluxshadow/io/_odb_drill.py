"""ODB++ drill and rout layers into :class:`~fluxshadow.io.records.DrillRecord`.

A matrix row with ``CONTEXT=BOARD`` and ``TYPE=DRILL`` holds holes as pads: a round
symbol is a hole of that diameter, an oval symbol a slot along its long axis (width the
short side); lines and arcs are routed slots drawn with a round symbol. A ``TYPE=ROUT``
row holds routed (non-plated) cuts. Plating comes from the feature attribute ``.drill``
(options ``PLATED``, ``NON_PLATED``, ``VIA`` in that order, stored as the option number;
ODB++ Format Specification, system attributes, from memory -- both shared packages agree),
else from the layer name (``non-plated``, ``non_plated``, ``npth``), else it is assumed.
"""

from __future__ import annotations

import itertools

import numpy as np
import numpy.typing as npt

from fluxshadow.errors import Notice
from fluxshadow.io._odb_features import ParsedFeatures
from fluxshadow.io.records import FLASH, TRACK, DrillRecord

__all__ = ["drill_option", "drill_record", "span_of"]

FloatArray = npt.NDArray[np.float64]

_OPTIONS = {"0": True, "1": False, "2": True, "plated": True, "non_plated": False, "via": True}
_NON_PLATED_WORDS = ("non-plated", "non_plated", "nonplated", "npth")


def drill_option(attrs: str, drill_attr: int | None) -> bool | None:
    """Plated (True/False) from a feature's attribute text, None when it has no ``.drill``.

    ``attrs`` is the text after ``;`` (``"0=2,1=0"``); ``drill_attr`` the number of the
    ``.drill`` attribute name (``@n .drill``).
    """
    if drill_attr is None or not attrs:
        return None
    key = str(drill_attr)
    for item in attrs.split(","):
        k, eq, v = item.strip().partition("=")
        if k == key and eq:
            return _OPTIONS.get(v.strip().lower())
    return None


def span_of(start: str, end: str, copper_names: tuple[str, ...]) -> tuple[int, int] | None:
    """1-based copper span (top = 1) of a drill row; None for the full stack or unknown."""
    names = [n.upper() for n in copper_names]
    if not start or not end or start.upper() not in names or end.upper() not in names:
        return None
    a, b = sorted((names.index(start.upper()) + 1, names.index(end.upper()) + 1))
    if (a, b) == (1, len(names)):
        return None
    return a, b


def _oval_slot(
    ring: FloatArray, name: str, scale: float, cx: float, cy: float
) -> tuple[FloatArray, float] | None:
    """Slot ends (2, 2) and width of an oval pad whose outline (about the origin) is ``ring``."""
    try:
        w, h = (float(v) * scale for v in name[4:].split("x")[:2])
    except ValueError:
        return None
    width, length = min(w, h), max(w, h)
    r = np.hypot(ring[:, 0], ring[:, 1])
    far = ring[int(np.argmax(r))]
    u = far / max(float(np.hypot(far[0], far[1])), 1e-12)
    half = 0.5 * (length - width)
    c = np.array([cx, cy])
    return np.vstack([c - half * u, c + half * u]), width


def drill_record(
    parsed: ParsedFeatures,
    layer_name: str,
    *,
    rout: bool,
    span: tuple[int, int] | None,
) -> DrillRecord:
    """Holes and slots of one drill or rout layer (mm).

    Parameters
    ----------
    parsed : ParsedFeatures
        The layer's features, read with attributes kept.
    layer_name : str
        Matrix name (used for plating when features carry no ``.drill``).
    rout : bool
        A ``TYPE=ROUT`` layer: every cut is a non-plated slot.
    span : tuple of (int, int) or None
        Copper span from :func:`span_of`.

    Returns
    -------
    DrillRecord
        ``plating_from`` is "attribute", "attribute and layer name", "layer name",
        "assumed plated" or "rout layer". Features that are neither round/oval pads nor
        lines/arcs drawn with a round symbol are left out with one notice.
    """
    src = parsed.source
    drill_attr = next((k for k, v in parsed.attr_names.items() if v == ".drill"), None)
    name_np = any(w in layer_name.lower() for w in _NON_PLATED_WORDS)
    default = not (rout or name_np)
    hole_xy: list[tuple[float, float]] = []
    hole_d: list[float] = []
    hole_p: list[bool] = []
    slot_xy: list[FloatArray] = []
    slot_d: list[float] = []
    slot_p: list[bool] = []
    from_attr = from_default = 0
    skipped: list[int] = []
    used: set[int] = set()
    for k, kind in enumerate(parsed.kind):
        if not parsed.dark[k]:
            skipped.append(k)
            continue
        ap = parsed.apertures[parsed.aperture[k]]
        opt = None if rout else drill_option(parsed.attrs[k] if parsed.attrs else "", drill_attr)
        plated = default if opt is None else opt
        if kind == FLASH:
            x, y = parsed.xy[k]
            if ap.circle_diameter_mm is not None:
                hole_xy.append((x, y))
                hole_d.append(ap.circle_diameter_mm)
                hole_p.append(plated)
            elif ap.template == "O" and ap.parts:
                name, scale = parsed.symbol_names[ap.code]
                got = _oval_slot(ap.parts[0][1], name, scale, x, y)
                if got is None:
                    skipped.append(k)
                    continue
                slot_xy.append(got[0])
                slot_d.append(got[1])
                slot_p.append(plated)
            else:
                skipped.append(k)
                continue
        elif kind == TRACK and ap.circle_diameter_mm is not None:
            line = parsed.rings[k][0]
            for a, b in itertools.pairwise(line):
                slot_xy.append(np.vstack([a, b]))
                slot_d.append(ap.circle_diameter_mm)
                slot_p.append(plated)
        else:
            skipped.append(k)
            continue
        used.add(ap.code)
        if opt is None:
            from_default += 1
        else:
            from_attr += 1
    if rout:
        how = "rout layer"
    elif from_attr and not from_default:
        how = "attribute"
    elif from_attr:
        how = "attribute and layer name" if name_np else "attribute, else assumed plated"
    else:
        how = "layer name" if name_np else "assumed plated"
    notices: list[Notice] = []
    if skipped:
        first = skipped[0]
        notices.append(
            Notice(
                file=src,
                line=None,
                message=(
                    f"{len(skipped)} drill feature(s) left out: not a round or oval pad, or a "
                    f"line/arc with a round symbol, or negative (first: feature number "
                    f"{parsed.feature[first]})"
                ),
            )
        )
    return DrillRecord(
        source=src,
        units_in_file=parsed.units,
        hole_xy=np.array(hole_xy, dtype=np.float64).reshape(-1, 2),
        hole_diameter_mm=np.array(hole_d, dtype=np.float64),
        hole_plated=np.array(hole_p, dtype=np.bool_),
        slot_xy=(np.stack(slot_xy) if slot_xy else np.zeros((0, 2, 2))).astype(np.float64),
        slot_diameter_mm=np.array(slot_d, dtype=np.float64),
        slot_plated=np.array(slot_p, dtype=np.bool_),
        span=span,
        plating_from=how,
        tool_count=len(used),
        notices=tuple(notices),
    )
