"""Batch runs: check many fabrication packages in parallel processes or on a cluster.

:func:`run_batch` checks every package (folder or archive) in worker processes
(:class:`concurrent.futures.ProcessPoolExecutor`) or, given a scheduler address, on a
Dask distributed cluster. Each worker loads and checks one package and returns plain
data (the JSON report as a dict, see :func:`fluxshadow.report.json_report.report_to_dict`),
never geometry, so results travel cheaply between processes. A package that cannot be
read (or fails in any other way) becomes a ``failed`` item with the error message; it
never stops the batch.

Example::

    from fluxshadow.batch import collect_packages, run_batch
    result = run_batch(collect_packages("boards/"), jobs=4)
    for item in result.items:
        print(item.package, item.status, item.worst)
"""

from __future__ import annotations

import contextlib
import multiprocessing
import os
import time
from collections.abc import Callable, Iterable, Mapping, Sequence
from concurrent.futures import ProcessPoolExecutor, as_completed
from dataclasses import dataclass
from pathlib import Path
from typing import Any

from threadpoolctl import threadpool_limits

from fluxshadow.checks.model import SEVERITY_RANK
from fluxshadow.errors import ConfigError, FluxshadowError, InputError

__all__ = [
    "ARCHIVE_SUFFIXES",
    "BatchItem",
    "BatchResult",
    "batch_to_text",
    "check_package",
    "collect_packages",
    "run_batch",
]

ARCHIVE_SUFFIXES = (".zip", ".tgz", ".tar.gz", ".tar")
"""File name endings taken as package archives when a folder of packages is scanned."""

BatchProgress = Callable[[int, int, "BatchItem"], None]


@dataclass(frozen=True, kw_only=True)
class BatchItem:
    """The outcome of one package of a batch.

    Attributes
    ----------
    package : str
        The package path as given.
    status : {"ok", "failed"}
        ``failed`` when the package could not be read or checked.
    error : str
        The error message of a failed package ("" when ok).
    seconds : float
        Wall time of load and check in the worker (s).
    magnetics : int
        Number of power magnetics checked.
    errors, warnings, notes : int
        Unwaived findings per severity.
    waived : int
        Waived findings.
    worst : str or None
        Worst unwaived severity, None when there is no finding (or the package failed).
    report : mapping or None
        The full JSON report as plain data; None for a failed package.
    """

    package: str
    status: str
    error: str = ""
    seconds: float = 0.0
    magnetics: int = 0
    errors: int = 0
    warnings: int = 0
    notes: int = 0
    waived: int = 0
    worst: str | None = None
    report: Mapping[str, Any] | None = None

    @property
    def ok(self) -> bool:
        """Whether the package was read and checked."""
        return self.status == "ok"

    def failed(self, fail_on: str) -> bool:
        """Whether this package fails ``--fail-on`` (a package that failed always does,
        except for ``never``)."""
        if fail_on == "never":
            return False
        if not self.ok:
            return True
        return self.worst is not None and SEVERITY_RANK[self.worst] >= SEVERITY_RANK[fail_on]

    def to_dict(self, *, with_report: bool = True) -> dict[str, Any]:
        """Plain data for the batch JSON output."""
        out: dict[str, Any] = {
            "package": self.package,
            "status": self.status,
            "error": self.error or None,
            "seconds": round(self.seconds, 3),
            "magnetics": self.magnetics,
            "findings": {"error": self.errors, "warning": self.warnings, "note": self.notes},
            "waived": self.waived,
            "worst": self.worst,
        }
        if with_report:
            out["report"] = dict(self.report) if self.report is not None else None
        return out

    @staticmethod
    def from_dict(data: Mapping[str, Any]) -> BatchItem:
        """Rebuild an item from the plain dict a worker returns."""
        report = data.get("report")
        if report is None:
            return BatchItem(
                package=str(data["package"]),
                status="failed",
                error=str(data.get("error") or "unknown failure"),
                seconds=float(data.get("seconds", 0.0)),
            )
        summary = report["summary"]
        counts = summary["findings"]
        return BatchItem(
            package=str(data["package"]),
            status="ok",
            seconds=float(data.get("seconds", 0.0)),
            magnetics=int(summary["magnetics"]),
            errors=int(counts["error"]),
            warnings=int(counts["warning"]),
            notes=int(counts["note"]),
            waived=int(summary["waived"]),
            worst=summary["worst"],
            report=report,
        )


