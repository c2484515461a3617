"""The HTML report (``--format html``): one self-contained page, a pure function of a report.

The page loads nothing: the style sheet is inline, there is no script, no web font (the
reader's own sans-serif), and pictures are embedded as ``data:`` URIs. A content security
policy in the page says so to the browser (``default-src 'none'``), so a stray reference
would be refused rather than fetched. Every text from the inputs (designators, values,
messages, file names) is escaped.

Layout: a title with the verdict; a summary table (parts x unwaived findings by severity);
one section a magnetic with its picture (when given), a per-layer table (coverage strip,
void, ring, figures) and its findings; board-wide findings; assumptions, notices and
cautions; the rules; the inputs with their SHA-256.

The palette is the terminal view's own: a warm red for errors, amber for warnings, a muted
teal for notes, grey for waived findings, a slate blue for headings.
"""

from __future__ import annotations

import base64
import html
import re
from collections.abc import Mapping

from fluxshadow.checks.model import (
    SEVERITIES,
    Finding,
    LayerResult,
    MagneticResult,
    Metric,
    Report,
)
from fluxshadow.report.inventory import CAUTION

__all__ = ["picture_data_uri", "report_to_html"]

_CSS = """
:root { --ink: #1f2933; --muted: #616e7c; --rule: #d9e2ec; --head: #30638e;
  --error: #d1495b; --warning: #c98a1c; --note: #00798c; --waived: #9aa5b1;
  --plane: #3a7d44; --other: #edae49; --none: #f4d6da; --bg: #fbfaf7; }
* { box-sizing: border-box; }
body { margin: 0 auto; max-width: 72rem; padding: 1.5rem 2rem 3rem; background: var(--bg);
  color: var(--ink); font: 15px/1.45 system-ui, -apple-system, "Segoe UI", sans-serif; }
h1 { font-size: 1.5rem; margin: 0 0 .2rem; color: var(--head); }
h2 { font-size: 1.15rem; margin: 2rem 0 .6rem; color: var(--head);
  border-bottom: 2px solid var(--rule); padding-bottom: .2rem; }
h3 { font-size: 1rem; margin: 1rem 0 .4rem; }
p.meta, .muted { color: var(--muted); }
code, .mono { font-family: ui-monospace, "DejaVu Sans Mono", monospace; font-size: .88em; }
td.mono { word-break: break-all; font-size: .78rem; }
table.layers td:last-child { min-width: 11rem; font-size: .85rem; }
table { border-collapse: collapse; width: 100%; margin: .3rem 0 .8rem; }
th, td { text-align: left; padding: .3rem .5rem; border-bottom: 1px solid var(--rule);
  vertical-align: top; }
th { font-weight: 600; font-size: .85rem; color: var(--muted); }
td.num, th.num { text-align: right; font-variant-numeric: tabular-nums; }
.verdict { display: inline-block; padding: .15rem .6rem; border-radius: .25rem;
  color: #fff; font-weight: 600; background: var(--plane); }
.verdict.error { background: var(--error); } .verdict.warning { background: var(--warning); }
.verdict.note { background: var(--note); }
.sev { display: inline-block; min-width: 4.6rem; padding: 0 .35rem; border-radius: .2rem;
  font-size: .8rem; font-weight: 600; color: #fff; text-align: center; }
.sev.error { background: var(--error); } .sev.warning { background: var(--warning); }
.sev.note { background: var(--note); } .sev.waived { background: var(--waived); }
tr.waived td { color: var(--muted); }
.count.error { color: var(--error); font-weight: 600; }
.count.warning { color: var(--warning); font-weight: 600; }
.count.note { color: var(--note); }
.strip { display: flex; width: 6rem; height: .8rem; border: 1px solid var(--rule);
  background: var(--none); }
.strip .plane { background: var(--plane); } .strip .other { background: var(--other); }
section.part { background: #fff; border: 1px solid var(--rule); border-radius: .35rem;
  padding: .2rem 1rem .6rem; margin: 1rem 0; }
section.part h2 { border: none; margin-top: .8rem; }
.picture { margin: .4rem 0 .8rem; }
.picture img { max-width: 100%; max-height: 26rem; border: 1px solid var(--rule);
  background: #fff; }
details summary { cursor: pointer; color: var(--muted); font-size: .85rem; }
dl.metrics { display: grid; grid-template-columns: max-content auto; gap: 0 1rem;
  margin: .3rem 0; font-size: .85rem; }
dl.metrics dt { color: var(--muted); } dl.metrics dd { margin: 0; }
.legend span { display: inline-block; width: .8rem; height: .8rem; vertical-align: middle;
  margin: 0 .2rem 0 .6rem; border: 1px solid var(--rule); }
footer { margin-top: 2rem; font-size: .85rem; color: var(--muted); }
"""

