"""Read a fabrication package into a :class:`~fluxshadow.board.model.Board`.

The order of work: classify files, identify and order the copper layers, read copper,
profile, paste, drill, placement, BOM and job files, detect unmarked negative planes,
resolve the stack-up, register the placement frame to the artwork, identify the magnetics
and move them into the artwork frame. Every file is accounted for in ``Board.files``;
whatever had to be assumed is in ``Board.assumptions``.
"""

from __future__ import annotations

import hashlib
import math
import os
from collections.abc import Callable, Sequence
from dataclasses import dataclass, replace
from pathlib import Path
from typing import Any, Literal

import numpy as np
import numpy.typing as npt
import shapely
from scipy.spatial import cKDTree

from fluxshadow.board.copper import LayerArtwork
from fluxshadow.board.magnetics import Magnetic, PartOverride, identify_magnetics
from fluxshadow.board.model import Board, FileUse, Layer
from fluxshadow.board.outline import (
    BoardOutline,
    copper_extent,
    outline_from_artwork,
    outline_from_rings,
)
from fluxshadow.board.pads import pad_centres
from fluxshadow.board.polarity import flash_sizes_mm, looks_negative
from fluxshadow.board.registration import FrameFit, FrameOverride, apply_fit, fit_frame, invert_fit
from fluxshadow.board.stackup import resolve_stackup
from fluxshadow.errors import ConfigError, FluxshadowError, InputError, Notice
from fluxshadow.io.config import Config, find_config, load_config
from fluxshadow.io.excellon import read_excellon
from fluxshadow.io.gerber import read_gerber, read_gerber_header
from fluxshadow.io.identify import LayerIdentity, identify_layer, order_copper_layers
from fluxshadow.io.jobfile import read_job_file
from fluxshadow.io.odb import read_odb
from fluxshadow.io.package import DEFAULT_LIMITS, Limits, find_odb_jobs, open_package
from fluxshadow.io.placement import join_bom, read_bom, read_placement
from fluxshadow.io.records import (
    ArtworkRecord,
    BomRow,
    DrillRecord,
    FileKind,
    JobRecord,
    PackageFiles,
    PlacementRow,
)

__all__ = ["ROUTES", "Route", "load_package", "with_config_limits"]

Progress = Callable[[str], None]
Route = Literal["auto", "gerber", "odb"]
ROUTES: tuple[str, ...] = ("auto", "gerber", "odb")
"""Input routes: ``auto`` reads an ODB++ job when the package holds one, else the Gerber
files; ``gerber`` and ``odb`` force one route."""


def _sha256(path: Path) -> str:
    h = hashlib.sha256()
    with path.open("rb") as f:
        for chunk in iter(lambda: f.read(1 << 20), b""):
            h.update(chunk)
    return h.hexdigest()


def _resolve_config(config: Config | str | os.PathLike[str] | None, root: Path) -> Config:
    if isinstance(config, Config):
        return config
    if config is not None:
        return load_config(Path(config))
    found = find_config(root)
    return load_config(found) if found is not None else Config()


def _pick_placement(
    tables: list[tuple[str, list[PlacementRow]]],
) -> tuple[list[PlacementRow], list[str], list[Notice]]:
    """Choose the placement rows when a package carries several placement files.

    Files are ranked by how much they say (values, packages, rows); each designator is
    taken from the best file that has it, so complementary top/bottom files combine and
    a bare centroid file only fills in parts the richer files lack.
    """

    def rank(item: tuple[str, list[PlacementRow]]) -> tuple[int, int, int, str]:
        name, rows = item
        with_value = sum(1 for r in rows if r.value)
        with_package = sum(1 for r in rows if r.package)
        return (-with_value, -with_package, -len(rows), name)

    chosen: list[PlacementRow] = []
    seen: set[str] = set()
    used: list[str] = []
    notices: list[Notice] = []
    for name, rows in sorted(tables, key=rank):
        new = [r for r in rows if r.ref not in seen]
        if new:
            used.append(name)
            chosen.extend(new)
            seen.update(r.ref for r in new)
        elif rows:
            notices.append(
                Notice(
                    file=name,
                    line=None,
                    message="placement rows already given by a richer file; not used",
                )
            )
    return chosen, used, notices


