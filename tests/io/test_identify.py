"""Layer identification and copper ordering (fluxshadow.io.identify).

Real-board expectations come from each board's SOURCE.md ("Copper layers (top -> bottom)"
and the file tables); synthetic cases exercise each precedence step. File-function values
follow the standard file attribute .FileFunction of the Gerber Layer Format Specification;
the three-letter extension conventions (.GTL/.GBL/.Gn/.GPn/.GKO/.GMn/...) are common
practice.
"""

from __future__ import annotations

import itertools
import re
from collections.abc import Callable
from pathlib import Path

import pytest

from fluxshadow.errors import ConfigError
from fluxshadow.io.identify import (
    IDENTIFIED_BY,
    LayerIdentity,
    identify_layer,
    match_layer_spec,
    order_copper_layers,
    parse_file_function,
    parse_layer_spec,
)

# --------------------------------------------------------------------------- helpers


def _header(path: Path) -> tuple[dict[str, str], list[str]] | None:
    """Test-only reader: %TF attributes and G04 comments of the first 200 lines.

    Returns ``None`` when the file does not start like a Gerber file.
    """
    attrs: dict[str, str] = {}
    comments: list[str] = []
    with path.open("rb") as f:
        lines = [raw.decode("latin-1").strip() for _, raw in zip(range(200), f, strict=False)]
    if not any(ln.startswith(("G04", "%")) for ln in lines[:5]):
        return None
    for line in lines:
        m = re.match(r"^%TF\.?([^,*]+),?([^*]*)\*%", line)
        if m:
            attrs[m.group(1)] = m.group(2)
        if line.startswith("G04"):
            comments.append(line)
    return attrs, comments


def _identify_board(folder: Path) -> dict[str, LayerIdentity]:
    out: dict[str, LayerIdentity] = {}
    for p in sorted(folder.rglob("*")):
        if not p.is_file() or p.name == "SOURCE.md":
            continue
        head = _header(p)
        if head is None:
            continue
        rel = p.relative_to(folder).as_posix()
        out[rel] = identify_layer(rel, file_attributes=head[0], comments=head[1])
    return out


def _ident(file: str, **kw: object) -> LayerIdentity:
    return identify_layer(file, **kw)  # type: ignore[arg-type]


# --------------------------------------------------------------------------- real boards

# Copper order exactly as each SOURCE.md "Copper layers (top -> bottom)" section gives it.
COPPER_ORDER = {
    "bq25798-mppt-v2.1": ["Gerber_TopLayer.GTL", "Gerber_BottomLayer.GBL"],
    "cheap-focer-2": [
        "Cheap FOCer 2 60mm-Top_Signal.gbr",
        "Cheap FOCer 2 60mm-Bottom_Signal.gbr",
    ],
    "huvud-tiny2": ["Huvud-F_Cu.gtl", "Huvud-In1_Cu.g2", "Huvud-In2_Cu.g3", "Huvud-B_Cu.gbl"],
    "incunest-motherboard": [
        "Motherboard.GTL",
        "Motherboard.G1",
        "Motherboard.G2",
        "Motherboard.GBL",
    ],
    "limesdr-xtrx-1v1": [
        "LimeSDR-XTRX_1v1.GTL",
        "LimeSDR-XTRX_1v1.G1",
        "LimeSDR-XTRX_1v1.G2",
        "LimeSDR-XTRX_1v1.G3",
        "LimeSDR-XTRX_1v1.G4",
        "LimeSDR-XTRX_1v1.G5",
        "LimeSDR-XTRX_1v1.G6",
        "LimeSDR-XTRX_1v1.GBL",
    ],
    "pycubed-mainboard-v05": [
        "gerbers/mainboard-F_Cu.gtl",
        "gerbers/mainboard-Route2.g2",
        "gerbers/mainboard-Route15.g3",
        "gerbers/mainboard-B_Cu.gbl",
    ],
    "thunderscope-rev5.3": [
        "Thunderscope_Rev5.3-Top Layer.gtl",
        "Thunderscope_Rev5.3-Int1 (GND).g1",
        "Thunderscope_Rev5.3-Int2 (Sign).g2",
        "Thunderscope_Rev5.3-Int3 (Sign).g3",
        "Thunderscope_Rev5.3-Int4 (GND).g4",
        "Thunderscope_Rev5.3-Bottom Layer.gbl",
    ],
}

