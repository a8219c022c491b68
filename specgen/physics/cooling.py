"""Cooling of a wound part: measured thermal resistance, forced air, potting.

SI units: W, K, K/W, m, m^2, m/s, W/(m^2 K), W/(m K); temperatures in degC. Floats or numpy arrays.
"""

from __future__ import annotations

import math

import numpy as np
import numpy.typing as npt

from ..records import record

FloatArray = npt.NDArray[np.float64]
FloatLike = float | FloatArray

__all__ = [
    "AIR_CONDUCTIVITY_300K_W_MK", "MCLYMAN_COEFF_K", "MCLYMAN_EXPONENT", "AirProperties", "ThermalResistanceChoice",
    "air_properties", "choose_thermal_resistance", "flow_length_from_surface_m", "forced_air_h_w_m2k",
    "forced_air_rise_from_r_th_k", "forced_air_rise_k",
    "mixed_convection_h_w_m2k", "natural_h_equivalent_w_m2k", "potted_internal_r_th_k_w",
    "temperature_rise_from_r_th_k",
]

# McLyman's natural-convection relation dT = 450 (P/A_t)^0.826, P/A_t in W/cm^2 (the one physics.thermal
# applies as temperature_rise_k; a test keeps the two in step).
MCLYMAN_COEFF_K = 450.0
MCLYMAN_EXPONENT = 0.826

# Dry air at atmospheric pressure: temperature [K], thermal conductivity [W/(m K)], kinematic viscosity [m^2/s],
# Prandtl number. Incropera and DeWitt, Fundamentals of Heat and Mass Transfer, Table A.4 (from memory).
_AIR_TABLE = (
    (250.0, 22.3e-3, 11.44e-6, 0.720),
    (300.0, 26.3e-3, 15.89e-6, 0.707),
    (350.0, 30.0e-3, 20.92e-6, 0.700),
    (400.0, 33.8e-3, 26.41e-6, 0.690),
)
AIR_CONDUCTIVITY_300K_W_MK = _AIR_TABLE[1][1]
# Laminar boundary layer on a flat plate up to the transition Reynolds number (Incropera, from memory).
_RE_TRANSITION = 5e5
_RISE_BISECT_STEPS = 60


def _out(x: FloatArray) -> FloatLike:
    return float(x) if x.ndim == 0 else x


# ------------------------------------------------------------------------------------------- measured R_th


@record(slots=True)
class ThermalResistanceChoice:
    """The thermal resistance a design uses and where it came from ("measured" or "estimated")."""

    r_th_k_w: float
    origin: str


def choose_thermal_resistance(estimated_k_w: float, measured_k_w: float | None = None) -> ThermalResistanceChoice:
    """A measured part-to-ambient thermal resistance overrides the estimate.

    Parameters
    ----------
    estimated_k_w : thermal resistance from the model [K/W] (e.g. the natural-convection rise over the loss)
    measured_k_w : thermal resistance measured on a sample [K/W] (temperature rise over the loss that produced
        it, at the same cooling), or None

    References
    ----------
    R_th = dT / P, the definition of thermal resistance (e.g. Incropera and DeWitt, ch. 3); using the measured
    figure when one exists is common practice.
    """
    for value, what in ((estimated_k_w, "estimated"), (measured_k_w, "measured")):
        if value is not None and not (math.isfinite(float(value)) and float(value) > 0.0):
            raise ValueError(f"{what} thermal resistance must be a finite value > 0 K/W, got {value!r}")
    if measured_k_w is not None:
        return ThermalResistanceChoice(r_th_k_w=float(measured_k_w), origin="measured")
    return ThermalResistanceChoice(r_th_k_w=float(estimated_k_w), origin="estimated")


def temperature_rise_from_r_th_k(power_w: npt.ArrayLike, r_th_k_w: npt.ArrayLike) -> FloatLike:
    """Temperature rise through a thermal resistance, dT = P R_th [K].

    Parameters
    ----------
    power_w : heat flowing [W]
    r_th_k_w : thermal resistance [K/W]

    References
    ----------
    Definition of thermal resistance (Incropera and DeWitt, Fundamentals of Heat and Mass Transfer, ch. 3).
    """
    return _out(np.asarray(np.asarray(power_w, dtype=float) * np.asarray(r_th_k_w, dtype=float), dtype=float))


# ---------------------------------------------------------------------------------------------- forced air


@record(slots=True)
class AirProperties:
    """Dry air at a film temperature: conductivity [W/(m K)], kinematic viscosity [m^2/s], Prandtl number."""

    conductivity_w_mk: FloatLike
    kinematic_viscosity_m2_s: FloatLike
    prandtl: FloatLike


