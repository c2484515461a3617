"""Shared check geometry (fluxshadow.checks.analysis) on boards built by hand.

The exposed-trace case of :mod:`fluxshadow.synth.cases` with its straight trace replaced by
one long polyline that runs around the board, crosses the zones on the same line x = 15 mm
and comes back into the analysis window elsewhere: the centre lines are cut to their local
runs, and the figures must stay the hand-computed ones of the case.
"""

from __future__ import annotations

import dataclasses
from pathlib import Path

import pytest

import fluxshadow
from fluxshadow.checks.analysis import analyse_magnetic
from fluxshadow.checks.settings import Settings
from fluxshadow.io.records import TRACK
from fluxshadow.synth.cases import synthetic_cases
from fluxshadow.synth.model import CopperLayer, Track
from fluxshadow.synth.writer import write_package

# Around the board edge, up x = 15 across every zone, then a hook at y = 21 and x = 21
# (inside the analysis window, about x, y 8.6..21.4, but outside the L3 zone, y and
# x 11.2..18.8, and its plane ring, up to 20.8: the 0.2 mm trace spans 20.9..21.1).
_MEANDER: tuple[tuple[float, float], ...] = (
    *((1.0, 29.0), (1.0, 1.0), (15.0, 1.0), (15.0, 29.0), (29.0, 29.0)),
    *((29.0, 21.0), (21.0, 21.0), (21.0, 29.0), (25.0, 29.0)),
)


@pytest.fixture(scope="module")
def meander_board(tmp_path_factory: pytest.TempPathFactory) -> fluxshadow.Board:
    case = synthetic_cases()["exposed-trace"]
    layers = list(case.board.layers)
    layers[2] = CopperLayer((Track(_MEANDER, 0.2, net="ADC_IN"),))
    board = dataclasses.replace(case.board, layers=tuple(layers))
    folder: Path = tmp_path_factory.mktemp("meander") / "pkg"
    write_package(board, folder)
    return fluxshadow.load_package(folder)


def test_long_polyline_is_cut_to_local_runs(meander_board: fluxshadow.Board) -> None:
    geo = analyse_magnetic(meander_board, meander_board.magnetic("L1"), Settings())
    art = meander_board.artwork("L3")
    tracks = [i for i in range(art.n_objects) if art.record.obj_kind[i] == TRACK]
    # precondition: one object whose box is the whole board, so the cut is exercised
    assert len(tracks) == 1
    lines, objs = art.track_lines(geo.window)
    assert len(lines) == 2
    assert objs.tolist() == [tracks[0], tracks[0]]  # the x = 15 run and the hook


def test_exposed_figures_unchanged_by_meander(meander_board: fluxshadow.Board) -> None:
    """Hand computation of the case (synth.cases, exposed-trace): 7.6 mm of the trace in
    the L3 zone (y 11.2..18.8), 3.0 mm of it under the 3 x 3 mm void of L2, return on L4."""
    geo = analyse_magnetic(meander_board, meander_board.magnetic("L1"), Settings())
    (l3,) = [lg for lg in geo.layers if lg.layer.name == "L3"]
    (trace,) = l3.exposed
    assert trace.net == "ADC_IN"
    assert trace.exposed_length_mm == pytest.approx(3.0, abs=1e-6)
    assert trace.length_in_zone_mm == pytest.approx(7.6, abs=0.01)
    assert trace.return_layer == "L4"