# How each board's copper is identified (SOURCE.md "Oddities" sections).
COPPER_EVIDENCE = {
    "bq25798-mppt-v2.1": "layer-comment",  # only "G04 Layer: TopLayer*" and the name
    "cheap-focer-2": "x2-comment",
    "huvud-tiny2": "x2-comment",
    "incunest-motherboard": "physical-order-comment",
    "limesdr-xtrx-1v1": "physical-order-comment",
    "pycubed-mainboard-v05": "x2-comment",
    "thunderscope-rev5.3": "x2-attribute",
}

# Non-copper files and what they are (SOURCE.md file tables and notes).
NOT_COPPER = {
    "bq25798-mppt-v2.1": {
        "Gerber_BoardOutlineLayer.GKO": "outline",
        "Gerber_DocumentLayer.GDL": "mechanical",
        "Gerber_TopSolderMaskLayer.GTS": "soldermask",
        "Gerber_TopPasteMaskLayer.GTP": "paste",
        "Gerber_BottomSilkscreenLayer.GBO": "legend",
    },
    "cheap-focer-2": {
        "Cheap FOCer 2 60mm-Edge_Cuts.gbr": "outline",
        "Cheap FOCer 2 60mm-F_Mask.gbr": "soldermask",
        "Cheap FOCer 2 60mm-B_Paste.gbr": "paste",
        "Cheap FOCer 2 60mm-F_SilkS.gbr": "legend",
    },
    "huvud-tiny2": {
        "Huvud-Edge_Cuts.gko": "outline",
        "Huvud-B_Mask.gbs": "soldermask",
        "Huvud-F_Silkscreen.gto": "legend",
    },
    "incunest-motherboard": {
        # "Core1..3" placeholder files, mechanical layers, pad masters, keep-out outline.
        "Motherboard.1": "other",
        "Motherboard.2": "other",
        "Motherboard.3": "other",
        **{f"Motherboard.GM{i}": "mechanical" for i in range(1, 26)},
        "Motherboard.GML": "mechanical",
        "Motherboard.GPT": "other",
        "Motherboard.GPB": "other",
        "Motherboard.GKO": "outline",
        "Motherboard.GTS": "soldermask",
    },
    "limesdr-xtrx-1v1": {
        # No outline file: GM1 is a large mechanical drawing, not the outline.
        "LimeSDR-XTRX_1v1.GM1": "mechanical",
        "LimeSDR-XTRX_1v1.GM6": "mechanical",
        "LimeSDR-XTRX_1v1.GM14": "mechanical",
        "LimeSDR-XTRX_1v1.GM15": "mechanical",
        "LimeSDR-XTRX_1v1.GPT": "other",
        "LimeSDR-XTRX_1v1.GPB": "other",
        "LimeSDR-XTRX_1v1.GBO": "legend",
    },
    "pycubed-mainboard-v05": {
        "gerbers/mainboard-Edge_Cuts.gm1": "outline",
        "gerbers/mainboard-PTH-drl_map.gbr": "drill-map",
        "gerbers/mainboard-NPTH-drl_map.gbr": "drill-map",
        "gerbers/mainboard-B_Paste.gbp": "paste",
    },
    "thunderscope-rev5.3": {
        "Thunderscope_Rev5.3-Board Outline.gm1": "outline",
        "Thunderscope_Rev5.3-Fab Notes.gbr": "other",
        "Thunderscope_Rev5.3-Top Overlay.gto": "legend",
        "Thunderscope_Rev5.3-Top Solder.gts": "soldermask",
    },
}


@pytest.mark.realboards
@pytest.mark.parametrize("board", sorted(COPPER_ORDER))
def test_real_board_copper_order(board: str, realboard: Callable[[str], Path]) -> None:
    ids = _identify_board(realboard(board))
    ordered = order_copper_layers(list(ids.values()))
    assert [i.file for i in ordered] == COPPER_ORDER[board]
    assert [i.index for i in ordered] == list(range(1, len(ordered) + 1))
    assert ordered[0].side == "top"
    assert ordered[-1].side == "bottom"
    assert all(i.side == "inner" for i in ordered[1:-1])
    assert {i.identified_by for i in ordered} == {COPPER_EVIDENCE[board]}
    # All copper on these boards is positive (SOURCE.md: no negative planes).
    assert {i.polarity for i in ordered} == {"positive"}
    # The evidence in these files is consistent: no contradictions reported.
    assert [str(n) for i in ids.values() for n in i.notices] == []
    assert [str(n) for i in ordered for n in i.notices] == []


