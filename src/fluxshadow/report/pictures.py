"""Pictures of ``fluxshadow check``: layer strips, field maps and a board overview.

Rendering only: every drawing function takes the plain records of
:mod:`fluxshadow.checks.picture_data` and returns a matplotlib ``Figure`` (Agg canvas, no
display, no pyplot state). :func:`render_pictures` prepares the data and writes the files:

- ``<ref>-layers.<fmt>``: one panel per copper layer under the part, nearest first, with
  plane copper, trace copper, hatched voids, the zone, the body, the winding projection,
  the path of each closed ring and the exposed traces coloured by induced voltage;
- ``<ref>-field.<fmt>``: |B| of the winding at the depth of each exposed layer;
- ``overview.<fmt>``: the board with every magnetic and a marker per located finding.

Output is deterministic: fixed style parameters, a fixed SVG hash salt, no dates in the
metadata, text kept as text in SVG.
"""

from __future__ import annotations

import io
import math
import os
import re
import tempfile
from collections.abc import Iterator, Sequence
from contextlib import contextmanager
from pathlib import Path
from typing import Any

import matplotlib as mpl
import numpy as np
import numpy.typing as npt
from matplotlib import patheffects
from matplotlib.axes import Axes
from matplotlib.backends.backend_agg import FigureCanvasAgg
from matplotlib.cm import ScalarMappable
from matplotlib.collections import LineCollection
from matplotlib.colors import LinearSegmentedColormap, LogNorm
from matplotlib.figure import Figure
from matplotlib.lines import Line2D
from matplotlib.patches import Patch, PathPatch
from matplotlib.path import Path as MplPath
from matplotlib.ticker import FuncFormatter, NullFormatter

from fluxshadow import __version__
from fluxshadow.board.model import Board
from fluxshadow.checks.model import Report
from fluxshadow.checks.picture_data import (
    FieldMap,
    LayerPicture,
    MagneticPicture,
    OverviewPicture,
    Polygon2,
    picture_data,
)
from fluxshadow.checks.settings import Settings
from fluxshadow.errors import ConfigError

__all__ = [
    "FORMATS",
    "PALETTE",
    "field_figure",
    "layers_figure",
    "overview_figure",
    "render_pictures",
    "save_figure",
]

FloatArray = npt.NDArray[np.float64]

FORMATS = ("svg", "png")
"""File formats :func:`render_pictures` can write."""

PALETTE: dict[str, str] = {
    "paper": "#ffffff",
    "board": "#f1efe7",
    "board_edge": "#4b4a45",
    "plane": "#bcc6ce",
    "plane_edge": "#5e6c78",
    "trace": "#bb8a2e",
    "trace_edge": "#7f5a14",
    "void": "#f7e1e1",
    "void_hatch": "#a3283f",
    "zone": "#2b2b2b",
    "body": "#1f1f1f",
    "winding": "#2e6e55",
    "ring": "#6d3b9c",
    "error": "#a3283f",
    "warning": "#c98a1b",
    "note": "#3f6584",
    "ink": "#222222",
    "muted": "#777777",
}
"""The pictures' own colours: muted slate plane copper, ochre traces, crimson voids."""

INDUCED_CMAP = LinearSegmentedColormap.from_list(
    "fluxshadow-induced", ["#9fd1c0", "#4e9f98", "#2b6f8a", "#2a4577", "#24163f"]
)
"""Sequential colours of the induced voltage (pale teal to deep indigo)."""

FIELD_CMAP = LinearSegmentedColormap.from_list(
    "fluxshadow-field", ["#fbf8f0", "#efd8a4", "#d99b5c", "#b2593b", "#6c2a3b", "#2c1631"]
)
"""Sequential colours of |B| (paper to deep plum)."""

_RULE_MARKERS: dict[str, str] = {
    "plane-void": "s",
    "void-ring": "o",
    "exposed-trace": "^",
    "through-cutout": "X",
    "switch-node-capacitance": "D",
}
_OTHER_MARKER = "P"
_SEVERITY_ORDER = ("error", "warning", "note")
_PANEL_IN = 3.2
_DPI = 150

