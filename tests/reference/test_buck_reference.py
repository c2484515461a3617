"""Reference values for the buck-converter ripple model (physics reference rows 18, 19)."""

from __future__ import annotations

import numpy as np
import pytest

from fluxshadow.physics.buck import (
    buck_duty,
    buck_ripple_a,
    buck_slopes_a_per_s,
    triangle_harmonics_a,
)


def test_buck_ripple_row18() -> None:
    """Row 18, verified: TI SLVA477 "Basic Calculation of a Buck Converter's Power Stage"
    and Richtek AN041 (cited on stored pages). 12 V → 3.3 V, 2.2 µH, 1 MHz: D = 0.275,
    ΔI = 1.0875 A, dI/dt = +3.95455 / −1.5 A/µs."""
    assert float(buck_duty(12.0, 3.3)) == pytest.approx(0.275, rel=1e-12)
    assert float(buck_ripple_a(12.0, 3.3, 2.2e-6, 1e6)) == pytest.approx(1.0875, rel=1e-9)
    rise, fall = buck_slopes_a_per_s(12.0, 3.3, 2.2e-6)
    assert float(rise) * 1e-6 == pytest.approx(3.95455, rel=2e-6)
    assert float(fall) * 1e-6 == pytest.approx(-1.5, rel=1e-12)
    # consistency: the rise over the on-time is the ripple, and so is the fall
    assert float(rise) * 0.275e-6 == pytest.approx(1.0875, rel=1e-12)
    assert -float(fall) * 0.725e-6 == pytest.approx(1.0875, rel=1e-12)
    # stored pages: L = Vout (Vin − Vout) / (ΔI fsw Vin)
    assert pytest.approx(2.2e-6, rel=1e-12) == 3.3 * (12 - 3.3) / (1.0875 * 1e6 * 12)


def test_triangle_harmonics_row19() -> None:
    """Row 19 (derived from the rectangular-pulse spectrum of dI/dt):
    Iₙ = ΔI |sin(nπD)| / (n²π² D(1−D)); n = 1, 2, 3, 5: 0.420247, 0.136464, 0.032085,
    0.0204237 A; D = 0.5: I₁/ΔI = 4/π² = 0.405285."""
    i_n = triangle_harmonics_a(1.0875, 0.275, [1, 2, 3, 5])
    np.testing.assert_allclose(i_n, [0.420247, 0.136464, 0.032085, 0.0204237], rtol=2e-5)
    assert float(triangle_harmonics_a(1.0, 0.5, 1)) == pytest.approx(0.405285, rel=1e-6)
    assert float(triangle_harmonics_a(1.0, 0.5, 1)) == pytest.approx(4 / np.pi**2, rel=1e-14)


@pytest.mark.parametrize("duty", [0.275, 0.5, 0.083, 0.9])
def test_harmonics_against_fft(duty: float) -> None:
    """Row 19 cross-check: FFT of the sampled triangle wave (reference: ≤ 5e-9)."""
    n_samp = 2**16
    t = np.arange(n_samp) / n_samp
    ripple = 1.0875
    wave = np.where(t < duty, ripple * t / duty, ripple * (1 - (t - duty) / (1 - duty)))
    spec = np.abs(np.fft.rfft(wave)) * 2 / n_samp
    orders = np.arange(1, 40)
    np.testing.assert_allclose(
        triangle_harmonics_a(ripple, duty, orders), spec[orders], rtol=1e-6, atol=1e-9
    )


def test_harmonic_slope_peak_first_harmonic_is_omega_i1() -> None:
    """Derived: the first harmonic of the slope has amplitude ω I₁ (row 19's I₁)."""
    from fluxshadow.physics.buck import harmonic_slope_peak_a_per_s, triangle_harmonics_a

    d, di, f = 0.275, 1.0875, 1e6  # physics reference row 18 example
    expected = 2 * np.pi * f * float(triangle_harmonics_a(di, d, 1))
    assert harmonic_slope_peak_a_per_s(di, d, f, 1) == pytest.approx(expected, rel=1e-6)


def test_harmonic_slope_peak_tends_to_the_gibbs_overshoot() -> None:
    """Many harmonics: the partial Fourier sum of the rectangular slope overshoots its
    larger level by the Wilbraham-Gibbs fraction (Si(pi)/pi - 1/2 = 0.0895) of the jump
    (standard Fourier analysis, e.g. Hewitt & Hewitt, Arch. Hist. Exact Sci. 21 (1979))."""
    from scipy.special import sici

    from fluxshadow.physics.buck import harmonic_slope_peak_a_per_s

    d, di, f = 0.275, 1.0875, 1e6
    rise, fall = di * f / d, -di * f / (1 - d)  # rows 18: +3.95455, -1.5 A/us
    gibbs = sici(np.pi)[0] / np.pi - 0.5
    expected = rise + gibbs * (rise - fall)
    assert harmonic_slope_peak_a_per_s(di, d, f, 2001, samples=65536) == pytest.approx(
        expected, rel=0.01
    )


def test_harmonic_emf_through_a_first_order_coupling_matches_the_ode() -> None:
    """A coupling that falls off as M(f) = M0 / (1 + j f/fc) (an eddy-current screen
    with one time constant τ = 1/(2π fc)) filters the rectangular slope wave like a
    first-order low-pass: τ y' + y = dI/dt, e = M0 y. Its periodic solution (elementary
    ODE: exponential segments joined at the switching instants) peaks at a switching
    instant; the harmonic sum with many harmonics must give the same peak."""
    from fluxshadow.physics.buck import harmonic_emf_peak_v

    d, di, f = 0.275, 1.0875, 1e6
    m0, fc = 30e-12, 2.5e6
    tau = 1.0 / (2 * np.pi * fc)
    period = 1.0 / f
    rise, fall = di / (d * period), -di / ((1 - d) * period)
    a, b = np.exp(-d * period / tau), np.exp(-(1 - d) * period / tau)
    # y1 = rise + (y0 - rise) a ; y0 = fall + (y1 - fall) b
    y0 = (fall * (1 - b) + rise * (1 - a) * b) / (1 - a * b)
    y1 = rise + (y0 - rise) * a
    expected = m0 * max(abs(y0), abs(y1))
    n = np.arange(1, 4001)
    mutual = m0 / (1 + 1j * n * f / fc)
    got = harmonic_emf_peak_v(di, d, f, mutual, samples=65536)
    assert got == pytest.approx(expected, rel=0.005)
    # with a constant coupling the EMF is M times the peak slope
    from fluxshadow.physics.buck import harmonic_slope_peak_a_per_s

    flat = harmonic_emf_peak_v(di, d, f, np.full(9, m0))
    assert flat == pytest.approx(m0 * harmonic_slope_peak_a_per_s(di, d, f, 9), rel=1e-12)