# Nothing may be fetched: images only from data: URIs, styles only inline.
_CSP = (
    '<meta http-equiv="Content-Security-Policy" content="default-src \'none\'; '
    "img-src data:; style-src 'unsafe-inline'\">"
)
_LEGEND = (
    '<p class="legend muted">Copper strip across each layer\'s zone:'
    '<span style="background:var(--plane)"></span>plane copper'
    '<span style="background:var(--other)"></span>other copper'
    '<span style="background:var(--none)"></span>no copper</p>'
)
_PNG_MAGIC = b"\x89PNG\r\n\x1a\n"


_ROUTE_NAMES = {"gerber": "Gerber/Excellon", "odb": "ODB++"}


def _e(value: object) -> str:
    return html.escape(str(value), quote=True)


def _num(v: Metric) -> str:
    if v is None:
        return "not computed"
    if isinstance(v, bool):
        return "yes" if v else "no"
    if isinstance(v, float):
        return f"{v:.4g}"
    return str(v)


def picture_data_uri(data: bytes) -> str | None:
    """A ``data:`` URI for an SVG or PNG picture, or None for anything else.

    Parameters
    ----------
    data : bytes
        The picture file's bytes (SVG text in UTF-8, or PNG).

    Returns
    -------
    str or None
    """
    if data.startswith(_PNG_MAGIC):
        mime = "image/png"
    elif b"<svg" in data[:2048].lower():
        mime = "image/svg+xml"
    else:
        return None
    return f"data:{mime};base64,{base64.b64encode(data).decode('ascii')}"


def _slug(ref: str, used: set[str]) -> str:
    base = "part-" + (re.sub(r"[^A-Za-z0-9_-]+", "-", ref).strip("-") or "x")
    slug, n = base, 1
    while slug in used:
        n += 1
        slug = f"{base}-{n}"
    used.add(slug)
    return slug


def _counts(findings: list[Finding]) -> dict[str, int]:
    out = dict.fromkeys((*SEVERITIES, "waived"), 0)
    for f in findings:
        out["waived" if f.waived else f.severity] += 1
    return out


def _count_cells(c: Mapping[str, int]) -> str:
    cells = []
    for key in (*SEVERITIES, "waived"):
        cls = f"num count {key}" if c[key] and key != "waived" else "num"
        cells.append(f'<td class="{cls}">{c[key]}</td>')
    return "".join(cells)


def _badge(f: Finding) -> str:
    if f.waived:
        return f'<span class="sev waived" title="waived">waived {_e(f.severity)}</span>'
    return f'<span class="sev {_e(f.severity)}">{_e(f.severity)}</span>'


def _strip(lr: LayerResult) -> str:
    plane = max(0.0, min(1.0, lr.coverage))
    other = max(0.0, min(1.0 - plane, lr.copper_coverage - lr.coverage))
    return (
        f'<div class="strip" role="img" aria-label="plane {plane:.0%}, other copper '
        f'{other:.0%}"><div class="plane" style="width:{plane * 100:.1f}%"></div>'
        f'<div class="other" style="width:{other * 100:.1f}%"></div></div>'
    )


