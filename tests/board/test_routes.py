"""Two input routes, one board model: an ODB++ job against the same board's Gerber files.

The shared corpus holds two boards both ways (``../shared/realboards-odb/*/SOURCE.md``):

- ``thunderscope-rev5.3``: the ODB++ job in ``realboards-odb`` and the Gerber set in
  ``realboards``. The frames differ by the offset SOURCE.md measured over all 739 parts
  ("Coordinate frames"): Gerber (x, y) = ODB (x, y) + (-87.000, +156.800) mm.
- ``gerbonara-camjob-2layer``: its ``gerber/`` folder was exported from the ODB++ ``edit``
  step, in the same frame. Its Gerbers carry no layer attributes and are named ``tl``,
  ``bl``, ``ko``, so a ``[layers]`` map names them (as a user would).

What must agree (the ODB++ issue): the same layer order, the same magnetics, the copper area
in a window round each magnetic (or, without magnetics, in a grid of windows) within 0.5 %
on every layer, and the same findings from ``check``.
"""

from __future__ import annotations

import json
import shutil
import tarfile
import zipfile
from collections.abc import Callable
from functools import cache
from pathlib import Path

import jsonschema
import numpy as np
import pytest
from typer.testing import CliRunner

from fluxshadow.board.load import load_package
from fluxshadow.board.model import Board
from fluxshadow.checks.run import run_checks
from fluxshadow.cli.app import app
from fluxshadow.errors import InputError
from fluxshadow.io.config import load_config
from fluxshadow.report.json_report import report_to_dict

pytestmark = pytest.mark.realboards

TS = "thunderscope-rev5.3"
CAM = "gerbonara-camjob-2layer"
TS_OFFSET_MM = np.array([-87.000, 156.800])  # Gerber = ODB + offset (SOURCE.md)
AREA_RTOL = 0.005  # the 0.5 %
CAM_LAYERS = '[layers]\n"tl" = "copper:1"\n"bl" = "copper:2"\n"ko" = "outline"\n'

# Inductor centres in the ODB++ frame (SOURCE.md "Power inductors", ODB (x, y) column).
TS_INDUCTORS_ODB = {
    "L2": (185.43, -121.63),
    "L3": (155.30, -114.85),
    "L4": (151.58, -106.95),
    "L5": (181.48, -113.64),
}


@cache
def _board(path: str, route: str, config: str | None = None) -> Board:
    return load_package(path, route=route, config=config)  # type: ignore[arg-type]


@pytest.fixture(scope="module")
def cam_config(tmp_path_factory: pytest.TempPathFactory) -> str:
    p = tmp_path_factory.mktemp("cam") / "fluxshadow.toml"
    p.write_text(CAM_LAYERS, encoding="utf-8")
    return str(p)


def _matrix_rows(board: Board) -> list[int]:
    return [int(lay.detail.split("matrix row ")[1].split()[0]) for lay in board.layers]


@pytest.mark.parametrize(("name", "n_layers"), [(TS, 6), (CAM, 2)])
def test_every_odb_package_loads_in_matrix_order(
    realboard_odb: Callable[[str], Path], name: str, n_layers: int
) -> None:
    board = _board(str(realboard_odb(name)), "auto")
    assert board.route == "odb"
    assert "matrix/matrix" in board.route_detail
    assert len(board.layers) == n_layers
    assert [lay.name for lay in board.layers] == [f"L{i + 1}" for i in range(n_layers)]
    assert all(lay.identified_by == "odb-matrix" for lay in board.layers)
    rows = _matrix_rows(board)
    assert rows == sorted(rows)
    assert len(set(rows)) == len(rows)
    assert board.layers[0].side == "top"
    assert board.layers[-1].side == "bottom"
    # Plausible copper: every layer has some, none has more than the board's area.
    assert board.outline is not None
    board_mm2 = board.outline.board.area
    for art in board.artworks:
        assert 0.05 * board_mm2 < art.copper_area_mm2() <= 1.01 * board_mm2


