"""Board stack-up: depth and thickness of every copper layer, and the dielectric gaps.

The stack-up comes, per quantity, from the configuration (``[stackup]``, the user's word),
else from the Gerber job file's ``MaterialStackup``, else from defaults by copper-layer
count. Every defaulted quantity produces an assumption message for the report.

Depths are measured downward from the board top, taken as the outer surface of the top
copper (solder mask and legend are ignored: they are tens of micrometres and not
conductors).
"""

from __future__ import annotations

import itertools
import math
from dataclasses import dataclass
from typing import Literal

import numpy as np
import numpy.typing as npt

from fluxshadow.errors import ConfigError, InputError
from fluxshadow.io.config import Config
from fluxshadow.io.records import JobRecord

__all__ = [
    "DEFAULT_BOARD_THICKNESS_MM",
    "DEFAULT_COPPER_MM",
    "DEFAULT_EPSILON_R",
    "DEFAULT_OUTER_GAP_MM",
    "Stackup",
    "default_stackup",
    "resolve_stackup",
]

# Defaults by layer count: common practice for standard FR-4 boards, not a measurement of
# any particular board.
DEFAULT_BOARD_THICKNESS_MM = 1.6
"""Common-practice finished board thickness (mm)."""
DEFAULT_COPPER_MM = 0.035
"""Common-practice copper foil thickness, 1 oz/ft^2 (mm), used for every layer."""
DEFAULT_OUTER_GAP_MM = 0.2
"""Common-practice prepreg thickness between adjacent layers of a multilayer board (mm)."""
DEFAULT_EPSILON_R = 4.3
"""Relative permittivity of FR-4 around 1 MHz: common practice (data sheets give ~4.2-4.7)."""

_MIN_GAP_MM = 0.075

StackupSource = Literal["job file", "config", "default"]
FloatArray = npt.NDArray[np.float64]


@dataclass(frozen=True, kw_only=True)
class Stackup:
    """Copper layers and dielectric gaps, top to bottom.

    Attributes
    ----------
    z_top_mm : tuple of float, length n
        Depth of each copper layer's top surface below the board top (mm); layer 1 is 0.
    thickness_mm : tuple of float, length n
        Copper thickness of each layer (mm).
    gap_mm : tuple of float, length n - 1
        Dielectric thickness between copper layer k and k + 1 (mm).
    epsilon_r : tuple of float, length n - 1
        Relative permittivity of each gap.
    board_thickness_mm : float
        From the board top to the bottom of the last copper layer (mm); for a one-layer
        board, the stated or default board thickness.
    source : {"job file", "config", "default"}
        Where the thicknesses came from.
    assumptions : tuple of str
        What had to be assumed (empty when everything was stated).
    names : tuple of str
        Copper layer names, ``L1`` ... ``Ln``.
    """

    z_top_mm: tuple[float, ...]
    thickness_mm: tuple[float, ...]
    gap_mm: tuple[float, ...]
    epsilon_r: tuple[float, ...]
    board_thickness_mm: float
    source: StackupSource
    assumptions: tuple[str, ...] = ()
    names: tuple[str, ...] = ()

    @property
    def n_copper(self) -> int:
        """Number of copper layers."""
        return len(self.z_top_mm)

    @property
    def z_bottom_mm(self) -> tuple[float, ...]:
        """Depth of each copper layer's bottom surface (mm)."""
        return tuple(z + t for z, t in zip(self.z_top_mm, self.thickness_mm, strict=True))

    @property
    def z_mid_mm(self) -> FloatArray:
        """Depth of each copper layer's mid-plane (mm), shape (n,)."""
        return np.asarray(self.z_top_mm, dtype=np.float64) + 0.5 * np.asarray(
            self.thickness_mm, dtype=np.float64
        )

    def distance_mm(self, upper: int, lower: int) -> float:
        """Dielectric distance from the bottom of copper ``upper`` to the top of ``lower``.

        Layers are 1-based (1 = top); ``upper < lower``.
        """
        if not 1 <= upper < lower <= self.n_copper:
            msg = (
                f"layer pair must satisfy 1 <= upper < lower <= {self.n_copper}; "
                f"got {upper}, {lower}"
            )
            raise InputError(msg)
        return self.z_top_mm[lower - 1] - self.z_bottom_mm[upper - 1]


