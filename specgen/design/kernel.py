"""The design kernel: array-capable steps shared by the engine (one part) and the search (many rows).

Every function takes floats or numpy arrays (broadcast together, one element per row) and returns a float
for all-scalar input, else an array of the broadcast shape; "scalar" below marks arguments that must be one
value (a material's Steinmetz coefficients, a waveform name). The physics lives in ``specgen.physics``; the
kernel composes it with the shop's rules (``limits``). Kind codes in arrays: ``FORMER_CODE`` and
``WIRE_CODE``. Laying the wire lives in ``kernel_winding``, the copper's resistance in ``kernel_copper``; this
module re-exports both, so callers read every step as ``kernel.<name>``.

Flux and turns
  b_sat_t(b_sat_25c_t, b_sat_100c_t, temp_c)                        B_sat at a temperature
  flux_limit_t(b25, b100, temp_c, fraction, b_design_t, spec_limit_t)  the working limit (value only)
  flux_limit_source(...same...)                                      which rule set it (FLUX_LIMIT_* codes)
  unipolar_swing_t(limit_t, b_r_t, waveform)                         usable swing (unipolar: less B_r)
  turns_for_voltage(v, freq_hz, b_t, ae_m2, waveform, duty)         Faraday, not rounded
  whole_turns(turns)                                                 ceil (1e-9 slack), at least 1
  turns_for_inductance(target_h, ae, le, mu, gap_m, window_m, gaps)  whole N for L with a fixed gap
  turns_for_peak_flux(target_h, i_peak_a, b_t, ae_m2)                energy method N = L I / (B Ae)
  gap_for_inductance_m(target_h, turns, ae, le, mu, window_m, gaps)  NaN where no gap reaches L
  round_gap_down_m(gap_m)                                            to the shop's 0.01 mm
  gapped_turns_and_gap(target_h, i_peak_a, b_limit_t, ae, le, mu, window_m, fixed_turns, gaps)  (N, gap)
  iron_reluctance_share(gap_m, le_m, mu_r)                           the core's share of the path's reluctance
  powder_flux_t(turns, current_a, le_m, mu_initial, a, b, c)         B = mu0 mu_i int_0^H f dh
  powder_sizing_currents_a(i_dc, i_op_pk, ac)                        (sizing current, quoted bias): AC at the peak
  powder_turns_and_inductance(target_h, currents, ae, le, mu_i, a, b, c)  (N, L at the quoted bias) or None
  powder_ceiling_t(mu_initial, a, b, c)                              the B its DC-bias curve tends to
  powder_saturation_t(b_sat_t, fraction, ceiling_t)                  where a powder counts as saturated
  magnetizing_current_a(v, freq_hz, inductance_h, waveform, duty)    (rms, peak)
  core_loss_significant(core_w, copper_w, beta)                       the loss-limited turns scan applies
  output_voltage_ok(asked_v, delivered_v, minus, plus)              delivered within asked -minus/+plus
  secondary_turns_within(np_turns, v_primary, asked_v, drop_fraction, minus, plus)  Ns meeting it, 0: none
  primary_current_a(p_out_w, efficiency, v_primary, i_magnetizing_a, i_pulse_a)  load referred, with I_mag
  secondary_turns_for_voltage(np_turns, v_primary, want_v)           open-circuit whole turns
  loaded_output_v(ratio, v_primary_after_drop, load_a, r_secondary_ohm, x_drop_v)  full-load voltage
  secondary_turns_to_add(want_v, loaded_v, volts_per_turn)           the drop made up, whole turns
  ripple_flux_t(inductance_h, ripple_a, turns, ae_m2)               peak-to-peak flux of a ripple
  least_loss_turns(n0, beta, core_w, copper_w, max_ratio)            core loss ~ N^-beta against copper ~ N^2
Winding
  pitch_and_height(wire, strands) / wire_geometry(wire, strands) / stack_wires(geometries)   (scalar wire)
  mean_turn_length_m(former_kind, centre_m, ...)                     MLT at a layer's centre line
  layer_centre_m(start_m, index, layer_height_m, layer_tape_m)       build to a layer's centre
  layer_capacity(former_kind, pitch_m, usable_m, id_m, centre_m, one_turn_per_layer)  (turns, room)
  section_turns(total, shares)                                       a winding's turns per section, whole
  wind_section(former, turns, pitch, lh, start, margin, layer_tape, foil, limit) -> SectionWinding
  dc_resistance_ohm(copper_area_m2, length_m, temp_c, conductor)    conductor: one name or a name per row
  skin_depth_m(freq_hz, temp_c, conductor)
  current_harmonics(waveform) -> Harmonics
  layer_porosity(wire, turns_in_layer, usable_m) / layer_delta(wire, skin_depth_m, porosity)   Dowell's eta, Delta
  litz_fr(wire_kind, fr_dowell)                                      Litz rows: square strands to round
  layer_ac_factor(wire, turns_in_layer, usable_m, skin_depth_m, f_inner, f_outer, harmonics)  one wire or one per row
  section_ac_factor(wire, layers, turns_per_layer, usable_m, skin_depth_m, f_start, f_end, harmonics)
  copper_loss_w(dcr_ohm, fr, i_ac_rms_a, i_dc_a)
Loss and temperature
  core_loss_w_m3(waveform, freq_hz, b_t, duty, k, alpha, beta)       k, alpha, beta scalar
  core_loss_grouped_w_m3(waveform, freq_hz, b_t, duty, group, k, alpha, beta)  per-group coefficients
  core_loss_temperature_factor(temp_c, ct0, ct1, ct2)               Mulder's F(T); 1 where NaN (no fit)
  cooling_model(cooling, air_speed_m_s, shop_figures) -> CoolingModel   forced air's speed, potting's factor
  flow_length_m(surface_m2)                                          length along the air flow (forced air)
  temperature_rise_k(total_loss_w, surface_m2, cooling, ambient_c, r_th_k_w)  McLyman or R_th; forced air; potted
  hot_spot_c(ambient_c, rise_k, hotspot_margin_k)
  thermal_state(total_loss_w, surface_m2, cooling, ambient_c, hotspot_margin_k) -> ThermalState (scalar)
  first_guess_thermal(ambient_c, hotspot_margin_k) -> ThermalState
  current_density_a_m2(table, cooling)                               the shop's density for a cooling
"""

