"""``run_checks`` on synthetic boards whose findings are known by construction.

Each case of :mod:`fluxshadow.synth.cases` isolates one situation and carries the values
worked out BY HAND from its description (zone = body grown by 0.5 mm + 1.0 x depth,
coverage = 1 - void area / zone area, ...; the computation is written next to each case).
The tests check that the checks find exactly what was built in, and nothing else.

The demo board (:mod:`fluxshadow.synth.demo`) is checked for the findings its docstring
lists, and the committed fixtures for drift from the writer.
"""

from __future__ import annotations

import re
from pathlib import Path

import pytest

import fluxshadow
from fluxshadow.checks.model import Finding, LayerResult, Report
from fluxshadow.checks.run import run_checks
from fluxshadow.synth import demo as demo_module
from fluxshadow.synth.__main__ import FIXTURES
from fluxshadow.synth.cases import synthetic_cases
from fluxshadow.synth.demo import DEMO_FINDINGS, demo_board
from fluxshadow.synth.writer import write_package

REPO = Path(__file__).resolve().parents[2]
CASES = synthetic_cases()


@pytest.fixture(scope="module")
def reports(tmp_path_factory: pytest.TempPathFactory) -> dict[str, Report]:
    """Every case written, loaded and checked once (about 0.1 s each)."""
    root = tmp_path_factory.mktemp("cases")
    out = {}
    for name, case in CASES.items():
        write_package(case.board, root / name)
        out[name] = run_checks(fluxshadow.load_package(root / name))
    return out


def _layer(report: Report, ref: str, layer: str) -> LayerResult:
    (mag,) = [m for m in report.magnetics if m.ref == ref]
    (result,) = [r for r in mag.layers if r.layer == layer]
    return result


def _geometry(report: Report) -> list[Finding]:
    return [f for f in report.findings if f.rule != "assumption"]


def _params(attr: str) -> list[object]:
    """One pytest param per (case, key) of an expected mapping, so none is vacuous."""
    out: list[object] = []
    for name, case in CASES.items():
        for key, value in getattr(case.expected, attr).items():
            label = "-".join((name, *key)) if isinstance(key, tuple) else f"{name}-{key}"
            out.append(pytest.param(name, key, value, id=label))
    return out


# ----------------------------------------------------------------------------- cases


def test_every_situation_of_the_brief_is_built() -> None:
    assert set(CASES) == {
        "solid",
        "enclosed",
        "slot-to-edge",
        "slot-to-cutout",
        "outline-cutout",
        "npth-slot",
        "exposed-trace",
        "shielded-trace",
        "bottom-part",
        "bottom-exposed",
        "via-antipad",
        "no-plane-layer",
        "split-planes",
    }


@pytest.mark.parametrize("name", list(CASES))
def test_findings_are_exactly_those_built_in(reports: dict[str, Report], name: str) -> None:
    got = {(f.rule, f.ref, f.layer) for f in _geometry(reports[name])}
    assert got == set(CASES[name].expected.findings)


@pytest.mark.parametrize("name", list(CASES))
def test_assumptions_are_reported(reports: dict[str, Report], name: str) -> None:
    # No configuration: winding radius, construction and operating point are assumed.
    refs = {f.ref for f in reports[name].findings if f.rule == "assumption"}
    assert set(CASES[name].expected.assumptions_for) <= refs
    assert not any(f.waived for f in reports[name].findings)


@pytest.mark.parametrize(("name", "key", "value"), _params("coverage"))
def test_coverage_matches_hand_computation(
    reports: dict[str, Report], name: str, key: tuple[str, str], value: float
) -> None:
    assert _layer(reports[name], *key).coverage == pytest.approx(value, abs=0.01)


@pytest.mark.parametrize(("name", "key", "value"), _params("plane_around"))
def test_plane_layers_are_recognised(
    reports: dict[str, Report], name: str, key: tuple[str, str], value: bool
) -> None:
    assert _layer(reports[name], *key).plane_around is value


