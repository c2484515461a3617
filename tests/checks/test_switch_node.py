"""The ``switch-node-capacitance`` rule (fluxshadow.checks.switch_node).

Synthetic boards with a switch-node pour of known area over a plane at a known distance,
written by :mod:`fluxshadow.synth.writer`, loaded and checked; the expected figures are
worked out by hand next to each check. Reference values: fluxshadow physics reference
(``physics.md``) rows 16 (parallel plate, 9.51825 pF for 5 x 5 mm on 0.1 mm, εr 4.3), 16c
(Hammerstad-Jensen microstrip with open ends, 10.0164 pF for the same pad) and 17
(½CV²f = 0.731 mW at 12 V, 1 MHz and C dV/dt = 24.4 mA for 12 V in 5 ns, for 10.15 pF).
"""

from __future__ import annotations

import math
import re
from collections.abc import Callable
from pathlib import Path

import pytest

import fluxshadow
from fluxshadow.checks.analysis import analyse_magnetic
from fluxshadow.checks.model import Finding, Report
from fluxshadow.checks.rules import RULES, Context
from fluxshadow.checks.run import run_checks
from fluxshadow.checks.settings import Settings, settings_from_config
from fluxshadow.checks.switch_node import (
    DEFAULT_COSS_F,
    RULE_ID,
    equivalent_rectangle_mm,
    find_switch_nodes,
    is_switch_net_name,
    node_capacitance,
    switch_node_capacitance,
    switch_node_figures,
)
from fluxshadow.errors import ConfigError
from fluxshadow.physics.capacitance import pad_capacitance_microstrip_f
from fluxshadow.synth.demo import demo_board
from fluxshadow.synth.model import CopperLayer, Feature, Part, Region, SynthBoard, Track
from fluxshadow.synth.writer import write_package

EPS0 = 8.8541878128e-12
"""Vacuum permittivity (F/m), CODATA 2018."""

Rect = tuple[float, float, float, float]

_PLANE = (0.5, 0.5, 29.5, 29.5)
_POUR_5X5 = (15.5, 12.5, 20.5, 17.5)
"""5 x 5 mm switch-node pour around the right pad (16..17 x 13.5..16.5 mm) of L1."""


def _rect(r: Rect) -> tuple[tuple[float, float], ...]:
    x0, y0, x1, y1 = r
    return ((x0, y0), (x1, y0), (x1, y1), (x0, y1))


def _inductor(side: str = "top") -> Part:
    # 4 x 4 mm body at (15, 15); pads 1 x 3 mm at +-1.5 mm: 13..14 and 16..17 mm in x.
    return Part(
        "L1",
        "4.7uH",
        "IND_4.0x4.0mm",
        15.0,
        15.0,
        0.0,
        side,  # type: ignore[arg-type]
        ((-1.5, 0.0, 1.0, 3.0), (1.5, 0.0, 1.0, 3.0)),
        "power inductor, 4 x 4 mm",
    )


def _board(
    name: str,
    *,
    pour: Rect = _POUR_5X5,
    net: str = "SW",
    vout_net: str = "VOUT",
    extra: tuple[Feature, ...] = (),
    l2_clear: Rect | None = None,
    l3_plane: bool = False,
    side: str = "top",
    epsilon_r: float = 4.3,
    dialect: str = "x2",
    config: str = "",
) -> SynthBoard:
    """A 30 x 30 mm four-layer board: 35 um copper, gaps 0.1 / 1.2 / 0.1 mm.

    The switch-node pour (net ``net``) and the VOUT track sit on the mounting layer; the
    layer next to it is a GND plane (with an optional clear rectangle); the far layers
    carry a GND plane when ``l3_plane`` (top part: L3; bottom part: L2), else nothing.
    """
    node: tuple[Feature, ...] = (
        Region(_rect(pour), net=net),
        Track(((14.0, 15.0), (5.0, 15.0)), 0.6, net=vout_net),
        *extra,
    )
    near: list[Feature] = [Region(_rect(_PLANE), net="GND")]
    if l2_clear is not None:
        near.append(Region(_rect(l2_clear), dark=False))
    far: tuple[Feature, ...] = (Region(_rect(_PLANE), net="GND"),) if l3_plane else ()
    outer = (Region(_rect(_PLANE), net="GND"),)
    if side == "top":
        layers = (node, tuple(near), far, outer)
    else:
        layers = (outer, far, tuple(near), node)
    return SynthBoard(
        name=name,
        width_mm=30.0,
        height_mm=30.0,
        layers=tuple(CopperLayer(f) for f in layers),
        parts=(_inductor(side),),
        copper_mm=(0.035, 0.035, 0.035, 0.035),
        dielectric_mm=(0.1, 1.2, 0.1),
        epsilon_r=epsilon_r,
        dialect=dialect,  # type: ignore[arg-type]
        config_text=config,
    )