from __future__ import annotations

import math
from collections.abc import Mapping
from typing import TYPE_CHECKING, Any

import numpy as np
import numpy.typing as npt

from ..physics import cooling as cooling_mod
from ..physics import core_temperature, coreloss, faraday, permeability, powder_bias, thermal
from ..physics import gap as gapmod
from ..physics import wire as wiremod
from ..physics._types import Arr, ArrayLike
from ..physics._types import all_scalar as _scalar
from ..physics._types import as_array as _f
from ..physics._types import out as _out
from .kernel_copper import (
    Harmonics,
    copper_loss_w,
    current_harmonics,
    dc_resistance_ohm,
    layer_ac_factor,
    layer_delta,
    layer_porosity,
    litz_fr,
    section_ac_factor,
    skin_depth_m,
)
from .kernel_winding import (
    FORMER_CODE,
    WIRE_CODE,
    FormerArrays,
    SectionWinding,
    WireGeometry,
    layer_capacity,
    layer_centre_m,
    mean_turn_length_m,
    pitch_and_height,
    section_turns,
    stack_wires,
    wind_section,
    wire_geometry,
)
from .limits import (
    AIR_FILM_MAX_C,
    AIR_FILM_MIN_C,
    CORE_LOSS_SCAN_FRACTION,
    FIRST_GUESS_RISE_K,
    FLOW_LENGTH_MAX_M,
    GAP_STEP_M,
    IRON_SHARE_WARN,
    LITZ_STRAND_MAX_SKIN_DEPTHS,
    MAX_BUNDLES_LITZ,
    MAX_HOT_C,
    MAX_STRANDS_ROUND,
    MAX_STRANDS_TIW,
    MAX_TURNS,
    RIPPLE_SKIN_FRACTION,
    SQUARE_HARMONICS,
    STRAND_MAX_SKIN_DEPTHS,
    THERMAL_MAX_PASSES,
    THERMAL_SETTLED_K,
    WIRE_CHOICE_TEMP_C,
)
from .state import CoolingModel, ThermalState

if TYPE_CHECKING:
    from ..catalog.models import CoolingFigures

__all__ = [
    "CORE_LOSS_SCAN_FRACTION", "FIRST_GUESS_RISE_K", "FORMER_CODE", "GAP_STEP_M", "IRON_SHARE_WARN",
    "LITZ_STRAND_MAX_SKIN_DEPTHS", "MAX_BUNDLES_LITZ", "MAX_HOT_C", "MAX_STRANDS_ROUND", "MAX_STRANDS_TIW",
    "MAX_TURNS", "MU0_H_M", "RIPPLE_SKIN_FRACTION", "SQUARE_HARMONICS", "STRAND_MAX_SKIN_DEPTHS",
    "THERMAL_MAX_PASSES", "THERMAL_SETTLED_K", "WIRE_CHOICE_TEMP_C", "WIRE_CODE",
    "FLUX_LIMIT_DESIGN", "FLUX_LIMIT_SHOP", "FLUX_LIMIT_SPEC", "FormerArrays", "Harmonics", "SectionWinding", "WireGeometry",
    "b_sat_t", "cooling_model", "copper_loss_w", "core_loss_grouped_w_m3", "core_loss_w_m3", "current_density_a_m2",
    "core_loss_significant", "core_loss_temperature_factor",
    "current_harmonics", "dc_resistance_ohm", "first_guess_thermal", "flow_length_m", "flux_limit_source",
    "flux_limit_t", "gap_for_inductance_m",
    "gap_arrangement_on", "gaps_in_series", "gapped_turns_and_gap", "hot_spot_c", "iron_reluctance_share",
    "layer_ac_factor", "layer_capacity", "layer_centre_m", "layer_delta",
    "layer_porosity", "litz_fr", "magnetizing_current_a", "mean_turn_length_m", "output_voltage_ok", "secondary_turns_within",
    "least_loss_turns", "loaded_output_v", "primary_current_a", "ripple_flux_t", "secondary_turns_for_voltage",
    "secondary_turns_to_add",
    "pitch_and_height", "powder_ceiling_t", "powder_sizing_currents_a", "powder_turns_and_inductance", "powder_flux_t",
    "powder_saturation_t", "round_gap_down_m",
    "section_ac_factor", "section_turns", "skin_depth_m", "stack_wires", "temperature_rise_k", "thermal_state",
    "turns_for_inductance", "turns_for_peak_flux", "turns_for_voltage", "unipolar_swing_t", "whole_turns",
    "wind_section", "wire_geometry",
]

MU0_H_M = wiremod.MU0_H_M


def _float(x: Any) -> float:
    """One value (a Python or numpy scalar) as a float, for the scalar paths."""
    return float(x)


# ================================================================================================ flux and turns

def b_sat_t(b_sat_25c_t: ArrayLike, b_sat_100c_t: ArrayLike, temp_c: ArrayLike) -> Arr:
    """B_sat at a temperature from a material's 25 and 100 degC values (``physics.thermal.b_sat_at_temp_t``)."""
    return _out(thermal.b_sat_at_temp_t(b_sat_25c_t, b_sat_100c_t, temp_c))


