"""Reference values for pad capacitance and switch-node figures (physics reference rows 16, 17)."""

from __future__ import annotations

import numpy as np
import pytest

from fluxshadow.physics.capacitance import (
    capacitive_current_a,
    microstrip_hammerstad_jensen,
    microstrip_open_end_extension_m,
    pad_capacitance_microstrip_f,
    pad_capacitance_palmer_f,
    palmer_plate_pair_capacitance_f,
    parallel_plate_capacitance_f,
    switching_loss_w,
)
from fluxshadow.physics.constants import EPS0

W = 5e-3
H = 0.1e-3
ER = 4.3
C_MOM = 10.1535e-12  # row 16c: layered method of moments, n = 70 (derived)


def test_parallel_plate_row16() -> None:
    """Row 16 (textbook): ε0εrA/d, 5 × 5 mm, d = 0.1 mm, εr = 4.3: 9.51825 pF (6 % below
    the method of moments)."""
    c = float(parallel_plate_capacitance_f(W * W, H, ER))
    assert c * 1e12 == pytest.approx(9.51825, rel=1e-6)
    assert c < C_MOM


def test_palmer_row16b() -> None:
    """Row 16b: H. B. Palmer, "Parallel-plate capacitor by the Schwarz–Christoffel
    transformation" (exists; Trans. AIEE 1937 and the formula from memory), pad over plane
    = 2 × C_pair(2d): 11.0429 pF homogeneous; 20 × 20 mm in air 37.1148 pF against MoM
    37.0936 pF (0.06 %). 5 × 5 mm against MoM homogeneous 10.9065 pF (+1.25 %, 2 %)."""
    c = float(pad_capacitance_palmer_f(W, W, H, ER))
    assert c * 1e12 == pytest.approx(11.0429, rel=5e-6)
    assert c == pytest.approx(10.9065e-12, rel=0.02)
    big = float(pad_capacitance_palmer_f(20e-3, 20e-3, H, 1.0))
    assert big * 1e12 == pytest.approx(37.1148, rel=5e-6)
    assert big == pytest.approx(37.0936e-12, rel=1e-3)
    # fringing vanishes for huge plates: tends to the parallel-plate value
    huge = float(palmer_plate_pair_capacitance_f(10.0, 10.0, 1e-4, 1.0))
    assert huge == pytest.approx(EPS0 * 100.0 / 1e-4, rel=1e-4)


def test_microstrip_row16c() -> None:
    """Row 16c cross-check: Hammerstad–Jensen microstrip (W/h = 50) plus Hammerstad–
    Bekkadal open ends (both from memory): 10.0164 pF, 1.35 % below the layered MoM
    10.1535 pF (2 %)."""
    c = float(pad_capacitance_microstrip_f(W, W, H, ER))
    assert c * 1e12 == pytest.approx(10.0164, rel=5e-6)
    assert c == pytest.approx(C_MOM, rel=0.02)


def test_microstrip_textbook_limits() -> None:
    """Sanity of the microstrip model (common practice): in air εeff = 1 and a 50 Ω line
    on FR-4 (εr 4.3) is about 1.9 h wide; the open-end extension is a fraction of h."""
    _z0, ee = microstrip_hammerstad_jensen(1e-3, 0.5e-3, 1.0)
    assert float(ee) == pytest.approx(1.0, rel=1e-12)
    u = np.linspace(1.5, 2.5, 1001)
    z0, ee = microstrip_hammerstad_jensen(u * 1e-3, 1e-3, 4.3)
    u50 = float(np.interp(50.0, z0[::-1], u[::-1]))
    assert u50 == pytest.approx(1.95, abs=0.1)
    assert 1.0 < float(np.interp(u50, u, ee)) < 4.3
    dl = float(microstrip_open_end_extension_m(W, H, 3.0))
    assert 0.3 * H < dl < 0.6 * H


def test_switch_node_row17() -> None:
    """Row 17: ½CV²f per hard-switched edge (C·V²·f appears in a stored list of buck loss
    terms; the ½ split is from memory) and C dV/dt. C_pad = 10.15 pF (the MoM value of
    row 16c) is 1.02 % of 1 nF and 0.10 % of 10 nF; 12 V, 1 MHz: 0.731 mW (72 mW for
    Coss = 1 nF); 12 V in 5 ns: 24.4 mA."""
    c = C_MOM
    assert c / 1e-9 * 100 == pytest.approx(1.02, abs=0.005)
    assert c / 10e-9 * 100 == pytest.approx(0.10, abs=0.005)
    assert float(switching_loss_w(c, 12.0, 1e6)) * 1e3 == pytest.approx(0.731, abs=5e-4)
    assert float(switching_loss_w(1e-9, 12.0, 1e6)) * 1e3 == pytest.approx(72.0, rel=1e-12)
    assert float(switching_loss_w(c, 12.0, 1e6, lossy_edges=2)) == pytest.approx(
        c * 144.0 * 1e6, rel=1e-12
    )
    assert float(capacitive_current_a(c, 12.0 / 5e-9)) * 1e3 == pytest.approx(24.4, abs=0.05)
