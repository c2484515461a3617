"""The ``fluxshadow.toml`` configuration: layer map, stack-up, placement frame, parts,
regulators, thresholds, severities, waivers and safety limits.

Everything is validated on load: an unknown key (at the top level or inside a table), a
value of the wrong type or out of range raises :class:`~fluxshadow.errors.ConfigError`
naming the file and the key path, e.g.
``fluxshadow.toml: part[2].height_mm must be a positive number; got -1``. The physics
values of a ``[[regulator]]`` (``vin_v``, ``vout_v``, ``fsw_hz``, ``inductance_h``,
``ripple_a``) and of a ``[[part]]``'s winding (``turns``, ``winding_radius_mm``,
``winding_bottom_mm``, ``winding_height_mm``) only have to be finite numbers here: values
that make no sense are reported by ``check`` with the key named, and its figures fall back
to the defaults, while the geometric findings are still given.
Array-of-table entries (``[[part]]``, ``[[regulator]]``, ``[[waiver]]``) are counted from 1
in the order they appear in the file.

Example::

    [layers]
    "*.g2" = "copper:2"
    "board-plane.gbr" = "copper:3, negative"
    "notes.gbr" = "ignore"

    [stackup]
    copper_mm = [0.035, 0.035, 0.035, 0.035]
    dielectric_mm = [0.2, 1.065, 0.2]
    epsilon_r = 4.3

    [placement]
    offset_x_mm = 98.34
    offset_y_mm = -148.369
    mirror_bottom = true

    [[part]]
    ref = "L2"
    kind = "inductor"
    body_mm = [5.0, 5.0]
    construction = "shielded"

    [[regulator]]
    parts = ["L2", "U5"]
    vin_v = 12
    vout_v = 3.3
    fsw_hz = 700e3
    switch_net = "SW_3V3"
    coss_f = 450e-12
    edge_time_s = 4e-9

    [severity]
    plane-void = "warning"

    [[waiver]]
    rule = "plane-void"
    ref = "L3"
    layer = "L3"
    reason = "keep-out required by the antenna"

    [limits]
    max_file_bytes = 400_000_000
    max_vertices = 100_000_000
"""

from __future__ import annotations

import math
import tomllib
from collections.abc import Mapping
from dataclasses import dataclass, field
from pathlib import Path
from typing import Literal, cast

from fluxshadow.errors import ConfigError
from fluxshadow.io.identify import parse_layer_spec

__all__ = [
    "AXES",
    "CONFIG_FILE_NAME",
    "CONSTRUCTIONS",
    "LIMIT_KEYS",
    "PART_KINDS",
    "SEVERITIES",
    "Config",
    "PartConfig",
    "PlacementConfig",
    "RegulatorConfig",
    "StackupConfig",
    "Waiver",
    "find_config",
    "load_config",
    "parse_config",
]

CONFIG_FILE_NAME = "fluxshadow.toml"
MAX_CONFIG_BYTES = 5_000_000

PartKind = Literal["inductor", "transformer", "choke", "exclude"]
Construction = Literal["unshielded", "semi-shielded", "shielded", "toroidal", "air-core"]
Axis = Literal["vertical", "horizontal"]
Severity = Literal["error", "warning", "note", "off"]

PART_KINDS: tuple[PartKind, ...] = ("inductor", "transformer", "choke", "exclude")
CONSTRUCTIONS: tuple[Construction, ...] = (
    "unshielded",
    "semi-shielded",
    "shielded",
    "toroidal",
    "air-core",
)
AXES: tuple[Axis, ...] = ("vertical", "horizontal")
SEVERITIES: tuple[Severity, ...] = ("error", "warning", "note", "off")
LIMIT_KEYS: tuple[str, ...] = (
    "max_unpacked_bytes",
    "max_entries",
    "max_file_bytes",
    "max_ratio",
    "ratio_min_bytes",
    "max_repeat",
    "max_macro_depth",
    "max_objects",
    "max_vertices",
    "max_region_vertices",
    "max_drill_features",
)
"""Keys of ``[limits]``: the fields of :class:`fluxshadow.io.package.Limits`."""
_MAX_MACRO_DEPTH = 256
"""Largest ``max_macro_depth`` accepted (deeper nesting would exhaust the stack)."""


