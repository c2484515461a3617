"""The ``switch-node-capacitance`` rule: switch-node copper over the nearest plane.

A magnetic of a switching converter has one pad on the *switch node*: the node the
switches drive between the input rail and ground at every period. The copper of that node
on the mounting layer (the inductor's pad, the pour or tracks joining it to the switches)
forms a capacitor with the plane below it. That capacitor is charged and discharged at
every edge, in parallel with the switches' own output capacitance (Coss): it costs
switching loss and pushes a displacement current C dV/dt into the plane.

Finding the switch node (evidence in this order):

1. ``[[regulator]] switch_net = "..."`` in the configuration, for the regulator that names
   the magnetic among its ``parts``;
2. X2 net names (``.N`` object attributes) on the copper at the magnetic's pads: a net
   whose name, split at every non-alphanumeric character, has a part such as ``SW``,
   ``SW1``, ``VSW``, ``LX``, ``PH``, ``PHASE``, ``SWITCH`` or ``SWNODE`` (``SW_A``,
   ``BUCK_SW``, ``Net-(U20-SW)``);
3. otherwise the node is not identified: an ``assumption`` note says how to state it and
   no capacitance is reported.

The pads are the dark flashes (and small regions) of the mounting layer carrying the
part's designator as X2 component attribute (``.C``), else those whose centre lies in the
body outline grown by 0.5 mm (via pads excluded). The switch-node copper is the copper of
the switch net on the mounting layer that is connected, on that layer, to one of these
pads, together with the pads themselves.

Capacitance: each spot of the switch-node copper couples to the nearest plane below it
(the first deeper layer whose plane copper, other than the switch net's own, lies under
it). For every plane layer the overlap area is split into its connected pieces; each piece
becomes the rectangle of the same area and perimeter (``equivalent_rectangle_mm``) and
its capacitance is that of an outer-layer pad over a plane as a short, wide, open
microstrip (air above, the stack-up's dielectric below): the Hammerstad-Jensen
quasi-static microstrip capacitance per length (Hammerstad & Jensen, "Accurate models for
microstrip computer-aided design", IEEE MTT-S 1980) times the length extended by the
Hammerstad-Bekkadal open-end extension at both ends (*Microstrip Handbook*, 1975), both
from memory; see :func:`fluxshadow.physics.capacitance.pad_capacitance_microstrip_f`.
This is the parallel-plate capacitance ε0 εr A / d (fluxshadow physics reference row 16)
plus the fringing of the edges; for a 5 x 5 mm pad on 0.1 mm of εr = 4.3 it gives
10.0164 pF against 10.1535 pF from a layered method of moments (row 16c, 1.35 %). Several
gaps between the copper and the plane are taken in series (εr = Σd / Σ(d/εr)).

Figures at the operating point (row 17 and note 2(d) of the physics reference):

- ratio = C / Coss, with ``coss_f`` from the regulator, else an assumed 500 pF (switches
  of small buck converters have about 0.1-1 nF, from memory);
- loss = ½ C Vin² fsw *per hard-switched edge* (a converter whose two edges are both hard
  switched loses twice that);
- current = C Vin / t_edge, the displacement current of one edge, with ``edge_time_s``
  from the regulator, else an assumed 5 ns.

Without an operating point only the capacitance and the ratio are reported.
"""

from __future__ import annotations

import math
import re
from collections.abc import Sequence
from dataclasses import dataclass
from typing import TYPE_CHECKING

import numpy as np
import numpy.typing as npt
import shapely
from shapely.geometry.base import BaseGeometry

from fluxshadow.board.magnetics import Magnetic
from fluxshadow.board.model import Board, Layer
from fluxshadow.checks.analysis import MagneticGeometry
from fluxshadow.checks.model import Finding, Severity
from fluxshadow.checks.operating import operating_points
from fluxshadow.io.config import RegulatorConfig
from fluxshadow.io.records import FLASH, REGION
from fluxshadow.physics.capacitance import (
    capacitive_current_a,
    pad_capacitance_microstrip_f,
    parallel_plate_capacitance_f,
    switching_loss_w,
)

if TYPE_CHECKING:
    from fluxshadow.checks.rules import Context