_RC: Any = {
    "backend": "Agg",
    "font.family": "DejaVu Sans",
    "font.size": 8.0,
    "axes.titlesize": 8.5,
    "axes.labelsize": 8.0,
    "axes.edgecolor": "#555555",
    "axes.linewidth": 0.6,
    "axes.facecolor": PALETTE["paper"],
    "figure.facecolor": PALETTE["paper"],
    "xtick.labelsize": 7.0,
    "ytick.labelsize": 7.0,
    "xtick.color": "#555555",
    "ytick.color": "#555555",
    "legend.fontsize": 7.5,
    "legend.frameon": False,
    "hatch.linewidth": 0.7,
    "svg.hashsalt": "fluxshadow",
    "svg.fonttype": "none",
    "svg.image_inline": True,
    "path.simplify": True,
    "image.interpolation": "nearest",
}


@contextmanager
def _style() -> Iterator[None]:
    with mpl.rc_context(_RC):
        yield


# ----------------------------------------------------------------------------- helpers


def _path(polygons: Sequence[Polygon2]) -> MplPath | None:
    """One compound path of polygons with holes (even-odd by ring orientation)."""
    verts: list[FloatArray] = []
    codes: list[npt.NDArray[np.uint8]] = []
    for poly in polygons:
        for ring in poly:
            if len(ring) < 3:
                continue
            c = np.full(len(ring), MplPath.LINETO, dtype=np.uint8)
            c[0] = MplPath.MOVETO
            c[-1] = MplPath.CLOSEPOLY
            verts.append(ring)
            codes.append(c)
    if not verts:
        return None
    return MplPath(np.concatenate(verts), np.concatenate(codes))


def _add_polygons(ax: Axes, polygons: Sequence[Polygon2], gid: str, **kw: Any) -> None:
    path = _path(polygons)
    if path is not None:
        patch = PathPatch(path, **kw)
        patch.set_gid(gid)
        ax.add_patch(patch)


def _ring(ax: Axes, ring: FloatArray, gid: str, **kw: Any) -> None:
    (line,) = ax.plot(ring[:, 0], ring[:, 1], **kw)
    line.set_gid(gid)


def _nice_length(span: float) -> float:
    """A round length (1, 2 or 5 x 10^n) near a quarter of ``span``."""
    target = max(span / 4.0, 1e-9)
    base = 10.0 ** math.floor(math.log10(target))
    return float(max(m * base for m in (1.0, 2.0, 5.0) if m * base <= target))


def _scale_bar(ax: Axes, window: Sequence[float], tag: str) -> None:
    x0, y0, x1, y1 = window
    w, h = x1 - x0, y1 - y0
    length = _nice_length(w)
    bx, by = x0 + 0.05 * w, y0 + 0.05 * h
    ax.plot(
        [bx, bx + length], [by, by], color=PALETTE["ink"], lw=2.2, solid_capstyle="butt",
        path_effects=[patheffects.withStroke(linewidth=4.0, foreground="white")],
        gid=f"{tag}:scale-bar",
    )  # fmt: skip
    ax.text(
        bx + 0.5 * length, by + 0.025 * h, f"{length:g} mm", ha="center", va="bottom",
        fontsize=7, color=PALETTE["ink"],
        path_effects=[patheffects.withStroke(linewidth=2.5, foreground="white")],
    )  # fmt: skip


def _frame(ax: Axes, window: Sequence[float]) -> None:
    x0, y0, x1, y1 = window
    ax.set_xlim(x0, x1)
    ax.set_ylim(y0, y1)
    ax.set_aspect("equal")
    ax.tick_params(length=2, pad=1.5)
    ax.set_xlabel("x (mm)")


def _circle(x: float, y: float, r: float, n: int = 96) -> FloatArray:
    t = np.linspace(0.0, 2.0 * np.pi, n + 1)
    return np.column_stack([x + r * np.cos(t), y + r * np.sin(t)])


def _part_marks(ax: Axes, pic: MagneticPicture, zone: Sequence[Polygon2], tag: str) -> None:
    for i, poly in enumerate(zone):
        _ring(ax, poly[0], f"{tag}:zone:{i}", color=PALETTE["zone"], lw=0.9, ls=(0, (4, 2.5)))
    _ring(ax, pic.body, f"{tag}:body", color=PALETTE["body"], lw=1.3)
    wc = _circle(pic.x_mm, pic.y_mm, pic.winding_radius_mm)
    _ring(ax, wc, f"{tag}:winding", color=PALETTE["winding"], lw=1.2, ls=(0, (1.2, 1.6)))
    ax.plot([pic.x_mm], [pic.y_mm], marker="+", ms=6, color=PALETTE["winding"], mew=1.0)