def air_properties(film_temp_c: npt.ArrayLike) -> AirProperties:
    """Properties of dry air at atmospheric pressure, linear between the table's rows (250 K to 400 K).

    Parameters
    ----------
    film_temp_c : film temperature, the mean of the surface and the air [degC], -23 to 127 degC

    References
    ----------
    Incropera and DeWitt, Fundamentals of Heat and Mass Transfer, Table A.4 (from memory).
    """
    t_k = np.asarray(film_temp_c, dtype=float) + 273.15
    temps = np.array([row[0] for row in _AIR_TABLE])
    if np.any(~np.isfinite(t_k)) or np.any(t_k < temps[0]) or np.any(t_k > temps[-1]):
        raise ValueError(f"film temperature outside the air table ({temps[0] - 273.15:g} to {temps[-1] - 273.15:g} degC)")
    cols = [np.array([row[i] for row in _AIR_TABLE]) for i in (1, 2, 3)]
    k, nu, pr = (_out(np.asarray(np.interp(t_k, temps, col), dtype=float)) for col in cols)
    return AirProperties(conductivity_w_mk=k, kinematic_viscosity_m2_s=nu, prandtl=pr)


def forced_air_h_w_m2k(air_speed_m_s: npt.ArrayLike, length_m: npt.ArrayLike,
                       film_temp_c: npt.ArrayLike = 27.0) -> FloatLike:
    """Average heat-transfer coefficient of air blowing along a surface, laminar flat plate [W/(m^2 K)].

        h = 0.664 Re_L^(1/2) Pr^(1/3) k / L,   Re_L = v L / nu   (Re_L < 5e5)

    about 3.9 sqrt(v / L) for air near room temperature (v in m/s, L in m).

    Parameters
    ----------
    air_speed_m_s : free-stream air speed v [m/s], >= 0
    length_m : length of the surface along the flow L [m], > 0
    film_temp_c : film temperature for the air's properties [degC] (default 27 degC, 300 K)

    References
    ----------
    Incropera and DeWitt, Fundamentals of Heat and Mass Transfer, the average Nusselt number of a laminar flat
    plate (Pohlhausen's solution), Nu_L = 0.664 Re_L^(1/2) Pr^(1/3) (from memory).
    """
    v = np.asarray(air_speed_m_s, dtype=float)
    length = np.asarray(length_m, dtype=float)
    if np.any(~(v >= 0.0)) or np.any(~np.isfinite(v)):
        raise ValueError("air speed must be a finite value >= 0 m/s")
    if np.any(~(length > 0.0)) or np.any(~np.isfinite(length)):
        raise ValueError("surface length along the flow must be a finite value > 0 m")
    air = air_properties(film_temp_c)
    k = np.asarray(air.conductivity_w_mk)
    nu = np.asarray(air.kinematic_viscosity_m2_s)
    pr = np.asarray(air.prandtl)
    re = v * length / nu
    if np.any(re >= _RE_TRANSITION):
        raise ValueError(f"air flow beyond the laminar range (Reynolds number {float(np.max(re)):.3g} >= 5e5)")
    return _out(np.asarray(0.664 * np.sqrt(re) * pr ** (1.0 / 3.0) * k / length, dtype=float))


def mixed_convection_h_w_m2k(h_natural_w_m2k: npt.ArrayLike, h_forced_w_m2k: npt.ArrayLike,
                             exponent: float = 3.0) -> FloatLike:
    """Combined coefficient of natural and forced convection, h = (h_N^n + h_F^n)^(1/n), n = 3 [W/(m^2 K)].

    Parameters
    ----------
    h_natural_w_m2k : natural-convection coefficient [W/(m^2 K)]
    h_forced_w_m2k : forced-convection coefficient [W/(m^2 K)]
    exponent : n (3 for assisting and transverse flows)

    References
    ----------
    Churchill's mixed-convection correlation, Nu^n = Nu_F^n + Nu_N^n with n = 3, as given in Incropera and
    DeWitt, Fundamentals of Heat and Mass Transfer, section on mixed convection (from memory).
    """
    hn = np.asarray(h_natural_w_m2k, dtype=float)
    hf = np.asarray(h_forced_w_m2k, dtype=float)
    if np.any(~(hn >= 0.0)) or np.any(~(hf >= 0.0)) or not (exponent >= 1.0 and math.isfinite(exponent)):
        raise ValueError("convection coefficients must be >= 0 and the exponent >= 1")
    return _out(np.asarray((hn ** exponent + hf ** exponent) ** (1.0 / exponent), dtype=float))


