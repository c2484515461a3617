"""Magnetics identification rules and body outlines, on rows built in the test.

Chip-size tables are EIA/IEC chip dimensions (common practice): 0402 = 1.0 x 0.5 mm,
0603 = 1.6 x 0.8, 0805 = 2.0 x 1.25, 0806 = 2.0 x 1.6, 1210 = 3.2 x 2.5, 1812 = 4.5 x 3.2;
metric codes give length and width in 0.1 mm (3225 = 3.2 x 2.5).
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from fluxshadow.board.magnetics import (
    PartOverride,
    body_outline,
    identify_magnetics,
    package_body,
    parse_inductance,
)
from fluxshadow.errors import ConfigError, InputError
from fluxshadow.io.records import PlacementRow


def _row(
    ref: str,
    value: str = "",
    package: str = "",
    description: str = "",
    *,
    x: float = 10.0,
    y: float = 20.0,
    rot: float = 0.0,
    side: str = "top",
) -> PlacementRow:
    return PlacementRow(
        ref=ref,
        value=value,
        package=package,
        x_mm=x,
        y_mm=y,
        rotation_deg=rot,
        side=side,  # type: ignore[arg-type]
        source="pnp.csv",
        line=7,
        description=description,
    )


def _one(row: PlacementRow, **kwargs: object) -> tuple[list[str], list[str]]:
    """Included refs and exclusion reasons for one row."""
    res = identify_magnetics([row], **kwargs)  # type: ignore[arg-type]
    return [m.ref for m in res.magnetics], [e.reason for e in res.excluded]


# ----------------------------------------------------------------------------- values


@pytest.mark.parametrize(
    ("text", "rkm", "henry"),
    [
        ("2.2uH", True, 2.2e-6),
        ("4.7µH", False, 4.7e-6),  # micro sign U+00B5
        ("4.7μH", False, 4.7e-6),  # Greek mu U+03BC
        ("0.47uH, 4A", False, 0.47e-6),
        ("470nH", False, 470e-9),
        ("33uH 20%", False, 33e-6),
        ("10 nH, 5%", False, 10e-9),
        ("3.3 uH", False, 3.3e-6),
        ("10UH", False, 10e-6),
        ("1mH", False, 1e-3),
        ("2u2", True, 2.2e-6),
        ("22u", True, 22e-6),
        ("100n", True, 100e-9),
        ("1R0", True, 1.0e-6),
        ("4R7", True, 4.7e-6),
        ("R47", True, 0.47e-6),
        ("2u2", False, None),
        ("1R0", False, None),
        ("600R", True, None),
        ("120@100MHZ", True, None),
        ("MR25H40MDF", False, None),  # a part number, not 25 H
        ("10", True, None),
        ("", True, None),
        ("DNP", True, None),
    ],
)
def test_parse_inductance(text: str, rkm: bool, henry: float | None) -> None:
    got = parse_inductance(text, rkm=rkm)
    if henry is None:
        assert got is None
    else:
        assert got == pytest.approx(henry, rel=1e-12)


# ----------------------------------------------------------------------------- rules


def test_power_inductor_included_with_value_and_package_body() -> None:
    res = identify_magnetics([_row("L1", "2.2uH", "IND-SMD_L7.0-W6.6_MCW-0650-220")])
    (m,) = res.magnetics
    assert (m.kind, m.value_h, m.body_mm, m.body_from) == (
        "inductor",
        pytest.approx(2.2e-6),
        (7.0, 6.6),
        "package dimensions",
    )
    assert m.assumptions == ()
    assert any("'L'" in r for r in m.reasons)
    assert (m.source, m.line, m.side) == ("pnp.csv", 7, "top")


@pytest.mark.parametrize("ref", ["LED1", "LD2", "LS1", "C5", "R3", "U7", "J9"])
def test_non_magnetic_designators_are_ignored(ref: str) -> None:
    assert _one(_row(ref, "10k", "R_0603_1608Metric")) == ([], [])


@pytest.mark.parametrize(
    ("row", "reason"),
    [
        (_row("FB1", "120@100MHZ", "GEN_R_0402"), "ferrite bead (designator prefix 'FB')"),
        (_row("FB2", "1R0", "0603"), "ferrite bead (designator prefix 'FB')"),
        (_row("BEAD3", "", ""), "ferrite bead (designator prefix 'BEAD')"),
        (_row("L4", "600R@100MHz", "0603"), "ferrite bead (value '600R@100MHz' is an impedance"),
        (_row("L5", "600R", "0805"), "ferrite bead (value '600R' is an impedance"),
        (_row("L6", "220Ω", "0805"), "ferrite bead (value '220Ω' is an impedance"),
        (_row("L7", "BLM18", "0603", "Ferrite Bead 600 Ohm"), "ferrite bead (text 'Ferrite')"),
        (_row("R91", "120@100MHZ", "GEN_R_0402", "Power Line Ferrite Bead"), "ferrite bead"),
    ],
)
def test_ferrite_beads_are_excluded(row: PlacementRow, reason: str) -> None:
    included, reasons = _one(row)
    assert included == []
    assert len(reasons) == 1
    assert reasons[0].startswith(reason)


def test_rkm_value_on_an_inductor_is_microhenries() -> None:
    (m,) = identify_magnetics([_row("L1", "1R0", "L_1210")]).magnetics
    assert m.value_h == pytest.approx(1.0e-6)


def test_ferrite_core_inductor_is_not_a_bead() -> None:
    res = identify_magnetics([_row("L1", "10uH", "", "Shielded ferrite core power inductor")])
    assert [m.ref for m in res.magnetics] == ["L1"]


@pytest.mark.parametrize(
    ("row", "reason"),
    [
        (_row("L1", "47nH", "RES0402"), "RF coil (value 47 nH < 100 nH)"),
        (
            _row("L2", "0.47uH", "L_0402_1005Metric"),
            "RF coil (470 nH in a 1005Metric chip package)",
        ),
        (_row("L3", "820nH", "0603"), "RF coil (820 nH in a 0603 chip package)"),
        (_row("L4", "2.2uH", "0805", "RF choke"), "RF part (text 'RF')"),
        (_row("T1", "3600BL14M050", "3600BL14M050_balun_0603"), "RF balun (text 'balun')"),
    ],
)
def test_rf_parts_are_excluded(row: PlacementRow, reason: str) -> None:
    assert _one(row) == ([], [reason])


@pytest.mark.parametrize(
    ("value", "package"),
    [("0.47uH, 4A", "IND0806"), ("1uH", "0603"), ("10uH", "L_0805_2012Metric"), ("100nH", "1210")],
)
def test_power_sized_small_inductors_are_kept(value: str, package: str) -> None:
    assert _one(_row("L2", value, package))[0] == ["L2"]


@pytest.mark.parametrize(
    ("row", "kind"),
    [
        (_row("T1", "750311880", "", "Flyback transformer"), "transformer"),
        (_row("T2", "", "Transformer_SMD_EP7"), "transformer"),
        (_row("TR1", "100uH", "EE13"), "transformer"),
        (_row("XFMR1", "", ""), "transformer"),
        (_row("L3", "", "", "Gate drive transformer"), "transformer"),
        (_row("L1", "", "", "Common mode choke 2x47uH"), "choke"),
        (_row("CMC1", "90R@100MHz", "0805"), "choke"),  # common-mode impedance, not a bead
        (_row("LF1", "", ""), "choke"),
        (_row("L9", "22uH", "", "Power choke"), "choke"),
    ],
)
def test_transformers_and_chokes(row: PlacementRow, kind: str) -> None:
    (m,) = identify_magnetics([row]).magnetics
    assert m.kind == kind


def test_t_designator_without_evidence_is_excluded() -> None:
    included, reasons = _one(_row("T3", "TC1-1-13M-45+", "TC1-1-13MA+_JA4220-AL_"))
    assert included == []
    assert reasons[0].startswith("designator prefix 'T' without transformer text")


@pytest.mark.parametrize(
    ("row", "token"),
    [
        (_row("L1", "DNP", "L_1210"), "DNP"),
        (_row("L2", "NC", ""), "NC"),
        (_row("L3", "10uH DNF", ""), "DNF"),
        (_row("L4", "10uH", "", "do not populate"), "do not populate"),
        (_row("L5", "4.7uH", "", "Not fitted"), "Not fitted"),
    ],
)
def test_unpopulated_parts_are_excluded(row: PlacementRow, token: str) -> None:
    assert _one(row) == ([], [f"not fitted ({token!r})"])


def test_l_without_value_or_package_is_included_with_assumption() -> None:
    (m,) = identify_magnetics([_row("L1")]).magnetics
    assert m.kind == "inductor"
    assert m.value_h is None
    assert "value unknown" in m.assumptions
    assert m.body_from == "default"
    assert m.body_mm == (5.0, 5.0)
    assert any("assumed" in a for a in m.assumptions)
    assert set(m.assumptions) <= set(m.reasons)


def test_inductance_on_other_designator_is_excluded_with_hint() -> None:
    included, reasons = _one(_row("MN16", "100uH", "RES0805"))
    assert included == []
    assert reasons == [
        (
            "designator prefix 'MN' is not a magnetic one (value 100 µH); "
            "configure the part to include it"
        )
    ]


def test_inductor_text_on_other_designator_is_excluded_with_hint() -> None:
    included, reasons = _one(_row("U5", "XAL4020", "", "Shielded power inductor"))
    assert included == []
    assert reasons[0].startswith("designator prefix 'U' is not a magnetic one (text 'inductor')")


def test_relay_coil_text_does_not_make_a_candidate() -> None:
    assert _one(_row("K1", "UD2-4.5NUN-L", "", "Relay coil 4.5 V")) == ([], [])


# ----------------------------------------------------------------------------- overrides


def test_override_includes_a_bead_and_sets_body_and_height() -> None:
    ov = PartOverride(ref="FB1", kind="choke", body_mm=(3.0, 2.0), height_mm=1.2)
    res = identify_magnetics([_row("FB1", "600R@100MHz", "0603")], overrides=[ov])
    (m,) = res.magnetics
    assert (m.kind, m.body_mm, m.height_mm, m.body_from) == ("choke", (3.0, 2.0), 1.2, "config")
    assert any("included although ferrite bead" in r for r in m.reasons)
    assert res.excluded == ()


def test_override_excludes_and_mapping_form_works() -> None:
    res = identify_magnetics(
        [_row("L1", "10uH"), _row("L2", "10uH")],
        overrides={"L1": PartOverride(ref="L1", kind="exclude")},
    )
    assert [m.ref for m in res.magnetics] == ["L2"]
    assert [(e.ref, e.reason) for e in res.excluded] == [("L1", "excluded by configuration")]


def test_override_body_only_keeps_automatic_kind() -> None:
    ov = PartOverride(ref="L1", body_mm=(8.0, 8.0))
    (m,) = identify_magnetics([_row("L1", "10uH", "L_1210")], overrides=[ov]).magnetics
    assert (m.kind, m.body_mm, m.body_from) == ("inductor", (8.0, 8.0), "config")


def test_override_notices_for_missing_and_excluded_parts() -> None:
    res = identify_magnetics(
        [_row("FB1", "600R", "0603")],
        overrides=[
            PartOverride(ref="L99", kind="inductor"),
            PartOverride(ref="FB1", body_mm=(2.0, 1.0)),
        ],
    )
    messages = [n.message for n in res.notices]
    assert any("'L99', which is not in the placement" in m for m in messages)
    assert any("gives a body for FB1, but it is excluded" in m for m in messages)
    assert [e.ref for e in res.excluded] == ["FB1"]


@pytest.mark.parametrize(
    ("overrides", "match"),
    [
        ([PartOverride(ref="L1"), PartOverride(ref="L1")], "refs must be unique; got 'L1' twice"),
        ([PartOverride(ref="L1", kind="bead")], "part kind must be one of"),  # type: ignore[arg-type]
        ([PartOverride(ref="L1", body_mm=(0.0, 2.0))], "body_mm must be two positive lengths"),
        ([PartOverride(ref="L1", height_mm=-1.0)], "height_mm must be a positive length"),
        ({"L2": PartOverride(ref="L1")}, "key must equal its ref"),
    ],
)
def test_bad_overrides_raise_config_error(overrides: object, match: str) -> None:
    with pytest.raises(ConfigError, match=match):
        identify_magnetics([_row("L1", "10uH")], overrides=overrides)  # type: ignore[arg-type]


# ----------------------------------------------------------------------------- bodies


@pytest.mark.parametrize(
    ("package", "expected"),
    [
        ("IND-SMD_L7.0-W6.6_MCW-0650-220", (7.0, 6.6, None, "package dimensions")),
        ("L_Bourns-SRN8040_8x8.15mm", (8.0, 8.15, None, "package dimensions")),
        ("L_7.3x7.3_H4.5", (7.3, 7.3, 4.5, "package dimensions")),
        ("6x6", (6.0, 6.0, None, "package dimensions")),
        ("7.0X6.6mm", (7.0, 6.6, None, "package dimensions")),
        ("IND_5.0x5.0x4.0", (5.0, 5.0, 4.0, "package dimensions")),
        ("L_1210_3225Metric", (3.2, 2.5, None, "package code")),
        ("L_0805_2012Metric_Pad1.15x1.40mm_HandSolder", (2.0, 1.25, None, "package code")),
        ("IND0806", (2.0, 1.6, None, "package code")),
        ("GEN_L_1210", (3.2, 2.5, None, "package code")),
        ("RES0402", (1.0, 0.5, None, "package code")),
        ("L_1812_4532Metric", (4.5, 3.2, None, "package code")),
        ("2520", (2.5, 2.0, None, "package code")),
        ("L_Taiyo-Yuden_NR-60xx_HandSoldering", (6.0, 6.0, None, "package code")),
        ("NR6028", (6.0, 6.0, 2.8, "package code")),
        ("SRN4018", (4.0, 4.0, 1.8, "package code")),
    ],
)
def test_package_body(package: str, expected: tuple[object, ...]) -> None:
    got = package_body(package)
    assert got is not None
    w, h, height, body_from, _matched = got
    assert (w, h, height, body_from) == pytest.approx(expected)  # type: ignore[comparison-overlap]


@pytest.mark.parametrize("package", ["L_2141", "L_2510", "", "SOT-23-6", "TC1-1-13MA+"])
def test_package_without_size(package: str) -> None:
    assert package_body(package) is None


def test_body_from_description_metric_code() -> None:
    row = _row("L2", "1uH", "GEN_L_X", "1 µH Shielded Inductor 5.5 A 1210 (3225 Metric)")
    (m,) = identify_magnetics([row]).magnetics
    assert (m.body_mm, m.body_from) == ((3.2, 2.5), "package code")


def _shoelace(ring: np.ndarray) -> float:
    x, y = ring[:, 0], ring[:, 1]
    return 0.5 * float(np.sum(x[:-1] * y[1:] - x[1:] * y[:-1]))


def test_outline_is_closed_rotated_rectangle() -> None:
    ring = body_outline(10.0, 20.0, 7.0, 6.6, 90.0)
    assert ring.shape == (5, 2)
    assert np.array_equal(ring[0], ring[-1])
    assert _shoelace(ring) == pytest.approx(7.0 * 6.6)  # counter-clockwise, full area
    assert ring[:, 0].max() - ring[:, 0].min() == pytest.approx(6.6)
    assert ring[:, 1].max() - ring[:, 1].min() == pytest.approx(7.0)
    assert ring[:-1].mean(axis=0) == pytest.approx([10.0, 20.0])
    diag = body_outline(0.0, 0.0, 2.0, 2.0, 45.0)
    assert np.abs(diag[:-1]).max() == pytest.approx(math.sqrt(2.0))


def test_magnetic_outline_follows_rotation() -> None:
    (m,) = identify_magnetics([_row("L1", "1uH", "GEN_L_1210", rot=-90.0)]).magnetics
    assert np.ptp(m.outline[:, 0]) == pytest.approx(2.5)
    assert np.ptp(m.outline[:, 1]) == pytest.approx(3.2)


def test_body_from_pad_centres_assumes_square_body() -> None:
    # two pads 3.6 mm apart along the part's local X, part rotated 270 degrees
    pads = np.array([[56.4769, 60.7441 + 1.8], [56.4769, 60.7441 - 1.8]])
    row = _row("L2", "3.3uH", "L_2141", x=56.4769, y=60.7441, rot=270.0)
    (m,) = identify_magnetics([row], pads_by_ref={"L2": pads}).magnetics
    assert m.body_from == "pads"
    assert m.body_mm == pytest.approx((1.3 * 3.6, 1.3 * 3.6))
    assert any("square body assumed" in r for r in m.reasons)
    assert m.assumptions == ()


def test_body_from_pad_boxes() -> None:
    shift = np.array([10.0, 20.0, 10.0, 20.0])
    boxes = np.array([[-2.0, -1.5, -1.0, 1.5], [1.0, -1.5, 2.0, 1.5]]) + shift
    (m,) = identify_magnetics([_row("L1", "4.7uH", "")], pads_by_ref={"L1": boxes}).magnetics
    assert m.body_from == "pads"
    assert m.body_mm == pytest.approx((4.2, 3.2))


def test_package_size_wins_over_pads() -> None:
    pads = np.array([[8.0, 20.0], [12.0, 20.0]])
    (m,) = identify_magnetics([_row("L1", "1uH", "1210")], pads_by_ref={"L1": pads}).magnetics
    assert m.body_from == "package code"


def test_bad_pad_array_raises_input_error() -> None:
    with pytest.raises(InputError, match=r"pads_by_ref\['L1'\] must be an \(n, 2\) array"):
        identify_magnetics([_row("L1", "1uH")], pads_by_ref={"L1": np.zeros((2, 3))})


@pytest.mark.parametrize(
    ("row", "side_mm"),
    [
        (_row("L1", "0.47uH"), 4.0),
        (_row("L1", "3.3uH"), 5.0),
        (_row("L1", "22uH"), 6.0),
        (_row("L1", "47uH"), 8.0),
        (_row("L1", "330uH"), 10.0),
        (_row("T1", "", "", "transformer"), 10.0),
        (_row("CMC1"), 6.0),
    ],
)
def test_default_body_by_value(row: PlacementRow, side_mm: float) -> None:
    (m,) = identify_magnetics([row]).magnetics
    assert m.body_from == "default"
    assert m.body_mm == (side_mm, side_mm)


def test_row_order_is_kept_and_by_ref_finds_parts() -> None:
    rows = [_row("L3", "1uH"), _row("FB1", "600R"), _row("L1", "2.2uH"), _row("C1", "1uF")]
    res = identify_magnetics(rows)
    assert [m.ref for m in res.magnetics] == ["L3", "L1"]
    found = res.by_ref("L1")
    assert found is not None
    assert found.value_h == pytest.approx(2.2e-6)
    assert res.by_ref("C1") is None