@dataclass(frozen=True, kw_only=True)
class BatchResult:
    """All items of a batch, in the order the packages were given.

    ``backend`` is ``"local"`` (this process), ``"processes"`` or ``"dask"``; ``jobs`` the
    number of worker processes (0 for a cluster); ``seconds`` the wall time of the batch.
    """

    items: tuple[BatchItem, ...]
    seconds: float
    jobs: int
    backend: str
    scheduler: str = ""

    @property
    def n_failed(self) -> int:
        """Packages that could not be read or checked."""
        return sum(1 for it in self.items if not it.ok)

    def failed(self, fail_on: str) -> bool:
        """Whether any package fails ``fail_on`` (see :meth:`BatchItem.failed`)."""
        return any(it.failed(fail_on) for it in self.items)

    def to_dict(self, *, with_reports: bool = True) -> dict[str, Any]:
        """Plain data for ``fluxshadow batch --format json``."""
        totals = {"error": 0, "warning": 0, "note": 0}
        for it in self.items:
            totals["error"] += it.errors
            totals["warning"] += it.warnings
            totals["note"] += it.notes
        return {
            "batch_schema_version": 1,
            "backend": self.backend,
            "scheduler": self.scheduler or None,
            "jobs": self.jobs,
            "seconds": round(self.seconds, 3),
            "summary": {
                "packages": len(self.items),
                "ok": len(self.items) - self.n_failed,
                "failed": self.n_failed,
                "magnetics": sum(it.magnetics for it in self.items),
                "findings": totals,
            },
            "packages": [it.to_dict(with_report=with_reports) for it in self.items],
        }


# --------------------------------------------------------------------------- packages


def _is_archive(p: Path) -> bool:
    name = p.name.lower()
    return p.is_file() and any(name.endswith(s) for s in ARCHIVE_SUFFIXES)


def collect_packages(source: str | os.PathLike[str]) -> list[Path]:
    """The packages named by a folder of packages or by a list file.

    Parameters
    ----------
    source : path
        A folder whose sub-folders and archives (``.zip``, ``.tgz``, ``.tar.gz``, ``.tar``)
        are packages (hidden entries skipped; sorted by name), or a text file listing one
        package path per line (blank lines and ``#`` comments skipped; relative paths are
        taken relative to the list file's folder; order kept).

    Returns
    -------
    list of Path

    Raises
    ------
    InputError
        ``source`` does not exist, a listed path does not exist, or no package is found.
    """
    src = Path(source)
    shown = os.fspath(source)
    if src.is_dir():
        found = sorted(
            p
            for p in src.iterdir()
            if not p.name.startswith(".") and (p.is_dir() or _is_archive(p))
        )
        if not found:
            msg = (
                "batch folder must hold package folders or archives (.zip, .tgz, .tar.gz); got none"
            )
            raise InputError(msg, file=shown)
        return found
    if not src.is_file():
        msg = f"batch source must be a folder of packages or a list file; got {shown!r}"
        raise InputError(msg, file=shown)
    if _is_archive(src):
        msg = "batch source must be a folder of packages or a list file; got an archive"
        raise InputError(msg, file=shown)
    try:
        raw = src.read_bytes()
    except OSError as exc:
        msg = f"package list must be readable; got {exc.strerror or exc}"
        raise InputError(msg, file=shown) from exc
    if len(raw) > 10_000_000 or b"\0" in raw:
        msg = "package list must be a text file with one path per line; got binary or huge data"
        raise InputError(msg, file=shown)
    out: list[Path] = []
    for lineno, line in enumerate(raw.decode("utf-8", errors="replace").splitlines(), 1):
        text = line.strip()
        if not text or text.startswith("#"):
            continue
        p = Path(text).expanduser()
        if not p.is_absolute():
            p = src.parent / p
        if not p.exists():
            msg = f"listed package must exist; got {text!r}"
            raise InputError(msg, file=shown, line=lineno)
        out.append(p)
    if not out:
        raise InputError("package list must name at least one package; got none", file=shown)
    return out


# --------------------------------------------------------------------------- one package


