"""Thresholds and severities of the checks, validated from ``fluxshadow.toml``."""

from __future__ import annotations

import math
from collections.abc import Mapping
from dataclasses import dataclass, field, fields, replace

from fluxshadow.errors import ConfigError

__all__ = ["DEFAULT_SEVERITY", "RULE_IDS", "Settings", "settings_from_config"]

RULE_IDS = (
    "plane-void",
    "void-ring",
    "through-cutout",
    "exposed-trace",
    "switch-node-capacitance",
    "assumption",
)

DEFAULT_SEVERITY: dict[str, str] = {
    "plane-void": "warning",
    "void-ring": "warning",
    "through-cutout": "warning",
    "exposed-trace": "warning",
    "switch-node-capacitance": "warning",
    "assumption": "note",
}


@dataclass(frozen=True, kw_only=True)
class Settings:
    """Numbers the rules use (mm, mm^2, fractions). See ``docs/rules.md``.

    Attributes
    ----------
    zone_margin_mm : float
        Zone margin around the body at the mounting surface.
    zone_spread : float
        Extra margin per mm of depth (mm/mm).
    plane_ring_mm : float
        Width of the ring around the zone that decides whether a layer carries a plane.
    plane_around_fraction : float
        Plane coverage of that ring needed to call the layer a plane layer there.
    void_min_area_mm2 : float
        Smallest void reported on its own.
    exposed_min_length_mm : float
        Shortest exposed trace length reported.
    opening_mm : float
        Opening disk diameter of the plane/trace split.
    ring_search_max_mm : float
        Largest window half-size tried when tracing a void's topology.
    winding_radius_fraction : float
        Default winding mean radius as a fraction of the body's smaller side.
    switch_node_ratio_warning : float
        Switch-node capacitance as a fraction of the switch's output capacitance above
        which ``switch-node-capacitance`` is a warning (below: a note).
    induced_mv_warning, induced_mv_error : float
        Peak voltage induced in an exposed trace (mV, or mV per A/us without an
        operating point) at which ``exposed-trace`` becomes a warning / an error; below
        the warning level it is a note.
    delta_l_pct_warning, delta_l_pct_error : float
        A closed ring's share of the part's inductance change (% of its value) at which
        ``void-ring`` becomes a warning / an error; below it a note.
    severity : mapping of str to str
        Rule id -> ``error``, ``warning``, ``note`` or ``off``.
    """

    zone_margin_mm: float = 0.5
    zone_spread: float = 1.0
    plane_ring_mm: float = 2.0
    plane_around_fraction: float = 0.5
    void_min_area_mm2: float = 1.0
    exposed_min_length_mm: float = 0.5
    opening_mm: float = 0.5
    ring_search_max_mm: float = 40.0
    winding_radius_fraction: float = 0.35
    switch_node_ratio_warning: float = 0.1
    induced_mv_warning: float = 10.0
    induced_mv_error: float = 50.0
    delta_l_pct_warning: float = 5.0
    delta_l_pct_error: float = 20.0
    severity: Mapping[str, str] = field(default_factory=lambda: dict(DEFAULT_SEVERITY))


_FRACTIONS = {"plane_around_fraction", "winding_radius_fraction", "switch_node_ratio_warning"}


def settings_from_config(
    thresholds: Mapping[str, float], severity: Mapping[str, str], *, source: str = ""
) -> Settings:
    """Validate ``[thresholds]`` and ``[severity]`` into :class:`Settings`.

    Raises
    ------
    ConfigError
        Unknown threshold or rule names, negative or non-finite numbers, fractions
        outside (0, 1].
    """
    where = f"{source}: " if source else ""
    known = {f.name for f in fields(Settings)} - {"severity"}
    values: dict[str, float] = {}
    for key, value in thresholds.items():
        if key not in known:
            msg = (
                f"{where}thresholds.{key} must be one of {', '.join(sorted(known))}; "
                f"got an unknown key"
            )
            raise ConfigError(msg)
        v = float(value)
        ok = math.isfinite(v) and (0 < v <= 1 if key in _FRACTIONS else v >= 0)
        if not ok:
            want = "a fraction in (0, 1]" if key in _FRACTIONS else "a number >= 0"
            msg = f"{where}thresholds.{key} must be {want}; got {value!r}"
            raise ConfigError(msg)
        values[key] = v
    sev = dict(DEFAULT_SEVERITY)
    for rule, level in severity.items():
        if rule not in RULE_IDS:
            msg = f"{where}severity.{rule} must name a rule ({', '.join(RULE_IDS)}); got {rule!r}"
            raise ConfigError(msg)
        sev[rule] = level
    return replace(Settings(), **values, severity=sev)  # type: ignore[arg-type]
