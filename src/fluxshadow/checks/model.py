"""Findings and the report: frozen data that crosses from ``checks/`` to ``report/``.

Everything here is plain (str, float, int, bool, tuples, mappings); geometry that a picture
might want travels as coordinate tuples, never as shapely objects. Lengths in mm, areas in
mm^2, physical figures in the units their key names carry (``_nh``, ``_mv``, ``_db``).
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass, field
from typing import Literal

__all__ = [
    "SEVERITIES",
    "SEVERITY_RANK",
    "Finding",
    "InputFile",
    "LayerResult",
    "MagneticResult",
    "Report",
    "RingInfo",
    "Severity",
]

Severity = Literal["error", "warning", "note"]
SEVERITIES: tuple[Severity, ...] = ("error", "warning", "note")
SEVERITY_RANK: dict[str, int] = {"error": 3, "warning": 2, "note": 1, "never": 99}
"""Order of severities (higher is worse); ``never`` is above all, for ``--fail-on never``."""

Metric = float | int | str | bool | None


@dataclass(frozen=True, kw_only=True)
class Finding:
    """One thing a reviewer should look at.

    Attributes
    ----------
    rule : str
        Rule id (``plane-void``, ``through-cutout``, ``void-ring``, ``exposed-trace``,
        ``assumption``).
    severity : {"error", "warning", "note"}
    ref : str
        Designator of the magnetic ("" for board-wide findings).
    layer : str
        Copper layer name (``"L2"``) or "" when not layer-specific.
    x_mm, y_mm : float or None
        Where to look, artwork frame (mm).
    message : str
        One or two sentences with the key figures.
    metrics : mapping of str to number, str, bool or None
        Figures with unit-suffixed keys; physics figures not computed yet are ``None``.
    waived : bool
        A configured waiver matched; the finding stays in the report.
    waiver_reason : str
        The waiver's reason, when waived.
    """

    rule: str
    severity: Severity
    ref: str
    layer: str
    x_mm: float | None
    y_mm: float | None
    message: str
    metrics: Mapping[str, Metric] = field(default_factory=dict)
    waived: bool = False
    waiver_reason: str = ""


@dataclass(frozen=True, kw_only=True)
class RingInfo:
    """Topology of the copper around one void.

    ``closed``: the plane copper surrounds the void on every side (a hole in a plane
    polygon), so it can carry a circulating eddy current; otherwise the void is opened to
    a plane edge (``opened_to`` says how it was decided).
    """

    closed: bool
    inner_perimeter_mm: float
    inner_area_mm2: float
    search_window_mm: float
    opened_to: str = ""
    path_mm: tuple[tuple[float, float], ...] = field(default=(), repr=False, compare=False)
    """For a closed ring, the inner edge of its copper (the hole's outline, closed), where
    the ring current flows; empty otherwise. For pictures; not in the JSON report."""


@dataclass(frozen=True, kw_only=True)
class LayerResult:
    """What lies under (or over, for bottom parts) one magnetic on one copper layer.

    ``figures`` holds the physics figures of the layer with unit-suffixed keys
    (``shielding_db``, ``delta_l_nh``, ``delta_l_pct``, ``freq_hz``; with the sheet model
    also ``ring_current_a``, ``moment_ratio``) and ``model`` / ``figures_per`` saying how
    they were computed; empty when no figures were computed.
    """

    layer: str
    depth_mm: float
    zone_area_mm2: float
    plane_around: bool
    coverage: float
    copper_coverage: float
    void_area_mm2: float
    trace_area_mm2: float
    ring: RingInfo | None
    shielded_by: str = ""
    figures: Mapping[str, Metric] = field(default_factory=dict)


@dataclass(frozen=True, kw_only=True)
class MagneticResult:
    """One magnetic with its zone and per-layer results (artwork frame, mm)."""

    ref: str
    kind: str
    value_text: str
    side: str
    x_mm: float
    y_mm: float
    body_mm: tuple[float, float]
    outline: tuple[tuple[float, float], ...]
    winding_radius_mm: float
    layers: tuple[LayerResult, ...]
    zones: Mapping[str, tuple[tuple[float, float], ...]] = field(default_factory=dict)


@dataclass(frozen=True, kw_only=True)
class InputFile:
    """One input file and its SHA-256."""

    path: str
    kind: str
    use: str
    sha256: str


@dataclass(frozen=True, kw_only=True)
class Report:
    """The result of ``fluxshadow check``: findings, per-magnetic results, provenance.

    ``layer_files`` maps each copper layer name (``"L2"``) to its Gerber file (or ODB++
    features file), a path relative to the package as in ``inputs`` (empty when unknown).
    ``route`` is the input route the board was read by (``"gerber"`` or ``"odb"``).
    """

    package: str
    tool_version: str
    magnetics: tuple[MagneticResult, ...]
    findings: tuple[Finding, ...]
    assumptions: tuple[str, ...]
    notices: tuple[str, ...]
    inputs: tuple[InputFile, ...]
    layers: tuple[str, ...]
    rules: Mapping[str, str]
    config: str = ""
    layer_files: Mapping[str, str] = field(default_factory=dict)
    route: str = "gerber"

    def worst(self, *, include_waived: bool = False) -> str | None:
        """The worst severity among findings (waived ones skipped unless asked)."""
        ranks = [f.severity for f in self.findings if include_waived or not f.waived]
        return max(ranks, key=SEVERITY_RANK.__getitem__) if ranks else None

    def failed(self, fail_on: str) -> bool:
        """Whether any unwaived finding is at or above ``fail_on`` (or ``never``)."""
        if fail_on == "never":
            return False
        limit = SEVERITY_RANK[fail_on]
        return any(SEVERITY_RANK[f.severity] >= limit for f in self.findings if not f.waived)