def check_package(
    path: str, config: str | None = None, blas_threads: int | None = None
) -> dict[str, Any]:
    """Load and check one package; the worker function of a batch.

    Never raises for a bad package: the error is returned.

    Parameters
    ----------
    path : str
        The package (folder or archive).
    config : str, optional
        A ``fluxshadow.toml`` used for this package (default: the one found beside or
        inside it).
    blas_threads : int, optional
        Threads the BLAS library (the sheet solver's dense algebra) may use while this
        package is checked; default: as configured in the process. Worker processes
        sharing a machine get ``cores // workers``: with every worker's BLAS spinning on
        all cores the batch was measured 3 times slower (33.6 s against 11.4 s for 50
        packages on 2 workers).

    Returns
    -------
    dict
        ``{"package", "seconds", "report", "error"}``: ``report`` is the JSON report as a
        plain dict (None on failure), ``error`` the message ("" when ok).
    """
    from fluxshadow.board.load import load_package
    from fluxshadow.checks.run import run_checks
    from fluxshadow.report.json_report import report_to_dict

    t0 = time.perf_counter()
    limit = (
        threadpool_limits(limits=blas_threads, user_api="blas")
        if blas_threads is not None
        else contextlib.nullcontext()
    )
    try:
        with limit:
            board = load_package(path, config=config)
            report: dict[str, Any] | None = report_to_dict(run_checks(board))
        error = ""
    except FluxshadowError as exc:
        report, error = None, str(exc)
    except OSError as exc:
        report, error = None, f"{path}: package must be readable; got {exc}"
    except MemoryError:
        report, error = None, f"{path}: checking ran out of memory"
    except Exception as exc:  # noqa: BLE001 - one bad package must never stop the batch
        report, error = None, f"{path}: internal error {type(exc).__name__}: {exc}"
    return {
        "package": path,
        "seconds": time.perf_counter() - t0,
        "report": report,
        "error": error,
    }


# --------------------------------------------------------------------------- runners


def _mp_context() -> Any:
    methods = multiprocessing.get_all_start_methods()
    if "forkserver" in methods:
        ctx = multiprocessing.get_context("forkserver")
        # The server imports the heavy modules once; each worker forks from it.
        ctx.set_forkserver_preload(
            [
                "fluxshadow.batch",
                "fluxshadow.board.load",
                "fluxshadow.checks.run",
                "fluxshadow.report.json_report",
            ]
        )
        return ctx
    return multiprocessing.get_context("spawn")


