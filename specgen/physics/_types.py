"""Types shared by the physics functions: floats or numpy arrays in, a float (for scalar input) or an array out."""

from __future__ import annotations

from typing import Any, TypeAlias

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


def as_array(x: ArrayLike) -> FloatArray:
    """``x`` as a float array (0-d for a scalar)."""
    return np.asarray(x, dtype=float)


def all_scalar(*xs: Any) -> bool:
    """Whether every argument is one value (no array dimension)."""
    return all(np.ndim(x) == 0 for x in xs)
