"""The temperature loop: copper resistance and the ferrite's core loss at the part's temperature, the rise
through the part's thermal resistance (measured, else McLyman's surface rule), the runaway margin and the
Curie point.

The core is taken at the mean winding temperature (McLyman's rise is the part's surface rise over ambient);
a material with a loss-temperature fit (``Material.loss_temperature``, ``physics.core_temperature``) has its
Steinmetz loss scaled by F(T) at every pass. After the loop settles, the balance T = T_a + R_th P(T) is solved
again as a function of temperature alone (``physics.core_temperature.thermal_operating_point``) with R_th the
cooling's local slope at the settled point, the copper's loss by its resistance's temperature coefficient and
the core's by F(T): no balance is thermal runaway.
"""

from __future__ import annotations

import math
from dataclasses import replace
from typing import TYPE_CHECKING, Any

from ..catalog.models import Material
from ..errors import DesignOutOfRange
from ..physics import core_temperature as ct
from ..physics import wire as wiremod
from . import kernel as K
from . import limits as L
from .bounds import HOTTEST_C
from .resolve import spec_error
from .result import Check
from .spec import Spec
from .state import CoolingModel, DesignState, Evaluation, Parts, ThermalState

if TYPE_CHECKING:
    from .kinds.base import KindRun


def core_loss_factor(material: Material, temp_c: float) -> float:
    """The material's core-loss temperature factor F(T) at ``temp_c`` (1 without a fit)."""
    if material.loss_temperature is None:
        return 1.0
    return float(K.core_loss_temperature_factor(temp_c, *material.loss_temperature))


def at_core_temperature(ev: Evaluation[Any], material: Material, temp: ThermalState) -> Evaluation[Any]:
    """The evaluation with its core loss at the core's temperature (the mean winding temperature)."""
    f = core_loss_factor(material, temp.winding_c)
    if f == 1.0:
        return ev
    return replace(ev, core_w=ev.core_w * f, core_w_m3=ev.core_w_m3 * f)


def thermal_state(spec: Spec, parts: Parts, total_w: float, hotspot_margin_k: float,
                  cooling: CoolingModel) -> ThermalState:
    """The kernel's thermal state for this part: its core's measured thermal resistance where the catalogue
    has one, else McLyman's surface rule, for its cooling; with the basis in words (``rise_basis``)."""
    r_th = parts.core.thermal_resistance_k_w
    temp = K.thermal_state(total_w, parts.surface_m2, cooling, spec.ambient_c, hotspot_margin_k, r_th)
    return replace(temp, r_th_basis=rise_basis(parts, cooling))


def rise_basis(parts: Parts, cooling: CoolingModel) -> str:
    """Where the temperature rise comes from, in words: the still-air basis and the cooling on top of it."""
    r_th = parts.core.thermal_resistance_k_w
    still = (f"measured {r_th:g} K/W in still air (catalogue, core {parts.core.id})" if r_th is not None
             else "McLyman's rise against loss per surface area (still air)")
    if cooling.cooling == "forced" and cooling.air_speed_m_s is not None:
        length = float(K.flow_length_m(parts.surface_m2))
        return (f"{still}, with forced air at {cooling.air_speed_m_s:.3g} m/s "
                f"({cooling.air_speed_from}) along {length * 1e3:.0f} mm: laminar flat-plate convection combined "
                f"with the still air's (Churchill, n = 3; Incropera and DeWitt)")
    if cooling.cooling == "potted":
        return f"{still}, x {cooling.potted_factor:g} potted (shop figure: {cooling.potted_source})"
    return still


def _rise_slope_k_w(spec: Spec, parts: Parts, cooling: CoolingModel, total_w: float) -> float:
    """d(rise)/dP at the part's loss [K/W], by a central difference of the kernel's rise (any cooling); where the
    rise is held at MAX_HOT_C (no slope) the secant rise / P."""
    r_th = parts.core.thermal_resistance_k_w
    step = total_w * 1e-4
    hi, lo, now = (float(K.temperature_rise_k(p, parts.surface_m2, cooling, spec.ambient_c, r_th))
                   for p in (total_w + step, total_w - step, total_w))
    slope = (hi - lo) / (2.0 * step)
    return slope if slope > 0.0 and math.isfinite(slope) else now / total_w


