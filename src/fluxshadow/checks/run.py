"""Run every rule over every magnetic of a board and assemble the report."""

from __future__ import annotations

from collections.abc import Callable

import shapely

from fluxshadow import __version__
from fluxshadow.board.model import Board
from fluxshadow.checks.analysis import MagneticGeometry, analyse_magnetic, board_extent
from fluxshadow.checks.figures import (
    MagneticFigures,
    apply_figures,
    magnetic_figures,
    stated_severities,
)
from fluxshadow.checks.model import (
    SEVERITY_RANK,
    Finding,
    InputFile,
    LayerResult,
    MagneticResult,
    Report,
)
from fluxshadow.checks.operating import operating_points
from fluxshadow.checks.rules import ASSUMPTION_SUMMARY, RULES, Context
from fluxshadow.checks.settings import RULE_IDS, Settings, settings_from_config
from fluxshadow.checks.source import SourceModel, checked_part, source_model
from fluxshadow.errors import ConfigError

__all__ = ["run_checks"]

Progress = Callable[[int, int, str], None]


def _coords(geom: shapely.Geometry) -> tuple[tuple[float, float], ...]:
    if geom.is_empty:
        return ()
    poly = max(shapely.get_parts(geom), key=lambda g: g.area)
    return tuple((round(float(x), 4), round(float(y), 4)) for x, y in poly.exterior.coords)


def _result(geo: MagneticGeometry, figs: MagneticFigures | None = None) -> MagneticResult:
    m = geo.magnetic
    layers = []
    for lg in geo.layers:
        layers.append(
            LayerResult(
                layer=lg.layer.name,
                depth_mm=round(lg.depth_mm, 4),
                zone_area_mm2=round(float(lg.zone.area), 3),
                plane_around=lg.plane_around,
                coverage=round(lg.coverage, 4),
                copper_coverage=round(lg.copper_coverage, 4),
                void_area_mm2=round(lg.void_area_mm2, 3) if lg.plane_around else 0.0,
                trace_area_mm2=round(lg.trace_area_mm2, 3),
                ring=lg.voids[0].ring if lg.voids else None,
                shielded_by=lg.shielded_by,
                figures=dict(figs.layers.get(lg.layer.name, {})) if figs else {},
            )
        )
    return MagneticResult(
        ref=m.ref,
        kind=m.kind,
        value_text=m.value_text,
        side=m.side,
        x_mm=round(m.x_mm, 4),
        y_mm=round(m.y_mm, 4),
        body_mm=(round(m.body_mm[0], 3), round(m.body_mm[1], 3)),
        outline=tuple((round(float(x), 4), round(float(y), 4)) for x, y in m.outline),
        winding_radius_mm=round(geo.winding_radius_mm, 4),
        layers=tuple(sorted(layers, key=lambda r: int(r.layer[1:]))),
        zones={lg.layer.name: _coords(lg.zone) for lg in geo.layers},
    )


def _waive(findings: list[Finding], board: Board) -> tuple[list[Finding], list[str]]:
    from dataclasses import replace

    notes: list[str] = []
    waivers = board.config.waivers
    refs = {m.ref for m in board.magnetics} | {""}
    layer_names = {lay.name for lay in board.layers}
    for i, w in enumerate(waivers, start=1):
        if w.rule not in RULE_IDS:
            msg = (
                f"{board.config.source}: waiver[{i}].rule must be one of {', '.join(RULE_IDS)}; "
                f"got {w.rule!r}"
            )
            raise ConfigError(msg)
        if w.ref not in refs and w.ref not in ("*",):
            notes.append(f"waiver for {w.rule} names part {w.ref!r}, which is not a magnetic here")
        if w.layer not in ("", "*") and w.layer not in layer_names:
            notes.append(f"waiver for {w.rule} names layer {w.layer!r}, which does not exist")
    out = []
    for f in findings:
        for w in waivers:
            if w.rule != f.rule or w.ref not in (f.ref, "*"):
                continue
            if w.layer not in ("", "*", f.layer):
                continue
            f = replace(f, waived=True, waiver_reason=w.reason)
            break
        out.append(f)
    return out, notes


def _assumptions(
    board: Board, geos: list[MagneticGeometry], sources: dict[str, SourceModel]
) -> list[str]:
    out = list(board.assumptions)
    in_regulator = {r for reg in board.config.regulators for r in reg.parts}
    for geo in geos:
        m = geo.magnetic
        # construction, winding radius, heights, axis and turns: the source model's
        out.extend(sources[m.ref].assumptions)
        if m.ref not in in_regulator:
            out.append(
                f"{m.ref}: no operating point; figures will be given per A/us of current slope. "
                f'State it as [[regulator]] parts = ["{m.ref}"], vin_v, vout_v, fsw_hz'
            )
    return out


def _problem_findings(problems: list[tuple[str, str]], level: str) -> list[Finding]:
    """Stated values that made no sense, as ``assumption`` warnings (errors when the
    ``assumption`` rule is raised to error; none when it is off)."""
    if level == "off":
        return []
    severity = "error" if level == "error" else "warning"
    return [
        Finding(
            rule="assumption",
            severity=severity,  # type: ignore[arg-type]
            ref=ref,
            layer="",
            x_mm=None,
            y_mm=None,
            message=text,
            metrics={"what": text.split(";", 1)[0], "problem": True},
        )
        for ref, text in problems
    ]


