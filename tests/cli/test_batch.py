"""Batch runs: package collection, parallel processes, a Dask cluster, the CLI command."""

from __future__ import annotations

import functools
import io
import json
import os
import shutil
import sys
import zipfile
from collections.abc import Callable
from pathlib import Path

import pytest
from typer.testing import CliRunner

from fluxshadow.batch import (
    BatchItem,
    BatchResult,
    batch_to_text,
    check_package,
    collect_packages,
    run_batch,
)
from fluxshadow.board.load import load_package
from fluxshadow.checks.run import run_checks
from fluxshadow.cli import app as app_module
from fluxshadow.cli.app import app
from fluxshadow.errors import ConfigError, InputError
from fluxshadow.report.json_report import report_to_dict
from fluxshadow.synth.demo import demo_board
from fluxshadow.synth.writer import write_package

REPO = Path(__file__).resolve().parents[2]
MINI4 = REPO / "fixtures" / "mini4"

runner = CliRunner()


@pytest.fixture(scope="module")
def batch_dir(tmp_path_factory: pytest.TempPathFactory) -> Path:
    """demo/ and mini4/ folders, mini4 as a zip, a folder without copper, a broken zip."""
    root = tmp_path_factory.mktemp("batch")
    write_package(demo_board(), root / "demo")
    shutil.copytree(MINI4, root / "mini4")
    with zipfile.ZipFile(root / "mini4-zipped.zip", "w") as zf:
        for f in sorted(MINI4.rglob("*")):
            if f.is_file():
                zf.write(f, f.relative_to(MINI4).as_posix())
    (root / "nocopper").mkdir()
    (root / "nocopper" / "readme.txt").write_text("nothing here\n")
    (root / "broken.zip").write_bytes(b"PK\x03\x04 this is not a zip archive")
    (root / ".hidden").mkdir()
    (root / "notes.txt").write_text("not a package\n")
    return root


@functools.cache
def _direct(path: Path) -> dict[str, object]:
    return report_to_dict(run_checks(load_package(path)))


# --------------------------------------------------------------------------- collect


def test_collect_folder_takes_subfolders_and_archives_sorted(batch_dir: Path) -> None:
    names = [p.name for p in collect_packages(batch_dir)]
    assert names == ["broken.zip", "demo", "mini4", "mini4-zipped.zip", "nocopper"]


def test_collect_list_file_keeps_order_skips_comments_and_resolves_relative(
    batch_dir: Path, tmp_path: Path
) -> None:
    lst = batch_dir / "list.txt"
    lst.write_text(f"# packages\n\nmini4\n  {batch_dir / 'demo'}  \n# end\n")
    try:
        assert collect_packages(lst) == [batch_dir / "mini4", batch_dir / "demo"]
    finally:
        lst.unlink()
    bad = tmp_path / "bad.txt"
    bad.write_text("# first\n\nno-such-package\n")
    with pytest.raises(InputError, match=r"bad\.txt:3: listed package must exist"):
        collect_packages(bad)
    empty = tmp_path / "empty.txt"
    empty.write_text("# nothing\n")
    with pytest.raises(InputError, match="at least one package"):
        collect_packages(empty)
    with pytest.raises(InputError, match="must be a folder of packages"):
        collect_packages(tmp_path / "missing")
    (tmp_path / "emptydir").mkdir()
    with pytest.raises(InputError, match="got none"):
        collect_packages(tmp_path / "emptydir")


# --------------------------------------------------------------------------- run


def test_check_package_returns_plain_data_and_never_raises(batch_dir: Path) -> None:
    ok = check_package(str(batch_dir / "mini4"))
    assert ok["error"] == ""
    assert ok["report"] == _direct(batch_dir / "mini4")
    # Plain JSON data only: it round-trips through json unchanged.
    assert json.loads(json.dumps(ok["report"])) == ok["report"]
    bad = check_package(str(batch_dir / "nocopper"))
    assert bad["report"] is None
    assert "at least one copper Gerber layer" in bad["error"]
    missing = check_package(str(batch_dir / "missing"))
    assert "does not exist" in missing["error"]


def test_check_package_limits_blas_threads_while_checking(
    batch_dir: Path, monkeypatch: pytest.MonkeyPatch
) -> None:
    """A batch worker's BLAS runs on its share of the cores (threadpoolctl), then is
    restored; the figures do not depend on it."""
    import threadpoolctl

    from fluxshadow.checks import run as run_module

    seen: list[int] = []
    real = run_module.run_checks

    def spy(board: object) -> object:
        seen.extend(
            i["num_threads"] for i in threadpoolctl.threadpool_info() if i["user_api"] == "blas"
        )
        return real(board)  # type: ignore[arg-type]

    monkeypatch.setattr(run_module, "run_checks", spy)
    limited = check_package(str(batch_dir / "mini4"), None, 1)
    assert seen
    assert set(seen) == {1}
    assert limited["report"] == _direct(batch_dir / "mini4")