FLUX_LIMIT_SPEC, FLUX_LIMIT_DESIGN, FLUX_LIMIT_SHOP = 0, 1, 2   # which rule set the limit (flux_limit_source)


def flux_limit_source(b_sat_25c_t: ArrayLike, b_sat_100c_t: ArrayLike, temp_c: ArrayLike, fraction: float,
                      b_design_t: ArrayLike | None = None, spec_limit_t: float | None = None) -> Any:
    """Which rule sets the flux limit, per row: FLUX_LIMIT_SPEC, FLUX_LIMIT_DESIGN (the material's design
    value, where it is below ``fraction`` x B_sat at ``temp_c``) or FLUX_LIMIT_SHOP (that fraction of B_sat).
    An int for scalar input, else an int array."""
    bsat = _f(b_sat_t(b_sat_25c_t, b_sat_100c_t, temp_c))
    if spec_limit_t is not None:
        src = np.full(bsat.shape, FLUX_LIMIT_SPEC)
    elif b_design_t is None:
        src = np.full(bsat.shape, FLUX_LIMIT_SHOP)
    else:
        bd = _f(b_design_t)
        with np.errstate(invalid="ignore"):
            use = ~np.isnan(bd) & (bd < fraction * bsat)
        src = np.where(use, FLUX_LIMIT_DESIGN, FLUX_LIMIT_SHOP)
    return int(src) if src.ndim == 0 else src


def flux_limit_t(b_sat_25c_t: ArrayLike, b_sat_100c_t: ArrayLike, temp_c: ArrayLike, fraction: float,
                 b_design_t: ArrayLike | None = None, spec_limit_t: float | None = None) -> Arr:
    """The working flux-density limit [T]: the spec's, else the material's design value where it is below
    ``fraction`` x B_sat at ``temp_c``, else that fraction of B_sat (the shop's rule; ``flux_limit_source``
    says which). ``b_design_t``: per row, NaN (or None for all) where the material has none."""
    bsat = _f(b_sat_t(b_sat_25c_t, b_sat_100c_t, temp_c))
    src = np.asarray(flux_limit_source(b_sat_25c_t, b_sat_100c_t, temp_c, fraction, b_design_t, spec_limit_t))
    share = fraction * bsat
    spec = float(spec_limit_t) if spec_limit_t is not None else math.nan
    bd = _f(b_design_t) if b_design_t is not None else np.full(bsat.shape, math.nan)
    return _out(np.where(src == FLUX_LIMIT_SPEC, spec, np.where(src == FLUX_LIMIT_DESIGN, bd, share)))


def unipolar_swing_t(limit_t: ArrayLike, b_r_t: ArrayLike, waveform: str) -> Arr:
    """The flux swing a drive may use: a unipolar pulse starts from the residual flux B_r, so only
    B_limit - B_r is usable (no reset winding), held at 5 % of the limit at least; else the limit."""
    lim = _f(limit_t)
    if waveform == "unipolar":
        return _out(np.maximum(lim - _f(b_r_t), 0.05 * lim))
    return _out(lim)


def turns_for_voltage(v: ArrayLike, freq_hz: ArrayLike, b_t: ArrayLike, ae_m2: ArrayLike, waveform: str,
                      duty: ArrayLike = 0.5) -> Arr:
    """Turns for a voltage at a flux density by Faraday's law, not rounded (``physics.faraday``)."""
    return _out(faraday.turns_for_voltage(v, freq_hz, b_t, ae_m2, waveform, duty))


def whole_turns(turns: ArrayLike) -> Arr:
    """Whole turns: rounded up (1e-9 slack for a figure that is whole but for rounding), at least 1."""
    return _out(np.maximum(1.0, np.ceil(_f(turns) - 1e-9)))


def turns_for_inductance(target_h: ArrayLike, ae_m2: ArrayLike, le_m: ArrayLike, mu_r: ArrayLike,
                         gap_m: ArrayLike, window_m: ArrayLike, gaps: ArrayLike = 1) -> Arr:
    """Smallest whole N meeting L with a fixed gap (L grows as N^2; fringing does not depend on N).
    ``gaps``: the equal gaps in series that make up ``gap_m`` (``physics.gap.inductance_gapped_h``).

    Capped at MAX_TURNS + 1 so the caller's turn check reports an impossible requirement."""
    l1 = _f(gapmod.inductance_gapped_h(1, ae_m2, le_m, mu_r, gap_m, window_m, gaps))
    with np.errstate(divide="ignore", invalid="ignore"):
        n = np.sqrt(_f(target_h) / l1)
    ok = n < MAX_TURNS
    return _out(np.where(ok, np.maximum(1.0, np.ceil(np.where(ok, n, 1.0) - 1e-9)), MAX_TURNS + 1.0))


def turns_for_peak_flux(target_h: ArrayLike, i_peak_a: ArrayLike, b_t: ArrayLike, ae_m2: ArrayLike) -> Arr:
    """McLyman's energy method, N = L I_pk / (B Ae), not rounded (``physics.gap.turns_for_peak_b``)."""
    return _out(gapmod.turns_for_peak_b(target_h, i_peak_a, b_t, ae_m2))