@pytest.mark.realboards
@pytest.mark.parametrize("board", sorted(NOT_COPPER))
def test_real_board_non_copper(board: str, realboard: Callable[[str], Path]) -> None:
    ids = _identify_board(realboard(board))
    for file, function in NOT_COPPER[board].items():
        assert ids[file].function == function, (file, ids[file].detail)
    copper = {f for f, i in ids.items() if i.function == "copper"}
    assert copper == set(COPPER_ORDER[board])


@pytest.mark.realboards
def test_real_board_limesdr_has_no_outline(realboard: Callable[[str], Path]) -> None:
    # SOURCE.md: "No dedicated outline file (no GKO/GML)".
    ids = _identify_board(realboard("limesdr-xtrx-1v1"))
    assert [f for f, i in ids.items() if i.function == "outline"] == []


@pytest.mark.realboards
def test_real_board_mask_polarity_from_x2(realboard: Callable[[str], Path]) -> None:
    # These solder masks carry FilePolarity,Negative (in G04 #@! comments on huvud, as a
    # real %TF attribute on thunderscope).
    huvud = _identify_board(realboard("huvud-tiny2"))
    assert huvud["Huvud-F_Mask.gts"].polarity == "negative"
    assert huvud["Huvud-F_Mask.gts"].polarity_from == "x2-comment"
    scope = _identify_board(realboard("thunderscope-rev5.3"))
    assert scope["Thunderscope_Rev5.3-Top Solder.gts"].polarity_from == "x2-attribute"


# --------------------------------------------------------------------------- precedence


def test_x2_attribute_real() -> None:
    i = _ident("board.gbr", file_attributes={"FileFunction": "Copper,L3,Inr,Plane"})
    assert (i.function, i.side, i.index, i.identified_by) == ("copper", "inner", 3, "x2-attribute")
    assert "Copper,L3,Inr,Plane" in i.detail


def test_x2_attribute_in_comment_only() -> None:
    i = _ident("board.gbr", comments=("G04 #@! TF.FileFunction,Copper,L2,Bot*",))
    assert (i.function, i.side, i.index, i.identified_by) == ("copper", "bottom", 2, "x2-comment")


def test_x2_attribute_merged_by_reader_but_written_as_comment() -> None:
    # The reader put the comment attribute into file_attributes too: still "x2-comment".
    i = _ident(
        "board.gbr",
        file_attributes={".FileFunction": "Copper,L1,Top"},
        comments=("#@! TF.FileFunction,Copper,L1,Top",),
    )
    assert i.identified_by == "x2-comment"
    assert i.index == 1


def test_layer_comment() -> None:
    i = _ident("x.gbr", comments=("G04 Layer: BottomLayer*", "G04 Layer_Color=255*"))
    assert (i.function, i.side, i.identified_by) == ("copper", "bottom", "layer-comment")
    j = _ident("y.gbr", comments=("G04 Layer: TopSolderMaskLayer*",))
    assert (j.function, j.side) == ("soldermask", "top")
    k = _ident("z.gbr", comments=("G04 Layer: BoardOutlineLayer*",))
    assert k.function == "outline"


def test_image_name_statement() -> None:
    # A header reader passes %IN/%LN names as "IN <name>" / "LN <name>" comments.
    i = _ident("x.gbr", comments=("IN BOTTOM_COPPER",))
    assert (i.function, i.side, i.identified_by) == ("copper", "bottom", "layer-comment")
    assert _ident("y.gbr", comments=("INCH units",)).function == "other"


def test_layer_color_comment_is_not_evidence() -> None:
    i = _ident("x.gbr", comments=("G04 Layer_Color=36540*",))
    assert i.function == "other"


def test_physical_order_comment_beats_extension() -> None:
    i = _ident("b.G1", comments=("G04 Layer_Physical_Order=3*",))
    assert (i.function, i.index, i.identified_by) == ("copper", 3, "physical-order-comment")
    assert i.rank == 1  # the extension's relative number is kept
    assert i.notices == ()


