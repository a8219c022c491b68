"""The design kernel: array-capable steps shared by the engine (one part) and the search (many rows).

Every function takes floats or numpy arrays (broadcast together, one element per row) and returns a float
for all-scalar input, else an array of the broadcast shape; "scalar" below marks arguments that must be one
value (a material's Steinmetz coefficients, a waveform name). The physics lives in ``specgen.physics``; the
kernel composes it with the shop's rules (``limits``). Kind codes in arrays: ``FORMER_CODE`` and
``WIRE_CODE``.

Flux and turns
  b_sat_t(b_sat_25c_t, b_sat_100c_t, temp_c)                        B_sat at a temperature
  flux_limit_t(b25, b100, temp_c, fraction, b_design_t, spec_limit_t)  the working limit (value only)
  flux_limit_source(...same...)                                      which rule set it (FLUX_LIMIT_* codes)
  unipolar_swing_t(limit_t, b_r_t, waveform)                         usable swing (unipolar: less B_r)
  turns_for_voltage(v, freq_hz, b_t, ae_m2, waveform, duty)         Faraday, not rounded
  whole_turns(turns)                                                 ceil (1e-9 slack), at least 1
  turns_for_inductance(target_h, ae, le, mu, gap_m, window_m)       whole N for L with a fixed gap
  turns_for_peak_flux(target_h, i_peak_a, b_t, ae_m2)                energy method N = L I / (B Ae)
  gap_for_inductance_m(target_h, turns, ae, le, mu, window_m)       NaN where no gap reaches L
  round_gap_down_m(gap_m)                                            to the shop's 0.01 mm
  gapped_turns_and_gap(target_h, i_peak_a, b_limit_t, ae, le, mu, window_m, fixed_turns)  (N, gap)
  powder_flux_t(turns, current_a, le_m, mu_initial, a, b, c)         B = mu0 mu_i f(H) H
  magnetizing_current_a(v, freq_hz, inductance_h, waveform, duty)    (rms, peak)
  output_voltage_ok(asked_v, delivered_v, minus, plus)              delivered within asked -minus/+plus
  secondary_turns_within(np_turns, v_primary, asked_v, drop_fraction, minus, plus)  Ns meeting it, 0: none
Winding
  pitch_and_height(wire, strands) / wire_geometry(wire, strands) / stack_wires(geometries)   (scalar wire)
  mean_turn_length_m(former_kind, centre_m, ...)                     MLT at a layer's centre line
  layer_centre_m(start_m, index, layer_height_m, layer_tape_m)       build to a layer's centre
  layer_capacity(former_kind, pitch_m, usable_m, id_m, centre_m, one_turn_per_layer)  (turns, room)
  wind_section(former, turns, pitch, lh, start, margin, layer_tape, foil, limit) -> SectionWinding
  dc_resistance_ohm(copper_area_m2, length_m, temp_c, conductor)    conductor: one name or a name per row
  skin_depth_m(freq_hz, temp_c, conductor)
  current_harmonics(waveform) -> Harmonics
  layer_porosity(wire, turns_in_layer, usable_m) / layer_delta(wire, skin_depth_m, porosity)   Dowell's eta, Delta
  layer_ac_factor(wire, turns_in_layer, usable_m, skin_depth_m, f_inner, f_outer, harmonics)  one wire or one per row
  section_ac_factor(wire, layers, turns_per_layer, usable_m, skin_depth_m, f_start, f_end, harmonics)
  copper_loss_w(dcr_ohm, fr, i_ac_rms_a, i_dc_a)
Loss and temperature
  core_loss_w_m3(waveform, freq_hz, b_t, duty, k, alpha, beta)       k, alpha, beta scalar
  core_loss_grouped_w_m3(waveform, freq_hz, b_t, duty, group, k, alpha, beta)  per-group coefficients
  temperature_rise_k(total_loss_w, surface_m2, cooling, ambient_c)   McLyman x the cooling table
  hot_spot_c(ambient_c, rise_k, hotspot_margin_k)
  thermal_state(total_loss_w, surface_m2, cooling, ambient_c, hotspot_margin_k) -> ThermalState (scalar)
  first_guess_thermal(ambient_c, hotspot_margin_k) -> ThermalState
  current_density_a_m2(table, cooling)                               the shop's density for a cooling
"""

from __future__ import annotations

import math
from collections.abc import Mapping, Sequence
from dataclasses import dataclass
from typing import TYPE_CHECKING, Any, TypeAlias

import numpy as np
import numpy.typing as npt