@pytest.mark.parametrize(("name", "key", "value"), _params("void_area_mm2"))
def test_void_area_matches_hand_computation(
    reports: dict[str, Report], name: str, key: tuple[str, str], value: float
) -> None:
    # Round outlines become polygons (a circle loses ~0.6 % of its area): 2 % or 0.01 mm^2.
    got = _layer(reports[name], *key).void_area_mm2
    assert got == pytest.approx(value, rel=0.02, abs=0.01)


@pytest.mark.parametrize(("name", "key", "value"), _params("ring_closed"))
def test_ring_closed_or_opened_as_built(
    reports: dict[str, Report], name: str, key: tuple[str, str], value: bool
) -> None:
    ref, layer = key
    ring = _layer(reports[name], ref, layer).ring
    assert ring is not None
    assert ring.closed is value
    (finding,) = [
        f for f in reports[name].findings if (f.rule, f.ref, f.layer) == ("void-ring", *key)
    ]
    assert finding.metrics["closed"] is value
    # An opened void is only a note. A closed ring is a warning unless its share of the
    # inductance change is known: then the delta_l_pct thresholds decide (docs/rules.md,
    # void-ring and "Physics figures"; defaults 5 % warning, 20 % error).
    if not value:
        assert finding.severity == "note"
    else:
        pct = finding.metrics.get("delta_l_pct")
        if pct is None:
            assert finding.severity == "warning"
        else:
            share = abs(float(pct))
            expected = "error" if share >= 20 else "warning" if share >= 5 else "note"
            assert finding.severity == expected
    if not value:
        assert ring.opened_to == "board edge"


@pytest.mark.parametrize(("name", "key", "value"), _params("ring_inner_area_mm2"))
def test_ring_hole_area_matches_hand_computation(
    reports: dict[str, Report], name: str, key: tuple[str, str], value: float
) -> None:
    ring = _layer(reports[name], *key).ring
    assert ring is not None
    assert ring.inner_area_mm2 == pytest.approx(value, rel=0.02)


@pytest.mark.parametrize(("name", "key", "value"), _params("exposed"))
def test_exposed_trace_net_and_length(
    reports: dict[str, Report],
    name: str,
    key: tuple[str, str],
    value: tuple[str, float, float, str],
) -> None:
    net, exposed_mm, in_zone_mm, return_layer = value
    (finding,) = [
        f for f in reports[name].findings if (f.rule, f.ref, f.layer) == ("exposed-trace", *key)
    ]
    m = finding.metrics
    assert m["net"] == net
    assert m["exposed_length_mm"] == pytest.approx(exposed_mm, rel=0.02)
    assert m["length_in_zone_mm"] == pytest.approx(in_zone_mm, rel=0.02)
    assert m["return_layer"] == return_layer


@pytest.mark.parametrize(("name", "key", "value"), _params("cutout_area_mm2"))
def test_through_cutout_area(reports: dict[str, Report], name: str, key: str, value: float) -> None:
    (finding,) = [f for f in reports[name].findings if (f.rule, f.ref) == ("through-cutout", key)]
    area = finding.metrics["cutout_area_mm2"]
    assert isinstance(area, float)
    assert area == pytest.approx(value, rel=0.01)


@pytest.mark.parametrize(("name", "key", "value"), _params("depth_mm"))
def test_depths_from_the_mounting_surface(
    reports: dict[str, Report], name: str, key: tuple[str, str], value: float
) -> None:
    assert _layer(reports[name], *key).depth_mm == pytest.approx(value, abs=1e-6)


def test_zone_areas_follow_the_depth_rule(reports: dict[str, Report]) -> None:
    # Hand computation: 4 mm body + 2 x (0.5 + depth) per side -> 25, 29.16, 57.76, 64 mm^2.
    areas = [_layer(reports["solid"], "L1", f"L{k}").zone_area_mm2 for k in range(1, 5)]
    assert areas == pytest.approx([25.0, 29.16, 57.76, 64.0], abs=1e-3)


