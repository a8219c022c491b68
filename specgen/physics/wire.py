"""Conductors: AWG sizes, resistivity and its temperature coefficient, resistance, mass, skin depth.

All quantities SI: metres, square metres, ohms, kilograms, hertz; temperatures in degC.
Functions accept floats or numpy arrays and return a float for scalar input.
"""

from __future__ import annotations

import numpy as np

from ._types import Arr, ArrayLike

# Magnetic constant, the pre-2019 defined value 4e-7*pi H/m. The SI-2019 measured mu0 differs from
# it by about 5.5e-10 relative, far below anything a winding calculation can resolve.
MU0_H_M = 4e-7 * np.pi

# Annealed copper, IEC 60028: 1/58 ohm mm^2/m = 0.017241 ohm mm^2/m at 20 degC, alpha20 = 0.00393 /K,
# density 8.89 g/cm^3.
RHO20_CU_OHM_M = 1.0 / 58e6
ALPHA20_CU_PER_K = 0.00393
DENSITY_CU_KG_M3 = 8890.0

# Hard-drawn aluminium for conductors, IEC 60889 (figures from memory): 0.028264 ohm mm^2/m at 20 degC,
# alpha20 = 0.00403 /K, density 2.703 g/cm^3.
RHO20_AL_OHM_M = 0.028264e-6
ALPHA20_AL_PER_K = 0.00403
DENSITY_AL_KG_M3 = 2703.0

# conductor name -> (resistivity at 20 degC [ohm m], temperature coefficient at 20 degC [1/K],
# density [kg/m^3])
CONDUCTORS = {
    "copper": (RHO20_CU_OHM_M, ALPHA20_CU_PER_K, DENSITY_CU_KG_M3),
    "aluminium": (RHO20_AL_OHM_M, ALPHA20_AL_PER_K, DENSITY_AL_KG_M3),
}


def _out(x: ArrayLike) -> Arr:
    """A Python float for a 0-d result, the array otherwise."""
    x = np.asarray(x, dtype=float)
    return float(x) if x.ndim == 0 else x


def _conductor(conductor: str) -> tuple[float, float, float]:
    try:
        return CONDUCTORS[conductor]
    except KeyError:
        raise ValueError(f"unknown conductor {conductor!r}; expected one of {sorted(CONDUCTORS)}") from None


def awg_diameter_m(gauge: ArrayLike) -> Arr:
    """Bare diameter of an American Wire Gauge size.

    Parameters
    ----------
    gauge : int, float or array
        AWG number n (0000 is -3, 000 is -2, 00 is -1).

    Returns
    -------
    Diameter in metres: d = 0.127 mm * 92**((36 - n) / 39).

    References
    ----------
    ASTM B258, Standard Specification for Standard Nominal Diameters and Cross-Sectional Areas of
    AWG Sizes of Solid Round Wires Used as Electrical Conductors.
    """
    n = np.asarray(gauge, dtype=float)
    return _out(0.127e-3 * 92.0 ** ((36.0 - n) / 39.0))


def round_area_m2(diameter_m: ArrayLike) -> Arr:
    """Cross-sectional area of a round conductor, A = pi d^2 / 4 [m^2] from diameter [m].

    References
    ----------
    Elementary geometry; IEC 60228 / ASTM B258 use the same nominal area for solid round wire.
    """
    d = np.asarray(diameter_m, dtype=float)
    return _out(np.pi * d * d / 4.0)


def round_diameter_m(area_m2: ArrayLike) -> Arr:
    """Diameter of a round conductor of cross-sectional area A, d = sqrt(4 A / pi) [m] (``round_area_m2``
    inverted).

    References
    ----------
    Elementary geometry.
    """
    a = np.asarray(area_m2, dtype=float)
    return _out(np.sqrt(4.0 * a / np.pi))


