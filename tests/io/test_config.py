"""The fluxshadow.toml configuration (fluxshadow.io.config)."""

from __future__ import annotations

from pathlib import Path

import pytest

from fluxshadow.errors import ConfigError
from fluxshadow.io.config import (
    Config,
    PartConfig,
    StackupConfig,
    find_config,
    load_config,
    parse_config,
)

FULL = """
[layers]
"*.g2" = "copper:2"
"board-plane.gbr" = "copper:3, negative"
"notes.gbr" = "ignore"

[stackup]
copper_mm = [0.035, 0.0175, 0.0175, 0.035]
dielectric_mm = [0.2, 1.065, 0.2]
epsilon_r = [4.4, 4.6, 4.4]
board_thickness_mm = 1.6

[placement]
offset_x_mm = 98.34
offset_y_mm = -148.369
mirror_bottom = true
bottom_mirror_x_mm = 0.0
rotation_deg = 0

[[part]]
ref = "L2"
kind = "inductor"
body_mm = [5.0, 5.2]
height_mm = 3
construction = "Shielded"
axis = "vertical"
axis_angle_deg = 0
turns = 7.5
winding_radius_mm = 1.6
winding_bottom_mm = 0
winding_height_mm = 2.2

[[part]]
ref = "FB1"
kind = "exclude"

[[regulator]]
parts = ["L2", "U5"]
vin_v = 12
vout_v = 3.3
fsw_hz = 700e3
inductance_h = 3.3e-6
ripple_a = 0.9

[thresholds]
coverage_min = 0.9
induced_mv_max = 50

[severity]
plane-void = "warning"
exposed-trace = "off"

[[waiver]]
rule = "plane-void"
ref = "L3"
layer = 3
reason = "keep-out required by the antenna"
"""


def test_full_config() -> None:
    cfg = parse_config(FULL, source="fluxshadow.toml")
    assert cfg.source == "fluxshadow.toml"
    assert cfg.layers == {
        "*.g2": "copper:2",
        "board-plane.gbr": "copper:3, negative",
        "notes.gbr": "ignore",
    }
    assert cfg.stackup == StackupConfig(
        copper_mm=(0.035, 0.0175, 0.0175, 0.035),
        dielectric_mm=(0.2, 1.065, 0.2),
        epsilon_r=(4.4, 4.6, 4.4),
        board_thickness_mm=1.6,
    )
    assert cfg.placement.offset_x_mm == pytest.approx(98.34)
    assert cfg.placement.mirror_bottom is True
    assert cfg.placement.rotation_deg == 0.0
    assert cfg.parts[0] == PartConfig(
        ref="L2",
        kind="inductor",
        body_mm=(5.0, 5.2),
        height_mm=3.0,
        construction="shielded",
        axis="vertical",
        axis_angle_deg=0.0,
        turns=7.5,
        winding_radius_mm=1.6,
        winding_bottom_mm=0.0,
        winding_height_mm=2.2,
    )
    assert cfg.parts[1] == PartConfig(ref="FB1", kind="exclude")
    reg = cfg.regulators[0]
    assert reg.parts == ("L2", "U5")
    assert (reg.vin_v, reg.vout_v, reg.fsw_hz) == (12.0, 3.3, 700e3)
    assert reg.inductance_h == pytest.approx(3.3e-6)
    assert cfg.thresholds == {"coverage_min": 0.9, "induced_mv_max": 50.0}
    assert cfg.severity == {"plane-void": "warning", "exposed-trace": "off"}
    assert cfg.waivers[0].layer == "L3"  # a bare number names that copper layer
    assert cfg.waivers[0].reason.startswith("keep-out")


def test_empty_config() -> None:
    cfg = parse_config("", source="x.toml")
    assert cfg == Config(source="x.toml")
    assert cfg.stackup.is_empty
    assert cfg.placement.offset_x_mm is None


def test_epsilon_scalar_and_single_entries() -> None:
    cfg = parse_config("[stackup]\nepsilon_r = 4.3\ncopper_mm = [0.07]\ndielectric_mm = [0.1]\n")
    assert cfg.stackup.epsilon_r == (4.3,)
    assert cfg.stackup.copper_mm == (0.07,)