def test_processes_match_direct_checks_and_keep_order(batch_dir: Path) -> None:
    paths = collect_packages(batch_dir)
    seen: list[tuple[int, int]] = []
    result = run_batch(paths, jobs=2, progress=lambda d, t, _it: seen.append((d, t)))
    assert result.backend == "processes"
    assert result.jobs == 2
    assert [Path(it.package).name for it in result.items] == [p.name for p in paths]
    assert seen == [(i, len(paths)) for i in range(1, len(paths) + 1)]
    by = {Path(it.package).name: it for it in result.items}
    assert [n for n, it in by.items() if not it.ok] == ["broken.zip", "nocopper"]
    assert "zip" in by["broken.zip"].error
    for name in ("demo", "mini4"):
        direct = _direct(batch_dir / name)
        assert by[name].report == direct
        summary = direct["summary"]
        assert isinstance(summary, dict)
        assert by[name].magnetics == summary["magnetics"]
        assert by[name].warnings == summary["findings"]["warning"]
        assert by[name].worst == summary["worst"]
    # The zipped mini4 gives the same findings as the folder.
    zipped, folder = by["mini4-zipped.zip"].report, by["mini4"].report
    assert zipped is not None
    assert folder is not None
    assert zipped["findings"] == folder["findings"]
    assert result.n_failed == 2
    assert result.failed("never") is False
    assert result.failed("error") is True  # unreadable packages count as failures


def test_single_job_runs_in_process_with_same_figures(batch_dir: Path) -> None:
    result = run_batch([batch_dir / "mini4", batch_dir / "nocopper"], jobs=1)
    assert result.backend == "local"
    assert [it.status for it in result.items] == ["ok", "failed"]
    assert result.items[0].report == _direct(batch_dir / "mini4")


def test_jobs_below_one_is_a_config_error(batch_dir: Path) -> None:
    with pytest.raises(ConfigError, match="jobs must be >= 1; got 0"):
        run_batch([batch_dir / "mini4"], jobs=0)


def test_fail_on_over_items() -> None:
    ok_warn = BatchItem(package="a", status="ok", warnings=1, worst="warning")
    ok_clean = BatchItem(package="b", status="ok")
    broken = BatchItem(package="c", status="failed", error="c: bad")
    assert ok_warn.failed("warning")
    assert not ok_warn.failed("error")
    assert not ok_clean.failed("note")
    assert broken.failed("error")
    assert not broken.failed("never")
    res = BatchResult(items=(ok_warn, ok_clean), seconds=1.0, jobs=1, backend="local")
    assert res.failed("warning")
    assert not res.failed("error")
    text = batch_to_text(BatchResult(items=(ok_warn, broken), seconds=1, jobs=1, backend="local"))
    assert "failed: c: bad" in text
    assert "2 packages (1 ok, 1 failed)" in text


def test_missing_distributed_gives_a_clear_error(
    batch_dir: Path, monkeypatch: pytest.MonkeyPatch
) -> None:
    monkeypatch.setitem(sys.modules, "distributed", None)  # makes the import fail
    with pytest.raises(ConfigError, match="optional 'distributed' package"):
        run_batch([batch_dir / "mini4"], scheduler="tcp://127.0.0.1:1")
    result = runner.invoke(
        app, ["batch", str(batch_dir), "--scheduler", "tcp://127.0.0.1:1"], catch_exceptions=False
    )
    assert result.exit_code == 2
    assert "distributed" in result.stderr
    assert "Traceback" not in result.output


def test_dask_local_cluster_matches_processes(batch_dir: Path) -> None:
    distributed = pytest.importorskip("distributed")
    paths = [batch_dir / "mini4", batch_dir / "demo", batch_dir / "nocopper"]
    with distributed.LocalCluster(
        n_workers=2, processes=True, host="127.0.0.1", dashboard_address=None
    ) as cluster:
        result = run_batch(paths, scheduler=cluster.scheduler_address, connect_timeout_s=20)
    assert result.backend == "dask"
    assert [it.status for it in result.items] == ["ok", "ok", "failed"]
    assert result.items[0].report == _direct(batch_dir / "mini4")
    assert result.items[1].report == _direct(batch_dir / "demo")


# --------------------------------------------------------------------------- CLI


