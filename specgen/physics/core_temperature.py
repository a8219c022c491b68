"""Ferrite core loss against temperature and the thermal operating point (does the part settle or run away).

Temperatures in degC, power in W, thermal resistance in K/W. The temperature factor is vectorised; the general
operating-point search takes a loss function of temperature and works on one point at a time.
"""

from __future__ import annotations

import math
from collections.abc import Callable

import numpy as np
import numpy.typing as npt

from ..records import record

FloatArray = npt.NDArray[np.float64]
FloatLike = float | FloatArray
BoolLike = bool | npt.NDArray[np.bool_]

__all__ = [
    "QuadraticOperatingPoint", "ThermalOperatingPoint", "loss_minimum_temp_c", "loss_temperature_factor",
    "quadratic_operating_point", "thermal_operating_point",
]

_SCAN_STEP_K = 0.5
_SCAN_MAX_STEPS = 4000
_BISECT_STEPS = 80
_SLOPE_STEP_K = 1e-3


def _out(x: FloatArray) -> FloatLike:
    return float(x) if x.ndim == 0 else x


def _check_quadratic(ct0: FloatArray, ct1: FloatArray, ct2: FloatArray) -> FloatArray:
    """The fit's value at its minimum, ct0 - ct1^2 / (4 ct2); refuses a fit that is not a positive bowl."""
    if not (np.all(np.isfinite(ct0)) and np.all(np.isfinite(ct1)) and np.all(np.isfinite(ct2))):
        raise ValueError("core-loss temperature fit: coefficients must be finite")
    if np.any(ct2 <= 0.0):
        raise ValueError("core-loss temperature fit: ct2 must be > 0 (the loss has a minimum)")
    minimum = ct0 - ct1 * ct1 / (4.0 * ct2)
    if np.any(minimum <= 0.0):
        raise ValueError("core-loss temperature fit: ct0 - ct1^2/(4 ct2) must be > 0 (the loss never reaches zero)")
    return np.asarray(minimum, dtype=float)


def loss_minimum_temp_c(ct1: npt.ArrayLike, ct2: npt.ArrayLike) -> FloatLike:
    """Temperature of minimum core loss of the quadratic fit, T_min = ct1 / (2 ct2) [degC].

    Parameters
    ----------
    ct1 : linear coefficient [1/degC]
    ct2 : quadratic coefficient [1/degC^2], > 0

    References
    ----------
    S. A. Mulder, "Fit formulae for power loss in ferrites and their use in transformer design", Proc. PCIM
    1993 (the fit ct0 - ct1 T + ct2 T^2; from memory); the vertex of a parabola.
    """
    c1 = np.asarray(ct1, dtype=float)
    c2 = np.asarray(ct2, dtype=float)
    if np.any(~(c2 > 0.0)) or np.any(~np.isfinite(c1)) or np.any(~np.isfinite(c2)):
        raise ValueError("core-loss temperature fit: ct2 must be > 0 and ct1 finite")
    return _out(np.asarray(c1 / (2.0 * c2), dtype=float))


def loss_temperature_factor(temp_c: npt.ArrayLike, ct0: npt.ArrayLike, ct1: npt.ArrayLike,
                            ct2: npt.ArrayLike) -> FloatLike:
    """Core-loss temperature factor, normalised to 1 at the loss minimum.

        F(T) = (ct0 - ct1 T + ct2 T^2) / (ct0 - ct1^2 / (4 ct2)),   P_v(f, B, T) = k f^alpha B^beta F(T)

    with k the Steinmetz coefficient at the temperature of minimum loss (``loss_minimum_temp_c``). F >= 1.

    Parameters
    ----------
    temp_c : core temperature T [degC]
    ct0 : constant term (dimensionless)
    ct1 : linear coefficient [1/degC]
    ct2 : quadratic coefficient [1/degC^2], > 0, with ct0 - ct1^2/(4 ct2) > 0

    Returns
    -------
    F(T), dimensionless, the broadcast shape of the inputs.

    References
    ----------
    S. A. Mulder, "Fit formulae for power loss in ferrites and their use in transformer design", Proc. PCIM
    1993 (from memory); the same quadratic temperature term appears with the Steinmetz equation across the
    power-magnetics literature and textbooks.
    """
    t, c0, c1, c2 = np.broadcast_arrays(*(np.asarray(v, dtype=float) for v in (temp_c, ct0, ct1, ct2)))
    if np.any(~np.isfinite(t)):
        raise ValueError("core temperature must be finite")
    minimum = _check_quadratic(c0, c1, c2)
    return _out(np.asarray((c0 - c1 * t + c2 * t * t) / minimum, dtype=float))