def _default_gaps(n: int, copper: tuple[float, ...], board_mm: float) -> tuple[list[float], str]:
    """Dielectric gaps for ``n`` copper layers filling ``board_mm`` (common practice).

    Two layers: one core. Otherwise every gap is a 0.2 mm prepreg except the centre gap
    (an even layer count has one, an odd count two), which takes the rest, so the build is
    symmetric. When the rest would be thinner than 0.1 mm the gaps are spread evenly
    instead; when even that is thinner than 0.075 mm every gap is 0.1 mm and the board
    comes out thicker.
    """
    gaps_n = n - 1
    dielectric = board_mm - sum(copper)
    if gaps_n == 1:
        return [dielectric], f"one {dielectric:.3f} mm core"
    gaps = [DEFAULT_OUTER_GAP_MM] * gaps_n
    middle = sorted({(gaps_n - 1) // 2, gaps_n // 2})
    rest = dielectric - DEFAULT_OUTER_GAP_MM * (gaps_n - len(middle))
    if rest / len(middle) >= 0.1:
        for i in middle:
            gaps[i] = rest / len(middle)
        core = ", ".join(f"{gaps[i]:.3f}" for i in middle)
        return gaps, f"{DEFAULT_OUTER_GAP_MM} mm prepreg gaps with a {core} mm centre core"
    even = dielectric / gaps_n
    if even >= _MIN_GAP_MM:
        return [even] * gaps_n, f"{gaps_n} even gaps of {even:.3f} mm"
    return [0.1] * gaps_n, f"{gaps_n} gaps of 0.100 mm (too many layers for the board thickness)"


def default_stackup(
    n_copper: int, *, board_thickness_mm: float = DEFAULT_BOARD_THICKNESS_MM
) -> tuple[list[float], list[float], str]:
    """Common-practice copper and gap thicknesses for ``n_copper`` layers (mm).

    Returns
    -------
    (copper_mm, gap_mm, description)
        Copper 35 um on every layer; gaps as :func:`_default_gaps` describes (2 layers:
        1.53 mm core; 4 layers: 0.2 mm prepreg, ~1.06 mm core, 0.2 mm prepreg; 6 and 8
        layers: 0.2 mm prepregs around a thicker centre core). The description names the
        build for the assumption message.
    """
    if n_copper < 1:
        msg = f"copper layer count must be at least 1; got {n_copper}"
        raise InputError(msg)
    copper = [DEFAULT_COPPER_MM] * n_copper
    if n_copper == 1:
        return (
            copper,
            [],
            f"{DEFAULT_COPPER_MM * 1000:.0f} um copper on a {board_thickness_mm} mm board",
        )
    gaps, what = _default_gaps(n_copper, tuple(copper), board_thickness_mm)
    return copper, gaps, f"{DEFAULT_COPPER_MM * 1000:.0f} um copper, {what}"


def _broadcast(values: tuple[float, ...], n: int, what: str, source: str) -> list[float]:
    if len(values) == 1:
        return [values[0]] * n
    if len(values) != n:
        prefix = f"{source}: " if source else ""
        msg = f"{prefix}{what} must have {n} entries (or 1 for all); got {len(values)}"
        raise ConfigError(msg)
    return list(values)


def _from_job(job: JobRecord, n: int) -> tuple[list[float], list[float], list[float | None]] | None:
    """Copper thicknesses, gaps and gap permittivities from a job file, or ``None``."""
    layers = [la for la in job.stackup if la.kind in ("copper", "dielectric")]
    copper_idx = [i for i, la in enumerate(layers) if la.kind == "copper"]
    if len(copper_idx) != n:
        return None
    copper = [layers[i].thickness_mm for i in copper_idx]
    gaps: list[float] = []
    eps: list[float | None] = []
    for a, b in itertools.pairwise(copper_idx):
        between = layers[a + 1 : b]
        t = sum(la.thickness_mm for la in between) if between else math.nan
        gaps.append(t)
        # Series dielectrics between two copper layers: thickness-weighted harmonic mean.
        if between and all(la.epsilon_r is not None for la in between) and t > 0:
            eps.append(t / sum(la.thickness_mm / (la.epsilon_r or 1.0) for la in between))
        else:
            eps.append(None)
    return copper, gaps, eps


def resolve_stackup(
    n_copper: int, *, job: JobRecord | None, config: Config | None
) -> tuple[Stackup, list[str]]:
    """Decide the stack-up of a board with ``n_copper`` copper layers.

    Precedence, per quantity: configuration ``[stackup]`` (copper_mm, dielectric_mm,
    epsilon_r, board_thickness_mm), then the job file (``MaterialStackup`` when it lists
    exactly ``n_copper`` copper layers with thicknesses; ``BoardThickness``), then common-
    practice defaults (:func:`default_stackup`, epsilon_r 4.3). Defaulted gaps are scaled
    to fill the stated board thickness when one is known.

    Parameters
    ----------
    n_copper : int
        Number of copper layers (>= 1).
    job : JobRecord or None
    config : Config or None

    Returns
    -------
    (Stackup, list of str)
        The stack-up and the assumption messages (also kept in ``Stackup.assumptions``).

    Raises
    ------
    ConfigError
        When ``[stackup]`` lists a number of entries that does not fit ``n_copper``.
    InputError
        When ``n_copper`` is below 1 (a package without copper layers).
    """
    if n_copper < 1:
        msg = f"copper layer count must be at least 1; got {n_copper}"
        raise InputError(msg)
    n = n_copper
    cfg = config.stackup if config is not None else None
    src_name = config.source if config is not None else ""
    assumptions: list[str] = []

    job_stack = _from_job(job, n) if job is not None else None
    if job is not None and job.stackup and job_stack is None:
        n_job = sum(1 for la in job.stackup if la.kind == "copper")
        assumptions.append(
            f"job file stack-up lists {n_job} copper layers but the package has {n}; "
            "its stack-up was not used"
        )

    board_mm: float | None = None
    board_from = ""
    if cfg is not None and cfg.board_thickness_mm is not None:
        board_mm, board_from = cfg.board_thickness_mm, "config"
    elif job is not None and job.board_thickness_mm is not None:
        board_mm, board_from = job.board_thickness_mm, "job file"

    # Copper thicknesses.
    copper: list[float]
    copper_from: StackupSource
    if cfg is not None and cfg.copper_mm is not None:
        copper = _broadcast(cfg.copper_mm, n, "stackup.copper_mm", src_name)
        copper_from = "config"
    elif job_stack is not None and all(math.isfinite(t) and t > 0 for t in job_stack[0]):
        copper, copper_from = job_stack[0], "job file"
    else:
        copper, copper_from = [DEFAULT_COPPER_MM] * n, "default"
        assumptions.append(
            f"copper thickness assumed {DEFAULT_COPPER_MM * 1000:.0f} um on every layer "
            "(common practice; give [stackup] copper_mm to state it)"
        )

    # Dielectric gaps.
    gaps: list[float]
    gaps_from: StackupSource
    if n == 1:
        gaps, gaps_from = [], copper_from
    elif cfg is not None and cfg.dielectric_mm is not None:
        gaps = _broadcast(cfg.dielectric_mm, n - 1, "stackup.dielectric_mm", src_name)
        gaps_from = "config"
    elif job_stack is not None and all(math.isfinite(g) and g > 0 for g in job_stack[1]):
        gaps, gaps_from = job_stack[1], "job file"
    else:
        total = board_mm if board_mm is not None else DEFAULT_BOARD_THICKNESS_MM
        gaps, what = _default_gaps(n, tuple(copper), total)
        gaps_from = "default"
        stated = (
            f"the {board_from}'s {total} mm board thickness"
            if board_mm is not None
            else f"a {total} mm board (common practice)"
        )
        assumptions.append(
            f"dielectric gaps assumed from {stated}: {what} (give [stackup] dielectric_mm to "
            "state them)"
        )

    # Permittivity.
    eps: list[float]
    if n == 1:
        eps = []
    elif cfg is not None and cfg.epsilon_r is not None:
        eps = _broadcast(cfg.epsilon_r, n - 1, "stackup.epsilon_r", src_name)
    elif (
        job_stack is not None
        and gaps_from == "job file"
        and all(e is not None for e in job_stack[2])
    ):
        eps = [float(e) for e in job_stack[2] if e is not None]
    else:
        eps = [DEFAULT_EPSILON_R] * (n - 1)
        assumptions.append(
            f"dielectric relative permittivity assumed {DEFAULT_EPSILON_R} (FR-4, common "
            "practice; give [stackup] epsilon_r to state it)"
        )

    z: list[float] = []
    depth = 0.0
    for k in range(n):
        z.append(depth)
        depth += copper[k]
        if k < n - 1:
            depth += gaps[k]
    if n == 1:
        board = board_mm if board_mm is not None else DEFAULT_BOARD_THICKNESS_MM
        if board_mm is None:
            assumptions.append(
                f"board thickness assumed {DEFAULT_BOARD_THICKNESS_MM} mm (common practice)"
            )
    else:
        board = depth
        if board_mm is not None and abs(board - board_mm) > 0.1 * board_mm:
            assumptions.append(
                f"stack-up adds up to {board:.3f} mm but the {board_from} states a "
                f"{board_mm} mm board; the layer thicknesses were used"
            )

    sources = {copper_from, gaps_from}
    source: StackupSource = (
        "config" if "config" in sources else "job file" if "job file" in sources else "default"
    )
    stack = Stackup(
        z_top_mm=tuple(z),
        thickness_mm=tuple(copper),
        gap_mm=tuple(gaps),
        epsilon_r=tuple(eps),
        board_thickness_mm=board,
        source=source,
        assumptions=tuple(assumptions),
        names=tuple(f"L{k + 1}" for k in range(n)),
    )
    return stack, assumptions
