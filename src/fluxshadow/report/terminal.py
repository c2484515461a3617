"""The terminal view of a check report (rich): one panel a magnetic, findings by severity.

A pure function of the :class:`~fluxshadow.checks.model.Report`: it returns text (with ANSI
colours when asked), computes nothing. The palette is our own: a warm red for errors,
amber for warnings, a muted teal for notes and grey for waived findings.
"""

from __future__ import annotations

import io

from rich.console import Console, Group
from rich.panel import Panel
from rich.table import Table
from rich.text import Text

from fluxshadow.checks.model import Finding, LayerResult, MagneticResult, Report
from fluxshadow.report.inventory import CAUTION

__all__ = ["report_to_text"]

STYLE = {
    "error": "bold #d1495b",
    "warning": "bold #edae49",
    "note": "#00798c",
    "waived": "dim",
    "title": "bold #30638e",
    "plane": "#3a7d44",
    "void": "#d1495b",
    "trace": "#edae49",
}
_BAR = 16


def _badge(f: Finding) -> Text:
    if f.waived:
        return Text(f"waived {f.severity}", style=STYLE["waived"])
    return Text(f.severity, style=STYLE[f.severity])


def _strip(cov: float, copper: float) -> Text:
    """A bar of the zone: plane share, other copper, no copper."""
    plane_n = round(cov * _BAR)
    other_n = max(0, min(_BAR - plane_n, round((copper - cov) * _BAR)))
    t = Text()
    t.append("█" * plane_n, style=STYLE["plane"])
    t.append("▒" * other_n, style=STYLE["trace"])
    t.append("·" * (_BAR - plane_n - other_n), style=STYLE["void"])
    return t


def _figures(lr: LayerResult) -> Text:
    """The layer's physics figures in a few words ("SE 24 dB, dL -3.1 nH")."""
    f = lr.figures
    se, dl = f.get("shielding_db"), f.get("delta_l_nh")
    if not f.get("planes") and f.get("model") != "sheet":
        return Text("")
    parts = []
    if isinstance(se, int | float):
        parts.append(f"SE {se:.0f} dB")
    if isinstance(dl, int | float):
        parts.append(f"dL {dl:+.3g} nH")
    ring = f.get("ring_current_a")
    if isinstance(ring, int | float) and ring > 0:
        parts.append(f"ring {ring * 1e3:.3g} mA")
    if f.get("model") == "sheet":
        parts.append("sheet")
    return Text(", ".join(parts), style="dim")


def _panel(m: MagneticResult, findings: list[Finding]) -> Panel:
    layers = Table.grid(padding=(0, 1))
    layers.add_column(no_wrap=True)
    layers.add_column(no_wrap=True, width=_BAR)
    layers.add_column(no_wrap=True, justify="right")
    layers.add_column(overflow="fold", ratio=1)
    layers.add_column(overflow="fold", ratio=1)
    for lr in m.layers:
        state = Text("plane around" if lr.plane_around else "no plane around")
        if lr.plane_around and lr.void_area_mm2 > 0:
            state.append(f", void {lr.void_area_mm2:.1f} mm²")
        if lr.ring is not None:
            closed = lr.ring.closed
            state.append(
                ", closed ring" if closed else f", opened to {lr.ring.opened_to}",
                style=STYLE["void"] if closed else "",
            )
        layers.add_row(
            Text(f"{lr.layer} ({lr.depth_mm:.2f} mm)", style="bold"),
            _strip(lr.coverage, lr.copper_coverage),
            Text(f"{lr.coverage:.1%}", style=STYLE["plane"] if lr.coverage > 0.99 else ""),
            state,
            _figures(lr),
        )
    body: list[object] = [layers]
    if findings:
        ft = Table.grid(padding=(0, 1))
        ft.add_column(no_wrap=True)
        ft.add_column(no_wrap=True)
        ft.add_column(no_wrap=True)
        ft.add_column(overflow="fold")
        for f in findings:
            ft.add_row(_badge(f), Text(f.rule), Text(f.layer or "-"), Text(f.message))
            if f.waived:
                ft.add_row(
                    Text(""),
                    Text(""),
                    Text(""),
                    Text(f"waived: {f.waiver_reason}", style=STYLE["waived"]),
                )
        body.append(Text(""))
        body.append(ft)
    else:
        body.append(Text("no geometry findings", style=STYLE["plane"]))
    title = Text.assemble(
        (f" {m.ref} ", STYLE["title"]),
        f"{m.kind} {m.value_text or '(value unknown)'} · {m.side} · "
        f"({m.x_mm:.2f}, {m.y_mm:.2f}) mm · body {m.body_mm[0]:.1f} x {m.body_mm[1]:.1f} mm ",
    )
    return Panel(Group(*body), title=title, title_align="left", border_style="#30638e")  # type: ignore[arg-type]


def report_to_text(report: Report, *, width: int = 110, color: bool = False) -> str:
    """Render the report for a terminal.

    Parameters
    ----------
    report : Report
    width : int
        Characters per line.
    color : bool
        Emit ANSI colours (for a terminal; off for files and pipes).

    Returns
    -------
    str
    """
    buf = io.StringIO()
    console = Console(
        file=buf,
        width=width,
        color_system="truecolor" if color else None,
        force_terminal=color,
        highlight=False,
        soft_wrap=False,
    )
    console.print(Text(f"fluxshadow check · {report.package}", style=STYLE["title"]))
    console.print(
        Text(
            "Legend: █ plane copper  ▒ other copper  · no copper, across each layer's zone "
            "(nearest layer first)",
            style="dim",
        )
    )
    geometry = [f for f in report.findings if f.rule != "assumption"]
    for m in report.magnetics:
        console.print(_panel(m, [f for f in geometry if f.ref == m.ref]))
    others = [f for f in geometry if f.ref not in {m.ref for m in report.magnetics}]
    for f in others:
        console.print(_badge(f), Text(f" {f.rule}: {f.message}"))
    assumptions = [f for f in report.findings if f.rule == "assumption"]
    if assumptions:
        console.print(Text("Assumptions", style=STYLE["title"]))
        for f in assumptions:
            console.print(Text("  - ") + _badge(f) + Text(f" {f.message}"))
    if report.notices:
        console.print(Text("Notices", style=STYLE["title"]))
        for n in report.notices:
            console.print(Text(f"  - {n}"))
    counts = {
        s: sum(1 for f in report.findings if f.severity == s and not f.waived)
        for s in ("error", "warning", "note")
    }
    waived = sum(1 for f in report.findings if f.waived)
    summary = Text.assemble(
        f"{len(report.magnetics)} magnetic(s): ",
        (f"{counts['error']} error(s)", STYLE["error"]),
        ", ",
        (f"{counts['warning']} warning(s)", STYLE["warning"]),
        ", ",
        (f"{counts['note']} note(s)", STYLE["note"]),
        f", {waived} waived",
    )
    console.print(summary)
    console.print(Text(f"Caution: {CAUTION}", style="dim"))
    return buf.getvalue()