__all__ = [
    "DEFAULT_COSS_F",
    "DEFAULT_EDGE_TIME_S",
    "RULE_ID",
    "NodeCapacitance",
    "PlaneShare",
    "SwitchNode",
    "SwitchNodeFigures",
    "SwitchNodeSearch",
    "copper_capacitance_f",
    "equivalent_rectangle_mm",
    "find_switch_nodes",
    "is_switch_net_name",
    "node_capacitance",
    "switch_node_capacitance",
    "switch_node_figures",
]

RULE_ID = "switch-node-capacitance"

IntArray = npt.NDArray[np.int64]

DEFAULT_COSS_F = 500e-12
"""Switch output capacitance assumed when none is stated (F): 0.5 nF, inside the 0.1-1 nF
of switches in small buck converters (from memory; physics reference note 2(d))."""

DEFAULT_EDGE_TIME_S = 5e-9
"""Switch-node edge (rise or fall) time assumed when none is stated (s): 5 ns, the edge of
the physics reference row 17 (common practice for small converters)."""

_PAD_REACH_MM = 0.5
"""Pads are looked for with their centre inside the body outline grown by this (mm)."""

_MAX_PAD_REGION_MM2 = 60.0
"""Regions up to this bounding-box area may be pads drawn as regions (larger: pours)."""

_MIN_PIECE_MM2 = 1e-4
"""Overlap pieces smaller than this are floating-point slivers (mm^2)."""

_TOUCH_MM = 1e-6

_NOT_PADS = ("viapad", "conductor", "nonconductor", "fiducial", "profile", "other")
"""``.AperFunction`` values (lower-case prefixes) that are not component pads."""

_SWITCH_PART = re.compile(r"^(?:V?SW\d*[A-D]?|LX\d*[A-D]?|PH\d*[A-D]?|PHASE\d*|SWITCH|SWNODE)$")


def is_switch_net_name(name: str) -> bool:
    """Whether a net name reads as a switch node.

    The name is split at every character that is not a letter or digit; it is a switch
    node when one part is ``SW``, ``VSW``, ``LX`` or ``PH`` (optionally followed by a
    number and one letter A-D: ``SW1``, ``SW2A``, ``LX3``), ``PHASE`` (optionally
    numbered), ``SWITCH`` or ``SWNODE``. ``SW_A``, ``BUCK_SW``, ``/power/LX`` and
    ``Net-(U20-SW)`` are switch nodes; ``SWCLK``, ``SWDIO``, ``VIN_SWITCHED`` and
    ``Net-(L1-Pad2)`` are not.

    Parameters
    ----------
    name : str
        Net name as written in the Gerber ``.N`` attribute.

    Returns
    -------
    bool
    """
    return any(_SWITCH_PART.match(p) for p in re.split(r"[^A-Z0-9]+", name.upper()) if p)


def _same_net(stated: str, name: str) -> bool:
    """A configured net name matches a file's net name exactly, ignoring case, or by the
    last part of a hierarchical name (``SW`` matches ``/power/SW``)."""
    s = stated.strip().upper()
    n = name.strip().upper()
    return s == n or n.rsplit("/", 1)[-1] == s


# --------------------------------------------------------------------------- finding the node


@dataclass(frozen=True, kw_only=True)
class SwitchNode:
    """The switch-node copper of one magnetic on its mounting layer (artwork frame, mm).

    Attributes
    ----------
    net : str
        Net name as in the copper file.
    evidence : {"config", "net name"}
        ``config``: named by ``[[regulator]] switch_net``; ``net name``: recognised by
        :func:`is_switch_net_name`.
    layer : Layer
        The mounting layer.
    copper : shapely geometry
        The switch-node copper on that layer connected to the pads (mm).
    pads_xy : tuple of (float, float)
        Centres of the magnetic's pads on the node (mm).
    """

    net: str
    evidence: str
    layer: Layer
    copper: BaseGeometry
    pads_xy: tuple[tuple[float, float], ...]

    @property
    def area_mm2(self) -> float:
        """Area of the switch-node copper (mm^2)."""
        return float(self.copper.area)


