"""Temperature rise by natural convection and IEC 60085 thermal classes."""

from __future__ import annotations

import re

import numpy as np

# IEC 60085 thermal classes: limit [degC] -> letter
IEC_60085_CLASSES = {90: "Y", 105: "A", 120: "E", 130: "B", 155: "F", 180: "H", 200: "N", 220: "R"}
_BY_LETTER = {letter: limit for limit, letter in IEC_60085_CLASSES.items()}


def temperature_rise_k(power_w, surface_area_m2):
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


def class_letter(limit_c) -> str:
    """IEC 60085 letter of a thermal class limit (130 -> "B"); ValueError if not a listed class.

    References
    ----------
    IEC 60085, Electrical insulation - Thermal evaluation and designation.
    """
    try:
        key = float(limit_c)
    except (TypeError, ValueError):
        raise ValueError(f"not a thermal class temperature: {limit_c!r}") from None
    if key.is_integer() and int(key) in IEC_60085_CLASSES:
        return IEC_60085_CLASSES[int(key)]
    raise ValueError(f"{limit_c!r} is not an IEC 60085 thermal class "
                     f"({', '.join(str(c) for c in IEC_60085_CLASSES)})")


_DESIGNATION = re.compile(r"^\s*(?:class\s*)?(?:(\d+(?:\.0+)?)\s*)?(?:\(?\s*([A-Za-z])\s*\)?)?\s*$",
                          re.IGNORECASE)


def class_limit_c(designation) -> int:
    """Temperature limit [degC] of an IEC 60085 thermal class from 130, "130", "B" or "130 (B)".

    A leading word "class" is allowed, letters are case-insensitive, and when both number and letter
    are given they must agree. Raises ValueError otherwise.

    References
    ----------
    IEC 60085, Electrical insulation - Thermal evaluation and designation.
    """
    if isinstance(designation, bool):
        raise ValueError(f"not a thermal class: {designation!r}")
    if isinstance(designation, (int, float, np.integer, np.floating)):
        class_letter(designation)
        return int(designation)
    m = _DESIGNATION.match(str(designation))
    if not m or not (m.group(1) or m.group(2)):
        raise ValueError(f"not a thermal class: {designation!r}")
    number, letter = m.group(1), m.group(2)
    limit = None
    if number:
        class_letter(number)
        limit = int(float(number))
    if letter:
        by_letter = _BY_LETTER.get(letter.upper())
        if by_letter is None:
            raise ValueError(f"unknown IEC 60085 class letter {letter!r}")
        if limit is not None and limit != by_letter:
            raise ValueError(f"thermal class {designation!r}: {limit} is class "
                             f"{IEC_60085_CLASSES[limit]}, not {letter.upper()}")
        limit = by_letter
    return limit


def b_sat_at_temp_t(b_sat_25c_t, b_sat_100c_t, temp_c):
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