@dataclass(frozen=True, kw_only=True)
class StackupConfig:
    """``[stackup]``: thicknesses in mm, top to bottom.

    ``copper_mm`` has one entry per copper layer (or a single entry for all);
    ``dielectric_mm`` one per gap between copper layers (or a single entry for all);
    ``epsilon_r`` one relative permittivity for all gaps or one per gap.
    """

    copper_mm: tuple[float, ...] | None = None
    dielectric_mm: tuple[float, ...] | None = None
    epsilon_r: tuple[float, ...] | None = None
    board_thickness_mm: float | None = None

    @property
    def is_empty(self) -> bool:
        """``True`` when the table gave nothing."""
        return (
            self.copper_mm is None
            and self.dielectric_mm is None
            and self.epsilon_r is None
            and self.board_thickness_mm is None
        )


@dataclass(frozen=True, kw_only=True)
class PlacementConfig:
    """``[placement]``: how placement coordinates map to the Gerber frame (mm, degrees).

    ``None`` means "not given" (the board model fits or assumes it and says so).
    """

    offset_x_mm: float | None = None
    offset_y_mm: float | None = None
    mirror_bottom: bool | None = None
    bottom_mirror_x_mm: float | None = None
    rotation_deg: float | None = None


@dataclass(frozen=True, kw_only=True)
class PartConfig:
    """One ``[[part]]``: what a designator is and, optionally, its physical model (mm).

    ``kind`` ``None`` keeps the tool's own identification; ``"exclude"`` drops the part.
    ``body_mm`` is ``(length along the part's local X, width)`` before its rotation.
    """

    ref: str
    kind: PartKind | None = None
    body_mm: tuple[float, float] | None = None
    height_mm: float | None = None
    construction: Construction | None = None
    axis: Axis | None = None
    axis_angle_deg: float | None = None
    turns: float | None = None
    winding_radius_mm: float | None = None
    winding_bottom_mm: float | None = None
    winding_height_mm: float | None = None


@dataclass(frozen=True, kw_only=True)
class RegulatorConfig:
    """One ``[[regulator]]``: the operating point of a converter (SI units).

    ``switch_net`` names the switch-node net (as in the copper files' net attributes);
    ``coss_f`` is the switches' output capacitance (F) and ``edge_time_s`` the switch-node
    edge time (s), both used by the ``switch-node-capacitance`` rule.
    """

    parts: tuple[str, ...]
    vin_v: float | None = None
    vout_v: float | None = None
    fsw_hz: float | None = None
    inductance_h: float | None = None
    ripple_a: float | None = None
    switch_net: str | None = None
    coss_f: float | None = None
    edge_time_s: float | None = None


@dataclass(frozen=True, kw_only=True)
class Waiver:
    """One ``[[waiver]]``: a finding kept visible but marked waived."""

    rule: str
    ref: str
    layer: str
    reason: str


@dataclass(frozen=True, kw_only=True)
class Config:
    """A validated ``fluxshadow.toml`` (an empty one when ``source`` is ``""``)."""

    source: str = ""
    layers: dict[str, str] = field(default_factory=dict)
    stackup: StackupConfig = field(default_factory=StackupConfig)
    placement: PlacementConfig = field(default_factory=PlacementConfig)
    parts: tuple[PartConfig, ...] = ()
    regulators: tuple[RegulatorConfig, ...] = ()
    thresholds: dict[str, float] = field(default_factory=dict)
    severity: dict[str, Severity] = field(default_factory=dict)
    waivers: tuple[Waiver, ...] = ()
    limits: dict[str, float] = field(default_factory=dict)


# --------------------------------------------------------------------------- checks


