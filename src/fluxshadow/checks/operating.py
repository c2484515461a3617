"""Operating points of the converters: duty, ripple, current slopes and harmonics.

Each ``[[regulator]]`` of the configuration names the parts it drives (its magnetic among
them) and states Vin, Vout, fsw and optionally the inductance and the ripple. Without an
operating point the figures are given per A/us of current slope and the report says so.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from fluxshadow.board.magnetics import Magnetic
from fluxshadow.errors import ConfigError
from fluxshadow.io.config import Config
from fluxshadow.physics.buck import (
    buck_duty,
    buck_ripple_a,
    buck_slopes_a_per_s,
    harmonic_slope_peak_a_per_s,
    triangle_harmonics_a,
)

__all__ = [
    "MAX_HARMONIC",
    "PER_A_PER_US",
    "REFERENCE_FREQ_HZ",
    "OperatingPoint",
    "operating_points",
]

MAX_HARMONIC = 9
"""Highest ripple harmonic summed for induced voltages and shielding sweeps."""

PER_A_PER_US = 1e6
"""The reference slope (A/s) figures are scaled to when no operating point is stated."""

REFERENCE_FREQ_HZ = 1e6
"""Frequency used for eddy-current figures when no operating point is stated (1 MHz,
common practice for small point-of-load converters)."""

_FSW_RANGE_HZ = (1e3, 100e6)


@dataclass(frozen=True, kw_only=True)
class OperatingPoint:
    """The ripple current of one magnetic (SI units).

    When ``stated`` is false the numbers describe a reference slope of 1 A/us at
    :data:`REFERENCE_FREQ_HZ` (50 % duty) and every figure derived from it is "per A/us".
    """

    ref: str
    stated: bool
    source: str
    vin_v: float | None
    vout_v: float | None
    fsw_hz: float
    inductance_h: float | None
    duty: float
    ripple_a: float
    slope_rise_a_per_s: float
    slope_fall_a_per_s: float
    harmonics_a: tuple[float, ...]
    slope_peak_a_per_s: float

    @property
    def label(self) -> str:
        """How figures from this point are qualified in messages."""
        return "at the operating point" if self.stated else "per A/us of current slope"


def _reference(ref: str) -> OperatingPoint:
    duty = 0.5
    # A 50 % triangle with a 1 A/us rise at 1 MHz: ripple = slope * D * T.
    ripple = PER_A_PER_US * duty / REFERENCE_FREQ_HZ
    harmonics = tuple(
        float(triangle_harmonics_a(ripple, duty, n)) for n in range(1, MAX_HARMONIC + 1)
    )
    return OperatingPoint(
        ref=ref,
        stated=False,
        source="none stated (figures per A/us)",
        vin_v=None,
        vout_v=None,
        fsw_hz=REFERENCE_FREQ_HZ,
        inductance_h=None,
        duty=duty,
        ripple_a=ripple,
        slope_rise_a_per_s=PER_A_PER_US,
        slope_fall_a_per_s=-PER_A_PER_US,
        harmonics_a=harmonics,
        slope_peak_a_per_s=harmonic_slope_peak_a_per_s(
            ripple, duty, REFERENCE_FREQ_HZ, MAX_HARMONIC
        ),
    )


def operating_points(
    magnetics: tuple[Magnetic, ...] | list[Magnetic], config: Config
) -> dict[str, OperatingPoint]:
    """The operating point of every magnetic (stated or the per-A/us reference).

    Raises
    ------
    ConfigError
        A regulator whose numbers make no sense for a buck stage (Vout >= Vin, a switching
        frequency outside 1 kHz - 100 MHz, no inductance and no part value, a ripple that
        is not positive), or a part named by two regulators.
    """
    out = {m.ref: _reference(m.ref) for m in magnetics}
    by_ref = {m.ref: m for m in magnetics}
    where = f"{config.source}: " if config.source else ""
    claimed: dict[str, int] = {}
    for i, reg in enumerate(config.regulators, start=1):
        p = f"{where}regulator[{i}]"
        mags = [by_ref[r] for r in reg.parts if r in by_ref]
        if not mags:
            continue
        if reg.vin_v is None and reg.vout_v is None and reg.fsw_hz is None:
            continue  # the entry states only switch-node details, no operating point
        if reg.vin_v is None or reg.vout_v is None or reg.fsw_hz is None:
            missing = [k for k in ("vin_v", "vout_v", "fsw_hz") if getattr(reg, k) is None]
            msg = f"{p}.{missing[0]} must be given for the magnetics {reg.parts}; got nothing"
            raise ConfigError(msg)
        if not reg.vout_v < reg.vin_v:
            msg = (
                f"{p}.vout_v must be below vin_v for a buck stage; "
                f"got {reg.vout_v} V >= {reg.vin_v} V"
            )
            raise ConfigError(msg)
        lo, hi = _FSW_RANGE_HZ
        if not lo <= reg.fsw_hz <= hi:
            msg = f"{p}.fsw_hz must lie between {lo:g} and {hi:g} Hz; got {reg.fsw_hz:g}"
            raise ConfigError(msg)
        for m in mags:
            if m.ref in claimed:
                msg = f"{p}.parts names {m.ref}, which regulator[{claimed[m.ref]}] names too"
                raise ConfigError(msg)
            claimed[m.ref] = i
            ind = reg.inductance_h if reg.inductance_h is not None else m.value_h
            if ind is None or not ind > 0:
                msg = (
                    f"{p}.inductance_h must be given: {m.ref} has no inductance value in the "
                    "placement or BOM; got nothing"
                )
                raise ConfigError(msg)
            duty = float(buck_duty(reg.vin_v, reg.vout_v))
            ripple = (
                float(reg.ripple_a)
                if reg.ripple_a is not None
                else float(buck_ripple_a(reg.vin_v, reg.vout_v, ind, reg.fsw_hz))
            )
            if not (ripple > 0 and math.isfinite(ripple)):
                msg = f"{p}.ripple_a must be a positive current; got {ripple!r}"
                raise ConfigError(msg)
            rise, fall = buck_slopes_a_per_s(reg.vin_v, reg.vout_v, ind)
            out[m.ref] = OperatingPoint(
                ref=m.ref,
                stated=True,
                source=(
                    f"regulator[{i}] ({reg.vin_v:g} V -> {reg.vout_v:g} V, "
                    f"{reg.fsw_hz / 1e3:g} kHz)"
                ),
                vin_v=reg.vin_v,
                vout_v=reg.vout_v,
                fsw_hz=reg.fsw_hz,
                inductance_h=ind,
                duty=duty,
                ripple_a=ripple,
                slope_rise_a_per_s=float(rise),
                slope_fall_a_per_s=float(fall),
                harmonics_a=tuple(
                    float(triangle_harmonics_a(ripple, duty, n)) for n in range(1, MAX_HARMONIC + 1)
                ),
                slope_peak_a_per_s=harmonic_slope_peak_a_per_s(
                    ripple, duty, reg.fsw_hz, MAX_HARMONIC
                ),
            )
    return out
