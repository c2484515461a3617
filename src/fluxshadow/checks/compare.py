"""What-if comparison: the same board with a void filled or cut, figure by figure.

``--fill REF:LAYER`` fills the zone of magnetic REF on LAYER with plane copper (no void left
there); ``--cut REF:LAYER`` clears all copper in that zone on LAYER (a keep-out);
``--cut REF:through`` mills an opening through the board under the part's body. Both
boards are checked with the same rules and settings, and every figure is put side by side.
"""

from __future__ import annotations

import re
from collections.abc import Sequence
from dataclasses import dataclass
from typing import Any, Literal

import shapely

from fluxshadow.board.edit import with_cutout, with_region
from fluxshadow.board.model import Board
from fluxshadow.checks.analysis import layer_depths_mm
from fluxshadow.checks.model import Finding, Report
from fluxshadow.checks.run import run_checks
from fluxshadow.checks.settings import Settings, settings_from_config
from fluxshadow.errors import InputError

__all__ = ["Comparison", "Edit", "Row", "apply_edits", "compare", "parse_edit"]

_EDIT = re.compile(r"^\s*([^:\s]+)\s*:\s*([^:\s]+)\s*$")


@dataclass(frozen=True, kw_only=True)
class Edit:
    """One what-if edit: ``fill`` or ``cut`` the zone of ``ref`` on ``layer``."""

    kind: Literal["fill", "cut"]
    ref: str
    layer: str

    def __str__(self) -> str:
        return f"{self.kind} {self.ref}:{self.layer}"


@dataclass(frozen=True, kw_only=True)
class Row:
    """One figure before and after."""

    ref: str
    layer: str
    what: str
    before: Any
    after: Any

    @property
    def delta(self) -> float | None:
        """after - before for numbers, else None."""
        if isinstance(self.before, bool) or isinstance(self.after, bool):
            return None
        if isinstance(self.before, int | float) and isinstance(self.after, int | float):
            return float(self.after) - float(self.before)
        return None


@dataclass(frozen=True, kw_only=True)
class Comparison:
    """Both reports and the figures that changed."""

    edits: tuple[Edit, ...]
    before: Report
    after: Report
    rows: tuple[Row, ...]
    resolved: tuple[Finding, ...]
    new: tuple[Finding, ...]


def parse_edit(text: str, kind: Literal["fill", "cut"]) -> Edit:
    """Parse ``REF:LAYER`` (``LAYER`` may be ``through`` for a cut)."""
    m = _EDIT.match(text)
    if not m:
        msg = f"--{kind} must be REF:LAYER (e.g. L2:L3); got {text!r}"
        raise InputError(msg)
    return Edit(kind=kind, ref=m.group(1), layer=m.group(2))


def _zone(board: Board, settings: Settings, ref: str, layer_name: str) -> shapely.Geometry:
    m = board.magnetic(ref)
    lay = board.layer(layer_name)
    depth = layer_depths_mm(board, m.side)[lay.index - 1]
    margin = settings.zone_margin_mm + settings.zone_spread * depth
    return shapely.Polygon(m.outline).buffer(margin, join_style="mitre")


def apply_edits(board: Board, edits: Sequence[Edit], settings: Settings) -> Board:
    """The board with every edit applied in order.

    Raises
    ------
    InputError
        An edit names a part that is not a magnetic, a layer that does not exist, or
        ``through`` with ``--fill``.
    """
    out = board
    for e in edits:
        if e.layer.lower() == "through":
            if e.kind == "fill":
                msg = f"--fill must name a copper layer; got {e.ref}:{e.layer}"
                raise InputError(msg)
            body = shapely.Polygon(board.magnetic(e.ref).outline)
            out = with_cutout(out, body)
            continue
        zone = _zone(board, settings, e.ref, e.layer)
        out = with_region(out, e.layer, zone, fill=e.kind == "fill")
    return out


def _key(f: Finding) -> tuple[str, str, str]:
    return (f.rule, f.ref, f.layer)


def _rows(before: Report, after: Report) -> list[Row]:
    rows: list[Row] = []
    after_m = {m.ref: m for m in after.magnetics}
    for mb in before.magnetics:
        ma = after_m.get(mb.ref)
        if ma is None:
            continue
        la = {x.layer: x for x in ma.layers}
        for lb in mb.layers:
            lr = la.get(lb.layer)
            if lr is None:
                continue
            pairs: list[tuple[str, Any, Any]] = [
                ("coverage", lb.coverage, lr.coverage),
                ("void_area_mm2", lb.void_area_mm2, lr.void_area_mm2),
                (
                    "ring_closed",
                    lb.ring.closed if lb.ring else None,
                    lr.ring.closed if lr.ring else None,
                ),
            ]
            fb = dict(getattr(lb, "figures", {}) or {})
            fa = dict(getattr(lr, "figures", {}) or {})
            pairs += [(k, fb.get(k), fa.get(k)) for k in sorted(set(fb) | set(fa))]
            for what, b, a in pairs:
                if b != a:
                    rows.append(Row(ref=mb.ref, layer=lb.layer, what=what, before=b, after=a))
    # Metrics of findings present in both.
    after_f = {_key(f): f for f in after.findings}
    for fb_ in before.findings:
        fa_ = after_f.get(_key(fb_))
        if fa_ is None or fb_.rule == "assumption":
            continue
        for k in sorted(set(fb_.metrics) | set(fa_.metrics)):
            b, a = fb_.metrics.get(k), fa_.metrics.get(k)
            if b != a:
                rows.append(
                    Row(ref=fb_.ref, layer=fb_.layer, what=f"{fb_.rule}.{k}", before=b, after=a)
                )
    return rows


def compare(board: Board, edits: Sequence[Edit], *, settings: Settings | None = None) -> Comparison:
    """Check the board as it is and with the edits applied; collect every change.

    Parameters
    ----------
    board : Board
    edits : sequence of Edit
    settings : Settings, optional
        Default: from the board's configuration.

    Returns
    -------
    Comparison
    """
    if not edits:
        msg = "compare needs at least one --fill REF:LAYER or --cut REF:LAYER"
        raise InputError(msg)
    cfg = board.config
    if settings is None:
        settings = settings_from_config(cfg.thresholds, cfg.severity, source=cfg.source)
    edited = apply_edits(board, edits, settings)
    before = run_checks(board, settings=settings)
    after = run_checks(edited, settings=settings)
    bk = {_key(f) for f in before.findings if f.rule != "assumption"}
    ak = {_key(f) for f in after.findings if f.rule != "assumption"}
    return Comparison(
        edits=tuple(edits),
        before=before,
        after=after,
        rows=tuple(_rows(before, after)),
        resolved=tuple(f for f in before.findings if f.rule != "assumption" and _key(f) not in ak),
        new=tuple(f for f in after.findings if f.rule != "assumption" and _key(f) not in bk),
    )