@dataclass(frozen=True, kw_only=True)
class SwitchNodeSearch:
    """What :func:`find_switch_nodes` found.

    ``nodes`` is empty when no switch node was identified; ``reason`` then says why.
    ``nets_at_pads`` lists the nets of the objects whose bounding box meets a pad (a
    candidate list: contact is confirmed on the composed copper only for switch nets);
    ``pads`` is the number of pads found.
    """

    nodes: tuple[SwitchNode, ...]
    reason: str
    nets_at_pads: tuple[str, ...]
    pads: int


def _pad_objects(board: Board, layer: Layer, magnetic: Magnetic) -> IntArray:
    """Indices of the magnetic's pads on a layer (see the module docstring)."""
    art = board.artwork(layer)
    rec = art.record
    reach = shapely.Polygon(magnetic.outline).buffer(_PAD_REACH_MM, join_style="mitre")
    idx = art.query(reach.bounds)
    kind = rec.obj_kind[idx]
    idx = idx[rec.obj_dark[idx] & ((kind == FLASH) | (kind == REGION))]
    if idx.size == 0:
        return np.asarray(idx, dtype=np.int64)
    wanted = [i for i, c in enumerate(rec.components) if c.strip().upper() == magnetic.ref.upper()]
    if wanted:
        mine = idx[np.isin(rec.obj_component[idx], wanted)]
        if mine.size:
            return np.asarray(mine, dtype=np.int64)
    box = art.object_bounds[idx]
    centre = np.where(
        (rec.obj_kind[idx] == FLASH)[:, None],
        rec.obj_xy[idx],
        0.5 * (box[:, :2] + box[:, 2:]),
    )
    inside = shapely.contains_xy(reach, centre[:, 0], centre[:, 1])
    small = (rec.obj_kind[idx] == FLASH) | (
        (box[:, 2] - box[:, 0]) * (box[:, 3] - box[:, 1]) <= _MAX_PAD_REGION_MM2
    )
    funcs = np.array(
        [
            rec.functions[f].strip().lower() if f >= 0 else ""
            for f in rec.obj_function[idx].tolist()
        ],
        dtype=object,
    )
    pad_like = np.array([not f.startswith(_NOT_PADS) for f in funcs], dtype=bool)
    return np.asarray(idx[inside & small & pad_like], dtype=np.int64)


def _nearest_part(geom: BaseGeometry, x: float, y: float) -> BaseGeometry | None:
    parts = [g for g in shapely.get_parts(geom) if g.area > 0]
    if not parts:
        return None
    point = shapely.Point(x, y)
    return min(parts, key=lambda g: float(g.distance(point)))