class _Checker:
    """Validation helpers that build messages with the file and key path."""

    def __init__(self, source: str) -> None:
        self.source = source

    def fail(self, message: str) -> ConfigError:
        return ConfigError(f"{self.source}: {message}" if self.source else message)

    def table(self, value: object, path: str) -> dict[str, object]:
        if not isinstance(value, dict):
            raise self.fail(f"{path} must be a table; got {_show(value)}")
        return cast(dict[str, object], value)

    def keys(self, table: Mapping[str, object], allowed: tuple[str, ...], path: str) -> None:
        for key in table:
            if key not in allowed:
                where = f"{path} keys" if path else "top-level keys"
                raise self.fail(f"{where} must be among {', '.join(allowed)}; got {key!r}")

    def required(self, table: Mapping[str, object], key: str, path: str) -> object:
        if key not in table:
            raise self.fail(f"{path}.{key} must be given; got nothing")
        return table[key]

    def number(
        self,
        value: object,
        path: str,
        *,
        positive: bool = False,
        non_negative: bool = False,
        minimum: float | None = None,
    ) -> float:
        ok = isinstance(value, (int, float)) and not isinstance(value, bool)
        v = float(cast(float, value)) if ok else math.nan
        if ok and not math.isfinite(v):
            ok = False
        if ok and positive and v <= 0:
            ok = False
        if ok and non_negative and v < 0:
            ok = False
        if ok and minimum is not None and v < minimum:
            ok = False
        if not ok:
            if positive:
                kind = "a positive number"
            elif non_negative:
                kind = "a number >= 0"
            elif minimum is not None:
                kind = f"a number >= {minimum:g}"
            else:
                kind = "a finite number"
            raise self.fail(f"{path} must be {kind}; got {_show(value)}")
        return v

    def numbers(self, value: object, path: str, *, positive: bool = True) -> tuple[float, ...]:
        if isinstance(value, list):
            if not value:
                raise self.fail(f"{path} must be a non-empty list of numbers; got []")
            return tuple(
                self.number(v, f"{path}[{i}]", positive=positive) for i, v in enumerate(value)
            )
        raise self.fail(f"{path} must be a list of numbers; got {_show(value)}")

    def text(self, value: object, path: str) -> str:
        if not isinstance(value, str) or not value.strip():
            raise self.fail(f"{path} must be a non-empty string; got {_show(value)}")
        return value.strip()

    def choice(self, value: object, path: str, options: tuple[str, ...]) -> str:
        if not isinstance(value, str) or value.strip().lower() not in options:
            raise self.fail(f"{path} must be one of {', '.join(options)}; got {_show(value)}")
        return value.strip().lower()

    def boolean(self, value: object, path: str) -> bool:
        if not isinstance(value, bool):
            raise self.fail(f"{path} must be true or false; got {_show(value)}")
        return value

    def tables(self, value: object, path: str) -> list[dict[str, object]]:
        if isinstance(value, dict):
            raise self.fail(f"{path} must be an array of tables ([[{path}]]); got a single table")
        if not isinstance(value, list) or not all(isinstance(v, dict) for v in value):
            raise self.fail(f"{path} must be an array of tables ([[{path}]]); got {_show(value)}")
        return [cast(dict[str, object], v) for v in value]


def _show(value: object) -> str:
    if isinstance(value, bool):
        return "true" if value else "false"
    if isinstance(value, (int, float)):
        return f"{value:g}" if isinstance(value, float) else str(value)
    if isinstance(value, dict):
        return "a table"
    text = repr(value)
    return text if len(text) <= 60 else text[:57] + "..."


_TOP_KEYS = (
    "layers",
    "stackup",
    "placement",
    "part",
    "regulator",
    "thresholds",
    "severity",
    "waiver",
    "limits",
)
_STACKUP_KEYS = ("copper_mm", "dielectric_mm", "epsilon_r", "board_thickness_mm")
_PLACEMENT_KEYS = (
    "offset_x_mm",
    "offset_y_mm",
    "mirror_bottom",
    "bottom_mirror_x_mm",
    "rotation_deg",
)
_PART_KEYS = (
    "ref",
    "kind",
    "body_mm",
    "height_mm",
    "construction",
    "axis",
    "axis_angle_deg",
    "turns",
    "winding_radius_mm",
    "winding_bottom_mm",
    "winding_height_mm",
)
_REGULATOR_KEYS = (
    "parts",
    "vin_v",
    "vout_v",
    "fsw_hz",
    "inductance_h",
    "ripple_a",
    "switch_net",
    "coss_f",
    "edge_time_s",
)
_COSS_RANGE_F = (1e-13, 1e-6)
"""Plausible switch output capacitances (F): a value outside is most likely in pF or nF."""
_EDGE_RANGE_S = (1e-11, 1e-5)
"""Plausible switch-node edge times (s): a value outside is most likely in ns."""
_WAIVER_KEYS = ("rule", "ref", "layer", "reason")


