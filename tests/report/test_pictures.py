"""Pictures of the check: files for the demo, what they show, field maps, determinism."""

from __future__ import annotations

import xml.etree.ElementTree as ET
from pathlib import Path

import numpy as np
import pytest

import fluxshadow
from fluxshadow.board.model import Board
from fluxshadow.checks import picture_data as pd
from fluxshadow.checks.model import Report
from fluxshadow.checks.run import run_checks
from fluxshadow.checks.source import SourceModel
from fluxshadow.errors import ConfigError
from fluxshadow.physics.constants import MU0, SIGMA_CU_S_PER_M
from fluxshadow.report.pictures import (
    field_figure,
    layers_figure,
    overview_figure,
    render_pictures,
    save_figure,
)
from fluxshadow.synth.demo import demo_board
from fluxshadow.synth.writer import write_package

SVG = "{http://www.w3.org/2000/svg}"


@pytest.fixture(scope="module")
def demo(tmp_path_factory: pytest.TempPathFactory) -> tuple[Board, Report, pd.PictureSet]:
    folder = tmp_path_factory.mktemp("demo") / "demo"
    write_package(demo_board(), folder)
    board = fluxshadow.load_package(folder)
    report = run_checks(board)
    return board, report, pd.picture_data(report, board)


@pytest.fixture(scope="module")
def written(
    demo: tuple[Board, Report, pd.PictureSet], tmp_path_factory: pytest.TempPathFactory
) -> tuple[Path, list[Path]]:
    board, report, _data = demo
    folder = tmp_path_factory.mktemp("pictures")
    return folder, render_pictures(report, board, folder)


def _ids(svg: Path) -> list[str]:
    root = ET.parse(svg).getroot()
    return [el.get("id", "") for el in root.iter() if el.get("id")]


def _texts(svg: Path) -> str:
    root = ET.parse(svg).getroot()
    return "\n".join("".join(el.itertext()) for el in root.iter(f"{SVG}text"))


def test_files_for_every_magnetic(
    demo: tuple[Board, Report, pd.PictureSet], written: tuple[Path, list[Path]]
) -> None:
    _board, report, _data = demo
    folder, files = written
    names = {p.name for p in files}
    assert len(report.magnetics) == 4
    for m in report.magnetics:
        for ext in ("svg", "png"):
            assert f"{m.ref}-layers.{ext}" in names
            assert f"{m.ref}-field.{ext}" in names
    assert {"overview.svg", "overview.png"} <= names
    for p in files:
        assert p.parent == folder
        assert p.stat().st_size > 5000
    png = (folder / "overview.png").read_bytes()
    assert png.startswith(b"\x89PNG\r\n\x1a\n")
    # written atomically: no temporary files left behind
    assert sorted(p.name for p in folder.iterdir()) == sorted(names)


def test_svg_parses_and_names_the_layers(
    demo: tuple[Board, Report, pd.PictureSet], written: tuple[Path, list[Path]]
) -> None:
    _board, report, _data = demo
    folder, _files = written
    for m in report.magnetics:
        svg = folder / f"{m.ref}-layers.svg"
        text = _texts(svg)
        for lr in m.layers:
            assert f"{lr.layer} · {lr.depth_mm:.2f} mm deep" in text
        ids = _ids(svg)
        assert len(ids) == len(set(ids)), "element ids must be unique"
        assert {f"layer:{lr.layer}" for lr in m.layers} <= set(ids)


def test_exposed_traces_and_markers_match_the_report(
    demo: tuple[Board, Report, pd.PictureSet], written: tuple[Path, list[Path]]
) -> None:
    _board, report, _data = demo
    folder, _files = written
    total = 0
    for m in report.magnetics:
        want = sorted(
            f"exposed-trace:{m.ref}:{f.layer}:{f.metrics['net']}"
            for f in report.findings
            if f.rule == "exposed-trace" and f.ref == m.ref
        )
        got = sorted(
            i for i in _ids(folder / f"{m.ref}-layers.svg") if i.startswith("exposed-trace:")
        )
        assert got == want
        total += len(want)
    assert total == 2  # ADC_IN_P under L2, SENSE_1V8 under L3 (synth/demo.py)
    located = [f for f in report.findings if f.x_mm is not None and f.y_mm is not None]
    markers = [i for i in _ids(folder / "overview.svg") if i.startswith("finding:")]
    assert len(markers) == len(located) == 16
    # closed rings are drawn (L2 under L2, L4 under L2 and L3); the opened one under L3 not
    rings = {
        m.ref: [i for i in _ids(folder / f"{m.ref}-layers.svg") if i.startswith("ring:")]
        for m in report.magnetics
    }
    assert rings == {"L1": [], "L2": ["ring:L2:0"], "L3": [], "L4": ["ring:L2:0", "ring:L3:0"]}