def _induced_norm(pic: MagneticPicture) -> LogNorm | None:
    values = [
        e.induced_mv
        for lay in pic.layers
        for e in lay.exposed
        if e.induced_mv is not None and e.induced_mv > 0
    ]
    if not values:
        return None
    lo, hi = min(values), max(values)
    if hi / lo < 10.0:  # at least one decade, centred on the values
        mid = math.sqrt(lo * hi)
        lo, hi = mid / math.sqrt(10.0), mid * math.sqrt(10.0)
    return LogNorm(vmin=lo, vmax=hi)


def _title(lay: LayerPicture) -> str:
    head = f"{lay.layer} · {lay.depth_mm:.2f} mm deep"
    if lay.plane_around:
        cover = f"plane {100.0 * lay.coverage:.0f} % of zone"
    else:
        cover = f"no plane around (plane {100.0 * lay.coverage:.0f} %)"
    if lay.shielding_db:
        cover += f"; shields {lay.shielding_db:.1f} dB"
    return f"{head}\n{cover}"


# ----------------------------------------------------------------------------- figures


def _layer_panel(ax: Axes, pic: MagneticPicture, lay: LayerPicture, norm: LogNorm | None) -> int:
    """Draw one layer; returns the number of exposed traces drawn."""
    tag = f"layer-{lay.layer}"
    _add_polygons(
        ax, lay.plane, f"{tag}:plane", facecolor=PALETTE["plane"],
        edgecolor=PALETTE["plane_edge"], lw=0.5, zorder=1,
    )  # fmt: skip
    _add_polygons(
        ax, lay.traces, f"{tag}:traces", facecolor=PALETTE["trace"],
        edgecolor=PALETTE["trace_edge"], lw=0.4, zorder=2,
    )  # fmt: skip
    _add_polygons(
        ax, lay.voids, f"{tag}:voids", facecolor=PALETTE["void"],
        edgecolor=PALETTE["void_hatch"], hatch="////", lw=0.8, zorder=3, alpha=0.9,
    )  # fmt: skip
    for i, ring in enumerate(lay.ring_paths):
        _ring(
            ax, ring, f"ring:{lay.layer}:{i}", color=PALETTE["ring"], lw=2.4, zorder=5,
            path_effects=[patheffects.withStroke(linewidth=5.0, foreground="#e7d9f2")],
        )  # fmt: skip
    _part_marks(ax, pic, lay.zone, tag)
    drawn = 0
    for e in lay.exposed:
        if e.induced_mv is not None and e.induced_mv > 0 and norm is not None:
            color: Any = INDUCED_CMAP(norm(e.induced_mv))
            ls = "solid"
        else:
            color, ls = PALETTE["muted"], "dashed"
        lc = LineCollection(
            list(e.lines), colors=[color], linewidths=2.6, linestyles=ls, zorder=6,
            capstyle="round",
            path_effects=[patheffects.withStroke(linewidth=4.6, foreground="white")],
        )  # fmt: skip
        lc.set_gid(f"exposed-trace:{pic.ref}:{lay.layer}:{e.net}")
        ax.add_collection(lc)
        drawn += 1
    _frame(ax, pic.window)
    ax.set_title(_title(lay), loc="left")
    return drawn


