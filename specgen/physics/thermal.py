"""Temperature rise by natural convection and IEC 60085 thermal classes."""

from __future__ import annotations

import numpy as np

# IEC 60085 thermal classes live in specgen.standards.thermal_classes (one table, one parser);
# the names below stay for callers of this module.
from ..standards.thermal_classes import LETTER_BY_LIMIT as IEC_60085_CLASSES  # noqa: F401
from ..standards.thermal_classes import class_letter  # noqa: F401
from ..standards.thermal_classes import parse_thermal_class as class_limit_c  # noqa: F401
from ._types import Arr, ArrayLike


def temperature_rise_k(power_w: ArrayLike, surface_area_m2: ArrayLike) -> Arr:
    """Temperature rise of a wound part in still air, dT = 450 (P / At)^0.826 with P/At in W/cm^2.

    Parameters
    ----------
    power_w : total loss (copper + core) [W]
    surface_area_m2 : outside surface area At of the wound part [m^2]

    Returns
    -------
    Temperature rise above ambient [K].

    References
    ----------
    McLyman, Transformer and Inductor Design Handbook (temperature rise from the power loss density
    psi = P/At in W/cm^2, natural convection, empirical fit).
    """
    psi_w_cm2 = np.asarray(power_w, dtype=float) / (np.asarray(surface_area_m2, dtype=float) * 1e4)
    x = 450.0 * psi_w_cm2 ** 0.826
    x = np.asarray(x, dtype=float)
    return float(x) if x.ndim == 0 else x


def b_sat_at_temp_t(b_sat_25c_t: ArrayLike, b_sat_100c_t: ArrayLike, temp_c: ArrayLike) -> Arr:
    """Saturation flux density at a temperature, from the two catalogue points.

    B_sat(T) = B25 + (B100 - B25) (T - 25) / 75, linear between 25 and 100 degC and extrapolated beyond,
    held above 5 % of B25 (far past the Curie point the line would cross zero; a design that hot fails its
    temperature check anyway). Vectorised.

    Parameters
    ----------
    b_sat_25c_t, b_sat_100c_t : B_sat at 25 and 100 degC [T]
    temp_c : temperature [degC]

    References
    ----------
    Linear interpolation of the two temperatures a material's data gives (common practice); ferrite and
    steel B_sat fall roughly linearly with temperature below the Curie point (e.g. Snelling, Soft
    Ferrites, from memory).
    """
    b25 = np.asarray(b_sat_25c_t, dtype=float)
    b100 = np.asarray(b_sat_100c_t, dtype=float)
    out = np.maximum(0.05 * b25, b25 + (b100 - b25) / 75.0 * (np.asarray(temp_c, dtype=float) - 25.0))
    return float(out) if out.ndim == 0 else out