def _run_processes(
    paths: Sequence[str],
    config: str | None,
    jobs: int,
    report: Callable[[int, dict[str, Any]], None],
) -> None:
    with ProcessPoolExecutor(max_workers=jobs, mp_context=_mp_context()) as pool:
        threads = max(1, (os.cpu_count() or 1) // jobs)
        futures = {pool.submit(check_package, p, config, threads): i for i, p in enumerate(paths)}
        for fut in as_completed(futures):
            i = futures[fut]
            try:
                data = fut.result()
            except Exception as exc:  # noqa: BLE001 - a worker died (killed, out of memory)
                data = {
                    "package": paths[i],
                    "seconds": 0.0,
                    "report": None,
                    "error": f"{paths[i]}: worker process failed ({type(exc).__name__}: {exc})",
                }
            report(i, data)


def _run_dask(
    paths: Sequence[str],
    config: str | None,
    scheduler: str,
    report: Callable[[int, dict[str, Any]], None],
    timeout_s: float,
) -> None:
    try:
        from distributed import Client  # type: ignore[import-not-found,unused-ignore]
        from distributed import as_completed as dask_completed  # type: ignore[import-not-found,unused-ignore]
    except ImportError:
        msg = (
            "--scheduler needs the optional 'distributed' package (pip install "
            "'fluxshadow[cluster]'); got it not installed"
        )
        raise ConfigError(msg) from None
    try:
        client = Client(scheduler, timeout=timeout_s)  # type: ignore[no-untyped-call]
    except (OSError, TimeoutError) as exc:
        msg = f"scheduler must be reachable at {scheduler!r}; got {type(exc).__name__}: {exc}"
        raise InputError(msg) from None
    with client:
        futures = client.map(check_package, list(paths), config=config, pure=False)
        index = {f.key: i for i, f in enumerate(futures)}
        for fut in dask_completed(futures):  # type: ignore[no-untyped-call]
            i = index[fut.key]
            try:
                data = fut.result()
            except Exception as exc:  # noqa: BLE001 - a cluster worker died or lost the task
                data = {
                    "package": paths[i],
                    "seconds": 0.0,
                    "report": None,
                    "error": f"{paths[i]}: cluster task failed ({type(exc).__name__}: {exc})",
                }
            report(i, data)


def run_batch(
    paths: Iterable[str | os.PathLike[str]],
    *,
    jobs: int | None = None,
    scheduler: str | None = None,
    config: str | os.PathLike[str] | None = None,
    progress: BatchProgress | None = None,
    connect_timeout_s: float = 30.0,
) -> BatchResult:
    """Check many packages in parallel.

    Parameters
    ----------
    paths : iterable of path
        Packages (folders or archives), e.g. from :func:`collect_packages`.
    jobs : int, optional
        Worker processes (default: the CPU count, at most the number of packages); 1 runs
        every package in this process. Ignored with ``scheduler``.
    scheduler : str, optional
        Address of a Dask distributed scheduler (``tcp://host:8786``); the packages must
        be readable at the same paths on the cluster's workers. Needs the optional
        ``distributed`` package.
    config : path, optional
        One ``fluxshadow.toml`` for every package (default: each package's own).
    progress : callable, optional
        Called as ``progress(done, total, item)`` after each package finishes.
    connect_timeout_s : float
        How long to wait for the scheduler (s).

    Returns
    -------
    BatchResult
        Items in the order of ``paths``.

    Raises
    ------
    ConfigError
        ``jobs`` below 1, or ``scheduler`` given without the ``distributed`` package.
    InputError
        The scheduler cannot be reached.
    """
    names = [os.fspath(p) for p in paths]
    cfg = os.fspath(config) if config is not None else None
    if jobs is not None and jobs < 1:
        raise ConfigError(f"jobs must be >= 1; got {jobs}")
    n_jobs = min(jobs or os.cpu_count() or 1, max(len(names), 1))
    results: list[BatchItem | None] = [None] * len(names)
    done = 0

    def record(i: int, data: dict[str, Any]) -> None:
        nonlocal done
        item = BatchItem.from_dict(data)
        results[i] = item
        done += 1
        if progress is not None:
            progress(done, len(names), item)

    t0 = time.perf_counter()
    if scheduler:
        backend, n_jobs = "dask", 0
        _run_dask(names, cfg, scheduler, record, connect_timeout_s)
    elif n_jobs == 1 or len(names) <= 1:
        backend, n_jobs = "local", 1
        for i, p in enumerate(names):
            record(i, check_package(p, cfg))
    else:
        backend = "processes"
        _run_processes(names, cfg, n_jobs, record)
    items = tuple(it for it in results if it is not None)
    return BatchResult(
        items=items,
        seconds=time.perf_counter() - t0,
        jobs=n_jobs,
        backend=backend,
        scheduler=scheduler or "",
    )


def batch_to_text(result: BatchResult, *, width: int = 110, color: bool = False) -> str:
    """The batch summary as a table, followed by the error message of each failed package.

    Parameters
    ----------
    result : BatchResult
    width : int
        Characters per line.
    color : bool
        Keep terminal colour codes.

    Returns
    -------
    str
    """
    from io import StringIO

    from rich.console import Console
    from rich.table import Table

    table = Table(title=None, show_lines=False, header_style="bold")
    for name, justify in (
        ("package", "left"),
        ("status", "left"),
        ("magnetics", "right"),
        ("errors", "right"),
        ("warnings", "right"),
        ("notes", "right"),
        ("worst", "left"),
        ("seconds", "right"),
    ):
        table.add_column(name, justify=justify, overflow="fold")  # type: ignore[arg-type]
    style = {"error": "red", "warning": "yellow", "note": "cyan"}
    for it in result.items:
        worst = it.worst or "-"
        table.add_row(
            it.package,
            "ok" if it.ok else "[red]failed[/]",
            str(it.magnetics) if it.ok else "-",
            str(it.errors) if it.ok else "-",
            str(it.warnings) if it.ok else "-",
            str(it.notes) if it.ok else "-",
            f"[{style[worst]}]{worst}[/]" if worst in style else worst,
            f"{it.seconds:.1f}",
        )
    buf = StringIO()
    console = Console(
        file=buf, width=width, force_terminal=color, no_color=not color, highlight=False
    )
    console.print(table)
    data = result.to_dict(with_reports=False)["summary"]
    if result.backend == "dask":
        where = f"the cluster at {result.scheduler}"
    elif result.backend == "local":
        where = "one process"
    else:
        where = f"{result.jobs} worker processes"
    console.print(
        f"{data['packages']} packages ({data['ok']} ok, {data['failed']} failed), "
        f"{data['magnetics']} magnetics; {result.seconds:.1f} s on {where}",
        markup=False,
    )
    for it in result.items:
        if not it.ok:
            console.print(f"failed: {it.error}", markup=False, soft_wrap=True)
    return buf.getvalue()