from ..physics import coreloss, dowell, faraday, geometry, thermal
from ..physics import gap as gapmod
from ..physics import wire as wiremod
from ..physics.layers import layer_fr
from ..physics.permeability import bias_fit_fraction
from .limits import (
    COOLING_RISE_FACTOR,
    FIRST_GUESS_RISE_K,
    GAP_STEP_M,
    LITZ_POROSITY_FACTOR,
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
from .state import ThermalState

if TYPE_CHECKING:
    from ..catalog.models import Wire

__all__ = [
    "COOLING_RISE_FACTOR", "FIRST_GUESS_RISE_K", "FORMER_CODE", "GAP_STEP_M", "LITZ_POROSITY_FACTOR",
    "LITZ_STRAND_MAX_SKIN_DEPTHS", "MAX_BUNDLES_LITZ", "MAX_HOT_C", "MAX_STRANDS_ROUND", "MAX_STRANDS_TIW",
    "MAX_TURNS", "MU0_H_M", "RIPPLE_SKIN_FRACTION", "SQUARE_HARMONICS", "STRAND_MAX_SKIN_DEPTHS",
    "THERMAL_MAX_PASSES", "THERMAL_SETTLED_K", "WIRE_CHOICE_TEMP_C", "WIRE_CODE",
    "FLUX_LIMIT_DESIGN", "FLUX_LIMIT_SHOP", "FLUX_LIMIT_SPEC", "FormerArrays", "Harmonics", "SectionWinding", "WireGeometry",
    "b_sat_t", "copper_loss_w", "core_loss_grouped_w_m3", "core_loss_w_m3", "current_density_a_m2",
    "current_harmonics", "dc_resistance_ohm", "first_guess_thermal", "flux_limit_source", "flux_limit_t", "gap_for_inductance_m",
    "gapped_turns_and_gap", "hot_spot_c", "layer_ac_factor", "layer_capacity", "layer_centre_m", "layer_delta",
    "layer_porosity", "magnetizing_current_a", "mean_turn_length_m", "output_voltage_ok", "secondary_turns_within",
    "pitch_and_height", "powder_flux_t", "round_gap_down_m",
    "section_ac_factor", "skin_depth_m", "stack_wires", "temperature_rise_k", "thermal_state",
    "turns_for_inductance", "turns_for_peak_flux", "turns_for_voltage", "unipolar_swing_t", "whole_turns",
    "wind_section", "wire_geometry",
]

Arr: TypeAlias = float | npt.NDArray[np.float64]
ArrayLike = npt.ArrayLike
MU0_H_M = wiremod.MU0_H_M
FORMER_CODE = {"rect": 0, "round": 1, "toroid": 2}
WIRE_CODE = {"round": 0, "litz": 1, "tiw": 2, "foil": 3, "strip": 4}
_TOROID = FORMER_CODE["toroid"]


def _f(x: Any) -> npt.NDArray[np.float64]:
    return np.asarray(x, dtype=float)


def _out(x: Any) -> Arr:
    a = np.asarray(x, dtype=float)
    return float(a) if a.ndim == 0 else a


def _scalar(*xs: Any) -> bool:
    return all(np.ndim(x) == 0 for x in xs)


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
                         gap_m: ArrayLike, window_m: ArrayLike) -> Arr:
    """Smallest whole N meeting L with a fixed gap (L grows as N^2; fringing does not depend on N).

    Capped at MAX_TURNS + 1 so the caller's turn check reports an impossible requirement."""
    l1 = _f(gapmod.inductance_gapped_h(1, ae_m2, le_m, mu_r, gap_m, window_m))
    with np.errstate(divide="ignore", invalid="ignore"):
        n = np.sqrt(_f(target_h) / l1)
    ok = n < MAX_TURNS
    return _out(np.where(ok, np.maximum(1.0, np.ceil(np.where(ok, n, 1.0) - 1e-9)), MAX_TURNS + 1.0))


def turns_for_peak_flux(target_h: ArrayLike, i_peak_a: ArrayLike, b_t: ArrayLike, ae_m2: ArrayLike) -> Arr:
    """McLyman's energy method, N = L I_pk / (B Ae), not rounded (``physics.gap.turns_for_peak_b``)."""
    return _out(gapmod.turns_for_peak_b(target_h, i_peak_a, b_t, ae_m2))


def _gap_bisect(target_h: npt.NDArray[np.float64], n: npt.NDArray[np.float64], ae: npt.NDArray[np.float64],
                le: npt.NDArray[np.float64], mu: npt.NDArray[np.float64],
                window: npt.NDArray[np.float64]) -> npt.NDArray[np.float64]:
    """The scalar solver's answer for arrays: L(lg) starts at mu0 N^2 Ae mu/le, rises a little at microscopic
    gaps (McLyman's F has an infinite slope at zero) and then falls; the crossing from above is unique,
    found by 64 bisections on a log scale over [1e-12 x 2G, 2G] (within ~1e-13 of the scalar solver)."""
    k = MU0_H_M * n * n * ae
    out = np.full(n.shape, np.nan)
    reach = target_h <= k * mu / le
    upper = 2.0 * window
    l_up = _f(gapmod.inductance_gapped_h(n, ae, le, mu, upper, window))
    closed = reach & (l_up - target_h > 0.0)
    out[closed] = (k / target_h - le / mu)[closed]
    b = np.flatnonzero(reach & ~closed)
    if b.size:
        lo = np.log(1e-12 * upper[b])
        hi = np.log(upper[b])
        for _ in range(64):
            mid = 0.5 * (lo + hi)
            above = _f(gapmod.inductance_gapped_h(n[b], ae[b], le[b], mu[b], np.exp(mid), window[b])) >= target_h[b]
            lo = np.where(above, mid, lo)
            hi = np.where(above, hi, mid)
        out[b] = np.exp(0.5 * (lo + hi))
    return out