@pytest.mark.parametrize(
    ("name", "function", "side", "rank"),
    [
        ("b.GTL", "copper", "top", None),
        ("b.gbl", "copper", "bottom", None),
        ("b.G3", "copper", "inner", 3),
        ("b.GKO", "outline", None, None),
        ("b.GM1", "mechanical", None, None),
        ("b-Edge_Cuts.gm1", "outline", None, None),
        ("b.GTS", "soldermask", "top", None),
        ("b.GBP", "paste", "bottom", None),
        ("b.GTO", "legend", "top", None),
        ("b.GPT", "other", "top", None),
        ("b.GD1", "drill-map", None, None),
    ],
)
def test_extension(name: str, function: str, side: str | None, rank: int | None) -> None:
    i = _ident(name)
    assert (i.function, i.side, i.rank) == (function, side, rank)
    assert i.identified_by == "extension"


@pytest.mark.parametrize(
    ("name", "function", "side", "rank"),
    [
        ("proj-F_Cu.gbr", "copper", "top", None),
        ("proj-B_Cu.gbr", "copper", "bottom", None),
        ("proj-In2_Cu.gbr", "copper", "inner", 2),
        ("proj-Top Layer.gbr", "copper", "top", None),
        ("proj-Int3 (PWR).gbr", "copper", "inner", 3),
        ("proj-Edge_Cuts.gbr", "outline", None, None),
        ("proj-NPTH-drl_map.gbr", "drill-map", None, None),
        ("proj-F_Paste.gbr", "paste", "top", None),
        ("proj-B_Mask.gbr", "soldermask", "bottom", None),
    ],
)
def test_file_name(name: str, function: str, side: str | None, rank: int | None) -> None:
    i = _ident(name)
    assert (i.function, i.side, i.rank) == (function, side, rank)
    assert i.identified_by == "file-name"


def test_extension_number_with_inner_name() -> None:
    # ".g2" written for the first inner layer: the name's "In1" gives the order.
    i = _ident("proj-In1_Cu.g2")
    assert (i.function, i.side, i.rank) == ("copper", "inner", 1)
    assert ".g2" in i.detail


def test_nothing_known_is_other() -> None:
    i = _ident("artwork.gbr")
    assert i.function == "other"
    assert i.identified_by in IDENTIFIED_BY


def test_strongest_evidence_wins_and_contradictions_are_noticed() -> None:
    i = _ident(
        "proj-F_Cu.gbl",
        file_attributes={"FileFunction": "Copper,L3,Inr"},
        comments=("G04 Layer: TopLayer*", "G04 Layer_Physical_Order=2*"),
    )
    assert (i.index, i.side, i.identified_by) == (3, "inner", "x2-attribute")
    text = " | ".join(n.message for n in i.notices)
    assert "layer-comment" in text
    assert "physical-order-comment" in text
    assert "extension" in text
    assert all(n.file == "proj-F_Cu.gbl" for n in i.notices)


def test_x2_index_against_physical_order_is_a_notice() -> None:
    i = _ident(
        "b.G1",
        file_attributes={"FileFunction": "Copper,L2,Inr"},
        comments=("G04 Layer_Physical_Order=3*",),
    )
    assert i.index == 2
    assert len(i.notices) == 1
    assert "L3" in i.notices[0].message
    assert "kept x2-attribute" in i.notices[0].message


def test_x2_non_copper_against_copper_extension_is_a_notice() -> None:
    i = _ident("b.GTL", file_attributes={"FileFunction": "Legend,Top"})
    assert i.function == "legend"
    assert any("copper" in n.message for n in i.notices)


# --------------------------------------------------------------------------- polarity


def test_negative_plane_by_extension() -> None:
    i = _ident("b.GP1")
    assert (i.function, i.side, i.polarity, i.polarity_from) == (
        "copper",
        "inner",
        "negative",
        "extension",
    )


def test_negative_plane_by_file_polarity() -> None:
    i = _ident(
        "b.gbr",
        file_attributes={"FileFunction": "Copper,L2,Inr,Plane", "FilePolarity": "Negative"},
    )
    assert (i.polarity, i.polarity_from) == ("negative", "x2-attribute")
    j = _ident("c.G2", comments=("G04 #@! TF.FilePolarity,Negative*",))
    assert (j.polarity, j.polarity_from) == ("negative", "x2-comment")