def _gap_bisect(target_h: npt.NDArray[np.float64], n: npt.NDArray[np.float64], ae: npt.NDArray[np.float64],
                le: npt.NDArray[np.float64], mu: npt.NDArray[np.float64],
                window: npt.NDArray[np.float64], gaps: npt.NDArray[np.float64]) -> npt.NDArray[np.float64]:
    """The scalar solver's answer for arrays: L(lg) starts at mu0 N^2 Ae mu/le, rises a little at microscopic
    gaps (McLyman's F has an infinite slope at zero) and then falls; the crossing from above is unique,
    found by 64 bisections on a log scale over [1e-12 x 2kG, 2kG] for k gaps in series (within ~1e-13 of the
    scalar solver)."""
    k = MU0_H_M * n * n * ae
    out = np.full(n.shape, np.nan)
    reach = target_h <= k * mu / le
    upper = 2.0 * window * gaps
    l_up = _f(gapmod.inductance_gapped_h(n, ae, le, mu, upper, window, gaps))
    closed = reach & (l_up - target_h > 0.0)
    out[closed] = (k / target_h - le / mu)[closed]
    b = np.flatnonzero(reach & ~closed)
    if b.size:
        nb, aeb, leb, mub, wb, tb, kb = n[b], ae[b], le[b], mu[b], window[b], target_h[b], gaps[b]
        lo = np.log(1e-12 * upper[b])
        hi = np.log(upper[b])
        for _ in range(64):
            mid = 0.5 * (lo + hi)
            above = _f(gapmod.inductance_gapped_h(nb, aeb, leb, mub, np.exp(mid), wb, kb)) >= tb
            lo = np.where(above, mid, lo)
            hi = np.where(above, hi, mid)
        out[b] = np.exp(0.5 * (lo + hi))
    return out


def gap_for_inductance_m(target_h: ArrayLike, turns: ArrayLike, ae_m2: ArrayLike, le_m: ArrayLike,
                         mu_r: ArrayLike, window_m: ArrayLike, gaps: ArrayLike = 1) -> Arr:
    """The smallest total air gap giving L with N turns, McLyman's fringing included per gap (``gaps`` equal
    gaps in series) [m]; NaN where even no gap reaches L. Scalars: ``physics.gap.gap_for_inductance_m`` (scan,
    then bisection to 1e-13); arrays: a vectorised bisection of the same ``inductance_gapped_h``."""
    if _scalar(target_h, turns, ae_m2, le_m, mu_r, window_m, gaps):
        ts, ns, aes, les, mus, ws = (float(np.asarray(x)) for x in (target_h, turns, ae_m2, le_m, mu_r, window_m))
        g = gapmod.gap_for_inductance_m(ts, ns, aes, les, mus, ws, int(np.asarray(gaps)))
        return math.nan if g is None else float(g)
    t, n, ae, le, mu, w, k = np.broadcast_arrays(_f(target_h), _f(turns), _f(ae_m2), _f(le_m), _f(mu_r),
                                                 _f(window_m), _f(gaps))
    return _out(_gap_bisect(t, n, ae, le, mu, w, k))


def gap_arrangement_on(asked: str, core_shape: str) -> str:
    """The gap arrangement a core can take: laminations (EI) cannot be ground in the centre leg only, so a
    centre gap asked of them is a spacer in every leg; otherwise as asked."""
    return "spacer" if asked == "centre" and core_shape == "EI" else asked


def gaps_in_series(arrangement: str) -> int:
    """The gaps the flux crosses in series for a gap arrangement: a spacer under every leg of a two-part set
    puts it across two (the centre leg and the outer legs' return), a ground centre leg across one."""
    return 2 if arrangement == "spacer" else 1


def iron_reluctance_share(gap_m: ArrayLike, le_m: ArrayLike, mu_r: ArrayLike) -> Arr:
    """The core's share of the magnetic path's reluctance, (l_e / mu) / (l_g + l_e / mu) (fringing left out):
    1 without a gap. Above ``IRON_SHARE_WARN`` the material's permeability, not the gap, sets the inductance,
    and the inductance varies with the permeability's own spread, flux and temperature (McLyman, the gapped
    inductor's reluctance in series)."""
    iron = _f(le_m) / _f(mu_r)
    return _out(iron / (np.maximum(_f(gap_m), 0.0) + iron))


def round_gap_down_m(gap_m: ArrayLike) -> Arr:
    """A gap rounded down to the shop's step (rounding down raises L, so the built part meets it)."""
    return _out(np.floor(_f(gap_m) / GAP_STEP_M + 1e-6) * GAP_STEP_M)