def natural_h_equivalent_w_m2k(rise_k: npt.ArrayLike) -> FloatLike:
    """The heat-transfer coefficient McLyman's natural-convection relation implies at a temperature rise.

    Inverting dT = 450 psi^0.826 (psi in W/cm^2): psi = (dT/450)^(1/0.826), h = psi 1e4 / dT [W/(m^2 K)]; it
    includes radiation, as the measurements behind the relation did.

    Parameters
    ----------
    rise_k : temperature rise of the surface above ambient [K], > 0

    References
    ----------
    McLyman, Transformer and Inductor Design Handbook (temperature rise against power loss density).
    """
    dt = np.asarray(rise_k, dtype=float)
    if np.any(~(dt > 0.0)) or np.any(~np.isfinite(dt)):
        raise ValueError("temperature rise must be a finite value > 0 K")
    psi_w_m2 = 1e4 * (dt / MCLYMAN_COEFF_K) ** (1.0 / MCLYMAN_EXPONENT)
    return _out(np.asarray(psi_w_m2 / dt, dtype=float))


def forced_air_rise_k(power_w: npt.ArrayLike, surface_area_m2: npt.ArrayLike, air_speed_m_s: npt.ArrayLike,
                      length_m: npt.ArrayLike, film_temp_c: npt.ArrayLike = 27.0) -> FloatLike:
    """Temperature rise of a wound part with air blowing over it [K].

    Solves dT = P / (A h(dT)) with h = (h_N(dT)^3 + h_F^3)^(1/3): h_N the coefficient McLyman's natural-convection
    relation implies at dT (``natural_h_equivalent_w_m2k``), h_F the laminar flat-plate forced-air coefficient
    (``forced_air_h_w_m2k``). The balance is monotonic in dT; 60 bisection steps between 0 and the still-air rise
    (forced air never heats; 2^-60 of it is far below any figure printed). At zero air speed it returns
    McLyman's still-air rise.

    Parameters
    ----------
    power_w : total loss [W], >= 0
    surface_area_m2 : exposed surface A [m^2], > 0
    air_speed_m_s : air speed [m/s], >= 0
    length_m : length of the part along the flow [m]
    film_temp_c : film temperature for the air's properties [degC]

    References
    ----------
    McLyman, Transformer and Inductor Design Handbook (natural convection); Incropera and DeWitt, Fundamentals of
    Heat and Mass Transfer (laminar flat plate; Churchill's mixed-convection combination, n = 3); from memory.
    The n = 3 combination lumps McLyman's radiation share with the convection: it errs on the warm side.
    """
    p = np.asarray(power_w, dtype=float)
    area = np.asarray(surface_area_m2, dtype=float)
    if np.any(~(p >= 0.0)) or np.any(~np.isfinite(p)) or np.any(~(area > 0.0)) or np.any(~np.isfinite(area)):
        raise ValueError("loss must be >= 0 W and the surface area > 0 m^2 (finite)")
    hf = np.asarray(forced_air_h_w_m2k(air_speed_m_s, length_m, film_temp_c), dtype=float)
    p, area, hf = np.broadcast_arrays(p, area, hf)
    still = MCLYMAN_COEFF_K * (p / (area * 1e4)) ** MCLYMAN_EXPONENT
    lo = np.zeros_like(still)
    hi = still.copy()
    for _ in range(_RISE_BISECT_STEPS):
        mid = 0.5 * (lo + hi)
        safe = np.where(mid > 0.0, mid, 1.0)
        h = np.asarray(mixed_convection_h_w_m2k(np.asarray(natural_h_equivalent_w_m2k(safe)), hf), dtype=float)
        too_hot = mid * area * h > p   # removes more heat than the loss at this rise: the rise is lower
        hi = np.where(too_hot, mid, hi)
        lo = np.where(too_hot, lo, mid)
    return _out(np.asarray(np.where(p > 0.0, 0.5 * (lo + hi), 0.0), dtype=float))