def gap_for_inductance_m(target_h: ArrayLike, turns: ArrayLike, ae_m2: ArrayLike, le_m: ArrayLike,
                         mu_r: ArrayLike, window_m: ArrayLike) -> Arr:
    """The smallest air gap giving L with N turns, McLyman's fringing included [m]; NaN where even no gap
    reaches L. Scalars: ``physics.gap.gap_for_inductance_m`` (scan, then bisection to 1e-13); arrays: a
    vectorised bisection of the same ``inductance_gapped_h``."""
    if _scalar(target_h, turns, ae_m2, le_m, mu_r, window_m):
        ts, ns, aes, les, mus, ws = (float(np.asarray(x)) for x in (target_h, turns, ae_m2, le_m, mu_r, window_m))
        g = gapmod.gap_for_inductance_m(ts, ns, aes, les, mus, ws)
        return math.nan if g is None else float(g)
    t, n, ae, le, mu, w = np.broadcast_arrays(_f(target_h), _f(turns), _f(ae_m2), _f(le_m), _f(mu_r), _f(window_m))
    return _out(_gap_bisect(t, n, ae, le, mu, w))


def round_gap_down_m(gap_m: ArrayLike) -> Arr:
    """A gap rounded down to the shop's step (rounding down raises L, so the built part meets it)."""
    return _out(np.floor(_f(gap_m) / GAP_STEP_M + 1e-6) * GAP_STEP_M)


def gapped_turns_and_gap(target_h: ArrayLike, i_peak_a: ArrayLike, b_limit_t: ArrayLike, ae_m2: ArrayLike,
                         le_m: ArrayLike, mu_r: ArrayLike, window_m: ArrayLike,
                         fixed_turns: int | None = None) -> tuple[Arr, Arr]:
    """Turns and gap of a gapped core by McLyman's energy method: (N, gap [m]).

    N = ceil(L I_pk / (B_limit Ae)) (or ``fixed_turns``); the gap for L with fringing; where no gap reaches
    L, more turns and no gap; the gap rounded down to the shop's step; then, while the rounded gap pushes
    B_pk = L I_pk / (N Ae) past the limit, one more turn and the gap solved again (at most 20 times; never
    with fixed turns). The caller checks N against MAX_TURNS first."""
    scalar = _scalar(target_h, i_peak_a, b_limit_t, ae_m2, le_m, mu_r, window_m)
    t, ipk, lim, ae, le, mu, w = np.broadcast_arrays(_f(target_h), _f(i_peak_a), _f(b_limit_t), _f(ae_m2),
                                                     _f(le_m), _f(mu_r), _f(window_m))
    t, ipk, lim, ae, le, mu, w = (np.atleast_1d(x).astype(float) for x in (t, ipk, lim, ae, le, mu, w))

    def gap(n: npt.NDArray[np.float64], sel: npt.NDArray[np.intp]) -> npt.NDArray[np.float64]:
        if scalar:
            return np.array([gap_for_inductance_m(float(t[0]), float(n[0]), float(ae[0]), float(le[0]),
                                                  float(mu[0]), float(w[0]))])
        return _gap_bisect(t[sel], n, ae[sel], le[sel], mu[sel], w[sel])

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
            n[idx] = turns_for_inductance(t[idx], ae[idx], le[idx], mu[idx], 0.0, w[idx])
            lg[idx] = np.nan_to_num(gap(n[idx], idx), nan=0.0)
    lg = _f(round_gap_down_m(lg))
    if not fixed_turns:
        for _ in range(20):
            l_try = _f(gapmod.inductance_gapped_h(n, ae, le, mu, lg, w))
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
    """Flux density in a powder core at a current, B = mu0 mu_i f(H) H with H = N I / le (the roll-off fit
    ``physics.permeability.bias_fit_fraction``)."""
    h = _f(turns) * _f(current_a) / _f(le_m)
    return _out(MU0_H_M * _f(mu_initial) * _f(bias_fit_fraction(h, a, b, c)) * h)


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


# ================================================================================================ winding

@dataclass(frozen=True, slots=True)
class WireGeometry:
    """What the build and the AC factor read of a wire with its strands in hand (floats, or arrays for rows)."""
    kind: Any                     # WIRE_CODE (int, or an int array)
    strand_diameter_m: Arr        # bare strand (round, litz, tiw)
    strand_overall_m: Arr         # insulated strand (litz porosity)
    thickness_m: Arr              # foil, strip
    width_m: Arr
    strands_in_hand: Arr
    sub_layers: Arr               # Litz: strand layers per bundle layer, round(sqrt(strands)); else 1
    copper_area_m2: Arr           # all strands in hand
    pitch_m: Arr                  # along the layer per turn
    layer_height_m: Arr
    one_turn_per_layer: Any       # bool (foil), or a bool array


def pitch_and_height(wire: Wire, strands: int) -> tuple[float, float, bool]:
    """(pitch along the layer, layer height, one turn per layer) of a wire with ``strands`` in hand side by
    side: foil is one full-width turn per layer; strip and round wire lie side by side."""
    if wire.kind == "foil":
        return wire.width_m, wire.thickness_m, True
    if wire.kind == "strip":
        return wire.overall_width_m * strands, wire.overall_thickness_m, False
    return wire.overall_diameter_m * strands, wire.overall_diameter_m, False