def run_checks(
    board: Board,
    *,
    settings: Settings | None = None,
    progress: Progress | None = None,
) -> Report:
    """Check every magnetic of ``board`` with every rule.

    Parameters
    ----------
    board : Board
        From :func:`fluxshadow.load_package` (its ``config`` supplies thresholds,
        severities and waivers).
    settings : Settings, optional
        Overrides the thresholds from the config.
    progress : callable, optional
        ``progress(done, total, ref)`` after each magnetic.

    Returns
    -------
    Report
        Findings sorted by severity (worst first), then part and layer.
    """
    cfg = board.config
    if settings is None:
        settings = settings_from_config(cfg.thresholds, cfg.severity, source=cfg.source)
    ctx = Context(board=board, settings=settings)
    extent = board_extent(board)
    if extent.geom_type == "Polygon":
        extent = shapely.Polygon(extent.exterior)  # a part over a cut-out is still on the board
    findings: list[Finding] = []
    notices = [str(n) for n in board.notices]
    geos: list[MagneticGeometry] = []
    results: list[MagneticResult] = []
    sources: dict[str, SourceModel] = {}
    ops = operating_points(board.magnetics, cfg)
    # values that make no sense: (ref, message) each, reported as warnings and notices
    problems: list[tuple[str, str]] = [
        (ref, pr.text) for pr in ops.problems for ref in (pr.refs or ("",))
    ]
    stated = stated_severities(settings, cfg.severity)
    total = len(board.magnetics)
    for n, m in enumerate(board.magnetics, start=1):
        if not extent.is_empty and not extent.buffer(0.5).contains(shapely.Point(m.x_mm, m.y_mm)):
            notices.append(
                f"{m.ref} at ({m.x_mm:.2f}, {m.y_mm:.2f}) mm lies outside the board; it was "
                "not checked (check the placement frame or the [placement] transform)"
            )
            if progress:
                progress(n, total, m.ref)
            continue
        index = next((i for i, p in enumerate(cfg.parts, start=1) if p.ref == m.ref), 0)
        part = cfg.parts[index - 1] if index else None
        key = f"{cfg.source}: part[{index}]" if cfg.source else f"part[{index}]"
        # stated winding values that make no sense for the part fall back to the defaults
        part, part_problems = checked_part(m, part, key=key)
        geo = analyse_magnetic(
            board, m, settings, radius_mm=part.winding_radius_mm if part else None
        )
        geos.append(geo)
        op = ops[m.ref]
        src = source_model(m, part, settings, inductance_h=op.inductance_h, key=key)
        sources[m.ref] = src
        problems.extend((m.ref, text) for text in part_problems)
        figs = magnetic_figures(geo, src, op, settings)
        notices.extend(figs.notes)
        results.append(_result(geo, figs))
        if not any(lg.copper_coverage > 0 for lg in geo.layers):
            notices.append(f"{m.ref}: no copper at all under the part on any layer")
        made: list[Finding] = []
        for rule in RULES.values():
            made.extend(rule.run(ctx, geo))
        findings.extend(apply_figures(made, figs, settings, stated=stated))
        if progress:
            progress(n, total, m.ref)
    assumptions = _assumptions(board, geos, sources)
    level = settings.severity.get("assumption", "note")
    findings.extend(_problem_findings(problems, level))
    notices.extend(dict.fromkeys(f"{ref}: {text}" if ref else text for ref, text in problems))
    if level != "off":
        for text in assumptions:
            ref = (
                text.split(":", 1)[0]
                if text.split(":", 1)[0] in {g.magnetic.ref for g in geos}
                else ""
            )
            findings.append(
                Finding(
                    rule="assumption",
                    severity=level,  # type: ignore[arg-type]
                    ref=ref,
                    layer="",
                    x_mm=None,
                    y_mm=None,
                    message=text,
                    metrics={"what": text.split(";", 1)[0]},
                )
            )
    findings, waiver_notes = _waive(findings, board)
    notices.extend(waiver_notes)
    layer_pos = {lay.name: lay.index for lay in board.layers}
    findings.sort(
        key=lambda f: (
            -SEVERITY_RANK[f.severity],
            f.rule == "assumption",
            f.ref,
            layer_pos.get(f.layer, 0),
        )
    )
    rules = {rid: r.summary for rid, r in RULES.items()}
    rules["assumption"] = ASSUMPTION_SUMMARY
    inputs = tuple(
        InputFile(path=f.file, kind=f.kind, use=f.use, sha256=board.input_hashes.get(f.file, ""))
        for f in board.files
    )
    return Report(
        package=board.package,
        tool_version=__version__,
        magnetics=tuple(results),
        findings=tuple(findings),
        assumptions=tuple(assumptions),
        notices=tuple(notices),
        inputs=inputs,
        layers=tuple(lay.name for lay in board.layers),
        rules=rules,
        config=cfg.source,
        layer_files={lay.name: lay.source for lay in board.layers},
        route=board.route,
    )