def test_default_polarity() -> None:
    i = _ident("b.G2")
    assert (i.polarity, i.polarity_from) == ("positive", "default")


def test_file_polarity_against_plane_extension() -> None:
    i = _ident("b.GP2", file_attributes={"FilePolarity": "Positive"})
    assert i.polarity == "positive"
    assert any("FilePolarity" in n.message for n in i.notices)


# --------------------------------------------------------------------------- config


def test_config_overrides_everything() -> None:
    i = _ident(
        "stack/b.GTL",
        file_attributes={"FileFunction": "Copper,L1,Top"},
        config_map={"*.gtl": "copper:3, negative"},
    )
    assert (i.function, i.index, i.identified_by) == ("copper", 3, "config")
    assert (i.polarity, i.polarity_from) == ("negative", "config")
    assert i.notices == ()


def test_config_exact_name_beats_glob_and_ignore() -> None:
    cmap = {"*.gbr": "copper:2", "notes.gbr": "ignore"}
    assert match_layer_spec("pkg/notes.gbr", cmap) == ("notes.gbr", "ignore")
    i = _ident("pkg/notes.gbr", config_map=cmap)
    assert i.function == "other"
    assert i.identified_by == "config"
    j = _ident("pkg/inner.gbr", config_map=cmap)
    assert (j.function, j.index) == ("copper", 2)


def test_config_without_polarity_keeps_file_polarity() -> None:
    i = _ident(
        "b.gbr",
        file_attributes={"FilePolarity": "Negative"},
        config_map={"b.gbr": "copper:bottom"},
    )
    assert (i.side, i.polarity, i.polarity_from) == ("bottom", "negative", "x2-attribute")


def test_config_map_not_matching_is_ignored() -> None:
    i = _ident("b.GTL", config_map={"*.g5": "copper:5"})
    assert i.identified_by == "extension"


@pytest.mark.parametrize(
    ("text", "function", "side", "index", "polarity"),
    [
        ("copper:2", "copper", None, 2, None),
        ("copper:1", "copper", "top", 1, None),
        ("Copper:Bottom, Negative", "copper", "bottom", None, "negative"),
        ("outline", "outline", None, None, None),
        ("soldermask:top", "soldermask", "top", None, None),
        ("ignore", None, None, None, None),
    ],
)
def test_parse_layer_spec(
    text: str, function: str | None, side: str | None, index: int | None, polarity: str | None
) -> None:
    spec = parse_layer_spec(text)
    assert (spec.function, spec.side, spec.index, spec.polarity) == (
        function,
        side,
        index,
        polarity,
    )


@pytest.mark.parametrize(
    "text", ["copper", "copper:0", "copper:two", "plane:2", "ignore, negative", "", "copper:2 x"]
)
def test_parse_layer_spec_rejects(text: str) -> None:
    with pytest.raises(ConfigError, match="must"):
        parse_layer_spec(text)


def test_parse_file_function() -> None:
    assert parse_file_function("Copper,L4,Bot,Signal") == ("copper", "bottom", 4)
    assert parse_file_function("Profile,NP") == ("outline", None, None)
    assert parse_file_function("Soldermask,Bot") == ("soldermask", "bottom", None)
    assert parse_file_function("AssemblyDrawing,Top") == ("mechanical", "top", None)
    assert parse_file_function("Plated,1,4,PTH") == ("other", None, None)
    assert parse_file_function("Drillmap") == ("drill-map", None, None)


# --------------------------------------------------------------------------- ordering


def test_order_extension_only_three_letter_convention() -> None:
    files = ["b.GBL", "b.G3", "b.GTL", "b.G1", "b.G2", "b.G4"]
    ordered = order_copper_layers([_ident(f) for f in files])
    assert [i.file for i in ordered] == ["b.GTL", "b.G1", "b.G2", "b.G3", "b.G4", "b.GBL"]
    assert [i.index for i in ordered] == [1, 2, 3, 4, 5, 6]
    # The inner order is an assumption: said once, on the top layer.
    assert any("assumed" in n.message for n in ordered[0].notices)