def _extent(outline: BoardOutline | None, records: Sequence[ArtworkRecord]) -> shapely.Polygon:
    """The area a negative-image layer's plane fills: the outline without its cut-outs
    (they are cut from the copper by the outline, not by the image), else the copper
    extent of the positive layers (:func:`~fluxshadow.board.outline.copper_extent`)."""
    if outline is not None:
        return shapely.Polygon(outline.board.exterior)
    points = [
        np.vstack([rec.obj_xy, rec.vertices]) if len(rec.vertices) else rec.obj_xy
        for rec in records
        if rec.n_objects and not rec.negative_image
    ]
    if not points:
        return shapely.Polygon()
    p = np.vstack(points)
    return copper_extent(np.hstack([p, p]))


def _holes(drills: Sequence[DrillRecord]) -> npt.NDArray[np.float64]:
    arrays = [d.hole_xy for d in drills if len(d.hole_xy)]
    return np.vstack(arrays) if arrays else np.empty((0, 2))


def _assign_pads(
    centres: npt.NDArray[np.float64], pads: npt.NDArray[np.float64], radius_mm: float = 8.0
) -> list[npt.NDArray[np.float64]]:
    """Give each pad to the nearest part centre within ``radius_mm`` (artwork frame)."""
    out = [np.empty((0, 2)) for _ in range(len(centres))]
    if not len(centres) or not len(pads):
        return out
    d, j = cKDTree(centres).query(pads, distance_upper_bound=radius_mm)
    ok = np.isfinite(d)
    for k in np.unique(j[ok]):
        out[int(k)] = pads[ok & (j == k)]
    return out


def _overrides(cfg: Config) -> list[PartOverride]:
    # Every [[part]] goes in, even one that only states physics: identify_magnetics then
    # reports entries whose ref is not placed.
    return [
        PartOverride(ref=p.ref, kind=p.kind, body_mm=p.body_mm, height_mm=p.height_mm)
        for p in cfg.parts
    ]


def _frame_override(cfg: Config) -> FrameOverride | None:
    pc = cfg.placement
    if pc.rotation_deg not in (None, 0.0):
        msg = (
            f"{cfg.source}: placement.rotation_deg must be 0 (only translation and bottom "
            f"mirroring are supported); got {pc.rotation_deg!r}"
        )
        raise ConfigError(msg)
    given = (pc.offset_x_mm, pc.offset_y_mm, pc.mirror_bottom, pc.bottom_mirror_x_mm)
    if all(v is None for v in given):
        return None
    return FrameOverride(
        dx_mm=pc.offset_x_mm or 0.0,
        dy_mm=pc.offset_y_mm or 0.0,
        bottom_mirror=bool(pc.mirror_bottom),
        bottom_mirror_c_mm=pc.bottom_mirror_x_mm,
    )


def _to_artwork(m: Magnetic, fit: FrameFit) -> Magnetic:
    side = m.side
    x, y = apply_fit(fit, [m.x_mm], [m.y_mm], side)
    ox, oy = apply_fit(fit, m.outline[:, 0], m.outline[:, 1], side)
    rot = m.rotation_deg
    if side == "bottom" and fit.bottom_mirror:
        rot = (180.0 - rot) % 360.0
    return replace(
        m,
        x_mm=float(x[0]),
        y_mm=float(y[0]),
        rotation_deg=rot,
        outline=np.column_stack([ox, oy]),
    )


