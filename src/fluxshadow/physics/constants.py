"""Physical constants used by the kernels, in SI units.

References
----------
- ``MU0`` and ``EPS0``: CODATA values as shipped by ``scipy.constants`` (verified).
- ``RHO_CU_OHM_M``: copper resistivity 1.68e-8 Ω·m near room temperature (common practice;
  fluxshadow physics reference, table row 1).
- ``SIGMA_CU_IACS_S_PER_M``: 5.8e7 S/m, the annealed-copper conductivity that many
  handbook shielding numbers are quoted with (common practice; physics reference rows 9-15
  use it).
"""

from __future__ import annotations

import scipy.constants as _sc

__all__ = [
    "C0_M_PER_S",
    "EPS0",
    "MU0",
    "RHO_CU_OHM_M",
    "SIGMA_CU_IACS_S_PER_M",
    "SIGMA_CU_S_PER_M",
]

MU0: float = float(_sc.mu_0)
"""Vacuum permeability (H/m)."""

EPS0: float = float(_sc.epsilon_0)
"""Vacuum permittivity (F/m)."""

C0_M_PER_S: float = float(_sc.c)
"""Speed of light in vacuum (m/s)."""

RHO_CU_OHM_M: float = 1.68e-8
"""Copper resistivity (Ω·m), common practice for PCB copper near 20 °C."""

SIGMA_CU_S_PER_M: float = 1.0 / RHO_CU_OHM_M
"""Copper conductivity (S/m), ``1 / RHO_CU_OHM_M``."""

SIGMA_CU_IACS_S_PER_M: float = 5.8e7
"""Annealed-copper (IACS) conductivity (S/m), the value handbook shielding numbers use."""