def layers_figure(pic: MagneticPicture) -> Figure:
    """The strip of copper layers under one magnetic, nearest layer first.

    Parameters
    ----------
    pic : MagneticPicture

    Returns
    -------
    matplotlib.figure.Figure
        One axes per layer (``gid`` ``layer:<name>``), then the colour bar of the induced
        voltage when any exposed trace carries one.
    """
    with _style():
        n = max(len(pic.layers), 1)
        norm = _induced_norm(pic)
        extra = 0.9 if norm is not None else 0.0
        fig = Figure(figsize=(n * _PANEL_IN + extra + 0.4, _PANEL_IN + 1.5), layout="constrained")
        FigureCanvasAgg(fig)
        axes = fig.subplots(1, n, squeeze=False)[0]
        for ax, lay in zip(axes, pic.layers, strict=False):
            ax.set_gid(f"layer:{lay.layer}")
            _layer_panel(ax, pic, lay, norm)
            _scale_bar(ax, pic.window, f"layer-{lay.layer}")
        axes[0].set_ylabel("y (mm)")
        for ax in axes[1:]:
            ax.tick_params(labelleft=False)
        if norm is not None:
            sm = ScalarMappable(norm=norm, cmap=INDUCED_CMAP)
            cb = fig.colorbar(sm, ax=list(axes), shrink=0.8, pad=0.02, aspect=25)
            cb.set_label(f"exposed trace: induced voltage ({pic.induced_per})")
            _log_ticks(cb.ax, norm)
            cb.ax.set_gid("colorbar:induced")
        where = "over" if pic.side == "bottom" else "under"
        fig.suptitle(
            f"{pic.ref}: {pic.value_text} {pic.kind} on the {pic.side} side - copper {where} "
            "the part, nearest layer first (seen from the top)",
            x=0.01, ha="left", fontsize=9.5, fontweight="bold",
        )  # fmt: skip
        fig.legend(handles=_strip_legend(), loc="outside lower center", ncol=8, handlelength=2.2)
    return fig


def _strip_legend() -> list[Any]:
    return [
        Patch(facecolor=PALETTE["plane"], edgecolor=PALETTE["plane_edge"], label="plane copper"),
        Patch(facecolor=PALETTE["trace"], edgecolor=PALETTE["trace_edge"], label="trace copper"),
        Patch(
            facecolor=PALETTE["void"], edgecolor=PALETTE["void_hatch"], hatch="////", label="void"
        ),
        Line2D([], [], color=PALETTE["zone"], lw=0.9, ls=(0, (4, 2.5)), label="zone"),
        Line2D([], [], color=PALETTE["body"], lw=1.3, label="body"),
        Line2D([], [], color=PALETTE["winding"], lw=1.2, ls=(0, (1.2, 1.6)), label="winding"),
        Line2D([], [], color=PALETTE["ring"], lw=2.4, label="closed ring path"),
        Line2D([], [], color=INDUCED_CMAP(0.75), lw=2.6, label="exposed trace"),
    ]


def _field_norm(maps: Sequence[FieldMap]) -> LogNorm:
    hi = max(float(np.max(f.b_ut)) for f in maps)
    hi = hi if hi > 0 else 1.0
    positive = [float(np.min(f.b_ut[f.b_ut > 0])) for f in maps if np.any(f.b_ut > 0)]
    lo = max(min(positive) if positive else hi / 1e3, hi / 1e3)
    if hi / lo < 10.0:
        lo = hi / 10.0
    return LogNorm(vmin=lo, vmax=hi)