def find_switch_nodes(
    board: Board, magnetic: Magnetic, layer: Layer, *, switch_net: str | None = None
) -> SwitchNodeSearch:
    """The switch node(s) at a magnetic's pads on its mounting layer.

    Parameters
    ----------
    board : Board
    magnetic : Magnetic
        In the artwork frame.
    layer : Layer
        The mounting layer (top copper for a top part, bottom copper for a bottom part).
    switch_net : str, optional
        The net named by the configuration; only that net is looked for. Default: every
        net at the pads whose name reads as a switch node (:func:`is_switch_net_name`).

    Returns
    -------
    SwitchNodeSearch
        One :class:`SwitchNode` per switch net at the pads (a transformer or a coupled
        inductor may have two), or none with the reason.
    """
    art = board.artwork(layer)
    rec = art.record
    part = f"{magnetic.kind} {magnetic.ref}"
    pads = _pad_objects(board, layer, magnetic)
    if pads.size == 0:
        return SwitchNodeSearch(
            nodes=(),
            reason=f"no pads of {part} found on layer {layer.name}",
            nets_at_pads=(),
            pads=0,
        )
    boxes = art.object_bounds[pads]
    x0, y0 = boxes[:, :2].min(axis=0) - 0.1
    x1, y1 = boxes[:, 2:].max(axis=0) + 0.1
    window = (float(x0), float(y0), float(x1), float(y1))
    local = art.compose(window)
    near = art.query(window)
    near = near[rec.obj_dark[near]]
    near_box = art.object_bounds[near]
    # Each pad: its copper (the composed copper in its box, the part nearest its centre)
    # and the nets on or touching it.
    pad_geom: dict[int, BaseGeometry] = {}
    pad_xy: dict[int, tuple[float, float]] = {}
    pad_nets: dict[int, set[int]] = {}
    for k, i in enumerate(pads.tolist()):
        b = boxes[k]
        if rec.obj_kind[i] == FLASH:
            cx, cy = float(rec.obj_xy[i, 0]), float(rec.obj_xy[i, 1])
        else:
            cx, cy = 0.5 * float(b[0] + b[2]), 0.5 * float(b[1] + b[3])
        piece = _nearest_part(
            shapely.intersection(local, shapely.box(*(b[:2] - 1e-3), *(b[2:] + 1e-3))), cx, cy
        )
        if piece is None:
            continue
        pad_geom[i], pad_xy[i] = piece, (cx, cy)
        hit = (
            (near_box[:, 0] <= b[2])
            & (near_box[:, 2] >= b[0])
            & (near_box[:, 1] <= b[3])
            & (near_box[:, 3] >= b[1])
        )
        nets = {int(n) for n in rec.obj_net[near[hit]].tolist() if n >= 0}
        if rec.obj_net[i] >= 0:
            nets.add(int(rec.obj_net[i]))
        pad_nets[i] = nets
    seen = sorted({rec.nets[n] for nets in pad_nets.values() for n in nets})
    if not rec.nets or not any(pad_nets.values()):
        return SwitchNodeSearch(
            nodes=(),
            reason=(
                f"the copper of layer {layer.name} at the pads of {part} carries no net "
                "names (X2 .N attributes)"
            ),
            nets_at_pads=tuple(seen),
            pads=len(pad_geom),
        )
    if switch_net is not None:
        wanted = {n for n, name in enumerate(rec.nets) if _same_net(switch_net, name)}
    else:
        wanted = {n for n, name in enumerate(rec.nets) if is_switch_net_name(name)}
    # Pads per switch net, each contact confirmed on the composed copper (a box overlap is
    # not a connection).
    on_net: dict[int, list[int]] = {}
    for i, nets in pad_nets.items():
        for n in sorted(nets & wanted):
            if int(rec.obj_net[i]) != n:
                b = art.object_bounds[i]
                cu = art.compose(
                    (b[0] - 1e-3, b[1] - 1e-3, b[2] + 1e-3, b[3] + 1e-3), nets=[rec.nets[n]]
                )
                if not shapely.dwithin(cu, pad_geom[i], _TOUCH_MM):
                    continue
            on_net.setdefault(n, []).append(i)
    if not on_net:
        if switch_net is not None:
            reason = (
                f"the configured switch_net {switch_net!r} is not on the copper at the pads "
                f"of {part} on layer {layer.name}"
            )
        else:
            reason = f"no net at the pads of {part} is named like a switch node"
        return SwitchNodeSearch(
            nodes=(), reason=reason, nets_at_pads=tuple(seen), pads=len(pad_geom)
        )
    nodes = []
    for n, members in sorted(on_net.items(), key=lambda kv: rec.nets[kv[0]]):
        nodes.append(
            SwitchNode(
                net=rec.nets[n],
                evidence="config" if switch_net is not None else "net name",
                layer=layer,
                copper=_node_copper(board, layer, n, [pad_geom[i] for i in members]),
                pads_xy=tuple(pad_xy[i] for i in members),
            )
        )
    return SwitchNodeSearch(
        nodes=tuple(nodes), reason="", nets_at_pads=tuple(seen), pads=len(pad_geom)
    )


def _node_copper(board: Board, layer: Layer, net: int, pads: list[BaseGeometry]) -> BaseGeometry:
    """The net's copper on the layer connected to the pads, with the pads (mm)."""
    art = board.artwork(layer)
    rec = art.record
    same = [k for k, name in enumerate(rec.nets) if name == rec.nets[net]]
    mask = np.isin(np.asarray(rec.obj_net), same) & np.asarray(rec.obj_dark)
    boxes = [art.object_bounds[mask]] if np.any(mask) else []
    boxes.append(np.array([g.bounds for g in pads], dtype=np.float64))
    b = np.vstack(boxes)
    window = (
        float(b[:, 0].min()) - 0.1,
        float(b[:, 1].min()) - 0.1,
        float(b[:, 2].max()) + 0.1,
        float(b[:, 3].max()) + 0.1,
    )
    copper = shapely.union_all([art.compose(window, nets=[rec.nets[net]]), *pads])
    parts = np.asarray(shapely.get_parts(copper))
    if parts.size == 0:
        return shapely.MultiPolygon()
    keep = np.zeros(parts.size, dtype=bool)
    for pad in pads:
        keep |= shapely.dwithin(parts, pad, _TOUCH_MM)
    return shapely.union_all(parts[keep])


