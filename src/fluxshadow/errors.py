"""One error hierarchy for fluxshadow.

Every error a user can cause (bad files, bad config, bad options) is a
:class:`FluxshadowError`; the CLI turns it into a message and exit code 2, never a
traceback. Recoverable oddities are collected as :class:`Notice` records (and also
issued as :class:`ParseWarning` where a caller wants Python warnings).

Message shape: ``<file>:<line>: <what was expected>; got <what was found>``.
"""

from __future__ import annotations

from dataclasses import dataclass

__all__ = [
    "ConfigError",
    "FluxshadowError",
    "InputError",
    "LimitError",
    "Notice",
    "ParseError",
    "ParseWarning",
    "location",
]


def location(file: str | None, line: int | None = None) -> str:
    """Return ``file:line`` (or just ``file``, or ``""``) for a message prefix."""
    if not file:
        return ""
    return f"{file}:{line}" if line is not None else file


class FluxshadowError(Exception):
    """Base class of every error fluxshadow raises on purpose."""


class InputError(FluxshadowError, ValueError):
    """A file, folder or archive given by the user cannot be used."""

    def __init__(self, message: str, *, file: str | None = None, line: int | None = None):
        self.file = file
        self.line = line
        prefix = location(file, line)
        super().__init__(f"{prefix}: {message}" if prefix else message)


class ParseError(InputError):
    """A statement in an input file is malformed or unsupported.

    ``statement`` holds the offending text, shortened for display.
    """

    def __init__(
        self,
        message: str,
        *,
        file: str | None = None,
        line: int | None = None,
        statement: str | None = None,
    ):
        self.statement = statement
        if statement is not None:
            shown = statement if len(statement) <= 60 else statement[:57] + "..."
            message = f"{message} (statement {shown!r})"
        super().__init__(message, file=file, line=line)


class LimitError(InputError):
    """An input exceeds a configured safety limit (size, count, depth)."""


class ConfigError(FluxshadowError, ValueError):
    """The configuration (``fluxshadow.toml`` or options) names an unknown key or bad value."""


class ParseWarning(UserWarning):
    """A recoverable oddity in an input file (the file was still read)."""


@dataclass(frozen=True, kw_only=True)
class Notice:
    """A recoverable oddity found while reading, kept for the report.

    Attributes
    ----------
    file : str
        File the notice is about ("" for the package as a whole).
    line : int or None
        1-based line number, when known.
    message : str
        What happened and what was done about it.
    """

    file: str
    line: int | None
    message: str

    def __str__(self) -> str:
        prefix = location(self.file, self.line)
        return f"{prefix}: {self.message}" if prefix else self.message
