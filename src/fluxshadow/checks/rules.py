"""The rules: small units that turn shared geometry into findings.

Each rule has a stable id, a one-line summary (its docstring's first line, used by the
report and SARIF) and a function ``(ctx, geo) -> list[Finding]`` run once per magnetic.
Severities come from the settings; physics figures are present and ``None`` until the
physics models compute them.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass

import numpy as np
import shapely
from shapely.geometry.base import BaseGeometry

from fluxshadow.board.model import Board
from fluxshadow.checks.analysis import MagneticGeometry, Void
from fluxshadow.checks.model import Finding, RingInfo, Severity
from fluxshadow.checks.settings import Settings
from fluxshadow.checks.switch_node import switch_node_capacitance

__all__ = ["RULES", "Context", "Rule"]


@dataclass(frozen=True, kw_only=True)
class Context:
    """Read-only inputs every rule may use."""

    board: Board
    settings: Settings


RuleFn = Callable[[Context, MagneticGeometry], list[Finding]]


@dataclass(frozen=True, kw_only=True)
class Rule:
    """A rule: id, summary and the function that runs it."""

    id: str
    summary: str
    run: RuleFn


def _finding(
    ctx: Context,
    rule: str,
    ref: str,
    layer: str,
    x: float | None,
    y: float | None,
    message: str,
    metrics: dict[str, float | int | str | bool | None],
    severity: str | None = None,
) -> Finding | None:
    level = severity or ctx.settings.severity.get(rule, "warning")
    if level == "off":
        return None
    sev: Severity = level  # type: ignore[assignment]
    return Finding(
        rule=rule,
        severity=sev,
        ref=ref,
        layer=layer,
        x_mm=x,
        y_mm=y,
        message=message,
        metrics=metrics,
    )


def _r(x: float, nd: int = 3) -> float:
    return round(float(x), nd)


def plane_void(ctx: Context, geo: MagneticGeometry) -> list[Finding]:
    """A plane layer with less than full copper in the part's zone."""
    out = []
    m = geo.magnetic
    for lg in geo.layers:
        if not lg.plane_around or not lg.voids:
            continue
        largest = lg.voids[0]
        p = largest.polygon.representative_point()
        nearest = min(v.to_winding_mm for v in lg.voids)
        where = (
            "reaches under the winding"
            if nearest == 0
            else (f"{nearest:.2f} mm from the winding's projection")
        )
        msg = (
            f"Layer {lg.layer.name} is a plane around {m.kind} {m.ref} but covers "
            f"{lg.coverage:.0%} of its zone: "
            f"{len(lg.voids)} void(s), {lg.void_area_mm2:.1f} mm² without plane copper; the "
            f"nearest void {where}."
        )
        f = _finding(
            ctx,
            "plane-void",
            m.ref,
            lg.layer.name,
            float(p.x),
            float(p.y),
            msg,
            {
                "coverage": _r(lg.coverage, 4),
                "void_area_mm2": _r(lg.void_area_mm2),
                "largest_void_mm2": _r(largest.area_mm2),
                "voids": len(lg.voids),
                "void_to_winding_mm": _r(nearest),
                "depth_mm": _r(lg.depth_mm),
                "zone_area_mm2": _r(lg.zone.area),
                "shielding_db": None,
                "delta_l_nh": None,
            },
        )
        if f:
            out.append(f)
    return out


def _ring_key(ring: RingInfo) -> tuple[bool, str, float, float]:
    """Voids whose traced rings agree are parts of one copper-free region (one hole of the
    plane, or one opening), cut apart only by the zone's edge or by trace copper."""
    return (
        ring.closed,
        ring.opened_to,
        round(ring.inner_area_mm2, 3),
        round(ring.inner_perimeter_mm, 3),
    )


def void_ring(ctx: Context, geo: MagneticGeometry) -> list[Finding]:
    """Copper closing a ring around a void in the zone, or a void opened to a plane edge."""
    out = []
    m = geo.magnetic
    for lg in geo.layers:
        groups: dict[tuple[bool, str, float, float], list[Void]] = {}
        for v in lg.voids:
            if v.ring is not None:
                groups.setdefault(_ring_key(v.ring), []).append(v)
        for members in groups.values():
            v = max(members, key=lambda x: x.area_mm2)
            ring = v.ring
            assert ring is not None
            area = sum(x.area_mm2 for x in members)
            parts = "" if len(members) == 1 else f" (in {len(members)} parts within the zone)"
            p = v.polygon.representative_point()
            if ring.closed:
                msg = (
                    f"The copper of layer {lg.layer.name} closes a ring around a "
                    f"{area:.1f} mm² void{parts} under {m.kind} {m.ref} (hole "
                    f"{ring.inner_area_mm2:.1f} mm², inner perimeter "
                    f"{ring.inner_perimeter_mm:.1f} mm): it carries eddy current around the void."
                )
                severity = None
            else:
                msg = (
                    f"The void of {area:.1f} mm²{parts} on layer {lg.layer.name} under {m.kind} "
                    f"{m.ref} opens to the {ring.opened_to}: no ring current circulates around it."
                )
                severity = "note" if ctx.settings.severity.get("void-ring") != "off" else "off"
            f = _finding(
                ctx,
                "void-ring",
                m.ref,
                lg.layer.name,
                float(p.x),
                float(p.y),
                msg,
                {
                    "closed": ring.closed,
                    "opened_to": ring.opened_to,
                    "void_area_mm2": _r(area),
                    "void_parts": len(members),
                    "ring_inner_perimeter_mm": _r(ring.inner_perimeter_mm),
                    "ring_inner_area_mm2": _r(ring.inner_area_mm2),
                    "search_window_mm": _r(ring.search_window_mm),
                    "ring_current_a": None,
                    "moment_ratio": None,
                    "delta_l_nh": None,
                },
                severity,
            )
            if f:
                out.append(f)
    return out