def load_package(
    path: str | os.PathLike[str],
    *,
    config: Config | str | os.PathLike[str] | None = None,
    limits: Limits = DEFAULT_LIMITS,
    progress: Progress | None = None,
    route: Route = "auto",
) -> Board:
    """Read a fabrication package (folder, .zip or .tgz) into a layered board model.

    Two input routes give the same model: Gerber/Excellon files with a placement table,
    or an ODB++ job (a folder with ``matrix/matrix``, also inside the package or an
    archive), whose matrix orders the layers and whose component layers place the parts.

    Parameters
    ----------
    path : path
        The package.
    config : Config or path, optional
        A parsed configuration or the path of a ``fluxshadow.toml``. Default: a
        ``fluxshadow.toml`` found beside or inside the package, else none.
    limits : Limits
        Safety limits on archives, file sizes and what one file may expand to; the
        ``[limits]`` table of the configuration overrides single fields (a configuration
        found only inside an archive applies to the files, not to unpacking it).
    progress : callable, optional
        Called with a short message before each stage (for a progress display).
    route : {"auto", "gerber", "odb"}
        Which files to read; ``auto`` takes the ODB++ job when there is one (and says so
        in a notice when Gerber files were left unread).

    Returns
    -------
    Board
        Layers top to bottom, magnetics in the artwork frame, frame fit, stack-up.

    Raises
    ------
    InputError
        The package has no copper layer, or a file is malformed beyond recovery.
    ConfigError
        The configuration is invalid.
    """
    early = _early_config(path, config)
    if early is not None:
        config = early
        limits = with_config_limits(limits, early)
    with open_package(path, limits=limits) as pkg:
        try:
            return _shown_paths(_load(pkg, config, progress, limits, route), pkg)
        except FluxshadowError as exc:
            if Path(pkg.root) == Path(pkg.display_root):
                raise
            # Files of an archive live in a temporary folder: name the archive instead.
            text = str(exc).replace(str(Path(pkg.root)), pkg.display_root)
            if isinstance(exc, ConfigError):
                raise ConfigError(text) from exc
            raise InputError(text) from exc


def _shown_paths(board: Board, pkg: PackageFiles) -> Board:
    """The board with the temporary folder of an unpacked archive written as the archive
    in its notices, assumptions and outline source (the folder is gone after loading)."""
    tmp = str(Path(pkg.root))
    if Path(pkg.root) == Path(pkg.display_root):
        return board

    def fix(text: str) -> str:
        return text.replace(tmp, pkg.display_root)

    notices = tuple(
        Notice(file=fix(n.file), line=n.line, message=fix(n.message)) for n in board.notices
    )
    outline = board.outline
    if outline is not None:
        outline = replace(outline, source=fix(outline.source))
    return replace(
        board,
        notices=notices,
        assumptions=tuple(fix(a) for a in board.assumptions),
        outline=outline,
    )


def with_config_limits(limits: Limits, cfg: Config) -> Limits:
    """``limits`` with the fields given in the configuration's ``[limits]`` table."""
    if not cfg.limits:
        return limits
    values: dict[str, Any] = {
        k: (float(v) if k == "max_ratio" else int(v)) for k, v in cfg.limits.items()
    }
    return replace(limits, **values)


def _early_config(
    path: str | os.PathLike[str], config: Config | str | os.PathLike[str] | None
) -> Config | None:
    """The configuration when it is known before the package is opened (for its limits)."""
    if isinstance(config, Config):
        return config
    if config is not None:
        return load_config(Path(config))
    p = Path(path)
    if not p.is_dir():
        return None  # an archive's own configuration is found after unpacking
    found = find_config(p)
    return load_config(found) if found is not None else None


@dataclass(kw_only=True)
class _LayerMeta:
    """How one copper layer was found (either route)."""

    source: str
    index: int
    side: Literal["top", "inner", "bottom"]
    identified_by: str
    detail: str
    polarity: str
    polarity_from: str


@dataclass(kw_only=True)
class _Inputs:
    """What a route read from the package, before stack-up, registration and magnetics."""

    route: str
    route_detail: str
    records: list[ArtworkRecord]
    meta: list[_LayerMeta]
    extent: shapely.Polygon
    outline: BoardOutline | None
    paste: dict[str, list[ArtworkRecord]]
    drills: list[DrillRecord]
    job: JobRecord | None
    placement: list[PlacementRow]
    same_frame: bool
    uses: dict[str, str]
    notices: list[Notice]
    assumptions: list[str]
    hashes: dict[str, str]


