"""Package discovery: a folder, a ``.zip`` or a ``.tar.gz``/``.tgz``, every file classified.

:func:`open_package` is a context manager yielding :class:`~fluxshadow.io.records.PackageFiles`.
Archives are unpacked into a temporary folder that is removed on exit. Unpacking is
defensive: entries that would land outside the folder (absolute paths, ``..``, links or
device files in tar archives) are refused, and size limits (:class:`Limits`) are checked
on the headers *before* anything is written and enforced again while streaming (headers
can lie).

Classification is by content (the first :data:`HEAD_BYTES` bytes), not by extension:
Gerber, Excellon, placement, BOM (each reader's own sniffer decides), Gerber job file,
configuration (``fluxshadow.toml``), or other. UTF-16 and UTF-8 byte-order marks are
honoured before sniffing. Every file that could not be classified is listed in
``PackageFiles.unclassified``; files ignored on purpose (read-me and licence files,
documents and pictures, operating-system clutter) are ``OTHER`` without being listed there.
"""

from __future__ import annotations

import codecs
import contextlib
import os
import re
import stat
import tarfile
import tempfile
import zipfile
from collections.abc import Iterator
from dataclasses import dataclass, replace
from pathlib import Path, PurePosixPath
from typing import IO, Literal

from fluxshadow.errors import InputError, LimitError, Notice
from fluxshadow.io.excellon import looks_like_excellon
from fluxshadow.io.gerber import looks_like_gerber
from fluxshadow.io.placement import sniff_table
from fluxshadow.io.records import FileKind, PackageFiles

__all__ = [
    "CONFIG_FILE_NAME",
    "DEFAULT_LIMITS",
    "HEAD_BYTES",
    "Limits",
    "classify_head",
    "classify_path",
    "decode_head",
    "find_odb_jobs",
    "open_package",
    "scan_folder",
]

HEAD_BYTES = 64 * 1024
"""How much of each file classification reads (bytes)."""

CONFIG_FILE_NAME = "fluxshadow.toml"

_MiB = 1024 * 1024


@dataclass(frozen=True, kw_only=True)
class Limits:
    """Safety limits for packages and the files in them.

    Attributes
    ----------
    max_unpacked_bytes : int
        Largest total size an archive may unpack to (bytes; default 1 GiB).
    max_entries : int
        Most entries an archive, or files a folder, may hold (default 20,000).
    max_file_bytes : int
        Largest single file that is read (bytes; default 200 MB). Larger files in a
        folder or archive are left unread and reported (``OTHER``, unclassified, with a
        notice).
    max_ratio : float
        Largest compression ratio (inflated / compressed) allowed for an archive entry
        that inflates beyond ``ratio_min_bytes`` (default 200).
    ratio_min_bytes : int
        Size above which the ratio limit applies (bytes; default 50 MB).
    max_repeat : int
        Most copies one Gerber step-and-repeat may make (default 100,000).
    max_macro_depth : int
        Deepest nesting of Gerber macro expressions and block apertures (default 64).
    max_objects : int
        Most objects one Gerber file may expand to (default 20 million).
    max_vertices : int
        Most vertices one Gerber file may expand to (default 50 million).
    max_region_vertices : int
        Most vertices of one Gerber region, all contours (default 2 million).
    max_drill_features : int
        Most holes plus slots of one drill file (default 10 million).

    Every field can be set in the ``[limits]`` table of ``fluxshadow.toml``; a limit that
    is hit raises :class:`~fluxshadow.errors.LimitError` naming the field.
    """

    max_unpacked_bytes: int = 1024 * _MiB
    max_entries: int = 20_000
    max_file_bytes: int = 200 * 1000 * 1000
    max_ratio: float = 200.0
    ratio_min_bytes: int = 50 * 1000 * 1000
    max_repeat: int = 100_000
    max_macro_depth: int = 64
    max_objects: int = 20_000_000
    max_vertices: int = 50_000_000
    max_region_vertices: int = 2_000_000
    max_drill_features: int = 10_000_000