def _figures(lr: LayerResult) -> str:
    f = lr.figures
    model = f.get("model")
    if not f.get("planes") and model != "sheet":
        return ""  # no plane between the part and this layer: nothing to shield or change
    parts = []
    se, dl, pct = f.get("shielding_db"), f.get("delta_l_nh"), f.get("delta_l_pct")
    per = f.get("figures_per")
    if isinstance(se, int | float) and not isinstance(se, bool):
        parts.append(f"SE {se:.1f} dB")
    if isinstance(dl, int | float) and not isinstance(dl, bool):
        text = f"ΔL {dl:+.3g} nH"
        if isinstance(pct, int | float) and not isinstance(pct, bool):
            text += f" ({pct:+.3g} %)"
        parts.append(text)
    ring = f.get("ring_current_a")
    if isinstance(ring, int | float) and not isinstance(ring, bool) and ring > 0:
        parts.append(f"ring {ring * 1e3:.3g} mA")
    if per:
        parts.append(f"per {per}")
    head = _e(", ".join(parts))
    if model:
        head += f'<br><span class="muted">{_e(model)}</span>'
    return head


def _ring(lr: LayerResult) -> str:
    if lr.ring is None:
        return ""
    if lr.ring.closed:
        return f"closed ring, {lr.ring.inner_perimeter_mm:.1f} mm around"
    return f"opened to {_e(lr.ring.opened_to or 'an edge')}"


def _layer_table(m: MagneticResult) -> str:
    rows = []
    for lr in m.layers:
        void = f"{lr.void_area_mm2:.2f}" if lr.plane_around else ""
        rows.append(
            "<tr>"
            f"<td><b>{_e(lr.layer)}</b></td>"
            f'<td class="num">{lr.depth_mm:.3f}</td>'
            f'<td class="num">{lr.zone_area_mm2:.1f}</td>'
            f"<td>{'yes' if lr.plane_around else 'no'}</td>"
            f"<td>{_strip(lr)}</td>"
            f'<td class="num">{lr.coverage:.1%}</td>'
            f'<td class="num">{lr.copper_coverage:.1%}</td>'
            f'<td class="num">{void}</td>'
            f'<td class="num">{lr.trace_area_mm2:.2f}</td>'
            f"<td>{_ring(lr)}</td>"
            f"<td>{_e(lr.shielded_by.replace(',', ', '))}</td>"
            f"<td>{_figures(lr)}</td>"
            "</tr>"
        )
    return (
        '<table class="layers"><thead><tr><th>layer</th><th class="num">depth (mm)</th>'
        '<th class="num">zone (mm²)</th><th>plane around</th><th>copper</th>'
        '<th class="num">plane coverage</th><th class="num">copper coverage</th>'
        '<th class="num">void (mm²)</th><th class="num">traces (mm²)</th><th>ring</th>'
        "<th>shielded by</th><th>figures</th></tr></thead><tbody>"
        + "".join(rows)
        + "</tbody></table>"
    )


def _metrics(f: Finding) -> str:
    if not f.metrics:
        return ""
    items = "".join(f"<dt>{_e(k)}</dt><dd>{_e(_num(v))}</dd>" for k, v in sorted(f.metrics.items()))
    return f'<details><summary>metrics</summary><dl class="metrics">{items}</dl></details>'


def _findings_table(findings: list[Finding], *, with_ref: bool = False) -> str:
    if not findings:
        return '<p class="muted">No findings.</p>'
    rows = []
    for f in findings:
        where = ""
        if f.x_mm is not None and f.y_mm is not None:
            where = f'<br><span class="muted">at ({f.x_mm:.2f}, {f.y_mm:.2f}) mm</span>'
        waived = (
            f'<br><span class="muted">waived: {_e(f.waiver_reason or "(no reason given)")}</span>'
            if f.waived
            else ""
        )
        ref = f"<td>{_e(f.ref or 'board')}</td>" if with_ref else ""
        rows.append(
            f'<tr class="{"waived" if f.waived else _e(f.severity)}">'
            f"<td>{_badge(f)}</td>{ref}<td><code>{_e(f.rule)}</code></td>"
            f"<td>{_e(f.layer or '-')}</td>"
            f"<td>{_e(f.message)}{where}{waived}{_metrics(f)}</td></tr>"
        )
    head_ref = "<th>part</th>" if with_ref else ""
    return (
        f'<table class="findings"><thead><tr><th>severity</th>{head_ref}<th>rule</th>'
        "<th>layer</th><th>finding</th></tr></thead><tbody>" + "".join(rows) + "</tbody></table>"
    )