# --------------------------------------------------------------------------- capacitance


def equivalent_rectangle_mm(area_mm2: float, perimeter_mm: float) -> tuple[float, float]:
    """Sides of the rectangle with a given area and perimeter, shorter first (mm).

    The sides are the roots of t² − (P/2) t + A = 0. A shape more compact than a square
    (P² < 16 A, a disk or a polygon's rounding) has no such rectangle; the square of the
    same area is used.

    Parameters
    ----------
    area_mm2 : float
        Area A (mm^2), > 0.
    perimeter_mm : float
        Perimeter P (mm), holes included.

    Returns
    -------
    width_mm, length_mm : float
        ``width_mm <= length_mm``; ``width_mm * length_mm == area_mm2``.
    """
    half = 0.5 * perimeter_mm
    disc = half * half - 4.0 * area_mm2
    if disc <= 0.0:
        side = math.sqrt(area_mm2)
        return side, side
    root = math.sqrt(disc)
    length = 0.5 * (half + root)
    return area_mm2 / length, length


def copper_capacitance_f(
    copper: BaseGeometry, height_mm: float, eps_r: float
) -> tuple[float, float]:
    """Capacitance of outer-layer copper over a plane: parallel plate and with fringing.

    Each connected piece of ``copper`` is replaced by the rectangle of the same area and
    perimeter (:func:`equivalent_rectangle_mm`) and taken as an open microstrip of that
    width and length over the plane (air above), with the Hammerstad-Jensen microstrip
    and Hammerstad-Bekkadal open-end formulas
    (:func:`fluxshadow.physics.capacitance.pad_capacitance_microstrip_f`; fluxshadow physics
    reference rows 16 and 16c). The pieces are summed.

    Parameters
    ----------
    copper : shapely geometry
        The copper that lies over the plane (mm).
    height_mm : float
        Dielectric thickness between the copper and the plane (mm), > 0.
    eps_r : float
        Relative permittivity of that dielectric (1).

    Returns
    -------
    plate_f, total_f : float
        Parallel-plate capacitance ε0 εr A / d, and the capacitance with fringing (F).
    """
    plate = 0.0
    total = 0.0
    h_m = height_mm * 1e-3
    for piece in shapely.get_parts(copper):
        area = float(piece.area)
        if area < _MIN_PIECE_MM2:
            continue
        w_mm, l_mm = equivalent_rectangle_mm(area, float(piece.length))
        plate += float(parallel_plate_capacitance_f(area * 1e-6, h_m, eps_r))
        total += float(pad_capacitance_microstrip_f(w_mm * 1e-3, l_mm * 1e-3, h_m, eps_r))
    return plate, total


@dataclass(frozen=True, kw_only=True)
class PlaneShare:
    """The part of the switch-node copper whose nearest plane below is one layer.

    Attributes
    ----------
    layer : str
        The plane's layer name.
    distance_mm : float
        Dielectric distance from the switch-node copper to that layer (mm).
    epsilon_r : float
        Relative permittivity of the gap(s) in series (1).
    area_mm2 : float
        Overlap area (mm^2).
    plate_f, capacitance_f : float
        Parallel-plate capacitance and capacitance with fringing (F).
    """

    layer: str
    distance_mm: float
    epsilon_r: float
    area_mm2: float
    plate_f: float
    capacitance_f: float