def field_figure(pic: MagneticPicture) -> Figure | None:
    """|B| of one magnetic's winding at the depth of each exposed layer.

    Parameters
    ----------
    pic : MagneticPicture

    Returns
    -------
    matplotlib.figure.Figure or None
        One axes per field map (``gid`` ``field:<layer>``) with a shared logarithmic
        colour bar in µT; ``None`` when the magnetic has no field map.
    """
    if not pic.fields:
        return None
    layers = {lay.layer: lay for lay in pic.layers}
    with _style():
        n = len(pic.fields)
        fig = Figure(figsize=(n * _PANEL_IN + 1.3, _PANEL_IN + 1.2), layout="constrained")
        FigureCanvasAgg(fig)
        axes = fig.subplots(1, n, squeeze=False)[0]
        norm = _field_norm(pic.fields)
        for ax, fm in zip(axes, pic.fields, strict=True):
            ax.set_gid(f"field:{fm.layer}")
            b = np.clip(fm.b_ut, norm.vmin, None)
            ax.pcolormesh(
                fm.x_mm, fm.y_mm, b, cmap=FIELD_CMAP, norm=norm, shading="gouraud",
                rasterized=True,
            )  # fmt: skip
            levels = _decades(norm)
            if len(levels):
                cs = ax.contour(
                    fm.x_mm, fm.y_mm, b, levels=levels, colors=PALETTE["ink"], linewidths=0.5,
                    alpha=0.6,
                )  # fmt: skip
                ax.clabel(cs, fmt=lambda v: f"{v:g}", fontsize=6)
            lay = layers.get(fm.layer)
            zone = lay.zone if lay is not None else ()
            _part_marks(ax, pic, zone, f"field-{fm.layer}")
            if lay is not None:
                for e in lay.exposed:
                    lc = LineCollection(
                        list(e.lines), colors=["white"], linewidths=1.6, zorder=6,
                        path_effects=[
                            patheffects.withStroke(linewidth=3.4, foreground=PALETTE["ink"])
                        ],
                    )  # fmt: skip
                    lc.set_gid(f"field-{fm.layer}:exposed-trace:{e.net}")
                    ax.add_collection(lc)
            _frame(ax, pic.window)
            _scale_bar(ax, pic.window, f"field-{fm.layer}")
            below = f"below solid planes {fm.planes}" if fm.planes else "no solid plane above"
            if fm.sheets:
                below += f"; eddy currents of {fm.sheets}"
            ax.set_title(f"{fm.layer} · {fm.depth_mm:.2f} mm deep\n{below}", loc="left")
        axes[0].set_ylabel("y (mm)")
        for ax in axes[1:]:
            ax.tick_params(labelleft=False)
        sm = ScalarMappable(norm=norm, cmap=FIELD_CMAP)
        cb = fig.colorbar(sm, ax=list(axes), shrink=0.85, pad=0.02, aspect=25)
        cb.set_label(f"|B| (µT {pic.fields[0].per})")
        _log_ticks(cb.ax, norm)
        cb.ax.set_gid("colorbar:field")
        model = (
            "with the eddy currents of voided layers where noted"
            if any(fm.sheets for fm in pic.fields)
            else "spectral model, solid planes only"
        )
        fig.suptitle(
            f"{pic.ref}: |B| of the winding at the exposed layers\n"
            f"{model}, {_freq_text(pic.fields[0].freq_hz)}"
            if any(fm.exposed for fm in pic.fields)
            else f"{pic.ref}: |B| of the winding at the deepest layer (nothing exposed)\n"
            f"{model}, {_freq_text(pic.fields[0].freq_hz)}",
            x=0.01, ha="left", fontsize=9.0, fontweight="bold",
        )  # fmt: skip
    return fig


def _log_ticks(ax: Axes, norm: LogNorm) -> None:
    """Plain numbers (0.06, 2, 30) on a logarithmic colour bar; minor labels within 2 decades."""
    plain = FuncFormatter(lambda v, _pos: f"{v:g}")
    ax.yaxis.set_major_formatter(plain)
    span = math.log10(float(norm.vmax or 1.0) / float(norm.vmin or 1.0))
    ax.yaxis.set_minor_formatter(FuncFormatter(_minor_label) if span < 2.0 else NullFormatter())


def _minor_label(v: float, _pos: int | None) -> str:
    if v <= 0:
        return ""
    mantissa = round(v / 10.0 ** math.floor(math.log10(v) + 1e-9), 6)
    return f"{v:g}" if mantissa in (2.0, 3.0, 5.0) else ""


def _freq_text(freq_hz: float) -> str:
    if freq_hz >= 1e6:
        return f"{freq_hz / 1e6:.4g} MHz"
    return f"{freq_hz / 1e3:.4g} kHz"


def _decades(norm: LogNorm) -> FloatArray:
    lo, hi = float(norm.vmin or 1.0), float(norm.vmax or 1.0)
    ks = np.arange(math.ceil(math.log10(lo)), math.floor(math.log10(hi)) + 1)
    levels = 10.0 ** ks.astype(np.float64)
    return levels[(levels > lo) & (levels < hi)]