@record(slots=True)
class ThermalOperatingPoint:
    """Steady temperature of a part heated by a temperature-dependent loss through a thermal resistance.

    ``exists`` is False when no balance is found below the search limit (thermal runaway), and then the
    temperature, loss and slope are None. ``margin`` = 1 - R_th dP/dT at the point: > 0 stable.
    """

    exists: bool
    stable: bool
    temp_c: float | None
    loss_w: float | None
    dloss_dt_w_k: float | None
    margin: float | None
    r_th_k_w: float
    ambient_c: float
    search_limit_c: float
    evaluations: int


def _finite_loss(loss_w: Callable[[float], float], temp_c: float) -> float:
    p = float(loss_w(temp_c))
    if not math.isfinite(p) or p < 0.0:
        raise ValueError(f"loss at {temp_c:.6g} degC is {p!r}; expected a finite loss >= 0 W")
    return p


def thermal_operating_point(loss_w: Callable[[float], float], r_th_k_w: float, ambient_c: float,
                            search_limit_c: float = 300.0) -> ThermalOperatingPoint:
    """Find where the part settles, T = T_a + R_th P(T), and whether that balance is stable (R_th dP/dT < 1).

    Starting cold, the part warms until the heat the cooling removes, (T - T_a) / R_th, first equals the loss
    P(T): the lowest root of g(T) = T_a + R_th P(T) - T. The search steps up from T_a in 0.5 K steps (at most
    4000) to the first sign change, bisects it 80 times, and takes dP/dT by a central difference (1e-3 K). The
    balance is stable when dP/dT < 1 / R_th; when the loss outgrows the cooling before the limit there is no
    balance (thermal runaway). Bounded evaluations, no NaN.

    Parameters
    ----------
    loss_w : total loss P(T) [W] as a function of the part's temperature [degC] (core loss with its
        temperature factor, copper loss with the resistance's temperature coefficient, ...)
    r_th_k_w : thermal resistance from the part to ambient [K/W], > 0
    ambient_c : ambient temperature T_a [degC]
    search_limit_c : highest temperature searched [degC] (above the insulation's class, say)

    References
    ----------
    The steady-state heat balance and the stability of its fixed point (R_th dP/dT < 1), as applied to the
    thermal runaway of ferrite cores whose loss rises above the loss minimum: e.g. E. C. Snelling, Soft Ferrites,
    Properties and Applications, 2nd ed., 1988 (from memory); common practice.
    """
    r = float(r_th_k_w)
    ta = float(ambient_c)
    limit = float(search_limit_c)
    if not (math.isfinite(r) and r > 0.0):
        raise ValueError(f"thermal resistance must be a finite value > 0 K/W, got {r_th_k_w!r}")
    if not (math.isfinite(ta) and math.isfinite(limit) and limit > ta):
        raise ValueError("ambient and search limit must be finite, the limit above the ambient")

    def balance(t: float) -> float:
        return ta + r * _finite_loss(loss_w, t) - t

    steps = min(_SCAN_MAX_STEPS, max(1, math.ceil((limit - ta) / _SCAN_STEP_K)))
    temps = [ta + (limit - ta) * i / steps for i in range(steps + 1)]
    evaluations = 1
    lo = hi = None
    if balance(temps[0]) <= 0.0:   # no loss at ambient: the part stays there
        lo = hi = temps[0]
    for t_prev, t_next in zip(temps, temps[1:]):
        if lo is not None:
            break
        evaluations += 1
        if balance(t_next) <= 0.0:
            lo, hi = t_prev, t_next
    if lo is None or hi is None:
        return ThermalOperatingPoint(exists=False, stable=False, temp_c=None, loss_w=None, dloss_dt_w_k=None,
                                     margin=None, r_th_k_w=r, ambient_c=ta, search_limit_c=limit,
                                     evaluations=evaluations)
    for _ in range(_BISECT_STEPS):
        mid = 0.5 * (lo + hi)
        evaluations += 1
        if balance(mid) > 0.0:
            lo = mid
        else:
            hi = mid
        if hi - lo <= 1e-12 * max(1.0, abs(hi)):
            break
    t = 0.5 * (lo + hi)
    slope = (_finite_loss(loss_w, t + _SLOPE_STEP_K) - _finite_loss(loss_w, t - _SLOPE_STEP_K)) / (2 * _SLOPE_STEP_K)
    evaluations += 2
    margin = 1.0 - r * slope
    return ThermalOperatingPoint(exists=True, stable=margin > 0.0, temp_c=t, loss_w=_finite_loss(loss_w, t),
                                 dloss_dt_w_k=slope, margin=margin, r_th_k_w=r, ambient_c=ta,
                                 search_limit_c=limit, evaluations=evaluations + 1)