@dataclass(frozen=True, kw_only=True)
class NodeCapacitance:
    """Capacitance of one switch node to the planes below it."""

    copper_area_mm2: float
    shares: tuple[PlaneShare, ...]

    @property
    def area_mm2(self) -> float:
        """Switch-node copper area over a plane (mm^2)."""
        return sum(s.area_mm2 for s in self.shares)

    @property
    def plate_f(self) -> float:
        """Parallel-plate part of the capacitance (F)."""
        return sum(s.plate_f for s in self.shares)

    @property
    def capacitance_f(self) -> float:
        """Capacitance with fringing (F)."""
        return sum(s.capacitance_f for s in self.shares)

    @property
    def main(self) -> PlaneShare | None:
        """The plane that carries most of the capacitance (``None`` if there is none)."""
        return max(self.shares, key=lambda s: s.capacitance_f) if self.shares else None


def _gap(board: Board, a: Layer, b: Layer) -> tuple[float, float]:
    """Distance (mm) and series relative permittivity between two copper layers."""
    st = board.stackup
    lo, hi = sorted((a.index, b.index))
    distance = st.distance_mm(lo, hi)
    gaps = st.gap_mm[lo - 1 : hi - 1]
    eps = st.epsilon_r[lo - 1 : hi - 1]
    eps_r = sum(gaps) / sum(g / e for g, e in zip(gaps, eps, strict=True))
    return distance, eps_r


def node_capacitance(
    board: Board, node: SwitchNode, deeper: Sequence[Layer], *, opening_mm: float
) -> NodeCapacitance:
    """Capacitance of a switch node to the nearest plane below each of its spots.

    Parameters
    ----------
    board : Board
    node : SwitchNode
    deeper : sequence of Layer
        The layers below the mounting layer, nearest first.
    opening_mm : float
        Opening of the plane/trace split (mm): copper narrower than this is not a plane.

    Returns
    -------
    NodeCapacitance
        One share per plane layer that lies under some of the copper.
    """
    remaining = node.copper
    x0, y0, x1, y1 = remaining.bounds if not remaining.is_empty else (0.0, 0.0, 0.0, 0.0)
    window = (x0 - 0.1, y0 - 0.1, x1 + 0.1, y1 + 0.1)
    shares: list[PlaneShare] = []
    for lay in deeper:
        if remaining.is_empty or remaining.area < _MIN_PIECE_MM2:
            break
        art = board.artwork(lay)
        plane, _ = art.split(window, opening_mm=opening_mm)
        if node.net in art.record.nets:
            # The switch net's own copper on a deeper layer is the same node, no reference.
            plane = shapely.difference(plane, art.compose(window, nets=[node.net]))
        under = shapely.intersection(remaining, plane)
        if under.area >= _MIN_PIECE_MM2:
            distance, eps_r = _gap(board, node.layer, lay)
            plate, total = copper_capacitance_f(under, distance, eps_r)
            shares.append(
                PlaneShare(
                    layer=lay.name,
                    distance_mm=distance,
                    epsilon_r=eps_r,
                    area_mm2=float(under.area),
                    plate_f=plate,
                    capacitance_f=total,
                )
            )
            remaining = shapely.difference(remaining, plane)
    return NodeCapacitance(copper_area_mm2=node.area_mm2, shares=tuple(shares))


# --------------------------------------------------------------------------- figures


@dataclass(frozen=True, kw_only=True)
class SwitchNodeFigures:
    """What a switch-node capacitance means at an operating point (SI units).

    ``loss_w`` and ``current_a`` are ``None`` without an operating point.
    """

    capacitance_f: float
    coss_f: float
    ratio: float
    loss_w: float | None
    current_a: float | None
    edge_time_s: float