def _picture(m: MagneticResult, pictures: Mapping[str, bytes]) -> str:
    data = pictures.get(m.ref)
    if data is None:
        return ""
    uri = picture_data_uri(data)
    if uri is None:
        return '<p class="muted">Picture not shown: it is neither SVG nor PNG.</p>'
    return (
        f'<figure class="picture"><img src="{uri}" alt="copper under {_e(m.ref)}, layer by '
        f'layer"></figure>'
    )


def _part_section(
    m: MagneticResult, findings: list[Finding], slug: str, pictures: Mapping[str, bytes]
) -> str:
    value = m.value_text or "(value unknown)"
    facts = (
        f"{_e(m.kind)} {_e(value)} · {_e(m.side)} side · at ({m.x_mm:.2f}, {m.y_mm:.2f}) mm · "
        f"body {m.body_mm[0]:.1f} x {m.body_mm[1]:.1f} mm · winding radius "
        f"{m.winding_radius_mm:.2f} mm"
    )
    geometry = [f for f in findings if f.rule != "assumption"]
    assumed = [f for f in findings if f.rule == "assumption"]
    parts = [
        f'<section class="part" id="{slug}" data-ref="{_e(m.ref)}">',
        f"<h2>{_e(m.ref)}</h2>",
        f'<p class="meta">{facts}</p>',
        _picture(m, pictures),
        "<h3>Copper under the part, nearest layer first</h3>",
        _layer_table(m),
        "<h3>Findings</h3>",
        _findings_table(geometry),
    ]
    if assumed:
        parts.append(
            f"<details><summary>{len(assumed)} assumption(s) for {_e(m.ref)}</summary>"
            + _findings_table(assumed)
            + "</details>"
        )
    parts.append("</section>")
    return "\n".join(p for p in parts if p)