def gapped_turns_and_gap(target_h: ArrayLike, i_peak_a: ArrayLike, b_limit_t: ArrayLike, ae_m2: ArrayLike,
                         le_m: ArrayLike, mu_r: ArrayLike, window_m: ArrayLike,
                         fixed_turns: int | None = None, gaps: ArrayLike = 1) -> tuple[Arr, Arr]:
    """Turns and total gap of a gapped core by McLyman's energy method: (N, gap [m]); ``gaps``: the equal
    gaps in series that make up the total (2 for a spacer under every leg), each with its own fringing.

    N = ceil(L I_pk / (B_limit Ae)) (or ``fixed_turns``); the gap for L with fringing; where no gap reaches
    L, more turns and no gap; the gap rounded down to the shop's step; then, while the rounded gap pushes
    B_pk = L I_pk / (N Ae) past the limit, one more turn and the gap solved again (at most 20 times; never
    with fixed turns). The caller checks N against MAX_TURNS first."""
    scalar = _scalar(target_h, i_peak_a, b_limit_t, ae_m2, le_m, mu_r, window_m, gaps)
    t, ipk, lim, ae, le, mu, w, kg = np.broadcast_arrays(_f(target_h), _f(i_peak_a), _f(b_limit_t), _f(ae_m2),
                                                         _f(le_m), _f(mu_r), _f(window_m), _f(gaps))
    t, ipk, lim, ae, le, mu, w, kg = (np.atleast_1d(x).astype(float) for x in (t, ipk, lim, ae, le, mu, w, kg))

    def gap(n: npt.NDArray[np.float64], sel: npt.NDArray[np.intp]) -> npt.NDArray[np.float64]:
        if scalar:
            return np.array([gap_for_inductance_m(float(t[0]), float(n[0]), float(ae[0]), float(le[0]),
                                                  float(mu[0]), float(w[0]), int(kg[0]))])
        return _gap_bisect(t[sel], n, ae[sel], le[sel], mu[sel], w[sel], kg[sel])

    every = np.arange(t.size)
    if fixed_turns:
        n = np.full(t.shape, float(fixed_turns))
    else:
        n = _f(whole_turns(gapmod.turns_for_peak_b(t, ipk, lim, ae))) * np.ones(t.shape)
    lg = gap(n, every)
    none = np.isnan(lg)
    if none.any():
        if fixed_turns:
            lg[none] = 0.0
        else:
            idx = np.flatnonzero(none)
            n[idx] = turns_for_inductance(t[idx], ae[idx], le[idx], mu[idx], 0.0, w[idx], kg[idx])
            lg[idx] = np.nan_to_num(gap(n[idx], idx), nan=0.0)
    lg = _f(round_gap_down_m(lg))
    if not fixed_turns:
        for _ in range(20):
            l_try = _f(gapmod.inductance_gapped_h(n, ae, le, mu, lg, w, kg))
            over = _f(gapmod.b_peak_from_inductance_t(l_try, ipk, n, ae)) > lim
            if not over.any():
                break
            idx = np.flatnonzero(over)
            n[idx] += 1.0
            lg[idx] = _f(round_gap_down_m(np.nan_to_num(gap(n[idx], idx), nan=0.0)))
    if scalar:
        return float(n[0]), float(lg[0])
    return n, lg


def powder_flux_t(turns: ArrayLike, current_a: ArrayLike, le_m: ArrayLike, mu_initial: ArrayLike,
                  a: float, b: float, c: float) -> Arr:
    """Flux density in a powder core at a current [T]: the integral of the DC-bias curve's incremental
    permeability, B = mu0 mu_i int_0^H f(h) dh with H = N I / le (``physics.powder_bias.b_from_bias_t``, closed
    form); monotonic in the current. (mu0 mu_i f(H) H, the incremental permeability times H, peaks and falls.)"""
    h = _f(turns) * _f(current_a) / _f(le_m)
    return _out(powder_bias.b_from_bias_t(h, mu_initial, a, b, c))


def powder_sizing_currents_a(i_dc_a: float, i_op_pk_a: float, ac: bool) -> tuple[float, float]:
    """(current a powder choke's turns are sized at, DC bias its inductance is quoted at) [A]: a DC choke's L at
    its DC current, both; an AC reactor's L at its line peak (sqrt 2 x rms, where the roll-off is deepest), quoted
    at no DC bias. The engine's inductor and the search take these, so both size an AC reactor at its peak."""
    return (i_op_pk_a, 0.0) if ac else (i_dc_a, i_dc_a)


def powder_turns_and_inductance(target_h: float, currents_a: tuple[float, float], ae_m2: float, le_m: float,
                                mu_initial: float, a: float, b: float, c: float) -> tuple[int, float] | None:
    """Whole turns for ``target_h`` at the sizing current of ``powder_sizing_currents_a`` on a powder core
    (``physics.permeability.turns_for_biased_inductance``) and the inductance at its quoted bias
    (``physics.permeability.powder_inductance_h``); None where the roll-off outruns the turns."""
    sizing, bias = currents_a
    n = permeability.turns_for_biased_inductance(target_h, sizing, ae_m2, le_m, mu_initial, a, b, c)
    if n is None:
        return None
    return int(n), float(permeability.powder_inductance_h(n, ae_m2, le_m, mu_initial, bias, a, b, c))


def powder_ceiling_t(mu_initial: ArrayLike, a: float, b: float, c: float) -> Arr:
    """The flux density a powder's DC-bias curve tends to as the current grows (``physics.powder_bias.b_ceiling_t``)
    [T]; infinite where the curve has none."""
    return _out(powder_bias.b_ceiling_t(mu_initial, a, b, c))


def powder_saturation_t(b_sat_t: ArrayLike, fraction: float, ceiling_t: ArrayLike) -> Arr:
    """The flux density at which a powder core counts as saturated [T]: the shop's fraction of the lower of its
    B_sat and its DC-bias curve's ceiling (``powder_ceiling_t``). Along the curve B never passes the ceiling, so
    where the catalogue's fit tops out below B_sat the fit is the material's saturation as far as the design can
    know: at the shop's 80 % of it the permeability left is about a tenth of the initial."""
    return _out(fraction * np.minimum(_f(b_sat_t), _f(ceiling_t)))


def magnetizing_current_a(v: ArrayLike, freq_hz: ArrayLike, inductance_h: ArrayLike, waveform: str,
                          duty: ArrayLike = 0.5) -> tuple[Arr, Arr]:
    """(rms, peak) magnetizing current: V/(2 pi f L) for a sine; a triangle of peak V/(4 f L) for a square
    wave (rms = peak/sqrt 3); a unipolar pulse ramps to V t_on / L (rms = peak sqrt(duty/3))."""
    vv, f, lm, d = _f(v), _f(freq_hz), _f(inductance_h), _f(duty)
    if waveform == "sine":
        rms = _f(faraday.magnetizing_current_a(vv, f, lm))
        return _out(rms), _out(rms * math.sqrt(2.0))
    if waveform == "square":
        pk = vv / (4.0 * f * lm)
        return _out(pk / math.sqrt(3.0)), _out(pk)
    pk = vv * d / f / lm
    return _out(pk * np.sqrt(d / 3.0)), _out(pk)