def switch_node_figures(
    capacitance_f: float,
    *,
    coss_f: float = DEFAULT_COSS_F,
    vin_v: float | None = None,
    fsw_hz: float | None = None,
    edge_time_s: float = DEFAULT_EDGE_TIME_S,
) -> SwitchNodeFigures:
    """Ratio to Coss, hard-switching loss and edge current of a switch-node capacitance.

    Parameters
    ----------
    capacitance_f : float
        Switch-node copper capacitance C (F).
    coss_f : float
        The switches' output capacitance (F).
    vin_v : float, optional
        Input voltage: the switch-node swing (V).
    fsw_hz : float, optional
        Switching frequency (Hz).
    edge_time_s : float
        Switch-node edge time (s).

    Returns
    -------
    SwitchNodeFigures
        ratio = C / Coss; loss = ½ C Vin² fsw per hard-switched edge; current =
        C Vin / t_edge (fluxshadow physics reference row 17: 10.15 pF gives 0.731 mW at
        12 V, 1 MHz and 24.4 mA for 12 V in 5 ns). Loss and current are ``None`` unless
        both ``vin_v`` and ``fsw_hz`` are given.
    """
    loss: float | None = None
    current: float | None = None
    if vin_v is not None and fsw_hz is not None:
        loss = float(switching_loss_w(capacitance_f, vin_v, fsw_hz, lossy_edges=1))
        current = float(capacitive_current_a(capacitance_f, vin_v / edge_time_s))
    return SwitchNodeFigures(
        capacitance_f=capacitance_f,
        coss_f=coss_f,
        ratio=capacitance_f / coss_f,
        loss_w=loss,
        current_a=current,
        edge_time_s=edge_time_s,
    )


# --------------------------------------------------------------------------- the rule


def _level(ctx: Context, rule: str, default: str) -> str:
    return ctx.settings.severity.get(rule, default)


def _assumption(ctx: Context, ref: str, what: str, how: str) -> Finding | None:
    level = _level(ctx, "assumption", "note")
    if level == "off":
        return None
    sev: Severity = level  # type: ignore[assignment]
    return Finding(
        rule="assumption",
        severity=sev,
        ref=ref,
        layer="",
        x_mm=None,
        y_mm=None,
        message=f"{ref}: {what}; state it as {how}",
        metrics={"what": f"{ref}: {what}", "how_to_state": how},
    )


def _regulator(ctx: Context, ref: str) -> RegulatorConfig | None:
    """The ``[[regulator]]`` naming the part (the operating points allow only one)."""
    return next((r for r in ctx.board.config.regulators if ref in r.parts), None)


def _hz(f: float) -> str:
    return f"{f / 1e6:g} MHz" if f >= 1e6 else f"{f / 1e3:g} kHz"


def _r(x: float, nd: int = 3) -> float:
    return round(float(x), nd)


def switch_node_capacitance(ctx: Context, geo: MagneticGeometry) -> list[Finding]:
    """Switch-node copper over the nearest plane: capacitance, share of Coss, loss, current."""
    level = _level(ctx, RULE_ID, "warning")
    if level == "off":
        return []
    m = geo.magnetic
    mounting = geo.layers[0].layer
    reg = _regulator(ctx, m.ref)
    where = f'[[regulator]] parts = ["{m.ref}"]'
    out: list[Finding] = []

    def add(f: Finding | None) -> None:
        if f is not None:
            out.append(f)

    search = find_switch_nodes(
        ctx.board, m, mounting, switch_net=reg.switch_net if reg is not None else None
    )
    if not search.nodes:
        seen = (
            f" (nets near its pads: {', '.join(search.nets_at_pads)})"
            if search.nets_at_pads
            else ""
        )
        add(
            _assumption(
                ctx,
                m.ref,
                f"switch node not identified: {search.reason}{seen}; its capacitance to the "
                "planes is not reported",
                f'{where}, switch_net = "..." (net names must be in the copper files)',
            )
        )
        return out
    # The operating point, validated as everywhere else, only when one is stated.
    op = None
    if reg is not None and any(v is not None for v in (reg.vin_v, reg.vout_v, reg.fsw_hz)):
        op = operating_points((m,), ctx.board.config)[m.ref]
    coss = reg.coss_f if reg is not None and reg.coss_f is not None else None
    edge = reg.edge_time_s if reg is not None and reg.edge_time_s is not None else None
    if coss is None:
        add(
            _assumption(
                ctx,
                m.ref,
                f"switch output capacitance assumed {DEFAULT_COSS_F * 1e12:.0f} pF for the "
                "switch-node ratio (switches of small buck converters: 0.1-1 nF, from memory)",
                f"{where}, coss_f = ... (F)",
            )
        )
    if op is not None and op.stated and edge is None:
        add(
            _assumption(
                ctx,
                m.ref,
                f"switch-node edge time assumed {DEFAULT_EDGE_TIME_S * 1e9:g} ns for the "
                "C dV/dt current",
                f"{where}, edge_time_s = ... (s)",
            )
        )
    vin = op.vin_v if op is not None and op.stated else None
    fsw = op.fsw_hz if op is not None and op.stated else None
    deeper = [lg.layer for lg in geo.layers[1:]]
    for node in search.nodes:
        cap = node_capacitance(ctx.board, node, deeper, opening_mm=ctx.settings.opening_mm)
        fig = switch_node_figures(
            cap.capacitance_f,
            coss_f=coss if coss is not None else DEFAULT_COSS_F,
            vin_v=vin,
            fsw_hz=fsw,
            edge_time_s=edge if edge is not None else DEFAULT_EDGE_TIME_S,
        )
        out.append(_node_finding(ctx, geo, node, cap, fig, vin, fsw, coss is None, level))
    return out