def wire_geometry(wire: Wire, strands: int) -> WireGeometry:
    """A catalogue wire with its strands in hand as the kernel reads it (scalar)."""
    pitch, height, foil = pitch_and_height(wire, strands)
    k = max(1, int(round(math.sqrt(wire.strands)))) if wire.kind == "litz" else 1
    return WireGeometry(kind=WIRE_CODE.get(wire.kind, 0), strand_diameter_m=wire.strand_diameter_m,
                        strand_overall_m=wire.strand_overall_m or wire.overall_diameter_m,
                        thickness_m=wire.thickness_m, width_m=wire.width_m, strands_in_hand=float(strands),
                        sub_layers=float(k), copper_area_m2=wire.copper_area_m2 * strands, pitch_m=pitch,
                        layer_height_m=height, one_turn_per_layer=foil)


def stack_wires(geometries: Sequence[WireGeometry]) -> WireGeometry:
    """Rows of wire geometries as one record of arrays (for the search's option tables)."""
    def col(name: str, dtype: Any = float) -> Any:
        return np.array([getattr(g, name) for g in geometries], dtype=dtype)
    return WireGeometry(kind=col("kind", np.int8), strand_diameter_m=col("strand_diameter_m"),
                        strand_overall_m=col("strand_overall_m"), thickness_m=col("thickness_m"),
                        width_m=col("width_m"), strands_in_hand=col("strands_in_hand"), sub_layers=col("sub_layers"),
                        copper_area_m2=col("copper_area_m2"), pitch_m=col("pitch_m"),
                        layer_height_m=col("layer_height_m"), one_turn_per_layer=col("one_turn_per_layer", bool))


def mean_turn_length_m(former_kind: Any, centre_m: ArrayLike, *, tube_width_m: ArrayLike = 0.0,
                       tube_depth_m: ArrayLike = 0.0, od_m: ArrayLike = 0.0, id_m: ArrayLike = 0.0,
                       core_height_m: ArrayLike = 0.0) -> Arr:
    """Mean length of a turn whose centre line is ``centre_m`` out from the former: an offset rectangle
    (rect tube), a circle (round tube) or the toroid's section perimeter grown by the build
    (``physics.geometry``). ``former_kind``: 'rect' | 'round' | 'toroid' or FORMER_CODE values per row."""
    if isinstance(former_kind, str):
        if former_kind == "rect":
            return _out(geometry.mlt_rect_m(tube_width_m, tube_depth_m, centre_m))
        if former_kind == "round":
            return _out(geometry.mlt_round_m(tube_width_m, centre_m))
        return _out(geometry.toroid_turn_length_m(od_m, id_m, core_height_m, centre_m))
    code = np.asarray(former_kind)
    rect = geometry.mlt_rect_m(tube_width_m, tube_depth_m, centre_m)
    rnd = geometry.mlt_round_m(tube_width_m, centre_m)
    with np.errstate(invalid="ignore", divide="ignore"):
        tor = geometry.toroid_turn_length_m(od_m, id_m, core_height_m, centre_m)
    return _out(np.where(code == 0, rect, np.where(code == 1, rnd, tor)))


def layer_centre_m(start_m: Arr, index: Arr, layer_height_m: Arr, layer_tape_m: Arr) -> Arr:
    """Build from the former to the centre line of layer ``index`` (0-based) of a section starting at
    ``start_m``: each layer its height, the layer tape between layers. (Plain arithmetic: floats stay floats,
    arrays broadcast.)"""
    return start_m + index * (layer_height_m + layer_tape_m) + layer_height_m / 2.0


def layer_capacity(former_kind: Any, pitch_m: ArrayLike, usable_m: ArrayLike, id_m: ArrayLike, centre_m: ArrayLike,
                   one_turn_per_layer: Any = False) -> tuple[Arr, Arr]:
    """(turns one layer holds, room along it [m]). Bobbin: floor(usable breadth / pitch) (1e-9 slack),
    foil one turn if it fits the breadth; room = the usable breadth. Toroid: the wire's centre line runs on
    the layer's inner face, so the layer holds floor(pi (ID - 2 centre) / pitch) and room is that
    circumference. ``former_kind``: a name (one former, floats) or FORMER_CODE per row."""
    if isinstance(former_kind, str) and _scalar(pitch_m, usable_m, id_m, centre_m, one_turn_per_layer):
        # one former, one layer (the engine's layer-by-layer build): the same rule without array overhead
        p1 = float(np.asarray(pitch_m))
        if former_kind == "toroid":
            c1 = float(geometry.toroid_inner_circumference_m(id_m, centre_m))
            return float(max(math.floor(c1 / p1 + 1e-9), 0)), c1
        u1 = float(np.asarray(usable_m))
        if one_turn_per_layer:
            return (1.0 if p1 <= u1 + 1e-12 else 0.0), u1
        return (float(math.floor(u1 / p1 + 1e-9)) if u1 > 0 else 0.0), u1
    pitch, usable = _f(pitch_m), _f(usable_m)
    code = FORMER_CODE[former_kind] if isinstance(former_kind, str) else np.asarray(former_kind)
    with np.errstate(divide="ignore", invalid="ignore"):
        flat = np.where(usable > 0, np.floor(usable / pitch + 1e-9), 0.0)
        flat = np.where(one_turn_per_layer, np.where(pitch <= usable + 1e-12, 1.0, 0.0), flat)
        circ = _f(geometry.toroid_inner_circumference_m(id_m, centre_m))
        ring = np.maximum(np.floor(circ / pitch + 1e-9), 0.0)
    tor = np.asarray(code) == _TOROID
    return _out(np.where(tor, ring, flat)), _out(np.where(tor, circ, usable))