# ================================================================================================ output voltage

def core_loss_significant(core_w: ArrayLike, copper_w: ArrayLike, beta: ArrayLike) -> Any:
    """Whether more primary turns may lower the total loss, so the loss-limited scan applies, at any frequency:
    beta P_core >= CORE_LOSS_SCAN_FRACTION x 2 P_cu (d/dN of a N^-beta + b N^2 is negative while
    beta P_core > 2 P_cu; McLyman, Transformer and Inductor Design Handbook, the least-loss condition). A bool
    for scalar input, else a bool array."""
    ok = _f(beta) * _f(core_w) >= CORE_LOSS_SCAN_FRACTION * 2.0 * _f(copper_w)
    return bool(ok) if np.ndim(ok) == 0 else ok


def output_voltage_ok(asked_v: ArrayLike, delivered_v: ArrayLike, minus: ArrayLike, plus: ArrayLike) -> Any:
    """Whether a winding delivers its voltage within tolerance: asked (1 - minus) <= delivered <= asked (1 + plus)
    (a part-per-billion slack for rounding). A bool for scalar input, else a bool array."""
    v, d = _f(asked_v), _f(delivered_v)
    ok = (d >= v * (1.0 - _f(minus)) * (1.0 - 1e-9)) & (d <= v * (1.0 + _f(plus)) * (1.0 + 1e-9))
    return bool(ok) if np.ndim(ok) == 0 else ok


def secondary_turns_within(np_turns: ArrayLike, v_primary: ArrayLike, asked_v: ArrayLike, drop_fraction: ArrayLike,
                           minus: ArrayLike, plus: ArrayLike) -> Arr:
    """The fewest secondary turns whose full-load voltage meets asked -minus/+plus with ``np_turns`` primary
    turns, else 0 (no whole turn count does: the volts per turn are too coarse for the band).

    Full load delivers N_s (V_p / N_p)(1 - d), d the fraction of the open-circuit voltage the load drops
    (resistance and leakage, from an evaluated build), so N_s lies in
    [asked (1 - minus) / e, asked (1 + plus) / e] with e = (V_p / N_p)(1 - d). The engine and the search both
    screen primary-turn candidates with it; the engine then confirms each pair on the built window."""
    e = _f(v_primary) / np.maximum(_f(np_turns), 1.0) * (1.0 - np.clip(_f(drop_fraction), 0.0, 0.9))
    v = _f(asked_v)
    with np.errstate(divide="ignore", invalid="ignore"):
        lo = np.maximum(1.0, np.ceil(v * (1.0 - _f(minus)) / e - 1e-9))
        hi = np.floor(v * (1.0 + _f(plus)) / e + 1e-9)
    return _out(np.where((lo <= hi) & np.isfinite(lo) & (e > 0), lo, 0.0))


def primary_current_a(p_out_w: ArrayLike, efficiency: ArrayLike, v_primary: ArrayLike,
                      i_magnetizing_a: ArrayLike, i_pulse_a: ArrayLike = 0.0) -> Arr:
    """The primary's rms current: the load referred to the primary, P_out / (eta V_p), in quadrature with the
    magnetizing current (a resistive load's current is in phase with the voltage, the magnetizing current
    lags it by 90 degrees; McLyman, transformer design, primary current). ``i_pulse_a``: gate-drive charge
    pulses referred by the turns ratio alone (not power, so no efficiency), taken in quadrature too: they
    flow at the edges, where the other currents are not at their rms (common practice approximation)."""
    if _scalar(p_out_w, efficiency, v_primary, i_magnetizing_a, i_pulse_a):
        return math.hypot(_float(p_out_w) / _float(efficiency) / _float(v_primary), _float(i_magnetizing_a),
                          _float(i_pulse_a))
    return _out(np.sqrt((_f(p_out_w) / _f(efficiency) / _f(v_primary)) ** 2 + _f(i_magnetizing_a) ** 2
                        + _f(i_pulse_a) ** 2))


def secondary_turns_for_voltage(np_turns: ArrayLike, v_primary: ArrayLike, want_v: ArrayLike) -> Arr:
    """A secondary's whole turns for ``want_v`` at open circuit from ``np_turns`` on ``v_primary`` (the turns
    ratio, rounded up; at least one). The full-load drop is then made up by ``secondary_turns_to_add``."""
    if _scalar(np_turns, v_primary, want_v):
        return float(max(1, math.ceil(_float(np_turns) * _float(want_v) / _float(v_primary) - 1e-9)))
    return whole_turns(_f(np_turns) * _f(want_v) / _f(v_primary))


def loaded_output_v(ratio: ArrayLike, v_primary_after_drop: ArrayLike, load_a: ArrayLike,
                    r_secondary_ohm: ArrayLike, x_drop_v: ArrayLike = 0.0) -> Arr:
    """A secondary's full-load voltage: the turns ratio x the primary voltage left after the primary's own
    drop, less the secondary's resistive drop in phase with a resistive load; a leakage drop ``x_drop_v``
    (referred to this winding) is in quadrature: sqrt(e^2 - x^2) - I R (McLyman, regulation)."""
    if _scalar(ratio, v_primary_after_drop, load_a, r_secondary_ohm, x_drop_v):
        e, x = _float(ratio) * _float(v_primary_after_drop), _float(x_drop_v)
        v = e if x == 0.0 else math.sqrt(max(e * e - x * x, 0.0))
        return v - _float(load_a) * _float(r_secondary_ohm)
    ea, xa = _f(ratio) * _f(v_primary_after_drop), _f(x_drop_v)
    va = ea if not xa.any() else np.sqrt(np.maximum(ea * ea - xa * xa, 0.0))
    return _out(va - _f(load_a) * _f(r_secondary_ohm))


