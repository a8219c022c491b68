"""Types shared by the physics functions: floats or numpy arrays in, a float (for scalar input) or an array out."""

from __future__ import annotations

from typing import TypeAlias

import numpy as np
import numpy.typing as npt

FloatArray: TypeAlias = npt.NDArray[np.float64]
BoolArray: TypeAlias = npt.NDArray[np.bool_]
Arr: TypeAlias = float | FloatArray      # a float for scalar input, else an array of the broadcast shape
ArrayLike: TypeAlias = npt.ArrayLike


def out(x: ArrayLike) -> Arr:
    """A Python float for a 0-d result, the array otherwise."""
    a = np.asarray(x, dtype=float)
    return float(a) if a.ndim == 0 else a