DEFAULT_LIMITS = Limits()

_SKIP_DIRS = {".git", ".hg", ".svn", "__MACOSX"}
_IGNORED_NAME = re.compile(
    r"(^|[^a-z])(readme|licen[cs]e|copying|notice|changelog|authors)([^a-z]|$)"
    r"|^source\.md$|^\.ds_store$|^thumbs\.db$|^desktop\.ini$|^\._",
    re.IGNORECASE,
)
_DOCUMENT_EXT = {".pdf", ".png", ".jpg", ".jpeg", ".gif", ".bmp", ".svg", ".md", ".html", ".htm"}
_MAGIC_DOCUMENT = (b"%PDF", b"\x89PNG", b"\xff\xd8\xff", b"GIF8", b"BM")
_MAGIC_ARCHIVE = (b"PK\x03\x04", b"PK\x05\x06", b"\x1f\x8b", b"BZh", b"\xfd7zXZ\x00", b"7z\xbc\xaf")


def _fmt_bytes(n: float) -> str:
    for unit in ("B", "kB", "MB", "GB", "TB"):
        if abs(n) < 1000 or unit == "TB":
            return f"{n:.0f} {unit}" if unit == "B" else f"{n:.1f} {unit}"
        n /= 1000
    return f"{n:.1f} TB"  # pragma: no cover


# --------------------------------------------------------------------------- decoding


def decode_head(data: bytes) -> str | None:
    """Decode the start of a file as text, or return ``None`` for binary data.

    Honours UTF-32/UTF-16/UTF-8 byte-order marks, recognises BOM-less UTF-16 by its
    alternating zero bytes, tolerates a multi-byte character cut at the end, and falls
    back to cp1252/latin-1 for 8-bit text. Data with NUL bytes (after the above) or many
    control characters is binary.

    Parameters
    ----------
    data : bytes
        The first bytes of a file (any length).
    """
    if not data:
        return ""
    encoding: str | None = None
    body = data
    if data.startswith((codecs.BOM_UTF32_LE, codecs.BOM_UTF32_BE)):
        encoding = "utf-32"
    elif data.startswith((codecs.BOM_UTF16_LE, codecs.BOM_UTF16_BE)):
        encoding = "utf-16"
    elif data.startswith(codecs.BOM_UTF8):
        encoding, body = "utf-8", data[len(codecs.BOM_UTF8) :]
    elif len(data) >= 8:
        sample = data[:4096]
        even_zero = sample[0::2].count(0) / max(1, len(sample[0::2]))
        odd_zero = sample[1::2].count(0) / max(1, len(sample[1::2]))
        if odd_zero > 0.4 and even_zero < 0.05:
            encoding = "utf-16-le"
        elif even_zero > 0.4 and odd_zero < 0.05:
            encoding = "utf-16-be"
    if encoding is not None:
        decoder = codecs.getincrementaldecoder(encoding)(errors="replace")
        text = decoder.decode(body, final=False)
    else:
        if b"\x00" in data:
            return None
        try:
            text = codecs.getincrementaldecoder("utf-8")(errors="strict").decode(body, final=False)
        except UnicodeDecodeError:
            text = body.decode("cp1252", errors="replace")
    if "\x00" in text:
        return None
    controls = sum(1 for ch in text[:8192] if ord(ch) < 32 and ch not in "\t\r\n\f\x1a")
    if controls > 0.05 * max(1, min(len(text), 8192)):
        return None
    return text


# --------------------------------------------------------------------------- sniffers


def _table_kind(text: str) -> FileKind | None:
    # sniff_table also accepts a file name; a trailing newline keeps a one-line head that
    # happens to name an existing file from being taken as a path.
    result = sniff_table(text + "\n")
    if result == "placement":
        return FileKind.PLACEMENT
    if result == "bom":
        return FileKind.BOM
    return None


_RE_JOB_KEYS = re.compile(r'"(GeneralSpecs|FilesAttributes|MaterialStackup)"\s*:')


