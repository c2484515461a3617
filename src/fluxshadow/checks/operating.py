"""Operating points of the converters: duty, ripple, current slopes and harmonics.

Each ``[[regulator]]`` of the configuration names the parts it drives (its magnetic among
them) and states Vin, Vout, fsw and optionally the inductance and the ripple. Without an
operating point the figures are given per A/us of current slope and the report says so.
A regulator whose numbers make no sense does not stop the check: its magnetics get the
per-A/us reference and the problem is returned for the report (:class:`OperatingProblem`).
"""

from __future__ import annotations

import math
from collections.abc import Iterator, Mapping, Sequence
from dataclasses import dataclass

from fluxshadow.board.magnetics import Magnetic
from fluxshadow.io.config import Config, RegulatorConfig
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
    "OperatingPoints",
    "OperatingProblem",
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


@dataclass(frozen=True, kw_only=True)
class OperatingProblem:
    """A ``[[regulator]]`` value that makes no sense, and what was done about it.

    Attributes
    ----------
    message : str
        The problem, naming the file and the key, e.g. ``"fluxshadow.toml:
        regulator[1].vout_v must be below vin_v for a buck stage; got 12 V >= 5 V"``.
    refs : tuple of str
        The magnetics it concerns.
    consequence : str
        What their figures are instead, for the report: given per A/us (the usual case),
        or, for a part named by two regulators, the first regulator's.
    """

    message: str
    refs: tuple[str, ...]
    consequence: str

    @property
    def text(self) -> str:
        """The message with its consequence, as the report shows it."""
        return f"{self.message}; {self.consequence}" if self.consequence else self.message


@dataclass(frozen=True)
class OperatingPoints(Mapping[str, OperatingPoint]):
    """The operating point of every magnetic (by designator) and the problems met.

    A read-only mapping ``ref -> OperatingPoint``; ``problems`` lists every regulator
    value that made no sense (each magnetic it concerns has the per-A/us reference).
    """

    points: Mapping[str, OperatingPoint]
    problems: tuple[OperatingProblem, ...] = ()

    def __getitem__(self, ref: str) -> OperatingPoint:
        return self.points[ref]

    def __iter__(self) -> Iterator[str]:
        return iter(self.points)

    def __len__(self) -> int:
        return len(self.points)


def _per_us(refs: Sequence[str]) -> str:
    if not refs:  # every part of the regulator already has another regulator's point
        return ""
    return f"figures for {', '.join(refs)} are given per A/us instead"


def _regulator_problems(reg: RegulatorConfig, p: str) -> list[str]:
    """What makes no sense in one regulator's electrical values (empty when all do)."""
    out: list[str] = []
    stated = {"vin_v": reg.vin_v, "vout_v": reg.vout_v, "fsw_hz": reg.fsw_hz}
    missing = [k for k, v in stated.items() if v is None]
    if missing:
        out.append(
            f"{p}.{missing[0]} must be given with "
            f"{' and '.join(k for k in stated if k != missing[0])}; got nothing"
        )
    units = {"vin_v": "voltage (V)", "vout_v": "voltage (V)"}
    for key, unit in units.items():
        v = stated[key]
        if v is not None and not v > 0:
            out.append(f"{p}.{key} must be a positive {unit}; got {v:g} V")
    vin, vout, fsw = reg.vin_v, reg.vout_v, reg.fsw_hz
    if vin is not None and vout is not None and vin > 0 and vout > 0 and not vout < vin:
        out.append(f"{p}.vout_v must be below vin_v for a buck stage; got {vout:g} V >= {vin:g} V")
    lo, hi = _FSW_RANGE_HZ
    if fsw is not None and not lo <= fsw <= hi:
        out.append(f"{p}.fsw_hz must lie between {lo:g} and {hi:g} Hz; got {fsw:g}")
    if reg.inductance_h is not None and not reg.inductance_h > 0:
        out.append(f"{p}.inductance_h must be a positive inductance (H); got {reg.inductance_h:g}")
    if reg.ripple_a is not None and not reg.ripple_a > 0:
        out.append(f"{p}.ripple_a must be a positive current (A); got {reg.ripple_a:g}")
    return out