def report_to_html(report: Report, *, pictures: Mapping[str, bytes] | None = None) -> str:
    """Render the report as one self-contained HTML page.

    Parameters
    ----------
    report : Report
    pictures : mapping of str to bytes, optional
        Designator -> picture of the copper under that magnetic (SVG or PNG bytes),
        embedded as a ``data:`` URI in its section. Other formats are not embedded (the
        section says so).

    Returns
    -------
    str
        An HTML5 document (UTF-8, trailing newline) that references no outside resource.
    """
    pictures = pictures or {}
    refs = {m.ref for m in report.magnetics}
    by_ref: dict[str, list[Finding]] = {m.ref: [] for m in report.magnetics}
    for f in report.findings:
        if f.ref in by_ref:
            by_ref[f.ref].append(f)
    stray = [f for f in report.findings if f.ref not in refs]
    total = _counts(list(report.findings))
    worst = report.worst()
    title = f"fluxshadow check · {report.package}"
    used: set[str] = set()
    slugs = {m.ref: _slug(m.ref, used) for m in report.magnetics}

    summary_rows = []
    for m in report.magnetics:
        summary_rows.append(
            f'<tr><td><a href="#{slugs[m.ref]}">{_e(m.ref)}</a></td><td>{_e(m.kind)}</td>'
            f"<td>{_e(m.value_text)}</td><td>{_e(m.side)}</td>"
            f"{_count_cells(_counts(by_ref[m.ref]))}</tr>"
        )
    if stray:
        summary_rows.append(
            '<tr><td><a href="#board-findings">other</a></td><td colspan="3">not tied to a '
            f"checked magnetic</td>{_count_cells(_counts(stray))}</tr>"
        )
    summary_rows.append(
        f'<tr class="total"><td><b>all</b></td><td colspan="3">{len(report.magnetics)} '
        f"magnetic(s)</td>{_count_cells(total)}</tr>"
    )
    verdict = (
        f'<span class="verdict {_e(worst)}">worst unwaived finding: {_e(worst)}</span>'
        if worst
        else '<span class="verdict">no unwaived findings</span>'
    )

    meta = (
        f'<p class="meta">fluxshadow {_e(report.tool_version)} · configuration: '
        f"{_e(report.config or 'none (defaults)')} · layers: "
        f"{_e(', '.join(report.layers) or 'none')}</p>"
    )
    footer = (
        f"<footer>Made by fluxshadow {_e(report.tool_version)} from the fabrication files "
        "alone.</footer>"
    )
    out = [
        "<!DOCTYPE html>",
        '<html lang="en">',
        "<head>",
        '<meta charset="utf-8">',
        _CSP,
        '<meta name="viewport" content="width=device-width, initial-scale=1">',
        f'<meta name="generator" content="fluxshadow {_e(report.tool_version)}">',
        f"<title>{_e(title)}</title>",
        f"<style>{_CSS}</style>",
        "</head>",
        "<body>",
        "<header>",
        f"<h1>{_e(title)}</h1>",
        meta,
        f"<p>{verdict}</p>",
        "</header>",
        '<section id="summary">',
        "<h2>Summary</h2>",
        '<table class="summary"><thead><tr><th>part</th><th>kind</th><th>value</th>'
        '<th>side</th><th class="num">errors</th><th class="num">warnings</th>'
        '<th class="num">notes</th><th class="num">waived</th></tr></thead><tbody>'
        + "".join(summary_rows)
        + "</tbody></table>",
        _LEGEND,
        "</section>",
    ]
    for m in report.magnetics:
        out.append(_part_section(m, by_ref[m.ref], slugs[m.ref], pictures))
    if stray:
        out += [
            '<section id="board-findings">',
            "<h2>Findings not tied to a checked magnetic</h2>",
            _findings_table(stray, with_ref=True),
            "</section>",
        ]
    out += ['<section id="assumptions">', "<h2>Assumptions</h2>"]
    if report.assumptions:
        out.append("<ul>" + "".join(f"<li>{_e(a)}</li>" for a in report.assumptions) + "</ul>")
    else:
        out.append('<p class="muted">None.</p>')
    out.append("</section>")
    if report.notices:
        out += [
            '<section id="notices">',
            "<h2>Notices</h2>",
            "<ul>" + "".join(f"<li>{_e(n)}</li>" for n in report.notices) + "</ul>",
            "</section>",
        ]
    out += [
        '<section id="cautions">',
        "<h2>Cautions</h2>",
        f"<p>{_e(CAUTION)}</p>",
        "</section>",
        '<section id="rules">',
        "<h2>Rules</h2>",
        "<table><tbody>"
        + "".join(
            f"<tr><td><code>{_e(rid)}</code></td><td>{_e(summary)}</td></tr>"
            for rid, summary in report.rules.items()
        )
        + "</tbody></table>",
        '<p class="muted">Each rule, its thresholds and metrics: docs/rules.md.</p>',
        "</section>",
        '<section id="inputs">',
        "<h2>Inputs</h2>",
        f"<p>Read by the {_e(_ROUTE_NAMES.get(report.route, report.route))} route.</p>",
        "<table><thead><tr><th>file</th><th>kind</th><th>use</th><th>SHA-256</th></tr>"
        "</thead><tbody>"
        + "".join(
            f"<tr><td><code>{_e(i.path)}</code></td><td>{_e(i.kind)}</td><td>{_e(i.use)}</td>"
            f'<td class="mono">{_e(i.sha256)}</td></tr>'
            for i in report.inputs
        )
        + "</tbody></table>",
        "</section>",
        footer,
        "</body>",
        "</html>",
    ]
    return "\n".join(out) + "\n"