def _looks_like_job(text: str) -> bool:
    """A Gerber job file: a JSON object with a ``Header`` and one of the job sections."""
    s = text.lstrip()
    if not s.startswith("{"):
        return False
    keys = set(_RE_JOB_KEYS.findall(s))
    has_header = re.search(r'"Header"\s*:', s) is not None
    return (has_header and bool(keys)) or len(keys) >= 2


def classify_head(name: str, data: bytes) -> tuple[FileKind, str]:
    """Classify a file from its name and first bytes.

    Parameters
    ----------
    name : str
        File name (only used for the configuration file and for files ignored on
        purpose).
    data : bytes
        The first bytes of the file (up to :data:`HEAD_BYTES`).

    Returns
    -------
    (FileKind, str)
        The kind and a short reason; for ``OTHER`` the reason starts with ``"ignored:"``
        when the file is skipped on purpose and ``"unknown:"`` when it could not be
        classified.
    """
    base = PurePosixPath(name).name
    if base.lower() == CONFIG_FILE_NAME:
        return FileKind.CONFIG, "configuration file"
    if data.startswith(_MAGIC_ARCHIVE):
        return FileKind.OTHER, "unknown: nested archive (not unpacked)"
    if data.startswith(_MAGIC_DOCUMENT):
        return FileKind.OTHER, "ignored: document or picture"
    if _IGNORED_NAME.search(base) or PurePosixPath(base).suffix.lower() in _DOCUMENT_EXT:
        # Read-me, licence and document files can quote Gerber or table text; they are
        # skipped by name before any sniffing.
        return FileKind.OTHER, "ignored: read-me, licence or document"
    text = decode_head(data)
    if text is None:
        return FileKind.OTHER, "unknown: binary data"
    if not text.strip():
        return FileKind.OTHER, "unknown: empty"
    if _looks_like_job(text):
        return FileKind.JOB, "Gerber job file"
    if looks_like_gerber(text):
        return FileKind.GERBER, "Gerber"
    if looks_like_excellon(text):
        return FileKind.EXCELLON, "Excellon"
    table = _table_kind(text)
    if table is not None:
        return table, "table"
    return FileKind.OTHER, "unknown: text of no known kind"


def classify_path(path: Path, *, limits: Limits = DEFAULT_LIMITS) -> tuple[FileKind, str]:
    """Classify one file on disk by its first :data:`HEAD_BYTES` bytes.

    See :func:`classify_head`; files over ``limits.max_file_bytes`` are not read.
    """
    size = path.stat().st_size
    if size > limits.max_file_bytes:
        return FileKind.OTHER, (
            f"unknown: file size must be at most {_fmt_bytes(limits.max_file_bytes)} to be "
            f"read; got {_fmt_bytes(size)}"
        )
    with path.open("rb") as f:
        head = f.read(HEAD_BYTES)
    return classify_head(path.name, head)


# --------------------------------------------------------------------------- folders