def _layers(c: _Checker, value: object) -> dict[str, str]:
    table = c.table(value, "layers")
    out: dict[str, str] = {}
    for key, spec in table.items():
        quoted = '"' + key.replace("\\", "\\\\").replace('"', '\\"') + '"'
        path = (
            f"layers.{key}"
            if key.replace("_", "").replace("-", "").isalnum()
            else f"layers.{quoted}"
        )
        if not isinstance(spec, str):
            raise c.fail(
                f'{path} must be a layer spec string such as "copper:2"; got {_show(spec)}'
            )
        try:
            parse_layer_spec(spec)
        except ConfigError as exc:
            raise c.fail(f"{path}: {exc}") from None
        out[key] = spec
    return out


def _stackup(c: _Checker, value: object) -> StackupConfig:
    t = c.table(value, "stackup")
    c.keys(t, _STACKUP_KEYS, "stackup")
    copper = c.numbers(t["copper_mm"], "stackup.copper_mm") if "copper_mm" in t else None
    dielectric = (
        c.numbers(t["dielectric_mm"], "stackup.dielectric_mm") if "dielectric_mm" in t else None
    )
    eps: tuple[float, ...] | None = None
    if "epsilon_r" in t:
        raw = t["epsilon_r"]
        if isinstance(raw, list):
            eps = tuple(
                c.number(v, f"stackup.epsilon_r[{i}]", minimum=1.0) for i, v in enumerate(raw)
            )
            if not eps:
                raise c.fail("stackup.epsilon_r must be a number >= 1 or a non-empty list; got []")
        else:
            eps = (c.number(raw, "stackup.epsilon_r", minimum=1.0),)
    board = (
        c.number(t["board_thickness_mm"], "stackup.board_thickness_mm", positive=True)
        if "board_thickness_mm" in t
        else None
    )
    if (
        copper is not None
        and dielectric is not None
        and len(copper) > 1
        and len(dielectric) > 1
        and len(dielectric) != len(copper) - 1
    ):
        raise c.fail(
            f"stackup.dielectric_mm must have {len(copper) - 1} entries (one per gap between "
            f"the {len(copper)} copper layers); got {len(dielectric)}"
        )
    if (
        eps is not None
        and dielectric is not None
        and len(eps) > 1
        and len(dielectric) > 1
        and len(eps) != len(dielectric)
    ):
        raise c.fail(
            f"stackup.epsilon_r must have 1 or {len(dielectric)} entries (one per "
            f"dielectric gap); got {len(eps)}"
        )
    return StackupConfig(
        copper_mm=copper, dielectric_mm=dielectric, epsilon_r=eps, board_thickness_mm=board
    )


def _placement(c: _Checker, value: object) -> PlacementConfig:
    t = c.table(value, "placement")
    c.keys(t, _PLACEMENT_KEYS, "placement")

    def num(key: str) -> float | None:
        return c.number(t[key], f"placement.{key}") if key in t else None

    return PlacementConfig(
        offset_x_mm=num("offset_x_mm"),
        offset_y_mm=num("offset_y_mm"),
        mirror_bottom=(
            c.boolean(t["mirror_bottom"], "placement.mirror_bottom")
            if "mirror_bottom" in t
            else None
        ),
        bottom_mirror_x_mm=num("bottom_mirror_x_mm"),
        rotation_deg=num("rotation_deg"),
    )