# ----------------------------------------------------------------------------- demo


@pytest.fixture(scope="module")
def demo_report(tmp_path_factory: pytest.TempPathFactory) -> Report:
    folder = tmp_path_factory.mktemp("demo") / "demo"
    write_package(demo_board(), folder)
    return run_checks(fluxshadow.load_package(folder))


def test_demo_docstring_lists_the_expected_findings() -> None:
    text = demo_module.__doc__ or ""
    listed = {
        (rule, ref, "" if layer == "-" else layer)
        for rule, ref, layer in re.findall(r"- ``([a-z-]+)`` (L\d+) (L\d+|-)", text)
    }
    assert listed == set(DEMO_FINDINGS)


def test_demo_findings_are_all_present(demo_report: Report) -> None:
    got = {(f.rule, f.ref, f.layer) for f in _geometry(demo_report)}
    assert set(DEMO_FINDINGS) <= got
    assert not any(
        f.ref == "L1" and f.rule != "switch-node-capacitance" for f in _geometry(demo_report)
    )
    assert any(f.rule == "assumption" and f.ref == "L1" for f in demo_report.findings)


def test_demo_has_exactly_one_waived_finding(demo_report: Report) -> None:
    waived = [f for f in demo_report.findings if f.waived]
    assert [(f.rule, f.ref) for f in waived] == [("through-cutout", "L4")]
    assert "cable tie" in waived[0].waiver_reason


def test_demo_figures_match_hand_computation(demo_report: Report) -> None:
    by_key = {(f.rule, f.ref, f.layer): f.metrics for f in demo_report.findings}
    # Keep-out 4 x 4 = 16 mm^2 under L2; 3 x 3 + 1.2 x 0.5 = 9.6 mm^2 under L3; pull-back
    # 2 x 11 - 10 = 12 mm^2 around the 1 x 10 mm slot under L4 on L2 and L3.
    assert by_key[("plane-void", "L2", "L2")]["void_area_mm2"] == pytest.approx(16.0, rel=0.01)
    assert by_key[("plane-void", "L3", "L2")]["void_area_mm2"] == pytest.approx(9.6, rel=0.01)
    for layer in ("L2", "L3"):
        assert by_key[("plane-void", "L4", layer)]["void_area_mm2"] == pytest.approx(12.0, rel=0.01)
    assert by_key[("void-ring", "L2", "L2")]["closed"] is True
    assert by_key[("void-ring", "L3", "L2")]["closed"] is False
    # ADC_IN_P crosses the 4 mm keep-out; SENSE_1V8 the 3 mm one.
    adc = by_key[("exposed-trace", "L2", "L3")]
    assert (adc["net"], adc["exposed_length_mm"]) == ("ADC_IN_P", pytest.approx(4.0, rel=0.02))
    sense = by_key[("exposed-trace", "L3", "L4")]
    assert (sense["net"], sense["exposed_length_mm"]) == (
        "SENSE_1V8",
        pytest.approx(3.0, rel=0.02),
    )
    # Slot 10 mm^2 plus the 12 mm^2 pull-back, where no layer has copper.
    assert by_key[("through-cutout", "L4", "")]["cutout_area_mm2"] == pytest.approx(22.0, rel=0.01)


def test_demo_config_is_read(demo_report: Report) -> None:
    # Operating points for every regulator: no "no operating point" assumption is left.
    assert not any("no operating point" in a for a in demo_report.assumptions)
    assert demo_report.config.endswith("fluxshadow.toml")


# ----------------------------------------------------------------------------- fixtures


@pytest.mark.parametrize("name", list(FIXTURES))
def test_committed_fixture_matches_the_writer(tmp_path: Path, name: str) -> None:
    committed = REPO / "fixtures" / name
    written = {p.name: p for p in write_package(FIXTURES[name](), tmp_path / name)}
    assert sorted(written) == sorted(p.name for p in committed.iterdir())
    for file_name, path in written.items():
        assert path.read_bytes() == (committed / file_name).read_bytes(), file_name