def _choose_route(pkg: PackageFiles, route: Route) -> tuple[str, str | None, str]:
    """``(route, odb_job_folder, why)`` for a package; the job folder is relative."""
    if route not in ROUTES:
        msg = f"route must be one of {', '.join(ROUTES)}; got {route!r}"
        raise InputError(msg)
    jobs = find_odb_jobs(pkg.root)
    if route == "gerber":
        return "gerber", None, "asked for (--route gerber)"
    if len(jobs) > 1:
        msg = (
            f"package must hold one ODB++ job (a folder with matrix/matrix); got {len(jobs)}: "
            f"{', '.join(jobs)} (give the job folder itself)"
        )
        raise InputError(msg, file=pkg.display_root)
    if route == "odb":
        if not jobs:
            msg = (
                "package must hold an ODB++ job (a folder with matrix/matrix) for route odb; "
                "got none"
            )
            raise InputError(msg, file=pkg.display_root)
        return "odb", jobs[0], "asked for (--route odb)"
    if jobs:
        return "odb", jobs[0], f"ODB++ job found in {jobs[0]!r} (matrix/matrix)"
    return "gerber", None, "no ODB++ job in the package"


def _inside(rel: str, folder: str | None) -> bool:
    if folder is None:
        return False
    return folder == "." or rel == folder or rel.startswith(folder.rstrip("/") + "/")


def _load(
    pkg: PackageFiles,
    config: Config | str | os.PathLike[str] | None,
    progress: Progress | None,
    limits: Limits = DEFAULT_LIMITS,
    route: Route = "auto",
) -> Board:
    say = progress or (lambda _msg: None)
    cfg = _resolve_config(config, Path(pkg.root))
    limits = with_config_limits(limits, cfg)
    chosen, job_dir, why = _choose_route(pkg, route)
    if chosen == "odb":
        assert job_dir is not None
        inputs = _odb_inputs(pkg, job_dir, cfg, say, limits)
    else:
        inputs = _gerber_inputs(pkg, cfg, say, limits)
    inputs.route_detail = why
    return _assemble(pkg, inputs, cfg, say)


def _other_files(pkg: PackageFiles, uses: dict[str, str]) -> None:
    """Say of every file no step has used that it was not used."""
    for rel in pkg.unclassified:
        uses.setdefault(rel, "not classified (not read)")
    for rel, kind in pkg.files.items():
        uses.setdefault(rel, f"{kind.value}: not used")


def _read_table_files(
    pkg: PackageFiles,
    by_kind: dict[FileKind, list[str]],
    limits: Limits,
    uses: dict[str, str],
    notices: list[Notice],
    *,
    placement_from_files: bool,
) -> tuple[list[PlacementRow], list[BomRow], JobRecord | None]:
    """Placement tables (when wanted), BOMs and the job file of a package."""
    root = Path(pkg.root)
    job: JobRecord | None = None
    for rel in by_kind.get(FileKind.JOB, []):
        if job is None:
            job = read_job_file(root / rel)
            uses[rel] = "job file: stack-up"
        else:
            uses[rel] = "job file (a second one; not used)"
    placement: list[PlacementRow] = []
    if placement_from_files:
        tables: list[tuple[str, list[PlacementRow]]] = []
        for rel in by_kind.get(FileKind.PLACEMENT, []):
            rows, pn = read_placement(root / rel, max_bytes=limits.max_file_bytes)
            notices.extend(pn)
            tables.append((rel, rows))
        placement, used_tables, pn2 = _pick_placement(tables)
        notices.extend(pn2)
        for rel, rows in tables:
            uses[rel] = (
                f"placement: {len(rows)} rows"
                if rel in used_tables
                else f"placement: {len(rows)} rows (not needed)"
            )
    else:
        for rel in by_kind.get(FileKind.PLACEMENT, []):
            uses[rel] = "placement: not used (the ODB++ components give the placement)"
    bom_rows: list[BomRow] = []
    for rel in by_kind.get(FileKind.BOM, []):
        rows_b, bn = read_bom(root / rel, max_bytes=limits.max_file_bytes)
        notices.extend(bn)
        bom_rows.extend(rows_b)
        uses[rel] = f"BOM: {len(rows_b)} designators"
    for rel in by_kind.get(FileKind.CONFIG, []):
        uses[rel] = "configuration"
    return placement, bom_rows, job