@record(slots=True)
class QuadraticOperatingPoint:
    """Closed-form balance for a fixed loss plus a core loss with the quadratic temperature factor.

    Where ``exists`` is False the temperature has no finite balance (thermal runaway) and ``temp_c`` is inf.
    ``margin`` = 1 - R_th dP/dT at the balance (> 0 at the lower root, which is the stable one).
    """

    exists: BoolLike
    temp_c: FloatLike
    margin: FloatLike


def quadratic_operating_point(fixed_loss_w: npt.ArrayLike, core_loss_at_minimum_w: npt.ArrayLike,
                              r_th_k_w: npt.ArrayLike, ambient_c: npt.ArrayLike, ct0: npt.ArrayLike,
                              ct1: npt.ArrayLike, ct2: npt.ArrayLike) -> QuadraticOperatingPoint:
    """Steady temperature of T = T_a + R_th (P_0 + P_m F(T)) with F the normalised quadratic factor, in closed form.

    With q = R_th P_m / F_min-denominator the balance is the quadratic
        q ct2 T^2 - (q ct1 + 1) T + (T_a + R_th P_0 + q ct0) = 0,
    whose lower root T = 2 C / ((q ct1 + 1) + sqrt(disc)) (written without cancellation) is where the part
    settles when warming from ambient, and is stable there; a negative discriminant means the loss outgrows the
    cooling at every temperature (runaway). Vectorised.

    Parameters
    ----------
    fixed_loss_w : loss that does not depend on temperature P_0 [W] (e.g. copper loss at its design temperature)
    core_loss_at_minimum_w : core loss at the temperature of minimum loss P_m [W]
    r_th_k_w : thermal resistance to ambient [K/W], > 0
    ambient_c : ambient temperature [degC]
    ct0, ct1, ct2 : the quadratic temperature fit (see ``loss_temperature_factor``)

    References
    ----------
    As ``thermal_operating_point``; the quadratic loss fit after Mulder (PCIM 1993, from memory).
    """
    p0, pm, r, ta, c0, c1, c2 = np.broadcast_arrays(
        *(np.asarray(v, dtype=float) for v in (fixed_loss_w, core_loss_at_minimum_w, r_th_k_w, ambient_c, ct0,
                                                ct1, ct2)))
    minimum = _check_quadratic(c0, c1, c2)
    if np.any(~(r > 0.0)) or np.any(~np.isfinite(r)) or np.any(~(p0 >= 0.0)) or np.any(~(pm >= 0.0)):
        raise ValueError("operating point: need R_th > 0 and losses >= 0 (finite)")
    if np.any(~np.isfinite(ta)) or np.any(~np.isfinite(p0)) or np.any(~np.isfinite(pm)):
        raise ValueError("operating point: ambient and losses must be finite")
    q = r * pm / minimum
    qa = q * c2
    qb = q * c1 + 1.0
    qc = ta + r * p0 + q * c0
    disc = qb * qb - 4.0 * qa * qc
    # g(T) = qa T^2 - qb T + qc = T_a + R_th P(T) - T opens upward; any root has T = T_a + R_th P(T) > T_a
    # (P > 0), so a balance exists exactly when the roots are real, and the part settles at the lower one.
    exists = disc >= 0.0
    root = np.sqrt(np.where(exists, disc, 0.0))
    # the lower root without cancellation: 2 qc / (qb + root) when qb > 0, the textbook form otherwise
    positive = qb > 0.0
    low = np.where(positive, 2.0 * qc / np.where(positive, qb + root, 1.0),
                   (qb - root) / (2.0 * np.where(positive | (qa <= 0.0), 1.0, qa)))
    temp = np.where(exists, low, np.inf)
    slope = np.where(exists, pm * (2.0 * c2 * np.where(exists, temp, 0.0) - c1) / minimum, 0.0)
    margin = np.where(exists, 1.0 - r * slope, -np.inf)   # -inf: no balance at all
    ex = np.asarray(exists)
    return QuadraticOperatingPoint(exists=bool(ex) if ex.ndim == 0 else ex, temp_c=_out(np.asarray(temp, dtype=float)),
                                   margin=_out(np.asarray(margin, dtype=float)))