@dataclass(frozen=True, slots=True)
class FormerArrays:
    """Formers as rows: kind (FORMER_CODE int array) and their dimensions [m]."""
    kind: npt.NDArray[np.int8]
    tube_width_m: npt.NDArray[np.float64]
    tube_depth_m: npt.NDArray[np.float64]
    breadth_m: npt.NDArray[np.float64]
    od_m: npt.NDArray[np.float64]
    id_m: npt.NDArray[np.float64]
    core_height_m: npt.NDArray[np.float64]

    def take(self, idx: Any) -> FormerArrays:
        return FormerArrays(self.kind[idx], self.tube_width_m[idx], self.tube_depth_m[idx], self.breadth_m[idx],
                            self.od_m[idx], self.id_m[idx], self.core_height_m[idx])


@dataclass(frozen=True, slots=True)
class SectionWinding:
    """Sections laid as rows (``wind_section``): ok, first-layer capacity, layers, turns in the last layer,
    build after the last layer, copper length without leads, usable breadth (toroid: first circumference)."""
    ok: npt.NDArray[np.bool_]
    turns_per_layer: npt.NDArray[np.float64]
    layers: npt.NDArray[np.float64]
    last_layer_turns: npt.NDArray[np.float64]
    end_build_m: npt.NDArray[np.float64]
    copper_length_m: npt.NDArray[np.float64]
    usable_breadth_m: npt.NDArray[np.float64]


_TOROID_BINS = (4, 16, 64, 256, 1024)


def wind_section(former: FormerArrays, turns: ArrayLike, pitch_m: ArrayLike, layer_height_m: ArrayLike,
                 start_m: ArrayLike, margin_m: ArrayLike, layer_tape_m: ArrayLike, one_turn_per_layer: ArrayLike,
                 limit_m: ArrayLike | None = None) -> SectionWinding:
    """Lay one section per row from ``start_m`` outwards (``layer_tape_m`` already x the tape factor).

    Bobbin: every full layer holds the same ``layer_capacity`` and the MLT is affine in the build, so the
    layers' copper is their count times the MLT at their mean centre (closed form). Toroid: each layer's
    capacity shrinks with the hole; layers are laid as a rows x layers matrix (cumulative capacity against
    the turns), at most as many as fit below ``limit_m`` (rows needing more are not ok), and a layer that
    holds no turn ends the section (not ok). The engine's ``build.wind_section`` lays the same layers one
    by one with the same ``layer_centre_m``, ``layer_capacity`` and ``mean_turn_length_m``."""
    t_all = np.atleast_1d(_f(turns))
    n = t_all.shape[0]

    def row(x: ArrayLike) -> npt.NDArray[np.float64]:
        return np.broadcast_to(_f(x), (n,)).astype(float)
    pitch, lh, start, margin, lt = row(pitch_m), row(layer_height_m), row(start_m), row(margin_m), row(layer_tape_m)
    foil = np.broadcast_to(np.asarray(one_turn_per_layer, dtype=bool), (n,))
    out = {k: np.zeros(n) for k in ("cap", "layers", "last", "end", "length", "usable")}
    ok_all = np.zeros(n, dtype=bool)
    kind = former.kind
    bob = np.flatnonzero(kind != _TOROID)
    if bob.size:
        usable = former.breadth_m[bob] - 2.0 * margin[bob]
        cap, _room = layer_capacity(kind[bob], pitch[bob], usable, 0.0, 0.0, foil[bob])
        cap = _f(cap)
        t = t_all[bob]
        ok = (cap >= 1) & (t > 0)
        capc = np.maximum(cap, 1.0)
        layers = np.ceil(t / capc)
        last = t - (layers - 1.0) * capc
        s0, h, tape = start[bob], lh[bob], lt[bob]
        c_last = _f(layer_centre_m(s0, layers - 1.0, h, tape))
        c_mean = s0 + h / 2.0 + (h + tape) * (layers - 2.0) / 2.0

        def mlt(c: npt.NDArray[np.float64]) -> npt.NDArray[np.float64]:
            return _f(mean_turn_length_m(kind[bob], c, tube_width_m=former.tube_width_m[bob],
                                         tube_depth_m=former.tube_depth_m[bob]))

        out["length"][bob] = capc * (layers - 1.0) * mlt(c_mean) + last * mlt(c_last)
        out["end"][bob] = s0 + layers * h + (layers - 1.0) * tape
        out["cap"][bob], out["layers"][bob], out["last"][bob] = cap, layers, last
        out["usable"][bob], ok_all[bob] = usable, ok
    tor = np.flatnonzero(kind == _TOROID)
    if tor.size:
        limit = None if limit_m is None else row(limit_m)
        _wind_toroid(former, tor, t_all, pitch, lh, start, lt, foil, limit, out, ok_all)
    return SectionWinding(ok=ok_all, turns_per_layer=out["cap"], layers=out["layers"], last_layer_turns=out["last"],
                          end_build_m=out["end"], copper_length_m=out["length"], usable_breadth_m=out["usable"])


