"""Buck-converter inductor current: duty, ripple, slopes and ripple harmonics.

Ideal continuous-conduction buck stage (lossless switches, constant input and output
voltage over a period). The inductor current is a triangle wave of peak-to-peak ripple
ΔI that rises for D·T and falls for (1 − D)·T.
"""

from __future__ import annotations

import numpy as np

from fluxshadow.physics._types import ArrayLike, FloatArray

__all__ = [
    "buck_duty",
    "buck_ripple_a",
    "buck_slopes_a_per_s",
    "triangle_harmonics_a",
]


def buck_duty(vin_v: ArrayLike, vout_v: ArrayLike) -> FloatArray:
    """Duty cycle D = Vout/Vin of an ideal buck stage.

    Parameters
    ----------
    vin_v, vout_v : array_like, broadcastable
        Input and output voltage (V), 0 < Vout < Vin.

    Returns
    -------
    ndarray
        D (1).

    References
    ----------
    Verified: TI SLVA477 *Basic Calculation of a Buck Converter's Power Stage*; Richtek
    AN041 (cited on stored pages; fluxshadow physics reference row 18).
    """
    return np.asarray(
        np.asarray(vout_v, dtype=np.float64) / np.asarray(vin_v, dtype=np.float64),
        dtype=np.float64,
    )


def buck_ripple_a(
    vin_v: ArrayLike, vout_v: ArrayLike, inductance_h: ArrayLike, freq_hz: ArrayLike
) -> FloatArray:
    """Peak-to-peak inductor ripple ΔI = (Vin − Vout) D / (L fsw).

    Parameters
    ----------
    vin_v, vout_v : array_like, broadcastable
        Input and output voltage (V).
    inductance_h : array_like, broadcastable
        Inductance L (H).
    freq_hz : array_like, broadcastable
        Switching frequency fsw (Hz).

    Returns
    -------
    ndarray
        ΔI (A, peak to peak).

    References
    ----------
    Verified: TI SLVA477; L = Vout(Vin − Vout)/(ΔI fsw Vin) appears on stored pages
    (fluxshadow physics reference row 18).
    """
    vin = np.asarray(vin_v, dtype=np.float64)
    vout = np.asarray(vout_v, dtype=np.float64)
    duty = buck_duty(vin, vout)
    return np.asarray(
        (vin - vout)
        * duty
        / (np.asarray(inductance_h, dtype=np.float64) * np.asarray(freq_hz, dtype=np.float64)),
        dtype=np.float64,
    )


def buck_slopes_a_per_s(
    vin_v: ArrayLike, vout_v: ArrayLike, inductance_h: ArrayLike
) -> tuple[FloatArray, FloatArray]:
    """Inductor current slopes during the on-time and the off-time.

    Parameters
    ----------
    vin_v, vout_v : array_like, broadcastable
        Input and output voltage (V).
    inductance_h : array_like, broadcastable
        Inductance (H).

    Returns
    -------
    rise_a_per_s, fall_a_per_s : ndarrays
        (Vin − Vout)/L (> 0) and −Vout/L (< 0), in A/s.

    References
    ----------
    v = L di/dt across the inductor (textbook; fluxshadow physics reference row 18).
    """
    vin = np.asarray(vin_v, dtype=np.float64)
    vout = np.asarray(vout_v, dtype=np.float64)
    ind = np.asarray(inductance_h, dtype=np.float64)
    return np.asarray((vin - vout) / ind), np.asarray(-vout / ind)


def triangle_harmonics_a(ripple_a: ArrayLike, duty: ArrayLike, order: ArrayLike) -> FloatArray:
    """Peak amplitudes of the harmonics of a triangle-wave ripple current.

    Iₙ = ΔI |sin(nπD)| / (n²π² D (1 − D)) for a wave rising for D·T and falling for
    (1 − D)·T with peak-to-peak ΔI. D = 0.5 gives I₁ = 4ΔI/π².

    Parameters
    ----------
    ripple_a : array_like
        Peak-to-peak ripple ΔI (A).
    duty : array_like, broadcastable
        Rise fraction D (1), 0 < D < 1.
    order : array_like, broadcastable
        Harmonic numbers n >= 1.

    Returns
    -------
    ndarray, broadcast shape
        Iₙ (A, peak).

    References
    ----------
    Derived from the spectrum of the rectangular dI/dt waveform (fluxshadow physics
    reference row 19); checked against the FFT of the sampled wave.
    """
    di = np.asarray(ripple_a, dtype=np.float64)
    d = np.asarray(duty, dtype=np.float64)
    n = np.asarray(order, dtype=np.float64)
    return np.asarray(
        di * np.abs(np.sin(n * np.pi * d)) / (n * n * np.pi**2 * d * (1.0 - d)), dtype=np.float64
    )