def scan_folder(
    root: str | os.PathLike[str],
    *,
    display_root: str | None = None,
    limits: Limits = DEFAULT_LIMITS,
) -> PackageFiles:
    """Walk a folder recursively and classify every file.

    Version-control folders and ``__MACOSX`` are skipped (with a notice); symbolic links
    to folders are not followed, links to files outside ``root`` are not read.

    Parameters
    ----------
    root : path
        The folder.
    display_root : str, optional
        What to call it in messages (defaults to ``root``).
    limits : Limits

    Returns
    -------
    PackageFiles
        ``files`` maps POSIX paths relative to ``root`` to their kind, in sorted order.

    Raises
    ------
    LimitError
        When the folder holds more than ``limits.max_entries`` files.
    """
    base = Path(root)
    shown = display_root if display_root is not None else str(root)
    real_root = base.resolve()
    files: dict[str, FileKind] = {}
    unclassified: list[str] = []
    notices: list[Notice] = []
    count = 0
    for dirpath, dirnames, filenames in os.walk(base, followlinks=False):
        here = Path(dirpath)
        keep: list[str] = []
        for d in sorted(dirnames):
            rel_d = (here / d).relative_to(base).as_posix()
            if d in _SKIP_DIRS:
                notices.append(Notice(file=rel_d, line=None, message="folder skipped on purpose"))
            elif (here / d).is_symlink():
                notices.append(Notice(file=rel_d, line=None, message="linked folder not followed"))
            else:
                keep.append(d)
        dirnames[:] = keep
        for fname in sorted(filenames):
            count += 1
            if count > limits.max_entries:
                msg = (
                    f"package file count must be at most {limits.max_entries}; got more "
                    "(is this the right folder?"
                    "; raise it with max_entries in the [limits] table of fluxshadow.toml)"
                )
                raise LimitError(msg, file=shown)
            path = here / fname
            rel = path.relative_to(base).as_posix()
            if path.is_symlink():
                try:
                    target = path.resolve(strict=True)
                except (OSError, RuntimeError):
                    notices.append(Notice(file=rel, line=None, message="broken link; not read"))
                    files[rel] = FileKind.OTHER
                    unclassified.append(rel)
                    continue
                if not target.is_relative_to(real_root) or not target.is_file():
                    notices.append(
                        Notice(
                            file=rel,
                            line=None,
                            message="link pointing outside the package; not read",
                        )
                    )
                    files[rel] = FileKind.OTHER
                    unclassified.append(rel)
                    continue
            if not path.is_file():
                notices.append(Notice(file=rel, line=None, message="not a regular file; not read"))
                files[rel] = FileKind.OTHER
                unclassified.append(rel)
                continue
            try:
                kind, reason = classify_path(path, limits=limits)
            except OSError as exc:
                kind, reason = FileKind.OTHER, f"unknown: cannot be read ({exc.strerror})"
            files[rel] = kind
            if kind is FileKind.OTHER and not reason.startswith("ignored:"):
                unclassified.append(rel)
                if "must be at most" in reason or "nested archive" in reason:
                    notices.append(
                        Notice(file=rel, line=None, message=reason.removeprefix("unknown: "))
                    )
    ordered = dict(sorted(files.items()))
    return PackageFiles(
        root=str(base),
        display_root=shown,
        files=ordered,
        unclassified=tuple(sorted(unclassified)),
        notices=tuple(notices),
    )


# --------------------------------------------------------------------------- archives

_ArchiveKind = Literal["zip", "tar"]


def _archive_kind(path: Path) -> _ArchiveKind | None:
    with path.open("rb") as f:
        head = f.read(512)
    if head.startswith((b"PK\x03\x04", b"PK\x05\x06")):
        return "zip"
    if head.startswith((b"\x1f\x8b", b"BZh", b"\xfd7zXZ\x00")) or head[257:262] == b"ustar":
        return "tar"
    return None


def _safe_parts(archive: str, name: str) -> tuple[str, ...]:
    """Split an entry name into safe path parts or refuse it."""
    n = name.replace("\\", "/")
    if "\x00" in n:
        msg = f"archive entry names must not contain NUL characters; got {name!r}"
        raise InputError(msg, file=archive)
    if n.startswith("/") or re.match(r"^[A-Za-z]:", n):
        msg = f"archive entries must have relative paths; got absolute path {name!r}"
        raise InputError(msg, file=archive)
    parts = tuple(p for p in n.split("/") if p not in ("", "."))
    if ".." in parts:
        msg = f"archive entries must stay inside the archive folder; got {name!r} (uses '..')"
        raise InputError(msg, file=archive)
    return parts


def _check_totals(
    archive: str, count: int, total: int, limits: Limits, entry: str | None = None
) -> None:
    at = f" at entry {entry!r}" if entry is not None else ""
    if count > limits.max_entries:
        msg = (
            f"archive entry count must be at most {limits.max_entries}; got {count} or "
            f"more{at} (raise it with max_entries in the [limits] table of fluxshadow.toml)"
        )
        raise LimitError(msg, file=archive)
    if total > limits.max_unpacked_bytes:
        msg = (
            f"archive unpacked size must be at most {_fmt_bytes(limits.max_unpacked_bytes)}; "
            f"got {_fmt_bytes(total)} or more{at} (from the entry headers; raise it with "
            "max_unpacked_bytes in the [limits] table of fluxshadow.toml)"
        )
        raise LimitError(msg, file=archive)