def _wind_toroid(fm: FormerArrays, tor: npt.NDArray[np.intp], turns: npt.NDArray[np.float64],
                 pitch: npt.NDArray[np.float64], lh: npt.NDArray[np.float64], start: npt.NDArray[np.float64],
                 layer_tape: npt.NDArray[np.float64], foil: npt.NDArray[np.bool_],
                 limit: npt.NDArray[np.float64] | None, out: dict[str, npt.NDArray[np.float64]],
                 ok_out: npt.NDArray[np.bool_]) -> None:
    step = lh[tor] + layer_tape[tor]
    if limit is None:
        lmax = np.full(tor.size, float(_TOROID_BINS[-1]))
    else:
        lmax = np.floor((limit[tor] - start[tor] + layer_tape[tor]) / step + 1e-9)
        # no more layers are needed than the turns over the smallest capacity an allowed layer has
        top = _f(layer_centre_m(start[tor], np.maximum(lmax, 1.0) - 1.0, lh[tor], layer_tape[tor]))
        cap_min = np.floor(_f(geometry.toroid_inner_circumference_m(fm.id_m[tor], top)) / pitch[tor] + 1e-9)
        need = np.where(cap_min >= 1, np.ceil(turns[tor] / np.maximum(cap_min, 1.0)), lmax)
        lmax = np.clip(np.minimum(lmax, need), 1.0, _TOROID_BINS[-1])
    lo = 0
    for hi in _TOROID_BINS:
        sel = tor[(lmax > lo) & (lmax <= hi)]
        lo = hi
        if not sel.size:
            continue
        lm = lmax[np.searchsorted(tor, sel)]
        m = int(lm.max())
        j = np.arange(m, dtype=float)[None, :]
        allowed = j < lm[:, None]
        centre = _f(layer_centre_m(start[sel][:, None], j, lh[sel][:, None], layer_tape[sel][:, None]))
        idm = fm.id_m[sel][:, None]
        cap, circ = layer_capacity("toroid", pitch[sel][:, None], 0.0, idm, centre)
        cap = np.where(allowed, _f(cap), 0.0)
        circ = _f(circ)
        dead = np.cumsum(cap < 1, axis=1) > 0     # a layer holding no turn ends the section
        cap = np.where(dead, 0.0, cap)
        cum = np.cumsum(cap, axis=1)
        t = turns[sel]
        reach = cum >= t[:, None]
        ok = reach[:, -1] & (t > 0) & ~foil[sel]
        layers = np.where(ok, np.argmax(reach, axis=1) + 1.0, 1.0)
        li = (layers - 1).astype(np.int64)
        rows = np.arange(sel.size)
        before = np.where(li > 0, cum[rows, np.maximum(li - 1, 0)], 0.0)
        last = t - before
        nturn = np.where(j < (layers - 1.0)[:, None], cap, 0.0)
        nturn[rows, li] = last
        tl = _f(mean_turn_length_m("toroid", centre, od_m=fm.od_m[sel][:, None], id_m=idm,
                                   core_height_m=fm.core_height_m[sel][:, None]))
        out["length"][sel] = np.sum(nturn * tl, axis=1)
        out["end"][sel] = start[sel] + layers * lh[sel] + (layers - 1.0) * layer_tape[sel]
        out["layers"][sel], out["last"][sel] = layers, last
        out["cap"][sel], out["usable"][sel], ok_out[sel] = cap[:, 0], circ[:, 0], ok


def dc_resistance_ohm(copper_area_m2: ArrayLike, length_m: ArrayLike, temp_c: ArrayLike,
                      conductor: str | Sequence[str] | npt.NDArray[np.str_] = "copper") -> Arr:
    """DC resistance R = rho(T) l / A of a winding's copper at a temperature (IEC 60028 / IEC 60889).

    ``conductor``: one name for every row, or a name per row ('copper', 'aluminium')."""
    if isinstance(conductor, str):
        return _out(_f(wiremod.resistance_per_m_ohm(copper_area_m2, temp_c, conductor)) * _f(length_m))
    names = np.asarray(conductor)
    out = np.zeros(np.broadcast_shapes(names.shape, np.shape(copper_area_m2), np.shape(length_m), np.shape(temp_c)))
    for name in np.unique(names):
        sel = np.broadcast_to(names == name, out.shape)
        r = _f(wiremod.resistance_per_m_ohm(copper_area_m2, temp_c, str(name))) * _f(length_m)
        out = np.where(sel, np.broadcast_to(r, out.shape), out)
    return out


def skin_depth_m(freq_hz: ArrayLike, temp_c: ArrayLike, conductor: str = "copper") -> Arr:
    """Skin depth in the conductor at its temperature (``physics.wire.skin_depth_m``); infinite at DC."""
    return _out(wiremod.skin_depth_m(freq_hz, wiremod.resistivity_ohm_m(temp_c, conductor)))


@dataclass(frozen=True, slots=True)
class Harmonics:
    """Harmonic orders of a current and their share of its loss (weights sum to 1)."""
    orders: npt.NDArray[np.float64]
    weights: npt.NDArray[np.float64]