def test_thunderscope_matrix_rows_and_inductor_positions(
    realboard_odb: Callable[[str], Path],
) -> None:
    board = _board(str(realboard_odb(TS)), "auto")
    # SOURCE.md copper-layer table: rows 5, 7, 9, 11, 13, 15.
    assert _matrix_rows(board) == [5, 7, 9, 11, 13, 15]
    assert board.frame_fit.method == "package frame"
    found = {m.ref: (m.x_mm, m.y_mm) for m in board.magnetics}
    assert set(found) == set(TS_INDUCTORS_ODB)
    for ref, xy in TS_INDUCTORS_ODB.items():
        np.testing.assert_allclose(found[ref], xy, atol=0.01)
    # L1 is placed in the job but marked not populated (SOURCE.md): excluded, with a reason.
    excluded = {e.ref: e.reason for e in board.excluded}
    assert "L1" in excluded
    assert "populated" in excluded["L1"]


def test_thunderscope_routes_agree(
    realboard: Callable[[str], Path], realboard_odb: Callable[[str], Path]
) -> None:
    g = _board(str(realboard(TS)), "auto")
    o = _board(str(realboard_odb(TS)), "auto")
    assert g.route == "gerber"
    assert o.route == "odb"
    assert [lay.name for lay in g.layers] == [lay.name for lay in o.layers]
    assert [lay.side for lay in g.layers] == [lay.side for lay in o.layers]
    mg = {m.ref: m for m in g.magnetics}
    mo = {m.ref: m for m in o.magnetics}
    assert set(mg) == set(mo)
    for ref, m in mg.items():
        np.testing.assert_allclose(
            np.array([mo[ref].x_mm, mo[ref].y_mm]) + TS_OFFSET_MM, [m.x_mm, m.y_mm], atol=0.05
        )
        w = (m.x_mm - 10.0, m.y_mm - 10.0, m.x_mm + 10.0, m.y_mm + 10.0)
        wo = (w[0] - TS_OFFSET_MM[0], w[1] - TS_OFFSET_MM[1])
        wo = (*wo, w[2] - TS_OFFSET_MM[0], w[3] - TS_OFFSET_MM[1])
        for lay, ag, ao in zip(g.layers, g.artworks, o.artworks, strict=True):
            a_g = ag.compose(w).area
            a_o = ao.compose(wo).area
            assert a_o == pytest.approx(a_g, rel=AREA_RTOL), (ref, lay.name)


def test_camjob_routes_agree_on_a_grid(
    realboard_odb: Callable[[str], Path], cam_config: str
) -> None:
    root = str(realboard_odb(CAM))
    o = _board(root, "auto")
    g = _board(root, "gerber", cam_config)
    assert g.route == "gerber"
    assert o.route == "odb"
    assert [lay.source for lay in g.layers] == ["gerber/tl", "gerber/bl"]
    assert not g.magnetics
    assert not o.magnetics
    assert o.outline is not None
    x0, y0, x1, y1 = o.outline.board.bounds
    xs, ys = np.linspace(x0, x1, 5), np.linspace(y0, y1, 5)
    compared = 0
    for ag, ao in zip(g.artworks, o.artworks, strict=True):
        for a in range(4):
            for b in range(4):
                w = (xs[a], ys[b], xs[a + 1], ys[b + 1])
                a_g, a_o = ag.compose(w).area, ao.compose(w).area
                if a_g < 1.0 and a_o < 1.0:
                    continue  # a window with no copper in either route
                assert a_o == pytest.approx(a_g, rel=AREA_RTOL), w
                compared += 1
    assert compared >= 20


def test_thunderscope_same_findings(
    realboard: Callable[[str], Path], realboard_odb: Callable[[str], Path]
) -> None:
    g = run_checks(_board(str(realboard(TS)), "auto"))
    o = run_checks(_board(str(realboard_odb(TS)), "auto"))

    def keys(report: object) -> list[tuple[str, str, str, str]]:
        return sorted(
            (f.rule, f.ref, f.layer, f.severity)
            for f in report.findings  # type: ignore[attr-defined]
            if f.rule != "assumption"
        )

    assert keys(o) == keys(g)
    assert len(keys(g)) > 10
    # The reports say which route they came from and keep to the published schema.
    schema = json.loads((Path(__file__).parents[2] / "docs" / "report.schema.json").read_text())
    for report, route in ((g, "gerber"), (o, "odb")):
        data = report_to_dict(report)
        jsonschema.validate(data, schema)
        assert data["route"] == route
    # The figures agree too: every numeric metric within 1 % (measured: at most 0.55 %,
    # a void ring's inner perimeter; arcs are linearised differently by the two writers).
    fo = {(f.rule, f.ref, f.layer): f.metrics for f in o.findings}
    for f in g.findings:
        other = fo[(f.rule, f.ref, f.layer)]
        for key, value in f.metrics.items():
            if isinstance(value, float) and abs(value) > 1e-9:
                assert other[key] == pytest.approx(value, rel=0.01), (f.rule, f.ref, key)