def _kinds(pkg: PackageFiles, skip: str | None = None) -> dict[FileKind, list[str]]:
    by_kind: dict[FileKind, list[str]] = {}
    for rel, kind in sorted(pkg.files.items()):
        if not _inside(rel, skip):
            by_kind.setdefault(kind, []).append(rel)
    return by_kind


def _gerber_inputs(pkg: PackageFiles, cfg: Config, say: Progress, limits: Limits) -> _Inputs:
    root = Path(pkg.root)

    def gerber(rel: str) -> ArtworkRecord:
        return read_gerber(
            root / rel,
            max_bytes=limits.max_file_bytes,
            max_repeat=limits.max_repeat,
            max_macro_depth=limits.max_macro_depth,
            max_objects=limits.max_objects,
            max_vertices=limits.max_vertices,
            max_region_vertices=limits.max_region_vertices,
        )

    notices: list[Notice] = list(pkg.notices)
    assumptions: list[str] = []
    uses: dict[str, str] = {}
    hashes = {rel: _sha256(root / rel) for rel in sorted(pkg.files)}
    by_kind = _kinds(pkg)

    # --- layer identification
    say("identifying layers")
    idents: list[LayerIdentity] = []
    for rel in by_kind.get(FileKind.GERBER, []):
        attrs, comments, _units = read_gerber_header(root / rel)
        ident = identify_layer(rel, file_attributes=attrs, comments=comments, config_map=cfg.layers)
        idents.append(ident)
        notices.extend(ident.notices)
    copper_ids = order_copper_layers(idents)
    for ident in copper_ids:
        notices.extend(n for n in ident.notices if n not in notices)
    if not copper_ids:
        msg = (
            "package must contain at least one copper Gerber layer; found none among "
            f"{len(by_kind.get(FileKind.GERBER, []))} Gerber files"
        )
        raise InputError(msg, file=pkg.display_root)
    copper_files = {c.file for c in copper_ids}
    for ident in idents:
        if ident.file not in copper_files:
            what = ident.function if ident.function != "copper" else "copper (left out)"
            uses[ident.file] = f"gerber: {what}" + (f" {ident.side}" if ident.side else "")

    # --- read artwork
    records: list[ArtworkRecord] = []
    for ident in copper_ids:
        say(f"reading {ident.file}")
        rec = gerber(ident.file)
        records.append(rec)
        notices.extend(rec.notices)
    outline: BoardOutline | None = None
    paste: dict[str, list[ArtworkRecord]] = {"top": [], "bottom": []}
    for ident in idents:
        if ident.function == "outline" and outline is None:
            rec = gerber(ident.file)
            notices.extend(rec.notices)
            outline = outline_from_artwork(rec)
            if outline is not None:
                outline = replace(outline, source=ident.file)  # relative, as layer sources
            uses[ident.file] = (
                "gerber: board outline" if outline else "gerber: outline (no closed shape)"
            )
        elif ident.function == "paste" and ident.side in ("top", "bottom"):
            rec = gerber(ident.file)
            paste[ident.side].append(rec)
            uses[ident.file] = f"gerber: paste {ident.side} (frame registration)"
    if outline is None:
        assumptions.append(
            "board outline: no profile/outline layer gave a closed shape; the extent of "
            'the copper is used (name the outline file in [layers] as "outline")'
        )

    # --- drill, job, placement, BOM
    drills: list[DrillRecord] = []
    for rel in by_kind.get(FileKind.EXCELLON, []):
        say(f"reading {rel}")
        d = read_excellon(
            root / rel, max_bytes=limits.max_file_bytes, max_features=limits.max_drill_features
        )
        drills.append(d)
        notices.extend(d.notices)
        span = f" layers {d.span[0]}-{d.span[1]}" if d.span else ""
        uses[rel] = (
            f"drill: {len(d.hole_xy)} holes, {len(d.slot_xy)} slots{span} "
            f"(plating from {d.plating_from})"
        )
    placement, bom_rows, job = _read_table_files(
        pkg, by_kind, limits, uses, notices, placement_from_files=True
    )
    if bom_rows:
        placement = join_bom(placement, bom_rows, notices=notices)

    # --- negative planes without a marker
    extent = _extent(outline, records)
    hole_xy = _holes(drills)
    outer = [records[0], records[-1]] if len(records) > 1 else records[:1]
    pad_xy = np.vstack([r.obj_xy[r.obj_kind == 0] for r in outer])
    pad_size = np.concatenate([flash_sizes_mm(r) for r in outer])
    meta: list[_LayerMeta] = []
    for i, (ident, rec) in enumerate(zip(copper_ids, records, strict=True)):
        if rec.negative_image and ident.polarity == "positive" and ident.polarity_from != "config":
            pol = ("negative", "image-polarity")
        elif ident.polarity == "negative" or rec.negative_image:
            pol = ("negative", ident.polarity_from)
        elif ident.polarity_from in ("default",) and ident.side == "inner":
            ev = looks_negative(
                rec,
                hole_xy=hole_xy,
                outer_pad_xy=pad_xy,
                outer_pad_size_mm=pad_size,
                extent_area_mm2=float(extent.area),
            )
            if ev.negative:
                pol = ("negative", "geometry")
                assumptions.append(
                    f"layer {ident.file}: read as a negative plane image because it looks "
                    f"like one ({ev.describe()}); if wrong, state it in [layers] as "
                    f'"{Path(ident.file).name}" = "copper:{ident.index}"'
                )
            else:
                pol = ("positive", ident.polarity_from)
        else:
            pol = ("positive", ident.polarity_from)
        meta.append(
            _LayerMeta(
                source=ident.file,
                index=int(ident.index or i + 1),
                side=ident.side
                or ("top" if i == 0 else "bottom" if i == len(copper_ids) - 1 else "inner"),
                identified_by=ident.identified_by,
                detail=ident.detail,
                polarity=pol[0],
                polarity_from=pol[1],
            )
        )
        if ident.identified_by in ("extension", "file-name"):
            assumptions.append(
                f"layer identity: {ident.file} taken as L{meta[-1].index} from its "
                f"{ident.identified_by.replace('-', ' ')} only; confirm it or state it in [layers]"
            )
    _other_files(pkg, uses)
    return _Inputs(
        route="gerber",
        route_detail="",
        records=records,
        meta=meta,
        extent=extent,
        outline=outline,
        paste=paste,
        drills=drills,
        job=job,
        placement=placement,
        same_frame=False,
        uses=uses,
        notices=notices,
        assumptions=assumptions,
        hashes=hashes,
    )