def _check(tmp_path: Path, board: SynthBoard) -> Report:
    write_package(board, tmp_path / board.name)
    return run_checks(fluxshadow.load_package(tmp_path / board.name))


def _node(report: Report) -> list[Finding]:
    return [f for f in report.findings if f.rule == RULE_ID]


def _assumed(report: Report, ref: str = "L1") -> list[str]:
    return [f.message for f in report.findings if f.rule == "assumption" and f.ref == ref]


def _num(finding: Finding, key: str) -> float:
    value = finding.metrics[key]
    assert isinstance(value, (int, float))
    return float(value)


_OP = """
[[regulator]]
parts = ["L1"]
vin_v = 12
vout_v = 3.3
fsw_hz = 1e6
"""


# ----------------------------------------------------------------------------- pure parts


@pytest.mark.parametrize(
    ("name", "expected"),
    [
        ("SW", True),
        ("SW_A", True),
        ("SW2", True),
        ("VSW", True),
        ("LX", True),
        ("PH", True),
        ("SWITCH", True),
        ("BUCK1_SW", True),
        ("/power/lx1", True),
        ("Net-(U20-SW)", True),
        ("SW_NODE", True),
        ("VOUT", False),
        ("SWCLK", False),
        ("SWDIO", False),
        ("VIN_SWITCHED", False),
        ("Net-(L1-Pad2)", False),
        ("GND", False),
        ("", False),
    ],
)
def test_switch_net_names(name: str, expected: bool) -> None:
    assert is_switch_net_name(name) is expected


def test_equivalent_rectangle() -> None:
    # t^2 - (P/2) t + A = 0: A = 24, P = 22 -> t = 3 and 8 (by hand).
    assert equivalent_rectangle_mm(24.0, 22.0) == pytest.approx((3.0, 8.0))
    # A square is its own rectangle; a disk (P^2 < 16 A) falls back to the square.
    assert equivalent_rectangle_mm(25.0, 20.0) == pytest.approx((5.0, 5.0))
    assert equivalent_rectangle_mm(math.pi, 2 * math.pi) == pytest.approx(
        (math.sqrt(math.pi), math.sqrt(math.pi))
    )


def test_figures_match_physics_reference_row_17() -> None:
    fig = switch_node_figures(10.15e-12, coss_f=1e-9, vin_v=12.0, fsw_hz=1e6, edge_time_s=5e-9)
    # physics.md row 17: 1.02 % of 1 nF; ½CV²f = 0.731 mW; C dV/dt = 24.4 mA.
    assert fig.ratio == pytest.approx(0.01015, rel=1e-9)
    assert fig.loss_w == pytest.approx(0.731e-3, rel=1e-3)
    assert fig.current_a == pytest.approx(24.4e-3, rel=2e-3)
    # 0.10 % of 10 nF (row 17).
    assert switch_node_figures(10.15e-12, coss_f=10e-9).ratio == pytest.approx(0.001015)


def test_figures_without_operating_point() -> None:
    fig = switch_node_figures(10e-12)
    assert fig.coss_f == DEFAULT_COSS_F
    assert fig.ratio == pytest.approx(0.02)
    assert fig.loss_w is None
    assert fig.current_a is None


def test_rule_is_registered() -> None:
    assert RULES[RULE_ID].run is switch_node_capacitance
    assert RULES[RULE_ID].summary.startswith("Switch-node copper")


def test_ratio_threshold_is_validated() -> None:
    s = settings_from_config({"switch_node_ratio_warning": 0.25}, {})
    assert s.switch_node_ratio_warning == 0.25
    assert Settings().switch_node_ratio_warning == 0.1
    for bad in (0.0, 1.5, -0.1):
        with pytest.raises(ConfigError, match="switch_node_ratio_warning must be a fraction"):
            settings_from_config({"switch_node_ratio_warning": bad}, {})


# ----------------------------------------------------------------------------- synthetic


