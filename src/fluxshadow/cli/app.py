"""The ``fluxshadow`` command (typer). Thin: parse options, call the library, print.

Exit codes: 0 success, 2 a usage or input error (message on stderr, no traceback).
Data goes to stdout (or ``--output``), progress and messages to stderr.
"""

from __future__ import annotations

import os
import sys
import tempfile
from collections.abc import Callable
from dataclasses import replace
from enum import StrEnum
from pathlib import Path
from typing import Annotated, Any, assert_never

import typer
from rich.console import Console

from fluxshadow import __version__
from fluxshadow.board.load import load_package
from fluxshadow.board.model import Board
from fluxshadow.board.summary import parts_summary, stack_summary
from fluxshadow.checks.model import Report
from fluxshadow.checks.run import run_checks
from fluxshadow.errors import FluxshadowError
from fluxshadow.report.html import report_to_html
from fluxshadow.report.inventory import parts_text, stack_text, to_json
from fluxshadow.report.json_report import report_to_json
from fluxshadow.report.junit import report_to_junit
from fluxshadow.report.sarif import report_to_sarif
from fluxshadow.report.terminal import report_to_text

__all__ = ["app", "main"]

app = typer.Typer(
    name="fluxshadow",
    help="What copper lies under every power magnetic of a PCB, from fabrication files.",
    add_completion=False,
    no_args_is_help=True,
    pretty_exceptions_enable=False,
)
_err = Console(stderr=True, highlight=False)


class Format(StrEnum):
    """Output formats of the inventory commands."""

    text = "text"
    json = "json"


class CheckFormat(StrEnum):
    """Output formats of ``check`` and ``demo``."""

    text = "text"
    json = "json"
    sarif = "sarif"
    junit = "junit"
    html = "html"


class RouteChoice(StrEnum):
    """Which files of a package are read."""

    auto = "auto"
    gerber = "gerber"
    odb = "odb"


class FailOn(StrEnum):
    """Lowest unwaived severity that makes ``check`` exit with 1."""

    error = "error"
    warning = "warning"
    note = "note"
    never = "never"


PackageArg = Annotated[
    Path,
    typer.Argument(help="Fabrication package: a folder, a .zip or a .tgz.", show_default=False),
]
FormatOpt = Annotated[Format, typer.Option("--format", "-f", help="Output format.")]
CheckFormatOpt = Annotated[
    CheckFormat,
    typer.Option(
        "--format",
        "-f",
        help="Output format: text, json, sarif (SARIF 2.1.0), junit (JUnit XML) or html "
        "(one self-contained page).",
    ),
]
ConfigOpt = Annotated[
    Path | None,
    typer.Option("--config", "-c", help="fluxshadow.toml to use (default: beside the package)."),
]
OutputOpt = Annotated[
    Path | None, typer.Option("--output", "-o", help="Write the output to this file.")
]
RouteOpt = Annotated[
    RouteChoice,
    typer.Option(
        "--route",
        help="Input route: odb reads an ODB++ job, gerber the Gerber/Excellon files; auto "
        "takes the ODB++ job when the package holds one.",
    ),
]


def _fail(exc: Exception) -> typer.Exit:
    # Plain text, never wrapped: the message names file:line and must stay greppable.
    typer.echo(f"error: {exc}", err=True)
    return typer.Exit(code=2)


def _load(package: Path, config: Path | None, route: RouteChoice = RouteChoice.auto) -> Board:
    def say(msg: str) -> None:
        if sys.stderr.isatty():
            _err.print(f"[dim]{msg}...[/]")

    return load_package(package, config=config, progress=say, route=route.value)


def _emit(text: str, output: Path | None) -> None:
    """Write to stdout, or atomically to ``output`` (temp file + rename)."""
    if output is None:
        sys.stdout.write(text)
        return
    output.parent.mkdir(parents=True, exist_ok=True)
    fd, tmp = tempfile.mkstemp(prefix=f".{output.name}.", dir=output.parent)
    try:
        with os.fdopen(fd, "w", encoding="utf-8") as f:
            f.write(text)
        os.replace(tmp, output)
    except BaseException:
        Path(tmp).unlink(missing_ok=True)
        raise