@pytest.mark.parametrize(
    ("text", "message"),
    [
        (
            "[[part]]\nref = 'L1'\n[[part]]\nref = 'L2'\nheight_mm = -1\n",
            "cfg.toml: part[2].height_mm must be a positive number; got -1",
        ),
        ("colour = 'red'\n", "cfg.toml: top-level keys must be among layers, stackup"),
        ("[stackup]\ncopper = [0.035]\n", "cfg.toml: stackup keys must be among copper_mm"),
        ("[[part]]\nref = 'L1'\nsize = 3\n", "cfg.toml: part[1] keys must be among ref, kind"),
        ("[[part]]\nkind = 'inductor'\n", "cfg.toml: part[1].ref must be given"),
        ("[[part]]\nref = 'L1'\nkind = 'resistor'\n", "part[1].kind must be one of inductor"),
        ("[[part]]\nref = 'L1'\nbody_mm = [1, 2, 3]\n", "part[1].body_mm must be [width, length]"),
        (
            "[[part]]\nref = 'L1'\nturns = true\n",
            "part[1].turns must be a finite number; got true",
        ),
        ("[[part]]\nref = 'L1'\nconstruction = 'potted'\n", "part[1].construction must be one of"),
        ("[[part]]\nref = 'L1'\naxis = 'z'\n", "part[1].axis must be one of vertical, horizontal"),
        (
            "[[part]]\nref = 'L1'\nwinding_bottom_mm = '0.1 mm'\n",
            "part[1].winding_bottom_mm must be a finite number; got '0.1 mm'",
        ),
        ("[[part]]\nref = 'L1'\nturns = inf\n", "part[1].turns must be a finite number; got inf"),
        ("[[part]]\nref = 'L1'\n[[part]]\nref = 'l1'\n", "part[2].ref must be unique"),
        ("[part]\nref = 'L1'\n", "part must be an array of tables ([[part]]); got a single table"),
        ("[[regulator]]\nvin_v = 5\n", "regulator[1].parts must be given"),
        ("[[regulator]]\nparts = []\n", "regulator[1].parts must be a non-empty list"),
        ("[[regulator]]\nparts = ['L1']\nfsw_hz = nan\n", "regulator[1].fsw_hz must be a finite"),
        ("[[regulator]]\nparts = ['L1']\nvin_v = '5V'\n", "regulator[1].vin_v must be a finite"),
        ("[[regulator]]\nparts = ['L1']\nvout_v = true\n", "regulator[1].vout_v must be a finite"),
        ("[severity]\nplane-void = 'fatal'\n", "severity.plane-void must be one of error, warning"),
        ("[thresholds]\ncoverage = 'high'\n", "thresholds.coverage must be a finite number"),
        ("[thresholds]\ncoverage = nan\n", "thresholds.coverage must be a finite number"),
        (
            "[[waiver]]\nrule = 'plane-void'\nref = 'L1'\nlayer = 'L2'\n",
            "waiver[1].reason must be given",
        ),
        (
            "[[waiver]]\nrule = 'plane-void'\nref = 'L1'\nlayer = 'L2'\nreason = ' '\n",
            "waiver[1].reason must be a non-empty string",
        ),
        ("[layers]\n'a.gbr' = 'copper'\n", 'layers."a.gbr": copper layer spec must say where'),
        ("[layers]\n'*.g2' = 2\n", "must be a layer spec string"),
        ("[stackup]\ncopper_mm = 0.035\n", "stackup.copper_mm must be a list of numbers"),
        ("[stackup]\ncopper_mm = [0.035, 0]\n", r"stackup.copper_mm[1] must be a positive"),
        ("[stackup]\nepsilon_r = 0.5\n", "stackup.epsilon_r must be a number >= 1"),
        (
            "[stackup]\ncopper_mm = [0.035, 0.035, 0.035]\ndielectric_mm = [0.2, 0.2, 0.2]\n",
            "stackup.dielectric_mm must have 2 entries",
        ),
        (
            "[stackup]\ndielectric_mm = [0.2, 0.2]\nepsilon_r = [4, 4, 4]\n",
            "stackup.epsilon_r must have 1 or 2 entries",
        ),
        ("[placement]\nmirror_bottom = 'yes'\n", "placement.mirror_bottom must be true or false"),
        ("[placement]\noffset_x_mm = 'left'\n", "placement.offset_x_mm must be a finite number"),
        ("stackup = 3\n", "stackup must be a table; got 3"),
    ],
)
def test_errors_name_key_path_and_file(text: str, message: str) -> None:
    with pytest.raises(ConfigError) as err:
        parse_config(text, source="cfg.toml")
    assert message in str(err.value)
    assert str(err.value).startswith("cfg.toml: ")


def test_exact_message_shape() -> None:
    text = "[[part]]\nref = 'L1'\n[[part]]\nref = 'L2'\nheight_mm = -1\n"
    with pytest.raises(ConfigError) as err:
        parse_config(text, source="fluxshadow.toml")
    assert str(err.value) == "fluxshadow.toml: part[2].height_mm must be a positive number; got -1"