def _parts(c: _Checker, value: object) -> tuple[PartConfig, ...]:
    out: list[PartConfig] = []
    seen: dict[str, str] = {}
    for i, t in enumerate(c.tables(value, "part"), start=1):
        p = f"part[{i}]"
        c.keys(t, _PART_KEYS, p)
        ref = c.text(c.required(t, "ref", p), f"{p}.ref")
        if ref.upper() in seen:
            raise c.fail(f"{p}.ref must be unique; got {ref!r} (also {seen[ref.upper()]})")
        seen[ref.upper()] = p

        def pos(key: str, p: str = p, t: dict[str, object] = t) -> float | None:
            return c.number(t[key], f"{p}.{key}", positive=True) if key in t else None

        # The winding's physics values: any finite number here; values that make no sense
        # for the part (a radius beyond the body, turns below 1) are reported by the check,
        # which falls back to its defaults (fluxshadow.checks.source.checked_part).
        def num(key: str, p: str = p, t: dict[str, object] = t) -> float | None:
            return c.number(t[key], f"{p}.{key}") if key in t else None

        body: tuple[float, float] | None = None
        if "body_mm" in t:
            dims = c.numbers(t["body_mm"], f"{p}.body_mm")
            if len(dims) != 2:
                raise c.fail(f"{p}.body_mm must be [width, length] (2 numbers); got {len(dims)}")
            body = (dims[0], dims[1])
        kind = cast(PartKind, c.choice(t["kind"], f"{p}.kind", PART_KINDS)) if "kind" in t else None
        construction = (
            cast(Construction, c.choice(t["construction"], f"{p}.construction", CONSTRUCTIONS))
            if "construction" in t
            else None
        )
        axis = cast(Axis, c.choice(t["axis"], f"{p}.axis", AXES)) if "axis" in t else None
        out.append(
            PartConfig(
                ref=ref,
                kind=kind,
                body_mm=body,
                height_mm=pos("height_mm"),
                construction=construction,
                axis=axis,
                axis_angle_deg=(
                    c.number(t["axis_angle_deg"], f"{p}.axis_angle_deg")
                    if "axis_angle_deg" in t
                    else None
                ),
                turns=num("turns"),
                winding_radius_mm=num("winding_radius_mm"),
                winding_bottom_mm=num("winding_bottom_mm"),
                winding_height_mm=num("winding_height_mm"),
            )
        )
    return tuple(out)


def _regulators(c: _Checker, value: object) -> tuple[RegulatorConfig, ...]:
    out: list[RegulatorConfig] = []
    for i, t in enumerate(c.tables(value, "regulator"), start=1):
        p = f"regulator[{i}]"
        c.keys(t, _REGULATOR_KEYS, p)
        raw = c.required(t, "parts", p)
        if isinstance(raw, str):
            raw = [raw]
        if not isinstance(raw, list) or not raw:
            raise c.fail(f"{p}.parts must be a non-empty list of designators; got {_show(raw)}")
        parts = tuple(c.text(v, f"{p}.parts[{j}]") for j, v in enumerate(raw))

        def pos(key: str, p: str = p, t: dict[str, object] = t) -> float | None:
            return c.number(t[key], f"{p}.{key}", positive=True) if key in t else None

        def within(key: str, bounds: tuple[float, float], unit: str, p: str = p) -> float | None:
            v = pos(key)
            if v is not None and not bounds[0] <= v <= bounds[1]:
                raise c.fail(
                    f"{p}.{key} must be in {unit}, between {bounds[0]:g} and {bounds[1]:g}; "
                    f"got {v:g}"
                )
            return v

        # The operating point: any finite number here; a point that makes no sense (Vout >=
        # Vin, a negative value, fsw out of range) is reported by the check, whose figures
        # fall back to per A/us (fluxshadow.checks.operating.operating_points).
        def num(key: str, p: str = p, t: dict[str, object] = t) -> float | None:
            return c.number(t[key], f"{p}.{key}") if key in t else None

        out.append(
            RegulatorConfig(
                parts=parts,
                vin_v=num("vin_v"),
                vout_v=num("vout_v"),
                fsw_hz=num("fsw_hz"),
                inductance_h=num("inductance_h"),
                ripple_a=num("ripple_a"),
                switch_net=(
                    c.text(t["switch_net"], f"{p}.switch_net") if "switch_net" in t else None
                ),
                coss_f=within("coss_f", _COSS_RANGE_F, "farads"),
                edge_time_s=within("edge_time_s", _EDGE_RANGE_S, "seconds"),
            )
        )
    return tuple(out)


def _waivers(c: _Checker, value: object) -> tuple[Waiver, ...]:
    out: list[Waiver] = []
    for i, t in enumerate(c.tables(value, "waiver"), start=1):
        p = f"waiver[{i}]"
        c.keys(t, _WAIVER_KEYS, p)
        # ``layer`` is optional: absent, "" or "*" waive the finding on any layer; a bare
        # number means that copper layer (2 -> "L2").
        layer = t.get("layer", "*")
        if isinstance(layer, int) and not isinstance(layer, bool):
            layer = f"L{layer}"
        if layer == "":
            layer = "*"
        out.append(
            Waiver(
                rule=c.text(c.required(t, "rule", p), f"{p}.rule"),
                ref=c.text(c.required(t, "ref", p), f"{p}.ref"),
                layer=c.text(layer, f"{p}.layer"),
                reason=c.text(c.required(t, "reason", p), f"{p}.reason"),
            )
        )
    return tuple(out)