def _node_finding(
    ctx: Context,
    geo: MagneticGeometry,
    node: SwitchNode,
    cap: NodeCapacitance,
    fig: SwitchNodeFigures,
    vin_v: float | None,
    fsw_hz: float | None,
    coss_assumed: bool,
    level: str,
) -> Finding:
    m = geo.magnetic
    main = cap.main
    c_pf = cap.capacitance_f * 1e12
    coss_pf = fig.coss_f * 1e12
    over = f"{m.kind} {m.ref}'s switch node {node.net} ({cap.copper_area_mm2:.1f} mm² on layer "
    over += f"{node.layer.name})"
    if main is None:
        msg = f"No plane lies under {over}: its capacitance to a plane is negligible."
    else:
        planes = ", ".join(
            f"layer {s.layer} ({s.area_mm2:.1f} mm² at {s.distance_mm:.3f} mm)" for s in cap.shares
        )
        bare = cap.copper_area_mm2 - cap.area_mm2
        msg = (
            f"{over[0].upper()}{over[1:]} lies over the plane of {planes}"
            + (f", {bare:.1f} mm² over no plane" if bare >= 0.05 else "")
            + f": {c_pf:.2f} pF with fringing ({cap.plate_f * 1e12:.2f} pF parallel plate), "
            f"{fig.ratio:.1%} of the switch's {coss_pf:.0f} pF output capacitance"
            + (" (assumed)" if coss_assumed else "")
        )
        if fig.loss_w is not None and fig.current_a is not None and vin_v and fsw_hz:
            msg += (
                f"; ½CV²f = {fig.loss_w * 1e3:.3g} mW per hard-switched edge and C dV/dt = "
                f"{fig.current_a * 1e3:.3g} mA for a {fig.edge_time_s * 1e9:g} ns edge at "
                f"{vin_v:g} V, {_hz(fsw_hz)}."
            )
        else:
            msg += "; no operating point, so no loss or current."
    above = fig.ratio > ctx.settings.switch_node_ratio_warning
    sev: Severity = level if above else "note"  # type: ignore[assignment]
    x, y = node.pads_xy[0]
    return Finding(
        rule=RULE_ID,
        severity=sev,
        ref=m.ref,
        layer=node.layer.name,
        x_mm=round(x, 4),
        y_mm=round(y, 4),
        message=msg,
        metrics={
            "net": node.net,
            "evidence": node.evidence,
            "copper_area_mm2": _r(cap.copper_area_mm2),
            "area_mm2": _r(cap.area_mm2),
            "plane_layer": main.layer if main else "",
            "distance_mm": _r(main.distance_mm, 4) if main else None,
            "epsilon_r": _r(main.epsilon_r) if main else None,
            "planes": len(cap.shares),
            "plate_pf": _r(cap.plate_f * 1e12, 4),
            "capacitance_pf": _r(c_pf, 4),
            "coss_pf": _r(coss_pf, 3),
            "coss_assumed": coss_assumed,
            "ratio": _r(fig.ratio, 6),
            "loss_mw": None if fig.loss_w is None else _r(fig.loss_w * 1e3, 6),
            "current_ma": None if fig.current_a is None else _r(fig.current_a * 1e3, 5),
            "edge_time_ns": _r(fig.edge_time_s * 1e9, 4),
        },
    )
