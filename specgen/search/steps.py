"""The design kernel's steps as the search's rows read them: every formula is the kernel's
(``specgen.design.kernel``); this module only hands it the rows' arrays and keeps the results typed.

One step is not in the kernel yet: a section's AC factor as the engine takes it (each layer's own factor,
weighted by its copper length) for arrays of sections, ``section_ac_factor_rows``. It composes the kernel's
``layer_ac_factor``, ``layer_centre_m``, ``layer_capacity`` and ``mean_turn_length_m``; it belongs in the
kernel beside ``section_ac_factor`` (the unweighted screening form), where the engine could call it too.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

import numpy as np

from ..catalog.models import Material
from ..design import kernel as K
from ..design.state import CoolingModel
from .records import FloatArray, FormerKind, IntArray, OptionRows, SectionRows

Harmonics = K.Harmonics
FormerRows = K.FormerArrays


def _f(x: Any) -> FloatArray:
    return np.asarray(x, dtype=np.float64)


def wind_section_rows(fm: FormerRows, turns: FloatArray, opt: OptionRows, start: FloatArray, margin: FloatArray,
                      layer_tape: FloatArray, limit: FloatArray | None = None) -> SectionRows:
    """One section per row, laid by the kernel's ``wind_section`` (the engine's layers, in closed form)."""
    g = opt.geometry
    sw = K.wind_section(fm, turns, g.pitch_m, g.layer_height_m, start, margin, layer_tape, g.one_turn_per_layer,
                        limit)
    return SectionRows(ok=sw.ok, turns_per_layer=sw.turns_per_layer, layers=sw.layers, last_turns=sw.last_layer_turns,
                       end_build_m=sw.end_build_m, length_m=sw.copper_length_m, usable_m=sw.usable_breadth_m,
                       start_m=np.array(np.broadcast_to(_f(start), sw.ok.shape), dtype=np.float64))


def resistance_ohm(opt: OptionRows, length_m: FloatArray, temp_c: FloatArray | float,
                   rows: IntArray | None = None) -> FloatArray:
    """DCR of the rows' wires [ohm] (``kernel.dc_resistance_ohm``, copper or aluminium per row); ``rows``
    picks some of the option rows (``length_m`` and ``temp_c`` are then for those)."""
    area, copper = _f(opt.geometry.copper_area_m2), opt.copper
    if rows is not None:
        area, copper = area[rows], copper[rows]
    r = _f(K.dc_resistance_ohm(area, length_m, temp_c, "copper"))
    if not copper.all():
        al = ~copper
        t = np.broadcast_to(_f(temp_c), r.shape)
        r = r.copy()
        r[al] = _f(K.dc_resistance_ohm(area[al], length_m[al], t[al], "aluminium"))
    return r


def skin_depth_m(freq_hz: float, temp_c: FloatArray | float) -> FloatArray:
    """Skin depth in copper at temp_c [m] (``kernel.skin_depth_m``)."""
    return _f(K.skin_depth_m(freq_hz, temp_c))


# ------------------------------------------------------------------------------------------------ AC factor

def _wire_rows(g: K.WireGeometry, idx: Any = None, column: bool = False) -> K.WireGeometry:
    """The wire geometry of some rows (``idx``), optionally as a column (rows x 1) to broadcast against
    rows x layers."""
    def pick(x: Any) -> Any:
        a = np.asarray(x) if idx is None else np.asarray(x)[idx]
        return a[:, None] if column else a
    return K.WireGeometry(**{f: pick(getattr(g, f)) for f in g.__dataclass_fields__})


def layer_ac_factor_rows(g: K.WireGeometry, turns_in_layer: Any, usable_m: Any, skin_depth: Any, f_inner: Any,
                         f_outer: Any, harm: Harmonics) -> FloatArray:
    """``kernel.layer_ac_factor`` for rows that each have their own wire, as a float array."""
    return _f(K.layer_ac_factor(g, turns_in_layer, usable_m, skin_depth, f_inner, f_outer, harm))


def _bobbin_fr(g: K.WireGeometry, fm: FormerRows, sec: SectionRows, lh: FloatArray, lt: FloatArray,
               delta: FloatArray, f_start: FloatArray, current: FloatArray, harm: Harmonics) -> FloatArray:
    """Bobbin sections in closed form. Every full layer holds ``cap`` turns at the same porosity, and a layer's
    factor depends on its faces only through u = F1 / (F2 - F1): Dowell's layer form is affine in
    b = 4 u (u + 1) (and in the mean of b over a Litz bundle's strand layers), so the kernel's layer factor is
    alpha + beta (u^2 + u), read off the kernel at u = 0 and u = 1. The layers' MLT is affine in the layer
    index (the kernel's MLT at the first two layer centres), so the length-weighted sum over the full layers
    is a sum of powers of the index. The last layer (its own turns and porosity) is one more kernel call."""
    cap, layers, last = sec.turns_per_layer, sec.layers, sec.last_turns
    usable = sec.usable_m
    zero, one = np.zeros(cap.shape), np.ones(cap.shape)
    alpha = layer_ac_factor_rows(g, cap, usable, delta, zero, one, harm)
    beta = (layer_ac_factor_rows(g, cap, usable, delta, one, 2.0 * one, harm) - alpha) / 2.0
    step = cap * current
    n = layers - 1.0                       # full layers before the last
    with np.errstate(divide="ignore", invalid="ignore"):
        u0 = np.where(np.abs(step) > 0, f_start / step, 0.0)

    def mlt(index: float | FloatArray) -> FloatArray:
        c = K.layer_centre_m(sec.start_m, index, lh, lt)
        return _f(K.mean_turn_length_m(fm.kind, c, tube_width_m=fm.tube_width_m, tube_depth_m=fm.tube_depth_m))

    m0 = mlt(0.0)
    m1 = mlt(1.0) - m0
    s0, s1 = n, n * (n - 1.0) / 2.0
    s2, s3 = (n - 1.0) * n * (2.0 * n - 1.0) / 6.0, s1 * s1
    b, c = 2.0 * u0 + 1.0, u0 * (u0 + 1.0)
    weight = m0 * s0 + m1 * s1
    weighted_p = m0 * (s2 + b * s1 + c * s0) + m1 * (s3 + b * s2 + c * s1)
    full_loss = cap * (alpha * weight + beta * weighted_p)
    f1 = f_start + n * step
    fr_last = layer_ac_factor_rows(g, last, usable, delta, f1, f1 + last * current, harm)
    len_last = last * mlt(n)
    return _f((full_loss + fr_last * len_last) / (cap * weight + len_last))


_TOROID_BINS = (4, 16, 64, 256, 1024)


def _toroid_fr(g: K.WireGeometry, fm: FormerRows, sec: SectionRows, turns: FloatArray, lh: FloatArray,
               lt: FloatArray, delta: FloatArray, f_start: FloatArray, current: FloatArray,
               harm: Harmonics) -> FloatArray:
    """Toroid sections layer by layer (each layer's capacity shrinks with the hole): the layers as a rows x
    layers matrix from the kernel's layer centre, capacity and turn length, then the kernel's layer factor
    on every layer, weighted by its copper length. Rows are binned by layer count to bound the matrix."""
    out = np.ones(turns.shape)
    lone = np.flatnonzero(sec.layers == 1.0)
    if lone.size:       # one layer: its own factor (weighted by its own length, as below), no layer matrix
        c0 = _f(K.layer_centre_m(sec.start_m[lone], 0.0, lh[lone], lt[lone]))
        length = turns[lone] * _f(K.mean_turn_length_m("toroid", c0, od_m=fm.od_m[lone], id_m=fm.id_m[lone],
                                                       core_height_m=fm.core_height_m[lone]))
        f1 = f_start[lone] + 0.0 * current[lone]
        fr = layer_ac_factor_rows(_wire_rows(g, lone), turns[lone], sec.usable_m[lone], delta[lone], f1,
                                  f1 + turns[lone] * current[lone], harm)
        out[lone] = fr * length / length
    lo = 1
    for hi in _TOROID_BINS:
        sel = np.flatnonzero((sec.layers > lo) & (sec.layers <= hi))
        lo = hi
        if not sel.size:
            continue
        layers = sec.layers[sel][:, None]
        j = np.arange(int(layers.max()), dtype=float)[None, :]
        centre = _f(K.layer_centre_m(sec.start_m[sel][:, None], j, lh[sel][:, None], lt[sel][:, None]))
        idm = fm.id_m[sel][:, None]
        gs = _wire_rows(g, sel, column=True)
        cap, _room = K.layer_capacity("toroid", gs.pitch_m, 0.0, idm, centre)
        full = np.where(j < layers - 1.0, _f(cap), 0.0)
        nturn = np.where(j == layers - 1.0, turns[sel][:, None] - full.sum(axis=1, keepdims=True), full)
        length = nturn * _f(K.mean_turn_length_m("toroid", centre, od_m=fm.od_m[sel][:, None], id_m=idm,
                                                 core_height_m=fm.core_height_m[sel][:, None]))
        i = current[sel][:, None]
        f1 = f_start[sel][:, None] + (np.cumsum(nturn, axis=1) - nturn) * i
        used = nturn > 0
        fr = layer_ac_factor_rows(gs, np.where(used, nturn, 1.0), sec.usable_m[sel][:, None], delta[sel][:, None],
                                  f1, f1 + np.where(used, nturn, 1.0) * i, harm)
        out[sel] = np.where(used, fr * length, 0.0).sum(axis=1) / np.where(used, length, 0.0).sum(axis=1)
    return out


def section_ac_factor_rows(opt: OptionRows, fm: FormerRows, sec: SectionRows, turns: FloatArray,
                           layer_tape: FloatArray, delta: FloatArray | float, f_start: FloatArray,
                           current: FloatArray | float, harm: Harmonics) -> FloatArray:
    """Rac/Rdc of one section per row as the engine takes it (``design.build.section_frs``): the MMF starts
    at ``f_start`` and each layer adds its turns x ``current`` (signed); every layer's factor is the kernel's
    ``layer_ac_factor`` at its own turns and faces, and the section's factor is their mean weighted by each
    layer's copper length. 1 where no current flows or nothing was wound."""
    rows = turns.shape[0]
    cur = np.broadcast_to(_f(current), (rows,)).astype(np.float64)
    d = np.broadcast_to(_f(delta), (rows,)).astype(np.float64)
    out = np.ones(rows)
    live = sec.ok & (np.abs(cur) >= 1e-12) & (turns > 0)
    g = opt.geometry
    tor = live & (fm.kind == FormerKind.TOROID)
    for mask, toroid in ((live & ~tor, False), (tor, True)):
        idx = np.flatnonzero(mask)
        if not idx.size:
            continue
        gi = _wire_rows(g, idx)
        si, fi = sec.take(idx), fm.take(idx)
        lh, lt = _f(g.layer_height_m)[idx], layer_tape[idx]
        if toroid:
            out[idx] = _toroid_fr(gi, fi, si, turns[idx], lh, lt, d[idx], f_start[idx], cur[idx], harm)
        else:
            out[idx] = _bobbin_fr(gi, fi, si, lh, lt, d[idx], f_start[idx], cur[idx], harm)
    return out


# ------------------------------------------------------------------------------------------------ materials

@dataclass(frozen=True, slots=True)
class MaterialRows:
    """The core materials a search uses, indexed by material number."""
    materials: tuple[Material, ...]
    b_sat_25c_t: FloatArray
    b_sat_100c_t: FloatArray
    b_design_t: FloatArray       # NaN where the material has none
    b_r_t: FloatArray
    k: FloatArray                # Steinmetz coefficients
    alpha: FloatArray
    beta: FloatArray
    loss_fit: FloatArray         # rows x (ct0, ct1, ct2) of the loss-temperature fit, NaN where none
    ceiling_t: FloatArray        # a powder's DC-bias curve ceiling (``kernel.powder_ceiling_t``); inf otherwise

    @classmethod
    def of(cls, materials: list[Material]) -> MaterialRows:
        def col(get: Any) -> FloatArray:
            return np.array([get(m) for m in materials], dtype=np.float64)

        return cls(tuple(materials), col(lambda m: m.b_sat_25c_t), col(lambda m: m.b_sat_100c_t),
                   col(lambda m: m.b_design_t if m.b_design_t is not None else np.nan), col(lambda m: m.b_r_t),
                   col(lambda m: m.steinmetz_k), col(lambda m: m.steinmetz_alpha), col(lambda m: m.steinmetz_beta),
                   np.array([m.loss_temperature or (np.nan, np.nan, np.nan) for m in materials],
                            dtype=np.float64).reshape(len(materials), 3),
                   col(lambda m: K.powder_ceiling_t(m.mu_initial, *m.bias_fit()) if m.is_powder else np.inf))

    def core_loss_factor(self, mi: IntArray, core_temp_c: FloatArray) -> FloatArray:
        """The core loss's temperature factor at the core's temperature (``kernel.core_loss_temperature_factor``)."""
        fit = self.loss_fit[mi]
        return _f(K.core_loss_temperature_factor(core_temp_c, fit[..., 0], fit[..., 1], fit[..., 2]))

    def b_sat_t(self, mi: IntArray, temp_c: FloatArray | float) -> FloatArray:
        """B_sat at temperature (``kernel.b_sat_t``)."""
        return _f(K.b_sat_t(self.b_sat_25c_t[mi], self.b_sat_100c_t[mi], temp_c))

    def flux_limit_t(self, mi: IntArray, temp_c: FloatArray | float, fraction: float,
                     given_t: float | None, powder_fraction: float) -> FloatArray:
        """The working flux limit (``kernel.flux_limit_t``), a powder's no higher than where it counts as saturated
        (``kernel.powder_saturation_t``), as the engine's ``design.flux.flux_limit``."""
        limit = _f(K.flux_limit_t(self.b_sat_25c_t[mi], self.b_sat_100c_t[mi], temp_c, fraction, self.b_design_t[mi],
                                  given_t))
        if given_t is not None:
            return limit
        return np.minimum(limit, _f(K.powder_saturation_t(self.b_sat_t(mi, temp_c), powder_fraction,
                                                                  self.ceiling_t[mi])))

    def core_loss_w_m3(self, mi: IntArray, b_t: FloatArray, freq_hz: float, drive: str, duty: float) -> FloatArray:
        """Core loss density [W/m^3] (``kernel.core_loss_grouped_w_m3``): drive sine, square or unipolar (b_t
        the peak flux), or ripple (b_t a choke's peak-to-peak ripple flux)."""
        return K.core_loss_grouped_w_m3(drive, freq_hz, b_t, duty, mi, self.k, self.alpha, self.beta)


@dataclass(frozen=True, slots=True)
class ThermalModel:
    """The kernel's temperature rise and hot spot for rows (``kernel.temperature_rise_k``: the engine's cooling,
    a core's measured thermal resistance where the catalogue has one, its MAX_HOT_C)."""
    ambient_c: float
    cooling: CoolingModel
    hotspot_margin_k: float

    def state(self, total_loss_w: FloatArray, surface_m2: FloatArray,
              r_th_k_w: FloatArray) -> tuple[FloatArray, FloatArray]:
        """(hot spot [degC], rise [K]); ``r_th_k_w`` per row, NaN where the core has no measured one."""
        rise = _f(K.temperature_rise_k(total_loss_w, surface_m2, self.cooling, self.ambient_c, r_th_k_w))
        return _f(K.hot_spot_c(self.ambient_c, rise, self.hotspot_margin_k)), rise