def current_harmonics(waveform: str) -> Harmonics:
    """A square-wave current's odd harmonics weighted 1/n^2 (its power spectrum, SQUARE_HARMONICS); any other
    waveform: the fundamental alone."""
    orders = np.array(SQUARE_HARMONICS if waveform == "square" else (1,), dtype=float)
    w = 1.0 / orders ** 2
    return Harmonics(orders, w / w.sum())


def _layer_porosity(wire: WireGeometry, turns_in_layer: Any, usable_m: Any) -> npt.NDArray[np.float64]:
    """Copper fraction across a layer, Dowell's eta: round/tiw turns x strands x d over the usable breadth;
    Litz the strand porosity x LITZ_POROSITY_FACTOR; foil its width over the breadth; strip like round."""
    usable = _f(usable_m)
    room = np.maximum(usable, 1e-9)

    def litz() -> Any:
        return _f(dowell.porosity(wire.strand_diameter_m, wire.strand_overall_m)) * LITZ_POROSITY_FACTOR

    def foil() -> Any:
        return np.minimum(1.0, _f(wire.width_m) / np.maximum(usable, _f(wire.width_m)))

    def side_by_side(size: Arr) -> Any:
        return np.minimum(1.0, _f(turns_in_layer) * _f(wire.strands_in_hand) * _f(size) / room)

    if np.ndim(wire.kind) == 0:         # one wire (the engine): only its own rule
        kind = int(wire.kind)
        if kind == WIRE_CODE["litz"]:
            return _f(litz())
        if kind == WIRE_CODE["foil"]:
            return _f(foil())
        return _f(side_by_side(wire.width_m if kind == WIRE_CODE["strip"] else wire.strand_diameter_m))
    kinds = np.asarray(wire.kind)
    with np.errstate(divide="ignore", invalid="ignore"):
        lz = np.where(kinds == 1, litz(), 0.0)
        fo = foil()
    return _f(np.where(kinds == 1, lz, np.where(kinds == 3, fo, np.where(kinds == 4, side_by_side(wire.width_m),
                                                                          side_by_side(wire.strand_diameter_m)))))


def _layer_delta(wire: WireGeometry, skin: Any, eta: Any) -> npt.NDArray[np.float64]:
    """Dowell's Delta: the equivalent foil of a round strand (round, tiw, Litz), t/delta for foil and strip."""
    if np.ndim(wire.kind) == 0:
        if int(wire.kind) in (WIRE_CODE["foil"], WIRE_CODE["strip"]):
            return _f(dowell.foil_delta(wire.thickness_m, skin, eta))
        return _f(dowell.round_wire_delta(wire.strand_diameter_m, skin, eta))
    kind = np.asarray(wire.kind)
    flat = (kind == 3) | (kind == 4)
    with np.errstate(divide="ignore", invalid="ignore"):
        rnd = _f(dowell.round_wire_delta(wire.strand_diameter_m, skin, eta))
        foil = _f(dowell.foil_delta(wire.thickness_m, skin, eta))
    return np.where(flat, foil, rnd)


def layer_porosity(wire: WireGeometry, turns_in_layer: ArrayLike, usable_m: ArrayLike) -> npt.NDArray[np.float64]:
    """Dowell's porosity eta of a layer of this wire (see ``_layer_porosity``); one wire or a wire per row."""
    return _layer_porosity(wire, turns_in_layer, usable_m)


def layer_delta(wire: WireGeometry, skin_depth: ArrayLike, porosity: ArrayLike) -> npt.NDArray[np.float64]:
    """Dowell's Delta of a layer of this wire at a skin depth and porosity (see ``_layer_delta``)."""
    return _layer_delta(wire, skin_depth, porosity)


def layer_ac_factor(wire: WireGeometry, turns_in_layer: ArrayLike, usable_m: ArrayLike, skin_depth: ArrayLike,
                    f_inner: ArrayLike, f_outer: ArrayLike, harmonics: Harmonics) -> Arr:
    """Rac/Rdc of one layer between the enclosed ampere-turns f_inner and f_outer (Dowell's layer form,
    ``physics.layers.layer_fr``), weighted over the current's harmonics (skin depth / sqrt(n) each).
    ``wire``: one wire (floats) for every row, or a wire per row (``stack_wires``).

    A layer of Litz bundles is k = round(sqrt(strands)) layers of strands (common practice approximation):
    the MMF steps evenly across them and the factor is their mean."""
    eta = _layer_porosity(wire, turns_in_layer, usable_m)[..., None]
    skin = _f(skin_depth)[..., None] / np.sqrt(harmonics.orders)          # rows x harmonics
    # a wire per row: its fields get the harmonics axis too
    wide = wire if np.ndim(wire.kind) == 0 else WireGeometry(
        **{f: np.asarray(getattr(wire, f))[..., None] for f in WireGeometry.__dataclass_fields__})
    d = _layer_delta(wide, skin, eta)                                      # rows x harmonics
    k = _f(wire.sub_layers)
    if k.size and float(k.max()) == 1.0:                                   # no Litz: one layer of conductors
        fr1 = _f(layer_fr(d, _f(f_inner)[..., None], _f(f_outer)[..., None]))
        return _out(fr1 @ harmonics.weights)
    rows = np.broadcast_shapes(np.shape(turns_in_layer), np.shape(usable_m), np.shape(skin_depth),
                               np.shape(f_inner), np.shape(f_outer), np.shape(wire.kind))
    k = np.broadcast_to(k, rows)
    kmax = int(k.max()) if k.size else 1
    j = np.arange(kmax, dtype=float)
    kk = k[..., None]
    f1 = np.broadcast_to(_f(f_inner), rows)[..., None]
    f2 = np.broadcast_to(_f(f_outer), rows)[..., None]
    span = f2 - f1
    one = kk == 1.0
    a = np.where(one, f1, f1 + span * j / kk)                              # rows x sub-layers
    b = np.where(one, f2, f1 + span * (j + 1.0) / kk)
    fr = _f(layer_fr(d[..., None], a[..., None, :], b[..., None, :]))     # rows x harmonics x sub-layers
    used = (j < kk)[..., None, :]
    mean = np.where(used, fr, 0.0).sum(axis=-1) / kk
    return _out(mean @ harmonics.weights)