def _odb_inputs(
    pkg: PackageFiles, job_dir: str, cfg: Config, say: Progress, limits: Limits
) -> _Inputs:
    root = Path(pkg.root)

    def rel(path: str) -> str:
        try:
            return Path(path).resolve().relative_to(root.resolve()).as_posix()
        except ValueError:
            return path

    say(f"reading ODB++ job {job_dir}")
    odb = read_odb(
        root / job_dir,
        max_bytes=limits.max_file_bytes,
        max_objects=limits.max_objects,
        max_vertices=limits.max_vertices,
    )
    notices: list[Notice] = list(pkg.notices) + list(odb.notices)
    assumptions: list[str] = []
    uses: dict[str, str] = {}
    job_root = root / job_dir
    hashes = {rel_: _sha256(root / rel_) for rel_ in sorted(pkg.files)}
    for f in sorted(job_root.rglob("*")):
        if f.is_file() and not f.is_symlink():
            key = f.relative_to(root).as_posix()
            if key not in hashes:
                hashes[key] = _sha256(f)
            uses[key] = "odb++: not used"
    matrix_rel = rel(str(job_root / "matrix" / "matrix"))
    uses[matrix_rel] = f"odb++: matrix ({len(odb.matrix)} rows, step {odb.step})"
    if not odb.copper:
        msg = (
            "an ODB++ job must have at least one copper layer (matrix rows with "
            "CONTEXT=BOARD and TYPE=SIGNAL, POWER_GROUND or MIXED); got none"
        )
        raise InputError(msg, file=matrix_rel)
    rows = {r.name: r for r in odb.matrix}
    records = list(odb.copper)
    meta: list[_LayerMeta] = []
    n = len(records)
    for i, (name, rec) in enumerate(zip(odb.copper_names, records, strict=True)):
        row = rows[name]
        source = rel(rec.source)
        side: Literal["top", "inner", "bottom"] = (
            "top" if i == 0 else "bottom" if i == n - 1 else "inner"
        )
        meta.append(
            _LayerMeta(
                source=source,
                index=i + 1,
                side=side,
                identified_by="odb-matrix",
                detail=(
                    f"ODB++ matrix row {row.row} {row.name} ({row.type}, {row.polarity}) "
                    f"of step {odb.step}"
                ),
                polarity="negative" if row.polarity == "NEGATIVE" else "positive",
                polarity_from="odb-matrix",
            )
        )
        uses[source] = f"odb++: copper L{i + 1} (matrix row {row.row} {row.name})"
    outline = outline_from_rings(
        odb.profile_rings, source=rel(str(job_root / "steps" / odb.step.lower() / "profile"))
    )
    if outline is not None:
        uses[outline.source] = "odb++: step profile (board outline)"
    else:
        assumptions.append(
            "board outline: the ODB++ step profile gave no closed shape; the extent of the "
            "copper is used"
        )
    drills = list(getattr(odb, "drills", ()))
    for d in drills:
        uses[rel(d.source)] = f"odb++: drill, {len(d.hole_xy)} holes, {len(d.slot_xy)} slots"
        notices.extend(d.notices)
    placement = list(odb.placements)
    for src in sorted({p.source for p in placement}):
        uses[rel(src)] = "odb++: components (placement)"
    placement = [replace(p, source=rel(p.source)) for p in placement]
    by_kind = _kinds(pkg, skip=job_dir)
    n_gerber = len(by_kind.get(FileKind.GERBER, [])) + len(by_kind.get(FileKind.EXCELLON, []))
    if n_gerber:
        notices.append(
            Notice(
                file=pkg.display_root,
                line=None,
                message=(
                    f"the package also holds {n_gerber} Gerber/Excellon file(s) beside the "
                    f"ODB++ job; only the ODB++ job was read (--route gerber reads the others)"
                ),
            )
        )
        for kind in (FileKind.GERBER, FileKind.EXCELLON):
            for r in by_kind.get(kind, []):
                uses[r] = f"{kind.value}: not read (ODB++ route)"
    _placement_files, bom_rows, job = _read_table_files(
        pkg, by_kind, limits, uses, notices, placement_from_files=False
    )
    if bom_rows:
        placement = join_bom(placement, bom_rows, notices=notices)
    if cfg.layers:
        notices.append(
            Notice(
                file=str(cfg.source),
                line=None,
                message="[layers] maps Gerber files; the ODB++ route takes layers from the matrix",
            )
        )
    _other_files(pkg, uses)
    return _Inputs(
        route="odb",
        route_detail="",
        records=records,
        meta=meta,
        extent=_extent(outline, records),
        outline=outline,
        paste={"top": [], "bottom": []},
        drills=drills,
        job=job,
        placement=placement,
        same_frame=True,
        uses=uses,
        notices=notices,
        assumptions=assumptions,
        hashes=hashes,
    )