class _Budget:
    """Counts bytes actually written while streaming, against the limits."""

    def __init__(self, archive: str, limits: Limits) -> None:
        self.archive = archive
        self.limits = limits
        self.total = 0

    def copy(self, src: IO[bytes], dst: IO[bytes], entry: str, declared: int) -> None:
        written = 0
        while True:
            chunk = src.read(_MiB)
            if not chunk:
                break
            written += len(chunk)
            self.total += len(chunk)
            if written > declared:
                msg = (
                    f"archive entry {entry!r} must inflate to its declared "
                    f"{_fmt_bytes(declared)}; got more (damaged or malicious archive)"
                )
                raise LimitError(msg, file=self.archive)
            if self.total > self.limits.max_unpacked_bytes:
                msg = (
                    "archive unpacked size must be at most "
                    f"{_fmt_bytes(self.limits.max_unpacked_bytes)}; got more while unpacking "
                    f"{entry!r} (raise it with max_unpacked_bytes in the [limits] table of "
                    "fluxshadow.toml)"
                )
                raise LimitError(msg, file=self.archive)
            dst.write(chunk)


def _target(dest: Path, parts: tuple[str, ...], archive: str, name: str) -> Path:
    target = dest.joinpath(*parts)
    if not target.resolve().is_relative_to(dest.resolve()):
        msg = f"archive entries must stay inside the archive folder; got {name!r}"
        raise InputError(msg, file=archive)
    return target


def _open_new(target: Path, archive: str, name: str) -> IO[bytes]:
    try:
        target.parent.mkdir(parents=True, exist_ok=True)
        return target.open("xb")
    except OSError as exc:
        msg = f"archive entry {name!r} must unpack to a new file; got {exc.strerror}"
        raise InputError(msg, file=archive) from exc


def _extract_zip(path: Path, shown: str, dest: Path, limits: Limits) -> list[Notice]:
    notices: list[Notice] = []
    try:
        zf = zipfile.ZipFile(path)
    except (zipfile.BadZipFile, OSError) as exc:
        msg = f"archive must be a readable zip file; got {exc}"
        raise InputError(msg, file=shown) from exc
    with zf:
        infos = zf.infolist()
        # Headers first: nothing is written before every entry has been checked.
        _check_totals(shown, len(infos), 0, limits)
        total = 0
        plan: list[tuple[zipfile.ZipInfo, tuple[str, ...]]] = []
        for info in infos:
            parts = _safe_parts(shown, info.filename)
            mode = (info.external_attr >> 16) & 0xFFFF
            if stat.S_ISLNK(mode):
                msg = f"archive entries must be files or folders; got link {info.filename!r}"
                raise InputError(msg, file=shown)
            if info.is_dir() or not parts:
                continue
            size, packed = info.file_size, info.compress_size
            if size > limits.ratio_min_bytes and size > limits.max_ratio * max(packed, 1):
                msg = (
                    f"archive entry {info.filename!r} compression ratio must be at most "
                    f"{limits.max_ratio:.0f}:1 above {_fmt_bytes(limits.ratio_min_bytes)}; got "
                    f"{size / max(packed, 1):.0f}:1 ({_fmt_bytes(size)} from {_fmt_bytes(packed)}; "
                    "raise it with max_ratio in the [limits] table of fluxshadow.toml)"
                )
                raise LimitError(msg, file=shown)
            if info.flag_bits & 0x1:
                notices.append(
                    Notice(file=info.filename, line=None, message="encrypted entry; not unpacked")
                )
                continue
            if size > limits.max_file_bytes:
                notices.append(
                    Notice(
                        file=info.filename,
                        line=None,
                        message=f"file size must be at most {_fmt_bytes(limits.max_file_bytes)} "
                        f"to be read; got {_fmt_bytes(size)}; not unpacked",
                    )
                )
                continue
            total += size
            _check_totals(shown, len(infos), total, limits, info.filename)
            plan.append((info, parts))
        budget = _Budget(shown, limits)
        seen: set[tuple[str, ...]] = set()
        for info, parts in plan:
            if parts in seen:
                notices.append(
                    Notice(file=info.filename, line=None, message="duplicate entry; skipped")
                )
                continue
            seen.add(parts)
            target = _target(dest, parts, shown, info.filename)
            try:
                src = zf.open(info)
            except (NotImplementedError, RuntimeError, zipfile.BadZipFile) as exc:
                msg = f"archive entry {info.filename!r} must be readable; got {exc}"
                raise InputError(msg, file=shown) from exc
            with src, _open_new(target, shown, info.filename) as dst:
                try:
                    budget.copy(src, dst, info.filename, info.file_size)
                except (zipfile.BadZipFile, EOFError, OSError) as exc:
                    msg = f"archive entry {info.filename!r} must be intact; got {exc}"
                    raise InputError(msg, file=shown) from exc
    return notices