def test_5x5_pour_matches_physics_reference_row_16c(tmp_path: Path) -> None:
    report = _check(tmp_path, _board("sn5x5"))
    (f,) = _node(report)
    assert (f.ref, f.layer, f.severity) == ("L1", "L1", "note")
    m = f.metrics
    assert (m["net"], m["evidence"], m["plane_layer"]) == ("SW", "net name", "L2")
    assert _num(f, "copper_area_mm2") == pytest.approx(25.0, abs=1e-3)
    assert _num(f, "area_mm2") == pytest.approx(25.0, abs=1e-3)
    assert _num(f, "distance_mm") == pytest.approx(0.1, abs=1e-9)
    # Row 16: ε0 εr A / d = 8.8541878e-12 * 4.3 * 25e-6 / 1e-4 = 9.51825 pF.
    assert _num(f, "plate_pf") == pytest.approx(9.51825, rel=1e-4)
    # Row 16c: Hammerstad-Jensen microstrip, W/h = 50, with open ends: 10.0164 pF.
    assert _num(f, "capacitance_pf") == pytest.approx(10.0164, rel=1e-4)
    # No operating point: ratio to the assumed 500 pF only.
    assert _num(f, "coss_pf") == pytest.approx(500.0)
    assert _num(f, "ratio") == pytest.approx(10.0164 / 500.0, rel=1e-4)
    assert m["loss_mw"] is None
    assert m["current_ma"] is None
    assert any("500 pF" in a for a in _assumed(report))
    assert not any("edge time" in a for a in _assumed(report))


def test_rectangular_pour_uses_the_equivalent_rectangle(tmp_path: Path) -> None:
    # A 3 x 8 mm pour (area 24, perimeter 22 -> the rectangle itself), εr 3.5 from the
    # job file, 0.1 mm over the plane.
    report = _check(tmp_path, _board("sn3x8", pour=(15.5, 11.0, 18.5, 19.0), epsilon_r=3.5))
    (f,) = _node(report)
    # ε0 * 3.5 * 24e-6 / 1e-4 = 7.43752 pF (by hand).
    assert _num(f, "plate_pf") == pytest.approx(7.43752, rel=1e-4)
    assert _num(f, "epsilon_r") == pytest.approx(3.5)
    expected = float(pad_capacitance_microstrip_f(3e-3, 8e-3, 1e-4, 3.5)) * 1e12
    assert _num(f, "capacitance_pf") == pytest.approx(expected, rel=1e-4)
    # Fringing adds, and less than the plate itself.
    assert 7.43752 < _num(f, "capacitance_pf") < 2 * 7.43752


def test_each_spot_couples_to_the_nearest_plane_below_it(tmp_path: Path) -> None:
    # L2 is cleared for x >= 18 under the 5 x 5 pour (15.5..20.5): 2.5 x 5 mm lies over L2
    # (0.1 mm), the other 2.5 x 5 mm over the L3 plane at 0.1 + 0.035 + 1.2 = 1.335 mm.
    report = _check(tmp_path, _board("snsplit", l2_clear=(18.0, 11.0, 22.0, 19.0), l3_plane=True))
    (f,) = _node(report)
    assert _num(f, "planes") == 2
    assert f.metrics["plane_layer"] == "L2"
    assert _num(f, "area_mm2") == pytest.approx(25.0, abs=1e-3)
    near = float(pad_capacitance_microstrip_f(2.5e-3, 5e-3, 0.1e-3, 4.3))
    far = float(pad_capacitance_microstrip_f(2.5e-3, 5e-3, 1.335e-3, 4.3))
    assert _num(f, "capacitance_pf") == pytest.approx((near + far) * 1e12, rel=1e-4)
    # Plate: ε0 εr 12.5 mm² (1/0.1 + 1/1.335 mm) = 4.75913 + 0.35649 = 5.11562 pF.
    assert _num(f, "plate_pf") == pytest.approx(5.11562, rel=1e-4)
    assert "layer L3" in f.message


def test_bottom_part_couples_to_the_layer_above(tmp_path: Path) -> None:
    report = _check(tmp_path, _board("snbot", side="bottom"))
    (f,) = _node(report)
    assert (f.layer, f.metrics["plane_layer"]) == ("L4", "L3")
    assert _num(f, "capacitance_pf") == pytest.approx(10.0164, rel=1e-4)


def test_operating_point_gives_loss_and_current(tmp_path: Path) -> None:
    config = _OP + "coss_f = 1e-9\nedge_time_s = 5e-9\n"
    report = _check(tmp_path, _board("snop", config=config))
    (f,) = _node(report)
    c_pf = _num(f, "capacitance_pf")
    assert c_pf == pytest.approx(10.0164, rel=1e-4)
    assert _num(f, "coss_pf") == pytest.approx(1000.0)
    assert f.metrics["coss_assumed"] is False
    assert _num(f, "ratio") == pytest.approx(c_pf / 1000.0, rel=1e-4)
    # Row 17 scaled to this capacitance: 0.731 mW and 24.4 mA per 10.15 pF.
    assert _num(f, "loss_mw") == pytest.approx(0.731 * c_pf / 10.15, rel=1e-3)
    assert _num(f, "current_ma") == pytest.approx(24.4 * c_pf / 10.15, rel=2e-3)
    assert _num(f, "edge_time_ns") == pytest.approx(5.0)
    assert "per hard-switched edge" in f.message
    # Everything stated: no switch-node assumption.
    assert not any("switch" in a for a in _assumed(report))