def secondary_turns_to_add(want_v: ArrayLike, loaded_v: ArrayLike, volts_per_turn: ArrayLike) -> Arr:
    """Turns to add to a secondary that delivers ``loaded_v`` at full load, below ``want_v``: the shortfall
    over the volts per turn, rounded up, at least one (each added turn adds its volts less a little more drop,
    so the caller lays the build again and repeats)."""
    if _scalar(want_v, loaded_v, volts_per_turn):
        return float(max(1, math.ceil((_float(want_v) - _float(loaded_v)) / _float(volts_per_turn) - 1e-9)))
    return _out(np.maximum(1.0, np.ceil((_f(want_v) - _f(loaded_v)) / _f(volts_per_turn) - 1e-9)))


def ripple_flux_t(inductance_h: ArrayLike, ripple_a: ArrayLike, turns: ArrayLike, ae_m2: ArrayLike) -> Arr:
    """Peak-to-peak flux density of a current ripple, dB = L dI / (N Ae) (Faraday's law over the ripple)."""
    if _scalar(inductance_h, ripple_a, turns, ae_m2):
        return _float(inductance_h) * _float(ripple_a) / (_float(turns) * _float(ae_m2))
    return _out(_f(inductance_h) * _f(ripple_a) / (_f(turns) * _f(ae_m2)))


def least_loss_turns(n0: ArrayLike, beta: ArrayLike, core_w: ArrayLike, copper_w: ArrayLike,
                     max_ratio: float) -> Arr:
    """Whole primary turns of least total loss near n0: core loss falls as N^-beta and copper loss rises as
    N^2, so the sum is least at N = n0 (beta P_core / (2 P_cu))^(1/(beta + 2)) (McLyman, the optimum of core
    and copper loss), held between n0 and ``max_ratio`` x n0."""
    b, pc, pcu = _f(beta), _f(core_w), _f(copper_w)
    with np.errstate(divide="ignore", invalid="ignore"):
        ratio = (b * pc / (2.0 * pcu)) ** (1.0 / (b + 2.0))
    ratio = np.clip(np.nan_to_num(ratio, nan=1.0, posinf=max_ratio), 1.0, max_ratio)
    return _out(np.asarray(np.ceil(_f(n0) * ratio - 1e-9), dtype=float))


# ================================================================================================ loss and temperature

def core_loss_w_m3(waveform: str, freq_hz: ArrayLike, b_t: ArrayLike, duty: float, k: float, alpha: float,
                   beta: float) -> Arr:
    """Core loss density by drive [W/m^3]; zero where the flux is zero.

    'sine': Steinmetz at B_pk; 'square': iGSE, triangular flux +-B_pk at duty 0.5; 'unipolar': iGSE of a
    pulse of swing b_t over duty x T; 'ripple': iGSE of a triangular ripple of peak-to-peak b_t rising for
    duty x T (an inductor's). References in ``physics.coreloss``."""
    b = _f(b_t)
    pos = b > 0
    out = np.zeros(np.broadcast_shapes(b.shape, np.shape(freq_hz)))
    if not pos.any():
        return _out(out)
    f = np.broadcast_to(_f(freq_hz), out.shape)
    bb = np.broadcast_to(b, out.shape)
    p = np.broadcast_to(pos, out.shape)
    fp, bp = f[p] if out.ndim else float(f), bb[p] if out.ndim else float(bb)
    if waveform == "sine":
        vals = coreloss.steinmetz_w_m3(fp, bp, k, alpha, beta)
    elif waveform == "square":
        vals = coreloss.square_wave_loss_w_m3(fp, bp, k, alpha, beta)
    elif waveform == "unipolar":
        vals = coreloss.unipolar_pulse_loss_w_m3(fp, bp, duty, k, alpha, beta)
    elif waveform == "ripple":
        vals = coreloss.triangular_ripple_loss_w_m3(fp, bp, duty, k, alpha, beta)
    else:
        raise ValueError(f"unknown drive {waveform!r}; expected sine, square, unipolar or ripple")
    if out.ndim == 0:
        return float(vals)
    out[p] = vals
    return out


def core_loss_grouped_w_m3(waveform: str, freq_hz: float, b_t: ArrayLike, duty: float, group: ArrayLike,
                           k: ArrayLike, alpha: ArrayLike, beta: ArrayLike) -> npt.NDArray[np.float64]:
    """``core_loss_w_m3`` for rows of different materials: ``group`` indexes the per-material k, alpha, beta
    (the iGSE coefficient is computed once per material)."""
    b = _f(b_t)
    g = np.asarray(group)
    kk, aa, bb = _f(k), _f(alpha), _f(beta)
    out = np.zeros(b.shape)
    for m in np.unique(g):
        sel = np.flatnonzero(g == m)
        out[sel] = core_loss_w_m3(waveform, freq_hz, b[sel], duty, float(kk[m]), float(aa[m]), float(bb[m]))
    return out


def core_loss_temperature_factor(temp_c: ArrayLike, ct0: ArrayLike, ct1: ArrayLike, ct2: ArrayLike) -> Arr:
    """The core-loss temperature factor F(T) (``physics.core_temperature.loss_temperature_factor``, Mulder's
    quadratic normalised to its minimum); 1 where a row's material has no fit (NaN coefficients)."""
    t, c0, c1, c2 = np.broadcast_arrays(_f(temp_c), _f(ct0), _f(ct1), _f(ct2))
    has = np.isfinite(c0) & np.isfinite(c1) & np.isfinite(c2)
    if not has.any():
        return _out(np.ones(t.shape))
    f = _f(core_temperature.loss_temperature_factor(np.where(has, t, 0.0), np.where(has, c0, 2.0),
                                                     np.where(has, c1, 0.0), np.where(has, c2, 1.0)))
    return _out(np.where(has, f, 1.0))