def _inventory(
    package: Path,
    config: Path | None,
    output: Path | None,
    fmt: Format,
    summarize: Callable[[Board], dict[str, Any]],
    as_text: Callable[[dict[str, Any]], str],
    route: RouteChoice,
) -> None:
    try:
        summary = summarize(_load(package, config, route))
        _emit(to_json(summary) if fmt is Format.json else as_text(summary), output)
    except (FluxshadowError, OSError) as exc:
        raise _fail(exc) from None


@app.command()
def stack(
    package: PackageArg,
    fmt: FormatOpt = Format.text,
    config: ConfigOpt = None,
    output: OutputOpt = None,
    route: RouteOpt = RouteChoice.auto,
) -> None:
    """List the copper layers top to bottom: identity, polarity, area, stack-up."""
    _inventory(package, config, output, fmt, stack_summary, stack_text, route)


@app.command()
def parts(
    package: PackageArg,
    fmt: FormatOpt = Format.text,
    config: ConfigOpt = None,
    output: OutputOpt = None,
    route: RouteOpt = RouteChoice.auto,
) -> None:
    """List the power magnetics found and excluded, and the placement frame fit."""
    _inventory(package, config, output, fmt, parts_summary, parts_text, route)


FailOpt = Annotated[
    FailOn,
    typer.Option("--fail-on", help="Exit with 1 when an unwaived finding is at or above this."),
]
PicturesOpt = Annotated[
    Path | None,
    typer.Option(
        "--pictures",
        help="Also write pictures (layer strips, field maps, overview; SVG and PNG) here.",
    ),
]


def _pictures(report: Report, board: Board, folder: Path | None) -> None:
    if folder is None:
        return
    from fluxshadow.report.pictures import render_pictures

    written = render_pictures(report, board, folder)
    _err.print(f"{len(written)} pictures written to {folder}")


def _check_board(board: Board) -> Report:
    if not sys.stderr.isatty() or not board.magnetics:
        return run_checks(board)
    from rich.progress import Progress

    with Progress(console=_err, transient=True) as bar:
        task = bar.add_task("checking magnetics", total=len(board.magnetics))

        def step(done: int, total: int, ref: str) -> None:
            bar.update(task, completed=done, description=f"checked {ref}")

        return run_checks(board, progress=step)


def _render(report: Report, fmt: CheckFormat, output: Path | None, fail_on: FailOn) -> str:
    match fmt:
        case CheckFormat.json:
            return report_to_json(report)
        case CheckFormat.sarif:
            return report_to_sarif(report)
        case CheckFormat.junit:
            return report_to_junit(report, fail_on=fail_on.value)
        case CheckFormat.html:
            return report_to_html(report)
        case CheckFormat.text:
            color = output is None and sys.stdout.isatty()
            width = _err.size.width if color else 110
            return report_to_text(report, width=max(width, 80), color=color)
        case _:
            assert_never(fmt)


@app.command()
def check(
    package: PackageArg,
    fmt: CheckFormatOpt = CheckFormat.text,
    config: ConfigOpt = None,
    output: OutputOpt = None,
    fail_on: FailOpt = FailOn.error,
    pictures: PicturesOpt = None,
    route: RouteOpt = RouteChoice.auto,
) -> None:
    """Check every power magnetic: voids, rings, cut-outs, exposed traces.

    Exit codes: 0 no unwaived finding at or above --fail-on, 1 some, 2 bad input.
    """
    try:
        board = _load(package, config, route)
        report = _check_board(board)
        _emit(_render(report, fmt, output, fail_on), output)
        _pictures(report, board, pictures)
    except (FluxshadowError, OSError) as exc:
        raise _fail(exc) from None
    if report.failed(fail_on.value):
        raise typer.Exit(code=1)


@app.command()
def demo(
    write: Annotated[
        Path | None,
        typer.Option("--write", help="Also write the demo package into this folder."),
    ] = None,
    fmt: CheckFormatOpt = CheckFormat.text,
    output: OutputOpt = None,
    fail_on: FailOpt = FailOn.never,
    pictures: PicturesOpt = None,
) -> None:
    """Write the bundled fictional demo board and check it."""
    from fluxshadow.synth.demo import demo_board
    from fluxshadow.synth.writer import write_package

    try:
        with tempfile.TemporaryDirectory(prefix="fluxshadow-demo-") as tmp:
            folder = write if write is not None else Path(tmp) / "demo"
            write_package(demo_board(), folder)
            if write is not None:
                _err.print(f"demo package written to {folder}")
            board = _load(folder, None)
            report = replace(_check_board(board), package="bundled demo (QX-40 rail board)")
            _emit(_render(report, fmt, output, fail_on), output)
            _pictures(report, board, pictures)
    except (FluxshadowError, OSError) as exc:
        raise _fail(exc) from None
    if report.failed(fail_on.value):
        raise typer.Exit(code=1)