def _limits(c: _Checker, value: object) -> dict[str, float]:
    t = c.table(value, "limits")
    c.keys(t, LIMIT_KEYS, "limits")
    out: dict[str, float] = {}
    for key, v in t.items():
        path = f"limits.{key}"
        if key == "max_ratio":
            out[key] = c.number(v, path, minimum=1.0)
            continue
        if not isinstance(v, int) or isinstance(v, bool) or v < 1:
            raise c.fail(f"{path} must be a whole number >= 1; got {_show(v)}")
        if key == "max_macro_depth" and v > _MAX_MACRO_DEPTH:
            raise c.fail(f"{path} must be at most {_MAX_MACRO_DEPTH}; got {v}")
        out[key] = v
    return out


def parse_config(text: str, *, source: str = "<string>") -> Config:
    """Parse and validate configuration text.

    Parameters
    ----------
    text : str
        TOML text.
    source : str
        File name used in messages and kept in ``Config.source``.

    Raises
    ------
    ConfigError
        Malformed TOML, unknown keys, or values of the wrong type or range.
    """
    c = _Checker(source)
    try:
        data = tomllib.loads(text)
    except tomllib.TOMLDecodeError as exc:
        raise c.fail(f"configuration must be valid TOML; got {exc}") from None
    c.keys(data, _TOP_KEYS, "")
    thresholds: dict[str, float] = {}
    if "thresholds" in data:
        for key, v in c.table(data["thresholds"], "thresholds").items():
            thresholds[key] = c.number(v, f"thresholds.{key}")
    severity: dict[str, Severity] = {}
    if "severity" in data:
        for key, v in c.table(data["severity"], "severity").items():
            severity[key] = cast(Severity, c.choice(v, f"severity.{key}", SEVERITIES))
    return Config(
        source=source,
        layers=_layers(c, data["layers"]) if "layers" in data else {},
        stackup=_stackup(c, data["stackup"]) if "stackup" in data else StackupConfig(),
        placement=_placement(c, data["placement"]) if "placement" in data else PlacementConfig(),
        parts=_parts(c, data["part"]) if "part" in data else (),
        regulators=_regulators(c, data["regulator"]) if "regulator" in data else (),
        thresholds=thresholds,
        severity=severity,
        waivers=_waivers(c, data["waiver"]) if "waiver" in data else (),
        limits=_limits(c, data["limits"]) if "limits" in data else {},
    )


def load_config(path: str | Path) -> Config:
    """Read and validate a ``fluxshadow.toml`` file.

    Raises
    ------
    ConfigError
        When the file cannot be read, is not UTF-8, or is invalid (see
        :func:`parse_config`).
    """
    p = Path(path)
    source = str(path)
    try:
        size = p.stat().st_size
        if size > MAX_CONFIG_BYTES:
            msg = (
                f"{source}: configuration size must be at most {MAX_CONFIG_BYTES} bytes; got {size}"
            )
            raise ConfigError(msg)
        text = p.read_bytes().decode("utf-8-sig")
    except OSError as exc:
        msg = f"{source}: configuration file must be readable; got {exc.strerror}"
        raise ConfigError(msg) from exc
    except UnicodeDecodeError as exc:
        msg = f"{source}: configuration must be UTF-8 text; got undecodable bytes at {exc.start}"
        raise ConfigError(msg) from exc
    return parse_config(text, source=source)


def find_config(package_dir: str | Path) -> Path | None:
    """Find ``fluxshadow.toml`` inside or beside a package.

    Looked for, in turn: directly inside the package folder; in its sub-folders
    (shallowest first, then by name); beside the package (in the folder that holds the
    package folder or archive).

    Parameters
    ----------
    package_dir : path
        The package folder, or an archive file.

    Returns
    -------
    Path or None
    """
    p = Path(package_dir)
    if p.is_dir():
        inside = p / CONFIG_FILE_NAME
        if inside.is_file():
            return inside
        found = sorted(
            (q for q in p.rglob(CONFIG_FILE_NAME) if q.is_file()),
            key=lambda q: (len(q.relative_to(p).parts), q.as_posix()),
        )
        if found:
            return found[0]
    beside = p.parent / CONFIG_FILE_NAME
    if beside.is_file() and beside.resolve() != p.resolve():
        return beside
    return None