def _extract_tar(path: Path, shown: str, dest: Path, limits: Limits) -> list[Notice]:
    notices: list[Notice] = []
    archive_size = path.stat().st_size
    try:
        tf = tarfile.open(path, mode="r:*")  # noqa: SIM115 - closed by the with-block below
    except (tarfile.TarError, OSError, EOFError) as exc:
        msg = f"archive must be a readable tar archive (.tar, .tar.gz, .tgz); got {exc}"
        raise InputError(msg, file=shown) from exc
    with tf:
        plan: list[tuple[tarfile.TarInfo, tuple[str, ...]]] = []
        count = 0
        total = 0
        try:
            # Headers first, one at a time, so a bomb is refused at its first lie.
            for m in tf:
                count += 1
                _check_totals(shown, count, total, limits, m.name)
                parts = _safe_parts(shown, m.name)
                if m.issym() or m.islnk():
                    msg = (
                        f"archive entries must be files or folders; got link {m.name!r} -> "
                        f"{m.linkname!r}"
                    )
                    raise InputError(msg, file=shown)
                if m.isdir() or not parts:
                    continue
                if not m.isreg():
                    msg = f"archive entries must be files or folders; got special file {m.name!r}"
                    raise InputError(msg, file=shown)
                if m.size > limits.max_file_bytes:
                    notices.append(
                        Notice(
                            file=m.name,
                            line=None,
                            message="file size must be at most "
                            f"{_fmt_bytes(limits.max_file_bytes)} to be read; got "
                            f"{_fmt_bytes(m.size)}; not unpacked",
                        )
                    )
                    continue
                total += m.size
                _check_totals(shown, count, total, limits, m.name)
                # Tar members are not compressed one by one: the ratio is the archive's.
                if total > limits.ratio_min_bytes and total > limits.max_ratio * archive_size:
                    msg = (
                        f"archive compression ratio must be at most {limits.max_ratio:.0f}:1 "
                        f"above {_fmt_bytes(limits.ratio_min_bytes)}; got "
                        f"{total / max(archive_size, 1):.0f}:1 at entry {m.name!r} (raise it "
                        "with max_ratio in the [limits] table of fluxshadow.toml)"
                    )
                    raise LimitError(msg, file=shown)
                plan.append((m, parts))
        except (tarfile.TarError, EOFError, OSError) as exc:
            msg = f"archive must be an intact tar archive; got {exc}"
            raise InputError(msg, file=shown) from exc
        budget = _Budget(shown, limits)
        seen: set[tuple[str, ...]] = set()
        for m, parts in plan:
            if parts in seen:
                notices.append(Notice(file=m.name, line=None, message="duplicate entry; skipped"))
                continue
            seen.add(parts)
            target = _target(dest, parts, shown, m.name)
            try:
                src = tf.extractfile(m)
            except (tarfile.TarError, OSError, EOFError) as exc:
                msg = f"archive entry {m.name!r} must be readable; got {exc}"
                raise InputError(msg, file=shown) from exc
            if src is None:  # pragma: no cover - regular files always have data
                continue
            with src, _open_new(target, shown, m.name) as dst:
                try:
                    budget.copy(src, dst, m.name, m.size)
                except (tarfile.TarError, EOFError, OSError) as exc:
                    msg = f"archive entry {m.name!r} must be intact; got {exc}"
                    raise InputError(msg, file=shown) from exc
    return notices