def operating_points(
    magnetics: tuple[Magnetic, ...] | list[Magnetic], config: Config
) -> OperatingPoints:
    """The operating point of every magnetic (stated or the per-A/us reference).

    Nothing here raises on the regulator's numbers: a regulator whose numbers make no
    sense for a buck stage (a missing Vin, Vout or fsw; a value that is not positive;
    Vout >= Vin; a switching frequency outside 1 kHz - 100 MHz; no inductance and no part
    value; a ripple that is not positive) leaves its magnetics at the per-A/us reference
    and is listed in ``problems``, each message naming the file and the key. A part named
    by two regulators keeps the first one's point (also listed).

    Parameters
    ----------
    magnetics : sequence of Magnetic
    config : Config
        Its ``regulators`` (validated for types only, see :mod:`fluxshadow.io.config`).

    Returns
    -------
    OperatingPoints
        ``ref -> OperatingPoint`` for every magnetic, and the problems.
    """
    out = {m.ref: _reference(m.ref) for m in magnetics}
    by_ref = {m.ref: m for m in magnetics}
    where = f"{config.source}: " if config.source else ""
    claimed: dict[str, int] = {}
    problems: list[OperatingProblem] = []
    for i, reg in enumerate(config.regulators, start=1):
        p = f"{where}regulator[{i}]"
        mags = [by_ref[r] for r in reg.parts if r in by_ref]
        if not mags:
            continue
        if reg.vin_v is None and reg.vout_v is None and reg.fsw_hz is None:
            continue  # the entry states only switch-node details, no operating point
        bad = _regulator_problems(reg, p)
        if bad:
            refs = tuple(m.ref for m in mags if m.ref not in claimed)
            problems.extend(
                OperatingProblem(message=b, refs=refs, consequence=_per_us(refs)) for b in bad
            )
            for r in refs:
                claimed[r] = i
            continue
        vin, vout, fsw = reg.vin_v, reg.vout_v, reg.fsw_hz
        if vin is None or vout is None or fsw is None:  # listed among the problems above
            continue
        for m in mags:
            if m.ref in claimed:
                problems.append(
                    OperatingProblem(
                        message=(
                            f"{p}.parts must not name a part another regulator names; got "
                            f"{m.ref}, which regulator[{claimed[m.ref]}] names too"
                        ),
                        refs=(m.ref,),
                        consequence=(
                            f"{m.ref} keeps the operating point of regulator[{claimed[m.ref]}]"
                        ),
                    )
                )
                continue
            claimed[m.ref] = i
            ind = reg.inductance_h if reg.inductance_h is not None else m.value_h
            if ind is None or not ind > 0:
                problems.append(
                    OperatingProblem(
                        message=(
                            f"{p}.inductance_h must be given: {m.ref} has no inductance value "
                            "in the placement or BOM; got nothing"
                        ),
                        refs=(m.ref,),
                        consequence=_per_us((m.ref,)),
                    )
                )
                continue
            duty = float(buck_duty(vin, vout))
            ripple = (
                float(reg.ripple_a)
                if reg.ripple_a is not None
                else float(buck_ripple_a(vin, vout, ind, fsw))
            )
            if not (ripple > 0 and math.isfinite(ripple)):
                problems.append(
                    OperatingProblem(
                        message=f"{p}.ripple_a must be a positive current (A); got {ripple!r}",
                        refs=(m.ref,),
                        consequence=_per_us((m.ref,)),
                    )
                )
                continue
            rise, fall = buck_slopes_a_per_s(vin, vout, ind)
            out[m.ref] = OperatingPoint(
                ref=m.ref,
                stated=True,
                source=(f"regulator[{i}] ({vin:g} V -> {vout:g} V, {fsw / 1e3:g} kHz)"),
                vin_v=vin,
                vout_v=vout,
                fsw_hz=fsw,
                inductance_h=ind,
                duty=duty,
                ripple_a=ripple,
                slope_rise_a_per_s=float(rise),
                slope_fall_a_per_s=float(fall),
                harmonics_a=tuple(
                    float(triangle_harmonics_a(ripple, duty, n)) for n in range(1, MAX_HARMONIC + 1)
                ),
                slope_peak_a_per_s=harmonic_slope_peak_a_per_s(ripple, duty, fsw, MAX_HARMONIC),
            )
    return OperatingPoints(points=out, problems=tuple(problems))