def _fan(marks: Sequence[tuple[float, float]], tol_mm: float) -> list[tuple[float, float, float]]:
    """Where to draw markers that would overlap: ``(x_mm, y_mm, dx_points)`` each.

    Marks within ``tol_mm`` of a cluster's first mark join that cluster; a cluster is drawn
    as a short row of markers centred on its first mark.
    """
    anchors: list[tuple[float, float]] = []
    member: list[tuple[int, int]] = []
    sizes: list[int] = []
    for x, y in marks:
        for c, (ax_, ay) in enumerate(anchors):
            if math.hypot(x - ax_, y - ay) <= tol_mm:
                member.append((c, sizes[c]))
                sizes[c] += 1
                break
        else:
            anchors.append((x, y))
            member.append((len(anchors) - 1, 0))
            sizes.append(1)
    return [(anchors[c][0], anchors[c][1], (i - 0.5 * (sizes[c] - 1)) * 10.0) for c, i in member]


def overview_figure(ov: OverviewPicture) -> Figure:
    """The board with its magnetics and a marker per located finding.

    Parameters
    ----------
    ov : OverviewPicture

    Returns
    -------
    matplotlib.figure.Figure
        One axes; each finding marker is a line with ``gid`` ``finding:<n>``.
    """
    from matplotlib.transforms import offset_copy

    with _style():
        pts = [p for poly in ov.board for p in poly[:1]]
        pts += [outline for _r, outline in ov.magnetics]
        allp = np.concatenate(pts) if pts else np.zeros((1, 2))
        x0, y0 = allp.min(axis=0)
        x1, y1 = allp.max(axis=0)
        pad = 0.04 * max(x1 - x0, y1 - y0, 1.0)
        window = (float(x0 - pad), float(y0 - pad), float(x1 + pad), float(y1 + pad))
        w, h = window[2] - window[0], window[3] - window[1]
        width = 7.5
        fig = Figure(figsize=(width, max(width * h / w, 2.5) + 1.3), layout="constrained")
        FigureCanvasAgg(fig)
        ax = fig.add_subplot()
        ax.set_gid("overview")
        _add_polygons(
            ax, ov.board, "board", facecolor=PALETTE["board"], edgecolor=PALETTE["board_edge"],
            lw=1.0, zorder=1,
        )  # fmt: skip
        _add_polygons(
            ax, ov.cutouts, "cutouts", facecolor=PALETTE["paper"],
            edgecolor=PALETTE["board_edge"], lw=0.8, hatch="xx", zorder=2,
        )  # fmt: skip
        for ref, outline in ov.magnetics:
            _ring(ax, outline, f"magnetic:{ref}", color=PALETTE["body"], lw=1.1, zorder=3)
            top = float(outline[:, 1].max())
            cx = float(outline[:, 0].mean())
            ax.text(
                cx, top + 0.012 * h, ref, ha="center", va="bottom", fontsize=8,
                fontweight="bold", color=PALETTE["ink"], zorder=7,
                path_effects=[patheffects.withStroke(linewidth=2.5, foreground="white")],
            )  # fmt: skip
        spots = _fan([(f.x_mm, f.y_mm) for f in ov.findings], tol_mm=0.02 * max(w, h))
        for i, (f, (x, y, dx)) in enumerate(zip(ov.findings, spots, strict=True)):
            color = PALETTE.get(f.severity, PALETTE["muted"])
            tr = offset_copy(ax.transData, fig=fig, x=dx, y=0.0, units="points")
            (line,) = ax.plot(
                [x], [y], transform=tr, ls="none",
                marker=_RULE_MARKERS.get(f.rule, _OTHER_MARKER), ms=8.0,
                mew=1.6 if f.waived else 1.0, mec=color if f.waived else "white",
                mfc="white" if f.waived else color, zorder=8,
            )  # fmt: skip
            line.set_gid(f"finding:{i}")
        _frame(ax, window)
        ax.set_ylabel("y (mm)")
        _scale_bar(ax, window, "overview")
        fig.legend(handles=_overview_legend(ov), loc="outside lower center", ncol=6)
        unplaced = f"; {ov.unplaced} without one are in the report" if ov.unplaced else ""
        ax.set_title(
            f"{len(ov.findings)} findings with a place{unplaced}; "
            "markers sharing a spot are drawn side by side",
            loc="left", fontsize=7.5, color=PALETTE["muted"],
        )  # fmt: skip
        fig.suptitle(
            f"{ov.package}: findings on the board", x=0.01, ha="left", fontsize=9.5,
            fontweight="bold",
        )  # fmt: skip
    return fig