def test_operating_point_without_edge_time_assumes_5_ns(tmp_path: Path) -> None:
    report = _check(tmp_path, _board("snedge", config=_OP))
    (f,) = _node(report)
    assert _num(f, "edge_time_ns") == pytest.approx(5.0)
    assert _num(f, "current_ma") == pytest.approx(_num(f, "capacitance_pf") * 12 / 5, rel=1e-3)
    assumed = _assumed(report)
    assert any("edge time assumed 5 ns" in a and "edge_time_s" in a for a in assumed)
    assert any("500 pF" in a and "coss_f" in a for a in assumed)


def test_ratio_above_threshold_is_a_warning(tmp_path: Path) -> None:
    # 10.0 pF of 50 pF = 20 % > 10 %.
    config = _OP + "coss_f = 50e-12\n"
    board = _board("snwarn", config=config)
    (f,) = _node(_check(tmp_path, board))
    assert f.severity == "warning"
    assert _num(f, "ratio") == pytest.approx(0.2003, rel=1e-3)
    # A higher threshold makes it a note again; "off" removes it.
    raised = _board("snwarn2", config=config + "\n[thresholds]\nswitch_node_ratio_warning = 0.5\n")
    (g,) = _node(_check(tmp_path, raised))
    assert g.severity == "note"
    off = _board("snwarn3", config=config + '\n[severity]\nswitch-node-capacitance = "off"\n')
    assert _node(_check(tmp_path, off)) == []


def test_only_switch_nets_touching_a_pad_count(tmp_path: Path) -> None:
    # SW_B runs round the left pad (13..14 x 13.5..16.5): its box covers the pad, its
    # copper (x 11.5 +- 0.3, y 18 +- 0.3) stays 1.2 mm away.
    near_miss = Track(((11.5, 12.0), (11.5, 18.0), (14.5, 18.0)), 0.6, net="SW_B")
    (f,) = _node(_check(tmp_path, _board("snmiss2", extra=(near_miss,))))
    assert f.metrics["net"] == "SW"


def test_two_switch_nets_give_two_findings(tmp_path: Path) -> None:
    # A coupled-inductor-like part: the left pad's track is a switch node too (PH2).
    report = _check(tmp_path, _board("sntwo", vout_net="PH2"))
    got = {str(f.metrics["net"]): f for f in _node(report)}
    assert set(got) == {"SW", "PH2"}
    # PH2: the 1 x 3 mm pad (x 13..14) and the 0.6 mm track from x 14 to 5, of which x 5..13
    # lies outside the pad, plus its two round ends (the one at x 14 sticks out of the
    # pad's edge): 3 + 0.6 * 8 + π 0.3² = 8.083 mm² (by hand).
    assert _num(got["PH2"], "copper_area_mm2") == pytest.approx(8.083, rel=0.005)


def test_net_from_the_config(tmp_path: Path) -> None:
    config = _OP + 'switch_net = "node_a"\n'
    report = _check(tmp_path, _board("sncfg", net="NODE_A", config=config))
    (f,) = _node(report)
    assert (f.metrics["net"], f.metrics["evidence"]) == ("NODE_A", "config")
    assert _num(f, "capacitance_pf") == pytest.approx(10.0164, rel=1e-4)


def test_switch_net_without_operating_point(tmp_path: Path) -> None:
    # The rule alone: a regulator that names only the switch net gives capacitance and
    # ratio, no loss and no current.
    board = _board(
        "sncfg2", net="NODE_A", config='[[regulator]]\nparts = ["L1"]\nswitch_net = "NODE_A"\n'
    )
    write_package(board, tmp_path / board.name)
    loaded = fluxshadow.load_package(tmp_path / board.name)
    ctx = Context(board=loaded, settings=Settings())
    (m,) = loaded.magnetics
    findings = switch_node_capacitance(ctx, analyse_magnetic(loaded, m, ctx.settings))
    (f,) = [f for f in findings if f.rule == RULE_ID]
    assert f.metrics["evidence"] == "config"
    assert _num(f, "capacitance_pf") == pytest.approx(10.0164, rel=1e-4)
    assert (f.metrics["loss_mw"], f.metrics["current_ma"]) == (None, None)
    assert "no operating point" in f.message