def test_cli_batch_json_and_exit_codes(batch_dir: Path, tmp_path: Path) -> None:
    lst = tmp_path / "two.txt"
    lst.write_text(f"{batch_dir / 'mini4'}\n{batch_dir / 'demo'}\n")
    out = tmp_path / "out" / "batch.json"
    result = runner.invoke(
        app, ["batch", str(lst), "-j", "2", "-f", "json", "-o", str(out), "--fail-on", "error"]
    )
    assert result.exit_code == 0, result.output
    data = json.loads(out.read_text())
    assert [Path(p["package"]).name for p in data["packages"]] == ["mini4", "demo"]
    assert data["summary"]["ok"] == 2
    assert data["summary"]["magnetics"] == sum(p["magnetics"] for p in data["packages"])
    assert data["packages"][0]["report"]["schema_version"] == 1
    # mini4 has warnings: --fail-on warning makes the batch fail.
    result = runner.invoke(app, ["batch", str(lst), "-j", "1", "--fail-on", "warning"])
    assert result.exit_code == 1
    assert "mini4" in result.stdout
    assert "warning" in result.stdout


def test_cli_batch_bad_package_is_exit_1_and_usage_is_exit_2(batch_dir: Path) -> None:
    result = runner.invoke(app, ["batch", str(batch_dir), "-j", "2", "--fail-on", "error"])
    assert result.exit_code == 1
    assert "failed: " in result.stdout
    assert "broken.zip" in result.stdout
    result = runner.invoke(app, ["batch", str(batch_dir / "nope")])
    assert result.exit_code == 2
    assert "must be a folder of packages" in result.stderr
    result = runner.invoke(app, ["batch", str(batch_dir), "--jobs", "0"])
    assert result.exit_code == 2


def test_interrupted_report_write_leaves_no_half_file(
    tmp_path: Path, monkeypatch: pytest.MonkeyPatch
) -> None:
    target = tmp_path / "report.json"
    target.write_text("old complete report\n")
    real_fdopen = os.fdopen

    class Exploding(io.StringIO):
        """Writes half of the text to the real file, then fails (disk full, signal)."""

        def __init__(self, fd: int) -> None:
            super().__init__()
            self.real = real_fdopen(fd, "w", encoding="utf-8")

        def write(self, s: str) -> int:
            self.real.write(s[: len(s) // 2])
            self.real.flush()
            raise OSError(28, "No space left on device")

        def close(self) -> None:
            self.real.close()
            super().close()

    def fake_fdopen(fd: int, *_a: object, **_k: object) -> Exploding:
        return Exploding(fd)

    monkeypatch.setattr(app_module.os, "fdopen", fake_fdopen)
    with pytest.raises(OSError, match="No space left"):
        app_module._emit("x" * 10_000, target)
    assert target.read_text() == "old complete report\n"
    assert sorted(p.name for p in tmp_path.iterdir()) == ["report.json"]

    def interrupted(*_a: object, **_k: object) -> None:
        raise KeyboardInterrupt

    monkeypatch.setattr(app_module.os, "fdopen", real_fdopen)
    monkeypatch.setattr(app_module.os, "replace", interrupted)
    with pytest.raises(KeyboardInterrupt):
        app_module._emit("new text\n", tmp_path / "fresh.json")
    assert sorted(p.name for p in tmp_path.iterdir()) == ["report.json"]


# --------------------------------------------------------------------------- real boards

_REAL = ("bq25798-mppt-v2.1", "cheap-focer-2", "huvud-tiny2")


@pytest.mark.realboards
def test_batch_over_real_boards_and_demo(realboard: Callable[[str], Path], batch_dir: Path) -> None:
    paths = [realboard(n) for n in _REAL] + [batch_dir / "demo"]
    result = run_batch(paths, jobs=2)
    assert [it.status for it in result.items] == ["ok"] * 4, [it.error for it in result.items]
    for it in result.items:
        assert it.report is not None
        assert it.magnetics == len(it.report["magnetics"]) >= 1
    direct = _direct(paths[0])
    assert result.items[0].report == direct


@pytest.mark.realboards
def test_batch_over_real_boards_and_demo_on_dask(
    realboard: Callable[[str], Path], batch_dir: Path
) -> None:
    distributed = pytest.importorskip("distributed")
    paths = [realboard(n) for n in _REAL] + [batch_dir / "demo"]
    result = run_batch(paths, jobs=2)
    with distributed.LocalCluster(
        n_workers=2, processes=True, host="127.0.0.1", dashboard_address=None
    ) as cluster:
        on_cluster = run_batch(paths, scheduler=cluster.scheduler_address, connect_timeout_s=20)
    assert [it.report for it in on_cluster.items] == [it.report for it in result.items]
