"""Array type aliases shared by the physics kernels (internal)."""

from __future__ import annotations

from typing import TypeAlias

import numpy as np
import numpy.typing as npt

__all__ = ["ArrayLike", "BoolArray", "ComplexArray", "FloatArray"]

FloatArray: TypeAlias = npt.NDArray[np.float64]
ComplexArray: TypeAlias = npt.NDArray[np.complex128]
BoolArray: TypeAlias = npt.NDArray[np.bool_]
ArrayLike: TypeAlias = npt.ArrayLike