def cooling_model(cooling: str, air_speed_m_s: float | None, figures: CoolingFigures) -> CoolingModel:
    """The part's cooling with the shop's figures filled in: forced air at the spec's speed, else the shop's
    default (``shop.yaml cooling.air_speed``); potted with the shop's stated factor and its source."""
    if cooling == "forced":
        given = air_speed_m_s is not None
        speed = float(air_speed_m_s) if air_speed_m_s is not None else figures.air_speed_m_s
        return CoolingModel("forced", air_speed_m_s=speed, air_speed_from="spec" if given else "shop default")
    if cooling == "potted":
        return CoolingModel("potted", potted_factor=figures.potted_rise_factor, potted_source=figures.potted_source)
    return CoolingModel("natural")


def flow_length_m(surface_m2: ArrayLike) -> Arr:
    """The part's length along the air flow for the flat-plate coefficient [m]: the side of the cube with its
    outside surface (``physics.cooling.flow_length_from_surface_m``), at most FLOW_LENGTH_MAX_M, which keeps the
    boundary layer laminar to the highest air speed the catalogue takes."""
    return _out(np.minimum(_f(cooling_mod.flow_length_from_surface_m(np.maximum(_f(surface_m2), 0.0))),
                           FLOW_LENGTH_MAX_M))


def temperature_rise_k(total_loss_w: ArrayLike, surface_m2: ArrayLike, cooling: CoolingModel, ambient_c: ArrayLike,
                       r_th_k_w: ArrayLike | None = None) -> Arr:
    """Temperature rise [K] for the part's cooling, held below MAX_HOT_C.

    Still air: McLyman's fit (``physics.thermal.temperature_rise_k``), or where a row has a measured thermal
    resistance ``r_th_k_w`` (NaN: none) the loss through it (``physics.cooling.temperature_rise_from_r_th_k``).
    Forced air: the laminar flat-plate coefficient at the air speed over ``flow_length_m`` combined with the still
    air's (Churchill's n = 3), solved with McLyman's rise (``physics.cooling.forced_air_rise_k``) or with a
    measured R_th (``physics.cooling.forced_air_rise_from_r_th_k``); the air's properties
    at ambient + FIRST_GUESS_RISE_K / 2 (the film). Potted: still air's rise times the shop's stated factor."""
    p, area, amb = np.broadcast_arrays(_f(total_loss_w), _f(surface_m2), _f(ambient_c))
    r_th = np.full(p.shape, np.nan) if r_th_k_w is None else np.broadcast_to(_f(r_th_k_w), p.shape)
    measured = np.isfinite(r_th) & (r_th > 0.0)
    natural = _f(thermal.temperature_rise_k(p, area))
    if measured.any():
        natural = np.where(measured, _f(cooling_mod.temperature_rise_from_r_th_k(p, np.where(measured, r_th, 0.0))),
                           natural)
    rise = natural
    if cooling.cooling == "forced" and cooling.air_speed_m_s is not None:
        ok = np.isfinite(p) & (p >= 0.0) & np.isfinite(area) & (area > 0.0)
        pp, aa = np.where(ok, p, 0.0), np.where(ok, area, 1.0)
        length = _f(flow_length_m(aa))
        film = np.clip(amb + FIRST_GUESS_RISE_K / 2.0, AIR_FILM_MIN_C, AIR_FILM_MAX_C)
        forced = np.zeros(p.shape)
        if (ok & ~measured).any():
            forced = _f(cooling_mod.forced_air_rise_k(pp, aa, cooling.air_speed_m_s, length, film))
        if (ok & measured).any():
            forced = np.where(measured, _f(cooling_mod.forced_air_rise_from_r_th_k(
                pp, np.where(measured, r_th, 1.0), aa, cooling.air_speed_m_s, length, film)), forced)
        rise = np.where(ok, forced, natural)
    elif cooling.cooling == "potted":
        rise = natural * cooling.potted_factor
    return _out(np.minimum(rise, MAX_HOT_C - amb))


def hot_spot_c(ambient_c: ArrayLike, rise_k: ArrayLike, hotspot_margin_k: ArrayLike) -> Arr:
    """Hot spot = ambient + rise (the mean winding) + the shop's hot-spot margin."""
    return _out(_f(ambient_c) + _f(rise_k) + _f(hotspot_margin_k))


def thermal_state(total_loss_w: float, surface_m2: float, cooling: CoolingModel, ambient_c: float,
                  hotspot_margin_k: float, r_th_k_w: float | None = None) -> ThermalState:
    """The winding and hot-spot temperatures at a total loss (scalar; arrays: ``temperature_rise_k`` and
    ``hot_spot_c``); ``r_th_k_w``: a measured thermal resistance instead of the surface rule."""
    rise = float(temperature_rise_k(total_loss_w, surface_m2, cooling, ambient_c, r_th_k_w))
    winding = ambient_c + rise
    return ThermalState(winding, winding + hotspot_margin_k, rise)


def first_guess_thermal(ambient_c: float, hotspot_margin_k: float) -> ThermalState:
    """Where the temperature loop starts: FIRST_GUESS_RISE_K over ambient."""
    winding = ambient_c + FIRST_GUESS_RISE_K
    return ThermalState(winding, winding + hotspot_margin_k, FIRST_GUESS_RISE_K)


def current_density_a_m2(table: Mapping[str, float], cooling: str) -> float:
    """The shop's current density for a cooling (its table in shop.yaml), natural convection's if the table
    has no figure for it."""
    return float(table.get(cooling, table["natural"]))