def _assemble(pkg: PackageFiles, inputs: _Inputs, cfg: Config, say: Progress) -> Board:
    records = inputs.records
    notices = inputs.notices
    assumptions = inputs.assumptions
    uses = inputs.uses
    placement = inputs.placement
    if not placement:
        assumptions.append(
            "placement: no placement file was found, so no magnetics can be located "
            "(add the placement/centroid file to the package)"
        )
    artworks = tuple(
        LayerArtwork(rec, negative=(m.polarity == "negative"), plane_extent=inputs.extent)
        for rec, m in zip(records, inputs.meta, strict=True)
    )

    # --- stack-up
    stackup, stack_assumptions = resolve_stackup(len(records), job=inputs.job, config=cfg)
    assumptions.extend(stack_assumptions)

    layers = tuple(
        Layer(
            name=f"L{m.index}",
            index=m.index,
            source=m.source,
            identified_by=m.identified_by,
            detail=m.detail,
            side=m.side,
            polarity=m.polarity,  # type: ignore[arg-type]
            polarity_from=m.polarity_from,
            z_top_mm=stackup.z_top_mm[i],
            thickness_mm=stackup.thickness_mm[i],
        )
        for i, m in enumerate(inputs.meta)
    )
    for lay in layers:
        uses[lay.source] = (
            f"copper {lay.name} ({lay.side}, {lay.polarity})"
            if inputs.route == "gerber"
            else uses.get(lay.source, f"copper {lay.name}") + f", {lay.side}, {lay.polarity}"
        )

    # --- registration
    say("registering placement to artwork")
    pads: dict[str, npt.NDArray[np.float64]] = {}
    for side, recs_side, copper_rec in (
        ("top", inputs.paste["top"], records[0]),
        ("bottom", inputs.paste["bottom"], records[-1] if len(records) > 1 else None),
    ):
        source = recs_side or ([copper_rec] if copper_rec is not None else [])
        arrays = [pad_centres(r) for r in source]
        pads[side] = np.vstack(arrays) if arrays else np.empty((0, 2))
    top_rows = [r for r in placement if r.side == "top"]
    bot_rows = [r for r in placement if r.side == "bottom"]
    override = _frame_override(cfg)
    same_frame = inputs.same_frame and override is None
    if same_frame:
        # ODB++ components share the artwork's frame; the fit only scores that.
        override = FrameOverride(dx_mm=0.0, dy_mm=0.0, bottom_mirror=False)
    fit = fit_frame(
        np.array([(r.x_mm, r.y_mm) for r in top_rows]).reshape(-1, 2),
        np.array([(r.x_mm, r.y_mm) for r in bot_rows]).reshape(-1, 2),
        pads["top"],
        pads["bottom"],
        override=override,
    )
    if same_frame:
        fit = replace(fit, method="package frame")
    notices.extend(fit.notices)
    if (
        placement
        and fit.method not in ("config", "package frame")
        and (fit.total == 0 or fit.score < 0.5 or not math.isfinite(fit.residual_mm))
    ):
        assumptions.append(
            f"placement frame: the fit matched {fit.matched} of {fit.total} parts to pads; "
            "state the transform in [placement] (offset_x_mm, offset_y_mm, mirror_bottom)"
        )

    # --- magnetics
    say("identifying magnetics")
    pads_by_ref: dict[str, npt.NDArray[np.float64]] = {}
    for side in ("top", "bottom"):
        rows = [r for r in placement if r.side == side]
        if not rows:
            continue
        xs, ys = apply_fit(
            fit,
            [r.x_mm for r in rows],
            [r.y_mm for r in rows],
            side,  # type: ignore[arg-type]
        )
        assigned = _assign_pads(np.column_stack([xs, ys]), pads[side])
        for r, p in zip(rows, assigned, strict=True):
            if len(p):
                px, py = invert_fit(fit, p[:, 0], p[:, 1], side)  # type: ignore[arg-type]
                pads_by_ref[r.ref] = np.column_stack([px, py])
    result = identify_magnetics(placement, pads_by_ref=pads_by_ref, overrides=_overrides(cfg))
    notices.extend(n for n in result.notices if n not in notices)
    magnetics = tuple(_to_artwork(m, fit) for m in result.magnetics)
    for m in magnetics:
        assumptions.extend(f"{m.ref}: {a}" for a in m.assumptions)

    every = set(pkg.files) | set(pkg.unclassified) | set(inputs.hashes) | set(uses)
    files = tuple(
        FileUse(
            file=rel,
            kind=pkg.files.get(rel, FileKind.OTHER).value,
            use=uses.get(rel, "not used"),
        )
        for rel in sorted(every)
    )
    return Board(
        package=pkg.display_root,
        route=inputs.route,
        route_detail=inputs.route_detail,
        layers=layers,
        magnetics=magnetics,
        excluded=result.excluded,
        frame_fit=fit,
        stackup=stackup,
        outline=inputs.outline,
        drills=tuple(inputs.drills),
        placement=tuple(placement),
        files=files,
        notices=tuple(notices),
        assumptions=tuple(assumptions),
        artworks=artworks,
        input_hashes=inputs.hashes,
        config=cfg,
    )