def forced_air_rise_from_r_th_k(power_w: npt.ArrayLike, r_th_still_k_w: npt.ArrayLike,
                                surface_area_m2: npt.ArrayLike, air_speed_m_s: npt.ArrayLike,
                                length_m: npt.ArrayLike, film_temp_c: npt.ArrayLike = 27.0) -> FloatLike:
    """Temperature rise with air blowing over a part whose still-air thermal resistance was measured [K].

        h_N = 1 / (R_th A),  h = (h_N^3 + h_F^3)^(1/3),  dT = P / (h A)

    The measured R_th stands for the still-air coefficient over the surface A (constant, as the measurement is
    linear); h_F is the laminar flat-plate coefficient (``forced_air_h_w_m2k``), combined as in
    ``forced_air_rise_k``. At zero air speed it returns P R_th.

    Parameters
    ----------
    r_th_still_k_w : thermal resistance measured in still air [K/W], > 0
    the others : as ``forced_air_rise_k`` (loss [W], surface [m^2], air speed [m/s], flow length [m], film [degC])

    References
    ----------
    Definition of thermal resistance and the heat-transfer coefficient, R = 1 / (h A); Churchill's mixed-convection
    combination, n = 3 (Incropera and DeWitt, Fundamentals of Heat and Mass Transfer; from memory).
    """
    p = np.asarray(power_w, dtype=float)
    r = np.asarray(r_th_still_k_w, dtype=float)
    area = np.asarray(surface_area_m2, dtype=float)
    if np.any(~(p >= 0.0)) or np.any(~np.isfinite(p)) or np.any(~(r > 0.0)) or np.any(~np.isfinite(r)):
        raise ValueError("loss must be >= 0 W and the thermal resistance > 0 K/W (finite)")
    if np.any(~(area > 0.0)) or np.any(~np.isfinite(area)):
        raise ValueError("surface area must be a finite value > 0 m^2")
    hf = np.asarray(forced_air_h_w_m2k(air_speed_m_s, length_m, film_temp_c), dtype=float)
    h = np.asarray(mixed_convection_h_w_m2k(1.0 / (r * area), hf), dtype=float)
    return _out(np.asarray(p / (h * area), dtype=float))


def flow_length_from_surface_m(surface_area_m2: npt.ArrayLike) -> FloatLike:
    """The side of the cube with a part's outside surface, sqrt(A / 6) [m]: a stand-in for its length along an
    air flow when only the surface is known.

    Air along a box of sides a <= b <= c sees lengths a to c; the flat-plate coefficient goes as L^-1/2, so
    for boxes no more than 2:1 the cube's side errs by under about 30 % in h (a stated approximation).

    Parameters
    ----------
    surface_area_m2 : outside surface A [m^2], >= 0

    References
    ----------
    Surface of a cube, A = 6 s^2 (geometry); the L^-1/2 dependence of the laminar flat plate's average
    coefficient (Incropera and DeWitt, from memory).
    """
    area = np.asarray(surface_area_m2, dtype=float)
    if np.any(~(area >= 0.0)) or np.any(~np.isfinite(area)):
        raise ValueError("surface area must be a finite value >= 0 m^2")
    return _out(np.asarray(np.sqrt(area / 6.0), dtype=float))


# ---------------------------------------------------------------------------------------------------- potting


def potted_internal_r_th_k_w(internal_r_th_k_w: npt.ArrayLike, void_share: npt.ArrayLike,
                             compound_conductivity_w_mk: npt.ArrayLike,
                             air_conductivity_w_mk: npt.ArrayLike = AIR_CONDUCTIVITY_300K_W_MK) -> FloatLike:
    """Internal (hot-spot to surface) thermal resistance after the voids are filled with potting compound [K/W].

        R_potted = R_internal ((1 - v) + v k_air / k_compound)

    The share v of the internal resistance that lies across air-filled voids scales with the conductivity of what
    fills them (conduction across a layer, R = t / (k A)); the rest (copper, insulation, core) is unchanged. The
    outside surface's resistance to ambient is not changed by potting and is added separately.

    Parameters
    ----------
    internal_r_th_k_w : hot-spot to surface thermal resistance before potting [K/W]
    void_share : share v of that resistance across air-filled voids, 0 to 1 (measured, or a shop estimate)
    compound_conductivity_w_mk : thermal conductivity of the cured compound [W/(m K)] (from its data)
    air_conductivity_w_mk : conductivity of the air it replaces [W/(m K)] (default at 300 K)

    References
    ----------
    Fourier's law for conduction through a plane layer, R = t / (k A) (Incropera and DeWitt, ch. 3); treating
    potting as replacing the voids' air (common practice).
    """
    r = np.asarray(internal_r_th_k_w, dtype=float)
    v = np.asarray(void_share, dtype=float)
    kc = np.asarray(compound_conductivity_w_mk, dtype=float)
    ka = np.asarray(air_conductivity_w_mk, dtype=float)
    if np.any(~(r >= 0.0)) or np.any(~np.isfinite(r)) or np.any(~((v >= 0.0) & (v <= 1.0))):
        raise ValueError("potting: need internal resistance >= 0 K/W and a void share from 0 to 1")
    if np.any(~(kc > 0.0)) or np.any(~(ka > 0.0)) or np.any(~np.isfinite(kc)) or np.any(~np.isfinite(ka)):
        raise ValueError("potting: conductivities must be finite and > 0 W/(m K)")
    return _out(np.asarray(r * ((1.0 - v) + v * ka / kc), dtype=float))