def test_unrecognised_net_is_an_assumption(tmp_path: Path) -> None:
    report = _check(tmp_path, _board("snnone", net="NODE_A"))
    assert _node(report) == []
    (text,) = [a for a in _assumed(report) if "switch node not identified" in a]
    assert "NODE_A" in text
    assert "VOUT" in text
    assert 'switch_net = "..."' in text


def test_configured_net_missing_at_the_pads_is_an_assumption(tmp_path: Path) -> None:
    config = _OP + 'switch_net = "LX9"\n'
    report = _check(tmp_path, _board("snmiss", config=config))
    assert _node(report) == []
    (text,) = [a for a in _assumed(report) if "switch node not identified" in a]
    assert "'LX9' is not on the copper at the pads of inductor L1" in text


def test_files_without_net_names(tmp_path: Path) -> None:
    report = _check(tmp_path, _board("snbare", dialect="bare"))
    assert _node(report) == []
    (text,) = [a for a in _assumed(report) if "switch node not identified" in a]
    assert "no net names" in text


# ----------------------------------------------------------------------------- demo


def test_demo_gives_one_switch_node_per_regulator(tmp_path: Path) -> None:
    # The rule as the runner calls it, once per magnetic (the runner's physics figures
    # are not needed here).
    write_package(demo_board(), tmp_path / "demo")
    board = fluxshadow.load_package(tmp_path / "demo")
    ctx = Context(board=board, settings=Settings())
    made = [
        f
        for m in board.magnetics
        for f in switch_node_capacitance(ctx, analyse_magnetic(board, m, ctx.settings))
    ]
    got = {f.ref: f for f in made if f.rule == RULE_ID}
    assert len(got) == len([f for f in made if f.rule == RULE_ID])
    # The demo's switch-node tracks: SW_3V3, SW_5V, SW_1V8 on the inductors' right pads,
    # SW_12V on L4's left pad; the GND plane L2 lies 0.165 mm under the top layer.
    nets = {ref: f.metrics["net"] for ref, f in got.items()}
    assert nets == {"L1": "SW_3V3", "L2": "SW_5V", "L3": "SW_1V8", "L4": "SW_12V"}
    for f in got.values():
        assert f.metrics["plane_layer"] == "L2"
        assert _num(f, "distance_mm") == pytest.approx(0.165, abs=1e-9)
        # Every regulator has an operating point in the demo's configuration.
        assert _num(f, "loss_mw") > 0
        assert _num(f, "current_ma") > 0
        assert _num(f, "capacitance_pf") > _num(f, "plate_pf") > 0
    # L1: the 0.6 mm track 1.9 + 0.85 + 4.0 mm long (with round ends) and the 1.4 x 4 mm pad.
    track = 0.6 * (1.9 + 0.85 + 4.0) + math.pi * 0.3**2
    assert _num(got["L1"], "copper_area_mm2") == pytest.approx(track + 1.4 * 4.0, rel=0.02)


# ----------------------------------------------------------------------------- real board


def test_real_board_switch_nodes_from_net_names(realboard: Callable[[str], Path]) -> None:
    """ThunderScope rev 5.3: four 1 uH bucks whose switch nodes are named ``Net-(Un-SW)``
    in the X2 net attributes (SOURCE.md); the GND plane is the next layer down."""
    board = fluxshadow.load_package(realboard("thunderscope-rev5.3"))
    refs = set()
    for m in board.magnetics:
        search = find_switch_nodes(board, m, board.layers[0])
        (node,) = search.nodes
        refs.add(m.ref)
        assert re.fullmatch(r"Net-\(U\d+-SW\)", node.net)
        assert node.evidence == "net name"
        # A 1210 pad and a short pour: a few mm², never the other pad's whole rail.
        assert 2.0 < node.area_mm2 < 20.0
        cap = node_capacitance(board, node, board.layers[1:], opening_mm=0.5)
        main = cap.main
        assert main is not None
        assert main.layer == "L2"
        # Plate capacitance consistent with the overlap and the gap (ε0 εr A / d), and
        # the fringing adds to it.
        plate = EPS0 * main.epsilon_r * main.area_mm2 * 1e-6 / (main.distance_mm * 1e-3)
        assert main.plate_f == pytest.approx(plate, rel=1e-9)
        assert cap.capacitance_f > cap.plate_f
    assert refs == {"L2", "L3", "L4", "L5"}