def settle(spec: Spec, parts: Parts, run: KindRun, ev: Evaluation[Any], temp: ThermalState,
           hotspot_margin_k: float, cooling: CoolingModel) -> tuple[Evaluation[Any], ThermalState, int]:
    """The temperature loop, bounded by THERMAL_MAX_PASSES: resistance and core loss with temperature, the
    rise, until the hot spot moves less than THERMAL_SETTLED_K. A loss that outgrows the cooling ends the
    design (``DesignOutOfRange``, exit 1) with the runaway named."""
    mat = parts.material
    ev = at_core_temperature(ev, mat, temp)
    passes = 0
    for _ in range(K.THERMAL_MAX_PASSES):
        passes += 1
        new = thermal_state(spec, parts, ev.total_w, hotspot_margin_k, cooling)
        settled = abs(new.hot_c - temp.hot_c) < K.THERMAL_SETTLED_K
        temp = new
        ev = at_core_temperature(run.again(ev, temp), mat, temp)
        if settled:
            break
    margin = _stability_margin(spec, parts, cooling, ev, temp)
    if margin is not None and (margin <= 0.0 or temp.hot_c > HOTTEST_C):
        raise _runaway(spec, mat, ev, temp)
    return ev, replace(temp, core_factor=core_loss_factor(mat, temp.winding_c), stability_margin=margin), passes


def _stability_margin(spec: Spec, parts: Parts, cooling: CoolingModel, ev: Evaluation[Any],
                      temp: ThermalState) -> float | None:
    """1 - R_th dP/dT at the part's balance (> 0: stable); 0 where no balance exists below bounds.HOTTEST_C;
    None without a loss-temperature fit."""
    mat = parts.material
    if mat.loss_temperature is None or ev.total_w <= 0.0 or temp.rise_k <= 0.0:
        return None
    f_now = core_loss_factor(mat, temp.winding_c)
    core_min = ev.core_w / f_now
    # the cooling's local slope d(rise)/dP (McLyman's rise grows as P^0.826, a measured R_th linearly, forced
    # air in between)
    r_local = _rise_slope_k_w(spec, parts, cooling, ev.total_w)
    rho_now = float(wiremod.resistivity_ohm_m(temp.winding_c))

    def loss_w(t_c: float) -> float:
        copper = ev.copper_w * float(wiremod.resistivity_ohm_m(t_c)) / rho_now
        return copper + core_min * core_loss_factor(mat, t_c)

    # the balance of the linearised cooling through the settled point: T = T0 + r_local (P(T) - P(T0))
    t0 = temp.winding_c - r_local * ev.total_w
    limit = max(HOTTEST_C, temp.winding_c + 1.0)
    point = ct.thermal_operating_point(loss_w, r_local, t0, search_limit_c=limit)
    if not point.exists or point.margin is None:
        return 0.0
    return float(point.margin) if point.stable else min(0.0, float(point.margin))


def _runaway(spec: Spec, mat: Material, ev: Evaluation[Any], temp: ThermalState) -> DesignOutOfRange:
    err = spec_error(spec, f"thermal runaway: the core loss of {mat.id} rises with temperature faster than the "
                           f"cooling carries it away, so the part finds no balance below {HOTTEST_C:g} °C: it "
                           f"cannot be built on core {spec.core_id} as asked; lower the flux density (more turns), "
                           f"a larger core or better cooling", "operating")
    return DesignOutOfRange(err.message, err.file, err.line, err.path)


def temperature_checks(state: DesignState) -> list[Check]:
    """The hot spot against the core material's Curie point (permeability and saturation collapse there),
    and the margin against thermal runaway where the material's loss depends on temperature."""
    mat, temp = state.parts.material, state.temp
    out: list[Check] = []
    if not math.isnan(mat.curie_c) and mat.curie_c < 1000.0:
        gap = mat.curie_c - temp.hot_c
        if gap <= 0.0:
            out.append(Check("fail", "curie", f"hot spot {temp.hot_c:.0f} °C reaches the {mat.id} Curie point "
                                              f"{mat.curie_c:.0f} °C: the core stops being magnetic; lower the loss "
                                              f"or use a material with a higher Curie point"))
        elif gap < L.CURIE_WARN_K:
            out.append(Check("warn", "curie", f"hot spot {temp.hot_c:.0f} °C is within {gap:.0f} K of the {mat.id} "
                                              f"Curie point {mat.curie_c:.0f} °C: permeability and B_sat fall steeply "
                                              f"there (common practice: keep {L.CURIE_WARN_K:g} K away)"))
    m = temp.stability_margin
    if m is not None:
        said = (f"core loss x {temp.core_factor:.2f} at {temp.winding_c:.0f} °C (the {mat.id} loss-temperature fit); "
                f"stability margin 1 - R_th dP/dT = {m:.2f}")
        if m < L.RUNAWAY_WARN_MARGIN:
            out.append(Check("warn", "thermal-runaway", said + ": close to thermal runaway; a little more loss or "
                                                               "ambient and the core heats without limit"))
        else:
            out.append(Check("pass", "thermal-runaway", said))
    return out