def through_cutout(ctx: Context, geo: MagneticGeometry) -> list[Finding]:
    """Board material removed under a part, or a void on every copper layer."""
    board = ctx.board
    m = geo.magnetic
    zone0 = geo.layers[0].zone
    pieces: list[tuple[str, BaseGeometry]] = []
    if board.outline is not None and board.outline.cutouts:
        # The zone is clipped to the board, whose cut-outs are holes in it, so a cut-out
        # meets that zone only along its edge: measure it against the unclipped body zone.
        s = ctx.settings
        margin0 = s.zone_margin_mm + s.zone_spread * geo.layers[0].depth_mm
        reach = geo.body.buffer(margin0, join_style="mitre")
        for c in board.outline.cutouts:
            piece = shapely.intersection(c, reach)
            if piece.area > 0:
                pieces.append(("outline cut-out", piece))
    x0, y0, x1, y1 = zone0.bounds
    for d in board.drills:
        if len(d.slot_xy):
            a, b = d.slot_xy[:, 0, :], d.slot_xy[:, 1, :]
            near = (
                (np.maximum(a[:, 0], b[:, 0]) >= x0 - 5)
                & (np.minimum(a[:, 0], b[:, 0]) <= x1 + 5)
                & (np.maximum(a[:, 1], b[:, 1]) >= y0 - 5)
                & (np.minimum(a[:, 1], b[:, 1]) <= y1 + 5)
            )
            for i in np.flatnonzero(near):
                slot = shapely.LineString(d.slot_xy[i]).buffer(0.5 * float(d.slot_diameter_mm[i]))
                if slot.intersects(zone0):
                    pieces.append(("routed slot", shapely.intersection(slot, zone0)))
        if len(d.hole_xy):
            xy, dia = d.hole_xy, d.hole_diameter_mm
            sel = ~d.hole_plated & (xy[:, 0] >= x0 - 5) & (xy[:, 0] <= x1 + 5)
            sel &= (xy[:, 1] >= y0 - 5) & (xy[:, 1] <= y1 + 5)
            for i in np.flatnonzero(sel):
                hole = shapely.Point(xy[i]).buffer(0.5 * float(dia[i]))
                if hole.intersects(zone0):
                    pieces.append(("non-plated hole", shapely.intersection(hole, zone0)))
    # A spot with no copper on any layer.
    spot = zone0
    for lg in geo.layers:
        spot = shapely.difference(spot, shapely.union(lg.plane, lg.traces))
    removed = shapely.union_all([g for _, g in pieces]) if pieces else shapely.Polygon()
    spot = shapely.difference(spot, removed)
    for part in shapely.get_parts(spot):
        if part.area >= ctx.settings.void_min_area_mm2:
            pieces.append(("void on every copper layer", part))
    if not pieces:
        return []
    total = shapely.union_all([g for _, g in pieces])
    kinds = sorted({k for k, _ in pieces})
    p = total.representative_point()
    msg = (
        f"Board material is removed under {m.kind} {m.ref}: {', '.join(kinds)}; "
        f"{total.area:.1f} mm² of its body zone."
    )
    f = _finding(
        ctx,
        "through-cutout",
        m.ref,
        "",
        float(p.x),
        float(p.y),
        msg,
        {
            "cutout_area_mm2": _r(total.area),
            "kind": ", ".join(kinds),
            "pieces": len(pieces),
        },
    )
    return [f] if f else []


def exposed_trace(ctx: Context, geo: MagneticGeometry) -> list[Finding]:
    """A trace on a deeper layer with no plane between it and the part in the zone."""
    out = []
    m = geo.magnetic
    for lg in geo.layers:
        for e in lg.exposed:
            net = e.net or "unnamed net"
            ret = (
                f"its nearest return plane is layer {e.return_layer} "
                f"({e.return_distance_mm:.2f} mm away)"
                if e.return_layer
                else "no plane under it serves as a return"
            )
            msg = (
                f"Track {net} on layer {lg.layer.name} runs {e.exposed_length_mm:.1f} mm under "
                f"{m.kind} {m.ref} "
                f"with no plane between it and the part; {ret}."
            )
            f = _finding(
                ctx,
                "exposed-trace",
                m.ref,
                lg.layer.name,
                e.x_mm,
                e.y_mm,
                msg,
                {
                    "net": e.net,
                    "exposed_length_mm": _r(e.exposed_length_mm),
                    "length_in_zone_mm": _r(e.length_in_zone_mm),
                    "return_layer": e.return_layer,
                    "return_distance_mm": None
                    if e.return_distance_mm is None
                    else _r(e.return_distance_mm),
                    "depth_mm": _r(lg.depth_mm),
                    "mutual_inductance_ph": None,
                    "induced_voltage_mv": None,
                },
            )
            if f:
                out.append(f)
    return out


RULES: dict[str, Rule] = {
    r.id: r
    for r in (
        Rule(id="plane-void", summary=(plane_void.__doc__ or "").strip(), run=plane_void),
        Rule(id="void-ring", summary=(void_ring.__doc__ or "").strip(), run=void_ring),
        Rule(
            id="through-cutout", summary=(through_cutout.__doc__ or "").strip(), run=through_cutout
        ),
        Rule(id="exposed-trace", summary=(exposed_trace.__doc__ or "").strip(), run=exposed_trace),
        Rule(
            id="switch-node-capacitance",
            summary=(switch_node_capacitance.__doc__ or "").strip(),
            run=switch_node_capacitance,
        ),
    )
}
"""The geometry rules in report order (``assumption`` findings are made by the runner)."""

ASSUMPTION_SUMMARY = "A value the tool had to assume, with how to state it in the config."