def section_ac_factor(wire: WireGeometry, layers: ArrayLike, turns_per_layer: ArrayLike, usable_m: ArrayLike,
                      skin_depth: ArrayLike, f_start: ArrayLike, f_end: ArrayLike, harmonics: Harmonics) -> Arr:
    """Mean AC factor of a section whose layers step the MMF evenly from f_start to f_end, in closed form.

    ``layer_fr`` is affine in a = (F1^2 + F2^2)/(F2 - F1)^2 and b = 4 F1 F2/(F2 - F1)^2, and a = 1 + b/2 for
    every layer, so the mean over L layers is layer_fr at faces (f*, f* + 1) with 4 f*(f* + 1) = mean b
    (Litz: L x k strand layers). The porosity is the full layer's (``turns_per_layer``), the mean unweighted
    by layer length: the search's screening form; the engine takes each layer with ``layer_ac_factor``."""
    kind = np.asarray(wire.kind)
    L = np.maximum(np.where(kind == 1, _f(layers) * _f(wire.sub_layers), _f(layers)), 1.0)
    span = _f(f_end) - _f(f_start)
    ok = np.abs(span) > 1e-12
    step = np.where(ok, span, 1.0) / L
    u0 = _f(f_start) / step
    mean_u = u0 + (L - 1.0) / 2.0
    mean_u2 = u0 * u0 + u0 * (L - 1.0) + (L - 1.0) * (2.0 * L - 1.0) / 6.0
    fstar = (-1.0 + np.sqrt(np.maximum(1.0 + 4.0 * (mean_u2 + mean_u), 0.0))) / 2.0
    eta = _layer_porosity(wire, np.maximum(_f(turns_per_layer), 1.0), np.maximum(_f(usable_m), 1e-9))
    fr = np.zeros(np.broadcast_shapes(fstar.shape, eta.shape))
    for n, w in zip(harmonics.orders, harmonics.weights):
        d = _layer_delta(wire, _f(skin_depth) / math.sqrt(float(n)), eta)
        fr = fr + w * _f(layer_fr(d, fstar, fstar + 1.0))
    return _out(np.where(ok, fr, 1.0))


def copper_loss_w(dcr_ohm: ArrayLike, fr: ArrayLike, i_ac_rms_a: ArrayLike, i_dc_a: ArrayLike = 0.0) -> Arr:
    """Copper loss I_dc^2 R + I_ac^2 R Fr: the DC part sees the DC resistance, the AC part the AC factor."""
    r = _f(dcr_ohm)
    return _out(_f(i_dc_a) ** 2 * r + _f(i_ac_rms_a) ** 2 * r * _f(fr))


# ================================================================================================ output voltage

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


def temperature_rise_k(total_loss_w: ArrayLike, surface_m2: ArrayLike, cooling: str, ambient_c: ArrayLike) -> Arr:
    """Temperature rise [K]: McLyman's natural-convection fit (``physics.thermal.temperature_rise_k``) times
    the cooling's factor (COOLING_RISE_FACTOR), held below MAX_HOT_C."""
    rise = _f(thermal.temperature_rise_k(total_loss_w, surface_m2))
    factor = COOLING_RISE_FACTOR.get(cooling, 1.0)
    if factor != 1.0:
        rise = rise * factor
    return _out(np.minimum(rise, MAX_HOT_C - _f(ambient_c)))


def hot_spot_c(ambient_c: ArrayLike, rise_k: ArrayLike, hotspot_margin_k: ArrayLike) -> Arr:
    """Hot spot = ambient + rise (the mean winding) + the shop's hot-spot margin."""
    return _out(_f(ambient_c) + _f(rise_k) + _f(hotspot_margin_k))


def thermal_state(total_loss_w: float, surface_m2: float, cooling: str, ambient_c: float,
                  hotspot_margin_k: float) -> ThermalState:
    """The winding and hot-spot temperatures at a total loss (scalar; arrays: ``temperature_rise_k`` and
    ``hot_spot_c``)."""
    rise = float(temperature_rise_k(total_loss_w, surface_m2, cooling, ambient_c))
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