def test_axes_cover_zone_and_body(demo: tuple[Board, Report, pd.PictureSet]) -> None:
    _board, report, data = demo
    by_ref = {m.ref: m for m in report.magnetics}
    for pic in data.magnetics:
        res = by_ref[pic.ref]
        fig = layers_figure(pic)
        axes = {ax.get_gid(): ax for ax in fig.axes if ax.get_gid()}
        for lr in res.layers:
            ax = axes[f"layer:{lr.layer}"]
            (x0, x1), (y0, y1) = ax.get_xlim(), ax.get_ylim()
            pts = np.asarray(list(res.zones[lr.layer]) + list(res.outline))
            assert x0 <= pts[:, 0].min()
            assert pts[:, 0].max() <= x1
            assert y0 <= pts[:, 1].min()
            assert pts[:, 1].max() <= y1
            # and the panel is not far larger than the deepest zone plus the plane ring
            assert x1 - x0 < (pts[:, 0].max() - pts[:, 0].min()) + 12.0
        # panels in the order the part looks: nearest layer first
        panel_layers = [g.split(":")[1] for g in axes if g.startswith("layer:")]
        assert panel_layers == [lay.layer for lay in pic.layers]
        assert panel_layers[0] == "L1"


def test_colour_bars_carry_units(demo: tuple[Board, Report, pd.PictureSet]) -> None:
    _board, report, data = demo
    pic = next(p for p in data.magnetics if p.ref == "L3")
    fig = layers_figure(pic)
    cb = next(ax for ax in fig.axes if ax.get_gid() == "colorbar:induced")
    label = cb.get_ylabel()
    assert "induced voltage" in label
    assert "mV" in label
    # the colour scale spans the report's induced voltage of the trace
    f = next(f for f in report.findings if f.rule == "exposed-trace" and f.ref == "L3")
    mv = float(f.metrics["induced_voltage_mv"])  # type: ignore[arg-type]
    lo, hi = sorted(cb.get_ylim())
    assert lo <= mv <= hi
    ffig = field_figure(pic)
    assert ffig is not None
    fcb = next(ax for ax in ffig.axes if ax.get_gid() == "colorbar:field")
    assert "|B|" in fcb.get_ylabel()
    assert "µT" in fcb.get_ylabel()
    # L1 has no exposed trace: no induced-voltage colour bar
    pic1 = next(p for p in data.magnetics if p.ref == "L1")
    assert not any(ax.get_gid() == "colorbar:induced" for ax in layers_figure(pic1).axes)


def test_field_maps_at_the_exposed_layers(demo: tuple[Board, Report, pd.PictureSet]) -> None:
    _board, _report, data = demo
    maps = {p.ref: [(f.layer, f.exposed) for f in p.fields] for p in data.magnetics}
    # demo: ADC_IN_P on L3 under L2, SENSE_1V8 on L4 under L3; none under L1 and L4
    assert maps == {
        "L1": [("L4", False)],
        "L2": [("L3", True)],
        "L3": [("L4", True)],
        "L4": [("L4", False)],
    }
    for pic in data.magnetics:
        for fm in pic.fields:
            assert fm.b_ut.shape == (pd.FIELD_GRID, pd.FIELD_GRID)
            assert np.all(np.isfinite(fm.b_ut))
            assert np.all(fm.b_ut >= 0)
            # strongest near the winding's axis, weaker at the window's corners
            iy = np.argmin(np.abs(fm.y_mm - pic.y_mm))
            ix = np.argmin(np.abs(fm.x_mm - pic.x_mm))
            assert fm.b_ut[iy, ix] > 3.0 * max(fm.b_ut[0, 0], fm.b_ut[-1, -1])


def test_field_maps_carry_the_sheet_models_eddy_currents(
    demo: tuple[Board, Report, pd.PictureSet],
) -> None:
    """Below layers solved with the sheet model (and no solid plane between) the map is
    that solution's field, as in the report's figures: under L4 of the demo (a toroid over
    a milled slot, rings closed around it on L2 and L3) the eddy currents of both rings
    are in it, so over the ring copper beside the slot the field is well below the free
    field of the winding (the spectral map with no solid plane), while in the slot it is
    not pushed down as much."""
    _board, _report, data = demo
    pic = next(p for p in data.magnetics if p.ref == "L4")
    fm = pic.fields[-1]
    assert fm.sheets == "L2+L3"
    assert fm.planes == ""
    others = {f.sheets for p in data.magnetics if p.ref in ("L1",) for f in p.fields}
    assert others == {""}  # solid planes above: spectral map
    src = next(m for m in data.magnetics if m.ref == "L4")
    free = pd.field_map(
        _source_of(_board, "L4"),
        np.zeros(0),
        np.zeros(0),
        fm.depth_mm * 1e-3,
        fm.freq_hz,
        fm.x_mm,
        fm.y_mm,
    )
    scale = fm.b_ut / np.where(free > 0, free, np.inf)
    iy = int(np.argmin(np.abs(fm.y_mm - src.y_mm)))
    ix_slot = int(np.argmin(np.abs(fm.x_mm - src.x_mm)))
    ix_copper = int(np.argmin(np.abs(fm.x_mm - (src.x_mm - 3.0))))
    # the units cancel in this ratio of ratios (map at the operating point, free per A)
    assert scale[iy, ix_copper] < 0.5 * scale[iy, ix_slot]