@app.command()
def compare(
    package: PackageArg,
    fill: Annotated[
        list[str] | None,
        typer.Option("--fill", help="REF:LAYER - fill the part's zone on LAYER with plane copper."),
    ] = None,
    cut: Annotated[
        list[str] | None,
        typer.Option(
            "--cut",
            help="REF:LAYER - clear the part's zone on LAYER; REF:through mills under the part.",
        ),
    ] = None,
    fmt: FormatOpt = Format.text,
    config: ConfigOpt = None,
    output: OutputOpt = None,
    route: RouteOpt = RouteChoice.auto,
) -> None:
    """Check the board as built and with a void filled or cut; show every figure that changes."""
    from fluxshadow.checks.compare import compare as run_compare
    from fluxshadow.checks.compare import parse_edit
    from fluxshadow.report.compare_report import comparison_to_json, comparison_to_text

    try:
        edits = [parse_edit(t, "fill") for t in fill or []]
        edits += [parse_edit(t, "cut") for t in cut or []]
        board = _load(package, config, route)
        result = run_compare(board, edits)
        text = comparison_to_json(result) if fmt is Format.json else comparison_to_text(result)
        _emit(text, output)
    except (FluxshadowError, OSError) as exc:
        raise _fail(exc) from None


@app.command()
def batch(
    source: Annotated[
        Path,
        typer.Argument(
            help="A folder whose sub-folders and archives are packages, or a text file "
            "listing package paths (one per line).",
            show_default=False,
        ),
    ],
    jobs: Annotated[
        int | None,
        typer.Option("--jobs", "-j", min=1, help="Worker processes (default: CPU count)."),
    ] = None,
    fmt: FormatOpt = Format.text,
    output: OutputOpt = None,
    config: Annotated[
        Path | None,
        typer.Option("--config", "-c", help="One fluxshadow.toml for every package."),
    ] = None,
    scheduler: Annotated[
        str | None,
        typer.Option(
            "--scheduler",
            help="Run on a Dask distributed cluster at this address (tcp://host:port).",
        ),
    ] = None,
    fail_on: FailOpt = FailOn.error,
) -> None:
    """Check many packages in parallel and print one summary line per package.

    Exit codes: 0 no package at or above --fail-on, 1 some (a package that could not be
    read counts, except with --fail-on never), 2 bad usage.
    """
    from fluxshadow.batch import batch_to_text, collect_packages, run_batch

    try:
        paths = collect_packages(source)
        if sys.stderr.isatty():
            from rich.progress import Progress

            with Progress(console=_err, transient=True) as bar:
                task = bar.add_task("checking packages", total=len(paths))

                def step(done: int, total: int, item: Any) -> None:
                    bar.update(
                        task, completed=done, description=f"checked {Path(item.package).name}"
                    )

                result = run_batch(
                    paths, jobs=jobs, scheduler=scheduler, config=config, progress=step
                )
        else:
            result = run_batch(paths, jobs=jobs, scheduler=scheduler, config=config)
        if fmt is Format.json:
            import json

            text = json.dumps(result.to_dict(), indent=2, ensure_ascii=False) + "\n"
        else:
            color = output is None and sys.stdout.isatty()
            width = _err.size.width if color else 110
            text = batch_to_text(result, width=max(width, 80), color=color)
        _emit(text, output)
    except (FluxshadowError, OSError) as exc:
        raise _fail(exc) from None
    if result.failed(fail_on.value):
        raise typer.Exit(code=1)


def _version(value: bool) -> None:
    if value:
        typer.echo(f"fluxshadow {__version__}")
        raise typer.Exit()


@app.callback()
def _root(
    version: Annotated[
        bool, typer.Option("--version", callback=_version, is_eager=True, help="Show the version.")
    ] = False,
) -> None:
    """fluxshadow: copper under power magnetics, from fabrication files."""


def main() -> None:
    """Console-script entry point."""
    app()
