"""compare: the demo board with a void filled or cut, against its description."""

from __future__ import annotations

import json
from pathlib import Path

import pytest
from typer.testing import CliRunner

import fluxshadow
from fluxshadow.board.model import Board
from fluxshadow.checks.compare import compare, parse_edit
from fluxshadow.cli.app import app
from fluxshadow.errors import InputError

DEMO = Path(__file__).resolve().parents[2] / "fixtures" / "demo"
runner = CliRunner()


@pytest.fixture(scope="module")
def board() -> Board:
    return fluxshadow.load_package(DEMO)


def test_filling_the_keep_out_resolves_its_findings(board: Board) -> None:
    # The demo's L2 sits over a 4 x 4 mm keep-out in the L2 plane (synth/demo.py); filled,
    # the plane covers the whole zone and the ADC_IN_P track on L3 is shielded again.
    c = compare(board, [parse_edit("L2:L2", "fill")])
    resolved = {(f.rule, f.ref, f.layer) for f in c.resolved}
    assert resolved == {
        ("plane-void", "L2", "L2"),
        ("void-ring", "L2", "L2"),
        ("exposed-trace", "L2", "L3"),
    }
    assert not c.new
    cov = next(r for r in c.rows if (r.ref, r.layer, r.what) == ("L2", "L2", "coverage"))
    assert cov.before == pytest.approx(1 - 16 / 7.4**2, abs=0.01)  # hand computation
    assert cov.after == pytest.approx(1.0)


def test_cutting_a_solid_plane_introduces_a_closed_ring(board: Board) -> None:
    c = compare(board, [parse_edit("L1:L2", "cut")])
    new = {(f.rule, f.ref, f.layer) for f in c.new}
    assert ("plane-void", "L1", "L2") in new
    ring = next(f for f in c.new if f.rule == "void-ring")
    assert ring.metrics["closed"] is True


def test_cut_through_makes_a_through_cutout(board: Board) -> None:
    c = compare(board, [parse_edit("L1:through", "cut")])
    assert ("through-cutout", "L1", "") in {(f.rule, f.ref, f.layer) for f in c.new}


def test_bad_edits_are_input_errors(board: Board) -> None:
    with pytest.raises(InputError, match="REF:LAYER"):
        parse_edit("L2", "fill")
    with pytest.raises(InputError, match="magnetics found"):
        compare(board, [parse_edit("U7:L2", "fill")])
    with pytest.raises(InputError, match="copper layer"):
        compare(board, [parse_edit("L2:L9", "fill")])


def test_cli_compare_json_and_usage_error() -> None:
    result = runner.invoke(app, ["compare", str(DEMO), "--fill", "L2:L2", "-f", "json"])
    assert result.exit_code == 0, result.output
    data = json.loads(result.stdout)
    assert data["edits"] == [{"kind": "fill", "ref": "L2", "layer": "L2"}]
    assert any(ch["what"] == "coverage" for ch in data["changes"])
    bad = runner.invoke(app, ["compare", str(DEMO), "--fill", "nonsense"])
    assert bad.exit_code == 2
    assert "REF:LAYER" in bad.stderr