def _source_of(board: Board, ref: str) -> SourceModel:
    from fluxshadow.checks.operating import operating_points
    from fluxshadow.checks.settings import Settings
    from fluxshadow.checks.source import checked_part, source_model

    m = board.magnetic(ref)
    part = next((p for p in board.config.parts if p.ref == ref), None)
    part, _problems = checked_part(m, part)
    op = operating_points(board.magnetics, board.config)[ref]
    return source_model(m, part, Settings(), inductance_h=op.inductance_h)


def test_field_map_free_space_on_axis() -> None:
    # On-axis field of a circular loop, B = mu0 I a^2 / (2 (a^2 + z^2)^(3/2))
    # (textbook Biot-Savart result, from memory).
    a, h, d = 2e-3, 0.5e-3, 1.0e-3
    src = SourceModel.from_loops([[0.0, 0.0, h]], [0.0, 0.0, 1.0], a, 1.0)
    b = pd.field_map(src, np.zeros(0), np.zeros(0), d, 1e6, np.array([0.0]), np.array([0.0]))
    z = h + d
    assert b[0, 0] == pytest.approx(MU0 * a * a / (2.0 * (a * a + z * z) ** 1.5), rel=1e-6)


def test_field_map_fft_route_agrees_with_hankel_route() -> None:
    # The 2D FFT route (any winding) against the Hankel route (coaxial vertical winding)
    # for the same loop under a 35 um copper sheet at 1 MHz: two independent integrals.
    src = SourceModel.from_loops([[0.0, 0.0, 0.6e-3]], [0.0, 0.0, 1.0], 1.5e-3, 1.0)
    thick = np.array([0.035e-3])
    sigma = np.array([SIGMA_CU_S_PER_M])
    xs = np.linspace(-3.0, 3.0, 7)
    hankel = pd.field_map(src, thick, sigma, 0.2e-3, 1e6, xs, np.array([0.0]))
    xy = src.to_local_m(xs, np.zeros_like(xs))
    fft = pd._fft_field(src, xy, thick, sigma, 0.2e-3, 1e6)
    np.testing.assert_allclose(fft, hankel[0], rtol=0.05)
    # and the copper shields: below free space everywhere on the line
    free = pd.field_map(src, thick, np.zeros(1), 0.2e-3, 1e6, xs, np.array([0.0]))
    assert np.all(hankel < free)


def test_output_is_deterministic(demo: tuple[Board, Report, pd.PictureSet], tmp_path: Path) -> None:
    _board, _report, data = demo
    a = save_figure(overview_figure(data.overview), tmp_path / "a.svg").read_bytes()
    b = save_figure(overview_figure(data.overview), tmp_path / "b.svg").read_bytes()
    assert a == b
    assert b"<dc:date>" not in a


def test_unknown_format_is_a_config_error(
    demo: tuple[Board, Report, pd.PictureSet], tmp_path: Path
) -> None:
    board, report, _data = demo
    with pytest.raises(ConfigError, match="picture format must be one of svg, png; got 'pdf'"):
        render_pictures(report, board, tmp_path, formats=("pdf",))


def test_ring_paths_come_from_the_traced_rings() -> None:
    """A closed ring is drawn along the hole the analysis traced, also when that hole
    reaches beyond the picture's window (the axes clip it); voids on one ring give one
    path; an opened void gives none."""
    from types import SimpleNamespace

    import shapely

    from fluxshadow.checks.analysis import Void
    from fluxshadow.checks.model import RingInfo

    hole = ((0.0, 0.0), (40.0, 0.0), (40.0, 3.0), (0.0, 3.0), (0.0, 0.0))  # 40 mm long
    closed = RingInfo(
        closed=True,
        inner_perimeter_mm=86.0,
        inner_area_mm2=120.0,
        search_window_mm=48.0,
        path_mm=hole,
    )
    opened = RingInfo(
        closed=False,
        inner_perimeter_mm=10.0,
        inner_area_mm2=5.0,
        search_window_mm=8.0,
        opened_to="board edge",
    )

    def void(x: float, ring: RingInfo) -> Void:
        return Void(polygon=shapely.box(x, 0, x + 1, 1), area_mm2=1.0, to_winding_mm=0.0, ring=ring)

    lg = SimpleNamespace(voids=[void(1.0, closed), void(3.0, closed), void(50.0, opened)])
    paths = pd._ring_paths(lg)  # type: ignore[arg-type]
    assert len(paths) == 1
    np.testing.assert_array_equal(paths[0], np.asarray(hole))
