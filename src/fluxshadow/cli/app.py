"""The ``fluxshadow`` command (typer). Thin: parse options, call the library, print.

Exit codes: 0 success, 2 a usage or input error (message on stderr, no traceback).
Data goes to stdout (or ``--output``), progress and messages to stderr.
"""

from __future__ import annotations

import os
import sys
import tempfile
from enum import StrEnum
from pathlib import Path
from typing import Annotated

import typer
from rich.console import Console

from fluxshadow import __version__
from fluxshadow.board.load import load_package
from fluxshadow.board.model import Board
from fluxshadow.board.summary import parts_summary, stack_summary
from fluxshadow.errors import FluxshadowError
from fluxshadow.report.inventory import parts_text, stack_text, to_json

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


PackageArg = Annotated[
    Path,
    typer.Argument(help="Fabrication package: a folder, a .zip or a .tgz.", show_default=False),
]
FormatOpt = Annotated[Format, typer.Option("--format", "-f", help="Output format.")]
ConfigOpt = Annotated[
    Path | None,
    typer.Option("--config", "-c", help="fluxshadow.toml to use (default: beside the package)."),
]
OutputOpt = Annotated[
    Path | None, typer.Option("--output", "-o", help="Write the output to this file.")
]


def _fail(exc: Exception) -> typer.Exit:
    # Plain text, never wrapped: the message names file:line and must stay greppable.
    typer.echo(f"error: {exc}", err=True)
    return typer.Exit(code=2)


def _load(package: Path, config: Path | None) -> Board:
    def say(msg: str) -> None:
        if sys.stderr.isatty():
            _err.print(f"[dim]{msg}...[/]")

    return load_package(package, config=config, progress=say)


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


@app.command()
def stack(
    package: PackageArg,
    fmt: FormatOpt = Format.text,
    config: ConfigOpt = None,
    output: OutputOpt = None,
) -> None:
    """List the copper layers top to bottom: identity, polarity, area, stack-up."""
    try:
        board = _load(package, config)
        summary = stack_summary(board)
        text = to_json(summary) if fmt is Format.json else stack_text(summary)
        _emit(text, output)
    except (FluxshadowError, OSError) as exc:
        raise _fail(exc) from None


@app.command()
def parts(
    package: PackageArg,
    fmt: FormatOpt = Format.text,
    config: ConfigOpt = None,
    output: OutputOpt = None,
) -> None:
    """List the power magnetics found and excluded, and the placement frame fit."""
    try:
        board = _load(package, config)
        summary = parts_summary(board)
        text = to_json(summary) if fmt is Format.json else parts_text(summary)
        _emit(text, output)
    except (FluxshadowError, OSError) as exc:
        raise _fail(exc) from None


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
