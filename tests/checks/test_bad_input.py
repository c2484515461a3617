"""check on awkward input: the rest of the report is still produced, nothing is dropped."""

from __future__ import annotations

from dataclasses import replace
from pathlib import Path

from typer.testing import CliRunner

import fluxshadow
from fluxshadow.checks.run import run_checks
from fluxshadow.cli.app import app
from fluxshadow.synth.boards import mini4
from fluxshadow.synth.model import Part
from fluxshadow.synth.writer import write_package

runner = CliRunner()


def _with_parts(tmp_path: Path, *extra: Part) -> Path:
    board = mini4()
    board = replace(board, parts=(*board.parts, *extra))
    write_package(board, tmp_path / "pkg")
    return tmp_path / "pkg"


def test_part_outside_the_board_is_reported_and_the_rest_checked(tmp_path: Path) -> None:
    off = Part(
        "L9",
        "10uH",
        "IND_4.0x4.0mm",
        80.0,
        15.0,
        0.0,
        "top",
        ((-1.5, 0.0, 1.2, 3.2), (1.5, 0.0, 1.2, 3.2)),
    )
    report = run_checks(fluxshadow.load_package(_with_parts(tmp_path, off)))
    assert any("L9" in n and "outside the board" in n for n in report.notices)
    assert {m.ref for m in report.magnetics} == {"L1", "L2"}
    assert any(f.ref == "L2" and f.rule == "void-ring" for f in report.findings)


def test_part_over_no_copper_is_reported(tmp_path: Path) -> None:
    # A board whose layers carry no copper but the part pads (written by the synth writer).
    board = mini4()
    bare = replace(board, layers=tuple(replace(layer, features=()) for layer in board.layers))
    write_package(bare, tmp_path / "bare")
    report = run_checks(fluxshadow.load_package(tmp_path / "bare"))
    refs = {m.ref for m in report.magnetics}
    assert refs == {"L1", "L2"}
    # Only the pads of the parts are copper (on L1 and L4); L2/L3 are empty.
    for m in report.magnetics:
        lr = {x.layer: x for x in m.layers}
        assert lr["L2"].copper_coverage == 0.0
        assert not lr["L2"].plane_around
    assert not [f for f in report.findings if f.rule in ("plane-void", "void-ring")]


def test_config_naming_unknown_part_and_layer(tmp_path: Path) -> None:
    pkg = _with_parts(tmp_path)
    (pkg / "fluxshadow.toml").write_text(
        '[[part]]\nref = "L77"\nconstruction = "shielded"\n'
        '[[waiver]]\nrule = "plane-void"\nref = "L2"\nlayer = "L9"\nreason = "typo"\n'
    )
    result = runner.invoke(app, ["check", str(pkg), "-f", "json"])
    assert result.exit_code == 0, result.output
    import json

    data = json.loads(result.stdout)
    assert any("L77" in n for n in data["notices"])
    assert any("'L9'" in n and "does not exist" in n for n in data["notices"])
    assert data["magnetics"], "the report is still produced"


def test_unknown_rule_in_a_waiver_is_an_error(tmp_path: Path) -> None:
    pkg = _with_parts(tmp_path)
    (pkg / "fluxshadow.toml").write_text(
        '[[waiver]]\nrule = "plane-hole"\nref = "L2"\nreason = "typo"\n'
    )
    result = runner.invoke(app, ["check", str(pkg)])
    assert result.exit_code == 2
    assert "waiver[1].rule" in result.stderr