def resistivity_ohm_m(temp_c: ArrayLike, conductor: str = "copper") -> Arr:
    """Resistivity at a temperature, linear model rho_T = rho20 (1 + alpha20 (T - 20)).

    Parameters
    ----------
    temp_c : float or array
        Conductor temperature [degC].
    conductor : "copper" or "aluminium"

    Returns
    -------
    Resistivity [ohm m].

    References
    ----------
    IEC 60028 (annealed copper: rho20 = 1/58 ohm mm^2/m, alpha20 = 0.00393 /K);
    IEC 60889 (aluminium, from memory).
    """
    rho20, alpha20, _ = _conductor(conductor)
    t = np.asarray(temp_c, dtype=float)
    return _out(rho20 * (1.0 + alpha20 * (t - 20.0)))


def resistance_per_m_ohm(area_m2: ArrayLike, temp_c: ArrayLike, conductor: str = "copper") -> Arr:
    """DC resistance per metre of conductor, R' = rho_T / A [ohm/m].

    Parameters
    ----------
    area_m2 : conductor cross-section [m^2]
    temp_c : conductor temperature [degC]
    conductor : "copper" or "aluminium"

    References
    ----------
    IEC 60028 / IEC 60889 resistivity; R = rho l / A.
    """
    a = np.asarray(area_m2, dtype=float)
    return _out(np.asarray(resistivity_ohm_m(temp_c, conductor)) / a)


def resistance_at_temp_ohm(r_ohm: ArrayLike, from_temp_c: ArrayLike, to_temp_c: ArrayLike, conductor: str = "copper") -> Arr:
    """Correct a resistance reading from one temperature to another.

    R_to = R_from (1 + alpha20 (T_to - 20)) / (1 + alpha20 (T_from - 20)); used to refer a DCR
    measured at the test-bench temperature to 20 degC (or to a hot temperature).

    Parameters
    ----------
    r_ohm : resistance at ``from_temp_c`` [ohm]
    from_temp_c, to_temp_c : temperatures [degC]
    conductor : "copper" or "aluminium"

    References
    ----------
    IEC 60028 (temperature coefficient of annealed copper, linear law referred to 20 degC).
    """
    _, alpha20, _ = _conductor(conductor)
    r = np.asarray(r_ohm, dtype=float)
    t0 = np.asarray(from_temp_c, dtype=float)
    t1 = np.asarray(to_temp_c, dtype=float)
    return _out(r * (1.0 + alpha20 * (t1 - 20.0)) / (1.0 + alpha20 * (t0 - 20.0)))


def mass_per_m_kg(area_m2: ArrayLike, conductor: str = "copper") -> Arr:
    """Mass of bare conductor per metre, m' = density * A [kg/m].

    References
    ----------
    IEC 60028 (copper density 8.89 g/cm^3); IEC 60889 (aluminium 2.703 g/cm^3, from memory).
    """
    _, _, density = _conductor(conductor)
    return _out(density * np.asarray(area_m2, dtype=float))


def skin_depth_m(freq_hz: ArrayLike, resistivity_ohm_m: ArrayLike, mu_r: ArrayLike = 1.0) -> Arr:
    """Skin depth of a good conductor, delta = sqrt(rho / (pi f mu0 mu_r)).

    Parameters
    ----------
    freq_hz : frequency [Hz]; 0 (DC) gives an infinite skin depth.
    resistivity_ohm_m : conductor resistivity [ohm m]
    mu_r : relative permeability of the conductor (1 for copper and aluminium)

    Returns
    -------
    Skin depth [m].

    References
    ----------
    Ramo, Whinnery, Van Duzer, Fields and Waves in Communication Electronics (plane-wave skin depth
    delta = sqrt(2 rho / (omega mu))).
    """
    f = np.asarray(freq_hz, dtype=float)
    rho = np.asarray(resistivity_ohm_m, dtype=float)
    mu = np.asarray(mu_r, dtype=float)
    with np.errstate(divide="ignore"):
        delta = np.sqrt(rho / (np.pi * f * MU0_H_M * mu))
    return _out(np.where(f == 0.0, np.inf, delta))
