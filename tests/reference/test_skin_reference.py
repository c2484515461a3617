"""Reference values for the skin depth and the propagation constant (physics reference row 1)."""

from __future__ import annotations

import numpy as np
import pytest

from fluxshadow.physics.constants import MU0, RHO_CU_OHM_M, SIGMA_CU_S_PER_M
from fluxshadow.physics.skin import propagation_constant, skin_depth_m


@pytest.mark.parametrize(("f", "delta_um"), [(1e5, 206.29), (1e6, 65.234), (1e7, 20.629)])
def test_skin_depth_copper_row1(f: float, delta_um: float) -> None:
    """Row 1, verified: δ = √(ρ/(πfμ0)), ρ = 1.68e-8 Ω·m (common practice). W. C. Johnson,
    Transmission Lines and Networks (McGraw-Hill 1963) p. 58; ECE 3317 notes list 66 µm at
    1 MHz. Table values printed to 5 digits."""
    assert float(skin_depth_m(f, RHO_CU_OHM_M)) * 1e6 == pytest.approx(delta_um, rel=5e-5)


def test_skin_depth_matches_propagation_constant() -> None:
    """Row 1 cross-check: δ = 1/Re γ with γ = √(jωμ0σ) (reference: 1e-16)."""
    f = np.geomspace(1.0, 1e10, 50)
    gamma = propagation_constant(0.0, f, SIGMA_CU_S_PER_M)
    np.testing.assert_allclose(1.0 / gamma.real, skin_depth_m(f, RHO_CU_OHM_M), rtol=1e-14)
    # γ → k in air and for k ≫ 1/δ
    np.testing.assert_allclose(propagation_constant([1.0, 1e4], 1e6, 0.0), [1.0, 1e4], rtol=0)
    g = propagation_constant(1e9, 1e6, SIGMA_CU_S_PER_M)
    assert complex(g) == pytest.approx(1e9, rel=1e-6)


def test_handbook_value_row1b() -> None:
    """Row 1b: Johnson's handbook constant δ_Cu = 6.64/√f cm (McGraw-Hill 1963, p. 58)
    gives 66.4 µm at 1 MHz; with ρ = 1.72e-8 the formula gives 66.006 µm (0.6 % apart,
    rounding of the constant); tolerance 1 %."""
    d = float(skin_depth_m(1e6, 1.72e-8))
    assert d * 1e6 == pytest.approx(66.006, rel=1e-5)
    assert d == pytest.approx(6.64e-2 / np.sqrt(1e6), rel=0.01)


def test_permeability_scales_skin_depth() -> None:
    """δ ∝ 1/√μr (textbook)."""
    assert float(skin_depth_m(1e6, RHO_CU_OHM_M, 4.0)) == pytest.approx(
        float(skin_depth_m(1e6, RHO_CU_OHM_M)) / 2.0, rel=1e-14
    )
    assert pytest.approx(4e-7 * np.pi, rel=1e-9) == MU0