@contextlib.contextmanager
def open_package(
    path: str | os.PathLike[str], *, limits: Limits = DEFAULT_LIMITS
) -> Iterator[PackageFiles]:
    """Open a fabrication package (folder or archive) and classify its files.

    Parameters
    ----------
    path : path
        A folder, a ``.zip`` or a tar archive (``.tar``, ``.tar.gz``/``.tgz``; recognised
        by content, not extension).
    limits : Limits

    Yields
    ------
    PackageFiles
        For archives, ``root`` is a temporary folder removed when the ``with`` block
        ends; ``display_root`` is ``path`` as given.

    Raises
    ------
    InputError
        Missing path, a plain (non-archive) file, a damaged archive, or an entry that
        would escape the folder (absolute path, ``..``, link or special file).
    LimitError
        Too many entries, too many unpacked bytes, or an absurd compression ratio.
    """
    shown = os.fspath(path)
    p = Path(path)
    if not p.exists():
        msg = f"package must be an existing folder or archive; got {shown!r}, which does not exist"
        raise InputError(msg, file=shown)
    if p.is_dir():
        yield scan_folder(p, display_root=shown, limits=limits)
        return
    if not p.is_file():
        msg = f"package must be a folder or an archive file; got {shown!r}"
        raise InputError(msg, file=shown)
    kind = _archive_kind(p)
    if kind is None:
        msg = (
            "package must be a folder, a .zip or a .tar.gz/.tgz archive; got a plain file "
            "(give the folder that holds it)"
        )
        raise InputError(msg, file=shown)
    with tempfile.TemporaryDirectory(prefix="fluxshadow-") as tmp:
        dest = Path(tmp)
        if kind == "zip":
            notices = _extract_zip(p, shown, dest, limits)
        else:
            notices = _extract_tar(p, shown, dest, limits)
        pkg = scan_folder(dest, display_root=shown, limits=limits)
        yield replace(pkg, notices=tuple(notices) + pkg.notices)


_ODB_MATRIX = ("matrix", "matrix.Z", "matrix.gz")


def find_odb_jobs(root: str | os.PathLike[str], *, max_depth: int = 3) -> tuple[str, ...]:
    """The ODB++ job folders inside a package: folders holding ``matrix/matrix``.

    A job folder is recognised by its matrix file (plain or compressed, ``.Z``/``.gz``;
    ODB++ Format Specification, from memory: the chapter on the job tree). The search
    goes ``max_depth`` folder levels down and does not look inside a job it found.

    Parameters
    ----------
    root : path
        The package folder.
    max_depth : int
        How many folder levels below ``root`` are searched (0: ``root`` only).

    Returns
    -------
    tuple of str
        Job folders relative to ``root`` in POSIX form (``"."`` for ``root`` itself),
        sorted.
    """
    base = Path(root)
    found: list[str] = []

    def visit(folder: Path, depth: int) -> None:
        if any((folder / "matrix" / name).is_file() for name in _ODB_MATRIX):
            rel = folder.relative_to(base).as_posix()
            found.append(rel or ".")
            return
        if depth >= max_depth:
            return
        try:
            children = sorted(c for c in folder.iterdir() if c.is_dir() and not c.is_symlink())
        except OSError:
            return
        for child in children:
            visit(child, depth + 1)

    visit(base, 0)
    return tuple(sorted(found))