def _overview_legend(ov: OverviewPicture) -> list[Any]:
    handles: list[Any] = []
    present = {f.severity for f in ov.findings}
    for sev in _SEVERITY_ORDER:
        if sev in present:
            handles.append(Patch(facecolor=PALETTE[sev], edgecolor="white", label=sev))
    rules = list(dict.fromkeys(f.rule for f in ov.findings))
    for rule in rules:
        handles.append(
            Line2D(
                [],
                [],
                ls="none",
                marker=_RULE_MARKERS.get(rule, _OTHER_MARKER),
                ms=7,
                mfc=PALETTE["muted"],
                mec="white",
                label=rule,
            )
        )
    if any(f.waived for f in ov.findings):
        handles.append(
            Line2D(
                [],
                [],
                ls="none",
                marker="o",
                ms=7,
                mfc="white",
                mec=PALETTE["muted"],
                mew=1.3,
                label="waived (hollow)",
            )
        )
    return handles


# ----------------------------------------------------------------------------- files


def save_figure(fig: Figure, path: Path) -> Path:
    """Write a figure atomically (temporary file in the same folder, then rename).

    The format is the file's extension (``.svg`` or ``.png``); metadata carries no date.

    Parameters
    ----------
    fig : Figure
    path : Path

    Returns
    -------
    Path
        ``path``.
    """
    fmt = path.suffix.lstrip(".").lower()
    if fmt not in FORMATS:
        msg = f"picture format must be one of {', '.join(FORMATS)}; got {fmt!r}"
        raise ConfigError(msg)
    meta: dict[str, str | None]
    if fmt == "svg":
        meta = {"Date": None, "Creator": f"fluxshadow {__version__}"}
    else:
        meta = {"Software": f"fluxshadow {__version__}"}
    buf = io.BytesIO()
    with _style():
        fig.savefig(buf, format=fmt, dpi=_DPI, metadata=meta)
    path.parent.mkdir(parents=True, exist_ok=True)
    fd, tmp = tempfile.mkstemp(prefix=f".{path.name}.", dir=path.parent)
    try:
        with os.fdopen(fd, "wb") as f:
            f.write(buf.getvalue())
        os.replace(tmp, path)
    except BaseException:
        Path(tmp).unlink(missing_ok=True)
        raise
    return path


def _file_stem(ref: str, used: set[str]) -> str:
    stem = re.sub(r"[^A-Za-z0-9._-]+", "_", ref).strip("._") or "part"
    base, n = stem, 2
    while stem.lower() in used:
        stem, n = f"{base}-{n}", n + 1
    used.add(stem.lower())
    return stem


def render_pictures(
    report: Report,
    board: Board,
    folder: Path,
    *,
    formats: Sequence[str] = FORMATS,
    settings: Settings | None = None,
) -> list[Path]:
    """Write every picture of a report into ``folder``.

    Parameters
    ----------
    report : Report
        From :func:`~fluxshadow.checks.run.run_checks` on ``board``.
    board : Board
    folder : Path
        Created when missing.
    formats : sequence of {"svg", "png"}
        File formats to write, each picture in every one.
    settings : Settings, optional
        The settings the report was made with (default from the board's config).

    Returns
    -------
    list of Path
        The files written: per magnetic ``<ref>-layers`` and (with a field map)
        ``<ref>-field``, then ``overview``, each in every format.

    Raises
    ------
    ConfigError
        An unknown format.
    """
    fmts = [f.lower().lstrip(".") for f in formats]
    for f in fmts:
        if f not in FORMATS:
            msg = f"picture format must be one of {', '.join(FORMATS)}; got {f!r}"
            raise ConfigError(msg)
    data = picture_data(report, board, settings=settings)
    written: list[Path] = []
    used: set[str] = {"overview"}
    for pic in data.magnetics:
        stem = _file_stem(pic.ref, used)
        figs: list[tuple[str, Figure | None]] = [
            (f"{stem}-layers", layers_figure(pic)),
            (f"{stem}-field", field_figure(pic)),
        ]
        for name, fig in figs:
            if fig is not None:
                written.extend(save_figure(fig, folder / f"{name}.{ext}") for ext in fmts)
    ov = overview_figure(data.overview)
    written.extend(save_figure(ov, folder / f"overview.{ext}") for ext in fmts)
    return written
