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
    "harmonic_emf_peak_v",
    "harmonic_slope_peak_a_per_s",
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


def harmonic_slope_peak_a_per_s(
    ripple_a: float, duty: float, freq_hz: float, max_order: int, *, samples: int = 4096
) -> float:
    """Peak |dI/dt| of the triangle ripple kept to its first ``max_order`` harmonics.

    The slope of a triangle wave is a rectangular wave (ΔI/(D T) during the rise,
    −ΔI/((1 − D) T) during the fall); its Fourier series truncated at ``max_order`` is
    evaluated over one period and the largest magnitude returned. Harmonic n of the slope
    has amplitude n ω Iₙ with Iₙ from :func:`triangle_harmonics_a`, so the EMF a mutual
    inductance M sees from these harmonics peaks at M times this value.

    Parameters
    ----------
    ripple_a : float
        Peak-to-peak ripple ΔI (A).
    duty : float
        Rise fraction D, 0 < D < 1.
    freq_hz : float
        Switching frequency (Hz).
    max_order : int
        Highest harmonic kept (>= 1).
    samples : int
        Samples over one period (the rectangular wave is sampled, then filtered exactly
        in the frequency domain).

    Returns
    -------
    float
        Peak slope (A/s).

    References
    ----------
    Derived: Fourier series of the rectangular slope waveform (fluxshadow physics
    reference rows 18-19); with ``max_order = 1`` the result is ω I₁ exactly.
    """
    return harmonic_emf_peak_v(ripple_a, duty, freq_hz, np.ones(max_order), samples=samples)


def harmonic_emf_peak_v(
    ripple_a: float,
    duty: float,
    freq_hz: float,
    mutual_h: ArrayLike,
    *,
    samples: int = 4096,
) -> float:
    """Peak EMF the triangle ripple induces through a frequency-dependent mutual inductance.

    e(t) = Σₙ Re(Mₙ Sₙ e^{jnωt}) over the harmonics n = 1 … len(mutual_h), with Sₙ the
    phasor of harmonic n of the rectangular slope wave (see
    :func:`harmonic_slope_peak_a_per_s`) and Mₙ the (complex) mutual inductance at n f:
    a victim whose coupling is shielded by eddy currents sees each harmonic through its
    own Mₙ, magnitude and phase.

    Parameters
    ----------
    ripple_a : float
        Peak-to-peak ripple ΔI (A).
    duty : float
        Rise fraction D, 0 < D < 1.
    freq_hz : float
        Switching frequency (Hz).
    mutual_h : array_like of complex, shape (N,)
        Mₙ (H) at n f for n = 1 … N.
    samples : int
        Samples over one period.

    Returns
    -------
    float
        Peak |e(t)| (V).

    References
    ----------
    Derived: superposition of the harmonics of the slope (fluxshadow physics reference
    rows 18-19); with all Mₙ = M it is M times the peak slope, with only M₁ non-zero
    |M₁| ω I₁.
    """
    m = np.asarray(mutual_h, dtype=np.complex128).ravel()
    max_order = len(m)
    period_s = 1.0 / freq_hz
    rise = ripple_a / (duty * period_s)
    fall = -ripple_a / ((1.0 - duty) * period_s)
    # Average each sample cell over the rectangular wave so the edge cell is exact.
    edge = duty * samples
    k = np.arange(samples)
    frac_rise = np.clip(edge - k, 0.0, 1.0)
    slope = frac_rise * rise + (1.0 - frac_rise) * fall
    spectrum = np.fft.rfft(slope)
    spectrum[0] = 0.0
    spectrum[max_order + 1 :] = 0.0
    # Undo the cell averaging (a sinc per harmonic) so the kept harmonics are exact.
    n = np.arange(len(spectrum))
    cell = np.sinc(n / samples)
    spectrum[1:] = spectrum[1:] / cell[1:]
    spectrum[1 : max_order + 1] *= m
    fine = np.fft.irfft(spectrum, n=samples * 8) * 8
    return float(np.max(np.abs(fine)))