def test_odb_archives_load_like_the_folder(
    realboard_odb: Callable[[str], Path], tmp_path: Path
) -> None:
    """A .zip without a top-level folder and a .tgz with one read as the folder does."""
    job = realboard_odb(CAM) / "odb"
    zpath = tmp_path / "job.zip"
    with zipfile.ZipFile(zpath, "w", zipfile.ZIP_DEFLATED) as z:
        for f in sorted(job.rglob("*")):
            if f.is_file():
                z.write(f, f.relative_to(job).as_posix())
    tpath = tmp_path / "job.tgz"
    with tarfile.open(tpath, "w:gz") as t:
        t.add(job, arcname="2340080a_p2")
    ref = _board(str(job), "auto")
    for arch in (zpath, tpath):
        b = load_package(arch)
        assert b.route == "odb"
        assert b.package == str(arch)
        for a1, a2 in zip(ref.artworks, b.artworks, strict=True):
            assert a2.copper_area_mm2() == pytest.approx(a1.copper_area_mm2(), rel=1e-12)


def test_route_choice_errors_and_notices(
    realboard_odb: Callable[[str], Path], tmp_path: Path
) -> None:
    cam = realboard_odb(CAM)
    # auto prefers the ODB++ job and says that Gerber files were left unread
    board = _board(str(cam), "auto")
    assert any("only the ODB++ job was read" in str(n) for n in board.notices)
    assert any(f.use.startswith("gerber: not read") for f in board.files)
    # odb on a plain Gerber package: a clear error
    gerber_only = tmp_path / "g"
    shutil.copytree(cam / "gerber", gerber_only)
    with pytest.raises(InputError, match="ODB\\+\\+ job"):
        load_package(gerber_only, route="odb")
    # two jobs in one package: ambiguous, named
    two = tmp_path / "two"
    shutil.copytree(cam / "odb", two / "a")
    shutil.copytree(cam / "odb", two / "b")
    with pytest.raises(InputError, match="got 2: a, b"):
        load_package(two)
    # a config's [layers] map does not apply to an ODB++ job: a notice says so
    cfg = tmp_path / "c.toml"
    cfg.write_text(CAM_LAYERS, encoding="utf-8")
    b = load_package(cam, config=load_config(cfg))
    assert any("[layers] maps Gerber files" in str(n) for n in b.notices)


def test_stack_command_names_the_route(
    realboard_odb: Callable[[str], Path], cam_config: str
) -> None:
    cam = str(realboard_odb(CAM))
    runner = CliRunner()
    res = runner.invoke(app, ["stack", cam, "--format", "json"])
    assert res.exit_code == 0, res.output
    data = json.loads(res.stdout)
    assert data["route"]["name"] == "odb"
    assert [lay["identified_by"] for lay in data["layers"]] == ["odb-matrix"] * 2
    res = runner.invoke(app, ["stack", cam, "--route", "gerber", "--config", cam_config])
    assert res.exit_code == 0, res.output
    assert "Input route: Gerber/Excellon files" in res.stdout
    res = runner.invoke(app, ["stack", cam])
    assert "Input route: ODB++ job" in res.stdout
    assert "ODB++ matrix row 3 TL" in res.stdout


def test_archive_notices_name_the_archive_not_the_temporary_folder(
    realboard_odb: Callable[[str], Path], tmp_path: Path
) -> None:
    """An archive is unpacked into a temporary folder that is gone after loading: what the
    board says about its files names the archive instead."""
    arch = tmp_path / "job.tgz"
    with tarfile.open(arch, "w:gz") as t:
        t.add(realboard_odb(CAM) / "odb", arcname="odb")
    board = load_package(arch)
    assert board.notices
    texts = [n.file + " " + n.message for n in board.notices] + list(board.assumptions)
    assert any(str(arch) in t for t in texts)
    assert not any("fluxshadow-" in t for t in texts)
    assert board.outline is not None
    assert board.outline.source == "odb/steps/edit/profile"  # relative, as layer sources
