"""Text and JSON views of the ``stack`` and ``parts`` summaries (pure functions).

Each function takes the dictionary built by :mod:`fluxshadow.board.summary` and returns a
string; nothing is computed here beyond formatting.
"""

from __future__ import annotations

import io
import json
from typing import Any

from rich.console import Console
from rich.table import Table

__all__ = ["CAUTION", "parts_text", "stack_text", "to_json"]

CAUTION = (
    "Estimates from fabrication data and simplified models; not a substitute for "
    "measurement, 3D field simulation, EMC compliance testing or a qualified engineer. "
    "Local codes, standards and the part maker's data prevail."
)

_HEAD = "bold #2a9d8f"
_WARN = "#e9c46a"


def to_json(summary: dict[str, Any]) -> str:
    """The summary as indented JSON (UTF-8 text, trailing newline)."""
    return json.dumps(summary, indent=2, ensure_ascii=False) + "\n"


def _render(*items: Any, width: int = 120) -> str:
    buf = io.StringIO()
    console = Console(file=buf, width=width, color_system=None, highlight=False, soft_wrap=False)
    for item in items:
        console.print(item)
    return buf.getvalue()


def _fmt(v: Any, nd: int = 3) -> str:
    if v is None:
        return "-"
    if isinstance(v, float):
        return f"{v:.{nd}f}"
    return str(v)


def _notes(summary: dict[str, Any]) -> list[str]:
    lines = []
    if summary.get("assumptions"):
        lines.append("Assumptions:")
        lines += [f"  - {a}" for a in summary["assumptions"]]
    if summary.get("notices"):
        lines.append("Notices:")
        lines += [f"  - {n}" for n in summary["notices"]]
    return lines


def stack_text(summary: dict[str, Any], *, width: int = 120) -> str:
    """Layers table, stack-up and every file's use, as plain text."""
    t = Table(title=f"Copper layers of {summary['package']}", title_style=_HEAD, expand=False)
    for col in (
        "layer",
        "side",
        "file",
        "identified by",
        "polarity",
        "Cu area mm²",
        "objects",
        "depth mm",
        "Cu mm",
    ):
        t.add_column(col, overflow="fold")
    for lay in summary["layers"]:
        pol = lay["polarity"] + (
            "" if lay["polarity_from"] == "default" else f" ({lay['polarity_from']})"
        )
        t.add_row(
            lay["name"],
            lay["side"],
            lay["source"],
            lay["identified_by"],
            pol,
            _fmt(lay["copper_area_mm2"], 1),
            str(lay["primitives"]),
            _fmt(lay["z_top_mm"]),
            _fmt(lay["thickness_mm"]),
        )
    st = summary["stackup"]
    gaps = ", ".join(
        f"{d['above']}-{d['below']} {_fmt(d['thickness_mm'])} mm (er {_fmt(d['epsilon_r'], 2)})"
        for d in st["dielectrics"]
    )
    board_mm = _fmt(st["board_thickness_mm"])
    route = summary.get("route") or {}
    lines = []
    if route:
        names = {"odb": "ODB++ job", "gerber": "Gerber/Excellon files"}
        lines.append(f"Input route: {names.get(route['name'], route['name'])} ({route['why']})")
    lines.append(f"Stack-up from {st['source']}: board {board_mm} mm; {gaps or 'no gaps'}")
    ol = summary.get("outline")
    if ol:
        b = ol["bounds_mm"]
        lines.append(
            f"Outline from {ol['source']}: {b[2] - b[0]:.2f} x {b[3] - b[1]:.2f} mm, "
            f"{ol['cutouts']} cut-out(s)"
        )
    else:
        lines.append("Outline: none found")
    lines.append("Identification evidence:")
    lines += [f"  {lay['name']}: {lay['detail']}" for lay in summary["layers"]]
    files = Table(title="Files", title_style=_HEAD)
    files.add_column("file", overflow="fold")
    files.add_column("taken as", overflow="fold")
    for f in summary["files"]:
        files.add_row(f["file"], f["use"])
    return _render(t, "\n".join(lines), files, "\n".join(_notes(summary)) or "", width=width)


def parts_text(summary: dict[str, Any], *, width: int = 120) -> str:
    """Magnetics found and excluded and the frame fit, as plain text."""
    fit = summary["frame_fit"]
    mirror = (
        f", bottom X mirrored about {_fmt(fit['bottom_mirror_c_mm'])} mm"
        if fit["bottom_mirror"]
        else ""
    )
    head = (
        f"Placement frame -> artwork: {fit['method']}, dx {_fmt(fit['dx_mm'])} mm, "
        f"dy {_fmt(fit['dy_mm'])} mm{mirror}; matched {fit['matched']}/{fit['total']} parts, "
        f"median residual {_fmt(fit['residual_mm'])} mm"
    )
    t = Table(title=f"Power magnetics of {summary['package']}", title_style=_HEAD)
    for col in (
        "ref",
        "kind",
        "value",
        "package",
        "side",
        "x mm",
        "y mm",
        "rot",
        "body mm",
        "body from",
    ):
        t.add_column(col, overflow="fold")
    for m in summary["magnetics"]:
        body = "x".join(_fmt(v, 2) for v in m["body_mm"])
        t.add_row(
            m["ref"],
            m["kind"],
            m["value_text"] or "?",
            m["package"],
            m["side"],
            _fmt(m["x_mm"]),
            _fmt(m["y_mm"]),
            _fmt(m["rotation_deg"], 1),
            body,
            m["body_from"],
        )
    ex = Table(title="Excluded", title_style=_WARN)
    for col in ("ref", "value", "package", "reason"):
        ex.add_column(col, overflow="fold")
    for e in summary["excluded"]:
        ex.add_row(e["ref"], e["value_text"], e["package"], e["reason"])
    items: list[Any] = [head, t]
    if summary["excluded"]:
        items.append(ex)
    notes = _notes(summary)
    if notes:
        items.append("\n".join(notes))
    return _render(*items, width=width)