@pytest.mark.parametrize("first_inner", [1, 2])
def test_order_inner_numbering_offset_does_not_matter(first_inner: int) -> None:
    # One generator numbers the first inner layer .g1, another .g2.
    files = ["p.gtl", f"p.g{first_inner}", f"p.g{first_inner + 1}", "p.gbl"]
    ordered = order_copper_layers([_ident(f) for f in files])
    assert [i.file for i in ordered] == files
    assert [i.index for i in ordered] == [1, 2, 3, 4]


def test_order_physical_order_over_extension_numbers() -> None:
    ids = [
        _ident("b.GTL", comments=("Layer_Physical_Order=1",)),
        _ident("b.G1", comments=("Layer_Physical_Order=3",)),
        _ident("b.G2", comments=("Layer_Physical_Order=2",)),
        _ident("b.GBL", comments=("Layer_Physical_Order=4",)),
    ]
    ordered = order_copper_layers(ids)
    assert [i.file for i in ordered] == ["b.GTL", "b.G2", "b.G1", "b.GBL"]
    assert any("do not follow the physical order" in n.message for n in ordered[0].notices)


def test_order_two_files_claim_top() -> None:
    ids = [
        _ident("a/b-F_Cu.gbr"),  # file-name evidence
        _ident("b.GTL"),  # extension evidence (stronger)
        _ident("b.GBL"),
    ]
    ordered = order_copper_layers(ids)
    assert [i.file for i in ordered] == ["b.GTL", "b.GBL"]
    msgs = [n.message for n in ordered[0].notices]
    assert any("b.GTL" in m and "a/b-F_Cu.gbr" in m and "left out a/b-F_Cu.gbr" in m for m in msgs)


def test_order_tie_is_settled_by_file_name() -> None:
    ids = [_ident("z/b.GTL"), _ident("a/b.GTL"), _ident("a/b.GBL")]
    ordered = order_copper_layers(ids)
    assert [i.file for i in ordered] == ["a/b.GTL", "a/b.GBL"]


def test_order_is_independent_of_input_order() -> None:
    ids = [
        _ident("b.GTL"),
        _ident("b.G1"),
        _ident("x.gbr", file_attributes={"FileFunction": "Copper,L3,Inr"}),
        _ident("b.GBL"),
        _ident("b2.GTL"),
        _ident("b.GKO"),
    ]
    reference = [(i.file, i.index) for i in order_copper_layers(ids)]
    assert reference == [("b.GTL", 1), ("b.G1", 2), ("x.gbr", 3), ("b.GBL", 4)]
    for perm in itertools.permutations(ids):
        assert [(i.file, i.index) for i in order_copper_layers(list(perm))] == reference


def test_order_gap_is_renumbered_with_notice() -> None:
    ids = [
        _ident("a.gbr", file_attributes={"FileFunction": "Copper,L1,Top"}),
        _ident("b.gbr", file_attributes={"FileFunction": "Copper,L2,Inr"}),
        _ident("c.gbr", file_attributes={"FileFunction": "Copper,L4,Bot"}),
    ]
    ordered = order_copper_layers(ids)
    assert [(i.file, i.index) for i in ordered] == [("a.gbr", 1), ("b.gbr", 2), ("c.gbr", 3)]
    assert any("renumbered" in n.message for n in ordered[0].notices)


def test_order_inner_claim_at_the_end_is_noticed() -> None:
    ids = [
        _ident("a.gbr", file_attributes={"FileFunction": "Copper,L1,Top"}),
        _ident("b.gbr", file_attributes={"FileFunction": "Copper,L2,Inr"}),
    ]
    ordered = order_copper_layers(ids)
    assert ordered[-1].side == "bottom"
    assert any("says inner" in n.message for n in ordered[-1].notices)


def test_order_single_layer_and_empty() -> None:
    assert order_copper_layers([]) == []
    assert order_copper_layers([_ident("b.GKO")]) == []
    one = order_copper_layers([_ident("b.GBL")])
    assert [(i.index, i.side) for i in one] == [(1, "top")]


def test_order_config_places_unknown_file() -> None:
    cmap = {"mystery.gbr": "copper:2"}
    ids = [_ident("b.GTL"), _ident("mystery.gbr", config_map=cmap), _ident("b.GBL")]
    ordered = order_copper_layers(ids)
    assert [i.file for i in ordered] == ["b.GTL", "mystery.gbr", "b.GBL"]
    assert ordered[1].identified_by == "config"