def test_physics_values_that_make_no_sense_still_load() -> None:
    # Checked by ``check`` against the part and the buck stage, which reports them naming
    # the key and falls back to its defaults (tests/checks/test_operating.py,
    # tests/cli/test_check_bad_physics.py); here only the type is checked.
    text = (
        "[[part]]\nref = 'L2'\nturns = -3\nwinding_radius_mm = -1\nwinding_bottom_mm = -0.1\n"
        "winding_height_mm = 0\n"
        "[[regulator]]\nparts = ['L2']\nvin_v = 5\nvout_v = 12\nfsw_hz = 0\n"
        "inductance_h = -1e-6\nripple_a = -0.5\n"
    )
    cfg = parse_config(text, source="cfg.toml")
    (part,) = cfg.parts
    assert (part.turns, part.winding_radius_mm) == (-3.0, -1.0)
    assert (part.winding_bottom_mm, part.winding_height_mm) == (-0.1, 0.0)
    (reg,) = cfg.regulators
    assert (reg.vin_v, reg.vout_v, reg.fsw_hz) == (5.0, 12.0, 0.0)
    assert (reg.inductance_h, reg.ripple_a) == (-1e-6, -0.5)


def test_toml_syntax_error() -> None:
    with pytest.raises(
        ConfigError, match=r"cfg.toml: configuration must be valid TOML; got .*line 2"
    ):
        parse_config("[stackup]\ncopper_mm = [0.035,,]\n", source="cfg.toml")


def test_load_config_file(tmp_path: Path) -> None:
    p = tmp_path / "fluxshadow.toml"
    p.write_text("[severity]\nvoid-ring = 'note'\n", encoding="utf-8")
    cfg = load_config(p)
    assert cfg.source == str(p)
    assert cfg.severity == {"void-ring": "note"}
    bad = tmp_path / "bad.toml"
    bad.write_text("[[waiver]]\nrule = 1\n")
    with pytest.raises(ConfigError, match=rf"^{bad}: waiver\[1\]"):
        load_config(bad)
    with pytest.raises(ConfigError, match="readable"):
        load_config(tmp_path / "missing.toml")
    latin = tmp_path / "latin.toml"
    latin.write_bytes(b"[thresholds]\n# caf\xe9\n")
    with pytest.raises(ConfigError, match="UTF-8"):
        load_config(latin)


def test_find_config(tmp_path: Path) -> None:
    pkg = tmp_path / "boards" / "pkg"
    (pkg / "gerbers" / "deep").mkdir(parents=True)
    assert find_config(pkg) is None
    beside = tmp_path / "boards" / "fluxshadow.toml"
    beside.write_text("")
    assert find_config(pkg) == beside
    deep = pkg / "gerbers" / "deep" / "fluxshadow.toml"
    deep.write_text("")
    assert find_config(pkg) == deep
    shallow = pkg / "gerbers" / "fluxshadow.toml"
    shallow.write_text("")
    assert find_config(pkg) == shallow
    inside = pkg / "fluxshadow.toml"
    inside.write_text("")
    assert find_config(pkg) == inside
    archive = tmp_path / "boards" / "pkg.zip"
    archive.write_bytes(b"PK\x05\x06" + bytes(18))
    assert find_config(archive) == beside


# ----------------------------------------------------------------------------- switch node


def test_regulator_switch_node_keys() -> None:
    text = (
        "[[regulator]]\nparts = ['L1']\nswitch_net = ' SW_3V3 '\ncoss_f = 450e-12\n"
        "edge_time_s = 4e-9\n"
    )
    (reg,) = parse_config(text).regulators
    assert reg.switch_net == "SW_3V3"
    assert reg.coss_f == pytest.approx(450e-12)
    assert reg.edge_time_s == pytest.approx(4e-9)
    # All optional: a regulator without them leaves them unset.
    (plain,) = parse_config("[[regulator]]\nparts = ['L1']\n").regulators
    assert (plain.switch_net, plain.coss_f, plain.edge_time_s) == (None, None, None)


@pytest.mark.parametrize(
    ("line", "message"),
    [
        ("switch_net = ''", "regulator[1].switch_net must be a non-empty string; got ''"),
        ("switch_net = 3", "regulator[1].switch_net must be a non-empty string; got 3"),
        ("coss_f = -1e-9", "regulator[1].coss_f must be a positive number; got -1e-09"),
        ("coss_f = 'big'", "regulator[1].coss_f must be a positive number"),
        # A value in pF or nF instead of F is caught by the plausible range.
        ("coss_f = 500", "regulator[1].coss_f must be in farads, between 1e-13 and 1e-06; got 500"),
        ("coss_f = 1e-15", "regulator[1].coss_f must be in farads"),
        ("edge_time_s = 0", "regulator[1].edge_time_s must be a positive number; got 0"),
        ("edge_time_s = 5", "regulator[1].edge_time_s must be in seconds, between 1e-11 and"),
        ("coss = 1e-9", "regulator[1] keys must be among parts, vin_v"),
    ],
)
def test_regulator_switch_node_key_errors(line: str, message: str) -> None:
    with pytest.raises(ConfigError) as err:
        parse_config(f"[[regulator]]\nparts = ['L1']\n{line}\n", source="cfg.toml")
    assert message in str(err.value)
    assert str(err.value).startswith("cfg.toml: ")
